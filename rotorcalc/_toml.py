"""Reading TOML values: the file's text to tables, typed values with key paths in their errors,
station references, text limits, and the line a key path is on."""

from __future__ import annotations

import difflib
import math
import re
import sys

if sys.version_info >= (3, 11):
    import tomllib
else:  # pragma: no cover
    import tomli as tomllib

from . import units as u
from .errors import InputError


def load_toml(text, source):
    """Parse TOML, turning syntax errors into an InputError with line and column."""
    if text.startswith("\ufeff"):
        text = text[1:]
    try:
        return tomllib.loads(text)
    except RecursionError:
        raise InputError("(syntax)", "nests arrays or tables too deeply", file=source,
                         expected="TOML nested a few levels, see docs/input.md",
                         kind="size") from None
    except tomllib.TOMLDecodeError as exc:
        msg = str(exc)
        match = re.search(r"line (\d+), column (\d+)", msg)
        line = int(match.group(1)) if match else None
        if line is None and "end of document" in msg:
            line = text.count("\n") + 1
        raise InputError("(syntax)", f"is not valid TOML: {msg}", file=source, line=line,
                         expected="TOML syntax, see docs/input.md", kind="syntax") from None


# --- helpers -------------------------------------------------------------------------

def _path(where, key):
    return f"{where}.{key}" if where else key


def check_keys(table, allowed, where):
    """Raise on the first key of ``table`` that is not in ``allowed``."""
    if not isinstance(table, dict):
        raise InputError(where, "must be a table", value=_short(table),
                         expected="a TOML table of keys", kind="type")
    for key in table:
        if key not in allowed:
            near = difflib.get_close_matches(key, sorted(allowed), n=1, cutoff=0.5)
            hint = f"did you mean '{near[0]}'?" if near else \
                "one of " + ", ".join(sorted(allowed))
            raise InputError(_path(where, key), "is not a known key", expected=hint, kind="unknown-key")


def _short(value):
    text = repr(value)
    return text if len(text) < 60 else text[:57] + "..."


def _require(table, key, where):
    if key not in table:
        raise InputError(_path(where, key), "is missing", expected="a value; see docs/input.md",
                         kind="missing")
    return table[key]


def _quantity(table, key, dim, where, default=None, required=False):
    if key not in table:
        if required:
            _require(table, key, where)
        return default
    return u.parse(table[key], dim, _path(where, key))


def _integer(table, key, where, default):
    value = table.get(key, default)
    if isinstance(value, bool) or not isinstance(value, int):
        raise InputError(_path(where, key), "must be a whole number", value=value,
                         kind="type")
    return value


def _number(table, key, where, default):
    value = table.get(key, default)
    if isinstance(value, bool) or not isinstance(value, (int, float)) or not math.isfinite(value):
        raise InputError(_path(where, key), "must be a finite number", value=value, kind="type")
    return float(value)


def _string(table, key, where, default=None, required=False):
    if key not in table:
        if required:
            _require(table, key, where)
        return default
    value = table[key]
    if not isinstance(value, str):
        raise InputError(_path(where, key), "must be text", value=value, kind="type")
    return plain_text(value, _path(where, key),
                      LONG_TEXT if key in ("title", "description") else NAME_LENGTH)


#: Longest name (bearing, disk, probe, case ...) and longest title or description.
NAME_LENGTH = 200
LONG_TEXT = 1000
#: Largest rotor file read, bytes.
FILE_LIMIT = 5_000_000


def plain_text(value, key, limit=NAME_LENGTH):
    """A name or title as given, refused when too long or holding control characters
    (they would garble tables and pictures); every other character is kept as
    written, markup and '$' included."""
    if len(value) > limit:
        raise InputError(key, f"is longer than {limit} characters", value=value[:40] + "...",
                         expected=f"at most {limit} characters", kind="size")
    bad = next((c for c in value if ord(c) < 32 or 127 <= ord(c) < 160), None)
    if bad is not None:
        raise InputError(key, f"holds a control character (code {ord(bad)})",
                         value=value[:60], expected="printable text", kind="type")
    return value


def _array_of_tables(data, key, where=""):
    value = data.get(key, [])
    if not isinstance(value, list) or not all(isinstance(v, dict) for v in value):
        path = _path(where, key)
        raise InputError(path, f"must be written as [[{path}]] tables", value=_short(value),
                         kind="type")
    return value



def _station(table, where, names, n_sections):
    at = _require(table, "at", where)
    if isinstance(at, str):
        if at not in names:
            near = difflib.get_close_matches(at, sorted(names), n=1, cutoff=0.5)
            hint = f"did you mean '{near[0]}'?" if near else \
                f"a station number 0..{n_sections} or a name from [stations]"
            raise InputError(f"{where}.at", "names an unknown station", value=at,
                             expected=hint, kind="station")
        return names[at]
    if isinstance(at, bool) or not isinstance(at, int) or not 0 <= at <= n_sections:
        raise InputError(f"{where}.at", "names a station that does not exist", value=at,
                         expected=f"a station number 0..{n_sections} or a name from [stations]",
                         kind="station")
    return at




# --- where is a key? --------------------------------------------------------------------

_HEADER = re.compile(r"^\s*\[\[?\s*([^\]]+?)\s*\]\]?\s*(#.*)?$")
_PART = re.compile(r"^([^\[\]]+)(?:\[(\d+)\])?$")


def locate(text: str, key: str):
    """Best-effort 1-based line number of a key path such as ``bearing[1].kxx[2]``."""
    if not key or key.startswith("("):
        return None
    lines = text.splitlines()
    parts = []
    for piece in key.split("."):
        match = _PART.match(piece)
        if not match:
            return None
        parts.append((match.group(1), int(match.group(2)) if match.group(2) else None))
    start, end, header = 0, len(lines), []
    for depth, (name, index) in enumerate(parts):
        header = header + [name]
        wanted = ".".join(header)
        hits = [n for n in range(start, end) if (m := _HEADER.match(lines[n]))
                and m.group(1).replace(" ", "") == wanted]
        if hits:
            pick = hits[index] if index is not None and index < len(hits) else hits[0]
            start = pick + 1
            nxt = [n for n in range(start, len(lines)) if (m := _HEADER.match(lines[n]))
                   and not m.group(1).replace(" ", "").startswith(wanted + ".")]
            end = nxt[0] if nxt else len(lines)
            continue
        if any((m := _HEADER.match(line)) and m.group(1).replace(" ", "").startswith(wanted + ".")
               for line in lines[start:end]):
            continue  # a dotted header further down, e.g. [materials.steel]
        # a plain key inside the current table
        pattern = re.compile(rf"^\s*{re.escape(name)}\s*=")
        for n in range(start, end):
            if pattern.match(lines[n]):
                return n + 1
        return start if start > 0 else None
    return start if start > 0 else None
