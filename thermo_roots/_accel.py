"""Optional compiled accelerator for the (T, P) -> stable root kernel (needs numba).

Install with ``pip install thermo_roots[accel]``. Without numba, or with the
environment variable ``THERMO_ROOTS_ACCEL=0``, :func:`stable_roots_kernel` returns
None and :func:`thermo_roots.inversion.cubic.stable_roots` uses its numpy path.

The loop in :mod:`thermo_roots._accel_kernels` is the numpy path of :mod:`thermo_roots.inversion.cubic` (closed-form
root, two guarded Newton polishes, deflation, sorting network, roots v > b, Gibbs-energy
choice among roots with dP/dv <= 0) and the model formulas of :mod:`thermo_roots.models`
(alpha, cubic coefficients, ln phi, dP/dv), written as one pass over the states with the
same operations in the same order, so the two agree to rounding.
``tests/test_performance_paths.py`` holds them to 1e-12 on random states; change one and
that test says where the other must follow. Compiled code is cached on disk
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
import os

import numpy as np

from .models import PR76, PR78, RK, SRK, VDW, R, _kappa_pr76, _kappa_pr78, _m_soave

#: Alpha functions the kernel knows, by code: constant, Redlich-Kwong Tr^-1/2, Soave form.
_ALPHA_CONSTANT, _ALPHA_RK, _ALPHA_SOAVE = 0, 1, 2
_SOAVE_SLOPES = {SRK: _m_soave, PR76: _kappa_pr76, PR78: _kappa_pr78}


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


def stable_roots_kernel(model):
    """A compiled ``f(T, P) -> (roots, stable, v, phase)`` for this model, or None.

    None when numba is missing, ``THERMO_ROOTS_ACCEL=0`` is set, or the model's alpha
    function is not one of the built-in families (the numpy path then serves it).
    """
    kernel = None if _switched_off else _compiled()
    if kernel is None:
        return None
    family = model.family
    if family is VDW:
        kind, slope = _ALPHA_CONSTANT, 0.0
    elif family is RK:
        kind, slope = _ALPHA_RK, 0.0
    elif family in _SOAVE_SLOPES:
        kind, slope = _ALPHA_SOAVE, float(_SOAVE_SLOPES[family](model.fluid.omega))
    else:
        return None
    params = tuple(float(x) for x in (model.fluid.Tc, model.fluid.Pc, model.a_c, model.b, model.c,
                                      model.v_min, model.v_c, model.delta1, model.delta2, slope, R))

    def run(T, P):
        n = T.size
        roots, v = np.empty((n, 3)), np.empty(n)
        stable, phase = np.empty(n, np.int8), np.empty(n, np.int8)
        kernel(np.ascontiguousarray(T, dtype=float), np.ascontiguousarray(P, dtype=float),
               kind, params, roots, stable, v, phase)
        return roots, stable, v, phase

    return run


@functools.lru_cache(maxsize=1)
def _compiled():
    if os.environ.get("THERMO_ROOTS_ACCEL", "1").strip().lower() in ("0", "off", "no", "false"):
        return None
    try:
        from ._accel_kernels import kernel
    except ImportError:
        return None
    return kernel
