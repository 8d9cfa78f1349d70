"""rotorcalc.bearings.lubricant: every input check fires with its key; vectorisation; the
viscosity falls with temperature; the two given points are reproduced."""

import math

import numpy as np
import pytest

from rotorcalc.bearings import Lubricant, effective_temperature
from rotorcalc.bearings.lubricant import TYPICAL_AT_100C, ZERO_CELSIUS
from rotorcalc.errors import InputError

T40, T100 = ZERO_CELSIUS + 40.0, ZERO_CELSIUS + 100.0
POINTS = ((T40, 46e-6), (T100, 6.8e-6))
OIL = Lubricant(grade=68)
NAN, INF = float("nan"), float("inf")

#: (kind, key, call that must raise it)
BAD = [
    ("missing", "lubricant.grade", lambda: Lubricant()),
    ("conflict", "lubricant.points", lambda: Lubricant(grade=32, points=POINTS)),
    ("choice", "lubricant.grade", lambda: Lubricant(grade=50)),
    ("choice", "lubricant.grade", lambda: Lubricant(grade=NAN)),
    ("type", "lubricant.grade", lambda: Lubricant(grade="VG 32")),
    ("type", "lubricant.grade", lambda: Lubricant(grade=True)),
    ("length", "lubricant.points", lambda: Lubricant(points=(POINTS[0],))),
    ("length", "lubricant.points", lambda: Lubricant(points=5.0)),
    ("length", "lubricant.points[1]", lambda: Lubricant(points=(POINTS[0], (T100,)))),
    ("range", "lubricant.points[0][0]", lambda: Lubricant(points=((-1.0, 46e-6), POINTS[1]))),
    ("not-finite", "lubricant.points[1][0]",
     lambda: Lubricant(points=(POINTS[0], (INF, 6.8e-6)))),
    ("type", "lubricant.points[0][1]", lambda: Lubricant(points=((T40, "46 cSt"), POINTS[1]))),
    ("range", "lubricant.points[1][1]", lambda: Lubricant(points=(POINTS[0], (T100, 0.0)))),
    ("not-finite", "lubricant.points[1][1]", lambda: Lubricant(points=(POINTS[0], (T100, NAN)))),
    ("range", "lubricant.points[1][1]", lambda: Lubricant(points=(POINTS[0], (T100, 1.5e-6)))),
    ("conflict", "lubricant.points[1][0]", lambda: Lubricant(points=(POINTS[0], (T40, 6.8e-6)))),
    ("physics", "lubricant.points", lambda: Lubricant(points=((T40, 6.8e-6), (T100, 46e-6)))),
    ("physics", "lubricant.points", lambda: Lubricant(points=((T40, 46e-6), (T100, 46e-6)))),
    ("range", "lubricant.reference_density", lambda: Lubricant(grade=32, reference_density=0.0)),
    ("not-finite", "lubricant.reference_density",
     lambda: Lubricant(grade=32, reference_density=INF)),
    ("range", "lubricant.expansion", lambda: Lubricant(grade=32, expansion=-1e-4)),
    ("not-finite", "lubricant.expansion", lambda: Lubricant(grade=32, expansion=NAN)),
    ("range", "lubricant.specific_heat", lambda: Lubricant(grade=32, specific_heat=-2000.0)),
    ("type", "lubricant.specific_heat", lambda: Lubricant(grade=32, specific_heat=None)),
    ("type", "lubricant.name", lambda: Lubricant(grade=32, name=3)),
    ("range", "oil.specific_heat", lambda: Lubricant(grade=32, key="oil", specific_heat=0.0)),
    ("not-finite", "lubricant.points[0][0]",
     lambda: Lubricant.from_datasheet(NAN, 46.0, 100.0, 6.8)),
    ("range", "temperature", lambda: OIL.kinematic_viscosity(0.0)),
    ("range", "temperature", lambda: OIL.kinematic_viscosity(np.array([300.0, -5.0]))),
    ("not-finite", "temperature", lambda: OIL.dynamic_viscosity(np.array([300.0, NAN]))),
    ("type", "temperature", lambda: OIL.density("hot")),
    ("range", "temperature", lambda: OIL.density(3000.0)),
    ("range", "power_loss", lambda: OIL.temperature_rise(-1.0, 1e-4, T40)),
    ("range", "flow", lambda: OIL.temperature_rise(100.0, 0.0, T40)),
    ("not-finite", "flow", lambda: OIL.temperature_rise(100.0, INF, T40)),
    ("not-finite", "temperature", lambda: OIL.temperature_rise(100.0, 1e-4, NAN)),
    ("range", "effective_temperature.inlet", lambda: effective_temperature(0.0, 5.0)),
    ("range", "effective_temperature.rise", lambda: effective_temperature(T40, -5.0)),
    ("not-finite", "effective_temperature.rise", lambda: effective_temperature(T40, NAN)),
    ("range", "effective_temperature.share", lambda: effective_temperature(T40, 5.0, 1.2)),
    ("type", "effective_temperature.share", lambda: effective_temperature(T40, 5.0, "most")),
]


@pytest.mark.parametrize("kind, key, call", BAD, ids=[f"{k}:{c}" for c, k, _ in BAD])
def test_every_input_check_fires_with_its_key(kind, key, call):
    with pytest.raises(InputError) as info:
        call()
    assert info.value.key == key
    assert info.value.kind == kind


@pytest.mark.parametrize("grade", sorted(TYPICAL_AT_100C))
def test_grade_points_are_reproduced(grade):
    oil = Lubricant(grade=grade)
    assert oil.points == ((T40, grade * 1e-6), (T100, TYPICAL_AT_100C[grade] * 1e-6))
    assert oil.kinematic_viscosity(T40) == pytest.approx(grade * 1e-6, rel=1e-12)
    assert oil.kinematic_viscosity(T100) == pytest.approx(TYPICAL_AT_100C[grade] * 1e-6,
                                                          rel=1e-12)


def test_given_points_are_reproduced_in_either_order():
    pts = ((ZERO_CELSIUS + 90.0, 9.0e-6), (ZERO_CELSIUS + 25.0, 120.0e-6))
    oil = Lubricant(points=pts, name="test oil")
    assert oil.points == (pts[1], pts[0])          # coolest first
    for t, nu in pts:
        assert oil.kinematic_viscosity(t) == pytest.approx(nu, rel=1e-12)


def test_points_as_an_array_or_none():
    oil = Lubricant(points=np.array(POINTS))
    assert oil.points == POINTS and isinstance(oil.points[0][0], float)
    assert Lubricant(grade=46, points=None) == Lubricant(grade=46)
    with pytest.raises(InputError) as info:
        Lubricant(grade=46, points=np.array(POINTS))
    assert info.value.key == "lubricant.points" and info.value.kind == "conflict"


def test_datasheet_edge_is_the_same_oil_in_si():
    sheet = Lubricant.from_datasheet(40.0, 46.0, 100.0, 6.8)
    assert np.allclose(sheet.points, ((T40, 46e-6), (T100, 6.8e-6)), rtol=1e-15, atol=0.0)
    assert sheet.dynamic_viscosity(330.0) == pytest.approx(
        Lubricant(grade=46).dynamic_viscosity(330.0), rel=1e-12)


def test_numbers_in_numbers_out_arrays_keep_their_shape():
    t = np.linspace(280.0, 400.0, 12).reshape(3, 4)
    for method in (OIL.kinematic_viscosity, OIL.density, OIL.dynamic_viscosity):
        scalar = method(330.0)
        assert isinstance(scalar, float)
        values = method(t)
        assert values.shape == (3, 4)
        assert values[1, 2] == pytest.approx(method(float(t[1, 2])), rel=1e-15)
    assert isinstance(OIL.kinematic_viscosity(np.float64(330.0)), float)
    assert OIL.kinematic_viscosity([300.0, 320.0]).shape == (2,)


@pytest.mark.parametrize("grade", sorted(TYPICAL_AT_100C))
def test_viscosity_and_density_fall_as_the_temperature_rises(grade):
    oil = Lubricant(grade=grade)
    t = np.linspace(ZERO_CELSIUS - 10.0, ZERO_CELSIUS + 150.0, 400)
    for values in (oil.kinematic_viscosity(t), oil.density(t), oil.dynamic_viscosity(t)):
        assert np.all(np.diff(values) < 0.0)
        assert np.all(values > 0.0)


def test_heavier_grade_is_thicker_at_every_temperature():
    t = np.linspace(ZERO_CELSIUS, ZERO_CELSIUS + 140.0, 50)
    grades = sorted(TYPICAL_AT_100C)
    nus = [Lubricant(grade=g).kinematic_viscosity(t) for g in grades]
    for thin, thick in zip(nus, nus[1:]):
        assert np.all(thick > thin)


def test_constant_density_without_expansion():
    oil = Lubricant(grade=32, expansion=0.0, reference_density=900.0)
    assert np.all(oil.density(np.array([250.0, 300.0, 400.0])) == 900.0)


def test_frozen_and_comparable():
    with pytest.raises(AttributeError):
        OIL.grade = 32
    assert Lubricant(grade=68.0) == OIL and Lubricant(grade=68.0).grade == 68
    assert hash(Lubricant(grade=68)) == hash(OIL)


def test_effective_temperature_and_rise_edges():
    assert effective_temperature(320.0, 0.0) == 320.0
    assert effective_temperature(320.0, 10.0, share=1.0) == 330.0
    assert effective_temperature(320.0, 10.0, share=0.0) == 320.0
    assert OIL.temperature_rise(0.0, 1e-4, 320.0) == 0.0
    # twice the flow, half the rise
    assert OIL.temperature_rise(500.0, 2e-4, 320.0) == pytest.approx(
        OIL.temperature_rise(500.0, 1e-4, 320.0) / 2, rel=1e-15)
    assert math.isfinite(OIL.temperature_rise(500.0, 1e-4, 320.0))
