"""Layer 2 (beside fluids): the :class:`Mixture` value and binary interaction parameters.

A mixture is a tuple of :class:`~thermo_roots.fluids.Fluid` values with their mole
fractions. It knows nothing about equations of state: the mixing rules that turn it into a
model, and the phase equilibrium, live in the layers below (``models``, ``equilibrium``).
"""

from __future__ import annotations

import html
import json
import math
import re
import warnings
from collections.abc import Mapping
from dataclasses import dataclass
from functools import lru_cache
from pathlib import Path
from typing import NamedTuple

import numpy as np

from .errors import InputError, UnknownFluidError, WrongTypeError
from .fluids import Fluid, _is_real_number as _real, as_fluid, display_name

#: Largest accepted distance of the sum of mole fractions from 1 (without ``normalize=True``).
SUM_TOLERANCE = 1e-9


def _component(entry, who: str) -> Fluid:
    """A Fluid from a library name or a Fluid; unknown names keep get_fluid's close matches."""
    if isinstance(entry, str):
        try:
            return as_fluid(entry, who)
        except UnknownFluidError as err:
            raise UnknownFluidError(f"{who}: {err}", err.suggestions) from None
    if isinstance(entry, Fluid):
        return entry
    raise WrongTypeError(f"{who}: a component must be a library fluid's name (e.g. 'methane', 'CO2') or a "
                         f"Fluid; got {entry!r} ({type(entry).__name__}).")


def _identity(fluid: Fluid):
    """What makes two components the same fluid: the library entry, or the custom Fluid itself."""
    return ("library", fluid.library_name) if fluid.library_name is not None else ("custom", fluid)


def _pairs(composition, who: str) -> list[tuple[object, object]]:
    if isinstance(composition, Mixture):
        return list(zip(composition.fluids, composition.z.tolist()))
    if isinstance(composition, Mapping):
        return list(composition.items())
    if isinstance(composition, str):
        raise WrongTypeError(f"{who}: for a composition written as text use Mixture.from_text({composition!r}).")
    try:
        items = list(composition)
    except TypeError:
        raise WrongTypeError(f"{who}: the composition must be a mapping {{name: mole fraction}} or a list of "
                             f"(name, mole fraction) pairs; got {composition!r} "
                             f"({type(composition).__name__}).") from None
    for item in items:
        if isinstance(item, str) or not (hasattr(item, "__len__") and len(item) == 2):
            raise WrongTypeError(f"{who}: each entry of a list composition must be a (name, mole fraction) "
                                 f"pair, e.g. [('methane', 0.9), ('ethane', 0.1)]; got {item!r}.")
    return [tuple(item) for item in items]


@dataclass(frozen=True, init=False, eq=True)
class Mixture:
    """A mixture of fluids with its composition in mole fractions.

    Parameters
    ----------
    composition : mapping, sequence of pairs, or Mixture
        ``{"methane": 0.85, "ethane": 0.08, ...}`` or ``[("methane", 0.85), ...]``: library
        names (as :func:`~thermo_roots.get_fluid` takes them) or :class:`Fluid` values, each
        with its mole fraction [-]. The order given is the component order of every array.
    normalize : bool
        Divide the fractions by their sum. Without it the sum must be 1 within
        :data:`SUM_TOLERANCE` (1e-9).

    Attributes
    ----------
    fluids : tuple of Fluid
        The components.
    fractions : tuple of float
        The mole fractions [-] as stored (a hashable twin of :attr:`z`).

    Raises
    ------
    InputError
        A fraction that is negative, NaN or infinite; all fractions zero; a sum away
        from 1 without ``normalize=True``; the same fluid twice (e.g. "CO2" and
        "carbon dioxide"); no components.
    UnknownFluidError
        A name that is not in the fluid library (with close matches).
    WrongTypeError
        A composition that is not a mapping or a list of pairs, or a fraction that is
        not a number.

    Examples
    --------
    >>> gas = Mixture({"methane": 0.9, "ethane": 0.07, "propane": 0.03})
    >>> gas.names
    ('methane', 'ethane', 'propane')
    """

    fluids: tuple
    fractions: tuple

    def __init__(self, composition, normalize: bool = False):
        who = "Mixture(composition)"
        if not isinstance(normalize, (bool, np.bool_)):
            raise WrongTypeError(f"Mixture: normalize must be True or False, not {normalize!r}.")
        pairs = _pairs(composition, who)
        if not pairs:
            raise InputError(f"{who}: no components given; give at least one, e.g. {{'methane': 1.0}}.")
        fluids, fractions, seen = [], [], {}
        for entry, fraction in pairs:
            fluid = _component(entry, who)
            label = entry if isinstance(entry, str) else fluid.name
            if not _real(fraction):
                raise WrongTypeError(f"{who}: the mole fraction of {label!r} must be a number, not {fraction!r} "
                                     f"({type(fraction).__name__}).")
            fraction = float(fraction)
            if not math.isfinite(fraction) or fraction < 0:
                raise InputError(f"{who}: the mole fraction of {label!r} is {fraction!r}; mole fractions must be "
                                 "finite and >= 0.")
            key = _identity(fluid)
            if key in seen:
                raise InputError(f"{who}: {label!r} and {seen[key]!r} are the same fluid ({fluid.name}); give it "
                                 "once, with the sum of its fractions.")
            seen[key] = label
            fluids.append(fluid)
            fractions.append(fraction)
        total = math.fsum(fractions)
        if total == 0:
            raise InputError(f"{who}: every mole fraction is 0; at least one must be positive.")
        if normalize:
            fractions = [f / total for f in fractions]
        elif abs(total - 1.0) > SUM_TOLERANCE:
            percent = " (they look like mol %: divide by 100, or write them with a % sign in Mixture.from_text)" \
                if abs(total - 100.0) < 1e-6 else ""
            raise InputError(f"{who}: the mole fractions sum to {total:.12g}, not 1 (allowed: within "
                             f"{SUM_TOLERANCE:g}){percent}. Pass normalize=True to divide them by their sum.")
        object.__setattr__(self, "fluids", tuple(fluids))
        object.__setattr__(self, "fractions", tuple(fractions))

    @classmethod
    def from_text(cls, text: str, normalize: bool = False) -> "Mixture":
        """Read a pasted composition: ``"methane 0.85, ethane 0.08, propane 0.07"``.

        Takes what engineers paste (see :func:`read_composition_text` for every form): entries
        separated by commas, semicolons or new lines; two columns copied from a spreadsheet
        (tab-separated, a header line allowed); ``"methane: 85 %"``; plain numbers summing to
        100 (read as mole percent, with a warning saying so); a decimal comma where commas do
        not separate the entries (``"methane 0,85; ethane 0,15"``); everyday names, CoolProp's
        names and gas-analysis shorthand (C1, iC4, nC5).

        Parameters
        ----------
        text : str
            The composition.
        normalize : bool
            As for :class:`Mixture`.

        Warns
        -----
        UserWarning
            Where the reading rests on a guess: numbers without a % sign taken as mole percent
            because they sum to about 100, a header line skipped, names and numbers read from
            two rows instead of two columns.

        Raises
        ------
        InputError
            Lines that could not be read, each named by its number and quoted, with the form
            expected; the same fluid on two lines.
        UnknownFluidError
            A name that is not in the fluid library: its line, and the closest names.
        """
        reading = read_composition_text(text)
        for note in reading.notes:
            warnings.warn(f"Mixture.from_text: {note}", UserWarning, stacklevel=2)
        return cls(_resolved_pairs(reading), normalize=normalize)

    # --- views -------------------------------------------------------------------------
    @property
    def z(self) -> np.ndarray:
        """Mole fractions [-], in component order (a new read-only array)."""
        out = np.array(self.fractions, dtype=float)
        out.flags.writeable = False
        return out

    @property
    def names(self) -> tuple:
        """The components' names as shown in results."""
        return tuple(f.name for f in self.fluids)

    def _constant(self, label: str) -> np.ndarray:
        out = np.array([getattr(f, label) for f in self.fluids], dtype=float)
        out.flags.writeable = False
        return out

    @property
    def Tc(self) -> np.ndarray:
        """Critical temperatures of the components [K]."""
        return self._constant("Tc")

    @property
    def Pc(self) -> np.ndarray:
        """Critical pressures of the components [Pa]."""
        return self._constant("Pc")

    @property
    def omega(self) -> np.ndarray:
        """Acentric factors of the components [-]."""
        return self._constant("omega")

    @property
    def molar_masses(self) -> np.ndarray:
        """Molar masses of the components [kg/mol]."""
        return self._constant("molar_mass")

    @property
    def molar_mass(self) -> float:
        """The mixture's molar mass, Σ zᵢ Mᵢ [kg/mol]."""
        return math.fsum(z * f.molar_mass for z, f in zip(self.fractions, self.fluids))

    def with_fractions(self, z, normalize: bool = False) -> "Mixture":
        """The same components with other mole fractions (a phase's x or y, a trial phase).

        Parameters
        ----------
        z : array_like, shape (n_components,)
            Mole fractions [-] in this mixture's component order.
        normalize : bool
            As for :class:`Mixture`.
        """
        values = np.asarray(z, dtype=float)
        if values.shape != (len(self),):
            raise InputError(f"Mixture.with_fractions: z has shape {values.shape}; this mixture has {len(self)} "
                             f"components ({', '.join(self.names)}), so give {len(self)} mole fractions.")
        return Mixture(list(zip(self.fluids, values.tolist())), normalize=normalize)

    @classmethod
    def from_mass_fractions(cls, composition, normalize: bool = False) -> "Mixture":
        """A mixture from mass fractions (how refrigerant blends are specified, e.g. R-407C as
        R32/R125/R134a 23/25/52 % by mass in ANSI/ASHRAE Standard 34).

        Parameters are as for :class:`Mixture`, with mass fractions [-] instead of mole
        fractions; zᵢ = (wᵢ/Mᵢ) / Σ (wⱼ/Mⱼ).
        """
        weighed = cls(composition, normalize=normalize)
        moles = [w / f.molar_mass for w, f in zip(weighed.fractions, weighed.fluids)]
        total = math.fsum(moles)
        return cls([(f, n / total) for f, n in zip(weighed.fluids, moles)], normalize=True)

    @property
    def mass_fractions(self) -> np.ndarray:
        """Mass fractions wᵢ = zᵢ Mᵢ / Σ zⱼ Mⱼ [-], in component order."""
        out = self.z * self.molar_masses / self.molar_mass
        out.flags.writeable = False
        return out

    def index(self, component) -> int:
        """Position of a component given by name (any library alias) or Fluid."""
        fluid = _component(component, "Mixture.index")
        key = _identity(fluid)
        for i, f in enumerate(self.fluids):
            if _identity(f) == key:
                return i
        raise InputError(f"Mixture.index: {component!r} is not a component of this mixture; its components are "
                         f"{', '.join(self.names)}.")

    def __len__(self) -> int:
        return len(self.fluids)

    def __repr__(self) -> str:
        body = ", ".join(f"{n!r}: {z:.6g}" for n, z in zip(self.names, self.fractions))
        return f"Mixture({{{body}}})"

    def _repr_html_(self) -> str:
        head = ("<tr><th>component</th><th>mole fraction</th><th>Tc [K]</th><th>Pc [MPa]</th>"
                "<th>ω</th><th>M [g/mol]</th></tr>")
        rows = "".join(
            f"<tr><td style='text-align:left'>{html.escape(f.name)}</td><td>{z:.6g}</td><td>{f.Tc:.6g}</td>"
            f"<td>{f.Pc / 1e6:.6g}</td><td>{f.omega:.4g}</td><td>{f.molar_mass * 1e3:.6g}</td></tr>"
            for f, z in zip(self.fluids, self.fractions))
        caption = f"Mixture of {len(self)} components, M = {self.molar_mass * 1e3:.6g} g/mol"
        return f"<table><caption>{caption}</caption>{head}{rows}</table>"


# --- reading a pasted composition ---------------------------------------------------------

#: Gas-analysis shorthand (carbon number, i- and n- for the branched and straight isomers) and
#: formulas that CoolProp's alias lists do not carry, for pasted compositions (common practice
#: in natural-gas analyses). Lumped fractions such as "C6+" are not fluids and are refused.
SHORTHAND = {
    "C1": "Methane", "C2": "Ethane", "C3": "n-Propane", "iC4": "IsoButane", "nC4": "n-Butane",
    "iC5": "Isopentane", "nC5": "n-Pentane", "neoC5": "Neopentane", "nC6": "n-Hexane", "nC7": "n-Heptane",
    "nC8": "n-Octane", "nC9": "n-Nonane", "nC10": "n-Decane", "C2H6": "Ethane", "C2H4": "Ethylene",
    "C3H6": "Propylene", "C4H10": "n-Butane",
}
_SHORTHAND_KEYS = {re.sub(r"[\s\-_]", "", k).lower(): v for k, v in SHORTHAND.items()}

#: Numbers without a % sign whose sum lies in this range are read as mole percent: a gas
#: analysis in percent that does not quite close (99.7, 100.2), never fractions.
PERCENT_SUM_RANGE = (95.0, 105.0)

_NUMBER = r"[-+\u2212]?(?:\d+(?:[.,]\d*)?|[.,]\d+)(?:[eE][-+]?\d+)?"
_PERCENT = r"(?:mol(?:e)?\.?\s*-?\s*)?%"
_ENTRY = re.compile(rf"^(?P<name>.*?\S)(?:\s*[:=]\s*|\s+)(?P<value>{_NUMBER})\s*(?P<percent>{_PERCENT})?$",
                    re.IGNORECASE)
_VALUE = re.compile(rf"^(?P<value>{_NUMBER})\s*(?P<percent>{_PERCENT})?$", re.IGNORECASE)
#: A word that is a number (with any decimal mark), so not part of a name ("1-butene" is a name).
_NUMBER_TOKEN = re.compile(r"(?:^|\s)[-+\u2212]?[\d.,]*\d(?:[eE][-+]?\d+)?(?=\s|%|$)")
_FORM = ("Write each component as a name and a mole fraction, e.g. 'methane 0.85, ethane 0.08, propane 0.07', "
         "one per line, 'methane: 85 %', or two columns (name, fraction) pasted from a spreadsheet.")


class PastedComposition(NamedTuple):
    """What :func:`read_composition_text` found in a pasted composition.

    Attributes
    ----------
    pairs : tuple of (str, float)
        Each component's name as written and its mole fraction [-] (percentages divided by
        100), in the order given; the names are not yet looked up.
    lines : tuple of int
        The line (1-based) each pair came from.
    notes : tuple of str
        Sentences saying where the reading rests on a guess (percent without a % sign, a
        header line skipped, rows read as columns); empty when nothing was guessed.
    """

    pairs: tuple
    lines: tuple
    notes: tuple


class _Cell(NamedTuple):
    kind: str            # "entry" (name and number), "name", "value" or "bad"
    text: str
    name: str | None
    value: float | None
    percent: bool


def read_composition_text(text: str) -> PastedComposition:
    """Split a pasted composition into (name, mole fraction) pairs, without looking names up.

    The forms read:

    - entries separated by commas, semicolons, tabs or new lines, each a name and a number with
      a space, ``:`` or ``=`` between them: ``"methane 0.85, ethane 0.08"``, ``"methane = 0.85"``;
    - two columns pasted from a spreadsheet (name, then fraction, tab- or comma-separated),
      with or without a header line (a first line without numbers, e.g. "component  mol %");
      or two rows, names above and numbers below;
    - percentages with a % sign (``"methane: 85 %"``, ``"8 mol%"``); numbers without one whose
      sum lies in :data:`PERCENT_SUM_RANGE` (95 to 105) are read as mole percent too, and a
      note says so;
    - a decimal comma (``"0,85"``) where no comma separates entries, i.e. every comma of the
      text stands between two digits (``"methane 0,85; ethane 0,15"``, one per line, tabs).

    Parameters
    ----------
    text : str
        The pasted text.

    Returns
    -------
    PastedComposition

    Raises
    ------
    InputError
        Lines that could not be read, each named by its number and quoted; a % sign on some
        numbers but not on others; nothing to read.
    WrongTypeError
        ``text`` is not a string.

    References
    ----------
    Common practice: gas analyses are reported in mol %, spreadsheets in many locales write
    a decimal comma, and tab-separated columns are what a spreadsheet puts on the clipboard.
    """
    who = "Mixture.from_text"
    if not isinstance(text, str):
        raise WrongTypeError(f"{who} needs text, e.g. 'methane 0.9, ethane 0.1'; got {text!r} "
                             f"({type(text).__name__}).")
    decimal_comma = "," in text and re.search(r"(?<!\d),|,(?!\d)", text) is None
    lines = [(n, line.replace("\u00a0", " ").strip()) for n, line in enumerate(text.splitlines(), start=1)]
    lines = [(n, line) for n, line in lines if line]
    if not lines:
        raise InputError(f"{who}: the text is empty. {_FORM}")
    cells = {n: [_read_cell(c, decimal_comma) for c in _split_line(line, decimal_comma)] for n, line in lines}
    notes = []
    header_percent = False
    first, first_cells = lines[0][0], cells[lines[0][0]]
    if len(lines) > 1 and all(c.kind == "name" for c in first_cells):
        second = cells[lines[1][0]]
        if len(lines) == 2 and len(first_cells) > 1 and len(second) == len(first_cells) \
                and all(c.kind == "value" for c in second):
            rows = [_Cell("entry", f"{a.text} {b.text}", a.name, b.value, b.percent)
                    for a, b in zip(first_cells, second)]
            notes.append("read the names in line 1 and their numbers in line 2 (two rows).")
            cells = {first: rows}
            lines = lines[:1]
        else:
            header_percent = bool(re.search(r"%|percent", lines[0][1], re.IGNORECASE))
            shown = re.sub(r"\s*\t\s*", " | ", lines[0][1])
            notes.append(f"line 1 {shown!r} has no numbers; it was taken as a header and skipped.")
            del cells[first]
            lines = lines[1:]
    found, bad = [], []
    for n, line in lines:
        pairs, unread = _pair_cells(cells[n])
        found += [(n, cell) for cell in pairs]
        bad += [_bad_line(n, line, unread, decimal_comma)] if unread else []
    if bad:
        raise InputError(f"{who}: could not read " + "; ".join(bad) + f". {_FORM}")
    return _as_fractions(found, header_percent, notes, who)


def _split_line(line: str, decimal_comma: bool) -> list[str]:
    """The cells of one line: split at semicolons and tabs, and at commas unless they are decimal."""
    parts = re.split(r"[;\t]" if decimal_comma else r"[;\t,]", line)
    return [p.strip() for p in parts if p.strip()]


def _number(text: str) -> float:
    return float(text.replace(",", ".").replace("\u2212", "-"))


def _read_cell(text: str, decimal_comma: bool) -> _Cell:
    """What one cell holds: a name and a number, a name alone, a number alone, or neither."""
    for pattern, kind in ((_VALUE, "value"), (_ENTRY, "entry")):
        match = pattern.match(text)
        if match is None or ("," in match["value"] and not decimal_comma) or \
                ("," in match["value"] and "." in match["value"]):
            continue
        name = match["name"].strip() if kind == "entry" else None
        if name is not None and re.search(rf"(?:^|\s){_NUMBER}\s*(?:{_PERCENT})?(?:\s|$)", name):
            return _Cell("run-on", text, None, None, False)      # "methane 85 ethane 15": no separator
        return _Cell(kind, text, name, _number(match["value"]), match["percent"] is not None)
    if re.search(r"[A-Za-z]", text) and not _NUMBER_TOKEN.search(text):
        return _Cell("name", text, text, None, False)
    return _Cell("bad", text, None, None, False)


def _pair_cells(cells: list) -> tuple[list, list]:
    """Entries of one line, a name cell followed by a number cell taken as one; the rest unread."""
    pairs, unread, i = [], [], 0
    while i < len(cells):
        cell = cells[i]
        if cell.kind == "entry":
            pairs.append(cell)
            i += 1
        elif cell.kind == "name" and i + 1 < len(cells) and cells[i + 1].kind == "value":
            value = cells[i + 1]
            pairs.append(_Cell("entry", f"{cell.text} {value.text}", cell.name, value.value, value.percent))
            i += 2
        else:
            unread.append(cell)
            i += 1
    return pairs, unread


def _bad_line(n: int, line: str, unread: list, decimal_comma: bool) -> str:
    """Why line ``n`` could not be read, in a few words."""
    why = []
    for cell in unread:
        if cell.kind == "name":
            why.append(f"{cell.text!r} has no mole fraction")
        elif cell.kind == "value":
            why.append(f"{cell.text!r} has no component name")
        elif cell.kind == "run-on":
            why.append(f"{cell.text!r} holds several entries: separate them with commas, semicolons or new lines")
        else:
            why.append(f"{cell.text!r} is not a name and a number")
    comma = ""
    if not decimal_comma and re.search(r"\d,\d", line):
        comma = (" (a decimal comma such as '0,85' is read only where no comma separates entries: put ';' "
                 "or new lines between them, or write '0.85')")
    return f"line {n} {line!r}: " + ", ".join(why) + comma


def _as_fractions(found: list, header_percent: bool, notes: list, who: str) -> PastedComposition:
    """Percentages divided by 100: all with a % sign, a header saying %, or a sum near 100."""
    signs = [cell.percent for _, cell in found]
    if any(signs) and not all(signs):
        plain = ", ".join(f"line {n} {cell.text!r}" for n, cell in found if not cell.percent)
        raise InputError(f"{who}: some numbers have a % sign and {plain} not; write every one as a "
                         "percentage or every one as a fraction.")
    total = math.fsum(cell.value for _, cell in found)
    percent = all(signs) or header_percent
    low, high = PERCENT_SUM_RANGE
    if not percent and low <= total <= high:
        percent = True
        notes.append(f"the numbers sum to {total:.6g}, so they were read as mole percent (divided by 100).")
    scale = 0.01 if percent else 1.0
    return PastedComposition(pairs=tuple((cell.name, cell.value * scale) for _, cell in found),
                             lines=tuple(n for n, _ in found), notes=tuple(notes))


def component_from_text(name: str, who: str) -> Fluid:
    """A library fluid from a name as engineers write it: the library's names and aliases,
    gas-analysis shorthand (:data:`SHORTHAND`), else close matches in the error.

    Raises
    ------
    UnknownFluidError
        Not a library name; ``who`` leads the message, which lists the closest names.
    InputError
        A lumped fraction such as "C6+" or "C7 plus", which is no single fluid.
    """
    if re.search(r"\+\s*$|\bplus\b", name, re.IGNORECASE):
        raise InputError(f"{who}: {name!r} is a lumped plus fraction, not one fluid; give it as a single "
                         "component (e.g. n-hexane or n-heptane for C6+/C7+) or as a Fluid with its own "
                         "constants, Fluid(name, Tc, Pc, omega, molar_mass).")
    library = _SHORTHAND_KEYS.get(re.sub(r"[\s\-_]", "", name).lower())
    return _component(library if library is not None else name, who)


def fraction_from_text(text: str, who: str) -> float:
    """One mole fraction as typed in a cell: ``"0.85"``, ``"0,85"``, ``".07"``, ``"8.5e-1"`` or
    ``"85 %"`` [-]; the same number forms as :func:`read_composition_text`.

    Raises
    ------
    InputError
        Not such a number; ``who`` leads the message.
    """
    if not isinstance(text, str):
        raise WrongTypeError(f"{who}: a mole fraction as text, e.g. '0.85' or '85 %'; got {text!r}.")
    cell = _read_cell(text.replace("\u00a0", " ").strip(), decimal_comma=True)
    if cell.kind != "value":
        raise InputError(f"{who}: cannot read {text!r} as a mole fraction; write a number such as 0.85 "
                         "(or 0,85), or a percentage such as 85 %.")
    return cell.value / 100.0 if cell.percent else cell.value


def _resolved_pairs(reading: PastedComposition) -> list[tuple[Fluid, float]]:
    """Each pair's fluid looked up, an unknown name or a repeated fluid named by its line."""
    out, seen = [], {}
    for (name, fraction), n in zip(reading.pairs, reading.lines):
        who = f"Mixture.from_text, line {n} ({name!r})"
        fluid = component_from_text(name, who)
        if not (math.isfinite(fraction) and fraction >= 0):
            raise InputError(f"{who}: the mole fraction is {fraction:g}; mole fractions must be finite and >= 0.")
        key = _identity(fluid)
        if key in seen:
            first, earlier = seen[key]
            where = f"line {n}" if first == n else f"lines {first} and {n}"
            raise InputError(f"Mixture.from_text: {earlier!r} and {name!r} ({where}) are the same fluid "
                             f"({fluid.name}); give it once, with the sum of its fractions.")
        seen[key] = (n, name)
        out.append((fluid, fraction))
    return out


@dataclass(frozen=True, init=False)
class BinaryParameters:
    """Binary interaction parameters kᵢⱼ of a cubic's mixing rule, as a value.

    Parameters
    ----------
    pairs : mapping of (component, component) -> float, optional
        ``{("methane", "CO2"): 0.10, ...}``: components by library name (any alias: "CO2"
        and "carbon dioxide" are one fluid) or :class:`Fluid`; the order inside a pair
        does not matter. Pairs not given have kᵢⱼ = 0.

    Attributes
    ----------
    values : tuple of (key, key, float)
        The nonzero-or-given pairs in a canonical order (hashable).

    Notes
    -----
    kᵢⱼ enters the van der Waals one-fluid rule a = ΣΣ xᵢxⱼ√(aᵢaⱼ)(1 − kᵢⱼ); kᵢᵢ = 0 and
    kᵢⱼ = kⱼᵢ. Values with |k| ≥ 1 are refused: 1 − kᵢⱼ would remove or reverse the pair's
    attraction (published kᵢⱼ of cubics are within about ±0.2, common practice).

    References
    ----------
    Michelsen, M. L., Mollerup, J. M., *Thermodynamic Models: Fundamentals and
    Computational Aspects*, 2nd ed., Tie-Line Publications, 2007, ch. 3 (classical mixing rules).
    """

    values: tuple

    def __init__(self, pairs=None):
        who = "BinaryParameters(pairs)"
        pairs = {} if pairs is None else pairs
        if not isinstance(pairs, Mapping):
            raise WrongTypeError(f"{who}: give a mapping {{('methane', 'CO2'): 0.10, ...}}, or use "
                                 f"BinaryParameters.from_matrix(matrix, mixture); got {pairs!r}.")
        table, labels = {}, {}
        for pair, k in pairs.items():
            if isinstance(pair, str) or not (isinstance(pair, tuple) and len(pair) == 2):
                raise WrongTypeError(f"{who}: each key must be a pair of components, e.g. ('methane', 'CO2'); "
                                     f"got {pair!r}.")
            a, b = (_component(p, who) for p in pair)
            ka, kb = _identity(a), _identity(b)
            if ka == kb:
                raise InputError(f"{who}: the pair {pair!r} names one fluid twice; kᵢᵢ is 0 by definition.")
            _check_k(k, f"{who}: k for {pair!r}")
            key = frozenset((ka, kb))
            if key in table and table[key] != float(k):
                raise InputError(f"{who}: the pair {pair!r} is given twice with different values "
                                 f"({labels[key]!r}: {table[key]:g}, {pair!r}: {float(k):g}).")
            table[key], labels[key] = float(k), pair
        entries = []
        for key, k in table.items():
            a, b = sorted(key, key=repr)
            entries.append((a, b, k))
        object.__setattr__(self, "values", tuple(sorted(entries, key=repr)))

    @classmethod
    def from_matrix(cls, matrix, components) -> "BinaryParameters":
        """From a symmetric matrix kᵢⱼ in the order of ``components`` (a Mixture or a list of names/Fluids).

        The diagonal must be 0, the matrix symmetric (within 1e-12), finite and |kᵢⱼ| < 1.
        """
        who = "BinaryParameters.from_matrix"
        names = list(components.fluids) if isinstance(components, Mixture) else list(components)
        try:
            k = np.asarray(matrix, dtype=float)
        except (TypeError, ValueError):
            raise WrongTypeError(f"{who}: the matrix must be numbers, an n x n array; got {matrix!r}.") from None
        n = len(names)
        if k.shape != (n, n):
            raise InputError(f"{who}: the matrix has shape {k.shape}; with {n} components it must be ({n}, {n}).")
        if not np.isfinite(k).all():
            i, j = np.argwhere(~np.isfinite(k))[0]
            raise InputError(f"{who}: k[{i}, {j}] = {float(k[i, j])!r} is not finite; every kᵢⱼ must be a "
                             "finite number.")
        if np.any(np.diag(k) != 0):
            i = int(np.flatnonzero(np.diag(k) != 0)[0])
            raise InputError(f"{who}: the diagonal must be 0 (kᵢᵢ = 0 by definition); k[{i}, {i}] = {k[i, i]:g}.")
        if not np.allclose(k, k.T, rtol=0, atol=1e-12):
            i, j = np.argwhere(np.abs(k - k.T) > 1e-12)[0]
            raise InputError(f"{who}: the matrix must be symmetric; k[{i}, {j}] = {k[i, j]:g} but "
                             f"k[{j}, {i}] = {k[j, i]:g}.")
        pairs = {(names[i], names[j]): float(k[i, j]) for i in range(n) for j in range(i + 1, n) if k[i, j] != 0}
        return cls(pairs)

    def matrix(self, mixture: Mixture) -> np.ndarray:
        """The kᵢⱼ matrix in the mixture's component order (0 where not given) [-].

        Raises
        ------
        InputError
            A given pair names a fluid that is not a component of ``mixture``.
        """
        if not isinstance(mixture, Mixture):
            raise WrongTypeError(f"BinaryParameters.matrix needs a Mixture, not {mixture!r}.")
        position = {_identity(f): i for i, f in enumerate(mixture.fluids)}
        missing = sorted({_label(key) for a, b, _ in self.values for key in (a, b) if key not in position})
        if missing:
            raise InputError(f"BinaryParameters.matrix: {', '.join(missing)} "
                             f"{'is' if len(missing) == 1 else 'are'} not in the mixture (its components: "
                             f"{', '.join(mixture.names)}); drop those pairs or add the components.")
        out = np.zeros((len(mixture), len(mixture)))
        for a, b, k in self.values:
            i, j = position[a], position[b]
            out[i, j] = out[j, i] = k
        out.flags.writeable = False
        return out

    def __repr__(self) -> str:
        body = ", ".join(f"({_label(a)!r}, {_label(b)!r}): {k:g}" for a, b, k in self.values)
        return f"BinaryParameters({{{body}}})"

    def _repr_html_(self) -> str:
        rows = "".join(f"<tr><td>{html.escape(_label(a))}</td><td>{html.escape(_label(b))}</td><td>{k:.6g}</td></tr>"
                       for a, b, k in self.values)
        return ("<table><caption>Binary interaction parameters (0 for pairs not listed)</caption>"
                f"<tr><th>component</th><th>component</th><th>kᵢⱼ</th></tr>{rows}</table>")


def _check_k(k, who: str) -> None:
    if not _real(k):
        raise WrongTypeError(f"{who} must be a number, not {k!r} ({type(k).__name__}).")
    if not (math.isfinite(k) and abs(k) < 1):
        raise InputError(f"{who} is {k!r}; a binary interaction parameter must be finite with |k| < 1 "
                         "(typical values are within ±0.2).")


def _label(key) -> str:
    kind, what = key
    if kind == "library":
        return display_name(what)
    return what.name


#: The shipped table of fitted kᵢⱼ (made by ``python -m thermo_roots.reference.binary_fit``).
BINARY_TABLE_PATH = Path(__file__).with_name("binary_parameters.json")


@lru_cache(maxsize=1)
def binary_table() -> dict:
    """The shipped table of fitted kᵢⱼ as read from :data:`BINARY_TABLE_PATH` (see its "about")."""
    with open(BINARY_TABLE_PATH, encoding="utf-8") as f:
        return json.load(f)


def fitted_binary_parameters(model: str, mixture: Mixture) -> BinaryParameters:
    """The shipped table's kᵢⱼ of one cubic for every pair of ``mixture`` it holds (0 for the rest).

    Parameters
    ----------
    model : str
        The cubic's short name ("PR", "SRK", "PR78", "RK", "vdW").
    mixture : Mixture

    Returns
    -------
    BinaryParameters
        Pairs not in the table (and custom fluids) are not given, so their kᵢⱼ is 0;
        :func:`missing_fitted_pairs` names them.
    """
    if not isinstance(mixture, Mixture):
        raise WrongTypeError(f"fitted_binary_parameters needs a Mixture, not {mixture!r}.")
    fitted = _fitted_pairs(model)
    names = {f.library_name: f for f in mixture.fluids if f.library_name is not None}
    pairs = {}
    for key, k in fitted.items():
        a, b = tuple(key)
        if a in names and b in names:
            pairs[(names[a], names[b])] = k
    return BinaryParameters(pairs)


def missing_fitted_pairs(model: str, mixture: Mixture) -> list[tuple[str, str]]:
    """The pairs of ``mixture`` (display names) that the shipped table has no kᵢⱼ for with ``model``."""
    fitted = _fitted_pairs(model)
    fluids = mixture.fluids
    return [(fluids[i].name, fluids[j].name) for i in range(len(fluids)) for j in range(i + 1, len(fluids))
            if frozenset((fluids[i].library_name, fluids[j].library_name)) not in fitted]


def _fitted_pairs(model: str) -> dict:
    table = binary_table()
    known = sorted({name for row in table["pairs"] for name in row["fits"]})
    if model not in known:
        raise InputError(f"The fitted kᵢⱼ table has no cubic {model!r}; it holds {', '.join(known)}.")
    return {frozenset(row["pair"]): row["fits"][model]["k"] for row in table["pairs"]
            if "k" in row["fits"].get(model, {})}
