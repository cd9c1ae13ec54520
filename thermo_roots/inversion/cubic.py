"""All real volume roots of a cubic equation of state at given (T, P), vectorized.

The cubic in Z is solved in closed form (Cardano's formula for one real root, the
trigonometric form for three) and each root is polished by a guarded Newton step on the
polynomial, then the roots with v > b are kept and sorted.

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

#: States per chunk of the numpy path: about 2^13 keeps its temporaries in a 512 kB cache.
CHUNK = 8192
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
    return np.stack(_sorted_roots(c2, c1, c0), axis=-1)


def _sorted_roots(c2, c1, c0):
    """The three columns of :func:`cubic_real_roots`: (smallest, middle, largest), NaN-padded."""
    z1 = _polish(_polish(_one_real_root(c2, c1, c0), c2, c1, c0), c2, c1, c0)
    g1, g0 = _deflate(z1, c2, c1, c0)
    disc = g1 * g1 - 4.0 * g0
    with np.errstate(invalid="ignore", divide="ignore"):
        q = -0.5 * (g1 + np.copysign(np.sqrt(disc), g1))   # NaN where disc < 0: no more real roots
        z2, z3 = q, np.where(q != 0.0, g0 / q, 0.0)
    z2, z3 = _polish(z2, c2, c1, c0), _polish(z3, c2, c1, c0)
    # Sorting network; z2 and z3 are NaN together, and then z1 is the only root.
    lo, hi = np.minimum(z2, z3), np.maximum(z2, z3)
    return np.fmin(lo, z1), np.maximum(lo, np.minimum(hi, z1)), np.maximum(hi, z1)


def _one_real_root(c2, c1, c0):
    shift = c2 / 3.0
    p = c1 - c2 * shift                       # depressed cubic t^3 + p t + q, Z = t - c2/3
    q = (2.0 * shift * shift - c1) * shift + c0
    disc = (q * q) / 4.0 + (p * p * p) / 27.0
    with np.errstate(invalid="ignore", divide="ignore"):
        u = np.cbrt(-q / 2.0 - np.copysign(np.sqrt(np.maximum(disc, 0.0)), q))   # no cancellation
        cardano = np.where(u != 0.0, u - p / (3.0 * u), 0.0)
        pt = np.minimum(p, 0.0)
        m = 2.0 * np.sqrt(-pt / 3.0)
        cos_arg = np.where(m > 0.0, 3.0 * q / (pt * m), 0.0)
        trig = m * np.cos(np.arccos(np.clip(cos_arg, -1.0, 1.0)) / 3.0)   # the largest of three
    return np.where(disc > 0.0, cardano, trig) - shift


def _deflate(z1, c2, c1, c0):
    """Quadratic Z^2 + g1 Z + g0 left after dividing out the root z1.

    Backward deflation (from the constant term) when z1 is the larger root, forward
    deflation otherwise: each is the stable direction for that case.
    """
    with np.errstate(invalid="ignore", divide="ignore"):
        size = np.abs(z1)
        large = size * size * size >= np.abs(c0)
        safe = np.where(z1 != 0.0, z1, 1.0)
        g0_back = -c0 / safe
        g1_back = (g0_back - c1) / safe
        g1_fwd = c2 + z1
        g0_fwd = c1 + z1 * g1_fwd
    return np.where(large, g1_back, g1_fwd), np.where(large, g0_back, g0_fwd)


def _polish(z, c2, c1, c0):
    """One Newton step on the polynomial, kept only where it lowers |residual|."""
    with np.errstate(invalid="ignore", divide="ignore"):
        f = ((z + c2) * z + c1) * z + c0
        df = (3.0 * z + 2.0 * c2) * z + c1
        z_new = z - f / df
        f_new = ((z_new + c2) * z_new + c1) * z_new + c0
        better = np.isfinite(z_new) & (np.abs(f_new) < np.abs(f))
    return np.where(better, z_new, z)


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
        out[s] = np.stack(_volume_columns(model, T[s], P[s]), axis=-1)
    return out.reshape(shape + (3,))


def _chunks(n):
    return [slice(i, min(i + CHUNK, n)) for i in range(0, max(n, 1), CHUNK)] if n else []


def _volume_columns(model, T, P):
    """(v0, v1, v2): the roots v > b of 1-D (T, P), ascending, NaN-padded [m^3/mol]."""
    c2, c1, c0, B = model.cubic_coefficients(T, P)
    s0, s1, s2 = _sorted_roots(c2, c1, c0)
    # Keep Z > B. The columns are sorted, so the roots left out are the first few:
    # shift the rest to the front by the number left out.
    out = (s0 <= B).view(np.int8) + (s1 <= B).view(np.int8) + (s2 <= B).view(np.int8)
    nan = np.nan
    z0 = np.where(out == 0, s0, np.where(out == 1, s1, np.where(out == 2, s2, nan)))
    z1 = np.where(out == 0, s1, np.where(out == 1, s2, nan))
    z2 = np.where(out == 0, s2, nan)
    scale = R * T / P
    c = model.c
    return z0 * scale - c, z1 * scale - c, z2 * scale - c


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
        roots[s] = np.stack(_volume_columns(model, T[s], P[s]), axis=-1)
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
