"""Layer 8: matplotlib pictures of isotherms, saturation, compressibility, accuracy maps,
closed-vessel heat-ups, and pressure-enthalpy and temperature-entropy diagrams with a
process step drawn on them.

Every function takes ``ax=`` (a new figure when None) and returns the Axes. Display units,
the same in every plot: pressure in bar, temperature in K with a °C scale alongside,
molar volume in L/mol, density in kg/m³, deviations in percent (an enthalpy's in kJ/kg, its
zero being a convention). One style table,
:data:`STYLE`, sets colours, line styles and markers; models differ by line style and
marker as well as by colour, so the plots stay readable in greyscale.

References
----------
Hunter, J. D. (2007), Matplotlib: A 2D graphics environment, Comput. Sci. Eng. 9, 90-95.
Maxwell, J. C. (1875), On the dynamical evidence of the molecular constitution of bodies,
Nature 11, 357-359 (the equal-area construction).
"""

from __future__ import annotations

import math
import textwrap

import numpy as np
from matplotlib import colors as mcolors
from matplotlib import patheffects
from matplotlib import ticker
from matplotlib.lines import Line2D
from matplotlib.patches import Patch

from .accuracy import model_label
from .errors import InputError
from .equilibrium.saturation_points import SATURATION_CAUTION
from .inversion import CAUTION, State, saturation, solve
from .models import Model
from .reference import library_reason, reference_limits, reference_saturation, reference_state
from .steps import CONSTANT_VOLUME, VESSEL_CAUTION, StepResult
from .units import to_si

#: The one colour, line and marker scheme of every plot.
STYLE = {
    "reference": dict(color="black", linestyle="-", linewidth=1.8),
    "models": (
        dict(color="#1b5e9e", linestyle="--", marker="o", linewidth=1.6),
        dict(color="#c4581b", linestyle="-.", marker="s", linewidth=1.6),
        dict(color="#2f8a4c", linestyle=(0, (1, 1.5)), marker="^", linewidth=1.8),
        dict(color="#7b3f98", linestyle=(0, (6, 2, 1, 2, 1, 2)), marker="D", linewidth=1.6),
        dict(color="#8a6d1d", linestyle=(0, (8, 3)), marker="v", linewidth=1.6),
    ),
    "dome": dict(linewidth=1.0, linestyle=(0, (2, 2)), alpha=0.9),
    "tie_line": dict(color="0.35", linestyle="-", linewidth=0.9),
    "equal_area": dict(facecolor="0.75", edgecolor="0.35", hatch="///", alpha=0.45, linewidth=0.0),
    "marker_pressure": dict(color="0.45", linestyle=(0, (4, 2)), linewidth=0.9),
    "roots": {
        "liquid-like": dict(marker="o", markersize=8, markerfacecolor="white", markeredgewidth=2.0),
        "unstable": dict(marker="X", markersize=9, markerfacecolor="0.5", markeredgewidth=1.0),
        "vapor-like": dict(marker="s", markersize=8, markerfacecolor="white", markeredgewidth=2.0),
    },
    "critical_point": dict(marker="*", markersize=12, color="black", linestyle="none"),
    "fill_point": dict(marker="*", markersize=14, markerfacecolor="gold", markeredgecolor="black", linestyle="none"),
    "reference_fill_point": dict(marker="*", markersize=14, markerfacecolor="white", markeredgecolor="black",
                                 linestyle="none"),
    "quality": dict(color="0.35", linestyle=(0, (1, 1)), linewidth=1.8, marker="."),
    "phase_differs": dict(marker="x", color="black", markersize=4, linestyle="none", markeredgewidth=0.8),
    "colormap": "RdBu_r",
    "temperature_colormap": "plasma",   # isotherms of one model: cold dark blue to hot orange
    "no_data": "0.88",
    "deviation_levels": (-20.0, -10.0, -5.0, -2.0, -1.0, 1.0, 2.0, 5.0, 10.0, 20.0),
}

_BAR = 1e-5      # Pa -> bar
_LITRE = 1e3     # m3/mol -> L/mol
_ZERO_CELSIUS = 273.15


def model_style(index: int) -> dict:
    """Line style of the index-th model of a plot (cycles through :data:`STYLE`)."""
    return dict(STYLE["models"][index % len(STYLE["models"])])


# --------------------------------------------------------------------------- helpers

def _new_axes(ax, size=(8.0, 5.2)):
    if ax is not None:
        return ax
    import matplotlib.pyplot as plt

    fig, ax = plt.subplots(figsize=size, layout="constrained")
    return ax


def _as_models(model):
    models = list(model) if isinstance(model, (list, tuple)) else [model]
    if not models:
        raise InputError("Give at least one model to plot.")
    fluid = models[0].fluid
    if any(m.fluid != fluid for m in models):
        raise InputError("All models of one plot must be for the same fluid; got "
                         f"{', '.join(sorted({m.fluid.name for m in models}))}.")
    return models, fluid


def _labels(models):
    return [model_label(m) for m in models]


def _prepare(model, ax, size=(8.0, 5.2)):
    """(models, fluid, labels, axes) for a plot of one or several models."""
    models, fluid = _as_models(model)
    return models, fluid, _labels(models), _new_axes(ax, size)


def _celsius_axis(ax, which="x"):
    """A °C scale beside a kelvin axis (top for x, right for y)."""
    functions = (lambda k: k - _ZERO_CELSIUS, lambda c: c + _ZERO_CELSIUS)
    if which == "x":
        sec = ax.secondary_xaxis("top", functions=functions)
        sec.set_xlabel("Temperature [°C]")
    else:
        sec = ax.secondary_yaxis("right", functions=functions)
        sec.set_ylabel("Temperature [°C]")
    return sec


def _temperature_text(T):
    return f"{T:.2f} K ({T - _ZERO_CELSIUS:.2f} °C)"


def _has_reference(fluid):
    return bool(fluid.library_name)


def _note(ax, text):
    ax.text(0.99, 0.01, text, transform=ax.transAxes, ha="right", va="bottom", fontsize=7.5, color="0.3",
            wrap=True)


def _quality_top(quality):
    """Top of a quality axis: the data's maximum with 15 % headroom (a 0.005 quality is not a
    flat line), at most 1; 1 when there is no two-phase point at all."""
    q = np.asarray(quality, dtype=float)
    q = q[np.isfinite(q)]
    top = float(q.max()) if q.size else 0.0
    return min(1.0, 1.15 * top) if top > 0 else 1.0


def _caution(ax, y=-0.16):
    # wrap to the axes' width: about 3.5 pt per character at 6.5 pt type
    width_pt = ax.get_position().width * ax.figure.get_figwidth() * 72.0
    ax.annotate("\n".join(textwrap.wrap("Caution: " + CAUTION, max(40, int(width_pt / 3.5)))),
                xy=(0.0, y), xycoords="axes fraction",
                ha="left", va="top", fontsize=6.5, color="0.25", annotation_clip=False)


def plain_log_ticks(axis):
    """Plain numbers (0.5, 1, 2, 5, 10 ...) on a log axis instead of powers of ten: labels at
    1, 2 and 5 times each power of ten, unlabelled minor ticks between, so no two overlap."""
    def label(y, _):
        lo, hi = sorted(axis.get_view_interval())
        if not (y > 0 and lo > 0):
            return ""
        mantissa = y / 10.0 ** np.floor(np.log10(y) + 1e-9)
        if np.log10(hi / lo) > 4.0 and abs(mantissa - 1.0) > 1e-6:
            return ""        # over more than four decades only the powers of ten are labelled
        return f"{y:g}"

    axis.set_major_locator(ticker.LogLocator(subs=(1.0, 2.0, 5.0)))
    axis.set_major_formatter(ticker.FuncFormatter(label))
    axis.set_minor_locator(ticker.LogLocator(subs=(3.0, 4.0, 6.0, 7.0, 8.0, 9.0)))
    axis.set_minor_formatter(ticker.NullFormatter())


def _outlined(**style):
    """A line style with a white outline, so the line shows on any background."""
    width = style.get("linewidth", 1.5)
    style["path_effects"] = [patheffects.withStroke(linewidth=width + 2.5, foreground="white")]
    return style


def _spread(positions, gap):
    """Move sorted label positions apart to at least ``gap``, keeping their order."""
    order = np.argsort(positions)
    out = np.asarray(positions, dtype=float).copy()
    for k in range(1, len(order)):
        prev, cur = order[k - 1], order[k]
        out[cur] = max(out[cur], out[prev] + gap)
    return out


def _edges(centres, log):
    c = np.log(centres) if log else np.asarray(centres, dtype=float)
    if c.size == 1:
        half = 0.05 * abs(c[0]) if not log else 0.05
        e = np.array([c[0] - half, c[0] + half])
    else:
        mid = 0.5 * (c[1:] + c[:-1])
        e = np.concatenate([[c[0] - (mid[0] - c[0])], mid, [c[-1] + (c[-1] - mid[-1])]])
    return np.exp(e) if log else e


def _deduplicated_legend(ax, extra=(), *, wrap=None, **kwargs):
    """One legend entry per label (the axes' own entries, then ``extra`` (handle, label)
    pairs); with ``wrap`` a label longer than that many characters is broken into lines, so
    a legend beside the axes has a bounded width and never squeezes them."""
    handles, labels = ax.get_legend_handles_labels()
    seen, h2, l2 = set(), [], []
    for h, lab in list(zip(handles, labels)) + list(extra):
        if lab and not lab.startswith("_") and lab not in seen:
            seen.add(lab)
            h2.append(h)
            l2.append(lab if wrap is None else textwrap.fill(lab, wrap, break_on_hyphens=False))
    return ax.legend(h2, l2, **kwargs)


# --------------------------------------------------------------------------- isotherm

def plot_isotherm(model, T, *, P_marker=None, reference=True, ax=None, v_range=None, n=500):
    """Pressure against molar volume along one isotherm, with every root at a pressure.

    Draws each model's isotherm (the cubic itself, loop included), its saturation dome,
    the equal-area (Maxwell) construction shaded between the loop and the saturation
    pressure, the reference equation's isotherm, and at ``P_marker`` every real root
    marked by kind: liquid-like (open circle), unstable (grey cross), vapor-like (open
    square). The legend sits right of the axes: one entry per model, then one per kind
    of mark; the pressure axis reaches down to the bottom of the equal-area lobe.

    Parameters
    ----------
    model : model or list of models
        One fluid; several models are compared.
    T : float or str
        Temperature [K] ("20 degC" accepted).
    P_marker : float or str, optional
        Pressure [Pa] at which the roots are marked.
    reference : bool
        Overlay the reference isotherm (skipped, with a note, where unavailable).
    ax : matplotlib Axes, optional
    v_range : (float, float), optional
        Molar volume range [m^3/mol]; default from just above the co-volume to well past
        the saturated vapor.
    n : int
        Points along the curve.

    Returns
    -------
    matplotlib.axes.Axes

    References
    ----------
    Maxwell, J. C. (1875), Nature 11, 357-359.
    """
    models, fluid, labels, ax = _prepare(model, ax, size=(10.0, 5.4))   # room for the legend on the right
    T = float(to_si(T, "T"))
    cubic = [m for m in models if m.has_saturation]
    subcritical = T < fluid.Tc and bool(cubic)
    sats = {id(m): saturation(m, T=T) for m in cubic} if subcritical else {}
    if v_range is None:
        v_lo = 1.02 * max(m.v_min for m in models) if cubic else 1e-5
        if v_lo <= 0:
            v_lo = 1e-5
        v_c = max(m.v_c for m in models) or 8.314 * fluid.Tc / fluid.Pc / 3
        v_hi = max([40.0 * v_c] + [3.0 * s.v_vapor for s in sats.values()])
        if P_marker is not None:
            v_hi = max(v_hi, 3.0 * 8.314462618 * T / float(to_si(P_marker, "P")))
        v_range = (v_lo, v_hi)
    v = np.geomspace(v_range[0], v_range[1], n)
    P_top = max(1.6 * fluid.Pc, 1.3 * float(to_si(P_marker, "P")) if P_marker is not None else 0.0)
    P_bottom = 0.0      # lowest pressure to show: the bottom of every equal-area lobe
    for i, (m, label) in enumerate(zip(models, labels)):
        style = model_style(i)
        with np.errstate(invalid="ignore", divide="ignore"):
            P = np.where(v > m.v_min, m.pressure(T, v), np.nan)
        ax.plot(v * _LITRE, P * _BAR, color=style["color"], linestyle=style["linestyle"],
                linewidth=style["linewidth"], label=f"{label} isotherm", gid=f"isotherm:{label}")
        if not m.has_saturation:
            continue
        _draw_dome(ax, m, label, style)
        if subcritical:
            s = sats[id(m)]
            inside = (v >= s.v_liquid) & (v <= s.v_vapor)
            vv = np.concatenate([[s.v_liquid], v[inside], [s.v_vapor]])
            PP = np.concatenate([[s.P], m.pressure(T, v[inside]), [s.P]])
            P_bottom = min(P_bottom, float(np.min(PP)))
            if i == 0:
                ax.fill_between(vv * _LITRE, PP * _BAR, s.P * _BAR, label=f"equal areas (Maxwell), {label}",
                                gid="equal-area", **STYLE["equal_area"])
            ax.plot([s.v_liquid * _LITRE, s.v_vapor * _LITRE], [s.P * _BAR] * 2, **STYLE["tie_line"],
                    label="saturation pressure (tie line)")
    if reference and _has_reference(fluid):
        ref = reference_state(fluid, T=np.full(v.shape, T), v=v, with_saturation=False)
        P_ref = np.where(ref.available, ref.P, np.nan)
        if np.any(np.isfinite(P_ref)):
            ax.plot(v * _LITRE, P_ref * _BAR, label="reference equation (CoolProp)", gid="reference", **STYLE["reference"])
        else:
            _note(ax, f"reference unavailable: {np.asarray(ref.reason).flat[0]}")
    elif reference:
        _note(ax, "no reference equation for a user fluid")
    if P_marker is not None:
        _draw_roots(ax, models, labels, T, float(to_si(P_marker, "P")))
    ax.set_xscale("log")
    plain_log_ticks(ax.xaxis)
    ax.set_xlim(v_range[0] * _LITRE, v_range[1] * _LITRE)
    # the floor shows the whole lower lobe of the equal-area construction, however deep
    ax.set_ylim(min(P_bottom * 1.06, -0.05 * P_top) * _BAR, P_top * _BAR)
    ax.axhline(0.0, color="0.7", linewidth=0.6, zorder=0)
    ax.set_xlabel("Molar volume v [L/mol] (log scale)")
    ax.set_ylabel("Pressure P [bar]")
    ax.set_title(f"{fluid.name} — isotherm at {_temperature_text(T)}\n{', '.join(labels)}"
                 + (" vs reference" if reference and _has_reference(fluid) else ""))
    ax.grid(True, which="major", color="0.9")
    _isotherm_legend(ax, labels)
    return ax


def _isotherm_legend(ax, labels):
    """One legend outside the data, right of the axes: the models first (one entry each: its
    isotherm's colour and line; its dome is dotted in the same colour), then what the plot
    marks, once each whatever the number of models."""
    handles, names = ax.get_legend_handles_labels()
    by_name = {}
    for h, name in zip(handles, names):
        by_name.setdefault(name, h)
    isotherms = [f"{label} isotherm" for label in labels]
    entries = [(by_name[name], name) for name in isotherms if name in by_name]
    if any(name.endswith(" saturation dome") for name in by_name):
        entries.append((Line2D([], [], color="0.35", **STYLE["dome"]), "saturation dome (dotted, model's colour)"))
    entries += [(h, name) for name, h in by_name.items()
                if name not in isotherms and not name.endswith(" saturation dome") and not name.startswith("_")]
    return ax.legend([h for h, _ in entries], [n for _, n in entries], loc="upper left",
                     bbox_to_anchor=(1.02, 1.0), borderaxespad=0.0, fontsize=8, frameon=False)


def _draw_dome(ax, model, label, style):
    T = model.fluid.Tc * np.concatenate([np.linspace(0.45, 0.97, 50), 1 - np.geomspace(0.03, 1e-6, 30)])
    s = saturation(model, T=T)
    v = np.concatenate([s.v_liquid, [model.v_c], s.v_vapor[::-1]])
    P = np.concatenate([s.P, [model.fluid.Pc], s.P[::-1]])
    ax.plot(v * _LITRE, P * _BAR, color=style["color"], label=f"{label} saturation dome", gid=f"dome:{label}",
            **STYLE["dome"])


def _draw_roots(ax, models, labels, T, P):
    ax.axhline(P * _BAR, label=f"P = {P * _BAR:.4g} bar", **STYLE["marker_pressure"])
    names = {"liquid-like": "liquid-like root", "unstable": "unstable root (dP/dv > 0)",
             "vapor-like": "vapor-like root"}
    for i, (m, label) in enumerate(zip(models, labels)):
        colour = model_style(i)["color"]
        for root in solve(m, T=T, P=P).roots:
            style = dict(STYLE["roots"][root.kind])
            if root.kind != "unstable":
                style["markeredgecolor"] = colour
            else:
                style["markeredgecolor"] = "black"
            ax.plot([root.v * _LITRE], [P * _BAR], linestyle="none", zorder=5, label=names[root.kind],
                    gid=f"root:{root.kind}", **style)


# --------------------------------------------------------------------------- saturation curve

def plot_saturation_curve(model, ax=None, *, T=None, reference=True, n=80):
    """Saturation pressure against temperature: each model and the reference equation.

    Parameters
    ----------
    model : model or list of models
    ax : matplotlib Axes, optional
    T : (float, float), optional
        Temperature range [K]; default from 0.5 Tc (or the reference's triple point) to Tc.
    reference : bool
    n : int

    Returns
    -------
    matplotlib.axes.Axes
    """
    models, fluid, labels, ax = _prepare(model, ax)
    lo = 0.5 * fluid.Tc
    if _has_reference(fluid):
        lo = max(lo, reference_limits(fluid)["T_min"])
    lo, hi = (lo, fluid.Tc) if T is None else (float(to_si(T[0], "T")), float(to_si(T[1], "T")))
    Ts = np.linspace(lo, hi, n)
    for i, (m, label) in enumerate(zip(models, labels)):
        if not m.has_saturation:
            continue
        st = model_style(i)
        P = saturation(m, T=Ts).P
        ax.plot(Ts, P * _BAR, color=st["color"], linestyle=st["linestyle"], linewidth=st["linewidth"],
                marker=st["marker"], markevery=(i * max(1, n // 24), max(1, n // 8)), markerfacecolor="white",
                label=label, gid=f"model:{label}")
    if reference and _has_reference(fluid):
        ref = reference_saturation(fluid, T=Ts)
        ax.plot(Ts, np.asarray(ref.P) * _BAR, label="reference equation (CoolProp)", gid="reference",
                **STYLE["reference"])
    ax.plot([fluid.Tc], [fluid.Pc * _BAR], label="critical point", **STYLE["critical_point"])
    ax.set_yscale("log")
    plain_log_ticks(ax.yaxis)
    ax.set_xlabel("Temperature T [K]")
    ax.set_ylabel("Saturation pressure P [bar] (log scale)")
    _celsius_axis(ax)
    ax.set_title(f"{fluid.name} — saturation pressure, {', '.join(labels)}"
                 + (" vs reference" if reference and _has_reference(fluid) else ""))
    ax.grid(True, which="both", color="0.92")
    _deduplicated_legend(ax, loc="lower right", fontsize=8)
    return ax


# --------------------------------------------------------------------------- binary P-x-y

def plot_pxy(model, T, ax=None, *, n=41, reference=True, n_reference=9):
    """The P-x-y diagram of a binary mixture at one temperature: the bubble-pressure curve
    against the liquid's composition and the dew-pressure curve against the vapour's.

    Parameters
    ----------
    model : CubicModel
        A cubic on a two-component Mixture (its kᵢⱼ are used; the feed composition is not).
    T : float or str
        Temperature [K] ("-20 degC" accepted).
    ax : matplotlib Axes, optional
    n : int
        Compositions of the model's curves, from pure second to pure first component.
    reference : bool
        Also the reference mixture model's bubble and dew points (CoolProp HEOS, GERG-2008
        type; about 5-40 ms a point) at ``n_reference`` compositions.

    Returns
    -------
    matplotlib.axes.Axes

    Notes
    -----
    Between the curves the binary splits into two phases; above the bubble curve it is
    liquid, below the dew curve vapour. Where the temperature is above the lighter
    component's critical temperature the curves meet at the mixture's critical point short
    of x = 1 and the plot ends there (compositions without a bubble point are left out).

    References
    ----------
    Michelsen, M. L. & Mollerup, J. M. (2007), Thermodynamic Models: Fundamentals and
    Computational Aspects, 2nd ed., ch. 12 (saturation points of mixtures).
    """
    from .equilibrium.saturation_points import bubble_point, dew_point

    if not (isinstance(model, Model) and model.n_components == 2):
        raise InputError(f"plot_pxy draws a binary; got {model!r}. "
                         "Give a cubic on a two-component Mixture, e.g. "
                         "PengRobinson(Mixture({'propane': 0.5, 'n-butane': 0.5})).")
    T = float(to_si(T, "T"))
    names = model.components.names
    x1 = np.linspace(0.0, 1.0, n)
    P_bubble, P_dew = np.full(n, np.nan), np.full(n, np.nan)
    for i, x in enumerate(x1):
        z = np.array([x, 1.0 - x])
        b, d = bubble_point(model, T=T, z=z), dew_point(model, T=T, z=z)
        P_bubble[i] = b.P if b.status == "converged" else np.nan
        P_dew[i] = d.P if d.status == "converged" else np.nan
    ax = _new_axes(ax)
    style = model_style(0)
    label = model_label(model)
    ax.plot(x1, P_bubble * _BAR, color=style["color"], linewidth=style["linewidth"],
            label=f"bubble pressure, {label} (liquid x)", gid="model:bubble")
    ax.plot(x1, P_dew * _BAR, color=style["color"], linewidth=style["linewidth"], linestyle="--",
            label=f"dew pressure, {label} (vapour y)", gid="model:dew")
    if np.any(np.isfinite(P_bubble)) and np.any(np.isfinite(P_dew)):
        ax.fill(np.concatenate([x1[np.isfinite(P_bubble)], x1[np.isfinite(P_dew)][::-1]]),
                np.concatenate([P_bubble[np.isfinite(P_bubble)], P_dew[np.isfinite(P_dew)][::-1]]) * _BAR,
                color=style["color"], alpha=0.08, linewidth=0, label="two phases (model)")
    if reference:
        _pxy_reference(ax, model, T, n_reference)
    ax.set_xlim(0.0, 1.0)
    ax.set_xlabel(f"Mole fraction of {names[0]} in the liquid (x) or the vapour (y) [-]")
    ax.set_ylabel("Pressure P [bar]")
    ax.set_title(f"{names[0]} + {names[1]} at {_temperature_text(T)} — bubble and dew pressures")
    ax.grid(True, color="0.92")
    _deduplicated_legend(ax, loc="best", fontsize=8)
    return ax


def _pxy_reference(ax, model, T, n_points):
    """The reference mixture model's bubble and dew points at n_points compositions (failures left out)."""
    from .reference import mixture_reference_reason, reference_bubble_point, reference_dew_point

    if mixture_reference_reason(model.components):
        _note(ax, f"No reference: {mixture_reference_reason(model.components)}")
        return
    x1 = np.linspace(0.0, 1.0, n_points + 2)[1:-1]
    for kind, call, marker in (("bubble", reference_bubble_point, "o"), ("dew", reference_dew_point, "s")):
        P = []
        for x in x1:
            point = call(model.components.with_fractions([x, 1.0 - x]), T=T)
            P.append(float(point.P) if point.available else np.nan)
        ax.plot(x1, np.asarray(P) * _BAR, linestyle="none", marker=marker, markerfacecolor="white",
                markeredgecolor=STYLE["reference"]["color"], label=f"{kind} point, reference mixture model",
                gid=f"reference:{kind}")


# --------------------------------------------------------------------------- compressibility

def plot_compressibility(model, T, P=None, ax=None, *, reference=True, n=150):
    """Compressibility factor Z against pressure on one or more isotherms.

    A jump in Z on a subcritical isotherm is the phase change at the saturation pressure;
    the curve is broken there rather than joined. Each isotherm is labelled at the end of
    its curve, in its colour: with one model every temperature has its own colour (the
    reference, black, beside it); with several models the colours tell the models apart.
    The ideal-gas line Z = 1 is drawn over the grid.

    Parameters
    ----------
    model : model or list of models
    T : float, str or list
        Temperature(s) [K].
    P : (float, float), optional
        Pressure range [Pa]; default Pc/100 to 3 Pc.
    ax : matplotlib Axes, optional
    reference : bool
    n : int
        Points per isotherm.

    Returns
    -------
    matplotlib.axes.Axes
    """
    models, fluid, labels, ax = _prepare(model, ax)
    temps = [float(to_si(t, "T")) for t in (T if isinstance(T, (list, tuple, np.ndarray)) else [T])]
    lo, hi = (fluid.Pc / 100.0, 3.0 * fluid.Pc) if P is None else (float(to_si(P[0], "P")), float(to_si(P[1], "P")))
    Ps = np.linspace(lo, hi, n)
    by_temperature = len(models) == 1
    colours = _temperature_colours(len(temps)) if by_temperature else None
    ends = []
    for k, t in enumerate(temps):
        for i, (m, label) in enumerate(zip(models, labels)):
            st = model_style(i)
            colour = colours[k] if by_temperature else st["color"]
            state = solve(m, T=np.full(Ps.shape, t), P=Ps)
            Z = _broken(state.Z, state.phase)
            ax.plot(Ps * _BAR, Z, color=colour, linestyle=st["linestyle"],
                    linewidth=st["linewidth"], marker=st["marker"], markevery=max(1, n // 10),
                    markerfacecolor="white", markersize=5, label=label, gid=f"model:{label}:{t:g}")
            if i == 0:
                ends.append((t, _last_finite(Ps, Z), colour))
        if reference and _has_reference(fluid):
            ref = reference_state(fluid, T=np.full(Ps.shape, t), P=Ps, with_saturation=False)
            Z = np.where(ref.available, ref.Z, np.nan)
            ax.plot(Ps * _BAR, _broken(Z, ref.phase), label="reference equation (CoolProp)", gid="reference",
                    **dict(STYLE["reference"], linewidth=1.2))
    ax.axhline(1.0, color="0.25", linestyle=(0, (5, 3)), linewidth=0.9, zorder=2.2, label="ideal gas (Z = 1)",
               gid="ideal-gas")
    ax.grid(True, color="0.92")
    ax.set_axisbelow(True)
    ax.set_xlim(0.0, hi * _BAR * 1.22)
    ax.autoscale_view(scalex=False)
    low, high = ax.get_ylim()
    ys = _spread([z for _, (_, z), _ in ends], 0.035 * (high - low))   # apart just enough to read
    for (t, (p_end, _), colour), y in zip(ends, ys):
        ax.annotate(f"{t:.1f} K ({t - _ZERO_CELSIUS:.1f} °C)", xy=(p_end * _BAR, y), xytext=(4, 0),
                    textcoords="offset points", fontsize=8, va="center", color=colour if by_temperature else "0.15",
                    gid=f"isotherm-label:{t:g}")
    ax.set_xlabel("Pressure P [bar]")
    ax.set_ylabel("Compressibility factor Z = Pv/(RT) [-]")
    ax.set_title(f"{fluid.name} — compressibility on isotherms, {', '.join(labels)}"
                 + (" vs reference" if reference and _has_reference(fluid) else ""))
    extra = []
    if by_temperature and len(temps) > 1:   # the model's line style, in neutral grey: colours are temperatures
        st = model_style(0)
        extra.append((Line2D([], [], color="0.3", linestyle=st["linestyle"], marker=st["marker"],
                             markerfacecolor="white", markersize=5), f"{labels[0]} (colour: temperature)"))
        for line in ax.get_lines():
            if line.get_label() == labels[0]:
                line.set_label("_" + labels[0])
    _deduplicated_legend(ax, extra=extra, loc="upper center", bbox_to_anchor=(0.5, -0.11), ncol=3, fontsize=8,
                         frameon=False)
    return ax


def _temperature_colours(n):
    """n distinct colours from cold (blue) to hot (red), dark enough for white paper."""
    from matplotlib import colormaps

    if n == 1:
        return [STYLE["models"][0]["color"]]
    return [mcolors.to_hex(c) for c in colormaps[STYLE["temperature_colormap"]](np.linspace(0.0, 0.82, n))]


def _broken(y, phase):
    """y with NaN inserted where the phase switches between liquid and vapor (no joining line)."""
    y = np.asarray(y, dtype=float).copy()
    phase = np.asarray(phase, dtype=object)
    switch = np.flatnonzero((phase[1:] != phase[:-1]) & np.isin(phase[1:], ["liquid", "vapor"])
                            & np.isin(phase[:-1], ["liquid", "vapor"]))
    y[switch] = np.nan
    return y


def _last_finite(x, y):
    """(x, y) of the last point where y is finite (the end of a drawn curve)."""
    y = np.asarray(y, dtype=float)
    finite = np.flatnonzero(np.isfinite(y))
    return (float(x[finite[-1]]), float(y[finite[-1]])) if finite.size else (float(x[-1]), 1.0)


# --------------------------------------------------------------------------- accuracy map

def plot_accuracy_map(accuracy_map, model=None, ax=None, *, limit=None, contours=True, norm=None,
                      colorbar=True, title=None, legend=True):
    """Heat map of one quantity's deviation from the reference over temperature and pressure.

    The quantity is the map's (``accuracy_map(..., quantity=)``: molar volume, enthalpy,
    isobaric heat capacity, speed of sound). Diverging colours centred at zero (red: the
    model's value too large, for v its density too low; blue: too small), labelled contour
    lines at ±1, 2, 5, 10, 20 of the deviation's unit (% or kJ/kg), grey where the
    reference gives no single-phase value, crosses where the model's phase differs from
    the reference's, and the saturation curves of the reference and the model on top.

    Parameters
    ----------
    accuracy_map : AccuracyMap
    model : str or int, optional
        Which model's label (or position); default the first.
    ax : matplotlib Axes, optional
    limit : float, optional
        Colour limits ±limit [the deviation's unit: % or kJ/kg]; default the 95th percentile of
        |deviation|, at least 1.
    contours : bool
        Draw the labelled contour lines.
    norm : matplotlib.colors.Normalize, optional
        A colour scale shared with other maps (``limit`` is then ignored); see
        :func:`plot_accuracy_maps`.
    colorbar, legend : bool
        Draw this map's own colour bar and legend.
    title : str, optional
        Replaces the default title.

    Returns
    -------
    matplotlib.axes.Axes
        The colour bar is ``ax.collections[0].colorbar``.
    """
    amap = accuracy_map
    label, index = _map_model(amap, model)
    ax = _new_axes(ax, size=(8.0, 5.6))
    Ts, Ps = np.asarray(amap.points.attrs["T_grid"]), np.asarray(amap.points.attrs["P_grid"])
    pts, dev = _deviation_grid(amap, label)
    log_P = Ps.size > 1 and Ps.min() > 0 and Ps.max() / Ps.min() > 20
    if norm is None:
        norm = _deviation_norm([dev], limit)
    ax.set_facecolor(STYLE["no_data"])
    mesh = ax.pcolormesh(_edges(Ts, False), _edges(Ps, log_P) * _BAR, np.ma.masked_invalid(dev),
                         cmap=STYLE["colormap"], norm=norm, shading="flat", gid=f"deviation:{label}")
    if colorbar:
        _deviation_colorbar(ax.figure, mesh, ax, amap)
    if contours and Ts.size > 2 and Ps.size > 2:
        # contour the vapor side and the dense side apart: across the saturation line the
        # deviation jumps, and one contour of both would stack every level along it
        phase = pts.pivot_table(index="P", columns="T", values="phase_reference", aggfunc="first")
        phase = phase.reindex(index=Ps, columns=Ts).to_numpy()
        # nor through a point where the model's phase differs (marked with a cross): its
        # deviation measures where the saturation line lies, and every level would ring it
        agree = (pts.assign(agree=pts["phase_model"] == pts["phase_reference"])
                 .pivot_table(index="P", columns="T", values="agree", aggfunc="first")
                 .reindex(index=Ps, columns=Ts).to_numpy() == True)  # noqa: E712 (NaN where no point)
        for side in (phase == "vapor", (phase == "liquid") | (phase == "supercritical")):
            part = np.where(side & agree, dev, np.nan)
            if np.sum(np.isfinite(part)) < 4:
                continue
            levels = [x for x in STYLE["deviation_levels"] if np.nanmin(part) < x < np.nanmax(part)]
            if levels:
                lines = ax.contour(Ts, Ps * _BAR, np.ma.masked_invalid(part), levels=levels, colors="black",
                                   linewidths=0.6)
                unit = " %" if _map_measure(amap).relative else ""    # kJ/kg: the colour bar says it
                ax.clabel(lines, fmt=lambda x: f"{x:+g}{unit}", fontsize=7)
    differ = pts[pts["phase_model"] != pts["phase_reference"]]
    extra = []
    if len(differ):
        ax.plot(differ["T"], differ["P"] * _BAR, **STYLE["phase_differs"])
        extra.append((Line2D([], [], **STYLE["phase_differs"]), "model phase differs from reference"))
    _saturation_overlay(ax, amap, index, label, Ts)
    extra.append((Patch(facecolor=STYLE["no_data"], edgecolor="0.6"),
                  "no single-phase reference value"))
    ax._thermo_roots_extra = extra     # the figure legend of plot_accuracy_maps collects these
    if log_P:
        ax.set_yscale("log")
        plain_log_ticks(ax.yaxis)
    ax.set_xlim(_edges(Ts, False)[[0, -1]])
    ax.set_ylim(_edges(Ps, log_P)[[0, -1]] * _BAR)
    ax.set_xlabel("Temperature T [K]")
    ax.set_ylabel("Pressure P [bar]" + (" (log scale)" if log_P else ""))
    _celsius_axis(ax)
    ax.set_title(title if title is not None else
                 f"{amap.fluid.name} — {label}: deviation of {_map_measure(amap).what} from the reference equation")
    if legend:
        _deduplicated_legend(ax, extra=extra, loc="upper center", bbox_to_anchor=(0.5, -0.11), ncol=3,
                             fontsize=7.5, frameon=False)
    return ax


def plot_accuracy_maps(accuracy_map, models=None, *, figure=None, limit=None, contours=True, ncols=2):
    """Several models' accuracy maps side by side on ONE colour scale with one colour bar.

    The same colour means the same deviation in every map, so the maps can be compared at a
    glance; each map is titled by its model only, the fluid and the quantity go in the
    figure's title, and one legend under the maps explains the lines and marks.

    Parameters
    ----------
    accuracy_map : AccuracyMap
    models : sequence of str or int, optional
        Which models (labels or positions); default all, in the map's order.
    figure : matplotlib Figure, optional
        Drawn into (cleared first); default a new figure sized for the maps.
    limit : float, optional
        Colour limits ±limit [the deviation's unit: % or kJ/kg]; default the 95th percentile of
        |deviation| over all the maps shown, at least 1.
    contours : bool
    ncols : int
        Maps per row.

    Returns
    -------
    list of matplotlib.axes.Axes
        One per model; they share ``mesh.norm`` (``ax.collections[0].norm``).
    """
    amap = accuracy_map
    chosen = [_map_model(amap, m)[0] for m in (models if models is not None else amap.models)]
    if not chosen:
        raise InputError("Give at least one model to map.")
    cols = max(1, min(int(ncols), len(chosen)))
    rows = -(-len(chosen) // cols)
    if figure is None:
        import matplotlib.pyplot as plt

        figure = plt.figure(figsize=(5.3 * cols + 1.3, 4.9 * rows + 0.9), layout="constrained")
    else:
        figure.clear()
    axes = list(np.ravel(figure.subplots(rows, cols, squeeze=False)))
    for ax in axes[len(chosen):]:
        ax.set_axis_off()
    norm = _deviation_norm([_deviation_grid(amap, label)[1] for label in chosen], limit)
    for ax, label in zip(axes, chosen):
        plot_accuracy_map(amap, label, ax=ax, contours=contours, norm=norm, colorbar=False, legend=False,
                          title=label)
    used = axes[:len(chosen)]
    _deviation_colorbar(figure, used[0].collections[0], used, amap)
    figure.suptitle(f"{amap.fluid.name} — deviation of the models' {_map_measure(amap).what} from the reference "
                    "equation")
    entries = {}
    for ax in used:
        handles, names = ax.get_legend_handles_labels()
        for h, name in list(zip(handles, names)) + list(getattr(ax, "_thermo_roots_extra", [])):
            if name and not name.startswith("_"):
                entries.setdefault(name, h)
    figure.legend(list(entries.values()), list(entries), loc="outside lower center", ncol=min(4, len(entries)),
                  fontsize=7.5, frameon=False)
    return used


def _map_model(amap, model):
    """(label, position) of a model of the map, from its label or position (default the first)."""
    labels = list(amap.models)
    if model is None:
        label = labels[0]
    elif isinstance(model, (int, np.integer)) and not isinstance(model, bool) and -len(labels) <= model < len(labels):
        label = labels[model]
    elif isinstance(model, str) and model in labels:
        label = model
    else:
        raise InputError(f"No model {model!r} in this accuracy map; it has {', '.join(labels)} "
                         f"(give one of these labels or a position 0 to {len(labels) - 1}).")
    return label, labels.index(label)


def _deviation_grid(amap, label):
    """(the model's points, its deviation [the measure's unit] on the map's (P, T) grid, NaN where none)."""
    pts = amap.points[amap.points["model"] == label]
    Ts, Ps = np.asarray(amap.points.attrs["T_grid"]), np.asarray(amap.points.attrs["P_grid"])
    grid = pts.pivot_table(index="P", columns="T", values="deviation").reindex(index=Ps, columns=Ts)
    return pts, grid.to_numpy()


def _deviation_norm(grids, limit=None):
    """Diverging colour scale centred at 0, ±limit (default the 95th percentile of |dev|, at least 1)."""
    if limit is None:
        finite = np.abs(np.concatenate([g[np.isfinite(g)] for g in grids]))
        limit = max(1.0, float(np.percentile(finite, 95))) if finite.size else 1.0
    return mcolors.TwoSlopeNorm(vcenter=0.0, vmin=-limit, vmax=limit)


def _deviation_colorbar(figure, mesh, axes, amap):
    how = _map_measure(amap)
    bar = figure.colorbar(mesh, ax=axes, extend="both")
    bar.set_label(f"{how.label}\n({how.sign})")
    return bar


def _map_measure(amap):
    """The map's :class:`~thermo_roots.accuracy.Measure`."""
    return amap.measure


def _saturation_overlay(ax, amap, index, label, Ts):
    fluid = amap.fluid
    Tsat = np.linspace(max(Ts.min(), reference_limits(fluid)["T_min"]), fluid.Tc, 60)
    if Tsat[0] >= fluid.Tc:
        return
    ref = reference_saturation(fluid, T=Tsat)
    ax.plot(Tsat, np.asarray(ref.P) * _BAR, label="saturation, reference", **_outlined(**STYLE["reference"]))
    m = _map_model_object(amap, index, label)
    if m is not None and m.has_saturation:
        st = model_style(index)
        ax.plot(Tsat, saturation(m, T=Tsat).P * _BAR, label=f"saturation, {label}", gid=f"saturation:{label}",
                **_outlined(color=st["color"], linestyle=st["linestyle"], linewidth=1.6))
    ax.plot([fluid.Tc], [fluid.Pc * _BAR], label="critical point", **STYLE["critical_point"])


def _map_model_object(amap, index, label):
    """The model object the map was computed with, or None for a map that does not carry its
    models: then no model saturation curve is drawn rather than one rebuilt from a label,
    which would be another model's for a custom cubic."""
    objects = amap.model_objects
    return objects[index] if len(objects) == len(amap.models) else None


# --------------------------------------------------------------------------- closed vessel

def plot_isochore(frame, ax=None):
    """A closed vessel heated up: pressure and vapor quality against temperature.

    Takes the table of :func:`thermo_roots.sweeps.isochore`. Marks the model's
    liquid-full (or vapor-full) point and, where the table has reference columns, the
    reference pressure and the reference's own liquid-full point. The caution is printed
    under the plot: these curves are about heating closed equipment.

    Parameters
    ----------
    frame : pandas.DataFrame
        From ``sweeps.isochore``.
    ax : matplotlib Axes, optional

    Returns
    -------
    matplotlib.axes.Axes
        The pressure axes; the quality axes is its twin on the right.
    """
    if "fill_point" not in frame or "P" not in frame:
        raise InputError("plot_isochore takes the table of sweeps.isochore (it needs the columns T, P, fill_point).")
    a = frame.attrs
    ax = _new_axes(ax, size=(8.0, 5.6))
    st = model_style(0)
    label = a.get("model_short_name") or a.get("model", "model")
    shift = ""
    if a.get("volume_shift"):
        label += " (translated)"
        shift = f"\n(volume shift c = {a['volume_shift'] * 1e6:.4g} cm³/mol)"
    T = frame["T"].to_numpy()
    ax.plot(T, frame["P"] * _BAR, color=st["color"], linestyle=st["linestyle"], linewidth=st["linewidth"],
            marker=st["marker"], markersize=4, markerfacecolor="white", label=f"pressure, {label}", gid="model")
    if "reference_P" in frame:
        ok = frame["reference_available"].to_numpy(dtype=bool)
        ax.plot(T[ok], frame["reference_P"].to_numpy()[ok] * _BAR, label="pressure, reference equation",
                gid="reference", **STYLE["reference"])
    point = a.get("fill_point")
    if point:
        ax.plot([point["T"]], [point["P"] * _BAR], label=f"{point['kind']}, {label}: {_temperature_text(point['T'])}, "
                f"{point['P'] * _BAR:.4g} bar", gid="fill-point", **STYLE["fill_point"])
    ref_point = a.get("reference_fill_point")
    if ref_point:
        ax.plot([ref_point["T"]], [ref_point["P"] * _BAR], label=f"{ref_point['kind']}, reference: "
                f"{_temperature_text(ref_point['T'])}, {ref_point['P'] * _BAR:.4g} bar", gid="reference-fill-point",
                **STYLE["reference_fill_point"])
    quality = frame["quality"].to_numpy(dtype=float).copy()
    if point:  # at the liquid-full point the last vapor is gone (quality 0); at the vapor-full one, 1
        quality[frame["fill_point"].to_numpy(dtype=bool)] = 0.0 if point["kind"] == "liquid-full" else 1.0
    quality_axes = ax.twinx()
    quality_axes.plot(T, quality, label=f"vapor quality, {label}", gid="quality", **STYLE["quality"])
    quality_axes.set_ylim(0.0, _quality_top(quality))
    quality_axes.set_ylabel("Vapor quality (mass fraction of vapor) [-], dotted")
    ax.set_xlabel("Temperature T [K]")
    ax.set_ylabel("Pressure P [bar]")
    _celsius_axis(ax)
    ax.grid(True, color="0.92")
    fill = a.get("rho_mass")
    ax.set_title(f"{a.get('fluid', '')} — {label}: closed vessel at {fill:.4g} kg/m³ heated{shift}"
                 if fill else f"{a.get('fluid', '')} — {label}: closed vessel heated{shift}")
    handles, names = quality_axes.get_legend_handles_labels()
    # under the axes, clear of every curve; the caution goes under the legend
    legend = _deduplicated_legend(ax, extra=list(zip(handles, names)), loc="upper center",
                                  bbox_to_anchor=(0.5, -0.12), ncol=2, fontsize=8, frameon=False)
    rows = -(-len(legend.get_texts()) // 2)
    height_pt = ax.get_position().height * ax.figure.get_figheight() * 72.0
    _caution(ax, y=-0.15 - rows * 16.0 / height_pt)
    return ax


# --------------------------------------------------------------------------- isenthalp and isentrope

def plot_energy_path(frame, ax=None):
    """Temperature against pressure along an isenthalp (a valve) or an isentrope (an ideal
    compressor or expander), the model and, where the table has them, the reference
    equation's own (P, h) or (P, s) states; vapor quality on the right where a part is
    two-phase.

    Takes the table of :func:`thermo_roots.sweeps.isenthalp` or
    :func:`thermo_roots.sweeps.isentrope`. The first row is marked as the start.

    Parameters
    ----------
    frame : pandas.DataFrame
    ax : matplotlib Axes, optional

    Returns
    -------
    matplotlib.axes.Axes
        The temperature axes; the quality axes, when drawn, is its twin on the right.
    """
    a = frame.attrs
    kind = "h" if "h" in a and "isenthalp" in str(a.get("table", "")) else "s" if "s" in a else None
    if kind is None or "T" not in frame or "P" not in frame:
        raise InputError("plot_energy_path takes the table of sweeps.isenthalp or sweeps.isentrope "
                         "(it needs the columns T and P and attrs['h'] or attrs['s']).")
    ax = _new_axes(ax, size=(8.0, 5.6))
    st = model_style(0)
    label = a.get("model_short_name") or a.get("model", "model")
    P, T = frame["P"].to_numpy(dtype=float), frame["T"].to_numpy(dtype=float)
    ax.plot(P * _BAR, T, color=st["color"], linestyle=st["linestyle"], linewidth=st["linewidth"],
            marker=st["marker"], markersize=4, markerfacecolor="white", label=f"temperature, {label}", gid="model")
    ax.plot(P[:1] * _BAR, T[:1], label=f"start: {P[0] * _BAR:.4g} bar, {_temperature_text(T[0])}", gid="start",
            **STYLE["fill_point"])
    has_reference = "reference_T" in frame
    if has_reference:
        ok = frame["reference_available"].to_numpy(dtype=bool)
        ax.plot(P[ok] * _BAR, frame["reference_T"].to_numpy(dtype=float)[ok], label="temperature, reference "
                "equation (its own solve)", gid="reference", **STYLE["reference"])
        if not ok.any():
            _note(ax, f"reference unavailable: {frame['reference_reason'].iloc[0]}")
    T_triple = (a.get("fluid_constants") or {}).get("T_triple")
    if T_triple and np.nanmin(T) < T_triple:
        # below the triple point the real fluid freezes (dry ice for CO2) and may block the line
        limits = ax.get_ylim()
        ax.axhspan(0.0, T_triple, color="#dfe9f5", zorder=0, gid="below-triple-point",
                   label=f"below the triple point, {T_triple:.5g} K: solid may form (not modelled)")
        ax.axhline(T_triple, color="#4a6fa5", linewidth=1.0, zorder=1)
        ax.set_ylim(*limits)
    quality = frame["quality"].to_numpy(dtype=float)
    extra = []
    if np.isfinite(quality).any():
        q_ax = ax.twinx()
        q_ax.plot(P * _BAR, quality, label=f"vapor quality, {label}", gid="quality", **STYLE["quality"])
        if has_reference:
            q_ax.plot(P * _BAR, frame["reference_quality"].to_numpy(dtype=float), color="black", linewidth=0.9,
                      linestyle=(0, (1, 1)), label="vapor quality, reference", gid="reference-quality")
        q_ax.set_ylim(0.0, _quality_top(np.concatenate([quality, frame["reference_quality"].to_numpy(dtype=float)])
                                        if has_reference else quality))
        q_ax.set_ylabel("Vapor quality [-] (dotted)")
        extra = list(zip(*q_ax.get_legend_handles_labels()))
    if P.min() > 0 and P.max() / P.min() > 5:
        ax.set_xscale("log")
        plain_log_ticks(ax.xaxis)
    ax.set_xlabel("Pressure P [bar]" + (" (log scale)" if ax.get_xscale() == "log" else ""))
    ax.set_ylabel("Temperature T [K]")
    if extra:       # the right side holds the quality: the °C scale goes left of the kelvin one
        sec = ax.secondary_yaxis(-0.13, functions=(lambda k: k - _ZERO_CELSIUS, lambda c: c + _ZERO_CELSIUS))
        sec.set_ylabel("Temperature [°C]")
    else:
        _celsius_axis(ax, "y")
    ax.grid(True, which="both", color="0.92")
    value = float(a[kind])
    M = (a.get("fluid_constants") or {}).get("molar_mass")
    if kind == "h":
        what = "isenthalp (valve, expansion device)"
        text = f"h = {value / 1e3:.5g} kJ/mol" + (f" = {value / M / 1e3:.5g} kJ/kg" if M else "")
    else:
        what = "isentrope (ideal compressor or expander)"
        text = f"s = {value:.5g} J/(mol K)" + (f" = {value / M / 1e3:.5g} kJ/(kg K)" if M else "")
    compared = frame[np.isfinite(frame["deviation_T_K"])] if has_reference else frame.iloc[:0]
    if len(compared) > 1:
        end = compared.iloc[-1]         # the last state both sides have
        text += (f"\nat {end['P'] * _BAR:.4g} bar: {label} {end['T'] - _ZERO_CELSIUS:.2f} °C, reference "
                 f"{end['reference_T'] - _ZERO_CELSIUS:.2f} °C (model − reference {end['deviation_T_K']:+.2f} K)")
    ax.set_title(f"{a.get('fluid', '')} — {label}: {what}\n{text}")
    legend = _deduplicated_legend(ax, extra=extra, loc="upper center", bbox_to_anchor=(0.5, -0.12), ncol=2,
                                  fontsize=8, frameon=False)
    rows = -(-len(legend.get_texts()) // 2)
    height_pt = ax.get_position().height * ax.figure.get_figheight() * 72.0
    _caution(ax, y=-0.15 - rows * 16.0 / height_pt)
    return ax

# --------------------------------------------------------------------------- P–h and T–s diagrams

#: Lines of the two property diagrams (kept apart from :data:`STYLE`, which the other plots share).
_DIAGRAM_STYLE = {
    "dome": dict(linewidth=2.2, linestyle="-"),
    "line": dict(linewidth=1.2, linestyle="-"),
    "quality": dict(color="0.45", linewidth=0.9, linestyle=(0, (1, 2))),
    "reference": dict(color="black", linewidth=1.0, linestyle=(0, (5, 3))),
    "step": dict(color="#a3123a", linewidth=2.4),
    "reference_step": dict(color="black", linewidth=1.4, linestyle=(0, (4, 2))),
    "inlet": dict(marker="o", markersize=7, markerfacecolor="white", linestyle="none"),
    "outlet": dict(marker="s", markersize=7, markerfacecolor="white", linestyle="none"),
}
#: Characters per line of the diagrams' legend labels: the longest label of every diagram
#: ("reference equation (CoolProp): dome and isotherms") fits; longer ones are wrapped.
_DIAGRAM_LEGEND_WIDTH = 50


def _nice_step(span, count):
    """A step of 1, 2, 2.5 or 5 times a power of ten giving about ``count`` lines over ``span``."""
    raw = span / max(count, 1)
    power = 10.0 ** np.floor(np.log10(raw))
    for k in (1.0, 2.0, 2.5, 5.0, 10.0):
        if k * power >= raw:
            return k * power
    return 10.0 * power


def _diagram_range(model, fluid, reference):
    """(lowest saturation temperature drawn [K], its saturation pressure [Pa]): 0.55 Tc, the
    triple point or the reference equation's lowest temperature, whichever is highest."""
    T_lo = 0.55 * fluid.Tc
    if fluid.T_triple:
        T_lo = max(T_lo, float(fluid.T_triple))
    if reference and _has_reference(fluid) and not library_reason(fluid):
        T_lo = max(T_lo, reference_limits(fluid)["T_min"])
    return T_lo, float(saturation(model, T=T_lo).P)


def _saturation_grid(fluid, T_lo):
    """Temperatures [K] from T_lo to just below Tc, closer together near the critical point."""
    T_hi = fluid.Tc * (1.0 - 1e-4)
    bend = max(T_lo, fluid.Tc * 0.97)
    return np.unique(np.concatenate([np.linspace(T_lo, bend, 40),
                                     fluid.Tc * (1.0 - np.geomspace(1.0 - bend / fluid.Tc, 1e-4, 25))]))


def _state_columns(state, molar_mass):
    """(h [J/kg], s [J/(kg K)], T [K], P [Pa]) arrays of a State or a ReferenceState."""
    if isinstance(state, State):
        h, s = state.h_mass, state.s_mass
    else:  # the reference's energies are molar
        h, s = np.asarray(state.h, dtype=float) / molar_mass, np.asarray(state.s, dtype=float) / molar_mass
    return tuple(np.atleast_1d(np.asarray(x, dtype=float)) for x in (h, s, state.T, state.P))


def _reference_columns(ref, molar_mass):
    cols = _state_columns(ref, molar_mass)
    ok = np.atleast_1d(np.asarray(ref.available, dtype=bool))
    return tuple(np.where(ok, c, np.nan) for c in cols)


def _diagram_curve(fixed, grid, single, ends):
    """One isotherm (fixed "T") or isobar (fixed "P") as (h, s, T, P) arrays, ordered along the
    grid, with the horizontal two-phase segment between the saturated ends where it crosses
    the dome. ``single(grid)`` gives the single-phase states, ``ends()`` the saturated
    (liquid, vapor) columns or None (supercritical, no saturation)."""
    sat = ends()
    h, s, T, P = single(grid)
    if sat is None:
        return h, s, T, P
    liquid, vapor = sat
    split = liquid[2 if fixed == "P" else 3][0]     # T_sat for an isobar, P_sat for an isotherm
    if not np.isfinite(split):
        return h, s, T, P
    below = grid < split
    # along an isotherm the pressure rises from vapor to liquid; along an isobar T rises from liquid to vapor
    first, second = (vapor, liquid) if fixed == "T" else (liquid, vapor)
    pieces = [np.concatenate([c[below], a, b, c[~below]]) for c, a, b in
              zip((h, s, T, P), first, second)]
    return tuple(pieces)


def _model_curve(model, fixed, value, grid):
    fluid = model.fluid
    M = fluid.molar_mass
    other = "P" if fixed == "T" else "T"

    def single(g):
        return _state_columns(solve(model, **{fixed: np.full(g.shape, value), other: g}), M)

    def ends():
        limit = fluid.Tc if fixed == "T" else fluid.Pc
        if not model.has_saturation or value >= limit:
            return None
        try:
            saturation(model, **{fixed: value})
        except (ValueError, ArithmeticError):
            return None          # below the model's lowest saturation temperature: no dome there
        return tuple(_state_columns(solve(model, **{fixed: value, "quality": q}), M) for q in (0.0, 1.0))

    return _diagram_curve(fixed, grid, single, ends)


def _reference_curve(fluid, fixed, value, grid):
    M = fluid.molar_mass
    other = "P" if fixed == "T" else "T"
    limits = reference_limits(fluid)

    def single(g):
        return _reference_columns(reference_state(fluid, with_saturation=False,
                                                  **{fixed: np.full(g.shape, value), other: g}), M)

    def ends():
        if value >= (limits["Tc"] if fixed == "T" else limits["Pc"]):
            return None
        cols = [_reference_columns(reference_state(fluid, with_saturation=False, **{fixed: np.array([value]),
                                                                                   "quality": np.array([q])}), M)
                for q in (0.0, 1.0)]
        return None if not np.isfinite(cols[0][0][0]) else tuple(cols)

    return _diagram_curve(fixed, grid, single, ends)


def _check_diagram_model(model, caller):
    if isinstance(model, (list, tuple)):
        raise InputError(f"{caller} draws one model, got a {type(model).__name__} of {len(model)}; "
                         "draw each model on its own axes (give ax=).")
    if not isinstance(model, Model):
        raise InputError(f"{caller}(model=...) takes a model such as thermo_roots.PengRobinson(fluid), "
                         f"got {model!r}.")
    if not model.has_saturation:
        raise InputError(f"{caller} draws a saturation dome, which the ideal gas ({model!r}) does not have; "
                         "give a cubic model, e.g. thermo_roots.PengRobinson(fluid).")
    solve(model, T=model.fluid.Tc, P=model.fluid.Pc).h   # raises DomainError naming cp0 when h is unknown


def _diagram_lines(values, name, caller, unit):
    """The user's isotherm temperatures or isobar pressures, read to SI."""
    items = list(values) if isinstance(values, (list, tuple, np.ndarray)) else [values]
    try:
        out = np.array([float(to_si(v, name)) for v in items], dtype=float)
    except (ValueError, TypeError) as error:
        raise InputError(f"{caller}({name}_lines=...): {error}") from None
    if out.size == 0 or not np.all(np.isfinite(out)) or np.any(out <= 0):
        raise InputError(f"{caller}({name}_lines=...) takes positive finite values [{unit}] (or text with "
                         f"units), got {values!r}; e.g. {name}_lines=" +
                         ('["0 degC", "40 degC"].' if name == "T" else '["5 bar", "20 bar"].'))
    return np.unique(out)


def _draw_quality_lines(ax, model, T_grid, quality_lines, xy, critical, caller):
    q = np.atleast_1d(np.asarray(quality_lines if quality_lines is not None else (), dtype=float))
    if q.size and (not np.all(np.isfinite(q)) or np.any((q <= 0) | (q >= 1))):
        raise InputError(f"{caller}(quality_lines=...) takes vapor qualities strictly between 0 and 1, "
                         f"got {quality_lines!r}; e.g. quality_lines=(0.25, 0.5, 0.75), or () for none.")
    M = model.fluid.molar_mass
    for k, x in enumerate(q):
        cols = _state_columns(solve(model, T=T_grid, quality=float(x)), M)
        X, Y = xy(cols)
        X, Y = np.append(X, critical[0]), np.append(Y, critical[1])
        ax.plot(X, Y, label="lines of constant quality (model)", gid=f"quality:{x:g}", **_DIAGRAM_STYLE["quality"])
        ax.annotate(f"x = {x:g}", xy=(X[0], Y[0]), xytext=(0, 4), textcoords="offset points", ha="center",
                    va="bottom", fontsize=7, color="0.35", gid=f"quality-label:{x:g}")


def _label_on_curve(ax, X, Y, target_y, text, colour, gid, log_y):
    """Text on the curve (X, Y) at its point nearest ``target_y``, on a white patch."""
    ok = np.isfinite(X) & np.isfinite(Y)
    if not np.any(ok):
        return None
    yy = np.log(Y[ok]) if log_y else Y[ok]
    k = int(np.argmin(np.abs(yy - (np.log(target_y) if log_y else target_y))))
    x, y = X[ok][k], Y[ok][k]
    # along the curve: its direction on screen between the neighbouring points
    lo, hi = max(k - 2, 0), min(k + 2, int(np.sum(ok)) - 1)
    (x0, y0), (x1, y1) = ax.transData.transform([(X[ok][lo], Y[ok][lo]), (X[ok][hi], Y[ok][hi])])
    angle = float(np.degrees(np.arctan2(y1 - y0, x1 - x0))) if (x1, y1) != (x0, y0) else 0.0
    angle = (angle + 90.0) % 180.0 - 90.0      # upright text ...
    if angle < -80.0:
        angle += 180.0                         # ... and a steep line's label read from bottom to top
    return ax.text(x, y, text, fontsize=7.5, color=colour, ha="center", va="center", gid=gid, rotation=angle,
                   rotation_mode="anchor", zorder=6,
                   bbox=dict(boxstyle="round,pad=0.15", facecolor="white", edgecolor="none", alpha=0.85))


def _check_step(step, caller):
    """A StepResult of one inlet, or a clear error."""
    if not isinstance(step, StepResult):
        raise InputError(f"{caller}(step=...) takes a StepResult from thermo_roots.steps (throttle, compress, "
                         f"expand, heat_at_constant_volume), got {type(step).__name__}.")
    if np.ndim(step.outlet.T):
        raise InputError(f"{caller}(step=...) draws one step; this StepResult holds {np.size(step.outlet.T)} "
                         "(an array inlet); pass a step of a single inlet state.")


def _draw_step(ax, step, xy, caller):
    """The step's inlet → outlet arrow for the model and, dashed, for the reference."""
    _check_step(step, caller)
    M = step.inlet.model.fluid.molar_mass
    ends = [xy(_state_columns(s, M)) for s in (step.inlet, step.outlet)]
    (x0, y0), (x1, y1) = [(float(a[0]), float(b[0])) for a, b in ends]
    st = _DIAGRAM_STYLE["step"]
    ax.annotate("", xy=(x1, y1), xytext=(x0, y0), gid="step:model", zorder=7,
                arrowprops=dict(arrowstyle="-|>", color=st["color"], linewidth=st["linewidth"], mutation_scale=16,
                                shrinkA=0, shrinkB=0))
    if step.isentropic_outlet is not None:     # compressor, expander: the ideal machine too
        sx, sy = (float(a[0]) for a in xy(_state_columns(step.isentropic_outlet, M)))
        ax.plot([x0, sx], [y0, sy], color=st["color"], linewidth=1.0, linestyle=(0, (1, 1.5)), marker="x",
                markevery=[1], markersize=7, zorder=7, gid="step:isentropic",
                label="isentropic outlet (×), model")
    ax.plot([x0], [y0], color=st["color"], markeredgecolor=st["color"], zorder=8, gid="step-inlet",
            label=f"{step.kind} inlet", **_DIAGRAM_STYLE["inlet"])
    ax.plot([x1], [y1], color=st["color"], markeredgecolor=st["color"], zorder=8, gid="step-outlet",
            label=f"{step.kind} outlet (model)", **_DIAGRAM_STYLE["outlet"])
    x_lo, x_hi = ax.get_xlim()       # the curves are drawn: the labels point into the plot

    def left_half(x):
        return x < x_lo + 0.7 * (x_hi - x_lo)

    def left_third(x):
        return x < x_lo + 0.3 * (x_hi - x_lo)

    out = step.outlet
    text = f"outlet {float(out.T) - _ZERO_CELSIUS:.1f} °C, {float(out.P) * _BAR:.4g} bar"
    if step.isentropic_outlet is not None:
        text += f"\nisentropic efficiency {step.efficiency:g}"
    if np.isfinite(float(out.quality)):
        text += f"\nquality {float(out.quality):.3f}"
    ref_out = step.reference.outlet
    if bool(np.all(step.reference.available)) and ref_out is not None and np.isfinite(float(ref_out.T)):
        text += f"\nreference equation: {float(ref_out.T) - _ZERO_CELSIUS:.1f} °C"
        if np.isfinite(float(ref_out.quality)):
            text += f", quality {float(ref_out.quality):.3f}"
    inlet = step.inlet
    ax.annotate(f"inlet {float(inlet.T) - _ZERO_CELSIUS:.1f} °C, {float(inlet.P) * _BAR:.4g} bar",
                xy=(x0, y0), xytext=(8 if left_third(x0) else -8, 4), textcoords="offset points",
                ha="left" if left_third(x0) else "right", va="bottom", fontsize=8,
                color=st["color"], gid="step-inlet-label", zorder=8,
                bbox=dict(boxstyle="round,pad=0.2", facecolor="white", edgecolor="none", alpha=0.85))
    ax.annotate(text, xy=(x1, y1), xytext=(8 if left_half(x1) else -8, -6), textcoords="offset points", fontsize=8,
                color=st["color"], ha="left" if left_half(x1) else "right", va="top", gid="step-outlet-label", zorder=8,
                bbox=dict(boxstyle="round,pad=0.2", facecolor="white", edgecolor="none", alpha=0.85))
    ref = step.reference
    drawn = False
    if bool(np.all(ref.available)) and ref.inlet is not None and ref.outlet is not None:
        r_ends = [xy(_reference_columns(s, M)) for s in (ref.inlet, ref.outlet)]
        (r0x, r0y), (r1x, r1y) = [(float(a[0]), float(b[0])) for a, b in r_ends]
        if all(np.isfinite(v) for v in (r0x, r0y, r1x, r1y)):
            rs = _DIAGRAM_STYLE["reference_step"]
            ax.annotate("", xy=(r1x, r1y), xytext=(r0x, r0y), gid="step:reference", zorder=6.5,
                        arrowprops=dict(arrowstyle="-|>", color=rs["color"], linewidth=rs["linewidth"],
                                        linestyle=rs["linestyle"], mutation_scale=13, shrinkA=0, shrinkB=0))
            drawn = True
    handles = [(Line2D([], [], color=st["color"], linewidth=st["linewidth"], marker=">"),
                f"{step.kind}, model: inlet (circle) → outlet (square)"
                + ("; the ends only, not the heating path" if step.kind == CONSTANT_VOLUME else ""))]
    if drawn:
        rs = _DIAGRAM_STYLE["reference_step"]
        handles.append((Line2D([], [], color=rs["color"], linewidth=rs["linewidth"], linestyle=rs["linestyle"],
                               marker=">"), f"{step.kind}, reference equation (its own solve)"))
    return handles, drawn


def _draw_triple_line(ax, model, kind):
    """The triple point as a line (P–h: its pressure; T–s: its temperature) with "solid below"."""
    fluid = model.fluid
    if not fluid.T_triple:
        return
    low, high = ax.get_ylim()
    if kind == "ts":
        if not low < fluid.T_triple - _ZERO_CELSIUS < high:
            return
        ax.axhline(fluid.T_triple - _ZERO_CELSIUS, color="#5a3e1b", linewidth=0.9, linestyle=(0, (6, 2, 1, 2)),
                   label="triple point: solid below (not modelled)", gid="triple-point", zorder=1.5)
        return
    if library_reason(fluid):
        try:
            P = float(saturation(model, T=fluid.T_triple).P)
        except (ValueError, ArithmeticError):
            P = math.nan     # below the model's lowest saturation temperature
    else:
        P = reference_limits(fluid)["P_triple"]
    if np.isfinite(P) and low < P * _BAR < high:
        ax.axhline(P * _BAR, color="#5a3e1b", linewidth=0.9, linestyle=(0, (6, 2, 1, 2)),
                   label="triple point: solid below (not modelled)", gid="triple-point", zorder=1.5)


def _step_footer(step, reference_drawn):
    """(text, colour) blocks printed under a diagram with a step: the step's warnings that
    concern the outlet (not the general note on two-phase heat capacities), why the
    reference's step is missing if it is (``reference_drawn`` False; True also where the
    whole overlay is off, which is said once), and the caution."""
    blocks = []
    notes = [w for w in step.warnings if w and "have no single value" not in w]
    if notes:
        blocks.append(("Warning: " + " ".join(notes), "#a3123a"))
    if not reference_drawn:
        reason = np.asarray(step.reference.reason).flat[0] or "unavailable"
        blocks.append((f"The reference equation's step is not drawn ({reason}).", "0.3"))
    if step.kind == CONSTANT_VOLUME:
        blocks.append((VESSEL_CAUTION, "#a3123a"))
    blocks.append(("Caution: " + CAUTION, "0.25"))
    return blocks


def _draw_footer(ax, blocks, fontsize=7.0):
    """Text blocks under the axes, one after another, wrapped to the axes' width."""
    width_pt = ax.get_position().width * ax.figure.get_figwidth() * 72.0
    chars = max(40, int(width_pt / (0.52 * fontsize)))
    offset = 34.0
    for text, colour in blocks:
        lines = textwrap.wrap(text, chars)
        ax.annotate("\n".join(lines), xy=(0.0, 0.0), xycoords="axes fraction", xytext=(0.0, -offset),
                    textcoords="offset points", ha="left", va="top", fontsize=fontsize, color=colour,
                    annotation_clip=False, gid="diagram-note")
        offset += (len(lines) + 0.6) * fontsize * 1.25


def _property_diagram(model, ax, *, kind, lines, quality_lines, reference, step):
    caller = "plot_pressure_enthalpy" if kind == "ph" else "plot_temperature_entropy"
    _check_diagram_model(model, caller)
    fluid = model.fluid
    M = fluid.molar_mass
    label = model_label(model)
    with_reference = bool(reference) and not library_reason(fluid)
    ax = _new_axes(ax, size=(10.5, 6.4) if step is None else (10.5, 7.6))
    T_lo, P_lo = _diagram_range(model, fluid, with_reference)
    T_grid = _saturation_grid(fluid, T_lo)
    if kind == "ph":
        def xy(cols):
            return cols[0] / 1e3, cols[3] * _BAR
    else:
        def xy(cols):
            return cols[1] / 1e3, cols[2] - _ZERO_CELSIUS

    # the model's dome and its critical point
    colour = model_style(0)["color"]
    crit = xy(_state_columns(solve(model, T=fluid.Tc, v=model.v_c), M))
    critical = (float(crit[0][0]), float(crit[1][0]))
    for q, side in ((0.0, "liquid"), (1.0, "vapor")):
        X, Y = xy(_state_columns(solve(model, T=T_grid, quality=q), M))
        ax.plot(np.append(X, critical[0]), np.append(Y, critical[1]), color=colour,
                label=f"saturated liquid and vapor, {label}", gid=f"dome-{side}:{label}", **_DIAGRAM_STYLE["dome"])
    ax.plot([critical[0]], [critical[1]], label=f"critical point, {label}", gid="critical-point",
            **dict(STYLE["critical_point"], color=colour), zorder=6)
    _draw_quality_lines(ax, model, T_grid, quality_lines, xy, critical, caller)

    # isotherms (P–h) or isobars (T–s), each labelled on its curve; the ranges hold the step
    P_hi = 2.5 * fluid.Pc
    T_hi = 1.3 * fluid.Tc
    P_floor = 0.5 * P_lo      # the bottom of the pressure axis
    T_floor = T_lo - 5.0      # the bottom of the temperature axis
    if step is not None:
        _check_step(step, caller)
        if step.inlet.model.fluid != fluid:
            raise InputError(f"{caller}(step=...) got a step of {step.inlet.model.fluid.name} on a diagram of "
                             f"{fluid.name}; draw a step of the diagram's own fluid.")
        ends = [(float(s.T), float(s.P)) for s in (step.inlet, step.outlet)]
        P_floor = min(P_floor, 0.7 * min(P for _, P in ends))
        P_hi = max(P_hi, 1.3 * max(P for _, P in ends))
        T_floor = min(T_floor, min(T for T, _ in ends) - 5.0)
        T_hi = max(T_hi, max(T for T, _ in ends) + 5.0)
    if kind == "ph":
        fixed, unit = "T", "K"
        if lines is None:
            c_lo, c_hi = T_lo - _ZERO_CELSIUS, 1.25 * fluid.Tc - _ZERO_CELSIUS
            d = _nice_step(c_hi - c_lo, 6)
            values = np.arange(np.ceil(c_lo / d) * d, c_hi + 1e-9, d) + _ZERO_CELSIUS
        else:
            values = _diagram_lines(lines, "T", caller, unit)
        grid = np.geomspace(P_floor, P_hi, 160)
        T_hi = max(T_hi, float(np.max(values)))
    else:
        fixed, unit = "P", "Pa"
        if lines is None:
            decades = np.arange(np.floor(np.log10(P_lo)), np.ceil(np.log10(2.0 * fluid.Pc)) + 1)
            candidates = np.ravel(10.0 ** decades[:, None] * np.array([1.0, 2.0, 5.0]))
            values = candidates[(candidates >= 1.5 * P_lo) & (candidates <= 2.0 * fluid.Pc)]
            if values.size > 7:
                values = values[::2]
        else:
            values = _diagram_lines(lines, "P", caller, unit)
        grid = np.linspace(T_floor + 5.0, T_hi, 160)
        P_hi = max(P_hi, float(np.max(values)))
    colours = _temperature_colours(len(values))
    name = "isotherm" if kind == "ph" else "isobar"
    curves = []
    for value, c in zip(values, colours):
        cols = _model_curve(model, fixed, float(value), grid)
        X, Y = xy(cols)
        ax.plot(X, Y, color=c, label=f"{name}s, {label} (labelled)", gid=f"{name}:{value:g}", **_DIAGRAM_STYLE["line"])
        curves.append((value, X, Y, c))
        if with_reference:
            rX, rY = xy(_reference_curve(fluid, fixed, float(value), grid))
            ax.plot(rX, rY, label=f"reference equation (CoolProp): dome and {name}s", gid=f"reference-{name}:{value:g}",
                    **dict(_DIAGRAM_STYLE["reference"], linewidth=0.8))
    if with_reference:
        limits = reference_limits(fluid)
        ref_T = T_grid[T_grid < limits["Tc"]]
        for q, side in ((0.0, "liquid"), (1.0, "vapor")):
            rX, rY = xy(_reference_columns(reference_state(fluid, T=ref_T, quality=np.full(ref_T.shape, q),
                                                           with_saturation=False), M))
            ax.plot(rX, rY, label=f"reference equation (CoolProp): dome and {name}s", gid=f"reference-dome-{side}",
                    **_DIAGRAM_STYLE["reference"])
    extra, footer = [], []
    if reference and not with_reference:       # said under the plot, clear of the curves
        footer.append((f"No reference overlay: {library_reason(fluid)}.", "0.3"))
    if step is not None:
        extra, drawn = _draw_step(ax, step, xy, caller)
        footer += _step_footer(step, drawn or not with_reference)

    # axes, then the labels (their place depends on the limits)
    if kind == "ph":
        ax.set_yscale("log")
        ax.set_ylim(P_floor * _BAR, P_hi * _BAR)
        plain_log_ticks(ax.yaxis)
        ax.set_xlabel("Specific enthalpy h [kJ/kg]")
        ax.set_ylabel("Pressure P [bar] (log scale)")
        title = "pressure–enthalpy diagram"
        target = (P_floor * P_lo) ** 0.5 * _BAR      # under the dome's foot, on the vapor side
    else:
        ax.set_ylim(T_floor - _ZERO_CELSIUS, T_hi - _ZERO_CELSIUS)
        ax.set_xlabel("Specific entropy s [kJ/(kg K)]")
        ax.set_ylabel("Temperature T [°C]")
        title = "temperature–entropy diagram"
        target = T_lo + 0.85 * (T_hi - T_lo) - _ZERO_CELSIUS
    for k, (value, X, Y, c) in enumerate(curves):
        text = f"{value - _ZERO_CELSIUS:.0f} °C" if kind == "ph" else f"{value * _BAR:.4g} bar"
        # neighbouring isobars run close together on the vapor side: their labels alternate in height
        at = target if kind == "ph" else target - (k % 2) * 0.12 * (T_hi - T_floor)
        _label_on_curve(ax, X, Y, at, text, c, f"{name}-label:{value:g}", kind == "ph")
    _draw_triple_line(ax, model, kind)
    ax.grid(True, which="major", color="0.92")
    ax.set_axisbelow(True)
    ax.set_title(f"{fluid.name} — {title}, {label}" + (" vs reference equation (CoolProp)" if with_reference else ""))
    extra.append((Line2D([], [], color="0.3", **_DIAGRAM_STYLE["line"]),
                  f"{name}s coloured cold (dark) to hot (yellow)" if kind == "ph" else
                  f"{name}s coloured low (dark) to high pressure (yellow)"))
    # the legend sits right of the axes: its labels are wrapped to the width of the longest
    # entry every diagram has, so a long step entry adds lines, not width, and the axes (and
    # the title centred over them) keep their size whatever the step
    _deduplicated_legend(ax, extra=extra, loc="upper left", bbox_to_anchor=(1.02, 1.0), borderaxespad=0.0,
                         fontsize=8, frameon=False, wrap=_DIAGRAM_LEGEND_WIDTH)
    if footer:
        _draw_footer(ax, footer)
    return ax


def plot_pressure_enthalpy(model, ax=None, *, T_lines=None, quality_lines=(0.2, 0.4, 0.6, 0.8), reference=True,
                           step=None):
    """Pressure–enthalpy diagram of one model: dome, isotherms, lines of constant quality, a step.

    The model's saturated liquid and vapor enthalpies (its own saturation, joined at its
    critical point), isotherms through the liquid, across the dome at the saturation
    pressure and through the vapor (each labelled in °C on its curve), lines of constant
    vapor quality inside the dome, and where the fluid has a library name the reference
    equation's dome and isotherms dashed in black. A process step (a throttle's vertical
    line, a compressor's rise) is drawn as an arrow from inlet to outlet, the reference's
    own step dashed beside it; with a step the plot carries the caution and the step's
    warnings (e.g. solid forming below the triple point).

    Parameters
    ----------
    model : CubicModel
        One cubic model of a fluid with ideal-gas data (a library fluid, or a user fluid
        with ``cp0``).
    ax : matplotlib Axes, optional
    T_lines : sequence of float or str, optional
        Isotherm temperatures [K] ("40 degC" accepted); default about six round °C values
        from the bottom of the dome to 1.25 Tc.
    quality_lines : sequence of float
        Vapor qualities [-] strictly between 0 and 1; () for none.
    reference : bool
        Overlay the reference equation (skipped, with a note, for a user fluid).
    step : StepResult, optional
        From :func:`thermo_roots.steps.throttle`, ``compress``, ``expand`` or
        ``heat_at_constant_volume`` of this model.

    Returns
    -------
    matplotlib.axes.Axes
        Specific enthalpy [kJ/kg] on x, pressure [bar] on a log y axis. Lines carry gids:
        ``dome-liquid:<model>``, ``dome-vapor:<model>``, ``isotherm:<T in K>``,
        ``quality:<x>``, ``reference-dome-liquid``/``-vapor``, ``reference-isotherm:<T>``;
        labels ``isotherm-label:<T>``; arrows ``step:model`` and ``step:reference``.

    References
    ----------
    Hunter, J. D. (2007), Comput. Sci. Eng. 9, 90-95 (Matplotlib).
    Bell, I. H. et al. (2014), Ind. Eng. Chem. Res. 53, 2498-2508 (CoolProp, the reference).
    """
    return _property_diagram(model, ax, kind="ph", lines=T_lines, quality_lines=quality_lines, reference=reference,
                             step=step)


def plot_temperature_entropy(model, ax=None, *, P_lines=None, quality_lines=(0.2, 0.4, 0.6, 0.8), reference=True,
                             step=None):
    """Temperature–entropy diagram of one model: dome, isobars, lines of constant quality, a step.

    The same picture as :func:`plot_pressure_enthalpy` on temperature [°C] against specific
    entropy [kJ/(kg K)], with isobars (labelled in bar on their curves) instead of
    isotherms; an isentropic compressor or expander is a vertical arrow here.

    Parameters
    ----------
    model : CubicModel
    ax : matplotlib Axes, optional
    P_lines : sequence of float or str, optional
        Isobar pressures [Pa] ("10 bar" accepted); default round values (1, 2, 5 times a
        power of ten) from the bottom of the dome to 2 Pc.
    quality_lines : sequence of float
        Vapor qualities [-] strictly between 0 and 1; () for none.
    reference : bool
    step : StepResult, optional

    Returns
    -------
    matplotlib.axes.Axes
        gids as in :func:`plot_pressure_enthalpy`, with ``isobar:<P in Pa>`` and
        ``isobar-label:<P>``.

    References
    ----------
    Hunter, J. D. (2007), Comput. Sci. Eng. 9, 90-95 (Matplotlib).
    Bell, I. H. et al. (2014), Ind. Eng. Chem. Res. 53, 2498-2508 (CoolProp, the reference).
    """
    return _property_diagram(model, ax, kind="ts", lines=P_lines, quality_lines=quality_lines, reference=reference,
                             step=step)


# --------------------------------------------------------------------------- phase envelope

_ENVELOPE_STYLE = {
    "bubble": dict(color="#1b5e9e", linestyle="-", linewidth=2.0),
    "dew": dict(color="#c4581b", linestyle="--", linewidth=2.0),
    "critical": dict(marker="*", markersize=15, markerfacecolor="gold", markeredgecolor="black", linestyle="none",
                     zorder=6),
    "cricondenbar": dict(marker="^", markersize=9, markerfacecolor="white", markeredgecolor="black",
                         markeredgewidth=1.5, linestyle="none", zorder=6),
    "cricondentherm": dict(marker=">", markersize=9, markerfacecolor="white", markeredgecolor="black",
                           markeredgewidth=1.5, linestyle="none", zorder=6),
    "quality": dict(color="0.4", linestyle=(0, (1, 1.5)), linewidth=1.3),
    "reference_bubble": dict(marker="o", markersize=6, markerfacecolor="white", markeredgecolor="black",
                             linestyle="none", zorder=5),
    "reference_dew": dict(marker="s", markersize=6, markerfacecolor="white", markeredgecolor="black",
                          linestyle="none", zorder=5),
}
#: How many temperatures per side the reference mixture model is asked at ("auto").
_ENVELOPE_REFERENCE_POINTS = 5


def _envelope_reference(envelope, count=_ENVELOPE_REFERENCE_POINTS):
    """The reference mixture model's bubble and dew points at ``count`` temperatures per side
    (inside each side's temperature range, clear of the critical point, where its solver is
    unreliable): {"bubble": (T, P), "dew": (T, P)} of the available ones, and a note."""
    from .reference import mixture_reference_reason, reference_bubble_point, reference_dew_point

    mixture = envelope.model.components.with_fractions(envelope.z, normalize=True)
    why = mixture_reference_reason(mixture)
    if why:
        return {}, f"Reference mixture model not drawn: {why}"
    out, missing = {}, 0
    Tc = envelope.critical[0] if envelope.critical is not None else np.nan
    for side, call in (("bubble", reference_bubble_point), ("dew", reference_dew_point)):
        T_side = envelope.T[(envelope.side == side) & np.isfinite(envelope.T)]
        if T_side.size < 2:
            continue
        lo = float(T_side.min())
        # the bubble side up to short of the critical point; the dew side's lower branch, up
        # to short of the cricondentherm (CoolProp gives one dew point per temperature)
        hi = float(min(T_side.max(), Tc)) if side == "bubble" and np.isfinite(Tc) else float(T_side.max())
        T = np.linspace(lo + 0.05 * (hi - lo), hi - 0.1 * (hi - lo), count)
        ref = call(mixture, T=T)
        ok = np.asarray(ref.available, dtype=bool)
        missing += int(np.sum(~ok))
        out[side] = (np.asarray(ref.T)[ok], np.asarray(ref.P)[ok])
    note = (f"{missing} reference point{'s' if missing != 1 else ''} unavailable (CoolProp's mixture saturation "
            "solver did not converge there)." if missing else "")
    return out, note


def _label_quality_line(ax, T, P, beta):
    """The line's vapor fraction written on it, along its slope, at a height that rises with β
    (the lines start close together at low pressure; staggered labels do not collide)."""
    P_top = float(np.nanmax(P))
    target = (0.2 + 0.45 * beta) * P_top
    i = int(np.nanargmin(np.abs(P - target)))
    j = min(i + 1, P.size - 1) if i + 1 < P.size else i - 1
    (x0, y0), (x1, y1) = ax.transData.transform([(T[i] - _ZERO_CELSIUS, P[i] * _BAR),
                                                  (T[j] - _ZERO_CELSIUS, P[j] * _BAR)])
    angle = math.degrees(math.atan2(y1 - y0, x1 - x0))
    if angle > 90:
        angle -= 180
    elif angle < -90:
        angle += 180
    ax.annotate(f"{100 * beta:g} % vapor", xy=(T[i] - _ZERO_CELSIUS, P[i] * _BAR), ha="center", va="center",
                fontsize=7, color="0.25", rotation=angle, rotation_mode="anchor", gid=f"quality-label:{beta:g}",
                zorder=4, bbox=dict(boxstyle="round,pad=0.1", facecolor="white", edgecolor="none", alpha=0.9))


def _draw_envelope_triple_line(ax, envelope):
    """A vertical line at the triple point of a component making up half the feed or more, where
    it lies in the plot: the real mixture freezes near there (a cubic knows no solid)."""
    lo, hi = ax.get_xlim()
    for fluid, zi in zip(envelope.model.components.fluids, envelope.z):
        T3 = getattr(fluid, "T_triple", None)
        if zi >= 0.5 and T3 and lo < T3 - _ZERO_CELSIUS < hi:
            ax.axvline(T3 - _ZERO_CELSIUS, color="#5a3e1b", linewidth=0.9, linestyle=(0, (6, 2, 1, 2)),
                       label=f"{fluid.name} triple point: solid below (not modelled)", gid="triple-point",
                       zorder=1.5)


def plot_phase_envelope(envelope, ax=None, *, reference=None, qualities=None):
    """The phase envelope of a mixture: bubble and dew sides, critical point, cricondenbar,
    cricondentherm, lines of constant vapor fraction, and optionally the reference model's points.

    Temperature in °C on x (a kelvin scale on top), pressure in bar on y. The bubble side is a
    solid blue line, the dew side a dashed orange one; the critical point a gold star, the
    cricondenbar and cricondentherm open triangles, each labelled in words with its value;
    quality lines dotted grey, each labelled at its low-pressure end. The caution is printed
    under the axes (an envelope decides whether a line or vessel stays single-phase).

    Parameters
    ----------
    envelope : PhaseEnvelope
        From :func:`thermo_roots.equilibrium.envelope.phase_envelope`.
    ax : matplotlib Axes, optional
    reference : None, "auto" or True
        None (default): the model only. "auto" (or True): the reference mixture model's
        (CoolProp's multiparameter mixture model, GERG-2008 type) bubble and dew points at a
        handful of temperatures on each side, as open circles and squares; a mixture it does
        not cover gets a note instead.
    qualities : sequence of float, optional
        Vapor fractions [-] of the quality lines to draw: default those the envelope carries;
        lines it does not carry are traced here (the envelope is traced again with them).

    Returns
    -------
    matplotlib.axes.Axes
        Lines carry gids ``envelope-bubble``, ``envelope-dew``, ``quality:<β>``, points
        ``critical-point``, ``cricondenbar``, ``cricondentherm``, ``reference-bubble``,
        ``reference-dew``; labels ``critical-label``, ``cricondenbar-label``,
        ``cricondentherm-label``, ``quality-label:<β>``.

    References
    ----------
    Michelsen, M. L. (1980), Fluid Phase Equilib. 4, 1-10 (the envelope).
    Kunz, O. & Wagner, W. (2012), J. Chem. Eng. Data 57, 3032 (GERG-2008, the reference).
    Hunter, J. D. (2007), Comput. Sci. Eng. 9, 90-95 (Matplotlib).
    """
    from .equilibrium.envelope import PhaseEnvelope, phase_envelope

    if not isinstance(envelope, PhaseEnvelope):
        raise InputError(f"plot_phase_envelope needs a PhaseEnvelope, from phase_envelope(model); got "
                         f"{type(envelope).__name__}.")
    if reference not in (None, False, True, "auto"):
        raise InputError(f"plot_phase_envelope: reference={reference!r}; use None (model only) or 'auto'.")
    lines = dict(envelope.quality)
    if qualities is not None:
        wanted = [float(b) for b in qualities]
        missing = [b for b in wanted if b not in lines]
        if missing:
            traced = phase_envelope(envelope.model, z=envelope.z, qualities=missing,
                                    P_start=float(np.nanmin(envelope.P)))
            for beta, (T, P) in traced.quality.items():
                if envelope.critical is not None and traced.critical is not None:
                    # the line's end is the critical point: this envelope's, not the new trace's
                    T, P = np.r_[T[:-1], envelope.critical[0]], np.r_[P[:-1], envelope.critical[1]]
                lines[beta] = (T, P)
        lines = {b: lines[b] for b in wanted if b in lines}
    ax = _new_axes(ax, size=(9.0, 5.6))
    st = _ENVELOPE_STYLE
    notes = list(envelope.warnings)
    for side, label in (("bubble", "bubble points (liquid, first bubble)"),
                        ("dew", "dew points (vapor, first drop)")):
        keep = envelope.side == side
        T = np.where(keep, envelope.T, np.nan)    # NaN breaks the line where the other side runs
        ax.plot(T - _ZERO_CELSIUS, envelope.P * _BAR, label=label, gid=f"envelope-{side}", **st[side])
    x_span = float(np.nanmax(envelope.T) - np.nanmin(envelope.T))
    ax.set_xlim(np.nanmin(envelope.T) - _ZERO_CELSIUS - 0.05 * x_span,
                np.nanmax(envelope.T) - _ZERO_CELSIUS + 0.3 * x_span)
    ax.set_ylim(0.0, 1.15 * envelope.cricondenbar[1] * _BAR)
    for beta, (T, P) in sorted(lines.items()):
        ax.plot(np.asarray(T) - _ZERO_CELSIUS, np.asarray(P) * _BAR, gid=f"quality:{beta:g}",
                label="lines of constant vapor fraction", **st["quality"])
        _label_quality_line(ax, np.asarray(T), np.asarray(P), beta)
    if envelope.critical is not None:
        Tc, Pc = envelope.critical
        ax.plot([Tc - _ZERO_CELSIUS], [Pc * _BAR], gid="critical-point", label="critical point", **st["critical"])
    T_cb, P_cb = envelope.cricondenbar
    T_ct, P_ct = envelope.cricondentherm
    ax.plot([T_cb - _ZERO_CELSIUS], [P_cb * _BAR], gid="cricondenbar", label="cricondenbar (highest pressure)",
            **st["cricondenbar"])
    ax.plot([T_ct - _ZERO_CELSIUS], [P_ct * _BAR], gid="cricondentherm",
            label="cricondentherm (highest temperature)", **st["cricondentherm"])
    # labels: the critical point's to the left, the cricondentherm's to the right, the
    # cricondenbar's on the side away from the critical point
    # the critical point's label to its left (the bubble side runs below-left of it), the
    # cricondenbar's above its marker, the cricondentherm's to its right
    if envelope.critical is not None:
        ax.annotate(f"critical point\n{Tc - _ZERO_CELSIUS:.1f} °C, {Pc * _BAR:.1f} bar",
                    xy=(Tc - _ZERO_CELSIUS, Pc * _BAR), xytext=(-14, -8), textcoords="offset points", ha="right",
                    va="center", fontsize=8, gid="critical-label", zorder=7,
                    bbox=dict(boxstyle="round,pad=0.2", facecolor="white", edgecolor="none", alpha=0.85))
    ax.annotate(f"cricondenbar {P_cb * _BAR:.1f} bar at {T_cb - _ZERO_CELSIUS:.1f} °C",
                xy=(T_cb - _ZERO_CELSIUS, P_cb * _BAR), xytext=(0, 11), textcoords="offset points", ha="center",
                va="bottom", fontsize=8, gid="cricondenbar-label", zorder=7,
                bbox=dict(boxstyle="round,pad=0.2", facecolor="white", edgecolor="none", alpha=0.85))
    ax.annotate(f"cricondentherm\n{T_ct - _ZERO_CELSIUS:.1f} °C at {P_ct * _BAR:.1f} bar",
                xy=(T_ct - _ZERO_CELSIUS, P_ct * _BAR), xytext=(10, -4), textcoords="offset points", ha="left",
                va="top", fontsize=8, gid="cricondentherm-label", zorder=7,
                bbox=dict(boxstyle="round,pad=0.2", facecolor="white", edgecolor="none", alpha=0.85))
    with_reference = reference in (True, "auto")
    if with_reference:
        points, note = _envelope_reference(envelope)
        for side, label in (("bubble", "reference bubble points (CoolProp mixture model)"),
                            ("dew", "reference dew points (CoolProp mixture model)")):
            if side in points and points[side][0].size:
                T, P = points[side]
                ax.plot(T - _ZERO_CELSIUS, P * _BAR, gid=f"reference-{side}", label=label, **st[f"reference_{side}"])
        if note:
            notes.append(note)
    ax.set_xlabel("Temperature [°C]")
    ax.set_ylabel("Pressure [bar]")
    sec = ax.secondary_xaxis("top", functions=(lambda c: c + _ZERO_CELSIUS, lambda k: k - _ZERO_CELSIUS))
    sec.set_xlabel("Temperature [K]")
    _draw_envelope_triple_line(ax, envelope)
    ax.grid(True, color="0.9", linewidth=0.6)
    ax.set_axisbelow(True)
    components = " + ".join(f"{name} {zi:.3g}" for name, zi in zip(envelope.model.components.names, envelope.z))
    ax.set_title("\n".join(textwrap.wrap(f"Phase envelope — {components}, {envelope.model.name}", 80)), fontsize=10)
    ax.text(0.02, 0.97, "two phases inside the envelope,\none phase outside", transform=ax.transAxes, ha="left",
            va="top", fontsize=8, color="0.35")
    _deduplicated_legend(ax, loc="upper left", bbox_to_anchor=(1.02, 1.0), borderaxespad=0.0, fontsize=8,
                         frameon=False, wrap=32)
    blocks = [("Note: " + n, "#a3123a") for n in notes]
    blocks.append(("Caution: " + SATURATION_CAUTION, "0.25"))
    _draw_footer(ax, blocks)
    return ax
