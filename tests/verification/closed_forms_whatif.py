"""Closed-form references for the what-if verification (``test_whatif.py``).

Like ``closed_forms.py`` this module uses numpy only and imports nothing
from ``rotorcalc``; it builds on the functions of ``closed_forms.py``.  Every
result below is derived here in a few lines; where a published source is
named, its section, table and equation numbers are quoted **from memory**.

Contents
--------
1. Weyl's eigenvalue bracket for a flexibility that is a sum of two parts
   (rigid body on soft springs + pinned shaft), which brackets both ends of
   the critical-speed map of an undamped, non-gyroscopic rotor.
2. The first-order terms of both asymptotes of the map of a uniform
   Euler-Bernoulli shaft on two end bearings: the soft end (rigid-rotor
   bounce and rocking) and the stiff end (pinned-pinned modes).
3. The Jeffcott rotor on two unequal bearings: critical speed and its exact
   logarithmic derivatives (sensitivities) to each bearing and to the disk.
4. The bearing-stiffness factor that puts a Jeffcott critical at a given
   speed, undamped (algebraic) and with viscous bearing damping (bisection on
   the exact damped eigenvalue of ``closed_forms.py``).

Conventions are those of ``closed_forms.py`` (SI units, rad/s).
"""

from __future__ import annotations

import math

from numpy.polynomial import Polynomial as P

from tests.verification import closed_forms as cf

__all__ = [
    "weyl_lower_bound",
    "stiff_end_coefficient",
    "soft_end_coefficient",
    "jeffcott_flexibility",
    "jeffcott_critical_two_bearings",
    "jeffcott_bearing_sensitivity",
    "JEFFCOTT_DISK_MASS_SENSITIVITY",
    "jeffcott_factor_for_speed",
    "jeffcott_damped_frequency",
    "jeffcott_damped_factor_for_speed",
    "jeffcott_damped_sensitivities",
]


# ---------------------------------------------------------------------------
# 1. Weyl bracket
# ---------------------------------------------------------------------------
#
# A uniform shaft on two springs k at its ends, undamped, without gyroscopic
# terms (Euler-Bernoulli).  The supports are statically determinate, so the
# deflection under any load is the rigid-body motion caused by the spring
# deflections plus the deflection of the same shaft on rigid pins:
#
#     F = F_s + F_pp        (flexibility operators, both positive semi-definite)
#
# and the natural frequencies are w_i = 1 / sqrt(mu_i) with mu_i the
# eigenvalues of F M (self-adjoint in the M inner product).  F_s M has just
# the two rigid-body eigenvalues 1/w_bounce^2 and 1/w_rock^2; F_pp M has the
# pinned-pinned ones 1/w_pp,n^2.  Weyl's inequality for a sum of self-adjoint
# operators, with B positive semi-definite,
#
#     mu_i(A) <= mu_i(A + B) <= mu_i(A) + mu_1(B),
#
# applied on the symmetric and on the antisymmetric subspace separately (the
# shaft and its supports are symmetric about midspan, so every operator
# leaves both invariant: bounce, n = 1, 3, ... symmetric; rocking, n = 2, 4,
# ... antisymmetric) gives
#
#     soft end:   (1/w_r^2 + 1/w_pp,first^2)^(-1/2) <= w_i <= w_r
#                 (w_r bounce with w_pp,1; rocking with w_pp,2);
#     stiff end:  (1/w_pp,n^2 + 1/w_r^2)^(-1/2) <= w_n <= w_pp,n
#                 (n odd with the bounce, n even with the rocking).
#
# The same holds for the finite-element model (its consistent mass
# reproduces the rigid-body inertia exactly and its pinned frequencies are
# upper bounds of the exact ones, Rayleigh-Ritz), so the bracket applies to
# the map with the exact w_pp,n on the lower side; the upper side at the
# stiff end is the FE's pinned frequency, i.e. the closed form plus the mesh
# error.
#
# Source: H. Weyl, "Das asymptotische Verteilungsgesetz der Eigenwerte
# linearer partieller Differentialgleichungen", Math. Ann. 71 (1912)
# 441-479 (the inequality for sums of symmetric operators; from memory).


def weyl_lower_bound(w_main, w_other):
    """Lower Weyl bound ``(1/w_main^2 + 1/w_other^2)^(-1/2)`` (rad/s).

    ``w_main`` is the frequency of the part whose mode is followed (rigid
    rotor at the soft end, pinned shaft at the stiff end); ``w_other`` the
    lowest frequency of the other flexibility part in the same symmetry
    class.  See the comment block above.
    """
    w_main = cf._positive("w_main", w_main)
    w_other = cf._positive("w_other", w_other)
    return 1.0 / math.sqrt(1.0 / w_main**2 + 1.0 / w_other**2)


# ---------------------------------------------------------------------------
# 2. First-order terms of the two asymptotes (uniform Euler-Bernoulli shaft)
# ---------------------------------------------------------------------------
#
# Write kappa = k L^3 / (E I) for the dimensionless support stiffness.
#
# Stiff end.  Let w0 = sin(beta z), beta = n pi / L, be the pinned mode and w
# the mode on springs, with E I w'''' = rho A w^2 w (and w0 likewise with
# w0^2).  Integrating w0 (E I w'''') - w (E I w0'''') by parts twice over
# (0, L) and using w0 = w0'' = 0 and w'' = 0 at both ends leaves
#
#     (w^2 - w0^2) int rho A w w0 dz = -E I [w w0''']_0^L .
#
# The spring conditions, from the variation of the potential energy
# 1/2 int E I w''^2 + 1/2 k w(0)^2 + 1/2 k w(L)^2, are
# E I w'''(0) = -k w(0) and E I w'''(L) = k w(L); to first order w -> w0 on
# the right, w0'''(0)^2 = w0'''(L)^2 = beta^6, and int rho A w0^2 = rho A L/2:
#
#     (w^2 - w0^2) / w0^2 = -4 E I beta^2 / (k L),
#     w / w_pp,n = 1 - 2 n^2 pi^2 / kappa + O(kappa^-2).
#
# Soft end.  With F = F_s + F_pp (section 1), first-order perturbation of the
# largest eigenvalue of F M in the subspace of the rigid mode phi gives
#
#     delta mu = int q F_pp q dz / int rho A phi^2 dz,   q = rho A phi,
#
# i.e. the work of the rigid mode's inertia load q on the pinned shaft's
# deflection under that same load.  The deflection is found by integrating
# E I v'''' = q four times with v = v'' = 0 at both ends (done with exact
# polynomial arithmetic in soft_end_coefficient).  Bounce (phi = 1,
# mu = rho A L / (2k)) gives delta mu / mu = kappa / 60; rocking
# (phi = z - L/2, mu = (rho A L^3/12) / (2 k L^2/4)) gives kappa / 420.  With
# w = mu^(-1/2):
#
#     w / w_bounce = 1 - kappa/120 + O(kappa^2),
#     w / w_rock   = 1 - kappa/840 + O(kappa^2).
#
# Both are derived here; the pinned frequencies are those of R. D. Blevins,
# "Formulas for Natural Frequency and Mode Shape", Van Nostrand Reinhold,
# 1979, Table 8-1 (from memory), and the rigid-rotor criticals those of
# closed_forms.rigid_rotor_critical (J. M. Vance, "Rotordynamics of
# Turbomachinery", Wiley, 1988; from memory).


def stiff_end_coefficient(n):
    """``c`` in ``w / w_pp,n = 1 - c / kappa``: ``2 n^2 pi^2`` (derived above)."""
    n = cf._mode_number(n)
    return 2.0 * n**2 * math.pi**2


def _pinned_deflection(q):
    """Deflection ``v`` (polynomial in z on [0, 1]) of a pinned-pinned beam,
    ``E I = 1``, under the polynomial load ``q``: ``v'''' = q``,
    ``v(0) = v''(0) = v(1) = v''(1) = 0``."""
    v = q.integ(4)                       # particular solution, zero at z = 0 with v'' (0) = 0
    # add a z^3 + b z (keeps v(0) = v''(0) = 0) so that v(1) = v''(1) = 0
    d2 = v.deriv(2)
    a = -d2(1.0) / 6.0
    b = -(v(1.0) + a)
    return v + P([0.0, b, 0.0, a])


def soft_end_coefficient(mode):
    """``c`` in ``w / w_rigid = 1 - c kappa``: 1/120 (bounce), 1/840 (rocking).

    Computed by exact polynomial integration of the first-order formula
    above on the unit shaft (``L = E I = rho A = 1``; ``c`` is dimensionless).

    Parameters
    ----------
    mode : {"bounce", "rocking"}
    """
    if mode == "bounce":
        phi, mu_per_k = P([1.0]), 0.5                 # mu = L / (2 k)
    elif mode == "rocking":
        phi, mu_per_k = P([-0.5, 1.0]), 1.0 / 6.0     # mu = (1/12) / (2 k / 4)
    else:
        raise ValueError(f"mode must be 'bounce' or 'rocking', got {mode!r}")
    v = _pinned_deflection(phi)
    work = (phi * v).integ()(1.0)                     # int q v dz with q = phi
    norm = (phi * phi).integ()(1.0)
    delta_mu = work / norm
    # delta mu / mu = delta_mu * k / mu_per_k = (delta_mu / mu_per_k) kappa  (L = EI = 1)
    return 0.5 * delta_mu / mu_per_k


# ---------------------------------------------------------------------------
# 3. Jeffcott rotor on two unequal bearings: critical and sensitivities
# ---------------------------------------------------------------------------
#
# Central disk of mass m on a massless shaft of midspan stiffness k_s, on two
# bearings k1, k2.  The disk's load F is carried half by each bearing
# (statics), so the bearings deflect by F/(2 k1) and F/(2 k2) and move the
# midspan by their mean:
#
#     f = 1/k_s + (1/k1 + 1/k2) / 4,     w = 1 / sqrt(m f)
#
# (k1 = k2 = k gives k_eff = 1/f = 1/(1/k_s + 1/(2k)), the series-spring form
# of closed_forms.series_stiffness_two_bearings).  Hence, exactly,
#
#     d ln w / d ln k_i = -(1/2) d ln f / d ln k_i = 1 / (8 k_i f),
#     d ln w / d ln m   = -1/2,
#
# and with both bearings scaled together (k1 = k2 = k)
# d ln w / d ln k = 1 / (4 k f) = (1/2) k_eff / (2k): half the share of the
# bearings in the total flexibility, each bearing contributing half of it.
# Sources: H. H. Jeffcott, Phil. Mag. (6) 37 (1919) 304-314; springs in
# series, W. T. Thomson, "Theory of Vibration with Applications" (from
# memory); the derivatives are derived here.

#: Exact sensitivity of a Jeffcott critical to the disk mass.
JEFFCOTT_DISK_MASS_SENSITIVITY = -0.5


def jeffcott_flexibility(k_shaft, k1, k2):
    """Midspan flexibility ``1/k_s + (1/k1 + 1/k2)/4`` (m/N)."""
    return (1.0 / cf._positive("k_shaft", k_shaft) + 0.25 / cf._positive("k1", k1)
            + 0.25 / cf._positive("k2", k2))


def jeffcott_critical_two_bearings(k_shaft, k1, k2, m):
    """Critical speed (rad/s) ``1 / sqrt(m f)`` on bearings ``k1``, ``k2``."""
    return 1.0 / math.sqrt(cf._positive("m", m) * jeffcott_flexibility(k_shaft, k1, k2))


def jeffcott_bearing_sensitivity(k_shaft, k1, k2, which):
    """``d ln w / d ln k_which`` = ``1 / (8 k_which f)`` (``which`` = 1 or 2)."""
    if which not in (1, 2):
        raise ValueError(f"which must be 1 or 2, got {which!r}")
    k = k1 if which == 1 else k2
    return 1.0 / (8.0 * k * jeffcott_flexibility(k_shaft, k1, k2))


# ---------------------------------------------------------------------------
# 3a. The same sensitivities with viscous bearing damping
# ---------------------------------------------------------------------------
#
# Two identical bearings k_b, c_b, massless journals, no disk damping: the
# disk mode is the upper root s of (closed_forms.jeffcott_damped_bearings_
# polynomial with m_journal = c_disk = 0)
#
#     p(s) = (m s^2 + k_s)(2 c_b s + 2 k_b + k_s) - k_s^2 = 0 .
#
# Without gyroscopic terms and with constant coefficients the eigenvalue does
# not depend on the spin, so the (damped) critical speed is w_d = Im s.  By
# implicit differentiation ds/dtheta = -(dp/dtheta) / (dp/ds), with
#
#     dp/dk_b = 2 (m s^2 + k_s),      dp/dm = s^2 (2 c_b s + 2 k_b + k_s),
#     dp/ds   = 2 m s (2 c_b s + 2 k_b + k_s) + 2 c_b (m s^2 + k_s),
#
# and d ln w_d / d ln theta = theta Im(ds/dtheta) / Im(s).  Scaling k_b here
# scales both bearings; by symmetry each bearing alone gives half of it.  For
# c_b -> 0 this tends to k_s / (2 (k_s + 2 k_b)) = k_eff / (4 k_b) and -1/2
# (section 3).  Derived here; the model is that of closed_forms.py.


def jeffcott_damped_sensitivities(k_shaft, k_bearing, c_bearing, m):
    """``(d ln w_d / d ln k_b, d ln w_d / d ln m)`` of the damped Jeffcott
    critical, both bearings' stiffness scaled together (damping fixed)."""
    k_s = cf._positive("k_shaft", k_shaft)
    k_b = cf._positive("k_bearing", k_bearing)
    c_b = cf._nonnegative("c_bearing", c_bearing)
    m = cf._positive("m", m)
    roots = cf.jeffcott_damped_bearings_eigenvalues(k_s, m, k_b, c_b)
    upper = roots[roots.imag > 0]
    if upper.size != 1:
        raise ValueError("the disk mode is not oscillatory for these values")
    s = complex(upper[0])
    journal = 2.0 * c_b * s + 2.0 * k_b + k_s
    disk = m * s * s + k_s
    dp_ds = 2.0 * m * s * journal + 2.0 * c_b * disk
    ds_dk = -2.0 * disk / dp_ds
    ds_dm = -(s * s * journal) / dp_ds
    return k_b * ds_dk.imag / s.imag, m * ds_dm.imag / s.imag


# ---------------------------------------------------------------------------
# 4. Bearing-stiffness factor that puts the Jeffcott critical at a speed
# ---------------------------------------------------------------------------
#
# Undamped: sqrt(k_eff(x k) / m) = w with k_eff = 1/(1/k_s + 1/(2 x k)) gives
#
#     x = 1 / (2 k (1/(m w^2) - 1/k_s)),      possible only for m w^2 < k_s
#
# (w must lie below the rigid-bearing critical sqrt(k_s/m)).  With viscous
# damping c in each bearing (not scaled with x), the critical of a rotor
# without gyroscopic terms and with speed-independent bearings is the damped
# natural frequency Im(s) of the upper root of
# closed_forms.jeffcott_damped_bearings_polynomial; it rises monotonically
# with x, and x is found by bisection on ln x.  Derived here; sources as in
# section 3 and closed_forms.jeffcott_damped_bearings_polynomial.


def jeffcott_factor_for_speed(k_shaft, k_bearing, m, speed):
    """Factor ``x`` on both bearings' stiffness for which the undamped
    Jeffcott critical equals ``speed`` (rad/s)."""
    k_shaft = cf._positive("k_shaft", k_shaft)
    k_bearing = cf._positive("k_bearing", k_bearing)
    m = cf._positive("m", m)
    speed = cf._positive("speed", speed)
    gap = 1.0 / (m * speed**2) - 1.0 / k_shaft
    if gap <= 0.0:
        raise ValueError("speed is not below the rigid-bearing critical sqrt(k_shaft/m)")
    return 1.0 / (2.0 * k_bearing * gap)


def jeffcott_damped_frequency(k_shaft, k_bearing, c_bearing, m):
    """Damped natural frequency (rad/s) of the Jeffcott disk mode on damped
    bearings (upper root of closed_forms.jeffcott_damped_bearings_polynomial)."""
    roots = cf.jeffcott_damped_bearings_eigenvalues(k_shaft, m, k_bearing, c_bearing)
    upper = roots[roots.imag > 0]
    if upper.size != 1:
        raise ValueError("the disk mode is not oscillatory for these values")
    return float(upper[0].imag)


def jeffcott_damped_factor_for_speed(k_shaft, k_bearing, c_bearing, m, speed, spread=2.0):
    """Factor ``x`` on the bearings' stiffness (damping fixed) for which the
    damped Jeffcott critical equals ``speed``: bisection on ``ln x`` to
    machine precision, in ``[x_u / spread, x_u * spread]`` around the
    undamped factor ``x_u`` of :func:`jeffcott_factor_for_speed` (light
    damping moves the factor little; a bracket without a root raises)."""
    speed = cf._positive("speed", speed)
    guess = jeffcott_factor_for_speed(k_shaft, k_bearing, m, speed)
    lo, hi = guess / spread, guess * spread

    def g(s):
        return jeffcott_damped_frequency(k_shaft, math.exp(s) * k_bearing, c_bearing, m) - speed

    return math.exp(cf._bisect(g, math.log(lo), math.log(hi)))
