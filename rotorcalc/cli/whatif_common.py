"""Helpers shared by the what-if commands (``stiffness-map``, ``compare``, ``window`` and
``levers``): progress on stderr, output checks, bearing targets and small printing aids."""

from __future__ import annotations

import dataclasses
import re
from contextlib import contextmanager

import typer
from rich.markup import escape
from rich.progress import (BarColumn, Progress, TextColumn, TimeElapsedColumn,
                           TimeRemainingColumn)

from ..errors import InputError
from .common import check_output, console, errors, fail_input


class CountProgress:
    """A progress bar for a known number of steps, or a counter when it is unknown.

    Drawn on stderr and only on a terminal, so pipes, files and tests stay clean.
    """

    def __init__(self, label, total=None):
        self.label, self.total = label, total
        self.bar = self.task = None
        if errors.is_terminal:
            columns = [TextColumn("{task.description}"), BarColumn(),
                       TextColumn("{task.completed} done"), TimeElapsedColumn()]
            if total is not None:       # with a known total, the time left too
                columns.append(TimeRemainingColumn())
            self.bar = Progress(*columns, console=errors, transient=True)
            self.bar.start()
            self.task = self.bar.add_task(label, total=total)

    def __call__(self, done, total=None):
        if self.bar is None:
            return
        total = total or self.total
        if total is not None and done > total:
            total = None  # past the estimate: count on
        self.bar.update(self.task, completed=done, total=total)

    def describe(self, label):
        if self.bar is not None:
            self.bar.update(self.task, description=label)

    def close(self):
        if self.bar is not None:
            self.bar.stop()
            self.bar = None


@contextmanager
def progress_bar(label, total=None):
    bar = CountProgress(label, total)
    try:
        yield bar
    finally:
        bar.close()


@contextmanager
def busy(label):
    """A spinner on stderr (terminal only) for a computation without steps."""
    if errors.is_terminal:
        with errors.status(label):
            yield
    else:
        yield


def check_outputs(case, outputs):
    for option, path in outputs.items():
        check_output(path, case, option)


def plotting_function(name):
    """A function of :mod:`rotorcalc.plotting`, or None (with a note) when it does not exist."""
    from .. import plotting
    function = getattr(plotting, name, None)
    if function is None:
        errors.print(f"[yellow]note[/] this installation cannot draw yet "
                     f"(rotorcalc.plotting.{name} is missing); no picture written",
                     highlight=False)
    return function


def without_response(rotor):
    """The rotor without its unbalance cases: the margin functions of the window and the
    levers use log-decrement margins only, and the response would double the run time."""
    return dataclasses.replace(rotor, unbalance=())


def bearing_target(rotor, name, option="--bearing"):
    """Change path of one bearing (by name, or by 0-based index) or of all of them."""
    if name is None:
        return None, "every bearing together (seals unchanged)"
    names = [b.name for b in rotor.bearings]
    if name in names:
        i = names.index(name)
        # a name the change grammar can spell is kept readable; any other goes by its index
        plain = re.fullmatch(r"[A-Za-z0-9_\-]+( [A-Za-z0-9_\-]+)*", name)
        return (f"bearing.{name}" if plain else f"bearing[{i}]"), f"bearing {name}"
    if name.strip().isdigit() and int(name) < len(rotor.bearings):
        i = int(name)
        return f"bearing[{i}]", f"bearing {names[i] or '[' + str(i) + ']'}"
    fail_input(InputError(option, "names no bearing of the rotor", value=name,
                          expected="one of " + ", ".join(n or f"{i}" for i, n in
                                                         enumerate(names)),
                          kind="choice"))


def heading(text):
    console.print(f"[bold]{escape(text)}[/]", highlight=False)


def with_sources_option():
    """The what-if commands' ``--with-sources`` flag (:func:`~rotorcalc.analysis.whatif.what_if_rotor`)."""
    return typer.Option(False, "--with-sources",
                        help="Keep the rotor file's destabilising sources (\\[\\[cross_coupling]]) "
                             "in every screening; by default a what-if study leaves them out.")


def command_help(command, example):
    """A what-if command's help: its docstring on one paragraph, then its example."""
    return " ".join(command.__doc__.split()) + "\n\n" + example
