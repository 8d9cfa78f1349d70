"""Self-tests of the closed-form reference library ``closed_forms.py``.

These tests check the references themselves (against tabulated values,
limiting cases and small independent numerical computations), so that the
finite-element verification tests can trust them.  They do not import
``rotorcalc``.

Tabulated numbers quoted below (Blevins' beam eigenvalues, Cowper's shear
coefficient) are recalled from memory, not read from the printed sources.
"""

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

# scipy is deliberately not imported (import time); integrals of polynomials
# are done exactly by Gauss-Legendre quadrature, eigenproblems with numpy.

try:  # package-style collection (if tests/ ever gets __init__.py files)
    from . import closed_forms as cf
except ImportError:  # rootdir-style collection: this directory is on sys.path
    import closed_forms as cf


# A steel shaft used throughout (SI units).
E = 2.1e11
NU = 0.3
G = E / (2.0 * (1.0 + NU))
RHO = 7850.0


def solid(d):
    """Area and second moment of area of a solid circle of diameter d."""
    return math.pi * d ** 2 / 4.0, math.pi * d ** 4 / 64.0


def quad(f, a, b, n=8):
    """Gauss-Legendre quadrature, exact for polynomials of degree < 2n.

    Returns a 1-tuple to mirror the call pattern ``quad(...)[0]``.
    """
    x, w = np.polynomial.legendre.leggauss(n)
    z = 0.5 * (b - a) * x + 0.5 * (a + b)
    return (0.5 * (b - a) * float(np.sum(w * np.array([f(zi) for zi in z]))),)


def eig(A, right=True):
    """Eigenvalues (and right eigenvectors) of a dense matrix via numpy."""
    vals, vecs = np.linalg.eig(A)
    return (vals, vecs) if right else vals


HYP = settings(max_examples=40, deadline=None, derandomize=True)


# ---------------------------------------------------------------------------
# Euler-Bernoulli
# ---------------------------------------------------------------------------

# R. D. Blevins, "Formulas for Natural Frequency and Mode Shape", 1979,
# Table 8-1 -- digits quoted FROM MEMORY.
BLEVINS_TABLE_8_1 = {
    "free-free": (4.7300, 7.8532, 10.9956),
    "clamped-clamped": (4.7300, 7.8532, 10.9956),
    "clamped-free": (1.8751, 4.6941, 7.8548),
}


@pytest.mark.parametrize("boundary", sorted(BLEVINS_TABLE_8_1))
def test_euler_bernoulli_roots_match_blevins_table(boundary):
    for n, tabulated in enumerate(BLEVINS_TABLE_8_1[boundary], start=1):
        computed = cf.euler_bernoulli_beta_l(boundary, n)
        # equal to the printed (4-decimal) digits
        assert abs(computed - tabulated) <= 0.5e-4 + 1e-12, (boundary, n, computed)


def test_pinned_pinned_roots_are_n_pi():
    for n in range(1, 8):
        assert cf.euler_bernoulli_beta_l("pinned-pinned", n) == pytest.approx(n * math.pi, rel=1e-13)


@pytest.mark.parametrize("boundary", cf.BOUNDARIES)
def test_euler_bernoulli_roots_solve_unscaled_equation(boundary):
    for n in range(1, 7):
        x = cf.euler_bernoulli_beta_l(boundary, n)
        if boundary == "pinned-pinned":
            res = math.sin(x)
        elif boundary == "clamped-free":
            res = (math.cos(x) * math.cosh(x) + 1.0) / math.cosh(x)
        else:
            res = (math.cos(x) * math.cosh(x) - 1.0) / math.cosh(x)
        assert abs(res) < 1e-12
    # ascending and asymptotic to (2n+1) pi/2 (free-free) / (2n-1) pi/2 (cantilever)
    roots = [cf.euler_bernoulli_beta_l(boundary, n) for n in range(1, 12)]
    assert np.all(np.diff(roots) > 0)
    if boundary in ("free-free", "clamped-clamped"):
        assert roots[-1] == pytest.approx((2 * 11 + 1) * math.pi / 2, abs=1e-9)
    if boundary == "clamped-free":
        assert roots[-1] == pytest.approx((2 * 11 - 1) * math.pi / 2, abs=1e-9)


def test_euler_bernoulli_frequency_formula_and_scaling():
    A, I = solid(0.05)
    L = 1.2
    w = cf.euler_bernoulli_frequency("pinned-pinned", 2, E, I, RHO, A, L)
    assert w == pytest.approx((2 * math.pi / L) ** 2 * math.sqrt(E * I / (RHO * A)), rel=1e-12)
    # w ~ 1/L^2 and ~ sqrt(E)
    w2 = cf.euler_bernoulli_frequency("pinned-pinned", 2, 4 * E, I, RHO, A, 2 * L)
    assert w2 == pytest.approx(w / 2.0, rel=1e-12)


def test_euler_bernoulli_cantilever_against_rayleigh_quotient():
    # Independent upper bound: the static-deflection shape of a tip-loaded
    # cantilever, u = 3 s^2 - s^3 (s = z/L), in the Rayleigh quotient gives
    # an estimate a little above the exact first frequency.
    A, I = solid(0.04)
    L = 0.8
    exact = cf.euler_bernoulli_frequency("clamped-free", 1, E, I, RHO, A, L)
    num = quad(lambda s: (6.0 - 6.0 * s) ** 2, 0.0, 1.0)[0] * E * I / L ** 3
    den = quad(lambda s: (3 * s ** 2 - s ** 3) ** 2, 0.0, 1.0)[0] * RHO * A * L
    estimate = math.sqrt(num / den)
    assert exact < estimate < 1.02 * exact


def test_euler_bernoulli_bad_input():
    with pytest.raises(ValueError):
        cf.euler_bernoulli_beta_l("clamped-sliding", 1)
    with pytest.raises(ValueError):
        cf.euler_bernoulli_beta_l("free-free", 0)


# ---------------------------------------------------------------------------
# Shear coefficients
# ---------------------------------------------------------------------------

def test_shear_coefficient_solid_circle_values():
    # Cowper, solid circle, nu = 0.3: 6*1.3/8.8 = 0.8864 (the often-quoted
    # "0.886" is from memory).
    assert cf.shear_coefficient_cowper(0.3, 0.1) == pytest.approx(7.8 / 8.8, rel=1e-12)
    assert cf.shear_coefficient_cowper(0.3, 0.1) == pytest.approx(0.886, abs=5e-4)
    # Hutchinson, solid circle, nu = 0.3: 6*1.69/10.96 = 0.9252 (computed
    # here from the formula; note it lies ABOVE Cowper's value for nu > 0).
    assert cf.shear_coefficient_hutchinson(0.3, 0.1) == pytest.approx(10.14 / 10.96, rel=1e-12)
    assert cf.shear_coefficient_hutchinson(0.3, 0.1) == pytest.approx(0.925, abs=5e-4)
    # both reduce to 6/7 at nu = 0
    assert cf.shear_coefficient_cowper(0.0, 1.0) == pytest.approx(6.0 / 7.0, rel=1e-14)
    assert cf.shear_coefficient_hutchinson(0.0, 1.0) == pytest.approx(6.0 / 7.0, rel=1e-14)


@given(nu=st.floats(0.0, 0.5))
@HYP
def test_shear_coefficient_limits(nu):
    kc0 = cf.shear_coefficient_cowper(nu, 0.2)
    kh0 = cf.shear_coefficient_hutchinson(nu, 0.2)
    assert kc0 == pytest.approx(6 * (1 + nu) / (7 + 6 * nu), rel=1e-13)
    assert kh0 == pytest.approx(6 * (1 + nu) ** 2 / (7 + 12 * nu + 4 * nu ** 2), rel=1e-13)
    assert kh0 >= kc0 - 1e-15
    # thin-walled tube limits
    thin = 0.2 * (1 - 1e-7)
    assert cf.shear_coefficient_cowper(nu, 0.2, thin) == pytest.approx(2 * (1 + nu) / (4 + 3 * nu), rel=1e-6)
    assert cf.shear_coefficient_hutchinson(nu, 0.2, thin) == pytest.approx((1 + nu) / (2 + nu), rel=1e-6)
    # only the ratio matters; kappa falls as the wall gets thinner
    ratios = np.linspace(0.0, 0.95, 12)
    kc = [cf.shear_coefficient_cowper(nu, 0.2, 0.2 * r) for r in ratios]
    kh = [cf.shear_coefficient_hutchinson(nu, 0.2, 0.2 * r) for r in ratios]
    assert np.all(np.diff(kc) < 0) and np.all(np.diff(kh) < 0)
    assert cf.shear_coefficient_cowper(nu, 7.0, 3.5) == pytest.approx(
        cf.shear_coefficient_cowper(nu, 0.2, 0.1), rel=1e-14)


def test_shear_coefficient_bad_input():
    with pytest.raises(ValueError):
        cf.shear_coefficient_cowper(0.3, 0.1, 0.1)
    with pytest.raises(ValueError):
        cf.shear_coefficient_hutchinson(0.3, -0.1)


# ---------------------------------------------------------------------------
# Timoshenko, simply supported
# ---------------------------------------------------------------------------

def _timoshenko_det(w, n, L, A, I, kappa):
    """Determinant of the 2x2 amplitude system (W, Psi) for w sin, psi cos."""
    k = n * math.pi / L
    kGA = kappa * G * A
    a11 = kGA * k ** 2 - RHO * A * w ** 2
    a12 = -kGA * k
    a22 = E * I * k ** 2 + kGA - RHO * I * w ** 2
    return (a11 * a22 - a12 ** 2) / (kGA * E * I * k ** 4)


def test_timoshenko_tends_to_euler_bernoulli_when_slender():
    d = 0.01
    A, I = solid(d)
    kappa = cf.shear_coefficient_cowper(NU, d)
    L = 5.0  # L/d = 500
    wt = cf.timoshenko_simply_supported_frequencies(E, G, kappa, RHO, A, I, L, 3)
    for n, w in enumerate(wt, start=1):
        we = cf.euler_bernoulli_frequency("pinned-pinned", n, E, I, RHO, A, L)
        assert w < we
        assert w / we == pytest.approx(1.0, abs=2e-5 * n ** 2)


def test_timoshenko_below_rayleigh_below_euler_bernoulli_for_thick_beam():
    d = 0.1
    A, I = solid(d)
    kappa = cf.shear_coefficient_cowper(NU, d)
    L = 0.5  # L/d = 5
    wt = cf.timoshenko_simply_supported_frequencies(E, G, kappa, RHO, A, I, L, 4)
    ratio_prev = 1.0
    for n, w in enumerate(wt, start=1):
        we = cf.euler_bernoulli_frequency("pinned-pinned", n, E, I, RHO, A, L)
        wr = cf.rayleigh_spinning_ss_whirl(E, I, RHO, A, L, n, 0.0)[0]
        assert w < wr < we
        assert w / we < ratio_prev  # shear matters more for higher modes
        ratio_prev = w / we
    assert wt[0] / cf.euler_bernoulli_frequency("pinned-pinned", 1, E, I, RHO, A, L) < 0.97


def test_timoshenko_rigid_shear_limit_is_rayleigh():
    A, I = solid(0.1)
    L = 0.5
    wt = cf.timoshenko_simply_supported_frequencies(E, G * 1e8, 1.0, RHO, A, I, L, 3)
    for n, w in enumerate(wt, start=1):
        assert w == pytest.approx(cf.rayleigh_spinning_ss_whirl(E, I, RHO, A, L, n, 0.0)[0], rel=1e-6)


def test_timoshenko_spectra_solve_frequency_equation():
    d = 0.08
    A, I = solid(d)
    kappa = cf.shear_coefficient_hutchinson(NU, d)
    L = 0.6
    low, high = cf.timoshenko_simply_supported_spectra(E, G, kappa, RHO, A, I, L, 5)
    assert np.allclose(low, cf.timoshenko_simply_supported_frequencies(E, G, kappa, RHO, A, I, L, 5))
    assert np.allclose(high, cf.timoshenko_simply_supported_second_spectrum(E, G, kappa, RHO, A, I, L, 5))
    cutoff = math.sqrt(kappa * G * A / (RHO * I))
    for n in range(1, 6):
        assert abs(_timoshenko_det(low[n - 1], n, L, A, I, kappa)) < 1e-9
        # relative residual for the (large) second-spectrum root
        assert abs(_timoshenko_det(high[n - 1], n, L, A, I, kappa)) < 1e-9 * (high[n - 1] / low[n - 1]) ** 4
        assert high[n - 1] > cutoff > low[n - 1]


# ---------------------------------------------------------------------------
# Spinning Rayleigh shaft
# ---------------------------------------------------------------------------

def test_rayleigh_zero_spin_forward_equals_backward():
    A, I = solid(0.06)
    L = 0.9
    for n in (1, 2, 3):
        fw, bw = cf.rayleigh_spinning_ss_whirl(E, I, RHO, A, L, n, 0.0)
        k = n * math.pi / L
        assert fw == pytest.approx(bw, rel=1e-14)
        assert fw == pytest.approx(math.sqrt(E * I * k ** 4 / (RHO * A + RHO * I * k ** 2)), rel=1e-13)


@given(spin=st.floats(1.0, 2e4), n=st.integers(1, 4))
@HYP
def test_rayleigh_spin_splits_forward_above_backward(spin, n):
    A, I = solid(0.06)
    L = 0.9
    k = n * math.pi / L
    w0 = cf.rayleigh_spinning_ss_whirl(E, I, RHO, A, L, n, 0.0)[0]
    fw, bw = cf.rayleigh_spinning_ss_whirl(E, I, RHO, A, L, n, spin)
    assert fw > w0 > bw > 0
    mass = RHO * A + RHO * I * k ** 2
    g = 2 * RHO * I * k ** 2 * spin
    scale = E * I * k ** 4
    assert abs(mass * fw ** 2 - g * fw - scale) < 1e-10 * scale
    assert abs(mass * bw ** 2 + g * bw - scale) < 1e-10 * scale


def test_rayleigh_vectorised_over_spin():
    A, I = solid(0.06)
    spins = np.linspace(0.0, 3000.0, 7)
    fw, bw = cf.rayleigh_spinning_ss_whirl(E, I, RHO, A, 0.9, 1, spins)
    assert fw.shape == bw.shape == spins.shape
    assert np.all(np.diff(fw) > 0) and np.all(np.diff(bw) < 0)


def test_rayleigh_synchronous_critical_speeds():
    A, I = solid(0.06)
    L = 0.9
    for n in (1, 2):
        for whirl, idx in (("forward", 0), ("backward", 1)):
            wc = cf.rayleigh_spinning_ss_critical(E, I, RHO, A, L, n, whirl)
            # whirl frequency at spin = wc equals wc
            assert cf.rayleigh_spinning_ss_whirl(E, I, RHO, A, L, n, wc)[idx] == pytest.approx(wc, rel=1e-12)
        fwc = cf.rayleigh_spinning_ss_critical(E, I, RHO, A, L, n, "forward")
        bwc = cf.rayleigh_spinning_ss_critical(E, I, RHO, A, L, n, "backward")
        assert fwc > cf.rayleigh_spinning_ss_whirl(E, I, RHO, A, L, n, 0.0)[0] > bwc


def test_rayleigh_forward_critical_absent_for_short_wavelength():
    d = 0.05
    A, I = solid(d)
    L = 1.0
    # rho A <= rho I k^2  <=>  n pi d / (4 L) >= 1
    n = math.ceil(4 * L / (math.pi * d))
    assert math.isnan(cf.rayleigh_spinning_ss_critical(E, I, RHO, A, L, n, "forward"))
    assert math.isfinite(cf.rayleigh_spinning_ss_critical(E, I, RHO, A, L, n - 1, "forward"))
    assert math.isfinite(cf.rayleigh_spinning_ss_critical(E, I, RHO, A, L, n, "backward"))


def test_rayleigh_slender_tends_to_euler_bernoulli():
    A, I = solid(0.01)
    L = 5.0
    w = cf.rayleigh_spinning_ss_whirl(E, I, RHO, A, L, 1, 0.0)[0]
    assert w == pytest.approx(cf.euler_bernoulli_frequency("pinned-pinned", 1, E, I, RHO, A, L), rel=1e-5)


# ---------------------------------------------------------------------------
# Beam influence coefficients (independent unit-load integration)
# ---------------------------------------------------------------------------

def test_midspan_stiffness_against_unit_load_integration():
    A, I = solid(0.05)
    L = 1.3
    # delta = int M(z)^2 / (E I) dz with M = z/2 on [0, L/2], symmetric
    flex = 2 * quad(lambda z: (z / 2) ** 2, 0.0, L / 2)[0] / (E * I)
    assert cf.simply_supported_midspan_stiffness(E, I, L) == pytest.approx(1.0 / flex, rel=1e-10)
    assert cf.simply_supported_midspan_stiffness(E, I, L) == pytest.approx(48 * E * I / L ** 3, rel=1e-14)


def test_cantilever_tip_stiffness_against_unit_load_integration():
    A, I = solid(0.05)
    L = 0.4
    # bending moment at z due to unit tip force: (L - z); unit tip moment: 1
    fff = quad(lambda z: (L - z) ** 2, 0, L)[0] / (E * I)
    ffm = quad(lambda z: (L - z), 0, L)[0] / (E * I)
    fmm = L / (E * I)
    # sign: a positive tip force gives a positive tip slope a = dx/dz
    flex = np.array([[fff, ffm], [ffm, fmm]])
    K = cf.cantilever_tip_stiffness(E, I, L)
    assert np.allclose(K @ flex, np.eye(2), atol=1e-10)


# ---------------------------------------------------------------------------
# Jeffcott rotor
# ---------------------------------------------------------------------------

def test_jeffcott_rigid_and_flexible_support_limits():
    k, m = 2.0e6, 15.0
    assert cf.jeffcott_critical_rigid(k, m) == pytest.approx(math.sqrt(k / m), rel=1e-15)
    # very stiff bearings -> rigid value; very soft -> bearings alone (2 kb)
    assert cf.jeffcott_critical_flexible_supports(k, 1e15, m) == pytest.approx(math.sqrt(k / m), rel=1e-8)
    assert cf.jeffcott_critical_flexible_supports(k, 10.0, m) == pytest.approx(math.sqrt(20.0 / m), rel=1e-5)
    # equal shaft and (two-bearing) support stiffness halves k
    assert cf.series_stiffness_two_bearings(k, k / 2) == pytest.approx(k / 2, rel=1e-15)
    assert cf.jeffcott_critical_flexible_supports(k, 3e6, m) < cf.jeffcott_critical_rigid(k, m)


def test_jeffcott_damped_relations():
    k, m = 1.0e6, 10.0
    r = cf.jeffcott_damped(k, m, 0.0)
    assert r.damping_ratio == 0.0 and r.log_decrement == 0.0
    assert r.damped_frequency == r.natural_frequency == pytest.approx(math.sqrt(k / m))
    c = 0.05 * 2 * math.sqrt(k * m)
    r = cf.jeffcott_damped(k, m, c)
    assert r.damping_ratio == pytest.approx(0.05, rel=1e-14)
    assert r.damped_frequency == pytest.approx(math.sqrt(k / m) * math.sqrt(1 - 0.05 ** 2), rel=1e-14)
    assert r.log_decrement == pytest.approx(2 * math.pi * 0.05 / math.sqrt(1 - 0.0025), rel=1e-14)
    # project convention delta = -2 pi Re / Im gives the same number
    assert cf.log_decrement(r.eigenvalue) == pytest.approx(r.log_decrement, rel=1e-13)
    # eigenvalue solves m s^2 + c s + k = 0
    s = r.eigenvalue
    assert abs(m * s * s + c * s + k) < 1e-9 * k
    # overdamped
    r = cf.jeffcott_damped(k, m, 3 * 2 * math.sqrt(k * m))
    assert math.isinf(r.log_decrement) and r.damped_frequency == 0.0
    assert abs(m * r.eigenvalue ** 2 + 3 * 2 * math.sqrt(k * m) * r.eigenvalue + k) < 1e-6 * k


def _damped_bearing_state_eigs(ks, m, kb, cb, mj):
    """Independent state-space eigenvalues of the symmetric Jeffcott mode."""
    if mj == 0.0:
        # states [x, v, xj];  2 cb xj' = ks x - (ks + 2 kb) xj
        A = np.array([[0.0, 1.0, 0.0],
                      [-ks / m, 0.0, ks / m],
                      [ks / (2 * cb), 0.0, -(ks + 2 * kb) / (2 * cb)]])
        return eig(A, right=False)
    M = np.diag([m, 2 * mj])
    C = np.diag([0.0, 2 * cb])
    K = np.array([[ks, -ks], [-ks, ks + 2 * kb]])
    Z = np.zeros((2, 2))
    A = np.block([[Z, np.eye(2)], [-np.linalg.solve(M, K), -np.linalg.solve(M, C)]])
    return eig(A, right=False)


@pytest.mark.parametrize("mj", [0.0, 2.0])
def test_jeffcott_damped_bearings_against_state_space(mj):
    ks, m, kb, cb = 4.0e6, 20.0, 3.0e6, 2.0e3
    roots = cf.jeffcott_damped_bearings_eigenvalues(ks, m, kb, cb, m_journal=mj)
    ref = _damped_bearing_state_eigs(ks, m, kb, cb, mj)
    assert roots.size == ref.size
    for r in ref:
        assert np.min(np.abs(roots - r)) < 1e-7 * abs(r)
    fw = roots[roots.imag > 0]
    assert np.all(cf.log_decrement(fw) > 0)


def test_jeffcott_damped_bearings_limits():
    ks, m, kb = 4.0e6, 20.0, 3.0e6
    w_series = cf.jeffcott_critical_flexible_supports(ks, kb, m)
    w_rigid = cf.jeffcott_critical_rigid(ks, m)
    # no bearing damping: undamped on series springs
    lam = cf.jeffcott_damped_bearings_eigenvalues(ks, m, kb, 1e-9)
    lam = lam[lam.imag > 0]
    assert lam.size == 1 and lam[0].imag == pytest.approx(w_series, rel=1e-8)
    assert abs(lam[0].real) < 1e-8 * w_series
    # locked bearing damper: shaft stiffness alone
    lam = cf.jeffcott_damped_bearings_eigenvalues(ks, m, kb, 1e12)
    lam = lam[lam.imag > 0]
    assert lam[0].imag == pytest.approx(w_rigid, rel=1e-6)
    # in between: frequency between the two limits and positive log dec,
    # which has an interior maximum over c_bearing
    cbs = np.logspace(1, 7, 61)
    deltas, freqs = [], []
    for cb in cbs:
        lam = cf.jeffcott_damped_bearings_eigenvalues(ks, m, kb, cb)
        lam = lam[lam.imag > 0][0]
        deltas.append(cf.log_decrement(lam))
        freqs.append(lam.imag)
    deltas = np.array(deltas)
    assert np.all(deltas > 0)
    i = int(np.argmax(deltas))
    assert 0 < i < len(cbs) - 1
    assert np.all(np.array(freqs) > w_series * (1 - 1e-9)) and np.all(np.array(freqs) < w_rigid)


def test_jeffcott_damped_bearings_with_disk_damping_and_rigid_bearings():
    ks, m, c = 4.0e6, 20.0, 500.0
    lam = cf.jeffcott_damped_bearings_eigenvalues(ks, m, 1e14, 0.0, c_disk=c)
    lam = lam[lam.imag > 0][0]
    ref = cf.jeffcott_damped(ks, m, c).eigenvalue
    assert abs(lam - ref) < 1e-6 * abs(ref)


# ---------------------------------------------------------------------------
# Two-DOF gyroscopic systems
# ---------------------------------------------------------------------------

def _direct_whirl(K2, m, Id, Ip, spin):
    """Whirl frequencies from the 4-DOF [x, y, a, b] model of the project
    conventions (gyroscopic block Ip*[[0, 1], [-1, 0]] on (a, b)), with
    forward/backward classification from the eigenvectors."""
    M = np.diag([m, m, Id, Id])
    Gm = np.zeros((4, 4))
    Gm[2, 3], Gm[3, 2] = Ip, -Ip
    K = np.zeros((4, 4))
    for t, r in ((0, 2), (1, 3)):
        K[np.ix_([t, r], [t, r])] = K2
    Z = np.zeros((4, 4))
    A = np.block([[Z, np.eye(4)], [-np.linalg.solve(M, K), -np.linalg.solve(M, spin * Gm)]])
    vals, vecs = eig(A)
    fw, bw = [], []
    for lam, v in zip(vals, vecs.T):
        if lam.imag <= 0:
            continue
        x, y, a, b = v[:4]
        # q ~ e^{i w t}: forward part of x + i y is (X + iY), backward (X - iY)
        f = abs(x + 1j * y) ** 2 + abs(a + 1j * b) ** 2
        g = abs(x - 1j * y) ** 2 + abs(a - 1j * b) ** 2
        (fw if f > g else bw).append(lam.imag)
    return np.sort(fw), np.sort(bw)


def test_overhung_disk_without_inertia_is_cantilever_tip_frequency():
    A, I = solid(0.03)
    L, m = 0.35, 8.0
    for spin in (0.0, 500.0):
        fw, bw = cf.overhung_disk_whirl(E, I, L, m, 0.0, 0.0, spin)
        w = math.sqrt(3 * E * I / (m * L ** 3))
        assert fw.size == bw.size == 1
        assert fw[0] == pytest.approx(w, rel=1e-12) and bw[0] == pytest.approx(w, rel=1e-12)


@pytest.mark.parametrize("Id,Ip", [(0.02, 0.01), (0.02, 0.04), (0.05, 0.05)])
def test_overhung_disk_against_direct_eigenproblem(Id, Ip):
    A, I = solid(0.03)
    L, m = 0.35, 8.0
    K2 = cf.cantilever_tip_stiffness(E, I, L)
    fw0, bw0 = cf.overhung_disk_whirl(E, I, L, m, Id, Ip, 0.0)
    assert np.allclose(fw0, bw0, rtol=1e-12)
    prev_fw, prev_bw = fw0, bw0
    for spin in (300.0, 1500.0, 6000.0):
        fw, bw = cf.overhung_disk_whirl(E, I, L, m, Id, Ip, spin)
        dfw, dbw = _direct_whirl(K2, m, Id, Ip, spin)
        assert np.allclose(fw, dfw, rtol=1e-8) and np.allclose(bw, dbw, rtol=1e-8)
        assert np.all(fw > prev_fw) and np.all(bw < prev_bw)  # gyroscopic stiffening
        prev_fw, prev_bw = fw, bw
        # roots solve the determinant equations
        for w in fw:
            D = (K2[0, 0] - m * w * w) * (K2[1, 1] - Id * w * w + Ip * spin * w) - K2[0, 1] ** 2
            assert abs(D) < 1e-8 * abs(K2[0, 0] * K2[1, 1])
        for w in bw:
            D = (K2[0, 0] - m * w * w) * (K2[1, 1] - Id * w * w - Ip * spin * w) - K2[0, 1] ** 2
            assert abs(D) < 1e-8 * abs(K2[0, 0] * K2[1, 1])


def test_overhung_disk_critical_speeds():
    A, I = solid(0.03)
    L, m = 0.35, 8.0
    for Id, Ip in ((0.02, 0.01), (0.02, 0.04)):
        fc = cf.overhung_disk_critical(E, I, L, m, Id, Ip, "forward")
        bc = cf.overhung_disk_critical(E, I, L, m, Id, Ip, "backward")
        assert fc.size == (2 if Id > Ip else 1) and bc.size == 2
        for wc in fc:
            fw, _ = cf.overhung_disk_whirl(E, I, L, m, Id, Ip, wc)
            assert np.min(np.abs(fw - wc)) < 1e-9 * wc
        for wc in bc:
            _, bw = cf.overhung_disk_whirl(E, I, L, m, Id, Ip, wc)
            assert np.min(np.abs(bw - wc)) < 1e-9 * wc


def test_rigid_rotor_symmetric_limits():
    m, Id, Ip, k, a = 30.0, 0.6, 0.2, 5.0e5, 0.25
    fw, bw = cf.rigid_rotor_whirl(m, Id, Ip, k, k, a, a, 0.0)
    expected = np.sort([math.sqrt(2 * k / m), math.sqrt(2 * k * a * a / Id)])
    assert np.allclose(fw, expected, rtol=1e-12) and np.allclose(bw, expected, rtol=1e-12)
    spin = 800.0
    fw, bw = cf.rigid_rotor_whirl(m, Id, Ip, k, k, a, a, spin)
    k22 = 2 * k * a * a
    g = Ip * spin
    rock_f = (g + math.sqrt(g * g + 4 * Id * k22)) / (2 * Id)
    rock_b = (-g + math.sqrt(g * g + 4 * Id * k22)) / (2 * Id)
    assert np.allclose(fw, np.sort([math.sqrt(2 * k / m), rock_f]), rtol=1e-12)
    assert np.allclose(bw, np.sort([math.sqrt(2 * k / m), rock_b]), rtol=1e-12)
    # synchronous rocking critical: forward only if Id > Ip
    fc = cf.rigid_rotor_critical(m, Id, Ip, k, k, a, a, "forward")
    assert np.allclose(fc, np.sort([math.sqrt(2 * k / m), math.sqrt(k22 / (Id - Ip))]), rtol=1e-12)
    fc = cf.rigid_rotor_critical(m, Id, 2 * Id, k, k, a, a, "forward")
    assert np.allclose(fc, [math.sqrt(2 * k / m)], rtol=1e-12)
    bc = cf.rigid_rotor_critical(m, Id, Ip, k, k, a, a, "backward")
    assert np.allclose(bc, np.sort([math.sqrt(2 * k / m), math.sqrt(k22 / (Id + Ip))]), rtol=1e-12)


def test_rigid_rotor_asymmetric_against_direct_eigenproblem():
    m, Id, Ip = 30.0, 0.6, 0.9
    k1, k2, a, b = 4.0e5, 7.0e5, 0.2, 0.35
    K2 = cf.rigid_rotor_stiffness(k1, k2, a, b)
    w0 = np.sqrt(np.sort(np.linalg.eigvals(np.diag([1 / m, 1 / Id]) @ K2).real))
    fw, bw = cf.rigid_rotor_whirl(m, Id, Ip, k1, k2, a, b, 0.0)
    assert np.allclose(fw, w0, rtol=1e-12) and np.allclose(bw, w0, rtol=1e-12)
    # swapping the sides of the bearings leaves the frequencies unchanged
    fw_s, _ = cf.rigid_rotor_whirl(m, Id, Ip, k2, k1, b, a, 700.0)
    fw, bw = cf.rigid_rotor_whirl(m, Id, Ip, k1, k2, a, b, 700.0)
    assert np.allclose(fw, fw_s, rtol=1e-12)
    dfw, dbw = _direct_whirl(K2, m, Id, Ip, 700.0)
    assert np.allclose(fw, dfw, rtol=1e-8) and np.allclose(bw, dbw, rtol=1e-8)


# ---------------------------------------------------------------------------
# Anisotropic Jeffcott
# ---------------------------------------------------------------------------

def test_anisotropic_criticals():
    lo, hi = cf.anisotropic_jeffcott_criticals(2.0e6, 1.0e6, 10.0)
    assert (lo, hi) == (pytest.approx(math.sqrt(1e5)), pytest.approx(math.sqrt(2e5)))


@given(frac=st.floats(0.01, 0.99))
@HYP
def test_anisotropic_orbit_backward_between_criticals(frac):
    kx, ky, m, e = 1.0e6, 1.6e6, 10.0, 2e-5
    lo, hi = cf.anisotropic_jeffcott_criticals(kx, ky, m)
    spin = lo + frac * (hi - lo)
    o = cf.anisotropic_jeffcott_unbalance_orbit(kx, ky, m, e, spin)
    assert o.sense == "backward"
    assert o.backward_radius > o.forward_radius
    # below both and above both criticals the orbit is forward
    assert cf.anisotropic_jeffcott_unbalance_orbit(kx, ky, m, e, frac * lo).sense == "forward"
    assert cf.anisotropic_jeffcott_unbalance_orbit(kx, ky, m, e, hi * (1 + 3 * frac)).sense == "forward"


def test_anisotropic_orbit_amplitudes_and_decomposition():
    kx, ky, m, e, spin = 1.0e6, 1.6e6, 10.0, 2e-5, 150.0
    o = cf.anisotropic_jeffcott_unbalance_orbit(kx, ky, m, e, spin)
    assert o.X == pytest.approx(m * e * spin ** 2 / (kx - m * spin ** 2), rel=1e-14)
    assert o.Y == pytest.approx(m * e * spin ** 2 / (ky - m * spin ** 2), rel=1e-14)
    t = np.linspace(0, 2 * math.pi / spin, 9)
    z = o.X * np.cos(spin * t) + 1j * o.Y * np.sin(spin * t)
    # x + i y = (X+Y)/2 e^{+i spin t} + (X-Y)/2 e^{-i spin t}
    zf = (o.X + o.Y) / 2 * np.exp(1j * spin * t) + (o.X - o.Y) / 2 * np.exp(-1j * spin * t)
    assert np.allclose(z, zf, rtol=0, atol=1e-15)
    assert o.forward_radius == pytest.approx(abs(o.X + o.Y) / 2)
    # far above both criticals the disk centre of mass stays put: X, Y -> -e
    o = cf.anisotropic_jeffcott_unbalance_orbit(kx, ky, m, e, 1e5)
    assert o.X == pytest.approx(-e, rel=1e-3) and o.Y == pytest.approx(-e, rel=1e-3)
    with pytest.raises(ValueError):
        cf.anisotropic_jeffcott_unbalance_orbit(kx, kx, m, e, math.sqrt(kx / m))
