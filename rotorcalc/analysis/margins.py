"""Separation margins of critical speeds from the operating range.

Margins are per cent of the nearer end of the operating range: below the
minimum speed ``(N_min - N_c) / N_min``, above the maximum continuous speed
``(N_c - N_mc) / N_mc``; a critical inside the range has a negative margin
(its distance to the nearer end, per cent of that end).

The default rule (``"af-curve"``) is the amplification-factor rule of
industry standards for centrifugal compressors, quoted here from memory as
common practice (confirm against the edition your purchase specification
names):

* AF < 2.5: the critical is critically damped and needs no margin;
* AF >= 2.5, critical below the minimum speed: SM = 17 (1 - 1 / (AF - 1.5)) %;
* AF >= 2.5, critical above the maximum continuous speed:
  SM = 10 + 17 (1 - 1 / (AF - 1.5)) %.

Until a forced-response amplification factor is supplied, AF is estimated
from the log decrement as ``pi / delta`` (light damping).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from ..model import MarginRule, OperatingRange
from ..units import to_rpm
from .criticals import CriticalSpeed

CAUTION = ("Screening result only: confirm against the applicable standard, the purchase "
           "specification, local codes and a licensed engineer's review.")


def af_from_log_dec(log_dec):
    """Amplification factor estimated from the log decrement, pi / delta."""
    return math.pi / log_dec if log_dec > 0 else math.inf


def required_margin(rule: MarginRule, af, side):
    """Required separation margin, per cent, for a critical on ``side``.

    Parameters
    ----------
    rule : MarginRule
    af : float
        Amplification factor (``inf`` for an undamped or unstable mode).
    side : {"below", "above", "inside"}
        Where the critical lies relative to the operating range; for
        "inside", the larger of the two requirements is returned.

    Returns
    -------
    float
        Per cent; 0 when no margin is required.
    """
    if rule.kind == "none":
        return 0.0
    if rule.kind == "fixed":
        return {"below": rule.below, "above": rule.above}.get(side, max(rule.below, rule.above))
    if af < rule.af_threshold:
        return 0.0
    base = 17.0 * (1.0 - 1.0 / (af - 1.5)) if math.isfinite(af) else 17.0
    above = 10.0 + base
    return {"below": base, "above": above}.get(side, above)


PASSING = ("pass", "critically damped", "not judged", "no peak")


@dataclass(frozen=True)
class MarginRow:
    """Margin of one critical speed: where it is, what it needs, and the verdicts.

    The ``*_response`` fields are filled when an unbalance response was run:
    the amplification factor measured on the response peaks matched to this
    critical (the largest, to be conservative), the margin it requires and
    the verdict that follows.
    """

    critical: CriticalSpeed
    side: str
    margin: float
    amplification_factor: float
    required: float
    verdict: str
    af_response: float | None = None
    required_response: float | None = None
    verdict_response: str | None = None
    peaks: tuple = ()

    @property
    def passed(self):
        return self.verdict in PASSING and (self.verdict_response is None
                                            or self.verdict_response in PASSING)

    def to_dict(self):
        out = self.critical.to_dict()
        out.update({
            "side": self.side,
            "margin_percent": _finite_or_none(self.margin),
            "amplification_factor": _finite_or_none(self.amplification_factor),
            "amplification_factor_source": "log decrement (pi/delta)",
            "required_margin_percent": self.required,
            "verdict": self.verdict,
        })
        if self.verdict_response is not None:
            out.update({
                "amplification_factor_response": (None if self.af_response is None
                                                  else _finite_or_none(self.af_response)),
                "required_margin_response_percent": self.required_response,
                "verdict_response": self.verdict_response,
                "peaks": [p.to_dict() for p in self.peaks],
            })
        return out


def _finite_or_none(x):
    return float(x) if math.isfinite(x) else None


@dataclass(frozen=True)
class MarginTable:
    """Separation-margin verdicts for a list of critical speeds."""

    rows: tuple
    operating: OperatingRange
    rule: MarginRule
    verified_above_to: float
    notes: tuple = ()

    @property
    def passed(self):
        return all(row.passed for row in self.rows)

    @property
    def has_response(self):
        return any(row.verdict_response is not None for row in self.rows)

    def to_dict(self):
        return {
            "operating_range_rpm": [float(to_rpm(self.operating.min_speed)),
                                    float(to_rpm(self.operating.max_speed))],
            "rule": {"kind": self.rule.kind, "below_percent": self.rule.below,
                     "above_percent": self.rule.above, "af_threshold": self.rule.af_threshold},
            "criticals": [row.to_dict() for row in self.rows],
            "passed": self.passed,
            "sweep_top_rpm": float(to_rpm(self.verified_above_to)),
            "notes": list(self.notes),
            "caution": CAUTION,
        }


def _side_and_margin(speed, operating):
    lo, hi = operating.min_speed, operating.max_speed
    if speed < lo:
        return "below", 100.0 * (lo - speed) / lo
    if speed > hi:
        return "above", 100.0 * (speed - hi) / hi
    to_lo = 100.0 * (speed - lo) / lo if lo > 0 else math.inf
    to_hi = 100.0 * (hi - speed) / hi
    return "inside", -min(to_lo, to_hi)


def _verdict(rule, crit, af, margin, need, judge_backward):
    if crit.log_dec <= 0:
        return "fail"  # an unstable mode fails whatever its whirl or place
    if crit.whirl == "backward" and not judge_backward:
        return "not judged"
    if rule.kind == "af-curve" and af < rule.af_threshold:
        return "critically damped"
    return "pass" if margin >= need else "fail"


def match_window(critical):
    """Relative speed window in which a response peak may belong to a critical speed.

    The peak of the unbalance response of a single mode lies above its damped
    natural frequency by about 1.5 zeta^2 (displacement response to a rotating
    unbalance); other modes and probe placement shift it further, so the
    window is three damping ratios, at least 5 % and at most 25 %.
    """
    return min(max(0.05, 3.0 * critical.damping_ratio), 0.25)


def _in_window(critical, peak):
    return (critical.order == 1.0
            and abs(peak.speed / critical.speed - 1.0) <= match_window(critical))


def matched_peaks(critical, peaks):
    """The response peaks within ``critical``'s window (synchronous criticals only)."""
    return tuple(p for p in peaks if _in_window(critical, p))


def assign_peaks(criticals, peaks):
    """Give each response peak to one critical: the nearest whose window holds it.

    Unbalance drives forward whirl, so a forward or mixed critical is preferred
    to a backward one at the same distance.  Returns one tuple of peaks per
    critical.
    """
    mine = [[] for _ in criticals]
    for peak in peaks:
        best, best_key = None, None
        for i, crit in enumerate(criticals):
            if not _in_window(crit, peak):
                continue
            key = (crit.whirl == "backward", abs(peak.speed / crit.speed - 1.0))
            if best_key is None or key < best_key:
                best, best_key = i, key
        if best is not None:
            mine[best].append(peak)
    return [tuple(m) for m in mine]


def separation_margins(criticals, operating: OperatingRange, rule: MarginRule,
                       sweep_top, judge_backward=False, peaks=None):
    """Judge every critical speed against the operating range.

    Parameters
    ----------
    criticals : sequence of CriticalSpeed
    operating : OperatingRange
    rule : MarginRule
    sweep_top : float
        Highest speed swept, rad/s: criticals above it were not looked for.
    judge_backward : bool
        Backward-whirl criticals are listed but not judged unless this is set
        (unbalance on isotropic supports does not excite backward whirl;
        common practice).
    peaks : sequence of Peak, optional
        Unbalance-response peaks; when given, every synchronous critical also
        gets the amplification factor measured on its matched peaks and the
        verdict that follows from it.

    Returns
    -------
    MarginTable
    """
    rows = []
    assigned = assign_peaks(criticals, peaks) if peaks is not None else None
    for index, crit in enumerate(criticals):
        side, margin = _side_and_margin(crit.speed, operating)
        af = af_from_log_dec(crit.log_dec)
        need = required_margin(rule, af, side)
        verdict = _verdict(rule, crit, af, margin, need, judge_backward)
        extra = {}
        if peaks is not None and crit.order == 1.0:  # unbalance drives 1X only
            mine = assigned[index]
            factors = [p.af for p in mine if p.af is not None]
            if not mine:
                extra = dict(verdict_response="no peak" if crit.log_dec > 0 else "fail")
            elif not factors:
                # no half-power points on any matched peak (too flat, or running into a
                # neighbouring peak): no measured AF, so the log-decrement verdict stands
                extra = dict(af_response=None, required_response=need,
                             verdict_response=verdict, peaks=mine)
            else:
                af_r = max(factors)
                need_r = required_margin(rule, af_r, side)
                extra = dict(af_response=af_r, required_response=need_r,
                             verdict_response=_verdict(rule, crit, af_r, margin, need_r,
                                                       judge_backward), peaks=mine)
        if extra and crit.whirl == "backward" and not judge_backward and crit.log_dec > 0:
            extra["verdict_response"] = "not judged"
        rows.append(MarginRow(crit, side, margin, af, need, verdict, **extra))
    worst_above = required_margin(rule, math.inf, "above")
    notes = []
    reach = 100.0 * (sweep_top - operating.max_speed) / operating.max_speed
    if reach < worst_above:
        notes.append(f"the sweep reaches only {reach:.0f}% above the maximum continuous speed; "
                     f"criticals up to {worst_above:.0f}% above it may need checking")
    if peaks is not None and any(r.verdict_response == "no peak" and r.critical.whirl != "backward"
                                 and r.critical.order == 1.0 for r in rows):
        notes.append("some forward criticals show no response peak: the unbalance cases given "
                     "do not excite them at the probes; add a case that does")
    return MarginTable(tuple(rows), operating, rule, float(sweep_top), tuple(notes))
