"""Closed-form reference solutions for the verification tests of rotorcalc.

This module is deliberately independent of the ``rotorcalc`` package: it uses
only numpy (scipy is not imported, to keep the self-tests fast), and every
result is either an explicit closed form or the root/eigenvalue of a small
characteristic polynomial written out here.  The finite-element code is checked against these functions, so nothing in
here may import from ``rotorcalc``.

Conventions (see ``docs/theory.md``, section 1)
------------------------------------------------
* SI units throughout: m, kg, s, N, rad/s.
* Shaft axis z; lateral translations x, y; tilts are slopes a = dx/dz,
  b = dy/dz.
* Spin ``spin`` (Omega) > 0 is counter-clockwise about +z (from +x to +y).
* Rigid-disk gyroscopic block on (a, b) is Ip*[[0, 1], [-1, 0]], so the
  a-equation reads ``Id a'' + Ip Omega b' + ...``.
* Forward whirl: orbit x + i y = r exp(+i w t) with w > 0.  Every whirl
  frequency returned here is a positive number, labelled forward or backward.
* Eigenvalue lambda = -zeta wn + i wd; log decrement
  delta = -2 pi Re(lambda) / Im(lambda) (positive = stable).

Sources
-------
Each function names its published source in its docstring.  None of the
printed sources was at hand while this module was written: formulas were
derived again (see ``docs/theory.md``, section "Closed forms used for
verification") and the citations, equation/table numbers and any tabulated
digits are quoted *from memory*.  Where this matters, the docstring says so.
"""

from __future__ import annotations

import math
from typing import NamedTuple

import numpy as np

__all__ = [
    "BOUNDARIES",
    "euler_bernoulli_characteristic",
    "euler_bernoulli_beta_l",
    "euler_bernoulli_frequency",
    "shear_coefficient_cowper",
    "shear_coefficient_hutchinson",
    "timoshenko_simply_supported_spectra",
    "timoshenko_simply_supported_frequencies",
    "timoshenko_simply_supported_second_spectrum",
    "rayleigh_spinning_ss_whirl",
    "rayleigh_spinning_ss_critical",
    "simply_supported_midspan_stiffness",
    "cantilever_tip_stiffness",
    "jeffcott_critical_rigid",
    "series_stiffness_two_bearings",
    "jeffcott_critical_flexible_supports",
    "JeffcottDamped",
    "jeffcott_damped",
    "damping_ratio",
    "log_decrement_from_damping_ratio",
    "log_decrement",
    "jeffcott_damped_bearings_polynomial",
    "jeffcott_damped_bearings_eigenvalues",
    "gyroscopic_2dof_polynomial",
    "gyroscopic_2dof_whirl",
    "gyroscopic_2dof_critical",
    "overhung_disk_whirl",
    "overhung_disk_critical",
    "rigid_rotor_stiffness",
    "rigid_rotor_whirl",
    "rigid_rotor_critical",
    "anisotropic_jeffcott_criticals",
    "AnisotropicOrbit",
    "anisotropic_jeffcott_unbalance_orbit",
]


# ---------------------------------------------------------------------------
# Small validation helpers
# ---------------------------------------------------------------------------

def _positive(name, value):
    value = float(value)
    if not (value > 0.0 and math.isfinite(value)):
        raise ValueError(f"{name} must be a positive finite number, got {value!r}")
    return value


def _nonnegative(name, value):
    value = float(value)
    if not (value >= 0.0 and math.isfinite(value)):
        raise ValueError(f"{name} must be a non-negative finite number, got {value!r}")
    return value


def _mode_number(n):
    if isinstance(n, bool) or int(n) != n or int(n) < 1:
        raise ValueError(f"mode number n must be an integer >= 1, got {n!r}")
    return int(n)


def _bisect(f, lo, hi):
    """Root of ``f`` in ``[lo, hi]`` by bisection, to machine precision.

    ``f(lo)`` and ``f(hi)`` must differ in sign.  Robust and, at about 55
    halvings for a bracket of width pi, cheap enough for reference use.
    """
    flo, fhi = f(lo), f(hi)
    if flo == 0.0:
        return lo
    if fhi == 0.0:
        return hi
    if (flo > 0.0) == (fhi > 0.0):
        raise ValueError("root is not bracketed")
    for _ in range(200):
        mid = 0.5 * (lo + hi)
        if mid <= lo or mid >= hi:
            break
        fmid = f(mid)
        if fmid == 0.0:
            return mid
        if (fmid > 0.0) == (flo > 0.0):
            lo, flo = mid, fmid
        else:
            hi = mid
    return 0.5 * (lo + hi)


def _whirl_name(whirl):
    w = str(whirl).strip().lower()
    if w in ("forward", "fw", "f"):
        return "forward"
    if w in ("backward", "bw", "b"):
        return "backward"
    raise ValueError(f"whirl must be 'forward' or 'backward', got {whirl!r}")


# ---------------------------------------------------------------------------
# Euler-Bernoulli beams
# ---------------------------------------------------------------------------

#: Boundary conditions understood by :func:`euler_bernoulli_beta_l`.
BOUNDARIES = ("pinned-pinned", "free-free", "clamped-free", "clamped-clamped")


def _normalise_boundary(boundary):
    b = str(boundary).strip().lower().replace("_", "-").replace(" ", "-")
    aliases = {
        "simply-supported": "pinned-pinned",
        "free-clamped": "clamped-free",
        "cantilever": "clamped-free",
    }
    b = aliases.get(b, b)
    if b not in BOUNDARIES:
        raise ValueError(f"unknown boundary {boundary!r}; expected one of {BOUNDARIES}")
    return b


def euler_bernoulli_characteristic(boundary, x):
    """Scaled characteristic function of a uniform Euler-Bernoulli beam.

    Returns a function ``f(x)`` of ``x = beta*L`` whose positive zeros are the
    eigenvalues ``beta_n*L``.  The hyperbolic terms are divided by ``cosh x``
    so that the function stays of order one for large ``x``:

    * pinned-pinned:   ``sin x = 0``
    * free-free and clamped-clamped: ``cos x cosh x = 1``
      -> ``f = cos x - 1/cosh x``
    * clamped-free:    ``cos x cosh x = -1`` -> ``f = cos x + 1/cosh x``

    Source: R. D. Blevins, "Formulas for Natural Frequency and Mode Shape",
    Van Nostrand Reinhold, 1979, Table 8-1 (characteristic equations; table
    number from memory).

    Parameters
    ----------
    boundary : str
        One of :data:`BOUNDARIES`.
    x : float or array_like
        Value(s) of ``beta*L``.

    Returns
    -------
    float or ndarray
        Value of the scaled characteristic function.
    """
    b = _normalise_boundary(boundary)
    x = np.asarray(x, dtype=float)
    if b == "pinned-pinned":
        out = np.sin(x)
    elif b == "clamped-free":
        out = np.cos(x) + 1.0 / np.cosh(x)
    else:  # free-free, clamped-clamped
        out = np.cos(x) - 1.0 / np.cosh(x)
    return out[()] if out.ndim == 0 else out


def euler_bernoulli_beta_l(boundary, n):
    """Eigenvalue ``beta_n * L`` of a uniform Euler-Bernoulli beam.

    The root is found numerically (bisection to machine precision, see
    :func:`_bisect`) in a bracket of width pi that contains exactly one zero of the characteristic
    function of :func:`euler_bernoulli_characteristic`; no value is typed in.

    * pinned-pinned: bracket ``[(n - 1/2) pi, (n + 1/2) pi]`` (root ``n pi``).
    * clamped-free: bracket ``[(n - 1) pi, n pi]``.
    * free-free / clamped-clamped: bracket ``[n pi, (n + 1) pi]``.  For the
      free-free beam ``n = 1`` is the first *flexible* mode; the two rigid-body
      modes (``beta = 0``) are not counted.

    Tabulated values for comparison (R. D. Blevins, "Formulas for Natural
    Frequency and Mode Shape", Van Nostrand Reinhold, 1979, Table 8-1; the
    digits are quoted from memory, not read from the book):

    * free-free and clamped-clamped: 4.7300, 7.8532, 10.9956, ...
    * clamped-free: 1.8751, 4.6941, 7.8548, 10.9955, ...
    * pinned-pinned: n pi.

    Parameters
    ----------
    boundary : str
        ``"pinned-pinned"``, ``"free-free"``, ``"clamped-free"`` or
        ``"clamped-clamped"``.
    n : int
        Mode number, ``n >= 1``.

    Returns
    -------
    float
        ``beta_n * L`` (dimensionless).
    """
    b = _normalise_boundary(boundary)
    n = _mode_number(n)
    if b == "pinned-pinned":
        lo, hi = (n - 0.5) * math.pi, (n + 0.5) * math.pi
    elif b == "clamped-free":
        lo, hi = (n - 1.0) * math.pi, n * math.pi
    else:
        lo, hi = n * math.pi, (n + 1.0) * math.pi

    def f(x):
        return float(euler_bernoulli_characteristic(b, x))

    return _bisect(f, lo, hi)


def euler_bernoulli_frequency(boundary, n, E, I, rho, A, L):
    """Natural frequency (rad/s) of mode ``n`` of a uniform Euler-Bernoulli beam.

    ``w_n = (beta_n L)^2 * sqrt(E I / (rho A L^4))``

    Source: R. D. Blevins, "Formulas for Natural Frequency and Mode Shape",
    Van Nostrand Reinhold, 1979, Table 8-1 (from memory as to the table
    number).  ``beta_n L`` from :func:`euler_bernoulli_beta_l`.

    Parameters
    ----------
    boundary : str
        See :func:`euler_bernoulli_beta_l`.
    n : int
        Mode number, ``n >= 1``.
    E : float
        Young's modulus (Pa).
    I : float
        Second moment of area of the section (m^4).
    rho : float
        Density (kg/m^3).
    A : float
        Section area (m^2).
    L : float
        Beam length (m).

    Returns
    -------
    float
        Natural frequency in rad/s.
    """
    E, I, rho, A, L = (_positive(k, v) for k, v in
                       (("E", E), ("I", I), ("rho", rho), ("A", A), ("L", L)))
    bl = euler_bernoulli_beta_l(boundary, n)
    return bl ** 2 * math.sqrt(E * I / (rho * A * L ** 4))


# ---------------------------------------------------------------------------
# Shear coefficients of circular sections
# ---------------------------------------------------------------------------

def _diameter_ratio(d_out, d_in):
    d_out = _positive("d_out", d_out)
    d_in = _nonnegative("d_in", d_in)
    if d_in >= d_out:
        raise ValueError("d_in must be smaller than d_out")
    return d_in / d_out


def _poisson(nu):
    nu = float(nu)
    if not (-1.0 < nu < 0.5 + 1e-12):
        raise ValueError(f"Poisson ratio must lie in (-1, 0.5], got {nu!r}")
    return nu


def shear_coefficient_cowper(nu, d_out, d_in=0.0):
    """Timoshenko shear coefficient of a (hollow) circular section, Cowper.

    With ``m = d_in / d_out``::

        kappa = 6 (1 + nu) (1 + m^2)^2
                / ((7 + 6 nu) (1 + m^2)^2 + (20 + 12 nu) m^2)

    which reduces to ``6 (1 + nu) / (7 + 6 nu)`` for the solid circle
    (``m = 0``) and to ``2 (1 + nu) / (4 + 3 nu)`` for a thin-walled tube
    (``m -> 1``).

    Source: G. R. Cowper, "The shear coefficient in Timoshenko's beam
    theory", J. Appl. Mech. 33 (1966) 335-340, Table 1 (solid and hollow
    circle; page and table numbers from memory, formula recalled from memory).

    Parameters
    ----------
    nu : float
        Poisson's ratio.
    d_out : float
        Outer diameter (m).
    d_in : float, optional
        Inner diameter (m), ``0 <= d_in < d_out``.  Default 0 (solid).

    Returns
    -------
    float
        Shear coefficient kappa (dimensionless).
    """
    nu = _poisson(nu)
    m = _diameter_ratio(d_out, d_in)
    m2 = m * m
    s = (1.0 + m2) ** 2
    return 6.0 * (1.0 + nu) * s / ((7.0 + 6.0 * nu) * s + (20.0 + 12.0 * nu) * m2)


def shear_coefficient_hutchinson(nu, d_out, d_in=0.0):
    """Timoshenko shear coefficient of a (hollow) circular section, Hutchinson.

    With outer radius ``a`` and inner radius ``b``::

        kappa = 6 (a^2 + b^2)^2 (1 + nu)^2
                / ( 7 a^4 + 34 a^2 b^2 + 7 b^4
                  + nu   (12 a^4 + 48 a^2 b^2 + 12 b^4)
                  + nu^2 ( 4 a^4 + 16 a^2 b^2 +  4 b^4) )

    which reduces to ``6 (1 + nu)^2 / (7 + 12 nu + 4 nu^2)`` for the solid
    circle (``b = 0``) and to ``(1 + nu) / (2 + nu)`` for a thin-walled tube
    (``b -> a``).  Only the ratio ``b/a = d_in/d_out`` matters.

    Source: J. R. Hutchinson, "Shear coefficients for Timoshenko beam
    theory", J. Appl. Mech. 68 (2001) 87-92 (circular and hollow circular
    sections; the expression and the page numbers are recalled from memory).

    Parameters
    ----------
    nu : float
        Poisson's ratio.
    d_out : float
        Outer diameter (m).
    d_in : float, optional
        Inner diameter (m), ``0 <= d_in < d_out``.  Default 0 (solid).

    Returns
    -------
    float
        Shear coefficient kappa (dimensionless).
    """
    nu = _poisson(nu)
    r = _diameter_ratio(d_out, d_in)       # b/a, with a = 1
    a2, b2 = 1.0, r * r
    a4, b4, ab = a2 * a2, b2 * b2, a2 * b2
    num = 6.0 * (a2 + b2) ** 2 * (1.0 + nu) ** 2
    den = ((7.0 * a4 + 34.0 * ab + 7.0 * b4)
           + nu * (12.0 * a4 + 48.0 * ab + 12.0 * b4)
           + nu ** 2 * (4.0 * a4 + 16.0 * ab + 4.0 * b4))
    return num / den


# ---------------------------------------------------------------------------
# Simply supported Timoshenko beam
# ---------------------------------------------------------------------------

def timoshenko_simply_supported_spectra(E, G, kappa, rho, A, I, L, n_modes):
    """Both frequency spectra of a simply supported uniform Timoshenko beam.

    With ``w(z) = W sin(k z)``, ``psi(z) = Psi cos(k z)``, ``k = n pi / L``
    (these satisfy w = 0 and bending moment EI psi' = 0 at both ends), the
    Timoshenko equations give for each n the quadratic in ``w^2``::

        (rho A)(rho I) w^4
          - [ rho A kappa G A + (rho A E I + rho I kappa G A) k^2 ] w^2
          + kappa G A E I k^4 = 0

    whose smaller root is the first (flexural) spectrum and the larger root
    the second (shear) spectrum.  The smaller root is evaluated as
    ``2c / (b + sqrt(b^2 - 4ac))`` to avoid cancellation for slender beams.

    Source: S. M. Han, H. Benaroya, T. Wei, "Dynamics of transversely
    vibrating beams using four engineering theories", J. Sound Vib. 225 (1999)
    935-988, simply supported Timoshenko frequency equation (the paper writes
    it in dimensionless form; the equation number is not recalled -- from
    memory).  Re-derived in docs/theory.md.

    Parameters
    ----------
    E, G : float
        Young's and shear moduli (Pa).
    kappa : float
        Shear coefficient (e.g. :func:`shear_coefficient_cowper`).
    rho : float
        Density (kg/m^3).
    A : float
        Section area (m^2).
    I : float
        Second moment of area (m^4), also used for the rotary inertia rho*I.
    L : float
        Span between the simple supports (m).
    n_modes : int
        Number of mode numbers n = 1..n_modes.

    Returns
    -------
    first, second : ndarray, shape (n_modes,)
        First-spectrum and second-spectrum natural frequencies in rad/s for
        n = 1..n_modes.
    """
    E, G, kappa, rho, A, I, L = (_positive(k, v) for k, v in (
        ("E", E), ("G", G), ("kappa", kappa), ("rho", rho), ("A", A),
        ("I", I), ("L", L)))
    n_modes = _mode_number(n_modes)
    k = np.arange(1, n_modes + 1) * math.pi / L
    kGA = kappa * G * A
    qa = (rho * A) * (rho * I)
    qb = rho * A * kGA + (rho * A * E * I + rho * I * kGA) * k ** 2
    qc = kGA * E * I * k ** 4
    disc = np.sqrt(qb ** 2 - 4.0 * qa * qc)
    w2_low = 2.0 * qc / (qb + disc)
    w2_high = (qb + disc) / (2.0 * qa)
    return np.sqrt(w2_low), np.sqrt(w2_high)


def timoshenko_simply_supported_frequencies(E, G, kappa, rho, A, I, L, n_modes):
    """First-spectrum natural frequencies (rad/s) of a simply supported
    uniform Timoshenko beam (shear deformation and rotary inertia).

    See :func:`timoshenko_simply_supported_spectra` for the frequency equation.
    Source: S. M. Han, H. Benaroya, T. Wei, J. Sound Vib. 225 (1999) 935-988
    (simply supported Timoshenko frequency equation; from memory as to the
    equation number).

    Returns
    -------
    ndarray, shape (n_modes,)
        Lower root of the frequency equation for n = 1..n_modes (rad/s).
    """
    return timoshenko_simply_supported_spectra(E, G, kappa, rho, A, I, L, n_modes)[0]


def timoshenko_simply_supported_second_spectrum(E, G, kappa, rho, A, I, L, n_modes):
    """Second-spectrum natural frequencies (rad/s) of a simply supported
    uniform Timoshenko beam.

    See :func:`timoshenko_simply_supported_spectra`.  Source: S. M. Han,
    H. Benaroya, T. Wei, J. Sound Vib. 225 (1999) 935-988 (from memory as to
    the equation number).  As ``n -> 0`` the second spectrum tends to the
    shear cut-off ``sqrt(kappa G A / (rho I))``.

    Returns
    -------
    ndarray, shape (n_modes,)
        Upper root of the frequency equation for n = 1..n_modes (rad/s).
    """
    return timoshenko_simply_supported_spectra(E, G, kappa, rho, A, I, L, n_modes)[1]


# ---------------------------------------------------------------------------
# Spinning simply supported Rayleigh shaft
# ---------------------------------------------------------------------------

def rayleigh_spinning_ss_whirl(E, I, rho, A, L, n, spin):
    """Forward and backward whirl frequencies of a spinning simply supported
    uniform Rayleigh shaft (rotary inertia and gyroscopic moments, no shear).

    Polar area moment ``J = 2 I``.  With ``r = x + i y = R sin(k z) e^{i w t}``
    and ``k = n pi / L`` the whirl equation is::

        (rho A + rho I k^2) w^2 - 2 rho I k^2 spin w - E I k^4 = 0   (forward)
        (rho A + rho I k^2) w^2 + 2 rho I k^2 spin w - E I k^4 = 0   (backward)

    each with one positive root ``w``; the forward one increases with spin
    (gyroscopic stiffening), the backward one decreases.  Both equal
    ``sqrt(E I k^4 / (rho A + rho I k^2))`` at zero spin.

    Source: M. I. Friswell, J. E. T. Penny, S. D. Garvey, A. W. Lees,
    "Dynamics of Rotating Machines", Cambridge University Press, 2010,
    continuous spinning shaft (chapter and equation number from memory).
    Signs follow docs/theory.md (section 1); derivation in docs/theory.md.

    Parameters
    ----------
    E : float
        Young's modulus (Pa).
    I : float
        Diametral second moment of area (m^4).
    rho : float
        Density (kg/m^3).
    A : float
        Section area (m^2).
    L : float
        Bearing span (m).
    n : int
        Mode number (number of half-waves), ``n >= 1``.
    spin : float or array_like
        Spin speed Omega (rad/s), counter-clockwise about +z.

    Returns
    -------
    forward, backward : float or ndarray
        Positive whirl frequencies (rad/s), same shape as ``spin``.
    """
    E, I, rho, A, L = (_positive(k, v) for k, v in
                       (("E", E), ("I", I), ("rho", rho), ("A", A), ("L", L)))
    n = _mode_number(n)
    spin = np.asarray(spin, dtype=float)
    k2 = (n * math.pi / L) ** 2
    mass = rho * A + rho * I * k2
    g = rho * I * k2 * spin            # half of the gyroscopic coefficient
    root = np.sqrt(g ** 2 + mass * E * I * k2 ** 2)
    forward = (g + root) / mass
    # backward root written without cancellation: (root - g)/mass
    backward = E * I * k2 ** 2 / (g + root)
    if forward.ndim == 0:
        return float(forward), float(backward)
    return forward, backward


def rayleigh_spinning_ss_critical(E, I, rho, A, L, n, whirl="forward"):
    """Synchronous critical speed (w = spin) of a spinning simply supported
    uniform Rayleigh shaft.

    Setting ``w = spin`` in the whirl equations of
    :func:`rayleigh_spinning_ss_whirl`::

        forward:  spin^2 = E I k^4 / (rho A - rho I k^2)
        backward: spin^2 = E I k^4 / (rho A + 3 rho I k^2)

    The forward critical speed exists only when ``rho A > rho I k^2``; ``nan``
    is returned otherwise.

    Source: M. I. Friswell, J. E. T. Penny, S. D. Garvey, A. W. Lees,
    "Dynamics of Rotating Machines", Cambridge University Press, 2010,
    continuous spinning shaft (from memory as to the equation number).

    Parameters
    ----------
    E, I, rho, A, L, n
        See :func:`rayleigh_spinning_ss_whirl`.
    whirl : {"forward", "backward"}
        Which synchronous critical speed.

    Returns
    -------
    float
        Critical spin speed (rad/s), or ``nan`` if it does not exist.
    """
    E, I, rho, A, L = (_positive(k, v) for k, v in
                       (("E", E), ("I", I), ("rho", rho), ("A", A), ("L", L)))
    n = _mode_number(n)
    whirl = _whirl_name(whirl)
    k2 = (n * math.pi / L) ** 2
    if whirl == "forward":
        eff = rho * A - rho * I * k2
    else:
        eff = rho * A + 3.0 * rho * I * k2
    if eff <= 0.0:
        return float("nan")
    return math.sqrt(E * I * k2 ** 2 / eff)


# ---------------------------------------------------------------------------
# Beam stiffness influence coefficients
# ---------------------------------------------------------------------------

def simply_supported_midspan_stiffness(E, I, L):
    """Lateral stiffness at midspan of a simply supported uniform beam.

    ``k = 48 E I / L^3`` (central point load P gives deflection
    ``P L^3 / (48 E I)``).

    Source: W. C. Young, R. G. Budynas, "Roark's Formulas for Stress and
    Strain", 7th ed., McGraw-Hill, 2002, table of beam deflections, simply
    supported beam with central load (table number from memory).

    Returns
    -------
    float
        Stiffness (N/m).
    """
    E, I, L = (_positive(k, v) for k, v in (("E", E), ("I", I), ("L", L)))
    return 48.0 * E * I / L ** 3


def cantilever_tip_stiffness(E, I, L):
    """2x2 stiffness of a massless uniform cantilever tip for [deflection, slope].

    Clamped at z = 0, tip at z = L, DOFs ``[x, a]`` with ``a = dx/dz``::

        K = (E I / L^3) [[ 12,   -6 L ],
                         [ -6 L,  4 L^2]]

    It is the inverse of the tip flexibility
    ``(L / (E I)) [[L^2/3, L/2], [L/2, 1]]`` (deflection ``P L^3/(3EI)``,
    slope ``P L^2/(2EI)`` under a tip force; deflection ``M L^2/(2EI)``,
    slope ``M L/(EI)`` under a tip moment).

    Source: W. C. Young, R. G. Budynas, "Roark's Formulas for Stress and
    Strain", 7th ed., McGraw-Hill, 2002, cantilever with end load / end
    couple (from memory as to the table number).

    Returns
    -------
    ndarray, shape (2, 2)
        Stiffness matrix in N/m, N/rad, N m/rad.
    """
    E, I, L = (_positive(k, v) for k, v in (("E", E), ("I", I), ("L", L)))
    return (E * I / L ** 3) * np.array([[12.0, -6.0 * L], [-6.0 * L, 4.0 * L ** 2]])


# ---------------------------------------------------------------------------
# Jeffcott rotor
# ---------------------------------------------------------------------------

def jeffcott_critical_rigid(k_shaft, m):
    """Critical speed (rad/s) of a Jeffcott rotor on rigid bearings.

    ``w_c = sqrt(k_shaft / m)``: massless shaft of lateral stiffness
    ``k_shaft`` at the central disk of mass ``m``, no disk tilt.

    Source: H. H. Jeffcott, "The lateral vibration of loaded shafts in the
    neighbourhood of a whirling speed. -- The effect of want of balance",
    Phil. Mag. (Series 6) 37 (1919) 304-314 (pages from memory).

    Parameters
    ----------
    k_shaft : float
        Shaft lateral stiffness at the disk (N/m), e.g.
        :func:`simply_supported_midspan_stiffness`.
    m : float
        Disk mass (kg).

    Returns
    -------
    float
        Critical speed in rad/s.
    """
    return math.sqrt(_positive("k_shaft", k_shaft) / _positive("m", m))


def series_stiffness_two_bearings(k_shaft, k_bearing):
    """Effective stiffness of a central-disk shaft on two identical bearings.

    Both bearings carry half the load, so they act like one spring of
    stiffness ``2 k_bearing`` in series with the shaft::

        k_eff = 1 / (1 / k_shaft + 1 / (2 k_bearing))

    Source: springs in series, e.g. W. T. Thomson, "Theory of Vibration with
    Applications" (Prentice-Hall; any edition, e.g. 4th ed. 1993), chapter
    on free vibration, equivalent springs (from memory as to the section).

    Returns
    -------
    float
        Effective stiffness (N/m).
    """
    k_shaft = _positive("k_shaft", k_shaft)
    k_bearing = _positive("k_bearing", k_bearing)
    return 1.0 / (1.0 / k_shaft + 1.0 / (2.0 * k_bearing))


def jeffcott_critical_flexible_supports(k_shaft, k_bearing, m):
    """Critical speed (rad/s) of a Jeffcott rotor on two identical isotropic
    flexible bearings of stiffness ``k_bearing`` each.

    ``w_c = sqrt(k_eff / m)`` with ``k_eff`` from
    :func:`series_stiffness_two_bearings`.

    Source: H. H. Jeffcott, Phil. Mag. 37 (1919) 304-314, extended with
    springs in series (W. T. Thomson, "Theory of Vibration with
    Applications"); from memory as to page/section numbers.
    """
    return math.sqrt(series_stiffness_two_bearings(k_shaft, k_bearing) / _positive("m", m))


class JeffcottDamped(NamedTuple):
    """Result of :func:`jeffcott_damped` (all in SI)."""

    natural_frequency: float   #: undamped wn = sqrt(k/m) (rad/s)
    damping_ratio: float       #: zeta = c / (2 sqrt(k m))
    damped_frequency: float    #: wd = wn sqrt(1 - zeta^2) (rad/s), 0 if zeta >= 1
    log_decrement: float       #: 2 pi zeta / sqrt(1 - zeta^2), inf if zeta >= 1
    eigenvalue: complex        #: lambda = -zeta wn + i wd (upper root)


def damping_ratio(c, k, m):
    """Viscous damping ratio ``zeta = c / (2 sqrt(k m))``.

    Source: W. T. Thomson, "Theory of Vibration with Applications",
    Prentice-Hall (e.g. 4th ed. 1993), chapter on free damped vibration
    (from memory as to equation numbers).
    """
    return _nonnegative("c", c) / (2.0 * math.sqrt(_positive("k", k) * _positive("m", m)))


def log_decrement_from_damping_ratio(zeta):
    """Logarithmic decrement ``delta = 2 pi zeta / sqrt(1 - zeta^2)``.

    Returns ``inf`` for ``zeta >= 1`` (no oscillation).  Source:
    W. T. Thomson, "Theory of Vibration with Applications", chapter on free
    damped vibration, logarithmic decrement (from memory as to equation
    numbers).
    """
    zeta = float(zeta)
    if zeta >= 1.0:
        return float("inf")
    return 2.0 * math.pi * zeta / math.sqrt(1.0 - zeta * zeta)


def log_decrement(eigenvalue):
    """Log decrement of a complex eigenvalue, project convention.

    ``delta = -2 pi Re(lambda) / |Im(lambda)|`` (positive = stable), see
    docs/theory.md (section 1).  The absolute value of ``Im`` makes the
    result independent of which member of a conjugate pair is passed.
    For ``lambda = -zeta wn + i wn sqrt(1 - zeta^2)`` this equals
    :func:`log_decrement_from_damping_ratio` (W. T. Thomson, "Theory of
    Vibration with Applications", from memory).

    Parameters
    ----------
    eigenvalue : complex or array_like of complex

    Returns
    -------
    float or ndarray
        Log decrement; ``inf``/``-inf``/``nan`` for real eigenvalues.
    """
    lam = np.asarray(eigenvalue, dtype=complex)
    with np.errstate(divide="ignore", invalid="ignore"):
        out = -2.0 * np.pi * lam.real / np.abs(lam.imag)
    return float(out) if out.ndim == 0 else out


def jeffcott_damped(k, m, c):
    """Damped free vibration of a Jeffcott rotor with viscous damping at the disk.

    Per lateral direction ``m x'' + c x' + k x = 0``::

        wn = sqrt(k/m),  zeta = c / (2 sqrt(k m)),  wd = wn sqrt(1 - zeta^2),
        delta = 2 pi zeta / sqrt(1 - zeta^2),  lambda = -zeta wn + i wd.

    Sources: H. H. Jeffcott, Phil. Mag. 37 (1919) 304-314 (the rotor);
    W. T. Thomson, "Theory of Vibration with Applications", Prentice-Hall,
    chapter on free damped vibration (damping ratio, damped frequency,
    logarithmic decrement; from memory as to equation numbers).

    Parameters
    ----------
    k : float
        Lateral stiffness at the disk (N/m) (shaft, or effective with
        bearings).
    m : float
        Disk mass (kg).
    c : float
        Viscous damping coefficient at the disk (N s/m), ``c >= 0``.

    Returns
    -------
    JeffcottDamped
    """
    k = _positive("k", k)
    m = _positive("m", m)
    zeta = damping_ratio(c, k, m)
    wn = math.sqrt(k / m)
    if zeta < 1.0:
        wd = wn * math.sqrt(1.0 - zeta * zeta)
        lam = complex(-zeta * wn, wd)
    else:
        wd = 0.0
        # slower of the two real roots of the overdamped system
        lam = complex(-wn * (zeta - math.sqrt(zeta * zeta - 1.0)), 0.0)
    return JeffcottDamped(wn, zeta, wd, log_decrement_from_damping_ratio(zeta), lam)


def jeffcott_damped_bearings_polynomial(k_shaft, m, k_bearing, c_bearing,
                                        m_journal=0.0, c_disk=0.0):
    """Characteristic polynomial of a Jeffcott rotor on damped flexible bearings.

    Central disk (mass ``m``, optional viscous damping ``c_disk`` to ground)
    on a massless shaft of lateral stiffness ``k_shaft`` between the disk and
    the journals; two identical bearings, each with stiffness ``k_bearing``
    and viscous damping ``c_bearing`` in parallel, each journal of mass
    ``m_journal``.  In the symmetric (disk) mode both journals move by
    ``x_j``, so per lateral direction::

        m x''  + c_disk x' + k_shaft (x - x_j) = 0
        2 m_journal x_j'' + 2 c_bearing x_j' + 2 k_bearing x_j
                                        + k_shaft (x_j - x) = 0

    and with ``x ~ e^{s t}``::

        (m s^2 + c_disk s + k_shaft)
        (2 m_journal s^2 + 2 c_bearing s + 2 k_bearing + k_shaft) - k_shaft^2 = 0

    (a cubic when ``m_journal = 0``: the bearing damper is in series with the
    shaft spring).  The isotropic x and y equations are identical, so in
    complex coordinates each root ``s`` with Im > 0 is a forward whirl and
    its conjugate a backward whirl of the same log decrement.

    Sources: H. H. Jeffcott, Phil. Mag. 37 (1919) 304-314 (the rotor);
    the damped-support extension is a standard rotating-machinery model,
    e.g. M. I. Friswell et al., "Dynamics of Rotating Machines", Cambridge
    University Press, 2010 (from memory as to the section).  Derived in
    docs/theory.md.

    Returns
    -------
    ndarray
        Polynomial coefficients in ``s``, highest power first (``numpy.roots``
        order; leading zeros are kept).
    """
    k_shaft = _positive("k_shaft", k_shaft)
    m = _positive("m", m)
    k_bearing = _nonnegative("k_bearing", k_bearing)
    c_bearing = _nonnegative("c_bearing", c_bearing)
    m_journal = _nonnegative("m_journal", m_journal)
    c_disk = _nonnegative("c_disk", c_disk)
    p_disk = np.array([m, c_disk, k_shaft])
    p_journal = np.array([2.0 * m_journal, 2.0 * c_bearing, 2.0 * k_bearing + k_shaft])
    poly = np.polymul(p_disk, p_journal)
    poly[-1] -= k_shaft ** 2
    return poly


def jeffcott_damped_bearings_eigenvalues(k_shaft, m, k_bearing, c_bearing,
                                         m_journal=0.0, c_disk=0.0):
    """Eigenvalues of a Jeffcott rotor on damped flexible bearings.

    Roots of :func:`jeffcott_damped_bearings_polynomial` (see there for the
    model and sources), computed with ``numpy.roots``.  Limits: for
    ``c_bearing -> 0`` (and ``m_journal = 0``) the oscillatory pair tends to
    ``+-i sqrt(k_eff/m)`` with ``k_eff`` of
    :func:`series_stiffness_two_bearings`; for ``c_bearing -> inf`` it tends
    to ``+-i sqrt(k_shaft/m)``.

    Parameters
    ----------
    k_shaft : float
        Shaft lateral stiffness between disk and journals (N/m).
    m : float
        Disk mass (kg).
    k_bearing : float
        Stiffness of each of the two bearings (N/m).
    c_bearing : float
        Viscous damping of each of the two bearings (N s/m).
    m_journal : float, optional
        Mass at each journal (kg); default 0 (massless journals).
    c_disk : float, optional
        Viscous damping at the disk (N s/m); default 0.

    Returns
    -------
    ndarray of complex
        All roots, sorted by ascending ``|Im|`` then descending ``Im`` (so
        real roots first, then each conjugate pair with the Im > 0 member
        first).  Use ``roots[roots.imag > 0]`` for the forward whirl
        eigenvalues and :func:`log_decrement` for their log decrements.
    """
    poly = jeffcott_damped_bearings_polynomial(k_shaft, m, k_bearing, c_bearing,
                                               m_journal, c_disk)
    nz = np.flatnonzero(poly != 0.0)
    poly = poly[nz[0]:]
    roots = np.roots(poly).astype(complex)
    # polish each root with Newton steps on the polynomial (kept only while
    # they reduce |p|): the roots can differ by many orders of magnitude
    # (e.g. the fast real root ~ -(k_shaft + 2 k_bearing)/(2 c_bearing)).
    dpoly = np.polyder(poly)
    for i in range(roots.size):
        r = roots[i]
        for _ in range(3):
            d = np.polyval(dpoly, r)
            if d == 0:
                break
            r_new = r - np.polyval(poly, r) / d
            if abs(np.polyval(poly, r_new)) < abs(np.polyval(poly, r)):
                r = r_new
            else:
                break
        roots[i] = r
    # clean numerically real roots (relative to each root's own size)
    roots = np.where(np.abs(roots.imag) < 1e-12 * np.abs(roots), roots.real + 0j, roots)
    order = np.lexsort((-roots.imag, np.round(np.abs(roots.imag), 9)))
    return roots[order]


# ---------------------------------------------------------------------------
# Two-DOF-per-plane gyroscopic systems: overhung disk, rigid rotor
# ---------------------------------------------------------------------------

def gyroscopic_2dof_polynomial(k11, k12, k22, m, Id, Ip, spin, whirl="forward"):
    """Whirl frequency polynomial of a [translation, tilt] gyroscopic system.

    Per plane the stiffness is ``[[k11, k12], [k12, k22]]`` on ``[x, a]``
    (and identically on ``[y, b]``), mass ``m`` on the translation and
    transverse inertia ``Id`` on the tilt, gyroscopic block of
    docs/theory.md (section 1).  In complex coordinates ``r = x + i y``,
    ``phi = a + i b`` with ``e^{i w t}``, ``w > 0``::

        det [[k11 - m w^2, k12], [k12, k22 - Id w^2 +/- Ip spin w]] = 0

    with ``+`` for forward and ``-`` for backward whirl, i.e.::

        m Id w^4 -/+ m Ip spin w^3 - (k11 Id + m k22) w^2 +/- k11 Ip spin w
        + (k11 k22 - k12^2) = 0

    Source: M. I. Friswell, J. E. T. Penny, S. D. Garvey, A. W. Lees,
    "Dynamics of Rotating Machines", Cambridge University Press, 2010,
    rigid-disk / simple rotor models with gyroscopic effects (chapter and
    equation numbers from memory).  Derived in docs/theory.md.

    Returns
    -------
    ndarray, shape (5,)
        Coefficients in ``w``, highest power first (leading zeros kept).
    """
    whirl = _whirl_name(whirl)
    s = 1.0 if whirl == "forward" else -1.0
    g = s * float(Ip) * float(spin)
    m, Id = float(m), float(Id)
    k11, k12, k22 = float(k11), float(k12), float(k22)
    return np.array([m * Id, -m * g, -(k11 * Id + m * k22), k11 * g,
                     k11 * k22 - k12 ** 2])


def _positive_real_roots(poly):
    poly = np.asarray(poly, dtype=float)
    nz = np.flatnonzero(np.abs(poly) > 0.0)
    if nz.size == 0:
        raise ValueError("zero polynomial")
    poly = poly[nz[0]:]
    if poly.size == 1:
        return np.empty(0)
    roots = np.roots(poly)
    scale = max(np.max(np.abs(roots)), np.finfo(float).tiny)
    real = roots[np.abs(roots.imag) <= 1e-7 * scale].real
    real = real[real > 0.0]
    # polish each root with Newton steps, kept only while they reduce |p|
    dpoly = np.polyder(poly)
    for i in range(real.size):
        r = real[i]
        for _ in range(3):
            d = np.polyval(dpoly, r)
            if d == 0.0:
                break
            r_new = r - np.polyval(poly, r) / d
            if abs(np.polyval(poly, r_new)) < abs(np.polyval(poly, r)):
                r = r_new
            else:
                break
        real[i] = r
    return np.sort(real)


def gyroscopic_2dof_whirl(k11, k12, k22, m, Id, Ip, spin):
    """Forward and backward whirl frequencies of a [translation, tilt]
    gyroscopic system (see :func:`gyroscopic_2dof_polynomial`).

    Source: M. I. Friswell et al., "Dynamics of Rotating Machines",
    Cambridge University Press, 2010 (from memory as to equation numbers).

    Parameters
    ----------
    k11, k12, k22 : float
        Stiffness on [translation, tilt] per plane (N/m, N/rad, N m/rad).
    m : float
        Mass (kg).
    Id : float
        Transverse (diametral) mass moment of inertia (kg m^2), >= 0.
    Ip : float
        Polar mass moment of inertia (kg m^2), >= 0.
    spin : float
        Spin speed (rad/s).

    Returns
    -------
    forward, backward : ndarray
        Positive real roots (rad/s) of the forward and of the backward
        frequency equation, each sorted ascending.  For ``Id > 0`` each
        normally has two entries.
    """
    m = _positive("m", m)
    Id = _nonnegative("Id", Id)
    Ip = _nonnegative("Ip", Ip)
    args = (k11, k12, k22, m, Id, Ip, spin)
    fw = _positive_real_roots(gyroscopic_2dof_polynomial(*args, "forward"))
    bw = _positive_real_roots(gyroscopic_2dof_polynomial(*args, "backward"))
    return fw, bw


def gyroscopic_2dof_critical(k11, k12, k22, m, Id, Ip, whirl="forward"):
    """Synchronous critical speeds (w = spin) of a [translation, tilt]
    gyroscopic system.

    Setting ``w = spin`` in :func:`gyroscopic_2dof_polynomial` gives a
    quadratic in ``S = spin^2``::

        m Ie S^2 - (k11 Ie + m k22) S + (k11 k22 - k12^2) = 0,
        Ie = Id - Ip (forward),  Ie = Id + Ip (backward).

    For a forward whirl with ``Ip > Id`` only one (translation-dominated)
    critical speed exists; with ``Ip = Id`` the equation is linear.

    Source: M. I. Friswell et al., "Dynamics of Rotating Machines",
    Cambridge University Press, 2010 (from memory as to equation numbers).

    Returns
    -------
    ndarray
        Positive critical speeds (rad/s), ascending.
    """
    whirl = _whirl_name(whirl)
    m = _positive("m", m)
    Id = _nonnegative("Id", Id)
    Ip = _nonnegative("Ip", Ip)
    Ie = Id - Ip if whirl == "forward" else Id + Ip
    k11, k12, k22 = float(k11), float(k12), float(k22)
    poly = np.array([m * Ie, -(k11 * Ie + m * k22), k11 * k22 - k12 ** 2])
    S = _positive_real_roots(poly)
    return np.sqrt(S)


def overhung_disk_whirl(E, I, L, m, Id, Ip, spin):
    """Whirl frequencies of a rigid disk at the free end of a massless
    uniform cantilever.

    Clamped at z = 0, disk (mass ``m``, transverse inertia ``Id``, polar
    ``Ip``) at z = L.  The tip stiffness on [x, a] is
    :func:`cantilever_tip_stiffness`; the frequencies are the roots of
    :func:`gyroscopic_2dof_polynomial`.  With ``Id = Ip = 0`` the single
    root is the cantilever tip frequency ``sqrt(3 E I / (m L^3))``.

    Source: M. I. Friswell, J. E. T. Penny, S. D. Garvey, A. W. Lees,
    "Dynamics of Rotating Machines", Cambridge University Press, 2010,
    overhung disk on a flexible shaft (from memory as to the section and
    equation numbers); derived in docs/theory.md.

    Parameters
    ----------
    E : float
        Young's modulus (Pa).
    I : float
        Second moment of area of the shaft (m^4).
    L : float
        Cantilever length to the disk (m).
    m, Id, Ip : float
        Disk mass (kg), transverse and polar moments of inertia (kg m^2).
    spin : float
        Spin speed (rad/s).

    Returns
    -------
    forward, backward : ndarray
        Positive whirl frequencies (rad/s), each sorted ascending.
    """
    K = cantilever_tip_stiffness(E, I, L)
    return gyroscopic_2dof_whirl(K[0, 0], K[0, 1], K[1, 1], m, Id, Ip, spin)


def overhung_disk_critical(E, I, L, m, Id, Ip, whirl="forward"):
    """Synchronous critical speeds of the overhung disk of
    :func:`overhung_disk_whirl` (see :func:`gyroscopic_2dof_critical`).

    Source: M. I. Friswell et al., "Dynamics of Rotating Machines",
    Cambridge University Press, 2010 (from memory as to equation numbers).

    Returns
    -------
    ndarray
        Positive critical speeds (rad/s), ascending.
    """
    K = cantilever_tip_stiffness(E, I, L)
    return gyroscopic_2dof_critical(K[0, 0], K[0, 1], K[1, 1], m, Id, Ip, whirl)


def rigid_rotor_stiffness(k1, k2, a, b):
    """2x2 stiffness on [x, a_tilt] of a rigid rotor on two bearings.

    Bearing 1 (stiffness ``k1``) at ``z = -a`` and bearing 2 (``k2``) at
    ``z = +b`` relative to the centre of mass; a bearing at ``z_i`` deflects
    by ``x + z_i * tilt``, so the strain energy
    ``1/2 sum k_i (x + z_i tilt)^2`` gives::

        K = [[k1 + k2,        k2 b - k1 a    ],
             [k2 b - k1 a,    k1 a^2 + k2 b^2]]

    (the sign of the coupling term depends on which side bearing 1 is on;
    the whirl frequencies do not).

    Source: J. M. Vance, "Rotordynamics of Turbomachinery", Wiley, 1988,
    rigid rotor on flexible bearings (from memory as to the chapter).

    Returns
    -------
    ndarray, shape (2, 2)
    """
    k1 = _positive("k1", k1)
    k2 = _positive("k2", k2)
    a = _nonnegative("a", a)
    b = _nonnegative("b", b)
    c = k2 * b - k1 * a
    return np.array([[k1 + k2, c], [c, k1 * a * a + k2 * b * b]])


def rigid_rotor_whirl(m, Id, Ip, k1, k2, a, b, spin):
    """Bounce and rocking whirl frequencies of a rigid rotor on two soft
    isotropic bearings.

    Rotor mass ``m``, transverse inertia ``Id`` about the centre of mass,
    polar ``Ip``; bearing stiffnesses ``k1`` at distance ``a`` on one side of
    the centre of mass and ``k2`` at distance ``b`` on the other side.  The
    frequencies are the roots of :func:`gyroscopic_2dof_polynomial` with the
    stiffness of :func:`rigid_rotor_stiffness`.  For ``a = b``, ``k1 = k2 = k``
    at zero spin they are ``sqrt(2 k / m)`` (bounce) and
    ``sqrt(2 k a^2 / Id)`` (rocking).

    Sources: J. M. Vance, "Rotordynamics of Turbomachinery", Wiley, 1988;
    M. I. Friswell, J. E. T. Penny, S. D. Garvey, A. W. Lees, "Dynamics of
    Rotating Machines", Cambridge University Press, 2010 (rigid rotor on
    flexible supports; chapter/equation numbers from memory).

    Returns
    -------
    forward, backward : ndarray
        Positive whirl frequencies (rad/s), each sorted ascending.
    """
    K = rigid_rotor_stiffness(k1, k2, a, b)
    return gyroscopic_2dof_whirl(K[0, 0], K[0, 1], K[1, 1], m, Id, Ip, spin)


def rigid_rotor_critical(m, Id, Ip, k1, k2, a, b, whirl="forward"):
    """Synchronous critical speeds of the rigid rotor of
    :func:`rigid_rotor_whirl` (see :func:`gyroscopic_2dof_critical`).

    Sources: J. M. Vance, "Rotordynamics of Turbomachinery", Wiley, 1988;
    M. I. Friswell et al., "Dynamics of Rotating Machines", 2010 (from
    memory as to equation numbers).

    Returns
    -------
    ndarray
        Positive critical speeds (rad/s), ascending.
    """
    K = rigid_rotor_stiffness(k1, k2, a, b)
    return gyroscopic_2dof_critical(K[0, 0], K[0, 1], K[1, 1], m, Id, Ip, whirl)


# ---------------------------------------------------------------------------
# Jeffcott rotor on anisotropic supports
# ---------------------------------------------------------------------------

def anisotropic_jeffcott_criticals(kx, ky, m):
    """Critical speeds of an undamped Jeffcott rotor with ``kx != ky``.

    ``sqrt(kx/m)`` and ``sqrt(ky/m)``, returned ascending.  Between the two
    critical speeds the synchronous unbalance orbit whirls *backward* (see
    :func:`anisotropic_jeffcott_unbalance_orbit`).

    Sources: M. I. Friswell et al., "Dynamics of Rotating Machines",
    Cambridge University Press, 2010; J. M. Vance, "Rotordynamics of
    Turbomachinery", Wiley, 1988 (anisotropic supports; from memory as to
    the sections).

    Returns
    -------
    tuple of float
        ``(lower, upper)`` critical speeds in rad/s.
    """
    kx = _positive("kx", kx)
    ky = _positive("ky", ky)
    m = _positive("m", m)
    w = sorted((math.sqrt(kx / m), math.sqrt(ky / m)))
    return w[0], w[1]


class AnisotropicOrbit(NamedTuple):
    """Synchronous unbalance orbit of :func:`anisotropic_jeffcott_unbalance_orbit`."""

    X: float               #: x(t) = X cos(spin t)  (m, signed)
    Y: float               #: y(t) = Y sin(spin t)  (m, signed)
    forward_radius: float  #: |(X + Y)/2|, radius of the exp(+i spin t) part (m)
    backward_radius: float #: |(X - Y)/2|, radius of the exp(-i spin t) part (m)
    sense: str             #: "forward", "backward" or "straight" (X*Y == 0)


def anisotropic_jeffcott_unbalance_orbit(kx, ky, m, eccentricity, spin):
    """Steady unbalance orbit of an undamped Jeffcott rotor with ``kx != ky``.

    A disk of mass ``m`` with mass eccentricity ``e`` spinning at
    ``spin > 0`` (counter-clockwise) feels the rotating force
    ``m e spin^2 (cos spin t, sin spin t)``.  Without damping the steady
    response is in phase or in anti-phase with it::

        x = X cos(spin t),  X = m e spin^2 / (kx - m spin^2)
        y = Y sin(spin t),  Y = m e spin^2 / (ky - m spin^2)

    so that ``x + i y = (X + Y)/2 e^{+i spin t} + (X - Y)/2 e^{-i spin t}``
    and the angular momentum ``x y' - y x' = X Y spin``.  The orbit is
    forward if ``X Y > 0`` and backward if ``X Y < 0``: between the two
    critical speeds ``kx - m spin^2`` and ``ky - m spin^2`` have opposite
    signs, hence the whirl is backward there.

    Sources: M. I. Friswell et al., "Dynamics of Rotating Machines",
    Cambridge University Press, 2010; J. M. Vance, "Rotordynamics of
    Turbomachinery", Wiley, 1988 (backward whirl between the criticals of an
    anisotropically supported rotor; from memory as to the sections).

    Parameters
    ----------
    kx, ky : float
        Lateral stiffnesses in x and y (N/m).
    m : float
        Disk mass (kg).
    eccentricity : float
        Mass eccentricity e (m) of the disk, at angle 0 at t = 0.
    spin : float
        Spin speed (rad/s), ``spin >= 0``; must not be a critical speed.
        (At ``spin = 0`` the response is zero and ``sense`` is "straight".)

    Returns
    -------
    AnisotropicOrbit
    """
    kx = _positive("kx", kx)
    ky = _positive("ky", ky)
    m = _positive("m", m)
    e = float(eccentricity)
    spin = _nonnegative("spin", spin)
    dx = kx - m * spin ** 2
    dy = ky - m * spin ** 2
    if abs(dx) <= 1e-12 * kx or abs(dy) <= 1e-12 * ky:
        raise ValueError("spin equals a critical speed; undamped response is unbounded")
    f = m * e * spin ** 2
    X = f / dx
    Y = f / dy
    s = X * Y  # sign of the angular momentum X*Y*spin for spin > 0
    sense = "forward" if s > 0 else ("backward" if s < 0 else "straight")
    return AnisotropicOrbit(X, Y, abs(X + Y) / 2.0, abs(X - Y) / 2.0, sense)


# ===========================================================================
# Rotating-unbalance response of a single-degree-of-freedom rotor
# (added with tests/verification/test_unbalance_response.py)
# ===========================================================================
#
# A disk of mass m on a massless shaft of stiffness k, with viscous damping c
# at the disk, spinning at w and carrying an unbalance U = m e (kg m), obeys,
# in the complex coordinate r = x + i y,
#
#     m r'' + c r' + k r = U w^2 e^{i w t}.
#
# With wn = sqrt(k/m), zeta = c / (2 sqrt(k m)) and the speed ratio
# s = w / wn, the steady response is r = (U/m) H(s) e^{i w t} with
#
#     H(s) = s^2 / (1 - s^2 + 2 i zeta s),
#     |H| = s^2 / sqrt((1 - s^2)^2 + (2 zeta s)^2),
#     phase lag behind the unbalance = atan2(2 zeta s, 1 - s^2).
#
# Peak and half-power points exactly.  With u = 1/s^2,
#
#     |H|^2 = 1 / (u^2 - 2 (1 - 2 zeta^2) u + 1),
#
# a parabola in u.  Its minimum is at u = 1 - 2 zeta^2, so the peak lies at
# s_peak = 1/sqrt(1 - 2 zeta^2) (zeta < 1/sqrt 2) with
# |H|_peak = 1 / (2 zeta sqrt(1 - zeta^2)).  The half-power condition
# |H|^2 = |H|_peak^2 / 2 gives (u - (1 - 2 zeta^2))^2 = 4 zeta^2 (1 - zeta^2):
#
#     u_{low, high} = 1 - 2 zeta^2 +- 2 zeta sqrt(1 - zeta^2),
#     s_{low, high} = 1 / sqrt(u_{low, high}).
#
# Writing zeta = sin(t): u_peak = cos 2t and u = cos 2t +- sin 2t
# = sqrt(2) cos(2t -+ pi/4), so the upper half-power point exists only for
# t < pi/8, i.e. zeta < sin(pi/8) = 0.38268...; above that the response never
# falls to 0.707 of the peak at high speed (it tends to 1, the peak to less
# than sqrt 2).  (In u the problem is the force-excited oscillator in s^2:
# the rotating-unbalance curve over s is the constant-force curve over 1/s.)
#
# Light-damping expansions (derived here by series expansion of the exact
# points and checked against them in test_unbalance_response.py):
#
#     s_high - s_low = 2 zeta + 10 zeta^3 + O(zeta^5),
#     s_peak = 1 + zeta^2 + O(zeta^4),
#     AF = s_peak / (s_high - s_low)
#        = (1 / (2 zeta)) (1 - 4 zeta^2 - 6 zeta^4 + O(zeta^6)),
#     and with delta = 2 pi zeta / sqrt(1 - zeta^2) (log decrement)
#     AF = (pi / delta) (1 - 7/2 zeta^2 - 61/8 zeta^4 + O(zeta^6)).
#
# The approximations AF ~ 1/(2 zeta) ~ pi/delta therefore err by O(zeta^2)
# (not O(zeta)), both on the high side.  The peak over the damped natural
# frequency wd = wn sqrt(1 - zeta^2) is
#
#     s_peak / sqrt(1 - zeta^2) = 1 / sqrt((1 - 2 zeta^2)(1 - zeta^2))
#                               = 1 + 3/2 zeta^2 + 19/8 zeta^4 + O(zeta^6).
#
# Sources: H. H. Jeffcott, Phil. Mag. (6) 37 (1919) 304-314 (the rotor and
# its unbalance response); W. T. Thomson, "Theory of Vibration with
# Applications", Prentice-Hall, section on rotating unbalance (amplitude
# ratio and phase) and on the quality factor / half-power bandwidth
# (Q ~ 1/(2 zeta)); all from memory as to sections and equation numbers.
# The exact half-power points and the expansions are derived above.

__all__ += [
    "unbalance_amplitude_ratio",
    "unbalance_phase_lag",
    "UnbalancePeak",
    "unbalance_peak",
    "unbalance_peak_over_damped_frequency",
]

#: Largest damping ratio with an upper half-power point: sin(pi/8).
UNBALANCE_HALF_POWER_ZETA_MAX = math.sin(math.pi / 8.0)


def _damping_ratio_below(zeta, limit, what):
    zeta = _positive("zeta", zeta)
    if zeta >= limit:
        raise ValueError(f"zeta must be below {limit:.6g} for {what}, got {zeta!r}")
    return zeta


def unbalance_amplitude_ratio(s, zeta):
    """Amplitude ratio ``|r| m / U`` of the rotating-unbalance response.

    ``s^2 / sqrt((1 - s^2)^2 + (2 zeta s)^2)`` with the speed ratio
    ``s = w / wn``.

    Sources: H. H. Jeffcott, Phil. Mag. (6) 37 (1919) 304-314; W. T.
    Thomson, "Theory of Vibration with Applications", Prentice-Hall,
    rotating unbalance (from memory as to the equation number).

    Parameters
    ----------
    s : float or array_like
        Speed ratio(s) ``w / wn``, ``s >= 0``.
    zeta : float
        Damping ratio, ``zeta >= 0``.

    Returns
    -------
    float or ndarray
    """
    zeta = _nonnegative("zeta", zeta)
    s = np.asarray(s, dtype=float)
    if np.any(s < 0) or not np.all(np.isfinite(s)):
        raise ValueError("speed ratios must be finite and not negative")
    out = s ** 2 / np.sqrt((1.0 - s ** 2) ** 2 + (2.0 * zeta * s) ** 2)
    return out[()] if out.ndim == 0 else out


def unbalance_phase_lag(s, zeta):
    """Phase lag (degrees, 0..180) of the response behind the unbalance.

    ``atan2(2 zeta s, 1 - s^2)``: 90 degrees at ``s = 1`` for any damping.

    Sources: as :func:`unbalance_amplitude_ratio`.

    Returns
    -------
    float or ndarray
    """
    zeta = _nonnegative("zeta", zeta)
    s = np.asarray(s, dtype=float)
    if np.any(s < 0) or not np.all(np.isfinite(s)):
        raise ValueError("speed ratios must be finite and not negative")
    out = np.degrees(np.arctan2(2.0 * zeta * s, 1.0 - s ** 2))
    return out[()] if out.ndim == 0 else out


class UnbalancePeak(NamedTuple):
    """Exact peak and half-power points of :func:`unbalance_peak` (speed ratios)."""

    speed: float       #: s_peak = 1 / sqrt(1 - 2 zeta^2)
    amplitude: float   #: peak amplitude ratio 1 / (2 zeta sqrt(1 - zeta^2))
    low: float         #: lower half-power speed ratio
    high: float        #: upper half-power speed ratio
    af: float          #: amplification factor s_peak / (high - low)


def unbalance_peak(zeta):
    """Exact peak, half-power points and amplification factor of the
    rotating-unbalance response (all as ratios to ``wn``).

    Derived in the comment block above this function: with ``u = 1/s^2``
    the squared amplitude ratio is the reciprocal of a parabola in ``u``,
    whence ``s_peak = (1 - 2 zeta^2)^(-1/2)`` and
    ``s_{low, high} = (1 - 2 zeta^2 +- 2 zeta sqrt(1 - zeta^2))^(-1/2)``.

    Sources: H. H. Jeffcott (1919); W. T. Thomson, "Theory of Vibration
    with Applications", rotating unbalance and half-power bandwidth (from
    memory); the exact half-power points are derived here.

    Parameters
    ----------
    zeta : float
        Damping ratio, ``0 < zeta < sin(pi/8) = 0.3827`` (above it there is
        no upper half-power point).

    Returns
    -------
    UnbalancePeak
    """
    zeta = _damping_ratio_below(zeta, UNBALANCE_HALF_POWER_ZETA_MAX,
                                "an upper half-power point")
    root = math.sqrt(1.0 - zeta * zeta)
    centre = 1.0 - 2.0 * zeta * zeta
    half = 2.0 * zeta * root
    speed = 1.0 / math.sqrt(centre)
    low = 1.0 / math.sqrt(centre + half)
    high = 1.0 / math.sqrt(centre - half)
    return UnbalancePeak(speed, 1.0 / (2.0 * zeta * root), low, high, speed / (high - low))


def unbalance_peak_over_damped_frequency(zeta):
    """Peak speed of the unbalance response over the damped natural frequency.

    ``(wn / sqrt(1 - 2 zeta^2)) / (wn sqrt(1 - zeta^2))
    = 1 / sqrt((1 - 2 zeta^2)(1 - zeta^2)) = 1 + 1.5 zeta^2 + O(zeta^4)``.

    Sources: as :func:`unbalance_peak` (derived here).

    Parameters
    ----------
    zeta : float
        Damping ratio, ``0 <= zeta < 1/sqrt(2)``.
    """
    zeta = _nonnegative("zeta", zeta)
    if zeta >= math.sqrt(0.5):
        raise ValueError(f"zeta must be below 1/sqrt(2) for a peak, got {zeta!r}")
    return 1.0 / math.sqrt((1.0 - 2.0 * zeta * zeta) * (1.0 - zeta * zeta))
