"""The energy flashes of a mixture: temperature and split at a known pressure and enthalpy
(a valve, a letdown regulator) or pressure and entropy (an isentropic compressor or expander).

At fixed pressure and feed, the mixture's molar enthalpy h(T) and entropy s(T) rise with
temperature everywhere, across the two-phase region included: (∂h/∂T)_P = c_p > 0 in one
phase, and in two phases the heat that evaporates more of the feed as T rises adds to it
(Michelsen & Mollerup 2007, ch. 10). So h(T) − h_target has exactly one root, and it is
found by bracketed root finding (Chandrupatla's method, :func:`thermo_roots.find_root`)
in T between :func:`temperature_bracket`'s ends, each trial temperature evaluated by the
(T, P) flash (:func:`.flash.flash_tp`, vectorized over the states still being solved) and
the split's energy by the lever rule (:func:`split_caloric`).

References
----------
Michelsen, M. L. & Mollerup, J. M. (2007), Thermodynamic Models: Fundamentals and
Computational Aspects, 2nd ed., Tie-Line Publications, ch. 10 (flash specifications other
than T and P).
Chandrupatla, T. R. (1997), Adv. Eng. Softw. 28, 145-149.
"""

from __future__ import annotations

import numpy as np

from ..errors import InputError
from ..inversion.pairs_energy import _known_ends
from ..roots import find_root
from .flash import flash_tp
from .phase_caloric import split_caloric

#: The bracket's ends relative to the components' critical temperatures: from 0.3 of the
#: lowest (every component a cold liquid) to 3 of the highest (an ideal-like gas).
COLD_END, HOT_END = 0.3, 3.0
ENERGY_NAMES = ("h", "s")


def temperature_bracket(model):
    """(T_cold, T_hot) [K] of the energy flashes (see :data:`COLD_END`, :data:`HOT_END`)."""
    Tc = np.asarray(model.components.Tc, dtype=float)
    return COLD_END * float(Tc.min()), HOT_END * float(Tc.max())


class _EnergyGap:
    """h(T, P) − h_target (or s) through the (T, P) flash, remembering the last flash of each state."""

    def __init__(self, model, name):
        self.model, self.name = model, name

    def __call__(self, T, P, target, scale):
        with np.errstate(over="ignore", invalid="ignore"):   # a gas at 1e-300 Pa: huge v, NaN w (unused)
            flash = flash_tp(self.model, T, P)
            energy = getattr(split_caloric(self.model, flash), self.name)
        return np.where(np.asarray(flash.status) == "converged", (energy - target) / scale, np.nan)


def energy_flash(model, P, value, name: str, *, xtol: float = 1e-9, maxiter: int = 60):
    """The temperature [K] and root-finder record of states at pressure P [Pa] whose feed has
    ``name`` ("h" [J/mol] or "s" [J/(mol K)]) equal to ``value``; vectorized.

    Returns
    -------
    T : ndarray
        The temperatures (NaN where not solved).
    record : RootResult or None
        The bracketed root finder's status and iterations for the bracketed states only, in
        their order (None when no state could be bracketed).
    reasons : ndarray of str
        Why a state is not solved ("" where solved): the value outside what the model gives
        between the bracket's ends, or a flash that did not converge there.
    """
    if name not in ENERGY_NAMES:
        raise InputError(f"energy_flash: name={name!r}; give one of {', '.join(ENERGY_NAMES)}.")
    P, value = np.broadcast_arrays(np.asarray(P, dtype=float), np.asarray(value, dtype=float))
    P, value = P.ravel(), value.ravel()
    T_cold, T_hot = temperature_bracket(model)
    gap = _EnergyGap(model, name)
    scale = 1000.0 if name == "h" else 1.0   # J/mol and J/(mol K) brought to similar sizes for ftol
    lo = gap(np.full(P.shape, T_cold), P, value, scale)
    hi = gap(np.full(P.shape, T_hot), P, value, scale)
    reasons = np.full(P.shape, "", dtype=object)
    M = model.molar_mass

    def quoted(x):   # an energy on both bases, as the engineer may have typed either
        return (f"{x / 1e3:.6g} kJ/mol ({x / M / 1e3:.6g} kJ/kg)" if name == "h"
                else f"{x:.6g} J/(mol K) ({x / M / 1e3:.6g} kJ/(kg K))")

    unit = "J/mol" if name == "h" else "J/(mol K)"
    for i in np.flatnonzero(~(np.isfinite(lo) & np.isfinite(hi))):
        if not (np.isfinite(P[i]) and P[i] > 0):
            reasons[i] = f"P = {P[i]:.6g} Pa is not a positive finite number"
        elif not np.isfinite(value[i]):
            reasons[i] = f"{name} = {value[i]} {unit} is not a finite number"
        else:
            reasons[i] = (f"the flash at the bracket's end ({T_cold:.1f} K or {T_hot:.1f} K, {P[i]:.6g} Pa) did not "
                          "converge, so no bracket of the temperature")
    below, above = np.isfinite(lo) & (lo > 0), np.isfinite(hi) & (hi < 0)
    for i in np.flatnonzero(below | above):
        end, T_end = ("lowest", T_cold) if below[i] else ("highest", T_hot)
        edge = value[i] + (lo[i] if below[i] else hi[i]) * scale   # the model's own value at that end
        reasons[i] = (f"{name} = {quoted(value[i])} is {'below' if below[i] else 'above'} the model's {name} at "
                      f"{P[i] / 1e5:.6g} bar over the temperatures it solves ({quoted(edge)} at the {end}, "
                      f"{T_end:.1f} K)")
    rows = np.flatnonzero(reasons == "")
    T = np.full(P.shape, np.nan)
    record = None
    if rows.size:   # only the bracketed states, their ends' flashes handed over (not flashed again)
        ends = [np.full(rows.size, T_cold), lo[rows], np.full(rows.size, T_hot), hi[rows]]
        record = find_root(_known_ends(gap), (ends[0], ends[2]),
                           args=(P[rows], value[rows], np.full(rows.size, scale), *ends),
                           xtol=xtol, rtol=1e-12, maxiter=maxiter)
        status = np.atleast_1d(np.asarray(record.status))
        good = status == "converged"
        T[rows[good]] = np.atleast_1d(np.asarray(record.root))[good]
        for i, s in zip(rows[~good], status[~good]):
            reasons[i] = f"the temperature search stopped: {s}"
    return T, record, reasons.astype(str)
