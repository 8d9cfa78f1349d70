"""Units the pictures are drawn in: rpm and cpm, mm along the shaft, µm of vibration,
klbf/in beside N/m.  The core is SI; these conversions happen only here.

Speeds come from :mod:`rotorcalc.units` (``RPM``, ``to_rpm``, ``to_hz``), which the
whole package shares; the lengths and the stiffness unit are the pictures' own.
"""

from __future__ import annotations

import numpy as np

from ..units import RPM, to_hz, to_rpm

__all__ = ["RPM", "to_rpm", "to_hz", "from_rpm", "MM", "UM", "N_PER_KLBF_IN", "to_klbf_in",
           "from_klbf_in", "pk_pk_um", "um_text"]

#: Millimetres per metre (axial positions, diameters).
MM = 1000.0
#: Micrometres per metre (vibration amplitudes, orbits).
UM = 1e6
#: N/m per klbf/in (1 lbf = 4.4482216152605 N, 1 in = 0.0254 m, both exact by definition).
N_PER_KLBF_IN = 4.4482216152605e3 / 0.0254


def from_rpm(rpm):
    """rev/min to rad/s (works on arrays)."""
    return rpm * RPM


def to_klbf_in(k):
    """N/m to klbf/in (works on arrays), for a second stiffness axis."""
    return np.asarray(k, dtype=float) / N_PER_KLBF_IN


def from_klbf_in(q):
    """klbf/in to N/m (works on arrays)."""
    return np.asarray(q, dtype=float) * N_PER_KLBF_IN


def pk_pk_um(value):
    """Peak-to-peak µm of a complex zero-to-peak amplitude in m (works on arrays)."""
    return UM * 2.0 * abs(value)


def um_text(value):
    """A size in µm for a label: whole above 100, three figures above 0.1, else two."""
    if value >= 100:
        return f"{value:.0f} \u00b5m"
    if value >= 0.1:
        return f"{value:.3g} \u00b5m"
    return f"{value:.2g} \u00b5m"
