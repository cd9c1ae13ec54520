"""Layer 2: the :class:`Fluid` value and the lookup of the fluid library's constants.

The constants come from CoolProp's fluid library (its multiparameter Helmholtz-energy
equations carry the critical point, acentric factor and molar mass of each fluid).
"""

from __future__ import annotations

import dataclasses
import difflib
import functools
import json
import math
import pathlib
import numbers
import re
from dataclasses import dataclass, field

import numpy as np

from .errors import InputError, UnknownFluidError, WrongTypeError
from .ideal_gas import CP0_SOURCE, IdealGasPart, part_from_cp0


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
    cp0 : float, tuple of up to 5 floats, or None
        Keyword only. Ideal-gas heat capacity of a user-defined fluid: a constant
        [J/(mol K)], or (a, b, c, d, e) of cp0 = a + b T + c T² + d T³ + e T⁴ [J/(mol K),
        T in K]; it must exceed R at 300 K. Its reference state: h0 = 0 at 298.15 K, and
        s0 = 0 at 298.15 K and 101325 Pa. Gives :attr:`ideal_gas`.
    ideal_gas : IdealGasPart or None
        Keyword only. The ideal-gas Helmholtz energy (thermo_roots.ideal_gas); library
        fluids carry their reference equation's own, user-defined fluids the one made from
        ``cp0``; None when neither is known (no caloric properties then).

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
    cp0: float | tuple | None = field(default=None, kw_only=True)
    ideal_gas: IdealGasPart | None = field(default=None, kw_only=True, repr=False)

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
        self._check_ideal_gas()

    def _check_ideal_gas(self):
        who = f"Fluid {self.name!r}"
        if self.ideal_gas is not None and not isinstance(self.ideal_gas, IdealGasPart):
            raise WrongTypeError(f"{who}: ideal_gas must be a thermo_roots.ideal_gas.IdealGasPart or None, not "
                                 f"{self.ideal_gas!r}; for a heat capacity give cp0= instead.")
        if self.cp0 is None:
            return
        # a part made from cp0 before (dataclasses.replace passes both) is made again from cp0
        if self.ideal_gas is not None and not self.ideal_gas.source.startswith(CP0_SOURCE):
            raise InputError(f"{who}: give cp0= or ideal_gas=, not both (cp0 = {self.cp0!r} would build a second "
                             "ideal-gas part).")
        part = part_from_cp0(self.cp0, self.Tc, self.Pc, who)
        stored = float(self.cp0) if _is_real_number(self.cp0) else tuple(float(c) for c in self.cp0)
        object.__setattr__(self, "cp0", stored)   # a hashable value, like the other fields
        object.__setattr__(self, "ideal_gas", part)

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
    """Every fluid's constants, aliases, CAS number and ideal-gas part as CoolProp reports them now.

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
            "ideal_gas": _ideal_gas_from_coolprop(name, state).to_table(),
        }
    return {"source": f"CoolProp {CoolProp.__version__}", "fluids": dict(sorted(fluids.items()))}


def _ideal_gas_from_coolprop(name: str, state) -> IdealGasPart:
    """The ideal-gas terms of the fluid's reference equation (EOS[0] of its CoolProp file).

    The terms are converted as published. Then a1 + a2 tau is adjusted so that alpha0 and
    d alpha0/d tau equal CoolProp's at tau = delta = 1: this moves only the reference state
    (cp0 is untouched). It is nil to rounding except for the fluids with Aly-Lee terms
    (n-heptane and D6 in CoolProp 8.0.0), where CoolProp's alpha0 differs from the integral
    from T0 by a constant plus a term in tau (cause not traced; CoolProp's h and s are 0 at
    their normal boiling point, as their files say); a shift for any other fluid means a
    term was converted wrongly and stops the regeneration.
    """
    import CoolProp
    import CoolProp.CoolProp as CP
    from .ideal_gas import part_from_coolprop

    document = json.loads(CP.get_fluid_param_string(name, "JSON"))
    document = document[0] if isinstance(document, list) else document
    eos = document["EOS"][0]
    T_r, rho_r = float(state.T_reducing()), float(state.rhomolar_reducing())
    part = part_from_coolprop(eos, float(state.gas_constant()), T_r, rho_r, source=f"CoolProp {name}")
    state.update(CoolProp.DmolarT_INPUTS, rho_r, T_r)
    mine = part.alpha0(1.0, 1.0)
    shift_tau = float(state.dalpha0_dTau()) - mine.alpha_tau
    shift = float(state.alpha0()) - mine.alpha - shift_tau
    has_aly_lee = any(t["type"] == "IdealGasHelmholtzCP0AlyLee" for t in eos["alpha0"])
    if not has_aly_lee and max(abs(shift), abs(shift_tau)) > 1e-9 * (1.0 + abs(float(state.alpha0()))):
        raise InputError(f"{name}: the converted ideal-gas terms differ from CoolProp's by {shift:+.3g} "
                         f"{shift_tau:+.3g} tau; check thermo_roots.ideal_gas.part_from_coolprop.")
    a1, a2 = part.lead
    return dataclasses.replace(part, lead=(a1 + shift, a2 + shift_tau)) if has_aly_lee else part


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
    ideal = entry.get("ideal_gas")
    return Fluid(name=display_name(library_name), Tc=entry["Tc"], Pc=entry["Pc"], omega=entry["omega"],
                 molar_mass=entry["molar_mass"], library_name=library_name, T_triple=entry.get("T_triple"),
                 ideal_gas=None if ideal is None else IdealGasPart.from_table(
                     ideal, source=f"{library_name}: reference equation in CoolProp's fluid library"))


if __name__ == "__main__":
    LIBRARY_TABLE.write_text(json.dumps(library_table_from_coolprop(), indent=1) + "\n", encoding="utf-8")
    print(f"wrote {LIBRARY_TABLE}")
