"""The caloric properties of a split feed: each phase at its own composition, then the lever rule.

One function for the flash's results and for :class:`.mixture_state.MixtureState`: h, s, u, g of
the whole are (1 − β) eᴸ + β eⱽ with each phase's value from ``properties.caloric`` at its own
volume and composition (one vectorized call per phase, ``x=``); cp, cv, w, mu_jt and kappa_T have
no single value in two phases and are NaN there. In one phase (the other phase's volume NaN)
every property is that phase's.

References
----------
Michelsen, M. L. & Mollerup, J. M. (2007), Thermodynamic Models: Fundamentals and
Computational Aspects, 2nd ed., ch. 2 (properties of a multiphase system as sums over its phases).
"""

from __future__ import annotations

import numpy as np

from ..properties import Caloric, caloric

#: Properties that sum over the phases by the lever rule; the rest have no single value in two phases.
EXTENSIVE = ("h", "s", "u", "g")


def lever_caloric(model, T, P, beta, x, y, v_liquid, v_vapor) -> Caloric:
    """Caloric properties of the whole feed [per mole of feed] from its phases.

    Parameters
    ----------
    model : CubicModel
        The mixture model (constants and kᵢⱼ; its feed composition is not used).
    T, P : array_like
        Temperature [K] and pressure [Pa], shape (...).
    beta : array_like
        Molar vapour fraction [-].
    x, y : array_like, shape (..., n_components)
        Liquid and vapour mole fractions [-].
    v_liquid, v_vapor : array_like
        Each phase's molar volume [m³/mol]; NaN for a phase that is not there.
    """
    T, P = np.asarray(T, dtype=float), np.asarray(P, dtype=float)
    v_l, v_v = np.asarray(v_liquid, dtype=float), np.asarray(v_vapor, dtype=float)
    beta = np.asarray(beta, dtype=float)
    liquid = caloric(model, T, v_l, P, x=np.asarray(x, dtype=float))
    vapor = caloric(model, T, v_v, P, x=np.asarray(y, dtype=float))
    no_liquid, no_vapor = np.isnan(v_l), np.isnan(v_v)
    values = {}
    for name in Caloric._fields:
        lq, vp = np.asarray(getattr(liquid, name)), np.asarray(getattr(vapor, name))
        with np.errstate(invalid="ignore"):
            both = (1.0 - beta) * lq + beta * vp if name in EXTENSIVE else np.full(np.shape(lq), np.nan)
        values[name] = np.where(no_liquid, vp, np.where(no_vapor, lq, both))
    values["P"] = np.broadcast_to(P, np.shape(values["h"])).copy()
    return Caloric(**values)


def split_caloric(model, flash) -> Caloric:
    """:func:`lever_caloric` of the states of a :class:`.flash.FlashResult`."""
    return lever_caloric(model, flash.T, flash.P, flash.beta, flash.x, flash.y, flash.v_liquid, flash.v_vapor)
