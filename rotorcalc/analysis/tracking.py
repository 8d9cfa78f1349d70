"""Mode tracking along a parameter sweep.

Modes at neighbouring speeds are matched by an optimal assignment
(scipy's ``linear_sum_assignment``) on a cost that adds the shape mismatch
``1 - MAC`` to the distance of the eigenvalues from their linear prediction,
so that branches keep their identity where two frequencies come close or
cross.  A pairing that costs more than :data:`GATE` is refused: the old
branch ends there and the mode starts a new branch.  That is how branches are
born (an overdamped pair turning oscillatory, a mode entering the solved
window) and die, without a jump from one mode to another.
"""

from __future__ import annotations

import numpy as np
from scipy.optimize import linear_sum_assignment

#: Largest cost of a pairing that continues a branch.  A continuation has
#: MAC near 1 and a small relative eigenvalue step (cost well below 0.5).
GATE = 1.0


def mac_matrix(a, b):
    """Modal assurance criterion between two sets of complex shapes.

    ``a`` (n, ...) and ``b`` (m, ...); returns (n, m) values in [0, 1].
    """
    a = a.reshape(a.shape[0], -1)
    b = b.reshape(b.shape[0], -1)
    cross = np.abs(np.conj(a) @ b.T) ** 2
    na = np.sum(np.abs(a) ** 2, axis=1)
    nb = np.sum(np.abs(b) ** 2, axis=1)
    return cross / np.outer(np.where(na > 0, na, 1.0), np.where(nb > 0, nb, 1.0))


def match_cost(prev_shapes, prev_values, shapes, values):
    """Cost of assigning previous modes (rows) to current ones (columns)."""
    mac = mac_matrix(prev_shapes, shapes)
    scale = np.maximum(np.abs(prev_values), 1e-12)[:, None]
    closeness = np.abs(prev_values[:, None] - values[None, :]) / scale
    return (1.0 - mac) + closeness


def track(values, shapes, gate=GATE):
    """Link the modes of consecutive steps into branches.

    Parameters
    ----------
    values : sequence of complex ndarray
        Eigenvalues at each step (the count may change from step to step).
    shapes : sequence of complex ndarray
        Matching shapes, ``shapes[k][i]`` for ``values[k][i]``.
    gate : float
        Largest accepted pairing cost.

    Returns
    -------
    paths : int ndarray (n_steps, n_branches)
        ``paths[k, j]`` is the index at step ``k`` of the mode on branch
        ``j``, or -1 where the branch does not exist.
    """
    n_steps = len(values)
    paths = [[i] for i in range(len(values[0]))]
    for k in range(1, n_steps):
        active = [j for j, p in enumerate(paths) if p[k - 1] >= 0]
        current = np.asarray(values[k])
        taken = np.zeros(len(current), dtype=bool)
        if active and len(current):
            prev_idx = [paths[j][k - 1] for j in active]
            prev = np.asarray(values[k - 1])[prev_idx]
            predicted = prev.copy()
            for row, j in enumerate(active):
                if k >= 2 and paths[j][k - 2] >= 0:
                    predicted[row] = 2.0 * prev[row] - values[k - 2][paths[j][k - 2]]
            cost = match_cost(np.asarray(shapes[k - 1])[prev_idx], predicted, shapes[k], current)
            rows, cols = linear_sum_assignment(cost)
            for r, c in zip(rows, cols):
                if cost[r, c] <= gate:
                    paths[active[r]].append(int(c))
                    taken[c] = True
        for p in paths:
            if len(p) == k:
                p.append(-1)
        for c in np.nonzero(~taken)[0]:
            paths.append([-1] * k + [int(c)])
    return np.array(paths, dtype=int).T.reshape(n_steps, len(paths))
