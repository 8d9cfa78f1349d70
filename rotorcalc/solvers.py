"""Eigen-solvers of the rotor's quadratic eigenproblem, behind one interface.

A solver takes the second-order matrices ``M, D = C + spin G, K`` and returns
the eigenvalues with positive imaginary part (the whirl modes), lowest first,
with their displacement eigenvectors.  The problem is put in a scaled
first-order (state-space) form: with ``q = S^-1 q_hat`` where ``S`` makes the
mass diagonal one, and ``v = q_hat' / s`` for a reference frequency ``s``,

    [[I, 0], [0, M^]] z' = [[0, s I], [-K^/s, -D^]] z,   z = [q^, v],

whose blocks are of like size, so the QZ/Schur step keeps its digits for the
low modes (docs/theory.md).

Two strategies share that pencil: :class:`DenseSolver` (every eigenvalue by
LAPACK, cubic in the model size) and :class:`SparseSolver` (shift-invert
Arnoldi for the lowest modes only, a banded LU of the shifted quadratic,
about linear in the model size, with a check that no mode of the band was
missed).  :class:`AutoSolver` picks one by size; :func:`make_solver` builds
any of them by name.  Every solver is called as
``solver(m, d_mat, k, n_modes, near=None, zeros=None)`` and returns
:class:`Eigenpairs`; with ``near`` (rad/s, complex) it returns the ``n_modes``
modes nearest that value instead of the lowest ones; ``zeros`` is the number
of eigenvalues known to be zero (rigid-body motion), from the rotor's structure.
"""

from __future__ import annotations

import dataclasses
import math
from dataclasses import dataclass

import numpy as np
import scipy.linalg as la
import scipy.sparse.linalg as spla

from .units import to_hz
from .errors import InputError
from .notices import Notice
from .threads import one_blas_thread  # noqa: F401 (re-exported)
from .pencils import (BAND_LIMIT, DensePencil, _factor, _Pencil, _scaling,  # noqa: F401
                      scaled_pencil)


#: What LAPACK, SuperLU and ARPACK raise when a solve fails on its numbers (not on
#: a programming error): callers turn these into SolverError.
NUMERICAL_FAILURES = (np.linalg.LinAlgError, la.LinAlgError, spla.ArpackError,
                      spla.ArpackNoConvergence, RuntimeError, ValueError, FloatingPointError,
                      ZeroDivisionError)


@dataclass(frozen=True)
class Eigenpairs:
    """Eigenvalues (rad/s, complex) and displacement eigenvectors (columns).

    ``real_eigenvalues`` holds the finite non-oscillatory ones (overdamped
    motion), which have no whirl frequency; ``rigid_body`` counts the
    state-space eigenvalues that are zero to within roundoff (two per
    rigid-body degree of freedom of an unsupported rotor).  A sparse solve
    finds only the eigenvalues within ``complete_within`` (rad/s) of its shift
    (every one of them; ``inf`` for the dense solve), so its real and zero
    eigenvalues are those within that radius.  ``warnings`` says when a
    solve could not prove that it missed no mode.  ``products``, when the solver
    computed them (the reduced path's certificate): ``(M X, D X, K X)`` of the vectors
    ``X`` in the matrices it was given, for the mode checks to reuse (a copy with other
    vectors must drop them).
    """

    values: np.ndarray
    vectors: np.ndarray
    real_eigenvalues: np.ndarray
    rigid_body: int = 0
    complete_within: float = math.inf
    warnings: tuple = ()
    products: tuple | None = None


#: Eigenvalues below this fraction of the scaled pencil's reference frequency
#: are zero to within roundoff: rigid-body motion, whose double zero eigenvalue
#: splits by about sqrt(machine epsilon) of the reference.
ZERO_EIGENVALUE = 1e-6
#: An eigenvalue is oscillatory when its imaginary part exceeds this fraction
#: of its own magnitude (not of the spectrum's largest: that drops low modes
#: of stiff systems).
OSCILLATORY = 1e-6


def _classify(values, ref, zeros=None):
    """Masks of the zero, oscillatory (Im > 0) and real eigenvalues.

    ``zeros`` is the number of eigenvalues known to be zero (from the rotor's
    structure: :meth:`~rotorcalc.assembly.SystemMatrices.zero_eigenvalues`): the
    ``zeros`` smallest are taken as zero.  Without it, eigenvalues below
    :data:`ZERO_EIGENVALUE` of the reference frequency are, a test that depends
    on the mesh and on the mass distribution (kept for bare matrices only).
    """
    size = np.abs(values)
    if zeros is None:
        zero = size < ZERO_EIGENVALUE * ref
    else:
        zero = np.zeros(len(values), dtype=bool)
        zero[np.argsort(size, kind="stable")[:zeros]] = True
    oscillatory = (values.imag > OSCILLATORY * size) & ~zero
    real = (np.abs(values.imag) <= OSCILLATORY * size) & ~zero
    return zero, oscillatory, real


def _pick(values, n_modes, near):
    """Indices of the ``n_modes`` lowest modes, or of those nearest ``near``; ascending by Im."""
    if near is None:
        return np.argsort(values.imag)[:n_modes]
    order = np.argsort(np.abs(values - near), kind="stable")[:n_modes]
    return order[np.argsort(values[order].imag, kind="stable")]


class DenseSolver:
    """All eigenvalues of the scaled state-space pencil by LAPACK.

    Good for models up to a few hundred DOFs; its cost grows with the cube
    of the model size.
    """

    name = "dense"

    @one_blas_thread
    def __call__(self, m, d_mat, k, n_modes, near=None, zeros=None):
        values, q, ref = _every_eigenpair(m, d_mat, k)
        zero, oscillatory, real = _classify(values, ref, zeros)
        real = values[real].real
        values, q = values[oscillatory], q[:, oscillatory]
        order = _pick(values, n_modes, near)
        return Eigenpairs(values[order], q[:, order], np.sort(real), int(zero.sum()))


def _every_eigenpair(m, d_mat, k):
    """Every finite eigenvalue of the quadratic by LAPACK, its displacement vector and the
    reference frequency (the scaled state-space pencil of :func:`scaled_pencil`)."""
    a, b, scale, ref = scaled_pencil(m, d_mat, k)
    n = m.shape[0]
    lower = None
    if np.all(m.diagonal() > 0):
        try:
            lower = la.cho_factor(b[n:, n:], lower=True, check_finite=False)
        except la.LinAlgError:   # positive diagonal, yet not positive definite
            lower = None
    if lower is not None:
        # Positive-definite mass: the standard problem B^-1 A is cheaper than QZ.
        a2 = a.copy()
        a2[n:, :] = la.cho_solve(lower, a[n:, :], check_finite=False)
        values, vectors = la.eig(a2, check_finite=False)
    else:
        values, vectors = la.eig(a, b, check_finite=False)
    finite = np.isfinite(values)
    return values[finite], vectors[:n, finite] / scale[:, None], ref


@one_blas_thread
def real_eigenpairs(m, d_mat, k, zeros=None):
    """The finite real (non-oscillating) eigenvalues of the quadratic that are not zero, with
    their real displacement vectors, by LAPACK (:class:`DenseSolver`'s pencil): for small and
    projected models (a reduced model's overdamped pairs, for the deflated check)."""
    values, q, ref = _every_eigenpair(m, d_mat, k)
    real = _classify(values, ref, zeros)[2]
    order = np.argsort(np.abs(values[real]))
    return values[real].real[order], q[:, real].real[:, order]


# --- sparse shift-invert ----------------------------------------------------------------

#: The real shift of the lowest-modes solve, a fraction of the reference
#: frequency: positive, so ``K + sigma D + sigma^2 M`` is regular even for a
#: rotor with rigid-body modes, and far below any mode of interest.
SHIFT = 1e-9
#: The disk about the shift in which every eigenvalue must be found reaches
#: this factor beyond the highest requested mode, so that a mode of the band
#: can lie outside it only with a damping ratio above sqrt(1 - 1/RADIUS_RATIO^2)
#: (0.30, log decrement 2.0, an estimated amplification factor below 1.6, where
#: the margin rule asks no margin): see docs/theory.md, section 3.1.
RADIUS_RATIO = 1.05
#: Eigenvalues asked for beyond two per requested mode (a mode and its
#: conjugate) in the first Arnoldi run: the guard band and a few real
#: (overdamped) eigenvalues; measured to suffice at most speeds of the
#: benchmark rotors, a retry with a larger disk costing a whole solve.
FIRST_EXTRA = 8
#: Relative residual tolerance of the Arnoldi iteration (ARPACK's ``tol``).
ARNOLDI_TOL = 1e-10
#: Largest accepted relative backward error of a returned mode.
RESIDUAL_LIMIT = 1e-8
#: Solves with a larger disk before the result is returned with a warning.
ATTEMPTS = 3
#: Eigenvalues solved beyond the requested ones in a ``near`` solve.
NEAR_EXTRA = 2
#: A ``near`` solve shifts this fraction of the target's size off the target.
NEAR_OFFSET = 1e-3
#: The deflated check estimates distances to about 1 %; a miss is one closer
#: than this fraction of the found disk's radius.
CHECK_SLACK = 0.98


def _arnoldi(op, nev, seed):
    """The ``nev`` dominant eigenpairs of ``op`` (ARPACK); partial results if not converged."""
    rng = np.random.default_rng(seed)
    v0 = rng.standard_normal(op.shape[0])
    if op.dtype == complex:
        v0 = v0 + 1j * rng.standard_normal(op.shape[0])
    try:
        return spla.eigs(op, k=nev, which="LM", v0=v0, tol=ARNOLDI_TOL)
    except spla.ArpackNoConvergence as err:
        return err.eigenvalues, err.eigenvectors


def _real_span(values, z):
    """Real vectors spanning the (real operator's) eigenvectors ``z``, unit columns."""
    cols = []
    upper = values[values.imag > 0]
    # paired[i]: the conjugate of values[i] is among the upper half's (one table for all)
    paired = np.isclose(upper[None, :], np.conj(values)[:, None], rtol=1e-8).any(axis=1)
    for lam, v, pair in zip(values, z.T, paired):
        if lam.imag == 0:
            cols.append(v.real)
        elif lam.imag > 0 or not pair:
            cols.extend([v.real, v.imag])
    cols = np.array(cols).T
    return cols / np.linalg.norm(cols, axis=0)


def _projector(cols):
    """``x -> x - P x``, ``P`` the orthogonal projector onto the span of ``cols``.

    ``P = C (C^T C)^-1 C^T`` with the Cholesky factor of the small Gram
    matrix: one Gram product instead of orthonormalizing the tall block.
    """
    try:
        gram = la.cho_factor(cols.T @ cols, check_finite=False)
    except la.LinAlgError:   # nearly dependent eigenvectors: orthonormalize instead
        basis = np.linalg.qr(cols)[0]
        return lambda x: x - basis @ (basis.T @ x)
    return lambda x: x - cols @ la.cho_solve(gram, cols.T @ x, check_finite=False)


def _nearest_missed(op, values, z, sigma, seed):
    """Distance from ``sigma`` of the nearest eigenvalue *not* among ``values``.

    The span of the found eigenvectors is invariant under ``op``; projected on
    its orthogonal complement, ``op`` keeps exactly the eigenvalues not found
    (Schur deflation), so the dominant one of that projection, found by a
    second, independent Arnoldi run, is the nearest eigenvalue that was
    missed or lies beyond the disk.
    """
    rest_of = _projector(_real_span(values, z))
    n = op.shape[0]

    def deflated(x):
        # the Krylov vectors stay in the complement (start there, every output is
        # projected), so projecting the output alone is enough
        return rest_of(op.matvec(np.ravel(x)))

    rest = spla.LinearOperator((n, n), matvec=deflated, dtype=float)
    v0 = rest_of(np.random.default_rng(seed + 1000).standard_normal(n))
    try:
        mu = spla.eigs(rest, k=2, ncv=12, which="LM", v0=v0, tol=1e-2,
                       return_eigenvectors=False)
    except spla.ArpackNoConvergence as err:
        if len(err.eigenvalues) == 0:
            return 0.0   # unknown: treated as a miss
        mu = err.eigenvalues
    largest = float(np.abs(mu).max())
    return 1.0 / largest if largest > 0 else math.inf   # nothing left at all


@one_blas_thread
def none_missed(m, d_mat, k, values, vectors, n_modes):
    """True when the deflated check of :func:`_nearest_missed` finds no eigenvalue of the
    pencil but ``values`` (and their conjugates) within :data:`RADIUS_RATIO` beyond the
    ``n_modes``-th lowest of them (with its :data:`CHECK_SLACK`): then they hold its
    ``n_modes`` lowest modes, as far as a sparse solve's own check can tell (a numerical
    check, docs/theory.md section 3.1, not a proof).  ``values``, ``vectors`` (displacement
    columns) are accurate eigenpairs found another way (a reduced model's, certified); one LU
    and a short Arnoldi run on the deflated operator, where a solve would find the modes
    anew.  ``values`` may hold real (overdamped) eigenvalues too, with real vectors: they are
    deflated like the others and do not count among the ``n_modes``.  False also when the
    check finds an eigenvalue it cannot place (a real one not given, say): the caller then
    solves."""
    frequencies = np.sort(values.imag[values.imag > 0])
    if len(frequencies) < n_modes or n_modes <= 0:
        return False
    pencil = _Pencil(m, d_mat, k)
    sigma = SHIFT * pencil.ref
    q = (vectors * pencil.scale[:, None])[pencil.perm]
    z = np.vstack([q, q * (values / pencil.ref)])        # the scaled state [q^, lam q^ / s]
    top = frequencies[n_modes - 1]
    needed = RADIUS_RATIO * abs(1j * top - sigma)
    missed = _nearest_missed(pencil.operator(sigma), 1.0 / (values - sigma), z, sigma, 0)
    return bool(CHECK_SLACK * missed >= needed)


class SparseSolver:
    """The lowest modes by shift-invert Arnoldi on the scaled state-space pencil.

    ARPACK (``scipy.sparse.linalg.eigs``) runs on ``(A - sigma B)^-1 B`` for a
    small real shift ``sigma``; each application is one solve with the
    banded LU of ``K + sigma D + sigma^2 M`` after a reverse Cuthill-McKee
    reordering, so the cost grows about linearly with the model size.  The
    disk of eigenvalues found about the shift is enlarged until it reaches
    :data:`RADIUS_RATIO` beyond the highest requested mode, and a second,
    deflated Arnoldi run checks that no eigenvalue inside was missed
    (docs/theory.md, section 3.1).  A result that could not be proven
    complete carries a warning.
    """

    name = "sparse"

    def __init__(self, pencil=_Pencil):
        self.pencil = pencil        # or DensePencil: a small dense model's lowest modes

    @one_blas_thread
    def __call__(self, m, d_mat, k, n_modes, near=None, zeros=None):
        n = m.shape[0]
        extra = zeros or 0
        if n_modes <= 0:
            return DenseSolver()(m, d_mat, k, 0, near, zeros)
        if 2 * (2 * n_modes + FIRST_EXTRA) + extra >= 2 * n - 2:
            # too few DOFs for a partial solve to pay: the dense one finds everything
            return DenseSolver()(m, d_mat, k, n_modes, near, zeros)
        pencil = self.pencil(m, d_mat, k)
        if near is not None:
            return self._near(pencil, n_modes, complex(near))
        return self._lowest(pencil, n_modes, zeros)

    def _near(self, pencil, n_modes, target):
        # Off the target: a shift on an eigenvalue would leave the others to roundoff.
        sigma = target + 1j * NEAR_OFFSET * max(abs(target), SHIFT * pencil.ref)
        values, z = _arnoldi(pencil.operator(sigma), n_modes + NEAR_EXTRA, seed=0)
        values = sigma + 1.0 / values
        zero, oscillatory, real = _classify(values, pencil.ref)
        found = values[oscillatory]
        order = _pick(found, n_modes, target)
        q = pencil.displacements(z[:, oscillatory][:, order])
        return Eigenpairs(found[order], q, np.sort(values[real].real), int(zero.sum()),
                          float(np.abs(values - sigma).max()))

    def _lowest(self, pencil, n_modes, zeros=None):
        sigma = SHIFT * pencil.ref
        op = pencil.operator(sigma)
        size = 2 * pencil.n
        nev = 2 * n_modes + FIRST_EXTRA + (zeros or 0)
        for attempt in range(ATTEMPTS):
            nev = min(nev, size - 2)
            mu, z = _arnoldi(op, nev, seed=attempt)
            values = sigma + 1.0 / mu
            zero, oscillatory, real = _classify(values, pencil.ref, zeros)
            found = values[oscillatory]
            reach = float(np.abs(values - sigma).max()) if len(values) else 0.0
            if len(found) < n_modes:
                problem = f"found only {len(found)} of {n_modes} modes"
                grow = 2.0 * n_modes / max(len(found), 1)
            else:
                top = np.sort(found.imag)[n_modes - 1]
                needed = RADIUS_RATIO * abs(1j * top - sigma)
                if reach >= needed:
                    missed = _nearest_missed(op, mu, z, sigma, attempt)
                    reach = reach if missed >= CHECK_SLACK * reach else CHECK_SLACK * missed
                if reach >= needed:
                    problem = ""
                    break
                problem = (f"every eigenvalue was found only to {to_hz(reach):.6g} Hz from the "
                           f"shift, short of {to_hz(needed):.6g} Hz")
                grow = needed / max(reach, 1e-300)
            if nev >= size - 2:
                break
            # eigenvalue counts grow about linearly with the disk radius or slower
            nev = int(math.ceil(nev * min(grow, 2.0))) + 6
        order = _pick(found, n_modes, None)
        zf = z[:, oscillatory][:, order]
        warnings = []
        if problem:
            warnings.append(Notice(f"sparse eigen-solve: could not prove that no mode was missed "
                                   f"({problem})", "solver-doubt"))
        errors = pencil.backward_errors(found[order], zf)
        if len(errors) and errors.max() > RESIDUAL_LIMIT:
            warnings.append(Notice(f"sparse eigen-solve: a mode's relative residual is "
                            f"{errors.max():.1e} (above {RESIDUAL_LIMIT:.0e})", "solver-doubt"))
        return Eigenpairs(found[order], pencil.displacements(zf), np.sort(values[real].real),
                          int(zero.sum()), reach, tuple(warnings))


#: ``AutoSolver`` uses the dense solver below this many DOFs, the sparse one from
#: it on (measured: tests/benchmarks/bench_large.py --crossover, and whole sweeps of the
#: bundled cases: the sparse solve is the cheaper from about 80 DOFs; docs/performance.md).
AUTO_THRESHOLD = 80
#: When a sparse solve is in doubt (a mode may be missed, or a residual is poor),
#: ``AutoSolver`` repeats it densely up to this many DOFs (a few seconds per solve).
DENSE_FALLBACK_LIMIT = 1200


class AutoSolver:
    """Dense below :data:`AUTO_THRESHOLD` DOFs, sparse from there on."""

    name = "auto"

    def __init__(self, threshold=AUTO_THRESHOLD):
        self.threshold = threshold

    def __call__(self, m, d_mat, k, n_modes, near=None, zeros=None):
        if m.shape[0] < self.threshold:
            return DenseSolver()(m, d_mat, k, n_modes, near, zeros)
        result = SparseSolver()(m, d_mat, k, n_modes, near, zeros)
        if result.warnings and m.shape[0] <= DENSE_FALLBACK_LIMIT:
            dense = DenseSolver()(m, d_mat, k, n_modes, near, zeros)
            notes = tuple(Notice(f"{w}; the dense solver was used instead", "solver-doubt")
                          for w in result.warnings)
            return dataclasses.replace(dense, warnings=tuple(dense.warnings) + notes)
        return result


SOLVERS = {"dense": DenseSolver, "sparse": SparseSolver, "auto": AutoSolver}


def make_solver(name="auto"):
    """Return a solver by name: ``"dense"``, ``"sparse"`` or ``"auto"`` (by model size)."""
    try:
        return SOLVERS[name]()
    except KeyError:
        raise InputError("solver", "is not a known solver", value=name,
                         expected=" or ".join(sorted(SOLVERS)), kind="choice") from None
