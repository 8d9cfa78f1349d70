"""``rotorcalc fleet``: the design gate over many rotor files, one summary table."""

from __future__ import annotations

from pathlib import Path
from typing import List, Optional

import typer
from rich.markup import escape

from ..vocabulary import CAUTION
from .common import console, input_errors, print_table, write_outputs

EXAMPLE = ("[bold]Example[/]: rotorcalc fleet cases/ --jobs 2 --csv fleet.csv || echo "
           "'a rotor fails'\n\nExit codes as check's, the worst file's: 1 a check failed, 3 a "
           "numerical failure, 2 a file is bad input, 5 not covered, 0 every rotor passes.")


def command(
    paths: List[Path] = typer.Argument(..., help="Rotor files, or folders searched for "
                                                 "*.toml (variants and study files skipped)."),
    jobs: int = typer.Option(0, "--jobs", min=0, help="Local worker processes (0: one per "
                             "core); with --scheduler local, the LocalCluster's workers."),
    scheduler: Optional[str] = typer.Option(
        None, "--scheduler", help="Screen on a Dask scheduler: its address or 'local'."),
    json_path: Optional[Path] = typer.Option(None, "--json", help="Write the table as JSON."),
    csv_path: Optional[Path] = typer.Option(None, "--csv", help="Write the table as CSV."),
):
    """Fleet screening: every rotor file screened as 'check' does, one row each (file,
    verdict, the first item that failed or was not covered); exits non-zero when any
    rotor fails or cannot be judged."""
    from ..analysis.fleet import exit_code, rotor_files, screen_files
    from ..executor import make_executor
    from ..tables import Column
    from .whatif_common import progress_bar
    files = rotor_files(paths)
    if not files:
        from ..errors import InputError
        from .common import fail_input
        fail_input(InputError("paths", "hold no rotor file", value=", ".join(map(str, paths)),
                              expected="rotor files, or folders with *.toml rotor files",
                              kind="missing"))
    with input_errors(), make_executor(jobs, scheduler) as executor, \
            progress_bar("screening rotors", len(files)) as bar:
        rows = screen_files(files, executor, bar)
    columns = [Column("File", lambda r: r.path, "{}", "file"),
               Column("Rotor", lambda r: r.name, "{}", "rotor"),
               Column("Verdict", lambda r: r.verdict, "{}", "verdict"),
               Column("Items", lambda r: r.items, "{:d}", "items"),
               Column("First item that failed or was not covered", lambda r: r.first, "{}",
                      "first_item")]
    print_table(f"{len(rows)} rotors screened on {executor.name}", columns, rows,
                caption="Each file judged as 'rotorcalc check FILE' judges it; "
                        "'rotorcalc check' or 'review' on a file shows every item.")
    code = exit_code(rows)
    console.print(f"[dim]{CAUTION}[/]", highlight=False)
    write_outputs("fleet", files[0], {"rotors": [r.to_dict() for r in rows], "exit_code": code,
                                      "caution": CAUTION}, (), json_path, csv_path, columns,
                  rows, inputs=files)
    if code:
        failing = [r for r in rows if r.verdict != "pass"]
        console.print(f"[bold red]{len(failing)} of {len(rows)} rotors did not pass[/] "
                      f"(exit {code})", highlight=False)
        raise typer.Exit(code)


def register(app: typer.Typer):
    doc = " ".join(command.__doc__.split())
    app.command("fleet", help=escape(doc) + "\n\n" + EXAMPLE)(command)
