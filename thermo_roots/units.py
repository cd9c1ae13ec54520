"""Layer 4: strings and pint quantities to SI at the boundary, and back for display.

Below this module everything is SI floats and numpy arrays: T [K], P [Pa], v [m³/mol],
rho [mol/m³], rho_mass [kg/m³], quality [-].

How text is read
----------------
A text is a number and a unit: ``"35 °C"``, ``"14.7 psia"``, ``"8 barg"``, ``"0.5 L/mol"``.

- **Numbers** take a decimal point or a decimal comma (``"1,5 bar"`` is 1.5 bar). A comma
  followed by exactly three digits (``"1,500"``) could be a thousands separator, so it is
  refused with both readings named; so are two separators or a space inside the number.
  A Unicode minus sign (−) is read as a minus.
- **Pressure** is absolute unless marked gauge. Gauge marks: ``g``, ``(g)``, `` gauge``
  (``"8 barg"``, ``"120 PSIG"``, ``"2 bar(g)"``, ``"1 kgf/cm2g"``); absolute marks: ``a``,
  ``(a)``, ``abs`` (``"14.7 psia"``, ``"1 bara"``). A gauge pressure is converted against a
  stated atmosphere, 101.325 kPa unless another is given, and a gauge reading below vacuum
  is refused in the units it was written in.
  Letter case is ignored where it cannot be misread: ``PSI``, ``Bar``, ``KPa``, ``Mpa``
  and ``MPA`` (a capital M is mega). It is not ignored where it can: ``mPa`` (millipascal)
  and ``mpa`` are refused, since nearly everyone who types them means MPa; ``Mbar`` is refused
  (``mbar`` is millibar). ``kg/cm2`` is refused with a pointer to ``kgf/cm2``.
- **Temperature**: ``°C``, ``ºC``, ``degC``, ``deg C``, ``C``, ``celsius`` (any case), and the
  same for F (Fahrenheit), R (Rankine) and K (kelvin, also ``°K``). A bare ``C`` is accepted:
  in a temperature field no other unit is written with that letter. ``deg`` alone is refused.
- **Powers** may be written ``m3``, ``m^3`` or ``m³``.
- Booleans are refused for every quantity (``True`` is not 1 K); masked arrays are refused
  where masked unless ``nonfinite="nan"`` asks for NaN there.

References
----------
Thompson, A. & Taylor, B. N. (2008), Guide for the Use of the International System of
Units (SI), NIST Special Publication 811, Appendix B (conversion factors: psi, kgf/cm²,
technical and standard atmosphere, bar, °F and °C).
"""

from __future__ import annotations

import numbers
import re

import numpy as np

from .errors import WrongTypeError, InputError
from .quantities import QUANTITIES, display, quantity as _row, registry, to_other_basis

__all__ = ["QUANTITIES", "STANDARD_ATMOSPHERE", "ATMOSPHERE_RANGE", "to_si", "check_atmosphere", "split_value",
           "read_unit", "registry", "format_value"]

#: Standard atmosphere [Pa] (ISO 2533; common practice as the default gauge reference).
STANDARD_ATMOSPHERE = 101325.0
#: The atmospheres accepted as a gauge reference [Pa]: the surrounding air anywhere people
#: work, with room to spare (about 34 kPa on the highest summits, 108 kPa at the highest
#: sea-level readings; common practice). A number outside is nearly always another unit
#: read as Pa (1.01325 meant as bar, 14.7 as psi).
ATMOSPHERE_RANGE = (10e3, 200e3)

# WrongTypeError lives with the other error classes; it is raised here for a value of the wrong type.
# Temperature spellings, after "°", "deg" or "degree(s)" and spaces are taken off (any case).
_TEMPERATURE = {"c": "degC", "celsius": "degC", "f": "degF", "fahrenheit": "degF",
                "r": "degR", "rankine": "degR", "k": "K", "kelvin": "K"}
_TEMPERATURE_PREFIX = re.compile(r"^(?:°|º|˚|degrees|degree|deg)")
# Pressure spellings whose letter case cannot be misread (keys lower case, spaces removed).
_PRESSURE = {"pa": "Pa", "kpa": "kPa", "hpa": "hPa", "gpa": "GPa", "bar": "bar", "psi": "psi",
             "atm": "atm", "at": "at", "torr": "torr", "mmhg": "mmHg", "inhg": "inHg",
             "mmh2o": "mmH2O", "inh2o": "inH2O",
             "kgf/cm2": "kgf/cm^2", "kgf/cm^2": "kgf/cm^2", "kgf/cm²": "kgf/cm^2"}
_PRESSURE_LIST = "Pa, kPa, MPa, bar, mbar, psi, atm, kgf/cm², mmHg"
_GAUGE = re.compile(r"^(?P<unit>.+?)\s*(?:\(\s*(?:g|gauge)\s*\)|gauge|g)$", re.IGNORECASE)
_ABSOLUTE = re.compile(r"^(?P<unit>.+?)\s*(?:\(\s*(?:a|abs|absolute)\s*\)|absolute|abs|a)$", re.IGNORECASE)
_NUMBER = re.compile(r"^(?P<num>[-+]?(?:\d+(?:[.,]\d*)?|[.,]\d+)(?:[eE][-+]?\d+)?)\s*(?P<unit>.*)$")
_MINUS = str.maketrans({"\u2212": "-", "\u2012": "-", "\u2013": "-", "\ufe63": "-", "\uff0d": "-"})


def to_si(value, quantity: str, *, molar_mass: float | None = None,
          atmosphere=STANDARD_ATMOSPHERE, nonfinite: str = "raise"):
    """Convert a known quantity to SI.

    Parameters
    ----------
    value : float, array_like, str or pint.Quantity
        Numbers (Python or numpy scalars, arrays) are taken as SI already. Strings hold a
        number and a unit (``"35 °C"``, ``"1160 psi"``, ``"0.5 L/mol"``, ``"8 barg"``); the
        rules are in this module's docstring. Booleans are refused.
    quantity : str
        Which quantity this is, a name in :data:`thermo_roots.quantities.QUANTITIES`: "T",
        "P", "v", "rho", "rho_mass", "quality", "h", "s", "u", "g", "h_mass", "s_mass",
        "u_mass", "cp", "cv", "cp_mass", "cv_mass", "w", "mu_jt", "kappa_T", ...
    molar_mass : float, optional
        [kg/mol]; lets a value on the other basis stand for the quantity: the dimension of
        the unit decides (``"250 kJ/kg"`` for h gives J/mol, ``"18 kJ/mol"`` for h_mass gives
        J/kg; a specific volume in m³/kg for v, a mass density for rho). Without it a value
        on the other basis is refused with a message saying so.
    atmosphere : float, str or pint.Quantity
        Atmospheric pressure a gauge pressure is added to [Pa]; absolute, finite and within
        :data:`ATMOSPHERE_RANGE` (see :func:`check_atmosphere`).
    nonfinite : {"raise", "nan"}
        What to do with NaN, infinite or masked elements: raise an error naming the first
        one (default), or give NaN there so a caller can solve the rest and report those.

    Returns
    -------
    float or numpy.ndarray
        The value in the SI unit of ``quantity`` (see :data:`QUANTITIES`).

    Raises
    ------
    InputError
        Unreadable text, a unit of the wrong kind or an ambiguous one, a gauge pressure
        below vacuum, NaN, infinity or a masked element (unless ``nonfinite="nan"``), a bad
        atmosphere.
    WrongTypeError
        A bool, None, a complex number or a list of texts (also a TypeError).

    References
    ----------
    NIST Special Publication 811 (2008), Appendix B, for the conversion factors.
    """
    _row(quantity)            # an unknown name: InputError listing the names
    if nonfinite not in ("raise", "nan"):
        raise InputError(f"nonfinite = {nonfinite!r} is not allowed; use 'raise' or 'nan'.")
    atmosphere = check_atmosphere(atmosphere)
    return _read(value, quantity, quantity, molar_mass, atmosphere, nonfinite)


def check_atmosphere(atmosphere) -> float:
    """The atmosphere a gauge pressure refers to, checked, in Pa.

    Parameters
    ----------
    atmosphere : float, str or pint.Quantity
        An absolute pressure [Pa when a number]: ``101325``, ``"0.95 bar"``, ``"14.7 psia"``.

    Returns
    -------
    float
        [Pa]

    Raises
    ------
    InputError
        Unreadable, a gauge pressure, an array, not finite, or outside
        :data:`ATMOSPHERE_RANGE`; the message names ``atmosphere``.
    """
    if type(atmosphere) is float and ATMOSPHERE_RANGE[0] <= atmosphere <= ATMOSPHERE_RANGE[1]:
        return atmosphere          # the common case, checked without parsing anything
    si = _read(atmosphere, "P", "atmosphere", None, None, "raise")
    if np.ndim(si) != 0:
        raise InputError(f"atmosphere = {_describe(atmosphere)} must be one pressure, not an array; "
                         "e.g. atmosphere='101.325 kPa'.")
    lo, hi = ATMOSPHERE_RANGE
    if not lo <= si <= hi:
        hint = ""
        if isinstance(atmosphere, str):
            number = split_value(atmosphere, "atmosphere")[0]
            if lo <= number * 1e5 <= hi or lo <= number * 6894.757 <= hi:
                hint = f" If {number:g} was meant in bar or in psi, write '{number:g} bar' or '{number:g} psia'."
        elif si > 0:
            hint = " Numbers are read in Pa: for bar write e.g. '1.01325 bar', for psi '14.7 psia'."
        raise InputError(
            f"atmosphere = {_describe(atmosphere)} ({si:.6g} Pa) is not the pressure of the surrounding "
            f"air; allowed: an absolute pressure from {lo / 1e3:g} kPa to {hi / 1e3:g} kPa "
            f"(101.325 kPa at sea level).{hint}")
    return float(si)


def split_value(text: str, name: str = "value") -> tuple[float, str]:
    """A text such as ``"1,5 barg"`` as its number and its unit text: ``(1.5, "barg")``.

    Raises
    ------
    InputError
        No number at the start, or a number that can be read two ways ("1,500").
    """
    clean = text.translate(_MINUS).strip()
    match = _NUMBER.match(clean)
    if not match:
        raise InputError(f"Cannot read {name} = {text!r}: write a number and a unit, e.g. "
                         f"{_example(name)!r}.")
    number, unit = match["num"], match["unit"].strip()
    per = re.match(r"1\s*/\s*[A-Za-z]", unit)           # "0.01 1/bar": a reciprocal unit, not a digit group
    if (unit[:1].isdigit() and not per) or (unit[:1] in ",." and unit[1:2].isdigit()):
        raise InputError(f"Cannot read the number in {name} = {text!r}: write it with one decimal point "
                         f"and without spaces or thousands separators, e.g. {_example(name)!r}.")
    if "," in number:
        mantissa = re.split("[eE]", number)[0].lstrip("+-")
        whole, fraction = mantissa.split(",")
        if len(fraction) == 3 and whole.lstrip("0"):
            raise InputError(
                f"{name} = {text!r}: {mantissa!r} could be {whole}.{fraction} (decimal comma) or "
                f"{whole}{fraction} (thousands separator); write {whole}.{fraction} or {whole}{fraction}.")
        number = number.replace(",", ".")
    return float(number), unit


def read_unit(unit: str, quantity: str, name: str | None = None) -> tuple[str, bool]:
    """A unit as typed, for ``quantity``, as a unit pint reads and whether it is gauge.

    ``read_unit("PSIG", "P")`` is ``("psi", True)``; ``read_unit("deg C", "T")`` is
    ``("degC", False)``. The unit's kind (a pressure for P) is checked for T and P.

    Raises
    ------
    InputError
        An unreadable unit, or one that can be misread ("mPa"); the message says why and
        gives an example.
    """
    name = name or quantity
    unit = unit.strip()
    if quantity == "P" and unit:
        found = _pressure_unit(unit, name)
        if found is None and _known(unit):
            return _powers(unit), False      # a unit of another kind: refused by its kind later
        if found is None:
            raise InputError(f"Cannot read the pressure unit {unit!r} in {name}; write one of "
                             f"{_PRESSURE_LIST}, absolute (bar, bara, psia) or gauge (barg, psig, "
                             f"kPag, kgf/cm2g), e.g. '80 bar' or '7 barg'.")
        return found
    if quantity == "T" and unit:
        key = _TEMPERATURE_PREFIX.sub("", re.sub(r"[\s._]+", "", unit).lower())
        if key in _TEMPERATURE:
            return _TEMPERATURE[key], False
        if not key:
            raise InputError(f"{name}: {unit!r} does not say which scale; write °C, °F, K or R, "
                             "e.g. '25 °C' or '25 degC'.")
    if quantity == "quality" and unit == "%":
        return "percent", False
    spelled = _spell(unit, _row(quantity))
    if spelled:
        try:
            registry().Unit(spelled)
        except Exception:  # pint raises several types for unknown or malformed units
            raise InputError(f"Cannot read the unit {unit!r} in {name}; e.g. {_example(quantity)!r} "
                             "(units are case-sensitive here: mg is milligram, Mg megagram).") from None
    return spelled, False


# --------------------------------------------------------------------------- inside

def _read(value, quantity, name, molar_mass, atmosphere, nonfinite):
    """``value`` in SI; ``name`` is how messages call it; ``atmosphere`` None: no gauge allowed."""
    _refuse_bool(value, name)
    if isinstance(value, str):
        return _finite(_string_to_si(value, quantity, name, molar_mass, atmosphere), name, value, "raise", None)
    if _is_quantity(value):
        _refuse_bool(value.magnitude, name)
        si = _quantity_to_si(value, quantity, name, molar_mass, text=_describe(value))
        return _finite(si, name, value, nonfinite, None)
    data, mask = _numbers(value, name)
    return _finite(data, name, value, nonfinite, mask)


def _refuse_bool(value, name):
    if isinstance(value, (bool, np.bool_)):
        raise WrongTypeError(f"{name} = {value} is a yes/no value, not a number; give a number "
                             f"or a text with a unit, e.g. {_example(name)!r}.")
    if isinstance(value, np.ndarray) and value.dtype.kind == "b":
        raise WrongTypeError(f"{name} is an array of yes/no values (dtype bool), not numbers; give numbers, "
                             f"e.g. {_example(name)!r} or [300.0, 310.0].")
    if isinstance(value, (list, tuple)):
        items = np.asarray(value, dtype=object).ravel()
        if any(isinstance(x, (bool, np.bool_)) for x in items):
            raise WrongTypeError(f"{name} holds a yes/no value (True or False) among its numbers; give "
                                 f"numbers only, e.g. {_example(name)!r} or [300.0, 310.0].")


def _numbers(value, name):
    """Numbers or an array of them as floats, and the mask of a masked array (else None)."""
    example = _example(name)
    if value is None or isinstance(value, (bytes, dict, set)):
        raise WrongTypeError(f"{name} = {_describe(value)} is not a number, an array of numbers or a "
                             f"text with a unit; e.g. {example!r}.")
    mask = np.ma.getmaskarray(value) if np.ma.isMaskedArray(value) else None
    try:
        raw = np.asarray(np.ma.getdata(value) if mask is not None else value)
    except ValueError:
        raise WrongTypeError(f"{name} is not a regular array of numbers (rows of different lengths?); "
                             "give one number or an array of one shape.") from None
    if raw.dtype.kind in "USO" and any(isinstance(x, str) for x in raw.ravel()):
        raise WrongTypeError(f"{name} is a list of texts; give numbers in SI, or one text at a time "
                             f"(e.g. {example!r}), or a pint quantity for an array with a unit.")
    if raw.dtype.kind == "c" or (raw.dtype.kind == "O" and any(isinstance(x, complex) for x in raw.ravel())):
        raise WrongTypeError(f"{name} = {_describe(value)} is complex; give real numbers.")
    try:
        data = raw.astype(float, copy=False)   # no copy for float64 arrays (large sweeps)
    except (TypeError, ValueError):
        raise WrongTypeError(f"{name} = {_describe(value)} is not a number, an array of numbers or a text "
                             f"with a unit; e.g. {example!r}.") from None
    if mask is not None and mask.any():
        data = np.where(mask, np.nan, data)
    return (float(data) if data.ndim == 0 else data), (mask if mask is not None and mask.any() else None)


def _finite(si, name, value, nonfinite, mask):
    if nonfinite == "nan":   # the caller reports non-finite elements one by one
        return si
    arr = np.asarray(si)
    bad = ~np.isfinite(arr)
    if not bad.any():
        return si
    if arr.ndim == 0:
        shown = repr(value) if isinstance(value, str) else float(arr)
        raise InputError(f"{name} = {shown} is not finite; give a finite number.")
    where = tuple(int(i) for i in np.argwhere(bad)[0])
    values = f"{arr.size} value{'s' if arr.size != 1 else ''}"
    index = where[0] if len(where) == 1 else where
    count = int(bad.sum())
    others = f" ({count} such values in all)" if count > 1 else ""
    if mask is not None and mask[where]:
        raise InputError(f"{name} is masked at index {index} of {values}{others}: a masked element "
                         "has no value to convert; fill it or leave it out.")
    raise InputError(f"{name} is not finite at index {index} of {values} ({float(arr[where])})"
                     f"{others}; give finite numbers.")


def _is_quantity(value) -> bool:
    return hasattr(value, "magnitude") and hasattr(value, "units")


def _string_to_si(text: str, quantity: str, name: str, molar_mass, atmosphere):
    number, unit_text = split_value(text, name)
    unit, gauge = read_unit(unit_text, quantity, name)
    if gauge and atmosphere is None:
        raise InputError(f"{name} = {text!r} is a gauge pressure; {name} is itself the zero of gauge readings, "
                         "so give it as an absolute pressure, e.g. '101.325 kPa' or '0.95 bar'.")
    q = registry().Quantity(number, unit) if unit else registry().Quantity(number)
    si = _quantity_to_si(q, quantity, name, molar_mass, text=repr(text))
    if gauge:
        si = si + atmosphere
        if si <= 0.0:
            raise InputError(_below_vacuum(text, name, number, unit, atmosphere))
    return si


def _below_vacuum(text, name, number, unit, atmosphere) -> str:
    shown = _display(unit)
    air = float(registry().Quantity(atmosphere, "Pa").to(unit).magnitude)
    gauge = f"{shown} g" if "/" in shown else f"{shown}g"
    return (f"{name} = {text!r} is below vacuum at the set atmosphere {air:.6g} {shown}: it would be "
            f"{number + air:.6g} {shown} absolute. A gauge reading here cannot go below -{air:.6g} {gauge}; "
            f"check the sign and the atmosphere, or give an absolute pressure ({shown}).")


def _known(unit: str) -> bool:
    try:
        registry().Unit(_powers(unit))
    except Exception:  # pint raises several types for unknown or malformed units
        return False
    return True


def _pressure_unit(unit: str, name: str):
    """(pint unit, gauge) of a pressure unit as typed, None if it is not one."""
    base = _pressure_base(unit, name)
    if base is not None:
        return base, False
    for pattern, gauge in ((_GAUGE, True), (_ABSOLUTE, False)):
        match = pattern.match(unit)
        if match:
            base = _pressure_base(match["unit"].strip(), name)
            if base is not None:
                return base, gauge
    return None


def _pressure_base(unit: str, name: str):
    """The pint spelling of an absolute pressure unit (case forgiven where unambiguous)."""
    key = re.sub(r"\s+", "", unit).lower()
    if key == "mpa":
        if unit[0] == "M":
            return "MPa"
        raise InputError(
            f"{name}: {unit!r} would be millipascal (0.001 Pa), which is almost never meant; write MPa "
            "for megapascal (e.g. '10 MPa'), or give millipascal in Pa ('0.01 Pa').")
    if key == "mbar":
        if unit[0] == "m":
            return "mbar"
        raise InputError(f"{name}: {unit!r} would be megabar; write mbar for millibar, or MPa for "
                         "megapascal.")
    if key in ("kg/cm2", "kg/cm^2", "kg/cm²"):
        raise InputError(f"{name}: {unit!r} is a mass per area, not a pressure; for the gauge unit "
                         "kilogram-force per square centimetre write kgf/cm2 (or kgf/cm2g for a gauge).")
    if key in _PRESSURE:
        return _PRESSURE[key]
    spelled = _powers(unit)
    try:
        found = registry().Quantity(1.0, spelled).check(_row("P").dimension)
    except Exception:  # pint raises several types for unknown or malformed units
        return None
    return spelled if found else None


def _powers(unit: str) -> str:
    """Engineers write "kg/m3", "kg/m³" and "cm3/mol": a digit straight after a unit name is a power."""
    unit = unit.replace("²", "^2").replace("³", "^3").replace("⁻¹", "^-1")
    return re.sub(r"(?<=[A-Za-z])(\d+)", r"^\1", unit)


# Spellings of units with an energy or a temperature difference in them (kJ/(kg K), Btu/lb °F).
_MULTIPLY = str.maketrans({"·": " ", "⋅": " ", "∙": " ", "×": " "})
_BTU = re.compile(r"(?<![A-Za-z_])(?:btu|Btu|BTU)(?![A-Za-z_])")    # the International Table Btu (SP 811)
_LBM = re.compile(r"(?<![A-Za-z_])lbm(?![A-Za-z_])")
_GLUED = re.compile(r"(?<![A-Za-z])(kg|g|lb|kmol|mol)((?:[°º˚]|deg)?[CFKR])(?![A-Za-z_])")   # kgK, lb°F
_JOINED = re.compile(r"(?<=[A-Za-z])[-.](?=[A-Za-z°º˚])")                                  # kg-K, kg.K
_DIFFERENCE = re.compile(r"(?<![A-Za-z_])(?:[°º˚]\s*|deg\s*|degrees?\s*)?"
                         r"(C|F|K|R|Celsius|Fahrenheit|Kelvin|Rankine)(?![A-Za-z_])")
_DIFFERENCE_UNIT = {"C": "delta_degC", "F": "delta_degF", "K": "K", "R": "degR"}


def _spell(unit: str, row) -> str:
    """A unit as typed, in pint's spelling for quantity ``row``.

    "kJ/kg K", "kJ/kgK", "kJ/(kg·K)" and "kJ/kg/K" are all kJ/(kg K); in a unit other than a
    temperature's own, a temperature is a difference (°C and K the same size, °F and R
    5/9 K), never an offset; Btu is the International Table Btu; lbm is the pound.
    """
    unit = _LBM.sub("lb", _BTU.sub("Btu_it", unit.translate(_MULTIPLY)))
    if row.per_temperature:
        unit = _JOINED.sub(" ", _GLUED.sub(r"\1 \2", unit))
        unit = _DIFFERENCE.sub(lambda m: _DIFFERENCE_UNIT[m[1][0].upper()], unit)
    if unit.count("/") == 1 and "(" not in unit:       # "J/mol K": everything after / is below it
        top, bottom = (part.strip() for part in unit.split("/"))
        if re.search(r"[\s*]", bottom):
            unit = f"{top}/({bottom})"
    return _powers(unit)


def _quantity_to_si(q, quantity, name, molar_mass, text):
    row = _row(quantity)
    if row.dimensionless:
        if not q.dimensionless:
            if quantity == "quality":
                raise InputError(f"{name} = {text} must be a fraction (0.3) or a percent (30 %).")
            raise InputError(f"{name} = {text} must be a plain number ({row.description}), e.g. {row.example!r}.")
        return _magnitude(q.to(""))
    if q.check(row.dimension):
        return _magnitude(q.to(row.si_unit))
    twin = _row(row.twin) if row.twin else None
    if twin is not None and q.check(twin.dimension):
        if molar_mass is None:
            raise InputError(
                f"{name} = {text} is a {twin.description} ({_per(twin)}); reading it as {name}, a "
                f"{row.description} [{row.si_label}], needs the molar mass: give molar_mass= [kg/mol] "
                f"(solve() gives the fluid's), or give {name} {_per(row)}, e.g. {row.example!r}.")
        return to_other_basis(_magnitude(q.to(twin.si_unit)), twin.name, molar_mass)
    ureg = registry()
    if quantity == "T" and q.units == ureg.Unit("degree"):
        raise InputError(f"{name} = {text}: 'deg' alone is an angle; write °C, °F or K, e.g. '25 °C'.")
    got = "a plain number" if q.dimensionless else f"{q.units:~P}"
    also = f" or {twin.example!r}" if twin is not None and molar_mass is not None else ""
    raise InputError(
        f"{name} = {text} has a unit of the wrong kind ({got}); {name} is a {row.description} "
        f"[{row.si_label}], e.g. {_example(quantity)!r}{also}."
    )


def _per(row) -> str:
    return {"molar": "per mole", "mass": "per kilogram"}.get(row.basis, "")


def _magnitude(q):
    m = np.asarray(q.magnitude, dtype=float)
    return float(m) if m.ndim == 0 else m


def _describe(value) -> str:
    """A short account of a value for a message: its repr when small, its shape when not."""
    if isinstance(value, (bool, np.bool_)):
        return str(bool(value))
    if isinstance(value, numbers.Real):
        return f"{float(value):.6g}"
    if _is_quantity(value):
        size = np.size(value.magnitude)
        return f"{value:~P}" if size == 1 else f"an array of {size} values in {value.units:~P}"
    if isinstance(value, (np.ndarray, list, tuple)):
        size = np.size(np.asarray(value, dtype=object))
        return f"an array of {size} values" if size > 4 or isinstance(value, np.ndarray) else repr(list(value))
    text = repr(value)
    return text if len(text) <= 60 else text[:57] + "..."


def _display(unit: str) -> str:
    return f"{registry().Unit(unit):~P}"


def _example(quantity: str) -> str:
    if quantity == "atmosphere":
        return "101.325 kPa"
    row = QUANTITIES.get(quantity)
    return row.example if row is not None and row.example else "80 bar"


def format_value(value: float, quantity: str, unit: str | None = None, digits: int = 6) -> str:
    """A SI value as display text in ``unit`` (pint spelling; the SI unit when None), e.g.
    "35 °C"; "-" when not finite."""
    return display(value, quantity, _row(quantity).si_unit if unit is None else unit, digits)
