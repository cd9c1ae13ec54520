"""Test oracle: CoolProp's own cubic mixture backends ("PR", "SRK") with given constants and kij.

The flash tests compare thermo_roots' mixture cubics with an independent implementation of
the same equations: CoolProp's cubic backend (Bell, I. H. & Jäger, A. (2016), Helmholtz
energy transformations of common cubic equations of state for use with pure fluids and
mixtures, J. Res. NIST 121, 238-263). Test support only: the package never imports it.

    oracle = CoolPropCubic(["methane", "ethane", "propane"], kij={("methane", "propane"): 0.02})
    flash = oracle.flash([0.9, 0.07, 0.03], T=200.0, P=3e6)     # -> CubicFlash
    bubble = oracle.bubble_pressure([0.3, 0.3, 0.4], T=250.0)    # -> CubicSaturation

Findings (CoolProp 8.0.0, measured on the development machine, 2 shared cores)
----------------------------------------------------------------------------
Constants. The cubic backend reads its own table of Tc, pc, acentric factor and molar mass
(CoolProp's ``all_cubic_fluids.json``). Against thermo_roots' table
(``fluid_library.json``, which carries the reference equations' values) for the six fluids
of a natural gas, the same for PR and SRK:

    fluid        Tc cubic - ours         Pc cubic - ours            omega, M
    methane      -2.7e-6 K  (-1.4e-8)    -0.47 Pa   (-1.0e-7)       equal
    ethane       -1.6e-11 K              +0.022 Pa  (+4.6e-9)       equal
    propane      -9.0e-6 K  (-2.4e-8)    +34.7 Pa   (+8.2e-6)       equal
    n-butane     -8.0e-12 K              -0.017 Pa  (-4.6e-9)       equal
    nitrogen     +4.1e-10 K              -0.44 Pa   (-1.3e-7)       equal
    CO2          -3.0e-9 K               +1.6 Pa    (+2.2e-7)       equal

(the cubic table rounds Pc, e.g. propane 4 251 200 Pa against 4 251 165.3 Pa). So the two
agree to 1e-5 relative; for exact agreement ``constants="thermo_roots"`` registers copies of
the fluids with our constants (``CoolProp.add_fluids_as_JSON("PR", ...)`` under the names
``TR_<library name>``; the cubic backend's ``set_fluid_parameter_double`` accepts only the
volume translation "c"/"cm", not Tc, pc or the acentric factor). Its alpha functions are the
ones of ``tr.PengRobinson`` (kappa = 0.37464 + 1.54226 omega - 0.26992 omega^2, the 1976 form
at every omega) and ``tr.SoaveRedlichKwong``: pure saturation pressures agree to the Pc
rounding above (propane at 300 K: 8.4e-6; CO2 at 250 K: 2.2e-7; n-butane at 350 K: 5e-9).
Its gas constant is 8.31446261815324 J/(mol K), ours too. kij enters as
a_ij = sqrt(a_i a_j) (1 - k_ij) (``set_binary_interaction_double(i, j, "kij", k)``).

Time per (T, P) flash, over an 8 x 8 grid of 180-320 K and 0.5-10 MPa crossing the
envelope: PR, methane 0.9 / ethane 0.07 / propane 0.03: median 1.1 ms, mean 2.4 ms, max
19 ms; PR, the six-component gas methane 0.85 / ethane 0.06 / propane 0.03 / n-butane 0.01
/ nitrogen 0.03 / CO2 0.02: median 14 ms, mean 43 ms, max 250 ms (SRK alike). The
multiparameter (HEOS) backend on the same gases: median 48 and 168 ms per state.

Where it fails or mislabels:

- every single-phase mixture state is labelled "liquid" (``iphase_liquid``), e.g. the
  six-component gas at 300 K and 5 MPa (Z = 0.87); its phase label only tells one phase from
  two. :attr:`CubicFlash.phases` is therefore the count (1 or 2) and ``library_phase`` the
  raw label;
- its (T, P) flash decides one phase or two by its own stability test; near a phase
  boundary it can differ from another code's (SRK says two-phase with vapor fraction 0.9993
  for the six-component gas at 250 K, 5 MPa, where its HEOS says one phase);
- its bubble point at T fails for the six-component gas at 230 and 250 K ("df very small
  ... in successive_substitution but f is not converged"; at 150 and 200 K it gives 1.13 and
  4.25 MPa); the multiparameter backend's fails at 200 K ("The molar density of ... mol/m3 is
  below the minimum") and 250 K. Failures come back as ``CubicSaturation.failure`` instead of
  raising. Its dew point of the same gas at 250 K comes back at 11.8 MPa with a negative
  n-butane fraction in the "liquid" (-0.11) and that liquid lighter than the vapor, while its
  own flash finds one phase from 3 to 11.9 MPa there: nonphysical, so the oracle returns it
  as a failure (any negative mole fraction is one).
"""

from __future__ import annotations

import json
from typing import NamedTuple

import numpy as np

import thermo_roots as tr

#: The cubic families CoolProp has, by thermo_roots' model class.
FAMILIES = {"PR": tr.PengRobinson, "SRK": tr.SoaveRedlichKwong}

_REGISTERED: dict[tuple, str] = {}


class CubicFlash(NamedTuple):
    """CoolProp's cubic (T, P) flash of a feed. Densities in mol/m³, fractions in mole fractions."""

    phases: int                 # 1 or 2 (0 when it failed)
    vapor_fraction: float       # molar; NaN in one phase (the backend does not say which)
    x: np.ndarray               # liquid (= z in one phase)
    y: np.ndarray               # vapor (= z in one phase)
    rho_liquid: float           # NaN in one phase
    rho_vapor: float            # NaN in one phase
    rho: float                  # the feed's density (molar mean in two phases)
    library_phase: str          # CoolProp's raw label ("liquid" for every single phase)
    failure: str                # "" or CoolProp's message


class CubicSaturation(NamedTuple):
    """A bubble (Q = 0) or dew (Q = 1) point of CoolProp's cubic at T."""

    P: float                    # bubble or dew pressure [Pa], NaN when it failed
    x: np.ndarray               # liquid composition
    y: np.ndarray               # vapor composition
    rho_liquid: float
    rho_vapor: float
    failure: str


def _register_our_constants(fluid, family: str) -> str:
    """A copy of ``fluid`` in CoolProp's cubic library with thermo_roots' constants."""
    import CoolProp.CoolProp as CP

    key = (family, fluid.library_name, fluid.Tc, fluid.Pc, fluid.omega, fluid.molar_mass)
    if key not in _REGISTERED:
        name = f"TR_{fluid.library_name}_{len(_REGISTERED)}".upper().replace("-", "_")
        entry = {"name": name, "CAS": f"tr-{len(_REGISTERED)}", "Tc": float(fluid.Tc), "Tc_units": "K",
                 "pc": float(fluid.Pc), "pc_units": "Pa", "acentric": float(fluid.omega),
                 "molemass": float(fluid.molar_mass), "molemass_units": "kg/mol", "aliases": []}
        CP.add_fluids_as_JSON(family, json.dumps([entry]))
        _REGISTERED[key] = name
    return _REGISTERED[key]


class CoolPropCubic:
    """CoolProp's cubic mixture backend for a list of fluids with given kij.

    Parameters
    ----------
    fluids : list of str or Fluid
        thermo_roots fluid names (or Fluid values with a library name), in component order.
    kij : mapping {(name, name): k} or square matrix, optional
        Binary interaction parameters (0 where not given).
    family : "PR" or "SRK"
    constants : "library" or "thermo_roots"
        The cubic backend's own constant table, or copies of the fluids carrying exactly
        thermo_roots' Tc, Pc, omega and molar mass.
    """

    def __init__(self, fluids, kij=None, family: str = "PR", constants: str = "library"):
        import CoolProp

        if family not in FAMILIES:
            raise ValueError(f"family={family!r}: CoolProp's cubic backends are {', '.join(FAMILIES)}")
        if constants not in ("library", "thermo_roots"):
            raise ValueError(f"constants={constants!r}: give 'library' or 'thermo_roots'")
        self.fluids = [f if isinstance(f, tr.Fluid) else tr.get_fluid(f) for f in fluids]
        self.family = family
        names = [f.library_name if constants == "library" else _register_our_constants(f, family)
                 for f in self.fluids]
        self._CoolProp = CoolProp
        self.state = CoolProp.AbstractState(family, "&".join(names))
        n = len(self.fluids)
        self.kij = np.zeros((n, n))
        if kij is not None:
            if isinstance(kij, dict):
                for (a, b), k in kij.items():
                    i, j = self._index(a), self._index(b)
                    self.kij[i, j] = self.kij[j, i] = k
            else:
                self.kij = np.array(kij, dtype=float)
        for i in range(n):
            for j in range(i + 1, n):
                if self.kij[i, j]:
                    self.state.set_binary_interaction_double(i, j, "kij", float(self.kij[i, j]))

    def _index(self, name) -> int:
        fluid = name if isinstance(name, tr.Fluid) else tr.get_fluid(name)
        return [f.library_name for f in self.fluids].index(fluid.library_name)

    def flash(self, z, T: float, P: float) -> CubicFlash:
        """The backend's (T, P) flash of feed ``z`` [-] at T [K], P [Pa]."""
        CoolProp, s = self._CoolProp, self.state
        z = np.asarray(z, dtype=float)
        nan = float("nan")
        try:
            s.set_mole_fractions(list(z))
            s.update(CoolProp.PT_INPUTS, float(P), float(T))
        except ValueError as error:
            return CubicFlash(0, nan, z * nan, z * nan, nan, nan, nan, "", str(error))
        label = {CoolProp.iphase_liquid: "liquid", CoolProp.iphase_gas: "vapor",
                 CoolProp.iphase_twophase: "two-phase"}.get(s.phase(), str(s.phase()))
        if s.phase() == CoolProp.iphase_twophase:
            return CubicFlash(2, s.Q(), np.array(s.mole_fractions_liquid()), np.array(s.mole_fractions_vapor()),
                              s.saturated_liquid_keyed_output(CoolProp.iDmolar),
                              s.saturated_vapor_keyed_output(CoolProp.iDmolar), s.rhomolar(), label, "")
        return CubicFlash(1, nan, z.copy(), z.copy(), nan, nan, s.rhomolar(), label, "")

    def _saturation(self, z, T, Q) -> CubicSaturation:
        CoolProp, s = self._CoolProp, self.state
        z = np.asarray(z, dtype=float)
        nan = float("nan")
        try:
            s.set_mole_fractions(list(z))
            s.update(CoolProp.QT_INPUTS, Q, float(T))
        except ValueError as error:
            return CubicSaturation(nan, z * nan, z * nan, nan, nan, str(error))
        x, y = np.array(s.mole_fractions_liquid()), np.array(s.mole_fractions_vapor())
        if not (np.all(x >= 0) and np.all(y >= 0)):
            # measured: the six-component gas's dew point at 250 K (PR) came back at 11.8 MPa
            # with x(n-butane) = -0.11 and the "liquid" lighter than the vapor
            return CubicSaturation(nan, z * nan, z * nan, nan, nan,
                                   f"nonphysical answer: a negative mole fraction (x = {x.round(4).tolist()}, "
                                   f"y = {y.round(4).tolist()}) at P = {s.p():.6g} Pa")
        return CubicSaturation(s.p(), x, y, s.saturated_liquid_keyed_output(CoolProp.iDmolar),
                               s.saturated_vapor_keyed_output(CoolProp.iDmolar), "")

    def bubble_pressure(self, z, T: float) -> CubicSaturation:
        """Bubble point of feed ``z`` at T [K] (QT inputs, Q = 0): x = z, y the first bubble."""
        return self._saturation(z, T, 0.0)

    def dew_pressure(self, z, T: float) -> CubicSaturation:
        """Dew point of feed ``z`` at T [K] (QT inputs, Q = 1): y = z, x the first drop."""
        return self._saturation(z, T, 1.0)

    def ln_phi(self, comp, T: float, rho: float) -> np.ndarray:
        """ln of the fugacity coefficients [-] of a phase of composition ``comp`` at T [K] and
        molar density rho [mol/m³] (the backend's (rho, T) evaluation, no flash)."""
        CoolProp, s = self._CoolProp, self.state
        s.set_mole_fractions(list(np.asarray(comp, dtype=float)))
        # an imposed phase: otherwise the backend keeps the two-phase flag of its last flash
        # and refuses ("not well-defined in the two-phase region")
        s.specify_phase(CoolProp.iphase_gas)
        try:
            s.update(CoolProp.DmolarT_INPUTS, float(rho), float(T))
            return np.log([s.fugacity_coefficient(i) for i in range(len(self.fluids))])
        finally:
            s.unspecify_phase()

    def reduced_gibbs(self, T: float, phases) -> float:
        """G / (n R T) of a set of phases at T [K], less the pure components' ideal gas at the
        same T and P: sum over phases of beta_p sum_i c_i (ln c_i + ln phi_i) [-].

        ``phases`` is a sequence of (beta, composition, rho [mol/m³]); the phases must be at
        one pressure. The lower value is the stabler answer (for comparing a one-phase and a
        two-phase answer of a flash at the same T, P and feed)."""
        total = 0.0
        for beta, comp, rho in phases:
            c = np.asarray(comp, dtype=float)
            keep = c > 0
            total += beta * float(np.sum(c[keep] * (np.log(c[keep]) + self.ln_phi(c, T, rho)[keep])))
        return total

