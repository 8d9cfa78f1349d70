"""Sweep with bearings from their geometry against the same sweep with coefficient tables,
measured side by side in one run.

Run from the repository root::

    python tests/benchmarks/bench_film_sweep.py               # 3 rounds, the feed pump
    python tests/benchmarks/bench_film_sweep.py --rounds 5 --elements 4
    python tests/benchmarks/bench_film_sweep.py --case compressor --rounds 2

The same rotor twice: ``cases/feed_pump.toml`` (sleeve bearings given by the bearing
report's tables) and ``cases/feed_pump_sleeve.toml`` (the same sleeves given by their
geometry, the coefficients computed under the rotor's own loads); with ``--case
compressor``, ``cases/compressor.toml`` and ``cases/compressor_tilting_pad.toml``
(tilting-pad bearings as tables and from their geometry).  ``--elements N``
splits every shaft section into N elements (a bigger model, the same bearings).  Each
round times, alternately:

* the table rotor: read the file, sweep;
* the geometry rotor: read the file (its film tables computed afresh, the caches in
  memory and on disk cleared), sweep;
* the geometry rotor read again as the next command would (its film tables from the disk
  cache, rotorcalc/bearings/film_cache.py, a temporary folder of this run's), sweep;
* the geometry rotor's sweep alone, its film tables already computed (what every later
  analysis of the same rotor costs, and what a what-if of a non-bearing input reuses);
* and, for scale, the film solves a sweep would need without the table: one set of
  coefficients per bearing at every sweep speed (not run as a sweep; timed per solve
  on a quarter of the speeds and scaled).

It prints the medians and the ratios to the table sweep.  No time is asserted.
"""

from __future__ import annotations

import os

for _var in ("OPENBLAS_NUM_THREADS", "OMP_NUM_THREADS", "MKL_NUM_THREADS"):
    os.environ.setdefault(_var, "1")  # as the CLI does, before numpy loads

import argparse  # noqa: E402
import dataclasses  # noqa: E402
import statistics  # noqa: E402
import tempfile  # noqa: E402
import time  # noqa: E402
from pathlib import Path  # noqa: E402

from rotorcalc.analysis.sweep import default_speeds, sweep  # noqa: E402
from rotorcalc.bearings import film_cache, tabulate  # noqa: E402
from rotorcalc.reader import read_rotor  # noqa: E402

ROOT = Path(__file__).resolve().parents[2]
PAIRS = {"pump": ("feed_pump.toml", "feed_pump_sleeve.toml"),
         "compressor": ("compressor.toml", "compressor_tilting_pad.toml")}


def refined(rotor, elements):
    if elements is None:
        return rotor
    sections = tuple(dataclasses.replace(s, elements=elements) for s in rotor.sections)
    return dataclasses.replace(rotor, sections=sections)


def timed(work):
    start = time.perf_counter()
    value = work()
    return time.perf_counter() - start, value


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--rounds", type=int, default=3)
    parser.add_argument("--elements", type=int, default=None,
                        help="elements per shaft section (default: the files')")
    parser.add_argument("--case", choices=sorted(PAIRS), default="pump")
    args = parser.parse_args()
    tables_file, geometry_file = (ROOT / "cases" / name for name in PAIRS[args.case])
    sweep(read_rotor(tables_file))                       # warm the imports
    rows = {"tables: read + sweep": [], "geometry: read (film tables) + sweep": [],
            "geometry: read (tables from disk) + sweep": [],
            "geometry: sweep, film tables computed": []}
    geometry = None
    with tempfile.TemporaryDirectory() as folder:
        os.environ[film_cache.ENV] = folder              # a cache of this run's own
        for _ in range(args.rounds):
            rows["tables: read + sweep"].append(
                timed(lambda: sweep(refined(read_rotor(tables_file), args.elements)))[0])
            for path in Path(folder).glob("*.pickle"):
                path.unlink()
            tabulate._stored.cache_clear()
            t, geometry = timed(lambda: refined(read_rotor(geometry_file), args.elements))
            t_sweep, _ = timed(lambda: sweep(geometry))
            rows["geometry: read (film tables) + sweep"].append(t + t_sweep)
            tabulate._stored.cache_clear()                # the next command: from disk
            rows["geometry: read (tables from disk) + sweep"].append(timed(
                lambda: sweep(refined(read_rotor(geometry_file), args.elements)))[0])
            rows["geometry: sweep, film tables computed"].append(
                timed(lambda: sweep(geometry))[0])
    films = [b for b in geometry.bearings if b.film is not None]
    speeds = [s for s in default_speeds(geometry) if s > 0]
    sample = speeds[::4]
    loads = {id(b): tuple(b.film_record.loads[0]) for b in films}
    t_sample, _ = timed(lambda: [b.film.coefficients(s, loads[id(b)]) for s in sample
                                 for b in films])
    naive = t_sample * len(speeds) / len(sample)
    base = statistics.median(rows["tables: read + sweep"])
    n_dof = 4 * (sum(s.elements for s in geometry.sections) + 1)
    print(f"{geometry.name}, {n_dof} shaft DOF, {len(speeds) + 1} sweep speeds, "
          f"{len(films)} film bearings, {len(films[0].film_record.speeds)} film speeds "
          f"solved each; median of {args.rounds} rounds")
    print(f"{'':44} {'median s':>9} {'/ tables':>9}")
    for name, times in rows.items():
        m = statistics.median(times)
        print(f"{name:44} {m:9.3f} {m / base:9.2f}")
    print(f"{'film solves at every sweep speed (no table)':44} {naive:9.3f} {naive / base:9.2f}")


if __name__ == "__main__":
    main()
