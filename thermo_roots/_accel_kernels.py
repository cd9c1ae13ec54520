"""The compiled loops of :mod:`thermo_roots._accel`; importing this module needs numba.

Kept in a module of their own, at module level, so that numba's on-disk cache
(``cache=True``) finds them again in the next process.
"""

from __future__ import annotations

import functools
import hashlib
import types

import numba
import numpy as np

from . import ideal_gas, models, properties
from .models import R

jit = functools.partial(numba.njit, cache=True, nogil=True, error_model="numpy")


# --------------------------------------------------------------------------- shared formulas
# The caloric loop below does not restate a formula: it calls the functions the numpy path
# calls (each module's ``FORMULAS``), compiled here. Each is rebuilt from its own code
# object with a namespace in which the other formulas of its module are their compiled
# twins, so one source serves both paths.

def _compile_formulas(module):
    """{name: compiled twin} of the functions named in ``module.FORMULAS``."""
    namespace = dict(vars(module))
    for name in module.FORMULAS:
        f = getattr(module, name)
        twin = types.FunctionType(f.__code__, namespace, name, f.__defaults__, f.__closure__)
        namespace[name] = jit(twin)
    return {name: namespace[name] for name in module.FORMULAS}


def _fingerprint(*modules):
    """A number that changes when any shared formula's code changes. The caloric loop holds it
    in its closure, and numba keys its disk cache on the closure, so an edited formula is
    never served from a stale cache of the loop that inlines it."""
    digest = hashlib.sha256()
    for module in modules:
        for name in module.FORMULAS:
            code = getattr(module, name).__code__
            digest.update(code.co_code)
            digest.update(repr(code.co_consts).encode())
            digest.update(repr(code.co_names).encode())
    return int(digest.hexdigest()[:15], 16)


_ideal = _compile_formulas(ideal_gas)
_cubic = _compile_formulas(models)
_caloric = _compile_formulas(properties)
ideal_molar = _ideal["ideal_molar"]
planck_einstein_term = _ideal["_planck_einstein_term"]
alpha_parts = _cubic["alpha_parts"]
cubic_residual = _cubic["cubic_residual"]
cubic_ln_phi = _cubic["cubic_ln_phi"]
cubic_dP_dv_at = _cubic["cubic_dP_dv_at"]
cubic_z_coefficients = _cubic["cubic_z_coefficients"]
cubic_z_root_rate = _cubic["cubic_z_root_rate"]
cubic_fugacity_gap_z = _cubic["cubic_fugacity_gap_z"]
gas_constant_shift = _caloric["gas_constant_shift"]
caloric_from_helmholtz = _caloric["caloric_from_helmholtz"]


def _make_caloric_loop(fingerprint):
    def caloric_loop(T_in, v_in, P_in, given_P, cubic, planck, logs, R_ideal, dR, R_model, M, out):
        """(P, h, s, u, g, cp, cv, w, mu_jt, kappa_T) of each state into the ten rows of out
        (row 0 is P_in itself when given_P): the numpy path of properties.caloric (ideal part,
        gas-constant shift, residual bundle, the relations) state by state, with the same
        formula functions.

        The rows of ``logs`` hold what needs exp or log: tau, the tau part A, A_t, A_tt without
        the Planck-Einstein terms (ideal_gas.tau_part_without_planck_einstein), ln delta and
        ln T (ideal_gas.ideal_logs), ln(1 - v_min/v) and ln(e1/e2) (models.cubic_repulsion,
        cubic_log_ratio), then y and ln g of each Planck-Einstein term, row k of ``planck``
        (ideal_gas._planck_einstein_exp). They come from numpy, whose vectorized exp and log
        cost a fraction of a scalar call here; this loop then runs on arithmetic, divisions
        and square roots alone, without temporaries.

        The Planck-Einstein terms are added into rows 1-3 first, one term over all states at
        a time (in the order ideal_gas.tau_part adds them, so the sums are the same to the
        bit): that loop has no branch and is vectorized by the compiler, where adding them
        inside the per-state loop kept the whole loop scalar (about 20 % of the loop's time).
        Rows 1-3 of ``logs`` are overwritten (the caller refills them for the next chunk)."""
        if fingerprint < 0:   # never: keeps the fingerprint in the closure (the cache key)
            R_model = np.nan
        a_c, b, c, v_min, d1, d2 = cubic.a_c, cubic.b, cubic.c, cubic.v_min, cubic.delta1, cubic.delta2
        kind, Tc, slope = cubic.alpha_kind, cubic.Tc, cubic.slope
        n = T_in.size
        for k in range(planck.shape[0]):
            pn, theta, pc, pd = planck[k, 0], planck[k, 1], planck[k, 2], planck[k, 3]
            for i in range(n):
                x, x_t, x_tt = planck_einstein_term(pn, theta, pc, pd, logs[8 + 2 * k, i], logs[9 + 2 * k, i])
                logs[1, i] += x
                logs[2, i] += x_t
                logs[3, i] += x_tt
        shift = dR != 0.0
        for i in range(n):
            T, v, tau = T_in[i], v_in[i], logs[0, i]
            ln_delta, ln_T = logs[4, i], logs[5, i]
            a0, a0_T, a0_TT, a0_v, a0_vv, a0_Tv = ideal_molar(R_ideal, T, v, tau, ln_delta,
                                                              logs[1, i], logs[2, i], logs[3, i])
            if shift:
                s0, s1, s2, s3, s4, s5 = gas_constant_shift(dR, T, v, ln_delta, ln_T)
                a0, a0_T, a0_TT = a0 + s0, a0_T + s1, a0_TT + s2
                a0_v, a0_vv, a0_Tv = a0_v + s3, a0_vv + s4, a0_Tv + s5
            alpha, dalpha, d2alpha = alpha_parts(kind, T, Tc, slope)
            r0, r1, r2, r3, r4, r5 = cubic_residual(T, v, R_model, a_c * alpha, a_c * dalpha, a_c * d2alpha,
                                                    b, c, v_min, d1, d2, logs[6, i], logs[7, i])
            a_v = a0_v + r3
            P = P_in[i] if given_P else -a_v
            p0, p1, p2, p3, p4, p5, p6, p7, p8, p9 = caloric_from_helmholtz(
                T, v, P, M, a0 + r0, a0_T + r1, a0_TT + r2, a_v, a0_vv + r4, a0_Tv + r5)
            out[0, i], out[1, i], out[2, i], out[3, i], out[4, i] = p0, p1, p2, p3, p4
            out[5, i], out[6, i], out[7, i], out[8, i], out[9, i] = p5, p6, p7, p8, p9

    return jit(caloric_loop)


caloric_loop = _make_caloric_loop(_fingerprint(ideal_gas, models, properties))

_SIXTH = 1.0 / 6.0


# --------------------------------------------------------------------------- root finding
# The cubic's roots in Z (closed form, guarded polish, deflation, sorting, Z > B), the
# corresponding-states start and the table roots' Newton refinement: numerics, not model
# formulas, with the data branches a loop takes one state at a time. Their numpy twins
# (inversion/cubic.py, inversion/saturation/fast.py and table.py) select with np.where;
# tests/test_performance_paths.py and tests/test_kernels_shared.py hold the pairs together.

@jit
def polish(z, c2, c1, c0):
    f = ((z + c2) * z + c1) * z + c0
    df = (3.0 * z + 2.0 * c2) * z + c1
    z_new = z - f / df
    f_new = ((z_new + c2) * z_new + c1) * z_new + c0
    if np.isfinite(z_new) and abs(f_new) < abs(f):
        return z_new
    return z


@jit
def one_real_root(c2, c1, c0):
    shift = c2 / 3.0
    p = c1 - c2 * shift
    q = (2.0 * shift * shift - c1) * shift + c0
    disc = (q * q) / 4.0 + (p * p * p) / 27.0
    if disc > 0.0:
        u = np.cbrt(-q / 2.0 - np.copysign(np.sqrt(disc), q))
        root = u - p / (3.0 * u) if u != 0.0 else 0.0
    else:
        pt = p if p < 0.0 else 0.0
        m = 2.0 * np.sqrt(-pt / 3.0)
        cos_arg = 3.0 * q / (pt * m) if m > 0.0 else 0.0
        cos_arg = -1.0 if cos_arg < -1.0 else (1.0 if cos_arg > 1.0 else cos_arg)
        root = m * np.cos(np.arccos(cos_arg) / 3.0)
    return root - shift


@jit
def z_roots(c2, c1, c0, B):
    """The roots Z > B of the cubic, ascending, NaN-padded: cubic.py's _sorted_roots and the
    Z > B selection of its _volume_columns, as one pass."""
    nan = np.nan
    # one root in closed form, polished twice; the others from the deflated quadratic
    z0 = one_real_root(c2, c1, c0)
    z1 = polish(z0, c2, c1, c0)
    if z1 != z0:   # a refused step is refused again: a second polish only after a taken one
        z1 = polish(z1, c2, c1, c0)
    size = abs(z1)
    if size * size * size >= abs(c0):
        safe = z1 if z1 != 0.0 else 1.0
        g0 = -c0 / safe
        g1 = (g0 - c1) / safe
    else:
        g1 = c2 + z1
        g0 = c1 + z1 * g1
    disc = g1 * g1 - 4.0 * g0
    if disc >= 0.0:
        q = -0.5 * (g1 + np.copysign(np.sqrt(disc), g1))
        z3 = g0 / q if q != 0.0 else 0.0
        z2, z3 = polish(q, c2, c1, c0), polish(z3, c2, c1, c0)
        lo, hi = (z2, z3) if z2 <= z3 else (z3, z2)
        s0 = lo if lo < z1 else z1
        s1 = lo if lo > (hi if hi < z1 else z1) else (hi if hi < z1 else z1)
        s2 = hi if hi > z1 else z1
    else:
        s0, s1, s2 = z1, nan, nan
    # keep Z > B: the left-out roots are the first ones of the sorted three
    left_out = (s0 <= B) + (s1 <= B) + (s2 <= B)
    if left_out == 0:
        return s0, s1, s2
    if left_out == 1:
        return s1, s2, nan
    if left_out == 2:
        return s2, nan, nan
    return nan, nan, nan


def _make_stable_roots_loop(fingerprint):
    def stable_roots_loop(T_in, P_in, cubic, roots, stable, v_out, phase):
        """Roots v > b, the stable one and its phase code of each (T, P), as
        inversion.cubic.stable_roots_numpy: alpha, the cubic in Z, ln phi and dP/dv are the
        shared formulas of thermo_roots.models (alpha_parts, cubic_z_coefficients,
        cubic_ln_phi, cubic_dP_dv_at), compiled; ``cubic`` is a models.CubicParameters."""
        if fingerprint < 0:   # never: keeps the fingerprint in the closure (the cache key)
            return
        kind, Tc, k, a_c, b, c = cubic.alpha_kind, cubic.Tc, cubic.slope, cubic.a_c, cubic.b, cubic.c
        v_min, d1, d2, Pc, v_c = cubic.v_min, cubic.delta1, cubic.delta2, cubic.Pc, cubic.v_c
        u, w = d1 + d2, d1 * d2
        for i in range(T_in.size):
            T, P = T_in[i], P_in[i]
            a = a_c * alpha_parts(kind, T, Tc, k)[0]
            RT = R * T
            c2, c1, c0, B = cubic_z_coefficients(a * P / (RT * RT), b * P / RT, u, w)
            r0, r1, r2 = z_roots(c2, c1, c0, B)
            scale = RT / P
            r0, r1, r2 = r0 * scale - c, r1 * scale - c, r2 * scale - c
            roots[i, 0], roots[i, 1], roots[i, 2] = r0, r1, r2
            pick, v = 0, r0
            if np.isfinite(r1):   # several roots: the usable one of lowest ln phi
                best = np.inf
                for j in range(3):
                    vk = r0 if j == 0 else (r1 if j == 1 else r2)
                    if not np.isfinite(vk):
                        continue
                    lnphi = cubic_ln_phi(T, vk, P, R, a, b, c, v_min, d1, d2)
                    dP_dv = cubic_dP_dv_at(T, vk, R, a, b, c, v_min, d1, d2)
                    if not (dP_dv > 0.0) and np.isfinite(lnphi) and lnphi < best:
                        best, pick, v = lnphi, j, vk
            stable[i] = pick
            v_out[i] = v
            if T >= Tc:
                phase[i] = 2 if P >= Pc else 1
            else:
                phase[i] = 0 if v < v_c else 1

    return jit(stable_roots_loop)


@jit
def start_values(Tr, alpha, x_first, inv_h, shift, table, volumes):
    """ln(P/Pc), v_L/b and Z_V from the corresponding-states tables, as saturation._start_values
    (NaN outside): one set of four-point Lagrange weights serves the three columns."""
    t = (np.sqrt(alpha / Tr - shift) - x_first) * inv_h
    n = table.size
    if not (t >= 0.0 and t <= n - 1.0):
        return np.nan, np.nan, np.nan
    j = int(t) - 1
    j = 0 if j < 0 else (n - 4 if j > n - 4 else j)
    u = t - j
    w0 = -(u - 1.0) * (u - 2.0) * (u - 3.0) * _SIXTH
    w1 = u * (u - 2.0) * (u - 3.0) * 0.5
    w2 = -u * (u - 1.0) * (u - 3.0) * 0.5
    w3 = u * (u - 1.0) * (u - 2.0) * _SIXTH
    ln_pr = w0 * table[j] + w1 * table[j + 1] + w2 * table[j + 2] + w3 * table[j + 3] + np.log(alpha)
    rl = w0 * volumes[j, 0] + w1 * volumes[j + 1, 0] + w2 * volumes[j + 2, 0] + w3 * volumes[j + 3, 0]
    zv = w0 * volumes[j, 1] + w1 * volumes[j + 1, 1] + w2 * volumes[j + 2, 1] + w3 * volumes[j + 3, 1]
    return ln_pr, rl, zv


@jit
def refine_root(z, c2, c1, c0, steps, tol):
    """Newton on the cubic in Z from z, as saturation._refine_root: (root, slope) once a step
    is at most tol |z|, (NaN, 0) if none is within the steps."""
    for _ in range(steps):
        df = (3.0 * z + 2.0 * c2) * z + c1
        dz = (((z + c2) * z + c1) * z + c0) / df
        z = z - dz
        if abs(dz) <= tol * abs(z):
            return z, df
    return np.nan, 0.0


@jit
def table_roots(zl, zv, c2, c1, c0, B, steps, tol):
    """The liquid and vapor roots refined from the table's starts, and whether they pass
    the check of saturation._table_roots (B < Z_L < Z_middle < Z_V, rising cubic at both)."""
    zl, dl = refine_root(zl, c2, c1, c0, steps, tol)
    zv, dv = refine_root(zv, c2, c1, c0, steps, tol)
    zm = -c2 - zl - zv
    return zl, zv, dl > 0.0 and dv > 0.0 and zl > B and zm > zl and zv > zm


def _make_saturation_loop(fingerprint):
    def saturation_loop(T_in, cubic, start, table, volumes, settings, real_out, count_out, flag_out):
        """Bracketed Newton in ln P on ln phi_L - ln phi_V, as saturation._newton_saturation_numpy.

        ``cubic`` is a models.CubicParameters; alpha, the cubic in Z, the fugacity gap and the
        roots' slopes are the shared formulas of thermo_roots.models, compiled. Writes ln P, P,
        v_L, v_V to the rows of real_out, iterations and evaluations to those of count_out,
        finished and table-started to those of flag_out. Temperatures from fast_tr_max Tc on
        are left unsolved. Returns T's least and greatest value (both NaN if one T is NaN) and
        the number of temperatures not finished, so that the caller needs no other pass over
        the arrays."""
        if fingerprint < 0:   # never: keeps the fingerprint in the closure (the cache key)
            return np.nan, np.nan, 0
        kind, Tc, k, a_c, b, c = cubic.alpha_kind, cubic.Tc, cubic.slope, cubic.a_c, cubic.b, cubic.c
        d1, d2, Pc, v_c = cubic.delta1, cubic.delta2, cubic.Pc, cubic.v_c
        x_first, inv_h, shift = start
        ln_lowest, accept, narrow, maxiter, eps4, root_steps, root_tol, fast_tr_max = settings
        steps = int(root_steps)
        u, w = d1 + d2, d1 * d2
        lnPc = np.log(Pc)
        t_min, t_max, nan_seen, unfinished = np.inf, -np.inf, False, 0
        for i in range(T_in.size):
            T = T_in[i]
            t_min, t_max, nan_seen = min(t_min, T), max(t_max, T), nan_seen or T != T
            alpha = alpha_parts(kind, T, Tc, k)[0]
            a = a_c * alpha
            RT = R * T
            A_over_B = a / (b * RT)
            A_per_P, B_per_P = a / (RT * RT), b / RT   # A and B are proportional to P
            lo, hi = lnPc + ln_lowest, lnPc
            ln_pr, rl, zv_start = start_values(T / Tc, alpha, x_first, inv_h, shift, table, volumes)
            x = lnPc + ln_pr if T < fast_tr_max * Tc else np.nan
            ok, iters, evals, started = False, 0, 0, False
            P, zl, zv, step, rate_l, rate_v = np.nan, np.nan, np.nan, 0.0, 0.0, 0.0
            from_table = x > lo and x < hi   # the table's volumes belong to its own start only
            if not from_table and np.isfinite(x):   # NaN (outside the table) stays NaN
                x = lo + 0.5 * (hi - lo)
            if np.isfinite(x):
                for _ in range(int(maxiter)):
                    P = np.exp(x)
                    c2, c1, c0, B = cubic_z_coefficients(A_per_P * P, B_per_P * P, u, w)
                    if from_table:
                        from_table = False
                        r0, r2, started = table_roots(B * rl, zv_start, c2, c1, c0, B, steps, root_tol)
                        if not started:
                            r0, r1, r2 = z_roots(c2, c1, c0, B)
                    else:
                        r0, r1, r2 = z_roots(c2, c1, c0, B)
                    evals += 1
                    scale = RT / P
                    v0 = r0 * scale - c
                    if np.isfinite(r2):
                        if r2 * scale - c < narrow * v0:
                            break
                        gap = cubic_fugacity_gap_z(r0, r2, A_over_B, B, d1, d2)
                        step = -gap / (r0 - r2)
                        if gap > 0.0:
                            lo = x
                        elif gap < 0.0:
                            hi = x
                        iters += 1
                        if abs(step) <= accept:
                            zl, zv, ok = r0, r2, True
                            rate_l = cubic_z_root_rate(r0, c2, c1, A_per_P * P, B, u, w)
                            rate_v = cubic_z_root_rate(r2, c2, c1, A_per_P * P, B, u, w)
                            break
                        xn = x + step
                        if not (xn > lo and xn < hi):
                            xn = lo + 0.5 * (hi - lo)
                    else:
                        if v0 > v_c:
                            lo = x
                        else:
                            hi = x
                        iters += 1
                        xn = lo + 0.5 * (hi - lo)
                    if hi - lo <= eps4 * max(1.0, abs(x)):
                        break
                    x = xn
            vl, vv = np.nan, np.nan
            if ok:   # the last step taken, and the roots carried to its pressure along their slopes
                x = x + step
                P = P * (1.0 + step * (1.0 + 0.5 * step))
                zl, zv = zl + rate_l * step, zv + rate_v * step
                if zl > B_per_P * P and zv > zl:
                    scale = RT / P
                    vl, vv = zl * scale - c, zv * scale - c
                else:
                    ok = False
            real_out[0, i], real_out[1, i], real_out[2, i], real_out[3, i] = x, P, vl, vv
            count_out[0, i], count_out[1, i], flag_out[0, i], flag_out[1, i] = iters, evals, ok, started
            unfinished += not ok
        if nan_seen:
            t_min, t_max = np.nan, np.nan
        return t_min, t_max, unfinished

    return jit(saturation_loop)


# The (T, P) and saturation loops inline the formulas of models alone; each holds their
# fingerprint in its closure, as the caloric loop does.
stable_roots_loop = _make_stable_roots_loop(_fingerprint(models))
saturation_loop = _make_saturation_loop(_fingerprint(models))
