"""Layer 5: two knowns to a state (`solve`) and saturation (`saturation`)."""

from .cubic import cubic_real_roots, volume_roots
from .display import CAUTION
from .saturation import Saturation, saturation, spinodal_volumes
from .state import PHASES, Root, State, pressure_gap, solve, temperature_bracket, volume_bracket

__all__ = ["CAUTION", "PHASES", "Root", "Saturation", "State", "cubic_real_roots", "saturation",
           "solve", "spinodal_volumes", "volume_roots", "pressure_gap", "temperature_bracket",
           "volume_bracket"]
