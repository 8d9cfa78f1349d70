"""``rotorcalc check``: the margin check as a design gate (exit 1 on failure)."""

from __future__ import annotations

from pathlib import Path
from typing import Optional

import typer

from .common import EXIT_CHECK_FAILED
from .criticals import options, run

EXAMPLE = ("[bold]Example[/]: rotorcalc check cases/compressor.toml || echo 'margins not met'\n\n"
           "Exit codes: 0 all margins met, 1 a margin fails, 2 bad input.")

_O = options()


def command(
    case: Path = typer.Argument(..., help="Rotor description (TOML)."),
    map_path: Optional[Path] = _O["map_path"],
    json_path: Optional[Path] = _O["json_path"],
    csv_path: Optional[Path] = _O["csv_path"],
    points: Optional[int] = _O["points"],
    top: Optional[str] = _O["top"],
    orders: Optional[str] = _O["orders"],
    rule: Optional[str] = _O["rule"],
    below: Optional[float] = _O["below"],
    above: Optional[float] = _O["above"],
):
    """Check every separation margin; exit 1 when one fails (for scripts and CI)."""
    result = run(case, map_path, json_path, csv_path, points, top, orders, rule, below, above,
                 "check")
    if not result.passed:
        raise typer.Exit(EXIT_CHECK_FAILED)


def register(app: typer.Typer):
    app.command("check", help=command.__doc__ + "\n\n" + EXAMPLE)(command)
