"""Saturation temperature from pressure: the temperature iteration at fixed P, the window
solver's gap in T near Tc, and Psat(T) inverted as the last resort.

The outside references here are the model's own saturation pressure (saturation(T=) is
checked against equal fugacity in test_saturation.py: the inverse must return the same
line) and the Clausius-Clapeyron equation, dPsat/dT = (h_V - h_L) / (T (v_V - v_L))
(Smith, Van Ness & Abbott, Introduction to Chemical Engineering Thermodynamics, 7th ed.,
section 6.5; recalled from memory).
"""

import numpy as np
import pytest

import thermo_roots as tr
from thermo_roots.inversion.saturation import api, fast, window

CUBICS = [tr.VanDerWaals, tr.RedlichKwong, tr.SoaveRedlichKwong, tr.PengRobinson, tr.PengRobinson78]
FLUIDS = ["propane", "water", "CarbonDioxide", "methane"]


def _pressures(m):
    """From just above the model's floor to next to the critical point [Pa]."""
    _, P_floor = api._lowest_saturation_state(m)
    Pc = m.fluid.Pc
    reduced = np.array([1e-60, 1e-30, 1e-10, 1e-4, 1e-2, 0.1, 0.3, 0.6, 0.9, 0.97, 0.99, 0.999, 0.9999,
                        1 - 1e-6, 1 - 1e-8])
    return np.concatenate([[1.5 * P_floor, 1e4 * P_floor], reduced * Pc])


@pytest.mark.parametrize("cls", CUBICS)
@pytest.mark.parametrize("name", FLUIDS)
def test_the_saturation_temperature_gives_back_its_pressure(cls, name):
    # the model's own Psat(T) at T_sat(P) is P again, to 1e-10 relative, from the floor to
    # P = 0.9999 Pc and beyond (the brief's acceptance check)
    m = cls(tr.get_fluid(name))
    P = _pressures(m)
    sat = tr.saturation(m, P=P)
    assert np.all(np.isfinite(sat.T)) and np.all(sat.T < m.fluid.Tc), name
    back = tr.saturation(m, T=sat.T)
    np.testing.assert_allclose(back.P, P, rtol=1e-10, atol=0.0)


@pytest.mark.parametrize("cls", CUBICS)
@pytest.mark.parametrize("name", FLUIDS)
def test_the_new_paths_agree_with_inverting_the_saturation_pressure(cls, name):
    # the proven path (root finding on ln Psat(T) - ln P, one saturation solve per trial T)
    # and the fast ones find the same temperature to a few units of rounding
    m = cls(tr.get_fluid(name))
    P = _pressures(m)
    T = tr.saturation(m, P=P).T
    T_proven = api._inverted_saturation_pressure(m, P)[0]
    np.testing.assert_allclose(T, T_proven, rtol=1e-13, atol=0.0)


@pytest.mark.parametrize("cls", CUBICS)
def test_equal_fugacity_and_the_isotherm_at_the_result(cls, propane):
    # the definition of saturation (Michelsen & Mollerup 2007, ch. 11): at (T_sat, P) both
    # volumes lie on the isotherm and their fugacities are equal; the tolerances are those of
    # test_saturation.py's check of saturation(T=)
    m = cls(propane)
    P = propane.Pc * np.concatenate([np.geomspace(1e-8, 0.9, 12), [0.97, 0.995, 0.9999]])
    sat = tr.saturation(m, P=P)
    assert np.all(sat.v_liquid < sat.v_vapor)
    gap = m.ln_phi(sat.T, sat.v_liquid, P) - m.ln_phi(sat.T, sat.v_vapor, P)
    assert np.max(np.abs(gap)) < 1e-10
    for v in (sat.v_liquid, sat.v_vapor):
        rounding = 1e-14 * tr.R * sat.T / (v - m.b)
        assert np.all(np.abs(m.pressure(sat.T, v) - P) <= 1e-9 * P + rounding)


def test_the_volumes_match_those_of_saturation_at_that_temperature(propane, co2):
    # the same saturated phases whichever known is given (next to Tc the volumes are
    # ill-conditioned, dv/dP -> infinity, so the check stops at P = 0.999 Pc)
    for fluid in (propane, co2):
        m = tr.PengRobinson(fluid)
        P = fluid.Pc * np.array([1e-6, 0.01, 0.2, 0.5, 0.8, 0.95, 0.99, 0.999])
        by_P = tr.saturation(m, P=P)
        by_T = tr.saturation(m, T=by_P.T)
        np.testing.assert_allclose(by_P.v_liquid, by_T.v_liquid, rtol=1e-9)
        np.testing.assert_allclose(by_P.v_vapor, by_T.v_vapor, rtol=1e-9)


def test_a_scalar_gives_a_scalar(propane):
    sat = tr.saturation(tr.PengRobinson(propane), P="5 bar")
    assert isinstance(sat.T, float) and isinstance(sat.v_liquid, float) and isinstance(sat.v_vapor, float)
    assert sat.reason == ""
    near = tr.saturation(tr.PengRobinson(propane), P=0.9999 * propane.Pc)   # the near-critical path
    assert isinstance(near.T, float) and near.T < propane.Tc


def test_an_array_keeps_its_good_elements(propane):
    # one bad element gives NaN there with a reason; the rest are solved as on their own
    m = tr.PengRobinson(propane)
    P = np.array([5e5, np.nan, 1e9, 1e-120, 0.9999 * propane.Pc, 2e6])
    sat = tr.saturation(m, P=P)
    good = [0, 4, 5]
    for i in good:
        alone = tr.saturation(m, P=P[i])
        assert sat.T[i] == pytest.approx(alone.T, rel=1e-14)
        assert sat.v_liquid[i] == pytest.approx(alone.v_liquid, rel=1e-12)
        assert sat.reason[i] == ""
    assert np.all(np.isnan(sat.T[[1, 2, 3]]))
    assert "not a finite number" in sat.reason[1]
    assert "critical pressure" in sat.reason[2]
    assert "lowest saturation pressure" in sat.reason[3]
    with pytest.raises(tr.DomainError, match="lowest saturation pressure"):
        api.saturation_temperature(m, P[[0, 3]])   # strict: the first bad element raises


def test_a_two_dimensional_array_keeps_its_shape(propane):
    m = tr.PengRobinson(propane)
    P = np.array([[1e5, 2e5], [3e5, 0.999 * propane.Pc]])
    T, v_l, v_v, _ = api.saturation_temperature(m, P)
    assert T.shape == v_l.shape == v_v.shape == (2, 2)
    np.testing.assert_allclose(T.ravel(), api.saturation_temperature(m, P.ravel())[0], rtol=1e-14)


@pytest.mark.parametrize("cls", CUBICS)
def test_the_iteration_slope_is_the_clausius_clapeyron_enthalpy(cls, co2):
    # _vaporization_enthalpy's (h_V - h_L)/(RT) against Clausius-Clapeyron with dPsat/dT by
    # central differences of the model's own saturation(T=): T dP/dT (v_V - v_L) / (R T)
    m = cls(co2)
    T = np.linspace(0.5, 0.98, 7) * co2.Tc
    sat = tr.saturation(m, T=T)
    dT = 1e-4 * T
    slope = (tr.saturation(m, T=T + dT).P - tr.saturation(m, T=T - dT).P) / (2 * dT)
    clapeyron = T * slope * (sat.v_vapor - sat.v_liquid) / (tr.R * T)
    a, da = m.attraction(T)
    to_z = sat.P / (tr.R * T)
    zl, zv = (sat.v_liquid + m.c) * to_z, (sat.v_vapor + m.c) * to_z
    ours = fast._vaporization_enthalpy(zl, zv, a / (m.b * tr.R * T), m.b * to_z, T * da / a, m.delta1, m.delta2)
    np.testing.assert_allclose(ours, clapeyron, rtol=1e-6)


def test_away_from_the_critical_point_no_window_or_nested_saturation_solve_runs(propane, monkeypatch):
    # the fix of the slow T_sat(P): a pressure whose saturation temperature is below about
    # Tr = 0.99 is served by the temperature iteration alone (one cubic solve per step): no
    # saturation-pressure solve per trial temperature and no window solve for the model's
    # floor on every call (that floor state is kept on the model). Before, one call ran
    # about ten saturation-pressure solves and a window solve.
    m = tr.PengRobinson(propane)
    tr.saturation(m, P=5e5)   # the model's start line is made on first use,
    tr.saturation(m, P=1e-95 * propane.Pc)   # its floor state on the first pressure near it
    calls = []
    real_raw, real_window = api._raw_saturation_pressure, window._window_saturation
    monkeypatch.setattr(api, "_raw_saturation_pressure", lambda *a, **k: calls.append("Psat") or real_raw(*a, **k))
    monkeypatch.setattr(api, "_window_saturation", lambda *a, **k: calls.append("window") or real_window(*a, **k))
    sat = tr.saturation(m, P=np.array([1e3, 5e5, 3e6]))
    assert np.all(np.isfinite(sat.T)) and calls == []
    assert np.all(sat.convergence.evaluations <= 8)
    tr.saturation(m, P=2e-95 * propane.Pc)   # near the floor again: its state comes from the model's store
    assert "window" not in calls


def test_next_to_the_critical_point_the_window_gap_in_temperature_serves(propane, monkeypatch):
    # P = 0.9999 Pc: the phases are too alike for the ln phi difference, so the window
    # solver's gap (the equal-area integral there) is solved in T at fixed P; Psat(T) is not
    # inverted (that costs a window solve per trial temperature)
    m = tr.PengRobinson(propane)
    tr.saturation(m, P=5e5)
    calls = []
    real = api._inverted_saturation_pressure
    monkeypatch.setattr(api, "_inverted_saturation_pressure", lambda *a, **k: calls.append(1) or real(*a, **k))
    sat = tr.saturation(m, P=np.array([0.995, 0.9999, 1 - 1e-7]) * propane.Pc)
    assert calls == [] and np.all(np.isfinite(sat.T))
    assert np.all(np.asarray(sat.convergence.converged))


@pytest.mark.parametrize("cls", CUBICS)
def test_the_nodes_around_a_pressure_bracket_its_saturation_temperature(cls, co2):
    # the start line's nodes are the model's own saturation states, so the two around P hold
    # T_sat(P) between them (checked against the proven path, Psat(T) inverted)
    m = cls(co2)
    line = fast._saturation_line(m)
    assert line[0].size >= 3 and line[1][-1] == 1.0   # the critical point is the last node
    P = np.concatenate([np.geomspace(1e-40, 0.99, 40), [0.995, 0.9999]]) * co2.Pc
    lo, hi = fast._node_bracket(line, np.log(P))
    y = co2.Tc / api._inverted_saturation_pressure(m, P)[0]
    assert np.all((lo <= y) & (y <= hi))
    inside = np.log(P) > line[0][0]   # below the coldest node the cold end is Tc/1000
    assert np.all(hi[inside] / lo[inside] < 1.2) and np.all(hi[~inside] == 1e3)   # two nodes, not the whole range


@pytest.mark.parametrize("cls", CUBICS)
@pytest.mark.parametrize("name", ["water", "CarbonDioxide"])
def test_next_to_the_critical_point_every_path_agrees_with_the_proven_one(cls, name):
    # 1 - P/Pc from 3e-2 to 1e-10: the temperature iteration (with the equal-area gap once the
    # dome is narrow), the window gap in T beyond Tr = 1 - 1e-6, the proven path for the rest
    m = cls(tr.get_fluid(name))
    P = m.fluid.Pc * (1.0 - np.geomspace(3e-2, 1e-10, 40))
    sat = tr.saturation(m, P=P)
    assert np.all(np.diff(sat.T) > 0.0) and np.all(sat.T <= m.fluid.Tc)
    np.testing.assert_allclose(sat.T, api._inverted_saturation_pressure(m, P)[0], rtol=1e-13, atol=0.0)
    narrow = sat.v_vapor < 1.5 * sat.v_liquid   # solved on the equal-area gap, in the iteration
    iterated = narrow & (sat.T < (1.0 - 1e-6) * m.fluid.Tc)
    assert np.any(iterated)
    assert np.all(fast._newton_saturation_temperature(m, P[iterated])[3].converged)


@pytest.mark.parametrize("cls", CUBICS)
@pytest.mark.parametrize("name", ["propane", "water", "helium"])
def test_the_models_floor_is_the_saturation_temperature_at_the_floor_pressure(cls, name):
    # lowest_saturation_temperature is defined by Psat(T_min) = SATURATION_FLOOR Pc: the
    # model's own Psat there (the window solver's, outside the table) gives that pressure back,
    # a hair above T_min a saturation exists and a hair below it is refused
    m = cls(tr.get_fluid(name))
    T_min = api.lowest_saturation_temperature(m)
    floor = api.SATURATION_FLOOR * m.fluid.Pc
    P = api._raw_saturation_pressure(m, np.array([T_min]), strict=False)[0][0]
    assert np.log(P / floor) == pytest.approx(0.0, abs=1e-9)
    assert tr.saturation(m, T=T_min * (1 + 1e-6)).P > floor
    with pytest.raises(tr.DomainError, match="give T of at least"):
        tr.saturation(m, T=T_min * (1 - 1e-6))
    assert api._lowest_saturation_state(m) == (T_min, floor)


def test_finding_the_floor_needs_no_window_solve(propane, monkeypatch):
    # the fix: the floor came from root finding on ln Psat(T), a window solve per trial
    # temperature (below the table's range), some 60-190 ms on the first low-pressure or
    # energy solve of every model; the temperature iteration at the floor pressure finds it
    m = tr.PengRobinson(propane)
    calls = []
    real = api._window_saturation
    monkeypatch.setattr(api, "_window_saturation", lambda *a, **k: calls.append(1) or real(*a, **k))
    T_min = api.lowest_saturation_temperature(m)
    assert calls == []
    P = api._raw_saturation_pressure(m, np.array([T_min]), strict=False)[0][0]   # the window solver's, once
    assert np.log(P / (api.SATURATION_FLOOR * propane.Pc)) == pytest.approx(0.0, abs=1e-9)


@pytest.mark.parametrize("cls", [tr.PengRobinson, tr.SoaveRedlichKwong])
def test_a_volume_translation_moves_the_volumes_and_not_the_temperature(cls, co2):
    # Peneloux, Rauzy & Freze (1982), Fluid Phase Equilib. 8, 7-23: a volume translation
    # leaves the saturation pressure (so T_sat(P)) unchanged and shifts both volumes by -c
    plain, shifted = cls(co2), cls(co2, volume_shift="peneloux")
    assert shifted.c != 0.0
    P = co2.Pc * np.array([1e-3, 0.1, 0.5, 0.9, 0.99, 0.9999])
    a, b = tr.saturation(plain, P=P), tr.saturation(shifted, P=P)
    np.testing.assert_allclose(b.T, a.T, rtol=1e-14)
    np.testing.assert_allclose(b.v_liquid, a.v_liquid - shifted.c, rtol=1e-9)
    np.testing.assert_allclose(b.v_vapor, a.v_vapor - shifted.c, rtol=1e-9)
    np.testing.assert_allclose(tr.saturation(shifted, T=b.T).P, P, rtol=1e-10)
