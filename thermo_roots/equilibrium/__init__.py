"""Phase equilibrium of mixtures (layer below inversion): the Rachford–Rice split and K-value estimates.

Imports only from roots, quantities/units, fluids, mixtures and models. The stability test,
the (T, P) flash, bubble and dew points and the phase envelope are built on these pieces.
"""

from thermo_roots.equilibrium.k_values import wilson_k
from thermo_roots.equilibrium.rachford_rice import (STATUSES, RachfordRice, rachford_rice,
                                                    rachford_rice_function)

__all__ = ["RachfordRice", "STATUSES", "rachford_rice", "rachford_rice_function", "wilson_k"]
