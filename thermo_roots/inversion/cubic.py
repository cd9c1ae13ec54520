"""All real volume roots of a cubic equation of state at given (T, P), vectorized.

The cubic in Z is solved in closed form (Cardano's formula for one real root, the
trigonometric form for three) for one root, polished by guarded Newton steps on the
polynomial; the other two come from the deflated quadratic, polished too; then the roots
with v > b are kept, sorted. Most states have one real root, so the trigonometric form,
the quadratic's roots and the sorting are computed only for the states that need them.

Speed. Large inputs are cut into chunks of :data:`CHUNK` states, so that the two dozen
temporary arrays of the closed form stay in the processor's cache and the memory a call
needs does not grow with the input beyond its results. Roots are kept as three 1-D
columns (a sorting network, not ``np.sort``), and the Gibbs-energy comparison that picks
the stable root is only made where the cubic has more than one root v > b. With the
optional compiled accelerator (:mod:`thermo_roots._accel`, needs numba) the same
arithmetic runs as one loop; :func:`stable_roots` chooses between the two.
"""

from __future__ import annotations

import numpy as np

from ..models import R
from .phases import LIQUID, SUPERCRITICAL, TWO_PHASE, VAPOR, phase_codes  # noqa: F401 (old import path)

#: States per chunk of the numpy path: 2^14 keeps its temporaries within a 2 MB cache
#: and halves the per-call overhead of 2^13 (6 % less time for 10^6 CO2 states, measured).
CHUNK = 16384
#: Below this many states the compiled accelerator is not worth its first-call import.
ACCEL_MIN_SIZE = 2048


def cubic_real_roots(c2, c1, c0):
    """Real roots of Z^3 + c2 Z^2 + c1 Z + c0 = 0, shape (..., 3), ascending, NaN-padded.

    One real root comes from the closed form (Cardano where the discriminant says one real
    root, the largest trigonometric root otherwise) and is polished; the other two come
    from the deflated quadratic. Deflating this way keeps the tiny liquid roots of very
    low pressures accurate, and lets the well-conditioned quadratic, not the discriminant
    of the cubic, decide whether they exist.

    References
    ----------
    Press, W. H. et al. (2007), Numerical Recipes, 3rd ed., Cambridge, sections 5.6
    (cubic and quadratic roots without cancellation) and 9.5 (deflation).
    """
    c2, c1, c0 = np.broadcast_arrays(*(np.asarray(c, dtype=float) for c in (c2, c1, c0)))
    shape = c2.shape
    columns = _sorted_roots(c2.ravel(), c1.ravel(), c0.ravel())
    return np.stack(columns, axis=-1).reshape(shape + (3,))


def _sorted_roots(c2, c1, c0):
    """The three columns of :func:`cubic_real_roots`: (smallest, middle, largest), NaN-padded.

    Most states of a cubic have one real root: the deflated quadratic's discriminant is
    computed for all, its roots, their polish and the sorting only where it is >= 0.
    Coefficients so large that the closed form overflows (|c0| beyond about 1e150) are
    solved for Y = Z / 2^k with a power of two 2^k of the roots' size, exactly rescaled.
    """
    z1, overflow = _one_real_root(c2, c1, c0)
    if overflow.size:
        return _rescaled_roots(c2, c1, c0, overflow, z1)
    z1, f = _newton_step(z1, _cubic_at(z1, c2, c1, c0), c2, c1, c0)
    z1 = _newton_step(z1, f, c2, c1, c0, residual=False)   # starts from the first's residual
    g1, g0 = _deflate(z1, c2, c1, c0)
    disc = g1 * g1
    disc -= 4.0 * g0
    more = np.flatnonzero(disc >= 0.0)   # NaN where disc < 0 (or NaN): no more real roots
    nan = np.full(z1.shape, np.nan)
    s0, s1, s2 = z1, nan, nan.copy()
    if more.size:
        k2, k1, k0, g1, g0, zk = c2[more], c1[more], c0[more], g1[more], g0[more], z1[more]
        with np.errstate(invalid="ignore", divide="ignore"):
            q = -0.5 * (g1 + np.copysign(np.sqrt(disc[more]), g1))
            z3 = np.where(q != 0.0, g0 / q, 0.0)
        z2, z3 = _polish(q, k2, k1, k0), _polish(z3, k2, k1, k0)
        # Sorting network of the three roots.
        lo, hi = np.minimum(z2, z3), np.maximum(z2, z3)
        s0[more] = np.fmin(lo, zk)   # zk is a copy, so z1 (= s0) may be overwritten
        s1[more] = np.maximum(lo, np.minimum(hi, zk))
        s2[more] = np.maximum(hi, zk)
    return s0, s1, s2


def _rescaled_roots(c2, c1, c0, overflow, z1):
    """:func:`_sorted_roots` where the closed form overflowed at the indices ``overflow``:
    the cubic in Y = Z / 2^k, 2^k about max(|c2|, |c1|^(1/2), |c0|^(1/3)), scaled exactly."""
    k2, k1, k0 = c2[overflow], c1[overflow], c0[overflow]
    size = np.maximum(np.maximum(np.abs(k2), np.sqrt(np.abs(k1))), np.cbrt(np.abs(k0)))
    k = np.frexp(size)[1]
    scaled = _sorted_roots(np.ldexp(k2, -k), np.ldexp(k1, -2 * k), np.ldexp(k0, -3 * k))
    rest = np.ones(z1.shape, bool)
    rest[overflow] = False
    keep = np.flatnonzero(rest)
    columns = [np.full(z1.shape, np.nan) for _ in range(3)]
    for column, part, y in zip(columns, _sorted_roots(c2[keep], c1[keep], c0[keep]), scaled):
        column[keep] = part
        column[overflow] = np.ldexp(y, k)
    return tuple(columns)


def _one_real_root(c2, c1, c0):
    """One real root (Cardano's where the discriminant is > 0, else the largest trigonometric
    one) and the indices where finite coefficients overflowed the discriminant."""
    with np.errstate(invalid="ignore", over="ignore"):
        shift = c2 / 3.0
        p = c1 - c2 * shift                       # depressed cubic t^3 + p t + q, Z = t - c2/3
        q = (2.0 * shift * shift - c1) * shift + c0
        disc = (q * q) / 4.0 + (p * p * p) / 27.0
        overflow = np.flatnonzero(~np.isfinite(disc))   # NaN coefficients, or too large ones
        if overflow.size:
            finite = np.isfinite(c2[overflow]) & np.isfinite(c1[overflow]) & np.isfinite(c0[overflow])
            overflow = overflow[finite]
    with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
        # Cardano without cancellation. Where disc > 0 the cube root's argument is at least
        # sqrt(disc) in size, so u != 0 there; elsewhere the trigonometric root replaces it.
        u = -0.5 * q
        u -= np.copysign(np.sqrt(np.maximum(disc, 0.0)), q)
        np.cbrt(u, out=u)
        z = u - p / (3.0 * u)
        three = np.flatnonzero(~(disc > 0.0))   # three real roots (or a NaN discriminant)
        if three.size:
            pt = np.minimum(p[three], 0.0)
            m = 2.0 * np.sqrt(-pt / 3.0)
            cos_arg = np.where(m > 0.0, 3.0 * q[three] / (pt * m), 0.0)
            z[three] = m * np.cos(np.arccos(np.clip(cos_arg, -1.0, 1.0)) / 3.0)   # the largest
    z -= shift
    return z, overflow


def _deflate(z1, c2, c1, c0):
    """Quadratic Z^2 + g1 Z + g0 left after dividing out the root z1.

    Backward deflation (from the constant term) when z1 is the larger root, forward
    deflation otherwise: each is the stable direction for that case.
    """
    with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
        g1 = c2 + z1                       # forward
        g0 = z1 * g1
        g0 += c1
        size = np.abs(z1)
        large = size * size * size >= np.abs(c0)
        safe = np.where(z1 != 0.0, z1, 1.0)
        g0_back = -c0 / safe               # backward
        g1_back = (g0_back - c1) / safe
    # np.where, not a masked copy: branch-free, it costs the same for any mix of the two
    return np.where(large, g1_back, g1), np.where(large, g0_back, g0)


def _cubic_at(z, c2, c1, c0):
    """Z^3 + c2 Z^2 + c1 Z + c0 by Horner's rule (a new array)."""
    with np.errstate(invalid="ignore", over="ignore"):
        f = z + c2
        f *= z
        f += c1
        f *= z
        f += c0
    return f


def _newton_step(z, f, c2, c1, c0, residual=True):
    """One Newton step on the polynomial, kept only where it lowers |residual|: (z, f) after it
    (z alone with ``residual=False``).

    ``f`` is the residual at ``z``; the residual returned is the one at the z returned, so a
    second step needs no new evaluation at its start. A step to a non-finite z has a
    non-finite residual and is never kept.
    """
    with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
        df = 3.0 * z
        df += 2.0 * c2
        df *= z
        df += c1
        np.divide(f, df, out=df)
        z_new = z - df
        f_new = _cubic_at(z_new, c2, c1, c0)
        better = np.abs(f_new, out=df) < np.abs(f)
    z = np.where(better, z_new, z)
    return (z, np.where(better, f_new, f)) if residual else z


def _polish(z, c2, c1, c0):
    """One Newton step on the polynomial, kept only where it lowers |residual| (a new array)."""
    return _newton_step(z, _cubic_at(z, c2, c1, c0), c2, c1, c0, residual=False)


def volume_roots(model, T, P):
    """Every real molar-volume root v > b of the model at (T, P).

    Parameters
    ----------
    model : CubicModel
    T : float or array_like
        Temperature [K].
    P : float or array_like
        Pressure [Pa].

    Returns
    -------
    numpy.ndarray
        Shape (..., 3) [m^3/mol], ascending, NaN where a root does not exist.
    """
    T, P = np.broadcast_arrays(np.asarray(T, dtype=float), np.asarray(P, dtype=float))
    shape = T.shape
    T, P = T.ravel(), P.ravel()
    out = np.empty((T.size, 3))
    for s in _chunks(T.size):
        _volume_columns(model, T[s], P[s], out=out[s])
    return out.reshape(shape + (3,))


def _chunks(n):
    return [slice(i, min(i + CHUNK, n)) for i in range(0, max(n, 1), CHUNK)] if n else []


def _volume_columns(model, T, P, out=None):
    """(v0, v1, v2): the roots v > b of 1-D (T, P), ascending, NaN-padded [m^3/mol].

    With ``out`` (an (n, 3) array) the columns are written into it and its columns returned.
    """
    c2, c1, c0, B = model.cubic_coefficients(T, P)
    s = list(_sorted_roots(c2, c1, c0))
    # Keep Z > B. The columns are sorted, so the roots left out are the first few:
    # shift the rest to the front, one place per root left out.
    for _ in range(3):
        drop = s[0] <= B
        if not drop.any():
            break
        s = [np.where(drop, s[1], s[0]), np.where(drop, s[2], s[1]), np.where(drop, np.nan, s[2])]
    scale = R * T / P
    c = model.c
    if out is None:   # three contiguous columns of their own
        columns = tuple(np.empty(T.shape) for _ in range(3))
    else:
        columns = tuple(out[:, k] for k in range(3))
    for z, column in zip(s, columns):
        np.multiply(z, scale, out=column)
        if c != 0.0:
            column -= c
    return columns


def stable_roots(model, T, P):
    """Roots, the stable root and its phase at 1-D arrays (T, P), as compact codes.

    Parameters
    ----------
    model : CubicModel
    T, P : numpy.ndarray
        1-D, same length: temperature [K] and pressure [Pa].

    Returns
    -------
    roots : numpy.ndarray
        (n, 3) volume roots v > b [m^3/mol], ascending, NaN-padded (as :func:`volume_roots`).
    stable : numpy.ndarray of int8
        Index of the root of lowest Gibbs energy (lowest ln phi) among those with
        dP/dv <= 0; 0 where there is only one root.
    v : numpy.ndarray
        The stable root [m^3/mol].
    phase : numpy.ndarray of int8
        Phase code of the stable root (:data:`LIQUID`, :data:`VAPOR`, :data:`SUPERCRITICAL`).

    Notes
    -----
    The compiled accelerator is used when numba is installed, the input has at least
    :data:`ACCEL_MIN_SIZE` states and the model's alpha function is one it knows; its
    results agree with the numpy path to rounding.

    References
    ----------
    Michelsen, M. L. & Mollerup, J. M. (2007), Thermodynamic Models: Fundamentals and
    Computational Aspects, 2nd ed., ch. 3 (root selection by Gibbs energy).
    """
    if T.size >= ACCEL_MIN_SIZE:
        from .. import _accel

        kernel = _accel.stable_roots_kernel(model)
        if kernel is not None:
            return kernel(T, P)
    return stable_roots_numpy(model, T, P)


def stable_roots_numpy(model, T, P):
    """:func:`stable_roots` in numpy alone, chunk by chunk."""
    n = T.size
    roots = np.empty((n, 3))
    for s in _chunks(n):
        _volume_columns(model, T[s], P[s], out=roots[s])
    stable = np.zeros(n, np.int8)
    v = roots[:, 0].copy()
    several = np.flatnonzero(np.isfinite(roots[:, 1]))   # usually a small share of the states
    for s in _chunks(several.size):
        idx = several[s]
        stable[idx] = pick = _lowest_gibbs(model, T[idx], P[idx], roots[idx])
        v[idx] = np.take_along_axis(roots[idx], pick[:, None].astype(np.intp), axis=-1)[:, 0]
    return roots, stable, v, phase_codes(model, T, P, v)


def _lowest_gibbs(model, T, P, roots):
    """Index of the usable root of lowest ln phi (roots with dP/dv > 0 are not usable)."""
    best = np.full(T.shape, np.inf)
    pick = np.zeros(T.shape, np.int8)
    with np.errstate(invalid="ignore", divide="ignore"):
        for k in range(3):
            vk = roots[:, k]
            lnphi = model.ln_phi(T, vk, P)
            usable = np.isfinite(vk) & ~(model.dP_dv(T, vk) > 0.0) & np.isfinite(lnphi)
            lower = usable & (lnphi < best)   # strict: the first of equal ones wins
            best = np.where(lower, lnphi, best)
            pick[lower] = k
    return pick


# --------------------------------------------------------------------------- any model

def model_roots(model, T, P):
    """Every real volume root of any model at (T, P) [K, Pa], shape (..., 3), NaN-padded.

    The one place in the inversion layer that tells a model without a liquid (the ideal
    gas: ``has_saturation`` False, one root v = R T / P) from a cubic; the model protocol
    has no volume-root method of its own.
    """
    T, P = np.broadcast_arrays(np.asarray(T, dtype=float), np.asarray(P, dtype=float))
    if model.has_saturation:
        return volume_roots(model, T, P)
    roots = np.full(T.shape + (3,), np.nan)
    with np.errstate(divide="ignore", invalid="ignore"):
        roots[..., 0] = R * T / P
    return roots


def model_stable_roots(model, T, P):
    """:func:`stable_roots` for any model (the ideal gas: its only root, index 0)."""
    if model.has_saturation:
        return stable_roots(model, T, P)
    roots = model_roots(model, T, P)
    v = roots[:, 0]
    return roots, np.zeros(T.shape, np.int8), v, phase_codes(model, T, P, v)
