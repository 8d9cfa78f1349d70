"""The check with every source applied: the log decrement of each mode whirling at least half
forward (forward share one half or more: forward, mixed and straight-line modes) at the
maximum continuous speed, with the rotor file's destabilising sources in place, against the
rule's required value (each mode at its own whirl frequency when the rule asks,
:mod:`rotorcalc.analysis.own_frequency`).  Part of what ``check`` judges under
``[coupling_screen]`` (:func:`rotorcalc.analysis.coupling_screen.coupling_study`)."""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ..assembly import assemble
from ..errors import InputError
from ..notices import Notice
from ..rules import CouplingRule
from ..units import to_rpm
from ..vocabulary import Outcome
from .modes import STRAIGHT_LINE, modes_at, read_only
from .own_frequency import at_own_frequency, own_frequency_notes


def _synchronous_note(rotor, criteria):
    """A note when tables over whirl frequency were read at the spin speed."""
    tables = [b.name for b in rotor.bearings + rotor.sources if b.whirl_dependent]
    if not tables or criteria.coefficients_at != "synchronous":
        return []
    verb = "gives" if len(tables) == 1 else "give"
    return [Notice(f"{', '.join(tables)} {verb} coefficients over whirl frequency; the "
                   "stability screen read them at the spin speed (synchronous, the default); "
                   "[coupling_screen] coefficients_at = \"mode-frequency\" (or "
                   "--coefficients-at) reads them at each mode's own frequency", "note")]


@dataclass(frozen=True)
class SourcesCheck:
    """Every mode whirling at least half forward at the maximum continuous speed with every
    source of the rotor file applied, against ``min_log_dec``.  With ``coefficients_at =
    "mode-frequency"`` ``frequency`` and ``log_dec`` are each mode's at its own whirl frequency
    and ``synchronous_log_dec`` the values with every table read at the spin speed."""

    speed: float
    min_log_dec: float
    numbers: tuple        # mode numbers (from 1, by rising frequency)
    frequency: np.ndarray
    log_dec: np.ndarray
    whirl: tuple
    coefficients_at: str = "synchronous"
    synchronous_log_dec: np.ndarray | None = None
    converged: tuple = ()
    notes: tuple = ()
    label: str = ""       # where the required log decrement comes from

    def __post_init__(self):
        read_only(self)

    @property
    def passed(self):
        return bool(np.all(self.log_dec >= self.min_log_dec))

    @property
    def rows(self):
        """(mode number, frequency rad/s, log dec, whirl, passed, synchronous log dec,
        converged) per mode judged."""
        sync = self.log_dec if self.synchronous_log_dec is None else self.synchronous_log_dec
        converged = self.converged or (True,) * len(self.numbers)
        return [(n, float(f), float(d), w, bool(d >= self.min_log_dec), float(ds), bool(ok))
                for n, f, d, w, ds, ok in zip(self.numbers, self.frequency, self.log_dec,
                                              self.whirl, sync, converged)]

    def summary(self):
        """The check's outcome in one sentence, with its rule."""
        lowest = float(np.min(self.log_dec)) if len(self.log_dec) else math.nan
        count = len(self.numbers)
        kinds = ", ".join(dict.fromkeys(str(w) for w in self.whirl))
        modes = "the only mode" if count == 1 else f"the {count} modes"
        return (f"Lowest log decrement {lowest:.3f} of {modes} with a forward share of one "
                f"half or more ({kinds}) at {to_rpm(self.speed):.0f} rpm with every source of "
                f"the file applied; needed {self.min_log_dec:g} ({self.label}).")

    @property
    def at_own_frequency(self):
        """True when the modes were read at their own whirl frequencies."""
        return self.synchronous_log_dec is not None

    @property
    def verdict(self):
        return Outcome.PASS if self.passed else Outcome.FAIL

    def to_dict(self):
        return {"speed_rpm": float(to_rpm(self.speed)), "min_log_dec": self.min_log_dec,
                "label": self.label, "coefficients_at": self.coefficients_at,
                "modes": [{"mode": int(n), "frequency_hz": float(f / (2 * math.pi)),
                           "log_dec": d, "log_dec_synchronous": ds, "converged": ok,
                           "whirl": w, "passed": ok_d}
                          for n, f, d, w, ok_d, ds, ok in self.rows],
                "notes": [n.to_dict() for n in self.notes],
                "verdict": self.verdict}


def sources_check(rotor, min_log_dec=None):
    """The log decrements of the modes whirling at least half forward at the maximum
    continuous speed, sources applied (each at its own whirl frequency when the rule asks,
    :mod:`.own_frequency`).  InputError when no such mode is among those the file asks for:
    a check that judged nothing must not pass."""
    rule = rotor.coupling_rule or CouplingRule()
    need = rule.min_log_dec_sources if min_log_dec is None else min_log_dec
    label = rule.label if min_log_dec is None else "set by the user"
    speed = rotor.operating.max_speed
    system = assemble(rotor)
    modes = modes_at(system, speed, rotor.settings.mode_count)
    order = [int(i) for i in np.argsort(modes.frequency)]
    # forward, or on a straight line (roundoff alone would put it on either side)
    keep = [i for i in order if modes.forward_fraction[i] >= 0.5 - STRAIGHT_LINE]
    if not keep:
        raise InputError("analysis.mode_count", "leaves the check with every source applied "
                         "no mode whirling at least half forward at the maximum continuous "
                         "speed", value=rotor.settings.mode_count,
                         expected="more modes, so that the forward ones are among them",
                         kind="range")
    numbers = tuple(order.index(i) + 1 for i in keep)
    frequency = np.array([modes.frequency[i] for i in keep])
    log_dec = np.array([modes.log_dec[i] for i in keep])
    whirl = tuple(modes.whirl[i] for i in keep)
    if rule.coefficients_at != "mode-frequency" or not system.whirl_dependent:
        return SourcesCheck(speed, need, numbers, frequency, log_dec, whirl,
                            rule.coefficients_at, None, (),
                            tuple(_synchronous_note(rotor, rule)), label)
    own = [at_own_frequency(system, speed, modes.shapes[i], modes.frequency[i],
                            modes.log_dec[i], rotor.settings.mode_count,
                            value=modes.eigenvalues[i], vector=modes.vectors[:, i])
           for i in keep]
    notes = own_frequency_notes(system, list(zip(numbers, own)), speed, "mode")
    return SourcesCheck(speed, need, numbers, np.array([r.frequency for r in own]),
                        np.array([r.log_dec for r in own]), whirl, rule.coefficients_at,
                        log_dec, tuple(r.converged for r in own), tuple(notes), label)
