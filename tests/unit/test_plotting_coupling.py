"""The cross-coupling screen's picture: what it draws, where, and in which words.

Two screens are computed on the cross-coupled Jeffcott rotor of
``tests/verification/test_coupling_screen.py`` (a disk with damping ``c`` on a light shaft),
whose threshold has the closed form ``q0 = c w_n`` and whose log decrement is the forward
root of ``m s^2 + c s + k - i q = 0``: D. Childs, Turbomachinery Rotordynamics, Wiley 1993,
chapter 1 (from memory, as that file cites it).  Two more are built by hand (no crossing in
the sweep; no damping even without cross-coupling), so the file runs in a few seconds.
"""

import dataclasses
import math

import matplotlib

matplotlib.use("Agg")

import numpy as np
import pytest
from matplotlib.backends.backend_agg import FigureCanvasAgg
from matplotlib.figure import Figure

import rotorcalc.plotting
from rotorcalc.analysis.coupling_screen import cross_coupling_screen
from rotorcalc.plotting import CouplingScreenArtists, plot_coupling_screen, save
from rotorcalc.plotting._artists import Artists
from tests.verification.test_coupling_screen import Q0, closed_form_log_dec, jeffcott

#: Childs 1993 ch. 1: the closed form holds to a few parts in 1e6 on this model (the
#: shaft's mass and its discretisation), as the verification file finds.
CLOSED_FORM_TOL = 1e-4
#: N/m per klbf/in from the exact definitions 1 lbf = 4.4482216152605 N and
#: 1 in = 0.0254 m (B. N. Taylor, A. Thompson, NIST Special Publication 811, 2008,
#: appendix B.8).
N_PER_KLBF_IN = 4.4482216152605e3 / 0.0254
#: rad/s per rpm by the definition of the revolution (2 pi rad) and the minute (60 s).
RAD_S_PER_RPM = 2.0 * math.pi / 60.0


@pytest.fixture(scope="module")
def passing():
    """Expected q0 / 3.7: threshold 3.7 x expected, log decrement 0.23 there (Childs)."""
    return cross_coupling_screen(jeffcott(), expected=Q0 / 3.7, placement="mid-span")


@pytest.fixture(scope="module")
def failing():
    """Expected 0.9 q0: threshold 1.11 x expected, log decrement 0.03 there (Childs)."""
    return cross_coupling_screen(jeffcott(), expected=0.9 * Q0, placement="mid-span")


def _by_hand(screen, log_dec, threshold, expected=1.0e6):
    """``screen`` (its speed, placement and criteria) swept over 0 to 10 x ``expected``
    with the log decrements given (a function of the applied amount)."""
    applied = np.linspace(0.0, 10.0 * expected, 41)
    return dataclasses.replace(screen, expected=expected, applied=applied,
                               log_dec=log_dec(applied), threshold=threshold,
                               frequency=np.full(applied.shape, 400.0))


@pytest.fixture(scope="module")
def no_crossing(passing):
    """Log decrement 0.4 falling to 0.3 at the sweep's end: no threshold in the sweep."""
    return _by_hand(passing, lambda q: 0.4 - 1e-8 * q, None)


@pytest.fixture(scope="module")
def undamped(passing):
    """Log decrement -0.05 without cross-coupling, falling from there: threshold 0."""
    return _by_hand(passing, lambda q: -0.05 - 2e-8 * q, 0.0)


def _drawn(artists):
    """Render the figure (so label extents are known); the renderer."""
    canvas = FigureCanvasAgg(artists.figure)
    canvas.draw()
    return canvas.get_renderer()


# --- the figure and the record ------------------------------------------------------------

def test_draws_on_a_new_figure_and_returns_a_frozen_record(passing):
    art = plot_coupling_screen(passing)
    assert isinstance(art, CouplingScreenArtists) and isinstance(art, Artists)
    assert isinstance(art.figure, Figure) and art.ax in art.figure.axes
    assert art.legend is not None
    with pytest.raises(dataclasses.FrozenInstanceError):
        art.curve = None
    np.testing.assert_array_equal(art.curve.get_xdata(), passing.applied)
    np.testing.assert_array_equal(art.curve.get_ydata(), passing.log_dec)


def test_draws_on_the_axes_given_with_the_key_inside_them(failing):
    fig = Figure(figsize=(9.0, 6.0), dpi=100)
    ax = fig.add_subplot(1, 1, 1)
    art = plot_coupling_screen(failing, ax=ax)
    assert art.ax is ax and art.figure is fig and len(fig.axes) == 1
    renderer = _drawn(art)
    inside = ax.get_window_extent(renderer).padded(1.0)
    legend = art.legend.get_window_extent(renderer)
    assert inside.contains(legend.x0, legend.y0) and inside.contains(legend.x1, legend.y1)


def test_exported_from_the_plotting_package():
    assert "plot_coupling_screen" in rotorcalc.plotting.PICTURES
    for name in ("plot_coupling_screen", "CouplingScreenArtists"):
        assert name in rotorcalc.plotting.__all__
        assert getattr(rotorcalc.plotting, name).__module__ == "rotorcalc.plotting.couplingplot"
    # a new picture has no 0.1 name without plot_
    with pytest.raises(AttributeError):
        rotorcalc.plotting.coupling_screen


# --- where things are -----------------------------------------------------------------------

def test_threshold_marker_sits_at_the_threshold_of_the_closed_form(passing):
    """Childs 1993 ch. 1: the cross-coupled Jeffcott rotor loses its damping at q0 = c w_n."""
    art = plot_coupling_screen(passing)
    x, y = art.threshold_marker.get_data()
    assert x[0] == passing.threshold and y[0] == 0.0
    assert abs(x[0] / Q0 - 1.0) < CLOSED_FORM_TOL
    # the label gives it in the axis unit (kN/m: the sweep tops out under 1 MN/m), in
    # klbf/in (NIST SP 811) and as 3.7 x expected
    text = art.threshold_label.get_text()
    assert art.unit == "kN/m"
    assert f"threshold {Q0 / 1e3:.3g} kN/m ({Q0 / N_PER_KLBF_IN:.3g} klbf/in)" in text
    assert "= 3.7 \u00d7 expected" in text


def test_expected_point_at_the_closed_form_log_decrement(passing):
    """Childs 1993 ch. 1: the forward root of m s^2 + c s + k - i q = 0 at q = q0 / 3.7."""
    art = plot_coupling_screen(passing)
    x, y = art.expected_point.get_data()
    assert x[0] == passing.expected
    assert abs(y[0] / closed_form_log_dec(Q0 / 3.7) - 1.0) < CLOSED_FORM_TOL
    assert art.expected_line.get_xdata()[0] == passing.expected
    assert f"\u03b4 {y[0]:.3g}" in art.expected_label.get_text()


def test_criteria_lines_and_the_shaded_stretch(passing):
    """The required minimum 0.1 and threshold at least 2 x expected (common practice)."""
    art = plot_coupling_screen(passing)
    assert art.criteria_line.get_ydata()[0] == pytest.approx(0.1)
    assert art.criteria_label.get_text() == "required minimum \u03b4 0.1"
    assert art.ratio_line.get_xdata()[0] == pytest.approx(2.0 * passing.expected)
    assert art.ratio_label.get_text() == "2 \u00d7 expected"
    band = art.criteria_band
    assert band.get_x() == 0.0 and band.get_width() == pytest.approx(2.0 * passing.expected)
    assert band.get_y() + band.get_height() == pytest.approx(0.0)
    assert art.zero_line.get_ydata()[0] == 0.0


def test_axes_units_title_and_klbf_in_on_top(passing):
    art = plot_coupling_screen(passing)
    _drawn(art)
    assert art.ax.get_xlabel() == "Applied cross-coupled stiffness (kN/m)"
    top = art.stiffness_axis.get_xlim()[1]
    assert abs(top / (passing.applied[-1] / N_PER_KLBF_IN) - 1.0) < 1e-12   # NIST SP 811
    # 300 rad/s is 2864.8 rpm (2 pi rad a revolution)
    assert f"{300.0 / RAD_S_PER_RPM:.0f} rpm" in art.ax.get_title(loc="left")


def test_labels_do_not_overlap(passing, failing, no_crossing, undamped):
    for screen in (passing, failing, no_crossing, undamped):
        for ax in (None, Figure(figsize=(9.0, 6.0), dpi=100).add_subplot(1, 1, 1)):
            art = plot_coupling_screen(screen, ax=ax)
            renderer = _drawn(art)
            texts = [t for t in (art.expected_label, art.threshold_label, art.criteria_label,
                                 art.ratio_label, art.verdict_text) if t is not None]
            boxes = [t.get_window_extent(renderer) for t in texts]
            if ax is not None:
                boxes.append(art.legend.get_window_extent(renderer))
            for i, a in enumerate(boxes):
                for b in boxes[i + 1:]:
                    assert not a.overlaps(b), (screen.threshold, a, b)


# --- the words ------------------------------------------------------------------------------

def test_verdict_names_pass_with_both_criteria_met(passing):
    """Log decrement 0.23 >= 0.1 and threshold 3.7 >= 2 x expected (common practice)."""
    text = plot_coupling_screen(passing).verdict_text.get_text()
    assert passing.verdict == "pass" and text.startswith("Passes the screen")
    assert text.count("required: met") == 2 and "not met" not in text


def test_verdict_names_fail_with_both_criteria_not_met(failing):
    """Childs 1993 ch. 1: at 0.9 q0 the log decrement is 0.03 (< 0.1) and the threshold
    1.11 x expected (< 2); the criteria are common practice."""
    assert closed_form_log_dec(0.9 * Q0) < 0.1
    text = plot_coupling_screen(failing).verdict_text.get_text()
    assert failing.verdict == "fail" and text.startswith("Fails the screen")
    assert text.count("required: not met") == 2
    assert f"threshold {1 / 0.9:.3g} \u00d7 expected" in text


def test_caution_and_the_criteria_source_are_on_the_picture(passing):
    text = " ".join(plot_coupling_screen(passing).caution_text.get_text().split())
    assert text.startswith("Screening result only: confirm against the applicable standard")
    assert "licensed engineer's review" in text
    assert "common practice" in text and "from memory" in text


def test_no_threshold_within_the_sweep_says_so(no_crossing):
    for ax in (None, Figure().add_subplot(1, 1, 1)):
        art = plot_coupling_screen(no_crossing, ax=ax)
        _drawn(art)
        assert art.threshold_marker is None
        assert art.threshold_label.get_text() == ("\u03b4 stays above 0 up to 10 MN/m:\n"
                                                  "no threshold within the sweep")
        verdict = art.verdict_text.get_text()
        assert verdict.startswith("Passes") and "no threshold up to 10 \u00d7 expected" in verdict
        assert "threshold: \u03b4 reaches 0" not in [t.get_text() for t in art.legend.get_texts()]


def test_threshold_zero_says_the_mode_is_undamped_already(undamped):
    for ax in (None, Figure().add_subplot(1, 1, 1)):
        art = plot_coupling_screen(undamped, ax=ax)
        _drawn(art)
        x, y = art.threshold_marker.get_data()
        assert (x[0], y[0]) == (0.0, 0.0)
        assert art.threshold_label.get_text() == ("threshold 0: \u03b4 is \u22120.05\n"
                                                  "already without cross-coupling")
        verdict = art.verdict_text.get_text()
        assert verdict.startswith("Fails") and "threshold 0: \u03b4 \u2264 0" in verdict


def test_saves_as_png_and_svg(tmp_path, passing):
    art = plot_coupling_screen(passing)
    png = save(art.figure, tmp_path / "screen.png")
    svg = save(art.figure, tmp_path / "screen.svg")
    assert png.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"
    assert b"<svg" in svg.read_bytes()[:2000]


def test_a_sweep_past_the_least_threshold_only_has_no_ratio_line(passing):
    """A ratio asked beyond the sweep (12 x expected over a sweep to 10 x): no dotted line,
    the shaded stretch runs to the sweep's end."""
    strict = dataclasses.replace(passing,
                                 criteria=dataclasses.replace(passing.criteria, min_ratio=12.0))
    art = plot_coupling_screen(strict)
    assert art.ratio_line is None and art.ratio_label is None
    assert art.criteria_band.get_width() == pytest.approx(passing.applied[-1])
    assert "at least 12 \u00d7 required: not met" in art.verdict_text.get_text()
