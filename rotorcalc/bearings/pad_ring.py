"""The pads of a tilting-pad journal bearing: their layout (count, arc, pivots, clearances,
preload) and each pad's film geometry, a land turned by its tilt and lifted at its pivot.

The film thickness and the conventions are derived in :mod:`rotorcalc.bearings.tilting_pad`,
which solves the pads; docs/bearings.md, section 12.  Screening only: confirm tilting-pad
coefficients against the bearing maker's analysis, the applicable standard, the purchase
specification, local codes and a licensed engineer's review.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ..errors import InputError
from .film import number, whole
from .geometry import MAX_CLEARANCE_RATIO, TWO_PI, Land, _positive


@dataclass(frozen=True)
class _PadArc:
    """A land whose centre of curvature may move (at ``centre_rate``); no centre check."""

    start: float
    end: float
    clearance: float
    centre: tuple
    centre_rate: tuple = (0.0, 0.0)
    thickness = Land.thickness
    closest = Land.closest

    def thickness_rate(self, theta, vx, vy):
        theta = np.asarray(theta, dtype=float)
        return -((vx - self.centre_rate[0]) * np.cos(theta)
                 + (vy - self.centre_rate[1]) * np.sin(theta))


@dataclass(frozen=True)
class PadFilm:
    """One pad as a film geometry for :func:`solve_film` (one open land, zero feed)."""

    diameter: float
    length: float
    lands: tuple
    feed_pressure: float = 0.0
    closed: bool = False


def first_pivot_angle(count, load_angle=-math.pi / 2.0, between=False):
    """Angle (rad) of pad 0's pivot that puts a load of direction ``load_angle`` on a pivot
    (load on pad), or midway between two (``between=True``, load between pads)."""
    return load_angle + (math.pi / count if between else 0.0)


@dataclass(frozen=True)
class PadRing:
    """The pads of a tilting-pad journal bearing (layout and film: the module's notes).

    Parameters
    ----------
    diameter, length : float
        Journal diameter and pad length (m).
    count : int
        Number of pads (3 to 16: two pads with rigid pivots pass force along one line only).
    arc : float
        Angle of one pad (rad); the pads must leave gaps, ``count arc < 2 pi``.
    clearance : float
        Pad machined clearance ``C_p`` (m).
    preload, bearing_clearance : float, optional
        ``m = 1 - C_b / C_p`` (0 to below 1) or ``C_b`` (m), not both (neither: ``m = 0``);
        both are set after validation.
    pivot_offset : float
        Share of the arc from the leading edge to the pivot (between 0 and 1; 0.5 central).
    first_pivot : float
        Angle of pad 0's pivot (rad); see :func:`first_pivot_angle`.
    pivot_stiffness : float, optional
        Radial pivot stiffness (N/m); None or infinity: rigid pivots.
    pad_mass, pad_inertia : float
        Pad mass (kg; acts with yielding pivots only) and its inertia about the pivot in the
        tilt (kg m^2); zero by default.
    pad_thickness : float
        Pad thickness from its surface to its pivot (m): the tilt's lever is ``R + t``.
    """

    diameter: float
    length: float
    count: int
    arc: float
    clearance: float
    preload: float | None = None
    bearing_clearance: float | None = None
    pivot_offset: float = 0.5
    first_pivot: float = -math.pi / 2.0
    pivot_stiffness: float | None = None
    pad_mass: float = 0.0
    pad_inertia: float = 0.0
    pad_thickness: float = 0.0
    key: str = "pads"

    def __post_init__(self):
        k, put = self.key, lambda name, value: object.__setattr__(self, name, value)
        for name in ("diameter", "length", "clearance", "arc"):
            put(name, _positive(f"{k}.{name}", getattr(self, name)))
        put("count", whole(f"{k}.count", self.count, 3, 16))
        if self.count * self.arc >= TWO_PI:
            raise InputError(f"{k}.arc", "leaves no gap between the pads", value=self.arc,
                             expected=f"below 2 pi / count = {TWO_PI / self.count:.6g} rad",
                             kind="physics")
        if self.clearance > MAX_CLEARANCE_RATIO * self.diameter / 2.0:
            raise InputError(f"{k}.clearance", "is too large against the radius for a thin "
                             "film", value=self.clearance, kind="physics",
                             expected=f"at most {MAX_CLEARANCE_RATIO} x the radius")
        if self.bearing_clearance is not None:
            if self.preload is not None:
                raise InputError(f"{k}.bearing_clearance", "is given with the preload",
                                 value=self.bearing_clearance, kind="conflict",
                                 expected="the preload or the bearing clearance, not both")
            cb = _positive(f"{k}.bearing_clearance", self.bearing_clearance)
            if cb > self.clearance:
                raise InputError(f"{k}.bearing_clearance", "exceeds the pad clearance",
                                 value=cb, expected=f"at most {self.clearance:.6g} m",
                                 kind="physics")
            put("preload", 1.0 - cb / self.clearance)
        m = _positive(f"{k}.preload", self.preload or 0.0, allow_zero=True)
        if m >= 1.0:
            raise InputError(f"{k}.preload", "must be below 1", value=m,
                             expected="0 <= preload < 1", kind="range")
        put("preload", m)
        put("bearing_clearance", (1.0 - m) * self.clearance)
        put("pivot_offset", number(f"{k}.pivot_offset", self.pivot_offset))
        if not 0.0 < self.pivot_offset < 1.0:
            raise InputError(f"{k}.pivot_offset", "must lie within the pad",
                             value=self.pivot_offset, kind="range",
                             expected="between 0 and 1 (0.5: centre pivot)")
        put("first_pivot", number(f"{k}.first_pivot", self.first_pivot))
        if self.pivot_stiffness is not None and self.pivot_stiffness != math.inf:
            put("pivot_stiffness", _positive(f"{k}.pivot_stiffness", self.pivot_stiffness))
        for name in ("pad_mass", "pad_inertia", "pad_thickness"):
            put(name, _positive(f"{k}.{name}", getattr(self, name), allow_zero=True))

    @property
    def flexible(self):
        """True when the pivots yield radially (a finite ``pivot_stiffness``)."""
        return self.pivot_stiffness is not None and self.pivot_stiffness < math.inf

    @property
    def lever(self):
        """Distance from a pad's pivot to its centre of curvature, ``R + t`` (m)."""
        return 0.5 * self.diameter + self.pad_thickness

    @property
    def pivots(self):
        """Pivot angles (rad), pad 0 first."""
        return self.first_pivot + TWO_PI * np.arange(self.count) / self.count

    @property
    def coordinates(self):
        """Names of the full set's coordinates: journal, tilts, then lifts."""
        pads = range(self.count)
        return ("x", "y") + tuple(f"tilt[{k}]" for k in pads) + \
            (tuple(f"lift[{k}]" for k in pads) if self.flexible else ())

    def pad(self, k, tilt=0.0, lift=0.0, tilt_rate=0.0, lift_rate=0.0):
        """Pad ``k`` turned by ``tilt`` (rad), lifted by ``lift`` (m): a :class:`PadFilm`."""
        th = self.first_pivot + TWO_PI * k / self.count      # as pivots[k], in floats
        cos, sin = math.cos(th), math.sin(th)
        radial, turn = lift - self.preload * self.clearance, self.lever * tilt
        centre = (radial * cos + turn * sin, radial * sin - turn * cos)
        turn_rate = self.lever * tilt_rate
        rate = (lift_rate * cos + turn_rate * sin, lift_rate * sin - turn_rate * cos)
        start = th - self.pivot_offset * self.arc
        land = _PadArc(start, start + self.arc, self.clearance, centre, rate)
        return PadFilm(self.diameter, self.length, (land,))
