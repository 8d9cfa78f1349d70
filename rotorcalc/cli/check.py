"""``rotorcalc check``: the margin check as a design gate (exit 1 on failure)."""

from __future__ import annotations

import typer

from .criticals import make_command

EXAMPLE = ("[bold]Example[/]: rotorcalc check cases/compressor.toml || echo 'margins not met'\n\n"
           "Exit codes: 0 all margins met, 1 a margin fails, 2 bad input.")


def register(app: typer.Typer):
    doc = "Check every separation margin; exit 1 when one fails (for scripts and CI)."
    app.command("check", help=doc + "\n\n" + EXAMPLE)(make_command("check", gate=True))
