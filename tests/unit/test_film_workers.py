"""A film table is solved in two fixed runs handed to worker processes: the table is the same
to the last bit on one worker or two; the residual-unbalance rule's journal loads, started
from the table's states, equal a cold start's (within the statics' tolerance)."""

import numpy as np

from rotorcalc import statics
from rotorcalc.bearings import tabulate
from rotorcalc.reader import read_rotor
from tests.conftest import ROOT


def _same(a, b):
    for x, y in zip(a.bearings, b.bearings):
        assert x.speeds == y.speeds and x.coefficients == y.coefficients
        if x.film_record is not None:
            for name in ("speeds", "loads", "eccentricity", "temperature", "coefficients"):
                assert np.array_equal(getattr(x.film_record, name),
                                      getattr(y.film_record, name)), name


def test_a_film_table_is_the_same_on_one_worker_or_two():
    rotor = read_rotor(ROOT / "cases" / "feed_pump_sleeve.toml")
    key = tabulate._key(rotor)
    one = tabulate._tabulated(key, tabulate.TOLERANCE, tabulate.MAX_POINTS, workers=1)
    two = tabulate._tabulated(key, tabulate.TOLERANCE, tabulate.MAX_POINTS, workers=2)
    _same(one, two)
    assert any(b.film_record is not None for b in one.bearings)


def test_journal_loads_from_the_tables_states_equal_a_cold_start():
    rotor = read_rotor(ROOT / "cases" / "compressor_tilting_pad.toml")
    warm = tabulate.journal_static_loads(rotor)
    cold = statics.journal_static_loads(rotor)          # no start: the pads searched afresh
    assert warm.keys() == cold.keys() and len(warm) == 2
    for i in warm:
        # the lever rule on two journals: equal to the statics' load tolerance
        assert abs(warm[i] - cold[i]) <= 1e-6 * abs(cold[i])
    # vertical equilibrium: the journals together carry the rotor's weight
    assert abs(sum(warm.values()) - rotor.mass) <= 1e-6 * rotor.mass
