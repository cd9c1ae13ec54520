"""The phase word of a mixture state, by one stated rule (the model's and the reference's alike).

A mixture has no single critical temperature and pressure to divide "liquid", "vapor" and
"supercritical" the way a pure fluid does, so the words follow this rule, written once here:

- "two-phase" where the flash (or the reference's stability test) splits the feed;
- otherwise Kay's pseudo-critical point of the feed, T_pc = Σ zᵢ Tcᵢ and P_pc = Σ zᵢ Pcᵢ:
  "supercritical" where T ≥ T_pc and P ≥ P_pc, "vapor" where T ≥ T_pc and P < P_pc;
- below T_pc, the phase-identification parameter of Venkatarathnam & Oellrich (2011),

      Π = v [ (∂²P/∂T∂v) / (∂P/∂T)_v − (∂²P/∂v²) / (∂P/∂v)_T ],

  "liquid" where Π > 1, else "vapor" (NaN Π, when unknown, gives "vapor").

So a natural gas above its cricondentherm is never "liquid": its Kay temperature is far
below the cricondentherm (about 208 K for a gas of 85 % methane), and at a higher T the
word is "vapor" or "supercritical" whatever the density.

The mixture's true critical point would be a better divide, but it needs its own search
(and CoolProp's took 35 s and failed for a six-component gas, see reference/mixture.py).

References
----------
Kay, W. B. (1936), Density of hydrocarbon gases and vapors at high temperature and
pressure, Ind. Eng. Chem. 28, 1014-1019 (pseudo-critical point).
Venkatarathnam, G. & Oellrich, L. R. (2011), Identification of the phase of a fluid using
partial derivatives of pressure, volume, and temperature without reference to saturation
properties, Fluid Phase Equilib. 301, 225-233.
"""

from __future__ import annotations

import copy

import numpy as np

LIQUID, VAPOR, SUPERCRITICAL, TWO_PHASE = "liquid", "vapor", "supercritical", "two-phase"
#: The words, in this order.
MIXTURE_PHASES = (LIQUID, VAPOR, SUPERCRITICAL, TWO_PHASE)
#: Relative step in v of the central differences of Π [-].
_PIP_STEP = 1e-5


def phase_words(T, P, pip, T_pc, P_pc, two_phase=False):
    """Phase words of states by the module's rule, vectorized (object array; str for scalars).

    Parameters
    ----------
    T : float or array_like
        Temperature [K].
    P : float or array_like
        Pressure [Pa].
    pip : float or array_like
        Phase-identification parameter Π [-] (NaN when unknown).
    T_pc, P_pc : float or array_like
        Pseudo-critical temperature [K] and pressure [Pa] by Kay's rule.
    two_phase : bool or array_like of bool
        The state splits into two phases.

    References
    ----------
    Kay (1936), Ind. Eng. Chem. 28, 1014; Venkatarathnam & Oellrich (2011), Fluid Phase
    Equilib. 301, 225.
    """
    T, P, pip, T_pc, P_pc, two = np.broadcast_arrays(*(np.asarray(a, dtype=float) for a in (T, P, pip, T_pc, P_pc)),
                                                     np.asarray(two_phase, dtype=bool))
    with np.errstate(invalid="ignore"):
        above = T >= T_pc
        words = np.where(two, TWO_PHASE,
                         np.where(above, np.where(P >= P_pc, SUPERCRITICAL, VAPOR),
                                  np.where(pip > 1.0, LIQUID, VAPOR))).astype(object)
    return str(words) if words.ndim == 0 else words


def mixture_phase_word(T, P, pip, T_pc, P_pc, two_phase=False) -> str:
    """The phase word of one state by the module's rule (see :func:`phase_words`)."""
    return str(phase_words(T, P, pip, T_pc, P_pc, two_phase))


def pseudo_critical(mixture) -> tuple[float, float]:
    """(T_pc [K], P_pc [Pa]) of a Mixture by Kay's rule: the mole-fraction averages of the
    components' critical temperatures and pressures (Kay 1936, Ind. Eng. Chem. 28, 1014)."""
    z = mixture.z
    return float(np.dot(z, mixture.Tc)), float(np.dot(z, mixture.Pc))


def phase_identification_parameter(model, T, v):
    """Π [-] of a model at its own composition at T [K], v [m³/mol] (numpy broadcasting).

    The second derivatives are central differences (relative step 1e-5 in v) of the model's
    own (∂P/∂v)_T and (∂P/∂T)_v, so no formula is written twice; Π is good to about 1e-9
    relative, plenty for a word that changes at Π = 1.

    References
    ----------
    Venkatarathnam & Oellrich (2011), Fluid Phase Equilib. 301, 225, eq. (7).
    """
    T, v = np.asarray(T, dtype=float), np.asarray(v, dtype=float)
    h = _PIP_STEP * v
    with np.errstate(invalid="ignore", divide="ignore", over="ignore"):   # far outside the model's range: NaN
        d2P_dv2 = (model.dP_dv(T, v + h) - model.dP_dv(T, v - h)) / (2.0 * h)
        d2P_dTdv = (model.dP_dT(T, v + h) - model.dP_dT(T, v - h)) / (2.0 * h)
        return v * (d2P_dTdv / model.dP_dT(T, v) - d2P_dv2 / model.dP_dv(T, v))


def model_at_compositions(model, x):
    """The cubic with per-state compositions x (n, nc): what its (T, v) methods read of the
    composition (z for the mixing rule, b, c, v_min) as arrays, so that one call of
    ``pressure``, ``dP_dv``, ``dP_dT`` or ``residual_bundle`` evaluates every state at its
    own composition with the model's own formulas (``at_composition`` takes one)."""
    x = np.asarray(x, dtype=float)
    twin = copy.copy(model)
    twin.z = x
    twin.b = x @ model._b_i
    twin.c = x @ model._c_i
    twin.v_min = twin.b - twin.c
    return twin


def feed_phase_words(model, T, P, z, v):
    """Words of single-phase feeds z (n, nc) at flat T [K], P [Pa] and their volumes v [m³/mol]."""
    z = np.asarray(z, dtype=float)
    if model.n_components == 1 or np.all(z == model.z):
        twin = model
    else:
        twin = model_at_compositions(model, z)
    pip = phase_identification_parameter(twin, T, v)
    Tc, Pc = model.components.Tc, model.components.Pc
    return phase_words(T, P, pip, z @ Tc, z @ Pc)
