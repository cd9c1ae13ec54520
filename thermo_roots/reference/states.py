"""Reference states: the reference equation at two knowns, as a result value.

Reads the knowns (any pair the driver understands, numbers, arrays or text with units),
runs them through the batch runner and says where a fluid's constants differ from those of
the reference equation it is compared with.
"""

from __future__ import annotations

import html
from dataclasses import dataclass, field

import numpy as np

from ..errors import InputError
from ..fluids import as_fluid
from ..models import R, _scalar_or_array
from ..quantities import convert, unit_label
from ..units import to_si
from .batch import _check_run_options, evaluate_reference
from .driver import REFERENCE_PAIRS, _fluid_name, _library_limits, _unavailable_values, library_reason

@dataclass(frozen=True)
class ReferenceState:
    """The reference equation at given knowns. Scalars for scalar knowns, arrays otherwise.

    Attributes
    ----------
    fluid : Fluid
    T : temperature [K]
    P : pressure [Pa]
    v : molar volume [m^3/mol] (mixture mean in the two-phase region)
    phase : "liquid", "vapor", "supercritical", "two-phase" ("" where unavailable)
    quality : vapor mole fraction [-] in the two-phase region, else NaN
    P_sat : saturation pressure at T [Pa], NaN at or above Tc
    T_sat : saturation temperature at P [K], NaN at or above Pc
    v_liquid, v_vapor : saturated volumes at T [m^3/mol]
    h, s, u : enthalpy [J/mol], entropy [J/(mol K)], internal energy [J/mol] on the reference
        equation's own reference state (the lever rule in the two-phase region)
    cp : isobaric heat capacity [J/(mol K)], NaN in the two-phase region
    w : speed of sound [m/s], NaN in the two-phase region
    available : bool
    reason : why a state is unavailable ("" where available)
    completed : how many leading states were evaluated (less than the size if interrupted)
    warnings : sentences about the whole result, e.g. the fluid's constants differ from the
        reference equation's (see :func:`constant_warnings`); () when there is nothing to say
    """

    fluid: object = field(repr=False)
    T: object
    P: object
    v: object
    phase: object
    quality: object = field(repr=False)
    P_sat: object = field(repr=False)
    T_sat: object = field(repr=False)
    v_liquid: object = field(repr=False)
    v_vapor: object = field(repr=False)
    h: object = field(repr=False)
    s: object = field(repr=False)
    u: object = field(repr=False)
    cp: object = field(repr=False)
    w: object = field(repr=False)
    available: object = field(repr=False)
    reason: object = field(repr=False)
    completed: int = field(repr=False, default=0)
    warnings: tuple = field(repr=False, default=())

    @property
    def Z(self):
        """Compressibility factor P v / (R T) [-]."""
        return _scalar_or_array(np.asarray(self.P) * np.asarray(self.v) / (R * np.asarray(self.T)))

    @property
    def rho_mass(self):
        """Mass density [kg/m^3]."""
        return _scalar_or_array(self.fluid.molar_mass / np.asarray(self.v))

    def __repr__(self):
        name = _fluid_name(self.fluid)
        if np.ndim(self.T):
            text = f"ReferenceState({name!r}, {np.size(self.T)} states, {int(np.sum(self.available))} available)"
        elif not self.available:
            text = f"ReferenceState({name!r}, unavailable: {self.reason})"
        else:
            text = (f"ReferenceState({name!r}, T={self.T:.6g} K, P={self.P:.6g} Pa, "
                    f"v={self.v:.6g} m³/mol, phase={self.phase!r})")
        return text + _warning_text(self.warnings)

    def _repr_html_(self):
        return f"<pre>{html.escape(repr(self))}</pre>"


def _shape_values(values, shape):
    def shaped(x):
        x = np.asarray(x).reshape(shape)
        return x.item() if shape == () else x

    return {k: shaped(x) for k, x in values.items()}


def reference_state(fluid, *, with_saturation: bool = True, progress=False, executor=None,
                    chunk_size=None, on_interrupt="raise", **knowns) -> ReferenceState:
    """The reference equation of the fluid at two knowns.

    Parameters
    ----------
    fluid : Fluid or str
        A library fluid (with ``library_name``), or its name.
    with_saturation, progress, executor, chunk_size
        As in :func:`evaluate_reference`.
    on_interrupt : {"raise", "partial"}
        On KeyboardInterrupt, re-raise (default) or return the states evaluated so far
        (``completed`` tells how many; the rest are unavailable with reason
        :data:`INTERRUPTED`), as :func:`cross_check` does.
    **knowns
        Two of T [K], P [Pa], v [m^3/mol], rho [mol/m^3], rho_mass [kg/m^3], quality [-],
        h [J/mol], s [J/(mol K)], u [J/mol] (or h_mass [J/kg], s_mass [J/(kg K)], u_mass
        [J/kg]) in the pairs (T, P), (T, v), (P, v), (T, quality), (P, quality), (P, h),
        (P, s), (v, u); numbers (SI), arrays, or text with units. Energies are on the
        reference equation's own reference state.

    Returns
    -------
    ReferenceState
        Unavailable states (and a user fluid without a library name) carry a reason.

    References
    ----------
    Bell, I. H. et al. (2014), Ind. Eng. Chem. Res. 53, 2498-2508 (CoolProp).
    """
    _check_run_options(progress=progress, executor=executor, chunk_size=chunk_size, on_interrupt=on_interrupt,
                       with_saturation=with_saturation)
    fluid = _as_fluid(fluid, "reference_state")
    pair, a, b = _reference_knowns(fluid, knowns)
    shape = np.broadcast(a, b).shape
    values, completed, notes = _fluid_reference(fluid, pair, a, b, shape, with_saturation=with_saturation,
                                                progress=progress, executor=executor, chunk_size=chunk_size,
                                                on_interrupt=on_interrupt)
    reason = values.pop("reason")
    shaped = _shape_values({**values, "reason": reason, "available": reason == ""}, shape)
    return ReferenceState(fluid=fluid, completed=completed, warnings=notes, **shaped)


#: How far a fluid's constants may be from its reference equation's before a cross-check
#: warns: relative for Tc, Pc and the molar mass, absolute for the acentric factor. Wide
#: enough for handbook values rounded to four digits (common practice).
CONSTANT_TOLERANCE = {"Tc": 5e-3, "Pc": 5e-3, "molar_mass": 5e-3, "omega": 0.01}


def constant_warnings(fluid) -> tuple:
    """Sentences saying where the fluid's constants differ from those of the reference
    equation it is compared with (beyond :data:`CONSTANT_TOLERANCE`); () when they agree or
    the fluid has no reference equation."""
    if library_reason(fluid):
        return ()
    lib = _library_limits(fluid.library_name)
    units = {"Tc": ("T", "K"), "Pc": ("P", "bar"), "molar_mass": ("molar_mass", "g/mol"), "omega": (None, "")}
    differ = []
    for key, tol in CONSTANT_TOLERANCE.items():
        mine, theirs = float(getattr(fluid, key)), float(lib[key])
        off = abs(mine - theirs) if key == "omega" else abs(mine - theirs) / abs(theirs)
        if not off <= tol:
            name, unit = units[key]
            if name is not None:
                mine, theirs, unit = convert(mine, name, unit), convert(theirs, name, unit), unit_label(name, unit)
            differ.append(f"{key} = {mine:.6g} {unit}".rstrip() + f" against {theirs:.6g} {unit}".rstrip())
    if not differ:
        return ()
    return (f"The constants of fluid {_fluid_name(fluid)!r} differ from those of the reference equation it is "
            f"compared with (library_name={fluid.library_name!r}): {'; '.join(differ)}. The deviations mix the "
            f"model's error with that difference; for the library's constants use "
            f"get_fluid({fluid.library_name!r}), or set library_name=None for a fluid of your own.",)


def _fluid_reference(fluid, pair, a, b, shape, **options):
    """(values, completed, warnings) of the reference at the knowns, for any fluid: a
    fluid without a (known) reference equation gives unavailable values, not an error."""
    n = int(np.prod(shape))
    reason = library_reason(fluid)
    if reason:
        return _unavailable_values(n, reason), n, ()
    values, completed = evaluate_reference(fluid.library_name, pair, a, b, **options)
    return values, completed, constant_warnings(fluid)


def _as_fluid(fluid, where: str):
    return as_fluid(fluid, f"{where}(fluid, ...)")


def _reference_knowns(fluid, knowns):
    if len(knowns) != 2:
        raise InputError(f"Give exactly two knowns, got {', '.join(knowns) or 'none'}; "
                         "e.g. reference_state(fluid, T=300.0, P=1e5).")
    si = {k: np.asarray(to_si(val, k, molar_mass=fluid.molar_mass), dtype=float) for k, val in knowns.items()}
    if "rho" in si:
        si["v"] = 1.0 / si.pop("rho")
    if "rho_mass" in si:
        si["v"] = fluid.molar_mass / si.pop("rho_mass")
    for name in ("h", "s", "u"):
        if f"{name}_mass" in si:
            si[name] = si.pop(f"{name}_mass") * fluid.molar_mass
    for pair in REFERENCE_PAIRS:
        first, second = pair.split(",")
        if set(si) == {first, second}:
            return pair, si[first], si[second]
    raise InputError(f"The reference takes the pairs {', '.join(REFERENCE_PAIRS)}; got {', '.join(knowns)}.")


def _warning_text(notes) -> str:
    return "".join(f"\nWarning: {w}" for w in notes)
