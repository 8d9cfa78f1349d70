"""Every bearing model answers ``coefficients(speed, load, *, whirl=None)`` with ``stiffness``
and ``damping``; ``Bearing.model`` gives it, and the analyses' ``Bearing.matrices`` reads the
same numbers (tables) or the table computed from it (geometry)."""

import math

import numpy as np
import pytest

from rotorcalc.bearings import CoefficientTable, FilmJournal
from rotorcalc.reader import read_rotor
from rotorcalc.supports import Bearing
from tests.conftest import ROOT


def test_a_table_bearing_is_its_table_model():
    b = Bearing(0, {"kxx": (1e8, 2e8), "kyy": (3e8,), "kxy": ((1e6, 2e6), (3e6, 4e6))},
                speeds=(100.0, 300.0), whirl=(50.0, 150.0))
    model = b.model
    assert isinstance(model, CoefficientTable)
    for speed, whirl in ((100.0, None), (200.0, 100.0), (400.0, 10.0)):
        got = model.coefficients(speed, (0.0, -1000.0), whirl=whirl)
        k, c = b.matrices(speed, whirl)
        assert np.array_equal(got.stiffness, k) and np.array_equal(got.damping, c)
    # linear in speed then in frequency: kxy at 200 rad/s, whirl 100 rad/s
    assert model.coefficients(200.0, whirl=100.0).stiffness[0, 1] == pytest.approx(2.5e6)


def test_a_geometry_bearing_is_its_film_model():
    rotor = read_rotor(ROOT / "cases" / "feed_pump_sleeve.toml")
    b = rotor.bearings[0]
    assert isinstance(b.model, FilmJournal)
    record = b.film_record
    speed, load = float(record.speeds[8]), tuple(record.loads[8])
    got = b.model.coefficients(speed, load, whirl=0.5 * speed)   # whirl: not used
    same = b.model.coefficients(speed, load)
    assert np.allclose(got.stiffness, same.stiffness, rtol=1e-9)
    # the solve at a fit speed is the record's; the table there is its smoothed fit
    solved = np.concatenate([same.stiffness.ravel(), same.damping.ravel()])
    # the record's solve started from its neighbour's state: the heat balance stops within
    # 0.1 K of its root, so a fresh start lands a little elsewhere (0.3 % of viscosity)
    assert np.allclose(solved, record.coefficients[8], rtol=1e-2)
    k, c = b.matrices(speed)
    table = np.concatenate([k.ravel(), c.ravel()])
    assert np.linalg.norm(table - solved) / np.linalg.norm(solved) < 0.05
    assert math.isclose(b.speeds[0], record.speeds[0])


def test_a_speed_table_reads_as_numpys_linear_interpolation_bit_for_bit():
    """``Bearing.matrices`` reads all eight coefficients of a table over speed at once; each
    must equal numpy's ``interp`` of its own column (linear between table points, the end
    values held: numpy's documented rule), to the last bit, at table points, between them,
    at and beyond both ends, with constant and missing coefficients among them."""
    speeds = (50.0, 120.0, 300.0, 301.5, 900.0)
    columns = {"kxx": (1.1e8, 2.7e8, 3.3e8, 3.31e8, 9.9e8), "kxy": (1e6, -2e6, 3e6, 0.0, 5e6),
               "kyx": (7.5e6,), "kyy": (2e8, 2.2e8, 2.9e8, 3e8, 8.1e8),
               "cxx": (1e5, 3e5, 2e5, 2.5e5, 1.7e5), "cxy": (-0.0,), "cyy": (1.3e5,)}
    b = Bearing(0, columns, speeds=speeds)
    names = ("kxx", "kxy", "kyx", "kyy", "cxx", "cxy", "cyx", "cyy")
    probes = [0.0, 49.999, 50.0, 77.7, 120.0, 299.9999999, 300.0, 300.75, 301.5, 612.3,
              900.0, 900.0000001, 1e4, np.float32(333.3), 400, math.nan] + \
        list(np.linspace(40.0, 950.0, 97))
    for speed in probes:
        k, c = b.matrices(speed)
        got = np.concatenate([k.ravel(), c.ravel()])
        for value, name in zip(got, names):
            column = np.asarray(columns.get(name, (0.0,)))
            want = column[0] if column.size == 1 else np.interp(speed, speeds, column)
            # the same bits: the sign of a zero, and not-a-number where numpy gives one
            assert np.array_equal(np.float64(value).view(np.int64),
                                  np.float64(want).view(np.int64)) or (
                math.isnan(value) and math.isnan(want)), (speed, name, value, want)
        k[0, 0] = -1.0                                  # a caller's change stays its own
        assert b.matrices(speed)[0][0, 0] != -1.0


def test_a_pickled_bearing_is_the_same_whether_it_was_read_or_not():
    """Workers and the film cache's keys pickle bearings: the bytes must not depend on
    whether an analysis read the bearing before (its reader is made again where needed)."""
    import pickle
    b = Bearing(0, {"kxx": (1e8, 2e8), "kyy": (3e8,)}, speeds=(100.0, 300.0))
    before = pickle.dumps(b)
    k, _ = b.matrices(200.0)
    assert pickle.dumps(b) == before and b"TableReader" not in before
    again = pickle.loads(pickle.dumps(b))
    assert again == b and np.array_equal(again.matrices(200.0)[0], k)
