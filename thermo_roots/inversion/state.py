"""Two knowns to a state: `solve(model, T=..., P=...)` and its result, :class:`State`.

Pairs understood: any two of T, P, v, rho, rho_mass (two volume measures excepted), and
quality with T or P. Inputs are SI floats or arrays, text with units or pint quantities.
"""

from __future__ import annotations

import functools
from dataclasses import dataclass, field

import numpy as np

from ..errors import ConvergenceError, DomainError, InputError
from ..models import IdealGas, R, _scalar_or_array
from ..roots import find_root
from ..units import STANDARD_ATMOSPHERE, to_si
from .cubic import phase_codes, stable_roots, volume_roots
from ._problems import Problems, check_errors_option, si_array
from .saturation import saturation_pressure, saturation_temperature

#: Root kinds, as labelled on every root.
LIQUID_LIKE, VAPOR_LIKE, UNSTABLE = "liquid-like", "vapor-like", "unstable"
#: Phases a state can have.
PHASES = ("liquid", "vapor", "supercritical", "two-phase")
#: The phase of an element that could not be solved (its reason is in State.reason).
NOT_SOLVED = "not solved"
#: The phases as an object array, indexed by the integer codes of the cubic module (and
#: one more code for an element not solved).
_PHASE_OBJECTS = np.array(PHASES + (NOT_SOLVED,), dtype=object)
_NOT_SOLVED_CODE = np.int8(len(PHASES))


class _PhaseCodes:
    """Phases held as int8 codes (indices into PHASES) until someone reads them."""

    __slots__ = ("codes",)

    def __init__(self, codes):
        self.codes = codes


class _Phase:
    """The descriptor behind State.phase: strings, built from codes on first read.

    A (T, P) solve of many states stores small integer codes; the object array of
    strings that users see ("liquid", "two-phase", ...) costs more than the solve's own
    bookkeeping, so it is made once, when ``phase`` is first read, and kept.
    """

    def __set_name__(self, owner, name):
        self.slot = "_" + name

    def __get__(self, state, owner=None):
        if state is None:
            raise AttributeError("phase has no default")   # tells dataclass: a required field
        value = state.__dict__[self.slot]
        if isinstance(value, _PhaseCodes):
            value = _PHASE_OBJECTS.take(value.codes)
            state.__dict__[self.slot] = value
        return value

    def __set__(self, state, value):   # reached from the dataclass __init__ only (frozen)
        state.__dict__[self.slot] = value
_VOLUME_KNOWNS = ("v", "rho", "rho_mass")
#: Energy knowns (molar, and their mass-basis twins read into molar values); with P only, for now.
_ENERGY_KNOWNS = ("h", "s", "u", "h_mass", "s_mass", "u_mass")
_ALL_KNOWNS = ("T", "P") + _VOLUME_KNOWNS + ("quality",) + _ENERGY_KNOWNS
#: Knowns that are absolute and positive (an energy has an arbitrary zero; quality its own range).
_POSITIVE_KNOWNS = ("T", "P") + _VOLUME_KNOWNS
_BRANCHES = ("stable", "liquid", "vapor")


@dataclass(frozen=True)
class Root:
    """One real volume root of the cubic at the state's (T, P)."""

    v: float          #: molar volume [m^3/mol]
    Z: float          #: compressibility factor [-]
    kind: str         #: "liquid-like", "vapor-like" or "unstable" (dP/dv > 0)
    ln_phi: float     #: ln of the fugacity coefficient [-]
    stable: bool      #: the root of lowest Gibbs energy at (T, P)
    caloric: object = field(default=None, repr=False)   #: properties.Caloric of this root (molar, SI)

    @property
    def fugacity_coefficient(self) -> float:
        return float(np.exp(self.ln_phi))



@dataclass(frozen=True)
class State:
    """A solved state of one model. Scalars for a scalar solve, arrays for an array solve.

    Attributes
    ----------
    T : temperature [K]
    P : pressure [Pa]
    v : molar volume [m^3/mol] (the mixture's mean volume in the two-phase region)
    phase : "liquid", "vapor", "supercritical" or "two-phase"
    quality : vapor mole fraction [-], NaN outside the two-phase region
    v_liquid, v_vapor : saturated volumes [m^3/mol] for two-phase states, else NaN
    root_volumes : all real roots v > b at (T, P), shape (..., 3), ascending, NaN-padded
    metastable : True where the state is a single-phase root other than the stable one
        (asked for with ``branch=``): between binodal and spinodal.
    knowns : the two quantities given, as SI values
    convergence : result of the root finder that inverted the knowns, in the knowns' shape
        (None when the state followed in closed form). Elements it did not iterate (bad
        input, or settled another way) have status "not iterated".
    reason : why an element is not solved ("" where it is), str or array of str; such
        elements are NaN with phase "not solved"
    T_other : (P, v) knowns only: a second temperature [K] that gives the same P and v in
        the model, NaN where the answer is unique (see solve's Notes)
    warnings : plain sentences about the result (empty when none)
    """

    model: object = field(repr=False)
    T: object
    P: object
    v: object
    phase: object = _Phase()
    quality: object
    v_liquid: object = field(repr=False)
    v_vapor: object = field(repr=False)
    root_volumes: object = field(repr=False)
    metastable: object = field(repr=False)
    knowns: dict = field(repr=False, default_factory=dict)
    convergence: object = field(repr=False, default=None)
    reason: object = field(repr=False, default="")
    T_other: object = field(repr=False, default=float("nan"))
    warnings: tuple = field(repr=False, default=())

    # -- derived values
    @property
    def rho(self):
        """Molar density [mol/m^3]."""
        return _scalar_or_array(1.0 / np.asarray(self.v))

    @property
    def rho_mass(self):
        """Mass density [kg/m^3]."""
        return _scalar_or_array(self.model.fluid.molar_mass / np.asarray(self.v))

    @property
    def Z(self):
        """Compressibility factor P v / (R T) [-]."""
        return _scalar_or_array(np.asarray(self.P) * np.asarray(self.v) / (R * np.asarray(self.T)))

    @functools.cached_property
    def root_ln_phi(self):
        """ln phi of every root, shape (..., 3), NaN where a root does not exist."""
        T = np.asarray(self.T, dtype=float)[..., None]
        if isinstance(self.model, IdealGas):
            return np.where(np.isfinite(self.root_volumes), 0.0, np.nan)
        with np.errstate(invalid="ignore"):
            return self.model.ln_phi(T, self.root_volumes, np.asarray(self.P, dtype=float)[..., None])

    @functools.cached_property
    def root_kinds(self):
        """Kind of every root ("liquid-like", "vapor-like", "unstable", "" if none), (..., 3)."""
        return _root_kinds(self.model, np.asarray(self.T, dtype=float), self.root_volumes)

    @property
    def roots(self):
        """For a scalar state, a tuple of :class:`Root`; for arrays, :attr:`root_volumes`."""
        if np.ndim(self.T):
            return self.root_volumes
        stable = _stable_index(self.root_ln_phi, self.root_kinds)
        # on the saturation line the liquid and vapor roots coexist: equal Gibbs energy
        coexist = self.phase == "two-phase"
        out = []
        for i, v in enumerate(self.root_volumes):
            if np.isfinite(v):
                kind = str(self.root_kinds[i])
                lowest = (kind != UNSTABLE) if coexist else (i == stable)
                out.append(Root(float(v), float(self.P * v / (R * self.T)), kind,
                                float(self.root_ln_phi[i]), bool(lowest), _root_caloric(self, v)))
        return tuple(out)

    @functools.cached_property
    def P_sat(self):
        """The model's saturation pressure at this T [Pa]; NaN at or above Tc."""
        return _scalar_or_array(_sat_or_nan(self.model, self.T, self.model.fluid.Tc, saturation_pressure))

    @functools.cached_property
    def T_sat(self):
        """The model's saturation temperature at this P [K]; NaN at or above Pc."""
        return _scalar_or_array(_sat_or_nan(self.model, self.P, self.model.fluid.Pc, saturation_temperature))

    @property
    def superheat(self):
        """T - T_sat(P) [K]: above zero a superheated vapor, below zero a subcooled liquid."""
        return _scalar_or_array(np.asarray(self.T) - np.asarray(self.T_sat))

    @property
    def pressure_margin(self):
        """P / P_sat(T) - 1 [-]: how far the pressure is from saturation at this T."""
        return _scalar_or_array(np.asarray(self.P) / np.asarray(self.P_sat) - 1.0)

    # -- caloric properties (molar unless _mass; SI): see thermo_roots.properties
    @functools.cached_property
    def _caloric(self):
        return _state_caloric(self)

    h = property(lambda self: self._caloric.h, doc="Enthalpy [J/mol] (lever rule in the two-phase region).")
    s = property(lambda self: self._caloric.s, doc="Entropy [J/(mol K)] (lever rule in the two-phase region).")
    u = property(lambda self: self._caloric.u, doc="Internal energy [J/mol] (lever rule in the two-phase region).")
    g = property(lambda self: self._caloric.g, doc="Gibbs energy [J/mol] (lever rule in the two-phase region).")
    cp = property(lambda self: self._caloric.cp, doc="Isobaric heat capacity [J/(mol K)]; NaN when two-phase.")
    cv = property(lambda self: self._caloric.cv, doc="Isochoric heat capacity [J/(mol K)]; NaN when two-phase.")
    w = property(lambda self: self._caloric.w, doc="Speed of sound [m/s]; NaN when two-phase.")
    mu_jt = property(lambda self: self._caloric.mu_jt, doc="Joule-Thomson coefficient [K/Pa]; NaN when two-phase.")
    kappa_T = property(lambda self: self._caloric.kappa_T, doc="Isothermal compressibility [1/Pa]; NaN when two-phase.")
    h_mass = property(lambda self: _per_mass(self, self.h), doc="Specific enthalpy [J/kg].")
    s_mass = property(lambda self: _per_mass(self, self.s), doc="Specific entropy [J/(kg K)].")
    u_mass = property(lambda self: _per_mass(self, self.u), doc="Specific internal energy [J/kg].")
    cp_mass = property(lambda self: _per_mass(self, self.cp), doc="Specific isobaric heat capacity [J/(kg K)].")
    cv_mass = property(lambda self: _per_mass(self, self.cv), doc="Specific isochoric heat capacity [J/(kg K)].")

    # -- display
    def summary(self) -> list[tuple[str, str]]:
        """(label, value-with-unit) rows for display of a scalar state."""
        from .display import state_rows

        return state_rows(self)

    def __repr__(self):
        if np.ndim(self.T):
            unsolved = int(np.count_nonzero(np.asarray(self.reason) != ""))
            note = f", {unsolved} not solved (see .reason)" if unsolved else ""
            return f"State({self.model!r}, {np.size(self.T)} states, shape {np.shape(self.T)}{note})"
        if self.reason:
            return f"State({self.model!r}, not solved: {self.reason})"
        quality = f", quality={self.quality:.4g}" if self.phase == "two-phase" else ""
        return (f"State({self.model!r}, T={self.T:.6g} K ({self.T - 273.15:.6g} °C), "
                f"P={self.P:.6g} Pa ({self.P / 1e5:.6g} bar), v={self.v:.6g} m³/mol, "
                f"rho_mass={self.rho_mass:.6g} kg/m³, Z={self.Z:.6g}, phase={self.phase!r}{quality})")

    def __str__(self):
        """The state in engineering units, with its warnings and the caution (for print)."""
        from .display import state_text

        return state_text(self)

    def _repr_html_(self):
        from .display import state_html

        return state_html(self)


# --------------------------------------------------------------------------- public entry

def solve(model, *, branch: str = "stable", atmosphere=STANDARD_ATMOSPHERE, errors: str = "nan",
          **knowns) -> State:
    """Solve the state of a model from two knowns.

    Parameters
    ----------
    model : IdealGas or CubicModel
        A model object, e.g. ``PengRobinson(get_fluid("propane"))``.
    branch : {"stable", "liquid", "vapor"}
        For (T, P): which root to report. "stable" (default) takes the lowest Gibbs
        energy; "liquid" or "vapor" takes that root where it exists (a metastable state,
        flagged) and the only root elsewhere.
    atmosphere : float or str
        Atmospheric pressure a gauge pressure (``"8 barg"``) refers to [Pa].
    errors : {"nan", "raise"}
        For array knowns: "nan" (default) gives NaN and a reason (:attr:`State.reason`) at
        every element that cannot be solved (not finite, out of range, no convergence) and
        solves the rest; "raise" raises at the first, naming its index and value. A scalar
        solve always raises.
    **knowns
        Exactly two of T [K], P [Pa], v [m^3/mol], rho [mol/m^3], rho_mass [kg/m^3],
        quality [-] (only with T or P); floats, arrays, text with units or pint quantities.

    Returns
    -------
    State

    Raises
    ------
    InputError
        Not a model, not two knowns, an unknown name, an unreadable value or unit,
        shapes that do not broadcast, or (scalar or errors="raise") a value that is not finite.
    DomainError
        (scalar or errors="raise") T or P not positive, v <= b, quality outside [0, 1],
        quality above Tc or Pc, no temperature that gives (P, v).
    ConvergenceError
        (scalar or errors="raise") An inversion did not converge (carries the root
        finder's result, in the caller's shape).

    Notes
    -----
    (P, v) -> T: at fixed v, P(T) = RT/(v-b) - a(T)/D(v) is concave in T for every alpha
    function here (a(T) is convex: constant for vdW, a_c/sqrt(Tr) for RK, and the Soave
    form's second derivative is positive), so it crosses a given P at most twice. Where the
    Soave alpha rises again past its minimum (T = Tc (1 + 1/m)^2, about 2.5 Tc for heavy
    fluids), P(T) can peak and fall: then a second, higher temperature gives the same
    (P, v). The lower one is reported as T, the other as :attr:`State.T_other` with a
    warning; where the peak lies below P, no temperature gives the state and it is
    refused with the peak pressure in the reason. The bracket of the lower root is
    T_lo = P (v-b)/R, where P(T_lo) <= P because a >= 0, up to the first of: a temperature
    where P >= P_given (starting from T_hi = (P + a(T_lo)/D)(v-b)/R, doubled), or the peak.

    References
    ----------
    Michelsen, M. L. & Mollerup, J. M. (2007), Thermodynamic Models: Fundamentals and
    Computational Aspects, 2nd ed., ch. 3 (root selection by Gibbs energy).
    Soave, G. (1972), Chem. Eng. Sci. 27, 1197-1203 (the alpha function).
    """
    _check_model(model, "solve")
    if not (isinstance(branch, str) and branch in _BRANCHES):
        raise InputError(f"branch={branch!r} is not one of {', '.join(_BRANCHES)}.")
    check_errors_option(errors)
    given = _read_knowns(model, knowns, atmosphere)
    shape = np.shape(next(iter(given.values())))
    flat = {k: np.atleast_1d(x).ravel() for k, x in given.items()}   # 1-D inside, shape restored at the end
    problems = Problems(next(iter(flat.values())).size, shape, strict=shape == () or errors == "raise")
    _check_knowns(model, flat, knowns, problems)
    pair = _PAIR_SOLVERS[frozenset(flat)]   # rho and rho_mass were turned into v
    if not problems.any:
        parts = pair(model, flat, problems, branch)
    else:   # solve the good elements only; the flagged ones stay NaN
        ok = problems.ok
        sub = Problems(int(ok.sum()), shape, problems.strict)
        parts = _scatter(pair(model, {k: x[ok] for k, x in flat.items()}, sub, branch), ok)
        problems.flag_at(np.flatnonzero(ok)[~sub.ok], sub.reason[~sub.ok])
    _flag_unfinite(model, parts, problems)
    return _make_state(model, shape, given, problems, **parts)


def _check_model(model, caller):
    """Refuse anything that is not a model object, with an example of one."""
    from ..models import _Model

    if isinstance(model, _Model):
        return
    example = "solve(tr.PengRobinson(tr.get_fluid('propane')), T='25 degC', P='10 bar')"
    if isinstance(model, type) and issubclass(model, _Model):
        raise InputError(f"{caller} needs a model object, not the class {model.__name__}: make one for a fluid, "
                         f"e.g. {model.__name__}(get_fluid('propane')).")
    raise InputError(f"{caller} needs a model object as its first argument, e.g. {example}; got {model!r}.")


def _read_knowns(model, knowns, atmosphere):
    unknown = sorted(set(knowns) - set(_ALL_KNOWNS))
    if unknown:
        raise InputError(f"Unknown quantity {', '.join(unknown)}; allowed: {', '.join(_ALL_KNOWNS)}.")
    if len(knowns) != 2:
        raise InputError(
            f"Give exactly two knowns, got {len(knowns)} ({', '.join(knowns) or 'none'}); "
            "e.g. solve(model, T='25 degC', P='10 bar')."
        )
    if sum(k in _VOLUME_KNOWNS for k in knowns) == 2:
        raise InputError(f"{' and '.join(knowns)} both fix the volume; give one of them with T or P.")
    if "quality" in knowns and not ({"T", "P"} & set(knowns)):
        raise InputError("quality goes with T or with P, e.g. solve(model, T='20 degC', quality=0.3).")
    energy = [k for k in knowns if k in _ENERGY_KNOWNS]
    volume = [k for k in knowns if k in _VOLUME_KNOWNS]
    if energy and energy[0].startswith("u") and not volume:
        raise InputError(f"{energy[0]} goes with a volume (a closed vessel: solve(model, u=..., rho_mass='600 kg/m3')); "
                         "give v, rho or rho_mass with it.")
    if energy and not energy[0].startswith("u") and "P" not in knowns:
        raise InputError(f"{energy[0]} goes with P for now (a valve outlet: solve(model, P='2 bar', h=...)); "
                         "the pairs with T, v or another energy are not built yet.")
    M = model.fluid.molar_mass
    si = {k: np.asarray(si_array(to_si, val, k, molar_mass=M, atmosphere=atmosphere), dtype=float)
          for k, val in knowns.items()}
    try:
        si = dict(zip(si, np.broadcast_arrays(*si.values())))
    except ValueError:
        shapes = ", ".join(f"{k} {np.shape(x)}" for k, x in si.items())
        raise InputError(f"The knowns' shapes do not broadcast together: {shapes}. Give arrays of one shape, "
                         "or shapes that numpy broadcasts (e.g. T of shape (n, 1) with P of shape (m,)).") from None
    return si


def _check_knowns(model, flat, given, problems):
    """Flag every element whose knowns lie outside the model's domain (NaN, <= 0, v <= b, ...)."""
    def value(name, i):
        x = flat[name][i]
        text = given[name] if isinstance(given[name], str) else None
        return f"{x:.6g} {_unit(name)}" + (f" (given as {text!r})" if text else "")

    for name, x in flat.items():
        positive = name in _POSITIVE_KNOWNS
        if positive and _all_positive_finite(x):   # the common case: one quick pass
            continue
        problems.flag(~np.isfinite(x), lambda i, n=name: f"{n} = {value(n, i)} is not a finite number (NaN, inf or a masked element).",
                      kind=InputError)
        if positive:
            absolute = " absolute" if name in ("T", "P") else ""
            problems.flag(x <= 0.0, lambda i, n=name, a=absolute: f"{n} must be above zero{a}: got {value(n, i)}.")
    M = model.fluid.molar_mass
    for name in ("h", "s", "u"):
        if f"{name}_mass" in flat:
            flat[name] = flat.pop(f"{name}_mass") * M
    if "rho" in flat:
        flat["v"] = 1.0 / flat.pop("rho")
    if "rho_mass" in flat:
        flat["v"] = M / flat.pop("rho_mass")
    v_min = model.v_min
    if "v" in flat and not flat["v"].min(initial=np.inf) > v_min:
        problems.flag(flat["v"] <= v_min, lambda i: (
            f"v = {flat['v'][i]:.6g} m³/mol is at or below the co-volume b = {v_min:.6g} m³/mol of {model.name} "
            f"for {model.fluid.name}: no fluid is that dense in this model. Check the volume or density and its unit."))
    if "quality" in flat:
        q = flat["quality"]
        problems.flag((q < 0.0) | (q > 1.0), lambda i: f"quality must be between 0 and 1; got {q[i]:.6g}.")
        if isinstance(model, IdealGas):
            raise DomainError("The ideal gas has no saturation, so quality has no meaning; choose a cubic model.")
        if "T" in flat:
            T = flat["T"]
            problems.flag(T > model.fluid.Tc, lambda i: (
                f"quality needs T at or below Tc = {model.fluid.Tc:.6g} K; got {T[i]:.6g} K."))
        else:
            P = flat["P"]
            problems.flag(P > model.fluid.Pc, lambda i: (
                f"quality needs P at or below Pc = {model.fluid.Pc:.6g} Pa; got {P[i]:.6g} Pa."))


def _flag_unfinite(model, parts, problems):
    """A solved element whose T, P or v came out NaN or inf is refused, not reported."""
    T, P, v = (np.asarray(parts[k], dtype=float) for k in ("T", "P", "v"))
    if problems.any:
        T, P, v = (np.where(problems.ok, x, 1.0) for x in (T, P, v))   # flagged already: not again
    if _all_positive_finite(T) and _all_positive_finite(P) and _all_positive_finite(v):
        return   # the common case, in three quick passes
    bad = ~(np.isfinite(T) & np.isfinite(P) & np.isfinite(v) & (v > 0.0))
    problems.flag(bad, lambda i: (
        f"the model gives no finite state at T = {T[i]:.6g} K, P = {P[i]:.6g} Pa, v = {v[i]:.6g} m³/mol: "
        f"these knowns lie outside the range {model.name} holds in double precision (e.g. a pressure or "
        "temperature hundreds of orders of magnitude from the critical point). Check the values and units."))


def _all_positive_finite(x) -> bool:
    """Every element above zero and finite (min and max are quick; NaN fails both tests)."""
    return x.size == 0 or bool(x.min() > 0.0 and x.max() < np.inf)


def _scatter(parts, ok):
    """The pair solver's values on the good elements, spread over the full flat arrays (NaN elsewhere)."""
    n = ok.size
    out = {}
    for key, x in parts.items():
        if key == "convergence":
            out[key] = x
            continue
        x = np.asarray(x)
        if key == "phase" and x.dtype == np.int8:
            full = np.full(n, _NOT_SOLVED_CODE, np.int8)
        elif x.dtype == object:
            full = np.full((n,) + x.shape[1:], NOT_SOLVED, dtype=object)
        elif x.dtype == bool:
            full = np.zeros((n,) + x.shape[1:], bool)
        else:
            full = np.full((n,) + x.shape[1:], np.nan)
        full[ok] = x
        out[key] = full
    out["convergence"] = _expand_convergence(parts.get("convergence"), ok)
    return out


def _expand_convergence(convergence, ok):
    """The root finder's record, (result, flat indices it covers) in the caller's flat indexing."""
    if convergence is None:
        return None
    result, covered = convergence
    return result, np.flatnonzero(ok)[covered]


# --------------------------------------------------------------------------- the pairs
# Each takes the flat SI knowns of the elements to solve and a Problems of the same size
# (to flag what it cannot solve) and returns the state's parts; "convergence" is the root
# finder's result with the flat indices it covers.

def _from_T_P(model, flat, problems, branch):
    T, P = flat["T"], flat["P"]
    if isinstance(model, IdealGas):
        v_roots = _ideal_roots(T, P)
        stable, v = np.zeros(T.shape, np.int8), v_roots[:, 0]
        phase = phase_codes(model, T, P, v)
    else:
        with np.errstate(all="ignore"):   # overflowing coefficients are flagged as unfinite after
            v_roots, stable, v, phase = stable_roots(model, T, P)
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
    if not isinstance(model, IdealGas):
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
                roots=_roots_for(model, T, P))


def _from_P_v(model, flat, problems, branch=None):
    P, v = flat["P"], flat["v"]
    if isinstance(model, IdealGas):
        return _from_T_v(model, {"T": P * v / R, "v": v}, problems)
    quality, v_l, v_v = (np.full(P.shape, np.nan) for _ in range(3))
    T, T_other = np.full(P.shape, np.nan), np.full(P.shape, np.nan)
    inside = np.zeros(P.shape, bool)
    sub = P < model.fluid.Pc
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
                roots=_roots_for(model, T, P), convergence=convergence, T_other=T_other)


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
    a_lo, _ = model.attraction(T_lo)
    T_hi = (P + a_lo / model._denominator(v)) * (v - model.v_min) / R * (1.0 + 1e-12)
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
                roots=_roots_for(model, T, P),
                convergence=None if result is None else (result, np.arange(np.size(result.root))))


def _coldest_temperature(model):
    """The cold end [K] of the energy inversions' brackets: as cold as the model's saturation
    reaches, and no colder than half the triple point (1 K for the ideal gas)."""
    if isinstance(model, IdealGas):
        return 1.0
    from .saturation import lowest_saturation_temperature

    return max(1.01 * lowest_saturation_temperature(model), 0.5 * (model.fluid.T_triple or 0.2 * model.fluid.Tc))


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
    ideal = isinstance(model, IdealGas)
    T_lo = _coldest_temperature(model)
    segment = np.full(n, "stable", dtype=object)
    lo, hi = np.full(n, T_lo), np.full(n, 4.0 * Tc)
    sub = (P < Pc) & (not ideal)
    if np.any(sub):
        i = np.flatnonzero(sub)
        T_sat, vl, vv, _ = saturation_temperature(model, P[i], strict=False)
        e_l = getattr(caloric(model, T_sat, vl, P[i]), name)
        e_v = getattr(caloric(model, T_sat, vv, P[i]), name)
        edge = 1e-10 * np.abs(e_v - e_l)   # on the saturated ends within rounding: quality 0 or 1
        two = (target[i] >= e_l - edge) & (target[i] <= e_v + edge)
        k = i[two]
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
        roots = _roots_for(model, Tx, Px)
        first = roots[:, 0]
        last = np.where(np.isfinite(roots[:, 2]), roots[:, 2], roots[:, 0])
        stable = stable_roots(model, Tx, Px)[2] if np.any(seg == "stable") and not ideal else first
        return np.where(seg == "liquid", first, np.where(seg == "vapor", last, stable))

    def gap(Tx, Px, target_x, seg):
        vx = branch_volume(Tx, Px, seg)
        return (getattr(caloric(model, Tx, vx, Px), name) - target_x) / scale

    if np.any(single):
        j = np.flatnonzero(single)
        # the top end grows until the energy is passed (a hot gas), up to 64 Tc
        for _ in range(5):
            short = gap(hi[j], P[j], target[j], segment[j]) < 0.0
            short &= segment[j] != "liquid"
            if not short.any():
                break
            hi[j[short]] *= 2.0
        with np.errstate(all="ignore"):
            g_lo = gap(lo[j], P[j], target[j], segment[j])
            g_hi = gap(hi[j], P[j], target[j], segment[j])
        outside = ~((g_lo <= 0.0) & (g_hi >= 0.0))
        problems.flag_at(j[outside], [
            f"{name} = {target[k]:.6g} {_unit(name)} at P = {P[k]:.6g} Pa lies outside what {model.name} gives "
            f"between {lo[k]:.4g} K and {hi[k]:.4g} K; check the value, its unit and its reference state."
            for k in j[outside]], kind=DomainError)
        j = j[~outside]
        if j.size:
            result = find_root(gap, bracket=(lo[j], hi[j]), args=(P[j], target[j], segment[j]), xtol=0.0,
                               rtol=4.0 * np.finfo(float).eps, maxiter=200, trace=False)
            ok = np.asarray(result.converged)
            convergence = (result, j)
            T[j[ok]] = np.asarray(result.root)[ok]
            v[j[ok]] = branch_volume(T[j[ok]], P[j[ok]], segment[j[ok]])
            problems.flag_at(j[~ok], [f"the temperature at P = {P[k]:.6g} Pa and {name} = {target[k]:.6g} "
                                      f"{_unit(name)} did not converge." for k in j[~ok]])
    T_safe = np.where(np.isfinite(T), T, Tc)
    phase = np.asarray(_single_phase(model, T_safe, P, np.where(np.isfinite(v), v, 1.0)), dtype=object)
    phase[np.isfinite(quality)] = "two-phase"
    return dict(T=T, P=P, v=v, phase=phase, quality=quality, v_liquid=v_l, v_vapor=v_v,
                roots=_roots_for(model, T_safe, P), convergence=convergence)


def _from_u_v(model, flat, problems, branch=None):
    """(u, v) -> T: at fixed v, u rises with T (du/dT = cv > 0, also across the dome, where the
    lever-rule u of a (T, v) state keeps rising), so T is bracketed between a cold and a hot
    end and every trial temperature is one vectorized (T, v) solve.
    """
    v, target = flat["v"], flat["u"]
    Tc = model.fluid.Tc
    T_lo = _coldest_temperature(model)
    scale = R * Tc

    def u_at(Tx, vx):
        state = solve(model, T=Tx, v=vx)
        return np.asarray(state.u, dtype=float), state

    def gap(Tx, vx, ux):
        return (u_at(Tx, vx)[0] - ux) / scale

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
    problems.flag_at(j, [f"u = {target[k]:.6g} J/mol at v = {v[k]:.6g} m³/mol lies outside what {model.name} gives "
                         f"between {lo[k]:.4g} K and {hi[k]:.4g} K; check the value, its unit and its reference state."
                         for k in j], kind=DomainError)
    T = np.full(v.shape, np.nan)
    go = np.flatnonzero(~outside)
    if go.size:
        result = find_root(gap, bracket=(lo[go], hi[go]), args=(v[go], target[go]), xtol=0.0,
                           rtol=4.0 * np.finfo(float).eps, maxiter=200, trace=False)
        ok = np.asarray(result.converged)
        T[go[ok]] = np.asarray(result.root)[ok]
        problems.flag_at(go[~ok], [f"the temperature at u = {target[k]:.6g} J/mol, v = {v[k]:.6g} m³/mol did not "
                                   "converge." for k in go[~ok]])
    done = solve(model, T=np.where(np.isfinite(T), T, Tc), v=v)
    parts = {key: np.array(getattr(done, key), dtype=float) for key in ("P", "quality", "v_liquid", "v_vapor")}
    return dict(T=T, v=v, phase=np.asarray(done.phase, dtype=object), roots=done.root_volumes, **parts)


#: The solver of each pair of knowns (volume measures are read as v first).
_PAIR_SOLVERS = {
    frozenset({"T", "P"}): _from_T_P,
    frozenset({"T", "v"}): _from_T_v,
    frozenset({"P", "v"}): _from_P_v,
    frozenset({"T", "quality"}): _from_quality,
    frozenset({"P", "quality"}): _from_quality,
    frozenset({"P", "h"}): functools.partial(_from_P_energy, name="h"),
    frozenset({"P", "s"}): functools.partial(_from_P_energy, name="s"),
    frozenset({"u", "v"}): _from_u_v,
}


def _lowest_saturation_temperature(model, T):
    """The model's lowest saturation temperature [K], worked out only if some T is low."""
    from .saturation import lowest_saturation_temperature

    return lowest_saturation_temperature(model) if np.any(T < 0.35 * model.fluid.Tc) else 0.0


def _no_saturation_reason(model, T, P):
    from .saturation import lowest_saturation_temperature

    T_min = lowest_saturation_temperature(model)
    return (f"below T = {T_min:.4g} K the model's saturation pressure is under the smallest it resolves; "
            f"give T of at least {T_min:.4g} K (the real fluid is solid there long before).")


# --------------------------------------------------------------------------- helpers

def _ideal_roots(T, P):
    roots = np.full(T.shape + (3,), np.nan)
    roots[..., 0] = R * T / P
    return roots


def _roots_for(model, T, P):
    return _ideal_roots(T, P) if isinstance(model, IdealGas) else volume_roots(model, T, P)


def _root_kinds(model, T, v_roots):
    """Label roots: dP/dv > 0 is unstable; otherwise liquid-like below v_c, vapor-like above."""
    kinds = np.full(v_roots.shape, "", dtype=object)
    exists = np.isfinite(v_roots)
    if isinstance(model, IdealGas):
        kinds[exists] = VAPOR_LIKE
        return kinds
    with np.errstate(invalid="ignore"):
        rising = model.dP_dv(np.asarray(T)[..., None], v_roots) > 0.0
    kinds[exists & (v_roots < model.v_c)] = LIQUID_LIKE
    kinds[exists & (v_roots >= model.v_c)] = VAPOR_LIKE
    kinds[exists & rising] = UNSTABLE
    return kinds


def _stable_index(ln_phi, kinds):
    """Index of the root of lowest Gibbs energy (lowest ln phi) among the non-unstable ones."""
    usable = np.where((kinds != UNSTABLE) & (kinds != "") & np.isfinite(ln_phi), ln_phi, np.inf)
    return np.argmin(usable, axis=-1)


def _branch_index(kinds, stable, branch):
    if branch == "stable":
        return stable
    wanted = LIQUID_LIKE if branch == "liquid" else VAPOR_LIKE
    has = kinds == wanted
    # the liquid-like root is the first, the vapor-like the last existing one
    first = np.argmax(has, axis=-1)
    last = kinds.shape[-1] - 1 - np.argmax(has[..., ::-1], axis=-1)
    pick = first if branch == "liquid" else last
    return np.where(np.any(has, axis=-1), pick, stable)


def _single_phase(model, T, P, v):
    """Phase of a single-phase state: above Tc by pressure, below Tc by the root's side of v_c."""
    T, P, v = np.broadcast_arrays(np.asarray(T), np.asarray(P), np.asarray(v))
    return _PHASE_OBJECTS.take(phase_codes(model, T, P, v))


_CALORIC_NAMES = ("h", "s", "u", "g", "cp", "cv", "w", "mu_jt", "kappa_T")
#: Properties of a single phase that a two-phase mixture has no single value of.
_SINGLE_PHASE_ONLY = ("cp", "cv", "w", "mu_jt", "kappa_T")


def _root_property(name):
    def read(root):
        return float("nan") if root.caloric is None else getattr(root.caloric, name)
    return property(read, doc=f"{name} of this root (molar, SI; NaN without ideal-gas data).")


for _name in _CALORIC_NAMES:   # root.h, root.cp, root.w, ...
    setattr(Root, _name, _root_property(_name))


def _state_caloric(state):
    """The state's Caloric record: one phase from (T, v, P); two-phase by the lever rule.

    h, s, u, g of a two-phase state are the quality-weighted sums over the saturated liquid
    and vapor at (T, P_sat); cp, cv, w, mu_jt and kappa_T are NaN there (one number would
    mislead: cp and kappa_T are infinite across the dome, w and mu_jt have no single value).
    Elements not solved are NaN throughout.
    """
    from ..properties import Caloric

    T, P, v = (np.asarray(x, dtype=float) for x in (state.T, state.P, state.v))
    ok = np.isfinite(v)
    every = bool(ok.all())   # then no masking: each np.where costs a pass over 10^6 states
    single = _caloric_on_reference(state.model, T, *((v, P) if every else (np.where(ok, v, 1.0), np.where(ok, P, 1.0))))
    two = np.array(np.isfinite(np.asarray(state.quality, dtype=float)))   # quality: NaN outside the dome, so only
    if two.any():                                                  # these need the (slower) phase words
        two[two] = np.asarray(state.phase, dtype=object)[two] == "two-phase"
    any_two = bool(two.any())
    values = {}
    for name in Caloric._fields:
        x = getattr(single, name) if every else np.where(ok, getattr(single, name), np.nan)
        if any_two and name in _SINGLE_PHASE_ONLY:
            x = np.where(two, np.nan, x)
        values[name] = x
    if any_two:
        q, vl, vv = (np.asarray(x, dtype=float) for x in (state.quality, state.v_liquid, state.v_vapor))
        liquid = _caloric_on_reference(state.model, T, np.where(two, vl, 1.0), P)
        vapor = _caloric_on_reference(state.model, T, np.where(two, vv, 1.0), P)
        for name in ("h", "s", "u", "g"):
            mixed = (1.0 - q) * getattr(liquid, name) + q * getattr(vapor, name)
            values[name] = np.where(two, mixed, values[name])
    return Caloric(**{k: _scalar_or_array(x) for k, x in values.items()})


def _root_caloric(state, v):
    """The Caloric record of one root of a scalar state (None without ideal-gas data)."""
    from ..errors import DomainError
    from ..properties import Caloric

    try:
        record = _caloric_on_reference(state.model, state.T, v, state.P)
    except DomainError:
        return None
    return Caloric(*(float(x) for x in record))


#: Where each convention puts h and s [J/kg, J/(kg K)] on saturated liquid, and at which T [K]
#: (None: the normal boiling point, the saturation temperature at 101.325 kPa).
_CONVENTIONS = {"IIR": (273.15, 200e3, 1e3), "ASHRAE": (233.15, 0.0, 0.0), "NBP": (None, 0.0, 0.0)}


def _energy_offset(model):
    """(dh [J/mol], ds [J/(mol K)]) that move h and s from the reference equation's zero to the
    model's convention, fixed with the model's own saturated liquid; worked out once."""
    if model.reference_state == "reference":
        return 0.0, 0.0
    cached = model.__dict__.get("_energy_offset")
    if cached is None:
        from ..properties import caloric

        T0, h0, s0 = _CONVENTIONS[model.reference_state]
        if T0 is None:
            T, v_l, _, _ = saturation_temperature(model, np.array([101325.0]))
            T0, P0 = float(T[0]), 101325.0
        else:
            if T0 >= model.fluid.Tc:
                raise DomainError(f"reference_state={model.reference_state!r} fixes h and s on saturated liquid at "
                                  f"{T0 - 273.15:g} °C, above Tc = {model.fluid.Tc:.6g} K of {model.fluid.name}; "
                                  "choose 'reference' or 'NBP'.")
            P, v_l, _, _ = saturation_pressure(model, np.array([T0]))
            P0 = float(P[0])
        raw = caloric(model, T0, float(v_l[0]), P0)
        M = model.fluid.molar_mass
        cached = (h0 * M - float(raw.h), s0 * M - float(raw.s))
        model.__dict__["_energy_offset"] = cached
    return cached


def _caloric_on_reference(model, T, v, P):
    """properties.caloric, with h, s, u, g moved onto the model's reference state."""
    from ..properties import caloric

    record = caloric(model, T, v, P)
    dh, ds = _energy_offset(model)
    if dh == 0.0 and ds == 0.0:
        return record
    T = np.asarray(T, dtype=float)
    return record._replace(h=record.h + dh, u=record.u + dh, s=record.s + ds, g=record.g + dh - T * ds)


def _per_mass(state, x):
    return _scalar_or_array(np.asarray(x, dtype=float) / state.model.fluid.molar_mass)


def _sat_or_nan(model, x, critical, solver):
    """The saturation P (or T) at x; NaN at or above the critical value and where the model
    has none (below its lowest saturation temperature), so that a state always displays."""
    x = np.asarray(x, dtype=float)
    out = np.full(x.shape, np.nan)
    if isinstance(model, IdealGas):
        return out
    below = x < critical
    if np.any(below):
        out[below] = solver(model, x[below], strict=False)[0]
    return out


def _make_state(model, shape, knowns, problems, *, T, P, v, phase, roots, quality=None, v_liquid=None,
                v_vapor=None, metastable=None, convergence=None, T_other=None):
    """Restore the broadcast shape of the knowns; a scalar solve gives Python scalars.

    Elements flagged in ``problems`` become NaN with phase "not solved".
    """
    bad = ~problems.ok if problems.any else None

    def shaped(a, dtype):   # a field the pair does not give is NaN: a read-only view, no memory
        a = np.broadcast_to(np.nan, np.shape(T)) if a is None else np.asarray(a, dtype=dtype)
        if bad is not None and dtype is float:
            a = np.where(bad, np.nan, a)
        a = a.reshape(shape)
        return a.item() if shape == () else a

    phase = np.asarray(phase)
    roots = np.asarray(roots, dtype=float)
    if bad is not None:
        phase, roots = phase.copy(), np.where(bad[:, None], np.nan, roots)
        phase[bad] = _NOT_SOLVED_CODE if phase.dtype == np.int8 else NOT_SOLVED
    if phase.dtype == np.int8:   # codes from the (T, P) path: strings made when first read
        phase = _PhaseCodes(phase.reshape(shape)) if shape else _PHASE_OBJECTS[int(phase.reshape(()))]
    else:
        phase = shaped(phase, object)
    warnings = problems.summary() + _two_phase_note(phase) + _solid_warning(model, np.asarray(T, dtype=float) if bad is None
                                                   else np.asarray(T, dtype=float)[~bad])
    T_other = shaped(T_other, float)
    n_other = int(np.sum(np.isfinite(T_other)))
    if n_other:
        warnings += (_second_temperature_warning(T_other, n_other, np.size(T_other), model),)
    return State(model, shaped(T, float), shaped(P, float), shaped(v, float), phase,
                 shaped(quality, float), shaped(v_liquid, float), shaped(v_vapor, float),
                 roots.reshape(shape + (3,)),
                 shaped(np.zeros(np.shape(T), bool) if metastable is None else metastable, bool),
                 {k: (val.item() if shape == () else val) for k, val in knowns.items()},
                 _shaped_convergence(convergence, problems, shape),
                 problems.reason[0] if shape == () else problems.reason.reshape(shape),
                 T_other, warnings)


def _two_phase_note(phase):
    codes_or_words = phase.codes if isinstance(phase, _PhaseCodes) else np.asarray(phase, dtype=object)
    if codes_or_words.dtype == np.int8 or not np.any(codes_or_words == "two-phase"):
        return ()
    return ("In the two-phase region cp, cv, speed of sound, Joule-Thomson coefficient and kappa_T have no "
            "single value: they are NaN there (h, s, u and g follow the lever rule).",)


def _solid_warning(model, T):
    """A sentence where T lies below the fluid's triple point: the real fluid is solid there."""
    T_triple = model.fluid.T_triple
    if T_triple is None:
        return ()
    cold = int(np.count_nonzero(T < T_triple)) if T.size and T.min() < T_triple else 0
    if not cold:
        return ()
    where = "T is" if T.size == 1 else f"At {cold} of {T.size} states T is"
    solid = "solid (dry ice)" if model.fluid.library_name == "CarbonDioxide" else "solid"
    return (f"{where} below the triple point of {model.fluid.name} ({T_triple:.6g} K): the real fluid is "
            f"{solid} there, or solid and vapor, and solid may form and block a line; a cubic equation of "
            "state does not represent the solid (it shows a liquid, a vapor or a liquid-vapor split).",)


def _second_temperature_warning(T_other, count, total, model):
    if np.ndim(T_other) == 0:
        return (f"A second temperature, {T_other:.6g} K, gives the same P and v in {model.name}: at this "
                "volume the model's pressure rises with T to a peak and falls again. The lower temperature "
                "is reported; the other is State.T_other.")
    return (f"At {count} of {total} states a second, higher temperature gives the same P and v in "
            f"{model.name} (see State.T_other); the lower one is reported.")


def _shaped_convergence(convergence, problems, shape):
    """The root finder's record over the caller's shape; a scalar solve keeps its own result."""
    if convergence is None:
        return None
    result, covered = convergence
    if shape == ():
        return result if np.ndim(result.root) == 0 else _scalar_view(result)
    import dataclasses

    n = problems.reason.size
    root, converged = np.full(n, np.nan), np.ones(n, bool)
    status = np.full(n, "not iterated", dtype=object)
    iterations, evaluations = np.zeros(n, int), np.zeros(n, int)
    root[covered], converged[covered] = result.root, result.converged
    status[covered] = np.asarray(result.status, dtype=object)
    iterations[covered], evaluations[covered] = result.iterations, result.evaluations
    converged[~problems.ok & (status == "not iterated")] = False
    return dataclasses.replace(result, root=root.reshape(shape), converged=converged.reshape(shape),
                               status=status.astype(str).reshape(shape), iterations=iterations.reshape(shape),
                               evaluations=evaluations.reshape(shape), trace=None)


def _scalar_view(result):
    """A one-element array result as a scalar one (its status a Status where it is one)."""
    import dataclasses

    from ..roots import Status

    text = str(np.asarray(result.status).reshape(-1)[0])
    status = Status(text) if text in {s.value for s in Status} else text
    return dataclasses.replace(result, root=float(np.asarray(result.root).reshape(-1)[0]),
                               converged=bool(np.asarray(result.converged).reshape(-1)[0]), status=status,
                               iterations=int(np.asarray(result.iterations).reshape(-1)[0]),
                               evaluations=int(np.asarray(result.evaluations).reshape(-1)[0]))


def _unit(name):
    """The SI unit of a known as people read it ("K", "Pa", "m³/mol", "" for quality)."""
    from ..quantities import quantity, unit_label

    return unit_label(name, quantity(name).si_unit)
