"""The volume-shift fit: the constant translation that puts a cubic's saturated-liquid
volume on the reference equation's at one reduced temperature."""

from __future__ import annotations

import math

import numpy as np

from ..errors import DomainError, InputError
from ..inversion import saturation
from ..models import MODELS, CubicModel
from .batch import _given
from .driver import reference_limits
from .saturation_line import reference_saturation
from .states import _as_fluid

def fit_volume_shift(model_class, fluid, Tr: float = 0.7) -> float:
    """Volume translation c [m^3/mol] that matches the reference saturated-liquid volume at Tr.

    c = v_liquid,model(T) - v_liquid,reference(T) at T = Tr Tc, from the untranslated
    model; then ``model_class(fluid, volume_shift=c)`` reproduces the reference's
    saturated-liquid volume there, and its saturation pressures are unchanged.

    Parameters
    ----------
    model_class : type, str or model
        A cubic model class (e.g. ``PengRobinson``), its short name ("PR"), or a model
        instance (its class is used, untranslated).
    fluid : Fluid
        A library fluid.
    Tr : float
        Reduced temperature T/Tc of the match [-], default 0.7 (where the acentric factor
        is defined).

    Returns
    -------
    float
        c [m^3/mol].

    Raises
    ------
    DomainError
        Tr not in (0, 1), or the reference has no saturated liquid at that temperature.

    References
    ----------
    Peneloux, A., Rauzy, E. & Freze, R. (1982), Fluid Phase Equilib. 8, 7-23 (a constant
    translation leaves the phase equilibrium unchanged).
    """
    if isinstance(model_class, str):
        if model_class not in MODELS:
            raise InputError(f"Unknown model {model_class!r}; allowed: {', '.join(MODELS)}.")
        model_class = MODELS[model_class]
    elif isinstance(model_class, CubicModel):
        model_class = type(model_class)
    if not (isinstance(model_class, type) and issubclass(model_class, CubicModel)):
        raise InputError(f"fit_volume_shift needs a cubic model class such as PengRobinson, not {model_class!r}.")
    fluid = _as_fluid(fluid, "fit_volume_shift")
    if isinstance(Tr, (bool, np.bool_)) or not isinstance(Tr, (int, float, np.integer, np.floating)):
        raise TypeError(f"Tr must be a number between 0 and 1 (a reduced temperature T/Tc); got {_given(Tr)}.")
    if not 0.0 < Tr < 1.0:
        raise DomainError(f"Tr = {Tr!r} must lie between 0 and 1 (a saturated liquid exists only below Tc).")
    T = Tr * fluid.Tc
    ref = reference_saturation(fluid, T=T)
    if not ref.available:
        lowest = reference_limits(fluid)["T_min"] / fluid.Tc
        raise DomainError(f"The reference has no saturated liquid of {fluid.name} at Tr = {Tr:.6g} (T = {T:.6g} K): "
                          f"{ref.reason}. Choose Tr between {lowest:.4g} (its triple point) and 1, e.g. "
                          f"Tr={max(0.7, math.ceil(lowest * 20) / 20):.2f}.")
    model = model_class(fluid)
    return float(saturation(model, T=T).v_liquid - ref.v_liquid)
