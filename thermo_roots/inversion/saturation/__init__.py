"""Pure-fluid saturation of a cubic equation of state, in four pieces.

- :mod:`.api` -- the public entry points: :func:`saturation` and its result
  :class:`Saturation`, the array helpers :func:`saturation_pressure` and
  :func:`saturation_temperature`, :func:`lowest_saturation_temperature`;
- :mod:`.window` -- the window solver: a guaranteed bracket between the spinodal pressures,
  valid to Tr = 1 - 1e-9 (:func:`spinodal_volumes`); its gap solved in T at fixed P serves
  T_sat(P) next to the critical point;
- :mod:`.fast` -- the fast paths: Psat(T) below Tr = 0.99 by a bracketed Newton iteration
  in ln P, compiled when numba is there; T_sat(P) by a bracketed Newton iteration in Tc/T
  at fixed P, started and bracketed by the model's own saturation line at a few nodes;
- :mod:`.table` -- the corresponding-states table of each cubic family that starts it.

Every name importable from ``thermo_roots.inversion.saturation`` before the split still is
(the private ones for the tests of the compiled twins).
"""

from .api import (SATURATION_FLOOR, Saturation, lowest_saturation_temperature, saturation,
                  saturation_pressure, saturation_temperature)
from .fast import (ACCEL_MIN_SIZE, FAST_TR_MAX, _SETTINGS, _newton_saturation, _newton_saturation_numpy,
                   fugacity_gap_z)
from .table import _TABLE_START, _start_tables
from .window import _window_saturation, spinodal_volumes

__all__ = ["SATURATION_FLOOR", "Saturation", "lowest_saturation_temperature", "saturation",
           "saturation_pressure", "saturation_temperature", "spinodal_volumes", "FAST_TR_MAX",
           "ACCEL_MIN_SIZE", "fugacity_gap_z"]
