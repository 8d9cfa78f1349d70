"""``rotorcalc levers``: what moves each critical speed most, bearing stiffness or disk
mass."""

from __future__ import annotations

import time
from pathlib import Path
from typing import Optional

import typer

from ..analysis.margins import CAUTION
from ..tables import SENSITIVITY_COLUMNS
from ..units import to_rpm
from .common import console, input_errors, load, print_table, print_warnings, write_outputs
from .criticals import apply_overrides
from .whatif_common import (busy, check_outputs, command_help, with_sources_option,
                            without_response)

LEVERS_EXAMPLE = "[bold]Example[/]: rotorcalc levers cases/compressor.toml --csv levers.csv"


def command(
    case: Path = typer.Argument(..., help="Rotor description (TOML)."),
    near: Optional[float] = typer.Option(
        None, "--near-fraction", min=0.0,
        help="Only criticals within this fraction of the operating range's ends, e.g. 0.3."),
    every: bool = typer.Option(False, "--all",
                               help="Also the criticals that need no margin (critically "
                                    "damped, or backward ones that are not judged); slower, "
                                    "and for heavily damped ones the numbers describe the "
                                    "damped frequency, not a resonance."),
    differences: bool = typer.Option(
        False, "--differences",
        help="Central differences of perturbed rotors (four screenings per lever and "
             "critical), checked at half the step, instead of eigenvalue derivatives; slower."),
    step: float = typer.Option(0.01, "--relative-step", min=1e-4, max=0.2,
                               help="Relative step of the central difference (0.01 = 1 %), "
                                    "with --differences."),
    speed_count: Optional[int] = typer.Option(None, "--speed-count", min=3,
                                              help="Number of sweep speeds for the criticals."),
    with_sources: bool = with_sources_option(),
    json_path: Optional[Path] = typer.Option(None, "--json",
                                             help="Write the sensitivities as JSON."),
    csv_path: Optional[Path] = typer.Option(None, "--csv",
                                            help="Write the sensitivities as CSV."),
):
    """Levers: per cent change of each critical speed per per cent change of each bearing's
    direct stiffness (kxx and kyy together) and of each disk's mass, biggest lever first."""
    rotor = apply_overrides(load(case), speed_count=speed_count)
    check_outputs(case, {"--json": json_path, "--csv": csv_path})
    from ..analysis import screen
    from ..analysis.whatif import levers, what_if_rotor
    started = time.perf_counter()
    chosen = what_if_rotor(without_response(rotor), with_sources)
    with busy("finding the critical speeds and their levers"), input_errors():
        result = screen(chosen)
        table = levers(chosen, result.criticals, step=step, near=near, every=every,
                       method="difference" if differences else "derivative")
    elapsed = time.perf_counter() - started
    rows = table.rows
    op = rotor.operating
    if rows:
        print_table(f"{rotor.name}: levers on the critical speeds (operating range "
                    f"{to_rpm(op.min_speed):.0f}-{to_rpm(op.max_speed):.0f} rpm)",
                    SENSITIVITY_COLUMNS, rows,
                    caption=table.caption())
    else:
        console.print("No critical speed needs a margin here (all critically damped, not "
                      "judged, or outside --near-fraction); --all includes them.")
    console.print(f"[dim]{len(rows)} levers in {elapsed:.1f} s. {CAUTION}[/]", highlight=False)
    print_warnings(result.sweep.warnings)
    write_outputs("levers", case, table.to_dict, result.sweep.warnings, json_path, csv_path,
                  SENSITIVITY_COLUMNS, rows)


def register(app: typer.Typer):
    app.command("levers", help=command_help(command, LEVERS_EXAMPLE))(command)
