"""Pictures of rotors and their results.

Every function draws on the axes it is given (``ax=``) or on a new figure
when none is given, and returns what it drew: a frozen record derived from
:class:`._artists.Artists`.  Plotting never computes an analysis: it draws
result objects made by :mod:`rotorcalc.analysis`.  Matplotlib is imported here
without choosing a backend; the command line selects a non-interactive one.

Keys and notes sit outside the axes (to the right, or below).  On a figure of your own, make
room for them: ``plt.subplots(layout="constrained")`` does, or save with
``bbox_inches="tight"`` (as :func:`save` does); a figure made here leaves the room itself.

One module per picture: ``speedmap`` (whirl-speed map), ``shapes`` (mode
shape), ``layout`` (rotor layout), ``bodeplot``, ``polarplot``, ``orbitplot``
(unbalance response), ``stiffmap`` (critical-speed map), ``overlay`` (variants'
maps), ``mapshapes`` (mode shapes at map points), ``couplingplot`` (the
cross-coupling screen), ``staticplot`` (the rotor at rest), ``bearingplot`` (a bearing's
coefficients against speed), ``clearanceplot`` (the run-up envelope against the
clearances).  Shared helpers start with an underscore: ``_style`` and
``_labels`` (the look, label placing), ``_units``, ``_orbit``, ``_phase``,
``_probes``, ``_panels``, ``_artists``.
"""

from ..vocabulary import renamed
from .bearingplot import BearingCoefficientArtists, plot_bearing_coefficients
from .bodeplot import BodeArtists, plot_bode
from .clearanceplot import ClearanceEnvelopeArtists, plot_clearance_envelope
from .couplingplot import CouplingScreenArtists, plot_coupling_screen
from .layout import LayoutArtists, plot_rotor_layout
from .mapshapes import MapShapeArtists, map_point_label, plot_map_shapes
from .orbitplot import OrbitArtists, plot_orbits
from .output import save
from .overlay import VariantMapArtists, plot_variant_maps
from .polarplot import PolarArtists, plot_polar
from .shapes import ModeShapeArtists, plot_mode_shape
from .speedmap import SpeedMapArtists, plot_whirl_speed_map
from .staticplot import StaticDeflectionArtists, plot_static_deflection
from .stiffmap import CriticalMapArtists, plot_critical_speed_map
from .studyplot import (StudyArtists, plot_study_criticals, plot_study_influence,
                        plot_study_probability)

#: Every picture function, by its name (``plot_`` and what it draws).
PICTURES = ("plot_whirl_speed_map", "plot_mode_shape", "plot_rotor_layout", "plot_bode",
            "plot_polar", "plot_orbits", "plot_critical_speed_map", "plot_variant_maps",
            "plot_map_shapes", "plot_coupling_screen", "plot_static_deflection",
            "plot_bearing_coefficients", "plot_clearance_envelope", "plot_study_criticals",
            "plot_study_probability", "plot_study_influence")
#: The pictures that had 0.1 names without ``plot_`` (read with a note until 0.3).
_RENAMED = PICTURES[:9]

__all__ = [*PICTURES, "save", "map_point_label", "SpeedMapArtists", "ModeShapeArtists",
           "LayoutArtists", "BodeArtists", "PolarArtists", "OrbitArtists", "CriticalMapArtists",
           "VariantMapArtists", "MapShapeArtists", "CouplingScreenArtists",
           "StaticDeflectionArtists", "BearingCoefficientArtists", "ClearanceEnvelopeArtists",
           "StudyArtists"]


def _old_mode_shape(modes, index, **kwargs):
    """The 0.1 mode shape: ``index`` counted from 0."""
    return plot_mode_shape(modes, index % len(modes.eigenvalues) + 1, **kwargs)


def __getattr__(name):
    """The 0.1 names of the pictures (``bode``, ``mode_shape``, ...) until 0.3: the analyses
    have functions of the same names (``critical_speed_map``), so pictures now start with
    ``plot_``."""
    if f"plot_{name}" in _RENAMED:
        new = globals()[f"plot_{name}"]
        renamed(f"rotorcalc.plotting.{name}", f"rotorcalc.plotting.plot_{name}")
        return _old_mode_shape if name == "mode_shape" else new
    raise AttributeError(f"module 'rotorcalc.plotting' has no attribute {name!r}")
