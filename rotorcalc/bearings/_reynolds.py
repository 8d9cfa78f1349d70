"""Reynolds' equation on one land: the finite-volume system and its complementarity solve.

Nodes ``(i, j)``: ``i`` along the arc (``theta_i = start + i dtheta``), ``j``
along the half length from the mid-plane (``j = 0``, zero axial gradient by
symmetry: a half cell) to the end (``j = n_z``, ``p = 0``).  An open land's
edge nodes (``i = 0`` and ``i = n_theta``) carry the groove pressure; a closed
land is periodic.  The flux through a face is ``-h^3 / (12 mu) dp/dn`` times
the face width (``h`` evaluated exactly at the face's middle), plus the
Couette flux ``U h / 2`` through the circumferential faces, so the scheme
conserves mass cell by cell and is second order in ``dtheta`` and ``dz``.

The equations are symmetric positive definite and banded once a closed land
is numbered 0, n-1, 1, n-2, ... around its circle: each solve is a banded
Cholesky factorisation (LAPACK's ``dpbsv``, as ``scipy.linalg.solveh_banded`` calls it,
called directly: a pad's film is small, and the wrapper's checks cost more than the solve).
"""

from __future__ import annotations

import functools
from dataclasses import dataclass

import numpy as np
from scipy.linalg import get_lapack_funcs

from ..errors import SolverError

_PBSV = get_lapack_funcs("pbsv", dtype=np.float64)


@dataclass(frozen=True)
class LandGrid:
    """Node angles of one land and the steps of its half-length grid."""

    theta: np.ndarray     # node angles (rad)
    dtheta: float
    dz: float
    n_z: int
    closed: bool

    @property
    def shape(self):
        return self.theta.size, self.n_z + 1

    @property
    def faces(self):
        """Angles of the circumferential faces between neighbouring nodes."""
        count = self.theta.size if self.closed else self.theta.size - 1
        return self.theta[:count] + 0.5 * self.dtheta

    def z_weights(self):
        """Axial widths of the control volumes (half cells at mid-plane and end)."""
        w = np.full(self.n_z + 1, self.dz)
        w[0] = w[-1] = 0.5 * self.dz
        return w

    def theta_weights(self):
        """Angular widths of the control volumes (half cells at an open land's edges)."""
        w = np.full(self.theta.size, self.dtheta)
        if not self.closed:
            w[0] = w[-1] = 0.5 * self.dtheta
        return w


def land_grid(start, end, n_theta, n_z, length, closed):
    """The grid of one land: ``n_theta`` steps along the arc, ``n_z`` over half the length."""
    dtheta = (end - start) / n_theta
    count = n_theta if closed else n_theta + 1
    return LandGrid(start + dtheta * np.arange(count), dtheta, 0.5 * length / n_z, n_z, closed)


@functools.lru_cache(maxsize=64)
def _faces_of(ni, nj, closed):
    """Node pairs ``(a, b)`` of the circumferential and the axial faces (flat indices)."""
    index = np.arange(ni * nj).reshape(ni, nj)
    if closed:
        circ = (index, np.roll(index, -1, axis=0))
    else:
        circ = (index[:-1], index[1:])
    out = circ, (index[:, :-1], index[:, 1:])
    for pair in out:
        for a in pair:
            a.flags.writeable = False
    return out


@functools.lru_cache(maxsize=64)
def _layout(ni, nj, closed):
    """Everything of a land's system that depends on its grid's shape only: the faces'
    node pairs ``a``, ``b`` (circumferential, then axial), the band order ``pos``, the
    band's half width and each face's place in the band (``row``, ``col``; upper form)."""
    (ca, cb), (za, zb) = _faces_of(ni, nj, closed)
    a, b = np.concatenate([ca.ravel(), za.ravel()]), np.concatenate([cb.ravel(), zb.ravel()])
    pos, width = _band_order_of(ni, nj, closed)
    lo, hi = np.minimum(pos[a], pos[b]), np.maximum(pos[a], pos[b])
    row = width + lo - hi
    for array in (a, b, row, hi):
        array.flags.writeable = False
    return a, b, pos, width, row, hi


@functools.lru_cache(maxsize=64)
def _band_order_of(ni, nj, closed):
    if closed:
        ring = np.empty(ni, dtype=int)
        ring[np.r_[0:ni:2]] = np.arange((ni + 1) // 2)
        ring[np.r_[1:ni:2]] = ni - 1 - np.arange(ni // 2)
        place = np.empty(ni, dtype=int)
        place[ring] = np.arange(ni)
        width = 2 * nj
    else:
        place, width = np.arange(ni), nj
    pos = (place[:, None] * nj + np.arange(nj)[None, :]).ravel()
    pos.flags.writeable = False
    return pos, width


@dataclass(frozen=True)
class LandSystem:
    """The finite-volume equations of one land: ``(G p)_n = s_n`` at every free node.

    ``G`` is kept as its faces: face ``f`` joins nodes ``a[f]`` and ``b[f]`` with
    conductance ``g[f]`` (m^3/(s Pa)), so ``(G p)_n`` is the net pressure-driven
    outflow of node ``n``'s control volume; ``s`` (m^3/s) is the flow that the
    Couette and squeeze terms bring into it.
    """

    a: np.ndarray
    b: np.ndarray
    g: np.ndarray
    s: np.ndarray
    pos: np.ndarray
    width: int
    row: np.ndarray     # each face's place in the band (upper form)
    col: np.ndarray

    @property
    def diagonal(self):
        n = self.s.size
        return np.bincount(self.a, self.g, n) + np.bincount(self.b, self.g, n)

    def outflow(self, p):
        """``G p``: the net pressure-driven outflow of each control volume (m^3/s)."""
        n = self.s.size
        drop = self.g * (p[self.a] - p[self.b])
        return np.bincount(self.a, drop, n) - np.bincount(self.b, drop, n)

    def solve(self, held, value):
        """Pressures with the nodes ``held`` at ``value`` and the equations elsewhere."""
        n = self.s.size
        free = ~held
        rhs = np.where(held, value, self.s)
        both = free[self.a] & free[self.b]
        # a held neighbour's pressure moves to the right-hand side
        rhs += np.bincount(self.a, np.where(free[self.a] & held[self.b],
                                            self.g * value[self.b], 0.0), n)
        rhs += np.bincount(self.b, np.where(free[self.b] & held[self.a],
                                            self.g * value[self.a], 0.0), n)
        band = np.zeros((self.width + 1, n))
        band[-1, self.pos] = np.where(held, 1.0, self.diagonal)
        band[self.row[both], self.col[both]] = -self.g[both]      # each pair of nodes once
        ordered = np.empty(n)
        ordered[self.pos] = rhs
        _, x, info = _PBSV(band, ordered, lower=0, overwrite_ab=1, overwrite_b=1)
        if info != 0:
            raise SolverError(f"the film's equations are not positive definite (LAPACK "
                              f"dpbsv: {info})")
        return x[self.pos]


def assemble(grid, h_node, h_face, h_dot, *, radius, viscosity, surface_speed):
    """The land's equations for the film thickness ``h`` and its rate ``dh/dt``.

    Parameters
    ----------
    grid : LandGrid
    h_node, h_face : ndarray
        Thickness at the nodes and at the circumferential faces (m).
    h_dot : ndarray
        Thickness rate at the nodes (m/s).

    Returns
    -------
    LandSystem
    """
    ni, nj = grid.shape
    wz = grid.z_weights()
    k = 1.0 / (12.0 * viscosity)
    arc = radius * grid.dtheta
    a, b, pos, width, row, col = _layout(ni, nj, grid.closed)
    g_circ = (k * h_face[:, None] ** 3 / arc) * wz[None, :]
    g_axial = np.broadcast_to((k * h_node[:, None] ** 3) * arc / grid.dz, (ni, nj - 1))
    # Couette inflow U/2 (h_west - h_east) and squeeze -dh/dt over each control volume
    if grid.closed:
        h_east, h_west = h_face, np.roll(h_face, 1)
    else:   # the edge nodes are held at the groove pressure: any value will do
        h_east = np.concatenate([h_face, [h_face[-1]]])
        h_west = np.concatenate([[h_face[0]], h_face])
    inflow = 0.5 * surface_speed * (h_west - h_east) - h_dot * arc
    return LandSystem(a, b, np.concatenate([g_circ.ravel(), g_axial.ravel()]),
                      (inflow[:, None] * wz[None, :]).ravel(), pos, width, row, col)


def fixed_values(grid, edge_pressure):
    """Mask of the nodes whose pressure is given, and those pressures (Pa)."""
    return _fixed_values_of(*grid.shape, grid.closed, float(edge_pressure))


@functools.lru_cache(maxsize=64)
def _fixed_values_of(ni, nj, closed, edge_pressure):
    fixed = np.zeros((ni, nj), dtype=bool)
    value = np.zeros((ni, nj))
    fixed[:, -1] = True                     # p = 0 at the axial end
    if not closed:
        fixed[0, :] = fixed[-1, :] = True
        value[0, :-1] = value[-1, :-1] = edge_pressure
    fixed, value = fixed.ravel(), value.ravel()
    fixed.flags.writeable = value.flags.writeable = False
    return fixed, value


def positive_part_weights(p, grid):
    """Angular quadrature weights (rad) for the integral of ``max(p, 0)`` over a land.

    Trapezoidal rule on each step, except where ``p`` changes sign within it: there
    the zero is placed by linear interpolation and the positive part integrated
    as a triangle.  The clipped (half-Sommerfeld) force is then second order in
    the step and changes smoothly as the zero moves (no jump when it crosses a node).
    """
    if grid.closed:
        left, right = p, np.roll(p, -1, axis=0)
    else:
        left, right = p[:-1], p[1:]
    with np.errstate(divide="ignore", invalid="ignore"):
        share_left = np.where(left > 0.0, np.where(right >= 0.0, 1.0,
                                                   left / (left - right)), 0.0)
        share_right = np.where(right > 0.0, np.where(left >= 0.0, 1.0,
                                                     right / (right - left)), 0.0)
    w = np.zeros(p.shape)
    half = 0.5 * grid.dtheta
    if grid.closed:
        w += half * share_left + np.roll(half * share_right, 1, axis=0)
    else:
        w[:-1] += half * share_left
        w[1:] += half * share_right
    return w


def complementarity(system, fixed, value, active=None, max_iterations=100):
    """Solve ``p >= 0, G p - s >= 0, p (G p - s) = 0`` at the free nodes.

    A primal-dual active set: the nodes held at zero (``active``) are chosen
    anew from each solution as those where ``(G p - s)_n / G_nn - p_n > 0``.
    ``G`` restricted to the free nodes is an M-matrix, so the iteration ends
    after finitely many steps from any start (Hintermueller, Ito and Kunisch,
    SIAM J. Optim. 13, 2002, from memory); it ends when the set repeats, and
    the complementarity conditions then hold exactly up to roundoff.

    Parameters
    ----------
    system : LandSystem
    fixed, value : ndarray
        Nodes of given pressure and those pressures (edges and ends).
    active : ndarray of bool, optional
        Nodes held at zero to start from (a previous solution's ruptured
        region); by default the full film's negative region.

    Returns
    -------
    p : ndarray
    active : ndarray of bool
    solves : int

    Raises
    ------
    SolverError
        When the set still changes after ``max_iterations`` solves.
    """
    diag = system.diagonal
    solves = 0
    if active is None:
        p = system.solve(fixed, value)
        solves = 1
        active = ~fixed & (p < 0.0)
        if not active.any():
            return p, active, solves
    while solves < max_iterations:
        p = system.solve(fixed | active, np.where(active, 0.0, value))
        solves += 1
        tol = 1e-12 * max(float(np.abs(p).max()), 1e-300)
        new = ~fixed & ((system.outflow(p) - system.s) / diag - p > tol)
        if np.array_equal(new, active):
            return np.where(fixed, p, np.maximum(p, 0.0)), active, solves
        active = new
    raise SolverError(f"the cavitation (complementarity) iteration did not settle in "
                      f"{max_iterations} solves")
