"""Plain-text and HTML views of a solved state, in the units engineers read."""

from __future__ import annotations

import html

import numpy as np

from .phases import phase_text

#: Shown with every state a person reads: these numbers can lead to filling, heating or
#: pressurising equipment.
CAUTION = (
    "Screening estimate from a cubic equation of state: expect errors of several percent, "
    "more in liquid density. Do not fill, heat or pressurise equipment on this number alone; "
    "follow local codes and have a licensed engineer check the design."
)


def _fmt(x, scale=1.0, digits=6):
    return "-" if x is None or not np.isfinite(x) else f"{x * scale:.{digits}g}"


def state_rows(state) -> list[tuple[str, str]]:
    """(label, value with unit) rows of a scalar state."""
    if np.ndim(state.T):
        raise ValueError("state_rows shows one state; index the arrays of an array solve instead.")
    if state.reason:
        return [("Phase", str(state.phase)), ("Not solved", state.reason)]
    M = state.model.fluid.molar_mass
    rows = [
        ("Phase", phase_text(state.phase, float(state.quality))),
        ("Temperature", f"{_fmt(state.T)} K ({_fmt(state.T - 273.15)} °C)"),
        ("Pressure", f"{_fmt(state.P, 1e-5)} bar ({_fmt(state.P, 1e-6)} MPa)"),
        ("Molar volume", f"{_fmt(state.v, 1e3)} L/mol"),
        ("Molar density", f"{_fmt(state.rho, 1e-3)} mol/L"),
        ("Mass density", f"{_fmt(state.rho_mass)} kg/m³"),
        ("Specific volume", f"{_fmt(state.v / M)} m³/kg"),
        ("Compressibility factor Z", _fmt(state.Z)),
    ]
    rows += _caloric_rows(state)
    if state.phase == "two-phase":
        rows += [("Vapor quality (mole fraction)", _fmt(state.quality, digits=4)),
                 ("Saturated liquid density", f"{_fmt(M / state.v_liquid)} kg/m³"),
                 ("Saturated vapor density", f"{_fmt(M / state.v_vapor)} kg/m³")]
    elif state.T < state.model.fluid.Tc and state.P < state.model.fluid.Pc:
        if np.isfinite(state.P_sat) and np.isfinite(state.T_sat):
            margin = state.superheat
            word = "superheat" if margin >= 0 else "subcooling"
            rows += [("Saturation pressure at T", f"{_fmt(state.P_sat, 1e-5)} bar"),
                     (f"Margin to saturation ({word})", f"{_fmt(abs(margin), digits=4)} K")]
        else:
            rows.append(("Saturation pressure at T", "none from this model here (below its lowest saturation "
                                                      "temperature)"))
    if np.isfinite(state.T_other):
        rows.append(("Second temperature with this P and v", f"{_fmt(state.T_other)} K"))
    if np.isfinite(state.P_other):
        rows.append(("Second pressure with this T and h", f"{_fmt(state.P_other, 1e-5)} bar"))
    if state.metastable:
        rows.append(("Stability", "METASTABLE: between binodal and spinodal"))
    return rows


def _caloric_rows(state) -> list[tuple[str, str]]:
    """Enthalpy, entropy, heat capacities, speed of sound and Joule-Thomson coefficient, in
    the units engineers read; none for a fluid without ideal-gas heat-capacity data."""
    if state.model.fluid.ideal_gas is None:
        return [("Enthalpy, entropy", "unknown: the fluid has no ideal-gas heat capacity (give Fluid(..., cp0=...))")]
    rows = [("Specific enthalpy h", f"{_fmt(state.h_mass, 1e-3)} kJ/kg"),
            ("Specific entropy s", f"{_fmt(state.s_mass, 1e-3)} kJ/(kg K)"),
            ("Specific internal energy u", f"{_fmt(state.u_mass, 1e-3)} kJ/kg")]   # what a vessel's heat changes
    if state.phase != "two-phase":
        rows += [("Heat capacities cp, cv", f"{_fmt(state.cp_mass, 1e-3, 5)}, {_fmt(state.cv_mass, 1e-3, 5)} kJ/(kg K)"),
                 ("Speed of sound", f"{_fmt(state.w, digits=5)} m/s"),
                 ("Joule-Thomson coefficient", f"{_fmt(state.mu_jt, 1e5, 4)} K/bar")]
    return rows


def state_text(state) -> str:
    """The state as a few lines of text in engineering units, with its warnings and caution."""
    if np.ndim(state.T):
        return repr(state)
    title = f"{state.model.fluid.name}, {state.model.name}"
    width = max(len(k) for k, _ in state_rows(state))
    lines = [title] + [f"  {k.ljust(width)}  {v}" for k, v in state_rows(state)]
    lines += [f"  Warning: {w}" for w in state.warnings]
    lines.append(f"  Caution: {CAUTION}")
    return "\n".join(lines)


def state_html(state) -> str:
    """An HTML table of a state, its roots and the caution; arrays show a short note."""
    if np.ndim(state.T):
        return f"<pre>{html.escape(repr(state))}</pre>"
    title = f"{state.model.fluid.name} — {state.model.name}"
    body = "".join(f"<tr><th style='text-align:left'>{html.escape(k)}</th><td>{html.escape(v)}</td></tr>"
                   for k, v in state_rows(state))
    roots = "".join(
        f"<tr><td>{r.v * 1e3:.6g}</td><td>{r.Z:.6g}</td><td>{html.escape(r.kind)}</td>"
        f"<td>{r.ln_phi:.6g}</td><td>{'yes' if r.stable else ''}</td></tr>" for r in state.roots)
    root_table = ("<table><caption>Volume roots of the cubic at this T and P</caption>"
                  "<tr><th>v [L/mol]</th><th>Z</th><th>kind</th><th>ln φ</th><th>stable (lowest Gibbs energy)</th></tr>"
                  f"{roots}</table>")
    warnings = "".join(f"<p><b>Warning.</b> {html.escape(w)}</p>" for w in state.warnings)
    return (f"<div><table><caption>{html.escape(title)}</caption>{body}</table>{root_table}{warnings}"
            f"<p style='font-size:smaller'><b>Caution.</b> {html.escape(CAUTION)}</p></div>")
