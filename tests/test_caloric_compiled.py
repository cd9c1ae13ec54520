"""The compiled caloric loop (thermo_roots._accel, needs numba) gives the numpy path's answers.

Both paths call the same formula functions (ideal_gas.tau_part and ideal_molar, the alpha
functions and cubic_residual of models, properties.caloric_from_helmholtz); the loop only
runs them state by state. So the two must agree to rounding, here 1e-12 relative to the
size of each quantity: |P|, |cp|, |cv|, |w|, |kappa_T| themselves; h, u, g against |h| + R T
and s against |s| + R, because their zero is arbitrary and they cross it; mu_JT against
|mu_JT| + v / cp, the size of the two terms it is the difference of (common practice for
comparing quantities that pass through zero). The outside-world checks of these properties
(CoolProp's reference equations, the thermodynamic identities) are in tests/test_caloric.py
and tests/test_reference_caloric.py; they run on the numpy path, which this file ties the
compiled path to.
"""

import types

import numpy as np
import pytest

import thermo_roots as tr
from thermo_roots import _accel, properties
from thermo_roots.errors import DomainError
from thermo_roots.models import CubicFamily, CubicModel, R, _soave_alpha
from thermo_roots.properties import Caloric, caloric

numba = pytest.importorskip("numba")

MODELS = [("PR", {}), ("SRK", {}), ("PR78", {}), ("RK", {}), ("vdW", {}), ("PR", {"volume_shift": "peneloux"}),
          ("IG", {})]
FLUIDS = ["CO2", "Water", "propane", "n-Heptane", "R134a"]   # n-heptane: the Aly-Lee cp0 terms
N = 3000   # above properties.ACCEL_MIN_SIZE


@pytest.fixture(autouse=True)
def _needs_the_loop():
    if not _accel.available():
        pytest.skip("accelerator switched off (THERMO_ROOTS_ACCEL=0)")


def _scales(T, v, ref):
    """What each field is compared against (see the module docstring)."""
    RT = R * np.asarray(T)
    return Caloric(P=np.abs(ref.P), h=np.abs(ref.h) + RT, s=np.abs(ref.s) + R, u=np.abs(ref.u) + RT,
                   g=np.abs(ref.g) + RT, cp=np.abs(ref.cp), cv=np.abs(ref.cv), w=np.abs(ref.w),
                   mu_jt=np.abs(ref.mu_jt) + np.abs(v / ref.cp), kappa_T=np.abs(ref.kappa_T))


def _agree(fast, slow, T, v, rtol=1e-12):
    for name, x, y, scale in zip(Caloric._fields, fast, slow, _scales(T, v, slow)):
        x, y = np.asarray(x), np.asarray(y)
        assert x.shape == y.shape, name
        np.testing.assert_array_equal(np.isnan(x), np.isnan(y), err_msg=name)
        both = np.isfinite(y)
        assert np.all(np.abs(x[both] - y[both]) <= rtol * scale[both]), (
            name, np.max(np.abs(x[both] - y[both]) / scale[both]))


def _states(model, n, seed):
    """Stable single-phase roots over 0.5-2 Tc and 1e-3 to 3 Pc: liquid, vapor, supercritical."""
    fluid = model.fluid
    rng = np.random.default_rng(seed)
    T = rng.uniform(0.5, 2.0, n) * fluid.Tc
    P = fluid.Pc * np.exp(rng.uniform(np.log(1e-3), np.log(3.0), n))
    return T, np.asarray(tr.solve(model, T=T, P=P).v), P


def _runs():
    return _accel.RUNS["caloric"]


@pytest.mark.parametrize("fluid_name", FLUIDS)
@pytest.mark.parametrize("short,options", MODELS, ids=[m[0] + ("-pen" if m[1] else "") for m in MODELS])
def test_the_compiled_loop_agrees_with_the_numpy_path(short, options, fluid_name):
    model = tr.MODELS[short](tr.get_fluid(fluid_name), **options)
    T, v, P = _states(model, N, seed=len(fluid_name))
    before = _runs()
    fast = caloric(model, T, v, P)
    assert _runs() == before + 1, "the compiled loop was not taken"
    with _accel.disabled():
        slow = caloric(model, T, v, P)
    assert _runs() == before + 1
    _agree(fast, slow, T, v)
    # without a given pressure both take P = -a_v
    _agree(caloric(model, T, v), _numpy(model, T, v), T, v)


def test_several_chunks_agree_with_the_numpy_path_chunk_by_chunk():
    # the loop adds the Planck-Einstein terms into its scratch rows in place; each chunk of
    # _accel.CHUNK states refills them, so a last, shorter chunk and every chunk between must
    # agree with the numpy path as the first does (CO2: five Planck-Einstein terms)
    model = tr.PengRobinson(tr.get_fluid("CO2"))
    T, v, P = _states(model, 2 * _accel.CHUNK + 1234, seed=7)
    for given in (P, None):
        fast = caloric(model, T, v, given)
        _agree(fast, _numpy(model, T, v, given), T, v)
        one = caloric(model, T[-5:].repeat(1000), v[-5:].repeat(1000), None if given is None else P[-5:].repeat(1000))
        for name in ("h", "cp", "w"):   # the last chunk's states alone give the same numbers
            np.testing.assert_allclose(getattr(one, name)[::1000], getattr(fast, name)[-5:], rtol=1e-14)


def _numpy(model, T, v, P=None):
    with _accel.disabled():
        return caloric(model, T, v, P)


def test_nan_and_out_of_range_elements_stay_nan_and_leave_the_rest_alone(co2):
    model = tr.PengRobinson(co2)
    T, v, P = _states(model, N, seed=3)
    T, v = T.copy(), v.copy()
    T[[0, 7]] = np.nan, -5.0
    v[[1, 8]] = np.nan, 0.0
    T[9] = np.inf
    fast, slow = caloric(model, T, v, P), _numpy(model, T, v, P)
    _agree(fast, slow, T, v)
    for i in (0, 1, 7, 8, 9):
        assert np.isnan(fast.h[i]) and np.isnan(fast.cp[i]) and np.isnan(fast.w[i])
    assert np.all(np.isfinite(fast.h[10:])) and np.all(np.isfinite(fast.w[10:]))


def test_broadcasting_and_shapes_follow_numpy(propane):
    model = tr.SoaveRedlichKwong(propane)
    T = np.linspace(250.0, 500.0, 60)[:, None] * np.ones((1, 50))   # 3000 states, 2-D
    v = 0.02
    fast, slow = caloric(model, T, v), _numpy(model, T, v)
    assert fast.h.shape == (60, 50) and fast.w.shape == (60, 50)
    _agree(fast, slow, T, np.broadcast_to(v, T.shape))


def test_a_scalar_gives_floats_on_the_numpy_path(co2):
    model = tr.PengRobinson(co2)
    before = _runs()
    record = caloric(model, 300.0, 0.02)
    assert _runs() == before   # one state does not pay for the loop
    assert all(isinstance(x, float) for x in record)


def test_small_arrays_take_the_numpy_path(co2):
    model = tr.PengRobinson(co2)
    T, v, P = _states(model, properties.ACCEL_MIN_SIZE - 1, seed=4)
    before = _runs()
    caloric(model, T, v, P)
    assert _runs() == before


def test_states_through_solve_agree_with_the_loop_switched_off_incl_two_phase_and_unsolved(co2):
    """(T, v) knowns across the dome: liquid, vapor, supercritical and two-phase states
    (lever rule on h, s, u, g; cp, w NaN), and elements that cannot be solved (v <= b)."""
    model = tr.PengRobinson(co2)
    rng = np.random.default_rng(8)
    T = rng.uniform(0.7, 1.5, N) * co2.Tc
    v = model.v_c * np.exp(rng.uniform(np.log(0.4), np.log(30.0), N))
    v[:5] = 0.5 * model.b                        # below the co-volume: not solved
    before = _runs()
    fast = tr.solve(model, T=T, v=v)
    names = ("h", "s", "u", "g", "cp", "cv", "w", "mu_jt", "kappa_T")
    got = {name: getattr(fast, name) for name in names}
    assert _runs() > before
    with _accel.disabled():
        slow = tr.solve(model, T=T, v=v)
        want = Caloric(P=slow.P, **{name: getattr(slow, name) for name in names})
    two = np.asarray(slow.phase == "two-phase")
    assert two.sum() > 100 and (~two).sum() > 100   # both kinds are really there
    assert np.all(np.isnan(got["cp"][two])) and np.all(np.isfinite(got["h"][two]))
    assert np.all(np.isnan(got["h"][:5]))
    _agree(Caloric(P=fast.P, **got), want, T, v)


def test_a_family_the_loop_does_not_know_takes_the_numpy_path(co2):
    family = CubicFamily("PR with a fitted slope", 1.0 + 2**0.5, 1.0 - 2**0.5, _soave_alpha(lambda w: 0.7))
    model = CubicModel(co2, family)
    assert _accel.caloric_kernel(model) is None
    T, v, P = _states(tr.PengRobinson(co2), N, seed=5)
    before = _runs()
    record = caloric(model, T, v, P)
    assert _runs() == before and np.all(np.isfinite(record.h))


def test_the_loop_is_off_inside_disabled_and_results_are_the_same(co2):
    model = tr.PengRobinson(co2)
    T, v, P = _states(model, N, seed=6)
    with _accel.disabled():
        assert _accel.caloric_kernel(model) is None
    assert _accel.caloric_kernel(model) is not None


def test_a_fluid_without_cp0_is_refused_on_both_paths():
    fluid = tr.Fluid("made-up gas", 400.0, 4e6, 0.1, 0.05)
    model = tr.PengRobinson(fluid)
    T = np.full(N, 450.0)
    with pytest.raises(DomainError, match="cp0"):
        caloric(model, T, 0.01)
    with _accel.disabled(), pytest.raises(DomainError, match="cp0"):
        caloric(model, T, 0.01)


def test_a_user_fluid_with_a_cp0_polynomial_agrees():
    # cp0 of nitrogen-like gas, a + bT + cT^2 (coefficients of the usual size, invented)
    fluid = tr.Fluid("test gas", 126.2, 3.39e6, 0.037, 0.028, cp0=(28.9, -1.6e-3, 8.1e-6))
    model = tr.PengRobinson(fluid)
    T, v, P = _states(model, N, seed=9)
    _agree(caloric(model, T, v, P), _numpy(model, T, v, P), T, v)


def test_an_edited_formula_changes_the_loops_cache_key():
    """The loop inlines the formulas of three modules but numba keys its disk cache on the
    loop's own file; the fingerprint in its closure must follow the formulas' code."""
    from thermo_roots import _accel_kernels

    def make(body):
        module = types.ModuleType("formulas")
        exec(f"def f(x):\n    return {body}\n", module.__dict__)
        module.FORMULAS = ("f",)
        return module

    assert _accel_kernels._fingerprint(make("x + 1.0")) == _accel_kernels._fingerprint(make("x + 1.0"))
    assert _accel_kernels._fingerprint(make("x + 1.0")) != _accel_kernels._fingerprint(make("x - 1.0"))
    assert _accel_kernels._fingerprint(make("x * 2.0")) != _accel_kernels._fingerprint(make("x * 3.0"))
