"""One eigenpair of the rotor's quadratic, followed from a nearby one by Newton's method.

Where a result needs one mode at a new spin speed (the critical-speed refinement) or with
a little more cross-coupling (the cross-coupling screen), and that mode is known at a state
close by, solving for every mode again is wasted work.  Newton's method on the quadratic
eigenproblem ``Q(lam) x = (lam^2 M + lam D + K) x = 0`` with the normalisation ``v^H x = 1``
(``v`` the start vector) converges quadratically from a close start:

    u = Q(lam)^-1 Q'(lam) x,    lam <- lam - 1 / (v^H u),    x <- u / (v^H u)

(Ruhe, "Algorithms for the nonlinear eigenvalue problem", SIAM J. Numer. Anal. 10 (1973),
section 3, from memory; with ``Q' = 2 lam M + D``).  Each step costs one LU of the shifted
quadratic (dense up to :data:`DENSE_LIMIT` DOFs, banded above, SuperLU for wide bands),
fractions of a millisecond to milliseconds where a full solve costs tens of them
(docs/theory.md, 3.3).

The answer is certified, never assumed: it is returned only when the steps have converged
and the pair's relative backward error in the model solved is below :data:`BACKWARD_LIMIT`
(then it is an eigenpair of that model to that accuracy); the caller checks that it is the
mode it wanted (by shape) and solves otherwise.  On a reduced basis the model solved is the
projected one, and :meth:`~rotorcalc.analysis.reduced.ReducedModel.newton` certifies the
lifted answer in the full model by the reduced path's residual (tolerance 1e-7), which its
``backward_error`` then holds.  In an isotropic model a mode can
be one of a degenerate pair, whose vector Newton's method may return mixed: such an answer
is refused too, and the full solve splits the pair.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..errors import SolverError
from ..pencils import DensePencil, _Pencil
from ..solvers import NUMERICAL_FAILURES, OSCILLATORY
from ..threads import one_blas_thread
from .circular import MIXED, is_isotropic, mixing
from .modes import settle
from .tracking import mac_matrix

#: Newton steps before giving up (the full solve then answers).
MAX_STEPS = 12
#: A step that moves the eigenvalue by less than this share of it leaves an error of about
#: its square: one more step, and the pair is converged to roundoff.
STEP_RTOL = 1e-8
#: Largest accepted relative backward error of the answer.  The dense solve's own are
#: about 1e-15 on the bundled cases; a converged Newton pair's are of the same order.
BACKWARD_LIMIT = 1e-11


@dataclass(frozen=True)
class NewtonPair:
    """Newton's answer: ``vector`` holds displacements in the original DOF order (basis
    coordinates when :func:`newton_pair` solved a projected model), ``backward_error`` the
    measure that certified it (see the module: the relative backward error, or the reduced
    path's residual)."""

    value: complex
    vector: np.ndarray
    backward_error: float
    steps: int


#: Up to this many DOFs the steps use dense LU (cheaper than reordering for a band).
DENSE_LIMIT = 400


@one_blas_thread
def newton_pair(m, d_mat, k, value, vector, physical=True):
    """The eigenpair of ``lam^2 M + lam D + K`` that Newton's method reaches from ``(value,
    vector)``; None when it does not converge or its backward error is too large.

    ``vector`` is a displacement vector in the original DOF order (a rough one will do: the
    first step is an inverse iteration at ``value``).  ``physical`` False: the matrices are a
    projected model's (coordinates on a basis, not DOFs): the caller lifts the answer and
    checks it (a degenerate pair's mixing among them).
    """
    dense = m.shape[0] <= DENSE_LIMIT or not physical
    quad = _Quadratic((DensePencil if dense else _Pencil)(m, d_mat, k))
    x = quad.to_scaled(np.asarray(vector, dtype=complex))
    norm = np.linalg.norm(x)
    if not (norm > 0 and np.isfinite(norm)):
        return None
    v = x / norm
    x = v                 # v^H x = 1
    lam = complex(value)
    steps, close = 0, False
    try:
        for steps in range(1, MAX_STEPS + 1):
            try:
                u = quad.solve(lam, quad.d @ x + 2.0 * lam * (quad.m @ x))
            except Singular:   # lam is an eigenvalue to the last bit: the last x is checked
                break
            size = np.vdot(v, u)
            if not (size != 0 and np.isfinite(size)):
                return None
            step = 1.0 / size
            lam, x = lam - step, u / size
            if close:       # one step after a small one: converged to roundoff
                break
            close = abs(step) <= STEP_RTOL * abs(lam)
        else:
            return None
    except NUMERICAL_FAILURES:
        return None
    error = quad.backward_error(lam, x)
    if not error <= BACKWARD_LIMIT:
        return None
    q = quad.displacements(x)
    if physical and mixed(q, m, d_mat, k):
        return None
    return NewtonPair(lam, q, error, steps)


def mixed(q, m, d_mat, k):
    """True for a vector mixing a degenerate pair's forward and backward modes (isotropic
    models): Newton's answer is then refused and the full solve splits the pair."""
    return bool(mixing(q) > MIXED and is_isotropic(k, d_mat, m))


class Singular(np.linalg.LinAlgError):
    """The shifted quadratic has an exactly zero pivot: the shift is an eigenvalue to the
    last bit (a converged step, not a failure: the caller checks the pair it has)."""


#: A mode followed by Newton's method is the one it started from when its shape's MAC with
#: the start's is at least this; otherwise the caller solves in full and picks by shape.
FOLLOW_MAC = 0.98


def follow(system, speed, value, vector, shape, whirl=None, reduced=None):
    """(eigenvalue, shape, vector) of the mode of ``system`` at ``speed`` (rad/s; bearing
    tables over whirl frequency read at ``whirl``) that Newton's method reaches from the
    eigenpair ``(value, vector)`` of a nearby state, checked like a solved mode
    (:func:`~rotorcalc.analysis.modes.settle`, shape and vector scaled to a peak of 1); or
    None, when it does not converge, does not whirl (positive frequency: not the conjugate,
    not the real eigenvalue of a mode turning overdamped), loses its digits, or its shape's
    MAC with ``shape`` (the start's node shape) is below :data:`FOLLOW_MAC`.

    ``vector`` None: the start is ``shape`` at the translations, rotations zero (the first
    step is an inverse iteration, a rough start will do).  ``reduced``, a
    :class:`~rotorcalc.analysis.reduced.ReducedModel` of ``system``: the steps run on its
    projected model, the answer certified in the full one
    (:meth:`~.reduced.ReducedModel.newton`)."""
    if vector is None:
        vector = np.zeros(system.mass.shape[0], dtype=complex)
        tdofs = system.translation_dofs
        vector[tdofs[:, 0]], vector[tdofs[:, 1]] = shape[:, 0], shape[:, 1]
    c_mat, k_mat = system.damping(speed, whirl), system.stiffness(speed, whirl)
    d_mat = c_mat + speed * system.gyroscopic
    pair = newton_pair(system.mass, d_mat, k_mat, value, vector) if reduced is None else \
        reduced.newton(speed, value, vector, d_mat, k_mat, whirl)
    if pair is None or not pair.value.imag > OSCILLATORY * abs(pair.value):
        return None
    try:
        values, shapes, vectors = settle(system, speed, np.array([pair.value]),
                                         pair.vector[:, None], c_mat, d_mat, k_mat)
    except SolverError:         # digits lost: the full solve decides
        return None
    if mac_matrix(np.asarray(shape)[None], shapes)[0, 0] < FOLLOW_MAC:
        return None
    return values[0], shapes[0], vectors[:, 0]


class _Quadratic:
    """A pencil's DOF-scaled quadratic as Newton's steps use it: a
    :class:`~rotorcalc.pencils.DensePencil` for small (and projected) models, a
    :class:`~rotorcalc.pencils._Pencil` in a bandwidth-reducing order above; each shift
    factors the shifted quadratic (``factored``: LAPACK's dense or banded LU)."""

    def __init__(self, pencil):
        self.pencil = pencil
        self.m, self.d = pencil.m, pencil.d

    def to_scaled(self, q):
        return q[self.pencil.perm] * self.pencil.scale[self.pencil.perm]

    def displacements(self, x):
        return self.pencil.displacements(x[:, None])[:, 0]

    def solve(self, lam, rhs):
        try:
            solve = self.pencil.factored(lam)
        except np.linalg.LinAlgError as exc:     # an exactly zero pivot
            raise Singular(str(exc)) from None
        return solve(rhs)

    def backward_error(self, lam, x):
        return float(self.pencil.backward_errors(np.array([lam]), x[:, None])[0])
