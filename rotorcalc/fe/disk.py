"""Rigid disk at a node: mass, transverse and polar inertia.

Node DOF order ``[x, y, a, b]``.  With the slope convention a = dx/dz,
b = dy/dz, the disk's angular momentum gives the a-equation
``Id a'' + Ip spin b'`` and the b-equation ``Id b'' - Ip spin a'``
(docs/theory.md); hence the gyroscopic block below.
"""

from __future__ import annotations

import numpy as np


def disk_mass(mass, transverse_inertia):
    """Mass matrix (4x4) of a rigid disk."""
    return np.diag([mass, mass, transverse_inertia, transverse_inertia])


def disk_gyroscopic(polar_inertia):
    """Gyroscopic matrix G (4x4, skew-symmetric); the damping term is spin * G."""
    g = np.zeros((4, 4))
    g[2, 3] = polar_inertia
    g[3, 2] = -polar_inertia
    return g
