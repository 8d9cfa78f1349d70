"""``rotorcalc layout``: a side view of the rotor model."""

from __future__ import annotations

from pathlib import Path

import typer
from rich.markup import escape

from .. import units as u
from .common import check_output, console, load, save_figure

EXAMPLE = "[bold]Example[/]: rotorcalc layout cases/overhung_fan.toml --plot fan.png"


def command(
    case: Path = typer.Argument(..., help="Rotor description (TOML)."),
    out: Path = typer.Option(..., "--plot", "-o", help="Picture file (.png/.svg/.pdf)."),
):
    """Draw the rotor model (sections, disks, bearings, stations) to check it is what you meant."""
    rotor = load(case)
    check_output(out, case, "--plot")
    from ..plotting import plot_rotor_layout
    ax = plot_rotor_layout(rotor)
    console.print(f"{escape(rotor.name)}: {len(rotor.sections)} sections, {len(rotor.disks)} disks, "
                  f"{len(rotor.bearings)} bearings/seals, mass {rotor.mass:.1f} kg, "
                  f"length {u.to_mm(rotor.length):.0f} mm")
    save_figure(ax.figure, out)


def register(app: typer.Typer):
    app.command("layout", help=command.__doc__ + "\n\n" + EXAMPLE)(command)
