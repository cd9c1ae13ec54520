"""The project's error classes.

Every error raised on purpose by thermo_roots derives from :class:`ThermoRootsError`,
which is a :class:`ValueError`, so callers can catch one class. Subclasses say the cause.
Messages name what was given, what is allowed, and what to try.
"""

from __future__ import annotations


class ThermoRootsError(ValueError):
    """Base class of every error thermo_roots raises on purpose."""


class InputError(ThermoRootsError):
    """An input could not be read or is not allowed (wrong unit, NaN, wrong count of knowns)."""


class WrongTypeError(InputError, TypeError):
    """An argument of the wrong type (a bool for a temperature, a class for a model, ...)."""


class UnknownFluidError(ThermoRootsError):
    """A fluid name is not in the fluid library; the message offers close matches."""

    def __init__(self, message: str, suggestions: tuple[str, ...] = ()):
        super().__init__(message)
        self.suggestions = tuple(suggestions)


class DomainError(ThermoRootsError):
    """A state lies outside where the model is defined (v <= b, T <= 0, saturation above Tc)."""


class ConvergenceError(ThermoRootsError):
    """An iterative method did not converge; ``result`` holds its trace for diagnosis."""

    def __init__(self, message: str, result=None):
        super().__init__(message)
        self.result = result


class MixtureNotSupportedError(InputError):
    """A pure-fluid calculation (saturation line, sweep, one fluid's cross-check) asked of a mixture model."""
