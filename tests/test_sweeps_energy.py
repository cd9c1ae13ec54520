"""Isenthalp and isentrope sweeps, and the caloric reference columns of the state tables.

Outside values come from CoolProp's reference equations called directly (PropsSI, a path
separate from thermo_roots.reference) and from the Gibbs relation dh = T ds + v dP.
"""

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
def valve(pr_propane):
    # propane liquid at 20 °C and 10 bar (subcooled: its vapor pressure at 20 °C is about
    # 8.4 bar, Lemmon et al. 2009 via CoolProp) let down through a valve to 2 bar
    inlet = tr.solve(pr_propane, T="20 degC", P="10 bar")
    frame = sw.isenthalp(pr_propane, inlet=inlet, P=("10 bar", "2 bar"), n=9, reference=True, progress=False)
    return inlet, frame


def test_isenthalp_keeps_h_and_matches_the_reference_valve(pr_propane, valve):
    inlet, frame = valve
    assert inlet.phase == "liquid"
    np.testing.assert_allclose(frame["h"], inlet.h, rtol=1e-9)            # the sweep's defining property
    np.testing.assert_allclose(frame["P"], np.geomspace(10e5, 2e5, 9), rtol=1e-12)
    out = frame.iloc[-1]
    assert out["phase"] == "two-phase" and out["reference_phase"] == "two-phase"
    # the reference side: CoolProp's own (P, h) solve from its own inlet at the same (T, P)
    h_in = CP.PropsSI("Hmolar", "T", 293.15, "P", 10e5, "HEOS::Propane")
    assert frame.attrs["reference_h"] == pytest.approx(h_in, rel=1e-12)
    T_ref = CP.PropsSI("T", "P", 2e5, "Hmolar", h_in, "HEOS::Propane")
    q_ref = CP.PropsSI("Q", "P", 2e5, "Hmolar", h_in, "HEOS::Propane")
    assert out["reference_T"] == pytest.approx(T_ref, abs=1e-6)
    assert out["reference_quality"] == pytest.approx(q_ref, abs=1e-8)
    # and the cubic's outlet is close to it (measured: 0.026 K and 0.001 in quality)
    assert abs(out["T"] - T_ref) < 0.3 and abs(out["deviation_T_K"]) < 0.3
    assert abs(out["quality"] - q_ref) < 0.01
    np.testing.assert_allclose(frame["deviation_T_K"], frame["T"] - frame["reference_T"], rtol=1e-12)
    assert frame.attrs["units"]["deviation_h"] == "J/mol" and frame.attrs["units"]["reference_T"] == "K"
    assert frame.attrs["units"]["deviation_T_K"] == "K" and frame.attrs["units"]["deviation_s"] == "J/(mol K)"


def test_isenthalp_outlet_is_the_throttle_step(pr_propane, valve):
    # the same valve through the process-step function: one answer, two routes
    inlet, frame = valve
    step = steps.throttle(pr_propane, inlet, 2e5)
    assert float(step.outlet.T) == pytest.approx(frame["T"].iloc[-1], abs=1e-8)
    assert float(step.outlet.quality) == pytest.approx(frame["quality"].iloc[-1], abs=1e-10)


def test_isentrope_keeps_s_and_matches_the_reference_compressor(pr_propane):
    # propane vapor at 10 °C and 3 bar compressed reversibly to 15 bar
    inlet = tr.solve(pr_propane, T="10 degC", P="3 bar")
    frame = sw.isentrope(pr_propane, inlet=inlet, P=("3 bar", "15 bar"), n=7, reference=True, progress=False)
    np.testing.assert_allclose(frame["s"], inlet.s, rtol=1e-9)
    assert (frame["phase"] == "vapor").all() and np.all(np.diff(frame["T"]) > 0)
    s_in = CP.PropsSI("Smolar", "T", 283.15, "P", 3e5, "HEOS::Propane")
    T_ref = CP.PropsSI("T", "P", 15e5, "Smolar", s_in, "HEOS::Propane")
    out = frame.iloc[-1]
    assert out["reference_T"] == pytest.approx(T_ref, abs=1e-6)
    assert abs(out["deviation_T_K"]) < 0.5            # measured: +0.05 K (PR's cp0 is CoolProp's own)


@pytest.mark.parametrize("cls", [tr.PengRobinson, tr.SoaveRedlichKwong, tr.RedlichKwong, tr.VanDerWaals])
def test_isentrope_obeys_the_gibbs_relation(cls):
    # along an isentrope dh = v dP (dh = T ds + v dP; e.g. Smith, Van Ness & Abbott, 7th ed.,
    # eq. 6.8): the trapezoid sum of v dP equals the rise in h to the accuracy of the rule
    model = cls(tr.get_fluid("propane"))
    frame = sw.isentrope(model, inlet=tr.solve(model, T=330.0, P=2e5), P=(2e5, 20e5), n=400, log=False)
    v, P, h = (frame[k].to_numpy() for k in ("v", "P", "h"))
    integral = np.sum(0.5 * (v[1:] + v[:-1]) * np.diff(P))
    assert integral == pytest.approx(h[-1] - h[0], rel=1e-4)


def test_isenthalp_in_either_basis_and_text(pr_propane):
    M = pr_propane.fluid.molar_mass
    by_mole = sw.isenthalp(pr_propane, h=25000.0, P=(5e5, 1e5), n=4)
    by_kg = sw.isenthalp(pr_propane, h_mass=25000.0 / M, P=(5e5, 1e5), n=4)
    as_text = sw.isenthalp(pr_propane, h="25 kJ/mol", P=(5e5, 1e5), n=4)
    in_kg_text = sw.isenthalp(pr_propane, h_mass=f"{25.0 / M:.12g} kJ/kg", P=(5e5, 1e5), n=4)
    for other in (by_kg, as_text, in_kg_text):
        np.testing.assert_allclose(other["T"], by_mole["T"], rtol=1e-9)
    assert by_mole.attrs["h"] == pytest.approx(25000.0) and "isenthalp" in by_mole.attrs["table"]


def test_energy_sweep_arguments_are_checked(pr_propane):
    inlet = tr.solve(pr_propane, T=300.0, P=1e5)
    with pytest.raises(tr.InputError, match="exactly one of h, h_mass, inlet"):
        sw.isenthalp(pr_propane, h=1.0, inlet=inlet)
    with pytest.raises(tr.InputError, match="got none"):
        sw.isentrope(pr_propane)
    with pytest.raises(TypeError, match="inlet must be one state"):
        sw.isenthalp(pr_propane, inlet={"T": 300.0, "P": 1e5})
    with pytest.raises(TypeError, match="inlet must be one state"):
        sw.isenthalp(pr_propane, inlet=tr.solve(pr_propane, T=[300.0, 310.0], P=1e5))
    with pytest.raises(tr.InputError, match="not with"):
        sw.isentrope(tr.SoaveRedlichKwong(pr_propane.fluid), inlet=inlet)
    iir = tr.PengRobinson(pr_propane.fluid, reference_state="IIR")
    with pytest.raises(tr.InputError, match="give inlet="):
        sw.isenthalp(iir, h=2e4, P=(5e5, 1e5), reference=True)
    with pytest.raises(TypeError, match="needs a model"):
        sw.isenthalp("PR", h=2e4)


def test_iir_model_with_an_inlet_compares_the_same_valve(pr_propane, valve):
    # the zero of h is a convention: a model on IIR's zero gives the same valve outlet, and its
    # reference side (started from the reference's own inlet) is the same
    inlet, frame = valve
    iir = tr.PengRobinson(pr_propane.fluid, reference_state="IIR")
    other = sw.isenthalp(iir, inlet=tr.solve(iir, T="20 degC", P="10 bar"), P=("10 bar", "2 bar"), n=9,
                         reference=True, progress=False)
    np.testing.assert_allclose(other["T"], frame["T"], rtol=1e-9)
    np.testing.assert_allclose(other["reference_T"], frame["reference_T"], rtol=1e-9)


def test_state_tables_carry_the_caloric_cross_check():
    model = tr.PengRobinson(tr.get_fluid("CO2"))
    frame = sw.isotherm(model, 320.0, P=("5 bar", "150 bar"), n=6, reference=True, progress=False)
    check = ref.cross_check(tr.solve(model, T=320.0, P=np.geomspace(5e5, 150e5, 6)))
    for name in ref.CrossCheck.CALORIC_FIELDS:
        np.testing.assert_allclose(frame[name], getattr(check, name), rtol=1e-12, equal_nan=True)
    cp = CP.PropsSI("Cpmolar", "T", 320.0, "P", frame["P"].iloc[2], "HEOS::CO2")      # CoolProp directly
    assert frame["reference_cp"].iloc[2] == pytest.approx(cp, rel=1e-9)
    assert frame.attrs["units"]["deviation_cp_percent"] == "%" and frame.attrs["units"]["reference_w"] == "m/s"


def test_fill_point_asks_the_model_whether_it_has_saturation():
    assert sw.fill_point(tr.IdealGas(tr.get_fluid("CO2")), 1e-4) is None


def test_isenthalp_reference_over_workers_and_csv_round_trip(pr_propane, valve, tmp_path):
    from concurrent.futures import ThreadPoolExecutor

    inlet, serial = valve
    with ThreadPoolExecutor(2) as pool:
        spread = sw.isenthalp(pr_propane, inlet=inlet, P=("10 bar", "2 bar"), n=9, reference=True, progress=False,
                              executor=pool, chunk_size=2)
    np.testing.assert_allclose(spread["reference_T"], serial["reference_T"], rtol=1e-12)
    path = tmp_path / "valve.csv"
    sw.to_csv(spread, path)
    back = sw.read_csv(path)
    np.testing.assert_allclose(back["deviation_T_K"], spread["deviation_T_K"], rtol=1e-12)
    assert back.attrs["reference_h"] == pytest.approx(spread.attrs["reference_h"], rel=1e-15)
    assert list(back["reference_phase"]) == list(spread["reference_phase"])


@pytest.mark.parametrize("cls", [tr.PengRobinson, tr.SoaveRedlichKwong])
def test_saturation_curve_latent_heat_obeys_clapeyron(cls):
    # the Clapeyron equation dP_sat/dT = h_vaporization / (T (v_vapor - v_liquid)) holds exactly
    # for any equation of state's own saturation line (e.g. Smith, Van Ness & Abbott, 7th ed.,
    # eq. 6.72); checked by a central difference of the model's P_sat
    model = cls(tr.get_fluid("propane"))
    T, dT = np.array([250.0, 300.0, 340.0]), 1e-3
    frame = sw.saturation_curve(model, T=list(T))
    up, down = (sw.saturation_curve(model, T=list(T + d))["P"].to_numpy() for d in (dT, -dT))
    slope = (up - down) / (2 * dT)
    clapeyron = frame["h_vaporization"] / (T * (frame["v_vapor"] - frame["v_liquid"]))
    np.testing.assert_allclose(slope, clapeyron, rtol=1e-6)
    assert frame.attrs["units"]["h_vaporization"] == "J/mol" and frame.attrs["units"]["s_vapor"] == "J/(mol K)"


def test_saturation_curve_latent_heat_beside_the_reference():
    model = tr.PengRobinson(tr.get_fluid("propane"))
    frame = sw.saturation_curve(model, T=[231.0, 300.0], reference=True)
    h_v, h_l = (CP.PropsSI("Hmolar", "T", 231.0, "Q", q, "HEOS::Propane") for q in (1, 0))   # CoolProp directly
    assert frame["reference_h_vaporization"].iloc[0] == pytest.approx(h_v - h_l, rel=1e-9)
    # near the normal boiling point PR's latent heat is within 1 % (measured: -0.37 %)
    assert abs(frame["deviation_h_vaporization_percent"].iloc[0]) < 1.0
    custom = tr.PengRobinson(tr.Fluid("blend", Tc=350.0, Pc=4e6, omega=0.2, molar_mass=0.05))
    assert "h_vaporization" not in sw.saturation_curve(custom, T=[250.0, 300.0]).columns
