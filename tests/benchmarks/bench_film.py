"""Film-bearing benchmark: equilibrium + eight coefficients of a plain bore, timed.

Run from the repository root::

    python tests/benchmarks/bench_film.py                 # default grid 60 x 10
    python tests/benchmarks/bench_film.py --grid 120 20 --repeat 5

For loads from light to heavy (eccentricity ratios about 0.05 to 0.9) it prints the
median wall time of ``coefficients(...)`` (equilibrium, then K and C at two steps),
the Newton steps and film solves made, and the step check.  No time is asserted.
"""

from __future__ import annotations

import os

for _var in ("OPENBLAS_NUM_THREADS", "OMP_NUM_THREADS", "MKL_NUM_THREADS"):
    os.environ.setdefault(_var, "1")  # as the CLI does, before numpy loads

import argparse  # noqa: E402
import statistics  # noqa: E402
import time  # noqa: E402

import numpy as np  # noqa: E402

from rotorcalc.bearings import FilmOptions, coefficients, plain_bore  # noqa: E402

#: An invented test-rig journal: 100 mm, L/D = 0.5, c/R = 0.002, light turbine oil.
DIAMETER, LENGTH, CLEARANCE, VISCOSITY, SPEED = 0.1, 0.05, 1.0e-4, 0.02, 300.0


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--grid", type=int, nargs=2, default=(60, 10))
    parser.add_argument("--repeat", type=int, default=3)
    parser.add_argument("--cavitation", default="reynolds")
    args = parser.parse_args()
    bore = plain_bore(DIAMETER, LENGTH, CLEARANCE)
    options = FilmOptions(*args.grid, cavitation=args.cavitation)
    coefficients(bore, SPEED, (0.0, -1000.0), VISCOSITY, options=options)   # warm the imports
    print(f"grid {args.grid[0]} x {args.grid[1]} (half length), {args.cavitation} cavitation")
    print(f"{'load N':>9} {'eps':>6} {'median s':>9} {'Newton':>6} {'solves':>6} "
          f"{'dK/K':>9} {'dC/C':>9}")
    for load in np.geomspace(150.0, 2.0e5, 7):
        times = []
        for _ in range(args.repeat):
            start = time.perf_counter()
            result = coefficients(bore, SPEED, (0.0, -load), VISCOSITY, options=options)
            times.append(time.perf_counter() - start)
        eq = result.equilibrium
        print(f"{load:9.0f} {eq.eccentricity_ratio:6.3f} {statistics.median(times):9.4f} "
              f"{eq.iterations:6d} {eq.film_solves + 16:6d} {result.step_change[0]:9.1e} "
              f"{result.step_change[1]:9.1e}")


if __name__ == "__main__":
    main()
