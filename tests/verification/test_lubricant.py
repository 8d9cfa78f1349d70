"""The oil's viscosity, density and heating against the formulas worked by hand.

1. Walther's equation as in ASTM D341 (from memory),
   ``log10(log10(nu + 0.7)) = A - B log10(T)`` (nu in mm^2/s, T in K): the line through the
   two given points reproduces them, and its value at a third temperature is worked by hand
   (the arithmetic in each test's docstring).
2. Density ``rho = rho_15 (1 - alpha (T - 288.15))``, ``mu = nu rho``: worked by hand.
3. The oil's temperature rise ``P / (rho c_p Q)`` (energy balance, all the heat carried by
   the oil) and the effective film temperature ``T_in + 0.8 rise`` (common practice, from
   memory): worked by hand.

The ISO VG 32 oil's 100 degC viscosity (5.4 mm^2/s) is a typical value from memory; the
checks here test the formulas, not the oil.
"""

import pytest

from rotorcalc.bearings import Lubricant, effective_temperature
from rotorcalc.bearings.lubricant import TYPICAL_AT_100C, ZERO_CELSIUS
from tests.verification.record import check

WALTHER = "Walther equation, ASTM D341 (from memory)"
HAND = "hand calculation"
WALTHER_HAND = f"{WALTHER}; {HAND}"
ENERGY = "energy balance P = rho c_p Q dT (all heat to the oil); hand calculation"
RULE = "effective temperature T_in + 0.8 dT (common practice, from memory); hand calculation"
VG32 = Lubricant(grade=32)


@pytest.mark.parametrize("grade", [22, 68, 460])
def test_walther_line_passes_through_its_two_points(grade):
    oil = Lubricant(grade=grade)
    check(f"ISO VG {grade}: nu at 40 degC = grade (mm^2/s)", WALTHER, float(grade),
          oil.kinematic_viscosity(ZERO_CELSIUS + 40.0) * 1e6, 1e-12)
    check(f"ISO VG {grade}: nu at 100 degC = table value (mm^2/s)", WALTHER,
          TYPICAL_AT_100C[grade], oil.kinematic_viscosity(ZERO_CELSIUS + 100.0) * 1e6, 1e-12)


def test_walther_interpolated_at_70_degc():
    """ISO VG 32 (32 mm^2/s at 40 degC, 5.4 at 100 degC) at 70 degC, by hand:

    Z1 = log10(log10(32 + 0.7))  = log10(1.514548) = 0.180283
    Z2 = log10(log10(5.4 + 0.7)) = log10(0.785330) = -0.104948
    log10(313.15) = 2.495752, log10(373.15) = 2.571883, log10(343.15) = 2.535484
    B = (Z1 - Z2) / (2.571883 - 2.495752) = 0.285231 / 0.076131 = 3.74658
    A = Z1 + B log10(313.15) = 0.180283 + 3.74658 x 2.495752 = 9.53082
    Z3 = A - B log10(343.15) = 9.53082 - 3.74658 x 2.535484 = 0.031425
    nu = 10^(10^0.031425) - 0.7 = 10^1.075042 - 0.7 = 11.8862 - 0.7 = 11.186 mm^2/s
    (five figures carried: tolerance 1e-4).
    """
    check("ISO VG 32 at 70 degC: nu (mm^2/s)", WALTHER_HAND, 11.186,
          VG32.kinematic_viscosity(ZERO_CELSIUS + 70.0) * 1e6, 1e-4)


def test_walther_extrapolated_beyond_the_points():
    """ISO VG 32 outside its points, with A = 9.530815, B = 3.746578 from above, by hand:

    120 degC: Z = 9.530815 - 3.746578 x log10(393.15) = 9.530815 - 3.746578 x 2.594558
              = -0.189901; 10^Z = 0.645802; nu = 10^0.645802 - 0.7 = 4.42386 - 0.7 = 3.7239
    20 degC:  Z = 9.530815 - 3.746578 x log10(293.15) = 9.530815 - 3.746578 x 2.467089
              = 0.287669; 10^Z = 1.939409; nu = 10^1.939409 - 0.7 = 86.978 - 0.7 = 86.278
    (an extrapolation of the formula, not a claim about a real oil).
    """
    check("ISO VG 32 at 120 degC: nu (mm^2/s), extrapolated", WALTHER_HAND, 3.7239,
          VG32.kinematic_viscosity(ZERO_CELSIUS + 120.0) * 1e6, 1e-4)
    check("ISO VG 32 at 20 degC: nu (mm^2/s), extrapolated", WALTHER_HAND, 86.278,
          VG32.kinematic_viscosity(ZERO_CELSIUS + 20.0) * 1e6, 1e-4)


def test_two_given_points_reproduced_and_third_by_hand():
    """An invented oil: 150 mm^2/s at 25 degC, 12 mm^2/s at 90 degC.  At 60 degC, by hand:

    Z1 = log10(log10(150.7)) = log10(2.178113) = 0.338080
    Z2 = log10(log10(12.7))  = log10(1.103804) = 0.042892
    log10(298.15) = 2.474435, log10(363.15) = 2.560086, log10(333.15) = 2.522640
    B = 0.295188 / 0.085651 = 3.44640;  A = 0.338080 + 3.44640 x 2.474435 = 8.86598
    Z = 8.86598 - 3.44640 x 2.522640 = 0.171947;  10^Z = 1.485753
    nu = 10^1.485753 - 0.7 = 30.6022 - 0.7 = 29.902 mm^2/s
    """
    oil = Lubricant(points=((ZERO_CELSIUS + 25.0, 150e-6), (ZERO_CELSIUS + 90.0, 12e-6)))
    check("two-point oil: nu at 25 degC (mm^2/s)", WALTHER, 150.0,
          oil.kinematic_viscosity(ZERO_CELSIUS + 25.0) * 1e6, 1e-12)
    check("two-point oil: nu at 90 degC (mm^2/s)", WALTHER, 12.0,
          oil.kinematic_viscosity(ZERO_CELSIUS + 90.0) * 1e6, 1e-12)
    check("two-point oil: nu at 60 degC (mm^2/s)", WALTHER_HAND, 29.902,
          oil.kinematic_viscosity(ZERO_CELSIUS + 60.0) * 1e6, 1e-4)


def test_density_and_dynamic_viscosity_at_70_degc():
    """rho = 870 (1 - 0.00065 x (343.15 - 288.15)) = 870 x 0.96425 = 838.8975 kg/m^3;
    mu = nu rho = 11.186e-6 m^2/s x 838.8975 kg/m^3 = 9.3840e-3 Pa s."""
    t = ZERO_CELSIUS + 70.0
    check("ISO VG 32 at 70 degC: density (kg/m^3)", HAND, 838.8975, VG32.density(t), 1e-12)
    check("ISO VG 32 at 70 degC: dynamic viscosity (Pa s)", WALTHER_HAND, 9.3840e-3,
          VG32.dynamic_viscosity(t), 1e-4)


def test_temperature_rise_and_effective_temperature():
    """1500 W carried by 1.0e-4 m^3/s of oil supplied at 40 degC (313.15 K):
    rho = 870 (1 - 0.00065 x 25) = 855.8625 kg/m^3; rho c_p Q = 855.8625 x 2000 x 1e-4
    = 171.1725 W/K; rise = 1500 / 171.1725 = 8.76309 K;
    T_eff = 313.15 + 0.8 x 8.76309 = 320.1605 K."""
    rise = VG32.temperature_rise(1500.0, 1.0e-4, ZERO_CELSIUS + 40.0)
    check("oil temperature rise, 1500 W, 0.1 L/s (K)", ENERGY, 8.76309, rise, 1e-5)
    check("effective film temperature (K)", RULE, 320.1605,
          effective_temperature(ZERO_CELSIUS + 40.0, rise), 1e-6)
