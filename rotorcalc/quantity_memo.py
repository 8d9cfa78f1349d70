"""Quantity texts read before, kept between runs: without them every command would import
pint and load its registry (about 0.15 s of CPU here) to read "125 mm" once more.

``units/read.json`` in the cache folder (:mod:`rotorcalc.cache`) maps a text and the
dimension it was read as to the SI value :func:`rotorcalc.units.parse` found for it with
pint.  It is written when a process that read new texts ends.  Its stamp (this package's
version, a digest of ``units.py`` and of this module, where pint is installed and when, as
they were when the file was loaded) must match, else the
file is ignored and written anew; a damaged or foreign file is ignored too.  Only
values every check of :func:`~rotorcalc.units.parse` accepted are kept: a text refused is read
by pint each time, for its message; the checks apply to a remembered value as to a new one.
"""

from __future__ import annotations

import atexit
import hashlib
import json
import math
import os
import threading
from pathlib import Path

from . import __version__
from .cache import folder

#: Most texts kept (a file of about 200 kB, read in a few ms); beyond it the memo starts afresh.
LIMIT = 5000
#: A file larger than this (bytes) is not read: damaged or not this module's.
FILE_LIMIT = 2_000_000

_known: dict = {}               # key -> SI value, loaded on first use
_new = False                    # texts read since the file was loaded
_base = ...                     # the cache folder they were loaded from (... : not yet)
_where: Path | None = None
_stamped = ""                   # the stamp when loaded: the code the values were read with


def _code_digest():
    here = Path(__file__)
    return hashlib.sha256(here.with_name("units.py").read_bytes() + here.read_bytes()).hexdigest()


#: The code the values are read with, as it was when this process imported it (a file edited
#: later in a long-lived process does not vouch for values the old code read).
_CODE = _code_digest()


def _stamp():
    """What the values depend on beyond their texts: this package's version, its reading code
    as imported, and where pint is installed and when."""
    import importlib.util
    spec = importlib.util.find_spec("pint")
    pint_file = Path(spec.origin) if spec is not None and spec.origin else None
    pint_mark = (f"{pint_file}:{pint_file.stat().st_mtime_ns}:{pint_file.stat().st_size}"
                 if pint_file is not None and pint_file.exists() else "no pint")
    return f"{__version__}|{_CODE}|{pint_mark}"


def _load():
    """Load the file of the cache folder now named (once per folder: tests change it)."""
    global _known, _where, _base, _new, _stamped
    base = folder()
    if base == _base:
        return
    save()
    _known, _where, _base, _new = {}, None, base, False
    if base is None:
        return
    _where = base / "units" / "read.json"
    _stamped = _stamp()
    try:
        if _where.stat().st_size > FILE_LIMIT:
            raise ValueError("larger than any memo this module writes")
        data = json.loads(_where.read_text(encoding="utf-8"))
        if data.get("stamp") == _stamped and isinstance(data.get("values"), dict):
            _known = {k: float(v) for k, v in data["values"].items()
                      if isinstance(k, str) and isinstance(v, (int, float))
                      and not isinstance(v, bool) and math.isfinite(v)}
    except (OSError, ValueError, TypeError, AttributeError, OverflowError, RecursionError):
        _known = {}         # missing, damaged or foreign: read anew, written at the end


def _key(text, dimension):
    return f"{dimension}|{text}"


def recall(text, dimension):
    """The SI value ``text`` (stripped) was read as for ``dimension`` (its name), or None."""
    _load()
    return _known.get(_key(text, dimension))


def remember(text, dimension, value):
    """Keep ``value`` for ``text`` read as ``dimension``; written when the process ends."""
    global _new
    _load()
    if _where is None or not math.isfinite(value):
        return
    if len(_known) >= LIMIT:
        _known.clear()
    _known[_key(text, dimension)] = float(value)
    _new = True


def save():
    """Write the texts read so far (atomically; a folder that cannot be written: nothing)."""
    global _new
    if not _new or _where is None:
        return
    try:
        _where.parent.mkdir(parents=True, exist_ok=True)
        part = _where.with_name(f"{_where.name}.{os.getpid()}.{threading.get_ident()}.part")
        # the stamp seen at loading: a units.py or pint changed since is not vouched for
        part.write_text(json.dumps({"stamp": _stamped, "values": dict(_known)}),
                        encoding="utf-8")
        os.replace(part, _where)
        _new = False
    except OSError:
        pass


atexit.register(save)
