"""``rotorcalc cross-coupling``: the cross-coupling screen at the maximum continuous speed and
the check with every destabilising source of the rotor file applied."""

from __future__ import annotations

import dataclasses
from pathlib import Path
from typing import Optional

import typer
from rich.markup import escape

from ..analysis.margins import CAUTION
from ..errors import InputError
from ..rules import COEFFICIENTS_AT, PLACEMENTS, CouplingRule
from ..tables import (COUPLING_STEP_COLUMNS, SOURCES_CHECK_COLUMNS, SOURCES_OWN_COLUMNS,
                      source_columns)
from ..units import to_rpm
from .common import (console, input_errors, load, print_table, save_figure,
                     stiffness_option, write_outputs)
from .whatif_common import busy, check_outputs, command_help, heading

EXAMPLE = ('[bold]Example[/]: rotorcalc cross-coupling cases/compressor.toml --plot screen.png '
           '--json screen.json')


def _rule(rotor, expected, placement, min_log_dec, min_ratio, coefficients_at):
    """The file's rule (or the defaults) with the command line's changes, and the expected
    amount the command line gives (None: the rule's or the sources')."""
    rule = rotor.coupling_rule or CouplingRule()
    changes = {}
    with input_errors():
        if expected is not None:
            expected = stiffness_option(expected, "--expected")
        if placement is not None:
            if placement not in PLACEMENTS:
                raise InputError("--placement", "is not a known placement", value=placement,
                                 expected=" or ".join(PLACEMENTS), kind="choice")
            changes["placement"] = placement
        if min_log_dec is not None:
            changes["min_log_dec"] = min_log_dec
        if min_ratio is not None:
            changes["min_ratio"] = min_ratio
        if coefficients_at is not None:
            if coefficients_at not in COEFFICIENTS_AT:
                raise InputError("--coefficients-at", "is not a known choice",
                                 value=coefficients_at, expected=" or ".join(COEFFICIENTS_AT),
                                 kind="choice")
            changes["coefficients_at"] = coefficients_at
        return dataclasses.replace(rule, **changes), expected


def command(
    case: Path = typer.Argument(..., help="Rotor description (TOML)."),
    expected: Optional[str] = typer.Option(
        None, "--expected", help='Expected total cross-coupled stiffness, e.g. "2e6 N/m" '
                                 "(default: the file's [coupling_screen] expected, else the "
                                 "sum of its [[cross_coupling]] sources)."),
    placement: Optional[str] = typer.Option(
        None, "--placement", help="Where the swept amount acts: sources (split as the file's "
                                  "sources), mid-span, or largest-amplitude (the first forward "
                                  "mode's largest station)."),
    min_log_dec: Optional[float] = typer.Option(
        None, "--min-log-dec", min=0.0, help="Least log decrement at the expected amount "
                                            "(0.1: common practice, from memory)."),
    min_ratio: Optional[float] = typer.Option(
        None, "--min-ratio", min=0.0, help="Least threshold / expected (2: common practice, "
                                          "from memory)."),
    coefficients_at: Optional[str] = typer.Option(
        None, "--coefficients-at", help="Where bearing and seal tables over whirl frequency "
                                        "are read: synchronous (at the spin speed, the "
                                        "default) or mode-frequency (each mode at its own "
                                        "frequency, iterated)."),
    plot: Optional[Path] = typer.Option(None, "--plot", help="Write the screen's picture."),
    json_path: Optional[Path] = typer.Option(None, "--json", help="Write the screen as JSON."),
    csv_path: Optional[Path] = typer.Option(None, "--csv",
                                            help="Write the sweep of the screen as CSV."),
):
    """Cross-coupling screen: the first forward mode's log decrement at the maximum
    continuous speed against an applied destabilising cross-coupled stiffness (0 to 10 times
    the expected amount), the threshold where it reaches zero and the verdict; then every
    forward mode with all the file's sources applied."""
    rotor = load(case)
    check_outputs(case, {"--plot": plot, "--json": json_path, "--csv": csv_path})
    rule, expected = _rule(rotor, expected, placement, min_log_dec, min_ratio, coefficients_at)
    from ..analysis.coupling_screen import coupling_study
    with busy("sweeping the applied cross-coupling"), input_errors():
        result = coupling_study(dataclasses.replace(rotor, coupling_rule=rule),
                                expected=expected)
    screen = result.screen
    heading(f"{rotor.name}: cross-coupling screen at {to_rpm(screen.speed):.0f} rpm "
            f"(maximum continuous speed)")
    if rotor.sources:
        print_table("Destabilising sources of the rotor file (at the maximum continuous speed)",
                    source_columns(screen.speed), rotor.sources)
    print_table("First forward mode against the applied cross-coupling", COUPLING_STEP_COLUMNS,
                screen.some_rows(4),
                caption="Every fourth step shown; --csv writes them all.")
    colour = "green" if screen.verdict == "pass" else "bold red"
    console.print(f"Cross-coupling screen: [{colour}]{screen.verdict}[/]. "
                  f"{escape(screen.summary())}", highlight=False)
    if result.sources is not None:
        check = result.sources
        print_table(f"Forward modes with every source applied (need log dec "
                    f"{check.min_log_dec:g}" + (", each at its own whirl frequency)"
                                                if check.at_own_frequency else ")"),
                    SOURCES_OWN_COLUMNS if check.at_own_frequency else SOURCES_CHECK_COLUMNS,
                    check.rows)
        colour = "green" if check.passed else "bold red"
        console.print(f"Check with every source applied: [{colour}]{check.verdict}[/]. "
                      f"{escape(check.summary())}", highlight=False)
    for note in result.notes:
        console.print(f"[yellow]note[/] {escape(note)}", highlight=False)
    console.print(f"[dim]{CAUTION}[/]", highlight=False)
    write_outputs("cross-coupling", case, result.to_dict, (), json_path, csv_path,
                  COUPLING_STEP_COLUMNS, screen.rows)
    if plot is not None:
        save_figure(screen.plot().figure, plot)


def register(app: typer.Typer):
    app.command("cross-coupling", help=command_help(command, EXAMPLE))(command)
