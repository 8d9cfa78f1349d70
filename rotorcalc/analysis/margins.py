"""Separation margins of critical speeds from the operating range.

Margins are per cent of the nearer end of the operating range: below the
minimum speed ``(N_min - N_c) / N_min``, above the maximum continuous speed
``(N_c - N_mc) / N_mc``; a critical inside the range has a negative margin
(its distance to the nearer end, per cent of that end).

The required margin follows a :class:`~rotorcalc.model.MarginRule`; the
default is the amplification-factor rule of industry standards for
centrifugal machinery, quoted from memory as common practice (confirm
against the edition your purchase specification names):

* AF < 2.5: the critical is critically damped and needs no margin;
* AF >= 2.5, critical below the minimum speed: SM = 17 (1 - 1 / (AF - 1.5)) %,
  at most 16 %;
* AF >= 2.5, critical above the maximum continuous speed:
  SM = 10 + 17 (1 - 1 / (AF - 1.5)) %, at most 26 %.

Which modes are judged (docs/theory.md, "Which modes are criticals"):

* a mode with a negative log decrement is ``unstable`` and fails wherever it is;
* a mode whose damping ratio is at least ``settings.overdamped_ratio`` is
  ``overdamped``: no resonance, not a critical, no AF;
* a mode whose forward share is below ``settings.judge_share`` is listed
  with its share, ``not judged`` (unbalance drives forward whirl);
* a log decrement of zero (an undamped mode, roundoff snapped) has an
  unbounded AF and needs the largest margin.

AF is estimated from the log decrement as ``pi / delta`` (light damping);
when an unbalance response was run, each response peak is matched to the
critical whose mode shape it resembles, and the margin is also measured from
the peak speed with the AF measured there (the response-based verdict).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ..vocabulary import CAUTION, Side, Verdict, renamed  # noqa: F401 (CAUTION re-exported)
from ..model import MarginRule, OperatingRange
from ..units import to_rpm
from .criticals import CriticalSpeed



def af_from_log_dec(log_dec):
    """Amplification factor estimated from the log decrement, pi / delta (inf at or below 0)."""
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
    if rule.name == "none":
        return 0.0
    if rule.name == "fixed":
        return {"below": rule.margin_below, "above": rule.margin_above}.get(
            side, max(rule.margin_below, rule.margin_above))
    if af < rule.af_threshold:
        return 0.0
    base = 17.0 * (1.0 - 1.0 / (af - 1.5)) if math.isfinite(af) else 17.0
    below = min(base, rule.margin_cap_below)
    above = min(10.0 + base, rule.margin_cap_above)
    return {"below": below, "above": above}.get(side, max(below, above))


#: Verdicts that pass.  "overdamped" and "not judged" rows are listed, not judged.
PASSING = ("pass", "critically damped", "not judged", "no peak", "not reached", "overdamped")


def side_and_margin(speed, operating):
    """Where ``speed`` lies against the operating range, and its margin, per cent."""
    lo, hi = operating.min_speed, operating.max_speed
    if speed < lo:
        return Side.BELOW, 100.0 * (lo - speed) / lo
    if speed > hi:
        return Side.ABOVE, 100.0 * (speed - hi) / hi
    to_lo = 100.0 * (speed - lo) / lo if lo > 0 else math.inf
    to_hi = 100.0 * (hi - speed) / hi
    return Side.INSIDE, -min(to_lo, to_hi) + 0.0   # no -0.0 on the range's end


@dataclass(frozen=True)
class Judgement:
    """The rules that say which criticals are judged and how (from the rotor's settings)."""

    rule: MarginRule
    judge_share: float = 0.25
    overdamped_ratio: float = 0.45

    @classmethod
    def of(cls, rotor):
        s = rotor.settings
        return cls(s.margin_rule, rotor.judged_share, s.overdamped_ratio)

    def category(self, crit, excited=False):
        """What a critical is before its margin is judged: unstable, overdamped,
        not judged, or judged.  ``excited``: an unbalance-response peak belongs to
        it, which proves it is excited whatever its whirl: it is judged."""
        if crit.log_dec < 0:
            return "unstable"
        if crit.damping_ratio >= self.overdamped_ratio:
            return "overdamped"
        if (not excited and self.judge_share > 0
                and crit.forward_fraction <= self.judge_share):
            return "not judged"   # judged: forward share above the threshold (0: all)
        return "judged"

    def kind(self, crit, excited=False):
        """Old spelling of :meth:`category` (read until 0.3)."""
        renamed("Judgement.kind()", "Judgement.category()")
        return self.category(crit, excited)

    def verdict(self, crit, af, margin, need, excited=False):
        kind = self.category(crit, excited)
        if kind != "judged":
            return Verdict.FAIL if kind == "unstable" else Verdict(kind)
        if self.rule.name == "none":
            return Verdict.NOT_JUDGED   # margins listed, not judged
        if self.rule.name == "af-curve" and af < self.rule.af_threshold:
            return "critically damped"
        return Verdict.PASS if margin >= need else Verdict.FAIL


@dataclass(frozen=True)
class MarginRow:
    """Margin of one critical speed: where it is, what it needs, and the verdicts.

    ``amplification_factor`` is the log-decrement estimate (``inf`` when the
    mode is undamped or unstable, ``None`` when overdamped: no resonance).
    The ``*_response`` fields are filled when an unbalance response was run:
    ``peak`` is the governing response peak matched to this critical (the one
    that leaves the least margin to spare), ``peak_margin`` its margin measured
    from the peak speed, with the AF measured on it and the verdict that
    follows; ``peaks`` every peak matched to this critical.
    """

    critical: CriticalSpeed
    side: str
    margin: float
    amplification_factor: float | None
    required: float
    verdict: str
    af_response: float | None = None
    required_response: float | None = None
    verdict_response: str | None = None
    peaks: tuple = ()
    peak: object = None
    peak_margin: float | None = None

    @property
    def passed(self):
        return self.verdict in PASSING and (self.verdict_response is None
                                            or self.verdict_response in PASSING)

    @property
    def undamped(self):
        return self.critical.log_dec == 0.0

    def to_dict(self):
        out = self.critical.to_dict()
        af = self.amplification_factor
        out.update({
            "side": self.side,
            "margin_percent": _finite_or_none(self.margin),
            "amplification_factor": None if af is None else _finite_or_none(af),
            "amplification_factor_source": ("none: overdamped, no resonance" if af is None else
                                            "unbounded: undamped or unstable mode"
                                            if not math.isfinite(af) else
                                            "log decrement (pi/delta)"),
            "required_margin_percent": self.required,
            "verdict": self.verdict,
        })
        if self.verdict_response is not None:
            out.update({
                "peak_speed_rpm": None if self.peak is None else float(to_rpm(self.peak.speed)),
                "peak_margin_percent": (None if self.peak_margin is None
                                        else _finite_or_none(self.peak_margin)),
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
    judgement: Judgement | None = None

    @property
    def passed(self):
        return all(row.passed for row in self.rows)

    @property
    def has_response(self):
        return any(row.verdict_response is not None for row in self.rows)

    def caption(self):
        """The rule, its label and what is judged, in the words every presentation uses."""
        text = f"Margin rule: {self.rule.describe()} ({self.rule.label})."
        if self.rule.name == "af-curve":
            text += " AF estimated from log dec as pi/delta."
        j = self.judgement or Judgement(self.rule)
        judged = ("every whirl" if j.judge_share == 0
                  else f"forward share above {j.judge_share:g}")
        text += (f" Judged: {judged}; damping ratio {j.overdamped_ratio:g} or more is "
                 "overdamped, not a critical.")
        if self.has_response:
            text += (" 'resp.' columns: the response peak matched to each critical by mode "
                     "shape, its AF (half-power bandwidth) and the margin from the peak.")
        return text

    def to_dict(self):
        j = self.judgement or Judgement(self.rule)
        return {
            "operating_range_rpm": [float(to_rpm(self.operating.min_speed)),
                                    float(to_rpm(self.operating.max_speed))],
            "rule": {"name": self.rule.name, "margin_below_percent": self.rule.margin_below,
                     "margin_above_percent": self.rule.margin_above,
                     "af_threshold": self.rule.af_threshold,
                     "margin_cap_below_percent": _finite_or_none(self.rule.margin_cap_below),
                     "margin_cap_above_percent": _finite_or_none(self.rule.margin_cap_above),
                     "text": self.rule.describe(), "label": self.rule.label},
            "judged_forward_share": j.judge_share,
            "overdamped_damping_ratio": j.overdamped_ratio,
            "criticals": [row.to_dict() for row in self.rows],
            "passed": self.passed,
            "sweep_top_rpm": float(to_rpm(self.verified_above_to)),
            "notes": list(self.notes),
            "caution": CAUTION,
        }


# --- response peaks matched to criticals by mode shape ----------------------------------

#: A response peak belongs to the critical that contributes most to its deflected
#: shape, when that contribution is at least this share of all of them ...
MATCH_SHARE = 0.3
#: ... and the critical lies within this factor of the peak speed either way (the
#: peak of a damped mode lies above its damped natural frequency, more so for heavy
#: damping and with neighbouring modes).
MATCH_SPEED_FACTOR = 1.6


def contributions(criticals, peak):
    """Share of each critical's mode shape in a peak's deflected shape.

    The deflected shape at the peak (complex x, y at every node) is fitted by
    least squares with the mode shapes of the synchronous criticals within
    :data:`MATCH_SPEED_FACTOR` of the peak speed; a critical's share is the
    size of its term over the sum of the sizes.  Complex shapes keep forward
    and backward whirl apart (their circular shapes are orthogonal), and a
    peak where several modes add up goes to the one that dominates it.
    Returns one share per critical (0 where not eligible).
    """
    shares = [0.0] * len(criticals)
    if peak.shape is None:
        return shares
    near = [i for i, c in enumerate(criticals)
            if c.order == 1.0
            and 1.0 / MATCH_SPEED_FACTOR <= peak.speed / c.speed <= MATCH_SPEED_FACTOR]
    if not near:
        return shares
    basis = np.stack([criticals[i].shape.ravel() for i in near], axis=1)
    basis = basis / np.linalg.norm(basis, axis=0)
    coef = np.linalg.lstsq(basis, peak.shape.ravel(), rcond=None)[0]
    size = np.abs(coef)
    total = size.sum()
    for i, v in zip(near, size):
        shares[i] = float(v / total) if total > 0 else 0.0
    return shares


def assign_peaks(criticals, peaks, judgement=None):
    """Give each response peak to the critical that dominates its deflected shape.

    Overdamped criticals take part in the fit but take no peak; a peak whose
    largest contribution is below :data:`MATCH_SHARE` is left unassigned.
    Returns one tuple of peaks per critical.
    """
    judgement = judgement or Judgement(MarginRule())
    mine = [[] for _ in criticals]
    for peak in peaks:
        shares = contributions(criticals, peak)
        best = max(range(len(criticals)), key=lambda i: shares[i], default=None)
        if best is None or shares[best] < MATCH_SHARE \
                or judgement.category(criticals[best]) == "overdamped":
            continue
        mine[best].append(peak)
    return [tuple(m) for m in mine]


def _response_verdict(judgement, crit, peaks, operating, af_estimate):
    """The governing peak's margin, AF, requirement and verdict for one critical."""
    rule = judgement.rule
    best = None
    for p in peaks:
        side, margin = side_and_margin(p.speed, operating)
        af = p.af if p.af is not None else af_estimate
        need = required_margin(rule, af, side)
        verdict = judgement.verdict(crit, af, margin, need, excited=True)
        key = (verdict not in PASSING, need - margin)
        if best is None or key > best[0]:
            best = (key, p, margin, p.af, need, verdict)
    _, peak, margin, af, need, verdict = best
    return dict(peak=peak, peak_margin=margin, af_response=af, required_response=need,
                verdict_response=verdict, peaks=tuple(peaks))


def separation_margins(criticals, operating: OperatingRange, rule: MarginRule,
                       sweep_top, judge_backward=False, peaks=None, judgement=None,
                       response_span=None):
    """Judge every critical speed against the operating range.

    Parameters
    ----------
    criticals : sequence of CriticalSpeed
    operating : OperatingRange
    rule : MarginRule
    sweep_top : float
        Highest speed swept, rad/s: criticals above it were not looked for.
    judge_backward : bool
        Judge every critical whatever its whirl (else those whose forward
        share is below the judgement's share are listed, not judged).
    peaks : sequence of Peak, optional
        Unbalance-response peaks; when given, every synchronous critical also
        gets the margin from its matched peaks, the AF measured on them and
        the verdict that follows.
    judgement : Judgement, optional
        Which modes are judged; by default the default settings with ``rule``.
    response_span : (float, float), optional
        Speeds (rad/s) the unbalance response covered: a critical outside it
        with no peak is "not reached" rather than "no peak".

    Returns
    -------
    MarginTable
    """
    judgement = judgement or Judgement(rule)
    if judge_backward:
        judgement = Judgement(judgement.rule, 0.0, judgement.overdamped_ratio)
    rows = []
    assigned = assign_peaks(criticals, peaks, judgement) if peaks is not None else None
    for index, crit in enumerate(criticals):
        side, margin = side_and_margin(crit.speed, operating)
        kind = judgement.category(crit)
        af = None if kind == "overdamped" else af_from_log_dec(crit.log_dec)
        need = 0.0 if af is None else required_margin(rule, af, side)
        verdict = judgement.verdict(crit, af, margin, need)
        extra = {}
        if peaks is not None and crit.order == 1.0 and kind != "overdamped":
            mine = assigned[index]
            reached = response_span is None or \
                response_span[0] <= crit.speed <= response_span[1]
            if kind == "unstable":
                extra = dict(verdict_response=Verdict.FAIL, peaks=mine)
            elif mine:
                # a peak proves the mode is excited: judged by the response even when its
                # forward share is low (elliptical modes on anisotropic supports)
                extra = _response_verdict(judgement, crit, mine, operating,
                                          af_from_log_dec(crit.log_dec))
            elif kind == "not judged":
                extra = dict(verdict_response="not judged")
            else:
                extra = dict(verdict_response=Verdict.NO_PEAK if reached
                             else Verdict.NOT_REACHED)
        rows.append(MarginRow(crit, side, margin, af, need, verdict, **extra))
    notes = []
    if any(r.verdict_response == "no peak" for r in rows):
        notes.append("some judged criticals show no response peak: the unbalance cases given "
                     "do not excite them at the probes; add a case that does (their "
                     "log-decrement verdict stands)")
    if any(r.verdict_response == "not reached" for r in rows):
        notes.append("some judged criticals lie outside the unbalance-response sweep: their "
                     "response was not computed (their log-decrement verdict stands)")
    if any(r.undamped and r.verdict not in ("overdamped", "not judged") for r in rows):
        notes.append("a log decrement of 0 means the model has no damping on that mode: "
                     "its AF is unbounded and the largest margin is required")
    return MarginTable(tuple(rows), operating, rule, float(sweep_top), tuple(notes), judgement)

