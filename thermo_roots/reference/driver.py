"""The reference driver: the only code that talks to CoolProp.

It evaluates the fluid's multiparameter Helmholtz-energy equation (CoolProp's ``HEOS``
backend) one state at a time, with one ``AbstractState`` per fluid *and thread*: a state
object is updated and then read in separate calls, so two threads sharing one would read
each other's states. A state the reference cannot give -- below its triple point, beyond
its limits, in the solid, or where CoolProp raises -- comes back as *unavailable* with a
reason sentence (what failed, at which knowns, what to try; CoolProp's own text after it in
parentheses), never as an exception out of a run.

Only the ``HEOS`` backend is used: the tabular backends have crashed the process on bulk
calls. ``PropsSI`` is not used either: the low-level ``update`` is several times faster.

References
----------
Bell, I. H., Wronski, J., Quoilin, S. & Lemort, V. (2014), Pure and pseudo-pure fluid
thermophysical property evaluation and the open-source thermophysical property library
CoolProp, Ind. Eng. Chem. Res. 53, 2498-2508.
"""

from __future__ import annotations

import functools
import math
import threading
import types

import numpy as np

from ..errors import InputError, UnknownFluidError
from ..fluids import as_fluid
from ..quantities import quantity

#: The pairs of knowns the reference understands, as the names used by ``solve``.
REFERENCE_PAIRS = ("T,P", "T,v", "P,v", "T,quality", "P,quality", "P,h", "P,s", "v,u")


_LIMIT_KEYS = ("T_min", "T_max", "P_max", "P_triple", "Tc", "Pc", "v_c")
_FIELDS = ("T", "P", "v", "quality", "P_sat", "T_sat", "v_liquid", "v_vapor")
#: Caloric values read at every reference state (molar, SI); cp and w stay NaN when two-phase.
_CALORIC = ("h", "s", "u", "cp", "w")
_FIELDS = _FIELDS + _CALORIC


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
            f"library_name={library_name!r} is not a fluid of CoolProp's library; use a name from "
            "thermo_roots.fluid_names() (get_fluid finds it by its usual name), or library_name=None for a fluid "
            f"without a reference equation (CoolProp: {error}).") from None


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
    return thread_state(_THREAD_STATES, library_name, _new_abstract_state), limits


def thread_state(local: threading.local, key, make):
    """The state object ``make(key)`` of this thread, made on its first use in the thread.

    ``local`` holds one dictionary per thread; the reference's state objects are updated and
    read in separate calls, so each thread must have its own.
    """
    states = getattr(local, "states", None)
    if states is None:
        states = local.states = {}
    state = states.get(key)
    if state is None:
        state = states[key] = make(key)
    return state


@functools.lru_cache(maxsize=1)
def _coolprop():
    import CoolProp

    inputs = {"T,P": CoolProp.PT_INPUTS, "T,v": CoolProp.DmolarT_INPUTS, "P,v": CoolProp.DmolarP_INPUTS,
              "T,quality": CoolProp.QT_INPUTS, "P,quality": CoolProp.PQ_INPUTS,
              "P,h": CoolProp.HmolarP_INPUTS, "P,s": CoolProp.PSmolar_INPUTS, "v,u": CoolProp.DmolarUmolar_INPUTS}
    # CoolProp's phase codes in the project's phase words. thermo_roots/inversion/phases.py is
    # now the one place for phase words (PHASES, indexed by LIQUID, VAPOR, SUPERCRITICAL,
    # TWO_PHASE): these words should be read from there instead of written here (left for the
    # lead: the mapping is unchanged in this branch).
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
    fluid = as_fluid(fluid, "reference_limits(fluid)")
    name = fluid.library_name
    if not name:
        raise InputError(f"Fluid {fluid.name!r} has no library_name, so it has no "
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
    v_vapor (saturated, at T), h, s, u, cp, w, phase and reason ("" where available).
    """
    CoolProp, inputs, phases = _coolprop()
    a, b = np.broadcast_arrays(np.asarray(a, dtype=float).ravel(), np.asarray(b, dtype=float).ravel())
    n = a.size
    out = {k: np.full(n, np.nan) for k in _FIELDS}
    out["phase"] = np.full(n, "", dtype=object)
    out["reason"] = np.full(n, "", dtype=object)
    state, limits = _abstract_state(library_name)
    key = inputs[pair]
    for i in range(n):
        x, y = float(a[i]), float(b[i])
        reason = _knowns_reason(pair, x, y, limits)
        if not reason:
            try:
                state.update(key, *_update_arguments(pair, x, y))
                reason = _read_state(out, i, state, limits, phases)
            except ValueError as error:
                reason = _failure_reason(pair, x, y, limits, error)
        if reason:
            out["reason"][i] = reason
        elif with_saturation:
            _saturation_into(out, i, state, limits, out["T"][i], out["P"][i])
    return out


def _knowns_reason(pair, x, y, limits):
    """Why the knowns (x, y) of ``pair`` cannot go to the reference at all, or "" (checked
    before CoolProp is called, so the reason can say exactly what is wrong)."""
    if not (math.isfinite(x) and math.isfinite(y)):
        return "the model state is not finite (it did not solve)"
    first, second = pair.split(",")
    T = x if first == "T" else math.nan
    P = x if first == "P" else (y if second == "P" else math.nan)
    reason = _limit_reason(limits, T, P)
    for name, value in ((second, y), (first, x)):
        if not reason and name == "v" and value <= 0.0:
            reason = f"v = {value:.6g} m³/mol is not positive"
    if not reason and second == "quality":
        critical = limits["Tc"] if first == "T" else limits["Pc"]
        unit = "K" if first == "T" else "Pa"
        if not 0.0 <= y <= 1.0:
            reason = f"quality = {y:.6g} is outside [0, 1]"
        elif x > critical:
            reason = (f"{first} = {x:.6g} {unit} is above the reference's critical value "
                      f"{critical:.6g} {unit}: no saturation there")
    return reason


def _read_state(out, i, state, limits, phases):
    """Store the state CoolProp has just solved in row i, or return why it is not a state
    of the reference equation (outside its limits, or solid)."""
    T, P = state.T(), state.p()
    reason = _limit_reason(limits, T, P) or _solid_reason(state, limits, T, P)
    if reason:
        return reason
    out["T"][i], out["P"][i], out["v"][i] = T, P, 1.0 / state.rhomolar()
    phase = phases.get(state.phase(), "")
    if phase == "two-phase":
        out["quality"][i] = state.Q()
    out["phase"][i] = phase
    _caloric_into(out, i, state, phase)
    return ""


def _knowns_text(pair, x, y):
    """ "P = 5e+05 Pa, h = 1.2e+04 J/mol": the knowns of a reference state in SI units."""
    parts = []
    for name, value in zip(pair.split(","), (x, y)):
        unit = quantity(name).si_label
        parts.append(f"{name} = {value:.6g}" + ("" if unit == "-" else f" {unit}"))
    return ", ".join(parts)


def _failure_reason(pair, x, y, limits, error):
    """A plain sentence for a state CoolProp refused: what failed, at which knowns, what to
    try; CoolProp's own text after it in parentheses, for whoever wants the detail."""
    first, second = pair.split(",")
    P = x if first == "P" else (y if second == "P" else math.nan)
    detail = str(error).strip() or type(error).__name__
    if P == P and P < limits["P_triple"]:
        advice = (f"P is below the reference's triple-point pressure {limits['P_triple']:.6g} Pa, where the "
                  "cold states are solid (not part of the reference equation); give a pressure above it")
    else:
        advice = ("the state lies outside the reference equation's range, or its solver found no solution "
                  "there; check the knowns against reference_limits(fluid), or try a state nearby")
    return f"the reference equation found no state at {_knowns_text(pair, x, y)}: {advice} (CoolProp: {detail})"


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


def _unavailable_values(n, reason):
    out = {k: np.full(n, np.nan) for k in _FIELDS}
    out["phase"] = np.full(n, "", dtype=object)
    out["reason"] = np.full(n, reason, dtype=object)
    return out


def _fluid_name(fluid) -> str:
    """The fluid's name as engineers write it: ``Fluid.name`` (library fluids carry the
    everyday name there, e.g. "carbon dioxide"; ``fluids.display_name`` makes it)."""
    return fluid.name


def _no_library_reason(fluid):
    return f"fluid {_fluid_name(fluid)!r} is a user fluid without a reference equation (no library_name)"


def _unknown_library_reason(fluid):
    return (f"the reference library does not know library_name={fluid.library_name!r} (fluid "
            f"{_fluid_name(fluid)!r}), so there is no reference equation to compare with; "
            "thermo_roots.fluid_names() lists the names it knows")


def library_reason(fluid) -> str:
    """Why the fluid has no reference equation ("" when it has one): no library name, or a
    library name CoolProp does not know."""
    if not fluid.library_name:
        return _no_library_reason(fluid)
    try:
        _library_limits(fluid.library_name)
    except UnknownFluidError:
        return _unknown_library_reason(fluid)
    return ""
