"""Record verification rows for ``docs/verification.md``, and check them.

Every verification test calls :func:`check` once per compared quantity.
:func:`check` computes the error, writes a row (case, source, expected,
computed, error, tolerance) when the environment variable
``ROTORCALC_RECORD`` names a JSON file, and then asserts the error is within
the tolerance.  Recording and asserting in one call keeps the published
table and the tested bound the same numbers.

``tools/make_verification_table.py`` sets the variable, runs the suite and
turns the file into the Markdown table.  Without the variable nothing is
written.
"""

from __future__ import annotations

import json
import math
import os
import tempfile

ENV = "ROTORCALC_RECORD"

#: How the error is measured: relative |c - e| / |e|, absolute |c - e|, or
#: equality of labels (error 0 when equal, 1 otherwise).
KINDS = ("rel", "abs", "equal")


def error_of(expected, computed, kind="rel"):
    """Error of ``computed`` against ``expected`` in the sense of ``kind``."""
    if kind == "equal":
        return 0.0 if computed == expected else 1.0
    e, c = float(expected), float(computed)
    if not (math.isfinite(e) and math.isfinite(c)):
        return math.inf
    if kind == "abs":
        return abs(c - e)
    if kind == "rel":
        return abs(c - e) / abs(e) if e != 0.0 else (0.0 if c == 0.0 else math.inf)
    raise ValueError(f"kind must be one of {KINDS}, got {kind!r}")


def _plain(value):
    if isinstance(value, str):
        return value
    if isinstance(value, (bool, int)):
        return int(value)
    return float(value)


def record(case, source, expected, computed, error, tolerance, kind):
    """Append one row to the JSON file named by ``ROTORCALC_RECORD`` (if set).

    The file holds a JSON list; it is rewritten whole through a temporary file
    and a rename, so an interrupted run never leaves half a file.
    """
    path = os.environ.get(ENV)
    if not path:
        return
    rows = []
    if os.path.exists(path):
        with open(path, encoding="utf-8") as fh:
            rows = json.load(fh)
    # pytest names the running test in PYTEST_CURRENT_TEST ("path::name (call)")
    test = os.environ.get("PYTEST_CURRENT_TEST", "").split(" ")[0]
    rows.append({"test": test, "case": str(case), "source": str(source),
                 "expected": _plain(expected),
                 "computed": _plain(computed), "error": float(error),
                 "tolerance": float(tolerance), "kind": kind})
    folder = os.path.dirname(os.path.abspath(path))
    fd, tmp = tempfile.mkstemp(dir=folder, suffix=".tmp")
    with os.fdopen(fd, "w", encoding="utf-8") as fh:
        json.dump(rows, fh, indent=1)
    os.replace(tmp, path)


def check(case, source, expected, computed, tolerance, kind="rel"):
    """Record a row and assert ``error <= tolerance``; returns the error."""
    if kind not in KINDS:
        raise ValueError(f"kind must be one of {KINDS}, got {kind!r}")
    err = error_of(expected, computed, kind)
    record(case, source, expected, computed, err, tolerance, kind)
    assert err <= tolerance, (
        f"{case}: expected {expected!r}, computed {computed!r}, {kind} error {err:.3g} "
        f"> tolerance {tolerance:.3g} (source: {source})")
    return err
