"""Verification: uniform shafts against beam-theory closed forms.

Cases 1-3 of the verification plan:

1. Euler-Bernoulli shafts, pinned-pinned, free-free and clamped-free, against
   the characteristic equations of R. D. Blevins, "Formulas for Natural
   Frequency and Mode Shape", Van Nostrand Reinhold, 1979, Table 8-1.
2. A short thick simply supported shaft with shear and rotary inertia against
   the exact Timoshenko frequency equation of S. M. Han, H. Benaroya, T. Wei,
   "Dynamics of transversely vibrating beams using four engineering theories",
   J. Sound Vib. 225 (1999) 935-988, with Hutchinson's shear coefficient
   (J. R. Hutchinson, "Shear coefficients for Timoshenko beam theory",
   J. Appl. Mech. 68 (2001) 87-92).
3. A spinning simply supported Rayleigh shaft against the whirl and
   synchronous critical-speed formulas of M. I. Friswell, J. E. T. Penny,
   S. D. Garvey, A. W. Lees, "Dynamics of Rotating Machines", CUP 2010
   (continuous spinning shaft).

Equation, table and page numbers of all sources are quoted from memory (see
``docs/theory.md``).  The reference values come from ``closed_forms.py``.

Tolerances come from mesh convergence: each case is solved on several meshes,
the convergence rate is fitted and checked against the rate the element
should have, and the fine-mesh error is held to a bound a little above the
value measured when the test was written (the measured value is noted beside
each bound).
"""

import math

import numpy as np
import pytest

from rotorcalc.analysis.criticals import critical_speeds
from rotorcalc.analysis.modes import modes_at
from rotorcalc.analysis.sweep import sweep
from rotorcalc.assembly import assemble
from rotorcalc.fe.shaft import shear_coefficient
from tests.conftest import STEEL, isotropic, uniform_shaft
from tests.verification import closed_forms as cf
from tests.verification.record import check
from tests.verification.reduce import solve_reduced

BLEVINS = "Blevins 1979, Table 8-1 (from memory)"
HAN = "Han, Benaroya, Wei 1999, SS Timoshenko freq. eq. (from memory); Hutchinson 2001 kappa"
FRISWELL_SHAFT = "Friswell et al. 2010, spinning SS Rayleigh shaft (from memory)"
FIT = "fitted convergence rate"

E, G, RHO = STEEL.youngs_modulus, STEEL.shear_modulus, STEEL.density
NU = STEEL.poisson_ratio

#: "Pinned" bearing stiffness, N/m, for the slender shaft of case 1.  Its
#: compliance lowers the pinned frequencies by about 4 pi^2 EI/(L^3 k) / 2
#: = 1.3e-9 here (first-order estimate), a thousandth of the finest-mesh
#: error; test_matrix_invariants.py checks this shift and shows the error
#: of stiff bearings against exact pins falls as 1/k up to 1e18 N/m,
#: i.e. the stiff bearings do not spoil the conditioning.
PIN_SLENDER = 1e15
#: For the thick shafts of cases 2-3 the same compliance term is 1000 times
#: larger (EI/L^3), so a stiffer pin is used: 1e18 N/m gives about 1e-9.
PIN_THICK = 1e18


def section_properties(d_out, d_in=0.0):
    area = math.pi / 4.0 * (d_out**2 - d_in**2)
    second = math.pi / 64.0 * (d_out**4 - d_in**4)
    return area, second


def fitted_rate(elements, errors):
    """Least-squares slope of log(error) against log(1/elements) (error ~ h^p)."""
    h = 1.0 / np.asarray(elements, dtype=float)
    return float(np.polyfit(np.log(h), np.log(np.asarray(errors)), 1)[0])


def assert_plane_pair(vectors):
    """The two vectors of a degenerate pair span one x-plane and one y-plane mode.

    At zero speed the x-z and y-z planes are uncoupled and identical, so the
    x-parts of the pair are multiples of one shape (rank 1), likewise the
    y-parts, while the pair itself has rank 2.
    """
    v = vectors / np.linalg.norm(vectors, axis=0)
    dofs = np.arange(v.shape[0])
    x_rows = dofs[dofs % 4 % 2 == 0]      # x and a of every node
    y_rows = dofs[dofs % 4 % 2 == 1]      # y and b
    sx = np.linalg.svd(v[x_rows], compute_uv=False)
    sy = np.linalg.svd(v[y_rows], compute_uv=False)
    s = np.linalg.svd(v, compute_uv=False)
    assert sx[1] <= 1e-6 * sx[0] and sy[1] <= 1e-6 * sy[0], (sx, sy)
    assert s[1] >= 0.1 * s[0], s


# ---------------------------------------------------------------------------
# Case 1: Euler-Bernoulli shafts
# ---------------------------------------------------------------------------

L1, D1 = 1.0, 0.05
MESHES_EB = (8, 12, 16)

#: Finest-mesh (16 elements) relative frequency error bounds per mode.
#: Measured when written: pinned 1.03e-6, 1.64e-5, 8.28e-5; free-free
#: 5.24e-6, 3.93e-5, 1.49e-4; clamped-free 1.31e-7, 5.11e-6.
EB_FINE_TOL = {
    "pinned-pinned": (1.5e-6, 2.5e-5, 1.2e-4),
    "free-free": (8e-6, 6e-5, 2.2e-4),
    "clamped-free": (2e-7, 7e-6),
}
#: Blevins Table 8-1 digits (4 decimals, from memory); n pi for pinned.
BLEVINS_DIGITS = {
    "pinned-pinned": (math.pi, 2 * math.pi, 3 * math.pi),
    "free-free": (4.7300, 7.8532, 10.9956),
    "clamped-free": (1.8751, 4.6941),
}
#: A rigid-body eigenvalue of the free-free shaft is a double zero of the
#: state-space problem (a Jordan block), which roundoff splits by about
#: sqrt(eps) times the problem's scale; anything below this fraction of the
#: first flexible frequency is counted as rigid-body (measured up to 1.0e-5).
RIGID_FRACTION = 1e-4


def eb_flexible_modes(boundary, elements):
    """Flexible-mode frequencies (one per x/y pair) of one mesh, with checks."""
    n_flex = len(BLEVINS_DIGITS[boundary])
    if boundary == "pinned-pinned":
        rotor = uniform_shaft(L1, D1, elements, theory="euler-bernoulli",
                              bearings=[isotropic(0, PIN_SLENDER), isotropic(1, PIN_SLENDER)])
        m = modes_at(rotor, 0.0, 2 * n_flex)
        values, vectors, real, rigid = m.eigenvalues, m.vectors, m.real_eigenvalues, 0
    elif boundary == "free-free":
        rotor = uniform_shaft(L1, D1, elements, theory="euler-bernoulli")
        m = modes_at(rotor, 0.0, 2 * n_flex + 4)
        values, vectors, real = m.eigenvalues, m.vectors, m.real_eigenvalues
        rigid = m.rigid_body_modes
    else:  # clamped at station 0 by deleting the node's four DOFs
        rotor = uniform_shaft(L1, D1, elements, theory="euler-bernoulli")
        values, vectors, real = solve_reduced(assemble(rotor), np.arange(4), 0.0, 2 * n_flex)
        rigid = 0
    return values, vectors, real, rigid


@pytest.mark.parametrize("boundary", ["pinned-pinned", "free-free", "clamped-free"])
def test_euler_bernoulli_shaft(boundary):
    area, second = section_properties(D1)
    n_flex = len(BLEVINS_DIGITS[boundary])
    exact = np.array([cf.euler_bernoulli_frequency(boundary, n, E, second, RHO, area, L1)
                      for n in range(1, n_flex + 1)])
    errors = []
    for elements in MESHES_EB:
        values, vectors, real, rigid = eb_flexible_modes(boundary, elements)
        if boundary == "free-free":
            # The four rigid-body modes (x, y translation and tilt) are eight
            # zero state-space eigenvalues; the solver must report them as
            # rigid-body modes, not list them as tiny "frequencies".
            check(f"EB free-free, {elements} el.: rigid-body modes reported",
                  "4 rigid-body modes (theory)", 4, rigid, 0, kind="equal")
            small = np.abs(values) < RIGID_FRACTION * exact[0]
            small_real = np.abs(real) < RIGID_FRACTION * exact[0]
            check(f"EB free-free, {elements} el.: near-zero eigenvalues left in the lists",
                  "none (rigid-body modes are counted apart)", 0,
                  int(small.sum()) + int(small_real.sum()), 0, kind="equal")
        freq = values.imag[: 2 * n_flex]
        for k in range(n_flex):
            # each frequency appears twice: one x-plane and one y-plane mode
            check(f"EB {boundary}, {elements} el., mode {k + 1}: x/y pair frequencies",
                  "plane symmetry (theory)", freq[2 * k], freq[2 * k + 1], 1e-8)
            assert_plane_pair(vectors[:, 2 * k: 2 * k + 2])
        errors.append(np.abs(freq[0::2] / exact - 1.0))
    errors = np.array(errors)
    fine = MESHES_EB[-1]
    for k in range(n_flex):
        rate = fitted_rate(MESHES_EB, errors[:, k])
        # cubic Hermite elements: frequency error ~ h^4 (common FE theory)
        check(f"EB {boundary}, mode {k + 1}: convergence rate, {MESHES_EB} el.",
              f"{FIT}, cubic Hermite h^4", 4.0, rate, 0.5, kind="abs")
        computed = exact[k] * (1.0 + errors[-1, k])
        check(f"EB {boundary}, mode {k + 1}, {fine} el.: frequency (rad/s)", BLEVINS,
              exact[k], computed, EB_FINE_TOL[boundary][k])
        # beta_n L from the computed frequency against the printed digits
        beta_l = L1 * (computed**2 * RHO * area / (E * second)) ** 0.25
        check(f"EB {boundary}, mode {k + 1}, {fine} el.: beta L vs printed digits", BLEVINS,
              BLEVINS_DIGITS[boundary][k], beta_l,
              0.5e-4 + BLEVINS_DIGITS[boundary][k] * EB_FINE_TOL[boundary][k] / 2, kind="abs")


# ---------------------------------------------------------------------------
# Case 2: short thick Timoshenko shaft, simply supported, zero spin
# ---------------------------------------------------------------------------

MESHES_TIM = (8, 16, 32)
#: Finest-mesh (32 elements) relative error bounds per mode.  Measured when
#: written: solid 3.74e-5, 4.30e-4, 1.53e-3; hollow 6.82e-5, 6.76e-4, 2.16e-3.
TIM_FINE_TOL = {"solid": (5e-5, 6e-4, 2e-3), "hollow": (9e-5, 9e-4, 2.8e-3)}
#: Bound on the Richardson-extrapolated error (16 and 32 elements, p = 2).
#: What remains is the next (h^4) term of the error.  Measured when written:
#: solid 1.95e-7, 1.76e-6, 5.13e-6; hollow 1.55e-7, 1.04e-6, 3.25e-6.
TIM_RICHARDSON_TOL = {"solid": (3e-7, 2.5e-6, 7e-6), "hollow": (2.5e-7, 1.5e-6, 4.5e-6)}

TIMOSHENKO_CASES = {
    # name: (length, outer diameter, inner diameter); L/D = 4 for both
    "solid": (0.3, 0.075, 0.0),
    "hollow": (0.4, 0.1, 0.06),
}


@pytest.mark.parametrize("name", sorted(TIMOSHENKO_CASES))
def test_timoshenko_thick_shaft(name):
    length, d_out, d_in = TIMOSHENKO_CASES[name]
    area, second = section_properties(d_out, d_in)
    kappa = cf.shear_coefficient_hutchinson(NU, d_out, d_in)
    check(f"Timoshenko {name}: shear coefficient (package vs reference)",
          "Hutchinson 2001 (from memory)", kappa, shear_coefficient(NU, d_out, d_in), 1e-12)
    first, second_spectrum = cf.timoshenko_simply_supported_spectra(
        E, G, kappa, RHO, area, second, length, 3)
    euler = np.array([cf.euler_bernoulli_frequency("pinned-pinned", n, E, second, RHO, area,
                                                   length) for n in (1, 2, 3)])
    # a thick shaft: shear and rotary inertia lower mode 1 by more than 5 %
    assert first[0] < 0.95 * euler[0]
    freqs = []
    for elements in MESHES_TIM:
        rotor = uniform_shaft(length, d_out, elements, theory="timoshenko", inner=d_in,
                              bearings=[isotropic(0, PIN_THICK), isotropic(1, PIN_THICK)])
        f = modes_at(rotor, 0.0, 6).frequency
        # the six lowest are the flexural pairs n = 1..3, all below the
        # second (shear) spectrum
        assert f[-1] < second_spectrum[0]
        np.testing.assert_allclose(f[1::2], f[0::2], rtol=1e-8)
        freqs.append(f[0::2])
    freqs = np.array(freqs)
    errors = np.abs(freqs / first - 1.0)
    for k in range(3):
        rate = fitted_rate(MESHES_TIM, errors[:, k])
        # Nelson's element interpolates the shear strain as a constant per
        # element, so in a thick shaft the frequency error falls as h^2, not
        # h^4 (see the verification report); the rate must be 2.
        check(f"Timoshenko {name}, mode {k + 1}: convergence rate, {MESHES_TIM} el.",
              f"{FIT}, constant shear strain h^2", 2.0, rate, 0.2, kind="abs")
        check(f"Timoshenko {name}, mode {k + 1}, {MESHES_TIM[-1]} el.: frequency (rad/s)", HAN,
              first[k], freqs[-1, k], TIM_FINE_TOL[name][k])
        # The limit the mesh converges to must be the exact frequency:
        # Richardson extrapolation with the fitted order removes the h^2 term.
        extrapolated = freqs[-1, k] + (freqs[-1, k] - freqs[-2, k]) / (2.0**2 - 1.0)
        check(f"Timoshenko {name}, mode {k + 1}: Richardson limit 16/32 el. (rad/s)", HAN,
              first[k], extrapolated, TIM_RICHARDSON_TOL[name][k])


# ---------------------------------------------------------------------------
# Case 3: spinning simply supported Rayleigh shaft
# ---------------------------------------------------------------------------

#: L/D = 3: rotary inertia rho I k^2 / rho A is 7 % (n = 1) and 27 % (n = 2),
#: so the gyroscopic splitting is large; both forward criticals exist.
L3, D3 = 0.6, 0.2
MESHES_RAY = (6, 9, 12)
SPEEDS_RAY = np.linspace(0.0, 3.6e4, 25)   # rad/s, beyond the mode-2 forward critical
#: Finest-mesh (12 elements) bounds, relative.  Measured when written: whirl
#: frequencies over the sweep, mode 1 3.25e-6 (forward), 4.29e-6 (backward),
#: mode 2 5.17e-5 (forward), 6.67e-5 (backward); criticals: mode 1 3.25e-6
#: (both), mode 2 5.19e-5 (forward), 5.16e-5 (backward).
RAY_WHIRL_TOL = {1: 5e-6, 2: 8e-5}
RAY_CRITICAL_TOL = {(1, "forward"): 4.5e-6, (1, "backward"): 4.5e-6,
                    (2, "forward"): 7e-5, (2, "backward"): 7e-5}


def rayleigh_system(elements):
    rotor = uniform_shaft(L3, D3, elements, theory="rayleigh",
                          bearings=[isotropic(0, PIN_THICK), isotropic(1, PIN_THICK)])
    return assemble(rotor)


def test_rayleigh_spinning_shaft_convergence():
    """Whirl frequencies at the top speed converge as h^4 to the closed form."""
    area, second = section_properties(D3)
    spin = SPEEDS_RAY[-1]
    exact = []
    for n in (1, 2):
        fw, bw = cf.rayleigh_spinning_ss_whirl(E, second, RHO, area, L3, n, spin)
        exact += [bw, fw]
    exact = np.array(exact)          # ascending: 1b, 1f, 2b, 2f at this speed
    errors = []
    for elements in MESHES_RAY:
        m = modes_at(rayleigh_system(elements), spin, 4)
        assert m.whirl == ["backward", "forward", "backward", "forward"]
        errors.append(np.abs(m.frequency / exact - 1.0))
    errors = np.array(errors)
    for k, label in enumerate(("1 backward", "1 forward", "2 backward", "2 forward")):
        rate = fitted_rate(MESHES_RAY, errors[:, k])
        check(f"Rayleigh spinning, mode {label} at {spin:.0f} rad/s: convergence rate, "
              f"{MESHES_RAY} el.", f"{FIT}, cubic Hermite h^4", 4.0, rate, 0.5, kind="abs")


def test_rayleigh_spinning_shaft_whirl_and_criticals():
    area, second = section_properties(D3)
    system = rayleigh_system(MESHES_RAY[-1])
    result = sweep(system, SPEEDS_RAY, 6)
    zero = result.frequency[0]
    for n in (1, 2):
        fw, bw = cf.rayleigh_spinning_ss_whirl(E, second, RHO, area, L3, n, SPEEDS_RAY)
        for whirl, exact in (("forward", fw), ("backward", bw)):
            # the branch starting at this mode's zero-speed frequency with this whirl
            candidates = [j for j in range(zero.size)
                          if abs(zero[j] / exact[0] - 1.0) < 1e-3
                          and result.branch_whirl[j] == whirl]
            check(f"Rayleigh spinning, mode {n} {whirl}: tracked branch found",
                  "sweep tracking (theory: one branch each)", 1, len(candidates), 0,
                  kind="equal")
            j = candidates[0]
            labels = set(result.whirl[1:, j])   # speed 0 excluded: degenerate pair
            check(f"Rayleigh spinning, mode {n} {whirl}: whirl label over the sweep",
                  FRISWELL_SHAFT, whirl, "/".join(sorted(labels)), 0, kind="equal")
            err = np.abs(result.frequency[:, j] / exact - 1.0).max()
            check(f"Rayleigh spinning, mode {n} {whirl}, {MESHES_RAY[-1]} el.: max rel. error "
                  f"of whirl frequency over 0-{SPEEDS_RAY[-1]:.0f} rad/s", FRISWELL_SHAFT,
                  0.0, err, RAY_WHIRL_TOL[n], kind="abs")

    found = critical_speeds(system, result)
    for n in (1, 2):
        for whirl in ("forward", "backward"):
            exact = cf.rayleigh_spinning_ss_critical(E, second, RHO, area, L3, n, whirl)
            same = [c for c in found if c.whirl == whirl]
            nearest = min(same, key=lambda c: abs(c.speed - exact))
            check(f"Rayleigh spinning, mode {n} {whirl}, {MESHES_RAY[-1]} el.: "
                  f"1X critical speed (rad/s)", FRISWELL_SHAFT, exact, nearest.speed,
                  RAY_CRITICAL_TOL[(n, whirl)])
