"""A bearing given by its geometry: the ``[bearing.film]`` and ``[bearing.oil]`` tables of a
rotor file (docs/input.md, "Bearings from their geometry")."""

from __future__ import annotations

import math

from . import units as u
from ._toml import _array_of_tables, _number, _quantity, _string, check_keys
from ._read_response import _angle
from .errors import InputError

FILM_KEYS = {"bore", "diameter", "length", "clearance", "preload", "groove_width", "grooves",
             "feed_pressure", "grid", "cavitation", "clearance_range", "preload_range"}
#: Keys of a tilting-pad bearing's [bearing.film] besides the size, clearance and preload.
PAD_KEYS = {"pads", "pad_arc", "pivot_offset", "load", "pivot_stiffness", "pad_mass",
            "pad_inertia", "pad_thickness", "carry_over"}
#: Where the static load points against the pads (the load along -y, gravity's default).
PAD_LOADS = ("between-pads", "on-pad")
GROOVE_KEYS = {"at", "width"}
OIL_KEYS = {"grade", "points", "inlet_temperature", "film_temperature", "rise_share",
            "density", "specific_heat", "name", "inlet_temperature_range"}


def read_film(table, where):
    """The :class:`FilmJournal` of a ``[[bearing]]`` table with a ``film`` sub-table."""
    # the film models are loaded for a film bearing only (a table-bearing rotor's commands
    # start about 0.017 s sooner: docs/performance.md, "seventh pass")
    from .bearings.journal import BORES, MODEL_GRID, FilmJournal
    from .bearings.pad_journal import PAD_GRID
    fw, ow = f"{where}.film", f"{where}.oil"
    film = table["film"]
    if not isinstance(film, dict):
        raise InputError(fw, "must be a table", value=film, expected="a [bearing.film] table "
                         "with bore, diameter, length and clearance", kind="type")
    check_keys(film, FILM_KEYS | PAD_KEYS, fw)
    if "oil" not in table:
        raise InputError(ow, "is missing", expected="a [bearing.oil] table with the oil's "
                         "grade (or two viscosity points) and its inlet_temperature",
                         kind="missing")
    oil = table["oil"]
    if not isinstance(oil, dict):
        raise InputError(ow, "must be a table", value=oil, kind="type")
    check_keys(oil, OIL_KEYS, ow)
    bore = _string(film, "bore", fw, default="plain")
    if bore not in BORES + ("tilting-pad",):
        raise InputError(f"{fw}.bore", "is not a known bore", value=bore,
                         expected=" or ".join(BORES + ("tilting-pad",)), kind="choice")
    pad_keys = sorted(PAD_KEYS & set(film))
    if bore != "tilting-pad" and pad_keys:
        raise InputError(f"{fw}.{pad_keys[0]}", f"is given for a {bore} bore",
                         expected="bore = 'tilting-pad' for pads", kind="choice")
    values = {"bore": bore, "key": fw, "oil_key": ow}
    for name in ("diameter", "length", "clearance"):
        values[name] = _quantity(film, name, u.LENGTH, fw, required=True)
    if "preload" in film:
        values["preload"] = _number(film, "preload", fw, 0.0)
    if "groove_width" in film:
        if bore == "plain":
            raise InputError(f"{fw}.groove_width", "is given for a plain bore",
                             expected="grooves = [{at = ..., width = ...}] for a plain bore's "
                                      "feed grooves", kind="choice")
        values["groove_width"] = _angle(film, "groove_width", fw)
    grooves = []
    for i, g in enumerate(_array_of_tables(film, "grooves", fw)):
        gw = f"{fw}.grooves[{i}]"
        check_keys(g, GROOVE_KEYS, gw)
        for key in ("at", "width"):
            if key not in g:
                raise InputError(f"{gw}.{key}", "is missing", expected='an angle such as '
                                 '"30 deg"', kind="missing")
        grooves.append((_angle(g, "at", gw), _angle(g, "width", gw)))
    values["grooves"] = tuple(grooves)
    values["feed_pressure"] = _quantity(film, "feed_pressure", u.GAUGE_PRESSURE, fw, default=0.0)
    values["options"] = _options(film, fw, PAD_GRID if bore == "tilting-pad" else MODEL_GRID)
    values["lubricant"] = _lubricant(oil, ow)
    values["inlet_temperature"] = _quantity(oil, "inlet_temperature", u.TEMPERATURE, ow,
                                            required=True)
    values["film_temperature"] = _quantity(oil, "film_temperature", u.TEMPERATURE, ow)
    if "rise_share" in oil:
        values["rise_share"] = _number(oil, "rise_share", ow, 0.8)
    values["clearance_range"] = _pair(film, "clearance_range", fw, u.LENGTH)
    values["preload_range"] = _pair(film, "preload_range", fw, None)
    values["inlet_range"] = _pair(oil, "inlet_temperature_range", ow, u.TEMPERATURE)
    for field, nominal, key in (("clearance_range", "clearance", f"{fw}.clearance_range"),
                                ("preload_range", "preload", f"{fw}.preload_range"),
                                ("inlet_range", "inlet_temperature",
                                 f"{ow}.inlet_temperature_range")):
        value = values.get(nominal, 0.0)
        if len(values[field]) == 2 and not min(values[field]) <= value <= max(values[field]):
            raise InputError(key, "does not hold the nominal value", value=values[field],
                             expected=f"a range around the nominal {nominal} ({value:.6g} "
                                      "SI)", kind="range")
    if bore == "tilting-pad":
        return _pads(film, fw, values)
    return FilmJournal(**values)


def _pads(film, fw, values):
    """A :class:`PadJournal` from the common values and the pad keys."""
    from .bearings.pad_journal import PadJournal
    from .bearings.pad_ring import PadRing, first_pivot_angle
    for name in ("grooves", "groove_width", "feed_pressure"):
        if name in film:
            raise InputError(f"{fw}.{name}", "is given for a tilting-pad bearing",
                             expected="pads, pad_arc, pivot_offset, load (the oil reaches "
                                      "the pads between them)", kind="choice")
    for name in ("pads", "pad_arc"):
        if name not in film:
            raise InputError(f"{fw}.{name}", "is missing", expected="the number of pads and "
                             'the arc of each (pads = 5, pad_arc = "60 deg")', kind="missing")
    count = film["pads"]
    if isinstance(count, bool) or not isinstance(count, int):
        raise InputError(f"{fw}.pads", "must be a whole number", value=count,
                         expected="the number of pads, 3 to 16", kind="type")
    load = _string(film, "load", fw, default="between-pads")
    if load not in PAD_LOADS:
        raise InputError(f"{fw}.load", "is not a known load placement", value=load,
                         expected=" or ".join(PAD_LOADS) + " (the load along -y)",
                         kind="choice")
    ring = {"count": count, "arc": _angle(film, "pad_arc", fw),
            "first_pivot": first_pivot_angle(count, between=load == "between-pads")
            if 3 <= count <= 16 else -math.pi / 2.0,
            "pivot_offset": _number(film, "pivot_offset", fw, 0.5),
            "pivot_stiffness": _quantity(film, "pivot_stiffness", u.STIFFNESS, fw),
            "pad_mass": _quantity(film, "pad_mass", u.MASS, fw, default=0.0),
            "pad_inertia": _quantity(film, "pad_inertia", u.INERTIA, fw, default=0.0),
            "pad_thickness": _quantity(film, "pad_thickness", u.LENGTH, fw, default=0.0)}
    pads = PadRing(values["diameter"], values["length"], clearance=values["clearance"],
                   preload=values.get("preload", 0.0), key=fw, **ring)
    values["carry_over"] = _number(film, "carry_over", fw, 0.0)
    keep = ("lubricant", "inlet_temperature", "film_temperature", "rise_share", "options",
            "oil_key", "clearance_range", "preload_range", "inlet_range", "key", "carry_over")
    return PadJournal(pads, **{k: values[k] for k in keep if k in values})


def _pair(table, key, where, dim):
    """A tolerance range ``[low, high]`` (quantities of ``dim``, or plain numbers), or ()."""
    if key not in table:
        return ()
    raw = table[key]
    if not (isinstance(raw, list) and len(raw) == 2):
        raise InputError(f"{where}.{key}", "must be two values, low and high", value=raw,
                         expected='[low, high], e.g. ["100 um", "125 um"]', kind="type")
    if dim is None:
        for i, v in enumerate(raw):
            if isinstance(v, bool) or not isinstance(v, (int, float)) or not math.isfinite(v):
                raise InputError(f"{where}.{key}[{i}]", "must be a number", value=v,
                                 expected="a plain number such as 0.4", kind="type")
        return tuple(float(v) for v in raw)
    return tuple(u.parse(v, dim, f"{where}.{key}[{i}]") for i, v in enumerate(raw))


def _options(film, where, default):
    from .bearings.film import CAVITATION_MODELS, FilmOptions
    from .bearings.journal import MODEL_GRID
    grid = film.get("grid", [default.n_theta, default.n_z])
    if not (isinstance(grid, list) and len(grid) == 2):
        raise InputError(f"{where}.grid", "must be two whole numbers", value=grid,
                         expected="[steps along each land or pad, steps over half the "
                                  f"length], e.g. [{default.n_theta}, {default.n_z}]",
                         kind="type")
    cavitation = _string(film, "cavitation", where, default=MODEL_GRID.cavitation)
    if cavitation not in CAVITATION_MODELS:
        raise InputError(f"{where}.cavitation", "is not a known cavitation model",
                         value=cavitation, expected=" or ".join(CAVITATION_MODELS),
                         kind="choice")
    return FilmOptions(n_theta=grid[0], n_z=grid[1], cavitation=cavitation,
                       key=f"{where}.grid")


def _lubricant(oil, where):
    from .bearings.lubricant import Lubricant
    extra = {"key": where, "name": _string(oil, "name", where, default="")}
    if "density" in oil:
        extra["reference_density"] = _quantity(oil, "density", u.DENSITY, where)
    if "specific_heat" in oil:
        extra["specific_heat"] = _number(oil, "specific_heat", where, 2000.0)
    if "points" in oil:
        points = oil["points"]
        if not (isinstance(points, list) and len(points) == 2
                and all(isinstance(p, list) and len(p) == 2 for p in points)):
            raise InputError(f"{where}.points", "must be two [temperature, viscosity] pairs",
                             value=points, expected='[["40 degC", "46 mm^2/s"], '
                             '["100 degC", "6.8 mm^2/s"]]', kind="type")
        extra["points"] = tuple(
            (u.parse(t, u.TEMPERATURE, f"{where}.points[{i}][0]"),
             u.parse(nu, u.KINEMATIC_VISCOSITY, f"{where}.points[{i}][1]"))
            for i, (t, nu) in enumerate(points))
        if "grade" in oil:
            raise InputError(f"{where}.points", "is given together with a grade",
                             expected="either grade or points", kind="conflict")
        return Lubricant(**extra)
    return Lubricant(grade=oil.get("grade"), **extra)
