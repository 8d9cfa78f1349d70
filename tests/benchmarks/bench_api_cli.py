"""Benchmark: the Python API against the command line on the same screening.

Run as ``python tests/benchmarks/bench_api_cli.py`` (not a test: nothing here is
collected by pytest, and no time is asserted).  It measures, side by side in one
run, for each bundled case:

* ``rotorcalc.screen(rotor)`` in this process, with no BLAS environment variable
  set (the solves limit themselves to one BLAS thread through threadpoolctl), CPU
  and wall time, best of ``REPEATS``;
* the same screening with the limit lifted (every BLAS thread), for the ratio the
  limit buys;
* ``rotorcalc check CASE`` as a separate process (the command line, which starts
  Python, imports and pins one thread by environment), wall time, best of
  ``REPEATS``;

and prints the times and their ratios.  The API should cost about what the
command line costs minus its start-up.
"""

from __future__ import annotations

import os

for _var in ("OPENBLAS_NUM_THREADS", "OMP_NUM_THREADS", "MKL_NUM_THREADS"):
    os.environ.pop(_var, None)   # the API must not need them

import subprocess  # noqa: E402
import sys  # noqa: E402
import time  # noqa: E402
from pathlib import Path  # noqa: E402

import rotorcalc as rc  # noqa: E402

ROOT = Path(__file__).resolve().parents[2]
CASES = ("feed_pump", "overhung_fan", "compressor")
REPEATS = 3


def best(run):
    walls, cpus = [], []
    for _ in range(REPEATS):
        w, c = time.perf_counter(), time.process_time()
        run()
        walls.append(time.perf_counter() - w)
        cpus.append(time.process_time() - c)
    return min(walls), min(cpus)


def main():
    exe = Path(sys.executable).with_name("rotorcalc")
    print(f"{'case':14} {'API wall':>9} {'API cpu':>8} {'all threads cpu':>16} "
          f"{'CLI wall':>9} {'CLI/API':>8}")
    for name in CASES:
        path = ROOT / "cases" / f"{name}.toml"
        rotor = rc.read_rotor(path)
        api_wall, api_cpu = best(lambda: rc.screen(rotor))
        # with a thread variable set, the solves leave BLAS as loaded: every thread
        os.environ["OPENBLAS_NUM_THREADS"] = "0"
        try:
            _, free_cpu = best(lambda: rc.screen(rotor))
        finally:
            del os.environ["OPENBLAS_NUM_THREADS"]
        cli_wall, _ = best(lambda: subprocess.run([str(exe), "check", str(path)],
                                                  capture_output=True, check=False))
        print(f"{name:14} {api_wall:9.2f} {api_cpu:8.2f} {free_cpu:16.2f} {cli_wall:9.2f} "
              f"{cli_wall / api_wall:8.2f}")


if __name__ == "__main__":
    main()
