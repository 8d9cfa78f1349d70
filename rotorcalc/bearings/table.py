"""Coefficient tables as a bearing model: the eight coefficients given over speed (and,
for a seal or bearing analysis that gives them so, over whirl frequency), read by linear
interpolation with the end values held.

Every bearing model answers ``coefficients(speed, load, *, whirl=None)`` with an object
that has ``stiffness`` and ``damping`` (2 x 2, SI): this one ignores the load (a table was
computed for one), :class:`rotorcalc.bearings.FilmJournal` needs it.  A
:class:`rotorcalc.supports.Bearing` given by tables reads itself through a
:class:`TableReader` (the same numbers as :func:`read_table`, faster); ``Bearing.model``
gives its model either way.
"""

from __future__ import annotations

import bisect
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


class TableReader:
    """:func:`read_table` for one table, made once and read many times: an analysis reads every
    bearing at every speed it solves (about 4000 reads in the compressor's ``criticals``).

    A table over speed alone has its eight coefficients read at once: one search for the
    interval, then numpy's own interpolation formula ``slope * (speed - s[j]) + value[j]`` on
    all of them, the table value itself at a table point, the end values held outside, and
    coefficients given by one value (or not given) taken as they are.  Each coefficient so
    equals ``np.interp`` of its own column bit for bit (tests/unit/test_bearing_models.py);
    a read costs 5 us against 16 us for eight interpolations (docs/performance.md).  A
    two-way table, and a speed that is not a number, are read by :func:`read_table`."""

    def __init__(self, speeds, whirl, values):
        self.speeds = np.asarray(speeds, dtype=float)
        self.whirl = np.asarray(whirl, dtype=float)
        self.values = as_arrays(values)
        self.stack = None
        if all(v.ndim <= 1 for v in self.values.values()):
            stack = np.zeros((max(len(self.speeds), 1), len(NAMES)))
            fixed = np.ones(len(NAMES), dtype=bool)     # one value, or none (zero)
            for i, name in enumerate(NAMES):
                column = self.values.get(name)
                if column is not None:
                    stack[:, i] = column[0] if column.size == 1 else column
                    fixed[i] = column.size == 1
            self.stack, self.fixed, self.fixed_values = stack, fixed, stack[0, fixed]
            self.points = self.speeds.tolist()      # searched by bisect: the fastest here
            self.slopes = ((stack[1:] - stack[:-1])
                           / (self.speeds[1:] - self.speeds[:-1])[:, None])
            for array in (self.stack, self.slopes, self.fixed_values):
                array.flags.writeable = False

    def __call__(self, speed, frequency=None):
        """``(K, C)`` at ``speed`` (rad/s), as :func:`read_table`: new arrays at every call."""
        speed = float(speed)
        if self.stack is None or speed != speed:
            return read_table(self.speeds, self.whirl, self.values, speed, frequency)
        s, stack = self.speeds, self.stack
        if len(stack) == 1 or not speed > s[0]:
            row = stack[0].copy()         # below the table (or at its first point), held
        elif not speed < s[-1]:
            row = stack[-1].copy()        # at or beyond its last point, held
        else:
            j = bisect.bisect_right(self.points, speed) - 1
            if s[j] == speed:
                row = stack[j].copy()
            else:
                row = self.slopes[j] * (speed - s[j]) + stack[j]
                row[self.fixed] = self.fixed_values     # as given (a -0.0 stays -0.0)
        return row[:4].reshape(2, 2), row[4:].reshape(2, 2)


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
