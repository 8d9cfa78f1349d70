"""Labels on the critical-speed map: "mode n" beside each curve, the speeds of the
crossings, and the operating range's speeds right of the frame.

Each label is placed in points on the page, clear of the curves (``lines``: small
boxes along them, :func:`rotorcalc.plotting._labels.line_boxes`) and of the labels
placed before it (``taken``).
"""

from __future__ import annotations

import numpy as np

from . import _labels as lb
from . import _style as st
from ._units import to_rpm

#: Markers closer than this (points) share one label.
COINCIDE = 12.0


def side_labels(ax, marks):
    """Labels just right of the frame at data heights, spread apart where they would touch.

    Returns the annotations and the width (points) they take.
    """
    gap = 1.25 * st.FONT_NOTE
    frame = lb.frame(ax)
    ys = [float(lb.points(ax, (ax.get_xlim()[0], y))[1]) for y, _ in marks]
    order = sorted(range(len(marks)), key=lambda i: ys[i])
    placed = {}
    last = -np.inf
    for i in order:
        y = min(max(ys[i], last + gap), frame[3] + 4 * gap)
        placed[i] = y
        last = y
    texts = []
    width = 0.0
    for i, (y, text) in enumerate(marks):
        if ys[i] < frame[1] - 1 or ys[i] > frame[3] + 1:
            continue   # off the frame: no label
        dy = placed[i] - ys[i]
        texts.append(ax.annotate(
            text, xy=(1.0, y), xycoords=("axes fraction", "data"), xytext=(6, dy),
            textcoords="offset points", ha="left", va="center", fontsize=st.FONT_NOTE,
            color=st.BAND_EDGE, annotation_clip=False,
            arrowprops=dict(arrowstyle="-", color=st.BAND_EDGE, linewidth=0.5, shrinkA=0,
                            shrinkB=0) if abs(dy) > 1.0 else None))
        width = max(width, 6 + lb.text_width(text, st.FONT_NOTE))
    return texts, width


def _speeds_text(speeds):
    """Whole rpm of a group of crossings: "2500 rpm", "2500 / 2550 rpm", "2500\u20132600 rpm"."""
    if len(speeds) == 1:
        return f"{st.whole(speeds[0])} rpm"
    if len(speeds) == 2:
        return f"{st.whole(speeds[0])} / {st.whole(speeds[1])} rpm"
    return f"{st.whole(speeds[0])}\u2013{st.whole(speeds[-1])} rpm"


# Candidate label offsets from a crossing, points: beside it first, then further out.
_CROSS_OFFSETS = ([(7, 5), (7, -14), (-7, 5), (-7, -14)]
                  + [(s * 10, d) for r in range(1, 7) for d in (5 + 11 * r, -14 - 11 * r)
                     for s in (1, -1)])


def label_crossings(ax, crossings, lines, taken):
    """Speed labels at the crossings, one per group of all but coinciding markers."""
    if not crossings:
        return []
    frame = lb.frame(ax)
    pts = [lb.points(ax, (c.stiffness, to_rpm(c.speed))) for c in crossings]
    obstacles = list(taken) + [(p[0] - 4, p[1] - 4, p[0] + 4, p[1] + 4) for p in pts]
    order = sorted(range(len(crossings)), key=lambda i: pts[i][0])
    h = 1.3 * st.FONT_NOTE
    labels = []
    for g in lb.coinciding(pts, order, COINCIDE, chain=True):
        text = _speeds_text(sorted({int(round(float(to_rpm(crossings[i].speed)))) for i in g}))
        w = lb.text_width(text, st.FONT_NOTE) + 2
        xs, ys = [pts[i][0] for i in g], [pts[i][1] for i in g]
        # a label for the group sits beside its outermost markers
        anchor_r = np.array([max(xs), float(np.mean(ys))])
        anchor_l = np.array([min(xs), float(np.mean(ys))])
        best = None
        # clear of the curves where it can be, else of the other labels and markers only
        for avoid in (obstacles + lines, obstacles):
            for offset in _CROSS_OFFSETS:
                anchor = anchor_r if offset[0] > 0 else anchor_l
                dx, dy, rect = lb.first_fit(anchor, w, h, [offset], avoid, frame)
                if lb.fits(rect, frame, avoid):
                    best = (anchor, dx, dy, rect)
                    break
            if best is not None:
                break
        if best is None:
            best = (anchor_r,) + lb.first_fit(anchor_r, w, h, _CROSS_OFFSETS[:1], [], frame)
        anchor, dx, dy, rect = best
        obstacles.append(rect)
        data_xy = ax.transData.inverted().transform(anchor * ax.figure.dpi / 72.0)
        labels.append(lb.leader_label(ax, text, tuple(data_xy), (dx, dy + h / 2),
                                      abs(dy) > 15 or abs(dx) > 8, zorder=8))
    return labels


def label_modes(ax, k, rpm, top, lines, taken):
    """"mode n" beside each curve: at its stiff end, or where it leaves through the top."""
    frame = lb.frame(ax)
    labels = []
    obstacles = list(taken)
    size = st.FONT_NOTE + 0.5
    h = 1.3 * size
    for j in range(rpm.shape[1]):
        y = rpm[:, j]
        ok = np.isfinite(y) & np.isfinite(k) & (y < top)
        if not ok.any():
            continue
        i = int(np.nonzero(ok)[0][-1])
        if i < len(y) - 1:
            # it leaves through the top: label it a little below, where it is still clear
            ok &= y < 0.93 * top
            if not ok.any():
                continue
            i = int(np.nonzero(ok)[0][-1])
        text = f"mode {j + 1}"
        anchor = lb.points(ax, (k[i], y[i]))
        if i == len(y) - 1:
            offsets = [(-4, 3), (-4, -13), (-30, 3), (-30, -13), (-60, 3), (-60, -13)]
        else:
            offsets = [(-6, 0), (6, -6), (-6, -12), (6, -18), (-12, -24)]
        w = lb.text_width(text, size) + 2
        dx, dy, rect = lb.first_fit(anchor, w, h, offsets, obstacles + lines, frame)
        if not lb.fits(rect, frame, obstacles):
            dx, dy, rect = lb.first_fit(anchor, w, h, offsets, obstacles, frame)
        obstacles.append(rect)
        labels.append(ax.annotate(
            text, xy=(k[i], y[i]), xytext=(dx, dy + h / 2), textcoords="offset points",
            ha="left" if dx >= 0 else "right", va="center", fontsize=size, color=st.INK,
            fontweight="bold", zorder=7, bbox=st.paper_box()))
    taken.extend(obstacles[len(taken):])
    return labels
