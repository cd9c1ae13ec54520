"""The ideal-gas part of a pure fluid: its Helmholtz energy a0(T, v) and what follows from it.

For a library fluid the terms are those of its reference equation of state, the reduced
ideal-gas Helmholtz energy

    alpha0(tau, delta) = a0 / (R T),   tau = T_r / T,   delta = rho / rho_r = 1 / (v rho_r),

as CoolProp publishes it (converted once, when the shipped fluid table is written, so no
state needs CoolProp). Every term is one of these kinds:

* ``ln delta + a1 + a2 tau`` (the leading term and the reference-state offsets),
* ``a ln tau``,
* ``n tau^t`` (power terms),
* ``n ln(c + d exp(theta tau))`` (Planck-Einstein terms; the usual ``n ln(1 - exp(-t tau))``
  is c = 1, d = -1, theta = -t),
* terms given as cp0/R as a function of T and integrated from a temperature T_0: a power
  ``c T^t``, and the two hyperbolic terms of Aly and Lee (1981),
  ``c ((theta/T) / sinh(theta/T))^2`` and ``c ((theta/T) / cosh(theta/T))^2``.

A cp0/R term f(T) enters as alpha = [H(T) - H(T_0)] / T - [S(T) - S(T_0)] with H' = f and
S' = f / T, so that d alpha / d tau = [H(T) - H(T_0)] / T_c and d2 alpha / d tau2 = -f / tau^2,
where T = T_c / tau with the term's own T_c (as CoolProp evaluates it).

The gas constant R everywhere in this module, a0 = R T alpha0 and the ``+ R`` in cp0 included,
is the one of the fluid's reference equation (``IdealGasPart.R``; 8.314472 or 8.31451 J/(mol K)
for older equations), so cp0 agrees with the reference equation's to rounding. A user-defined
fluid uses the CODATA 2018 value.

References
----------
Span, R. (2000), Multiparameter Equations of State, Springer, ch. 3 (alpha0 and its terms).
Aly, F. A. and Lee, L. L. (1981), Fluid Phase Equilib. 6, 169-179 (hyperbolic cp0 terms).
Bell, I. H. et al. (2014), Ind. Eng. Chem. Res. 53, 2498-2508 (CoolProp and its fluid files).
"""

from __future__ import annotations

import math
import numbers
from dataclasses import dataclass
from typing import NamedTuple

import numpy as np

from .errors import InputError, WrongTypeError

#: Molar gas constant [J/(mol K)] of user-defined fluids (exact since the 2019 SI, CODATA 2018).
R_CODATA = 8.31446261815324

#: Reference state of a user-defined fluid's ideal gas: h0 = 0 at T_REF, s0 = 0 at T_REF, P_REF.
T_REF = 298.15
P_REF = 101325.0

#: How the ``source`` of a part made by :func:`part_from_cp0` begins.
CP0_SOURCE = "user cp0 = "

_LN2 = math.log(2.0)


class IdealHelmholtz(NamedTuple):
    """Molar ideal-gas Helmholtz energy and its derivatives at (T, v)."""

    a: object      #: a0 [J/mol]
    a_T: object    #: d a0 / dT [J/(mol K)]
    a_TT: object   #: d2 a0 / dT2 [J/(mol K^2)]
    a_v: object    #: d a0 / dv [Pa] (= -R T / v)
    a_vv: object   #: d2 a0 / dv2 [Pa mol/m^3]
    a_Tv: object   #: d2 a0 / dT dv [Pa/K]


class IdealTerms(NamedTuple):
    """The terms of an :class:`IdealGasPart` as numbers and 2-D arrays, one row per term: the
    record :func:`tau_part` reads, on the numpy path and in the compiled loops alike."""

    R: float                  #: the equation's gas constant [J/(mol K)]
    T_r: float                #: reducing temperature [K]
    rho_r: float              #: reducing molar density [mol/m³]
    a1: float                 #: ``a1`` of the lead term
    a2: float                 #: ``a2`` of the lead term
    log_tau: float            #: coefficient of ``ln tau``
    power: np.ndarray         #: rows (n, t)
    planck_einstein: np.ndarray   #: rows (n, theta, c, d)
    cp0_power: np.ndarray     #: rows (c, t, T_c, T_0)
    cp0_sinh: np.ndarray      #: rows (c, theta, T_c, T_0)
    cp0_cosh: np.ndarray      #: rows (c, theta, T_c, T_0)


class ReducedIdealHelmholtz(NamedTuple):
    """Reduced ideal-gas Helmholtz energy alpha0(tau, delta) and its tau-derivatives [-]."""

    alpha: object
    alpha_tau: object
    alpha_tautau: object


@dataclass(frozen=True)
class IdealGasPart:
    """The ideal-gas Helmholtz energy of a pure fluid, a0(T, v) = R T alpha0(T_r / T, 1 / (v rho_r)).

    Parameters
    ----------
    R : float
        Gas constant of the fluid's equation [J/(mol K)], used in every formula here.
    T_r : float
        Reducing temperature [K] (tau = T_r / T).
    rho_r : float
        Reducing molar density [mol/m³] (delta = 1 / (v rho_r)).
    lead : (float, float)
        (a1, a2) of ``a1 + a2 tau``; ``ln delta`` is always present.
    log_tau : float
        Coefficient a of ``a ln tau``.
    power : tuple of (n, t)
        Terms ``n tau^t``.
    planck_einstein : tuple of (n, theta, c, d)
        Terms ``n ln(c + d exp(theta tau))``.
    cp0_power : tuple of (c, t, T_c, T_0)
        cp0/R terms ``c T^t`` [T in K], integrated from T_0 [K], with T = T_c / tau.
    cp0_sinh, cp0_cosh : tuple of (c, theta, T_c, T_0)
        cp0/R terms ``c ((theta/T) / sinh(theta/T))^2`` and ``c ((theta/T) / cosh(theta/T))^2``.
    source : str
        Where the terms come from.

    Arrays broadcast like numpy; a scalar in gives a float out. Temperatures and volumes that
    are not positive give NaN.

    References
    ----------
    Span, R. (2000), Multiparameter Equations of State, Springer, ch. 3.
    Aly, F. A. and Lee, L. L. (1981), Fluid Phase Equilib. 6, 169-179.
    """

    R: float
    T_r: float
    rho_r: float
    lead: tuple = (0.0, 0.0)
    log_tau: float = 0.0
    power: tuple = ()
    planck_einstein: tuple = ()
    cp0_power: tuple = ()
    cp0_sinh: tuple = ()
    cp0_cosh: tuple = ()
    source: str = ""

    def __post_init__(self):
        for label in ("R", "T_r", "rho_r"):
            value = getattr(self, label)
            if not (_is_real(value) and math.isfinite(value) and value > 0):
                raise InputError(f"IdealGasPart: {label} = {value!r} must be a positive finite number.")
            object.__setattr__(self, label, float(value))
        object.__setattr__(self, "log_tau", _finite("log_tau", self.log_tau))
        for label, width in (("lead", 2), ("power", 2), ("planck_einstein", 4), ("cp0_power", 4),
                             ("cp0_sinh", 4), ("cp0_cosh", 4)):
            rows = getattr(self, label)
            rows = (rows,) if label == "lead" else rows
            try:
                clean = tuple(tuple(_finite(label, x) for x in row) for row in rows)
            except TypeError:
                raise WrongTypeError(f"IdealGasPart: {label} must be a sequence of number tuples, not {rows!r}.") from None
            if any(len(row) != width for row in clean):
                raise InputError(f"IdealGasPart: every entry of {label} has {width} numbers; got {rows!r}.")
            object.__setattr__(self, label, clean[0] if label == "lead" else clean)
        rows = {label: np.array(getattr(self, label), dtype=float).reshape(-1, width) for label, width in
                (("power", 2), ("planck_einstein", 4), ("cp0_power", 4), ("cp0_sinh", 4), ("cp0_cosh", 4))}
        object.__setattr__(self, "_terms", IdealTerms(self.R, self.T_r, self.rho_r, *self.lead, self.log_tau, **rows))

    @property
    def terms(self) -> IdealTerms:
        """The terms as an :class:`IdealTerms` record (what :func:`tau_part` and the compiled loops read)."""
        return self._terms

    # ------------------------------------------------------------------ reduced form
    def alpha0(self, tau, delta) -> ReducedIdealHelmholtz:
        """alpha0 [-] and its first and second tau-derivatives at tau = T_r/T, delta = rho/rho_r."""
        tau = np.asarray(tau, dtype=float)
        delta = np.asarray(delta, dtype=float)
        with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
            A, A_t, A_tt = self._tau_part(tau)
            alpha = np.log(np.where(delta > 0, delta, np.nan)) + A
        return ReducedIdealHelmholtz(_out(alpha), _out(A_t + 0.0 * delta), _out(A_tt + 0.0 * delta))

    def _tau_part(self, tau):
        """alpha0 - ln delta and its tau-derivatives, for tau > 0 (NaN elsewhere): :func:`tau_part`."""
        tau = np.asarray(tau, dtype=float)
        if not (tau > 0).all():
            tau = np.where(tau > 0, tau, np.nan)
        return tau_part(self._terms, tau)

    # ------------------------------------------------------------------ molar form
    def helmholtz(self, T, v) -> IdealHelmholtz:
        """Molar ideal-gas Helmholtz energy a0 = R T alpha0 and its T and v derivatives.

        Parameters
        ----------
        T : float or array
            Temperature [K].
        v : float or array
            Molar volume [m³/mol].

        Returns
        -------
        IdealHelmholtz
            a [J/mol], a_T [J/(mol K)], a_TT [J/(mol K²)], a_v [Pa], a_vv [Pa mol/m³],
            a_Tv [Pa/K]; R is the fluid equation's own (``self.R``).

        References
        ----------
        Span, R. (2000), Multiparameter Equations of State, Springer, table 3.3.
        """
        T, v = np.broadcast_arrays(np.asarray(T, dtype=float), np.asarray(v, dtype=float))
        R = self.R
        with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
            if not (T > 0).all():
                T = np.where(T > 0, T, np.nan)
            if not (v > 0).all():
                v = np.where(v > 0, v, np.nan)
            tau = self.T_r / T
            A, A_t, A_tt = self._tau_part(tau)
            ln_delta, _ = ideal_logs(T, v, self.rho_r)
            parts = ideal_molar(R, T, v, tau, ln_delta, A, A_t, A_tt)
        return IdealHelmholtz(*(_out(x) for x in parts))

    def cp0(self, T):
        """Ideal-gas isobaric heat capacity cp0 = -T a_TT + R [J/(mol K)] at T [K]."""
        T = np.asarray(T, dtype=float)
        part = self.helmholtz(T, 1.0)
        return _out(-T * part.a_TT + self.R)

    def h0(self, T):
        """Ideal-gas molar enthalpy h0 = a - T a_T + R T [J/mol] at T [K] (the equation's reference state)."""
        T = np.asarray(T, dtype=float)
        part = self.helmholtz(T, 1.0)
        return _out(part.a - T * part.a_T + self.R * T)

    def s0(self, T, P):
        """Ideal-gas molar entropy s0 = -a_T at v = R T / P [J/(mol K)], T [K], P [Pa]."""
        T = np.asarray(T, dtype=float)
        P = np.asarray(P, dtype=float)
        with np.errstate(invalid="ignore", divide="ignore"):
            v = self.R * T / np.where(P > 0, P, np.nan)
        return _out(-np.asarray(self.helmholtz(T, v).a_T))

    # ------------------------------------------------------------------ table form
    def to_table(self) -> dict:
        """The terms as plain JSON values (empty kinds left out)."""
        entry = {"R": self.R, "T_r": self.T_r, "rho_r": self.rho_r, "lead": list(self.lead)}
        if self.log_tau:
            entry["log_tau"] = self.log_tau
        for label in ("power", "planck_einstein", "cp0_power", "cp0_sinh", "cp0_cosh"):
            if getattr(self, label):
                entry[label] = [list(row) for row in getattr(self, label)]
        return entry

    @classmethod
    def from_table(cls, entry: dict, source: str = "") -> "IdealGasPart":
        """The inverse of :meth:`to_table`."""
        return cls(source=source, **entry)


# ---------------------------------------------------------------------- the formulas
# Plain arithmetic on floats or arrays with no branch on the data (only on a term's constants):
# the numpy path calls them on arrays, thermo_roots._accel_kernels compiles these very
# functions for its loop over states (``FORMULAS`` lists them). Augmented assignments work
# on both: in place on an array made here, a rebinding on a float.

def tau_part(terms, tau):
    """alpha0 - ln delta and its first two tau-derivatives [-] at tau > 0, from an :class:`IdealTerms`.

    The terms other than Planck-Einstein (:func:`tau_part_without_planck_einstein`), then each
    Planck-Einstein term from its exponential and logarithm (:func:`_planck_einstein_exp`,
    :func:`_planck_einstein_term`): the split lets a compiled loop take the exp and log from
    numpy and do the rest of each term itself.
    """
    A, A_t, A_tt = tau_part_without_planck_einstein(terms, tau)
    rows = terms.planck_einstein
    for i in range(rows.shape[0]):
        n, theta, c, d = rows[i, 0], rows[i, 1], rows[i, 2], rows[i, 3]
        y, log_g = _planck_einstein_exp(tau, theta, c, d)
        x, x_t, x_tt = _planck_einstein_term(n, theta, c, d, y, log_g)
        A += x
        A_t += x_t
        A_tt += x_tt
    return A, A_t, A_tt


def tau_part_without_planck_einstein(terms, tau):
    """The lead, ln tau, power and cp0/R terms of alpha0 - ln delta with their tau-derivatives.

    Written with in-place operations on its own temporaries: for 10⁶ states these, not the
    arithmetic, would otherwise take most of the numpy path's time.
    """
    inv = 1.0 / tau
    inv2 = inv * inv
    A = np.log(tau)
    A *= terms.log_tau
    A += terms.a1
    A += terms.a2 * tau
    A_t = terms.log_tau * inv
    A_t += terms.a2
    A_tt = (-terms.log_tau) * inv2
    rows = terms.power
    for i in range(rows.shape[0]):
        x, x_t, x_tt = _power_term(tau, inv, rows[i, 0], rows[i, 1])
        A += x
        A_t += x_t
        A_tt += x_tt
    A, A_t, A_tt = _add_cp0_terms(A, A_t, A_tt, terms.cp0_power, 0, inv, inv2)
    A, A_t, A_tt = _add_cp0_terms(A, A_t, A_tt, terms.cp0_sinh, 1, inv, inv2)
    return _add_cp0_terms(A, A_t, A_tt, terms.cp0_cosh, 2, inv, inv2)


def _add_cp0_terms(A, A_t, A_tt, rows, kind, inv, inv2):
    """A, A_t, A_tt plus the cp0/R terms of one kind (0 power, 1 sinh, 2 cosh), rows (c, p, T_c, T_0)."""
    for i in range(rows.shape[0]):
        c, p, T_c, T_0 = rows[i, 0], rows[i, 1], rows[i, 2], rows[i, 3]
        T = T_c * inv
        if kind == 0:
            parts = _cp0_power(c, p, T, T_0)
        elif kind == 1:
            parts = _cp0_sinh(c, p, T, T_0)
        else:
            parts = _cp0_cosh(c, p, T, T_0)
        x, x_t, x_tt = _cp0_term(parts, T_c, inv, inv2)
        A += x
        A_t += x_t
        A_tt += x_tt
    return A, A_t, A_tt


def ideal_logs(T, v, rho_r):
    """ln delta = -ln(v rho_r) and ln T [-]: the logarithms the molar form and the gas-constant
    shift need, computed apart so that a compiled loop can take them from numpy."""
    return -np.log(v * rho_r), np.log(T)


def ideal_molar(R, T, v, tau, ln_delta, A, A_t, A_tt):
    """a0 = R T alpha0 and its T and v derivatives (a, a_T, a_TT, a_v, a_vv, a_Tv) from the
    tau part (A, A_t, A_tt) of alpha0 at tau = T_r / T and ln delta (Span 2000, table 3.3)."""
    RT = R * T
    lead = ln_delta + A
    inv_v = 1.0 / v
    return RT * lead, R * (lead - tau * A_t), R * tau * tau * A_tt / T, -RT * inv_v, RT * inv_v * inv_v, -R * inv_v


def _power_term(tau, inv, n, t):
    """n tau^t and its tau-derivatives."""
    p = tau**t
    p *= n
    p_t = p * inv
    p_tt = p_t * inv
    return p, t * p_t, (t * (t - 1.0)) * p_tt


def _planck_einstein_exp(tau, theta, c, d):
    """(y, ln g) of a Planck-Einstein term n ln(c + d e^x), x = theta tau: y = e^x and
    g = c + d e^x, or for theta > 0 y = e^-x and ln g = x + ln(d + c e^-x), so that e^x cannot
    overflow. The exp and log of the term, apart from the rest (:func:`_planck_einstein_term`)."""
    if theta > 0:
        y = np.exp(-theta * tau)
        g = c * y
        g += d
        log_g = np.log(g)
        log_g += theta * tau
    else:
        y = np.exp(theta * tau)
        g = d * y
        g += c
        log_g = np.log(g)
    return y, log_g


def _planck_einstein_term(n, theta, c, d, y, log_g):
    """n ln(c + d e^x) and its tau-derivatives from (y, ln g) of :func:`_planck_einstein_exp`."""
    if theta > 0:
        g = c * y
        g += d
        inv_g = 1.0 / g
        r = d * inv_g              # d e^x / (c + d e^x)
        cy = c * y
    else:
        g = d * y
        g += c
        inv_g = 1.0 / g
        r = d * y * inv_g
        cy = c
    # d2: n theta² c d e^x / (c + d e^x)² = n theta² r c / (c + d e^x)
    return n * log_g, (n * theta) * r, (n * theta * theta) * (r * (cy * inv_g))


def _cp0_term(parts, T_c, inv, inv2):
    """A cp0/R term (f, H(T) - H(T_0), S(T) - S(T_0)) at T = T_c / tau as alpha0 and its
    tau-derivatives: dH / T - dS, dH / T_c and -f / tau²."""
    f, dH, dS = parts
    return dH / (T_c * inv) - dS, dH / T_c, -f * inv2


# Each cp0/R term kind returns f = cp0/R, H(T) - H(T_0) and S(T) - S(T_0) with H' = f, S' = f / T.

def _cp0_power(c, t, T, T_0):
    f = c * T**t
    dH = c * np.log(T / T_0) if t == -1.0 else c * (T**(t + 1.0) - T_0**(t + 1.0)) / (t + 1.0)
    dS = c * np.log(T / T_0) if t == 0.0 else c * (T**t - T_0**t) / t
    return f, dH, dS


def _sinh_parts(theta, T):
    """(u/sinh u)^2, coth u and ln sinh u at u = theta / T, written to survive large u."""
    u = theta / T
    e = np.exp(-2.0 * u)
    m = -np.expm1(-2.0 * u)              # 1 - e^-2u
    return 4.0 * u * u * e / (m * m), (1.0 + e) / m, u + np.log(m) - _LN2, u


def _cp0_sinh(c, theta, T, T_0):
    # H = c theta coth(theta/T); S = c (u coth u - ln sinh u)   (Aly and Lee 1981)
    f, coth, ln_sinh, u = _sinh_parts(theta, T)
    _, coth0, ln_sinh0, u0 = _sinh_parts(theta, T_0)
    return c * f, c * theta * (coth - coth0), c * ((u * coth - ln_sinh) - (u0 * coth0 - ln_sinh0))


def _cosh_parts(theta, T):
    """(u/cosh u)^2, tanh u and ln cosh u at u = theta / T, written to survive large u."""
    u = theta / T
    e = np.exp(-2.0 * u)
    return 4.0 * u * u * e / ((1.0 + e) ** 2), -np.expm1(-2.0 * u) / (1.0 + e), u + np.log1p(e) - _LN2, u


def _cp0_cosh(c, theta, T, T_0):
    # H = -c theta tanh(theta/T); S = c (ln cosh u - u tanh u)   (Aly and Lee 1981)
    f, tanh, ln_cosh, u = _cosh_parts(theta, T)
    _, tanh0, ln_cosh0, u0 = _cosh_parts(theta, T_0)
    return c * f, -c * theta * (tanh - tanh0), c * ((ln_cosh - u * tanh) - (ln_cosh0 - u0 * tanh0))


#: The formula functions of this module that thermo_roots._accel_kernels compiles.
FORMULAS = ("tau_part", "tau_part_without_planck_einstein", "ideal_logs", "ideal_molar", "_power_term",
            "_planck_einstein_exp", "_planck_einstein_term", "_add_cp0_terms", "_cp0_term", "_cp0_power",
            "_sinh_parts", "_cp0_sinh", "_cosh_parts", "_cp0_cosh")


# ---------------------------------------------------------------------- from CoolProp's fluid file

def part_from_coolprop(eos: dict, R: float, T_r: float, rho_r: float, source: str = "") -> IdealGasPart:
    """Convert the "alpha0" list of one equation in CoolProp's fluid JSON into an IdealGasPart.

    eos : the equation's JSON object (``json.loads(get_fluid_param_string(name, "JSON"))``,
    its ``["EOS"][0]``); R [J/(mol K)], T_r [K] and rho_r [mol/m³] are that equation's gas
    constant and reducing values. A term type this function does not know raises InputError,
    so a new kind in a later CoolProp release is noticed when the table is regenerated.
    """
    a1 = a2 = log_tau = 0.0
    power, planck, cp0_power, cp0_sinh, cp0_cosh = [], [], [], [], []
    for term in eos["alpha0"]:
        kind = term["type"]
        if kind in ("IdealGasHelmholtzLead", "IdealGasHelmholtzEnthalpyEntropyOffset"):
            a1 += term["a1"]
            a2 += term["a2"]
        elif kind == "IdealGasHelmholtzLogTau":
            log_tau += term["a"]
        elif kind == "IdealGasHelmholtzPower":
            power += [(n, t) for n, t in zip(term["n"], term["t"], strict=True)]
        elif kind == "IdealGasHelmholtzPlanckEinstein":          # n ln(1 - exp(-t tau))
            planck += [(n, -t, 1.0, -1.0) for n, t in zip(term["n"], term["t"], strict=True)]
        elif kind == "IdealGasHelmholtzPlanckEinsteinFunctionT":  # n ln(1 - exp(-v tau / Tcrit))
            planck += [(n, -v / term["Tcrit"], 1.0, -1.0) for n, v in zip(term["n"], term["v"], strict=True)]
        elif kind == "IdealGasHelmholtzPlanckEinsteinGeneralized":  # n ln(c + d exp(t tau))
            planck += list(zip(term["n"], term["t"], term["c"], term["d"], strict=True))
        elif kind == "IdealGasHelmholtzCP0Constant":
            cp0_power.append((term["cp_over_R"], 0.0, term["Tc"], term["T0"]))
        elif kind == "IdealGasHelmholtzCP0PolyT":
            cp0_power += [(c, t, term["Tc"], term["T0"]) for c, t in zip(term["c"], term["t"], strict=True)]
        elif kind == "IdealGasHelmholtzCP0AlyLee":
            c = term["c"]
            if len(c) != 5:
                raise InputError(f"{source}: an Aly-Lee cp0 term has 5 coefficients, this one {len(c)}: {c!r}.")
            if c[0]:                                # terms with a nil coefficient are left out
                cp0_power.append((c[0], 0.0, term["Tc"], term["T0"]))
            if c[1]:
                cp0_sinh.append((c[1], c[2], term["Tc"], term["T0"]))
            if c[3]:
                cp0_cosh.append((c[3], c[4], term["Tc"], term["T0"]))
        else:
            raise InputError(f"{source}: ideal-gas term type {kind!r} is not known to thermo_roots.ideal_gas; "
                             "add its formula to part_from_coolprop before regenerating the table.")
    return IdealGasPart(R=R, T_r=T_r, rho_r=rho_r, lead=(a1, a2), log_tau=log_tau, power=tuple(power),
                        planck_einstein=tuple(planck), cp0_power=tuple(cp0_power), cp0_sinh=tuple(cp0_sinh),
                        cp0_cosh=tuple(cp0_cosh), source=source)


# ---------------------------------------------------------------------- user-defined cp0

def part_from_cp0(cp0, Tc: float, Pc: float, who: str = "Fluid") -> IdealGasPart:
    """The ideal-gas part of a user-defined fluid from its heat capacity cp0(T).

    Parameters
    ----------
    cp0 : float or tuple of up to 5 floats
        A constant [J/(mol K)], or the coefficients (a, b, c, d, e) of
        cp0 = a + b T + c T² + d T³ + e T⁴ [J/(mol K), T in K].
    Tc, Pc : float
        The fluid's critical temperature [K] and pressure [Pa] (reducing values).

    Reference state: h0 = 0 at 298.15 K, and s0 = 0 at 298.15 K and 101325 Pa. The gas
    constant is CODATA 2018's.

    References
    ----------
    Poling, B. E., Prausnitz, J. M. and O'Connell, J. P. (2001), The Properties of Gases and
    Liquids, 5th ed., McGraw-Hill, section 3-3 (cp0 polynomials in T).
    """
    coefficients = _cp0_coefficients(cp0, who)
    R = R_CODATA
    at_300 = sum(c * 300.0**k for k, c in enumerate(coefficients))
    if not at_300 > R:
        raise InputError(
            f"{who}: cp0 = {cp0!r} gives {at_300:.6g} J/(mol K) at 300 K; an ideal gas needs cp0 > R = "
            f"{R:.6g} J/(mol K) (a monatomic gas has 5R/2 = 20.79). Give cp0 in J/(mol K) with T in kelvin, "
            "e.g. cp0=29.1 for air or cp0=(a, b, c) for a + b T + c T²."
        )
    rho_r = Pc / (R * Tc)
    terms = tuple((c / R, float(k), Tc, T_REF) for k, c in enumerate(coefficients) if c != 0.0)
    # -ln tau cancels the R of cp0 = R (1 - tau² alpha0_tautau), so the terms carry all of cp0;
    # then h0 = R a2 T_r + integral of cp0 from T_REF (a2 = 0), and
    # s0 / R = -ln delta - a1 - 1 + ln tau + integral of cp0/(R T) from T_REF, nil at T_REF, P_REF
    delta_ref = P_REF / (R * T_REF * rho_r)
    lead = (math.log(Tc / T_REF) - 1.0 - math.log(delta_ref), 0.0)
    return IdealGasPart(R=R, T_r=Tc, rho_r=rho_r, lead=lead, log_tau=-1.0, cp0_power=terms,
                        source=CP0_SOURCE + " + ".join(f"{c:.6g} T^{k}" for k, c in enumerate(coefficients)))


def _cp0_coefficients(cp0, who) -> tuple[float, ...]:
    allowed = ("a number [J/(mol K)] or a tuple of up to 5 numbers (a, b, c, d, e) for "
               "a + b T + c T² + d T³ + e T⁴ [J/(mol K), T in K]")
    if _is_real(cp0):
        values = (cp0,)
    elif isinstance(cp0, (tuple, list)) or (isinstance(cp0, np.ndarray) and cp0.ndim == 1):
        values = tuple(cp0)
    else:
        raise WrongTypeError(f"{who}: cp0 must be {allowed}; got {cp0!r}.")
    if not 1 <= len(values) <= 5:
        raise InputError(f"{who}: cp0 has {len(values)} coefficients; it takes 1 to 5, {allowed}.")
    for k, value in enumerate(values):
        if not _is_real(value):
            raise WrongTypeError(f"{who}: cp0 coefficient {k} is {value!r}; cp0 must be {allowed}.")
        if not math.isfinite(value):
            raise InputError(f"{who}: cp0 coefficient {k} is {value!r}; every coefficient must be finite, "
                             f"cp0 being {allowed}.")
    return tuple(float(v) for v in values)


def _is_real(value) -> bool:
    return isinstance(value, numbers.Real) and not isinstance(value, (bool, np.bool_))


def _finite(label, value) -> float:
    if not (_is_real(value) and math.isfinite(value)):
        raise InputError(f"IdealGasPart: {label} holds {value!r}; every coefficient must be a finite number.")
    return float(value)


def _out(x):
    """A 0-d array as a float; arrays as they are."""
    x = np.asarray(x)
    return float(x) if x.ndim == 0 else x
