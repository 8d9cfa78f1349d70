"""Film geometries: the shape of the gap between journal and bore, one land at a time.

Every geometry the film solver reads offers the same small interface:

``diameter``, ``length`` (m)
    journal diameter and axial length of the lands.
``lands``
    a tuple of :class:`Land` (or any object with ``start``, ``end`` and
    ``thickness(theta, x, y)``): the circumferential arcs that carry film.
    Between two lands lies a groove (or a gap) held at ``feed_pressure``.
``closed``
    True for a single land that runs all round without a groove (the film is
    periodic in the angle).
``feed_pressure`` (Pa, gauge)
    the pressure in the grooves, imposed at the lands' edges.
``clearance`` (m)
    the reference radial clearance: the smallest film with the journal centred
    (the assembled clearance ``C_b`` of a lobed bore); eccentricity ratio and
    Sommerfeld number are measured with it.

Angles (rad) are measured from +x towards +y, y vertical up; the journal centre
sits at ``(x, y)`` from the bearing centre.  A land whose bore arc has radius
``R + C_p`` and centre ``(ox, oy)`` has the film thickness (small clearance)::

    h(theta) = C_p - (x - ox) cos(theta) - (y - oy) sin(theta)

A lobe's preload is ``m = d / C_p`` with ``d`` the distance of its arc's centre
from the bearing centre: the usual ``m = 1 - C_b / C_p`` when the lobe comes
closest to the centred journal on its own arc.  Builders :func:`plain_bore`,
:func:`elliptical_bore` and :func:`offset_halves_bore` make the common shapes.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from ..errors import InputError

TWO_PI = 2.0 * math.pi
#: Largest clearance-to-radius ratio accepted: Reynolds' thin-film equation needs c << R.
MAX_CLEARANCE_RATIO = 0.05


def _finite(key, value):
    if isinstance(value, bool) or not isinstance(value, (int, float, np.floating, np.integer)):
        raise InputError(key, "must be a number", value=value, expected="a finite number",
                         kind="type")
    if not math.isfinite(value):
        raise InputError(key, "is not a finite number", value=value, kind="not-finite")
    return float(value)


def _positive(key, value, *, allow_zero=False):
    value = _finite(key, value)
    if value < 0.0 or (value == 0.0 and not allow_zero):
        what = "zero or positive" if allow_zero else "positive"
        raise InputError(key, f"must be {what}", value=value, expected=f"a {what} number",
                         kind="range")
    return value


@dataclass(frozen=True)
class Land:
    """One circumferential arc of film.

    Parameters
    ----------
    start, end : float
        Angular extent (rad, ``start < end <= start + 2 pi``).
    clearance : float
        Machined radial clearance of the arc, ``C_p`` (m): bore-arc radius minus
        journal radius.
    centre : tuple of float
        ``(ox, oy)`` (m): the arc's centre of curvature from the bearing centre.
    key : str
        Key path used in error messages.
    """

    start: float
    end: float
    clearance: float
    centre: tuple = (0.0, 0.0)
    key: str = "land"

    def __post_init__(self):
        start = _finite(f"{self.key}.start", self.start)
        end = _finite(f"{self.key}.end", self.end)
        if not end > start:
            raise InputError(f"{self.key}.end", "must lie after the start", value=end,
                             expected=f"an angle above {start:.6g} rad", kind="order")
        if end - start > TWO_PI * (1.0 + 1e-12):
            raise InputError(f"{self.key}.end", "makes the arc longer than a full turn",
                             value=end, expected="end - start <= 2 pi", kind="range")
        clearance = _positive(f"{self.key}.clearance", self.clearance)
        if len(tuple(self.centre)) != 2:
            raise InputError(f"{self.key}.centre", "must hold two coordinates",
                             value=self.centre, expected="(ox, oy) in m", kind="length")
        centre = tuple(_finite(f"{self.key}.centre[{i}]", v) for i, v in enumerate(self.centre))
        if math.hypot(*centre) >= clearance:
            raise InputError(f"{self.key}.centre", "is as far from the bearing centre as the "
                             "clearance: the centred journal would touch the arc",
                             value=centre, expected="an offset below the clearance",
                             kind="physics")
        for name, value in (("start", start), ("end", end), ("clearance", clearance),
                            ("centre", centre)):
            object.__setattr__(self, name, value)

    def thickness(self, theta, x, y):
        """Film thickness (m) at angles ``theta`` with the journal centre at ``(x, y)``."""
        theta = np.asarray(theta, dtype=float)
        ox, oy = self.centre
        return self.clearance - (x - ox) * np.cos(theta) - (y - oy) * np.sin(theta)

    def thickness_rate(self, theta, vx, vy):
        """Rate of the film thickness (m/s) for a journal centre moving at ``(vx, vy)``."""
        theta = np.asarray(theta, dtype=float)
        return -(vx * np.cos(theta) + vy * np.sin(theta))

    def closest(self, x=0.0, y=0.0):
        """Smallest film thickness on the arc (m) and its angle, exact."""
        dx, dy = x - self.centre[0], y - self.centre[1]
        beta = math.atan2(dy, dx)
        # the thickness C - r cos(theta - beta) is least at beta, or at the nearer arc end
        candidates = [self.start, self.end]
        turns = math.ceil((self.start - beta) / TWO_PI)
        if beta + turns * TWO_PI <= self.end:
            candidates.append(beta + turns * TWO_PI)
        ox, oy = self.centre
        values = [self.clearance - (x - ox) * math.cos(t) - (y - oy) * math.sin(t)
                  for t in candidates]           # thickness() at each, in floats
        i = values.index(min(values))
        return values[i], candidates[i]


def _check_size(key, diameter, length):
    return _positive(f"{key}.diameter", diameter), _positive(f"{key}.length", length)


def _check_lands(key, lands, diameter):
    """Lands in angular order, none overlapping the next, clearances thin against R.

    ``key`` is the path of the collection (``film_bearing.lobes``)."""
    if not lands:
        raise InputError(key, "has no land", expected="at least one arc of film",
                         kind="missing")
    starts = [land.start % TWO_PI for land in lands]
    order = sorted(range(len(lands)), key=starts.__getitem__)
    for k, a in enumerate(order if len(lands) > 1 else ()):
        b = order[(k + 1) % len(order)]
        end_a = starts[a] + (lands[a].end - lands[a].start)
        next_start = starts[b] + (TWO_PI if k == len(order) - 1 else 0.0)
        if end_a > next_start + 1e-9:
            raise InputError(f"{key}[{b}]", "overlaps another land",
                             value=(lands[b].start, lands[b].end),
                             expected="arcs that do not overlap", kind="conflict")
    for i, land in enumerate(lands):
        if land.clearance > MAX_CLEARANCE_RATIO * diameter / 2.0:
            raise InputError(f"{key}[{i}].clearance", "is too large against the radius "
                             "for a thin film", value=land.clearance,
                             expected=f"at most {MAX_CLEARANCE_RATIO} x the radius",
                             kind="physics")


class _Bore:
    """What every fixed geometry shares: the thickness over all lands and the clearance."""

    @property
    def arcs(self):
        """Angular extents ``(start, end)`` (rad) of the lands, grooves between them."""
        return tuple((land.start, land.end) for land in self.lands)

    @property
    def clearance(self):
        """Reference radial clearance (m): the smallest film with the journal centred."""
        return min(land.closest()[0] for land in self.lands)

    def thickness(self, theta, x, y):
        """Film thickness (m) at ``theta`` (rad); NaN where ``theta`` falls in a groove."""
        theta = np.asarray(theta, dtype=float)
        out = np.full(theta.shape, np.nan)
        for land in self.lands:
            at = (theta - land.start) % TWO_PI <= (land.end - land.start) + 1e-12
            out = np.where(at & np.isnan(out), land.thickness(theta, x, y), out)
        return out


@dataclass(frozen=True)
class Groove:
    """An axial feed groove: its centre angle and angular width (rad)."""

    position: float
    width: float
    key: str = "groove"

    def __post_init__(self):
        object.__setattr__(self, "position", _finite(f"{self.key}.position", self.position))
        width = _positive(f"{self.key}.width", self.width)
        if width >= TWO_PI:
            raise InputError(f"{self.key}.width", "leaves no land", value=width,
                             expected="less than a full turn", kind="range")
        object.__setattr__(self, "width", width)


def _groove(key, value):
    if isinstance(value, Groove):
        return value
    try:
        position, width = value
    except (TypeError, ValueError):
        raise InputError(key, "must be a groove or a (position, width) pair", value=value,
                         expected="(position, width) in rad", kind="length") from None
    return Groove(position, width, key=key)


@dataclass(frozen=True)
class PlainBore(_Bore):
    """A plain cylindrical bore: one 360-degree land, or lands between axial grooves.

    Parameters
    ----------
    diameter, length : float
        Journal diameter and land length (m).
    radial_clearance : float
        Bore radius minus journal radius (m).
    grooves : tuple of Groove
        Axial feed grooves; none gives one land that runs all round.
    feed_pressure : float
        Groove pressure (Pa, gauge); only with grooves.
    """

    diameter: float
    length: float
    radial_clearance: float
    grooves: tuple = ()
    feed_pressure: float = 0.0
    key: str = "film_bearing"
    _lands: tuple = field(init=False, repr=False, compare=False, default=())

    def __post_init__(self):
        d, length = _check_size(self.key, self.diameter, self.length)
        object.__setattr__(self, "diameter", d)
        object.__setattr__(self, "length", length)
        c = _positive(f"{self.key}.radial_clearance", self.radial_clearance)
        object.__setattr__(self, "radial_clearance", c)
        grooves = tuple(_groove(f"{self.key}.grooves[{i}]", g)
                        for i, g in enumerate(self.grooves))
        object.__setattr__(self, "grooves", grooves)
        p = _positive(f"{self.key}.feed_pressure", self.feed_pressure, allow_zero=True)
        if p and not grooves:
            raise InputError(f"{self.key}.feed_pressure", "needs a groove to act through",
                             value=p, expected="grooves, or no feed pressure", kind="conflict")
        object.__setattr__(self, "feed_pressure", p)
        object.__setattr__(self, "_lands", self._make_lands())
        _check_lands(f"{self.key}.lands", self._lands, d)

    @property
    def closed(self):
        """True when one land runs all round (no groove)."""
        return not self.grooves

    @property
    def lands(self):
        """The lands between the grooves, in angular order."""
        return self._lands

    def _make_lands(self):
        c = self.radial_clearance
        if not self.grooves:
            return (Land(0.0, TWO_PI, c, key=f"{self.key}.lands[0]"),)
        ordered = sorted(self.grooves, key=lambda g: g.position % TWO_PI)
        lands = []
        for i, g in enumerate(ordered):
            nxt = ordered[(i + 1) % len(ordered)]
            start = g.position % TWO_PI + g.width / 2.0
            gap = (nxt.position - g.position) % TWO_PI if len(ordered) > 1 else TWO_PI
            end = start + gap - g.width / 2.0 - nxt.width / 2.0
            if end <= start:
                raise InputError(f"{self.key}.grooves", "overlap or leave no land between "
                                 "them", value=[(h.position, h.width) for h in ordered],
                                 expected="grooves apart by more than their half widths",
                                 kind="conflict")
            lands.append(Land(start, end, c, key=f"{self.key}.lands[{i}]"))
        return tuple(lands)


@dataclass(frozen=True)
class LobedBore(_Bore):
    """A bore made of lobes (lands with their own clearance and centre), grooves between.

    Parameters
    ----------
    diameter, length : float
        Journal diameter and land length (m).
    lobes : tuple of Land
        The lobes; :func:`lobe` builds one from its preload.
    feed_pressure : float
        Pressure between the lobes (Pa, gauge).
    """

    diameter: float
    length: float
    lobes: tuple
    feed_pressure: float = 0.0
    key: str = "film_bearing"

    def __post_init__(self):
        d, length = _check_size(self.key, self.diameter, self.length)
        object.__setattr__(self, "diameter", d)
        object.__setattr__(self, "length", length)
        if isinstance(self.lobes, Land) or any(not isinstance(b, Land) for b in self.lobes):
            raise InputError(f"{self.key}.lobes", "must be lands", value=self.lobes,
                             expected="a tuple of Land (see lobe())", kind="type")
        object.__setattr__(self, "lobes", tuple(self.lobes))
        p = _positive(f"{self.key}.feed_pressure", self.feed_pressure, allow_zero=True)
        object.__setattr__(self, "feed_pressure", p)
        _check_lands(f"{self.key}.lobes", self.lobes, d)

    @property
    def closed(self):
        """Always False: each lobe ends at a groove."""
        return False

    @property
    def lands(self):
        return self.lobes


def lobe(start, end, clearance, preload, closest_at=None, key="lobe"):
    """A lobe from its arc, machined clearance and preload.

    Parameters
    ----------
    start, end : float
        Arc (rad).
    clearance : float
        Machined clearance ``C_p`` (m).
    preload : float
        ``m = d / C_p`` in [0, 1): the arc's centre lies ``d`` from the bearing
        centre, opposite the angle ``closest_at``.
    closest_at : float, optional
        Angle (rad) where the lobe comes closest to the centred journal; the
        middle of the arc by default.

    Returns
    -------
    Land
    """
    m = _positive(f"{key}.preload", preload, allow_zero=True)
    if m >= 1.0:
        raise InputError(f"{key}.preload", "must be below 1", value=m,
                         expected="0 <= preload < 1", kind="range")
    if closest_at is None:
        closest_at = 0.5 * (_finite(f"{key}.start", start) + _finite(f"{key}.end", end))
    a = _finite(f"{key}.closest_at", closest_at)
    d = m * _positive(f"{key}.clearance", clearance)
    return Land(start, end, clearance, (-d * math.cos(a), -d * math.sin(a)), key=key)


def plain_bore(diameter, length, radial_clearance, grooves=(), feed_pressure=0.0,
               key="film_bearing"):
    """A :class:`PlainBore`; ``grooves`` as ``(position, width)`` pairs (rad)."""
    return PlainBore(diameter, length, radial_clearance, tuple(grooves), feed_pressure,
                     key=key)


def _two_halves(diameter, length, clearance, preload, groove_width, feed_pressure, closest,
                key="film_bearing"):
    g = _positive(f"{key}.groove_width", groove_width)
    if g >= math.pi:
        raise InputError(f"{key}.groove_width", "leaves no lobe", value=g,
                         expected="less than pi", kind="range")
    arcs = ((g / 2.0, math.pi - g / 2.0), (math.pi + g / 2.0, TWO_PI - g / 2.0))
    lobes = tuple(lobe(a, b, clearance, preload, closest_at=t, key=f"{key}.lobes[{i}]")
                  for i, ((a, b), t) in enumerate(zip(arcs, closest)))
    return LobedBore(diameter, length, lobes, feed_pressure, key=key)


def elliptical_bore(diameter, length, clearance, preload, groove_width=math.radians(20.0),
                    feed_pressure=0.0, key="film_bearing"):
    """Two-lobe ("elliptical") bore: lobes above and below grooves at 0 and 180 degrees.

    Each lobe's centre is moved towards the other lobe by ``preload x clearance``:
    the vertical clearance is ``C_b = (1 - m) C_p``, the horizontal one ``C_p``.
    """
    return _two_halves(diameter, length, clearance, preload, groove_width, feed_pressure,
                       (math.pi / 2.0, 1.5 * math.pi), key)


def offset_halves_bore(diameter, length, clearance, preload, groove_width=math.radians(20.0),
                       feed_pressure=0.0, key="film_bearing"):
    """Offset-halves bore: upper and lower halves shifted horizontally apart.

    The halves are split at 0 and 180 degrees; each half's centre is shifted by
    ``preload x clearance`` so that its film closes towards the split line it
    meets last when the journal turns at positive speed (from +x towards +y).
    Run it at negative speed to model the machine turning backwards.
    """
    return _two_halves(diameter, length, clearance, preload, groove_width, feed_pressure,
                       (math.pi, TWO_PI), key)
