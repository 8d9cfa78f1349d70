"""Hard numerics: each case asserts the behaviour the tool promises.

References: rigid-rotor bounce on soft springs sqrt(2k/m) and the pinned-
pinned Euler-Bernoulli shaft (n pi)^2 sqrt(EI/(rho A L^4)) (R. D. Blevins,
"Formulas for Natural Frequency and Mode Shape", 1979, Table 8-1, from
memory); destabilising cross-coupled stiffness (a follower force: for an
isotropic Jeffcott rotor with direct k, damping c and cross-coupling q,
forward whirl is unstable when q > c w_n; common result of rotor-dynamic
stability, e.g. M. I. Friswell et al., "Dynamics of Rotating Machines",
CUP 2010, from memory).
"""

import math

import numpy as np
import pytest

from rotorcalc.analysis import modes_at, screen, sweep
from rotorcalc.assembly import assemble
from rotorcalc.errors import InputError
from rotorcalc.model import Bearing, Disk, MarginRule, OperatingRange
from tests.conftest import STEEL, disk_at_mid_span, isotropic, uniform_shaft

L, D = 1.0, 0.05
AREA, SECOND = math.pi * D**2 / 4, math.pi * D**4 / 64


def test_free_free_reports_rigid_body_modes_not_frequencies():
    m = modes_at(uniform_shaft(L, D, 10, theory="euler-bernoulli"), 0.0, 4)
    assert m.rigid_body_modes == 4
    assert any("rigid-body" in w for w in m.warnings)
    first = 4.7300**2 * math.sqrt(STEEL.youngs_modulus * SECOND / (STEEL.density * AREA * L**4))
    assert m.frequency[0] == pytest.approx(first, rel=1e-3)  # first flexible mode, not ~0


def test_zero_speed_and_single_element():
    rotor = uniform_shaft(L, D, 1, bearings=[isotropic(0, 1e8), isotropic(1, 1e8)])
    m = modes_at(rotor, 0.0, 4)
    assert np.all(np.isfinite(m.frequency)) and np.all(m.frequency > 0)
    result = sweep(rotor, np.linspace(0.0, 500.0, 5), 2)
    assert result.present.all()


def test_very_soft_bearings_give_the_rigid_bounce():
    k = 1e2
    rotor = uniform_shaft(L, D, 10, bearings=[isotropic(0, k), isotropic(1, k)])
    m = modes_at(rotor, 0.0, 2)
    mass = STEEL.density * AREA * L
    # the shaft is not rigid: the error is of order k / k_shaft (~1e-5 here)
    k_shaft = 48 * STEEL.youngs_modulus * SECOND / L**3
    assert m.frequency[0] == pytest.approx(math.sqrt(2 * k / mass), rel=2 * k / k_shaft)


def test_very_stiff_bearings_approach_pinned_ends():
    k = 1e12
    rotor = uniform_shaft(L, D, 16, theory="euler-bernoulli",
                          bearings=[isotropic(0, k), isotropic(1, k)])
    m = modes_at(rotor, 0.0, 2)
    pinned = math.pi**2 * math.sqrt(STEEL.youngs_modulus * SECOND / (STEEL.density * AREA * L**4))
    assert m.frequency[0] == pytest.approx(pinned, rel=1e-4)


def jeffcott(kxx, kyy, kxy=0.0, c=0.0):
    light = STEEL.__class__("light", STEEL.youngs_modulus, STEEL.shear_modulus, 1e-3)
    pins = [isotropic(0, 1e13), isotropic(2, 1e13)]
    disk_brg = Bearing(1, {"kxx": (kxx,), "kyy": (kyy,), "kxy": (kxy,), "kyx": (-kxy,),
                           "cxx": (c,), "cyy": (c,)}, name="at disk")
    return disk_at_mid_span(50.0, tuple(pins) + (disk_brg,), material=light,
                            operating=OperatingRange(100.0, 200.0), mode_count=2,
                            speed_to=400.0, speed_count=9,
                            margin_rule=MarginRule(name="fixed", margin_below=5,
                                                   margin_above=5))


def test_strong_anisotropy_splits_the_pair():
    rotor = jeffcott(1e6, 1e8)
    m = modes_at(rotor, 0.0, 2)
    k_shaft = 48 * STEEL.youngs_modulus * SECOND / 1.0
    low = math.sqrt((k_shaft + 1e6) / 50.0)
    high = math.sqrt((k_shaft + 1e8) / 50.0)
    np.testing.assert_allclose(m.frequency, [low, high], rtol=1e-4)


def test_cross_coupling_destabilises_and_is_kept_and_flagged():
    k_shaft = 48 * STEEL.youngs_modulus * SECOND / 1.0
    wn = math.sqrt(k_shaft / 50.0)
    c = 200.0
    stable = modes_at(jeffcott(0.0, 0.0, kxy=0.5 * c * wn, c=c), 300.0, 2)
    unstable = modes_at(jeffcott(0.0, 0.0, kxy=2.0 * c * wn, c=c), 300.0, 2)
    assert np.all(stable.log_dec > 0)
    assert np.any(unstable.log_dec < 0)                  # kept, with a negative log dec
    assert unstable.whirl[int(np.argmin(unstable.log_dec))] == "forward"


def test_negative_damping_is_refused_and_an_unstable_critical_fails_the_check():
    # negative direct damping is a source of energy no bearing is: refused at the model
    with pytest.raises(InputError) as info:
        jeffcott(1e6, 1e6, c=-50.0)
    assert info.value.key.endswith("cxx[0]") and "damping" in info.value.problem
    # an unstable critical comes from destabilising cross-coupling (q > c w_n) instead
    k_shaft = 48 * STEEL.youngs_modulus * SECOND / 1.0
    wn = math.sqrt((k_shaft + 1e6) / 50.0)
    result = screen(jeffcott(1e6, 1e6, kxy=3.0 * 50.0 * wn, c=50.0))
    assert any(c.log_dec < 0 for c in result.criticals)
    assert not result.passed
    assert any(r.verdict == "fail" and r.critical.log_dec < 0 for r in result.margins.rows)


def test_repeated_frequencies_track_smoothly():
    """An isotropic symmetric rotor has double frequencies at rest; the branches
    that leave them must not jump between modes along the sweep."""
    rotor = uniform_shaft(0.8, 0.06, 8, bearings=[isotropic(0, 5e7), isotropic(1, 5e7)],
                          disks=[Disk(1, 20.0, 0.8, 0.4)], mode_count=4)
    result = sweep(rotor, np.linspace(0.0, 3000.0, 31), 4)
    f = result.frequency
    labels = result.whirl
    for j in range(f.shape[1]):
        assert len(set(labels[1:, j])) == 1  # one whirl sense per branch once spinning
        # gyroscopic stiffening raises forward branches and lowers backward ones
        slope = np.diff(f[:, j])
        assert np.all(slope >= 0) if labels[1, j] == "forward" else np.all(slope <= 0)


def test_speeds_outside_a_bearing_table_hold_the_end_value_and_warn():
    brg = Bearing(0, {"kxx": (1e8, 2e8), "kyy": (1e8, 2e8)}, speeds=(100.0, 200.0), name="T")
    rotor = uniform_shaft(L, D, 6, bearings=[brg, isotropic(1, 1e8)])
    inside = modes_at(rotor, 200.0, 2)
    outside = modes_at(rotor, 900.0, 2, )
    assert any("bearing T" in w and "above" in w for w in outside.warnings)
    assert not inside.warnings
    k = assemble(rotor).stiffness(900.0)[0, 0] - assemble(rotor).shaft_stiffness[0, 0]
    assert k == pytest.approx(2e8)
