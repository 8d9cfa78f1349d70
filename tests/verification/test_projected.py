"""The cross-coupling screen on a projected basis against the screen with full solves.

Reference: the full-model eigen-solve at every applied amount (LAPACK below 80 DOFs, ARPACK's
shift-invert Arnoldi with its completeness check above: docs/theory.md, section 3.1) --
general-purpose reference libraries, not the projection.  The projected path
(rotorcalc.analysis.projected: the modes with no and with the top amount applied, and the
static deflections under the applied terms) must give the same screen on every bundled case
and each placement:

* the followed mode's log decrement at every amount within 1e-9 (absolute);
* the threshold amount within 1e-5 relative (Brent's tolerance on it is 1e-6 of the top
  amount, ten times the expected one);
* every projected pair certified (relative backward error at most 1e-10), and no amount
  solved in full on these cases; the full-solve check of the middle and threshold amounts
  finds no mode missing (else the projection would be dropped).
"""

import dataclasses

import numpy as np
import pytest

from rotorcalc import read_rotor
from rotorcalc.analysis import coupling_screen as module
from rotorcalc.analysis import projected
from rotorcalc.analysis.projected import ProjectedSolver
from rotorcalc.assembly import assemble
from tests.conftest import ROOT
from tests.verification.record import check

SOURCE = "full-model solve at every amount (LAPACK / ARPACK through scipy)"
CASES = [("compressor", "sources"), ("compressor", "mid-span"),
         ("hp_compressor", "sources"), ("hp_compressor_damper_seal", "largest-amplitude"),
         ("compressor_tilting_pad", "sources"), ("feed_pump", "mid-span"),
         ("overhung_fan", "largest-amplitude"), ("blower_two_lobe", "mid-span"),
         ("feed_pump_sleeve", "mid-span")]


def _screens(rotor, placement, monkeypatch):
    """(projected screen, its solver, full screen)."""
    made = []
    project = module._Judge.project

    def recording(judge, top):
        project(judge, top)
        made.append(judge.solver)
    expected = None if rotor.sources else 1e6
    with monkeypatch.context() as patch:
        patch.setattr(module._Judge, "project", recording)
        fast = module.cross_coupling_screen(rotor, expected=expected, placement=placement)
    with monkeypatch.context() as patch:
        patch.setattr(module._Judge, "project", lambda judge, top: None)
        full = module.cross_coupling_screen(rotor, expected=expected, placement=placement)
    return fast, made[0], full


@pytest.mark.parametrize("name,placement", CASES)
def test_the_projected_screen_equals_the_full_one(name, placement, monkeypatch):
    rotor = read_rotor(ROOT / "cases" / f"{name}.toml")
    fast, solver, full = _screens(rotor, placement, monkeypatch)
    assert solver.full_solves == 0 and solver.projected >= 40
    assert solver.largest <= projected.LIMIT
    assert fast.solves == solver.describe() and "0 full solves" in fast.solves
    check(f"{name}, {placement}: cross-coupling screen on a basis of {solver.basis.shape[1]} "
          f"vectors, largest log decrement difference over {len(full.applied)} amounts",
          SOURCE, 0.0, float(np.max(np.abs(fast.log_dec - full.log_dec))), 1e-9, "abs")
    if full.threshold is None:
        assert fast.threshold is None
    else:
        check(f"{name}, {placement}: threshold amount on the projected basis, N/m", SOURCE,
              full.threshold, fast.threshold, 1e-5, "rel")


def test_a_pair_that_fails_its_certificate_is_solved_in_full(monkeypatch):
    """With a limit no projected pair can meet, every amount is solved in full (and the
    result is the full screen's, digit for digit); the full solves' vectors join the basis."""
    rotor = read_rotor(ROOT / "cases" / "compressor.toml")
    monkeypatch.setattr(projected, "LIMIT", 0.0)
    fast, solver, full = _screens(rotor, "sources", monkeypatch)
    assert solver.projected == 0 and solver.full_solves >= len(full.applied)
    np.testing.assert_array_equal(fast.log_dec, full.log_dec)
    assert "0 projected solves" in solver.describe()


def test_projected_solver_is_exact_on_a_basis_holding_the_modes():
    """The exact eigenvectors in the basis: the projected eigenvalues equal the full solve's
    to roundoff, and a rotor with rigid-body modes is solved in full."""
    system = assemble(read_rotor(ROOT / "cases" / "feed_pump.toml"))
    speed = 300.0
    d_mat = system.damping(speed) + speed * system.gyroscopic
    k_mat = system.stiffness(speed)
    from rotorcalc.solvers import DenseSolver
    exact = DenseSolver()(system.mass, d_mat, k_mat, 6)
    solver = ProjectedSolver(exact.vectors)
    pairs = solver(system.mass, d_mat, k_mat, 6)
    assert solver.projected == 1 and solver.basis.shape[1] == 12
    np.testing.assert_allclose(pairs.values, exact.values, rtol=1e-12)
    solver(system.mass, d_mat, k_mat, 6, zeros=2)
    assert solver.full_solves == 1


def test_a_basis_that_lacks_a_mode_is_caught():
    """A basis of exact eigenvectors without the second mode: the projected quadratic has
    twice as many eigenvalues as the basis has vectors, and a spurious one falls where the
    missing mode was; its backward error (2e-5) fails the certificate, and the state is solved
    in full.  Should a basis miss a mode with every returned pair certified, the check
    against a full solve finds the gap and drops the projection (here with the full solve's
    modes less the second standing in for such a projected answer)."""
    rotor = read_rotor(ROOT / "cases" / "compressor.toml")
    bare = dataclasses.replace(rotor, sources=())
    judge = module._Judge(bare, ((7, 1.0),), rotor.operating.max_speed, 8, False)
    full = module.modes_at(judge.bare, judge.speed, 12)
    keep = [j for j in range(12) if j != 1]
    judge.solver = ProjectedSolver(full.vectors[:, keep])
    _, shown = judge.modes(0.0)
    assert judge.solver.projected == 0 and judge.solver.full_solves == 1
    assert np.any(np.isclose(shown.eigenvalues, full.eigenvalues[1], rtol=1e-9))
    short = dataclasses.replace(full, eigenvalues=np.delete(full.eigenvalues, 1)[:8])
    judge.solved[0.0] = (judge.bare, short)
    assert judge.verify(0.0) is False
    assert judge.solver is None and judge.solved == {}
