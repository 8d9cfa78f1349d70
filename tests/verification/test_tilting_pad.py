"""Tilting-pad journal bearings (rotorcalc.bearings.tilting_pad) against references outside the
model: the fixed-arc film it is built on, closed forms, symmetry and an independent numerical
route.  Conventions as in the package: x horizontal, y up, angles from +x towards +y, the
journal turning from +x towards +y at positive speed; loads act on the journal.

1. Locked pad = fixed arc.  A pad at zero tilt is a land of the same arc, clearance and centre
   of curvature (``m C_p`` from the bearing centre, opposite the pivot): the film solver run on
   the pad and on ``lobe(...)`` must give the same force to roundoff.  A tilted pad must be the
   first-order expansion of the pad turned rigidly about its pivot (its arc's centre carried
   round the pivot by the exact rotation): the difference falls as the square of the tilt
   (Taylor's theorem; order 2).
2. A ring of locked pads and the plain bore.  Eight unpreloaded pads of 44 degrees with
   1-degree gaps at zero pressure are the plain bore with eight 1-degree axial grooves (same
   solver: roundoff).  Against the 360-degree plain bore they carry far less at moderate L/D
   (measured at L/D = 1/2: 36 %; every gap forces the pressure back to zero), so the check
   is the limit where that loss vanishes: in the short-bearing (Ocvirk) film the pressure at
   an angle depends on the film there only, so as L/D -> 0 the ring carries the short-bearing
   load integrated over the pads' arcs.  Each gap costs pressure within about a length L of
   its edges, a shortfall proportional to L/D: the ratio at L/D = 1/8 and 1/16, extrapolated
   linearly to L/D = 0, must meet the Ocvirk ratio (half-Sommerfeld film; short-bearing
   pressure ``p = 3 mu G (z^2 - L^2/4) / h^3`` as derived in tests/verification/test_film.py;
   F. W. Ocvirk, NACA TN 2808, 1952, from memory), and the shortfall must halve with L/D.
3. Pads passing force along their pivot lines.  With a pad free to tilt, a journal motion
   across its pivot line changes its film exactly as its tilt does (``lever delta_k`` and
   ``x . t_k`` enter ``h_k`` together), so without pad inertia each pad adds ``z_k e_k e_k^T``
   to the reduced impedance: with rigid pivots and the load on a symmetry axis of the layout
   the reduced kxy, kyx vanish (derived in the module; the classic property of tilting pads,
   J. W. Lund, ASLE Trans. 7, 1964, from memory).  The reduction at w -> 0 must meet the
   static condensation (R. J. Guyan, AIAA J. 3, 1965, from memory) computed here from the
   full matrices, and its damping limit ``C_jj - C_jp G - H C_pj + H C_pp G`` (first-order
   Taylor term of the reduced impedance, derived).
4. Load on pad and load between pads, four pads.  (a) Load between pads along -y: the pads
   at -45 and 225 degrees are mirror images about the load line and carry equal shares, the
   upper two likewise, and each acts along its pivot line, so K = (k_lower + k_upper) I:
   kxx = kyy, cxx = cyy, no cross terms.  (b) Load on pad along -y: the side pads' lines are
   x, the others' y: no cross terms (kxx != kyy).  (c) The load-between-pads bearing is the
   load-on-pad bearing turned by +45 degrees: under the load turned likewise (load-on-pad
   bearing loaded at -135 degrees) its matrices, turned by +45 degrees (``Q K Q^T``), must be
   the load-between-pads matrices (rotational symmetry of the whole problem).
5. An independent route to the static stiffness: move the journal by +-d from its
   equilibrium, settle every pad anew (full cavitation solve, no held rupture, no reduction
   formula) and difference the film force; compare with the statically condensed K (w = 0).
   Central differences: agreement to O(d^2).
6. The oil a pad draws in (``FilmSolution.inflow``, the per-pad heat balance's flow).  (a) A
   uniform film (no preload, journal centred, no tilt) has no pressure: the flow across the
   leading edge is the Couette flow ``U C_p L / 2`` exactly (the shear-driven term of the
   film's volume flow, ``U h / 2`` per unit length; e.g. B. J. Hamrock, Fundamentals of
   Fluid Film Lubrication, 1994, the volume flow rate of Reynolds' equation, from memory).
   (b) Mass conservation of a loaded pad whose film does not rupture: what enters at the
   leading edge leaves at the sides and the trailing edge (outflow computed here from the
   pressures there, one-sided differences), within 1 % (measured 0.22 %).

Screening only: confirm tilting-pad coefficients against the bearing maker's analysis, the
applicable standard, the purchase specification, local codes and a licensed engineer's review.
"""

import math
from functools import lru_cache

import numpy as np
from scipy.integrate import quad

from rotorcalc.bearings import FilmOptions, LobedBore, Land, lobe, plain_bore, solve_film
from rotorcalc.bearings.tilting_pad import (PadRing, first_pivot_angle, pad_coefficients,
                                            settle_pads)
from tests.verification.record import check

D, L, CP, MU, SPEED = 0.1, 0.05, 1.0e-4, 0.02, 300.0
GRID = FilmOptions(72, 12)
LOAD = (0.0, -3000.0)
LOCKED = "Locked pad = a land of the same arc (same solver; geometry.py, lobe())"
TAYLOR = "First-order expansion of the rigid turn of the pad about its pivot (Taylor, derived)"
OCVIRK = ("Short-bearing film (Ocvirk, NACA TN 2808, 1952, from memory), half film, integrated "
          "over the pads' arcs; derived in the module")
GROOVED = "Plain bore with axial grooves at the gaps (same solver)"
ALONG = ("Pads pass force along their pivot lines (derived in the module; cf. Lund, ASLE Trans. "
         "7, 1964, from memory)")
GUYAN = "Static condensation (Guyan, AIAA J. 3, 1965, from memory) of the full matrices"
SYMMETRY = "Symmetry of the pad layout and the load (derived in the module)"
RESETTLE = "Journal moved, every pad re-settled, central difference (independent route)"


def turn(angle):
    return np.array([[math.cos(angle), -math.sin(angle)], [math.sin(angle), math.cos(angle)]])


def share(err, ref):
    """Largest entry of ``err`` as a share of the largest entry of ``ref``."""
    return float(np.max(np.abs(err)) / np.max(np.abs(ref)))


@lru_cache(maxsize=None)
def solved(count, between, preload=0.3, offset=0.5, load=LOAD, stiffness=None, inertia=0.0):
    ring = PadRing(D, L, count, math.radians(300.0 / count), CP, preload=preload,
                   pivot_offset=offset, first_pivot=first_pivot_angle(count, between=between),
                   pivot_stiffness=stiffness, pad_inertia=inertia)
    return ring, pad_coefficients(ring, SPEED, load, MU, options=GRID)


# ---- 1. locked pad = fixed arc ------------------------------------------------------------

def test_locked_pad_is_the_fixed_arc():
    ring = PadRing(D, L, 5, math.radians(60.0), CP, preload=0.4, pivot_offset=0.6,
                   first_pivot=math.radians(-80.0))
    position = (0.2 * ring.bearing_clearance, -0.4 * ring.bearing_clearance)
    fixed, pads = [], []
    for k, pivot in enumerate(ring.pivots):
        start = pivot - 0.6 * ring.arc
        arc = lobe(start, start + ring.arc, CP, 0.4, closest_at=pivot, key="pad")
        fixed.append(solve_film(LobedBore(D, L, (arc,)), SPEED, MU, position,
                                options=GRID).force)
        pads.append(solve_film(ring.pad(k), SPEED, MU, position, options=GRID).force)
    check("5 locked pads (preload 0.4, pivot 0.6): largest force difference / largest force",
          LOCKED, 0.0, share(np.subtract(pads, fixed), np.array(fixed)), 1e-12, kind="abs")


def test_tilted_pad_is_the_pad_turned_about_its_pivot():
    """Pad 0 of a centre-pivoted ring, tilted by ``lever delta = 0.1, 0.0125, 0.00625 C_b``.

    Measured: 1.6e-5 of the force at 0.1 C_b; order 1.99 from the two small tilts (1.90 from
    0.2 and 0.1 C_b, where the pad's own film still changes with the tilt).  Tolerances 1e-4
    and 0.05.
    """
    ring = PadRing(D, L, 4, math.radians(70.0), CP, preload=0.5, pad_thickness=0.01)
    position = (0.0, -0.3 * ring.bearing_clearance)
    e, t = np.array([0.0, -1.0]), np.array([1.0, 0.0])     # pad 0's pivot line, at -90 deg
    centre = -0.5 * CP * e
    pivot = centre + ring.lever * e
    errors = []
    for tilt in (0.1, 0.0125, 0.00625):
        delta = tilt * ring.bearing_clearance / ring.lever
        exact = pivot + turn(delta) @ (centre - pivot)
        start = -math.pi / 2 - ring.arc / 2
        land = Land(start, start + ring.arc, CP, tuple(exact))
        fixed = solve_film(LobedBore(D, L, (land,)), SPEED, MU, position, options=GRID).force
        pad = solve_film(ring.pad(0, tilt=delta), SPEED, MU, position, options=GRID).force
        errors.append(share(pad - fixed, fixed))
    check("tilted pad, lever delta = 0.1 C_b: force against the rigid turn", TAYLOR, 0.0,
          errors[0], 1e-4, kind="abs")
    check("tilted pad: order of the difference in the tilt", TAYLOR, 2.0,
          math.log2(errors[1] / errors[2]), 0.05, kind="abs")


# ---- 2. a ring of locked pads and the plain bore -----------------------------------------

def ring_of_eight(length):
    return PadRing(D, length, 8, math.radians(44.0), CP, first_pivot=math.radians(-67.5))


def locked_force(ring, position, options):
    return sum(solve_film(ring.pad(k), SPEED, MU, position, options=options).force
               for k in range(ring.count))


def test_ring_of_locked_pads_is_the_grooved_plain_bore():
    ring, position = ring_of_eight(L), (0.3 * CP, -0.5 * CP)
    gaps = [(math.radians(-45.0 + 45.0 * k), math.radians(1.0)) for k in range(8)]
    bore = plain_bore(D, L, CP, gaps)
    grooved = solve_film(bore, SPEED, MU, position, options=GRID).force
    check("8 locked pads of 44 deg = plain bore with eight 1-deg grooves: force", GROOVED, 0.0,
          share(locked_force(ring, position, GRID) - grooved, grooved), 1e-10, kind="abs")


def short_bearing_share(position, arcs):
    """Ocvirk's load over ``arcs`` as a share of his load over the whole film."""
    x, y = position

    def force(lo, hi):
        def part(theta, comp):
            g = x * math.sin(theta) - y * math.cos(theta)       # the film's wedge term
            h = CP - x * math.cos(theta) - y * math.sin(theta)
            return min(g, 0.0) * (math.cos(theta), math.sin(theta))[comp] / h**3
        return np.array([quad(part, lo, hi, args=(c,), limit=200)[0] for c in (0, 1)])
    return float(np.hypot(*sum(force(*a) for a in arcs)) / np.hypot(*force(0.0, 2 * math.pi)))


def test_ring_of_locked_pads_approaches_the_plain_bore_as_the_bearing_shortens():
    """eps = 0.5 along -y; half-Sommerfeld film; 88 x 12 a pad, 704 x 12 the plain bore.

    Measured: ratio 0.799 at L/D = 1/8, 0.889 at 1/16, extrapolated 0.9788 against Ocvirk's
    0.9800 (0.12 %); the shortfall ratio 1.99 (order 0.99).  Tolerances: 0.5 % (the
    extrapolation drops the O((L/D)^2) term) and 0.1 in the order.
    """
    position, half = (0.0, -0.5 * CP), "half-sommerfeld"
    ratios = []
    for ratio in (1 / 8, 1 / 16):
        ring = ring_of_eight(ratio * D)
        pads = locked_force(ring, position, FilmOptions(88, 12, cavitation=half))
        plain = solve_film(plain_bore(D, ratio * D, CP), SPEED, MU, position,
                           options=FilmOptions(704, 12, cavitation=half)).force
        ratios.append(float(np.hypot(*pads) / np.hypot(*plain)))
    ring = ring_of_eight(D / 8)
    limit = short_bearing_share(position, [(p - ring.arc / 2, p + ring.arc / 2)
                                           for p in ring.pivots])
    check("8 locked pads / plain bore, extrapolated to L/D -> 0", OCVIRK, limit,
          2 * ratios[1] - ratios[0], 5e-3)
    check("8 locked pads / plain bore: order of the shortfall in L/D", OCVIRK, 1.0,
          math.log2((limit - ratios[0]) / (limit - ratios[1])), 0.1, kind="abs")


# ---- 3. no cross-coupling; the reduction at w -> 0 -----------------------------------------

def test_centre_pivoted_pads_have_no_cross_coupled_stiffness():
    """Five centre-pivoted pads, rigid pivots, no pad inertia, load between pads and on pad.

    Measured: cross terms up to 8e-8 (K) and 2e-7 (C) of the direct ones, synchronous and
    static: the finite-difference truncation (the step change on halving is about 1e-6 of K)
    and the equilibrium tolerance; tolerance 1e-5.
    """
    for between in (True, False):
        _, result = solved(5, between)
        layout = "between pads" if between else "on pad"
        for name, (k, c) in (("synchronous", (result.stiffness, result.damping)),
                             ("static", result.reduce(0.0))):
            for what, mat in (("k", k), ("c", c)):
                check(f"5 centre-pivoted pads, load {layout}, {name}: {what}xy, {what}yx / "
                      f"direct", ALONG, 0.0, share(mat - np.diag(np.diag(mat)), mat), 1e-5,
                      kind="abs")


def test_reduction_at_vanishing_whirl_is_the_static_condensation():
    """Load between pads (the top pad carries no film and is left out, as the model does).
    Measured: 4e-13 (K) and 6e-13 (C), the O(w^2) term; tolerance 1e-9."""
    _, result = solved(5, True)
    carried = [2 + k for k, f in enumerate(result.equilibrium.pad_forces) if np.any(f)]
    assert len(carried) == 4
    keep = np.r_[0, 1, carried]
    k, c = (m[np.ix_(keep, keep)] for m in (result.full_stiffness, result.full_damping))
    j, p = slice(0, 2), slice(2, None)
    g = np.linalg.solve(k[p, p], k[p, j])
    h = np.linalg.solve(k[p, p].T, k[j, p].T).T
    k_static = k[j, j] - k[j, p] @ g
    c_static = c[j, j] - c[j, p] @ g - h @ c[p, j] + h @ c[p, p] @ g
    k_slow, c_slow = result.reduce(1e-6 * SPEED)
    check("5 pads: K reduced at w = 1e-6 speed vs static condensation", GUYAN, 0.0,
          share(k_slow - k_static, k_static), 1e-9, kind="abs")
    check("5 pads: C reduced at w = 1e-6 speed vs its w -> 0 limit", GUYAN, 0.0,
          share(c_slow - c_static, c_static), 1e-9, kind="abs")


# ---- 4. load on pad and load between pads ------------------------------------------------

def test_four_pads_load_between_and_on_pad_as_symmetry_requires():
    """Measured: up to 1.2e-7 in (a) and (b), 4.2e-7 in (c); tolerance 1e-5.  The two
    bearings of (c) are perturbed along different axes, so their finite-difference
    truncation (the step change on halving, about 1e-6 of K) differs."""
    _, between = solved(4, True)
    _, on_pad = solved(4, False)
    for name, mat in (("K", between.stiffness), ("C", between.damping)):
        check(f"4 pads, load between pads: {name}xx = {name}yy", SYMMETRY, 0.0,
              (mat[0, 0] - mat[1, 1]) / mat[1, 1], 1e-5, kind="abs")
        check(f"4 pads, load between pads: {name} cross terms / direct", SYMMETRY, 0.0,
              share(mat - np.diag(np.diag(mat)), mat), 1e-5, kind="abs")
    for name, mat in (("K", on_pad.stiffness), ("C", on_pad.damping)):
        check(f"4 pads, load on pad: {name} cross terms / direct", SYMMETRY, 0.0,
              share(mat - np.diag(np.diag(mat)), mat), 1e-5, kind="abs")
    q = turn(math.pi / 4)
    _, turned = solved(4, False, load=tuple(turn(-math.pi / 4) @ LOAD))
    for name, mat, ref in (("K", turned.stiffness, between.stiffness),
                           ("C", turned.damping, between.damping)):
        check(f"4 pads: load-on-pad bearing under the load turned by -45 deg, {name} turned "
              f"by +45 deg = load between pads", SYMMETRY, 0.0, share(q @ mat @ q.T - ref, ref),
              1e-5, kind="abs")


# ---- 5. an independent route to the static stiffness ------------------------------------

def resettled_stiffness(ring, eq, d):
    k = np.empty((2, 2))
    for j in range(2):
        move = np.zeros(2)
        move[j] = d
        loads = [settle_pads(ring, SPEED, MU, eq.position + s * move, options=GRID).load
                 for s in (1.0, -1.0)]
        k[:, j] = (loads[0] - loads[1]) / (2 * d)     # the load carried is -F
    return k


def test_static_stiffness_by_resettling_the_pads():
    """Five pads (rigid pivots) and four pads with offset pivots on yielding pivots
    (1e8 N/m); d = 1e-3 of the minimum film.  Measured: 9.3e-7 and 1.0e-7, falling as d^2
    (1e-4 at d = 1e-2, measured); tolerance 1e-5."""
    cases = (("5 pads, load between pads, rigid pivots", solved(5, True)),
             ("4 pads, pivot offset 0.6, pivot stiffness 1e8 N/m",
              solved(4, True, offset=0.6, stiffness=1e8)))
    for name, (ring, result) in cases:
        eq = result.equilibrium
        k_static = result.reduce(0.0)[0]
        k = resettled_stiffness(ring, eq, 1e-3 * eq.min_thickness)
        check(f"{name}: K by moving the journal and re-settling the pads", RESETTLE, 0.0,
              share(k - k_static, k_static), 1e-5, kind="abs")


# ---- 6. the oil a pad draws in -----------------------------------------------------------

COUETTE = ("Couette flow U h / 2 per unit length (Hamrock, Fundamentals of Fluid Film "
           "Lubrication, 1994, from memory)")
CONTINUITY = "Mass conservation: inflow = side leakage + trailing-edge outflow (derived)"


def test_a_uniform_film_draws_in_the_couette_flow():
    ring = PadRing(D, L, 5, math.radians(60.0), CP, preload=0.0)
    for speed in (SPEED, -SPEED):
        film = solve_film(ring.pad(0), speed, MU, (0.0, 0.0), options=GRID)
        check(f"uniform pad film at {speed:+.0f} rad/s: inflow", COUETTE,
              abs(speed) * 0.5 * D * CP * L / 2.0, film.inflow, 1e-12)


def test_a_loaded_pad_conserves_its_oil():
    ring = PadRing(D, L, 5, math.radians(60.0), CP, preload=0.0)
    pad = ring.pad(0)             # from -120 to -60 degrees; no preload: a converging film
    at = 0.4 * CP * np.array([math.cos(math.radians(-60.0)), math.sin(math.radians(-60.0))])
    film = solve_film(pad, SPEED, MU, at, options=GRID)    # towards the trailing edge
    assert not np.any(film.cavitated[0])            # a full film: Reynolds conserves mass
    p, theta, r = film.pressure[0], film.theta[0], 0.5 * D
    h = pad.lands[0].thickness(theta, *at)
    dtheta = theta[1] - theta[0]
    dpdt = (3.0 * p[-1] - 4.0 * p[-2] + p[-3]) / (2.0 * dtheta)
    u = SPEED * r
    flux = u * h[-1] / 2.0 - h[-1] ** 3 / (12.0 * MU * r) * dpdt
    dz = film.z[1] - film.z[0]
    weights = np.full(film.z.size, dz)
    weights[[0, -1]] = 0.5 * dz
    out = film.side_leakage + 2.0 * float(np.sum(flux * weights))
    check("loaded pad (no preload, journal 0.4 C_p towards its trailing edge): inflow "
          "against the flow out",
          CONTINUITY, out, film.inflow, 0.01)
