"""The fugacity coefficients of one phase of a mixture at (T, P): which root of the cubic, and ln φᵢ.

Every stability test, flash, bubble and dew point asks the same question of a trial phase
of composition x at (T, P): the roots Z of its cubic, the root the phase takes, and the
ln φᵢ of every component there. This module answers it once, vectorized over states; the
formulas themselves are the model layer's (``CubicModel.phase_coefficients``,
``CubicModel.component_ln_phi``), the roots the inversion layer's.

References
----------
Michelsen, M. L. & Mollerup, J. M. (2007), Thermodynamic Models: Fundamentals and
Computational Aspects, 2nd ed., Tie-Line Publications, ch. 4 (fugacity of a cubic's
component) and ch. 9 (the root of lowest Gibbs energy for a phase of given composition).
"""

from __future__ import annotations

from typing import NamedTuple

import numpy as np

from thermo_roots.errors import InputError
from thermo_roots.inversion.cubic import cubic_real_roots
from thermo_roots.models import R

#: Which root a phase takes: the lowest Gibbs energy (a phase of its own), or the
#: smallest / largest root (a liquid-like / vapour-like trial where the cubic has three).
ROOT_CHOICES = ("stable", "liquid", "vapor")


class PhaseFugacity(NamedTuple):
    """One phase at (T, P) and composition x; shapes (...) and (..., n_components)."""

    ln_phi: np.ndarray   #: ln φᵢ [-], the components along the last axis
    Z: np.ndarray        #: the translated model's compressibility factor P v/(R T) [-]
    v: np.ndarray        #: molar volume [m³/mol]
    g_res: np.ndarray    #: residual Gibbs energy over R T, Σ xᵢ ln φᵢ [-]
    n_roots: np.ndarray  #: how many roots v > v_min the phase's cubic has (1 or 3)


def phase_fugacity(model, T, P, x, root: str = "stable") -> PhaseFugacity:
    """ln φᵢ of a phase of composition x of a cubic mixture model at T [K], P [Pa].

    Parameters
    ----------
    model : CubicModel
        A cubic (pure or mixture); its constants and kᵢⱼ are used, not its feed composition.
    T, P : float or array_like
        Temperature [K] and pressure [Pa], broadcasting to the states' shape (...).
    x : array_like, shape (..., n_components)
        The phase's mole fractions [-] (need not sum to 1 exactly: a trial phase).
    root : {"stable", "liquid", "vapor"}
        "stable": the root of lowest Gibbs energy Σ xᵢ ln φᵢ; "liquid" / "vapor": the
        smallest / largest root above the co-volume (the same root where there is one).

    Returns
    -------
    PhaseFugacity
    """
    if root not in ROOT_CHOICES:
        raise InputError(f"phase_fugacity: root={root!r} is not one of {', '.join(ROOT_CHOICES)}.")
    T, P, x = np.asarray(T, dtype=float), np.asarray(P, dtype=float), np.asarray(x, dtype=float)
    shape = np.broadcast_shapes(T.shape, P.shape, x.shape[:-1])
    T, P = np.broadcast_to(T, shape), np.broadcast_to(P, shape)
    x = np.broadcast_to(x, shape + x.shape[-1:])
    x = x / np.sum(x, axis=-1, keepdims=True)
    with np.errstate(invalid="ignore", divide="ignore", over="ignore"):   # a bad state gives NaN quietly
        coefficients = model.phase_coefficients(T, P, x)
        c2, c1, c0, A, B, _ = coefficients
        roots = cubic_real_roots(c2, c1, c0)
        roots = np.where(roots > B[..., None], roots, np.nan)
        n_roots = np.sum(np.isfinite(roots), axis=-1)
        if root == "liquid":
            Z = _finite_or_nan(np.where(np.isfinite(roots), roots, np.inf).min(axis=-1))
        elif root == "vapor":
            Z = _finite_or_nan(np.where(np.isfinite(roots), roots, -np.inf).max(axis=-1))
        else:
            Z = _lowest_gibbs_root(model, T, P, x, roots, coefficients)
        ln_phi = model.component_ln_phi(T, P, x, Z, coefficients)
        shift = x @ model._c_i
        v = Z * R * T / P - shift
    g_res = np.sum(x * ln_phi, axis=-1)
    return PhaseFugacity(ln_phi, v * P / (R * T), v, g_res, n_roots)


def _finite_or_nan(Z):
    """NaN where a state had no root above the co-volume (a bad input state)."""
    return np.where(np.isfinite(Z), Z, np.nan)


def _lowest_gibbs_root(model, T, P, x, roots, coefficients):
    """The root of each state whose phase has the lowest Σ xᵢ ln φᵢ (one root: that one).

    ln φ is evaluated only for the states with more than one root (in a flash most states
    have one; their ln φ at the chosen root is computed once by the caller).
    """
    finite = np.isfinite(roots)
    best_Z = _finite_or_nan(np.where(finite, roots, -np.inf).max(axis=-1))
    several = np.sum(finite, axis=-1) > 1
    if not np.any(several):
        return best_Z
    T_s, P_s, x_s, roots_s = T[several], P[several], x[several], roots[several]
    coefficients_s = tuple(c[several] for c in coefficients)
    chosen = np.full(roots_s.shape[:-1], np.nan)
    best_g = np.full(roots_s.shape[:-1], np.inf)
    for k in range(roots_s.shape[-1]):
        Zk = roots_s[..., k]
        g = np.sum(x_s * model.component_ln_phi(T_s, P_s, x_s, Zk, coefficients_s), axis=-1)
        better = np.isfinite(g) & (g < best_g)
        chosen = np.where(better, Zk, chosen)
        best_g = np.where(better, g, best_g)
    best_Z[several] = chosen
    return best_Z
