"""No silent wrong answers, no crashes on valid states, bad input explained (solve, saturation).

Sources: the generalized cubic and its alpha functions as in Michelsen & Mollerup (2007),
Thermodynamic Models, 2nd ed., ch. 3-4; the Soave (1972) alpha, Chem. Eng. Sci. 27, 1197;
equal fugacity at saturation, ibid. ch. 11; triple points from CoolProp's reference
equations (the shipped table). Everything else is marked common practice.
"""

import math

import numpy as np
import pytest

import thermo_roots as tr
from thermo_roots.models import R


@pytest.fixture(scope="module")
def propane_pr():
    return tr.PengRobinson(tr.get_fluid("propane"))


# --------------------------------------------------------------------------- models and arguments

def test_a_volume_shift_at_or_above_the_co_volume_is_refused(propane_pr):
    b = propane_pr.b
    for shift in (1.0, b, 1.0001 * b):
        with pytest.raises(tr.InputError, match="co-volume"):
            tr.PengRobinson(tr.get_fluid("propane"), volume_shift=shift)
    for shift in (None, np.array([1e-6, 2e-6]), "abc", True):
        with pytest.raises(tr.InputError, match="volume_shift"):
            tr.PengRobinson(tr.get_fluid("propane"), volume_shift=shift)
    model = tr.PengRobinson(tr.get_fluid("propane"), volume_shift=np.float32(0.5 * b))
    assert model.c == pytest.approx(0.5 * b, rel=1e-6)
    assert tr.solve(model, T=300.0, P=1e5).v > 0   # a state of the translated model stays physical


@pytest.mark.parametrize("model, words", [(None, "model object"), ("PR", "model object"),
                                          (tr.PengRobinson, "not the class PengRobinson"), (3.0, "model object")])
def test_solve_and_saturation_refuse_what_is_not_a_model(model, words):
    with pytest.raises(tr.InputError, match=words):
        tr.solve(model, T=300.0, P=1e5)
    with pytest.raises(tr.InputError, match=words):
        tr.saturation(model, T=300.0)


def test_a_model_takes_a_fluid_name_too():
    assert tr.PengRobinson("propane").fluid == tr.get_fluid("propane")
    with pytest.raises(tr.InputError, match="Fluid or a library fluid.s name"):
        tr.PengRobinson(42)


def test_shapes_that_do_not_broadcast_name_both_shapes(propane_pr):
    with pytest.raises(tr.InputError, match=r"T \(2,\), P \(3,\)"):
        tr.solve(propane_pr, T=[300.0, 310.0], P=[1e5, 2e5, 3e5])


def test_errors_option_is_checked(propane_pr):
    with pytest.raises(tr.InputError, match="errors="):
        tr.solve(propane_pr, T=[300.0], P=1e5, errors="ignore")


# --------------------------------------------------------------------------- no NaN passed off as a state

@pytest.mark.parametrize("model_class, T, P", [(tr.RedlichKwong, 1e-10, 1e5), (tr.PengRobinson, 300.0, 1e200),
                                               (tr.PengRobinson, 300.0, 5e-324)])
def test_knowns_beyond_double_precision_are_refused_not_reported(model_class, T, P):
    model = model_class(tr.get_fluid("propane"))
    with pytest.raises(tr.DomainError, match="no finite state"):
        tr.solve(model, T=T, P=P)
    state = tr.solve(model, T=[T, 300.0], P=[P, 1e5])   # in an array: NaN there, the rest solved
    assert math.isnan(state.v[0]) and state.phase[0] == "not solved" and "no finite state" in state.reason[0]
    assert state.v[1] == pytest.approx(tr.solve(model, T=300.0, P=1e5).v, rel=1e-12) and state.reason[1] == ""


def test_every_element_is_either_a_finite_state_or_carries_its_reason(propane_pr):
    # common practice: a sweep over extreme inputs must never hand back NaN labelled as a phase
    rng = np.random.default_rng(3)
    T = 10.0 ** rng.uniform(-12, 6, 3000)
    P = 10.0 ** rng.uniform(-320, 250, 3000)
    for model in (propane_pr, tr.RedlichKwong("propane"), tr.VanDerWaals("propane")):
        state = tr.solve(model, T=T, P=P)
        solved = state.reason == ""
        assert np.all(np.isfinite(state.v[solved]) & (state.v[solved] > 0)), model
        assert np.all(state.phase[~solved] == "not solved") and np.all(np.isnan(state.v[~solved]))


# --------------------------------------------------------------------------- (P, v) -> T far above Tc

def _soave_temperatures(model, P, v):
    """Every T with P(T, v) = P for a Soave alpha, in closed form: with s = sqrt(T),
    P = R s^2/(v - b) - (a_c/D)(1 + m - m s/sqrt(Tc))^2 is a quadratic in s (derived from
    the Soave 1972 alpha)."""
    from thermo_roots.models import _m_soave

    Tc, m = model.fluid.Tc, _m_soave(model.fluid.omega)
    A, K = R / (v - model.v_min), model.a_c / model._denominator(v)
    c0, c1 = 1.0 + m, m / math.sqrt(Tc)
    s = np.roots([A - K * c1 * c1, 2.0 * K * c0 * c1, -K * c0 * c0 - P])
    return sorted(float(r.real) ** 2 for r in s if abs(r.imag) < 1e-12 and r.real > 0)


def test_a_second_temperature_is_reported_where_pressure_peaks_on_the_isochore():
    srk = tr.SoaveRedlichKwong(tr.get_fluid("methyl linolenate"))
    P, v = 75326595.6, 6.7693e-4   # v from a (T, P) solve at 4449 K: it crashed before
    state = tr.solve(srk, P=P, v=v)
    expected = _soave_temperatures(srk, P, v)
    assert len(expected) == 2
    assert state.T == pytest.approx(expected[0], rel=1e-10)
    assert state.T_other == pytest.approx(expected[1], rel=1e-10)
    assert any("second temperature" in w for w in state.warnings)
    assert "Second temperature" in str(state)
    ordinary = tr.solve(tr.PengRobinson("propane"), P=1e5, v=0.03)
    assert math.isnan(ordinary.T_other) and ordinary.warnings == ()


HEAVY = ["methyl linolenate", "methyl linoleate", "methyl oleate", "methyl stearate", "methyl palmitate",
         "n-dodecane", "MD4M", "D6"]


@pytest.mark.parametrize("name", HEAVY)
def test_pressure_and_volume_give_back_the_temperature_far_above_tc(name):
    fluid = tr.get_fluid(name)
    Tr, Pr = np.meshgrid(np.linspace(3.0, 10.0, 8), np.geomspace(7.0, 100.0, 6))
    T, P = Tr.ravel() * fluid.Tc, Pr.ravel() * fluid.Pc
    for cls in (tr.SoaveRedlichKwong, tr.PengRobinson, tr.PengRobinson78):
        model = cls(fluid)
        v = tr.solve(model, T=T, P=P).v
        back = tr.solve(model, P=P, v=v, errors="raise")
        hit = np.isclose(back.T, T, rtol=1e-9) | np.isclose(back.T_other, T, rtol=1e-9)
        assert hit.all(), (name, cls.short_name, T[~hit], back.T[~hit], back.T_other[~hit])


def test_low_pressure_near_where_the_soave_alpha_vanishes():
    n2 = tr.PengRobinson(tr.get_fluid("nitrogen"))
    for T in (1387.692, 1500.0, 2000.0):
        for P in (1.0, 1e-3):
            v = tr.solve(n2, T=T, P=P).v
            back = tr.solve(n2, P=P, v=v)
            assert T in (pytest.approx(back.T, rel=1e-9), pytest.approx(back.T_other, rel=1e-9))


def test_a_pressure_no_temperature_reaches_at_that_volume_is_explained():
    srk = tr.SoaveRedlichKwong(tr.get_fluid("methyl linolenate"))
    v = 6.7693e-4
    peak = max(srk.pressure(T, v) for T in np.linspace(2000.0, 6000.0, 4001))
    with pytest.raises(tr.DomainError, match="no temperature gives"):
        tr.solve(srk, P=1.5 * peak, v=v)


# --------------------------------------------------------------------------- very low temperatures

def test_a_state_far_below_the_triple_point_always_displays(propane_pr):
    for T in (20.0, 5.0):
        state = tr.solve(propane_pr, T=T, P=1e5)
        assert state.phase == "liquid"
        assert any("triple point" in w for w in state.warnings)   # propane solid below 85.5 K (CoolProp)
        html, text = state._repr_html_(), str(state)
        assert "triple point" in html and "Caution" in text and dict(state.summary())
    cold = tr.solve(propane_pr, T=5.0, P=1e5)
    assert math.isnan(cold.P_sat)
    assert "none from this model" in dict(cold.summary())["Saturation pressure at T"]


def test_saturation_below_the_models_floor_names_the_limit(propane_pr):
    with pytest.raises(tr.DomainError, match=r"give T of at least 12\.\d+ K") as err:
        tr.saturation(propane_pr, T=10.0)
    assert "no sign change" not in str(err.value)
    with pytest.raises(tr.DomainError, match="below the lowest saturation pressure"):
        tr.saturation(propane_pr, P=1e-120)


def test_saturation_at_20_K_is_an_equal_fugacity_state(propane_pr):
    # equal fugacity and equal pressure define saturation (Michelsen & Mollerup 2007, ch. 11)
    s = tr.saturation(propane_pr, T=20.0)
    assert 0 < s.P < 1e-40
    assert propane_pr.ln_phi(20.0, s.v_liquid, s.P) == pytest.approx(propane_pr.ln_phi(20.0, s.v_vapor, s.P), abs=1e-9)
    assert propane_pr.pressure(20.0, s.v_vapor) == pytest.approx(s.P, rel=1e-9)


# --------------------------------------------------------------------------- arrays keep their good elements

def test_one_nan_among_many_temperatures(propane_pr):
    T = np.linspace(250.0, 350.0, 100_000)
    T[54321] = np.nan
    state = tr.solve(propane_pr, T=T, P=1e5)
    assert math.isnan(state.v[54321]) and "not a finite number" in state.reason[54321]
    assert np.count_nonzero(state.reason != "") == 1 and np.isfinite(np.delete(state.v, 54321)).all()
    assert any("(54321,)" in w for w in state.warnings)
    with pytest.raises(tr.InputError, match=r"At index \(54321,\): T = nan"):
        tr.solve(propane_pr, T=T, P=1e5, errors="raise")
    T_sat = np.linspace(200.0, 360.0, 1000)
    T_sat[543] = np.nan
    sat = tr.saturation(propane_pr, T=T_sat)
    assert math.isnan(sat.P[543]) and sat.reason[543] and np.isfinite(np.delete(sat.P, 543)).all()
    with pytest.raises(tr.InputError, match=r"At index \(543,\)"):
        tr.saturation(propane_pr, T=T_sat, errors="raise")


def test_bad_elements_of_every_pair_are_reported_at_their_index(propane_pr):
    cases = [dict(T=[300.0, -5.0], P=1e5), dict(P=[1e5, 1e5], v=[1e-2, 1e-6]),
             dict(T=[300.0, 400.0], quality=0.5), dict(T=300.0, quality=[0.5, 1.1]),
             dict(P=[1e5, np.inf], v=1e-2), dict(T=[[300.0], [np.nan]], rho_mass=[10.0, 20.0])]
    for knowns in cases:
        state = tr.solve(propane_pr, **knowns)
        bad = state.reason != ""
        assert bad.any() and not bad.all(), knowns
        assert np.all(np.isnan(state.v[bad])) and np.all(np.isfinite(state.v[~bad])), knowns
        with pytest.raises(tr.ThermoRootsError, match="At index"):
            tr.solve(propane_pr, errors="raise", **knowns)


def test_the_quality_message_names_the_bad_element(propane_pr):
    with pytest.raises(tr.DomainError, match=r"index \(2,\).*got 1\.1"):
        tr.solve(propane_pr, T=300.0, quality=[0, 0.5, 1.1], errors="raise")


def test_no_internal_message_leaks_for_a_tiny_temperature_with_quality(propane_pr):
    with pytest.raises(tr.DomainError) as err:
        tr.solve(propane_pr, T=1e-300, quality=0.5)
    assert "bracket" not in str(err.value) and "array(" not in str(err.value)
    assert "lowest saturation temperature" in str(err.value) or "at least" in str(err.value)


def test_the_convergence_record_follows_the_callers_shape(propane_pr):
    P = np.array([[1e5, 2e5], [3e6, np.nan]])
    state = tr.solve(propane_pr, P=P, v=5e-3)
    record = state.convergence
    assert np.shape(record.root) == (2, 2) and record.status[1, 1] == "not iterated" and not record.converged[1, 1]
    one = tr.solve(propane_pr, P=3e6, v=5e-3).convergence
    assert one.is_scalar and one.status == "converged" and isinstance(one.root, float)
    assert record.root[1, 0] == pytest.approx(one.root, rel=1e-12)


# --------------------------------------------------------------------------- what a person reads

def test_a_two_phase_state_shows_its_quality_and_both_coexisting_roots(propane_pr):
    state = tr.solve(propane_pr, T=300.0, quality=0.3)
    assert "quality=0.3" in repr(state)
    text = str(state)
    assert "°C" in text and "bar" in text and "Caution" in text and "quality" in text
    stable = [r.kind for r in state.roots if r.stable]
    assert stable == ["liquid-like", "vapor-like"]   # both phases coexist on the saturation line
    single = tr.solve(propane_pr, T=300.0, P=5e5)
    assert sum(r.stable for r in single.roots) == 1


@pytest.mark.parametrize("quality, words", [(0.0, "saturated liquid"), (1.0, "saturated vapor")])
def test_an_end_of_the_dome_reads_as_saturated_liquid_or_vapor(propane_pr, quality, words):
    # common practice of property tables: quality 0 is the saturated liquid, 1 the saturated vapor
    state = tr.solve(propane_pr, P="2 bar", quality=quality)
    assert state.phase == "two-phase"          # the API's phase word stays
    phase_row = next(line for line in str(state).splitlines() if line.strip().startswith("Phase"))
    assert phase_row.split()[-2:] == words.split()
    step = tr.compress(propane_pr, tr.solve(propane_pr, P="2 bar", quality=1.0), "15 bar", efficiency=0.75)
    assert "saturated vapor" in str(step)
    u_row = next(line for line in str(state).splitlines() if "internal energy u" in line)
    assert u_row.split()[-2] == f"{state.u_mass / 1e3:.6g}"   # a vessel's heat changes u: it is shown
    inside = next(line for line in str(tr.solve(propane_pr, P="2 bar", quality=0.5)).splitlines()
                  if line.strip().startswith("Phase"))
    assert inside.split()[-1] == "two-phase"



def _solve_chunk(args):
    model, T, P = args
    state = tr.solve(model, T=T, P=P)
    return state.v, state.phase.astype(str), state.reason.astype(str)


def test_solves_from_threads_and_processes_equal_the_serial_solve(propane_pr):
    # common practice: a shared model and its caches must not mix answers between callers
    from concurrent.futures import ProcessPoolExecutor, ThreadPoolExecutor

    rng = np.random.default_rng(11)
    chunks = [(propane_pr, rng.uniform(5.0, 600.0, 4000), 10.0 ** rng.uniform(2, 7.5, 4000)) for _ in range(8)]
    serial = [_solve_chunk(c) for c in chunks]
    with ThreadPoolExecutor(8) as pool:
        threaded = list(pool.map(_solve_chunk, chunks))
    with ProcessPoolExecutor(2) as pool:
        processed = list(pool.map(_solve_chunk, chunks[:2]))
    for got, want in zip(threaded + processed, serial):
        np.testing.assert_allclose(got[0], want[0], rtol=1e-13)
        assert (got[1] == want[1]).all() and (got[2] == want[2]).all()


def test_a_convergence_error_carries_the_record_in_the_callers_shape(propane_pr, monkeypatch):
    # force the (P, v) -> T finder to stop early: the error must point at the caller's index
    import thermo_roots.inversion.pairs_volume as state_module   # the (P, v) finder lives there

    real = state_module.find_root
    monkeypatch.setattr(state_module, "find_root", lambda *a, **k: real(*a, **{**k, "maxiter": 1}))
    P = np.array([[1e5, 3e6], [4e6, 5e6]])
    with pytest.raises(tr.ConvergenceError, match=r"At index \(0, 1\)") as err:
        tr.solve(propane_pr, P=P, v=5e-3, errors="raise")
    record = err.value.result
    assert np.shape(record.root) == (2, 2) and not record.converged[0, 1]
    state = tr.solve(propane_pr, P=P, v=5e-3)
    assert state.phase[0, 1] == "not solved" and "did not converge" in state.reason[0, 1]
    with pytest.raises(tr.ConvergenceError) as err:
        tr.solve(propane_pr, P=3e6, v=5e-3)
    assert err.value.result.is_scalar


def test_an_implied_pressure_far_above_critical_is_flagged(propane_pr):
    # common practice: a cubic is no guide at thousands of bar, and an entropy of the wrong size
    # (J instead of kJ) or a slightly small liquid volume implies such pressures silently
    Pc = propane_pr.fluid.Pc
    wrong_unit = tr.solve(propane_pr, T=300.0, s=1e-3)
    assert wrong_unit.P > 10 * Pc
    assert any("times the critical pressure" in w and "bar" in w for w in wrong_unit.warnings)
    sat = tr.solve(propane_pr, T=300.0, quality=0.0)
    dense = tr.solve(propane_pr, T=300.0, v=[0.8 * sat.v, sat.v, 1e-2])
    assert any("At 1 of 3 states" in w for w in dense.warnings)
    # a pressure the user gave is the user's own: no such sentence
    assert not any("critical pressure" in w for w in tr.solve(propane_pr, T=300.0, P=50 * Pc).warnings)
    assert not any("critical pressure" in w for w in tr.solve(propane_pr, T=300.0, v=1e-2).warnings)
