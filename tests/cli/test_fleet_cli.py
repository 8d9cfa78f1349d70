"""``rotorcalc fleet``: many rotor files, one table, the worst file's exit code; the same
rows on every executor (typer's runner)."""

import json
import shutil

import pytest
from typer.testing import CliRunner

from rotorcalc.analysis.fleet import FleetRow, exit_code, rotor_files
from rotorcalc.cli import app
from tests.conftest import ROOT

runner = CliRunner()


def _folder(tmp_path):
    shutil.copy(ROOT / "cases" / "overhung_fan.toml", tmp_path / "fan.toml")
    shutil.copy(ROOT / "cases" / "overhung_fan_variants.toml", tmp_path / "fan_variants.toml")
    (tmp_path / "broken.toml").write_text("[[section]\nlength = 1\n", encoding="utf-8")
    return tmp_path


def test_a_folder_is_screened_file_by_file_and_the_worst_code_returned(tmp_path):
    folder = _folder(tmp_path)
    assert [p.name for p in rotor_files([folder])] == ["broken.toml", "fan.toml"]
    out = tmp_path / "fleet.json"
    result = runner.invoke(app, ["fleet", str(folder), "--jobs", "1", "--json", str(out)])
    assert result.exit_code == 2, result.output       # a file is bad input, none fails
    rows = {r["file"].rsplit("/", 1)[-1]: r for r in
            json.loads(out.read_text())["result"]["rotors"]}
    assert rows["fan.toml"]["verdict"] == "pass"
    assert rows["broken.toml"]["verdict"] == "bad input" and rows["broken.toml"]["first_item"]


@pytest.mark.parametrize("verdicts, code", [
    (["pass", "pass"], 0), (["pass", "incomplete"], 5), (["bad input", "incomplete"], 2),
    (["numerical failure", "bad input"], 3), (["pass", "fail", "bad input"], 1)])
def test_the_fleet_exits_with_the_worst_file_s_code(verdicts, code):
    assert exit_code([FleetRow(f"f{i}", v) for i, v in enumerate(verdicts)]) == code


@pytest.mark.slow
def test_the_rows_are_the_same_on_a_dask_cluster(tmp_path):
    folder = _folder(tmp_path)
    outs = []
    for options in (["--jobs", "1"], ["--scheduler", "local", "--jobs", "2"]):
        out = tmp_path / f"fleet{len(outs)}.json"
        result = runner.invoke(app, ["fleet", str(folder), *options, "--json", str(out)])
        assert result.exit_code == 2, result.output
        outs.append(json.loads(out.read_text())["result"]["rotors"])
    assert outs[0] == outs[1]
