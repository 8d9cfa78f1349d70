"""Verdicts an engineer can sign: each way a rotor can be unsafe makes the gate fail.

One test (or a parametrised table) per situation, built on small rotors of
our own; the numbers they judge are checked against closed forms where one
exists:

* Instability of an isotropic Jeffcott rotor with cross-coupled stiffness q
  and damping c at the disk: writing r = x + i y, the forward whirl obeys
  m r'' + c r' + k r - i q r = 0; at the stability boundary r = e^{i w t}
  gives w^2 = k/m and q = c w.  With q = a x spin, the onset speed is
  c sqrt(k/m) / a (e.g. M. I. Friswell, J. E. T. Penny, S. D. Garvey,
  A. W. Lees, "Dynamics of Rotating Machines", CUP 2010, ch. 5, destabilising
  cross-coupling; from memory).
* Rigid bounce of a stiff rotor on soft springs sqrt(2 k_b / m) (rigid-body
  statics plus Newton; e.g. Friswell et al. 2010, ch. 3, from memory).
* Circular orbits: a vector with y = -i x whirls forward, y = +i x backward
  (docs/theory.md, section 1); an undamped gyroscopic system with symmetric
  positive-definite stiffness has purely imaginary eigenvalues (energy
  conservation; e.g. L. Meirovitch, "Methods of Analytical Dynamics",
  McGraw-Hill 1970, gyroscopic systems; from memory).
* The rules of industry practice (margin caps, vibration limit, residual
  unbalance) are common practice quoted from memory: their tables below are
  labelled so.
"""

import json
import dataclasses
import math

import matplotlib
import numpy as np
import pytest
from typer.testing import CliRunner

from rotorcalc import standards
from rotorcalc.analysis import modes_at, screen
from rotorcalc.analysis.margins import required_margin
from rotorcalc.analysis.whatif import compare
from rotorcalc.cli import app
from rotorcalc.model import (Bearing, Disk, MarginRule, Material, OperatingRange, Rotor, Section,
                             Settings, StabilityRule)
from rotorcalc.reader import parse_rotor, read_rotor
from rotorcalc.statics import journal_static_loads
from rotorcalc.variants import read_variants
from tests.conftest import ROOT, STEEL, compressor_without_gas, disk_at_mid_span, isotropic
from tests.verification import closed_forms as cf
from tests.verification.record import check

RPM = 2.0 * math.pi / 60.0
FROM_MEMORY = "common practice, from memory (industry standards for centrifugal machinery)"
CROSS = ("isotropic Jeffcott with cross-coupling q: onset q = c sqrt(k/m) "
         "(Friswell et al. 2010, ch. 5, from memory)")
runner = CliRunner()
matplotlib.use("Agg")

# ---------------------------------------------------------------------------
# A Jeffcott rotor whose cross-coupled stiffness grows with speed
# ---------------------------------------------------------------------------

LJ, DJ, MJ, KPIN = 1.0, 0.05, 20.0, 1.0e11
K_SHAFT = cf.simply_supported_midspan_stiffness(STEEL.youngs_modulus, math.pi * DJ**4 / 64, LJ)
K_EFF = cf.series_stiffness_two_bearings(K_SHAFT, KPIN)
W_N = math.sqrt(K_EFF / MJ)            # 394 rad/s
C_DISK = 2.0 * 0.02 * math.sqrt(K_EFF * MJ)   # 2 % of critical damping
TOP = 2000.0                           # rad/s, end of the cross-coupling table


def cross_coupled_jeffcott(slope, operating, speed_to=None):
    """Jeffcott rotor (light shaft, disk at mid-span on stiff pins) with damping
    ``C_DISK`` and cross-coupled stiffness ``q = slope x spin`` at the disk."""
    pins = (isotropic(0, KPIN, name="pin A"), isotropic(2, KPIN, name="pin B"))
    q_top = slope * TOP
    source = Bearing(1, {"kxx": (0.0,), "kyy": (0.0,), "kxy": (0.0, q_top), "kyx": (0.0, -q_top),
                         "cxx": (C_DISK,), "cyy": (C_DISK,)}, speeds=(0.0, TOP), name="gas",
                     role="seal")
    return disk_at_mid_span(MJ, pins + (source,), span=LJ, diameter=DJ, operating=operating,
                            mode_count=2, speed_to=speed_to or 0.95 * TOP, speed_count=41)


def test_verdict_stability_onset_of_cross_coupled_jeffcott():
    """Stability is judged at every speed, not only at a 1X crossing: the rotor
    runs above its critical speed, where no critical lies, and goes unstable
    there (this rotor once passed `check`)."""
    onset = 1200.0                         # rad/s, chosen
    slope = C_DISK * W_N / onset           # q = slope x spin reaches c w_n at the onset
    op = OperatingRange(1000.0, 1400.0, 1450.0)
    result = screen(cross_coupled_jeffcott(slope, op))
    stab = result.stability
    forward = [m for m in stab.branches if m.whirl == "forward"]
    assert len(forward) == 1
    losses = [w for w, change in forward[0].onsets if change == "loses"]
    check("Jeffcott, q = a x spin: onset speed of instability of the forward mode (rad/s)",
          CROSS, onset, losses[0], 1e-4)
    assert forward[0].verdict == "unstable" and forward[0].judged_log_dec < 0
    assert not stab.passed and result.verdict == "fail"
    # the criticals (near 394 rad/s) pass their margins: only stability fails
    assert result.margins.passed
    lo, hi = stab.unstable_ranges[0]
    assert lo == pytest.approx(onset, rel=1e-4) and hi == pytest.approx(result.sweep.speeds[-1])
    # the backward mode stays stable (cross-coupling damps backward whirl)
    assert all(m.verdict == "stable" for m in stab.branches if m.whirl == "backward")
    # the whirl-speed map says it in words, not only by colour
    from rotorcalc.plotting import plot_whirl_speed_map
    drawn = plot_whirl_speed_map(result.sweep, result.criticals, op, margins=result.margins)
    assert [t.get_text() for t in drawn.unstable_labels] == ["unstable"]


def test_verdict_unstable_below_the_range_is_reported_not_judged():
    slope = C_DISK * W_N / 1200.0
    op = OperatingRange(500.0, 900.0, 950.0)       # runs below the onset
    stab = screen(cross_coupled_jeffcott(slope, op)).stability
    forward = next(m for m in stab.branches if m.whirl == "forward")
    assert forward.verdict == "stable" and forward.min_log_dec_operating > 0
    assert stab.passed and stab.unstable_ranges    # the instability above trip is reported


def test_verdict_unbalance_response_of_an_unstable_rotor_is_flagged():
    from rotorcalc.analysis.response import unbalance_response
    from rotorcalc.unbalance import Probe, UnbalanceCase, UnbalanceWeight
    slope = C_DISK * W_N / 1200.0
    rotor = cross_coupled_jeffcott(slope, OperatingRange(1000.0, 1400.0, 1450.0))
    case = UnbalanceCase("disk", (UnbalanceWeight(1, 1e-4),))
    res = unbalance_response(rotor, cases=(case,), probes=(Probe(1, 0.0, "disk x"),))
    assert not res.steady and not res.passed
    assert res.unstable[res.speeds > 1250.0].all() and not res.unstable[res.speeds < 1150].any()
    assert any("no steady state" in w for w in res.warnings)
    from rotorcalc.plotting import plot_bode
    drawn = plot_bode(res)
    assert drawn.unstable_spans and "no steady state" in drawn.unstable_spans[-1].get_text()


# ---------------------------------------------------------------------------
# The same situations through the command line, as a CI gate reads them
# ---------------------------------------------------------------------------

JEFFCOTT_TOML = """
title = "cross-coupled test rotor"
[materials.light]
youngs_modulus = "211 GPa"
shear_modulus = "81.15 GPa"
density = "0.00781 kg/m^3"
[[section]]
length = "0.5 m"
outer_diameter = "50 mm"
material = "light"
elements = 2
[[section]]
length = "0.5 m"
outer_diameter = "50 mm"
material = "light"
elements = 2
[[disk]]
at = 1
mass = "20 kg"
[[bearing]]
at = 0
kxx = "1e11 N/m"
kyy = "1e11 N/m"
[[bearing]]
at = 2
kxx = "1e11 N/m"
kyy = "1e11 N/m"
[[bearing]]
name = "gas"
role = "seal"
at = 1
speeds = ["0 rpm", "19099 rpm"]
kxx = "0 N/m"
kyy = "0 N/m"
kxy = ["0 N/m", "{q_top} N/m"]
kyx = ["0 N/m", "-{q_top} N/m"]
cxx = "{c} N*s/m"
cyy = "{c} N*s/m"
[operating]
min_speed = "{lo} rpm"
max_speed = "{hi} rpm"
trip_speed = "{trip} rpm"
[analysis]
beam_theory = "euler-bernoulli"
mode_count = 2
speed_to = "{top} rpm"
speed_count = 41
"""


def jeffcott_file(tmp_path, q_top, lo=9549.0, hi=13369.0, trip=13846.0, top=18000.0):
    path = tmp_path / "rotor.toml"
    path.write_text(JEFFCOTT_TOML.format(q_top=q_top, c=C_DISK, lo=lo, hi=hi, trip=trip,
                                         top=top))
    return path


def test_verdict_check_fails_an_unstable_rotor(tmp_path):
    path = jeffcott_file(tmp_path, q_top=C_DISK * W_N / 1200.0 * TOP)
    result = runner.invoke(app, ["check", str(path), "--json", str(tmp_path / "c.json")])
    assert result.exit_code == 1, result.output
    assert "stability fails" in result.output and "onset of instability" in result.output
    doc = json.loads((tmp_path / "c.json").read_text())["result"]
    assert doc["verdict"] == "fail" and doc["stability"]["passed"] is False
    # the same rotor without the cross-coupling passes
    stable = jeffcott_file(tmp_path, q_top=0.0)
    assert runner.invoke(app, ["check", str(stable)]).exit_code == 0


def test_verdict_check_does_not_pass_by_not_looking(tmp_path):
    """A sweep that stops below the operating range once gave "all margins met"."""
    path = jeffcott_file(tmp_path, q_top=0.0, top=5000.0)
    result = runner.invoke(app, ["check", str(path)])
    assert result.exit_code == 5, result.output
    assert "not covered" in result.output and "below" in result.output
    # and a bare number for a speed is refused, in the file as on the command line
    bare = path.read_text().replace('min_speed = "9549.0 rpm"', "min_speed = 1000")
    path.write_text(bare)
    result = runner.invoke(app, ["check", str(path)])
    assert result.exit_code == 2 and "needs a unit" in result.output


def test_verdict_bearing_table_must_cover_a_judged_critical(tmp_path):
    text = (ROOT / "cases" / "feed_pump.toml").read_text()
    short = text.replace('speeds = ["1500 rpm", "2500 rpm", "3500 rpm", "4500 rpm", "5500 rpm", '
                         '"6000 rpm"]', 'speeds = ["1500 rpm", "2500 rpm", "3500 rpm", '
                         '"4500 rpm", "5000 rpm", "5200 rpm"]', 1)
    assert short != text
    path = tmp_path / "pump.toml"
    path.write_text(short)
    result = runner.invoke(app, ["check", str(path)])
    assert result.exit_code == 5, result.output
    assert "does not cover the critical" in result.output and "bearing DE" in result.output


def test_verdict_numerical_failure_exits_3_in_one_line(monkeypatch, tmp_path):
    from rotorcalc import solvers
    from rotorcalc.errors import SolverError

    def broken(*args, **kwargs):
        raise SolverError("the eigen-solve did not converge (test)")

    monkeypatch.setattr(solvers.DenseSolver, "__call__", broken)
    result = runner.invoke(app, ["check", str(jeffcott_file(tmp_path, q_top=0.0))])
    assert result.exit_code == 3 and "Numerical failure" in result.output
    assert "Traceback" not in result.output


# ---------------------------------------------------------------------------
# Which modes are criticals
# ---------------------------------------------------------------------------

@pytest.mark.slow
def test_verdict_overdamped_modes_are_not_criticals():
    """The compressor's end-mass modes cross 1X with log decrements of 18 to 46:
    they were once judged with AF estimates below 1 and taken by `compare` as the
    first bending critical's counterpart."""
    result = screen(compressor_without_gas())
    over = [r for r in result.margins.rows if r.critical.damping_ratio >= 0.45]
    assert len(over) == 3
    assert all(r.verdict == "overdamped" and r.amplification_factor is None for r in over)
    assert all(r.verdict != "overdamped" for r in result.margins.rows
               if r.critical.damping_ratio < 0.45)
    doc = result.margins.to_dict()
    assert all(c["amplification_factor"] is None for c in doc["criticals"]
               if c["verdict"] == "overdamped")


@pytest.mark.slow
def test_verdict_compare_matches_the_first_bending_critical():
    base_path, rotor, variants = read_variants(ROOT / "cases" / "compressor_variants.toml")
    chosen = [v for v in variants if v.name == "heavier impellers"]
    comparison = compare(dataclasses.replace(rotor, sources=(), coupling_rule=None), chosen)
    rows = [r for r in comparison.rows if r.variant == "heavier impellers"]
    first = next(r for r in rows if r.row.critical.whirl == "forward"
                 and r.row.verdict == "pass")
    assert first.base_speed == pytest.approx(5638 * RPM, rel=2e-3)
    assert all(r.base_speed is None for r in rows if r.row.verdict == "overdamped")


def light_shaft_heavy_disks(elements, k_bearing):
    light = Material("light", STEEL.youngs_modulus, STEEL.shear_modulus, 1.0)
    section = Section(1.0, 0.1, light, elements=elements)
    return Rotor((section,), OperatingRange(1.0, 2.0),
                 disks=(Disk(0, 2000.0, 50.0, 30.0), Disk(1, 2000.0, 50.0, 30.0)),
                 bearings=(isotropic(0, k_bearing), isotropic(1, k_bearing)),
                 settings=Settings(mode_count=4))


@pytest.mark.parametrize("elements", [4, 16])
def test_verdict_rigid_body_test_does_not_depend_on_the_mesh(elements):
    """A light shaft between two 2000 kg disks on 1e4 N/m springs: the bounce at
    sqrt(k/m_disk) = 2.24 rad/s was dropped as a 'rigid-body mode' once the mesh
    was refined 4x (the test used the median of diag(K)/diag(M))."""
    k = 1.0e4
    m = modes_at(light_shaft_heavy_disks(elements, k), 0.0, 4)
    assert m.rigid_body_modes == 0
    bounce = math.sqrt(k / 2000.0)     # shaft mass 7.9 kg of 4008: within 0.2 %
    check(f"Light shaft, heavy disks, {elements} elements: bounce frequency (rad/s)",
          "rigid rotor on springs sqrt(k/m) (from memory)", bounce, m.frequency[3], 2e-3)


def test_verdict_free_rotor_still_has_its_rigid_body_modes():
    m = modes_at(light_shaft_heavy_disks(16, 0.0), 0.0, 2)
    assert m.rigid_body_modes == 4 and np.all(m.frequency > 1.0)


@pytest.mark.slow
@pytest.mark.parametrize("ratio", [1e2, 1e3, 1e4, 1e5, 1e6, 1e7])
@pytest.mark.parametrize("elements", [2, 8, 20])
@pytest.mark.parametrize("zeta", [0.0, 0.02])
def test_verdict_degenerate_bounce_pair_on_soft_isotropic_bearings(ratio, elements, zeta):
    """Stiff rotor on soft isotropic bearings: the forward and the backward bounce
    critical are each found once, whatever the roundoff level of the model (the
    forward one once vanished, the backward one listed twice)."""
    section = Section(0.5, 0.12, STEEL, elements=elements)
    k_shaft = 48 * STEEL.youngs_modulus * math.pi * 0.12**4 / 64 / 1.0**3
    kb = k_shaft / ratio
    mass = 300.0 + STEEL.density * math.pi * 0.12**2 / 4
    wb = math.sqrt(2 * kb / mass)
    c = zeta * 2 * math.sqrt(kb * mass / 2)
    rotor = Rotor((section, section), OperatingRange(0.8 * wb, 0.9 * wb, 0.92 * wb),
                  disks=(Disk(1, 300.0, 6.0, 3.5),),
                  bearings=(isotropic(0, kb, c), isotropic(2, kb, c)),
                  settings=Settings(mode_count=4, speed_to=3 * wb, speed_count=31))
    result = screen(rotor)
    bounce = [r for r in result.margins.rows if r.critical.speed < 1.5 * wb]
    assert sorted(r.critical.whirl for r in bounce) == ["backward", "forward"]
    forward = next(r for r in bounce if r.critical.whirl == "forward")
    assert forward.critical.forward_fraction > 0.999
    assert forward.verdict == "fail"     # 10 % above the range, AF needs more
    assert forward.critical.speed == pytest.approx(wb, rel=0.01 + 2 / ratio)


def test_verdict_undamped_model_reads_zero_and_judges_consistently():
    """No damping anywhere: every log decrement is exactly 0 (not +-1e-18 with
    verdicts that follow its sign), AF unbounded, the largest margin required,
    stability marginal; no division by zero."""
    section = Section(0.5, 0.08, STEEL, elements=4)
    rotor = Rotor((section, section), OperatingRange(200.0, 300.0, 310.0),
                  disks=(Disk(1, 80.0, 2.0, 1.1),),
                  bearings=(isotropic(0, 5e7), isotropic(2, 5e7)),
                  settings=Settings(mode_count=4, speed_to=1200.0, speed_count=31))
    result = screen(rotor)
    check("Undamped gyroscopic rotor: largest |log decrement| over the sweep",
          "energy conservation: imaginary eigenvalues (Meirovitch 1970, from memory)",
          0.0, float(np.nanmax(np.abs(result.sweep.log_dec))), 0.0, kind="abs")
    judged = [r for r in result.margins.rows if r.verdict not in ("not judged",)]
    assert judged
    for r in judged:
        assert r.critical.log_dec == 0.0 and r.amplification_factor == math.inf
        assert r.required == required_margin(rotor.settings.margin_rule, math.inf, r.side)
        assert r.verdict in ("pass", "fail")
    assert all(m.verdict == "marginal" for m in result.stability.branches)
    assert result.verdict == "fail"


def undamped_fan(tmp_path):
    """The bundled fan with every damping coefficient removed."""
    text = (ROOT / "cases" / "overhung_fan.toml").read_text()
    path = tmp_path / "fan.toml"
    path.write_text("\n".join(line for line in text.splitlines()
                              if not line.startswith(("cxx", "cyy", "cx ", "cy "))))
    return path


@pytest.mark.slow
def test_verdict_undamped_response_has_no_bandwidth(tmp_path):
    path = undamped_fan(tmp_path)
    for command in ("check", "response"):
        result = runner.invoke(app, [command, str(path)])
        assert result.exception is None or isinstance(result.exception, SystemExit), \
            result.output
        assert "Traceback" not in result.output
    result = runner.invoke(app, ["response", str(path)])
    assert "AF unbounded" in result.output


# ---------------------------------------------------------------------------
# Whirl from orbit content
# ---------------------------------------------------------------------------

def test_verdict_forward_share_of_circles_and_ellipses():
    from rotorcalc.analysis.modes import forward_fraction, whirl_label
    nodes = 5
    circle_f = np.tile([1.0, -1.0j], (nodes, 1))
    circle_b = np.tile([1.0, 1.0j], (nodes, 1))
    line = np.tile([1.0, 0.0], (nodes, 1))
    # an ellipse with minor/major rho: rf = (1 + rho)/2, rb = (1 - rho)/2
    rho = 0.5
    ellipse = np.tile([1.0, -1.0j * rho], (nodes, 1))
    expected = (1 + rho) ** 2 / ((1 + rho) ** 2 + (1 - rho) ** 2)
    circles = "circular parts y = -i x forward, y = +i x backward (docs/theory.md)"
    for name, shape, share in (("forward circle", circle_f, 1.0), ("backward circle", circle_b, 0.0),
                               ("straight line", line, 0.5), ("ellipse 1:2", ellipse, expected)):
        check(f"Forward share of a {name}", circles, share,
              float(forward_fraction(shape[None])[0]), 1e-12, kind="abs")
    assert whirl_label(forward_fraction(ellipse[None])[0]) == "forward"
    assert whirl_label(0.5) == "mixed"
    # one node backward, four forward: a share near 0.8, not "mixed" by vote
    mixed = circle_f.copy()
    mixed[0] = [1.0, 1.0j]
    assert forward_fraction(mixed[None])[0] == pytest.approx(0.8)


def test_verdict_planar_mode_labels_do_not_flip_along_the_sweep():
    """Strongly anisotropic supports make nearly planar modes: their share stays
    near 1/2 and their label no longer swaps between forward and backward."""
    section = Section(0.5, 0.08, STEEL, elements=4)
    rotor = Rotor((section, section), OperatingRange(200.0, 300.0, 310.0),
                  disks=(Disk(1, 80.0, 0.1, 0.05),),
                  bearings=(Bearing(0, {"kxx": (1e6,), "kyy": (1e9,), "cxx": (1e3,),
                                        "cyy": (1e3,)}),
                            Bearing(2, {"kxx": (1e6,), "kyy": (1e9,), "cxx": (1e3,),
                                        "cyy": (1e3,)})),
                  settings=Settings(mode_count=2, speed_to=600.0, speed_count=31))
    from rotorcalc.analysis import sweep
    result = sweep(rotor)
    share = result.forward_fraction[:, :2]
    assert np.all(np.abs(share - 0.5) < 0.05)
    assert set(result.whirl[:, :2].ravel()) == {"mixed"}


def test_verdict_judge_share_threshold():
    rule = MarginRule(name="fixed", margin_below=10, margin_above=10)
    from rotorcalc.analysis.margins import Judgement

    class Fake:
        def __init__(self, share):
            self.forward_fraction, self.log_dec, self.damping_ratio = share, 0.5, 0.08

    j = Judgement(rule, judge_share=0.25)
    assert j.category(Fake(0.26)) == "judged" and j.category(Fake(0.2)) == "not judged"
    assert Judgement(rule, judge_share=0.0).category(Fake(0.0)) == "judged"


# ---------------------------------------------------------------------------
# Response-based margins: peaks matched by shape, margin from the peak
# ---------------------------------------------------------------------------

@pytest.mark.slow
def test_verdict_peak_goes_to_the_forward_critical_and_margin_is_from_the_peak():
    """Compressor, first bending pair at 5563 rpm (backward) and 5638 rpm
    (forward): the mid-span unbalance peaks belong to the forward one, and the
    response margin is measured from the peak speed, not from the critical."""
    result = screen(compressor_without_gas())
    rows = result.margins.rows
    backward = next(r for r in rows if abs(r.critical.speed / RPM - 5563) < 5)
    forward = next(r for r in rows if abs(r.critical.speed / RPM - 5638) < 5)
    assert backward.critical.whirl == "backward" and not backward.peaks
    assert {p.case for p in forward.peaks} == {"mid_span"}
    peak = forward.peak
    expected = 100.0 * (rows[0].critical.speed * 0 + 9000 * RPM - peak.speed) / (9000 * RPM)
    assert forward.peak_margin == pytest.approx(expected)
    assert forward.peak_margin < forward.margin    # the peak lies above the critical
    # the couple case excites the forward rocking mode, 5 % below its critical
    rocking = next(r for r in rows if abs(r.critical.speed / RPM - 13888) < 10)
    assert {p.case for p in rocking.peaks} == {"couple"}
    assert all(p.speed < rocking.critical.speed for p in rocking.peaks)


# ---------------------------------------------------------------------------
# Rules of industry practice, as tables with their labels
# ---------------------------------------------------------------------------

CAPS = MarginRule()   # 16 % below, 26 % above


@pytest.mark.parametrize("af, side, percent", [
    (2.4, "below", 0.0),                                   # critically damped
    (2.4, "above", 0.0),
    (3.0, "below", 17.0 * (1 - 1 / 1.5)),                  # 5.67
    (3.0, "above", 10.0 + 17.0 * (1 - 1 / 1.5)),           # 15.67
    (10.0, "below", 17.0 * (1 - 1 / 8.5)),                 # 15.0, under the cap
    (10.0, "above", 10.0 + 17.0 * (1 - 1 / 8.5)),          # 25.0
    (20.0, "below", 16.0),                                 # 16.08 -> capped
    (20.0, "above", 26.0),                                 # 26.08 -> capped
    (math.inf, "below", 16.0),
    (math.inf, "above", 26.0),
    (math.inf, "inside", 26.0),
])
def test_verdict_margin_rule_caps(af, side, percent):
    check(f"Required margin, AF = {af:g}, {side} the range (%)",
          FROM_MEMORY + ": SM = 17(1-1/(AF-1.5)) below, at most 16; 10 + 17(...) above, "
          "at most 26", percent, required_margin(CAPS, af, side), 1e-12, kind="abs")


def test_verdict_margin_caps_are_selectable():
    lifted = MarginRule(margin_cap_below=math.inf, margin_cap_above=math.inf)
    assert required_margin(lifted, math.inf, "above") == 27.0
    assert required_margin(MarginRule(margin_cap_above=20.0), 20.0, "above") == 20.0
    rotor = parse_rotor((ROOT / "cases" / "compressor.toml").read_text()
                        + '\n[response]\nvibration_limit = "12 um"\n'
                        ).settings.margin_rule
    assert rotor.margin_cap_below == 16.0 and rotor.margin_cap_above == 26.0


@pytest.mark.parametrize("mcs_rpm, limit_um", [
    (3600.0, 25.4),                         # 46.4 capped at 25.4
    (12000.0, 25.4),
    (15000.0, 25.4 * math.sqrt(12000 / 15000)),
    (20000.0, 25.4 * math.sqrt(12000 / 20000)),
])
def test_verdict_vibration_limit_uses_the_maximum_continuous_speed(mcs_rpm, limit_um):
    """One limit for the whole operating range, from N = maximum continuous speed
    (it was once recomputed at every sweep speed, looser at the low end)."""
    from rotorcalc.analysis.response import vibration_limit
    rotor = Rotor((Section(1.0, 0.05, STEEL),), OperatingRange(0.5 * mcs_rpm * RPM, mcs_rpm * RPM))
    check(f"Vibration limit, maximum continuous speed {mcs_rpm:g} rpm (um pk-pk)",
          FROM_MEMORY + ": 25.4 sqrt(12000/N) um, at most 25.4", limit_um,
          vibration_limit(rotor) * 1e6, 1e-12)


def test_verdict_vibration_limit_can_be_given():
    text = (ROOT / "cases" / "compressor.toml").read_text() + \
        '\n[response]\nvibration_limit = "12 um"\n'
    from rotorcalc.analysis.response import vibration_limit
    assert vibration_limit(parse_rotor(text)) == pytest.approx(12e-6)


def two_journal_rotor(disk_at):
    """Uniform 1.2 m shaft, journals at 0.2 m and 1.0 m, one 100 kg disk."""
    sections = tuple(Section(0.2, 0.1, STEEL, elements=1) for _ in range(6))
    return Rotor(sections, OperatingRange(300.0, 400.0),
                 disks=(Disk(disk_at, 100.0, 1.0, 0.5),),
                 bearings=(isotropic(1, 1e8, name="A"), isotropic(5, 1e8, name="B")))


def _lever(rotor, disk_z):
    shaft = sum(s.mass for s in rotor.sections)
    # moments about journal A (z = 0.2): shaft centre at 0.6 m
    rb = (shaft * (0.6 - 0.2) + 100.0 * (disk_z - 0.2)) / 0.8
    return shaft + 100.0 - rb, rb


@pytest.mark.parametrize("disk_at, weight_at, which", [
    (3, 3, "nearer journal (tie: A)"),     # mid-span disk, weight at mid-span
    (2, 2, "nearer journal A"),
    (4, 4, "nearer journal B"),
    (6, 6, "overhung mass outboard of B"),
    (0, 0, "overhung mass outboard of A"),
])
def test_verdict_residual_unbalance_per_journal(disk_at, weight_at, which):
    rotor = two_journal_rotor(disk_at)
    z = rotor.station_positions
    ra, rb = _lever(rotor, z[disk_at])
    loads = journal_static_loads(rotor)
    check(f"Journal A static load, disk at {z[disk_at]:g} m (kg)",
          "lever rule (statics of a beam on two supports)", ra, loads[0], 1e-9)
    check(f"Journal B static load, disk at {z[disk_at]:g} m (kg)",
          "lever rule (statics of a beam on two supports)", rb, loads[1], 1e-9)
    section = rotor.sections[0].mass
    expected = {"nearer journal (tie: A)": ra, "nearer journal A": ra, "nearer journal B": rb,
                "overhung mass outboard of B": 100.0 + section,
                "overhung mass outboard of A": 100.0 + section}[which]
    got = standards.residual_mass(rotor, weight_at)
    check(f"Residual-unbalance mass W for a weight at {z[weight_at]:g} m, {which} (kg)",
          FROM_MEMORY + ": W = static load of the nearer journal, or the overhung mass",
          expected, got, 1e-9)
    assert expected < rotor.mass    # never the whole rotor (the old rule)


def test_verdict_three_journals_carry_the_continuous_beam_reactions():
    """A uniform shaft on three stiff journals, two equal spans: the reactions of a
    two-span continuous beam under uniform load are 3/16, 10/16 and 3/16 of the
    weight (e.g. W. C. Young, R. G. Budynas, "Roark's Formulas for Stress and
    Strain", continuous beams; from memory).  A rigid-shaft split once gave a
    third each, and the centre residual 47 % too small."""
    span = Section(1.0, 0.1, STEEL, elements=16)
    rotor = Rotor((span, span), OperatingRange(300.0, 400.0),
                  bearings=(isotropic(0, 1e12, name="A"), isotropic(1, 1e12, name="B"),
                            isotropic(2, 1e12, name="C")),
                  settings=Settings(beam_theory="euler-bernoulli"))
    loads = journal_static_loads(rotor)
    # 1e12 N/m journals against a 1 m span of EI 1e6 N m^2: compliance share ~1e-5
    for index, share in ((0, 3 / 16), (1, 10 / 16), (2, 3 / 16)):
        check(f"Three journals, two equal spans: journal {'ABC'[index]} load / weight",
              "two-span continuous beam, uniform load (Roark, from memory)", share,
              loads[index] / rotor.mass, 1e-4)


def test_verdict_reader_uses_the_journal_load_for_residual():
    rotor = read_rotor(ROOT / "cases" / "compressor.toml")
    case = next(c for c in rotor.unbalance if c.name == "mid_span")
    weight = case.weights[0]
    w = standards.residual_mass(rotor, weight.station)
    expected = 2.0 * standards.RESIDUAL_CONSTANT_G_MM * w / 11500.0 * 1e-6
    assert weight.amount == pytest.approx(expected)
    assert w < 0.6 * rotor.mass


@pytest.mark.slow
def test_verdict_clearance_check_covers_run_up():
    """The close-clearance check reads every analysed speed up to trip: the
    compressor passes its first critical (about 5700 rpm) on the way up, where
    the mid-span orbit is largest."""
    result = screen(compressor_without_gas())
    eye = next(c for c in result.response.clearance
               if c.case == "mid_span" and c.where == "impeller 1 eye seal")
    assert 5000 * RPM < eye.speed < 6500 * RPM


@pytest.mark.slow
def test_verdict_stability_rule_from_the_command_line(tmp_path):
    path = undamped_fan(tmp_path)
    assert runner.invoke(app, ["check", str(path)]).exit_code == 1          # marginal
    assert runner.invoke(app, ["check", str(path), "--stability-rule", "none"]).exit_code == 0
    fan = ROOT / "cases" / "overhung_fan.toml"
    assert runner.invoke(app, ["check", str(fan)]).exit_code == 0
    strict = runner.invoke(app, ["check", str(fan), "--min-log-dec", "0.1"])
    assert strict.exit_code == 1 and "below minimum" in strict.output
    bad = runner.invoke(app, ["check", str(fan), "--stability-rule", "sometimes"])
    assert bad.exit_code == 2 and "--stability-rule" in bad.output


def test_verdict_lifted_journal_needs_an_explicit_amount(tmp_path):
    """A heavy overhang lifts the far journal (negative static load): the residual
    amount is refused with a message, an explicit amount is read (the file once
    crashed every command with a traceback)."""
    text = (ROOT / "cases" / "overhung_fan.toml").read_text()
    heavy = text.replace('mass = "300 kg"', 'mass = "900 kg"', 1)
    weight = ('\n[unbalance.between]\n[[unbalance.between.weight]]\nat = "mid_span"\n'
              'amount = "{}"\n')
    path = tmp_path / "fan.toml"
    path.write_text(heavy + weight.format("residual"))
    loads = journal_static_loads(parse_rotor(heavy))
    assert min(loads.values()) < 0                      # the drive-end journal lifts
    result = runner.invoke(app, ["check", str(path)])
    assert result.exit_code == 2 and "carries no static load" in result.output
    path.write_text(heavy + weight.format("50 g*mm"))
    assert runner.invoke(app, ["criticals", str(path)]).exit_code == 0


def test_verdict_output_that_cannot_be_written_exits_4(tmp_path):
    blocker = tmp_path / "afile"
    blocker.write_text("")
    fan = ROOT / "cases" / "overhung_fan.toml"
    result = runner.invoke(app, ["check", str(fan), "--json", str(blocker / "x.json")])
    assert result.exit_code == 4 and "Output error" in result.output
    assert "Traceback" not in result.output


def test_verdict_response_sweep_must_cover_the_range(tmp_path):
    text = (ROOT / "cases" / "overhung_fan.toml").read_text()
    path = tmp_path / "fan.toml"
    path.write_text(text + '\n[response]\nspeed_from = "1000 rpm"\n')
    result = runner.invoke(app, ["check", str(path)])
    assert result.exit_code == 5 and "unbalance response sweep" in result.output


def test_verdict_instability_below_the_range_fails_the_run_up_clearance_check():
    from rotorcalc.analysis.response import unbalance_response
    from rotorcalc.unbalance import Clearance, Probe, UnbalanceCase, UnbalanceWeight
    slope = C_DISK * W_N / 1200.0
    rotor = cross_coupled_jeffcott(slope, OperatingRange(1500.0, 1700.0, 1750.0),
                                   speed_to=1800.0)
    # q falling with speed: unstable from rest up to 800 rad/s, stable in the range
    source = rotor.bearings[2]
    q_top = slope * TOP
    falling = Bearing(1, {**source.coefficients, "kxy": (q_top, 0.0), "kyx": (-q_top, 0.0)},
                      speeds=(0.0, TOP), name="gas", role="seal")
    rotor = Rotor(rotor.sections, OperatingRange(1500.0, 1700.0, 1750.0), disks=rotor.disks,
                  bearings=rotor.bearings[:2] + (falling,), settings=rotor.settings,
                  clearances=(Clearance(1, 1e-3, "disk seal"),))
    result = screen(rotor)
    # no mode unstable from the minimum speed up (the anti-symmetric mode has no motion
    # at the damper and reads marginal, which is right and beside the point here)
    assert all(m.verdict != "unstable" for m in result.stability.branches)
    lo, hi = result.stability.unstable_ranges[0]
    assert lo == pytest.approx(0.0, abs=1.0) and hi == pytest.approx(TOP - 1200.0, rel=1e-3)
    case = UnbalanceCase("disk", (UnbalanceWeight(1, 1e-4),))
    res = unbalance_response(rotor, cases=(case,), probes=(Probe(1, 0.0, "disk x"),),
                             unstable=result.stability.unstable_ranges)
    vib = res.vibration[0]
    seal = res.clearance[0]
    assert vib.valid and vib.verdict == "pass"           # the operating range is steady
    assert not seal.valid and seal.verdict == "no steady state" and not res.passed


def test_verdict_rule_none_lists_margins_without_judging_them():
    rotor = read_rotor(ROOT / "cases" / "overhung_fan.toml")
    settings = rotor.settings
    import dataclasses
    fan = dataclasses.replace(rotor, operating=OperatingRange(1800 * RPM, 2200 * RPM),
                              settings=dataclasses.replace(
                                  settings, margin_rule=MarginRule(name="none")))
    rows = screen(fan).margins.rows
    inside = [r for r in rows if r.side == "inside"]
    assert inside and all(r.verdict == "not judged" for r in inside)


def test_verdict_stability_rules_are_selectable():
    assert StabilityRule().passes(0.01) and not StabilityRule().passes(0.0)
    common = StabilityRule("at-least", 0.1)
    assert not common.passes(0.05) and common.passes(0.1)
    assert common.label.startswith("common practice")
    assert StabilityRule("none").passes(-1.0)
