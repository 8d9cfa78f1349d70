"""Sizes to draw rotor parts at (presentation only)."""

from __future__ import annotations

import math

from ._units import MM


def equivalent_disk(disk):
    """Diameter and width (m) of the uniform solid disk with the disk's mass and inertia.

    A uniform disk has ``Ip = m D^2 / 8`` and ``Id = Ip / 2 + m w^2 / 12``;
    these are solved for ``D`` and ``w``.  Used only to draw the disk to a
    believable size.  ``w`` is None when the inertias give no width (a thin
    disk or ``Id < Ip / 2``).
    """
    if disk.mass <= 0 or disk.polar_inertia <= 0:
        return None, None
    diameter = math.sqrt(8.0 * disk.polar_inertia / disk.mass)
    excess = disk.transverse_inertia - disk.polar_inertia / 2.0
    width = math.sqrt(12.0 * excess / disk.mass) if excess > 0 else None
    return diameter, width


def disk_size(disk, rotor):
    """Drawn diameter and width of a disk, mm."""
    d_shaft = shaft_diameter(rotor, disk.station)
    diameter, width = equivalent_disk(disk)
    if diameter is None:
        # No inertia to go by: a steel-like disk of the shaft's width holding the mass.
        width = d_shaft
        area = disk.mass / (7850.0 * width)
        diameter = math.sqrt(4.0 * area / math.pi + d_shaft**2)
    diameter = max(diameter, 1.15 * d_shaft)
    if width is None:
        width = 0.08 * diameter
    width = min(max(width, 0.04 * diameter), 1.5 * diameter)
    return diameter * MM, width * MM


def shaft_diameter(rotor, station):
    """Largest outer diameter of the sections meeting at a station, m."""
    n = len(rotor.sections)
    sides = [rotor.sections[i] for i in (station - 1, station) if 0 <= i < n]
    return max(s.outer_diameter for s in sides)

