"""Layer 2: the :class:`Fluid` value and the lookup of the fluid library's constants.

The constants come from CoolProp's fluid library (its multiparameter Helmholtz-energy
equations carry the critical point, acentric factor and molar mass of each fluid).
"""

from __future__ import annotations

import difflib
import functools
import json
import math
import pathlib
import numbers
import re
from dataclasses import dataclass

import numpy as np

from .errors import InputError, UnknownFluidError, WrongTypeError


@dataclass(frozen=True)
class Fluid:
    """A pure fluid as the cubic equations of state see it.

    Parameters
    ----------
    name : str
        Name shown in results.
    Tc : float
        Critical temperature [K].
    Pc : float
        Critical pressure [Pa].
    omega : float
        Pitzer acentric factor [-].
    molar_mass : float
        Molar mass [kg/mol].
    library_name : str or None
        The fluid's name in CoolProp's library, used by the reference cross-check;
        None for a user-defined fluid.
    T_triple : float or None
        Triple-point temperature [K], where known: below it the real fluid is solid, which
        no cubic equation of state represents (states there carry a warning).

    References
    ----------
    Pitzer, K. S. et al. (1955), J. Am. Chem. Soc. 77, 3433 (acentric factor).
    """

    name: str
    Tc: float
    Pc: float
    omega: float
    molar_mass: float
    library_name: str | None = None
    T_triple: float | None = None

    def __post_init__(self):
        if not isinstance(self.name, str) or not self.name.strip():
            raise InputError(f"A Fluid needs a name (non-empty text), not {self.name!r}.")
        for label in ("Tc", "Pc", "molar_mass", "omega"):   # numpy scalars are stored as floats
            value = getattr(self, label)
            if _is_real_number(value):
                object.__setattr__(self, label, float(value))
        for label, value in (("Tc", self.Tc), ("Pc", self.Pc), ("molar_mass", self.molar_mass)):
            if not (_is_real_number(value) and math.isfinite(value) and value > 0):
                raise InputError(
                    f"Fluid {self.name!r}: {label} = {value!r} must be a positive finite number in SI "
                    "units (Tc [K], Pc [Pa], molar_mass [kg/mol])."
                )
        if self.T_triple is not None:
            if not (_is_real_number(self.T_triple) and 0 < self.T_triple < self.Tc):
                raise InputError(f"Fluid {self.name!r}: T_triple = {self.T_triple!r} must be a number of kelvin "
                                 f"between 0 and Tc = {self.Tc:.6g} K, or None.")
            object.__setattr__(self, "T_triple", float(self.T_triple))
        if not (_is_real_number(self.omega) and math.isfinite(self.omega) and -1 < self.omega < 2):
            raise InputError(f"Fluid {self.name!r}: omega = {self.omega!r} must be a finite number between -1 and 2.")

    def __repr__(self):
        return (
            f"Fluid({self.name!r}, Tc={self.Tc:.6g} K, Pc={self.Pc / 1e6:.6g} MPa, "
            f"omega={self.omega:.4g}, molar_mass={self.molar_mass * 1e3:.6g} g/mol)"
        )

    def _repr_html_(self):
        rows = [
            ("Critical temperature", f"{self.Tc:.6g} K"),
            ("Critical pressure", f"{self.Pc / 1e6:.6g} MPa"),
            ("Acentric factor", f"{self.omega:.4g}"),
            ("Molar mass", f"{self.molar_mass * 1e3:.6g} g/mol"),
        ]
        body = "".join(f"<tr><th style='text-align:left'>{k}</th><td>{v}</td></tr>" for k, v in rows)
        return f"<table><caption>{self.name}</caption>{body}</table>"


def _is_real_number(value) -> bool:
    """A real number (Python or numpy scalar), not a bool, not an array."""
    return isinstance(value, numbers.Real) and not isinstance(value, (bool, np.bool_))


#: Library names that engineers write differently from the split-and-lower rule below.
_DISPLAY_NAMES = {
    "n-Propane": "propane", "CycloHexane": "cyclohexane", "CycloPropane": "cyclopropane",
    "IsoButane": "isobutane", "IsoButene": "isobutene", "EthylBenzene": "ethylbenzene",
    "ParaHydrogen": "parahydrogen", "OrthoHydrogen": "orthohydrogen",
    "ParaDeuterium": "paradeuterium", "OrthoDeuterium": "orthodeuterium",
}


def display_name(library_name: str) -> str:
    """The name engineers write for a library fluid: "CarbonDioxide" -> "carbon dioxide".

    Refrigerant numbers and codes (R134a, R1234ze(E), D4, MDM, SES36, Novec649) are kept as
    they are; other names are split at capitals and written in lower case.
    """
    if library_name in _DISPLAY_NAMES:
        return _DISPLAY_NAMES[library_name]
    if re.search(r"[A-Za-z]\d|[A-Z]{2}", library_name):   # a code (R134a, D4, MDM), not a word
        return library_name
    return re.sub(r"(?<=[a-z])(?=[A-Z])", " ", library_name).lower()


def _normalise(name: str) -> str:
    """Key for matching: lower case without spaces, hyphens, underscores or brackets."""
    return re.sub(r"[\s\-_()\[\],.]", "", name.lower())


# Everyday names that CoolProp's own alias lists do not carry (common practice).
_EXTRA_ALIASES = {
    "carbon dioxide": "CarbonDioxide",
    "carbon monoxide": "CarbonMonoxide",
    "hydrogen sulfide": "HydrogenSulfide",
    "hydrogen sulphide": "HydrogenSulfide",
    "steam": "Water",
    "natural gas": "Methane",
    "isobutane": "IsoButane",
    "i-butane": "IsoButane",
    "isopentane": "Isopentane",
    "sulfur dioxide": "SulfurDioxide",
    "sulphur dioxide": "SulfurDioxide",
}


#: Constants of CoolProp's fluid library, written by :func:`library_table_from_coolprop`.
#: Reading this file instead of importing CoolProp keeps the first solve quick (CoolProp's
#: import takes seconds); tests/test_fluids.py checks it against CoolProp itself.
LIBRARY_TABLE = pathlib.Path(__file__).with_name("fluid_library.json")


@functools.lru_cache(maxsize=1)
def _library_table() -> dict[str, dict]:
    return json.loads(LIBRARY_TABLE.read_text(encoding="utf-8"))["fluids"]


def library_table_from_coolprop() -> dict:
    """Every fluid's constants, aliases and CAS number as CoolProp reports them now.

    Run ``python -m thermo_roots.fluids`` to rewrite :data:`LIBRARY_TABLE` after a CoolProp
    upgrade.
    """
    import CoolProp
    import CoolProp.CoolProp as CP

    fluids = {}
    for name in CP.get_global_param_string("FluidsList").split(","):
        state = CoolProp.AbstractState("HEOS", name)
        fluids[name] = {
            "Tc": float(state.T_critical()), "Pc": float(state.p_critical()),
            "omega": float(state.acentric_factor()), "molar_mass": float(state.molar_mass()),
            "T_triple": float(state.Ttriple()),
            "CAS": CP.get_fluid_param_string(name, "CAS"),
            "aliases": [a for a in CP.get_fluid_param_string(name, "aliases").split(",") if a],
        }
    return {"source": f"CoolProp {CoolProp.__version__}", "fluids": dict(sorted(fluids.items()))}


@functools.lru_cache(maxsize=1)
def _library_index() -> dict[str, str]:
    """Map every normalised name, alias and CAS number to CoolProp's fluid name."""
    index: dict[str, str] = {}
    for fluid, entry in _library_table().items():
        for alias in [fluid, entry["CAS"], *entry["aliases"]]:
            if alias:
                index.setdefault(_normalise(alias), fluid)
    for alias, fluid in _EXTRA_ALIASES.items():
        index.setdefault(_normalise(alias), fluid)
    return index


def fluid_names() -> list[str]:
    """Names of every fluid in the library, sorted case-insensitively."""
    return sorted(set(_library_index().values()), key=str.lower)


@functools.lru_cache(maxsize=None)
def get_fluid(name: str) -> Fluid:
    """Look a fluid up by name, alias, refrigerant number or CAS number.

    Parameters
    ----------
    name : str
        For example ``"CO2"``, ``"carbon dioxide"``, ``"n-butane"``, ``"R134a"``, ``"R-744"``.
        Case, spaces and hyphens do not matter.

    Returns
    -------
    Fluid
        Critical temperature [K], critical pressure [Pa], acentric factor [-] and molar
        mass [kg/mol] of the fluid's reference equation in CoolProp.

    Raises
    ------
    UnknownFluidError
        The name is not in the library; the message lists the closest names.

    References
    ----------
    Bell, I. H. et al. (2014), Ind. Eng. Chem. Res. 53, 2498-2508 (CoolProp).
    """
    if not isinstance(name, str) or not name.strip():
        raise InputError(f"A fluid name must be a non-empty string, not {name!r}.")
    index = _library_index()
    key = _normalise(name)
    if key not in index:
        close = difflib.get_close_matches(key, index.keys(), n=5, cutoff=0.6)
        suggestions = tuple(dict.fromkeys(index[k] for k in close))
        hint = f" Did you mean {', '.join(suggestions)}?" if suggestions else ""
        raise UnknownFluidError(
            f"Unknown fluid {name!r}.{hint} thermo_roots.fluid_names() lists all "
            f"{len(set(index.values()))}; or define your own with Fluid(name, Tc, Pc, omega, molar_mass).",
            suggestions,
        )
    return _fluid_from_library(index[key])


def as_fluid(fluid, who: str) -> Fluid:
    """A Fluid as given, or a library fluid looked up by name; anything else is refused.

    who : how the caller is written in the message, e.g. "PengRobinson(fluid)".
    """
    if isinstance(fluid, str):
        return get_fluid(fluid)
    if not isinstance(fluid, Fluid):
        raise WrongTypeError(f"{who} needs a Fluid or a library fluid's name, e.g. get_fluid('propane') or "
                             f"'propane'; got {fluid!r}.")
    return fluid


def _fluid_from_library(library_name: str) -> Fluid:
    entry = _library_table()[library_name]
    return Fluid(name=display_name(library_name), Tc=entry["Tc"], Pc=entry["Pc"], omega=entry["omega"],
                 molar_mass=entry["molar_mass"], library_name=library_name, T_triple=entry.get("T_triple"))


if __name__ == "__main__":
    LIBRARY_TABLE.write_text(json.dumps(library_table_from_coolprop(), indent=1) + "\n", encoding="utf-8")
    print(f"wrote {LIBRARY_TABLE}")
