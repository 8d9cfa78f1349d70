"""``rotorcalc compare``: a rotor and its variants (a variants file or ``--vary``), side by
side."""

from __future__ import annotations

import time
from pathlib import Path
from typing import List, Optional

import typer
from rich.markup import escape

from ..analysis.margins import CAUTION
from ..analysis.whatif import MATCH_CAPTION
from ..captions import comparison_notes, merged_warnings, variant_summary, variants_title
from ..errors import InputError
from ..output import file_hash
from ..reader import load_toml
from ..tables import comparison_columns
from .common import (SCREENINGS_JOBS_HELP, console, fail_input, input_errors, load,
                     print_table, print_warnings, renamed_notes, save_figure, write_outputs)
from .criticals import apply_overrides
from .whatif_common import (check_outputs, command_help, plotting_function, progress_bar,
                            with_sources_option)

COMPARE_EXAMPLE = ("[bold]Example[/]: rotorcalc compare cases/feed_pump_variants.toml "
                   "--plot variants.png --csv variants.csv")


def read_study(path, vary):
    """(case file for provenance, base path, rotor, variants) from a variants file or a rotor
    file plus ``--vary`` options."""
    from ..variants import apply_variant, read_variants, variant_from_option
    with input_errors():
        try:
            data = load_toml(path.read_text(encoding="utf-8-sig"), str(path))
        except (OSError, UnicodeDecodeError):
            data = {}  # let the reader report the file
        if "base" in data:
            with renamed_notes():
                base_path, rotor, variants = read_variants(path)
        else:
            base_path, rotor, variants = path, load(path), ()
        extra = tuple(variant_from_option(text, i) for i, text in enumerate(vary))
        for i, variant in enumerate(extra):
            try:
                apply_variant(rotor, variant)  # a change that does not fit: report it now
            except InputError as err:
                if err.key.startswith("--vary"):
                    raise
                # the rebuilt model names its own key (operating.trip_speed): say which option
                raise err.with_location(file=f"--vary[{i}] ({variant.name})") from None
    variants = variants + extra
    if not variants:
        fail_input(InputError("--vary", "is needed: the file is a rotor, not a variants file",
                              value=str(path), expected='a variants file (with base = "...") '
                              'or --vary "NAME: bearing.*.k *= 0.7"', kind="missing"))
    seen = {"base"}
    for i, v in enumerate(variants):
        if v.name in seen:
            fail_input(InputError(f"variant[{i}].name", "is used twice or is 'base' (the "
                                  "name of the rotor as described)", value=v.name,
                                  expected="a name of its own for each variant",
                                  kind="duplicate"))
        seen.add(v.name)
    return base_path, rotor, variants


def command(
    case: Path = typer.Argument(..., help='A variants file (TOML with base = "rotor.toml" and '
                                          '[[variant]] tables) or a rotor file with --vary.'),
    vary: Optional[List[str]] = typer.Option(
        None, "--vary", help='A variant "NAME: change; change", e.g. "worn: bearing.*.k *= 0.6; '
                             'bearing.*.c *= 0.7"; may be repeated.'),
    speed_count: Optional[int] = typer.Option(None, "--speed-count", min=3,
                                              help="Number of sweep speeds per screening."),
    plot: Optional[Path] = typer.Option(None, "--plot",
                                        help="Write the overlaid whirl-speed maps."),
    with_sources: bool = with_sources_option(),
    json_path: Optional[Path] = typer.Option(None, "--json",
                                             help="Write the comparison as JSON."),
    csv_path: Optional[Path] = typer.Option(None, "--csv", help="Write the comparison as CSV."),
    jobs: int = typer.Option(0, "--jobs", min=0, help=SCREENINGS_JOBS_HELP),
):
    """Compare variants of one rotor: every critical speed of the rotor as described ('base')
    and of each variant, with whirl, log dec, margin, verdict and the change against the base.
    Informational: exits 0 whatever the verdicts."""
    check_outputs(case, {"--plot": plot, "--json": json_path, "--csv": csv_path})
    base_path, rotor, variants = read_study(case, vary or [])
    check_outputs(base_path, {"--plot": plot, "--json": json_path, "--csv": csv_path})
    rotor = apply_overrides(rotor, speed_count=speed_count)
    from ..analysis.whatif import compare
    started = time.perf_counter()
    with progress_bar(f"screening the base and {len(variants)} variant(s)",
                      len(variants) + 1) as bar, \
            input_errors():
        comparison = compare(rotor, variants, progress=bar, with_sources=with_sources,
                             workers=jobs)
    elapsed = time.perf_counter() - started
    warnings = print_comparison(rotor, comparison, variants)
    console.print(f"[dim]{len(comparison.names)} screenings in {elapsed:.1f} s. {CAUTION}[/]",
                  highlight=False)
    def document():
        made = comparison.to_dict()
        made["base_file"] = {"path": str(base_path), "sha256": file_hash(base_path)}
        return made

    write_outputs("compare", case, document, warnings, json_path, csv_path,
                  comparison_columns(comparison), comparison.rows)
    if plot is not None:
        draw = plotting_function("plot_variant_maps")
        if draw is not None:
            drawing = draw(comparison, operating=rotor.operating)
            save_figure(drawing.figure, plot)


def print_comparison(rotor, comparison, variants, base_label="base",
                     base_text="the rotor as described"):
    """The summary and critical-speed tables of a comparison, its notes and warnings
    (returned, for the JSON)."""
    columns, summary, caption = variant_summary(comparison, variants, base_label, base_text)
    print_table(f"{rotor.name}: variants", columns, summary, caption=caption)
    print_table(variants_title(rotor.operating), comparison_columns(comparison), comparison.rows,
                caption=MATCH_CAPTION)
    for note in comparison_notes(comparison):
        console.print(f"[yellow]note[/] {escape(note)}", highlight=False)
    warnings = merged_warnings(comparison)
    print_warnings(warnings)
    return warnings


def register(app: typer.Typer):
    app.command("compare", help=command_help(command, COMPARE_EXAMPLE))(command)
