"""``rotorcalc envelope``: the rotor screened at every corner of its bearings' tolerance
ranges (clearance, preload, oil inlet temperature), the worst corner named per item."""

from __future__ import annotations

import time
from pathlib import Path
from typing import Optional

import typer
from rich.markup import escape

from ..analysis.margins import CAUTION
from ..tables import WORST_CASE_COLUMNS
from .common import (EXIT_CHECK_FAILED, EXIT_NOT_COVERED, SCREENINGS_JOBS_HELP, console,
                     input_errors, load, print_table, save_figure, write_outputs)
from .compare import print_comparison
from .criticals import apply_overrides
from .whatif_common import (check_outputs, command_help, plotting_function, progress_bar,
                            with_sources_option)

EXAMPLE = ("[bold]Example[/]: rotorcalc envelope cases/blower_two_lobe.toml --plot corners.png"
           "\n\nExit codes as for check: 0 every corner meets every check; 1 a check fails "
           "at some corner; 5 nothing fails but some corner is not covered.")


def command(
    case: Path = typer.Argument(..., help="Rotor description (TOML) whose bearings from their "
                                          "geometry give tolerance ranges."),
    speed_count: Optional[int] = typer.Option(None, "--speed-count", min=3,
                                              help="Number of sweep speeds per screening."),
    plot: Optional[Path] = typer.Option(None, "--plot",
                                        help="Write the corners' whirl-speed maps overlaid."),
    with_sources: bool = with_sources_option(),
    json_path: Optional[Path] = typer.Option(None, "--json", help="Write every corner as JSON."),
    csv_path: Optional[Path] = typer.Option(None, "--csv",
                                            help="Write the worst corner per item as CSV."),
    jobs: int = typer.Option(0, "--jobs", min=0, help=SCREENINGS_JOBS_HELP),
):
    """Screen the rotor at every corner of its bearings' tolerances: each quantity given a
    range in the rotor file (clearance_range, preload_range, inlet_temperature_range) at its
    low and its high end, every combination, the same end for every bearing; each corner's
    film coefficients computed afresh under its own loads. Prints every corner's critical
    speeds, margins and verdicts beside the nominal rotor and, per item (each critical, each
    stability branch, each response limit), the corner where it is worst."""
    rotor = load(case)
    check_outputs(case, {"--plot": plot, "--json": json_path, "--csv": csv_path})
    rotor = apply_overrides(rotor, speed_count=speed_count)
    from ..analysis.envelope import corner_variants, tolerance_envelope
    with input_errors():
        variants = corner_variants(rotor)
    started = time.perf_counter()
    with progress_bar(f"screening the nominal rotor and {len(variants)} corner(s)",
                      len(variants) + 1) as bar, input_errors():
        envelope = tolerance_envelope(rotor, progress=bar, with_sources=with_sources,
                                      workers=jobs)
    elapsed = time.perf_counter() - started
    warnings = print_comparison(rotor, envelope.comparison, variants,
                                base_text="nominal: the rotor as described")
    print_table(f"{rotor.name}: the worst corner per item", WORST_CASE_COLUMNS, envelope.worst,
                caption="Margin: the smallest margin above the required one (per cent of "
                        "speed; from the log decrement and, with unbalance cases, from the "
                        "response peak). Log decrement: the judged one (the least from the "
                        "minimum speed to trip). Ratio: the worst response over its limit.")
    verdict = {"pass": "every corner meets every check", "fail": "a check FAILS at some corner",
               "incomplete": "nothing fails, but some corner is NOT COVERED"}[envelope.verdict]
    console.print(f"Envelope: {escape(verdict)} ({len(envelope.comparison.names)} screenings "
                  f"in {elapsed:.1f} s)", highlight=False)
    console.print(f"[dim]{CAUTION}[/]", highlight=False)
    write_outputs("envelope", case, envelope.to_dict, warnings, json_path, csv_path,
                  WORST_CASE_COLUMNS, envelope.worst)
    if plot is not None:
        draw = plotting_function("plot_variant_maps")
        if draw is not None:
            save_figure(draw(envelope.comparison, operating=rotor.operating,
                             title=f"{rotor.name}: whirl-speed maps of the tolerance corners "
                                   "(base: nominal)").figure, plot)
    if envelope.verdict == "fail":
        raise typer.Exit(EXIT_CHECK_FAILED)
    if envelope.verdict == "incomplete":
        raise typer.Exit(EXIT_NOT_COVERED)


def register(app: typer.Typer):
    app.command("envelope", help=command_help(command, EXAMPLE))(command)
