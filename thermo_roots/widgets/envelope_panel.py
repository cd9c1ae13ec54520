"""EnvelopePanel: a composition and a cubic in; the phase envelope out — drawn, with its
critical point, cricondenbar and cricondentherm in words, optional quality lines, the
reference mixture model's bubble and dew points, and an operating point placed by the flash.

The drawing is :func:`thermo_roots.plots.plot_phase_envelope`, with the reference points the
panel fetched and the operating point added (:func:`_draw_envelope`).
"""

from __future__ import annotations

import html
import re

import ipywidgets as w
import numpy as np

from .. import solve
from ..errors import InputError, ThermoRootsError
from ._inputs import FieldError, QuantityField, _label, message_html
from ._render import FigureImage, block, caution_html, error_html, fmt, in_unit, label_rows, table, warnings_html
from .composition import CompositionField
from .mixture_panel import MixtureModelField, composition_of, kij_note

#: The starting composition: the invented site's fuel gas at PCV-610 (made up, not an analysis).
DEFAULT_COMPOSITION = ("methane 0.882, ethane 0.061, propane 0.023, n-butane 0.009, isobutane 0.005, "
                       "nitrogen 0.012, CO2 0.008")
#: Pressures at which the reference's bubble and dew points are asked for (each side).
REFERENCE_POINTS = 10
#: The top of that pressure range, as a fraction of the cricondenbar's pressure: CoolProp's
#: saturation solver fails more often the nearer it gets (reference/mixture.py).
REFERENCE_TOP = 0.97
REFERENCE_SLOW_NOTE = "slow: about 1-10 s"


class EnvelopePanel(w.VBox):
    """A mixture's phase envelope from a cubic, with an operating point placed on it.

    Parameters
    ----------
    composition : str, mapping, Mixture or None
        As :class:`CompositionField` takes it (mole fractions [-]). Default: the invented
        site's fuel gas.
    model : str
        "PR", "SRK" or "PR78".
    kij : "fitted" or None
        The shipped fitted kᵢⱼ (default) or every kᵢⱼ = 0.
    qualities : str or sequence of float
        Vapor fractions β [-] of the quality lines to trace ("0.25, 0.5, 0.75"); "" for none.
    reference : bool
        Overlay the reference mixture model's bubble and dew points (slow).
    T, P : str or float, optional
        An operating point to mark ("8 degC", "62 barg"; or [K], [Pa]). Both or neither.
    P_start : str or float
        The lowest pressure of the trace [Pa or text].
    tag : str
        Equipment tag shown in the heading.

    Attributes
    ----------
    result : PhaseEnvelope or None
        The envelope last drawn.
    operating : MixtureState or None
        The flash at the operating point (None when no point is marked).
    reference : dict or None
        {"bubble": ReferenceMixtureState, "dew": ReferenceMixtureState} of the overlay.
    error : str or None
    figure : matplotlib.figure.Figure
        The one figure this panel draws into; :attr:`image` is the one widget showing it.

    References
    ----------
    :func:`thermo_roots.equilibrium.envelope.phase_envelope` traces the envelope (Michelsen
    (1980), Fluid Phase Equilib. 4, 1-10); :func:`thermo_roots.solve` flashes the operating
    point; :mod:`thermo_roots.reference.mixture` gives the reference (Kunz & Wagner (2012),
    J. Chem. Eng. Data 57, 3032).
    """

    def __init__(self, composition=DEFAULT_COMPOSITION, model="PR", *, kij="fitted", qualities="",
                 reference=False, T=None, P=None, P_start="1 bar", tag=""):
        if (T is None) != (P is None):
            raise InputError("EnvelopePanel: give the operating point's T and P together, e.g. T='8 degC', "
                             "P='62 barg', or neither.")
        self.result = self.operating = self.reference = self.error = None
        self.composition = CompositionField(composition)
        self.model_field = MixtureModelField(model, kij)
        self.qualities = w.Text(value=_qualities_text(qualities), placeholder="e.g. 0.25, 0.5, 0.75",
                                layout=w.Layout(width="217px"), continuous_update=False)
        self.qualities_message = w.HTML()
        self.P_start = QuantityField("P", P_start, label="Lowest pressure", key="P-start")
        self.show_point = w.Checkbox(value=T is not None, description="mark this operating point", indent=False)
        self.temperature = QuantityField("T", "8 degC" if T is None else T, key="T-point")
        self.pressure = QuantityField("P", "62 barg" if P is None else P, key="P-point")
        self.show_reference = w.Checkbox(value=reference, indent=False, layout=w.Layout(width="auto"),
                                         description=f"reference mixture model's bubble and dew points "
                                                     f"({REFERENCE_SLOW_NOTE})")
        self.tag = w.Text(value=tag, placeholder="e.g. PCV-610", layout=w.Layout(width="120px"))
        self.trace_button = w.Button(description="Trace envelope", button_style="primary", icon="line-chart")
        self.progress = w.IntProgress(value=0, min=0, max=2 * REFERENCE_POINTS, description="reference",
                                      layout=w.Layout(display="none"))
        self.status, self.summary, self.point_text = w.HTML(), w.HTML(), w.HTML()
        self.plot = FigureImage(figsize=(8.6, 5.2))
        self.figure, self.image = self.plot.figure, self.plot.image
        for widget, name in ((self.trace_button, "tr-trace"), (self.status, "tr-status"),
                             (self.summary, "tr-envelope-summary"), (self.point_text, "tr-operating-point"),
                             (self.image, "tr-envelope-plot"), (self.qualities, "tr-qualities"),
                             (self.show_point, "tr-show-point"), (self.show_reference, "tr-show-reference"),
                             (self.progress, "tr-reference-progress")):
            widget.add_class(name)
        self.trace_button.on_click(lambda _: self.trace())
        self.composition.observe(self._composition_edited, "value")
        self.show_point.observe(self._show_point_fields, "value")
        self.point_box = w.VBox([self.temperature.box, self.pressure.box], layout=w.Layout(margin="0 0 0 20px"))
        inputs = w.VBox([
            self.composition, self.model_field.box,
            w.HBox([_label("Quality lines β"), self.qualities, self.qualities_message],
                   layout=w.Layout(align_items="center")),
            self.P_start.box,
            w.HBox([_label("Operating point"), self.show_point]), self.point_box,
            w.HBox([_label("Reference"), self.show_reference]),
            w.HBox([_label("Tag"), self.tag, self.trace_button, self.progress], layout=w.Layout(align_items="center")),
        ])
        super().__init__([inputs, self.status, self.summary, self.image, self.point_text])
        self.add_class("thermo-roots-envelope-panel")
        self._show_point_fields()
        self._composition_edited()

    # -- inputs
    def _show_point_fields(self, *_):
        self.point_box.layout.display = None if self.show_point.value else "none"

    def _composition_edited(self, *_):
        mixture = self.composition.value
        self.trace_button.disabled = mixture is None
        if self.result is not None and mixture is not None and mixture != self.result.model.components:
            self.status.value = ("<div class='tr-stale' style='color:#8a5a00;margin:4px 0'>The composition was "
                                 "edited: press Trace envelope for the new mixture; the picture below is for the "
                                 "previous one.</div>")

    def _read_qualities(self) -> tuple:
        self.qualities_message.value = ""
        text = self.qualities.value.strip()
        if not text:
            return ()
        values = []
        for part in _quality_parts(text):
            try:
                values.append(float(part))
            except ValueError:
                message = (f"Cannot read the quality {part!r} in {text!r}: write vapor fractions between 0 and 1, "
                           "e.g. 0.25, 0.5, 0.75.")
                self.qualities_message.value = message_html(message)
                raise FieldError(message) from None
        bad = [b for b in values if not 0.0 < b < 1.0]
        if bad:
            message = (f"A quality line needs a vapor fraction strictly between 0 and 1 (0 and 1 are the envelope "
                       f"itself); got {bad[0]:g}. Try e.g. 0.25, 0.5, 0.75.")
            self.qualities_message.value = message_html(message)
            raise FieldError(message)
        return tuple(values)

    # -- actions
    def trace(self):
        """Read the fields, trace the envelope, flash the operating point, draw and describe.

        Returns the :class:`PhaseEnvelope`, or None when an input was refused or the trace
        failed (:attr:`error` says why; the previous picture and text stay).
        """
        from ..equilibrium.envelope import phase_envelope

        for field in (self.P_start, self.temperature, self.pressure):
            field.clear()
        try:
            mixture = composition_of(self.composition, "IsothermExplorer or plots.plot_saturation_curve")
            model = self.model_field.model(mixture)
            qualities = self._read_qualities()
            P_start = self.P_start.to_si()
            point = (self.temperature.to_si(), self.pressure.to_si()) if self.show_point.value else None
            self.status.value = ("<span class='tr-busy' style='color:#555'>&#8987; Tracing the envelope "
                                 f"{'and its quality lines ' if qualities else ''}(a few seconds)…</span>")
            self.trace_button.disabled = True
            try:
                envelope = phase_envelope(model, qualities=qualities, P_start=P_start)
            finally:
                self.trace_button.disabled = False
            operating = solve(model, T=point[0], P=point[1]) if point else None
        except ThermoRootsError as err:
            self.error = str(err)
            self.status.value = error_html(self.error)
            return None
        reference = self._reference(mixture, envelope) if self.show_reference.value else None
        self.result, self.operating, self.reference, self.error = envelope, operating, reference, None
        self.status.value = ""
        fig = self.plot.clear()
        _draw_envelope(fig.add_subplot(), envelope, operating, reference, tag=self.tag.value.strip())
        self.plot.publish()
        self.summary.value = block(self._summary_html(envelope, reference))
        self.point_text.value = block((_operating_html(envelope, operating) if operating is not None else "")
                                      + caution_html())
        return envelope

    solve = trace

    def _reference(self, mixture, envelope) -> dict:
        """The reference's bubble and dew temperatures at pressures from P_start to near the
        cricondenbar, one call a point so the progress bar moves."""
        from ..reference.mixture import reference_bubble_point, reference_dew_point

        top = REFERENCE_TOP * envelope.cricondenbar[1]
        pressures = np.geomspace(float(np.min(envelope.P)), max(top, 1.01 * float(np.min(envelope.P))),
                                 REFERENCE_POINTS)
        self.progress.value, self.progress.layout.display = 0, None
        out = {}
        try:
            for side, fn in (("bubble", reference_bubble_point), ("dew", reference_dew_point)):
                points = []
                for P in pressures:
                    points.append(fn(mixture, P=float(P)))
                    self.progress.value += 1
                out[side] = points
        finally:
            self.progress.layout.display = "none"
        return out

    # -- display
    def _summary_html(self, envelope, reference) -> str:
        tag = self.tag.value.strip()
        model = envelope.model
        head = (f"<div style='font-size:1.05em;margin:8px 0 4px 0'><b>{html.escape(tag + ': ' if tag else '')}"
                f"phase envelope, {model.n_components}-component mixture, {html.escape(model.name)}</b></div>")
        rows = [("Critical point", _point_text(envelope.critical)),
                ("Cricondenbar (highest pressure)", _point_text(envelope.cricondenbar)),
                ("Cricondentherm (highest temperature)", _point_text(envelope.cricondentherm)),
                ("Traced", f"{len(envelope.T)} points from {fmt(in_unit(np.min(envelope.P), 'P', 'bar'), 4)} bar"
                           + ("" if envelope.closed else "; the trace did not close"))]
        if envelope.quality:
            rows.append(("Quality lines (vapor fraction)", ", ".join(f"{b:g}" for b in sorted(envelope.quality))))
        if reference is not None:
            found = sum(bool(r.available) for side in reference.values() for r in side)
            rows.append(("Reference points", f"{found} of {sum(len(s) for s in reference.values())} bubble and dew "
                                             "points available"))
        return (head + table(label_rows(rows), caption="Special points")
                + warnings_html(envelope.warnings)
                + f"<div style='color:#444;font-size:0.9em'>{html.escape(kij_note(model))}</div>")


def _quality_parts(text: str) -> list[str]:
    """The numbers of a list typed as "0.25, 0.5, 0.75", "0.25 0.5" or "0,25; 0,5" (a comma in a
    part without a point is a decimal comma)."""
    parts = []
    for token in re.split(r"[;\s]+", text):
        if "." in token or token.count(",") > 1:
            parts += [t for t in token.split(",") if t]
        elif token:
            parts.append(token.replace(",", "."))
    return parts


def _qualities_text(qualities) -> str:
    if isinstance(qualities, str):
        return qualities
    return ", ".join(f"{float(b):g}" for b in qualities)


def _point_text(point) -> str:
    if point is None:
        return "not reached by the trace"
    T, P = point
    return f"{fmt(in_unit(T, 'T', 'degC'), 5)} °C, {fmt(in_unit(P, 'P', 'bar'), 5)} bar"


def _crossings(envelope, P):
    """(T [K], side) where the traced envelope crosses pressure P, interpolated in ln P."""
    T_env, lnP = np.asarray(envelope.T), np.log(np.asarray(envelope.P))
    target = np.log(P)
    out = []
    for i in range(len(T_env) - 1):
        a, b = lnP[i] - target, lnP[i + 1] - target
        if a == 0.0 or a * b < 0.0:
            t = 0.0 if a == 0.0 else a / (a - b)
            out.append((T_env[i] + t * (T_env[i + 1] - T_env[i]), str(envelope.side[i])))
    return out


def _inside_curve(envelope, T, P) -> bool:
    """Whether (T, P) lies inside the traced curve closed along its lowest pressure."""
    from matplotlib.path import Path

    return bool(Path(np.column_stack([envelope.T, np.log(envelope.P)]), closed=False)
                .contains_point((T, np.log(P))))


def operating_sentence(envelope, state) -> str:
    """Which side of the envelope the flashed state lies on, in words (the flash decides)."""
    T, P = float(state.T), float(state.P)
    where = f"At {fmt(in_unit(T, 'T', 'degC'), 4)} °C and {fmt(in_unit(P, 'P', 'bar'), 4)} bar"
    if state.phase == "two-phase":
        liquid = 1.0 - float(state.vapor_fraction)
        text = (f"{where} the mixture is inside the envelope: two-phase, liquid drops out — "
                f"{fmt(liquid * 100, 3)} % of the feed's moles as liquid (vapor fraction {fmt(state.vapor_fraction, 4)}).")
    else:
        text = f"{where} the mixture is outside the envelope: one phase ({state.phase})."
        T_top, P_top = envelope.cricondentherm[0], envelope.cricondenbar[1]
        crossings = _crossings(envelope, P)
        if T > T_top:
            text += (f" It is {fmt(T - T_top, 3)} K above the cricondentherm ({_point_text(envelope.cricondentherm)}):"
                     " no liquid forms at this temperature at any pressure.")
        elif P > P_top:
            text += (f" Its pressure is above the cricondenbar ({_point_text(envelope.cricondenbar)}): no second "
                     "phase at this pressure at any temperature.")
        elif crossings:
            T_edge, side = min(crossings, key=lambda c: abs(c[0] - T))
            direction = "warmer" if T > T_edge else "colder"
            text += (f" The nearest edge at this pressure is its {side} side at {fmt(in_unit(T_edge, 'T', 'degC'), 4)}"
                     f" °C; the point is {fmt(abs(T - T_edge), 3)} K {direction} than that.")
    if P < float(np.min(envelope.P)):
        text += " The point lies below the trace's lowest pressure, where the curve is not drawn."
    elif _inside_curve(envelope, T, P) != (state.phase == "two-phase"):
        text += (" The traced curve puts the point on the other side: it lies within the curve's resolution of "
                 "the envelope; the flash's answer is the one stated.")
    return text


def _operating_html(envelope, state) -> str:
    return (f"<div class='tr-point-sentence' style='margin:6px 0;max-width:60em'>"
            f"<b>Operating point.</b> {html.escape(operating_sentence(envelope, state))}</div>")


def _draw_envelope(ax, envelope, operating=None, reference=None, tag=""):
    """The envelope by :func:`thermo_roots.plots.plot_phase_envelope`, with the reference points
    this panel fetched (with its progress bar) and the operating point placed by the flash."""
    from ..plots import _deduplicated_legend, plot_phase_envelope

    plot_phase_envelope(envelope, ax=ax)
    if reference:
        for side, marker in (("bubble", "o"), ("dew", "s")):
            pts = [(float(r.T), float(r.P)) for r in reference.get(side, ()) if r.available]
            if pts:
                T_r, P_r = np.array(pts).T
                ax.plot(T_r - 273.15, P_r / 1e5, marker=marker, markerfacecolor="white", markeredgecolor="black",
                        linestyle="none", label=f"reference {side} points (CoolProp mixture model)")
    if operating is not None:
        inside = operating.phase == "two-phase"
        ax.plot(float(operating.T) - 273.15, float(operating.P) / 1e5, marker="*", markersize=15, linestyle="none",
                color="#d98c00" if inside else "#2e7d32", markeredgecolor="black",
                label="operating point: " + ("two-phase" if inside else f"one phase ({operating.phase})"))
    if tag:
        ax.set_title(f"{tag}\n{ax.get_title()}", fontsize=10)
    _deduplicated_legend(ax, loc="upper left", bbox_to_anchor=(1.02, 1.0), borderaxespad=0.0, fontsize=8,
                         frameon=False, wrap=32)
    return ax
