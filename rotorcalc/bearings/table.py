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
        table = tuple(values.get(name, (0.0,)))
        if isinstance(table[0], tuple):
            rows = np.asarray(table, dtype=float)
            row = rows[0] if len(rows) == 1 else np.array(
                [np.interp(speed, speeds, rows[:, j]) for j in range(rows.shape[1])])
            out[name] = float(np.interp(frequency, whirl, row))
        elif len(table) == 1:
            out[name] = table[0]
        else:
            out[name] = float(np.interp(speed, speeds, table))
    k = np.array([[out["kxx"], out["kxy"]], [out["kyx"], out["kyy"]]])
    c = np.array([[out["cxx"], out["cxy"]], [out["cyx"], out["cyy"]]])
    return k, c


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
