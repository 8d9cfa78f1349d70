"""Compare the JSON documents of two runs of rotorcalc, field by field.

For refactorings that must not change a number: run every command with ``--json`` on the
bundled cases before and after (same file names in two folders), then

    python tools/compare_documents.py BEFORE_DIR AFTER_DIR --rename rule.kind=rule.name ...

Each ``--rename OLD=NEW`` maps a field path of the old documents (dots between keys, list
items not named: ``result.criticals.side``) to its new path.  Fields only in the new documents
are listed as added.  Numbers must agree to ``--rtol`` (default 1e-12); the provenance
(``input``, ``version``, file paths) is not compared.
"""

from __future__ import annotations

import argparse
import json
import math
import sys
from pathlib import Path

SKIP = {"input", "version", "tool", "base_file", "command"}


def flatten(doc, path="", out=None):
    """{dotted path (list indices as [i]): leaf value}."""
    out = {} if out is None else out
    if isinstance(doc, dict):
        for k, v in doc.items():
            if not path and k in SKIP:
                continue
            flatten(v, f"{path}.{k}" if path else k, out)
    elif isinstance(doc, list) and doc and all(isinstance(x, (dict, list)) for x in doc):
        for i, v in enumerate(doc):
            flatten(v, f"{path}[{i}]", out)
    else:
        out[path] = doc
    return out


def renamed(path, renames):
    bare = "".join(p for p in _parts(path))
    for old, new in renames.items():
        if bare == old or bare.startswith(old + "."):
            return _apply(path, old, new)
    return path


def _parts(path):
    """The path without its list indices."""
    out, depth = [], 0
    for ch in path:
        if ch == "[":
            depth += 1
        elif ch == "]":
            depth -= 1
        elif depth == 0:
            out.append(ch)
    return out


def _apply(path, old, new):
    """Replace the leading ``old`` (a path without indices) by ``new``, keeping indices."""
    old_keys, new_keys = old.split("."), new.split(".")
    keys, i = [], 0
    for part in path.split("."):
        keys.append(part)
    # map key by key: indices stay on the key they were on
    out = []
    for j, part in enumerate(keys):
        name, sep, index = part.partition("[")
        if j < len(old_keys) and name == old_keys[j] and j < len(new_keys):
            name = new_keys[j]
        out.append(name + (sep + index if sep else ""))
    return ".".join(out)


def same(a, b, rtol):
    if isinstance(a, (int, float)) and isinstance(b, (int, float)) \
            and not isinstance(a, bool) and not isinstance(b, bool):
        if math.isnan(a) and math.isnan(b):
            return True
        return a == b or abs(a - b) <= rtol * max(abs(a), abs(b))
    return a == b


def compare(before, after, renames, rtol):
    old = {renamed(k, renames): v for k, v in flatten(before).items()}
    new = flatten(after)
    changed = sorted(k for k in old if k in new and not same(old[k], new[k], rtol))
    gone = sorted(k for k in old if k not in new)
    added = sorted(k for k in new if k not in old)
    return changed, gone, added


def main(argv=None):
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument("before", type=Path)
    parser.add_argument("after", type=Path)
    parser.add_argument("--rename", action="append", default=[], metavar="OLD=NEW")
    parser.add_argument("--rtol", type=float, default=1e-12)
    args = parser.parse_args(argv)
    renames = dict(r.split("=", 1) for r in args.rename)
    bad = 0
    for path in sorted(args.before.glob("*.json")):
        other = args.after / path.name
        if not other.exists():
            print(f"{path.name}: missing after")
            bad += 1
            continue
        changed, gone, added = compare(json.loads(path.read_text()),
                                       json.loads(other.read_text()), renames, args.rtol)
        added_keys = sorted({"".join(_parts(k)) for k in added})
        gone_keys = sorted({"".join(_parts(k)) for k in gone})
        print(f"{path.name}: {len(flatten(json.loads(other.read_text())))} fields, "
              f"{len(changed)} changed, {len(gone_keys)} gone, {len(added_keys)} added")
        for k in changed[:20]:
            print(f"  changed {k}")
        for k in gone_keys:
            print(f"  gone    {k}")
        for k in added_keys:
            print(f"  added   {k}")
        bad += len(changed) + len(gone_keys)
    return 1 if bad else 0


if __name__ == "__main__":
    sys.exit(main())
