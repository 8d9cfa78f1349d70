"""Response peaks searched on the sweep's reduced basis, confirmed by full solves.

Reference: the same unbalance response with every peak searched by full solves (the banded LU
of the full dynamic stiffness, LAPACK's ``zgbtrf``/``zgbtrs`` through scipy; its peaks and
amplification factors are held against closed forms in test_unbalance_response.py).  The
surrogate (rotorcalc.analysis.response_surrogate) only says where to look; what is reported
comes from full solves that bracket it, so:

* the grid's responses are the same numbers;
* each peak's speed within 1e-5 relative of the full search's (the top is confirmed within
  ``PEAK_STEP`` = 1e-5; the full search's 1e-7 is below what the roundoff of a solve lets
  it tell at a flat peak), its amplitude within 1e-7;
* each half-power speed within 5e-7 (both within 1e-7 of crossings of targets 1e-9 apart),
  the amplification factor within 1e-4 relative;
* far fewer full solves; and a surrogate that is wrong (a basis without the resonant modes)
  changes nothing: its peaks fail the confirmation and are searched in full.

The generated rotor carries speed-dependent, cross-coupled bearings on a pedestal and a seal
(tests/benchmarks/generated.py); it is run as generated and with three times the damping (the
flat peaks of amplification factor about 2.4-3.1).
"""

import dataclasses

import numpy as np
import pytest

from rotorcalc.analysis import peaks as peak_module
from rotorcalc.analysis import response_surrogate
from rotorcalc.analysis import sweep
from rotorcalc.analysis.reduced import ReducedSolver
from rotorcalc.analysis.response import unbalance_response
from rotorcalc.assembly import assemble
from rotorcalc.unbalance import UnbalanceCase, UnbalanceWeight
from tests.benchmarks.generated import generated_rotor
from tests.verification.record import check

SOURCE = "full-model peak search (banded LU through scipy)"


@pytest.fixture(autouse=True)
def surrogate_on_small_models(monkeypatch):
    """The test rotor (486 DOFs) is below the size from which the surrogate pays: allowed."""
    monkeypatch.setattr(response_surrogate, "SURROGATE_FROM", 0)


@pytest.fixture(scope="module", params=[1.0, 3.0], ids=["as generated", "damping x3"])
def generated(request):
    """The generated rotor, and with three times its bearings' and seal's damping: peaks of
    amplification factor 2.4 to 3.1, flat enough that the top is told from a solve's
    roundoff only a few 1e-5 of the speed away."""
    rotor = generated_rotor(120, mode_count=6, speed_count=60)
    scale = request.param
    bearings = tuple(dataclasses.replace(b, coefficients={
        key: tuple(scale * x for x in values) if key.startswith("c") else values
        for key, values in b.coefficients.items()}) for b in rotor.bearings)
    rotor = dataclasses.replace(rotor, bearings=bearings, unbalance=(
        UnbalanceCase("middle disk", (UnbalanceWeight(7, 2e-4),)),
        UnbalanceCase("outboard", (UnbalanceWeight(3, 1e-4, phase=1.0),))))
    system = assemble(rotor)
    solver = ReducedSolver()
    sweep(system, solver=solver)
    return system, solver.basis(system)


def _counted(monkeypatch):
    """Count the full solves of the peak search (fresh responses of the evaluator)."""
    solved = []
    original = peak_module.Evaluator.responses

    def responses(self, omega):
        if omega not in self.solved:
            solved.append(omega)
        return original(self, omega)
    monkeypatch.setattr(peak_module.Evaluator, "responses", responses)
    return solved


def test_peaks_found_on_the_basis_equal_the_full_search(generated, monkeypatch):
    system, basis = generated
    assert basis is not None and basis.shape[1] < system.n_dof / 2
    solves = _counted(monkeypatch)
    full = unbalance_response(system, unstable=())
    full_solves = len(solves)
    solves.clear()
    fast = unbalance_response(system, unstable=(), basis=basis)
    assert len(full.peaks) == len(fast.peaks) >= 4
    worst = {"speed": 0.0, "amplitude": 0.0, "half": 0.0, "af": 0.0}
    for a, b in zip(full.peaks, fast.peaks):
        assert (a.case, a.probe, a.note) == (b.case, b.probe, b.note)
        worst["speed"] = max(worst["speed"], abs(b.speed - a.speed) / a.speed)
        worst["amplitude"] = max(worst["amplitude"], abs(b.amplitude - a.amplitude) / a.amplitude)
        if a.half_power is not None:
            worst["half"] = max(worst["half"], *(abs(y - x) / x for x, y in
                                                 zip(a.half_power, b.half_power)))
            worst["af"] = max(worst["af"], abs(b.af - a.af) / a.af)
    check("Response peaks on the reduced basis: peak speed", SOURCE, 0.0, worst["speed"],
          1e-5, kind="abs")
    check("Response peaks on the reduced basis: peak amplitude", SOURCE, 0.0,
          worst["amplitude"], 1e-7, kind="abs")
    check("Response peaks on the reduced basis: half-power speeds", SOURCE, 0.0,
          worst["half"], 5e-7, kind="abs")
    check("Response peaks on the reduced basis: amplification factors", SOURCE, 0.0,
          worst["af"], 1e-4, kind="abs")
    # the grid's own responses: the same solves
    grid = np.isin(full.speeds, fast.speeds)
    kept = np.isin(fast.speeds, full.speeds[grid])
    np.testing.assert_array_equal(full.probe_values[:, grid], fast.probe_values[:, kept])
    assert len(solves) < 0.5 * full_solves, (len(solves), full_solves)


def test_below_the_size_it_pays_the_surrogate_is_not_made(generated, monkeypatch):
    system, basis = generated
    force = np.ones((system.n_dof, 1), dtype=complex)
    rows = np.zeros((1, system.n_dof))
    assert response_surrogate.surrogate_for(system, basis, force, rows) is not None
    monkeypatch.setattr(response_surrogate, "SURROGATE_FROM", system.n_dof + 1)
    assert response_surrogate.surrogate_for(system, basis, force, rows) is None


def test_a_wrong_surrogate_changes_nothing(generated):
    """A basis of six random vectors (with the static deflections the surrogate adds) lacks
    the modes: every peak it finds fails the confirmation, and the full search gives what it
    gives without a surrogate."""
    system, _ = generated
    rng = np.random.default_rng(1)
    wrong = rng.standard_normal((system.n_dof, 6))
    full = unbalance_response(system, unstable=())
    fast = unbalance_response(system, unstable=(), basis=wrong)
    assert [(p.speed, p.amplitude, p.half_power) for p in full.peaks] == \
        [(p.speed, p.amplitude, p.half_power) for p in fast.peaks]
