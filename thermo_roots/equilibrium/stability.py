"""Is a mixture of feed z at (T, P) one stable phase? Michelsen's tangent-plane test.

A feed is stable as one phase when no trial phase w lowers the Gibbs energy, that is when
the tangent-plane distance

    tpd(w) = Σᵢ wᵢ (ln wᵢ + ln φᵢ(w) − dᵢ),   dᵢ = ln zᵢ + ln φᵢ(z),

is non-negative for every composition w. It is searched from several trial phases at once
(Wilson's K both ways, y = K z vapour-like and x = z / K liquid-like, and the lightest and
heaviest component alone) by successive substitution in the unnormalized mole numbers Wᵢ,

    ln Wᵢ ← dᵢ − ln φᵢ(W / Σ W),

which lowers Michelsen's modified distance tm(W) = 1 + Σ Wᵢ (ln Wᵢ + ln φᵢ − dᵢ − 1) at
every step; every fifth step is extrapolated along the dominant eigenvalue of the iteration
(Crowe & Nishio 1975). A trial whose tm falls below zero proves the feed unstable (and its
composition is the start of the flash); a state whose trials all end at tm ≥ 0 or at the
feed itself (the trivial solution) is stable.

Every ln φ is :func:`~thermo_roots.equilibrium.fugacity.phase_fugacity` (each trial phase
at its root of lowest Gibbs energy): there is no second formula here.

References
----------
Michelsen, M. L. (1982), The isothermal flash problem. Part I. Stability, Fluid Phase
Equilib. 9, 1-19.
Michelsen, M. L. & Mollerup, J. M. (2007), Thermodynamic Models: Fundamentals and
Computational Aspects, 2nd ed., Tie-Line Publications, ch. 9 (tangent plane, tm, trial
phases) and ch. 10 (acceleration by the dominant eigenvalue).
Crowe, C. M. & Nishio, M. (1975), Convergence promotion in the simulation of chemical
processes -- the general dominant eigenvalue method, AIChE J. 21, 528-533.
Wilson, G. M. (1968), AIChE 65th National Meeting, paper 15c (the K estimate).
"""

from __future__ import annotations

import html
from dataclasses import dataclass
from typing import Any

import numpy as np

from thermo_roots.equilibrium.fugacity import phase_fugacity
from thermo_roots.equilibrium.k_values import WILSON_CONSTANT
from thermo_roots.errors import InputError, WrongTypeError

#: A state is unstable when some trial reaches tm below minus this [-]: a margin for rounding
#: (tm of a converged trivial or near-trivial trial is of the order of 1e-12).
UNSTABLE_BELOW = 1e-8
#: A trial stops when its ln W changes by less than this [-] in one step.
STABILITY_TOLERANCE = 1e-8
#: A trial stops as soon as tm is below minus this [-]: instability is proven, and a flash
#: started from it needs no more digits of its composition.
PROVEN_BELOW = 1e-3
#: A trial whose composition comes within this of the feed in every ln wᵢ has found the
#: trivial solution w = z (tm = 0): it proves nothing and stops.
TRIVIAL_WITHIN = 1e-4
#: A trial whose tm is above this [-] and falls by less than :data:`SLOW_FALL` of itself in a
#: step has settled above zero (it proves nothing against stability).
POSITIVE_MARGIN = 1e-4
SLOW_FALL = 1e-3
#: b below this (with r near 1) marks a trial heading for the trivial solution [-].
TRIVIAL_B = 1e-4
#: Every this many steps the dominant-eigenvalue extrapolation (Crowe & Nishio 1975).
ACCELERATE_EVERY = 5

STABLE = "stable"
UNSTABLE = "unstable"
NOT_CONVERGED = "not converged"
NOT_SOLVED = "not solved"
#: Status texts of :func:`tangent_plane`.
STATUSES = (STABLE, UNSTABLE, NOT_CONVERGED, NOT_SOLVED)

#: The trial phases, in the order of :attr:`StabilityResult.trial_tpd`'s last axis.
TRIALS = ("vapor-like (Wilson K z)", "liquid-like (z / Wilson K)", "lightest component", "heaviest component")


@dataclass(frozen=True)
class StabilityResult:
    """The tangent-plane test of feeds at (T, P). Shapes (...) and (..., n_components).

    Attributes
    ----------
    stable : bool or ndarray of bool
        True where no trial phase lowers the Gibbs energy (False also where not solved).
    tpd_min : float or ndarray
        The lowest modified tangent-plane distance tm [-] reached by any trial: below
        −:data:`UNSTABLE_BELOW` it proves instability (the search stops once it is below
        −:data:`PROVEN_BELOW`, so it is not the minimum itself there); at a stable state
        the lowest stationary value found (≥ 0, 0 for the trivial solution).
    trial : ndarray
        Composition [-] of the trial with the lowest tm (the incipient phase's estimate
        where unstable).
    K_estimate : ndarray
        K-values yᵢ/xᵢ [-] from that trial (w / z if it is lighter than the feed, z / w
        otherwise): the start of the flash; NaN where stable or not solved.
    trial_tpd : ndarray, shape (..., 4)
        tm [-] reached by each trial of :data:`TRIALS` (0 for a trivial one).
    iterations : int or ndarray of int
        Most successive-substitution steps any trial of the state took.
    status : str or ndarray of str
        One of :data:`STATUSES` per state.
    reason : str or ndarray of str
        Why a state is "not solved" or "not converged" ("" otherwise).
    Z_feed, v_feed : float or ndarray
        The feed's compressibility factor [-] and molar volume [m³/mol] as one phase (its
        root of lowest Gibbs energy).
    """

    stable: Any
    tpd_min: Any
    trial: Any
    K_estimate: Any
    trial_tpd: Any
    iterations: Any
    status: Any
    reason: Any
    Z_feed: Any
    v_feed: Any

    def __repr__(self) -> str:
        status = np.asarray(self.status)
        if status.ndim == 0:
            return f"StabilityResult({str(status)!r}, tpd_min={float(self.tpd_min):.6g})"
        counts = ", ".join(f"{int(np.sum(status == s))} {s}" for s in STATUSES if np.any(status == s))
        return f"StabilityResult({status.size} states: {counts})"

    def _repr_html_(self) -> str:
        status = np.asarray(self.status)
        if status.ndim == 0:
            rows = [("verdict", str(status)), ("lowest tangent-plane distance tm", f"{float(self.tpd_min):.6g}")]
            if str(self.reason):
                rows.append(("reason", str(self.reason)))
        else:
            rows = [(s, str(int(np.sum(status == s)))) for s in STATUSES if np.any(status == s)]
        body = "".join(f"<tr><th style='text-align:left'>{html.escape(k)}</th><td>{html.escape(v)}</td></tr>"
                       for k, v in rows)
        return f"<table><caption>Tangent-plane stability test</caption>{body}</table>"


# --------------------------------------------------------------------------- reading the states

def _check_cubic(model, who: str) -> None:
    if not (hasattr(model, "phase_coefficients") and hasattr(model, "component_ln_phi")):
        raise WrongTypeError(f"{who}: the model must be a cubic (e.g. tr.PengRobinson(mixture)); got {model!r} "
                             f"({type(model).__name__}). The ideal gas has no phase split.")


def _numbers(value, label: str, who: str) -> np.ndarray:
    if isinstance(value, (str, bytes, bool, np.bool_)) or value is None:
        raise WrongTypeError(f"{who}: {label} must be a number or an array of numbers in SI units, not {value!r}; "
                             "text with units goes through thermo_roots.solve(model, T=..., P=...).")
    try:
        return np.asarray(value, dtype=float)
    except (TypeError, ValueError):
        raise WrongTypeError(f"{who}: {label} must be a number or an array of numbers, not {value!r}.") from None


def read_states(model, T, P, z, who: str):
    """(shape, T, P, z flat (n,), (n,), (n, nc), reasons (n,) object) of states to test or flash.

    z defaults to the model's feed; a bad element (T or P not positive and finite, z with
    a negative, NaN or all-zero entry) gets its reason and is left out of the iteration.
    """
    _check_cubic(model, who)
    nc = model.n_components
    T, P = _numbers(T, "T", who), _numbers(P, "P", who)
    z = model.z if z is None else _numbers(z, "z", who)
    if z.ndim == 0 or z.shape[-1] != nc:
        raise InputError(f"{who}: z must have the {nc} components ({', '.join(model.components.names)}) along "
                         f"its last axis; got shape {z.shape}.")
    try:
        shape = np.broadcast_shapes(T.shape, P.shape, z.shape[:-1])
    except ValueError:
        raise InputError(f"{who}: T of shape {T.shape}, P of shape {P.shape} and z of shape {z.shape} (components "
                         "last) do not broadcast.") from None
    n = int(np.prod(shape))
    Tf, Pf = np.broadcast_to(T, shape).reshape(n), np.broadcast_to(P, shape).reshape(n)
    zf = np.broadcast_to(z, shape + (nc,)).reshape(n, nc)
    reasons = np.full(n, "", dtype=object)
    with np.errstate(invalid="ignore"):
        for label, x, unit in (("T", Tf, "K"), ("P", Pf, "Pa")):
            bad = ~(np.isfinite(x) & (x > 0))
            for i in np.flatnonzero(bad & (reasons == "")):
                reasons[i] = (f"{label} = {x[i]:.6g} {unit} is not a positive finite number; give {label} in {unit} "
                              "above zero")
        total = zf.sum(axis=1)
        bad_z = ~(np.isfinite(zf).all(axis=1) & (zf >= 0).all(axis=1) & (total > 0))
    for i in np.flatnonzero(bad_z & (reasons == "")):
        reasons[i] = (f"the composition {np.round(zf[i], 6).tolist()} is not a set of mole fractions (each finite "
                      "and >= 0, not all zero)")
    zf = np.where(bad_z[:, None], np.nan, zf / np.where(total > 0, total, 1.0)[:, None])
    return shape, Tf, Pf, zf, reasons


def _wilson_ln_k(model, T, P):
    """ln Kᵢ of Wilson's estimate for flat states (k_values.wilson_k's formula, without its checks
    of T and P, which are done here element by element)."""
    c = model.components
    return (np.log(c.Pc / P[:, None]) + WILSON_CONSTANT * (1.0 + c.omega) * (1.0 - c.Tc / T[:, None]))


# --------------------------------------------------------------------------- the test

def _trial_starts(ln_k, z):
    """ln W of the four trials for each state, shape (n, 4, nc); a component absent from the
    feed starts absent (−inf), the pure trials start at their one component."""
    n, nc = z.shape
    with np.errstate(divide="ignore"):
        ln_z = np.log(z)
    starts = np.empty((n, 4, nc))
    # normalized (Σ W = 1): the first step sets the scale, and K z at 1e-300 Pa would overflow
    for slot, sign in ((0, 1.0), (1, -1.0)):
        ln_w = ln_z + sign * ln_k
        top = np.max(ln_w, axis=1, keepdims=True)
        starts[:, slot] = ln_w - top - np.log(np.exp(ln_w - top).sum(axis=1, keepdims=True))
    masked = np.where(z > 0, ln_k, np.nan)
    light, heavy = np.nanargmax(masked, axis=1), np.nanargmin(masked, axis=1)
    rows = np.arange(n)
    for slot, k in ((2, light), (3, heavy)):
        starts[:, slot] = -np.inf
        starts[rows, slot, k] = 0.0
    return starts


def _tm(ln_W, ln_phi, d):
    """Michelsen's modified tangent-plane distance tm(W) [-] (absent components contribute 0)."""
    W = np.exp(ln_W)
    with np.errstate(invalid="ignore", over="ignore"):   # an absent component: 0 (-inf), left out by the where
        terms = np.where(W > 0, W * (ln_W + ln_phi - d - 1.0), 0.0)
    return 1.0 + terms.sum(axis=-1)


def _dominant_eigenvalue_step(ln_W, step, last_step):
    """ln W extrapolated along the iteration's dominant eigenvalue λ = (Δₖ·Δₖ)/(Δₖ₋₁·Δₖ):
    ln W + Δₖ λ/(1 − λ), where 0 < λ < 1 (a contracting iteration), else ln W unchanged."""
    finite = np.isfinite(step) & np.isfinite(last_step)
    s, t = np.where(finite, step, 0.0), np.where(finite, last_step, 0.0)
    with np.errstate(invalid="ignore", divide="ignore"):
        lam = np.sum(s * s, axis=-1) / np.sum(s * t, axis=-1)
    good = np.isfinite(lam) & (lam > 0) & (lam < 0.98)
    factor = np.where(good, lam / (1.0 - np.where(good, lam, 0.0)), 0.0)
    return ln_W + s * factor[..., None]


def tangent_plane(model, T, P, z=None, *, tol: float = STABILITY_TOLERANCE, maxiter: int = 200) -> StabilityResult:
    """Michelsen's tangent-plane stability test of feeds z at T [K], P [Pa], vectorized.

    Parameters
    ----------
    model : CubicModel
        A cubic with its components and kᵢⱼ (a pure fluid is the one-component case).
    T, P : float or array_like
        Temperature [K] and pressure [Pa] (SI floats), broadcasting to the states' shape (...).
    z : array_like, shape (..., n_components), optional
        Feed mole fractions [-] (normalized here); default the model's ``z``.
    tol : float
        A trial stops when ln W changes by less than this in one step [-].
    maxiter : int
        Most successive-substitution steps per trial.

    Returns
    -------
    StabilityResult
        ``stable``, ``tpd_min``, ``trial``, ``K_estimate``, ``status`` and ``reason`` per state
        (scalars for one state). A state with a bad T, P or z is "not solved" with its
        reason (the others are tested); one whose trials neither proved instability nor all
        converged within ``maxiter`` is "not converged" (``stable`` False: not proven).

    Notes
    -----
    A trial stops early once tm < −:data:`PROVEN_BELOW` (proof enough) or when its
    composition reaches the feed's (the trivial solution, tm = 0). The four trials of every
    state run as one array, finished ones packed away, so the cost per state falls with
    the array's size.

    References
    ----------
    Michelsen (1982), Fluid Phase Equilib. 9, 1-19; Michelsen & Mollerup (2007), ch. 9-10;
    Crowe & Nishio (1975), AIChE J. 21, 528 (see the module).

    Examples
    --------
    >>> import thermo_roots as tr
    >>> gas = tr.PengRobinson(tr.Mixture({"methane": 0.9, "propane": 0.1}))
    >>> bool(tangent_plane(gas, 200.0, 3e6).stable), bool(tangent_plane(gas, 300.0, 3e6).stable)
    (False, True)
    """
    shape, Tf, Pf, zf, reasons = read_states(model, T, P, z, "tangent_plane")
    return _finish(shape, _test(model, Tf, Pf, zf, reasons, tol, maxiter))


def _test(model, T, P, z, reasons, tol, maxiter):
    """The test on flat states: a dict of flat arrays (see StabilityResult)."""
    n, nc = z.shape
    good = reasons == ""
    out = {"tpd_min": np.full(n, np.nan), "trial": np.full((n, nc), np.nan), "K_estimate": np.full((n, nc), np.nan),
           "trial_tpd": np.full((n, 4), np.nan), "iterations": np.zeros(n, dtype=int),
           "status": np.full(n, NOT_SOLVED, dtype="<U15"), "reason": reasons.copy(),
           "Z_feed": np.full(n, np.nan), "v_feed": np.full(n, np.nan), "g_feed": np.full(n, np.nan)}
    idx = np.flatnonzero(good)
    if idx.size == 0:
        return out
    feed = phase_fugacity(model, T[idx], P[idx], z[idx])
    with np.errstate(divide="ignore"):
        d = np.log(z[idx]) + feed.ln_phi
    usable = np.isfinite(feed.Z) & np.all(np.isfinite(feed.ln_phi), axis=1)
    for i in idx[~usable]:
        out["reason"][i] = (f"the model gives no phase at T = {T[i]:.6g} K, P = {P[i]:.6g} Pa for this feed "
                            "(far outside the range a cubic holds in double precision)")
    idx, d = idx[usable], d[usable]
    out["Z_feed"][idx], out["v_feed"][idx] = feed.Z[usable], feed.v[usable]
    # the feed's Gibbs energy as one phase, G/(RT) less the pure ideal gases' (what a split must beat)
    with np.errstate(invalid="ignore"):
        out["g_feed"][idx] = np.where(z[idx] > 0, z[idx] * d, 0.0).sum(axis=1)
    if idx.size == 0:
        return out
    m = idx.size
    ln_W, tm, steps, done, trivial = _iterate_trials(model, T[idx], P[idx], z[idx], d, tol, maxiter)
    tm = np.where(trivial, 0.0, tm).reshape(m, 4)
    converged_all = done.reshape(m, 4).all(axis=1)
    best = np.argmin(np.where(np.isfinite(tm), tm, np.inf), axis=1)
    rows = np.arange(m)
    tpd_min = tm[rows, best]
    W = np.exp(ln_W.reshape(m, 4, nc)[rows, best])
    w = W / W.sum(axis=1, keepdims=True)
    unstable = tpd_min < -UNSTABLE_BELOW
    status = np.where(unstable, UNSTABLE, np.where(converged_all, STABLE, NOT_CONVERGED))
    out["tpd_min"][idx], out["trial"][idx], out["trial_tpd"][idx] = tpd_min, w, tm
    out["iterations"][idx] = steps.reshape(m, 4).max(axis=1)
    out["status"][idx] = status
    if unstable.any():
        out["K_estimate"][idx[unstable]] = _k_from_trial(model, T[idx[unstable]], P[idx[unstable]],
                                                         z[idx[unstable]], w[unstable],
                                                         out["v_feed"][idx[unstable]])
    for i in idx[status == NOT_CONVERGED]:
        out["reason"][i] = (f"the stability test did not settle within {maxiter} steps at T = {T[i]:.6g} K, "
                            f"P = {P[i]:.6g} Pa (a state very near a critical point); one phase is not proven")
    return out


def _k_from_trial(model, T, P, z, w, v_feed):
    """K = w/z where the trial phase is lighter than the feed (larger molar volume), z/w otherwise."""
    trial = phase_fugacity(model, T, P, w)
    with np.errstate(divide="ignore", invalid="ignore"):
        ratio = w / z
    lighter = trial.v > v_feed
    K = np.where(lighter[:, None], ratio, 1.0 / ratio)
    return np.where(z > 0, K, 1.0)


def _iterate_trials(model, T, P, z, d, tol, maxiter):
    """Successive substitution of every trial of every state; flat over (state, trial).

    Returns ln W, tm, steps, done (converged or proven or trivial), trivial; shapes (m*4, ...).
    """
    m, nc = z.shape
    ln_W = _trial_starts(_wilson_ln_k(model, T, P), z).reshape(m * 4, nc)
    Tt, Pt = np.repeat(T, 4), np.repeat(P, 4)
    dt = np.repeat(d, 4, axis=0)
    with np.errstate(divide="ignore"):
        ln_z = np.repeat(np.log(z), 4, axis=0)
    tm = np.full(m * 4, np.inf)
    tm_last = np.full(m * 4, np.inf)
    steps = np.zeros(m * 4, dtype=int)
    done = np.zeros(m * 4, dtype=bool)
    trivial = np.zeros(m * 4, dtype=bool)
    last_step = np.full((m * 4, nc), np.nan)
    proven_states = np.zeros(m, dtype=bool)   # one trial below -PROVEN_BELOW ends the state's search
    active = np.arange(m * 4)
    for k in range(1, maxiter + 1):
        W = np.exp(ln_W[active])
        phase = phase_fugacity(model, Tt[active], Pt[active], W)
        new = dt[active] - phase.ln_phi
        tm[active] = _tm(ln_W[active], phase.ln_phi, dt[active])
        with np.errstate(invalid="ignore"):
            step = np.where(np.isfinite(new) | np.isfinite(ln_W[active]), new - ln_W[active], 0.0)
            step = np.where(np.isfinite(step), step, 0.0)   # an absent component stays absent
        steps[active] = k
        w_new = np.exp(new - np.log(np.exp(new).sum(axis=1, keepdims=True)))
        with np.errstate(divide="ignore", invalid="ignore"):
            near_feed = np.all(np.where(ln_z[active] > -np.inf,
                                        np.abs(np.log(w_new) - ln_z[active]) < TRIVIAL_WITHIN, True), axis=1)
        largest = np.max(np.abs(step), axis=1)
        # a stationary point: steps below tol; or a tm well above zero that falls by less than
        # SLOW_FALL of itself per step (substitution lowers tm at every step at a falling rate, so
        # a thousand more such steps would not bring it to zero; near a critical point it creeps
        # like that for hundreds of steps with tm fixed to 1e-7)
        fall = tm_last[active] - tm[active]
        settled = (largest < tol) | ((k > 2) & (tm[active] > POSITIVE_MARGIN) & (fall < SLOW_FALL * tm[active]))
        tm_last[active] = tm[active]
        proven = tm[active] < -PROVEN_BELOW
        broken = ~np.isfinite(tm[active])
        state = active // 4
        proven_states[state[proven]] = True
        finished = settled | proven | near_feed | broken | proven_states[state]
        # Michelsen & Mollerup (2007, ch. 10): heading for the trivial solution when
        # b = Σ (Wᵢ − zᵢ)(ln Wᵢ − ln zᵢ) is small and tm ≈ b/2 (r = 2 tm/b near 1)
        with np.errstate(invalid="ignore", divide="ignore"):
            gap = np.where(ln_z[active] > -np.inf, (W - np.exp(ln_z[active])) * (ln_W[active] - ln_z[active]), 0.0)
            b = gap.sum(axis=1)
            r = 2.0 * tm[active] / b
        near_feed |= (b < TRIVIAL_B) & (np.abs(r - 1.0) < 0.2)
        finished |= near_feed
        trivial[active] = near_feed & ~proven
        if k % ACCELERATE_EVERY == 0:
            new = _dominant_eigenvalue_step(new, step, last_step[active])
        ln_W[active] = new
        last_step[active] = step
        done[active[finished & ~broken]] = True
        done[np.repeat(proven_states, 4)] = True
        active = active[~finished]
        if active.size == 0:
            break
    return ln_W, tm, steps, done, trivial


def _finish(shape, out) -> StabilityResult:
    """Shape the flat arrays back; a scalar state gives Python scalars."""
    stable = out["status"] == STABLE
    values = {k: v for k, v in out.items() if k != "g_feed"}   # the flash's, not a field
    values["stable"] = stable
    if shape == ():
        scalar = {k: (v[0].item() if np.ndim(v[0]) == 0 and not isinstance(v[0], str) else v[0])
                  for k, v in values.items()}
        scalar["status"], scalar["reason"] = str(values["status"][0]), str(values["reason"][0])
        return StabilityResult(**scalar)
    shaped = {k: np.asarray(v).reshape(shape + np.shape(v)[1:]) for k, v in values.items()}
    shaped["reason"] = shaped["reason"].astype(str)
    return StabilityResult(**shaped)
