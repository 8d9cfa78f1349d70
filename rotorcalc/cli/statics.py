"""``rotorcalc statics``: the rotor at rest under its weight and steady loads."""

from __future__ import annotations

from pathlib import Path
from typing import Optional

import typer
from rich.markup import escape

from ..captions import STATIC_FILM_CAPTION, reactions_caption, reactions_title
from ..statics import CAUTION
from ..tables import STATIC_FILM_COLUMNS, STATIC_REACTION_COLUMNS
from .common import (console, input_errors, load, print_table, save_figure, speed_option,
                     write_outputs)
from .whatif_common import check_outputs

EXAMPLE = ("[bold]Example[/]: rotorcalc statics cases/feed_pump.toml --plot sag.png "
           "--json statics.json")


def command(
    case: Path = typer.Argument(..., help="Rotor description (TOML)."),
    speed: Optional[str] = typer.Option(
        None, "--speed", help='Speed at which the journals\' stiffness is read, e.g. "3000 '
                              'rpm" (default: the maximum continuous speed).'),
    plot: Optional[Path] = typer.Option(None, "--plot", help="Write the deflected shaft."),
    json_path: Optional[Path] = typer.Option(None, "--json",
                                             help="Write the reactions and deflection as JSON."),
    csv_path: Optional[Path] = typer.Option(None, "--csv", help="Write the reactions as CSV."),
):
    """The rotor at rest: the load every journal bearing carries under the rotor's weight
    (gravity along -y unless [statics] says otherwise) and its [[static_load]] forces and
    moments, and the shaft's static deflection."""
    rotor = load(case)
    check_outputs(case, {"--plot": plot, "--json": json_path, "--csv": csv_path})
    at = None if speed is None else speed_option(speed, "--speed")
    from ..statics import static_solution
    with input_errors():
        solution = static_solution(rotor, at)
    print_table(reactions_title(rotor.name, solution), STATIC_REACTION_COLUMNS, solution.rows,
                caption=reactions_caption(solution))
    if solution.films:
        print_table("Journals computed from their geometry: film state under the load",
                    STATIC_FILM_COLUMNS, solution.film_rows,
                    caption=STATIC_FILM_CAPTION)
    console.print(escape(solution.summary()), highlight=False)
    console.print(f"[dim]{CAUTION}[/]", highlight=False)
    write_outputs("statics", case, solution.to_dict, (), json_path, csv_path,
                  STATIC_REACTION_COLUMNS, solution.rows)
    if plot is not None:
        save_figure(solution.plot().figure, plot)


def register(app: typer.Typer):
    doc = escape(" ".join(command.__doc__.split()))   # a [table] name is no markup
    app.command("statics", help=doc + "\n\n" + EXAMPLE)(command)
