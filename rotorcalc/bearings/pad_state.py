"""The settled state of a tilting-pad bearing: the equilibrium record and the small helpers
the search and the reduction share (which pads carry nothing, the coordinates that remain,
the pads' viscosities, the input checks).  See :mod:`rotorcalc.bearings.pad_settle`.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from ..errors import InputError
from .film import FilmOptions, number
from .geometry import TWO_PI
from .pad_ring import PadRing


def _idle(films):
    """Pads whose film carries nothing (wholly ruptured)."""
    return tuple(k for k, f in enumerate(films) if not np.any(f.force))


def _keep(coordinates, idle):
    """Indices of the coordinates that do not belong to an ``idle`` pad."""
    gone = {f"{kind}[{k}]" for k in idle for kind in ("tilt", "lift")}
    return np.array([i for i, name in enumerate(coordinates) if name not in gone])


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
        ``(Wx, Wy)`` (N), rad/s, Pa s (the mean of the pads'), ``C_b`` (m).
    pad_viscosity : ndarray
        Each pad's film viscosity (Pa s): all equal unless the pads run at their own
        temperatures.
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
    pad_viscosity: np.ndarray = field(default=None, repr=False)
    #: The last ``dQ/dq`` of the search and the ``mu omega`` it was computed at, or None.
    jacobian: tuple = field(default=None, repr=False, compare=False)

    @property
    def inflow(self):
        """Oil the pads draw in across their leading edges, all pads (m^3/s)."""
        return float(sum(f.inflow for f in self.films))

    def to_dict(self):
        """The equilibrium's numbers (SI; angles in rad)."""
        out = {name: getattr(self, name) for name in (
            "eccentricity_ratio", "attitude_angle", "min_thickness", "power_loss",
            "side_leakage", "sommerfeld", "speed", "viscosity", "clearance", "residual",
            "iterations", "film_solves")}
        out.update({name: np.asarray(getattr(self, name)).tolist() for name in (
            "position", "tilts", "lifts", "pad_forces", "pad_min_thickness", "load",
            "pad_viscosity")})
        return out


def _equilibrium_of(pads, q, films, w):
    ring, c, mu = pads.ring, pads.ring.bearing_clearance, float(np.mean(pads.mu))
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
        film_solves=pads.solves, coordinates=q.copy(), films=tuple(films),
        pad_viscosity=pads.mu.copy(),
        jacobian=None if pads.jacobian is None else (pads.jacobian, pads.film_scale))


def pad_viscosities(ring, viscosity):
    """One positive viscosity (Pa s) per pad, from one for all or one per pad."""
    if np.ndim(viscosity) == 0:
        values = [number("viscosity", viscosity)] * ring.count
    else:
        values = [number(f"viscosity[{k}]", v) for k, v in enumerate(viscosity)]
        if len(values) != ring.count:
            raise InputError("viscosity", f"has {len(values)} values for {ring.count} pads",
                             value=len(values), expected="one value, or one per pad",
                             kind="length")
    if min(values) <= 0.0:
        raise InputError("viscosity", "must be positive", value=min(values), kind="range")
    return np.array(values)


def _check_ring(ring, options):
    if not isinstance(ring, PadRing):
        raise InputError("pads", "must be a pad ring", value=type(ring).__name__,
                         expected="a PadRing", kind="type")
    if not isinstance(options, FilmOptions):
        raise InputError("options", "must be film options", value=type(options).__name__,
                         expected="a FilmOptions", kind="type")
