"""AccuracyPanel: where in temperature and pressure each model departs from the reference
equation, computed chunk by chunk with a progress bar and a cancel button."""

from __future__ import annotations

import asyncio
import math

import ipywidgets as w
import numpy as np

from ..errors import ThermoRootsError
from ._inputs import FieldError, FluidField, ModelChoice, QuantityField, _label
from ._render import FigureImage, block, caution_html, error_html, fmt, table

_CHUNKS = 8     # progress steps per map (temperature rows are split into about this many)


class AccuracyPanel(w.VBox):
    """Accuracy map of several models against the reference equation over a (T, P) grid.

    Parameters
    ----------
    fluid : str
        A library fluid (the reference equation is needed).
    models : sequence of str
        Keys of :data:`thermo_roots.MODELS`.
    T : (str, str) or (float, float)
        Temperature range, text with units or kelvin.
    P : (str, str) or (float, float)
        Pressure range, text with units or pascal; the grid is logarithmic in pressure.
    n_T, n_P : int
        Grid points in temperature and in pressure.
    quantity : {"v", "h", "s", "cp", "w"}
        The quantity mapped first (the selector ``quantity`` changes it): molar volume,
        enthalpy, isobaric heat capacity or speed of sound; see
        :data:`thermo_roots.accuracy.MEASURES` for how each deviation is measured.

    Attributes
    ----------
    result : AccuracyMap or None
        The map last shown (after a cancel: the temperature rows finished before it).
    error : str or None
    cancelled : bool
        The last computation was stopped before its end.

    References
    ----------
    :func:`thermo_roots.accuracy.accuracy_map` and :func:`thermo_roots.plots.plot_accuracy_map`.
    """

    def __init__(self, fluid="propane", models=("PR", "SRK"), *, T=("-40 degC", "120 degC"),
                 P=("0.5 bar", "80 bar"), n_T=12, n_P=12, quantity="v"):
        from ..accuracy import MEASURES, measure

        measure(quantity)     # an InputError naming the allowed quantities
        self.result, self.error, self.cancelled = None, None, False
        self._stop = False
        self.fluid_field = FluidField(fluid)
        self.models = ModelChoice(models)
        self.T_from, self.T_to = QuantityField("T", T[0], label="Temperature from"), QuantityField("T", T[1], label="to")
        self.P_from, self.P_to = (QuantityField("P", P[0], label="Pressure from"), QuantityField("P", P[1], label="to"))
        for field in (self.T_to, self.P_to):
            field.label.layout.width = "30px"
        self.n_T = w.BoundedIntText(value=n_T, min=2, max=80, layout=w.Layout(width="70px"))
        self.n_P = w.BoundedIntText(value=n_P, min=2, max=80, layout=w.Layout(width="70px"))
        self.quantity = w.Dropdown(options=[(f"{m.what[:1].upper() + m.what[1:]} (deviation in {m.unit})", q)
                                            for q, m in MEASURES.items()], value=quantity,
                                   layout=w.Layout(width="330px"))
        self.quantity.observe(self._quantity_changed, "value")
        self.compute_button = w.Button(description="Compute map", button_style="primary", icon="th")
        self.cancel_button = w.Button(description="Cancel", icon="stop", disabled=True)
        self.progress = w.IntProgress(value=0, min=0, max=1, description="", layout=w.Layout(width="300px"))
        self.progress_note = w.HTML()
        self.status, self.summary = w.HTML(), w.HTML()
        self.plot = FigureImage(figsize=(11.9, 5.8))   # two maps side by side
        self.compute_button.on_click(lambda _: self._start())
        self.cancel_button.on_click(lambda _: self.cancel())
        controls = w.VBox([
            self.fluid_field.box, self.models.box,
            w.HBox([_label("Compare"), self.quantity], layout=w.Layout(align_items="center")),
            w.HBox([self.T_from.box, self.T_to.box]), w.HBox([self.P_from.box, self.P_to.box]),
            w.HBox([_label("Grid points"), w.HTML("T&nbsp;"), self.n_T, w.HTML("&nbsp;&nbsp;P&nbsp;"), self.n_P],
                   layout=w.Layout(align_items="center")),
            w.HBox([_label(""), self.compute_button, self.cancel_button, self.progress, self.progress_note],
                   layout=w.Layout(align_items="center")),
        ])
        super().__init__([controls, self.status, self.plot.image, self.summary])
        self.add_class("thermo-roots-accuracy")

    # -- actions
    def solve(self):
        """Compute the whole map now (the button runs the same steps without blocking)."""
        steps = self._steps()
        for _ in steps:
            pass
        return self.result

    compute = solve

    async def compute_async(self):
        """Compute chunk by chunk, handing control back between chunks so Cancel is heard."""
        for _ in self._steps():
            await asyncio.sleep(0.01)
        return self.result

    def cancel(self):
        """Stop after the chunk in progress; what is done so far is shown."""
        self._stop = True

    def _start(self):
        try:
            loop = asyncio.get_running_loop()
        except RuntimeError:
            self.solve()
            return
        loop.create_task(self.compute_async())

    def _steps(self):
        """The computation as a generator: one yield after each chunk of temperature rows."""
        from ..accuracy import AccuracyMap, accuracy_map

        self._stop = False
        try:
            fluid = self.fluid_field.fluid()
            models = self.models.models(fluid)
            T_lo, T_hi = self.T_from.to_si(), self.T_to.to_si()
            P_lo, P_hi = self.P_from.to_si(), self.P_to.to_si()
            if not (T_hi > T_lo and P_hi > P_lo):
                raise FieldError("Each range needs its upper end above its lower end.")
            Ts = np.linspace(T_lo, T_hi, int(self.n_T.value))
            Ps = np.geomspace(P_lo, P_hi, int(self.n_P.value))
            chunks = np.array_split(Ts, min(_CHUNKS, len(Ts)))
        except ThermoRootsError as err:
            self._fail(str(err))
            return
        self.compute_button.disabled, self.cancel_button.disabled = True, False
        self.progress.max, self.progress.value = len(chunks), 0
        self.progress_note.value = ""
        parts = []
        try:
            for rows in chunks:
                if self._stop:
                    break
                parts.append(accuracy_map(fluid, models, T=rows, P=Ps, quantity=self.quantity.value,
                                          progress=False))
                self.progress.value += 1
                self.progress_note.value = f"{self.progress.value} of {len(chunks)}"
                yield
        except ThermoRootsError as err:
            self._fail(str(err))
            return
        finally:
            self.compute_button.disabled, self.cancel_button.disabled = False, True
        self.cancelled = len(parts) < len(chunks)
        if not parts:
            self._fail("Cancelled before the first chunk finished; the previous map is kept.")
            return
        self.result, self.error = AccuracyMap.combine(parts), None
        self.status.value = ("<div style='color:#8a5a00'>Cancelled: the map shows the temperature rows "
                             "finished before the cancel.</div>" if self.cancelled else "")
        self.progress_note.value += " (cancelled)" if self.cancelled else " done"
        self._draw()

    def _quantity_changed(self, change):
        if self.result is not None and self.result.quantity != change.new:
            self.status.value = ("<div style='color:#8a5a00'>The map below shows another quantity; press "
                                 "Compute map for this one.</div>")

    def _fail(self, text):
        self.error = text
        self.status.value = error_html(text)

    # -- display
    def _draw(self):
        from ..plots import plot_accuracy_maps

        amap = self.result
        fig = self.plot.clear()
        cols = min(2, len(amap.models))           # side by side, on one colour scale
        rows = -(-len(amap.models) // cols)
        fig.set_size_inches(5.3 * cols + 1.3, 4.9 * rows + 0.9)
        plot_accuracy_maps(amap, figure=fig, ncols=cols)
        self.plot.publish()
        summary, how = amap.summary, amap.measure
        unit = how.unit
        rows = [(str(r.model), str(r.region), str(r.points), str(r.phase_disagreements),
                 fmt(r.mean_abs_deviation, 3), fmt(r.max_abs_deviation, 3), _share(r.percent_within_1),
                 _share(r.percent_within_5)) for r in summary.itertuples()]
        best = amap.best_by_region()
        best_rows = [(str(region), str(r.model), fmt(r.mean_abs_deviation, 3)) for region, r in best.iterrows()]
        what = how.what[:1].upper() + how.what[1:]
        measured = ("100 (model − reference) / reference" if how.relative else
                    f"model − reference per kilogram (the zero of {how.what} is a convention, so a percentage "
                    "of it would mean nothing)")
        self.summary.value = block(
            table(rows, header=("model", "region", "points", "wrong phase", f"mean |dev| [{unit}]",
                                f"max |dev| [{unit}]", f"within 1 {unit}", f"within 5 {unit}"),
                  caption=f"{what} against the reference equation, {amap.fluid.name}; deviation = {measured}")
            + table(best_rows, header=("region", "closest model", f"mean |dev| [{unit}]"),
                    caption="Closest by region")
            + caution_html())


def _share(x) -> str:
    return "-" if not math.isfinite(x) else f"{x:.0f} %"
