"""Benchmark: the design-review report against the design gate on the same rotor.

Run as ``python tests/benchmarks/bench_review.py [CASE ...]`` (not a test: no time is
asserted).  Side by side in one run, alternating, ``REPEATS`` times each:

* ``rotorcalc check CASE`` (the screening the report starts from);
* ``rotorcalc review CASE -o FILE`` with its default ``--jobs 2``;
* ``rotorcalc review CASE -o FILE --jobs 1`` (everything in one process);

each as its own process: wall time and CPU time (the process and its workers), best of the
repeats, and the ratios review / check.  The issue's target: the report at most 1.5 times
the time of ``check``.  Default case: the compressor.
"""

from __future__ import annotations

import os
import resource
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
REPEATS = 3
EXE = str(Path(sys.executable).with_name("rotorcalc"))


def timed(args):
    """(wall s, CPU s of the children) of one command run."""
    before = resource.getrusage(resource.RUSAGE_CHILDREN)
    start = time.perf_counter()
    done = subprocess.run(args, capture_output=True, text=True)
    wall = time.perf_counter() - start
    after = resource.getrusage(resource.RUSAGE_CHILDREN)
    if done.returncode not in (0, 1, 5):
        raise SystemExit(f"{args} failed ({done.returncode}):\n{done.stderr}")
    cpu = (after.ru_utime - before.ru_utime) + (after.ru_stime - before.ru_stime)
    return wall, cpu


def main(cases):
    with tempfile.TemporaryDirectory() as folder:
        for name in cases:
            case = str(ROOT / "cases" / f"{name}.toml")
            out = os.path.join(folder, f"{name}.html")
            runs = {"check": [EXE, "check", case],
                    "review": [EXE, "review", case, "-o", out],
                    "review --jobs 1": [EXE, "review", case, "-o", out, "--jobs", "1"]}
            best = {key: [float("inf"), float("inf")] for key in runs}
            for _ in range(REPEATS):
                for key, args in runs.items():
                    wall, cpu = timed(args)
                    best[key] = [min(best[key][0], wall), min(best[key][1], cpu)]
            print(f"{name} (best of {REPEATS}, alternating)")
            print(f"  {'command':<18}{'wall s':>8}{'CPU s':>8}{'wall / check':>14}{'CPU / check':>13}")
            for key, (wall, cpu) in best.items():
                print(f"  {key:<18}{wall:8.2f}{cpu:8.2f}{wall / best['check'][0]:14.2f}"
                      f"{cpu / best['check'][1]:13.2f}")


if __name__ == "__main__":
    main(sys.argv[1:] or ["compressor"])
