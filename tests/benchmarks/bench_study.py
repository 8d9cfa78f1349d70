"""Benchmark: samples per second of an uncertainty study on each executor.

Run as ``python tests/benchmarks/bench_study.py [SAMPLES]`` (not a test: no time is
asserted).  Side by side in one run, the same study (``cases/compressor_study.toml``, its
first SAMPLES samples, 24 by default) on:

* this process (one worker);
* a local pool of 1 and of 2 worker processes;
* a Dask LocalCluster of 2 workers (one thread each);

wall time, samples per second, and the fitted per-sample cost: a study screens the rotor
once for its own criticals, then each sample, so ``t = t_s + n t_s / W + n c`` (the
in-process run gives ``t_s = t / (n + 1)``; each executor's overhead ``c`` per sample is its
time beyond that, over ``n``; it includes starting the workers, so it falls with ``n``).
With these a study of N samples on W workers takes about ``N (t_s / W + c)``.
"""

from __future__ import annotations

import dataclasses
import sys
import time
from pathlib import Path

from rotorcalc.analysis.study import run_study
from rotorcalc.executor import DaskCluster, InProcess, LocalPool
from rotorcalc.reader import read_rotor
from rotorcalc.study_file import read_study

ROOT = Path(__file__).resolve().parents[2]


def main(samples):
    rotor_path, plan = read_study(ROOT / "cases" / "compressor_study.toml")
    plan = dataclasses.replace(plan, samples=samples)
    rotor = read_rotor(rotor_path)
    runs = [("this process", 1, InProcess), ("local pool, 1 worker", 1, lambda: LocalPool(1)),
            ("local pool, 2 workers", 2, lambda: LocalPool(2)),
            ("Dask LocalCluster, 2 workers", 2, lambda: DaskCluster("local", 2))]
    times = {}
    for name, workers, make in runs:
        start = time.perf_counter()
        with make() as executor:
            run_study(rotor, plan, executor)
        times[name] = (time.perf_counter() - start, workers)
    per_sample = times["this process"][0] / (samples + 1)     # + the rotor's own screening
    print(f"compressor study, {samples} samples, {len(plan.inputs)} uncertain inputs")
    print(f"  {'executor':<30}{'wall s':>8}{'samples/s':>11}{'overhead/sample s':>19}")
    for name, (wall, workers) in times.items():
        overhead = (wall - per_sample - samples * per_sample / workers) / samples
        print(f"  {name:<30}{wall:8.2f}{samples / wall:11.2f}{overhead:19.3f}")
    print(f"  one sample in this process: {per_sample:.3f} s")
    dask_wall = times["Dask LocalCluster, 2 workers"][0]
    pool_wall = times["local pool, 2 workers"][0]
    print(f"  cluster / pool (2 workers each): {dask_wall / pool_wall:.2f}")
    cluster_over = max((dask_wall - per_sample - samples * per_sample / 2) / samples, 0.0)
    for n, w in ((1_000, 2), (100_000, 2), (100_000, 64), (100_000, 512)):
        # the cluster's overhead per sample is spread over its workers like the work
        hours = n * (per_sample + 2 * cluster_over) / w / 3600
        print(f"  {n} samples on {w} workers: about {hours:.1f} h")


if __name__ == "__main__":
    main(int(sys.argv[1]) if len(sys.argv) > 1 else 24)
