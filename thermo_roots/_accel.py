"""Optional compiled accelerator (needs numba): the (T, P) -> stable root loop, the
saturation-pressure loop and the caloric-property loop.

The caloric loop (:func:`caloric_kernel`, used by thermo_roots.properties.caloric for
``ACCEL_MIN_SIZE`` states or more) restates no formula: it calls the functions the numpy
path calls (``FORMULAS`` of ideal_gas, models and properties), compiled from their own code
by thermo_roots._accel_kernels. What needs exp or log (the ideal-gas tau terms, ln delta,
ln T and the cubic's two logarithms) is computed by numpy's vectorized math over chunks of
``CHUNK`` states, the rest state by state in the loop; ``RUNS["caloric"]`` counts its runs.

Install with ``pip install thermo_roots[accel]``. Without numba, or with the
environment variable ``THERMO_ROOTS_ACCEL=0``, :func:`stable_roots_kernel` and
:func:`saturation_kernel` return None and their callers
(:func:`thermo_roots.inversion.cubic.stable_roots`,
:func:`thermo_roots.inversion.saturation.saturation_pressure`) use their numpy paths.

The loops in :mod:`thermo_roots._accel_kernels` are those numpy paths: for (T, P), the
closed-form root, two guarded Newton polishes, deflation, sorting network, roots v > b and
Gibbs-energy choice among roots with dP/dv <= 0 of :mod:`thermo_roots.inversion.cubic`;
for saturation, the bracketed Newton iteration in ln P of
:mod:`thermo_roots.inversion.saturation` on the same cubic roots; one pass over the
states. The model formulas in them (alpha, the cubic's coefficients in Z, ln phi, dP/dv,
the fugacity gap and the roots' slopes in ln P) are not restated: they are the functions of
``models.FORMULAS`` the numpy path calls, compiled, so each pair agrees to rounding. ``tests/test_performance_paths.py`` and
``tests/inversion/test_saturation_fast.py`` hold them to 1e-12; change one side and
those tests say where the other must follow. Compiled code is cached on disk
(``cache=True``), so only the first process on a machine pays for the compilation.

References
----------
Lam, S. K., Pitrou, A. & Seibert, S. (2015), Numba: a LLVM-based Python JIT compiler,
Proc. LLVM-HPC 2015, 1-6.
Press, W. H. et al. (2007), Numerical Recipes, 3rd ed., Cambridge, sections 5.6 and 9.5.
Michelsen, M. L. & Mollerup, J. M. (2007), Thermodynamic Models: Fundamentals and
Computational Aspects, 2nd ed., ch. 3.
"""

from __future__ import annotations

import contextlib
import functools
import math
import os
import weakref

import numpy as np

from . import ideal_gas, models
from .models import R

# The loops take a model as its models.CubicParameters (Model.formula_parameters(), None for
# an alpha function the loops do not know); alpha_parts dispatches on its alpha_kind.


_switched_off = []   # non-empty inside `disabled()`


@contextlib.contextmanager
def disabled():
    """Run the numpy path inside this block (for comparisons in tests and benchmarks)."""
    _switched_off.append(True)
    try:
        yield
    finally:
        _switched_off.pop()


def available() -> bool:
    """True when numba imports and the accelerator is not switched off."""
    return _compiled() is not None


_inputs_of = weakref.WeakKeyDictionary()   # model -> model.formula_parameters(); models do not change


def _kernels_for(model):
    """(compiled module, the model's CubicParameters), or None where the numpy path must serve."""
    kernels = None if _switched_off else _compiled()
    if kernels is None:
        return None
    try:
        cubic = _inputs_of[model]
    except (KeyError, TypeError):
        cubic = model.formula_parameters()
        with contextlib.suppress(TypeError):   # a model that cannot be weakly referenced
            _inputs_of[model] = cubic
    return None if cubic is None else (kernels, cubic)


def stable_roots_kernel(model):
    """A compiled ``f(T, P) -> (roots, stable, v, phase)`` for this model, or None.

    None when numba is missing, ``THERMO_ROOTS_ACCEL=0`` is set, or the model's alpha
    function is not one of the built-in families (the numpy path then serves it).
    """
    found = _kernels_for(model)
    if found is None:
        return None
    kernels, cubic = found

    def run(T, P):
        n = T.size
        roots, v = np.empty((n, 3)), np.empty(n)
        stable, phase = np.empty(n, np.int8), np.empty(n, np.int8)
        kernels.stable_roots_loop(np.ascontiguousarray(T, dtype=float), np.ascontiguousarray(P, dtype=float),
                                  cubic, roots, stable, v, phase)
        return roots, stable, v, phase

    return run


def saturation_kernel(model):
    """A compiled bracketed Newton for the saturation pressure, or None (as above).

    The returned ``f(T, start, table, volumes, settings)`` gives ``(lnP, P, v_liquid,
    v_vapor, ok, iterations, evaluations, started)`` per temperature and (least T,
    greatest T, number not finished) (T's NaN if one is NaN); it is the loop of
    :func:`thermo_roots.inversion.saturation._newton_saturation_numpy`, which documents
    the arguments. T must be a 1-D float64 array (the caller's already is). One function
    per model is kept, so repeated calls do not rebuild it.
    """
    if _switched_off:
        return None
    try:
        return _saturation_runs[model]
    except (KeyError, TypeError):
        pass
    found = _kernels_for(model)
    if found is None:
        return None
    kernels, cubic = found
    loop = kernels.saturation_loop

    def run(T, start, table, volumes, settings):
        n = T.size
        real = np.empty((4, n))
        counts = np.empty((2, n), np.int64)
        flags = np.empty((2, n), np.bool_)
        summary = loop(T, cubic, start, table, volumes, settings, real, counts, flags)
        return real[0], real[1], real[2], real[3], flags[0], counts[0], counts[1], flags[1], summary

    with contextlib.suppress(TypeError):   # a model that cannot be weakly referenced
        _saturation_runs[model] = run
    return run


_saturation_runs = weakref.WeakKeyDictionary()   # model -> its saturation_kernel(model)

#: How many times each compiled loop has run in this process (tests read it to see that a
#: path was taken, never a timing).
RUNS = {"caloric": 0}

#: States per numpy pass over the T-only ideal-gas terms of the caloric loop (fits the cache).
CHUNK = 8192


def caloric_kernel(model):
    """A compiled ``f(T, v, P, shape) -> 10 arrays`` (the fields of properties.Caloric), or None.

    None when numba is missing or switched off, when the model is not one the loop knows
    (``model.formula_parameters()`` is None: a custom alpha function) or its fluid has no
    ideal-gas part. The loop calls the formula functions of ideal_gas, models and
    properties that the numpy path calls, compiled (see thermo_roots._accel_kernels).
    """
    kernels = None if _switched_off else _compiled()
    if kernels is None:
        return None
    cubic = model.formula_parameters()          # None for a mixture: the loop takes one component
    if cubic is None or model.fluid.ideal_gas is None:
        return None
    ideal = model.fluid.ideal_gas
    terms, dR, M = ideal.terms, R - ideal.R, float(model.fluid.molar_mass)

    def run(T, v, P, shape):
        n, given_P = math.prod(shape), P is not None
        T, v, P = (np.ascontiguousarray(np.broadcast_to(x, shape), dtype=float).reshape(n)
                   for x in (T, v, 0.0 if P is None else P))
        with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
            if not ((T > 0) & (T < np.inf)).all():   # the numpy path's guards: NaN where T or v is not
                T = np.where((T > 0) & (T < np.inf), T, np.nan)   # positive, or tau = T_r/T is not
            if not (v > 0).all():
                v = np.where(v > 0, v, np.nan)
            out = np.empty((10, n))   # row 0 is P (the given one, passed through, where P is known)
            planck = terms.planck_einstein
            logs = np.empty((8 + 2 * planck.shape[0], min(n, CHUNK)))
            d1, d2 = cubic.delta1, cubic.delta2
            for start in range(0, n, CHUNK):   # what needs exp or log in numpy, a cache-sized part at a time
                part = slice(start, start + CHUNK)
                T_part, v_part = T[part], v[part]
                rows = logs[:, :T_part.size]
                np.divide(ideal.T_r, T_part, out=rows[0])
                rows[1], rows[2], rows[3] = ideal_gas.tau_part_without_planck_einstein(terms, rows[0])
                for k, (_, theta, c, d) in enumerate(planck):
                    rows[8 + 2 * k], rows[9 + 2 * k] = ideal_gas._planck_einstein_exp(rows[0], theta, c, d)
                rows[4], rows[5] = ideal_gas.ideal_logs(T_part, v_part, ideal.rho_r)
                rows[6] = models.cubic_repulsion(v_part, cubic.v_min)
                w = v_part + cubic.c
                rows[7] = models.cubic_log_ratio(w + d1 * cubic.b, w + d2 * cubic.b, d1, d2)
                kernels.caloric_loop(T_part, v_part, P[part], given_P, cubic, planck, rows, ideal.R, dR, R, M, out[:, part])
        RUNS["caloric"] += 1
        first = P if given_P else out[0]   # a given P is returned as the numpy path returns it
        return (first.reshape(shape),) + tuple(row.reshape(shape) for row in out[1:])

    return run


@functools.lru_cache(maxsize=1)
def _compiled():
    """The module of compiled loops, or None (numba missing or THERMO_ROOTS_ACCEL=0)."""
    if os.environ.get("THERMO_ROOTS_ACCEL", "1").strip().lower() in ("0", "off", "no", "false"):
        return None
    try:
        from . import _accel_kernels
    except ImportError:
        return None
    return _accel_kernels
