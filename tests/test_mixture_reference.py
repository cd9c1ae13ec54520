"""The reference mixture model (CoolProp's HEOS mixtures, GERG-2008 type) as thermo_roots reads it.

Checked against the outside world: the GERG-2008 check value of AGA Report No. 8 (2017),
the ideal-gas limit, the reference library through a second route (its density-temperature
evaluation and its fugacities at the phases it returned), and the phase of a liquefied
petroleum gas. Each CoolProp mixture call takes 30-500 ms, so the tests use a handful of
states, each fixture once per module.
"""

import sys
from concurrent.futures import ThreadPoolExecutor

import numpy as np
import pytest

import thermo_roots as tr
from thermo_roots import reference as ref
from thermo_roots.reference import mixture as refmix

CoolProp = pytest.importorskip("CoolProp")

# invented compositions (the demo site's fuel gas and LPG are invented too)
GAS3 = {"methane": 0.9, "ethane": 0.07, "propane": 0.03}
LPG = {"propane": 0.6, "n-butane": 0.4}
BINARY = {"methane": 0.6, "ethane": 0.4}


def _heos(mixture):
    state = CoolProp.AbstractState("HEOS", "&".join(f.library_name for f in mixture.fluids))
    state.set_mole_fractions(list(mixture.z))
    return state


@pytest.fixture(scope="module")
def gas3():
    return tr.Mixture(GAS3)


@pytest.fixture(scope="module")
def gas3_states(gas3):
    # one phase (300 K, 5 MPa) and two phases (200 K, 3 MPa) in one array call
    return ref.reference_mixture_state(gas3, np.array([300.0, 200.0]), np.array([5e6, 3e6]))


def test_single_phase_density_gives_the_pressure_back(gas3, gas3_states):
    # Second route through the reference: its (rho, T) evaluation at the density its (T, P)
    # flash returned must give the same P (consistency of CoolProp's own model).
    assert gas3_states.available[0] and gas3_states.phase[0] != "two-phase"
    state = _heos(gas3)
    state.update(CoolProp.DmolarT_INPUTS, gas3_states.rho[0], 300.0)
    assert state.p() == pytest.approx(5e6, rel=1e-8)
    R = state.gas_constant()
    assert gas3_states.Z[0] == pytest.approx(5e6 / (gas3_states.rho[0] * R * 300.0), rel=1e-12)
    np.testing.assert_allclose(gas3_states.x[0], gas3.z, rtol=0, atol=0)
    # above Kay's pseudo-critical point (about 205 K, 4.61 MPa): supercritical, no vapor fraction
    assert gas3_states.phase[0] == "supercritical"
    assert np.isnan(gas3_states.vapor_fraction[0]) and np.isnan(gas3_states.rho_vapor[0])


def test_two_phase_split_balances_and_has_equal_fugacities(gas3, gas3_states):
    assert gas3_states.phase[1] == "two-phase"
    beta, x, y = gas3_states.vapor_fraction[1], gas3_states.x[1], gas3_states.y[1]
    assert 0.0 < beta < 1.0
    # material balance z = (1 - beta) x + beta y (common practice), each phase sums to 1
    np.testing.assert_allclose((1 - beta) * x + beta * y, gas3.z, atol=1e-9)
    assert x.sum() == pytest.approx(1.0, abs=1e-12) and y.sum() == pytest.approx(1.0, abs=1e-12)
    # the mean volume is the molar lever rule of the phase volumes
    v = beta / gas3_states.rho_vapor[1] + (1 - beta) / gas3_states.rho_liquid[1]
    assert 1.0 / gas3_states.rho[1] == pytest.approx(v, rel=1e-9)
    # equal fugacity of every component (phase equilibrium), each phase evaluated on its own
    # through the reference's (rho, T) route at the composition and density returned
    fugacities = []
    for comp, rho in ((x, gas3_states.rho_liquid[1]), (y, gas3_states.rho_vapor[1])):
        state = _heos(gas3)
        state.set_mole_fractions(list(comp))
        state.update(CoolProp.DmolarT_INPUTS, rho, 200.0)
        assert state.p() == pytest.approx(3e6, rel=1e-6)
        fugacities.append([state.fugacity(i) for i in range(len(gas3))])
    np.testing.assert_allclose(fugacities[0], fugacities[1], rtol=1e-6)


def test_ideal_gas_limit_at_low_pressure(gas3):
    # At 1 kPa and 300 K a natural gas is ideal to |B| P / (R T) ~ 2e-5 (second virial
    # coefficient of methane about -43 cm3/mol at 300 K, from memory): Z = 1 within 1e-4
    # (common practice).
    r = ref.reference_mixture_state(gas3, 300.0, 1e3)
    assert r.available and r.phase == "vapor"
    assert r.Z == pytest.approx(1.0, abs=1e-4)
    assert r.rho == pytest.approx(1e3 / (tr.R * 300.0), rel=1e-4)


def test_gerg_2008_check_value_of_aga8():
    # AGA Report No. 8 Part 2 (2017), the GERG-2008 check gas of 21 components at 400 K and
    # 50 MPa: D = 12.79828626 mol/l, Z = 1.174690666 (the published check output of the
    # NIST AGA8 code, from memory). CoolProp uses each component's own reference equation
    # instead of GERG-2008's pure-fluid equations, so agreement within 1e-4 (measured: 2e-5).
    gas = tr.Mixture({"methane": 0.77824, "nitrogen": 0.02, "CO2": 0.06, "ethane": 0.08, "propane": 0.03,
                      "isobutane": 0.0015, "n-butane": 0.003, "isopentane": 0.0005, "n-pentane": 0.00165,
                      "n-hexane": 0.00215, "n-heptane": 0.00088, "n-octane": 0.00024, "n-nonane": 0.00015,
                      "n-decane": 0.00009, "hydrogen": 0.004, "oxygen": 0.005, "carbon monoxide": 0.002,
                      "water": 0.0001, "hydrogen sulfide": 0.0025, "helium": 0.007, "argon": 0.001})
    r = ref.reference_mixture_state(gas, 400.0, 50e6)
    assert r.available, r.reason
    assert r.Z == pytest.approx(1.174690666, rel=1e-4)
    assert r.rho == pytest.approx(12798.28626, rel=1e-4)
    assert r.phase == "supercritical"   # far above Kay's pseudo-critical point


def test_phase_words_follow_the_stated_rule_not_the_library_label():
    lpg = tr.Mixture(LPG)
    r = ref.reference_mixture_state(lpg, np.array([400.0, 300.0, 300.0]), np.array([10e6, 3e6, 1e5]))
    # 400 K, 10 MPa: above Kay's pseudo-critical point (about 392 K, 4.07 MPa from the
    # components' Tc and Pc); CoolProp's HEOS calls it "liquid" (density above its reducing
    # density), the stated rule "supercritical".
    T_pc, P_pc = ref.pseudo_critical(lpg)
    assert T_pc == pytest.approx(0.6 * 369.89 + 0.4 * 425.125, rel=1e-6)   # Tc: CoolProp's propane, n-butane
    assert list(r.phase) == ["supercritical", "liquid", "vapor"]
    assert r.library_phase[0] == "liquid"
    # 300 K, 3 MPa is a liquid: propane's vapor pressure at 300 K is about 1.0 MPa and an
    # LPG's is lower (common practice); 0.1 MPa is a vapor
    assert r.pip[1] > 1.0 > r.pip[2]
    assert r.vapor_fraction[1] == 0.0 and r.rho_liquid[1] == r.rho[1] and np.isnan(r.rho_vapor[1])


def test_mixture_phase_word_cases():
    word = ref.mixture_phase_word
    assert word(300.0, 1e6, 0.5, 200.0, 4.6e6, two_phase=True) == "two-phase"
    assert word(300.0, 5e6, 3.0, 200.0, 4.6e6) == "supercritical"   # never "liquid" above T_pc
    assert word(300.0, 1e6, 3.0, 200.0, 4.6e6) == "vapor"
    assert word(150.0, 1e7, 3.0, 200.0, 4.6e6) == "liquid"
    assert word(150.0, 1e5, 0.6, 200.0, 4.6e6) == "vapor"
    assert word(150.0, 1e5, float("nan"), 200.0, 4.6e6) == "vapor"


def test_bubble_and_dew_points_agree_with_the_flash():
    binary = tr.Mixture(BINARY)
    bubble = ref.reference_bubble_point(binary, T=200.0)
    dew = ref.reference_dew_point(binary, T=200.0)
    assert bubble.available and dew.available, (bubble.reason, dew.reason)
    assert bubble.kind == "bubble,T" and bubble.vapor_fraction == 0.0 and dew.vapor_fraction == 1.0
    assert dew.P < bubble.P
    np.testing.assert_allclose(bubble.x, binary.z, atol=1e-9)
    np.testing.assert_allclose(dew.y, binary.z, atol=1e-9)
    # methane is the lighter component: richer in the first bubble, poorer in the first drop
    assert bubble.incipient[0] > 0.6 > dew.incipient[0]
    # the (T, P) flash a little above the bubble pressure is one liquid phase, between the two
    # pressures two phases (definition of the bubble and dew points, common practice)
    r = ref.reference_mixture_state(binary, 200.0, np.array([1.02 * bubble.P, 0.5 * (bubble.P + dew.P)]))
    assert r.phase[0] == "liquid"
    assert r.phase[1] == "two-phase" and 0.0 < r.vapor_fraction[1] < 1.0
    # the same bubble point from the pressure side gives the temperature back
    back = ref.reference_bubble_point(binary, P=bubble.P)
    assert back.T == pytest.approx(200.0, abs=1e-3)


def test_failures_are_reasons_not_exceptions():
    # a pair the library has no parameters for: every state unavailable, CoolProp's words kept
    r = ref.reference_mixture_state({"methane": 0.5, "ethanol": 0.5}, np.array([300.0, 310.0]), 1e5)
    assert not r.available.any()
    assert "no mixture model" in r.reason[0] and "Could not match the binary pair" in r.reason[0]
    # a non-finite element: that one unavailable, the other evaluated
    r = ref.reference_mixture_state(tr.Mixture(BINARY), np.array([np.nan, 300.0]), 1e5)
    assert list(r.available) == [False, True] and "not a finite number" in r.reason[0]
    # a bubble point CoolProp's saturation solver cannot find (six-component gas at 200 K,
    # measured): unavailable with its message
    gas6 = tr.Mixture({"methane": 0.85, "ethane": 0.06, "propane": 0.03, "n-butane": 0.01, "nitrogen": 0.03,
                       "CO2": 0.02})
    b = ref.reference_bubble_point(gas6, T=200.0)
    if b.available:
        pytest.skip("this CoolProp finds the bubble point it failed on before; pick another failing state")
    assert "no bubble point at T = 200 K" in b.reason and "CoolProp:" in b.reason
    assert np.isnan(b.P) and np.isnan(b.incipient).all()


def test_user_fluid_without_reference_is_unavailable():
    mine = tr.Fluid("my gas", Tc=200.0, Pc=4.5e6, omega=0.02, molar_mass=0.018)
    r = ref.reference_mixture_state(tr.Mixture({mine: 0.5, "methane": 0.5}), 300.0, 1e5)
    assert not r.available and "my gas" in r.reason and "unavailable" in repr(r)


def test_threads_and_map_executors_give_the_serial_result():
    # one CoolProp state object per thread and mixture: with four threads, one state per
    # chunk and a 10 µs switch interval, a shared object would hand one thread another's
    # answer between update and read (as test_reference_threads.py does for pure fluids)
    binary = tr.Mixture(BINARY)
    T = np.concatenate([[300.0, 250.0, 200.0, 180.0], np.linspace(250.0, 350.0, 12)])
    P = np.concatenate([[5e6, 1e6, 3e6, 1e5], np.linspace(1e5, 2e6, 12)])
    serial = ref.reference_mixture_state(binary, T, P)
    assert serial.available.all() and len(set(np.round(serial.rho, 6))) == T.size

    class MapOnly:   # anything with map(function, *iterables)
        def map(self, function, *iterables):
            return map(function, *iterables)

    old = sys.getswitchinterval()
    sys.setswitchinterval(1e-5)
    try:
        with ThreadPoolExecutor(4) as pool:
            runs = [ref.reference_mixture_state(binary, T, P, executor=pool, chunk_size=1),
                    ref.reference_mixture_state(binary, T[:4], P[:4], executor=MapOnly(), chunk_size=1)]
    finally:
        sys.setswitchinterval(old)
    for got in runs:
        n = np.size(got.T)
        for name in ("rho", "Z", "vapor_fraction", "x", "y"):
            np.testing.assert_allclose(getattr(got, name), getattr(serial, name)[:n], rtol=1e-12, equal_nan=True)
        assert list(got.phase) == list(serial.phase[:n])


def test_interrupted_run_keeps_the_finished_chunks(monkeypatch):
    binary = tr.Mixture(BINARY)
    real = refmix._mixture_chunk
    calls = []

    def interrupt_second(*args):
        calls.append(1)
        if len(calls) == 2:
            raise KeyboardInterrupt
        return real(*args)

    monkeypatch.setattr(refmix, "_mixture_chunk", interrupt_second)
    r = ref.reference_mixture_state(binary, np.array([300.0, 310.0, 320.0]), 1e5, chunk_size=1,
                                    on_interrupt="partial")
    assert r.completed == 1 and list(r.available) == [True, False, False]
    assert r.reason[1] == ref.MIXTURE_INTERRUPTED
    with pytest.raises(KeyboardInterrupt):
        calls.clear()
        ref.reference_mixture_state(binary, np.array([300.0, 310.0]), 1e5, chunk_size=1)


def test_bad_arguments_are_named():
    binary = tr.Mixture(BINARY)
    with pytest.raises(TypeError, match="mixture must be a thermo_roots.Mixture"):
        ref.reference_mixture_state("methane", 300.0, 1e5)
    with pytest.raises(tr.InputError, match="exactly one of T"):
        ref.reference_bubble_point(binary, T=200.0, P=1e6)
    with pytest.raises(tr.InputError, match="exactly one of T"):
        ref.reference_dew_point(binary)
    with pytest.raises(tr.InputError, match="give both T .* P is missing"):
        ref.reference_mixture_state(binary, 300.0, None)
    with pytest.raises(tr.InputError, match=r"T has shape \(2,\) and P has shape \(3,\)"):
        ref.reference_mixture_state(binary, [300.0, 310.0], [1e5, 2e5, 3e5])
    with pytest.raises(tr.InputError, match="reference_mixture_state: T: Cannot read the unit"):
        ref.reference_mixture_state(binary, "5 apples", 1e5)
    with pytest.raises(TypeError, match="executor must be"):
        ref.reference_mixture_state(binary, 300.0, 1e5, executor=4)
    with pytest.raises(tr.InputError, match="chunk_size"):
        ref.reference_mixture_state(binary, 300.0, 1e5, chunk_size=0)
    with pytest.raises(tr.InputError, match="on_interrupt"):
        ref.reference_mixture_state(binary, 300.0, 1e5, on_interrupt="later")


def test_text_knowns_and_the_notebook_view():
    binary = tr.Mixture(BINARY)
    r = ref.reference_mixture_state(binary, "26.85 °C", "1 bar")
    assert r.T == pytest.approx(300.0) and r.P == pytest.approx(1e5)
    shown = ref.reference_mixture_state(binary, 300.0, 1e5, progress=True)   # with a progress bar
    assert shown.rho == pytest.approx(r.rho, rel=1e-12)
    page = r._repr_html_()
    assert "mol/m³" in page and "vapor y" in page and "licensed engineer" in page and "methane" in page
    many = ref.reference_mixture_state(binary, np.array([300.0, np.nan]), 1e5)
    page = many._repr_html_()
    assert "2 states, 1 available" in page and "not a finite number" in page and "nan" not in page


def test_a_split_with_a_negative_mole_fraction_is_unavailable(monkeypatch):
    # CoolProp's saturation solvers can return a negative mole fraction (its PR backend did
    # for a natural gas's dew point, tests/equilibrium/coolprop_cubic.py); mole fractions are
    # never negative (common practice), so such an answer must not pass as a reference value.
    binary = tr.Mixture(BINARY)
    good = ref.reference_dew_point(binary, T=200.0)
    assert good.available

    class Negative:
        def __init__(self, state):
            self._state = state

        def __getattr__(self, name):
            return getattr(self._state, name)

        def mole_fractions_liquid(self):
            return [1.1, -0.1]

    real = refmix._mixture_abstract_state
    monkeypatch.setattr(refmix, "_mixture_abstract_state", lambda names: Negative(real(names)))
    bad = ref.reference_dew_point(binary, T=200.0)
    assert not bad.available and "negative mole fraction" in bad.reason and np.isnan(bad.P)


def test_one_component_mixture_is_the_pure_reference_with_its_phase_words():
    # With one component, Kay's pseudo-critical point is the critical point, so the mixture
    # rule must give the project's pure-fluid phase words (supercritical: T >= Tc and P >= Pc;
    # vapor above Tc below Pc), and CoolProp's mixture call its pure-fluid equation.
    co2 = tr.Mixture({"CO2": 1.0})
    T = np.array([250.0, 250.0, 320.0, 320.0])        # CO2: Tc 304.13 K, Pc 7.377 MPa
    P = np.array([5e6, 1e6, 10e6, 5e6])
    mix = ref.reference_mixture_state(co2, T, P)
    pure = ref.reference_state("CO2", T=T, P=P, with_saturation=False)
    assert list(mix.phase) == list(pure.phase) == ["liquid", "vapor", "supercritical", "vapor"]
    np.testing.assert_allclose(mix.rho, 1.0 / pure.v, rtol=1e-9)
    frame = mix.to_frame()
    assert list(frame["phase"]) == list(mix.phase) and frame["x carbon dioxide"].tolist() == [1.0] * 4
    np.testing.assert_allclose(frame["Z"], mix.Z, rtol=0)
