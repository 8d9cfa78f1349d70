"""Sensitivities of critical speeds from eigenvalue derivatives: one solve per critical.

A critical speed ``W`` of order ``r`` solves ``g(W, p) = Im lam(W, p) - r W = 0`` on its
branch, so a parameter ``p`` moves it by

    dW/dp = -(d Im lam / dp) / (d Im lam / dW - r).

The eigenvalue's derivative comes from its right and left eigenvectors of the quadratic
``Q(lam) = lam^2 M + lam D + K`` (``Q x = 0``, ``y^H Q = 0``):

    d lam / dp = -y^H (dQ/dp) x / (y^H (2 lam M + D) x),

the first-order perturbation of a simple eigenvalue (Lancaster, "Lambda-matrices and
vibrating systems", 1966, chapter 7, from memory; the same formula as for a linear pencil
with ``B = dQ/dlam``).  For a bearing's direct stiffness scaled by ``1 + p``,
``dQ/dp = K_b,direct(W)``; for a disk's mass, ``dQ/dp = lam^2 M_disk``.  The slope
``d Im lam / dW`` of the branch (gyroscopics, speed-dependent bearings) is a central
difference of two solves on the branch.  Per critical: one solve for the right vector,
one sparse LU for the left one, two for the slope, whatever the number of parameters.

The central differences of :func:`~rotorcalc.analysis.levers.sensitivities` (four
perturbed screenings per parameter and critical) stay as the test reference, and give the
disk-mass levers of a rotor with bearings from their geometry: a heavier disk loads those
bearings differently, and their coefficients are computed again under the new loads, which
the derivative of the mass term alone would leave out.
"""

from __future__ import annotations

import numpy as np
import scipy.sparse as sp
import scipy.sparse.linalg as spla

from ..assembly import assemble
from ..errors import SolverError
from ..fe import bearing as fe_bearing
from ..solvers import NUMERICAL_FAILURES
from .criticals import branch_at
from .modes import modes_at
from .sweep import TRACKING_RESERVE
from .tracking import match_cost

#: Relative speed step of the branch's slope (central difference).
SLOPE_STEP = 1e-4
#: Modes solved about the critical's eigenvalue for its right vector.
NEAR_MODES = 4


def _right(system, critical):
    """The critical's eigenvalue and full right eigenvector, solved at its speed."""
    modes = modes_at(system, critical.speed, NEAR_MODES, near=critical.eigenvalue)
    cost = match_cost(critical.shape[None], np.array([critical.eigenvalue]), modes.shapes,
                      modes.eigenvalues)[0]
    j = int(np.argmin(cost))
    return complex(modes.eigenvalues[j]), modes.vectors[:, j]


def _left(q_shifted):
    """A left eigenvector of the quadratic (``y^H Q(lam) = 0``), by two steps of inverse
    iteration on ``Q(lam')^H``, ``lam'`` off the eigenvalue by 1e-9 of its size."""
    n = q_shifted.shape[0]
    lu = spla.splu(sp.csc_matrix(q_shifted.conj().T))
    y = np.random.default_rng(0).standard_normal(n) + 0j
    for _ in range(2):
        y = lu.solve(y)
        y /= np.linalg.norm(y)
    return y


def critical_derivatives(rotor, critical, parameters):
    """Per cent change of ``critical`` per per cent change of each parameter.

    ``parameters`` are change paths of :func:`~rotorcalc.analysis.levers.parameters`
    (``bearing[i].kdirect``, ``disk[i].mass``); returns one value per path, None for all
    of them when a solve fails or the branch runs parallel to the order line (no crossing
    to move).
    """
    try:
        return _derivatives(rotor, critical, parameters)
    except (*NUMERICAL_FAILURES, SolverError):
        return [None] * len(parameters)


def _derivatives(rotor, critical, parameters):
    system = assemble(rotor)
    w, order = critical.speed, critical.order
    lam, x = _right(system, critical)
    m, d, k = system.mass, system.damping(w) + w * system.gyroscopic, system.stiffness(w)
    shifted = lam * (1.0 + 1e-9)
    y = _left((shifted * shifted) * m + shifted * d + k)
    denominator = np.vdot(y, (2.0 * lam) * (m @ x) + d @ x)
    n_solve = rotor.settings.mode_count + TRACKING_RESERVE
    ends = [branch_at(system, w * (1.0 + s), lam, critical.shape, n_solve, None)[0]
            for s in (-SLOPE_STEP, SLOPE_STEP)]
    slope = (ends[1].imag - ends[0].imag) / (2.0 * SLOPE_STEP * w)
    if not abs(slope - order) > 1e-9 * max(abs(order), 1.0) or denominator == 0:
        return [None] * len(parameters)
    out = []
    for path in parameters:
        what, index = path.split("[")[0], int(path.split("[")[1].split("]")[0])
        if what == "bearing":
            link = system.links[index]
            direct = np.diag(np.diag(link.bearing.matrices(w)[0]))
            dq = np.vdot(y[link.dofs], fe_bearing.element(direct, len(link.dofs)) @ x[link.dofs])
        else:
            disk = rotor.disks[index]
            dofs = system.node_dofs(system.mesh.station_nodes[disk.station])[:2]
            dq = lam * lam * disk.mass * np.vdot(y[dofs], x[dofs])
        d_lam = -dq / denominator
        out.append(float(-d_lam.imag / (slope - order) / w))
    return out
