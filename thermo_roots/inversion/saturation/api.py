"""Saturation of a cubic equation of state by equal fugacity, vectorized over T or P.

The public entry points: :func:`saturation` (checks, per-element reasons, the result
value), :func:`saturation_pressure` and :func:`saturation_temperature` (the SI array
helpers of the state solver), and the model's floor (:func:`lowest_saturation_temperature`).
Each temperature goes to the fast path (:mod:`.fast`) first and to the window solver
(:mod:`.window`) where the fast path does not finish or Tr >= 0.99; each pressure to the
temperature iteration at fixed P first, then to the window solver's gap in T, then to
Psat(T) inverted (see :func:`saturation_temperature`).
"""

from __future__ import annotations

import dataclasses
from dataclasses import dataclass, field

import numpy as np

from ...errors import ConvergenceError, DomainError, InputError
from ...models import Model, _scalar_or_array
from ...roots import find_root
from ...units import to_si
from .._problems import Problems, check_errors_option, si_array
from .fast import _all_converged, _compiled_newton, _newton_saturation, _newton_saturation_temperature
from .window import _UNRESOLVED_GAP, _critical_tangent, _window_saturation, _window_saturation_temperature

#: The reason array of a result with nothing to report: one shared read-only "" (the
#: general path's :class:`Problems` gives the same view), far cheaper than a filled array.
_NO_REASON = np.array("", dtype=object)

@dataclass(frozen=True)
class Saturation:
    """Saturated liquid and vapor of a model at T or P.

    Attributes
    ----------
    T : float or ndarray
        Saturation temperature [K].
    P : float or ndarray
        Saturation pressure [Pa].
    v_liquid, v_vapor : float or ndarray
        Saturated molar volumes [m^3/mol], v_liquid <= v_vapor.
    convergence : object
        The root finder's result (statuses, iterations, evaluations).
    reason : str or ndarray of str
        Why an element has no saturation state ("" where it has one; those are NaN).
    warnings : tuple of str
        Plain sentences about the result (empty when none).
    """

    model: object = field(repr=False)
    T: object
    P: object
    v_liquid: object
    v_vapor: object
    convergence: object = field(repr=False, default=None)
    reason: object = field(repr=False, default="")
    warnings: tuple = field(repr=False, default=())

    @property
    def rho_liquid(self):
        """Saturated liquid molar density [mol/m^3]."""
        return 1.0 / np.asarray(self.v_liquid) if np.ndim(self.v_liquid) else 1.0 / self.v_liquid

    @property
    def rho_vapor(self):
        """Saturated vapor molar density [mol/m^3]."""
        return 1.0 / np.asarray(self.v_vapor) if np.ndim(self.v_vapor) else 1.0 / self.v_vapor

    def _repr_html_(self):
        if np.ndim(self.T):
            return f"<pre>{self!r}</pre>"
        M = self.model.fluid.molar_mass
        rows = [("Temperature", f"{self.T:.6g} K"), ("Pressure", f"{self.P / 1e5:.6g} bar"),
                ("Liquid molar volume", f"{self.v_liquid * 1e3:.6g} L/mol"),
                ("Vapor molar volume", f"{self.v_vapor * 1e3:.6g} L/mol"),
                ("Liquid density", f"{M / self.v_liquid:.6g} kg/m³"),
                ("Vapor density", f"{M / self.v_vapor:.6g} kg/m³")]
        body = "".join(f"<tr><th style='text-align:left'>{k}</th><td>{v}</td></tr>" for k, v in rows)
        return f"<table><caption>Saturation, {self.model.fluid.name}, {self.model.name}</caption>{body}</table>"


def saturation(model, T=None, P=None, errors="nan"):
    """Saturation pressure (given T) or temperature (given P) and both saturated volumes.

    Parameters
    ----------
    model : CubicModel
    T : float, array_like or str, optional
        Temperature [K], 0 < T <= Tc. Strings with units are accepted ("25 degC").
    P : float, array_like or str, optional
        Pressure [Pa], 0 < P <= Pc. Give exactly one of T and P.
    errors : {"nan", "raise"}
        For arrays: "nan" (default) gives NaN and a reason (:attr:`Saturation.reason`) at
        every element without a saturation state (not finite, above the critical point,
        below the model's lowest saturation temperature, not converged) and solves the
        rest; "raise" raises at the first. A scalar always raises.

    Returns
    -------
    Saturation

    Raises
    ------
    DomainError
        T above Tc or P above Pc (no saturation there), T below the model's lowest
        saturation temperature (:func:`lowest_saturation_temperature`), or the ideal gas.
    ConvergenceError
        A root was not found (carries the root finder's result).

    References
    ----------
    Michelsen, M. L. & Mollerup, J. M. (2007), Thermodynamic Models: Fundamentals and
    Computational Aspects, 2nd ed., ch. 11 (equal fugacity; d ln phi / d ln P = Z - 1).
    """
    if not isinstance(model, Model):   # the check is inline: this call is on the fast path
        from ..state import _check_model   # state.py imports this package: import at call time

        _check_model(model, "saturation")
    if not model.has_saturation:
        raise DomainError(f"The {model.name} has no saturation (no liquid); choose a cubic model such as "
                          "PengRobinson.")
    if (T is None) == (P is None):
        raise InputError("saturation() needs exactly one of T= or P=.")
    check_errors_option(errors)
    if T is not None:
        solved = _compiled_saturation_pressure(model, T)
        if solved is not None and not np.any(solved[0] < SATURATION_FLOOR * model.fluid.Pc):   # 1-D arrays already
            return Saturation(model, T, *solved, reason=np.broadcast_to(_NO_REASON, T.shape))
    name, unit = ("T", "K") if T is not None else ("P", "Pa")
    x = np.asarray(si_array(to_si, T if T is not None else P, name), dtype=float)
    flat = np.atleast_1d(x).ravel()
    problems = Problems(flat.size, x.shape, strict=x.shape == () or errors == "raise")
    critical = model.fluid.Tc if name == "T" else model.fluid.Pc
    _flag_outside_the_dome(model, name, unit, flat, problems)
    ok = problems.ok
    good = np.where(ok, flat, critical)   # placeholders where flagged, NaN in the result
    if name == "T":
        P_sat, v_l, v_v, result = saturation_pressure(model, good, strict=False)
        T_sat = flat.copy()
    else:
        T_sat, v_l, v_v, result = saturation_temperature(model, good, strict=False)
        P_sat = flat.copy()
    failed = ok & ~(np.isfinite(P_sat) & np.isfinite(T_sat) & np.isfinite(v_l))
    problems.flag(failed, lambda i: f"the saturation {'pressure' if name == 'T' else 'temperature'} did not "
                  f"converge at {name} = {flat[i]:.6g} {unit}.", ConvergenceError, result)
    bad = ~problems.ok
    T_sat, P_sat, v_l, v_v = (np.where(bad, np.nan, a).reshape(x.shape) for a in (T_sat, P_sat, v_l, v_v))
    reason = problems.reason[0] if x.shape == () else problems.reason.reshape(x.shape)
    return Saturation(model, _scalar_or_array(T_sat), _scalar_or_array(P_sat), _scalar_or_array(v_l),
                      _scalar_or_array(v_v), result, reason, problems.summary())



# --------------------------------------------------------------------------- P from T

def saturation_pressure(model, T, strict=True):
    """Saturation pressure [Pa] and saturated volumes [m^3/mol] at T [K] (array, T <= Tc).

    Below Tr = :data:`FAST_TR_MAX` a bracketed Newton iteration from a corresponding-states
    start serves (:func:`_newton_saturation`); every temperature it does not finish, and
    every one closer to Tc, is solved on the spinodal window (:func:`_window_saturation`).

    strict : raise (ConvergenceError, or DomainError below the model's lowest saturation
        temperature) at the first element that fails; with False those elements are NaN.
    """
    P, v_l, v_v, result = _raw_saturation_pressure(model, T, strict)
    with np.errstate(invalid="ignore"):
        too_low = P < SATURATION_FLOOR * model.fluid.Pc
    if np.any(too_low):
        if strict:
            raise DomainError(_below_floor_message(model, np.asarray(T, dtype=float)[too_low].flat[0]))
        P, v_l, v_v = (np.where(too_low, np.nan, x) for x in (P, v_l, v_v))
    return P, v_l, v_v, result


def _raw_saturation_pressure(model, T, strict=True):
    T = np.asarray(T, dtype=float)
    limit = model.fluid.Tc * (1.0 - _UNRESOLVED_GAP)   # closer to Tc than doubles can split the phases
    if T.size and T.max() < limit:   # the common case, without masks
        if T.ndim == 1:
            return _below_critical(model, T, strict=strict)
        return _reshaped(_below_critical(model, T.ravel(), strict=strict), T.shape)
    near = ~(T < limit)
    P = np.full(T.shape, np.nan)
    v_l, v_v = np.full(T.shape, np.nan), np.full(T.shape, np.nan)
    near &= np.isfinite(T)
    P[near], v_l[near], v_v[near] = _critical_tangent(model, T[near])
    below = T < limit
    result = None
    if below.any():
        P[below], v_l[below], v_v[below], result = _below_critical(model, T[below], strict=strict)
    return P, v_l, v_v, result


#: Reduced saturation pressures below this are not served: there the liquid and vapor
#: volumes differ by more than 100 orders of magnitude and the cubic's coefficients lose
#: their digits (seen as garbage from about 1e-150 Pa on); every real fluid is solid long
#: before (propane's triple point, 85.5 K, has Psat ~ 1e-4 Pa).
SATURATION_FLOOR = 1e-100


def lowest_saturation_temperature(model) -> float:
    """The temperature [K] below which the model's saturation pressure is under the floor.

    :data:`SATURATION_FLOOR` times Pc: the saturation temperature at that pressure, found
    once per model and kept on it. The temperature iteration at fixed P
    (:func:`.fast._newton_saturation_temperature`) serves first (a few cubic solves); where
    it does not finish, bracketed root finding on ln Psat(T), which rises strictly with T
    (Clausius-Clapeyron; each trial T a window solve there, below the table's range).
    """
    cached = model.__dict__.get("_lowest_saturation_T")
    if cached is None:
        target = np.array([SATURATION_FLOOR * model.fluid.Pc])
        T_it, _, _, iterated, _ = _newton_saturation_temperature(model, target)
        if iterated.converged[0]:
            cached = float(T_it[0])
            model.__dict__["_lowest_saturation_state"] = (cached, float(target[0]))
            model.__dict__["_lowest_saturation_T"] = cached
            return cached
        Tc = model.fluid.Tc

        def above_floor(Tx):   # where the solve fails (far below the floor) count it as below
            with np.errstate(invalid="ignore", divide="ignore"):
                gap = np.log(_raw_saturation_pressure(model, Tx, strict=False)[0] / target)
            return np.where(np.isfinite(gap), gap, -50.0)

        result = find_root(above_floor, bracket=(np.array([1e-3 * Tc]), np.array([0.35 * Tc])), xtol=0.0,
                           rtol=1e-10, maxiter=200, trace=False)
        cached = float(np.asarray(result.root).flat[0]) if np.all(result.converged) else 0.0
        model.__dict__["_lowest_saturation_T"] = cached
    return cached


def _below_floor_message(model, T):
    T_min = lowest_saturation_temperature(model)
    return (f"No saturation pressure from {model.name} for {model.fluid.name} at T = {T:.6g} K: below "
            f"T = {T_min:.4g} K (Tr = {T_min / model.fluid.Tc:.3g}) the model's saturation pressure is "
            f"under {SATURATION_FLOOR:.0e} Pc, more than double precision resolves. The real fluid "
            f"is solid long before; give T of at least {T_min:.4g} K.")


def _reshaped(solved, shape):
    P, v_l, v_v, result = solved
    return P.reshape(shape), v_l.reshape(shape), v_v.reshape(shape), result


def _flag_outside_the_dome(model, name, unit, flat, problems):
    """Flag every T [K] or P [Pa] of ``flat`` without a saturation state: not finite, not
    above zero, above the critical point, or below the model's floor."""
    critical = model.fluid.Tc if name == "T" else model.fluid.Pc
    problems.flag(~np.isfinite(flat), lambda i: f"{name} = {flat[i]:.6g} {unit} is not a finite number.", InputError)
    problems.flag(~(flat > 0.0), lambda i: f"{name} must be above zero absolute: got {flat[i]:.6g} {unit}.")
    problems.flag(flat > critical, lambda i: (
        f"No saturation at {name} = {flat[i]:.6g} {unit}: it exists only for 0 < {name} <= {critical:.6g} {unit} "
        f"(the critical {'temperature Tc' if name == 'T' else 'pressure Pc'}). Above it the fluid is "
        "supercritical; use solve()."))
    # the floor is found once per model; only values anywhere near it make that worth it
    if name == "T" and np.any(flat < 0.35 * model.fluid.Tc):
        T_min = lowest_saturation_temperature(model)
        problems.flag(flat < T_min, lambda i: _below_floor_message(model, flat[i]))
    if name == "P" and np.any(flat < 1e-90 * critical):
        T_min, P_min = _lowest_saturation_state(model)
        problems.flag(flat <= P_min, lambda i: _below_lowest_pressure_message(model, flat[i], T_min, P_min))


def _lowest_saturation_state(model):
    """(T [K], P [Pa]) of the model's floor: its lowest saturation temperature and pressure,
    found once per model and kept on it (the pressure needs the window solver)."""
    cached = model.__dict__.get("_lowest_saturation_state")
    if cached is None:
        T_min = lowest_saturation_temperature(model)
        cached = (T_min, float(_raw_saturation_pressure(model, np.array([T_min]), strict=False)[0][0]))
        model.__dict__["_lowest_saturation_state"] = cached
    return cached


def _below_lowest_pressure_message(model, P, T_min, P_min):
    return (f"P = {P:.3g} Pa is below the lowest saturation pressure {model.name} serves for "
            f"{model.fluid.name} ({P_min:.3g} Pa, at T = {T_min:.4g} K); the fluid would be solid long "
            "before. Give a higher pressure.")


def _compiled_saturation_pressure(model, T):
    """:func:`saturation_pressure` for a 1-D float64 array T [K] in one compiled pass (see
    :func:`.fast._compiled_newton`), the window solver finishing what it leaves; None where
    the general path must serve."""
    fast = _compiled_newton(model, T)
    return None if fast is None else _below_critical(model, T, fast)


def _below_critical(model, T, fast=None, strict=True):
    """Saturation at 1-D T below Tc (1 - 1e-11): the fast path, then the window solver.

    fast : the fast path's (P, v_l, v_v, result) at T, if the caller has it already.
    strict : raise at a temperature that did not converge; with False it is left NaN.
    """
    P, v_l, v_v, result = _newton_saturation(model, T) if fast is None else fast
    if result.status is not _all_converged(T.size):   # only the fast path's "all done" is this array
        rest = ~result.converged
        P[rest], v_l[rest], v_v[rest], slow = _window_saturation(model, T[rest])
        result = _merge(result, rest, slow)
        if strict:
            _require(result, "saturation pressure", T, "T", "K")
        failed = ~np.asarray(result.converged)
        P[failed], v_l[failed], v_v[failed] = np.nan, np.nan, np.nan
    return P, v_l, v_v, result



def _merge(fast, mask, slow):
    """The fast path's result with the masked elements replaced by the window solver's.

    Iterations and evaluations add up: what the fast path spent is counted too.
    """
    root, converged = np.array(fast.root, dtype=float), np.array(fast.converged, dtype=bool)
    status = np.array(fast.status, dtype=object)
    iterations, evaluations = np.array(fast.iterations), np.array(fast.evaluations)
    root[mask], converged[mask], status[mask] = slow.root, slow.converged, slow.status
    iterations[mask] += slow.iterations
    evaluations[mask] += slow.evaluations
    method = slow.method if np.all(mask) else f"{fast.method}+{slow.method}"
    return dataclasses.replace(fast, root=root, converged=converged, status=status.astype(str),
                               iterations=iterations, evaluations=evaluations, method=method)



# --------------------------------------------------------------------------- T from P

def saturation_temperature(model, P, strict=True):
    """Saturation temperature [K] and saturated volumes at P [Pa] (array, P <= Pc).

    A bracketed Newton iteration in Tc/T on the fugacity gap at fixed P serves first
    (:func:`.fast._newton_saturation_temperature`, one cubic solve per step, the window
    solver's equal-area gap where the dome is narrow); what it does not finish (Tr above
    1 - 1e-6) goes to the window solver's gap in T at fixed P
    (:func:`.window._window_saturation_temperature`), and whatever is left is solved by
    inverting Psat(T): ln Psat(T) rises strictly with T
    (Clausius-Clapeyron), so T is bracketed between the model's lowest saturation
    temperature and Tc, and each trial T costs one vectorized saturation-pressure solve
    (:func:`_inverted_saturation_pressure`). strict : raise at the first P that fails (below
    the model's lowest saturation pressure, or not converged); with False those elements
    are NaN.
    """
    P = np.asarray(P, dtype=float)
    T = np.full(P.shape, model.fluid.Tc)
    v_l, v_v = np.full(P.shape, model.v_c), np.full(P.shape, model.v_c)
    T[np.isnan(P)] = np.nan
    below = P < model.fluid.Pc
    result = None
    if np.any(below):
        reachable = below.copy()
        if np.any(P[below] < 1e-90 * model.fluid.Pc):   # the floor is found once per model, when it matters
            T_floor, P_floor = _lowest_saturation_state(model)
            reachable &= P > P_floor
            if strict and np.any(below & ~reachable):
                raise DomainError(_below_lowest_pressure_message(model, P[below & ~reachable].flat[0], T_floor,
                                                                 P_floor))
            T[below & ~reachable], v_l[below & ~reachable], v_v[below & ~reachable] = np.nan, np.nan, np.nan
        Pb = P[reachable]
        if Pb.size:
            T_b, vl_b, vv_b, result, (cold, warm) = _newton_saturation_temperature(model, Pb.ravel())
            if result.status is not _all_converged(Pb.size):
                T_b, vl_b, vv_b, result = _near_critical_temperature(model, Pb.ravel(), T_b, vl_b, vv_b, result,
                                                                    cold, warm)
                if strict:
                    _require(result, "saturation temperature", Pb.ravel(), "P", "Pa")
            T[reachable], v_l[reachable], v_v[reachable] = T_b, vl_b, vv_b
    return T, v_l, v_v, result


def _near_critical_temperature(model, P, T, v_l, v_v, result, cold, warm):
    """Finish what the temperature iteration left: the window solver's gap at fixed P
    (:func:`.window._window_saturation_temperature`) on the iteration's last bracket, each
    end moved out by 1e-9 of itself (its sign came from the same gap, good to rounding);
    then Psat(T) inverted (:func:`_inverted_saturation_pressure`) for the rest.
    """
    Tc = model.fluid.Tc
    rest = ~np.asarray(result.converged)
    lo, hi = cold[rest] * (1.0 - 1e-9), np.minimum(warm[rest] * (1.0 + 1e-9), Tc)
    T[rest], v_l[rest], v_v[rest], window = _window_saturation_temperature(model, P[rest], lo, hi)
    result = _merge(result, rest, window)
    rest = ~np.asarray(result.converged)
    if np.any(rest):
        T[rest], v_l[rest], v_v[rest], slow = _inverted_saturation_pressure(model, P[rest])
        result = _merge(result, rest, slow)
    return T, v_l, v_v, result


def _inverted_saturation_pressure(model, P):
    """Saturation temperature [K] and volumes at 1-D P [Pa] (above the model's floor, below
    Pc) by bracketed root finding on ln Psat(T) - ln P in T between the model's lowest
    saturation temperature and Tc: the proven path, for whatever the other two leave
    (the critical tangent's last 1e-11 of Tc among them). NaN where it fails.
    """
    def log_pressure_gap(Tx, target):
        return np.log(_raw_saturation_pressure(model, Tx, strict=False)[0] / target)

    lo = np.full(P.shape, _lowest_temperature(model, P, lowest_saturation_temperature(model)))
    hi = np.full(P.shape, model.fluid.Tc)
    result = find_root(log_pressure_gap, bracket=(lo, hi), args=(P,), xtol=0.0, rtol=4.0 * np.finfo(float).eps,
                       maxiter=200, trace=False)
    T = np.where(result.converged, result.root, np.nan)
    _, v_l, v_v, _ = _raw_saturation_pressure(model, T, strict=False)
    return T, v_l, v_v, result


def _lowest_temperature(model, P, T_floor):
    """A temperature [K] whose saturation pressure lies below every P, as close to them as a
    few trial reduced temperatures allow (a narrow bracket saves iterations); else T_floor."""
    Tc = model.fluid.Tc
    for Tr in (0.35, 0.2, 0.1, 0.05):
        if Tr * Tc > T_floor and _raw_saturation_pressure(model, np.array([Tr * Tc]), strict=False)[0][0] < np.min(P):
            return Tr * Tc
    return T_floor


def _require(result, what, x, name, unit):
    failed = ~np.asarray(result.converged)
    if np.any(failed):
        first = np.asarray(x)[failed].flat[0]
        status = np.asarray(result.status, dtype=object)[failed].flat[0] if np.ndim(result.status) else result.status
        raise ConvergenceError(f"The {what} did not converge at {name} = {first:.6g} {unit} ({status}).", result)
