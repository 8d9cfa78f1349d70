"""Captions, notes and summary columns that more than one presentation prints (the
terminal and the report): one source for each sentence."""

from __future__ import annotations

from .analysis.whatif import MATCH_SHARE
from .tables import Column
from .units import to_rpm

#: The pads table's caption (``bearing`` and the report).
PAD_CAPTION = ("Pivot angle from +x towards +y; tilt positive in the same sense; load: the "
               "pad's film force on the journal; each pad's film at its own temperature from "
               "its power loss and the oil it draws in at its leading edge.")
#: The whirl-reduced coefficients table's caption.
WHIRL_CAPTION = ("The pads' tilts eliminated at each whirl frequency (pad inertia included); "
                 "the analyses read the synchronous row (whirl = speed), the stability screen "
                 "each mode's own with coefficients_at = \"mode-frequency\". The trend with "
                 "whirl frequency is not yet checked against published data "
                 "(docs/bearings.md).")
#: The journal film states' caption under the static load.
STATIC_FILM_CAPTION = ("Each film carries its journal's load at the equilibrium found by "
                       "Newton's method on the journal loads (docs/bearings.md).")


def critical_text(c):
    """A critical speed in a few words: speed, whirl, log dec."""
    return f"{to_rpm(c.speed):.0f} rpm {c.whirl} (log dec {c.log_dec:.3f})"


def reactions_title(rotor_name, solution):
    return (f"{rotor_name}: journal loads at rest (gravity {solution.gravity}, stiffness at "
            f"{to_rpm(solution.speed):.0f} rpm)")


def reactions_caption(solution):
    return (f"Force of each journal bearing on the shaft. Weight {solution.weight:.5g} N; "
            f"applied in all (x, y) {solution.applied[0]:.5g}, {solution.applied[1]:.5g} N; "
            f"the reactions balance it to {solution.balance_error:.1e}.")


def film_record_caption(record):
    """What a film bearing's table of states rests on."""
    step = ("not checked" if record.step_change != record.step_change else
            f"{record.step_change:.1e} on halving the perturbation step")
    return (f"Computed at {len(record.speeds)} speeds; interpolation in speed within "
            f"{record.interpolation_error:.1%} at the mid-points checked; coefficients "
            f"change by {step}. Below the lowest speed and above the highest the end "
            "values hold.")


def comparison_notes(comparison):
    """Unstable criticals, and base criticals that need a margin but have no counterpart."""
    notes = []
    for r in comparison.rows:
        if r.row.critical.log_dec < 0:
            notes.append(f"{r.variant}: UNSTABLE critical at {critical_text(r.row.critical)}")
    base_rows = [r for r in comparison.screenings[0].margins.rows
                 if r.verdict in ("pass", "fail") or not r.passed]
    for name in comparison.names[1:]:
        matched = {r.base_speed for r in comparison.rows if r.variant == name}
        gone = [r.critical for r in base_rows if r.critical.speed not in matched]
        if gone:
            notes.append(f"{name}: no critical within {MATCH_SHARE:.0%} of the base critical"
                         f"{'s' if len(gone) > 1 else ''} "
                         + ", ".join(critical_text(c) for c in gone)
                         + " with the same whirl (it moved further, changed whirl, or left "
                           "the sweep)")
    return notes


def merged_warnings(comparison):
    """The screenings' warnings, each once, naming the variants that gave it."""
    where = {}
    for name, s in zip(comparison.names, comparison.screenings):
        for w in s.sweep.warnings:
            where.setdefault(w, []).append(name)
    out = []
    for w, names in where.items():
        label = "all variants" if len(names) == len(comparison.names) else ", ".join(names)
        out.append(f"({label}) {w}")
    return tuple(out)


def variant_summary(comparison, variants, base_label="base",
                    base_text="the rotor as described"):
    """(columns, rows, caption) of the variants' summary table."""
    rows = [(base_label, base_text, comparison.screenings[0])] + [
        (v.name, "; ".join(c.text for c in v.changes), s)
        for v, s in zip(variants, comparison.screenings[1:])]
    columns = [
        Column("Variant", lambda r: r[0], "{}"),
        Column("Changes", lambda r: r[1], "{}"),
        Column("Criticals", lambda r: len(r[2].margins.rows), "{:d}"),
        Column("Screening", lambda r: {"pass": "passes", "fail": "FAILS",
                                       "incomplete": "NOT COVERED"}[r[2].verdict], "{}"),
    ]
    screened = comparison.screenings[0].coupling is not None
    if screened:
        columns.append(Column("Cross-coupling screen", lambda r: r[2].coupling.brief(), "{}"))
    caption = ("Screening: every verdict 'check' gives (separation margins by log dec and, with "
               "unbalance cases, by response; stability up to trip; response limits; coverage"
               + ("; the file's cross-coupling screen, at the expected amount, and the check "
                  "with every source applied)." if screened else ")."))
    return columns, rows, caption


def variants_title(operating):
    return (f"Critical speeds of each variant (base operating range "
            f"{to_rpm(operating.min_speed):.0f}-{to_rpm(operating.max_speed):.0f} rpm)")
