"""Phase equilibrium of mixtures (the layer below inversion).

- :mod:`.rachford_rice`, :mod:`.k_values` -- the split for given K-values; Wilson's estimates;
- :mod:`.fugacity` -- ln φᵢ of one phase at (T, P), the root of lowest Gibbs energy;
- :mod:`.stability` -- Michelsen's tangent-plane test (:func:`tangent_plane`);
- :mod:`.flash` -- the (T, P) flash (:func:`flash_tp`);
- :mod:`.energy_flash` -- the (P, h) and (P, s) flashes (temperature by bracketed root finding);
- :mod:`.phase_caloric` -- caloric properties of a split by the lever rule;
- :mod:`.phase_words` -- the one rule for a mixture's phase word;
- :mod:`.mixture_state` -- :class:`MixtureState`, what ``solve`` returns for a mixture;
- :mod:`.saturation_points` -- :func:`bubble_point`, :func:`dew_point`;
- :mod:`.envelope` -- :func:`phase_envelope` by continuation through the critical point;
- :mod:`.dispatch` -- ``solve`` for every model (a mixture to the flash).
"""

from thermo_roots.equilibrium.k_values import wilson_k
from thermo_roots.equilibrium.rachford_rice import (STATUSES, RachfordRice, rachford_rice,
                                                    rachford_rice_function)
from thermo_roots.equilibrium.stability import StabilityResult, tangent_plane
from thermo_roots.equilibrium.flash import FlashResult, flash_tp
from thermo_roots.equilibrium.energy_flash import energy_flash
from thermo_roots.equilibrium.phase_caloric import lever_caloric, split_caloric
from thermo_roots.equilibrium.phase_words import mixture_phase_word, pseudo_critical
from thermo_roots.equilibrium.mixture_state import MixtureState, solve_mixture
from thermo_roots.equilibrium.saturation_points import SaturationPoint, bubble_point, dew_point
from thermo_roots.equilibrium.envelope import PhaseEnvelope, phase_envelope

__all__ = ["FlashResult", "MixtureState", "PhaseEnvelope", "RachfordRice", "STATUSES", "SaturationPoint",
           "StabilityResult", "bubble_point", "dew_point", "energy_flash", "flash_tp", "lever_caloric",
           "mixture_phase_word", "phase_envelope", "pseudo_critical", "rachford_rice",
           "rachford_rice_function", "solve_mixture", "split_caloric", "tangent_plane", "wilson_k"]
