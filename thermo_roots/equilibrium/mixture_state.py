"""A mixture's state from (T, P): :func:`solve_mixture` and its result, :class:`MixtureState`.

The knowns are read as the pure solve reads them (text with units, pint quantities, SI
floats, arrays; ``inversion.knowns``), the flash (:func:`.flash.flash_tp`) does the work,
and the result carries the split, each phase's volume and roots, and the caloric
properties by the lever rule over the phases (each phase's h, s, u, g from
``properties.caloric`` at its own composition).

(T, P), and the energy pairs (P, h) and (P, s) of a valve or an isentropic machine: their
temperature comes from :func:`.energy_flash.energy_flash` (bracketed root finding in T on the
flash's h or s, which rise with T at fixed P), then the flash at that T. Other pairs are
refused with a clear error.
"""

from __future__ import annotations

import functools
import html
from dataclasses import dataclass, field

import numpy as np

from thermo_roots.equilibrium.flash import CONVERGED, FLASH_TOLERANCE, NOT_CONVERGED, SUBSTITUTION_STEPS, _flash_flat
from thermo_roots.equilibrium.energy_flash import energy_flash
from thermo_roots.equilibrium.phase_caloric import lever_caloric
from thermo_roots.equilibrium.stability import read_states
from thermo_roots.errors import ConvergenceError, DomainError, InputError
from thermo_roots.inversion.cubic import cubic_real_roots
from thermo_roots.inversion.display import CAUTION
from thermo_roots.inversion.knowns import _check_model, _read_knowns
from thermo_roots.models import R, _scalar_or_array
from thermo_roots.units import STANDARD_ATMOSPHERE

#: The pairs of knowns a mixture takes today.
MIXTURE_PAIRS = ("(T, P)", "(P, h)", "(P, s)")
#: The values of ``errors=``.
ERRORS = ("nan", "raise")
#: The caloric fields of a mixture state (two-phase by the lever rule).
_LEVER_FIELDS = ("h", "s", "u", "g")
#: ... and those of one phase only (NaN in two phases).
_CALORIC_FIELDS = _LEVER_FIELDS + ("cp", "cv", "w")


@dataclass(frozen=True)
class MixtureState:
    """A mixture at (T, P), solved by the flash. Scalars for one state, arrays otherwise
    (compositions with the components along one more, last, axis).

    Attributes
    ----------
    model : the cubic mixture model
    T, P : temperature [K] and pressure [Pa]
    z : feed mole fractions [-]
    phase : "liquid", "vapor", "supercritical", "two-phase" (:mod:`.phase_words`), or
        "not solved" where ``reason`` says why
    vapor_fraction : molar vapour fraction [-]; in one phase 1.0 for "vapor" and
        "supercritical", 0.0 for "liquid" (the flash's rule)
    x, y : liquid and vapour mole fractions [-] (both z in one phase)
    v : molar volume of the whole [m³/mol]; Z its P v/(R T) [-]
    v_liquid, v_vapor, Z_liquid, Z_vapor : each phase's (NaN where the phase is absent)
    tpd_min : the stability test's lowest tangent-plane distance [-]
    iterations : stability plus flash steps
    status : "converged", "not converged" or "not solved"
    reason : why an element is not solved ("" where it is)
    knowns : the given quantities in SI
    warnings : sentences about the whole result
    """

    model: object = field(repr=False)
    T: object
    P: object
    z: object = field(repr=False)
    phase: object
    vapor_fraction: object
    x: object = field(repr=False)
    y: object = field(repr=False)
    v: object = field(repr=False)
    v_liquid: object = field(repr=False)
    v_vapor: object = field(repr=False)
    Z_liquid: object = field(repr=False)
    Z_vapor: object = field(repr=False)
    tpd_min: object = field(repr=False)
    iterations: object = field(repr=False)
    status: object = field(repr=False)
    reason: object = field(repr=False, default="")
    knowns: dict = field(repr=False, default_factory=dict)
    warnings: tuple = field(repr=False, default=())

    # -- derived values
    @property
    def Z(self):
        """Compressibility factor of the whole, P v/(R T) [-]."""
        return _scalar_or_array(np.asarray(self.P) * np.asarray(self.v) / (R * np.asarray(self.T)))

    @property
    def rho(self):
        """Molar density of the whole [mol/m³]."""
        return _scalar_or_array(1.0 / np.asarray(self.v, dtype=float))

    @property
    def molar_mass(self):
        """Molar mass of the feed [kg/mol]."""
        return _scalar_or_array(np.asarray(self.z, dtype=float) @ self.model.components.molar_masses)

    @property
    def rho_mass(self):
        """Mass density of the whole [kg/m³]."""
        return _scalar_or_array(np.asarray(self.molar_mass) / np.asarray(self.v, dtype=float))

    @property
    def convergence(self):
        """(status, iterations) of the stability test and flash per state."""
        return self.status, self.iterations

    @functools.cached_property
    def liquid_roots(self):
        """Every real root v > v_min [m³/mol] of the liquid's cubic at its composition x, shape
        (..., 3) ascending, NaN-padded; all NaN where there is no liquid phase."""
        return self._phase_roots(self.x, np.isfinite(np.asarray(self.v_liquid, dtype=float)))

    @functools.cached_property
    def vapor_roots(self):
        """As :attr:`liquid_roots`, for the vapour phase at its composition y."""
        return self._phase_roots(self.y, np.isfinite(np.asarray(self.v_vapor, dtype=float)))

    @property
    def roots(self):
        """{"liquid": liquid_roots, "vapor": vapor_roots}: each phase's cubic's roots [m³/mol]."""
        return {"liquid": self.liquid_roots, "vapor": self.vapor_roots}

    def _phase_roots(self, comp, present):
        T, P = np.asarray(self.T, dtype=float), np.asarray(self.P, dtype=float)
        comp = np.asarray(comp, dtype=float)
        safe = np.where(present[..., None], comp, self.model.z)
        with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
            c2, c1, c0, _, B, _ = self.model.phase_coefficients(T, P, safe)
            Z = cubic_real_roots(c2, c1, c0)
            Z = np.where(Z > B[..., None], Z, np.nan)
            v = Z * (R * T / P)[..., None] - (safe @ self.model._c_i)[..., None]
        return np.where(present[..., None], np.sort(v, axis=-1), np.nan)

    # -- caloric properties (molar; SI)
    @functools.cached_property
    def _caloric(self):
        return _lever_caloric(self)

    h = property(lambda self: self._caloric["h"], doc="Enthalpy [J/mol] (lever rule over the phases).")
    s = property(lambda self: self._caloric["s"], doc="Entropy [J/(mol K)] (lever rule over the phases).")
    u = property(lambda self: self._caloric["u"], doc="Internal energy [J/mol] (lever rule over the phases).")
    g = property(lambda self: self._caloric["g"], doc="Gibbs energy [J/mol] (lever rule over the phases).")
    cp = property(lambda self: self._caloric["cp"], doc="Isobaric heat capacity [J/(mol K)]; NaN in two phases.")
    cv = property(lambda self: self._caloric["cv"], doc="Isochoric heat capacity [J/(mol K)]; NaN in two phases.")
    w = property(lambda self: self._caloric["w"], doc="Speed of sound [m/s]; NaN in two phases.")
    h_mass = property(lambda self: self._per_mass(self.h), doc="Specific enthalpy [J/kg].")
    s_mass = property(lambda self: self._per_mass(self.s), doc="Specific entropy [J/(kg K)].")
    u_mass = property(lambda self: self._per_mass(self.u), doc="Specific internal energy [J/kg].")
    g_mass = property(lambda self: self._per_mass(self.g), doc="Specific Gibbs energy [J/kg].")

    def _per_mass(self, x):
        return _scalar_or_array(np.asarray(x, dtype=float) / np.asarray(self.molar_mass))

    # -- display
    def summary(self) -> list[tuple[str, str]]:
        """(label, value with unit) rows of a scalar state."""
        if np.ndim(self.T):
            raise ValueError("summary shows one state; index the arrays of an array solve instead.")
        if self.reason:
            return [("Phase", str(self.phase)), ("Not solved", str(self.reason))]
        rows = [("Phase", str(self.phase)),
                ("Temperature", f"{_fmt(self.T)} K ({_fmt(self.T - 273.15)} °C)"),
                ("Pressure", f"{_fmt(self.P, 1e-5)} bar ({_fmt(self.P, 1e-6)} MPa)"),
                ("Vapor fraction (molar)", _fmt(self.vapor_fraction, digits=6)),
                ("Molar volume", f"{_fmt(self.v, 1e3)} L/mol"),
                ("Mass density", f"{_fmt(self.rho_mass)} kg/m³"),
                ("Compressibility factor Z", _fmt(self.Z))]
        if self.phase == "two-phase":
            rows += [("Liquid: Z, molar volume", f"{_fmt(self.Z_liquid)}, {_fmt(self.v_liquid, 1e3)} L/mol"),
                     ("Vapor: Z, molar volume", f"{_fmt(self.Z_vapor)}, {_fmt(self.v_vapor, 1e3)} L/mol")]
        try:
            rows += [("Specific enthalpy h", f"{_fmt(self.h_mass, 1e-3)} kJ/kg"),
                     ("Specific entropy s", f"{_fmt(self.s_mass, 1e-3)} kJ/(kg K)")]
        except DomainError as error:   # a component without ideal-gas heat capacity
            rows.append(("Enthalpy, entropy", f"unknown: {error}"))
        return rows

    def __repr__(self):
        name = _label(self.model)
        if np.ndim(self.T):
            status = np.asarray(self.status)
            bad = int(np.count_nonzero(status != CONVERGED))
            two = int(np.count_nonzero(np.asarray(self.phase) == "two-phase"))
            note = f", {bad} not solved (see .reason)" if bad else ""
            return f"MixtureState({name}, {np.size(self.T)} states, shape {np.shape(self.T)}, {two} two-phase{note})"
        if self.reason:
            return f"MixtureState({name}, not solved: {self.reason})"
        split = f", vapor fraction={self.vapor_fraction:.6g}" if self.phase == "two-phase" else ""
        return (f"MixtureState({name}, T={self.T:.6g} K, P={self.P:.6g} Pa, v={self.v:.6g} m³/mol, "
                f"rho_mass={self.rho_mass:.6g} kg/m³, Z={self.Z:.6g}, phase={self.phase!r}{split})")

    def __str__(self):
        """The state in engineering units with its compositions, warnings and the caution (for print)."""
        if np.ndim(self.T):
            return repr(self)
        rows = self.summary()
        width = max(len(k) for k, _ in rows)
        lines = [f"{_label(self.model)}, {self.model.name}"] + [f"  {k.ljust(width)}  {v}" for k, v in rows]
        if not self.reason:
            lines.append(f"  {'component':24s} {'feed z':>10s} {'liquid x':>10s} {'vapor y':>10s}")
            lines += [f"  {n:24s} {zi:10.6g} {_fmt(xi):>10s} {_fmt(yi):>10s}"
                      for n, zi, xi, yi in zip(self.model.components.names, self.z, self.x, self.y)]
        lines += [f"  Warning: {w}" for w in self.warnings]
        lines.append(f"  Caution: {CAUTION}")
        return "\n".join(lines)

    def _repr_html_(self):
        title = html.escape(f"{_label(self.model)} — {self.model.name}")
        notes = "".join(f"<p><b>Warning.</b> {html.escape(w)}</p>" for w in self.warnings)
        caution = f"<p style='font-size:smaller'><b>Caution.</b> {html.escape(CAUTION)}</p>"
        if np.ndim(self.T):
            return f"<div><b>{title}</b><pre>{html.escape(repr(self))}</pre>{notes}{caution}</div>"
        body = "".join(f"<tr><th style='text-align:left'>{html.escape(k)}</th><td>{html.escape(v)}</td></tr>"
                       for k, v in self.summary())
        comp = ""
        if not self.reason:
            cells = "".join(f"<tr><td style='text-align:left'>{html.escape(n)}</td><td>{zi:.6g}</td>"
                            f"<td>{_fmt(xi)}</td><td>{_fmt(yi)}</td></tr>"
                            for n, zi, xi, yi in zip(self.model.components.names, self.z, self.x, self.y))
            comp = ("<table><caption>Compositions (mole fractions)</caption><tr><th>component</th><th>feed z</th>"
                    f"<th>liquid x</th><th>vapor y</th></tr>{cells}</table>")
        return f"<div><table><caption>{title}</caption>{body}</table>{comp}{notes}{caution}</div>"


def _fmt(x, scale=1.0, digits=6):
    return "–" if x is None or not np.isfinite(x) else f"{x * scale:.{digits}g}"


def _label(model) -> str:
    c = model.components
    return " + ".join(f"{n} {z:.4g}" for n, z in zip(c.names, c.fractions))


def _lever_caloric(state):
    """h, s, u, g of the whole by the lever rule, cp, cv, w of one phase (:func:`.phase_caloric.lever_caloric`)."""
    values = lever_caloric(state.model, state.T, state.P, state.vapor_fraction, state.x, state.y,
                           state.v_liquid, state.v_vapor)
    return {name: _scalar_or_array(getattr(values, name)) for name in _CALORIC_FIELDS}


# --------------------------------------------------------------------------- the entry point

def _temperature_and_pressure(model, given, knowns):
    """(T, P, reasons) of the states: the knowns themselves for (T, P); for (P, h) or (P, s) (molar
    or mass basis) the temperature of the energy flash (:func:`.energy_flash.energy_flash`), with
    a reason per state it could not place (None for (T, P))."""
    keys = set(given)
    if keys == {"T", "P"}:
        return given["T"], given["P"], None
    energy = keys - {"P"}
    if "P" in keys and len(energy) == 1 and next(iter(energy)) in ("h", "h_mass", "s", "s_mass"):
        key = next(iter(energy))
        name = key[0]
        value = np.asarray(given[key], dtype=float) * (model.molar_mass if key.endswith("_mass") else 1.0)
        P, value = np.broadcast_arrays(np.asarray(given["P"], dtype=float), value)
        T, _, reasons = energy_flash(model, P, value, name)
        return T.reshape(P.shape), P, reasons.astype(object)
    raise InputError(f"{' and '.join(knowns)}: a mixture takes {', '.join(MIXTURE_PAIRS)} today, e.g. "
                     "solve(model, T='-20 °C', P='45 bar') or solve(model, P='4.5 barg', h=state.h) for a valve "
                     "outlet; its other pairs (a volume, a quality, T with an energy) are not built yet.")



def solve_mixture(model, *, branch: str = "stable", atmosphere=STANDARD_ATMOSPHERE, errors: str = "nan",
                  **knowns) -> MixtureState:
    """A mixture's state from (T, P): phase, vapour fraction, compositions, volumes, h, s, u, g.

    Parameters
    ----------
    model : CubicModel
        A cubic on a Mixture, e.g. ``tr.PengRobinson(tr.Mixture({...}), kij=...)``.
    branch : "stable"
        Only the stable answer (the flash's) for a mixture.
    atmosphere : float or str
        Atmospheric pressure a gauge pressure ("8 barg") refers to [Pa].
    errors : {"nan", "raise"}
        For arrays: "nan" (default) gives NaN and a reason at every element that cannot be
        solved and solves the rest; "raise" raises at the first, naming its index. A scalar
        solve always raises.
    T, P : float, array_like, str or pint quantity
        Temperature [K] and pressure [Pa] (or text with units: "-20 °C", "45 barg").
    h, s, h_mass, s_mass : float, array_like or str, with P instead of T
        Enthalpy [J/mol] or entropy [J/(mol K)], or per kg [J/kg, J/(kg K)]; text with units
        on either basis ("716 kJ/kg", "12 kJ/mol").

    Returns
    -------
    MixtureState

    Raises
    ------
    InputError
        Not a model, knowns other than (T, P), unreadable values, shapes that do not
        broadcast; (scalar or errors="raise") a T or P that is not positive and finite.
    ConvergenceError
        (scalar or errors="raise") The stability test or flash did not converge.

    References
    ----------
    Michelsen, M. L. & Mollerup, J. M. (2007), Thermodynamic Models: Fundamentals and
    Computational Aspects, 2nd ed., ch. 9-10 (stability and flash).
    """
    _check_model(model, "solve")
    if not (isinstance(errors, str) and errors in ERRORS):
        raise InputError(f"errors={errors!r} is not one of 'nan', 'raise': 'nan' (the default) gives NaN and a reason "
                         "at elements that cannot be solved and solves the rest; 'raise' raises at the first.")
    if branch != "stable":
        raise InputError(f"branch={branch!r}: a mixture's state is the flash's stable answer; give branch='stable' "
                         "(a metastable single phase of a mixture is not offered).")
    given = _read_knowns(model, knowns, atmosphere)
    T_known, P_known, energy_reasons = _temperature_and_pressure(model, given, knowns)
    shape, T, P, z, reasons = read_states(model, T_known, P_known, None, "solve")
    if energy_reasons is not None:
        reasons = np.where(energy_reasons != "", energy_reasons, reasons).astype(object)
    flash = _flash_flat(model, (-1,), T, P, z, reasons, FLASH_TOLERANCE, SUBSTITUTION_STEPS)
    status, reason = np.asarray(flash.status), np.asarray(flash.reason, dtype=object)
    bad = np.flatnonzero(status != CONVERGED)
    if bad.size and (shape == () or errors == "raise"):
        i = int(bad[0])
        where = "" if shape == () else f" at index {tuple(int(k) for k in np.unravel_index(i, shape))}"
        kind = ConvergenceError if status[i] == NOT_CONVERGED else InputError
        raise kind(f"solve: the mixture state{where} is not solved: {reason[i]}.")
    nc = model.n_components

    def shaped(a, comp=False):
        a = np.asarray(a).reshape(shape + ((nc,) if comp else ()))
        if a.ndim == 0:
            return a.item()
        return a

    warnings = ()
    missing = model.kij_missing
    if missing:
        pairs = ", ".join(f"{a} + {b}" for a, b in missing)
        warnings += (f"kᵢⱼ = 0 for {pairs}: the fitted table has no value for "
                     f"{'this pair' if len(missing) == 1 else 'these pairs'}; give one (kij={{...}}) or fit it "
                     "(thermo_roots.fit_kij) if the split matters.",)
    if bad.size:
        warnings += (f"{bad.size} of {status.size} states are not solved (NaN); .reason says why for each.",)
    if np.any(np.asarray(flash.phase) == "two-phase"):
        warnings += ("Two-phase states: h, s, u and g are the lever-rule sums over the liquid and vapour, and "
                     "the split is the cubic's own (with the kij given); compare it with the reference mixture "
                     "model (thermo_roots.cross_check(state)) before relying on it.",)
    phase = np.where(status == CONVERGED, np.asarray(flash.phase, dtype=object), "not solved")
    return MixtureState(model=model, T=shaped(T), P=shaped(P), z=shaped(z, True), phase=shaped(phase.astype(str)),
                        vapor_fraction=shaped(flash.beta), x=shaped(flash.x, True), y=shaped(flash.y, True),
                        v=shaped(flash.v), v_liquid=shaped(flash.v_liquid), v_vapor=shaped(flash.v_vapor),
                        Z_liquid=shaped(flash.Z_liquid), Z_vapor=shaped(flash.Z_vapor), tpd_min=shaped(flash.tpd_min),
                        iterations=shaped(flash.iterations), status=shaped(status), reason=shaped(reason.astype(str)),
                        knowns={k: _scalar_or_array(v) for k, v in given.items()}, warnings=warnings)
