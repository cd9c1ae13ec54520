"""The pair solvers of the volumetric knowns: (T, P), (T, v), (P, v), and quality with T or P.

Each takes the flat SI knowns of the elements to solve and a Problems of the same size (to
flag what it cannot solve) and returns the state's parts; "convergence" is the root
finder's result with the flat indices it covers. The brackets come from the physics: v > b
and the repulsive term for (T, P) -> v, the concavity of P(T) on an isochore for (P, v) -> T.

References
----------
Soave, G. (1972), Chem. Eng. Sci. 27, 1197-1203 (the alpha function and its convexity).
"""

from __future__ import annotations

import numpy as np

from ..errors import ConvergenceError, DomainError
from ..models import R
from ..roots import find_root
from ._problems import Problems
from .cubic import model_roots, model_stable_roots
from .phases import _branch_index, _root_kinds, _single_phase, phase_codes
from .results import _shaped_convergence
from .saturation import saturation_pressure, saturation_temperature

def _from_T_P(model, flat, problems, branch):
    T, P = flat["T"], flat["P"]
    with np.errstate(all="ignore"):   # overflowing coefficients are flagged as unfinite after
        v_roots, stable, v, phase = model_stable_roots(model, T, P)
    if branch == "stable":
        metastable = np.zeros(T.shape, bool)
    else:
        chosen = _branch_index(_root_kinds(model, T, v_roots), stable, branch)
        v = np.take_along_axis(v_roots, chosen[..., None], axis=-1)[..., 0]
        phase = phase_codes(model, T, P, v)
        metastable = chosen != stable
    return dict(T=T, P=P, v=v, phase=phase, roots=v_roots, metastable=metastable)


def _from_T_v(model, flat, problems, branch=None):
    T, v = flat["T"], flat["v"]
    with np.errstate(all="ignore"):
        P = np.asarray(model.pressure(T, v), dtype=float)
    quality, v_l, v_v = (np.full(T.shape, np.nan) for _ in range(3))
    phase = np.asarray(_single_phase(model, T, P, v), dtype=object)
    if model.has_saturation:
        sub = T < model.fluid.Tc
        if np.any(sub):
            P_sat, vl, vv, _ = saturation_pressure(model, T[sub], strict=False)
            idx = _lever_rule(v, sub, P_sat, vl, vv, P, v_l, v_v, quality)
            phase[idx] = "two-phase"
    problems.flag(~(P > 0.0) & (phase != "two-phase"), lambda i: (
        f"at T = {T[i]:.6g} K and v = {v[i]:.6g} m³/mol {model.name} gives P = {P[i]:.6g} Pa, not above zero, "
        "and no saturation state holds this volume (the model has none at this T): this volume lies on the "
        "unstable loop of a low isotherm."))
    return dict(T=T, P=P, v=v, phase=phase, quality=quality, v_liquid=v_l, v_vapor=v_v,
                roots=model_roots(model, T, P))


def _from_P_v(model, flat, problems, branch=None):
    P, v = flat["P"], flat["v"]
    quality, v_l, v_v = (np.full(P.shape, np.nan) for _ in range(3))
    T, T_other = np.full(P.shape, np.nan), np.full(P.shape, np.nan)
    inside = np.zeros(P.shape, bool)
    sub = (P < model.fluid.Pc) & model.has_saturation
    convergence = None
    if np.any(sub):
        T_sat, vl, vv, result = saturation_temperature(model, P[sub], strict=False)
        inside[_lever_rule(v, sub, T_sat, vl, vv, T, v_l, v_v, quality)] = True
        if inside.all() and result is not None and np.size(result.root) == inside.size:
            convergence = (result, np.arange(inside.size))   # all two-phase: the saturation solve
    single = ~inside
    if np.any(single):
        T[single], T_other[single], result = _temperature_at(model, P[single], v[single],
                                                            problems, np.flatnonzero(single))
        convergence = (result, np.flatnonzero(single))
    phase = np.asarray(_single_phase(model, T, P, v), dtype=object)
    phase[inside] = "two-phase"
    return dict(T=T, P=P, v=v, phase=phase, quality=quality, v_liquid=v_l, v_vapor=v_v,
                roots=model_roots(model, T, P), convergence=convergence, T_other=T_other)


def temperature_bracket(model, P, v):
    """Temperatures [K] that bracket the lowest T with P(T, v) = P [Pa] at fixed v [m^3/mol].

    T_lo = P (v - b)/R, where P(T_lo, v) <= P because the attraction term is never
    negative. T_hi starts at (P + a(T_lo)/D(v)) (v - b)/R, where P(T_hi, v) >= P while a(T)
    falls, and is doubled while P(T_hi) < P and P still rises with T; where P(T) peaks
    first (see solve's Notes), T_hi is the peak. NaN where no temperature gives P at v.
    """
    shape = np.broadcast(np.asarray(P), np.asarray(v)).shape
    P, v = (np.broadcast_to(np.asarray(x, dtype=float), shape).ravel() for x in (P, v))
    T_lo, T_hi, found = _grow_temperature_bracket(model, P, v)
    if not np.all(found):
        T_peak, P_peak = _isochore_peak(model, T_lo[~found], T_hi[~found], P[~found], v[~found])
        T_hi[~found] = np.where(P_peak >= P[~found], T_peak, np.nan)
    return T_lo.reshape(shape), T_hi.reshape(shape)


def _grow_temperature_bracket(model, P, v):
    """(T_lo, T_hi, found): found where P(T_hi) >= P; elsewhere P(T) peaks inside [T_lo, T_hi]."""
    P, v = np.atleast_1d(P).astype(float), np.atleast_1d(v).astype(float)
    P, v = np.broadcast_arrays(P, v)
    T_lo = P * (v - model.v_min) / R
    # the attraction a(T_lo)/D(v) is the repulsive term's excess over P(T_lo, v), which is P
    # at T_lo: asked of the protocol's pressure alone (zero for the ideal gas, where T_lo is the root)
    with np.errstate(over="ignore", invalid="ignore"):
        attraction_lo = np.maximum(P - model.pressure(T_lo, v), 0.0)
    T_hi = (P + attraction_lo) * (v - model.v_min) / R * (1.0 + 1e-12)
    with np.errstate(over="ignore", invalid="ignore"):
        found = model.pressure(T_hi, v) >= P
        for _ in range(64):   # rarely needed: only where the Soave alpha has turned upwards
            if found.all():
                break
            short = ~found
            short[short] = model.dP_dT(T_hi[short], v[short]) > 0.0   # still rising: double
            if not np.any(short):
                break
            T_hi = np.where(short, 2.0 * T_hi, T_hi)
            found[short] = model.pressure(T_hi[short], v[short]) >= P[short]
    return T_lo, T_hi, found


def _isochore_peak(model, T_lo, T_hi, P, v):
    """(T_peak, P_peak) of the concave P(T) at fixed v between T_lo and T_hi [K].

    Where P already falls at T_lo, the peak is T_lo itself (no higher T reaches more).
    """
    with np.errstate(all="ignore"):
        rising = model.dP_dT(T_lo, v) > 0.0
    T_peak = np.array(T_lo, dtype=float)
    if np.any(rising):
        T_peak[rising] = _bracketed(_isochore_slope, T_lo[rising], T_hi[rising],
                                    (v[rising], P[rising], model), False)[0]
    with np.errstate(all="ignore"):
        P_peak = np.where(np.isfinite(T_peak), model.pressure(np.where(np.isfinite(T_peak), T_peak, 1.0), v), -np.inf)
    return T_peak, P_peak


def volume_bracket(model, T, P):
    """Molar volumes [m^3/mol] that bracket at least one root of P(T, v) = P at T [K], P [Pa].

    Just above the co-volume P(T, v) rises without bound; at v_min + RT/P the repulsive
    term alone equals P, so the attraction makes P(T, v) < P there. With three roots a
    bracketed method finds one of them, not necessarily the stable one.
    """
    T, P = np.asarray(T, dtype=float), np.asarray(P, dtype=float)
    return model.v_min + 1e-9 * model.b, model.v_min + R * T / P


def pressure_gap(T, v, P, model):
    """Residual P(T, v)/P - 1 [-] of the (P, v) -> T and (T, P) -> v inversions."""
    return model.pressure(T, v) / P - 1.0


def _isochore_slope(T, v, P, model):
    """(dP/dT) at fixed v, scaled by T/P [-]: zero at the peak of P(T) on the isochore."""
    return model.dP_dT(T, v) * T / P


def _lever_rule(v, sub, sat_value, vl, vv, target, v_l, v_v, quality):
    """Fill the states of ``sub`` whose v lies inside the dome; return their indices.

    ``sat_value`` (the saturation P or T of the ``sub`` states) goes into ``target``, the
    saturated volumes into v_l, v_v and the lever-rule quality into ``quality``.
    """
    inside = (v[sub] > vl) & (v[sub] < vv)
    idx = np.flatnonzero(sub)[inside]
    target[idx], v_l[idx], v_v[idx] = sat_value[inside], vl[inside], vv[inside]
    quality[idx] = (v[idx] - v_l[idx]) / (v_v[idx] - v_l[idx])
    return idx


def _bracketed(f, lo, hi, args, scalar):
    """find_root on [lo, hi]; a one-element problem is solved as a scalar (with its trace)."""
    options = dict(xtol=0.0, rtol=4.0 * np.finfo(float).eps, maxiter=200)
    if scalar:
        result = find_root(f, bracket=(float(lo[0]), float(hi[0])),
                           args=tuple(float(a[0]) if isinstance(a, np.ndarray) else a for a in args),
                           trace=True, **options)
        return np.atleast_1d(result.root), np.atleast_1d(result.converged), result
    result = find_root(f, bracket=(lo, hi), args=args, trace=False, **options)
    return np.asarray(result.root), np.asarray(result.converged), result


def _temperature_at(model, P, v, problems=None, where=None):
    """T [K] with P(T, v) = P, the lowest one, and the second where there is one (see solve).

    P [Pa], v [m^3/mol]: 1-D arrays. ``problems`` collects what cannot be solved (a fresh
    one, not strict, by default); ``where``: the flat indices of these elements in it.
    Returns (T, T_other, the root finder's result for T).
    """
    if problems is None:
        problems, where = Problems(P.size, P.shape, strict=False), np.arange(P.size)
    scalar = P.size == 1 and problems.shape == ()
    T_lo, T_hi, found = _grow_temperature_bracket(model, P, v)
    T = np.full(P.shape, np.nan)
    T_other = np.full(P.shape, np.nan)
    unreachable = np.zeros(P.shape, bool)
    peak = ~found
    if np.any(peak):   # P(T) at this v peaks below T_hi: find the peak, check it reaches P
        i = np.flatnonzero(peak)
        T_peak, P_peak = _isochore_peak(model, T_lo[i], T_hi[i], P[i], v[i])
        short = ~(P_peak >= P[i])
        unreachable[i[short]] = True
        T_hi[i[~short]] = T_peak[~short]
        problems.flag_at(where[i[short]], [
            f"no temperature gives P = {P[k]:.6g} Pa at v = {v[k]:.6g} m³/mol in {model.name} for {model.fluid.name}: "
            f"at this volume the model's pressure rises with T only to {pk:.6g} Pa (at T = {tk:.6g} K). "
            "Check the volume and pressure." for k, pk, tk in zip(i[short], P_peak[short], T_peak[short])],
            kind=DomainError)
    go = ~unreachable
    result = None
    if np.any(go):
        root, converged, result = _bracketed(pressure_gap, T_lo[go], T_hi[go], (v[go], P[go], model), scalar)
        T[go] = np.where(converged, root, np.nan)
        failed = np.flatnonzero(go)[~converged]
        status = np.atleast_1d(np.asarray(result.status, dtype=object))[~converged]
        if failed.size:   # the record attached to an error is in the caller's shape and indices
            record = _shaped_convergence((result, where[np.flatnonzero(go)]), problems, problems.shape)
            problems.flag_at(where[failed], [
                f"the temperature at P = {P[k]:.6g} Pa, v = {v[k]:.6g} m³/mol did not converge ({st})."
                for k, st in zip(failed, status)], kind=ConvergenceError, result=record)
        T_other[go] = _second_temperature(model, T[go], P[go], v[go])
    return T, T_other, result


def _second_temperature(model, T1, P, v):
    """The higher temperature [K] with P(T, v) = P past the peak of P(T), NaN where none.

    P(T) is concave, so beyond the first root it falls below P again only if its slope
    turns negative; that is checked once at 10^6 T1 (beyond, no temperature matters).
    The bracket is then grown by doubling from 2 T1 until P(T) < P.
    """
    out = np.full(T1.shape, np.nan)
    with np.errstate(all="ignore"):
        falls = np.isfinite(T1) & (model.dP_dT(1e6 * np.where(np.isfinite(T1), T1, 1.0), v) < 0.0)
    if not np.any(falls):
        return out
    i = np.flatnonzero(falls)
    lo, hi = T1[i], 2.0 * T1[i]
    with np.errstate(all="ignore"):
        for _ in range(24):   # 2^24 > 10^6
            above = model.pressure(hi, v[i]) >= P[i]
            if not np.any(above):
                break
            lo, hi = np.where(above, hi, lo), np.where(above, 2.0 * hi, hi)
        crossed = model.pressure(hi, v[i]) < P[i]
    lo = np.where(lo == T1[i], T1[i] * (1.0 + 1e-9), lo)   # step off the first root
    if np.any(crossed):
        k = i[crossed]
        root, converged, _ = _bracketed(pressure_gap, lo[crossed], hi[crossed], (v[k], P[k], model), False)
        out[k] = np.where(converged & (root > T1[k] * (1.0 + 1e-9)), root, np.nan)
    return out


def _from_quality(model, flat, problems, branch=None):
    q = flat["quality"]
    if "T" in flat:
        T = flat["T"]
        problems.flag(T < _lowest_saturation_temperature(model, T), lambda i: (
            f"no saturation from {model.name} for {model.fluid.name} at T = {T[i]:.6g} K: "
            f"{_no_saturation_reason(model, T[i], np.nan)}"), kind=DomainError)
        if not problems.ok.all():
            T = np.where(problems.ok, T, model.fluid.Tc)   # placeholders, NaN in the result
        P, v_l, v_v, result = saturation_pressure(model, T, strict=False)
        what = lambda i: f"T = {T[i]:.6g} K"
    else:
        P = flat["P"]
        T, v_l, v_v, result = saturation_temperature(model, P, strict=False)
        what = lambda i: f"P = {P[i]:.6g} Pa"
    problems.flag(~np.isfinite(v_l) | ~np.isfinite(T) | ~np.isfinite(P), lambda i: (
        f"no saturation from {model.name} for {model.fluid.name} at {what(i)}: {_no_saturation_reason(model, T[i], P[i])}"))
    v = v_l + q * (v_v - v_l)
    phase = np.full(q.shape, "two-phase", dtype=object)
    return dict(T=T, P=P, v=v, phase=phase, quality=q, v_liquid=v_l, v_vapor=v_v,
                roots=model_roots(model, T, P),
                convergence=None if result is None else (result, np.arange(np.size(result.root))))




def _lowest_saturation_temperature(model, T):
    """The model's lowest saturation temperature [K], worked out only if some T is low."""
    from .saturation import lowest_saturation_temperature

    if not model.has_saturation:
        return 0.0
    return lowest_saturation_temperature(model) if np.any(T < 0.35 * model.fluid.Tc) else 0.0


def _no_saturation_reason(model, T, P):
    from .saturation import lowest_saturation_temperature

    T_min = lowest_saturation_temperature(model)
    return (f"below T = {T_min:.4g} K the model's saturation pressure is under the smallest it resolves; "
            f"give T of at least {T_min:.4g} K (the real fluid is solid there long before).")


