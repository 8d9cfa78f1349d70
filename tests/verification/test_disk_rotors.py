"""Verification: disk rotors against lumped closed forms.

Cases 4-7 of the verification plan:

4. Jeffcott rotor on rigid, flexible and damped flexible bearings: H. H.
   Jeffcott, "The lateral vibration of loaded shafts in the neighbourhood of
   a whirling speed", Phil. Mag. (6) 37 (1919) 304-314; midspan stiffness
   48 EI / L^3 from W. C. Young, R. G. Budynas, "Roark's Formulas for Stress
   and Strain", 7th ed., 2002; springs in series and the log decrement from
   W. T. Thomson, "Theory of Vibration with Applications"; the damped-support
   model as in M. I. Friswell, J. E. T. Penny, S. D. Garvey, A. W. Lees,
   "Dynamics of Rotating Machines", CUP 2010.
5. Overhung disk on a massless cantilever: Friswell et al. (2010); cantilever
   end load and end couple from Young & Budynas (2002).
6. Rigid rotor on two soft bearings: J. M. Vance, "Rotordynamics of
   Turbomachinery", Wiley, 1988; Friswell et al. (2010).
7. Jeffcott rotor on anisotropic supports, criticals and the backward
   synchronous whirl between them: Friswell et al. (2010); Vance (1988).

Section, chapter and equation numbers are all from memory (see
``docs/theory.md``); the reference values come from ``closed_forms.py``.

The closed forms idealise the shaft as massless (cases 4, 5, 7) or rigid
(case 6).  The model is made to approach that limit: a shaft material with
1e-6 of steel's density (same E), or 1e3-1e4 times steel's E.  Cubic beam
elements reproduce the static deflection under nodal forces and moments
exactly, so the results do not depend on the mesh (checked on two meshes);
the remaining difference is the shaft's own inertia (or flexibility), and
that sets each tolerance:

* light shaft: the shaft can add at most its own mass m_s to the disk's
  kinetic energy (Rayleigh quotient), so |dw/w| <= m_s / (2 m); the bound
  used is m_s / m (factor 2 margin);
* stiff shaft: the error falls as 1/E (bearings in series with a shaft of
  stiffness proportional to E); checked by fitting the exponent.
"""

import math

import numpy as np
import pytest
import scipy.sparse.linalg as spla
from scipy.optimize import brentq

from rotorcalc.analysis.criticals import critical_speeds
from rotorcalc.analysis.modes import forward_fraction, modes_at, whirl_label, whirl_senses
from rotorcalc.analysis.sweep import sweep
from rotorcalc.assembly import assemble
from rotorcalc.model import (Bearing, Disk, Material, OperatingRange, Rotor, Section,
                             Settings)
from tests.conftest import LIGHT, STEEL, disk_at_mid_span, isotropic
from tests.verification import closed_forms as cf
from tests.verification.record import check
from tests.verification.reduce import solve_reduced as _solve_reduced

JEFFCOTT = "Jeffcott 1919; Roark 48EI/L^3 (from memory)"
SERIES = "Jeffcott 1919 + springs in series, Thomson (from memory)"
DAMPED = "Jeffcott on damped bearings, Friswell et al. 2010 (from memory)"
OVERHUNG = "Overhung disk, Friswell et al. 2010; Roark cantilever (from memory)"
RIGID = "Rigid rotor on bearings, Vance 1988; Friswell et al. 2010 (from memory)"
ANISO = "Anisotropic Jeffcott, Friswell et al. 2010; Vance 1988 (from memory)"

E = STEEL.youngs_modulus


def second_moment(d):
    return math.pi * d**4 / 64.0


def shaft_mass(material, d, length):
    return material.density * math.pi * d**2 / 4.0 * length


def solve_reduced(system, fixed, speed, n_modes):
    """Modes with the DOFs ``fixed`` deleted (exact clamp or pin).

    Returns eigenvalues, the full-size displacement vectors (zeros at the
    deleted DOFs) and the forward fraction of each mode computed by the
    package's own orbit classification.
    """
    values, full, _ = _solve_reduced(system, fixed, speed, n_modes)
    t = system.translation_dofs
    shapes = np.stack([full[t[:, 0]].T, full[t[:, 1]].T], axis=-1)
    return values, full, forward_fraction(shapes)


# ---------------------------------------------------------------------------
# Case 4: Jeffcott rotor
# ---------------------------------------------------------------------------

LJ, DJ, MJ = 1.0, 0.05, 20.0        # span (m), shaft diameter (m), disk mass (kg)
KB = 2.0e6                          # bearing stiffness (N/m), of the shaft's order
MESHES_J = (1, 4)                   # elements per half span


def jeffcott(elements, bearings, kx=None):
    return disk_at_mid_span(MJ, bearings, span=LJ, diameter=DJ, elements=elements,
                            mode_count=4)


def jeffcott_bound():
    return shaft_mass(LIGHT, DJ, LJ) / MJ


@pytest.mark.parametrize("elements", MESHES_J)
@pytest.mark.parametrize("support", ["rigid", "flexible"])
def test_jeffcott_undamped(support, elements):
    k_shaft = cf.simply_supported_midspan_stiffness(E, second_moment(DJ), LJ)
    if support == "rigid":
        # pinned ends by deleting x, y of the end nodes (exact, no stiff spring)
        system = assemble(jeffcott(elements, []))
        last = system.mesh.station_nodes[-1]
        values, _, _ = solve_reduced(system, [0, 1, 4 * last, 4 * last + 1], 0.0, 2)
        freq = values.imag
        exact, source = cf.jeffcott_critical_rigid(k_shaft, MJ), JEFFCOTT
    else:
        freq = modes_at(jeffcott(elements, [isotropic(0, KB), isotropic(2, KB)]), 0.0, 2).frequency
        exact, source = cf.jeffcott_critical_flexible_supports(k_shaft, KB, MJ), SERIES
    for k, plane in enumerate(("x", "y")):
        check(f"Jeffcott, {support} supports, {elements} el./half: critical ({plane} plane, "
              f"rad/s)", source, exact, freq[k], jeffcott_bound())
        # the shaft's mass can only lower the frequency
        assert freq[k] <= exact * (1.0 + 1e-10)


@pytest.mark.parametrize("c_bearing", [2.0e3, 2.0e4])
def test_jeffcott_damped_bearings(c_bearing):
    k_shaft = cf.simply_supported_midspan_stiffness(E, second_moment(DJ), LJ)
    roots = cf.jeffcott_damped_bearings_eigenvalues(k_shaft, MJ, KB, c_bearing)
    exact = roots[roots.imag > 0][0]
    exact_dec = cf.log_decrement(exact)
    for elements in MESHES_J:
        rotor = jeffcott(elements, [isotropic(0, KB, c_bearing), isotropic(2, KB, c_bearing)])
        m = modes_at(rotor, 0.0, 2)
        for k, plane in enumerate(("x", "y")):
            check(f"Jeffcott, bearings c = {c_bearing:g} N s/m, {elements} el./half: damped "
                  f"frequency ({plane}, rad/s)", DAMPED, exact.imag, m.frequency[k],
                  jeffcott_bound())
            check(f"Jeffcott, bearings c = {c_bearing:g} N s/m, {elements} el./half: log "
                  f"decrement ({plane})", DAMPED, exact_dec, m.log_dec[k], jeffcott_bound())


# ---------------------------------------------------------------------------
# Case 5: overhung disk on a cantilever (clamped root by matrix reduction)
# ---------------------------------------------------------------------------

LO, DO = 0.5, 0.04
MO, ID_O, IP_O = 15.0, 0.12, 0.22    # disk-like: Ip > Id, so one forward critical
SPEEDS_O = (0.0, 200.0, 1000.0, 3000.0)


def overhung_system(elements):
    rotor = Rotor((Section(LO, DO, LIGHT, elements=elements),), OperatingRange(10.0, 20.0),
                  disks=(Disk(1, MO, IP_O, ID_O),),
                  settings=Settings(beam_theory="euler-bernoulli", mode_count=4))
    return assemble(rotor)


def overhung_modes(system, speed):
    """The four lowest modes with the root node (x, y, a, b) clamped."""
    values, _, fraction = solve_reduced(system, np.arange(4), speed, 4)
    return values.imag, [whirl_label(f) for f in fraction]


@pytest.mark.parametrize("elements", MESHES_J)
def test_overhung_disk_whirl(elements):
    system = overhung_system(elements)
    bound = shaft_mass(LIGHT, DO, LO) / MO
    for speed in SPEEDS_O:
        freq, labels = overhung_modes(system, speed)
        fw, bw = cf.overhung_disk_whirl(E, second_moment(DO), LO, MO, ID_O, IP_O, speed)
        expected = sorted([(w, "forward") for w in fw] + [(w, "backward") for w in bw])
        seen = {"forward": 0, "backward": 0}
        for k, (w, whirl) in enumerate(expected):
            seen[whirl] += 1
            name = f"{whirl} {seen[whirl]}"
            check(f"Overhung disk, {elements} el., {speed:g} rad/s: {name} whirl (rad/s)",
                  OVERHUNG, w, freq[k], bound)
            if speed > 0.0:  # at zero speed each pair is degenerate: no sense
                check(f"Overhung disk, {elements} el., {speed:g} rad/s: {name} whirl label",
                      OVERHUNG, whirl, labels[k], 0, kind="equal")


def test_overhung_disk_critical_speeds():
    """1X criticals: roots of (k-th frequency of a whirl sense) - spin, fresh solves."""
    system = overhung_system(MESHES_J[-1])
    bound = shaft_mass(LIGHT, DO, LO) / MO
    for whirl in ("forward", "backward"):
        exact = cf.overhung_disk_critical(E, second_moment(DO), LO, MO, ID_O, IP_O, whirl)
        for k, target in enumerate(exact):
            def gap(spin, k=k, whirl=whirl):
                freq, labels = overhung_modes(system, spin)
                return freq[[i for i, s in enumerate(labels) if s == whirl][k]] - spin
            root = brentq(gap, 0.8 * target, 1.25 * target, xtol=1e-10 * target)
            check(f"Overhung disk, {MESHES_J[-1]} el.: {whirl} 1X critical {k + 1} (rad/s)",
                  OVERHUNG, target, root, bound)
    # disk-like rotor (Ip > Id): no second forward critical (theory section 6)
    assert len(cf.overhung_disk_critical(E, second_moment(DO), LO, MO, ID_O, IP_O)) == 1


# ---------------------------------------------------------------------------
# Case 6: rigid rotor on soft bearings
# ---------------------------------------------------------------------------

DR = 0.08
SECTIONS_R = ((0.3, 2), (0.5, 3), (0.4, 2))         # (length m, elements)
DISKS_R = ((1, 40.0, 1.6, 0.9), (2, 25.0, 0.8, 0.45))  # (station, m, Ip, Id)
K1, K2 = 2.0e6, 3.5e6                                # bearings at stations 0 and 3
STIFFENING = (1e3, 1e4)                              # shaft E / steel E
SPEEDS_R = (0.0, 300.0, 1500.0)
#: Relative bound at E = 1e4 x steel.  Measured when written: 1.84e-5
#: (largest of the four whirl frequencies at the three speeds).
RIGID_TOL = 2.5e-5


def rigid_rotor(factor):
    material = Material("stiff", STEEL.youngs_modulus * factor, STEEL.shear_modulus * factor,
                        STEEL.density)
    sections = tuple(Section(length, DR, material, elements=n) for length, n in SECTIONS_R)
    disks = tuple(Disk(st, m, ip, idd) for st, m, ip, idd in DISKS_R)
    return Rotor(sections, OperatingRange(10.0, 20.0), disks=disks,
                 bearings=(isotropic(0, K1), isotropic(3, K2)),
                 settings=Settings(beam_theory="timoshenko", mode_count=4))


def rigid_properties():
    """Mass, transverse and polar inertia about the centre of mass, and the
    bearing distances a, b from it, of shaft plus disks (rigid body).

    The shaft's rigid-body inertia (translation m L^2/12 plus rotary rho I L,
    polar 2 rho I L) is reproduced exactly by the consistent mass matrix.
    """
    area, second = math.pi * DR**2 / 4, second_moment(DR)
    length = sum(s[0] for s in SECTIONS_R)
    z_station = np.concatenate([[0.0], np.cumsum([s[0] for s in SECTIONS_R])])
    ms = STEEL.density * area * length
    mass = ms + sum(d[1] for d in DISKS_R)
    zc = (ms * length / 2 + sum(d[1] * z_station[d[0]] for d in DISKS_R)) / mass
    id_c = (ms * length**2 / 12 + STEEL.density * second * length + ms * (length / 2 - zc)**2
            + sum(d[3] + d[1] * (z_station[d[0]] - zc)**2 for d in DISKS_R))
    ip = 2 * STEEL.density * second * length + sum(d[2] for d in DISKS_R)
    return mass, id_c, ip, zc, length - zc


def rigid_expected(speed):
    mass, id_c, ip, a, b = rigid_properties()
    fw, bw = cf.rigid_rotor_whirl(mass, id_c, ip, K1, K2, a, b, speed)
    return sorted([(w, "forward") for w in fw] + [(w, "backward") for w in bw])


def test_rigid_rotor_whirl():
    worst = []
    for factor in STIFFENING:
        system = assemble(rigid_rotor(factor))
        err = 0.0
        for speed in SPEEDS_R:
            m = modes_at(system, speed, 4)
            for k, (w, whirl) in enumerate(rigid_expected(speed)):
                err = max(err, abs(m.frequency[k] / w - 1.0))
                if factor == STIFFENING[-1]:
                    check(f"Rigid rotor, E x {factor:g}, {speed:g} rad/s: mode {k + 1} "
                          f"({whirl}) whirl (rad/s)", RIGID, w, m.frequency[k], RIGID_TOL)
                    if speed > 0.0:
                        check(f"Rigid rotor, E x {factor:g}, {speed:g} rad/s: mode {k + 1} "
                              f"whirl label", RIGID, whirl, m.whirl[k], 0, kind="equal")
        worst.append(err)
    # the error is the shaft's flexibility in series with the bearings: ~ 1/E
    rate = math.log(worst[0] / worst[1]) / math.log(STIFFENING[1] / STIFFENING[0])
    check(f"Rigid rotor: error ~ E^-p, fitted p from E x {STIFFENING}",
          "series flexibility k_b / k_shaft (theory)", 1.0, rate, 0.1, kind="abs")


def test_rigid_rotor_critical_speeds():
    system = assemble(rigid_rotor(STIFFENING[-1]))
    mass, id_c, ip, a, b = rigid_properties()
    found = critical_speeds(system, sweep(system, np.linspace(0.0, 700.0, 29), 4))
    for whirl in ("forward", "backward"):
        exact = cf.rigid_rotor_critical(mass, id_c, ip, K1, K2, a, b, whirl)
        same = [c for c in found if c.whirl == whirl]
        check(f"Rigid rotor, E x {STIFFENING[-1]:g}: number of {whirl} 1X criticals",
              RIGID, len(exact), len(same), 0, kind="equal")
        for k, (target, crit) in enumerate(zip(exact, sorted(same, key=lambda c: c.speed))):
            check(f"Rigid rotor, E x {STIFFENING[-1]:g}: {whirl} 1X critical {k + 1} (rad/s)",
                  RIGID, target, crit.speed, RIGID_TOL)


# ---------------------------------------------------------------------------
# Case 7: Jeffcott rotor on anisotropic supports
# ---------------------------------------------------------------------------

KX, KY = 1.0e6, 4.0e6                # each bearing, N/m
ECC = 1.0e-4                         # mass eccentricity of the disk, m


def anisotropic_system():
    def bearing(station):
        return Bearing(station, {"kxx": (KX,), "kyy": (KY,)})
    return assemble(jeffcott(2, [bearing(0), bearing(2)]))


def anisotropic_effective():
    k_shaft = cf.simply_supported_midspan_stiffness(E, second_moment(DJ), LJ)
    return (cf.series_stiffness_two_bearings(k_shaft, KX),
            cf.series_stiffness_two_bearings(k_shaft, KY))


def test_anisotropic_criticals_and_labels():
    system = anisotropic_system()
    kex, key = anisotropic_effective()
    lower, upper = cf.anisotropic_jeffcott_criticals(kex, key, MJ)
    found = critical_speeds(system, sweep(system, np.linspace(0.0, 600.0, 25), 2))
    check("Anisotropic Jeffcott: number of 1X criticals", ANISO, 2, len(found), 0, kind="equal")
    for crit, exact, plane in zip(found, (lower, upper), ("x", "y")):
        check(f"Anisotropic Jeffcott: {plane}-direction 1X critical (rad/s)", ANISO, exact,
              crit.speed, jeffcott_bound())
        # Without gyroscopic coupling the two directions decouple: each mode
        # is a straight-line orbit, neither forward nor backward.
        check(f"Anisotropic Jeffcott: {plane}-direction critical, forward fraction",
              ANISO + "; straight orbit", 0.5, crit.forward_fraction, 1e-9, kind="abs")
        check(f"Anisotropic Jeffcott: {plane}-direction critical, whirl label",
              ANISO + "; straight orbit", "mixed", crit.whirl, 0, kind="equal")
    m = modes_at(system, 0.5 * (lower + upper), 2)
    for k, plane in enumerate(("x", "y")):
        check(f"Anisotropic Jeffcott: {plane}-direction mode, whirl label",
              ANISO + "; straight orbit", "mixed", m.whirl[k], 0, kind="equal")


@pytest.mark.parametrize("where", ["below both", "just below lower", "between",
                                   "just above upper", "above both"])
def test_anisotropic_unbalance_orbit(where):
    """Direct harmonic solve of the assembled matrices for a rotating unbalance.

    (K - w^2 M + i w (C + w G)) q = f with f = m e w^2 [1, -i] on the disk's
    (x, y): the real force m e w^2 (cos wt, sin wt), i.e. x + i y = e^{iwt}
    (docs/theory.md (section 1)).
    """
    system = anisotropic_system()
    kex, key = anisotropic_effective()
    lower, upper = cf.anisotropic_jeffcott_criticals(kex, key, MJ)
    speed = {"below both": 0.6 * lower, "just below lower": 0.97 * lower,
             "between": math.sqrt(lower * upper), "just above upper": 1.03 * upper,
             "above both": 3.0 * upper}[where]
    dofs = system.node_dofs(system.mesh.station_nodes[1])
    force = np.zeros(system.n_dof, dtype=complex)
    force[dofs[0]], force[dofs[1]] = MJ * ECC * speed**2, -1j * MJ * ECC * speed**2
    z = (system.stiffness(speed) - speed**2 * system.mass
         + 1j * speed * (system.damping(speed) + speed * system.gyroscopic)).tocsc()
    q = spla.spsolve(z, force)
    x, y = q[dofs[0]], q[dofs[1]]
    orbit = cf.anisotropic_jeffcott_unbalance_orbit(kex, key, MJ, ECC, speed)
    # x = X cos wt  <->  complex amplitude X;  y = Y sin wt  <->  -i Y
    ms = shaft_mass(LIGHT, DJ, LJ)
    # The shaft's mass changes the dynamic stiffness k - m w^2 by at most
    # m_s w^2, so each amplitude by at most the relative amount below.
    bound = {name: ms * speed**2 / abs(k - MJ * speed**2) for name, k in (("X", kex), ("Y", key))}
    for name, fe, ref in (("X", x, orbit.X), ("Y", 1j * y, orbit.Y)):
        check(f"Anisotropic unbalance, {where} ({speed:.1f} rad/s): amplitude {name} (m)",
              ANISO, ref, fe.real, bound[name])
        assert abs(fe.imag) <= 1e-9 * abs(fe)   # undamped: in phase or in anti-phase
    rf, rb = whirl_senses(np.array([x, y]))
    # radii (X +- Y)/2: absolute bound from the two amplitude bounds
    radius_tol = (bound["X"] * abs(orbit.X) + bound["Y"] * abs(orbit.Y)) / 2.0
    check(f"Anisotropic unbalance, {where}: forward circle radius (m)", ANISO,
          orbit.forward_radius, rf, radius_tol, kind="abs")
    check(f"Anisotropic unbalance, {where}: backward circle radius (m)", ANISO,
          orbit.backward_radius, rb, radius_tol, kind="abs")
    sense = "forward" if rf > rb else "backward"
    check(f"Anisotropic unbalance, {where}: whirl sense of the orbit", ANISO,
          "backward" if where == "between" else "forward", sense, 0, kind="equal")
    assert orbit.sense == sense
