"""The tolerance envelope: a rotor on bearings from their geometry screened at every corner of
its bearings' tolerance ranges, and the worst corner named for each item judged.

A lateral audit repeats the analysis at the extremes of the bearings' tolerances: the
assembled clearance and the preload at their limits, each with the oil's inlet temperature
at the ends of its range (common practice in the industry standards for centrifugal
machinery, from memory).  The ranges are written in the rotor file beside the nominal
values (``clearance_range``, ``preload_range`` in ``[bearing.film]``,
``inlet_temperature_range`` in ``[bearing.oil]``).  Each quantity with a range is one
dimension; every corner (each dimension at its low or its high end, the same end for every
bearing that gives a range) is a variant of the rotor, built with the what-if grammar and
screened as ``compare`` screens, beside the rotor as described ("nominal").

Screening only: confirm against the applicable standard, the purchase specification, local
codes and a licensed engineer's review.
"""

from __future__ import annotations

import itertools
import math
from dataclasses import dataclass

from ..errors import InputError
from ..units import to_rpm
from ..variants import Variant, parse_change
from .margins import CAUTION
from .whatif import compare

#: (label, the film model's range field, the change path under ``bearing[i].``, unit text)
DIMENSIONS = (("clearance", "clearance_range", "film.clearance", " m"),
              ("preload", "preload_range", "film.preload", ""),
              ("oil inlet", "inlet_range", "oil.inlet_temperature", " K"))


def _end_text(label, value):
    if label == "clearance":
        return f"{value * 1e6:.4g} um"
    if label == "oil inlet":
        return f"{value - 273.15:.4g} degC"
    return f"{value:.3g}"


def corner_variants(rotor):
    """One :class:`~rotorcalc.variants.Variant` per corner of the tolerance ranges.

    Raises
    ------
    InputError
        When no bearing of the rotor gives a tolerance range.
    """
    films = [(i, b.film) for i, b in enumerate(rotor.bearings) if b.film is not None]
    dims = []
    for label, field, path, unit in DIMENSIONS:
        having = [(i, getattr(f, field)) for i, f in films if getattr(f, field)]
        if having:
            dims.append((label, path, unit, having))
    if not dims:
        raise InputError("bearing", "gives no tolerance range for an envelope",
                         expected="clearance_range or preload_range in a [bearing.film], or "
                                  "inlet_temperature_range in a [bearing.oil]",
                         kind="missing")
    out = []
    for ends in itertools.product((0, 1), repeat=len(dims)):
        names, changes = [], []
        for end, (label, path, unit, having) in zip(ends, dims):
            values = {v[end] for _, v in having}
            shown = _end_text(label, next(iter(values))) if len(values) == 1 else \
                ("low" if end == 0 else "high")
            names.append(f"{label} {shown}")
            changes += [parse_change(f"bearing[{i}].{path} = {v[end]:.9g}{unit}")
                        for i, v in having]
        out.append(Variant(", ".join(names), tuple(changes)))
    return tuple(out)


@dataclass(frozen=True)
class WorstCase:
    """One judged item and the corner (or the nominal rotor) where it is worst.

    ``item`` names it; ``measure`` says what is compared (the smaller is worse unless
    ``larger_worse``); ``value`` is the worst value, ``variant`` where; ``passed`` whether
    it holds there; ``nominal`` the value of the rotor as described.
    """

    item: str
    measure: str
    variant: str
    value: float
    nominal: float | None
    passed: bool
    larger_worse: bool = False

    def to_dict(self):
        return {"item": self.item, "measure": self.measure, "worst_variant": self.variant,
                "worst_value": _plain(self.value), "nominal_value": _plain(self.nominal),
                "passed": self.passed}


def _plain(v):
    return None if v is None or (isinstance(v, float) and not math.isfinite(v)) else float(v)


@dataclass(frozen=True)
class Envelope:
    """Every corner screened (a :class:`~rotorcalc.analysis.whatif.Comparison` whose first
    screening is the rotor as described) and the worst corner per item."""

    comparison: object
    worst: tuple

    @property
    def passed(self):
        return all(s.passed for s in self.comparison.screenings)

    @property
    def complete(self):
        return all(s.complete for s in self.comparison.screenings)

    @property
    def verdict(self):
        if not self.passed:
            return "fail"
        return "pass" if self.complete else "incomplete"

    def to_dict(self):
        out = self.comparison.to_dict()
        out.update({"worst_cases": [w.to_dict() for w in self.worst],
                    "verdict": self.verdict, "caution": CAUTION})
        return out


def tolerance_envelope(rotor, progress=None, with_sources=False, workers=0):
    """Screen the rotor and every corner of its bearings' tolerances (module docstring)."""
    variants = corner_variants(rotor)
    comparison = compare(rotor, variants, progress=progress, with_sources=with_sources,
                         workers=workers)
    return Envelope(comparison, worst_cases(comparison))


def worst_cases(comparison):
    """The worst variant per item: each critical of the nominal rotor (margin against the
    required one, where a margin is required), each stability branch (judged log decrement)
    and each response limit (ratio to the limit)."""
    names, screenings = comparison.names, comparison.screenings
    out = []
    base = {r.critical.speed: r for r in screenings[0].margins.rows if r.verdict != "overdamped"}
    for speed, base_row in sorted(base.items()):
        rows = [(r.variant, r.row) for r in comparison.rows if r.base_speed == speed]
        if not rows:
            continue
        excess = [(v, _excess(row), row) for v, row in rows]
        variant, value, row = min(excess, key=lambda t: t[1])
        out.append(WorstCase(f"critical near {to_rpm(speed):.0f} rpm ({base_row.critical.whirl})",
                             "margin above the required one, %", variant, value,
                             _excess(base_row), row.passed))
    # stability: the least judged log decrement of any mode (branch numbers are each
    # screening's own order, so modes are not matched across corners)
    least = []
    for name, s in zip(names, screenings):
        judged = [b for b in (s.stability.branches if s.stability is not None else ())
                  if b.judged_log_dec is not None]
        if judged:
            least.append((name, min(judged, key=lambda b: b.judged_log_dec)))
    if least:
        name, b = min(least, key=lambda t: t[1].judged_log_dec)
        nominal = next((x.judged_log_dec for n, x in least if n == names[0]), None)
        out.append(WorstCase(f"stability: the least damped mode, minimum speed to trip "
                             f"({b.whirl} at {to_rpm(b.worst_speed):.0f} rpm)",
                             "log decrement", name, b.judged_log_dec, nominal, b.passed))
    checks = {}
    for name, s in zip(names, screenings):
        if s.response is None:
            continue
        for c in tuple(s.response.vibration) + tuple(s.response.clearance):
            checks.setdefault((c.case, c.where, c.check), []).append((name, c))
    for (case, where, check), items in checks.items():
        name, c = max(items, key=lambda t: t[1].ratio)
        nominal = next((x.ratio for n, x in items if n == names[0]), None)
        out.append(WorstCase(f"{check}: {case} at {where}", "ratio to the limit", name,
                             c.ratio, nominal, c.passed, larger_worse=True))
    return tuple(out)


def _excess(row):
    """Margin minus the required margin (per cent); -inf when unstable, +inf when no margin
    is required."""
    if row.critical.log_dec < 0:
        return -math.inf
    values = []
    if row.required and row.required > 0 and row.margin is not None:
        values.append(row.margin - row.required)
    if row.required_response and row.required_response > 0 and row.peak_margin is not None:
        values.append(row.peak_margin - row.required_response)    # from the response peak
    return min(values) if values else math.inf
