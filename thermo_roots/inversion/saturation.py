"""Saturation of a cubic equation of state by equal fugacity, vectorized over T or P.

At a temperature below Tc the isotherm has two spinodals (dP/dv = 0). Between their
pressures the cubic has three roots and the difference g(P) = ln phi_liquid - ln phi_vapor
falls strictly (dg/dlnP = Z_liquid - Z_vapor < 0), so the saturation pressure is the one
zero of g inside that window: a guaranteed bracket. Just outside the window only one root
is left; g is then given its known sign, so bracketed methods see a clean sign change.
Near the critical point the window narrows like (1 - Tr)^1.5; the solve runs in ln P to
full double precision, which resolves it up to Tr = 1 - 1e-9.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from ..errors import ConvergenceError, DomainError, InputError
from ..models import IdealGas, R, _scalar_or_array
from ..roots import find_root
from .cubic import volume_roots

#: Tolerances of the saturation solve in ln P: as tight as double precision allows.
_LNP_RTOL = 4.0 * np.finfo(float).eps
#: Where v_vapor / v_liquid is below this, the gap is taken from the equal-area integral.
_NARROW_DOME = 1.5
#: Eight-point Gauss-Legendre nodes and weights on [-1, 1].
_GAUSS_LEGENDRE = np.polynomial.legendre.leggauss(8)
#: 1 - Tr below which the pressure window (~(1 - Tr)^1.5) is narrower than double precision.
_UNRESOLVED_GAP = 1e-11
#: The lower end of the pressure window when the liquid spinodal lies below zero pressure.
_LOWEST_REDUCED_PRESSURE = 1e-40


@dataclass(frozen=True)
class Saturation:
    """Saturated liquid and vapour of a model at T or P.

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
    """

    model: object = field(repr=False)
    T: object
    P: object
    v_liquid: object
    v_vapor: object
    convergence: object = field(repr=False, default=None)

    @property
    def rho_liquid(self):
        """Saturated liquid molar density [mol/m^3]."""
        return 1.0 / np.asarray(self.v_liquid) if np.ndim(self.v_liquid) else 1.0 / self.v_liquid

    @property
    def rho_vapor(self):
        """Saturated vapour molar density [mol/m^3]."""
        return 1.0 / np.asarray(self.v_vapor) if np.ndim(self.v_vapor) else 1.0 / self.v_vapor

    def _repr_html_(self):
        if np.ndim(self.T):
            return f"<pre>{self!r}</pre>"
        M = self.model.fluid.molar_mass
        rows = [("Temperature", f"{self.T:.6g} K"), ("Pressure", f"{self.P / 1e5:.6g} bar"),
                ("Liquid molar volume", f"{self.v_liquid * 1e3:.6g} L/mol"),
                ("Vapour molar volume", f"{self.v_vapor * 1e3:.6g} L/mol"),
                ("Liquid density", f"{M / self.v_liquid:.6g} kg/m³"),
                ("Vapour density", f"{M / self.v_vapor:.6g} kg/m³")]
        body = "".join(f"<tr><th style='text-align:left'>{k}</th><td>{v}</td></tr>" for k, v in rows)
        return f"<table><caption>Saturation, {self.model.fluid.name}, {self.model.name}</caption>{body}</table>"


def saturation(model, T=None, P=None):
    """Saturation pressure (given T) or temperature (given P) and both saturated volumes.

    Parameters
    ----------
    model : CubicModel
    T : float, array_like or str, optional
        Temperature [K], 0 < T <= Tc. Strings with units are accepted ("25 degC").
    P : float, array_like or str, optional
        Pressure [Pa], 0 < P <= Pc. Give exactly one of T and P.

    Returns
    -------
    Saturation

    Raises
    ------
    DomainError
        T above Tc or P above Pc (no saturation there), or the ideal gas.
    ConvergenceError
        A root was not found (carries the root finder's result).

    References
    ----------
    Michelsen, M. L. & Mollerup, J. M. (2007), Thermodynamic Models: Fundamentals and
    Computational Aspects, 2nd ed., ch. 11 (equal fugacity; d ln phi / d ln P = Z - 1).
    """
    from ..units import to_si

    if isinstance(model, IdealGas):
        raise DomainError("The ideal gas has no saturation; choose a cubic model such as PengRobinson.")
    if (T is None) == (P is None):
        raise InputError("saturation() needs exactly one of T= or P=.")
    if T is not None:
        T = np.asarray(to_si(T, "T"), dtype=float)
        _check_range(T, model.fluid.Tc, "T", "K", "the critical temperature Tc")
        P_sat, v_l, v_v, result = saturation_pressure(model, T)
    else:
        P = np.asarray(to_si(P, "P"), dtype=float)
        _check_range(P, model.fluid.Pc, "P", "Pa", "the critical pressure Pc")
        T, v_l, v_v, result = saturation_temperature(model, P)
        P_sat = P
    return Saturation(model, _scalar_or_array(T), _scalar_or_array(P_sat),
                      _scalar_or_array(v_l), _scalar_or_array(v_v), result)


def _check_range(x, critical, name, unit, what):
    bad = ~((x > 0.0) & (x <= critical))
    if np.any(bad):
        first = x[bad].flat[0] if x.ndim else float(x)
        raise DomainError(
            f"No saturation at {name} = {first:.6g} {unit}: it exists only for 0 < {name} <= "
            f"{critical:.6g} {unit} ({what}). Above it the fluid is supercritical; use solve()."
        )


# --------------------------------------------------------------------------- P from T

def saturation_pressure(model, T):
    """Saturation pressure [Pa] and saturated volumes [m^3/mol] at T [K] (array, T <= Tc)."""
    T = np.asarray(T, dtype=float)
    P = np.full(T.shape, np.nan)
    v_l, v_v = np.full(T.shape, np.nan), np.full(T.shape, np.nan)
    Tc = model.fluid.Tc
    near = T >= Tc * (1.0 - _UNRESOLVED_GAP)   # closer to Tc than doubles can split the phases
    P[near], v_l[near], v_v[near] = _critical_tangent(model, T[near])
    below = ~near
    result = None
    if np.any(below):
        Tb = T[below]
        lo, hi = _pressure_window(model, Tb)
        result = find_root(_fugacity_gap, bracket=(np.log(lo), np.log(hi)), args=(model, Tb),
                           xtol=0.0, rtol=_LNP_RTOL, maxiter=200, trace=False)
        P[below] = np.exp(result.root)
        v_l[below], v_v[below] = _saturated_volumes(model, Tb, P[below], lo, hi)
        # a window only a few floats wide may show no clean sign change: take the tangent
        unresolved = ~np.asarray(result.converged) & (Tb >= Tc * (1.0 - 1e-8))
        if np.any(unresolved):
            idx = np.flatnonzero(below)[unresolved]
            P[idx], v_l[idx], v_v[idx] = _critical_tangent(model, T[idx])
            result = _accept(result, unresolved)
        _require(result, "saturation pressure", Tb, "T", "K")
    return P, v_l, v_v, result


def _critical_tangent(model, T):
    """Saturation pressure on the tangent at the critical point, where the phases merge.

    The saturation line's slope at the critical point equals the critical isochore's,
    (dP/dT) at v_c; both volumes are taken as v_c.
    """
    Tc = model.fluid.Tc
    P = model.fluid.Pc + model.dP_dT(Tc, model.v_c) * (np.minimum(T, Tc) - Tc)
    v_c = np.full(np.shape(T), model.v_c)
    return P, v_c, v_c.copy()


def _accept(result, mask):
    """The result with the masked elements marked converged (settled another way)."""
    import dataclasses

    converged = np.asarray(result.converged).copy()
    converged[mask] = True
    status = np.asarray(result.status, dtype=object).copy()
    status[mask] = "converged"
    return dataclasses.replace(result, converged=converged, status=status)


def spinodal_volumes(model, T):
    """Liquid and vapour spinodal volumes [m^3/mol] (dP/dv = 0) at T < Tc [K].

    The spinodals lie on either side of the model's critical volume: dP/dv < 0 as v -> b
    and as v -> infinity, and dP/dv > 0 at v_c for every T < Tc.
    """
    T = np.asarray(T, dtype=float)
    v_c = np.full(T.shape, model.v_c)
    v_big = _beyond_vapor_spinodal(model, T)
    common = dict(args=(T,), xtol=0.0, rtol=1e-13, maxiter=200, trace=False)
    slope = _isotherm_slope(model)
    liquid = find_root(slope, bracket=(np.full(T.shape, model.v_min + 1e-12 * model.b), v_c), **common)
    vapor = find_root(slope, bracket=(v_c, v_big), **common)
    return liquid.root, vapor.root


def _isotherm_slope(model):
    def slope(v, T):
        return model.dP_dv(T, v) * v / (R * T)  # scaled to order one
    return slope


def _beyond_vapor_spinodal(model, T):
    """A volume past the vapour spinodal, where dP/dv < 0 again."""
    a, _ = model.attraction(T)
    v = model.v_c + 4.0 * a / (R * T)   # dP/dv ~ -RT/v^2 + 2a/v^3 < 0 once v > 2a/(RT)
    for _ in range(60):
        rising = model.dP_dv(T, v) >= 0.0
        if not np.any(rising):
            return v
        v = np.where(rising, 4.0 * v, v)
    return v


def _pressure_window(model, T):
    """Pressures between which the cubic has three roots at T: the saturation bracket."""
    v_sl, v_sv = spinodal_volumes(model, T)
    hi = model.pressure(T, v_sv)
    lo = model.pressure(T, v_sl)
    lo = np.where(lo > 0.0, lo, hi * _LOWEST_REDUCED_PRESSURE)
    return np.asarray(lo, dtype=float), np.asarray(hi, dtype=float)


def _fugacity_gap(lnP, model, T):
    """ln phi_liquid - ln phi_vapor at (T, P = exp(lnP)); +1 or -1 where one root is left.

    The gap equals the equal-area integral (1/RT) * integral from v_liquid to v_vapor of
    (P(v) - P) dv. Near the critical point the two ln phi are equal to within rounding,
    so there the integral itself is evaluated, by Gauss-Legendre quadrature over the narrow
    interval, which keeps the sign of the gap right up to Tr = 1 - 1e-9.
    """
    P = np.exp(lnP)
    v = volume_roots(model, T, P)
    v_liquid, v_vapor = v[..., 0], np.nanmax(v, axis=-1)
    three = np.isfinite(v[..., 2])
    with np.errstate(invalid="ignore", divide="ignore"):
        gap = model.ln_phi(T, v_liquid, P) - model.ln_phi(T, v_vapor, P)
        narrow = three & (v_vapor < _NARROW_DOME * v_liquid)
        if np.any(narrow):
            gap = np.where(narrow, _equal_area_gap(model, T, P, v_liquid, v_vapor), gap)
    one_side = np.where(v_liquid > model.v_c, 1.0, -1.0)  # lone vapour root: below the window
    return np.where(three, gap, one_side)


def _equal_area_gap(model, T, P, v_liquid, v_vapor):
    """(1/RT) * integral of (P(v) - P) dv over [v_liquid, v_vapor], by Gauss-Legendre."""
    half, mid = (v_vapor - v_liquid) / 2.0, (v_vapor + v_liquid) / 2.0
    total = 0.0
    for node, weight in zip(*_GAUSS_LEGENDRE):
        total = total + weight * (model.pressure(T, mid + half * node) - P)
    return total * half / (R * T)


def _saturated_volumes(model, T, P, lo, hi):
    """Liquid and vapour roots at the saturation pressure (window edges if roots merged)."""
    v = volume_roots(model, T, P)
    v_l, v_v = v[..., 0], v[..., 2]
    merged = ~np.isfinite(v_v)
    if np.any(merged):  # last-bit rounding put P on the window's edge: step inside it
        Pm = np.clip(P[merged], np.nextafter(lo[merged], np.inf), np.nextafter(hi[merged], -np.inf))
        vm = volume_roots(model, T[merged], Pm)
        v_l[merged], v_v[merged] = vm[..., 0], np.nanmax(vm, axis=-1)
    return v_l, v_v


# --------------------------------------------------------------------------- T from P

def saturation_temperature(model, P):
    """Saturation temperature [K] and saturated volumes at P [Pa] (array, P <= Pc).

    ln Psat(T) rises strictly with T (Clausius-Clapeyron), so T is bracketed between a low
    temperature and Tc, and each trial T costs one vectorized saturation-pressure solve.
    """
    P = np.asarray(P, dtype=float)
    T = np.full(P.shape, model.fluid.Tc)
    v_l, v_v = np.full(P.shape, model.v_c), np.full(P.shape, model.v_c)
    below = P < model.fluid.Pc
    result = None
    if np.any(below):
        Pb = P[below]
        T_lo = np.full(Pb.shape, _lowest_temperature(model, Pb))
        T_hi = np.full(Pb.shape, model.fluid.Tc)

        def log_pressure_gap(Tx, target):
            return np.log(saturation_pressure(model, Tx)[0] / target)

        result = find_root(log_pressure_gap, bracket=(T_lo, T_hi), args=(Pb,),
                           xtol=0.0, rtol=4.0 * np.finfo(float).eps, maxiter=200, trace=False)
        _require(result, "saturation temperature", Pb, "P", "Pa")
        T[below] = result.root
        _, v_l[below], v_v[below], _ = saturation_pressure(model, result.root)
    return T, v_l, v_v, result


def _lowest_temperature(model, P):
    """A temperature whose saturation pressure lies below every P (down to Tr = 0.05)."""
    Tc = model.fluid.Tc
    for Tr in (0.35, 0.2, 0.1, 0.05):
        if saturation_pressure(model, np.array([Tr * Tc]))[0][0] < np.min(P):
            return Tr * Tc
    raise DomainError(
        f"P = {np.min(P):.3g} Pa is below the model's saturation pressure at Tr = 0.05; "
        "the fluid would be solid long before. Give a higher pressure."
    )


def _require(result, what, x, name, unit):
    failed = ~np.asarray(result.converged)
    if np.any(failed):
        first = np.asarray(x)[failed].flat[0]
        status = np.asarray(result.status, dtype=object)[failed].flat[0] if np.ndim(result.status) else result.status
        raise ConvergenceError(f"The {what} did not converge at {name} = {first:.6g} {unit} ({status}).", result)
