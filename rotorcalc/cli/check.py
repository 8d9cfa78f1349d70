"""``rotorcalc check``: the margin check as a design gate (exit 1 on failure)."""

from __future__ import annotations

import typer

from .criticals import make_command

EXAMPLE = ("[bold]Example[/]: rotorcalc check cases/compressor.toml || echo 'not signed off'\n\n"
           "Exit codes: 0 every check met; 1 a check failed (a separation margin, stability, "
           "a response limit); 2 bad input; 3 a numerical failure; 4 an output could not be "
           "written; 5 not covered: nothing failed, but the analysis does not reach all it "
           "must judge (the sweep stops short of trip or of a margin band, a bearing table "
           "does not cover a judged critical, the response sweep misses the minimum speed to "
           "trip, or a sparse eigen-solve could not prove it missed no mode).")


def register(app: typer.Typer):
    doc = ("Check every separation margin, the stability of every mode up to trip and the "
           "response limits; exit non-zero when one fails or is not covered (for scripts and "
           "CI).")
    app.command("check", help=doc + "\n\n" + EXAMPLE)(make_command("check", gate=True))
