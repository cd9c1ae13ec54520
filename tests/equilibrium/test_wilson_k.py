"""Wilson's K-values against the formula with CoolProp's constants and CoolProp's vapor pressures.

Wilson, G. M. (1968), AIChE 65th National Meeting, paper 15c: ln K = ln(Pc/P) + 5.373 (1 + ω)(1 − Tc/T).
CoolProp: Bell et al. (2014), Ind. Eng. Chem. Res. 53, 2498.
"""

import math

import numpy as np
import pytest

import thermo_roots as tr
from thermo_roots.equilibrium import rachford_rice, wilson_k
from thermo_roots.errors import InputError, WrongTypeError

NAMES = ["Methane", "Ethane", "n-Propane", "n-Butane", "CarbonDioxide", "Nitrogen", "n-Pentane", "R134a"]


@pytest.fixture(scope="module")
def coolprop_constants():
    import CoolProp

    out = {}
    for name in NAMES:
        state = CoolProp.AbstractState("HEOS", name)
        out[name] = (state.T_critical(), state.p_critical(), state.acentric_factor())
    return out


def test_against_the_formula_with_coolprops_critical_constants(coolprop_constants):
    mix = tr.Mixture({name: 1 / len(NAMES) for name in NAMES}, normalize=True)
    T = np.array([150.0, 250.0, 300.0, 420.0])
    P = np.array([1e5, 2e6, 5e6, 12e6])
    K = wilson_k(mix, T[:, None], P[None, :])
    assert K.shape == (4, 4, len(NAMES))
    for a, t in enumerate(T):
        for b, p in enumerate(P):
            for c, name in enumerate(NAMES):
                Tc, Pc, omega = coolprop_constants[name]
                expected = Pc / p * math.exp(5.373 * (1 + omega) * (1 - Tc / t))
                assert K[a, b, c] == pytest.approx(expected, rel=1e-12)


@pytest.mark.parametrize("name", NAMES)
def test_k_times_pressure_is_the_vapor_pressure_at_reduced_temperature_0_7(name, coolprop_constants):
    # Wilson's 5.373 is (7/3) ln 10 to 1e-4, which makes K P = Pc 10^(-1 - ω) at Tr = 0.7: Pitzer's
    # definition of the acentric factor (Pitzer et al. 1955, J. Am. Chem. Soc. 77, 3433). Against
    # CoolProp's own saturation pressure there: within 0.5 % (CO2's stored ω is 0.2 % off its equation's).
    import CoolProp.CoolProp as CP

    Tc, Pc, omega = coolprop_constants[name]
    mix = tr.Mixture({name: 1.0})
    P = 3e5
    K = wilson_k(mix, 0.7 * Tc, P)
    assert K.shape == (1,)
    assert K[0] * P == pytest.approx(CP.PropsSI("P", "T", 0.7 * Tc, "Q", 0, name), rel=5e-3)


def test_wilson_start_splits_a_natural_gas_at_separator_conditions():
    # A lean gas with a heavy tail at 250 K and 3 MPa: Wilson's K spans both sides of 1 (common
    # practice: methane volatile, n-hexane not), so the Rachford-Rice split has a root in (0, 1).
    gas = tr.Mixture({"methane": 0.80, "ethane": 0.08, "propane": 0.05, "n-butane": 0.03, "n-pentane": 0.02,
                      "n-hexane": 0.02})
    K = wilson_k(gas, 250.0, 3e6)
    assert K[0] > 1 > K[-1] and np.all(np.diff(K) < 0)   # K falls with the boiling point
    r = rachford_rice(gas.z, K)
    assert r.status == "two-phase" and 0 < r.beta < 1
    assert r.y[0] > gas.z[0] > r.x[0]


def test_scalar_and_broadcast_shapes():
    mix = tr.Mixture({"methane": 0.5, "ethane": 0.5})
    assert wilson_k(mix, 200.0, 1e6).shape == (2,)
    assert wilson_k(mix, [200.0, 250.0, 300.0], 1e6).shape == (3, 2)
    np.testing.assert_allclose(wilson_k(mix, [200.0, 250.0], 1e6)[1], wilson_k(mix, 250.0, 1e6), rtol=1e-15)


@pytest.mark.parametrize("T, P, error, pattern", [
    (-10.0, 1e6, InputError, r"T must be positive.*got -10\.0\.$"),
    (300.0, float("nan"), InputError, r"P must be positive.*got nan\.$"),
    ([300.0, 0.0], 1e6, InputError, r"at index \(1,\)"),
    ("300 K", 1e6, WrongTypeError, r"to_si"),
    ([300.0, 310.0], [1e6, 2e6, 3e6], InputError, r"do not broadcast"),
])
def test_bad_temperature_and_pressure(T, P, error, pattern):
    mix = tr.Mixture({"methane": 0.5, "ethane": 0.5})
    with pytest.raises(error, match=pattern):
        wilson_k(mix, T, P)


def test_needs_a_mixture():
    with pytest.raises(WrongTypeError, match=r"needs a Mixture"):
        wilson_k({"methane": 1.0}, 300.0, 1e6)
