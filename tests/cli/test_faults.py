"""Every command under a fault injector: each kind of failure has its own exit code and
one paragraph of text, never a traceback and never 1 (which a script reads as "a check
failed").  And text from users is text: names with rich markup or math text are printed
and drawn as written."""

import re

import matplotlib
import pytest
from typer.testing import CliRunner

from rotorcalc import reader
from rotorcalc.cli import app
from rotorcalc.cli.common import (EXIT_BAD_INPUT, EXIT_INTERNAL, EXIT_NUMERICAL, EXIT_OUTPUT)
from rotorcalc.errors import InputError, SolverError
from tests.conftest import ROOT

matplotlib.use("Agg")
runner = CliRunner()
FAN = ROOT / "cases" / "overhung_fan.toml"
VARIANTS = ROOT / "cases" / "overhung_fan_variants.toml"

#: One invocation per command, each reading the fan (compare: its variants file).
COMMANDS = {
    "modes": ["modes", FAN, "--speed", "1000 rpm"],
    "sweep": ["sweep", FAN, "--speed-count", "5"],
    "criticals": ["criticals", FAN, "--speed-count", "5"],
    "check": ["check", FAN, "--speed-count", "5"],
    "response": ["response", FAN],
    "layout": ["layout", FAN, "--plot", "{tmp}/layout.png"],
    "stiffness-map": ["stiffness-map", FAN, "--stiffness-count", "5"],
    "compare": ["compare", VARIANTS],
    "window": ["window", FAN],
    "levers": ["levers", FAN],
}

FAULTS = {
    # raised where the rotor file is parsed, the first thing every command does
    "defect": (IndexError("list index out of range (injected)"), EXIT_INTERNAL,
               "Internal error"),
    "numerical": (SolverError("the eigen-solve did not converge (injected)"), EXIT_NUMERICAL,
                  "Numerical failure"),
    "input": (InputError("section[0].length", "is injected", kind="range"), EXIT_BAD_INPUT,
              "section[0].length"),
    "memory": (MemoryError(), EXIT_NUMERICAL, "Out of memory"),
}


def invoke(args, tmp_path):
    return runner.invoke(app, [str(a).replace("{tmp}", str(tmp_path)) for a in args])


@pytest.mark.parametrize("fault", sorted(FAULTS))
@pytest.mark.parametrize("command", sorted(COMMANDS))
def test_every_command_gives_each_fault_its_exit_code(command, fault, monkeypatch, tmp_path):
    error, code, words = FAULTS[fault]

    def broken(*args, **kwargs):
        raise error

    monkeypatch.setattr(reader, "parse_rotor", broken)
    result = invoke(COMMANDS[command], tmp_path)
    assert result.exit_code == code, result.output
    assert words in result.output
    assert "Traceback" not in result.output
    assert result.exit_code != 1


@pytest.mark.parametrize("command", ["modes", "sweep", "check", "response", "layout"])
def test_every_command_says_when_an_output_cannot_be_written(command, tmp_path):
    blocker = tmp_path / "a-file"
    blocker.write_text("")
    args = list(COMMANDS[command])
    if command == "layout":
        args[-1] = blocker / "x.png"
    else:
        args += ["--json", blocker / "x.json"]
    result = invoke(args, tmp_path)
    assert result.exit_code == EXIT_OUTPUT, result.output
    assert "Output error" in result.output and "Traceback" not in result.output


MARKUP = '[/] [bold]b[/bold] $x$ $ \\\\frac{1}'   # TOML text: one backslash in the name


def marked_up_fan(tmp_path):
    """The fan with rich markup and math text in its title and in every kind of name."""
    text = FAN.read_text()
    text = re.sub(r'^title = .*$', lambda m: f'title = "Fan {MARKUP}"', text, count=1,
                  flags=re.M)
    text = text.replace('name = "DE"', f'name = "DE {MARKUP}"', 1)
    text = text.replace('name = "impeller"\nmass', f'name = "wheel {MARKUP}"\nmass', 1)
    text = text.replace('name = "FE 45"', f'name = "FE 45 {MARKUP}"', 1)
    text = text.replace('name = "shaft seal"', f'name = "seal {MARKUP}"', 1)
    text = text.replace("[unbalance.impeller]", '[unbalance."imp [/] $"]')
    text = text.replace("[[unbalance.impeller.weight]]", '[[unbalance."imp [/] $".weight]]')
    path = tmp_path / "fan.toml"
    path.write_text(text)
    return path


@pytest.mark.parametrize("command", ["modes", "sweep", "criticals", "response", "layout",
                                     "stiffness-map"])
def test_names_with_markup_and_math_text_are_text(command, tmp_path):
    path = marked_up_fan(tmp_path)
    args = [command, path] + [a for a in COMMANDS[command][2:]]
    picture = {"modes": ["--plot", tmp_path / "p.png"], "sweep": ["--plot", tmp_path / "p.png"],
               "criticals": ["--plot", tmp_path / "p.svg"],
               "response": ["--plot-bode", tmp_path / "p.png", "--plot-polar", tmp_path / "q.png"],
               "layout": [], "stiffness-map": ["--plot", tmp_path / "p.png"]}[command]
    result = invoke(args + picture, tmp_path)
    assert result.exit_code in (0, 1), result.output
    assert "Traceback" not in result.output
    # printed literally: the markup is in the output as written
    if command in ("criticals", "response", "sweep"):
        assert "[/]" in result.output


def test_a_picture_draws_the_name_as_written(tmp_path):
    from rotorcalc.plotting import plot_rotor_layout
    rotor = reader.read_rotor(marked_up_fan(tmp_path))
    drawn = plot_rotor_layout(rotor)
    texts = [t.get_text() for t in drawn.figure.findobj(matplotlib.text.Text)]
    assert any("$x$" in t and "[/]" in t for t in texts)
    drawn.figure.savefig(tmp_path / "x.png")   # math text would fail here on the lone '$'
