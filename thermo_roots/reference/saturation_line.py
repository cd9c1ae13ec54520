"""Saturation of the reference equation at T or P: its (T, quality = 0) or (P, quality = 0)
states, with the saturated volumes the driver reads beside them."""

from __future__ import annotations

import html
from dataclasses import dataclass, field

import numpy as np

from ..errors import InputError
from ..models import _scalar_or_array
from ..units import to_si
from .states import _as_fluid, reference_state

@dataclass(frozen=True)
class ReferenceSaturation:
    """Saturation of the reference equation at T or P; NaN and a reason where unavailable.

    Attributes: T [K], P [Pa], v_liquid, v_vapor [m^3/mol], available, reason.
    """

    fluid: object = field(repr=False)
    T: object
    P: object
    v_liquid: object
    v_vapor: object
    available: object = field(repr=False)
    reason: object = field(repr=False)

    def __repr__(self):
        if np.ndim(self.T):
            return f"ReferenceSaturation({self.fluid.name!r}, {np.size(self.T)} points)"
        return (f"ReferenceSaturation({self.fluid.name!r}, T={self.T:.6g} K, P={self.P:.6g} Pa, "
                f"v_liquid={self.v_liquid:.6g} m³/mol, v_vapor={self.v_vapor:.6g} m³/mol)")

    def _repr_html_(self):
        return f"<pre>{html.escape(repr(self))}</pre>"


def reference_saturation(fluid, T=None, P=None) -> ReferenceSaturation:
    """Saturation pressure (given T) or temperature (given P) of the reference equation.

    Parameters
    ----------
    fluid : Fluid
    T : float, array_like or str, optional
        Temperature [K].
    P : float, array_like or str, optional
        Pressure [Pa]. Give exactly one of T and P.

    Returns
    -------
    ReferenceSaturation
        NaN with a reason above the critical point, below the triple point, or for a
        user fluid.

    References
    ----------
    Bell, I. H. et al. (2014), Ind. Eng. Chem. Res. 53, 2498-2508 (CoolProp).
    """
    fluid = _as_fluid(fluid, "reference_saturation")
    if (T is None) == (P is None):
        raise InputError("reference_saturation() needs exactly one of T= or P=.")
    known = {"T": T} if T is not None else {"P": P}
    x = np.asarray(to_si(*next(iter(known.items()))[::-1]), dtype=float)
    ref = reference_state(fluid, quality=np.zeros(x.shape), **{k: x for k in known})
    T_out = ref.T if T is None else _scalar_or_array(x)
    P_out = ref.P if P is None else _scalar_or_array(x)
    return ReferenceSaturation(fluid, T_out, P_out, ref.v_liquid, ref.v_vapor, ref.available, ref.reason)
