"""The ``rotorcalc`` command line: a thin layer, one module per command."""

from __future__ import annotations

import os

# Rotor models are small-to-medium matrices solved many times: one BLAS thread per
# process is faster than threads fighting over two cores (measured: 10x on a 120x120
# eig under load).  Only takes effect when numpy is not imported yet; the user's
# own setting wins.
for _var in ("OPENBLAS_NUM_THREADS", "OMP_NUM_THREADS", "MKL_NUM_THREADS"):
    os.environ.setdefault(_var, "1")

# Pictures go to files: no screen needed (set before matplotlib loads, without loading it).
os.environ["MPLBACKEND"] = "Agg"

import importlib  # noqa: E402

import typer  # noqa: E402
from typer.core import TyperCommand, TyperGroup  # noqa: E402

from ..vocabulary import rename_options  # noqa: E402

#: Every command: its module (loaded when the command runs or shows its own help, so that
#: ``rotorcalc --help`` loads no analysis, numpy or matplotlib) and the summary the command
#: list shows: the start of the command's own help (a test holds them to it).
COMMANDS = {
    "modes": ("modes", "Damped natural frequencies, damping, log decrement and whirl at one "
                       "speed."),
    "sweep": ("sweep", "Sweep the speed range, track the modes and draw the whirl-speed map."),
    "criticals": ("criticals", "Critical speeds (forward/backward, log dec) and their "
                               "separation margins."),
    "check": ("check", "Check every separation margin, the stability of every mode up to trip "
                       "and the response limits; exit non-zero when one fails or is not "
                       "covered (for scripts and CI)."),
    "response": ("response", "Unbalance response: probe amplitudes and phases, peaks with "
                             "amplification factors, vibration and clearance checks at running "
                             "speeds."),
    "layout": ("layout", "Draw the rotor model (sections, disks, bearings, stations) to check "
                         "it is what you meant."),
    "stiffness-map": ("stiffness_map", "Critical-speed map: undamped synchronous critical "
                                       "speeds against an isotropic bearing stiffness."),
    "compare": ("compare", "Compare variants of one rotor: every critical speed of the rotor "
                           "as described ('base') and of each variant, with whirl, log dec, "
                           "margin, verdict and the change against the base."),
    "window": ("window", "Stiffness window: the range of a bearing-stiffness scale factor (one "
                         "bearing, or all together) over which every critical speed keeps its "
                         "required separation margin."),
    "cross-coupling": ("coupling", "Cross-coupling screen: the first forward mode's log "
                                   "decrement at the maximum continuous speed against an "
                                   "applied destabilising cross-coupled stiffness."),
    "levers": ("levers", "Levers: per cent change of each critical speed per per cent change "
                         "of each bearing's direct stiffness (kxx and kyy together) and of each "
                         "disk's mass, biggest lever first."),
    "statics": ("statics", "The rotor at rest: the load every journal bearing carries under the "
                           "rotor's weight."),
    "bearing": ("bearing", "A bearing's eight coefficients against speed."),
    "envelope": ("envelope", "Screen the rotor at every corner of its bearings' tolerances."),
    "study": ("study", "Uncertainty study: screen the rotor at every sample of its uncertain "
                       "inputs and report the probability that each check fails (with its "
                       "confidence interval), the percentiles of every critical speed, "
                       "margin and log decrement, and each input's influence."),
    "fleet": ("fleet", "Fleet screening: every rotor file screened as 'check' does, one row "
                       "each (file, verdict, the first item that failed or was not covered); "
                       "exits non-zero when any rotor fails or cannot be judged."),
    "review": ("review", "The design-review report: every analysis the rotor file asks for "
                         "(statics and bearings, sweep, critical speeds and margins, "
                         "stability, unbalance response, the variants of --variants) in one "
                         "self-contained HTML file to read in any browser or print to PDF."),
}


def load_command(name):
    """The click command ``name``, its module loaded and registered now."""
    from .common import guarded
    module = importlib.import_module(f".{COMMANDS[name][0]}", __name__)
    holder = typer.Typer(add_completion=False, rich_markup_mode="rich")
    module.register(holder)
    for command in holder.registered_commands:   # no traceback from any command, ever
        command.callback = guarded(command.callback)
    return typer.main.get_group(holder).commands[name]


class _Lazy(TyperCommand):
    """A command known by name and summary; its module loads when it runs."""

    def __init__(self, name):
        summary = COMMANDS[name][1]
        super().__init__(name, help=summary, short_help=summary, rich_markup_mode="rich")

    def make_context(self, info_name, args, parent=None, **extra):
        return load_command(self.name).make_context(info_name, args, parent=parent, **extra)


class _Commands(TyperGroup):
    """The command group: reads the old spelling of a renamed option for one more version,
    with a note on stderr (:data:`rotorcalc.vocabulary.RENAMED_OPTIONS`)."""

    def parse_args(self, ctx, args):
        command = next((a for a in args if not a.startswith("-")), None)
        if command is not None:
            at = args.index(command) + 1
            args = args[:at] + rename_options(command, args[at:], _note)
        return super().parse_args(ctx, args)

    def __init__(self, *args, **kwargs):
        super().__init__(*args, **kwargs)
        self.commands.update({name: _Lazy(name) for name in COMMANDS})


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


@app.callback()
def _group():
    """The command group (its help is the app's)."""


def main():
    app()
