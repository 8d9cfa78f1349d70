"""``rotorcalc bearing``: a bearing's coefficients against speed, and the film state of one
computed from its geometry."""

from __future__ import annotations

from pathlib import Path
from typing import Optional

import typer
from rich.markup import escape

from ..bearings.fixed_film import CAUTION as FILM_CAUTION
from ..captions import PAD_CAPTION, WHIRL_CAPTION, film_record_caption
from ..vocabulary import CAUTION
from ..tables import (BEARING_COEFFICIENT_COLUMNS, BEARING_ROW_COLUMNS, FILM_STATE_COLUMNS,
                      PAD_COLUMNS, WHIRL_COLUMNS)
from ..units import to_rpm
from .common import console, input_errors, load, print_table, save_figure, write_outputs
from .whatif_common import check_outputs

EXAMPLE = ("[bold]Example[/]: rotorcalc bearing cases/feed_pump_sleeve.toml --name DE "
           "--plot de.png --csv de.csv")


def command(
    case: Path = typer.Argument(..., help="Rotor description (TOML)."),
    name: Optional[str] = typer.Option(None, "--name",
                                       help="Only the bearing of this name (default: all)."),
    plot: Optional[Path] = typer.Option(
        None, "--plot", help="Write the coefficients picture (with several bearings, one "
                             "file each: the bearing's name is added to the file name)."),
    json_path: Optional[Path] = typer.Option(None, "--json", help="Write everything as JSON."),
    csv_path: Optional[Path] = typer.Option(None, "--csv",
                                            help="Write one row per bearing and speed."),
):
    """A bearing's eight coefficients against speed. For a bearing computed from its
    geometry ([bearing.film]) also its film state at each speed under the rotor's own
    static load: eccentricity, attitude angle, minimum film, film temperature, Sommerfeld
    number, power loss and flow, and the dimensionless coefficients in the picture."""
    rotor = load(case)
    check_outputs(case, {"--plot": plot, "--json": json_path, "--csv": csv_path})
    from ..analysis.bearing_curves import bearing_curves
    with input_errors():
        curves = bearing_curves(rotor, name)
    for c in curves:
        print_table(f"{escape(rotor.name)}: {c.role} {c.name} at station {c.station} "
                    f"({c.source})", BEARING_COEFFICIENT_COLUMNS, c.coefficient_rows,
                    caption=c.description)
        if c.record is not None:
            print_table(f"{c.name}: film state under its static load", FILM_STATE_COLUMNS,
                        c.film_rows, caption=film_record_caption(c.record))
            for note in c.record.notes:
                console.print(f"[yellow]note[/] {escape(str(note))}", highlight=False)
        if c.pads is not None:
            print_table(f"{c.name}: the pads at {to_rpm(c.pads.speed):.0f} rpm (maximum "
                        "continuous speed)", PAD_COLUMNS, c.pad_rows,
                        caption=PAD_CAPTION)
            print_table(f"{c.name}: coefficients reduced at each whirl frequency, "
                        f"{to_rpm(c.pads.speed):.0f} rpm", WHIRL_COLUMNS, c.whirl_rows,
                        caption=WHIRL_CAPTION)
    caution = FILM_CAUTION if any(c.record is not None for c in curves) else CAUTION
    console.print(f"[dim]{caution}[/]", highlight=False)
    write_outputs("bearing", case, {"bearings": [c.to_dict() for c in curves],
                                    "caution": caution}, (), json_path, csv_path,
                  BEARING_ROW_COLUMNS, [row for c in curves for row in c.rows])
    if plot is not None:
        for c in curves:
            # (not with_name: an empty --plot is Path("."), which has no name to replace)
            target = plot if len(curves) == 1 else plot.parent.joinpath(
                f"{plot.stem}_{_file_part(c.name)}{plot.suffix}")
            save_figure(c.plot().figure, target)


def _file_part(name):
    return "".join(ch if ch.isalnum() or ch in "-_" else "_" for ch in name) or "bearing"


def register(app: typer.Typer):
    doc = escape(" ".join(command.__doc__.split()))   # a [table] name is no markup
    app.command("bearing", help=doc + "\n\n" + EXAMPLE)(command)
