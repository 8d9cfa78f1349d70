"""``rotorcalc study``: outputs, resuming an interrupted study from its results file, and
refusing another study's file (typer's runner)."""

import json

from typer.testing import CliRunner

from rotorcalc.cli import app
from tests.conftest import ROOT

runner = CliRunner()
FAN = ROOT / "cases" / "overhung_fan.toml"


def _study(tmp_path, seed=3):
    path = tmp_path / "fan_study.toml"
    path.write_text(f'''rotor = "{FAN.as_posix()}"
samples = 6
seed = {seed}

[[uncertain]]
name = "bearing stiffness"
change = "bearing.*.kdirect"
distribution = "uniform"
low = 0.7
high = 1.3

[[uncertain]]
name = "impeller mass"
change = "disk[0].mass"
distribution = "normal"
mean = 1.0
sd = 0.02
''', encoding="utf-8")
    return path


#: A small rotor (a disk on a light shaft, two damped bearings) whose screening takes a
#: fraction of the fan's: for the tests that screen many samples.
SMALL_ROTOR = """
title = "small study rotor"
[materials.light]
youngs_modulus = "211 GPa"
shear_modulus = "81.15 GPa"
density = "7.81 kg/m^3"
[[section]]
length = "0.5 m"
outer_diameter = "50 mm"
material = "light"
elements = 2
[[section]]
length = "0.5 m"
outer_diameter = "50 mm"
material = "light"
elements = 2
[[disk]]
at = 1
name = "wheel"
mass = "50 kg"
[[bearing]]
name = "A"
at = 0
kxx = "2e6 N/m"
kyy = "2e6 N/m"
cxx = "2e3 N*s/m"
cyy = "2e3 N*s/m"
[[bearing]]
name = "B"
at = 2
kxx = "2e6 N/m"
kyy = "2e6 N/m"
cxx = "2e3 N*s/m"
cyy = "2e3 N*s/m"
[unbalance.wheel]
[[unbalance.wheel.weight]]
at = 1
amount = "500 g*mm"
[operating]
min_speed = "1000 rpm"
max_speed = "1400 rpm"
[analysis]
beam_theory = "euler-bernoulli"
mode_count = 4
speed_to = "3000 rpm"
speed_count = 9
"""


def _small_study(tmp_path, seed=3):
    rotor = tmp_path / "small.toml"
    rotor.write_text(SMALL_ROTOR, encoding="utf-8")
    path = tmp_path / "small_study.toml"
    path.write_text(_study(tmp_path, seed).read_text().replace(FAN.as_posix(), rotor.as_posix())
                    .replace("disk[0].mass", "unbalance.wheel.amount")
                    .replace('"impeller mass"', '"unbalance"'), encoding="utf-8")
    return path


def run(*args):
    return runner.invoke(app, ["study", *[str(a) for a in args]])


def test_study_writes_every_output_and_resumes_where_it_stopped(tmp_path):
    study = _small_study(tmp_path)
    results, doc = tmp_path / "r.jsonl", tmp_path / "s.json"
    pictures = [tmp_path / f"{n}.png" for n in ("crit", "prob", "infl")]
    first = run(study, "--jobs", "1", "--results", results, "--json", doc, "--csv",
                tmp_path / "s.csv", "--plot", pictures[0], "--plot-probability", pictures[1],
                "--plot-influence", pictures[2])
    assert first.exit_code == 0, first.output
    assert "probability of failure" in first.output and "Clopper-Pearson" in first.output
    assert all(p.stat().st_size > 0 for p in pictures)
    full = json.loads(doc.read_text())
    lines = results.read_text().splitlines()
    assert len(lines) == 1 + 6
    csv_lines = (tmp_path / "s.csv").read_text().splitlines()
    assert len(csv_lines) == 1 + 6 and "bearing stiffness" in csv_lines[0]
    # interrupted after three samples, the fourth line cut short
    results.write_text("\n".join(lines[:4]) + "\n" + lines[4][:20], encoding="utf-8")
    again = run(study, "--jobs", "1", "--results", results, "--json", doc)
    assert again.exit_code == 0, again.output
    assert "3 already in" in again.output
    resumed = json.loads(doc.read_text())
    indices = [json.loads(x)["index"] for x in results.read_text().splitlines()[1:]
               if x.startswith("{") and x.endswith("}")]
    assert sorted(indices) == list(range(6))
    assert resumed["result"]["samples"] == full["result"]["samples"]
    assert resumed["result"]["probabilities"] == full["result"]["probabilities"]


def test_another_study_s_results_file_is_refused(tmp_path):
    results = tmp_path / "r.jsonl"
    assert run(_small_study(tmp_path), "--jobs", "1", "--samples", "2", "--results",
               results).exit_code == 0
    other = run(_small_study(tmp_path, seed=4), "--jobs", "1", "--samples", "2", "--results",
                results)
    assert other.exit_code == 2
    assert "--results" in other.output and "another study" in other.output


def test_a_bad_study_file_names_the_key(tmp_path):
    study = _study(tmp_path)
    study.write_text(study.read_text().replace('distribution = "uniform"',
                                               'distribution = "gaussian"'))
    result = run(study)
    assert result.exit_code == 2
    assert "uncertain[0].distribution" in result.output and "gaussian" in result.output


def test_a_change_that_does_not_fit_the_rotor_is_refused_before_any_sample(tmp_path):
    study = _study(tmp_path)
    study.write_text(study.read_text().replace("disk[0].mass", "disk[7].mass"))
    result = run(study, "--jobs", "1")
    assert result.exit_code == 2
    assert "fan_study.toml" in result.output and "disk" in result.output
    assert "samples on" not in result.output


def test_the_bundled_study_fits_its_rotor():
    from rotorcalc.analysis.study import check_plan
    from rotorcalc.reader import read_rotor
    from rotorcalc.study_file import read_study
    rotor_path, plan = read_study(ROOT / "cases" / "compressor_study.toml")
    assert rotor_path == (ROOT / "cases" / "compressor.toml").resolve()
    assert len(plan.inputs) == 10 and plan.samples == 1000
    check_plan(read_rotor(rotor_path), plan)


def test_a_study_file_that_is_not_text_gets_an_input_error(tmp_path):
    """The same reading as the rotor file's (before, a non-UTF-8 study file was a crash)."""
    study = tmp_path / "bad_study.toml"
    study.write_bytes(b"rotor = \"x.toml\"\n\xff\xfe\x00")
    result = run(study)
    assert result.exit_code == 2
    assert "UTF-8" in result.output and "bad_study.toml" in result.output


def test_sobol_indices_on_request(tmp_path):
    """4 base rows x (2 inputs + 2) = 16 screenings; probabilities over the 8 independent
    rows; the indices in the table and the JSON; the influence table has a row per input."""
    study = _small_study(tmp_path)
    doc = tmp_path / "s.json"
    result = run(study, "--jobs", "1", "--samples", "4", "--indices", "sobol", "--json", doc,
                 "--csv", tmp_path / "s.csv")
    assert result.exit_code == 0, result.output
    assert "4 samples x (2 inputs + 2) = 16 screenings" in result.output
    assert "over 8 samples" in result.output
    assert "Sobol indices" in result.output and "Saltelli" in result.output
    out = json.loads(doc.read_text())["result"]
    assert out["plan"]["runs"] == 16 and len(out["samples"]) == 16
    indices = out["sobol_indices"]
    assert set(indices) >= {"fails any check", "margin excess %", "lowest log dec"}
    some = next(v for v in indices.values() if v is not None)
    assert set(some) == {"bearing stiffness", "unbalance", "rows"}
    assert {"first", "total", "first_interval", "total_interval"} <= set(
        some["bearing stiffness"])
    csv_lines = (tmp_path / "s.csv").read_text().splitlines()
    assert len(csv_lines) == 1 + 16 and "design" in csv_lines[0]
    assert [r["design"] for r in out["samples"]] == (
        ["A"] * 4 + ["B"] * 4 + ["A_B bearing stiffness"] * 4 + ["A_B unbalance"] * 4)
    table = result.output[result.output.index("Influence of each input"):]
    assert "bearing stiffness" in table and "unbalance" in table


def test_a_bad_indices_choice_is_refused(tmp_path):
    study = _study(tmp_path)
    result = run(study, "--indices", "fast")
    assert result.exit_code == 2 and "--indices" in result.output and "sobol" in result.output
    study.write_text(study.read_text().replace("seed = 3", 'seed = 3\nindices = "fast"'))
    result = run(study)
    assert result.exit_code == 2 and "indices" in result.output and "fast" in result.output


def test_the_bundled_study_reaches_the_loads():
    """Its inputs include the stages' cross-coupling and both unbalance cases."""
    from rotorcalc.study_file import read_study
    _, plan = read_study(ROOT / "cases" / "compressor_study.toml")
    paths = {u.path for u in plan.inputs}
    assert {"cross_coupling.*.q", "unbalance.mid_span.amount",
            "unbalance.couple.amount"} <= paths


def test_sobol_points_not_a_power_of_two_are_said_to_converge_more_slowly(tmp_path):
    study = _small_study(tmp_path)
    study.write_text(study.read_text().replace("seed = 3", 'seed = 3\nsampling = "sobol"'))
    result = run(study, "--jobs", "1", "--samples", "3")
    assert result.exit_code == 0, result.output
    assert "powers of two" in result.output and "2 or 4" in result.output
    assert "UserWarning" not in result.output
