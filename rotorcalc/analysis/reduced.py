"""Reduced-basis eigen-solves for speed sweeps, every eigenpair certified in the full model.

The lowest modes of a rotor over a speed range live in a small subspace.  The
model is projected once onto a basis ``V`` of

* the undamped modes of a *reference system* (shaft, supports, and every
  bearing's direct stiffness at the middle of the sweep; no damping, no
  gyroscopics), :data:`MODES_PER_MODE` per mode solved plus :data:`EXTRA_MODES`;
* static correction vectors: the reference system's deflection under a unit
  force at every bearing, seal and support DOF and a unit moment at every disk,
  where the speed-dependent coefficients and the gyroscopic coupling act;

and each speed solves the small dense pencil ``(V^T M V, V^T D V, V^T K V)``
(:func:`projected_solve`: shift-invert Arnoldi on its dense LU, with the sparse solve's
completeness check, from :data:`ARNOLDI_FROM` columns).  The constant parts are projected
once; a bearing whose coefficients change with speed changes only its few-DOF term, through
the rows of ``V`` at its DOFs.  The critical-speed refinement's Newton steps run on the same
projected model (:meth:`ReducedModel.newton`), their answers certified like the sweep's.

Every eigenpair returned is checked in the full model by its preconditioned
relative residual

    eta = |S P Q(lam) x| / |S x|,   Q(lam) = lam^2 M + lam D + K,   P = (K0 - sigma M)^-1,

with ``K0`` the reference stiffness, ``sigma`` a small negative shift and ``S`` the
DOF scaling of the solvers (square root of the mass diagonal).  For a mode near one
of the reference system's, ``eta`` is to first order twice the relative error of the
eigenvalue, and it measures the vector's error in an energy-like norm (docs/theory.md,
"Reduced-basis sweeps").  While the basis is built, the residual vectors ``P Q x``
of the pairs above :data:`TOLERANCE` at a few sample speeds are added to it until
every one passes, and three samples are checked for a missing mode in the full model (by
the deflated Arnoldi check with every certified pair deflated, or by a full solve where that
check cannot decide).  After that the basis is fixed (results do not depend on the order of
the speeds); a speed where a returned pair still misses the tolerance, or where the
reduced model shows a growing non-oscillating motion, is solved in the full model.
Nothing is silent: :meth:`ReducedSolver.summary` reports the basis size, the largest
residual certified and the speeds solved in full.
"""

from __future__ import annotations

from dataclasses import dataclass, replace

import numpy as np
import scipy.linalg as la
import scipy.sparse as sp
import scipy.sparse.linalg as spla
from scipy.sparse.csgraph import reverse_cuthill_mckee

from ..notices import Notice
from ..pencils import DensePencil, times
from ..solvers import (NUMERICAL_FAILURES, AutoSolver, DenseSolver, SparseSolver, _factor,
                       _scaling, make_solver, none_missed, real_eigenpairs)
from .modes import GROWTH_RTOL
from .pair_newton import NewtonPair, mixed, newton_pair
from .projected import Projection

#: Largest preconditioned relative residual accepted (to first order about twice the
#: relative eigenvalue error of a well-conditioned mode): the eigenvalues then agree with
#: the full solve's to 2e-8 relative or better, measured (docs/performance.md).
TOLERANCE = 1e-7
#: Undamped reference modes in the first basis, per mode solved (a whirl mode
#: pair comes from two planar modes), and beyond.
MODES_PER_MODE = 2
EXTRA_MODES = 8
#: Speeds, spread over the sweep, at which the basis is enriched and checked.
SAMPLES = 9
#: Enrichment rounds before the basis is left as it is (speeds that fail then
#: are solved in the full model).
ROUNDS = 6
#: Residual directions are kept down to this share of the largest one.
KEEP = 1e-2
#: Relative distance within which a full-model eigenvalue must have a reduced one
#: in the end-sample check (a missing mode is off by far more).
MATCH = 1e-5
#: Shift of the reference pencil, a share of the solvers' reference frequency
#: squared: below zero, so that ``K0 - sigma M`` is regular for a free rotor too.
SHIFT = 1e-8
#: Below this share of the DOFs in the first basis, the reduction pays; above it
#: the basis is the identity (the reduced model is the full one).
MAX_SHARE = 0.5
#: From this many columns a projected model's modes come from shift-invert Arnoldi on its dense
#: LU, below from all its eigenvalues (measured: 60 columns 6.5 against 7.5 ms, 103 columns
#: 12 against 31 ms; docs/performance.md, "fourth pass").
ARNOLDI_FROM = 60


@dataclass(frozen=True)
class Reduction:
    """What a reduced-basis study used and certified.

    Attributes
    ----------
    basis_size : int
        Columns of the final basis (the full model has ``dofs``).
    dofs : int
    largest_residual : float
        Largest certified residual of a returned eigenpair (see the module).
    tolerance : float
    rounds : int
        Enrichment rounds the basis took.
    complete : bool
        The check for missing modes ran at three sample speeds (the deflated check, or a
        full-model solve where it cannot decide) and found none the basis lacks (after adding
        any it found).
    full_solves : tuple of float
        Speeds (rad/s) solved in the full model because a reduced pair missed the
        tolerance there.
    """

    basis_size: int
    dofs: int
    largest_residual: float
    tolerance: float
    rounds: int
    full_solves: tuple = ()
    complete: bool = True

    def describe(self):
        """One sentence for the terminal: what was solved how, and how well."""
        text = (f"Modes solved on a reduced basis of {self.basis_size} of {self.dofs} DOFs, every "
                f"pair checked in the full model: largest residual {self.largest_residual:.1e} "
                f"(tolerance {self.tolerance:.0e}; docs/theory.md, section 3.2)")
        if not self.complete:
            text += "; the check for missing modes did not run"
        if self.full_solves:
            text += f"; {len(self.full_solves)} speed(s) solved in the full model"
        return text + "."

    def to_dict(self):
        return {"basis_size": self.basis_size, "dofs": self.dofs,
                "largest_residual": self.largest_residual, "tolerance": self.tolerance,
                "enrichment_rounds": self.rounds, "completeness_checked": self.complete,
                "speeds_solved_in_full_rad_s": [float(v) for v in self.full_solves]}


def _reference_stiffness(system, speed):
    """Shaft, supports and every bearing's direct stiffness (kxx, kyy, not below 0)."""
    return (system.shaft_stiffness + system.support_stiffness
            + system._bearing_part(speed, "k", None,
                                   lambda k2: np.diag(np.maximum(np.diag(k2), 0.0))))


def projected_solve(m, d, k, n_modes, near=None, zeros=None):
    """The lowest (or nearest) modes of a projected dense model.  The lowest, from
    :data:`ARNOLDI_FROM` DOFs: by shift-invert Arnoldi on its dense LU with the sparse solve's
    completeness check (:class:`~rotorcalc.solvers.SparseSolver` on a
    :class:`~rotorcalc.pencils.DensePencil`).  Otherwise, and when that solve is in doubt,
    fails or comes short, every eigenvalue of the pencil by LAPACK (a ``near`` solve too: the
    sparse one has no completeness check)."""
    if m.shape[0] >= ARNOLDI_FROM and near is None:
        try:
            pairs = SparseSolver(DensePencil)(m, d, k, n_modes, None, zeros)
            if not pairs.warnings and len(pairs.values) >= n_modes:
                return pairs
        except NUMERICAL_FAILURES:
            pass             # the dense solve decides
    return DenseSolver()(m, d, k, n_modes, near, zeros)


class _Compliance:
    """``solve(b) = A^-1 b`` for the sparse reference pencil ``A``: LAPACK's banded LU after a
    reverse Cuthill-McKee reordering (a shaft's matrices are banded), as the sparse solver
    factors its shifted pencil (:func:`rotorcalc.solvers._factor`)."""

    def __init__(self, a):
        a = sp.csr_matrix(a)
        self.perm = reverse_cuthill_mckee(a, symmetric_mode=True)
        b = a[self.perm][:, self.perm].tocoo()
        self.solve_permuted = _factor(b, int(np.abs(b.row - b.col).max()) if b.nnz else 0)

    def solve(self, rhs):
        out = np.empty_like(rhs)
        out[self.perm] = self.solve_permuted(np.ascontiguousarray(rhs[self.perm]))
        return out


class ReducedModel:
    """One system projected on a certified basis (built once; see the module)."""

    def __init__(self, system, n_solve, samples, tolerance=TOLERANCE):
        self.system, self.n_solve, self.tolerance = system, n_solve, tolerance
        m = system.mass
        samples = np.unique(np.asarray(samples, dtype=float))   # the same basis in any order
        k0 = _reference_stiffness(system, float(np.median(samples)))
        self.scale, ref = _scaling(m, k0)
        self.lu = _Compliance(k0 + SHIFT * ref ** 2 * m)
        self.largest, self.full_solves, self.rounds, self.checked = 0.0, [], 0, False
        self._sampled = None     # (basis, {speed: (pairs, eta)}) of the last round, see solve
        n = system.n_dof
        n_modes = MODES_PER_MODE * n_solve + EXTRA_MODES
        if n_modes >= MAX_SHARE * n:
            self._set_basis(np.eye(n))
            self.checked = True       # the full model itself
            return
        op = spla.LinearOperator((n, n), matvec=self.lu.solve, dtype=float)
        v0 = np.random.default_rng(0).standard_normal(n)
        _, modes = spla.eigsh(k0, k=n_modes, M=m, sigma=-SHIFT * ref ** 2, OPinv=op, v0=v0)
        self._set_basis(self._orthonormal(np.hstack([modes, self.lu.solve(self._loads())])))
        self._enrich(samples[np.unique(np.linspace(0, len(samples) - 1,
                                                   SAMPLES).round().astype(int))])

    # --- the basis ------------------------------------------------------------------

    def _loads(self):
        """Unit forces at every bearing, seal and support DOF; unit moments at the disks."""
        system = self.system
        dofs = {int(d) for link in system.every_link for d in link.dofs}
        for disk in system.rotor.disks:
            if disk.polar_inertia > 0 or disk.transverse_inertia > 0:
                node = system.mesh.station_nodes[disk.station]
                dofs.update(system.node_dofs(node)[2:].tolist())
        loads = np.zeros((system.n_dof, len(dofs)))
        loads[sorted(dofs), np.arange(len(dofs))] = 1.0
        return loads

    def _orthonormal(self, vectors, basis=None):
        """Columns orthonormal in the scaled norm, spanning ``vectors`` (less ``basis``)."""
        w = vectors * self.scale[:, None]
        w = w / np.maximum(np.linalg.norm(w, axis=0), 1e-300)
        if basis is not None:
            b = basis * self.scale[:, None]
            for _ in range(2):       # twice is enough (Kahan, Parlett)
                w = w - b @ (b.T @ w)
        u, sv, _ = la.svd(w, full_matrices=False)
        keep = sv > (KEEP if basis is not None else 1e-10) * max(sv[0], 1e-300) \
            if len(sv) else sv > 0
        return u[:, keep] / self.scale[:, None]

    def _set_basis(self, v):
        self.v = v
        self.projection = Projection(self.system, v)

    def _enrich(self, samples):
        """Add residual vectors until every pair at the samples passes; then check, at the
        first, middle and last sample, that the full model has no mode the basis lacks (and
        go on enriching if it has)."""
        ends = [samples[0], samples[len(samples) // 2], samples[-1]]
        s = self.system
        full = [(speed, s.damping(speed) + speed * s.gyroscopic, s.stiffness(speed))
                for speed in samples]          # the full matrices, once for every round
        for self.rounds in range(1, ROUNDS + 1):
            directions, solved = [], {}
            for speed, d_mat, k_mat in full:
                pairs = self._solve(speed, self.n_solve, None, None, None)
                eta, z = self.certify(pairs.values, pairs.vectors, d_mat, k_mat)
                solved[float(speed)] = (pairs, eta)
                bad = eta > self.tolerance
                if bad.any():
                    directions += [z[:, bad].real, z[:, bad].imag]
            if not directions:
                self._sampled = (self.v, solved)
                directions = self._missing(ends)
                self.checked = True
                if not directions:
                    return
            new = self._orthonormal(np.hstack(directions), self.v)
            if new.shape[1] == 0:
                break
            self._set_basis(np.hstack([self.v, new]))
        # out of rounds (or of new directions): the check runs all the same, and what it
        # finds goes in; pairs that still miss the tolerance are solved in full, speed by speed
        missing = self._missing(ends)
        self.checked = True
        if missing:
            new = self._orthonormal(np.hstack(missing), self.v)
            if new.shape[1]:
                self._set_basis(np.hstack([self.v, new]))

    def _missing(self, speeds):
        """Full-model eigenvectors at ``speeds`` whose eigenvalue the reduced model lacks.

        Where the lowest ``n_solve`` reduced pairs are certified and the deflated check, with
        every certified pair deflated, finds no other eigenvalue of the full model near enough
        (:func:`~rotorcalc.solvers.none_missed`), none is taken to be missing (as a sparse
        solve's own check would take it); otherwise (an overdamped eigenvalue in the disk,
        say: the check cannot place it) the full model is solved and compared."""
        out = []
        for speed in speeds:
            d_mat = self.system.damping(speed) + speed * self.system.gyroscopic
            k_mat = self.system.stiffness(speed)
            pairs = self._solve(speed, self.n_solve + EXTRA_MODES, None, None, None)
            sure = self.certify(pairs.values, pairs.vectors, d_mat, k_mat)[0] <= self.tolerance
            if sure[:self.n_solve].all() and self._none_missed(
                    speed, d_mat, k_mat, pairs.values[sure], pairs.vectors[:, sure]):
                continue
            full = AutoSolver()(self.system.mass, d_mat, k_mat, self.n_solve)
            mine = pairs.values
            for value, vector in zip(full.values, full.vectors.T):
                if not len(mine) or np.min(np.abs(mine - value)) > MATCH * abs(value):
                    out += [vector.real[:, None], vector.imag[:, None]]
        return out

    def _none_missed(self, speed, d_mat, k_mat, values, vectors):
        """The deflated check with the certified pairs (the extra ones too); where it finds an
        eigenvalue it cannot place (an overdamped one, at rest, say), once more with the
        reduced model's certified real eigenpairs deflated as well."""
        mass = self.system.mass
        if none_missed(mass, d_mat, k_mat, values, vectors, self.n_solve):
            return True
        real, x = real_eigenpairs(*self.matrices(speed))
        if not len(real):
            return False
        x = self.v @ x
        sure = self.certify(real.astype(complex), x.astype(complex), d_mat, k_mat)[0] \
            <= self.tolerance
        return bool(sure.any()) and none_missed(
            mass, d_mat, k_mat, np.concatenate([values, real[sure]]),
            np.hstack([vectors, x[:, sure]]), self.n_solve)

    # --- one speed ------------------------------------------------------------------

    def matrices(self, speed, whirl=None):
        """The projected ``(M, D, K)`` at spin speed ``speed`` (rad/s)."""
        return self.projection.matrices(speed, whirl)

    def _solve(self, speed, n_modes, near, zeros, whirl):
        m, d, k = self.matrices(speed, whirl)
        pairs = projected_solve(m, d, k, n_modes, near, zeros)
        return replace(pairs, vectors=times(self.v, pairs.vectors))

    def certify(self, values, vectors, d_mat, k_mat):
        """Each pair's certified residual (see the module) and its residual vector ``P Q x``."""
        eta, z, _ = self._certified(values, vectors, d_mat, k_mat)
        return eta, z

    def _certified(self, values, vectors, d_mat, k_mat):
        """:meth:`certify`'s ``eta`` and ``z``, with the products ``(M X, D X, K X)``."""
        mx, dx, kx = (times(a, vectors) for a in (self.system.mass, d_mat, k_mat))
        r = mx * values ** 2 + dx * values + kx
        # the real and imaginary parts as one real block (:func:`~rotorcalc.pencils.times`)
        z = self.lu.solve(np.ascontiguousarray(r).view(np.float64)).view(np.complex128)
        size = np.linalg.norm(vectors * self.scale[:, None], axis=0)
        eta = np.linalg.norm(z * self.scale[:, None], axis=0) / np.maximum(size, 1e-300)
        return eta, z, (mx, dx, kx)

    def newton(self, speed, value, vector, d_mat, k_mat, whirl=None):
        """The eigenpair Newton's method reaches from ``(value, vector)`` on the projected model
        at ``speed`` (:func:`~.pair_newton.newton_pair`), lifted and certified in the full model
        like a reduced solve's pair (residual at most the tolerance; not a degenerate pair's
        mixture); None otherwise (the caller then solves).  ``d_mat``, ``k_mat``: the full
        model's at ``speed``."""
        m, d, k = self.matrices(speed, whirl)
        start = self.v.T @ (self.scale ** 2 * np.asarray(vector))   # projection, scaled norm
        pair = newton_pair(m, d, k, value, start, physical=False)
        if pair is None:
            return None
        x = times(self.v, pair.vector[:, None])
        eta, _ = self.certify(np.array([pair.value]), x, d_mat, k_mat)
        if not eta[0] <= self.tolerance or mixed(x[:, 0], self.system.mass, d_mat, k_mat):
            return None
        self.largest = max(self.largest, float(eta[0]))
        return NewtonPair(pair.value, x[:, 0], float(eta[0]), pair.steps)

    def _known(self, speed, n_modes, near, zeros, whirl):
        """The pairs and residuals the basis's last round solved at ``speed`` (a sample), when
        the basis is still the one they were solved on and they answer this solve (the same
        modes, synchronous, no rigid-body modes); each is handed out once (then freed)."""
        if self._sampled is None or self._sampled[0] is not self.v or near is not None \
                or whirl is not None or zeros or n_modes != self.n_solve:
            return None
        return self._sampled[1].pop(float(speed), None)

    def solve(self, speed, n_modes, near, zeros, whirl, d_mat, k_mat):
        """Eigenpairs at ``speed``, certified, or from the full model when they are not."""
        reason = ""
        try:
            known = self._known(speed, n_modes, near, zeros, whirl)
            if known is not None:       # solved and certified as the basis was built
                (pairs, eta), products = known, None
            else:
                pairs = self._solve(speed, n_modes, near, zeros, whirl)
                eta, _, products = self._certified(pairs.values, pairs.vectors, d_mat, k_mat)
            worst = float(eta.max()) if len(eta) else 0.0
            scale = float(np.abs(pairs.values).min()) if len(pairs.values) else 1.0
            if n_modes and not len(pairs.values):
                reason = "no mode"
            elif not worst <= self.tolerance:
                reason = f"residual {worst:.1e}"
            elif np.any(pairs.real_eigenvalues > GROWTH_RTOL * scale):
                reason = "a growing non-oscillating motion"
        except NUMERICAL_FAILURES as exc:
            reason = f"{type(exc).__name__}"
        if not reason:
            self.largest = max(self.largest, worst)
            return replace(pairs, products=products)     # the mode checks' products too
        self.full_solves.append(float(speed))
        full = AutoSolver()(self.system.mass, d_mat, k_mat, n_modes, near, zeros)
        note = Notice(f"reduced-basis solve not certified ({reason}): solved in the full model",
                      "reduced-basis", (float(speed),))
        return replace(full, warnings=tuple(full.warnings) + (note,))

    def summary(self):
        return Reduction(self.v.shape[1], self.system.n_dof, self.largest, self.tolerance,
                         self.rounds, tuple(self.full_solves), self.checked)


class ReducedSolver:
    """Reduced-basis eigen-solves bound to one assembled system (see the module).

    Used through :func:`~rotorcalc.analysis.modes.modes_at`, which passes the
    system and the speed (:meth:`solve_at`); called with bare matrices, it solves
    them in full (:class:`~rotorcalc.solvers.AutoSolver`).  ``speeds`` are the
    sweep's (rad/s): the basis is enriched at a few of them; by default the rotor's
    sweep speeds.  It keeps one basis per system and mode count, built on first use,
    and solves in the calling process only (``in_process``): the reduced solves are
    cheap, the basis is not worth sending to workers.
    """

    name = "reduced"
    in_process = True

    def __init__(self, speeds=None, tolerance=TOLERANCE):
        self.speeds = None if speeds is None else np.asarray(speeds, dtype=float)
        self.tolerance = tolerance
        self._models = []

    def __call__(self, m, d_mat, k, n_modes, near=None, zeros=None):
        return AutoSolver()(m, d_mat, k, n_modes, near, zeros)

    def model(self, system, n_modes):
        """The basis for ``system`` (built on first use); None when it could not be built."""
        for known, model in self._models:
            # a model serves a few more modes than it was built for: every pair is certified
            if known is system and (model is None or n_modes <= model.n_solve + EXTRA_MODES):
                return model
        if self.speeds is not None:
            speeds = self.speeds
        else:
            from .sweep import default_speeds
            speeds = default_speeds(system.rotor)
        from .sweep import TRACKING_RESERVE
        n_solve = max(n_modes, system.rotor.settings.mode_count + TRACKING_RESERVE)
        try:
            model = ReducedModel(system, n_solve, speeds, self.tolerance)
        except NUMERICAL_FAILURES:
            model = None       # every speed solved in full, and said
        self._models.append((system, model))
        return model

    def solve_at(self, system, speed, n_modes, near=None, zeros=None, whirl=None, *,
                 d_mat, k_mat):
        """Certified eigenpairs of ``system`` at ``speed`` (see :meth:`ReducedModel.solve`)."""
        model = self.model(system, n_modes)
        if model is not None:
            return model.solve(speed, n_modes, near, zeros, whirl, d_mat, k_mat)
        full = AutoSolver()(system.mass, d_mat, k_mat, n_modes, near, zeros)
        note = Notice("the reduced basis could not be built: solved in the full model",
                      "reduced-basis", (float(speed),))
        return replace(full, warnings=tuple(full.warnings) + (note,))

    def basis(self, system):
        """The largest basis built for ``system`` (n_dof, r), or None (none built, or the
        identity: a model too small to reduce)."""
        models = [model for known, model in self._models if known is system and model]
        if not models:
            return None
        v = max(models, key=lambda model: model.v.shape[1]).v
        return v if v.shape[1] < MAX_SHARE * system.n_dof else None

    def summary(self, system):
        """The :class:`Reduction` of the largest basis used for ``system`` (None if none)."""
        models = [model for known, model in self._models if known is system and model]
        if not models:
            return None
        best = max(models, key=lambda model: model.n_solve)
        full = tuple(sorted({v for model in models for v in model.full_solves}))
        return replace(best.summary(), largest_residual=max(model.largest for model in models),
                       full_solves=full, complete=all(model.checked for model in models))

    def __getstate__(self):        # a copy sent to a worker builds its own basis
        return {"speeds": self.speeds, "tolerance": self.tolerance, "_models": []}


#: Sweeps solve on a reduced basis from this many DOFs ...
REDUCED_THRESHOLD = 400
#: ... over at least this many speeds (the basis costs some full solves' time) ...
REDUCED_MIN_SPEEDS = 20
#: ... when DOFs times speeds reach this: the basis is paid once, each speed saves a share of
#: a full solve (measured crossovers on the generated rotors: 1206 DOFs over 20 speeds, 806
#: over 40, about 400 over 100; docs/performance.md, "fourth pass").
REDUCED_WORK = 24000


def sweep_solver(system, speeds, solver=None):
    """The solver a sweep of ``system`` over ``speeds`` uses: ``solver`` when given; else a
    :class:`ReducedSolver` for a large model over many speeds, else ``"auto"``."""
    if solver is not None:
        return solver
    if system.n_dof >= REDUCED_THRESHOLD and len(speeds) >= REDUCED_MIN_SPEEDS \
            and system.n_dof * len(speeds) >= REDUCED_WORK:
        return ReducedSolver(speeds)
    return make_solver()
