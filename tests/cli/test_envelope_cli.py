"""``rotorcalc envelope``: every corner of the bundled blower's tolerances screened in one
command, the worst corner per item, exit codes as for check."""

import csv
import json

import pytest
from typer.testing import CliRunner

from rotorcalc.cli import app
from tests.conftest import ROOT

runner = CliRunner()
BLOWER = ROOT / "cases" / "blower_two_lobe.toml"


@pytest.mark.slow
def test_the_blower_envelope_runs_in_one_command(tmp_path):
    out = {k: tmp_path / f"env.{k}" for k in ("png", "json", "csv")}
    result = runner.invoke(app, ["envelope", str(BLOWER), "--speed-count", "25",
                                 "--plot", str(out["png"]), "--json", str(out["json"]),
                                 "--csv", str(out["csv"])])
    assert result.exit_code in (0, 1, 5), result.output
    assert "the worst corner per item" in result.output and "Screening" in result.output
    doc = json.loads(out["json"].read_text())["result"]
    assert len(doc["variants"]) == 9 and doc["variants"][0] == "base"
    worst = doc["worst_cases"]
    assert any(w["item"].startswith("stability") for w in worst)
    assert {w["worst_variant"] for w in worst} <= set(doc["variants"])
    expected_exit = {"pass": 0, "fail": 1, "incomplete": 5}[doc["verdict"]]
    assert result.exit_code == expected_exit
    rows = list(csv.DictReader(out["csv"].read_text().splitlines()))
    assert rows and set(rows[0]) >= {"item", "worst_variant", "worst_value", "nominal_value"}
    assert out["png"].read_bytes()[:4] == b"\x89PNG"


def test_a_rotor_without_tolerances_is_refused():
    result = runner.invoke(app, ["envelope", str(ROOT / "cases" / "feed_pump.toml")])
    assert result.exit_code == 2 and "range" in result.output
