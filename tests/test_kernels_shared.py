"""The compiled (T, P) and saturation loops are built from the model formulas the numpy path
calls (``models.FORMULAS``), and give its answers.

What is checked:
- the loops name no model formula of their own: every global they call is either the compiled
  twin of a function in ``models.FORMULAS`` (the same code object) or a piece of the cubic's
  root finding (closed form, polishing, table lookup);
- each shared formula's twin agrees with the numpy call (tolerances, never exact equality:
  numpy's SIMD math and LLVM's scalar math may differ in the last bit);
- both loops agree with the numpy path for every cubic and several fluids, including liquids
  at very low pressure (tiny Z roots) and states next to the critical point;
- editing any formula a loop inlines changes that loop's key in numba's disk cache;
- ``THERMO_ROOTS_ACCEL=0`` and ``_accel.disabled()`` give the same answers.

ln phi of the generalized cubic in Z (Michelsen, M. L. & Mollerup, J. M. (2007),
Thermodynamic Models: Fundamentals and Computational Aspects, 2nd ed., ch. 4):
ln phi = Z - 1 - ln(Z - B) - (A/B) ln((Z + d1 B)/(Z + d2 B))/(d1 - d2).
"""

import dis
import importlib
import json
import os
import subprocess
import sys
import types

import numpy as np
import pytest

import thermo_roots as tr
from thermo_roots import _accel, models
from thermo_roots.inversion import cubic

numba = pytest.importorskip("numba")
kernels = pytest.importorskip("thermo_roots._accel_kernels")
_sat = importlib.import_module("thermo_roots.inversion.saturation")
_sat_fast = importlib.import_module("thermo_roots.inversion.saturation.fast")

CUBICS = [("vdW", {}), ("RK", {}), ("SRK", {}), ("PR", {}), ("PR78", {}), ("PR", {"volume_shift": "peneloux"}),
          ("SRK", {"volume_shift": "peneloux"})]
IDS = [short + ("-pen" if options else "") for short, options in CUBICS]
FLUIDS = ("CO2", "propane", "water", "R134a", "methane")
#: Root finding of the cubic (not a model formula): what the loops may call besides the twins.
ROOT_FINDING = {"z_roots", "one_real_root", "polish", "start_values", "table_roots", "refine_root"}


def _need_loops():
    if not _accel.available():
        pytest.skip("accelerator switched off (THERMO_ROOTS_ACCEL=0)")


def _globals_called(function):
    """Names of the globals a function's code loads (the functions it calls among them)."""
    return {ins.argval for ins in dis.get_instructions(function) if ins.opname == "LOAD_GLOBAL"}


def _model_formula_of(twin):
    """The models.FORMULAS name whose code a compiled twin runs, or None."""
    code = getattr(getattr(twin, "py_func", None), "__code__", None)
    return next((name for name in models.FORMULAS if getattr(models, name).__code__ is code), None)


@pytest.mark.parametrize("loop", ["stable_roots_loop", "saturation_loop"])
def test_the_loops_restate_no_model_formula(loop):
    """Each global a loop calls is a shared formula's twin or a root-finding piece; the old
    hand-written ln_phi_and_slope, alpha_value, coefficients, fugacity_gap_z and root_rate
    fail this."""
    called = _globals_called(getattr(kernels, loop).py_func) - {"np", "R", "range", "min", "max", "abs", "int"}
    twins = {name for name in called if _model_formula_of(getattr(kernels, name)) is not None}
    assert called - twins <= ROOT_FINDING, f"not shared with the numpy path: {sorted(called - twins - ROOT_FINDING)}"
    assert {"alpha_parts", "cubic_z_coefficients"} <= twins
    for name in ROOT_FINDING & called:   # and the root-finding pieces call no model formula of their own
        inner = _globals_called(getattr(kernels, name).py_func) - {"np", "range", "abs", "int", "_SIXTH"}
        assert inner <= ROOT_FINDING, (name, inner)


def test_the_numpy_path_calls_the_same_formulas():
    """CubicModel's ln_phi, dP_dv and cubic_coefficients are the shared formulas, not copies."""
    for method, formula in (("ln_phi", "cubic_ln_phi"), ("dP_dv", "cubic_dP_dv_at"),
                            ("cubic_coefficients", "cubic_z_coefficients")):
        assert formula in models.FORMULAS
        assert formula in _globals_called(getattr(models.CubicModel, method)), method


def _twin(name):
    return kernels._cubic[name]


@pytest.mark.parametrize("short,options", CUBICS, ids=IDS)
def test_ln_phi_and_slope_twins_agree_with_the_numpy_model(short, options):
    fluid = tr.get_fluid("propane")
    model = tr.MODELS[short](fluid, **options)
    rng = np.random.default_rng(21)
    T = rng.uniform(0.4, 1.6, 400) * fluid.Tc
    P = fluid.Pc * np.exp(rng.uniform(np.log(1e-6), np.log(3.0), 400))
    roots = tr.volume_roots(model, T, P)
    ln_phi, dP_dv = _twin("cubic_ln_phi"), _twin("cubic_dP_dv_at")
    a = model.attraction(T)[0]
    p = model.formula_parameters()
    for k in range(3):
        ok = np.isfinite(roots[:, k])
        want_phi = model.ln_phi(T[ok], roots[ok, k], P[ok])
        want_slope = model.dP_dv(T[ok], roots[ok, k])
        got_phi = [ln_phi(t, v, pp, tr.R, aa, p.b, p.c, p.v_min, p.delta1, p.delta2)
                   for t, v, pp, aa in zip(T[ok], roots[ok, k], P[ok], a[ok])]
        got_slope = [dP_dv(t, v, tr.R, aa, p.b, p.c, p.v_min, p.delta1, p.delta2)
                     for t, v, aa in zip(T[ok], roots[ok, k], a[ok])]
        np.testing.assert_allclose(got_phi, want_phi, rtol=1e-12, atol=1e-12)
        np.testing.assert_allclose(got_slope, want_slope, rtol=1e-10)


@pytest.mark.parametrize("short,options", CUBICS, ids=IDS)
def test_ln_phi_of_a_dense_liquid_at_very_low_pressure_matches_the_z_form(short, options):
    """At 1e-3 Pa a liquid root has Z ~ 1e-11: ln phi from the given P (Z = P v/(R T)) keeps
    its digits, and matches the textbook Z-form (Michelsen & Mollerup 2007, ch. 4) computed
    from the untranslated cubic's Z root, shifted by the translation's c P/(R T)."""
    fluid = tr.get_fluid("propane")
    model = tr.MODELS[short](fluid, **options)
    T = np.linspace(0.45, 0.7, 20) * fluid.Tc
    P = np.full(T.shape, 1e-3)
    v_liquid = tr.volume_roots(model, T, P)[:, 0]
    assert np.all(v_liquid < 3 * model.b)
    RT = tr.R * T
    a = model.attraction(T)[0]
    A, B = a * P / RT**2, model.b * P / RT
    Z = P * (v_liquid + model.c) / RT   # untranslated Z
    d1, d2 = model.delta1, model.delta2
    J = B / (Z + d1 * B) if d1 == d2 else np.log((Z + d1 * B) / (Z + d2 * B)) / (d1 - d2)
    textbook = Z - 1.0 - np.log(Z - B) - (A / B) * J - model.c * P / RT
    np.testing.assert_allclose(model.ln_phi(T, v_liquid, P), textbook, rtol=1e-9)


@pytest.mark.parametrize("short,options", CUBICS, ids=IDS)
def test_fugacity_gap_and_root_rate_twins_agree_with_the_numpy_path(short, options):
    """The saturation loop's gap and slopes are models' formulas; the numpy fast path's own
    functions (inversion/saturation/fast.py) give the same numbers, and the gap is the
    difference of CubicModel.ln_phi at the two roots."""
    fluid = tr.get_fluid("CO2")
    model = tr.MODELS[short](fluid, **options)
    T = np.linspace(0.5, 0.98, 60) * fluid.Tc
    P = tr.saturation(model, T=T).P * 1.001   # three roots, the gap small but not zero
    c2, c1, c0, B = model.cubic_coefficients(T, P)
    roots = tr.volume_roots(model, T, P)
    zl, zv = (roots[:, 0] + model.c) * P / (tr.R * T), (roots[:, 2] + model.c) * P / (tr.R * T)
    a = model.attraction(T)[0]
    A_over_B, A = a / (model.b * tr.R * T), a * P / (tr.R * T) ** 2
    d1, d2 = model.delta1, model.delta2
    gap = _twin("cubic_fugacity_gap_z")
    got = np.array([gap(l, v, ab, bb, d1, d2) for l, v, ab, bb in zip(zl, zv, A_over_B, B)])
    np.testing.assert_allclose(got, models.cubic_fugacity_gap_z(zl, zv, A_over_B, B, d1, d2), rtol=1e-9, atol=1e-14)
    np.testing.assert_allclose(got, _sat_fast.fugacity_gap_z(zl, zv, A_over_B, B, d1, d2), rtol=1e-9, atol=1e-14)
    by_ln_phi = model.ln_phi(T, roots[:, 0], P) - model.ln_phi(T, roots[:, 2], P)
    np.testing.assert_allclose(got, by_ln_phi, rtol=1e-6, atol=1e-11)
    rate = _twin("cubic_z_root_rate")
    for z in (zl, zv):
        got = np.array([rate(zz, a2, a1, aa, bb, d1 + d2, d1 * d2) for zz, a2, a1, aa, bb in zip(z, c2, c1, A, B)])
        np.testing.assert_allclose(got, _sat_fast._root_rate(z, c2, c1, A, B, d1 + d2, d1 * d2), rtol=1e-10)
    coefficients = _twin("cubic_z_coefficients")
    got = np.array([coefficients(aa, bb, d1 + d2, d1 * d2) for aa, bb in zip(A, B)])
    np.testing.assert_allclose(got.T, np.array([c2, c1, c0, B]), rtol=1e-13, atol=1e-300)


def _agree_with_slack(fast, slow, rtol, slack):
    """Roots, pick and phase of the two paths; a share ``slack`` of states may differ in root
    count or pick (a state within rounding of a root merging, or of the saturation pressure)."""
    f_roots, f_stable, f_v, f_phase = fast
    s_roots, s_stable, s_v, s_phase = slow
    same_count = (np.isfinite(f_roots) == np.isfinite(s_roots)).all(axis=1)
    same = same_count & (f_stable == s_stable)
    assert np.count_nonzero(~same) <= max(1, slack * same.size)
    np.testing.assert_allclose(f_roots[same], s_roots[same], rtol=rtol, atol=0.0, equal_nan=True)
    np.testing.assert_allclose(f_v[same], s_v[same], rtol=rtol, atol=0.0)
    np.testing.assert_array_equal(f_phase[same], s_phase[same])


def _states(model, kind, n, seed):
    rng = np.random.default_rng(seed)
    fluid = model.fluid
    if kind == "low-pressure liquid":   # Tr 0.3-0.5, within a factor 2 of the model's own Psat (Z_L ~ 1e-9..1e-3)
        T = rng.uniform(0.3, 0.5, n) * fluid.Tc
        return T, tr.saturation(model, T=T).P * np.exp(rng.uniform(-0.7, 0.7, n))
    if kind == "near Tc":               # Tr 0.999-1.001, Pr 0.99-1.01
        return rng.uniform(0.999, 1.001, n) * fluid.Tc, rng.uniform(0.99, 1.01, n) * fluid.Pc
    return rng.uniform(0.5, 2.0, n) * fluid.Tc, fluid.Pc * np.exp(rng.uniform(np.log(1e-3), np.log(3.0), n))


@pytest.mark.parametrize("short,options", CUBICS, ids=IDS)
@pytest.mark.parametrize("kind", ["low-pressure liquid", "near Tc", "wide"])
def test_stable_roots_loop_agrees_with_numpy(short, options, kind):
    _need_loops()
    for j, name in enumerate(FLUIDS):
        fluid = tr.get_fluid(name)
        model = tr.MODELS[short](fluid, **options)
        T, P = _states(model, kind, 4000, seed=j)
        fast = _accel.stable_roots_kernel(model)(T, P)
        slow = cubic.stable_roots_numpy(model, T, P)
        rtol = 1e-9 if kind == "near Tc" else 1e-12   # next to Tc the roots are ill-conditioned
        _agree_with_slack(fast, slow, rtol=rtol, slack=0.002)
        if kind == "low-pressure liquid":   # three roots everywhere; liquid above Psat, vapor below
            assert np.isfinite(fast[0]).all()
            assert np.count_nonzero((fast[3] == 0) != (P > tr.saturation(model, T=T).P)) <= 2


@pytest.mark.parametrize("short,options", CUBICS, ids=IDS)
def test_saturation_loop_agrees_with_numpy_near_tc_and_far_below(short, options):
    """Tr 0.3-0.5 (saturation pressures down to ~1e-10 Pc) and 0.97-0.99 (next to the
    hand-over to the window solver)."""
    _need_loops()
    for j, name in enumerate(FLUIDS):
        fluid = tr.get_fluid(name)
        model = tr.MODELS[short](fluid, **options)
        rng = np.random.default_rng(40 + j)
        T = np.concatenate([rng.uniform(0.3, 0.5, 1000), rng.uniform(0.97, 0.99, 1000)]) * fluid.Tc
        table, volumes = _sat._start_tables(model.delta1, model.delta2)
        fast = _accel.saturation_kernel(model)(T, _sat._TABLE_START, table, volumes, _sat._SETTINGS)
        slow = _sat._newton_saturation_numpy(model, T, _sat._TABLE_START, table, volumes, _sat._SETTINGS)
        both = fast[4] & slow[4]
        assert np.count_nonzero(fast[4] != slow[4]) <= 2 and both.mean() > 0.99
        for k in (1, 2, 3):   # P, v_L, v_V
            np.testing.assert_allclose(fast[k][both], slow[k][both], rtol=1e-11)
        assert np.abs(fast[6][both] - slow[6][both]).max() <= 1   # evaluations, slack of one


#: What each loop inlines from models (the formulas and what they call in turn).
USED = {"stable_roots_loop": ("alpha_parts", "soave_alpha_parts", "redlich_kwong_alpha_parts", "cubic_z_coefficients",
                              "cubic_ln_phi", "cubic_dP_dv_at", "cubic_dP_dv", "cubic_repulsion", "cubic_log_ratio",
                              "cubic_attraction_integral", "cubic_residual_helmholtz"),
        "saturation_loop": ("alpha_parts", "soave_alpha_parts", "redlich_kwong_alpha_parts", "cubic_z_coefficients",
                            "cubic_fugacity_gap_z", "cubic_z_root_rate")}


def _models_with(name, edited):
    """A stand-in for thermo_roots.models whose formula ``name`` has the code of ``edited``."""
    copy = types.ModuleType("models_edited")
    copy.FORMULAS = models.FORMULAS
    for formula in models.FORMULAS:
        setattr(copy, formula, getattr(models, formula))
    original = getattr(models, name)
    setattr(copy, name, types.FunctionType(edited.__code__.replace(co_name=original.__code__.co_name),
                                           vars(models), name))
    return copy


@pytest.mark.parametrize("loop", sorted(USED))
def test_editing_a_shared_formula_changes_the_loops_cache_key(loop):
    """numba keys a loop's disk cache on the loop's own code and closure, not on what it
    inlines from models.py: the fingerprint of models.FORMULAS in the closure must follow
    every formula the loop uses."""
    compiled = getattr(kernels, loop)
    fingerprint = kernels._fingerprint(models)
    assert fingerprint in [cell.cell_contents for cell in compiled.py_func.__closure__]
    codegen = compiled.targetctx.codegen()
    key = compiled._cache._index_key((), codegen)
    make = kernels._make_stable_roots_loop if loop == "stable_roots_loop" else kernels._make_saturation_loop
    assert make(fingerprint)._cache._index_key((), codegen) == key   # same formulas, same key
    called = {n for n in _globals_called(compiled.py_func) if _model_formula_of(getattr(kernels, n, None))}
    assert called <= set(USED[loop])   # the list above covers what the loop calls

    def edited(*args):   # any other code under the formula's name
        return args[0] * 2.0

    for name in USED[loop]:
        changed = kernels._fingerprint(_models_with(name, edited))
        assert changed != fingerprint, name
        assert make(changed)._cache._index_key((), codegen) != key, name


_SUBPROCESS = """
import json, numpy as np, thermo_roots as tr
out = {}
for short in ("vdW", "RK", "SRK", "PR", "PR78"):
    m = tr.MODELS[short](tr.get_fluid("propane"))
    rng = np.random.default_rng(3)
    T = rng.uniform(0.5, 2.0, 3000) * m.fluid.Tc
    P = m.fluid.Pc * np.exp(rng.uniform(np.log(1e-3), np.log(3.0), 3000))
    s = tr.solve(m, T=T, P=P)
    sat = tr.saturation(m, T=np.linspace(0.4, 0.98, 600) * m.fluid.Tc)
    out[short] = [s.v.tolist(), list(s.phase), sat.P.tolist()]
print(json.dumps(out))
"""


def test_switched_off_by_environment_or_context_the_answers_are_the_same():
    _need_loops()
    env = dict(os.environ, THERMO_ROOTS_ACCEL="0")
    off = json.loads(subprocess.run([sys.executable, "-c", _SUBPROCESS], env=env, capture_output=True, text=True,
                                    check=True).stdout)
    namespace = {}
    for short, (v_off, phase_off, psat_off) in off.items():
        model = tr.MODELS[short](tr.get_fluid("propane"))
        rng = np.random.default_rng(3)
        T = rng.uniform(0.5, 2.0, 3000) * model.fluid.Tc
        P = model.fluid.Pc * np.exp(rng.uniform(np.log(1e-3), np.log(3.0), 3000))
        T_sat = np.linspace(0.4, 0.98, 600) * model.fluid.Tc
        on = tr.solve(model, T=T, P=P)
        with _accel.disabled():
            ctx = tr.solve(model, T=T, P=P)
            ctx_sat = tr.saturation(model, T=T_sat).P
        on_sat = tr.saturation(model, T=T_sat).P
        for v, phase in ((np.array(v_off), phase_off), (ctx.v, list(ctx.phase))):
            same = np.array(phase) == np.array(on.phase, dtype=object)
            assert np.count_nonzero(~same) <= 3
            np.testing.assert_allclose(on.v[same], v[same], rtol=1e-12)
        np.testing.assert_allclose(on_sat, psat_off, rtol=1e-12)
        np.testing.assert_allclose(on_sat, ctx_sat, rtol=1e-12)
        namespace[short] = True
    assert set(namespace) == {"vdW", "RK", "SRK", "PR", "PR78"}


def test_the_fast_saturation_path_uses_the_model_layers_formulas():
    # one formula in one place: the numpy fast path's gap, attraction term and root rate are
    # the model layer's functions, the same ones the saturation loop compiles
    assert _sat_fast.fugacity_gap_z is models.cubic_fugacity_gap_z
    assert _sat_fast._attraction_gap is models.cubic_attraction_gap
    assert _sat_fast._root_rate is models.cubic_z_root_rate
    assert "cubic_attraction_gap" in models.FORMULAS
