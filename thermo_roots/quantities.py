"""Layer 2: one table of every quantity thermo_roots reads or shows.

Each row (:class:`Quantity`) says what a name such as ``"h"`` means: its SI unit (as pint
reads it, and as a person reads it, in Unicode), its twin on the other basis (``h`` per mole,
``h_mass`` per kilogram), the unit engineers read it in, the reference library's key for it,
a few units an input field offers, and an example of a typed value. The units layer, the
state, the sweeps, the reference cross-check and the panels all take their units, labels and
reference keys from here, so a unit is written in one place.

Below the units layer everything is SI: K, Pa, m³/mol, mol/m³, kg/m³, J/mol, J/(mol K),
J/kg, J/(kg K), m/s, K/Pa, 1/Pa.

References
----------
Thompson, A. & Taylor, B. N. (2008), Guide for the Use of the International System of
Units (SI), NIST Special Publication 811, for the units and their conversion factors.
CoolProp's documentation of its input and output names ("Table of string inputs to PropsSI
function"), for the reference keys.
"""

from __future__ import annotations

import difflib
import functools
import math
import types
import dataclasses
from dataclasses import dataclass

import numpy as np

from .errors import InputError


@dataclass(frozen=True)
class Quantity:
    """One quantity: its name, units, basis twin and reference key.

    Attributes
    ----------
    name : str
        The name used in the API and in table columns (``"h"``, ``"rho_mass"``).
    label : str
        What an input field or a table heading calls it ("Enthalpy"); the same for both
        bases, since a field takes either (the unit decides).
    description : str
        The exact meaning in a few words ("molar enthalpy").
    si_unit : str
        The SI unit as pint reads it (``"J/(mol*K)"``; ``""`` when dimensionless).
    si_label : str
        The SI unit as a person reads it (``"J/(mol K)"``; ``"-"`` when dimensionless).
    dimension : str
        pint's dimensionality of the SI unit, e.g. ``"[length] ** 3 / [substance]"``.
    display_unit, display_label : str
        The unit engineers read the quantity in, as pint reads it and as shown
        (``"kJ/(kg*K)"``, ``"kJ/(kg K)"``).
    twin : str or None
        The same quantity on the other basis (per mole / per kilogram), a row of this table.
    basis : {"molar", "mass", ""}
        Per mole, per kilogram, or neither.
    reference_key : str or None
        The reference library's name of the quantity (CoolProp's PropsSI and AbstractState
        parameter names: ``"Hmolar"``, ``"speed_of_sound"``, ...); the value is
        ``reference ** reference_power``.
    reference_power : int
        1, or -1 where the reference gives the reciprocal (molar volume as 1/``Dmolar``).
    example : str
        A typed value, shown in messages ("250 kJ/kg").
    input_units : tuple of (str, str)
        Units offered beside an input field: (label shown, unit text the units layer reads).
    """

    name: str
    label: str
    description: str
    si_unit: str
    si_label: str
    dimension: str
    display_unit: str
    display_label: str
    twin: str | None = None
    basis: str = ""
    reference_key: str | None = None
    reference_power: int = 1
    example: str = ""
    input_units: tuple = ()

    @property
    def dimensionless(self) -> bool:
        return self.si_unit == ""

    @property
    def heading(self) -> str:
        """The description as a table heading: "Molar volume", "Vapor quality"."""
        text = self.description.split(" (")[0]
        return text[:1].upper() + text[1:]

    @property
    def per_temperature(self) -> bool:
        """True when a temperature in the unit is a difference (kJ/(kg °C), K/bar), never an offset."""
        return self.name != "T" and "[temperature]" in self.dimension


_ENERGY_UNITS_MOLAR = (("kJ/kg", "kJ/kg"), ("kJ/mol", "kJ/mol"), ("J/mol", "J/mol"), ("Btu/lb", "Btu/lb"))
_ENTROPY_UNITS = (("kJ/(kg K)", "kJ/(kg K)"), ("J/(mol K)", "J/(mol K)"), ("Btu/(lb °F)", "Btu/(lb °F)"))

_PER_MOL = "[mass] * [length] ** 2 / [time] ** 2 / [substance]"
_PER_MOL_K = "[mass] * [length] ** 2 / [time] ** 2 / [substance] / [temperature]"
_PER_KG = "[length] ** 2 / [time] ** 2"
_PER_KG_K = "[length] ** 2 / [time] ** 2 / [temperature]"


def _energy(name, label, what, key, example, twin, mass=False):
    if mass:
        return Quantity(name, label, f"specific {what}", "J/kg", "J/kg", _PER_KG, "kJ/kg", "kJ/kg", twin,
                        "mass", key, 1, example, _ENERGY_UNITS_MOLAR)
    return Quantity(name, label, f"molar {what}", "J/mol", "J/mol", _PER_MOL, "kJ/mol", "kJ/mol", twin,
                    "molar", key, 1, example, _ENERGY_UNITS_MOLAR)


def _per_kelvin(name, label, what, key, example, twin, mass=False):
    if mass:
        return Quantity(name, label, f"specific {what}", "J/(kg*K)", "J/(kg K)", _PER_KG_K, "kJ/(kg*K)",
                        "kJ/(kg K)", twin, "mass", key, 1, example, _ENTROPY_UNITS)
    return Quantity(name, label, f"molar {what}", "J/(mol*K)", "J/(mol K)", _PER_MOL_K, "J/(mol*K)",
                    "J/(mol K)", twin, "molar", key, 1, example, _ENTROPY_UNITS)


_ROWS = (
    Quantity("T", "Temperature", "temperature", "K", "K", "[temperature]", "degC", "°C",
             reference_key="T", example="35 °C", input_units=(("°C", "degC"), ("K", "K"), ("°F", "degF"))),
    Quantity("P", "Pressure", "pressure", "Pa", "Pa", "[mass] / [length] / [time] ** 2", "bar", "bar",
             reference_key="P", example="80 bar",
             input_units=(("bar", "bar"), ("barg", "barg"), ("kPa", "kPa"), ("kPag", "kPag"), ("MPa", "MPa"),
                          ("Pa", "Pa"), ("psi", "psi"), ("psig", "psig"))),
    Quantity("v", "Volume", "molar volume", "m^3/mol", "m³/mol", "[length] ** 3 / [substance]", "L/mol", "L/mol",
             twin="v_mass", basis="molar", reference_key="Dmolar", reference_power=-1, example="0.5 L/mol",
             input_units=(("L/mol", "L/mol"), ("m³/mol", "m^3/mol"), ("m³/kg", "m^3/kg"))),
    Quantity("v_mass", "Volume", "specific volume", "m^3/kg", "m³/kg", "[length] ** 3 / [mass]", "m^3/kg",
             "m³/kg", twin="v", basis="mass", reference_key="Dmass", reference_power=-1, example="0.01 m³/kg",
             input_units=(("m³/kg", "m^3/kg"), ("L/kg", "L/kg"), ("L/mol", "L/mol"))),
    Quantity("rho", "Density", "molar density", "mol/m^3", "mol/m³", "[substance] / [length] ** 3", "mol/L",
             "mol/L", twin="rho_mass", basis="molar", reference_key="Dmolar", example="12 mol/L",
             input_units=(("kg/m³", "kg/m^3"), ("mol/L", "mol/L"), ("mol/m³", "mol/m^3"))),
    Quantity("rho_mass", "Density", "mass density", "kg/m^3", "kg/m³", "[mass] / [length] ** 3", "kg/m^3",
             "kg/m³", twin="rho", basis="mass", reference_key="Dmass", example="850 kg/m³",
             input_units=(("kg/m³", "kg/m^3"), ("mol/L", "mol/L"), ("mol/m³", "mol/m^3"))),
    Quantity("Z", "Compressibility factor Z", "compressibility factor Z", "", "-", "dimensionless", "", "-",
             reference_key="Z", example="0.9"),
    Quantity("quality", "Vapor quality", "vapor quality (vapor mass fraction)", "", "-", "dimensionless", "", "-",
             reference_key="Q", example="0.3", input_units=(("fraction", ""), ("%", "percent"))),
    Quantity("molar_mass", "Molar mass", "molar mass", "kg/mol", "kg/mol", "[mass] / [substance]", "g/mol",
             "g/mol", reference_key="molar_mass", example="44.1 g/mol", input_units=(("g/mol", "g/mol"),
                                                                                      ("kg/kmol", "kg/kmol"))),
    _energy("h", "Enthalpy", "enthalpy", "Hmolar", "18 kJ/mol", "h_mass"),
    _energy("u", "Internal energy", "internal energy", "Umolar", "15 kJ/mol", "u_mass"),
    dataclasses.replace(_energy("g", "Gibbs energy", "Gibbs energy", "Gmolar", "-5 kJ/mol", None),
                        input_units=(("kJ/mol", "kJ/mol"), ("J/mol", "J/mol"))),   # per mole only: no twin
    _energy("h_mass", "Enthalpy", "enthalpy", "Hmass", "250 kJ/kg", "h", mass=True),
    _energy("u_mass", "Internal energy", "internal energy", "Umass", "200 kJ/kg", "u", mass=True),
    _per_kelvin("s", "Entropy", "entropy", "Smolar", "120 J/(mol K)", "s_mass"),
    _per_kelvin("s_mass", "Entropy", "entropy", "Smass", "1.2 kJ/(kg K)", "s", mass=True),
    _per_kelvin("cp", "Isobaric heat capacity", "isobaric heat capacity", "Cpmolar", "75 J/(mol K)", "cp_mass"),
    _per_kelvin("cv", "Isochoric heat capacity", "isochoric heat capacity", "Cvmolar", "65 J/(mol K)", "cv_mass"),
    _per_kelvin("cp_mass", "Isobaric heat capacity", "isobaric heat capacity", "Cpmass", "1.7 kJ/(kg K)", "cp",
                mass=True),
    _per_kelvin("cv_mass", "Isochoric heat capacity", "isochoric heat capacity", "Cvmass", "1.5 kJ/(kg K)", "cv",
                mass=True),
    Quantity("w", "Speed of sound", "speed of sound", "m/s", "m/s", "[length] / [time]", "m/s", "m/s",
             reference_key="speed_of_sound", example="250 m/s", input_units=(("m/s", "m/s"), ("ft/s", "ft/s"))),
    Quantity("mu_jt", "Joule–Thomson coefficient", "Joule–Thomson coefficient (∂T/∂P at constant h)", "K/Pa",
             "K/Pa", "[temperature] * [length] * [time] ** 2 / [mass]", "K/bar", "K/bar",
             reference_key="d(T)/d(P)|Hmolar", example="0.5 K/bar", input_units=(("K/bar", "K/bar"), ("K/Pa", "K/Pa"))),
    Quantity("kappa_T", "Isothermal compressibility", "isothermal compressibility", "1/Pa", "1/Pa",
             "[length] * [time] ** 2 / [mass]", "1/bar", "1/bar", reference_key="isothermal_compressibility",
             example="0.01 1/bar", input_units=(("1/bar", "1/bar"), ("1/Pa", "1/Pa"))),
)

#: Every quantity by name (read-only).
QUANTITIES = types.MappingProxyType({q.name: q for q in _ROWS})


@functools.lru_cache(maxsize=1)
def registry():
    """The project's pint unit registry (one per process)."""
    import pint

    return pint.UnitRegistry()


def quantity(name: str) -> Quantity:
    """The row of ``name`` (``quantity("h")``).

    Raises
    ------
    InputError
        An unknown name; the message lists the names and the closest ones.
    """
    try:
        return QUANTITIES[name]
    except (KeyError, TypeError):
        pass
    close = difflib.get_close_matches(str(name), list(QUANTITIES), n=3)
    hint = f" Did you mean {' or '.join(map(repr, close))}?" if close else ""
    raise InputError(f"Unknown quantity {name!r}; allowed: {', '.join(QUANTITIES)}.{hint}")


def convert(value, name: str, unit: str | None = None):
    """A SI value of quantity ``name`` in ``unit`` (pint spelling; the display unit when None).

    ``convert(298.15, "T")`` is 25.0 (°C); arrays in, arrays out.
    """
    q = quantity(name)
    unit = q.display_unit if unit is None else unit
    if unit == q.si_unit:
        return value if np.ndim(value) else float(value)
    m = registry().Quantity(np.asarray(value, dtype=float), q.si_unit).to(unit).magnitude
    m = np.asarray(m, dtype=float)
    return float(m) if m.ndim == 0 else m


def unit_label(name: str, unit: str | None = None) -> str:
    """How ``unit`` (pint spelling) of quantity ``name`` is shown: the table's Unicode label
    for its SI and display units, pint's short form otherwise ("" when dimensionless)."""
    q = quantity(name)
    if unit is None or unit == q.display_unit:
        label = q.display_label
    elif unit == q.si_unit:
        label = q.si_label
    else:
        label = f"{registry().Unit(unit):~P}"
    return "" if label == "-" else label


def display(value, name: str, unit: str | None = None, digits: int = 5) -> str:
    """A SI value as text in the unit engineers read (or ``unit``): ``display(2.5e5, "h_mass")``
    is ``"250 kJ/kg"``; "-" for NaN or None."""
    if value is None or not math.isfinite(float(value)):
        return "-"
    shown = convert(float(value), name, unit)
    return f"{shown:.{digits}g} {unit_label(name, unit)}".strip()


def to_other_basis(value, name: str, molar_mass: float):
    """A value of ``name`` (SI) on its twin's basis (SI): per kilogram to per mole or back.

    ``to_other_basis(2.5e5, "h_mass", 0.044)`` is 11000.0 (J/mol). Densities go the other
    way round (mol/m³ = (kg/m³) / M).
    """
    q = quantity(name)
    if q.twin is None:
        raise InputError(f"{name} ({q.description}) has no mass-basis twin; allowed: "
                         f"{', '.join(n for n, r in QUANTITIES.items() if r.twin)}.")
    return value * molar_mass ** _molar_mass_power(name)


@functools.lru_cache(maxsize=None)
def _molar_mass_power(name: str) -> int:
    """k in twin = value · M**k, found from the dimensions (h_mass → h: +1; rho_mass → rho: −1)."""
    q = QUANTITIES[name]
    ureg = registry()
    twin = ureg.Quantity(1.0, QUANTITIES[q.twin].si_unit or "")
    for k in (1, -1):
        if (ureg.Quantity(1.0, q.si_unit) * ureg.Quantity(1.0, "kg/mol") ** k).check(twin.dimensionality):
            return k
    raise AssertionError(f"{name} and {q.twin} differ by more than the molar mass")  # the table is wrong
