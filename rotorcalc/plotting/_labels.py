"""Words on the pictures: how wide a text is, where a label fits, and the keys.

Every size here is in points on the page (1/72 inch), so a layout found at one
resolution holds at any other.  Boxes are ``(x0, y0, x1, y1)`` tuples.
"""

from __future__ import annotations

import math
from functools import lru_cache

import numpy as np
from matplotlib.font_manager import FontProperties
from matplotlib.lines import Line2D
from matplotlib.patches import Patch
from matplotlib.ticker import FuncFormatter, NullFormatter
from matplotlib.textpath import text_to_path
from matplotlib.transforms import ScaledTranslation, offset_copy

from . import _style as st

# --- measuring ----------------------------------------------------------------------

@lru_cache(maxsize=1024)
def text_width(text, size, bold=False):
    """Width of a one-line label in points, from the font's metrics, plus a little padding."""
    prop = FontProperties(size=size, weight="bold" if bold else None)
    return float(text_to_path.get_text_width_height_descent(text, prop, ismath=False)[0]) + 3.0


def points(ax, xy):
    """Data coordinates to points on the page (an array of shape (..., 2))."""
    return np.asarray(ax.transData.transform(xy)) * 72.0 / ax.figure.dpi


def frame(ax):
    """The box of the axes on the page."""
    box = ax.get_window_extent()
    k = 72.0 / ax.figure.dpi
    return (box.x0 * k, box.y0 * k, box.x1 * k, box.y1 * k)


def overlap(a, b):
    """Whether two boxes overlap (boxes that only touch do not)."""
    return not (a[2] <= b[0] or b[2] <= a[0] or a[3] <= b[1] or b[3] <= a[1])


def inside(rect, outer):
    return (rect[0] >= outer[0] and rect[2] <= outer[2] and rect[1] >= outer[1]
            and rect[3] <= outer[3])


def fits(rect, outer, taken):
    """Inside ``outer`` (when not None) and clear of every box in ``taken``."""
    return (outer is None or inside(rect, outer)) and not any(overlap(rect, t) for t in taken)


def line_boxes(ax, xs, ys, pad=1.5, step=3.0):
    """Small boxes along a drawn polyline, so that labels can keep off it.

    A point that is not finite breaks the line, as it does the drawn one.
    """
    q = points(ax, np.column_stack([xs, ys]))
    ok = np.all(np.isfinite(q), axis=1)
    boxes = []
    for i in range(len(q) - 1):
        if not (ok[i] and ok[i + 1]):
            continue
        a, b = q[i], q[i + 1]
        n = max(1, int(np.hypot(*(b - a)) // step))
        for t in np.linspace(0.0, 1.0, n + 1):
            x, y = a + t * (b - a)
            boxes.append((x - pad, y - pad, x + pad, y + pad))
    return boxes


# --- tick labels ------------------------------------------------------------------

SUPERSCRIPT = str.maketrans("-0123456789", "\u207b\u2070\u00b9\u00b2\u00b3\u2074\u2075\u2076"
                                            "\u2077\u2078\u2079")


def power_text(value):
    """``1e8`` as "10⁸" and ``2e8`` as "2×10⁸", in plain text (no math parser needed)."""
    if not (math.isfinite(value) and value > 0):
        return ""
    mantissa, exponent = f"{value:.0e}".split("e")
    power = "10" + str(int(exponent)).translate(SUPERSCRIPT)
    return power if mantissa == "1" else f"{mantissa}\u00d7{power}"


def plain_log_ticks(axis, ratio):
    """Decade labels as plain text; in-between labels too when the axis spans under
    two decades (``ratio``, top over bottom), where decades alone are too few to read by."""
    axis.set_major_formatter(FuncFormatter(lambda v, _: power_text(v)))
    if ratio < 100.0:
        axis.set_minor_formatter(FuncFormatter(lambda v, _: power_text(v)))
    else:
        axis.set_minor_formatter(NullFormatter())


# --- placing ------------------------------------------------------------------------

def _box(x0, y, w, h, centred):
    return (x0, y - h / 2, x0 + w, y + h / 2) if centred else (x0, y, x0 + w, y + h)


def box_beside(anchor, w, h, dx, dy, centred=False):
    """The ``w`` x ``h`` box of a label offset ``(dx, dy)`` from ``anchor``.

    It starts ``dx`` right of the anchor, or ends ``-dx`` left of it when ``dx``
    is negative; its bottom is ``dy`` above the anchor (``centred``: its middle).
    """
    x0 = anchor[0] + dx if dx >= 0 else anchor[0] + dx - w
    return _box(x0, anchor[1] + dy, w, h, centred)


def first_fit(anchor, w, h, offsets, taken, outer, centred=False):
    """The first of ``offsets`` whose box (see :func:`box_beside`) :func:`fits`;
    ``(dx, dy, box)``.

    When none fits: the first offset, its box taken to start at anchor + dx.
    """
    for dx, dy in offsets:
        rect = box_beside(anchor, w, h, dx, dy, centred)
        if fits(rect, outer, taken):
            return dx, dy, rect
    dx, dy = offsets[0]
    return dx, dy, _box(anchor[0] + dx, anchor[1] + dy, w, h, centred)


def coinciding(points_at, order, near, chain=False):
    """Groups of indices, taken in ``order``, whose points (page points) all but coincide:
    each joins the first group whose first point (``chain``: any of whose points) is
    closer than ``near``."""
    groups = []
    for k in order:
        for group in groups:
            members = group if chain else group[:1]
            if any(np.hypot(*(points_at[j] - points_at[k])) < near for j in members):
                group.append(k)
                break
        else:
            groups.append([k])
    return groups


def leader_label(ax, text, xy, offset, far, *, size=st.FONT_NOTE, colour=st.INK, pad=0.15,
                 zorder=7, leader=st.MUTED, shrink=4.0, leader_alpha=None):
    """A boxed label ``offset`` points from ``xy`` (its near end there, vertically
    centred), joined to ``xy`` by a thin leader line when it stands ``far``."""
    arrow = None
    if far:
        arrow = dict(arrowstyle="-", color=leader, linewidth=0.6, shrinkA=0, shrinkB=shrink)
        if leader_alpha is not None:
            arrow["alpha"] = leader_alpha
    return ax.annotate(text, xy=xy, xytext=offset, textcoords="offset points",
                       ha="left" if offset[0] > 0 else "right", va="center", fontsize=size,
                       color=colour, zorder=zorder, bbox=st.paper_box("round", pad, 0.85),
                       arrowprops=arrow)


def stack_rows(centres, halves, gap=0.0):
    """A row for each label (0 the first) so that labels of one row stay ``gap`` apart;
    ``centres`` and half widths along the row, in points."""
    placed, rows = [], []
    for c, h in zip(centres, halves):
        row = 0
        while any(r == row and abs(c - pc) < h + ph + gap for pc, ph, r in placed):
            row += 1
        placed.append((c, h, row))
        rows.append(row)
    return rows


def edge_labels(ax, marks, rough=False):
    """Labels of data x positions just above the frame, stacked where they would touch.

    ``marks`` are ``(x, text)``.  ``rough`` spaces them by a width estimated
    from the number of characters (as the whirl-speed map always has) rather
    than measured.  Returns the annotations and the number of rows used.
    """
    centres = [float(points(ax, (x, 0.0))[0]) for x, _ in marks]
    if rough:
        halves = [0.30 * st.FONT_NOTE * len(text) + 2.0 for _, text in marks]
    else:
        halves = [0.5 * text_width(text, st.FONT_NOTE) for _, text in marks]
    rows = stack_rows(centres, halves)
    texts = [ax.annotate(text, xy=(x, 1.0), xycoords=("data", "axes fraction"),
                         xytext=(0, 3 + 10 * row), textcoords="offset points", ha="center",
                         va="bottom", fontsize=st.FONT_NOTE, color=st.BAND_EDGE,
                         annotation_clip=False)
             for (x, text), row in zip(marks, rows)]
    return texts, 1 + max(rows, default=-1)


# --- keys ---------------------------------------------------------------------------

class Key:
    """Handles, labels, bold headers and muted notes of a legend, built in order."""

    def __init__(self):
        self.handles, self.labels, self.headers, self.muted = [], [], [], []

    def header(self, text):
        self.headers.append(len(self.labels))
        self.add(Line2D([], [], linestyle="none"), text)

    def add(self, handle, text):
        self.handles.append(handle)
        self.labels.append(text)

    def note(self, text):
        self.muted.append(len(self.labels))
        self.add(Line2D([], [], linestyle="none"), text)

    def operating(self, operating, linewidth=0.9):
        """The operating band and, when there is one, the trip speed."""
        self.add(Patch(facecolor=st.BAND_FILL, edgecolor=st.BAND_EDGE, linewidth=0.8),
                 "operating range")
        if operating.trip_speed is not None:
            self.add(Line2D([], [], color=st.BAND_EDGE, linewidth=linewidth,
                            linestyle=st.TRIP_DASH), "trip speed")

    def lines(self, orders, operating):
        """A "Lines" section: the excitation orders and the operating range."""
        self.header("Lines")
        self.add(Line2D([], [], color=st.MUTED, linewidth=0.9),
                 "excitation " + ", ".join(f"{o:g}X" for o in orders))
        if operating is not None:
            self.operating(operating)


def ink(legend):
    """Legend texts in the picture's ink; the legend."""
    for text in legend.get_texts():
        text.set_color(st.INK)
    return legend


def legend_beside(ax, key, x=1.0, offset=0.0):
    """``key`` right of the axes, its top level with theirs, from axes fraction ``x``
    plus ``offset`` points; headers bold and flush with the handles, notes muted."""
    size = st.FONT_NOTE + 0.5
    length, pad = 2.6, 0.6
    where = offset_copy(ax.transAxes, fig=ax.figure, x=offset, units="points") if offset \
        else None
    legend = ax.legend(key.handles, key.labels, loc="upper left", bbox_to_anchor=(x, 1.0),
                       bbox_transform=where, borderaxespad=0.0, frameon=False, fontsize=size,
                       handlelength=length, handletextpad=pad, labelspacing=0.35)
    # Headers start where the handles do: shift them left by the handle's room,
    # in inches so the shift holds at any resolution.
    shift = ScaledTranslation(-(length + pad) * size / 72.0, 0.0, ax.figure.dpi_scale_trans)
    for i, text in enumerate(legend.get_texts()):
        text.set_color(st.MUTED if i in key.muted else st.INK)
        if i in key.headers:
            text.set_fontweight("bold")
            text.set_transform(text.get_transform() + shift)
    return legend


def legend_below(ax, handles, labels, drop, ncol, handlelength, columnspacing):
    """A legend centred under the axes, its top ``drop`` points below them."""
    where = offset_copy(ax.transAxes, fig=ax.figure, y=-drop, units="points")
    return ink(ax.legend(handles, labels, loc="upper center", bbox_to_anchor=(0.5, 0.0),
                         bbox_transform=where, frameon=False, ncol=ncol,
                         fontsize=st.FONT_NOTE + 0.5, handlelength=handlelength,
                         columnspacing=columnspacing))
