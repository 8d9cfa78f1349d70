"""The design-review report: one self-contained HTML file per rotor, valid HTML, no external
reference, every section, the terminal's own table cells, the same page for any number of
processes, and (when a headless Chromium is installed) opened in the browser with no
console error, every picture drawn and a screenshot of the summary page.

References: the HTML standard's parsing rules as html5lib implements them (strict mode
raises on every parse error); Chromium's own rendering for the browser test.
"""

import html
import json
import re
from html.parser import HTMLParser
from pathlib import Path

import pytest
from markupsafe import escape
from typer.testing import CliRunner

from rotorcalc.cli import app
from rotorcalc.report import InputFile, Provenance, write_review
from rotorcalc.report.browser import find_browser, loaded_dom, screenshot
from tests.conftest import CASES, ROOT

runner = CliRunner()

#: The sections in the order a reviewer reads them (issue: summary first, appendix last).
SECTIONS = ["summary", "model", "statics", "bearings", "critical-speed-map", "mode-shapes",
            "whirl-speed-map", "margins", "response", "stability", "variants", "warnings",
            "appendix"]
#: A fixed stamp, so two reports of one rotor can be compared byte for byte.
STAMP = "2026-01-01 00:00 UTC"
_REPORTS = {}


#: The cases whose reports carry their variants (every case has a variants file; screening
#: all of them would double the tests' time: two show the section filled, the rest that it
#: says no variants were given).
WITH_VARIANTS = ("overhung_fan", "compressor")


def _cases():
    """Every bundled case, its report's tests grouped (one process makes and reads it when
    the suite runs on several: ``--dist loadgroup``)."""
    return [pytest.param(case, id=case.stem, marks=pytest.mark.xdist_group(_group(case)))
            for case in CASES]


def _group(case):
    return f"report-{Path(case).stem}"


def _variants_of(case):
    path = case.with_name(f"{case.stem}_variants.toml")
    return path if case.stem in WITH_VARIANTS and path.exists() else None


def report_of(case, workers=2):
    """(HTML text, Review) of a bundled case, with its variants file for
    :data:`WITH_VARIANTS`; made once per test session and case."""
    key = (case, workers)
    if key not in _REPORTS:
        from rotorcalc.reader import read_rotor
        from rotorcalc.variants import read_variants
        rotor, variants, inputs = read_rotor(case), (), [InputFile.read(case)]
        extra = _variants_of(case)
        if extra is not None:
            _, rotor, variants = read_variants(extra)
            inputs.append(InputFile.read(extra))
        provenance = Provenance(tuple(inputs), "test", STAMP, f"rotorcalc review {case.name}")
        review, text = write_review(rotor, provenance, variants, workers=workers)
        _REPORTS[key] = (text, review)
    return _REPORTS[key]


class _Ids(HTMLParser):
    """Every id, href, src and tag name of a page."""

    def __init__(self):
        super().__init__()
        self.ids, self.links, self.tags = [], [], set()

    def handle_starttag(self, tag, attrs):
        self.tags.add(tag)
        for name, value in attrs:
            if name == "id":
                self.ids.append(value)
            if name in ("href", "src", "xlink:href", "action", "srcset", "poster", "data"):
                self.links.append((tag, name, value))


def _parse(text):
    parser = _Ids()
    parser.feed(text)
    return parser


@pytest.mark.slow
@pytest.mark.parametrize("case", _cases())
def test_each_bundled_case_gives_a_valid_self_contained_report(case):
    """html5lib in strict mode (module docstring) parses it without one error; every id is
    unique (several pictures share one page); every link is to the page itself and no
    resource, script, stylesheet, font or frame is fetched."""
    import html5lib
    text, review = report_of(case)
    html5lib.HTMLParser(strict=True, namespaceHTMLElements=False).parse(text)
    parsed = _parse(text)
    duplicates = {i for i in parsed.ids if parsed.ids.count(i) > 1}
    assert not duplicates
    assert all(value.startswith("#") for _, _, value in parsed.links), parsed.links[:5]
    assert not parsed.tags & {"script", "link", "iframe", "object", "embed", "img", "base"}
    for reference in re.findall(r"url\(\s*['\"]?([^'\")]*)", text):
        assert reference.startswith("#"), reference
    assert "@import" not in text and "@font-face" not in text
    # every section, in the reviewer's order, each carrying the screening caution
    assert re.findall(r'<section id="([^"]+)"', text) == SECTIONS
    caution = escape(review.screening.margins.to_dict()["caution"])
    for body in text.split("<section ")[1:]:
        assert caution in body
    # the appendix echoes the input verbatim with its hash
    assert escape(case.read_text(encoding="utf-8")) in text
    assert InputFile.read(case).sha256 in text


@pytest.mark.slow
@pytest.mark.xdist_group(_group("feed_pump"))
def test_the_tables_are_the_terminal_s_own_cells_and_verdicts_name_their_rules():
    """The margin table's cells are :class:`~rotorcalc.tables.Column` texts of the same
    rows the terminal prints; the summary lists the rules with their labels."""
    from rotorcalc.tables import margin_columns
    text, review = report_of(ROOT / "cases" / "feed_pump.toml")
    table = review.screening.margins
    numeric = ' class="num"'
    for row in table.rows:
        cells = "".join(f"<td{numeric if c.fmt != '{}' else ''}>{escape(c.text(row))}</td>"
                        for c in margin_columns(table))
        assert cells in text
    rule = table.rule
    assert escape(f"{rule.describe()} ({rule.label})") in text
    assert escape(table.caption()) in text


@pytest.mark.slow
@pytest.mark.xdist_group(_group("hp_compressor"))
def test_a_failing_rotor_lists_every_failing_item_on_the_summary_page():
    """The bundled rotor meant to fail (its cross-coupling screen): the summary says FAIL
    and lists every failing item with its rule."""
    from rotorcalc.analysis.review import findings
    text, review = report_of(ROOT / "cases" / "hp_compressor.toml")
    summary = text.split('<section id="model"')[0]
    found = findings(review.screening)
    assert review.verdict == "fail" and found
    assert '<p class="badge verdict-fail">FAIL</p>' in summary
    for f in found:
        assert escape(f.text) in summary
        assert escape(f.rule) in summary and escape(f.label) in summary


@pytest.mark.slow
@pytest.mark.xdist_group(_group("hp_compressor"))
def test_the_page_is_the_same_for_any_number_of_processes():
    """The high-pressure compressor (its cross-coupling screen, in the check, made beside
    the sweep with two processes and inside the screening with one)."""
    case = ROOT / "cases" / "hp_compressor.toml"
    one, _ = report_of(case, workers=1)
    two, _ = report_of(case, workers=2)
    assert one == two


def test_review_command_writes_the_report_and_says_the_verdict(tmp_path):
    out = tmp_path / "fan.html"
    result = runner.invoke(app, ["review", str(ROOT / "cases" / "overhung_fan.toml"), "-o",
                                 str(out), "--jobs", "1"])
    assert result.exit_code == 0, result.output
    assert out.read_text(encoding="utf-8").startswith("<!DOCTYPE html>")
    assert "wrote" in result.output and "Screening result only" in result.output


@pytest.mark.parametrize("args, key", [
    (["--paper", "A3"], "--paper"),
    (["--variants", str(ROOT / "cases" / "feed_pump_variants.toml")], "--variants"),
])
def test_review_command_refuses_bad_options(tmp_path, args, key):
    result = runner.invoke(app, ["review", str(ROOT / "cases" / "overhung_fan.toml"), "-o",
                                 str(tmp_path / "r.html"), *args])
    assert result.exit_code == 2
    assert key in result.output
    assert not (tmp_path / "r.html").exists()


def test_review_command_wants_an_html_file(tmp_path):
    result = runner.invoke(app, ["review", str(ROOT / "cases" / "overhung_fan.toml"), "-o",
                                 str(tmp_path / "r.pdf")])
    assert result.exit_code == 2 and "--out" in result.output


def test_a_pdf_without_a_browser_is_said_and_the_html_still_written(tmp_path, monkeypatch):
    monkeypatch.setenv("PATH", str(tmp_path))          # no browser on PATH
    monkeypatch.delenv("ROTORCALC_BROWSER", raising=False)
    out = tmp_path / "fan.html"
    result = runner.invoke(app, ["review", str(ROOT / "cases" / "overhung_fan.toml"), "-o",
                                 str(out), "--pdf", str(tmp_path / "fan.pdf"), "--jobs", "1"])
    assert result.exit_code == 4
    assert "no PDF" in result.output and "no headless browser" in result.output
    assert out.exists() and not (tmp_path / "fan.pdf").exists()


# --- in a real browser -----------------------------------------------------------------

#: Put at the top of a copy of the page: records every error and console message, and after
#: loading writes what it found into the body (read back from the browser's DOM).
PROBE = """<script>
window.__found = [];
window.addEventListener('error', e => window.__found.push('error: ' + (e.message ||
  (e.target && e.target.tagName) || 'resource')), true);
for (const level of ['error', 'warn']) {
  const original = console[level];
  console[level] = (...args) => { window.__found.push(level + ': ' + args.join(' '));
                                  original.apply(console, args); };
}
window.addEventListener('load', () => {
  const pictures = [...document.querySelectorAll('figure.picture svg')].map(svg => {
    const box = svg.getBoundingClientRect();
    return [box.width, box.height, svg.querySelectorAll('path, use').length];
  });
  const images = [...document.images].map(i => i.complete && i.naturalWidth > 0);
  const sections = [...document.querySelectorAll('section[id]')].map(s => s.id);
  const result = {errors: window.__found, pictures, images, sections};
  document.body.setAttribute('data-probe', JSON.stringify(result));
});
</script>
"""


def _browser_or_skip():
    if find_browser() is None:
        pytest.skip("no headless browser found (Debian's 'chromium' package, or "
                    "ROTORCALC_BROWSER): the report was not opened in a browser here; "
                    ".ci/run installs one")


@pytest.mark.slow
@pytest.mark.parametrize("case", _cases())
def test_each_report_opens_in_a_browser_without_errors(case, tmp_path):
    """Headless Chromium loads the report: no console error or warning, no failed
    resource, every picture drawn with a size, every section there; a screenshot of the
    summary page is taken."""
    _browser_or_skip()
    text, review = report_of(case)
    page = tmp_path / "review.html"
    page.write_text(text.replace("<head>", "<head>\n" + PROBE, 1), encoding="utf-8")
    dom, log = loaded_dom(page)
    match = re.search(r'data-probe="([^"]*)"', dom)
    assert match, f"the page did not finish loading in the browser:\n{log[-2000:]}"
    probe = json.loads(html.unescape(match.group(1)))
    assert probe["errors"] == []
    assert not re.search(r"Uncaught|CONSOLE\(\d+\).*(error|Error)", log)
    assert probe["sections"] == SECTIONS
    assert all(ok for ok in probe["images"])
    figures = text.count('<figure class="picture">')
    assert len(probe["pictures"]) == figures > 0
    assert all(w > 100 and h > 50 and n > 0 for w, h, n in probe["pictures"]), probe["pictures"]
    shot = tmp_path / "summary.png"
    screenshot(tmp_path / "review.html", shot, 1280, 1600)
    import matplotlib.image
    pixels = matplotlib.image.imread(shot)
    assert pixels.shape[:2] == (1600, 1280)
    assert pixels[..., :3].std() > 0.05     # a page, not a blank screen


@pytest.mark.slow
def test_the_pdf_prints_from_the_browser(tmp_path):
    _browser_or_skip()
    out, pdf = tmp_path / "fan.html", tmp_path / "fan.pdf"
    result = runner.invoke(app, ["review", str(ROOT / "cases" / "overhung_fan.toml"), "-o",
                                 str(out), "--pdf", str(pdf), "--paper", "letter"])
    assert result.exit_code == 0, result.output
    data = pdf.read_bytes()
    assert data.startswith(b"%PDF")
    # one page per section at least (each section starts a page in print)
    assert len(re.findall(rb"/Type\s*/Page[^s]", data)) >= len(SECTIONS)
    assert b"/MediaBox [0 0 612 792]" in data     # letter: 8.5 x 11 in at 72 pt/in
