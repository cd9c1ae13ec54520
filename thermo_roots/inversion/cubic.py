"""All real volume roots of a cubic equation of state at given (T, P), vectorized.

The cubic in Z is solved in closed form (Cardano's formula for one real root, the
trigonometric form for three) and each root is polished by a guarded Newton step on the
polynomial, then the roots with v > b are kept and sorted.
"""

from __future__ import annotations

import numpy as np

from ..models import R

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
    z1 = _polish(_one_real_root(c2, c1, c0), c2, c1, c0)
    g1, g0 = _deflate(z1, c2, c1, c0)
    disc = g1 * g1 - 4.0 * g0
    with np.errstate(invalid="ignore", divide="ignore"):
        q = -0.5 * (g1 + np.copysign(np.sqrt(disc), g1))   # NaN where disc < 0: no more real roots
        z2, z3 = q, np.where(q != 0.0, g0 / q, 0.0)
    roots = np.stack([z1, z2, z3], axis=-1)
    roots = _polish(roots, c2[..., None], c1[..., None], c0[..., None])
    return np.sort(roots, axis=-1)


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
        large = np.abs(z1) ** 3 >= np.abs(c0)
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
    c2, c1, c0, B = model.cubic_coefficients(T, P)
    Z = cubic_real_roots(c2, c1, c0)
    Z = np.where(Z > np.asarray(B)[..., None], Z, np.nan)
    Z = np.sort(Z, axis=-1)  # NaN sort last: valid roots first, ascending
    return Z * (R * T / P)[..., None] - model.c   # translated volumes
