"""Warnings as records: text to print, a code to group by, the speeds they concern.

A :class:`Notice` is a ``str`` (its message), so it prints, compares and
de-duplicates as the text does; tables, JSON and reports group notices by
``code`` instead of parsing their words.
"""

from __future__ import annotations

import math

#: Every code a notice may carry, with what it means.
CODES = {
    "table-range": "a speed lies outside a bearing's coefficient table (end values held)",
    "solver-doubt": "a sparse eigen-solve could not prove it missed no mode",
    "reduced-basis": "a reduced-basis solve missed its certificate: solved in the full model",
    "rigid-body": "the rotor is not fully supported: rigid-body modes at zero frequency",
    "growth": "a non-oscillating motion grows (static divergence)",
    "unstable-response": "no steady state where a mode is unstable",
    "response-coverage": "the response sweep misses part of the operating range",
    "whirl-iteration": "a mode's whirl-frequency-dependent coefficients reached no fixed point",
    "idle-pad": "a tilting pad carries no film (unloaded; left out of the coefficients)",
    "note": "a remark",
}


class Notice(str):
    """A warning: its message (the string itself), ``code`` and ``speeds`` (rad/s)."""

    def __new__(cls, message, code="note", speeds=()):
        if code not in CODES:
            raise ValueError(f"unknown notice code {code!r}")   # a programming error
        notice = super().__new__(cls, message)
        notice.code = code
        notice.speeds = tuple(float(s) for s in speeds)
        return notice

    def __reduce__(self):
        return (Notice, (str(self), self.code, self.speeds))

    def to_dict(self):
        return {"code": self.code, "message": str(self),
                "speeds_rpm": [s * 30.0 / math.pi for s in self.speeds]}


def record(warning):
    """The JSON record of a warning (a plain string becomes a "note")."""
    if isinstance(warning, Notice):
        return warning.to_dict()
    return {"code": "note", "message": str(warning), "speeds_rpm": []}


def codes(warnings):
    """The codes of some warnings, in order, each once."""
    return list(dict.fromkeys(getattr(w, "code", "note") for w in warnings))
