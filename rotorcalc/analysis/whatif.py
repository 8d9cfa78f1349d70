"""What-if studies: variants side by side, the stiffness window that keeps the
margins, and the sensitivity of each critical speed to the bearings and disks.

All three are built on :func:`~rotorcalc.analysis.screening.screen` and the
change grammar of :mod:`rotorcalc.variants`.
"""

from __future__ import annotations

import dataclasses
import math
from dataclasses import dataclass

import numpy as np
from scipy.optimize import brentq, linear_sum_assignment

from ..units import to_rpm
from ..variants import Variant, apply_variant, parse_change
from ..workers import run_all
from .criticals import CriticalSpeed
from .margins import CAUTION
from .screening import Screening, screen

# --- variants side by side -------------------------------------------------------------


@dataclass(frozen=True)
class ComparisonRow:
    """One critical speed of one variant, with its change against the base."""

    variant: str
    row: object              # MarginRow
    base_speed: float | None  # the matching critical of the base, rad/s

    @property
    def change_percent(self):
        if self.base_speed is None:
            return None
        return 100.0 * (self.row.critical.speed / self.base_speed - 1.0)


@dataclass(frozen=True)
class Comparison:
    """Screenings of a base rotor and its variants."""

    names: tuple
    screenings: tuple
    rows: tuple
    changes: tuple = ()      # per variant (not the base), the text of each change

    @property
    def passed(self):
        return {name: s.passed for name, s in zip(self.names, self.screenings)}

    def to_dict(self):
        out = []
        for r in self.rows:
            d = r.row.to_dict()
            d.update({"variant": r.variant,
                      "base_speed_rpm": None if r.base_speed is None else float(to_rpm(r.base_speed)),
                      "change_percent": r.change_percent})
            out.append(d)
        return {"variants": list(self.names), "passed": self.passed, "criticals": out,
                "changes": {name: list(texts) for name, texts in zip(self.names[1:],
                                                                      self.changes)},
                "caution": CAUTION}


#: A variant's critical is the same as a base critical when it lies within this
#: share of the base speed (after a one-to-one assignment).
MATCH_SHARE = 0.35
#: A change of whirl (forward against not forward) costs as much as this relative speed
#: change in the assignment.
WHIRL_PENALTY = 0.2
#: What the comparison table's change column means (the command prints it).
MATCH_CAPTION = (f"Change: against the base critical assigned one to one (same order; the least "
                 f"total relative speed change, a change of whirl counting as "
                 f"{WHIRL_PENALTY:.0%}), when within {MATCH_SHARE:.0%} of the base speed; "
                 "overdamped modes are listed, never matched. Margins are against each "
                 "variant's own operating range.")


def match_criticals(criticals, base):
    """One-to-one matching of a variant's criticals to the base's.

    An optimal assignment on the relative speed change, plus :data:`WHIRL_PENALTY`
    when the whirl changes between forward and not-forward (a backward mode may
    turn mixed under a change of supports) and a bar on different orders;
    pairs further apart than :data:`MATCH_SHARE` of the base speed are left
    unmatched.  Returns, per critical, the matched base critical or None.
    """
    out = [None] * len(criticals)
    if not criticals or not base:
        return out
    cost = np.full((len(criticals), len(base)), 1e6)
    for i, c in enumerate(criticals):
        for j, b in enumerate(base):
            if c.order != b.order:
                continue
            cost[i, j] = abs(c.speed / b.speed - 1.0) + WHIRL_PENALTY * (
                (c.whirl == "forward") != (b.whirl == "forward"))
    rows, cols = linear_sum_assignment(cost)
    for i, j in zip(rows, cols):
        if cost[i, j] < 1e6 and abs(criticals[i].speed / base[j].speed - 1.0) <= MATCH_SHARE:
            out[i] = base[j]
    return out


def what_if_rotor(rotor, with_sources=False, with_screen=False):
    """The rotor a what-if study screens: without its destabilising sources (and their
    screen) unless ``with_sources``; the what-if questions are about supports and masses.
    ``with_screen`` (with the sources only) keeps the file's cross-coupling screen too, so
    that each variant's verdict includes it (``compare``); the stiffness window and the
    levers, which screen many perturbed rotors, leave it out."""
    if with_sources:
        return rotor if with_screen else dataclasses.replace(rotor, coupling_rule=None)
    return dataclasses.replace(rotor, sources=(), coupling_rule=None)


def _refuse_source_changes(rotor, variants):
    """A change to the cross-coupling sources of a study that leaves them out would change
    nothing (or fail as changing what is not there): say so."""
    from ..errors import InputError
    for v in variants:
        for change in v.changes:
            if change.path[0][0] == "cross_coupling" and rotor.sources:
                raise InputError(change.key, f"(variant {v.name!r}) changes the "
                                 "cross-coupling sources, which the what-if study leaves out "
                                 "unless asked", value=change.text,
                                 expected="--with-sources (with_sources=True)", kind="conflict")


def compare(rotor, variants, progress=None, with_sources=False, workers=0, base=None):
    """Screen the base rotor and every variant; rows carry the change against the base.

    Parameters
    ----------
    rotor : Rotor
    variants : sequence of Variant
    progress : callable, optional
        ``progress(done, total)`` after each screening.
    workers : int
        Worker processes sharing the screenings (0: one per core, the default; each
        screening is independent, so the result is the same for any number).
    base : Screening, optional
        The rotor's own screening, already made: used as the base instead of screening
        it again when the what-if rotor screens the same (no sources or cross-coupling
        screen to drop).
    """
    if not with_sources:
        _refuse_source_changes(rotor, variants)
    what_if = what_if_rotor(rotor, with_sources, with_screen=True)
    models = [("base", what_if)] + [(v.name, apply_variant(what_if, v)) for v in variants]
    # the what-if rotor screens as the rotor itself when it has nothing to drop
    reuse = base is not None and (what_if is rotor or not rotor.sources and (
        rotor.coupling_rule is None or not rotor.coupling_rule.in_check))
    screenings = run_all(screen, [(model,) for _, model in models[reuse:]], workers, progress)
    if reuse:
        screenings = [base] + list(screenings)
    # overdamped modes are not criticals: they are listed, never matched (a heavily
    # damped mode near the first bending critical once took its counterpart)
    base = [r.critical for r in screenings[0].margins.rows if r.verdict != "overdamped"]
    rows = []
    for (name, _), result in zip(models, screenings):
        real = [r for r in result.margins.rows if r.verdict != "overdamped"]
        matches = dict(zip((id(r) for r in real),
                           match_criticals([r.critical for r in real], base)))
        for row in result.margins.rows:
            match = matches.get(id(row))
            rows.append(ComparisonRow(name, row, None if match is None else match.speed))
    return Comparison(tuple(n for n, _ in models), tuple(screenings), tuple(rows),
                      tuple(tuple(c.text for c in v.changes) for v in variants))


# --- stiffness window ------------------------------------------------------------------


def margin_excess(result: Screening):
    """Smallest (margin - required margin), per cent, over the judged critical speeds.

    Criticals that need no margin (critically damped, not judged,
    overdamped) do not count; an unstable critical gives minus infinity.  Returns the excess and
    the limiting critical (or None).
    """
    worst, limiting = math.inf, None
    for row in result.margins.rows:
        if row.critical.log_dec < 0:
            return -math.inf, row.critical
        if row.verdict in ("critically damped", "not judged", "overdamped"):
            continue
        excess = row.margin - row.required
        if excess < worst:
            worst, limiting = excess, row.critical
    return worst, limiting


def excess_state(excess):
    """What a margin excess (per cent, :func:`margin_excess`) says about a scanned factor."""
    if excess == math.inf:
        return "no critical needs a margin"
    if excess == -math.inf:
        return "unstable critical"
    return "keeps the margins" if excess >= 0 else "margin short"


@dataclass(frozen=True)
class WindowEnd:
    """One end of the stiffness window: the factor and the critical that limits it."""

    factor: float | None       # None: the window reaches past the searched range
    limiting: CriticalSpeed | None
    note: str = ""

    def to_dict(self):
        c = self.limiting
        return {"factor": self.factor, "note": self.note,
                "limiting_critical_rpm": None if c is None else float(to_rpm(c.speed)),
                "limiting_whirl": None if c is None else c.whirl}


@dataclass(frozen=True)
class StiffnessWindow:
    """Range of a stiffness scale factor for which every separation margin holds."""

    target: str
    factors: np.ndarray
    excess: np.ndarray
    low: WindowEnd
    high: WindowEnd
    base_passes: bool

    def scan_rows(self):
        """(factor, excess) rows of the scan; a factor that is 1 to rounding is listed once."""
        rows = []
        for f, e in zip(self.factors, self.excess):
            if rows and math.isclose(f, rows[-1][0], rel_tol=1e-9):
                continue
            rows.append((float(f), float(e)))
        return rows

    def to_dict(self):
        return {"target": self.target, "base_passes": self.base_passes,
                "scan": [{"factor": float(f), "excess_percent": None if not np.isfinite(e)
                          else float(e)} for f, e in zip(self.factors, self.excess)],
                "low": self.low.to_dict(), "high": self.high.to_dict(), "caution": CAUTION}


#: What a stiffness window scales when no target is named (the help text reads it).
WINDOW_DEFAULT = "every bearing together (seals kept as they are)"

#: What the window's scan table shows.
WINDOW_CAPTION = (
    "Margin excess: the smallest (margin - required margin) over the critical speeds that "
    "need a margin; inf when none needs one (all critically damped, not judged, or beyond "
    "the sweep). Every stiffness coefficient (kxx, kxy, kyx, kyy) of the target is scaled "
    "by the factor; dampings are kept. AF estimated from the log decrement.")

#: Scan factors per decade of a window over a given range: a critical must not jump over
#: the margin band between two factors.
FACTORS_PER_DECADE = 4


def window_factors(low, high, count):
    """The scan's factors: ``count`` log-spaced from ``low`` to ``high``, and 1."""
    grid = np.geomspace(low, high, count)
    return np.sort(np.concatenate([grid[~np.isclose(grid, 1.0, rtol=1e-9)], [1.0]]))


def factor_count(low, high):
    """Scan factors for a window from ``low`` to ``high`` (:data:`FACTORS_PER_DECADE`, at
    least 9)."""
    return max(9, int(round(FACTORS_PER_DECADE * math.log10(high / low))) + 1)


def window_targets(rotor, target=None):
    """Change paths of the bearings a window scales: :data:`WINDOW_DEFAULT` by default."""
    if target is None:
        return [f"bearing[{i}]" for i, b in enumerate(rotor.bearings) if b.role == "bearing"]
    return [target]


def _scaled(rotor, targets, factor):
    changes = tuple(parse_change(f"{t}.k *= {float(factor)!r}") for t in targets)
    return apply_variant(rotor, Variant(f"x{factor:g}", changes))


def stiffness_window(rotor, target=None, low=0.1, high=10.0, points=9, rtol=2e-3,
                     progress=None, with_sources=False, workers=0):
    """The stiffness scale factors, around 1, for which every margin holds.

    Scales the four stiffness coefficients of the target bearing(s) (by
    default every bearing together, seals unchanged; or one, e.g.
    ``"bearing.DE"``, ``"bearing[0]"``), screens the rotor on a log grid of
    factors (the screenings in worker processes: ``workers``, 0 for one per core; the
    result is the same for any number), and refines each end of the passing interval
    that contains 1 by Brent's method on the margin excess, from the scan's values at
    the bracket's ends (each factor screened once).  Amplification factors are
    estimated from the log decrement (the unbalance response is not run).

    Returns
    -------
    StiffnessWindow
    """
    targets = window_targets(rotor, target)
    rotor = dataclasses.replace(what_if_rotor(rotor, with_sources), unbalance=())
    factors = window_factors(low, high, points)
    count = [0]

    def told(*_):                   # after each screening, the scan's and the ends'
        count[0] += 1
        if progress is not None:
            progress(count[0], None)

    def evaluate(f):
        found = _window_point(rotor, targets, f)
        told()
        return found

    scan = run_all(_window_point, [(rotor, targets, f) for f in factors], workers, told)
    excess = np.array([e for e, _ in scan])
    one = int(np.argmin(abs(factors - 1.0)))
    base_ok = excess[one] >= 0
    # log(factor) -> excess: Brent's method evaluates its bracket's ends again
    known = {math.log(f): e for f, e in zip(factors, excess)}

    def g(s):
        if s not in known:
            known[s] = evaluate(math.exp(s))[0]
        return _finite(known[s])

    def end(step):
        if not base_ok:
            return WindowEnd(None, scan[one][1], "the base stiffness does not keep the margins")
        i = one
        while 0 <= i + step < len(factors) and excess[i + step] >= 0:
            i += step
        if not 0 <= i + step < len(factors):
            return WindowEnd(None, None, f"margins hold up to the end of the search "
                                         f"(x{factors[i]:g})")
        a, b = sorted((factors[i], factors[i + step]))
        # work in log(factor) so the tolerance is relative
        try:
            root = math.exp(brentq(g, math.log(a), math.log(b), xtol=rtol))
        except ValueError:
            root = factors[i]
        # the critical that fails just outside the window limits it
        limiting = evaluate(root * (1 - 2 * rtol) if step < 0 else root * (1 + 2 * rtol))[1]
        return WindowEnd(float(root), limiting)

    label = target or "all bearings (seals unchanged)"
    return StiffnessWindow(label, factors, excess, end(-1), end(+1), bool(base_ok))


def _window_point(rotor, targets, factor):
    """(margin excess, limiting critical) of the rotor with the targets' stiffness scaled."""
    return margin_excess(screen(_scaled(rotor, targets, factor)))


def _finite(x):
    return max(min(x, 1e3), -1e3)  # brentq needs finite values; the sign is what matters


# the levers moved to their own module; their names stay readable from here
from .levers import (Levers, Sensitivity, derivative_sensitivities,  # noqa: E402,F401
                     lever_criticals, levers, parameters, refine_near, sensitivities)
