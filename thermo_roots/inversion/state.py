"""Two knowns to a state: `solve(model, T=..., P=...)` and its result, :class:`State`.

Pairs understood: any two of T, P, v, rho, rho_mass (two volume measures excepted), quality
with T or P, and the energy pairs (P, h), (P, s), (T, h), (T, s), (h, s), (u, v) (with the
mass-basis h_mass, s_mass, u_mass and any volume measure). Inputs are SI floats or arrays,
text with units or pint quantities.

This module is the entry point and the table of known pairs -> solver. The pieces live
beside it: ``knowns`` (reading and checking the given quantities), ``pairs_volume`` and
``pairs_energy`` (one solver per pair), ``results`` (:class:`State`, :class:`Root` and the
making of one), ``phases`` (phase codes, phase words and root kinds, in one place). Every
name that was importable from here before the split still is.
"""

from __future__ import annotations

import functools

import numpy as np

from ..units import STANDARD_ATMOSPHERE
from ._problems import Problems, check_errors_option
from .knowns import (_ALL_KNOWNS, _BRANCHES, _ENERGY_KNOWNS, _POSITIVE_KNOWNS, _VOLUME_KNOWNS,  # noqa: F401
                     ENERGY_PAIRS, _all_positive_finite, _check_knowns, _check_model, _flag_unfinite,
                     _read_knowns, _unit)
from .pairs_energy import (_coldest_temperature, _from_h_s, _from_P_energy, _from_T_energy,  # noqa: F401
                           _from_u_v)
from .pairs_volume import (_bracketed, _from_P_v, _from_quality, _from_T_P, _from_T_v,  # noqa: F401
                           _grow_temperature_bracket, _isochore_peak, _isochore_slope, _lever_rule,
                           _lowest_saturation_temperature, _no_saturation_reason, _second_temperature,
                           _temperature_at, pressure_gap, temperature_bracket, volume_bracket)
from .phases import (_NOT_SOLVED_CODE, _PHASE_OBJECTS, LIQUID_LIKE, NOT_SOLVED, PHASES, UNSTABLE,  # noqa: F401
                     VAPOR_LIKE, _branch_index, _Phase, _PhaseCodes, _root_kinds, _single_phase,
                     _stable_index)
from .results import (_CALORIC_NAMES, _SINGLE_PHASE_ONLY, Root, State,  # noqa: F401
                      _caloric_on_reference, _energy_offset, _make_state, _per_mass, _root_caloric,
                      _sat_or_nan, _scalar_view, _shaped_convergence, _solid_warning, _state_caloric,
                      _two_phase_note, mixture_caloric)

# --------------------------------------------------------------------------- public entry

def solve(model, *, branch: str = "stable", atmosphere=STANDARD_ATMOSPHERE, errors: str = "nan",
          **knowns) -> State:
    """Solve the state of a model from two knowns.

    Parameters
    ----------
    model : Model (IdealGas or a CubicModel)
        A model object, e.g. ``PengRobinson(get_fluid("propane"))``.
    branch : {"stable", "liquid", "vapor"}
        For (T, P): which root to report. "stable" (default) takes the lowest Gibbs
        energy; "liquid" or "vapor" takes that root where it exists (a metastable state,
        flagged) and the only root elsewhere.
    atmosphere : float or str
        Atmospheric pressure a gauge pressure (``"8 barg"``) refers to [Pa].
    errors : {"nan", "raise"}
        For array knowns: "nan" (default) gives NaN and a reason (:attr:`State.reason`) at
        every element that cannot be solved (not finite, out of range, no convergence) and
        solves the rest; "raise" raises at the first, naming its index and value. A scalar
        solve always raises.
    **knowns
        Exactly two of T [K], P [Pa], v [m^3/mol], rho [mol/m^3], rho_mass [kg/m^3],
        quality [-] (only with T or P), or an energy pair: (P, h), (P, s), (T, h), (T, s),
        (h, s), (u, v) with h [J/mol], s [J/(mol K)], u [J/mol], their mass-basis twins
        h_mass [J/kg], s_mass [J/(kg K)], u_mass [J/kg], and any volume measure for v; floats,
        arrays, text with units or pint quantities (for an energy the unit's dimension
        decides the basis: h="250 kJ/kg" and h="18 kJ/mol" both work).

    Returns
    -------
    State

    Raises
    ------
    InputError
        Not a model, not two knowns, an unknown name, an unreadable value or unit,
        shapes that do not broadcast, or (scalar or errors="raise") a value that is not finite.
    DomainError
        (scalar or errors="raise") T or P not positive, v <= b, quality outside [0, 1],
        quality above Tc or Pc, no temperature that gives (P, v), no state that gives an
        energy pair (e.g. a (T, h) below the isotherm's minimum of h).
    ConvergenceError
        (scalar or errors="raise") An inversion did not converge (carries the root
        finder's result, in the caller's shape).

    Notes
    -----
    (P, v) -> T: at fixed v, P(T) = RT/(v-b) - a(T)/D(v) is concave in T for every alpha
    function here (a(T) is convex: constant for vdW, a_c/sqrt(Tr) for RK, and the Soave
    form's second derivative is positive), so it crosses a given P at most twice. Where the
    Soave alpha rises again past its minimum (T = Tc (1 + 1/m)^2, about 2.5 Tc for heavy
    fluids), P(T) can peak and fall: then a second, higher temperature gives the same
    (P, v). The lower one is reported as T, the other as :attr:`State.T_other` with a
    warning; where the peak lies below P, no temperature gives the state and it is
    refused with the peak pressure in the reason. The bracket of the lower root is
    T_lo = P (v-b)/R, where P(T_lo) <= P because a >= 0, up to the first of: a temperature
    where P >= P_given (starting from T_hi = (P + a(T_lo)/D)(v-b)/R, doubled), or the peak.

    The energy pairs (brackets from the physics; details in ``pairs_energy``): (P, h) and
    (P, s) bracket T (cp > 0), (u, v) brackets T (cv > 0), (T, s) brackets v (s rises with
    v along an isotherm), (h, s) brackets T along the isentrope (h rises with P and T there), each
    with the two-phase segment solved for the quality in closed form. (T, h) is not unique
    in general: along an isotherm h falls to a minimum (where mu_JT = 0) and rises again,
    so an h between that minimum and the ideal gas's h0(T) is reached at two pressures. The
    lower pressure is reported as P, the higher as :attr:`State.P_other`, with a warning;
    an h no pressure reaches is refused with the isotherm's minimum. The ideal gas's h
    depends on T alone: (T, h) is refused for it.
    References
    ----------
    Michelsen, M. L. & Mollerup, J. M. (2007), Thermodynamic Models: Fundamentals and
    Computational Aspects, 2nd ed., ch. 3 (root selection by Gibbs energy).
    Soave, G. (1972), Chem. Eng. Sci. 27, 1197-1203 (the alpha function).
    """
    _check_model(model, "solve")
    if not (isinstance(branch, str) and branch in _BRANCHES):
        raise InputError(f"branch={branch!r} is not one of {', '.join(_BRANCHES)}.")
    check_errors_option(errors)
    given = _read_knowns(model, knowns, atmosphere)
    shape = np.shape(next(iter(given.values())))
    flat = {k: np.atleast_1d(x).ravel() for k, x in given.items()}   # 1-D inside, shape restored at the end
    problems = Problems(next(iter(flat.values())).size, shape, strict=shape == () or errors == "raise")
    _check_knowns(model, flat, knowns, problems)
    pair = _PAIR_SOLVERS[frozenset(flat)]   # rho and rho_mass were turned into v
    if not problems.any:
        parts = pair(model, flat, problems, branch)
    else:   # solve the good elements only; the flagged ones stay NaN
        ok = problems.ok
        sub = Problems(int(ok.sum()), shape, problems.strict)
        parts = _scatter(pair(model, {k: x[ok] for k, x in flat.items()}, sub, branch), ok)
        problems.flag_at(np.flatnonzero(ok)[~sub.ok], sub.reason[~sub.ok])
    _flag_unfinite(model, parts, problems)
    return _make_state(model, shape, given, problems, **parts)




def _scatter(parts, ok):
    """The pair solver's values on the good elements, spread over the full flat arrays (NaN elsewhere)."""
    n = ok.size
    out = {}
    for key, x in parts.items():
        if key in ("convergence", "notes"):
            out[key] = x
            continue
        x = np.asarray(x)
        if key == "phase" and x.dtype == np.int8:
            full = np.full(n, _NOT_SOLVED_CODE, np.int8)
        elif x.dtype == object:
            full = np.full((n,) + x.shape[1:], NOT_SOLVED, dtype=object)
        elif x.dtype == bool:
            full = np.zeros((n,) + x.shape[1:], bool)
        else:
            full = np.full((n,) + x.shape[1:], np.nan)
        full[ok] = x
        out[key] = full
    out["convergence"] = _expand_convergence(parts.get("convergence"), ok)
    return out


def _expand_convergence(convergence, ok):
    """The root finder's record, (result, flat indices it covers) in the caller's flat indexing."""
    if convergence is None:
        return None
    result, covered = convergence
    return result, np.flatnonzero(ok)[covered]




#: The solver of each pair of knowns (volume measures are read as v first).
_PAIR_SOLVERS = {
    frozenset({"T", "P"}): _from_T_P,
    frozenset({"T", "v"}): _from_T_v,
    frozenset({"P", "v"}): _from_P_v,
    frozenset({"T", "quality"}): _from_quality,
    frozenset({"P", "quality"}): _from_quality,
    frozenset({"P", "h"}): functools.partial(_from_P_energy, name="h"),
    frozenset({"P", "s"}): functools.partial(_from_P_energy, name="s"),
    frozenset({"T", "h"}): functools.partial(_from_T_energy, name="h"),
    frozenset({"T", "s"}): functools.partial(_from_T_energy, name="s"),
    frozenset({"h", "s"}): _from_h_s,
    frozenset({"u", "v"}): _from_u_v,
}


