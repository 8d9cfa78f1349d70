"""The fluid film of a journal bearing: Reynolds' equation on the lands of any geometry.

Equation (isoviscous, incompressible, laminar, rigid and aligned surfaces)::

    d/dx (h^3 dp/dx) + d/dz (h^3 dp/dz) = 6 mu U dh/dx + 12 mu dh/dt,   x = R theta, U = omega R

Conventions: ``theta`` is measured from +x towards +y, y vertical up (gravity
along -y); the journal turns from +x towards +y at positive ``speed`` (rad/s)
and the bore stands still.  The journal centre sits at ``(x, y)`` and moves at
``(vx, vy)``; the film thickness of a land of a fixed bore is
``h = C - (x - ox) cos(theta) - (y - oy) sin(theta)`` and its rate
``dh/dt = -(vx cos(theta) + vy sin(theta))``.  A journal turning the other way
(from +y towards +x) is given a negative speed; the equation is the same, only
the Couette term changes sign.  ``z`` runs along the axis from the mid-plane.

The film is symmetric about the mid-plane (aligned journal), so half of it is
solved, ``0 <= z <= L/2``, with zero axial gradient at ``z = 0`` and ``p = 0`` at
the end; forces, flows and losses are those of the whole bearing.  Each land
is solved on its own grid (``n_theta`` steps along the arc, ``n_z`` over the
half length); an open land's edges carry the groove's ``feed_pressure``.

Cavitation:

``"reynolds"`` (default; also called Swift-Stieber)
    ``p >= 0`` everywhere and, where the film ruptures, zero pressure gradient
    as well: the discrete equations become the complementarity problem
    ``p >= 0, A p - b >= 0, p (A p - b) = 0``, solved exactly by an active-set
    iteration of banded direct (Cholesky) solves.
``"half-sommerfeld"``
    the full film is solved (negative pressures allowed) and its negative
    pressures are then set to zero (also called Gumbel's condition): the
    classical approximation behind the short- and long-bearing closed forms.
    The force integrates the positive part with its zero placed between nodes by
    linear interpolation, so it stays second order and smooth in the state.

Neither model conserves mass through the ruptured region (the Jakobsson-Floberg-
Olsson model would); the Reynolds film re-forms wherever the equations call for
pressure again, the half-Sommerfeld film wherever the full film is positive.
"""

from __future__ import annotations

import functools
import math
from dataclasses import dataclass, field
from typing import NamedTuple

import numpy as np

from ..errors import InputError
from ..threads import one_blas_thread
from . import _reynolds as rey

#: The cavitation models of :func:`solve_film`.
CAVITATION_MODELS = ("reynolds", "half-sommerfeld")


def whole(key, value, low, high):
    """An integer in ``[low, high]``, or an :class:`InputError` naming ``key``."""
    if isinstance(value, bool) or not isinstance(value, (int, np.integer)):
        raise InputError(key, "must be a whole number", value=value,
                         expected=f"an integer from {low} to {high}", kind="type")
    if not low <= value <= high:
        raise InputError(key, "is out of range", value=value,
                         expected=f"an integer from {low} to {high}", kind="range")
    return int(value)


def number(key, value):
    """A finite float, or an :class:`InputError` naming ``key``."""
    if isinstance(value, bool) or not isinstance(value, (int, float, np.integer, np.floating)):
        raise InputError(key, "must be a number", value=value, expected="a finite number",
                         kind="type")
    if not math.isfinite(value):
        raise InputError(key, "is not a finite number", value=value, kind="not-finite")
    return float(value)


def pair(key, value):
    """Two finite floats (a vector in the x-y plane)."""
    try:
        items = tuple(value)
    except TypeError:
        items = None
    if items is None or len(items) != 2:
        raise InputError(key, "must hold two components", value=value,
                         expected="(x, y)", kind="length")
    return tuple(number(f"{key}[{i}]", v) for i, v in enumerate(items))


@dataclass(frozen=True)
class FilmOptions:
    """How the film is solved.

    Parameters
    ----------
    n_theta : int
        Steps along each land (8 to 2000).
    n_z : int
        Steps over half the length (2 to 500).  The default 120 x 20 keeps a
        plain bore's coefficients within about 1 % of the grid-converged values
        up to eccentricity ratios of 0.95 (docs/bearings.md); 60 x 10 is four
        to six times faster and within about 5 %.
    cavitation : str
        One of :data:`CAVITATION_MODELS`.
    max_iterations : int
        Linear solves allowed to the cavitation iteration of one land.
    """

    n_theta: int = 120
    n_z: int = 20
    cavitation: str = "reynolds"
    max_iterations: int = 100
    key: str = "film_options"

    def __post_init__(self):
        whole(f"{self.key}.n_theta", self.n_theta, 8, 2000)
        whole(f"{self.key}.n_z", self.n_z, 2, 500)
        whole(f"{self.key}.max_iterations", self.max_iterations, 1, 10000)
        if self.cavitation not in CAVITATION_MODELS:
            raise InputError(f"{self.key}.cavitation", "is not a known choice",
                             value=self.cavitation, expected=" or ".join(CAVITATION_MODELS),
                             kind="choice")


def _read_only(*arrays):
    for a in arrays:
        a.flags.writeable = False
    return arrays


@dataclass(frozen=True)
class FilmSolution:
    """The film at one journal position and velocity.

    Attributes
    ----------
    force : ndarray
        ``(Fx, Fy)``: the film's force on the journal (N).
    theta : tuple of ndarray
        Node angles of each land (rad).
    z : ndarray
        Axial node positions from the mid-plane to one end (m).
    pressure : tuple of ndarray
        Pressure of each land (Pa, gauge), shape ``(len(theta[k]), len(z))``.
    cavitated : tuple of ndarray of bool
        Nodes where the film has ruptured (held at, or clipped to, zero).
    min_thickness : float
        Smallest film thickness on the lands (m), exact for the geometry.
    side_leakage : float
        Pressure-driven flow out of both axial ends (m^3/s).
    power_loss : float
        Viscous power dissipated (W): the journal's surface shear
        ``mu U / h + (h / 2) dp/dx`` times ``U``, integrated over the lands as if
        full of film, the ruptured region included (its shear is then an
        upper estimate; there ``dp/dx = 0``).  Grooves add nothing.
    iterations : int
        Linear solves made by the cavitation iteration (all lands).
    grid : tuple of int
        ``(n_theta, n_z)`` per land (half length).
    cavitation : str
    inflow : float
        Oil drawn into the film (m^3/s): for lands open at their ends (pads, lobes) the
        flow across each land's leading edge, ``int (U h / 2 - h^3 / (12 mu R) dp/dtheta)
        dz`` over the whole length; for a closed bore, where oil enters through the
        grooves and leaves only at the ends, the side leakage.

    ``side_leakage``, ``power_loss`` and ``inflow`` are worked out from the pressures when
    first asked for: the perturbed films of a linearisation or of a Newton step never
    need them (a fifth of a solve's cost).
    """

    force: np.ndarray
    theta: tuple
    z: np.ndarray
    pressure: tuple
    cavitated: tuple
    min_thickness: float
    iterations: int
    grid: tuple
    cavitation: str
    _active: tuple = field(default=(), repr=False, compare=False)   # to warm-start
    _lands: tuple = field(default=(), repr=False, compare=False)    # for the flows and loss

    @functools.cached_property
    def side_leakage(self):
        return float(sum(_leakage(*land.leakage) for land in self._lands))

    @functools.cached_property
    def power_loss(self):
        return float(sum(_power(*land.power) for land in self._lands))

    @functools.cached_property
    def inflow(self):
        flows = [_inflow(*land.inflow) for land in self._lands]
        if any(math.isnan(f) for f in flows):       # a closed bore: in at grooves, out at ends
            return self.side_leakage
        return float(sum(flows))

    def to_dict(self):
        """The scalars and the fields as plain lists (SI units)."""
        return {"force_N": self.force.tolist(), "min_thickness_m": self.min_thickness,
                "side_leakage_m3_per_s": self.side_leakage, "power_loss_W": self.power_loss,
                "cavitation": self.cavitation, "grid": list(self.grid),
                "iterations": self.iterations, "z_m": self.z.tolist(),
                "lands": [{"theta_rad": t.tolist(), "pressure_Pa": p.tolist(),
                           "cavitated": c.tolist()}
                          for t, p, c in zip(self.theta, self.pressure, self.cavitated)]}


def check_geometry(geometry):
    """Refuse an object that does not offer the film-geometry interface."""
    for name in ("lands", "diameter", "length", "feed_pressure", "closed"):
        if not hasattr(geometry, name):
            raise InputError("geometry", f"has no '{name}'", value=type(geometry).__name__,
                             expected="a film geometry (PlainBore, LobedBore, ...)", kind="type")


@one_blas_thread
def solve_film(geometry, speed, viscosity, position=(0.0, 0.0), velocity=(0.0, 0.0), *,
               options=FilmOptions(), start=None, hold_rupture=False):
    """Solve the film for a journal at ``position`` moving at ``velocity``.

    Parameters
    ----------
    geometry : PlainBore, LobedBore or another film geometry
    speed : float
        Journal spin (rad/s), positive from +x towards +y; zero leaves only squeeze.
    viscosity : float
        Dynamic viscosity (Pa s).
    position, velocity : pair of float
        Journal centre from the bearing centre (m) and its velocity (m/s).
    options : FilmOptions
    start : FilmSolution, optional
        A solution on the same grid whose ruptured region starts the cavitation
        iteration (fewer solves near a known state).
    hold_rupture : bool
        Keep ``start``'s ruptured region as it is instead of solving for it: one
        linear solve, pressures zero there and free (of either sign) elsewhere.
        This is the linearised film of perturbation methods; use it only for
        small departures from ``start``'s state.  No effect on the
        half-Sommerfeld film, which needs no iteration and whose clipped
        force is already smooth in the state (see ``positive_part_weights``).

    Returns
    -------
    FilmSolution

    Raises
    ------
    InputError
        Bad input, or a position where the journal touches a land.
    SolverError
        A cavitation iteration that does not settle.
    """
    check_geometry(geometry)
    if not isinstance(options, FilmOptions):
        raise InputError("options", "must be film options", value=type(options).__name__,
                         expected="a FilmOptions", kind="type")
    omega = number("speed", speed)
    mu = number("viscosity", viscosity)
    if mu <= 0.0:
        raise InputError("viscosity", "must be positive", value=mu, kind="range")
    state = pair("position", position) + pair("velocity", velocity)
    lands = geometry.lands
    h_min = min(land.closest(*state[:2])[0] for land in lands)
    if h_min <= 0.0:
        raise InputError("position", "puts the journal through a land (no film left)",
                         value=state[:2], expected="a position inside the bore",
                         kind="physics")
    warm = _warm_start(start, hold_rupture, options, len(lands))
    surface_speed = 0.5 * omega * geometry.diameter
    parts = [_land(land, geometry, surface_speed, mu, state, options,
                   None if warm is None else warm[k], hold_rupture)
             for k, land in enumerate(lands)]
    z = _axial_nodes(float(geometry.length), options.n_z)
    force = np.sum([p["force"] for p in parts], axis=0)
    _read_only(force)
    return FilmSolution(
        force=force, theta=tuple(p["theta"] for p in parts), z=z,
        pressure=tuple(p["pressure"] for p in parts),
        cavitated=tuple(p["cavitated"] for p in parts),
        min_thickness=float(h_min), iterations=int(sum(p["iterations"] for p in parts)),
        grid=(options.n_theta, options.n_z), cavitation=options.cavitation,
        _active=tuple(p["active"] for p in parts), _lands=tuple(p["land"] for p in parts))


@functools.lru_cache(maxsize=64)
def _axial_nodes(length, n_z):
    """Axial node positions from the mid-plane to one end (m), read-only."""
    return _read_only(np.linspace(0.0, 0.5 * length, n_z + 1))[0]


def _warm_start(start, hold, options, count):
    """The ruptured region of ``start`` (per land), checked against these options."""
    if start is None:
        if hold:
            raise InputError("hold_rupture", "needs a start whose ruptured region to hold",
                             value=True, expected="start=FilmSolution", kind="missing")
        return None
    if not (isinstance(start, FilmSolution) and start.grid == (options.n_theta, options.n_z)
            and start.cavitation == options.cavitation and len(start._active) == count):
        raise InputError("start", "is not a film solution of this geometry, grid and "
                         "cavitation model", value=type(start).__name__,
                         expected="a FilmSolution from the same options", kind="conflict")
    return start._active


def _land(land, geometry, surface_speed, mu, state, options, warm, hold):
    """Pressure, force, leakage and loss of one land (whole length)."""
    x, y, vx, vy = state
    grid = rey.land_grid(land.start, land.end, options.n_theta, options.n_z,
                         geometry.length, bool(geometry.closed))
    radius = 0.5 * geometry.diameter
    h_node = land.thickness(grid.theta, x, y)
    system = rey.assemble(grid, h_node, land.thickness(grid.faces, x, y),
                          land.thickness_rate(grid.theta, vx, vy), radius=radius,
                          viscosity=mu, surface_speed=surface_speed)
    fixed, value = rey.fixed_values(grid, geometry.feed_pressure)
    full, active, iterations = _pressure(system, fixed, value, options, warm, hold)
    clipped = options.cavitation == "half-sommerfeld"
    full = full.reshape(grid.shape)
    weight = rey.positive_part_weights(full, grid) if clipped else grid.theta_weights()[:, None]
    p = np.where(active.reshape(grid.shape), 0.0, full)
    cav = active.reshape(grid.shape).copy()
    _read_only(p, cav, grid.theta)
    loaded = radius * weight * grid.z_weights()[None, :]
    force = -2.0 * np.array([np.sum(p * loaded * np.cos(grid.theta)[:, None]),
                             np.sum(p * loaded * np.sin(grid.theta)[:, None])])
    return {"theta": grid.theta, "pressure": p, "cavitated": cav, "force": force,
            "iterations": iterations, "active": active,
            "land": _LandFlows((full if clipped else p, h_node, grid, radius, mu, clipped),
                               (p, h_node, grid, surface_speed, mu, radius),
                               (p, h_node, grid, radius, mu, surface_speed))}


class _LandFlows(NamedTuple):
    """What a land's leakage, loss and inflow are worked out from (their functions'
    arguments), kept until they are asked for."""

    leakage: tuple
    power: tuple
    inflow: tuple


def _pressure(system, fixed, value, options, warm, hold):
    """Nodal pressures (unclipped for the half-Sommerfeld film), the ruptured nodes and
    the solves made."""
    if options.cavitation == "half-sommerfeld":
        p = system.solve(fixed, value)
        return p, ~fixed & (p < 0.0), 1
    if hold:
        return system.solve(fixed | warm, np.where(warm, 0.0, value)), warm, 1
    return rey.complementarity(system, fixed, value, warm, options.max_iterations)


def _leakage(p, h, grid, radius, mu, clipped):
    """Flow out of both ends, ``-h^3 / (12 mu) dp/dz`` at ``z = L/2`` (one-sided, second
    order).  For the clipped film ``p`` is the full film's pressure and the flow is counted
    where it leaves (its positive part: there the full film's pressure is positive)."""
    dpdz = (3.0 * p[:, -1] - 4.0 * p[:, -2] + p[:, -3]) / (2.0 * grid.dz)
    density = -h ** 3 / (12.0 * mu) * dpdz * radius
    if clipped:
        weight = rey.positive_part_weights(density[:, None], grid)[:, 0]
        density = np.maximum(density, 0.0)
    else:
        weight = grid.theta_weights()
    return 2.0 * float(np.sum(density * weight))


def _inflow(p, h, grid, radius, mu, surface_speed):
    """Flow into the land across its leading edge (whole length; module docstring of
    ``FilmSolution.inflow``); nan for a closed land, which has no edge."""
    if grid.closed:
        return math.nan
    lead = slice(0, 3) if surface_speed >= 0.0 else slice(-1, -4, -1)
    rows, h0 = p[lead], h[lead][0]
    dpdt = (-3.0 * rows[0] + 4.0 * rows[1] - rows[2]) / (2.0 * grid.dtheta)
    # rows taken along the direction of travel: dpdt is the gradient that way
    flux = abs(surface_speed) * h0 / 2.0 - h0 ** 3 / (12.0 * mu * radius) * dpdt
    return 2.0 * float(np.sum(flux * grid.z_weights()))


def _power(p, h, grid, surface_speed, mu, radius):
    """Journal-surface shear ``mu U / h + (h / 2R) dp/dtheta`` times ``U``, whole length."""
    area = radius * grid.theta_weights()[:, None] * grid.z_weights()[None, :]
    if grid.closed:
        dpdt = (np.roll(p, -1, axis=0) - np.roll(p, 1, axis=0)) / (2.0 * grid.dtheta)
    else:
        dpdt = np.gradient(p, grid.dtheta, axis=0, edge_order=2)
    shear = mu * surface_speed / h[:, None] + 0.5 * h[:, None] * dpdt / radius
    return 2.0 * surface_speed * float(np.sum(shear * area))
