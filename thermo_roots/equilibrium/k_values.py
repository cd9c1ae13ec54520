"""Estimates of the equilibrium ratios Kᵢ = yᵢ/xᵢ from the components' critical constants.

References
----------
.. [1] Wilson, G. M., "A modified Redlich-Kwong equation of state, application to general
   physical data calculations", paper 15c, AIChE 65th National Meeting, Cleveland, 1968.
.. [2] Michelsen, M. L., Mollerup, J. M., *Thermodynamic Models: Fundamentals and
   Computational Aspects*, 2nd ed., Tie-Line Publications, 2007, ch. 10 (Wilson's K as the
   start of the flash and of the stability test).
"""

from __future__ import annotations

import numbers

import numpy as np

from thermo_roots.errors import InputError, WrongTypeError
from thermo_roots.mixtures import Mixture

#: The constant of Wilson's correlation, 5.373 = (7/3) ln 10: it makes ln(Pᵢˢᵃᵗ/Pc) = −(7/3)(1 + ω)
#: (Tc/T − 1) pass through Pitzer's definition of ω at Tr = 0.7 (log₁₀ Prˢᵃᵗ = −1 − ω).
WILSON_CONSTANT = 5.373


def _positive(value, label: str) -> np.ndarray:
    if isinstance(value, (str, bytes, bool, np.bool_)) or value is None:
        raise WrongTypeError(f"wilson_k: {label} must be a number or an array of numbers in SI units "
                             f"({'K' if label == 'T' else 'Pa'}), not {value!r}; convert text with "
                             "thermo_roots.to_si first.")
    try:
        out = np.asarray(value, dtype=float)
    except (TypeError, ValueError):
        raise WrongTypeError(f"wilson_k: {label} must be a number or an array of numbers, not {value!r}.") from None
    bad = ~(np.isfinite(out) & (out > 0))
    if bad.any():
        raise InputError(f"wilson_k: {label} must be positive and finite in SI units "
                         f"({'K' if label == 'T' else 'Pa'}); got {float(out[bad].ravel()[0])!r}"
                         f"{'' if out.ndim == 0 else f' at index {tuple(int(i) for i in np.argwhere(bad)[0])}'}.")
    return out


def wilson_k(mixture: Mixture, T, P) -> np.ndarray:
    """Wilson's estimate of the K-values: ln Kᵢ = ln(Pcᵢ/P) + 5.373 (1 + ωᵢ)(1 − Tcᵢ/T).

    Parameters
    ----------
    mixture : Mixture
        The components (their Tc [K], Pc [Pa] and ω [-] are used).
    T : float or array_like
        Temperature [K].
    P : float or array_like
        Pressure [Pa]; broadcasts with T.

    Returns
    -------
    ndarray, shape broadcast(T, P).shape + (n_components,)
        Kᵢ [-], the components along the last axis.

    Notes
    -----
    A corresponding-states estimate for ideal solutions at low pressure; it knows nothing
    of the equation of state or of the composition, and is meant as the start of a flash
    or stability test, not as an answer.

    References
    ----------
    Wilson (1968), AIChE 65th National Meeting, paper 15c; Michelsen & Mollerup (2007), ch. 10.
    """
    if not isinstance(mixture, Mixture):
        raise WrongTypeError(f"wilson_k needs a Mixture, e.g. Mixture({{'methane': 0.9, 'ethane': 0.1}}); got "
                             f"{mixture!r} ({type(mixture).__name__}).")
    T, P = _positive(T, "T"), _positive(P, "P")
    try:
        T, P = np.broadcast_arrays(T, P)
    except ValueError:
        raise InputError(f"wilson_k: T of shape {T.shape} and P of shape {P.shape} do not broadcast.") from None
    Tc, Pc, omega = mixture.Tc, mixture.Pc, mixture.omega
    T, P = T[..., None], P[..., None]
    return np.exp(np.log(Pc / P) + WILSON_CONSTANT * (1.0 + omega) * (1.0 - Tc / T))
