"""Layer 3 (with the models): every caloric property from one Helmholtz-energy bundle.

A model gives its residual Helmholtz energy a_res(T, v) and its derivatives to second order
(:class:`Helmholtz`); the fluid gives its ideal-gas part a0(T, v) in the same form. Their sum
is the molar Helmholtz energy a(T, v), and everything else follows here, once:

    P = -a_v,  s = -a_T,  u = a + T s,  h = u + P v,  g = a + P v,
    cv = -T a_TT,  cp = cv + T (dP/dT)_v^2 / (-(dP/dv)_T),
    kappa_T = -1 / (v (dP/dv)_T),  w^2 = (v^2 / M) (cp / cv) (-(dP/dv)_T),
    mu_JT = (T (dv/dT)_P - v) / cp,  (dv/dT)_P = -(dP/dT)_v / (dP/dv)_T.

References
----------
Michelsen, M. L. & Mollerup, J. M. (2007), Thermodynamic Models: Fundamentals and
Computational Aspects, 2nd ed., ch. 2 (the Helmholtz energy as the generating function)
and ch. 3 (the generalized cubic's residual Helmholtz energy).
Span, R. (2000), Multiparameter Equations of State, Springer, ch. 3 (the property
relations from a(T, v)).
"""

from __future__ import annotations

import math
from typing import NamedTuple

import numpy as np

from .ideal_gas import ideal_logs
from .models import Helmholtz, R


class Caloric(NamedTuple):
    """The properties of one phase at (T, v); molar basis, SI units."""

    P: object        #: pressure [Pa]
    h: object        #: enthalpy [J/mol]
    s: object        #: entropy [J/(mol K)]
    u: object        #: internal energy [J/mol]
    g: object        #: Gibbs energy [J/mol]
    cp: object       #: isobaric heat capacity [J/(mol K)]
    cv: object       #: isochoric heat capacity [J/(mol K)]
    w: object        #: speed of sound [m/s]
    mu_jt: object    #: Joule-Thomson coefficient [K/Pa]
    kappa_T: object  #: isothermal compressibility [1/Pa]


#: Arrays of at least this many states take the compiled loop when numba is present.
ACCEL_MIN_SIZE = 2048


def helmholtz(model, T, v, x=None) -> Helmholtz:
    """a(T, v) = a0 (the ideal-gas part) + a_res (the model's), with derivatives.

    A mixture's ideal gas is the mole-weighted sum of its components' ideal parts at the
    same (T, v) plus the ideal mixing term R T Σ zᵢ ln zᵢ (whose only derivative is the
    entropy of mixing, -R Σ zᵢ ln zᵢ); a pure fluid is its one component. ``x``
    (..., n_components) gives each state its own composition (a flash's phases); default
    the model's feed.

    Raises
    ------
    DomainError
        A component has no ideal-gas heat capacity (a user-defined Fluid without cp0).
    """
    T, v = np.asarray(T, dtype=float), np.asarray(v, dtype=float)
    total = model.residual_bundle(T, v, x)
    fractions = None if x is None else np.moveaxis(np.asarray(x, dtype=float), -1, 0)
    for i, (ideal, fraction) in enumerate(_ideal_parts(model)):
        if fractions is not None:
            fraction = fractions[i]
        elif fraction == 0.0:
            continue
        parts = zip(ideal.helmholtz(T, v), _gas_constant_shift(ideal, T, v))
        total = Helmholtz(*(t + fraction * (x_ + y) for t, (x_, y) in zip(total, parts)))
    if model.is_mixture:
        mixing = ideal_mixing_term(model.z if x is None else x)
        total = total._replace(a=total.a + R * T * mixing, a_T=total.a_T + R * mixing)
    return total


def ideal_mixing_term(z):
    """Σ zᵢ ln zᵢ [-] over the last axis (0 ln 0 = 0): the ideal mixing Gibbs energy over R T
    (common practice); a float for one composition."""
    z = np.asarray(z, dtype=float)
    with np.errstate(invalid="ignore", divide="ignore"):
        terms = np.where(z > 0, z * np.log(np.where(z > 0, z, 1.0)), np.where(np.isnan(z), np.nan, 0.0))
    total = np.sum(terms, axis=-1)
    return float(total) if total.ndim == 0 else total


def _ideal_parts(model):
    """(ideal-gas part, mole fraction) of every component; a pure fluid: ((its part, 1.0),)."""
    fluids = model.components.fluids if model.is_mixture else (model.fluid,)
    fractions = model.z if model.is_mixture else (1.0,)
    for fluid in fluids:
        if fluid.ideal_gas is None:
            from .errors import DomainError

            raise DomainError(f"{fluid.name} has no ideal-gas heat capacity, so enthalpy, entropy and heat "
                              "capacities are unknown; give Fluid(..., cp0=...) (a constant or polynomial in "
                              "J/(mol K)), or use a library fluid.")
    return tuple((fluid.ideal_gas, float(x)) for fluid, x in zip(fluids, fractions))


# --------------------------------------------------------------------------- the formulas
# Plain arithmetic on floats or arrays: the numpy path below calls them on arrays, and
# thermo_roots._accel_kernels compiles the same functions for its loop (``FORMULAS``).

def gas_constant_shift(dR, T, v, ln_delta, ln_T):
    """dR T (ln(delta T) - 1) and its T, v derivatives (a, a_T, a_TT, a_v, a_vv, a_Tv), with
    ln delta and ln T from ideal_gas.ideal_logs; see :func:`_gas_constant_shift`."""
    L = ln_delta + ln_T - 1.0   # ln(delta T) - 1, delta = 1/(v rho_r)
    inv_v = 1.0 / v
    dR_v = dR * inv_v
    return dR * T * L, dR * (L + 1.0), dR / T, -T * dR_v, T * dR_v * inv_v, -dR_v


def caloric_from_helmholtz(T, v, P, M, a, a_T, a_TT, a_v, a_vv, a_Tv):
    """(P, h, s, u, g, cp, cv, w, mu_jt, kappa_T) of one phase from the whole bundle a(T, v)
    (the relations of the module docstring); P [Pa] as given, M [kg/mol]."""
    dP_dv = -a_vv
    dP_dT = -a_Tv
    s = -a_T
    u = a + T * s
    cv = -T * a_TT
    inv_slope = 1.0 / dP_dv
    dv_dT = -dP_dT * inv_slope
    cp = cv + T * dP_dT * dv_dT
    w = np.sqrt(-v * v * dP_dv * cp / (cv * M))
    Pv = P * v
    return P, u + Pv, s, u, a + Pv, cp, cv, w, (T * dv_dT - v) / cp, -inv_slope / v


#: The formula functions of this module that thermo_roots._accel_kernels compiles.
FORMULAS = ("gas_constant_shift", "caloric_from_helmholtz")


def _gas_constant_shift(ideal, T, v) -> Helmholtz:
    """What moves an ideal part written with its own gas constant onto the project's R.

    A reference equation may use an older R (propane's: 8.314472 J/(mol K)) while every
    model here uses CODATA 2018's. Adding dR T (ln(delta T) - 1), dR = R - R_ideal, makes
    the ideal gas's pressure R T / v, so that a(T, v) stays one consistent function, and
    leaves cp0 and h0 exactly the reference equation's (its ln T part cancels dR in cv0).
    The ideal-gas entropy at a given (T, v) then differs from the reference equation's by
    dR ln(T/(v rho_r)) (about 1e-6 relative): the two ideal gases are not quite the same gas.
    """
    dR = R - ideal.R
    T, v = np.asarray(T, dtype=float), np.asarray(v, dtype=float)
    if dR == 0.0:
        zero = np.zeros(np.broadcast(T, v).shape)
        return Helmholtz(zero, zero, zero, zero, zero, zero)
    with np.errstate(invalid="ignore", divide="ignore"):
        return Helmholtz(*gas_constant_shift(dR, T, v, *ideal_logs(T, v, ideal.rho_r)))


def caloric(model, T, v, P=None, x=None) -> Caloric:
    """Every caloric property of one phase at T [K] and v [m^3/mol] (numpy broadcasting).

    P : the pressure [Pa] where v is a root at a known P (a dense liquid at low pressure
        loses digits in -a_v); default the model's P(T, v).
    x : a mixture phase's composition per state (..., n_components) [-]; default the
        model's feed (molar properties per mole of that phase; w with its molar mass).

    Arrays of ``ACCEL_MIN_SIZE`` states or more take the compiled loop of
    thermo_roots._accel when numba is present (same formulas, agreeing to rounding);
    everything else, and every model the loop does not know, the numpy path.
    """
    T, v = np.asarray(T, dtype=float), np.asarray(v, dtype=float)
    shape = np.broadcast_shapes(T.shape, v.shape, () if P is None else np.shape(P))
    if x is not None:
        return _phase_caloric(model, T, v, P, np.asarray(x, dtype=float))
    if math.prod(shape) >= ACCEL_MIN_SIZE:
        from . import _accel

        kernel = _accel.caloric_kernel(model)
        if kernel is not None:
            _ideal_parts(model)   # the same error as the numpy path's for a fluid without cp0
            return Caloric(*kernel(T, v, P, shape))
    _ideal_parts(model)
    with np.errstate(invalid="ignore", divide="ignore"):   # unphysical elements (T <= 0, v <= b) give NaN quietly
        A = helmholtz(model, T, v)
        P = -A.a_v if P is None else np.asarray(P, dtype=float)
        return Caloric(*caloric_from_helmholtz(T, v, P, model.molar_mass, *A))


def _phase_caloric(model, T, v, P, x) -> Caloric:
    """:func:`caloric` of phases with their own compositions x (numpy path only)."""
    _ideal_parts(model)
    with np.errstate(invalid="ignore", divide="ignore", over="ignore"):   # a gas at 1e-300 Pa: NaN w, no warning
        A = helmholtz(model, T, v, x)
        P = -A.a_v if P is None else np.asarray(P, dtype=float)
        M = x @ np.array([f.molar_mass for f in model.components.fluids])
        return Caloric(*caloric_from_helmholtz(T, v, P, M, *A))
