"""Decision rules as tables: the change grammar, the matching of a variant's criticals to
the base's, and the tracker's assignment.  Each row is one situation and the answer the
rule must give (project rules; the reasons are in the rows)."""

import numpy as np
import pytest

from rotorcalc.analysis.tracking import track
from rotorcalc.analysis.whatif import MATCH_SHARE, match_criticals
from rotorcalc.errors import InputError
from rotorcalc.variants import parse_change

# --- the change grammar ----------------------------------------------------------------

GRAMMAR = [
    # text, (op, value, path) or the error kind
    ("bearing.*.k *= 0.7", ("scale", 0.7, [("bearing", None), ("*", None), ("k", None)])),
    ("bearing[0].kxx = 1.2e8 N/m", ("set", "1.2e8 N/m", [("bearing", 0), ("kxx", None)])),
    ("disk.impeller 1.mass *= 1.08", ("scale", 1.08,
                                      [("disk", None), ("impeller 1", None), ("mass", None)])),
    ("operating.max_speed = 3800 rpm", ("set", "3800 rpm", [("operating", None),
                                                            ("max_speed", None)])),
    ("bearing.*.k ** 2", "syntax"),              # not an operator of the grammar
    ("bearing.*.kxx[2] *= 2", "syntax"),         # an index only right after the part
    ("bearing.*.k *= half", "type"),             # a factor is a plain number
    (42, "type"),
]


@pytest.mark.parametrize("text, expected", GRAMMAR, ids=[str(g[0]) for g in GRAMMAR])
def test_change_grammar(text, expected):
    if isinstance(expected, str):
        with pytest.raises(InputError) as info:
            parse_change(text)
        assert info.value.kind == expected
        return
    change = parse_change(text)
    op, value, path = expected
    assert change.op == op and change.value == value and list(change.path) == path


# --- matching a variant's criticals to the base's -----------------------------------------

class Crit:
    def __init__(self, rpm, whirl="forward", order=1.0):
        self.speed, self.whirl, self.order = rpm * np.pi / 30, whirl, order


MATCHES = [
    # base criticals, variant criticals, expected base index per variant critical (or None)
    ("same speeds", [Crit(3000), Crit(8000)], [Crit(3000), Crit(8000)], [0, 1]),
    ("shifted 20 %", [Crit(3000)], [Crit(3600)], [0]),
    ("beyond the share", [Crit(3000)], [Crit(3000 * (1 + MATCH_SHARE + 0.05))], [None]),
    ("one to one: the nearer takes it", [Crit(3000)], [Crit(3100), Crit(2980)], [None, 0]),
    ("orders never mix", [Crit(3000, order=2.0)], [Crit(3000)], [None]),
    ("whirl preferred", [Crit(3000, "backward"), Crit(3100, "forward")], [Crit(3020)], [1]),
]


@pytest.mark.parametrize("what, base, variant, expected", MATCHES, ids=[m[0] for m in MATCHES])
def test_critical_matching(what, base, variant, expected):
    got = match_criticals(variant, base)
    assert [None if g is None else base.index(g) for g in got] == expected


# --- the tracker -------------------------------------------------------------------------

def shapes(*vectors):
    return np.array([[[v[0], v[1]]] for v in vectors], dtype=complex)


FORWARD, BACKWARD = (1.0, -1.0j), (1.0, 1.0j)

TRACKS = [
    # two branches cross in frequency: shapes keep them apart (no swap at the crossing)
    ("crossing by shape",
     [np.array([10j, 20j]), np.array([14j, 16j]), np.array([18j, 12j])],
     [shapes(FORWARD, BACKWARD), shapes(FORWARD, BACKWARD), shapes(BACKWARD, FORWARD)],
     [[0, 1], [0, 1], [1, 0]]),
    # a mode that appears: a new branch, the old ones keep their columns
    ("birth", [np.array([10j]), np.array([10j, 30j])],
     [shapes(FORWARD), shapes(FORWARD, BACKWARD)], [[0, -1], [0, 1]]),
    # a jump too far in frequency and shape is refused: the branch ends, a new one starts
    ("death and birth", [np.array([10j]), np.array([80j])], [shapes(FORWARD), shapes(BACKWARD)],
     [[0, -1], [-1, 0]]),
]


@pytest.mark.parametrize("what, values, modes, expected", TRACKS, ids=[t[0] for t in TRACKS])
def test_tracking_assignment(what, values, modes, expected):
    assert track(values, modes).tolist() == expected
