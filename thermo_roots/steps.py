"""Layer 8: process steps -- a valve, a compressor or expander, a closed vessel heated or cooled.

Each step takes a solved inlet :class:`~thermo_roots.State`, finds the outlet with the
model's own energy inversions, and runs the same step through the fluid's reference
equation (CoolProp HEOS, its own (P, h), (P, s) and (v, P) / (v, T) solves;
:mod:`thermo_roots.reference.steps`) beside it, so the distance between the cubic's outlet
and the reference's is in the result. This module only composes the two: the model's step,
then the reference's, with the efficiency rule written once (:func:`_outlet_enthalpy`).

- :func:`throttle`: isenthalpic (valve, expansion device, pressure regulator): h_out = h_in.
- :func:`compress`: isentropic outlet at P_out, then h_out = h_in + (h_s - h_in) / efficiency.
- :func:`expand`: isentropic outlet at P_out, then h_out = h_in - efficiency (h_in - h_s).
- :func:`heat_at_constant_volume`: a closed, rigid vessel to a target pressure or
  temperature: v_out = v_in, Q = m (u_out - u_in).

Sign convention: work and heat are *into the fluid* (positive for a compressor and for
heating; negative for an expander, which delivers work, and for cooling). Steady-flow
steps neglect kinetic and potential energy (common practice for valves and machines).

References
----------
Smith, J. M., Van Ness, H. C. & Abbott, M. M. (2005), Introduction to Chemical Engineering
Thermodynamics, 7th ed., ch. 7 (throttling, isentropic efficiencies of compressors and
turbines) and ch. 2 (the energy balance of a closed system).
Moran, M. J. & Shapiro, H. N. (2006), Fundamentals of Engineering Thermodynamics, 5th ed.,
sec. 6.12 (isentropic efficiencies: turbine eta = (h1 - h2)/(h1 - h2s), compressor
eta = (h2s - h1)/(h2 - h1)).
"""

from __future__ import annotations

import html
import math
from dataclasses import dataclass, field

import numpy as np

from .errors import InputError
from .equilibrium import MixtureState
from .equilibrium.dispatch import solve
from .inversion import CAUTION, State
from .inversion.phases import phase_text
from .models import _scalar_or_array
from .reference import (LARGE_DEVIATION_K, LARGE_DEVIATION_PERCENT, convention_offset, library_reason,
                        reference_limits)
from .reference.steps import ReferenceStep, reference_flow_step, reference_mixture_flow_step, reference_vessel_step
from .units import STANDARD_ATMOSPHERE, to_si

#: The kinds of step, as the results name them.
THROTTLE, COMPRESSION, EXPANSION, CONSTANT_VOLUME = ("throttle", "compression", "expansion",
                                                     "constant-volume heat")
#: Said before the caution in a vessel's output: the result sizes heat for pressure equipment.
VESSEL_CAUTION = ("PRESSURE EQUIPMENT: a screening estimate of the heat and pressure in a closed vessel. "
                  "Relief devices, set pressures and fill limits follow local codes and a licensed "
                  "engineer's review, never this number alone.")


# --------------------------------------------------------------------------- results

@dataclass(frozen=True)
class StepResult:
    """A process step of one model, with the reference's step beside it.

    Attributes
    ----------
    kind : "throttle", "compression", "expansion" or "constant-volume heat"
    inlet, outlet : State
    isentropic_outlet : State at P_out with the inlet's entropy (compressor, expander), else None
    efficiency : isentropic efficiency [-] (1 for a throttle or a vessel)
    work_molar [J/mol], work_mass [J/kg] : shaft work into the fluid, h_out - h_in (0 for a
        throttle and a vessel)
    heat_molar [J/mol], heat_mass [J/kg] : heat into the fluid (u_out - u_in for a vessel;
        0 for the adiabatic steps)
    heat : heat into the whole vessel [J] (NaN for a flow step)
    mass : the vessel's fill [kg]; volume : its volume [m^3] (NaN for a flow step)
    reference : ReferenceStep
    warnings : plain sentences (empty when none)
    """

    kind: str
    inlet: object = field(repr=False)
    outlet: object = field(repr=False)
    isentropic_outlet: object = field(repr=False)
    efficiency: float
    work_molar: object = field(repr=False)
    work_mass: object = field(repr=False)
    heat_molar: object = field(repr=False)
    heat_mass: object = field(repr=False)
    heat: object = field(repr=False)
    mass: object = field(repr=False)
    volume: object = field(repr=False)
    reference: ReferenceStep = field(repr=False)
    warnings: tuple = field(repr=False, default=())

    # -- the distance from the reference
    @property
    def deviation_T_K(self):
        """T_out(model) - T_out(reference) [K]."""
        return _difference(self.outlet.T, _ref_attr(self.reference.outlet, "T"))

    @property
    def deviation_quality(self):
        """quality_out(model) - quality_out(reference) [-]; NaN unless both are two-phase."""
        name = _split_name(self.outlet)
        out = _difference(_ref_attr(self.outlet, name), _ref_attr(self.reference.outlet, name))
        if name == "vapor_fraction":   # a mixture's fraction is 0 or 1 in one phase: compare splits only
            both = ((np.asarray(self.outlet.phase) == "two-phase")
                    & (np.asarray(_ref_attr(self.reference.outlet, "phase"), dtype=object) == "two-phase"))
            out = _scalar_or_array(np.where(both, out, np.nan))
        return out

    @property
    def deviation_work_percent(self):
        """100 (work_model - work_ref) / |work_ref| [%]; NaN for a throttle and a vessel."""
        return _relative(self.work_mass, self.reference.work_mass)

    @property
    def deviation_heat_percent(self):
        """100 (heat_model - heat_ref) / |heat_ref| [%] for a vessel; NaN for flow steps."""
        return _relative(self.heat_mass, self.reference.heat_mass)

    # -- display
    def rows(self) -> list[tuple[str, str, str, str, str]]:
        """(quantity [unit], model inlet, model outlet, reference inlet, reference outlet)
        rows of a scalar step in engineering units (°C, bar, kJ/kg)."""
        if np.ndim(self.outlet.T):
            raise InputError("rows() shows one step; give a scalar inlet, or read the arrays "
                             "(result.outlet.T, result.work_mass, ...).")
        ref = self.reference
        r_in, r_out = ref.inlet, ref.outlet

        def cell(x, scale=1.0, offset=0.0, digits=5):
            try:
                x = float(x)
            except (TypeError, ValueError):
                return "-"
            return "-" if not math.isfinite(x) else f"{x * scale + offset:.{digits}g}"

        def phase(st):
            if st is None or not getattr(st, "phase", ""):
                return "-"
            return phase_text(st.phase, float(np.asarray(getattr(st, "quality", np.nan), dtype=float)))

        M = self.inlet.model.molar_mass
        # the reference's h and s on the model's zero (IIR, ASHRAE, NBP), so the columns compare
        dh, ds = (0.0, 0.0) if self.inlet.model.is_mixture else convention_offset(self.inlet.model)
        shift = {"h": dh, "s": ds}
        split = _split_name(self.inlet)
        split_label = "Vapor fraction (molar) [-]" if split == "vapor_fraction" else "Vapor quality [-]"
        rows = [("Phase", phase(self.inlet), phase(self.outlet), phase(r_in), phase(r_out))]
        for label, name, scale, offset in (("Temperature [°C]", "T", 1.0, -273.15), ("Pressure [bar abs]", "P", 1e-5, 0.0),
                                           (split_label, split, 1.0, 0.0),
                                           ("Specific enthalpy h [kJ/kg]", "h", 1e-3 / M, 0.0),
                                           ("Specific entropy s [kJ/(kg K)]", "s", 1e-3 / M, 0.0),
                                           ("Mass density [kg/m³]", "rho_mass", 1.0, 0.0)):
            values = ([_ref_attr(st, name) for st in (self.inlet, self.outlet)]
                      + [_ref_attr(st, name) + shift.get(name, 0.0) for st in (r_in, r_out)])
            rows.append((label,) + tuple(cell(x, scale, offset) for x in values))
        return rows

    def _energy_lines(self) -> list[str]:
        ref = self.reference
        lines = []
        if self.kind in (COMPRESSION, EXPANSION):
            what = "Work into the fluid" if self.kind == COMPRESSION else "Work into the fluid (negative: delivered)"
            lines.append(f"{what}: {self.work_mass / 1e3:.5g} kJ/kg ({self.work_molar / 1e3:.5g} kJ/mol); "
                         f"reference {_kilo(ref.work_mass)} kJ/kg, deviation {_signed(self.deviation_work_percent, '%')}")
            lines.append(f"Isentropic outlet: {self.isentropic_outlet.T - 273.15:.5g} °C (reference "
                         f"{_celsius(_ref_attr(ref.isentropic_outlet, 'T'))} °C); efficiency {self.efficiency:.4g}")
        elif self.kind == CONSTANT_VOLUME:
            lines.append(f"Heat into the fluid: {self.heat_mass / 1e3:.5g} kJ/kg, {self.heat / 1e3:.5g} kJ for the "
                         f"vessel ({self.mass:.5g} kg in {self.volume * 1e3:.5g} L); reference "
                         f"{_kilo(ref.heat_mass)} kJ/kg, {_kilo(ref.heat)} kJ, deviation "
                         f"{_signed(self.deviation_heat_percent, '%')}")
        else:
            lines.append("Adiabatic, no work: h_out = h_in.")
        if ref.available:
            quality = (f"; {'vapor fraction' if self.inlet.model.is_mixture else 'quality'} "
                       f"{_signed(self.deviation_quality, '')}"
                       if math.isfinite(_scalar(self.deviation_quality)) else "")
            lines.append(f"Outlet temperature, model - reference: {_signed(self.deviation_T_K, 'K')}{quality}")
        else:
            lines.append(f"Reference step {ref.reason}")
        large = self._large_deviations()
        if large:
            lines.append(f"{_BEYOND} (±{LARGE_DEVIATION_PERCENT:g} %, ±{LARGE_DEVIATION_K:g} K): "
                         f"{', '.join(large)}. Do not rely on the model's number here.")
        return lines

    def _large_deviations(self) -> list[str]:
        """What of a scalar step differs from the reference by more than the thresholds the
        cross-check and the panels mark (LARGE_DEVIATION_PERCENT, LARGE_DEVIATION_K)."""
        out = []
        for label, value, limit, unit in (("work", self.deviation_work_percent, LARGE_DEVIATION_PERCENT, "%"),
                                          ("heat", self.deviation_heat_percent, LARGE_DEVIATION_PERCENT, "%"),
                                          ("outlet temperature", self.deviation_T_K, LARGE_DEVIATION_K, "K")):
            x = _scalar(value)
            if math.isfinite(x) and abs(x) > limit:
                out.append(f"{label} {_signed(x, unit)}")
        return out

    def __repr__(self):
        model = self.inlet.model
        head = f"StepResult({self.kind}, {_content(model)}, {model.name}"
        if np.ndim(self.outlet.T):
            return head + f", {np.size(self.outlet.T)} steps)"
        text = [head + f", {self.inlet.P / 1e5:.5g} bar -> {self.outlet.P / 1e5:.5g} bar, "
                f"{self.inlet.T - 273.15:.5g} °C -> {self.outlet.T - 273.15:.5g} °C)"]
        if self.kind == CONSTANT_VOLUME:
            text.append(f"  {VESSEL_CAUTION}")
        widths = [max(len(r[i]) for r in self.rows()) for i in range(5)]
        header = ("", "inlet", "outlet", "reference inlet", "reference outlet")
        widths = [max(w, len(h)) for w, h in zip(widths, header)]
        for row in (header,) + tuple(self.rows()):
            text.append("  " + "  ".join(c.ljust(w) for c, w in zip(row, widths)).rstrip())
        text += [f"  {line}" for line in self._energy_lines()]
        text += [f"  Warning: {w}" for w in self.warnings]
        text.append(f"  Caution: {CAUTION}")
        return "\n".join(text)

    def _repr_html_(self):
        model = self.inlet.model
        esc = html.escape
        title = esc(f"{self.kind.capitalize()} of {_content(model)} — {model.name}, "
                    f"{'reference mixture model' if model.is_mixture else 'reference equation'} beside it")
        vessel = (f"<p style='font-weight:bold;border:2px solid #8a1c1c;padding:4px'>{esc(VESSEL_CAUTION)}</p>"
                  if self.kind == CONSTANT_VOLUME else "")
        caution = f"<p><b>Caution.</b> {esc(CAUTION)}</p>"
        if np.ndim(self.outlet.T):
            return f"<div><p><b>{title}</b></p>{vessel}<pre>{esc(repr(self))}</pre>{caution}</div>"
        head = "".join(f"<th>{esc(h)}</th>" for h in ("", "inlet", "outlet", "reference inlet", "reference outlet"))
        body = "".join("<tr>" + "".join(f"<td>{esc(c)}</td>" for c in row) + "</tr>" for row in self.rows())
        lines = "".join(f"<p><b>{esc(line)}</b></p>" if line.startswith(_BEYOND) else f"<p>{esc(line)}</p>"
                        for line in self._energy_lines())
        notes = "".join(f"<p><b>Warning.</b> {esc(w)}</p>" for w in self.warnings)
        return (f"<div>{vessel}<table><caption>{title}</caption><tr>{head}</tr>{body}</table>{lines}{notes}"
                f"{caution}</div>")


_BEYOND = "Beyond the screening thresholds"   # the display's line of large deviations


def _split_name(state):
    """The attribute that says how much of a state is vapor: a pure fluid's quality, a mixture's
    molar vapor fraction."""
    return "vapor_fraction" if isinstance(state, MixtureState) else "quality"


def _content(model) -> str:
    """What flows through a step: the fluid's name, or a mixture's components."""
    return " + ".join(model.components.names) if model.is_mixture else model.fluid.name


def _ref_attr(state, name):
    if state is None:
        return math.nan
    value = getattr(state, name, math.nan)
    return math.nan if value is None else value


def _difference(a, b):
    with np.errstate(invalid="ignore"):
        return _scalar_or_array(np.asarray(a, dtype=float) - np.asarray(b, dtype=float))


def _relative(a, b):
    a, b = np.asarray(a, dtype=float), np.asarray(b, dtype=float)
    with np.errstate(invalid="ignore", divide="ignore"):
        return _scalar_or_array(np.where(b != 0.0, 100.0 * (a - b) / np.abs(b), np.nan))


def _kilo(x):
    x = float(x) if np.ndim(x) == 0 else math.nan
    return "-" if not math.isfinite(x) else f"{x / 1e3:.5g}"


def _celsius(x):
    x = float(x) if np.ndim(x) == 0 else math.nan
    return "-" if not math.isfinite(x) else f"{x - 273.15:.5g}"


def _scalar(x):
    """A float of a scalar value; NaN for an array (the display shows one step)."""
    return float(x) if np.ndim(x) == 0 else math.nan


def _signed(x, unit):
    x = _scalar(x)
    return "-" if not math.isfinite(x) else f"{x:+.3g} {unit}".rstrip()


# --------------------------------------------------------------------------- input checks

def _check_inlet(model, inlet, caller):
    if not isinstance(inlet, (State, MixtureState)):
        raise TypeError(f"{caller}(model, inlet, ...) needs the inlet as a State from thermo_roots.solve, e.g. "
                        f"solve(model, P='10 bar', quality=0); got {type(inlet).__name__} {inlet!r:.60}.")
    if inlet.model is not model and inlet.model != model:
        raise InputError(f"{caller}: the inlet was solved with {inlet.model!r}, not with {model!r}; solve the inlet "
                         f"with the same model (solve(model, ...)) or pass inlet.model as the model.")
    reason = np.asarray(inlet.reason, dtype=object)
    if np.any(reason != ""):
        first = next(str(r) for r in reason.ravel() if r != "")
        raise InputError(f"{caller}: the inlet is not solved everywhere ({first}); solve a valid inlet first.")
    fluids = model.components.fluids if model.is_mixture else (model.fluid,)
    for fluid in fluids:
        if fluid.ideal_gas is None:
            raise InputError(f"{caller}: {fluid.name} has no ideal-gas heat capacity, so its enthalpy and entropy "
                             "are unknown; give Fluid(..., cp0=...) or use a library fluid (get_fluid).")


def _pressure(value, name, caller, atmosphere):
    P = np.asarray(to_si(value, "P", atmosphere=atmosphere), dtype=float)
    if not np.all(np.isfinite(P)) or not np.all(P > 0.0):
        raise InputError(f"{caller}: {name} must be a finite absolute pressure above zero; got {value!r}. "
                         f"Try {name}='2 bar' or {name}=2e5 (Pa).")
    return P


def _efficiency(value, caller):
    if isinstance(value, (bool, np.bool_)) or not isinstance(value, (int, float, np.integer, np.floating)):
        raise TypeError(f"{caller}: efficiency must be a number in (0, 1] (an isentropic efficiency, e.g. 0.75); "
                        f"got {type(value).__name__} {value!r:.40}.")
    if not (math.isfinite(value) and value > 0.0):
        raise InputError(f"{caller}: efficiency={value!r} is not allowed: an isentropic efficiency is a number above "
                         "0 and at most 1 (typical machines 0.6 to 0.9); try efficiency=0.75.")
    return float(value)


# --------------------------------------------------------------------------- the efficiency rule

def _outlet_enthalpy(kind, efficiency):
    """h_out(h_in, h_s) [J/mol] of an adiabatic machine: a compressor needs more work than the
    isentropic one, h_in + (h_s - h_in)/eta; an expander delivers less, h_in - eta (h_in - h_s).
    The one place of the rule: the model's step and the reference's step both use it."""
    if kind == COMPRESSION:
        return lambda h_in, h_s: h_in + (h_s - h_in) / efficiency
    return lambda h_in, h_s: h_in - efficiency * (h_in - h_s)


# --------------------------------------------------------------------------- warnings

def _outlet_warnings(model, outlet, P_out):
    """The outlet's own warnings, and a solid-formation sentence below the triple point.

    Solid may form where the outlet is colder than the triple point, or where it holds
    liquid (liquid or two-phase in the model) below the triple-point pressure: no real
    liquid exists there (common practice: the phase diagram of a pure substance). A vapor
    outlet below that pressure but warmer than the triple point is clear of the solid (the
    sublimation curve lies below the triple-point temperature), so it is not warned of.
    """
    notes = list(outlet.warnings)
    if model.is_mixture:
        return _mixture_outlet_warnings(model, outlet, notes)
    fluid = model.fluid
    solid = "dry ice" if fluid.library_name == "CarbonDioxide" or fluid.name == "carbon dioxide" else "solid"
    T = np.asarray(outlet.T, dtype=float)
    cold = fluid.T_triple is not None and np.any(T < fluid.T_triple)
    P_triple = _triple_pressure(model)
    P_out = np.broadcast_to(np.asarray(P_out, dtype=float), T.shape)
    with_liquid = np.isin(np.asarray(outlet.phase, dtype=object), ("liquid", "two-phase"))
    low = P_triple is not None and np.any((P_out < P_triple) & with_liquid)
    if cold or low:
        # The step's sentence below says more (pressure too, in °C and bar): the outlet
        # state's own triple-point sentence would repeat it.
        notes = [w for w in notes if "below the triple point of" not in w]
        where = []
        if cold:
            where.append(f"the outlet temperature {np.min(T) - 273.15:.4g} °C is below the triple-point "
                         f"temperature {fluid.T_triple - 273.15:.4g} °C")
        if low:
            where.append(f"the outlet pressure {np.min(P_out[with_liquid]) / 1e5:.4g} bar is below the triple-point "
                         f"pressure {P_triple / 1e5:.4g} bar, where the liquid the model shows cannot exist")
        notes.insert(0, f"Solid may form at the outlet ({solid} for {fluid.name}): {' and '.join(where)}. "
                     f"{'Dry ice can block the line or the valve. ' if solid == 'dry ice' else ''}"
                     f"The cubic equation does not model the solid, so its outlet temperature and quality there "
                     f"are not physical.")
    return notes


def _mixture_outlet_warnings(model, outlet, notes):
    """A mixture outlet colder than a component's triple point: that component may freeze out
    (CO2 in a cold natural gas, water anywhere below 0 °C); the cubic has no solid phase."""
    T = float(np.min(np.asarray(outlet.T, dtype=float)))
    frozen = [f"{f.name} (triple point {f.T_triple - 273.15:.4g} °C)" for f, zi in
              zip(model.components.fluids, model.z) if zi > 0 and f.T_triple is not None and T < f.T_triple]
    if frozen:
        notes.insert(0, f"Solid may form at the outlet: it is colder ({T - 273.15:.4g} °C) than the triple point of "
                     f"{', '.join(frozen)}, which can freeze out of the mixture and block the line; the cubic has "
                     "no solid phase, so its outlet here is not physical. Check the solubility of that component "
                     "at the outlet's conditions.")
    return notes


def _triple_pressure(model):
    """The triple-point pressure [Pa]: the reference equation's, else the model's P_sat at
    T_triple; None when neither is known."""
    fluid = model.fluid
    if not library_reason(fluid):
        return reference_limits(fluid)["P_triple"]
    if fluid.T_triple is None:
        return None
    from .inversion import saturation

    try:
        return float(saturation(model, T=fluid.T_triple).P)
    except ValueError:
        return None


def _efficiency_warnings(efficiency):
    if efficiency > 1.0:
        return [f"efficiency = {efficiency:.4g} is above 1: an isentropic efficiency cannot exceed 1 for a real "
                "adiabatic machine; check the value (typical 0.6 to 0.9)."]
    return []


# --------------------------------------------------------------------------- the steps

def throttle(model, inlet, P_out, *, atmosphere=STANDARD_ATMOSPHERE) -> StepResult:
    """Isenthalpic step through a valve, an expansion device or a pressure regulator.

    Parameters
    ----------
    model : CubicModel or IdealGas
        The model the inlet was solved with.
    inlet : State
        The inlet, from :func:`thermo_roots.solve` (scalar or array).
    P_out : float, array_like or str
        Outlet pressure [Pa] (absolute; text with units, gauge allowed: ``"2 bar"``, ``"1 barg"``),
        at most the inlet pressure.
    atmosphere : float or str
        Atmospheric pressure a gauge P_out refers to [Pa].

    Returns
    -------
    StepResult
        h_out = h_in; no work, no heat. The reference's outlet is its own (P, h) solve from
        its own inlet at the same knowns.

    Raises
    ------
    TypeError
        inlet is not a State.
    InputError
        inlet of another model, P_out not a positive pressure or above the inlet pressure.

    References
    ----------
    Smith, Van Ness & Abbott (2005), Introduction to Chemical Engineering Thermodynamics,
    7th ed., sec. 7.3 (throttling processes: constant enthalpy).
    """
    _check_inlet(model, inlet, "throttle")
    P = _pressure(P_out, "P_out", "throttle", atmosphere)
    if np.any(P > np.asarray(inlet.P) * (1.0 + 1e-12)):
        raise InputError(f"throttle: P_out = {np.max(P):.6g} Pa is above the inlet pressure {np.min(inlet.P):.6g} Pa; "
                         "a valve or regulator only lowers the pressure. For a rise use compress().")
    outlet = solve(model, P=P, h=inlet.h)
    ref = _reference_flow(model, inlet, P)
    zero = _scalar_or_array(np.zeros(np.shape(outlet.T)))
    return StepResult(THROTTLE, inlet, outlet, None, 1.0, zero, zero, zero, zero, math.nan, math.nan, math.nan, ref,
                      tuple(_outlet_warnings(model, outlet, P)))


def _reference_flow(model, inlet, P, rule=None):
    """The same flow step through the reference: the fluid's reference equation, or for a
    mixture the reference mixture model from its own state at the inlet's T and P."""
    if model.is_mixture:
        return reference_mixture_flow_step(model.components, inlet.T, inlet.P, P, rule)
    return reference_flow_step(model.fluid, inlet, P, rule)


def _machine(model, inlet, P_out, efficiency, kind, atmosphere):
    caller = "compress" if kind == COMPRESSION else "expand"
    _check_inlet(model, inlet, caller)
    eta = _efficiency(efficiency, caller)
    P = _pressure(P_out, "P_out", caller, atmosphere)
    P_in = np.asarray(inlet.P)
    if kind == COMPRESSION and np.any(P < P_in * (1.0 - 1e-12)):
        raise InputError(f"compress: P_out = {np.min(P):.6g} Pa is below the inlet pressure {np.max(P_in):.6g} Pa; "
                         "a compressor raises the pressure. For a drop use expand() (work recovered) or throttle().")
    if kind == EXPANSION and np.any(P > P_in * (1.0 + 1e-12)):
        raise InputError(f"expand: P_out = {np.max(P):.6g} Pa is above the inlet pressure {np.min(P_in):.6g} Pa; "
                         "an expander or turbine lowers the pressure. For a rise use compress().")
    h_in = np.asarray(inlet.h, dtype=float)
    isentropic = solve(model, P=P, s=inlet.s)
    h_s = np.asarray(isentropic.h, dtype=float)
    rule = _outlet_enthalpy(kind, eta)
    h_out = rule(h_in, h_s)
    # at efficiency 1 the outlet is the isentropic state itself (s_out = s_in exactly, not
    # through a second inversion)
    outlet = isentropic if eta == 1.0 else solve(model, P=P, h=h_out)
    work = _scalar_or_array(h_out - h_in)
    zero = _scalar_or_array(np.zeros(np.shape(outlet.T)))
    ref = _reference_flow(model, inlet, P, rule)
    notes = _efficiency_warnings(eta) + _outlet_warnings(model, outlet, P)
    wet = (np.asarray(inlet.phase) == "two-phase") & ~(np.asarray(_ref_attr(inlet, _split_name(inlet))) >= 1.0 - 1e-9)
    if kind == COMPRESSION and np.any(wet):   # saturated vapor (quality 1) carries no liquid
        notes.append("The compressor inlet is two-phase: liquid entering a compressor can damage it (liquid "
                     "slugging); compressors are normally fed with superheated vapor (common practice).")
    if np.any(np.asarray(outlet.phase) == "two-phase") and kind == EXPANSION:
        notes.append("The expander outlet is two-phase: condensate forms in the machine.")
    return StepResult(kind, inlet, outlet, isentropic, eta, work,
                      _scalar_or_array(np.asarray(work) / model.molar_mass), zero, zero, math.nan, math.nan,
                      math.nan, ref, tuple(notes))


def compress(model, inlet, P_out, efficiency=1.0, *, atmosphere=STANDARD_ATMOSPHERE) -> StepResult:
    """Adiabatic compression with an isentropic efficiency.

    The isentropic outlet is the model's (P_out, s_in) state; the actual outlet has
    h_out = h_in + (h_s - h_in) / efficiency (a real compressor needs more work than the
    isentropic one).

    Parameters
    ----------
    model : CubicModel or IdealGas
    inlet : State
        From :func:`thermo_roots.solve` (scalar or array).
    P_out : float, array_like or str
        Discharge pressure [Pa], at least the inlet pressure.
    efficiency : float
        Isentropic efficiency [-], above 0 and normally at most 1 (above 1 gives a warning).
    atmosphere : float or str
        Atmospheric pressure a gauge P_out refers to [Pa].

    Returns
    -------
    StepResult
        work_mass = h_out - h_in [J/kg], positive (work into the fluid).

    References
    ----------
    Moran & Shapiro (2006), Fundamentals of Engineering Thermodynamics, 5th ed., sec. 6.12
    (compressor isentropic efficiency (h2s - h1)/(h2 - h1)).
    """
    return _machine(model, inlet, P_out, efficiency, COMPRESSION, atmosphere)


def expand(model, inlet, P_out, efficiency=1.0, *, atmosphere=STANDARD_ATMOSPHERE) -> StepResult:
    """Adiabatic expansion through a turbine or expander with an isentropic efficiency.

    h_out = h_in - efficiency (h_in - h_s): a real expander delivers less work than the
    isentropic one.

    Parameters
    ----------
    model, inlet, P_out, efficiency, atmosphere
        As in :func:`compress`; P_out at most the inlet pressure.

    Returns
    -------
    StepResult
        work_mass = h_out - h_in [J/kg], negative (the machine delivers -work_mass).

    References
    ----------
    Moran & Shapiro (2006), Fundamentals of Engineering Thermodynamics, 5th ed., sec. 6.12
    (turbine isentropic efficiency (h1 - h2)/(h1 - h2s)).
    """
    return _machine(model, inlet, P_out, efficiency, EXPANSION, atmosphere)


def heat_at_constant_volume(model, inlet, *, mass, P=None, T=None, atmosphere=STANDARD_ATMOSPHERE) -> StepResult:
    """A closed rigid vessel heated or cooled to a target pressure or temperature.

    The fill's molar volume stays the inlet's (v_out = v_in; vessel volume V = mass v_in / M),
    and the heat is Q = m (u_out - u_in) (no work at constant volume).

    Parameters
    ----------
    model : CubicModel or IdealGas
    inlet : State
        The fill state, from :func:`thermo_roots.solve` (e.g. ``solve(model, T="20 degC",
        rho_mass=600)``).
    mass : float
        Mass in the vessel [kg], above zero.
    P : float or str, optional
        Target pressure [Pa] (``"100 barg"`` for a relief set pressure).
    T : float or str, optional
        Target temperature [K]. Give exactly one of P and T.
    atmosphere : float or str
        Atmospheric pressure a gauge pressure refers to [Pa].

    Returns
    -------
    StepResult
        heat_mass [J/kg], heat_molar [J/mol] and heat [J] for the vessel, positive when heated.
        The reference's step is its own (v, P) or (v, T) state at the same v.

    References
    ----------
    Smith, Van Ness & Abbott (2005), 7th ed., sec. 2.5 (closed system at constant volume:
    Q = delta U).
    """
    if model.is_mixture:
        raise InputError("heat_at_constant_volume takes a pure fluid today; a closed vessel of a mixture (a (u, v) "
                         "flash) is not built yet. Use throttle, compress or expand for a mixture's flow steps.")
    caller = "heat_at_constant_volume"
    _check_inlet(model, inlet, caller)
    if isinstance(mass, (bool, np.bool_)) or not isinstance(mass, (int, float, np.integer, np.floating)):
        raise TypeError(f"{caller}: mass must be a number of kilograms above zero, e.g. mass=0.3; "
                        f"got {type(mass).__name__} {mass!r:.40}.")
    if not (math.isfinite(mass) and mass > 0.0):
        raise InputError(f"{caller}: mass={mass!r} is not allowed: the fill mass must be a finite number of "
                         "kilograms above zero, e.g. mass=0.3.")
    if (P is None) == (T is None):
        raise InputError(f"{caller}: give exactly one target, P= (e.g. P='100 barg', a relief set pressure) or "
                         "T= (e.g. T='50 degC').")
    if P is not None:
        target = {"P": _pressure(P, "P", caller, atmosphere)}
    else:
        T_si = np.asarray(to_si(T, "T"), dtype=float)
        if not np.all(np.isfinite(T_si)) or not np.all(T_si > 0.0):
            raise InputError(f"{caller}: T must be a finite absolute temperature above zero; got {T!r}. "
                             "Try T='50 degC'.")
        target = {"T": T_si}
    outlet = solve(model, v=inlet.v, **target)
    M = model.fluid.molar_mass
    q = np.asarray(outlet.u, dtype=float) - np.asarray(inlet.u, dtype=float)
    q_mass = q / M
    volume = float(mass) * np.asarray(inlet.v, dtype=float) / M
    ref = reference_vessel_step(model.fluid, inlet, target, float(mass))
    notes = _outlet_warnings(model, outlet, outlet.P)
    if np.any(np.asarray(outlet.T_other) == np.asarray(outlet.T_other)):
        notes.append("A second temperature gives the same pressure at this fill (see outlet.T_other).")
    zero = _scalar_or_array(np.zeros(np.shape(outlet.T)))
    return StepResult(CONSTANT_VOLUME, inlet, outlet, None, 1.0, zero, zero, _scalar_or_array(q),
                      _scalar_or_array(q_mass), _scalar_or_array(q_mass * float(mass)), float(mass),
                      _scalar_or_array(volume), ref, tuple(notes))
