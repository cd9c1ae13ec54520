"""`solve(model, **knowns)` for every model: a mixture goes to the flash, a pure fluid to the pure solve.

The pure solve (:func:`thermo_roots.inversion.solve`) is unchanged; a model with more than
one component goes to :func:`.mixture_state.solve_mixture`. ``thermo_roots.solve`` is this
function.
"""

from __future__ import annotations

from thermo_roots.equilibrium.mixture_state import solve_mixture
from thermo_roots.inversion import solve as _pure_solve
from thermo_roots.units import STANDARD_ATMOSPHERE

_MIXTURE_NOTE = """
    Mixtures
    --------
    A model on a Mixture of two or more components (``model.is_mixture``) takes (T, P)
    today and returns a :class:`~thermo_roots.equilibrium.mixture_state.MixtureState`
    (tangent-plane stability, then the (T, P) flash): phase, vapor_fraction, x, y, v, Z,
    each phase's volume and roots, h, s, u, g by the lever rule. Other pairs on a mixture
    are refused with an InputError.
"""


def solve(model, *, branch: str = "stable", atmosphere=STANDARD_ATMOSPHERE, errors: str = "nan", **knowns):
    if getattr(model, "is_mixture", False):
        return solve_mixture(model, branch=branch, atmosphere=atmosphere, errors=errors, **knowns)
    return _pure_solve(model, branch=branch, atmosphere=atmosphere, errors=errors, **knowns)


def _docstring() -> str:
    """The pure solve's docstring with the mixture paragraph before its References."""
    text = _pure_solve.__doc__ or ""
    marker = "    References\n    ----------"
    if marker in text:
        head, tail = text.split(marker, 1)
        return head.rstrip() + "\n" + _MIXTURE_NOTE + "\n" + marker + tail
    return text + _MIXTURE_NOTE


solve.__doc__ = _docstring()
