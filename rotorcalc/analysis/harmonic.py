"""Harmonic solves of the rotor: the dynamic stiffness at a speed, factored once per speed.

At each speed ``w`` the harmonic equation

    Z(w) Q = w^2 F0,   Z(w) = K(w) - w^2 M + i w (C(w) + w G)

is solved with a banded (or sparse) complex LU factorisation.  The sparsity
pattern and its bandwidth-reducing order (reverse Cuthill-McKee) are fixed
once; each speed only sets the values.  ``q(t) = Re(Q e^{i w t})``.  An unbalance ``U`` at
phase ``phi`` gives ``F0 = U e^{i phi} (1, -i)`` on the station's x and y,
the complex form of ``U w^2 (cos(w t + phi), sin(w t + phi))``.
"""

from __future__ import annotations

import math

import numpy as np
import scipy.sparse as sp
from scipy.sparse.csgraph import reverse_cuthill_mckee

from ..assembly import SystemMatrices
from ..errors import SolverError
from ..fe import bearing as fe_bearing
from ..pencils import BAND_LIMIT, band_lu, band_positions
from ..solvers import NUMERICAL_FAILURES, _factor, one_blas_thread
from ..units import to_rpm


class HarmonicSolver:
    """Harmonic solves of one system on one sparsity pattern and ordering.

    The pattern of ``Z`` (every matrix and every bearing's full 2x2 or 4x4 block) and its
    reverse Cuthill-McKee order are fixed once; at each speed only the values change: the
    constant parts are combined entry by entry, each bearing adds its block at known
    positions, and the matrix is factored by LAPACK's banded LU (SuperLU when the band is
    wide: :func:`rotorcalc.solvers._factor`), measured faster than a general sparse LU of
    the rebuilt matrix (docs/performance.md).
    """

    def __init__(self, system: SystemMatrices):
        self.system = system
        s = system
        parts = [s.mass, s.gyroscopic, s.shaft_stiffness + s.support_stiffness, s.support_damping]
        pattern = sum(abs(x) for x in parts)
        rows, cols = [], []
        for link in s.every_link:  # bearing cross terms appear at every speed
            r, c = np.meshgrid(link.dofs, link.dofs, indexing="ij")
            rows.append(r.ravel())
            cols.append(c.ravel())
        if rows:
            pattern = pattern + sp.csr_matrix((np.ones(sum(len(r) for r in rows)),
                                               (np.concatenate(rows), np.concatenate(cols))),
                                              shape=pattern.shape)
        pattern = (pattern + pattern.T).tocsr()
        self.order, inverse = _narrowest(pattern, [
            reverse_cuthill_mckee(pattern, symmetric_mode=True), _shaft_order(system)])
        pattern = pattern.tocoo()
        n = pattern.shape[0]
        keys = pattern.row.astype(np.int64) * n + pattern.col    # the entries, numbered
        order = np.argsort(keys)
        keys = keys[order]
        self.row, self.col = inverse[pattern.row[order]], inverse[pattern.col[order]]
        self.band = int(np.abs(self.row - self.col).max()) if pattern.nnz else 0
        self.positions = band_positions(self.row, self.col, self.band) \
            if self.band <= BAND_LIMIT else None     # in the band storage, once

        def at(r, c):
            return np.searchsorted(keys, np.asarray(r, dtype=np.int64) * n + c)

        def on_pattern(matrix):
            coo = sp.coo_matrix(matrix)
            out = np.zeros(len(keys))
            np.add.at(out, at(coo.row, coo.col), coo.data)
            return out

        self.m, self.g, self.k, self.c = (on_pattern(x) for x in parts)
        self.links = [(link, at(r, c)) for link, r, c in zip(s.every_link, rows, cols)]

    def _values(self, omega):
        """``Z(omega)`` on the fixed pattern (values in pattern order)."""
        z = self.k - omega * omega * self.m + 1j * omega * (self.c + omega * self.g)
        for link, at in self.links:
            k2, c2 = link.bearing.matrices(omega)
            np.add.at(z, at, fe_bearing.element(k2 + 1j * omega * c2, len(link.dofs)).ravel())
        return z

    def dynamic_stiffness(self, omega):
        """``Z(omega)`` as a sparse matrix in the original DOF order."""
        s = self.system
        return (s.stiffness(omega) - omega * omega * s.mass
                + 1j * omega * (s.damping(omega) + omega * s.gyroscopic))

    def _factored(self, omega):
        """A solve with ``Z(omega)``: its values placed straight into LAPACK's band storage
        (positions found once), or SuperLU's for a wide band."""
        z, n = self._values(omega), self.system.n_dof
        if self.positions is not None:
            return band_lu(self.positions, z, n, self.band)
        return _factor(sp.coo_matrix((z, (self.row, self.col)), shape=(n, n)), self.band)

    @one_blas_thread
    def solve(self, omega, rhs):
        """Solve ``Z(omega) Q = rhs`` (``rhs`` (n_dof, k) complex).

        An undamped system is singular exactly at a natural frequency (the
        response is unbounded there); the solve then moves by one part in 1e9
        of the speed, where the response is finite and huge, as it should be.
        """
        p = self.order
        for shift in (0.0, 1e-9, -1e-9):
            w = omega * (1.0 + shift)
            try:
                solve = self._factored(w)
                break
            except (RuntimeError, np.linalg.LinAlgError):  # exactly singular
                continue
            except NUMERICAL_FAILURES as exc:
                raise SolverError(f"the harmonic solve at {to_rpm(omega):.6g} rpm failed "
                                  f"({type(exc).__name__}: {exc})") from None
        else:
            raise SolverError(f"the harmonic solve at {to_rpm(omega):.6g} rpm failed: the "
                              "dynamic stiffness is singular")
        out = np.empty_like(rhs, dtype=complex)
        out[p] = solve(np.ascontiguousarray(rhs[p], dtype=complex))
        if not np.all(np.isfinite(out)):
            raise SolverError(f"the harmonic solve at {to_rpm(omega):.6g} rpm returned values "
                              "that are not finite")
        return out


def _shaft_order(system):
    """The DOFs along the shaft, each pedestal's pair right after its bearing's node: a
    chain's natural order (half-bandwidth 9 with pedestals, where reverse Cuthill-McKee
    gives 13 on the generated rotors)."""
    order = list(range(4 * system.mesh.n_nodes))
    for link in system.links:
        if len(link.dofs) == 4:
            at = order.index(int(link.dofs[1])) + 3
            order[at:at] = [int(link.dofs[2]), int(link.dofs[3])]
    return np.array(order) if len(order) == system.n_dof else None


def _narrowest(pattern, orders):
    """The order of ``orders`` (None skipped) with the narrowest band of ``pattern``; the
    first on a tie.  Returns the order and its inverse."""
    coo = pattern.tocoo()
    best = None
    for order in orders:
        if order is None:
            continue
        inverse = np.empty_like(order)
        inverse[order] = np.arange(len(order))
        band = int(np.abs(inverse[coo.row] - inverse[coo.col]).max()) if coo.nnz else 0
        if best is None or band < best[0]:
            best = (band, order, inverse)
    return best[1], best[2]


def unbalance_forces(system: SystemMatrices, cases):
    """Unit-speed force vectors F0 (n_dof, n_cases): the force is w^2 F0."""
    f = np.zeros((system.n_dof, len(cases)), dtype=complex)
    for j, case in enumerate(cases):
        for w in case.weights:
            node = system.mesh.station_nodes[w.station]
            dofs = system.node_dofs(node)
            amp = w.amount * np.exp(1j * w.phase)
            f[dofs[0], j] += amp
            f[dofs[1], j] += -1j * amp
    return f


def probe_rows(system, probes):
    """Each probe as a row vector: displacement along its direction."""
    rows = np.zeros((len(probes), system.n_dof))
    for j, p in enumerate(probes):
        dofs = system.node_dofs(system.mesh.station_nodes[p.station])
        rows[j, dofs[0]], rows[j, dofs[1]] = math.cos(p.angle), math.sin(p.angle)
    return rows


def solve_speeds(system, solver, force, rows, speeds, solved=None):
    """Station, probe, bearing and support responses at each of ``speeds``; ``solved``
    (speed -> response, every case) holds speeds solved already."""
    station_dofs = system.translation_dofs[system.mesh.station_nodes]
    n_cases, n_b = force.shape[1], len(system.links)
    st = np.empty((n_cases, len(speeds), len(station_dofs), 2), dtype=complex)
    pv = np.empty((n_cases, len(speeds), rows.shape[0]), dtype=complex)
    fb = np.zeros((n_cases, len(speeds), n_b, 2), dtype=complex)
    fs = np.zeros_like(fb)
    for k, w in enumerate(speeds):
        q = solved[w] if solved and w in solved else solver.solve(w, w * w * force)
        st[:, k] = np.transpose(q[station_dofs], (2, 0, 1))
        pv[:, k] = (rows @ q).T
        for b, link in enumerate(system.links):
            kb, cb = link.bearing.matrices(w)
            rel = q[link.dofs[:2]] - (q[link.dofs[2:]] if len(link.dofs) == 4 else 0.0)
            fb[:, k, b] = ((kb + 1j * w * cb) @ rel).T
            if len(link.dofs) == 4:
                sup = link.bearing.support
                ks = np.diag([sup.kx, sup.ky]) + 1j * w * np.diag([sup.cx, sup.cy])
                fs[:, k, b] = (ks @ q[link.dofs[2:]]).T
            else:
                fs[:, k, b] = fb[:, k, b]
    return st, pv, fb, fs
