"""Every bundled case runs end to end: map picture, margin table, JSON a script can read,
and the check command's exit code follows the margins."""

import json
import re
import subprocess
import sys

import pytest
from typer.testing import CliRunner

from rotorcalc.cli import app
from tests.conftest import CASES, ROOT

runner = CliRunner()

#: The one bundled example meant to fail: the high-pressure compressor as first proposed
#: fails the cross-coupling screen (hp_compressor_damper_seal.toml is the fixed design).
MEANT_TO_FAIL = {"hp_compressor"}
HIGH_PRESSURE = {"hp_compressor", "hp_compressor_damper_seal"}


def test_there_are_the_three_kinds_of_case():
    names = {c.stem for c in CASES}
    assert {"feed_pump", "overhung_fan", "compressor"} <= names


@pytest.mark.slow
@pytest.mark.parametrize("case", CASES, ids=[c.stem for c in CASES])
def test_case_end_to_end(case, tmp_path):
    png, js = tmp_path / "map.png", tmp_path / "margins.json"
    result = runner.invoke(app, ["criticals", str(case), "--plot", str(png), "--json", str(js)])
    assert result.exit_code == 0, result.output
    assert png.stat().st_size > 10_000 and png.read_bytes()[:4] == b"\x89PNG"
    doc = json.loads(js.read_text())
    assert doc["result"]["criticals"], "every case should show at least one critical speed"
    if case.stem not in HIGH_PRESSURE:      # their check has a test of its own, below
        check = runner.invoke(app, ["check", str(case)])
        assert check.exit_code == (0 if doc["result"]["passed"] else 1)
    layout = runner.invoke(app, ["layout", str(case), "--plot", str(tmp_path / "side.svg")])
    assert layout.exit_code == 0 and (tmp_path / "side.svg").read_text().startswith("<?xml")


@pytest.mark.slow
def test_bundled_cases_pass_their_check():
    """The examples are meant as designs that keep their margins (the high-pressure pair,
    one of which is meant to fail, is checked by the test below)."""
    for case in CASES:
        if case.stem not in HIGH_PRESSURE:
            assert runner.invoke(app, ["check", str(case)]).exit_code == 0, case.name


@pytest.mark.slow
def test_the_high_pressure_compressor_fails_the_screen_alone_and_the_damper_seal_fixes_it(
        tmp_path):
    """Margins, stability up to trip and response limits pass in both designs; the
    labyrinth design fails the cross-coupling screen (log decrement at the expected amount
    below 0.1, threshold below twice it) and the check with every source applied; the damper
    seal (read at each mode's own whirl frequency) passes both."""
    docs = {}
    for name in ("hp_compressor", "hp_compressor_damper_seal"):
        out = tmp_path / f"{name}.json"
        result = runner.invoke(app, ["check", str(ROOT / "cases" / f"{name}.toml"),
                                     "--json", str(out)])
        assert result.exit_code == (1 if name in MEANT_TO_FAIL else 0), result.output
        docs[name] = json.loads(out.read_text())["result"]
    for doc in docs.values():
        assert all(c["verdict"] != "fail" for c in doc["criticals"])
        assert doc["stability"]["passed"]
        assert all(c["verdict"] == "pass" for c in doc["response_checks"])
    # the labyrinth design loses stability above trip: a response peak lies where no steady
    # state exists, and no margin may take its amplification factor from it
    unstable = docs["hp_compressor"]["stability"]["unstable_ranges_rpm"]
    inside = lambda rpm: any(lo <= rpm <= hi for lo, hi in unstable)
    assert unstable and any(inside(p["speed_rpm"]) for p in docs["hp_compressor"]["response"]
                            ["peaks"])
    assert not any(inside(c["peak_speed_rpm"]) for c in docs["hp_compressor"]["criticals"]
                   if c.get("peak_speed_rpm") is not None)
    bad, good = (docs[n]["coupling_screen"] for n in ("hp_compressor",
                                                         "hp_compressor_damper_seal"))
    assert not bad["passed"] and bad["screen"]["verdict"] == "fail"
    assert bad["screen"]["log_dec_at_expected"] < 0.1 and bad["screen"]["threshold_ratio"] < 2
    assert bad["with_sources"]["verdict"] == "fail"
    assert good["passed"] and good["screen"]["coefficients_at"] == "mode-frequency"
    assert good["screen"]["log_dec_at_expected"] > 0.5 and good["screen"]["threshold_ratio"] > 4
    assert all(m["converged"] for m in good["with_sources"]["modes"])


@pytest.mark.slow
def test_usage_python_example_runs(tmp_path):
    text = (ROOT / "docs" / "usage.md").read_text()
    blocks = re.findall(r"```python\n(.*?)```", text, re.S)
    assert len(blocks) >= 2     # the one-import example and the module-by-module one
    script = tmp_path / "example.py"
    script.write_text("import matplotlib\nmatplotlib.use('Agg')\n" + "\n".join(blocks))
    (tmp_path / "cases").symlink_to(ROOT / "cases")
    done = subprocess.run([sys.executable, str(script)], cwd=tmp_path, capture_output=True,
                          text=True, timeout=300, env={"PYTHONPATH": str(ROOT),
                                                       "OPENBLAS_NUM_THREADS": "1",
                                                       "MPLBACKEND": "Agg", "HOME": str(tmp_path)})
    assert done.returncode == 0, done.stderr
    assert "rpm" in done.stdout and "pass" in done.stdout
