"""The rotor at rest: journal reactions and deflection against beam formulas.

1. A uniform shaft on two supports at its ends under its own weight w per length: each
   reaction w L / 2, mid-span deflection 5 w L^4 / (384 E I) (simply supported beam,
   uniform load: W. C. Young, R. G. Budynas, Roark's Formulas for Stress and Strain, 7th
   ed. 2002, table 8.1, case 2e, from memory).  Euler-Bernoulli elements with the consistent
   load vector give the beam's nodal deflections exactly; the supports (1e13 N/m) add
   their own sag, w L / 2 / k, which the expected value includes.
2. The same shaft on three equally spaced supports (two equal spans l): end reactions
   3/8 w l, middle one 10/8 w l (continuous beam of two equal spans, Roark table 8.2 /
   the three-moment equation, from memory); the statically indeterminate case, solved
   through the supports' stiffness.
3. An overhung disk (mass m at a beyond the second of two supports a span L apart, on a
   nearly massless shaft): the lever rule R2 = m g (L + a) / L, R1 = -m g a / L (the first
   journal is lifted).
4. Steady loads: a force F at mid-span gives F / 2 at each end; a moment M (x-z plane)
   at mid-span gives -/+ M / L.  Gravity along -x loads the journals along x.
Every solution's reactions balance the applied loads (checked to 1e-9).
"""

import dataclasses
import math

import numpy as np
import pytest

from rotorcalc.model import Disk, Section, StaticLoad
from rotorcalc.statics import GRAVITY, static_solution
from tests.conftest import LIGHT, STEEL, isotropic, uniform_shaft
from tests.verification.record import check

ROARK = "Roark's Formulas for Stress and Strain, 7th ed. 2002, tables 8.1-8.2 (from memory)"
LEVER = "Statics of a rigid lever (free-body diagram)"
K = 1e13
L, D = 1.2, 0.08
AREA = math.pi * D**2 / 4
W_LEN = STEEL.density * AREA * GRAVITY          # N per metre
EI = STEEL.youngs_modulus * math.pi * D**4 / 64


def shaft(stations=(0, 1), elements=24, **kw):
    rotor = uniform_shaft(L, D, elements=elements, theory="euler-bernoulli",
                          bearings=[isotropic(s, K, name=f"B{s}") for s in stations], **kw)
    return rotor


def test_uniform_shaft_on_two_supports():
    sol = static_solution(shaft())
    check("Uniform shaft, 2 supports: each reaction w L / 2 (N)", ROARK, W_LEN * L / 2,
          sol.reactions[0, 1], 1e-10)
    mid = len(sol.node_z) // 2
    expected = -(5 * W_LEN * L**4 / (384 * EI) + W_LEN * L / 2 / K)
    check("Uniform shaft, 2 supports: mid-span sag 5 w L^4 / 384 E I (m)", ROARK, expected,
          sol.displacement[mid, 1], 1e-8)
    assert sol.balance_error < 1e-9 and abs(sol.reactions[:, 0]).max() < 1e-9


def test_uniform_shaft_on_three_supports():
    two_spans = dataclasses.replace(
        shaft(), sections=(Section(L / 2, D, STEEL, elements=12),) * 2,
        bearings=tuple(isotropic(s, K, name=f"B{s}") for s in (0, 1, 2)))
    sol = static_solution(two_spans)
    span = L / 2
    # rigid supports in the formula, 1e13 N/m here against the span's 48 E I / l^3 = 9.4e7
    # N/m: the supports' own sag moves the indeterminate reactions by about 1e-5 of them
    check("Two equal spans: end reaction 3/8 w l (N)", ROARK, 3 / 8 * W_LEN * span,
          sol.reactions[0, 1], 3e-5)
    check("Two equal spans: middle reaction 10/8 w l (N)", ROARK, 10 / 8 * W_LEN * span,
          sol.reactions[1, 1], 3e-5)
    assert sol.balance_error < 1e-9


def test_overhung_disk_lever_rule():
    m, span, a = 40.0, 0.8, 0.3
    rotor = dataclasses.replace(
        shaft(), sections=(Section(span, 0.06, LIGHT, elements=8),
                           Section(a, 0.06, LIGHT, elements=4)),
        bearings=(isotropic(0, K, name="A"), isotropic(1, K, name="B")),
        disks=(Disk(2, m, 0.0, 0.0),))
    sol = static_solution(rotor)
    shaft_mass = sum(s.mass for s in rotor.sections)       # 1e-6 of steel's: 2.2e-5 kg
    check("Overhung disk: far journal m g (L + a) / L (N)", LEVER, m * GRAVITY * (span + a) / span,
          sol.reactions[1, 1], 1e-6)
    check("Overhung disk: near journal lifted, -m g a / L (N)", LEVER, -m * GRAVITY * a / span,
          sol.reactions[0, 1], 1e-6)
    assert shaft_mass < 1e-4


@pytest.mark.parametrize("kind", ["force", "moment"])
def test_steady_loads_at_mid_span(kind):
    load = StaticLoad(1, fy=-1000.0) if kind == "force" else StaticLoad(1, mxz=500.0)
    rotor = dataclasses.replace(shaft(), sections=(Section(L / 2, D, LIGHT, elements=6),) * 2,
                                bearings=(isotropic(0, K, name="A"), isotropic(2, K, name="B")),
                                static_loads=(load,), gravity="none")
    sol = static_solution(rotor)
    if kind == "force":
        check("Force F at mid-span: each reaction F / 2 (N)", LEVER, 500.0, sol.reactions[0, 1],
              1e-9)
    else:
        # a moment turning dx/dz positive is balanced by a couple of x reactions M / L
        check("Moment M at mid-span: end reactions -/+ M / L (N)", LEVER, 500.0 / L,
              sol.reactions[0, 0], 1e-9)
        assert sol.reactions[1, 0] == pytest.approx(-500.0 / L, rel=1e-9)
    assert sol.balance_error < 1e-9


def test_gravity_along_minus_x_loads_the_journals_along_x():
    sol = static_solution(dataclasses.replace(shaft(), gravity="-x"))
    assert sol.reactions[:, 0] == pytest.approx([W_LEN * L / 2] * 2, rel=1e-10)
    assert abs(sol.reactions[:, 1]).max() < 1e-9
    assert static_solution(dataclasses.replace(shaft(), gravity="none")).reactions.any() == \
        False
