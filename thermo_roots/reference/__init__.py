"""Layer 6: the reference equation of state, and how far a model is from it.

In pieces along its seams:

- :mod:`.driver` -- the only code that talks to CoolProp: one state object per thread and
  fluid, one state at a time, failures turned into readable "unavailable" reasons;
- :mod:`.batch` -- the batch runner: chunks, progress, interruption, ``executor=``;
- :mod:`.states` -- :func:`reference_state` and :class:`ReferenceState`, the fluid's
  constants against the reference equation's;
- :mod:`.saturation_line` -- :func:`reference_saturation`;
- :mod:`.comparison` -- :func:`cross_check`, :class:`CrossCheck` and its large deviations;
- :mod:`.volume_shift` -- :func:`fit_volume_shift`;
- :mod:`.steps` -- :class:`ReferenceStep`: a valve, a machine or a closed vessel through
  the reference equation's own (P, h), (P, s) and (v, P) / (v, T) solves (the reference
  side of :mod:`thermo_roots.steps`).

Every name importable from ``thermo_roots.reference`` before the split still is, and
``thermo_roots.reference._reference_chunk`` stays the one place to replace the chunk
evaluator (the batch runner reads it here).

References
----------
Bell, I. H., Wronski, J., Quoilin, S. & Lemort, V. (2014), Ind. Eng. Chem. Res. 53,
2498-2508 (CoolProp).
Span, R. (2000), Multiparameter Equations of State, Springer (form of the reference equations).
"""

from .driver import (REFERENCE_PAIRS, _abstract_state, _fluid_name, _library_limits, _reference_chunk,
                     library_reason, reference_limits)
from .batch import (AUTO_PROGRESS_ABOVE, DEFAULT_CHUNK, INTERRUPTED, _check_run_options, _given,
                    evaluate_reference, whole_number)
from .states import CONSTANT_TOLERANCE, ReferenceState, constant_warnings, reference_state
from .saturation_line import ReferenceSaturation, reference_saturation
from .comparison import (LARGE_DEVIATION_K, LARGE_DEVIATION_LEGEND, LARGE_DEVIATION_PERCENT,
                         LARGE_DEVIATION_STYLE, AT_OPTIONS, CrossCheck, compare_with_reference,
                         convention_offset, cross_check, knowns_pair, state_pair)
from .volume_shift import fit_volume_shift
from .steps import ReferenceStep, reference_flow_step, reference_inlet, reference_vessel_step

__all__ = ["AT_OPTIONS", "AUTO_PROGRESS_ABOVE", "CONSTANT_TOLERANCE", "CrossCheck", "DEFAULT_CHUNK", "INTERRUPTED",
           "LARGE_DEVIATION_K", "LARGE_DEVIATION_LEGEND", "LARGE_DEVIATION_PERCENT", "LARGE_DEVIATION_STYLE",
           "REFERENCE_PAIRS", "ReferenceSaturation", "ReferenceState", "ReferenceStep", "compare_with_reference",
           "constant_warnings", "convention_offset", "cross_check", "evaluate_reference", "fit_volume_shift",
           "knowns_pair", "library_reason", "reference_flow_step", "reference_inlet", "reference_limits",
           "reference_saturation", "reference_state", "reference_vessel_step", "state_pair", "whole_number"]

# Mixtures (issue 10): CoolProp's multiparameter mixture model at (T, P), bubble and dew points.
from .mixture import (AUTO_MIXTURE_PROGRESS_ABOVE, DEFAULT_MIXTURE_CHUNK, MIXTURE_INTERRUPTED, MIXTURE_KINDS,
                      REFERENCE_MIXTURE_CAUTION, ReferenceMixtureState, evaluate_mixture_reference,
                      mixture_phase_word, mixture_reference_reason, pseudo_critical, reference_bubble_point,
                      reference_dew_point, reference_mixture_state)

from .mixture_check import MixtureCrossCheck, cross_check_mixture

__all__ += ["MixtureCrossCheck", "cross_check_mixture", "AUTO_MIXTURE_PROGRESS_ABOVE", "DEFAULT_MIXTURE_CHUNK", "MIXTURE_INTERRUPTED", "MIXTURE_KINDS",
            "REFERENCE_MIXTURE_CAUTION", "ReferenceMixtureState", "evaluate_mixture_reference", "mixture_phase_word",
            "mixture_reference_reason", "pseudo_critical", "reference_bubble_point", "reference_dew_point",
            "reference_mixture_state"]
