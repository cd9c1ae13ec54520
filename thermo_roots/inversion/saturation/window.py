"""The window solver: saturation on the pressure window between the spinodals.

At a temperature below Tc the isotherm has two spinodals (dP/dv = 0). Between their
pressures the cubic has three roots and the difference g(P) = ln phi_liquid - ln phi_vapor
falls strictly (dg/dlnP = Z_liquid - Z_vapor < 0), so the saturation pressure is the one
zero of g inside that window: a guaranteed bracket. Just outside the window only one root
is left; g is then given its known sign, so bracketed methods see a clean sign change.
Near the critical point the window narrows like (1 - Tr)^1.5; the solve runs in ln P to
full double precision, which resolves it up to Tr = 1 - 1e-9. It costs two spinodal solves
per temperature, so the fast path (:mod:`.fast`) goes first where it can; this solver is the
proven one that serves Tr >= 0.99 and whatever the fast path leaves.
"""

from __future__ import annotations

import dataclasses
import numpy as np

from ...models import R
from ...roots import find_root
from ..cubic import volume_roots

#: Tolerances of the saturation solve in ln P: as tight as double precision allows.
_LNP_RTOL = 4.0 * np.finfo(float).eps
#: Where v_vapor / v_liquid is below this, the gap is taken from the equal-area integral.
_NARROW_DOME = 1.5
#: Eight-point Gauss-Legendre nodes and weights on [-1, 1].
_GAUSS_LEGENDRE = np.polynomial.legendre.leggauss(8)
#: 1 - Tr below which the pressure window (~(1 - Tr)^1.5) is narrower than double precision.
_UNRESOLVED_GAP = 1e-11
#: The lower end of the pressure window when the liquid spinodal lies below zero pressure.
_LOWEST_REDUCED_PRESSURE = 1e-120

def _window_saturation(model, T):
    """Saturation on the spinodal window (the proven path, valid up to Tr = 1 - 1e-9)."""
    Tc = model.fluid.Tc
    lo, hi = _pressure_window(model, T)
    result = find_root(_fugacity_gap, bracket=(np.log(lo), np.log(hi)), args=(model, T),
                       xtol=0.0, rtol=_LNP_RTOL, maxiter=200, trace=False)
    P = np.exp(result.root)
    v_l, v_v = _saturated_volumes(model, T, P, lo, hi)
    # a window only a few floats wide may show no clean sign change: take the tangent
    unresolved = ~np.asarray(result.converged) & (T >= Tc * (1.0 - 1e-8))
    if np.any(unresolved):
        P[unresolved], v_l[unresolved], v_v[unresolved] = _critical_tangent(model, T[unresolved])
        result = _accept(result, unresolved)
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
    converged = np.asarray(result.converged).copy()
    converged[mask] = True
    status = np.asarray(result.status, dtype=object).copy()
    status[mask] = "converged"
    return dataclasses.replace(result, converged=converged, status=status)


def spinodal_volumes(model, T):
    """Liquid and vapor spinodal volumes [m^3/mol] (dP/dv = 0) at T < Tc [K].

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
    """A volume past the vapor spinodal, where dP/dv < 0 again."""
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
    one_side = np.where(v_liquid > model.v_c, 1.0, -1.0)  # lone vapor root: below the window
    return np.where(three, gap, one_side)


def _equal_area_gap(model, T, P, v_liquid, v_vapor):
    """(1/RT) * integral of (P(v) - P) dv over [v_liquid, v_vapor], by Gauss-Legendre."""
    half, mid = (v_vapor - v_liquid) / 2.0, (v_vapor + v_liquid) / 2.0
    total = 0.0
    for node, weight in zip(*_GAUSS_LEGENDRE):
        total = total + weight * (model.pressure(T, mid + half * node) - P)
    return total * half / (R * T)


def _saturated_volumes(model, T, P, lo, hi):
    """Liquid and vapor roots at the saturation pressure (window edges if roots merged)."""
    v = volume_roots(model, T, P)
    v_l, v_v = v[..., 0], v[..., 2]
    merged = ~np.isfinite(v_v)
    if np.any(merged):  # last-bit rounding put P on the window's edge: step inside it
        Pm = np.clip(P[merged], np.nextafter(lo[merged], np.inf), np.nextafter(hi[merged], -np.inf))
        vm = volume_roots(model, T[merged], Pm)
        v_l[merged], v_v[merged] = vm[..., 0], np.fmax.reduce(vm, axis=-1)   # NaN, quietly, where none
    return v_l, v_v



def _window_saturation_temperature(model, P, cold, warm):
    """Saturation temperature [K] and volumes at 1-D P [Pa] near the critical point, by
    bracketed root finding in T on the window solver's own gap at fixed P.

    :func:`_fugacity_gap` is the equal-area integral where the dome is narrow and keeps
    its sign rule outside the three-root window (a lone vapor root: T above the
    saturation temperature, +1; a lone liquid root: below it, -1), so it changes sign once
    in [cold, warm], at the saturation temperature; the gap's error maps to T through the
    saturation line's slope as it maps to ln P at fixed T, so this is as precise as the
    window solver. It costs one cubic solve per step instead of one window solve (two
    spinodal solves and a saturation solve) per trial temperature.

    cold, warm : a bracket [K] (from the temperature iteration's sign rule, or [T_lo, Tc]).

    Returns T, v_l, v_v (NaN where the root finder did not converge or the final (T, P)
    has fewer than three roots: the caller's proven path takes those) and the RootResult.
    """
    lnP = np.log(P)
    result = find_root(lambda T, lnp: _fugacity_gap(lnp, model, T), bracket=(cold, warm), args=(lnP,),
                       xtol=0.0, rtol=_LNP_RTOL, maxiter=200, trace=False)
    T = np.where(result.converged, result.root, np.nan)
    v = volume_roots(model, T, P)
    ok = np.asarray(result.converged) & np.isfinite(v[..., 2]) & (v[..., 2] > v[..., 0])
    result = dataclasses.replace(result, converged=ok, status=np.where(ok, "converged", "no window root"))
    return np.where(ok, T, np.nan), np.where(ok, v[..., 0], np.nan), np.where(ok, v[..., 2], np.nan), result
