"""Tilting-pad journal bearings from their geometry: each pad a land that turns on its pivot.

Layout.  ``count`` equal pads of angular extent ``arc``; pad ``k`` has its pivot at
``theta_k = first_pivot + 2 pi k / count`` and spans ``theta_k - a arc`` to
``theta_k + (1 - a) arc``, ``a`` the pivot offset (0.5 a centre pivot, 0.6 a pivot towards
the trailing edge of a journal turning at positive speed, from +x towards +y; at negative
speed an offset pivot lies towards the leading edge).  A pad's surface has radius
``R + C_p`` and its centre of curvature lies ``m C_p`` from the bearing centre, opposite the
pivot: over the pivot the centred journal sees the bearing clearance ``C_b = (1 - m) C_p``
(preload ``m = 1 - C_b / C_p``).  Between pads the oil is at zero (gauge) pressure.

Film thickness.  Pad ``k`` turns by its tilt ``delta_k`` (rad, positive from +x towards +y)
about its pivot, which lies on the radial line at ``theta_k`` a distance ``lever = R + t``
from the pad's centre of curvature (``t`` the pad's thickness under its surface; ``C_p`` is
dropped against ``R``, as in the thin film itself), and the pivot moves outwards by its lift
``xi_k`` where it yields.  With ``e_k = (cos theta_k, sin theta_k)`` and
``t_k = (-sin theta_k, cos theta_k)`` the turn moves the centre of curvature by
``-lever delta_k t_k`` (first order in ``delta_k``), so the centre sits at
``o_k = (xi_k - m C_p) e_k - lever delta_k t_k`` and the land's film (geometry.py) is::

    h_k = C_p - x cos(theta) - y sin(theta) - (m C_p - xi_k) cos(theta - theta_k)
          - lever delta_k sin(theta - theta_k)
    dh_k/dt = -(x' cos(theta) + y' sin(theta)) + xi_k' cos(theta - theta_k)
              - lever delta_k' sin(theta - theta_k)

A positive tilt leaves the film over the pivot as it is and, at positive speed, closes the
pad's trailing part.  The arc's ends keep their angles (the rigid turn moves them by about
``lever delta_k``, a share of the clearance, against the radius).

Generalised forces (virtual work: a coordinate ``q`` that changes ``h`` receives
``int p dh/dq dA``): the journal receives the film force ``F = sum F_k`` (``F_k`` pad ``k``'s
force on the journal); pad ``k`` the moment about its pivot ``M_k = lever F_k . t_k`` and the
radial force ``-F_k . e_k``, less ``k_p xi_k`` where the pivot has stiffness ``k_p``.

Equilibrium: ``F + W = 0``, ``M_k = 0`` and, with yielding pivots, ``-F_k . e_k = k_p xi_k``.
At every journal position (and lifts) each pad is first settled in tilt, a root of its own
moment (``_Pads.settle``); Newton's method then moves the journal and the lifts, with a
forward-difference Jacobian condensed over the tilts (a pad's film depends on the journal
and on that pad only, so a Jacobian costs three or four film solves a pad), the tilts
following to first order, each step limited to half ``C_b`` and halved until the residual
``|F + W|`` (and the pivots' imbalance) falls, else replaced by a step along the residual
(``_Pads.carry``).  Starts: the journal 30, 60 and 85 % of
``C_b`` along the load, each pad tilted to follow the journal across its pivot line; last,
the load in ten steps.  A pad whose film only ever turns it back towards no film (an
unloaded pad) carries nothing: it is left out of the coefficients, with a note.

Coefficients: ``K = -dQ/dq`` and ``C = -dQ/dq'`` of the generalised forces ``Q`` over all
coordinates, by central differences with the ruptured region held (as fixed_film.py; steps
``d = step h_min`` on the journal and the lifts, ``d / lever`` on the tilts, times ``|speed|``
on the rates), checked by halving; ``M = diag(0, 0, I_p.., m_p..)``.  At whirl ``w``::

    Z(w) = K + i w C - w^2 M,    K_red + i w C_red = Z_jj - Z_jp Z_pp^-1 Z_pj

(synchronous ``w = |speed|`` by default); at ``w = 0`` the limit, ``K_red = K_jj - K_jp
K_pp^-1 K_pj`` and ``C_red = C_jj - C_jp G - H C_pj + H C_pp G`` with ``G = K_pp^-1 K_pj``,
``H = K_jp K_pp^-1``.  A journal moving along ``t_k`` changes ``h_k`` as ``lever delta_k``
does, so without pad inertia a pad passes force only along its pivot line and ``K_red``,
``C_red`` are symmetric (diagonal when layout and load are symmetric about the load line).
The pads' damping still makes them frequency dependent; pad inertia adds a skew part.

Limits: those of the film (docs/bearings.md section 9), rigid pads (no pad or pivot
deformation but the pivot's radial spring), no pivot friction, one effective temperature for
every pad (no hot-oil carry-over from pad to pad), pads flooded.

Screening only: confirm tilting-pad coefficients against the bearing maker's analysis, the
applicable standard, the purchase specification, local codes and a licensed engineer's review.
"""

from __future__ import annotations

import dataclasses
import math
from dataclasses import dataclass, field

import numpy as np

from ..errors import InputError, SolverError
from ..notices import Notice
from ..threads import one_blas_thread
from .equilibrium import WALL, check_operating
from .film import FilmOptions, number, pair, solve_film, whole
from .fixed_film import CAUTION, NAMES, dimensionless
from .geometry import MAX_CLEARANCE_RATIO, TWO_PI, Land, _positive
from .journal import FilmJournal, thermal_notes
from .lubricant import Lubricant

_solve = solve_film.__wrapped__


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
        th = float(self.pivots[k])
        e, t = np.array([math.cos(th), math.sin(th)]), np.array([-math.sin(th), math.cos(th)])
        centre = (lift - self.preload * self.clearance) * e - self.lever * tilt * t
        rate = lift_rate * e - self.lever * tilt_rate * t
        start = th - self.pivot_offset * self.arc
        land = _PadArc(start, start + self.arc, self.clearance, tuple(centre), tuple(rate))
        return PadFilm(self.diameter, self.length, (land,))


def _idle(films):
    """Pads whose film carries nothing (wholly ruptured)."""
    return tuple(k for k, f in enumerate(films) if not np.any(f.force))


def _keep(coordinates, idle):
    """Indices of the coordinates that do not belong to an ``idle`` pad."""
    gone = {f"{kind}[{k}]" for k in idle for kind in ("tilt", "lift")}
    return np.array([i for i, name in enumerate(coordinates) if name not in gone])


class _Pads:
    """The pads' films at coordinates ``q`` (SI: x, y, tilts, lifts) and their rates."""

    def __init__(self, ring, omega, mu, options):
        self.ring, self.omega, self.mu, self.options = ring, omega, mu, options
        n, c = ring.count, ring.bearing_clearance
        self.n, self.flex, self.size = n, ring.flexible, len(ring.coordinates)
        self.unit = np.r_[c, c, np.full(n, c / ring.lever), np.full(self.size - 2 - n, c)]
        th = ring.pivots
        self.e, self.t = np.c_[np.cos(th), np.sin(th)], np.c_[-np.sin(th), np.cos(th)]
        self.solves = self.iterations = 0

    def aligned(self, position):
        """The journal at ``position``, each pad tilted to follow it across its pivot line."""
        q = np.zeros(self.size)
        q[:2], q[2:2 + self.n] = position, -(self.t @ position) / self.ring.lever
        return q

    def _pad(self, k, q, rate):
        lift = (q[2 + self.n + k], rate[2 + self.n + k]) if self.flex else (0.0, 0.0)
        return self.ring.pad(k, q[2 + k], lift[0], rate[2 + k], lift[1])

    def film(self, k, q, rate=None, start=None, hold=False):
        self.solves += 1
        rate = np.zeros(self.size) if rate is None else rate
        return _solve(self._pad(k, q, rate), self.omega, self.mu, (q[0], q[1]),
                      (rate[0], rate[1]), options=self.options, start=start,
                      hold_rupture=hold)

    def films(self, q, rate=None, start=None, hold=False):
        return [self.film(k, q, rate, None if start is None else start[k], hold)
                for k in range(self.n)]

    def thinnest(self, q):
        zero = np.zeros(self.size)
        return min(self._pad(k, q, zero).lands[0].closest(q[0], q[1])[0] for k in range(self.n))

    def pad_loads(self, q, films):
        """Per pad: force on the journal, moment on the pad, radial force net of the pivot."""
        f = np.array([s.force for s in films])
        out = np.zeros((self.n, 4))
        out[:, :2], out[:, 2] = f, self.ring.lever * np.sum(f * self.t, axis=1)
        if self.flex:
            out[:, 3] = -np.sum(f * self.e, axis=1) - self.ring.pivot_stiffness * q[2 + self.n:]
        return out

    def forces(self, q, films):
        """The generalised forces ``Q`` over all coordinates."""
        g = self.pad_loads(q, films)
        return np.concatenate([g[:, :2].sum(axis=0), g[:, 2]] + ([g[:, 3]] if self.flex else []))

    def derivative(self, q, films, steps, *, rate=False, hold=False, central=True):
        """``dQ/dq`` (``dQ/dq'`` with ``rate``) by differences of ``steps``; a pad coordinate
        is moved on all pads at once (each pad's film sees only its own)."""
        n, out = self.n, np.zeros((self.size, self.size))
        base = None if central else self.pad_loads(q, films)
        for cols in [[0], [1], list(range(2, 2 + n))] + \
                ([list(range(2 + n, 2 + 2 * n))] if self.flex else []):
            shift = np.zeros(self.size)
            shift[cols] = steps[cols]

            def loads(sign):
                at = q if rate else q + sign * shift
                return self.pad_loads(at, self.films(at, sign * shift if rate else None,
                                                     films, hold))
            diff = 0.5 * (loads(1.0) - loads(-1.0)) if central else loads(1.0) - base
            if len(cols) == 1:
                out[:, cols[0]] = np.concatenate([diff[:, :2].sum(axis=0), diff[:, 2]] + (
                    [diff[:, 3]] if self.flex else [])) / steps[cols[0]]
                continue
            for k, j in enumerate(cols):
                rows = [0, 1, 2 + k] + ([2 + n + k] if self.flex else [])
                out[rows, j] = diff[k, :len(rows)] / steps[j]
        return out

    def settle(self, q, scale, slopes=None, start=None):
        """``(q, films)`` with every pad's tilt settled (journal and lifts held), or None;
        ``start``: films whose ruptured regions start the cavitation iterations.

        With ``u = tilt`` and ``g = F_k . t_k`` at positive speed (both negated at negative
        speed, the mirror image), a pad has no film below some ``u``; above, ``g`` may first
        dip below zero (the film starts behind an offset pivot), then turns positive and
        falls through its stable root (from + to -) for good.  Steps (1.1 Newton steps where
        ``slopes`` ``dg/du`` are known, else 1 % of the clearance; doubling) find a bracket
        of that root; the Illinois method closes it.  A pad that meets no positive ``g``
        before the wall carries nothing: it stays where it has no film.
        """
        q, up = q.copy(), math.copysign(1.0, self.omega)
        films = [None] * self.n if start is None else list(start)
        pos, neg = (lambda v: v is not None and v > 0.0), (lambda v: v is not None and v < 0.0)
        for k in range(self.n):
            unit = self.unit[2 + k]

            def g(u):                                   # None where the pad has no film
                q[2 + k] = up * u
                films[k] = self.film(k, q, start=films[k])
                force = films[k].force
                return up * float(self.t[k] @ force) if np.any(force) else None

            def march(u, g_u, size, done):
                """From ``u`` by doubling steps until ``done(g)``: (last u, g, new u, g); None
                when the pad comes within four halvings of the wall first."""
                walls = 0
                while walls < 4:
                    v = u + size
                    if self.thinnest(np.r_[q[:2 + k], up * v, q[3 + k:]]) <= WALL * self.unit[0]:
                        walls, size = walls + 1, 0.5 * size
                        continue
                    g_v = g(v)
                    if done(g_v):
                        return u, g_u, v, g_v
                    u, g_u, size = v, g_v, size * (0.5 if walls else 2.0)
                return None
            u0 = up * q[2 + k]
            g0, size, bracket, bare = g(u0), 0.01 * unit, None, u0
            if slopes is not None and slopes[k] < 0.0 and g0 is not None:
                size = max(abs(1.1 * g0 / slopes[k]), 1e-6 * unit)
            if pos(g0):
                bracket = march(u0, g0, size, neg)
            elif neg(g0):
                down = march(u0, g0, -size, lambda v: not neg(v))
                bare = None if down is None else down[2]
                bracket = down and pos(down[3]) and (down[2], down[3], down[0], down[1])
            if not bracket:
                rise = march(u0, g0, 0.01 * unit, pos)
                if rise is None and bare is not None:      # nothing holds the pad: no film
                    g(bare)
                    continue
                bracket = rise and march(*rise[2:], 0.01 * unit, neg)
            if not bracket:
                return None
            a, g_a, b, g_b = bracket
            for side in range(100):
                c = (a * g_b - b * g_a) / (g_b - g_a)
                g_c = g(c)
                if abs(g_c) <= 1e-11 * scale or abs(b - a) <= 1e-12 * unit:
                    break
                if g_c < 0.0:                                      # Illinois: halve the end
                    b, g_b, g_a, side = c, g_c, g_a / (2.0 if side < 0 else 1.0), -1
                else:
                    a, g_a, g_b, side = c, g_c, g_b / (2.0 if side > 0 else 1.0), 1
            else:
                return None
        return q, films

    def carry(self, q, target, free, scale, tol, max_iterations=50):
        """``(q, films)`` with ``Q + target = 0`` on the ``free`` coordinates (journal and
        lifts; within ``tol x scale``) and every pad settled, or None.

        Each step tries Newton's step (halved up to five times), then steps along the
        residual itself, the way the net force pushes the journal and pivots (from 0.2
        ``C_b``, halved up to seven times): a pad without film adds nothing to the Jacobian,
        so where too few pads carry, Newton's step misses the pads that would.
        """
        found = self.settle(q, scale)
        if found is None:
            return None
        q, films = found
        r = (self.forces(q, films) + target)[free]
        c = self.ring.bearing_clearance
        for _ in range(max_iterations):
            if np.linalg.norm(r) <= tol * scale:
                return q, films
            self.iterations += 1
            jac = self.derivative(q, films, 1e-6 * self.unit, central=False)
            slopes = np.diag(jac)[2:2 + self.n] / self.ring.lever
            p = np.intersect1d(_keep(self.ring.coordinates, _idle(films)), np.arange(2, 2 + self.n))
            moves = np.zeros((2, self.size))
            moves[1, free] = c * r / np.linalg.norm(r)
            try:
                follow = np.linalg.solve(jac[np.ix_(p, p)], jac[np.ix_(p, free)])
                moves[0, free] = -np.linalg.solve(
                    jac[np.ix_(free, free)] - jac[np.ix_(free, p)] @ follow, r)
                moves[:, p] = -moves[:, free] @ follow.T
            except np.linalg.LinAlgError:
                pass
            moves[0] *= min(1.0, 0.5 * c / max(float(np.max(np.abs(moves[0, free]))), 1e-300))
            for dq in [lam * moves[0] for lam in 0.5 ** np.arange(6)] + \
                    [lam * moves[1] for lam in 0.2 * 0.5 ** np.arange(8)]:
                trial = q + dq
                new = self.settle(trial, scale, slopes, films) if self.thinnest(trial) > WALL * c \
                    and np.all(np.isfinite(dq)) else None
                r_new = None if new is None else (self.forces(new[0], new[1]) + target)[free]
                if new is not None and np.linalg.norm(r_new) < (1 - 1e-6) * np.linalg.norm(r):
                    (q, films), r = new, r_new
                    break
            else:
                return None
        return None


@dataclass(frozen=True)
class PadEquilibrium:
    """The journal and its pads in static equilibrium.

    Attributes
    ----------
    position : ndarray
        Journal centre ``(x, y)`` (m).
    eccentricity_ratio, attitude_angle : float
        ``|position| / C_b``; angle (rad) from the load to the displacement, positive in
        the sense of rotation.
    tilts, lifts : ndarray
        Each pad's tilt (rad) and pivot lift (m; zero with rigid pivots).
    pad_forces : ndarray
        Each pad's film force on the journal, ``(count, 2)`` (N).
    pad_min_thickness, min_thickness : ndarray, float
        Thinnest film of each pad and of all (m).
    power_loss, side_leakage : float
        All pads (W, m^3/s).
    sommerfeld : float
        ``mu N L D / W (R / C_b)^2``, ``N`` in rev/s.
    load, speed, viscosity, clearance : ndarray, float
        ``(Wx, Wy)`` (N), rad/s, Pa s, ``C_b`` (m).
    residual : float
        ``|F + W| / |W|``.
    iterations, film_solves : int
        Newton steps and film solves made.
    coordinates : ndarray
        ``[x, y, tilts.., lifts..]`` (SI).
    films : tuple of FilmSolution
        The pads' films.
    """

    position: np.ndarray
    eccentricity_ratio: float
    attitude_angle: float
    tilts: np.ndarray
    lifts: np.ndarray
    pad_forces: np.ndarray
    pad_min_thickness: np.ndarray
    min_thickness: float
    power_loss: float
    side_leakage: float
    sommerfeld: float
    load: np.ndarray
    speed: float
    viscosity: float
    clearance: float
    residual: float
    iterations: int
    film_solves: int
    coordinates: np.ndarray = field(repr=False)
    films: tuple = field(repr=False)

    def to_dict(self):
        """The equilibrium's numbers (SI; angles in rad)."""
        out = {name: getattr(self, name) for name in (
            "eccentricity_ratio", "attitude_angle", "min_thickness", "power_loss",
            "side_leakage", "sommerfeld", "speed", "viscosity", "clearance", "residual",
            "iterations", "film_solves")}
        out.update({name: np.asarray(getattr(self, name)).tolist() for name in (
            "position", "tilts", "lifts", "pad_forces", "pad_min_thickness", "load")})
        return out


def _equilibrium_of(pads, q, films, w, mu):
    ring, c = pads.ring, pads.ring.bearing_clearance
    n, position, force = ring.count, q[:2].copy(), np.sum([f.force for f in films], axis=0)
    load = float(np.hypot(*w))
    phi = math.atan2(w[0] * position[1] - w[1] * position[0], float(w @ position))
    sommerfeld = (mu * abs(pads.omega) / TWO_PI * ring.length * ring.diameter / load
                  * (0.5 * ring.diameter / c) ** 2)
    return PadEquilibrium(
        position=position, eccentricity_ratio=float(np.hypot(*position)) / c,
        attitude_angle=phi * math.copysign(1.0, pads.omega), tilts=q[2:2 + n].copy(),
        lifts=q[2 + n:].copy() if pads.flex else np.zeros(n),
        pad_forces=np.array([f.force for f in films]),
        pad_min_thickness=np.array([f.min_thickness for f in films]),
        min_thickness=min(f.min_thickness for f in films),
        power_loss=sum(f.power_loss for f in films),
        side_leakage=sum(f.side_leakage for f in films), sommerfeld=sommerfeld,
        load=np.array(w, dtype=float), speed=pads.omega, viscosity=mu, clearance=c,
        residual=float(np.hypot(*(force + w))) / load, iterations=pads.iterations,
        film_solves=pads.solves, coordinates=q.copy(), films=tuple(films))


def _check_ring(ring, options):
    if not isinstance(ring, PadRing):
        raise InputError("pads", "must be a pad ring", value=type(ring).__name__,
                         expected="a PadRing", kind="type")
    if not isinstance(options, FilmOptions):
        raise InputError("options", "must be film options", value=type(options).__name__,
                         expected="a FilmOptions", kind="type")


@one_blas_thread
def pad_equilibrium(ring, speed, load, viscosity, *, options=FilmOptions(), tolerance=1e-9,
                    max_iterations=50, start=None):
    """The journal position, pad tilts (and pivot lifts) where the pads carry ``load``.

    Parameters
    ----------
    ring : PadRing
    speed : float
        Journal spin (rad/s), positive from +x towards +y.
    load : pair of float
        ``(Wx, Wy)`` (N) on the journal.
    viscosity : float
        Pa s.
    options : FilmOptions
        Grid (each pad) and cavitation model.
    tolerance : float
        Largest ``|F + W| / |W|`` accepted (and pivot imbalance over ``|W|``).
    max_iterations : int
        Newton steps allowed (per load step when the load is ramped).
    start : PadEquilibrium or pair of float, optional
        A neighbouring equilibrium, or a journal position (m), to try first.

    Returns
    -------
    PadEquilibrium

    Raises
    ------
    InputError
        Bad input.
    SolverError
        No equilibrium found.
    """
    _check_ring(ring, options)
    omega, w, mu = check_operating(speed, load, viscosity)
    tol = number("tolerance", tolerance)
    if not 0.0 < tol < 1e-2:
        raise InputError("tolerance", "is out of range", value=tol,
                         expected="between 0 and 0.01", kind="range")
    iters = whole("max_iterations", max_iterations, 1, 1000)
    pads = _Pads(ring, omega, mu, options)
    target, scale = np.r_[w, np.zeros(pads.size - 2)], float(np.hypot(*w))
    free = np.r_[0, 1, np.arange(2 + ring.count, pads.size)]
    starts = [share * ring.bearing_clearance * w / scale for share in (0.3, 0.6, 0.85)]
    if isinstance(start, PadEquilibrium) and len(start.coordinates) == pads.size:
        starts.insert(0, start.coordinates)
    elif start is not None and not isinstance(start, PadEquilibrium):
        starts.insert(0, np.array(pair("start", start)))
    for q in starts:
        q = q if len(q) == pads.size else pads.aligned(q)
        found = pads.thinnest(q) > 0.05 * ring.bearing_clearance and \
            pads.carry(q, target, free, scale, tol, iters)
        if found:
            return _equilibrium_of(pads, *found, w, mu)
    found = (pads.aligned(np.zeros(2)),)
    for share in np.linspace(0.1, 1.0, 10):
        found = pads.carry(found[0], share * target, free, share * scale, tol, iters)
        if found is None:
            raise SolverError(f"no tilting-pad equilibrium found for the load ({w[0]:.6g}, "
                              f"{w[1]:.6g}) N at {omega:.6g} rad/s: the pads may not carry it "
                              "(a very light load on pads with little preload, where most "
                              "pads carry nothing, is the usual case)")
    return _equilibrium_of(pads, *found, w, mu)


@one_blas_thread
def settle_pads(ring, speed, viscosity, position, *, options=FilmOptions(), tolerance=1e-9):
    """The pads settled (zero moments, pivots balanced) about a journal held at ``position``.

    Parameters
    ----------
    ring : PadRing
    speed, viscosity : float
        rad/s, Pa s.
    position : pair of float
        Journal centre (m).
    options : FilmOptions
    tolerance : float
        Pivot imbalance accepted, as a share of ``mu N L D (R / C_b)^2``.

    Returns
    -------
    PadEquilibrium
        Its ``load`` is the load this position carries (minus the film force).
    """
    _check_ring(ring, options)
    omega, mu = number("speed", speed), number("viscosity", viscosity)
    pads = _Pads(ring, omega, mu, options)
    unit_load = mu * abs(omega) / TWO_PI * ring.length * ring.diameter * (
        0.5 * ring.diameter / ring.bearing_clearance) ** 2
    found = pads.carry(pads.aligned(np.array(pair("position", position))),
                       np.zeros(pads.size), np.arange(2 + ring.count, pads.size), unit_load,
                       number("tolerance", tolerance))
    if found is None:
        raise SolverError(f"the pads found no balance about the journal at {position} m")
    return _equilibrium_of(pads, *found, -np.sum([f.force for f in found[1]], axis=0), mu)


def condense(stiffness, damping, inertia, whirl, keep=2):
    """Stiffness and damping of the first ``keep`` coordinates with the others eliminated.

    Parameters
    ----------
    stiffness, damping, inertia : (N, N) array_like
        Full ``K``, ``C`` and ``M``.
    whirl : float
        Whirl frequency ``w`` (rad/s); 0 gives the limit ``w -> 0`` (module's notes).
    keep : int
        Number of leading coordinates kept.

    Returns
    -------
    K_red, C_red : ndarray
        ``Re(Z_red)`` and ``Im(Z_red) / w``.
    """
    k, c, m = (np.asarray(a, dtype=float) for a in (stiffness, damping, inertia))
    j, p, w = slice(0, keep), slice(keep, None), number("whirl", whirl)
    if w == 0.0:
        g, h = np.linalg.solve(k[p, p], k[p, j]), np.linalg.solve(k[p, p].T, k[j, p].T).T
        return (k[j, j] - k[j, p] @ g,
                c[j, j] - c[j, p] @ g - h @ c[p, j] + h @ c[p, p] @ g)
    z = k + 1j * w * c - w * w * m
    zr = z[j, j] - z[j, p] @ np.linalg.solve(z[p, p], z[p, j])
    return zr.real, zr.imag / w


@dataclass(frozen=True)
class PadCoefficients:
    """Reduced journal coefficients of a tilting-pad bearing and the full linear set.

    Attributes
    ----------
    stiffness, damping : ndarray
        ``[[kxx, kxy], [kyx, kyy]]`` (N/m) and likewise C (N s/m), reduced at ``whirl``
        (force on the shaft ``-K q - C q'``).
    whirl : float
        Whirl frequency of the reduction (rad/s); :meth:`reduce` gives any other.
    full_stiffness, full_damping, full_inertia : ndarray
        ``K``, ``C``, ``M`` over ``coordinates`` (x, y in m; tilts in rad; lifts in m).
    coordinates : tuple of str
    equilibrium : PadEquilibrium
    step : float
        Journal perturbation of the matrices (m).
    step_change : tuple of float
        Relative change of the full K and C when the step was halved (NaN: not checked).
    warnings : tuple of Notice
    temperature : float or None
        Effective film temperature (K) where a bearing model chose the viscosity.
    """

    stiffness: np.ndarray
    damping: np.ndarray
    whirl: float
    full_stiffness: np.ndarray
    full_damping: np.ndarray
    full_inertia: np.ndarray
    coordinates: tuple
    equilibrium: PadEquilibrium
    step: float
    step_change: tuple
    warnings: tuple = ()
    temperature: float | None = None

    def dimensionless(self):
        """``(K C_b / W, C C_b omega / W)`` with ``C_b`` the bearing clearance."""
        return dimensionless(self.stiffness, self.damping, self.equilibrium)

    def reduce(self, whirl):
        """``(K_red, C_red)`` at another whirl frequency (rad/s); pads that carry no film
        are left out."""
        keep = _keep(self.coordinates, _idle(self.equilibrium.films))
        return condense(*(a[np.ix_(keep, keep)] for a in (
            self.full_stiffness, self.full_damping, self.full_inertia)), whirl)

    def as_table(self):
        """``{"kxx": ..., ..., "cyy": ...}`` (N/m, N s/m)."""
        values = np.concatenate([self.stiffness.ravel(), self.damping.ravel()])
        return dict(zip(NAMES, (float(v) for v in values)))

    def to_dict(self):
        """Coefficients, full matrices, equilibrium, step check, warnings and caution (SI)."""
        return {"coefficients": self.as_table(), "whirl_rad_per_s": self.whirl,
                "equilibrium": self.equilibrium.to_dict(), "step_m": self.step,
                "step_change": [None if math.isnan(v) else v for v in self.step_change],
                "coordinates": list(self.coordinates),
                "full_stiffness": self.full_stiffness.tolist(),
                "full_damping": self.full_damping.tolist(), "film_temperature_K": self.temperature,
                "warnings": [w.to_dict() for w in self.warnings], "caution": CAUTION}


@one_blas_thread
def pad_coefficients(ring, speed, load, viscosity, *, whirl=None, options=FilmOptions(),
                     step=1e-3, step_tolerance=1e-3, tolerance=1e-9, start=None,
                     check_step=True, equilibrium=None):
    """Equilibrium, full linear set and reduced coefficients of a tilting-pad bearing.

    Parameters
    ----------
    ring : PadRing
    speed, load, viscosity
        As :func:`pad_equilibrium`.
    whirl : float, optional
        Whirl frequency of the reduction (rad/s); ``|speed|`` (synchronous) when None.
    options : FilmOptions
    step : float
        Journal perturbation as a share of the minimum film (1e-6 to 0.05); the tilts are
        moved by ``step h_min / lever``.
    step_tolerance : float
        Largest relative change of the full K or C on halving the step before a note.
    tolerance, start
        Of the equilibrium search (:func:`pad_equilibrium`).
    check_step : bool
        Compute the matrices again with twice the step and compare (twice the cost).
    equilibrium : PadEquilibrium, optional
        The equilibrium for these inputs, found already.

    Returns
    -------
    PadCoefficients
    """
    _check_ring(ring, options)
    share, limit = number("step", step), number("step_tolerance", step_tolerance)
    if not 1e-6 <= share <= 0.05:
        raise InputError("step", "is out of range", value=share,
                         expected="between 1e-6 and 0.05 of the minimum film", kind="range")
    if not limit > 0.0:
        raise InputError("step_tolerance", "must be positive", value=limit, kind="range")
    w = abs(number("speed", speed)) if whirl is None else number("whirl", whirl)
    eq = equilibrium or pad_equilibrium.__wrapped__(ring, speed, load, viscosity,
                                                    options=options, tolerance=tolerance,
                                                    start=start)
    pads = _Pads(ring, eq.speed, eq.viscosity, options)
    q, films = eq.coordinates, list(eq.films)

    def matrices(d):
        steps = d * pads.unit / ring.bearing_clearance
        k = -pads.derivative(q, films, steps, hold=True)
        c = -pads.derivative(q, films, steps * abs(eq.speed), rate=True, hold=True)
        return k, c

    d = share * eq.min_thickness
    k2, c2 = matrices(0.5 * d)
    change, warnings = (math.nan, math.nan), ()
    if check_step:
        k1, c1 = matrices(d)
        change = tuple(float(np.linalg.norm(a - b) / np.linalg.norm(b)) for a, b in
                       ((k1, k2), (c1, c2)))
        if max(change) > limit:
            warnings = (Notice(f"tilting-pad coefficients change by {100 * change[0]:.3g} % "
                               f"(stiffness) and {100 * change[1]:.3g} % (damping) when the "
                               "perturbation is halved: refine the grid or change the step",
                               code="note"),)
    n = ring.count
    m = np.diag(np.r_[0.0, 0.0, np.full(n, ring.pad_inertia),
                      np.full(pads.size - 2 - n, ring.pad_mass)])
    idle = _idle(films)
    if idle:
        warnings += (Notice(f"pad(s) {', '.join(str(k + 1) for k in idle)} carry no film at "
                            f"{eq.speed * 30 / math.pi:.0f} rpm (unloaded: their tilt is free and "
                            "they may flutter); left out of the coefficients", code="note"),)
    result = PadCoefficients(None, None, w, k2, c2, m, ring.coordinates, eq, 0.5 * d, change,
                             warnings)
    try:
        kr, cr = result.reduce(w)
    except np.linalg.LinAlgError:
        raise SolverError("the pads' own stiffness is singular (check the load and the "
                          "preload)") from None
    return dataclasses.replace(result, stiffness=kr, damping=cr)


#: Film grid of each pad in a rotor model: within 0.7 % of 72 x 12 per pad on a 5-pad,
#: 60-degree bearing (measured), at about 60 % of its cost.
PAD_GRID = FilmOptions(n_theta=36, n_z=8)
#: The pad ring's inputs a what-if may change.
RING_CHANGES = ("diameter", "length", "clearance", "preload")


@dataclass(frozen=True)
class PadJournal:
    """A tilting-pad journal bearing with its oil: the bearing model (see FilmJournal).

    Parameters
    ----------
    pads : PadRing
    lubricant : Lubricant
    inlet_temperature : float
        Oil supply temperature (K).
    film_temperature : float, optional
        A given effective film temperature (K) instead of the heat balance.
    rise_share : float
        Share of the oil's temperature rise added to the inlet (0 to 1); one effective
        temperature for all pads, from the heat balance of :class:`FilmJournal`.
    options : FilmOptions
        Film grid of each pad (:data:`PAD_GRID` by default: a pad is a sixth of a turn,
        so 36 steps along it are finer than a fixed bore's 72 around).
    clearance_range, preload_range, inlet_range : tuple
        Tolerances ``(low, high)`` of the pad clearance, the preload and the oil inlet
        temperature, or empty (the tolerance envelope's corners).
    """

    pads: PadRing
    lubricant: Lubricant
    inlet_temperature: float
    film_temperature: float | None = None
    rise_share: float = 0.8
    options: FilmOptions = None
    oil_key: str = "oil"
    clearance_range: tuple = ()
    preload_range: tuple = ()
    inlet_range: tuple = ()
    key: str = "film"

    #: The bore's name, as FilmJournal's ``bore`` (what a rotor file writes).
    bore = "tilting-pad"

    @property
    def diameter(self):
        return self.pads.diameter

    @property
    def length(self):
        return self.pads.length

    @property
    def clearance(self):
        return self.pads.clearance

    @property
    def preload(self):
        return self.pads.preload

    def __post_init__(self):
        if self.options is None:
            object.__setattr__(self, "options", PAD_GRID)
        _check_ring(self.pads, self.options)
        for name, where in (("clearance", self.key), ("preload", self.key),
                            ("inlet", self.oil_key)):
            FilmJournal._check_range(self, name, where)
        for name in ("inlet_temperature", "film_temperature"):
            value = getattr(self, name)
            if value is not None and not (isinstance(value, (int, float)) and
                                          math.isfinite(value) and value > 0.0):
                raise InputError(f"{self.oil_key}.{name}", "must be a temperature above "
                                 "absolute zero", value=value, expected="a temperature in K",
                                 kind="range")
        if not (isinstance(self.rise_share, (int, float)) and 0.0 <= self.rise_share <= 1.0):
            raise InputError(f"{self.oil_key}.rise_share", "is out of range",
                             value=self.rise_share, expected="a number from 0 to 1", kind="range")

    def changed(self, **values) -> "PadJournal":
        """A copy with some inputs changed (validated again): the pads' ``diameter``,
        ``length``, ``clearance``, ``preload`` (the bearing clearance follows) or the
        model's own fields."""
        ring = {k: values.pop(k) for k in list(values) if k in RING_CHANGES}
        for name in values:
            if name not in {f.name for f in dataclasses.fields(self)}:
                raise InputError(f"{self.key}.{name}", "does not apply to a tilting-pad "
                                 "bearing", value=values[name],
                                 expected="diameter, length, clearance or preload",
                                 kind="unknown-key")
        if ring:
            ring.setdefault("preload", self.pads.preload)
            values["pads"] = dataclasses.replace(self.pads, bearing_clearance=None, **ring)
        return dataclasses.replace(self, **values)

    def viscosity(self, temperature):
        """Dynamic viscosity (Pa s) at ``temperature`` (K)."""
        return float(self.lubricant.dynamic_viscosity(temperature))

    def _equilibrium(self, speed, load, temperature, start):
        return pad_equilibrium(self.pads, speed, load, self.viscosity(temperature),
                               options=self.options, start=start)

    #: The effective temperature, as FilmJournal finds it (the heat balance of all pads).
    _film_state = FilmJournal._film_state

    @staticmethod
    def _start_of(equilibrium):
        """The whole equilibrium (journal, tilts, lifts) starts the next search."""
        return equilibrium

    def coefficients(self, speed, load, *, whirl=None, start=None, check_step=True,
                     temperature=None):
        """Reduced coefficients at ``speed`` under ``load``, at the effective film temperature.

        Parameters
        ----------
        speed : float
            rad/s.
        load : pair of float
            ``(Wx, Wy)`` (N) on the journal.
        whirl : float, optional
            Whirl frequency of the reduction (rad/s); synchronous when None.
        start : PadEquilibrium or pair of float, optional
            Where the equilibrium search starts.
        check_step : bool
            Check the perturbation step by halving it.
        temperature : float, optional
            A first guess of the film temperature (K).

        Returns
        -------
        PadCoefficients
            With its ``temperature`` (K) and, among its warnings, notes on the heat
            balance and on a hot film.
        """
        temperature, eq, settled = self._film_state(speed, load, start, temperature)
        result = pad_coefficients(self.pads, speed, load, self.viscosity(temperature),
                                  whirl=whirl, options=self.options, check_step=check_step,
                                  equilibrium=eq)
        notes = result.warnings + thermal_notes(temperature, speed, settled)
        return dataclasses.replace(result, temperature=temperature, warnings=notes)
