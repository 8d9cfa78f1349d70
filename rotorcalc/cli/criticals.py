"""``rotorcalc criticals``: critical speeds with their separation margins."""

from __future__ import annotations

import dataclasses
from pathlib import Path
from typing import Optional

import typer

from rich.markup import escape

from ..analysis.margins import CAUTION
from ..errors import InputError
from ..model import LIMITS, MARGIN_RULES, STABILITY_RULES
from ..analysis.response import limits_caption
from ..analysis.stability import describe_branch
from ..tables import LIMIT_COLUMNS, STABILITY_COLUMNS, margin_columns
from ..units import to_rpm
from .common import (EXIT_CHECK_FAILED, EXIT_NOT_COVERED, EXIT_OK, JOBS_HELP, console,
                     input_errors, load, print_solve_note, print_table, print_warnings,
                     save_figure, screen_case, speed_option, write_outputs)

EXAMPLE = """[bold]Example[/]: rotorcalc criticals cases/feed_pump.toml --plot pump-map.png --json pump.json"""

STABILITY_HELP = ("Stability rule from the minimum speed up to trip: positive (every log "
                  "decrement above 0; undamped is marginal and fails), at-least (--min-log-dec) "
                  "or none.")
RULE_HELP = ("Margin rule: af-curve (amplification-factor rule with its caps, common "
             "practice, from memory), fixed (--margin-below/--margin-above per cent) or none.")


# The rule options of every command that judges (criticals, check, review): declared once.
MARGIN_RULE = typer.Option(None, "--margin-rule", help=RULE_HELP)
MARGIN_BELOW = typer.Option(None, "--margin-below", help="Required margin below the minimum "
                            "speed, per cent (fixed rule).")
MARGIN_ABOVE = typer.Option(None, "--margin-above", help="Required margin above the maximum "
                            "continuous speed, per cent (fixed rule).")
STABILITY_RULE = typer.Option(None, "--stability-rule", help=STABILITY_HELP)
MIN_LOG_DEC = typer.Option(None, "--min-log-dec", help="Least log decrement every mode needs "
                           "up to trip (implies --stability-rule at-least; 0.1 is common "
                           "practice, from memory).")


def apply_overrides(rotor, speed_count=None, speed_to=None, orders=None, margin_rule=None,
                    margin_below=None, margin_above=None, stability_rule=None, min_log_dec=None):
    """Copy of ``rotor`` with command-line overrides of its analysis settings."""
    s = rotor.settings
    changes = {}
    with input_errors():
        if speed_count is not None:
            if speed_count > LIMITS["speed count"]:
                raise InputError("--speed-count", "is more speeds than a sweep needs",
                                 value=speed_count, expected=f"at most {LIMITS['speed count']}",
                                 kind="option")
            changes["speed_count"] = speed_count
        if speed_to is not None:
            changes["speed_to"] = speed_option(speed_to, "--speed-to")
        if orders:
            try:
                changes["orders"] = tuple(float(o) for o in orders.split(","))
            except ValueError:
                raise InputError("--orders", "must be numbers separated by commas", value=orders,
                                 expected="e.g. 1 or 0.5,1,2", kind="type") from None
            if not changes["orders"] or len(changes["orders"]) > LIMITS["orders"] or not all(
                    0 < o <= LIMITS["order"] for o in changes["orders"]):
                raise InputError("--orders", "must be up to "
                                 f"{LIMITS['orders']} orders above 0 and at most "
                                 f"{LIMITS['order']:g}", value=orders, expected="e.g. 1 or 0.5,1,2",
                                 kind="option")
        if margin_rule is not None or margin_below is not None or margin_above is not None:
            r = s.margin_rule
            changes["margin_rule"] = dataclasses.replace(
                r, name=margin_rule or r.name,
                margin_below=r.margin_below if margin_below is None else margin_below,
                margin_above=r.margin_above if margin_above is None else margin_above)
        if min_log_dec is not None and stability_rule not in (None, "at-least"):
            raise InputError("--min-log-dec",
                             f"has no effect with --stability-rule {stability_rule}",
                             value=min_log_dec, expected="--stability-rule at-least, or no "
                             "--stability-rule", kind="option")
        if stability_rule is not None and stability_rule not in STABILITY_RULES:
            raise InputError("--stability-rule", "is not a known rule", value=stability_rule,
                             expected=" or ".join(STABILITY_RULES), kind="choice")
        if margin_rule is not None and margin_rule not in MARGIN_RULES:
            raise InputError("--margin-rule", "is not a known rule", value=margin_rule,
                             expected=" or ".join(MARGIN_RULES), kind="choice")
        if stability_rule is not None or min_log_dec is not None:
            r = s.stability_rule       # the file's marginal band stays
            changes["stability_rule"] = dataclasses.replace(
                r, name=stability_rule or ("at-least" if min_log_dec is not None else r.name),
                min_log_dec=r.min_log_dec if min_log_dec is None else min_log_dec)
        if changes:
            rotor = dataclasses.replace(rotor, settings=dataclasses.replace(s, **changes))
        if "speed_to" in changes:      # film bearings' tables must reach the new top
            from ..bearings import tabulate_films
            rotor = tabulate_films(rotor)
    return rotor


def print_margins(result, brief=False):
    rotor, table = result.rotor, result.margins
    op = rotor.operating
    trip = f", trip {to_rpm(op.trip_speed):.0f}" if op.trip_speed else ""
    title = (f"{rotor.name}: critical speeds, operating range {to_rpm(op.min_speed):.0f}-"
             f"{to_rpm(op.max_speed):.0f} rpm{trip}")
    if not table.rows:
        console.print(f"{escape(title)}\nNo critical speed found up to "
                      f"{to_rpm(table.verified_above_to):.0f} rpm.")
    else:
        print_table(title, margin_columns(table, terse=True), table.rows,
                    caption=None if brief else table.caption())
    stab = result.stability
    if stab is not None:
        print_table(f"Stability from the minimum speed up to trip: "
                    f"{to_rpm(stab.judged_range[0]):.0f}-{to_rpm(stab.judged_range[1]):.0f} rpm",
                    STABILITY_COLUMNS, stab.branches,
                    caption=None if brief else stab.caption())
        for m in stab.failing:
            console.print(f"[bold red]stability fails[/] {escape(describe_branch(m))}",
                          highlight=False)
        if stab.divergent_speeds:
            console.print("[bold red]unstable[/] a non-oscillating motion grows at "
                          f"{len(stab.divergent_speeds)} speeds (first at "
                          f"{to_rpm(stab.divergent_speeds[0]):.0f} rpm)", highlight=False)
    response = result.response
    if response is not None and (response.vibration or response.clearance):
        print_table("Unbalance response: vibration (operating range) and clearance (up to trip)",
                    LIMIT_COLUMNS, response.vibration + response.clearance,
                    caption=None if brief else limits_caption(rotor))
        if not response.steady:
            console.print("[bold red]no steady state[/] a mode is unstable at "
                          + ", ".join(f"{to_rpm(lo):.0f}-{to_rpm(hi):.0f} rpm"
                                      for lo, hi in response.unstable_ranges)
                          + ": the unbalance response there is not physical", highlight=False)
    if result.coupling is not None:
        screen = result.coupling.screen
        colour = "green" if screen.verdict == "pass" else "bold red"
        console.print(f"Cross-coupling screen: [{colour}]{screen.verdict}[/]. "
                      f"{escape(screen.summary())}", highlight=False)
        check = result.coupling.sources
        if check is not None:
            colour = "green" if check.passed else "bold red"
            console.print(f"Check with every source applied: [{colour}]{check.verdict}[/]. "
                          f"{escape(check.summary())} ('rotorcalc cross-coupling' lists "
                          "every mode.)",
                          highlight=False)
        for note in result.coupling.notes:
            console.print(f"[yellow]note[/] {escape(note)}", highlight=False)
    for note in table.notes:
        console.print(f"[yellow]note[/] {escape(note)}", highlight=False)
    for gap in result.gaps:
        console.print(f"[bold red]not covered[/] {escape(gap.text)}", highlight=False)
    verdict = {"pass": "[green]every check met[/]",
               "fail": "[bold red]a check FAILED[/]",
               "incomplete": "[bold red]NOT COVERED[/]: the analysis does not reach all it "
                             "must judge (see above)"}[result.verdict]
    console.print(f"Verdict: {verdict}")
    console.print(f"[dim]{CAUTION}[/]", highlight=False)


def run(case, plot_path, json_path, csv_path, command, workers=None, **overrides):
    rotor = apply_overrides(load(case), **overrides)
    result = screen_case(rotor, case, {"--plot": plot_path, "--json": json_path,
                                       "--csv": csv_path}, workers)
    print_margins(result)
    print_solve_note(result.sweep)
    warnings = tuple(dict.fromkeys(result.sweep.warnings
                                   + (result.response.warnings if result.response else ())))
    print_warnings(warnings)
    # the same document as `sweep` writes, made only for --json
    write_outputs(command, case, result.to_dict, warnings, json_path, csv_path,
                  margin_columns(result.margins), result.margins.rows)
    if plot_path is not None:
        save_figure(result.plot().figure, plot_path)
    return result


def exit_code(result):
    """The gate's exit code: 0 pass, 1 a check failed, 5 not covered (nothing failed)."""
    return {"pass": EXIT_OK, "fail": EXIT_CHECK_FAILED, "incomplete": EXIT_NOT_COVERED}[
        result.verdict]


def make_command(name, gate):
    """The ``criticals`` command, or with ``gate`` the ``check`` command (exit 1 on failure)."""

    def command(
        case: Path = typer.Argument(..., help="Rotor description (TOML)."),
        plot_path: Optional[Path] = typer.Option(
            None, "--plot", help="Also write the whirl-speed map (.png/.svg/.pdf)."),
        json_path: Optional[Path] = typer.Option(None, "--json", help="Write the margin table as JSON."),
        csv_path: Optional[Path] = typer.Option(None, "--csv", help="Write the margin table as CSV."),
        speed_count: Optional[int] = typer.Option(None, "--speed-count", min=3,
                                                  help="Number of sweep speeds."),
        speed_to: Optional[str] = typer.Option(None, "--speed-to",
                                               help='Highest sweep speed, e.g. "12000 rpm".'),
        orders: Optional[str] = typer.Option(
            None, "--orders", help="Excitation orders, comma separated, e.g. 1,2."),
        margin_rule: Optional[str] = MARGIN_RULE,
        margin_below: Optional[float] = MARGIN_BELOW,
        margin_above: Optional[float] = MARGIN_ABOVE,
        stability_rule: Optional[str] = STABILITY_RULE,
        min_log_dec: Optional[float] = MIN_LOG_DEC,
        jobs: Optional[int] = typer.Option(None, "--jobs", min=0, help=JOBS_HELP),
    ):
        result = run(case, plot_path, json_path, csv_path, name, jobs, speed_count=speed_count,
                     speed_to=speed_to, orders=orders, margin_rule=margin_rule,
                     margin_below=margin_below, margin_above=margin_above,
                     stability_rule=stability_rule, min_log_dec=min_log_dec)
        if gate and not result.passed:
            raise typer.Exit(exit_code(result))

    return command


def register(app: typer.Typer):
    doc = "Critical speeds (forward/backward, log dec) and their separation margins."
    app.command("criticals", help=doc + "\n\n" + EXAMPLE)(make_command("criticals", gate=False))
