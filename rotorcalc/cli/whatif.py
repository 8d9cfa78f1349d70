"""What-if commands: ``stiffness-map``, ``compare``, ``window`` and ``levers``.

``stiffness-map``  critical speeds against an isotropic support stiffness, with the
                   crossings of the bearings' own stiffness curves;
``compare``        a rotor and its variants (a variants file or ``--vary``), side by side;
``window``         the range of bearing-stiffness factor that keeps every margin;
``levers``         what moves each critical speed most: bearing stiffness or disk mass.
"""

from __future__ import annotations

import dataclasses
import math
import re
import time
from contextlib import contextmanager
from pathlib import Path
from typing import List, Optional

import numpy as np
import typer
from rich.markup import escape
from rich.progress import BarColumn, Progress, TextColumn, TimeElapsedColumn

from .. import units as u
from ..analysis.margins import CAUTION
from ..errors import InputError
from ..output import file_hash
from ..reader import load_toml
from ..tables import (MAP_SHAPE_COLUMNS, SENSITIVITY_COLUMNS, WINDOW_END_COLUMNS,
                      WINDOW_SCAN_COLUMNS, comparison_columns, crossing_columns,
                      map_end_columns)
from ..units import to_rpm
from .common import (check_output, console, errors, fail_input, input_errors, load, print_table,
                     print_warnings, save_figure, write_outputs)
from .criticals import apply_overrides

MAP_EXAMPLE = ('[bold]Example[/]: rotorcalc stiffness-map cases/compressor.toml --from "1e7 N/m" '
               '--to "1e10 N/m" --plot csmap.png --window --shapes "1e8 N/m:1,1e9 N/m:2"')
COMPARE_EXAMPLE = ("[bold]Example[/]: rotorcalc compare cases/feed_pump_variants.toml "
                   "--plot variants.png --csv variants.csv")
WINDOW_EXAMPLE = ('[bold]Example[/]: rotorcalc window cases/overhung_fan.toml --bearing FE '
                  '--from 0.2 --to 5 --json window.json')
LEVERS_EXAMPLE = "[bold]Example[/]: rotorcalc levers cases/compressor.toml --csv levers.csv"

WINDOW_CAPTION = (
    "Margin excess: the smallest (margin - required margin) over the critical speeds that "
    "need a margin; inf when none needs one (all critically damped, not judged, or beyond "
    "the sweep). Every stiffness coefficient (kxx, kxy, kyx, kyy) of the target is scaled "
    "by the factor; dampings are kept. AF estimated from the log decrement.")


# --- small helpers ---------------------------------------------------------------------


class CountProgress:
    """A progress bar for a known number of steps, or a counter when it is unknown.

    Drawn on stderr and only on a terminal, so pipes, files and tests stay clean.
    """

    def __init__(self, label, total=None):
        self.label, self.total = label, total
        self.bar = self.task = None
        if errors.is_terminal:
            self.bar = Progress(TextColumn("{task.description}"), BarColumn(),
                                TextColumn("{task.completed} done"),
                                TimeElapsedColumn(), console=errors, transient=True)
            self.bar.start()
            self.task = self.bar.add_task(label, total=total)

    def __call__(self, done, total=None):
        if self.bar is None:
            return
        total = total or self.total
        if total is not None and done > total:
            total = None  # past the estimate: count on
        self.bar.update(self.task, completed=done, total=total)

    def describe(self, label):
        if self.bar is not None:
            self.bar.update(self.task, description=label)

    def close(self):
        if self.bar is not None:
            self.bar.stop()
            self.bar = None


@contextmanager
def progress_bar(label, total=None):
    bar = CountProgress(label, total)
    try:
        yield bar
    finally:
        bar.close()


@contextmanager
def busy(label):
    """A spinner on stderr (terminal only) for a computation without steps."""
    if errors.is_terminal:
        with errors.status(label):
            yield
    else:
        yield


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


def check_outputs(case, outputs):
    for option, path in outputs.items():
        check_output(path, case, option)


def plotting_function(name):
    """A function of :mod:`rotorcalc.plotting`, or None (with a note) when it does not exist."""
    from .. import plotting
    function = getattr(plotting, name, None)
    if function is None:
        errors.print(f"[yellow]note[/] this installation cannot draw yet "
                     f"(rotorcalc.plotting.{name} is missing); no picture written",
                     highlight=False)
    return function


def without_response(rotor):
    """The rotor without its unbalance cases: the margin functions of the window and the
    levers use log-decrement margins only, and the response would double the run time."""
    return dataclasses.replace(rotor, unbalance=())


def bearing_target(rotor, name, option="--bearing"):
    """Change path of one bearing (by name, or by 0-based index) or of all of them."""
    if name is None:
        return None, "every bearing together (seals unchanged)"
    names = [b.name for b in rotor.bearings]
    if name in names:
        i = names.index(name)
        # a name the change grammar can spell is kept readable; any other goes by its index
        plain = re.fullmatch(r"[A-Za-z0-9_\-]+( [A-Za-z0-9_\-]+)*", name)
        return (f"bearing.{name}" if plain else f"bearing[{i}]"), f"bearing {name}"
    if name.strip().isdigit() and int(name) < len(rotor.bearings):
        i = int(name)
        return f"bearing[{i}]", f"bearing {names[i] or '[' + str(i) + ']'}"
    fail_input(InputError(option, "names no bearing of the rotor", value=name,
                          expected="one of " + ", ".join(n or f"{i}" for i, n in
                                                         enumerate(names)),
                          kind="choice"))


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


def heading(text):
    console.print(f"[bold]{escape(text)}[/]", highlight=False)


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


def critical_text(c):
    return f"{to_rpm(c.speed):.0f} rpm {c.whirl} (log dec {c.log_dec:.3f})"


# --- stiffness-map ---------------------------------------------------------------------


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


def map_command(
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


# --- window ----------------------------------------------------------------------------


def run_window(rotor, target, target_text, low, high, factors):
    """Find the window with a progress bar and print its ends and scan."""
    from ..analysis.whatif import stiffness_window
    grid = len(np.unique(np.concatenate([np.geomspace(low, high, factors), [1.0]])))
    started = time.perf_counter()
    count = [0]
    with progress_bar(f"stiffness window, {target_text}: scan of {grid}", grid) as bar:
        def progress(done, total):
            count[0] = done
            if done == grid + 1:
                bar.describe(f"stiffness window, {target_text}: refining the ends")
            bar(done, total)
        with input_errors():
            result = stiffness_window(without_response(rotor), target=target, low=low,
                                      high=high, points=factors, progress=progress)
    elapsed = time.perf_counter() - started
    print_window(rotor, result, target_text)
    if rotor.unbalance:
        console.print("[yellow]note[/] the window judges the margins by the log decrement only; "
                      "the response-based verdicts of this rotor's unbalance cases ('check') "
                      "are not part of it.", highlight=False)
    console.print(f"[dim]window found in {elapsed:.1f} s ({count[0]} screenings)[/]",
                  highlight=False)
    return result


def scan_rows(result):
    """(factor, excess) rows of the scan; a grid factor that is 1 to rounding is listed once."""
    rows = []
    for f, e in zip(result.factors, result.excess):
        if rows and math.isclose(f, rows[-1][0], rel_tol=1e-9):
            continue
        rows.append((float(f), float(e)))
    return rows


def print_window(rotor, result, target_text):
    op = rotor.operating
    heading(f"{rotor.name}: stiffness window, {target_text}; operating range "
            f"{to_rpm(op.min_speed):.0f}-{to_rpm(op.max_speed):.0f} rpm")
    print_table("Scan", WINDOW_SCAN_COLUMNS, scan_rows(result), caption=WINDOW_CAPTION)
    print_table("Window ends", WINDOW_END_COLUMNS, [("low", result.low), ("high", result.high)])
    if not result.base_passes:
        console.print("[bold red]The rotor as described does not keep its margins[/]: "
                      "there is no window around factor 1.")
        return
    ends = []
    for label, end in (("from", result.low), ("to", result.high)):
        if end.factor is None:
            ends.append(f"{label} beyond x{result.factors[0 if label == 'from' else -1]:.3g}")
        else:
            limit = critical_text(end.limiting) if end.limiting else "an unnamed critical"
            ends.append(f"{label} x{end.factor:.3g} (limited by {limit})")
    console.print(f"Every margin holds {', '.join(ends)}.", highlight=False)


def window_command(
    case: Path = typer.Argument(..., help="Rotor description (TOML)."),
    bearing: Optional[str] = typer.Option(
        None, "--bearing", help="Scale this bearing only (its name, or its 0-based index); "
                                "default: every bearing and seal together."),
    low: float = typer.Option(0.1, "--from", help="Lowest stiffness factor searched (below 1)."),
    high: float = typer.Option(10.0, "--to", help="Highest stiffness factor searched (above 1)."),
    factors: int = typer.Option(9, "--factors", min=2, max=60,
                                help="Factors in the log-spaced scan (1 is always added)."),
    points: Optional[int] = typer.Option(None, "--points", min=3,
                                         help="Number of sweep speeds per screening."),
    json_path: Optional[Path] = typer.Option(None, "--json", help="Write the window as JSON."),
    csv_path: Optional[Path] = typer.Option(None, "--csv", help="Write the scan as CSV."),
):
    """Stiffness window: the range of a bearing-stiffness scale factor (one bearing, or all
    together) over which every critical speed keeps its required separation margin, with the
    critical that limits each end."""
    rotor = apply_overrides(load(case), points=points)
    check_outputs(case, {"--json": json_path, "--csv": csv_path})
    if not (0 < low < 1 < high) or not math.isfinite(high):
        fail_input(InputError("--from", "and --to must bracket the stiffness as described (1)",
                              value=f"{low:g} .. {high:g}",
                              expected="0 < --from < 1 < --to, e.g. --from 0.1 --to 10",
                              kind="range"))
    target, target_text = bearing_target(rotor, bearing)
    result = run_window(rotor, target, target_text, low, high, factors)
    console.print(f"[dim]{CAUTION}[/]", highlight=False)
    document = result.to_dict()
    document["caution"] = CAUTION
    write_outputs("window", case, document, (), json_path, csv_path, WINDOW_SCAN_COLUMNS,
                  scan_rows(result))


# --- compare ---------------------------------------------------------------------------


def read_study(path, vary):
    """(case file for provenance, base path, rotor, variants) from a variants file or a rotor
    file plus ``--vary`` options."""
    from ..variants import apply_variant, read_variants, variant_from_option
    with input_errors():
        try:
            data = load_toml(path.read_text(encoding="utf-8"), str(path))
        except OSError:
            data = {}  # let the reader report the file
        if "base" in data:
            base_path, rotor, variants = read_variants(path)
        else:
            base_path, rotor, variants = path, load(path), ()
        extra = tuple(variant_from_option(text, i) for i, text in enumerate(vary))
        for i, variant in enumerate(extra):
            try:
                apply_variant(rotor, variant)  # a change that does not fit: report it now
            except InputError as err:
                if err.key.startswith("--vary"):
                    raise
                # the rebuilt model names its own key (operating.trip_speed): say which option
                raise err.with_location(file=f"--vary[{i}] ({variant.name})") from None
    variants = variants + extra
    if not variants:
        fail_input(InputError("--vary", "is needed: the file is a rotor, not a variants file",
                              value=str(path), expected='a variants file (with base = "...") '
                              'or --vary "NAME: bearing.*.k *= 0.7"', kind="missing"))
    seen = {"base"}
    for i, v in enumerate(variants):
        if v.name in seen:
            fail_input(InputError(f"variant[{i}].name", "is used twice or is 'base' (the "
                                  "name of the rotor as described)", value=v.name,
                                  expected="a name of its own for each variant",
                                  kind="duplicate"))
        seen.add(v.name)
    return base_path, rotor, variants


def comparison_notes(comparison):
    """Unstable criticals, and base criticals that need a margin but have no counterpart."""
    notes = []
    for r in comparison.rows:
        if r.row.critical.log_dec <= 0:
            notes.append(f"{r.variant}: UNSTABLE critical at {critical_text(r.row.critical)}")
    base_rows = [r for r in comparison.screenings[0].margins.rows
                 if r.verdict in ("pass", "fail") or not r.passed]
    for name in comparison.names[1:]:
        matched = {r.base_speed for r in comparison.rows if r.variant == name}
        gone = [r.critical for r in base_rows if r.critical.speed not in matched]
        if gone:
            notes.append(f"{name}: no critical within 30 % of the base critical"
                         f"{'s' if len(gone) > 1 else ''} "
                         + ", ".join(critical_text(c) for c in gone)
                         + " with the same whirl (it moved further, changed whirl, or left "
                           "the sweep)")
    return notes


def merged_warnings(comparison):
    """The screenings' warnings, each once, naming the variants that gave it."""
    where = {}
    for name, s in zip(comparison.names, comparison.screenings):
        for w in s.sweep.warnings:
            where.setdefault(w, []).append(name)
    out = []
    for w, names in where.items():
        label = "all variants" if len(names) == len(comparison.names) else ", ".join(names)
        out.append(f"({label}) {w}")
    return tuple(out)


def compare_command(
    case: Path = typer.Argument(..., help='A variants file (TOML with base = "rotor.toml" and '
                                          '[[variant]] tables) or a rotor file with --vary.'),
    vary: Optional[List[str]] = typer.Option(
        None, "--vary", help='A variant "NAME: change; change", e.g. "worn: bearing.*.k *= 0.6; '
                             'bearing.*.c *= 0.7"; may be repeated.'),
    points: Optional[int] = typer.Option(None, "--points", min=3,
                                         help="Number of sweep speeds per screening."),
    plot: Optional[Path] = typer.Option(None, "--plot",
                                        help="Write the overlaid whirl-speed maps."),
    json_path: Optional[Path] = typer.Option(None, "--json",
                                             help="Write the comparison as JSON."),
    csv_path: Optional[Path] = typer.Option(None, "--csv", help="Write the comparison as CSV."),
):
    """Compare variants of one rotor: every critical speed of the rotor as described ('base')
    and of each variant, with whirl, log dec, margin, verdict and the change against the base.
    Informational: exits 0 whatever the verdicts."""
    check_outputs(case, {"--plot": plot, "--json": json_path, "--csv": csv_path})
    base_path, rotor, variants = read_study(case, vary or [])
    check_outputs(base_path, {"--plot": plot, "--json": json_path, "--csv": csv_path})
    rotor = apply_overrides(rotor, points=points)
    from ..analysis.whatif import compare
    started = time.perf_counter()
    with progress_bar(f"screening the base and {len(variants)} variant(s)",
                      len(variants) + 1) as bar, \
            input_errors():
        comparison = compare(rotor, variants, progress=bar)
    elapsed = time.perf_counter() - started
    summary = [("base", "the rotor as described", comparison.screenings[0])] + [
        (v.name, "; ".join(c.text for c in v.changes), s)
        for v, s in zip(variants, comparison.screenings[1:])]
    from ..tables import Column
    print_table(f"{rotor.name}: variants", [
        Column("Variant", lambda r: r[0], "{}"),
        Column("Changes", lambda r: r[1], "{}"),
        Column("Criticals", lambda r: len(r[2].margins.rows), "{:d}"),
        Column("Screening", lambda r: "passes" if r[2].passed else "FAILS", "{}"),
    ], summary, caption="Screening: every margin verdict (log dec and, with unbalance cases, "
                        "response based) and the response limits, as 'check' judges them.")
    op = rotor.operating
    print_table(f"Critical speeds of each variant (base operating range "
                f"{to_rpm(op.min_speed):.0f}-{to_rpm(op.max_speed):.0f} rpm)",
                comparison_columns(comparison), comparison.rows,
                caption="Change: against the base critical of the same order and whirl nearest "
                        "in speed (within 30 % of the variant's). Margins are against each "
                        "variant's own operating range.")
    for note in comparison_notes(comparison):
        console.print(f"[yellow]note[/] {escape(note)}", highlight=False)
    warnings = merged_warnings(comparison)
    print_warnings(warnings)
    console.print(f"[dim]{len(comparison.names)} screenings in {elapsed:.1f} s. {CAUTION}[/]",
                  highlight=False)
    document = comparison.to_dict()
    document["base_file"] = {"path": str(base_path), "sha256": file_hash(base_path)}
    document["changes"] = {v.name: [c.text for c in v.changes] for v in variants}
    document["caution"] = CAUTION
    write_outputs("compare", case, document, warnings, json_path, csv_path,
                  comparison_columns(comparison), comparison.rows)
    if plot is not None:
        draw = plotting_function("variant_maps")
        if draw is not None:
            drawing = draw(comparison, operating=op)
            save_figure(drawing.figure, plot)


# --- levers ----------------------------------------------------------------------------


def ranked(sensitivities):
    """(rank, Sensitivity) rows: criticals by speed, the biggest lever of each first."""
    groups = {}
    for s in sensitivities:
        groups.setdefault(id(s.critical), []).append(s)
    rows = []
    for group in sorted(groups.values(), key=lambda g: g[0].critical.speed):
        group.sort(key=lambda s: -abs(s.value) if s.value is not None else math.inf)
        rows += list(enumerate(group, start=1))
    return rows


def levers_command(
    case: Path = typer.Argument(..., help="Rotor description (TOML)."),
    near: Optional[float] = typer.Option(
        None, "--near", min=0.0,
        help="Only criticals within this fraction of the operating range's ends, e.g. 0.3."),
    every: bool = typer.Option(False, "--all",
                               help="Also the criticals that need no margin (critically "
                                    "damped, or backward ones that are not judged); slower, "
                                    "and for heavily damped ones the numbers describe the "
                                    "damped frequency, not a resonance."),
    step: float = typer.Option(0.01, "--step", min=1e-4, max=0.2,
                               help="Relative step of the central difference (0.01 = 1 %)."),
    points: Optional[int] = typer.Option(None, "--points", min=3,
                                         help="Number of sweep speeds for the criticals."),
    json_path: Optional[Path] = typer.Option(None, "--json",
                                             help="Write the sensitivities as JSON."),
    csv_path: Optional[Path] = typer.Option(None, "--csv",
                                            help="Write the sensitivities as CSV."),
):
    """Levers: per cent change of each critical speed per per cent change of each bearing's
    direct stiffness (kxx and kyy together) and of each disk's mass, biggest lever first."""
    rotor = apply_overrides(load(case), points=points)
    check_outputs(case, {"--json": json_path, "--csv": csv_path})
    from ..analysis import screen
    from ..analysis.whatif import sensitivities
    started = time.perf_counter()
    chosen = without_response(rotor)
    if every:
        s = chosen.settings
        chosen = dataclasses.replace(chosen, settings=dataclasses.replace(
            s, judge_backward=True,
            # the levers skip criticals whose AF is below the threshold: a tiny one keeps all
            margin_rule=dataclasses.replace(s.margin_rule, af_threshold=1e-9)))
    with busy("finding the critical speeds and their levers"), input_errors():
        result = screen(chosen)
        levers = sensitivities(chosen, result.criticals, step=step, near=near)
    elapsed = time.perf_counter() - started
    rows = ranked(levers)
    op = rotor.operating
    if rows:
        print_table(f"{rotor.name}: levers on the critical speeds (operating range "
                    f"{to_rpm(op.min_speed):.0f}-{to_rpm(op.max_speed):.0f} rpm)",
                    SENSITIVITY_COLUMNS, rows,
                    caption=f"% per %: per cent change of the critical per per cent change of "
                            f"the lever, central difference with a {step:.1%} step; 'Half "
                            f"step' repeats it with half the step (agreement verifies it). "
                            f"'rpm for +10 %' is the linear estimate.")
    else:
        console.print("No critical speed needs a margin here (all critically damped, not "
                      "judged, or outside --near); --all includes them.")
    console.print(f"[dim]{len(rows)} levers in {elapsed:.1f} s. {CAUTION}[/]", highlight=False)
    document = {"criticals_considered": "all" if every else "those that need a margin",
                "near": near, "step": step,
                "sensitivities": [dict(s.to_dict(), rank=rank) for rank, s in rows],
                "caution": CAUTION}
    print_warnings(result.sweep.warnings)
    write_outputs("levers", case, document, result.sweep.warnings, json_path, csv_path,
                  SENSITIVITY_COLUMNS, rows)


def _help(command, example):
    return " ".join(command.__doc__.split()) + "\n\n" + example


def register(app: typer.Typer):
    app.command("stiffness-map", help=_help(map_command, MAP_EXAMPLE))(map_command)
    app.command("compare", help=_help(compare_command, COMPARE_EXAMPLE))(compare_command)
    app.command("window", help=_help(window_command, WINDOW_EXAMPLE))(window_command)
    app.command("levers", help=_help(levers_command, LEVERS_EXAMPLE))(levers_command)
