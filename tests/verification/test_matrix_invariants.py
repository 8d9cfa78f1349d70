"""Verification case 8: structural invariants of the matrices and the eigenproblem.

* M, K(spin) and C(spin) are symmetric when the bearings are; G is
  skew-symmetric (energy arguments: kinetic and strain energy are quadratic
  forms, gyroscopic forces do no work; e.g. Friswell et al., "Dynamics of
  Rotating Machines", CUP 2010, ch. 5, from memory).
* The state-space pencil is real, so its eigenvalues are real or come in
  conjugate pairs, and the solver's modes satisfy the quadratic eigenproblem.
* On isotropic supports at zero speed, forward and backward modes coincide.
* The stiff "pinned" bearings used in the verification cases do not spoil
  the conditioning: their effect falls as 1/k (first-order compliance) up to
  1e18 N/m.
* The scaled pencil of ``rotorcalc.solvers`` against a naive unscaled one.
"""

import math

import numpy as np
import pytest
import scipy.linalg as la

from rotorcalc.analysis.modes import modes_at
from rotorcalc.assembly import assemble
from rotorcalc.model import (Bearing, Disk, OperatingRange, Rotor, Section, Settings,
                             Support)
from rotorcalc.solvers import DenseSolver, scaled_pencil
from tests.conftest import STEEL, disk_at_mid_span, isotropic, uniform_shaft
from tests.verification import closed_forms as cf
from tests.verification.record import check

THEORY = "theory (energy / real matrices)"


def general_rotor(cross=(0.0, 0.0), speed_table=False):
    """Three sections (one hollow), two disks, two damped bearings, one on a pedestal.

    ``cross`` = (kxy, kyx) of the first bearing.
    """
    sections = (Section(0.2, 0.06, STEEL, elements=3), Section(0.5, 0.09, STEEL, 0.03, elements=5),
                Section(0.3, 0.05, STEEL, elements=3))
    disks = (Disk(1, 30.0, 0.6, 0.35), Disk(2, 12.0, 0.2, 0.12))
    b1 = Bearing(0, {"kxx": (2e8,), "kyy": (3e8,), "kxy": (cross[0],), "kyx": (cross[1],),
                     "cxx": (2e3,), "cyy": (3e3,), "cxy": (4e2,), "cyx": (4e2,)})
    b2 = Bearing(3, {"kxx": (1e8,), "kyy": (1e8,), "cxx": (1e3,), "cyy": (1e3,)},
                 support=Support(kx=5e8, ky=6e8, mass=40.0, cx=2e3, cy=2e3))
    return Rotor(sections, OperatingRange(100.0, 200.0), disks=disks, bearings=(b1, b2),
                 settings=Settings(beam_theory="timoshenko", mode_count=8))


def relative_asymmetry(mat, sign=1.0):
    dense = mat.toarray()
    return np.abs(dense - sign * dense.T).max() / np.abs(dense).max()


def test_matrix_symmetries():
    system = assemble(general_rotor(cross=(5e7, 5e7)))
    spin = 800.0
    for name, mat, sign in (("M", system.mass, 1.0), ("K(spin)", system.stiffness(spin), 1.0),
                            ("C(spin)", system.damping(spin), 1.0),
                            ("G", system.gyroscopic, -1.0)):
        kind = "skew-symmetry" if sign < 0 else "symmetry"
        check(f"Invariants: {name} {kind}, max |A -/+ A^T| / max |A|", THEORY, 0.0,
              relative_asymmetry(mat, sign), 1e-14, kind="abs")
    # the check can see asymmetry: a cross-coupled bearing (kxy = -kyx)
    skewed = assemble(general_rotor(cross=(5e7, -5e7)))
    assert relative_asymmetry(skewed.stiffness(spin)) > 1e-3


def test_eigenvalues_conjugate_pairs_and_residuals():
    system = assemble(general_rotor(cross=(5e7, -3e7)))   # non-symmetric, damped, spinning
    spin = 900.0
    m, d, k = system.mass, system.damping(spin) + spin * system.gyroscopic, system.stiffness(spin)
    a, b, _, _ = scaled_pencil(m, d, k)
    assert np.isrealobj(a) and np.isrealobj(b)
    values = la.eig(a, b, right=False)
    values = values[np.isfinite(values)]
    assert values.size == 2 * system.n_dof       # M is positive definite: no infinite ones
    # every eigenvalue has its conjugate in the spectrum
    gap = max(np.min(np.abs(values - np.conj(v))) / abs(v) for v in values)
    check("Invariants: eigenvalues in conjugate pairs, max rel. gap", THEORY, 0.0, gap,
          1e-10, kind="abs")
    # the solver returns every pair once (Im > 0) and the real ones apart
    pairs = DenseSolver()(m, d, k, system.n_dof)
    count = 2 * pairs.values.size + pairs.real_eigenvalues.size
    check("Invariants: solver modes x 2 + real eigenvalues = state size", THEORY,
          2 * system.n_dof, count, 0, kind="equal")
    # and each (lambda, q) solves (lambda^2 M + lambda D + K) q = 0
    md, dd, kd = m.toarray(), d.toarray(), k.toarray()
    worst = 0.0
    for lam, q in zip(pairs.values[:12], pairs.vectors[:, :12].T):
        r = (lam**2 * md + lam * dd + kd) @ q
        scale = (abs(lam)**2 * la.norm(md, 2) + abs(lam) * la.norm(dd, 2) + la.norm(kd, 2))
        worst = max(worst, la.norm(r) / (scale * la.norm(q)))
    check("Invariants: quadratic residual of the 12 lowest modes (backward error)", THEORY,
          0.0, worst, 1e-12, kind="abs")


def test_forward_equals_backward_at_zero_speed():
    rotor = uniform_shaft(1.2, 0.07, 12, theory="timoshenko",
                          disks=[Disk(0, 8.0, 0.1, 0.06), Disk(1, 20.0, 0.5, 0.3)],
                          bearings=[isotropic(0, 5e7, 3e3), isotropic(1, 8e7, 3e3)])
    system = assemble(rotor)
    still = modes_at(system, 0.0, 8)
    split = max(abs(still.frequency[2 * j + 1] / still.frequency[2 * j] - 1.0) for j in range(4))
    check("Invariants: zero speed, isotropic: forward = backward frequency, max rel. diff.",
          THEORY, 0.0, split, 1e-9, kind="abs")
    dec = max(abs(still.log_dec[2 * j + 1] - still.log_dec[2 * j]) for j in range(4))
    check("Invariants: zero speed, isotropic: forward = backward log dec., max abs. diff.",
          THEORY, 0.0, dec, 1e-9, kind="abs")
    # and the pairs do split once the rotor spins (the check discriminates)
    spinning = modes_at(system, 1500.0, 2)
    assert spinning.whirl == ["backward", "forward"]
    assert spinning.frequency[1] > spinning.frequency[0] * (1.0 + 1e-3)


# ---------------------------------------------------------------------------
# Stiff bearings as pins, and the scaled pencil
# ---------------------------------------------------------------------------

def pinned_reference(rotor, n):
    """Lowest frequencies with the end translations deleted (exact pins)."""
    system = assemble(rotor)
    last = system.mesh.station_nodes[-1]
    keep = np.setdiff1d(np.arange(system.n_dof), [0, 1, 4 * last, 4 * last + 1])
    kk = system.stiffness(0.0).toarray()[np.ix_(keep, keep)]
    mm = system.mass.toarray()[np.ix_(keep, keep)]
    return np.sqrt(la.eigh(kk, mm, eigvals_only=True, subset_by_index=[0, n - 1]))


STIFF_RANGE = (1e14, 1e15, 1e16, 1e17, 1e18)


def test_stiff_bearings_converge_to_pins():
    """A thick shaft (L/D = 3, the case-3 shaft): bearing minus pin ~ 1/k up to 1e18."""
    def rotor(bearings=()):
        return uniform_shaft(0.6, 0.2, 12, theory="rayleigh", bearings=bearings)
    pins = pinned_reference(rotor(), 4)[0::2]          # one per x/y pair
    diffs = []
    for kb in STIFF_RANGE:
        f = modes_at(rotor([isotropic(0, kb), isotropic(1, kb)]), 0.0, 4).frequency[0::2]
        diffs.append(np.abs(f / pins - 1.0))
    diffs = np.array(diffs)
    for k in range(2):
        slope = float(np.polyfit(np.log(STIFF_RANGE), np.log(diffs[:, k]), 1)[0])
        check(f"Stiff bearings vs pins, thick shaft mode {k + 1}: slope of log diff. vs log k, "
              f"k = 1e14..1e18", "first-order compliance ~ 1/k (theory)", -1.0, slope, 0.02,
              kind="abs")
    # slender shaft of case 1 at its pin stiffness: the first-order estimate
    # of the shift is 4 pi^2 EI / (L^3 k) / 2 for mode 1
    slender = uniform_shaft(1.0, 0.05, 16, theory="euler-bernoulli")
    pin1 = pinned_reference(slender, 1)[0]
    ei = STEEL.youngs_modulus * math.pi * 0.05**4 / 64
    estimate = 2 * math.pi**2 * ei / (1.0**3 * 1e15)
    f1 = modes_at(uniform_shaft(1.0, 0.05, 16, theory="euler-bernoulli",
                                bearings=[isotropic(0, 1e15), isotropic(1, 1e15)]), 0.0, 1)
    check("Stiff bearings vs pins, slender shaft 1e15 N/m: mode 1 shift", "first-order "
          "compliance estimate (theory)", estimate, 1.0 - f1.frequency[0] / pin1, 0.1)


def naive_pencil(m, d, k):
    n = m.shape[0]
    zero, eye = np.zeros((n, n)), np.eye(n)
    return (np.block([[zero, eye], [-k.toarray(), -d.toarray()]]),
            np.block([[eye, zero], [zero, m.toarray()]]))


def lowest(values, n):
    values = values[np.isfinite(values)]
    return np.sort(values[values.imag > 0].imag)[:n]


@pytest.mark.parametrize("kb", [1e12, 1e15, 1e18])
def test_scaled_pencil_keeps_digits(kb):
    """Low eigenvalues of a pinned slender shaft (bearings of stiffness kb).

    Reference: the flexibility form K^-1 M, whose largest eigenvalues
    1/w^2 are the lowest modes and are obtained to near machine precision
    relative to themselves (symmetric-definite, ``scipy.linalg.eigh(M, K)``).
    """
    rotor = uniform_shaft(1.0, 0.05, 10, theory="euler-bernoulli",
                          bearings=[isotropic(0, kb), isotropic(1, kb)])
    system = assemble(rotor)
    m, k, d = system.mass, system.stiffness(0.0), system.damping(0.0)
    mu = la.eigh(m.toarray(), k.toarray(), eigvals_only=True)
    ref = np.sort(1.0 / np.sqrt(mu[mu > 0]))[:4]
    a, b, _, _ = scaled_pencil(m, d, k)
    scaled = np.abs(lowest(la.eig(a, b, right=False), 4) / ref - 1.0).max()
    naive = np.abs(lowest(la.eig(*naive_pencil(m, d, k), right=False), 4) / ref - 1.0).max()
    production = np.abs(DenseSolver()(m, d, k, 4).values.imag / ref - 1.0).max()
    source = "flexibility-form reference (eigh(M, K))"
    check(f"Scaled pencil (QZ), pins {kb:.0e} N/m: max rel. error of 4 lowest", source, 0.0,
          scaled, max(naive, 1e-8), kind="abs")
    check(f"Naive pencil (QZ), pins {kb:.0e} N/m: max rel. error of 4 lowest", source, 0.0,
          naive, 1e-5, kind="abs")
    check(f"DenseSolver (scaled, Cholesky), pins {kb:.0e} N/m: max rel. error of 4 lowest",
          source, 0.0, production, 1e-9, kind="abs")
    if kb >= 1e18:
        # where the contrast is extreme, scaling must pay off
        assert scaled <= naive




def test_solver_keeps_low_mode_under_extreme_stiffness_contrast():
    """Regression: an oscillation threshold relative to the spectrum's largest eigenvalue
    (603 rad/s here) once dropped the 394 rad/s disk mode; it is now relative to each
    eigenvalue's own magnitude."""
    rotor = disk_at_mid_span(20.0, (isotropic(0, 1e17), isotropic(2, 1e17)), mode_count=2)
    k_shaft = cf.simply_supported_midspan_stiffness(STEEL.youngs_modulus,
                                                    math.pi * 0.05**4 / 64, 1.0)
    exact = cf.jeffcott_critical_flexible_supports(k_shaft, 1e17, 20.0)
    assert modes_at(rotor, 0.0, 2).frequency[0] == pytest.approx(exact, rel=1e-6)
