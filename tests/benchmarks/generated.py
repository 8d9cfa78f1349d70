"""Generated rotors of any element count for the large-model benchmark and tests.

A long multi-stage rotor: a stepped shaft, impellers at every stage, two
fluid-film-like bearings with speed-dependent, cross-coupled coefficients
(one of them on a pedestal) and a seal mid-span.  Invented proportions; the
point is a realistic sparsity pattern and spectrum, not a real machine.
"""

from __future__ import annotations

import numpy as np

from rotorcalc.model import (Bearing, Disk, Material, OperatingRange, Rotor, Section,
                             Settings, Support)

STEEL = Material("steel", 2.07e11, 2.07e11 / 2.6, 7830.0)
RPM = 2.0 * np.pi / 60.0


def generated_rotor(elements, mode_count=20, speed_count=100, stages=8):
    """A rotor of about ``elements`` shaft elements (rounded to the section count)."""
    # section (length m, outer diameter m, share of the elements)
    layout = [(0.20, 0.090, 1), (0.15, 0.110, 1), (0.25, 0.140, 1)]
    layout += [(0.16, 0.160, 1)] * stages
    layout += [(0.25, 0.140, 1), (0.15, 0.110, 1), (0.12, 0.090, 1)]
    if elements < len(layout):
        raise ValueError(f"at least {len(layout)} elements (one per section)")
    total = sum(length for length, _, _ in layout)
    counts = [max(1, int(round(elements * length / total))) for length, _, _ in layout]
    while sum(counts) != elements:   # exact total: adjust the longest-meshed sections
        i = int(np.argmax(counts))
        counts[i] += 1 if sum(counts) < elements else -1
    sections = tuple(Section(length, diameter, STEEL, elements=n)
                     for (length, diameter, _), n in zip(layout, counts))
    disks = tuple(Disk.from_geometry(3 + i, 0.42, 0.16, 0.05, 7830.0, name=f"stage {i + 1}")
                  for i in range(stages + 1))
    speeds = tuple(np.array([2000.0, 6000.0, 10000.0, 14000.0]) * RPM)
    journal = {"kxx": (1.5e8, 2.0e8, 2.6e8, 3.0e8), "kyy": (2.2e8, 2.8e8, 3.3e8, 3.8e8),
               "kxy": (2e7, 4e7, 6e7, 8e7), "kyx": (-2e7, -4e7, -6e7, -8e7),
               "cxx": (1.5e5, 1.3e5, 1.1e5, 1.0e5), "cyy": (1.8e5, 1.6e5, 1.4e5, 1.2e5)}
    seal = {"kxx": (2e7,), "kyy": (2e7,), "kxy": (5e6,), "kyx": (-5e6,), "cxx": (2e4,),
            "cyy": (2e4,)}
    bearings = (Bearing(1, journal, speeds=speeds, name="drive end"),
                Bearing(3 + stages // 2, seal, name="centre seal", role="seal"),
                Bearing(len(layout) - 1, journal, speeds=speeds, name="non-drive end",
                        support=Support(kx=8e8, ky=6e8, mass=150.0, cx=2e5, cy=2e5)))
    settings = Settings(speed_from=0.0, speed_to=15000.0 * RPM, speed_count=speed_count,
                        mode_count=mode_count)
    return Rotor(sections, OperatingRange(8000.0 * RPM, 11000.0 * RPM, 12000.0 * RPM),
                 disks=disks, bearings=bearings, settings=settings,
                 name=f"generated rotor, {elements} elements")
