"""Film tables kept on disk between runs: a rotor file whose bearings come from their
geometry costs its film solves once, not at every command.

A table depends on the shaft, disks, bearings' films, loads and speeds only
(:func:`rotorcalc.bearings.tabulate.tabulate_films` makes that key) and on the code that
computes it.  The file's name is the SHA-256 of both: the key pickled, and every source
file of the package with its version and Python's (any change to the code, or a new
version, is a new name: an old table is never read by new code).  What is kept is the
tabulated bearings, pickled.

Where: ``$ROTORCALC_CACHE`` if set (``off`` keeps nothing on disk), else
``$XDG_CACHE_HOME/rotorcalc/films`` or ``~/.cache/rotorcalc/films``.  A file that cannot be
read is computed anew and written again; a folder that cannot be written is passed over
silently (the result is the same, only slower).  Delete the folder to clear it.  The files
are Python pickles: keep the folder private, as any file a program loads.
"""

from __future__ import annotations

import functools
import hashlib
import os
import pickle
import sys
from pathlib import Path

from ..cache import ENV, folder  # noqa: F401 (the film tables' folder)


@functools.lru_cache(maxsize=1)
def _code_digest():
    """SHA-256 of the package's sources, its version and Python's version."""
    from .. import __version__
    root = Path(__file__).resolve().parents[1]
    digest = hashlib.sha256(f"{__version__} {sys.version}".encode())
    for path in sorted(root.rglob("*.py")):
        digest.update(path.relative_to(root).as_posix().encode())
        digest.update(path.read_bytes())
    return digest.hexdigest()


def path_for(key):
    """The file that holds (or will hold) the value of ``key``, or None (cache off, or a
    key that does not pickle)."""
    where = folder()
    if where is None:
        return None
    try:
        blob = pickle.dumps(key, protocol=4)
    except (pickle.PicklingError, TypeError, AttributeError):
        return None
    name = hashlib.sha256(_code_digest().encode() + blob).hexdigest()
    return where / f"{name}.pickle"


def fetch(key, compute):
    """The value kept for ``key``, or ``compute()`` kept for the next run."""
    path = path_for(key)
    if path is None:
        return compute()
    try:
        with open(path, "rb") as fh:
            return pickle.load(fh)
    except Exception:       # none yet, or a truncated or foreign file: computed and written
        pass
    value = compute()
    try:
        path.parent.mkdir(parents=True, exist_ok=True)
        part = path.with_name(f"{path.name}.{os.getpid()}.part")
        with open(part, "wb") as fh:
            pickle.dump(value, fh, protocol=4)
        os.replace(part, path)
    except OSError:
        pass
    return value
