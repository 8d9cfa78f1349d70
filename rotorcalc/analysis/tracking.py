"""Mode tracking along a parameter sweep.

Modes at neighbouring speeds are matched by an optimal assignment
(scipy's ``linear_sum_assignment``) on a cost that adds the shape mismatch
``1 - MAC`` to the distance of the eigenvalues from their linear prediction,
so that branches keep their identity where two frequencies come close or
cross.
"""

from __future__ import annotations

import numpy as np
from scipy.optimize import linear_sum_assignment


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


def track(values, shapes):
    """Reorder modes at each step so that column ``j`` follows one branch.

    Parameters
    ----------
    values : complex ndarray (n_steps, n_modes)
    shapes : complex ndarray (n_steps, n_modes, ...)

    Returns
    -------
    order : int ndarray (n_steps, n_modes)
        ``values[k, order[k]]`` is the k-th step in branch order.
    """
    n_steps, n_modes = values.shape
    order = np.zeros((n_steps, n_modes), dtype=int)
    order[0] = np.arange(n_modes)
    for k in range(1, n_steps):
        prev = values[k - 1, order[k - 1]]
        if k >= 2:
            # Linear prediction from the two previous steps (uniform steps assumed
            # close enough: the shape term carries the decision near crossings).
            predicted = 2.0 * prev - values[k - 2, order[k - 2]]
        else:
            predicted = prev
        cost = match_cost(shapes[k - 1][order[k - 1]], predicted, shapes[k], values[k])
        rows, cols = linear_sum_assignment(cost)
        order[k, rows] = cols
    return order
