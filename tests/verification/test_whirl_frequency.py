"""Coefficients tabulated over whirl frequency: each mode read at its own frequency.

The Jeffcott rotor of test_coupling_screen.py (a 20 kg disk at mid-span of a light 1 m steel
shaft between stiff pins; spin 300 rad/s, natural frequency w_n = 390.6 rad/s) gets a damper
at the disk whose coefficients depend on the whirl frequency w: with ``z = x + i y`` the
forward motion obeys ``m z'' + c(w) z' + (k + k_d(w) - i q) z = 0`` read at the mode's own
``w``, so

1. undamped, ``k_d(w) = a w``: ``m w^2 = k + a w`` has the positive root
   ``w = (a + sqrt(a^2 + 4 m k)) / (2 m)`` (closed form);
2. damped, ``c(w) = c0 + b w``, with cross-coupling ``q``: the zero-damping threshold solves
   ``s = i w`` in the characteristic equation: ``w = w_n`` and ``q0 = c(w_n) w_n``, not
   ``c(spin) w_n`` (closed form);
3. at a given ``q``: the forward root ``s`` of ``m s^2 + c(w) s + k - i q = 0`` with
   ``Im s = w``, found by Brent's method on that scalar equation (a second, independent way)
   gives the log decrement ``-2 pi Re s / Im s``.

Source: the characteristic equation of the cross-coupled Jeffcott rotor, D. Childs,
Turbomachinery Rotordynamics, Wiley 1993, chapter 1, with frequency-dependent seal
coefficients read at the whirl frequency as in its chapter on seals (from memory).  Linear
tables in ``w`` are interpolated exactly; the tolerance is the Jeffcott model's own departure
from the closed form (1e-5, test_coupling_screen.py) and the fixed point's 1e-6.
"""

import dataclasses
import math

import numpy as np
import pytest
from scipy.optimize import brentq

from rotorcalc.analysis.coupling_screen import cross_coupling_screen, sources_check
from rotorcalc.analysis.own_frequency import at_own_frequency
from rotorcalc.analysis.modes import modes_at
from rotorcalc.assembly import assemble
from rotorcalc.model import Bearing, OperatingRange
from rotorcalc.rules import CouplingRule
from rotorcalc.vocabulary import BearingRole
from tests.conftest import LIGHT, disk_at_mid_span, isotropic
from tests.verification.record import check
from tests.verification.test_coupling_screen import C_DISK, DJ, K_EFF, KPIN, LJ, MJ, WN

SOURCE = ("Jeffcott rotor with coefficients read at the whirl frequency, Childs 1993 ch. 1 "
          "(from memory)")
SPIN = 300.0
TOP = 2000.0           # rad/s: the whirl tables run from 0 to here
TOL = 1e-5
OWN = CouplingRule(coefficients_at="mode-frequency", placement="mid-span")


def damper(k_slope=0.0, c0=C_DISK, c_slope=0.0):
    """A damper at the disk: k_d(w) = k_slope w, c(w) = c0 + c_slope w, over 0..TOP."""
    k = ((0.0, k_slope * TOP),)
    c = ((c0, c0 + c_slope * TOP),)
    return Bearing(1, {"kxx": k, "kyy": k, "cxx": c, "cyy": c}, whirl=(0.0, TOP),
                   name="disk damper")


def jeffcott(part, q=0.0, rule=OWN):
    sources = () if q == 0 else (Bearing(1, {"kxy": (q,), "kyx": (-q,)}, name="q",
                                         role=BearingRole.SOURCE),)
    rotor = disk_at_mid_span(MJ, (isotropic(0, KPIN, name="pin A"),
                                  isotropic(2, KPIN, name="pin B"), part),
                             span=LJ, diameter=DJ, material=LIGHT,
                             operating=OperatingRange(0.8 * SPIN, SPIN), mode_count=2)
    return dataclasses.replace(rotor, sources=sources, coupling_rule=rule)


def forward(modes):
    return max(range(len(modes.frequency)), key=lambda i: modes.forward_fraction[i])


def test_undamped_stiffness_linear_in_whirl_frequency():
    a = 0.4 * K_EFF / WN        # k_d(w_n) is 40 % of the shaft's stiffness
    rotor = jeffcott(damper(k_slope=a, c0=0.0))
    system = assemble(rotor)
    m = modes_at(system, SPIN, 2)
    j = forward(m)
    own = at_own_frequency(system, SPIN, m.shapes[j], m.frequency[j], m.log_dec[j], 2)
    exact = (a + math.sqrt(a * a + 4 * MJ * K_EFF)) / (2 * MJ)
    assert own.converged
    check("Whirl-dependent stiffness k = a w: w = (a + sqrt(a^2 + 4 m k)) / 2m", SOURCE,
          exact, own.frequency, TOL)
    # the synchronous reading (k_d at the spin speed) is a different, wrong answer here
    assert abs(own.synchronous_frequency / exact - 1.0) > 0.02


C_SLOPE = 2.0 * C_DISK / WN     # c(w_n) = 3 c0, c(spin) = 2.5 c0


def test_threshold_uses_the_damping_at_the_natural_frequency():
    rotor = jeffcott(damper(c_slope=C_SLOPE))
    q0 = (C_DISK + C_SLOPE * WN) * WN
    screen = cross_coupling_screen(rotor, expected=q0 / 3.7, xtol_share=1e-10)
    check("Whirl-dependent damping: threshold q0 = c(w_n) w_n", SOURCE, q0, screen.threshold,
          TOL)
    assert not screen.notes
    synchronous = cross_coupling_screen(
        jeffcott(damper(c_slope=C_SLOPE), rule=CouplingRule(placement="mid-span")),
        expected=q0 / 3.7, xtol_share=1e-10)
    # read at the spin speed: c(300 rad/s) w_n, 17 % lower; and the file is told so
    check("Whirl-dependent damping, synchronous reading: q0 = c(spin) w_n", SOURCE,
          (C_DISK + C_SLOPE * SPIN) * WN, synchronous.threshold, TOL)
    assert any("synchronous" in n for n in synchronous.notes)


def _root(q, c_of_w, k_of_w=lambda w: 0.0):
    def forward_root(w):
        roots = np.roots([MJ, c_of_w(w), K_EFF + k_of_w(w) - 1j * q])
        return roots[np.argmax(roots.imag)]
    w = brentq(lambda w: forward_root(w).imag - w, 0.2 * WN, 3 * WN, xtol=1e-12)
    return forward_root(w)


@pytest.mark.parametrize("share", [0.5, 2.0])
def test_log_decrement_at_the_fixed_point_against_the_scalar_equation(share):
    q0 = (C_DISK + C_SLOPE * WN) * WN
    q = share * q0
    rotor = jeffcott(damper(k_slope=0.1 * K_EFF / WN, c_slope=C_SLOPE), q=q)
    result = sources_check(rotor)
    s = _root(q, lambda w: C_DISK + C_SLOPE * w, lambda w: 0.1 * K_EFF / WN * w)
    assert result.converged == (True,)
    check(f"Whirl-dependent damper, q = {share:g} q0: frequency", SOURCE, s.imag,
          result.frequency[0], TOL)
    check(f"Whirl-dependent damper, q = {share:g} q0: log decrement", SOURCE,
          -2 * math.pi * s.real / s.imag, result.log_dec[0], TOL * 10, kind="abs")


def test_tables_flat_in_whirl_frequency_give_the_synchronous_answer():
    """A two-way table whose rows do not change with w is the one-way table: no iteration
    moves anything (one solve confirms the fixed point).

    The two answers come by different arithmetic (the iterate by Newton's method from the
    synchronous solve, the one-way table by that solve alone), so they agree to the
    eigenvalue's accuracy, not bit for bit: this mode's condition number is about 5e5 (from
    the 1e11 N/m pins; 5e3 with pins of 1e9), and the full solve's backward error of 3e-15
    leaves about 1.5e-9 of the eigenvalue (measured: frequency 1.4e-9, log decrement 7.8e-9
    apart), where Newton's answer leaves about 1e-12 (the smallest singular value of the
    quadratic at each).  Anything the iteration moved would show at the fixed point's
    tolerance, 1e-6; 1e-7 leaves the measured gap a margin of 13."""
    flat = Bearing(1, {"kxx": ((0.0, 0.0),), "kyy": ((0.0, 0.0),),
                       "cxx": ((C_DISK, C_DISK),), "cyy": ((C_DISK, C_DISK),)},
                   whirl=(0.0, TOP), name="flat")
    plain = Bearing(1, {"kxx": (0.0,), "kyy": (0.0,), "cxx": (C_DISK,), "cyy": (C_DISK,)},
                    name="plain")
    a = sources_check(jeffcott(flat, q=0.5 * C_DISK * WN))
    b = sources_check(jeffcott(plain, q=0.5 * C_DISK * WN))
    assert a.converged == (True,)
    np.testing.assert_allclose(a.log_dec, b.log_dec, rtol=1e-7)
    np.testing.assert_allclose(a.frequency, b.frequency, rtol=1e-7)


def test_an_iteration_cut_short_says_it_did_not_converge():
    rotor = jeffcott(damper(k_slope=0.4 * K_EFF / WN, c0=0.0))
    system = assemble(rotor)
    m = modes_at(system, SPIN, 2)
    j = forward(m)
    own = at_own_frequency(system, SPIN, m.shapes[j], m.frequency[j], m.log_dec[j], 2,
                           max_iter=1)
    assert not own.converged and "no fixed point within 1 solves" in own.why
