"""Two knowns to a state: `solve(model, T=..., P=...)` and its result, :class:`State`.

Pairs understood: any two of T, P, v, rho, rho_mass (two volume measures excepted), and
quality with T or P. Inputs are SI floats or arrays, text with units or pint quantities.
"""

from __future__ import annotations

import functools
from dataclasses import dataclass, field

import numpy as np

from ..errors import DomainError, InputError
from ..models import IdealGas, R, _scalar_or_array
from ..roots import find_root
from ..units import STANDARD_ATMOSPHERE, to_si
from .cubic import phase_codes, stable_roots, volume_roots
from .saturation import saturation_pressure, saturation_temperature

#: Root kinds, as labelled on every root.
LIQUID_LIKE, VAPOR_LIKE, UNSTABLE = "liquid-like", "vapor-like", "unstable"
#: Phases a state can have.
PHASES = ("liquid", "vapor", "supercritical", "two-phase")
#: The phases as an object array, indexed by the integer codes of the cubic module.
_PHASE_OBJECTS = np.array(PHASES, dtype=object)


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
_ALL_KNOWNS = ("T", "P") + _VOLUME_KNOWNS + ("quality",)
_BRANCHES = ("stable", "liquid", "vapor")


@dataclass(frozen=True)
class Root:
    """One real volume root of the cubic at the state's (T, P)."""

    v: float          #: molar volume [m^3/mol]
    Z: float          #: compressibility factor [-]
    kind: str         #: "liquid-like", "vapor-like" or "unstable" (dP/dv > 0)
    ln_phi: float     #: ln of the fugacity coefficient [-]
    stable: bool      #: the root of lowest Gibbs energy at (T, P)

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
    quality : vapour mole fraction [-], NaN outside the two-phase region
    v_liquid, v_vapor : saturated volumes [m^3/mol] for two-phase states, else NaN
    root_volumes : all real roots v > b at (T, P), shape (..., 3), ascending, NaN-padded
    metastable : True where the state is a single-phase root other than the stable one
        (asked for with ``branch=``): between binodal and spinodal.
    knowns : the two quantities given, as SI values
    convergence : result of the root finder that inverted the knowns (None when the state
        followed in closed form)
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
        out = []
        for i, v in enumerate(self.root_volumes):
            if np.isfinite(v):
                out.append(Root(float(v), float(self.P * v / (R * self.T)), str(self.root_kinds[i]),
                                float(self.root_ln_phi[i]), bool(i == stable)))
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
        """T - T_sat(P) [K]: above zero a superheated vapour, below zero a subcooled liquid."""
        return _scalar_or_array(np.asarray(self.T) - np.asarray(self.T_sat))

    @property
    def pressure_margin(self):
        """P / P_sat(T) - 1 [-]: how far the pressure is from saturation at this T."""
        return _scalar_or_array(np.asarray(self.P) / np.asarray(self.P_sat) - 1.0)

    # -- display
    def summary(self) -> list[tuple[str, str]]:
        """(label, value-with-unit) rows for display of a scalar state."""
        from .display import state_rows

        return state_rows(self)

    def __repr__(self):
        if np.ndim(self.T):
            return f"State({self.model!r}, {np.size(self.T)} states, shape {np.shape(self.T)})"
        return (f"State({self.model!r}, T={self.T:.6g} K, P={self.P:.6g} Pa, v={self.v:.6g} m3/mol, "
                f"Z={self.Z:.6g}, phase={self.phase!r})")

    def _repr_html_(self):
        from .display import state_html

        return state_html(self)


# --------------------------------------------------------------------------- public entry

def solve(model, *, branch: str = "stable", atmosphere=STANDARD_ATMOSPHERE, **knowns) -> State:
    """Solve the state of a model from two knowns.

    Parameters
    ----------
    model : IdealGas or CubicModel
    branch : {"stable", "liquid", "vapor"}
        For (T, P): which root to report. "stable" (default) takes the lowest Gibbs
        energy; "liquid" or "vapor" takes that root where it exists (a metastable state,
        flagged) and the only root elsewhere.
    atmosphere : float or str
        Atmospheric pressure a gauge pressure (``"8 barg"``) refers to [Pa].
    **knowns
        Exactly two of T [K], P [Pa], v [m^3/mol], rho [mol/m^3], rho_mass [kg/m^3],
        quality [-] (only with T or P); floats, arrays, text with units or pint quantities.

    Returns
    -------
    State

    Raises
    ------
    InputError
        Not two knowns, an unknown name, an unreadable value or unit.
    DomainError
        T or P not positive, v <= b, quality outside [0, 1], quality above Tc or Pc.
    ConvergenceError
        An inversion did not converge (carries the root finder's result).

    Notes
    -----
    (P, v) -> T: at fixed v, P = RT/(v-b) - a(T)/D(v) rises with T wherever a(T) does
    not, which holds for every alpha function here below Tc (1 + 1/m)^2, where the Soave
    alpha has its minimum (about 2.5 Tc for heavy fluids, omega ~ 0.9, up to about 9 Tc
    for omega ~ 0). The bracket is T_lo = P (v-b)/R, where P(T_lo) <= P because a >= 0,
    and T_hi = (P + a(T_lo)/D) (v-b)/R, where P(T_hi) >= P while a falls. Should the
    Soave alpha rise again past its minimum, T_hi is doubled until the sign changes, and
    the root found is the lowest-temperature one in that bracket.

    References
    ----------
    Michelsen, M. L. & Mollerup, J. M. (2007), Thermodynamic Models: Fundamentals and
    Computational Aspects, 2nd ed., ch. 3 (root selection by Gibbs energy).
    """
    if branch not in _BRANCHES:
        raise InputError(f"branch={branch!r} is not one of {', '.join(_BRANCHES)}.")
    given = _read_knowns(model, knowns, atmosphere)
    shape = np.shape(next(iter(given.values())))
    flat = {k: np.atleast_1d(x).ravel() for k, x in given.items()}   # 1-D inside, shape restored at the end
    names = frozenset(given)
    if "quality" in names:
        parts = _from_quality(model, flat)
    elif names == {"T", "P"}:
        parts = _from_T_P(model, flat["T"], flat["P"], branch)
    elif "T" in names:
        parts = _from_T_v(model, flat["T"], flat["v"])
    else:
        parts = _from_P_v(model, flat["P"], flat["v"])
    return _make_state(model, shape, given, **parts)


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
    M = model.fluid.molar_mass
    si = {k: np.asarray(to_si(val, k, molar_mass=M, atmosphere=atmosphere), dtype=float)
          for k, val in knowns.items()}
    si = dict(zip(si, np.broadcast_arrays(*si.values())))
    for name in ("T", "P", "v", "rho", "rho_mass"):
        if name in si and np.any(si[name] <= 0.0):
            given = f" (given as {knowns[name]!r})" if isinstance(knowns[name], str) else ""
            absolute = " absolute" if name in ("T", "P") else ""
            raise DomainError(f"{name} must be above zero{absolute}: got {_first(si[name], si[name] <= 0.0):.6g} "
                              f"{_unit(name)}{given}.")
    if "rho" in si:
        si["v"] = 1.0 / si.pop("rho")
    if "rho_mass" in si:
        si["v"] = M / si.pop("rho_mass")
    v_min = getattr(model, "v_min", 0.0)
    if "v" in si and np.any(si["v"] <= v_min):
        raise DomainError(
            f"v = {_first(si['v'], si['v'] <= v_min):.6g} m3/mol is at or below the co-volume "
            f"b = {v_min:.6g} m3/mol of {model.name} for {model.fluid.name}: no fluid is that dense "
            "in this model. Check the volume or density and its unit."
        )
    if "quality" in si and np.any((si["quality"] < 0.0) | (si["quality"] > 1.0)):
        raise DomainError(f"quality must be between 0 and 1; got {_first(si['quality'], True):.6g}.")
    return si


# --------------------------------------------------------------------------- the pairs

def _from_T_P(model, T, P, branch):
    if isinstance(model, IdealGas):
        v_roots = _ideal_roots(T, P)
        stable, v = np.zeros(T.shape, np.int8), v_roots[:, 0]
        phase = phase_codes(model, T, P, v)
    else:
        v_roots, stable, v, phase = stable_roots(model, T, P)
    if branch == "stable":
        metastable = np.zeros(T.shape, bool)
    else:
        chosen = _branch_index(_root_kinds(model, T, v_roots), stable, branch)
        v = np.take_along_axis(v_roots, chosen[..., None], axis=-1)[..., 0]
        phase = phase_codes(model, T, P, v)
        metastable = chosen != stable
    return dict(T=T, P=P, v=v, phase=phase, roots=v_roots, metastable=metastable)


def _from_T_v(model, T, v):
    P = np.asarray(model.pressure(T, v), dtype=float)
    quality, v_l, v_v = (np.full(T.shape, np.nan) for _ in range(3))
    phase = np.asarray(_single_phase(model, T, P, v), dtype=object)
    if not isinstance(model, IdealGas):
        sub = T < model.fluid.Tc
        if np.any(sub):
            P_sat, vl, vv, _ = saturation_pressure(model, T[sub])
            idx = _lever_rule(v, sub, P_sat, vl, vv, P, v_l, v_v, quality)
            phase[idx] = "two-phase"
    return dict(T=T, P=P, v=v, phase=phase, quality=quality, v_liquid=v_l, v_vapor=v_v,
                roots=_roots_for(model, T, P))


def _from_P_v(model, P, v):
    if isinstance(model, IdealGas):
        return _from_T_v(model, P * v / R, v)
    quality, v_l, v_v = (np.full(P.shape, np.nan) for _ in range(3))
    T = np.full(P.shape, np.nan)
    inside = np.zeros(P.shape, bool)
    sub = P < model.fluid.Pc
    result = None
    if np.any(sub):
        T_sat, vl, vv, result = saturation_temperature(model, P[sub])
        inside[_lever_rule(v, sub, T_sat, vl, vv, T, v_l, v_v, quality)] = True
    single = ~inside
    if np.any(single):
        T[single], result = _temperature_at(model, P[single], v[single])
    phase = np.asarray(_single_phase(model, T, P, v), dtype=object)
    phase[inside] = "two-phase"
    return dict(T=T, P=P, v=v, phase=phase, quality=quality, v_liquid=v_l, v_vapor=v_v,
                roots=_roots_for(model, T, P), convergence=result)


def temperature_bracket(model, P, v):
    """Temperatures [K] that bracket the T with P(T, v) = P [Pa] at fixed v [m^3/mol].

    T_lo = P (v - b)/R, where P(T_lo, v) <= P because the attraction term is never
    negative; T_hi = (P + a(T_lo)/D(v)) (v - b)/R, where P(T_hi, v) >= P while a(T) falls,
    doubled where the Soave alpha has turned upwards until the sign changes (see solve).
    """
    P, v = np.asarray(P, dtype=float), np.asarray(v, dtype=float)
    T_lo = P * (v - model.v_min) / R
    a_lo, _ = model.attraction(T_lo)
    T_hi = (P + a_lo / model._denominator(v)) * (v - model.v_min) / R * (1.0 + 1e-12)
    for _ in range(60):  # only needed where the Soave alpha has turned upwards
        short = model.pressure(T_hi, v) < P
        if not np.any(short):
            break
        T_hi = np.where(short, 2.0 * T_hi, T_hi)
    return T_lo, T_hi


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


def _temperature_at(model, P, v):
    """T [K] with P(T, v) = P, bracketed from the physics (see solve's Notes)."""
    T_lo, T_hi = temperature_bracket(model, P, v)
    result = find_root(pressure_gap, bracket=(T_lo, T_hi), args=(v, P, model), xtol=0.0,
                       rtol=4.0 * np.finfo(float).eps, maxiter=200, trace=np.size(P) == 1)
    from .saturation import _require

    _require(result, "temperature", P, "P", "Pa")
    return result.root, result


def _from_quality(model, given):
    if isinstance(model, IdealGas):
        raise DomainError("The ideal gas has no saturation, so quality has no meaning; choose a cubic model.")
    q = given["quality"]
    if "T" in given:
        T = given["T"]
        if np.any(T > model.fluid.Tc):
            raise DomainError(f"quality needs T at or below Tc = {model.fluid.Tc:.6g} K; got "
                              f"{_first(T, T > model.fluid.Tc):.6g} K.")
        P, v_l, v_v, result = saturation_pressure(model, T)
    else:
        P = given["P"]
        if np.any(P > model.fluid.Pc):
            raise DomainError(f"quality needs P at or below Pc = {model.fluid.Pc:.6g} Pa; got "
                              f"{_first(P, P > model.fluid.Pc):.6g} Pa.")
        T, v_l, v_v, result = saturation_temperature(model, P)
    v = v_l + q * (v_v - v_l)
    phase = np.full(q.shape, "two-phase", dtype=object)
    return dict(T=T, P=P, v=v, phase=phase, quality=q, v_liquid=v_l, v_vapor=v_v,
                roots=_roots_for(model, T, P), convergence=result)


# --------------------------------------------------------------------------- helpers

def _ideal_roots(T, P):
    roots = np.full(T.shape + (3,), np.nan)
    roots[..., 0] = R * T / P
    return roots


def _roots_for(model, T, P):
    return _ideal_roots(T, P) if isinstance(model, IdealGas) else volume_roots(model, T, P)


def _root_kinds(model, T, v_roots):
    """Label roots: dP/dv > 0 is unstable; otherwise liquid-like below v_c, vapour-like above."""
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
    # the liquid-like root is the first, the vapour-like the last existing one
    first = np.argmax(has, axis=-1)
    last = kinds.shape[-1] - 1 - np.argmax(has[..., ::-1], axis=-1)
    pick = first if branch == "liquid" else last
    return np.where(np.any(has, axis=-1), pick, stable)


def _single_phase(model, T, P, v):
    """Phase of a single-phase state: above Tc by pressure, below Tc by the root's side of v_c."""
    T, P, v = np.broadcast_arrays(np.asarray(T), np.asarray(P), np.asarray(v))
    return _PHASE_OBJECTS.take(phase_codes(model, T, P, v))


def _sat_or_nan(model, x, critical, solver):
    x = np.asarray(x, dtype=float)
    out = np.full(x.shape, np.nan)
    if isinstance(model, IdealGas):
        return out
    below = x < critical
    if np.any(below):
        out[below] = solver(model, x[below])[0]
    return out


def _make_state(model, shape, knowns, *, T, P, v, phase, roots, quality=None, v_liquid=None,
                v_vapor=None, metastable=None, convergence=None):
    """Restore the broadcast shape of the knowns; a scalar solve gives Python scalars."""
    nan = np.full(np.shape(T), np.nan)

    def shaped(a, dtype):
        a = np.asarray(nan if a is None else a, dtype=dtype).reshape(shape)
        return a.item() if shape == () else a

    if phase.dtype == np.int8:   # codes from the (T, P) path: strings made when first read
        phase = _PhaseCodes(phase.reshape(shape)) if shape else PHASES[int(phase.reshape(()))]
    else:
        phase = shaped(phase, object)
    return State(model, shaped(T, float), shaped(P, float), shaped(v, float), phase,
                 shaped(quality, float), shaped(v_liquid, float), shaped(v_vapor, float),
                 np.asarray(roots, dtype=float).reshape(shape + (3,)),
                 shaped(np.zeros(np.shape(T), bool) if metastable is None else metastable, bool),
                 {k: (val.item() if shape == () else val) for k, val in knowns.items()}, convergence)


def _first(x, mask):
    x = np.asarray(x, dtype=float)
    sel = x[np.broadcast_to(mask, x.shape)] if x.ndim else np.array([float(x)])
    return float(sel.flat[0]) if sel.size else float(x.flat[0])


def _unit(name):
    return {"T": "K", "P": "Pa", "v": "m3/mol", "rho": "mol/m3", "rho_mass": "kg/m3"}[name]
