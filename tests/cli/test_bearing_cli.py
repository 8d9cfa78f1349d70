"""``rotorcalc bearing``: coefficients against speed for table and geometry bearings, the film
state, pictures, JSON and CSV; and ``rotorcalc statics`` with film journals."""

import csv
import json

import pytest
from typer.testing import CliRunner

from rotorcalc.bearings.tabulate import TOLERANCE
from rotorcalc.cli import app
from tests.conftest import ROOT

runner = CliRunner()
SLEEVE = ROOT / "cases" / "feed_pump_sleeve.toml"
PUMP = ROOT / "cases" / "feed_pump.toml"


@pytest.fixture(scope="module")
def sleeve_run(tmp_path_factory):
    out = tmp_path_factory.mktemp("bearing")
    files = {"plot": out / "b.png", "json": out / "b.json", "csv": out / "b.csv"}
    result = runner.invoke(app, ["bearing", str(SLEEVE), "--plot", str(files["plot"]),
                                 "--json", str(files["json"]), "--csv", str(files["csv"])])
    return result, files


def test_every_bearing_of_the_sleeve_pump_is_shown_and_written(sleeve_run):
    result, files = sleeve_run
    assert result.exit_code == 0, result.output
    for name in ("DE", "NDE", "centre_bush"):
        assert (files["plot"].parent / f"b_{name}.png").read_bytes()[:4] == b"\x89PNG"
    assert "film state" in result.output and "Eccentricity" in result.output
    assert "Screening only" in result.output
    doc = json.loads(files["json"].read_text())["result"]
    by_name = {b["name"]: b for b in doc["bearings"]}
    assert by_name["DE"]["source"] == "geometry" and "film" in by_name["DE"]
    assert by_name["centre bush"]["source"] == "table" and "film" not in by_name["centre bush"]
    film = by_name["DE"]["film"]
    assert film["interpolation_error"] <= TOLERANCE
    assert all(0.0 < e < 1.0 for e in film["eccentricity_ratio"])
    rows = list(csv.DictReader(files["csv"].read_text().splitlines()))
    de = [r for r in rows if r["bearing"] == "DE"]
    bush = [r for r in rows if r["bearing"] == "centre bush"]
    assert de and all(r["eccentricity_ratio"] for r in de)
    assert bush and all(r["eccentricity_ratio"] == "" for r in bush)


def test_one_bearing_by_name_and_an_unknown_name(tmp_path):
    plot = tmp_path / "de.png"
    result = runner.invoke(app, ["bearing", str(PUMP), "--name", "DE", "--plot", str(plot)])
    assert result.exit_code == 0, result.output
    assert plot.read_bytes()[:4] == b"\x89PNG"
    assert "film state" not in result.output       # a table bearing has none
    bad = runner.invoke(app, ["bearing", str(PUMP), "--name", "XX"])
    assert bad.exit_code == 2 and "--name" in bad.output and "DE" in bad.output


def test_statics_shows_the_film_journals(tmp_path):
    js = tmp_path / "s.json"
    result = runner.invoke(app, ["statics", str(SLEEVE), "--json", str(js)])
    assert result.exit_code == 0, result.output
    assert "film state under the load" in result.output
    doc = json.loads(js.read_text())["result"]
    assert [f["bearing"] for f in doc["film_journals"]] == ["DE", "NDE"]
    assert doc["balance_error"] < 1e-9


@pytest.mark.slow
def test_a_tilting_pad_bearing_shows_its_pads_and_the_whirl_reduction(tmp_path):
    js = tmp_path / "tp.json"
    result = runner.invoke(app, ["bearing", str(ROOT / "cases" / "compressor_tilting_pad.toml"),
                                 "--name", "DE", "--json", str(js)])
    assert result.exit_code == 0, result.output
    assert "the pads at 11500 rpm" in result.output and "reduced at each whirl" in result.output
    doc = json.loads(js.read_text())["result"]["bearings"][0]
    pads = doc["pads"]["pads"]
    assert len(pads) == 5
    # load between pads along -y: the two pads either side of the bottom carry alike
    loads = sorted(p["load_n"] for p in pads)
    assert loads[-1] == pytest.approx(loads[-2], rel=1e-6)
    whirl = doc["pads"]["reduced_against_whirl"]
    synchronous = next(r for r in whirl if abs(r["whirl_rad_per_s"] - doc["pads"]["speed_rad_per_s"]) < 1e-9)
    # no cross-coupled stiffness with centre pivots (symmetry)
    assert abs(synchronous["kxy"]) < 1e-5 * synchronous["kxx"]
