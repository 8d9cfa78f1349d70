"""What-if variants: small, checked changes applied to a rotor model by copy.

A change is one line of a tiny grammar of our own (no Python evaluation)::

    change := path "*=" number        scale the value(s) at path
            | path "=" quantity       set the value at path (a unit is allowed)
    path   := part ("." part)*        part := name | name "[" index "]" | "*"

Targets:

* ``bearing.SEL.COEF``: ``SEL`` is a bearing name, ``[i]`` (``bearing[0]``) or
  ``*`` (every bearing); ``COEF`` is one of kxx ... cyy, or a group: ``k``
  (the four stiffnesses), ``c`` (the four dampings), ``kdirect``
  (kxx, kyy), ``cdirect`` (cxx, cyy), ``all``.  Scaling scales every table
  value; setting replaces the table by a constant.
* ``bearing.SEL.support.FIELD``: mass, kx, ky, cx, cy.
* ``bearing.SEL.film.FIELD`` for a bearing computed from its geometry: diameter,
  length, clearance, preload, groove_width, feed_pressure; ``bearing.SEL.oil.FIELD``:
  grade (set only), inlet_temperature, film_temperature (set only, with a unit).  The
  bearing's coefficients are computed again, under the changed rotor's own loads, once
  every change of the variant is in (and so are every film bearing's when a change
  touches the shaft, the disks or the speeds).  A change to a film bearing's
  coefficients themselves (``bearing.DE.k *= 0.8``, as the stiffness studies make)
  freezes its computed table and changes that: no film halves its stiffness alone, so
  for a physical what-if change its geometry or oil instead.
* ``section[i].FIELD`` (or ``section.*``): length, outer_diameter,
  inner_diameter, added_mass.
* ``disk[i].FIELD`` or ``disk.NAME.FIELD`` (or ``disk.*``): mass,
  polar_inertia, transverse_inertia.
* ``operating.FIELD``: min_speed, max_speed, trip_speed.
* ``cross_coupling.SEL.q`` (or a coefficient) and ``unbalance.CASE.amount``,
  ``unbalance.CASE.weight[i].phase``: the loads (:mod:`rotorcalc.change_loads`).

Every changed part is rebuilt through its constructor, so a change that makes
the model invalid raises the same :class:`~rotorcalc.errors.InputError` as a
bad input file would.
"""

from __future__ import annotations

import dataclasses
import re
from dataclasses import dataclass
from pathlib import Path

from . import units as u
from ._change_values import (GROUPS, change_coefficients, field, new_value, pick,
                             plain_or_quantity)
from .change_loads import change_sources, change_unbalance
from .errors import InputError
from .model import Rotor
from .bearings.tabulate import tabulate_films
from .reader import check_keys, load_toml, locate, read_input_text, read_rotor

SUPPORT_FIELDS = {"mass": u.MASS, "kx": u.STIFFNESS, "ky": u.STIFFNESS, "cx": u.DAMPING,
                  "cy": u.DAMPING}
SECTION_FIELDS = {"length": u.LENGTH, "outer_diameter": u.LENGTH, "inner_diameter": u.LENGTH,
                  "added_mass": u.MASS}
DISK_FIELDS = {"mass": u.MASS, "polar_inertia": u.INERTIA, "transverse_inertia": u.INERTIA}
FILM_FIELDS = {"diameter": u.LENGTH, "length": u.LENGTH, "clearance": u.LENGTH,
               "preload": None, "groove_width": u.ANGLE, "feed_pressure": u.GAUGE_PRESSURE}
OIL_FIELDS = {"grade": None, "inlet_temperature": u.TEMPERATURE,
              "film_temperature": u.TEMPERATURE}
OPERATING_FIELDS = {"min_speed": u.SPEED, "max_speed": u.SPEED, "trip_speed": u.SPEED}

_CHANGE = re.compile(r"^\s*(?P<path>[A-Za-z0-9_.*\[\]\- ]+?)\s*(?P<op>\*=|=)\s*(?P<value>.+?)\s*$")
_PART = re.compile(r"^(?P<name>[A-Za-z0-9_\-* ]+?)\s*(?:\[(?P<index>\d+)\])?$")


@dataclass(frozen=True)
class Change:
    """One parsed change: a path (list of parts), ``scale`` or ``set``, and the value text."""

    text: str
    path: tuple
    op: str
    value: object
    key: str = "change"


@dataclass(frozen=True)
class Variant:
    """A named set of changes."""

    name: str
    changes: tuple


def parse_change(text, key="change") -> Change:
    """Parse one change line; raise InputError on anything outside the grammar."""
    if not isinstance(text, str):
        raise InputError(key, "must be text", value=text,
                         expected='e.g. "bearing.*.k *= 0.7"', kind="type")
    match = _CHANGE.match(text)
    if not match:
        raise InputError(key, "is not a change", value=text,
                         expected='"PATH *= FACTOR" or "PATH = VALUE", e.g. "bearing.*.k *= 0.7"',
                         kind="syntax")
    parts = []
    for position, piece in enumerate(match.group("path").split(".")):
        m = _PART.match(piece.strip())
        if not m:
            raise InputError(key, f"has a bad path element {piece!r}", value=text,
                             expected="names, [index] or *", kind="syntax")
        if m.group("index") is not None and position > 0 and not (
                position == 2 and m.group("name") == "weight" and parts[0][0] == "unbalance"):
            # only the part itself takes an index (bearing[0], section[2]); an index on a
            # field or coefficient would be silently ignored
            raise InputError(key, f"has an index on {m.group('name')!r}, which takes none",
                             value=text, expected="an index only right after bearing, section, "
                                                  "disk or cross_coupling, or on an unbalance "
                                                  "case's weight, e.g. bearing[0].kxx",
                                 kind="syntax")
        parts.append((m.group("name"), None if m.group("index") is None else int(m.group("index"))))
    op = "scale" if match.group("op") == "*=" else "set"
    value = match.group("value")
    if op == "scale":
        try:
            value = float(value)
        except ValueError:
            raise InputError(key, "scales by something that is not a number", value=text,
                             expected="a plain factor such as 0.7", kind="type") from None
        if not value > 0 or value != value or value == float("inf"):
            raise InputError(key, "must scale by a positive finite factor", value=text,
                             kind="range")
    return Change(text, tuple(parts), op, value, key)


def apply_change(rotor: Rotor, change: Change) -> Rotor:
    """A copy of ``rotor`` with one change applied."""
    parts, key, text = change.path, change.key, change.text
    head, head_index = parts[0]
    if head == "bearing":
        return _change_bearings(rotor, change, parts, head_index)
    if head in ("section", "disk"):
        items = rotor.sections if head == "section" else rotor.disks
        if head_index is not None:
            chosen, rest = pick(items, head, head_index, head, key, text), parts[1:]
        else:
            if len(parts) < 3:
                raise InputError(key, "needs a part and a field", value=text,
                                 expected=f"{head}[i].FIELD or {head}.NAME.FIELD", kind="syntax")
            chosen, rest = pick(items, parts[1][0], None, head, key, text), parts[2:]
        if len(rest) != 1:
            raise InputError(key, "needs exactly one field after the part", value=text,
                             kind="syntax")
        fields = SECTION_FIELDS if head == "section" else DISK_FIELDS
        name = rest[0][0]
        dim = field(fields, name, change)
        new = list(items)
        for i in chosen:
            new[i] = dataclasses.replace(new[i], **{name: new_value(change, getattr(new[i], name), dim)})
        return dataclasses.replace(rotor, **{"sections" if head == "section" else "disks": tuple(new)})
    if head == "operating":
        if len(parts) != 2:
            raise InputError(key, "needs one field", value=text,
                             expected="operating.min_speed, max_speed or trip_speed", kind="syntax")
        name = parts[1][0]
        dim = field(OPERATING_FIELDS, name, change)
        old = getattr(rotor.operating, name)
        if old is None and change.op == "scale":
            raise InputError(key, f"scales {name}, which the rotor does not have", value=text,
                             kind="missing")
        return dataclasses.replace(rotor, operating=dataclasses.replace(
            rotor.operating, **{name: new_value(change, old, dim)}))
    if head == "cross_coupling":
        return change_sources(rotor, change, parts, head_index)
    if head == "unbalance" and head_index is None:
        return change_unbalance(rotor, change, parts)
    raise InputError(key, f"cannot change {head!r}", value=text,
                     expected="bearing..., section..., disk..., operating..., cross_coupling... "
                              "or unbalance...", kind="unknown-key")


def _change_bearings(rotor, change, parts, head_index):
    key, text = change.key, change.text
    if head_index is not None:
        chosen, rest = pick(rotor.bearings, "bearing", head_index, "bearing", key, text), parts[1:]
    else:
        if len(parts) < 3:
            raise InputError(key, "needs a bearing and a coefficient", value=text,
                             expected="bearing.NAME.k, bearing[0].kxx, bearing.*.support.kx",
                             kind="syntax")
        chosen, rest = pick(rotor.bearings, parts[1][0], None, "bearing", key, text), parts[2:]
    new = list(rotor.bearings)
    if rest and rest[0][0] in ("film", "oil"):
        if parts[1][0] == "*" and head_index is None:
            chosen = [i for i in chosen if new[i].film is not None]   # those that have one
            if not chosen:
                raise InputError(key, f"changes the {rest[0][0]} of film bearings, but no "
                                 "bearing is computed from its geometry", value=text,
                                 kind="missing")
        return dataclasses.replace(rotor, bearings=_change_films(new, chosen, rest, change))
    if rest and rest[0][0] == "support":
        if len(rest) != 2:
            raise InputError(key, "needs one support field", value=text,
                             expected="support.mass, kx, ky, cx or cy", kind="syntax")
        name = rest[1][0]
        dim = field(SUPPORT_FIELDS, name, change)
        if parts[1][0] == "*" and head_index is None:
            chosen = [i for i in chosen if new[i].support is not None]  # those that have one
            if not chosen:
                raise InputError(key, "changes supports, but no bearing has one", value=text,
                                 kind="missing")
        for i in chosen:
            support = new[i].support
            if support is None:
                raise InputError(key, f"changes the support of bearing {new[i].name!r}, which "
                                      "has none", value=text, kind="missing")
            value = new_value(change, getattr(support, name), dim)
            new[i] = dataclasses.replace(new[i], support=dataclasses.replace(support, **{name: value}))
        return dataclasses.replace(rotor, bearings=tuple(new))
    if len(rest) != 1 or rest[0][0] not in GROUPS:
        raise InputError(key, "names no bearing coefficient", value=text,
                         expected="kxx ... cyy, or k, c, kdirect, cdirect, all", kind="unknown-key")
    # a film bearing's computed table is frozen: changed as given, never recomputed
    # (its record stays: the table came from a film, whose physics it keeps)
    return dataclasses.replace(rotor, bearings=change_coefficients(
        new, chosen, GROUPS[rest[0][0]], change, film=None))


def _change_films(bearings, chosen, rest, change):
    """Bearings with a film or oil input changed (their tables computed later)."""
    key, text = change.key, change.text
    part = rest[0][0]
    fields = FILM_FIELDS if part == "film" else OIL_FIELDS
    if len(rest) != 2:
        raise InputError(key, f"needs one {part} field", value=text,
                         expected=f"{part}." + ", ".join(fields), kind="syntax")
    name = rest[1][0]
    dim = field(fields, name, change)
    for i in chosen:
        film = bearings[i].film
        if film is None:
            raise InputError(key, f"changes the {part} of bearing {bearings[i].name!r}, which "
                             "is given by coefficient tables", value=text,
                             expected="a bearing with a [bearing.film] table", kind="missing")
        if part == "film":
            if not hasattr(film, name):
                raise InputError(key, f"changes {name}, which a {film.bore} bearing does not "
                                 "have", value=text, expected="clearance, preload, length or "
                                 "diameter", kind="unknown-key")
            film = film.changed(**{name: plain_or_quantity(change, getattr(film, name), dim)})
        else:
            film = _change_oil(film, name, change, dim)
        bearings[i] = dataclasses.replace(bearings[i], film=film, speeds=(), coefficients={},
                                          film_record=None)
    return tuple(bearings)


def _change_oil(film, name, change, dim):
    if change.op == "scale" and name != "grade" and dim is u.TEMPERATURE:
        raise InputError(change.key, "scales a temperature", value=change.text,
                         expected=f"oil.{name} = a temperature with its unit, such as "
                                  '"55 degC"', kind="syntax")
    if name == "grade":
        if change.op == "scale":
            raise InputError(change.key, "scales an oil grade", value=change.text,
                             expected="oil.grade = an ISO viscosity grade such as 46",
                             kind="syntax")
        old = film.lubricant
        grade = plain_or_quantity(change, None, None)
        lubricant = type(old)(grade=int(grade) if grade == int(grade) else grade,
                              reference_density=old.reference_density,
                              expansion=old.expansion, specific_heat=old.specific_heat,
                              name=old.name, key=old.key)
        return film.changed(lubricant=lubricant)
    return film.changed(**{name: new_value(change, getattr(film, name), dim)})


def apply_variant(rotor: Rotor, variant: Variant) -> Rotor:
    """A copy of ``rotor`` with every change of ``variant`` applied in order.

    A disk's inertias are checked against each other once every change is in:
    scaling the polar inertia before the transverse one passes through a state
    no rigid disk has, which is no fault of the variant.
    """
    flags = [d.inertia_as_given for d in rotor.disks]
    rotor = dataclasses.replace(rotor, disks=tuple(
        dataclasses.replace(d, inertia_as_given=True) for d in rotor.disks))
    for change in variant.changes:
        rotor = apply_change(rotor, change)
    rotor = dataclasses.replace(rotor, disks=tuple(
        dataclasses.replace(d, inertia_as_given=flag) for d, flag in zip(rotor.disks, flags)))
    # film bearings carry the changed rotor's loads, over its (maybe changed) speeds
    moved = any(change.path[0][0] != "bearing" for change in variant.changes)
    unset = any(b.film is not None and not b.coefficients for b in rotor.bearings)
    return tabulate_films(rotor) if moved or unset else rotor


VARIANTS_TOP = {"base", "variant"}
VARIANT_KEYS = {"name", "changes"}


def parse_variants(data, where="variant"):
    """Variants from the parsed ``[[variant]]`` tables."""
    tables = data.get("variant", [])
    if not isinstance(tables, list) or not all(isinstance(t, dict) for t in tables) or not tables:
        raise InputError("variant", "must be one or more [[variant]] tables",
                         expected='[[variant]] with name = "..." and changes = ["..."]',
                         kind="missing")
    out, names = [], set()
    for i, table in enumerate(tables):
        key = f"{where}[{i}]"
        check_keys(table, VARIANT_KEYS, key)
        name = table.get("name", f"variant {i + 1}")
        if not isinstance(name, str) or not name:
            raise InputError(f"{key}.name", "must be text", value=name, kind="type")
        if name in names:
            raise InputError(f"{key}.name", "is used twice", value=name, kind="duplicate")
        names.add(name)
        changes = table.get("changes")
        if not isinstance(changes, list) or not changes:
            raise InputError(f"{key}.changes", "must be a list of changes", value=changes,
                             expected='e.g. ["bearing.*.k *= 0.7"]', kind="missing")
        out.append(Variant(name, tuple(parse_change(c, f"{key}.changes[{j}]")
                                       for j, c in enumerate(changes))))
    return tuple(out)


def read_variants(path):
    """Read a variants file: ``base`` (the rotor file, relative to this one) and variants.

    Returns
    -------
    base_path : Path
    rotor : Rotor
    variants : tuple of Variant
        Each variant is also applied once here, so a change that does not fit
        the rotor is reported now, with the variants file's line.
    """
    path = Path(path)
    text = read_input_text(path, "a variants file of a few kB")
    data = load_toml(text, str(path))
    try:
        check_keys(data, VARIANTS_TOP, "")
        base = data.get("base")
        if not isinstance(base, str):
            raise InputError("base", "is missing" if base is None else "must be text",
                             value=base, expected="the rotor file, e.g. base = \"pump.toml\"",
                             kind="missing")
        variants = parse_variants(data)
    except InputError as err:
        raise err.with_location(file=str(path), line=locate(text, err.key)) from None
    base_path = (path.parent / base).resolve()
    rotor = read_rotor(base_path)
    for i, variant in enumerate(variants):
        try:
            apply_variant(rotor, variant)
        except InputError as err:
            line = locate(text, f"variant[{i}].changes")
            raise err.with_location(file=str(path), line=line) from None
    return base_path, rotor, variants


def variant_from_option(text, index=0):
    """A variant from the command line: ``"NAME: change; change"`` (the name is optional)."""
    head, colon, rest = text.partition(":")
    # a name comes before the first ':' unless that part is already a change (it holds
    # an operator); a name may hold any other character, '=' and brackets included
    is_change = re.search(r"(\*=|\+=|-=|/=|\s=\s|\s=$)", head)
    name, body = (head, rest) if colon and not is_change else ("", text)
    name = name.strip() or f"option {index + 1}"
    changes = [c for c in (part.strip() for part in body.split(";")) if c]
    if not changes:
        raise InputError("--vary", "has no change", value=text,
                         expected='"NAME: bearing.*.k *= 0.7; operating.max_speed = 3800 rpm"',
                         kind="missing")
    return Variant(name, tuple(parse_change(c, f"--vary[{index}]") for c in changes))
