"""ProcessPanel: an inlet state, a kind of step and its target in; the outlet, the duty or
work, the reference equation's own step beside it, and the step on a P-h diagram out."""

from __future__ import annotations

import html
import math

import ipywidgets as w

from .. import solve, steps
from ..errors import ThermoRootsError
from ..units import check_atmosphere, registry, split_value
from ._inputs import (UNITS, FieldError, FluidField, KnownPair, ModelField, QuantityField, _label, _plain_number,
                      message_html)
from ._render import (FigureImage, block, caution_html, error_html, fluid_label, fmt, scroll_box, side_by_side, table,
                      warnings_html)
from .state_panel import PAIRS

#: The kinds of step a person can choose, as (label, key).
STEP_KINDS = (
    ("valve or expansion device (constant enthalpy)", "valve"),
    ("compressor (isentropic efficiency)", "compressor"),
    ("expander or turbine (isentropic efficiency)", "expander"),
    ("closed vessel heated or cooled (constant volume)", "vessel"),
)
_KIND_LABELS = {key: label for label, key in STEP_KINDS}
#: The inlet fields' starting text: saturated vapor at 2 bar (a compressor's suction); for
#: propane with Peng-Robinson, u with the density is a wet fill near -44 °C and 0.95 bar (about
#: refrigerated storage at atmospheric pressure), u with the volume one near -47 °C.
_DEFAULTS = {"T": "20 degC", "P": "2 bar", "v": "0.5 L/mol", "rho": "600 kg/m^3", "quality": "1",
             "h": "550 kJ/kg", "s": "2.4 kJ/(kg K)", "u": "100 kJ/kg"}
#: Units offered for the vessel's fill: (label, pint spelling).
MASS_UNITS = (("kg", "kg"), ("g", "g"), ("lb", "lb"))
VOLUME_UNITS = (("L", "L"), ("m³", "m^3"), ("US gal", "gallon"))
#: A typical isentropic efficiency, named in the messages (common practice: 0.6 to 0.9).
_EFFICIENCY_EXAMPLE = "0.75"


class AmountField:
    """A vessel's fill mass or volume: a number and a unit menu (or a number with its own unit),
    with a message line beside it.

    Parameters
    ----------
    what : str
        How messages name it ("fill mass").
    si : str
        The SI unit it is read into ("kg", "m^3").
    units : sequence of (label, pint spelling)
    """

    def __init__(self, what: str, si: str, units, value="", *, label: str, key: str):
        self.what, self.si = what, si
        self.text = w.Text(value=str(value), layout=w.Layout(width="120px"), continuous_update=False)
        self.unit = w.Dropdown(options=list(units), layout=w.Layout(width="95px"))
        self.message = w.HTML()
        self.box = w.HBox([_label(label), self.text, self.unit, self.message], layout=w.Layout(align_items="center"))
        self.text.add_class(f"tr-value-{key}")
        self.unit.add_class(f"tr-unit-{key}")

    def to_si(self) -> float:
        """The value in SI; the message beside the field and FieldError if it cannot be used."""
        text = self.text.value.strip()
        example = f"0.3 {self.unit.options[0][0]}"
        if not text:
            raise self.fail(f"Enter the {self.what}, e.g. {example}.")
        ureg = registry()
        try:
            number, unit_text = split_value(text, self.what)
            unit = unit_text or self.unit.value
            value = float(ureg.Quantity(number, unit).to(self.si).magnitude)
        except Exception:   # unreadable text, an unknown unit or one of another kind (pint's own errors)
            raise self.fail(f"Cannot read the {self.what} {text!r}: write a number in the unit chosen beside it, "
                            f"or a number and a unit, e.g. {example}.") from None
        if not (math.isfinite(value) and value > 0.0):
            raise self.fail(f"The {self.what} {text!r} must be above zero, e.g. {example}.")
        return value

    def fail(self, text: str) -> FieldError:
        self.message.value = message_html(text)
        return FieldError(text)

    def clear(self) -> None:
        self.message.value = ""


class ProcessPanel(w.VBox):
    """A process step from an inlet state: a valve, a compressor, an expander, or a closed vessel
    heated or cooled; the outlet, the duty or work, and the reference equation's step beside it.

    Parameters
    ----------
    fluid : str or Fluid
        A name in the fluid library ("propane", "CO2", ...), "custom", or a
        :class:`~thermo_roots.Fluid`.
    model : str
        A key of :data:`thermo_roots.MODELS` ("PR", "SRK", ...).
    step : str
        "valve" (constant enthalpy), "compressor", "expander" or "vessel" (constant volume).
    P_out : str or float
        Outlet pressure of a valve, compressor or expander (text with units, gauge allowed,
        or Pa).
    efficiency : float or str
        Isentropic efficiency of a compressor or expander [-], above 0 and at most 1.
    target : {"P", "T"}
        What the vessel is heated or cooled to: a pressure (``P_target``, e.g. a relief set
        pressure) or a temperature (``T_target``).
    P_target, T_target : str or float
        The vessel's target pressure and temperature.
    mass, volume : str or float, optional
        The vessel's fill mass [kg or text] or its volume [m³ or text]; give one (the other
        follows from the inlet's density). Default a mass of 1 kg.
    volume_shift : None or "peneloux"
    atmosphere : str or float
        Atmospheric pressure that gauge pressures refer to [Pa or text].
    tag : str
        Equipment tag shown in the result's heading.
    **knowns
        The inlet: a pair the state panel offers, e.g. ``P="2 bar", quality=1`` (as in
        :class:`StatePanel`).
        Default: saturated vapor at 2 bar.

    Attributes
    ----------
    result : StepResult or None
        The step last shown (from :mod:`thermo_roots.steps`).
    error : str or None
        The message of the last refused input or failed step; None after a good one.
    figure : matplotlib.figure.Figure
        The one figure the P-h diagram is drawn into; :attr:`image` shows it.
    diagram_note : str
        Why no diagram is drawn ("" when it is).

    References
    ----------
    The steps are :func:`thermo_roots.steps.throttle`, ``compress``, ``expand`` and
    ``heat_at_constant_volume``; the diagram is :func:`thermo_roots.plots.plot_pressure_enthalpy`.
    """

    def __init__(self, fluid="propane", model="PR", *, step="compressor", P_out="15 bar", efficiency=0.75,
                 target="P", P_target="100 barg", T_target="50 degC", mass=None, volume=None, volume_shift=None,
                 atmosphere="101.325 kPa", tag="", **knowns):
        self.result = self.error = None
        self.diagram_note = ""
        keys = [k for _, k in STEP_KINDS]
        if step not in keys:
            raise FieldError(f"step={step!r} is not a kind of step here; choose one of {', '.join(keys)}.")
        if target not in ("P", "T"):
            raise FieldError(f"target={target!r}: heat or cool the vessel to a pressure ('P') or a temperature ('T').")
        if mass is not None and volume is not None:
            raise FieldError("Give the vessel's fill mass or its volume, not both: the other follows from the "
                             "inlet's density.")
        self.fluid_field = FluidField(fluid)
        self.model_field = ModelField(model, volume_shift)
        self.inlet = KnownPair(PAIRS, _DEFAULTS, knowns, default=("P", "quality"), label="Inlet knowns")
        self.atmosphere = QuantityField("P", atmosphere, label="Atmosphere", key="atmosphere",
                                        units=[u for u in UNITS["P"] if not u[1].endswith("g")],
                                        reader=check_atmosphere, what="atmosphere")
        self.kind = w.Dropdown(options=list(STEP_KINDS), value=step, layout=w.Layout(width="340px"))
        self.outlet_pressure = QuantityField("P", P_out, label="Outlet pressure", key="P_out",
                                             what="outlet pressure")
        self.efficiency = w.Text(value=str(efficiency), layout=w.Layout(width="120px"), continuous_update=False)
        self.efficiency_message = w.HTML()
        self.target = w.Dropdown(options=[("a pressure", "P"), ("a temperature", "T")], value=target,
                                 layout=w.Layout(width="217px"))
        self.target_pressure = QuantityField("P", P_target, label="Target pressure", key="P_target",
                                             what="target pressure")
        self.target_temperature = QuantityField("T", T_target, label="Target temperature", key="T_target",
                                                what="target temperature")
        self.fill = w.Dropdown(options=[("its mass", "mass"), ("its volume", "volume")],
                               value="volume" if volume is not None else "mass", layout=w.Layout(width="217px"))
        self.mass = AmountField("fill mass", "kg", MASS_UNITS, "1" if mass is None else _amount_text(mass, "kg"),
                                label="Fill mass", key="mass")
        self.volume = AmountField("vessel volume", "m^3", VOLUME_UNITS,
                                  "10" if volume is None else _amount_text(volume, "m^3", "L", 1e3),
                                  label="Vessel volume", key="volume")
        self.tag = w.Text(value=tag, placeholder="e.g. K-101", layout=w.Layout(width="120px"))
        self.solve_button = w.Button(description="Run step", button_style="primary", icon="play")
        self.status, self.output, self.diagram = w.HTML(), w.HTML(), w.HTML()
        self.plot = FigureImage(figsize=(10.5, 7.6))
        self.figure, self.image = self.plot.figure, self.plot.image
        self.image.layout.display = "none"        # until a step is drawn
        for widget, name in ((self.solve_button, "tr-run"), (self.output, "tr-result"), (self.status, "tr-status"),
                             (self.kind, "tr-step"), (self.efficiency, "tr-efficiency"), (self.tag, "tr-tag"),
                             (self.image, "tr-diagram"), (self.diagram, "tr-diagram-note"),
                             (self.target, "tr-target"), (self.fill, "tr-fill")):
            widget.add_class(name)
        self.flow_box = w.VBox([self.outlet_pressure.box])
        self.efficiency_box = w.HBox([_label("Isentropic efficiency"), self.efficiency,
                                      w.HTML("<span style='color:#555;font-size:0.9em'>&nbsp;above 0, at most 1, "
                                             "or a percentage (typical machines 0.6 to 0.9)</span>"),
                                      self.efficiency_message], layout=w.Layout(align_items="center"))
        self.vessel_box = w.VBox([
            w.HBox([_label("Heat or cool to"), self.target], layout=w.Layout(align_items="center")),
            self.target_pressure.box, self.target_temperature.box,
            w.HBox([_label("Vessel given by"), self.fill], layout=w.Layout(align_items="center")),
            self.mass.box, self.volume.box])
        for control in (self.kind, self.target, self.fill):
            control.observe(self._show_fields, "value")
        self._show_fields()
        self.solve_button.on_click(lambda _: self.solve())
        inputs = w.VBox([
            self.fluid_field.box, self.model_field.box, self.inlet.box, self.atmosphere.box,
            w.HBox([_label("Step"), self.kind], layout=w.Layout(align_items="center")),
            self.flow_box, self.efficiency_box, self.vessel_box,
            w.HBox([_label("Tag"), self.tag, self.solve_button], layout=w.Layout(align_items="center")),
        ])
        super().__init__([inputs, self.status, self.output, self.diagram, self.image])
        self.add_class("thermo-roots-process-panel")

    # -- inputs
    def _show_fields(self, *_):
        kind = self.kind.value

        def shown(widget, on):
            widget.layout.display = None if on else "none"

        shown(self.flow_box, kind != "vessel")
        shown(self.efficiency_box, kind in ("compressor", "expander"))
        shown(self.vessel_box, kind == "vessel")
        shown(self.target_pressure.box, self.target.value == "P")
        shown(self.target_temperature.box, self.target.value == "T")
        shown(self.mass.box, self.fill.value == "mass")
        shown(self.volume.box, self.fill.value == "volume")

    def _read_efficiency(self) -> float:
        """The isentropic efficiency typed: a fraction ("0.75", "0,75") or a percentage ("75 %")."""
        text = self.efficiency.value.strip()
        percent = text.endswith("%")
        number = text[:-1].strip() if percent else text
        try:
            eta = _plain_number(number, "isentropic efficiency", _EFFICIENCY_EXAMPLE) if number else math.nan
        except ThermoRootsError:
            eta = None
        if eta is None or not math.isfinite(eta):
            raise self._efficiency_fail(f"Cannot read the isentropic efficiency {text!r}: write a plain number above "
                                        f"0 and at most 1, e.g. {_EFFICIENCY_EXAMPLE} (or a percentage, 75 %).")
        if percent:
            eta /= 100.0
        if not 0.0 < eta <= 1.0:
            hint = f" For {text} % write {text} % or {eta / 100:g}." if (not percent and 1.0 < eta <= 100.0) else ""
            raise self._efficiency_fail(f"An isentropic efficiency of {text} is not possible: it is above 0 and at "
                                        f"most 1 (1 is the ideal machine; typical machines 0.6 to 0.9), e.g. "
                                        f"{_EFFICIENCY_EXAMPLE}.{hint}")
        return eta

    def _efficiency_fail(self, text: str) -> FieldError:
        self.efficiency_message.value = message_html(text)
        return FieldError(text)

    def _clear(self):
        self.inlet.clear()
        for field in (self.atmosphere, self.outlet_pressure, self.target_pressure, self.target_temperature,
                      self.mass, self.volume):
            field.clear()
        self.efficiency_message.value = ""

    # -- the action
    def solve(self):
        """Read the fields, run the step (and the reference's step), show it and draw it.

        Returns the :class:`~thermo_roots.steps.StepResult`, or None when an input was refused
        (then :attr:`error` holds the message, shown beside its field, and the previous result
        stays on screen).
        """
        self._clear()
        P_out = None
        try:
            fluid = self.fluid_field.fluid()
            if fluid.ideal_gas is None:
                raise self._no_heat_capacity(fluid)
            model = self.model_field.model(fluid)
            atmosphere = self.atmosphere.to_si()
            knowns = self.inlet.to_si(molar_mass=fluid.molar_mass, atmosphere=atmosphere)
            kind = self.kind.value
            if kind == "vessel":
                target = ({"P": self.target_pressure.to_si(atmosphere=atmosphere)} if self.target.value == "P"
                          else {"T": self.target_temperature.to_si()})
                amount = self.mass.to_si() if self.fill.value == "mass" else self.volume.to_si()
            else:
                P_out = self.outlet_pressure.to_si(atmosphere=atmosphere)
                eta = self._read_efficiency() if kind in ("compressor", "expander") else 1.0
            try:
                inlet = solve(model, **knowns)
            except ThermoRootsError as err:
                raise self.inlet.blame(str(err)) from None
            try:
                if kind == "vessel":
                    mass = amount if self.fill.value == "mass" else amount * fluid.molar_mass / float(inlet.v)
                    result = steps.heat_at_constant_volume(model, inlet, mass=mass, **target)
                elif kind == "valve":
                    result = steps.throttle(model, inlet, P_out)
                else:
                    machine = steps.compress if kind == "compressor" else steps.expand
                    result = machine(model, inlet, P_out, efficiency=eta)
            except ThermoRootsError as err:
                raise self._step_refused(str(err), inlet, kind, P_out) from None
        except ThermoRootsError as err:
            self.error = str(err)
            self.status.value = error_html(self.error)
            return None
        self.result, self.error = result, None
        self.status.value = ""
        self.output.value = block(self._render(result))
        self._draw(result)
        return result

    def _no_heat_capacity(self, fluid) -> FieldError:
        text = (f"{fluid.name} has no ideal-gas heat capacity, so its enthalpy and entropy are unknown and no "
                "step can be balanced: enter cp0 in the custom fluid's fields (a constant, or a b c d e of "
                "a + bT + cT² + dT³ + eT⁴ in J/(mol K)), or choose a library fluid.")
        self.fluid_field.cp0_message.value = message_html(text)
        return FieldError(text)

    def _step_refused(self, text, inlet, kind, P_out) -> FieldError:
        """A step the library refused, said beside the field it is about, in the panel's words."""
        if kind != "vessel" and P_out is not None:
            rise = P_out > float(inlet.P)
            typed = self.outlet_pressure.shown()
            shown = typed if typed.endswith(" bar") else f"{typed} ({fmt(P_out / 1e5, 5)} bar)"
            inlet_bar = f"{fmt(float(inlet.P) / 1e5, 5)} bar"
            if kind in ("valve", "expander") and rise:
                what = "a valve or regulator" if kind == "valve" else "an expander or turbine"
                return self.outlet_pressure.fail(f"The outlet pressure {shown} is above the inlet pressure "
                                                 f"{inlet_bar}: {what} only lowers the pressure. For a rise "
                                                 "choose the compressor.")
            if kind == "compressor" and not rise:
                return self.outlet_pressure.fail(f"The outlet pressure {shown} is below the inlet pressure "
                                                 f"{inlet_bar}: a compressor raises the pressure. For a drop "
                                                 "choose the valve or the expander.")
        field = {"P": self.target_pressure, "T": self.target_temperature}[self.target.value] \
            if kind == "vessel" else self.outlet_pressure
        return field.fail(text)

    # -- display
    def _render(self, step) -> str:
        from ..reference import LARGE_DEVIATION_K, LARGE_DEVIATION_LEGEND, LARGE_DEVIATION_PERCENT, \
            LARGE_DEVIATION_STYLE

        model = step.inlet.model
        tag = self.tag.value.strip()
        kind = self.kind.value
        if kind == "vessel":
            to = (f"to {self.target_pressure.shown()}" if self.target.value == "P"
                  else f"to {self.target_temperature.shown()}")
        else:
            to = f"to {self.outlet_pressure.shown()}"
            if kind != "valve":
                to += f", isentropic efficiency {step.efficiency:g}"
        head = (f"<div style='font-size:1.05em;margin:8px 0 4px 0'><b>{html.escape(tag + ': ' if tag else '')}"
                f"{html.escape(_KIND_LABELS[kind].split(' (')[0].capitalize())}, "
                f"{html.escape(fluid_label(model.fluid))}, {html.escape(model.name)}</b> "
                f"<span style='color:#555'>(inlet {html.escape(self.inlet.given())}; "
                f"{html.escape(to)})</span></div>")
        vessel = ""
        if kind == "vessel":
            vessel = ("<div class='tr-vessel-caution' style='border:2px solid #8a1c1c;padding:4px 8px;margin:4px 0;"
                      f"font-weight:bold'>{html.escape(steps.VESSEL_CAUTION)}</div>")
        states = table([tuple(html.escape(c) for c in row) for row in step.rows()],
                       header=("", "inlet", "outlet", "reference inlet", "reference outlet"),
                       caption="Inlet and outlet, model and reference equation (CoolProp)", nowrap=True)
        rows, marked = _energy_rows(step, LARGE_DEVIATION_PERCENT, LARGE_DEVIATION_K)
        energy = table(rows, header=("", "model", "reference", "model − reference"),
                       caption="Duty and outlet against the reference", nowrap=True, marked=marked,
                       marked_style=LARGE_DEVIATION_STYLE)
        legend = (f"<div class='tr-legend' style='font-size:0.85em;color:#555;margin:-4px 0 6px 0;max-width:60em'>"
                  f"Work and heat count positive into the fluid. {html.escape(LARGE_DEVIATION_LEGEND)}</div>")
        ref = step.reference
        missing = ""
        if not bool(ref.available):
            missing = (f"<div class='tr-reference-missing' style='margin:4px 0;max-width:60em'><b>Reference step "
                       f"unavailable.</b> {html.escape(str(ref.reason).removeprefix('unavailable: '))}</div>")
        notes = ""
        if step.warnings:
            # the step's own sentences (solid forming, liquid in a compressor) before the states' notes
            of_states = set(step.inlet.warnings) | set(step.outlet.warnings)
            ordered = ([t for t in step.warnings if t not in of_states]
                       + [t for t in step.warnings if t in of_states])
            notes = warnings_html(ordered)
        return (head + vessel + scroll_box(side_by_side(states, energy)) + legend + missing + notes
                + caution_html())

    def _draw(self, step) -> None:
        """The step on the model's P-h diagram, the reference's step beside it, in the one figure."""
        from ..plots import plot_pressure_enthalpy

        model = step.inlet.model
        if not model.has_saturation:
            self.diagram_note = (f"No pressure–enthalpy diagram for the {model.name}: it has no saturation dome "
                                 "to draw the step against. The numbers above are the whole result.")
        else:
            try:
                fig = self.plot.clear()
                plot_pressure_enthalpy(model, ax=fig.add_subplot(), step=step)
            except ValueError as err:     # the library's refusals (ThermoRootsError) and matplotlib's
                self.diagram_note = f"The pressure–enthalpy diagram could not be drawn: {err}"
            else:
                self.plot.publish()
                self.diagram_note = ""
        self.diagram.value = (f"<div style='color:#555;margin:4px 0'>{html.escape(self.diagram_note)}</div>"
                              if self.diagram_note else "")
        self.image.layout.display = "none" if self.diagram_note else None


def _energy_rows(step, percent, kelvin):
    """(rows, marked cells) of the duty table: work or heat, outlet temperature and quality,
    model beside reference, the difference marked where beyond the thresholds."""
    ref = step.reference
    rows, marked = [], set()

    def add(label, model, reference, difference, unit, large):
        if large:
            marked.add((len(rows), 3))
        rows.append((html.escape(label), fmt(model), fmt(reference),
                     "-" if not _finite(difference) else html.escape(f"{difference:+.3g} {unit}".rstrip())))

    if step.kind in (steps.COMPRESSION, steps.EXPANSION):
        dev = step.deviation_work_percent
        add("Work into the fluid [kJ/kg]", step.work_mass / 1e3, _float(ref.work_mass) / 1e3, dev, "%",
            _finite(dev) and abs(dev) > percent)
        T_s, T_s_ref = float(step.isentropic_outlet.T), _ref_T(ref.isentropic_outlet)
        add("Isentropic outlet temperature [°C]", T_s - 273.15, T_s_ref - 273.15, T_s - T_s_ref, "K",
            _finite(T_s - T_s_ref) and abs(T_s - T_s_ref) > kelvin)
    elif step.kind == steps.CONSTANT_VOLUME:
        dev = step.deviation_heat_percent
        add("Heat into the fluid [kJ/kg]", step.heat_mass / 1e3, _float(ref.heat_mass) / 1e3, dev, "%",
            _finite(dev) and abs(dev) > percent)
        add("Heat into the vessel [kJ]", step.heat / 1e3, _float(ref.heat) / 1e3, dev, "%",
            _finite(dev) and abs(dev) > percent)
        rows.append(("Fill mass [kg]", fmt(step.mass), "-", "-"))
        rows.append(("Vessel volume [L]", fmt(float(step.volume) * 1e3), "-", "-"))
    else:
        rows.append(("Work and heat [kJ/kg]", "0 (h kept)", "0 (h kept)", "-"))
    dT = step.deviation_T_K
    add("Outlet temperature [°C]", float(step.outlet.T) - 273.15, _ref_T(ref.outlet) - 273.15, dT, "K",
        _finite(dT) and abs(dT) > kelvin)
    add("Outlet vapor quality [-]", float(step.outlet.quality), _ref_quality(ref.outlet), step.deviation_quality,
        "", False)
    return rows, marked


def _float(x) -> float:
    try:
        return float(x)
    except (TypeError, ValueError):
        return math.nan


def _finite(x) -> bool:
    return math.isfinite(_float(x))


def _ref_T(state) -> float:
    return math.nan if state is None else _float(state.T)


def _ref_quality(state) -> float:
    return math.nan if state is None else _float(state.quality)


def _amount_text(value, si, shown=None, scale=1.0) -> str:
    """A mass or volume given from Python: text as it is, a number (SI) in ``shown`` units."""
    if isinstance(value, str):
        return value
    return f"{float(value) * scale:g} {shown or si}"
