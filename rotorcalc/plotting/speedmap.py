"""Whirl-speed map: damped natural frequencies against spin speed."""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np
from matplotlib.lines import Line2D
from matplotlib.patches import Patch, Rectangle
from matplotlib.transforms import ScaledTranslation

from ..units import to_rpm
from . import _style as st

#: Room above the synchronous line at the top of the sweep.
HEADROOM = 1.1
#: Longest list of critical speeds in the key; the rest are counted.
MAX_LISTED = 16


@dataclass
class SpeedMapArtists:
    """What :func:`whirl_speed_map` drew.

    Attributes
    ----------
    figure, ax
        The figure and axes drawn on.
    branches : list of list of Line2D
        The pieces of each tracked branch (one piece per run of equal whirl
        label and damping class).
    branch_whirl : list of list of str
        The whirl label of each piece, parallel to ``branches``.
    order_lines : list of Line2D
        One excitation-order line per order, in the order given.
    order_labels : list of Text
    band : Rectangle or None
        The shaded operating range (x in rpm, full height).
    band_labels : list of Text
        Labels of the range's ends (and of the trip speed).
    trip_line : Line2D or None
    critical_markers : list of Line2D
        One marker per critical speed, in the order given.
    critical_labels : list of Annotation
        One per group of all but coinciding markers.
    legend : Legend
    freq_max : float
        Upper limit of the frequency axis, cpm.
    hidden_branches : int
        Branches lying wholly above ``freq_max``.
    """

    figure: object
    ax: object
    branches: list = field(default_factory=list)
    branch_whirl: list = field(default_factory=list)
    order_lines: list = field(default_factory=list)
    order_labels: list = field(default_factory=list)
    band: object = None
    band_labels: list = field(default_factory=list)
    trip_line: object = None
    critical_markers: list = field(default_factory=list)
    critical_labels: list = field(default_factory=list)
    legend: object = None
    freq_max: float = 0.0
    hidden_branches: int = 0


def whirl_speed_map(sweep, criticals=(), operating=None, orders=(1.0,), ax=None, margins=None,
                    *, freq_max=None):
    """Draw the whirl-speed map (Campbell diagram) of a speed sweep.

    Each tracked branch is drawn as a curve of damped natural frequency over
    spin speed, broken where the sweep has no value (a mode that turns
    overdamped, say).  The line style tells the whirl sense at each point (solid
    forward, dashed backward, dotted mixed) and the colour its log decrement
    class; a branch that changes whirl sense along the sweep changes style
    half-way between the two speeds.

    Parameters
    ----------
    sweep : rotorcalc.analysis.Sweep
        Tracked modes over the speed sweep (rad/s).
    criticals : sequence of CriticalSpeed, optional
        Marked on the map, each with its speed in rpm.  When empty and
        ``margins`` is given, the criticals of the margin table are used.
    operating : OperatingRange, optional
        Drawn as a shaded band from ``min_speed`` to ``max_speed`` with its
        ends labelled, and the trip speed as a dashed line.
    orders : sequence of float
        Excitation orders drawn as lines ``frequency = order x speed``.
    ax : matplotlib.axes.Axes, optional
        Axes to draw on; a new figure is made when omitted.
    margins : MarginTable, optional
        Colours and shapes the critical markers by verdict (pass, fail,
        critically damped, not judged).
    freq_max : float, optional
        Top of the frequency axis, cpm.  By default the highest of 1.1 x the
        1X line at the end of the sweep, 1.15 x the median frequency of the
        two lowest branches and 1.08 x the highest critical frequency, so one
        very high branch cannot squash the map; branches above are clipped
        and counted in the key.

    Returns
    -------
    SpeedMapArtists
        The figure, the axes and the artists drawn.
    """
    fig, ax, created = st.axes_for(ax, figsize=(10.0, 6.0))
    if created:
        fig.subplots_adjust(left=0.08, right=0.70, bottom=0.10, top=0.86)
    st.style_axes(ax)
    out = SpeedMapArtists(figure=fig, ax=ax)

    speed = to_rpm(np.asarray(sweep.speeds, dtype=float))
    freq = to_rpm(np.asarray(sweep.frequency, dtype=float))
    log_dec = np.asarray(sweep.log_dec, dtype=float)
    whirl = np.asarray(sweep.whirl)
    orders = tuple(float(o) for o in orders)

    criticals = list(criticals)
    if margins is not None and not criticals:
        criticals = [row.critical for row in margins.rows]
    verdicts = _verdicts(criticals, margins)

    x_lo, x_hi = (float(np.nanmin(speed)), float(np.nanmax(speed))) if speed.size else (0.0, 1.0)
    x_lo = min(x_lo, 0.0)
    top = _frequency_top(freq, x_hi, criticals) if freq_max is None else float(freq_max)
    out.freq_max = top
    ax.set_xlim(x_lo, x_hi)
    ax.set_ylim(0.0, top)

    label_rows = _draw_operating(ax, operating, out) if operating is not None else 0

    for order in orders:
        _draw_order(ax, order, x_lo, x_hi, top, out)

    for j in range(freq.shape[1] if freq.ndim == 2 else 0):
        pieces, kinds = _draw_branch(ax, speed, freq[:, j], log_dec[:, j], whirl[:, j])
        out.branches.append(pieces)
        out.branch_whirl.append(kinds)
    if freq.size:
        # Branches that exist somewhere in the sweep but never come below the top.
        present = np.isfinite(freq) & np.isfinite(log_dec)
        lowest = np.where(present, freq, np.inf).min(axis=0)
        out.hidden_branches = int(np.sum(np.isfinite(lowest) & (lowest > top)))

    for crit, verdict in zip(criticals, verdicts):
        style = st.VERDICT_STYLES.get(verdict, st.NEUTRAL_MARKER)
        marker, = ax.plot([to_rpm(crit.speed)], [to_rpm(crit.eigenvalue.imag)],
                          linestyle="none", marker=style["marker"], markersize=7.5,
                          markerfacecolor=style["facecolor"], markeredgecolor=st.INK,
                          markeredgewidth=0.9, clip_on=True,
                          # Hollow markers on top, so a filled one beneath stays visible.
                          zorder=6.5 if style["facecolor"] == "none" else 6)
        out.critical_markers.append(marker)

    st.label_axes(ax, "Spin speed (rpm)", "Damped natural frequency (cpm)")
    # Room for the range labels above the frame.
    ax.set_title("Whirl-speed map", fontsize=st.FONT_TITLE, color=st.INK, loc="left",
                 pad=6 + 10 * label_rows)

    out.legend = _legend(ax, orders, operating, criticals, verdicts, margins, out)
    out.critical_labels = _label_criticals(ax, criticals, out.order_labels)
    return out


def _verdicts(criticals, margins):
    if margins is None:
        return [None] * len(criticals)
    by_id = {id(row.critical): row.verdict for row in margins.rows}
    by_key = {(round(row.critical.speed, 6), row.critical.order, row.critical.branch): row.verdict
              for row in margins.rows}
    return [by_id.get(id(c), by_key.get((round(c.speed, 6), c.order, c.branch), "not judged"))
            for c in criticals]


def _frequency_top(freq, x_hi, criticals):
    # The synchronous line sets the scale whatever orders are drawn: higher-order
    # lines simply leave through the top, and their criticals are added below.
    need = [HEADROOM * x_hi]
    if freq.size:
        medians = np.sort(np.nanmedian(np.where(np.isfinite(freq), freq, np.nan), axis=0))
        medians = medians[np.isfinite(medians)]
        if medians.size:
            need.append(1.15 * float(medians[:2].max()))
    need.extend(1.08 * float(to_rpm(c.eigenvalue.imag)) for c in criticals)
    top = max(need)
    return top if np.isfinite(top) and top > 0 else 1.0


def _draw_branch(ax, speed, freq, log_dec, whirl):
    """One branch as runs of equal (whirl label, damping class).

    Each sweep point owns the curve from the midpoint before it to the
    midpoint after it, so a change of label or class falls half-way between
    two speeds and dashes stay continuous within a run.
    """
    pieces, kinds = [], []
    n = len(speed)
    # Absent points (NaN eigenvalue, no whirl label) break the curve.
    ok = np.isfinite(speed) & np.isfinite(freq) & np.isfinite(log_dec) & (whirl != "")
    keys = [(str(whirl[i]), st.log_dec_class(float(log_dec[i]))) for i in range(n)]
    i = 0
    while i < n:
        if not ok[i]:
            i += 1
            continue
        k = i
        while k + 1 < n and ok[k + 1] and keys[k + 1] == keys[i]:
            k += 1
        xs, ys = list(speed[i:k + 1]), list(freq[i:k + 1])
        if i > 0 and ok[i - 1]:
            xs.insert(0, 0.5 * (speed[i - 1] + speed[i]))
            ys.insert(0, 0.5 * (freq[i - 1] + freq[i]))
        if k + 1 < n and ok[k + 1]:
            xs.append(0.5 * (speed[k] + speed[k + 1]))
            ys.append(0.5 * (freq[k] + freq[k + 1]))
        label, cls = keys[i]
        line, = ax.plot(xs, ys, color=st.LOG_DEC_COLOURS[cls] if cls >= 0 else st.MUTED,
                        linestyle=st.WHIRL_STYLES.get(label, "-"), linewidth=1.8,
                        solid_capstyle="butt", dash_capstyle="butt", zorder=4)
        pieces.append(line)
        kinds.append(label)
        i = k + 1
    return pieces, kinds


def _draw_order(ax, order, x_lo, x_hi, top, out):
    xs = np.array([x_lo, x_hi])
    line, = ax.plot(xs, order * xs, color=st.MUTED, linewidth=0.9, zorder=2)
    # Label where the line leaves the frame: the right edge or the top.
    if order * x_hi <= top:
        x, y, ha, va = x_hi, order * x_hi, "right", "bottom"
        x -= 0.012 * (x_hi - x_lo)
        y = order * x
    else:
        y = 0.97 * top
        x, ha, va = y / order, "right", "center"
    text = ax.text(x, y, f" {order:g}X ", fontsize=st.FONT_TICK, color=st.INK, ha=ha, va=va,
                   zorder=5, bbox=dict(boxstyle="square,pad=0.12", facecolor=st.PAPER,
                                       edgecolor="none", alpha=0.85))
    out.order_lines.append(line)
    out.order_labels.append(text)


def _draw_operating(ax, operating, out):
    lo, hi = to_rpm(operating.min_speed), to_rpm(operating.max_speed)
    out.band = ax.add_patch(Rectangle((lo, 0.0), hi - lo, 1.0, transform=ax.get_xaxis_transform(),
                                      facecolor=st.BAND_FILL, edgecolor="none", zorder=1,
                                      label="operating range"))
    for x in (lo, hi):
        ax.axvline(x, color=st.BAND_EDGE, linewidth=0.9, zorder=1.5)
    marks = [(lo, f"{st.whole(lo)}"), (hi, f"{st.whole(hi)}")]
    if operating.trip_speed is not None:
        trip = to_rpm(operating.trip_speed)
        out.trip_line = ax.axvline(trip, color=st.BAND_EDGE, linewidth=0.9,
                                   linestyle=(0, (4, 2.5)), zorder=1.5)
        marks.append((trip, f"trip {st.whole(trip)}"))
    out.band_labels, rows = _edge_labels(ax, marks)
    return rows


def _edge_labels(ax, marks):
    """Labels just above the frame at data x positions, stacked where they would touch.

    Returns the texts and the number of rows used.
    """
    fig = ax.figure
    placed, texts = [], []
    to_px = ax.transData
    for x, text in marks:
        px = to_px.transform((x, 0.0))[0] * 72.0 / fig.dpi
        half = 0.30 * st.FONT_NOTE * len(text) + 2.0
        row = 0
        while any(r == row and abs(px - p) < half + h for p, h, r in placed):
            row += 1
        placed.append((px, half, row))
        texts.append(ax.annotate(text, xy=(x, 1.0), xycoords=("data", "axes fraction"),
                                 xytext=(0, 3 + 10 * row), textcoords="offset points",
                                 ha="center", va="bottom", fontsize=st.FONT_NOTE,
                                 color=st.BAND_EDGE, annotation_clip=False))
    return texts, 1 + max((r for _, _, r in placed), default=-1)


def _short_whirl(label):
    return {"forward": "fwd", "backward": "bwd", "mixed": "mixed"}.get(label, label)


def _legend(ax, orders, operating, criticals, verdicts, margins, out):
    """One key beside the axes: whirl styles, damping colours, ranges, criticals."""
    handles, labels, headers = [], [], []

    def header(text):
        headers.append(len(labels))
        handles.append(Line2D([], [], linestyle="none"))
        labels.append(text)

    header("Whirl")
    for name in st.WHIRL_ORDER:
        handles.append(Line2D([], [], color=st.INK, linewidth=1.8,
                              linestyle=st.WHIRL_STYLES[name]))
        labels.append(name)
    header("Log decrement \u03b4")
    for colour, text in zip(st.LOG_DEC_COLOURS, st.LOG_DEC_LABELS):
        handles.append(Line2D([], [], color=colour, linewidth=3.0))
        labels.append(text)
    header("Lines")
    handles.append(Line2D([], [], color=st.MUTED, linewidth=0.9))
    labels.append("excitation " + ", ".join(f"{o:g}X" for o in orders))
    if operating is not None:
        handles.append(Patch(facecolor=st.BAND_FILL, edgecolor=st.BAND_EDGE, linewidth=0.8))
        labels.append("operating range")
        if operating.trip_speed is not None:
            handles.append(Line2D([], [], color=st.BAND_EDGE, linewidth=0.9,
                                  linestyle=(0, (4, 2.5))))
            labels.append("trip speed")
    if criticals:
        header("Critical speeds" + (" (verdict)" if margins is not None else ""))
        listed = list(zip(criticals, verdicts))
        if len(listed) > MAX_LISTED:
            listed = listed[:MAX_LISTED - 1]
        for crit, verdict in listed:
            style = st.VERDICT_STYLES.get(verdict, st.NEUTRAL_MARKER)
            handles.append(Line2D([], [], linestyle="none", marker=style["marker"],
                                  markersize=6.5, markerfacecolor=style["facecolor"],
                                  markeredgecolor=st.INK, markeredgewidth=0.8))
            text = (f"{st.whole(to_rpm(crit.speed))} rpm  {crit.order:g}X "
                    f"{_short_whirl(crit.whirl)}  \u03b4 {st.log_dec_text(crit.log_dec, 2)}")
            if verdict is not None:
                text += f"  {verdict}"
            labels.append(text)
        if len(criticals) > len(listed):
            handles.append(Line2D([], [], linestyle="none"))
            labels.append(f"... and {len(criticals) - len(listed)} more")
    if out.hidden_branches:
        n = out.hidden_branches
        handles.append(Line2D([], [], linestyle="none"))
        labels.append(f"{n} branch{'es' if n > 1 else ''} above "
                      f"{st.whole(out.freq_max)} cpm not shown")
    size = st.FONT_NOTE + 0.5
    length, pad = 2.6, 0.6
    legend = ax.legend(handles, labels, loc="upper left", bbox_to_anchor=(1.02, 1.0),
                       borderaxespad=0.0, frameon=False, fontsize=size,
                       handlelength=length, handletextpad=pad, labelspacing=0.35)
    # Headers start where the handles do: shift them left by the handle's room,
    # in inches so the shift holds at any resolution.
    shift = ScaledTranslation(-(length + pad) * size / 72.0, 0.0, ax.figure.dpi_scale_trans)
    for i, text in enumerate(legend.get_texts()):
        text.set_color(st.INK)
        if i in headers:
            text.set_fontweight("bold")
            text.set_transform(text.get_transform() + shift)
    if out.hidden_branches:
        legend.get_texts()[-1].set_color(st.MUTED)
    return legend


# Candidate label offsets from a marker, points: beside first, then further out.
_OFFSETS = [(7, 6), (7, -13), (-7, 6), (-7, -13), (9, 18), (9, -25), (-9, 18), (-9, -25),
            (12, 30), (12, -37), (-12, 30), (-12, -37)]


def _text_box(ax, text):
    """Estimated box (points) of a text placed in data coordinates."""
    x, y = np.asarray(ax.transData.transform(text.get_position())) * 72.0 / ax.figure.dpi
    w, h = 0.6 * text.get_fontsize() * len(text.get_text()), 1.3 * text.get_fontsize()
    x0 = {"left": x, "center": x - w / 2, "right": x - w}[text.get_horizontalalignment()]
    y0 = {"bottom": y, "center": y - h / 2, "top": y - h}.get(text.get_verticalalignment(), y)
    return (x0, y0, x0 + w, y0 + h)


def _label_criticals(ax, criticals, avoid=()):
    """Speed labels beside the critical markers, moved aside where they would overlap.

    Criticals whose markers all but coincide (a forward and backward pair at
    one frequency, say) share one label, "926 / 929".  Texts in ``avoid``
    (the order labels) are kept clear too.
    """
    fig = ax.figure
    scale = 72.0 / fig.dpi
    points = [np.asarray(ax.transData.transform(
        (to_rpm(c.speed), to_rpm(c.eigenvalue.imag)))) * scale for c in criticals]
    box = ax.get_window_extent()
    frame = (box.x0 * scale, box.y0 * scale, box.x1 * scale, box.y1 * scale)
    taken = [(p[0] - 4, p[1] - 4, p[0] + 4, p[1] + 4) for p in points]
    taken += [_text_box(ax, text) for text in avoid]

    groups = []
    for k in sorted(range(len(criticals)), key=lambda k: criticals[k].speed):
        for group in groups:
            if np.hypot(*(points[group[0]] - points[k])) < _COINCIDE:
                group.append(k)
                break
        else:
            groups.append([k])

    labels = []
    for group in groups:
        p = points[group[0]]
        text = " / ".join(st.whole(to_rpm(criticals[k].speed)) for k in group)
        w, h = 0.56 * st.FONT_NOTE * len(text) + 3, 1.3 * st.FONT_NOTE
        choice = None
        for dx, dy in _OFFSETS:
            x0 = p[0] + dx if dx > 0 else p[0] + dx - w
            rect = (x0, p[1] + dy, x0 + w, p[1] + dy + h)
            inside = (rect[0] >= frame[0] and rect[2] <= frame[2] and rect[1] >= frame[1]
                      and rect[3] <= frame[3])
            if inside and not any(_overlap(rect, t) for t in taken):
                choice = (dx, dy, rect)
                break
        if choice is None:
            dx, dy = _OFFSETS[0]
            choice = (dx, dy, (p[0] + dx, p[1] + dy, p[0] + dx + w, p[1] + dy + h))
        dx, dy, rect = choice
        taken.append(rect)
        crit = criticals[group[0]]
        far = abs(dy) > 15
        labels.append(ax.annotate(
            text, xy=(to_rpm(crit.speed), to_rpm(crit.eigenvalue.imag)), xytext=(dx, dy + h / 2),
            textcoords="offset points", ha="left" if dx > 0 else "right", va="center",
            fontsize=st.FONT_NOTE, color=st.INK, zorder=7,
            bbox=dict(boxstyle="round,pad=0.15", facecolor=st.PAPER, edgecolor="none",
                      alpha=0.85),
            arrowprops=dict(arrowstyle="-", color=st.MUTED, linewidth=0.6,
                            shrinkA=0, shrinkB=4) if far else None))
    return labels


#: Markers closer than this (points) share one label.
_COINCIDE = 7.0


def _overlap(a, b):
    return not (a[2] <= b[0] or b[2] <= a[0] or a[3] <= b[1] or b[3] <= a[1])
