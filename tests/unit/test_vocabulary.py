"""One vocabulary: every renamed spelling still reads for one version, with a note naming the
new one; the fixed words are enums that behave as their text; numbers count from 1 in
objects, tables and files alike."""

import json
import warnings

import pytest
from typer.testing import CliRunner

from rotorcalc.cli import app
from rotorcalc.model import Bearing, MarginRule, Settings, StabilityRule
from rotorcalc.reader import parse_rotor
from rotorcalc.vocabulary import (RENAMED_KEYS, RENAMED_OPTIONS, BearingRole, RenamedWarning,
                                  Side, Verdict, Whirl)
from tests.conftest import ROOT

runner = CliRunner()
PUMP = str(ROOT / "cases" / "feed_pump.toml")
BASE = """
[materials.steel]
youngs_modulus = "211 GPa"
poisson_ratio = 0.3
density = "7810 kg/m^3"
[[section]]
length = "1 m"
outer_diameter = "50 mm"
material = "steel"
elements = 4
[[bearing]]
at = 0
kxx = "1e7 N/m"
kyy = "1e7 N/m"
[[bearing]]
at = 1
kxx = "1e7 N/m"
kyy = "1e7 N/m"
[operating]
min_speed = "1000 rpm"
max_speed = "3000 rpm"
"""


def _options(command_name):
    from rotorcalc.cli import load_command   # the command itself, not its entry in the list
    command = load_command(command_name)
    return {opt for p in command.params if p.param_type_name == "option" for opt in p.opts}


@pytest.mark.parametrize("command", sorted(RENAMED_OPTIONS))
def test_every_renamed_option_exists_under_its_new_name_only(command):
    options = _options(command)
    for old, new in RENAMED_OPTIONS[command].items():
        assert new in options, (command, new)
        assert old not in options, (command, old)


def test_an_old_option_reads_as_the_new_one_with_a_note():
    new = runner.invoke(app, ["modes", PUMP, "--speed", "3000 rpm", "--mode-count", "3"])
    old = runner.invoke(app, ["modes", PUMP, "--speed", "3000 rpm", "--count", "3"])
    assert old.exit_code == new.exit_code == 0
    assert "--count is the old spelling of --mode-count" in old.stderr
    assert old.stdout == new.stdout and "old spelling" not in new.stderr


def test_an_old_option_with_equals_and_after_double_dash():
    from rotorcalc.vocabulary import rename_options
    notes = []
    args = rename_options("sweep", ["--points=11", "--to", "9000 rpm", "--", "--to"],
                          notes.append)
    assert args == ["--speed-count=11", "--speed-to", "9000 rpm", "--", "--to"]
    assert len(notes) == 2


@pytest.mark.parametrize("table, old, value", [("analysis", "modes", "4"),
                                               ("bearing", "kind", '"seal"')])
def test_an_old_key_reads_as_the_new_one_with_a_warning(table, old, value):
    new_key = RENAMED_KEYS[(table, old)]
    where = "[analysis]\n" if table == "analysis" else ""
    text_old = BASE.replace("[[bearing]]\nat = 1", f"[[bearing]]\nat = 1\n{old} = {value}") \
        if table == "bearing" else BASE + f"{where}{old} = {value}\n"
    text_new = text_old.replace(f"{old} = {value}", f"{new_key} = {value}")
    with pytest.warns(RenamedWarning, match=f"{old} is the old spelling of .*{new_key}"):
        rotor_old = parse_rotor(text_old)
    assert rotor_old == parse_rotor(text_new)


def test_old_and_new_key_together_is_a_conflict():
    from rotorcalc.errors import InputError
    with pytest.raises(InputError, match="together with mode_count"), \
            warnings.catch_warnings():
        warnings.simplefilter("ignore", RenamedWarning)
        parse_rotor(BASE + "[analysis]\nmodes = 4\nmode_count = 4\n")


def test_residual_without_its_multiple_says_what_it_reads():
    text = BASE + ('[unbalance.one]\n[[unbalance.one.weight]]\nat = 0\namount = "residual"\n')
    with pytest.warns(RenamedWarning, match="2 x the residual amount"):
        implicit = parse_rotor(text)
    stated = parse_rotor(text.replace("[unbalance.one]\n",
                                      "[unbalance.one]\nresidual_multiple = 2\n"))
    assert implicit.unbalance[0].weights[0].amount == stated.unbalance[0].weights[0].amount


def test_old_python_keywords_and_attributes_still_read():
    with pytest.warns(RenamedWarning):
        old = Settings(modes=3, stability=StabilityRule(kind="at-least", minimum=0.2))
    assert old == Settings(mode_count=3, stability_rule=StabilityRule("at-least", 0.2))
    with pytest.warns(RenamedWarning):
        rule = MarginRule(kind="fixed", below=10.0, above=12.0, cap_below=20.0)
    assert (rule.name, rule.margin_below, rule.margin_above, rule.margin_cap_below) == (
        "fixed", 10.0, 12.0, 20.0)
    bearing = Bearing(0, {"kxx": (1.0,), "kyy": (1.0,)}, role="seal")
    with pytest.warns(RenamedWarning):
        assert bearing.kind == "seal"


def test_the_fixed_words_are_their_text():
    assert Whirl.FORWARD == "forward" and f"{Whirl.BACKWARD}" == "backward"
    assert str(Verdict.CRITICALLY_DAMPED) == "critically damped"
    assert json.dumps({"side": Side.ABOVE}) == '{"side": "above"}'
    assert {"forward": 1}[Whirl.FORWARD] == 1 and hash(BearingRole.SEAL) == hash("seal")
    assert f"{Whirl.MIXED:>7}" == "  mixed"
    with pytest.raises(Exception):
        Bearing(0, {"kxx": (1.0,), "kyy": (1.0,)}, role="damper")


def test_numbers_count_from_one_in_objects_tables_and_files(tmp_path):
    from rotorcalc import read_rotor, screen
    result = screen(read_rotor(PUMP))
    doc = result.to_dict()
    rows = result.margins.rows
    assert [r.critical.branch for r in rows] == [c["branch"] for c in doc["criticals"]]
    assert min(r.critical.branch for r in rows) >= 1
    assert [b.branch for b in result.stability.branches] == \
        [b["branch"] for b in doc["stability"]["branches"]] == \
        list(range(1, len(result.stability.branches) + 1))
    # the branch's column in the sweep's arrays is branch - 1
    crit = rows[0].critical
    column = result.sweep.frequency[:, crit.branch - 1]
    assert column.min() <= crit.eigenvalue.imag <= column.max() * 1.01


def test_the_old_picture_names_still_draw_with_a_note():
    import rotorcalc as rc
    from rotorcalc import plotting
    from rotorcalc.analysis import modes_at
    from tests.conftest import isotropic, uniform_shaft
    with pytest.warns(RenamedWarning, match="plot_bode"):
        assert plotting.bode is plotting.plot_bode
    with pytest.warns(RenamedWarning, match="plot_whirl_speed_map"):
        assert rc.whirl_speed_map is rc.plot_whirl_speed_map
    modes = modes_at(uniform_shaft(bearings=(isotropic(0, 1e7), isotropic(1, 1e7)),
                                   elements=4), 100.0, 3)
    with pytest.warns(RenamedWarning):
        old = plotting.mode_shape(modes, 1)             # 0.1: counted from 0
    assert old.ax.get_title(loc="left") == plotting.plot_mode_shape(modes, 2).ax.get_title(
        loc="left")


def test_renamed_result_attributes_still_read():
    from rotorcalc.analysis import stability as stability_module
    from rotorcalc.analysis.margins import Judgement
    from rotorcalc.analysis.response import LimitCheck
    from rotorcalc.analysis.screening import CoverageGap
    import importlib
    module = importlib.import_module("rotorcalc.analysis.stability")
    with pytest.warns(RenamedWarning):
        assert CoverageGap("solver", "x").kind == "solver"
    with pytest.warns(RenamedWarning):
        assert LimitCheck("c", "p", 1.0, 1.0, 2.0, "vibration").kind == "vibration"
    with pytest.warns(RenamedWarning):
        assert module.describe_mode is module.describe_branch
    from types import SimpleNamespace
    crit = SimpleNamespace(log_dec=0.3, damping_ratio=0.05, forward_fraction=1.0)
    with pytest.warns(RenamedWarning):
        assert Judgement(MarginRule()).kind(crit) == "judged"
    assert callable(stability_module)      # the package exports the function by that name
