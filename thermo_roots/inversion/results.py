"""The result types of `solve`: :class:`State` and :class:`Root`, and how a pair solver's parts
become one (shapes restored, flagged elements NaN, caloric properties on the model's
reference state, warnings).
"""

from __future__ import annotations

import functools
from dataclasses import dataclass, field

import numpy as np

from ..errors import DomainError
from ..models import REFERENCE_STATE_POINTS, R, _scalar_or_array
from ..quantities import QUANTITIES
from .phases import (_NOT_SOLVED_CODE, _PHASE_OBJECTS, NOT_SOLVED, UNSTABLE, _Phase, _PhaseCodes, _root_kinds,
                     _stable_index)
from .saturation import saturation_pressure, saturation_temperature

@dataclass(frozen=True)
class Root:
    """One real volume root of the cubic at the state's (T, P)."""

    v: float          #: molar volume [m^3/mol]
    Z: float          #: compressibility factor [-]
    kind: str         #: "liquid-like", "vapor-like" or "unstable" (dP/dv > 0)
    ln_phi: float     #: ln of the fugacity coefficient [-]
    stable: bool      #: the root of lowest Gibbs energy at (T, P)
    caloric: object = field(default=None, repr=False)   #: properties.Caloric of this root (molar, SI)
    molar_mass: float = field(default=float("nan"), repr=False)   #: of the model's fluid [kg/mol], for the _mass twins

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
        (None when the state followed in closed form, as from (T, P) or (T, v)); a scalar
        solve's record carries the finder's trace where it keeps one. Elements it did not
        iterate (bad input) have status "not iterated". Where the answer of an energy pair
        is two-phase, the quality is in closed form, and the record is that of the
        saturation solve it rests on (the saturation temperature at P for (P, h) and
        (P, s), the saturation pressure at T for (T, h) and (T, s)); an array mixing regions
        gives each element its own finder's record and ``method`` names them all ("a+b").
        ``root`` is in the finder's own variable (T, ln(v - b), Tc/T, ...).
    reason : why an element is not solved ("" where it is), str or array of str; such
        elements are NaN with phase "not solved"
    T_other : (P, v) knowns only: a second temperature [K] that gives the same P and v in
        the model, NaN where the answer is unique (see solve's Notes)
    P_other : (T, h) knowns only: a second pressure [Pa] that gives the same h at this T
        in the model, NaN where the answer is unique (see solve's Notes)
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
    P_other: object = field(repr=False, default=float("nan"))

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
        with np.errstate(invalid="ignore"):
            ln_phi = self.model.ln_phi(T, self.root_volumes, np.asarray(self.P, dtype=float)[..., None])
        return np.where(np.isfinite(self.root_volumes), ln_phi, np.nan)

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
                                float(self.root_ln_phi[i]), bool(lowest), _root_caloric(self, v),
                                float(self.model.molar_mass)))
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
    # h_mass, s_mass, u_mass, cp_mass, cv_mass: the quantities table's twins, set below the class

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




_CALORIC_NAMES = ("h", "s", "u", "g", "cp", "cv", "w", "mu_jt", "kappa_T")
#: Properties of a single phase that a two-phase mixture has no single value of.
_SINGLE_PHASE_ONLY = ("cp", "cv", "w", "mu_jt", "kappa_T")


def _root_property(name):
    def read(root):
        return float("nan") if root.caloric is None else getattr(root.caloric, name)
    return property(read, doc=f"{name} of this root (molar, SI; NaN without ideal-gas data).")


for _name in _CALORIC_NAMES:   # root.h, root.cp, root.w, ...
    setattr(Root, _name, _root_property(_name))

#: The per-kilogram twins of the molar caloric properties, from the quantities table
#: (h_mass -> h, ..., cp_mass -> cp; g has none).
_MASS_TWINS = {QUANTITIES[n].twin: n for n in _CALORIC_NAMES if QUANTITIES[n].twin}


def _mass_property(molar, of_state):
    row = QUANTITIES[QUANTITIES[molar].twin]
    doc = f"{row.heading} [{row.si_label}]: {molar} divided by the molar mass."
    if of_state:
        return property(lambda self: _per_mass(self, getattr(self, molar)), doc=doc)
    return property(lambda root: getattr(root, molar) / root.molar_mass, doc=doc)


for _twin, _molar in _MASS_TWINS.items():   # state.h_mass, root.cp_mass, ...
    setattr(State, _twin, _mass_property(_molar, of_state=True))
    setattr(Root, _twin, _mass_property(_molar, of_state=False))


def _state_caloric(state):
    """The state's Caloric record: one phase from (T, v, P); two-phase by the lever rule."""
    two = np.isfinite(np.asarray(state.quality, dtype=float))   # quality is NaN outside the dome, so
    if two.any():                                               # only these need the (slow) phase words
        phase = np.asarray(state.phase, dtype=object)
        if two.ndim:
            two[two] = phase[two] == "two-phase"
        else:
            two = np.asarray(phase == "two-phase")
    return mixture_caloric(state.model, state.T, state.P, state.v, two,
                           state.quality, state.v_liquid, state.v_vapor)


def mixture_caloric(model, T, P, v, two, quality, v_liquid, v_vapor):
    """Caloric record of states that are single-phase or (where ``two``) two-phase.

    h, s, u, g of a two-phase state are the quality-weighted sums over the saturated liquid
    (v_liquid) and vapor (v_vapor) at (T, P_sat); cp, cv, w, mu_jt and kappa_T are NaN there
    (one number would mislead: cp and kappa_T are infinite across the dome, w and mu_jt
    have no single value). Elements with v NaN (not solved) are NaN throughout. Values on
    the model's reference state (:func:`_caloric_on_reference`).
    """
    from ..properties import Caloric

    T, P, v = (np.asarray(x, dtype=float) for x in (T, P, v))
    ok = np.isfinite(v)
    every = bool(ok.all())   # then no masking: each np.where is a pass over 10^6 states
    single = _caloric_on_reference(model, T, *((v, P) if every else (np.where(ok, v, 1.0), np.where(ok, P, 1.0))))
    two = np.asarray(two, dtype=bool)
    any_two = bool(two.any())
    values = {}
    for name in Caloric._fields:
        x = getattr(single, name) if every else np.where(ok, getattr(single, name), np.nan)
        if any_two and name in _SINGLE_PHASE_ONLY:
            x = np.where(two, np.nan, x)
        values[name] = x
    if any_two:
        q, vl, vv = (np.asarray(x, dtype=float) for x in (quality, v_liquid, v_vapor))
        liquid = _caloric_on_reference(model, T, np.where(two, vl, 1.0), P)
        vapor = _caloric_on_reference(model, T, np.where(two, vv, 1.0), P)
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




def _energy_offset(model):
    """(dh [J/mol], ds [J/(mol K)]) that move h and s from the reference equation's zero to the
    model's convention, fixed with the model's own saturated liquid; worked out once."""
    if model.reference_state == "reference":
        return 0.0, 0.0
    cached = model.__dict__.get("_energy_offset")
    if cached is None:
        from ..properties import caloric

        T0, h0, s0 = REFERENCE_STATE_POINTS[model.reference_state]
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
    if not model.has_saturation:
        return out
    below = x < critical
    if np.any(below):
        out[below] = solver(model, x[below], strict=False)[0]
    return out


def _make_state(model, shape, knowns, problems, *, T, P, v, phase, roots, quality=None, v_liquid=None,
                v_vapor=None, metastable=None, convergence=None, T_other=None, P_other=None, notes=()):
    """Restore the broadcast shape of the knowns; a scalar solve gives Python scalars.

    Elements flagged in ``problems`` become NaN with phase "not solved". ``notes``: the
    pair solver's own sentences for State.warnings.
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
    P_other = shaped(P_other, float)
    warnings += tuple(notes)
    if "P" not in knowns:
        warnings += _far_pressure_warning(model, np.asarray(P, dtype=float) if bad is None else np.asarray(P, dtype=float)[~bad])
    return State(model, shaped(T, float), shaped(P, float), shaped(v, float), phase,
                 shaped(quality, float), shaped(v_liquid, float), shaped(v_vapor, float),
                 roots.reshape(shape + (3,)),
                 shaped(np.zeros(np.shape(T), bool) if metastable is None else metastable, bool),
                 {k: (val.item() if shape == () else val) for k, val in knowns.items()},
                 _shaped_convergence(convergence, problems, shape),
                 problems.reason[0] if shape == () else problems.reason.reshape(shape),
                 T_other, warnings, P_other)


def _two_phase_note(phase):
    codes_or_words = phase.codes if isinstance(phase, _PhaseCodes) else np.asarray(phase, dtype=object)
    if codes_or_words.dtype == np.int8 or not np.any(codes_or_words == "two-phase"):
        return ()
    return ("In the two-phase region cp, cv, speed of sound, Joule-Thomson coefficient and kappa_T have no "
            "single value: they are NaN there (h, s, u and g follow the lever rule).",)


#: Beyond this many times the critical pressure an implied pressure is said to be suspect.
FAR_PRESSURE_FACTOR = 10.0


def _far_pressure_warning(model, P):
    """A sentence where the pressure a state implies (P not given) lies far above Pc: a cubic
    is no guide there, and the usual cause is a known in the wrong unit (a liquid is nearly
    incompressible, so a slightly small v or an s of the wrong size means thousands of bar)."""
    limit = FAR_PRESSURE_FACTOR * model.fluid.Pc
    with np.errstate(invalid="ignore"):
        far = P > limit
    count = int(np.count_nonzero(far))
    if not count:
        return ()
    advice = "far beyond where a cubic equation is any guide; check the knowns and their units."
    if P.size == 1:
        return (f"The pressure this state implies, {float(P.ravel()[0]) / 1e5:.6g} bar, is "
                f"{float(P.ravel()[0]) / model.fluid.Pc:.3g} times the critical pressure: {advice}",)
    return (f"At {count} of {P.size} states the pressure found is above {FAR_PRESSURE_FACTOR:g} times the critical "
            f"pressure (up to {float(np.max(P[far])) / 1e5:.6g} bar): {advice}",)


def _solid_warning(model, T):
    """A sentence where T lies below the fluid's triple point: no real liquid exists there; the
    fluid is solid, solid and vapor, or (below its sublimation pressure) a vapor (common
    practice: the phase diagram of a pure substance)."""
    T_triple = model.fluid.T_triple
    if T_triple is None:
        return ()
    cold = int(np.count_nonzero(T < T_triple)) if T.size and T.min() < T_triple else 0
    if not cold:
        return ()
    where = "T is" if T.size == 1 else f"At {cold} of {T.size} states T is"
    solid = "solid (dry ice)" if model.fluid.library_name == "CarbonDioxide" else "solid"
    return (f"{where} below the triple point of {model.fluid.name} ({T_triple:.6g} K): no liquid exists "
            f"there; the real fluid is {solid}, or solid and vapor, unless it is a vapor below its "
            "sublimation pressure. Solid may form and block a line; a cubic equation of state does not "
            "represent the solid (it shows a liquid, a vapor or a liquid-vapor split).",)


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
    status = np.full(n, "not iterated", dtype="<U15")   # status texts are at most 15 characters
    iterations, evaluations = np.zeros(n, int), np.zeros(n, int)
    root[covered], converged[covered] = result.root, result.converged
    status[covered] = np.asarray(result.status, dtype=str)
    iterations[covered], evaluations[covered] = result.iterations, result.evaluations
    converged[~problems.ok & (status == "not iterated")] = False
    return dataclasses.replace(result, root=root.reshape(shape), converged=converged.reshape(shape),
                               status=status.reshape(shape), iterations=iterations.reshape(shape),
                               evaluations=evaluations.reshape(shape), trace=None)


def _scalar_view(result):
    """A one-element array result as a scalar one (its status a Status where it is one, an
    array trace of that one element as the scalar trace of its iterates)."""
    import dataclasses

    from ..roots import Status
    from ..roots._result import ArrayTrace, ScalarTrace

    text = str(np.asarray(result.status).reshape(-1)[0])
    status = Status(text) if text in {s.value for s in Status} else text
    trace = ScalarTrace.from_records(result.trace.records) if isinstance(result.trace, ArrayTrace) else result.trace
    return dataclasses.replace(result, root=float(np.asarray(result.root).reshape(-1)[0]),
                               converged=bool(np.asarray(result.converged).reshape(-1)[0]), status=status,
                               iterations=int(np.asarray(result.iterations).reshape(-1)[0]),
                               evaluations=int(np.asarray(result.evaluations).reshape(-1)[0]), trace=trace)


def _record_part(result, keep, covered):
    """(the root finder's record of the elements ``keep`` of its problem, their flat indices
    ``covered[keep]``): e.g. a saturation solve's record of the states that came out two-phase.
    None when nothing is kept, or when there is no record, or it does not match ``keep``
    (the solve covered a part of the elements only)."""
    keep = np.asarray(keep, dtype=bool)
    if result is None or not keep.any() or np.size(result.root) != keep.size:
        return None
    import dataclasses

    if keep.all():
        return result, covered
    pick = lambda x: np.atleast_1d(np.asarray(x))[keep]   # noqa: E731
    return dataclasses.replace(result, root=pick(result.root), converged=pick(result.converged),
                               status=pick(np.asarray(result.status, dtype=str)),
                               iterations=pick(result.iterations), evaluations=pick(result.evaluations),
                               trace=result.trace if keep.sum() == 1 else None), covered[keep]


def _joined_convergence(*records):
    """One (result, flat indices) record from several root finders' (result, indices) records.

    A pair solver may reach its elements by different iterations (two-phase states by the
    saturation solve, the others by the solve for T or v); each element keeps the record of
    the finder that found its reported answer: where two records cover one element, the
    later one. ``method`` names every finder that won an element ("a+b"); a one-element
    record keeps that finder's trace. None for no record.
    """
    records = [r for r in records if r is not None]
    if len(records) <= 1:
        return records[0] if records else None
    import dataclasses

    indices = [np.asarray(c, dtype=np.intp) for _, c in records]
    hit = np.zeros(1 + max(int(c.max(initial=-1)) for c in indices), bool)   # no sort: a mask over the indices
    for c in indices:
        hit[c] = True
    covered, position = np.flatnonzero(hit), np.cumsum(hit) - 1
    n = covered.size
    root, converged, status = np.full(n, np.nan), np.zeros(n, bool), np.full(n, "", dtype="<U15")
    iterations, evaluations, winner = np.zeros(n, int), np.zeros(n, int), np.full(n, -1)
    for which, ((result, _), c) in enumerate(zip(records, indices)):
        at = position[c]
        root[at], converged[at] = np.atleast_1d(result.root), np.atleast_1d(result.converged)
        status[at] = np.atleast_1d(np.asarray(result.status, dtype=str))
        iterations[at], evaluations[at] = np.atleast_1d(result.iterations), np.atleast_1d(result.evaluations)
        winner[at] = which
    won = [records[w][0] for w in np.unique(winner)]
    method = "+".join(dict.fromkeys(r.method for r in won))
    return dataclasses.replace(won[0], root=root, converged=converged, status=status,
                               iterations=iterations, evaluations=evaluations, method=method,
                               trace=won[0].trace if n == 1 else None), covered


