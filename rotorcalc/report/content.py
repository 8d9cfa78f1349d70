"""The report's sections as plain data for the template: titles, paragraphs, tables (cells
printed by the same :class:`~rotorcalc.tables.Column` lists as the terminal), pictures (SVG
drawn by the same plotting functions) and their captions.  Nothing is computed here beyond
formatting: every number comes from the :class:`~rotorcalc.analysis.review.Review`."""

from __future__ import annotations

from dataclasses import dataclass, field

from .. import captions
from .. import model_tables as mt
from .. import tables as tb
from ..analysis.margins import CAUTION
from ..units import to_rpm
from .pictures import Picture

VERDICT_WORDS = {"pass": "every check met", "fail": "a check FAILED",
                 "incomplete": "NOT COVERED: the analysis does not reach all it must judge"}


@dataclass
class Section:
    """One section of the report: ``id`` (its anchor), ``title`` and its blocks in order."""

    id: str
    title: str
    blocks: list = field(default_factory=list)

    def text(self, text, kind="text"):
        self.blocks.append({"kind": kind, "text": text})

    def items(self, items, kind="list"):
        self.blocks.append({"kind": kind, "items": list(items)})

    def table(self, title, columns, rows, caption=None):
        self.blocks.append({
            "kind": "table", "title": title, "caption": caption,
            "headings": [c.heading for c in columns],
            "numeric": [c.fmt != "{}" for c in columns],
            "rows": [[c.text(r) for c in columns] for r in rows]})

    def figure(self, key, kind, args, caption):
        """A picture (:class:`~rotorcalc.report.pictures.Picture`), drawn later."""
        self.picture(Picture(key, kind, args), caption)

    def picture(self, picture, caption):
        self.blocks.append({"kind": "figure", "picture": picture, "caption": caption})

    @property
    def pictures(self):
        return [b["picture"] for b in self.blocks if b["kind"] == "figure"]


def sections(review):
    """Every section of the report of a :class:`~rotorcalc.analysis.review.Review`, in the
    order a reviewer reads them (pictures described, not drawn yet)."""
    builders = (_summary, _model, _statics, _bearings, _map, _shapes, _whirl_map, _margins,
                _response, _stability, _variants, _warnings)
    return [build(review) for build in builders]


def side_pictures(rotor, statics, bearings, stiffness, coupling):
    """The pictures of the rotor, its statics, bearings, map and cross-coupling screen:
    drawable before the screening ends (their keys are the ones the sections use)."""
    out = [Picture("layout", "layout", (rotor,))]
    if statics is not None:
        out.append(Picture("statics", "own", (statics,)))
    out += [Picture(f"bearing{i}", "own", (c,)) for i, c in enumerate(bearings)]
    if stiffness is not None:
        out.append(Picture("map", "own", (stiffness,)))
    if coupling is not None:
        out.append(Picture("coupling", "coupling", (coupling.screen,)))
    return out


def _shape_picture(k, crit, modes, rotor):
    title = f"Critical speed {k} at {to_rpm(crit.speed):.0f} rpm"
    return Picture(f"shape{k}", "mode-shape", (modes, rotor, title))


def _whirl_picture(result):
    return Picture("whirl-map", "own", (result,))


def _response_pictures(resp, rotor, i):
    """(Bode, polar, clearance envelope or None) of unbalance case ``i``."""
    return (Picture(f"bode{i}", "bode", (resp, i, rotor.operating)),
            Picture(f"polar{i}", "polar", (resp, i)),
            Picture(f"clearance{i}", "clearance", (resp, rotor, i)) if rotor.clearances
            else None)


def screening_pictures(rotor, result, modes):
    """The pictures of a screening alone (mode shapes, whirl-speed map, response): drawable
    while the side analyses run (their keys are the ones the sections use)."""
    out = [_shape_picture(k, c, m, rotor)
           for k, (c, m) in enumerate(zip(result.criticals, modes), 1)]
    out.append(_whirl_picture(result))
    if result.response is not None:
        for i in range(len(result.response.cases)):
            out += [p for p in _response_pictures(result.response, rotor, i) if p is not None]
    return out


def _range_text(op):
    trip = f", trip {to_rpm(op.trip_speed):.0f} rpm" if op.trip_speed else ""
    return f"{to_rpm(op.min_speed):.0f}-{to_rpm(op.max_speed):.0f} rpm{trip}"


def _summary(review):
    s = review.screening
    sec = Section("summary", "Summary")
    op = review.rotor.operating
    sec.blocks.append({"kind": "facts", "items": [
        ("Machine", review.rotor.name),
        ("Operating range", _range_text(op)),
        ("Speeds analysed", f"{to_rpm(s.sweep.speeds[0]):.0f}-{to_rpm(s.sweep.speeds[-1]):.0f} "
                            f"rpm, {len(s.sweep.speeds)} speeds"),
        ("Critical speeds found", str(len(s.criticals))),
        ("Mass", f"{review.mass.mass:.1f} kg"),
    ]})
    sec.blocks.append({"kind": "verdict", "verdict": s.verdict,
                       "text": VERDICT_WORDS[s.verdict]})
    found = review.findings
    if found:
        sec.blocks.append({"kind": "findings", "items": [f.to_dict() for f in found]})
    else:
        sec.text("Every separation margin, the stability of every mode up to trip"
                 + (", the response limits" if s.response is not None else "")
                 + (" and the cross-coupling screen" if s.coupling is not None else "")
                 + " are met, and the analysis covers all it judges.")
    rules = [("Separation margins", f"{s.margins.rule.describe()} ({s.margins.rule.label})")]
    if s.stability is not None:
        rules.append(("Stability", f"{s.stability.rule.describe()} ({s.stability.rule.label})"))
    if s.response is not None:
        from ..analysis.response import limits_caption
        rules.append(("Response limits", limits_caption(review.rotor)))
    if s.coupling is not None:
        criteria = s.coupling.screen.criteria
        rules.append(("Cross-coupling", f"{criteria.describe()} ({criteria.label})"))
    sec.blocks.append({"kind": "rules", "items": rules})
    return sec


def _model(review):
    rotor = review.rotor
    sec = Section("model", "The model")
    sec.figure("layout", "layout", (rotor,), "Side view of the model: shaft sections, disks, bearings "
               "and seals at their stations.")
    sec.table("Mass properties and mesh", mt.MASS_COLUMNS,
              mt.mass_rows(review.mass, rotor, review.mesh),
              caption="Rigid-body sums over the sections (uniform tubes; added mass along "
                      "the axis, translational inertia only, as the model carries it) and "
                      "the disks.")
    sec.text(review.mesh.describe())
    sec.table("Shaft sections", mt.SECTION_COLUMNS, mt.section_rows(rotor))
    if rotor.disks:
        sec.table("Disks", mt.DISK_COLUMNS, mt.disk_rows(rotor))
    if review.bearings:
        speed = rotor.operating.max_speed
        sec.table("Bearings and seals", mt.BEARING_MODEL_COLUMNS,
                  mt.bearing_rows(review.bearings, speed), mt.bearing_model_caption(speed))
    if rotor.probes:
        sec.table("Probes", mt.PROBE_COLUMNS, mt.probe_rows(rotor))
    if rotor.clearances:
        sec.table("Clearances", mt.CLEARANCE_COLUMNS, mt.clearance_rows(rotor))
    return sec


def _statics(review):
    sec = Section("statics", "Statics and bearing loads")
    st = review.statics
    if st is None:
        sec.text("The rotor has no journal bearing: no static load to share.")
        return sec
    sec.table(captions.reactions_title(review.rotor.name, st), tb.STATIC_REACTION_COLUMNS,
              st.rows, captions.reactions_caption(st))
    if st.films:
        sec.table("Journals computed from their geometry: film state under the load",
                  tb.STATIC_FILM_COLUMNS, st.film_rows, captions.STATIC_FILM_CAPTION)
    sec.text(st.summary())
    sec.figure("statics", "own", (st,), "The shaft's static deflection under its weight and steady loads, "
               "with the load each journal carries.")
    return sec


def _bearings(review):
    sec = Section("bearings", "Bearing and seal coefficients against speed")
    if not review.bearings:
        sec.text("The rotor has no bearings or seals.")
    for i, c in enumerate(review.bearings):
        sec.figure(f"bearing{i}", "own", (c,), f"{c.role} {c.name} at station {c.station}, "
                   f"from {'its geometry' if c.source == 'geometry' else 'a table'}: "
                   f"{c.description}")
        sec.table(f"{c.name}: coefficients", tb.BEARING_COEFFICIENT_COLUMNS,
                  c.coefficient_rows)
        if c.record is not None:
            sec.table(f"{c.name}: film state under its static load", tb.FILM_STATE_COLUMNS,
                      c.film_rows, captions.film_record_caption(c.record))
            sec.items([str(n) for n in c.record.notes], "notes")
        if c.pads is not None:
            sec.table(f"{c.name}: the pads at {to_rpm(c.pads.speed):.0f} rpm", tb.PAD_COLUMNS,
                      c.pad_rows, captions.PAD_CAPTION)
            sec.table(f"{c.name}: coefficients reduced at each whirl frequency",
                      tb.WHIRL_COLUMNS, c.whirl_rows, captions.WHIRL_CAPTION)
    return sec


def _map(review):
    from ..analysis.stiffness_study import CROSSINGS_CAPTION, ENDS_CAPTION
    sec = Section("critical-speed-map", "Undamped critical-speed map")
    study = review.stiffness
    if study is None:
        sec.text("The rotor has no journal bearing: no map against bearing stiffness.")
        return sec
    cmap, op = study.map, review.rotor.operating
    sec.figure("map", "own", (study,), f"Undamped synchronous critical speeds ({cmap.whirl} whirl) "
               f"against an isotropic support stiffness, "
               f"{cmap.stiffness[0]:.2e}-{cmap.stiffness[-1]:.2e} N/m, with the bearings' "
               "direct stiffness against speed. Undamped: no margin is judged on it.")
    if cmap.crossings:
        sec.table("Crossings of the bearings' curves with the map", tb.crossing_columns(op),
                  cmap.crossings, CROSSINGS_CAPTION)
    sec.table("The map's ends", tb.map_end_columns(cmap), range(cmap.speeds.shape[1]),
              ENDS_CAPTION)
    sec.items(study.notes, "notes")
    return sec


def _shapes(review):
    rotor = review.rotor
    sec = Section("mode-shapes", "Mode shapes at the critical speeds")
    if not review.modes:
        sec.text("No critical speed in the sweep.")
    named = "; ".join(f"{b.role} {b.name or i} at station {b.station}"
                      for i, b in enumerate(rotor.bearings))
    for k, (crit, modes) in enumerate(zip(review.screening.criticals, review.modes), 1):
        sec.picture(_shape_picture(k, crit, modes, rotor),
                    f"Critical speed {k}: {captions.critical_text(crit)}, order "
                    f"{crit.order:g}. Supports: {named or 'none'}.")
    return sec


def _whirl_map(review):
    s = review.screening
    sec = Section("whirl-speed-map", "Whirl-speed map (Campbell diagram)")
    sec.picture(_whirl_picture(s), "Damped natural frequencies against speed, coloured by "
                "log decrement, with the excitation lines and the critical speeds marked by "
                f"their margin verdict. {s.margins.caption()} {CAUTION}")
    return sec


def _margins(review):
    s = review.screening
    table = s.margins
    sec = Section("margins", "Critical speeds and separation margins")
    if table.rows:
        sec.table(f"Critical speeds, operating range {_range_text(table.operating)}",
                  tb.margin_columns(table), table.rows, table.caption())
    else:
        sec.text(f"No critical speed found up to {to_rpm(table.verified_above_to):.0f} rpm.")
    sec.items(table.notes, "notes")
    sec.items([gap.text for gap in s.gaps], "gaps")
    sec.blocks.append({"kind": "verdict", "verdict": "pass" if table.passed else "fail",
                       "text": "every separation margin met" if table.passed
                       else "a separation margin FAILED"})
    return sec


def _response(review):
    from ..analysis.response import limits_caption
    from ..standards import RESIDUAL_RULE_TEXT
    rotor, resp = review.rotor, review.screening.response
    sec = Section("response", "Unbalance response")
    if resp is None:
        sec.text("The rotor file has no unbalance case: no response was computed, and the "
                 "margins are judged on the log-decrement estimate of the amplification factor.")
        return sec
    sec.table("Unbalance applied", tb.UNBALANCE_COLUMNS, tb.unbalance_rows(rotor),
              f"Residual: {RESIDUAL_RULE_TEXT}.")
    sec.table("Response peaks", tb.PEAK_COLUMNS, resp.peaks,
              "AF = peak speed / half-power bandwidth (0.707 of the peak).")
    if resp.vibration or resp.clearance:
        sec.table("Vibration (operating range) and clearance (up to trip)", tb.LIMIT_COLUMNS,
                  resp.vibration + resp.clearance, limits_caption(rotor))
    if not resp.steady:
        sec.items(["a mode is unstable at " + ", ".join(
            f"{to_rpm(lo):.0f}-{to_rpm(hi):.0f} rpm" for lo, hi in resp.unstable_ranges)
            + ": the response there has no steady state and its limits cannot be judged"],
            "gaps")
    for i, name in enumerate(resp.cases):
        bode, polar, clearance = _response_pictures(resp, rotor, i)
        sec.picture(bode, f"Case {name}: amplitude and phase at every probe, peaks with "
                    f"their amplification factors. {CAUTION}")
        sec.picture(polar, f"Case {name}: the same response as polar plots (amplitude and "
                    "phase lag, speed along each curve).")
        if clearance is not None:
            sec.picture(clearance, f"Case {name}: the largest orbit at every station from "
                        "the lowest analysed speed up to trip against the clearances. "
                        f"{limits_caption(rotor)} {CAUTION}")
    return sec


def _stability(review):
    s = review.screening
    sec = Section("stability", "Stability")
    stab = s.stability
    if stab is not None:
        sec.table(f"Stability from the minimum speed up to trip: "
                  f"{to_rpm(stab.judged_range[0]):.0f}-{to_rpm(stab.judged_range[1]):.0f} rpm",
                  tb.STABILITY_COLUMNS, stab.branches, stab.caption())
        from ..analysis.stability import describe_branch
        sec.items([describe_branch(m) for m in stab.failing], "gaps")
        sec.blocks.append({"kind": "verdict", "verdict": "pass" if stab.passed else "fail",
                           "text": "every mode stable enough up to trip" if stab.passed
                           else "stability FAILED"})
    coupling = review.coupling
    if coupling is None:
        sec.text("The rotor file asks for no cross-coupling screen ([coupling_screen]).")
        return sec
    screen = coupling.screen
    if review.rotor.sources:
        sec.table("Destabilising sources of the rotor file (at the maximum continuous speed)",
                  tb.source_columns(screen.speed), review.rotor.sources)
    sec.figure("coupling", "coupling", (screen,), f"Cross-coupling screen: "
               f"{screen.verdict}. {screen.summary()} {CAUTION}")
    sec.table("First forward mode against the applied cross-coupling",
              tb.COUPLING_STEP_COLUMNS, screen.some_rows(4), "Every fourth step shown.")
    if coupling.sources is not None:
        check = coupling.sources
        sec.table(f"Forward modes with every source applied (need log dec "
                  f"{check.min_log_dec:g})",
                  tb.SOURCES_OWN_COLUMNS if check.at_own_frequency
                  else tb.SOURCES_CHECK_COLUMNS, check.rows,
                  f"Check with every source applied: {check.verdict}. {check.summary()}")
    sec.items(coupling.notes, "notes")
    if s.coupling is None:
        sec.text("This screen is informational: the rotor file keeps it out of the overall "
                 "verdict (in_check = false).")
    return sec


def _variants(review):
    sec = Section("variants", "What-if variants")
    comparison = review.comparison
    if comparison is None:
        sec.text("No variants file was given (--variants).")
        return sec
    from ..analysis.whatif import MATCH_CAPTION
    columns, rows, caption = captions.variant_summary(comparison, review.variants)
    sec.table(f"{review.rotor.name}: variants", columns, rows, caption)
    sec.table(captions.variants_title(review.rotor.operating),
              tb.comparison_columns(comparison), comparison.rows, MATCH_CAPTION)
    sec.items(captions.comparison_notes(comparison), "notes")
    sec.figure("variants", "variants", (comparison, review.rotor.operating),
               f"Whirl-speed maps of the base and every variant. {CAUTION}")
    return sec


def _warnings(review):
    sec = Section("warnings", "Warnings")
    warnings = review.warnings
    if warnings:
        sec.items(warnings, "warnings")
    else:
        sec.text("No analysis gave a warning.")
    if review.screening.sweep.reduction is not None:
        sec.text(review.screening.sweep.reduction.describe())
    return sec
