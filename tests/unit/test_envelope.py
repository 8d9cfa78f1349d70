"""The tolerance envelope: its corners built from the ranges in the rotor file, the range
checks, and the choice of the worst corner per item (a decision table on stand-in results)."""

import math
from types import SimpleNamespace as NS

import pytest

from rotorcalc.analysis.envelope import corner_variants, worst_cases
from rotorcalc.errors import InputError
from rotorcalc.reader import parse_rotor
from tests.conftest import ROOT

BLOWER = (ROOT / "cases" / "blower_two_lobe.toml").read_text()
PUMP = (ROOT / "cases" / "feed_pump_sleeve.toml").read_text()


def test_three_ranges_give_eight_corners_with_both_bearings_at_one_end():
    rotor = parse_rotor(BLOWER)
    variants = corner_variants(rotor)
    assert len(variants) == 8
    assert variants[0].name == "clearance 100 um, preload 0.45, oil inlet 45 degC"
    assert variants[-1].name == "clearance 125 um, preload 0.55, oil inlet 55 degC"
    texts = [c.text for c in variants[0].changes]
    assert len(texts) == 6          # three quantities, two bearings
    assert texts[0].startswith("bearing[0].film.clearance = ") and texts[0].endswith(" m")
    assert float(texts[0].split("=")[1].split()[0]) == pytest.approx(100e-6)
    assert any(t.startswith("bearing[1].oil.inlet_temperature = 318.15") for t in texts)


def test_a_rotor_without_ranges_has_no_envelope():
    with pytest.raises(InputError) as info:
        corner_variants(parse_rotor(PUMP))
    assert info.value.kind == "missing" and "range" in str(info.value)


@pytest.mark.parametrize("old,new,key,kind", [
    ('clearance_range = ["100 um", "125 um"]', 'clearance_range = ["120 um", "125 um"]',
     "bearing[0].film.clearance_range", "range"),             # the nominal 110 um outside
    ('clearance_range = ["100 um", "125 um"]', 'clearance_range = ["125 um", "100 um"]',
     "bearing[0].film.clearance_range", "order"),
    ('clearance_range = ["100 um", "125 um"]', 'clearance_range = ["100 um"]',
     "bearing[0].film.clearance_range", "type"),
    ("preload_range = [0.45, 0.55]", 'preload_range = [0.45, "0.55"]',
     "bearing[0].film.preload_range[1]", "type"),
    ('inlet_temperature_range = ["45 degC", "55 degC"]', "inlet_temperature_range = [45, 55]",
     "bearing[0].oil.inlet_temperature_range[0]", "unit"),
])
def test_a_bad_range_names_its_key(old, new, key, kind):
    with pytest.raises(InputError) as info:
        parse_rotor(BLOWER.replace(old, new, 1))
    assert (info.value.key, info.value.kind) == (key, kind), str(info.value)


def _row(speed, margin, required, log_dec=0.5, passed=True, peak=None, required_peak=None):
    crit = NS(speed=speed, whirl="forward", log_dec=log_dec)
    return NS(critical=crit, margin=margin, required=required, verdict="pass" if passed
              else "fail", passed=passed, peak_margin=peak, required_response=required_peak)


def _screening(rows, least, checks=()):
    branch = NS(judged_log_dec=least, whirl="forward", worst_speed=100.0, passed=least > 0)
    return NS(margins=NS(rows=rows), stability=NS(branches=(branch,), passed=least > 0),
              response=NS(vibration=tuple(checks), clearance=()) if checks else None)


def test_the_worst_corner_per_item():
    """Margin: the smallest margin above the required one, by log dec or by response peak,
    whichever is smaller; unstable beats everything; stability: the least judged log
    decrement; response: the largest ratio to its limit."""
    base_row = _row(500.0, 30.0, 16.0)
    rows_a = [_row(480.0, 20.0, 16.0, peak=25.0, required_peak=16.0)]       # excess 4
    rows_b = [_row(520.0, 40.0, 16.0, peak=18.0, required_peak=16.0)]       # excess 2
    vib = lambda r: NS(case="u", where="P", check="vibration", ratio=r, passed=r <= 1)  # noqa: E731
    comparison = NS(
        names=("base", "a", "b"),
        screenings=(_screening([base_row], 0.3, [vib(0.2)]), _screening(rows_a, 0.1, [vib(0.5)]),
                    _screening(rows_b, 0.2, [vib(0.4)])),
        rows=(NS(variant="base", row=base_row, base_speed=500.0),
              NS(variant="a", row=rows_a[0], base_speed=500.0),
              NS(variant="b", row=rows_b[0], base_speed=500.0)))
    worst = {w.measure: w for w in worst_cases(comparison)}
    margin = worst["margin above the required one, %"]
    assert (margin.variant, margin.value, margin.nominal) == ("b", 2.0, 14.0)
    assert (worst["log decrement"].variant, worst["log decrement"].value) == ("a", 0.1)
    assert worst["log decrement"].nominal == 0.3
    assert (worst["ratio to the limit"].variant, worst["ratio to the limit"].value) == ("a", 0.5)
    unstable = _row(505.0, 50.0, 16.0, log_dec=-0.01, passed=False)
    comparison.rows += (NS(variant="c", row=unstable, base_speed=500.0),)
    worst = {w.measure: w for w in worst_cases(comparison)}
    assert worst["margin above the required one, %"].value == -math.inf
    assert worst["margin above the required one, %"].variant == "c"
