"""Benchmark: reduced-basis sweeps against the full solve, side by side in one run.

Run from the repository root (see DEVELOPERS.md, "Benchmarks"):

    python tests/benchmarks/bench_reduced.py                    # 100 to 4000 elements + cases
    python tests/benchmarks/bench_reduced.py --sizes 100 1000   # a quicker look
    python tests/benchmarks/bench_reduced.py --no-cases         # the generated rotors only
    python tests/benchmarks/bench_reduced.py --sizes            # the bundled cases only
    python tests/benchmarks/bench_reduced.py --commands         # whole commands, start-up

For each size of the generated rotor (tests/benchmarks/generated.py: speed-dependent,
cross-coupled bearings, one on a pedestal, a seal; the tool's default 8 modes, 100 speeds),
in a fresh child process, it measures CPU seconds (not wall: the machine is shared) of

* **full**: today's full-model path (``"auto"``: dense below 80 DOFs, sparse shift-invert
  Arnoldi with its completeness check above): sweep with tracking, then the critical speeds;
* **reduced**: the same on a reduced basis (:mod:`rotorcalc.analysis.reduced`), basis built
  and certified inside the timing;
* **limit**: one sparse LU plus one plain Arnoldi run per speed (``scipy.sparse.linalg.eigs``
  in shift-invert mode on the same state-space pencil, no completeness check, no tracking):
  what a full solve per speed cannot go below;
* the unbalance response (one case at the middle disk, the default probes): its peaks
  searched with full solves (*resp full*), and as a screening runs it after a reduced sweep,
  searched on the sweep's basis and confirmed by full solves (*response*,
  :mod:`rotorcalc.analysis.response_surrogate`); and the whole pipeline (sweep, criticals
  and response, as ``criticals`` runs them): in the same process after the full path
  (*pipeline*), and alone in three fresh processes, the least of the three (*best of 3*, the
  measure of the commands below: a shared machine's noise only ever adds time);

and prints the eigenvalue agreement between the two paths (largest relative difference of
every tracked point), the critical speeds' largest difference (rpm), the largest certified
residual, the basis size, and the growth exponent of CPU time with model size (least squares
on log-log, over the sizes run).  For the bundled cases it prints the same comparison (their
sizes are below the automatic choice, so the reduced path is forced) and the CPU time of
their what-if commands (in the process), then whole commands on the compressor in fresh
processes with their start-up, in rounds (every command once a round, the least and the most
of seven rounds printed; ``--commands`` alone prints only these), and last each target of
issue 15 beside what this run measured.  No time is asserted anywhere: this prints figures.
"""

from __future__ import annotations

import os

for _var in ("OPENBLAS_NUM_THREADS", "OMP_NUM_THREADS", "MKL_NUM_THREADS"):
    os.environ.setdefault(_var, "1")  # as the command line does, before numpy loads

import argparse  # noqa: E402
import compileall  # noqa: E402
import dataclasses  # noqa: E402
import json  # noqa: E402
import math  # noqa: E402
import resource  # noqa: E402
import subprocess  # noqa: E402
import sys  # noqa: E402
import time  # noqa: E402
from pathlib import Path  # noqa: E402

ROOT = Path(__file__).resolve().parents[2]
sys.path.insert(0, str(ROOT))

import numpy as np  # noqa: E402
import scipy.sparse.linalg as spla  # noqa: E402

from rotorcalc.analysis import critical_speeds, sweep  # noqa: E402
from rotorcalc.analysis.reduced import ReducedSolver  # noqa: E402
from rotorcalc.analysis.response import unbalance_response  # noqa: E402
from rotorcalc.assembly import assemble  # noqa: E402
from rotorcalc.solvers import SHIFT, AutoSolver, _Pencil  # noqa: E402
from rotorcalc.unbalance import UnbalanceCase, UnbalanceWeight  # noqa: E402
from tests.benchmarks.generated import generated_rotor  # noqa: E402

SIZES = (100, 250, 500, 1000, 2000, 4000)
CASES = ("feed_pump", "overhung_fan", "compressor")
RPM = 30.0 / math.pi


def cpu(run):
    start = time.process_time()
    out = run()
    return time.process_time() - start, out


def pipeline(system, solver):
    """Sweep + critical speeds on one solver: CPU seconds and the results."""
    def run():
        result = sweep(system, solver=solver)
        return result, critical_speeds(system, result, solver=solver)
    return cpu(run)


def limit(system, speeds, n_modes):
    """One sparse LU and one shift-invert Arnoldi run per speed, nothing else."""
    def run():
        for w in speeds:
            d_mat, k = system.damping(w) + w * system.gyroscopic, system.stiffness(w)
            pencil = _Pencil(system.mass, d_mat, k)
            spla.eigs(pencil.operator(SHIFT * pencil.ref), k=2 * n_modes + 8, which="LM",
                      tol=1e-10, v0=np.ones(2 * pencil.n))
    return cpu(run)[0]


def agreement(full, reduced):
    (a, ca), (b, cb) = full, reduced
    same_shape = a.eigenvalues.shape == b.eigenvalues.shape
    ok = np.isfinite(a.eigenvalues) & np.isfinite(b.eigenvalues) if same_shape else None
    eig = (float(np.max(np.abs(b.eigenvalues[ok] - a.eigenvalues[ok]) / np.abs(a.eigenvalues[ok])))
           if same_shape else math.nan)
    crit = (max((abs(x.speed - y.speed) * RPM for x, y in zip(ca, cb)), default=0.0)
            if len(ca) == len(cb) else math.nan)
    return eig, crit, same_shape and len(ca) == len(cb)


def one_size(elements):
    rotor = generated_rotor(elements, mode_count=8, speed_count=100)
    rotor = dataclasses.replace(rotor, unbalance=(UnbalanceCase(
        "middle disk", (UnbalanceWeight(3 + 4, 2e-4),)),))
    system = assemble(rotor)
    t_full, full = pipeline(system, AutoSolver())
    solver = ReducedSolver()
    t_red, red = pipeline(system, solver)
    t_resp_full, _ = cpu(lambda: unbalance_response(system, unstable=()))
    # as a screening runs it after a reduced sweep: peaks searched on the sweep's basis
    t_resp, _ = cpu(lambda: unbalance_response(system, unstable=(), basis=solver.basis(system)))
    eig, crit, same = agreement(full, red)
    r = red[0].reduction
    t_limit = limit(system, red[0].speeds, rotor.settings.mode_count + 4)
    return {"elements": elements, "dofs": system.n_dof, "full": t_full, "reduced": t_red,
            "limit": t_limit, "response": t_resp, "response_full": t_resp_full, "eig": eig,
            "crit_rpm": crit,
            "same_branches": bool(same), "residual": r.largest_residual,
            "basis": r.basis_size, "full_solves": len(r.full_solves)}


def pipeline_alone(elements):
    """CPU seconds of the reduced pipeline alone (sweep, criticals, response), as
    ``criticals`` runs it, in this (fresh) process."""
    rotor = generated_rotor(elements, mode_count=8, speed_count=100)
    rotor = dataclasses.replace(rotor, unbalance=(UnbalanceCase(
        "middle disk", (UnbalanceWeight(3 + 4, 2e-4),)),))
    system = assemble(rotor)

    def run():
        solver = ReducedSolver()
        result = sweep(system, solver=solver)
        critical_speeds(system, result, solver=solver)
        unbalance_response(system, unstable=(), basis=solver.basis(system))
    return cpu(run)[0]


def best_of(elements, runs=3):
    """The reduced pipeline's CPU seconds, best of ``runs`` fresh processes (the commands'
    measure, below: the least disturbed run of a shared machine)."""
    times = []
    for _ in range(runs):
        out = subprocess.run([sys.executable, __file__, "--alone", str(elements)],
                             capture_output=True, text=True, check=True)
        times.append(float(out.stdout.strip().splitlines()[-1]))
    return min(times)


def cases():
    import rotorcalc as rc
    from rotorcalc.analysis.whatif import compare, stiffness_window
    from rotorcalc.variants import read_variants
    from rotorcalc.analysis.stiffness_study import stiffness_study
    red = __import__('rotorcalc.analysis.reduced', fromlist=['x'])
    print(f"\nBundled cases (reduced path forced; automatic choice from {red.REDUCED_THRESHOLD} "
          f"DOFs with DOFs x speeds >= {red.REDUCED_WORK})")
    print(f"{'case':14} {'DOFs':>5} {'full s':>7} {'reduced s':>9} {'basis':>5} "
          f"{'eig diff':>9} {'crit rpm':>9} {'residual':>9}")
    for name in CASES:
        system = assemble(rc.read_rotor(ROOT / "cases" / f"{name}.toml"))
        t_full, full = pipeline(system, AutoSolver())
        t_red, red = pipeline(system, ReducedSolver())
        eig, crit, _ = agreement(full, red)
        r = red[0].reduction
        print(f"{name:14} {system.n_dof:5d} {t_full:7.2f} {t_red:9.2f} {r.basis_size:5d} "
              f"{eig:9.1e} {crit:9.1e} {r.largest_residual:9.1e}", flush=True)
    print("\nWhat-if commands on the bundled cases, CPU s (one worker)")
    for name in CASES:
        rotor = rc.read_rotor(ROOT / "cases" / f"{name}.toml")
        t_screen, _ = cpu(lambda: rc.screen(rotor))
        t_map, _ = cpu(lambda: stiffness_study(rotor))
        t_window, _ = cpu(lambda: stiffness_window(rotor, workers=1))
        variants = ROOT / "cases" / f"{name}_variants.toml"
        t_compare = cpu(lambda: compare(rotor, read_variants(variants)[2], workers=1))[0] \
            if variants.exists() else math.nan
        t_levers = cpu(lambda: levers_work(rotor))[0]
        print(f"{name:14} screen {t_screen:6.2f}  stiffness map {t_map:6.2f}  window "
              f"{t_window:6.2f}  compare {t_compare:6.2f}  levers {t_levers:6.2f}", flush=True)
    return commands()


def levers_work(rotor):
    """What ``rotorcalc levers`` computes: the what-if rotor screened, then its levers."""
    import rotorcalc as rc
    from rotorcalc.analysis.whatif import levers, what_if_rotor
    chosen = what_if_rotor(dataclasses.replace(rotor, unbalance=()))
    return levers(chosen, rc.screen(chosen).criticals)


def child_cpu(args):
    """CPU seconds (user + system) of one child process."""
    before = resource.getrusage(resource.RUSAGE_CHILDREN)
    subprocess.run(args, capture_output=True, check=False)
    after = resource.getrusage(resource.RUSAGE_CHILDREN)
    return after.ru_utime - before.ru_utime + after.ru_stime - before.ru_stime


#: Rounds of the commands in fresh processes: each round runs every command once (a burst of
#: the shared machine's load then touches one sample of each, not all of one), and the least
#: of each command's samples is printed (noise only ever adds time).
ROUNDS = 7


def commands():
    """Whole commands in fresh processes (start-up included), and the start-up alone."""
    exe = str(Path(sys.executable).with_name("rotorcalc"))
    case = str(ROOT / "cases" / "compressor.toml")
    rows = [("rotorcalc --help", [exe, "--help"]),
            ("numpy + scipy imports alone", [sys.executable, "-c", "import numpy, scipy.linalg, "
                                             "scipy.sparse.linalg, scipy.optimize"]),
            ("rotorcalc's imports for criticals",
             [sys.executable, "-c", "import rotorcalc.cli.common, rotorcalc.cli.criticals"]),
            ("rotorcalc criticals compressor", [exe, "criticals", case, "--jobs", "1"]),
            ("rotorcalc levers compressor", [exe, "levers", case]),
            ("rotorcalc window compressor", [exe, "window", case, "--jobs", "1"])]
    # the package's bytecode written first, as an install writes it: an editable install
    # under PYTHONDONTWRITEBYTECODE (this machine's) would compile every edited module anew
    # in every command, 0.1 to 0.3 s that no user pays twice
    compileall.compile_dir(str(ROOT / "rotorcalc"), quiet=1)
    for _, args in rows:        # once first: the cache folder's unit texts and film tables
        subprocess.run(args, capture_output=True, check=False)
    samples = {label: [] for label, _ in rows}
    for _ in range(ROUNDS):
        for label, args in rows:
            samples[label].append(child_cpu(args))
    print(f"\nCommands in a fresh process, CPU s (user + system): least and most of {ROUNDS} "
          "rounds")
    for label, _ in rows:
        print(f"{label:36} {min(samples[label]):6.2f} {max(samples[label]):6.2f}", flush=True)
    return {label: min(values) for label, values in samples.items()}


#: The targets of issue 15 (interactive speed): (what, limit, unit).  Times are CPU seconds,
#: the least disturbed run (best of fresh processes, least of the rounds): noise on a shared
#: machine only adds.
TARGETS = {
    "pipeline 1000": ("1000 elements: sweep, criticals, response (best of 3)", 3.0, "s"),
    "pipeline 4000": ("4000 elements: the same (best of 3)", 10.0, "s"),
    "growth": ("growth exponent of the reduced pipeline", 1.0, ""),
    "eig": ("eigenvalues against the full solve, relative", 1e-7, ""),
    "crit": ("critical speeds against the full solve", 0.01, "rpm"),
    "rotorcalc window compressor": ("`window` on the compressor", 5.0, "s"),
    "rotorcalc levers compressor": ("`levers` on the compressor", 1.5, "s"),
    "rotorcalc --help": ("`rotorcalc --help`", 0.3, "s"),
    "rotorcalc criticals compressor": ("`criticals` on the compressor", 1.5, "s"),
}


def print_targets(measured):
    """Each target measured in this run, beside its limit."""
    print("\nTargets (met when measured <= limit)")
    for key, (what, limit, unit) in TARGETS.items():
        if key in measured:
            value = measured[key]
            shown = f"{value:.2g}" if limit < 0.1 else f"{value:.2f}"
            print(f"{what:58} {shown:>8} {limit:>8g} {unit:3} "
                  f"{'met' if value <= limit else 'NOT MET'}")


def main():
    parser = argparse.ArgumentParser()
    parser.add_argument("--sizes", type=int, nargs="*", default=SIZES)
    parser.add_argument("--no-cases", action="store_true")
    parser.add_argument("--commands", action="store_true",
                        help="only the commands in fresh processes")
    parser.add_argument("--one", type=int, help=argparse.SUPPRESS)   # child process
    parser.add_argument("--alone", type=int, help=argparse.SUPPRESS)   # child process
    args = parser.parse_args()
    if args.one:
        print(json.dumps(one_size(args.one)))
        return
    if args.alone:
        print(pipeline_alone(args.alone))
        return
    if args.commands:
        print_targets(commands())
        return
    print("Generated rotors, 8 modes, 100 speeds; CPU seconds of sweep + critical speeds")
    print(f"{'elements':>8} {'DOFs':>6} {'full':>7} {'reduced':>8} {'limit':>7} {'full/red':>8} "
          f"{'resp full':>9} {'response':>8} {'pipeline':>8} {'basis':>5} {'eig diff':>9} "
          f"{'crit rpm':>9} "
          f"{'residual':>9} {'in full':>7} {'best of 3':>9}")
    rows = []
    for n in args.sizes:
        out = subprocess.run([sys.executable, __file__, "--one", str(n)], capture_output=True,
                             text=True, check=True)
        row = json.loads(out.stdout.strip().splitlines()[-1])
        row["best"] = best_of(n)
        rows.append(row)
        print(f"{n:8d} {row['dofs']:6d} {row['full']:7.2f} {row['reduced']:8.2f} "
              f"{row['limit']:7.2f} {row['full'] / row['reduced']:8.2f} "
              f"{row['response_full']:9.2f} {row['response']:8.2f} "
              f"{row['reduced'] + row['response']:8.2f} {row['basis']:5d} {row['eig']:9.1e} "
              f"{row['crit_rpm']:9.1e} {row['residual']:9.1e} {row['full_solves']:7d} "
              f"{row['best']:9.2f}", flush=True)
    measured = {f"pipeline {r['elements']}": r["best"] for r in rows}
    if rows:
        measured["eig"] = max(r["eig"] for r in rows)
        measured["crit"] = max(r["crit_rpm"] for r in rows)
    if len(rows) > 1:
        x = np.log([r["elements"] for r in rows])
        for key in ("full", "reduced", "limit"):
            slope = np.polyfit(x, np.log([r[key] for r in rows]), 1)[0]
            print(f"growth exponent of {key} CPU time with elements: {slope:.2f}")
        pipe = [r["reduced"] + r["response"] for r in rows]
        measured["growth"] = np.polyfit(x, np.log(pipe), 1)[0]
        print(f"growth exponent of the reduced pipeline (with response): "
              f"{measured['growth']:.2f}")
    if not args.no_cases:
        measured.update(cases())
    print_targets(measured)


if __name__ == "__main__":
    main()
