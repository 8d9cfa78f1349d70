"""Formulas of industry practice for centrifugal machinery, in SI.

These are common practice, quoted from memory from industry standards for
centrifugal compressors and pumps; confirm them against the edition of the
standard your purchase specification names.
"""

from __future__ import annotations

import math

from .bearings.tabulate import journal_static_loads
from .units import to_rpm
from .errors import InputError

#: Residual-unbalance constant: U = 6350 W / N  g*mm with W in kg, N in rpm
#: (4 W / N oz*in in US units; common practice, from memory).  W is the static
#: load of the journal nearer the unbalance, or the overhung mass for an
#: overhung disk (:func:`residual_mass`).
RESIDUAL_CONSTANT_G_MM = 6350.0

#: Default multiple of the residual unbalance used for the response analysis
#: (common practice, from memory: twice the allowable residual).
RESIDUAL_MULTIPLE = 2.0

#: The residual-unbalance rule in words (the formula of :func:`residual_unbalance`).
RESIDUAL_RULE_TEXT = (f"U = {RESIDUAL_CONSTANT_G_MM:g} W/N g*mm per weight, W the static load of "
                      "the journal nearer the weight (or the overhung mass), N the maximum "
                      "continuous speed in rpm (common practice, from memory)")

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
        raise InputError("residual", "mass and speed must be positive", kind="range")
    return RESIDUAL_CONSTANT_G_MM * mass / to_rpm(max_speed) * 1e-6


def _outboard_mass(rotor, z_bearing, side):
    """Mass outboard of ``z_bearing`` (side -1: towards station 0, +1: the other end), kg.

    Sections that straddle the bearing count with the share of their length
    that lies outboard (their mass is uniform along them).
    """
    z = rotor.station_positions
    total = 0.0
    for i, s in enumerate(rotor.sections):
        a, b = z[i], z[i + 1]
        outside = (max(0.0, min(b, z_bearing) - a) if side < 0
                   else max(0.0, b - max(a, z_bearing)))
        total += s.mass * outside / (b - a)
    total += sum(d.mass for d in rotor.disks
                 if (z[d.station] < z_bearing if side < 0 else z[d.station] > z_bearing))
    return total


def residual_weight(rotor, station):
    """The mass W of the residual-unbalance rule for an unbalance at ``station`` (kg),
    and what it is, in words.

    Between the journals: the static load of the nearer journal; outboard of
    them (an overhung disk): the mass outboard of the nearer journal (common
    practice, from memory: confirm against the applicable standard).  With
    fewer than two journals, the whole rotor mass.
    """
    loads = journal_static_loads(rotor)
    if not loads:
        return rotor.mass, "rotor mass (fewer than two journals)"
    z = rotor.station_positions
    zw = float(z[station])
    zj = {i: float(z[rotor.bearings[i].station]) for i in loads}
    lo, hi = min(zj.values()), max(zj.values())
    name = {i: rotor.bearings[i].name or f"bearing[{i}]" for i in loads}
    if zw < lo or zw > hi:
        i = min(loads, key=lambda i: abs(zj[i] - zw))
        return (_outboard_mass(rotor, zj[i], -1 if zw < lo else +1),
                f"mass outboard of journal {name[i]} (overhung)")
    nearest = min(loads, key=lambda i: (abs(zj[i] - zw), i))
    return loads[nearest], f"static load of journal {name[nearest]} (the nearer)"


def residual_mass(rotor, station):
    """The mass W of :func:`residual_weight` alone, kg."""
    return residual_weight(rotor, station)[0]


#: The vibration rule in words (the formula of :func:`allowable_vibration`).
VIBRATION_RULE_TEXT = (f"{VIBRATION_CONSTANT_UM:g}*sqrt(12000/N) um pk-pk with N the maximum "
                       f"continuous speed, at most {VIBRATION_CAP_UM:g} um")


def allowable_vibration(speed):
    """Allowable peak-to-peak shaft vibration, m, at ``speed`` (rad/s).

    A = 25.4 sqrt(12000 / N) um, N in rpm, capped at 25.4 um; common practice,
    from memory.
    """
    rpm = to_rpm(speed)
    if rpm <= 0:
        return VIBRATION_CAP_UM * 1e-6
    return min(VIBRATION_CONSTANT_UM * math.sqrt(12000.0 / rpm), VIBRATION_CAP_UM) * 1e-6


#: Cross-coupled stiffness per compressor stage, the screening estimate of industry standards
#: for centrifugal compressors (common practice, from memory; confirm against the edition that
#: applies): q = B_c T (rho_d / rho_s) / (D H), with T = P / Omega the stage's torque, D the
#: impeller diameter, H the narrower of the impeller exit and the diffuser width, rho_d / rho_s
#: the discharge-to-suction density ratio and B_c = 3.  The standards write it in their units as
#: q = B_c C P (rho_d / rho_s) / (D H N), C turning power over speed into torque (in hp, rpm,
#: in and lbf/in, C = 33 000 x 12 / (2 pi) = 63 025, written 63 000); this code uses the exact
#: torque P / Omega in SI instead.  Wachel's earlier form puts the gas's molecular weight where
#: B_c is.
STAGE_FACTOR = 3.0
STAGE_FORMS = ("standard", "wachel")


def stage_cross_coupling(power, speed, diameter, width, density_ratio, molecular_weight=None,
                         form="standard"):
    """Expected aerodynamic cross-coupled stiffness of one stage, N/m (see
    :data:`STAGE_FACTOR`).  ``power`` W, ``speed`` rad/s, ``diameter`` and ``width`` m."""
    for key, value in (("power", power), ("speed", speed), ("impeller_diameter", diameter),
                       ("passage_width", width), ("density_ratio", density_ratio)):
        if not (math.isfinite(value) and value > 0):
            raise InputError(f"stage.{key}", "must be positive", value=value, kind="range")
    if form not in STAGE_FORMS:
        raise InputError("stage.form", "is not a known form", value=form,
                         expected=" or ".join(STAGE_FORMS), kind="choice")
    if form == "wachel":
        if molecular_weight is None or not molecular_weight > 0:
            raise InputError("stage.molecular_weight", "is needed by Wachel's form",
                             value=molecular_weight, expected="the gas's molecular weight, "
                             "e.g. 28", kind="missing")
        factor = molecular_weight
    else:
        factor = STAGE_FACTOR
    torque = power / speed
    return factor * torque * density_ratio / (diameter * width)
