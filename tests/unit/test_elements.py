"""Element matrices: symmetry, rigid-body content, static exactness.

References
----------
* Rigid-body inertia of a uniform rod: m L^2 / 12 about its centre plus the
  rotary term rho I L (elementary dynamics, e.g. J. L. Meriam, L. G. Kraige,
  "Engineering Mechanics: Dynamics", table of mass moments of inertia).
* Static tip deflection of a Timoshenko cantilever under an end load:
  P L^3 / (3 E I) + P L / (kappa G A) (S. P. Timoshenko, J. M. Gere,
  "Mechanics of Materials", shear deflection of beams); a single two-node
  Timoshenko element with the Phi-corrected stiffness reproduces it exactly.
* Solid cylinder inertias: Ip = m r^2 / 2, Id = m (3 r^2 + h^2) / 12
  (same dynamics table).
"""

import numpy as np
import pytest

from rotorcalc.fe.disk import disk_gyroscopic, disk_mass
from rotorcalc.fe.shaft import ShaftElement, shear_coefficient
from rotorcalc.model import Disk

E, G, RHO = 2.11e11, 2.11e11 / 2.6, 7810.0


def element(length=0.2, d=0.08, di=0.0, shear=True, rotary=True, added=0.0):
    return ShaftElement(length, d, di, E, G, RHO, added_mass=added, shear=shear, rotary=rotary)


def rigid_vectors(length):
    """Translation and tilt (about the element centre) in the x-z plane, 8 DOFs."""
    trans = np.array([1, 0, 0, 0, 1, 0, 0, 0], float)
    tilt = np.array([-length / 2, 0, 1, 0, length / 2, 0, 1, 0], float)
    tilt_y = np.array([0, -length / 2, 0, 1, 0, length / 2, 0, 1], float)
    return trans, tilt, tilt_y


@pytest.mark.parametrize("shear", [True, False])
@pytest.mark.parametrize("di", [0.0, 0.05])
def test_symmetry_and_skew(shear, di):
    e = element(di=di, shear=shear)
    np.testing.assert_allclose(e.mass(), e.mass().T, atol=0)
    np.testing.assert_allclose(e.stiffness(), e.stiffness().T, atol=0)
    np.testing.assert_allclose(e.gyroscopic(), -e.gyroscopic().T, atol=0)


@pytest.mark.parametrize("shear", [True, False])
def test_rigid_body_inertia(shear):
    L = 0.3
    e = element(length=L, shear=shear, added=1.7)
    trans, tilt, tilt_y = rigid_vectors(L)
    m = RHO * e.area * L
    assert trans @ e.mass() @ trans == pytest.approx(m + 1.7, rel=1e-12)
    expected_tilt = (m + 1.7) * L**2 / 12 + RHO * e.second_moment * L
    assert tilt @ e.mass() @ tilt == pytest.approx(expected_tilt, rel=1e-12)
    # polar inertia of the rod, 2 rho I L, appears in the gyroscopic coupling of the tilts
    assert tilt @ e.gyroscopic() @ tilt_y == pytest.approx(2 * RHO * e.second_moment * L,
                                                           rel=1e-12)


def test_rigid_body_modes_carry_no_strain():
    L = 0.25
    e = element(length=L)
    trans, tilt, _ = rigid_vectors(L)
    k = e.stiffness()
    scale = np.abs(k).max()
    assert np.abs(k @ trans).max() < 1e-12 * scale
    assert np.abs(k @ tilt).max() < 1e-12 * scale * L


def test_timoshenko_cantilever_tip_deflection_exact():
    L, d, nu = 0.15, 0.1, E / (2 * G) - 1
    e = element(length=L, d=d)
    k = e.stiffness()[np.ix_([4, 6], [4, 6])]  # node 1 clamped; tip x and slope free
    tip = np.linalg.solve(k, [1000.0, 0.0])[0]
    kappa = shear_coefficient(nu, d)
    exact = 1000.0 * L**3 / (3 * E * e.second_moment) + 1000.0 * L / (kappa * G * e.area)
    assert tip == pytest.approx(exact, rel=1e-12)


def test_shear_switch_gives_euler_bernoulli():
    e = element(shear=False)
    assert e.phi == 0.0
    L = e.length
    c = E * e.second_moment / L**3
    np.testing.assert_allclose(e.stiffness()[0, 0], 12 * c)


def test_shear_coefficient_limits():
    # Hutchinson (2001): solid circle 6(1+nu)^2/(7+12nu+4nu^2); nu = 0 gives 6/7 (from memory).
    assert shear_coefficient(0.0, 1.0) == pytest.approx(6 / 7)
    nu = 0.3
    assert shear_coefficient(nu, 1.0) == pytest.approx(6 * (1 + nu) ** 2 / (7 + 12 * nu + 4 * nu**2))
    # thin-walled tube tends to 0.5 for nu = 0 (Hutchinson's hollow formula, from memory)
    assert shear_coefficient(0.0, 1.0, 0.9999) == pytest.approx(0.5, rel=1e-3)


def test_disk_from_geometry_is_a_cylinder():
    r, h, rho = 0.2, 0.05, 7800.0
    disk = Disk.from_geometry(0, 2 * r, 0.0, h, rho)
    m = rho * np.pi * r * r * h
    assert disk.mass == pytest.approx(m)
    assert disk.polar_inertia == pytest.approx(m * r * r / 2)
    assert disk.transverse_inertia == pytest.approx(m * (3 * r * r + h * h) / 12)


def test_disk_matrices():
    m = disk_mass(5.0, 0.2)
    g = disk_gyroscopic(0.4)
    np.testing.assert_allclose(np.diag(m), [5, 5, 0.2, 0.2])
    np.testing.assert_allclose(g, -g.T)
    assert g[2, 3] == 0.4
