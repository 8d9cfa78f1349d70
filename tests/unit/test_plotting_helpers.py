"""The plotting package's shared parts: the artists base type, the unit, orbit and phase
helpers every picture uses, and the size of its modules and functions.

The helpers are checked against direct evaluation of the formulas they stand for
(elementary trigonometry of ``Re(A e^{it})``), the unit factors against the exact
definitions of the inch and the pound-force.
"""

import ast
import dataclasses
import math
from pathlib import Path

import matplotlib

matplotlib.use("Agg")

import numpy as np
import pytest

import rotorcalc.plotting
from rotorcalc.plotting import _orbit, _phase, _units
from rotorcalc.plotting._artists import Artists, RangeArtists, WhirlMapArtists
from rotorcalc.units import RPM

RECORDS = ("SpeedMapArtists", "ModeShapeArtists", "LayoutArtists", "BodeArtists",
           "PolarArtists", "OrbitArtists", "CriticalMapArtists", "VariantMapArtists",
           "MapShapeArtists")


# --- one artists base -------------------------------------------------------------------

@pytest.mark.parametrize("name", RECORDS)
def test_every_picture_record_derives_from_one_frozen_base(name):
    record = getattr(rotorcalc.plotting, name)
    assert issubclass(record, Artists) and record.__dataclass_params__.frozen
    fields = {f.name for f in dataclasses.fields(record)}
    assert {"figure", "ax", "legend"} <= fields
    out = record(figure="fig", ax="ax")          # every other field has a default
    assert (out.figure, out.ax, out.legend) == ("fig", "ax", None)
    with pytest.raises(dataclasses.FrozenInstanceError):
        out.legend = "key"


def test_the_range_and_whirl_map_bases_are_shared_where_the_fields_are():
    assert issubclass(rotorcalc.plotting.CriticalMapArtists, RangeArtists)
    for name in ("SpeedMapArtists", "VariantMapArtists"):
        assert issubclass(getattr(rotorcalc.plotting, name), WhirlMapArtists)


# --- units -------------------------------------------------------------------------------

def test_picture_units_follow_the_exact_definitions():
    # 1 in = 0.0254 m and 1 lbf = 0.45359237 kg x 9.80665 m/s^2, both exact by definition
    # (international yard and pound agreement, 1959; standard gravity, 3rd CGPM 1901; from
    # memory)
    lbf = 0.45359237 * 9.80665
    assert math.isclose(_units.N_PER_KLBF_IN, 1e3 * lbf / 0.0254, rel_tol=1e-12)
    assert np.allclose(_units.from_klbf_in(_units.to_klbf_in([1e7, 3e8])), [1e7, 3e8])
    assert _units.MM == 1e3 and _units.UM == 1e6
    assert _units.RPM is RPM                      # the package's own, not a copy
    assert math.isclose(_units.from_rpm(60.0), 2.0 * math.pi)
    # |A e^{it}| peaks at |A|: peak-to-peak is twice that
    assert math.isclose(_units.pk_pk_um(3e-6 + 4e-6j), 10.0)
    assert [_units.um_text(v) for v in (250.0, 1.234, 0.0456)] == ["250 \u00b5m", "1.23 \u00b5m",
                                                                   "0.046 \u00b5m"]


# --- orbits ------------------------------------------------------------------------------

def test_an_orbit_is_the_ellipse_of_its_complex_amplitudes():
    a, b = 3.0, 1.0
    t = np.linspace(0.0, 2.0 * np.pi, 97)
    # x = Re(a e^{it}) = a cos t, y = Re(-i b e^{it}) = b sin t: forward, semi-axes a and b
    xs, ys = _orbit.ellipse(a, -1j * b, _orbit.turn(97))
    assert np.allclose(xs, a * np.cos(t)) and np.allclose(ys, b * np.sin(t))
    shape = np.array([[a, -1j * b], [b, 1j * a], [1.0, 1.0]])
    # forward and backward circles (|X + iY| and |X - iY|) / 2 add up to the major semi-axis
    assert np.allclose(_orbit.major_axis(shape), [a, a, math.sqrt(2.0)])
    assert _orbit.forward_dominant(a, -1j * b) and not _orbit.forward_dominant(b, 1j * a)
    assert _orbit.forward_dominant(1.0, 1.0)      # a straight line counts as forward


def test_the_snapshot_is_the_shape_at_the_end_of_the_major_axis():
    # node 1 moves on x = 2 cos(t + 0.3), y = sin(t + 0.3): at its major axis when t = -0.3
    shape = np.array([[1.0, -0.5j], [2.0, -1.0j], [0.0, 0.0]]) * np.exp(0.3j)
    d, t = _orbit.snapshot(shape, 1)
    assert math.isclose(math.remainder(t + 0.3, math.pi), 0.0, abs_tol=1e-12)
    assert np.allclose(np.abs(d), [1.0, 2.0, 0.0])
    assert _orbit.snapshot(np.zeros((2, 2), complex), 0)[0] is None


# --- phase -------------------------------------------------------------------------------

def test_the_lag_behind_the_mark_and_its_wraps():
    # x = Re(e^{-i phi} e^{iwt}) = cos(wt - phi) lags the mark by phi
    assert math.isclose(_phase.lag_of(np.exp(-1j * math.radians(30.0))), 30.0)
    assert math.isclose(_phase.lag_of(np.exp(1j * math.radians(30.0))), 330.0)
    assert math.isclose(_phase.lag_radians(-1.0), math.pi)
    x, lag = _phase.break_wraps(np.arange(4.0), np.array([300.0, 350.0, 10.0, 40.0]))
    assert np.isnan(x[2]) and np.isnan(lag[2]) and len(x) == 5
    speeds = np.array([0.0, 2.0])
    assert _phase.value_at(speeds, np.array([0.0, 2.0 + 4.0j]), 1.0) == 1.0 + 2.0j


# --- a house a newcomer can extend ----------------------------------------------------------

def test_plotting_modules_and_functions_stay_small():
    # common practice: a module one can read in a sitting, a function on one screen
    folder = Path(rotorcalc.plotting.__file__).parent
    for source in folder.glob("*.py"):
        text = source.read_text(encoding="utf-8")
        assert len(text.splitlines()) <= 450, source.name
        for node in ast.walk(ast.parse(text)):
            if isinstance(node, (ast.FunctionDef, ast.AsyncFunctionDef)):
                start = min([node.lineno] + [d.lineno for d in node.decorator_list])
                assert node.end_lineno - start + 1 <= 80, f"{source.name}: {node.name}"
