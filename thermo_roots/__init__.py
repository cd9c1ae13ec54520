"""thermo_roots: state points of real fluids from cubic equations of state, with every root
shown, the convergence visible, and the answer checked against a reference equation.

Layers (each imports only from those above it): roots, fluids and mixtures, models, units,
inversion, equilibrium, reference, sweeps and accuracy, plots, widgets.
"""

from .errors import (ConvergenceError, DomainError, InputError, ThermoRootsError, UnknownFluidError,
                     WrongTypeError)
from .roots import find_root
from .fluids import Fluid, fluid_names, get_fluid
from .mixtures import Mixture
from .models import (MODELS, R, CubicFamily, CubicModel, IdealGas, Model, PengRobinson, PengRobinson78,
                     RedlichKwong, SoaveRedlichKwong, VanDerWaals)
from .units import to_si
from .inversion import CAUTION, Root, Saturation, State, saturation, solve, volume_roots
from .equilibrium.dispatch import solve  # noqa: E402,F811  (a mixture model goes to the flash)
# The reference, sweep and accuracy layers pull in pandas and CoolProp's state objects;
# they load on first use so that `import thermo_roots` and a first state stay quick.
_LAZY = {
    "reference": ("CrossCheck", "ReferenceSaturation", "ReferenceState", "cross_check", "fit_volume_shift",
                  "reference_limits", "reference_saturation", "reference_state"),
    "sweeps": ("between", "isenthalp", "isentrope", "isobar", "isochore", "isotherm", "read_csv",
               "saturation_curve", "state_frame", "state_grid", "to_csv"),
    "accuracy": ("AccuracyMap", "accuracy_map"),
    "steps": ("ReferenceStep", "StepResult", "compress", "expand", "heat_at_constant_volume", "throttle"),
}
_LAZY_HOME = {name: module for module, names in _LAZY.items() for name in names}


def __getattr__(name):
    if name in _LAZY_HOME:
        import importlib

        return getattr(importlib.import_module(f".{_LAZY_HOME[name]}", __name__), name)
    raise AttributeError(f"module 'thermo_roots' has no attribute {name!r}")


# plots and widgets need the notebook extra (matplotlib, ipywidgets): import them as
# thermo_roots.plots and thermo_roots.widgets.

__version__ = "0.1.0"

__all__ = [
    "CAUTION", "ConvergenceError", "CubicFamily", "CubicModel", "DomainError", "Fluid", "IdealGas", "Model",
    "InputError", "MODELS", "Mixture", "PengRobinson", "PengRobinson78", "R", "RedlichKwong", "Root", "Saturation",
    "SoaveRedlichKwong", "State", "ThermoRootsError", "UnknownFluidError", "VanDerWaals", "WrongTypeError", "find_root",
    "fluid_names", "get_fluid", "saturation", "solve", "to_si", "volume_roots", "__version__",
    "AccuracyMap", "CrossCheck", "ReferenceSaturation", "ReferenceState", "accuracy_map", "between",
    "cross_check", "fit_volume_shift", "isenthalp", "isentrope", "isobar", "isochore", "isotherm", "read_csv", "reference_limits",
    "reference_saturation", "reference_state", "saturation_curve", "state_frame", "state_grid", "to_csv",
    "ReferenceStep", "StepResult", "compress", "expand", "heat_at_constant_volume", "throttle",
]
