"""The reduced-basis sweep against the full-model solve, on every bundled case.

Reference: the full-model eigen-solve of the same matrices (LAPACK's QZ/Hessenberg QR through
``scipy.linalg.eig`` below 80 DOFs, ARPACK's shift-invert Arnoldi above, with its proof that no
mode was missed: docs/theory.md, section 3.1) -- general-purpose reference libraries, not the
reduction.  The reduced path (rotorcalc.analysis.reduced) must give the same screening:

* every tracked eigenvalue of the sweep within 1e-7 relative (the residual check's tolerance:
  to first order about twice the relative eigenvalue error of a well-conditioned mode);
* every critical speed within 0.01 rpm, with the same whirl label, and its log decrement within
  1e-5 (absolute);
* every pair it returns certified: its largest residual at most the tolerance, recorded with
  the basis size in the sweep.

The generated rotor carries speed-dependent, cross-coupled bearings on a pedestal and a seal
(tests/benchmarks/generated.py), where the bearings change the projected matrices per speed.
"""

import dataclasses
import math

import numpy as np
import pytest
import scipy.linalg

from rotorcalc import read_rotor
from rotorcalc.analysis import critical_speeds, sweep
from rotorcalc.analysis import reduced
from rotorcalc.analysis.reduced import ReducedModel, ReducedSolver, sweep_solver
from rotorcalc.analysis.sweep import default_speeds
from rotorcalc.assembly import assemble
from rotorcalc.solvers import RADIUS_RATIO, AutoSolver, DenseSolver, none_missed
from tests.benchmarks.generated import generated_rotor
from tests.conftest import ROOT
from tests.verification.record import check

SOURCE = "full-model solve (LAPACK / ARPACK through scipy)"
RPM = 30.0 / math.pi
CASES = ("feed_pump", "overhung_fan", "compressor", "hp_compressor", "compressor_tilting_pad",
         "blower_two_lobe")


def _both(system, speeds=None, reference=AutoSolver):
    """(sweep, criticals) on the full model and on the reduced basis."""
    out = []
    for solver in (reference(), ReducedSolver(speeds)):
        result = sweep(system, speeds, solver=solver)
        out.append((result, critical_speeds(system, result, solver=solver)))
    return out


def _compare(name, system, speeds=None, reference=AutoSolver):
    (full, full_crits), (red, red_crits) = _both(system, speeds, reference)
    assert red.reduction is not None and full.reduction is None
    r = red.reduction
    assert r.largest_residual <= r.tolerance and r.basis_size <= system.n_dof
    assert full.eigenvalues.shape == red.eigenvalues.shape
    present = np.isfinite(full.eigenvalues)
    assert np.array_equal(present, np.isfinite(red.eigenvalues))
    worst = np.max(np.abs(red.eigenvalues[present] - full.eigenvalues[present])
                   / np.abs(full.eigenvalues[present]))
    check(f"{name}: reduced-basis sweep, largest relative eigenvalue difference "
          f"(basis {r.basis_size} of {r.dofs} DOFs)", SOURCE, 0.0, worst, 1e-7, "abs")
    assert [c.order for c in red_crits] == [c.order for c in full_crits]
    for a, b in zip(full_crits, red_crits):
        check(f"{name}: critical speed {a.speed * RPM:.1f} rpm, reduced basis", SOURCE,
              a.speed * RPM, b.speed * RPM, 0.01, "abs")
        check(f"{name}: log decrement at {a.speed * RPM:.1f} rpm, reduced basis", SOURCE,
              a.log_dec, b.log_dec, 1e-5, "abs")
        check(f"{name}: whirl at {a.speed * RPM:.1f} rpm, reduced basis", SOURCE,
              a.whirl, b.whirl, 0, "equal")
    assert len(red_crits) == len(full_crits)
    return red


@pytest.mark.parametrize("name", CASES)
def test_reduced_sweep_matches_the_full_one_on_each_bundled_case(name):
    system = assemble(read_rotor(ROOT / "cases" / f"{name}.toml"))
    _compare(name, system)


def test_reduced_sweep_matches_on_speed_dependent_cross_coupled_bearings(monkeypatch):
    """Against the full model's own path at this size (ARPACK with its completeness check):
    the projected model is solved the same way (shift-invert Arnoldi from
    :data:`~rotorcalc.analysis.reduced.ARNOLDI_FROM` columns, the same disk and check), so both
    leave out, by design, modes damped beyond a damping ratio of 0.3 that lie outside the disk
    (docs/theory.md, section 3.1); the next test holds the reduced solve against the dense
    solve, which finds every eigenvalue."""
    rotor = generated_rotor(40, mode_count=6, speed_count=30)
    system = assemble(rotor)
    journal = rotor.bearings[0]
    assert len(journal.speeds) > 1 and journal.coefficients["kxy"][0] != 0
    arnoldi = []
    real = reduced.SparseSolver.__call__
    monkeypatch.setattr(reduced.SparseSolver, "__call__",
                        lambda self, *a, **k: arnoldi.append(self.pencil) or real(self, *a, **k))
    red = _compare("generated rotor, 40 elements", system)
    # the projected model was solved by Arnoldi (not the dense fallback), no speed in full
    assert red.reduction.basis_size >= reduced.ARNOLDI_FROM
    assert reduced.DensePencil in arnoldi and red.reduction.full_solves == ()
    assert red.to_dict()["reduced_basis"]["basis_size"] == red.reduction.basis_size


def test_the_reduced_solve_misses_no_mode_inside_its_checked_disk():
    """Reference: the dense solve of the full model (LAPACK through scipy.linalg.eig), every
    eigenvalue.  At every third speed of the generated rotor, every oscillatory eigenvalue
    inside the disk the reduced solve checked complete, up to its highest returned mode, is
    among the returned ones, to 1e-7 relative."""
    rotor = generated_rotor(40, mode_count=6, speed_count=30)
    system = assemble(rotor)
    solver, n_modes = ReducedSolver(), rotor.settings.mode_count
    worst, counted = 0.0, 0
    for speed in default_speeds(rotor)[::3]:
        d_mat, k_mat = system.damping(speed) + speed * system.gyroscopic, system.stiffness(speed)
        mine = solver.solve_at(system, speed, n_modes, d_mat=d_mat, k_mat=k_mat)
        every = DenseSolver()(system.mass, d_mat, k_mat, system.n_dof).values
        inside = every[(np.abs(every) < mine.complete_within)
                       & (every.imag <= mine.values.imag.max() * (1 + 1e-9))]
        for value in inside:
            worst = max(worst, float(np.min(np.abs(mine.values - value)) / abs(value)))
            counted += 1
    assert counted >= 10 * n_modes
    check("generated rotor, 40 elements: every full-model eigenvalue inside the reduced solve's "
          "checked disk found, largest relative distance", "dense full-model solve (LAPACK)",
          0.0, worst, 1e-7, "abs")


def test_a_pair_that_misses_the_tolerance_is_solved_in_full_and_said():
    """A tolerance no basis meets: every speed falls back to the full model, is
    recorded and carries a notice; the numbers are the full model's."""
    rotor = generated_rotor(30, mode_count=3, speed_count=6)
    system = assemble(rotor)
    solver = ReducedSolver(tolerance=1e-30)
    result = sweep(system, solver=solver)
    full = sweep(system, solver=AutoSolver())
    assert len(result.reduction.full_solves) == len(result.speeds)
    assert any(w.code == "reduced-basis" for w in result.warnings)
    assert np.allclose(result.eigenvalues, full.eigenvalues, rtol=1e-9, equal_nan=True)


def test_the_end_check_finds_a_mode_the_basis_lacks():
    """Full-model solves at the samples catch a mode missing from the basis
    (one a residual cannot show: it is not among the reduced pairs at all)."""
    system = assemble(generated_rotor(60, mode_count=4, speed_count=10))
    speeds = np.linspace(0.0, 1000.0, 5)
    model = ReducedModel(system, 8, speeds)
    assert model.checked and model._missing([speeds[0], speeds[-1]]) == []
    # drop the directions of the lowest mode from the basis
    full = AutoSolver()(system.mass, system.damping(0.0), system.stiffness(0.0), 1)
    x = np.concatenate([full.vectors.real, full.vectors.imag], axis=1) * model.scale[:, None]
    q = np.linalg.qr(x)[0]
    w = model.v * model.scale[:, None]
    model._set_basis(model._orthonormal((w - q @ (q.T @ w)) / model.scale[:, None]))
    assert len(model._missing([speeds[0]])) >= 2


def _spy_on_the_checks(monkeypatch):
    """Lists that record each deflated check's answer and each full solve of the reduced
    path (the functions themselves still run)."""
    said, solved = [], []
    real_check, real_full = reduced.none_missed, reduced.AutoSolver.__call__
    monkeypatch.setattr(reduced, "none_missed",
                        lambda *a: said.append(real_check(*a)) or said[-1])
    monkeypatch.setattr(reduced.AutoSolver, "__call__",
                        lambda self, *a, **k: solved.append(1) or real_full(self, *a, **k))
    return said, solved


def test_the_deflated_check_finds_a_mode_the_reduced_model_lacks(monkeypatch):
    """At the top sample (no overdamped eigenvalue in the disk there) the deflated check runs
    before any full solve: with every reduced pair it finds nothing missing and no full solve
    runs; with the third mode left out of the reduced pairs (all the others certified) it
    finds the gap, and the full solve (the full model's ARPACK solve with its own check, the
    reference) gives back that mode's eigenvector."""
    system = assemble(generated_rotor(60, mode_count=4, speed_count=10))
    speeds = np.linspace(0.0, 1000.0, 5)
    model = ReducedModel(system, 8, speeds)
    top = speeds[-1]
    said, solved = _spy_on_the_checks(monkeypatch)
    assert model._missing([top]) == [] and said == [True] and solved == []
    real_solve = model._solve

    def without_the_third(*args):
        pairs = real_solve(*args)
        keep = np.arange(len(pairs.values)) != 2
        return dataclasses.replace(pairs, values=pairs.values[keep],
                                   vectors=pairs.vectors[:, keep])

    monkeypatch.setattr(model, "_solve", without_the_third)
    # the basis certifies the eight lowest modes; asked for six, the six lowest pairs left (the
    # 1st, 2nd, 4th to 7th modes) are certified, so it is the deflated check that decides
    model.n_solve = 6
    found = model._missing([top])
    assert said == [True, False] and solved == [1] and len(found) == 2
    third = real_solve(top, 8, None, None, None).vectors[:, 2]     # certified (basis of 8)
    back = np.hstack(found)
    gap = third - back @ np.linalg.lstsq(back, third, rcond=None)[0]
    assert np.linalg.norm(gap) < 1e-6 * np.linalg.norm(third)


def test_the_deflated_check_places_the_overdamped_eigenvalues_at_rest(monkeypatch):
    """At rest the generated rotor's supports make some motions overdamped: real eigenvalues
    inside the disk the check must clear for twelve modes, which the oscillatory pairs alone
    cannot deflate.  Reference: every eigenvalue of the full model's unscaled first-order
    pencil by LAPACK's QZ (scipy.linalg.eig, called here directly, not through the solvers
    under test).  The reduced model's real eigenvalues equal the full model's real ones
    inside the disk (1e-7 relative); with them deflated as well the check finds nothing
    missing and no full solve runs; with the tenth mode left out it finds the gap (the ten
    lowest frequencies count, not the real eigenvalues' zero imaginary parts)."""
    system = assemble(generated_rotor(60, mode_count=4, speed_count=10))
    model = ReducedModel(system, 12, np.linspace(0.0, 1000.0, 5))
    d_mat, k_mat = system.damping(0.0), system.stiffness(0.0)
    pairs = model._solve(0.0, 12, None, None, None)
    assert np.all(model.certify(pairs.values, pairs.vectors, d_mat, k_mat)[0] <= 1e-7)
    # the pencil balanced here (unit mass diagonal, time in units of 1 / w), not by the solvers
    n = system.n_dof
    d = 1.0 / np.sqrt(system.mass.diagonal())
    m_, c_, k_ = (a.toarray() * d[:, None] * d[None, :] for a in (system.mass, d_mat, k_mat))
    w = float(np.sqrt(np.median(np.diag(k_))))
    every = w * scipy.linalg.eig(np.block([[np.zeros((n, n)), np.eye(n)], [-k_ / w**2, -c_ / w]]),
                                 np.block([[np.eye(n), np.zeros((n, n))],
                                           [np.zeros((n, n)), m_]]), right=False)
    every = every[np.isfinite(every)]
    every = every[np.abs(every.imag) <= 1e-9 * np.abs(every)].real
    disk = RADIUS_RATIO * pairs.values.imag.max()
    inside = every[np.abs(every) < disk]
    real, x = reduced.real_eigenpairs(*model.matrices(0.0))
    x = model.v @ x
    sure = model.certify(real.astype(complex), x.astype(complex), d_mat, k_mat)[0] <= 1e-7
    mine = real[sure & (np.abs(real) < disk)]
    assert len(inside) >= 1 and len(mine) == len(inside)
    check("generated rotor, 60 elements, at rest: overdamped eigenvalues inside the check's "
          "disk, reduced model against the full one, largest relative difference",
          "full model's first-order pencil, LAPACK QZ (scipy.linalg.eig)", 0.0,
          float(np.max(np.abs(np.sort(mine) - np.sort(inside)) / np.abs(inside))), 1e-7, "abs")
    said, solved = _spy_on_the_checks(monkeypatch)
    assert model._missing([0.0]) == [] and said == [False, True] and solved == []
    values, vectors = np.concatenate([pairs.values, real[sure]]), np.hstack([pairs.vectors,
                                                                             x[:, sure]])
    assert none_missed(system.mass, d_mat, k_mat, values, vectors, 10)
    keep = np.arange(len(values)) != 9
    assert not none_missed(system.mass, d_mat, k_mat, values[keep], vectors[:, keep], 10)


def test_the_basis_rounds_solves_serve_the_sweep(monkeypatch):
    """The last round of the basis solves and certifies the sample speeds, which are sweep
    speeds: the sweep takes those pairs instead of solving them again (each once), with the
    same numbers as solving them anew, digit for digit."""
    rotor = generated_rotor(40, mode_count=6, speed_count=30)
    system = assemble(rotor)
    solver = ReducedSolver()
    model = solver.model(system, rotor.settings.mode_count)
    sampled = set(model._sampled[1])
    assert len(sampled) == reduced.SAMPLES and model._sampled[0] is model.v
    calls = []
    real_solve = ReducedModel._solve
    monkeypatch.setattr(ReducedModel, "_solve",
                        lambda self, speed, *a: calls.append(speed) or real_solve(self, speed, *a))
    reused = sweep(system, solver=solver)
    assert len(calls) == len(reused.speeds) - len(sampled)
    assert not sampled & set(calls) and model._sampled[1] == {}
    monkeypatch.setattr(ReducedModel, "_known", lambda self, *a: None)
    anew = sweep(system, solver=ReducedSolver())
    np.testing.assert_array_equal(reused.eigenvalues, anew.eigenvalues)
    np.testing.assert_array_equal(reused.shapes, anew.shapes)


def test_the_missing_mode_check_runs_even_when_the_rounds_run_out(monkeypatch):
    """With no round to spare (and a tolerance no basis meets), the check for missing modes
    still runs, and the summary says it did."""
    monkeypatch.setattr(reduced, "ROUNDS", 1)
    system = assemble(generated_rotor(60, mode_count=4, speed_count=10))
    calls = []
    real = ReducedModel._missing
    monkeypatch.setattr(ReducedModel, "_missing",
                        lambda self, speeds: calls.append(len(speeds)) or real(self, speeds))
    model = ReducedModel(system, 8, np.linspace(0.0, 1000.0, 5), tolerance=1e-30)
    assert calls == [3] and model.checked and model.summary().complete


def test_the_reduced_basis_is_chosen_for_large_models_over_many_speeds(monkeypatch):
    small = assemble(generated_rotor(30, mode_count=3, speed_count=6))      # 126 DOFs
    assert not isinstance(sweep_solver(small, np.zeros(100)), ReducedSolver)
    monkeypatch.setattr(reduced, "REDUCED_THRESHOLD", 100)
    monkeypatch.setattr(reduced, "REDUCED_WORK", 10000)
    assert isinstance(sweep_solver(small, np.zeros(100)), ReducedSolver)     # 12600 >= 10000
    assert not isinstance(sweep_solver(small, np.zeros(50)), ReducedSolver)  # too little work
    monkeypatch.setattr(reduced, "REDUCED_WORK", 0)
    assert not isinstance(sweep_solver(small, np.zeros(5)), ReducedSolver)   # too few speeds
    given = AutoSolver()
    assert sweep_solver(small, np.zeros(100), given) is given


def test_reduced_solver_sends_no_basis_to_workers_and_solves_in_process():
    import pickle
    system = assemble(generated_rotor(30, mode_count=3, speed_count=6))
    solver = ReducedSolver()
    result = sweep(system, solver=solver, workers=2)
    assert result.reduction is not None and solver._models
    copy = pickle.loads(pickle.dumps(solver))
    assert copy._models == []
    # the copy builds the same basis and gives the same sweep, bit for bit
    again = sweep(system, solver=copy)
    assert np.array_equal(again.eigenvalues, result.eigenvalues, equal_nan=True)
    assert again.reduction == result.reduction


def test_the_screening_records_the_refinements_too():
    """The reduction the screening reports covers the critical-speed and stability
    refinements' solves, not only the sweep's."""
    from rotorcalc.analysis.screening import screen
    rotor = generated_rotor(30, mode_count=3, speed_count=25)
    forced = ReducedSolver()
    result = screen(rotor, solver=forced)
    system = forced._models[0][0]
    assert result.sweep.reduction == forced.summary(system)
    assert result.sweep.reduction.complete


def test_newton_on_the_projected_model_gives_the_full_models_pair_or_nothing(monkeypatch):
    """The critical-speed refinement's steps on a reduced basis (ReducedModel.newton), from
    the reduced pair at a nearby speed: the answer is the full model's eigenvalue (dense
    solve, LAPACK) to 1e-7 relative and carries its certified residual; under a tolerance no
    pair meets, Newton's converged answer is refused (the caller then solves), never returned
    uncertified."""
    rotor = generated_rotor(40, mode_count=6, speed_count=30)
    system = assemble(rotor)
    speeds = default_speeds(rotor)
    model = ReducedModel(system, 10, speeds)
    start, speed = speeds[10], speeds[10] * 1.01
    pairs = model.solve(start, 6, None, None, None,
                        system.damping(start) + start * system.gyroscopic,
                        system.stiffness(start))
    d_mat, k_mat = system.damping(speed) + speed * system.gyroscopic, system.stiffness(speed)
    every = DenseSolver()(system.mass, d_mat, k_mat, 12).values
    for value, vector in zip(pairs.values, pairs.vectors.T):
        found = model.newton(speed, value, vector, d_mat, k_mat)
        assert found is not None and 0 < found.backward_error <= model.tolerance
        check(f"generated rotor, 40 elements: Newton on the reduced basis, mode near "
              f"{value.imag:.0f} rad/s", "dense full-model solve (LAPACK)", 0.0,
              float(np.min(np.abs(every - found.value)) / abs(found.value)), 1e-7, "abs")
    converged = []
    real = reduced.newton_pair
    monkeypatch.setattr(reduced, "newton_pair",
                        lambda *a, **k: converged.append(real(*a, **k)) or converged[-1])
    model.tolerance = 0.0
    assert model.newton(speed, pairs.values[0], pairs.vectors[:, 0], d_mat, k_mat) is None
    assert converged and converged[-1] is not None     # converged, then refused
