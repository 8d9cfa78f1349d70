#!/usr/bin/env bash
# Run every JSON-writing command on each bundled case with the rotorcalc source tree SRC
# (for instance a worktree of an older commit) and write the documents to OUT; compare two
# such folders with tools/compare_documents.py.  Usage: tools/case_documents.sh SRC OUT
set -u
SRC=$(cd "$1" && pwd); OUT=$2; mkdir -p "$OUT"; OUT=$(cd "$OUT" && pwd)
HERE=$(cd "$(dirname "$0")/.." && pwd)
PY=${PYTHON:-$HERE/.venv/bin/python}
cd "$SRC"
run() { PYTHONPATH="$SRC" OPENBLAS_NUM_THREADS=1 "$PY" -c \
        "import sys; from rotorcalc.cli import main; sys.argv[0] = 'rotorcalc'; main()" "$@" \
        > /dev/null 2>&1; echo "$* -> exit $?"; }
for c in compressor feed_pump overhung_fan; do
  f=cases/$c.toml
  run criticals "$f" --json "$OUT/$c.criticals.json"
  run sweep "$f" --json "$OUT/$c.sweep.json"
  run modes "$f" --speed "3000 rpm" --json "$OUT/$c.modes.json"
  run response "$f" --json "$OUT/$c.response.json"
  run stiffness-map "$f" --json "$OUT/$c.smap.json"
  run compare "cases/${c}_variants.toml" --json "$OUT/$c.compare.json"
  run window "$f" --json "$OUT/$c.window.json"
  run levers "$f" --json "$OUT/$c.levers.json"
done
