"""The design-review report: one self-contained HTML file (pictures inline as SVG, styles
inline, no script, font or link to fetch) made from Jinja2 templates fed by a
:class:`~rotorcalc.analysis.review.Review`.

``render`` returns the page; :mod:`rotorcalc.report.browser` prints it to PDF with a
headless browser when one is installed.
"""

from __future__ import annotations

import datetime as _dt
import hashlib
import json
from dataclasses import dataclass
from pathlib import Path

from ..vocabulary import CAUTION

TEMPLATES = Path(__file__).with_name("templates")
#: Paper sizes the print stylesheet knows (CSS page size names).
PAPERS = ("A4", "letter")


@dataclass(frozen=True)
class InputFile:
    """An input file echoed in the appendix: its path as given, text and SHA-256."""

    path: str
    text: str
    sha256: str

    @classmethod
    def read(cls, path):
        data = Path(path).read_bytes()
        return cls(str(path), data.decode("utf-8-sig", errors="replace"),
                   hashlib.sha256(data).hexdigest())


@dataclass(frozen=True)
class Provenance:
    """What the appendix records: the input files, the tool's version, when and by which
    command line the report was made."""

    inputs: tuple
    version: str
    created: str
    command: str

    @classmethod
    def now(cls, inputs, command):
        from .. import __version__
        stamp = _dt.datetime.now(_dt.timezone.utc).strftime("%Y-%m-%d %H:%M UTC")
        return cls(tuple(inputs), __version__, stamp, command)


def _environment():
    import jinja2
    return jinja2.Environment(loader=jinja2.FileSystemLoader(TEMPLATES),
                              autoescape=jinja2.select_autoescape(("html", "j2")),
                              undefined=jinja2.StrictUndefined, trim_blocks=True,
                              lstrip_blocks=True)


def render(review, provenance: Provenance, paper="A4", drawn=None, workers=1) -> str:
    """The report of ``review`` as one HTML document (text).

    ``drawn``: pictures already drawn (``{key: svg}``, :mod:`rotorcalc.report.pictures`);
    the others are drawn here on up to ``workers`` processes.
    """
    import markupsafe
    from .content import sections
    from .pictures import draw_all
    if paper not in PAPERS:
        raise ValueError(f"paper must be one of {PAPERS}")
    built = sections(review)
    drawn = dict(drawn or {})
    drawn.update(draw_all([p for sec in built for p in sec.pictures if p.key not in drawn],
                          workers))
    for section in built:       # the drawings are made by matplotlib: trusted markup
        for block in section.blocks:
            if block["kind"] == "figure":
                block["svg"] = markupsafe.Markup(drawn[block["picture"].key])
    css = (TEMPLATES / "review.css").read_text(encoding="utf-8")
    css = css.replace("PAPER_SIZE", paper).replace("CAUTION_TEXT", json.dumps(CAUTION))
    return _environment().get_template("review.html.j2").render(
        rotor=review.rotor, verdict=review.verdict, sections=built, provenance=provenance,
        caution=CAUTION, css=markupsafe.Markup(css))


def _side_with_pictures(rotor):
    from ..analysis.review import side_analyses
    from .content import side_pictures
    from .pictures import draw_all
    side = side_analyses(rotor)
    return side, draw_all(side_pictures(rotor, *side))


def _screen_part(rotor, progress):
    """The screening without the cross-coupling study (made beside it): the sweep,
    stability, criticals, response and margins."""
    import dataclasses
    from ..analysis.screening import screen
    if rotor.coupling_rule is None or not rotor.coupling_rule.in_check:
        return screen(rotor, progress=progress)
    return screen(dataclasses.replace(rotor, coupling_rule=None), progress=progress)


def write_review(rotor, provenance: Provenance, variants=(), workers=2, paper="A4",
                 progress=None):
    """(Review, HTML text): every analysis once, the pictures drawn on ``workers``
    processes.  With two or more, the rotor at rest, the bearings, the map and the
    cross-coupling study (and their pictures) are made in a worker while this process
    screens the rotor and draws the screening's pictures; the page is the same for any
    count."""
    from ..analysis.review import critical_modes, finish_review, side_analyses
    from ..analysis.screening import screen
    drawn = {}
    if workers > 1:
        import dataclasses
        from ..workers import worker_pool
        from .content import screening_pictures
        with worker_pool(1) as pool:
            future = pool.submit(_side_with_pictures, rotor)
            part = dataclasses.replace(_screen_part(rotor, progress), rotor=rotor)
            # the screening's own pictures here while the worker finishes the side
            drawn = {p.key: p.svg()
                     for p in screening_pictures(rotor, part, critical_modes(part))}
            side, side_drawn = future.result()
        drawn.update(side_drawn)
        # the verdict with the file's cross-coupling screen, as screen() gives it
        result = dataclasses.replace(part, coupling=side[3]) if (
            rotor.coupling_rule is not None and rotor.coupling_rule.in_check) else part
    else:
        side = side_analyses(rotor)
        result = screen(rotor, progress=progress, coupling=side[3])
    review = finish_review(rotor, result, side, variants, workers)
    return review, render(review, provenance, paper, drawn, workers)
