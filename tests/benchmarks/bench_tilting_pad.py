"""Tilting-pad benchmark: one ``coefficients(...)`` call of a five-pad bearing, timed.

Run from the repository root::

    python tests/benchmarks/bench_tilting_pad.py                 # 72 x 12 a pad
    python tests/benchmarks/bench_tilting_pad.py --grid 120 20 --repeat 5

For loads from light to heavy it prints the median wall time of
``PadJournal.coefficients`` (heat balance: several equilibria, then the full matrices at two
steps and the reduction) and of ``pad_coefficients`` at a given viscosity (one equilibrium),
with the film solves made.  No time is asserted.
"""

from __future__ import annotations

import os

for _var in ("OPENBLAS_NUM_THREADS", "OMP_NUM_THREADS", "MKL_NUM_THREADS"):
    os.environ.setdefault(_var, "1")  # as the CLI does, before numpy loads

import argparse  # noqa: E402
import math  # noqa: E402
import statistics  # noqa: E402
import time  # noqa: E402

import numpy as np  # noqa: E402

from rotorcalc.bearings import FilmOptions, Lubricant  # noqa: E402
from rotorcalc.bearings.pad_journal import PadJournal  # noqa: E402
from rotorcalc.bearings.tilting_pad import (PadRing, first_pivot_angle,  # noqa: E402
                                            pad_coefficients)

#: An invented test-rig bearing: 100 mm, L/D = 0.5, five 60-degree pads, C_p/R = 0.002,
#: preload 0.3, load between pads, ISO VG 46 oil at 45 degC.
RING = PadRing(0.1, 0.05, 5, math.radians(60.0), 1.0e-4, preload=0.3,
               first_pivot=first_pivot_angle(5, between=True))
SPEED, INLET = 300.0, 273.15 + 45.0


def timed(call, repeat):
    times, result = [], None
    for _ in range(repeat):
        start = time.perf_counter()
        result = call()
        times.append(time.perf_counter() - start)
    return statistics.median(times), result


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--grid", type=int, nargs=2, default=(72, 12))
    parser.add_argument("--repeat", type=int, default=3)
    args = parser.parse_args()
    options = FilmOptions(*args.grid)
    model = PadJournal(RING, Lubricant(grade=46), INLET, options=options)
    model.coefficients(SPEED, (0.0, -1000.0))   # warm the imports
    print(f"5 pads, grid {args.grid[0]} x {args.grid[1]} a pad (half length)")
    print(f"{'load N':>9} {'eps':>6} {'model s':>8} {'T degC':>7} {'given mu s':>10} "
          f"{'solves':>6}")
    for load in np.geomspace(300.0, 30000.0, 5):
        t_model, result = timed(lambda: model.coefficients(SPEED, (0.0, -load)), args.repeat)
        mu = model.viscosity(result.temperature)
        t_given, given = timed(lambda: pad_coefficients(RING, SPEED, (0.0, -load), mu,
                                                        options=options), args.repeat)
        eq = given.equilibrium
        coefficient_solves = 2 * 2 * 2 * 3 * RING.count    # K, C; two steps; x, y, tilts; +-
        print(f"{load:9.0f} {eq.eccentricity_ratio:6.3f} {t_model:8.3f} "
              f"{result.temperature - 273.15:7.1f} {t_given:10.3f} "
              f"{eq.film_solves + coefficient_solves:6d}")


if __name__ == "__main__":
    main()
