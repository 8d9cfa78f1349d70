"""Verification: what-if studies against closed forms (issue 4, item 6).

1. Critical-speed map, both asymptotes of a wide log sweep of the support
   stiffness k, on a uniform shaft with a bearing at each end:
   * soft supports: the rigid-rotor bounce and rocking criticals (forward
     synchronous, gyroscopic effect of I_p included), J. M. Vance,
     "Rotordynamics of Turbomachinery", Wiley, 1988, and M. I. Friswell,
     J. E. T. Penny, S. D. Garvey, A. W. Lees, "Dynamics of Rotating
     Machines", CUP 2010 (rigid rotor on flexible supports);
   * stiff supports: the pinned-pinned shaft, Euler-Bernoulli (no gyroscopic
     term, so the critical is the natural frequency) from R. D. Blevins,
     "Formulas for Natural Frequency and Mode Shape", Van Nostrand Reinhold,
     1979, Table 8-1, and Rayleigh (forward synchronous) from Friswell et al.
     (2010), continuous spinning shaft;
   * the approach to each asymptote: error ~ k at the soft end, ~ 1/k at the
     stiff end, with the first-order coefficients derived in
     ``closed_forms_whatif.py`` (Euler-Bernoulli shaft), and Weyl's bracket
     (H. Weyl, Math. Ann. 71, 1912) on the end values.
2. Jeffcott rotor on flexible supports over six decades of k: the
   series-spring critical sqrt(k_eff/m), k_eff = 1/(1/k_s + 1/(2k)),
   H. H. Jeffcott, Phil. Mag. (6) 37 (1919) 304-314, springs in series from
   W. T. Thomson, "Theory of Vibration with Applications".
3. Sensitivities of a Jeffcott critical to each bearing's direct stiffness
   and to the disk mass, undamped and with light bearing damping, against the
   exact logarithmic derivatives of ``closed_forms_whatif.py``.
4. The stiffness window of a lightly damped Jeffcott rotor on anisotropic
   bearings under the ``fixed`` margin rule, against the bracket solved from
   the closed forms (undamped algebraically, damped by bisection on the exact
   damped eigenvalue).

Section, table and equation numbers of every source are quoted from memory
(see ``docs/theory.md``); the derivations are in ``closed_forms_whatif.py``.

Tolerances.
* Map end values: Weyl's bracket (Euler-Bernoulli: rigorous, from the closed
  forms alone) and the FE mesh error of the pinned shaft; for the gyroscopic
  shaft, a two-point extrapolation to k -> 0 or infinity, whose residual is
  bounded from the sweep's own differences (NEXT_TERM below).
* Trends and first-order coefficients: the next term of the expansion
  (NEXT_TERM) and roundoff.  The map's soft-support eigenvalues sit under
  shaft stiffness entries of about 12 E I / L_e^3, so their roundoff is about
  eps 12 E I / (L_e^3 k) relative (measured: 1.1e-8 at kappa = k L^3/(E I) =
  1e-3 with 16 elements, the estimate exactly); the sweeps start at
  kappa = 1e-2, where :func:`roundoff_floor` (ten times that estimate) is far
  below the approach terms.
* Jeffcott cases: the light shaft's mass, m_s / m (as in test_disk_rotors.py),
  the solver tolerances, the closed form's own finite-difference truncation
  and the window's rtol, each named beside its check.

The Euler-Bernoulli cases also guard the map's split of a degenerate
forward/backward pair (no gyroscopic coupling): every critical once per whirl.
"""

import math

import numpy as np
import pytest
import scipy.linalg as la

from rotorcalc.analysis.csmap import critical_speed_map
from rotorcalc.analysis.criticals import SPEED_RTOL
from rotorcalc.analysis.modes import forward_fraction
from rotorcalc.analysis.screening import screen
from rotorcalc.analysis.whatif import (derivative_sensitivities, sensitivities,
                                      stiffness_window)
from rotorcalc.assembly import assemble
from rotorcalc.reader import read_rotor
from rotorcalc.model import Bearing, Material, MarginRule, OperatingRange
from tests.conftest import ROOT, STEEL, disk_at_mid_span, isotropic, uniform_shaft
from tests.verification import closed_forms as cf
from tests.verification import closed_forms_whatif as cw
from tests.verification.record import check
from tests.verification.reduce import solve_reduced

RIGID = "Rigid rotor on bearings, Vance 1988; Friswell et al. 2010 (from memory)"
BLEVINS = "Blevins 1979, Table 8-1 (from memory)"
FRISWELL_SHAFT = "Friswell et al. 2010, spinning SS Rayleigh shaft (from memory)"
WEYL = "Weyl 1912 eigenvalue bracket (from memory), derived in closed_forms_whatif"
FIRST_ORDER = "first-order term derived in closed_forms_whatif"
SERIES = "Jeffcott 1919 + springs in series, Thomson (from memory)"
SENS = "Jeffcott 1919; d ln w / d ln p derived in closed_forms_whatif"
WINDOW = "Jeffcott 1919 + series springs; bracket solved in closed_forms_whatif"

E, RHO = STEEL.youngs_modulus, STEEL.density
EPS = np.finfo(float).eps

#: Steel stiffness, a millionth of its density: a near-massless shaft
#: (as in test_disk_rotors.py).
LIGHT = Material("light steel", E, STEEL.shear_modulus, RHO * 1e-6)


def section(d):
    return math.pi * d**2 / 4.0, math.pi * d**4 / 64.0


def roundoff_floor(kappa, elements):
    """Ten times the roundoff estimate eps 12 n^3 / kappa of a soft eigenvalue
    (relative), for a uniform shaft of ``elements`` elements (module docstring)."""
    return 10.0 * EPS * 12.0 * elements**3 / kappa


#: The next term of each asymptotic expansion is beta |e| relative to the
#: first-order one, |e| the relative distance from the asymptote, beta of order
#: one (1.5 for springs in series, (1 + x)^(-1/2); measured here 1.04 for the
#: Euler-Bernoulli bounce and up to 2.5 for the Rayleigh mode 3).  It shifts a
#: fitted exponent and a two-point slope by about beta |e| and leaves about
#: beta |e1 e2| after a two-point (Richardson) extrapolation; the bounds use
#: NEXT_TERM in place of beta.  The size |e| of the first-order term is taken
#: from the differences between the sweep points (first_order_size), not from
#: the distance to the reference, so a wrong limit cannot widen a bound.
NEXT_TERM = 4.0


def first_order_size(kappa, err):
    """Size of the first-order term c kappa^(+-1) at the point of ``kappa``
    (ratio r apart) farthest from the asymptote, from the differences alone:
    max |e_(i+1) - e_i| r / (r - 1), at either end."""
    r = kappa[1] / kappa[0]
    return float(np.max(np.abs(np.diff(err)))) * r / (r - 1.0)


def trend_tolerance(kappa, err, floor):
    """Bound on |p -+ 1| of :func:`decay_exponent`: the next term (NEXT_TERM
    times the first-order size) plus the roundoff ``floor`` of each point
    carried through the differences."""
    step = np.min(np.abs(np.diff(err)))
    return (NEXT_TERM * first_order_size(kappa, err)
            + 2.0 * floor / (step * math.log(kappa[1] / kappa[0])))


def richardson_tolerance(r_out, r_in, ratio, floor):
    """Bound on what :func:`richardson` leaves: beta r a^2 with a = |r_out -
    r_in| / (r - 1) the first-order term at the outer point (NEXT_TERM for
    beta), plus the roundoff of both points carried through."""
    a = abs(r_out - r_in) / (ratio - 1.0)
    return NEXT_TERM * ratio * a * a + floor * (1.0 + 2.0 / (ratio - 1.0))


def decay_exponent(kappa, err):
    """Exponent p of err ~ C + c kappa^p from three points with equal ratio.

    Differences remove any constant C (e.g. the mesh error at the stiff end):
    (e3 - e2) / (e2 - e1) = r^p for kappa_{i+1} = r kappa_i.
    """
    r = kappa[1] / kappa[0]
    assert abs(kappa[2] / kappa[1] / r - 1.0) < 1e-9
    return math.log((err[2] - err[1]) / (err[1] - err[0])) / math.log(r)


# ---------------------------------------------------------------------------
# 1a. Map of a uniform Euler-Bernoulli shaft: Weyl brackets, trends, slopes
# ---------------------------------------------------------------------------

L1, D1, N1 = 1.0, 0.05, 16          # same shaft and mesh as test_beams.py case 1
#: kappa = k L^3 / (E I) from 1e-2 to 1e6, three points per decade.
KAPPA1 = np.logspace(-2, 6, 25)


def eb_pinned_fe(rotor, n_modes):
    """The FE shaft's pinned-pinned frequencies (end x, y deleted: exact pins)."""
    system = assemble(rotor)
    last = system.mesh.station_nodes[-1]
    values, _, _ = solve_reduced(system, [0, 1, 4 * last, 4 * last + 1], 0.0, 2 * n_modes)
    return values.imag[0::2][:n_modes]   # x/y pairs


def test_map_asymptotes_euler_bernoulli():
    area, second = section(D1)
    ei, mass = E * second, RHO * area * L1
    rotor = uniform_shaft(L1, D1, N1, theory="euler-bernoulli",
                          bearings=[isotropic(0, 1e6), isotropic(1, 1e6)])
    k = KAPPA1 * ei / L1**3
    forward = critical_speed_map(rotor, stiffness=k, mode_count=4).speeds
    backward = critical_speed_map(rotor, stiffness=k, mode_count=4, whirl="backward").speeds
    # Without gyroscopic terms forward and backward criticals coincide, and
    # each appears once per curve (no duplicated degenerate pair).
    check("EB shaft map: forward vs backward curves, max rel. difference",
          "no gyroscopic term (theory)", 0.0, np.max(np.abs(backward / forward - 1.0)), 1e-9,
          kind="abs")
    for row in (0, -1):
        assert np.all(np.diff(forward[row]) > 1e-3 * forward[row, :-1])

    rigid = np.array([cf.rigid_rotor_critical(mass, mass * L1**2 / 12.0, 0.0, kk, kk,
                                              L1 / 2, L1 / 2) for kk in k])  # bounce, rocking
    pinned = np.array([cf.euler_bernoulli_frequency("pinned-pinned", n, E, second, RHO, area,
                                                    L1) for n in (1, 2, 3)])
    pinned_fe = eb_pinned_fe(rotor, 3)
    # the consistent-mass FE pinned frequencies are upper bounds (Rayleigh-Ritz)
    assert np.all(pinned_fe >= pinned)

    # --- soft end: bounce (symmetric, with pinned mode 1) and rocking
    # (antisymmetric, with pinned mode 2)
    floor = roundoff_floor(KAPPA1[0], N1)
    for j, (name, other) in enumerate((("bounce", pinned[0]), ("rocking", pinned[1]))):
        w, exact = forward[0, j], rigid[0, j]
        lower = cw.weyl_lower_bound(exact, other)
        check(f"EB shaft map, kappa = {KAPPA1[0]:g}: {name} critical vs rigid rotor (rad/s)",
              RIGID + "; bound " + WEYL, exact, w, 1.0 - lower / exact)
        assert lower * (1 - floor) <= w <= exact * (1 + floor)
        err = 1.0 - forward[:3, j] / rigid[:3, j]
        check(f"EB shaft map, soft end: {name} error ~ kappa^p, p from kappa = "
              f"{KAPPA1[0]:g}..{KAPPA1[2]:.3g}", FIRST_ORDER, 1.0,
              decay_exponent(KAPPA1[:3], err), trend_tolerance(KAPPA1[:3], err, floor),
              kind="abs")
        slope = (err[2] - err[0]) / (KAPPA1[2] - KAPPA1[0])
        # two-point slope: next term plus the roundoff of both points
        tol = (NEXT_TERM * first_order_size(KAPPA1[:3], err)
               + 2.0 * floor / (slope * (KAPPA1[2] - KAPPA1[0])))
        check(f"EB shaft map, soft end: {name} first-order coefficient of 1 - w/w_rigid in "
              f"kappa", FIRST_ORDER, cw.soft_end_coefficient(name), slope, tol)

    # --- stiff end: pinned-pinned modes 1-3 (1, 3 symmetric, with the bounce;
    # 2 antisymmetric, with the rocking)
    for n in (1, 2, 3):
        j = n - 1
        w, exact = forward[-1, j], pinned[j]
        partner = rigid[-1, 0] if n % 2 else rigid[-1, 1]
        lower = cw.weyl_lower_bound(exact, partner)
        mesh = pinned_fe[j] / exact - 1.0
        check(f"EB shaft map, kappa = {KAPPA1[-1]:g}: mode {n} critical vs pinned-pinned (rad/s)",
              BLEVINS + "; bounds " + WEYL + " and FE mesh", exact, w,
              max(1.0 - lower / exact, mesh))
        assert lower <= w <= pinned_fe[j] * (1 + 1e-12)
        # against the closed form; the constant mesh offset cancels in the
        # differences (roundoff at this end: eps times the modest condition)
        err = 1.0 - forward[-3:, j] / exact
        check(f"EB shaft map, stiff end: mode {n} error ~ kappa^p, p from kappa = "
              f"{KAPPA1[-3]:.3g}..{KAPPA1[-1]:g}", FIRST_ORDER, -1.0,
              decay_exponent(KAPPA1[-3:], err), trend_tolerance(KAPPA1[-3:], err, EPS * 1e3),
              kind="abs")
        slope = (err[0] - err[2]) / (1.0 / KAPPA1[-3] - 1.0 / KAPPA1[-1])
        tol = NEXT_TERM * first_order_size(KAPPA1[-3:], err)
        check(f"EB shaft map, stiff end: mode {n} first-order coefficient of 1 - w/w_pp in "
              f"1/kappa", FIRST_ORDER, cw.stiff_end_coefficient(n), slope, tol)


def test_first_order_coefficients_self_check():
    """The coefficients computed by polynomial integration, against their
    values by hand (closed_forms_whatif, section 2)."""
    assert cw.soft_end_coefficient("bounce") == pytest.approx(1.0 / 120.0, rel=1e-12)
    assert cw.soft_end_coefficient("rocking") == pytest.approx(1.0 / 840.0, rel=1e-12)
    assert cw.stiff_end_coefficient(2) == pytest.approx(8.0 * math.pi**2, rel=1e-15)


# ---------------------------------------------------------------------------
# 1b. Map of a thick spinning Rayleigh shaft: gyroscopic asymptotes
# ---------------------------------------------------------------------------

#: Same shaft and mesh as test_beams.py case 3 (L/D = 3): the rotary and
#: polar inertia move the rigid rocking critical by 8.7 % and the pinned
#: forward criticals by 3.6 % (n = 1) to 17 % (n = 3).
L3, D3, N3 = 0.6, 0.2, 12
KAPPA3 = np.logspace(-2, 6, 25)
#: Mesh error bounds of the FE pinned forward criticals (12 elements).
#: Modes 1-2: the bounds of test_beams.py case 3 for the same shaft and mesh
#: (measured there 3.25e-6 and 5.19e-5, and here the same); mode 3 is not
#: covered there: measured here 2.58e-4 when written.
RAY_PINNED_TOL = {1: 4.5e-6, 2: 7e-5, 3: 4e-4}


def rayleigh_pinned_fe(rotor, n_modes):
    """Forward synchronous criticals of the FE shaft on exact pins.

    An independent small solve of K phi = W^2 (M - i G) phi with the end
    x, y deleted, each mode's whirl from its node orbits.
    """
    system = assemble(rotor)
    last = system.mesh.station_nodes[-1]
    keep = np.setdiff1d(np.arange(system.n_dof), [0, 1, 4 * last, 4 * last + 1])
    kk = system.shaft_stiffness.toarray()[np.ix_(keep, keep)]
    hh = (system.mass - 1j * system.gyroscopic).toarray()[np.ix_(keep, keep)]
    values, vectors = la.eig(kk, hh)
    full = np.zeros((system.n_dof, values.size), dtype=complex)
    full[keep] = vectors
    t = system.translation_dofs
    shapes = np.stack([full[t[:, 0]].T, full[t[:, 1]].T], axis=-1)
    good = np.isfinite(values) & (values.real > 0) & (forward_fraction(shapes) > 0.95)
    return np.sort(np.sqrt(values.real[good]))[:n_modes]


def richardson(r_out, r_in, ratio):
    """Limit of R = 1 + c kappa (soft end) or 1 + c / kappa (stiff end) from two
    points a factor ``ratio`` > 1 apart in kappa; ``r_out`` is the one nearer
    the limit (smaller kappa at the soft end, larger at the stiff end)."""
    return r_out + (r_out - r_in) / (ratio - 1.0)


def test_map_asymptotes_rayleigh_gyroscopic():
    area, second = section(D3)
    ei, mass = E * second, RHO * area * L3
    rotor = uniform_shaft(L3, D3, N3, theory="rayleigh",
                          bearings=[isotropic(0, 1e8), isotropic(1, 1e8)])
    k = KAPPA3 * ei / L3**3
    speeds = critical_speed_map(rotor, stiffness=k, mode_count=4).speeds
    ratio = KAPPA3[1] / KAPPA3[0]

    # --- soft end: rigid rotor with Id = m L^2/12 + rho I L, Ip = 2 rho I L
    i_d = mass * L3**2 / 12.0 + RHO * second * L3
    i_p = 2.0 * RHO * second * L3
    floor = roundoff_floor(KAPPA3[0], N3)
    for j, name in enumerate(("bounce", "rocking")):
        def rigid(kk, ip):
            return cf.rigid_rotor_critical(mass, i_d, ip, kk, kk, L3 / 2, L3 / 2)[j]
        exact = np.array([rigid(kk, i_p) for kk in k[:3]])
        ratio_w = speeds[:3, j] / exact
        limit = richardson(ratio_w[0], ratio_w[1], ratio) * exact[0]
        tol = richardson_tolerance(ratio_w[0], ratio_w[1], ratio, floor)
        check(f"Rayleigh shaft map, soft end: {name} forward critical, limit k -> 0 of w/w_rigid "
              f"(kappa = {KAPPA3[0]:g}, {KAPPA3[1]:.3g}) (rad/s)", RIGID, exact[0], limit, tol)
        # the gyroscopic (Ip) term is resolved: without it the limit would differ
        no_ip = rigid(k[0], 0.0)
        if name == "rocking":
            assert abs(limit / no_ip - 1.0) > 1e3 * tol
        check(f"Rayleigh shaft map, soft end: {name} error ~ kappa^p, p from kappa = "
              f"{KAPPA3[0]:g}..{KAPPA3[2]:.3g}", "rigid-rotor asymptote, series flexibility",
              1.0, decay_exponent(KAPPA3[:3], 1.0 - ratio_w),
              trend_tolerance(KAPPA3[:3], 1.0 - ratio_w, floor), kind="abs")

    # --- stiff end: forward synchronous criticals of the pinned Rayleigh shaft
    pinned_fe = rayleigh_pinned_fe(rotor, 3)
    for n in (1, 2, 3):
        j = n - 1
        exact = cf.rayleigh_spinning_ss_critical(E, second, RHO, area, L3, n, "forward")
        check(f"Rayleigh shaft, {N3} el., exact pins: mode {n} forward 1X critical (rad/s)",
              FRISWELL_SHAFT, exact, pinned_fe[j], RAY_PINNED_TOL[n])
        ratio_w = speeds[-3:, j] / exact
        limit = richardson(ratio_w[2], ratio_w[1], ratio) * exact
        # the map must tend to the FE shaft's own pinned critical
        check(f"Rayleigh shaft map, stiff end: mode {n} forward critical, limit k -> inf "
              f"(kappa = {KAPPA3[-2]:.3g}, {KAPPA3[-1]:g}) vs the FE shaft on exact pins (rad/s)",
              "pinned asymptote, support compliance", pinned_fe[j], limit,
              richardson_tolerance(ratio_w[2], ratio_w[1], ratio, EPS * 1e3))
        check(f"Rayleigh shaft map, stiff end: mode {n} error ~ kappa^p, p from kappa = "
              f"{KAPPA3[-3]:.3g}..{KAPPA3[-1]:g}", "pinned asymptote, support compliance",
              -1.0, decay_exponent(KAPPA3[-3:], 1.0 - ratio_w),
              trend_tolerance(KAPPA3[-3:], 1.0 - ratio_w, EPS * 1e3), kind="abs")


# ---------------------------------------------------------------------------
# 2. Jeffcott rotor on flexible supports: the whole stiffness range
# ---------------------------------------------------------------------------

LJ, DJ, MJ = 1.0, 0.05, 20.0        # as test_disk_rotors.py case 4


def jeffcott(bearings, operating=OperatingRange(100.0, 200.0), rule=None, judge_backward=False,
             speed_to=None):
    return disk_at_mid_span(MJ, bearings, span=LJ, diameter=DJ, elements=1,
                            material=LIGHT, operating=operating, mode_count=4, speed_count=21,
                            speed_to=speed_to, margin_rule=rule or MarginRule(),
                            judge_backward=judge_backward)


def k_shaft():
    return cf.simply_supported_midspan_stiffness(E, section(DJ)[1], LJ)


def shaft_bound():
    """Relative bound m_s / m: the light shaft adds at most its own mass to the
    disk's kinetic energy (test_disk_rotors.py), halved in the frequency; a
    factor 2 margin."""
    return RHO * 1e-6 * section(DJ)[0] * LJ / MJ


def test_map_jeffcott_series_springs():
    ks = k_shaft()
    ratio = np.logspace(-3, 3, 25)            # k / k_shaft over six decades
    rotor = jeffcott([isotropic(0, 1e6), isotropic(2, 1e6)])
    exact = np.array([cf.jeffcott_critical_flexible_supports(ks, kb, MJ) for kb in ratio * ks])
    for whirl in ("forward", "backward"):
        w = critical_speed_map(rotor, stiffness=ratio * ks, mode_count=1, whirl=whirl).speeds[:, 0]
        err = w / exact - 1.0
        # the shaft's mass can only lower the critical
        assert np.all(err <= 1e-10)
        if whirl == "forward":
            for i in range(0, ratio.size, 4):   # every decade
                check(f"Jeffcott map, k = {ratio[i]:g} k_shaft: forward critical (rad/s)",
                      SERIES, exact[i], w[i], shaft_bound())
        check(f"Jeffcott map, k = 1e-3..1e3 k_shaft (25 points): max rel. error, {whirl}",
              SERIES, 0.0, np.max(np.abs(err)), shaft_bound(), kind="abs")


# ---------------------------------------------------------------------------
# 3. Sensitivities of a Jeffcott critical
# ---------------------------------------------------------------------------

KB = 2.0e6      # each bearing; the bearings hold 44 % of the flexibility
STEP = 0.01     # the default step of sensitivities()


def fd_exact(f, h):
    """Central difference (f(1+h) - f(1-h)) / (2 h f(1)) of a closed form."""
    return (f(1.0 + h) - f(1.0 - h)) / (2.0 * h * f(1.0))


@pytest.mark.parametrize("c_bearing", [0.0, 200.0])
def test_sensitivities_jeffcott(c_bearing):
    ks = k_shaft()
    # judge_backward: the critical is a degenerate forward/backward pair
    # (no gyroscopic coupling); judging both makes sensitivities() difference
    # each member, and the two must agree.
    rotor = jeffcott([isotropic(0, KB, c_bearing), isotropic(2, KB, c_bearing)],
                     judge_backward=True, speed_to=600.0)
    crits = screen(rotor).criticals
    check(f"Jeffcott sensitivities, c = {c_bearing:g}: 1X criticals found (x/y pair)",
          "isotropic Jeffcott: one degenerate pair", 2, len(crits), 0, kind="equal")
    result = sensitivities(rotor, crits, step=STEP)
    values = {}
    for s in result:
        values.setdefault(s.parameter, []).append((s.value, s.check))
    assert sorted(values) == ["bearing[0] kxx, kyy", "bearing[1] kxx, kyy", "disk[0] mass"]
    # the two members of the pair are one mode: same sensitivities
    for pair in values.values():
        assert abs(pair[0][0] - pair[1][0]) <= 1e-6

    bound = shaft_bound()
    if c_bearing == 0.0:
        def w_of(k1=KB, k2=KB, m=MJ):
            return cw.jeffcott_critical_two_bearings(ks, k1, k2, m)
        exact = {"bearing[0] kxx, kyy": (cw.jeffcott_bearing_sensitivity(ks, KB, KB, 1),
                                         lambda x: w_of(k1=KB * x)),
                 "bearing[1] kxx, kyy": (cw.jeffcott_bearing_sensitivity(ks, KB, KB, 2),
                                         lambda x: w_of(k2=KB * x)),
                 "disk[0] mass": (cw.JEFFCOTT_DISK_MASS_SENSITIVITY, lambda x: w_of(m=MJ * x))}
        rich = {}
        for name, (derivative, func) in exact.items():
            value, half = values[name][0]
            # each difference against the closed form's own central
            # difference with the same step (same O(h^2) truncation)
            for h, got in ((STEP, value), (STEP / 2, half)):
                check(f"Jeffcott undamped: sensitivity to {name}, step {h:g}, vs the closed "
                      f"form's central difference (exact derivative {derivative:.10g})", SENS,
                      fd_exact(func, h), got, bound, kind="abs")
            # Richardson removes the h^2 term; the closed form's own residual
            # (O(h^4)) is added to the bound
            rich[name] = (4.0 * half - value) / 3.0
            rich_exact = (4.0 * fd_exact(func, STEP / 2) - fd_exact(func, STEP)) / 3.0
            check(f"Jeffcott undamped: sensitivity to {name}, Richardson of steps {STEP:g} and "
                  f"{STEP / 2:g}, vs the exact derivative", SENS, derivative, rich[name],
                  abs(rich_exact - derivative) + bound, kind="abs")
        both = rich["bearing[0] kxx, kyy"] + rich["bearing[1] kxx, kyy"]
        k_eff = cf.series_stiffness_two_bearings(ks, KB)
        check("Jeffcott undamped: sum of the two bearing sensitivities (Richardson) vs "
              "(1/2) k_eff/(2k)", SENS, 0.5 * k_eff / (2.0 * KB), both, 2.0 * bound, kind="abs")
    else:
        d_k, d_m = cw.jeffcott_damped_sensitivities(ks, KB, c_bearing, MJ)
        undamped_k = cw.jeffcott_bearing_sensitivity(ks, KB, KB, 1)
        exact = {"bearing[0] kxx, kyy": d_k / 2.0, "bearing[1] kxx, kyy": d_k / 2.0,
                 "disk[0] mass": d_m}
        for name, derivative in exact.items():
            value, half = values[name][0]
            rich = (4.0 * half - value) / 3.0
            # Richardson leaves O(h^4) = 1e-8 (coefficient of order one: the
            # undamped case measures 1e-9), plus the shaft's mass
            check(f"Jeffcott, bearings c = {c_bearing:g} N s/m: sensitivity to {name}, "
                  f"Richardson of steps {STEP:g} and {STEP / 2:g}", SENS + " (damped)",
                  derivative, rich, STEP**4 + bound, kind="abs")
        # the damped value is resolved: it differs from the undamped one by
        # far more than the tolerance
        assert abs(d_k / 2.0 - undamped_k) > 20.0 * (STEP**4 + bound)


@pytest.mark.parametrize("c_bearing", [0.0, 200.0])
def test_derivative_sensitivities_jeffcott(c_bearing):
    """The levers from eigenvalue derivatives (left and right eigenvectors) against the
    closed-form derivatives of the same Jeffcott critical: no step, so no truncation; the
    bound is the shaft's mass alone."""
    ks = k_shaft()
    rotor = jeffcott([isotropic(0, KB, c_bearing), isotropic(2, KB, c_bearing)],
                     judge_backward=True, speed_to=600.0)
    crits = screen(rotor).criticals
    values = {}
    for s in derivative_sensitivities(rotor, crits):
        assert s.method == "derivative" and s.check is None
        values.setdefault(s.parameter, []).append(s.value)
    if c_bearing == 0.0:
        exact = {"bearing[0] kxx, kyy": cw.jeffcott_bearing_sensitivity(ks, KB, KB, 1),
                 "bearing[1] kxx, kyy": cw.jeffcott_bearing_sensitivity(ks, KB, KB, 2),
                 "disk[0] mass": cw.JEFFCOTT_DISK_MASS_SENSITIVITY}
    else:
        d_k, d_m = cw.jeffcott_damped_sensitivities(ks, KB, c_bearing, MJ)
        exact = {"bearing[0] kxx, kyy": d_k / 2.0, "bearing[1] kxx, kyy": d_k / 2.0,
                 "disk[0] mass": d_m}
    for name, derivative in exact.items():
        for got in values[name]:   # both members of the degenerate pair
            check(f"Jeffcott, bearings c = {c_bearing:g} N s/m: sensitivity to {name} from the "
                  "eigenvalue derivative", SENS, derivative, got, shaft_bound(), kind="abs")


@pytest.mark.parametrize("case", ["feed_pump", "compressor", "feed_pump_sleeve"])
def test_derivative_levers_agree_with_central_differences(case):
    """On the bundled cases (speed-dependent bearings, gyroscopics; the sleeve-bearing pump's
    bearings from their geometry): the derivatives against the central differences,
    Richardson-extrapolated from steps 1 % and 0.5 % (error O(h^4), about 1e-8 here).  The
    sleeve pump's disk-mass levers are differences by design (a heavier disk re-loads the
    films): one is held to being a difference whose two steps agree within 5 % (each step
    tabulates the films afresh; the tables are smoothed fits about 1 % apart,
    docs/bearings.md), not differenced a second time."""
    from rotorcalc.analysis.levers import _difference, lever_criticals, parameters
    rotor = read_rotor(ROOT / "cases" / f"{case}.toml")
    crits = screen(rotor).criticals
    every = case == "feed_pump_sleeve"   # its criticals are critically damped: need no margin
    films = any(b.film is not None for b in rotor.bearings)
    paths = dict(parameters(rotor))
    derived = [p for p in paths.values() if not (films and p.startswith("disk"))]
    got = derivative_sensitivities(rotor, crits, every=every, paths=derived)
    assert len(got) == len(lever_criticals(rotor, crits, every=every)) * len(derived) > 0
    for s in got:
        assert s.method == "derivative"
        ref = _difference(rotor, s.critical, s.parameter, paths[s.parameter], 0.01)
        check(f"{case}: lever {s.parameter} on the {s.critical.speed * 30 / math.pi:.0f} rpm "
              "critical, derivative vs central differences", "central differences of the "
              "full screening (Richardson, steps 1 % and 0.5 %)",
              (4.0 * ref.check - ref.value) / 3.0, s.value, 2e-5, kind="abs")
    if films:
        disk = next(p for p in paths.values() if p.startswith("disk"))
        one = lever_criticals(rotor, crits, every=True)[:1]
        first = derivative_sensitivities(rotor, one, every=True, paths=[disk])
        assert [s.method for s in first] == ["difference"]
        assert first[0].value == pytest.approx(first[0].check, rel=0.05, abs=1e-5)


def test_damped_sensitivity_limit_self_check():
    """closed_forms_whatif: the damped derivatives tend to the undamped ones."""
    ks = k_shaft()
    d_k, d_m = cw.jeffcott_damped_sensitivities(ks, KB, 1e-6, MJ)
    assert d_k == pytest.approx(2.0 * cw.jeffcott_bearing_sensitivity(ks, KB, KB, 1), rel=1e-9)
    assert d_m == pytest.approx(-0.5, rel=1e-9)


def test_isotropic_jeffcott_critical_is_judged():
    """An isotropic Jeffcott rotor has one degenerate forward/backward pair: it
    must be listed as one forward and one backward critical (not two
    'backward' ones chosen by roundoff, which were 'not judged' and let a
    critical inside the operating range pass; fixed by the split of
    degenerate pairs in rotorcalc/analysis/circular.py)."""
    rotor = jeffcott([isotropic(0, KB, 200.0), isotropic(2, KB, 200.0)],
                     operating=OperatingRange(250.0, 350.0))
    result = screen(rotor)
    whirls = "/".join(sorted(row.critical.whirl for row in result.margins.rows))
    check("Isotropic Jeffcott: whirl labels of the degenerate 1X pair",
          "no gyroscopic coupling: one forward, one backward circle (theory)",
          "backward/forward", whirls, 0, kind="equal")
    # the forward critical (about 296 rad/s) lies inside 250-350 rad/s
    check("Isotropic Jeffcott, critical inside the operating range: screening passes",
          "margin rule (theory)", False, result.passed, 0, kind="equal")


# ---------------------------------------------------------------------------
# 4. Stiffness window of a lightly damped Jeffcott rotor on anisotropic bearings
# ---------------------------------------------------------------------------

KX, KY, CW = 1.0e6, 4.0e6, 500.0           # each bearing, N/m and N s/m
N_MIN, N_MC = 290.0, 295.0                 # operating range, rad/s
BELOW, ABOVE = 10.0, 10.0                  # fixed margin rule, per cent
RTOL = 1e-6                                # in ln(factor)


@pytest.mark.slow
def test_stiffness_window_jeffcott():
    """The x-direction critical (about 247 rad/s) lies below the range, the
    y-direction one (about 335 rad/s) above it.  Stiffening the bearings lifts
    the lower critical to N_min (1 - 10 %): the high end; softening them
    lowers the upper critical to N_mc (1 + 10 %): the low end."""
    ks = k_shaft()

    def bearing(station):
        return Bearing(station, {"kxx": (KX,), "kyy": (KY,), "cxx": (CW,), "cyy": (CW,)})

    rotor = jeffcott([bearing(0), bearing(2)], operating=OperatingRange(N_MIN, N_MC),
                     rule=MarginRule(name="fixed", margin_below=BELOW, margin_above=ABOVE))
    window = stiffness_window(rotor, points=5, rtol=RTOL)
    check("Jeffcott window: base rotor keeps the margins", WINDOW, True, window.base_passes, 0,
          kind="equal")
    ends = (("low", window.low, KY, N_MC * (1 + ABOVE / 100), "y"),
            ("high", window.high, KX, N_MIN * (1 - BELOW / 100), "x"))
    for label, end, kb, target, direction in ends:
        assert end.factor is not None and end.limiting is not None
        undamped = cw.jeffcott_factor_for_speed(ks, kb, MJ, target)
        damped = cw.jeffcott_damped_factor_for_speed(ks, kb, CW, MJ, target)
        # d ln w / d ln factor at the end (both bearings): converts the
        # speed errors into factor errors
        share = 2.0 * cw.jeffcott_bearing_sensitivity(ks, kb * damped, kb * damped, 1)
        solver = (shaft_bound() + 10.0 * SPEED_RTOL) / share
        # Brent on ln(factor) stops within xtol = rtol of the root
        tol = 1.5 * RTOL + solver
        # (the undamped algebraic factor is named in the row: light damping
        # moves it by a few 1e-3, several hundred times this tolerance)
        check(f"Jeffcott window, {label} end: factor vs damped closed-form bracket (undamped "
              f"{undamped:.6g}, damping shifts it by {damped / undamped - 1:+.2e})", WINDOW,
              damped, end.factor, tol)
        assert abs(damped / undamped - 1.0) > 100.0 * tol
        # the limiting critical, evaluated just outside the window (factor
        # (1 -+ 2 rtol)), sits at the required margin
        check(f"Jeffcott window, {label} end: limiting critical speed (rad/s)", WINDOW,
              target, end.limiting.speed, 3.0 * RTOL * share + shaft_bound() + 10.0 * SPEED_RTOL)
        x, y = np.abs(end.limiting.shape).max(axis=0)
        check(f"Jeffcott window, {label} end: limiting critical's direction", WINDOW,
              direction, "x" if x > y else "y", 0, kind="equal")
