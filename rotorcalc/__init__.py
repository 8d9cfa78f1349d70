"""rotorcalc: lateral rotor-dynamics screening of rotating machinery.

One import gives the whole job (the example runs as a test from the
repository's root; the numbers are the bundled feed pump's)::

    >>> import rotorcalc as rc
    >>> rotor = rc.read_rotor("cases/feed_pump.toml")
    >>> result = rc.screen(rotor)
    >>> result.verdict
    'pass'
    >>> forward = [r for r in result.margins.rows if r.critical.whirl == "forward"][0]
    >>> round(rc.to_rpm(forward.critical.speed))
    5333
    >>> forward.verdict, round(forward.margin, 1)
    ('pass', 48.1)

Screening only: confirm results against the applicable standard, the purchase
specification, local codes and a licensed engineer's review.

The analyses run with one BLAS thread per process (the user's own
``OPENBLAS_NUM_THREADS`` wins), as the command line does.  The pictures
(``rc.plot_whirl_speed_map``, ``rc.plot_bode``, ...) load matplotlib on first use.
"""

__version__ = "0.2.0"

from .analysis import (CoverageGap, CriticalSpeed, MarginRow, MarginTable, Modes, Screening,  # noqa: E402
                       Stability, Sweep, critical_speeds, modes_at, required_margin, screen,
                       separation_margins, stability, sweep)
from .analysis.response import Response, unbalance_response  # noqa: E402
from .analysis.stiffness_study import StiffnessStudy, stiffness_study  # noqa: E402
from .assembly import assemble  # noqa: E402
from .errors import InputError, RotorcalcError, SolverError  # noqa: E402
from .model import (Bearing, Disk, MarginRule, Material, OperatingRange, Rotor, Section,  # noqa: E402
                    Settings, StabilityRule, Support)
from .reader import parse_rotor, read_rotor  # noqa: E402
from .units import to_hz, to_rpm  # noqa: E402

#: Pictures, loaded with matplotlib on first use (the analyses never need it).
_PICTURES = ("plot_whirl_speed_map", "plot_mode_shape", "plot_rotor_layout", "plot_bode",
             "plot_polar", "plot_orbits", "plot_critical_speed_map", "plot_variant_maps",
             "plot_map_shapes", "plot_coupling_screen", "save")
#: The 0.1 names of the pictures, read until 0.3 (with a note naming the new one).
_OLD_PICTURES = ("whirl_speed_map", "mode_shape", "rotor_layout", "bode", "polar", "orbits",
                 "critical_speed_map", "variant_maps", "map_shapes")

__all__ = ["read_rotor", "parse_rotor", "assemble", "modes_at", "sweep", "critical_speeds",
           "stability", "screen", "separation_margins", "required_margin",
           "unbalance_response", "Modes", "Sweep", "CriticalSpeed", "MarginRow", "MarginTable",
           "Screening", "Stability", "CoverageGap", "Response", "Rotor", "Section", "Disk",
           "Bearing", "Support", "Material", "OperatingRange", "Settings", "MarginRule",
           "StabilityRule", "stiffness_study", "StiffnessStudy", "InputError", "SolverError", "RotorcalcError", "to_rpm", "to_hz",
           *_PICTURES]


def __getattr__(name):
    if name in _PICTURES or name in _OLD_PICTURES:
        from . import plotting
        return getattr(plotting, name)
    raise AttributeError(f"module 'rotorcalc' has no attribute {name!r}")
