"""Reading and checking the given quantities of `solve`: names, pairs, units, domains.

The knowns arrive as SI floats or arrays, text with units or pint quantities; they leave as
flat float arrays in SI, mass-basis energies and densities read into molar values and v, and
every element outside the model's domain flagged (with a reason) in a :class:`Problems`.
"""

from __future__ import annotations

import functools

import numpy as np

from ..errors import DomainError, InputError
from ..models import Model
from ..units import to_si
from ._problems import si_array

#: The volume measures, all read into v.
_VOLUME_KNOWNS = ("v", "rho", "rho_mass")
#: Energy knowns (molar, and their mass-basis twins read into molar values).
_ENERGY_KNOWNS = ("h", "s", "u", "h_mass", "s_mass", "u_mass")
_ALL_KNOWNS = ("T", "P") + _VOLUME_KNOWNS + ("quality",) + _ENERGY_KNOWNS
#: Knowns that are absolute and positive (an energy has an arbitrary zero; quality its own range).
_POSITIVE_KNOWNS = ("T", "P") + _VOLUME_KNOWNS
_BRANCHES = ("stable", "liquid", "vapor")
#: The pairs with an energy that solve understands (after the mass basis and the volume
#: measures are read: h_mass is h, rho is v), as people write them.
ENERGY_PAIRS = ("(P, h)", "(P, s)", "(T, h)", "(T, s)", "(h, s)", "(u, v)")
_ENERGY_PAIR_SETS = (frozenset("Ph"), frozenset("Ps"), frozenset("Th"), frozenset("Ts"), frozenset("hs"),
                     frozenset(("u", "v")))


def base_name(name):
    """The molar, volume-as-v name of a known: h_mass -> h, rho_mass -> v, T -> T."""
    if name in _VOLUME_KNOWNS:
        return "v"
    return name[:-5] if name.endswith("_mass") else name


def _check_model(model, caller):
    """Refuse anything that is not a model object, with an example of one."""
    if isinstance(model, Model):
        return
    example = "solve(tr.PengRobinson(tr.get_fluid('propane')), T='25 degC', P='10 bar')"
    if isinstance(model, type) and issubclass(model, Model):
        raise InputError(f"{caller} needs a model object, not the class {model.__name__}: make one for a fluid, "
                         f"e.g. {model.__name__}(get_fluid('propane')).")
    raise InputError(f"{caller} needs a model object as its first argument, e.g. {example}; got {model!r}.")


def _read_knowns(model, knowns, atmosphere):
    unknown = sorted(set(knowns) - set(_ALL_KNOWNS))
    if unknown:
        raise InputError(f"Unknown quantity {', '.join(unknown)}; allowed: {', '.join(_ALL_KNOWNS)}.")
    if len(knowns) != 2:
        raise InputError(
            f"Give exactly two knowns, got {len(knowns)} ({', '.join(knowns) or 'none'}); "
            "e.g. solve(model, T='25 degC', P='10 bar')."
        )
    if sum(k in _VOLUME_KNOWNS for k in knowns) == 2:
        raise InputError(f"{' and '.join(knowns)} both fix the volume; give one of them with T or P.")
    if "quality" in knowns and not ({"T", "P"} & set(knowns)):
        raise InputError("quality goes with T or with P, e.g. solve(model, T='20 degC', quality=0.3).")
    bases = frozenset(base_name(k) for k in knowns)
    if bases & {"h", "s", "u"} and bases not in _ENERGY_PAIR_SETS:
        if "u" in bases:
            raise InputError(f"{' and '.join(knowns)}: u goes with a volume (a closed vessel: solve(model, u=..., "
                             "rho_mass='600 kg/m3')); give v, rho or rho_mass with it.")
        raise InputError(f"{' and '.join(knowns)} is not a pair solve understands; with an energy it takes "
                         f"{', '.join(ENERGY_PAIRS)} (mass-basis h_mass, s_mass, u_mass and rho, rho_mass too), "
                         "e.g. a valve outlet: solve(model, P='2 bar', h=...).")
    M = model.molar_mass   # a mixture's too (model.fluid refuses a mixture)
    si = {k: np.asarray(si_array(to_si, val, k, molar_mass=M, atmosphere=atmosphere), dtype=float)
          for k, val in knowns.items()}
    try:
        si = dict(zip(si, np.broadcast_arrays(*si.values())))
    except ValueError:
        shapes = ", ".join(f"{k} {np.shape(x)}" for k, x in si.items())
        raise InputError(f"The knowns' shapes do not broadcast together: {shapes}. Give arrays of one shape, "
                         "or shapes that numpy broadcasts (e.g. T of shape (n, 1) with P of shape (m,)).") from None
    return si


def _check_knowns(model, flat, given, problems):
    """Flag every element whose knowns lie outside the model's domain (NaN, <= 0, v <= b, ...)."""
    def value(name, i):
        x = flat[name][i]
        text = given[name] if isinstance(given[name], str) else None
        return f"{x:.6g} {_unit(name)}" + (f" (given as {text!r})" if text else "")

    for name, x in flat.items():
        positive = name in _POSITIVE_KNOWNS
        if positive and _all_positive_finite(x):   # the common case: one quick pass
            continue
        problems.flag(~np.isfinite(x), lambda i, n=name: f"{n} = {value(n, i)} is not a finite number (NaN, inf or a masked element).",
                      kind=InputError)
        if positive:
            absolute = " absolute" if name in ("T", "P") else ""
            problems.flag(x <= 0.0, lambda i, n=name, a=absolute: f"{n} must be above zero{a}: got {value(n, i)}.")
    M = model.fluid.molar_mass
    for name in ("h", "s", "u"):
        if f"{name}_mass" in flat:
            flat[name] = flat.pop(f"{name}_mass") * M
    if "rho" in flat:
        flat["v"] = 1.0 / flat.pop("rho")
    if "rho_mass" in flat:
        flat["v"] = M / flat.pop("rho_mass")
    v_min = model.v_min
    if "v" in flat and not flat["v"].min(initial=np.inf) > v_min:
        problems.flag(flat["v"] <= v_min, lambda i: (
            f"v = {flat['v'][i]:.6g} m³/mol is at or below the co-volume b = {v_min:.6g} m³/mol of {model.name} "
            f"for {model.fluid.name}: no fluid is that dense in this model. Check the volume or density and its unit."))
    if "quality" in flat:
        q = flat["quality"]
        problems.flag((q < 0.0) | (q > 1.0), lambda i: f"quality must be between 0 and 1; got {q[i]:.6g}.")
        if not model.has_saturation:
            raise DomainError(f"{model.name} has no saturation, so quality has no meaning; choose a cubic model.")
        if "T" in flat:
            T = flat["T"]
            problems.flag(T > model.fluid.Tc, lambda i: (
                f"quality needs T at or below Tc = {model.fluid.Tc:.6g} K; got {T[i]:.6g} K."))
        else:
            P = flat["P"]
            problems.flag(P > model.fluid.Pc, lambda i: (
                f"quality needs P at or below Pc = {model.fluid.Pc:.6g} Pa; got {P[i]:.6g} Pa."))


def _flag_unfinite(model, parts, problems):
    """A solved element whose T, P or v came out NaN or inf is refused, not reported."""
    T, P, v = (np.asarray(parts[k], dtype=float) for k in ("T", "P", "v"))
    if problems.any:
        T, P, v = (np.where(problems.ok, x, 1.0) for x in (T, P, v))   # flagged already: not again
    if _all_positive_finite(T) and _all_positive_finite(P) and _all_positive_finite(v):
        return   # the common case, in three quick passes
    bad = ~(np.isfinite(T) & np.isfinite(P) & np.isfinite(v) & (v > 0.0))
    problems.flag(bad, lambda i: (
        f"the model gives no finite state at T = {T[i]:.6g} K, P = {P[i]:.6g} Pa, v = {v[i]:.6g} m³/mol: "
        f"these knowns lie outside the range {model.name} holds in double precision (e.g. a pressure or "
        "temperature hundreds of orders of magnitude from the critical point). Check the values and units."))


def _all_positive_finite(x) -> bool:
    """Every element above zero and finite (min and max are quick; NaN fails both tests)."""
    return x.size == 0 or bool(x.min() > 0.0 and x.max() < np.inf)




def _unit(name):
    """The SI unit of a known as people read it ("K", "Pa", "m³/mol", "" for quality)."""
    from ..quantities import quantity, unit_label

    return unit_label(name, quantity(name).si_unit)


def _energy_quote(model, name):
    """value [J/mol or J/(mol K)] -> text on both bases in the units engineers read, per
    kilogram first: for propane h = 25000 J/mol is "566.95 kJ/kg (25 kJ/mol)".

    Messages about an energy quote its value and its limits this way, so that whichever
    basis was typed ("250 kJ/kg", "18 kJ/mol", h_mass=...) is there as given, with the
    limits in the same unit. Nothing is worked out until a message is written, and the unit
    factors once per quantity (no unit library call per element or per solve).
    """
    M = model.fluid.molar_mass

    def quote(x):
        (per_kg, kg_label), (per_mol, mol_label) = _display_factor(f"{name}_mass"), _display_factor(name)
        return f"{x * per_kg / M:.6g} {kg_label} ({x * per_mol:.6g} {mol_label})"
    return quote


@functools.lru_cache(maxsize=None)
def _display_factor(name):
    """(display value per SI value, display unit label) of a quantity whose units are
    proportional (an energy, not a temperature): "h_mass" -> (0.001, "kJ/kg")."""
    from ..quantities import convert, unit_label

    return convert(1.0, name), unit_label(name)
