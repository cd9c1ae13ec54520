"""Layer 1: root finding, numerics only.

Bracketed methods (Chandrupatla's hybrid, the default; bisection; Illinois false
position) and open methods (secant, Newton-Raphson), scalar and vectorized through
one code path, with a status per problem and an iteration trace.

Import point: ``from thermo_roots.roots import find_root, METHODS, Status``.
"""

from thermo_roots.roots._api import DEFAULT_METHOD, METHODS, find_root
from thermo_roots.roots._open import GROWTH_LIMIT
from thermo_roots.roots._result import ArrayTrace, RootResult, ScalarTrace, Status, TraceStep

CONVERGED = Status.CONVERGED
ITERATION_LIMIT = Status.ITERATION_LIMIT
DIVERGED = Status.DIVERGED
LEFT_DOMAIN = Status.LEFT_DOMAIN
NO_SIGN_CHANGE = Status.NO_SIGN_CHANGE

__all__ = [
    "find_root", "METHODS", "DEFAULT_METHOD", "Status", "RootResult", "TraceStep",
    "ScalarTrace", "ArrayTrace", "GROWTH_LIMIT", "CONVERGED", "ITERATION_LIMIT",
    "DIVERGED", "LEFT_DOMAIN", "NO_SIGN_CHANGE",
]
