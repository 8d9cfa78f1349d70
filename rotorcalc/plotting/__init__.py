"""Pictures of rotors and their results.

Every function draws on the axes it is given (``ax=``) or on a new figure
when none is given, and returns what it drew.  Plotting never computes an
analysis: it draws result objects made by :mod:`rotorcalc.analysis`.
Matplotlib is imported here without choosing a backend; the command line
selects a non-interactive one.
"""

from .layout import LayoutArtists, rotor_layout
from .output import save
from .shapes import ModeShapeArtists, mode_shape
from .speedmap import SpeedMapArtists, whirl_speed_map

__all__ = ["whirl_speed_map", "mode_shape", "rotor_layout", "save", "SpeedMapArtists",
           "ModeShapeArtists", "LayoutArtists"]
