"""``rotorcalc levers``: what moves each critical speed most, bearing stiffness or disk
mass."""

from __future__ import annotations

import math
import time
from pathlib import Path
from typing import Optional

import typer

from ..analysis.margins import CAUTION
from ..tables import SENSITIVITY_COLUMNS
from ..units import to_rpm
from .common import console, input_errors, load, print_table, print_warnings, write_outputs
from .criticals import apply_overrides
from .whatif_common import busy, check_outputs, command_help, without_response

LEVERS_EXAMPLE = "[bold]Example[/]: rotorcalc levers cases/compressor.toml --csv levers.csv"


def ranked(sensitivities):
    """(rank, Sensitivity) rows: criticals by speed, the biggest lever of each first."""
    groups = {}
    for s in sensitivities:
        groups.setdefault(id(s.critical), []).append(s)
    rows = []
    for group in sorted(groups.values(), key=lambda g: g[0].critical.speed):
        group.sort(key=lambda s: -abs(s.value) if s.value is not None else math.inf)
        rows += list(enumerate(group, start=1))
    return rows


def command(
    case: Path = typer.Argument(..., help="Rotor description (TOML)."),
    near: Optional[float] = typer.Option(
        None, "--near", min=0.0,
        help="Only criticals within this fraction of the operating range's ends, e.g. 0.3."),
    every: bool = typer.Option(False, "--all",
                               help="Also the criticals that need no margin (critically "
                                    "damped, or backward ones that are not judged); slower, "
                                    "and for heavily damped ones the numbers describe the "
                                    "damped frequency, not a resonance."),
    step: float = typer.Option(0.01, "--step", min=1e-4, max=0.2,
                               help="Relative step of the central difference (0.01 = 1 %)."),
    points: Optional[int] = typer.Option(None, "--points", min=3,
                                         help="Number of sweep speeds for the criticals."),
    json_path: Optional[Path] = typer.Option(None, "--json",
                                             help="Write the sensitivities as JSON."),
    csv_path: Optional[Path] = typer.Option(None, "--csv",
                                            help="Write the sensitivities as CSV."),
):
    """Levers: per cent change of each critical speed per per cent change of each bearing's
    direct stiffness (kxx and kyy together) and of each disk's mass, biggest lever first."""
    rotor = apply_overrides(load(case), points=points)
    check_outputs(case, {"--json": json_path, "--csv": csv_path})
    from ..analysis import screen
    from ..analysis.whatif import sensitivities
    started = time.perf_counter()
    chosen = without_response(rotor)
    with busy("finding the critical speeds and their levers"), input_errors():
        result = screen(chosen)
        levers = sensitivities(chosen, result.criticals, step=step, near=near, every=every)
    elapsed = time.perf_counter() - started
    rows = ranked(levers)
    op = rotor.operating
    if rows:
        print_table(f"{rotor.name}: levers on the critical speeds (operating range "
                    f"{to_rpm(op.min_speed):.0f}-{to_rpm(op.max_speed):.0f} rpm)",
                    SENSITIVITY_COLUMNS, rows,
                    caption=f"% per %: per cent change of the critical per per cent change of "
                            f"the lever, central difference with a {step:.1%} step; 'Half "
                            f"step' repeats it with half the step (agreement verifies it). "
                            f"'rpm for +10 %' is the linear estimate.")
    else:
        console.print("No critical speed needs a margin here (all critically damped, not "
                      "judged, or outside --near); --all includes them.")
    console.print(f"[dim]{len(rows)} levers in {elapsed:.1f} s. {CAUTION}[/]", highlight=False)
    document = {"criticals_considered": "all" if every else "those that need a margin",
                "near": near, "step": step,
                "sensitivities": [dict(s.to_dict(), rank=rank) for rank, s in rows],
                "caution": CAUTION}
    print_warnings(result.sweep.warnings)
    write_outputs("levers", case, document, result.sweep.warnings, json_path, csv_path,
                  SENSITIVITY_COLUMNS, rows)


def register(app: typer.Typer):
    app.command("levers", help=command_help(command, LEVERS_EXAMPLE))(command)
