"""Caloric cross-checks (h, s, cp, w) and the energy pairs of the reference.

Outside values: CoolProp's HEOS backend (Bell et al. 2014, Ind. Eng. Chem. Res. 53, 2498)
driven directly here; for propane the reference equation of Lemmon, McLinden & Wagner
(2009), J. Chem. Eng. Data 54, 3141. The library fluids' ideal-gas part is the reference
equation's own, so at vanishing density the cubic's h, s and cp must approach it
(common practice: every residual property goes to zero with the density).
"""

import math

import numpy as np
import pytest

import thermo_roots as tr

CoolProp = pytest.importorskip("CoolProp")


@pytest.fixture(scope="module")
def propane():
    return tr.PengRobinson(tr.get_fluid("propane"))


def heos_tp(T, P):
    s = CoolProp.AbstractState("HEOS", "Propane")
    s.update(CoolProp.PT_INPUTS, P, T)
    return s


@pytest.mark.parametrize("T, P", [(300.0, 1e5), (300.0, 20e5), (400.0, 50e5)])
def test_reference_caloric_values_are_the_reference_equations(propane, T, P):
    check = tr.cross_check(tr.solve(propane, T=T, P=P))
    s = heos_tp(T, P)
    assert check.reference_h == pytest.approx(s.hmolar(), rel=1e-12)
    assert check.reference_s == pytest.approx(s.smolar(), rel=1e-12)
    assert check.reference_cp == pytest.approx(s.cpmolar(), rel=1e-12)
    assert check.reference_w == pytest.approx(s.speed_sound(), rel=1e-12)
    state = check.state
    assert check.deviation_h == pytest.approx(state.h - s.hmolar(), abs=1e-9)
    assert check.deviation_s == pytest.approx(state.s - s.smolar(), abs=1e-12)
    assert check.deviation_cp_percent == pytest.approx(100 * (state.cp / s.cpmolar() - 1), rel=1e-9)
    assert check.deviation_w_percent == pytest.approx(100 * (state.w / s.speed_sound() - 1), rel=1e-9)
    assert check.deviation_h_percent == pytest.approx(100 * (state.h - s.hmolar()) / abs(s.hmolar()), rel=1e-9)


def test_low_density_limit_matches_the_reference(propane):
    # at 100 Pa the residual parts are tiny; measured: dh = 0.0117 J/mol, ds = -2e-5 J/(mol K),
    # cp -0.0005 %, w -0.0002 %; tenfold at 1000 Pa (they scale with the density)
    low = tr.cross_check(tr.solve(propane, T=300.0, P=100.0))
    higher = tr.cross_check(tr.solve(propane, T=300.0, P=1000.0))
    assert abs(low.deviation_h) < 0.05 and abs(low.deviation_s) < 1e-3
    assert abs(low.deviation_cp_percent) < 0.005 and abs(low.deviation_w_percent) < 0.005
    assert abs(higher.deviation_h) == pytest.approx(10 * abs(low.deviation_h), rel=0.05)


def test_liquid_deviations_are_those_of_a_cubic(propane):
    # measured at 300 K, 20 bar (compressed liquid): h +0.6 %, cp +3.0 %, w -23 % (a cubic's
    # liquid speed of sound is poor, common practice)
    check = tr.cross_check(tr.solve(propane, T=300.0, P=20e5))
    assert abs(check.deviation_h_percent) < 2.0
    assert abs(check.deviation_cp_percent) < 10.0
    assert -40.0 < check.deviation_w_percent < -5.0


def test_two_phase_compares_h_and_s_but_not_cp_or_w(propane):
    check = tr.cross_check(tr.solve(propane, P=10e5, quality=0.3))
    s = CoolProp.AbstractState("HEOS", "Propane")
    s.update(CoolProp.PQ_INPUTS, 10e5, 0.3)
    assert check.reference_h == pytest.approx(s.hmolar(), rel=1e-12)
    assert check.reference_s == pytest.approx(s.smolar(), rel=1e-12)
    assert math.isnan(check.reference_cp) and math.isnan(check.reference_w)   # CoolProp's cp there is no heat capacity
    assert math.isnan(check.deviation_cp_percent)
    rows = {row[0]: row for row in check.rows()}
    cp_row = next(r for name, r in rows.items() if "isobaric heat capacity" in name.lower())
    w_row = next(r for name, r in rows.items() if "speed of sound" in name.lower())
    assert "not single-valued" in cp_row[3] and "not single-valued" in w_row[3]
    h_row = next(r for name, r in rows.items() if "enthalpy" in name.lower())
    assert "kJ/mol" in h_row[0] and "%" in h_row[3]
    assert "enthalpy" in check._repr_html_().lower()


def test_percentages_of_h_near_its_zero_are_not_given(propane):
    # CoolProp's propane has the IIR reference state (h = 200 kJ/kg, s = 1 kJ/(kg K) for the
    # saturated liquid at 0 °C), so the saturated liquid's h passes through zero near 185 K:
    # at 190 K |h_ref| = 0.50 kJ/mol < R T = 1.58 kJ/mol (no %), at 273.15 K 8.8 kJ/mol (a %).
    s = CoolProp.AbstractState("HEOS", "Propane")
    for T, meaningful in ((190.0, False), (273.15, True)):
        s.update(CoolProp.QT_INPUTS, 0.0, T)
        assert (abs(s.hmolar()) >= tr.R * T) is meaningful
        check = tr.cross_check(tr.solve(propane, T=T, quality=0.0))
        assert math.isfinite(check.deviation_h)
        assert math.isfinite(check.deviation_h_percent) is meaningful
    s.update(CoolProp.QT_INPUTS, 0.0, 273.15)
    assert s.hmass() == pytest.approx(200e3, rel=1e-6) and s.smass() == pytest.approx(1e3, rel=1e-6)


def test_array_cross_check_has_the_caloric_fields(propane):
    T = np.array([280.0, 320.0, 360.0])
    check = tr.cross_check(tr.solve(propane, T=T, P=1e5))
    for i, t in enumerate(T):
        assert check.reference_cp[i] == pytest.approx(heos_tp(t, 1e5).cpmolar(), rel=1e-12)
    assert set(tr.CrossCheck.CALORIC_FIELDS) <= set(vars(check))


@pytest.mark.parametrize("pair", ["P,h", "P,s", "v,u"])
def test_reference_state_energy_pairs_round_trip(pair):
    fluid = tr.get_fluid("propane")
    base = heos_tp(330.0, 30e5)   # compressed liquid
    v, P, h, s_, u = 1 / base.rhomolar(), base.p(), base.hmolar(), base.smolar(), base.umolar()
    knowns = {"P,h": dict(P=P, h=h), "P,s": dict(P=P, s=s_), "v,u": dict(v=v, u=u)}[pair]
    ref = tr.reference_state(fluid, **knowns)
    assert ref.available
    assert ref.T == pytest.approx(330.0, rel=1e-8)
    assert ref.v == pytest.approx(v, rel=1e-7)


def test_reference_state_mass_basis_energy():
    fluid = tr.get_fluid("propane")
    base = heos_tp(300.0, 1e5)
    ref = tr.reference_state(fluid, P="1 bar", h_mass=f"{base.hmass() / 1e3!r} kJ/kg")
    assert ref.T == pytest.approx(300.0, rel=1e-8)


def test_user_fluid_has_no_reference_caloric(propane):
    f = propane.fluid
    mine = tr.Fluid("my propane", Tc=f.Tc, Pc=f.Pc, omega=f.omega, molar_mass=f.molar_mass)   # no cp0
    check = tr.cross_check(tr.solve(tr.PengRobinson(mine), T=300.0, P=1e5))
    assert not check.available
    assert math.isnan(check.deviation_h) and math.isnan(check.reference_h)
    assert len(check.rows()) > 0   # still displays
