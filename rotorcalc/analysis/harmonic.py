"""Harmonic solves of the rotor: the dynamic stiffness at a speed, factored once per speed.

At each speed ``w`` the harmonic equation

    Z(w) Q = w^2 F0,   Z(w) = K(w) - w^2 M + i w (C(w) + w G)

is solved with a sparse complex LU factorisation.  The fill-reducing order
(reverse Cuthill-McKee of the fixed sparsity pattern) is computed once and
reused at every speed.  ``q(t) = Re(Q e^{i w t})``.  An unbalance ``U`` at
phase ``phi`` gives ``F0 = U e^{i phi} (1, -i)`` on the station's x and y,
the complex form of ``U w^2 (cos(w t + phi), sin(w t + phi))``.
"""

from __future__ import annotations

import math

import numpy as np
import scipy.sparse as sp
import scipy.sparse.linalg as spla
from scipy.sparse.csgraph import reverse_cuthill_mckee

from ..assembly import SystemMatrices
from ..errors import SolverError
from ..solvers import NUMERICAL_FAILURES, one_blas_thread
from ..units import to_rpm


class HarmonicSolver:
    """Sparse harmonic solves of one system, reusing one fill-reducing order."""

    def __init__(self, system: SystemMatrices):
        self.system = system
        pattern = (abs(system.mass) + abs(system.shaft_stiffness) + abs(system.gyroscopic)
                   + abs(system.support_stiffness) + abs(system.stiffness(0.0))
                   + abs(system.damping(0.0)))
        pattern = (pattern + pattern.T).tocsr()
        for link in system.links:  # bearing cross terms appear at every speed
            r, c = np.meshgrid(link.dofs, link.dofs, indexing="ij")
            pattern = pattern + sp.csr_matrix((np.ones(r.size), (r.ravel(), c.ravel())),
                                              shape=pattern.shape)
        self.order = reverse_cuthill_mckee(pattern.tocsr(), symmetric_mode=True)

    def dynamic_stiffness(self, omega):
        s = self.system
        return (s.stiffness(omega) - omega * omega * s.mass
                + 1j * omega * (s.damping(omega) + omega * s.gyroscopic))

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
            z = self.dynamic_stiffness(w).tocsc()[p][:, p].tocsc()
            try:
                lu = spla.splu(z, permc_spec="NATURAL")
                break
            except RuntimeError:  # "Factor is exactly singular"
                continue
            except NUMERICAL_FAILURES as exc:
                raise SolverError(f"the harmonic solve at {to_rpm(omega):.6g} rpm failed "
                                  f"({type(exc).__name__}: {exc})") from None
        else:
            raise SolverError(f"the harmonic solve at {to_rpm(omega):.6g} rpm failed: the "
                              "dynamic stiffness is singular")
        out = np.empty_like(rhs, dtype=complex)
        out[p] = lu.solve(np.ascontiguousarray(rhs[p], dtype=complex))
        if not np.all(np.isfinite(out)):
            raise SolverError(f"the harmonic solve at {to_rpm(omega):.6g} rpm returned values "
                              "that are not finite")
        return out


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


def solve_speeds(system, solver, force, rows, speeds):
    """Station, probe, bearing and support responses at each of ``speeds``."""
    station_dofs = system.translation_dofs[system.mesh.station_nodes]
    n_cases, n_b = force.shape[1], len(system.links)
    st = np.empty((n_cases, len(speeds), len(station_dofs), 2), dtype=complex)
    pv = np.empty((n_cases, len(speeds), rows.shape[0]), dtype=complex)
    fb = np.zeros((n_cases, len(speeds), n_b, 2), dtype=complex)
    fs = np.zeros_like(fb)
    for k, w in enumerate(speeds):
        q = solver.solve(w, w * w * force)            # (n_dof, n_cases)
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
