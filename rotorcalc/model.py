"""The rotor model: frozen dataclasses in SI units, validated on construction.

A :class:`Rotor` is an immutable description: shaft sections laid end to end
from station 0, rigid disks and bearings attached at stations, the operating
range and the analysis settings.  Change one through copies
(:func:`dataclasses.replace`); every construction validates and raises
:class:`~rotorcalc.errors.InputError` with the key path of what is wrong.
"""

from __future__ import annotations

import math
from collections.abc import Mapping
from dataclasses import dataclass, field

import numpy as np

from ._checks import FrozenMap, _freeze, _one_of, _positive  # noqa: F401 (re-exported)
from .errors import InputError
from .rules import (FROM_MEMORY, MARGIN_RULES, STABILITY_RULES, CouplingRule,  # noqa: F401
                    MarginRule, StabilityRule)
from .units import to_rpm
from .vocabulary import BearingRole, old_keywords
from .unbalance import ResponseSettings

COEFFICIENT_NAMES = ("kxx", "kxy", "kyx", "kyy", "cxx", "cxy", "cyx", "cyy")
#: A disk's polar inertia may exceed twice its transverse inertia by this share
#: (rounded input) before it is refused.
INERTIA_RTOL = 1e-3
#: A principal stiffness or damping below minus this share of the largest
#: coefficient is negative (not roundoff of a symmetric pair).
PRINCIPAL_RTOL = 1e-9
#: Sizes: each keeps memory and time bounded (docs/robustness.md).
LIMITS = {"elements per section": 1000, "elements": 5000, "sections": 2000, "parts": 1000,
          "speed count": 2001, "response speed count": 5001, "modes": 100, "orders": 20,
          "order": 100.0}
BEAM_THEORIES = ("timoshenko", "rayleigh", "euler-bernoulli")


@dataclass(frozen=True)
class Material:
    """An isotropic elastic material.

    Attributes
    ----------
    name : str
    youngs_modulus : float
        Pa.
    shear_modulus : float
        Pa.
    density : float
        kg/m^3.
    """

    name: str
    youngs_modulus: float
    shear_modulus: float
    density: float

    def __post_init__(self):
        key = f"materials.{self.name}"
        _positive(f"{key}.youngs_modulus", self.youngs_modulus)
        _positive(f"{key}.shear_modulus", self.shear_modulus)
        _positive(f"{key}.density", self.density)
        nu = self.poisson_ratio
        if not -1.0 < nu <= 0.5 + 1e-6:
            raise InputError(f"{key}.shear_modulus", "implies a Poisson's ratio outside "
                             f"(-1, 0.5] ({nu:.4g}): no isotropic material has it",
                             value=self.shear_modulus,
                             expected=f"at least E/3 = {self.youngs_modulus / 3:.4g} Pa "
                                      "(G = E / (2 (1 + nu)))", kind="physics")

    @property
    def poisson_ratio(self) -> float:
        return self.youngs_modulus / (2.0 * self.shear_modulus) - 1.0


@dataclass(frozen=True)
class Section:
    """A uniform shaft section between two consecutive stations.

    Attributes
    ----------
    length, outer_diameter, inner_diameter : float
        m.  ``inner_diameter`` is 0 for a solid section.
    material : Material
    elements : int
        Number of finite elements the section is divided into.
    added_mass : float
        kg carried by the section without adding stiffness (sleeves, shrunk
        parts), spread uniformly over its length.
    """

    length: float
    outer_diameter: float
    material: Material
    inner_diameter: float = 0.0
    elements: int = 1
    added_mass: float = 0.0
    key: str = "section"

    def __post_init__(self):
        _positive(f"{self.key}.length", self.length)
        _positive(f"{self.key}.outer_diameter", self.outer_diameter)
        _positive(f"{self.key}.inner_diameter", self.inner_diameter, allow_zero=True)
        if self.inner_diameter >= self.outer_diameter:
            raise InputError(f"{self.key}.inner_diameter", "must be smaller than outer_diameter",
                             value=self.inner_diameter,
                             expected=f"a bore below {self.outer_diameter:g} m", kind="range")
        if isinstance(self.elements, bool) or not isinstance(self.elements, int) or self.elements < 1:
            raise InputError(f"{self.key}.elements", "must be a whole number of at least 1",
                             value=self.elements, expected="a whole number such as 1, 2 or 3", kind="range")
        if self.elements > LIMITS["elements per section"]:
            raise InputError(f"{self.key}.elements", "is more than any section needs",
                             value=self.elements,
                             expected=f"at most {LIMITS['elements per section']}", kind="size")
        _positive(f"{self.key}.added_mass", self.added_mass, allow_zero=True)

    @property
    def area(self) -> float:
        return math.pi / 4.0 * (self.outer_diameter**2 - self.inner_diameter**2)

    @property
    def second_moment(self) -> float:
        """Second moment of area about a diameter, m^4."""
        return math.pi / 64.0 * (self.outer_diameter**4 - self.inner_diameter**4)

    @property
    def mass(self) -> float:
        """Mass of the section including its added mass, kg."""
        return self.material.density * self.area * self.length + self.added_mass


@dataclass(frozen=True)
class Disk:
    """A rigid disk at a station.

    Attributes
    ----------
    station : int
    mass : float
        kg.
    polar_inertia, transverse_inertia : float
        kg m^2, about the spin axis and about a diameter through the disk's
        centre of mass (which sits at the station).
    """

    station: int
    mass: float
    polar_inertia: float
    transverse_inertia: float
    name: str = ""
    key: str = "disk"
    inertia_as_given: bool = False

    def __post_init__(self):
        _positive(f"{self.key}.mass", self.mass)
        _positive(f"{self.key}.polar_inertia", self.polar_inertia, allow_zero=True)
        _positive(f"{self.key}.transverse_inertia", self.transverse_inertia, allow_zero=True)
        # a rigid body of revolution has I_t = I_p / 2 + (integral of z^2 dm) >= I_p / 2
        if not self.inertia_as_given and \
                self.polar_inertia > 2.0 * self.transverse_inertia * (1.0 + INERTIA_RTOL):
            raise InputError(f"{self.key}.polar_inertia", "is more than twice the transverse "
                             "inertia, which no rigid disk has", value=self.polar_inertia,
                             expected=f"at most {2.0 * self.transverse_inertia:.6g} kg*m^2 (2 x "
                                      "transverse); or inertia_as_given = true if meant",
                             kind="physics")

    @classmethod
    def from_geometry(cls, station, outer_diameter, inner_diameter, width, density, name="",
                      key="disk"):
        """A solid-of-revolution disk (annulus of uniform width) from its geometry."""
        _positive(f"{key}.outer_diameter", outer_diameter)
        _positive(f"{key}.inner_diameter", inner_diameter, allow_zero=True)
        _positive(f"{key}.width", width)
        if inner_diameter >= outer_diameter:
            raise InputError(f"{key}.inner_diameter", "must be smaller than outer_diameter",
                             value=inner_diameter, kind="range")
        mass = density * math.pi / 4.0 * (outer_diameter**2 - inner_diameter**2) * width
        polar = mass * (outer_diameter**2 + inner_diameter**2) / 8.0
        transverse = polar / 2.0 + mass * width**2 / 12.0
        return cls(station, mass, polar, transverse, name=name, key=key)


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


@dataclass(frozen=True)
class OperatingRange:
    """Speeds in rad/s: minimum and maximum continuous, optional trip."""

    min_speed: float
    max_speed: float
    trip_speed: float | None = None

    def __post_init__(self):
        _positive("operating.min_speed", self.min_speed, allow_zero=True)
        _positive("operating.max_speed", self.max_speed)
        if self.min_speed > self.max_speed:
            raise InputError("operating.min_speed", "is above max_speed",
                             value=f"{to_rpm(self.min_speed):.6g} rpm",
                             expected=f"at most max_speed ({to_rpm(self.max_speed):.6g} rpm)",
                             kind="order")
        if self.trip_speed is not None:
            _positive("operating.trip_speed", self.trip_speed)
            if self.trip_speed < self.max_speed:
                raise InputError("operating.trip_speed", "is below max_speed: one of the two "
                                 "is wrong", value=f"{to_rpm(self.trip_speed):.6g} rpm",
                                 expected=f"a trip speed at least max_speed "
                                          f"({to_rpm(self.max_speed):.6g} rpm), or a lower "
                                          "max_speed", kind="order")


@old_keywords(modes="mode_count", stability="stability_rule")
@dataclass(frozen=True)
class Settings:
    """Analysis settings: sweep, number of modes, excitation orders, beam theory."""

    speed_from: float | None = None
    speed_to: float | None = None
    speed_count: int = 61
    mode_count: int = 8
    orders: tuple = (1.0,)
    beam_theory: str = "timoshenko"
    margin_rule: MarginRule = field(default_factory=MarginRule)
    judge_backward: bool = False
    judge_share: float = 0.25
    overdamped_ratio: float = 0.45
    stability_rule: StabilityRule = field(default_factory=StabilityRule)

    def __post_init__(self):
        if not (0.0 <= self.judge_share <= 1.0):
            raise InputError("analysis.judge_share", "must lie in [0, 1]",
                             value=self.judge_share, expected="a forward share such as 0.25",
                             kind="range")
        if not (0.0 < self.overdamped_ratio <= 1.0):
            raise InputError("analysis.overdamped_ratio", "must lie in (0, 1]",
                             value=self.overdamped_ratio, expected="a damping ratio such as 0.45",
                             kind="range")
        if not isinstance(self.speed_count, int) or self.speed_count < 3:
            raise InputError("analysis.speed_count", "must be a whole number of at least 3",
                             value=self.speed_count, kind="range")
        if self.speed_count > LIMITS["speed count"]:
            raise InputError("analysis.speed_count", "is more speeds than a sweep needs",
                             value=self.speed_count, expected=f"at most {LIMITS['speed count']}",
                             kind="size")
        if not isinstance(self.mode_count, int) or self.mode_count < 1:
            raise InputError("analysis.mode_count", "must be a whole number of at least 1",
                             value=self.mode_count, kind="range")
        if self.mode_count > LIMITS["modes"]:
            raise InputError("analysis.mode_count", "is more modes than a screening needs",
                             value=self.mode_count, expected=f"at most {LIMITS['modes']}", kind="size")
        if not self.orders:
            raise InputError("analysis.orders", "must list at least one order", kind="range")
        if len(self.orders) > LIMITS["orders"]:
            raise InputError("analysis.orders", "lists too many orders", value=len(self.orders),
                             expected=f"at most {LIMITS['orders']}", kind="size")
        for i, order in enumerate(self.orders):
            _positive(f"analysis.orders[{i}]", order)
            if order > LIMITS["order"]:
                raise InputError(f"analysis.orders[{i}]", "is a higher excitation order than any "
                                 "machine has", value=order,
                                 expected=f"at most {LIMITS['order']:g}", kind="range")
        _one_of("analysis.beam_theory", self.beam_theory, BEAM_THEORIES)
        if self.speed_from is not None:
            _positive("analysis.speed_from", self.speed_from, allow_zero=True)
        if self.speed_to is not None:
            _positive("analysis.speed_to", self.speed_to)
        if (self.speed_from is not None and self.speed_to is not None
                and self.speed_to <= self.speed_from):
            raise InputError("analysis.speed_to", "must be above speed_from", value=self.speed_to,
                             kind="order")


@dataclass(frozen=True)
class Rotor:
    """A rotor-bearing system.

    Attributes
    ----------
    sections : tuple of Section
        From station 0; section ``i`` spans stations ``i`` and ``i + 1``.
    disks, bearings : tuple
    operating : OperatingRange
    settings : Settings
    station_names : dict
        Optional names, ``{name: station number}``.
    unbalance, probes, clearances : tuple
        Forced-response input (:mod:`rotorcalc.unbalance`).
    response : ResponseSettings
    """

    sections: tuple
    operating: OperatingRange
    disks: tuple = ()
    bearings: tuple = ()
    settings: Settings = field(default_factory=Settings)
    station_names: Mapping = field(default_factory=FrozenMap)
    name: str = "rotor"
    unbalance: tuple = ()
    probes: tuple = ()
    clearances: tuple = ()
    response: ResponseSettings = field(default_factory=ResponseSettings)
    #: Destabilising sources (role "source"): cross-coupled stiffness and any direct terms
    #: from gas and seals, added to the stiffness and damping but never supports.
    sources: tuple = ()
    #: The cross-coupling screen the file asks for (``[coupling_screen]``), or None.
    coupling_rule: CouplingRule | None = None

    def __post_init__(self):
        _freeze(self, "station_names", self.station_names)
        for part in self.sources:
            if part.role != BearingRole.SOURCE or part.support is not None:
                raise InputError(f"{part.key}", "is not a destabilising source",
                                 expected="a source (role 'source', no support)", kind="choice")
        for part in self.bearings:
            if part.role == BearingRole.SOURCE:
                raise InputError(f"{part.key}.role", "is a source among the bearings",
                                 value="source", expected="bearing or seal; sources go in "
                                 "[[cross_coupling]]", kind="choice")
        if not self.sections:
            raise InputError("section", "the rotor has no shaft sections",
                             expected="at least one [[section]] table", kind="missing")
        last = len(self.sections)
        if last > LIMITS["sections"]:
            raise InputError("section", "has more sections than any rotor needs", value=last,
                             expected=f"at most {LIMITS['sections']}", kind="size")
        total = sum(s.elements for s in self.sections)
        if total > LIMITS["elements"]:
            raise InputError("section", "has more elements in all than the solvers are sized "
                             "for", value=total, expected=f"at most {LIMITS['elements']} "
                             "(lower 'elements' in some sections)", kind="size")
        for label, group in (("disk", self.disks), ("bearing", self.bearings),
                             ("cross_coupling", self.sources),
                             ("unbalance", self.unbalance), ("probe", self.probes),
                             ("clearance", self.clearances)):
            if len(group) > LIMITS["parts"]:
                raise InputError(label, "has more entries than any rotor needs", value=len(group),
                                 expected=f"at most {LIMITS['parts']}", kind="size")
        weights = tuple(w for case in self.unbalance for w in case.weights)
        for group in (self.disks, self.bearings, self.sources, weights, self.probes,
                      self.clearances):
            for part in group:
                if not (isinstance(part.station, int) and 0 <= part.station <= last):
                    raise InputError(f"{part.key}.at", "names a station that does not exist",
                                     value=part.station,
                                     expected=f"a station number 0..{last} or a station name",
                                     kind="station")
        for name, station in self.station_names.items():
            if not (0 <= station <= last):
                raise InputError(f"stations.{name}", "names a station that does not exist",
                                 value=station, expected=f"0..{last}", kind="station")
        seen = {}
        for i, b in enumerate(self.bearings):
            if b.name and b.name in seen:
                raise InputError(f"bearing[{i}].name", f"is already used by bearing[{seen[b.name]}]",
                                 value=b.name, expected="a name of its own for each bearing",
                                 kind="duplicate")
            seen.setdefault(b.name, i)

    @property
    def judged_share(self) -> float:
        """Forward share from which a critical is judged (0: all, with ``judge_backward``)."""
        return 0.0 if self.settings.judge_backward else self.settings.judge_share

    @property
    def station_positions(self) -> np.ndarray:
        """Axial position of every station, m (station 0 at z = 0)."""
        return np.concatenate([[0.0], np.cumsum([s.length for s in self.sections])])

    @property
    def length(self) -> float:
        return float(self.station_positions[-1])

    @property
    def mass(self) -> float:
        """Total rotor mass (shaft, added masses, disks), kg; supports excluded."""
        return sum(s.mass for s in self.sections) + sum(d.mass for d in self.disks)

    def station_label(self, station: int) -> str:
        for name, number in self.station_names.items():
            if number == station:
                return name
        return str(station)
