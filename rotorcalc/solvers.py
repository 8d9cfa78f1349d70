"""Eigen-solvers of the rotor's quadratic eigenproblem, behind one interface.

A solver takes the second-order matrices ``M, D = C + spin G, K`` and returns
the eigenvalues with positive imaginary part (the whirl modes), lowest first,
with their displacement eigenvectors.  The problem is put in a scaled
first-order (state-space) form: with ``q = S^-1 q_hat`` where ``S`` makes the
mass diagonal one, and ``v = q_hat' / s`` for a reference frequency ``s``,

    [[I, 0], [0, M^]] z' = [[0, s I], [-K^/s, -D^]] z,   z = [q^, v],

whose blocks are of like size, so the QZ/Schur step keeps its digits for the
low modes (docs/theory.md).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import scipy.linalg as la
import scipy.sparse as sp


@dataclass(frozen=True)
class Eigenpairs:
    """Eigenvalues (rad/s, complex) and displacement eigenvectors (columns).

    ``real_eigenvalues`` holds the finite non-oscillatory ones (overdamped
    motion), which have no whirl frequency; ``rigid_body`` counts the
    state-space eigenvalues that are zero to within roundoff (two per
    rigid-body degree of freedom of an unsupported rotor).
    """

    values: np.ndarray
    vectors: np.ndarray
    real_eigenvalues: np.ndarray
    rigid_body: int = 0


#: Eigenvalues below this fraction of the scaled pencil's reference frequency
#: are zero to within roundoff: rigid-body motion, whose double zero eigenvalue
#: splits by about sqrt(machine epsilon) of the reference.
ZERO_EIGENVALUE = 1e-6
#: An eigenvalue is oscillatory when its imaginary part exceeds this fraction
#: of its own magnitude (not of the spectrum's largest: that drops low modes
#: of stiff systems).
OSCILLATORY = 1e-6


def _scaling(m, k):
    """Diagonal DOF scaling and the reference frequency of the scaled pencil."""
    md = np.asarray(m.diagonal(), dtype=float)
    kd = np.asarray(k.diagonal(), dtype=float)
    has_mass = md > 0.0
    if has_mass.any():
        ref = np.sqrt(np.median(kd[has_mass] / md[has_mass])) if np.any(kd[has_mass] > 0) else 1.0
    else:
        ref = 1.0
    ref = ref if np.isfinite(ref) and ref > 0 else 1.0
    d = np.where(has_mass, np.sqrt(np.where(has_mass, md, 1.0)),
                 np.sqrt(np.maximum(kd, 1e-300)) / ref)
    d = np.where(d > 0, d, 1.0)
    return d, ref


def scaled_pencil(m, d_mat, k):
    """Dense scaled state-space pencil ``(A, B)`` and the scaling used.

    Returns
    -------
    a, b : ndarray (2n, 2n)
    scale : ndarray (n,)
        ``q = q_hat / scale``.
    ref : float
        Reference frequency ``s`` of the scaled state.
    """
    scale, ref = _scaling(m, k)
    inv = sp.diags(1.0 / scale)
    mh = (inv @ m @ inv).toarray()
    kh = (inv @ k @ inv).toarray()
    dh = (inv @ d_mat @ inv).toarray()
    n = mh.shape[0]
    eye, zero = np.eye(n), np.zeros((n, n))
    a = np.block([[zero, ref * eye], [-kh / ref, -dh]])
    b = np.block([[eye, zero], [zero, mh]])
    return a, b, scale, ref


class DenseSolver:
    """All eigenvalues of the scaled state-space pencil by LAPACK.

    Good for models up to a few hundred DOFs; its cost grows with the cube
    of the model size.
    """

    name = "dense"

    def __call__(self, m, d_mat, k, n_modes):
        a, b, scale, ref = scaled_pencil(m, d_mat, k)
        n = m.shape[0]
        mass_diag = m.diagonal()
        if np.all(mass_diag > 0):
            # Positive-definite mass: the standard problem B^-1 A is cheaper than QZ.
            mh = b[n:, n:]
            lower = la.cho_factor(mh, lower=True, check_finite=False)
            a2 = a.copy()
            a2[n:, :] = la.cho_solve(lower, a[n:, :], check_finite=False)
            values, vectors = la.eig(a2, check_finite=False)
        else:
            values, vectors = la.eig(a, b, check_finite=False)
        finite = np.isfinite(values)
        values, vectors = values[finite], vectors[:, finite]
        size = np.abs(values)
        zero = size < ZERO_EIGENVALUE * ref
        oscillatory = (values.imag > OSCILLATORY * size) & ~zero
        real = values[(np.abs(values.imag) <= OSCILLATORY * size) & ~zero].real
        values, vectors = values[oscillatory], vectors[:, oscillatory]
        order = np.argsort(values.imag)[:n_modes]
        q = vectors[:n, order] / scale[:, None]
        return Eigenpairs(values[order], q, np.sort(real), int(zero.sum()))


SOLVERS = {"dense": DenseSolver}


def make_solver(name="dense"):
    """Return a solver by name (currently ``"dense"``)."""
    try:
        return SOLVERS[name]()
    except KeyError:
        raise ValueError(f"unknown solver {name!r}; choose from {sorted(SOLVERS)}") from None
