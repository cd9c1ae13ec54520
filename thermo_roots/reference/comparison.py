"""The cross-check: a solved model state beside the reference equation at the same knowns.

:func:`cross_check` picks the reference pair for the state's knowns (:func:`state_pair`),
runs the reference through the batch runner and returns a :class:`CrossCheck` of the
deviations in v, rho, P, T, h, s, cp and w, with the rows a notebook shows and the flags of
the large ones (:meth:`CrossCheck.large_deviations`).

References
----------
Bell, I. H. et al. (2014), Ind. Eng. Chem. Res. 53, 2498-2508 (CoolProp).
"""

from __future__ import annotations

import functools
import html
import math
from dataclasses import dataclass, field

import numpy as np

from ..errors import DomainError, InputError, ThermoRootsError
from ..inversion import CAUTION, State
from ..models import R, _scalar_or_array
from ..quantities import convert, quantity, unit_label
from .batch import _check_run_options, _given, evaluate_reference
from .driver import REFERENCE_PAIRS, _fluid_name, library_reason
from .states import _fluid_reference, _shape_values, _warning_text

@dataclass(frozen=True)
class CrossCheck:
    """A model state beside the reference equation at the same knowns.

    Scalars for a scalar state, arrays for an array state. Deviations are
    100 (model - reference) / reference [%]; NaN where they do not apply or the reference
    is unavailable.

    Attributes
    ----------
    available : bool
    reason : str, "" where available
    reference_v : molar volume [m^3/mol] of the reference at the state's knowns
    reference_Z : [-]
    reference_rho_mass : [kg/m^3]
    reference_P : pressure [Pa] of the reference at the knowns (at the model's (T, v)
        for states whose knowns include v)
    reference_T : temperature [K] of the reference at the knowns
    reference_phase : "liquid", "vapor", "supercritical", "two-phase" ("" if unavailable)
    deviation_v_percent : 100 (v_model - v_ref)/v_ref; NaN where the reference was given the
        volume (compare the pressure there)
    deviation_rho_percent : 100 (rho_model - rho_ref)/rho_ref, likewise
    deviation_P_percent : 100 (P_model - P_ref)/P_ref where the reference was not given P:
        states whose knowns include v, (T, quality) states (saturation pressure), (v, u);
        NaN where P was given
    deviation_T_K : T_model - T_ref [K] where the reference was not given T: (P, quality)
        states, and states compared at their (P, h), (P, s), (P, v) or (v, u) (``at=``);
        NaN where T was given
    phase_agrees : model and reference phase are the same (False where unavailable)
    reference_P_sat : saturation pressure at T [Pa], NaN at or above Tc
    reference_T_sat : saturation temperature at P [K], NaN at or above Pc
    reference_v_liquid, reference_v_vapor : saturated volumes at T [m^3/mol]
    reference_quality : vapor mole fraction [-] where the reference is two-phase
    reference_h, reference_s : enthalpy [J/mol] and entropy [J/(mol K)] of the reference at the
        knowns, on the model's reference state: the reference equation's own by default (the
        model's library-fluid values are on the same one, so they compare directly); for a
        model on IIR, ASHRAE or NBP moved to that convention with the reference equation's
        own saturated liquid (:func:`convention_offset`), so deviation_h and deviation_s never
        compare two different zeros
    reference_cp : isobaric heat capacity [J/(mol K)]; reference_w : speed of sound [m/s];
        both NaN in the two-phase region, where they have no single value
    deviation_h : h_model - h_ref [J/mol]; deviation_s : s_model - s_ref [J/(mol K)]; NaN for
        the one the reference was given (a comparison at (P, h) has no deviation_h)
    deviation_h_percent, deviation_s_percent : the same relative to |h_ref| (|s_ref|) [%],
        given only where |h_ref| >= R T (|s_ref| >= R): h and s have an arbitrary zero, and
        a percentage of a value near that zero says nothing
    deviation_cp_percent, deviation_w_percent : 100 (model - ref)/ref [%]; NaN when either
        side is two-phase
    completed : how many leading states were checked (less than the size if interrupted)
    warnings : sentences about the whole check, e.g. the fluid's constants differ from those
        of the reference equation (see :func:`constant_warnings`); () when there is nothing to say
    """

    state: object = field(repr=False)
    available: object
    reason: object
    reference_v: object
    reference_Z: object = field(repr=False)
    reference_rho_mass: object = field(repr=False)
    reference_P: object = field(repr=False)
    reference_T: object = field(repr=False)
    reference_phase: object = field(repr=False)
    deviation_v_percent: object = field(repr=False)
    deviation_rho_percent: object = field(repr=False)
    deviation_P_percent: object = field(repr=False)
    deviation_T_K: object = field(repr=False)
    phase_agrees: object = field(repr=False)
    reference_P_sat: object = field(repr=False)
    reference_T_sat: object = field(repr=False)
    reference_v_liquid: object = field(repr=False)
    reference_v_vapor: object = field(repr=False)
    reference_quality: object = field(repr=False)
    reference_h: object = field(repr=False, default=math.nan)
    reference_s: object = field(repr=False, default=math.nan)
    reference_cp: object = field(repr=False, default=math.nan)
    reference_w: object = field(repr=False, default=math.nan)
    deviation_h: object = field(repr=False, default=math.nan)
    deviation_s: object = field(repr=False, default=math.nan)
    deviation_h_percent: object = field(repr=False, default=math.nan)
    deviation_s_percent: object = field(repr=False, default=math.nan)
    deviation_cp_percent: object = field(repr=False, default=math.nan)
    deviation_w_percent: object = field(repr=False, default=math.nan)
    completed: int = field(repr=False, default=0)
    warnings: tuple = field(repr=False, default=())

    #: Names of the per-state fields, in display order (for tables).
    FIELDS = ("available", "reason", "reference_v", "reference_Z", "reference_rho_mass", "reference_P",
              "reference_T", "reference_phase", "deviation_v_percent", "deviation_rho_percent",
              "deviation_P_percent", "deviation_T_K", "phase_agrees", "reference_P_sat", "reference_T_sat",
              "reference_v_liquid", "reference_v_vapor", "reference_quality")
    #: The caloric per-state fields (kept apart from FIELDS, so tables built from FIELDS keep
    #: their columns until they take these on purpose).
    CALORIC_FIELDS = ("reference_h", "reference_s", "reference_cp", "reference_w", "deviation_h", "deviation_s",
                      "deviation_h_percent", "deviation_s_percent", "deviation_cp_percent", "deviation_w_percent")

    def __repr__(self):
        s = self.state
        name, model = _fluid_name(s.model.fluid), s.model.name
        if np.ndim(self.available):
            dev = np.asarray(self.deviation_v_percent, dtype=float)
            mean = np.nanmean(np.abs(dev)) if np.any(np.isfinite(dev)) else math.nan
            text = (f"CrossCheck({name!r}, {model}, {np.size(self.available)} states, "
                    f"{int(np.sum(self.available))} available, mean |deviation v| = {mean:.3g} %)")
        elif not self.available:
            text = f"CrossCheck({name!r}, {model}, unavailable: {self.reason})"
        else:
            main = (f"deviation P = {self.deviation_P_percent:+.3g} %" if math.isnan(self.deviation_v_percent)
                    else f"deviation v = {self.deviation_v_percent:+.3g} %")
            if math.isfinite(self.deviation_T_K):
                main += f", deviation T = {self.deviation_T_K:+.3g} K"
            text = f"CrossCheck({name!r}, {model}, {main}, phase {s.phase!r} vs reference {self.reference_phase!r})"
        return text + _warning_text(self.warnings)

    def _table(self):
        """[(row, large)]: the rows of :meth:`rows` and whether each deviation is large
        (beyond :data:`LARGE_DEVIATION_PERCENT` or :data:`LARGE_DEVIATION_K`, or phases that differ)."""
        if np.ndim(self.available):
            raise InputError("rows() shows one state; cross-check a scalar state or index the arrays "
                             "(e.g. cross_check(solve(model, T=300.0, P=1e5)).rows()).")
        s = self.state
        M = s.model.fluid.molar_mass
        nan = math.nan
        P_sat, T_sat = _model_value(s, "P_sat"), _model_value(s, "T_sat")
        v_liquid, v_vapor = _model_value(s, "v_liquid"), _model_value(s, "v_vapor")

        def fmt(x, name=None, unit=None, digits=6):
            """x (SI) in ``unit`` of quantity ``name`` (the table's display unit when None)."""
            if x is None or not np.isfinite(x):
                return "-"
            return f"{(convert(x, name, unit) if name else x):.{digits}g}"

        def head(name, unit=None, what=None):
            """ "Molar volume [L/mol]": the table's heading (or ``what``) and unit label."""
            return f"{what or quantity(name).heading} [{unit_label(name, unit) or '-'}]"

        def percent(x):
            x = float(x)
            return ("-" if not math.isfinite(x) else f"{x:+.3g} %"), math.isfinite(x) and abs(x) > LARGE_DEVIATION_PERCENT

        def kelvin(x):
            x = float(x)
            return ("-" if not math.isfinite(x) else f"{x:+.3g} K"), math.isfinite(x) and abs(x) > LARGE_DEVIATION_K

        if not self.available:
            phase = (f"unavailable: {self.reason}", False)
        elif self.phase_agrees:
            phase = ("agrees", False)
        else:
            phase = ("DIFFERS", True)
        table = [
            ("Phase", str(s.phase), self.reference_phase or "-", phase),
            (head("T", "K"), fmt(s.T, "T", "K"), fmt(self.reference_T, "T", "K"), kelvin(self.deviation_T_K)),
            (head("P"), fmt(s.P, "P"), fmt(self.reference_P, "P"), percent(self.deviation_P_percent)),
            (head("v"), fmt(s.v, "v"), fmt(self.reference_v, "v"), percent(self.deviation_v_percent)),
            (head("rho_mass"), fmt(s.rho_mass, "rho_mass"), fmt(self.reference_rho_mass, "rho_mass"),
             percent(self.deviation_rho_percent)),
            (head("Z"), fmt(s.Z), fmt(self.reference_Z), percent(_percent(s.Z, self.reference_Z))),
            (head("P", what="Saturation pressure at T"), fmt(P_sat, "P"), fmt(self.reference_P_sat, "P"),
             percent(_percent(P_sat, self.reference_P_sat))),
        ]
        table += self._caloric_rows(fmt, head, percent)
        if s.phase == "two-phase" or self.reference_phase == "two-phase":
            table += [
                (head("quality"), fmt(s.quality, digits=4), fmt(self.reference_quality, digits=4), ("-", False)),
                (head("T", "K", "Saturation temperature at P"), fmt(T_sat, "T", "K"),
                 fmt(self.reference_T_sat, "T", "K"),
                 kelvin(T_sat - self.reference_T_sat if math.isfinite(T_sat) else nan)),
                (head("rho_mass", what="Saturated liquid density"), fmt(M / v_liquid, "rho_mass"),
                 fmt(M / self.reference_v_liquid, "rho_mass"), percent(_percent(self.reference_v_liquid, v_liquid))),
                (head("rho_mass", what="Saturated vapor density"), fmt(M / v_vapor, "rho_mass"),
                 fmt(M / self.reference_v_vapor, "rho_mass"), percent(_percent(self.reference_v_vapor, v_vapor))),
            ]
        return [((q, m, r, d[0]), d[1]) for q, m, r, d in table]

    def _caloric_rows(self, fmt, head, percent):
        """Rows of h and s (difference in the display unit, and % where meaningful), cp and w
        (%; "not single-valued" when either side is two-phase)."""
        s = self.state
        rows = []
        for name, model, ref, diff, pct in (("h", _model_value(s, "h"), self.reference_h, self.deviation_h,
                                             self.deviation_h_percent),
                                            ("s", _model_value(s, "s"), self.reference_s, self.deviation_s,
                                             self.deviation_s_percent)):
            if math.isfinite(float(diff)):
                text, large = percent(pct)
                unit = unit_label(name)
                shown = f"{convert(diff, name):+.4g} {unit}" + (f" ({text})" if text != "-" else "")
            else:
                shown, large = "-", False
            rows.append((head(name), fmt(model, name), fmt(ref, name), (shown, large)))
        two_phase = s.phase == "two-phase" or self.reference_phase == "two-phase"
        for name, pct in (("cp", self.deviation_cp_percent), ("w", self.deviation_w_percent)):
            deviation = ("not single-valued (two-phase)", False) if two_phase else percent(pct)
            rows.append((head(name), fmt(_model_value(s, name), name), fmt(getattr(self, f"reference_{name}"), name),
                         deviation))
        return rows

    def rows(self) -> list[tuple[str, str, str, str]]:
        """(quantity [unit], model, reference, deviation) rows of a scalar cross-check.

        Where the reference is unavailable the Phase row's last column says
        "unavailable: <reason>" and the reference columns show "-".
        """
        return [row for row, _ in self._table()]

    def large_deviations(self) -> list[bool]:
        """One flag per row of :meth:`rows`: True where the deviation is beyond
        :data:`LARGE_DEVIATION_PERCENT` (:data:`LARGE_DEVIATION_K` for temperatures) or the
        phases differ, as the HTML table highlights them (style :data:`LARGE_DEVIATION_STYLE`,
        legend :data:`LARGE_DEVIATION_LEGEND`)."""
        return [large for _, large in self._table()]

    def _repr_html_(self):
        s = self.state
        title = html.escape(f"{_fluid_name(s.model.fluid)} — {s.model.name} against the reference equation "
                            "(CoolProp HEOS)")
        caution = f"<p style='font-size:smaller'><b>Caution.</b> {html.escape(CAUTION)}</p>"
        notes = "".join(f"<p><b>Warning.</b> {html.escape(w)}</p>" for w in self.warnings)
        if np.ndim(self.available):
            return f"<div><p><b>{title}</b></p><pre>{html.escape(repr(self))}</pre>{notes}{caution}</div>"
        head = "<tr><th>quantity</th><th>model</th><th>reference</th><th>deviation</th></tr>"
        body = []
        for row, large in self._table():
            cells = [f"<td>{html.escape(c)}</td>" for c in row[:3]]
            cells.append(f"<td style='{LARGE_DEVIATION_STYLE}'>{html.escape(row[3])}</td>" if large
                         else f"<td>{html.escape(row[3])}</td>")
            body.append("<tr>" + "".join(cells) + "</tr>")
        legend = (f"<p style='font-size:smaller'>{html.escape(LARGE_DEVIATION_LEGEND)}</p>"
                  if self.available else
                  f"<p><b>Reference unavailable.</b> {html.escape(str(self.reason))}</p>")
        return (f"<div><table><caption>{title}</caption>{head}{''.join(body)}</table>{legend}{notes}"
                f"{caution}</div>")


#: Deviations beyond this many percent (either sign) are highlighted in a cross-check's table:
#: well outside what a cubic equation usually gives for a vapor or a supercritical gas
#: (common practice: a few percent) though not unusual for liquid density.
LARGE_DEVIATION_PERCENT = 5.0
#: Temperature deviations beyond this many kelvin are highlighted likewise.
LARGE_DEVIATION_K = 2.0
LARGE_DEVIATION_LEGEND = (f"Deviations beyond ±{LARGE_DEVIATION_PERCENT:g} % (±{LARGE_DEVIATION_K:g} K for "
                          "temperatures), and a phase that differs, are shown in bold on a shaded background.")
LARGE_DEVIATION_STYLE = "font-weight:bold; background-color:#f6d6a8; color:#5a2a00"


def _model_value(state, name):
    """A model state's property, or NaN where the model has none there (e.g. no saturation
    pressure below the lowest temperature it can solve)."""
    try:
        value = getattr(state, name)
    except ThermoRootsError:
        return math.nan
    try:
        return float(value)
    except (TypeError, ValueError):
        return math.nan


def _percent(model, reference):
    with np.errstate(invalid="ignore", divide="ignore"):
        return _scalar_or_array(100.0 * (np.asarray(model, dtype=float) - reference) / reference)


def state_pair(state) -> str:
    """The reference pair for a model state: (T, P); (T, v) for any state with a volume
    known (the model's T then stands beside v), and for the energy pairs; or (T|P, quality)."""
    names = set(state.knowns)
    if "quality" in names:
        return "T,quality" if "T" in names else "P,quality"
    if names == {"T", "P"}:
        return "T,P"
    return "T,v"


#: A state's known, by name, as the reference's knowns name it (molar, volume for density).
_KNOWN_AS = {"rho": "v", "rho_mass": "v", "h_mass": "h", "s_mass": "s", "u_mass": "u"}
#: What ``at=`` takes besides one of REFERENCE_PAIRS.
AT_OPTIONS = ("default", "knowns")
#: Knowns whose numbers depend on the model's zero of energy.
_ENERGIES = ("h", "s", "u")


def knowns_pair(state) -> str:
    """The reference pair of a model state's own knowns ("P,h" for a state solved from
    (P, h_mass), "v,u" for (rho, u), ...); InputError where the reference takes no such pair."""
    names = {_KNOWN_AS.get(k, k) for k in state.knowns}
    for pair in REFERENCE_PAIRS:
        if set(pair.split(",")) == names:
            return pair
    raise InputError(f"cross_check(state, at='knowns'): the reference equation takes the pairs "
                     f"{', '.join(REFERENCE_PAIRS)}, not this state's knowns ({', '.join(state.knowns)}); use "
                     f"at='default' (the model's T and v) or a pair such as at='T,P'.")


def _known_values(state, name):
    """A known of the state in the reference's terms (SI, molar; v for rho and rho_mass)."""
    M = state.model.fluid.molar_mass
    knowns = state.knowns
    shape = np.shape(state.T)
    if name in knowns:
        x = np.asarray(knowns[name], dtype=float)
    elif f"{name}_mass" in knowns:
        x = np.asarray(knowns[f"{name}_mass"], dtype=float) * M
    elif name == "v" and "rho" in knowns:
        x = 1.0 / np.asarray(knowns["rho"], dtype=float)
    else:                                        # v from rho_mass
        x = M / np.asarray(knowns["rho_mass"], dtype=float)
    return np.broadcast_to(x, shape)


def _state_values(state, name):
    """The model state's value of a reference known (SI, molar)."""
    try:
        value = state.quality if name == "quality" else getattr(state, name)
    except DomainError as exc:
        raise InputError(f"cross_check(state, at=...): the model state has no {name} ({exc}); compare it at "
                         "at='default' or at='T,P'.") from exc
    return np.broadcast_to(np.asarray(value, dtype=float), np.shape(state.T))


def _comparison_knowns(state, at):
    """(pair, a, b) at which the reference is evaluated for ``cross_check(state, at=at)``."""
    if at == "default":
        pair = state_pair(state)
        first, second = pair.split(",")
        T, P, v = (np.asarray(getattr(state, k), dtype=float) for k in ("T", "P", "v"))
        a = T if first == "T" else P
        b = {"P": P, "v": v}.get(second)
        if b is None:
            b = np.asarray(state.knowns["quality"], dtype=float) * np.ones_like(a)
        return pair, a, b
    if at == "knowns":
        pair = knowns_pair(state)
        read = _known_values
    elif isinstance(at, str) and at in REFERENCE_PAIRS:
        pair, read = at, _state_values
    else:
        raise InputError(f"at={at!r} is not an option: give {', '.join(map(repr, AT_OPTIONS))} or one of the "
                         f"reference's pairs {', '.join(REFERENCE_PAIRS)} (e.g. at='P,h': the reference's T at "
                         "the state's pressure and enthalpy).")
    first, second = pair.split(",")
    dh, ds = convention_offset(state.model)
    shift = {"h": dh, "u": dh, "s": ds}       # u = h - P v: the same offset as h

    def known(name):
        """The model's value, moved onto the reference equation's own zero for h, s, u."""
        return read(state, name) - shift[name] if name in shift else read(state, name)

    return pair, known(first), known(second)


def convention_offset(model):
    """(dh [J/mol], ds [J/(mol K)]) that move the reference equation's own h and s (u by dh)
    onto the model's ``reference_state``, fixed with the reference equation's own saturated
    liquid, as the model fixes its own with its saturation; (0, 0) for "reference" and for a
    fluid without a reference equation, NaN where the reference has no such saturated liquid.

    References
    ----------
    IIR (h = 200 kJ/kg, s = 1 kJ/(kg K)), ASHRAE (h = s = 0 at -40 °C) and NBP (h = s = 0 at
    the normal boiling point) conventions: common practice of refrigeration tables, e.g.
    ASHRAE Handbook -- Fundamentals (2017), ch. 30.
    """
    if model.reference_state == "reference" or library_reason(model.fluid):
        return 0.0, 0.0
    return _reference_offset(model.fluid.library_name, model.reference_state, float(model.fluid.molar_mass))


@functools.lru_cache(maxsize=None)
def _reference_offset(library_name, convention, molar_mass):
    from ..models import REFERENCE_STATE_POINTS

    T0, h0, s0 = REFERENCE_STATE_POINTS[convention]
    pair, a = ("P,quality", 101325.0) if T0 is None else ("T,quality", T0)
    sat, _ = evaluate_reference(library_name, pair, [a], [0.0], with_saturation=False)
    if sat["reason"][0]:
        return math.nan, math.nan
    return h0 * molar_mass - float(sat["h"][0]), s0 * molar_mass - float(sat["s"][0])


def cross_check(state, *, at="default", progress=False, executor=None, chunk_size=None, on_interrupt="raise",
                with_saturation=True) -> CrossCheck:
    """Compare a solved model state with the fluid's reference equation at the same knowns.

    Parameters
    ----------
    state : State
        From :func:`thermo_roots.solve`, scalar or array.
    at : "default", "knowns" or a pair of :data:`REFERENCE_PAIRS`
        Where the reference is evaluated (see Notes). "default": as :func:`state_pair` says.
        "knowns": at the state's own knowns, where the reference takes that pair ((P, h),
        (P, s), (v, u), (P, v) as well as the default's): a valve outlet solved from (P, h)
        is then set beside the reference's own (P, h) state, and ``deviation_T_K`` is the
        model's outlet temperature minus the reference's. A pair such as "T,P" or "P,h":
        at the model state's values of those two (its T and P, its P and h, ...). Pairs
        with h, s or u take the model's values on its own zero and move them onto the
        reference equation's (:func:`convention_offset`). (T, P) does not fix a two-phase
        state: there the reference answers with a one-phase state.
    progress : bool or "auto"
        A tqdm progress bar over the states.
    executor : concurrent.futures.Executor, optional
        Spread the reference evaluations over workers (in chunks).
    chunk_size : int, optional
        States per chunk.
    on_interrupt : {"raise", "partial"}
        On KeyboardInterrupt, re-raise (default) or return the states checked so far
        (``completed`` tells how many; the rest are unavailable with reason
        :data:`INTERRUPTED`).
    with_saturation : bool
        Also evaluate the reference saturation at each state's T and P.

    Returns
    -------
    CrossCheck
        Unavailable where the reference has no answer (below its triple point, beyond its
        limits, solid, a user fluid); never raises for such states.

    Notes
    -----
    By default (T, P) states are compared at (T, P); states whose knowns include a volume,
    and states solved from an energy pair ((P, h), (P, s), (T, h), (u, v), ...), at the
    model's (T, v), which yields the pressure deviation (and h, s against the reference's at
    that T and v); quality states on the saturation line at the same T (or P) and quality.
    The default stays on the model's own T and v because that comparison exists for every
    pair the solver takes and needs no agreement on the zero of energy; for the outlet of a
    valve or a machine ``at="knowns"`` answers the user's question more directly (what
    temperature the reference gives at the same pressure and enthalpy).

    With ``at="knowns"`` or a pair, the reference is evaluated at those two numbers and every
    other quantity is compared: the deviations of the two given ones are NaN (they are the
    same on both sides by construction), so at (P, h) the state has deviation_T_K,
    deviation_v_percent, deviation_s and the rest, and no deviation_P_percent or deviation_h.

    References
    ----------
    Bell, I. H. et al. (2014), Ind. Eng. Chem. Res. 53, 2498-2508 (CoolProp).
    Span, R. & Wagner, W. (1996), J. Phys. Chem. Ref. Data 25, 1509-1596 (CO2); Wagner, W. &
    Pruss, A. (2002), J. Phys. Chem. Ref. Data 31, 387-535 (water): two of the reference
    equations behind it.

    A mixture state (``solve`` on a mixture model) is compared with the reference mixture
    model at the same T, P and feed by :func:`.mixture_check.cross_check_mixture` (``at`` and
    ``with_saturation`` do not apply there).
    """
    from .mixture_check import cross_check_mixture, is_mixture_state

    if is_mixture_state(state):
        return cross_check_mixture(state, progress=progress, executor=executor, chunk_size=chunk_size,
                                   on_interrupt=on_interrupt)
    _check_state(state)
    _check_run_options(progress=progress, executor=executor, chunk_size=chunk_size, on_interrupt=on_interrupt,
                       with_saturation=with_saturation)
    pair, a, b = _comparison_knowns(state, at)
    return compare_with_reference(state, pair, a, b, progress=progress, executor=executor, chunk_size=chunk_size,
                                  on_interrupt=on_interrupt, with_saturation=with_saturation)


def compare_with_reference(state, pair, a, b, *, shared=None, progress=False, executor=None, chunk_size=None,
                           on_interrupt="raise", with_saturation=True) -> CrossCheck:
    """A model state beside the reference equation at given knowns: the one place where a
    cross-check's deviations are formed (:func:`cross_check`, and the sweeps' isenthalps and
    isentropes, whose reference starts from its own inlet's h or s).

    Parameters
    ----------
    state : State
    pair : one of :data:`REFERENCE_PAIRS`
    a, b : array_like
        The reference's knowns (SI, molar), broadcast to the state's shape; h, s and u on the
        reference equation's own zero.
    shared : iterable of str, optional
        The quantities that are the same on both sides by construction (their deviations are
        NaN); default the pair's two. An isenthalp whose reference h is the reference's own
        at the inlet shares only P: its deviation_h is the two inlets' difference.
    progress, executor, chunk_size, on_interrupt, with_saturation
        As in :func:`cross_check`.

    Returns
    -------
    CrossCheck
        Its reference_h and reference_s on the model's zero (:func:`convention_offset`).
    """
    _check_run_options(progress=progress, executor=executor, chunk_size=chunk_size, on_interrupt=on_interrupt,
                       with_saturation=with_saturation)
    shape = np.shape(state.T)
    a, b = (np.broadcast_to(np.asarray(x, dtype=float), shape) for x in (a, b))
    values, completed, notes = _fluid_reference(state.model.fluid, pair, a, b, shape,
                                                with_saturation=with_saturation, progress=progress,
                                                executor=executor, chunk_size=chunk_size, on_interrupt=on_interrupt)
    dh, ds = convention_offset(state.model)
    if dh != 0.0 or ds != 0.0:              # the reference's energies on the model's zero
        values = {**values, "h": values["h"] + dh, "u": values["u"] + dh, "s": values["s"] + ds}
    if not (math.isfinite(dh) and math.isfinite(ds)):
        notes = tuple(notes) + (f"The reference equation has no saturated liquid where reference_state="
                                f"{state.model.reference_state!r} puts the zero of h and s for "
                                f"{_fluid_name(state.model.fluid)} (outside its range, e.g. below its triple "
                                "point), so h, s and u are not compared; use reference_state='reference'.",)
    shared = set(pair.split(",")) if shared is None else set(shared)
    return _combine(state, shared, values, completed, notes)


def _check_state(state):
    """A TypeError unless ``state`` is a solved State (the message says what to pass)."""
    if isinstance(state, State):
        return
    hint = (" A text is not a state: solve one first, or for the reference alone at given knowns use "
            "reference_state(get_fluid('propane'), T=300.0, P=1e5).") if isinstance(state, str) else ""
    raise TypeError(f"cross_check(state) needs a State from thermo_roots.solve(), e.g. "
                    f"cross_check(solve(PengRobinson(get_fluid('propane')), T=300.0, P=1e5)); "
                    f"got {_given(state)}.{hint}")


def _combine(state, shared, ref, completed, notes=()):
    """Deviations of the model state from reference values (flat arrays in state order);
    NaN for the quantities in ``shared`` (the same on both sides by construction)."""
    shape = np.shape(state.T)
    flat = {k: np.broadcast_to(np.asarray(getattr(state, k), dtype=float), shape).ravel() for k in ("T", "P", "v")}
    phase = np.broadcast_to(np.asarray(state.phase, dtype=object), shape).ravel()
    available = ref["reason"] == ""
    nan = np.full(flat["T"].shape, np.nan)
    with np.errstate(invalid="ignore", divide="ignore"):
        dev_v = nan if "v" in shared else 100.0 * (flat["v"] - ref["v"]) / ref["v"]
        dev_rho = nan if "v" in shared else 100.0 * (ref["v"] / flat["v"] - 1.0)
        # the pressure of a state whose P is given, and its temperature where T is, are the
        # reference's too; (T, P) states compare neither
        dev_P = nan if "P" in shared else 100.0 * (flat["P"] - ref["P"]) / ref["P"]
        dev_T = nan if "T" in shared else flat["T"] - ref["T"]
        Z = ref["P"] * ref["v"] / (R * ref["T"])
        rho_mass = state.model.fluid.molar_mass / ref["v"]
    values = dict(
        available=available, reason=ref["reason"], reference_v=ref["v"], reference_Z=Z,
        reference_rho_mass=rho_mass, reference_P=ref["P"], reference_T=ref["T"], reference_phase=ref["phase"],
        deviation_v_percent=dev_v, deviation_rho_percent=dev_rho, deviation_P_percent=dev_P,
        deviation_T_K=dev_T, phase_agrees=available & (phase == ref["phase"]),
        reference_P_sat=ref["P_sat"], reference_T_sat=ref["T_sat"], reference_v_liquid=ref["v_liquid"],
        reference_v_vapor=ref["v_vapor"], reference_quality=ref["quality"],
        **_caloric_deviations(state, ref, flat["T"], shared),
    )
    return CrossCheck(state=state, completed=completed, warnings=tuple(notes), **_shape_values(values, shape))


def _caloric_deviations(state, ref, T, shared=()):
    """The caloric fields of a cross-check (flat arrays): the reference's h, s, cp, w and the
    model's deviations from them (NaN for h or s in ``shared``). A model without ideal-gas
    data (a user fluid without cp0) has no h or s: its deviations are NaN, the reference
    values are still given."""
    n = T.shape
    try:
        model = {k: np.broadcast_to(np.asarray(getattr(state, k), dtype=float), np.shape(state.T)).ravel()
                 for k in ("h", "s", "cp", "w")}
    except DomainError:
        model = {k: np.full(n, np.nan) for k in ("h", "s", "cp", "w")}
    for name in ("h", "s"):
        if name in shared:
            model[name] = np.full(n, np.nan)
    with np.errstate(invalid="ignore", divide="ignore"):
        d_h, d_s = model["h"] - ref["h"], model["s"] - ref["s"]
        out = dict(
            reference_h=ref["h"], reference_s=ref["s"], reference_cp=ref["cp"], reference_w=ref["w"],
            deviation_h=d_h, deviation_s=d_s,
            deviation_h_percent=np.where(np.abs(ref["h"]) >= R * T, 100.0 * d_h / np.abs(ref["h"]), np.nan),
            deviation_s_percent=np.where(np.abs(ref["s"]) >= R, 100.0 * d_s / np.abs(ref["s"]), np.nan),
            deviation_cp_percent=100.0 * (model["cp"] - ref["cp"]) / ref["cp"],
            deviation_w_percent=100.0 * (model["w"] - ref["w"]) / ref["w"],
        )
    return out
