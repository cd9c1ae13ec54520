"""MixturePanel: a composition, a cubic and (T, P) in; the flash's state out — phase, vapour
fraction, each phase's composition, density, h and s — with an optional check against the
reference mixture model.

Also :class:`MixtureModelField`, the model menu with its kᵢⱼ choice that the envelope panel
shares.
"""

from __future__ import annotations

import html

import ipywidgets as w
import numpy as np

from .. import MODELS, solve
from ..errors import InputError, ThermoRootsError
from ..units import check_atmosphere
from ._inputs import UNITS, FieldError, QuantityField, _label, message_html
from ._render import (block, caution_html, error_html, fmt, in_unit, label_rows, side_by_side, table,
                      warnings_html)
from .composition import CompositionField

#: The cubics a mixture can take here, as (menu label, key of :data:`thermo_roots.MODELS`).
MIXTURE_MODELS = (("Peng-Robinson (PR)", "PR"), ("Soave-Redlich-Kwong (SRK)", "SRK"),
                  ("Peng-Robinson 1978 (PR78)", "PR78"))
#: The panel's starting fields: the invented site's LPG flash drum V-640 (a two-phase state).
DEFAULT_COMPOSITION = "ethane 0.05, propane 0.62, isobutane 0.09, n-butane 0.24"
DEFAULT_T, DEFAULT_P = "22 degC", "6.5 bar"
#: What the reference button says about its speed (reference/mixture.py measures 30-500 ms a
#: state, and the first call of a session loads CoolProp's mixture data: a few seconds).
REFERENCE_SLOW_NOTE = "slow: about 0.1-3 s"


class MixtureModelField:
    """The cubic for a mixture: a model menu and a tick box for kᵢⱼ = 0, with a message line.

    Parameters
    ----------
    model : str
        "PR", "SRK" or "PR78".
    kij : "fitted" or None
        "fitted": the shipped table of binary parameters fitted to the reference mixture
        model (pairs it lacks get 0); None: every kᵢⱼ = 0 (the box ticked).
    """

    def __init__(self, model="PR", kij="fitted"):
        keys = [key for _, key in MIXTURE_MODELS]
        if model not in keys:
            raise InputError(f"Unknown model {model!r} for a mixture; choose one of {', '.join(keys)}.")
        if kij not in ("fitted", None, 0, 0.0):
            raise InputError(f"kij={kij!r}: the panel takes kij='fitted' (the shipped table) or kij=None "
                             "(every kᵢⱼ = 0); for kᵢⱼ of your own build the model in Python, "
                             "e.g. tr.PengRobinson(mixture, kij={('methane', 'CO2'): 0.1}).")
        self.short = w.Dropdown(options=list(MIXTURE_MODELS), value=model, layout=w.Layout(width="217px"))
        self.zero_kij = w.Checkbox(value=kij != "fitted", description="kᵢⱼ = 0 (ignore the fitted table)",
                                   indent=False, layout=w.Layout(width="260px"),
                                   tooltip="Unticked: binary parameters fitted to the reference mixture model's "
                                           "bubble pressures, 0 for pairs the table lacks.")
        self.message = w.HTML()
        self.short.add_class("tr-mixture-model")
        self.zero_kij.add_class("tr-zero-kij")
        self.box = w.HBox([_label("Equation of state"), self.short, self.zero_kij, self.message],
                          layout=w.Layout(align_items="center"))

    @property
    def kij(self):
        """What the model is built with: "fitted" or None (every kᵢⱼ = 0)."""
        return None if self.zero_kij.value else "fitted"

    def model(self, mixture):
        """The cubic on ``mixture``; the message beside the field and FieldError if refused."""
        self.message.value = ""
        try:
            return MODELS[self.short.value](mixture, kij=self.kij)
        except ThermoRootsError as err:
            self.message.value = message_html(str(err))
            raise FieldError(str(err)) from None

    def observe(self, handler) -> None:
        self.short.observe(handler, "value")
        self.zero_kij.observe(handler, "value")


def kij_note(model) -> str:
    """One sentence on the binary parameters a mixture model was built with."""
    missing = model.kij_missing
    if not np.any(model.kij):
        return "Binary parameters: every kᵢⱼ = 0" + (" (the fitted table has none of these pairs)." if missing else ".")
    lacking = (" The table lacks " + ", ".join(f"{a}–{b}" for a, b in missing) + ": kᵢⱼ = 0 there."
               if missing else "")
    return "Binary parameters: kᵢⱼ fitted to the reference mixture model's bubble pressures." + lacking


def composition_of(field: CompositionField, pure_panel: str):
    """The field's Mixture of two or more components, or FieldError with the reason (the
    field's own, or that one component is a pure fluid, for ``pure_panel``)."""
    mixture = field.value
    if mixture is None:
        raise FieldError(f"Composition: {field.error or 'not a mixture yet.'}")
    if len(mixture) < 2:
        raise FieldError(f"Composition: one component ({mixture.names[0]}) is a pure fluid, not a mixture; add a "
                         f"second component, or use {pure_panel} for a pure fluid.")
    return mixture


class MixturePanel(w.VBox):
    """A mixture's state at (T, P) by the flash: phase, vapour fraction, each phase's
    composition, volume, density, h and s, and (on request) the reference mixture model.

    Parameters
    ----------
    composition : str, mapping, Mixture or None
        As :class:`CompositionField` takes it: "methane 0.85, ethane 0.08, propane 0.07",
        {"methane": 0.85, ...} (mole fractions [-]) or a Mixture. Default: the invented site's
        LPG flash drum.
    model : str
        "PR", "SRK" or "PR78".
    kij : "fitted" or None
        The shipped fitted kᵢⱼ (default) or every kᵢⱼ = 0.
    T, P : str or float
        Temperature and pressure, text with units ("22 degC", "6.5 bar", "62 barg") or SI
        numbers [K], [Pa].
    tag : str
        Equipment tag shown in the result's heading.
    atmosphere : str or float
        Atmospheric pressure that gauge pressures refer to [Pa or text].

    Attributes
    ----------
    result : MixtureState or None
        The state last shown.
    check : ReferenceMixtureState or None
        The reference mixture model at the same T and P (after :meth:`check_reference`).
    error : str or None
        The message of the last refused input or failed solve; None after a good one.

    References
    ----------
    The state comes from :func:`thermo_roots.solve` on a mixture model (the stability test and
    flash of Michelsen & Mollerup (2007), Thermodynamic Models, 2nd ed., ch. 9-10); each
    phase's h and s from :func:`thermo_roots.properties.caloric` at its own composition; the
    check from :func:`thermo_roots.reference.mixture.reference_mixture_state` (CoolProp's
    multiparameter mixture model, Kunz & Wagner (2012), J. Chem. Eng. Data 57, 3032).
    """

    def __init__(self, composition=DEFAULT_COMPOSITION, model="PR", *, kij="fitted", T=DEFAULT_T, P=DEFAULT_P,
                 tag="", atmosphere="101.325 kPa"):
        self.result = self.check = self.error = None
        self._given = ""
        self.composition = CompositionField(composition)
        self.model_field = MixtureModelField(model, kij)
        self.temperature = QuantityField("T", T)
        self.pressure = QuantityField("P", P)
        self.atmosphere = QuantityField("P", atmosphere, label="Atmosphere", key="atmosphere",
                                        units=[u for u in UNITS["P"] if not u[1].endswith("g")],
                                        reader=check_atmosphere, what="atmosphere")
        self.tag = w.Text(value=tag, placeholder="e.g. V-640", layout=w.Layout(width="120px"))
        self.solve_button = w.Button(description="Solve state", button_style="primary", icon="check")
        self.reference_button = w.Button(description=f"Check against the reference mixture model ({REFERENCE_SLOW_NOTE})",
                                         icon="balance-scale", disabled=True, layout=w.Layout(width="auto"))
        self.status, self.output = w.HTML(), w.HTML()
        self.reference_status, self.reference_output = w.HTML(), w.HTML()
        for widget, name in ((self.solve_button, "tr-solve"), (self.reference_button, "tr-check-reference"),
                             (self.status, "tr-status"), (self.output, "tr-result"), (self.tag, "tr-tag"),
                             (self.reference_status, "tr-reference-status"),
                             (self.reference_output, "tr-reference")):
            widget.add_class(name)
        self.solve_button.on_click(lambda _: self.solve())
        self.reference_button.on_click(lambda _: self.check_reference())
        self.composition.observe(self._composition_edited, "value")
        inputs = w.VBox([
            self.composition, self.model_field.box, self.temperature.box, self.pressure.box, self.atmosphere.box,
            w.HBox([_label("Tag"), self.tag, self.solve_button], layout=w.Layout(align_items="center")),
        ])
        super().__init__([inputs, self.status, self.output,
                          w.HBox([self.reference_button]), self.reference_status, self.reference_output])
        self.add_class("thermo-roots-mixture-panel")
        self._composition_edited()

    # -- actions
    def solve(self):
        """Read the fields, flash the mixture at (T, P) and show the state.

        Returns the :class:`MixtureState`, or None when an input was refused or the flash
        failed (then :attr:`error` holds the message, shown beside the field or above the
        result, and the previous result stays).
        """
        for field in (self.temperature, self.pressure, self.atmosphere):
            field.clear()
        try:
            mixture = composition_of(self.composition, "StatePanel")
            model = self.model_field.model(mixture)
            atmosphere = self.atmosphere.to_si()
            T = self.temperature.to_si()
            P = self.pressure.to_si(atmosphere=atmosphere)
            state = solve(model, T=T, P=P)
            phases = _phase_properties(state)
        except ThermoRootsError as err:
            return self._refuse(str(err))
        self.result, self.check, self.error = state, None, None
        self._given = f"temperature {self.temperature.shown()}, pressure {self.pressure.shown()}"
        self.status.value = ""
        self.output.value = block(self._render(state, phases))
        self.reference_output.value = self.reference_status.value = ""
        self.reference_button.disabled = False
        return state

    def check_reference(self):
        """Run the reference mixture model at the shown state's T and P and show it beside the
        model's values. Slow (a tenth of a second to a few seconds); returns the
        :class:`ReferenceMixtureState`, or None when there is no state to check."""
        from ..reference.mixture import reference_mixture_state

        if self.result is None:
            self.reference_status.value = message_html("Solve a state first; the check runs at its T and P.")
            return None
        state = self.result
        self.reference_button.disabled = True
        self.reference_status.value = ("<span class='tr-busy' style='color:#555'>&#8987; Running the reference "
                                       "mixture model (CoolProp's multiparameter equations) at "
                                       f"{html.escape(_where(state))}: {REFERENCE_SLOW_NOTE}…</span>")
        try:
            check = reference_mixture_state(state.model.components, state.T, state.P)
        finally:
            self.reference_button.disabled = False
        self.check = check
        self.reference_status.value = ""
        self.reference_output.value = block(_reference_html(state, check))
        return check

    def _refuse(self, text: str):
        self.error = text
        self.status.value = error_html(text)
        return None

    def _composition_edited(self, *_):
        """Solving needs a mixture: the button follows the field, and a result shown for another
        composition says so."""
        mixture = self.composition.value
        self.solve_button.disabled = mixture is None
        self.solve_button.tooltip = ("" if mixture is not None
                                     else "Give a composition that sums to 1 first (see the composition field).")
        if self.result is not None and mixture is not None and mixture != self.result.model.components:
            self.status.value = ("<div class='tr-stale' style='color:#8a5a00;margin:4px 0'>The composition was "
                                 "edited: press Solve state for the new mixture; the result below is for the "
                                 "previous one.</div>")

    # -- display
    def _render(self, state, phases) -> str:
        tag = self.tag.value.strip()
        head = (f"<div style='font-size:1.05em;margin:8px 0 4px 0'><b>{html.escape(tag + ': ' if tag else '')}"
                f"{len(state.z)}-component mixture, {html.escape(state.model.name)}</b> — "
                f"{html.escape(str(state.phase))} <span style='color:#555'>(given {html.escape(self._given)})"
                "</span></div>")
        summary = table(label_rows(state.summary()), caption="Mixture state (flash)")
        body = (head + side_by_side(summary, _composition_table(state) + _phase_table(phases))
                + warnings_html(state.warnings)
                + f"<div style='color:#444;font-size:0.9em'>{html.escape(kij_note(state.model))} "
                  f"{html.escape(_convergence(state))}</div>")
        return body + caution_html()


def _where(state) -> str:
    return f"{fmt(in_unit(state.T, 'T', 'degC'), 5)} °C, {fmt(in_unit(state.P, 'P', 'bar'), 5)} bar"


def _convergence(state) -> str:
    return (f"Stability test and flash: {state.status} in {state.iterations} iterations; lowest tangent-plane "
            f"distance {fmt(state.tpd_min, 3)} (negative: the feed splits).")


def _phase_properties(state) -> list[tuple]:
    """(phase name, molar amount, x, v, Z, rho_mass, h_mass, s_mass) of each phase present, h
    and s from properties.caloric at the phase's own composition (NaN with no cp0)."""
    from ..errors import DomainError
    from ..properties import caloric

    masses = state.model.components.molar_masses
    beta = float(state.vapor_fraction)
    rows = []
    for name, v, Z, comp, amount in (("liquid", state.v_liquid, state.Z_liquid, state.x, 1.0 - beta),
                                     ("vapor", state.v_vapor, state.Z_vapor, state.y, beta)):
        if not np.isfinite(v):
            continue
        M = float(np.asarray(comp) @ masses)
        try:
            with np.errstate(over="ignore", invalid="ignore"):    # 1e-300 Pa: an overflow, NaN shown as "-"
                c = caloric(state.model, state.T, v, state.P, x=np.asarray(comp))
            h, s = float(c.h) / M, float(c.s) / M
        except DomainError:                 # a component without ideal-gas heat capacity
            h = s = float("nan")
        rows.append((name, amount, comp, float(v), float(Z), M / float(v), h, s))
    if state.phase == "supercritical" and len(rows) == 1:
        rows[0] = ("single phase",) + rows[0][1:]
    return rows


def _composition_table(state) -> str:
    names = state.model.components.names
    x_shown = np.isfinite(state.v_liquid)
    y_shown = np.isfinite(state.v_vapor)
    rows = [(html.escape(n), fmt(z, 6), fmt(x, 6) if x_shown else "–", fmt(y, 6) if y_shown else "–")
            for n, z, x, y in zip(names, state.z, state.x, state.y)]
    return table(rows, header=("component", "feed z", "liquid x", "vapor y"),
                 caption="Compositions (mole fractions)")


def _phase_table(phases) -> str:
    rows = [(name, fmt(amount, 5), fmt(Z, 5), fmt(v * 1e3, 5), fmt(rho, 5), fmt(h * 1e-3, 5), fmt(s * 1e-3, 5))
            for name, amount, _, v, Z, rho, h, s in phases]
    return table(rows, header=("phase", "mole fraction of feed", "Z", "v [L/mol]", "ρ [kg/m³]", "h [kJ/kg]",
                               "s [kJ/(kg K)]"), caption="Each phase")


def _percent(model, reference) -> str:
    if not (np.isfinite(model) and np.isfinite(reference) and reference != 0):
        return "–"
    return f"{(model - reference) / reference * 100:+.3g} %"


def _difference(model, reference) -> str:
    return "–" if not (np.isfinite(model) and np.isfinite(reference)) else f"{model - reference:+.3g}"


def _reference_html(state, check) -> str:
    """The reference mixture model's values beside the model's."""
    from ..reference import LARGE_DEVIATION_PERCENT, LARGE_DEVIATION_STYLE
    from ..reference.mixture import REFERENCE_MIXTURE_CAUTION

    caution = (f"<div style='font-size:0.85em;color:#555;max-width:60em'>{html.escape(REFERENCE_MIXTURE_CAUTION)}"
               "</div>")
    if not check.available:
        return (table([(html.escape(str(check.reason)),)], caption="Reference mixture model: not available")
                + caution)
    masses = state.model.components.molar_masses
    ref_x, ref_y = np.asarray(check.x, dtype=float), np.asarray(check.y, dtype=float)
    ref_rho_l = float(check.rho_liquid) * float(ref_x @ masses)
    ref_rho_v = float(check.rho_vapor) * float(ref_y @ masses)
    rho_l = float(np.asarray(state.x) @ masses) / float(state.v_liquid)
    rho_v = float(np.asarray(state.y) @ masses) / float(state.v_vapor)
    rows = [("phase", html.escape(str(state.phase)), html.escape(str(check.phase)),
             "same" if state.phase == check.phase else "<b>differs</b>"),
            ("vapor fraction (molar)", fmt(state.vapor_fraction, 5), fmt(check.vapor_fraction, 5),
             _difference(state.vapor_fraction, check.vapor_fraction))]
    marked = set() if state.phase == check.phase else {(0, 3)}
    for label, a, b in (("mass density [kg/m³]", state.rho_mass, check.rho_mass), ("Z", state.Z, check.Z),
                        ("liquid density [kg/m³]", rho_l, ref_rho_l), ("vapor density [kg/m³]", rho_v, ref_rho_v)):
        if np.isfinite(a) and np.isfinite(b) and b != 0 and abs(a - b) / abs(b) * 100 > LARGE_DEVIATION_PERCENT:
            marked.add((len(rows), 3))
        rows.append((label, fmt(a, 5), fmt(b, 5), _percent(a, b)))
    values = table(rows, header=("quantity", "model", "reference", "deviation"),
                   caption="Against the reference mixture model (CoolProp)", marked=marked,
                   marked_style=LARGE_DEVIATION_STYLE)
    comp = [(html.escape(n), fmt(x, 5), fmt(rx, 5), fmt(y, 5), fmt(ry, 5))
            for n, x, rx, y, ry in zip(state.model.components.names, state.x, ref_x, state.y, ref_y)]
    comps = table(comp, header=("component", "x model", "x reference", "y model", "y reference"),
                  caption="Phase compositions")
    note = ("deviation = (model − reference) / reference; the vapor fraction as model − reference. The reference "
            "uses its own binary parameters (GERG-2008 type), not the cubic's kᵢⱼ. In one phase x = y = z. "
            f"Deviations beyond ±{LARGE_DEVIATION_PERCENT:g} %, and a phase that differs, are shaded.")
    return (side_by_side(values, comps) + warnings_html(check.warnings)
            + f"<div class='tr-legend' style='font-size:0.85em;color:#555;max-width:60em'>{html.escape(note)}</div>"
            + caution)
