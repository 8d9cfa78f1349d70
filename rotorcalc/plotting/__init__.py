"""Pictures of rotors and their results.

Every function draws on the axes it is given (``ax=``) or on a new figure
when none is given, and returns what it drew.  Plotting never computes an
analysis: it draws result objects made by :mod:`rotorcalc.analysis`.
Matplotlib is imported here without choosing a backend; the command line
selects a non-interactive one.
"""

from .csmap import (CriticalMapArtists, MapShapeArtists, VariantMapArtists, critical_speed_map,
                    map_point_label, map_shapes, variant_maps)
from .layout import LayoutArtists, rotor_layout
from .output import save
from .response import BodeArtists, OrbitArtists, PolarArtists, bode, orbits, polar
from .shapes import ModeShapeArtists, mode_shape
from .speedmap import SpeedMapArtists, whirl_speed_map

__all__ = ["whirl_speed_map", "mode_shape", "rotor_layout", "bode", "polar", "orbits", "save",
           "SpeedMapArtists", "ModeShapeArtists", "LayoutArtists", "BodeArtists",
           "PolarArtists", "OrbitArtists", "critical_speed_map", "variant_maps", "map_shapes",
           "map_point_label", "CriticalMapArtists", "VariantMapArtists", "MapShapeArtists"]
