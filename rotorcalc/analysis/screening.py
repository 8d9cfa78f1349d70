"""The main job in one call: sweep, stability, critical speeds, unbalance response,
margins, and whether the analysis covers everything it judges."""

from __future__ import annotations

import dataclasses
import math
from dataclasses import dataclass

from ..vocabulary import Outcome, old_keywords
from ..assembly import assemble
from ..model import Rotor
from ..units import to_rpm
from .criticals import critical_speeds
from .margins import Judgement, MarginTable, required_margin, separation_margins
from .response import Response, unbalance_response
from .stability import Stability, stability
from .reduced import sweep_solver
from .sweep import Sweep, default_speeds, sweep


@old_keywords(kind="gap")
@dataclass(frozen=True)
class CoverageGap:
    """Something the screening must judge but the analysis does not reach.

    ``gap``: "sweep-top", "sweep-bottom", "bearing-table", "response" or "solver".
    """

    gap: str
    text: str

    def to_dict(self):
        return {"gap": self.gap, "text": self.text}


@dataclass(frozen=True)
class Screening:
    """Sweep, stability, critical speeds, margin table and (when the rotor has
    unbalance cases) the unbalance response of one rotor, with the coverage gaps.

    ``verdict`` is "pass", "fail" (a check failed) or "incomplete" (nothing
    failed, but the analysis does not cover all it must judge).
    """

    rotor: Rotor
    sweep: Sweep
    criticals: tuple
    margins: MarginTable
    response: Response | None = None
    stability: Stability | None = None
    gaps: tuple = ()
    coupling: object = None     # CouplingResult when the file's [coupling_screen] is in check

    @property
    def failed(self):
        return (not self.margins.passed
                or (self.stability is not None and not self.stability.passed)
                or (self.response is not None and not self.response.passed)
                or (self.coupling is not None and not self.coupling.passed))

    @property
    def complete(self):
        return not self.gaps

    @property
    def passed(self):
        return not self.failed and self.complete

    @property
    def verdict(self):
        return Outcome.FAIL if self.failed else (Outcome.INCOMPLETE if self.gaps else Outcome.PASS)

    def plot(self, *, ax=None):
        """The whirl-speed map of this screening, titled with the rotor's name and the
        criticals marked by verdict (:func:`rotorcalc.plotting.plot_whirl_speed_map`);
        returns its artists record."""
        from ..plotting import plot_whirl_speed_map
        return plot_whirl_speed_map(self.sweep, self.criticals, self.rotor.operating,
                                    self.rotor.settings.orders, ax=ax, margins=self.margins,
                                    title=self.rotor.name)

    def to_dict(self):
        """The screening's one document, written by ``criticals``, ``check`` and ``sweep``
        alike: the margin table's fields at the top, then the verdict, stability,
        coverage gaps, the response checks and the whole sweep and response."""
        out = self.margins.to_dict()
        out.update({"verdict": self.verdict, "passed": self.passed,
                    "coverage_gaps": [g.to_dict() for g in self.gaps]})
        if self.stability is not None:
            out["stability"] = self.stability.to_dict()
        if self.response is not None:
            out["response_checks"] = [c.to_dict() for c in
                                      self.response.vibration + self.response.clearance]
            out["steady_state_exists"] = self.response.steady
            out["response"] = self.response.to_dict()
        if self.coupling is not None:
            out["coupling_screen"] = self.coupling.to_dict()
        out["sweep"] = self.sweep.to_dict()
        return out


def screen(rotor: Rotor, speeds=None, orders=None, solver=None, progress=None,
           workers=1, coupling=None) -> Screening:
    """Sweep the speed range, judge stability, find the critical speeds and judge
    their margins (and the unbalance response, when the rotor has cases).

    Parameters
    ----------
    rotor : Rotor
    speeds : array_like, optional
        rad/s; the rotor's sweep settings by default.
    orders : sequence of float, optional
        Excitation orders; ``rotor.settings.orders`` by default.
    solver, progress : optional
        Passed to :func:`~rotorcalc.analysis.sweep.sweep`.
    workers : int
        Worker processes for the sweep and the critical-speed refinement (1 by
        default, 0 for one per core); the result does not depend on it.
    coupling : CouplingResult, optional
        The file's cross-coupling study (:func:`~rotorcalc.analysis.coupling_screen.coupling_study`
        of this rotor), when it was made already (the report makes it beside the sweep);
        made here when the file's ``[coupling_screen]`` is in the check.
    """
    system = assemble(rotor)
    system.require_support()
    # one solver for the sweep and every refinement: a reduced basis is built once
    solver = sweep_solver(system, default_speeds(rotor) if speeds is None else speeds, solver)
    result = sweep(system, speeds=speeds, solver=solver, progress=progress, workers=workers)
    stab = stability(system, result, solver=solver)
    crits = tuple(critical_speeds(system, result, orders=orders, solver=solver,
                                  workers=workers))
    if getattr(result, "reduction", None) is not None:   # with the refinements' solves too
        result = dataclasses.replace(result, reduction=solver.summary(system))
    basis = solver.basis(system) if hasattr(solver, "basis") else None
    response = unbalance_response(system, unstable=stab.unstable_ranges, basis=basis) \
        if rotor.unbalance else None
    judgement = Judgement.of(rotor)
    table = separation_margins(crits, rotor.operating, rotor.settings.margin_rule,
                               float(result.speeds[-1]),
                               peaks=None if response is None else response.steady_peaks,
                               judgement=judgement,
                               response_span=None if response is None else
                               (float(response.speeds[0]), float(response.speeds[-1])))
    gaps = coverage_gaps(rotor, result, table, response)
    if rotor.coupling_rule is None or not rotor.coupling_rule.in_check:
        coupling = None
    elif coupling is None:
        from .coupling_screen import coupling_study
        coupling = coupling_study(rotor)
    return Screening(rotor, result, crits, table, response, stab, gaps, coupling)


def required_span(rotor: Rotor):
    """Speeds a screening must sweep (rad/s): from the bottom of the widest margin band
    below the minimum speed to the top of the widest one above the maximum
    continuous speed, and at least to trip."""
    op, rule = rotor.operating, rotor.settings.margin_rule
    below = required_margin(rule, math.inf, "below")
    above = required_margin(rule, math.inf, "above")
    top = max(op.trip_speed or op.max_speed, op.max_speed * (1.0 + above / 100.0))
    bottom = op.min_speed * max(0.0, 1.0 - below / 100.0)
    return bottom, top


def coverage_gaps(rotor: Rotor, result: Sweep, table: MarginTable, response=None):
    """What the screening must judge but did not reach (see :class:`CoverageGap`)."""
    gaps = []
    op = rotor.operating
    trip = op.trip_speed or op.max_speed
    if response is not None:
        # the clearance check covers run-up: from the lowest analysed speed (the force
        # vanishes at rest, so the response sweep may start at the next one) up to trip
        lo, hi = float(response.speeds[0]), float(response.speeds[-1])
        start = float(result.speeds[1] if result.speeds[0] == 0.0 else result.speeds[0])
        if lo > start * (1 + 1e-9) or hi < trip * (1 - 1e-9):
            gaps.append(CoverageGap(
                "response", f"the unbalance response sweep ({to_rpm(lo):.0f}-{to_rpm(hi):.0f} "
                f"rpm) does not cover the lowest analysed speed up to trip "
                f"({to_rpm(result.speeds[0]):.0f}-{to_rpm(trip):.0f} rpm): its limits (the "
                "clearances through run-up) were not checked there"))
    judged = [((op.min_speed, trip), f"the minimum speed up to trip ({to_rpm(op.min_speed):.0f}-"
               f"{to_rpm(trip):.0f} rpm): stability there")]
    judged += [((row.critical.speed,) * 2, f"the critical at {to_rpm(row.critical.speed):.0f} "
                "rpm: it") for row in table.rows if row.verdict not in ("overdamped", "not judged")]
    for i, b in enumerate(rotor.bearings):
        for (lo, hi), what in judged:
            if len(b.speeds) >= 2 and (b.outside_table(lo) or b.outside_table(hi)):
                gaps.append(CoverageGap(
                    "bearing-table", f"the coefficient table of {b.role} {b.name or i} "
                    f"({to_rpm(b.speeds[0]):.0f}-{to_rpm(b.speeds[-1]):.0f} rpm) does not "
                    f"cover {what} was judged on held end values"))
    bottom, top = required_span(rotor)
    first, last = float(result.speeds[0]), float(result.speeds[-1])
    if last < top * (1 - 1e-9):
        gaps.append(CoverageGap(
            "sweep-top", f"the sweep stops at {to_rpm(last):.0f} rpm, below "
            f"{to_rpm(top):.0f} rpm (trip, or the top of the widest margin band above the "
            "maximum continuous speed): a critical up there was not looked for"))
    if first > bottom * (1 + 1e-9):
        gaps.append(CoverageGap(
            "sweep-bottom", f"the sweep starts at {to_rpm(first):.0f} rpm, above "
            f"{to_rpm(bottom):.0f} rpm (the bottom of the widest margin band below the "
            "minimum speed): a critical down there was not looked for"))
    for w in result.warnings:
        if getattr(w, "code", None) == "solver-doubt":
            gaps.append(CoverageGap("solver", w))
    return tuple(gaps)
