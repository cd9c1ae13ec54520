"""The phase envelope of a mixture, traced by continuation through its critical point.

The envelope is the curve of the system of :mod:`.saturation_points` at vapor fraction
β = 0: the feed z in equilibrium with an incipient phase y = K z, in the variables
u = (ln K₁ … ln Kₙ, ln T, ln P). It starts at the bubble point at a low pressure
``P_start``, climbs the bubble side, passes the critical point (where every ln Kᵢ goes
through 0 together: the incipient phase becomes the feed's twin and then the denser of the
two) and comes down the dew side to ``P_start`` again (Michelsen 1980).

Each step:

- the tangent du/ds of the curve at the last point comes from the Jacobian of the converged
  point (J du/dS = e_spec), oriented along the direction of travel;
- the specified variable of the next point is the component of u that changes fastest along
  the tangent (the largest sensitivity), so the Jacobian stays well conditioned where T or P
  turns (cricondentherm, cricondenbar) and near the critical point, where ln K does;
- the step in the specified variable is limited so that no ln T moves by more than
  :data:`MAX_DLN_T`, no ln P by more than :data:`MAX_DLN_P` and no ln Kᵢ by more than
  :data:`MAX_DLN_K`; it grows by half after a Newton solve of three iterations or fewer and is
  halved (the point solved again) after a failed one;
- near the critical point (the largest |ln Kᵢ| below :data:`CRITICAL_JUMP_LN_K` and falling)
  the specified variable is that ln Kᵢ and the step takes it to minus its value, over the
  critical point in one step (Newton never meets K = 1 there, the trivial solution); the
  critical point itself is placed where ln Kᵢ = 0 by the cubic polynomials of ln T and ln P in
  that ln Kᵢ through the two points of the jump and two more solved at ln Kᵢ = ±0.01. Past it the phase
  labelled x (the feed) takes the vapor root and the incipient one the liquid root.

The cricondenbar (highest pressure) and cricondentherm (highest temperature) are solved
exactly: around the highest traced point, the point where dP/dT (or dT/dP) of the curve is
0, by bracketed root finding on that slope (each trial a point of the envelope at that T, or
P, whose sensitivity is the slope).

Quality lines (vapor fraction β of the feed) are the same system at 0 < β < 1, traced from
``P_start`` up to the neighbourhood of the critical point, where all of them meet.

References
----------
.. [1] Michelsen, M. L. (1980), Calculation of phase envelopes and critical points for
   multicomponent mixtures, Fluid Phase Equilib. 4, 1-10.
.. [2] Michelsen, M. L. & Mollerup, J. M. (2007), Thermodynamic Models: Fundamentals and
   Computational Aspects, 2nd ed., Tie-Line Publications, ch. 12 (phase envelopes,
   choice of the specified variable, step control).
"""

from __future__ import annotations

import html
from dataclasses import dataclass, field
from typing import Any

import numpy as np

from thermo_roots.equilibrium.fugacity import phase_fugacity
from thermo_roots.errors import InputError, WrongTypeError
from thermo_roots.equilibrium.saturation_points import (SATURATION_CAUTION, _check_model, _saturation_point,
                                                        _wilson_ln_k, feed_composition, newton_solve)
from thermo_roots.roots import find_root
from thermo_roots.units import to_si

#: Largest change along one step in ln T, ln P and any ln Kᵢ [-].
MAX_DLN_T = 0.02
MAX_DLN_P = 0.08
MAX_DLN_K = 0.1
#: First step in the specified variable [-] and the smallest before the trace gives up.
FIRST_STEP = 0.02
SMALLEST_STEP = 1e-7
#: Below this |ln K| of the marking component (and falling) the next step jumps over the
#: critical point; on the way there a step covers at most half the distance to ln K = 0, so
#: the points close in on it and the jump skips almost nothing of the curve.
CRITICAL_JUMP_LN_K = 0.03
#: A trace stops above this many times the highest component critical pressure [-].
PRESSURE_CAP_FACTOR = 10.0
#: A trace that needs this many steps in a row shorter than STALL_STEP has stalled.
STALL_COUNT = 8
STALL_STEP = 1e-4
#: Half-width in ln K of the pair of points the critical point is interpolated between [-].
CRITICAL_REFINE_LN_K = 0.01
#: A quality line stops when its largest |ln Kᵢ| falls below this (at the critical point).
QUALITY_END_LN_K = 0.03
#: Default lowest pressure of the envelope [Pa] and most points per curve.
DEFAULT_P_START = 1e5
DEFAULT_MAX_POINTS = 400


@dataclass(frozen=True)
class _Curve:
    """A traced curve: u (m, n + 2), sides, and the critical crossing if passed."""

    u: np.ndarray
    flipped: np.ndarray
    tangent: np.ndarray
    critical: tuple | None
    closed: bool
    note: str


def _tangent(sensitivity, previous=None, increasing=None):
    """du/ds normalised to max-norm 1, pointing the way of travel."""
    t = sensitivity / np.max(np.abs(sensitivity))
    if previous is not None:
        if np.dot(t, previous) < 0:
            t = -t
    elif increasing is not None and t[increasing] < 0:
        t = -t
    return t


def _step_limit(t, n):
    """The largest step h along t (max-norm 1) that keeps each log within its cap."""
    caps = np.r_[np.full(n, MAX_DLN_K), MAX_DLN_T, MAX_DLN_P]
    with np.errstate(divide="ignore"):
        return float(np.min(caps / np.abs(t)))


def _solve_point(model, u_guess, z, beta, spec, flipped, maxiter=12):
    result = newton_solve(model, u_guess[None], z, np.array([beta]), spec, np.array([u_guess[spec]]),
                          flipped=flipped, maxiter=maxiter)
    return result


def _trace(model, z, beta, u0, *, P_end, max_points, flipped=False, stop_near_critical=False):
    """Continuation from the point u0 at P_end, ln P rising first. ``flipped``: u0 is on the dew
    side (the feed phase takes the vapor root)."""
    n = z.size
    k_star = int(np.argmax(np.abs(u0[:n])))       # the ln K whose sign marks the side
    first = _solve_point(model, u0, z, beta, n + 1, flipped)
    if not first.converged[0]:
        return _Curve(np.empty((0, n + 2)), np.empty(0, dtype=bool), np.empty((0, n + 2)), None, False,
                      "the first point did not converge")
    points, flips = [first.u[0]], [flipped]
    t = _tangent(first.sensitivity[0], increasing=n + 1)
    tangents = [t]
    h = FIRST_STEP
    short = 0
    jump_failed = False
    fell = False
    ln_P_cap = np.log(PRESSURE_CAP_FACTOR * float(np.max(model.components.Pc)))
    critical, closed, note = None, False, ""
    while len(points) < max_points:
        u = points[-1]
        lnk = u[k_star]
        spec = int(np.argmax(np.abs(t)))
        step = min(h, _step_limit(t, n))
        heading_to_critical = critical is None and t[k_star] * lnk < 0
        if heading_to_critical:
            step = min(step, 0.5 * abs(lnk) / abs(t[k_star]))
        # jump only where ln K_k is the fastest-changing variable (the tangent is a good guide
        # across then) and not straight after a failed jump (come closer first)
        jump = heading_to_critical and abs(lnk) < CRITICAL_JUMP_LN_K and spec == k_star and not jump_failed
        if jump:
            spec = k_star
            guess = u + (2.0 * abs(lnk) / abs(t[k_star])) * t
            guess[k_star] = -lnk
        else:
            guess = u + step * t
        new_flip = flipped != jump
        result = _solve_point(model, guess, z, beta, spec, new_flip)
        ok = bool(result.converged[0]) and (np.sign(result.u[0, k_star]) != np.sign(lnk)) == jump
        jump_failed = jump and not ok
        if not ok:
            h /= 2.0
            if h < SMALLEST_STEP:
                T, P = np.exp(u[n]), np.exp(u[n + 1])
                note = (f"no further point found beyond T = {T:.6g} K, P = {P:.6g} Pa (the step fell below "
                        f"{SMALLEST_STEP:g}; at low temperature a cubic can enter a region of three phases there)")
                break
            continue
        u_new = result.u[0]
        t_new = _tangent(result.sensitivity[0], t)
        if jump:
            critical = _critical_point(model, z, beta, u, u_new, k_star, n, flipped)
            flipped = new_flip
            if stop_near_critical:
                break
        points.append(u_new)
        flips.append(flipped)
        tangents.append(t_new)
        t = t_new
        if u_new[n + 1] < u[n + 1]:
            fell = True
        elif fell and u_new[n + 1] > u[n + 1]:
            # a vapor-liquid envelope has one pressure maximum and no interior minimum; a cubic's
            # curve that turns up again goes on as liquid-liquid equilibrium (CO2 + nitrogen below
            # about 220 K by PR): end the envelope at the minimum
            points.pop(), flips.pop(), tangents.pop()
            note = (f"the curve turns up again at T = {np.exp(u[n]):.6g} K, P = {np.exp(u[n + 1]):.6g} Pa; beyond "
                    "it the cubic predicts liquid-liquid separation, not a vapor-liquid boundary")
            break
        if u_new[n + 1] > ln_P_cap:
            note = (f"the curve rises past {PRESSURE_CAP_FACTOR:g} times the highest component critical pressure "
                    f"near T = {np.exp(u_new[n]):.6g} K (a cubic's branch of liquid-liquid equilibrium at low "
                    "temperature, not a boundary of vapor and liquid)")
            break
        short = short + 1 if np.max(np.abs(u_new - u)) < STALL_STEP else 0
        if short >= STALL_COUNT:
            note = (f"no progress beyond T = {np.exp(u_new[n]):.6g} K, P = {np.exp(u_new[n + 1]):.6g} Pa (at low "
                    "temperature a cubic can enter a region of three phases there)")
            break
        if result.iterations[0] <= 3:
            h = min(1.5 * h, 1.0)
        elif result.iterations[0] > 6:
            h /= 2.0
        if stop_near_critical and np.max(np.abs(u_new[:n])) < QUALITY_END_LN_K:
            break
        if critical is not None and u_new[n + 1] < np.log(P_end):
            # past the start pressure on the other side: the last point exactly at P_end
            end_guess = _interpolate(points[-2], points[-1], n + 1, np.log(P_end))
            end = _solve_point(model, end_guess, z, beta, n + 1, flipped)
            points.pop(), flips.pop(), tangents.pop()
            if end.converged[0]:
                points.append(end.u[0])
                flips.append(flipped)
                tangents.append(_tangent(end.sensitivity[0], t))
            closed = True
            break
    else:
        note = f"stopped at max_points = {max_points} before the envelope closed"
    return _Curve(np.array(points), np.array(flips, dtype=bool), np.array(tangents), critical, closed, note)


def _critical_point(model, z, beta, u1, u2, k, n, flipped):
    """(T, P) where ln K_k = 0, between the two points u1, u2 either side of the critical point.

    Two more points, at ln K_k = ±δ (δ = :data:`CRITICAL_REFINE_LN_K`), are solved with ln K_k
    specified; ln T and ln P are then the polynomials in ln K_k through the points (cubic
    through four), taken at 0. No tangents enter: near the critical point a cubic's roots can
    switch within a finite-difference step, which spoils the Jacobian's sensitivities
    (measured for a six-component natural gas against CoolProp's critical-point search:
    0.6 K off with Hermite interpolation on them, 3e-8 relative with the four points). A
    refined point that does not converge is left out (lower degree)."""
    points = [u1]
    for u, flip in ((u1, flipped), (u2, not flipped)):
        target = np.sign(u[k]) * min(CRITICAL_REFINE_LN_K, 0.5 * abs(u[k]))
        guess = _interpolate(u1, u2, k, target)
        guess[k] = target
        result = _solve_point(model, guess, z, beta, k, flip, maxiter=40)
        if result.converged[0]:
            points.append(result.u[0])
    points = np.array(points + [u2])
    s = points[:, k]
    return tuple(float(np.exp(np.polyval(np.polyfit(s, points[:, j], len(s) - 1), 0.0))) for j in (n, n + 1))


def _from_both_ends(model, z, forward, P_start, max_points):
    """Where the trace from the bubble point did not close: trace from the dew point at P_start
    too and join the two (a gap of one NaN row between them where they do not meet).

    The usual cause is a cubic's three-phase region at low temperature on the bubble side (CO2
    with nitrogen below about 70 K at a few bar: the incipient vapor, nearly pure nitrogen,
    would be compressed past its own vapor root)."""
    n = z.size
    end = _end_point("dew", model, P_start, z)
    note = ""
    if end.status != "converged":
        return forward, (f"The envelope is not closed ({forward.note}); no dew point at P_start to trace "
                         "back from.")
    u0 = np.r_[-np.log(end.K), np.log(end.T), np.log(end.P)]   # the envelope's K: incipient / feed
    back = _trace(model, z, 0.0, u0, P_end=P_start, max_points=max_points, flipped=True)
    if back.closed or "turns up again" in back.note:
        parts = [back]                # the bubble start lay on the cubic's liquid-liquid branch
        if not back.closed:
            note = (f"The envelope is traced from the dew point at P_start only and ends on the bubble side: "
                    f"{back.note}.")
    else:
        parts = [forward, back]
        where = forward.note or back.note
        note = (f"The envelope has a gap: traced from both ends at P_start, the two parts do not meet ({where}). "
                "The cubic's answer there is not a plain two-phase boundary.")
    rows, flips, tangents = [], [], []
    for i, part in enumerate(parts):
        reverse = part is back
        if i:
            rows.append(np.full((1, n + 2), np.nan)), flips.append(np.array([part.flipped[-1]]))
            tangents.append(np.full((1, n + 2), np.nan))
        rows.append(part.u[::-1] if reverse else part.u)
        flips.append(part.flipped[::-1] if reverse else part.flipped)
        tangents.append(-part.tangent[::-1] if reverse else part.tangent)
    critical = forward.critical if forward.critical is not None else back.critical
    joined = _Curve(np.concatenate(rows), np.concatenate(flips), np.concatenate(tangents), critical, back.closed,
                    "" if back.closed else forward.note)
    return joined, note


def _end_point(kind, model, P, z):
    """The bubble or dew point at P without the envelope fallback (which would call back here)."""
    return _saturation_point(kind, model, None, P, z, "lower", "nan", 40, fallback=False)


def _interpolate(u1, u2, index, value):
    """The point on the segment u1 → u2 where u[index] = value (linear)."""
    w = (value - u1[index]) / (u2[index] - u1[index])
    return u1 + w * (u2 - u1)


def _extreme(model, z, curve, index, n):
    """The highest T (index n) or P (index n + 1) of the curve, solved exactly: (u, position).

    Around the highest traced point the curve is parameterized by the other variable (P for
    the cricondentherm, T for the cricondenbar); the point where d u[index] / d u[other] = 0
    (that slope is the sensitivity of the point solved with u[other] specified) is found by
    bracketed root finding between the neighbours, where the slope changes sign. ``position``
    is where the point falls between the traced rows (a fractional index), None when the
    traced point itself is kept (an end of the curve, a gap, the critical point next to it,
    or no sign change)."""
    u = curve.u
    i = int(np.nanargmax(u[:, index]))
    if i == 0 or i == len(u) - 1 or not np.isfinite(u[i - 1:i + 2]).all() \
            or len(set(curve.flipped[i - 1:i + 2].tolist())) > 1:
        return u[i], None
    other = n + 1 if index == n else n
    flip = bool(curve.flipped[i])
    near = u[i - 1:i + 2]
    order = np.argsort(near[:, other])

    def solve_at(x):
        guess = np.array([np.interp(x, near[order, other], near[order, j]) for j in range(n + 2)])
        return _solve_point(model, guess, z, 0.0, other, flip, maxiter=20)

    def slope(x, _rows):
        out = np.full(np.shape(x), np.nan)
        for r, value in enumerate(np.atleast_1d(x)):
            solved = solve_at(value)
            if solved.converged[0]:
                out.flat[r] = solved.sensitivity[0, index]
        return out

    lo, hi = float(near[order[0], other]), float(near[order[-1], other])
    ends = slope(np.array([lo, hi]), None)
    if not (np.isfinite(ends).all() and ends[0] * ends[1] < 0):
        return u[i], None
    found = find_root(slope, bracket=(np.array([lo]), np.array([hi])), args=(np.array([0]),), xtol=1e-12,
                      trace=False)
    if not bool(np.asarray(found.converged)[0]):
        return u[i], None
    top = solve_at(float(np.asarray(found.root)[0]))
    if not top.converged[0] or top.u[0, index] < u[i, index]:
        return u[i], None
    x = top.u[0, other]
    j = i - 1 if (x - u[i, other]) * (u[i - 1, other] - u[i, other]) > 0 else i
    w = (x - u[j, other]) / (u[j + 1, other] - u[j, other])
    return top.u[0], j + min(max(float(w), 0.01), 0.99)


def _with_special_points(model, z, curve, n):
    """The curve with the critical point (once as the last bubble point, once as the first dew
    point) and the refined cricondenbar and cricondentherm inserted in their places, so that
    each side's points run all the way to the critical point and the extremes are on the
    curve. Returns (u, flipped, cricondenbar u, cricondentherm u)."""
    rows = [(float(i), row, bool(f)) for i, (row, f) in enumerate(zip(curve.u, curve.flipped))]
    if curve.critical is not None:
        flips = curve.flipped
        for j in np.flatnonzero(flips[:-1] != flips[1:]):
            if not np.isfinite(curve.u[j]).all() or not np.isfinite(curve.u[j + 1]).all():
                continue
            k = int(np.argmax(np.abs(curve.u[j, :n])))
            w = float(curve.u[j, k] / (curve.u[j, k] - curve.u[j + 1, k]))
            at = np.r_[np.zeros(n), np.log(curve.critical[0]), np.log(curve.critical[1])]
            rows += [(j + w - 1e-6, at, bool(flips[j])), (j + w + 1e-6, at, bool(flips[j + 1]))]
    extremes = []
    for index in (n + 1, n):
        u_top, position = _extreme(model, z, curve, index, n)
        if curve.critical is not None and np.log(curve.critical[index - n]) > u_top[index]:
            u_top = np.r_[np.zeros(n), np.log(curve.critical[0]), np.log(curve.critical[1])]
            position = None            # a near-azeotrope's highest point can be the critical one
        extremes.append(u_top)
        if position is not None:
            rows.append((position, u_top, bool(curve.flipped[int(position)])))
    rows.sort(key=lambda r: r[0])
    return np.array([r[1] for r in rows]), np.array([r[2] for r in rows]), extremes[0], extremes[1]


@dataclass(frozen=True)
class PhaseEnvelope:
    """The traced phase envelope of a mixture model.

    Attributes
    ----------
    T, P : ndarray
        Temperature [K] and pressure [Pa] along the envelope, from the bubble point at
        ``P_start`` over the critical point to the dew point at ``P_start``.
    side : ndarray of str
        "bubble" or "dew" per point.
    incipient : ndarray, shape (m, n)
        Composition of the phase that appears at each point [-].
    v_feed, v_incipient : ndarray
        Molar volumes [m³/mol] of the feed phase and of the incipient phase at each point.
    critical : (T [K], P [Pa]) or None
        Where the two sides meet (None if the trace did not reach it).
    cricondenbar, cricondentherm : (T [K], P [Pa])
        The highest pressure and the highest temperature of the envelope.
    quality : dict
        Vapor fraction β → (T [K], P [Pa]) arrays of each quality line asked for, from
        ``P_start`` to the critical point.
    closed : bool
        True when the trace came back down to ``P_start`` on the dew side.
    warnings : tuple of str
    """

    model: Any = field(repr=False)
    z: Any = field(repr=False)
    T: Any = field(repr=False)
    P: Any = field(repr=False)
    side: Any = field(repr=False)
    incipient: Any = field(repr=False)
    v_feed: Any = field(repr=False)
    v_incipient: Any = field(repr=False)
    critical: Any
    cricondenbar: Any
    cricondentherm: Any
    quality: dict = field(repr=False, default_factory=dict)
    closed: bool = True
    warnings: tuple = field(repr=False, default=())
    _u: Any = field(repr=False, default=None)
    _flipped: Any = field(repr=False, default=None)

    def to_frame(self):
        """The envelope's points as a pandas DataFrame: T [K], P [Pa], side, v_feed and
        v_incipient [m³/mol], and the incipient phase's mole fractions as "incipient
        <component>"; units and the special points in ``attrs``."""
        import pandas as pd

        frame = pd.DataFrame({"T": self.T, "P": self.P, "side": self.side, "v_feed": self.v_feed,
                              "v_incipient": self.v_incipient})
        for j, name in enumerate(self.model.components.names):
            frame[f"incipient {name}"] = self.incipient[:, j]
        frame.attrs.update(units={"T": "K", "P": "Pa", "v_feed": "m³/mol", "v_incipient": "m³/mol"}, model=self.model.name, critical=self.critical,
                           cricondenbar=self.cricondenbar, cricondentherm=self.cricondentherm,
                           composition=dict(zip(self.model.components.names, np.asarray(self.z).tolist())))
        return frame

    def _label(self):
        return " + ".join(f"{n} {zi:.4g}" for n, zi in zip(self.model.components.names, np.asarray(self.z)))

    @staticmethod
    def _point(p):
        return "–" if p is None else f"{p[0]:.6g} K, {p[1] / 1e5:.6g} bar"

    def __repr__(self):
        text = (f"PhaseEnvelope({self.model.name}, {self._label()}: {len(self.T)} points, critical "
                f"{self._point(self.critical)}, cricondenbar {self._point(self.cricondenbar)}, cricondentherm "
                f"{self._point(self.cricondentherm)}"
                + (f", quality lines {sorted(self.quality)}" if self.quality else "") + ")")
        return text + "".join(f"\nWarning: {w}" for w in self.warnings)

    def _repr_html_(self):
        title = html.escape(f"Phase envelope, {self.model.name}: {self._label()}")
        rows = [("points", f"{len(self.T)} ({int(np.sum(self.side == 'bubble'))} bubble, "
                           f"{int(np.sum(self.side == 'dew'))} dew)"),
                ("critical point", self._point(self.critical)),
                ("cricondenbar", self._point(self.cricondenbar)),
                ("cricondentherm", self._point(self.cricondentherm)),
                ("lowest pressure", f"{np.min(self.P) / 1e5:.6g} bar")]
        if self.quality:
            rows.append(("quality lines (vapor fraction)", ", ".join(f"{b:g}" for b in sorted(self.quality))))
        table = "".join(f"<tr><th style='text-align:left'>{html.escape(k)}</th><td>{html.escape(v)}</td></tr>"
                        for k, v in rows)
        notes = "".join(f"<p><b>Warning.</b> {html.escape(w)}</p>" for w in self.warnings)
        caution = f"<p style='font-size:smaller'><b>Caution.</b> {html.escape(SATURATION_CAUTION)}</p>"
        return f"<div><b>{title}</b><table>{table}</table>{notes}{caution}</div>"


def _check_qualities(qualities):
    try:
        values = [float(b) for b in qualities]
    except (TypeError, ValueError):
        raise WrongTypeError(f"phase_envelope: qualities must be vapor fractions between 0 and 1, e.g. "
                             f"(0.25, 0.5, 0.75); got {qualities!r}.") from None
    bad = [b for b in values if not (0.0 < b < 1.0)]
    if bad:
        raise InputError(f"phase_envelope: a quality line needs a vapor fraction strictly between 0 and 1 (0 and 1 "
                         f"are the envelope itself); got {bad[0]!r}.")
    return values


def phase_envelope(model, *, z=None, qualities=(), P_start=DEFAULT_P_START, max_points=DEFAULT_MAX_POINTS):
    """Trace the phase envelope of a mixture model through its critical point.

    Parameters
    ----------
    model : CubicModel
        A cubic mixture model (constants, kᵢⱼ).
    z : array_like, optional
        Feed mole fractions [-]; default the model's.
    qualities : sequence of float
        Vapor fractions β [-] (0 < β < 1) whose lines to trace as well.
    P_start : float or str
        The lowest pressure [Pa] ("1 bar"): the envelope starts at the bubble point there and
        ends at the dew point there.
    max_points : int
        Most points of the envelope (and of each quality line).

    Returns
    -------
    PhaseEnvelope

    Raises
    ------
    InputError
        A bad z, P_start, quality or max_points; no bubble point at ``P_start`` (the message
        says what to try).

    References
    ----------
    Michelsen (1980), Fluid Phase Equilib. 4, 1-10; Michelsen & Mollerup (2007) ch. 12.
    """
    _check_model(model, "phase_envelope")
    z = feed_composition(model, z, "phase_envelope")
    P_start = float(to_si(P_start, "P"))
    if not P_start > 0:
        raise InputError(f"phase_envelope: P_start must be a positive pressure; got {P_start!r} Pa.")
    if isinstance(max_points, bool) or not isinstance(max_points, (int, np.integer)) or max_points < 10:
        raise InputError(f"phase_envelope: max_points must be a whole number >= 10; got {max_points!r}.")
    betas = _check_qualities(qualities)
    n = model.n_components
    if np.count_nonzero(z) < 2:
        raise InputError("phase_envelope needs a feed of two or more components; a pure fluid's envelope is its "
                         "saturation curve: use thermo_roots.saturation(model, T=...) or plots.plot_saturation_curve.")
    start = _end_point("bubble", model, P_start, z)
    if start.status != "converged":
        why = str(start.reason).split("; near the critical point")[0]   # its advice points back here
        raise InputError(f"phase_envelope: no bubble point at P_start = {P_start:.6g} Pa to start from ({why}). "
                         "Try another P_start, e.g. P_start='0.5 bar' or '5 bar'; a feed rich in a component far "
                         "above its critical temperature (hydrogen, helium) may have no bubble point a cubic "
                         "can reach at low pressure.")
    u0 = np.r_[np.log(start.K), np.log(start.T), np.log(start.P)]
    curve = _trace(model, z, 0.0, u0, P_end=P_start, max_points=int(max_points))
    warnings = []
    if not curve.closed:
        curve, note = _from_both_ends(model, z, curve, P_start, int(max_points))
        if note:
            warnings.append(note)
    if curve.critical is None:
        warnings.append("The trace did not pass a critical point.")
    u, flipped, top_P, top_T = _with_special_points(model, z, curve, n)
    K = np.exp(u[:, :n])
    incipient = K * z
    incipient /= incipient.sum(axis=1, keepdims=True)
    side = np.where(flipped, "dew", "bubble")
    v_feed, v_incipient = _volumes(model, z, u, flipped, incipient)
    cricondenbar = (float(np.exp(top_P[n])), float(np.exp(top_P[n + 1])))
    cricondentherm = (float(np.exp(top_T[n])), float(np.exp(top_T[n + 1])))
    quality = {}
    for beta in betas:
        line = _quality_line(model, z, beta, start, P_start, int(max_points))
        if line is None:
            warnings.append(f"The quality line {beta:g} could not be started at P_start.")
            continue
        T_line, P_line = np.exp(line.u[:, n]), np.exp(line.u[:, n + 1])
        if curve.critical is not None:
            T_line, P_line = np.r_[T_line, curve.critical[0]], np.r_[P_line, curve.critical[1]]
        quality[beta] = (T_line, P_line)
    return PhaseEnvelope(model, z, np.exp(u[:, n]), np.exp(u[:, n + 1]), side, incipient, v_feed, v_incipient,
                         curve.critical, cricondenbar, cricondentherm, quality, curve.closed, tuple(warnings), u,
                         flipped)


def _volumes(model, z, u, flipped, incipient):
    """Molar volumes [m³/mol] of the feed and the incipient phase at each point (liquid root for
    the liquid of the side, vapor root for its vapor)."""
    n = z.size
    T, P = np.exp(u[:, n]), np.exp(u[:, n + 1])
    v_feed, v_incipient = np.full(T.size, np.nan), np.full(T.size, np.nan)
    with np.errstate(all="ignore"):
        for dew in (False, True):
            rows = np.flatnonzero((flipped == dew) & np.isfinite(T))
            if rows.size:
                feed_root, incipient_root = ("vapor", "liquid") if dew else ("liquid", "vapor")
                v_feed[rows] = phase_fugacity(model, T[rows], P[rows], np.broadcast_to(z, (rows.size, n)),
                                              root=feed_root).v
                v_incipient[rows] = phase_fugacity(model, T[rows], P[rows], incipient[rows], root=incipient_root).v
    return v_feed, v_incipient


def _quality_line(model, z, beta, bubble, P_start, max_points):
    """The line of vapor fraction β from P_start towards the critical point."""
    n = model.n_components
    dew = _end_point("dew", model, P_start, z)
    if dew.status != "converged":
        return None
    T_guess = bubble.T + beta * (dew.T - bubble.T)
    ln_K = _wilson_ln_k(model, np.array([T_guess]), np.array([P_start]))[0]
    for guess in (np.r_[ln_K, np.log(T_guess), np.log(P_start)],
                  np.r_[(1 - beta) * np.log(bubble.K) + beta * np.log(dew.K), np.log(T_guess), np.log(P_start)]):
        first = _solve_point(model, guess, z, beta, n + 1, False, maxiter=40)
        if first.converged[0] and np.max(np.abs(first.u[0, :n])) > 1e-3:
            return _trace(model, z, beta, first.u[0], P_end=P_start, max_points=max_points, stop_near_critical=True)
    return None


def envelope_starts(model, z, kind, spec, values, branch, envelope=None):
    """Starts for Newton's method on a branch of bubble (β = 0) or dew (β = 1) points.

    Where the traced envelope's ``kind`` side meets T = value (``spec`` "T") or P = value,
    the crossing with the lowest (``branch`` "lower") or highest ("upper") other variable, when
    there are two or more ("upper") or at least one ("lower"). Returns u0 (m, n + 2) in the
    variables of the β of ``kind`` (ln K = ln(y/x)), a bool array (False where there is no
    such crossing) and each crossing's segment of the envelope, (m, 2, n + 2), in the
    envelope's own variables (ln K = ln(incipient/feed)).
    """
    n = model.n_components
    env = phase_envelope(model, z=z) if envelope is None else envelope
    u, flipped = env._u, env._flipped
    on_side = flipped if kind == "dew" else ~flipped
    index = n if spec == "T" else n + 1
    other = n + 1 if spec == "T" else n
    u0 = np.full((values.size, n + 2), np.nan)
    segments = np.full((values.size, 2, n + 2), np.nan)
    found = np.zeros(values.size, dtype=bool)
    for k, value in enumerate(np.log(values)):
        crossings = []
        for i in range(len(u) - 1):
            if not (on_side[i] and on_side[i + 1]):
                continue
            a, b = u[i, index] - value, u[i + 1, index] - value
            if a == 0 or a * b < 0:
                crossings.append((_interpolate(u[i], u[i + 1], index, value), i))
        need = 2 if branch == "upper" else 1
        if len(crossings) >= need:
            pick = max if branch == "upper" else min
            best, i = pick(crossings, key=lambda c: c[0][other])
            segments[k] = u[i], u[i + 1]
            if kind == "dew":
                best = best.copy()
                best[:n] = -best[:n]        # the envelope's K is incipient/feed; a dew point's y/x
            u0[k], found[k] = best, True
    return u0, found, segments


#: Near the critical point (every |ln Kᵢ| of a segment below this) a point is found by
#: bracketing along the envelope instead of by Newton's method at the given T or P.
NEAR_CRITICAL_LN_K = 0.1
#: The end of such a bracket at the critical point itself is moved to |ln K| = this [-]: at
#: ln K = 0 every (T, P) solves the system (the trivial solution).
CRITICAL_OFFSET_LN_K = 1e-3


def near_critical_points(model, z, kind, spec, values, segments):
    """Points of the envelope at T (or P) = values near the critical point, by bracketed root
    finding along the envelope: the unknown is s = ln K_k of the marking component k, each
    trial a point of the envelope solved with ln K_k = s specified (so never the trivial
    solution), and the function ln T(s) − ln T_given (or in P), which changes sign over the
    segment of the envelope that crosses the given value.

    Returns u (m, n + 2) in the variables of the β of ``kind`` and a bool array of successes.
    References: Michelsen (1980) (ln K as the specified variable near the critical point).
    """
    n = model.n_components
    m = values.size
    k = np.argmax(np.abs(segments[:, 0, :n]) + np.abs(segments[:, 1, :n]), axis=1)
    rows = np.arange(m)
    along = segments[rows[:, None], [0, 1], k[:, None]]                # (m, 2): s at each end
    sign = np.sign(along[:, 0] + along[:, 1])
    ends = np.where(np.abs(along) < CRITICAL_OFFSET_LN_K, sign[:, None] * CRITICAL_OFFSET_LN_K, along)
    index = n if spec == "T" else n + 1
    target = np.log(values)
    flipped = kind == "dew"

    def solve_at(s, i):
        w = (s - along[i, 0]) / (along[i, 1] - along[i, 0])
        guess = segments[i, 0] + w[:, None] * (segments[i, 1] - segments[i, 0])
        guess[np.arange(i.size), k[i]] = s
        return newton_solve(model, guess, z, np.zeros(i.size), k[i], s, flipped=flipped, maxiter=30)

    def point(s, i):
        solved = solve_at(s, i)
        return np.where(solved.converged, solved.u[:, index] - target[i], np.nan)

    result = find_root(point, bracket=(ends[:, 0], ends[:, 1]), args=(rows,), xtol=1e-12, trace=False)
    ok = np.asarray(result.converged)
    u = np.full((m, n + 2), np.nan)
    if ok.any():
        good = rows[ok]
        solved = solve_at(np.asarray(result.root)[ok], good)
        u[good] = np.where(solved.converged[:, None], solved.u, np.nan)
    ok &= np.isfinite(u).all(axis=1)
    if kind == "dew":
        u[:, :n] = -u[:, :n]
    return u, ok
