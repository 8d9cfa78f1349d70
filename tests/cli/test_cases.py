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
    check = runner.invoke(app, ["check", str(case)])
    assert check.exit_code == (0 if doc["result"]["passed"] else 1)
    layout = runner.invoke(app, ["layout", str(case), "--plot", str(tmp_path / "side.svg")])
    assert layout.exit_code == 0 and (tmp_path / "side.svg").read_text().startswith("<?xml")


@pytest.mark.slow
def test_bundled_cases_pass_their_check():
    """The examples are meant as designs that keep their margins."""
    for case in CASES:
        assert runner.invoke(app, ["check", str(case)]).exit_code == 0, case.name


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
