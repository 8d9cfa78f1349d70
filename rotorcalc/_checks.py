"""Small validation helpers and the immutable mapping shared by the model's dataclasses."""

from __future__ import annotations

import math
from collections.abc import Mapping

from .errors import InputError


class FrozenMap(Mapping):
    """A mapping that cannot be changed and can be hashed: the model's tables.

    A frozen dataclass holding a plain dict could still be changed in place
    (``bearing.coefficients["kxx"] = ...``) and could not be hashed.
    """

    __slots__ = ("_items",)

    def __init__(self, items=()):
        object.__setattr__(self, "_items", dict(items))

    def __getitem__(self, key):
        return self._items[key]

    def __iter__(self):
        return iter(self._items)

    def __len__(self):
        return len(self._items)

    def __hash__(self):
        return hash(tuple(sorted(self._items.items())))

    def __eq__(self, other):
        return isinstance(other, Mapping) and dict(self._items) == dict(other)

    def __repr__(self):
        return f"FrozenMap({self._items!r})"

    def __setattr__(self, name, value):
        raise AttributeError("a FrozenMap cannot be changed")

    def __reduce__(self):
        return (FrozenMap, (self._items,))


def _freeze(obj, name, value):
    """Set a frozen dataclass's mapping field to its frozen copy."""
    if not isinstance(value, FrozenMap):
        object.__setattr__(obj, name, FrozenMap(value))


def _one_of(key, value, choices):
    if value not in choices:
        raise InputError(key, "is not a known choice", value=value,
                         expected=" or ".join(choices), kind="choice")


def _positive(key, value, *, allow_zero=False):
    ok = value >= 0.0 if allow_zero else value > 0.0
    if not (math.isfinite(value) and ok):
        what = "zero or positive" if allow_zero else "positive"
        raise InputError(key, f"must be {what}", value=value, expected=f"a {what} finite number",
                         kind="range")
