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
from .supports import COEFFICIENT_NAMES, PRINCIPAL_RTOL, Bearing, Support  # noqa: F401
from .rules import (FROM_MEMORY, MARGIN_RULES, STABILITY_RULES, CouplingRule,  # noqa: F401
                    MarginRule, StabilityRule)
from .units import to_rpm
from .vocabulary import BearingRole, old_keywords
from .unbalance import ResponseSettings

#: A disk's polar inertia may exceed twice its transverse inertia by this share
#: (rounded input) before it is refused.
INERTIA_RTOL = 1e-3
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


#: Where gravity may point (y is vertical in the usual set-up: "-y", the default, is
#: down), or "none" for a rotor whose weight no bearing carries (a vertical machine).
GRAVITY_DIRECTIONS = ("-y", "+y", "-x", "+x", "none")


@dataclass(frozen=True)
class StaticLoad:
    """A steady force and moment on the shaft at a station (a gear mesh, a coupling's
    misalignment, a magnetic pull), for the statics.

    ``fx``, ``fy`` in N; ``mxz``, ``myz`` in N m: the bending moments in the x-z and y-z
    planes, each positive where it turns the shaft's slope dx/dz (dy/dz) positive.
    """

    station: int
    fx: float = 0.0
    fy: float = 0.0
    mxz: float = 0.0
    myz: float = 0.0
    name: str = ""
    key: str = "static_load"

    def __post_init__(self):
        for field_name in ("fx", "fy", "mxz", "myz"):
            value = getattr(self, field_name)
            if not math.isfinite(value):
                raise InputError(f"{self.key}.{field_name}", "is not a finite number",
                                 value=value, kind="not-finite")


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
    #: Steady loads at stations for the statics (``[[static_load]]``), and where gravity
    #: points (``[statics] gravity``).
    static_loads: tuple = ()
    gravity: str = "-y"

    def __post_init__(self):
        _freeze(self, "station_names", self.station_names)
        _one_of("statics.gravity", self.gravity, GRAVITY_DIRECTIONS)
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
                             ("static_load", self.static_loads),
                             ("unbalance", self.unbalance), ("probe", self.probes),
                             ("clearance", self.clearances)):
            if len(group) > LIMITS["parts"]:
                raise InputError(label, "has more entries than any rotor needs", value=len(group),
                                 expected=f"at most {LIMITS['parts']}", kind="size")
        weights = tuple(w for case in self.unbalance for w in case.weights)
        for group in (self.disks, self.bearings, self.sources, weights, self.probes,
                      self.clearances, self.static_loads):
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
