"""Coefficient tables as a bearing model: the eight coefficients given over speed (and,
for a seal or bearing analysis that gives them so, over whirl frequency), read by linear
interpolation with the end values held.

Every bearing model answers ``coefficients(speed, load, *, whirl=None)`` with an object
that has ``stiffness`` and ``damping`` (2 x 2, SI): this one ignores the load (a table was
computed for one), :class:`rotorcalc.bearings.FilmJournal` needs it.  A
:class:`rotorcalc.supports.Bearing` given by tables reads itself through
:func:`read_table`; ``Bearing.model`` gives its model either way.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

NAMES = ("kxx", "kxy", "kyx", "kyy", "cxx", "cxy", "cyx", "cyy")


@dataclass(frozen=True)
class Coefficients:
    """Stiffness (N/m) and damping (N s/m), each ``[[xx, xy], [yx, yy]]``."""

    stiffness: np.ndarray
    damping: np.ndarray


def read_table(speeds, whirl, values, speed, frequency=None):
    """``(K, C)`` of a table at ``speed`` (rad/s) and whirl ``frequency`` (rad/s; None: the
    speed, the synchronous coefficients).

    ``values`` maps each name of :data:`NAMES` (a missing one is zero) to a tuple of one
    value (constant), one value per speed, or rows over whirl frequency (one row per speed,
    or one row without speeds).  Linear in speed, then in frequency; end values held.
    """
    frequency = speed if frequency is None else frequency
    out = {}
    for name in NAMES:
        table = values.get(name, (0.0,))
        table = table if isinstance(table, np.ndarray) else np.asarray(table, dtype=float)
        if table.ndim == 2:
            row = table[0] if len(table) == 1 else _row_at(speeds, table, speed)
            out[name] = float(np.interp(frequency, whirl, row))
        elif table.size == 1:
            out[name] = float(table[0])
        else:
            out[name] = float(np.interp(speed, speeds, table))
    k = np.array([[out["kxx"], out["kxy"]], [out["kyx"], out["kyy"]]])
    c = np.array([[out["cxx"], out["cxy"]], [out["cyx"], out["cyy"]]])
    return k, c


def _row_at(speeds, rows, speed):
    """The row of a two-way table at ``speed``: linear between the rows around it, the end
    rows held outside."""
    j = int(np.searchsorted(speeds, speed))
    if j == 0:
        return rows[0]
    if j >= len(speeds):
        return rows[-1]
    t = (speed - speeds[j - 1]) / (speeds[j] - speeds[j - 1])
    return (1.0 - t) * rows[j - 1] + t * rows[j]


def as_arrays(values):
    """``values`` (tuples, as :func:`read_table` takes them) as arrays: read faster."""
    return {name: np.asarray(v, dtype=float) for name, v in values.items()}


@dataclass(frozen=True)
class CoefficientTable:
    """A bearing's coefficients as given: ``speeds`` and ``whirl`` (rad/s) and ``values``
    (see :func:`read_table`).  Validated by :class:`rotorcalc.supports.Bearing`."""

    speeds: tuple
    whirl: tuple
    values: object

    def coefficients(self, speed, load=None, *, whirl=None):
        """The coefficients at ``speed`` (rad/s); ``load`` is not used (a table holds the
        coefficients of one load); ``whirl`` (rad/s) reads a two-way table."""
        return Coefficients(*read_table(self.speeds, self.whirl, self.values, speed, whirl))
