"""The ideal-gas part of every fluid against CoolProp's reference equations, scipy and handbook values."""

import dataclasses
import json
import math
import subprocess
import sys

import CoolProp
import CoolProp.CoolProp as CP
import numpy as np
import pytest
from scipy.integrate import quad

import thermo_roots as tr
from thermo_roots.ideal_gas import (IdealGasPart, IdealHelmholtz, R_CODATA, P_REF, T_REF, part_from_coolprop)

NAMES = tr.fluid_names()


def _gas_state(library_name):
    state = CoolProp.AbstractState("HEOS", library_name)
    state.specify_phase(CoolProp.iphase_gas)   # single-phase evaluation even inside the dome
    return state


def _temperatures(fluid, count=7):
    """From the triple point to twice the critical temperature."""
    return np.linspace(fluid.T_triple, 2.0 * fluid.Tc, count)


# ------------------------------------------------------------------ the term types of CoolProp's files

def test_every_ideal_gas_term_type_of_the_library_is_converted():
    # CoolProp 8.0.0 uses these ten types in EOS[0]["alpha0"] of its 136 fluids (listed from
    # its fluid JSON); part_from_coolprop knows each, and refuses an unknown one
    seen = set()
    for name in NAMES:
        document = json.loads(CP.get_fluid_param_string(name, "JSON"))
        eos = (document[0] if isinstance(document, list) else document)["EOS"][0]
        seen |= {term["type"] for term in eos["alpha0"]}
        part_from_coolprop(eos, 8.314, 300.0, 1000.0, source=name)
    assert {"IdealGasHelmholtzLead", "IdealGasHelmholtzLogTau", "IdealGasHelmholtzPlanckEinstein",
            "IdealGasHelmholtzCP0AlyLee", "IdealGasHelmholtzCP0PolyT"} <= seen
    fake = {"alpha0": [{"type": "IdealGasHelmholtzSomethingNew", "n": [1.0]}]}
    with pytest.raises(tr.InputError, match="IdealGasHelmholtzSomethingNew"):
        part_from_coolprop(fake, 8.314, 300.0, 1000.0, source="fake")


def test_every_library_fluid_carries_its_ideal_gas_part():
    for name in NAMES:
        part = tr.get_fluid(name).ideal_gas
        assert isinstance(part, IdealGasPart), name
        state = CoolProp.AbstractState("HEOS", name)
        # R and the reducing values are the reference equation's own (CoolProp)
        assert part.R == state.gas_constant() and part.T_r == state.T_reducing(), name
        assert part.rho_r == pytest.approx(state.rhomolar_reducing(), rel=1e-12), name


# ------------------------------------------------------------------ against CoolProp's own values

@pytest.mark.parametrize("name", NAMES)
def test_cp0_agrees_with_the_reference_equation(name):
    # CoolProp HEOS cp0molar() (Bell et al. 2014), triple point to 2 Tc, to 1e-9 relative
    fluid = tr.get_fluid(name)
    state = _gas_state(name)
    T = _temperatures(fluid)
    mine = fluid.ideal_gas.cp0(T)
    reference = []
    for t in T:
        state.update(CoolProp.DmolarT_INPUTS, 1e-3, t)
        reference.append(state.cp0molar())
    np.testing.assert_allclose(mine, reference, rtol=1e-9, atol=0)


@pytest.mark.parametrize("name", NAMES)
def test_alpha0_and_its_tau_derivatives_agree_with_the_reference_equation(name):
    # CoolProp HEOS alpha0(), dalpha0_dTau(), d2alpha0_dTau2() at dilute and dense states, to
    # 1e-10 relative (relative to max(|value|, 1) where a value passes near zero)
    fluid = tr.get_fluid(name)
    part = fluid.ideal_gas
    state = _gas_state(name)
    for T, rho in ((fluid.T_triple, 1e-2), (fluid.Tc, part.rho_r), (1.7 * fluid.Tc, 3.0 * part.rho_r)):
        state.update(CoolProp.DmolarT_INPUTS, rho, T)
        mine = part.alpha0(part.T_r / T, rho / part.rho_r)
        for got, want in zip(mine, (state.alpha0(), state.dalpha0_dTau(), state.d2alpha0_dTau2())):
            assert abs(got - want) <= 1e-10 * max(abs(want), 1.0), (name, T, rho, got, want)


@pytest.mark.parametrize("name", NAMES)
def test_h0_and_s0_are_the_reference_equation_in_its_ideal_gas_limit(name):
    # CoolProp HEOS hmolar - hmolar_residual and smolar - smolar_residual at rho = P / (R T),
    # P = 1 Pa: its ideal-gas enthalpy and entropy in its own reference state, to 1e-9
    # relative to max(|value|, R T) and max(|value|, R) (a value can pass through zero)
    fluid = tr.get_fluid(name)
    part = fluid.ideal_gas
    state = _gas_state(name)
    T = _temperatures(fluid)
    P = 1.0
    h0, s0 = part.h0(T), part.s0(T, P)
    for i, t in enumerate(T):
        state.update(CoolProp.DmolarT_INPUTS, P / (part.R * t), t)
        want_h = state.hmolar() - state.hmolar_residual()
        want_s = state.smolar() - state.smolar_residual()
        assert abs(h0[i] - want_h) <= 1e-9 * max(abs(want_h), part.R * t), (name, t, h0[i], want_h)
        assert abs(s0[i] - want_s) <= 1e-9 * max(abs(want_s), part.R), (name, t, s0[i], want_s)


def test_n_heptane_keeps_the_reference_equations_normal_boiling_point_reference_state():
    # n-heptane's fluid file refers h and s to the saturated liquid at the normal boiling
    # point (its "NBP" offset); CoolProp's value there is 0 (Bell et al. 2014). Its
    # ideal-gas h0 at 400 K must be CoolProp's, which needs the reference-state adjustment
    # of the Aly-Lee terms made when the table is written (fluids._ideal_gas_from_coolprop).
    part = tr.get_fluid("n-heptane").ideal_gas
    state = _gas_state("n-Heptane")
    state.update(CoolProp.DmolarT_INPUTS, 1e-3, 400.0)
    assert part.h0(400.0) == pytest.approx(state.hmolar() - state.hmolar_residual(), rel=1e-9)
    assert CP.PropsSI("H", "P", 101325, "Q", 0, "n-Heptane") == pytest.approx(0.0, abs=1e-3)


@pytest.mark.parametrize("name, T, cp0", [
    # NIST-JANAF Thermochemical Tables, 4th ed. (Chase 1998), Cp at 298.15 K [J/(mol K)], from memory
    ("nitrogen", 298.15, 29.124), ("carbon dioxide", 298.15, 37.129), ("methane", 298.15, 35.639),
    ("water", 298.15, 33.590), ("argon", 298.15, 20.786),
])
def test_cp0_against_handbook_values(name, T, cp0):
    assert tr.get_fluid(name).ideal_gas.cp0(T) == pytest.approx(cp0, rel=2e-3)


# ------------------------------------------------------------------ the molar form and its derivatives

def test_helmholtz_derivatives_are_those_of_a():
    # central finite differences of a0 itself (common practice); a_v = -R T / v is the ideal-gas law
    part = tr.get_fluid("propane").ideal_gas
    T, v = 350.0, 0.02
    f = part.helmholtz(T, v)
    assert isinstance(f, IdealHelmholtz)
    hT, hv = 1e-3, 1e-7
    a = lambda T_, v_: part.helmholtz(T_, v_).a   # noqa: E731
    assert f.a_T == pytest.approx((a(T + hT, v) - a(T - hT, v)) / (2 * hT), rel=1e-7)
    assert f.a_TT == pytest.approx((part.helmholtz(T + hT, v).a_T - part.helmholtz(T - hT, v).a_T) / (2 * hT), rel=1e-6)
    assert f.a_v == pytest.approx((a(T, v + hv) - a(T, v - hv)) / (2 * hv), rel=1e-7)
    assert f.a_v == pytest.approx(-part.R * T / v, rel=1e-14)
    assert f.a_vv == pytest.approx((part.helmholtz(T, v + hv).a_v - part.helmholtz(T, v - hv).a_v) / (2 * hv), rel=1e-6)
    assert f.a_Tv == pytest.approx((part.helmholtz(T + hT, v).a_v - part.helmholtz(T - hT, v).a_v) / (2 * hT), rel=1e-7)
    # the three properties come from the same bundle
    assert part.cp0(T) == pytest.approx(-T * f.a_TT + part.R, rel=1e-14)
    assert part.s0(T, part.R * T / v) == pytest.approx(-f.a_T, rel=1e-14)


def test_arrays_broadcast_and_scalars_give_floats():
    part = tr.get_fluid("CO2").ideal_gas
    T = np.array([[250.0], [300.0], [400.0]])
    v = np.array([0.01, 0.02, 0.05, 0.1])
    f = part.helmholtz(T, v)
    assert all(np.shape(x) == (3, 4) for x in f)
    assert np.shape(part.cp0(T[:, 0])) == (3,) and np.shape(part.s0(T, v * 1e7)) == (3, 4)
    scalar = part.helmholtz(300.0, 0.02)
    assert all(type(x) is float for x in scalar)
    assert type(part.cp0(300.0)) is float and type(part.h0(300.0)) is float and type(part.s0(300.0, 1e5)) is float
    np.testing.assert_allclose(f.a[1], [part.helmholtz(300.0, x).a for x in v], rtol=1e-13)
    # not a temperature, volume or pressure: NaN there, the rest untouched
    cp = part.cp0(np.array([300.0, -1.0, 0.0]))
    assert np.isfinite(cp[0]) and np.isnan(cp[1:]).all()
    assert np.isnan(part.s0(300.0, 0.0))


def test_far_below_the_triple_point_every_term_stays_finite():
    # The generalized Planck-Einstein term of air grows like exp(87.3 tau) and the Aly-Lee
    # terms hold sinh and cosh of theta / T: written directly they overflow at a few kelvin.
    for name in NAMES:
        part = tr.get_fluid(name).ideal_gas
        values = part.helmholtz(np.array([1.0, 3.0]), 1.0)
        assert all(np.isfinite(x).all() for x in values), name
    # and the stable forms are still CoolProp's values at 30 K for air (CoolProp cp0molar)
    state = _gas_state("Air")
    state.update(CoolProp.DmolarT_INPUTS, 1e-3, 30.0)
    assert tr.get_fluid("air").ideal_gas.cp0(30.0) == pytest.approx(state.cp0molar(), rel=1e-9)


# ------------------------------------------------------------------ user-defined fluids

_USER = dict(Tc=350.0, Pc=4.0e6, omega=0.2, molar_mass=0.05)


def test_a_constant_cp0_gives_the_textbook_ideal_gas():
    # h0 = cp (T - T0), s0 = cp ln(T/T0) - R ln(P/P0) for constant cp (common practice)
    cp = 33.5
    part = tr.Fluid("gas", cp0=cp, **_USER).ideal_gas
    assert part.R == R_CODATA
    for T, P in ((200.0, 5e4), (298.15, 101325.0), (600.0, 3e6)):
        assert part.cp0(T) == pytest.approx(cp, rel=1e-13)
        assert part.h0(T) == pytest.approx(cp * (T - T_REF), abs=1e-9 * cp * T)
        assert part.s0(T, P) == pytest.approx(cp * math.log(T / T_REF) - R_CODATA * math.log(P / P_REF),
                                              abs=1e-9 * cp)


def test_a_polynomial_cp0_integrates_to_h0_and_s0_as_quadrature_says():
    # cp0 of n-butane, Poling, Prausnitz & O'Connell, The Properties of Gases and Liquids,
    # 5th ed. (2001), appendix A (a0..a4 times R, T in K), from memory; any plausible
    # polynomial serves: h0 and s0 are checked against scipy.integrate.quad
    a = [5.547, 5.536e-3, 8.057e-5, -10.571e-8, 4.134e-11]
    coefficients = tuple(R_CODATA * c for c in a)
    fluid = tr.Fluid("butane blend", cp0=coefficients, Tc=425.1, Pc=3.796e6, omega=0.2, molar_mass=0.0581)
    part = fluid.ideal_gas
    cp = lambda T: sum(c * T**k for k, c in enumerate(coefficients))   # noqa: E731
    assert fluid.cp0 == coefficients
    assert part.h0(T_REF) == pytest.approx(0.0, abs=1e-9) and part.s0(T_REF, P_REF) == pytest.approx(0.0, abs=1e-12)
    for T in (250.0, 300.0, 500.0, 900.0):
        assert part.cp0(T) == pytest.approx(cp(T), rel=1e-12)
        assert part.h0(T) == pytest.approx(quad(cp, T_REF, T, epsabs=0, epsrel=1e-13)[0], rel=1e-10, abs=1e-8)
        for P in (1e3, 2e6):
            s = quad(lambda t: cp(t) / t, T_REF, T, epsabs=0, epsrel=1e-13)[0] - R_CODATA * math.log(P / P_REF)
            assert part.s0(T, P) == pytest.approx(s, rel=1e-10, abs=1e-10)


def test_user_fluids_stay_hashable_values():
    one = tr.Fluid("gas", cp0=(30.0, 0.01), **_USER)
    two = tr.Fluid("gas", cp0=[30.0, 0.01], **_USER)
    assert one == two and hash(one) == hash(two) and one.cp0 == (30.0, 0.01)
    assert tr.Fluid("gas", cp0=np.float32(30.0), **_USER).cp0 == 30.0
    assert tr.Fluid("gas", **_USER).ideal_gas is None
    assert hash(tr.get_fluid("water")) == hash(tr.get_fluid("water"))
    # dataclasses.replace passes cp0 and the part made from it: the part is made again
    moved = dataclasses.replace(one, Tc=360.0)
    assert moved.ideal_gas.T_r == 360.0 and moved.cp0 == one.cp0
    assert moved.ideal_gas.cp0(400.0) == pytest.approx(one.ideal_gas.cp0(400.0), rel=1e-13)


@pytest.mark.parametrize("cp0, error, words", [
    ("29 J/(mol K)", tr.WrongTypeError, "cp0 must be"),
    (True, tr.WrongTypeError, "cp0 must be"),
    ((30.0, "0.1"), tr.WrongTypeError, "coefficient 1"),
    (float("nan"), tr.InputError, "finite"),
    ((30.0, math.inf), tr.InputError, "finite"),
    ((), tr.InputError, "1 to 5"),
    ((1.0, 2.0, 3.0, 4.0, 5.0, 6.0), tr.InputError, "1 to 5"),
    (5.0, tr.InputError, "cp0 > R"),                  # below R at 300 K: not an ideal gas
    ((40.0, -0.2), tr.InputError, "at 300 K"),        # 40 - 60 < 0 at 300 K
])
def test_bad_cp0_is_refused_with_a_message(cp0, error, words):
    with pytest.raises(error, match=None) as caught:
        tr.Fluid("my gas", cp0=cp0, **_USER)
    message = str(caught.value)
    assert words in message and "my gas" in message and "J/(mol K)" in message, message
    assert isinstance(caught.value, ValueError)


def test_cp0_and_ideal_gas_together_or_a_wrong_ideal_gas_are_refused():
    part = tr.get_fluid("propane").ideal_gas
    with pytest.raises(tr.InputError, match="not both"):
        tr.Fluid("x", cp0=30.0, ideal_gas=part, **_USER)
    with pytest.raises(tr.WrongTypeError, match="IdealGasPart"):
        tr.Fluid("x", ideal_gas=30.0, **_USER)


# ------------------------------------------------------------------ loading stays cheap

def test_a_library_fluids_ideal_gas_needs_no_coolprop_import():
    code = ("import sys, thermo_roots as tr; p = tr.get_fluid('R134a').ideal_gas; "
            "print(p.cp0(300.0), p.h0(300.0), p.s0(300.0, 1e5)); "
            "assert 'CoolProp' not in sys.modules and 'scipy' not in sys.modules")
    run = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, timeout=120)
    assert run.returncode == 0, run.stderr
    assert all(math.isfinite(float(x)) for x in run.stdout.split())
