"""Layer 7: sweeps of many states into pandas tables, with the reference beside them.

Along an isotherm, an isobar, an isochore (a closed vessel heated), a (T, P) grid, the
saturation curve, an isenthalp (a valve's path) and an isentrope (an ideal compressor's).
Every function returns a :class:`pandas.DataFrame`, one row per state. Conventions:

* Column names are plain (``T``, ``P``, ``v``, ``rho_mass``, ``reference_v``,
  ``deviation_v_percent`` ...) and every value is SI. The unit of each column is in
  ``frame.attrs["units"]`` (``{"T": "K", "P": "Pa", ...}``); "-" for a dimensionless
  column, "" for text and flags.
* ``frame.attrs`` also records ``fluid`` (name), ``fluid_constants`` (Tc [K], Pc [Pa],
  omega, molar_mass [kg/mol], library_name), ``model`` (name), ``model_short_name``,
  ``volume_shift`` [m^3/mol], ``table`` (what sweep), ``version`` (of thermo_roots),
  ``caution``, ``interrupted`` and ``warnings`` (the solve's sentences, e.g. states below
  the triple point where solid may form); with the reference, ``reference_warnings`` when the
  fluid's constants differ from its reference equation's (also issued as a warning).
* Arguments are checked before any work: ``n`` a whole number of at least 2, ``log``
  None, True or False, ``reference`` True or False, ``model`` a model built for a fluid.
* Ranges: a list or array gives the values themselves (numbers in SI, or text with
  units); a tuple ``(start, stop)`` or :func:`between` gives ``n`` evenly spaced values
  (logarithmically for pressures and volumes, linearly for temperatures, unless
  ``log=`` says otherwise); a single number or text is one value.
* Where the fluid has ideal-gas data the tables carry the caloric columns h, s, u, cp, cv,
  w, mu_jt, kappa_T (molar, SI; :data:`CALORIC_COLUMNS`), and with the reference its h, s,
  cp, w and the deviations (``deviation_h`` [J/mol], ``deviation_s`` [J/(mol K)], the
  others in %).
* ``reference=True`` adds the cross-check with the reference equation per state
  (see :func:`thermo_roots.reference.cross_check`; for an isenthalp or an isentrope the
  reference equation's own (P, h) or (P, s) solve instead): ``progress`` shows a bar,
  ``executor`` spreads the work over threads, processes or a cluster's workers (any
  :class:`concurrent.futures.Executor`, e.g. a Dask client's ``get_executor()``), and an interruption (Ctrl-C, the
  notebook's stop button) returns the rows finished so far with
  ``attrs["interrupted"] = True`` and a warning.

References
----------
McKinney, W. (2010), Data Structures for Statistical Computing in Python, Proc. 9th
Python in Science Conf., 56-61 (pandas).
"""

from __future__ import annotations

import datetime
import io
import json
import warnings
from dataclasses import dataclass

import numpy as np
import pandas as pd

from .errors import DomainError, InputError
from .inversion import CAUTION, saturation, solve
from .models import Model, R
from .reference import (CrossCheck, _check_run_options, _given, compare_with_reference, cross_check, library_reason,
                        reference_limits, reference_saturation, reference_state, whole_number)
from .roots import find_root
from .quantities import QUANTITIES
from .units import to_si

#: Quantities whose ranges are spaced logarithmically by default.
_LOG_QUANTITIES = ("P", "v", "rho", "rho_mass")
#: Default number of points of a range.
DEFAULT_POINTS = 60
_REFERENCE_RENAME = {"available": "reference_available", "reason": "reference_reason"}


@dataclass(frozen=True)
class Span:
    """``n`` values from ``start`` to ``stop`` (numbers in SI or text with units).

    ``log=None`` spaces pressures and volumes logarithmically, temperatures linearly.
    """

    start: object
    stop: object
    n: int = DEFAULT_POINTS
    log: bool | None = None

    def __repr__(self):
        return f"between({self.start!r}, {self.stop!r}, n={self.n})"


def between(start, stop, n: int = DEFAULT_POINTS, log: bool | None = None) -> Span:
    """A range for a sweep: ``n`` values from ``start`` to ``stop`` inclusive.

    Parameters
    ----------
    start, stop : float or str
        SI numbers or text with units ("1 bar", "80 degC").
    n : int
        Number of values (at least 2).
    log : bool, optional
        Logarithmic spacing; default: for pressures and volumes, not for temperatures.
    """
    return Span(start, stop, check_points(n), check_log(log))


def check_points(n, name: str = "n") -> int:
    """The number of points of a range as an int: a whole number of at least 2, else a
    TypeError (not a number) or InputError (0, -1, 2.5, NaN) naming the argument."""
    return whole_number(n, name, minimum=2, example=f"{name}={DEFAULT_POINTS}")


def check_log(log, name: str = "log"):
    """``log`` is None (the default spacing), True or False."""
    if log is None or isinstance(log, (bool, np.bool_)):
        return None if log is None else bool(log)
    raise TypeError(f"{name} must be True (logarithmic spacing), False (linear) or None (logarithmic for "
                    f"pressures and volumes, linear for temperatures); got {_given(log)}.")


def check_model(model, where: str):
    """A TypeError unless ``model`` is a model built for a fluid (the message says how)."""
    if isinstance(model, Model):
        return
    if isinstance(model, type) and issubclass(model, Model):
        hint = f" This is the class; build the model for a fluid: {model.__name__}(get_fluid('propane'))."
    elif isinstance(model, str):
        hint = " A text is not a model; build one, e.g. PengRobinson(get_fluid('propane'))."
    else:
        hint = ""
    raise TypeError(f"{where}() needs a model such as PengRobinson(get_fluid('propane')) or "
                    f"IdealGas(get_fluid('nitrogen')) as its first argument; got {_given(model)}.{hint}")


def _check_sweep(model, where, *, n=DEFAULT_POINTS, log=None, reference=False, progress="auto", executor=None,
                 chunk_size=None):
    """Check the arguments every sweep shares, before any work is done."""
    check_model(model, where)
    check_points(n)
    check_log(log)
    if not isinstance(reference, (bool, np.bool_)):
        raise TypeError(f"reference must be True (add the reference equation beside each state) or False; "
                        f"got {_given(reference)}.")
    _check_run_options(progress=progress, executor=executor, chunk_size=chunk_size)


def _values(spec, quantity, *, molar_mass, n=DEFAULT_POINTS, log=None):
    """A sweep input to a 1-D SI array (see the module's conventions)."""
    if isinstance(spec, tuple):
        if len(spec) != 2:
            raise InputError(f"A range is a tuple (start, stop); got {spec!r}. For given values pass a list.")
        spec = Span(spec[0], spec[1], n, log)
    if isinstance(spec, Span):
        count = check_points(spec.n)
        lo, hi = (float(to_si(x, quantity, molar_mass=molar_mass)) for x in (spec.start, spec.stop))
        use_log = (quantity in _LOG_QUANTITIES) if spec.log is None else spec.log
        if use_log:
            if lo <= 0 or hi <= 0:
                raise DomainError(f"A logarithmic range of {quantity} needs positive ends; got {lo:.6g} to {hi:.6g}.")
            return np.geomspace(lo, hi, count)
        return np.linspace(lo, hi, count)
    if isinstance(spec, (list, np.ndarray, pd.Series, pd.Index)):
        items = list(np.asarray(spec, dtype=object).ravel())
        if not items:
            raise InputError(f"{quantity} = {spec!r} holds no values; give at least one, or a range "
                             f"({quantity}=(start, stop) with n points).")
        return np.array([float(to_si(x, quantity, molar_mass=molar_mass)) for x in items], dtype=float)
    return np.atleast_1d(np.asarray(to_si(spec, quantity, molar_mass=molar_mass), dtype=float)).ravel()


def _default_T(fluid, low, high):
    """(low Tc, high Tc) [K], the low end raised to the reference's triple point if higher."""
    lo = low * fluid.Tc
    if not library_reason(fluid):
        lo = max(lo, reference_limits(fluid)["T_min"])
    return lo, high * fluid.Tc


def _scalar(value, quantity, molar_mass=None):
    x = np.asarray(to_si(value, quantity, molar_mass=molar_mass), dtype=float)
    if x.ndim:
        raise InputError(f"{quantity} is the fixed value of this sweep; give one value, not {x.size}.")
    return float(x)


# --------------------------------------------------------------------------- frames

def _unit_of(column: str) -> str:
    """The SI unit of a column, by its name: the table of quantities' unit of the longest
    quantity name it starts with ("rho_mass_liquid" -> kg/m³, "v_root_2" -> m³/mol)."""
    if column.endswith("_percent"):
        return "%"
    if column.endswith("_K"):
        return "K"
    base = column.removeprefix("reference_").removeprefix("deviation_")
    for name in _NAMES_LONGEST_FIRST:
        if base == name or base.startswith(name + "_"):
            return QUANTITIES[name].si_label
    return ""


# Longest first, so "rho_mass" wins over "rho" and "h_mass" over "h".
_NAMES_LONGEST_FIRST = sorted(QUANTITIES, key=len, reverse=True)


def _attrs(model, table: str, **extra) -> dict:
    fluid = model.fluid
    attrs = {
        "table": table,
        "fluid": fluid.name,
        "fluid_constants": {"Tc": fluid.Tc, "Pc": fluid.Pc, "omega": fluid.omega, "molar_mass": fluid.molar_mass,
                            "library_name": fluid.library_name, "T_triple": fluid.T_triple},
        "model": model.name,
        "model_short_name": model.short_name,
        "volume_shift": float(model.c),
        "version": _version(),
        "caution": CAUTION,
        "interrupted": False,
    }
    attrs.update(extra)
    return attrs


def _version() -> str:
    from . import __version__

    return __version__


def _finish(frame: pd.DataFrame, attrs: dict) -> pd.DataFrame:
    attrs["units"] = {c: _unit_of(c) for c in frame.columns}
    frame.attrs.update(attrs)
    return frame


#: Caloric columns of a state table (where the fluid has ideal-gas data): molar, SI; NaN for
#: cp, cv, w, mu_jt and kappa_T of two-phase rows.
CALORIC_COLUMNS = ("h", "s", "u", "cp", "cv", "w", "mu_jt", "kappa_T")


def state_frame(state, *, reference=False, progress="auto", executor=None, chunk_size=None,
                table="states", extra_attrs=None) -> pd.DataFrame:
    """One row per state of a solved (array) State, optionally with the reference beside it.

    Columns: T, P, v, rho, rho_mass, Z, phase, quality, v_liquid, v_vapor, metastable,
    n_roots, v_root_1..v_root_3 (every real volume root, ascending, NaN where fewer),
    h, s, u, cp, cv, w, mu_jt, kappa_T (where the fluid has ideal-gas data), and
    with ``reference=True`` the :class:`~thermo_roots.reference.CrossCheck` fields
    (``available`` and ``reason`` as ``reference_available`` and ``reference_reason``).

    Parameters
    ----------
    state : State
    reference : bool
    progress : bool or "auto"
    executor : concurrent.futures.Executor, optional
    chunk_size : int, optional
    table : str
        Recorded in ``attrs["table"]``.

    Returns
    -------
    pandas.DataFrame
        SI values; units in ``attrs["units"]``.
    """
    from .inversion import State

    if not isinstance(state, State):
        raise TypeError(f"state_frame(state) needs a State from thermo_roots.solve(); got {_given(state)}.")
    _check_sweep(state.model, "state_frame", reference=reference, progress=progress, executor=executor,
                 chunk_size=chunk_size)
    flat = {k: np.atleast_1d(np.asarray(getattr(state, k))).ravel()
            for k in ("T", "P", "v", "rho", "rho_mass", "Z", "phase", "quality", "v_liquid", "v_vapor", "metastable")}
    roots = np.asarray(state.root_volumes, dtype=float).reshape(-1, 3)
    data = dict(flat)
    data["phase"] = flat["phase"].astype(object)
    data["n_roots"] = np.isfinite(roots).sum(axis=1)
    for i in range(3):
        data[f"v_root_{i + 1}"] = roots[:, i]
    if state.model.fluid.ideal_gas is not None:   # the caloric columns, molar, SI
        for name in CALORIC_COLUMNS:
            data[name] = np.atleast_1d(np.asarray(getattr(state, name), dtype=float)).ravel()
    frame = pd.DataFrame(data)
    attrs = _attrs(state.model, table, **(extra_attrs or {}))
    attrs["warnings"] = list(state.warnings)     # e.g. below the triple point: solid may form
    if reference:
        check = cross_check(state, progress=progress, executor=executor, chunk_size=chunk_size,
                            on_interrupt="partial")
        caloric = CrossCheck.CALORIC_FIELDS if state.model.fluid.ideal_gas is not None else ()
        frame = _with_reference(frame, attrs, check, CrossCheck.FIELDS + caloric)
    return _finish(frame, attrs)


def _with_reference(frame, attrs, check, fields):
    """The table with the cross-check's ``fields`` as columns (``available`` and ``reason`` as
    ``reference_available`` and ``reference_reason``); its warnings in ``attrs`` and said once;
    after an interrupted check (on_interrupt="partial") only the rows it finished."""
    for name in fields:
        frame[_REFERENCE_RENAME.get(name, name)] = np.atleast_1d(np.asarray(getattr(check, name))).ravel()
    if check.warnings:
        attrs["reference_warnings"] = list(check.warnings)
        for note in check.warnings:
            warnings.warn(note, UserWarning, stacklevel=4)
    if check.completed < len(frame):
        attrs["interrupted"] = True
        warnings.warn(f"Interrupted: the reference cross-check finished {check.completed} of "
                      f"{len(frame)} states; the table holds those rows.", stacklevel=4)
        frame = frame.iloc[:check.completed].copy()
    return frame


def isotherm(model, T, P=None, v=None, *, n=DEFAULT_POINTS, log=None, branch="stable", reference=False,
             progress="auto", executor=None, chunk_size=None) -> pd.DataFrame:
    """States along an isotherm, by pressure or by molar volume.

    Parameters
    ----------
    model : IdealGas or CubicModel
    T : float or str
        The temperature [K].
    P : range, optional
        Pressures [Pa]; the default is Pc/1000 to 3 Pc, logarithmic.
    v : range, optional
        Molar volumes [m^3/mol] instead of pressures (inside the dome the states are
        two-phase at the saturation pressure). Give P or v, not both.
    n, log : int, bool
        Points and spacing of a (start, stop) range.
    branch : {"stable", "liquid", "vapor"}
        Root choice for (T, P) states, as in :func:`thermo_roots.solve`.
    reference, progress, executor, chunk_size
        The reference cross-check (module conventions).

    Returns
    -------
    pandas.DataFrame
        Columns as in :func:`state_frame`; ``attrs["T"]`` the temperature [K].

    References
    ----------
    Michelsen, M. L. & Mollerup, J. M. (2007), Thermodynamic Models, 2nd ed., ch. 3.
    """
    _check_sweep(model, "isotherm", n=n, log=log, reference=reference, progress=progress, executor=executor,
                 chunk_size=chunk_size)
    if P is not None and v is not None:
        raise InputError("isotherm() takes P or v, not both.")
    T = _scalar(T, "T")
    M = model.fluid.molar_mass
    if v is not None:
        state = solve(model, T=T, v=_values(v, "v", molar_mass=M, n=n, log=log))
    else:
        P = (model.fluid.Pc / 1000.0, 3.0 * model.fluid.Pc) if P is None else P
        state = solve(model, T=T, P=_values(P, "P", molar_mass=M, n=n, log=log), branch=branch)
    return state_frame(state, reference=reference, progress=progress, executor=executor, chunk_size=chunk_size,
                       table=f"isotherm at T = {T:.6g} K", extra_attrs={"T": T})


def isobar(model, P, T=None, *, n=DEFAULT_POINTS, log=None, branch="stable", reference=False,
           progress="auto", executor=None, chunk_size=None) -> pd.DataFrame:
    """States along an isobar.

    Parameters
    ----------
    model : IdealGas or CubicModel
    P : float or str
        The pressure [Pa] ("8 barg" is read against the standard atmosphere).
    T : range, optional
        Temperatures [K]; default 0.5 Tc (or the reference's triple point, if higher) to 1.5 Tc.
    n, log, branch, reference, progress, executor, chunk_size
        As in :func:`isotherm`.

    Returns
    -------
    pandas.DataFrame
        ``attrs["P"]`` the pressure [Pa].
    """
    _check_sweep(model, "isobar", n=n, log=log, reference=reference, progress=progress, executor=executor,
                 chunk_size=chunk_size)
    P = _scalar(P, "P")
    T = _values(_default_T(model.fluid, 0.5, 1.5) if T is None else T, "T", molar_mass=None, n=n, log=log)
    state = solve(model, T=T, P=P, branch=branch)
    return state_frame(state, reference=reference, progress=progress, executor=executor, chunk_size=chunk_size,
                       table=f"isobar at P = {P:.6g} Pa", extra_attrs={"P": P})


def state_grid(model, T, P, *, n=DEFAULT_POINTS, log=None, branch="stable", reference=False,
               progress="auto", executor=None, chunk_size=None) -> pd.DataFrame:
    """States on every (T, P) pair of two ranges, one row each (T varies slowest).

    Parameters
    ----------
    model : IdealGas or CubicModel
    T : range
        Temperatures [K].
    P : range
        Pressures [Pa].
    n, log, branch, reference, progress, executor, chunk_size
        As in :func:`isotherm` (``n`` and ``log`` apply to each range).

    Returns
    -------
    pandas.DataFrame
        ``attrs["grid_shape"]`` is (number of T, number of P).
    """
    _check_sweep(model, "state_grid", n=n, log=log, reference=reference, progress=progress, executor=executor,
                 chunk_size=chunk_size)
    Ts = _values(T, "T", molar_mass=None, n=n, log=log)
    Ps = _values(P, "P", molar_mass=None, n=n, log=log)
    TT, PP = np.meshgrid(Ts, Ps, indexing="ij")
    state = solve(model, T=TT.ravel(), P=PP.ravel(), branch=branch)
    return state_frame(state, reference=reference, progress=progress, executor=executor, chunk_size=chunk_size,
                       table="state grid", extra_attrs={"grid_shape": [len(Ts), len(Ps)]})


def isochore(model, v=None, *, rho=None, rho_mass=None, T=None, n=DEFAULT_POINTS, log=None, reference=False,
             progress="auto", executor=None, chunk_size=None) -> pd.DataFrame:
    """A closed vessel heated up: states at fixed molar volume along temperature.

    Below Tc a vessel filled more densely than the critical density holds liquid and
    vapor until the liquid has expanded to fill it (the *liquid-full* point), after which
    the pressure climbs steeply with temperature; one filled less densely dries out
    instead (the *vapor-full* point). That point is inserted as a row of its own
    (column ``fill_point`` True) and recorded in ``attrs["fill_point"]``:
    {"kind": "liquid-full" | "vapor-full", "T" [K], "P" [Pa]}, or None where the sweep has
    none. With ``reference=True``, ``attrs["reference_fill_point"]`` gives the reference
    equation's point (its saturated volume equal to the vessel's).

    Parameters
    ----------
    model : CubicModel or IdealGas
    v, rho, rho_mass : float or str
        Exactly one: molar volume [m^3/mol], molar density [mol/m^3] or mass density
        (fill mass over vessel volume) [kg/m^3].
    T : range, optional
        Temperatures [K]; default 0.6 Tc (or the reference's triple point, if higher) to 1.3 Tc.
    n, log, reference, progress, executor, chunk_size
        As in :func:`isotherm`.

    Returns
    -------
    pandas.DataFrame
        Columns as in :func:`state_frame` plus ``fill_point``.

    References
    ----------
    Michelsen, M. L. & Mollerup, J. M. (2007), Thermodynamic Models, 2nd ed., ch. 3; the
    hydraulic overpressure of a liquid-full vessel is common practice in pressure-relief design.
    """
    _check_sweep(model, "isochore", n=n, log=log, reference=reference, progress=progress, executor=executor,
                 chunk_size=chunk_size)
    given = {k: x for k, x in (("v", v), ("rho", rho), ("rho_mass", rho_mass)) if x is not None}
    if len(given) != 1:
        raise InputError(f"isochore() takes exactly one of v, rho, rho_mass; got {', '.join(given) or 'none'}.")
    (name, value), = given.items()
    M = model.fluid.molar_mass
    x = _scalar(value, name, M)
    v_fixed = {"v": x, "rho": 1.0 / x, "rho_mass": M / x}[name]
    Ts = _values(_default_T(model.fluid, 0.6, 1.3) if T is None else T, "T", molar_mass=None, n=n, log=log)
    point = fill_point(model, v_fixed, T_range=(Ts.min(), Ts.max()))
    fill = np.zeros(Ts.size, bool)
    if point is not None:
        at = np.searchsorted(Ts, point["T"]) if np.all(np.diff(Ts) >= 0) else Ts.size
        Ts = np.insert(Ts, at, point["T"])
        fill = np.insert(fill, at, True)
    state = solve(model, T=Ts, v=np.full(Ts.shape, v_fixed))
    extra = {"v": v_fixed, "rho_mass": M / v_fixed, "fill_point": point}
    if reference:
        extra["reference_fill_point"] = reference_fill_point(model.fluid, v_fixed, T_range=(Ts.min(), Ts.max()))
    frame = state_frame(state, reference=reference, progress=progress, executor=executor, chunk_size=chunk_size,
                        table=f"isochore at v = {v_fixed:.6g} m³/mol ({M / v_fixed:.6g} kg/m³)", extra_attrs=extra)
    frame["fill_point"] = fill[:len(frame)]
    return _finish(frame, dict(frame.attrs))


# --------------------------------------------------------------------------- isenthalp and isentrope

#: The cross-check fields of an isenthalp or isentrope table (the reference equation's own
#: (P, h) or (P, s) solve at each pressure), in order; their columns are
#: :data:`ENERGY_REFERENCE_COLUMNS`.
ENERGY_REFERENCE_FIELDS = ("available", "reason", "reference_T", "reference_v", "reference_rho_mass", "reference_Z",
                           "reference_phase", "reference_quality", "reference_h", "reference_s", "reference_cp",
                           "reference_w", "deviation_T_K", "deviation_v_percent", "deviation_rho_percent",
                           "phase_agrees", "deviation_h", "deviation_s", "deviation_cp_percent",
                           "deviation_w_percent")
#: Reference columns of an isenthalp or isentrope table, in order.
ENERGY_REFERENCE_COLUMNS = tuple(_REFERENCE_RENAME.get(name, name) for name in ENERGY_REFERENCE_FIELDS)


def isenthalp(model, h=None, *, h_mass=None, inlet=None, P=None, n=DEFAULT_POINTS, log=None, reference=False,
              progress="auto", executor=None, chunk_size=None) -> pd.DataFrame:
    """States at one enthalpy along pressure: the path through a valve, an expansion device or
    a pressure regulator (a throttle exchanges no heat and no work, so h is the same at the
    outlet as at the inlet).

    Parameters
    ----------
    model : Model
        A model of a fluid with ideal-gas heat capacity data (a library fluid, or ``cp0=``).
    h, h_mass : float or str
        Exactly one of these or ``inlet``: the molar enthalpy [J/mol] or the specific enthalpy
        [J/kg]; text with either basis ("250 kJ/kg", "18 kJ/mol": the unit decides). On the
        model's reference state (the reference equation's own by default).
    inlet : State
        A scalar state of this model (e.g. ``solve(model, T="30 degC", P="10 bar")``): its h is
        kept, and the reference starts from its own inlet at the same knowns.
    P : range, optional
        Pressures [Pa]; default from the inlet's pressure down to a tenth of it (without an
        inlet: Pc/100 to Pc), logarithmic.
    n, log : int, bool
        Points and spacing of a (start, stop) range.
    reference : bool
        Add the reference equation's own (P, h) solve at each pressure
        (:data:`ENERGY_REFERENCE_COLUMNS`): its T, v, phase, quality, h, s, cp, w, and the
        model's deviations from them (deviation_T_K = T - reference_T [K]; deviation_h,
        deviation_s in J/mol and J/(mol K); the others in %). With ``inlet`` the reference's h
        is its own at the inlet's knowns, so the two columns of T compare the same valve, and
        deviation_h is the two inlets' difference; without one it is the same number (on the
        reference equation's zero) and deviation_h is NaN. The columns are the fields of
        :func:`~thermo_roots.reference.compare_with_reference` (:data:`ENERGY_REFERENCE_FIELDS`);
        an interrupted reference run keeps the rows it finished (``attrs["interrupted"]``).
    progress, executor, chunk_size
        For the reference evaluations (module conventions).

    Returns
    -------
    pandas.DataFrame
        Columns as in :func:`state_frame`, ascending or descending in P as given;
        ``attrs["h"]`` [J/mol] (and ``attrs["reference_h"]`` with the reference).

    References
    ----------
    Smith, J. M., Van Ness, H. C. & Abbott, M. M. (2005), Introduction to Chemical Engineering
    Thermodynamics, 7th ed., sec. 7.3 (throttling processes).
    """
    return _energy_sweep(model, "h", h, h_mass, inlet, P, 0.1, n=n, log=log, reference=reference,
                         progress=progress, executor=executor, chunk_size=chunk_size, where="isenthalp")


def isentrope(model, s=None, *, s_mass=None, inlet=None, P=None, n=DEFAULT_POINTS, log=None, reference=False,
              progress="auto", executor=None, chunk_size=None) -> pd.DataFrame:
    """States at one entropy along pressure: the path of an ideal (reversible, adiabatic)
    compressor or expander.

    Parameters
    ----------
    model : Model
    s, s_mass : float or str
        Exactly one of these or ``inlet``: the molar entropy [J/(mol K)] or the specific entropy
        [J/(kg K)]; text with either basis ("1.2 kJ/(kg K)").
    inlet : State
        A scalar state of this model: its s is kept, and the reference starts from its own
        inlet at the same knowns.
    P : range, optional
        Pressures [Pa]; default from the inlet's pressure up to ten times it (without an inlet:
        Pc/100 to Pc), logarithmic.
    n, log, reference, progress, executor, chunk_size
        As in :func:`isenthalp` (the reference's own (P, s) solve).

    Returns
    -------
    pandas.DataFrame
        ``attrs["s"]`` [J/(mol K)] (and ``attrs["reference_s"]`` with the reference).

    References
    ----------
    Smith, J. M., Van Ness, H. C. & Abbott, M. M. (2005), Introduction to Chemical Engineering
    Thermodynamics, 7th ed., sec. 7.3 (turbines and compressors).
    """
    return _energy_sweep(model, "s", s, s_mass, inlet, P, 10.0, n=n, log=log, reference=reference,
                         progress=progress, executor=executor, chunk_size=chunk_size, where="isentrope")


def _energy_sweep(model, name, value, value_mass, inlet, P, ratio, *, n, log, reference, progress, executor,
                  chunk_size, where):
    """The table of an isenthalp (name "h") or an isentrope ("s") along pressure."""
    from .inversion import State

    _check_sweep(model, where, n=n, log=log, reference=reference, progress=progress, executor=executor,
                 chunk_size=chunk_size)
    given = {k: x for k, x in ((name, value), (f"{name}_mass", value_mass), ("inlet", inlet)) if x is not None}
    if len(given) != 1:
        raise InputError(f"{where}() takes exactly one of {name}, {name}_mass, inlet; got "
                         f"{', '.join(given) or 'none'}. E.g. {where}(model, inlet=solve(model, T='30 degC', "
                         f"P='10 bar')) or {where}(model, {QUANTITIES[name + '_mass'].name}="
                         f"'{QUANTITIES[name + '_mass'].example}').")
    fluid = model.fluid
    M = fluid.molar_mass
    if inlet is not None:
        if not isinstance(inlet, State) or np.ndim(inlet.T):
            raise TypeError(f"inlet must be one state of the model, e.g. solve(model, T='30 degC', P='10 bar'); "
                            f"got {_given(inlet)}.")
        if inlet.model is not model:
            raise InputError(f"inlet was solved with {inlet.model!r}, not with {model!r}; solve it with the "
                             "model of the sweep.")
        fixed = float(getattr(inlet, name))
        P_default = (float(inlet.P), ratio * float(inlet.P))
    else:
        key, x = next(iter(given.items()))
        fixed = _scalar(x, name, M) if key == name else _scalar(x, key, M) * M   # J/kg · kg/mol = J/mol
        P_default = (fluid.Pc / 100.0, fluid.Pc)
    if not np.isfinite(fixed):
        raise InputError(f"{where}() needs a finite {name}; got {fixed!r}.")
    if reference and inlet is None and model.reference_state != "reference":
        raise InputError(f"{where}(reference=True) with {name} given as a number compares it with the reference "
                         f"equation's {name} at the same number, which is on another zero than this model's "
                         f"reference_state={model.reference_state!r}; give inlet= (the reference then starts from "
                         "its own inlet) or use a model with reference_state='reference'.")
    Ps = _values(P_default if P is None else P, "P", molar_mass=M, n=n, log=log)
    state = solve(model, P=Ps, **{name: np.full(Ps.shape, fixed)})
    unit = QUANTITIES[name].si_label
    extra = {name: fixed}
    frame = state_frame(state, table=f"{where} at {name} = {fixed:.6g} {unit}", extra_attrs=extra)
    attrs = dict(frame.attrs)
    if reference:
        ref_fixed = _reference_energy(fluid, name, inlet, fixed)
        attrs[f"reference_{name}"] = ref_fixed
        # the reference's own (P, h) or (P, s) solve; with an inlet its h (s) is its own at the
        # inlet, so only P is shared and deviation_h (deviation_s) is the two inlets' difference
        check = compare_with_reference(state, f"P,{name}", Ps, np.full(Ps.shape, ref_fixed),
                                       shared=("P",) if inlet is not None else ("P", name), with_saturation=False,
                                       progress=progress, executor=executor, chunk_size=chunk_size,
                                       on_interrupt="partial")
        frame = _with_reference(frame, attrs, check, ENERGY_REFERENCE_FIELDS)
    return _finish(frame, attrs)


def _reference_energy(fluid, name, inlet, fixed):
    """The reference equation's h or s of the sweep: its own at the inlet's knowns, else ``fixed``."""
    if inlet is None or library_reason(fluid):
        return fixed
    if inlet.phase == "two-phase":
        knowns = {"T": inlet.T, "quality": inlet.quality}
    else:
        knowns = {"T": inlet.T, "P": inlet.P}
    start = reference_state(fluid, with_saturation=False, **knowns)
    return float(getattr(start, name)) if start.available else np.nan


def _fill_temperature(saturated_volume, v, T_lo, T_hi):
    """T where a saturated volume of T equals v, in [T_lo, T_hi] (None when no sign change)."""
    def gap(T):
        return saturated_volume(np.asarray(T, dtype=float)) / v - 1.0

    g_lo, g_hi = gap(T_lo), gap(T_hi)
    if not (np.isfinite(g_lo) and np.isfinite(g_hi)) or g_lo * g_hi > 0:
        return None
    result = find_root(gap, bracket=(T_lo, T_hi), xtol=1e-9, rtol=1e-12)
    return float(result.root) if result.converged else None


def fill_point(model, v, T_range=None):
    """Where a closed vessel at molar volume v [m^3/mol] stops being two-phase in the model.

    Returns {"kind": "liquid-full" | "vapor-full", "T" [K], "P" [Pa]} or None when the
    vessel crosses no saturation line within ``T_range`` [K] (default 0.3 Tc to Tc).
    """
    if not model.has_saturation:
        return None
    Tc = model.fluid.Tc
    lo, hi = T_range if T_range is not None else (0.3 * Tc, Tc)
    lo, hi = max(lo, 0.3 * Tc), min(hi, Tc * (1.0 - 1e-9))
    if lo >= hi:
        return None
    liquid = v < model.v_c
    kind = "liquid-full" if liquid else "vapor-full"
    T = _fill_temperature(lambda T: getattr(saturation(model, T=T), "v_liquid" if liquid else "v_vapor"), v, lo, hi)
    if T is None:
        return None
    return {"kind": kind, "T": T, "P": float(saturation(model, T=T).P)}


def reference_fill_point(fluid, v, T_range=None):
    """The reference equation's liquid-full or vapor-full point of a vessel at v [m^3/mol]
    (as :func:`fill_point`); None where the reference is unavailable or not crossed."""
    if library_reason(fluid):
        return None
    Tc = fluid.Tc
    lo, hi = T_range if T_range is not None else (0.3 * Tc, Tc)
    hi = min(hi, Tc * (1.0 - 1e-7))
    limits = reference_limits(fluid)
    liquid = v < limits["v_c"]
    name = "v_liquid" if liquid else "v_vapor"
    lo = max(lo, limits["T_min"])
    T = _fill_temperature(lambda T: getattr(reference_saturation(fluid, T=T), name), v, lo, hi) if lo < hi else None
    if T is None:
        return None
    return {"kind": "liquid-full" if liquid else "vapor-full", "T": T, "P": float(reference_saturation(fluid, T=T).P)}


def saturation_curve(model, T=None, *, n=DEFAULT_POINTS, log=None, reference=False) -> pd.DataFrame:
    """The model's saturation curve, optionally beside the reference's.

    Parameters
    ----------
    model : CubicModel
    T : range, optional
        Temperatures [K], at most Tc; default from 0.5 Tc (or the reference's triple point,
        if higher) to Tc.
    n, log : int, bool
        Points and spacing of a (start, stop) range.
    reference : bool
        Add reference_P, reference_v_liquid, reference_v_vapor, reference_rho_mass_liquid,
        reference_rho_mass_vapor, deviation_P_percent, deviation_rho_liquid_percent,
        deviation_rho_vapor_percent, reference_available and reference_reason; where the
        fluid has ideal-gas data also reference_h_liquid, reference_h_vapor,
        reference_h_vaporization, reference_s_liquid, reference_s_vapor,
        deviation_h_vaporization_percent (the latent heat; it falls to zero at Tc, so the
        percentage grows there).

    Returns
    -------
    pandas.DataFrame
        Columns T, P (saturation pressure), v_liquid, v_vapor, rho_mass_liquid,
        rho_mass_vapor, Z_liquid, Z_vapor; where the fluid has ideal-gas data (a library
        fluid, or ``cp0=``) also h_liquid, h_vapor, h_vaporization (the latent heat,
        h_vapor - h_liquid) [J/mol], s_liquid, s_vapor [J/(mol K)].

    References
    ----------
    Michelsen, M. L. & Mollerup, J. M. (2007), Thermodynamic Models, 2nd ed., ch. 11.
    """
    _check_sweep(model, "saturation_curve", n=n, log=log, reference=reference)
    fluid = model.fluid
    if T is None:
        T = _default_T(fluid, 0.5, 1.0)
    Ts = _values(T, "T", molar_mass=None, n=n, log=log)
    sat = saturation(model, T=Ts)
    M = fluid.molar_mass
    v_l, v_v, P = (np.atleast_1d(np.asarray(x, dtype=float)) for x in (sat.v_liquid, sat.v_vapor, sat.P))
    frame = pd.DataFrame({"T": Ts, "P": P, "v_liquid": v_l, "v_vapor": v_v, "rho_mass_liquid": M / v_l,
                          "rho_mass_vapor": M / v_v, "Z_liquid": P * v_l / (R * Ts), "Z_vapor": P * v_v / (R * Ts)})
    caloric = fluid.ideal_gas is not None
    if caloric:
        ends = [solve(model, T=Ts, quality=np.full(Ts.shape, q)) for q in (0.0, 1.0)]
        for side, st in zip(("liquid", "vapor"), ends):
            frame[f"h_{side}"] = np.atleast_1d(np.asarray(st.h, dtype=float))
            frame[f"s_{side}"] = np.atleast_1d(np.asarray(st.s, dtype=float))
        frame["h_vaporization"] = frame["h_vapor"] - frame["h_liquid"]
    if reference:
        ref = reference_saturation(fluid, T=Ts)
        r_vl, r_vv, r_P = (np.atleast_1d(np.asarray(x, dtype=float)) for x in (ref.v_liquid, ref.v_vapor, ref.P))
        with np.errstate(invalid="ignore", divide="ignore"):
            frame["reference_P"] = r_P
            frame["reference_v_liquid"], frame["reference_v_vapor"] = r_vl, r_vv
            frame["reference_rho_mass_liquid"], frame["reference_rho_mass_vapor"] = M / r_vl, M / r_vv
            frame["deviation_P_percent"] = 100.0 * (P / r_P - 1.0)
            frame["deviation_rho_liquid_percent"] = 100.0 * (r_vl / v_l - 1.0)
            frame["deviation_rho_vapor_percent"] = 100.0 * (r_vv / v_v - 1.0)
        if caloric:
            sides = [reference_state(fluid, T=Ts, quality=np.full(Ts.shape, q), with_saturation=False)
                     for q in (0.0, 1.0)]
            for side, rs in zip(("liquid", "vapor"), sides):
                frame[f"reference_h_{side}"] = np.atleast_1d(np.asarray(rs.h, dtype=float))
                frame[f"reference_s_{side}"] = np.atleast_1d(np.asarray(rs.s, dtype=float))
            frame["reference_h_vaporization"] = frame["reference_h_vapor"] - frame["reference_h_liquid"]
            with np.errstate(invalid="ignore", divide="ignore"):
                frame["deviation_h_vaporization_percent"] = 100.0 * (frame["h_vaporization"] /
                                                                    frame["reference_h_vaporization"] - 1.0)
        frame["reference_available"] = np.atleast_1d(ref.available)
        frame["reference_reason"] = np.atleast_1d(np.asarray(ref.reason, dtype=object))
    return _finish(frame, _attrs(model, "saturation curve"))


# --------------------------------------------------------------------------- CSV

_HEADER_MARK = "# "
_ATTRS_LINE = "# attrs (JSON): "


def to_csv(frame: pd.DataFrame, path) -> None:
    """Write a sweep table as CSV under a commented header.

    The header (lines starting with "#") states the fluid and its constants, the model,
    the table, the package version, the date written, the units of every column and the
    caution, and ends with the attrs as one JSON line so :func:`read_csv` restores them.

    Parameters
    ----------
    frame : pandas.DataFrame
        A table from this module.
    path : str or path-like
    """
    if not isinstance(frame, pd.DataFrame):
        raise TypeError(f"to_csv(frame, path) writes a table from a sweep (a pandas DataFrame); got {_given(frame)}.")
    a = frame.attrs
    fc = a.get("fluid_constants") or {}
    lines = ["thermo_roots state table"]
    if fc:
        lines.append(f"fluid: {a.get('fluid')} (library name {fc.get('library_name')}); Tc = {fc['Tc']:.8g} K, "
                     f"Pc = {fc['Pc']:.8g} Pa, omega = {fc['omega']:.6g}, molar mass = {fc['molar_mass']:.8g} kg/mol")
    if "model" in a:
        lines.append(f"model: {a['model']} ({a.get('model_short_name', '')}), volume shift c = "
                     f"{a.get('volume_shift', 0.0):.6g} m³/mol")
    lines.append(f"table: {a.get('table', '')}")
    lines.append(f"written: {datetime.datetime.now().astimezone().isoformat(timespec='seconds')} by thermo_roots "
                 f"{a.get('version', _version())}")
    units = a.get("units") or {c: _unit_of(str(c)) for c in frame.columns}
    lines.append("units: " + ", ".join(f"{c} [{u}]" if u else str(c) for c, u in units.items()))
    lines.append(f"caution: {a.get('caution', CAUTION)}")
    meta = dict(a)
    meta["dtypes"] = {str(c): str(t) for c, t in frame.dtypes.items()}
    text = "".join(_HEADER_MARK + line.replace("\n", " ") + "\n" for line in lines)
    text += _ATTRS_LINE + json.dumps(meta, default=_json_default) + "\n"
    with open(path, "w", encoding="utf-8", newline="") as handle:
        handle.write(text)
        frame.to_csv(handle, index=False, na_rep="NaN")


def _json_default(x):
    if isinstance(x, np.generic):
        return x.item()
    if isinstance(x, np.ndarray):
        return x.tolist()
    raise TypeError(f"{type(x).__name__} is not JSON serialisable")


def read_csv(path) -> pd.DataFrame:
    """Read a table written by :func:`to_csv`, with its attrs and column types restored."""
    with open(path, encoding="utf-8") as handle:
        text = handle.read()
    header, meta = 0, {}
    lines = text.splitlines(keepends=True)
    for line in lines:
        if not line.startswith("#"):
            break
        header += 1
        if line.startswith(_ATTRS_LINE):
            meta = json.loads(line[len(_ATTRS_LINE):])
    body = "".join(lines[header:])
    # pandas 3 parses floats round-trip by default and deprecates the option; pandas 2 needs it
    exact = {} if int(pd.__version__.split(".")[0]) >= 3 else {"float_precision": "round_trip"}
    frame = pd.read_csv(io.StringIO(body), keep_default_na=False, na_values=["NaN"], **exact)
    dtypes = meta.pop("dtypes", {})
    for column, dtype in dtypes.items():
        if column in frame and str(frame[column].dtype) != dtype:
            frame[column] = frame[column].astype(dtype)
    frame.attrs.update(meta)
    return frame
