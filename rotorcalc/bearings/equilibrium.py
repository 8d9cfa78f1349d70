"""Static equilibrium of a journal in its film: where the film force carries the load.

The load ``W = (Wx, Wy)`` (N) acts on the journal (gravity: ``(0, -m g)``); at
equilibrium the film force ``F`` on the journal balances it, ``F + W = 0``.
Newton's method on the journal position, in units of the reference clearance,
with a forward-difference Jacobian (Broyden's update between fresh ones), a step limited to half the clearance and
halved until the residual falls, started from the short-bearing (Ocvirk)
estimate; when that fails, from 50, 80 and 95 % of the way to the bore along the
load, and last with the load applied in ten steps, each started from the last
equilibrium.

Sommerfeld number: ``S = mu N L D / W (R / C)^2`` with ``N = |speed| / (2 pi)``
in rev/s, ``C`` the reference clearance (the assembled clearance of a lobed
bore) and ``W`` the magnitude of the load.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from scipy.optimize import brentq

from ..errors import InputError, SolverError
from ..threads import one_blas_thread
from .film import (FilmOptions, FilmSolution, check_geometry, number, pair, solve_film,
                   whole)

#: The film solve without the BLAS-thread guard (the callers here hold it already).
_solve = solve_film.__wrapped__

#: Largest eccentricity ratio of the short-bearing start (a start near the wall
#: sends Newton's first step through it).
START_LIMIT = 0.8
#: Thinnest film a Newton iterate may leave, as a share of the reference clearance.
WALL = 1e-3


@dataclass(frozen=True)
class Equilibrium:
    """A journal in static equilibrium.

    Attributes
    ----------
    position : ndarray
        Journal centre ``(x, y)`` from the bearing centre (m).
    eccentricity_ratio : float
        ``|position| / C`` (C the reference clearance).
    attitude_angle : float
        Angle from the load's direction to the journal's displacement (rad),
        positive in the sense of rotation.
    sommerfeld : float
        ``mu N L D / W (R / C)^2``, ``N`` in rev/s.
    min_thickness, side_leakage, power_loss : float
        At equilibrium (m, m^3/s, W); see :class:`FilmSolution`.
    load : ndarray
        ``(Wx, Wy)`` (N) on the journal.
    residual : float
        ``|F + W| / |W|`` at the returned position.
    iterations, film_solves : int
        Newton steps, film solves made.
    film : FilmSolution
        The film at equilibrium.
    """

    position: np.ndarray
    eccentricity_ratio: float
    attitude_angle: float
    sommerfeld: float
    min_thickness: float
    side_leakage: float
    power_loss: float
    load: np.ndarray
    speed: float
    viscosity: float
    clearance: float
    residual: float
    iterations: int
    film_solves: int
    film: FilmSolution

    def to_dict(self):
        """The equilibrium's numbers (SI; angles in rad)."""
        return {"position_m": self.position.tolist(),
                "eccentricity_ratio": self.eccentricity_ratio,
                "attitude_angle_rad": self.attitude_angle, "sommerfeld": self.sommerfeld,
                "min_thickness_m": self.min_thickness,
                "side_leakage_m3_per_s": self.side_leakage, "power_loss_W": self.power_loss,
                "load_N": self.load.tolist(), "speed_rad_per_s": self.speed,
                "viscosity_Pa_s": self.viscosity, "reference_clearance_m": self.clearance,
                "residual": self.residual, "iterations": self.iterations,
                "film_solves": self.film_solves}


def short_bearing_load(eps):
    """Ocvirk's load ``W c^2 / (mu omega R L^3)`` at eccentricity ratio ``eps`` (half film)."""
    return eps * math.sqrt(16.0 * eps ** 2 + math.pi ** 2 * (1.0 - eps ** 2)) / (
        4.0 * (1.0 - eps ** 2) ** 2)


def short_bearing_start(geometry, speed, load, viscosity):
    """Journal position (m) that the short-bearing theory gives for this load.

    The eccentricity ratio solves Ocvirk's load relation (capped at
    :data:`START_LIMIT`); the attitude angle is ``atan(pi sqrt(1 - e^2) / (4 e))``
    from the load's direction in the sense of rotation.
    """
    c = geometry.clearance
    radius = 0.5 * geometry.diameter
    w = math.hypot(*load) * c ** 2 / (viscosity * abs(speed) * radius * geometry.length ** 3)
    eps = brentq(lambda e: short_bearing_load(e) - w, 0.0, 0.999) \
        if w < short_bearing_load(START_LIMIT) else START_LIMIT
    phi = math.atan2(math.pi * math.sqrt(1.0 - eps ** 2), 4.0 * eps) if eps > 0 else 0.0
    angle = math.atan2(load[1], load[0]) + math.copysign(phi, speed)
    return eps * c * np.array([math.cos(angle), math.sin(angle)])


def check_operating(speed, load, viscosity):
    """Speed (not zero), load (not zero) and viscosity (positive), as floats."""
    omega = number("speed", speed)
    if omega == 0.0:
        raise InputError("speed", "must not be zero: a film at rest carries no steady load",
                         value=omega, expected="a speed in rad/s (negative: turning from "
                                               "+y towards +x)", kind="range")
    w = np.array(pair("load", load))
    if not np.any(w):
        raise InputError("load", "must not be zero", value=tuple(w),
                         expected="(Wx, Wy) in N with some magnitude", kind="range")
    mu = number("viscosity", viscosity)
    if mu <= 0.0:
        raise InputError("viscosity", "must be positive", value=mu, kind="range")
    return omega, w, mu


@one_blas_thread
def find_equilibrium(geometry, speed, load, viscosity, *, options=FilmOptions(),
                     tolerance=1e-9, max_iterations=50, start=None):
    """Find the journal position where the film carries ``load``.

    Parameters
    ----------
    geometry : PlainBore, LobedBore or another film geometry
    speed : float
        Journal spin (rad/s), positive from +x towards +y.
    load : pair of float
        ``(Wx, Wy)`` (N) acting on the journal.
    viscosity : float
        Pa s.
    options : FilmOptions
    tolerance : float
        Largest ``|F + W| / |W|`` accepted.
    max_iterations : int
        Newton steps allowed (per load step when the load is ramped).
    start : pair of float, optional
        A journal position (m) to try first: a neighbouring equilibrium (the same
        bearing at a nearby speed or load) saves most of the film solves.

    Returns
    -------
    Equilibrium

    Raises
    ------
    InputError
        Bad input.
    SolverError
        No equilibrium found (say the load exceeds what the film carries
        without touching).
    """
    check_geometry(geometry)
    omega, w, mu = check_operating(speed, load, viscosity)
    tol = number("tolerance", tolerance)
    if not 0.0 < tol < 1e-2:
        raise InputError("tolerance", "is out of range", value=tol,
                         expected="between 0 and 0.01", kind="range")
    solver = _Newton(geometry, omega, mu, options, tol,
                     whole("max_iterations", max_iterations, 1, 1000))
    short = short_bearing_start(geometry, omega, w, mu) / geometry.clearance
    starts = [lambda: solver.feasible_start(short)]
    if start is not None:
        near = np.asarray(pair("start", start)) / geometry.clearance
        if solver.thinnest(near) > 0.05:
            starts.insert(0, lambda: near)
    starts += [lambda s=share: s * solver.to_wall(w) for share in (0.5, 0.8, 0.95)]
    for begin in starts:        # the later starts cost a search for the wall: only if needed
        found = solver.run(w, begin())
        if found is not None:
            return _result(geometry, omega, w, mu, solver, found)
    u = np.zeros(2)
    for share in np.linspace(0.1, 1.0, 10):
        u = solver.run(share * w, u)
        if u is None:
            raise SolverError(f"no film equilibrium found for the load ({w[0]:.6g}, "
                              f"{w[1]:.6g}) N at {omega:.6g} rad/s: the film may not carry "
                              "it (started from the short-bearing estimate, from three points "
                              "along the load and with the load applied in ten steps)")
    return _result(geometry, omega, w, mu, solver, u)


class _Newton:
    """Newton's method on the position in clearances; counts its film solves."""

    def __init__(self, geometry, omega, mu, options, tol, max_iterations):
        self.geometry, self.omega, self.mu, self.options = geometry, omega, mu, options
        self.tol, self.max_iterations = tol, max_iterations
        self.c = geometry.clearance
        self.solves = self.iterations = 0
        self.film = None

    def thinnest(self, u):
        x, y = u * self.c
        return min(land.closest(x, y)[0] for land in self.geometry.lands) / self.c

    def to_wall(self, direction):
        """The position (clearances) where the journal, moved along ``direction``, meets
        the bore (bisection: the lands' thinnest film falls along any ray)."""
        unit = np.asarray(direction, dtype=float) / float(np.hypot(*direction))
        low, high = 0.0, 1.0
        while self.thinnest(high * unit) > 0.0:
            low, high = high, 2.0 * high
        for _ in range(40):
            mid = 0.5 * (low + high)
            low, high = (mid, high) if self.thinnest(mid * unit) > 0.0 else (low, mid)
        return low * unit

    def feasible_start(self, u):
        while self.thinnest(u) < 0.1:
            u = 0.5 * u
        return u

    def force(self, u, start=None):
        self.solves += 1
        return _solve(self.geometry, self.omega, self.mu, tuple(u * self.c),
                      options=self.options, start=start)

    def run(self, w, u):
        """The equilibrium under ``w`` from ``u`` (clearances), or None.

        The Jacobian is a forward difference at the start and after a failed line
        search, and a Broyden update in between (one film solve a step, not three).
        """
        scale = float(np.hypot(*w))
        film = self.force(u, self.film)
        r = (film.force + w) / scale
        jac = None
        for _ in range(self.max_iterations):
            if np.hypot(*r) <= self.tol:
                self.film = film
                return u
            self.iterations += 1
            fresh = jac is None
            if fresh:
                jac = self._jacobian(u, r, w, scale, film)
            try:
                step = -np.linalg.solve(jac, r)
            except np.linalg.LinAlgError:
                return None
            step *= min(1.0, 0.5 / max(float(np.hypot(*step)), 1e-300))
            new, u_new, r_new = self._line_search(u, r, step, film, w, scale)
            if new is None:
                if fresh:
                    return None
                jac = None              # a stale Jacobian: take a fresh one and retry
                continue
            s_u, s_r = u_new - u, r_new - r
            jac = jac + np.outer(s_r - jac @ s_u, s_u) / float(s_u @ s_u)
            film, u, r = new, u_new, r_new
        return None

    def _jacobian(self, u, r, w, scale, film):
        jac = np.empty((2, 2))
        for j, du in enumerate(np.eye(2) * 1e-6):
            jac[:, j] = (self.force(u + du, film).force / scale - (r - w / scale)) / 1e-6
        return jac

    def _line_search(self, u, r, step, film, w, scale):
        """Halve the step until the residual falls (and the journal stays off the wall)."""
        size = float(np.hypot(*r))
        lam = 1.0
        for _ in range(30):
            trial = u + lam * step
            if self.thinnest(trial) > WALL:
                new = self.force(trial, film)
                r_new = (new.force + w) / scale
                if np.hypot(*r_new) < (1.0 - 1e-4 * lam) * size:
                    return new, trial, r_new
            lam *= 0.5
        return None, u, r


def _result(geometry, omega, w, mu, solver, u):
    film = solver.film
    c = geometry.clearance
    position = u * c
    load = float(np.hypot(*w))
    cross = w[0] * position[1] - w[1] * position[0]
    phi = math.atan2(cross, float(np.dot(w, position))) * math.copysign(1.0, omega)
    radius = 0.5 * geometry.diameter
    sommerfeld = (mu * abs(omega) / (2.0 * math.pi) * geometry.length * geometry.diameter
                  / load * (radius / c) ** 2)
    position.flags.writeable = False
    w = w.copy()
    w.flags.writeable = False
    return Equilibrium(position=position, eccentricity_ratio=float(np.hypot(*u)),
                       attitude_angle=phi, sommerfeld=sommerfeld,
                       min_thickness=film.min_thickness, side_leakage=film.side_leakage,
                       power_loss=film.power_loss, load=w, speed=omega, viscosity=mu,
                       clearance=c, residual=float(np.hypot(*(film.force + w)) / load),
                       iterations=solver.iterations, film_solves=solver.solves, film=film)
