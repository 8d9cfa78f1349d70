"""Values of the change grammar: the parts a path selects and a change's new value.

Shared by :mod:`rotorcalc.variants` (the model's parts) and
:mod:`rotorcalc.change_loads` (its loads)."""

from __future__ import annotations

import dataclasses

from . import units as u
from .errors import InputError
from .model import COEFFICIENT_NAMES
from .supports import scale_table

GROUPS = {
    "k": ("kxx", "kxy", "kyx", "kyy"),
    "c": ("cxx", "cxy", "cyx", "cyy"),
    "kdirect": ("kxx", "kyy"),
    "cdirect": ("cxx", "cyy"),
    "all": COEFFICIENT_NAMES,
    **{name: (name,) for name in COEFFICIENT_NAMES},
}


def pick(items, selector, index, label, key, text):
    """Indices of the parts a path element selects: a name, [i] or *."""
    if selector == "*" and index is None:
        return list(range(len(items)))
    if index is not None:
        if selector != label or not 0 <= index < len(items):
            raise InputError(key, f"selects {label}[{index}], which does not exist", value=text,
                             expected=f"an index 0..{len(items) - 1}", kind="station")
        return [index]
    hits = [i for i, part in enumerate(items) if getattr(part, "name", "") == selector]
    if not hits:
        names = [p.name for p in items if getattr(p, "name", "")]
        raise InputError(key, f"names no {label} called {selector!r}", value=text,
                         expected="one of " + ", ".join(names) if names else "an index",
                         kind="unknown-key")
    return hits


def new_value(change, old, dim):
    if change.op == "scale":
        return old * change.value
    text = str(change.value).strip()
    try:
        float(text)
    except ValueError:
        pass
    else:
        if float(text) != 0.0:  # "4000" for a speed would silently be rad/s
            raise InputError(change.key, "sets a value without a unit", value=change.text,
                             expected=f"a {dim.name} with a unit, e.g. {dim.examples}",
                             kind="unit")
    try:
        return u.parse(text, dim, change.key)
    except InputError as err:
        raise InputError(change.key, err.problem, value=change.text, expected=err.expected,
                         kind=err.kind) from None


def field(fields, name, change):
    if name not in fields:
        raise InputError(change.key, f"cannot change {name!r}", value=change.text,
                         expected="one of " + ", ".join(fields), kind="unknown-key")
    return fields[name]


def plain_or_quantity(change, old, dim):
    """A new value: a quantity, or a plain number where ``dim`` is None."""
    if dim is not None:
        return new_value(change, old, dim)
    if change.op == "scale":
        return old * change.value
    try:
        return float(str(change.value))
    except ValueError:
        raise InputError(change.key, "sets a number to text", value=change.text,
                         expected="a plain number", kind="type") from None


def change_coefficients(parts, chosen, names, change, **replace):
    """``parts`` (bearings or sources) with the coefficients ``names`` of those ``chosen``
    scaled (every table value: a speed dependence stays) or set to a constant; the
    other fields of each changed part are replaced by ``replace``."""
    key, text = change.key, change.text
    if change.op == "set" and len({n[0] for n in names}) > 1:
        raise InputError(key, "sets stiffness and damping to one value", value=text,
                         expected="set the k and c coefficients in separate changes",
                         kind="conflict")
    new = list(parts)
    for i in chosen:
        coefficients = dict(new[i].coefficients)
        for name in names:
            dim = u.STIFFNESS if name[0] == "k" else u.DAMPING
            if change.op == "scale":
                coefficients[name] = scale_table(new[i].table(name), change.value)
            else:
                coefficients[name] = (new_value(change, None, dim),)
        new[i] = dataclasses.replace(new[i], coefficients=coefficients, **replace)
    return tuple(new)
