"""Machine-readable output: JSON and CSV, written whole or not at all.

JSON documents carry the tool version, the input file's SHA-256 and the
warnings; key order is fixed by the result objects and floats are written by
Python's shortest round-trip repr, so the same input gives the same bytes.
"""

from __future__ import annotations

import csv
import hashlib
import io
import json
import os
import tempfile
from pathlib import Path

from . import __version__

FORMAT = "rotorcalc-results-1"


def atomic_write(path, text: str):
    """Write ``text`` to ``path`` through a temporary file and a rename."""
    path = Path(path)
    path.parent.mkdir(parents=True, exist_ok=True)
    fd, tmp = tempfile.mkstemp(prefix=f".{path.name}.", suffix=".tmp", dir=path.parent)
    try:
        with os.fdopen(fd, "w", encoding="utf-8", newline="") as handle:
            handle.write(text)
        os.replace(tmp, path)
    except BaseException:
        if os.path.exists(tmp):
            os.unlink(tmp)
        raise


def file_hash(path):
    """SHA-256 of a file's bytes, hex."""
    return hashlib.sha256(Path(path).read_bytes()).hexdigest()


def envelope(command: str, input_path, result: dict, warnings=()):
    """Wrap a result dict with provenance."""
    return {
        "format": FORMAT,
        "tool": "rotorcalc",
        "version": __version__,
        "command": command,
        "input": {"path": str(input_path), "sha256": file_hash(input_path)},
        "warnings": list(warnings),
        "result": result,
    }


def to_json(document: dict) -> str:
    return json.dumps(document, indent=2, allow_nan=False) + "\n"


def write_json(path, document: dict):
    atomic_write(path, to_json(document))


def read_json(path) -> dict:
    """Read back a results file written by :func:`write_json`."""
    data = json.loads(Path(path).read_text(encoding="utf-8"))
    if data.get("format") != FORMAT:
        raise ValueError(f"{path} is not a rotorcalc results file")
    return data


def to_csv(header, rows) -> str:
    buffer = io.StringIO()
    writer = csv.writer(buffer, lineterminator="\n")
    writer.writerow(header)
    for row in rows:
        writer.writerow(["" if v is None else v for v in row])
    return buffer.getvalue()


def write_csv(path, header, rows):
    atomic_write(path, to_csv(header, rows))
