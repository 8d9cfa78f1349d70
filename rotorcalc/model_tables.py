"""Tables of the rotor model itself (sections, disks, bearings and seals, probes and
clearances): the same :class:`~rotorcalc.tables.Column` lists serve the terminal, CSV and
the report."""

from __future__ import annotations

import numpy as np

from .tables import Column
from .units import to_rpm

MM = 1e3


def section_rows(rotor):
    """(number from 1, from station, to station, Section) per shaft section."""
    return [(i + 1, i, i + 1, s) for i, s in enumerate(rotor.sections)]


SECTION_COLUMNS = [
    Column("Section", lambda r: r[0], "{:d}", "section"),
    Column("Stations", lambda r: f"{r[1]}-{r[2]}", "{}", "stations"),
    Column("Length mm", lambda r: r[3].length * MM, "{:.1f}", "length_mm"),
    Column("Outer dia. mm", lambda r: r[3].outer_diameter * MM, "{:.1f}", "outer_diameter_mm"),
    Column("Inner dia. mm", lambda r: r[3].inner_diameter * MM, "{:.1f}", "inner_diameter_mm"),
    Column("Material", lambda r: r[3].material.name, "{}", "material"),
    Column("E GPa", lambda r: r[3].material.youngs_modulus / 1e9, "{:.0f}", "youngs_modulus_gpa"),
    Column("Density kg/m3", lambda r: r[3].material.density, "{:.0f}", "density_kg_m3"),
    Column("Added mass kg", lambda r: r[3].added_mass, "{:.2f}", "added_mass_kg"),
    Column("Elements", lambda r: r[3].elements, "{:d}", "elements"),
    Column("Mass kg", lambda r: r[3].mass, "{:.2f}", "mass_kg"),
]


def disk_rows(rotor):
    """(station label, Disk) per disk."""
    return [(rotor.station_label(d.station), d) for d in rotor.disks]


DISK_COLUMNS = [
    Column("Disk", lambda r: r[1].name or "-", "{}", "disk"),
    Column("Station", lambda r: r[0], "{}", "station"),
    Column("Mass kg", lambda r: r[1].mass, "{:.2f}", "mass_kg"),
    Column("Polar inertia kg*m2", lambda r: r[1].polar_inertia, "{:.4g}", "polar_inertia_kg_m2"),
    Column("Transverse inertia kg*m2", lambda r: r[1].transverse_inertia, "{:.4g}",
           "transverse_inertia_kg_m2"),
]


def bearing_rows(curves, speed):
    """(BearingCurves, speed rad/s, kxx kxy kyx kyy cxx cxy cyx cyy at ``speed``) per bearing
    or seal: the coefficients the analyses read there (interpolated in the table, the end
    value held outside it)."""
    rows = []
    for c in curves:
        values = [float(np.interp(speed, c.speeds, c.stiffness[:, i, j]))
                  for i, j in ((0, 0), (0, 1), (1, 0), (1, 1))]
        values += [float(np.interp(speed, c.speeds, c.damping[:, i, j]))
                   for i, j in ((0, 0), (0, 1), (1, 0), (1, 1))]
        rows.append((c, speed, *values))
    return rows


BEARING_MODEL_COLUMNS = [
    Column("Name", lambda r: r[0].name, "{}", "name"),
    Column("Kind", lambda r: str(r[0].role), "{}", "role"),
    Column("Station", lambda r: r[0].station, "{:d}", "station"),
    Column("From", lambda r: r[0].source, "{}", "source"),
    Column("Speeds", lambda r: len(r[0].speeds), "{:d}", "table_speeds"),
] + [Column(f"{name} {'MN/m' if name[0] == 'k' else 'kN*s/m'}",
            lambda r, j=j: r[j + 2] / 1e6 if j < 4 else r[j + 2] / 1e3, "{:.4g}",
            f"{name}_{'mn_per_m' if name[0] == 'k' else 'kn_s_per_m'}")
     for j, name in enumerate(("kxx", "kxy", "kyx", "kyy", "cxx", "cxy", "cyx", "cyy"))]


def bearing_model_caption(speed):
    return (f"Coefficients at {to_rpm(speed):.0f} rpm (maximum continuous speed), as the "
            "analyses read them; the full tables against speed follow.")


def probe_rows(rotor):
    """(name, station label, angle deg) per probe."""
    return [(p.name or f"probe {i + 1}", rotor.station_label(p.station),
             float(np.degrees(p.angle))) for i, p in enumerate(rotor.probes)]


PROBE_COLUMNS = [
    Column("Probe", lambda r: r[0], "{}", "probe"),
    Column("Station", lambda r: r[1], "{}", "station"),
    Column("Angle deg", lambda r: r[2], "{:.0f}", "angle_deg"),
]


def clearance_rows(rotor):
    """(name, station label, radial clearance m) per clearance."""
    return [(c.name or f"clearance {i + 1}", rotor.station_label(c.station), c.radial)
            for i, c in enumerate(rotor.clearances)]


CLEARANCE_COLUMNS = [
    Column("Clearance", lambda r: r[0], "{}", "clearance"),
    Column("Station", lambda r: r[1], "{}", "station"),
    Column("Radial um", lambda r: r[2] * 1e6, "{:.0f}", "radial_um"),
]


MASS_COLUMNS = [
    Column("Quantity", lambda r: r[0], "{}", "quantity"),
    Column("Value", lambda r: r[1], "{:.4g}", "value"),
    Column("Unit", lambda r: r[2], "{}", "unit"),
]


def mass_rows(mass, rotor, mesh):
    """(quantity, value, unit) rows of the rotor's mass properties and mesh."""
    return [("Total mass", mass.mass, "kg"),
            ("Centre of mass from station 0", mass.centre * MM, "mm"),
            ("Polar moment of inertia", mass.polar, "kg*m2"),
            ("Transverse moment of inertia about the centre of mass", mass.transverse,
             "kg*m2"),
            ("Length", rotor.length * MM, "mm"),
            ("Stations", len(rotor.sections) + 1, "-"),
            ("Shaft elements", mesh.elements, "-"),
            ("Longest element / its outer diameter", max(
                s.length / s.elements / s.outer_diameter for s in rotor.sections), "-")]
