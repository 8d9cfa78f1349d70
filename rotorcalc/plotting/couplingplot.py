"""The cross-coupling screen: log decrement of the first forward mode over the applied
cross-coupled stiffness, with the expected amount, the threshold and the verdict.

It draws a :class:`rotorcalc.analysis.coupling_screen.CouplingScreen` as it is; the
arithmetic here is for drawing only (a unit for the stiffness axis, klbf/in along the
top, label places).  The verdict and the threshold come from the screen.
"""

from __future__ import annotations

import math
import textwrap
from dataclasses import dataclass

import numpy as np
from matplotlib.lines import Line2D
from matplotlib.patches import Patch, Rectangle
from matplotlib.ticker import FuncFormatter

from ..analysis.margins import CAUTION
from . import _labels as lb
from . import _style as st
from ._artists import Artists
from ._units import from_klbf_in, to_klbf_in, to_rpm

#: The curve, the lines and the marks.
CURVE = st.SERIES_COLOURS[0]
EXPECTED = st.SERIES_COLOURS[3]
REQUIRED = st.SERIES_COLOURS[1]
THRESHOLD = st.LOG_DEC_COLOURS[0]
#: Where the log decrement is not positive before the least threshold the criteria ask for.
SHORT_FILL = "#f6e0e2"
#: The verdict box: a pale tint of the verdict's colour behind ink text.
VERDICT_TINT = {"pass": "#e6f1e3", "fail": "#f9e1e1"}
#: The stiffness axis unit: the largest of these multiples of N/m under the sweep's top.
SI_MULTIPLES = ((1e9, "GN/m"), (1e6, "MN/m"), (1e3, "kN/m"), (1.0, "N/m"))
#: Room above the curve (a share of the log decrement's span) for the verdict box.
HEADROOM = 0.34


@dataclass(frozen=True)
class CouplingScreenArtists(Artists):
    """What :func:`plot_coupling_screen` drew (and ``figure``, ``legend`` as every picture).

    Attributes
    ----------
    ax, stiffness_axis, unit : Axes, SecondaryAxis, str
        Applied cross-coupled stiffness across (N/m in data, ticks in ``unit``, "MN/m"
        say; klbf/in along the top), the first forward mode's log decrement up.
    curve, zero_line : Line2D
        The log decrement at each amount of the sweep; zero, the stability limit.
    criteria_line, criteria_label : Line2D, Annotation
        The required minimum log decrement across the whole width, and its value.
    criteria_band : Rectangle or None
        Shaded below zero up to the least threshold the criteria ask for (``min_ratio``
        x expected, or the sweep's end): the curve reaching it fails the screen.
    ratio_line, ratio_label : Line2D, Annotation, or None
        That least threshold, dotted; None when it is zero or beyond the sweep.
    expected_line, expected_point, expected_label : Line2D, Line2D, Annotation
        The expected amount (full height), the log decrement there (filled in the colour
        of that criterion's verdict) and "expected 2 MN/m (11.4 klbf/in): δ 0.288".
    threshold_marker : Line2D or None
        On the zero line at the threshold (at zero when the mode is not positively damped
        even without cross-coupling); None when the sweep holds no threshold.
    threshold_label : Annotation
        The threshold in both units and threshold / expected, or in words why there is none.
    verdict_text, caution_text : Annotation
        The verdict and both criteria with their values, boxed inside the frame; the
        screening caution and the criteria's source below the axis label.
    """

    stiffness_axis: object = None
    unit: str = "N/m"
    curve: object = None
    zero_line: object = None
    criteria_line: object = None
    criteria_label: object = None
    criteria_band: object = None
    ratio_line: object = None
    ratio_label: object = None
    expected_line: object = None
    expected_point: object = None
    expected_label: object = None
    threshold_marker: object = None
    threshold_label: object = None
    verdict_text: object = None
    caution_text: object = None


@st.literal_text
def plot_coupling_screen(screen, *, ax=None):
    """Draw a cross-coupling screen: how the first forward mode's damping falls as the
    applied cross-coupled stiffness grows, at the maximum continuous speed.

    The curve is the log decrement at each amount of the sweep.  A vertical line marks
    the expected amount, with the log decrement there; a dashed line the required
    minimum log decrement; a diamond on the zero line the threshold (where the log
    decrement reaches zero), labelled with its value and threshold / expected.  Below
    zero, the stretch up to the least threshold the criteria ask for is shaded.  The
    verdict stands in a box in the frame, both criteria with their values in words,
    and the screening caution below the axis label.

    Parameters
    ----------
    screen : rotorcalc.analysis.coupling_screen.CouplingScreen
    ax : matplotlib.axes.Axes, optional
        Axes to draw on; a new figure is made when omitted (the key then stands right
        of the axes, else inside them).  Leave about 0.8 in below given axes for the
        axis label and the caution.

    Returns
    -------
    CouplingScreenArtists
    """
    fig, ax, created = st.axes_for(ax, figsize=(10.0, 6.3))
    if created:
        fig.subplots_adjust(left=0.08, right=0.68, bottom=0.16, top=0.84)
    st.style_axes(ax)
    q = np.asarray(screen.applied, dtype=float)
    d = np.asarray(screen.log_dec, dtype=float)
    scale, unit = next(((f, u) for f, u in SI_MULTIPLES if q[-1] >= f), SI_MULTIPLES[-1])
    _limits(ax, q, d, screen.criteria.min_log_dec)
    lines = _draw_lines(ax, screen)
    curve, = ax.plot(q, d, color=CURVE, linewidth=1.8, zorder=4, solid_capstyle="butt")
    marks = _draw_marks(ax, screen)
    stiffness_axis = _axis_texts(ax, screen, scale, unit)
    taken = [lb.line_boxes(ax, q, d, pad=2.0), []]     # the curve; marks and labels
    for mark in marks:
        if mark is not None:
            x, y = lb.points(ax, np.column_stack(mark.get_data())[0])
            taken[1].append((x - 5, y - 5, x + 5, y + 5))
    verdict = _verdict_box(ax, screen, taken)
    key = _key(screen, lines, curve)
    where = None if created else _key_corner(ax, key, taken)
    labels = _labels(ax, screen, scale, unit, taken, lines["ratio"])
    caution = _caution(ax, screen.criteria)
    legend = _legend(ax, key, where)
    return CouplingScreenArtists(
        figure=fig, ax=ax, legend=legend, stiffness_axis=stiffness_axis, unit=unit,
        curve=curve, zero_line=lines["zero"], criteria_line=lines["required"],
        criteria_label=labels["required"], criteria_band=lines["band"],
        ratio_line=lines["ratio"], ratio_label=labels["ratio"],
        expected_line=lines["expected"], expected_point=marks[0],
        expected_label=labels["expected"], threshold_marker=marks[1],
        threshold_label=labels["threshold"], verdict_text=verdict, caution_text=caution)


def _limits(ax, q, d, required):
    """Stiffness from zero to the sweep's top; log decrement over the curve, zero and the
    required minimum, with room above for the verdict."""
    ax.set_xlim(0.0, float(q[-1]) if q.size and q[-1] > 0 else 1.0)
    finite = d[np.isfinite(d)]
    lo = min([0.0] + ([float(finite.min())] if finite.size else []))
    hi = max([required] + ([float(finite.max())] if finite.size else []))
    span = hi - lo if hi > lo else 0.1
    ax.set_ylim(lo - 0.07 * span, hi + HEADROOM * span)


def _draw_lines(ax, screen):
    """The zero line, the required minimum, the shaded stretch, the expected amount and
    the least threshold: ``{name: artist}``."""
    out = {"zero": ax.axhline(0.0, color=st.INK, linewidth=0.9, zorder=3)}
    out["required"] = ax.axhline(screen.criteria.min_log_dec, color=REQUIRED, linewidth=1.1,
                                 linestyle=(0, (5.0, 2.5)), zorder=3.2)
    least = screen.criteria.min_ratio * screen.expected
    reach = min(least, float(screen.applied[-1]))
    out["band"] = None
    if reach > 0:
        bottom = ax.get_ylim()[0]
        out["band"] = Rectangle((0.0, bottom), reach, -bottom, facecolor=SHORT_FILL,
                                edgecolor="none", zorder=1)
        ax.add_patch(out["band"])
    out["ratio"] = None if not 0 < least <= reach else ax.axvline(
        least, color=st.MUTED, linewidth=1.0, linestyle=(0, (1.2, 1.8)), zorder=2.5)
    out["expected"] = ax.axvline(screen.expected, color=EXPECTED, linewidth=1.0, zorder=2.6)
    return out


def _draw_marks(ax, screen):
    """The log decrement at the expected amount, and the threshold on the zero line."""
    met = screen.log_dec_expected >= screen.criteria.min_log_dec
    point, = ax.plot([screen.expected], [screen.log_dec_expected], linestyle="none",
                     marker="o", markersize=6.5, markeredgecolor=st.INK, markeredgewidth=0.9,
                     markerfacecolor=st.VERDICT_STYLES["pass" if met else "fail"]["facecolor"],
                     zorder=6)
    marker = None
    if screen.threshold is not None:
        marker, = ax.plot([screen.threshold], [0.0], linestyle="none", marker="D",
                          markersize=6.5, markerfacecolor=THRESHOLD, markeredgecolor=st.INK,
                          markeredgewidth=0.9, zorder=6.5, clip_on=False)
    return point, marker


def _axis_texts(ax, screen, scale, unit):
    """Ticks in ``unit``, axis labels, klbf/in along the top (returned) and the title."""
    ax.xaxis.set_major_formatter(FuncFormatter(lambda v, _: st.signed(v / scale, "g")))
    ax.yaxis.set_major_formatter(FuncFormatter(lambda v, _: st.signed(v, "g")))
    st.label_axes(ax, f"Applied cross-coupled stiffness ({unit})",
                  "Log decrement \u03b4, first forward mode")
    top = ax.secondary_xaxis("top", functions=(to_klbf_in, from_klbf_in))
    top.xaxis.set_major_formatter(FuncFormatter(lambda v, _: st.signed(v, "g")))
    top.tick_params(colors=st.INK, labelsize=st.FONT_TICK, length=3.5, width=0.7)
    top.spines["top"].set_color(st.FAINT)
    top.set_xlabel("Applied cross-coupled stiffness (klbf/in)", fontsize=st.FONT_LABEL - 0.5,
                   color=st.MUTED, labelpad=4)
    ax.set_title(f"Cross-coupling screen at {st.whole(to_rpm(screen.speed))} rpm "
                 "(maximum continuous speed)", fontsize=st.FONT_TITLE, color=st.INK,
                 loc="left", pad=36)
    return top


# --- words -----------------------------------------------------------------------------

def _amount(q, scale, unit):
    """A stiffness for a label: three figures in the axis unit, and in klbf/in."""
    return f"{q / scale:.3g} {unit} ({float(to_klbf_in(q)):.3g} klbf/in)"


def _criteria_lines(screen):
    """One line per criterion: its value, what is required and whether it is met."""
    c = screen.criteria
    met = {True: "met", False: "not met"}
    first = (f"\u03b4 at the expected amount {st.log_dec_text(screen.log_dec_expected)} "
             f"(at least {c.min_log_dec:g} required: "
             f"{met[screen.log_dec_expected >= c.min_log_dec]})")
    if screen.threshold is None:
        value = f"no threshold up to {screen.applied[-1] / screen.expected:.3g} \u00d7 expected"
    elif screen.threshold <= 0:
        value = "threshold 0: \u03b4 \u2264 0 without cross-coupling"
    else:
        value = f"threshold {screen.ratio:.3g} \u00d7 expected"
    second = (f"{value} (at least {c.min_ratio:g} \u00d7 required: "
              f"{met[screen.ratio >= c.min_ratio]})")
    return first, second


def verdict_words(screen):
    """The verdict box's text: the verdict, then both criteria."""
    head = "Passes the screen" if screen.verdict == "pass" else "Fails the screen"
    return "\n".join((head,) + _criteria_lines(screen))


def threshold_words(screen, scale, unit):
    """The threshold's label: its value and ratio, or why there is none."""
    if screen.threshold is None:
        return (f"\u03b4 stays above 0 up to {screen.applied[-1] / scale:.3g} {unit}:\n"
                "no threshold within the sweep")
    if screen.threshold <= 0:
        return (f"threshold 0: \u03b4 is {st.log_dec_text(screen.log_dec_zero)}\n"
                "already without cross-coupling")
    return (f"threshold {_amount(screen.threshold, scale, unit)}\n"
            f"= {screen.ratio:.3g} \u00d7 expected")


def _placement_words(screen):
    """Where the swept amount acts: "station 7 (mid-span)", or each source's share."""
    if len(screen.shares) == 1:
        return f"applied at station {screen.shares[0][0]} ({screen.placement})"
    import textwrap
    parts = ", ".join(f"{s}\u00a0({100 * f:.0f}\u00a0%)" for s, f in screen.shares)
    return "\n".join(textwrap.wrap(f"applied at stations {parts}", 44))


# --- placing ---------------------------------------------------------------------------

def _size(text, size):
    lines = text.split("\n")
    return max(lb.text_width(t, size) for t in lines) + 2.0, 1.22 * size * len(lines) + 2.0


def _around(h, sides=(1, -1)):
    """Offsets (dx, bottom dy) of a label ``h`` high round an anchor on the sides asked
    for: beside it first, then stepping out, nearest first (right before left, above
    before below at equal distance)."""
    out = []
    for dx in (7, 20, 35, 55, 80, 110, 145):
        for k in range(11):
            for s in sides:
                for up in (True, False):
                    dy = 4 + 11 * k if up else -4 - h - 11 * k
                    gap = math.hypot(dx, 4 + 11 * k)
                    out.append((gap, sides.index(s), not up, (s * dx, dy)))
    return [offset for *_, offset in sorted(out)]


def _leader_clear(anchor, rect, boxes):
    """Whether the leader from ``anchor`` to the near side of ``rect`` misses ``boxes``
    (its first 7 points, over the anchor's own mark, are not looked at)."""
    near = rect[0] if rect[0] >= anchor[0] else rect[2]
    end = np.array([near, 0.5 * (rect[1] + rect[3])])
    gap = float(np.hypot(*(end - anchor)))
    for t in np.linspace(0.0, 1.0, 16):
        if t * gap < 7.0:
            continue
        x, y = anchor + t * (end - anchor)
        if any(lb.overlap((x - 1, y - 1, x + 1, y + 1), b) for b in boxes):
            return False
    return True


def _place(ax, text, xy, offsets, taken, colour=st.INK, leader=True):
    """A boxed label by the first of ``offsets`` clear of the curve and of the marks and
    labels so far (``taken``: those two lists of boxes), its leader (when it has one) clear
    of the labels; else clear of the marks and labels only.  The label's box joins ``taken``."""
    size = st.FONT_NOTE + 0.5
    w, h = _size(text, size)
    anchor, frame = lb.points(ax, xy), lb.frame(ax)
    tries = ((dx, dy, lb.box_beside(anchor, w, h, dx, dy), boxes)
             for boxes in (taken[0] + taken[1], taken[1]) for dx, dy in offsets)
    dx, dy, rect, _ = next((t for t in tries if lb.fits(t[2], frame, t[3])
                            and (not leader or _leader_clear(anchor, t[2], taken[1]))),
                           lb.first_fit(anchor, w, h, offsets[:1], [], None) + (None,))
    taken[1].append(rect)
    far = leader and (abs(dy + h / 2) > 14 or abs(dx) > 12)
    return lb.leader_label(ax, text, xy, (dx, dy + h / 2), far, size=size, colour=colour,
                           zorder=8)


def _labels(ax, screen, scale, unit, taken, ratio_line):
    """The labels of the expected amount, the threshold, the required minimum and the
    least threshold, each clear of the curve, the marks and the labels before it."""
    x_hi, y_top = ax.get_xlim()[1], ax.get_ylim()[1]
    out = {}
    text = (f"expected {_amount(screen.expected, scale, unit)}:\n"
            f"\u03b4 {st.log_dec_text(screen.log_dec_expected)}")
    out["expected"] = _place(ax, text, (screen.expected, screen.log_dec_expected),
                             _around(_size(text, st.FONT_NOTE + 0.5)[1]), taken,
                             colour=EXPECTED)
    text = threshold_words(screen, scale, unit)
    h = _size(text, st.FONT_NOTE + 0.5)[1]
    if screen.threshold is None:
        xy, offsets = (x_hi, 0.0), _around(h, sides=(-1,))
    else:
        xy, offsets = (screen.threshold, 0.0), _around(h)
    out["threshold"] = _place(ax, text, xy, offsets, taken, colour=THRESHOLD)
    text = f"required minimum \u03b4 {screen.criteria.min_log_dec:g}"
    h = _size(text, st.FONT_NOTE + 0.5)[1]
    frame = lb.frame(ax)
    steps = max(8, int((frame[2] - frame[0]) / 40.0))    # along the whole line if need be
    offsets = [(-4 - 40 * k, dy) for dy in (2, -2 - h) for k in range(steps)]   # above first
    out["required"] = _place(ax, text, (x_hi, screen.criteria.min_log_dec), offsets, taken,
                             colour=REQUIRED, leader=False)
    out["ratio"] = None
    if ratio_line is not None:
        text = f"{screen.criteria.min_ratio:g} \u00d7 expected"
        h = _size(text, st.FONT_NOTE + 0.5)[1]
        offsets = [(s * 4, -h - 4 - 14 * k) for k in range(12) for s in (1, -1)]
        out["ratio"] = _place(ax, text, (ratio_line.get_xdata()[0], y_top), offsets, taken,
                              colour=st.MUTED, leader=False)
    return out


#: The corners of the frame in the order they are tried, and their legend locations.
CORNERS = (((1.0, 1.0), "upper right"), ((0.0, 1.0), "upper left"),
           ((0.0, 0.0), "lower left"), ((1.0, 0.0), "lower right"))


def _corner(ax, w, h, inset, boxes):
    """The first corner of the frame where a ``w`` x ``h`` box ``inset`` points in is clear
    of ``boxes``: ``(corner, box)``, or None."""
    frame = lb.frame(ax)
    for corner, _ in CORNERS:
        x = frame[2] - inset - w if corner[0] else frame[0] + inset
        y = frame[3] - inset - h if corner[1] else frame[1] + inset
        if lb.fits((x, y, x + w, y + h), frame, boxes):
            return corner, (x, y, x + w, y + h)
    return None


def _verdict_box(ax, screen, taken):
    """The verdict and its criteria in a tinted box, in the first corner of the frame
    clear of the curve and the marks: top right, top left, bottom left, bottom right."""
    text = verdict_words(screen)
    size, inset = st.FONT_NOTE + 1.0, 8.0
    w, h = _size(text, size)
    found = _corner(ax, w + 8.0, h + 8.0, inset, taken[0] + taken[1])
    corner = (1.0, 1.0) if found is None else found[0]
    if found is not None:
        taken[1].append(found[1])
    verdict = "pass" if screen.verdict == "pass" else "fail"
    box = dict(boxstyle="round,pad=0.45", facecolor=VERDICT_TINT[verdict], linewidth=1.0,
               edgecolor=st.VERDICT_STYLES[verdict]["facecolor"])
    offset = (inset if corner[0] == 0 else -inset, inset if corner[1] == 0 else -inset)
    return ax.annotate(text, xy=corner, xycoords="axes fraction", xytext=offset,
                       textcoords="offset points", ha="right" if corner[0] else "left",
                       va="top" if corner[1] else "bottom", multialignment="left",
                       fontsize=size, color=st.INK, linespacing=1.35, bbox=box, zorder=9)


def _caution(ax, criteria):
    """Screening only, and the criteria's source, in small text below the axis label,
    wrapped to the width from the axes' left edge to the figure's right edge."""
    text = f"{CAUTION} Criteria: {criteria.label}."
    fig_w = ax.figure.get_figwidth() * 72.0
    room = fig_w - lb.frame(ax)[0] - 12.0
    lines = textwrap.wrap(text, width=max(40, int(room / (0.52 * st.FONT_NOTE))))
    return ax.annotate("\n".join(lines), xy=(0.0, 0.0), xycoords="axes fraction",
                       xytext=(0.0, -35.0), textcoords="offset points", ha="left", va="top",
                       fontsize=st.FONT_NOTE, color=st.MUTED, annotation_clip=False)


def _key(screen, lines, curve):
    """What the lines, the shading and the marks stand for, and where the amount acts."""
    key = lb.Key()
    key.add(curve, "log decrement \u03b4, first forward mode")
    key.add(lines["zero"], "\u03b4 = 0, the stability limit")
    key.add(lines["required"], f"required minimum \u03b4 ({screen.criteria.min_log_dec:g})")
    key.add(lines["expected"], "expected cross-coupling")
    if lines["ratio"] is not None:
        key.add(lines["ratio"], f"least threshold asked ({screen.criteria.min_ratio:g} "
                "\u00d7 expected)")
    if lines["band"] is not None:
        key.add(Patch(facecolor=SHORT_FILL, edgecolor="none"),
                "\u03b4 \u2264 0 here fails the screen")
    if screen.threshold is not None:
        key.add(Line2D([], [], linestyle="none", marker="D", markersize=6.0,
                       markerfacecolor=THRESHOLD, markeredgecolor=st.INK,
                       markeredgewidth=0.9), "threshold: \u03b4 reaches 0")
    key.note(_placement_words(screen))
    return key


def _key_corner(ax, key, taken):
    """On axes given, the key goes inside them: the first corner clear of the curve, the
    marks and the verdict (else clear of the verdict alone); its legend location."""
    size = st.FONT_NOTE + 0.5
    n = len(key.labels)
    w = max(lb.text_width(t, size) for t in key.labels) + (2.4 + 0.8 + 0.8) * size + 4.0
    h = n * 1.2 * size + (n - 1) * 0.5 * size + 0.8 * size + 4.0
    found = (_corner(ax, w, h, 0.5 * size, taken[0] + taken[1])
             or _corner(ax, w, h, 0.5 * size, taken[1]))
    if found is None:
        return "best"
    taken[1].append(found[1])
    return dict(CORNERS)[found[0]]


def _legend(ax, key, where):
    """The key beside the axes (``where`` None) or inside them at ``where``."""
    if where is None:
        return lb.legend_beside(ax, key, x=1.03)
    legend = ax.legend(key.handles, key.labels, loc=where, frameon=True, framealpha=0.9,
                       edgecolor=st.GRID, fontsize=st.FONT_NOTE + 0.5, handlelength=2.4)
    for i, text in enumerate(legend.get_texts()):
        text.set_color(st.MUTED if i in key.muted else st.INK)
    return legend
