"""TOML rotor description to a :class:`~rotorcalc.model.Rotor`.

The layout is documented key by key in ``docs/input.md``.  Every table has a
fixed set of keys: an unknown key is an error that names the nearest valid
one.  Dimensional values go through :mod:`rotorcalc.units` (a bare number is
SI).  Errors carry the key path, the file and, where it can be found, the line.
"""

from __future__ import annotations

import dataclasses
import difflib
import math
import re
import warnings
import sys
from pathlib import Path

if sys.version_info >= (3, 11):
    import tomllib
else:  # pragma: no cover
    import tomli as tomllib

from . import standards
from . import units as u
from .errors import InputError
from .model import (COEFFICIENT_NAMES, Bearing, Disk, MarginRule, Material, OperatingRange,
                    Rotor, Section, Settings, StabilityRule, Support)
from .vocabulary import (OLD_SPELLINGS_UNTIL, RENAMED_KEYS, BearingRole, RenamedWarning,
                         renamed)
from .unbalance import Clearance, Probe, ResponseSettings, UnbalanceCase, UnbalanceWeight

TOP_KEYS = {"title", "stations", "materials", "section", "disk", "bearing", "operating",
            "analysis", "unbalance", "probe", "clearance", "response"}
MATERIAL_KEYS = {"youngs_modulus", "shear_modulus", "poisson_ratio", "density"}
SECTION_KEYS = {"length", "outer_diameter", "inner_diameter", "material", "elements",
                "added_mass"}
DISK_KEYS = {"at", "name", "mass", "polar_inertia", "transverse_inertia", "inertia_as_given",
             "outer_diameter",
             "inner_diameter", "width", "material"}
BEARING_KEYS = {"at", "name", "role", "speeds", "support", *COEFFICIENT_NAMES}
SUPPORT_KEYS = {"mass", "kx", "ky", "cx", "cy"}
OPERATING_KEYS = {"min_speed", "max_speed", "trip_speed"}
ANALYSIS_KEYS = {"speed_from", "speed_to", "speed_count", "mode_count", "orders", "beam_theory",
                 "margin_rule", "margin_below", "margin_above", "af_threshold",
                 "margin_cap_below", "margin_cap_above", "judge_backward", "judge_share",
                 "overdamped_ratio", "stability_rule", "min_log_dec", "marginal_band"}
UNBALANCE_KEYS = {"description", "residual_multiple", "residual_mass", "weight"}
WEIGHT_KEYS = {"at", "amount", "mass", "radius", "phase"}
PROBE_KEYS = {"at", "angle", "name"}
CLEARANCE_KEYS = {"at", "radial", "name"}
RESPONSE_KEYS = {"speed_from", "speed_to", "speed_count", "check_vibration", "clearance_share",
                 "vibration_limit"}


def read_rotor(path) -> Rotor:
    """Read a rotor description from a TOML file.

    Raises
    ------
    InputError
        With the key path, file and line of the first problem found.
    """
    path = Path(path)
    try:
        if path.is_file() and path.stat().st_size > FILE_LIMIT:
            raise InputError("file", f"is larger than {FILE_LIMIT // 1_000_000} MB",
                             value=str(path), expected="a rotor description of a few kB",
                             file=str(path), kind="size")
        # utf-8-sig: a byte-order mark (some editors write one) is not part of the text
        text = path.read_text(encoding="utf-8-sig")
    except OSError as exc:
        raise InputError("file", f"cannot be read ({exc.strerror})", value=str(path),
                         expected="a readable TOML file", file=str(path), kind="file") from None
    except UnicodeDecodeError:
        raise InputError("file", "is not UTF-8 text", value=str(path), file=str(path),
                         kind="file") from None
    return parse_rotor(text, source=str(path))


def parse_rotor(text: str, source: str = "<text>") -> Rotor:
    """Build a rotor from TOML text; ``source`` names it in error messages."""
    data = load_toml(text, source)
    try:
        return rotor_from_dict(data)
    except InputError as err:
        raise err.with_location(file=source, line=locate(text, err.key)) from None


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


# --- the rotor -------------------------------------------------------------------------

def rotor_from_dict(data: dict) -> Rotor:
    """Build a rotor from a parsed TOML document (a dict)."""
    check_keys(data, TOP_KEYS, "")
    materials = _materials(data.get("materials", {}))
    sections = tuple(_section(t, i, materials) for i, t in enumerate(_array_of_tables(data, "section")))
    if not sections:
        raise InputError("section", "the rotor has no shaft sections",
                         expected="at least one [[section]] table", kind="missing")
    names = _station_names(data.get("stations", {}), len(sections))
    disks = tuple(_disk(t, i, materials, names, len(sections))
                  for i, t in enumerate(_array_of_tables(data, "disk")))
    bearings = tuple(_bearing(t, i, names, len(sections))
                     for i, t in enumerate(_array_of_tables(data, "bearing")))
    if "operating" not in data:
        raise InputError("operating", "is missing",
                         expected="an [operating] table with min_speed and max_speed",
                         kind="missing")
    operating = _operating(data["operating"])
    settings = _settings(data.get("analysis", {}))
    title = _string(data, "title", "", default="rotor")
    probes = tuple(_probe(t, i, names, len(sections))
                   for i, t in enumerate(_array_of_tables(data, "probe")))
    clearances = tuple(_clearance(t, i, names, len(sections))
                       for i, t in enumerate(_array_of_tables(data, "clearance")))
    rotor = Rotor(sections=sections, operating=operating, disks=disks, bearings=bearings,
                  settings=settings, station_names=names, name=title,
                  probes=probes, clearances=clearances,
                  response=_response(data.get("response", {})))
    unbalance = _unbalance_cases(data.get("unbalance", {}), names, len(sections), rotor)
    return dataclasses.replace(rotor, unbalance=unbalance) if unbalance else rotor


def _materials(table):
    if not isinstance(table, dict):
        check_keys(table, set(), "materials")  # raises: must be a table
    out = {}
    for name, entry in table.items():
        where = f"materials.{name}"
        plain_text(name, where)
        check_keys(entry, MATERIAL_KEYS, where)
        e = _quantity(entry, "youngs_modulus", u.PRESSURE, where, required=True)
        rho = _quantity(entry, "density", u.DENSITY, where, required=True)
        if "shear_modulus" in entry and "poisson_ratio" in entry:
            raise InputError(f"{where}.poisson_ratio", "is given together with shear_modulus",
                             expected="one of shear_modulus or poisson_ratio", kind="conflict")
        if "shear_modulus" in entry:
            g = _quantity(entry, "shear_modulus", u.PRESSURE, where)
        else:
            nu = _number(entry, "poisson_ratio", where, 0.3)
            if not -1.0 < nu < 0.5:
                raise InputError(f"{where}.poisson_ratio", "is outside (-1, 0.5)", value=nu,
                                 expected="a Poisson's ratio such as 0.29", kind="range")
            g = e / (2.0 * (1.0 + nu)) if e > 0 else e
        out[name] = Material(name, e, g, rho)
    return out


def _material_ref(table, where, materials):
    name = _string(table, "material", where, required=True)
    if name not in materials:
        near = difflib.get_close_matches(name, sorted(materials), n=1, cutoff=0.5)
        hint = f"did you mean '{near[0]}'?" if near else \
            ("one of " + ", ".join(sorted(materials)) if materials else "a [materials.NAME] table")
        raise InputError(f"{where}.material", "names an unknown material", value=name,
                         expected=hint, kind="unknown-material")
    return materials[name]


def _section(table, i, materials):
    where = f"section[{i}]"
    check_keys(table, SECTION_KEYS, where)
    length = _quantity(table, "length", u.LENGTH, where, required=True)
    outer = _quantity(table, "outer_diameter", u.LENGTH, where, required=True)
    inner = _quantity(table, "inner_diameter", u.LENGTH, where, default=0.0)
    material = _material_ref(table, where, materials)
    default_elements = max(1, math.ceil(length / (2.0 * outer))) if outer > 0 and length > 0 else 1
    elements = _integer(table, "elements", where, default_elements)
    added = _quantity(table, "added_mass", u.MASS, where, default=0.0)
    return Section(length=length, outer_diameter=outer, inner_diameter=inner, material=material,
                   elements=elements, added_mass=added, key=where)


def _station_names(table, n_sections):
    if not isinstance(table, dict):
        check_keys(table, set(), "stations")  # raises: must be a table
    names = {}
    for name, number in table.items():
        if isinstance(number, bool) or not isinstance(number, int):
            raise InputError(f"stations.{name}", "must be a station number", value=number,
                             expected=f"a whole number 0..{n_sections}", kind="type")
        if not 0 <= number <= n_sections:
            raise InputError(f"stations.{name}", "names a station that does not exist",
                             value=number, expected=f"0..{n_sections}", kind="station")
        names[name] = number
    return names


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


def _disk(table, i, materials, names, n_sections):
    where = f"disk[{i}]"
    check_keys(table, DISK_KEYS, where)
    station = _station(table, where, names, n_sections)
    name = _string(table, "name", where, default="")
    geometric = {"outer_diameter", "width", "material"} & set(table)
    direct = {"mass", "polar_inertia", "transverse_inertia"} & set(table)
    if geometric and direct:
        raise InputError(f"{where}.{sorted(direct)[0]}", "is given together with disk geometry",
                         expected="either mass and inertias, or outer_diameter, width and "
                                  "material", kind="conflict")
    if geometric:
        outer = _quantity(table, "outer_diameter", u.LENGTH, where, required=True)
        inner = _quantity(table, "inner_diameter", u.LENGTH, where, default=0.0)
        width = _quantity(table, "width", u.LENGTH, where, required=True)
        material = _material_ref(table, where, materials)
        return Disk.from_geometry(station, outer, inner, width, material.density, name=name,
                                  key=where)
    if "inner_diameter" in table:
        raise InputError(f"{where}.inner_diameter", "needs outer_diameter, width and material",
                         kind="conflict")
    mass = _quantity(table, "mass", u.MASS, where, required=True)
    polar = _quantity(table, "polar_inertia", u.INERTIA, where, default=0.0)
    transverse = _quantity(table, "transverse_inertia", u.INERTIA, where, default=polar / 2.0)
    as_given = table.get("inertia_as_given", False)
    if not isinstance(as_given, bool):
        raise InputError(f"{where}.inertia_as_given", "must be true or false", value=as_given,
                         kind="type")
    return Disk(station, mass, polar, transverse, name=name, key=where, inertia_as_given=as_given)


def _bearing(table, i, names, n_sections):
    where = f"bearing[{i}]"
    table = _renamed_keys(table, "bearing", where)
    check_keys(table, BEARING_KEYS, where)
    station = _station(table, where, names, n_sections)
    name = _string(table, "name", where, default=f"B{i + 1}")
    role = _string(table, "role", where, default=BearingRole.BEARING)
    if role not in tuple(BearingRole):
        raise InputError(f"{where}.role", "is not a known role", value=role,
                         expected=" or ".join(BearingRole), kind="choice")
    speeds = ()
    if "speeds" in table:
        raw = table["speeds"]
        if not isinstance(raw, list) or not raw:
            raise InputError(f"{where}.speeds", "must be a list of speeds", value=_short(raw),
                             expected='e.g. ["1000 rpm", "3000 rpm"]', kind="type")
        speeds = tuple(u.parse(v, u.SPEED, f"{where}.speeds[{j}]") for j, v in enumerate(raw))
    coefficients = {}
    for cname in COEFFICIENT_NAMES:
        if cname not in table:
            continue
        dim = u.STIFFNESS if cname[0] == "k" else u.DAMPING
        raw = table[cname]
        if isinstance(raw, list):
            if not raw:
                raise InputError(f"{where}.{cname}", "is an empty list", kind="length")
            if len(raw) != max(len(speeds), 1):
                raise InputError(f"{where}.{cname}",
                                 f"has {len(raw)} values but speeds has {len(speeds)}",
                                 expected="one value per speed, or a single value (not a list)"
                                 " for a constant", kind="length")
            values = tuple(u.parse(v, dim, f"{where}.{cname}[{j}]") for j, v in enumerate(raw))
        else:
            values = (u.parse(raw, dim, f"{where}.{cname}"),)
        coefficients[cname] = values
    for direct in ("kxx", "kyy"):
        if direct not in coefficients:
            raise InputError(f"{where}.{direct}", "is missing",
                             expected="both direct stiffnesses kxx and kyy (0 is allowed)",
                             kind="missing")
    support = None
    if "support" in table:
        sw = f"{where}.support"
        st = table["support"]
        check_keys(st, SUPPORT_KEYS, sw)
        support = Support(kx=_quantity(st, "kx", u.STIFFNESS, sw, required=True),
                          ky=_quantity(st, "ky", u.STIFFNESS, sw, required=True),
                          mass=_quantity(st, "mass", u.MASS, sw, default=0.0),
                          cx=_quantity(st, "cx", u.DAMPING, sw, default=0.0),
                          cy=_quantity(st, "cy", u.DAMPING, sw, default=0.0), key=sw)
    return Bearing(station=station, coefficients=coefficients, speeds=speeds, name=name,
                   role=role, support=support, key=where)


def _operating(table):
    where = "operating"
    check_keys(table, OPERATING_KEYS, where)
    return OperatingRange(
        min_speed=_quantity(table, "min_speed", u.SPEED, where, required=True),
        max_speed=_quantity(table, "max_speed", u.SPEED, where, required=True),
        trip_speed=_quantity(table, "trip_speed", u.SPEED, where, default=None))


def _settings(table):
    where = "analysis"
    table = _renamed_keys(table, "analysis", where)
    check_keys(table, ANALYSIS_KEYS, where)
    orders = table.get("orders", [1.0])
    if not isinstance(orders, list):
        orders = [orders]
    for j, order in enumerate(orders):
        if isinstance(order, bool) or not isinstance(order, (int, float)):
            raise InputError(f"{where}.orders[{j}]", "must be a number", value=order,
                             expected="excitation orders such as [1, 2]", kind="type")
    judge = table.get("judge_backward", False)
    if not isinstance(judge, bool):
        raise InputError(f"{where}.judge_backward", "must be true or false", value=judge,
                         kind="type")
    rule = MarginRule(name=_string(table, "margin_rule", where, default="af-curve"),
                      margin_below=_number(table, "margin_below", where, 15.0),
                      margin_above=_number(table, "margin_above", where, 15.0),
                      af_threshold=_number(table, "af_threshold", where, 2.5),
                      margin_cap_below=_cap(table, "margin_cap_below", where, 16.0),
                      margin_cap_above=_cap(table, "margin_cap_above", where, 26.0))
    if "judge_backward" in table and "judge_share" in table:
        raise InputError(f"{where}.judge_share", "is given together with judge_backward",
                         expected="one of them (judge_backward = true is judge_share = 0)",
                         kind="conflict")
    kind = _string(table, "stability_rule", where,
                   default="at-least" if "min_log_dec" in table else "positive")
    if "min_log_dec" in table and kind != "at-least":
        raise InputError(f"{where}.min_log_dec", f"has no effect with stability_rule = {kind!r}",
                         expected='stability_rule = "at-least" (or leave min_log_dec out)',
                         kind="conflict")
    stability = StabilityRule(name=kind, min_log_dec=_number(table, "min_log_dec", where, 0.1),
                              marginal_band=_number(table, "marginal_band", where, 1e-3))
    return Settings(speed_from=_quantity(table, "speed_from", u.SPEED, where),
                    speed_to=_quantity(table, "speed_to", u.SPEED, where),
                    speed_count=_integer(table, "speed_count", where, 61),
                    mode_count=_integer(table, "mode_count", where, 8),
                    orders=tuple(float(o) for o in orders),
                    beam_theory=_string(table, "beam_theory", where, default="timoshenko"),
                    margin_rule=rule, judge_backward=judge,
                    judge_share=_number(table, "judge_share", where, 0.25),
                    overdamped_ratio=_number(table, "overdamped_ratio", where, 0.45),
                    stability_rule=stability)


def _renamed_keys(table, section, where):
    """The table with the old spellings of its keys (:data:`~rotorcalc.vocabulary.RENAMED_KEYS`)
    replaced by the new ones, each with a :class:`~rotorcalc.vocabulary.RenamedWarning`."""
    if not isinstance(table, dict):
        return table
    out = dict(table)
    for (part, old), new in RENAMED_KEYS.items():
        if part != section or old not in out:
            continue
        if new in out:
            raise InputError(f"{where}.{old}", f"is given together with {new}",
                             expected=f"only {new} ({old} is its old spelling)", kind="conflict")
        renamed(f"{where}.{old}", f"{where}.{new}")
        out[new] = out.pop(old)
    return out


def _cap(table, key, where, default):
    """A margin cap in per cent; the text "none" lifts it."""
    if table.get(key) == "none":
        return math.inf
    return _number(table, key, where, default)


# --- forced response ---------------------------------------------------------------------

def _unbalance_cases(table, names, n_sections, rotor):
    if not isinstance(table, dict):
        check_keys(table, set(), "unbalance")  # raises: must be a table
    cases = []
    for case_name, entry in table.items():
        where = f"unbalance.{case_name}"
        plain_text(case_name, where)
        check_keys(entry, UNBALANCE_KEYS, where)
        multiple = _number(entry, "residual_multiple", where, standards.RESIDUAL_MULTIPLE)
        if multiple <= 0:
            raise InputError(f"{where}.residual_multiple", "must be positive", value=multiple,
                             kind="range")
        carried = _quantity(entry, "residual_mass", u.MASS, where, default=None)
        if carried is not None and carried <= 0:
            raise InputError(f"{where}.residual_mass", "must be positive", value=carried,
                             kind="range")
        weights = []
        for j, w in enumerate(_array_of_tables(entry, "weight", where)):
            wk = f"{where}.weight[{j}]"
            check_keys(w, WEIGHT_KEYS, wk)
            station = _station(w, wk, names, n_sections)

            basis = []

            def residual(station=station, wk=wk, basis=basis):
                if "residual_multiple" not in entry:
                    warnings.warn(f'{where}: amount = "residual" without residual_multiple is '
                                  f"read as {multiple:g} x the residual amount (the common-"
                                  "practice multiple) until version "
                                  f"{OLD_SPELLINGS_UNTIL}, and refused after it: state "
                                  f"residual_multiple = {multiple:g} in [{where}]",
                                  RenamedWarning, stacklevel=2)
                mass, what = (standards.residual_weight(rotor, station) if carried is None
                              else (carried, "residual_mass of the case"))
                basis.append(f"{multiple:g} x residual, W = {mass:.4g} kg: {what}")
                if not mass > 0:
                    raise InputError(f"{wk}.amount", "cannot be the residual amount: the "
                                     "journal nearer the weight carries no static load "
                                     f"({mass:.3g} kg; the overhang lifts it)",
                                     value="residual", expected="an amount such as \"12 g*mm\","
                                     " or residual_mass for the case", kind="range")
                return multiple * standards.residual_unbalance(mass, rotor.operating.max_speed)

            amount = _unbalance_amount(w, wk, residual)
            phase = _angle(w, "phase", wk)
            weights.append(UnbalanceWeight(station, amount, phase, key=wk,
                                           basis=basis[0] if basis else ""))
        cases.append(UnbalanceCase(case_name, tuple(weights),
                                   _string(entry, "description", where, default=""), key=where))
    return tuple(cases)


def _angle(table, key, where):
    """An angle with a unit; a bare number other than 0 is refused (90 would be radians)."""
    value = table.get(key, 0.0)
    number = None
    if isinstance(value, (int, float)) and not isinstance(value, bool):
        number = float(value)
    elif isinstance(value, str):
        try:
            number = float(value.strip())   # a number written as text has no unit either
        except ValueError:
            pass
    if number is not None and number != 0 and math.isfinite(number):
        raise InputError(_path(where, key), "needs a unit", value=value,
                         expected=f'an angle such as "{number:g} deg" or "{number:g} rad"',
                         kind="unit")
    return u.parse(value, u.ANGLE, _path(where, key))


def _unbalance_amount(w, where, residual):
    """An explicit amount, mass times radius, or "residual" (the common-practice amount,
    from ``residual()``, computed only when asked for)."""
    given = {"amount", "mass", "radius"} & set(w)
    if "amount" in given and len(given) > 1:
        raise InputError(f"{where}.amount", "is given together with mass and radius",
                         expected="either amount, or mass and radius", kind="conflict")
    if "amount" in w:
        if isinstance(w["amount"], str) and w["amount"].strip().lower() == "residual":
            return residual()
        return u.parse(w["amount"], u.UNBALANCE, f"{where}.amount")
    if not given:
        raise InputError(f"{where}.amount", "is missing",
                         expected='an amount ("12 g*mm", "residual"), or mass and radius',
                         kind="missing")
    mass = _quantity(w, "mass", u.MASS, where, required=True)
    radius = _quantity(w, "radius", u.LENGTH, where, required=True)
    return mass * radius


def _probe(table, i, names, n_sections):
    where = f"probe[{i}]"
    check_keys(table, PROBE_KEYS, where)
    station = _station(table, where, names, n_sections)
    angle = _angle(table, "angle", where)
    return Probe(station, angle, _string(table, "name", where, default=f"P{i + 1}"), key=where)


def _clearance(table, i, names, n_sections):
    where = f"clearance[{i}]"
    check_keys(table, CLEARANCE_KEYS, where)
    station = _station(table, where, names, n_sections)
    radial = _quantity(table, "radial", u.LENGTH, where, required=True)
    return Clearance(station, radial, _string(table, "name", where, default=f"C{i + 1}"),
                     key=where)


def _response(table):
    where = "response"
    check_keys(table, RESPONSE_KEYS, where)
    check = table.get("check_vibration", True)
    if not isinstance(check, bool):
        raise InputError(f"{where}.check_vibration", "must be true or false", value=check,
                         kind="type")
    return ResponseSettings(speed_from=_quantity(table, "speed_from", u.SPEED, where),
                            speed_to=_quantity(table, "speed_to", u.SPEED, where),
                            speed_count=_integer(table, "speed_count", where, 201),
                            check_vibration=check,
                            clearance_share=_number(table, "clearance_share", where,
                                                    standards.CLEARANCE_SHARE),
                            vibration_limit=_quantity(table, "vibration_limit", u.LENGTH, where))


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
