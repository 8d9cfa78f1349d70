"""Command line: exit codes, files written, messages for bad input (typer's runner)."""

import json

import pytest
from typer.testing import CliRunner

from rotorcalc.cli import app
from rotorcalc.output import read_json
from tests.conftest import ROOT

runner = CliRunner()
PUMP = str(ROOT / "cases" / "feed_pump.toml")
COMPRESSOR = str(ROOT / "cases" / "compressor.toml")


def run(*args):
    return runner.invoke(app, [str(a) for a in args])


def test_help_has_an_example_per_command():
    for command in ("modes", "sweep", "criticals", "check", "layout"):
        result = run(command, "--help")
        assert result.exit_code == 0
        assert "Example" in result.output and f"rotorcalc {command}" in result.output


def test_the_command_list_quotes_each_command_s_own_help():
    """The list ``rotorcalc --help`` shows is kept beside the commands (so that it loads
    none of them): each summary must be the start of the command's own help."""
    from rotorcalc.cli import COMMANDS, load_command
    listing = " ".join(run("--help").output.split())
    for name, (_, summary) in COMMANDS.items():
        own = " ".join(load_command(name).help.split()).replace("\\[", "[")
        assert own.startswith(summary.rstrip(".")), name
        assert name in listing


def _loaded_by(args, modules):
    """Which of ``modules`` a fresh process has loaded after running ``rotorcalc args``."""
    import subprocess
    import sys
    code = ("import sys; from typer.testing import CliRunner; from rotorcalc.cli import app; "
            f"r = CliRunner().invoke(app, {list(args)!r}); assert r.exit_code == 0, r.output; "
            f"print(sorted(m for m in {tuple(modules)!r} if m in sys.modules))")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                         check=True)
    return out.stdout.strip()


def test_help_loads_no_analysis_numpy_or_plotting():
    """``rotorcalc --help`` must start fast: it imports neither numpy nor the analyses
    (measured CPU in docs/performance.md; no time is asserted here)."""
    assert _loaded_by(["--help"], ("numpy", "scipy", "matplotlib", "pint",
                                   "rotorcalc.analysis", "rotorcalc.model")) == "[]"


def test_criticals_on_table_bearings_loads_only_what_it_runs():
    """``criticals`` on a rotor whose bearings are tables, with one worker, loads neither the
    film solvers, the process pool, the progress bar nor the what-if studies: together they
    cost about 0.035 s of start-up at every command (docs/performance.md, "seventh pass") and
    none of them runs here."""
    assert _loaded_by(["criticals", COMPRESSOR, "--jobs", "1"], (
        "rotorcalc.bearings.film", "rotorcalc.bearings.journal", "rotorcalc.bearings.pad_journal",
        "rotorcalc.bearings.equilibrium", "multiprocessing", "rich.progress",
        "rotorcalc.analysis.whatif", "rotorcalc.analysis.levers", "rotorcalc.variants")) == "[]"


def test_the_json_document_is_made_only_when_asked_for(tmp_path, monkeypatch):
    """Without --json the command does not build the document (0.01 s of the compressor's
    `criticals`); with it, the document is the screening's own."""
    from rotorcalc.analysis.screening import Screening
    made = []
    original = Screening.to_dict
    monkeypatch.setattr(Screening, "to_dict", lambda self: made.append(1) or original(self))
    assert run("criticals", PUMP, "--jobs", "1").exit_code == 0
    assert made == []
    out = tmp_path / "p.json"
    assert run("criticals", PUMP, "--jobs", "1", "--json", out).exit_code == 0
    assert made == [1] and "verdict" in read_json(out)["result"]

def test_a_reduced_basis_sweep_says_so_and_records_its_certificate(tmp_path, monkeypatch):
    from rotorcalc.analysis import reduced
    monkeypatch.setattr(reduced, "REDUCED_THRESHOLD", 10)   # the pump is far below 400 DOFs
    monkeypatch.setattr(reduced, "REDUCED_WORK", 0)
    out = tmp_path / "c.json"
    result = run("criticals", PUMP, "--json", out)
    assert result.exit_code == 0, result.output
    assert "reduced basis" in " ".join(result.output.split())
    record = read_json(out)["result"]["sweep"]["reduced_basis"]
    assert record["largest_residual"] <= record["tolerance"] and record["basis_size"] > 0


def test_modes_table_json_csv(tmp_path):
    out_json, out_csv = tmp_path / "m.json", tmp_path / "m.csv"
    result = run("modes", PUMP, "--speed", "3000 rpm", "--mode-count", "4", "--json", out_json,
                 "--csv", out_csv)
    assert result.exit_code == 0, result.output
    assert "Log dec" in result.output
    data = read_json(out_json)
    assert data["command"] == "modes" and len(data["result"]["modes"]) == 4
    assert len(out_csv.read_text().splitlines()) == 5


def test_speed_needs_a_unit():
    result = run("modes", PUMP, "--speed", "3000")
    assert result.exit_code == 2
    assert "--speed" in result.output and "needs a unit" in result.output


def test_criticals_json_matches_table(tmp_path):
    out = tmp_path / "c.json"
    picture = tmp_path / "new" / "folder" / "map.png"  # folders are created, as in the README
    result = run("criticals", PUMP, "--json", out, "--csv", tmp_path / "c.csv", "--plot", picture)
    assert picture.exists()
    assert result.exit_code == 0, result.output
    doc = json.loads(out.read_text())
    crits = doc["result"]["criticals"]
    assert crits and all("verdict" in c and "margin_percent" in c for c in crits)
    assert doc["result"]["caution"].startswith("Screening result only")
    assert doc["input"]["sha256"] and doc["version"]
    assert "Verdict" in result.output


def test_check_exit_code_follows_margins():
    assert run("check", PUMP).exit_code == 0
    failing = run("check", PUMP, "--margin-rule", "fixed", "--margin-below", "90", "--margin-above", "90")
    assert failing.exit_code == 1
    assert "FAILED" in failing.output


@pytest.mark.parametrize("old,new,key", [
    ('outer_diameter = "75 mm"', 'outer_diametr = "75 mm"', "outer_diametr"),
    ('kxx = "1.5e7 N/m"', 'kxx = "1.5e7 kg"', "bearing[2].kxx"),
    ('length = "140 mm"', 'length = "-140 mm"', "section[0].length"),
    ('at = 6\nkxx', 'at = 60\nkxx', "bearing[2].at"),
    ('speeds = ["1500 rpm", "2500 rpm"', 'speeds = ["2500 rpm", "1500 rpm"', "bearing[0].speeds[1]"),
])
def test_bad_input_exit_2_names_key(tmp_path, old, new, key):
    text = (ROOT / "cases" / "feed_pump.toml").read_text()
    assert old in text
    bad = tmp_path / "bad.toml"
    bad.write_text(text.replace(old, new, 1))
    for command in (["criticals"], ["check"], ["modes", "--speed", "1000 rpm"]):
        result = run(command[0], bad, *command[1:])
        assert result.exit_code == 2, result.output
        assert key in result.output
        assert "Traceback" not in result.output


def test_missing_file_is_bad_input(tmp_path):
    result = run("criticals", tmp_path / "nope.toml")
    assert result.exit_code == 2
    assert "cannot be read" in result.output


def test_refuses_to_overwrite_input(tmp_path):
    case = tmp_path / "case.toml"
    case.write_text((ROOT / "cases" / "feed_pump.toml").read_text())
    result = run("criticals", case, "--json", case)
    assert result.exit_code == 2
    assert "overwrite the input" in result.output


def test_json_is_deterministic_and_carries_provenance(tmp_path):
    first, second = tmp_path / "a.json", tmp_path / "b.json"
    assert run("modes", PUMP, "--speed", "2000 rpm", "--json", first).exit_code == 0
    assert run("modes", PUMP, "--speed", "2000 rpm", "--json", second).exit_code == 0
    assert first.read_bytes() == second.read_bytes()
    doc = read_json(first)
    import hashlib
    assert doc["input"]["sha256"] == hashlib.sha256((ROOT / "cases" / "feed_pump.toml")
                                                    .read_bytes()).hexdigest()
    assert doc["version"] and "warnings" in doc


def test_picture_with_unknown_extension_is_bad_input(tmp_path):
    result = run("layout", PUMP, "--plot", tmp_path / "side.bmp")
    assert result.exit_code == 2 and "picture file" in result.output
    assert not (tmp_path / "side.bmp").exists()


def test_workers_default_by_model_size():
    from rotorcalc.cli.common import LARGE_MODEL_ELEMENTS, default_workers
    from rotorcalc.reader import read_rotor
    rotor = read_rotor(PUMP)
    assert sum(s.elements for s in rotor.sections) < LARGE_MODEL_ELEMENTS
    assert default_workers(rotor, None) == 1
    assert default_workers(rotor, 3) == 3
    import dataclasses
    big = dataclasses.replace(rotor, sections=tuple(
        dataclasses.replace(s, elements=40) for s in rotor.sections))
    assert default_workers(big, None) == 0


def test_sweep_and_criticals_write_one_document_for_one_screening(tmp_path):
    """They once wrote two different documents for the same screening."""
    fan = str(ROOT / "cases" / "overhung_fan.toml")
    assert run("sweep", fan, "--json", tmp_path / "s.json").exit_code == 0
    assert run("criticals", fan, "--json", tmp_path / "c.json").exit_code == 0
    swept, judged = read_json(tmp_path / "s.json"), read_json(tmp_path / "c.json")
    assert swept["result"] == judged["result"]
    assert {"criticals", "verdict", "stability", "coverage_gaps", "sweep",
            "response"} <= set(judged["result"])
