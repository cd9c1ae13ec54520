"""Layer 3: the ideal gas and ONE generalized two-parameter cubic equation of state.

Every cubic here is the form

    P = R T / (v - b) - a(T) / ((v + delta1 b) (v + delta2 b))

with a(T) = Omega_a (R Tc)^2 / Pc * alpha(T) and b = Omega_b R Tc / Pc. Van der Waals,
Redlich-Kwong, Soave-Redlich-Kwong and Peng-Robinson differ only in (delta1, delta2) and
the alpha function: they are parameter sets (:class:`CubicFamily`) of one implementation
(:class:`CubicModel`). Omega_a and Omega_b are derived from the critical conditions, so
every model reproduces the fluid's Tc and Pc.

All property functions take temperature T [K] and molar volume v [m^3/mol] as floats or
numpy arrays and broadcast like numpy.
"""

from __future__ import annotations

import copy
import math
import numbers
from collections.abc import Mapping
from dataclasses import dataclass, field
from typing import Callable, NamedTuple

import numpy as np

from .fluids import Fluid, as_fluid

#: Molar gas constant [J/(mol K)], exact since the 2019 SI redefinition (CODATA 2018).
R = 8.31446261815324


# --------------------------------------------------------------------------- the model protocol

class Helmholtz(NamedTuple):
    """A molar Helmholtz energy [J/mol] and its derivatives at (T [K], v [m^3/mol]).

    What every model gives for its residual part (``residual_bundle``) and every fluid for
    its ideal-gas part; thermo_roots.properties derives all caloric properties from it.
    """

    a: object      #: [J/mol]
    a_T: object    #: da/dT [J/(mol K)]
    a_TT: object   #: d2a/dT2 [J/(mol K^2)]
    a_v: object    #: da/dv [Pa] (= -P for the whole energy)
    a_vv: object   #: d2a/dv2 [Pa mol/m^3]
    a_Tv: object   #: d2a/dT dv [Pa/K]



# --------------------------------------------------------------------------- alpha functions
# Each returns (alpha, d alpha / d T, d2 alpha / d T2) for T [K], Tc [K], omega [-]: the
# second derivative is what the heat capacities need (cv_res = T a''(T) I(v)).
#
# The formulas themselves (``redlich_kwong_alpha_parts``, ``soave_alpha_parts``) are plain
# arithmetic on floats or arrays, with no branch on the data: numpy calls them on arrays,
# and thermo_roots._accel_kernels compiles the very same functions for its loops
# (``FORMULAS`` below lists what it compiles).

#: Codes of the alpha formulas the compiled loops know (``CubicFamily.compiled_alpha``).
ALPHA_CONSTANT, ALPHA_REDLICH_KWONG, ALPHA_SOAVE = 0, 1, 2


def redlich_kwong_alpha_parts(T, Tc):
    """alpha = Tr^(-1/2) and its two T-derivatives (Redlich & Kwong 1949)."""
    alpha = (T / Tc) ** -0.5
    return alpha, -0.5 * alpha / T, 0.75 * alpha / (T * T)


def soave_alpha_parts(T, Tc, k):
    """alpha = (1 + k (1 - sqrt(Tr)))^2 and its two T-derivatives (Soave 1972).

    d alpha/dT = -k root / sqrt(T Tc); d2 alpha/dT2 = k (1 + k) / (2 T sqrt(T Tc)).
    """
    sqrt_Tr = np.sqrt(T / Tc)
    root = 1.0 + k * (1.0 - sqrt_Tr)
    sqrt_TTc = sqrt_Tr * Tc
    return root * root, -k * root / sqrt_TTc, 0.5 * k * (1.0 + k) / (T * sqrt_TTc)


def alpha_parts(kind, T, Tc, k):
    """alpha, alpha', alpha'' of the built-in formula ``kind`` (the compiled loops' dispatch)."""
    if kind == ALPHA_REDLICH_KWONG:
        return redlich_kwong_alpha_parts(T, Tc)
    if kind == ALPHA_SOAVE:
        return soave_alpha_parts(T, Tc, k)
    return 1.0, 0.0, 0.0


def _alpha_constant(T, Tc, omega):
    T = np.asarray(T, dtype=float)
    return np.ones_like(T), np.zeros_like(T), np.zeros_like(T)


def _alpha_redlich_kwong(T, Tc, omega):
    """alpha = Tr^(-1/2), Redlich & Kwong (1949)."""
    return redlich_kwong_alpha_parts(np.asarray(T, dtype=float), Tc)


def _soave_alpha(m):
    """alpha = (1 + m (1 - sqrt(Tr)))^2, the Soave (1972) form used by SRK and PR."""

    def alpha_function(T, Tc, omega):
        return soave_alpha_parts(np.asarray(T, dtype=float), Tc, m(omega))

    return alpha_function


def _m_soave(omega):
    return 0.480 + 1.574 * omega - 0.176 * omega**2


def _kappa_pr76(omega):
    return 0.37464 + 1.54226 * omega - 0.26992 * omega**2


def _kappa_pr78(omega):
    if omega <= 0.491:
        return _kappa_pr76(omega)
    return 0.379642 + 1.48503 * omega - 0.164423 * omega**2 + 0.016666 * omega**3


# --------------------------------------------------------------------------- parameter sets

def critical_constants(delta1: float, delta2: float) -> tuple[float, float, float]:
    """Omega_a, Omega_b and Zc of the generalized cubic from the critical conditions.

    At the critical point the cubic in Z has a triple root Zc. Matching
    Z^3 + ((u-1)B - 1) Z^2 + (A + wB^2 - uB - uB^2) Z - (AB + wB^2 + wB^3) with (Z - Zc)^3,
    u = delta1 + delta2, w = delta1 delta2, gives Zc = (1 - (u-1)B)/3,
    A = 3 Zc^2 - wB^2 + uB + uB^2 and a cubic in B; its root in (0, 1) is Omega_b.

    Returns
    -------
    (Omega_a, Omega_b, Zc) : tuple of float [-]

    References
    ----------
    Michelsen, M. L. & Mollerup, J. M. (2007), Thermodynamic Models: Fundamentals and
    Computational Aspects, 2nd ed., Tie-Line Publications, ch. 3 (generalized cubic).
    """
    u, w = delta1 + delta2, delta1 * delta2
    P = np.polynomial.Polynomial
    B = P([0.0, 1.0])
    Zc = (1.0 - (u - 1.0) * B) / 3.0
    A = 3.0 * Zc**2 - w * B**2 + u * B + u * B**2
    residual = Zc**3 - A * B - w * B**2 - w * B**3
    candidates = [r.real for r in residual.roots() if abs(r.imag) < 1e-9 and 0 < r.real < 1]
    omega_b = min(candidates, key=lambda r: abs(Zc(r) - 0.3))
    slope = residual.deriv()
    for _ in range(3):  # Newton polish to the last bit
        omega_b -= residual(omega_b) / slope(omega_b)
    return float(A(omega_b)), float(omega_b), float(Zc(omega_b))


@dataclass(frozen=True)
class CubicFamily:
    """A named parameter set of the generalized cubic: (delta1, delta2) and alpha(T).

    ``alpha(T, Tc, omega)`` returns (alpha [-], d alpha/dT [1/K], d2 alpha/dT2 [1/K^2]).
    ``compiled_alpha``: (code, slope(omega)) when ``alpha`` is one of the formulas the
    compiled loops know (``ALPHA_CONSTANT``, ``ALPHA_REDLICH_KWONG``, ``ALPHA_SOAVE`` with
    its slope k(omega)); None (the default) keeps a family on the numpy path.
    ``peneloux``: (k, Z_0) of the family's Peneloux volume translation,
    c = k (R Tc/Pc)(Z_0 - Z_RA); None where the correlation is not given for the family.
    """

    name: str
    delta1: float
    delta2: float
    alpha: Callable = field(repr=False)
    reference: str = field(default="", repr=False)
    compiled_alpha: tuple | None = field(default=None, repr=False)
    peneloux: tuple | None = field(default=None, repr=False)
    omega_a: float = field(init=False)
    omega_b: float = field(init=False)
    Zc: float = field(init=False)

    def __post_init__(self):
        try:   # the alpha function must give its value and two derivatives (see the protocol)
            parts = self.alpha(np.array([300.0]), 400.0, 0.2)
        except Exception as error:
            from .errors import InputError

            raise InputError(f"CubicFamily {self.name!r}: alpha(T, Tc, omega) failed on T = [300.0], Tc = 400.0, "
                             f"omega = 0.2 ({error}).") from error
        if not (isinstance(parts, tuple) and len(parts) == 3):
            from .errors import InputError

            raise InputError(f"CubicFamily {self.name!r}: alpha(T, Tc, omega) must return (alpha, d alpha/dT, "
                             "d2 alpha/dT2); the second derivative gives the heat capacities.")
        omega_a, omega_b, Zc = critical_constants(self.delta1, self.delta2)
        object.__setattr__(self, "omega_a", omega_a)
        object.__setattr__(self, "omega_b", omega_b)
        object.__setattr__(self, "Zc", Zc)


SQRT2 = math.sqrt(2.0)

VDW = CubicFamily("van der Waals", 0.0, 0.0, _alpha_constant,
                  "van der Waals, J. D. (1873), doctoral thesis, Leiden.", (ALPHA_CONSTANT, None))
RK = CubicFamily("Redlich-Kwong", 1.0, 0.0, _alpha_redlich_kwong,
                 "Redlich, O. & Kwong, J. N. S. (1949), Chem. Rev. 44, 233-244.", (ALPHA_REDLICH_KWONG, None))
SRK = CubicFamily("Soave-Redlich-Kwong", 1.0, 0.0, _soave_alpha(_m_soave),
                  "Soave, G. (1972), Chem. Eng. Sci. 27, 1197-1203.", (ALPHA_SOAVE, _m_soave),
                  peneloux=(0.40768, 0.29441))
PR76 = CubicFamily("Peng-Robinson", 1.0 + SQRT2, 1.0 - SQRT2, _soave_alpha(_kappa_pr76),
                   "Peng, D.-Y. & Robinson, D. B. (1976), Ind. Eng. Chem. Fundam. 15, 59-64.",
                   (ALPHA_SOAVE, _kappa_pr76), peneloux=(0.50033, 0.25969))
PR78 = CubicFamily("Peng-Robinson 1978", 1.0 + SQRT2, 1.0 - SQRT2, _soave_alpha(_kappa_pr78),
                   "Robinson, D. B. & Peng, D.-Y. (1978), GPA Research Report RR-28.",
                   (ALPHA_SOAVE, _kappa_pr78), peneloux=(0.50033, 0.25969))



# --------------------------------------------------------------------------- the cubic's formulas
# Plain arithmetic on floats or arrays, no branch on the data (only on the constants
# delta1, delta2): CubicModel calls them on arrays, thermo_roots._accel_kernels compiles the
# same functions for its loops. e1 = v_cubic + delta1 b, e2 = v_cubic + delta2 b, D = e1 e2.

def cubic_repulsion(v, v_min):
    """ln(1 - v_min / v) [-], the logarithm of the repulsive term."""
    return np.log1p(-v_min / v)


def cubic_log_ratio(e1, e2, d1, d2):
    """ln(e1 / e2) [-] of the attractive term (0 when d1 == d2, where none is needed)."""
    if d1 == d2:
        return 0.0 * e1
    return np.log(e1 / e2)


def cubic_attraction_integral(e1, d1, d2, b, log_ratio):
    """I(v) = integral from v to infinity of dv' / ((v' + d1 b)(v' + d2 b)) [mol/m^3]."""
    if d1 == d2:
        return 1.0 / e1
    return log_ratio / ((d1 - d2) * b)


def cubic_pressure(RT, a, gap, D):
    """P = R T / (v - v_min) - a / D [Pa]."""
    return RT / gap - a / D


def cubic_dP_dv(RT, a, gap, e1, e2, D):
    """(dP/dv)_T = -R T / (v - v_min)^2 + a (e1 + e2) / D^2 [Pa mol/m^3]."""
    return -RT / (gap * gap) + a * (e1 + e2) / (D * D)


def cubic_dP_dT(R, da, gap, D):
    """(dP/dT)_v = R / (v - v_min) - a'(T) / D [Pa/K]."""
    return R / gap - da / D


def cubic_residual_helmholtz(RT, a, repulsion, integral):
    """a_res = -R T ln(1 - v_min/v) - a I(v) [J/mol]; repulsion = ln(1 - v_min/v)."""
    return -RT * repulsion - a * integral


def cubic_residual_entropy(R, da, repulsion, integral):
    """s_res = R ln(1 - v_min/v) + a'(T) I(v) [J/(mol K)]."""
    return R * repulsion + da * integral


def cubic_residual(T, v, R, a, da, d2a, b, c, v_min, d1, d2, repulsion, log_ratio):
    """The residual Helmholtz bundle (a, a_T, a_TT, a_v, a_vv, a_Tv) of the generalized cubic.

    a(T) = a [Pa m^6/mol^2] with da, d2a its T-derivatives; b, c, v_min = b - c [m^3/mol];
    d1, d2 [-]; the logarithms from :func:`cubic_repulsion` and :func:`cubic_log_ratio`
    (given, so that a compiled loop can take them from numpy's vectorized log).
    a_res = -R T ln(1 - v_min/v) - a I(v), a_T = -s_res, a_TT = -a''(T) I(v), and the v
    derivatives from the pressure and its slopes: a_v = R T/v - P, a_vv = -dP/dv - R T/v^2,
    a_Tv = R/v - dP/dT (Michelsen & Mollerup 2007, ch. 3).
    """
    w = v + c
    e1 = w + d1 * b
    e2 = w + d2 * b
    D = e1 * e2
    gap = v - v_min
    RT = R * T
    integral = cubic_attraction_integral(e1, d1, d2, b, log_ratio)
    inv_v = 1.0 / v
    return (cubic_residual_helmholtz(RT, a, repulsion, integral),
            -cubic_residual_entropy(R, da, repulsion, integral),
            -d2a * integral,
            RT * inv_v - cubic_pressure(RT, a, gap, D),
            -cubic_dP_dv(RT, a, gap, e1, e2, D) - RT * inv_v * inv_v,
            R * inv_v - cubic_dP_dT(R, da, gap, D))


def cubic_ln_phi(T, v, P, R, a, b, c, v_min, d1, d2):
    """ln phi = a_res/(R T) + Z - 1 - ln Z [-] at (T, v) with the pressure P [Pa] given.

    a [Pa m^6/mol^2] is a(T); b, c, v_min [m^3/mol]; d1, d2 [-]. Z = P v/(R T) is formed
    from the given P, not from P(T, v): on a dense liquid at very low pressure P(T, v) is a
    small difference of large terms and would spoil ln Z (Michelsen & Mollerup 2007, ch. 4).
    CubicModel.ln_phi and the compiled (T, P) loop's choice of the stable root both call it.
    """
    e1 = v + c + d1 * b
    e2 = v + c + d2 * b
    RT = R * T
    integral = cubic_attraction_integral(e1, d1, d2, b, cubic_log_ratio(e1, e2, d1, d2))
    Z = P * v / RT
    return cubic_residual_helmholtz(RT, a, cubic_repulsion(v, v_min), integral) / RT + Z - 1.0 - np.log(Z)


def cubic_dP_dv_at(T, v, R, a, b, c, v_min, d1, d2):
    """(dP/dv)_T [Pa mol/m^3] at (T, v): :func:`cubic_dP_dv` with its factors formed here."""
    e1 = v + c + d1 * b
    e2 = v + c + d2 * b
    return cubic_dP_dv(R * T, a, v - v_min, e1, e2, e1 * e2)


# The cubic in Z at given (T, P): A = a P/(R T)^2, B = b P/(R T), u = d1 + d2, w = d1 d2 (the
# untranslated cubic's Z = P v_cubic/(R T)). Its roots come from inversion/cubic.py; these are
# the polynomial's own formulas, shared by the numpy path and the compiled loops.

def cubic_z_coefficients(A, B, u, w):
    """(c2, c1, c0, B) of Z^3 + c2 Z^2 + c1 Z + c0 = 0 (Michelsen & Mollerup 2007, ch. 3)."""
    c2 = (u - 1.0) * B - 1.0
    c1 = A + w * B * B - u * B * (1.0 + B)
    c0 = -B * (A + w * B * (1.0 + B))
    return c2, c1, c0, B


def cubic_z_root_rate(z, c2, c1, A, B, u, w):
    """dZ/d ln P [-] of a root z of the cubic in Z at fixed T, by implicit differentiation.

    A and B are proportional to P, so the coefficients' derivatives in ln P are polynomials
    in A and B: dc2 = (u - 1) B, dc1 = A + 2 w B^2 - u B (1 + 2 B),
    dc0 = -B (2 A + w B (2 + 3 B)); dZ = -(dc2 Z^2 + dc1 Z + dc0) / (3 Z^2 + 2 c2 Z + c1).
    """
    df = (3.0 * z + 2.0 * c2) * z + c1
    dfl = ((u - 1.0) * B * z + (A + 2.0 * w * B * B - u * B * (1.0 + 2.0 * B))) * z - B * (2.0 * A + w * B * (2.0 + 3.0 * B))
    return -dfl / df


def cubic_fugacity_gap_z(zl, zv, A_over_B, B, d1, d2):
    """ln phi_L - ln phi_V [-] of the untranslated cubic from its roots Z_L, Z_V at one (T, P).

    From ln phi = Z - 1 - ln(Z - B) - (A/B) J(Z), J = ln((Z + d1 B)/(Z + d2 B))/(d1 - d2)
    (J = B/(Z + d B) when d1 = d2 = d): :func:`cubic_ln_phi` written in Z with the
    logarithms of the two phases merged, so two logarithms give the difference instead of
    six, and no P(T, v) is formed (it keeps its digits at the tiny liquid roots of very low
    pressures). A volume translation shifts both ln phi by the same c P/(R T), so the
    difference is the translated model's too (Peneloux, Rauzy & Freze 1982).
    A_over_B = a/(b R T), B = b P/(R T) [-].
    """
    return (zl - zv) - np.log((zl - B) / (zv - B)) - A_over_B * cubic_attraction_gap(zl, zv, B, d1, d2)


def cubic_attraction_gap(zl, zv, B, d1, d2):
    """B (I_L - I_V) [-]: the difference of the attraction integrals of two roots in Z,
    I(Z) = ln((Z + d1 B)/(Z + d2 B)) / ((d1 - d2) B) (1/(Z + d B) when d1 = d2 = d).

    The one term that the fugacity gap and the vaporization enthalpy of the cubic share.
    The branch is on the family's constants, never on the data.
    """
    if d1 == d2:
        return B / (zl + d1 * B) - B / (zv + d1 * B)
    return np.log((zl + d1 * B) * (zv + d2 * B) / ((zl + d2 * B) * (zv + d1 * B))) / (d1 - d2)


# --------------------------------------------------------------------------- mixing rules
# The van der Waals one-fluid rule, a = sum_i sum_j x_i x_j a_ij with a_ij = sqrt(a_i a_j)(1 - k_ij),
# b = sum_i x_i b_i, c = sum_i x_i c_i, written with q_i = sqrt(a_i(T)) so that a_ij = M_ij q_i q_j
# (M = 1 - k) and the T derivatives follow from those of q. Plain arithmetic on arrays whose
# last axis is the component: one formula for every composition, a pure fluid's included.

def mixing_attraction(q, dq, d2q, M, x):
    """(a, da/dT, d2a/dT2, psi) of the van der Waals one-fluid rule at compositions x.

    q, dq, d2q : sqrt(a_i(T)) and its two T-derivatives, shape (..., n) [sqrt(Pa) m^3/mol ...];
    M : 1 - k_ij, shape (n, n), symmetric; x : mole fractions, shape (..., n).
    psi_i = sum_j x_j a_ij [Pa m^6/mol^2], the term ln phi_i needs (d(n^2 a)/dn_i = 2 psi_i).
    a = sum_i x_i psi_i; da = 2 sum_i x_i dq_i (M w)_i with w = q x;
    d2a = 2 sum_i x_i (d2q_i (M w)_i + dq_i (M dw)_i) with dw = dq x
    (Michelsen & Mollerup 2007, ch. 3, classical mixing rules).
    """
    Mw = (q * x) @ M
    Mdw = (dq * x) @ M
    psi = q * Mw
    a = np.sum(x * psi, axis=-1)
    da = 2.0 * np.sum(x * dq * Mw, axis=-1)
    d2a = 2.0 * np.sum(x * (d2q * Mw + dq * Mdw), axis=-1)
    return a, da, d2a, psi


def cubic_component_ln_phi(Z, A, B, b_ratio, psi_ratio, d1, d2):
    """ln phi_i [-] of every component in one phase of the untranslated cubic, from its root Z.

    A = a P/(R T)^2, B = b P/(R T) of the phase (shape (...)); b_ratio = b_i/b and
    psi_ratio = psi_i/a (shape (..., n)); d1, d2 the family's constants.
    ln phi_i = (b_i/b)(Z - 1) - ln(Z - B) - (A/B)(2 psi_i/a - b_i/b) J,
    J = ln((Z + d1 B)/(Z + d2 B))/(d1 - d2), or B/(Z + d B) when d1 = d2 = d (van der Waals):
    for one component it is the pure fluid's Z - 1 - ln(Z - B) - (A/B) J. A volume
    translation c_i subtracts c_i P/(R T) from each (Peneloux, Rauzy & Freze 1982).
    (Michelsen & Mollerup 2007, ch. 4.)
    """
    Z, A, B = Z[..., None], A[..., None], B[..., None]
    if d1 == d2:
        J = B / (Z + d1 * B)
    else:
        J = np.log((Z + d1 * B) / (Z + d2 * B)) / (d1 - d2)
    return b_ratio * (Z - 1.0) - np.log(Z - B) - (A / B) * (2.0 * psi_ratio - b_ratio) * J


class CubicParameters(NamedTuple):
    """What the compiled loops need of a model (``Model.formula_parameters``); SI units."""

    alpha_kind: int    #: ALPHA_CONSTANT, ALPHA_REDLICH_KWONG or ALPHA_SOAVE
    Tc: float          #: [K]
    slope: float       #: the Soave slope k(omega) [-] (0 for the others)
    a_c: float         #: a(Tc) [Pa m^6/mol^2]
    b: float           #: co-volume [m^3/mol]
    c: float           #: volume translation [m^3/mol]
    v_min: float       #: b - c [m^3/mol]
    delta1: float
    delta2: float
    Pc: float = 0.0    #: the fluid's critical pressure [Pa] (phase words of the (T, P) loop)
    v_c: float = 0.0   #: the model's critical volume [m^3/mol] (liquid below it, vapor above)


#: The formula functions of this module that thermo_roots._accel_kernels compiles.
FORMULAS = ("redlich_kwong_alpha_parts", "soave_alpha_parts", "alpha_parts", "cubic_repulsion", "cubic_log_ratio",
            "cubic_attraction_integral",
            "cubic_pressure", "cubic_dP_dv", "cubic_dP_dT", "cubic_residual_helmholtz", "cubic_residual_entropy",
            "cubic_residual", "cubic_ln_phi", "cubic_dP_dv_at", "cubic_z_coefficients", "cubic_z_root_rate",
            "cubic_fugacity_gap_z", "cubic_attraction_gap")

#: The mixing-rule formulas (numpy only for now: the compiled loops take one component).
MIXING_FORMULAS = ("mixing_attraction", "cubic_component_ln_phi")


# --------------------------------------------------------------------------- models

class Model:
    """Behaviour shared by every model: Z and the fluid it belongs to.

    What the layers below may ask of any model, the ideal gas included, without asking
    which model it is: ``pressure``, ``dP_dv``, ``dP_dT``, ``ln_phi``, ``residual_bundle``,
    ``compressibility``, the attributes ``fluid``, ``b``, ``c``, ``v_min``, ``v_c`` and
    ``has_saturation`` (False when the model has no liquid, so no saturation line, dome
    or quality).
    """

    short_name = ""
    reference_state = "reference"   # the ideal gas has no saturation to fix another zero on
    has_saturation = True
    takes_mixtures = False   # True where the model has a mixing rule (the cubics): flash, bubble points, envelope
    n_components = 1
    is_mixture = False
    kij_missing = ()         # pairs a kij="fitted" model left at 0
    fluid: Fluid

    @property
    def molar_mass(self) -> float:
        """Molar mass [kg/mol]: the fluid's, or a mixture's Σ zᵢ Mᵢ."""
        return self.fluid.molar_mass

    def formula_parameters(self):
        """The model as a :class:`CubicParameters` for the compiled loops, or None (numpy only)."""
        return None

    def compressibility(self, T, v):
        """Compressibility factor Z = P v / (R T) [-]."""
        T, v = np.asarray(T, dtype=float), np.asarray(v, dtype=float)
        return _scalar_or_array(self.pressure(T, v) * v / (R * T))

    def __repr__(self):
        return f"{type(self).__name__}({self.fluid.name!r})"


#: The old private name of :class:`Model`.
_Model = Model


class IdealGas(Model):
    """The ideal gas, P v = R T. No residual properties; ln phi = 0.

    References
    ----------
    Clapeyron, E. (1834), J. Ec. Polytech. 14, 153-190.
    """

    name = "ideal gas"
    short_name = "IG"
    has_saturation = False   # no liquid: no saturation line, dome or quality
    b = 0.0
    c = 0.0
    v_min = 0.0
    v_c = 0.0                # no liquid branch: below Tc every volume reads as vapor

    def __init__(self, fluid: Fluid | str):
        self.fluid = _pure_fluid(fluid, f"{type(self).__name__}(fluid)")

    def pressure(self, T, v):
        """Pressure [Pa] at T [K] and v [m^3/mol]."""
        return _scalar_or_array(R * np.asarray(T, dtype=float) / np.asarray(v, dtype=float))

    def dP_dv(self, T, v):
        """(dP/dv) at constant T [Pa mol/m^3]."""
        v = np.asarray(v, dtype=float)
        return _scalar_or_array(-R * np.asarray(T, dtype=float) / (v * v))

    def dP_dT(self, T, v):
        """(dP/dT) at constant v [Pa/K]."""
        return _scalar_or_array(R / np.asarray(v, dtype=float) + 0.0 * np.asarray(T, dtype=float))

    def ln_phi(self, T, v, P=None):
        """Natural log of the fugacity coefficient [-]: zero for the ideal gas."""
        return _scalar_or_array(np.zeros(np.broadcast(np.asarray(T), np.asarray(v)).shape))

    residual_gibbs = ln_phi

    def formula_parameters(self):
        """The ideal gas as the cubic with a = b = c = 0, whose residual bundle is exactly zero."""
        return CubicParameters(ALPHA_CONSTANT, float(self.fluid.Tc), 0.0, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0,
                               float(self.fluid.Pc), self.v_c)

    def residual_bundle(self, T, v, x=None):
        """The residual Helmholtz energy and its derivatives: all zero for the ideal gas."""
        zero = np.zeros(np.broadcast(np.asarray(T, dtype=float), np.asarray(v, dtype=float)).shape)
        return Helmholtz(zero, zero, zero, zero, zero, zero)


class CubicModel(Model):
    """One generalized two-parameter cubic equation of state for a pure fluid.

    Parameters
    ----------
    fluid : Fluid
        Critical constants, acentric factor and molar mass.
    family : CubicFamily
        Which cubic: (delta1, delta2) and alpha function.
    volume_shift : float or "peneloux", optional
        Volume translation c [m^3/mol]: the model's volume is v = v_cubic - c, which moves
        liquid densities and leaves saturation pressures unchanged. "peneloux" takes the
        Peneloux-Rauzy-Freze (1982) correlation for SRK (and its usual PR analogue).
        Default 0 (no translation).
    reference_state : {"reference", "IIR", "ASHRAE", "NBP"}
        Where h and s are zero. "reference" (default): the reference equation's own, so
        values line up with CoolProp's. The trade's conventions, each fixed with this
        model's own saturation: "IIR" h = 200 kJ/kg, s = 1 kJ/(kg K) for saturated liquid
        at 0 °C; "ASHRAE" h = s = 0 for saturated liquid at -40 °C; "NBP" h = s = 0 for
        saturated liquid at the normal boiling point (101.325 kPa). Differences of h and s
        never depend on the choice.
    kij : None, mapping, BinaryParameters, matrix or "fitted", optional
        A mixture's binary interaction parameters: pairs ``{("methane", "CO2"): 0.10}``, a
        symmetric matrix in component order, or "fitted" for the shipped table's values
        for this cubic (fitted to the reference mixture model's bubble points; pairs it
        lacks get 0, named in ``kij_missing``). Default None: every kᵢⱼ = 0.

    Attributes
    ----------
    a_c : float
        Attraction parameter at Tc [Pa m^6/mol^2].
    b : float
        Co-volume of the untranslated cubic [m^3/mol].
    c : float
        Volume translation [m^3/mol].
    v_min : float
        Smallest admissible molar volume b - c [m^3/mol].
    v_c : float
        The model's critical molar volume Zc R Tc / Pc - c [m^3/mol].

    References
    ----------
    Michelsen, M. L. & Mollerup, J. M. (2007), Thermodynamic Models: Fundamentals and
    Computational Aspects, 2nd ed., ch. 3 and 4 (generalized cubic, fugacity, residual
    properties).
    Peneloux, A., Rauzy, E. & Freze, R. (1982), Fluid Phase Equilib. 8, 7-23 (volume translation).
    """

    takes_mixtures = True
    family: CubicFamily

    def __init_subclass__(cls, **kwargs):
        super().__init_subclass__(**kwargs)
        if "family" in cls.__dict__:   # the class names its equation, as IdealGas.name does
            cls.name = cls.family.name

    def __init__(self, fluid, family: CubicFamily | None = None, volume_shift=0.0,
                 reference_state: str = "reference", kij=None):
        who = f"{type(self).__name__}(fluid)"
        components = _components(fluid, who)
        self.reference_state = _reference_state(reference_state)
        if family is not None:
            self.family = family
        f = self.family
        self.name = f.name
        self.delta1, self.delta2 = f.delta1, f.delta2
        self.components = components
        self.n_components = len(components)
        self._fluid = components.fluids[0] if self.n_components == 1 else None
        Tc, Pc = components.Tc, components.Pc
        self._Tc_i, self._omega_i = Tc, components.omega
        self._a_c_i = f.omega_a * (R * Tc) ** 2 / Pc
        self._b_i = f.omega_b * R * Tc / Pc
        self._c_i = _component_shifts(volume_shift, f, components, self._b_i)
        self.kij_missing = ()
        if isinstance(kij, str):
            kij, self.kij_missing = _fitted_kij(kij, type(self).short_name, components)
        self.kij = _kij_matrix(kij, components, type(self).__name__)
        self._one_minus_k = 1.0 - self.kij
        self._v_c_i = f.Zc * R * Tc / Pc
        self._set_composition(components.z)
        if self._fluid is not None:     # one component: the pure fluid's own numbers
            self.a_c = float(self._a_c_i[0])
            self.Zc = f.Zc - self.c * Pc[0] / (R * Tc[0])
        if np.any(self._c_i):
            self.name = f"{f.name} (translated)"

    def _set_composition(self, z):
        """The feed composition z and what follows from it: b, c, v_min, v_c [m^3/mol].

        v_c of a mixture is Kay's rule, sum z_i v_c_i - c: a label boundary for single-phase
        roots only; for one component it is the model's critical volume.
        """
        self.z = np.asarray(z, dtype=float)
        self.b = float(self.z @ self._b_i)
        self.c = float(self.z @ self._c_i)
        self.v_min = self.b - self.c
        self.v_c = float(self.z @ self._v_c_i) - self.c

    @property
    def fluid(self) -> Fluid:
        """The pure fluid this model describes; a mixture model has none (refused, with what to use)."""
        if self._fluid is None:
            from .errors import MixtureNotSupportedError

            raise MixtureNotSupportedError(
                f"{self!r} describes a mixture of {self.n_components} components; this is a pure-fluid "
                "calculation (saturation line, sweeps, pure cross-checks). For a mixture use "
                "thermo_roots.solve(model, T=, P=) or (P=, h=) / (P=, s=) (the flash), "
                "thermo_roots.bubble_point, dew_point and phase_envelope, and "
                "thermo_roots.reference.cross_check on the mixture state.")
        return self._fluid

    @property
    def is_mixture(self) -> bool:
        """True when the model has more than one component."""
        return self.n_components > 1

    @property
    def molar_mass(self) -> float:
        """Molar mass [kg/mol]: the fluid's, or the mixture's Σ zᵢ Mᵢ at the model's composition."""
        return self._fluid.molar_mass if self._fluid is not None else self.components.molar_mass

    def at_composition(self, x) -> "CubicModel":
        """The same model (constants, k_ij) at another composition x [-]: one phase of a split."""
        x = np.asarray(x, dtype=float)
        if x.shape != (self.n_components,) or not np.all(np.isfinite(x)) or np.any(x < 0):
            from .errors import InputError

            raise InputError(f"at_composition: x must be {self.n_components} finite mole fractions >= 0; got {x!r}.")
        twin = copy.copy(self)
        twin.components = self.components.with_fractions(x, normalize=True)
        twin._set_composition(twin.components.z)
        return twin

    # -- the pieces of the equation
    def component_attraction(self, T):
        """sqrt(a_i(T)) of every component and its two T-derivatives, each shape T.shape + (n,).

        q = sqrt(a_c alpha), dq = a'/(2 q), d2q = a''/(2 q) - a'^2/(4 q^3): what the mixing rule
        (:func:`mixing_attraction`) takes.
        """
        T = np.asarray(T, dtype=float)
        parts = [self.family.alpha(T, Tc, omega) for Tc, omega in zip(self._Tc_i, self._omega_i)]
        alpha, dalpha, d2alpha = (np.stack(np.broadcast_arrays(*(p[k] for p in parts), T)[:-1], axis=-1)
                                  for k in range(3))
        a, da, d2a = self._a_c_i * alpha, self._a_c_i * dalpha, self._a_c_i * d2alpha
        q = np.sqrt(a)
        return q, 0.5 * da / q, 0.5 * d2a / q - 0.25 * da * da / (q * a)

    def mixture_attraction(self, T, x):
        """(a, da/dT, d2a/dT2, psi) at T [K] and compositions x (..., n): :func:`mixing_attraction`."""
        q, dq, d2q = self.component_attraction(T)
        return mixing_attraction(q, dq, d2q, self._one_minus_k, np.asarray(x, dtype=float))

    def _attraction_parts(self, T):
        """a(T), da/dT, d2a/dT2 at the feed composition [Pa m^6/mol^2 ...].

        One component: a_c alpha, the mixing rule's value for x = (1,) written without the
        square root and its square (so a pure fluid keeps every digit).
        """
        if self._fluid is not None:
            alpha, dalpha, d2alpha = self.family.alpha(T, self._fluid.Tc, self._fluid.omega)
            return self.a_c * alpha, self.a_c * dalpha, self.a_c * d2alpha
        a, da, d2a, _ = self.mixture_attraction(T, self.z)
        return a, da, d2a

    def attraction(self, T):
        """a(T) [Pa m^6/mol^2] and da/dT [Pa m^6/(mol^2 K)]."""
        a, da, _ = self._attraction_parts(T)
        return a, da

    def attraction_curvature(self, T):
        """d2a/dT2 [Pa m^6/(mol^2 K^2)] at T [K]."""
        return self._attraction_parts(T)[2]

    def phase_coefficients(self, T, P, x):
        """The cubic in Z of a phase of composition x (..., n) at (T, P): (c2, c1, c0, A, B, psi/a).

        Z is the untranslated cubic's; A = a P/(R T)^2, B = b P/(R T) of the phase.
        """
        T, P, x = np.asarray(T, dtype=float), np.asarray(P, dtype=float), np.asarray(x, dtype=float)
        a, _, _, psi = self.mixture_attraction(T, x)
        RT = R * T
        A, B = a * P / (RT * RT), (x @ self._b_i) * P / RT
        c2, c1, c0, _ = cubic_z_coefficients(A, B, self.delta1 + self.delta2, self.delta1 * self.delta2)
        return c2, c1, c0, A, B, psi / a[..., None]

    def component_ln_phi(self, T, P, x, Z, coefficients=None):
        """ln phi_i [-] of every component in a phase of composition x (..., n) whose root is Z.

        Z is a root of :meth:`phase_coefficients`' cubic (untranslated); pass that method's
        result as ``coefficients`` when it is at hand (one evaluation for every root). The
        translation of each component enters as - c_i P/(R T). See :func:`cubic_component_ln_phi`.
        """
        T, P, x = np.asarray(T, dtype=float), np.asarray(P, dtype=float), np.asarray(x, dtype=float)
        _, _, _, A, B, psi_ratio = self.phase_coefficients(T, P, x) if coefficients is None else coefficients
        b = x @ self._b_i
        ln_phi = cubic_component_ln_phi(np.asarray(Z, dtype=float), A, B, self._b_i / b[..., None], psi_ratio,
                                        self.delta1, self.delta2)
        return ln_phi - self._c_i * (P / (R * T))[..., None]

    def formula_parameters(self):
        """This model as a :class:`CubicParameters`, or None if its alpha is not a built-in formula.

        A mixture is None too: the compiled loops take one component.
        """
        known = self.family.compiled_alpha
        if known is None or self._fluid is None:
            return None
        kind, slope = known
        return CubicParameters(int(kind), float(self.fluid.Tc), 0.0 if slope is None else float(slope(self.fluid.omega)),
                               float(self.a_c), float(self.b), float(self.c), float(self.v_min),
                               float(self.delta1), float(self.delta2), float(self.fluid.Pc), float(self.v_c))

    def __repr__(self):
        if self._fluid is None:
            return f"{type(self).__name__}({self.components!r})"
        return super().__repr__()

    def _factors(self, v, b=None, c=None):
        """(e1, e2, D) = (v_cubic + d1 b, v_cubic + d2 b, their product) at the model volume v
        (b, c: the feed's unless a phase's are given)."""
        b = self.b if b is None else b
        w = v + (self.c if c is None else c)
        e1, e2 = w + self.delta1 * b, w + self.delta2 * b
        return e1, e2, e1 * e2

    def _denominator(self, v):
        """(v_cubic + d1 b)(v_cubic + d2 b) at the model volume v."""
        return self._factors(v)[2]

    def _attraction_integral(self, v):
        """I(v) = integral from v to infinity of dv' / ((v' + d1 b)(v' + d2 b)) [mol/m^3]."""
        e1, e2, _ = self._factors(v)
        d1, d2 = self.delta1, self.delta2
        return cubic_attraction_integral(e1, d1, d2, self.b, cubic_log_ratio(e1, e2, d1, d2))

    # -- properties of (T, v)
    def pressure(self, T, v):
        """Pressure [Pa] at T [K] and v [m^3/mol]."""
        T, v = np.asarray(T, dtype=float), np.asarray(v, dtype=float)
        a, _ = self.attraction(T)
        return _scalar_or_array(cubic_pressure(R * T, a, v - self.v_min, self._denominator(v)))

    def dP_dv(self, T, v):
        """(dP/dv) at constant T [Pa mol/m^3]."""
        T, v = np.asarray(T, dtype=float), np.asarray(v, dtype=float)
        a, _ = self.attraction(T)
        return _scalar_or_array(cubic_dP_dv_at(T, v, R, a, self.b, self.c, self.v_min, self.delta1, self.delta2))

    def dP_dT(self, T, v):
        """(dP/dT) at constant v [Pa/K]."""
        T, v = np.asarray(T, dtype=float), np.asarray(v, dtype=float)
        _, da = self.attraction(T)
        return _scalar_or_array(cubic_dP_dT(R, da, v - self.v_min, self._denominator(v)))

    def residual_helmholtz(self, T, v):
        """Residual Helmholtz energy a_res(T, v) [J/mol] against the ideal gas at the same T, v."""
        T, v = np.asarray(T, dtype=float), np.asarray(v, dtype=float)
        a, _ = self.attraction(T)
        return _scalar_or_array(cubic_residual_helmholtz(R * T, a, cubic_repulsion(v, self.v_min),
                                                         self._attraction_integral(v)))

    def residual_entropy(self, T, v):
        """Residual entropy s_res(T, v) [J/(mol K)] against the ideal gas at the same T, v."""
        T, v = np.asarray(T, dtype=float), np.asarray(v, dtype=float)
        _, da = self.attraction(T)
        return _scalar_or_array(cubic_residual_entropy(R, da, cubic_repulsion(v, self.v_min), self._attraction_integral(v)))

    def residual_enthalpy(self, T, v):
        """Residual enthalpy h_res [J/mol] against the ideal gas at the same T and P."""
        T, v = np.asarray(T, dtype=float), np.asarray(v, dtype=float)
        a, da = self.attraction(T)
        u_res = (T * da - a) * self._attraction_integral(v)
        return _scalar_or_array(u_res + self.pressure(T, v) * v - R * T)

    def residual_bundle(self, T, v, x=None):
        """a_res(T, v) [J/mol] against the ideal gas at the same T and v, with its derivatives.

        One call of :func:`cubic_residual` (the formula the compiled loops use too) with
        alpha and its two derivatives evaluated once: a_res, its T derivative -s_res, the v
        derivatives from the pressure and its slopes (a_v = R T/v - P, a_vv = -dP/dv - R T/v^2,
        a_Tv = R/v - dP/dT), and a_TT = -a''(T) I(v), the only term no other property needs
        (Michelsen & Mollerup 2007, ch. 3). Returns a :class:`Helmholtz`.

        x : compositions (..., n_components) [-], one per state, broadcasting with T and v
            (the phases of a flash); default the model's feed z.
        """
        T, v = np.asarray(T, dtype=float), np.asarray(v, dtype=float)
        if x is None:
            (a, da, d2a), b, c = self._attraction_parts(T), self.b, self.c
        else:
            x = np.asarray(x, dtype=float)
            a, da, d2a, _ = self.mixture_attraction(T, x)
            b, c = x @ self._b_i, x @ self._c_i
        d1, d2 = self.delta1, self.delta2
        with np.errstate(invalid="ignore", divide="ignore"):
            e1, e2, _ = self._factors(v, b, c)
            parts = cubic_residual(T, v, R, a, da, d2a, b, c, b - c,
                                   d1, d2, cubic_repulsion(v, b - c), cubic_log_ratio(e1, e2, d1, d2))
        return Helmholtz(*(_scalar_or_array(part) for part in parts))

    def ln_phi(self, T, v, P=None):
        """Natural log of the fugacity coefficient ln(f/P) [-] at T [K], v [m^3/mol].

        ln phi = a_res/(RT) + Z - 1 - ln Z, which is also the residual Gibbs energy
        g_res(T, P)/(RT) against the ideal gas at the same T and P. Pass the pressure P [Pa]
        when v is a root at a known P: on a dense liquid at very low pressure, P(T, v) is a
        small difference of large terms and would spoil ln Z.
        """
        T, v = np.asarray(T, dtype=float), np.asarray(v, dtype=float)
        P = self.pressure(T, v) if P is None else np.asarray(P, dtype=float)
        a, _ = self.attraction(T)
        return _scalar_or_array(cubic_ln_phi(T, v, P, R, a, self.b, self.c, self.v_min, self.delta1, self.delta2))

    def residual_gibbs(self, T, v, P=None):
        """Residual Gibbs energy g_res = R T ln phi [J/mol] at T [K], v [m^3/mol] (P as in ln_phi)."""
        return _scalar_or_array(R * np.asarray(T, dtype=float) * self.ln_phi(T, v, P))

    # -- the cubic in Z at given (T, P), used by the inversion layer
    def cubic_coefficients(self, T, P):
        """Coefficients (c2, c1, c0) of Z^3 + c2 Z^2 + c1 Z + c0 = 0 and B = bP/(RT).

        Z here is the untranslated cubic's, P v_cubic / (R T); subtract c from its volumes.
        """
        T, P = np.asarray(T, dtype=float), np.asarray(P, dtype=float)
        a, _ = self.attraction(T)
        RT = R * T
        return cubic_z_coefficients(a * P / (RT * RT), self.b * P / RT, self.delta1 + self.delta2,
                                    self.delta1 * self.delta2)


class VanDerWaals(CubicModel):
    """van der Waals (1873): delta1 = delta2 = 0, alpha = 1."""

    family = VDW
    short_name = "vdW"


class RedlichKwong(CubicModel):
    """Redlich-Kwong (1949): delta1 = 1, delta2 = 0, alpha = Tr^-1/2."""

    family = RK
    short_name = "RK"


class SoaveRedlichKwong(CubicModel):
    """Soave-Redlich-Kwong (Soave 1972): delta1 = 1, delta2 = 0, Soave alpha with
    m = 0.480 + 1.574 omega - 0.176 omega^2."""

    family = SRK
    short_name = "SRK"


class PengRobinson(CubicModel):
    """Peng-Robinson (1976): delta = 1 +/- sqrt(2), Soave-type alpha with
    kappa = 0.37464 + 1.54226 omega - 0.26992 omega^2."""

    family = PR76
    short_name = "PR"


class PengRobinson78(CubicModel):
    """Peng-Robinson with the 1978 kappa for omega > 0.491:
    kappa = 0.379642 + 1.48503 omega - 0.164423 omega^2 + 0.016666 omega^3."""

    family = PR78
    short_name = "PR78"


#: The zero points of h and s a model can take (see CubicModel).
REFERENCE_STATES = ("reference", "IIR", "ASHRAE", "NBP")

#: Where each convention puts h [J/kg] and s [J/(kg K)] on saturated liquid, and at which
#: T [K] (None: the normal boiling point, the saturation temperature at 101.325 kPa).
#: Common practice of refrigeration tables, e.g. ASHRAE Handbook -- Fundamentals (2017), ch. 30.
REFERENCE_STATE_POINTS = {"IIR": (273.15, 200e3, 1e3), "ASHRAE": (233.15, 0.0, 0.0), "NBP": (None, 0.0, 0.0)}


def _reference_state(option) -> str:
    """The canonical name of a reference-state option, checked."""
    names = {name.lower(): name for name in REFERENCE_STATES}
    if isinstance(option, str) and option.strip().lower() in names:
        return names[option.strip().lower()]
    from .errors import InputError

    raise InputError(f"reference_state={option!r} is not one of {', '.join(REFERENCE_STATES)}: 'reference' is the "
                     "reference equation's own zero, IIR puts h = 200 kJ/kg and s = 1 kJ/(kg K) on saturated "
                     "liquid at 0 °C, ASHRAE h = s = 0 at -40 °C, NBP h = s = 0 at the normal boiling point.")


def _volume_shift(option, family: CubicFamily, fluid: Fluid, b: float) -> float:
    """The translation c [m^3/mol] for a number or the "peneloux" option, checked below b.

    The translated model's smallest volume is b - c, so a shift at or above the co-volume b
    would admit zero or negative volumes (and Z < 0); it is refused here, once.
    """
    from .errors import InputError

    if isinstance(option, str):
        if option.strip().lower() != "peneloux":
            raise InputError(f"volume_shift={option!r}: give a number [m^3/mol] or 'peneloux'.")
        c = peneloux_shift(family, fluid)
    elif isinstance(option, (bool, np.bool_)) or not isinstance(option, (numbers.Real, np.ndarray)) \
            or np.ndim(option) != 0:
        raise InputError(f"volume_shift={option!r}: give one number [m^3/mol] (e.g. 5e-6) or 'peneloux'; "
                         "0 means no translation.")
    else:
        c = float(option)
    if not math.isfinite(c):
        raise InputError(f"volume_shift={option!r} must be finite [m^3/mol].")
    if c >= b:
        raise InputError(
            f"volume_shift = {c:.6g} m³/mol is at or above the co-volume b = {b:.6g} m³/mol of "
            f"{family.name} for {fluid.name}: the model would admit zero or negative volumes. "
            f"Give a shift below b (typical shifts are a few percent of b, e.g. {0.05 * b:.3g} m³/mol).")
    return c


def peneloux_shift(family: CubicFamily, fluid: Fluid) -> float:
    """Peneloux volume translation c [m^3/mol] from the Rackett compressibility factor.

    SRK: c = 0.40768 (R Tc/Pc)(0.29441 - Z_RA) (Peneloux, Rauzy & Freze 1982); PR: the
    analogous c = 0.50033 (R Tc/Pc)(0.25969 - Z_RA); Z_RA = 0.29056 - 0.08775 omega
    (Yamada & Gunn 1973). Coefficients from memory.

    References
    ----------
    Peneloux, A., Rauzy, E. & Freze, R. (1982), Fluid Phase Equilib. 8, 7-23.
    Yamada, T. & Gunn, R. D. (1973), J. Chem. Eng. Data 18, 234-236.
    """
    if family.peneloux is None:
        from .errors import InputError

        raise InputError(f"The Peneloux correlation is given for SRK and PR, not {family.name}.")
    k, z_0 = family.peneloux
    z_ra = 0.29056 - 0.08775 * fluid.omega
    return k * (R * fluid.Tc / fluid.Pc) * (z_0 - z_ra)


#: Model classes by their short name, for panels and command lines.
MODELS = {cls.short_name: cls for cls in
          (IdealGas, VanDerWaals, RedlichKwong, SoaveRedlichKwong, PengRobinson, PengRobinson78)}


def _pure_fluid(fluid, caller) -> Fluid:
    """The one pure fluid a model describes (the ideal gas here takes no mixture)."""
    from .mixtures import Mixture

    if isinstance(fluid, Mixture):
        if len(fluid) == 1:
            return fluid.fluids[0]
        from .errors import InputError

        raise InputError(f"{caller} takes one pure fluid; got a mixture of {len(fluid)} components. For a "
                         "mixture use a cubic, e.g. PengRobinson(mixture, kij=...).")
    return as_fluid(fluid, caller)


def _components(fluid, caller):
    """The model's components as a Mixture: the one given, or a pure fluid as one component."""
    from .mixtures import Mixture

    if isinstance(fluid, Mixture):
        return fluid
    return Mixture([(as_fluid(fluid, caller), 1.0)])


def _component_shifts(option, family: CubicFamily, components, b_i) -> np.ndarray:
    """The translation c_i [m^3/mol] of every component, each checked below its b_i.

    One component: a number or "peneloux" (:func:`_volume_shift`). A mixture: "peneloux"
    (each component's own), 0, or one number per component in the mixture's order.
    """
    fluids = components.fluids
    if len(fluids) == 1:
        return np.array([_volume_shift(option, family, fluids[0], float(b_i[0]))])
    if isinstance(option, str):
        return np.array([_volume_shift(option, family, f, float(b)) for f, b in zip(fluids, b_i)])
    if isinstance(option, numbers.Real) and not isinstance(option, (bool, np.bool_)) and option == 0:
        return np.zeros(len(fluids))
    try:
        values = list(option)
    except TypeError:
        values = None
    if values is None or len(values) != len(fluids):
        from .errors import InputError

        raise InputError(f"volume_shift={option!r}: for a mixture of {len(fluids)} components give 'peneloux', 0, "
                         f"or {len(fluids)} shifts [m^3/mol] in the order {', '.join(components.names)}.")
    return np.array([_volume_shift(c, family, f, float(b)) for c, f, b in zip(values, fluids, b_i)])


def _fitted_kij(option: str, short_name: str, components):
    """kij="fitted": the shipped table's BinaryParameters for this cubic, and the pairs it lacks."""
    from .errors import InputError
    from .mixtures import fitted_binary_parameters, missing_fitted_pairs

    if option != "fitted":
        raise InputError(f"kij={option!r}: the one text kij takes is 'fitted' (the shipped table's values); "
                         "otherwise give pairs, e.g. {('methane', 'CO2'): 0.10}, or a symmetric matrix.")
    return (fitted_binary_parameters(short_name, components),
            tuple(missing_fitted_pairs(short_name, components)))


def _kij_matrix(kij, components, caller) -> np.ndarray:
    """The k_ij matrix in component order from None, a mapping of pairs, BinaryParameters or a matrix."""
    from .mixtures import BinaryParameters

    if kij is None:
        matrix = np.zeros((len(components), len(components)))
    elif isinstance(kij, BinaryParameters):
        matrix = kij.matrix(components)
    elif isinstance(kij, Mapping):
        matrix = BinaryParameters(kij).matrix(components)
    else:
        matrix = BinaryParameters.from_matrix(kij, components).matrix(components)
    matrix = np.array(matrix, dtype=float)
    matrix.flags.writeable = False
    return matrix


def _scalar_or_array(x):
    """A 0-d array becomes a float, so a scalar in gives a scalar out."""
    x = np.asarray(x)
    return float(x) if x.ndim == 0 else x
