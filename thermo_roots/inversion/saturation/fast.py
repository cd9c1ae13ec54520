"""The fast path: a bracketed Newton iteration in ln P, started from the table.

Finding the spinodal window costs two root solves per temperature, so below Tr = 0.99
Newton's method in ln P on the same fugacity gap comes first, kept inside a bracket by the
window solver's sign rule, from a start read off the corresponding-states table
(:mod:`.table`); one evaluation of the cubic's roots usually finishes. With the optional
accelerator (:mod:`thermo_roots._accel`, needs numba) it runs as one compiled loop whose
steps are those of :func:`_newton_saturation_numpy`. What it does not finish is reported
as not converged, for the window solver to take over.
"""

from __future__ import annotations

import functools

import numpy as np

from ... import _accel
from ...models import R
from ...roots import RootResult
from ..cubic import _volume_columns
from .table import _TABLE_START, _start_tables, _start_values
from .window import _LNP_RTOL, _LOWEST_REDUCED_PRESSURE, _NARROW_DOME, _UNRESOLVED_GAP

#: Below this reduced temperature the bracketed Newton iteration is tried first.
FAST_TR_MAX = 0.99
#: From this many temperatures on, the compiled loop (if numba is there) runs the iteration.
ACCEL_MIN_SIZE = 256
#: The dtype of a native float64 array (a singleton: compared by identity, which is quick).
_FLOAT64 = np.dtype(np.float64)
#: A Newton step of at most this size in ln P is taken as the last one (see _newton_saturation).
_ACCEPT_STEP = 1e-9
#: Iteration limit of the fast path (a bisection from the widest bracket needs about 55).
_FAST_MAXITER = 100


def _compiled_newton(model, T):
    """The fast path's (P, v_l, v_v, result) for an array T [K] that is SI already, in one
    compiled pass.

    Serves 1-D float64 arrays of at least ACCEL_MIN_SIZE temperatures when the compiled
    loop is there: the loop reports T's range along the way, so the public checks need no
    pass of their own. None where the general path must serve: another input, no
    compiled loop, or T not all in 0 < T < Tc (1 - 1e-11) (NaN, a domain error to raise
    with its message, or the critical tangent).
    """
    if not (type(T) is np.ndarray and T.dtype is _FLOAT64 and T.ndim == 1 and T.size >= ACCEL_MIN_SIZE):
        return None
    tables = _start_tables(model.delta1, model.delta2)
    kernel = _accel.saturation_kernel(model)
    if kernel is None or tables is None:
        return None
    *out, (T_min, T_max, unfinished) = kernel(T, _TABLE_START, *tables, _SETTINGS)
    if not (T_min > 0.0 and T_max < model.fluid.Tc * (1.0 - _UNRESOLVED_GAP)):   # NaN fails
        return None
    return _newton_result(*out, unfinished=unfinished)


def _newton_saturation(model, T):
    """Saturation pressure by a bracketed Newton iteration in ln P, where it finishes.

    The gap g(ln P) = ln phi_L - ln phi_V falls with ln P at the slope Z_L - Z_V (< 0)
    wherever the cubic has three roots; where it has one, the sign rule of
    :func:`_fugacity_gap` says which side of the saturation pressure P lies on. The
    bracket starts as [ln(1e-40 Pc), ln Pc] and shrinks at every evaluation; the step is
    Newton's where it stays inside, a bisection otherwise. The start comes from the
    corresponding-states table (:func:`_start_tables`), good to about 1e-9 in ln P, so one
    or two evaluations usually finish.

    A step |dx| <= :data:`_ACCEPT_STEP` ends the iteration with that step taken: Newton's
    error after it is |g''/(2 g')| dx^2, and |g''/(2 g')| stays below about 20 for every
    cubic below Tr = 0.99 (checked in tests/inversion/test_saturation_fast.py), so the
    error is under 2e-17, below the rounding of ln P.

    Parameters
    ----------
    model : CubicModel
    T : numpy.ndarray
        1-D temperatures [K].

    Returns
    -------
    P, v_l, v_v : numpy.ndarray
        [Pa], [m^3/mol]; NaN where the fast path did not finish.
    result : RootResult
        Per temperature; converged False where the window solver must take over
        (Tr >= FAST_TR_MAX, outside the table, iteration limit, merged roots).

    References
    ----------
    Michelsen, M. L. & Mollerup, J. M. (2007), Thermodynamic Models: Fundamentals and
    Computational Aspects, 2nd ed., ch. 11 (d ln phi / d ln P = Z - 1).
    Press, W. H. et al. (2007), Numerical Recipes, 3rd ed., section 9.4 (Newton's method
    safeguarded by bisection).
    """
    tables = _start_tables(model.delta1, model.delta2)
    if tables is None:
        return _newton_result(*_nothing_solved(T.size))
    kernel = _accel.saturation_kernel(model) if T.size >= ACCEL_MIN_SIZE else None
    if kernel is None:
        out = _newton_saturation_numpy(model, T, _TABLE_START, *tables, _SETTINGS)
    else:
        out = kernel(T, _TABLE_START, *tables, _SETTINGS)
    return _newton_result(*out[:-1])


def _newton_result(lnP, P, v_l, v_v, ok, iterations, evaluations, started, unfinished=None):
    """(P, v_l, v_v, RootResult) from the outputs of the fast path's loops (unfinished: how
    many are not ok, if known)."""
    n = ok.size
    if unfinished == 0 or (unfinished is None and ok.all()):
        status = _all_converged(n)
    else:
        status = np.where(ok, "converged", "iteration limit")
    return P, v_l, v_v, RootResult(lnP, ok, status, iterations, evaluations, None, "newton")


def _nothing_solved(n):
    """The fast path's outputs for n temperatures it has not solved."""
    return tuple(np.full(n, np.nan) for _ in range(4)) + (np.zeros(n, bool), np.zeros(n, np.int64),
                                                           np.zeros(n, np.int64), np.zeros(n, bool))


#: Newton steps on the cubic allowed to each root started from the table (see _table_roots).
_ROOT_STEPS = 4
#: A Newton step on a root of at most this share of it ends its refinement (see _refine_root).
_ROOT_TOL = 1e-11
#: The fast path's constants in the order the loops unpack them (see _newton_saturation_numpy).
_SETTINGS = (float(np.log(_LOWEST_REDUCED_PRESSURE)), _ACCEPT_STEP, _NARROW_DOME, float(_FAST_MAXITER), _LNP_RTOL,
             float(_ROOT_STEPS), _ROOT_TOL, FAST_TR_MAX)


@functools.lru_cache(maxsize=8)
def _all_converged(n):
    """A read-only status array "converged" of length n, shared (it is 60 bytes a state)."""
    status = np.full(n, "converged", dtype="<U15")
    status.setflags(write=False)
    return status



def fugacity_gap_z(zl, zv, A_over_B, B, delta1, delta2):
    """ln phi_L - ln phi_V [-] of the untranslated cubic from its roots Z_L, Z_V at one (T, P).

    From ln phi = Z - 1 - ln(Z - B) - (A/B) J(Z), J = ln((Z + d1 B)/(Z + d2 B))/(d1 - d2)
    (J = B/(Z + d B) when d1 = d2 = d): :meth:`CubicModel.ln_phi` written in Z, with the
    logarithms of the two phases merged, so two logarithms give the difference instead of
    six. A volume translation shifts both ln phi by the same cP/RT, so the difference is
    the translated model's too. ``tests/inversion/test_saturation_fast.py`` holds it to
    the difference of :meth:`CubicModel.ln_phi`. Compiled twin:
    :func:`thermo_roots._accel_kernels.fugacity_gap_z`.

    Parameters
    ----------
    zl, zv : numpy.ndarray
        Liquid and vapor roots of the cubic in Z [-].
    A_over_B : numpy.ndarray
        a / (b R T) [-].
    B : numpy.ndarray
        b P / (R T) [-].
    delta1, delta2 : float
        The family's constants [-].

    References
    ----------
    Michelsen, M. L. & Mollerup, J. M. (2007), Thermodynamic Models: Fundamentals and
    Computational Aspects, 2nd ed., ch. 3 and 4 (ln phi of the generalized cubic).
    Peneloux, A., Rauzy, E. & Freze, R. (1982), Fluid Phase Equilib. 8, 7-23 (translation
    leaves phase equilibrium unchanged).
    """
    if delta1 == delta2:
        attraction = B / (zl + delta1 * B) - B / (zv + delta1 * B)
    else:
        ratio = (zl + delta1 * B) * (zv + delta2 * B) / ((zl + delta2 * B) * (zv + delta1 * B))
        attraction = np.log(ratio) / (delta1 - delta2)
    return (zl - zv) - np.log((zl - B) / (zv - B)) - A_over_B * attraction


def _newton_saturation_numpy(model, T, start, table, volumes, settings):
    """The iteration of :func:`_newton_saturation` in numpy; the compiled twin is
    :func:`thermo_roots._accel_kernels.saturation_kernel` (same steps, same order; this
    one recovers Z from cubic.py's volumes, the loop keeps Z itself, so they agree to
    rounding, not bit for bit).

    The first evaluation takes its two roots from the table's volumes, refined by Newton
    on the cubic and checked (:func:`_table_roots`); where the check fails, and at every
    later evaluation, the closed form of :mod:`thermo_roots.inversion.cubic` gives them.

    Parameters
    ----------
    model : CubicModel
    T : numpy.ndarray
        1-D temperatures [K] below FAST_TR_MAX Tc.
    start : tuple
        (first node, 1 / spacing, shift) of the table's variable x = sqrt(alpha/Tr - shift) [-].
    table : numpy.ndarray
        ln(Psat/Pc) [-] of the constant-alpha model at the nodes.
    volumes : numpy.ndarray
        Shape (nodes, 2): v_L/b and Z_V [-] of its saturated phases at the nodes.
    settings : tuple
        (ln of the lowest reduced pressure, accepted last step, narrow-dome ratio,
        iteration limit, relative bracket width at which to give up, Newton steps per
        table root, relative step that ends them, reduced temperature from which T is
        left to the window solver) [-].

    Returns
    -------
    lnP, P, v_l, v_v, ok, iterations, evaluations, started : numpy.ndarray
        ln P [ln Pa], P [Pa], saturated volumes [m^3/mol], finished (bool), the counts,
        and whether the first evaluation's roots came from the table (bool).
    summary : tuple
        T's least and greatest value [K] (NaN if one T is NaN) and the number of T not
        finished (the compiled loop finds them on its way, so the public range check and
        the hand-over to the window solver need no pass of their own).
    """
    ln_lowest, accept, narrow, maxiter, eps4, root_steps, root_tol, fast_tr_max = settings
    n, c, d1, d2 = T.size, model.c, model.delta1, model.delta2
    a, _ = model.attraction(T)
    alpha = a / model.a_c
    A_over_B = a / (model.b * (R * T))
    lnPc = np.log(model.fluid.Pc)
    Tr = T / model.fluid.Tc
    ln_pr, rl, zv_start = _start_values(Tr, alpha, start, table, volumes)
    x = np.where(Tr < fast_tr_max, lnPc + ln_pr, np.nan)   # from fast_tr_max on: the window solver's
    lo, hi = np.full(n, lnPc + ln_lowest), np.full(n, lnPc)
    ok, iterations, evaluations = np.zeros(n, bool), np.zeros(n, np.int64), np.zeros(n, np.int64)
    P_last, z_l, z_v, last = np.full(n, np.nan), np.full(n, np.nan), np.full(n, np.nan), np.zeros(n)
    from_table = (x > lo) & (x < hi)   # the table's volumes belong to its own start only
    x = np.where(np.isnan(x) | from_table, x, lo + 0.5 * (hi - lo))   # NaN (outside the table) stays NaN
    started = np.zeros(n, bool)
    idx = np.flatnonzero(np.isfinite(x))
    with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
        for k in range(int(maxiter)):
            if idx.size == 0:
                break
            Ti, xi, lo_i, hi_i = T[idx], x[idx], lo[idx], hi[idx]
            P = np.exp(xi)
            to_z = P / (R * Ti)
            if k == 0:
                zl, zv, good = _table_roots(model, Ti, P, rl[idx], zv_start[idx], int(root_steps), root_tol)
                good &= from_table[idx]
                started[idx] = good
                scale = 1.0 / to_z
                v0, v2 = zl * scale - c, zv * scale - c
                rest = np.flatnonzero(~good)
                if rest.size:
                    cv0, _, cv2 = _volume_columns(model, Ti[rest], P[rest])
                    v0[rest], v2[rest] = cv0, cv2
                    zl[rest], zv[rest] = (cv0 + c) * to_z[rest], (cv2 + c) * to_z[rest]
            else:
                v0, _, v2 = _volume_columns(model, Ti, P)
                zl, zv = (v0 + c) * to_z, (v2 + c) * to_z
            evaluations[idx] += 1
            three = np.isfinite(v2)
            stop = three & (v2 < narrow * v0)   # phases too alike for the ln phi difference
            gap = fugacity_gap_z(zl, zv, A_over_B[idx], model.b * to_z, d1, d2)
            step = -gap / (zl - zv)
            rises = np.where(three, gap > 0.0, v0 > model.v_c)    # P below the saturation pressure
            falls = np.where(three, gap < 0.0, ~(v0 > model.v_c))
            lo_i, hi_i = np.where(rises, xi, lo_i), np.where(falls, xi, hi_i)
            iterations[idx] += ~stop
            done = three & ~stop & (np.abs(step) <= accept)
            xn = xi + step
            newton = three & (xn > lo_i) & (xn < hi_i)
            xn = np.where(newton, xn, lo_i + 0.5 * (hi_i - lo_i))
            collapsed = hi_i - lo_i <= eps4 * np.maximum(1.0, np.abs(xi))
            x[idx] = np.where(done | collapsed | stop, xi, xn)
            lo[idx], hi[idx] = lo_i, hi_i
            fin = idx[done]
            ok[fin] = True
            P_last[fin], z_l[fin], z_v[fin], last[fin] = P[done], zl[done], zv[done], step[done]
            idx = idx[~(done | stop | collapsed)]
    # the last step taken, and the roots carried to its pressure along their slopes
    v_l, v_v, P_out = np.full(n, np.nan), np.full(n, np.nan), P_last
    fin = np.flatnonzero(ok)
    if fin.size:
        step = last[fin]
        x[fin] += step
        c2, c1, _, B = model.cubic_coefficients(T[fin], P_last[fin])
        A = A_over_B[fin] * B
        zl = z_l[fin] + _root_rate(z_l[fin], c2, c1, A, B, d1 + d2, d1 * d2) * step
        zv = z_v[fin] + _root_rate(z_v[fin], c2, c1, A, B, d1 + d2, d1 * d2) * step
        growth = 1.0 + step * (1.0 + 0.5 * step)   # exp(step) to rounding, |step| <= 1e-9
        P_out[fin] = P = P_last[fin] * growth
        ok[fin] = (zl > B * growth) & (zv > zl)
        scale = R * T[fin] / P
        v_l[fin] = np.where(ok[fin], zl * scale - c, np.nan)
        v_v[fin] = np.where(ok[fin], zv * scale - c, np.nan)
    summary = (T.min(), T.max(), int(n - ok.sum())) if n else (np.inf, -np.inf, 0)
    return x, P_out, v_l, v_v, ok, iterations, evaluations, started, summary


def _root_rate(z, c2, c1, A, B, u, w):
    """dZ/dln P [-] of a root z of the cubic in Z at fixed T, by implicit differentiation.

    A = aP/(RT)^2 and B = bP/(RT) are proportional to P, so the coefficients' derivatives
    in ln P are polynomials in A and B; u = delta1 + delta2, w = delta1 delta2. The fast
    path's last step in ln P is at most 1e-9, so Z + rate * step is the root at the new
    pressure to about 1e-18 (the neglected term is of second order in the step).
    Compiled twin: :func:`thermo_roots._accel_kernels.root_rate`.

    References
    ----------
    Michelsen, M. L. & Mollerup, J. M. (2007), Thermodynamic Models: Fundamentals and
    Computational Aspects, 2nd ed., ch. 3 (the cubic in Z with A and B).
    """
    df = (3.0 * z + 2.0 * c2) * z + c1
    dfl = ((u - 1.0) * B * z + (A + 2.0 * w * B * B - u * B * (1.0 + 2.0 * B))) * z - B * (2.0 * A + w * B * (2.0 + 3.0 * B))
    return -dfl / df


def _table_roots(model, T, P, rl, zv, steps, tol):
    """The saturated liquid and vapor roots in Z [-] at (T, P), refined from the table.

    Each start (Z_L = B rl, Z_V = zv) is refined by Newton's method on the cubic
    (:func:`_refine_root`). The pair is kept only if it is the outer pair of three
    genuine roots: both steps came down to ``tol`` of the root, the third root from the
    sum of the roots (-c2) lies strictly between them, Z_L > B, and the cubic rises at
    both (its slope is positive at its outer roots, where dP/dv < 0, and negative at the
    middle one). Two starts that ran to the same root, to the middle root or nowhere fail.
    Compiled twin: :func:`thermo_roots._accel_kernels.table_roots`.

    Returns
    -------
    zl, zv : numpy.ndarray
        The refined roots [-] (meaningless where good is False).
    good : numpy.ndarray
        True where the pair passed the check.

    References
    ----------
    Press, W. H. et al. (2007), Numerical Recipes, 3rd ed., sections 5.6 (sum of the roots
    of a cubic) and 9.5 (Newton's method on a polynomial).
    """
    c2, c1, c0, B = model.cubic_coefficients(T, P)
    zl, dl = _refine_root(B * rl, c2, c1, c0, steps, tol)
    zv, dv = _refine_root(zv, c2, c1, c0, steps, tol)
    zm = -c2 - zl - zv
    with np.errstate(invalid="ignore"):
        good = (dl > 0.0) & (dv > 0.0) & (zl > B) & (zm > zl) & (zv > zm)   # NaN fails
    return zl, zv, good


def _refine_root(z, c2, c1, c0, steps, tol):
    """Newton's method on Z^3 + c2 Z^2 + c1 Z + c0 from z, at most ``steps`` steps.

    Returns the root and the cubic's slope at the point of the last step, once a step is
    at most tol |z| (Newton's error after it is of order (tol z)^2 times the root's
    separation over its size, at rounding for tol = 1e-11); NaN and 0 where no step came
    down so far. Compiled twin: :func:`thermo_roots._accel_kernels.refine_root`.
    """
    z = np.array(z, dtype=float)
    slope = np.zeros(z.shape)
    active = np.ones(z.shape, bool)
    with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
        for _ in range(steps):
            df = (3.0 * z + 2.0 * c2) * z + c1
            dz = (((z + c2) * z + c1) * z + c0) / df
            z = np.where(active, z - dz, z)
            slope = np.where(active, df, slope)
            active &= ~(np.abs(dz) <= tol * np.abs(z))
    return np.where(active, np.nan, z), np.where(active, 0.0, slope)


