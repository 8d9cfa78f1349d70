"""``rotorcalc cross-coupling`` and the [coupling_screen] table in ``check``."""

import json

import pytest

from typer.testing import CliRunner

from rotorcalc.cli import app
from tests.conftest import ROOT

runner = CliRunner()
COMPRESSOR = ROOT / "cases" / "compressor.toml"


def bare_compressor():
    """The bundled compressor without its stage sources and screen rule."""
    text = COMPRESSOR.read_text()
    start, end = text.index("# Gas forces at the impellers"), text.index("[operating]")
    return text[:start] + text[end:]


def with_source(tmp_path, q, extra=""):
    """One source of ``q`` at impeller 4 (the first forward mode's threshold there is
    9.6e6 N/m)."""
    path = tmp_path / "compressor.toml"
    path.write_text(bare_compressor() + f'\n[[cross_coupling]]\nname = "gas"\nat = 7\n'
                    f'q = "{q} N/m"\n\n[coupling_screen]\nplacement = "sources"\n{extra}')
    return path


def test_the_screen_prints_and_writes_its_document(tmp_path):
    case = with_source(tmp_path, 3e6)
    out = tmp_path / "screen.json"
    result = runner.invoke(app, ["cross-coupling", str(case), "--json", str(out),
                                 "--csv", str(tmp_path / "screen.csv")])
    assert result.exit_code == 0, result.output
    doc = json.loads(out.read_text())["result"]
    screen = doc["screen"]
    assert screen["expected_n_m"] == 3e6 and screen["verdict"] == "pass"
    assert screen["threshold_n_m"] > 2 * 3e6 and screen["log_dec_at_zero"] > 0
    assert doc["with_sources"]["verdict"] == "pass"
    assert "common practice" in screen["criteria"]["label"]
    assert "Screening" in result.output and "threshold" in result.output


def test_check_fails_when_the_screen_fails_and_the_rule_can_be_left_out(tmp_path):
    failing = with_source(tmp_path, 6e6)          # threshold 9.6e6: ratio 1.6 < 2
    result = runner.invoke(app, ["check", str(failing)])
    assert result.exit_code == 1, result.output
    assert "Cross-coupling screen: fail" in " ".join(result.output.split())
    apart = with_source(tmp_path, 6e6, extra="in_check = false\n")
    assert runner.invoke(app, ["check", str(apart)]).exit_code == 0


def test_options_override_the_file(tmp_path):
    case = with_source(tmp_path, 6e6)
    result = runner.invoke(app, ["cross-coupling", str(case), "--min-ratio", "1.5",
                                 "--json", str(tmp_path / "s.json")])
    assert result.exit_code == 0
    doc = json.loads((tmp_path / "s.json").read_text())["result"]["screen"]
    assert doc["verdict"] == "pass" and doc["criteria"]["min_ratio"] == 1.5
    bad = runner.invoke(app, ["cross-coupling", str(case), "--placement", "everywhere"])
    assert bad.exit_code == 2 and "--placement" in bad.output
    plain = tmp_path / "bare.toml"
    plain.write_text(bare_compressor())
    bare = runner.invoke(app, ["cross-coupling", str(plain)])
    assert bare.exit_code == 2 and "cross_coupling" in bare.output


def test_the_bundled_compressor_carries_its_stages_and_passes_the_screen(tmp_path):
    out = tmp_path / "s.json"
    result = runner.invoke(app, ["cross-coupling", str(COMPRESSOR), "--json", str(out),
                                 "--plot", str(tmp_path / "s.png")])
    assert result.exit_code == 0, result.output
    doc = json.loads(out.read_text())["result"]
    assert len(doc["screen"]["stations"]) == 6 and doc["passed"]
    assert doc["screen"]["threshold_ratio"] > 2 and doc["screen"]["log_dec_at_expected"] > 0.1


@pytest.mark.slow
def test_what_if_studies_leave_the_sources_out_unless_told(tmp_path):
    """A what-if study asks about supports and masses: the file's gas forces are left out
    (the base then matches the rotor without them), and --with-sources keeps them."""
    import dataclasses

    from rotorcalc.analysis import screen
    from rotorcalc.reader import read_rotor
    rotor = read_rotor(COMPRESSOR)
    plain = screen(dataclasses.replace(rotor, sources=(), coupling_rule=None))
    gas = screen(dataclasses.replace(rotor, coupling_rule=None))

    def first_forward(result):
        return min(r.critical.speed for r in result.margins.rows
                   if r.critical.whirl == "forward" and r.verdict == "pass")

    speeds = {}
    for flag in ([], ["--with-sources"]):
        out = tmp_path / f"c{len(flag)}.json"
        result = runner.invoke(app, ["compare", str(COMPRESSOR), "--vary",
                                     "stiffer: bearing.*.k *= 1.1", "--json", str(out), *flag])
        assert result.exit_code == 0, result.output
        rows = json.loads(out.read_text())["result"]["criticals"]
        speeds[bool(flag)] = min(r["speed_rad_s"] for r in rows if r["variant"] == "base"
                                 and r["whirl"] == "forward" and r["verdict"] == "pass")
    assert speeds[False] == pytest.approx(first_forward(plain), rel=1e-9)
    assert speeds[True] == pytest.approx(first_forward(gas), rel=1e-9)
    assert speeds[True] != pytest.approx(speeds[False], rel=1e-4)


def test_a_seal_over_whirl_frequency_is_read_where_the_option_says(tmp_path):
    """A balance-piston seal whose damping grows with whirl frequency: the synchronous
    reading is the default (and says so); --coefficients-at mode-frequency iterates each
    forward mode and shows the synchronous value beside it."""
    seal = ('\n[[bearing]]\nname = "piston seal"\nat = "balance_piston"\nrole = "seal"\n'
            'whirl_frequencies = ["0 Hz", "400 Hz"]\nkxx = 0\nkyy = 0\n'
            'cxx = [["1000 N*s/m", "9000 N*s/m"]]\ncyy = [["1000 N*s/m", "9000 N*s/m"]]\n')
    case = with_source(tmp_path, 3e6)
    case.write_text(case.read_text().replace("\n[[cross_coupling]]", seal + "\n[[cross_coupling]]"))
    plain = runner.invoke(app, ["cross-coupling", str(case), "--json", str(tmp_path / "a.json")])
    assert plain.exit_code == 0, plain.output
    assert " ".join(plain.output.split()).count("read them at the spin speed") == 1
    own = runner.invoke(app, ["cross-coupling", str(case), "--coefficients-at",
                              "mode-frequency", "--json", str(tmp_path / "b.json")])
    assert own.exit_code == 0, own.output
    a = json.loads((tmp_path / "a.json").read_text())["result"]
    b = json.loads((tmp_path / "b.json").read_text())["result"]
    assert b["screen"]["coefficients_at"] == "mode-frequency" and not b["screen"]["notes"]
    modes = b["with_sources"]["modes"]
    assert all(m["converged"] for m in modes)
    # the first forward mode whirls near 60 Hz, below the 191 Hz spin speed: less seal
    # damping there than the synchronous reading gives
    assert modes[0]["log_dec"] < modes[0]["log_dec_synchronous"]
    assert b["screen"]["threshold_n_m"] < a["screen"]["threshold_n_m"]
    assert "Fixed point" in own.output
    bad = runner.invoke(app, ["cross-coupling", str(case), "--coefficients-at", "own"])
    assert bad.exit_code == 2 and "--coefficients-at" in bad.output
