"""The reference layer against published values and against CoolProp called directly."""

import math

import CoolProp.CoolProp as CP
import numpy as np
import pytest

import thermo_roots as tr
from thermo_roots import reference as ref


def test_co2_critical_point_of_span_wagner(co2):
    # Span, R. & Wagner, W. (1996), J. Phys. Chem. Ref. Data 25, 1509: Tc = 304.1282 K,
    # pc = 7.3773 MPa (from memory)
    limits = ref.reference_limits(co2)
    assert limits["Tc"] == pytest.approx(304.1282, abs=1e-4)
    assert limits["Pc"] == pytest.approx(7.3773e6, rel=2e-5)
    # the saturation pressure runs into the critical pressure as T -> Tc
    near = ref.reference_saturation(co2, T=304.128)
    assert near.P == pytest.approx(7.3773e6, rel=1e-4)


def test_water_normal_boiling_point_iapws95():
    # IAPWS-95 (Wagner & Pruss 2002): p_sat(373.124 K) = 101.325 kPa (from memory)
    water = tr.get_fluid("water")
    sat = ref.reference_saturation(water, T=373.124)
    assert sat.available
    assert sat.P == pytest.approx(101325.0, rel=1e-4)
    back = ref.reference_saturation(water, P="101.325 kPa")
    assert back.T == pytest.approx(373.124, abs=5e-3)
    assert back.v_liquid < back.v_vapor


def test_nitrogen_at_ambient_is_nearly_ideal():
    # common practice: N2 at 300 K and 0.1 MPa has Z = 0.9998, within 0.05 % of the ideal gas
    n2 = tr.get_fluid("nitrogen")
    state = ref.reference_state(n2, T=300.0, P=1e5)
    rho_ideal = 1e5 / (tr.R * 300.0) * n2.molar_mass
    assert state.phase == "vapor"
    assert state.rho_mass == pytest.approx(rho_ideal, rel=5e-4)
    assert state.Z == pytest.approx(1.0, abs=5e-4)


def _direct(name, out, a_name, a, b_name, b):
    return CP.PropsSI(out, a_name, a, b_name, b, "HEOS::" + name)


@pytest.mark.parametrize("knowns, phase", [
    (dict(T=250.0, P="30 bar"), "liquid"),            # subcooled CO2 liquid
    (dict(T=280.0, P="15 bar"), "vapor"),             # superheated vapor
    (dict(T=330.0, P="120 bar"), "supercritical"),
    (dict(T=270.0, quality=0.4), "two-phase"),
])
def test_cross_check_deviations_recomputed_directly(co2, knowns, phase):
    # the deviations are recomputed here from CoolProp's PropsSI, a separate path into the
    # same reference equation (Span & Wagner 1996 for CO2)
    model = tr.PengRobinson(co2)
    state = tr.solve(model, **knowns)
    check = ref.cross_check(state)
    assert check.available and check.reason == ""
    assert check.reference_phase == phase and state.phase == phase and check.phase_agrees
    if "quality" in knowns:
        rho = _direct("CO2", "Dmolar", "T", state.T, "Q", knowns["quality"])
        P_ref = _direct("CO2", "P", "T", state.T, "Q", knowns["quality"])
        assert check.deviation_P_percent == pytest.approx(100 * (state.P - P_ref) / P_ref, rel=1e-6)
        assert check.reference_quality == pytest.approx(knowns["quality"], abs=1e-9)
        assert check.reference_v_liquid == pytest.approx(1 / _direct("CO2", "Dmolar", "T", state.T, "Q", 0), rel=1e-9)
        assert check.reference_v_vapor == pytest.approx(1 / _direct("CO2", "Dmolar", "T", state.T, "Q", 1), rel=1e-9)
        assert check.reference_T_sat == pytest.approx(state.T, rel=1e-6)
    else:
        rho = _direct("CO2", "Dmolar", "T", state.T, "P", state.P)
        assert math.isnan(check.deviation_P_percent)
    v_ref = 1.0 / rho
    assert check.reference_v == pytest.approx(v_ref, rel=1e-9)
    assert check.deviation_v_percent == pytest.approx(100 * (state.v - v_ref) / v_ref, rel=1e-7)
    assert check.deviation_rho_percent == pytest.approx(100 * (1 / (state.v * rho) - 1), rel=1e-7)
    assert check.reference_rho_mass == pytest.approx(rho * co2.molar_mass, rel=1e-9)
    if state.T < co2.Tc:
        assert check.reference_P_sat == pytest.approx(_direct("CO2", "P", "T", state.T, "Q", 0), rel=1e-9)
    else:
        assert math.isnan(check.reference_P_sat)


def test_volume_known_state_gives_the_pressure_deviation(co2):
    # a closed vessel: 0.3 m3 holding 150 kg of CO2 at 35 degC (invented demo numbers, TK-401)
    model = tr.SoaveRedlichKwong(co2)
    state = tr.solve(model, T="35 degC", rho_mass=150 / 0.3)
    check = ref.cross_check(state)
    P_ref = _direct("CO2", "P", "T", state.T, "Dmolar", 1 / state.v)    # CoolProp directly
    assert check.reference_P == pytest.approx(P_ref, rel=1e-9)
    assert check.deviation_P_percent == pytest.approx(100 * (state.P - P_ref) / P_ref, rel=1e-7)
    assert math.isnan(check.deviation_v_percent)           # the volume was given, not computed
    # the same through (P, v): the model's T is used beside v
    again = ref.cross_check(tr.solve(model, P=state.P, v=state.v))
    assert again.deviation_P_percent == pytest.approx(check.deviation_P_percent, abs=1e-6)


def test_array_cross_check_matches_scalar_and_mixes_unavailable(propane):
    model = tr.PengRobinson(propane)
    T = np.array([[60.0, 250.0], [300.0, 400.0]])      # 60 K is below propane's triple point
    states = tr.solve(model, T=T, P=2e6)
    check = ref.cross_check(states)
    assert check.available.shape == (2, 2)
    assert not check.available[0, 0] and "triple point" in check.reason[0, 0]
    assert np.isnan(check.deviation_v_percent[0, 0]) and not check.phase_agrees[0, 0]
    one = ref.cross_check(tr.solve(model, T=300.0, P=2e6))
    assert check.deviation_v_percent[1, 0] == pytest.approx(one.deviation_v_percent, rel=1e-12)
    assert check.reference_phase[1, 0] == one.reference_phase
    assert "2 states" not in repr(check) and "4 states" in repr(check)


@pytest.mark.parametrize("knowns, words", [
    (dict(T=200.0, P=1e5), "triple point"),               # CO2 triple point 216.592 K (Span & Wagner 1996)
    (dict(T=1e5, P=1e5), "upper limit"),                   # far beyond 2000 K
    (dict(T=300.0, P=5e10), "upper limit"),                # 50 GPa
    (dict(T=230.0, P=5e8), "T"),                           # solid CO2 above the melting line
])
def test_unavailable_states_have_reasons_not_exceptions(co2, knowns, words):
    check = ref.cross_check(tr.solve(tr.PengRobinson(co2), **knowns))
    assert check.available is False or check.available == False  # noqa: E712 (numpy bool)
    assert words in check.reason
    assert math.isnan(check.reference_v) and check.reference_phase == ""
    assert "unavailable" in repr(check) and "Caution" in check._repr_html_()


def test_user_fluid_is_unavailable():
    fluid = tr.Fluid("lab blend X", 420.0, 4.1e6, 0.21, 0.058)      # invented, no library name
    check = ref.cross_check(tr.solve(tr.PengRobinson(fluid), T=300.0, P=1e5))
    assert not check.available and "library_name" in check.reason
    sat = ref.reference_saturation(fluid, T=[300.0, 350.0])
    assert not np.any(sat.available) and np.all(np.isnan(sat.P))
    with pytest.raises(tr.InputError, match="library_name"):
        ref.reference_limits(fluid)


def test_reference_saturation_vectorized_with_gaps(co2):
    sat = ref.reference_saturation(co2, T=[250.0, 290.0, 310.0, 200.0])
    assert list(sat.available) == [True, True, False, False]
    assert "critical" in sat.reason[2] and "triple point" in sat.reason[3]
    direct = [_direct("CO2", "P", "T", T, "Q", 0) for T in (250.0, 290.0)]
    np.testing.assert_allclose(sat.P[:2], direct, rtol=1e-9)
    assert np.all(sat.v_liquid[:2] < sat.v_vapor[:2])


def test_fit_volume_shift_matches_reference_liquid(propane):
    c = ref.fit_volume_shift(tr.PengRobinson, propane)
    T = 0.7 * propane.Tc
    shifted = tr.PengRobinson(propane, volume_shift=c)
    v_ref = 1 / _direct("Propane", "Dmolar", "T", T, "Q", 0)
    assert tr.saturation(shifted, T=T).v_liquid == pytest.approx(v_ref, rel=1e-9)
    # common practice: PR's saturated-liquid volumes are off by a few percent for light
    # hydrocarbons, SRK's by about 10 % too large
    assert 0.005 < abs(c / v_ref) < 0.08
    assert ref.fit_volume_shift(tr.SoaveRedlichKwong, propane) / v_ref > 0.05
    assert ref.fit_volume_shift("PR", propane) == c
    assert ref.fit_volume_shift(shifted, propane) == pytest.approx(c, rel=1e-12)


def test_fit_volume_shift_below_triple_point_says_what_to_try(co2):
    # CO2's triple point is at Tr = 0.712 (Span & Wagner 1996), so Tr = 0.7 has no liquid
    with pytest.raises(tr.DomainError, match="Tr="):
        ref.fit_volume_shift(tr.PengRobinson, co2)
    assert ref.fit_volume_shift(tr.PengRobinson, co2, Tr=0.75) != 0.0


def test_cross_check_html_table_shows_units_deviation_and_caution(co2):
    check = ref.cross_check(tr.solve(tr.PengRobinson(co2), T=270.0, quality=0.4))
    page = check._repr_html_()
    for words in ("kg/m³", "L/mol", "bar", "deviation", "reference", tr.CAUTION[:40]):
        assert words in page
    assert "Saturated liquid density" in page


def test_interrupt_keeps_finished_chunks(co2, monkeypatch):
    calls = {"n": 0}
    real = ref._reference_chunk

    def interrupting(*args):
        calls["n"] += 1
        if calls["n"] == 3:
            raise KeyboardInterrupt
        return real(*args)

    monkeypatch.setattr(ref, "_reference_chunk", interrupting)
    states = tr.solve(tr.PengRobinson(co2), T=np.linspace(250, 350, 50), P=1e6)
    check = ref.cross_check(states, chunk_size=10, on_interrupt="partial")
    assert check.completed == 20
    assert np.all(check.available[:20]) and not np.any(check.available[20:])
    assert check.reason[20] == ref.INTERRUPTED
    calls["n"] = 0
    with pytest.raises(KeyboardInterrupt):
        ref.cross_check(states, chunk_size=10)


# --------------------------------------------------------------------------- bad input (issue 8, sections 3 and 5)

@pytest.mark.parametrize("bad", ["hello", None, 300.0, {"T": 300.0}])
def test_cross_check_of_something_not_a_state_names_the_argument(bad):
    with pytest.raises(TypeError, match=r"cross_check\(state\) needs a State from thermo_roots.solve"):
        ref.cross_check(bad)


@pytest.mark.parametrize("options, error, words", [
    (dict(chunk_size=0), tr.InputError, "chunk_size=0"),
    (dict(chunk_size=-1), tr.InputError, "chunk_size=-1"),
    (dict(chunk_size=2.5), tr.InputError, "whole number"),
    (dict(chunk_size=True), TypeError, "chunk_size"),
    (dict(chunk_size="50"), TypeError, "chunk_size"),
    (dict(progress="yes"), tr.InputError, "progress='yes'"),
    (dict(progress=None), TypeError, "progress"),
    (dict(executor=4), TypeError, "executor"),
    (dict(on_interrupt="keep"), tr.InputError, "on_interrupt='keep'"),
    (dict(with_saturation="no"), TypeError, "with_saturation"),
])
def test_cross_check_options_are_checked(co2, options, error, words):
    state = tr.solve(tr.PengRobinson(co2), T=300.0, P=1e6)
    with pytest.raises(error, match=words):
        ref.cross_check(state, **options)
    with pytest.raises(error, match=words):
        ref.evaluate_reference("CarbonDioxide", "T,P", 300.0, 1e6, **options)
    if "on_interrupt" not in options:
        with pytest.raises(error, match=words):
            ref.reference_state(co2, T=300.0, P=1e6, **options)


def test_unknown_library_name_gives_unavailable_results_not_an_error():
    # the README promises that cross_check never raises for a state
    fluid = tr.Fluid("plant mix 7", 400.0, 4e6, 0.2, 0.05, library_name="NoSuchFluid")   # invented
    model = tr.PengRobinson(fluid)
    check = ref.cross_check(tr.solve(model, T=300.0, P=1e5))
    assert not check.available and "does not know library_name='NoSuchFluid'" in check.reason
    assert check.rows()[0][3].startswith("unavailable: ") and "Reference unavailable" in check._repr_html_()
    many = ref.cross_check(tr.solve(model, T=[300.0, 350.0], P=1e5))
    assert not np.any(many.available) and many.completed == 2
    assert not np.any(ref.reference_state(fluid, T=300.0, P=[1e5, 2e5]).available)
    with pytest.raises(tr.UnknownFluidError, match="NoSuchFluid"):
        ref.reference_limits(fluid)


def test_phase_row_says_unavailable_with_the_reason(propane):
    # 60 K is below propane's triple point, 85.5 K (CoolProp's reference equation, Lemmon et al. 2009)
    check = ref.cross_check(tr.solve(tr.PengRobinson(propane), T=60.0, P=2e6))
    phase = check.rows()[0]
    assert phase[0] == "Phase" and "DIFFERS" not in phase[3]
    assert phase[3].startswith("unavailable: ") and "triple point" in phase[3]


def test_state_at_very_low_temperature_still_displays(propane):
    # 10 K: below Peng-Robinson's lowest saturation temperature for propane (12.8 K) the model
    # gives no saturation pressure (State.P_sat raised ConvergenceError out of rows()); the
    # table shows "-" in its place
    check = ref.cross_check(tr.solve(tr.PengRobinson(propane), T=10.0, P=1e5))
    rows = {r[0]: r[1:] for r in check.rows()}
    assert rows["Saturation pressure at T [bar]"] == ("-", "-", "-")
    assert "triple point" in check._repr_html_()


def test_made_up_constants_with_a_real_library_name_are_warned_about():
    fluid = tr.Fluid("propane", Tc=500.0, Pc=5e6, omega=0.2, molar_mass=0.05, library_name="n-Propane")
    check = ref.cross_check(tr.solve(tr.PengRobinson(fluid), T=300.0, P=1e5))
    assert len(check.warnings) == 1
    note = check.warnings[0]
    # CoolProp's propane (Lemmon, McLinden & Wagner 2009): Tc = 369.89 K, Pc = 42.51 bar (from memory)
    assert "Tc = 500 K against 369.89 K" in note and "Pc = 50 bar against 42.51" in note
    assert "omega" in note and "molar_mass" in note and "get_fluid('n-Propane')" in note
    assert "Warning" in repr(check) and "Warning." in check._repr_html_()
    assert ref.reference_state(fluid, T=300.0, P=1e5).warnings == check.warnings


def test_library_and_handbook_constants_give_no_warning(propane):
    assert ref.cross_check(tr.solve(tr.PengRobinson(propane), T=300.0, P=1e5)).warnings == ()
    # Poling, Prausnitz & O'Connell, The Properties of Gases and Liquids, 5th ed. (2001),
    # Appendix A, propane: Tc = 369.83 K, Pc = 42.48 bar, omega = 0.152, M = 44.097 g/mol (from memory)
    handbook = tr.Fluid("propane", Tc=369.83, Pc=42.48e5, omega=0.152, molar_mass=44.097e-3, library_name="n-Propane")
    assert ref.constant_warnings(handbook) == ()
    assert ref.constant_warnings(tr.Fluid("x", 400.0, 4e6, 0.2, 0.05)) == ()     # no library name: nothing to compare


def test_large_deviations_are_highlighted_and_small_ones_are_not(co2):
    # the ideal gas for CO2 at 300 K and 50 bar: the reference Z is about 0.8 (Span & Wagner
    # 1996 via CoolProp, recomputed here), so v is off by far more than 5 %
    far = ref.cross_check(tr.solve(tr.IdealGas(co2), T=300.0, P=5e6))
    Z_ref = _direct("CO2", "Z", "T", 300.0, "P", 5e6)
    assert abs(100 * (1 / Z_ref - 1)) > ref.LARGE_DEVIATION_PERCENT
    page = far._repr_html_()
    assert ref.LARGE_DEVIATION_LEGEND in page
    flagged = [row for row, large in zip(far.rows(), far.large_deviations()) if large]
    assert any(row[0] == "Molar volume [L/mol]" for row in flagged)
    assert page.count("font-weight:bold") == len(flagged)
    # common practice: nitrogen at 300 K and 1 bar is within 0.05 % of the ideal gas
    near = ref.cross_check(tr.solve(tr.IdealGas(tr.get_fluid("nitrogen")), T=300.0, P=1e5))
    assert abs(near.deviation_v_percent) < 0.05
    assert "font-weight:bold" not in near._repr_html_() and not any(near.large_deviations())


def test_reference_state_takes_a_fluid_or_its_name(co2):
    by_name = ref.reference_state("CO2", T=300.0, P=1e6)
    assert by_name.v == pytest.approx(ref.reference_state(co2, T=300.0, P=1e6).v, rel=1e-12)
    assert ref.reference_saturation("CO2", T=250.0).P == pytest.approx(_direct("CO2", "P", "T", 250.0, "Q", 0),
                                                                       rel=1e-9)
    with pytest.raises(TypeError, match=r"reference_state\(fluid, ...\) needs a Fluid"):
        ref.reference_state(None, T=300.0, P=1e6)
    with pytest.raises(TypeError, match="reference_saturation"):
        ref.reference_saturation(42, T=250.0)
    with pytest.raises(tr.UnknownFluidError):
        ref.reference_state("no such gas", T=300.0, P=1e6)


def test_fit_volume_shift_arguments_are_checked(propane):
    with pytest.raises(TypeError, match="Tr must be a number"):
        ref.fit_volume_shift(tr.PengRobinson, propane, Tr="0.7")
    with pytest.raises(TypeError, match=r"fit_volume_shift\(fluid"):
        ref.fit_volume_shift(tr.PengRobinson, None)
    with pytest.raises(tr.DomainError, match="between 0 and 1"):
        ref.fit_volume_shift(tr.PengRobinson, propane, Tr=float("nan"))


# --------------------------------------------------------------------------- readable reasons

def test_a_refused_state_below_the_triple_point_pressure_reads_as_a_sentence(co2):
    # CO2's triple point is at 0.51795 MPa (Span & Wagner 1996, J. Phys. Chem. Ref. Data 25,
    # 1509; from memory): at 2 bar no liquid or vapor of -10 kJ/mol exists, CoolProp refuses
    state = ref.reference_state(co2, P=2e5, h=-1e4, with_saturation=False)
    assert not state.available
    reason = str(state.reason)
    plain, _, library = reason.partition(" (CoolProp: ")
    # first what failed and where, in SI with Unicode units, then what to try
    assert plain.startswith("the reference equation found no state at P = 200000 Pa, h = -10000 J/mol: ")
    assert "triple-point pressure" in plain and "give a pressure above it" in plain
    # CoolProp's own text comes last, in parentheses
    assert library.endswith(")") and len(library) > 10 and "CoolProp" not in plain


def test_a_refused_state_elsewhere_says_what_to_check(co2):
    # an entropy far below any state of CO2 at 50 bar: outside the equation's range
    state = ref.reference_state(co2, P=5e6, s=-1e5, with_saturation=False)
    plain, sep, library = str(state.reason).partition(" (CoolProp: ")
    assert sep and library.endswith(")")
    assert plain.startswith("the reference equation found no state at P = 5e+06 Pa, s = -100000 J/(mol K): ")
    assert "reference_limits(fluid)" in plain and "try a state nearby" in plain


def test_an_unknown_library_name_puts_coolprops_text_last():
    fluid = tr.Fluid("made-up", 400.0, 4e6, 0.2, 0.05, library_name="NoSuchFluid")
    with pytest.raises(tr.UnknownFluidError) as raised:
        ref.reference_limits(fluid)
    text = str(raised.value)
    assert text.startswith("library_name='NoSuchFluid' is not a fluid of CoolProp's library; use a name from ")
    assert text.index("fluid_names()") < text.index("(CoolProp: ") and text.endswith(").")


# --------------------------------------------------------------------------- import paths

def test_every_public_name_keeps_its_import_path():
    # the split of reference.py into a package keeps every name where callers found it
    import importlib

    old_names = ("AUTO_PROGRESS_ABOVE", "CONSTANT_TOLERANCE", "CrossCheck", "DEFAULT_CHUNK", "INTERRUPTED",
                 "LARGE_DEVIATION_K", "LARGE_DEVIATION_LEGEND", "LARGE_DEVIATION_PERCENT", "LARGE_DEVIATION_STYLE",
                 "REFERENCE_PAIRS", "ReferenceSaturation", "ReferenceState", "constant_warnings", "cross_check",
                 "evaluate_reference", "fit_volume_shift", "library_reason", "reference_limits",
                 "reference_saturation", "reference_state", "state_pair", "whole_number",
                 # private names other modules and tests import
                 "_check_run_options", "_given", "_reference_chunk", "_abstract_state", "_library_limits",
                 "_fluid_name")
    module = importlib.import_module("thermo_roots.reference")
    missing = [name for name in old_names if not hasattr(module, name)]
    assert not missing
    for name in ("CrossCheck", "ReferenceSaturation", "ReferenceState", "cross_check", "fit_volume_shift",
                 "reference_limits", "reference_saturation", "reference_state"):
        assert getattr(tr, name) is getattr(module, name), name


def test_replacing_the_chunk_evaluator_on_the_package_is_honoured(co2, monkeypatch):
    # the batch runner reads thermo_roots.reference._reference_chunk at each run
    calls = []
    real = ref._reference_chunk

    def counted(*args):
        calls.append(args[1])
        return real(*args)

    monkeypatch.setattr(ref, "_reference_chunk", counted)
    values, completed = ref.evaluate_reference("CarbonDioxide", "T,P", [300.0, 310.0], [1e5, 1e5],
                                               with_saturation=False, chunk_size=1)
    assert calls == ["T,P", "T,P"] and completed == 2 and np.all(np.isfinite(values["v"]))
