"""Saturation of a cubic equation of state by equal fugacity, vectorized over T or P.

At a temperature below Tc the isotherm has two spinodals (dP/dv = 0). Between their
pressures the cubic has three roots and the difference g(P) = ln phi_liquid - ln phi_vapor
falls strictly (dg/dlnP = Z_liquid - Z_vapor < 0), so the saturation pressure is the one
zero of g inside that window: a guaranteed bracket. Just outside the window only one root
is left; g is then given its known sign, so bracketed methods see a clean sign change.
Near the critical point the window narrows like (1 - Tr)^1.5; the solve runs in ln P to
full double precision, which resolves it up to Tr = 1 - 1e-9.

Speed. Finding the window costs two spinodal solves, so below Tr = 0.99 a fast path
comes first: Newton's method in ln P on the same gap, kept inside a bracket by the same
sign rule, from a start read off a corresponding-states table of the model's family; one
evaluation of the cubic's roots usually finishes. With the optional accelerator
(:mod:`thermo_roots._accel`, needs numba) it runs as one compiled loop. Whatever the fast
path does not finish goes to the window solver, which alone serves Tr >= 0.99.
"""

from __future__ import annotations

import functools
from dataclasses import dataclass, field

import numpy as np

from .. import _accel
from ..errors import ConvergenceError, DomainError, InputError, ThermoRootsError
from ..models import IdealGas, R, _scalar_or_array
from ..roots import RootResult, find_root
from .cubic import _volume_columns, volume_roots

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
    from ..units import to_si
    from .state import _check_model
    from ._problems import Problems, check_errors_option, si_array

    _check_model(model, "saturation")
    if isinstance(model, IdealGas):
        raise DomainError("The ideal gas has no saturation; choose a cubic model such as PengRobinson.")
    if (T is None) == (P is None):
        raise InputError("saturation() needs exactly one of T= or P=.")
    check_errors_option(errors)
    if T is not None:
        solved = _compiled_saturation_pressure(model, T)
        if solved is not None and not np.any(solved[0] < SATURATION_FLOOR * model.fluid.Pc):   # 1-D arrays already
            return Saturation(model, T, *solved, reason=np.full(T.shape, "", dtype=object))
    name, unit = ("T", "K") if T is not None else ("P", "Pa")
    x = np.asarray(si_array(to_si, T if T is not None else P, name), dtype=float)
    flat = np.atleast_1d(x).ravel()
    problems = Problems(flat.size, x.shape, strict=x.shape == () or errors == "raise")
    critical = model.fluid.Tc if name == "T" else model.fluid.Pc
    problems.flag(~np.isfinite(flat), lambda i: f"{name} = {flat[i]:.6g} {unit} is not a finite number.", InputError)
    problems.flag(~(flat > 0.0), lambda i: f"{name} must be above zero absolute: got {flat[i]:.6g} {unit}.")
    problems.flag(flat > critical, lambda i: (
        f"No saturation at {name} = {flat[i]:.6g} {unit}: it exists only for 0 < {name} <= {critical:.6g} {unit} "
        f"(the critical {'temperature Tc' if name == 'T' else 'pressure Pc'}). Above it the fluid is "
        "supercritical; use solve()."))
    if name == "T" and np.any(flat < 0.35 * model.fluid.Tc):
        T_min = lowest_saturation_temperature(model)
        problems.flag(flat < T_min, lambda i: _below_floor_message(model, flat[i]))
    if name == "P" and np.any(flat < 1e-90 * critical):
        T_min = lowest_saturation_temperature(model)
        P_min = _raw_saturation_pressure(model, np.array([T_min]), strict=False)[0][0]
        problems.flag(flat <= P_min, lambda i: (
            f"P = {flat[i]:.3g} Pa is below the lowest saturation pressure {model.name} serves for "
            f"{model.fluid.name} ({P_min:.3g} Pa, at T = {T_min:.4g} K); the fluid would be solid long "
            "before. Give a higher pressure."))
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

    :data:`SATURATION_FLOOR` times Pc; found once per model by bracketed root finding on
    ln Psat(T), which rises strictly with T (Clausius-Clapeyron), and kept on the model.
    """
    cached = model.__dict__.get("_lowest_saturation_T")
    if cached is None:
        target = np.array([SATURATION_FLOOR * model.fluid.Pc])
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


def _compiled_saturation_pressure(model, T):
    """:func:`saturation_pressure` for an array T [K] that is SI already, in one compiled pass.

    Serves 1-D float64 arrays of at least ACCEL_MIN_SIZE temperatures when the compiled
    loop is there: the loop reports T's range along the way, so the public checks need no
    pass of their own. None where the general path must serve: another input, no
    compiled loop, or T not all in 0 < T < Tc (1 - 1e-11) (NaN, a domain error to raise
    with its message, or the critical tangent).
    """
    if not (type(T) is np.ndarray and T.dtype is _FLOAT64 and T.ndim == 1 and T.size >= ACCEL_MIN_SIZE):
        return None
    tables = _start_tables(model.delta1, model.delta2)
    kernel = _accel.saturation_kernel(model)
    if kernel is None or tables is None:
        return None
    *out, (T_min, T_max, unfinished) = kernel(T, _TABLE_START, *tables, _SETTINGS)
    if not (T_min > 0.0 and T_max < model.fluid.Tc * (1.0 - _UNRESOLVED_GAP)):   # NaN fails
        return None
    fast = _newton_result(*out, unfinished=unfinished)
    return fast if unfinished == 0 else _below_critical(model, T, fast)


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


def _merge(fast, mask, slow):
    """The fast path's result with the masked elements replaced by the window solver's.

    Iterations and evaluations add up: what the fast path spent is counted too.
    """
    import dataclasses

    root, converged = np.array(fast.root, dtype=float), np.array(fast.converged, dtype=bool)
    status = np.array(fast.status, dtype=object)
    iterations, evaluations = np.array(fast.iterations), np.array(fast.evaluations)
    root[mask], converged[mask], status[mask] = slow.root, slow.converged, slow.status
    iterations[mask] += slow.iterations
    evaluations[mask] += slow.evaluations
    method = slow.method if np.all(mask) else f"{fast.method}+{slow.method}"
    return dataclasses.replace(fast, root=root, converged=converged, status=status.astype(str),
                               iterations=iterations, evaluations=evaluations, method=method)


# --------------------------------------------------------------------------- fast path

#: Below this reduced temperature the bracketed Newton iteration is tried first.
FAST_TR_MAX = 0.99
#: From this many temperatures on, the compiled loop (if numba is there) runs the iteration.
ACCEL_MIN_SIZE = 256
#: The dtype of a native float64 array (a singleton: compared by identity, which is quick).
_FLOAT64 = np.dtype(np.float64)
#: A Newton step of at most this size in ln P is taken as the last one (see _newton_saturation).
_ACCEPT_STEP = 1e-9
#: Iteration limit of the fast path (a bisection from the widest bracket needs about 55).
_FAST_MAXITER = 100
#: The corresponding-states table: nodes uniform in x = sqrt(1/s - _X_SHIFT), s from
#: _S_RANGE[1] down to _S_RANGE[0], where s = Tr / alpha(T) (see _start_tables).
_X_SHIFT, _S_RANGE, _TABLE_NODES = 0.99, (0.04, 0.995), 1024


def _newton_saturation(model, T):
    """Saturation pressure by a bracketed Newton iteration in ln P, where it finishes.

    The gap g(ln P) = ln phi_L - ln phi_V falls with ln P at the slope Z_L - Z_V (< 0)
    wherever the cubic has three roots; where it has one, the sign rule of
    :func:`_fugacity_gap` says which side of the saturation pressure P lies on. The
    bracket starts as [ln(1e-40 Pc), ln Pc] and shrinks at every evaluation; the step is
    Newton's where it stays inside, a bisection otherwise. The start comes from the
    corresponding-states table (:func:`_start_tables`), good to about 1e-9 in ln P, so one
    or two evaluations usually finish.

    A step |dx| <= :data:`_ACCEPT_STEP` ends the iteration with that step taken: Newton's
    error after it is |g''/(2 g')| dx^2, and |g''/(2 g')| stays below about 20 for every
    cubic below Tr = 0.99 (checked in tests/inversion/test_saturation_fast.py), so the
    error is under 2e-17, below the rounding of ln P.

    Parameters
    ----------
    model : CubicModel
    T : numpy.ndarray
        1-D temperatures [K].

    Returns
    -------
    P, v_l, v_v : numpy.ndarray
        [Pa], [m^3/mol]; NaN where the fast path did not finish.
    result : RootResult
        Per temperature; converged False where the window solver must take over
        (Tr >= FAST_TR_MAX, outside the table, iteration limit, merged roots).

    References
    ----------
    Michelsen, M. L. & Mollerup, J. M. (2007), Thermodynamic Models: Fundamentals and
    Computational Aspects, 2nd ed., ch. 11 (d ln phi / d ln P = Z - 1).
    Press, W. H. et al. (2007), Numerical Recipes, 3rd ed., section 9.4 (Newton's method
    safeguarded by bisection).
    """
    tables = _start_tables(model.delta1, model.delta2)
    if tables is None:
        return _newton_result(*_nothing_solved(T.size))
    kernel = _accel.saturation_kernel(model) if T.size >= ACCEL_MIN_SIZE else None
    if kernel is None:
        out = _newton_saturation_numpy(model, T, _TABLE_START, *tables, _SETTINGS)
    else:
        out = kernel(T, _TABLE_START, *tables, _SETTINGS)
    return _newton_result(*out[:-1])


def _newton_result(lnP, P, v_l, v_v, ok, iterations, evaluations, started, unfinished=None):
    """(P, v_l, v_v, RootResult) from the outputs of the fast path's loops (unfinished: how
    many are not ok, if known)."""
    n = ok.size
    if unfinished == 0 or (unfinished is None and ok.all()):
        status = _all_converged(n)
    else:
        status = np.where(ok, "converged", "iteration limit")
    return P, v_l, v_v, RootResult(lnP, ok, status, iterations, evaluations, None, "newton")


def _nothing_solved(n):
    """The fast path's outputs for n temperatures it has not solved."""
    return tuple(np.full(n, np.nan) for _ in range(4)) + (np.zeros(n, bool), np.zeros(n, np.int64),
                                                           np.zeros(n, np.int64), np.zeros(n, bool))


#: Newton steps on the cubic allowed to each root started from the table (see _table_roots).
_ROOT_STEPS = 4
#: A Newton step on a root of at most this share of it ends its refinement (see _refine_root).
_ROOT_TOL = 1e-11
#: The fast path's constants in the order the loops unpack them (see _newton_saturation_numpy).
_SETTINGS = (float(np.log(_LOWEST_REDUCED_PRESSURE)), _ACCEPT_STEP, _NARROW_DOME, float(_FAST_MAXITER), _LNP_RTOL,
             float(_ROOT_STEPS), _ROOT_TOL, FAST_TR_MAX)


@functools.lru_cache(maxsize=8)
def _all_converged(n):
    """A read-only status array "converged" of length n, shared (it is 60 bytes a state)."""
    status = np.full(n, "converged", dtype="<U15")
    status.setflags(write=False)
    return status


def fugacity_gap_z(zl, zv, A_over_B, B, delta1, delta2):
    """ln phi_L - ln phi_V [-] of the untranslated cubic from its roots Z_L, Z_V at one (T, P).

    From ln phi = Z - 1 - ln(Z - B) - (A/B) J(Z), J = ln((Z + d1 B)/(Z + d2 B))/(d1 - d2)
    (J = B/(Z + d B) when d1 = d2 = d): :meth:`CubicModel.ln_phi` written in Z, with the
    logarithms of the two phases merged, so two logarithms give the difference instead of
    six. A volume translation shifts both ln phi by the same cP/RT, so the difference is
    the translated model's too. ``tests/inversion/test_saturation_fast.py`` holds it to
    the difference of :meth:`CubicModel.ln_phi`. Compiled twin:
    :func:`thermo_roots._accel_kernels.fugacity_gap_z`.

    Parameters
    ----------
    zl, zv : numpy.ndarray
        Liquid and vapor roots of the cubic in Z [-].
    A_over_B : numpy.ndarray
        a / (b R T) [-].
    B : numpy.ndarray
        b P / (R T) [-].
    delta1, delta2 : float
        The family's constants [-].

    References
    ----------
    Michelsen, M. L. & Mollerup, J. M. (2007), Thermodynamic Models: Fundamentals and
    Computational Aspects, 2nd ed., ch. 3 and 4 (ln phi of the generalized cubic).
    Peneloux, A., Rauzy, E. & Freze, R. (1982), Fluid Phase Equilib. 8, 7-23 (translation
    leaves phase equilibrium unchanged).
    """
    if delta1 == delta2:
        attraction = B / (zl + delta1 * B) - B / (zv + delta1 * B)
    else:
        ratio = (zl + delta1 * B) * (zv + delta2 * B) / ((zl + delta2 * B) * (zv + delta1 * B))
        attraction = np.log(ratio) / (delta1 - delta2)
    return (zl - zv) - np.log((zl - B) / (zv - B)) - A_over_B * attraction


def _newton_saturation_numpy(model, T, start, table, volumes, settings):
    """The iteration of :func:`_newton_saturation` in numpy; the compiled twin is
    :func:`thermo_roots._accel_kernels.saturation_kernel` (same steps, same order; this
    one recovers Z from cubic.py's volumes, the loop keeps Z itself, so they agree to
    rounding, not bit for bit).

    The first evaluation takes its two roots from the table's volumes, refined by Newton
    on the cubic and checked (:func:`_table_roots`); where the check fails, and at every
    later evaluation, the closed form of :mod:`thermo_roots.inversion.cubic` gives them.

    Parameters
    ----------
    model : CubicModel
    T : numpy.ndarray
        1-D temperatures [K] below FAST_TR_MAX Tc.
    start : tuple
        (first node, 1 / spacing, shift) of the table's variable x = sqrt(alpha/Tr - shift) [-].
    table : numpy.ndarray
        ln(Psat/Pc) [-] of the constant-alpha model at the nodes.
    volumes : numpy.ndarray
        Shape (nodes, 2): v_L/b and Z_V [-] of its saturated phases at the nodes.
    settings : tuple
        (ln of the lowest reduced pressure, accepted last step, narrow-dome ratio,
        iteration limit, relative bracket width at which to give up, Newton steps per
        table root, relative step that ends them, reduced temperature from which T is
        left to the window solver) [-].

    Returns
    -------
    lnP, P, v_l, v_v, ok, iterations, evaluations, started : numpy.ndarray
        ln P [ln Pa], P [Pa], saturated volumes [m^3/mol], finished (bool), the counts,
        and whether the first evaluation's roots came from the table (bool).
    summary : tuple
        T's least and greatest value [K] (NaN if one T is NaN) and the number of T not
        finished (the compiled loop finds them on its way, so the public range check and
        the hand-over to the window solver need no pass of their own).
    """
    ln_lowest, accept, narrow, maxiter, eps4, root_steps, root_tol, fast_tr_max = settings
    n, c, d1, d2 = T.size, model.c, model.delta1, model.delta2
    a, _ = model.attraction(T)
    alpha = a / model.a_c
    A_over_B = a / (model.b * (R * T))
    lnPc = np.log(model.fluid.Pc)
    Tr = T / model.fluid.Tc
    ln_pr, rl, zv_start = _start_values(Tr, alpha, start, table, volumes)
    x = np.where(Tr < fast_tr_max, lnPc + ln_pr, np.nan)   # from fast_tr_max on: the window solver's
    lo, hi = np.full(n, lnPc + ln_lowest), np.full(n, lnPc)
    ok, iterations, evaluations = np.zeros(n, bool), np.zeros(n, np.int64), np.zeros(n, np.int64)
    P_last, z_l, z_v, last = np.full(n, np.nan), np.full(n, np.nan), np.full(n, np.nan), np.zeros(n)
    from_table = (x > lo) & (x < hi)   # the table's volumes belong to its own start only
    x = np.where(np.isnan(x) | from_table, x, lo + 0.5 * (hi - lo))   # NaN (outside the table) stays NaN
    started = np.zeros(n, bool)
    idx = np.flatnonzero(np.isfinite(x))
    with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
        for k in range(int(maxiter)):
            if idx.size == 0:
                break
            Ti, xi, lo_i, hi_i = T[idx], x[idx], lo[idx], hi[idx]
            P = np.exp(xi)
            to_z = P / (R * Ti)
            if k == 0:
                zl, zv, good = _table_roots(model, Ti, P, rl[idx], zv_start[idx], int(root_steps), root_tol)
                good &= from_table[idx]
                started[idx] = good
                scale = 1.0 / to_z
                v0, v2 = zl * scale - c, zv * scale - c
                rest = np.flatnonzero(~good)
                if rest.size:
                    cv0, _, cv2 = _volume_columns(model, Ti[rest], P[rest])
                    v0[rest], v2[rest] = cv0, cv2
                    zl[rest], zv[rest] = (cv0 + c) * to_z[rest], (cv2 + c) * to_z[rest]
            else:
                v0, _, v2 = _volume_columns(model, Ti, P)
                zl, zv = (v0 + c) * to_z, (v2 + c) * to_z
            evaluations[idx] += 1
            three = np.isfinite(v2)
            stop = three & (v2 < narrow * v0)   # phases too alike for the ln phi difference
            gap = fugacity_gap_z(zl, zv, A_over_B[idx], model.b * to_z, d1, d2)
            step = -gap / (zl - zv)
            rises = np.where(three, gap > 0.0, v0 > model.v_c)    # P below the saturation pressure
            falls = np.where(three, gap < 0.0, ~(v0 > model.v_c))
            lo_i, hi_i = np.where(rises, xi, lo_i), np.where(falls, xi, hi_i)
            iterations[idx] += ~stop
            done = three & ~stop & (np.abs(step) <= accept)
            xn = xi + step
            newton = three & (xn > lo_i) & (xn < hi_i)
            xn = np.where(newton, xn, lo_i + 0.5 * (hi_i - lo_i))
            collapsed = hi_i - lo_i <= eps4 * np.maximum(1.0, np.abs(xi))
            x[idx] = np.where(done | collapsed | stop, xi, xn)
            lo[idx], hi[idx] = lo_i, hi_i
            fin = idx[done]
            ok[fin] = True
            P_last[fin], z_l[fin], z_v[fin], last[fin] = P[done], zl[done], zv[done], step[done]
            idx = idx[~(done | stop | collapsed)]
    # the last step taken, and the roots carried to its pressure along their slopes
    v_l, v_v, P_out = np.full(n, np.nan), np.full(n, np.nan), P_last
    fin = np.flatnonzero(ok)
    if fin.size:
        step = last[fin]
        x[fin] += step
        c2, c1, _, B = model.cubic_coefficients(T[fin], P_last[fin])
        A = A_over_B[fin] * B
        zl = z_l[fin] + _root_rate(z_l[fin], c2, c1, A, B, d1 + d2, d1 * d2) * step
        zv = z_v[fin] + _root_rate(z_v[fin], c2, c1, A, B, d1 + d2, d1 * d2) * step
        growth = 1.0 + step * (1.0 + 0.5 * step)   # exp(step) to rounding, |step| <= 1e-9
        P_out[fin] = P = P_last[fin] * growth
        ok[fin] = (zl > B * growth) & (zv > zl)
        scale = R * T[fin] / P
        v_l[fin] = np.where(ok[fin], zl * scale - c, np.nan)
        v_v[fin] = np.where(ok[fin], zv * scale - c, np.nan)
    summary = (T.min(), T.max(), int(n - ok.sum())) if n else (np.inf, -np.inf, 0)
    return x, P_out, v_l, v_v, ok, iterations, evaluations, started, summary


def _root_rate(z, c2, c1, A, B, u, w):
    """dZ/dln P [-] of a root z of the cubic in Z at fixed T, by implicit differentiation.

    A = aP/(RT)^2 and B = bP/(RT) are proportional to P, so the coefficients' derivatives
    in ln P are polynomials in A and B; u = delta1 + delta2, w = delta1 delta2. The fast
    path's last step in ln P is at most 1e-9, so Z + rate * step is the root at the new
    pressure to about 1e-18 (the neglected term is of second order in the step).
    Compiled twin: :func:`thermo_roots._accel_kernels.root_rate`.

    References
    ----------
    Michelsen, M. L. & Mollerup, J. M. (2007), Thermodynamic Models: Fundamentals and
    Computational Aspects, 2nd ed., ch. 3 (the cubic in Z with A and B).
    """
    df = (3.0 * z + 2.0 * c2) * z + c1
    dfl = ((u - 1.0) * B * z + (A + 2.0 * w * B * B - u * B * (1.0 + 2.0 * B))) * z - B * (2.0 * A + w * B * (2.0 + 3.0 * B))
    return -dfl / df


def _table_roots(model, T, P, rl, zv, steps, tol):
    """The saturated liquid and vapor roots in Z [-] at (T, P), refined from the table.

    Each start (Z_L = B rl, Z_V = zv) is refined by Newton's method on the cubic
    (:func:`_refine_root`). The pair is kept only if it is the outer pair of three
    genuine roots: both steps came down to ``tol`` of the root, the third root from the
    sum of the roots (-c2) lies strictly between them, Z_L > B, and the cubic rises at
    both (its slope is positive at its outer roots, where dP/dv < 0, and negative at the
    middle one). Two starts that ran to the same root, to the middle root or nowhere fail.
    Compiled twin: :func:`thermo_roots._accel_kernels.table_roots`.

    Returns
    -------
    zl, zv : numpy.ndarray
        The refined roots [-] (meaningless where good is False).
    good : numpy.ndarray
        True where the pair passed the check.

    References
    ----------
    Press, W. H. et al. (2007), Numerical Recipes, 3rd ed., sections 5.6 (sum of the roots
    of a cubic) and 9.5 (Newton's method on a polynomial).
    """
    c2, c1, c0, B = model.cubic_coefficients(T, P)
    zl, dl = _refine_root(B * rl, c2, c1, c0, steps, tol)
    zv, dv = _refine_root(zv, c2, c1, c0, steps, tol)
    zm = -c2 - zl - zv
    with np.errstate(invalid="ignore"):
        good = (dl > 0.0) & (dv > 0.0) & (zl > B) & (zm > zl) & (zv > zm)   # NaN fails
    return zl, zv, good


def _refine_root(z, c2, c1, c0, steps, tol):
    """Newton's method on Z^3 + c2 Z^2 + c1 Z + c0 from z, at most ``steps`` steps.

    Returns the root and the cubic's slope at the point of the last step, once a step is
    at most tol |z| (Newton's error after it is of order (tol z)^2 times the root's
    separation over its size, at rounding for tol = 1e-11); NaN and 0 where no step came
    down so far. Compiled twin: :func:`thermo_roots._accel_kernels.refine_root`.
    """
    z = np.array(z, dtype=float)
    slope = np.zeros(z.shape)
    active = np.ones(z.shape, bool)
    with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
        for _ in range(steps):
            df = (3.0 * z + 2.0 * c2) * z + c1
            dz = (((z + c2) * z + c1) * z + c0) / df
            z = np.where(active, z - dz, z)
            slope = np.where(active, df, slope)
            active &= ~(np.abs(dz) <= tol * np.abs(z))
    return np.where(active, np.nan, z), np.where(active, 0.0, slope)


def _start_values(Tr, alpha, start, table, volumes):
    """ln(Psat/Pc), v_L/b and Z_V [-] from the tables by four-point Lagrange interpolation,
    NaN outside them. The compiled twin is :func:`thermo_roots._accel_kernels.start_values`.
    """
    x_first, inv_h, shift = start
    n = table.size
    with np.errstate(invalid="ignore"):
        t = (np.sqrt(alpha / Tr - shift) - x_first) * inv_h
        inside = (t >= 0.0) & (t <= n - 1.0)
        j = np.clip(np.where(inside, t, 0.0).astype(np.int64) - 1, 0, n - 4)
    u = t - j
    w = (-(u - 1.0) * (u - 2.0) * (u - 3.0) * _SIXTH, u * (u - 2.0) * (u - 3.0) * 0.5,
         -u * (u - 1.0) * (u - 3.0) * 0.5, u * (u - 1.0) * (u - 2.0) * _SIXTH)
    ln_pr = w[0] * table[j] + w[1] * table[j + 1] + w[2] * table[j + 2] + w[3] * table[j + 3] + np.log(alpha)
    rl = w[0] * volumes[j, 0] + w[1] * volumes[j + 1, 0] + w[2] * volumes[j + 2, 0] + w[3] * volumes[j + 3, 0]
    zv = w[0] * volumes[j, 1] + w[1] * volumes[j + 1, 1] + w[2] * volumes[j + 2, 1] + w[3] * volumes[j + 3, 1]
    return tuple(np.where(inside, value, np.nan) for value in (ln_pr, rl, zv))


def _table_nodes():
    """(first node, 1 / spacing, shift) and the nodes' s = Tr/alpha, for the table's variable."""
    x_first = np.sqrt(1.0 / _S_RANGE[1] - _X_SHIFT)
    x_last = np.sqrt(1.0 / _S_RANGE[0] - _X_SHIFT)
    x = np.linspace(x_first, x_last, _TABLE_NODES)
    h = (x_last - x_first) / (_TABLE_NODES - 1)
    return (float(x_first), float(1.0 / h), _X_SHIFT), 1.0 / (x * x + _X_SHIFT)


_SIXTH = 1.0 / 6.0
_TABLE_START, _TABLE_S = _table_nodes()


@functools.lru_cache(maxsize=16)
def _start_tables(delta1, delta2):
    """ln(Psat/Pc) and, shape (nodes, 2), v_L/b and Z_V [-] of the generalized cubic
    (delta1, delta2) with alpha = 1 at the nodes; None if they cannot be solved.

    Corresponding states of a two-parameter cubic: in Z, A = aP/(RT)^2 and B = bP/(RT)
    the saturation conditions contain T and P only through A and B, so B_sat, and with it
    Z_L, Z_V and v_L/b = Z_L/B, depend on theta = a/(bRT) alone. With a(T) = a_c alpha(T),
    theta/theta_c = alpha/Tr, and any model of the family satisfies ln(Psat/Pc) =
    ln(Psat/Pc)_(alpha = 1)(s) + ln alpha at s = Tr/alpha, with the same v_L/b and Z_V
    (untranslated) as the alpha = 1 model at s. The tables are solved once per family by
    the window solver; they give the starts of the Newton iterations only (in ln P and on
    the cubic's roots, each checked), so their accuracy decides the speed, never the
    answer. None if the window solver fails on them (the fast path is then skipped).

    References
    ----------
    Michelsen, M. L. & Mollerup, J. M. (2007), Thermodynamic Models: Fundamentals and
    Computational Aspects, 2nd ed., ch. 3 (the cubic in Z with A and B).
    """
    from ..fluids import Fluid
    from ..models import CubicFamily, CubicModel, _alpha_constant

    reduced = Fluid("reduced", 1.0, 1.0, 0.0, 1.0)
    model = CubicModel(reduced, CubicFamily("alpha = 1", delta1, delta2, _alpha_constant))
    try:
        P, v_l, v_v, result = _window_saturation(model, _TABLE_S)
    except ThermoRootsError:
        return None
    volumes = np.stack([v_l / model.b, P * v_v / (R * _TABLE_S)], axis=-1)
    if not (np.all(result.converged) and np.all(np.isfinite(P)) and np.all(np.isfinite(volumes))):
        return None
    table = np.log(P)
    for shared in (table, volumes):   # shared by every caller through the cache
        shared.setflags(write=False)
    return table, volumes


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


# --------------------------------------------------------------------------- T from P

def saturation_temperature(model, P, strict=True):
    """Saturation temperature [K] and saturated volumes at P [Pa] (array, P <= Pc).

    ln Psat(T) rises strictly with T (Clausius-Clapeyron), so T is bracketed between the
    model's lowest saturation temperature and Tc, and each trial T costs one vectorized
    saturation-pressure solve. strict : raise at the first P that fails (below the model's
    lowest saturation pressure, or not converged); with False those elements are NaN.
    """
    P = np.asarray(P, dtype=float)
    T = np.full(P.shape, model.fluid.Tc)
    v_l, v_v = np.full(P.shape, model.v_c), np.full(P.shape, model.v_c)
    T[np.isnan(P)] = np.nan
    below = P < model.fluid.Pc
    result = None
    if np.any(below):
        T_floor = lowest_saturation_temperature(model)
        P_floor = _raw_saturation_pressure(model, np.array([T_floor]), strict=False)[0][0]
        reachable = below & (P > P_floor)
        if strict and np.any(below & ~reachable):
            raise DomainError(
                f"P = {P[below & ~reachable].flat[0]:.3g} Pa is below the lowest saturation pressure "
                f"{model.name} serves for {model.fluid.name} ({P_floor:.3g} Pa, at T = {T_floor:.4g} K); "
                "the fluid would be solid long before. Give a higher pressure.")
        T[below & ~reachable], v_l[below & ~reachable], v_v[below & ~reachable] = np.nan, np.nan, np.nan
        Pb = P[reachable]
        if Pb.size:
            def log_pressure_gap(Tx, target):
                return np.log(_raw_saturation_pressure(model, Tx, strict=False)[0] / target)

            T_lo = _lowest_temperature(model, Pb, T_floor)
            result = find_root(log_pressure_gap, bracket=(np.full(Pb.shape, T_lo), np.full(Pb.shape, model.fluid.Tc)),
                               args=(Pb,), xtol=0.0, rtol=4.0 * np.finfo(float).eps, maxiter=200, trace=False)
            if strict:
                _require(result, "saturation temperature", Pb, "P", "Pa")
            T_b = np.where(result.converged, result.root, np.nan)
            T[reachable] = T_b
            _, v_l[reachable], v_v[reachable], _ = _raw_saturation_pressure(model, T_b, strict=False)
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
