"""Exact clamping or pinning for the verification tests: delete DOFs and solve."""

import numpy as np

from rotorcalc.solvers import DenseSolver


def solve_reduced(system, fixed, speed, n_modes):
    """Modes with the DOFs ``fixed`` deleted (exact clamp or pin).

    Returns the eigenvalues, the displacement vectors padded back to the full
    DOF numbering (zeros at the deleted DOFs) and the real eigenvalues.
    """
    keep = np.setdiff1d(np.arange(system.n_dof), fixed)

    def sub(mat):
        return mat.tocsr()[keep][:, keep]

    d_mat = system.damping(speed) + speed * system.gyroscopic
    pairs = DenseSolver()(sub(system.mass), sub(d_mat), sub(system.stiffness(speed)), n_modes)
    full = np.zeros((system.n_dof, pairs.values.size), dtype=complex)
    full[keep] = pairs.vectors
    return pairs.values, full, pairs.real_eigenvalues
