"""Large-model benchmark: sparse against dense, measured side by side in one run.

Run from the repository root (see DEVELOPERS.md, "Benchmarks"):

    python tests/benchmarks/bench_large.py              # all sizes, about 12 minutes
    python tests/benchmarks/bench_large.py --sizes 50 200 --speeds 30   # a quick look
    python tests/benchmarks/bench_large.py --crossover  # dense/sparse per solve, small models

Every size runs in a fresh child process (so its peak memory is its own) on
the generated rotors of ``generated.py``.  For each it times the assembly, the
20 lowest modes at one speed, and a sweep of ``--speeds`` speeds with tracking
and critical-speed refinement (default solver, i.e. ``"auto"``, one worker).
The dense baseline is the LAPACK solve of the same state-space matrices
(``DenseSolver``): it is *measured* at a few speeds and its sweep time
*extrapolated* as (measured seconds per solve) x (number of solves the sparse
run made) + the sparse run's time outside the solver (tracking, bookkeeping);
at the smallest size the whole dense sweep is also run, to check that
extrapolation.  No absolute time is asserted anywhere: this prints figures.
"""

from __future__ import annotations

import os

for _var in ("OPENBLAS_NUM_THREADS", "OMP_NUM_THREADS", "MKL_NUM_THREADS"):
    os.environ.setdefault(_var, "1")  # as the CLI does, before numpy loads

import argparse  # noqa: E402
import json  # noqa: E402
import resource  # noqa: E402
import subprocess  # noqa: E402
import sys  # noqa: E402
import time  # noqa: E402
from pathlib import Path  # noqa: E402

ROOT = Path(__file__).resolve().parents[2]
sys.path.insert(0, str(ROOT))

import numpy as np  # noqa: E402

from rotorcalc.analysis import critical_speeds, modes_at, sweep  # noqa: E402
from rotorcalc.assembly import assemble  # noqa: E402
from rotorcalc.solvers import DenseSolver, SparseSolver, make_solver  # noqa: E402
from tests.benchmarks.generated import generated_rotor  # noqa: E402

MODES = 20           # reported modes; the sweep solves 4 more for tracking
SPEED = 800.0        # rad/s, the single-speed solve
DENSE_SPEEDS = {50: 3, 100: 3, 200: 2, 500: 1}   # dense solves measured per size


class Counting:
    """A solver wrapper that counts calls and the seconds spent inside."""

    def __init__(self, solver):
        self.solver, self.calls, self.seconds, self.cpu = solver, 0, 0.0, 0.0

    def __call__(self, *args, **kwargs):
        start, cpu = time.perf_counter(), time.process_time()
        try:
            return self.solver(*args, **kwargs)
        finally:
            self.calls += 1
            self.seconds += time.perf_counter() - start
            self.cpu += time.process_time() - cpu


def best_of(fn, repeat):
    times = []
    for _ in range(repeat):
        start = time.perf_counter()
        out = fn()
        times.append(time.perf_counter() - start)
    return min(times), out


def pipeline(system, speeds, workers=1):
    """Sweep with tracking, then critical speeds; seconds of each and the solver counts."""
    solver = Counting(make_solver())
    start, cpu = time.perf_counter(), time.process_time()
    result = sweep(system, speeds, MODES, solver=solver, workers=workers)
    t_sweep, c_sweep = time.perf_counter() - start, time.process_time() - cpu
    sweep_solver_s, sweep_solver_cpu = solver.seconds, solver.cpu
    crits = critical_speeds(system, result, solver=solver, workers=workers)
    t_total, c_total = time.perf_counter() - start, time.process_time() - cpu
    return {"sweep_s": t_sweep, "total_s": t_total, "criticals": len(crits),
            "sweep_cpu": c_sweep, "total_cpu": c_total,
            "solver_calls": solver.calls, "solver_s": solver.seconds,
            "sweep_outside_solver_s": t_sweep - sweep_solver_s,
            "sweep_outside_solver_cpu": c_sweep - sweep_solver_cpu,
            "outside_solver_cpu": c_total - solver.cpu,
            "warnings": list(result.warnings)}


def one_size(elements, n_speeds, workers_check):
    """Everything measured for one size (run in its own process)."""
    rotor = generated_rotor(elements, mode_count=MODES, speed_count=n_speeds)
    t_asm, system = best_of(lambda: assemble(rotor), 3)
    t_modes, _ = best_of(lambda: modes_at(system, SPEED, MODES), 2)
    speeds = np.linspace(0.0, rotor.settings.speed_to, n_speeds)
    run = pipeline(system, speeds)
    out = {"elements": elements, "dofs": system.n_dof, "assembly_s": t_asm, "modes_s": t_modes,
           **run, "solver": "sparse" if system.n_dof >= make_solver().threshold else "dense"}
    # With one worker the solver calls run in this process and are counted;
    # the rest of the pipeline (tracking, bookkeeping) is what remains.
    out["outside_solver_s"] = run["total_s"] - run["solver_s"]
    out["peak_rss_mb"] = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024.0
    if workers_check:
        # 1 and 2 workers alternately, best of three each: the machine is shared.
        one, two = [], []
        out["load_before_workers"] = os.getloadavg()[0]
        for _ in range(3):
            one.append(pipeline(system, speeds, workers=1))
            two.append(pipeline(system, speeds, workers=2))
        out["workers"] = {k: {"sweep_s": min(r["sweep_s"] for r in runs),
                              "total_s": min(r["total_s"] for r in runs)}
                          for k, runs in (("1", one), ("2", two))}
    n_dense = DENSE_SPEEDS.get(elements, 0)
    if n_dense:
        dense, sparse = DenseSolver(), SparseSolver()
        worst, times, cpus = 0.0, [], []
        for w in np.linspace(0.2, 0.8, n_dense) * rotor.settings.speed_to:
            d_mat, k = system.damping(w) + w * system.gyroscopic, system.stiffness(w)
            start, cpu = time.perf_counter(), time.process_time()
            ref = dense(system.mass, d_mat, k, MODES)
            times.append(time.perf_counter() - start)
            cpus.append(time.process_time() - cpu)
            got = sparse(system.mass, d_mat, k, MODES)
            worst = max(worst, float(np.max(np.abs(got.values - ref.values) / np.abs(ref.values))))
        out["dense_per_solve_s"] = float(np.mean(times))
        out["dense_per_solve_cpu"] = float(np.mean(cpus))
        out["max_rel_diff"] = worst
        if elements == min(DENSE_SPEEDS):
            solver = Counting(DenseSolver())
            start = time.perf_counter()
            result = sweep(system, speeds, MODES, solver=solver)
            critical_speeds(system, result, solver=solver)
            out["dense_pipeline_measured_s"] = time.perf_counter() - start
    return out


def crossover():
    """Dense and sparse seconds per solve on small models (sets AUTO_THRESHOLD)."""
    print("DOFs  modes  dense ms  sparse ms  dense/sparse")
    for elements in (14, 20, 30, 40, 60, 80):
        system = assemble(generated_rotor(elements))
        d_mat, k = system.damping(SPEED) + SPEED * system.gyroscopic, system.stiffness(SPEED)
        for n in (12, 24):
            td, _ = best_of(lambda: DenseSolver()(system.mass, d_mat, k, n), 3)
            ts, _ = best_of(lambda: SparseSolver()(system.mass, d_mat, k, n), 3)
            print(f"{system.n_dof:4d}  {n:5d}  {td * 1e3:8.1f}  {ts * 1e3:9.1f}  {td / ts:12.2f}")


def exponent(rows, key):
    pts = [(r["elements"], r[key]) for r in rows if 100 <= r["elements"] <= 1000]
    if len(pts) < 2:
        return float("nan")
    x, y = np.log([p[0] for p in pts]), np.log([p[1] for p in pts])
    return float(np.polyfit(x, y, 1)[0])


def report(rows, n_speeds):
    print(f"\nGenerated rotors, {MODES} modes reported ({MODES + 4} solved), {n_speeds} speeds, "
          "default solver ('auto'), 1 worker unless stated.  Seconds: wall clock, and in brackets "
          "this process's CPU time (less sensitive to other jobs on a shared machine).")
    print(f"{'elements':>8} {'DOFs':>5} {'solver':>6} {'assembly':>8} {'1 speed':>8} "
          f"{'sweep':>15} {'sweep+crit':>15} {'solves':>6} {'peak MB':>8}")
    for r in rows:
        print(f"{r['elements']:8d} {r['dofs']:5d} {r['solver']:>6} {r['assembly_s']:8.3f} "
              f"{r['modes_s']:8.3f} {r['sweep_s']:7.2f} ({r['sweep_cpu']:5.2f}) "
              f"{r['total_s']:7.2f} ({r['total_cpu']:5.2f}) "
              f"{r['solver_calls']:6d} {r['peak_rss_mb']:8.0f}")
    print("\nDense baseline (LAPACK on the same state-space matrices, same modes), measured per "
          "solve (mean of the speeds run);\nits sweep time extrapolated = per-solve x solves + "
          "the sparse run's time outside the solver (tracking, bookkeeping).")
    print(f"{'elements':>8} {'dense/solve':>15} {'sweep dense':>13} {'ratio':>13} "
          f"{'sweep+crit dense':>16} {'ratio':>13} {'max rel diff (20 lowest)':>25}")
    for r in rows:
        if "dense_per_solve_s" not in r:
            why = ("minutes per speed and over 1 GB at this size" if r["elements"] >= 1000
                   else "not measured at this size")
            print(f"{r['elements']:8d}  dense not run ({why})")
            continue
        per, per_c = r["dense_per_solve_s"], r["dense_per_solve_cpu"]
        sweep_dense = per * n_speeds + r["sweep_outside_solver_s"]
        sweep_dense_c = per_c * n_speeds + r["sweep_outside_solver_cpu"]
        total_dense = per * r["solver_calls"] + r["outside_solver_s"]
        total_dense_c = per_c * r["solver_calls"] + r["outside_solver_cpu"]
        print(f"{r['elements']:8d} {per:7.3f} ({per_c:5.3f}) {sweep_dense:13.1f} "
              f"{sweep_dense / r['sweep_s']:5.1f} ({sweep_dense_c / r['sweep_cpu']:5.1f}) "
              f"{total_dense:16.1f} {total_dense / r['total_s']:5.1f} "
              f"({total_dense_c / r['total_cpu']:5.1f}) {r['max_rel_diff']:25.1e}")
        if "dense_pipeline_measured_s" in r:
            print(f"{'':8} check of the extrapolation at this size: dense sweep+crit measured "
                  f"{r['dense_pipeline_measured_s']:.1f} s, extrapolated {total_dense:.1f} s")
    print("\nGrowth of time with element count, fitted exponent over 100..1000 elements "
          "(wall clock, CPU time):")
    for key, cpu, label in (("modes_s", None, "one speed"), ("sweep_s", "sweep_cpu", "sweep"),
                            ("total_s", "total_cpu", "sweep + criticals")):
        extra = f"  {exponent(rows, cpu):5.2f}" if cpu else ""
        print(f"  {label:18s} {exponent(rows, key):5.2f}{extra}")
    for r in rows:
        if "workers" in r:
            w1, w2 = r["workers"]["1"], r["workers"]["2"]
            print(f"\n{r['elements']} elements, 1 vs 2 workers (best of 3 each, alternating; "
                  f"load average before: {r['load_before_workers']:.2f}):")
            print(f"  sweep             {w1['sweep_s']:6.2f} s vs {w2['sweep_s']:6.2f} s: "
                  f"speed-up {w1['sweep_s'] / w2['sweep_s']:.2f}")
            print(f"  sweep + criticals {w1['total_s']:6.2f} s vs {w2['total_s']:6.2f} s: "
                  f"speed-up {w1['total_s'] / w2['total_s']:.2f}")
    notes = {w for r in rows for w in r["warnings"] if "eigen-solve" in w}
    print("\nSolver warnings: " + ("; ".join(sorted(notes)) if notes else "none"))
    print(f"load average at the end: {', '.join(f'{x:.2f}' for x in os.getloadavg())}")


def main():
    parser = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    parser.add_argument("--sizes", type=int, nargs="+", default=[50, 100, 200, 500, 1000])
    parser.add_argument("--speeds", type=int, default=100)
    parser.add_argument("--crossover", action="store_true", help="dense/sparse per solve only")
    parser.add_argument("--one", type=int, help=argparse.SUPPRESS)   # child process
    parser.add_argument("--workers-check", action="store_true", help=argparse.SUPPRESS)
    args = parser.parse_args()
    if args.crossover:
        crossover()
        return
    if args.one:
        print(json.dumps(one_size(args.one, args.speeds, args.workers_check)))
        return
    print(f"numpy {np.__version__}, {os.cpu_count()} CPUs, OPENBLAS_NUM_THREADS="
          f"{os.environ.get('OPENBLAS_NUM_THREADS')}, load average "
          f"{', '.join(f'{x:.2f}' for x in os.getloadavg())}")
    rows = []
    for elements in args.sizes:
        cmd = [sys.executable, __file__, "--one", str(elements), "--speeds", str(args.speeds)]
        if elements == max(args.sizes):
            cmd.append("--workers-check")
        done = subprocess.run(cmd, capture_output=True, text=True, check=True)
        rows.append(json.loads(done.stdout.strip().splitlines()[-1]))
        print(f"  {elements} elements done", flush=True)
    report(rows, args.speeds)


if __name__ == "__main__":
    main()
