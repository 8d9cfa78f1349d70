"""Bearing and support elements acting on translations.

A bearing joins a shaft node (x, y) either to ground or to a support
(pedestal) node (xs, ys); a support joins its node to ground.  Element DOF
order ``[x, y]`` for a grounded bearing and ``[x, y, xs, ys]`` otherwise.
"""

from __future__ import annotations

import numpy as np


def grounded(k2):
    """A 2x2 coefficient matrix acting between a node and ground."""
    return np.asarray(k2, dtype=float)


def linked(k2):
    """A 2x2 coefficient matrix acting on the relative motion of two nodes (4x4)."""
    k2 = np.asarray(k2, dtype=float)
    return np.block([[k2, -k2], [-k2, k2]])
