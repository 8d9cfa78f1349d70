"""One screening (the work of ``check``) of a bundled case with two source trees, side by
side: CPU seconds, best of three in a fresh process for each tree, alternating.

    git worktree add /tmp/before <commit>
    python tests/benchmarks/bench_trees.py /tmp/before . compressor --pairs 5

With ``--elements N`` the work is instead the generated rotor's pipeline (as
``bench_reduced.py`` runs it: the reduced sweep, its critical speeds and the unbalance response
on its basis), once a process: a run of N elements takes seconds.

Prints each pair and the ratio of the best figures (after / before).  The machine is
shared: read the spread, not one number.
"""

from __future__ import annotations

import argparse
import subprocess
import sys
from pathlib import Path

CHILD = """
import os, sys, time
os.environ.setdefault("OPENBLAS_NUM_THREADS", "1")
sys.path.insert(0, sys.argv[1])
from rotorcalc.reader import read_rotor
from rotorcalc.analysis.screening import screen
rotor = read_rotor(os.path.join(sys.argv[1], "cases", sys.argv[2] + ".toml"))
screen(rotor)
times = []
for _ in range(3):
    t = time.process_time(); result = screen(rotor); times.append(time.process_time() - t)
print(min(times), result.verdict)
"""


GENERATED = """
import dataclasses, os, sys, time
os.environ.setdefault("OPENBLAS_NUM_THREADS", "1")
sys.path.insert(0, sys.argv[1])
from rotorcalc.analysis import critical_speeds, sweep
from rotorcalc.analysis.reduced import ReducedSolver
from rotorcalc.analysis.response import unbalance_response
from rotorcalc.assembly import assemble
from rotorcalc.unbalance import UnbalanceCase, UnbalanceWeight
from tests.benchmarks.generated import generated_rotor
rotor = generated_rotor(int(sys.argv[2]), mode_count=8, speed_count=100)
rotor = dataclasses.replace(rotor, unbalance=(UnbalanceCase(
    "middle disk", (UnbalanceWeight(7, 2e-4),)),))
system = assemble(rotor)
start = time.process_time()
solver = ReducedSolver()
result = sweep(system, solver=solver)
critical_speeds(system, result, solver=solver)
unbalance_response(system, unstable=(), basis=solver.basis(system))
print(time.process_time() - start, "done")
"""


def one(tree, case, elements=None):
    child, what = (CHILD, case) if elements is None else (GENERATED, str(elements))
    out = subprocess.run([sys.executable, "-c", child, str(tree), what], check=True,
                         capture_output=True, text=True).stdout.split()
    return float(out[-2]), out[-1]


def main(argv=None):
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument("before", type=Path)
    parser.add_argument("after", type=Path)
    parser.add_argument("case", nargs="?", default="compressor")
    parser.add_argument("--pairs", type=int, default=3)
    parser.add_argument("--elements", type=int, help="the generated rotor's pipeline instead")
    args = parser.parse_args(argv)
    if args.elements:
        args.case = f"{args.elements} elements"
    before, after = [], []
    for i in range(args.pairs):
        (a, va), (b, vb) = (one(args.before, args.case, args.elements),
                            one(args.after, args.case, args.elements))
        before.append(a)
        after.append(b)
        print(f"pair {i + 1}: before {a:.3f} s ({va}), after {b:.3f} s ({vb})")
    print(f"{args.case}: before {min(before):.2f}-{max(before):.2f} s, after "
          f"{min(after):.2f}-{max(after):.2f} s CPU; best after / best before "
          f"{min(after) / min(before):.2f}")


if __name__ == "__main__":
    main()
