"""Where the response peaks are, found on a reduced basis; what they are, from the full model.

A peak refined to :data:`~.peaks.SPEED_RTOL` of its speed, with its two half-power points,
takes 25 to 35 fresh responses by Brent's methods (:mod:`.peaks`); on a model of thousands of
DOFs each is a banded LU of the full dynamic stiffness (about 7 ms at 4006 DOFs, 20 ms at
16006).  On the sweep's reduced basis (:mod:`.reduced`), with the static deflections under
the unbalance forces added (the shape the force pushes in), a response is a dense solve of
the basis's size, a fraction of a millisecond.

Nothing the surrogate says is reported.  It says where to look; full solves there confirm it
(:func:`.peaks.confirmed`): the full amplitude at the peak speed is at least that
:data:`~.peaks.PEAK_STEP` of the speed either side (so the curve's top lies within that), and
the full curve crosses 0.707 of the full peak amplitude between each half-power speed and a
neighbour :data:`~.peaks.SPEED_RTOL` of it away (so the half-power speed holds to that
tolerance, as Brent's search would give it).
A half-power side that fails is searched on the full curve, a peak whose top fails is searched
again with full solves, as without a surrogate.  About seven full solves a peak instead of 25
to 35 (docs/theory.md, section 7).
"""

from __future__ import annotations

import warnings

import numpy as np
import scipy.linalg as la
from scipy.sparse.linalg import splu

from ..solvers import NUMERICAL_FAILURES
from .projected import orthonormal
from .projected import Projection


class ResponseSurrogate:
    """The dynamic stiffness of ``system`` projected on ``basis`` (n_dof, r) and the static
    deflections under ``force`` (n_dof, n_cases, unit speed); ``rows`` (n_probes, n_dof) the
    probes' directions.  :meth:`probe` as :meth:`.peaks.Evaluator.probe`."""

    def __init__(self, system, basis, force, rows):
        speed = float(system.rotor.operating.max_speed)
        k_mat = system.stiffness(speed).tocsc()
        static = splu(k_mat).solve(np.ascontiguousarray(np.hstack([force.real, force.imag])))
        v = orthonormal(np.hstack([basis, static]))
        self.projection = Projection(system, v)
        self.force = v.T @ force
        self.rows = rows @ v
        self.solved = {}

    def responses(self, omega):
        """The reduced coordinates of every case's response at ``omega`` (r, n_cases)."""
        if omega not in self.solved:
            m, d, k = self.projection.matrices(omega)
            z = k - omega * omega * m + 1j * omega * d
            try:
                with warnings.catch_warnings():     # near an undamped mode: the guess is
                    warnings.simplefilter("ignore", la.LinAlgWarning)   # confirmed anyway
                    y = la.solve(z, omega * omega * self.force, check_finite=False)
            except NUMERICAL_FAILURES:      # singular: no guess here, the full search decides
                y = np.full(self.force.shape, np.nan, dtype=complex)
            if len(self.solved) > 4096:
                self.solved.clear()
            self.solved[omega] = y
        return self.solved[omega]

    def probe(self, omega, j, case=0):
        return 2.0 * abs(self.rows[j] @ self.responses(omega)[:, case])


#: From this many DOFs the search on the basis pays: below, a full solve (a millisecond or
#: two) costs about what the surrogate's own set-up and evaluations save (measured with
#: tests/benchmarks/bench_reduced.py: slower at 1006 DOFs, faster from 2006).
SURROGATE_FROM = 2000


def surrogate_for(system, basis, force, rows):
    """A :class:`ResponseSurrogate`, or None without a basis, below :data:`SURROGATE_FROM`
    DOFs, or when the static deflections cannot be solved (a rotor free at the maximum
    continuous speed)."""
    if basis is None or system.n_dof < SURROGATE_FROM:
        return None
    try:
        return ResponseSurrogate(system, basis, force, rows)
    except NUMERICAL_FAILURES:
        return None
