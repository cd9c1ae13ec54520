"""Layer 6: the reference equation of state, and how far a model is from it.

This module is the only code that drives CoolProp's state objects. It evaluates the
fluid's multiparameter Helmholtz-energy equation (CoolProp's ``HEOS`` backend, one
``AbstractState`` per fluid and thread) at the same knowns as a solved model state and
reports the deviations. A state the reference cannot give -- below its triple point,
beyond its temperature or pressure limits, in the solid, or where CoolProp raises -- comes
back as *unavailable* with a readable reason, never as an exception out of a sweep; so
does every state of a fluid without a reference equation (no ``library_name``, or one
CoolProp does not know). Threads never share a state object, so any
``concurrent.futures.Executor`` -- threads, processes, a cluster's -- gives the serial result.

Only the ``HEOS`` backend is used: the tabular backends have crashed the process on bulk
calls. ``PropsSI`` is not used either: the low-level ``update`` is several times faster.

References
----------
Bell, I. H., Wronski, J., Quoilin, S. & Lemort, V. (2014), Pure and pseudo-pure fluid
thermophysical property evaluation and the open-source thermophysical property library
CoolProp, Ind. Eng. Chem. Res. 53, 2498-2508.
Span, R. (2000), Multiparameter Equations of State, Springer (form of the reference equations).
"""

from __future__ import annotations

import functools
import html
import math
import threading
import types
from dataclasses import dataclass, field

import numpy as np

from .errors import DomainError, InputError, UnknownFluidError
from .inversion import CAUTION, saturation
from .models import R, _scalar_or_array
from .quantities import convert, quantity, unit_label
from .units import to_si

#: The pairs of knowns the reference understands, as the names used by ``solve``.
REFERENCE_PAIRS = ("T,P", "T,v", "P,v", "T,quality", "P,quality", "P,h", "P,s", "v,u")
#: States per chunk of reference work (a chunk is the unit of progress, interruption and
#: parallel dispatch).
DEFAULT_CHUNK = 1000
#: Above this many states ``progress="auto"`` shows a progress bar.
AUTO_PROGRESS_ABOVE = 5000
#: The reason given to states a run did not reach because it was interrupted.
INTERRUPTED = "not checked: the run was interrupted before this state"

_LIMIT_KEYS = ("T_min", "T_max", "P_max", "P_triple", "Tc", "Pc", "v_c")
_FIELDS = ("T", "P", "v", "quality", "P_sat", "T_sat", "v_liquid", "v_vapor")
#: Caloric values read at every reference state (molar, SI); cp and w stay NaN when two-phase.
_CALORIC = ("h", "s", "u", "cp", "w")
_FIELDS = _FIELDS + _CALORIC


# --------------------------------------------------------------------------- CoolProp access

#: Per thread, {library name: CoolProp AbstractState}. A state object is updated and then
#: read in separate calls, so two threads sharing one would read each other's states.
_THREAD_STATES = threading.local()


def _new_abstract_state(library_name: str):
    """A fresh HEOS AbstractState; UnknownFluidError when CoolProp does not know the name."""
    import CoolProp

    try:
        return CoolProp.AbstractState("HEOS", library_name)
    except ValueError as error:
        raise UnknownFluidError(
            f"library_name={library_name!r} is not a fluid of CoolProp's library ({error}); use a name from "
            "thermo_roots.fluid_names() (get_fluid finds it by its usual name), or library_name=None for a fluid without a reference "
            "equation.") from None


@functools.lru_cache(maxsize=None)
def _library_limits(library_name: str):
    """The reference equation's limits and constants for a fluid (read-only, shared)."""
    state = _new_abstract_state(library_name)
    return types.MappingProxyType(dict(
        T_min=max(state.Tmin(), state.Ttriple()), T_max=state.Tmax(), P_max=state.pmax(),
        P_triple=state.p_triple(), Tc=state.T_critical(), Pc=state.p_critical(),
        v_c=1.0 / state.rhomolar_critical(), melting=state.has_melting_line(),
        omega=state.acentric_factor(), molar_mass=state.molar_mass()))


def _abstract_state(library_name: str):
    """This thread's HEOS AbstractState of the fluid, and the fluid's limits.

    One state object per fluid *and thread* (each worker process has its own threads), so
    an update and the reads that follow it can never interleave with another thread's.
    """
    limits = _library_limits(library_name)
    states = getattr(_THREAD_STATES, "by_fluid", None)
    if states is None:
        states = _THREAD_STATES.by_fluid = {}
    state = states.get(library_name)
    if state is None:
        state = states[library_name] = _new_abstract_state(library_name)
    return state, limits


@functools.lru_cache(maxsize=1)
def _coolprop():
    import CoolProp

    inputs = {"T,P": CoolProp.PT_INPUTS, "T,v": CoolProp.DmolarT_INPUTS, "P,v": CoolProp.DmolarP_INPUTS,
              "T,quality": CoolProp.QT_INPUTS, "P,quality": CoolProp.PQ_INPUTS,
              "P,h": CoolProp.HmolarP_INPUTS, "P,s": CoolProp.PSmolar_INPUTS, "v,u": CoolProp.DmolarUmolar_INPUTS}
    phases = {
        CoolProp.iphase_liquid: "liquid", CoolProp.iphase_supercritical_liquid: "liquid",
        CoolProp.iphase_gas: "vapor", CoolProp.iphase_supercritical_gas: "vapor",
        CoolProp.iphase_supercritical: "supercritical", CoolProp.iphase_critical_point: "supercritical",
        CoolProp.iphase_twophase: "two-phase",
    }
    return CoolProp, inputs, phases


@functools.lru_cache(maxsize=None)
def _reference_key(name: str) -> tuple[int, int]:
    """(CoolProp parameter index, power) of a quantity, from the table of quantities: the
    quantity is the keyed output to that power (molar volume: Dmolar ** -1)."""
    import CoolProp.CoolProp as CP

    row = quantity(name)
    return int(CP.get_parameter_index(row.reference_key)), row.reference_power


def reference_limits(fluid) -> dict:
    """Range of the fluid's reference equation: T_min (triple point) [K], T_max [K], P_max [Pa],
    P_triple [Pa], and its critical point Tc [K], Pc [Pa], v_c [m^3/mol]; raises InputError
    for a fluid without a library name."""
    name = _library_name(fluid)
    return {k: v for k, v in _library_limits(name).items() if k in _LIMIT_KEYS}


def _library_name(fluid) -> str:
    name = getattr(fluid, "library_name", None)
    if not name:
        raise InputError(f"Fluid {getattr(fluid, 'name', fluid)!r} has no library_name, so it has no "
                         "reference equation; use a library fluid (get_fluid) to cross-check.")
    return name


def _update_arguments(pair: str, x: float, y: float):
    """The two numbers CoolProp's ``update`` takes for the knowns (x, y) of ``pair``, in the
    order of its input key (DmolarT is (rho, T), HmolarP is (h, P), PSmolar is (P, s), ...)."""
    if pair == "T,P":
        return y, x
    if pair in ("T,v", "P,v"):
        return 1.0 / y, x
    if pair in ("T,quality", "P,h"):
        return y, x
    if pair == "v,u":
        return 1.0 / x, y
    return x, y   # "P,quality", "P,s"


def _caloric_into(out, i, state, phase):
    """h, s, u (and cp, w outside the two-phase region) of the reference state just updated,
    read by the keys of the table of quantities. CoolProp returns a number for cp inside the
    dome too; it is not a heat capacity of the mixture, so it is left NaN there."""
    names = ("h", "s", "u") if phase == "two-phase" else _CALORIC
    for name in names:
        key, power = _reference_key(name)
        try:
            out[name][i] = state.keyed_output(key) ** power
        except ValueError:
            pass   # a supplement: NaN where the reference does not give it


def _limit_reason(limits, T, P):
    """Why (T, P) is outside the reference, or "" when it is inside (NaN means not known yet)."""
    if T == T and T < limits["T_min"]:
        return (f"T = {T:.6g} K is below the triple point of the reference equation "
                f"({limits['T_min']:.6g} K): solid or outside its range")
    if T == T and T > limits["T_max"]:
        return f"T = {T:.6g} K is above the reference equation's upper limit of {limits['T_max']:.6g} K"
    if P == P and P > limits["P_max"]:
        return f"P = {P:.6g} Pa is above the reference equation's upper limit of {limits['P_max']:.6g} Pa"
    return ""


def _solid_reason(state, limits, T, P):
    """A reason when (T, P) lies on the solid side of the melting line, else ""."""
    if not limits["melting"] or not (P > limits["P_triple"]):
        return ""
    CoolProp = _coolprop()[0]
    try:
        T_melt = state.melting_line(CoolProp.iT, CoolProp.iP, P)
    except ValueError:
        return ""
    if T < T_melt:
        return f"solid: T = {T:.6g} K is below the melting temperature {T_melt:.6g} K at P = {P:.6g} Pa"
    return ""


def _reference_chunk(library_name: str, pair: str, a, b, with_saturation: bool = True) -> dict:
    """Evaluate the reference at the knowns (a, b) of ``pair`` (SI), one state at a time.

    Module-level and fed only with a name and arrays, so it can be sent to worker processes.
    Returns a dict of arrays: T, P, v, quality, P_sat (at T), T_sat (at P), v_liquid,
    v_vapor (saturated, at T), phase and reason ("" where available).
    """
    CoolProp, inputs, phases = _coolprop()
    a, b = np.broadcast_arrays(np.asarray(a, dtype=float).ravel(), np.asarray(b, dtype=float).ravel())
    n = a.size
    out = {k: np.full(n, np.nan) for k in _FIELDS}
    out["phase"] = np.full(n, "", dtype=object)
    out["reason"] = np.full(n, "", dtype=object)
    state, limits = _abstract_state(library_name)
    key = inputs[pair]
    first, second = pair.split(",")
    for i in range(n):
        x, y = float(a[i]), float(b[i])
        if not (math.isfinite(x) and math.isfinite(y)):
            out["reason"][i] = "the model state is not finite (it did not solve)"
            continue
        T = x if first == "T" else math.nan
        P = x if first == "P" else (y if second == "P" else math.nan)
        reason = _limit_reason(limits, T, P)
        if not reason and second == "v" and y <= 0.0:
            reason = f"v = {y:.6g} m³/mol is not positive"
        if not reason and first == "v" and x <= 0.0:
            reason = f"v = {x:.6g} m³/mol is not positive"
        if not reason and second == "quality" and not 0.0 <= y <= 1.0:
            reason = f"quality = {y:.6g} is outside [0, 1]"
        if not reason and second == "quality":
            critical = limits["Tc"] if first == "T" else limits["Pc"]
            if x > critical:
                unit = "K" if first == "T" else "Pa"
                reason = (f"{first} = {x:.6g} {unit} is above the reference's critical value "
                          f"{critical:.6g} {unit}: no saturation there")
        if reason:
            out["reason"][i] = reason
            continue
        try:
            state.update(key, *_update_arguments(pair, x, y))
            T, P = state.T(), state.p()
            reason = _limit_reason(limits, T, P) or _solid_reason(state, limits, T, P)
            if reason:
                out["reason"][i] = reason
                continue
            out["T"][i], out["P"][i], out["v"][i] = T, P, 1.0 / state.rhomolar()
            phase = phases.get(state.phase(), "")
            if phase == "two-phase":
                out["quality"][i] = state.Q()
            out["phase"][i] = phase
            _caloric_into(out, i, state, phase)
        except ValueError as error:
            below = (f"; P = {P:.6g} Pa is below the reference's triple-point pressure {limits['P_triple']:.6g} Pa, "
                     "where the cold states are solid (not part of the reference equation)"
                     if P == P and P < limits["P_triple"] else "")
            out["reason"][i] = f"the reference equation failed here: {error}{below}"
            continue
        if with_saturation:
            _saturation_into(out, i, state, limits, T, P)
    return out


def _saturation_into(out, i, state, limits, T, P):
    """Saturation pressure and volumes at T, saturation temperature at P (NaN where none)."""
    CoolProp = _coolprop()[0]
    try:
        if limits["T_min"] <= T < limits["Tc"]:
            state.update(CoolProp.QT_INPUTS, 0.0, T)
            out["P_sat"][i] = state.p()
            key, power = _reference_key("v")
            out["v_liquid"][i] = state.saturated_liquid_keyed_output(key) ** power
            out["v_vapor"][i] = state.saturated_vapor_keyed_output(key) ** power
        if limits["P_triple"] <= P < limits["Pc"]:
            state.update(CoolProp.PQ_INPUTS, P, 0.0)
            out["T_sat"][i] = state.T()
    except ValueError:
        pass  # saturation is a supplement: its failure leaves NaN, not an unavailable state


def _resolve_progress(progress, n):
    if isinstance(progress, str) and progress == "auto":
        return n > AUTO_PROGRESS_ABOVE
    if isinstance(progress, (bool, np.bool_)):
        return bool(progress)
    if isinstance(progress, str):
        raise InputError(f"progress={progress!r} is not an option: give True, False or 'auto' (a bar above "
                         f"{AUTO_PROGRESS_ABOVE} states).")
    raise TypeError(f"progress must be True, False or 'auto'; got {_given(progress)}.")


def _given(value) -> str:
    """A value as a message shows it: its type and a short repr."""
    text = repr(value)
    if len(text) > 60:
        text = text[:57] + "..."
    return f"{type(value).__name__} {text}"


def whole_number(value, name: str, *, minimum: int = 1, example: str = "", allow_none: bool = False):
    """``value`` as an int, or a clear error naming the argument.

    Accepts Python and numpy integers and floats with a whole value (2.0); refuses True and
    False, NaN, fractions (2.5), text and anything below ``minimum``. TypeError for a wrong
    type, InputError for a number that is not allowed.
    """
    hint = f" Try {example}." if example else ""
    if value is None and allow_none:
        return None
    if isinstance(value, (bool, np.bool_)) or not isinstance(value, (int, float, np.integer, np.floating)):
        raise TypeError(f"{name} must be a whole number of at least {minimum}; got {_given(value)}.{hint}")
    if not (math.isfinite(value) and float(value) == math.floor(value)) or value < minimum:
        raise InputError(f"{name}={value!r} is not allowed: it must be a whole number of at least {minimum}."
                         f"{hint}")
    return int(value)


def _check_run_options(*, progress=False, executor=None, chunk_size=None, on_interrupt="raise",
                       with_saturation=True):
    """Refuse bad run options up front, each error naming the argument and what is allowed."""
    _resolve_progress(progress, 0)
    if executor is not None and not callable(getattr(executor, "submit", None)):
        raise TypeError(f"executor must be a concurrent.futures.Executor (anything with submit(), such as "
                        f"ThreadPoolExecutor(4), ProcessPoolExecutor() or a Dask client's get_executor()) or "
                        f"None; got {_given(executor)}.")
    whole_number(chunk_size, "chunk_size", minimum=1, example=f"chunk_size={DEFAULT_CHUNK}", allow_none=True)
    if not (isinstance(on_interrupt, str) and on_interrupt in ("raise", "partial")):
        raise InputError(f"on_interrupt={on_interrupt!r} is not an option: give 'raise' (stop with the "
                         "KeyboardInterrupt) or 'partial' (keep the states checked so far).")
    if not isinstance(with_saturation, (bool, np.bool_)):
        raise TypeError(f"with_saturation must be True or False; got {_given(with_saturation)}.")


def evaluate_reference(library_name: str, pair: str, a, b, *, with_saturation: bool = True,
                       progress=False, executor=None, chunk_size: int | None = None,
                       on_interrupt: str = "raise"):
    """Reference values at many knowns, in chunks, with progress, interruption and workers.

    Parameters
    ----------
    library_name : str
        CoolProp's fluid name.
    pair : {"T,P", "T,v", "P,v", "T,quality", "P,quality"}
        Which knowns ``a`` and ``b`` are (SI: T [K], P [Pa], v [m^3/mol], quality [-]).
    a, b : array_like
        The knowns, broadcast together and flattened.
    with_saturation : bool
        Also evaluate saturation at each state's T and P (about twice the work).
    progress : bool or "auto"
        A tqdm progress bar; "auto" shows one above :data:`AUTO_PROGRESS_ABOVE` states.
    executor : concurrent.futures.Executor, optional
        Spread the chunks over its workers; only the fluid name and arrays are sent.
    chunk_size : int, optional
        States per chunk (default :data:`DEFAULT_CHUNK`).
    on_interrupt : {"raise", "partial"}
        On KeyboardInterrupt, re-raise, or return what the finished chunks computed
        (states not reached get the reason :data:`INTERRUPTED`).

    Returns
    -------
    (values, completed) : (dict of numpy.ndarray, int)
        The arrays of :func:`_reference_chunk` in input order, and how many leading states
        were evaluated (all of them unless interrupted).
    """
    if not (isinstance(pair, str) and pair in REFERENCE_PAIRS):
        raise InputError(f"pair={pair!r} is not one of {', '.join(REFERENCE_PAIRS)}.")
    _check_run_options(progress=progress, executor=executor, chunk_size=chunk_size, on_interrupt=on_interrupt,
                       with_saturation=with_saturation)
    a, b = np.broadcast_arrays(np.asarray(a, dtype=float).ravel(), np.asarray(b, dtype=float).ravel())
    n = a.size
    size = whole_number(chunk_size, "chunk_size", allow_none=True) or DEFAULT_CHUNK
    starts = list(range(0, n, size)) or [0]
    show = _resolve_progress(progress, n)
    pieces, completed = [], 0
    from tqdm.auto import tqdm

    bar = tqdm(total=n, disable=not show, desc=f"reference {library_name}", unit="state", leave=False)
    futures = []
    try:
        if executor is None:
            for s in starts:
                pieces.append(_reference_chunk(library_name, pair, a[s:s + size], b[s:s + size], with_saturation))
                completed = min(n, s + size)
                bar.update(completed - bar.n)
        else:
            futures = [executor.submit(_reference_chunk, library_name, pair, a[s:s + size], b[s:s + size],
                                       with_saturation) for s in starts]
            for s, fut in zip(starts, futures):
                pieces.append(fut.result())
                completed = min(n, s + size)
                bar.update(completed - bar.n)
    except KeyboardInterrupt:
        for fut in futures:
            fut.cancel()
        if on_interrupt == "raise":
            raise
    finally:
        bar.close()
    rest = _unavailable_values(n - completed, INTERRUPTED)
    values = {k: np.concatenate([p[k] for p in pieces] + [rest[k]]) for k in rest}
    return values, completed


# --------------------------------------------------------------------------- reference states

@dataclass(frozen=True)
class ReferenceState:
    """The reference equation at given knowns. Scalars for scalar knowns, arrays otherwise.

    Attributes
    ----------
    fluid : Fluid
    T : temperature [K]
    P : pressure [Pa]
    v : molar volume [m^3/mol] (mixture mean in the two-phase region)
    phase : "liquid", "vapor", "supercritical", "two-phase" ("" where unavailable)
    quality : vapor mole fraction [-] in the two-phase region, else NaN
    P_sat : saturation pressure at T [Pa], NaN at or above Tc
    T_sat : saturation temperature at P [K], NaN at or above Pc
    v_liquid, v_vapor : saturated volumes at T [m^3/mol]
    h, s, u : enthalpy [J/mol], entropy [J/(mol K)], internal energy [J/mol] on the reference
        equation's own reference state (the lever rule in the two-phase region)
    cp : isobaric heat capacity [J/(mol K)], NaN in the two-phase region
    w : speed of sound [m/s], NaN in the two-phase region
    available : bool
    reason : why a state is unavailable ("" where available)
    completed : how many leading states were evaluated (less than the size if interrupted)
    warnings : sentences about the whole result, e.g. the fluid's constants differ from the
        reference equation's (see :func:`constant_warnings`); () when there is nothing to say
    """

    fluid: object = field(repr=False)
    T: object
    P: object
    v: object
    phase: object
    quality: object = field(repr=False)
    P_sat: object = field(repr=False)
    T_sat: object = field(repr=False)
    v_liquid: object = field(repr=False)
    v_vapor: object = field(repr=False)
    h: object = field(repr=False)
    s: object = field(repr=False)
    u: object = field(repr=False)
    cp: object = field(repr=False)
    w: object = field(repr=False)
    available: object = field(repr=False)
    reason: object = field(repr=False)
    completed: int = field(repr=False, default=0)
    warnings: tuple = field(repr=False, default=())

    @property
    def Z(self):
        """Compressibility factor P v / (R T) [-]."""
        return _scalar_or_array(np.asarray(self.P) * np.asarray(self.v) / (R * np.asarray(self.T)))

    @property
    def rho_mass(self):
        """Mass density [kg/m^3]."""
        return _scalar_or_array(self.fluid.molar_mass / np.asarray(self.v))

    def __repr__(self):
        name = _fluid_name(self.fluid)
        if np.ndim(self.T):
            text = f"ReferenceState({name!r}, {np.size(self.T)} states, {int(np.sum(self.available))} available)"
        elif not self.available:
            text = f"ReferenceState({name!r}, unavailable: {self.reason})"
        else:
            text = (f"ReferenceState({name!r}, T={self.T:.6g} K, P={self.P:.6g} Pa, "
                    f"v={self.v:.6g} m³/mol, phase={self.phase!r})")
        return text + _warning_text(self.warnings)

    def _repr_html_(self):
        return f"<pre>{html.escape(repr(self))}</pre>"


def _shape_values(values, shape):
    def shaped(x):
        x = np.asarray(x).reshape(shape)
        return x.item() if shape == () else x

    return {k: shaped(x) for k, x in values.items()}


def _unavailable_values(n, reason):
    out = {k: np.full(n, np.nan) for k in _FIELDS}
    out["phase"] = np.full(n, "", dtype=object)
    out["reason"] = np.full(n, reason, dtype=object)
    return out


def reference_state(fluid, *, with_saturation: bool = True, progress=False, executor=None,
                    chunk_size=None, **knowns) -> ReferenceState:
    """The reference equation of the fluid at two knowns.

    Parameters
    ----------
    fluid : Fluid or str
        A library fluid (with ``library_name``), or its name.
    with_saturation, progress, executor, chunk_size
        As in :func:`evaluate_reference`.
    **knowns
        Two of T [K], P [Pa], v [m^3/mol], rho [mol/m^3], rho_mass [kg/m^3], quality [-],
        h [J/mol], s [J/(mol K)], u [J/mol] (or h_mass [J/kg], s_mass [J/(kg K)], u_mass
        [J/kg]) in the pairs (T, P), (T, v), (P, v), (T, quality), (P, quality), (P, h),
        (P, s), (v, u); numbers (SI), arrays, or text with units. Energies are on the
        reference equation's own reference state.

    Returns
    -------
    ReferenceState
        Unavailable states (and a user fluid without a library name) carry a reason.

    References
    ----------
    Bell, I. H. et al. (2014), Ind. Eng. Chem. Res. 53, 2498-2508 (CoolProp).
    """
    _check_run_options(progress=progress, executor=executor, chunk_size=chunk_size,
                       with_saturation=with_saturation)
    fluid = _as_fluid(fluid, "reference_state")
    pair, a, b = _reference_knowns(fluid, knowns)
    shape = np.broadcast(a, b).shape
    values, completed, notes = _fluid_reference(fluid, pair, a, b, shape, with_saturation=with_saturation,
                                                progress=progress, executor=executor, chunk_size=chunk_size)
    reason = values.pop("reason")
    shaped = _shape_values({**values, "reason": reason, "available": reason == ""}, shape)
    return ReferenceState(fluid=fluid, completed=completed, warnings=notes, **shaped)


def _fluid_name(fluid) -> str:
    """The fluid's name as engineers write it (``display_name`` where the fluid has one)."""
    return str(getattr(fluid, "display_name", None) or getattr(fluid, "name", fluid))


def _no_library_reason(fluid):
    return f"fluid {_fluid_name(fluid)!r} is a user fluid without a reference equation (no library_name)"


def _unknown_library_reason(fluid):
    return (f"the reference library does not know library_name={fluid.library_name!r} (fluid "
            f"{_fluid_name(fluid)!r}), so there is no reference equation to compare with; "
            "thermo_roots.fluid_names() lists the names it knows")


def library_reason(fluid) -> str:
    """Why the fluid has no reference equation ("" when it has one): no library name, or a
    library name CoolProp does not know."""
    if not getattr(fluid, "library_name", None):
        return _no_library_reason(fluid)
    try:
        _library_limits(fluid.library_name)
    except UnknownFluidError:
        return _unknown_library_reason(fluid)
    return ""


#: How far a fluid's constants may be from its reference equation's before a cross-check
#: warns: relative for Tc, Pc and the molar mass, absolute for the acentric factor. Wide
#: enough for handbook values rounded to four digits (common practice).
CONSTANT_TOLERANCE = {"Tc": 5e-3, "Pc": 5e-3, "molar_mass": 5e-3, "omega": 0.01}


def constant_warnings(fluid) -> tuple:
    """Sentences saying where the fluid's constants differ from those of the reference
    equation it is compared with (beyond :data:`CONSTANT_TOLERANCE`); () when they agree or
    the fluid has no reference equation."""
    if library_reason(fluid):
        return ()
    lib = _library_limits(fluid.library_name)
    units = {"Tc": ("T", "K"), "Pc": ("P", "bar"), "molar_mass": ("molar_mass", "g/mol"), "omega": (None, "")}
    differ = []
    for key, tol in CONSTANT_TOLERANCE.items():
        mine, theirs = float(getattr(fluid, key)), float(lib[key])
        off = abs(mine - theirs) if key == "omega" else abs(mine - theirs) / abs(theirs)
        if not off <= tol:
            name, unit = units[key]
            if name is not None:
                mine, theirs, unit = convert(mine, name, unit), convert(theirs, name, unit), unit_label(name, unit)
            differ.append(f"{key} = {mine:.6g} {unit}".rstrip() + f" against {theirs:.6g} {unit}".rstrip())
    if not differ:
        return ()
    return (f"The constants of fluid {_fluid_name(fluid)!r} differ from those of the reference equation it is "
            f"compared with (library_name={fluid.library_name!r}): {'; '.join(differ)}. The deviations mix the "
            f"model's error with that difference; for the library's constants use "
            f"get_fluid({fluid.library_name!r}), or set library_name=None for a fluid of your own.",)


def _fluid_reference(fluid, pair, a, b, shape, **options):
    """(values, completed, warnings) of the reference at the knowns, for any fluid: a
    fluid without a (known) reference equation gives unavailable values, not an error."""
    n = int(np.prod(shape))
    reason = library_reason(fluid)
    if reason:
        return _unavailable_values(n, reason), n, ()
    values, completed = evaluate_reference(fluid.library_name, pair, a, b, **options)
    return values, completed, constant_warnings(fluid)


def _as_fluid(fluid, where: str):
    from .fluids import as_fluid

    return as_fluid(fluid, f"{where}(fluid, ...)")


def _reference_knowns(fluid, knowns):
    if len(knowns) != 2:
        raise InputError(f"Give exactly two knowns, got {', '.join(knowns) or 'none'}; "
                         "e.g. reference_state(fluid, T=300.0, P=1e5).")
    si = {k: np.asarray(to_si(val, k, molar_mass=fluid.molar_mass), dtype=float) for k, val in knowns.items()}
    if "rho" in si:
        si["v"] = 1.0 / si.pop("rho")
    if "rho_mass" in si:
        si["v"] = fluid.molar_mass / si.pop("rho_mass")
    for name in ("h", "s", "u"):
        if f"{name}_mass" in si:
            si[name] = si.pop(f"{name}_mass") * fluid.molar_mass
    for pair in REFERENCE_PAIRS:
        first, second = pair.split(",")
        if set(si) == {first, second}:
            return pair, si[first], si[second]
    raise InputError(f"The reference takes the pairs {', '.join(REFERENCE_PAIRS)}; got {', '.join(knowns)}.")


# --------------------------------------------------------------------------- saturation

@dataclass(frozen=True)
class ReferenceSaturation:
    """Saturation of the reference equation at T or P; NaN and a reason where unavailable.

    Attributes: T [K], P [Pa], v_liquid, v_vapor [m^3/mol], available, reason.
    """

    fluid: object = field(repr=False)
    T: object
    P: object
    v_liquid: object
    v_vapor: object
    available: object = field(repr=False)
    reason: object = field(repr=False)

    def __repr__(self):
        if np.ndim(self.T):
            return f"ReferenceSaturation({self.fluid.name!r}, {np.size(self.T)} points)"
        return (f"ReferenceSaturation({self.fluid.name!r}, T={self.T:.6g} K, P={self.P:.6g} Pa, "
                f"v_liquid={self.v_liquid:.6g} m³/mol, v_vapor={self.v_vapor:.6g} m³/mol)")

    def _repr_html_(self):
        return f"<pre>{html.escape(repr(self))}</pre>"


def reference_saturation(fluid, T=None, P=None) -> ReferenceSaturation:
    """Saturation pressure (given T) or temperature (given P) of the reference equation.

    Parameters
    ----------
    fluid : Fluid
    T : float, array_like or str, optional
        Temperature [K].
    P : float, array_like or str, optional
        Pressure [Pa]. Give exactly one of T and P.

    Returns
    -------
    ReferenceSaturation
        NaN with a reason above the critical point, below the triple point, or for a
        user fluid.

    References
    ----------
    Bell, I. H. et al. (2014), Ind. Eng. Chem. Res. 53, 2498-2508 (CoolProp).
    """
    fluid = _as_fluid(fluid, "reference_saturation")
    if (T is None) == (P is None):
        raise InputError("reference_saturation() needs exactly one of T= or P=.")
    known = {"T": T} if T is not None else {"P": P}
    x = np.asarray(to_si(*next(iter(known.items()))[::-1]), dtype=float)
    ref = reference_state(fluid, quality=np.zeros(x.shape), **{k: x for k in known})
    T_out = ref.T if T is None else _scalar_or_array(x)
    P_out = ref.P if P is None else _scalar_or_array(x)
    return ReferenceSaturation(fluid, T_out, P_out, ref.v_liquid, ref.v_vapor, ref.available, ref.reason)


# --------------------------------------------------------------------------- cross-check

@dataclass(frozen=True)
class CrossCheck:
    """A model state beside the reference equation at the same knowns.

    Scalars for a scalar state, arrays for an array state. Deviations are
    100 (model - reference) / reference [%]; NaN where they do not apply or the reference
    is unavailable.

    Attributes
    ----------
    available : bool
    reason : str, "" where available
    reference_v : molar volume [m^3/mol] of the reference at the state's knowns
    reference_Z : [-]
    reference_rho_mass : [kg/m^3]
    reference_P : pressure [Pa] of the reference at the knowns (at the model's (T, v)
        for states whose knowns include v)
    reference_T : temperature [K] of the reference at the knowns
    reference_phase : "liquid", "vapor", "supercritical", "two-phase" ("" if unavailable)
    deviation_v_percent : 100 (v_model - v_ref)/v_ref; NaN for states whose volume was
        given (compare the pressure there)
    deviation_rho_percent : 100 (rho_model - rho_ref)/rho_ref, likewise
    deviation_P_percent : 100 (P_model - P_ref)/P_ref for states whose knowns include v,
        and for (T, quality) states (saturation pressure); NaN where P was given
    deviation_T_K : T_model - T_ref [K] for (P, quality) states; NaN elsewhere
    phase_agrees : model and reference phase are the same (False where unavailable)
    reference_P_sat : saturation pressure at T [Pa], NaN at or above Tc
    reference_T_sat : saturation temperature at P [K], NaN at or above Pc
    reference_v_liquid, reference_v_vapor : saturated volumes at T [m^3/mol]
    reference_quality : vapor mole fraction [-] where the reference is two-phase
    reference_h, reference_s : enthalpy [J/mol] and entropy [J/(mol K)] of the reference at the
        knowns, on the reference equation's own reference state (the model's library-fluid
        values are on the same one, so they compare directly)
    reference_cp : isobaric heat capacity [J/(mol K)]; reference_w : speed of sound [m/s];
        both NaN in the two-phase region, where they have no single value
    deviation_h : h_model - h_ref [J/mol]; deviation_s : s_model - s_ref [J/(mol K)]
    deviation_h_percent, deviation_s_percent : the same relative to |h_ref| (|s_ref|) [%],
        given only where |h_ref| >= R T (|s_ref| >= R): h and s have an arbitrary zero, and
        a percentage of a value near that zero says nothing
    deviation_cp_percent, deviation_w_percent : 100 (model - ref)/ref [%]; NaN when either
        side is two-phase
    completed : how many leading states were checked (less than the size if interrupted)
    warnings : sentences about the whole check, e.g. the fluid's constants differ from those
        of the reference equation (see :func:`constant_warnings`); () when there is nothing to say
    """

    state: object = field(repr=False)
    available: object
    reason: object
    reference_v: object
    reference_Z: object = field(repr=False)
    reference_rho_mass: object = field(repr=False)
    reference_P: object = field(repr=False)
    reference_T: object = field(repr=False)
    reference_phase: object = field(repr=False)
    deviation_v_percent: object = field(repr=False)
    deviation_rho_percent: object = field(repr=False)
    deviation_P_percent: object = field(repr=False)
    deviation_T_K: object = field(repr=False)
    phase_agrees: object = field(repr=False)
    reference_P_sat: object = field(repr=False)
    reference_T_sat: object = field(repr=False)
    reference_v_liquid: object = field(repr=False)
    reference_v_vapor: object = field(repr=False)
    reference_quality: object = field(repr=False)
    reference_h: object = field(repr=False, default=math.nan)
    reference_s: object = field(repr=False, default=math.nan)
    reference_cp: object = field(repr=False, default=math.nan)
    reference_w: object = field(repr=False, default=math.nan)
    deviation_h: object = field(repr=False, default=math.nan)
    deviation_s: object = field(repr=False, default=math.nan)
    deviation_h_percent: object = field(repr=False, default=math.nan)
    deviation_s_percent: object = field(repr=False, default=math.nan)
    deviation_cp_percent: object = field(repr=False, default=math.nan)
    deviation_w_percent: object = field(repr=False, default=math.nan)
    completed: int = field(repr=False, default=0)
    warnings: tuple = field(repr=False, default=())

    #: Names of the per-state fields, in display order (for tables).
    FIELDS = ("available", "reason", "reference_v", "reference_Z", "reference_rho_mass", "reference_P",
              "reference_T", "reference_phase", "deviation_v_percent", "deviation_rho_percent",
              "deviation_P_percent", "deviation_T_K", "phase_agrees", "reference_P_sat", "reference_T_sat",
              "reference_v_liquid", "reference_v_vapor", "reference_quality")
    #: The caloric per-state fields (kept apart from FIELDS, so tables built from FIELDS keep
    #: their columns until they take these on purpose).
    CALORIC_FIELDS = ("reference_h", "reference_s", "reference_cp", "reference_w", "deviation_h", "deviation_s",
                      "deviation_h_percent", "deviation_s_percent", "deviation_cp_percent", "deviation_w_percent")

    def __repr__(self):
        s = self.state
        name, model = _fluid_name(s.model.fluid), s.model.name
        if np.ndim(self.available):
            dev = np.asarray(self.deviation_v_percent, dtype=float)
            mean = np.nanmean(np.abs(dev)) if np.any(np.isfinite(dev)) else math.nan
            text = (f"CrossCheck({name!r}, {model}, {np.size(self.available)} states, "
                    f"{int(np.sum(self.available))} available, mean |deviation v| = {mean:.3g} %)")
        elif not self.available:
            text = f"CrossCheck({name!r}, {model}, unavailable: {self.reason})"
        else:
            main = (f"deviation P = {self.deviation_P_percent:+.3g} %" if math.isnan(self.deviation_v_percent)
                    else f"deviation v = {self.deviation_v_percent:+.3g} %")
            text = f"CrossCheck({name!r}, {model}, {main}, phase {s.phase!r} vs reference {self.reference_phase!r})"
        return text + _warning_text(self.warnings)

    def _table(self):
        """[(row, large)]: the rows of :meth:`rows` and whether each deviation is large
        (beyond :data:`LARGE_DEVIATION_PERCENT` or :data:`LARGE_DEVIATION_K`, or phases that differ)."""
        if np.ndim(self.available):
            raise InputError("rows() shows one state; cross-check a scalar state or index the arrays "
                             "(e.g. cross_check(solve(model, T=300.0, P=1e5)).rows()).")
        s = self.state
        M = s.model.fluid.molar_mass
        nan = math.nan
        P_sat, T_sat = _model_value(s, "P_sat"), _model_value(s, "T_sat")
        v_liquid, v_vapor = _model_value(s, "v_liquid"), _model_value(s, "v_vapor")

        def fmt(x, name=None, unit=None, digits=6):
            """x (SI) in ``unit`` of quantity ``name`` (the table's display unit when None)."""
            if x is None or not np.isfinite(x):
                return "-"
            return f"{(convert(x, name, unit) if name else x):.{digits}g}"

        def head(name, unit=None, what=None):
            """ "Molar volume [L/mol]": the table's heading (or ``what``) and unit label."""
            return f"{what or quantity(name).heading} [{unit_label(name, unit) or '-'}]"

        def percent(x):
            x = float(x)
            return ("-" if not math.isfinite(x) else f"{x:+.3g} %"), math.isfinite(x) and abs(x) > LARGE_DEVIATION_PERCENT

        def kelvin(x):
            x = float(x)
            return ("-" if not math.isfinite(x) else f"{x:+.3g} K"), math.isfinite(x) and abs(x) > LARGE_DEVIATION_K

        if not self.available:
            phase = (f"unavailable: {self.reason}", False)
        elif self.phase_agrees:
            phase = ("agrees", False)
        else:
            phase = ("DIFFERS", True)
        table = [
            ("Phase", str(s.phase), self.reference_phase or "-", phase),
            (head("T", "K"), fmt(s.T, "T", "K"), fmt(self.reference_T, "T", "K"), kelvin(self.deviation_T_K)),
            (head("P"), fmt(s.P, "P"), fmt(self.reference_P, "P"), percent(self.deviation_P_percent)),
            (head("v"), fmt(s.v, "v"), fmt(self.reference_v, "v"), percent(self.deviation_v_percent)),
            (head("rho_mass"), fmt(s.rho_mass, "rho_mass"), fmt(self.reference_rho_mass, "rho_mass"),
             percent(self.deviation_rho_percent)),
            (head("Z"), fmt(s.Z), fmt(self.reference_Z), percent(_percent(s.Z, self.reference_Z))),
            (head("P", what="Saturation pressure at T"), fmt(P_sat, "P"), fmt(self.reference_P_sat, "P"),
             percent(_percent(P_sat, self.reference_P_sat))),
        ]
        table += self._caloric_rows(fmt, head, percent)
        if s.phase == "two-phase" or self.reference_phase == "two-phase":
            table += [
                (head("quality"), fmt(s.quality, digits=4), fmt(self.reference_quality, digits=4), ("-", False)),
                (head("T", "K", "Saturation temperature at P"), fmt(T_sat, "T", "K"),
                 fmt(self.reference_T_sat, "T", "K"),
                 kelvin(T_sat - self.reference_T_sat if math.isfinite(T_sat) else nan)),
                (head("rho_mass", what="Saturated liquid density"), fmt(M / v_liquid, "rho_mass"),
                 fmt(M / self.reference_v_liquid, "rho_mass"), percent(_percent(self.reference_v_liquid, v_liquid))),
                (head("rho_mass", what="Saturated vapor density"), fmt(M / v_vapor, "rho_mass"),
                 fmt(M / self.reference_v_vapor, "rho_mass"), percent(_percent(self.reference_v_vapor, v_vapor))),
            ]
        return [((q, m, r, d[0]), d[1]) for q, m, r, d in table]

    def _caloric_rows(self, fmt, head, percent):
        """Rows of h and s (difference in the display unit, and % where meaningful), cp and w
        (%; "not single-valued" when either side is two-phase)."""
        s = self.state
        rows = []
        for name, model, ref, diff, pct in (("h", _model_value(s, "h"), self.reference_h, self.deviation_h,
                                             self.deviation_h_percent),
                                            ("s", _model_value(s, "s"), self.reference_s, self.deviation_s,
                                             self.deviation_s_percent)):
            if math.isfinite(float(diff)):
                text, large = percent(pct)
                unit = unit_label(name)
                shown = f"{convert(diff, name):+.4g} {unit}" + (f" ({text})" if text != "-" else "")
            else:
                shown, large = "-", False
            rows.append((head(name), fmt(model, name), fmt(ref, name), (shown, large)))
        two_phase = s.phase == "two-phase" or self.reference_phase == "two-phase"
        for name, pct in (("cp", self.deviation_cp_percent), ("w", self.deviation_w_percent)):
            deviation = ("not single-valued (two-phase)", False) if two_phase else percent(pct)
            rows.append((head(name), fmt(_model_value(s, name), name), fmt(getattr(self, f"reference_{name}"), name),
                         deviation))
        return rows

    def rows(self) -> list[tuple[str, str, str, str]]:
        """(quantity [unit], model, reference, deviation) rows of a scalar cross-check.

        Where the reference is unavailable the Phase row's last column says
        "unavailable: <reason>" and the reference columns show "-".
        """
        return [row for row, _ in self._table()]

    def large_deviations(self) -> list[bool]:
        """One flag per row of :meth:`rows`: True where the deviation is beyond
        :data:`LARGE_DEVIATION_PERCENT` (:data:`LARGE_DEVIATION_K` for temperatures) or the
        phases differ, as the HTML table highlights them (style :data:`LARGE_DEVIATION_STYLE`,
        legend :data:`LARGE_DEVIATION_LEGEND`)."""
        return [large for _, large in self._table()]

    def _repr_html_(self):
        s = self.state
        title = html.escape(f"{_fluid_name(s.model.fluid)} — {s.model.name} against the reference equation "
                            "(CoolProp HEOS)")
        caution = f"<p style='font-size:smaller'><b>Caution.</b> {html.escape(CAUTION)}</p>"
        notes = "".join(f"<p><b>Warning.</b> {html.escape(w)}</p>" for w in self.warnings)
        if np.ndim(self.available):
            return f"<div><p><b>{title}</b></p><pre>{html.escape(repr(self))}</pre>{notes}{caution}</div>"
        head = "<tr><th>quantity</th><th>model</th><th>reference</th><th>deviation</th></tr>"
        body = []
        for row, large in self._table():
            cells = [f"<td>{html.escape(c)}</td>" for c in row[:3]]
            cells.append(f"<td style='{LARGE_DEVIATION_STYLE}'>{html.escape(row[3])}</td>" if large
                         else f"<td>{html.escape(row[3])}</td>")
            body.append("<tr>" + "".join(cells) + "</tr>")
        legend = (f"<p style='font-size:smaller'>{html.escape(LARGE_DEVIATION_LEGEND)}</p>"
                  if self.available else
                  f"<p><b>Reference unavailable.</b> {html.escape(str(self.reason))}</p>")
        return (f"<div><table><caption>{title}</caption>{head}{''.join(body)}</table>{legend}{notes}"
                f"{caution}</div>")


#: Deviations beyond this many percent (either sign) are highlighted in a cross-check's table:
#: well outside what a cubic equation usually gives for a vapor or a supercritical gas
#: (common practice: a few percent) though not unusual for liquid density.
LARGE_DEVIATION_PERCENT = 5.0
#: Temperature deviations beyond this many kelvin are highlighted likewise.
LARGE_DEVIATION_K = 2.0
LARGE_DEVIATION_LEGEND = (f"Deviations beyond ±{LARGE_DEVIATION_PERCENT:g} % (±{LARGE_DEVIATION_K:g} K for "
                          "temperatures), and a phase that differs, are shown in bold on a shaded background.")
LARGE_DEVIATION_STYLE = "font-weight:bold; background-color:#f6d6a8; color:#5a2a00"


def _warning_text(notes) -> str:
    return "".join(f"\nWarning: {w}" for w in notes)


def _model_value(state, name):
    """A model state's property, or NaN where the model has none there (e.g. no saturation
    pressure below the lowest temperature it can solve)."""
    from .errors import ThermoRootsError

    try:
        value = getattr(state, name)
    except ThermoRootsError:
        return math.nan
    try:
        return float(value)
    except (TypeError, ValueError):
        return math.nan


def _percent(model, reference):
    with np.errstate(invalid="ignore", divide="ignore"):
        return _scalar_or_array(100.0 * (np.asarray(model, dtype=float) - reference) / reference)


def state_pair(state) -> str:
    """The reference pair for a model state: (T, P); (T, v) for any state with a volume
    known (the model's T then stands beside v); or (T|P, quality)."""
    names = set(state.knowns)
    if "quality" in names:
        return "T,quality" if "T" in names else "P,quality"
    if names == {"T", "P"}:
        return "T,P"
    return "T,v"


def cross_check(state, *, progress=False, executor=None, chunk_size=None, on_interrupt="raise",
                with_saturation=True) -> CrossCheck:
    """Compare a solved model state with the fluid's reference equation at the same knowns.

    Parameters
    ----------
    state : State
        From :func:`thermo_roots.solve`, scalar or array.
    progress : bool or "auto"
        A tqdm progress bar over the states.
    executor : concurrent.futures.Executor, optional
        Spread the reference evaluations over workers (in chunks).
    chunk_size : int, optional
        States per chunk.
    on_interrupt : {"raise", "partial"}
        On KeyboardInterrupt, re-raise (default) or return the states checked so far
        (``completed`` tells how many; the rest are unavailable with reason
        :data:`INTERRUPTED`).
    with_saturation : bool
        Also evaluate the reference saturation at each state's T and P.

    Returns
    -------
    CrossCheck
        Unavailable where the reference has no answer (below its triple point, beyond its
        limits, solid, a user fluid); never raises for such states.

    Notes
    -----
    (T, P) states are compared at (T, P); states whose knowns include a volume at the
    model's (T, v), which yields the pressure deviation; quality states on the saturation
    line at the same T (or P) and quality.

    References
    ----------
    Bell, I. H. et al. (2014), Ind. Eng. Chem. Res. 53, 2498-2508 (CoolProp).
    Span, R. & Wagner, W. (1996), J. Phys. Chem. Ref. Data 25, 1509-1596 (CO2); Wagner, W. &
    Pruss, A. (2002), J. Phys. Chem. Ref. Data 31, 387-535 (water): two of the reference
    equations behind it.
    """
    _check_state(state)
    _check_run_options(progress=progress, executor=executor, chunk_size=chunk_size, on_interrupt=on_interrupt,
                       with_saturation=with_saturation)
    pair = state_pair(state)
    T, P, v = (np.asarray(getattr(state, k), dtype=float) for k in ("T", "P", "v"))
    first, second = pair.split(",")
    a = T if first == "T" else P
    b = {"P": P, "v": v}.get(second)
    if b is None:
        b = np.asarray(state.knowns["quality"], dtype=float) * np.ones_like(a)
    shape = np.shape(state.T)
    values, completed, notes = _fluid_reference(state.model.fluid, pair, a, b, shape,
                                                with_saturation=with_saturation, progress=progress,
                                                executor=executor, chunk_size=chunk_size, on_interrupt=on_interrupt)
    return _combine(state, pair, values, completed, notes)


def _check_state(state):
    """A TypeError unless ``state`` is a solved State (the message says what to pass)."""
    from .inversion import State

    if isinstance(state, State):
        return
    hint = (" A text is not a state: solve one first, or for the reference alone at given knowns use "
            "reference_state(get_fluid('propane'), T=300.0, P=1e5).") if isinstance(state, str) else ""
    raise TypeError(f"cross_check(state) needs a State from thermo_roots.solve(), e.g. "
                    f"cross_check(solve(PengRobinson(get_fluid('propane')), T=300.0, P=1e5)); "
                    f"got {_given(state)}.{hint}")


def _combine(state, pair, ref, completed, notes=()):
    """Deviations of the model state from reference values (flat arrays in state order)."""
    shape = np.shape(state.T)
    flat = {k: np.asarray(getattr(state, k), dtype=float).ravel() for k in ("T", "P", "v")}
    phase = np.asarray(state.phase, dtype=object).ravel()
    available = ref["reason"] == ""
    nan = np.full(flat["T"].shape, np.nan)
    volume_known = pair in ("T,v",)
    with np.errstate(invalid="ignore", divide="ignore"):
        dev_v = nan if volume_known else 100.0 * (flat["v"] - ref["v"]) / ref["v"]
        dev_rho = nan if volume_known else 100.0 * (ref["v"] / flat["v"] - 1.0)
        dev_P = 100.0 * (flat["P"] - ref["P"]) / ref["P"] if pair in ("T,v", "T,quality") else nan
        dev_T = flat["T"] - ref["T"] if pair == "P,quality" else nan
        Z = ref["P"] * ref["v"] / (R * ref["T"])
        rho_mass = state.model.fluid.molar_mass / ref["v"]
    values = dict(
        available=available, reason=ref["reason"], reference_v=ref["v"], reference_Z=Z,
        reference_rho_mass=rho_mass, reference_P=ref["P"], reference_T=ref["T"], reference_phase=ref["phase"],
        deviation_v_percent=dev_v, deviation_rho_percent=dev_rho, deviation_P_percent=dev_P,
        deviation_T_K=dev_T, phase_agrees=available & (phase == ref["phase"]),
        reference_P_sat=ref["P_sat"], reference_T_sat=ref["T_sat"], reference_v_liquid=ref["v_liquid"],
        reference_v_vapor=ref["v_vapor"], reference_quality=ref["quality"],
        **_caloric_deviations(state, ref, flat["T"]),
    )
    return CrossCheck(state=state, completed=completed, warnings=tuple(notes), **_shape_values(values, shape))


def _caloric_deviations(state, ref, T):
    """The caloric fields of a cross-check (flat arrays): the reference's h, s, cp, w and the
    model's deviations from them. A model without ideal-gas data (a user fluid without cp0)
    has no h or s: its deviations are NaN, the reference values are still given."""
    from .errors import DomainError

    n = T.shape
    try:
        model = {k: np.broadcast_to(np.asarray(getattr(state, k), dtype=float), np.shape(state.T)).ravel()
                 for k in ("h", "s", "cp", "w")}
    except DomainError:
        model = {k: np.full(n, np.nan) for k in ("h", "s", "cp", "w")}
    with np.errstate(invalid="ignore", divide="ignore"):
        d_h, d_s = model["h"] - ref["h"], model["s"] - ref["s"]
        out = dict(
            reference_h=ref["h"], reference_s=ref["s"], reference_cp=ref["cp"], reference_w=ref["w"],
            deviation_h=d_h, deviation_s=d_s,
            deviation_h_percent=np.where(np.abs(ref["h"]) >= R * T, 100.0 * d_h / np.abs(ref["h"]), np.nan),
            deviation_s_percent=np.where(np.abs(ref["s"]) >= R, 100.0 * d_s / np.abs(ref["s"]), np.nan),
            deviation_cp_percent=100.0 * (model["cp"] - ref["cp"]) / ref["cp"],
            deviation_w_percent=100.0 * (model["w"] - ref["w"]) / ref["w"],
        )
    return out


# --------------------------------------------------------------------------- volume translation

def fit_volume_shift(model_class, fluid, Tr: float = 0.7) -> float:
    """Volume translation c [m^3/mol] that matches the reference saturated-liquid volume at Tr.

    c = v_liquid,model(T) - v_liquid,reference(T) at T = Tr Tc, from the untranslated
    model; then ``model_class(fluid, volume_shift=c)`` reproduces the reference's
    saturated-liquid volume there, and its saturation pressures are unchanged.

    Parameters
    ----------
    model_class : type, str or model
        A cubic model class (e.g. ``PengRobinson``), its short name ("PR"), or a model
        instance (its class is used, untranslated).
    fluid : Fluid
        A library fluid.
    Tr : float
        Reduced temperature T/Tc of the match [-], default 0.7 (where the acentric factor
        is defined).

    Returns
    -------
    float
        c [m^3/mol].

    Raises
    ------
    DomainError
        Tr not in (0, 1), or the reference has no saturated liquid at that temperature.

    References
    ----------
    Peneloux, A., Rauzy, E. & Freze, R. (1982), Fluid Phase Equilib. 8, 7-23 (a constant
    translation leaves the phase equilibrium unchanged).
    """
    from .models import MODELS, CubicModel

    if isinstance(model_class, str):
        if model_class not in MODELS:
            raise InputError(f"Unknown model {model_class!r}; allowed: {', '.join(MODELS)}.")
        model_class = MODELS[model_class]
    elif isinstance(model_class, CubicModel):
        model_class = type(model_class)
    if not (isinstance(model_class, type) and issubclass(model_class, CubicModel)):
        raise InputError(f"fit_volume_shift needs a cubic model class such as PengRobinson, not {model_class!r}.")
    fluid = _as_fluid(fluid, "fit_volume_shift")
    if isinstance(Tr, (bool, np.bool_)) or not isinstance(Tr, (int, float, np.integer, np.floating)):
        raise TypeError(f"Tr must be a number between 0 and 1 (a reduced temperature T/Tc); got {_given(Tr)}.")
    if not 0.0 < Tr < 1.0:
        raise DomainError(f"Tr = {Tr!r} must lie between 0 and 1 (a saturated liquid exists only below Tc).")
    T = Tr * fluid.Tc
    ref = reference_saturation(fluid, T=T)
    if not ref.available:
        lowest = reference_limits(fluid)["T_min"] / fluid.Tc
        raise DomainError(f"The reference has no saturated liquid of {fluid.name} at Tr = {Tr:.6g} (T = {T:.6g} K): "
                          f"{ref.reason}. Choose Tr between {lowest:.4g} (its triple point) and 1, e.g. "
                          f"Tr={max(0.7, math.ceil(lowest * 20) / 20):.2f}.")
    model = model_class(fluid)
    return float(saturation(model, T=T).v_liquid - ref.v_liquid)
