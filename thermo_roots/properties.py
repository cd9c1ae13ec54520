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

from typing import NamedTuple

import numpy as np

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


def helmholtz(model, T, v) -> Helmholtz:
    """a(T, v) = a0 (the fluid's ideal-gas part) + a_res (the model's), with derivatives.

    Raises
    ------
    DomainError
        The fluid has no ideal-gas heat capacity (a user-defined Fluid without cp0).
    """
    ideal = model.fluid.ideal_gas
    if ideal is None:
        from .errors import DomainError

        raise DomainError(f"{model.fluid.name} has no ideal-gas heat capacity, so enthalpy, entropy and heat "
                          "capacities are unknown; give Fluid(..., cp0=...) (a constant or polynomial in "
                          "J/(mol K)), or use a library fluid.")
    parts = (ideal.helmholtz(T, v), _gas_constant_shift(ideal, T, v), model.residual_bundle(T, v))
    return Helmholtz(*(x + y + z for x, y, z in zip(*parts)))


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
    L = np.log(T / (v * ideal.rho_r)) - 1.0   # ln(delta T) - 1, delta = 1/(v rho_r)
    return Helmholtz(dR * T * L, dR * (L + 1.0), dR / T, -dR * T / v, dR * T / (v * v), -dR / v)


def caloric(model, T, v, P=None) -> Caloric:
    """Every caloric property of one phase at T [K] and v [m^3/mol] (numpy broadcasting).

    P : the pressure [Pa] where v is a root at a known P (a dense liquid at low pressure
        loses digits in -a_v); default the model's P(T, v).
    """
    T, v = np.asarray(T, dtype=float), np.asarray(v, dtype=float)
    A = helmholtz(model, T, v)
    with np.errstate(invalid="ignore", divide="ignore"):
        P = -A.a_v if P is None else np.asarray(P, dtype=float)
        dP_dv, dP_dT = -A.a_vv, -A.a_Tv
        s = -A.a_T
        u = A.a + T * s
        cv = -T * A.a_TT
        cp = cv - T * dP_dT * dP_dT / dP_dv
        dv_dT = -dP_dT / dP_dv
        w = np.sqrt(-v * v * dP_dv * cp / (cv * model.fluid.molar_mass))
        return Caloric(P=P, h=u + P * v, s=s, u=u, g=A.a + P * v, cp=cp, cv=cv, w=w,
                       mu_jt=(T * dv_dT - v) / cp, kappa_T=-1.0 / (v * dP_dv))
