"""The statics part of a rotor file: where gravity points (``[statics]``) and the steady
loads at stations (``[[static_load]]``) (docs/input.md)."""

from __future__ import annotations

from . import units as u
from ._toml import _array_of_tables, _quantity, _station, _string, check_keys
from .errors import InputError
from .model import GRAVITY_DIRECTIONS, StaticLoad

STATICS_KEYS = {"gravity"}
STATIC_LOAD_KEYS = {"at", "name", "fx", "fy", "mxz", "myz"}


def read_statics(data, names, n_sections):
    """``(gravity, static loads)`` of a parsed rotor file."""
    table = data.get("statics", {})
    check_keys(table, STATICS_KEYS, "statics")
    gravity = _string(table, "gravity", "statics", default="-y")
    if gravity not in GRAVITY_DIRECTIONS:
        raise InputError("statics.gravity", "is not a direction gravity may point",
                         value=gravity, expected=" or ".join(GRAVITY_DIRECTIONS), kind="choice")
    loads = []
    for i, entry in enumerate(_array_of_tables(data, "static_load")):
        where = f"static_load[{i}]"
        check_keys(entry, STATIC_LOAD_KEYS, where)
        if not set(entry) & {"fx", "fy", "mxz", "myz"}:
            raise InputError(f"{where}.fy", "is missing", expected="a force fx, fy or a "
                             "moment mxz, myz (with its unit)", kind="missing")
        values = {k: _quantity(entry, k, u.FORCE if k[0] == "f" else u.MOMENT, where,
                               default=0.0) for k in ("fx", "fy", "mxz", "myz")}
        loads.append(StaticLoad(_station(entry, where, names, n_sections),
                                name=_string(entry, "name", where, default=f"L{i + 1}"),
                                key=where, **values))
    return gravity, tuple(loads)
