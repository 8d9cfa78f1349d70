"""``rotorcalc stiffness-map``: critical speeds against an isotropic support stiffness, with
the crossings of the bearings' own stiffness curves."""

from __future__ import annotations

import math
import time
from pathlib import Path
from typing import Optional

import numpy as np
import typer
from rich.markup import escape

from .. import units as u
from ..analysis.margins import CAUTION
from ..errors import InputError
from ..tables import MAP_SHAPE_COLUMNS, crossing_columns, map_end_columns
from ..units import to_rpm
from .common import (console, fail_input, input_errors, load, print_table, save_figure,
                     write_outputs)
from .whatif_common import (bearing_target, busy, check_outputs, command_help, heading,
                            plotting_function)
from .window import run_window

MAP_EXAMPLE = ('[bold]Example[/]: rotorcalc stiffness-map cases/compressor.toml --from "1e7 N/m" '
               '--to "1e10 N/m" --plot csmap.png --window --shapes "1e8 N/m:1,1e9 N/m:2"')


def quantity_option(text, dim, option, example):
    """A quantity from the command line; a unit is required so a bare number is never misread."""
    with input_errors():
        stripped = text.strip()
        try:
            float(stripped)
        except ValueError:
            return u.parse(stripped, dim, option)
        raise InputError(option, "needs a unit", value=text, expected=example, kind="unit")


def stiffness_option(text, option):
    return quantity_option(text, u.STIFFNESS, option, 'a stiffness such as "1e8 N/m" or '
                                                      '"570 klbf/in"')


def reference_stiffness(rotor, target):
    """Geometric mean of the direct stiffness (kxx, kyy) of the target bearings at the maximum
    continuous speed, N/m: the map stiffness that a factor of 1 stands for."""
    at = rotor.operating.max_speed
    if target is None:
        chosen = [b for b in rotor.bearings if b.kind != "seal"] or list(rotor.bearings)
    elif target.startswith("bearing["):
        chosen = [rotor.bearings[int(target[8:-1])]]
    else:
        chosen = [b for b in rotor.bearings if b.name == target[len("bearing."):]]
    values = []
    for b in chosen:
        k = b.matrices(at)[0]
        values += [k[0, 0], k[1, 1]]
    values = [v for v in values if v > 0]
    return float(np.exp(np.mean(np.log(values)))) if values else None


def held_notes(rotor, crossings):
    """Crossings that lie outside a bearing's coefficient table (its end value held)."""
    notes = []
    by_name = {b.name or f"B{i + 1}": b for i, b in enumerate(rotor.bearings)}
    for name in dict.fromkeys(c.bearing for c in crossings):
        b = by_name.get(name)
        outside = [c for c in crossings if c.bearing == name and b is not None
                   and b.outside_table(c.speed)]
        if outside:
            notes.append(f"{name}: the crossing{'s' if len(outside) > 1 else ''} at "
                         + ", ".join(f"{to_rpm(c.speed):.0f}" for c in outside)
                         + f" rpm lie{'' if len(outside) > 1 else 's'} outside its table "
                           f"({to_rpm(b.speeds[0]):.0f}-{to_rpm(b.speeds[-1]):.0f} rpm): "
                           "the end value is held there")
    return notes


def parse_shapes(text, n_modes):
    """``"1e8 N/m:1, 1e9 N/m:2"`` -> [(stiffness N/m, mode index 0-based)]."""
    points = []
    for item in (p.strip() for p in text.split(",")):
        if not item:
            continue
        k_text, sep, mode_text = item.rpartition(":")
        try:
            mode = int(mode_text)
        except ValueError:
            mode = 0
        if not sep or mode < 1:
            fail_input(InputError("--shapes", "needs STIFFNESS:MODE items", value=item,
                                  expected='e.g. "1e8 N/m:1, 1e9 N/m:2" (map modes from 1)',
                                  kind="syntax"))
        if mode > n_modes:
            fail_input(InputError("--shapes", f"asks for map mode {mode}, but the map has "
                                  f"{n_modes}", value=item, expected="a mode 1.."
                                  f"{n_modes}, or more --modes", kind="range"))
        points.append((stiffness_option(k_text, "--shapes"), mode - 1))
    if not points:
        fail_input(InputError("--shapes", "is empty", value=text,
                              expected='e.g. "1e8 N/m:1, 1e9 N/m:2"', kind="missing"))
    return points


def default_range(rotor, points):
    """The map's default range (two decades either side of the bearings' mean direct
    stiffness over the sweep, as :func:`~rotorcalc.analysis.csmap.critical_speed_map` takes
    it) with ``points`` values."""
    from ..analysis.csmap import CURVE_POINTS, bearing_curves
    from ..analysis.sweep import default_speeds
    sweep_speeds = default_speeds(rotor)
    curves = bearing_curves(rotor, np.linspace(sweep_speeds[0], sweep_speeds[-1], CURVE_POINTS))
    mean = np.exp(np.mean([np.log(np.maximum(c.stiffness, 1.0)) for c in curves])) \
        if curves else 1e8
    return np.logspace(np.log10(mean) - 2, np.log10(mean) + 2, points)


def shapes_file(plot, shapes_plot):
    if shapes_plot is not None or plot is None:
        return shapes_plot
    return plot.with_name(f"{plot.stem}-shapes{plot.suffix}")


def command(
    case: Path = typer.Argument(..., help="Rotor description (TOML)."),
    k_from: Optional[str] = typer.Option(
        None, "--from", help='Softest support stiffness, with a unit, e.g. "1e7 N/m" '
                             '(default: 1/100 of the bearings\' mean direct stiffness).'),
    k_to: Optional[str] = typer.Option(
        None, "--to", help='Stiffest support stiffness, e.g. "1e10 N/m" (default: 100 times '
                           'the mean).'),
    points: Optional[int] = typer.Option(None, "--points", min=3, max=400,
                                         help="Number of stiffness values, log-spaced "
                                              "(default 41)."),
    n_modes: int = typer.Option(4, "--modes", min=1, max=20,
                                help="Number of critical-speed curves."),
    whirl: str = typer.Option("forward", "--whirl",
                              help="Whirl of the map curves: forward or backward."),
    curves_to: Optional[str] = typer.Option(
        None, "--curves-to", help='Draw the bearing curves up to this speed, e.g. "6000 rpm" '
                                  '(default: the top of the analysis sweep).'),
    plot: Optional[Path] = typer.Option(None, "--plot",
                                        help="Write the map picture (.png/.svg/.pdf)."),
    window: bool = typer.Option(False, "--window",
                                help="Also find the stiffness window over the map's range and "
                                     "shade it (screens the rotor some 20-35 times)."),
    bearing: Optional[str] = typer.Option(
        None, "--bearing", help="Window for this bearing only (name); default all together."),
    shapes: Optional[str] = typer.Option(
        None, "--shapes", help='Mode shapes at map points, STIFFNESS:MODE items, e.g. '
                               '"1e8 N/m:1, 1e9 N/m:2".'),
    shapes_plot: Optional[Path] = typer.Option(
        None, "--shapes-plot", help="Picture of the --shapes (default: next to --plot, "
                                    "'-shapes' added to its name)."),
    json_path: Optional[Path] = typer.Option(None, "--json",
                                             help="Write the map, curves and crossings as JSON."),
    csv_path: Optional[Path] = typer.Option(None, "--csv", help="Write the crossings as CSV."),
):
    """Critical-speed map: undamped synchronous critical speeds against an isotropic bearing
    stiffness (gyroscopic effect included), and where the bearings' own stiffness curves cross
    them: the critical speeds the real bearings give."""
    rotor = load(case)
    if whirl not in ("forward", "backward"):
        fail_input(InputError("--whirl", "must be forward or backward", value=whirl,
                              kind="choice"))
    shapes_path = shapes_file(plot, shapes_plot) if shapes else None
    check_outputs(case, {"--plot": plot, "--shapes-plot": shapes_path, "--json": json_path,
                         "--csv": csv_path})
    if bearing is not None and not window:
        fail_input(InputError("--bearing", "only chooses the target of --window", value=bearing,
                              expected="--window as well", kind="option"))
    target, target_text = bearing_target(rotor, bearing)
    points_k = parse_shapes(shapes, n_modes) if shapes else []
    stiffness = None
    if k_from is not None or k_to is not None:
        if k_from is None or k_to is None:
            fail_input(InputError("--from" if k_from is None else "--to",
                                  "is needed with the other end of the range",
                                  expected='both, e.g. --from "1e7 N/m" --to "1e10 N/m"',
                                  kind="missing"))
        lo, hi = stiffness_option(k_from, "--from"), stiffness_option(k_to, "--to")
        if not 0 < lo < hi:
            fail_input(InputError("--from", "must be positive and below --to",
                                  value=f"{k_from} .. {k_to}", kind="range"))
        stiffness = np.geomspace(lo, hi, points or 41)
    elif points is not None:
        stiffness = default_range(rotor, points)
    speeds = None
    if curves_to is not None:
        from .common import speed_option
        top = speed_option(curves_to, "--curves-to")
        if not top > 0:
            fail_input(InputError("--curves-to", "must be above zero", value=curves_to,
                                  kind="range"))
        from ..analysis.csmap import CURVE_POINTS
        from ..analysis.sweep import default_speeds
        first = float(default_speeds(rotor)[0])  # where the sweep starts (a table's first speed)
        speeds = np.linspace(min(first, 0.5 * top), top, CURVE_POINTS)
    started = time.perf_counter()
    with busy("computing the critical-speed map"), input_errors():
        from ..analysis.csmap import critical_speed_map
        cmap = critical_speed_map(rotor, stiffness=stiffness, n_modes=n_modes, whirl=whirl,
                                  speeds=speeds)
    op = rotor.operating
    top_curves = max(float(c.speeds[-1]) for c in cmap.curves) if cmap.curves else None
    heading(f"{rotor.name}: critical-speed map, {whirl} whirl, {len(cmap.stiffness)} "
            f"stiffness values {cmap.stiffness[0]:.2e}-{cmap.stiffness[-1]:.2e} N/m; operating "
            f"range {to_rpm(op.min_speed):.0f}-{to_rpm(op.max_speed):.0f} rpm")
    print_table("The map's ends", map_end_columns(cmap), range(cmap.speeds.shape[1]),
                caption="Soft end: the rotor moves almost as a rigid body on the supports; "
                        "stiff end: the shaft bends between nearly pinned bearings. Seals keep "
                        "their own direct stiffness; supports stay in series.")
    if cmap.crossings:
        print_table("Crossings of the bearings' direct stiffness curves with the map: the "
                    "undamped critical speeds these bearings give", crossing_columns(op),
                    cmap.crossings,
                    caption="Margins are undamped and not judged here; 'criticals' judges "
                            "the damped ones.")
        for note in held_notes(rotor, cmap.crossings):
            console.print(f"[yellow]note[/] {escape(note)}", highlight=False)
    elif top_curves is not None:
        console.print(f"No bearing curve crosses a map curve below {to_rpm(top_curves):.0f} "
                      "rpm (the top of the bearing curves); --curves-to draws them further, "
                      "--modes adds curves.")
    else:
        console.print("The rotor has no bearings (only seals): no bearing curve to cross.")
    document = cmap.to_dict()
    document["operating_range_rpm"] = [float(to_rpm(op.min_speed)), float(to_rpm(op.max_speed))]
    result_window = None
    if window:
        base = reference_stiffness(rotor, target)
        if base is None:
            fail_input(InputError("--window", "needs a bearing with direct stiffness",
                                  value=target, kind="missing"))
        low, high = cmap.stiffness[0] / base, cmap.stiffness[-1] / base
        # about four factors per decade: a critical must not jump over the margin band
        factors = max(9, int(round(4 * math.log10(high / low))) + 1)
        result_window = run_window(rotor, target, target_text, low, high, factors)
        document["window"] = result_window.to_dict()
        document["window"]["reference_stiffness_n_m"] = base
        whose = ("the bearings' (seals left out)" if bearing is None
                 else f"{target_text}'s")
        console.print(f"On the map, factor 1 stands for {base:.3e} N/m: the geometric mean of "
                      f"{whose} kxx and kyy at {to_rpm(op.max_speed):.0f} rpm. The window "
                      "scales the bearings' own coefficients (and seals, for all together), "
                      "so its band on the map is a guide, not a map result.",
                      highlight=False)
    shape_rows, shape_docs = [], []
    if points_k:
        from ..analysis.csmap import map_mode_shape
        bearing_nodes = [cmap.station_nodes[b.station] for b in rotor.bearings
                         if b.kind != "seal"]
        drawn, labels = [], []
        with input_errors():
            for k, mode in points_k:
                speed, shape = map_mode_shape(rotor, k, mode, whirl)
                if not math.isfinite(speed):
                    fail_input(InputError("--shapes", f"map mode {mode + 1} does not exist at "
                                          f"{k:.3e} N/m", value=shapes, kind="range"))
                amplitude = np.max(np.abs(shape), axis=1)
                share = float(max(amplitude[bearing_nodes]) / max(amplitude)) \
                    if bearing_nodes else 0.0
                shape_rows.append((k, mode, speed, share))
                drawn.append(shape)
                labels.append((k, mode, speed))
                shape_docs.append({"stiffness_n_m": k, "mode": mode + 1,
                                   "speed_rpm": float(to_rpm(speed)),
                                   "bearing_motion_share": share,
                                   "x": {"real": shape[:, 0].real.tolist(),
                                         "imag": shape[:, 0].imag.tolist()},
                                   "y": {"real": shape[:, 1].real.tolist(),
                                         "imag": shape[:, 1].imag.tolist()}})
        print_table("Map mode shapes", MAP_SHAPE_COLUMNS, shape_rows,
                    caption="Largest bearing motion: the largest amplitude at a bearing, share "
                            "of the largest anywhere (near 100 %: a rigid-body mode on soft "
                            "supports; near 0: bending between nearly fixed bearings).")
        document["node_z_m"] = [float(z) for z in cmap.node_z]
        document["shapes"] = shape_docs
    console.print(f"[dim]map computed in {time.perf_counter() - started:.1f} s. "
                  f"{CAUTION}[/]", highlight=False)
    write_outputs("stiffness-map", case, document, (), json_path, csv_path,
                  crossing_columns(op), cmap.crossings)
    if plot is not None:
        draw = plotting_function("critical_speed_map")
        if draw is not None:
            drawing = draw(cmap, operating=op, window=result_window,
                           base_stiffness=reference_stiffness(rotor, target))
            save_figure(drawing.figure, plot)
    if shapes_path is not None and points_k:
        draw = plotting_function("map_shapes")
        if draw is not None:
            from ..plotting import map_point_label
            drawing = draw(cmap.node_z, drawn, [map_point_label(*x) for x in labels],
                           station_nodes=cmap.station_nodes)
            save_figure(drawing.figure, shapes_path)


def register(app: typer.Typer):
    app.command("stiffness-map", help=command_help(command, MAP_EXAMPLE))(command)
