"""The stiffness study behind ``stiffness-map``: the critical-speed map over a chosen range,
the stiffness its factor 1 stands for, the span of a stiffness window drawn on it, and mode
shapes at chosen map points with the share of motion at the bearings.

Everything the command prints or writes is computed here; the command only parses its
options and prints (:mod:`rotorcalc.cli.stiffness_map`).
"""

from __future__ import annotations

import dataclasses
import math
from dataclasses import dataclass

import numpy as np

from ..assembly import assemble
from ..errors import InputError
from ..units import to_rpm
from ..vocabulary import Whirl, old_keywords
from .csmap import CURVE_POINTS, CriticalSpeedMap, bearing_curves, critical_speed_map, \
    map_mode_shape
from .margins import CAUTION
from .sweep import default_speeds
from .whatif import factor_count

#: Map values by default, and decades either side of the bearings' mean stiffness.
DEFAULT_COUNT = 41
DEFAULT_DECADES = 2.0


def target_bearings(rotor, target=None):
    """The bearings a target names: every bearing (seals only when there is nothing else),
    ``"bearing[i]"`` or ``"bearing.NAME"`` (:func:`rotorcalc.cli.whatif_common.bearing_target`
    makes these from the command line)."""
    if target is None:
        return [b for b in rotor.bearings if b.role != "seal"] or list(rotor.bearings)
    if target.startswith("bearing["):
        return [rotor.bearings[int(target[8:-1])]]
    return [b for b in rotor.bearings if b.name == target[len("bearing."):]]


def reference_stiffness(rotor, target=None):
    """Geometric mean of the direct stiffness (kxx, kyy) of the target bearings at the maximum
    continuous speed, N/m: the map stiffness that a window factor of 1 stands for (None when
    no target bearing has a positive direct stiffness)."""
    at = rotor.operating.max_speed
    values = []
    for b in target_bearings(rotor, target):
        k = b.matrices(at)[0]
        values += [k[0, 0], k[1, 1]]
    values = [v for v in values if v > 0]
    return float(np.exp(np.mean(np.log(values)))) if values else None


def curve_speeds(rotor, top=None):
    """Speeds (rad/s) of the bearing curves: the analysis sweep's, or from where the sweep
    starts (at most half of ``top``) up to ``top``."""
    sweep_speeds = default_speeds(rotor)
    if top is None:
        return np.linspace(sweep_speeds[0], sweep_speeds[-1], CURVE_POINTS)
    first = float(sweep_speeds[0])       # where the sweep starts (a table's first speed)
    return np.linspace(min(first, 0.5 * top), top, CURVE_POINTS)


def default_stiffness(rotor, count=DEFAULT_COUNT, speeds=None):
    """``count`` stiffness values log-spaced :data:`DEFAULT_DECADES` either side of the
    bearings' mean direct stiffness over ``speeds`` (1e8 N/m without bearings)."""
    curves = bearing_curves(rotor, curve_speeds(rotor) if speeds is None else speeds)
    mean = (np.exp(np.mean([np.log(np.maximum(c.stiffness, 1.0)) for c in curves]))
            if curves else 1e8)
    return np.logspace(np.log10(mean) - DEFAULT_DECADES, np.log10(mean) + DEFAULT_DECADES,
                       count)


def held_notes(rotor, crossings):
    """Crossings that lie outside a bearing's coefficient table (its end value held)."""
    notes = []
    by_name = {b.name or f"B{i + 1}": b for i, b in enumerate(rotor.bearings)}
    for name in dict.fromkeys(c.bearing for c in crossings):
        b = by_name.get(name)
        outside = [c for c in crossings if c.bearing == name and b is not None
                   and b.outside_table(c.speed)]
        if outside:
            notes.append(f"{name}: the crossing{'s' if len(outside) > 1 else ''} at "
                         + ", ".join(f"{to_rpm(c.speed):.0f}" for c in outside)
                         + f" rpm lie{'' if len(outside) > 1 else 's'} outside its table "
                           f"({to_rpm(b.speeds[0]):.0f}-{to_rpm(b.speeds[-1]):.0f} rpm): "
                           "the end value is held there")
    return tuple(notes)


@dataclass(frozen=True)
class MapShape:
    """The shape of map curve ``mode`` (from 1) at one support stiffness."""

    stiffness: float
    mode: int
    speed: float
    bearing_share: float   # largest amplitude at a bearing / largest anywhere
    shape: np.ndarray      # complex (n_nodes, 2)

    def to_dict(self):
        return {"stiffness_n_m": self.stiffness, "mode": self.mode,
                "speed_rpm": float(to_rpm(self.speed)),
                "bearing_motion_share": self.bearing_share,
                "x": {"real": self.shape[:, 0].real.tolist(),
                      "imag": self.shape[:, 0].imag.tolist()},
                "y": {"real": self.shape[:, 1].real.tolist(),
                      "imag": self.shape[:, 1].imag.tolist()}}


#: What the map's tables and notes say (the command prints these).
ENDS_CAPTION = ("Soft end: the rotor moves almost as a rigid body on the supports; stiff end: "
                "the shaft bends between nearly pinned bearings. Seals keep their own direct "
                "stiffness; supports stay in series.")
CROSSINGS_CAPTION = "Margins are undamped and not judged here; 'criticals' judges the damped ones."
SHAPES_CAPTION = ("Largest bearing motion: the largest amplitude at a bearing, share of the "
                  "largest anywhere (near 100 %: a rigid-body mode on soft supports; near 0: "
                  "bending between nearly fixed bearings).")


@dataclass(frozen=True)
class StiffnessStudy:
    """A critical-speed map with what is read from it (see the module's docstring)."""

    map: CriticalSpeedMap
    rotor: object
    target: str | None
    reference_stiffness: float | None
    shapes: tuple = ()
    notes: tuple = ()
    window: object = None     # a StiffnessWindow once :meth:`with_window` gave one

    @property
    def top_curve_speed(self):
        """The top of the bearing curves, rad/s (None without bearings)."""
        return max(float(c.speeds[-1]) for c in self.map.curves) if self.map.curves else None

    def window_span(self):
        """(low, high, count): the stiffness-factor range the map covers, around the
        reference stiffness, with :func:`~rotorcalc.analysis.whatif.factor_count` factors."""
        if self.reference_stiffness is None:
            raise InputError("--window", "needs a bearing with direct stiffness",
                             value=self.target, kind="missing")
        low = float(self.map.stiffness[0]) / self.reference_stiffness
        high = float(self.map.stiffness[-1]) / self.reference_stiffness
        return low, high, factor_count(low, high)

    def with_window(self, window):
        return dataclasses.replace(self, window=window)

    def reference_text(self, target_text=None):
        """What factor 1 of the window stands for, in words."""
        whose = ("the bearings' (seals left out)" if self.target is None
                 else f"{target_text or self.target}'s")
        return (f"On the map, factor 1 stands for {self.reference_stiffness:.3e} N/m: the "
                f"geometric mean of {whose} kxx and kyy at "
                f"{to_rpm(self.rotor.operating.max_speed):.0f} rpm. The window scales the "
                "bearings' own coefficients (seals kept as they are), so its band on the map "
                "is a guide, not a map result.")

    def to_dict(self):
        op = self.rotor.operating
        out = self.map.to_dict()
        out["operating_range_rpm"] = [float(to_rpm(op.min_speed)), float(to_rpm(op.max_speed))]
        out["notes"] = list(self.notes)
        if self.window is not None:
            out["window"] = dict(self.window.to_dict(),
                                 reference_stiffness_n_m=self.reference_stiffness)
        if self.shapes:
            out["node_z_m"] = [float(z) for z in self.map.node_z]
            out["shapes"] = [s.to_dict() for s in self.shapes]
        out["caution"] = CAUTION
        return out

    def plot(self, *, ax=None):
        """The critical-speed map picture (:func:`rotorcalc.plotting.plot_critical_speed_map`)."""
        from ..plotting import plot_critical_speed_map as draw
        return draw(self.map, operating=self.rotor.operating, window=self.window,
                    base_stiffness=self.reference_stiffness, ax=ax)

    def plot_shapes(self, *, ax=None):
        """The map mode shapes (:func:`rotorcalc.plotting.plot_map_shapes`)."""
        from ..plotting import map_point_label, plot_map_shapes
        return plot_map_shapes(self.map.node_z, [s.shape for s in self.shapes],
                          [map_point_label(s.stiffness, s.mode - 1, s.speed)
                           for s in self.shapes],
                          ax=ax, station_nodes=self.map.station_nodes)


def _map_shapes(rotor, system, station_nodes, points, whirl):
    bearing_nodes = [station_nodes[b.station] for b in rotor.bearings if b.role != "seal"]
    out = []
    for k, mode in points:
        speed, shape = map_mode_shape(system, k, mode - 1, whirl)
        if not math.isfinite(speed):
            raise InputError("--shapes-at", f"map mode {mode} does not exist at {k:.3e} N/m",
                             value=f"{k:.3e} N/m:{mode}", kind="range")
        amplitude = np.max(np.abs(shape), axis=1)
        share = float(max(amplitude[bearing_nodes]) / max(amplitude)) if bearing_nodes else 0.0
        out.append(MapShape(float(k), int(mode), float(speed), share, shape))
    return tuple(out)


@old_keywords(n_modes="mode_count")
def stiffness_study(rotor, stiffness_from=None, stiffness_to=None, stiffness_count=None, *,
                    mode_count=4, whirl=Whirl.FORWARD, curve_speed_to=None, target=None,
                    shapes_at=()):
    """The critical-speed map with its reference stiffness, notes and map mode shapes.

    Parameters
    ----------
    stiffness_from, stiffness_to : float, optional
        The map's support stiffness range, N/m (both or neither); by default
        :func:`default_stiffness`.
    stiffness_count : int, optional
        Log-spaced values over the range (default :data:`DEFAULT_COUNT`).
    mode_count : int
        Number of map curves.
    curve_speed_to : float, optional
        Top speed of the bearing curves, rad/s (default: the analysis sweep's top).
    target : str, optional
        The bearing(s) the reference stiffness is of (``"bearing[i]"``, ``"bearing.NAME"``;
        default every bearing).
    shapes_at : sequence of (stiffness N/m, map mode from 1)
    """
    count = DEFAULT_COUNT if stiffness_count is None else stiffness_count
    if (stiffness_from is None) != (stiffness_to is None):
        raise InputError("--stiffness-from" if stiffness_from is None else "--stiffness-to",
                         "is needed with the other end of the range",
                         expected='both, e.g. --stiffness-from "1e7 N/m" --stiffness-to '
                                  '"1e10 N/m"', kind="missing")
    if stiffness_from is None:
        stiffness = default_stiffness(rotor, count)
    elif not 0 < stiffness_from < stiffness_to:
        raise InputError("--stiffness-from", "must be positive and below --stiffness-to",
                         value=f"{stiffness_from:.6g} .. {stiffness_to:.6g} N/m", kind="range")
    else:
        stiffness = np.geomspace(stiffness_from, stiffness_to, count)
    system = assemble(rotor)
    cmap = critical_speed_map(system, stiffness=stiffness, mode_count=mode_count, whirl=whirl,
                              speeds=curve_speeds(rotor, curve_speed_to))
    shapes = _map_shapes(rotor, system, cmap.station_nodes, shapes_at, whirl)
    return StiffnessStudy(cmap, rotor, target, reference_stiffness(rotor, target), shapes,
                          held_notes(rotor, cmap.crossings))
