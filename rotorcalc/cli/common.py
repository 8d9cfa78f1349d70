"""Shared pieces of the command line: loading, errors, progress, output files."""

from __future__ import annotations

import functools
import time
from contextlib import contextmanager
from pathlib import Path

import typer
from rich.console import Console
from rich.markup import escape
from rich.table import Table

from .. import units as u
from ..errors import InputError, RotorcalcError, SolverError
from ..output import envelope, file_hash, write_csv, write_json
from ..reader import read_rotor
from ..tables import rows_csv

console = Console()
if not console.is_terminal:
    console = Console(width=160)  # pipes and files: wide enough for the margin table
errors = Console(stderr=True)

#: Exit codes (docs/usage.md): 0 every check met, 1 a check failed, 2 bad input,
#: 3 a numerical failure, 4 an output could not be written, 5 the analysis does not
#: cover everything the check must judge (nothing failed in what it did cover).
EXIT_OK, EXIT_CHECK_FAILED, EXIT_BAD_INPUT = 0, 1, 2
EXIT_NUMERICAL, EXIT_OUTPUT, EXIT_NOT_COVERED = 3, 4, 5
#: An error of rotorcalc itself (a defect): never 1, which a script reads as "a check failed".
EXIT_INTERNAL = 70

REPORT = ("This is a defect of rotorcalc, not of your rotor: please report it with the command "
          "line, the rotor file and this message (rotorcalc {version}, Python {python}).")


def guarded(command):
    """Wrap a command so that no exception ends in a traceback.

    The package's own errors keep their exit codes (bad input 2, numerical
    failure 3); an output that cannot be written is 4; anything else is a
    defect of the tool: one paragraph saying so, and exit code 70.
    """
    @functools.wraps(command)
    def run(*args, **kwargs):
        try:
            with input_errors():   # the package's own errors: codes 2 and 3
                return command(*args, **kwargs)
        except (typer.Exit, typer.Abort, SystemExit, KeyboardInterrupt):
            raise
        except MemoryError:
            errors.print("[bold red]Out of memory[/] the model is too large for this machine; "
                         "use fewer elements or speeds.", highlight=False, soft_wrap=True)
            raise typer.Exit(EXIT_NUMERICAL)
        except Exception as exc:  # a defect: said plainly, never a traceback
            import platform
            from .. import __version__
            what = f"{type(exc).__name__}: {exc}"
            if len(what) > 300:
                what = what[:297] + "..."
            errors.print(f"[bold red]Internal error[/] {escape(what)}. " + escape(REPORT.format(
                version=__version__, python=platform.python_version())), highlight=False,
                soft_wrap=True)
            raise typer.Exit(EXIT_INTERNAL)
    return run


def fail_input(err: InputError):
    errors.print(f"[bold red]Input error[/] {escape(err.message())}", highlight=False,
                 soft_wrap=True)
    raise typer.Exit(EXIT_BAD_INPUT)


@contextmanager
def input_errors():
    """Turn the package's input errors into a one-paragraph message and exit code 2."""
    try:
        yield
    except InputError as err:
        fail_input(err)
    except SolverError as err:
        errors.print(f"[bold red]Numerical failure[/] {escape(str(err))}", highlight=False,
                     soft_wrap=True)
        raise typer.Exit(EXIT_NUMERICAL)
    except RotorcalcError as err:
        errors.print(f"[bold red]Error[/] {escape(str(err))}", highlight=False, soft_wrap=True)
        raise typer.Exit(EXIT_NUMERICAL)


@contextmanager
def renamed_notes():
    """Old spellings read inside the block are noted on stderr, once each."""
    import warnings
    from ..vocabulary import RenamedWarning
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always", RenamedWarning)
        yield
    for text in dict.fromkeys(str(w.message) for w in caught
                              if issubclass(w.category, RenamedWarning)):
        errors.print(f"[yellow]note[/] {escape(text)}", highlight=False, soft_wrap=True)
    for w in caught:
        if not issubclass(w.category, RenamedWarning):
            warnings.warn_explicit(w.message, w.category, w.filename, w.lineno)


def load(case: Path):
    with input_errors(), renamed_notes():
        return read_rotor(case)


def speed_option(text: str, option: str) -> float:
    """A speed from the command line: the same rule as in the rotor file (a unit is
    required, so '3000' is never misread)."""
    with input_errors():
        return u.parse(text.strip(), u.SPEED, option)


def quantity_option(text, dim, option, example):
    """A quantity from the command line; a unit is required so a bare number is never misread."""
    with input_errors():
        stripped = text.strip()
        try:
            float(stripped)
        except ValueError:
            return u.parse(stripped, dim, option)
        raise InputError(option, "needs a unit", value=text, expected=example, kind="unit")


def stiffness_option(text, option):
    if text is None:
        return None
    return quantity_option(text, u.STIFFNESS, option, 'a stiffness such as "1e8 N/m" or '
                                                      '"570 klbf/in"')


def check_output(path: Path | None, case: Path, option: str):
    """Refuse to write over the input file."""
    if path is None:
        return
    if path.exists() and path.resolve() == case.resolve():
        fail_input(InputError(option, "would overwrite the input file", value=str(path),
                              expected="another file name", kind="output"))


class SweepProgress:
    """A progress callback that shows a bar only when the sweep will take over a second."""

    def __init__(self, label="sweeping speeds"):
        self.label = label
        self.start = time.perf_counter()
        self.bar = None
        self.task = None

    def __call__(self, done, total):
        if self.bar is None:
            elapsed = time.perf_counter() - self.start
            if elapsed / done * total < 1.0 or not console.is_terminal:
                return
            # loaded for a bar that will show: most commands finish sooner
            from rich.progress import BarColumn, Progress, TextColumn, TimeRemainingColumn
            self.bar = Progress(TextColumn("{task.description}"), BarColumn(),
                                TextColumn("{task.completed}/{task.total}"),
                                TimeRemainingColumn(), console=errors, transient=True)
            self.bar.start()
            self.task = self.bar.add_task(self.label, total=total)
        self.bar.update(self.task, completed=done)
        if done >= total:
            self.close()

    def close(self):
        if self.bar is not None:
            self.bar.stop()
            self.bar = None


JOBS_HELP = ("Worker processes for the sweep (0: one per core; default: one per core for models "
             "of 300 elements or more, else 1); the results do not depend on it.")
#: ``--jobs`` of the commands that run several screenings (compare, envelope).
SCREENINGS_JOBS_HELP = ("Worker processes sharing the screenings (0, the default: one per "
                        "core). The results do not depend on it.")

#: From this many shaft elements the command line shares a sweep among all cores by
#: default: the sweep then takes ten seconds or more and starting workers pays
#: (docs/performance.md).
LARGE_MODEL_ELEMENTS = 300


def default_workers(rotor, workers):
    """The worker count asked for, or by model size when none was given."""
    if workers is not None:
        return workers
    return 0 if sum(s.elements for s in rotor.sections) >= LARGE_MODEL_ELEMENTS else 1


def screen_case(rotor, case, outputs, workers=None):
    """Refuse outputs that would overwrite the case, then sweep with a progress bar."""
    from ..analysis import screen
    workers = default_workers(rotor, workers)
    for option, path in outputs.items():
        check_output(path, case, option)
    progress = SweepProgress()
    try:
        with input_errors():
            return screen(rotor, progress=progress, workers=workers)
    finally:
        progress.close()


def print_table(title, columns, rows, caption=None):
    table = Table(title=escape(title), caption=escape(caption) if caption else None,
                  header_style="bold", title_justify="left",
                  caption_justify="left")
    for column in columns:
        table.add_column(column.heading, justify="right" if column.fmt not in ("{}",) else "left")
    for row in rows:
        # cells hold users' names: printed as written, never read as markup
        table.add_row(*[escape(column.text(row)) for column in columns])
    console.print(table)


@contextmanager
def output_errors(path):
    """An output that cannot be written: one line naming the file and why, exit code 4."""
    try:
        yield
    except OSError as exc:
        why = exc.strerror or str(exc) or type(exc).__name__
        errors.print(f"[bold red]Output error[/] cannot write {escape(str(path))}: "
                     f"{escape(why)}", highlight=False, soft_wrap=True)
        raise typer.Exit(EXIT_OUTPUT)


def write_outputs(command, case, result_dict, warnings, json_path, csv_path, columns, rows,
                  inputs=None):
    """The result as JSON (with the input's path and SHA-256: ``case``, or each of
    ``inputs`` when a command reads many files) and its rows as CSV.  ``result_dict`` may be a
    callable that makes it: then it is made only when the JSON is asked for."""
    if json_path is not None:
        if callable(result_dict):
            result_dict = result_dict()
        document = envelope(command, case, result_dict, warnings)
        if inputs is not None:
            document["input"] = [{"path": str(f), "sha256": file_hash(f) if Path(f).is_file()
                                  else None} for f in inputs]
        with output_errors(json_path):
            write_json(json_path, document)
        console.print(f"wrote {escape(str(json_path))}", highlight=False)
    if csv_path is not None:
        header, body = rows_csv(columns, rows)
        with output_errors(csv_path):
            write_csv(csv_path, header, body)
        console.print(f"wrote {escape(str(csv_path))}", highlight=False)


def print_warnings(warnings):
    for w in warnings:
        errors.print(f"[yellow]warning[/] {escape(w)}", highlight=False, soft_wrap=True)


def print_solve_note(sweep):
    """Say how the sweep's modes were solved when it was on a reduced basis."""
    if getattr(sweep, "reduction", None) is not None:
        console.print(f"[dim]{escape(sweep.reduction.describe())}[/]", highlight=False,
                      soft_wrap=True)


def save_figure(fig, path: Path):
    from ..plotting import save
    try:
        with output_errors(path):
            save(fig, path)
    except InputError as err:
        fail_input(err)
    console.print(f"wrote {escape(str(path))}", highlight=False)
