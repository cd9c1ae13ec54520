"""IsothermExplorer: one temperature, one or more models, a pressure marker; the P-v
isotherm redrawn in place as the controls move."""

from __future__ import annotations

import html
import math

import ipywidgets as w

from .. import MODELS, saturation, solve, to_si
from ..errors import ThermoRootsError
from ._inputs import FluidField, ModelChoice, _label
from ._render import (Debounced, FigureImage, block, caution_html, error_html, fmt, in_unit, table)


class IsothermExplorer(w.VBox):
    """A live pressure-volume isotherm with the dome, the equal-area construction, the roots
    at a chosen pressure and the reference equation's isotherm.

    Parameters
    ----------
    fluid : str or Fluid
    models : sequence of str
        Keys of :data:`thermo_roots.MODELS` to compare.
    T : str or float
        Temperature, text with a unit ("0 degC") or kelvin; the slider runs in kelvin.
    P : str or float
        Pressure at which the roots are marked ("10 bar") or pascal; the slider runs in bar.
    reference : bool
        Draw the reference isotherm.
    delay : float
        Seconds a burst of control changes must settle before the redraw (in a live kernel).

    Attributes
    ----------
    result : tuple of State
        The state of each model at (T, P marker), as drawn.
    error : str or None
    figure : matplotlib.figure.Figure
        The one figure this panel draws into; :attr:`image` is the one widget showing it.

    References
    ----------
    :func:`thermo_roots.plots.plot_isotherm` draws the picture; :func:`thermo_roots.solve`
    gives the roots at the marker.
    """

    def __init__(self, fluid="CO2", models=("PR",), *, T=None, P=None, reference=True, delay=0.2):
        self.result, self.error = (), None
        self.fluid_field = FluidField(fluid)
        self.models = ModelChoice(models)
        self.temperature = w.FloatSlider(description="", min=100.0, max=400.0, step=0.05, readout_format=".2f",
                                         continuous_update=True, layout=w.Layout(width="360px"))
        self.pressure = w.FloatSlider(description="", min=0.01, max=100.0, step=0.01, readout_format=".2f",
                                      continuous_update=True, layout=w.Layout(width="360px"))
        self.show_marker = w.Checkbox(value=True, description="mark the roots at this pressure", indent=False)
        self.reference = w.Checkbox(value=reference, description="reference isotherm", indent=False)
        self.temperature_note, self.fluid_note = w.HTML(), w.HTML()
        self.status, self.roots = w.HTML(), w.HTML()
        self.plot = FigureImage(figsize=(10.5, 5.4))   # the legend sits right of the axes
        self.figure, self.image = self.plot.figure, self.plot.image
        self._fluid, self._quiet = None, True
        self._set_ranges(T, P)
        self._quiet = False
        self._debounced = Debounced(self.update, delay)
        for control in (self.temperature, self.pressure, self.show_marker, self.reference):
            control.observe(self._changed, "value")
        self.models.observe(self._changed)
        self.fluid_field.name.observe(self._fluid_changed, "value")
        controls = w.VBox([
            w.HBox([self.fluid_field.box, self.fluid_note]), self.models.box,
            w.HBox([_label("Temperature [K]"), self.temperature, self.temperature_note],
                   layout=w.Layout(align_items="center")),
            w.HBox([_label("Pressure [bar]"), self.pressure, self.show_marker],
                   layout=w.Layout(align_items="center")),
            w.HBox([_label(""), self.reference]),
        ])
        super().__init__([controls, self.status, self.image, self.roots])
        self.add_class("thermo-roots-isotherm")
        self.update()

    # -- controls
    def _set_ranges(self, T=None, P=None):
        """Slider ranges from the fluid's critical point; values from T, P or a default."""
        try:
            fluid = self.fluid_field.fluid()
        except ThermoRootsError as err:
            self.error = str(err)
            return
        self._fluid = fluid
        # ends on the step grid, so a typed value such as 283.15 K or 30 bar is kept exactly
        step = self.temperature.step
        T_lo, T_hi = math.floor(0.55 * fluid.Tc / step) * step, math.ceil(1.3 * fluid.Tc / step) * step
        P_hi = in_unit(2.0 * fluid.Pc, "P", "bar")
        for slider, lo, hi in ((self.temperature, T_lo, T_hi), (self.pressure, 0.01, P_hi)):
            slider.max = max(hi, slider.min)
            slider.min = lo
            slider.max = hi
        self.temperature.value = to_si(T, "T") if T is not None else 0.9 * fluid.Tc
        if P is None:     # default marker: Peng-Robinson's saturation pressure (Pc above Tc)
            T_now = self.temperature.value
            P = saturation(MODELS["PR"](fluid), T=T_now).P if T_now < fluid.Tc else fluid.Pc
        self.pressure.value = round(in_unit(to_si(P, "P"), "P", "bar"), 2)

    def _changed(self, *_):
        if not self._quiet:
            self._debounced()

    def _fluid_changed(self, *_):
        self._quiet = True          # the new ranges move the sliders: draw once, afterwards
        try:
            self._set_ranges()
        finally:
            self._quiet = False
        self._debounced()

    # -- drawing
    def update(self):
        """Redraw now (the controls call this through a short debounce)."""
        from ..plots import plot_isotherm

        try:
            fluid = self.fluid_field.fluid()
            models = self.models.models(fluid)
            T = float(self.temperature.value)
            P = _bar_to_pa(self.pressure.value)
            marker = P if self.show_marker.value else None
            states = tuple(solve(m, T=T, P=P) for m in models)
            fig = self.plot.clear()
            ax = fig.add_subplot()
            plot_isotherm(models if len(models) > 1 else models[0], T, P_marker=marker,
                          reference=self.reference.value, ax=ax)
        except ThermoRootsError as err:
            self.error = str(err)
            self.status.value = error_html(self.error)
            return None
        self.plot.publish()
        self.result, self.error = states, None
        self.status.value = ""
        self.temperature_note.value = f"{fmt(in_unit(T, 'T', 'degC'), 4)} °C"
        self.roots.value = block(self._roots_html(states, P) + caution_html())
        return states

    solve = update

    def _roots_html(self, states, P) -> str:
        rows = []
        for s in states:
            for r in s.roots:
                rows.append((html.escape(s.model.name), fmt(in_unit(r.v, "v", "L/mol"), 6), fmt(r.Z, 5),
                             r.kind, fmt(r.fugacity_coefficient, 5), "yes" if r.stable else "no"))
        caption = f"Roots at {fmt(in_unit(P, 'P', 'bar'), 5)} bar and {fmt(in_unit(states[0].T, 'T', 'degC'), 5)} °C"
        return table(rows, header=("model", "v [L/mol]", "Z", "kind", "fugacity coeff. φ", "stable?"),
                     caption=caption)


def _bar_to_pa(bar: float) -> float:
    return float(to_si(f"{bar!r} bar", "P"))

