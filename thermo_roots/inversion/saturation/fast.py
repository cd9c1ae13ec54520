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
from ...models import R, cubic_attraction_gap, cubic_fugacity_gap_z, cubic_z_root_rate
from ...roots import RootResult
from ..cubic import _volume_columns
from .table import _TABLE_START, _start_tables, _start_values
from .window import _LNP_RTOL, _LOWEST_REDUCED_PRESSURE, _NARROW_DOME, _UNRESOLVED_GAP, _equal_area_gap

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



# The fugacity gap ln phi_L - ln phi_V from the two roots in Z (logarithms of the two phases
# merged, no P(T, v) formed, so it keeps its digits at the tiny liquid roots of very low
# pressures), the attraction term it shares with the vaporization enthalpy, and dZ/d ln P
# of a root: the model layer's formulas, whose compiled twins the saturation loop runs.
# ``tests/inversion/test_saturation_fast.py`` holds the gap to the difference of ln phi.
fugacity_gap_z = cubic_fugacity_gap_z
_attraction_gap = cubic_attraction_gap
_root_rate = cubic_z_root_rate


def _newton_saturation_numpy(model, T, start, table, volumes, settings):
    """The iteration of :func:`_newton_saturation` in numpy; the compiled twin is
    :func:`thermo_roots._accel_kernels.saturation_loop` (same steps, same order; this
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
            idx = idx[~(done | collapsed)]
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




# --------------------------------------------------------------------------- T from P

#: Reduced temperatures of the nodes of each model's own saturation line (uniform in Tc/T),
#: solved once per model by the fast path: they start the temperature iteration.
_LINE_TR = (0.25, FAST_TR_MAX)
_LINE_NODES = 48
#: A Newton step in y = Tc/T of at most this share of y is taken as the last one.
_ACCEPT_Y_STEP = 1e-10
#: The temperature iteration's results from this reduced temperature on go to the window
#: solver's gap in T (:func:`.window._window_saturation_temperature`): closer to Tc Newton's
#: error after the last accepted step (|g''/(2 g')| dy^2, g' vanishing like (1 - Tr)^0.5)
#: was seen to reach 1e-12 in T at 1 - Tr ~ 1e-7; up to here it agrees with the proven path
#: to 3e-15 (five cubics, six fluids, tests/inversion/test_saturation_by_pressure.py).
_T_ITERATION_TR_MAX = 1.0 - 1e-6
#: Iteration limit of the temperature iteration (bisection in ln y from the widest bracket
#: [1, 1e3] takes about 50).
_T_MAXITER = 80
#: The cold end of the temperature iteration's bracket, as Tc/T: Tr = 1e-3, far below the
#: model's floor (:data:`api.SATURATION_FLOOR`) for every cubic.
_Y_COLDEST = 1e3


def _saturation_line(model):
    """The model's own saturation line at a few nodes: (ln P [ln Pa], y = Tc/T [-]), both
    ascending in ln P, the critical point (ln Pc, 1) the last; solved once per model by
    :func:`_newton_saturation` and kept on the model (the nodes only start an iteration,
    so a node it did not finish is left out).
    """
    cached = model.__dict__.get("_saturation_line")
    if cached is None:
        y = np.linspace(1.0 / _LINE_TR[0], 1.0 / _LINE_TR[1], _LINE_NODES)   # cold to warm: ln P ascending
        P, *_ = _newton_saturation(model, model.fluid.Tc / y)
        keep = np.isfinite(P) & (P > 0.0)
        lnP, y = np.log(P[keep]), y[keep]
        lnP, y = np.append(lnP, np.log(model.fluid.Pc)), np.append(y, 1.0)
        if lnP.size < 3 or np.any(np.diff(lnP) <= 0.0):
            lnP, y = np.array([]), np.array([])
        for shared in (lnP, y):
            shared.setflags(write=False)
        cached = model.__dict__["_saturation_line"] = (lnP, y)
    return cached


def _temperature_start(line, lnP):
    """y = Tc/T [-] of the saturation line at ln P by linear interpolation in (ln P, Tc/T)
    (nearly a straight line, Clausius-Clapeyron), extrapolated along the coldest segment;
    NaN at and above the critical pressure."""
    nodes, y = line
    inner = np.interp(lnP, nodes, y)
    cold = y[0] + (lnP - nodes[0]) * (y[1] - y[0]) / (nodes[1] - nodes[0])
    start = np.where(lnP < nodes[0], cold, inner)
    with np.errstate(invalid="ignore"):
        return np.where(lnP < nodes[-1], start, np.nan)


def _node_bracket(line, lnP):
    """(lo, hi) of y = Tc/T [-] from the two nodes of the saturation line around each ln P.

    The nodes are saturation states of the model itself (to rounding), and ln Psat rises
    with T, so the saturation temperature at P lies between its neighbours' temperatures;
    each end is moved out by 1e-9 of itself. Below the coldest node the cold end is
    Tc/1000 (:data:`_Y_COLDEST`); y never goes below 1 (Tc).
    """
    nodes, y = line
    k = np.searchsorted(nodes, lnP)   # nodes[k - 1] < lnP <= nodes[k]
    inside = (k > 0) & (k < nodes.size)
    j = np.clip(k, 1, nodes.size - 1)
    lo = np.where(inside, np.maximum(y[j] * (1.0 - 1e-9), 1.0), 1.0)
    hi = np.where(inside, y[j - 1] * (1.0 + 1e-9), _Y_COLDEST)
    hi = np.where(k == 0, _Y_COLDEST, hi)
    lo = np.where(k == 0, y[0] * (1.0 - 1e-9), lo)
    return lo, hi


def _vaporization_enthalpy(zl, zv, A_over_B, B, T_dadT_over_a, delta1, delta2):
    """(h_V - h_L) / (R T) [-] of the untranslated cubic from its roots Z_L, Z_V at one (T, P).

    From h_res/(RT) = Z - 1 - (A/B)(1 - T a'/a) B I(Z) (the generalized cubic's residual
    enthalpy, written in Z; the attraction term is :func:`_attraction_gap`'s). A volume
    translation shifts both phases' h_res by the same c P, so the difference is the
    translated model's too. It is also the slope of the fugacity gap at fixed P:
    d(ln phi_L - ln phi_V)/dT = (h_V - h_L)/(R T^2), since (d ln phi/dT)_P = -h_res/(R T^2).

    References
    ----------
    Michelsen, M. L. & Mollerup, J. M. (2007), Thermodynamic Models: Fundamentals and
    Computational Aspects, 2nd ed., ch. 2 and 3 (residual enthalpy; d ln phi/dT at fixed P).
    """
    return (zv - zl) + A_over_B * (1.0 - T_dadT_over_a) * _attraction_gap(zl, zv, B, delta1, delta2)


def _newton_saturation_temperature(model, P):
    """Saturation temperature by a bracketed Newton iteration in y = Tc/T at fixed P.

    The fugacity gap g = ln phi_L - ln phi_V at fixed P rises with T at the slope
    (h_V - h_L)/(R T^2) > 0 (:func:`_vaporization_enthalpy`) wherever the cubic has three
    roots; where it has one, the lone root's side of v_c says which side of the saturation
    temperature T lies on (a lone liquid root: below it; a lone vapor root: above it).
    One cubic solve per step, so T_sat(P) costs about what Psat(T) does, instead of one
    saturation-pressure solve per trial temperature. In y, ln Psat is nearly linear
    (Clausius-Clapeyron), so Newton's steps are good from the start, which comes from the
    model's own saturation line at a few nodes (:func:`_saturation_line`), and so does the
    bracket: the two nodes around P (:func:`_node_bracket`; y in [1, 1e3], Tc down to
    Tc/1000, without a line). It shrinks at every evaluation; the step is Newton's where it
    stays inside, a bisection in ln y otherwise. A step of at most
    :data:`_ACCEPT_Y_STEP` y is taken as the last one and the roots are solved at the
    final (T, P).

    Where the phases are too alike for the ln phi difference (v_V < 1.5 v_L) the gap is
    the window solver's equal-area integral (:func:`.window._equal_area_gap`), as there.
    Not finished, for the window solver's gap in T and then the proven path (Psat(T)
    inverted) to take over: an end at or above Tr = :data:`_T_ITERATION_TR_MAX`, the
    iteration limit, a collapsed bracket, a final (T, P) without three roots.

    Parameters
    ----------
    model : CubicModel
    P : numpy.ndarray
        1-D pressures [Pa], 0 < P < Pc.

    Returns
    -------
    T, v_l, v_v : numpy.ndarray
        [K], [m^3/mol]; NaN where not finished.
    result : RootResult
        Root T [K] per pressure; converged False where not finished.
    bracket : tuple of numpy.ndarray
        (cold, warm) [K]: the last bracket of the saturation temperature at each P, from
        the sign rule (the nodes' bracket where nothing was learnt).

    References
    ----------
    Michelsen, M. L. & Mollerup, J. M. (2007), Thermodynamic Models: Fundamentals and
    Computational Aspects, 2nd ed., ch. 11 (equal fugacity).
    Press, W. H. et al. (2007), Numerical Recipes, 3rd ed., section 9.4 (Newton's method
    safeguarded by bisection).
    """
    n, c, d1, d2, Tc = P.size, model.c, model.delta1, model.delta2, model.fluid.Tc
    line = _saturation_line(model)
    lnP = np.log(P)
    y = _temperature_start(line, lnP) if line[0].size else np.full(n, np.nan)
    lo, hi = _node_bracket(line, lnP) if line[0].size else (np.ones(n), np.full(n, _Y_COLDEST))
    y = np.where(np.isnan(y) | ((y > lo) & (y < hi)), y, np.sqrt(lo * hi))
    ok, iterations, evaluations = np.zeros(n, bool), np.zeros(n, np.int64), np.zeros(n, np.int64)
    idx = np.flatnonzero(np.isfinite(y))
    y_out = np.full(n, np.nan)
    with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
        for _ in range(_T_MAXITER):
            if idx.size == 0:
                break
            yi, lo_i, hi_i, Pi = y[idx], lo[idx], hi[idx], P[idx]
            T = Tc / yi
            a, da = model.attraction(T)
            v0, _, v2 = _volume_columns(model, T, Pi)
            to_z = Pi / (R * T)
            zl, zv, B, A_over_B = (v0 + c) * to_z, (v2 + c) * to_z, model.b * to_z, a / (model.b * (R * T))
            evaluations[idx] += 1
            three = np.isfinite(v2)
            gap = fugacity_gap_z(zl, zv, A_over_B, B, d1, d2)
            narrow = three & (v2 < _NARROW_DOME * v0)   # phases too alike for the ln phi difference:
            if narrow.any():                             # the window solver's equal-area integral
                gap[narrow] = _equal_area_gap(model, T[narrow], Pi[narrow], v0[narrow], v2[narrow])
            step = yi * gap / _vaporization_enthalpy(zl, zv, A_over_B, B, T * da / a, d1, d2)
            warm = np.where(three, gap > 0.0, v0 > model.v_c)   # T above the saturation temperature
            cold = np.where(three, gap < 0.0, ~(v0 > model.v_c))
            lo_i, hi_i = np.where(warm, yi, lo_i), np.where(cold, yi, hi_i)
            iterations[idx] += 1
            done = three & (np.abs(step) <= _ACCEPT_Y_STEP * yi)
            yn = yi + step
            newton = three & (yn > lo_i) & (yn < hi_i)
            yn = np.where(newton, yn, np.sqrt(lo_i * hi_i))
            collapsed = hi_i - lo_i <= _LNP_RTOL * yi
            y[idx] = np.where(done | collapsed, yi, yn)
            lo[idx], hi[idx] = lo_i, hi_i
            fin = idx[done]
            ok[fin] = True
            y_out[fin] = yi[done] + step[done]
            idx = idx[~(done | collapsed)]
    T_out, v_l, v_v = Tc / y_out, np.full(n, np.nan), np.full(n, np.nan)
    fin = np.flatnonzero(ok)
    if fin.size:   # the roots at the final (T, P): three of them, not too close to Tc
        v0, _, v2 = _volume_columns(model, T_out[fin], P[fin])
        good = np.isfinite(v2) & (v2 > v0) & (T_out[fin] < _T_ITERATION_TR_MAX * Tc)
        evaluations[fin] += 1
        ok[fin] = good
        v_l[fin], v_v[fin] = np.where(good, v0, np.nan), np.where(good, v2, np.nan)
    T_out = np.where(ok, T_out, np.nan)
    status = _all_converged(n) if ok.all() else np.where(ok, "converged", "iteration limit")
    bracket = (Tc / hi, Tc / lo)   # where the iteration stopped: the proven path's start
    return T_out, v_l, v_v, RootResult(T_out, ok, status, iterations, evaluations, None, "newton in Tc/T"), bracket
