"""Bearings, seals and destabilising sources (2x2 stiffness and damping, constant or tabulated
over speed and, where a seal or bearing analysis gives them so, over whirl frequency too) and
the flexible supports under bearings: the parts of the model that hold or push
the shaft at a station.  Re-exported by :mod:`rotorcalc.model`."""

from __future__ import annotations

import dataclasses
import math
from dataclasses import dataclass

import numpy as np

from ._checks import _freeze, _one_of, _positive
from .bearings.table import CoefficientTable, TableReader
from .errors import InputError
from .vocabulary import BearingRole, old_keywords

COEFFICIENT_NAMES = ("kxx", "kxy", "kyx", "kyy", "cxx", "cxy", "cyx", "cyy")
#: A principal stiffness or damping below minus this share of the largest
#: coefficient is negative (not roundoff of a symmetric pair).
PRINCIPAL_RTOL = 1e-9


@dataclass(frozen=True)
class Support:
    """A pedestal between a bearing and ground: mass, stiffness and damping per direction.

    The bearing connects the shaft to the support mass; ``kx, ky`` (N/m) and
    ``cx, cy`` (N s/m) connect the support mass (kg) to ground.
    """

    kx: float
    ky: float
    mass: float = 0.0
    cx: float = 0.0
    cy: float = 0.0
    key: str = "support"

    def __post_init__(self):
        _positive(f"{self.key}.kx", self.kx)
        _positive(f"{self.key}.ky", self.ky)
        _positive(f"{self.key}.mass", self.mass, allow_zero=True)
        _positive(f"{self.key}.cx", self.cx, allow_zero=True)
        _positive(f"{self.key}.cy", self.cy, allow_zero=True)


@old_keywords(kind="role")
@dataclass(frozen=True)
class Bearing:
    """Linear bearing (or seal) coefficients, each constant or tabulated over speed.

    Attributes
    ----------
    station : int
    speeds : tuple of float
        rad/s, strictly increasing; empty when every coefficient is constant.
    coefficients : dict
        ``{"kxx": (values...), ...}`` for the eight names of
        :data:`COEFFICIENT_NAMES`; each a tuple of one value (constant) or of
        ``len(speeds)`` values.  N/m and N s/m.  The force on the shaft is
        ``-K q - C q'`` with ``K = [[kxx, kxy], [kyx, kyy]]``.  With ``whirl``
        given, a coefficient may instead be a tuple of rows, one row per speed (one
        row when the bearing has no speeds), each with one value per whirl frequency.
    whirl : tuple of float
        rad/s, strictly increasing: the whirl frequencies of the two-way tables;
        empty when no coefficient depends on the whirl frequency.
    support : Support or None
    film : object, optional
        The bearing model the tables were computed from (a
        :class:`rotorcalc.bearings.FilmJournal`), or None for tables given as they are.
        A film bearing's ``speeds`` and ``coefficients`` are the grid that
        :func:`rotorcalc.bearings.tabulate_films` computed under the rotor's static
        loads; ``film_record`` says how (loads, film states, interpolation error).

    Notes
    -----
    Outside a table the end values are held (the rule stated in the docs),
    and :meth:`outside_table` tells the caller so it can warn.  Without a whirl
    frequency, :meth:`matrices` gives the synchronous coefficients (whirl = spin).
    """

    station: int
    coefficients: dict
    speeds: tuple = ()
    name: str = ""
    role: BearingRole = BearingRole.BEARING
    support: Support | None = None
    key: str = "bearing"
    whirl: tuple = ()
    film: object = None
    film_record: object = dataclasses.field(default=None, compare=False, repr=False)

    def __post_init__(self):
        _one_of(f"{self.key}.role", self.role, tuple(BearingRole))
        object.__setattr__(self, "role", BearingRole(self.role))
        _freeze(self, "coefficients", {k: _rows_or_values(v)
                                       for k, v in self.coefficients.items()})
        object.__setattr__(self, "whirl", tuple(float(w) for w in self.whirl))
        unknown = set(self.coefficients) - set(COEFFICIENT_NAMES)
        if unknown:
            raise InputError(f"{self.key}.{sorted(unknown)[0]}", "is not a bearing coefficient",
                             expected=", ".join(COEFFICIENT_NAMES), kind="unknown-key")
        speeds = np.asarray(self.speeds, dtype=float)
        self._check_axis("speeds", speeds)
        self._check_axis("whirl_frequencies", np.asarray(self.whirl, dtype=float))
        for name in COEFFICIENT_NAMES:
            values = self.table(name)
            if values and isinstance(values[0], tuple):
                self._check_rows(name, values, speeds.size)
                flat = [(f"[{i}][{j}]", v) for i, row in enumerate(values)
                        for j, v in enumerate(row)]
            else:
                if len(values) not in (1, max(speeds.size, 1)):
                    raise InputError(f"{self.key}.{name}",
                                     f"has {len(values)} values but speeds has {speeds.size}",
                                     expected="one value, or one value per speed",
                                     kind="length")
                if len(values) > 1 and speeds.size == 0:
                    raise InputError(f"{self.key}.{name}", "is a table but the bearing has no "
                                     "speeds", expected="a 'speeds' list of the same length",
                                     kind="length")
                flat = [(f"[{i}]", v) for i, v in enumerate(values)]
            for at, v in flat:
                if not math.isfinite(v):
                    raise InputError(f"{self.key}.{name}{at}", "is not a finite number",
                                     value=v, kind="not-finite")
            # a film computed from its geometry is what its physics makes it (a lightly
            # loaded lobed film may have a negative direct stiffness), and so is its table
            # once frozen by a what-if (film gone, its record kept)
            if name in ("kxx", "kyy", "cxx", "cyy") and self.role != BearingRole.SOURCE \
                    and self.film is None and self.film_record is None:
                for at, v in flat:
                    if v < 0.0:
                        what = "stiffness" if name[0] == "k" else "damping"
                        raise InputError(f"{self.key}.{name}{at}",
                                         f"direct {what} must not be negative", value=v,
                                         kind="range")
        # a source may feed energy: that is its point; a film: as above
        if self.role != BearingRole.SOURCE and self.film is None and self.film_record is None:
            self._check_principal(speeds)

    def _check_axis(self, axis, values):
        if values.size and (not np.all(np.isfinite(values)) or np.any(values < 0)):
            raise InputError(f"{self.key}.{axis}", "must be finite and not negative",
                             value=values.tolist(), kind="range")
        if values.size > 1 and np.any(np.diff(values) <= 0.0):
            bad = int(np.argmax(np.diff(values) <= 0.0)) + 1
            raise InputError(f"{self.key}.{axis}[{bad}]", f"{axis} must be strictly increasing",
                             value=values.tolist(), kind="order")

    def _check_rows(self, name, rows, n_speeds):
        """A two-way table: one row per speed (one row without speeds), one value per
        whirl frequency in each."""
        if not self.whirl:
            raise InputError(f"{self.key}.{name}", "is a table over whirl frequency but the "
                             "bearing has no whirl frequencies", expected="a 'whirl_frequencies'"
                             " list as long as each row", kind="length")
        if len(rows) != max(n_speeds, 1):
            raise InputError(f"{self.key}.{name}",
                             f"has {len(rows)} rows but speeds has {n_speeds}",
                             expected="one row per speed (one row when there are no speeds)",
                             kind="length")
        for i, row in enumerate(rows):
            if len(row) != len(self.whirl):
                raise InputError(f"{self.key}.{name}[{i}]", f"has {len(row)} values but "
                                 f"whirl_frequencies has {len(self.whirl)}",
                                 expected="one value per whirl frequency", kind="length")

    @property
    def whirl_dependent(self) -> bool:
        """True when some coefficient is tabulated over whirl frequency."""
        return any(v and isinstance(v[0], tuple) for v in self.coefficients.values())

    def _check_principal(self, speeds):
        """The symmetric part of the stiffness and of the damping matrix must not have a
        negative principal value at any table speed: that is a static divergence or a
        source of energy, which a bearing or seal is not."""
        points = list(speeds) if len(speeds) else [0.0]
        whirls = list(self.whirl) if self.whirl_dependent else [None]
        for (i, w), f in ((p, f) for p in enumerate(points) for f in whirls):
            k, c = self.matrices(w, f)
            for name, mat in (("stiffness", k), ("damping", c)):
                sym = (mat + mat.T) / 2.0
                low = float(np.linalg.eigvalsh(sym)[0])
                if low < -PRINCIPAL_RTOL * max(float(np.abs(mat).max()), 1e-300):
                    at = f"[{i}]" if len(speeds) or f is not None else ""
                    at += "" if f is None else f"[{self.whirl.index(f)}]"
                    first = "kxy" if name == "stiffness" else "cxy"
                    raise InputError(f"{self.key}.{first}{at}", f"makes a principal {name} "
                                     f"negative ({low:.4g}): the cross-coupled terms' "
                                     "symmetric part outweighs the direct ones", value=None,
                                     expected="cross-coupled terms whose symmetric part "
                                              "(kxy + kyx)/2 stays below sqrt(kxx kyy)",
                                     kind="physics")

    def table(self, name) -> tuple:
        """A coefficient's values: one per speed (or one), or rows over whirl frequency."""
        return tuple(self.coefficients.get(name, (0.0,)))

    def scaled(self, names, factor) -> "Bearing":
        """A copy with the coefficients ``names`` multiplied by ``factor`` (every table point)."""
        coefficients = dict(self.coefficients)
        for name in names:
            coefficients[name] = scale_table(self.table(name), factor)
        return dataclasses.replace(self, coefficients=coefficients)

    def outside_table(self, omega) -> bool:
        """True when ``omega`` lies outside the tabulated speeds (end values held)."""
        return _outside(self.speeds, omega)

    def outside_whirl_table(self, frequency) -> bool:
        """True when a whirl ``frequency`` lies outside the two-way tables (end values held)."""
        return self.whirl_dependent and _outside(self.whirl, frequency)

    def matrices(self, omega, whirl=None):
        """Stiffness and damping matrices (2x2, SI) at spin speed ``omega`` (rad/s).

        Linear interpolation between table points; the end value is held
        outside the table.  ``whirl`` (rad/s) is the whirl frequency a two-way table is
        read at; ``None`` reads it at ``omega``: the synchronous coefficients.
        """
        if "_reader" not in self.__dict__:         # the tables made ready once
            object.__setattr__(self, "_reader",
                               TableReader(self.speeds, self.whirl, self.coefficients))
        return self._reader(omega, whirl)

    def __getstate__(self):
        # the reader is made again where it is needed: a pickle (for a worker, or a cache
        # key's digest) holds the bearing as given, whether it was read before or not
        return {k: v for k, v in self.__dict__.items() if k != "_reader"}

    @property
    def model(self):
        """The bearing model behind the coefficients, with ``coefficients(speed, load, *,
        whirl=None)``: the :class:`~rotorcalc.bearings.FilmJournal` (or tilting-pad
        :class:`~rotorcalc.bearings.pad_journal.PadJournal`) of a bearing from its
        geometry, else its :class:`~rotorcalc.bearings.table.CoefficientTable`."""
        if self.film is not None:
            return self.film
        return CoefficientTable(self.speeds, self.whirl, self.coefficients)


def _rows_or_values(v):
    """A coefficient as tuples: values (one per speed), or rows (one per speed) of values
    over whirl frequency."""
    v = tuple(v)
    if v and isinstance(v[0], (tuple, list)):
        return tuple(tuple(row) for row in v)
    return v


def scale_table(table, factor):
    """Every value of a coefficient (values or rows) times ``factor``."""
    if table and isinstance(table[0], tuple):
        return tuple(tuple(v * factor for v in row) for row in table)
    return tuple(v * factor for v in table)


def _outside(axis, value):
    if len(axis) < 2:
        return False
    return value < axis[0] * (1 - 1e-12) or value > axis[-1] * (1 + 1e-12)
