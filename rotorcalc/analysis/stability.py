"""Stability over the speed range: every mode's log decrement at every speed.

A critical-speed table judges a mode only where it crosses an excitation
order; a rotor can be unstable at its running speeds without any critical
there (bearing or aerodynamic cross-coupling drives the first forward mode
below zero damping).  This analysis reads every branch of the sweep from the
lowest analysed speed up to trip, reports per branch the lowest log
decrement in the operating range and up to trip, and refines every speed
where a branch's damping changes sign (the onset of instability) by Brent's
method with fresh eigen-solves.  The verdict follows a
:class:`~rotorcalc.model.StabilityRule`, judged from the minimum speed up to
trip (docs/theory.md, "Stability").
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from scipy.optimize import brentq

from ..vocabulary import StabilityVerdict, old_keywords, renamed
from ..model import OperatingRange, StabilityRule
from ..units import to_hz, to_rpm
from .criticals import SPEED_RTOL, branch_at
from .modes import GROWTH_RTOL
from .sweep import TRACKING_RESERVE, Sweep



@dataclass(frozen=True)
class BranchStability:
    """One branch of the sweep, judged for stability.

    Attributes
    ----------
    branch : int
        Number of the branch in the sweep, from 1.
    whirl : str
        Dominant whirl of the branch.
    min_log_dec_operating : float or None
        Lowest log decrement between the minimum and maximum continuous speed
        (None where the branch is absent there).
    min_log_dec_to_trip : float or None
        Lowest log decrement from the lowest analysed speed up to trip.
    judged_log_dec : float or None
        Lowest log decrement from the minimum speed up to trip: what the
        verdict reads.
    worst_speed : float or None
        Where ``judged_log_dec`` occurs, rad/s.
    frequency : float or None
        Damped natural frequency there, rad/s.
    onsets : tuple of (float, str)
        Speeds (rad/s) where the log decrement crosses zero, refined, with
        ``"loses"`` or ``"regains"`` stability going up in speed.
    verdict : str
        "stable", "unstable", "marginal" (log decrement 0: undamped),
        "below minimum", "not judged" (rule none) or "absent" (not present in
        the judged range).
    """

    branch: int
    whirl: str
    min_log_dec_operating: float | None
    min_log_dec_to_trip: float | None
    judged_log_dec: float | None
    worst_speed: float | None
    frequency: float | None
    onsets: tuple
    verdict: str

    @property
    def passed(self):
        return self.verdict in ("stable", "not judged", "absent")

    def to_dict(self):
        return {
            "branch": self.branch,
            "whirl": self.whirl,
            "min_log_dec_operating": self.min_log_dec_operating,
            "min_log_dec_to_trip": self.min_log_dec_to_trip,
            "judged_log_dec": self.judged_log_dec,
            "worst_speed_rpm": None if self.worst_speed is None else float(to_rpm(self.worst_speed)),
            "frequency_hz": None if self.frequency is None else float(to_hz(self.frequency)),
            "onsets": [{"speed_rpm": float(to_rpm(w)), "change": c} for w, c in self.onsets],
            "verdict": self.verdict,
            "passed": self.passed,
        }


@old_keywords(modes="branches")
@dataclass(frozen=True)
class Stability:
    """Stability of every branch over the sweep, and the verdict of the rule."""

    rule: StabilityRule
    operating: OperatingRange
    branches: tuple
    unstable_ranges: tuple      # ((lo, hi) rad/s) where some mode is unstable
    divergent_speeds: tuple     # speeds with a growing non-oscillatory motion
    judged_range: tuple         # (lo, hi) rad/s

    @property
    def passed(self):
        if self.rule.name == "none":
            return True
        lo, hi = self.judged_range
        diverges = any(lo <= w <= hi for w in self.divergent_speeds)
        return all(m.passed for m in self.branches) and not diverges

    @property
    def failing(self):
        return tuple(m for m in self.branches if not m.passed)

    def caption(self):
        return f"Stability rule: {self.rule.describe()} ({self.rule.label})."

    def to_dict(self):
        return {
            "rule": {"name": self.rule.name, "required_log_dec": self.rule.required,
                     "text": self.rule.describe(), "label": self.rule.label},
            "judged_range_rpm": [float(to_rpm(v)) for v in self.judged_range],
            "branches": [m.to_dict() for m in self.branches],
            "unstable_ranges_rpm": [[float(to_rpm(lo)), float(to_rpm(hi))]
                                    for lo, hi in self.unstable_ranges],
            "divergent_speeds_rpm": [float(to_rpm(w)) for w in self.divergent_speeds],
            "passed": self.passed,
        }


def judged_range(operating: OperatingRange):
    """Speeds the stability verdict covers: the minimum speed up to trip (or the
    maximum continuous speed when no trip is given)."""
    return operating.min_speed, operating.trip_speed or operating.max_speed


def _in(speeds, lo, hi):
    return (speeds >= lo * (1 - 1e-12)) & (speeds <= hi * (1 + 1e-12))


def _lowest(log_dec, present, mask):
    pick = present & mask
    if not pick.any():
        return None, None
    values = np.where(pick, log_dec, np.inf)
    k = int(np.argmin(values))
    return float(values[k]), k


def stability(system, result: Sweep, rule: StabilityRule | None = None, solver=None):
    """Judge every branch of a sweep for stability.

    Parameters
    ----------
    system : SystemMatrices
        The system the sweep was run on (fresh solves refine the onsets).
    result : Sweep
    rule : StabilityRule, optional
        ``system.rotor.settings.stability_rule`` by default.
    solver : callable, optional

    Returns
    -------
    Stability
    """
    rotor = system.rotor
    rule = rotor.settings.stability_rule if rule is None else rule
    op = rotor.operating
    speeds = result.speeds
    lo, hi = judged_range(op)
    in_operating = _in(speeds, op.min_speed, op.max_speed)
    to_trip = speeds <= hi * (1 + 1e-12)
    judged = _in(speeds, lo, hi)
    log_dec = result.log_dec
    present = result.present
    n_solve = result.eigenvalues.shape[1] + TRACKING_RESERVE
    whirls = result.branch_whirl
    branches, ranges = [], []
    for j in range(result.eigenvalues.shape[1]):
        ld, pr = log_dec[:, j], present[:, j]
        op_min, _ = _lowest(ld, pr, in_operating)
        trip_min, _ = _lowest(ld, pr, to_trip)
        worst, k = _lowest(ld, pr, judged)
        crossings = _onsets(system, result, j, n_solve, solver)
        onsets = [(w, change) for _, w, change in crossings]
        ranges.extend(_unstable_spans(speeds, ld, pr, {k: w for k, w, _ in crossings}))
        if rule.name == "none":
            verdict = StabilityVerdict.NOT_JUDGED
        elif worst is None:
            verdict = StabilityVerdict.ABSENT
        elif rule.is_marginal(worst):
            verdict = StabilityVerdict.MARGINAL
        elif worst < 0:
            verdict = StabilityVerdict.UNSTABLE
        elif not rule.passes(worst):
            verdict = StabilityVerdict.BELOW_MINIMUM
        else:
            verdict = StabilityVerdict.STABLE
        branches.append(BranchStability(
            j + 1, whirls[j], op_min, trip_min, worst,
            None if k is None else float(speeds[k]),
            None if k is None else float(result.frequency[k, j]), tuple(onsets), verdict))
    divergent = ()
    if result.growth is not None:
        scale = np.nanmin(np.where(present, np.abs(result.eigenvalues), np.nan), axis=1)
        scale = np.where(np.isfinite(scale), scale, 1.0)
        divergent = tuple(float(w) for w, g, s in zip(speeds, result.growth, scale)
                          if g > GROWTH_RTOL * s)
    return Stability(rule, op, tuple(branches), _merge(ranges), divergent, (lo, hi))


def _onsets(system, result, j, n_solve, solver):
    """Refined crossings of zero damping of branch ``j``: (grid index k, speed, change)
    for every sign change between sweep speeds k and k + 1."""
    values, present, speeds = result.eigenvalues[:, j], result.present[:, j], result.speeds
    out = []
    for k in range(len(speeds) - 1):
        if not (present[k] and present[k + 1]):
            continue
        a, b = values[k].real, values[k + 1].real
        if a * b >= 0:
            continue  # no strict change of sign (zeros are undamped, not crossings)
        ref_value, ref_shape = values[k], result.shapes[k, j]

        def real_part(w):
            return branch_at(system, w, ref_value, ref_shape, n_solve, solver)[0].real

        lo, hi = float(speeds[k]), float(speeds[k + 1])
        try:
            root = brentq(real_part, lo, hi, xtol=SPEED_RTOL * hi, rtol=SPEED_RTOL)
        except ValueError:  # fresh solves moved the change off the bracket
            root = lo if abs(a) < abs(b) else hi
        out.append((k, float(root), "loses" if a < 0 < b else "regains"))
    return out


def _unstable_spans(speeds, log_dec, present, roots):
    """Speed spans (rad/s) where one branch is unstable; ``roots[k]`` is the refined
    crossing between sweep speeds k and k + 1."""
    spans, start = [], None
    for k, w in enumerate(speeds):
        bad = bool(present[k] and log_dec[k] < 0)
        if bad and start is None:
            start = roots.get(k - 1, w)
        elif not bad and start is not None:
            spans.append((float(start), float(roots.get(k - 1, speeds[k - 1]))))
            start = None
    if start is not None:
        spans.append((float(start), float(speeds[-1])))
    return spans


def _merge(spans):
    out = []
    for lo, hi in sorted(spans):
        if out and lo <= out[-1][1]:
            out[-1] = (out[-1][0], max(out[-1][1], hi))
        else:
            out.append((lo, hi))
    return tuple(out)


def worst_branch(result: Stability):
    """The judged mode with the lowest log decrement (None when none is judged)."""
    judged = [m for m in result.branches if m.judged_log_dec is not None]
    if not judged:
        return None
    return min(judged, key=lambda m: m.judged_log_dec)


def describe_branch(m: BranchStability):
    """One line for a mode that fails, for the terminal and the report."""
    where = "" if m.worst_speed is None else f" at {to_rpm(m.worst_speed):.0f} rpm"
    onset = ""
    losses = [w for w, c in m.onsets if c == "loses"]
    if losses:
        onset = f"; onset of instability at {to_rpm(losses[0]):.0f} rpm"
    ld = "-" if m.judged_log_dec is None else f"{m.judged_log_dec:.3f}"
    return f"branch {m.branch} ({m.whirl}): log dec {ld}{where} is {m.verdict}{onset}"



#: The 0.1 names of this module, read until 0.3.
_OLD_NAMES = {"ModeStability": "BranchStability", "describe_mode": "describe_branch",
              "worst_mode": "worst_branch"}


def __getattr__(name):
    if name in _OLD_NAMES:
        renamed(f"rotorcalc.analysis.stability.{name}",
                f"rotorcalc.analysis.stability.{_OLD_NAMES[name]}")
        return globals()[_OLD_NAMES[name]]
    raise AttributeError(f"module {__name__!r} has no attribute {name!r}")
