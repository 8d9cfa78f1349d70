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
from pathlib import Path

from . import standards
from . import units as u
from ._read_film import read_film
from ._read_statics import read_statics
from .bearings.tabulate import tabulate_films
from ._read_response import (CLEARANCE_KEYS, PROBE_KEYS, RESPONSE_KEYS,  # noqa: F401
                             UNBALANCE_KEYS, WEIGHT_KEYS, _clearance, _probe, _response,
                             _unbalance_cases)
from ._toml import (FILE_LIMIT, LONG_TEXT, NAME_LENGTH, _array_of_tables,  # noqa: F401
                    _integer, _number, _quantity, _short, _station, _string,
                    check_keys, load_toml, locate, plain_text)
from .errors import InputError
from .model import (COEFFICIENT_NAMES, Bearing, CouplingRule, Disk, MarginRule, Material,
                    OperatingRange,
                    Rotor, Section, Settings, StabilityRule, Support)
from .vocabulary import RENAMED_KEYS, BearingRole, renamed

TOP_KEYS = {"title", "stations", "materials", "section", "disk", "bearing", "cross_coupling",
            "coupling_screen", "operating", "statics", "static_load",
            "analysis", "unbalance", "probe", "clearance", "response"}
MATERIAL_KEYS = {"youngs_modulus", "shear_modulus", "poisson_ratio", "density"}
SECTION_KEYS = {"length", "outer_diameter", "inner_diameter", "material", "elements",
                "added_mass"}
DISK_KEYS = {"at", "name", "mass", "polar_inertia", "transverse_inertia", "inertia_as_given",
             "outer_diameter",
             "inner_diameter", "width", "material"}
BEARING_KEYS = {"at", "name", "role", "speeds", "whirl_frequencies", "support", "film", "oil",
                *COEFFICIENT_NAMES}
SUPPORT_KEYS = {"mass", "kx", "ky", "cx", "cy"}
OPERATING_KEYS = {"min_speed", "max_speed", "trip_speed"}
ANALYSIS_KEYS = {"speed_from", "speed_to", "speed_count", "mode_count", "orders", "beam_theory",
                 "margin_rule", "margin_below", "margin_above", "af_threshold",
                 "margin_cap_below", "margin_cap_above", "judge_backward", "judge_share",
                 "overdamped_ratio", "stability_rule", "min_log_dec", "marginal_band"}


def read_input_text(path, what="a TOML input file of a few kB") -> str:
    """The text of an input file (a rotor, variants or study file), or an InputError: a
    file that cannot be read, is over :data:`FILE_LIMIT` or is not UTF-8 text."""
    path = Path(path)
    try:
        if path.is_file() and path.stat().st_size > FILE_LIMIT:
            raise InputError("file", f"is larger than {FILE_LIMIT // 1_000_000} MB",
                             value=str(path), expected=what, file=str(path), kind="size")
        # utf-8-sig: a byte-order mark (some editors write one) is not part of the text
        return path.read_text(encoding="utf-8-sig")
    except OSError as exc:
        raise InputError("file", f"cannot be read ({exc.strerror})", value=str(path),
                         expected="a readable TOML file", file=str(path), kind="file") from None
    except UnicodeDecodeError:
        raise InputError("file", "is not UTF-8 text", value=str(path), file=str(path),
                         kind="file") from None


def read_rotor(path) -> Rotor:
    """Read a rotor description from a TOML file.

    Raises
    ------
    InputError
        With the key path, file and line of the first problem found.
    """
    path = Path(path)
    text = read_input_text(path, "a rotor description of a few kB")
    return parse_rotor(text, source=str(path))


def parse_rotor(text: str, source: str = "<text>") -> Rotor:
    """Build a rotor from TOML text; ``source`` names it in error messages."""
    data = load_toml(text, source)
    try:
        return rotor_from_dict(data)
    except InputError as err:
        raise err.with_location(file=source, line=locate(text, err.key)) from None


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
    sources = tuple(_source(t, i, names, len(sections), operating)
                    for i, t in enumerate(_array_of_tables(data, "cross_coupling")))
    gravity, static_loads = read_statics(data, names, len(sections))
    rotor = Rotor(sections=sections, operating=operating, disks=disks, bearings=bearings,
                  sources=sources, coupling_rule=_coupling_rule(data.get("coupling_screen")),
                  gravity=gravity, static_loads=static_loads,
                  settings=settings, station_names=names, name=title,
                  probes=probes, clearances=clearances,
                  response=_response(data.get("response", {})))
    rotor = tabulate_films(rotor)
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
    film = None
    if "film" in table:
        given = sorted(set(table) & {"speeds", "whirl_frequencies", *COEFFICIENT_NAMES})
        if given:
            raise InputError(f"{where}.{given[0]}", "is given for a bearing computed from its "
                             "geometry", expected="either coefficient tables or a "
                             "[bearing.film] table, not both", kind="conflict")
        if role != BearingRole.BEARING:
            raise InputError(f"{where}.role", "is not a journal bearing, but has a film",
                             value=role, expected="role 'bearing' (or no role) for a film "
                             "computed from its geometry", kind="choice")
        film = read_film(table, where)
        speeds, whirl, coefficients = (), (), {}
    elif "oil" in table:
        raise InputError(f"{where}.oil", "is given without a film", expected="a "
                         "[bearing.film] table beside the oil (or no oil for a table "
                         "bearing)", kind="missing")
    else:
        speeds, whirl, coefficients = _coefficient_tables(table, where)
    for direct in () if film else ("kxx", "kyy"):
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
                   role=role, support=support, key=where, whirl=whirl, film=film)


def _coefficient_tables(table, where):
    """(speeds, whirl frequencies, {name: values}) of a bearing's or a source's
    coefficients: each a constant, a list with one value per speed, or (with
    ``whirl_frequencies``) a list of rows, one per speed, of one value per whirl frequency."""
    speeds = _axis(table, "speeds", where, '["1000 rpm", "3000 rpm"]')
    whirl = _axis(table, "whirl_frequencies", where, '["20 Hz", "100 Hz", "200 Hz"]')
    coefficients = {}
    for cname in COEFFICIENT_NAMES:
        if cname not in table:
            continue
        dim = u.STIFFNESS if cname[0] == "k" else u.DAMPING
        raw = table[cname]
        key = f"{where}.{cname}"
        if isinstance(raw, list) and raw and all(isinstance(r, list) for r in raw):
            if not whirl:
                raise InputError(key, "is a table of rows but there are no whirl frequencies",
                                 expected="whirl_frequencies = [...] with one value per row "
                                 "entry, or one value per speed", kind="length")
            _table_length(key, raw, speeds, "row per speed (one row when there are no speeds)")
            values = tuple(_row(f"{key}[{i}]", row, whirl, dim) for i, row in enumerate(raw))
        elif isinstance(raw, list):
            _table_length(key, raw, speeds, "value per speed, or a single value (not a list) "
                          "for a constant")
            values = tuple(u.parse(v, dim, f"{key}[{j}]") for j, v in enumerate(raw))
        else:
            values = (u.parse(raw, dim, key),)
        coefficients[cname] = values
    return speeds, whirl, coefficients


def _axis(table, name, where, example):
    if name not in table:
        return ()
    raw = table[name]
    if not isinstance(raw, list) or not raw:
        what = "speeds" if name == "speeds" else "frequencies"
        raise InputError(f"{where}.{name}", f"must be a list of {what}", value=_short(raw),
                         expected=f"e.g. {example}", kind="type")
    return tuple(u.parse(v, u.SPEED, f"{where}.{name}[{j}]") for j, v in enumerate(raw))


def _table_length(key, raw, speeds, what):
    if not raw:
        raise InputError(key, "is an empty list", kind="length")
    if len(raw) != max(len(speeds), 1):
        raise InputError(key, f"has {len(raw)} {'rows' if isinstance(raw[0], list) else 'values'}"
                         f" but speeds has {len(speeds)}", expected=f"one {what}", kind="length")


def _row(key, row, whirl, dim):
    if len(row) != len(whirl):
        raise InputError(key, f"has {len(row)} values but whirl_frequencies has {len(whirl)}",
                         expected="one value per whirl frequency", kind="length")
    return tuple(u.parse(v, dim, f"{key}[{j}]") for j, v in enumerate(row))


#: Keys of a [[cross_coupling]] table: a destabilising source.
SOURCE_KEYS = {"at", "name", "speeds", "whirl_frequencies", "q", "stage", *COEFFICIENT_NAMES}
STAGE_KEYS = {"power", "impeller_diameter", "passage_width", "density_ratio",
              "molecular_weight", "form"}


def _source(table, i, names, n_sections, operating):
    """A [[cross_coupling]] table: coefficients (``q`` for kxy = q, kyx = -q), or a
    ``stage`` whose expected aerodynamic cross-coupling is estimated at the maximum
    continuous speed (:func:`rotorcalc.standards.stage_cross_coupling`)."""
    where = f"cross_coupling[{i}]"
    check_keys(table, SOURCE_KEYS, where)
    station = _station(table, where, names, n_sections)
    name = _string(table, "name", where, default=f"Q{i + 1}")
    given = [k for k in ("q", "stage") if k in table]
    if len(given) > 1 or (given and set(COEFFICIENT_NAMES) & set(table)):
        raise InputError(f"{where}.{given[0]}", "is given together with other coefficients",
                         expected="one of: q, a stage estimate, or kxx..cyy", kind="conflict")
    if "stage" in table:
        q = _stage_estimate(table["stage"], f"{where}.stage", operating)
        coefficients, speeds, whirl = {"kxy": (q,), "kyx": (-q,)}, (), ()
    elif "q" in table:
        q = _quantity(table, "q", u.STIFFNESS, where, required=True)
        coefficients, speeds, whirl = {"kxy": (q,), "kyx": (-q,)}, (), ()
    else:
        speeds, whirl, coefficients = _coefficient_tables(table, where)
        if not coefficients:
            raise InputError(f"{where}.q", "is missing", expected='q = "2e6 N/m", a stage '
                             "table, or coefficients kxy, kyx, ...", kind="missing")
    return Bearing(station=station, coefficients=coefficients, speeds=speeds, name=name,
                   role=BearingRole.SOURCE, key=where, whirl=whirl)


def _stage_estimate(table, where, operating):
    if not isinstance(table, dict):
        check_keys(table, set(), where)  # raises: must be a table
    check_keys(table, STAGE_KEYS, where)
    form = _string(table, "form", where, default="standard")
    mw = _number(table, "molecular_weight", where, None) if "molecular_weight" in table \
        else None
    try:
        return standards.stage_cross_coupling(
            _quantity(table, "power", u.POWER, where, required=True), operating.max_speed,
            _quantity(table, "impeller_diameter", u.LENGTH, where, required=True),
            _quantity(table, "passage_width", u.LENGTH, where, required=True),
            _number(table, "density_ratio", where, None), molecular_weight=mw, form=form)
    except InputError as err:
        raise InputError(err.key.replace("stage.", f"{where}."), err.problem, value=err.value,
                         expected=err.expected, kind=err.kind) from None


COUPLING_KEYS = {"placement", "top_ratio", "min_log_dec", "min_ratio", "min_log_dec_sources",
                 "expected", "in_check", "coefficients_at"}


def _coupling_rule(table):
    """The [coupling_screen] table, or None when the file has none."""
    if table is None:
        return None
    where = "coupling_screen"
    check_keys(table, COUPLING_KEYS, where)
    in_check = table.get("in_check", True)
    if not isinstance(in_check, bool):
        raise InputError(f"{where}.in_check", "must be true or false", value=in_check,
                         kind="type")
    return CouplingRule(placement=_string(table, "placement", where, default="sources"),
                        top_ratio=_number(table, "top_ratio", where, 10.0),
                        min_log_dec=_number(table, "min_log_dec", where, 0.1),
                        min_ratio=_number(table, "min_ratio", where, 2.0),
                        min_log_dec_sources=_number(table, "min_log_dec_sources", where, 0.1),
                        expected=_quantity(table, "expected", u.STIFFNESS, where),
                        in_check=in_check,
                        coefficients_at=_string(table, "coefficients_at", where,
                                                default="synchronous"))


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


