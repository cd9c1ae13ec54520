"""The reference side of energy states and process steps: cross-checks at a state's own
energy knowns, the reference's steps on their own, interrupted reference runs, and names.

Outside values: CoolProp's reference equations called directly (CoolProp HEOS, PropsSI:
a path separate from thermo_roots.reference, which uses its AbstractState objects).
"""

import math

import CoolProp.CoolProp as CP
import numpy as np
import pytest

import thermo_roots as tr
from thermo_roots import reference as ref
from thermo_roots import steps
from thermo_roots import sweeps as sw


@pytest.fixture(scope="module")
def pr_propane():
    return tr.PengRobinson(tr.get_fluid("propane"))


@pytest.fixture(scope="module")
def valve_outlet(pr_propane):
    # propane liquid at 20 °C and 10 bar let down to 2 bar (a refrigeration expansion valve)
    inlet = tr.solve(pr_propane, T="20 degC", P="10 bar")
    return inlet, tr.solve(pr_propane, P=2e5, h=inlet.h)


# --------------------------------------------------------------------------- cross_check(at=)

def test_valve_outlet_checked_at_its_own_pressure_and_enthalpy(valve_outlet):
    inlet, out = valve_outlet
    check = ref.cross_check(out, at="knowns")
    # the reference's T and quality at the same (P, h): CoolProp HEOS, PropsSI
    T_ref = CP.PropsSI("T", "P", 2e5, "Hmolar", float(out.h), "HEOS::Propane")
    q_ref = CP.PropsSI("Q", "P", 2e5, "Hmolar", float(out.h), "HEOS::Propane")
    s_ref = CP.PropsSI("Smolar", "P", 2e5, "Hmolar", float(out.h), "HEOS::Propane")
    assert check.reference_T == pytest.approx(T_ref, rel=1e-9)
    assert check.reference_quality == pytest.approx(q_ref, abs=1e-9)
    assert check.deviation_T_K == pytest.approx(float(out.T) - T_ref, abs=1e-7)
    assert check.deviation_s == pytest.approx(float(out.s) - s_ref, abs=1e-7)
    assert abs(check.deviation_T_K) < 0.3           # measured +0.026 K (PR against the reference)
    # P and h are the same on both sides by construction: no deviation is claimed for them
    assert math.isnan(check.deviation_P_percent) and math.isnan(check.deviation_h)
    assert "deviation T = " in repr(check)
    row = dict((r[0], r[3]) for r in check.rows())
    assert row["Temperature [K]"].endswith(" K") and row["Molar enthalpy [kJ/mol]"] == "-"


def test_default_comparison_is_unchanged_for_energy_states(valve_outlet):
    # the default still sets the state beside the reference at the model's (T, v)
    _, out = valve_outlet
    check = ref.cross_check(out)
    D = CP.PropsSI("Dmolar", "T", float(out.T), "Dmolar", 1.0 / float(out.v), "HEOS::Propane")
    P_ref = CP.PropsSI("P", "T", float(out.T), "Dmolar", 1.0 / float(out.v), "HEOS::Propane")
    assert D == pytest.approx(1.0 / float(out.v), rel=1e-12)
    assert check.reference_P == pytest.approx(P_ref, rel=1e-9)
    assert math.isnan(check.deviation_T_K) and math.isfinite(check.deviation_P_percent)
    assert ref.state_pair(out) == "T,v"


def test_compressor_outlet_checked_at_pressure_and_entropy_in_mass_units(pr_propane):
    # a (P, s_mass) state: the known is read in molar terms before the reference is asked
    M = pr_propane.fluid.molar_mass
    gas = tr.solve(pr_propane, T="10 degC", P="3 bar")
    out = tr.solve(pr_propane, P="15 bar", s_mass=float(gas.s) / M)
    assert ref.knowns_pair(out) == "P,s"
    check = ref.cross_check(out, at="knowns")
    T_ref = CP.PropsSI("T", "P", 15e5, "Smolar", float(gas.s), "HEOS::Propane")    # CoolProp HEOS, PropsSI
    h_ref = CP.PropsSI("Hmolar", "P", 15e5, "Smolar", float(gas.s), "HEOS::Propane")
    assert check.reference_T == pytest.approx(T_ref, rel=1e-9)
    assert check.deviation_h == pytest.approx(float(out.h) - h_ref, abs=1e-6)
    assert math.isnan(check.deviation_s)
    # measured -0.79 K: the known is the model's own inlet entropy, not the reference's (the
    # step and the isentrope start the reference from its own inlet and differ by 0.05 K)
    assert abs(check.deviation_T_K) < 1.5


def test_closed_vessel_state_checked_at_its_volume_and_internal_energy():
    model = tr.PengRobinson("CO2")
    state = tr.solve(model, T=300.0, rho_mass=400.0)
    u = float(state.u)
    vessel = tr.solve(model, rho_mass=400.0, u=u)
    assert ref.knowns_pair(vessel) == "v,u"
    check = ref.cross_check(vessel, at="knowns")
    D = 1.0 / float(vessel.v)
    T_ref = CP.PropsSI("T", "Dmolar", D, "Umolar", u, "HEOS::CO2")                # CoolProp HEOS, PropsSI
    P_ref = CP.PropsSI("P", "Dmolar", D, "Umolar", u, "HEOS::CO2")
    assert check.reference_T == pytest.approx(T_ref, rel=1e-9)
    assert check.deviation_P_percent == pytest.approx(100 * (float(vessel.P) - P_ref) / P_ref, rel=1e-7)
    assert math.isnan(check.deviation_v_percent)


def test_array_states_and_an_explicit_pair(pr_propane):
    T = np.array([250.0, 300.0, 350.0])
    states = tr.solve(pr_propane, T=T, P=5e5)
    at_ph = ref.cross_check(states, at="P,h")        # the model's own P and h of each state
    for i in range(3):
        T_ref = CP.PropsSI("T", "P", 5e5, "Hmolar", float(states.h[i]), "HEOS::Propane")
        assert at_ph.reference_T[i] == pytest.approx(T_ref, rel=1e-9)
    np.testing.assert_allclose(at_ph.deviation_T_K, T - at_ph.reference_T, rtol=1e-12)
    # (T, P) states checked "at their knowns" are checked as by default
    same = ref.cross_check(states, at="knowns")
    np.testing.assert_allclose(same.deviation_v_percent, ref.cross_check(states).deviation_v_percent, rtol=1e-12)


def test_bad_comparison_points_are_refused(pr_propane, valve_outlet):
    _, out = valve_outlet
    with pytest.raises(tr.InputError, match=r"at='T,h' is not an option.*'default', 'knowns'"):
        ref.cross_check(out, at="T,h")
    with pytest.raises(tr.InputError, match="at="):
        ref.cross_check(out, at=3)
    # a state known by (T, s): the reference takes no such pair, but its own P and s it does
    ts = tr.solve(pr_propane, T=300.0, s=100.0)
    with pytest.raises(tr.InputError, match=r"not this state's knowns \(T, s\)"):
        ref.cross_check(ts, at="knowns")
    at_ps = ref.cross_check(ts, at="P,s")
    T_ref = CP.PropsSI("T", "P", float(ts.P), "Smolar", 100.0, "HEOS::Propane")      # CoolProp HEOS, PropsSI
    assert at_ps.reference_T == pytest.approx(T_ref, rel=1e-9)


def test_isenthalp_reference_columns_are_the_cross_check(pr_propane):
    # one formula: the sweep's reference columns are compare_with_reference's fields
    inlet = tr.solve(pr_propane, T="20 degC", P="10 bar")
    frame = sw.isenthalp(pr_propane, inlet=inlet, P=("10 bar", "2 bar"), n=5, reference=True, progress=False)
    assert tuple(c for c in frame.columns if c in sw.ENERGY_REFERENCE_COLUMNS) == sw.ENERGY_REFERENCE_COLUMNS
    h_ref = frame.attrs["reference_h"]
    states = tr.solve(pr_propane, P=frame["P"].to_numpy(), h=float(inlet.h))
    check = ref.compare_with_reference(states, "P,h", frame["P"].to_numpy(), h_ref, shared=("P",),
                                       with_saturation=False)
    for field, column in zip(sw.ENERGY_REFERENCE_FIELDS, sw.ENERGY_REFERENCE_COLUMNS):
        a, b = frame[column].to_numpy(), np.asarray(getattr(check, field))
        if a.dtype == object:
            assert list(a) == list(b)
        else:
            np.testing.assert_allclose(a.astype(float), b.astype(float), rtol=1e-9, equal_nan=True)
    # with an inlet the reference's h is its own there: deviation_h is the two inlets' difference
    h_in_ref = CP.PropsSI("Hmolar", "T", 293.15, "P", 10e5, "HEOS::Propane")       # CoolProp HEOS, PropsSI
    # (CoolProp's own (P, h) solve returns h to about 3e-5 J/mol)
    np.testing.assert_allclose(frame["deviation_h"], float(inlet.h) - h_in_ref, atol=1e-3)


# --------------------------------------------------------------------------- interruption

def _interrupt_after(monkeypatch, chunks):
    done = {"n": 0}
    real = ref._reference_chunk

    def stop(*args):
        if done["n"] == chunks:
            raise KeyboardInterrupt
        done["n"] += 1
        return real(*args)

    monkeypatch.setattr(ref, "_reference_chunk", stop)
    return done


def test_reference_state_keeps_the_states_done_when_interrupted(monkeypatch):
    _interrupt_after(monkeypatch, 1)
    P = np.geomspace(1e5, 20e5, 25)
    part = ref.reference_state("propane", T=300.0, P=P, chunk_size=10, on_interrupt="partial")
    assert part.completed == 10
    assert np.all(part.available[:10]) and not np.any(part.available[10:])
    assert part.reason[10] == ref.INTERRUPTED
    rho = CP.PropsSI("Dmolar", "T", 300.0, "P", P[3], "HEOS::Propane")              # CoolProp HEOS, PropsSI
    assert part.v[3] == pytest.approx(1.0 / rho, rel=1e-9)
    _interrupt_after(monkeypatch, 1)
    with pytest.raises(KeyboardInterrupt):                          # the default still raises
        ref.reference_state("propane", T=300.0, P=P, chunk_size=10)
    with pytest.raises(tr.InputError, match="on_interrupt='keep'"):
        ref.reference_state("propane", T=300.0, P=1e5, on_interrupt="keep")


def test_interrupted_isentrope_keeps_the_rows_done(pr_propane, monkeypatch):
    inlet = tr.solve(pr_propane, T="10 degC", P="3 bar")
    _interrupt_after(monkeypatch, 3)       # the reference's own inlet, then two chunks of four
    with pytest.warns(UserWarning, match="Interrupted"):
        frame = sw.isentrope(pr_propane, inlet=inlet, P=("3 bar", "15 bar"), n=20, reference=True,
                             progress=False, chunk_size=4)
    assert len(frame) == 8 and frame.attrs["interrupted"] is True
    assert frame["reference_available"].all()
    s_in = CP.PropsSI("Smolar", "T", 283.15, "P", 3e5, "HEOS::Propane")             # CoolProp HEOS, PropsSI
    T_ref = CP.PropsSI("T", "P", frame["P"].iloc[-1], "Smolar", s_in, "HEOS::Propane")
    assert frame["reference_T"].iloc[-1] == pytest.approx(T_ref, rel=1e-9)


# --------------------------------------------------------------------------- the reference's steps

def test_reference_flow_step_on_its_own_with_the_efficiency_rule(pr_propane):
    # the reference side of a compressor, run without the model's step: CoolProp's own
    # (P, s) then (P, h) solves from its own inlet (CoolProp HEOS, PropsSI)
    inlet = tr.solve(pr_propane, T="10 degC", P="3 bar")
    eta = 0.7
    step = ref.reference_flow_step(pr_propane.fluid, inlet, 15e5, lambda h_in, h_s: h_in + (h_s - h_in) / eta)
    h_in = CP.PropsSI("Hmolar", "T", 283.15, "P", 3e5, "HEOS::Propane")
    s_in = CP.PropsSI("Smolar", "T", 283.15, "P", 3e5, "HEOS::Propane")
    h_s = CP.PropsSI("Hmolar", "P", 15e5, "Smolar", s_in, "HEOS::Propane")
    h_out = h_in + (h_s - h_in) / eta
    assert step.available and step.work_molar == pytest.approx(h_out - h_in, rel=1e-9)
    assert step.outlet.T == pytest.approx(CP.PropsSI("T", "P", 15e5, "Hmolar", h_out, "HEOS::Propane"), rel=1e-9)
    # the composed step hands the same rule to the reference
    composed = steps.compress(pr_propane, inlet, 15e5, eta)
    assert composed.reference.work_mass == pytest.approx(step.work_mass, rel=1e-12)
    assert isinstance(composed.reference, ref.ReferenceStep) and steps.ReferenceStep is ref.ReferenceStep


def test_expander_rule_is_applied_the_other_way_round(pr_propane):
    # turbine: h_out = h_in - eta (h_in - h_s) (Moran & Shapiro, 5th ed., sec. 6.12)
    inlet = tr.solve(pr_propane, T="120 degC", P="30 bar")
    result = steps.expand(pr_propane, inlet, 5e5, 0.8)
    h_in = CP.PropsSI("Hmolar", "T", 393.15, "P", 30e5, "HEOS::Propane")            # CoolProp HEOS, PropsSI
    s_in = CP.PropsSI("Smolar", "T", 393.15, "P", 30e5, "HEOS::Propane")
    h_s = CP.PropsSI("Hmolar", "P", 5e5, "Smolar", s_in, "HEOS::Propane")
    assert result.reference.work_molar == pytest.approx(-0.8 * (h_in - h_s), rel=1e-9)
    assert result.work_molar == pytest.approx(-0.8 * (float(inlet.h) - float(result.isentropic_outlet.h)), rel=1e-12)


def test_reference_vessel_step_on_its_own():
    model = tr.PengRobinson("CO2")
    fill = tr.solve(model, T="20 degC", rho_mass=600.0)
    step = ref.reference_vessel_step(model.fluid, fill, {"P": 100e5}, 2.0)
    D = 600.0
    u_in = CP.PropsSI("Umass", "T", 293.15, "Dmass", D, "HEOS::CO2")                 # CoolProp HEOS, PropsSI
    u_out = CP.PropsSI("Umass", "P", 100e5, "Dmass", D, "HEOS::CO2")
    assert step.available
    assert step.heat_mass == pytest.approx(u_out - u_in, rel=1e-6)
    assert step.heat == pytest.approx(2.0 * (u_out - u_in), rel=1e-6)


def test_steps_module_only_composes():
    # the reference equation is driven from the reference package alone: steps.py asks it for
    # the reference step and never builds reference states itself
    import inspect

    source = inspect.getsource(steps)
    assert "reference_state(" not in source and "CoolProp" not in source.replace("CoolProp HEOS", "")


# --------------------------------------------------------------------------- names

def test_the_reference_names_a_fluid_by_its_name():
    # Fluid has no display_name: the everyday name is Fluid.name; an object that adds one
    # must not change what the reference says (the old fallback read it)
    class Labelled(tr.Fluid):
        @property
        def display_name(self):
            return "label that is not the name"

    base = tr.get_fluid("CO2")
    fluid = Labelled(name=base.name, Tc=base.Tc, Pc=base.Pc, omega=base.omega, molar_mass=base.molar_mass,
                     library_name=base.library_name, T_triple=base.T_triple, ideal_gas=base.ideal_gas)
    state = ref.reference_state(fluid, T=300.0, P=1e6)
    assert "'carbon dioxide'" in repr(state) and "label" not in repr(state)
    mine = tr.Fluid("lab blend X", 420.0, 4.1e6, 0.21, 0.058)       # invented, no library name
    assert "'lab blend X'" in ref.library_reason(mine)
    assert ref.reference_limits("CO2")["Tc"] == pytest.approx(CP.PropsSI("Tcrit", "CO2"), rel=1e-12)
    with pytest.raises(TypeError, match=r"reference_limits\(fluid\) needs a Fluid"):
        ref.reference_limits(3.0)


# --------------------------------------------------------------------------- the model's zero of energy

@pytest.mark.parametrize("fluid, convention, knowns", [
    ("water", "NBP", dict(P=101325.0, quality=0.0)),        # CoolProp's water zero: liquid at the triple point
    ("propane", "ASHRAE", dict(T=233.15, quality=0.0)),
    ("carbon dioxide", "ASHRAE", dict(T=233.15, quality=0.0)),
])
def test_cross_check_compares_h_and_s_on_the_models_zero(fluid, convention, knowns):
    # at the convention's own point (saturated liquid at -40 °C, or at the normal boiling
    # point) both sides are h = s = 0 by definition (common practice of refrigerant tables), so
    # the deviations there are zero: the reference's h and s are moved onto the model's zero
    # with the reference equation's own saturated liquid, never compared across two zeros
    model = tr.PengRobinson(fluid, reference_state=convention)
    check = ref.cross_check(tr.solve(model, **knowns))
    assert check.reference_h == pytest.approx(0.0, abs=1e-6) and check.reference_s == pytest.approx(0.0, abs=1e-9)
    assert check.deviation_h == pytest.approx(0.0, abs=1e-6) and check.deviation_s == pytest.approx(0.0, abs=1e-9)
    # and a difference between two states never depends on the choice
    own = tr.PengRobinson(fluid)
    a, b = dict(T=300.0, P=5e6), dict(T=350.0, P=1e5)
    on_conv = [ref.cross_check(tr.solve(model, **k)) for k in (a, b)]
    on_own = [ref.cross_check(tr.solve(own, **k)) for k in (a, b)]
    assert on_conv[1].reference_h - on_conv[0].reference_h == pytest.approx(
        on_own[1].reference_h - on_own[0].reference_h, rel=1e-9)
    assert on_conv[1].deviation_h - on_conv[0].deviation_h == pytest.approx(
        on_own[1].deviation_h - on_own[0].deviation_h, abs=1e-6)


def test_reference_h_on_the_models_zero_against_coolprop():
    # CoolProp HEOS, PropsSI: h(300 K, 1 bar) - h(saturated liquid at -40 °C) for propane
    model = tr.PengRobinson("propane", reference_state="ASHRAE")
    check = ref.cross_check(tr.solve(model, T=300.0, P=1e5))
    expected = (CP.PropsSI("Hmolar", "T", 300.0, "P", 1e5, "HEOS::Propane")
                - CP.PropsSI("Hmolar", "T", 233.15, "Q", 0, "HEOS::Propane"))
    assert check.reference_h == pytest.approx(expected, rel=1e-9)
    # and at its own (P, h) on that zero the reference finds the state's temperature back
    at = ref.cross_check(tr.solve(model, P=1e5, h=float(tr.solve(model, T=300.0, P=1e5).h)), at="knowns")
    T_ref = CP.PropsSI("T", "P", 1e5, "Hmolar", float(tr.solve(model, T=300.0, P=1e5).h)
                       + CP.PropsSI("Hmolar", "T", 233.15, "Q", 0, "HEOS::Propane"), "HEOS::Propane")
    assert at.reference_T == pytest.approx(T_ref, rel=1e-9)


def test_no_comparison_of_energies_where_the_reference_has_no_such_zero():
    # IIR's zero is saturated liquid at 0 °C; water's reference equation starts at its triple
    # point, 273.16 K (Wagner & Pruss 2002), so it has no saturated liquid there
    model = tr.PengRobinson("water", reference_state="IIR")
    check = ref.cross_check(tr.solve(model, T=300.0, P=1e5))
    assert math.isnan(check.deviation_h) and math.isnan(check.deviation_s)
    assert math.isfinite(check.deviation_v_percent)
    assert any("reference_state='IIR'" in w for w in check.warnings)


def test_step_table_shows_the_reference_on_the_models_zero():
    # a valve of propane on ASHRAE's zero: the reference columns of the table are the reference
    # equation's h relative to its own saturated liquid at -40 °C (CoolProp HEOS, PropsSI)
    model = tr.PengRobinson("propane", reference_state="ASHRAE")
    result = tr.throttle(model, tr.solve(model, T=293.15, P=10e5), 2e5)
    row = next(r for r in result.rows() if r[0].startswith("Specific enthalpy"))
    M = CP.PropsSI("molarmass", "Propane")
    h = (CP.PropsSI("Hmolar", "T", 293.15, "P", 10e5, "HEOS::Propane")
         - CP.PropsSI("Hmolar", "T", 233.15, "Q", 0, "HEOS::Propane")) / M / 1e3
    assert float(row[3]) == pytest.approx(h, abs=0.01) and float(row[4]) == pytest.approx(h, abs=0.01)
    assert abs(float(row[1]) - float(row[3])) < 5.0       # measured 1.3 kJ/kg; 106 kJ/kg across two zeros
