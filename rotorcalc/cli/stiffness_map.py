"""``rotorcalc stiffness-map``: critical speeds against an isotropic support stiffness, with
the crossings of the bearings' own stiffness curves.  The numbers come from
:mod:`rotorcalc.analysis.stiffness_study`; this module parses options and prints."""

from __future__ import annotations

import time
from pathlib import Path
from typing import Optional

import typer
from rich.markup import escape

from ..analysis.margins import CAUTION
from ..analysis.stiffness_study import (CROSSINGS_CAPTION, ENDS_CAPTION, SHAPES_CAPTION,
                                        stiffness_study)
from ..errors import InputError
from ..tables import MAP_SHAPE_COLUMNS, crossing_columns, map_end_columns
from ..units import to_rpm
from ..vocabulary import Whirl
from .common import (console, fail_input, input_errors, load, print_table, save_figure,
                     speed_option, stiffness_option, write_outputs)
from .whatif_common import bearing_target, busy, check_outputs, command_help, heading
from .window import run_window

MAP_EXAMPLE = ('[bold]Example[/]: rotorcalc stiffness-map cases/compressor.toml '
               '--stiffness-from "1e7 N/m" --stiffness-to "1e10 N/m" --plot csmap.png --window '
               '--shapes-at "1e8 N/m:1,1e9 N/m:2"')


def parse_shapes(text, mode_count):
    """``"1e8 N/m:1, 1e9 N/m:2"`` -> [(stiffness N/m, map mode from 1)]."""
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
            fail_input(InputError("--shapes-at", "needs STIFFNESS:MODE items", value=item,
                                  expected='e.g. "1e8 N/m:1, 1e9 N/m:2" (map modes from 1)',
                                  kind="syntax"))
        if mode > mode_count:
            fail_input(InputError("--shapes-at", f"asks for map mode {mode}, but the map has "
                                  f"{mode_count}", value=item, expected="a mode 1.."
                                  f"{mode_count}, or more --mode-count", kind="range"))
        points.append((stiffness_option(k_text, "--shapes-at"), mode))
    if not points:
        fail_input(InputError("--shapes-at", "is empty", value=text,
                              expected='e.g. "1e8 N/m:1, 1e9 N/m:2"', kind="missing"))
    return points


def shapes_file(plot, shapes_plot):
    if shapes_plot is not None or plot is None:
        return shapes_plot
    return plot.with_name(f"{plot.stem}-shapes{plot.suffix}")


def print_study(study, started):
    """The map's tables and notes."""
    cmap, op = study.map, study.rotor.operating
    heading(f"{study.rotor.name}: critical-speed map, {cmap.whirl} whirl, "
            f"{len(cmap.stiffness)} stiffness values {cmap.stiffness[0]:.2e}-"
            f"{cmap.stiffness[-1]:.2e} N/m; operating range {to_rpm(op.min_speed):.0f}-"
            f"{to_rpm(op.max_speed):.0f} rpm")
    print_table("The map's ends", map_end_columns(cmap), range(cmap.speeds.shape[1]),
                caption=ENDS_CAPTION)
    if cmap.crossings:
        print_table("Crossings of the bearings' direct stiffness curves with the map: the "
                    "undamped critical speeds these bearings give", crossing_columns(op),
                    cmap.crossings, caption=CROSSINGS_CAPTION)
        for note in study.notes:
            console.print(f"[yellow]note[/] {escape(note)}", highlight=False)
    elif study.top_curve_speed is not None:
        console.print(f"No bearing curve crosses a map curve below "
                      f"{to_rpm(study.top_curve_speed):.0f} rpm (the top of the bearing "
                      "curves); --curve-speed-to draws them further, --mode-count adds curves.")
    else:
        console.print("The rotor has no bearings (only seals): no bearing curve to cross.")
    if study.shapes:
        print_table("Map mode shapes", MAP_SHAPE_COLUMNS, study.shapes, caption=SHAPES_CAPTION)
    console.print(f"[dim]map computed in {time.perf_counter() - started:.1f} s. "
                  f"{CAUTION}[/]", highlight=False)


def command(
    case: Path = typer.Argument(..., help="Rotor description (TOML)."),
    stiffness_from: Optional[str] = typer.Option(
        None, "--stiffness-from", help='Softest support stiffness, with a unit, e.g. "1e7 N/m" '
                                       '(default: 1/100 of the bearings\' mean direct '
                                       'stiffness).'),
    stiffness_to: Optional[str] = typer.Option(
        None, "--stiffness-to", help='Stiffest support stiffness, e.g. "1e10 N/m" (default: '
                                     '100 times the mean).'),
    stiffness_count: Optional[int] = typer.Option(
        None, "--stiffness-count", min=3, max=400,
        help="Number of stiffness values, log-spaced (default 41)."),
    mode_count: int = typer.Option(4, "--mode-count", min=1, max=20,
                                   help="Number of critical-speed curves."),
    whirl: Whirl = typer.Option(Whirl.FORWARD.value, "--whirl",
                                help="Whirl of the map curves: forward or backward."),
    curve_speed_to: Optional[str] = typer.Option(
        None, "--curve-speed-to", help='Draw the bearing curves up to this speed, e.g. '
                                       '"6000 rpm" (default: the top of the analysis sweep).'),
    plot: Optional[Path] = typer.Option(None, "--plot",
                                        help="Write the map picture (.png/.svg/.pdf)."),
    window: bool = typer.Option(False, "--window",
                                help="Also find the stiffness window over the map's range and "
                                     "shade it (screens the rotor some 20-35 times)."),
    bearing: Optional[str] = typer.Option(
        None, "--bearing", help="Window for this bearing only (its name, or its 0-based index "
                                "in the file); default every bearing "
                                "together (seals kept as they are)."),
    shapes: Optional[str] = typer.Option(
        None, "--shapes-at", help='Mode shapes at map points, STIFFNESS:MODE items, e.g. '
                                  '"1e8 N/m:1, 1e9 N/m:2".'),
    shapes_plot: Optional[Path] = typer.Option(
        None, "--plot-shapes", help="Picture of the --shapes-at (default: next to --plot, "
                                    "'-shapes' added to its name)."),
    json_path: Optional[Path] = typer.Option(None, "--json",
                                             help="Write the map, curves and crossings as JSON."),
    csv_path: Optional[Path] = typer.Option(None, "--csv", help="Write the crossings as CSV."),
):
    """Critical-speed map: undamped synchronous critical speeds against an isotropic bearing
    stiffness (gyroscopic effect included), and where the bearings' own stiffness curves cross
    them: the critical speeds the real bearings give."""
    rotor = load(case)
    if whirl not in (Whirl.FORWARD, Whirl.BACKWARD):
        fail_input(InputError("--whirl", "must be forward or backward", value=str(whirl),
                              kind="choice"))
    shapes_path = shapes_file(plot, shapes_plot) if shapes else None
    check_outputs(case, {"--plot": plot, "--plot-shapes": shapes_path, "--json": json_path,
                         "--csv": csv_path})
    if bearing is not None and not window:
        fail_input(InputError("--bearing", "only chooses the target of --window", value=bearing,
                              expected="--window as well", kind="option"))
    target, target_text = bearing_target(rotor, bearing)
    top = None if curve_speed_to is None else speed_option(curve_speed_to, "--curve-speed-to")
    if top is not None and not top > 0:
        fail_input(InputError("--curve-speed-to", "must be above zero", value=curve_speed_to,
                              kind="range"))
    started = time.perf_counter()
    with busy("computing the critical-speed map"), input_errors():
        study = stiffness_study(
            rotor, stiffness_option(stiffness_from, "--stiffness-from"),
            stiffness_option(stiffness_to, "--stiffness-to"), stiffness_count,
            mode_count=mode_count, whirl=whirl, curve_speed_to=top, target=target,
            shapes_at=parse_shapes(shapes, mode_count) if shapes else ())
    print_study(study, started)
    if window:
        with input_errors():
            low, high, count = study.window_span()
        study = study.with_window(run_window(rotor, target, target_text, low, high, count))
        console.print(study.reference_text(target_text), highlight=False)
    write_outputs("stiffness-map", case, study.to_dict, (), json_path, csv_path,
                  crossing_columns(rotor.operating), study.map.crossings)
    if plot is not None:
        save_figure(study.plot().figure, plot)
    if shapes_path is not None and study.shapes:
        save_figure(study.plot_shapes().figure, shapes_path)


def register(app: typer.Typer):
    app.command("stiffness-map", help=command_help(command, MAP_EXAMPLE))(command)
