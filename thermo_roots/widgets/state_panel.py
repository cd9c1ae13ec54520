"""StatePanel: two knowns in, one state point out, with every root and a reference check."""

from __future__ import annotations

import html

import ipywidgets as w

from .. import solve
from ..errors import ThermoRootsError
from ..units import check_atmosphere
from ._inputs import UNITS, FluidField, KnownPair, ModelField, QuantityField
from ._render import (block, caution_html, convergence_text, csv_link, error_html, fluid_label, fmt, in_unit,
                      label_rows, scroll_box, side_by_side, table, warnings_html)

#: The pairs of knowns a person can choose, as (label, (first, second)).
PAIRS = (
    ("temperature and pressure", ("T", "P")),
    ("temperature and volume", ("T", "v")),
    ("pressure and volume", ("P", "v")),
    ("temperature and density", ("T", "rho")),
    ("pressure and density", ("P", "rho")),
    ("temperature and vapor quality", ("T", "quality")),
    ("pressure and vapor quality", ("P", "quality")),
    ("pressure and enthalpy", ("P", "h")),
    ("pressure and entropy", ("P", "s")),
    ("temperature and enthalpy", ("T", "h")),
    ("temperature and entropy", ("T", "s")),
    ("enthalpy and entropy", ("h", "s")),
    ("internal energy and volume", ("u", "v")),
    ("internal energy and density", ("u", "rho")),
)
#: Each field's starting text. Every pair of them is a state of propane with Peng-Robinson (the
#: panel's default) on its default reference state: (P, h) and (P, s) a vapor just above
#: saturation at 8 bar, (T, h) a vapor at 5.4 bar (a second, liquid one at about 3200 bar has the
#: same h), (u, v) a wet vessel at about 19 °C, (u, rho) a liquid at about 41 °C and 52 bar.
_DEFAULTS = {"T": "20 degC", "P": "8 bar", "v": "0.5 L/mol", "rho": "500 kg/m^3", "quality": "0.5",
             "h": "610 kJ/kg", "s": "2.4 kJ/(kg K)", "u": "300 kJ/kg"}
#: Significant digits shown per column of the collected table (the DataFrame keeps them all).
_DIGITS = {"rho deviation [%]": 3}
#: Columns of the collected table, in order.
TABLE_COLUMNS = ("tag", "fluid", "model", "given", "phase", "T [°C]", "P [bar]", "v [L/mol]",
                 "rho [kg/m³]", "Z [-]", "quality [-]", "P_sat [bar]", "reference rho [kg/m³]",
                 "rho deviation [%]", "reference phase")


class StatePanel(w.VBox):
    """Solve one state point from two knowns and show its roots and reference cross-check.

    Parameters
    ----------
    fluid : str or Fluid
        A name in the fluid library (any alias, e.g. "propane", "R-744"), "custom", or a
        :class:`~thermo_roots.Fluid`.
    model : str
        A key of :data:`thermo_roots.MODELS` ("IG", "vdW", "RK", "SRK", "PR", "PR78").
    volume_shift : None or "peneloux"
        Tick the Peneloux volume translation.
    tag : str
        Equipment tag or note stored with each point added to the table.
    atmosphere : str or float
        Atmospheric pressure that gauge pressures (barg, psig, kPag) refer to [Pa or text].
    **knowns
        Two knowns of a pair in :data:`PAIRS` (T, P, v, rho, rho_mass, quality, h, s, u), as text
        with units ("20 degC", "7 barg", "0.5 L/mol", "400 kg/m^3", "610 kJ/kg", "25 kJ/mol",
        "2.4 kJ/(kg K)") or SI numbers (an energy in SI is molar: J/mol, J/(mol K)). They
        choose the pair shown; the unit of an energy, per kilogram or per mole, decides its basis.

    Attributes
    ----------
    result : State or None
        The state last shown.
    check : CrossCheck or None
        Its reference cross-check.
    error : str or None
        The message of the last failed solve, None after a good one.
    table : pandas.DataFrame
        The points added with :meth:`add_to_table`.

    References
    ----------
    The state and its roots come from :func:`thermo_roots.solve`; the check from
    :func:`thermo_roots.reference.cross_check`.
    """

    def __init__(self, fluid="propane", model="PR", *, volume_shift=None, tag="",
                 atmosphere="101.325 kPa", **knowns):
        self.result = self.check = self.error = None
        self._given = ""
        self._rows = []          # (tag, given text, State, CrossCheck) of each added point
        self.fluid_field = FluidField(fluid)
        self.model_field = ModelField(model, volume_shift)
        self.inlet = KnownPair(PAIRS, _DEFAULTS, knowns)
        # the pieces of the pair, under the names the tests and notebooks use
        self.pair, self.fields, self.pair_message = self.inlet.pair, self.inlet.fields, self.inlet.message
        self.atmosphere = QuantityField("P", atmosphere, label="Atmosphere", key="atmosphere",
                                        units=[u for u in UNITS["P"] if not u[1].endswith("g")],
                                        reader=check_atmosphere, what="atmosphere")
        self.tag = w.Text(value=tag, placeholder="e.g. V-212", layout=w.Layout(width="120px"))
        self.solve_button = w.Button(description="Solve state", button_style="primary", icon="check")
        self.add_button = w.Button(description="Add to table", icon="plus")
        self.status = w.HTML()
        self.output = w.HTML()
        # the collected table scrolls inside the panel's width rather than running past it
        self.table_html = w.HTML(layout=w.Layout(overflow="auto", max_width="100%"))
        self.download = w.HTML()
        for widget, name in ((self.solve_button, "tr-solve"), (self.add_button, "tr-add"),
                             (self.output, "tr-result"), (self.status, "tr-status"),
                             (self.table_html, "tr-table"), (self.tag, "tr-tag")):
            widget.add_class(name)
        self.solve_button.on_click(lambda _: self.solve())
        self.add_button.on_click(lambda _: self.add_to_table())
        inputs = w.VBox([
            self.fluid_field.box, self.model_field.box,
            self.inlet.box, self.atmosphere.box,
            w.HBox([w.HTML("<b>Tag</b>", layout=w.Layout(width="150px")), self.tag,
                    self.solve_button, self.add_button], layout=w.Layout(align_items="center")),
        ])
        super().__init__([inputs, self.status, self.output, self.table_html, self.download])
        self.add_class("thermo-roots-state-panel")

    # -- inputs
    @property
    def knowns(self) -> dict:
        """The two knowns as entered, e.g. {"T": "20 degC", "P": "7 barg"}."""
        return self.inlet.knowns

    # -- actions
    def solve(self):
        """Read the fields, solve the state and its cross-check, and show them.

        Returns the :class:`State`, or None when an input was refused (then :attr:`error`
        holds the message, shown beside the field, and the previous result stays).
        """
        from ..reference import cross_check

        self.inlet.clear()
        self.atmosphere.clear()
        try:
            fluid = self.fluid_field.fluid()
            model = self.model_field.model(fluid)
            atmosphere = self.atmosphere.to_si()
            knowns = self.inlet.to_si(molar_mass=fluid.molar_mass, atmosphere=atmosphere)
            try:
                state = solve(model, **knowns)
            except ThermoRootsError as err:
                raise self.inlet.blame(str(err)) from None
            check = cross_check(state)
        except ThermoRootsError as err:
            self.error = str(err)
            self.status.value = error_html(self.error)
            return None
        self.result, self.check, self.error = state, check, None
        self._given = self.inlet.given()
        self.status.value = ""
        self.output.value = block(self._render(state, check))
        return state

    def add_to_table(self):
        """Add the state last shown to the table; returns the table."""
        if self.result is None:
            self.error = "Solve a state first; the table collects solved states."
            self.status.value = error_html(self.error)
            return self.table
        self._rows.append((self.tag.value.strip(), self._given, self.result, self.check))
        frame = self.table
        digits = [_DIGITS.get(c, 5) for c in frame.columns]
        rows = [[html.escape(fmt(x, d) if isinstance(x, float) else str(x)) for x, d in zip(row, digits)]
                for row in frame.itertuples(index=False)]
        self.table_html.value = block(scroll_box(table(rows, header=frame.columns, caption="Collected state points",
                                                       nowrap=True, wrap_header=True,
                                                       wrap_columns=(TABLE_COLUMNS.index("given"),),
                                                       compact=True)))
        self.download.value = csv_link(self.table_csv(), "state_points.csv")
        return self.table

    @property
    def table(self):
        """The collected points as a DataFrame (one row a point, units in the column names)."""
        import pandas as pd

        return pd.DataFrame([_table_row(*row) for row in self._rows], columns=list(TABLE_COLUMNS))

    def table_csv(self) -> str:
        """The collected table as CSV text."""
        return self.table.to_csv(index=False)

    # -- display
    def _render(self, state, check) -> str:
        fluid, model = fluid_label(state.model.fluid), state.model.name
        tag = self.tag.value.strip()
        given = html.escape(self._given)
        head = (f"<div style='font-size:1.05em;margin:8px 0 4px 0'><b>{html.escape(tag + ': ' if tag else '')}"
                f"{html.escape(fluid)}, {html.escape(model)}</b> — {html.escape(str(state.phase))} "
                f"<span style='color:#555'>(given {given})</span></div>")
        state_table = table(label_rows(state.summary()), caption="State point")
        roots = [(fmt(in_unit(r.v, "v", "L/mol"), 6), fmt(r.Z, 5), r.kind, fmt(r.fugacity_coefficient, 5),
                  "yes: lowest Gibbs energy" if r.stable else "no") for r in state.roots]
        stable = next((i for i, r in enumerate(state.roots) if r.stable), None)
        where = "at the saturation pressure" if state.phase == "two-phase" else "at this T and P"
        root_table = table(roots, header=("v [L/mol]", "Z", "kind", "fugacity coeff. φ", "stable?"),
                           caption=f"Every root of the cubic {where}", highlight=stable)
        if len(roots) == 1:
            root_table += "<div style='font-size:0.85em;color:#555'>One real root: no choice to make.</div>"
        return (head + side_by_side(state_table, root_table) + _check_table(check)
                + warnings_html(state.warnings)
                + f"<div style='color:#444;font-size:0.9em'>{html.escape(convergence_text(state))}</div>"
                + caution_html())


def _check_table(check) -> str:
    """The cross-check as a table, the deviations beyond the reference module's thresholds
    marked (``CrossCheck.large_deviations``), with a sentence saying the thresholds."""
    from ..reference import LARGE_DEVIATION_LEGEND, LARGE_DEVIATION_STYLE

    if not check.available:
        return table([(html.escape(check.reason),)], caption="Reference equation: not available")
    rows = [tuple(html.escape(c) for c in row) for row in check.rows()]
    marked = {(i, 3) for i, large in enumerate(check.large_deviations()) if large}
    note = ("deviation = (model - reference) / reference; the reference is the fluid's multiparameter "
            "equation of state. " + LARGE_DEVIATION_LEGEND)
    return (table(rows, header=("quantity", "model", "reference", "deviation"),
                  caption="Against the reference equation (CoolProp)", marked=marked,
                  marked_style=LARGE_DEVIATION_STYLE)
            + f"<div class='tr-legend' style='font-size:0.85em;color:#555;margin:-4px 0 6px 0;max-width:60em'>"
              f"{html.escape(note)}</div>")


def _table_row(tag, given, state, check) -> dict:
    ok = check is not None and check.available
    return {
        "tag": tag, "fluid": fluid_label(state.model.fluid), "model": state.model.name, "given": given,
        "phase": str(state.phase),
        "T [°C]": in_unit(state.T, "T", "degC"), "P [bar]": in_unit(state.P, "P", "bar"),
        "v [L/mol]": in_unit(state.v, "v", "L/mol"), "rho [kg/m³]": float(state.rho_mass),
        "Z [-]": float(state.Z), "quality [-]": float(state.quality),
        "P_sat [bar]": in_unit(state.P_sat, "P", "bar"),
        "reference rho [kg/m³]": float(check.reference_rho_mass) if ok else float("nan"),
        "rho deviation [%]": float(check.deviation_rho_percent) if ok else float("nan"),
        "reference phase": str(check.reference_phase) if ok else "",
    }
