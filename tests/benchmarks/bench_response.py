"""Benchmark: the sparse unbalance-response sweep against a dense solve of the same system.

Run as ``python tests/benchmarks/bench_response.py`` (not a test: nothing here is
collected by pytest, and no time is asserted).  For generated rotors of 200 and
1000 shaft elements it measures, in one run and on the same machine:

* the full :func:`rotorcalc.analysis.response.unbalance_response` call over a
  sweep of ``SWEEP_SPEEDS`` speeds (harmonic solves, bearing forces, peak and
  half-power refinement with fresh solves), per sweep speed and per solve;
* the sparse harmonic solves alone (:class:`HarmonicSolver`, the one
  fill-reducing order reused) at the same sweep speeds, per speed;
* a dense solve of the same dynamic stiffness with the same right-hand sides
  (``scipy.linalg.lu_factor`` / ``lu_solve`` of ``Z.toarray()``) at a few
  speeds, per speed;

and prints the per-speed times, their ratios and the largest relative
difference between the sparse and dense solutions.  Times are the best of
``REPEATS`` runs.  Set ``OPENBLAS_NUM_THREADS=1`` for figures comparable with
docs/performance.md.
"""

from __future__ import annotations

import os

for _var in ("OPENBLAS_NUM_THREADS", "OMP_NUM_THREADS", "MKL_NUM_THREADS"):
    os.environ.setdefault(_var, "1")

import math  # noqa: E402
import platform  # noqa: E402
import sys  # noqa: E402
import time  # noqa: E402
from pathlib import Path  # noqa: E402

import numpy as np  # noqa: E402
import scipy  # noqa: E402
import scipy.linalg as sla  # noqa: E402

sys.path.insert(0, str(Path(__file__).resolve().parents[2]))

from rotorcalc.analysis import response as resp  # noqa: E402
from rotorcalc.assembly import assemble  # noqa: E402
from rotorcalc.model import (Bearing, Disk, Material, OperatingRange, Rotor,  # noqa: E402
                             Section, Settings)
from rotorcalc.unbalance import UnbalanceCase, UnbalanceWeight  # noqa: E402

RPM = 2.0 * math.pi / 60.0
STEEL = Material("steel", 2.07e11, 2.07e11 / 2.6, 7830.0)
SIZES = (200, 1000)
SWEEP_SPEEDS = 50
DENSE_SPEEDS = {200: 5, 1000: 2}   # the dense solve of 1000 elements takes seconds each
REPEATS = 3


def generated_rotor(elements, sections=20, disks=6):
    """A uniform-ish shaft of ``elements`` elements, ``disks`` disks, two bearings.

    An invented between-bearing rotor 2.4 m long: ``sections`` sections whose
    diameter varies by a few per cent, disks spread over the middle, and two
    bearings with cross-coupled stiffness near the shaft ends.  Two unbalance
    cases: a weight at the middle disk and a couple at the outer disks.
    """
    per = [elements // sections + (1 if i < elements % sections else 0)
           for i in range(sections)]
    diameters = 0.12 + 0.01 * np.sin(np.linspace(0.0, math.pi, sections))
    secs = tuple(Section(2.4 / sections, float(d), STEEL, elements=n)
                 for d, n in zip(diameters, per))
    first, last = 1, sections - 1   # bearing stations
    places = np.linspace(first + 2, last - 2, disks).round().astype(int)
    disk_tuple = tuple(Disk(int(s), 25.0, 0.6, 0.32, name=f"disk {i + 1}")
                       for i, s in enumerate(places))
    coefficients = {"kxx": (1.5e8,), "kyy": (2.0e8,), "kxy": (3.0e7,), "kyx": (-3.0e7,),
                    "cxx": (6.0e4,), "cyy": (7.0e4,)}
    bearings = (Bearing(first, coefficients, name="DE"), Bearing(last, coefficients, name="NDE"))
    middle = int(places[len(places) // 2])
    cases = (UnbalanceCase("mid", (UnbalanceWeight(middle, 2e-4),)),
             UnbalanceCase("couple", (UnbalanceWeight(int(places[0]), 2e-4),
                                      UnbalanceWeight(int(places[-1]), 2e-4, math.pi))))
    return Rotor(secs, OperatingRange(3000 * RPM, 4500 * RPM, 4700 * RPM), disks=disk_tuple,
                 bearings=bearings, settings=Settings(speed_from=0.0, speed_to=9000 * RPM),
                 unbalance=cases, name=f"generated rotor, {elements} elements")


def best_of(repeats, func):
    """Smallest wall time of ``repeats`` calls, s, and the last result."""
    best, out = math.inf, None
    for _ in range(repeats):
        t0 = time.perf_counter()
        out = func()
        best = min(best, time.perf_counter() - t0)
    return best, out


class CountingSolver(resp.HarmonicSolver):
    """The library's solver, counting its solves (the sweep plus the refinement)."""

    calls = 0

    def solve(self, omega, rhs):
        CountingSolver.calls += 1
        return super().solve(omega, rhs)


def full_response(system, speeds):
    """unbalance_response with the counting solver; returns (result, number of solves)."""
    original = resp.HarmonicSolver
    resp.HarmonicSolver = CountingSolver
    try:
        CountingSolver.calls = 0
        out = resp.unbalance_response(system, speeds=speeds)
        return out, CountingSolver.calls
    finally:
        resp.HarmonicSolver = original


def dense_solve(solver, omega, rhs):
    z = solver.dynamic_stiffness(omega).toarray()
    return sla.lu_solve(sla.lu_factor(z, overwrite_a=True, check_finite=False), rhs,
                        check_finite=False)


def bench(elements):
    rotor = generated_rotor(elements)
    system = assemble(rotor)
    speeds = np.linspace(500 * RPM, 9000 * RPM, SWEEP_SPEEDS)
    force = resp.unbalance_forces(system, rotor.unbalance)

    t_full, (result, solves) = best_of(REPEATS, lambda: full_response(system, speeds))
    solver = resp.HarmonicSolver(system)
    dense_at = speeds[np.linspace(0, len(speeds) - 1, DENSE_SPEEDS[elements]).round().astype(int)]

    def sparse_sweep():  # every sweep speed: more samples than the dense solve gets
        return [solver.solve(w, w * w * force) for w in speeds]

    def dense_sweep():
        return [dense_solve(solver, w, w * w * force) for w in dense_at]

    t_sparse, q_all = best_of(REPEATS, sparse_sweep)
    t_dense, q_dense = best_of(1 if elements >= 1000 else REPEATS, dense_sweep)
    n = len(dense_at)
    q_sparse = [q_all[int(np.argmin(np.abs(speeds - w)))] for w in dense_at]
    diff = max(float(np.max(np.abs(a - b)) / np.max(np.abs(b))) for a, b in zip(q_sparse, q_dense))
    per_full, per_sparse, per_dense = t_full / len(speeds), t_sparse / len(speeds), t_dense / n
    print(f"\n{rotor.name}: {system.n_dof} DOF, {len(rotor.unbalance)} unbalance cases "
          f"(right-hand sides), {len(result.probes)} probes, {len(result.peaks)} peaks")
    print(f"  unbalance_response, {len(speeds)} speeds: {t_full:8.3f} s = "
          f"{1e3 * per_full:8.2f} ms per sweep speed ({solves} solves, "
          f"{1e3 * t_full / solves:.2f} ms per solve incl. refinement and bookkeeping)")
    print(f"  sparse harmonic solve (HarmonicSolver), {len(speeds)} speeds: "
          f"{1e3 * per_sparse:9.2f} ms per speed")
    print(f"  dense LU solve, same Z and RHS, {n} speeds: {1e3 * per_dense:9.2f} ms per speed")
    print(f"  ratio dense / sparse solve:             {per_dense / per_sparse:9.1f}")
    print(f"  ratio dense solve / response per speed: {per_dense / per_full:9.1f}")
    print(f"  max relative difference of the solutions: {diff:.1e}")
    return per_full, per_sparse, per_dense, diff


def main():
    print(f"rotorcalc unbalance-response benchmark: python {platform.python_version()}, "
          f"numpy {np.__version__}, scipy {scipy.__version__}, "
          f"OPENBLAS_NUM_THREADS={os.environ.get('OPENBLAS_NUM_THREADS')}, best of {REPEATS}")
    for elements in SIZES:
        bench(elements)


if __name__ == "__main__":
    main()
