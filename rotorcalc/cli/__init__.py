"""The ``rotorcalc`` command line: a thin layer, one module per command."""

from __future__ import annotations

import os

# Rotor models are small-to-medium matrices solved many times: one BLAS thread per
# process is faster than threads fighting over two cores (measured: 10x on a 120x120
# eig under load).  Only takes effect when numpy is not imported yet; the user's
# own setting wins.
for _var in ("OPENBLAS_NUM_THREADS", "OMP_NUM_THREADS", "MKL_NUM_THREADS"):
    os.environ.setdefault(_var, "1")

import matplotlib  # noqa: E402

matplotlib.use("Agg")  # no screen needed; pictures go to files

import typer  # noqa: E402
from typer.core import TyperGroup  # noqa: E402

from ..vocabulary import rename_options  # noqa: E402
from . import (bearing, check, compare, coupling, criticals, envelope, layout, levers,  # noqa: E402
               modes, response, statics, stiffness_map, sweep, window)
from .common import guarded  # noqa: E402

class _Commands(TyperGroup):
    """The command group: reads the old spelling of a renamed option for one more version,
    with a note on stderr (:data:`rotorcalc.vocabulary.RENAMED_OPTIONS`)."""

    def parse_args(self, ctx, args):
        command = next((a for a in args if not a.startswith("-")), None)
        if command is not None:
            at = args.index(command) + 1
            args = args[:at] + rename_options(command, args[at:], _note)
        return super().parse_args(ctx, args)


def _note(text):
    from rich.markup import escape
    from .common import errors
    errors.print(f"[yellow]note[/] {escape(text)}", highlight=False, soft_wrap=True)


app = typer.Typer(
    cls=_Commands, add_completion=False, no_args_is_help=True, rich_markup_mode="rich",
    help="Lateral rotor-dynamics screening: damped natural frequencies, whirl-speed maps, "
         "critical speeds, log decrements and separation margins from a TOML rotor file.\n\n"
         "Screening only: confirm against the applicable standard, the purchase specification, "
         "local codes and a licensed engineer's review.")

for module in (modes, sweep, criticals, check, response, layout, stiffness_map, compare, window,
               coupling, levers, statics, bearing, envelope):
    module.register(app)
for _command in app.registered_commands:   # no traceback from any command, ever
    _command.callback = guarded(_command.callback)


def main():
    app()
