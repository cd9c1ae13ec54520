"""RootTracePanel: the residual a state point's inversion solves, and how each root finder
walks along it, iterate by iterate."""

from __future__ import annotations

import html
import math

import ipywidgets as w
import numpy as np

from .. import find_root, solve
from ..inversion import pressure_gap, temperature_bracket, volume_bracket
from ..errors import ThermoRootsError
from ..roots import DEFAULT_METHOD, METHODS
from ._inputs import FieldError, FluidField, ModelField, QuantityField, _label
from ._render import FigureImage, block, caution_html, error_html, fmt, in_unit, table
from ..plots import plain_log_ticks

#: What can be traced: (label, unknown, the two knowns).
PROBLEMS = (
    ("molar volume at a given temperature and pressure", "v", ("T", "P")),
    ("temperature at a given pressure and molar volume", "T", ("P", "v")),
)
_DEFAULTS = {"T": "20 degC", "P": "8 bar", "v": "3 L/mol"}
_NUMBERED = 8          # iterates numbered on the plot; later ones, crowded at the root, are dots


class RootTracePanel(w.VBox):
    """Trace every root finder on the residual of one state point.

    For (T, P) the unknown is the molar volume, the residual r(v) = P_model(T, v)/P - 1 on
    the bracket b < v <= b + R T/P (r > 0 near b; r < 0 at the top, where the attraction
    term is subtracted from the ideal-gas-like term). For (P, v) the unknown is the
    temperature, r(T) = P_model(T, v)/P - 1 from T = P (v - b)/R (where r <= 0) up to the
    first doubling where r > 0. A residual with three zeros in v is the cubic's three
    roots: a bracketed method finds one of them, not necessarily the stable one.

    Parameters
    ----------
    fluid, model, volume_shift
        As for :class:`StatePanel`.
    unknown : {"v", "T"}
        Trace the molar volume at (T, P) or the temperature at (P, v).
    methods : sequence of str
        Keys of :data:`thermo_roots.roots.METHODS`; default all of them.
    guarded : bool
        True (default): secant and Newton start from the bracket and fall back to
        bisection inside it. False: they start from the bracket's upper end (for v, the
        ideal-gas volume) with no bracket, only the physical domain.
    **knowns
        T, P (and v) as text with units or SI numbers.

    Attributes
    ----------
    result : dict of str to RootResult
        The traced solve of each method, by method name.
    state : State
        The state :func:`thermo_roots.solve` returns for the same knowns (its roots are
        drawn on the plot for comparison).
    error : str or None

    References
    ----------
    :func:`thermo_roots.find_root` (its References list each method's source).
    """

    def __init__(self, fluid="propane", model="PR", *, volume_shift=None, unknown="v",
                 methods=tuple(METHODS), guarded=True, **knowns):
        self.result, self.state, self.error = {}, None, None
        self._problem = None
        self.fluid_field = FluidField(fluid)
        self.model_field = ModelField(model, volume_shift)
        by_unknown = {u: label for label, u, _ in PROBLEMS}
        if unknown not in by_unknown:
            raise FieldError(f"unknown={unknown!r}: trace 'v' (at T and P) or 'T' (at P and v).")
        self.unknown = w.Dropdown(options=[(label, u) for label, u, _ in PROBLEMS], value=unknown,
                                  layout=w.Layout(width="380px"))
        self.fields = {q: QuantityField(q, knowns.get(q, _DEFAULTS[q])) for q in ("T", "P", "v")}
        self.method_boxes = {m: w.Checkbox(value=m in methods, description=m, indent=False,
                                           tooltip=METHODS[m].summary, layout=w.Layout(width="110px"))
                             for m in METHODS}
        self.guarded = w.Checkbox(value=guarded, indent=False, layout=w.Layout(width="420px"),
                                  description="keep secant and Newton inside the bracket")
        self.method_message = w.HTML()
        self.solve_button = w.Button(description="Trace", button_style="primary", icon="search")
        self.detail = w.Dropdown(options=[], layout=w.Layout(width="200px"))
        self.status, self.summary, self.steps = w.HTML(), w.HTML(), w.HTML()
        self.plot = FigureImage(figsize=(10, 6.4))
        self.known_box = w.VBox()
        self.unknown.observe(self._show_knowns, "value")
        self.solve_button.on_click(lambda _: self.solve())
        self.detail.observe(self._show_steps, "value")
        self._show_knowns()
        inputs = w.VBox([
            self.fluid_field.box, self.model_field.box,
            w.HBox([_label("Solve for"), self.unknown]), self.known_box,
            w.HBox([_label("Root finders"), *self.method_boxes.values(), self.method_message]),
            w.HBox([_label(""), self.guarded, self.solve_button], layout=w.Layout(align_items="center")),
        ])
        super().__init__([inputs, self.status, self.plot.image, self.summary,
                          w.HBox([_label("Iterations of"), self.detail]), self.steps])
        self.add_class("thermo-roots-trace-panel")

    def _show_knowns(self, *_):
        knowns = dict((u, k) for _, u, k in PROBLEMS)[self.unknown.value]
        self.known_box.children = [self.fields[q].box for q in knowns]

    @property
    def methods(self) -> list[str]:
        return [m for m, box in self.method_boxes.items() if box.value]

    # -- actions
    def solve(self):
        """Run every ticked method with a trace; returns :attr:`result` (None on bad input)."""
        for field in self.fields.values():
            field.clear()
        self.method_message.value = ""
        try:
            if not self.methods:
                self.method_message.value = "<span style='color:#b00020'>Tick at least one root finder.</span>"
                raise FieldError("Tick at least one root finder.")
            fluid = self.fluid_field.fluid()
            model = self.model_field.model(fluid)
            problem = _Problem.build(model, self.unknown.value, self.fields)
            results = {m: problem.run(m, guarded=self.guarded.value) for m in self.methods}
        except ThermoRootsError as err:
            self.error = str(err)
            self.status.value = error_html(self.error)
            return None
        self.result, self.state, self.error, self._problem = results, problem.state, None, problem
        self.status.value = ""
        self._draw()
        self.summary.value = block(self._summary_html())
        self.detail.options = list(results)
        self.detail.value = self.methods[0]
        self._show_steps()
        return results

    # -- display
    def _summary_html(self) -> str:
        p = self._problem
        rows = []
        for name, r in self.result.items():
            found = p.describe(r)
            rows.append((name + (" (default)" if name == DEFAULT_METHOD else ""), str(r.status),
                         str(r.iterations), str(r.evaluations), fmt(p.shown(r.root), 8),
                         fmt(p.residual(r.root), 3) if math.isfinite(r.root) else "-", html.escape(found)))
        header = ("method", "status", "iterations", "evaluations", f"{p.symbol} [{p.unit_label}]",
                  "residual there", "where it landed")
        note = (f"<div style='font-size:0.9em;color:#444'>Residual r({p.symbol}) = P_model/P - 1 "
                f"(given {html.escape(p.given)}). solve() reports {p.symbol} = "
                f"{fmt(p.shown(p.answer), 8)} {p.unit_label}.</div>")
        return table(rows, header=header, caption="Each root finder on the same residual") + note + caution_html()

    def _show_steps(self, *_):
        name = self.detail.value
        if not name or name not in self.result:
            self.steps.value = ""
            return
        p = self._problem
        frame = self.result[name].trace.to_frame()
        rows = [(str(int(s.iteration)), fmt(p.shown(s.x), 10), fmt(s.fx, 4),
                 fmt(p.shown(s.a), 8), fmt(p.shown(s.b), 8)) for s in frame.itertuples()]
        self.steps.value = block(table(rows, header=("iteration", f"{p.symbol} [{p.unit_label}]", "residual",
                                              "bracket low", "bracket high"),
                                 caption=f"Iterates of {name}"))

    def _draw(self):
        p = self._problem
        fig = self.plot.clear()
        n = len(self.result)
        cols = 1 if n == 1 else 2
        rows = math.ceil(n / cols)
        axes = fig.subplots(rows, cols, sharex=True, squeeze=False).ravel()
        x = p.curve()
        r = p.residual(x)
        finite = r[np.isfinite(r)]
        bottom = 1.3 * min(float(finite.min()), -0.5)
        top = max(2.0, -bottom, min(float(finite.max()), 5.0))
        for ax, (name, result) in zip(axes, self.result.items()):
            ax.plot(p.shown(x), r, color="0.35", lw=1.2)
            ax.axhline(0.0, color="0.6", lw=0.8)
            for root, kind, stable in p.marks:
                ax.axvline(p.shown(root), color="#2a7" if stable else "#c55", lw=1.0, ls="--")
            steps = result.trace.to_frame()
            xs, fs = p.shown(steps["x"].to_numpy()), steps["fx"].to_numpy()
            off = fs > top
            fs = np.where(off, 0.93 * top, fs)
            ax.plot(xs[~off], fs[~off], "o", color="#1a5fb4", ms=4, zorder=3)
            ax.plot(xs[off], fs[off], "^", color="#1a5fb4", ms=5, zorder=3)
            ax.set_xscale(p.xscale)
            if p.xscale == "log":
                plain_log_ticks(ax.xaxis)
            ax.set_ylim(bottom, top)
            _number_iterates(ax, xs, fs)
            its = "iteration" if result.iterations == 1 else "iterations"
            ax.set_title(f"{name}: {result.status}, {result.iterations} {its} — {p.describe(result)}",
                         fontsize=9, loc="left")
            ax.set_ylabel("residual P_model/P − 1", fontsize=8)
            ax.tick_params(labelsize=8, labelbottom=True)
        for ax in axes[n:]:
            ax.set_axis_off()
        for ax in axes[max(n - cols, 0):n]:
            ax.set_xlabel(f"{p.name} [{p.unit_label}]", fontsize=8)
        fig.suptitle(f"{p.model.fluid.name}, {p.model.name}: residual of the inversion at {p.given}\n"
                     f"Dashed: roots (green the stable one). Numbers: iterates (a triangle is off the top)",
                     fontsize=9)
        self.plot.publish()


def _number_iterates(ax, xs, fs):
    """Number the iterates on the plot, skipping any that would sit on one already numbered."""
    ax.autoscale_view()
    to_axes = ax.transScale + ax.transLimits
    placed = []
    for i, (xi, fi) in enumerate(zip(xs, fs)):
        if not (np.isfinite(xi) and np.isfinite(fi)) or len(placed) >= _NUMBERED:
            continue
        u, v = to_axes.transform((xi, fi))
        if all(abs(u - pu) > 0.03 or abs(v - pv) > 0.08 for pu, pv in placed):
            ax.annotate(str(i), (xi, fi), textcoords="offset points", xytext=(3, 4), fontsize=8,
                        color="#1a5fb4")
            placed.append((u, v))


class _Problem:
    """One residual, its bracket, its derivative and the roots solve() finds."""

    def __init__(self, model, unknown, T, P, v, given):
        self.model, self.unknown, self.T, self.P, self.v, self.given = model, unknown, T, P, v, given
        if unknown == "v":
            self.state = solve(model, T=T, P=P)
            self.lo, self.hi = (float(x) for x in volume_bracket(model, T, P))
            self.answer = float(self.state.v)
            self.marks = [(r.v, r.kind, r.stable) for r in self.state.roots]
            self.symbol, self.name, self.unit, self.unit_label, self.xscale = "v", "molar volume", "L/mol", "L/mol", "log"
        else:
            self.state = solve(model, P=P, v=v)
            self.lo, self.hi = (float(x) for x in temperature_bracket(model, P, v))
            self.answer = float(self.state.T)
            self.marks = [(self.answer, "solve()", True)]
            self.symbol, self.name, self.unit, self.unit_label, self.xscale = "T", "temperature", "K", "K", "linear"

    @classmethod
    def build(cls, model, unknown, fields):
        knowns = dict((u, k) for _, u, k in PROBLEMS)[unknown]
        si = {q: fields[q].to_si(molar_mass=model.fluid.molar_mass) for q in knowns}
        given = ", ".join(f"{q} = {fields[q].shown()}" for q in knowns)
        try:
            return cls(model, unknown, si.get("T"), si["P"], si.get("v"), given)
        except ThermoRootsError as err:
            raise FieldError(str(err)) from None

    def residual(self, x):
        if self.unknown == "v":
            return pressure_gap(self.T, x, self.P, self.model)
        return pressure_gap(x, self.v, self.P, self.model)

    def slope(self, x):
        if self.unknown == "v":
            return self.model.dP_dv(self.T, x) / self.P
        return self.model.dP_dT(x, self.v) / self.P

    def run(self, method, *, guarded=True):
        f = lambda x: self.residual(x)   # noqa: E731
        fprime = lambda x: self.slope(x)  # noqa: E731
        if METHODS[method].bracketed or guarded:
            return find_root(f, bracket=(self.lo, self.hi), method=method, fprime=fprime, trace=True)
        return find_root(f, x0=self.hi, method=method, fprime=fprime, trace=True,
                         domain=(self.lo, 1e6 * self.hi))

    def curve(self):
        if self.xscale == "log":
            gap = np.geomspace(self.lo - self.model.v_min, self.hi - self.model.v_min, 600)
            return self.model.v_min + gap
        return np.linspace(self.lo, self.hi, 600)

    def shown(self, x):
        if self.unknown == "v":
            return np.asarray(x, dtype=float) * in_unit(1.0, "v", self.unit)
        return np.asarray(x, dtype=float)

    def describe(self, result) -> str:
        """Which root a result landed on, in words."""
        x = result.root
        if not math.isfinite(x):
            return "no root"
        if abs(self.residual(x)) > 1e-6:
            return "NOT a root (residual not zero)"
        if self.unknown == "T" and self.state.phase == "two-phase":
            return "single-phase T; solve() reports two-phase at T_sat"
        near = min(self.marks, key=lambda m: abs(m[0] - x))
        if abs(near[0] - x) > 1e-6 * abs(near[0]):
            return "a root solve() does not report"
        if self.unknown == "T":
            return "the temperature solve() reports"
        return f"{near[1]} root" + (" (stable)" if near[2] else " (not the stable one)")
