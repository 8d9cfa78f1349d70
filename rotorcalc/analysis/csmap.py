"""Critical-speed map: undamped synchronous critical speeds against bearing stiffness.

Every bearing is replaced by an isotropic spring of stiffness ``k`` (no
damping, no cross-coupling; supports are kept, in series); seals keep their
own direct stiffness at the maximum continuous speed.  A synchronous
whirl ``q = Re(phi e^{i W t})`` of the undamped spinning rotor satisfies

    (K(k) - W^2 M + i W^2 G) phi = 0,   i.e.   K(k) phi = W^2 (M - i G) phi,

a generalized eigenproblem with real symmetric ``K`` and Hermitian
``M - i G``; its positive eigenvalues are the squared critical speeds, the
gyroscopic effect included, and the whirl of each eigenvector tells forward
from backward.

When the system is isotropic (every bearing becomes an isotropic spring, so
this holds unless a seal or a support differs between x and y), ``K`` and
``M - iG`` commute with the quarter turn about the shaft axis and the
problem splits exactly into a forward part (``y = -i x``, ``b = -i a`` at
every node) and a backward part (``y = +i x``).  The map then solves only the
part asked for, half the size.  Solving the full problem instead would leave
the whirl of a degenerate pair to roundoff: without gyroscopic coupling
(Euler-Bernoulli shafts, rigid disks without inertia) or where it vanishes
(the bounce mode of a symmetric rotor) the forward and backward criticals
coincide, the eigensolver returns an arbitrary basis of their plane, and one
critical could be listed twice as forward, or not at all.

The bearings' own direct stiffness curves over speed are crossed with the map
curves to give the criticals the real bearings produce.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import scipy.linalg as la
import scipy.sparse as sp
import scipy.sparse.linalg as spla
from scipy.optimize import brentq

from ..assembly import SystemMatrices, assemble
from ..fe import bearing as fe_bearing
from ..errors import SolverError
from ..solvers import NUMERICAL_FAILURES
from ..units import to_rpm
from ..vocabulary import old_keywords
from .modes import forward_fraction
from .sweep import default_speeds

#: Above this many DOFs the map uses sparse shift-invert instead of dense solves.
DENSE_LIMIT = 600
#: Speeds at which each bearing curve is sampled (crossings are then refined).
CURVE_POINTS = 25
#: Relative tolerance of the isotropy test (quarter turn about the shaft axis).
ISOTROPY_RTOL = 1e-12


def _quarter_turn(n):
    """The rotation (u, v) -> (-v, u) of every DOF pair (x, y), (a, b), (xs, ys)."""
    even, odd = np.arange(0, n, 2), np.arange(1, n, 2)
    rows = np.concatenate([even, odd])
    cols = np.concatenate([odd, even])
    vals = np.concatenate([-np.ones(even.size), np.ones(odd.size)])
    return sp.csr_matrix((vals, (rows, cols)), shape=(n, n))


def _invariant(mat, turn):
    """True when ``turn.T @ mat @ turn == mat`` to :data:`ISOTROPY_RTOL`."""
    diff = abs(turn.T @ mat @ turn - mat)
    scale = abs(mat).max() if mat.nnz else 0.0
    return (diff.max() if diff.nnz else 0.0) <= ISOTROPY_RTOL * max(scale, np.finfo(float).tiny)


def _circular_basis(n, sign):
    """Columns (e_u + sign i e_v) / sqrt 2, one per DOF pair: sign -1 forward, +1 backward."""
    pairs = np.arange(n // 2)
    rows = np.concatenate([2 * pairs, 2 * pairs + 1])
    cols = np.concatenate([pairs, pairs])
    vals = np.concatenate([np.ones(pairs.size), sign * 1j * np.ones(pairs.size)]) / np.sqrt(2.0)
    return sp.csr_matrix((vals, (rows, cols)), shape=(n, n // 2))


@dataclass(frozen=True)
class BearingCurve:
    """A bearing's direct stiffness over speed, as drawn on the map."""

    bearing: str
    direction: str          # "kxx" or "kyy"
    speeds: np.ndarray      # rad/s
    stiffness: np.ndarray   # N/m


@dataclass(frozen=True)
class Crossing:
    """Where a bearing's stiffness curve meets a critical-speed curve."""

    bearing: str
    direction: str
    mode: int          # the map curve, from 1 (lowest critical speed at each stiffness)
    speed: float
    stiffness: float

    def to_dict(self):
        return {"bearing": self.bearing, "direction": self.direction, "mode": self.mode,
                "speed_rpm": float(to_rpm(self.speed)), "stiffness_n_m": self.stiffness}


@dataclass(frozen=True)
class CriticalSpeedMap:
    """Undamped synchronous critical speeds over a log-spaced support stiffness.

    Attributes
    ----------
    stiffness : ndarray (n_k,)
        N/m.
    speeds : ndarray (n_k, n_modes)
        Critical speeds, rad/s, lowest first (forward whirl unless asked otherwise).
    shapes : complex ndarray (n_k, n_modes, n_nodes, 2)
    curves : tuple of BearingCurve
    crossings : tuple of Crossing
    """

    stiffness: np.ndarray
    speeds: np.ndarray
    shapes: np.ndarray
    node_z: np.ndarray
    station_nodes: np.ndarray
    whirl: str
    curves: tuple
    crossings: tuple

    def to_dict(self):
        return {
            "whirl": self.whirl,
            "stiffness_n_m": [float(v) for v in self.stiffness],
            "modes": [{"mode": j + 1,
                       "critical_speed_rpm": [float(v) if np.isfinite(v) else None
                                              for v in to_rpm(self.speeds[:, j])]}
                      for j in range(self.speeds.shape[1])],
            "bearing_curves": [{"bearing": c.bearing, "direction": c.direction,
                                "speeds_rpm": [float(v) for v in to_rpm(c.speeds)],
                                "stiffness_n_m": [float(v) for v in c.stiffness]}
                               for c in self.curves],
            "crossings": [c.to_dict() for c in self.crossings],
        }


class _MapProblem:
    """K(k) = K0 + k B and the Hermitian mass M - iG of one assembled rotor."""

    def __init__(self, system: SystemMatrices):
        self.system = system
        n = system.n_dof
        rows, cols, vals = [], [], []
        seals = sp.csr_matrix((n, n))
        at_speed = system.rotor.operating.max_speed
        for link in system.links:
            d = link.dofs
            if link.bearing.role == "seal":
                # a seal keeps its own direct stiffness (at the maximum continuous speed)
                k2 = np.diag(np.diag(link.bearing.matrices(at_speed)[0]))
                block = fe_bearing.element(k2, len(d))
                r, c = np.meshgrid(d, d, indexing="ij")
                seals = seals + sp.csr_matrix((block.ravel(), (r.ravel(), c.ravel())),
                                              shape=(n, n))
                continue
            block = fe_bearing.element(np.eye(2), len(d))
            r, c = np.meshgrid(d, d, indexing="ij")
            rows.append(r.ravel())
            cols.append(c.ravel())
            vals.append(block.ravel())
        if rows:
            self.unit = sp.coo_matrix((np.concatenate(vals), (np.concatenate(rows),
                                                              np.concatenate(cols))),
                                      shape=(n, n)).tocsr()
        else:
            self.unit = sp.csr_matrix((n, n))
        self.k0 = (system.shaft_stiffness + system.support_stiffness + seals).tocsr()
        self.mass = (system.mass - 1j * system.gyroscopic).tocsr()
        self._solved = {}
        # isotropic: the forward and backward parts decouple exactly (module docstring)
        turn = _quarter_turn(n)
        self.isotropic = (n % 2 == 0 and _invariant(self.k0, turn)
                          and _invariant(self.unit, turn) and _invariant(self.mass, turn))

    def solve(self, k, n_modes, whirl="forward"):
        """Lowest ``n_modes`` critical speeds (rad/s) of the given whirl and their shapes.

        Remembered per (k, n_modes, whirl): a bearing with constant coefficients puts the
        same stiffness at every point of its curve.
        """
        key = (float(k), int(n_modes), whirl)
        if key not in self._solved:
            self._solved[key] = self._solve(k, n_modes, whirl)
        speeds, shapes = self._solved[key]
        return speeds.copy(), shapes.copy()

    def _solve(self, k, n_modes, whirl):
        s = self.system
        kk = self.k0 + k * self.unit
        mm = self.mass
        basis = None
        if self.isotropic:
            # only the part of the whirl asked for: y = -i x (forward) or y = +i x
            basis = _circular_basis(s.n_dof, -1.0 if whirl == "forward" else 1.0)
            kk = (basis.conj().T @ kk @ basis).tocsr()
            mm = (basis.conj().T @ mm @ basis).tocsr()
        size = kk.shape[0]
        want = 2 * n_modes + 6
        lu = None
        while True:
            dense = s.n_dof <= DENSE_LIMIT or want >= size - 2
            try:
                if dense:
                    values, vectors = la.eig(kk.toarray(), mm.toarray())
                else:
                    if lu is None:
                        lu = spla.splu(kk.tocsc().astype(complex))
                    values, vectors = _largest_inverse(lu, mm, want)
            except NUMERICAL_FAILURES as exc:
                raise SolverError(f"the critical-speed map's eigen-solve at a support "
                                  f"stiffness of {k:.4g} N/m failed ({type(exc).__name__}: "
                                  f"{exc})") from None
            if basis is not None:
                vectors = basis @ vectors
            values = values.real
            good = np.isfinite(values) & (values > 0)
            values, vectors = values[good], vectors[:, good]
            t = s.translation_dofs
            shapes = np.stack([vectors[t[:, 0]].T, vectors[t[:, 1]].T], axis=-1)
            ff = forward_fraction(shapes)
            keep = ff >= 0.5 if whirl == "forward" else ff < 0.5
            values, shapes = values[keep], shapes[keep]
            # the sparse solve returns the `want` largest |1/W^2|: every
            # positive one found is complete below the smallest found, but
            # negative ones (M - iG is indefinite) or the other whirl may
            # take slots, so ask for more until n_modes are in hand
            if dense or values.size >= n_modes:
                break
            want *= 2
        order = np.argsort(values)[:n_modes]
        speeds = np.sqrt(values[order])
        shapes = shapes[order]
        peak = shapes.reshape(len(order), -1)
        idx = np.argmax(np.abs(peak), axis=1)
        norm = peak[np.arange(len(order)), idx]
        shapes = shapes / np.where(np.abs(norm) > 0, norm, 1.0)[:, None, None]
        out_speeds = np.full(n_modes, np.nan)
        out_shapes = np.full((n_modes,) + shapes.shape[1:], np.nan + 0j)
        out_speeds[:len(order)], out_shapes[:len(order)] = speeds, shapes
        return out_speeds, out_shapes


def _largest_inverse(lu, mass, want):
    """The ``want`` eigenpairs of ``K phi = W^2 H phi`` with the largest
    ``|1/W^2|``, from the standard problem ``K^-1 H phi = (1/W^2) phi``.

    ARPACK's generalized shift-invert mode would use ``H = M - iG`` as an
    inner product, which needs it positive (semi-)definite; the gyroscopic
    part makes it indefinite, and that mode then returns spurious values.
    ``K`` (``lu``, its sparse LU) is positive definite for a supported rotor.
    """
    h = mass.tocsc().astype(complex)
    op = spla.LinearOperator(h.shape, matvec=lambda x: lu.solve(h @ x), dtype=complex)
    mu, vectors = spla.eigs(op, k=want, which="LM")
    with np.errstate(divide="ignore", invalid="ignore"):
        values = 1.0 / mu
    return values, vectors


def bearing_curves(rotor, speeds):
    """Direct stiffness (kxx and kyy) of every bearing over ``speeds`` (end values held)."""
    out = []
    for i, b in enumerate(rotor.bearings):
        if b.role == "seal":
            continue  # a seal is not a support: its curve would not mean a critical
        for j, name in enumerate(("kxx", "kyy")):
            k = np.array([b.matrices(w)[0][j, j] for w in speeds])
            out.append(BearingCurve(b.name or f"B{i + 1}", name, np.asarray(speeds), k))
    return tuple(out)


@old_keywords(n_modes="mode_count")
def critical_speed_map(rotor_or_system, stiffness=None, mode_count=4, whirl="forward",
                       speeds=None):
    """The critical-speed map and the crossings with the bearings' own curves.

    Parameters
    ----------
    rotor_or_system : Rotor or SystemMatrices
    stiffness : array_like, optional
        Support stiffness values, N/m; by default 41 values log-spaced over
        four decades around the bearings' mean direct stiffness.
    mode_count : int
        Number of critical-speed curves.
    whirl : {"forward", "backward"}
    speeds : array_like, optional
        Speeds (rad/s) at which the bearing curves are drawn; by default the
        analysis sweep of the rotor.
    """
    system = rotor_or_system if isinstance(rotor_or_system, SystemMatrices) \
        else assemble(rotor_or_system)
    rotor = system.rotor
    if speeds is None:
        sweep_speeds = default_speeds(rotor)
        speeds = np.linspace(sweep_speeds[0], sweep_speeds[-1], CURVE_POINTS)
    curves = bearing_curves(rotor, np.asarray(speeds, dtype=float))
    if stiffness is None:
        from .stiffness_study import default_stiffness
        stiffness = default_stiffness(rotor, speeds=speeds)
    stiffness = np.asarray(stiffness, dtype=float)
    n_modes = mode_count
    problem = _MapProblem(system)
    solved = [problem.solve(k, n_modes, whirl) for k in stiffness]
    crit = np.array([s[0] for s in solved])
    shapes = np.array([s[1] for s in solved])
    crossings = []
    for curve in curves:
        # one solve per curve speed gives every mode; refine each crossing with fresh solves
        on_curve = np.array([problem.solve(k, n_modes, whirl)[0] for k in curve.stiffness])
        for j in range(n_modes):
            gap = on_curve[:, j] - curve.speeds
            for a in np.nonzero(np.sign(gap[:-1]) * np.sign(gap[1:]) < 0)[0]:
                def g(w, curve=curve, j=j):
                    k = float(np.interp(w, curve.speeds, curve.stiffness))
                    return problem.solve(k, j + 1, whirl)[0][j] - w
                w = brentq(g, curve.speeds[a], curve.speeds[a + 1], rtol=1e-10)
                k = float(np.interp(w, curve.speeds, curve.stiffness))
                crossings.append(Crossing(curve.bearing, curve.direction, j + 1, float(w), k))
    crossings.sort(key=lambda c: (c.speed, c.bearing, c.direction))
    return CriticalSpeedMap(stiffness, crit, shapes, system.mesh.node_z, system.mesh.station_nodes,
                            whirl, curves, tuple(crossings))


def map_mode_shape(rotor_or_system, stiffness, mode, whirl="forward"):
    """Critical speed (rad/s) and shape (n_nodes, 2) of one map curve at one stiffness;
    ``mode`` is the curve's position (0-based: curve ``mode + 1``)."""
    system = rotor_or_system if isinstance(rotor_or_system, SystemMatrices) \
        else assemble(rotor_or_system)
    speeds, shapes = _MapProblem(system).solve(float(stiffness), mode + 1, whirl)
    return float(speeds[mode]), shapes[mode]
