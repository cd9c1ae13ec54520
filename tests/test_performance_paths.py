"""The fast (T, P) and saturation paths give the answers of the plain definitions.

The compiled loop (thermo_roots._accel, optional, needs numba) and the chunked numpy path
(thermo_roots.inversion.cubic) must agree to 1e-12 relative; the numpy path must pick
the root the textbook rule picks (Michelsen & Mollerup 2007, Thermodynamic Models, 2nd
ed., ch. 3: of the roots with dP/dv <= 0, the one of lowest Gibbs energy, i.e. lowest
ln phi), computed here with the model's own ln_phi and dP_dv on every root.
The compiled saturation loop must agree with its numpy twin to 1e-12, with the same
iteration counts (both are checked against the proven solver in
tests/inversion/test_saturation_fast.py).
"""

import importlib
import os
import subprocess
import sys
import tracemalloc

import numpy as np
import pytest

import thermo_roots as tr
from thermo_roots import _accel
from thermo_roots.inversion import cubic
from thermo_roots.inversion.state import PHASES, _root_kinds, _stable_index
from thermo_roots.models import CubicFamily, _soave_alpha


def _states(fluid, n, seed):
    """Random states over 0.5-2 Tc and 1e-3 to 3 Pc (log-spaced): liquid, vapour,
    three-root and supercritical states alike."""
    rng = np.random.default_rng(seed)
    return rng.uniform(0.5, 2.0, n) * fluid.Tc, fluid.Pc * np.exp(rng.uniform(np.log(1e-3), np.log(3.0), n))


MODELS = [("PR", {}), ("SRK", {}), ("PR78", {}), ("RK", {}), ("vdW", {}), ("PR", {"volume_shift": "peneloux"})]


def _model(short, options, fluid):
    return tr.MODELS[short](fluid, **options)


def _agree(fast, slow, rtol):
    f_roots, f_stable, f_v, f_phase = fast
    s_roots, s_stable, s_v, s_phase = slow
    np.testing.assert_array_equal(np.isfinite(f_roots), np.isfinite(s_roots))
    np.testing.assert_allclose(f_roots, s_roots, rtol=rtol, atol=0.0, equal_nan=True)
    np.testing.assert_allclose(f_v, s_v, rtol=rtol, atol=0.0, equal_nan=True)
    np.testing.assert_array_equal(f_stable, s_stable)
    np.testing.assert_array_equal(f_phase, s_phase)


@pytest.mark.parametrize("short,options", MODELS, ids=[m[0] + ("-pen" if m[1] else "") for m in MODELS])
def test_compiled_loop_agrees_with_numpy_path_on_1e5_states(short, options, co2):
    pytest.importorskip("numba")
    model = _model(short, options, co2)
    kernel = _accel.stable_roots_kernel(model)
    if kernel is None:
        pytest.skip("accelerator switched off (THERMO_ROOTS_ACCEL=0)")
    T, P = _states(co2, 10**5, seed=5)
    _agree(kernel(T, P), cubic.stable_roots_numpy(model, T, P), rtol=1e-12)


def test_compiled_loop_agrees_on_the_benchmark_box(co2):
    """CO2, 220-500 K, 0.1-20 MPa, as in benchmarks/run.py."""
    pytest.importorskip("numba")
    model = tr.PengRobinson(co2)
    kernel = _accel.stable_roots_kernel(model)
    if kernel is None:
        pytest.skip("accelerator switched off (THERMO_ROOTS_ACCEL=0)")
    rng = np.random.default_rng(11)
    T, P = rng.uniform(220.0, 500.0, 10**5), rng.uniform(1e5, 2e7, 10**5)
    _agree(kernel(T, P), cubic.stable_roots_numpy(model, T, P), rtol=1e-12)


@pytest.mark.parametrize("short,options", MODELS, ids=[m[0] + ("-pen" if m[1] else "") for m in MODELS])
def test_numpy_path_picks_the_lowest_gibbs_root(short, options, propane):
    model = _model(short, options, propane)
    T, P = _states(propane, 20000, seed=3)
    roots, stable, v, phase = cubic.stable_roots_numpy(model, T, P)
    np.testing.assert_array_equal(roots, tr.volume_roots(model, T, P))
    kinds = _root_kinds(model, T, roots)
    lnphi = model.ln_phi(T[:, None], roots, P[:, None])
    expected = _stable_index(lnphi, kinds)
    np.testing.assert_array_equal(stable, expected)
    np.testing.assert_array_equal(v, np.take_along_axis(roots, expected[:, None], axis=-1)[:, 0])
    assert np.mean(np.isfinite(roots[:, 2])) > 0.02, "the sample should hold three-root states"
    # phase by its definition: above Tc by pressure, below it by the side of v_c (common practice)
    Tc, Pc = propane.Tc, propane.Pc
    want = np.where(T >= Tc, np.where(P >= Pc, "supercritical", "vapor"), np.where(v < model.v_c, "liquid", "vapor"))
    np.testing.assert_array_equal(np.array(PHASES)[phase], want)


def test_volume_roots_are_the_same_across_chunk_boundaries(co2):
    model = tr.PengRobinson(co2)
    n = 2 * cubic.CHUNK + 17
    T, P = _states(co2, n, seed=9)
    c2, c1, c0, B = model.cubic_coefficients(T, P)
    Z = cubic.cubic_real_roots(c2, c1, c0)          # one whole-array pass, no chunks
    Z = np.sort(np.where(Z > B[:, None], Z, np.nan), axis=-1)
    expected = Z * (tr.R * T / P)[:, None] - model.c
    np.testing.assert_array_equal(tr.volume_roots(model, T, P), expected)
    np.testing.assert_array_equal(tr.volume_roots(model, T.reshape(-1, 1), P.reshape(-1, 1))[:, 0], expected)


def test_large_solve_phase_reads_as_strings_on_both_paths(co2):
    model = tr.PengRobinson(co2)
    T, P = _states(co2, 5000, seed=4)
    fast = tr.solve(model, T=T, P=P)
    with _accel.disabled():
        slow = tr.solve(model, T=T, P=P)
    assert fast.phase.dtype == object and set(fast.phase) <= set(PHASES)
    assert list(fast.phase) == list(slow.phase)
    assert isinstance(fast.phase[0], str)
    np.testing.assert_array_equal(fast.phase == "supercritical", (T >= co2.Tc) & (P >= co2.Pc))
    np.testing.assert_allclose(fast.v, slow.v, rtol=1e-12)
    for i in (0, 1, 2, 999, 4999):
        one = tr.solve(model, T=T[i], P=P[i])
        assert one.phase == fast.phase[i] and one.v == pytest.approx(fast.v[i], rel=1e-12)


def test_a_family_the_loop_does_not_know_takes_the_numpy_path(co2):
    # a Soave alpha with its own slope: not one of the built-in parameter sets
    family = CubicFamily("PR with a fitted slope", 1.0 + 2**0.5, 1.0 - 2**0.5, _soave_alpha(lambda w: 0.7))
    model = tr.CubicModel(co2, family)
    assert _accel.stable_roots_kernel(model) is None
    T, P = _states(co2, 4000, seed=8)
    roots, stable, v, phase = cubic.stable_roots(model, T, P)
    np.testing.assert_array_equal(v, tr.solve(model, T=T, P=P).v)


def test_switching_the_accelerator_off_by_environment():
    code = "from thermo_roots import _accel; print(_accel.available())"
    env = dict(os.environ, THERMO_ROOTS_ACCEL="0")
    out = subprocess.run([sys.executable, "-c", code], env=env, capture_output=True, text=True, check=True)
    assert out.stdout.strip() == "False"


def test_peak_memory_of_a_large_solve_stays_under_300_bytes_per_state(co2):
    """The numpy path works in chunks, so its temporaries do not grow with the input."""
    model = tr.PengRobinson(co2)
    T, P = _states(co2, 2 * 10**5, seed=6)
    for context in (_accel.disabled, _Nothing):
        with context():
            tracemalloc.start()
            state = tr.solve(model, T=T, P=P)
            _, peak = tracemalloc.get_traced_memory()
            tracemalloc.stop()
            assert peak / T.size < 300.0
            assert state.v.shape == T.shape


class _Nothing:
    def __enter__(self):
        return self

    def __exit__(self, *exc):
        return False


_sat = importlib.import_module("thermo_roots.inversion.saturation")


def _saturation_twins(model, T, table, settings=None, volumes=None):
    settings = _sat._SETTINGS if settings is None else settings
    volumes = _sat._start_tables(model.delta1, model.delta2)[1] if volumes is None else volumes
    kernel = _accel.saturation_kernel(model)
    if kernel is None:
        pytest.skip("accelerator switched off (THERMO_ROOTS_ACCEL=0)")
    return (kernel(T, _sat._TABLE_START, table, volumes, settings),
            _sat._newton_saturation_numpy(model, T, _sat._TABLE_START, table, volumes, settings))


def _same_saturation(fast, slow, rtol):
    """The compiled and numpy loops take the same branches and agree in value.

    Their arithmetic may differ in the last bit (LLVM against numpy's vector kernels), which
    can move a stopping test by one step: counts and flags are compared with that slack
    (at most 0.5 % of elements flipped, counts within one), never exactly.
    """
    f_lnP, f_P, f_vl, f_vv, f_ok, f_it, f_ev, f_started, f_bounds = fast
    s_lnP, s_P, s_vl, s_vv, s_ok, s_it, s_ev, s_started, s_bounds = slow
    n = np.size(f_ok)
    assert f_bounds[:2] == s_bounds[:2]   # T range, read by the public path from the loop
    assert abs(f_bounds[2] - s_bounds[2]) <= max(1, 0.005 * n)   # number unfinished
    assert np.count_nonzero(f_ok != s_ok) <= max(1, 0.005 * n)
    assert np.count_nonzero(f_started != s_started) <= max(1, 0.005 * n)
    both = f_ok & s_ok
    assert np.abs(f_ev[both] - s_ev[both]).max(initial=0) <= 1
    assert np.abs(f_it[both] - s_it[both]).max(initial=0) <= 1
    f_ok = s_ok = both
    for a, b in ((f_P, s_P), (f_vl, s_vl), (f_vv, s_vv)):
        np.testing.assert_allclose(a[f_ok], b[s_ok], rtol=rtol, atol=0.0)
    np.testing.assert_allclose(f_lnP[f_ok], s_lnP[s_ok], rtol=rtol, atol=1e-14)   # ln P near 0: absolute


@pytest.mark.parametrize("short,options", MODELS, ids=[m[0] + ("-pen" if m[1] else "") for m in MODELS])
def test_compiled_saturation_loop_agrees_with_its_numpy_twin(short, options, co2, propane):
    pytest.importorskip("numba")
    for fluid, seed in ((co2, 1), (propane, 2), (tr.get_fluid("water"), 3), (tr.get_fluid("helium"), 4)):
        model = _model(short, options, fluid)
        T = np.random.default_rng(seed).uniform(0.3, 0.99, 5000) * fluid.Tc
        table = _sat._start_tables(model.delta1, model.delta2)[0]
        fast, slow = _saturation_twins(model, T, table)
        assert fast[4].mean() > 0.99 and fast[7].mean() > 0.99
        _same_saturation(fast, slow, rtol=1e-12)


def test_compiled_saturation_loop_agrees_on_bisection_and_give_up_branches(co2):
    """A table off by e^3 forces the bracket, bisection and (with an iteration limit of 3)
    unfinished temperatures: both loops must take the same branches."""
    pytest.importorskip("numba")
    model = tr.PengRobinson(co2)
    T = np.random.default_rng(8).uniform(0.35, 0.99, 3000) * co2.Tc
    table = _sat._start_tables(model.delta1, model.delta2)[0]
    for shift in (3.0, -3.0):
        _same_saturation(*_saturation_twins(model, T, table + shift), rtol=1e-12)
    settings = list(_sat._SETTINGS)
    settings[3] = 3.0
    fast, slow = _saturation_twins(model, T, table + 3.0, tuple(settings))
    assert 0.0 < fast[4].mean() < 1.0
    _same_saturation(fast, slow, rtol=1e-12)


def test_compiled_saturation_loop_agrees_when_the_table_roots_are_rejected(co2):
    """Vapour starts of Z = 0 (they run to the liquid root): both loops reject every
    table pair, take the closed form, and still agree with each other and the good run."""
    pytest.importorskip("numba")
    model = tr.SoaveRedlichKwong(co2)
    T = np.random.default_rng(12).uniform(0.35, 0.99, 2000) * co2.Tc
    table, volumes = _sat._start_tables(model.delta1, model.delta2)
    wrong = volumes.copy()
    wrong[:, 1] = 0.0
    fast, slow = _saturation_twins(model, T, table, volumes=wrong)
    assert not fast[7].any() and fast[4].all()
    _same_saturation(fast, slow, rtol=1e-12)
    good, _ = _saturation_twins(model, T, table)
    np.testing.assert_allclose(fast[1], good[1], rtol=1e-12)


def test_large_saturation_uses_the_compiled_loop_and_agrees_with_numpy(co2):
    pytest.importorskip("numba")
    model = tr.SoaveRedlichKwong(co2)
    if _accel.saturation_kernel(model) is None:
        pytest.skip("accelerator switched off (THERMO_ROOTS_ACCEL=0)")
    T = np.linspace(0.4, 0.9999, 2 * _sat.ACCEL_MIN_SIZE) * co2.Tc
    fast = tr.saturation(model, T=T)
    with _accel.disabled():
        slow = tr.saturation(model, T=T)
    np.testing.assert_allclose(fast.P, slow.P, rtol=1e-12)
    np.testing.assert_allclose(fast.v_vapor, slow.v_vapor, rtol=1e-12)
    # the same iteration, so the same work; compiled and numpy math may differ in the last
    # bit, which can move a stopping test by one step (never assert exact counts across paths)
    gap = np.abs(np.asarray(fast.convergence.evaluations) - np.asarray(slow.convergence.evaluations))
    assert gap.max() <= 1 and gap.sum() <= 0.02 * T.size


def test_switching_the_saturation_loop_off_by_environment():
    code = ("import numpy as np, thermo_roots as tr; from thermo_roots import _accel; "
            "m = tr.PengRobinson(tr.get_fluid('CO2')); "
            "s = tr.saturation(m, T=np.linspace(200.0, 300.0, 1000)); "
            "print(_accel.saturation_kernel(m), bool(np.all(s.convergence.converged)))")
    env = dict(os.environ, THERMO_ROOTS_ACCEL="0")
    out = subprocess.run([sys.executable, "-c", code], env=env, capture_output=True, text=True, check=True)
    assert out.stdout.strip() == "None True"


def test_large_saturation_still_checks_its_input(co2):
    """The compiled pass reads T's range for the public checks: a T above Tc, a NaN and a
    T at the critical point must give what the general path gives (common practice:
    saturation exists only for 0 < T <= Tc)."""
    model = tr.PengRobinson(co2)
    T = np.linspace(0.5, 0.95, 2 * _sat.ACCEL_MIN_SIZE) * co2.Tc
    for bad, error in ((1.01 * co2.Tc, tr.errors.DomainError), (-5.0, tr.errors.DomainError),
                       (np.nan, tr.errors.InputError)):
        T_bad = T.copy()
        T_bad[7] = bad
        with pytest.raises(error, match=r"index \(7,\)"):
            tr.saturation(model, T=T_bad, errors="raise")
        s = tr.saturation(model, T=T_bad)   # the default: NaN and a reason there, the rest solved
        assert np.isnan(s.P[7]) and s.reason[7] and not any(s.reason[np.arange(T.size) != 7])
        np.testing.assert_allclose(np.delete(s.P, 7), np.delete(tr.saturation(model, T=T).P, 7), rtol=1e-12)
    T_crit = T.copy()
    T_crit[-1] = co2.Tc   # the critical tangent, through the general path
    s = tr.saturation(model, T=T_crit)
    assert np.all(s.convergence.converged)
    assert s.P[-1] == pytest.approx(co2.Pc, rel=1e-12) and s.v_liquid[-1] == s.v_vapor[-1] == model.v_c
    np.testing.assert_allclose(s.P[:-1], tr.saturation(model, T=T[:-1]).P, rtol=1e-12)
