"""``rotorcalc response``: unbalance response, peaks, amplification factors and limits."""

from __future__ import annotations

from pathlib import Path
from typing import Optional

import typer

from ..analysis.response import limits_caption, unbalance_response
from ..errors import InputError
from ..tables import (LIMIT_COLUMNS, PEAK_COLUMNS, UNBALANCE_COLUMNS, response_columns,
                      response_rows, unbalance_rows)
from ..units import to_rpm
from ..standards import RESIDUAL_RULE_TEXT
from .common import (check_output, console, fail_input, input_errors, load, print_table,
                     print_warnings, save_figure, speed_option, write_outputs)

EXAMPLE = ("[bold]Example[/]: rotorcalc response cases/compressor.toml --plot-bode bode.png "
           "--plot-polar polar.png --plot-orbits orbits.png --orbit-speeds \"11500 rpm\"")


def command(
    case: Path = typer.Argument(..., help="Rotor description (TOML) with \\[unbalance.NAME] cases."),
    name: Optional[str] = typer.Option(None, "--unbalance",
                                       help="Unbalance case (its name in the file) to draw "
                                            "(default: the first)."),
    bode: Optional[Path] = typer.Option(
        None, "--plot-bode", help="Write Bode plots (amplitude and phase) of every probe."),
    polar: Optional[Path] = typer.Option(None, "--plot-polar",
                                         help="Write polar plots of every probe."),
    orbits: Optional[Path] = typer.Option(
        None, "--plot-orbits", help="Write orbit ellipses at the --orbit-speeds."),
    at: Optional[str] = typer.Option(
        None, "--orbit-speeds", help='Orbit speeds, comma separated, e.g. "3000 rpm, 3600 rpm" '
                                     '(default: maximum continuous speed).'),
    json_path: Optional[Path] = typer.Option(None, "--json", help="Write every response curve, peak and check as JSON."),
    csv_path: Optional[Path] = typer.Option(None, "--csv", help="Write the probe curves (one row per case, speed and probe) as CSV."),
):
    """Unbalance response: probe amplitudes and phases, peaks with amplification factors,
    vibration and clearance checks at running speeds."""
    rotor = load(case)
    for path, opt in ((bode, "--plot-bode"), (polar, "--plot-polar"), (orbits, "--plot-orbits"),
                      (json_path, "--json"), (csv_path, "--csv")):
        check_output(path, case, opt)
    with input_errors():
        result = unbalance_response(rotor)
    if name is None:
        index = 0
    elif name in result.cases:
        index = result.cases.index(name)
    else:
        fail_input(InputError("--unbalance", "names no unbalance case of the file", value=name,
                              expected="one of " + ", ".join(result.cases), kind="choice"))
    speeds = [rotor.operating.max_speed]
    if at is not None:
        speeds = [speed_option(part, "--orbit-speeds") for part in at.split(",")]
    print_table(f"{rotor.name}: unbalance applied", UNBALANCE_COLUMNS, unbalance_rows(rotor),
                caption=f"Residual: {RESIDUAL_RULE_TEXT}.")
    print_table(f"{rotor.name}: unbalance response peaks", PEAK_COLUMNS, result.peaks,
                caption="AF = peak speed / half-power bandwidth (0.707 of the peak).")
    unsteady = result.unsteady_peak_speeds
    if unsteady:
        console.print("[yellow]note[/] the peaks at " + ", ".join(
            f"{to_rpm(w):.0f}" for w in unsteady) + " rpm lie where a mode is unstable: no "
            "steady state, so no margin takes its amplification factor from them",
            highlight=False)
    if result.vibration or result.clearance:
        print_table("Vibration (operating range) and clearance (up to trip)", LIMIT_COLUMNS,
                    result.vibration + result.clearance,
                    caption=limits_caption(rotor))
    if not result.steady:
        console.print("[bold red]no steady state[/] a mode is unstable at "
                      + ", ".join(f"{to_rpm(lo):.0f}-{to_rpm(hi):.0f} rpm"
                                  for lo, hi in result.unstable_ranges)
                      + ": the response there is not physical and the limits cannot be "
                        "judged", highlight=False)
    verdict = ("[green]within limits[/]" if result.passed else
               "[bold red]limits EXCEEDED[/]" if result.steady else
               "[bold red]NOT VALID[/]: unstable, no steady state")
    console.print(f"Verdict: {verdict}")
    print_warnings(result.warnings)
    rows = [r for i in range(len(result.cases)) for r in response_rows(result, i)]
    write_outputs("response", case, result.to_dict, result.warnings, json_path, csv_path,
                  response_columns(result), rows)
    if bode is not None or polar is not None or orbits is not None:
        from .. import plotting
        if bode is not None:
            save_figure(plotting.plot_bode(result, index, operating=rotor.operating).figure, bode)
        if polar is not None:
            save_figure(plotting.plot_polar(result, index).figure, polar)
        if orbits is not None:
            with input_errors():
                at_speeds = unbalance_response(rotor, speeds=speeds,
                                               cases=[rotor.unbalance[index]], unstable=())
            save_figure(plotting.plot_orbits(at_speeds, 0).figure, orbits)


def register(app: typer.Typer):
    app.command("response", help=" ".join(command.__doc__.split()) + "\n\n" + EXAMPLE)(command)
