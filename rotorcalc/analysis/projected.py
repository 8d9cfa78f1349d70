"""Eigen-solves on a fixed subspace, every pair certified in the full model.

A study that changes one term of a model step by step (the cross-coupling screen: one
speed, the applied cross-coupling swept from zero to its top) finds its low modes in a small
subspace: the full model's modes at the two ends of the study and the static deflections
under the changing term.  :class:`ProjectedSolver` projects each state onto that basis ``V``
(real, orthonormal columns), solves the small dense pencil ``(V^T M V, V^T D V, V^T K V)``,
lifts the vectors, and checks every returned pair by its relative backward error in the full
model,

    eta = |Q(lam) x| / ((|lam|^2 |M| + |lam| |D| + |K|) |x|),   Q(lam) = lam^2 M + lam D + K,

(1-norms of the matrices): a pair with ``eta`` at most :data:`LIMIT` is an exact eigenpair
of a model that differs from the full one by that share.  A state where any pair fails,
where the reduced model shows a growing motion that does not whirl, or where the rotor has
rigid-body modes, is solved in full instead, and the full solve's vectors join the basis.
The certificate covers the pairs returned, not the modes a basis might lack: a user checks
that against full solves at a few states (the screen does, and drops the projection on a
miss).  The solver counts its projected and full solves and keeps the largest certified
``eta`` (:meth:`ProjectedSolver.describe`; docs/theory.md, section 3.3).

:class:`Projection` holds a system's matrices on a basis with the speed-dependent bearings
kept apart (the reduced sweep's, :mod:`.reduced`, and the response surrogate's).
"""

from __future__ import annotations

import numpy as np

from ..fe import bearing as fe_bearing
from ..pencils import backward_errors, times
from ..solvers import DenseSolver, Eigenpairs, make_solver

#: Largest relative backward error accepted for a projected pair.  The full solvers' own are
#: 1e-15 (dense) to 1e-10 (sparse); with it, the screen's log decrements agree with full
#: solves' to 4e-12 on the bundled cases (tests/verification/test_projected.py).
LIMIT = 1e-10
#: A unit vector adds a direction when more than this of it lies outside the basis.
KEEP = 1e-10


def orthonormal(vectors, basis=None):
    """Real orthonormal columns spanning ``vectors`` (real and imaginary parts) beyond
    ``basis``; with ``basis``, the two side by side.  Each vector counts at unit length (a
    static deflection of 1e-9 m beside a mode of peak 1 is not roundoff), and a direction
    is new when more than :data:`KEEP` of a unit vector lies outside what is kept."""
    parts = np.hstack([vectors.real, vectors.imag]) if np.iscomplexobj(vectors) else vectors
    norms = np.linalg.norm(parts, axis=0)
    parts = parts[:, norms > 0] / norms[norms > 0]
    if basis is not None:
        parts = parts - basis @ (basis.T @ parts)
        parts = parts - basis @ (basis.T @ parts)      # twice is enough (Kahan)
    u, s, _ = np.linalg.svd(parts, full_matrices=False)
    new = u[:, s > KEEP]
    return new if basis is None else np.hstack([basis, new])


class ProjectedSolver:
    """A solver (the interface of :mod:`rotorcalc.solvers`) on a fixed basis, certified;
    ``vectors`` (n_dof, k), real or complex, span the basis."""

    name = "projected"

    def __init__(self, vectors, full=None):
        self.basis = orthonormal(np.asarray(vectors))
        self.full = full if full is not None else make_solver()
        self.projected = self.full_solves = 0
        self.largest = 0.0

    def __call__(self, m, d_mat, k, n_modes, near=None, zeros=None):
        if not zeros and self.basis.shape[1] < m.shape[0]:
            v = self.basis
            small = [v.T @ (a @ v) for a in (m, d_mat, k)]
            pairs = DenseSolver()(*small, n_modes, near, 0)
            q = times(v, pairs.vectors)
            eta = backward_errors(m, d_mat, k, pairs.values, q)
            if len(eta) == n_modes and eta.max() <= LIMIT and not np.any(
                    pairs.real_eigenvalues > 0):
                self.projected += 1
                self.largest = max(self.largest, float(eta.max()))
                # complete only as far as the basis holds the model's modes: the caller
                # checks that against full solves (the screen: ``_Judge.verify``)
                return Eigenpairs(pairs.values, q, pairs.real_eigenvalues, 0, 0.0)
        self.full_solves += 1
        result = self.full(m, d_mat, k, n_modes, near, zeros)
        self.basis = orthonormal(result.vectors, self.basis)
        return result

    def describe(self):
        return (f"{self.projected} projected solves on a basis of {self.basis.shape[1]} "
                f"vectors (largest backward error {self.largest:.1e}), "
                f"{self.full_solves} full solves")


class Projection:
    """A system's matrices on a real basis ``v`` (n_dof, r): the constant parts projected
    once; a bearing whose coefficients change with speed changes only its few-DOF term,
    through the rows of ``v`` at its DOFs (the reduced sweep's and the response surrogate's,
    :mod:`.response_surrogate`)."""

    def __init__(self, system, v):
        self.links = system.every_link
        self.m = v.T @ (system.mass @ v)
        self.g = v.T @ (system.gyroscopic @ v)
        self.k = v.T @ ((system.shaft_stiffness + system.support_stiffness) @ v)
        self.c = v.T @ (system.support_damping @ v)
        self.rows = [v[link.dofs] for link in self.links]

    def matrices(self, speed, whirl=None):
        """The projected ``(M, D, K)`` at spin speed ``speed`` (rad/s), ``D = C + speed G``."""
        k, c = self.k.copy(), self.c.copy()
        for link, rows in zip(self.links, self.rows):
            k2, c2 = link.bearing.matrices(speed, whirl)
            k += rows.T @ fe_bearing.element(k2, len(link.dofs)) @ rows
            c += rows.T @ fe_bearing.element(c2, len(link.dofs)) @ rows
        return self.m, c + speed * self.g, k
