"""The change grammar reaches the loads: destabilising cross-coupling and unbalance amounts.

References
----------
- The stage estimate of aerodynamic cross-coupling in centrifugal compressors,
  Q = 3 T (rho_d / rho_s) / (D H) with T = P / N (industry standards' screening formula;
  common practice, from memory; docs/theory.md section 5c): Q is proportional to the stage
  power, so scaling a stage's q by f is the stage at f times its power.
- Linearity of the forced response (superposition; e.g. S. Timoshenko, D. H. Young and
  W. Weaver, "Vibration Problems in Engineering", 4th ed., 1974, section 1.9): the
  response to an unbalance scaled by f is the response scaled by f.
"""

import math
import re

import numpy as np
import pytest

from rotorcalc.errors import InputError
from rotorcalc.reader import read_rotor
from rotorcalc.variants import Variant, apply_change, apply_variant, parse_change
from tests.conftest import ROOT
from tests.verification.record import check

COMPRESSOR = read_rotor(ROOT / "cases" / "compressor.toml")
PUMP = read_rotor(ROOT / "cases" / "feed_pump.toml")
STAGE_FORMULA = "stage estimate Q = 3 T (rho_d/rho_s)/(D H), T = P/N: Q ~ P (common practice)"


def changed(rotor, *texts):
    return apply_variant(rotor, Variant("v", tuple(parse_change(t) for t in texts)))


def q_of(source):
    return source.table("kxy")[0], source.table("kyx")[0]


def test_scaling_a_stage_s_q_is_the_stage_at_that_power(tmp_path):
    """Scaling keeps kyx = -kxy; the estimate with 1.5 times the stage power gives the same q."""
    new = changed(COMPRESSOR, "cross_coupling.stage 1.q *= 1.5")
    kxy, kyx = q_of(new.sources[0])
    text = (ROOT / "cases" / "compressor.toml").read_text().replace(
        'stage = { power = "0.8 MW", impeller_diameter = "460 mm"',
        'stage = { power = "1.2 MW", impeller_diameter = "460 mm"')
    path = tmp_path / "c.toml"
    path.write_text(text)
    stronger = read_rotor(path)
    check("stage 1 q scaled by 1.5 against the estimate at 1.5 x power", STAGE_FORMULA,
          q_of(stronger.sources[0])[0], kxy, 1e-12)
    assert kyx == -kxy
    assert new.sources[1:] == COMPRESSOR.sources[1:]      # the other stages untouched
    assert new.bearings == COMPRESSOR.bearings


def test_setting_q_on_every_source_and_one_coefficient_by_index():
    new = changed(COMPRESSOR, "cross_coupling.*.q = 2e6 N/m")
    assert all(q_of(s) == (2e6, -2e6) for s in new.sources)
    new = changed(COMPRESSOR, "cross_coupling[2].kxy *= 2")
    assert q_of(new.sources[2])[0] == 2 * q_of(COMPRESSOR.sources[2])[0]
    assert q_of(new.sources[2])[1] == q_of(COMPRESSOR.sources[2])[1]


def _weights(rotor, case):
    return next(c for c in rotor.unbalance if c.name == case).weights


def test_unbalance_amounts_scaled_and_set():
    new = changed(COMPRESSOR, "unbalance.couple.amount *= 0.5")
    for old, w in zip(_weights(COMPRESSOR, "couple"), _weights(new, "couple")):
        assert w.amount == 0.5 * old.amount and w.phase == old.phase
        assert "scaled by 0.5" in w.basis
    assert _weights(new, "mid_span") == _weights(COMPRESSOR, "mid_span")
    new = changed(COMPRESSOR, "unbalance.couple.weight[1].amount = 100 g*mm",
                  "unbalance.couple.weight[1].phase = 90 deg")
    w0, w1 = _weights(new, "couple")
    assert w0 == _weights(COMPRESSOR, "couple")[0]
    assert w1.amount == pytest.approx(1e-4, rel=1e-12) and w1.phase == pytest.approx(math.pi / 2)
    assert w1.basis == ""                                   # set: given, no longer derived
    new = changed(COMPRESSOR, "unbalance.*.amount *= 2")
    assert [w.amount for c in new.unbalance for w in c.weights] == \
        [2 * w.amount for c in COMPRESSOR.unbalance for w in c.weights]


def test_the_response_to_a_scaled_unbalance_is_the_response_scaled():
    from rotorcalc.analysis.response import unbalance_response
    speeds = np.linspace(100.0, 500.0, 9)
    base = unbalance_response(PUMP, speeds=speeds)
    new = unbalance_response(changed(PUMP, "unbalance.*.amount *= 1.7"), speeds=speeds)
    for i, name in enumerate(base.cases):
        got = np.max(np.abs(new.stations[i])) / np.max(np.abs(base.stations[i]))
        check(f"feed pump case {name}: largest displacement ratio for 1.7 x unbalance",
              "linearity of the forced response (superposition)", 1.7, got, 1e-10)
        assert np.allclose(new.stations[i], 1.7 * base.stations[i], rtol=1e-10, atol=0)


BAD = [
    ("cross_coupling.stage 9.q *= 2", "names no cross_coupling called 'stage 9'"),
    ("cross_coupling.stage 1.q = 3 kg", "not a stiffness"),
    ("cross_coupling.stage 1.colour *= 2", "names no cross-coupling coefficient"),
    ("cross_coupling[7].q *= 2", "cross_coupling[7], which does not exist"),
    ("cross_coupling.*.q = 2e6 N/m", "the rotor has no [[cross_coupling]]"),
    ("unbalance.nope.amount *= 2", "names no unbalance case called 'nope'"),
    ("unbalance.couple.phase *= 2", "scales an angle"),
    ("unbalance.couple.amount = 3 kg", "not an unbalance"),
    ("unbalance.couple.weight[5].amount *= 2", "weight[5], which does not exist"),
    ("unbalance.couple.colour *= 2", "cannot change 'colour'"),
    ("unbalance.couple *= 2", "needs a case and a field"),
    ("bearing.DE.kxx[2] *= 2", "takes none"),
]


@pytest.mark.parametrize("text,problem", BAD, ids=[b[0] for b in BAD])
def test_bad_load_changes_are_refused_with_their_reason(text, problem):
    rotor = PUMP if "*.q = 2e6" in text else COMPRESSOR
    with pytest.raises(InputError) as err:
        apply_change(rotor, parse_change(text, key="variant[0].changes[0]"))
    assert problem in str(err.value), str(err.value)
    assert err.value.key == "variant[0].changes[0]"
    assert re.fullmatch(r"[a-z-]+", err.value.kind)
