"""``rotorcalc statics``: the journal loads at rest, the deflection picture, JSON and CSV."""

import json

from typer.testing import CliRunner

from rotorcalc.cli import app
from tests.conftest import ROOT

runner = CliRunner()
PUMP = ROOT / "cases" / "feed_pump.toml"


def test_statics_prints_writes_and_balances(tmp_path):
    out = {k: tmp_path / f"statics.{k}" for k in ("png", "json", "csv")}
    result = runner.invoke(app, ["statics", str(PUMP), "--plot", str(out["png"]),
                                 "--json", str(out["json"]), "--csv", str(out["csv"])])
    assert result.exit_code == 0, result.output
    doc = json.loads(out["json"].read_text())["result"]
    fy = [r["fy_n"] for r in doc["reactions"]]
    assert abs(sum(fy) - doc["weight_n"]) < 1e-9 * doc["weight_n"]   # they carry the weight
    assert doc["balance_error"] < 1e-9 and doc["gravity"] == "-y" and "caution" in doc
    assert out["png"].read_bytes()[:4] == b"\x89PNG"
    assert out["csv"].read_text().splitlines()[0].startswith("bearing,station")
    assert "Screening" in result.output


def test_a_steady_load_and_another_gravity_direction(tmp_path):
    case = tmp_path / "pump.toml"
    case.write_text(PUMP.read_text() + '\n[statics]\ngravity = "none"\n\n[[static_load]]\n'
                    'name = "coupling pull"\nat = 0\nfy = "-1 kN"\n')
    js = tmp_path / "s.json"
    assert runner.invoke(app, ["statics", str(case), "--json", str(js)]).exit_code == 0
    doc = json.loads(js.read_text())["result"]
    assert doc["applied_n"] == [0.0, -1000.0]
    assert abs(sum(r["fy_n"] for r in doc["reactions"]) - 1000.0) < 1e-6


def test_bad_speed_is_refused():
    result = runner.invoke(app, ["statics", str(PUMP), "--speed", "3000"])
    assert result.exit_code == 2 and "--speed" in result.output
