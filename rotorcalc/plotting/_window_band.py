"""The stiffness window on the critical-speed map: the band of support stiffness that
keeps every margin, its ends named with the critical that limits them, and the
bearings' own stiffness ("x1") that its factors scale."""

from __future__ import annotations

import math

import numpy as np
from matplotlib.patches import Rectangle

from . import _labels as lb
from . import _style as st
from ._units import to_rpm

#: The stiffness window that keeps the margins: a pale blue, see-through band.
WINDOW_FILL = "#c9dbef"
WINDOW_ALPHA = 0.55
WINDOW_EDGE = "#3b6797"
#: The dots of the line at the bearings' own stiffness (x1).
BASE_DOTS = (0, (1.0, 1.8))
#: The note that the base stiffness does not keep the margins.
FAIL = "#b1172f"


def critical_text(crit):
    """``"5398 rpm 1X fwd"``."""
    return f"{st.whole(to_rpm(crit.speed))} rpm {crit.order:g}X {st.short_whirl(crit.whirl)}"


def draw_window(ax, window, base, top, lines):
    """The band of stiffness that keeps the margins, its ends named.

    Returns the band, its texts, the limiting markers, the arrows of open ends and
    the boxes (points) the texts take, for the other labels to avoid.
    """
    texts, markers, arrows, taken = [], [], [], []
    x_lo, x_hi = ax.get_xlim()
    taken.append(base_tag(ax, base, "\u00d71", WINDOW_EDGE, lines))
    if not window.base_passes:
        note, box = _fail_note(ax, window)
        return None, [note], markers, arrows, taken + [box]
    ends = _ends(window)
    a, b = base * ends[0][1], base * ends[1][1]
    band = ax.add_patch(Rectangle((a, 0.0), b - a, 1.0, transform=ax.get_xaxis_transform(),
                                  facecolor=WINDOW_FILL, alpha=WINDOW_ALPHA, edgecolor="none",
                                  zorder=1.2))
    # "margins kept" over the middle of the visible part of the band
    va, vb = max(a, x_lo), min(b, x_hi)
    if vb > va:
        texts.append(_kept_label(ax, math.sqrt(va * vb), taken))
    for end, f, side in ends:
        x = base * f
        if not x_lo <= x <= x_hi:
            continue
        text, marked = _end_line(ax, end, x, f, side, top, markers, arrows, taken)
        label, box = _end_text(ax, x, text, marked, side)
        texts.append(label)
        taken.append(box)
    return band, texts, markers, arrows, taken


def _ends(window):
    """``(end, factor, side)`` of the low and high end; an end the search did not reach
    stops at the factor searched."""
    factors = np.asarray(window.factors, dtype=float)
    factors = factors[np.isfinite(factors) & (factors > 0)]
    ends = []
    for end, searched, side in ((window.low, factors.min() if factors.size else 1.0, -1),
                                (window.high, factors.max() if factors.size else 1.0, +1)):
        f = end.factor if end.factor is not None else float(searched)
        ends.append((end, f, side))
    return ends


def _fail_note(ax, window):
    """The boxed note, top left, that the bearings' own stiffness fails; it and its box."""
    crit = window.low.limiting or window.high.limiting
    text = "margins not kept at the bearings' own stiffness (\u00d71)"
    if crit is not None:
        text += f":\nthe {critical_text(crit)} critical fails its margin"
    note = ax.text(0.015, 0.975, text, transform=ax.transAxes, ha="left", va="top",
                   fontsize=st.FONT_NOTE + 0.5, color=FAIL, zorder=8, linespacing=1.2,
                   bbox=dict(boxstyle="round,pad=0.3", facecolor=st.PAPER, edgecolor=FAIL,
                             linewidth=0.6, alpha=0.92))
    frame = lb.frame(ax)
    rows = text.split("\n")
    w = max(lb.text_width(t, st.FONT_NOTE + 0.5) for t in rows) + 8
    h = 1.25 * (st.FONT_NOTE + 0.5) * len(rows) + 8
    x0 = frame[0] + 0.015 * (frame[2] - frame[0])
    y1 = frame[1] + 0.975 * (frame[3] - frame[1])
    return note, (x0, y1 - h, x0 + w, y1)


def _kept_label(ax, mid, taken):
    """"margins kept" at the top of the band, above stiffness ``mid``; its box joins
    ``taken``."""
    label = ax.annotate("margins kept", xy=(mid, 1.0), xycoords=("data", "axes fraction"),
                        xytext=(0, -4), textcoords="offset points", ha="center", va="top",
                        fontsize=st.FONT_NOTE + 0.5, color=WINDOW_EDGE, fontweight="bold",
                        zorder=8, bbox=st.paper_box("square", 0.15, 0.8))
    taken.append(_box_of(ax, mid, "margins kept", st.FONT_NOTE + 0.5, 10))
    return label


def _end_line(ax, end, x, f, side, top, markers, arrows, taken):
    """The line at one end of the band with, at a finite end, the limiting critical
    marked, or at an open end an arrow pointing on.  Returns the end's text and the
    height (points) of its marker, None without one."""
    finite = end.factor is not None
    marked = None
    ax.axvline(x, color=WINDOW_EDGE, linewidth=1.0 if finite else 0.8,
               linestyle="-" if finite else (0, (3, 2)), zorder=2.6)
    if not finite:
        # an arrow on from the open end, near the bottom where the curves are sparse
        arrows.append(ax.annotate(
            "", xy=(x, 0.06), xycoords=("data", "axes fraction"), xytext=(24 * side, 0),
            textcoords="offset points", zorder=7, annotation_clip=False,
            arrowprops=dict(arrowstyle="<|-", color=WINDOW_EDGE, linewidth=1.1,
                            shrinkA=0, shrinkB=0, mutation_scale=10)))
        return f"\u00d7{f:.3g}, end of search: margins still kept", marked
    text = f"\u00d7{f:.3g}"
    if end.limiting is not None:
        text += f": limited by {critical_text(end.limiting)}"
        y = float(to_rpm(end.limiting.speed))
        if 0 < y < top:
            markers.append(ax.plot([x], [y], linestyle="none", marker="D", markersize=5.5,
                                   markerfacecolor=WINDOW_EDGE, markeredgecolor=st.PAPER,
                                   markeredgewidth=0.8, zorder=9)[0])
            px, marked = (float(v) for v in lb.points(ax, (x, y)))
            taken.append((px - 5, marked - 5, px + 5, marked + 5))
    return text, marked


def _end_text(ax, x, text, marked, side):
    """An end's text along its line, inside the band, reading upwards from the bottom,
    clear of the limiting marker (at height ``marked``, points) where there is room
    above or below it.  Returns the text and its box."""
    frame = lb.frame(ax)
    length = lb.text_width(text, st.FONT_NOTE)
    height = frame[3] - frame[1]
    y0 = frame[1] + 0.12 * height
    if marked is not None and y0 - 6 <= marked <= y0 + length + 6:
        if marked + 8 + length <= frame[3] - 22:
            y0 = marked + 8
        elif marked - 8 - length >= frame[1] + 4:
            y0 = marked - 8 - length
    label = ax.annotate(text, xy=(x, (y0 - frame[1]) / height),
                        xycoords=("data", "axes fraction"), xytext=(-3 * side, 0),
                        textcoords="offset points", rotation=90, ha="left",
                        va="bottom" if side > 0 else "top", rotation_mode="anchor",
                        fontsize=st.FONT_NOTE, color=WINDOW_EDGE, zorder=8,
                        bbox=st.paper_box("square", 0.1, 0.75))
    px = float(lb.points(ax, (x, 1.0))[0])
    x0 = px - 3 - 1.3 * st.FONT_NOTE if side > 0 else px + 3
    return label, (x0, y0, x0 + 1.3 * st.FONT_NOTE, y0 + length)


def base_tag(ax, x, text, colour, lines=()):
    """A small tag beside data ``x`` near the bottom of the frame, off the lines; its box."""
    lo, hi = ax.get_xlim()
    if not lo <= x <= hi:
        return None
    anchor = lb.points(ax, (x, ax.get_ylim()[0]))
    w, h = lb.text_width(text, st.FONT_NOTE), 1.3 * st.FONT_NOTE
    frame = lb.frame(ax)
    steps = [(dx, dy) for dy in np.arange(3.0, frame[3] - frame[1] - 30.0, 11.0)
             for dx in (3, -3)]
    dx, dy, rect = lb.first_fit(anchor, w, h, steps or [(3, 3)], lines, None)
    ax.annotate(text, xy=(x, 0.0), xycoords=("data", "axes fraction"), xytext=(dx, dy),
                textcoords="offset points", ha="left" if dx > 0 else "right", va="bottom",
                fontsize=st.FONT_NOTE, color=colour, zorder=8)
    return rect


def _box_of(ax, x, text, size, drop):
    px, py = lb.points(ax, (x, ax.get_ylim()[1]))
    w = lb.text_width(text, size)
    return (px - w / 2, py - drop - 1.4 * size, px + w / 2, py)
