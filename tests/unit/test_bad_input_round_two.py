"""Bad input, round two: each input that once crashed, hung or ran silently with
impossible physics now gets the answer it should (tests/unit/test_error_kinds.py
holds one case per error kind; this file the behaviours around them)."""

import math

import numpy as np
import pytest
from typer.testing import CliRunner

from rotorcalc import units as u
from rotorcalc.analysis import modes_at
from rotorcalc.analysis.sweep import _solver_warnings
from rotorcalc.cli import app
from rotorcalc.errors import InputError
from rotorcalc.reader import parse_rotor, read_rotor
from tests.conftest import ROOT

runner = CliRunner()
FAN = ROOT / "cases" / "overhung_fan.toml"
RPM = 2 * math.pi / 60


def test_a_byte_order_mark_is_not_part_of_the_text(tmp_path):
    path = tmp_path / "fan.toml"
    path.write_bytes(b"\xef\xbb\xbf" + FAN.read_bytes())
    assert read_rotor(path).name == read_rotor(FAN).name


def test_deep_nesting_is_refused_not_a_recursion_error():
    with pytest.raises(InputError) as info:
        parse_rotor("x = " + "[" * 5000 + "]" * 5000 + "\n")
    assert info.value.kind == "size" and "deeply" in info.value.problem


def test_a_file_of_many_megabytes_is_refused(tmp_path):
    path = tmp_path / "big.toml"
    path.write_text(FAN.read_text() + "\n# " + "x" * 6_000_000 + "\n")
    with pytest.raises(InputError) as info:
        read_rotor(path)
    assert info.value.kind == "size"


@pytest.mark.parametrize("text, rad_s", [
    ("150 rad*Hz", 150.0),          # an angle and Hz: Hz is 1/s (it once gained 2 pi)
    ("3000 Hz*rad", 3000.0),
    ("50 Hz", 100 * math.pi),       # Hz alone is revolutions per second
    ("3000 rpm", 100 * math.pi),
    ("18000 deg/s", 100 * math.pi),
    ("314.159 rad/s", 314.159),
])
def test_speed_units_are_consistent(text, rad_s):
    assert u.parse(text, u.SPEED, "k") == pytest.approx(rad_s, rel=1e-12)


@pytest.mark.parametrize("text", ["50 percent", "500 mm/m", "500000 ppm"])
def test_dimensionless_units_are_not_lengths(text):
    with pytest.raises(InputError) as info:
        u.parse(text, u.LENGTH, "section[0].length")
    assert info.value.kind == "unit" and "dimensionless" in info.value.problem


@pytest.mark.parametrize("text", ["9**9**9 mm", "2**100 mm", "1 m**0.5", "x" * 200])
def test_unit_text_is_bounded(text):
    with pytest.raises(InputError):
        u.parse(text, u.LENGTH, "k")


def soft_fan(tmp_path, k="1e-3 N/m"):
    text = FAN.read_text()
    for old in ('kxx = "6.0e8 N/m"', 'kyy = "6.0e8 N/m"', 'kxx = "8.0e8 N/m"',
                'kyy = "8.0e8 N/m"'):
        text = text.replace(old, old.split("=")[0] + f'= "{k}"')
    path = tmp_path / "soft.toml"
    path.write_text(text)
    return path


def test_near_free_bearings_are_rigid_body_motion_not_a_mode(tmp_path):
    """Bearings of 1e-3 N/m under a steel shaft: the four rigid-body motions are
    counted (a 'mode' at 0.00 Hz with log decrement 361158 was once listed)."""
    m = modes_at(read_rotor(soft_fan(tmp_path)), 1000 * RPM, 6)
    assert m.rigid_body_modes == 4
    assert np.all(m.frequency_hz > 0.1) and np.all(m.log_dec < 100)


def test_a_rotor_that_is_not_held_up_is_refused_by_every_screening_command(tmp_path):
    path = soft_fan(tmp_path)
    for command in ("sweep", "criticals", "check", "response"):
        result = runner.invoke(app, [command, str(path)])
        assert result.exit_code == 2, (command, result.output)
        assert "not held up" in result.output
    assert runner.invoke(app, ["modes", str(path), "--speed", "1000 rpm"]).exit_code == 0


def test_options_are_named_as_options():
    for args, key in ((["--orders", "0"], "--orders"), (["--orders", "1e308"], "--orders"),
                      (["--speed-count", "1000000000"], "--speed-count"),
                      (["--stability-rule", "bogus"], "--stability-rule")):
        result = runner.invoke(app, ["criticals", str(FAN)] + args)
        assert result.exit_code == 2 and key in result.output, result.output
        assert "analysis." not in result.output
    result = runner.invoke(app, ["modes", str(FAN), "--speed", "-3000 rpm"])
    assert result.exit_code == 2 and "negative" in result.output


def test_a_solver_warning_keeps_its_ending():
    from rotorcalc.notices import Notice

    class Solved:
        warnings = (Notice("sparse eigen-solve: could not prove that no mode was missed (found "
                           "only 3 of 4 modes); the dense solver was used instead",
                           "solver-doubt"),)
    text = _solver_warnings([Solved(), Solved()], np.array([10.0, 20.0]))[0]
    assert text.startswith("sparse eigen-solve: could not prove")
    assert "the dense solver was used instead" in text and "2 of 2 speeds" in text
    # grouped by its code, not its words: a record with the speeds it concerns
    assert text.code == "solver-doubt" and text.speeds == (10.0, 20.0)


def test_a_bad_maximum_speed_is_not_blamed_on_trip_alone():
    text = FAN.read_text().replace('max_speed = "1490 rpm"', 'max_speed = "14900 rpm"')
    with pytest.raises(InputError) as info:
        parse_rotor(text)
    assert "one of the two is wrong" in info.value.problem and "max_speed" in info.value.expected


def test_variants_scale_disk_inertias_in_any_order():
    from rotorcalc.variants import Variant, apply_variant, parse_change
    rotor = read_rotor(ROOT / "cases" / "compressor.toml")
    heavier = Variant("heavier", tuple(parse_change(t) for t in (
        "disk.impeller 1.polar_inertia *= 1.08", "disk.impeller 1.transverse_inertia *= 1.08")))
    assert apply_variant(rotor, heavier).disks[0].polar_inertia == pytest.approx(0.62 * 1.08)
    impossible = Variant("flat", (parse_change("disk.impeller 1.polar_inertia *= 1.5"),))
    with pytest.raises(InputError):
        apply_variant(rotor, impossible)


def test_a_mode_that_disagrees_with_its_own_shape_fails_the_solve():
    """The guard on lost digits: a computed eigenvalue must agree with the Rayleigh
    value of its own vector in the unscaled matrices (1e-12 on a sound solve)."""
    from rotorcalc.analysis.modes import DIGITS_LOST, _check_digits, mode_checks
    from rotorcalc.assembly import assemble
    from rotorcalc.errors import SolverError
    from rotorcalc.solvers import make_solver
    system = assemble(read_rotor(FAN))
    w = 1000 * RPM
    d, k = system.damping(w) + w * system.gyroscopic, system.stiffness(w)
    pairs = make_solver()(system.mass, d, k, 4, zeros=0)
    _, rayleigh = mode_checks(pairs.values, pairs.vectors, system.mass, d, k)
    _check_digits(pairs.values, rayleigh, w)                                 # sound: silent
    assert np.max(np.abs(rayleigh / pairs.values - 1)) < 1e-9
    wrong = pairs.values * (1 + 100 * DIGITS_LOST)
    _, rayleigh = mode_checks(wrong, pairs.vectors, system.mass, d, k)
    with pytest.raises(SolverError, match="lost the digits"):
        _check_digits(wrong, rayleigh, w)


def test_a_growing_motion_without_whirl_is_an_instability():
    """A positive real eigenvalue (static divergence) fails the stability verdict in
    the judged range, whatever the whirling modes do (it was once visible only in the
    JSON of `modes`)."""
    import dataclasses

    from rotorcalc.analysis import stability, sweep
    from rotorcalc.assembly import assemble
    system = assemble(read_rotor(FAN))
    op = system.rotor.operating
    result = sweep(system, speeds=np.linspace(0.0, 1.2 * op.trip_speed, 13))
    stable = stability(system, result)
    assert stable.passed and not stable.divergent_speeds
    growth = np.where(result.speeds >= op.min_speed, 5.0, -np.inf)   # +5 1/s from min speed
    diverging = stability(system, dataclasses.replace(result, growth=growth))
    assert not diverging.passed and diverging.divergent_speeds[0] >= op.min_speed
