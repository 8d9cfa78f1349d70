"""Bearings, seals and destabilising sources (2x2 stiffness and damping, constant or tabulated
over speed) and the flexible supports under bearings: the parts of the model that hold or push
the shaft at a station.  Re-exported by :mod:`rotorcalc.model`."""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ._checks import _freeze, _one_of, _positive
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
        ``-K q - C q'`` with ``K = [[kxx, kxy], [kyx, kyy]]``.
    support : Support or None

    Notes
    -----
    Outside the table the end values are held (the rule stated in the docs),
    and :meth:`outside_table` tells the caller so it can warn.
    """

    station: int
    coefficients: dict
    speeds: tuple = ()
    name: str = ""
    role: BearingRole = BearingRole.BEARING
    support: Support | None = None
    key: str = "bearing"

    def __post_init__(self):
        _one_of(f"{self.key}.role", self.role, tuple(BearingRole))
        object.__setattr__(self, "role", BearingRole(self.role))
        _freeze(self, "coefficients", {k: tuple(v) for k, v in self.coefficients.items()})
        unknown = set(self.coefficients) - set(COEFFICIENT_NAMES)
        if unknown:
            raise InputError(f"{self.key}.{sorted(unknown)[0]}", "is not a bearing coefficient",
                             expected=", ".join(COEFFICIENT_NAMES), kind="unknown-key")
        speeds = np.asarray(self.speeds, dtype=float)
        if speeds.size and (not np.all(np.isfinite(speeds)) or np.any(speeds < 0)):
            raise InputError(f"{self.key}.speeds", "must be finite and not negative",
                             value=list(self.speeds), kind="range")
        if speeds.size > 1 and np.any(np.diff(speeds) <= 0.0):
            bad = int(np.argmax(np.diff(speeds) <= 0.0)) + 1
            raise InputError(f"{self.key}.speeds[{bad}]", "speeds must be strictly increasing",
                             value=list(self.speeds), kind="order")
        for name in COEFFICIENT_NAMES:
            values = tuple(self.coefficients.get(name, (0.0,)))
            if len(values) not in (1, max(speeds.size, 1)):
                raise InputError(f"{self.key}.{name}",
                                 f"has {len(values)} values but speeds has {speeds.size}",
                                 expected="one value, or one value per speed", kind="length")
            if len(values) > 1 and speeds.size == 0:
                raise InputError(f"{self.key}.{name}", "is a table but the bearing has no speeds",
                                 expected="a 'speeds' list of the same length", kind="length")
            for i, v in enumerate(values):
                if not math.isfinite(v):
                    raise InputError(f"{self.key}.{name}[{i}]", "is not a finite number", value=v,
                                     kind="not-finite")
            if name in ("kxx", "kyy", "cxx", "cyy") and self.role != BearingRole.SOURCE:
                for i, v in enumerate(values):
                    if v < 0.0:
                        what = "stiffness" if name[0] == "k" else "damping"
                        raise InputError(f"{self.key}.{name}[{i}]",
                                         f"direct {what} must not be negative", value=v,
                                         kind="range")
        if self.role != BearingRole.SOURCE:   # a source may feed energy: that is its point
            self._check_principal(speeds)

    def _check_principal(self, speeds):
        """The symmetric part of the stiffness and of the damping matrix must not have a
        negative principal value at any table speed: that is a static divergence or a
        source of energy, which a bearing or seal is not."""
        points = list(speeds) if len(speeds) else [0.0]
        for i, w in enumerate(points):
            k, c = self.matrices(w)
            for name, mat in (("stiffness", k), ("damping", c)):
                sym = (mat + mat.T) / 2.0
                low = float(np.linalg.eigvalsh(sym)[0])
                if low < -PRINCIPAL_RTOL * max(float(np.abs(mat).max()), 1e-300):
                    at = f"[{i}]" if len(speeds) else ""
                    first = "kxy" if name == "stiffness" else "cxy"
                    raise InputError(f"{self.key}.{first}{at}", f"makes a principal {name} "
                                     f"negative ({low:.4g}): the cross-coupled terms' "
                                     "symmetric part outweighs the direct ones", value=None,
                                     expected="cross-coupled terms whose symmetric part "
                                              "(kxy + kyx)/2 stays below sqrt(kxx kyy)",
                                     kind="physics")

    def table(self, name) -> tuple:
        return tuple(self.coefficients.get(name, (0.0,)))

    def outside_table(self, omega) -> bool:
        """True when ``omega`` lies outside the tabulated speeds (end values held)."""
        if len(self.speeds) < 2:
            return False
        return omega < self.speeds[0] * (1 - 1e-12) or omega > self.speeds[-1] * (1 + 1e-12)

    def matrices(self, omega):
        """Stiffness and damping matrices (2x2, SI) at spin speed ``omega`` (rad/s).

        Linear interpolation between table points; the end value is held
        outside the table.
        """
        values = {}
        for name in COEFFICIENT_NAMES:
            table = self.table(name)
            if len(table) == 1:
                values[name] = table[0]
            else:
                values[name] = float(np.interp(omega, self.speeds, table))
        k = np.array([[values["kxx"], values["kxy"]], [values["kyx"], values["kyy"]]])
        c = np.array([[values["cxx"], values["cxy"]], [values["cyx"], values["cyy"]]])
        return k, c
