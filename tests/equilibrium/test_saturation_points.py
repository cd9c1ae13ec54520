"""Bubble and dew points of mixtures against CoolProp's own cubic mixture backend.

Oracle: CoolProp's "PR" backend with thermo_roots' constants and the same kᵢⱼ
(tests/equilibrium/coolprop_cubic.py; Bell & Jäger 2016, J. Res. NIST 121, 238). Equal
fugacity is checked with the oracle's ln φ at our answer's (T, ρ), an independent formula.
"""

from __future__ import annotations

import concurrent.futures

import numpy as np
import pytest

import thermo_roots as tr
from thermo_roots.equilibrium.saturation_points import (CONVERGED, OUTSIDE, TRIVIAL, SaturationPoint,
                                                        bubble_point, dew_point)
from thermo_roots.errors import ConvergenceError, DomainError, InputError, WrongTypeError

from .coolprop_cubic import CoolPropCubic

NATURAL_GAS = {"methane": 0.85, "ethane": 0.06, "propane": 0.03, "n-butane": 0.01, "nitrogen": 0.03, "CO2": 0.02}

# (composition, kij, temperatures [K]) where the oracle converges to a non-trivial answer
CASES = [
    ({"methane": 0.5, "ethane": 0.5}, None, [150.0, 200.0, 230.0]),
    ({"propane": 0.5, "n-butane": 0.5}, None, [250.0, 320.0, 380.0]),
    ({"CO2": 0.95, "nitrogen": 0.05}, {("CO2", "nitrogen"): -0.02}, [230.0, 260.0, 280.0]),
    (NATURAL_GAS, {("methane", "CO2"): 0.1}, [150.0, 180.0]),
]


def _ln_fugacity(oracle, comp, T, v):
    """ln fᵢ [ln Pa] of a phase by the oracle at (T, 1/v): ln xᵢ + ln φᵢ + ln P, with the oracle's
    own P(T, ρ) of that phase (a dense liquid's P is very sensitive to v, so the pressure is the
    phase's own, not the saturation point's)."""
    ln_phi = oracle.ln_phi(comp, T, 1.0 / v)
    return np.log(comp) + ln_phi + np.log(oracle.state.p())


def _setup(composition, kij):
    mixture = tr.Mixture(composition)
    model = tr.PengRobinson(mixture, kij=kij)
    oracle = CoolPropCubic(list(composition), kij=kij, family="PR", constants="thermo_roots")
    return mixture, model, oracle


@pytest.fixture(scope="module", params=range(len(CASES)), ids=["C1-C2", "C3-nC4", "CO2-N2", "natural gas"])
def case(request):
    composition, kij, temperatures = CASES[request.param]
    mixture, model, oracle = _setup(composition, kij)
    T = np.array(temperatures)
    return mixture, model, oracle, T, bubble_point(model, T=T), dew_point(model, T=T)


def test_pressures_match_the_oracle(case):
    # CoolProp's PR mixture backend with the same constants and kij: the same equations,
    # so the same answer to the solvers' tolerances
    mixture, model, oracle, T, bubble, dew = case
    assert np.all(bubble.status == CONVERGED) and np.all(dew.status == CONVERGED)
    for i, t in enumerate(T):
        ref_b, ref_d = oracle.bubble_pressure(mixture.z, t), oracle.dew_pressure(mixture.z, t)
        assert bubble.P[i] == pytest.approx(ref_b.P, rel=1e-7)
        assert dew.P[i] == pytest.approx(ref_d.P, rel=1e-7)
        assert bubble.incipient[i] == pytest.approx(ref_b.y, abs=1e-7)
        assert dew.incipient[i] == pytest.approx(ref_d.x, abs=1e-7)


def test_equal_fugacity_by_the_oracle(case):
    # independent formula: CoolProp's ln phi at our (T, rho) of each phase
    mixture, model, oracle, T, bubble, dew = case
    for point in (bubble, dew):
        for i, t in enumerate(T):
            z, w = mixture.z, point.incipient[i]
            ln_f_feed = _ln_fugacity(oracle, z, t, point.v_feed[i])
            ln_f_inc = _ln_fugacity(oracle, w, t, point.v_incipient[i])
            assert ln_f_feed == pytest.approx(ln_f_inc, abs=1e-8)
            # the two phases really differ: not the trivial solution
            assert np.max(np.abs(np.log(w / z))) > 1e-2


def test_temperature_given_pressure_inverts_the_pressure(case):
    # bubble T at the bubble P of T gives T back (the same equations solved for the other variable)
    mixture, model, oracle, T, bubble, dew = case
    for given, kind in ((bubble, bubble_point), (dew, dew_point)):
        back = kind(model, P=given.P)
        assert np.all(back.status == CONVERGED)
        assert back.T == pytest.approx(T, rel=1e-8)


def test_natural_gas_bubble_point_where_the_oracle_stops_near_the_trivial_solution():
    # At 200 K CoolProp's cubic backend returns 4.25 MPa with max |ln K| about 1e-3 (both phases
    # nearly the feed: measured, see coolprop_cubic.py); the bubble curve from 180 K and 195 K,
    # where the two agree, continues to a real bubble point at about 5.2 MPa.
    mixture, model, oracle = _setup(NATURAL_GAS, None)
    ref = oracle.bubble_pressure(mixture.z, 200.0)
    assert np.max(np.abs(np.log(ref.y / ref.x))) < 3e-3            # the oracle's near-trivial answer
    ours = bubble_point(model, T=200.0)
    assert ours.status == CONVERGED
    assert np.max(np.abs(np.log(ours.K))) > 0.5
    ln_f_feed = _ln_fugacity(oracle, mixture.z, 200.0, ours.v_feed)
    ln_f_inc = _ln_fugacity(oracle, ours.incipient, 200.0, ours.v_incipient)
    assert ln_f_feed == pytest.approx(ln_f_inc, abs=1e-8)
    assert ours.Z_incipient > 2 * ours.Z_feed                       # a vapor bubble in a liquid
    # between the agreed points at 195 K and (by the oracle's own 205 K failure) on the same curve
    assert oracle.bubble_pressure(mixture.z, 195.0).P < ours.P < 6e6


def test_pure_component_limit_meets_the_pure_saturation_pressure():
    # a trace of ethane in methane: bubble and dew pressure both tend to methane's own
    # saturation pressure of the same model (thermo_roots.saturation). The dew pressure moves
    # down by about y_ethane (P_methane/P_ethane - 1), some 3e-6 at 120 K, the bubble pressure
    # down by about x_ethane (1 - P_ethane/P_methane) (Raoult's law, common practice): hence
    # the tolerances and the order
    model = tr.PengRobinson(tr.Mixture({"methane": 1 - 1e-8, "ethane": 1e-8}))
    pure = tr.saturation(tr.PengRobinson("methane"), T=np.array([120.0, 150.0, 180.0]))
    bubble, dew = bubble_point(model, T=pure.T), dew_point(model, T=pure.T)
    assert bubble.P == pytest.approx(pure.P, rel=1e-7)
    assert dew.P == pytest.approx(pure.P, rel=1e-5)
    assert np.all((dew.P < bubble.P) & (bubble.P < pure.P))
    assert bubble.v_feed == pytest.approx(pure.v_liquid, rel=1e-5)
    assert bubble.v_incipient == pytest.approx(pure.v_vapor, rel=1e-5)


def test_units_and_scalars():
    model = tr.PengRobinson(tr.Mixture({"methane": 0.5, "ethane": 0.5}))
    by_text = dew_point(model, T="-30 °C")
    assert isinstance(by_text, SaturationPoint) and isinstance(by_text.P, float)
    assert by_text.T == pytest.approx(243.15)
    assert by_text.P == pytest.approx(dew_point(model, T=243.15).P, rel=1e-12)
    bubble = bubble_point(model, P="20 bar")
    assert bubble.P == pytest.approx(2e6) and bubble.kind == "bubble"
    assert "bubble" in repr(bubble) and "Caution" in bubble._repr_html_()


def test_bad_inputs_are_refused_with_what_to_do():
    model = tr.PengRobinson(tr.Mixture({"methane": 0.5, "ethane": 0.5}))
    with pytest.raises(InputError, match="exactly one of T= or P="):
        bubble_point(model, T=200.0, P=1e6)
    with pytest.raises(InputError, match="neither"):
        dew_point(model)
    with pytest.raises(InputError, match="branch"):
        dew_point(model, T=200.0, branch="middle")
    with pytest.raises(InputError, match="2 finite mole fractions"):
        dew_point(model, T=200.0, z=[0.5, 0.3, 0.2])
    with pytest.raises(InputError, match="sums to"):
        dew_point(model, T=200.0, z=[0.5, 0.3])
    with pytest.raises(WrongTypeError):
        bubble_point("PR", T=200.0)
    with pytest.raises(InputError, match="positive"):
        bubble_point(model, T=-5.0)


def test_an_array_keeps_its_good_elements():
    model = tr.PengRobinson(tr.Mixture({"methane": 0.5, "ethane": 0.5}))
    points = bubble_point(model, T=np.array([180.0, np.nan, 200.0]))
    assert list(points.status) == [CONVERGED, "not solved", CONVERGED]
    assert np.isnan(points.P[1]) and "not a positive finite number" in points.reason[1]
    assert points.P[[0, 2]] == pytest.approx(bubble_point(model, T=np.array([180.0, 200.0])).P, rel=1e-12)
    with pytest.raises(InputError, match="index"):
        bubble_point(model, T=np.array([180.0, np.nan]), errors="raise")


def test_no_dew_point_above_the_cricondentherm():
    # methane/ethane 50/50 by PR: the cricondentherm lies near 268.95 K (the envelope); above it
    # the point is refused with the reason, naming the cricondentherm
    model = tr.PengRobinson(tr.Mixture({"methane": 0.5, "ethane": 0.5}))
    points = dew_point(model, T=np.array([250.0, 270.0, 300.0, 400.0]))
    assert points.status[0] == CONVERGED
    assert all(s in (TRIVIAL, OUTSIDE) for s in points.status[1:])
    assert all(r.startswith("no dew point at this temperature") for r in points.reason[1:])
    assert "cricondentherm 268.9" in points.reason[1]
    with pytest.raises((DomainError, ConvergenceError), match="no dew point"):
        dew_point(model, T=np.array([400.0]), errors="raise")


def test_threads_give_the_serial_answer():
    model = tr.PengRobinson(tr.Mixture(NATURAL_GAS))
    temperatures = np.linspace(140.0, 190.0, 8)
    serial = [bubble_point(model, T=t).P for t in temperatures]
    with concurrent.futures.ThreadPoolExecutor(4) as pool:
        parallel = list(pool.map(lambda t: bubble_point(model, T=t).P, temperatures))
    assert parallel == pytest.approx(serial, rel=1e-12)
