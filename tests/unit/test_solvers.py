"""Sparse shift-invert solver against the dense LAPACK solve, and sweeps that do not
depend on the worker count.

Reference: the dense solve (LAPACK ``geev`` on the same scaled state-space
pencil, ``DenseSolver``), which computes every eigenvalue; the sparse solve must
return the same lowest modes.  Tolerance 1e-8 relative: both are backward
stable on this well-scaled pencil (measured agreement ~1e-11 at these sizes).
"""

import importlib
import math
import multiprocessing

import types

import numpy as np
import pytest

from rotorcalc import pencils, solvers
from rotorcalc.analysis import critical_speeds, screen, sweep
from rotorcalc.analysis.tracking import mac_matrix
from rotorcalc.assembly import assemble
from rotorcalc.solvers import AutoSolver, DenseSolver, SparseSolver, make_solver
from tests.benchmarks.generated import generated_rotor
from tests.conftest import isotropic, uniform_shaft


@pytest.fixture(scope="module")
def system():
    return assemble(generated_rotor(40, mode_count=8, speed_count=12))   # 166 DOFs


def _matrices(system, speed):
    return (system.mass, system.damping(speed) + speed * system.gyroscopic,
            system.stiffness(speed))


@pytest.mark.parametrize("speed", [0.0, 700.0, 1500.0])
def test_sparse_matches_dense(system, speed):
    m, d, k = _matrices(system, speed)
    dense = DenseSolver()(m, d, k, 16)
    sparse = SparseSolver()(m, d, k, 16)
    assert sparse.warnings == ()
    np.testing.assert_allclose(sparse.values, dense.values, rtol=1e-8)
    mac = np.diag(mac_matrix(sparse.vectors.T, dense.vectors.T))
    assert mac.min() > 1 - 1e-8
    # the found disk reaches beyond the band by the promised factor
    assert sparse.complete_within >= solvers.RADIUS_RATIO * sparse.values[-1].imag


@pytest.mark.parametrize("speed", [0.0, 700.0, 1500.0])
def test_arnoldi_on_a_dense_model_matches_the_dense_solve(system, speed):
    """A reduced model's path: the same shift-invert Arnoldi and completeness check on dense
    matrices (:class:`~rotorcalc.pencils.DensePencil`); lowest and nearest modes."""
    m, d, k = (x.toarray() for x in _matrices(system, speed))
    dense = DenseSolver()(m, d, k, 16)
    arnoldi = SparseSolver(pencils.DensePencil)(m, d, k, 16)
    assert arnoldi.warnings == () and math.isfinite(arnoldi.complete_within)   # Arnoldi ran
    np.testing.assert_allclose(arnoldi.values, dense.values, rtol=1e-8)
    assert np.diag(mac_matrix(arnoldi.vectors.T, dense.vectors.T)).min() > 1 - 1e-8
    assert arnoldi.complete_within >= solvers.RADIUS_RATIO * arnoldi.values[-1].imag
    target = dense.values[6]
    near = SparseSolver(pencils.DensePencil)(m, d, k, 3, near=target)
    np.testing.assert_allclose(near.values, DenseSolver()(m, d, k, 3, near=target).values,
                               rtol=1e-8)


def test_the_deflated_check_accepts_a_complete_set_and_finds_a_missing_mode(system):
    """``none_missed`` against the dense solve (LAPACK through scipy.linalg.eig, every
    eigenvalue): given its 12 lowest modes, the deflated Arnoldi run finds no other eigenvalue
    near the lowest 8; with the fourth left out it finds that one; with too few pairs for the
    modes asked it does not accept."""
    m, d, k = _matrices(system, 900.0)
    pairs = DenseSolver()(m, d, k, 12)
    assert solvers.none_missed(m, d, k, pairs.values, pairs.vectors, 8)
    keep = np.arange(12) != 3
    assert not solvers.none_missed(m, d, k, pairs.values[keep], pairs.vectors[:, keep], 8)
    assert not solvers.none_missed(m, d, k, pairs.values[:5], pairs.vectors[:, :5], 8)


def test_double_eigenvalues_are_both_found():
    """Isotropic, not spinning: every frequency is double (x and y planes), the classic
    case where a single-vector Krylov method can return one copy only."""
    rotor = uniform_shaft(elements=40, bearings=[isotropic(0, 1e7), isotropic(1, 1e7)])
    s = assemble(rotor)
    m, d, k = _matrices(s, 0.0)
    dense, sparse = DenseSolver()(m, d, k, 12), SparseSolver()(m, d, k, 12)
    assert np.allclose(dense.values[0::2], dense.values[1::2], rtol=1e-9)   # really double
    np.testing.assert_allclose(sparse.values, dense.values, rtol=1e-8)
    assert sparse.warnings == ()


def test_near_solves_agree(system):
    m, d, k = _matrices(system, 900.0)
    target = DenseSolver()(m, d, k, 10).values[6]
    dense = DenseSolver()(m, d, k, 5, near=target)
    sparse = SparseSolver()(m, d, k, 5, near=target)
    np.testing.assert_allclose(sparse.values, dense.values, rtol=1e-8)
    assert target in dense.values


def test_deflated_pass_finds_a_dropped_eigenvalue(system):
    """Drop one eigenpair from a complete set: the second (deflated) Arnoldi pass must
    report the dropped eigenvalue as the nearest one not found."""
    m, d, k = _matrices(system, 700.0)
    pencil = solvers._Pencil(m, d, k)
    sigma = solvers.SHIFT * pencil.ref
    op = pencil.operator(sigma)
    mu, z = solvers._arnoldi(op, 30, seed=0)
    complete = solvers._nearest_missed(op, mu, z, sigma, 0)
    assert complete >= 0.99 / np.abs(mu).min()            # nothing missing inside
    inside = np.argsort(-np.abs(mu))
    drop = inside[[10, 11]] if mu[inside[10]].imag != 0 else inside[[10]]  # a conjugate pair
    keep = np.setdiff1d(np.arange(len(mu)), drop)
    missed = solvers._nearest_missed(op, mu[keep], z[:, keep], sigma, 0)
    assert missed == pytest.approx(1 / abs(mu[drop[0]]), rel=0.02)


def test_unproven_result_says_so(system, monkeypatch):
    """An Arnoldi run that keeps missing a mode ends in a warning, never in silence."""
    real_arnoldi = solvers._arnoldi

    def lossy(op, nev, seed):
        mu, z = real_arnoldi(op, nev, seed)
        order = np.argsort(-np.abs(mu))
        keep = np.setdiff1d(np.arange(len(mu)), order[[4, 5]])   # lose a pair deep inside
        return mu[keep], z[:, keep]

    monkeypatch.setattr(solvers, "_arnoldi", lossy)
    out = SparseSolver()(*_matrices(system, 700.0), 12)
    assert any("could not prove that no mode was missed" in w for w in out.warnings)


def test_make_solver_names_and_auto_choice(monkeypatch):
    assert isinstance(make_solver(), AutoSolver)
    assert isinstance(make_solver("dense"), DenseSolver)
    assert isinstance(make_solver("sparse"), SparseSolver)
    with pytest.raises(ValueError, match="not a known solver"):
        make_solver("qz")
    used = []
    for cls in (DenseSolver, SparseSolver):
        monkeypatch.setattr(cls, "__call__",
                            lambda self, *a, _c=cls, **kw: used.append(_c.name)
                            or types.SimpleNamespace(warnings=()))
    small = assemble(uniform_shaft(elements=4, bearings=[isotropic(0, 1e7), isotropic(1, 1e7)]))
    large = assemble(uniform_shaft(elements=60, bearings=[isotropic(0, 1e7), isotropic(1, 1e7)]))
    for s in (small, large):
        AutoSolver()(*_matrices(s, 0.0), 4)
    assert small.n_dof < solvers.AUTO_THRESHOLD <= large.n_dof
    assert used == ["dense", "sparse"]


def _same(a, b):
    np.testing.assert_array_equal(a.eigenvalues, b.eigenvalues)   # bit for bit, NaN = NaN
    np.testing.assert_array_equal(a.shapes, b.shapes)
    assert a.warnings == b.warnings


def test_sweep_and_criticals_do_not_depend_on_worker_count(system):
    speeds = np.linspace(0.0, 1600.0, 12)
    one = sweep(system, speeds, 6, workers=1)
    two = sweep(system, speeds, 6, workers=2)
    _same(one, two)
    c1 = critical_speeds(system, one, workers=1)
    c2 = critical_speeds(system, one, workers=2)
    assert c1 and [c.speed for c in c1] == [c.speed for c in c2]
    assert [c.eigenvalue for c in c1] == [c.eigenvalue for c in c2]


def test_spawned_workers_give_the_same_sweep(system, monkeypatch):
    """Where 'fork' is unavailable (or BLAS is multi-threaded) workers are spawned."""
    workers_module = importlib.import_module("rotorcalc.workers")
    monkeypatch.setattr(workers_module, "_context", lambda: multiprocessing.get_context("spawn"))
    speeds = np.linspace(100.0, 1500.0, 4)
    _same(sweep(system, speeds, 4, workers=1), sweep(system, speeds, 4, workers=2))


def test_screen_passes_workers_and_rejects_bad_counts():
    rotor = generated_rotor(14, mode_count=2, speed_count=4)
    a, b = screen(rotor, workers=1), screen(rotor, workers=2)
    _same(a.sweep, b.sweep)
    assert [c.speed for c in a.criticals] == [c.speed for c in b.criticals]
    with pytest.raises(ValueError, match="workers"):
        sweep(rotor, workers=-1)



def test_cli_refuses_a_negative_job_count():
    from typer.testing import CliRunner

    from rotorcalc.cli import app
    from tests.conftest import ROOT

    case = str(ROOT / "cases" / "overhung_fan.toml")
    for command in ("sweep", "criticals", "check"):
        assert CliRunner().invoke(app, [command, case, "--jobs", "-1"]).exit_code == 2


def test_auto_repeats_a_doubtful_sparse_solve_densely(monkeypatch):
    """When the sparse solve cannot prove that no mode was missed, the dense one is used."""
    s = assemble(uniform_shaft(elements=60, bearings=[isotropic(0, 1e7), isotropic(1, 1e7)]))
    m, d, k = _matrices(s, 0.0)
    honest = SparseSolver()(m, d, k, 4)
    doubtful = solvers.Eigenpairs(honest.values, honest.vectors, honest.real_eigenvalues,
                                  honest.rigid_body, warnings=("sparse eigen-solve: test doubt",))
    monkeypatch.setattr(SparseSolver, "__call__", lambda self, *a, **kw: doubtful)
    result = AutoSolver()(m, d, k, 4)
    reference = DenseSolver()(m, d, k, 4)
    np.testing.assert_allclose(result.values, reference.values, rtol=1e-12)
    assert any("dense solver was used" in w for w in result.warnings)


def test_the_refinement_solves_no_speed_twice_and_not_the_sweeps(monkeypatch):
    """No repeated work: the bracket ends come from the sweep (the same solve gives the same
    numbers), and Brent's method, which evaluates both ends again, finds them memoised;
    every trial speed here is reached by Newton's method from a speed already solved."""
    from rotorcalc.analysis import criticals as module
    rotor = generated_rotor(14, mode_count=4, speed_count=30)
    system = assemble(rotor)
    result = sweep(system)
    solved, full = [], []
    followed, real = module._followed, module.branch_at

    def recording(system, speed, *args):
        solved.append(speed)
        return followed(system, speed, *args)

    def recording_full(system, speed, *args):
        full.append(speed)
        return real(system, speed, *args)
    monkeypatch.setattr(module, "_followed", recording)
    monkeypatch.setattr(module, "branch_at", recording_full)
    found = critical_speeds(system, result)
    assert found and solved
    assert len(set(solved)) == len(solved), "a speed was solved twice"
    assert not set(solved) & set(result.speeds.tolist()), "a sweep speed was solved again"
    assert not full, "a trial speed needed a full solve"


def test_critical_speeds_followed_by_newton_equal_those_of_full_solves(monkeypatch):
    """Reference: the same refinement with a full eigen-solve (LAPACK) at every trial speed,
    the path before the Newton steps.  Speeds, eigenvalues (log decrements) and whirl agree
    to roundoff on a rotor with speed-dependent cross-coupled bearings and on the compressor."""
    from rotorcalc.analysis import criticals as module
    from rotorcalc.reader import read_rotor
    from tests.conftest import ROOT
    for rotor in (generated_rotor(14, mode_count=6, speed_count=30),
                  read_rotor(ROOT / "cases" / "compressor.toml")):
        system = assemble(rotor)
        result = sweep(system)
        newton = critical_speeds(system, result)
        with monkeypatch.context() as patch:
            patch.setattr(module, "_followed", lambda *args: None)
            full = critical_speeds(system, result)
        assert len(newton) == len(full) >= 2
        for a, b in zip(newton, full):
            assert a.branch == b.branch and a.whirl == b.whirl
            assert a.speed == pytest.approx(b.speed, rel=1e-10)
            assert a.eigenvalue == pytest.approx(b.eigenvalue, rel=1e-9)
            assert a.log_dec == pytest.approx(b.log_dec, rel=1e-6, abs=1e-9)


def test_newton_started_on_an_exact_eigenvalue_returns_it_without_a_warning():
    """Two uncoupled undamped oscillators, M = I, K = diag(4, 9): eigenvalues +-2i and +-3i
    (closed form, lam^2 + k = 0).  Started exactly on 2i with the exact vector, the shifted
    quadratic Q(2i) = diag(0, 5) has an exactly zero pivot: that is a converged step, and the
    pair is checked and returned (it used to come back as None, with LAPACK's singular-matrix
    warning on the terminal)."""
    import warnings
    from rotorcalc.analysis.pair_newton import newton_pair
    m, d, k = np.eye(2), np.zeros((2, 2)), np.diag([4.0, 9.0])
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        pair = newton_pair(m, d, k, 2j, np.array([1.0, 0.0]), physical=False)
    assert pair is not None and pair.value == 2j and pair.backward_error == 0.0
    assert abs(pair.vector[1]) == 0.0 and abs(pair.vector[0]) > 0


def test_newton_pair_reaches_the_dense_solvers_eigenpair(monkeypatch):
    """Reference: LAPACK's eigenvalues of the full model (DenseSolver).  From each mode at one
    speed, Newton's method reaches the same mode 2 % higher in speed, to 1e-12 relative, with
    a backward error near roundoff; on the banded path (forced) as on the dense one."""
    from rotorcalc.analysis import pair_newton
    from rotorcalc.analysis.modes import modes_at
    system = assemble(generated_rotor(30, mode_count=6, speed_count=10))
    w0, w1 = 600.0, 612.0
    start, end = modes_at(system, w0, 8, DenseSolver()), modes_at(system, w1, 12, DenseSolver())
    d_mat = system.damping(w1) + w1 * system.gyroscopic
    for limit in (pair_newton.DENSE_LIMIT, 0):      # dense steps, then banded ones
        monkeypatch.setattr(pair_newton, "DENSE_LIMIT", limit)
        for value, vector in zip(start.eigenvalues, start.vectors.T):
            pair = pair_newton.newton_pair(system.mass, d_mat, system.stiffness(w1),
                                           value, vector)
            assert pair is not None, f"no answer from {value} (DENSE_LIMIT {limit})"
            nearest = end.eigenvalues[np.argmin(abs(end.eigenvalues - pair.value))]
            assert abs(pair.value - nearest) <= 1e-12 * abs(nearest)
            assert pair.backward_error < 1e-13 and pair.steps <= 6


def test_what_if_screenings_do_not_depend_on_worker_count():
    """compare (and the envelope, which is compare's) hands its screenings to worker
    processes: the same rows, margins and sweeps on one worker or two, and the progress
    told once per screening."""
    from rotorcalc.analysis.whatif import compare
    from rotorcalc.variants import read_variants
    from tests.conftest import ROOT
    _, rotor, variants = read_variants(ROOT / "cases" / "overhung_fan_variants.toml")
    told = []
    one = compare(rotor, variants, workers=1)
    two = compare(rotor, variants, workers=2, progress=lambda done, total: told.append(done))
    assert sorted(told) == list(range(1, len(variants) + 2))
    assert len(one.rows) == len(two.rows) > 0
    for a, b in zip(one.rows, two.rows):
        assert (a.variant, a.base_speed, a.row.critical.speed, a.row.critical.eigenvalue,
                a.row.margin, a.row.verdict) == (b.variant, b.base_speed, b.row.critical.speed,
                                                 b.row.critical.eigenvalue, b.row.margin,
                                                 b.row.verdict)
    for a, b in zip(one.screenings, two.screenings):
        assert np.array_equal(a.sweep.eigenvalues, b.sweep.eigenvalues, equal_nan=True)


def test_a_trial_speed_with_no_mode_near_the_branch_falls_back_to_the_lowest_modes():
    """Found on the compressor with 10 % stiffer bearings: a branch turning overdamped near
    1X (damping ratio 0.9998) where Newton's method drifts to a real eigenvalue and the
    shift-invert solve about the branch finds no oscillating mode at all.  The refinement
    then takes the lowest modes, as before, instead of failing."""
    from rotorcalc.analysis.whatif import what_if_rotor
    from rotorcalc.reader import read_rotor
    from rotorcalc.variants import Variant, apply_variant, parse_change
    from tests.conftest import ROOT
    rotor = apply_variant(what_if_rotor(read_rotor(ROOT / "cases" / "compressor.toml")),
                          Variant("stiffer", (parse_change("bearing.*.k *= 1.1"),)))
    system = assemble(rotor)
    found = critical_speeds(system, sweep(system))
    assert any(c.damping_ratio > 0.99 for c in found)
    assert all(np.isfinite(c.speed) for c in found)


def test_the_cached_reordering_gives_the_pencil_of_the_general_way(monkeypatch):
    """The pencil's reordering is found once per sparsity pattern and its values gathered
    into it: the same order, band, matrices and entry order, bit for bit, as scaling and
    reordering each matrix anew (the general way, kept for matrices with explicit zeros),
    on every bundled case at rest (where the gyroscopic terms vanish) and running."""
    from rotorcalc.reader import read_rotor
    from tests.conftest import ROOT
    paths = [p for p in sorted((ROOT / "cases").glob("*.toml"))
             if "variants" not in p.name and "study" not in p.name]
    for path in paths:
        system = assemble(read_rotor(path))
        for speed in (0.0, 700.0):
            mats = (system.mass, system.damping(speed) + speed * system.gyroscopic,
                    system.stiffness(speed))
            fast = solvers._Pencil(*mats)
            with monkeypatch.context() as patch:
                patch.setattr(pencils, "_layout", lambda mats: None)
                general = solvers._Pencil(*mats)
            assert np.array_equal(fast.perm, general.perm) and fast.band == general.band
            for a, b in ((fast.m, general.m), (fast.d, general.d), (fast.k, general.k)):
                for field in ("data", "indices", "indptr"):
                    assert np.array_equal(getattr(a, field), getattr(b, field))
            # the shift-invert operator, real and complex shift: the same numbers
            z = np.cos(np.arange(2 * fast.n) * 0.7)
            for sigma in (1e-3 * fast.ref, 900.0 + 30.0j):
                assert np.array_equal(fast.operator(sigma) @ z, general.operator(sigma) @ z)


def test_real_matrix_times_complex_block_is_the_complex_product():
    """``pencils.times``: one real product on a float view gives the complex product's
    numbers (scipy's sparse product as the reference: bit for bit; numpy's dense one: to
    roundoff, BLAS sums in its own order), for C- and Fortran-ordered and strided blocks;
    other inputs take the plain product."""
    import scipy.sparse as sp

    from rotorcalc.pencils import times
    rng = np.random.default_rng(3)
    a = sp.random(40, 40, density=0.2, random_state=4, format="csr")
    x = rng.standard_normal((40, 6)) + 1j * rng.standard_normal((40, 6))
    for block in (x, np.asfortranarray(x), x[:, ::2]):
        assert np.array_equal(times(a, block), a @ block)
        dense = a.toarray()
        np.testing.assert_allclose(times(dense, block), dense @ block, rtol=0, atol=1e-14)
    single = x.astype(np.complex64)
    assert times(a, single).dtype == (a @ single).dtype
    assert np.array_equal(times(a, single), a @ single)
    assert np.array_equal(times(a, x[:, 0]), a @ x[:, 0])
