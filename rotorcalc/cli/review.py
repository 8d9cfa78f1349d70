"""``rotorcalc review``: the design-review report, one self-contained HTML file."""

from __future__ import annotations

import shlex
import subprocess
import sys
from pathlib import Path
from typing import Optional

import typer
from rich.markup import escape

from ..errors import InputError
from ..vocabulary import CAUTION
from .common import (EXIT_OUTPUT, SweepProgress, console, errors, fail_input, input_errors,
                     load, output_errors, renamed_notes)
from .criticals import (MARGIN_ABOVE, MARGIN_BELOW, MARGIN_RULE, MIN_LOG_DEC, STABILITY_RULE,
                        apply_overrides)
from .whatif_common import check_outputs

EXAMPLE = ("[bold]Example[/]: rotorcalc review cases/compressor.toml -o compressor-review.html "
           "--variants cases/compressor_variants.toml --pdf compressor-review.pdf")


def _variants(case, path):
    """The variants of a variants file whose base is ``case``."""
    from ..variants import read_variants
    with input_errors(), renamed_notes():
        base_path, _, variants = read_variants(path)
    if Path(base_path).resolve() != Path(case).resolve():
        fail_input(InputError("--variants", f"varies {base_path}, not the rotor of the report",
                              value=str(path), expected=f"a variants file with base = the "
                              f"file {case}", kind="option"))
    return variants


def command(
    case: Path = typer.Argument(..., help="Rotor description (TOML)."),
    out: Path = typer.Option(..., "--out", "-o", help="The report (.html)."),
    variants_path: Optional[Path] = typer.Option(
        None, "--variants", help="A variants file of this rotor: its variants are screened "
                                 "and shown side by side."),
    pdf: Optional[Path] = typer.Option(
        None, "--pdf", help="Also print the report to this PDF with a headless browser "
                            "(Chromium), when one is installed."),
    paper: str = typer.Option("A4", "--paper", help="Paper size of the print stylesheet: A4 "
                                                    "or letter."),
    speed_count: Optional[int] = typer.Option(None, "--speed-count", min=3,
                                              help="Number of sweep speeds."),
    margin_rule: Optional[str] = MARGIN_RULE,
    margin_below: Optional[float] = MARGIN_BELOW,
    margin_above: Optional[float] = MARGIN_ABOVE,
    stability_rule: Optional[str] = STABILITY_RULE,
    min_log_dec: Optional[float] = MIN_LOG_DEC,
    jobs: int = typer.Option(2, "--jobs", min=1, help="Processes sharing the work (the "
                             "pictures, the variants; 1: all in this one). The report does "
                             "not depend on it."),
):
    """The design-review report: every analysis the rotor file asks for (statics and
    bearings, sweep, critical speeds and margins, stability, unbalance response, the
    variants of --variants) in one self-contained HTML file to read in any browser or print
    to PDF. Informational: exits 0 whatever the verdict ('check' is the gate)."""
    from ..report import PAPERS, InputFile, Provenance, write_review
    if paper not in PAPERS:
        fail_input(InputError("--paper", "is not a paper size of the report", value=paper,
                              expected=" or ".join(PAPERS), kind="choice"))
    if out.suffix.lower() not in (".html", ".htm"):
        fail_input(InputError("--out", "must be an HTML file", value=str(out),
                              expected="a name ending in .html", kind="output"))
    outputs = {"--out": out, "--pdf": pdf}
    check_outputs(case, outputs)
    rotor = apply_overrides(load(case), speed_count=speed_count, margin_rule=margin_rule,
                            margin_below=margin_below, margin_above=margin_above,
                            stability_rule=stability_rule, min_log_dec=min_log_dec)
    inputs = [InputFile.read(case)]
    variants = ()
    if variants_path is not None:
        check_outputs(variants_path, outputs)
        variants = _variants(case, variants_path)
        inputs.append(InputFile.read(variants_path))
    provenance = Provenance.now(inputs, shlex.join(["rotorcalc", *sys.argv[1:]]))
    progress = SweepProgress()
    try:
        with input_errors():
            review, html = write_review(rotor, provenance, variants, workers=jobs, paper=paper,
                                        progress=progress)
    finally:
        progress.close()
    with output_errors(out):
        from ..output import atomic_write
        atomic_write(out, html)
    verdict = {"pass": "[green]every check met[/]", "fail": "[bold red]a check FAILED[/]",
               "incomplete": "[bold red]NOT COVERED[/]"}[review.verdict]
    console.print(f"{escape(rotor.name)}: {verdict}; {len(review.findings)} item(s) failed "
                  "or not covered (listed on the report's summary page)", highlight=False)
    console.print(f"wrote {escape(str(out))}", highlight=False)
    console.print(f"[dim]{CAUTION}[/]", highlight=False)
    if pdf is not None and not _print_pdf(out, pdf):
        raise typer.Exit(EXIT_OUTPUT)


def _print_pdf(page, pdf):
    """Print the report to PDF; False (said why) when it cannot."""
    from ..report.browser import BrowserMissing, print_pdf
    try:
        with output_errors(pdf):
            print_pdf(page, pdf)
    except BrowserMissing as exc:
        errors.print(f"[bold red]no PDF[/] {escape(str(exc))}: the HTML report is written; "
                     f"open {escape(str(page))} in a browser and print it to PDF (the page "
                     "has a print stylesheet), or install Chromium.", highlight=False,
                     soft_wrap=True)
        return False
    except (RuntimeError, subprocess.TimeoutExpired) as exc:
        errors.print(f"[bold red]no PDF[/] {escape(str(exc))}", highlight=False, soft_wrap=True)
        return False
    console.print(f"wrote {escape(str(pdf))}", highlight=False)
    return True


def register(app: typer.Typer):
    doc = " ".join(command.__doc__.split())
    app.command("review", help=doc + "\n\n" + EXAMPLE)(command)
