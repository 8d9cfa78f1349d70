"""Input model of the forced response: unbalance cases, probes, clearances, settings.

Frozen dataclasses in SI, validated on construction like those of
:mod:`rotorcalc.model`.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from .errors import InputError
from .units import to_rpm


@dataclass(frozen=True)
class UnbalanceWeight:
    """One unbalance: amount (kg*m) at a station, at a phase angle (rad).

    The phase is measured from +x in the direction of rotation at time zero:
    the force is ``U w^2 (cos(w t + phase), sin(w t + phase))``.
    """

    station: int
    amount: float
    phase: float = 0.0
    key: str = "unbalance"
    basis: str = ""   # how the amount was set, when it was derived (the residual rule)

    def __post_init__(self):
        if not (math.isfinite(self.amount) and self.amount > 0):
            raise InputError(f"{self.key}.amount", "must be positive", value=self.amount,
                             expected="an unbalance such as \"12 g*mm\"", kind="range")
        if not math.isfinite(self.phase):
            raise InputError(f"{self.key}.phase", "is not a finite angle", value=self.phase,
                             kind="not-finite")


@dataclass(frozen=True)
class UnbalanceCase:
    """A named set of unbalance weights applied together."""

    name: str
    weights: tuple
    description: str = ""
    key: str = "unbalance"

    def __post_init__(self):
        if not self.weights:
            raise InputError(f"{self.key}.weight", "the unbalance case has no weights",
                             expected="at least one [[unbalance.NAME.weight]] table",
                             kind="missing")


@dataclass(frozen=True)
class Probe:
    """A displacement probe at a station, at ``angle`` (rad) from +x towards +y."""

    station: int
    angle: float = 0.0
    name: str = ""
    key: str = "probe"


@dataclass(frozen=True)
class Clearance:
    """A local radial clearance (seal, impeller eye) at a station, m."""

    station: int
    radial: float
    name: str = ""
    key: str = "clearance"

    def __post_init__(self):
        if not (math.isfinite(self.radial) and self.radial > 0):
            raise InputError(f"{self.key}.radial", "must be positive", value=self.radial,
                             expected="a radial clearance such as \"0.25 mm\"", kind="range")


@dataclass(frozen=True)
class ResponseSettings:
    """Speeds of the response sweep (rad/s; default: the analysis sweep) and checks."""

    speed_from: float | None = None
    speed_to: float | None = None
    speed_count: int = 201
    check_vibration: bool = True
    clearance_share: float = 0.75
    vibration_limit: float | None = None   # m pk-pk; None: the common-practice formula

    def __post_init__(self):
        if self.vibration_limit is not None and not (math.isfinite(self.vibration_limit)
                                                     and self.vibration_limit > 0):
            raise InputError("response.vibration_limit", "must be positive",
                             value=self.vibration_limit,
                             expected='a peak-to-peak amplitude such as "25 um"', kind="range")
        if not isinstance(self.speed_count, int) or self.speed_count < 5:
            raise InputError("response.speed_count", "must be a whole number of at least 5",
                             value=self.speed_count, kind="range")
        if self.speed_count > 5001:
            raise InputError("response.speed_count", "is more speeds than a response needs",
                             value=self.speed_count, expected="at most 5001", kind="size")
        if not (0 < self.clearance_share <= 1):
            raise InputError("response.clearance_share", "must lie in (0, 1]",
                             value=self.clearance_share, kind="range")
        if (self.speed_from is not None and self.speed_to is not None
                and self.speed_to <= self.speed_from):
            raise InputError("response.speed_to", "must be above speed_from",
                             value=f"{to_rpm(self.speed_to):.6g} rpm",
                             expected=f"above {to_rpm(self.speed_from):.6g} rpm", kind="order")
