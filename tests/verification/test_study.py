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

import pytest
from scipy.stats import binom

from rotorcalc.analysis import study as sd
from rotorcalc.executor import DaskCluster, InProcess, LocalPool
from rotorcalc.model import MarginRule, OperatingRange, StabilityRule
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
