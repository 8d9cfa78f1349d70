"""Formulas of industry practice for centrifugal machinery, in SI.

These are common practice, quoted from memory from industry standards for
centrifugal compressors and pumps; confirm them against the edition of the
standard your purchase specification names.
"""

from __future__ import annotations

import math

from .units import to_rpm

#: Residual-unbalance constant: U = 6350 W / N  g*mm with W in kg, N in rpm
#: (4 W / N oz*in in US units; common practice, from memory).
RESIDUAL_CONSTANT_G_MM = 6350.0

#: Default multiple of the residual unbalance used for the response analysis
#: (common practice, from memory: twice the allowable residual).
RESIDUAL_MULTIPLE = 2.0

#: Allowable shaft vibration A = 25.4 sqrt(12000 / N) micrometres peak-to-peak,
#: N in rpm, at most 25.4 micrometres (1 mil) (common practice, from memory).
VIBRATION_CONSTANT_UM = 25.4
VIBRATION_CAP_UM = 25.4

#: Largest response as a share of the local radial clearance (common practice).
CLEARANCE_SHARE = 0.75


def residual_unbalance(mass, max_speed):
    """Allowable residual unbalance, kg*m, for ``mass`` (kg) at ``max_speed`` (rad/s).

    U = 6350 W / N g*mm (W in kg, N in rpm); common practice, from memory.
    """
    if mass <= 0 or max_speed <= 0:
        raise ValueError("mass and speed must be positive")
    return RESIDUAL_CONSTANT_G_MM * mass / to_rpm(max_speed) * 1e-6


def allowable_vibration(speed):
    """Allowable peak-to-peak shaft vibration, m, at ``speed`` (rad/s).

    A = 25.4 sqrt(12000 / N) um, N in rpm, capped at 25.4 um; common practice,
    from memory.
    """
    rpm = to_rpm(speed)
    if rpm <= 0:
        return VIBRATION_CAP_UM * 1e-6
    return min(VIBRATION_CONSTANT_UM * math.sqrt(12000.0 / rpm), VIBRATION_CAP_UM) * 1e-6
