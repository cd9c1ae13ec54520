"""Reference steps: a process step run through the fluid's reference equation.

The reference side of :mod:`thermo_roots.steps`: from the reference's own inlet at the
model inlet's knowns, the reference equation's own (P, s) solve for an isentropic outlet,
its own (P, h) solve for the outlet of a valve or a machine, and its own (v, P) or (v, T)
state for a closed vessel. Where the reference cannot answer (a user fluid, below its
triple-point pressure, beyond its range) the step is "unavailable: reason", never an error.

How the outlet enthalpy follows from the isentropic one (the isentropic efficiency of a
compressor or an expander) is the caller's: it is written once, in :mod:`thermo_roots.steps`,
and handed in as a function, so the model and the reference apply the same rule.

References
----------
Bell, I. H. et al. (2014), Ind. Eng. Chem. Res. 53, 2498-2508 (CoolProp).
Smith, J. M., Van Ness, H. C. & Abbott, M. M. (2005), Introduction to Chemical Engineering
Thermodynamics, 7th ed., sec. 2.5 (closed system: Q = delta U) and ch. 7 (throttling,
compressors and turbines).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from ..models import _scalar_or_array
from .comparison import state_pair
from .driver import library_reason
from .states import reference_state


@dataclass(frozen=True)
class ReferenceStep:
    """The same step through the reference equation (scalars or arrays as the inlet).

    Attributes
    ----------
    available : bool
    reason : str, "" where available; otherwise "unavailable: ..." says why
    inlet, outlet : ReferenceState (None where the reference could not be started); their h,
        s and u are on the reference equation's own zero (``StepResult.rows`` shows them on the
        model's, through :func:`~thermo_roots.reference.convention_offset`)
    isentropic_outlet : ReferenceState of the isentropic outlet (compressor and expander), else None
    work_molar [J/mol], work_mass [J/kg] : shaft work into the fluid
    heat_molar [J/mol], heat_mass [J/kg], heat [J] (the vessel's) : heat into the fluid
    """

    available: object
    reason: object
    inlet: object = field(repr=False, default=None)
    outlet: object = field(repr=False, default=None)
    isentropic_outlet: object = field(repr=False, default=None)
    work_molar: object = field(repr=False, default=math.nan)
    work_mass: object = field(repr=False, default=math.nan)
    heat_molar: object = field(repr=False, default=math.nan)
    heat_mass: object = field(repr=False, default=math.nan)
    heat: object = field(repr=False, default=math.nan)


def reference_inlet(inlet, fluid, *, vessel=False):
    """The reference at a model inlet's own knowns (the pair of :func:`state_pair`, the
    given quality kept); a vessel's at the inlet's T and v, the fill.

    Parameters
    ----------
    inlet : State
        A solved model state (scalar or array).
    fluid : Fluid
        A fluid with a reference equation.
    vessel : bool
        Start from the inlet's (T, v) whatever its knowns.

    Returns
    -------
    ReferenceState
    """
    if vessel:
        return reference_state(fluid, T=inlet.T, v=inlet.v, with_saturation=False)
    first, second = state_pair(inlet).split(",")
    values = {"T": inlet.T, "P": inlet.P, "v": inlet.v}
    knowns = {first: values[first],
              second: inlet.knowns["quality"] if second == "quality" else values[second]}
    return reference_state(fluid, with_saturation=False, **knowns)


def _unavailable(reason, inlet=None):
    return ReferenceStep(available=False, reason=f"unavailable: {reason}", inlet=inlet)


def _reason_of(ref):
    """The first reason of an (array) reference state, "" when every state is available."""
    reasons = np.atleast_1d(np.asarray(ref.reason, dtype=object)).ravel()
    bad = [str(r) for r in reasons if r]
    return bad[0] if bad else ""


def reference_flow_step(fluid, inlet, P_out, outlet_enthalpy=None) -> ReferenceStep:
    """A steady-flow adiabatic step through the reference equation, from its own inlet.

    Parameters
    ----------
    fluid : Fluid
        The model's fluid (a user fluid gives an unavailable step).
    inlet : State
        The model's inlet; the reference starts from its own state at the same knowns.
    P_out : float or numpy.ndarray
        Outlet pressure [Pa], absolute.
    outlet_enthalpy : callable, optional
        ``outlet_enthalpy(h_in, h_s) -> h_out`` [J/mol] from the inlet's and the isentropic
        outlet's enthalpy (the machine's efficiency rule). None for a throttle:
        h_out = h_in, and no isentropic outlet is solved.

    Returns
    -------
    ReferenceStep
        The isentropic outlet is the reference's own (P_out, s_in) solve; the outlet its own
        (P_out, h_out) solve; work = h_out - h_in, no heat.

    References
    ----------
    Bell, I. H. et al. (2014), Ind. Eng. Chem. Res. 53, 2498-2508 (CoolProp's (P, h) and
    (P, s) inputs of its reference equations).
    """
    reason = library_reason(fluid)
    if reason:
        return _unavailable(reason)
    r_in = reference_inlet(inlet, fluid)
    return _flow_from(r_in, lambda s: reference_state(fluid, P=P_out, s=s, with_saturation=False),
                      lambda h: reference_state(fluid, P=P_out, h=h, with_saturation=False),
                      outlet_enthalpy, fluid.molar_mass)


def _flow_from(r_in, at_entropy, at_enthalpy, outlet_enthalpy, molar_mass) -> ReferenceStep:
    """The reference's flow step from its own inlet r_in: ``at_entropy(s)`` and ``at_enthalpy(h)``
    are its own (P_out, s) and (P_out, h) solves (a pure fluid's or a mixture's)."""
    if _reason_of(r_in):
        return _unavailable(f"the reference inlet: {_reason_of(r_in)}", r_in)
    isentropic = None
    h_in = np.asarray(r_in.h, dtype=float)
    if outlet_enthalpy is None:
        h_out = h_in
    else:
        isentropic = at_entropy(r_in.s)
        if _reason_of(isentropic):
            return _unavailable(f"the reference's isentropic outlet: {_reason_of(isentropic)}", r_in)
        h_out = outlet_enthalpy(h_in, np.asarray(isentropic.h, dtype=float))
    r_out = at_enthalpy(h_out)
    if _reason_of(r_out):
        return ReferenceStep(False, f"unavailable: the reference outlet: {_reason_of(r_out)}", r_in, None, isentropic)
    work = _scalar_or_array(h_out - h_in)
    return ReferenceStep(True, "", r_in, r_out, isentropic, work,
                         _scalar_or_array(np.asarray(work) / molar_mass), 0.0, 0.0, math.nan)


def reference_mixture_flow_step(mixture, T_in, P_in, P_out, outlet_enthalpy=None) -> ReferenceStep:
    """A steady-flow adiabatic step of a mixture through the reference mixture model, from its
    own state at the model inlet's T and P (which fix a mixture's state, split or not).

    Parameters and returns as :func:`reference_flow_step`; the states are
    :class:`~thermo_roots.reference.mixture.ReferenceMixtureState` (CoolProp's HEOS mixture
    model, GERG-2008 type), the outlet its own (P_out, h_out) solve and the isentropic outlet
    its own (P_out, s_in) solve.
    """
    from .mixture import mixture_reference_reason, reference_mixture_energy_state, reference_mixture_state

    reason = mixture_reference_reason(mixture)
    if reason:
        return _unavailable(reason)
    return _flow_from(reference_mixture_state(mixture, T_in, P_in),
                      lambda s: reference_mixture_energy_state(mixture, P_out, s=s),
                      lambda h: reference_mixture_energy_state(mixture, P_out, h=h),
                      outlet_enthalpy, mixture.molar_mass)


def reference_vessel_step(fluid, inlet, target, mass) -> ReferenceStep:
    """A closed rigid vessel heated or cooled through the reference equation.

    Parameters
    ----------
    fluid : Fluid
    inlet : State
        The model's fill state; the reference starts from its own (T, v) there.
    target : dict
        ``{"P": P_out}`` [Pa] or ``{"T": T_out}`` [K].
    mass : float
        The fill [kg].

    Returns
    -------
    ReferenceStep
        The outlet is the reference's own state at the same v and the target;
        heat = u_out - u_in per mole, per kilogram and for the vessel (mass times per kg).

    References
    ----------
    Smith, Van Ness & Abbott (2005), 7th ed., sec. 2.5 (Q = delta U at constant volume).
    """
    reason = library_reason(fluid)
    if reason:
        return _unavailable(reason)
    r_in = reference_inlet(inlet, fluid, vessel=True)
    if _reason_of(r_in):
        return _unavailable(f"the reference inlet: {_reason_of(r_in)}", r_in)
    r_out = reference_state(fluid, v=inlet.v, with_saturation=False, **target)
    if _reason_of(r_out):
        return ReferenceStep(False, f"unavailable: the reference outlet: {_reason_of(r_out)}", r_in)
    q = np.asarray(r_out.u, dtype=float) - np.asarray(r_in.u, dtype=float)
    q_mass = q / fluid.molar_mass
    return ReferenceStep(True, "", r_in, r_out, None, 0.0, 0.0, _scalar_or_array(q), _scalar_or_array(q_mass),
                         _scalar_or_array(q_mass * mass))
