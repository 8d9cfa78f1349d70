"""The ``response`` command and the response checks of ``check``: files written, exit codes,
messages that name the key (typer's test runner)."""

import csv

import pytest
from typer.testing import CliRunner

from rotorcalc.cli import app
from rotorcalc.output import read_json
from rotorcalc.reader import read_rotor
from tests.conftest import CASES, ROOT

runner = CliRunner()
PUMP = ROOT / "cases" / "feed_pump.toml"


def run(*args):
    return runner.invoke(app, [str(a) for a in args])


def edited_pump(tmp_path, old, new):
    """A copy of the feed pump with one piece of text replaced."""
    text = PUMP.read_text()
    assert text.count(old) == 1, old
    path = tmp_path / "pump.toml"
    path.write_text(text.replace(old, new))
    return path


@pytest.mark.parametrize("case", CASES, ids=[c.stem for c in CASES])
def test_response_writes_json_and_csv_for_every_case(case, tmp_path):
    rotor = read_rotor(case)
    assert rotor.unbalance, "every bundled case has unbalance cases of its own"
    out_json, out_csv = tmp_path / "r.json", tmp_path / "r.csv"
    result = run("response", case, "--json", out_json, "--csv", out_csv)
    assert result.exit_code == 0, result.output
    assert "unbalance response peaks" in result.output and "Verdict" in result.output

    doc = read_json(out_json)
    assert doc["command"] == "response" and doc["input"]["sha256"]
    res = doc["result"]
    names = [c.name for c in rotor.unbalance]
    assert [c["case"] for c in res["cases"]] == names
    n_speeds, n_probes = len(res["speeds_rpm"]), len(res["cases"][0]["probes"])
    assert n_speeds >= rotor.response.speed_count - 1  # a zero speed is left out
    if rotor.probes:
        assert [p["probe"] for p in res["cases"][0]["probes"]] == [p.name for p in rotor.probes]
    for c in res["cases"]:
        for p in c["probes"]:
            assert len(p["amplitude_pp_um"]) == len(p["phase_lag_deg"]) == n_speeds
    assert res["peaks"], "every case should show at least one response peak"
    assert len(res["clearance_checks"]) == len(names) * len(rotor.clearances)
    assert res["passed"] is True

    with out_csv.open(newline="") as handle:
        rows = list(csv.reader(handle))
    assert rows[0] == ["case", "speed_rpm", "probe", "amplitude_pp_um", "phase_lag_deg"]
    assert len(rows) == 1 + len(names) * n_speeds * n_probes
    assert {r[0] for r in rows[1:]} == set(names)


def test_bad_case_name_exit_2_names_the_option():
    result = run("response", PUMP, "--unbalance", "no_such_case")
    assert result.exit_code == 2, result.output
    assert "--unbalance" in result.output and "no_such_case" in result.output
    assert "mid_span" in result.output and "couple" in result.output  # the valid names


def test_case_option_accepts_a_valid_name():
    assert run("response", PUMP, "--unbalance", "couple").exit_code == 0


def test_file_without_unbalance_exit_2(tmp_path):
    text = PUMP.read_text()
    plain = tmp_path / "plain.toml"
    plain.write_text(text[:text.index("[unbalance.mid_span]")].rstrip() + "\n")
    result = run("response", plain)
    assert result.exit_code == 2, result.output
    assert "Input error" in result.output and "'unbalance'" in result.output
    assert "no unbalance case" in result.output
    assert "Traceback" not in result.output
    # criticals and check still work: they just have no response columns
    check = run("check", plain)
    assert check.exit_code == 0, check.output
    assert "AF resp." not in check.output


@pytest.mark.slow
def test_check_exit_1_when_a_clearance_is_tiny(tmp_path):
    tight = edited_pump(tmp_path, 'radial = "0.30 mm"', 'radial = "2 um"')
    assert run("check", PUMP).exit_code == 0
    result = run("check", tight)
    assert result.exit_code == 1, result.output
    assert "FAILED" in result.output
    row = next(line for line in result.output.splitlines()
               if "centre bush" in line and "clearance" in line and "fail" in line)
    assert "1.50" in row  # 75 % of 2 um
    # the response command reports it but is not a gate
    response = run("response", tight)
    assert response.exit_code == 0 and "EXCEEDED" in response.output


def test_check_exit_0_when_vibration_check_is_off_and_limits_are_met(tmp_path):
    path = edited_pump(tmp_path, "[[clearance]]\nname = \"centre bush\"",
                       "[response]\ncheck_vibration = false\n\n[[clearance]]\n"
                       "name = \"centre bush\"")
    result = run("check", path)
    assert result.exit_code == 0, result.output
    table = [line for line in result.output.splitlines() if line.startswith("│")]
    assert not any("│ vibration" in line for line in table)
    assert any("│ clearance" in line for line in table)


MID = 'at = 6\namount = "residual"'


@pytest.mark.parametrize("old,new,key", [
    (MID, 'at = 6\namount = "12 kg"', "unbalance.mid_span.weight[0].amount"),
    (MID, 'at = 60\namount = "residual"', "unbalance.mid_span.weight[0].at"),
    (MID, 'at = "stage_9"\namount = "residual"', "unbalance.mid_span.weight[0].at"),
    (MID, MID + '\nphse = "90 deg"', "unbalance.mid_span.weight[0].phse"),
    (MID, 'at = 6\nmass = "10 g"', "unbalance.mid_span.weight[0].radius"),
    (MID, MID + '\nmass = "10 g"', "unbalance.mid_span.weight[0].amount"),
    (MID, 'at = 6\namount = "12 g*mm"\nphase = "3 mm"', "unbalance.mid_span.weight[0].phase"),
    ('residual_multiple = 2\n[[unbalance.mid_span', 'residual_multiple = -1\n[[unbalance.mid_span',
     "unbalance.mid_span.residual_multiple"),
    ('radial = "0.25 mm"', 'radial = "0.25 kg"', "clearance[1].radial"),
    ('radial = "0.25 mm"', 'radial = "0.25 mm"\n\n[response]\nclearance_share = 1.5',
     "response.clearance_share"),
])
def test_bad_unbalance_input_exit_2_names_the_key(tmp_path, old, new, key):
    bad = edited_pump(tmp_path, old, new)
    for command in ("response", "check", "criticals"):
        result = run(command, bad)
        assert result.exit_code == 2, (command, result.output)
        assert key in result.output, (command, result.output)
        assert "Traceback" not in result.output


def test_response_pictures_are_written(tmp_path):
    bode, orbits = tmp_path / "pics" / "bode.png", tmp_path / "orbits.svg"
    result = run("response", PUMP, "--unbalance", "couple", "--plot-bode", bode, "--plot-orbits", orbits,
                 "--orbit-speeds", "2400 rpm, 3600 rpm")
    assert result.exit_code == 0, result.output
    assert bode.read_bytes()[:4] == b"\x89PNG" and bode.stat().st_size > 10_000
    assert orbits.read_text().startswith("<?xml")
