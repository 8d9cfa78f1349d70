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

The central differences of :func:`~rotorcalc.analysis.whatif.sensitivities` (four
perturbed screenings per parameter and critical) stay as the test reference.
"""

from __future__ import annotations

import numpy as np
import scipy.sparse as sp
import scipy.sparse.linalg as spla

from ..assembly import assemble
from ..fe import bearing as fe_bearing
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


def _left(q_matrix, lam):
    """A left eigenvector of the quadratic at ``lam`` (``y^H Q(lam) = 0``), by two steps of
    inverse iteration on ``Q^H`` shifted off the eigenvalue by 1e-9 of its size."""
    n = q_matrix.shape[0]
    lu = spla.splu(sp.csc_matrix(q_matrix.conj().T + 1e-9 * abs(lam) * sp.identity(n)))
    y = np.random.default_rng(0).standard_normal(n) + 0j
    for _ in range(2):
        y = lu.solve(y)
        y /= np.linalg.norm(y)
    return y


def critical_derivatives(rotor, critical, parameters):
    """Per cent change of ``critical`` per per cent change of each parameter.

    ``parameters`` are change paths of :func:`~rotorcalc.analysis.whatif.parameters`
    (``bearing[i].kdirect``, ``disk[i].mass``); returns one value per path.
    """
    system = assemble(rotor)
    w, order = critical.speed, critical.order
    lam, x = _right(system, critical)
    m, d = system.mass, system.damping(w) + w * system.gyroscopic
    q_matrix = (lam * lam) * m + lam * d + system.stiffness(w)
    y = _left(q_matrix, lam)
    denominator = np.vdot(y, (2.0 * lam) * (m @ x) + d @ x)
    n_solve = rotor.settings.mode_count + TRACKING_RESERVE
    ends = [branch_at(system, w * (1.0 + s), lam, critical.shape, n_solve, None)[0]
            for s in (-SLOPE_STEP, SLOPE_STEP)]
    slope = (ends[1].imag - ends[0].imag) / (2.0 * SLOPE_STEP * w)
    out = []
    for path in parameters:
        what, index = path.split("[")[0], int(path.split("[")[1].split("]")[0])
        if what == "bearing":
            link = system.links[index]
            k2 = link.bearing.matrices(w)[0]
            direct = np.diag(np.diag(k2))
            local = fe_bearing.grounded(direct) if len(link.dofs) == 2 \
                else fe_bearing.linked(direct)
            dq = np.vdot(y[link.dofs], local @ x[link.dofs])
        else:
            disk = rotor.disks[index]
            dofs = system.node_dofs(system.mesh.station_nodes[disk.station])[:2]
            dq = lam * lam * disk.mass * np.vdot(y[dofs], x[dofs])
        d_lam = -dq / denominator
        out.append(float(-d_lam.imag / (slope - order) / w))
    return out
