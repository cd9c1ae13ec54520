"""thermo_roots: state points of real fluids from cubic equations of state, with every root
shown, the convergence visible, and the answer checked against a reference equation.

Layers (each imports only from those above it): roots, fluids, models, units, inversion.
"""

from .errors import ConvergenceError, DomainError, InputError, ThermoRootsError, UnknownFluidError
from .roots import find_root
from .fluids import Fluid, fluid_names, get_fluid
from .models import (MODELS, R, CubicFamily, CubicModel, IdealGas, PengRobinson, PengRobinson78,
                     RedlichKwong, SoaveRedlichKwong, VanDerWaals)
from .units import to_si
from .inversion import CAUTION, Root, Saturation, State, saturation, solve, volume_roots

__version__ = "0.1.0"

__all__ = [
    "CAUTION", "ConvergenceError", "CubicFamily", "CubicModel", "DomainError", "Fluid", "IdealGas",
    "InputError", "MODELS", "PengRobinson", "PengRobinson78", "R", "RedlichKwong", "Root", "Saturation",
    "SoaveRedlichKwong", "State", "ThermoRootsError", "UnknownFluidError", "VanDerWaals", "find_root",
    "fluid_names", "get_fluid", "saturation", "solve", "to_si", "volume_roots", "__version__",
]
