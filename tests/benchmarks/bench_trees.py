"""One screening (the work of ``check``) of a bundled case with two source trees, side by
side: CPU seconds, best of three in a fresh process for each tree, alternating.

    git worktree add /tmp/before <commit>
    python tests/benchmarks/bench_trees.py /tmp/before . compressor --pairs 5

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


def one(tree, case):
    out = subprocess.run([sys.executable, "-c", CHILD, str(tree), case], check=True,
                         capture_output=True, text=True).stdout.split()
    return float(out[0]), out[1]


def main(argv=None):
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument("before", type=Path)
    parser.add_argument("after", type=Path)
    parser.add_argument("case", nargs="?", default="compressor")
    parser.add_argument("--pairs", type=int, default=3)
    args = parser.parse_args(argv)
    before, after = [], []
    for i in range(args.pairs):
        (a, va), (b, vb) = one(args.before, args.case), one(args.after, args.case)
        before.append(a)
        after.append(b)
        print(f"pair {i + 1}: before {a:.3f} s ({va}), after {b:.3f} s ({vb})")
    print(f"{args.case}: before {min(before):.2f}-{max(before):.2f} s, after "
          f"{min(after):.2f}-{max(after):.2f} s CPU; best after / best before "
          f"{min(after) / min(before):.2f}")


if __name__ == "__main__":
    main()
