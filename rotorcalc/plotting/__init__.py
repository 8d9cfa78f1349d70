"""Pictures of rotors and their results.

Every function draws on the axes it is given (``ax=``) or on a new figure
when none is given, and returns what it drew: a frozen record derived from
:class:`._artists.Artists`.  Plotting never computes an analysis: it draws
result objects made by :mod:`rotorcalc.analysis`.  Matplotlib is imported here
without choosing a backend; the command line selects a non-interactive one.

One module per picture: ``speedmap`` (whirl-speed map), ``shapes`` (mode
shape), ``layout`` (rotor layout), ``bodeplot``, ``polarplot``, ``orbitplot``
(unbalance response), ``stiffmap`` (critical-speed map), ``overlay`` (variants'
maps), ``mapshapes`` (mode shapes at map points).  Shared helpers start with an
underscore: ``_style`` and ``_labels`` (the look, label placing), ``_units``,
``_orbit``, ``_phase``, ``_probes``, ``_panels``, ``_artists``.
"""

from .bodeplot import BodeArtists, bode
from .layout import LayoutArtists, rotor_layout
from .mapshapes import MapShapeArtists, map_point_label, map_shapes
from .orbitplot import OrbitArtists, orbits
from .output import save
from .overlay import VariantMapArtists, variant_maps
from .polarplot import PolarArtists, polar
from .shapes import ModeShapeArtists, mode_shape
from .speedmap import SpeedMapArtists, whirl_speed_map
from .stiffmap import CriticalMapArtists, critical_speed_map

__all__ = ["whirl_speed_map", "mode_shape", "rotor_layout", "bode", "polar", "orbits", "save",
           "SpeedMapArtists", "ModeShapeArtists", "LayoutArtists", "BodeArtists",
           "PolarArtists", "OrbitArtists", "critical_speed_map", "variant_maps", "map_shapes",
           "map_point_label", "CriticalMapArtists", "VariantMapArtists", "MapShapeArtists"]
