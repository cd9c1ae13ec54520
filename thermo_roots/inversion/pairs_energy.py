"""The pair solvers with an energy: (P, h), (P, s), (T, h), (T, s), (h, s) and (u, v).

Every bracket comes from the physics, written beside each solver: at fixed P, h and s rise
with T (cp > 0); at fixed v, u rises with T (cv > 0); at fixed T, s rises with v (Maxwell:
(ds/dv)_T = (dP/dT)_v > 0) and h has at most one minimum in v (where mu_JT = 0); at fixed
s, h rises with P ((dh/dP)_s = v > 0). The two-phase segment of each is solved for the
quality in closed form, since h, s and u are linear in quality (lever rule).

References
----------
Michelsen, M. L. & Mollerup, J. M. (2007), Thermodynamic Models: Fundamentals and
Computational Aspects, 2nd ed., ch. 2 (the property relations) and ch. 3.
Chandrupatla, T. R. (1997), Adv. Eng. Software 28, 145-149 (the bracketed root finder).
"""

from __future__ import annotations

import numpy as np

from ..errors import DomainError, InputError
from ..models import R
from ..roots import find_root
from ._problems import Problems
from .cubic import model_roots, model_stable_roots
from .knowns import _energy_quote, _unit
from .pairs_volume import _from_T_v, _lowest_saturation_temperature, _no_saturation_reason
from .phases import _single_phase
from .results import _caloric_on_reference, _joined_convergence, _record_part, mixture_caloric
from .saturation import saturation_pressure, saturation_temperature

def _coldest_temperature(model):
    """The cold end [K] of the energy inversions' brackets: as cold as the model's saturation
    reaches, and no colder than half the triple point (1 K for the ideal gas)."""
    if not model.has_saturation:
        return 1.0
    from .saturation import lowest_saturation_temperature

    return max(1.01 * lowest_saturation_temperature(model), 0.5 * (model.fluid.T_triple or 0.2 * model.fluid.Tc))


def _known_ends(f):
    """f(x, *args) for a bracketed root finder whose ends were solved already: called as
    f(x, *args, x_lo, f_lo, x_hi, f_hi), it returns f_lo at x == x_lo and f_hi at x == x_hi
    and calls f at the other x only (the finder's start evaluates both ends again)."""
    def with_ends(x, *rest):
        *args, x_lo, f_lo, x_hi, f_hi = rest
        known = (x == x_lo) | (x == x_hi)
        out = np.where(x == x_hi, f_hi, f_lo).astype(float)
        if not np.all(known):
            new = ~known
            out[new] = f(x[new], *(a[new] if isinstance(a, np.ndarray) and a.ndim else a for a in args))
        return out
    return with_ends


def _from_P_energy(model, flat, problems, branch, name):
    """(P, h) or (P, s) -> T: at fixed P both rise with T (dh/dT = cp > 0, ds/dT = cp/T), so
    each phase's segment is bracketed: below P_c, liquid from the model's lowest temperature
    to T_sat(P), the two-phase segment in closed form (quality by the lever rule on h or s),
    vapor from T_sat up; at or above P_c one segment on the stable root.
    """
    caloric = _caloric_on_reference   # h and s as the user reads them: on the model's reference state
    P, target = flat["P"], flat[name]
    n = P.size
    T, quality = np.full(n, np.nan), np.full(n, np.nan)
    v, v_l, v_v = np.full(n, np.nan), np.full(n, np.nan), np.full(n, np.nan)
    Tc, Pc = model.fluid.Tc, model.fluid.Pc
    T_lo = _coldest_temperature(model)
    segment = np.full(n, "stable", dtype=object)
    lo, hi = np.full(n, T_lo), np.full(n, 4.0 * Tc)
    sub = (P < Pc) & model.has_saturation
    quote = _energy_quote(model, name)
    scalar = problems.shape == ()   # a scalar solve keeps its finder's trace
    saturation_record = None   # a two-phase state's quality rests on the saturation temperature's iteration
    if np.any(sub):
        i = np.flatnonzero(sub)
        T_sat, vl, vv, saturation = saturation_temperature(model, P[i], strict=False)
        e_l = getattr(caloric(model, T_sat, vl, P[i]), name)
        e_v = getattr(caloric(model, T_sat, vv, P[i]), name)
        edge = 1e-10 * np.abs(e_v - e_l)   # on the saturated ends within rounding: quality 0 or 1
        two = (target[i] >= e_l - edge) & (target[i] <= e_v + edge)
        k = i[two]
        saturation_record = _record_part(saturation, two, i)
        quality[k] = np.clip((target[k] - e_l[two]) / (e_v[two] - e_l[two]), 0.0, 1.0)
        T[k], v_l[k], v_v[k] = T_sat[two], vl[two], vv[two]
        v[k] = vl[two] + quality[k] * (vv[two] - vl[two])
        below, above = target[i] < e_l - edge, target[i] > e_v + edge
        segment[i[below]], hi[i[below]] = "liquid", T_sat[below]
        segment[i[above]], lo[i[above]] = "vapor", T_sat[above]
        no_sat = i[~np.isfinite(T_sat)]
        problems.flag_at(no_sat, [f"no saturation temperature from {model.name} at P = {P[k]:.6g} Pa, so the "
                                  f"phase at this {name} cannot be placed." for k in no_sat])
    single = ~np.isfinite(quality) & problems.ok
    scale = R * Tc if name == "h" else R
    convergence = None

    def branch_volume(Tx, Px, seg):
        roots = model_roots(model, Tx, Px)
        first = roots[:, 0]
        last = np.where(np.isfinite(roots[:, 2]), roots[:, 2], roots[:, 0])
        stable = model_stable_roots(model, Tx, Px)[2] if np.any(seg == "stable") else first
        return np.where(seg == "liquid", first, np.where(seg == "vapor", last, stable))

    def gap(Tx, Px, target_x, seg):
        vx = branch_volume(Tx, Px, seg)
        return (getattr(caloric(model, Tx, vx, Px), name) - target_x) / scale

    if np.any(single):
        j = np.flatnonzero(single)
        # the top end grows until the energy is passed (a hot gas), up to 64 Tc; each end's
        # gap is solved once and handed to the root finder (_known_ends)
        with np.errstate(all="ignore"):
            g_hi = gap(hi[j], P[j], target[j], segment[j])
            for _ in range(5):
                short = (g_hi < 0.0) & (segment[j] != "liquid")
                if not short.any():
                    break
                hi[j[short]] *= 2.0
                k = j[short]
                g_hi[short] = gap(hi[k], P[k], target[k], segment[k])
            g_lo = gap(lo[j], P[j], target[j], segment[j])
        outside = ~((g_lo <= 0.0) & (g_hi >= 0.0))

        def reach(x):   # the energies at the bracket's ends, in the same units as the value
            e_lo, e_hi = (target[j[x]] + g[x] * scale for g in (g_lo, g_hi))
            return f" (from {quote(e_lo)} to {quote(e_hi)})" if np.isfinite(e_lo) and np.isfinite(e_hi) else ""

        problems.flag_at(j[outside], [
            f"{name} = {quote(target[j[x]])} at P = {P[j[x]] / 1e5:.6g} bar ({P[j[x]]:.6g} Pa) lies outside "
            f"what {model.name} gives between {lo[j[x]]:.4g} K and {hi[j[x]]:.4g} K{reach(x)}; check the value, "
            "its unit and its reference state." for x in np.flatnonzero(outside)], kind=DomainError)
        inside = ~outside
        j, g_lo, g_hi = j[inside], g_lo[inside], g_hi[inside]
        if j.size:
            result = find_root(_known_ends(gap), bracket=(lo[j], hi[j]),
                               args=(P[j], target[j], segment[j], lo[j], g_lo, hi[j], g_hi), xtol=0.0,
                               rtol=4.0 * np.finfo(float).eps, maxiter=200, trace=scalar)
            ok = np.asarray(result.converged)
            convergence = (result, j)
            T[j[ok]] = np.asarray(result.root)[ok]
            v[j[ok]] = branch_volume(T[j[ok]], P[j[ok]], segment[j[ok]])
            problems.flag_at(j[~ok], [f"the temperature at P = {P[k]:.6g} Pa and {name} = {quote(target[k])} "
                                      "did not converge." for k in j[~ok]])
    T_safe = np.where(np.isfinite(T), T, Tc)
    phase = np.asarray(_single_phase(model, T_safe, P, np.where(np.isfinite(v), v, 1.0)), dtype=object)
    phase[np.isfinite(quality)] = "two-phase"
    return dict(T=T, P=P, v=v, phase=phase, quality=quality, v_liquid=v_l, v_vapor=v_v,
                roots=model_roots(model, T_safe, P), convergence=_joined_convergence(saturation_record, convergence))


def _from_u_v(model, flat, problems, branch=None):
    """(u, v) -> T: at fixed v, u rises with T (du/dT = cv > 0, also across the dome, where the
    lever-rule u of a (T, v) state keeps rising), so T is bracketed between a cold and a hot
    end and every trial temperature is one vectorized (T, v) solve.
    """
    v, target = flat["v"], flat["u"]
    Tc = model.fluid.Tc
    T_lo = _coldest_temperature(model)
    scale = R * Tc

    def gap(Tx, vx, ux):
        parts = _from_T_v(model, {"T": Tx, "v": vx}, Problems(Tx.size, Tx.shape, strict=False))
        u = _parts_caloric(model, parts).u
        return (np.where(np.isfinite(parts["P"]) & (parts["P"] > 0.0), u, np.nan) - ux) / scale

    lo, hi = np.full(v.shape, T_lo), np.full(v.shape, 4.0 * Tc)
    with np.errstate(all="ignore"):
        for _ in range(5):   # a very hot target: double the top end, up to 64 Tc
            short = ~(gap(hi, v, target) >= 0.0)
            if not short.any():
                break
            hi[short] *= 2.0
        g_lo = gap(lo, v, target)
    # where even the cold end's pressure is not above zero (a liquid volume on a cold
    # isotherm's loop) move it up until the (T, v) state exists
    for _ in range(20):
        bad = ~np.isfinite(g_lo)
        if not bad.any():
            break
        lo[bad] = lo[bad] + 0.05 * (hi[bad] - lo[bad])
        with np.errstate(all="ignore"):
            g_lo[bad] = gap(lo[bad], v[bad], target[bad])
    with np.errstate(all="ignore"):
        g_hi = gap(hi, v, target)
    outside = ~((g_lo <= 0.0) & (g_hi >= 0.0))
    j = np.flatnonzero(outside)
    quote = _energy_quote(model, "u")

    def reach(k):   # u at the bracket's ends, in the same units as the value
        u_lo, u_hi = target[k] + g_lo[k] * scale, target[k] + g_hi[k] * scale
        return f" (from {quote(u_lo)} to {quote(u_hi)})" if np.isfinite(u_lo) and np.isfinite(u_hi) else ""

    problems.flag_at(j, [f"u = {quote(target[k])} at v = {v[k]:.6g} m³/mol "
                         f"({model.fluid.molar_mass / v[k]:.6g} kg/m³) lies outside what {model.name} gives between {lo[k]:.4g} K and {hi[k]:.4g} K{reach(k)}; "
                         "check the value, its unit and its reference state." for k in j], kind=DomainError)
    T = np.full(v.shape, np.nan)
    go = np.flatnonzero(~outside)
    convergence = None
    if go.size:
        result = find_root(gap, bracket=(lo[go], hi[go]), args=(v[go], target[go]), xtol=0.0,
                           rtol=4.0 * np.finfo(float).eps, maxiter=200, trace=problems.shape == ())
        convergence = (result, go)
        ok = np.asarray(result.converged)
        T[go[ok]] = np.asarray(result.root)[ok]
        problems.flag_at(go[~ok], [f"the temperature at u = {quote(target[k])}, v = {v[k]:.6g} m³/mol did not "
                                   "converge." for k in go[~ok]])
    done = _from_T_v(model, {"T": np.where(np.isfinite(T), T, Tc), "v": v}, Problems(v.size, v.shape, strict=False))
    done["T"] = T
    done["convergence"] = convergence
    return done




def _parts_caloric(model, parts):
    """The Caloric record of a pair solver's parts (lever rule where two-phase)."""
    return mixture_caloric(model, parts["T"], parts["P"], parts["v"], np.asarray(parts["phase"]) == "two-phase",
                           parts["quality"], parts["v_liquid"], parts["v_vapor"])


# --------------------------------------------------------------------------- (T, h), (T, s)

_OPTIONS = dict(xtol=1e-14, rtol=4.0 * np.finfo(float).eps, maxiter=200, trace=False)


def _energy_at(model, T, x, name):
    """h or s [J/mol, J/(mol K)] of the single phase at T and v = v_min + e^x (its own P)."""
    v = model.v_min + np.exp(x)
    with np.errstate(all="ignore"):
        return getattr(_caloric_on_reference(model, T, v, model.pressure(T, v)), name)


def _enthalpy_slope(model, T, x):
    """(dh/dv)_T = T (dP/dT)_v + v (dP/dv)_T [Pa], the sign of h's change along the isotherm."""
    v = model.v_min + np.exp(x)
    with np.errstate(all="ignore"):
        return T * model.dP_dT(T, v) + v * model.dP_dv(T, v)


def _energy_gap(x, T, target, scale, model, name):
    return (_energy_at(model, T, x, name) - target) / scale


def _isotherm_ends(model, T):
    """(x_floor, x_far): ln(v - v_min) [ln(m^3/mol)] of the dense and dilute ends of an isotherm.

    x_floor: 1e-9 b above the co-volume (the repulsive term alone is then 1e9 R T / b, some
    10^16 Pa), or for a model without co-volume the volume of the ideal gas at 10^15 Pa;
    x_far: the ideal gas's volume at 1 mPa, grown later where an energy needs more.
    """
    floor = 1e-9 * model.b if model.b > 0.0 else 0.0
    x_floor = np.log(np.where(floor > 0.0, floor, R * T / 1e15))
    return x_floor, np.log(R * T / 1e-3)


def _from_T_energy(model, flat, problems, branch, name):
    """(T, s) or (T, h) -> the state, solved for the volume along the isotherm.

    The volume, not the pressure, is the variable: along an isotherm v runs once through the
    liquid, the two-phase segment (where h and s are linear in v, the lever rule) and the
    vapor, with P falling as v rises, so each solution found in v is one pressure.

    (T, s): (ds/dv)_T = (dP/dT)_v (Maxwell) is above zero for every model here (it is the
    slope of an isochore, positive wherever the alpha function falls with T), so s rises
    with v, i.e. falls with P, in each single-phase region, and is linear in quality inside
    the dome. The bracket: liquid from 1e-9 b above the co-volume (s -> -inf there) to the
    saturated liquid, quality in closed form between the saturated ends, vapor from the
    saturated vapor to the ideal gas at 1 mPa (grown by 10^6 while s is still short); one
    segment at or above Tc.

    (T, h): (dh/dv)_T = T (dP/dT)_v + v (dP/dv)_T = -(dh/dP)_T (dP/dv)_T changes sign where
    mu_JT = 0 (the inversion curve): h falls from +inf at the dense end to a minimum, then
    rises (through the dome, linearly, below Tc) towards the ideal gas's h0(T) at the dilute
    end; above the highest inversion temperature it falls all the way. The minimum is the
    root of (dh/dv)_T on the dense side (bracketed from the dense end, where v (dP/dv) wins,
    to the saturated liquid, or to the dilute end above Tc), or the saturated liquid itself
    where the liquid's h still falls there. Each side of the minimum is monotone and is
    bracketed on its own, so an h between h_min and h0 has two solutions: the lower
    pressure (dilute side) is reported, the higher one as ``P_other`` with a warning. No
    pressure gives an h below h_min (or, above the highest inversion temperature, below
    h0): that is refused with the range the isotherm covers. The ideal gas's h depends on T
    alone, so (T, h) does not fix its state: refused.
    """
    T, target = flat["T"], flat[name]
    n = T.size
    Tc = model.fluid.Tc
    if name == "h" and _no_residual(model, T):
        raise InputError(f"(T, h) does not fix a state of {model.name}: its enthalpy depends on T alone, so every "
                         "pressure (or none) gives this h. Give P or v with T, or use a cubic model.")
    scale = R * Tc if name == "h" else R
    problems.flag(T < _lowest_saturation_temperature(model, T), lambda i: (
        f"no saturation from {model.name} for {model.fluid.name} at T = {T[i]:.6g} K, so the phase at this "
        f"{name} cannot be placed: {_no_saturation_reason(model, T[i], np.nan)}"), kind=DomainError)
    T = np.where(problems.ok, T, Tc)   # placeholders, NaN in the result
    scalar = problems.shape == ()   # a scalar solve keeps its finder's trace
    options = dict(_OPTIONS, trace=scalar)
    saturation = None
    x_floor, x_far = _isotherm_ends(model, T)
    out = dict(T=flat["T"].copy(), P=np.full(n, np.nan), v=np.full(n, np.nan), quality=np.full(n, np.nan),
               v_liquid=np.full(n, np.nan), v_vapor=np.full(n, np.nan))
    P_other = np.full(n, np.nan)
    # the saturated ends at T (NaN at or above Tc)
    x_l, x_v = np.full(n, np.nan), np.full(n, np.nan)
    e_l, e_v, P_sat = np.full(n, np.nan), np.full(n, np.nan), np.full(n, np.nan)
    sub = (T < Tc) & model.has_saturation & problems.ok
    if np.any(sub):
        i = np.flatnonzero(sub)
        Ps, vl, vv, saturation = saturation_pressure(model, T[i], strict=False)
        P_sat[i], out["v_liquid"][i], out["v_vapor"][i] = Ps, vl, vv
        with np.errstate(all="ignore"):
            x_l[i], x_v[i] = np.log(vl - model.v_min), np.log(vv - model.v_min)
            e_l[i] = getattr(_caloric_on_reference(model, T[i], vl, Ps), name)
            e_v[i] = getattr(_caloric_on_reference(model, T[i], vv, Ps), name)
        no_sat = i[~np.isfinite(Ps) | ~np.isfinite(e_l[i]) | ~np.isfinite(e_v[i])]
        problems.flag_at(no_sat, [f"no saturation pressure from {model.name} at T = {T[k]:.6g} K, so the phase at "
                                  f"this {name} cannot be placed." for k in no_sat], kind=DomainError)
    dome = np.isfinite(e_l) & problems.ok
    # the dilute end grows while the energy there is still short of the target
    for _ in range(8):
        short = problems.ok & (_energy_gap(x_far, T, target, 1.0, model, name) < 0.0)
        if name == "h":
            short &= _enthalpy_slope(model, T, x_far) > 0.0   # still rising towards h0
        if not short.any():
            break
        x_far = np.where(short, x_far + np.log(1e6), x_far)
    # the minimum of h on the dense side (x_min); s has none (x_min = x_floor)
    x_min = x_floor.copy()
    if name == "h":
        x_min = _enthalpy_minimum(model, T, x_floor, np.where(dome, x_l, x_far), problems)
        if np.any(dome):   # where the liquid's h still falls at saturation, the minimum is the saturated liquid
            x_min = np.where(dome & ~np.isfinite(x_min), x_l, x_min)
        x_min = np.where(~dome & ~np.isfinite(x_min), x_far, x_min)   # no minimum: one falling side
    e_min = _energy_at(model, T, x_min, name)
    e_far = _energy_at(model, T, x_far, name)
    # the dilute side [x_min, x_far] rises (h, and all of s); with its two-phase segment in closed form
    two = dome & (target >= e_l - 1e-10 * np.abs(e_v - e_l)) & (target <= e_v + 1e-10 * np.abs(e_v - e_l))
    if name == "h":
        two &= target >= e_min
    lo = np.where(dome & (target > e_v), x_v, x_min)
    hi = np.where(dome & (target < e_l), x_l, x_far)
    g_lo, g_hi = _energy_gap(lo, T, target, 1.0, model, name), _energy_gap(hi, T, target, 1.0, model, name)
    dilute = problems.ok & ~two & (g_lo <= 0.0) & (g_hi >= 0.0) & (hi > lo)
    k = np.flatnonzero(two)
    q = np.clip((target[k] - e_l[k]) / (e_v[k] - e_l[k]), 0.0, 1.0)
    out["quality"][k], out["P"][k] = q, P_sat[k]
    out["v"][k] = out["v_liquid"][k] + q * (out["v_vapor"][k] - out["v_liquid"][k])
    # each element's record: the saturation pressure's where two-phase, the dense side's where
    # that is the only answer, the dilute side's (the reported one) where both sides have one
    dense_record = dilute_record = None
    saturation_record = _record_part(saturation, two[sub], np.flatnonzero(sub)) if np.any(sub) else None
    j = np.flatnonzero(dilute)
    if j.size:
        result = find_root(_known_ends(_energy_gap), bracket=(lo[j], hi[j]),   # the ends' gaps are known
                           args=(T[j], target[j], scale, model, name, lo[j], g_lo[j] / scale, hi[j], g_hi[j] / scale),
                           **options)
        dilute_record = (result, j)
        _take_root(model, T, result, j, out, problems, name, target)
    # the dense side (x_floor, x_min], falling: h only (s has no dense side of its own)
    dense = np.zeros(n, bool)
    if name == "h":
        g_floor = _energy_gap(x_floor, T, target, 1.0, model, name)
        dense = problems.ok & (x_min > x_floor) & (target >= e_min) & (g_floor >= 0.0)
        d = np.flatnonzero(dense)
        if d.size:
            result = find_root(_known_ends(_energy_gap), bracket=(x_floor[d], x_min[d]),
                               args=(T[d], target[d], scale, model, name, x_floor[d], g_floor[d] / scale, x_min[d],
                                     (e_min[d] - target[d]) / scale), **options)
            second = dict(P=np.full(n, np.nan), v=np.full(n, np.nan))
            _take_root(model, T, result, d, second, problems, name, target)
            alone = np.flatnonzero(dense & ~(two | dilute))   # the only solution: it is the state
            out["P"][alone], out["v"][alone] = second["P"][alone], second["v"][alone]
            dense_record = (result, d)
            both = dense & (two | dilute)
            P_other[both] = second["P"][both]
            same = both & (np.abs(P_other / out["P"] - 1.0) < 1e-9)   # on the minimum itself: one answer
            P_other[same] = np.nan
    none = problems.ok & ~(two | dilute | dense)
    problems.flag(none, lambda i: _no_solution_reason(model, name, flat["T"][i], target[i], e_min[i], e_far[i],
                                                     x_min[i] > x_floor[i]), kind=DomainError)
    T_safe = np.where(problems.ok, T, Tc)
    P_safe = np.where(np.isfinite(out["P"]), out["P"], 1.0)
    phase = np.asarray(_single_phase(model, T_safe, P_safe, np.where(np.isfinite(out["v"]), out["v"], 1.0)),
                       dtype=object)
    phase[np.isfinite(out["quality"])] = "two-phase"
    notes = ()
    n_other = int(np.count_nonzero(np.isfinite(P_other) & problems.ok))
    if n_other:
        notes = (_second_pressure_warning(model, P_other, out["P"], n_other, n),)
    convergence = _joined_convergence(dense_record, saturation_record, dilute_record)
    return dict(out, phase=phase, roots=model_roots(model, T_safe, P_safe), convergence=convergence,
                P_other=P_other, notes=notes)


def _no_residual(model, T):
    """True for a model without residual Helmholtz energy (the ideal gas): its h depends on T alone."""
    T0 = float(np.max(T)) if T.size else model.fluid.Tc
    bundle = model.residual_bundle(np.full(3, T0), model.v_min + np.array([1e-5, 1e-3, 1e-1]))
    return all(np.all(np.asarray(x) == 0.0) for x in bundle)


def _enthalpy_minimum(model, T, x_lo, x_hi, problems):
    """ln(v - v_min) of the minimum of h on [x_lo, x_hi] along each isotherm, NaN where
    (dh/dv)_T does not change sign there (h still falls at x_hi)."""
    out = np.full(T.shape, np.nan)
    g_lo, g_hi = _enthalpy_slope(model, T, x_lo), _enthalpy_slope(model, T, x_hi)
    go = np.flatnonzero(problems.ok & (g_lo < 0.0) & (g_hi > 0.0))
    if go.size:
        result = find_root(lambda x, Tx: _enthalpy_slope(model, Tx, x) / (R * Tx / np.exp(x)),
                           bracket=(x_lo[go], x_hi[go]), args=(T[go],), **_OPTIONS)
        ok = np.asarray(result.converged)
        out[go[ok]] = np.asarray(result.root)[ok]
        problems.flag_at(go[~ok], [f"the minimum of h along the isotherm T = {T[k]:.6g} K did not converge."
                                   for k in go[~ok]])
    return out


def _take_root(model, T, result, j, out, problems, name, target):
    """Write the converged volumes and pressures of the finder's problems j into out."""
    ok = np.asarray(result.converged)
    v = model.v_min + np.exp(np.asarray(result.root, dtype=float))
    with np.errstate(all="ignore"):
        P = model.pressure(T[j], v)
    out["v"][j[ok]], out["P"][j[ok]] = v[ok], P[ok]
    quote = _energy_quote(model, name)
    problems.flag_at(j[~ok], [f"the state at T = {T[k]:.6g} K and {name} = {quote(target[k])} did "
                              "not converge." for k in j[~ok]])


def _no_solution_reason(model, name, T, target, e_min, e_far, has_minimum):
    quote = _energy_quote(model, name)   # the value and its limit on both bases: as typed, in one unit
    if name == "h" and has_minimum:
        return (f"no pressure gives h = {quote(target)} at T = {T:.6g} K in {model.name} for {model.fluid.name}: "
                f"along this isotherm h is at least {quote(e_min)} (its minimum, where the Joule-Thomson "
                "coefficient changes sign). Check the value, its unit and its reference state.")
    if name == "h":
        return (f"no pressure gives h = {quote(target)} at T = {T:.6g} K in {model.name} for {model.fluid.name}: "
                f"above the inversion temperature h falls with volume to {quote(e_far)} (the ideal gas's) and "
                "is higher at every finite pressure. Check the value, its unit and its reference state.")
    return (f"s = {quote(target)} at T = {T:.6g} K lies outside what {model.name} gives along this isotherm "
            f"(up to {quote(e_far)} at 1 mPa and below); check the value, its unit and its reference state.")


def _second_pressure_warning(model, P_other, P, count, total):
    if total == 1:
        other, lower = float(P_other[0]), float(P[0])
        far = (f" At {other / model.fluid.Pc:.3g} times the critical pressure it lies far outside the range where "
               "a cubic equation is any guide." if other > 10.0 * model.fluid.Pc else "")
        return (f"A second pressure, {other / 1e5:.6g} bar, gives the same T and h in {model.name}: along the "
                "isotherm h falls to a minimum (where the Joule-Thomson coefficient changes sign) and rises again. "
                f"The lower pressure ({lower / 1e5:.6g} bar) is reported; the other is State.P_other.{far}")
    return (f"At {count} of {total} states a second, higher pressure gives the same T and h in {model.name} "
            "(see State.P_other); the lower one is reported.")


# --------------------------------------------------------------------------- (h, s)

#: Up to this many (state, doubling) pairs, the (h, s) bracket's doublings are solved in one
#: vectorized call (see _from_h_s); beyond it, one call per doubling on the open states.
_DOUBLINGS_AT_ONCE = 256


def _doublings_at_once(gap, T_cold, steps, s, h):
    """gap at T_cold 2^k for k < steps at every state, shape (steps, n): one call."""
    T = T_cold * 2.0 ** np.arange(steps, dtype=float)
    n = s.size
    return gap(np.repeat(T, n), np.tile(s, steps), np.tile(h, steps)).reshape(steps, n)


def _from_h_s(model, flat, problems, branch=None):
    """(h, s) -> the state, by bracketing T along the isentrope.

    Along an isentrope h rises with P, (dh/dP)_s = v > 0 (dh = T ds + v dP, which holds
    for the two-phase mixture too), and T rises with P, (dT/dP)_s = T v beta / cp > 0 for
    the positive thermal expansion of every model here (and dT_sat/dP > 0 across the dome):
    so h rises with T along the isentrope. T is bracketed from the model's coldest
    temperature (that of the (P, h) and (P, s) solves) to 4 Tc, doubled while h there is
    still short (up to 256 Tc); each trial temperature is one vectorized (T, s) solve
    (itself bracketed in v, see :func:`_from_T_energy`), whose h is compared with the
    target. Nesting keeps both root finders bracketed; a 2-D scheme (Newton in T and v)
    would need fewer evaluations but has no bracket that guarantees convergence. The (T, s)
    solve is the inner one rather than (P, s) because it needs the saturation pressure at
    T, which the fast corresponding-states path gives, and never leaves its range.
    """
    h, s = flat["h"], flat["s"]
    n = h.size
    Tc = model.fluid.Tc
    scale = R * Tc

    def state_on_isentrope(T, sx):
        sub = Problems(T.size, T.shape, strict=False)
        with np.errstate(all="ignore"):
            parts = _from_T_energy(model, {"T": T, "s": sx}, sub, None, name="s")
            hx = np.asarray(_parts_caloric(model, parts).h, dtype=float)
        return np.where(sub.ok, hx, np.nan), parts, sub

    def gap(T, sx, hx):
        return (state_on_isentrope(T, sx)[0] - hx) / scale

    # from the coldest temperature up, doubling: lo is the last T where h is still short of
    # the target, hi the first where it is not. An isentrope may have no state at a given T
    # (at the cold end for a hot target, far out in volume; at the hot end, packed to the
    # co-volume): NaN there, skipped below the bracket and the end of it above.
    T_cold = _coldest_temperature(model)
    lo, hi = np.full(n, np.nan), np.full(n, T_cold)
    g_lo, g_hi = np.full(n, np.nan), np.full(n, np.nan)
    open_ = np.ones(n, bool)
    steps = int(np.ceil(np.log2(256.0 * Tc / T_cold))) + 1
    # a few states: every doubling at once, in one vectorized (T, s) solve instead of one
    # solve per doubling (each costs about the same for 1 state as for 50); the loop below
    # then reads them off in the same order, so the bracket is the same
    ahead = _doublings_at_once(gap, T_cold, steps, s, h) if n * steps <= _DOUBLINGS_AT_ONCE else None
    for step in range(steps):
        k = np.flatnonzero(open_)
        if k.size == 0:
            break
        g = gap(hi[k], s[k], h[k]) if ahead is None else ahead[step, k]
        g_hi[k] = g
        done = (g >= 0.0) | (~np.isfinite(g) & np.isfinite(lo[k]))   # bracketed, or the isentrope ended
        short = g < 0.0
        lo[k[short]], g_lo[k[short]] = hi[k[short]], g[short]
        open_[k[done]] = False
        hi[k[~done]] *= 2.0
    # where doubling stepped past the isentrope's last state (a steep isentrope of a heavy
    # molecule: P grows like T^(cp/R)), close in on the target between lo and that step
    stuck = np.flatnonzero(np.isfinite(g_lo) & ~np.isfinite(g_hi))
    bad = hi[stuck].copy()
    for _ in range(60):
        if stuck.size == 0:
            break
        mid = np.sqrt(lo[stuck] * bad)
        g = gap(mid, s[stuck], h[stuck])
        up, short, nan = g >= 0.0, g < 0.0, ~np.isfinite(g)
        hi[stuck[up]], g_hi[stuck[up]] = mid[up], g[up]
        lo[stuck[short]], g_lo[stuck[short]] = mid[short], g[short]
        bad = np.where(nan, mid, bad)
        keep = ~up & (bad / lo[stuck] > 1.0 + 1e-12)
        stuck, bad = stuck[keep], bad[keep]
    bracketed = (g_lo < 0.0) & (g_hi >= 0.0)
    exact = np.isnan(lo) & (g_hi == 0.0)   # the coldest temperature itself
    bracketed |= exact
    lo = np.where(exact, hi, lo)
    quote_h, quote_s = _energy_quote(model, "h"), _energy_quote(model, "s")
    problems.flag(~bracketed, lambda i: (
        f"no temperature from {T_cold:.4g} K to {256 * Tc:.4g} K gives h = {quote_h(h[i])} on the isentrope "
        f"s = {quote_s(s[i])} of {model.name} for {model.fluid.name} "
        + (f"(h there is at least {quote_h(h[i] + g_hi[i] * scale)})" if np.isnan(lo[i]) and np.isfinite(g_hi[i])
           else "(the isentrope leaves the model's range of states first)")
        + ". Check the values, their units and their reference state."), kind=DomainError)
    T = np.full(n, np.nan)
    convergence = None
    j = np.flatnonzero(bracketed & problems.ok)
    if j.size:
        result = find_root(_known_ends(gap), bracket=(lo[j], hi[j]), args=(s[j], h[j], lo[j], g_lo[j], hi[j], g_hi[j]),
                           xtol=0.0, rtol=4.0 * np.finfo(float).eps, maxiter=200, trace=problems.shape == ())
        convergence = (result, j)
        ok = np.asarray(result.converged)
        T[j[ok]] = np.asarray(result.root)[ok]
        problems.flag_at(j[~ok], [f"the temperature at h = {quote_h(h[k])}, s = {quote_s(s[k])} did not "
                                  "converge." for k in j[~ok]])
    _, parts, sub = state_on_isentrope(np.where(np.isfinite(T), T, Tc), s)
    problems.flag(~sub.ok, lambda i: str(sub.reason[i]), kind=DomainError)
    parts["T"] = T
    parts["convergence"] = convergence
    parts.pop("P_other", None), parts.pop("notes", None)
    return parts
