"""``rotorcalc modes``: damped modes at one speed."""

from __future__ import annotations

from pathlib import Path
from typing import Optional

import typer

from ..analysis import modes_at
from ..errors import InputError
from ..tables import mode_columns
from ..units import to_rpm
from .common import (check_output, fail_input, input_errors, load, print_table, print_warnings,
                     save_figure, speed_option, write_outputs)

EXAMPLE = """[bold]Example[/]: rotorcalc modes cases/feed_pump.toml --speed "3000 rpm" --plot-mode 1 --plot shape.png"""


def command(
    case: Path = typer.Argument(..., help="Rotor description (TOML)."),
    speed: str = typer.Option(..., "--speed", "-s", help='Spin speed with a unit, e.g. "3000 rpm".'),
    mode_count: Optional[int] = typer.Option(
        None, "--mode-count", min=1, help="Number of modes (default: the file's "
                                          "analysis.mode_count)."),
    plot: Optional[Path] = typer.Option(None, "--plot",
                                        help="Write a mode-shape picture (.png/.svg/.pdf)."),
    plot_mode: int = typer.Option(1, "--plot-mode", min=1,
                                  help="Mode drawn by --plot, from 1 (lowest frequency)."),
    json_path: Optional[Path] = typer.Option(None, "--json", help="Write the modes as JSON."),
    csv_path: Optional[Path] = typer.Option(None, "--csv", help="Write the modes table as CSV."),
):
    """Damped natural frequencies, damping, log decrement and whirl at one speed."""
    rotor = load(case)
    omega = speed_option(speed, "--speed")
    for path, opt in ((plot, "--plot"), (json_path, "--json"), (csv_path, "--csv")):
        check_output(path, case, opt)
    with input_errors():
        result = modes_at(rotor, omega, mode_count)
    rows = list(range(len(result.eigenvalues)))
    columns = mode_columns(result)
    print_table(f"{rotor.name}: modes at {to_rpm(omega):.0f} rpm", columns, rows)
    print_warnings(result.warnings)
    write_outputs("modes", case, result.to_dict, result.warnings, json_path, csv_path,
                  columns, rows)
    if plot is not None:
        if plot_mode > len(rows):
            fail_input(InputError("--plot-mode", "is above the number of modes solved",
                                  value=plot_mode, expected=f"1..{len(rows)}", kind="range"))
        save_figure(result.plot(mode=plot_mode, rotor=rotor).figure, plot)


def register(app: typer.Typer):
    app.command("modes", help=command.__doc__ + "\n\n" + EXAMPLE)(command)
