"""The cross-coupling screen against closed forms, and the stage estimate against a hand
calculation.

1. Jeffcott rotor (a disk on a light shaft between stiff pins) with isotropic damping ``c`` at
   the disk and cross-coupled stiffness ``q`` there: with ``z = x + i y`` the motion obeys
   ``m z'' + c z' + (k - i q) z = 0`` (for ``kxy = q, kyx = -q``), so the forward root of
   ``m s^2 + c s + k - i q = 0`` gives the log decrement ``-2 pi Re s / Im s``, and it is zero
   at ``q0 = c w_n`` with ``w_n = sqrt(k / m)``.  Source: D. Childs, Turbomachinery
   Rotordynamics, Wiley 1993, chapter 1 (the cross-coupled Jeffcott rotor); J. M. Vance,
   F. Zeidan, B. Murphy, Machinery Vibration and Rotordynamics, Wiley 2010, chapter 5 (from
   memory).  The shaft's own mass (7.7e-7 of the disk's) and the pins' compliance are the
   model's only departures from the closed form; ``k`` is the shaft's mid-span stiffness
   48 E I / L^3 (Roark) in series with the two pins.
   With supports a little stiffer in y than in x (``k_y - k_x = 2 delta``) the same equations
   give ``(p + k_x)(p + k_y) + q^2 = 0``, ``p = m s^2 + c s``: for ``q > delta``,
   ``p = -k_mean -+ i r`` with ``r = sqrt(q^2 - delta^2)``, so the forward root is that of
   ``m s^2 + c s + k_mean - i r = 0`` and the threshold is ``q0 = sqrt((c w)^2 + delta^2)``,
   ``w = sqrt(k_mean / m)`` (derived here from the equations above).  Without cross-coupling
   the two modes whirl on straight lines (forward share 0.5 each): the screen must follow
   the one that turns forward.
2. The stage estimate q = B_c T (rho_d / rho_s) / (D H) (common practice, from memory) against
   the formula worked by hand in US units (C = 33 000 x 12 / (2 pi) turns hp / rpm into
   lbf in) and in SI (60 000 / (2 pi) turns kW / rpm into N m).
"""

import dataclasses
import math

import numpy as np
import pytest

from rotorcalc import standards
from rotorcalc.analysis import coupling_screen
from rotorcalc.analysis.coupling_screen import applied_sources, cross_coupling_screen
from rotorcalc.analysis.modes import modes_at
from rotorcalc.assembly import assemble, with_sources
from rotorcalc.rules import CouplingRule
from rotorcalc.model import Bearing, Disk, OperatingRange, Rotor, Section, Settings
from rotorcalc.units import RPM
from tests.conftest import LIGHT, STEEL, disk_at_mid_span, isotropic
from tests.verification import closed_forms as cf
from tests.verification.record import check

JEFFCOTT = ("Cross-coupled Jeffcott rotor, Childs 1993 ch. 1; Vance, Zeidan and Murphy 2010 "
            "ch. 5 (from memory)")
STAGE = "Stage cross-coupling estimate, worked by hand (common practice, from memory)"

LJ, DJ, MJ = 1.0, 0.05, 20.0
KPIN = 1.0e11
K_SHAFT = cf.simply_supported_midspan_stiffness(STEEL.youngs_modulus, math.pi * DJ**4 / 64, LJ)
K_EFF = cf.series_stiffness_two_bearings(K_SHAFT, KPIN)
WN = math.sqrt(K_EFF / MJ)
ZETA = 0.05
C_DISK = 2.0 * ZETA * math.sqrt(K_EFF * MJ)
Q0 = C_DISK * WN                       # the closed-form threshold
#: The model departs from the closed form by the shaft's mass (m_s / m = 7.7e-7) and the
#: discretisation of a shaft that carries no load between its ends: a few parts in 1e6.
TOL = 1e-5


def jeffcott(speed=300.0):
    damper = Bearing(1, {"kxx": (0.0,), "kyy": (0.0,), "cxx": (C_DISK,), "cyy": (C_DISK,)},
                     name="disk damper")
    return disk_at_mid_span(MJ, (isotropic(0, KPIN, name="pin A"),
                                 isotropic(2, KPIN, name="pin B"), damper),
                            span=LJ, diameter=DJ, material=LIGHT,
                            operating=OperatingRange(0.8 * speed, speed), mode_count=2)


def closed_form_log_dec(q):
    roots = np.roots([MJ, C_DISK, K_EFF - 1j * q])
    s = roots[np.argmax(roots.imag)]            # forward whirl: Im s > 0
    return -2.0 * math.pi * s.real / s.imag


@pytest.fixture(scope="module")
def screen():
    """Expected q0 / 3.7: the threshold falls between two steps of the sweep, and the root
    is found to 1e-10 of the sweep's top (a grid point would hide the model's error)."""
    return cross_coupling_screen(jeffcott(), expected=Q0 / 3.7, placement="mid-span",
                                 xtol_share=1e-10)


def test_jeffcott_threshold_is_c_times_natural_frequency(screen):
    check("Jeffcott: threshold q0 = c w_n", JEFFCOTT, Q0, screen.threshold, TOL)
    check("Jeffcott: threshold ratio (expected = q0/3.7)", JEFFCOTT, 3.7, screen.ratio, TOL)


@pytest.mark.parametrize("share", [0.0, 0.5, 2.0])
def test_jeffcott_log_decrement_against_cross_coupling(share):
    rotor = jeffcott()
    result = cross_coupling_screen(rotor, expected=share * Q0 if share else Q0,
                                   placement="mid-span")
    q = share * Q0
    computed = float(np.interp(q, result.applied, result.log_dec)) if share else \
        result.log_dec_zero
    # the sweep's grid holds q exactly (the expected amount is always a step)
    check(f"Jeffcott: log dec at q = {share:g} q0", JEFFCOTT, closed_form_log_dec(q),
          computed, TOL)


def test_the_threshold_converges_with_the_steps_and_the_tolerance():
    """The threshold does not depend on the sweep's step (it only brackets the root) and
    follows the root-finding tolerance."""
    rotor = jeffcott()
    coarse = cross_coupling_screen(rotor, expected=Q0 / 4.0, placement="mid-span", steps=11)
    fine = cross_coupling_screen(rotor, expected=Q0 / 4.0, placement="mid-span", steps=81)
    loose = cross_coupling_screen(rotor, expected=Q0 / 4.0, placement="mid-span",
                                  xtol_share=1e-3)
    assert abs(coarse.threshold / fine.threshold - 1.0) < 1e-8
    assert abs(loose.threshold / fine.threshold - 1.0) < 2e-3


def test_the_verdict_follows_the_criteria(screen):
    """Expected = q0/3.7: the log decrement there is positive and the ratio is 3.7."""
    assert screen.verdict == "pass"
    strict = cross_coupling_screen(jeffcott(), expected=Q0 / 4.0, placement="mid-span",
                                   criteria=CouplingRule(min_ratio=4.5))
    assert strict.verdict == "fail"
    near = cross_coupling_screen(jeffcott(), expected=0.9 * Q0, placement="mid-span")
    assert near.verdict == "fail" and near.log_dec_expected < 0.1


def test_the_followed_mode_is_forward_and_keeps_its_frequency(screen):
    """By shape, not by index: the forward mode's frequency stays near w_n while q grows."""
    assert np.all(np.abs(screen.frequency / WN - 1.0) < 0.05)
    assert screen.log_dec[-1] < 0 < screen.log_dec[0]


ANISO = "Anisotropic cross-coupled Jeffcott rotor (derived from the same equations)"


#: The expected amount is the threshold over this: the screen's grid (0 to 10 times the expected
#: amount in 40 steps) then does not hold the threshold itself, so Brent's method finds it and
#: the check measures the model's error (with 2.5 a grid point fell on it exactly).
OFF_GRID = 2.37


def anisotropic_jeffcott(share=0.2):
    """The Jeffcott rotor on supports stiffer in y by 2 delta (delta = ``share`` q0 of the
    isotropic rotor), damped at the disk; with the threshold sqrt((c w)^2 + delta^2) of its
    forward root."""
    delta = share * Q0                              # half the difference k_y - k_x, N/m
    damper = Bearing(1, {"kxx": (0.0,), "kyy": (2.0 * delta,), "cxx": (C_DISK,),
                         "cyy": (C_DISK,)}, name="disk damper")
    rotor = disk_at_mid_span(MJ, (isotropic(0, KPIN, name="pin A"),
                                  isotropic(2, KPIN, name="pin B"), damper),
                             span=LJ, diameter=DJ, material=LIGHT,
                             operating=OperatingRange(240.0, 300.0), mode_count=2)
    k_mean = K_EFF + delta
    w = math.sqrt(k_mean / MJ)
    return rotor, delta, k_mean, math.sqrt((C_DISK * w) ** 2 + delta ** 2)


def test_the_screen_follows_the_mode_that_turns_forward_on_anisotropic_supports():
    rotor, delta, k_mean, q0 = anisotropic_jeffcott()
    result = cross_coupling_screen(rotor, expected=q0 / OFF_GRID, placement="mid-span",
                                   xtol_share=1e-10)
    check("Anisotropic Jeffcott: threshold sqrt((c w)^2 + delta^2)", ANISO, q0,
          result.threshold, TOL)
    r = math.sqrt((q0 / OFF_GRID) ** 2 - delta ** 2)
    roots = np.roots([MJ, C_DISK, k_mean - 1j * r])
    s = roots[np.argmax(roots.imag)]
    check("Anisotropic Jeffcott: log dec at the expected amount (forward root)", ANISO,
          -2.0 * math.pi * s.real / s.imag, result.log_dec_expected, TOL)
    beyond = result.applied > 1.01 * delta
    assert np.all(np.diff(result.log_dec[beyond]) < 0.0)


def test_the_screen_judges_the_right_mode_when_the_supports_split_the_pair_far_apart():
    """Supports so unequal that the two straight-line modes lie 26 % apart in frequency (more
    than the mixed pair's spread): the lowest is judged at zero and the threshold is still
    the forward root's."""
    rotor, _, _, q0 = anisotropic_jeffcott(share=3.0)
    result = cross_coupling_screen(rotor, expected=q0 / OFF_GRID, placement="mid-span",
                                   xtol_share=1e-10)
    check("Anisotropic Jeffcott, modes 26 % apart: threshold sqrt((c w)^2 + delta^2)",
          ANISO, q0, result.threshold, TOL)


@pytest.mark.parametrize("guard", [0, 1, 2, 3])
def test_the_judged_mode_does_not_depend_on_the_projection(guard, monkeypatch):
    """Without cross-coupling the anisotropic supports' first two modes whirl on straight
    lines: forward share 0.5 each, up to roundoff.  Which of them is the first forward mode
    must not be decided by that roundoff (which the projection's basis changes): with guard
    modes 0 to 3 the screen judges the same mode and finds the same threshold."""
    monkeypatch.setattr(coupling_screen, "PROJECTION_GUARD", guard)
    rotor, _, k_mean, q0 = anisotropic_jeffcott()
    result = cross_coupling_screen(rotor, expected=q0 / OFF_GRID, placement="mid-span",
                                   xtol_share=1e-10)
    assert "projected solves" in result.solves and "0 full solves" in result.solves
    modes = "1 guard mode" if guard == 1 else f"{guard} guard modes"
    check(f"Anisotropic Jeffcott, projection with {modes}: threshold", ANISO, q0,
          result.threshold, TOL)
    assert np.all(result.frequency < 1.5 * math.sqrt(k_mean / MJ))   # the first pair's only


def test_stage_estimate_by_hand_in_us_units():
    hp, rpm, d_in, h_in, ratio = 1500.0, 10000.0, 15.0, 0.6, 1.8
    torque_lbf_in = 33000.0 * 12.0 / (2.0 * math.pi) * hp / rpm       # 9453.8 lbf in
    by_hand = 3.0 * torque_lbf_in * ratio / (d_in * h_in)              # 5672.3 lbf/in
    si = standards.stage_cross_coupling(hp * 745.69987158227022, rpm * RPM, d_in * 0.0254,
                                        h_in * 0.0254, ratio)
    check("Stage estimate, US units (lbf/in)", STAGE, by_hand, si / 175.12683524647636, 1e-12)
    check("Stage estimate, US units, value (lbf/in)", STAGE, 5672.3, si / 175.12683524647636,
          1e-4)


def test_stage_estimate_by_hand_in_si_units():
    kw, rpm, d_mm, h_mm, ratio = 1000.0, 10000.0, 400.0, 15.0, 1.8
    torque = 60000.0 / (2.0 * math.pi) * kw / rpm                      # 954.93 N m
    by_hand = 3.0 * torque * ratio / (d_mm * 1e-3 * h_mm * 1e-3)       # 859 437 N/m
    si = standards.stage_cross_coupling(kw * 1e3, rpm * RPM, d_mm * 1e-3, h_mm * 1e-3, ratio)
    check("Stage estimate, SI (N/m)", STAGE, by_hand, si, 1e-12)
    check("Stage estimate, SI, value (N/m)", STAGE, 859437.0, si, 1e-6)
    wachel = standards.stage_cross_coupling(kw * 1e3, rpm * RPM, d_mm * 1e-3, h_mm * 1e-3,
                                            ratio, molecular_weight=28.0, form="wachel")
    check("Stage estimate, Wachel's form with MW 28 (N/m)", STAGE, by_hand * 28.0 / 3.0,
          wachel, 1e-12)


# --- rigid symmetric rotor on two damped bearings ------------------------------------------
#
# A rigid body (mass M, transverse inertia I_t, no polar inertia) between two identical
# isotropic bearings (k, c) at +-a from its centre, with the cross-coupled stiffness q split
# half and half between the bearings.  Translation and tilt part: M z'' + 2c z' + (2k - iq) z
# = 0 and I_t phi'' + 2c a^2 phi' + (2k - iq) a^2 phi = 0, so each mode's threshold is
# q0 = 2 c w with w = sqrt(2k / M) (bounce) or sqrt(2 k a^2 / I_t) (rocking).  Source: the
# two-degree-of-freedom rigid rotor on bearings, J. M. Vance, Rotordynamics of
# Turbomachinery, Wiley 1988, chapter 3, with the cross-coupling of the Jeffcott case above
# (from memory).  The shaft is 1000 times as stiff as steel: the undamped frequencies of the
# model lie 2.5e-6 (bounce) and 2.3e-6 (rocking) below the rigid body's; the shaft's
# compliance in series with the complex bearing impedance moves the thresholds by a few
# times that (measured: 1.2e-5 on the rocking mode), hence the tolerance 3e-5.
RIGID = ("Rigid rotor on damped bearings with cross-coupling, Vance 1988 ch. 3 "
         "(from memory)")
M_R, IT_R, A_R, K_R, C_R = 100.0, 10.0, 0.5, 1.0e6, 800.0
W_BOUNCE = math.sqrt(2 * K_R / M_R)
W_ROCK = math.sqrt(2 * K_R * A_R**2 / IT_R)


def rigid_rotor():
    from rotorcalc.model import Disk, Material, Rotor, Section, Settings
    stiff = Material("stiff", 1000 * STEEL.youngs_modulus, 1000 * STEEL.shear_modulus,
                     STEEL.density * 1e-6)
    half = Section(A_R, 0.2, stiff, elements=2)
    bearings = tuple(Bearing(s, {"kxx": (K_R,), "kyy": (K_R,), "cxx": (C_R,), "cyy": (C_R,)},
                             name=n) for s, n in ((0, "A"), (2, "B")))
    return Rotor((half, half), OperatingRange(250.0, 300.0),
                 disks=(Disk(1, M_R, 0.0, IT_R),), bearings=bearings,
                 settings=Settings(beam_theory="euler-bernoulli", mode_count=4))


def _rocking_log_dec(rotor, q):
    from rotorcalc.analysis.coupling_screen import applied_sources
    from rotorcalc.analysis.modes import modes_at
    import dataclasses
    model = dataclasses.replace(rotor, sources=applied_sources(((0, 0.5), (2, 0.5)), q))
    m = modes_at(model, 300.0, 4)
    forward = [i for i in range(len(m.frequency)) if m.forward_fraction[i] >= 0.5]
    i = min(forward, key=lambda i: abs(m.frequency[i] - W_ROCK))
    return float(m.log_dec[i])


def test_rigid_rotor_thresholds_of_both_modes():
    from scipy.optimize import brentq
    from rotorcalc.analysis.coupling_screen import applied_sources
    import dataclasses
    rotor = rigid_rotor()
    q0_bounce, q0_rock = 2 * C_R * W_BOUNCE, 2 * C_R * W_ROCK
    with_sources = dataclasses.replace(
        rotor, sources=applied_sources(((0, 0.5), (2, 0.5)), q0_bounce / 3.3))
    # q0 / 3.3: the threshold falls between steps (on a step, the log decrement within
    # roundoff of zero reads 0 and hides the model's error)
    screen = cross_coupling_screen(with_sources, placement="sources", xtol_share=1e-10)
    # the first forward mode is the bounce (141 rad/s; the rocking is at 224 rad/s)
    check("Rigid rotor: bounce threshold 2 c w_bounce", RIGID, q0_bounce, screen.threshold,
          3e-5)
    rock = brentq(lambda q: _rocking_log_dec(rotor, q), 0.5 * q0_rock, 1.5 * q0_rock,
                  xtol=1e-9 * q0_rock)
    check("Rigid rotor: rocking threshold 2 c w_rock", RIGID, q0_rock, rock, 3e-5)


def test_the_screen_judges_the_forward_one_of_a_mixed_pair_on_tilting_pads():
    """The compressor on tilting pads: near-isotropic bearings mix its first pair (forward
    shares 0.63 and 0.38 without cross-coupling, 0.36 and 0.67 at the expected amount).
    Followed by shape alone, the screen judged the pair's backward-turning mode (log decrement
    rising with the amount); it must judge the forward one, whose log decrement falls: the
    eigenproblem solved directly at the expected amount says which."""
    import dataclasses
    from rotorcalc.analysis.coupling_screen import applied_sources
    from rotorcalc.analysis.modes import modes_at
    from rotorcalc.reader import read_rotor
    from tests.conftest import ROOT
    rotor = read_rotor(ROOT / "cases" / "compressor_tilting_pad.toml")
    rule = dataclasses.replace(rotor.coupling_rule, coefficients_at="synchronous")
    result = cross_coupling_screen(rotor, criteria=rule)
    at = dataclasses.replace(rotor, sources=applied_sources(result.shares, result.expected))
    modes = modes_at(at, result.speed, 8)
    pair = np.argsort(modes.frequency)[:2]
    forward = pair[np.argmax(modes.forward_fraction[pair])]
    assert modes.forward_fraction[forward] > 0.6
    check("Tilting-pad compressor: the screen's log dec at the expected amount is the "
          "forward mode's of the mixed pair", "The rotor's eigenproblem solved directly",
          float(modes.log_dec[forward]), result.log_dec_expected, 1e-6)
    assert result.log_dec[-1] < result.log_dec[1]


def test_the_threshold_bracket_keeps_the_followed_ends():
    """Brent's method (Brent 1973, Algorithms for Minimization without Derivatives, ch. 4,
    from memory) needs opposite signs at its bracket's ends.  The screen's curve has them; a
    mode picked afresh at an end (a mixed pair's other member) might not.  The ends are taken
    from the curve as followed: a judge that disagrees there cannot make the search fail, and
    the root of a judge linear inside the bracket is found to the tolerance."""
    amounts = np.array([0.0, 1.0, 2.0, 3.0])
    log_dec = np.array([0.3, 0.2, 0.1, -0.1])

    def judge(q, _shape):       # crosses zero at q = 2.5 inside, positive at its right end
        return (abs(0.1 - 0.2 * (q - 2.0)) if q == 3.0 else 0.1 - 0.2 * (q - 2.0), 0.0, None)

    root = coupling_screen._threshold(judge, amounts, log_dec, [None] * 4, 1e-12)
    assert abs(root - 2.5) < 1e-9


def test_the_judged_mode_high_among_those_solved_brings_its_partner(monkeypatch):
    """Solving a single mode would leave the anisotropic rotor's straight-line partner out
    of every amount (and of the basis): the screen solves the mode after the judged one too,
    and finds the forward root's threshold."""
    monkeypatch.setattr(coupling_screen, "SCREEN_MODES", 1)
    rotor, _, _, q0 = anisotropic_jeffcott()
    rotor = dataclasses.replace(rotor, settings=dataclasses.replace(rotor.settings,
                                                                    mode_count=1))
    result = cross_coupling_screen(rotor, expected=q0 / OFF_GRID, placement="mid-span",
                                   xtol_share=1e-10)
    check("Anisotropic Jeffcott, one mode asked for: threshold sqrt((c w)^2 + delta^2)",
          ANISO, q0, result.threshold, TOL)


DIRECT = ("Full-model eigen-solves on a grid of amounts (this package's assembly and solvers, "
          "without the screen's projection, following or root finding: a consistency check)")


@pytest.mark.parametrize("polar", [1e-6, 1e-4])
def test_a_nearly_straight_line_mode_of_a_spinning_rotor_is_judged_right(polar):
    """The disk off mid-span tilts, so its polar inertia couples the planes: with 1e-6 kg m^2
    the lowest mode is backward by 1.3e-7 of forward share (within the straight-line
    tolerance: a candidate), with 1e-4 by 1.3e-5 (not one).  Either way the threshold is the
    first amount at which a full solve finds the two lowest modes' least log decrement at or
    below zero (an 80-point grid of full solves brackets it)."""
    delta = 3.0 * Q0
    damper = Bearing(1, {"kxx": (0.0,), "kyy": (2.0 * delta,), "cxx": (C_DISK,),
                         "cyy": (C_DISK,)}, name="disk damper")
    near, far = Section(0.35 * LJ, DJ, LIGHT, elements=2), Section(0.65 * LJ, DJ, LIGHT,
                                                                      elements=2)
    rotor = Rotor((near, far), OperatingRange(240.0, 300.0),
                  disks=(Disk(1, MJ, polar, polar / 2),),
                  bearings=(isotropic(0, KPIN, name="pin A"), isotropic(2, KPIN, name="pin B"),
                            damper),
                  settings=Settings(beam_theory="euler-bernoulli", mode_count=2))
    result = cross_coupling_screen(rotor, expected=4e5, placement="mid-span",
                                   xtol_share=1e-10)
    bare = assemble(rotor)
    grid = np.linspace(0.0, result.applied[-1], 80)
    least = []
    for q in grid:
        modes = modes_at(with_sources(bare, applied_sources(result.shares, q)), 300.0, 8)
        least.append(modes.log_dec[np.argsort(modes.frequency)[:2]].min())
    first = int(np.nonzero(np.array(least) <= 0.0)[0][0])
    assert grid[first - 1] < result.threshold <= grid[first]
    check(f"Nearly straight-line spinning rotor (polar inertia {polar:g} kg m^2): threshold "
          "inside the bracket of full solves", DIRECT, 0.5 * (grid[first - 1] + grid[first]),
          result.threshold, 0.5 * (grid[1] - grid[0]), kind="abs")


def test_the_largest_amplitude_placement_finds_a_first_forward_mode_among_the_guard(monkeypatch):
    """A spinning rotor whose lowest mode is backward, screened with one mode asked for: the
    first forward mode is the second, among the projection's guard modes.  Placed at the
    station of its largest amplitude (the disk's, as mid-span here) the screen finds the same
    threshold as placed at mid-span (before, it stopped: no forward mode among one)."""
    monkeypatch.setattr(coupling_screen, "SCREEN_MODES", 1)
    near, far = Section(0.35 * LJ, DJ, LIGHT, elements=2), Section(0.65 * LJ, DJ, LIGHT,
                                                                      elements=2)
    rotor = Rotor((near, far), OperatingRange(240.0, 300.0), disks=(Disk(1, MJ, 0.1, 0.05),),
                  bearings=(isotropic(0, KPIN, name="pin A"), isotropic(2, KPIN, name="pin B"),
                            isotropic(1, 0.0, C_DISK, name="disk damper")),
                  settings=Settings(beam_theory="euler-bernoulli", mode_count=1))
    placed = [cross_coupling_screen(rotor, expected=1e5, placement=where, xtol_share=1e-10)
              for where in ("largest-amplitude", "mid-span")]
    assert placed[0].shares == placed[1].shares == ((1, 1.0),)
    assert placed[0].threshold == pytest.approx(placed[1].threshold, rel=1e-9)
