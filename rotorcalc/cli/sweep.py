"""``rotorcalc sweep``: tracked modes over the speed range and the whirl-speed map."""

from __future__ import annotations

from pathlib import Path
from typing import Optional

import typer
from rich.markup import escape

from ..tables import sweep_columns, sweep_rows
from .common import (JOBS_HELP, console, load, print_solve_note, print_warnings, save_figure,
                     screen_case, write_outputs)
from .criticals import apply_overrides, print_margins

EXAMPLE = """[bold]Example[/]: rotorcalc sweep cases/compressor.toml --plot map.png --csv sweep.csv"""


def command(
    case: Path = typer.Argument(..., help="Rotor description (TOML)."),
    plot_path: Optional[Path] = typer.Option(None, "--plot",
                                             help="Write the whirl-speed map (.png/.svg/.pdf)."),
    speed_count: Optional[int] = typer.Option(None, "--speed-count", min=3,
                                              help="Number of sweep speeds."),
    speed_to: Optional[str] = typer.Option(None, "--speed-to",
                                           help='Highest sweep speed, e.g. "12000 rpm".'),
    json_path: Optional[Path] = typer.Option(None, "--json", help="Write every branch as JSON."),
    csv_path: Optional[Path] = typer.Option(None, "--csv", help="Write the sweep (one row per speed and branch) as CSV."),
    jobs: Optional[int] = typer.Option(None, "--jobs", min=0, help=JOBS_HELP),
):
    """Sweep the speed range, track the modes and draw the whirl-speed map."""
    rotor = apply_overrides(load(case), speed_count=speed_count, speed_to=speed_to)
    result = screen_case(rotor, case, {"--plot": plot_path, "--json": json_path,
                                       "--csv": csv_path}, jobs)
    sw = result.sweep
    console.print(f"{escape(rotor.name)}: {len(sw.speeds)} speeds, "
                  f"{sw.eigenvalues.shape[1]} branches", highlight=False)
    print_margins(result, brief=True)
    print_solve_note(sw)
    print_warnings(sw.warnings)
    rows = list(sweep_rows(sw))
    write_outputs("sweep", case, result.to_dict, sw.warnings, json_path, csv_path,
                  sweep_columns(sw), rows)
    if plot_path is not None:
        save_figure(result.plot().figure, plot_path)


def register(app: typer.Typer):
    app.command("sweep", help=command.__doc__ + "\n\n" + EXAMPLE)(command)
