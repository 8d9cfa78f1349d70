"""``rotorcalc criticals``: critical speeds with their separation margins."""

from __future__ import annotations

import dataclasses
from pathlib import Path
from typing import Optional

import typer

from rich.markup import escape

from ..analysis.margins import CAUTION
from ..errors import InputError
from ..model import LIMITS, MARGIN_RULES, STABILITY_RULES, MarginRule, StabilityRule
from ..analysis.stability import describe_mode
from ..tables import LIMIT_COLUMNS, STABILITY_COLUMNS, margin_columns
from ..units import to_rpm
from .common import (EXIT_CHECK_FAILED, EXIT_NOT_COVERED, EXIT_OK, JOBS_HELP, screen_case,
                     console, input_errors, load, print_table, print_warnings, save_figure,
                     speed_option, write_outputs)

EXAMPLE = """[bold]Example[/]: rotorcalc criticals cases/feed_pump.toml --map pump-map.png --json pump.json"""

STABILITY_HELP = ("Stability rule from the minimum speed up to trip: positive (every log "
                  "decrement above 0; undamped is marginal and fails), at-least (--min-log-dec) "
                  "or none.")
RULE_HELP = ("Margin rule: af-curve (amplification-factor rule with its caps, common "
             "practice, from memory), fixed (--below/--above per cent) or none.")


def apply_overrides(rotor, points=None, top=None, orders=None, rule=None, below=None,
                    above=None, stability=None, min_log_dec=None):
    """Copy of ``rotor`` with command-line overrides of its analysis settings."""
    s = rotor.settings
    changes = {}
    with input_errors():
        if points is not None:
            if points > LIMITS["speed count"]:
                raise InputError("--points", "is more speeds than a sweep needs", value=points,
                                 expected=f"at most {LIMITS['speed count']}", kind="option")
            changes["speed_count"] = points
        if top is not None:
            changes["speed_to"] = speed_option(top, "--to")
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
        if rule is not None or below is not None or above is not None:
            r = s.margin_rule
            changes["margin_rule"] = dataclasses.replace(
                r, kind=rule or r.kind, below=r.below if below is None else below,
                above=r.above if above is None else above)
        if min_log_dec is not None and stability not in (None, "at-least"):
            raise InputError("--min-log-dec", f"has no effect with --stability {stability}",
                             value=min_log_dec, expected="--stability at-least, or no "
                             "--stability", kind="option")
        if stability is not None and stability not in STABILITY_RULES:
            raise InputError("--stability", "is not a known rule", value=stability,
                             expected=" or ".join(STABILITY_RULES), kind="choice")
        if rule is not None and rule not in MARGIN_RULES:
            raise InputError("--rule", "is not a known rule", value=rule,
                             expected=" or ".join(MARGIN_RULES), kind="choice")
        if stability is not None or min_log_dec is not None:
            r = s.stability
            changes["stability"] = StabilityRule(
                kind=stability or ("at-least" if min_log_dec is not None else r.kind),
                minimum=r.minimum if min_log_dec is None else min_log_dec)
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
    rule_text = f"Margin rule: {rule.describe()} ({rule.label})."
    if rule.kind == "af-curve":
        rule_text += " AF estimated from log dec as pi/delta."
    j = table.judgement
    judged = ("every whirl" if j.judge_share == 0 else f"forward share above {j.judge_share:g}")
    rule_text += (f" Judged: {judged}; damping ratio "
                  f"{j.overdamped_ratio:g} or more is overdamped, not a critical.")
    if not table.rows:
        console.print(f"{escape(title)}\nNo critical speed found up to "
                      f"{to_rpm(table.verified_above_to):.0f} rpm.")
    else:
        if table.has_response:
            rule_text += (" 'resp.' columns: the response peak matched to each critical by mode "
                          "shape, its AF (half-power bandwidth) and the margin from the peak.")
        print_table(title, margin_columns(table, terse=True), table.rows,
                    caption=None if brief else rule_text)
    stab = result.stability
    if stab is not None:
        print_table(f"Stability from the minimum speed up to trip: "
                    f"{to_rpm(stab.judged_range[0]):.0f}-{to_rpm(stab.judged_range[1]):.0f} rpm",
                    STABILITY_COLUMNS, stab.modes,
                    caption=None if brief else
                    f"Stability rule: {stab.rule.describe()} ({stab.rule.label}).")
        for m in stab.failing:
            console.print(f"[bold red]stability fails[/] {escape(describe_mode(m))}",
                          highlight=False)
        if stab.divergent_speeds:
            console.print("[bold red]unstable[/] a non-oscillating motion grows at "
                          f"{len(stab.divergent_speeds)} speeds (first at "
                          f"{to_rpm(stab.divergent_speeds[0]):.0f} rpm)", highlight=False)
    response = result.response
    if response is not None and (response.vibration or response.clearance):
        print_table("Unbalance response: vibration (operating range) and clearance (up to trip)",
                    LIMIT_COLUMNS, response.vibration + response.clearance,
                    caption=None if brief else response_caption(rotor))
        if not response.steady:
            console.print("[bold red]no steady state[/] a mode is unstable at "
                          + ", ".join(f"{to_rpm(lo):.0f}-{to_rpm(hi):.0f} rpm"
                                      for lo, hi in response.unstable_ranges)
                          + ": the unbalance response there is not physical", highlight=False)
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


def response_caption(rotor):
    """The vibration and clearance rules, from the same formulas the checks use."""
    from ..analysis.response import vibration_limit
    limit = vibration_limit(rotor) * 1e6
    if rotor.response.vibration_limit is not None:
        vib = f"Vibration limit {limit:.1f} um pk-pk (set in the rotor file)"
    else:
        vib = (f"Vibration limit 25.4*sqrt(12000/N) um pk-pk with N the maximum continuous "
               f"speed, at most 25.4 um: {limit:.1f} um (common practice, from memory)")
    return (f"{vib}; clearance limit {rotor.response.clearance_share:.0%} of the radial "
            "clearance from the lowest analysed speed up to trip (common practice, from "
            "memory).")


def run(case, map_path, json_path, csv_path, points, top, orders, rule, below, above, command,
        workers=None, stability=None, min_log_dec=None):
    rotor = apply_overrides(load(case), points=points, top=top, orders=orders, rule=rule,
                            below=below, above=above, stability=stability,
                            min_log_dec=min_log_dec)
    result = screen_case(rotor, case, {"--map": map_path, "--json": json_path, "--csv": csv_path},
                         workers)
    print_margins(result)
    document = result.to_dict()   # the same document as `sweep` writes
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


def exit_code(result):
    """The gate's exit code: 0 pass, 1 a check failed, 5 not covered (nothing failed)."""
    return {"pass": EXIT_OK, "fail": EXIT_CHECK_FAILED, "incomplete": EXIT_NOT_COVERED}[
        result.verdict]


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
        stability: Optional[str] = typer.Option(None, "--stability", help=STABILITY_HELP),
        min_log_dec: Optional[float] = typer.Option(
            None, "--min-log-dec",
            help="Least log decrement every mode needs up to trip (implies --stability "
                 "at-least; 0.1 is common practice, from memory)."),
        jobs: Optional[int] = typer.Option(None, "--jobs", min=0, help=JOBS_HELP),
    ):
        result = run(case, map_path, json_path, csv_path, points, top, orders, rule, below, above,
                     name, jobs, stability, min_log_dec)
        if gate and not result.passed:
            raise typer.Exit(exit_code(result))

    return command


def register(app: typer.Typer):
    doc = "Critical speeds (forward/backward, log dec) and their separation margins."
    app.command("criticals", help=doc + "\n\n" + EXAMPLE)(make_command("criticals", gate=False))
