"""Timoshenko beam element of a spinning circular shaft.

Matrices after H. D. Nelson, "A finite rotating shaft element using
Timoshenko beam theory", J. Mech. Des. 102 (1980) 793-803, and
M. I. Friswell, J. E. T. Penny, S. D. Garvey, A. W. Lees, "Dynamics of
Rotating Machines", CUP 2010, ch. 5, written here in the project's slope
convention (docs/theory.md).  Shear coefficient of a hollow circle after
J. R. Hutchinson, "Shear coefficients for Timoshenko beam theory",
J. Appl. Mech. 68 (2001) 87-92.

Element DOF order (8): ``[x1, y1, a1, b1, x2, y2, a2, b2]``.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

#: Positions of one bending plane's [w1, t1, w2, t2] within the 8 element DOFs.
X_PLANE = np.array([0, 2, 4, 6])
Y_PLANE = np.array([1, 3, 5, 7])


def shear_coefficient(poisson, outer_diameter, inner_diameter=0.0):
    """Hutchinson's (2001) shear coefficient of a hollow circular section."""
    a, b, nu = outer_diameter / 2.0, inner_diameter / 2.0, poisson
    a2b2 = a * a * b * b
    num = 6.0 * (a * a + b * b) ** 2 * (1.0 + nu) ** 2
    den = (7.0 * a**4 + 34.0 * a2b2 + 7.0 * b**4
           + nu * (12.0 * a**4 + 48.0 * a2b2 + 12.0 * b**4)
           + nu * nu * (4.0 * a**4 + 16.0 * a2b2 + 4.0 * b**4))
    return num / den


@dataclass(frozen=True)
class ShaftElement:
    """A uniform circular shaft element.

    ``shear`` and ``rotary`` switch shear deformation and rotary inertia
    (with the gyroscopic matrix) on or off, giving the Timoshenko, Rayleigh
    or Euler-Bernoulli beam.  ``added_mass`` (kg) is spread uniformly and adds
    translational inertia only.
    """

    length: float
    outer_diameter: float
    inner_diameter: float
    youngs_modulus: float
    shear_modulus: float
    density: float
    added_mass: float = 0.0
    shear: bool = True
    rotary: bool = True

    @property
    def area(self):
        return np.pi / 4.0 * (self.outer_diameter**2 - self.inner_diameter**2)

    @property
    def second_moment(self):
        return np.pi / 64.0 * (self.outer_diameter**4 - self.inner_diameter**4)

    @property
    def phi(self):
        """Shear-deformation parameter 12 E I / (kappa G A L^2)."""
        if not self.shear:
            return 0.0
        nu = self.youngs_modulus / (2.0 * self.shear_modulus) - 1.0
        kappa = shear_coefficient(nu, self.outer_diameter, self.inner_diameter)
        return (12.0 * self.youngs_modulus * self.second_moment
                / (kappa * self.shear_modulus * self.area * self.length**2))

    # --- one bending plane, DOFs [w1, t1, w2, t2] --------------------------------
    def _plane_stiffness(self):
        L, p = self.length, self.phi
        c = self.youngs_modulus * self.second_moment / ((1.0 + p) * L**3)
        return c * np.array([
            [12.0, 6 * L, -12.0, 6 * L],
            [6 * L, (4 + p) * L * L, -6 * L, (2 - p) * L * L],
            [-12.0, -6 * L, 12.0, -6 * L],
            [6 * L, (2 - p) * L * L, -6 * L, (4 + p) * L * L]])

    def _plane_translational_mass(self):
        L, p = self.length, self.phi
        m1 = 13 / 35 + 7 * p / 10 + p * p / 3
        m2 = (11 / 210 + 11 * p / 120 + p * p / 24) * L
        m3 = 9 / 70 + 3 * p / 10 + p * p / 6
        m4 = -(13 / 420 + 3 * p / 40 + p * p / 24) * L
        m5 = (1 / 105 + p / 60 + p * p / 120) * L * L
        m6 = -(1 / 140 + p / 60 + p * p / 120) * L * L
        shape = np.array([[m1, m2, m3, m4], [m2, m5, -m4, m6],
                          [m3, -m4, m1, -m2], [m4, m6, -m2, m5]])
        beam = self.density * self.area * L / (1.0 + p) ** 2 * shape
        # Added mass: no stiffness, so no shear; consistent Euler-Bernoulli shape.
        extra = self.added_mass / 420.0 * np.array([
            [156, 22 * L, 54, -13 * L], [22 * L, 4 * L * L, 13 * L, -3 * L * L],
            [54, 13 * L, 156, -22 * L], [-13 * L, -3 * L * L, -22 * L, 4 * L * L]])
        return beam + extra

    def _plane_rotary_inertia(self):
        if not self.rotary:
            return np.zeros((4, 4))
        L, p = self.length, self.phi
        r1 = 6 / 5
        r2 = (1 / 10 - p / 2) * L
        r3 = (2 / 15 + p / 6 + p * p / 3) * L * L
        r4 = (-1 / 30 - p / 6 + p * p / 6) * L * L
        shape = np.array([[r1, r2, -r1, r2], [r2, r3, -r2, r4],
                          [-r1, -r2, r1, -r2], [r2, r4, -r2, r3]])
        return self.density * self.second_moment / (L * (1.0 + p) ** 2) * shape

    # --- element matrices, 8 DOFs ---------------------------------------------------
    def stiffness(self):
        """Elastic stiffness matrix (8x8), N/m."""
        return _both_planes(self._plane_stiffness())

    def mass(self):
        """Mass matrix (8x8): translational plus rotary inertia."""
        return _both_planes(self._plane_translational_mass() + self._plane_rotary_inertia())

    def gyroscopic(self):
        """Gyroscopic matrix G (8x8, skew-symmetric); the damping term is spin * G.

        The polar mass moment per length is twice the transverse one for a
        circular section, so G couples the planes with twice the rotary
        inertia matrix, with the sign of the rigid-disk block.
        """
        r = 2.0 * self._plane_rotary_inertia()
        g = np.zeros((8, 8))
        g[np.ix_(X_PLANE, Y_PLANE)] = r
        g[np.ix_(Y_PLANE, X_PLANE)] = -r
        return g


def _both_planes(plane):
    out = np.zeros((8, 8))
    out[np.ix_(X_PLANE, X_PLANE)] = plane
    out[np.ix_(Y_PLANE, Y_PLANE)] = plane
    return out
