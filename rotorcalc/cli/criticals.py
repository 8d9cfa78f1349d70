"""``rotorcalc criticals``: critical speeds with their separation margins."""

from __future__ import annotations

import dataclasses
from pathlib import Path
from typing import Optional

import typer

from rich.markup import escape

from ..analysis.margins import CAUTION
from ..errors import InputError
from ..model import MarginRule
from ..tables import LIMIT_COLUMNS, margin_columns
from ..units import to_rpm
from .common import (EXIT_CHECK_FAILED, JOBS_HELP, screen_case, console, input_errors, load,
                     print_table, print_warnings, save_figure, speed_option, write_outputs)

EXAMPLE = """[bold]Example[/]: rotorcalc criticals cases/feed_pump.toml --map pump-map.png --json pump.json"""

RULE_HELP = ("Margin rule: af-curve (amplification-factor rule, common practice), fixed "
             "(--below/--above per cent) or none.")


def apply_overrides(rotor, points=None, top=None, orders=None, rule=None, below=None,
                    above=None):
    """Copy of ``rotor`` with command-line overrides of its analysis settings."""
    s = rotor.settings
    changes = {}
    with input_errors():
        if points is not None:
            changes["speed_count"] = points
        if top is not None:
            changes["speed_to"] = speed_option(top, "--to")
        if orders:
            try:
                changes["orders"] = tuple(float(o) for o in orders.split(","))
            except ValueError:
                raise InputError("--orders", "must be numbers separated by commas", value=orders,
                                 expected="e.g. 1 or 0.5,1,2", kind="type") from None
        if rule is not None or below is not None or above is not None:
            r = s.margin_rule
            changes["margin_rule"] = MarginRule(kind=rule or r.kind,
                                                below=r.below if below is None else below,
                                                above=r.above if above is None else above,
                                                af_threshold=r.af_threshold)
        if changes:
            rotor = dataclasses.replace(rotor, settings=dataclasses.replace(s, **changes))
    return rotor


def print_margins(result, brief=False):
    rotor, table = result.rotor, result.margins
    op = rotor.operating
    trip = f", trip {to_rpm(op.trip_speed):.0f}" if op.trip_speed else ""
    title = (f"{rotor.name}: critical speeds, operating range {to_rpm(op.min_speed):.0f}-"
             f"{to_rpm(op.max_speed):.0f} rpm{trip}")
    rule = table.rule
    if rule.kind == "af-curve":
        rule_text = (f"Margin rule: amplification-factor rule (AF < {rule.af_threshold:g}: no margin; "
                     "otherwise 17(1-1/(AF-1.5))% below, 10+17(1-1/(AF-1.5))% above), common "
                     "practice, quoted from memory. AF estimated from log dec as pi/delta.")
    elif rule.kind == "fixed":
        rule_text = f"Margin rule: fixed, {rule.below:g}% below and {rule.above:g}% above."
    else:
        rule_text = "Margin rule: none (margins listed, not judged)."
    if not table.rows:
        console.print(f"{escape(title)}\nNo critical speed found up to "
                      f"{to_rpm(table.verified_above_to):.0f} rpm.")
    else:
        if table.has_response:
            rule_text += (" 'resp.' columns: AF measured on the unbalance-response peaks "
                          "(half-power bandwidth).")
        print_table(title, margin_columns(table), table.rows,
                    caption=None if brief else rule_text)
    response = result.response
    if response is not None and (response.vibration or response.clearance):
        print_table("Unbalance response at running speeds: vibration and clearance",
                    LIMIT_COLUMNS, response.vibration + response.clearance,
                    caption=None if brief else (
                        "Vibration limit 25.4*sqrt(12000/N) um pk-pk, at most 25.4 um; clearance "
                        f"limit {rotor.response.clearance_share:.0%} of the radial clearance "
                        "(common practice, from memory)."))
    for note in table.notes:
        console.print(f"[yellow]note[/] {escape(note)}", highlight=False)
    verdict = "[green]all margins met[/]" if result.passed else "[bold red]margin check FAILED[/]"
    console.print(f"Verdict: {verdict}")
    if not brief:
        console.print(f"[dim]{CAUTION}[/]", highlight=False)


def run(case, map_path, json_path, csv_path, points, top, orders, rule, below, above, command,
        workers=None):
    rotor = apply_overrides(load(case), points=points, top=top, orders=orders, rule=rule,
                            below=below, above=above)
    result = screen_case(rotor, case, {"--map": map_path, "--json": json_path, "--csv": csv_path},
                         workers)
    print_margins(result)
    document = result.margins.to_dict()
    if result.response is not None:
        document["response_checks"] = [c.to_dict() for c in
                                       result.response.vibration + result.response.clearance]
        document["passed"] = result.passed
    warnings = tuple(dict.fromkeys(result.sweep.warnings
                                   + (result.response.warnings if result.response else ())))
    print_warnings(warnings)
    write_outputs(command, case, document, warnings, json_path, csv_path,
                  margin_columns(result.margins), result.margins.rows)
    if map_path is not None:
        from ..plotting import whirl_speed_map
        ax = whirl_speed_map(result.sweep, result.criticals, rotor.operating,
                             rotor.settings.orders, margins=result.margins)
        save_figure(ax.figure, map_path)
    return result


def make_command(name, gate):
    """The ``criticals`` command, or with ``gate`` the ``check`` command (exit 1 on failure)."""

    def command(
        case: Path = typer.Argument(..., help="Rotor description (TOML)."),
        map_path: Optional[Path] = typer.Option(
            None, "--map", help="Also write the whirl-speed map (.png/.svg/.pdf)."),
        json_path: Optional[Path] = typer.Option(None, "--json", help="Write the margin table as JSON."),
        csv_path: Optional[Path] = typer.Option(None, "--csv", help="Write the margin table as CSV."),
        points: Optional[int] = typer.Option(None, "--points", min=3, help="Number of sweep speeds."),
        top: Optional[str] = typer.Option(None, "--to", help='Highest sweep speed, e.g. "12000 rpm".'),
        orders: Optional[str] = typer.Option(
            None, "--orders", help="Excitation orders, comma separated, e.g. 1,2."),
        rule: Optional[str] = typer.Option(None, "--rule", help=RULE_HELP),
        below: Optional[float] = typer.Option(
            None, "--below", help="Required margin below the minimum speed, per cent (fixed rule)."),
        above: Optional[float] = typer.Option(
            None, "--above",
            help="Required margin above the maximum continuous speed, per cent (fixed rule)."),
        jobs: Optional[int] = typer.Option(None, "--jobs", min=0, help=JOBS_HELP),
    ):
        result = run(case, map_path, json_path, csv_path, points, top, orders, rule, below, above,
                     name, jobs)
        if gate and not result.passed:
            raise typer.Exit(EXIT_CHECK_FAILED)

    return command


def register(app: typer.Typer):
    doc = "Critical speeds (forward/backward, log dec) and their separation margins."
    app.command("criticals", help=doc + "\n\n" + EXAMPLE)(make_command("criticals", gate=False))
