"""Forward and backward modes of a degenerate pair.

On isotropic supports without gyroscopic coupling (or where it vanishes, as
in the bounce mode of a symmetric rotor) a forward and a backward mode share
one eigenvalue, and the eigen-solver returns an arbitrary basis of their
plane: the whirl labels would then follow roundoff.  Every DOF comes in
pairs (x, y), (a, b), (xs, ys); a vector splits into a forward circular part
(``y = -i x``) and a backward one (``y = +i x``).  When the system commutes
with a quarter turn about the shaft axis, both parts of an eigenvector are
eigenvectors, so the pair is replaced by its forward and its backward part.
The split is kept only when the new vectors still solve the eigenproblem.
"""

from __future__ import annotations

import numpy as np

#: Eigenvalues closer than this (relative) form a degenerate pair.
DEGENERATE_RTOL = 1e-8
#: Largest relative residual accepted for a split pair.
RESIDUAL_RTOL = 1e-8


def circular_parts(vector):
    """Forward and backward circular parts of a displacement vector (DOF pairs)."""
    x, y = vector[0::2], vector[1::2]
    f, b = (x + 1j * y) / 2.0, (x - 1j * y) / 2.0
    forward, backward = np.empty_like(vector), np.empty_like(vector)
    forward[0::2], forward[1::2] = f, -1j * f
    backward[0::2], backward[1::2] = b, 1j * b
    return forward, backward


def _residual(m, d, k, lam, x):
    r = (lam * lam) * (m @ x) + lam * (d @ x) + k @ x
    scale = (abs(lam) ** 2 * abs(m).max() + abs(lam) * abs(d).max() + abs(k).max())
    return np.linalg.norm(r) / (scale * max(np.linalg.norm(x), 1e-300))


def split_degenerate(values, vectors, m, d, k):
    """Replace each degenerate pair of eigenvectors by its forward and backward modes.

    Parameters
    ----------
    values : complex ndarray (n,)
    vectors : complex ndarray (n_dof, n)
        Displacement eigenvectors (columns).
    m, d, k : sparse matrices
        The quadratic eigenproblem ``(lam^2 M + lam D + K) x = 0``.

    Returns
    -------
    complex ndarray (n_dof, n)
    """
    out = vectors.copy()
    if vectors.shape[0] % 2:
        return out
    taken = set()
    for i in range(len(values)):
        if i in taken:
            continue
        for j in range(i + 1, len(values)):
            if j in taken or abs(values[j] - values[i]) > DEGENERATE_RTOL * abs(values[i]):
                continue
            parts = [circular_parts(out[:, c]) for c in (i, j)]
            fwd = max((p[0] for p in parts), key=np.linalg.norm)
            bwd = max((p[1] for p in parts), key=np.linalg.norm)
            if min(np.linalg.norm(fwd), np.linalg.norm(bwd)) == 0:
                break
            lam = (values[i] + values[j]) / 2.0
            if max(_residual(m, d, k, lam, fwd), _residual(m, d, k, lam, bwd)) <= RESIDUAL_RTOL:
                out[:, i], out[:, j] = fwd, bwd
            taken.update((i, j))
            break
    return out
