"""Formulas of industry practice for centrifugal machinery, in SI.

These are common practice, quoted from memory from industry standards for
centrifugal compressors and pumps; confirm them against the edition of the
standard your purchase specification names.
"""

from __future__ import annotations

import math

import numpy as np

from .units import to_rpm

#: Residual-unbalance constant: U = 6350 W / N  g*mm with W in kg, N in rpm
#: (4 W / N oz*in in US units; common practice, from memory).  W is the static
#: load of the journal nearer the unbalance, or the overhung mass for an
#: overhung disk (:func:`residual_mass`).
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


def _mass_items(rotor):
    """(axial position of the centre of mass, mass) of every section and disk, m and kg."""
    z = rotor.station_positions
    items = [((z[i] + z[i + 1]) / 2.0, s.mass) for i, s in enumerate(rotor.sections)]
    items += [(z[d.station], d.mass) for d in rotor.disks]
    return items


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


def journal_static_loads(rotor):
    """Static load of each journal bearing under the rotor's weight, as a mass (kg).

    Journals are the bearings of kind "bearing" (seals carry no static load
    here).  On two journals the rotor is statically determinate: moment
    balance about each (lever rule; rigid or flexible shaft alike).  On three
    or more, the shaft is taken as rigid on the journals' vertical stiffness
    ``kyy`` at the maximum continuous speed (a screening split; a statics
    analysis on the flexible shaft is more exact).  Returns ``{bearing
    index: mass}``; empty with fewer than two journals.
    """
    z = rotor.station_positions
    journals = [(i, float(z[b.station])) for i, b in enumerate(rotor.bearings)
                if b.kind == "bearing"]
    if len(journals) < 2 or len({zj for _, zj in journals}) < 2:
        return {}
    items = _mass_items(rotor)
    weight = sum(m for _, m in items)
    moment = sum(m * zc for zc, m in items)   # about z = 0
    if len(journals) == 2:
        (i1, z1), (i2, z2) = journals
        r2 = (moment - weight * z1) / (z2 - z1)
        return {i1: float(weight - r2), i2: float(r2)}
    k = np.array([max(rotor.bearings[i].matrices(rotor.operating.max_speed)[0][1, 1], 0.0)
                  for i, _ in journals])
    zs = np.array([zj for _, zj in journals])
    # rigid shaft y = Y + A z on springs k: force and moment balance
    mat = np.array([[k.sum(), (k * zs).sum()], [(k * zs).sum(), (k * zs * zs).sum()]])
    try:
        y, a = np.linalg.solve(mat, [weight, moment])
    except np.linalg.LinAlgError:
        return {}
    return {i: float(kk * (y + a * zj)) for (i, zj), kk in zip(journals, k)}


def residual_mass(rotor, station):
    """The mass W of the residual-unbalance rule for an unbalance at ``station``, kg.

    Between the journals: the static load of the nearer journal; outboard of
    them (an overhung disk): the mass outboard of the nearer journal (common
    practice, from memory: confirm against the applicable standard).  With
    fewer than two journals, the whole rotor mass.
    """
    loads = journal_static_loads(rotor)
    if not loads:
        return rotor.mass
    z = rotor.station_positions
    zw = float(z[station])
    zj = {i: float(z[rotor.bearings[i].station]) for i in loads}
    lo, hi = min(zj.values()), max(zj.values())
    if zw < lo:
        return _outboard_mass(rotor, lo, -1)
    if zw > hi:
        return _outboard_mass(rotor, hi, +1)
    nearest = min(loads, key=lambda i: (abs(zj[i] - zw), i))
    return loads[nearest]


def allowable_vibration(speed):
    """Allowable peak-to-peak shaft vibration, m, at ``speed`` (rad/s).

    A = 25.4 sqrt(12000 / N) um, N in rpm, capped at 25.4 um; common practice,
    from memory.
    """
    rpm = to_rpm(speed)
    if rpm <= 0:
        return VIBRATION_CAP_UM * 1e-6
    return min(VIBRATION_CONSTANT_UM * math.sqrt(12000.0 / rpm), VIBRATION_CAP_UM) * 1e-6
