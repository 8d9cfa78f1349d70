"""Whirl-speed map: damped natural frequencies against spin speed."""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np
from matplotlib.lines import Line2D

from . import _labels as lb
from . import _style as st
from ._artists import WhirlMapArtists
from ._units import to_rpm

#: Room above the synchronous line at the top of the sweep.
HEADROOM = 1.1
#: Longest list of critical speeds in the key; the rest are counted.
MAX_LISTED = 16


@dataclass(frozen=True)
class SpeedMapArtists(WhirlMapArtists):
    """What :func:`whirl_speed_map` drew (and ``figure``, ``ax``, ``legend`` as every picture).

    Attributes
    ----------
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
    freq_max : float
        Upper limit of the frequency axis, cpm.
    hidden_branches : int
        Branches lying wholly above ``freq_max``.
    unstable_labels : list of Annotation
        The word "unstable" at the start of every stretch of a branch whose log
        decrement is below zero (colour alone does not say it in black and white).
    """

    critical_markers: list = field(default_factory=list)
    critical_labels: list = field(default_factory=list)
    unstable_labels: list = field(default_factory=list)


@st.literal_text
def plot_whirl_speed_map(sweep, criticals=(), operating=None, orders=(1.0,), *, ax=None,
                    margins=None, freq_max=None, title=None):
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
    title : str, optional
        What the map is of (the rotor's name), after "Whirl-speed map: ".

    Returns
    -------
    SpeedMapArtists
        The figure, the axes and the artists drawn.
    """
    fig, ax, created = st.axes_for(ax, figsize=(10.0, 6.0))
    if created:
        fig.subplots_adjust(left=0.08, right=0.70, bottom=0.10, top=0.86)
    st.style_axes(ax)
    speed, freq, log_dec, whirl = _in_rpm(sweep)
    orders = tuple(float(o) for o in orders)
    criticals = list(criticals)
    if margins is not None and not criticals:
        criticals = [row.critical for row in margins.rows]
    verdicts = _verdicts(criticals, margins)
    x_lo, x_hi, top = _limits(ax, speed, freq, criticals, operating, freq_max)
    band = trip_line = None
    band_labels, label_rows = [], 0
    if operating is not None:
        band, trip_line, marks = st.operating_band(ax, operating, label="operating range")
        band_labels, label_rows = lb.edge_labels(ax, marks, rough=True)
    order_lines, order_labels = [], []
    for order in orders:
        line, text = st.order_line(ax, order, x_lo, x_hi, top)
        order_lines.append(line)
        order_labels.append(text)
    branches, branch_whirl, hidden, unstable = _draw_branches(ax, speed, freq, log_dec, whirl,
                                                              top)
    markers = _critical_markers(ax, criticals, verdicts)
    st.label_axes(ax, "Spin speed (rpm)", "Damped natural frequency (cpm)")
    # Room for the range labels above the frame.
    ax.set_title("Whirl-speed map" + ("" if not title else f": {title}"),
                 fontsize=st.FONT_TITLE, color=st.INK, loc="left", pad=6 + 10 * label_rows)
    legend = _legend(ax, orders, operating, criticals, verdicts, margins, hidden, top)
    labels = _label_criticals(ax, criticals, order_labels)
    return SpeedMapArtists(
        figure=fig, ax=ax, branches=branches, branch_whirl=branch_whirl,
        order_lines=order_lines, order_labels=order_labels, band=band, band_labels=band_labels,
        trip_line=trip_line, critical_markers=markers, critical_labels=labels, legend=legend,
        freq_max=top, hidden_branches=hidden, unstable_labels=unstable)


def _in_rpm(sweep):
    """The sweep's speeds (rpm), frequencies (cpm), log decrements and whirl labels."""
    return (to_rpm(np.asarray(sweep.speeds, dtype=float)),
            to_rpm(np.asarray(sweep.frequency, dtype=float)),
            np.asarray(sweep.log_dec, dtype=float), np.asarray(sweep.whirl))


def _limits(ax, speed, freq, criticals, operating, freq_max):
    """Speed axis from 0 to the end of the sweep (or past the trip speed when the sweep
    stops short of it), frequency axis to :func:`frequency_top`; ``(x_lo, x_hi, top)``."""
    x_lo, x_hi = (float(np.nanmin(speed)), float(np.nanmax(speed))) if speed.size else (0.0, 1.0)
    x_lo = min(x_lo, 0.0)
    if operating is not None:
        # a sweep that stops short of trip shows it: the axis reaches trip, the curves do not
        top_speed = to_rpm(operating.trip_speed or operating.max_speed)
        x_hi = max(x_hi, 1.03 * float(top_speed))
    top = frequency_top([freq], x_hi, criticals) if freq_max is None else float(freq_max)
    ax.set_xlim(x_lo, x_hi)
    ax.set_ylim(0.0, top)
    return x_lo, x_hi, top


def _draw_branches(ax, speed, freq, log_dec, whirl, top):
    """Every branch, and the word "unstable" where one is: the pieces and whirl labels
    per branch, the number of branches wholly above ``top`` and the words."""
    branches, branch_whirl = [], []
    for j in range(freq.shape[1] if freq.ndim == 2 else 0):
        pieces, kinds = _draw_branch(ax, speed, freq[:, j], log_dec[:, j], whirl[:, j])
        branches.append(pieces)
        branch_whirl.append(kinds)
    hidden = 0
    if freq.size:
        # Branches that exist somewhere in the sweep but never come below the top.
        present = np.isfinite(freq) & np.isfinite(log_dec)
        lowest = np.where(present, freq, np.inf).min(axis=0)
        hidden = int(np.sum(np.isfinite(lowest) & (lowest > top)))
    unstable = []
    for j in range(freq.shape[1] if freq.ndim == 2 else 0):
        unstable.extend(_label_unstable(ax, speed, freq[:, j], log_dec[:, j], top))
    return branches, branch_whirl, hidden, unstable


def _critical_markers(ax, criticals, verdicts):
    """A marker per critical speed, shaped and coloured by its verdict."""
    markers = []
    for crit, verdict in zip(criticals, verdicts):
        style = st.VERDICT_STYLES.get(verdict, st.NEUTRAL_MARKER)
        marker, = ax.plot([to_rpm(crit.speed)], [to_rpm(crit.eigenvalue.imag)],
                          linestyle="none", marker=style["marker"], markersize=7.5,
                          markerfacecolor=style["facecolor"], markeredgecolor=st.INK,
                          markeredgewidth=0.9, clip_on=True,
                          # Hollow markers on top, so a filled one beneath stays visible.
                          zorder=6.5 if style["facecolor"] == "none" else 6)
        markers.append(marker)
    return markers


def _label_unstable(ax, speed, freq, log_dec, top):
    """"unstable" in words at the start of each stretch with a negative log decrement."""
    bad = np.isfinite(freq) & np.isfinite(log_dec) & (log_dec < 0) & (freq <= top)
    out = []
    for k in np.nonzero(bad & ~np.concatenate([[False], bad[:-1]]))[0]:
        out.append(ax.annotate(
            "unstable", (speed[k], freq[k]), xytext=(4, 5), textcoords="offset points",
            fontsize=st.FONT_NOTE, color=st.LOG_DEC_COLOURS[0], fontweight="bold",
            zorder=7, clip_on=True))
    return out


def _verdicts(criticals, margins):
    if margins is None:
        return [None] * len(criticals)
    by_id = {id(row.critical): row.verdict for row in margins.rows}
    by_key = {(round(row.critical.speed, 6), row.critical.order, row.critical.branch): row.verdict
              for row in margins.rows}
    return [by_id.get(id(c), by_key.get((round(c.speed, 6), c.order, c.branch), "not judged"))
            for c in criticals]


def frequency_top(freqs, x_hi, criticals):
    """Top of a whirl-speed map's frequency axis, cpm.

    The highest of 1.1 x the 1X line at the end of the sweep (``x_hi``, rpm),
    1.15 x the median frequency of the two lowest branches of each sweep in
    ``freqs`` (cpm, speeds by branches) and 1.08 x the highest critical
    frequency.  The synchronous line sets the scale whatever orders are drawn:
    higher-order lines simply leave through the top, and their criticals count.
    """
    need = [HEADROOM * x_hi]
    for freq in freqs:
        if freq.ndim == 2 and freq.size:
            finite = np.where(np.isfinite(freq), freq, np.nan)
            medians = np.sort([np.nanmedian(col) for col in finite.T if np.isfinite(col).any()])
            if medians.size:
                need.append(1.15 * float(medians[:2].max()))
    need.extend(1.08 * float(to_rpm(c.eigenvalue.imag)) for c in criticals)
    top = max(need)
    return top if np.isfinite(top) and top > 0 else 1.0


def branch_runs(speed, freq, ok, keys):
    """Pieces ``(xs, ys, key)`` of a branch: one per run of points with equal keys.

    Each sweep point owns the curve from the midpoint before it to the midpoint
    after it, so a change of key falls half-way between two speeds and dashes
    stay continuous within a run.  Points that are not ``ok`` break the curve.
    """
    n = len(speed)
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
        yield xs, ys, keys[i]
        i = k + 1


def _draw_branch(ax, speed, freq, log_dec, whirl):
    """One branch as runs of equal (whirl label, damping class)."""
    pieces, kinds = [], []
    # Absent points (NaN eigenvalue, no whirl label) break the curve.
    ok = np.isfinite(speed) & np.isfinite(freq) & np.isfinite(log_dec) & (whirl != "")
    keys = [(str(w), st.log_dec_class(float(d))) for w, d in zip(whirl, log_dec)]
    for xs, ys, (label, cls) in branch_runs(speed, freq, ok, keys):
        line, = ax.plot(xs, ys, color=st.LOG_DEC_COLOURS[cls] if cls >= 0 else st.MUTED,
                        linestyle=st.WHIRL_STYLES.get(label, "-"), linewidth=1.8,
                        solid_capstyle="butt", dash_capstyle="butt", zorder=4)
        pieces.append(line)
        kinds.append(label)
    return pieces, kinds


def _legend(ax, orders, operating, criticals, verdicts, margins, hidden, top):
    """One key beside the axes: whirl styles, damping colours, ranges, criticals."""
    key = lb.Key()
    key.header("Whirl")
    for name in st.WHIRL_ORDER:
        key.add(Line2D([], [], color=st.INK, linewidth=1.8, linestyle=st.WHIRL_STYLES[name]),
                name)
    key.header("Log decrement \u03b4")
    for colour, text in zip(st.LOG_DEC_COLOURS, st.LOG_DEC_LABELS):
        key.add(Line2D([], [], color=colour, linewidth=3.0), text)
    key.lines(orders, operating)
    if criticals:
        key.header("Critical speeds" + (" (verdict)" if margins is not None else ""))
        listed = list(zip(criticals, verdicts))
        if len(listed) > MAX_LISTED:
            listed = listed[:MAX_LISTED - 1]
        for crit, verdict in listed:
            style = st.VERDICT_STYLES.get(verdict, st.NEUTRAL_MARKER)
            text = (f"{st.whole(to_rpm(crit.speed))} rpm  {crit.order:g}X "
                    f"{st.short_whirl(crit.whirl)}  \u03b4 {st.log_dec_text(crit.log_dec, 2)}")
            if verdict is not None:
                text += f"  {verdict}"
            key.add(Line2D([], [], linestyle="none", marker=style["marker"], markersize=6.5,
                           markerfacecolor=style["facecolor"], markeredgecolor=st.INK,
                           markeredgewidth=0.8), text)
        more = len(criticals) - len(listed)
        if more:
            key.add(Line2D([], [], linestyle="none"), f"... and {more} more")
    if hidden:
        key.note(f"{hidden} branch{'es' if hidden > 1 else ''} above {st.whole(top)} cpm not shown")
    return lb.legend_beside(ax, key, x=1.02)


# Candidate label offsets from a marker, points: beside first, then further out.
_OFFSETS = [(7, 6), (7, -13), (-7, 6), (-7, -13), (9, 18), (9, -25), (-9, 18), (-9, -25),
            (12, 30), (12, -37), (-12, 30), (-12, -37)]
#: Markers closer than this (points) share one label.
_COINCIDE = 7.0


def _text_box(ax, text):
    """Estimated box (points) of a text placed in data coordinates."""
    x, y = lb.points(ax, text.get_position())
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
    xy = [(to_rpm(c.speed), to_rpm(c.eigenvalue.imag)) for c in criticals]
    at = [lb.points(ax, p) for p in xy]
    frame = lb.frame(ax)
    taken = [(p[0] - 4, p[1] - 4, p[0] + 4, p[1] + 4) for p in at]
    taken += [_text_box(ax, text) for text in avoid]
    order = sorted(range(len(criticals)), key=lambda k: criticals[k].speed)
    labels = []
    for group in lb.coinciding(at, order, _COINCIDE):
        text = " / ".join(st.whole(to_rpm(criticals[k].speed)) for k in group)
        w, h = 0.56 * st.FONT_NOTE * len(text) + 3, 1.3 * st.FONT_NOTE
        dx, dy, rect = lb.first_fit(at[group[0]], w, h, _OFFSETS, taken, frame)
        taken.append(rect)
        labels.append(lb.leader_label(ax, text, xy[group[0]], (dx, dy + h / 2), abs(dy) > 15))
    return labels
