"""Layer 4: strings and pint quantities to SI at the boundary, and back for display.

Below this module everything is SI floats and numpy arrays: T [K], P [Pa], v [m^3/mol],
rho [mol/m^3], rho_mass [kg/m^3], quality [-].

A gauge pressure is never assumed: it must be written with a gauge unit (``"8 barg"``,
``"120 psig"``, ``"500 kPag"``, ``"2 bar(g)"``), and is converted against a stated
atmospheric pressure, 101.325 kPa unless another is given.
"""

from __future__ import annotations

import functools
import math
import re

import numpy as np

from .errors import InputError

#: Standard atmosphere [Pa] (ISO 2533; common practice as the default gauge reference).
STANDARD_ATMOSPHERE = 101325.0

#: What each known quantity means, its SI unit and its pint dimensionality.
QUANTITIES = {
    "T": ("temperature", "K", "[temperature]"),
    "P": ("pressure", "Pa", "[mass] / [length] / [time] ** 2"),
    "v": ("molar volume", "m^3/mol", "[length] ** 3 / [substance]"),
    "rho": ("molar density", "mol/m^3", "[substance] / [length] ** 3"),
    "rho_mass": ("mass density", "kg/m^3", "[mass] / [length] ** 3"),
    "quality": ("vapour quality (vapour mass fraction)", "", "dimensionless"),
}

# Spellings engineers type that pint does not read as meant (common practice).
_UNIT_SPELLINGS = {
    "°c": "degC", "ºc": "degC", "c": "degC", "celsius": "degC", "degc": "degC",
    "°f": "degF", "ºf": "degF", "f": "degF", "fahrenheit": "degF", "degf": "degF",
    "°r": "degR", "r": "degR", "rankine": "degR", "k": "K", "kelvin": "K",
    "%": "percent",
}
_GAUGE = re.compile(r"^(?P<unit>.+?)\s*(?:g|\(g\)|\s+gauge)$", re.IGNORECASE)
_NUMBER = re.compile(r"^\s*(?P<num>[-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*(?P<unit>.*?)\s*$")


@functools.lru_cache(maxsize=1)
def registry():
    """The project's pint unit registry (one per process)."""
    import pint

    return pint.UnitRegistry()


def to_si(value, quantity: str, *, molar_mass: float | None = None,
          atmosphere=STANDARD_ATMOSPHERE):
    """Convert a known quantity to SI.

    Parameters
    ----------
    value : float, array_like, str or pint.Quantity
        Numbers are taken as SI already. Strings hold a number and a unit (``"35 degC"``,
        ``"1160 psi"``, ``"0.5 L/mol"``, ``"8 barg"``).
    quantity : {"T", "P", "v", "rho", "rho_mass", "quality"}
        Which known this is.
    molar_mass : float, optional
        [kg/mol]; lets a specific volume (m^3/kg) stand for v, or a mass density for rho.
    atmosphere : float or str
        Atmospheric pressure [Pa] that a gauge pressure is added to.

    Returns
    -------
    float or numpy.ndarray
        The value in the SI unit of ``quantity`` (see :data:`QUANTITIES`).

    Raises
    ------
    InputError
        Unreadable text, a unit of the wrong kind, NaN or infinity.
    """
    if quantity not in QUANTITIES:
        raise InputError(f"Unknown quantity {quantity!r}; allowed: {', '.join(QUANTITIES)}.")
    if isinstance(value, str):
        si = _string_to_si(value, quantity, molar_mass, atmosphere)
    elif _is_quantity(value):
        si = _quantity_to_si(value, quantity, molar_mass, text=str(value))
    else:
        try:
            si = np.asarray(value, dtype=float)
        except (TypeError, ValueError):
            raise InputError(f"{quantity} = {value!r} is not a number, an array or a text with a unit.") from None
        si = float(si) if si.ndim == 0 else si
    if not np.all(np.isfinite(si)):
        raise InputError(f"{quantity} = {value!r} is not finite; give a finite number.")
    return si


def _is_quantity(value) -> bool:
    return hasattr(value, "magnitude") and hasattr(value, "units")


def _string_to_si(text: str, quantity: str, molar_mass, atmosphere):
    match = _NUMBER.match(text)
    if not match:
        raise InputError(
            f"Cannot read {quantity} = {text!r}: write a number and a unit, e.g. {_example(quantity)!r}."
        )
    number, unit = float(match["num"]), match["unit"]
    gauge = quantity == "P" and _gauge_unit(unit)
    if gauge:
        unit = gauge
    ureg = registry()
    spelled = _UNIT_SPELLINGS.get(unit.lower(), _powers(unit)) if unit else ""
    try:
        q = ureg.Quantity(number, spelled) if spelled else ureg.Quantity(number)
    except Exception:  # pint raises several types for unknown or malformed units
        raise InputError(
            f"Cannot read the unit {unit!r} in {quantity} = {text!r}; e.g. {_example(quantity)!r}."
        ) from None
    si = _quantity_to_si(q, quantity, molar_mass, text=text)
    if gauge:
        si = si + to_si(atmosphere, "P")
    return si


def _powers(unit: str) -> str:
    """Engineers write "kg/m3" and "cm3/mol": a digit straight after a unit name is a power."""
    return re.sub(r"(?<=[A-Za-z])(\d+)", r"^\1", unit)


def _gauge_unit(unit: str):
    """The absolute unit inside a gauge unit ("barg" -> "bar"), or None if not gauge."""
    match = _GAUGE.match(unit.strip())
    if not match:
        return None
    base = match["unit"].strip()
    try:
        return base if registry().Quantity(1.0, base).check("[pressure]") else None
    except Exception:
        return None


def _quantity_to_si(q, quantity, molar_mass, text):
    name, si_unit, dimension = QUANTITIES[quantity]
    ureg = registry()
    if quantity == "quality":
        if not q.dimensionless:
            raise InputError(f"{quantity} = {text!r} must be a fraction (0.3) or a percent (30 %).")
        return _magnitude(q.to(""))
    if q.check(dimension):
        return _magnitude(q.to(si_unit))
    swapped = _mass_basis(quantity, q, molar_mass, ureg)
    if swapped is not None:
        return swapped
    got = "a plain number" if q.dimensionless else f"{q.units:~P}"
    raise InputError(
        f"{quantity} = {text!r} has a unit of the wrong kind ({got}); {quantity} is a {name}, "
        f"e.g. {_example(quantity)!r}."
    )


def _mass_basis(quantity, q, molar_mass, ureg):
    """A specific volume for v, or a mass density for rho, converted with the molar mass."""
    pairs = {"v": ("[length] ** 3 / [mass]", "m^3/kg", lambda x: x * molar_mass),
             "rho": ("[mass] / [length] ** 3", "kg/m^3", lambda x: x / molar_mass)}
    if quantity not in pairs or molar_mass is None:
        return None
    dimension, unit, convert = pairs[quantity]
    return convert(_magnitude(q.to(unit))) if q.check(dimension) else None


def _magnitude(q):
    m = np.asarray(q.magnitude, dtype=float)
    return float(m) if m.ndim == 0 else m


def _example(quantity: str) -> str:
    return {"T": "35 degC", "P": "80 bar", "v": "0.5 L/mol", "rho": "12 mol/L",
            "rho_mass": "850 kg/m^3", "quality": "0.3"}[quantity]


def format_value(value: float, quantity: str, unit: str | None = None, digits: int = 6) -> str:
    """A SI value as display text in ``unit`` (the SI unit when None), e.g. "35 degC"."""
    if unit is None:
        unit = QUANTITIES[quantity][1]
    if not math.isfinite(value):
        return "-"
    shown = registry().Quantity(value, QUANTITIES[quantity][1] or "").to(unit).magnitude if unit else value
    return f"{shown:.{digits}g} {unit}".strip()
