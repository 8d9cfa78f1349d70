"""Uncertainty studies: the probability estimate against a closed form, the interval
against its published definition, and the same records on every executor.

References
----------
- H. H. Jeffcott, "The lateral vibration of loaded shafts in the neighbourhood of a
  whirling speed", Phil. Mag. 37 (1919): a point mass m at the middle of a massless shaft of
  stiffness k_s = 48 E I / L^3 on two bearings of stiffness k_b each, without gyroscopic
  coupling, has its critical speed at sqrt(k / m) with 1/k = 1/k_s + 1/(2 k_b).  With the
  bearings' stiffness scaled by a factor f uniform on [a, b], the probability that the
  critical lies in a band [w1, w2] is the share of [a, b] that the band's factors cover:
  exact.
- C. J. Clopper and E. S. Pearson, "The use of confidence or fiducial limits illustrated in
  the case of the binomial", Biometrika 26 (1934), 404-413: the interval's ends are beta
  quantiles; checked against the binomial tail sums they invert.
"""

import dataclasses
import json
import math
import os
import signal

import numpy as np
import pytest
from scipy.optimize import brentq
from scipy.stats import binom

from rotorcalc.analysis import study as sd
from rotorcalc.executor import DaskCluster, InProcess, LocalPool
from rotorcalc.model import Bearing, MarginRule, OperatingRange, StabilityRule
from rotorcalc.unbalance import Probe, ResponseSettings, UnbalanceCase, UnbalanceWeight
from tests.conftest import LIGHT, disk_at_mid_span, isotropic
from tests.verification.record import check

JEFFCOTT = "Jeffcott (1919): critical sqrt(k/m), 1/k = 1/k_s + 1/(2 k_b); f uniform (exact)"
MASS, K_B, SPAN, DIAMETER = 50.0, 2.0e6, 1.0, 0.05
LOW, HIGH = 0.5, 1.5        # the bearings' stiffness factor, uniform


def _shaft_stiffness():
    second_moment = math.pi * DIAMETER ** 4 / 64
    return 48 * LIGHT.youngs_modulus * second_moment / SPAN ** 3


def _critical(f):
    return math.sqrt(1.0 / (1.0 / _shaft_stiffness() + 1.0 / (2 * K_B * f)) / MASS)


def _factor(w):
    """The bearings' factor that puts the critical at ``w`` rad/s."""
    return 1.0 / (2 * K_B * (1.0 / (MASS * w * w) - 1.0 / _shaft_stiffness()))


def jeffcott_study(samples=100, band=(0.9, 1.06)):
    """The rotor (its operating range = the band around the nominal critical, a fixed rule
    of no margin: a critical fails exactly when it lies in the band) and the plan."""
    nominal = _critical(1.0)
    band = (band[0] * nominal, band[1] * nominal)
    rotor = disk_at_mid_span(MASS, [isotropic(0, K_B, 20.0), isotropic(2, K_B, 20.0)],
                             span=SPAN, diameter=DIAMETER,
                             operating=OperatingRange(*band))
    rotor = dataclasses.replace(rotor, settings=dataclasses.replace(
        rotor.settings, margin_rule=MarginRule(name="fixed", margin_below=0.0,
                                               margin_above=0.0),
        stability_rule=StabilityRule(name="none"), speed_count=9))
    plan = sd.StudyPlan((sd.Uncertain("bearings", "bearing.*.kdirect", "uniform",
                                      (LOW, HIGH)),), samples=samples, seed=11)
    exact = (min(HIGH, _factor(band[1])) - max(LOW, _factor(band[0]))) / (HIGH - LOW)
    return rotor, plan, exact


@pytest.mark.slow
def test_the_probability_a_jeffcott_critical_falls_in_a_band_matches_the_closed_form():
    """The forward critical fails its (zero) margin exactly when it lies in the band.  A
    Latin hypercube in one input puts one sample in each of n equal strata, so the count in
    the band is within 2 of n P: the estimate within 2/n of the exact value, and inside its
    own Clopper-Pearson interval."""
    rotor, plan, exact = jeffcott_study()
    with LocalPool(2) as pool:
        result = sd.run_study(rotor, plan, pool)
    crit = next(p for p in result.probabilities if p.what.startswith("critical")
                and "forward" in p.what)
    low, high = crit.interval
    assert not result.errors and crit.trials == plan.samples
    check("Jeffcott rotor, bearing factor uniform 0.5-1.5, 100 Latin-hypercube samples: "
          "P(critical in the band)", JEFFCOTT, exact, crit.estimate, 2 / plan.samples,
          kind="abs")
    assert low <= exact <= high
    # every sample's critical speed is the closed form of its own factor
    forward = str(next(j for j, c in enumerate(result.base) if c.whirl == "forward"))
    for r in result.records[:10]:
        f = r["inputs"]["bearings"]
        got = r["criticals"][forward]["speed_rpm"] * math.pi / 30
        check(f"Jeffcott sample {r['index']} (factor {f:.4f}): critical speed (rad/s)",
              JEFFCOTT, _critical(f), got, 1e-4)


@pytest.mark.parametrize("k, n", [(0, 50), (3, 50), (50, 50), (17, 400)])
def test_the_interval_inverts_the_binomial_tails(k, n):
    """Clopper-Pearson (module docstring): at the lower end the chance of k or more events
    is alpha/2, at the upper end the chance of k or fewer is alpha/2."""
    low, high = sd.clopper_pearson(k, n, 0.95)
    if k > 0:
        check(f"Clopper-Pearson lower end, {k} of {n}: P(X >= k) = 0.025",
              "Clopper and Pearson (1934)", 0.025, binom.sf(k - 1, n, low), 1e-9, kind="abs")
    if k < n:
        check(f"Clopper-Pearson upper end, {k} of {n}: P(X <= k) = 0.025",
              "Clopper and Pearson (1934)", 0.025, binom.cdf(k, n, high), 1e-9, kind="abs")


def _records(result):
    return json.dumps(list(result.records), sort_keys=True)


@pytest.mark.slow
def test_the_records_are_the_same_on_every_executor():
    """In this process, on a local pool of two and on a Dask LocalCluster of two workers."""
    rotor, plan, _ = jeffcott_study(samples=12)
    one = sd.run_study(rotor, plan, InProcess())
    with LocalPool(2) as pool:
        two = sd.run_study(rotor, plan, pool)
    with DaskCluster("local", 2) as cluster:
        dask = sd.run_study(rotor, plan, cluster)
    assert _records(one) == _records(two) == _records(dask)
    assert [r["index"] for r in dask.records] == list(range(12))


@pytest.mark.slow
def test_a_lost_worker_s_samples_are_run_again_and_each_is_there_once():
    rotor, plan, _ = jeffcott_study(samples=16)
    reference = sd.run_study(rotor, plan, InProcess())
    with DaskCluster("local", 2) as cluster:
        killed = []

        def kill_one(done, total):
            if done == 3 and not killed:     # a worker dies while samples are running
                pids = cluster.client.run(os.getpid)
                os.kill(pids[sorted(pids)[0]], signal.SIGKILL)
                killed.append(sorted(pids)[0])

        result = sd.run_study(rotor, plan, cluster, progress=kill_one)
    assert killed
    assert [r["index"] for r in result.records] == list(range(16))
    assert not result.errors
    assert _records(result) == _records(reference)


def test_a_sample_that_fails_is_recorded_with_its_error():
    """A factor that makes the rotor invalid (a negative mass) gives an error record."""
    rotor, _, _ = jeffcott_study()
    plan = sd.StudyPlan((sd.Uncertain("mass", "disk[0].mass", "uniform", (-2.0, -1.0),
                                      by="value", unit="kg"),), samples=3, seed=1)
    result = sd.run_study(rotor, plan)
    assert len(result.records) == 3 and len(result.errors) == 3
    assert all("mass" in r["error"] for r in result.errors)


# --- the loads as uncertain inputs ------------------------------------------------------
#
# A Jeffcott rotor whose damping c and destabilising cross-coupling q act at the disk, on
# undamped bearings: in z = x + i y the disk obeys m z'' + c z' + k z = i q z (kxy = q,
# kyx = -q), so the forward root of m s^2 + c s + k - i q = 0 gives the log decrement
# -2 pi Re(s) / Im(s) in closed form (it reaches zero at q = c sqrt(k/m)); steady unbalance
# U at speed W moves the disk 2 U W^2 / |k - m W^2 + i c W| peak to peak (q = 0).
# (J. M. Vance, "Rotordynamics of Turbomachinery", Wiley 1988, chapter 2; from memory.)

JEFFCOTT_Q = ("Jeffcott rotor with cross-coupling q at the disk: forward root of "
              "m s^2 + c s + k - i q = 0 (closed form); q uniform (exact)")
JEFFCOTT_U = ("Jeffcott rotor, unbalance U: 2 U W^2 / |k - m W^2 + i c W| pk-pk at the "
              "disk (closed form); U uniform (exact)")
C_DISK = 1500.0             # N s/m at the disk (log decrement about 0.5 without q)


def _stiffness():
    return 1.0 / (1.0 / _shaft_stiffness() + 1.0 / (2 * K_B))


def _forward_log_dec(q):
    roots = np.roots([MASS, C_DISK, _stiffness() - 1j * q])
    s = roots[np.argmax(roots.imag)]
    return -2 * math.pi * s.real / s.imag


def _loaded_jeffcott(**rotor_fields):
    """The rotor of these tests: bearings undamped, the damping as a seal at the disk;
    operating from 30 to 60 % of the critical, no margin, every mode needs 0.1."""
    w = math.sqrt(_stiffness() / MASS)
    seal = Bearing(1, {"cxx": (C_DISK,), "cyy": (C_DISK,)}, name="damper", role="seal")
    rotor = disk_at_mid_span(MASS, [isotropic(0, K_B), isotropic(2, K_B), seal], span=SPAN,
                             diameter=DIAMETER, operating=OperatingRange(0.3 * w, 0.6 * w))
    settings = dataclasses.replace(
        rotor.settings, margin_rule=MarginRule(name="fixed", margin_below=0.0,
                                               margin_above=0.0),
        stability_rule=StabilityRule(name="at-least", min_log_dec=0.1), speed_count=5,
        mode_count=2)
    return dataclasses.replace(rotor, settings=settings, **rotor_fields), w


@pytest.mark.slow
def test_the_probability_that_uncertain_cross_coupling_leaves_too_little_damping():
    """q = f q0 with f uniform on [0.2, 1.2] and q0 = c sqrt(k/m) (zero log decrement):
    the stability check fails exactly when f exceeds the factor at which the forward log
    decrement is 0.1."""
    rotor, w = _loaded_jeffcott()
    q0 = C_DISK * w
    check("closed form: zero forward log decrement at q = c sqrt(k/m)", JEFFCOTT_Q, 0.0,
          _forward_log_dec(q0), 1e-9, kind="abs")
    gas = Bearing(1, {"kxy": (q0,), "kyx": (-q0,)}, name="gas", role="source")
    rotor = dataclasses.replace(rotor, sources=(gas,))
    low, high = 0.2, 1.2
    f_star = brentq(lambda f: _forward_log_dec(f * q0) - 0.1, low, high)
    exact = (high - f_star) / (high - low)
    plan = sd.StudyPlan((sd.Uncertain("gas", "cross_coupling.gas.q", "uniform",
                                      (low, high)),), samples=60, seed=5)
    result = sd.run_study(rotor, plan)
    p = next(p for p in result.probabilities if p.what == "stability")
    assert not result.errors and p.trials == plan.samples
    check("Jeffcott rotor, cross-coupling factor uniform 0.2-1.2, 60 Latin-hypercube "
          "samples: P(log decrement below 0.1)", JEFFCOTT_Q, exact, p.estimate,
          2 / plan.samples, kind="abs")
    assert p.interval[0] <= exact <= p.interval[1]
    for r in result.records[:6]:
        f = r["inputs"]["gas"]
        check(f"cross-coupling sample {r['index']} (factor {f:.4f}): lowest log decrement",
              JEFFCOTT_Q, _forward_log_dec(f * q0), r["lowest_log_dec"], 1e-6, kind="abs")


@pytest.mark.slow
def test_the_probability_that_an_uncertain_unbalance_exceeds_the_vibration_limit():
    """U uniform on [0.5, 1.5] times 1 kg mm at the disk, the limit at a probe on the disk
    set to the closed-form response to 0.9 kg mm: the response peaks at the maximum
    continuous speed, so the check fails exactly when U exceeds 0.9 kg mm (P = 0.6)."""
    top = 0.6 * math.sqrt(_stiffness() / MASS)
    limit = 2 * 0.9e-3 * top ** 2 / abs(_stiffness() - MASS * top ** 2 + 1j * C_DISK * top)
    case = UnbalanceCase("disk", (UnbalanceWeight(1, 1e-3),))
    rotor, _ = _loaded_jeffcott(
        unbalance=(case,), probes=(Probe(1, 0.0, "disk x"),),
        response=ResponseSettings(vibration_limit=limit, speed_count=11))
    u_star = limit / 2 * abs(_stiffness() - MASS * top ** 2 + 1j * C_DISK * top) / top ** 2
    low, high = 0.5, 1.5
    exact = (high - u_star / 1e-3) / (high - low)
    assert exact == pytest.approx(0.6, rel=1e-12)
    plan = sd.StudyPlan((sd.Uncertain("unbalance", "unbalance.disk.amount", "uniform",
                                      (low, high)),), samples=60, seed=8)
    result = sd.run_study(rotor, plan)
    p = next(p for p in result.probabilities if p.what == "response")
    assert not result.errors and p.trials == plan.samples
    check("Jeffcott rotor, unbalance factor uniform 0.5-1.5, 60 Latin-hypercube samples: "
          "P(vibration above the limit)", JEFFCOTT_U, exact, p.estimate, 2 / plan.samples,
          kind="abs")
    assert p.interval[0] <= exact <= p.interval[1]


# --- Sobol indices ------------------------------------------------------------------------
#
# T. Ishigami and T. Homma, "An importance quantification technique in uncertainty
# analysis for computer models", Proc. ISUMA '90 (1990): f = sin x1 + a sin^2 x2
# + b x3^4 sin x1 with x uniform on [-pi, pi]^3 has the variance parts
# V1 = (1 + b pi^4 / 5)^2 / 2, V2 = a^2 / 8, V13 = b^2 pi^8 (1/18 - 1/50), V3 = V12 = V23
# = V123 = 0, V = a^2/8 + b pi^4/5 + b^2 pi^8/18 + 1/2 (the standard test function of
# variance-based sensitivity analysis; formulas as commonly quoted, from memory).

ISHIGAMI = "Ishigami and Homma (1990) function, a = 7, b = 0.1: analytic Sobol indices"


def _ishigami(x, a=7.0, b=0.1):
    return np.sin(x[:, 0]) + a * np.sin(x[:, 1]) ** 2 + b * x[:, 2] ** 4 * np.sin(x[:, 0])


def test_sobol_indices_of_the_ishigami_function():
    """The estimators (Saltelli et al. 2010, Table 2 (b) and Jansen (f)) on 2^13 scrambled
    Sobol base rows: every index within 0.03 of the analytic value and inside its own
    bootstrap interval (or within 0.01 of it)."""
    from scipy.stats import qmc
    from rotorcalc.analysis.sobol import pick_freeze_design, sobol_indices
    a, b = 7.0, 0.1
    v1 = 0.5 * (1 + b * math.pi ** 4 / 5) ** 2
    v2 = a * a / 8
    v13 = b * b * math.pi ** 8 * (1 / 18 - 1 / 50)
    v = a * a / 8 + b * math.pi ** 4 / 5 + b * b * math.pi ** 8 / 18 + 0.5
    exact_first, exact_total = [v1 / v, v2 / v, 0.0], [(v1 + v13) / v, v2 / v, v13 / v]
    assert exact_first[0] == pytest.approx(0.3139, abs=1e-4)     # as tabulated, from memory
    assert exact_total[2] == pytest.approx(0.2437, abs=1e-4)
    unit = qmc.Sobol(6, scramble=True, seed=3).random(2 ** 13)
    x = -math.pi + 2 * math.pi * pick_freeze_design(unit)
    got = sobol_indices(_ishigami(x), 3, seed=1)
    assert got.rows == 2 ** 13
    for i in range(3):
        for kind, exact, value, interval in (
                ("first-order", exact_first[i], got.first[i], got.first_interval[i]),
                ("total", exact_total[i], got.total[i], got.total_interval[i])):
            check(f"Ishigami {kind} index of x{i + 1}", ISHIGAMI, exact, value, 0.03,
                  kind="abs")
            assert interval[0] - 0.01 <= exact <= interval[1] + 0.01


@pytest.mark.slow
def test_sobol_indices_of_a_jeffcott_rotor_s_critical_speed():
    """The critical speed sqrt(k/m) depends on the bearings' factor alone, not on the
    unbalance: the unbalance's indices are exactly zero (f(A_B^i) = f(A) run for run) and
    the bearings' near one (within the sampling error of 16 scrambled Sobol base rows);
    probabilities come from the 2 N independent rows only."""
    rotor, _, _ = jeffcott_study()
    rotor = dataclasses.replace(
        rotor, unbalance=(UnbalanceCase("disk", (UnbalanceWeight(1, 1e-4),)),))
    plan = sd.StudyPlan((sd.Uncertain("bearings", "bearing.*.kdirect", "uniform", (0.5, 1.5)),
                         sd.Uncertain("unbalance", "unbalance.disk.amount", "uniform",
                                      (0.5, 1.5))), samples=16, seed=4,
                        sampling="sobol", indices="sobol")
    assert plan.runs == 16 * 4 and plan.independent == 32
    result = sd.run_study(rotor, plan)
    assert len(result.records) == 64 and not result.errors
    assert result.probabilities[0].trials == 32
    forward = next(j for j, c in enumerate(result.base) if c.whirl == "forward")
    label = next(k for k in result.sobol if k.startswith(f"critical {forward + 1} "))
    got = result.sobol[label]
    assert got.rows == 16
    assert got.first[1] == 0.0 and got.total[1] == 0.0
    check("Jeffcott critical speed: first-order index of the bearings' factor (the only "
          "input it depends on)", JEFFCOTT, 1.0, got.first[0], 0.15, kind="abs")
    check("Jeffcott critical speed: total index of the bearings' factor", JEFFCOTT, 1.0,
          got.total[0], 0.15, kind="abs")
    # the critical speed of every A_B^i run for the unbalance equals that of its A row
    for i in range(16):
        a, ab = result.records[i], result.records[48 + i]
        assert a["criticals"] == ab["criticals"]
    js = result.to_dict()["sobol_indices"][label]
    assert js["unbalance"]["total"] == 0.0 and js["rows"] == 16
