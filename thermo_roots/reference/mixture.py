"""Reference values for mixtures: CoolProp's multiparameter mixture model at (T, P), and its
bubble and dew points.

The reference is CoolProp's ``HEOS`` backend for a mixture: each component's own reference
equation, combined by the reducing functions and departure functions of GERG-2008 (Kunz &
Wagner 2012) where CoolProp has them for a pair, and by its other published pair parameters
otherwise. A pair it has no parameters for is refused by CoolProp ("Could not match the
binary pair"); that mixture's states come back *unavailable* with the reason, as does every
state where its flash or its saturation solver fails (they do: six-component gases at low
temperature, bubble points near the cricondenbar). No exception leaves an array call.

As in :mod:`.driver`, CoolProp's state objects are kept one per mixture *and thread*: a
state is updated and then read in separate calls, so two threads sharing one would read
each other's answers. Only a tuple of library names, the mole fractions and arrays go to a
worker (:func:`_mixture_chunk` is module-level), so a process pool or a cluster's executor
gives the serial result.

The calls are slow. Measured on the development machine (2 shared cores, CoolProp 8.0.0)
over a 4 x 4 grid of 180-320 K and 0.5-10 MPa crossing the envelope: 99 ms per (T, P) state
for methane 0.9 / ethane 0.07 / propane 0.03 and 166 ms for the six-component gas methane
0.85 / ethane 0.06 / propane 0.03 / n-butane 0.01 / nitrogen 0.03 / CO2 0.02 (about 30-90 ms
in one phase, 120-500 ms in two); the 21-component GERG-2008 check gas 2 s for its first
state; a bubble or dew point 4-40 ms. Hence chunks of :data:`DEFAULT_MIXTURE_CHUNK` states
(the unit of progress and of parallel dispatch) and ``executor=``.

Phase words
-----------
CoolProp's own label of a single-phase mixture state is not a phase rule a person can use:
its HEOS backend calls a state "liquid" where, as its answers suggest, the density exceeds
the mixture's reducing density (a propane + n-butane mixture at 400 K and 10 MPa, above its
critical point, is "liquid"), and its cubic backends call every single-phase mixture state "liquid". It is kept
as ``library_phase``. ``phase`` follows the project's one rule for mixtures, the model's too
(:func:`thermo_roots.equilibrium.phase_words.mixture_phase_word`):

- "two-phase" where the reference's stability test split the feed;
- "supercritical" where T >= T_pc and P >= P_pc, the mixture's pseudo-critical point by
  Kay's rule (T_pc = sum z_i Tc_i, P_pc = sum z_i Pc_i);
- "vapor" where T >= T_pc and P < P_pc;
- below T_pc: "liquid" where the phase-identification parameter Pi exceeds 1, else
  "vapor" (Venkatarathnam & Oellrich 2011).

The mixture's true critical point would be the better divide, but CoolProp's search for it
took 35 s and then failed ("found 2 critical points") for a six-component natural gas, so it
is not used.

References
----------
Bell, I. H., Wronski, J., Quoilin, S. & Lemort, V. (2014), Ind. Eng. Chem. Res. 53,
2498-2508 (CoolProp).
Kunz, O. & Wagner, W. (2012), The GERG-2008 wide-range equation of state for natural gases
and other mixtures, J. Chem. Eng. Data 57, 3032-3091.
Kay, W. B. (1936), Density of hydrocarbon gases and vapors at high temperature and pressure,
Ind. Eng. Chem. 28, 1014-1019 (pseudo-critical point).
Venkatarathnam, G. & Oellrich, L. R. (2011), Identification of the phase of a fluid using
partial derivatives of pressure, volume, and temperature without reference to saturation
properties, Fluid Phase Equilib. 301, 225-233.
"""

from __future__ import annotations

import html
import math
import threading
from collections.abc import Mapping
from dataclasses import dataclass, field

import numpy as np

from ..equilibrium.phase_words import mixture_phase_word, pseudo_critical  # noqa: F401 (one rule, re-exported)
from ..errors import InputError, WrongTypeError
from ..mixtures import Mixture
from ..units import to_si
from .batch import _given, _resolve_progress, whole_number
from .driver import _coolprop, library_reason, thread_state
from .states import constant_warnings

#: What a mixture reference call evaluates: a (T, P) state, or a bubble or dew point at T or at P.
MIXTURE_KINDS = ("T,P", "bubble,T", "bubble,P", "dew,T", "dew,P", "P,h", "P,s")
#: The kinds whose second known is an energy (a = P [Pa], b = h [J/mol] or s [J/(mol K)]).
_ENERGY_KINDS = ("P,h", "P,s")
#: States per chunk of mixture reference work (a chunk is the unit of progress, interruption and
#: parallel dispatch): about one to five seconds of CoolProp work each.
DEFAULT_MIXTURE_CHUNK = 16
#: Above this many states ``progress="auto"`` shows a bar (a few seconds of work).
AUTO_MIXTURE_PROGRESS_ABOVE = 32
#: The reason given to states a run did not reach because it was interrupted.
MIXTURE_INTERRUPTED = "not evaluated: the run was interrupted before this state"
#: A short caution shown with reference mixture values (they feed metering and filling decisions).
#: (GERG-2008's stated uncertainty in gas-phase density: 0.1 % at 250-450 K up to 35 MPa, Kunz & Wagner 2012.)
REFERENCE_MIXTURE_CAUTION = (
    "Reference mixture model (GERG-2008 type in CoolProp): its own uncertainty is about 0.1 % in gas density "
    "at pipeline conditions and larger in liquids, near the critical point and for pairs fitted to few data; "
    "its flash can also fail or converge to the wrong split. Do not fill, heat or pressurise equipment on "
    "this number alone; follow local codes and have a licensed engineer check the design.")

_SCALARS = ("T", "P", "rho", "Z", "vapor_fraction", "rho_liquid", "rho_vapor", "pip", "h", "s")
_TEXT = ("phase", "library_phase", "reason")

#: Per thread, {tuple of library names: CoolProp HEOS AbstractState of that mixture}.
_THREAD_MIXTURES = threading.local()


def mixture_reference_reason(mixture) -> str:
    """Why the mixture has no reference (a component without a reference equation), or ""."""
    mixture = _as_mixture(mixture, "mixture_reference_reason")
    for fluid in mixture.fluids:
        reason = library_reason(fluid)
        if reason:
            return f"component {fluid.name!r}: {reason}"
    return ""


def _new_mixture_state(names: tuple):
    import CoolProp

    return CoolProp.AbstractState("HEOS", "&".join(names))


def _mixture_abstract_state(names: tuple):
    """This thread's HEOS AbstractState of the mixture of ``names`` (CoolProp names).

    Raises CoolProp's ValueError when it has no parameters for a pair (the caller turns it
    into a reason)."""
    return thread_state(_THREAD_MIXTURES, names, _new_mixture_state)


def _empty_values(n: int, nc: int, reason: str = "") -> dict:
    out = {k: np.full(n, np.nan) for k in _SCALARS}
    out["x"] = np.full((n, nc), np.nan)
    out["y"] = np.full((n, nc), np.nan)
    for k in _TEXT:
        out[k] = np.full(n, "", dtype=object)
    out["reason"][:] = reason
    return out


def _knowns_reason(kind: str, a: float, b: float) -> str:
    """Why the knowns cannot go to the reference at all, or "" (before CoolProp is called)."""
    if kind in _ENERGY_KINDS:
        if not (math.isfinite(a) and a > 0.0):
            return f"P = {a:.6g} Pa is not a positive finite number"
        return "" if math.isfinite(b) else f"{kind[-1]} = {b!r} is not a finite number"
    names = ("T", "P") if kind == "T,P" else (kind.split(",")[1],)
    values = (a, b) if kind == "T,P" else (a,)
    for name, value in zip(names, values):
        unit = "K" if name == "T" else "Pa"
        if value != value:
            return f"{name} is missing (NaN), not a finite number"
        if not math.isfinite(value):
            return f"{name} is infinite, not a finite number"
        if value <= 0.0:
            return f"{name} = {value:.6g} {unit} is not positive"
    return ""


def _knowns_text(kind: str, a: float, b: float) -> str:
    if kind == "T,P":
        return f"T = {a:.6g} K, P = {b:.6g} Pa"
    if kind in _ENERGY_KINDS:
        return f"P = {a:.6g} Pa, {kind[-1]} = {b:.6g} {'J/mol' if kind == 'P,h' else 'J/(mol K)'}"
    which, known = kind.split(",")
    return f"{'a bubble' if which == 'bubble' else 'a dew'} point at {known} = {a:.6g} {'K' if known == 'T' else 'Pa'}"


def _failure_reason(kind, a, b, error) -> str:
    detail = str(error).strip() or type(error).__name__
    if kind == "T,P" or kind in _ENERGY_KINDS:
        what = (f"the reference mixture model found no state at {_knowns_text(kind, a, b)}: its flash did not "
                "converge there, or the state lies outside its range; try a state nearby")
    else:
        what = (f"the reference mixture model found no {_knowns_text(kind, a, b)[2:]}: its saturation solver "
                "did not converge, or there is none (above the cricondentherm or cricondenbar, or below the "
                "range of a component's equation); try another T or P")
    return f"{what} (CoolProp: {detail})"


def _update(state, CoolProp, kind, a, b):
    if kind == "T,P":
        state.update(CoolProp.PT_INPUTS, b, a)
    elif kind == "P,h":
        state.update(CoolProp.HmolarP_INPUTS, b, a)
    elif kind == "P,s":
        state.update(CoolProp.PSmolar_INPUTS, a, b)
    elif kind.endswith(",T"):
        state.update(CoolProp.QT_INPUTS, 0.0 if kind.startswith("bubble") else 1.0, a)
    else:
        state.update(CoolProp.PQ_INPUTS, a, 0.0 if kind.startswith("bubble") else 1.0)


def _read(out, i, state, CoolProp, phases, z, T_pc, P_pc):
    """Store the state CoolProp has just solved in row i."""
    T, P, rho = state.T(), state.p(), state.rhomolar()
    out["T"][i], out["P"][i], out["rho"][i] = T, P, rho
    out["h"][i], out["s"][i] = state.hmolar(), state.smolar()
    out["Z"][i] = P / (rho * state.gas_constant() * T)
    code = state.phase()
    out["library_phase"][i] = phases.get(code, "")
    if code == CoolProp.iphase_twophase:
        x, y = np.asarray(state.mole_fractions_liquid()), np.asarray(state.mole_fractions_vapor())
        if not (np.all(x >= 0.0) and np.all(y >= 0.0)):
            # CoolProp's cubic backend returned such a split for a natural gas's dew point
            # (tests/equilibrium/coolprop_cubic.py); a mole fraction is never negative
            raise ValueError(f"nonphysical answer: a negative mole fraction (x = {np.round(x, 4).tolist()}, "
                             f"y = {np.round(y, 4).tolist()}) at T = {T:.6g} K, P = {P:.6g} Pa")
        out["vapor_fraction"][i] = state.Q()
        out["x"][i], out["y"][i] = x, y
        out["rho_liquid"][i] = state.saturated_liquid_keyed_output(CoolProp.iDmolar)
        out["rho_vapor"][i] = state.saturated_vapor_keyed_output(CoolProp.iDmolar)
        out["phase"][i] = "two-phase"
        return
    try:
        out["pip"][i] = pip = state.keyed_output(CoolProp.iPIP)
    except ValueError:
        pip = math.nan
    phase = mixture_phase_word(T, P, pip, T_pc, P_pc)
    out["phase"][i] = phase
    out["x"][i] = out["y"][i] = z
    if phase == "liquid":
        out["vapor_fraction"][i], out["rho_liquid"][i] = 0.0, rho
    elif phase == "vapor":
        out["vapor_fraction"][i], out["rho_vapor"][i] = 1.0, rho


def _mixture_chunk(names: tuple, z: tuple, critical: tuple, kind: str, a, b) -> dict:
    """Evaluate the reference mixture model for one chunk, one state at a time.

    Module-level and fed only with names, numbers and arrays, so it can be sent to worker
    processes. ``names`` are CoolProp's fluid names, ``z`` the mole fractions, ``critical``
    Kay's (T_pc, P_pc), ``kind`` one of :data:`MIXTURE_KINDS`; ``a`` is T (or the bubble or dew
    point's known), ``b`` is P for "T,P" (ignored otherwise). Returns the dict of arrays of
    :func:`_empty_values`; "reason" is "" where available.
    """
    CoolProp, _, phases = _coolprop()
    a, b = np.broadcast_arrays(np.asarray(a, dtype=float).ravel(), np.asarray(b, dtype=float).ravel())
    n, nc = a.size, len(names)
    out = _empty_values(n, nc)
    try:
        state = _mixture_abstract_state(tuple(names))
    except ValueError as error:
        out["reason"][:] = (f"the reference library has no mixture model for {' + '.join(names)} "
                            f"(CoolProp: {str(error).strip()})")
        return out
    z = np.asarray(z, dtype=float)
    T_pc, P_pc = critical
    for i in range(n):
        x_, y_ = float(a[i]), float(b[i])
        reason = _knowns_reason(kind, x_, y_)
        if not reason:
            try:
                state.set_mole_fractions(list(z))
                _update(state, CoolProp, kind, x_, y_)
                _read(out, i, state, CoolProp, phases, z, T_pc, P_pc)
            except ValueError as error:
                reason = _failure_reason(kind, x_, y_, error)
                for k in _SCALARS:
                    out[k][i] = np.nan
                out["x"][i] = out["y"][i] = np.nan
                out["phase"][i] = out["library_phase"][i] = ""
        out["reason"][i] = reason
    return out


def _check_executor(executor):
    if executor is None:
        return
    if not (callable(getattr(executor, "submit", None)) or callable(getattr(executor, "map", None))):
        raise TypeError(f"executor must be a concurrent.futures.Executor (ThreadPoolExecutor(4), "
                        f"ProcessPoolExecutor(), a Dask client's get_executor()) or anything with a map(function, "
                        f"*iterables) method, or None; got {_given(executor)}.")


def _check_options(progress, executor, chunk_size, on_interrupt):
    _resolve_progress(progress, 0)
    _check_executor(executor)
    whole_number(chunk_size, "chunk_size", minimum=1, example=f"chunk_size={DEFAULT_MIXTURE_CHUNK}",
                 allow_none=True)
    if not (isinstance(on_interrupt, str) and on_interrupt in ("raise", "partial")):
        raise InputError(f"on_interrupt={on_interrupt!r} is not an option: give 'raise' (stop with the "
                         "KeyboardInterrupt) or 'partial' (keep the states evaluated so far).")


def _progress_wanted(progress, n):
    if isinstance(progress, str) and progress == "auto":
        return n > AUTO_MIXTURE_PROGRESS_ABOVE
    return _resolve_progress(progress, n)


def evaluate_mixture_reference(names: tuple, z: tuple, critical: tuple, kind: str, a, b, *, progress=False,
                               executor=None, chunk_size=None, on_interrupt="raise"):
    """The reference mixture model at many knowns, in chunks, with progress, interruption and workers.

    Parameters
    ----------
    names : tuple of str
        CoolProp's names of the components.
    z : tuple of float
        Mole fractions [-].
    critical : (float, float)
        Kay's pseudo-critical (T_pc [K], P_pc [Pa]) for the phase word.
    kind : one of :data:`MIXTURE_KINDS`
    a, b : array_like
        The knowns (SI), broadcast together and flattened: T [K] and P [Pa] for "T,P"; the
        bubble or dew point's T [K] or P [Pa] in ``a`` otherwise (``b`` ignored).
    progress : bool or "auto"
        A tqdm bar; "auto" shows one above :data:`AUTO_MIXTURE_PROGRESS_ABOVE` states.
    executor : concurrent.futures.Executor or anything with ``map``, optional
        Spread the chunks over its workers; only names, numbers and arrays are sent.
    chunk_size : int, optional
        States per chunk (default :data:`DEFAULT_MIXTURE_CHUNK`).
    on_interrupt : {"raise", "partial"}
        On KeyboardInterrupt re-raise, or keep what the finished chunks computed (the rest
        get the reason :data:`MIXTURE_INTERRUPTED`).

    Returns
    -------
    (values, completed) : (dict of numpy.ndarray, int)
        The arrays of :func:`_mixture_chunk` in input order, and how many leading states were
        evaluated.
    """
    if not (isinstance(kind, str) and kind in MIXTURE_KINDS):
        raise InputError(f"kind={kind!r} is not one of {', '.join(MIXTURE_KINDS)}.")
    _check_options(progress, executor, chunk_size, on_interrupt)
    a, b = np.broadcast_arrays(np.asarray(a, dtype=float).ravel(), np.asarray(b, dtype=float).ravel())
    n, nc = a.size, len(names)
    size = whole_number(chunk_size, "chunk_size", allow_none=True) or DEFAULT_MIXTURE_CHUNK
    starts = list(range(0, n, size))
    args = (tuple(names), tuple(float(v) for v in z), tuple(critical), kind)
    from tqdm.auto import tqdm

    bar = tqdm(total=n, disable=not _progress_wanted(progress, n), desc=f"reference {' + '.join(names)}",
               unit="state", leave=False)
    pieces, completed, futures = [], 0, []
    try:
        if executor is None:
            results = (_mixture_chunk(*args, a[s:s + size], b[s:s + size]) for s in starts)
        elif callable(getattr(executor, "submit", None)):
            futures = [executor.submit(_mixture_chunk, *args, a[s:s + size], b[s:s + size]) for s in starts]
            results = (f.result() for f in futures)
        else:
            k = len(starts)
            results = executor.map(_mixture_chunk, *([v] * k for v in args),
                                   [a[s:s + size] for s in starts], [b[s:s + size] for s in starts])
        for s, piece in zip(starts, results):
            pieces.append(piece)
            completed = min(n, s + size)
            bar.update(completed - bar.n)
    except KeyboardInterrupt:
        for f in futures:
            f.cancel()
        if on_interrupt == "raise":
            raise
    finally:
        bar.close()
    rest = _empty_values(n - completed, nc, MIXTURE_INTERRUPTED)
    values = {k: np.concatenate([p[k] for p in pieces] + [rest[k]]) for k in rest}
    return values, completed


@dataclass(frozen=True)
class ReferenceMixtureState:
    """The reference mixture model at (T, P), or a bubble or dew point. Scalars for scalar
    knowns, arrays of the knowns' shape otherwise (compositions with one more axis, last).

    Attributes
    ----------
    mixture : Mixture
    kind : "T,P", "bubble,T", "bubble,P", "dew,T" or "dew,P" (see :data:`MIXTURE_KINDS`)
    T : temperature [K]
    P : pressure [Pa] (the bubble or dew pressure for "bubble,T" and "dew,T")
    rho : molar density [mol/m^3] (of the whole feed: the molar mean in two phases; of the
        feed phase at a bubble (liquid) or dew (vapor) point)
    Z : compressibility factor P / (rho R T) [-], R the reference model's gas constant
    phase : "liquid", "vapor", "supercritical" or "two-phase" by :func:`mixture_phase_word`
        ("" where unavailable); bubble and dew points are "two-phase" with vapor_fraction 0 or 1
    library_phase : CoolProp's own label in the project's words (see the module docstring
        for why it is not ``phase``)
    vapor_fraction : molar vapor fraction [-]: the split in two phases, 0 for "liquid", 1 for
        "vapor", NaN for "supercritical"
    x, y : liquid and vapor mole fractions [-] (equal to z in one phase)
    rho_liquid, rho_vapor : each phase's molar density [mol/m^3] (in one phase, the state's
        density in its own slot and NaN in the other; both NaN when supercritical)
    pip : phase-identification parameter [-] of a single-phase state (NaN in two phases)
    h, s : molar enthalpy [J/mol] and entropy [J/(mol K)] on the reference model's own zero
        (each component's reference equation's), the whole feed
    available : bool
    reason : why a state is unavailable ("" where available)
    completed : how many leading states were evaluated (fewer than the size if interrupted)
    warnings : sentences about the whole result (components whose constants differ from
        their reference equations'); () when there is nothing to say
    """

    mixture: object = field(repr=False)
    kind: str
    T: object
    P: object
    rho: object
    Z: object
    phase: object
    library_phase: object = field(repr=False)
    vapor_fraction: object = field(repr=False)
    x: object = field(repr=False)
    y: object = field(repr=False)
    rho_liquid: object = field(repr=False)
    rho_vapor: object = field(repr=False)
    pip: object = field(repr=False)
    h: object = field(repr=False)
    s: object = field(repr=False)
    available: object = field(repr=False)
    reason: object = field(repr=False)
    completed: int = field(repr=False, default=0)
    warnings: tuple = field(repr=False, default=())

    @property
    def v(self):
        """Molar volume 1/rho [m^3/mol]."""
        return _scalar(1.0 / np.asarray(self.rho, dtype=float))

    @property
    def rho_mass(self):
        """Mass density [kg/m^3] of the whole feed."""
        return _scalar(self.mixture.molar_mass * np.asarray(self.rho, dtype=float))

    @property
    def incipient(self):
        """Composition of the phase that appears [-]: y at a bubble point, x at a dew point
        (NaN for a (T, P) state)."""
        if self.kind.startswith("bubble"):
            return self.y
        if self.kind.startswith("dew"):
            return self.x
        return np.full_like(np.asarray(self.x, dtype=float), np.nan)

    def to_frame(self):
        """The states as a pandas DataFrame, one row per state: T [K], P [Pa], rho [mol/m³], Z,
        phase, library_phase, vapor_fraction, rho_liquid and rho_vapor [mol/m³], then the
        liquid and vapor mole fractions as "x <component>" and "y <component>", and reason."""
        import pandas as pd

        n = int(np.size(self.available))
        columns = {k: np.ravel(np.asarray(getattr(self, k))) for k in
                   ("T", "P", "rho", "Z", "phase", "library_phase", "vapor_fraction", "rho_liquid", "rho_vapor")}
        for label, comp in (("x", self.x), ("y", self.y)):
            comp = np.asarray(comp, dtype=float).reshape(n, len(self.mixture))
            for j, name in enumerate(self.mixture.names):
                columns[f"{label} {name}"] = comp[:, j]
        columns["reason"] = np.ravel(np.asarray(self.reason))
        return pd.DataFrame({k: np.broadcast_to(v, (n,)) for k, v in columns.items()})

    def __repr__(self):
        name = _mixture_label(self.mixture)
        what = {"T,P": "", "bubble,T": "bubble point, ", "bubble,P": "bubble point, ",
                "dew,T": "dew point, ", "dew,P": "dew point, "}[self.kind]
        if np.ndim(self.T) or np.ndim(self.available):
            n = np.size(self.available)
            text = f"ReferenceMixtureState({name}, {what}{n} states, {int(np.sum(self.available))} available)"
        elif not self.available:
            text = f"ReferenceMixtureState({name}, {what}unavailable: {self.reason})"
        else:
            text = (f"ReferenceMixtureState({name}, {what}T={self.T:.6g} K, P={self.P:.6g} Pa, "
                    f"rho={self.rho:.6g} mol/m³, Z={self.Z:.6g}, phase={self.phase!r}"
                    + (f", vapor fraction={self.vapor_fraction:.6g}" if self.phase == "two-phase" else "") + ")")
        return text + "".join(f"\nWarning: {w}" for w in self.warnings)

    def _repr_html_(self):
        caution = f"<p style='font-size:smaller'><b>Caution.</b> {html.escape(REFERENCE_MIXTURE_CAUTION)}</p>"
        notes = "".join(f"<p><b>Warning.</b> {html.escape(w)}</p>" for w in self.warnings)
        title = html.escape(f"Reference mixture model: {_mixture_label(self.mixture)}")
        if np.ndim(self.available):
            return f"<div><b>{title}</b>{self._html_rows()}{notes}{caution}</div>"
        if not self.available:
            return (f"<div><b>{title}</b><p>Unavailable: {html.escape(str(self.reason))}</p>{notes}"
                    f"{caution}</div>")
        rows = [("T", f"{self.T:.6g} K"), ("P", f"{self.P / 1e6:.6g} MPa"), ("ρ", f"{self.rho:.6g} mol/m³"),
                ("ρ (mass)", f"{self.rho_mass:.6g} kg/m³"), ("Z", f"{self.Z:.6g}"), ("phase", self.phase),
                ("the library's label", self.library_phase), ("vapor fraction (molar)", _cell(self.vapor_fraction))]
        if self.phase == "two-phase":
            rows += [("ρ liquid", f"{self.rho_liquid:.6g} mol/m³"), ("ρ vapor", f"{self.rho_vapor:.6g} mol/m³")]
        table = "".join(f"<tr><th style='text-align:left'>{html.escape(k)}</th><td>{html.escape(str(v))}</td></tr>"
                        for k, v in rows)
        comp = "".join(
            f"<tr><td style='text-align:left'>{html.escape(n)}</td><td>{zi:.6g}</td><td>{xi:.6g}</td>"
            f"<td>{yi:.6g}</td></tr>"
            for n, zi, xi, yi in zip(self.mixture.names, self.mixture.z, self.x, self.y))
        comp_table = ("<table><tr><th>component</th><th>feed z</th><th>liquid x</th><th>vapor y</th></tr>"
                      f"{comp}</table>")
        return f"<div><b>{title}</b><table>{table}</table>{comp_table}{notes}{caution}</div>"

    def _html_rows(self, limit: int = 12):
        flat = {k: np.ravel(np.asarray(getattr(self, k))) for k in ("T", "P", "rho", "Z", "phase",
                                                                     "vapor_fraction", "reason")}
        n = flat["T"].size
        head = ("<tr><th>T [K]</th><th>P [MPa]</th><th>ρ [mol/m³]</th><th>Z</th><th>phase</th>"
                "<th>vapor fraction</th><th>note</th></tr>")
        body = "".join(
            f"<tr><td>{_cell(flat['T'][i])}</td><td>{_cell(flat['P'][i] / 1e6)}</td><td>{_cell(flat['rho'][i])}</td>"
            f"<td>{_cell(flat['Z'][i])}</td><td>{html.escape(str(flat['phase'][i]))}</td>"
            f"<td>{_cell(flat['vapor_fraction'][i])}</td><td>{html.escape(str(flat['reason'][i]))}</td></tr>"
            for i in range(min(n, limit)))
        more = f"<p>… {n - limit} more states</p>" if n > limit else ""
        return (f"<p>{n} states, {int(np.sum(self.available))} available</p><table>{head}{body}</table>"
                f"{more}")


def _cell(value) -> str:
    """A number for a table cell: 6 digits, or a dash where there is none (NaN)."""
    return "–" if value != value else f"{value:.6g}"


def _scalar(x):
    x = np.asarray(x)
    return float(x) if x.ndim == 0 else x


def _mixture_label(mixture) -> str:
    return " + ".join(f"{n} {z:.4g}" for n, z in zip(mixture.names, mixture.fractions))


def _as_mixture(mixture, where: str) -> Mixture:
    if isinstance(mixture, Mixture):
        return mixture
    if isinstance(mixture, Mapping):
        return Mixture(mixture)
    raise WrongTypeError(f"{where}: mixture must be a thermo_roots.Mixture (or a mapping of library names to mole "
                         f"fractions), e.g. tr.Mixture({{'methane': 0.9, 'ethane': 0.1}}); got {_given(mixture)}.")


def _known(value, name: str, where: str):
    if value is None:
        return None
    try:
        return np.asarray(to_si(value, name, nonfinite="nan"), dtype=float)
    except (TypeError, ValueError) as error:
        raise type(error)(f"{where}: {name}: {error}") from None


def _result(mixture, kind, a, b, options) -> ReferenceMixtureState:
    shape = np.broadcast(a, b).shape
    n, nc = int(np.prod(shape)), len(mixture)
    reason = mixture_reference_reason(mixture)
    if reason:
        values, completed, notes = _empty_values(n, nc, reason), n, ()
    else:
        names = tuple(f.library_name for f in mixture.fluids)
        values, completed = evaluate_mixture_reference(names, mixture.fractions, pseudo_critical(mixture), kind,
                                                       a, b, **options)
        notes = tuple(w for f in mixture.fluids for w in constant_warnings(f))

    def shaped(key, x):
        extra = (nc,) if key in ("x", "y") else ()
        x = np.asarray(x).reshape(shape + extra)
        return x.item() if x.ndim == 0 else x

    out = {k: shaped(k, v) for k, v in values.items()}
    out["available"] = shaped("available", values["reason"] == "")
    return ReferenceMixtureState(mixture=mixture, kind=kind, completed=completed, warnings=notes, **out)


def reference_mixture_state(mixture, T, P, *, progress=False, executor=None, chunk_size=None,
                            on_interrupt="raise") -> ReferenceMixtureState:
    """The reference mixture model (CoolProp's HEOS, GERG-2008 type) at (T, P).

    Parameters
    ----------
    mixture : Mixture
        Library fluids with their mole fractions (a mapping {name: fraction} is read as one).
    T : float, array_like or str
        Temperature [K] (or text with a unit, e.g. "25 °C").
    P : float, array_like or str
        Pressure [Pa] (or text with a unit, e.g. "5 MPa"); broadcast with ``T``.
    progress : bool or "auto"
        A progress bar ("auto": above :data:`AUTO_MIXTURE_PROGRESS_ABOVE` states).
    executor : concurrent.futures.Executor or anything with ``map``, optional
        Spread chunks of states over its workers (each worker keeps its own CoolProp states).
    chunk_size : int, optional
        States per chunk (default :data:`DEFAULT_MIXTURE_CHUNK`).
    on_interrupt : {"raise", "partial"}
        On KeyboardInterrupt, re-raise or return the states evaluated so far.

    Returns
    -------
    ReferenceMixtureState
        Density, Z, phase, vapor fraction and phase compositions; an unavailable state (a
        component without a reference equation, a pair the library lacks, a flash that does
        not converge) carries its reason instead of raising.

    References
    ----------
    Kunz, O. & Wagner, W. (2012), J. Chem. Eng. Data 57, 3032 (GERG-2008). Bell, I. H. et al.
    (2014), Ind. Eng. Chem. Res. 53, 2498 (CoolProp).
    """
    where = "reference_mixture_state"
    mixture = _as_mixture(mixture, where)
    _check_options(progress, executor, chunk_size, on_interrupt)
    if T is None or P is None:
        raise InputError(f"{where}: give both T [K] and P [Pa], e.g. {where}(mixture, T=300.0, P=5e6); "
                         f"{'T' if T is None else 'P'} is missing.")
    T, P = _known(T, "T", where), _known(P, "P", where)
    try:
        np.broadcast(T, P)
    except ValueError:
        raise InputError(f"{where}: T has shape {T.shape} and P has shape {P.shape}, which do not broadcast "
                         "together; give arrays of one shape, or one of them as a single number.") from None
    return _result(mixture, "T,P", T, P, dict(progress=progress, executor=executor, chunk_size=chunk_size,
                                              on_interrupt=on_interrupt))


def reference_mixture_energy_state(mixture, P, *, h=None, s=None, progress=False, executor=None, chunk_size=None,
                                   on_interrupt="raise") -> ReferenceMixtureState:
    """The reference mixture model's own (P, h) or (P, s) state: a valve's or an isentropic
    machine's outlet as the reference finds it.

    Parameters
    ----------
    mixture : Mixture
    P : float, array_like or str
        Pressure [Pa] (or text with a unit).
    h, s : float or array_like
        Molar enthalpy [J/mol] or entropy [J/(mol K)] on the reference's own zero (a
        ReferenceMixtureState's ``h``, ``s``); give exactly one.
    progress, executor, chunk_size, on_interrupt
        As in :func:`reference_mixture_state`.

    Returns
    -------
    ReferenceMixtureState
        ``kind`` "P,h" or "P,s"; unavailable with the reason where CoolProp's solver fails.

    References
    ----------
    Bell, I. H. et al. (2014), Ind. Eng. Chem. Res. 53, 2498 (CoolProp's HmolarP and PSmolar inputs).
    """
    where = "reference_mixture_energy_state"
    mixture = _as_mixture(mixture, where)
    _check_options(progress, executor, chunk_size, on_interrupt)
    if (h is None) == (s is None):
        raise InputError(f"{where}: give exactly one of h [J/mol] or s [J/(mol K)] with P.")
    kind, energy = ("P,h", h) if h is not None else ("P,s", s)
    P = _known(P, "P", where)
    energy = np.asarray(energy, dtype=float)
    try:
        np.broadcast(P, energy)
    except ValueError:
        raise InputError(f"{where}: P has shape {P.shape} and {kind[-1]} has shape {energy.shape}, which do not "
                         "broadcast together.") from None
    return _result(mixture, kind, P, energy, dict(progress=progress, executor=executor, chunk_size=chunk_size,
                                                  on_interrupt=on_interrupt))


def _saturation_point(which, mixture, T, P, options, where):
    mixture = _as_mixture(mixture, where)
    _check_options(**options)
    if (T is None) == (P is None):
        raise InputError(f"{where}: give exactly one of T [K] or P [Pa], e.g. {where}(mixture, T=250.0) or "
                         f"{where}(mixture, P=3e6); got {'both' if T is not None else 'neither'}.")
    kind, known = (f"{which},T", _known(T, "T", where)) if T is not None else (f"{which},P", _known(P, "P", where))
    return _result(mixture, kind, known, np.zeros(()), options)


def reference_bubble_point(mixture, *, T=None, P=None, progress=False, executor=None, chunk_size=None,
                           on_interrupt="raise") -> ReferenceMixtureState:
    """The reference mixture model's bubble point (vapor fraction 0) at T or at P.

    Parameters
    ----------
    mixture : Mixture
    T : float, array_like or str, optional
        Temperature [K]: the result's ``P`` is the bubble pressure.
    P : float, array_like or str, optional
        Pressure [Pa]: the result's ``T`` is the bubble temperature. Give exactly one of T, P.
    progress, executor, chunk_size, on_interrupt
        As in :func:`reference_mixture_state`.

    Returns
    -------
    ReferenceMixtureState
        ``kind`` "bubble,T" or "bubble,P"; x is the feed, y (``incipient``) the first bubble's
        composition; ``rho_liquid`` and ``rho_vapor`` both phases' densities. CoolProp's
        saturation solver fails for some mixtures and states (a six-component natural gas at
        200 K: "The molar density of ... is below the minimum"; at 250 K: "df very small ... but
        f is not converged"); those come back unavailable.

    References
    ----------
    Kunz, O. & Wagner, W. (2012), J. Chem. Eng. Data 57, 3032 (GERG-2008). Bell, I. H. et al.
    (2014), Ind. Eng. Chem. Res. 53, 2498 (CoolProp; its QT and PQ inputs with Q = 0).
    """
    return _saturation_point("bubble", mixture, T, P, dict(progress=progress, executor=executor,
                                                           chunk_size=chunk_size, on_interrupt=on_interrupt),
                             "reference_bubble_point")


def reference_dew_point(mixture, *, T=None, P=None, progress=False, executor=None, chunk_size=None,
                        on_interrupt="raise") -> ReferenceMixtureState:
    """The reference mixture model's dew point (vapor fraction 1) at T or at P.

    Parameters and returns as :func:`reference_bubble_point`: ``kind`` "dew,T" or "dew,P"; y is
    the feed, x (``incipient``) the first drop's composition. CoolProp gives one dew point per
    known, not the retrograde branch's second one.

    References
    ----------
    Kunz, O. & Wagner, W. (2012), J. Chem. Eng. Data 57, 3032 (GERG-2008). Bell, I. H. et al.
    (2014), Ind. Eng. Chem. Res. 53, 2498 (CoolProp; its QT and PQ inputs with Q = 1).
    """
    return _saturation_point("dew", mixture, T, P, dict(progress=progress, executor=executor,
                                                        chunk_size=chunk_size, on_interrupt=on_interrupt),
                             "reference_dew_point")
