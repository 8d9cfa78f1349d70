"""``rotorcalc window``: the range of bearing-stiffness factor that keeps every margin."""

from __future__ import annotations

import time
from pathlib import Path
from typing import Optional

import typer

from ..analysis.margins import CAUTION
from ..errors import InputError
from ..tables import WINDOW_END_COLUMNS, WINDOW_SCAN_COLUMNS
from ..units import to_rpm
from ..analysis.whatif import WINDOW_CAPTION, WINDOW_DEFAULT
from ..captions import critical_text
from .common import (SCREENINGS_JOBS_HELP, console, fail_input, input_errors, load,
                     print_table, write_outputs)
from .criticals import apply_overrides
from .whatif_common import (bearing_target, check_outputs, command_help, heading,
                            progress_bar, with_sources_option, without_response)

WINDOW_EXAMPLE = ('[bold]Example[/]: rotorcalc window cases/overhung_fan.toml --bearing FE '
                  '--factor-from 0.2 --factor-to 5 --json window.json')


def run_window(rotor, target, target_text, low, high, factors, with_sources=False, jobs=0):
    """Find the window with a progress bar and print its ends and scan."""
    from ..analysis.whatif import stiffness_window, window_factors
    grid = len(window_factors(low, high, factors))
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
                                      high=high, points=factors, progress=progress,
                                      with_sources=with_sources, workers=jobs)
    elapsed = time.perf_counter() - started
    print_window(rotor, result, target_text)
    if rotor.unbalance:
        console.print("[yellow]note[/] the window judges the margins by the log decrement only; "
                      "the response-based verdicts of this rotor's unbalance cases ('check') "
                      "are not part of it.", highlight=False)
    console.print(f"[dim]window found in {elapsed:.1f} s ({count[0]} screenings)[/]",
                  highlight=False)
    return result


def print_window(rotor, result, target_text):
    op = rotor.operating
    heading(f"{rotor.name}: stiffness window, {target_text}; operating range "
            f"{to_rpm(op.min_speed):.0f}-{to_rpm(op.max_speed):.0f} rpm")
    print_table("Scan", WINDOW_SCAN_COLUMNS, result.scan_rows(), caption=WINDOW_CAPTION)
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


def command(
    case: Path = typer.Argument(..., help="Rotor description (TOML)."),
    bearing: Optional[str] = typer.Option(
        None, "--bearing", help="Scale this bearing only (its name, or its 0-based index); "
                                f"default: {WINDOW_DEFAULT}."),
    low: float = typer.Option(0.1, "--factor-from",
                              help="Lowest stiffness factor searched (below 1)."),
    high: float = typer.Option(10.0, "--factor-to",
                               help="Highest stiffness factor searched (above 1)."),
    factors: int = typer.Option(9, "--factor-count", min=2, max=60,
                                help="Factors in the log-spaced scan (1 is always added)."),
    speed_count: Optional[int] = typer.Option(None, "--speed-count", min=3,
                                              help="Number of sweep speeds per screening."),
    with_sources: bool = with_sources_option(),
    json_path: Optional[Path] = typer.Option(None, "--json", help="Write the window as JSON."),
    csv_path: Optional[Path] = typer.Option(None, "--csv", help="Write the scan as CSV."),
    jobs: int = typer.Option(0, "--jobs", min=0, help=SCREENINGS_JOBS_HELP),
):
    """Stiffness window: the range of a bearing-stiffness scale factor (one bearing, or all
    together) over which every critical speed keeps its required separation margin, with the
    critical that limits each end."""
    rotor = apply_overrides(load(case), speed_count=speed_count)
    check_outputs(case, {"--json": json_path, "--csv": csv_path})
    if not 0 < low < 1 < high < float("inf"):   # NaN fails every comparison
        fail_input(InputError("--factor-from", "and --factor-to must bracket the stiffness as "
                              "described (1)", value=f"{low:g} .. {high:g}",
                              expected="0 < --factor-from < 1 < --factor-to, e.g. "
                                       "--factor-from 0.1 --factor-to 10",
                              kind="range"))
    target, target_text = bearing_target(rotor, bearing)
    result = run_window(rotor, target, target_text, low, high, factors, with_sources, jobs)
    console.print(f"[dim]{CAUTION}[/]", highlight=False)
    write_outputs("window", case, result.to_dict, (), json_path, csv_path,
                  WINDOW_SCAN_COLUMNS, result.scan_rows())


def register(app: typer.Typer):
    app.command("window", help=command_help(command, WINDOW_EXAMPLE))(command)
