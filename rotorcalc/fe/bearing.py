"""Bearing and support elements acting on translations.

A bearing joins a shaft node (x, y) either to ground or to a support
(pedestal) node (xs, ys); a support joins its node to ground.  Element DOF
order ``[x, y]`` for a grounded bearing and ``[x, y, xs, ys]`` otherwise.
"""

from __future__ import annotations

import numpy as np


def _array(k2):
    k2 = np.asarray(k2)
    return k2.astype(np.result_type(k2.dtype, float), copy=False)   # float, or complex kept


def grounded(k2):
    """A 2x2 coefficient matrix acting between a node and ground."""
    return _array(k2)


def linked(k2):
    """A 2x2 coefficient matrix acting on the relative motion of two nodes (4x4)."""
    k2 = _array(k2)
    return np.block([[k2, -k2], [-k2, k2]])


def element(k2, dof_count):
    """The element matrix of a 2x2 coefficient matrix on ``dof_count`` DOFs: 2 for a
    bearing to ground (:func:`grounded`), 4 for one to a support node (:func:`linked`)."""
    return grounded(k2) if dof_count == 2 else linked(k2)
