"""What-if pictures: the critical-speed map, variants' whirl-speed maps overlaid, and
the mode shapes at chosen map points.

They draw results of :mod:`rotorcalc.analysis.csmap` and
:mod:`rotorcalc.analysis.whatif` as they are; the arithmetic here is for
drawing only (rpm, mm, klbf/in, label positions).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from matplotlib.lines import Line2D
from matplotlib.patches import Patch, Rectangle
from matplotlib.ticker import FuncFormatter, NullFormatter

from ..units import to_rpm
from . import _labels as lb
from . import _style as st
from ._geometry import snapshot
from .speedmap import branch_runs, frequency_top
from ..errors import InputError

#: N/m per klbf/in (1 lbf = 4.4482216152605 N, 1 in = 0.0254 m), for the top axis.
N_PER_KLBF_IN = 4.4482216152605e3 / 0.0254

#: One colour per bearing on the map, one per variant on the overlaid maps
#: (the base in ink), one per curve of the map shapes.
BEARING_COLOURS = ("#2d6fb4", "#c8571b", "#7a4fa0", "#2f8f9d", "#8c6d1f", "#b1172f")
VARIANT_COLOURS = (st.INK, "#2d6fb4", "#c8571b", "#7a4fa0", "#2f8f9d", "#8c6d1f", "#b1172f")
SHAPE_COLOURS = ("#2d6fb4", "#c8571b", "#3a9467", "#7a4fa0", "#b1172f", "#8c6d1f")
SHAPE_STYLES = ("-", (0, (5.0, 2.2)), (0, (1.2, 1.6)), (0, (6.0, 2.0, 1.2, 2.0)))
#: Map shapes closer than this (largest difference, normalised) are drawn one thin on top.
SHAPE_SAME = 0.03

#: A bearing's two direct coefficients as line styles (the map has no whirl styles).
DIRECTION_STYLES = {"kxx": "-", "kyy": (0, (3.2, 1.8))}

#: The stiffness window that keeps the margins: a pale blue, see-through band.
WINDOW_FILL = "#c9dbef"
WINDOW_ALPHA = 0.55
WINDOW_EDGE = "#3b6797"
#: The note that the base stiffness does not keep the margins.
FAIL = "#b1172f"

#: Room above the highest speed of interest (trip speed, bearing curves, crossings).
HEADROOM = 1.15
#: Markers closer than this (points) share one label.
COINCIDE = 12.0
#: Longest list of critical speeds per variant in the key; the rest are counted.
MAX_LISTED = 9


# --- results ------------------------------------------------------------------------

@dataclass(frozen=True)
class CriticalMapArtists:
    """What :func:`critical_speed_map` drew.

    Attributes
    ----------
    figure : matplotlib.figure.Figure
    ax : Axes
        Support stiffness (N/m, log scale) across, critical speed (rpm) up.
    stiffness_axis : SecondaryAxis
        The same stiffness in klbf/in along the top.
    modes : tuple of Line2D
        One critical-speed curve per mode, mode 1 first (NaN where absent).
    mode_labels : tuple of Text
        ``"mode 1"`` ... beside each curve that shows in the frame (modes
        wholly above the frame have none).
    curves : tuple of Line2D
        One per :class:`~rotorcalc.analysis.csmap.BearingCurve`, in the
        order of ``cmap.curves``.
    crossings : tuple of Line2D
        One marker per crossing, in the order of ``cmap.crossings``.
    crossing_labels : tuple of Annotation
        Their speeds in rpm, one label per group of all but coinciding markers.
    band : Rectangle or None
        The operating range (y in rpm, full width).
    band_labels : tuple of Annotation
        The speeds of the range's ends and the trip speed, right of the frame.
    trip_line : Line2D or None
    window_band : Rectangle or None
        The stiffness band that keeps the margins (x in N/m, full height).
    window_labels : tuple of Text
        "margins kept" and the text at each end of the band.
    window_markers : tuple of Line2D
        The limiting critical speed at each finite end of the band.
    window_arrows : tuple of Annotation
        An arrow pointing on from each end the search did not reach.
    base_line : Line2D or None
        The bearings' stiffness at the maximum continuous speed (x1).
    legend : Legend
    speed_max : float
        Upper limit of the speed axis, rpm.
    hidden_modes : int
        Modes lying wholly above ``speed_max``.
    """

    figure: object
    ax: object
    stiffness_axis: object
    modes: tuple
    mode_labels: tuple
    curves: tuple
    crossings: tuple
    crossing_labels: tuple
    band: object
    band_labels: tuple
    trip_line: object
    window_band: object
    window_labels: tuple
    window_markers: tuple
    window_arrows: tuple
    base_line: object
    legend: object
    speed_max: float
    hidden_modes: int


@dataclass(frozen=True)
class VariantMapArtists:
    """What :func:`variant_maps` drew.

    Attributes
    ----------
    figure : matplotlib.figure.Figure
    ax : Axes
        Spin speed (rpm) across, damped natural frequency (cpm) up.
    names : tuple of str
        The base and the variants, in the order of the comparison.
    colours : tuple of str
        The colour of each, parallel to ``names``.
    branches : tuple of tuple of Line2D
        Per variant, the pieces of all its branches (one piece per run of
        equal whirl label).
    branch_whirl : tuple of tuple of str
        The whirl label of each piece, parallel to ``branches``.
    critical_markers : tuple of tuple of Line2D
        Per variant, one marker per critical speed of its screening.
    order_lines, order_labels : tuple
        One excitation-order line and label per order.
    band : Rectangle or None
    band_labels : tuple of Annotation
    trip_line : Line2D or None
    legend : Legend
    freq_max : float
        Upper limit of the frequency axis, cpm.
    hidden_branches : int
        Branches (of all variants) lying wholly above ``freq_max``.
    """

    figure: object
    ax: object
    names: tuple
    colours: tuple
    branches: tuple
    branch_whirl: tuple
    critical_markers: tuple
    order_lines: tuple
    order_labels: tuple
    band: object
    band_labels: tuple
    trip_line: object
    legend: object
    freq_max: float
    hidden_branches: int


@dataclass(frozen=True)
class MapShapeArtists:
    """What :func:`map_shapes` drew.

    Attributes
    ----------
    figure : matplotlib.figure.Figure
    ax : Axes
    lines : tuple of Line2D
        One per shape, parallel to ``labels`` (empty for a shape that is
        absent, all NaN).
    station_lines : tuple of Line2D
    legend : Legend
    """

    figure: object
    ax: object
    lines: tuple
    station_lines: tuple
    legend: object


# --- the critical-speed map ---------------------------------------------------------------

@st.literal_text
def critical_speed_map(cmap, operating=None, window=None, base_stiffness=None, *, ax=None,
                       speed_max=None):
    """Draw a critical-speed map with the bearings' own stiffness curves on it.

    Each mode's undamped critical speed is drawn over the support stiffness
    (log scale, N/m along the bottom and klbf/in along the top), labelled
    "mode 1", "mode 2" ... beside the curve.  Each bearing's direct
    stiffness over speed is drawn on the same axes in its own colour (kxx
    solid, kyy dashed); where it crosses a mode curve the bearing produces
    that critical speed, marked (kxx filled, kyy open) and labelled in rpm.

    Parameters
    ----------
    cmap : rotorcalc.analysis.csmap.CriticalSpeedMap
    operating : OperatingRange, optional
        Drawn as a horizontal band from ``min_speed`` to ``max_speed``, the
        trip speed as a dashed line, their speeds labelled right of the frame.
    window : rotorcalc.analysis.whatif.StiffnessWindow, optional
        Drawn as a vertical band "margins kept" from
        ``base_stiffness * low.factor`` to ``base_stiffness * high.factor``,
        each finite end with its limiting critical speed marked and named; an
        end the search did not reach (factor None) stops at the searched
        factor with an arrow pointing on.  Needs ``base_stiffness``.
    base_stiffness : float, optional
        The stiffness, N/m, that the window's factors scale: the geometric
        mean of the bearings' direct stiffness at the maximum continuous
        speed.  Drawn as a dotted line "x1".
    ax : matplotlib.axes.Axes, optional
        Axes to draw on; a new figure is made when omitted.
    speed_max : float, optional
        Top of the speed axis, rpm.  By default 1.15 x the highest of the
        trip (or maximum) speed, the bearing curves, the crossings and the
        window's limiting criticals, raised to show the next mode above them
        at the bearings' stiffness when that is within twice as high, so the
        upper modes do not squash the map; modes wholly above are counted in
        the key.

    Returns
    -------
    CriticalMapArtists

    Raises
    ------
    ValueError
        When ``window`` is given without ``base_stiffness``, or
        ``base_stiffness`` is not a positive number.
    """
    if base_stiffness is not None:
        base_stiffness = float(base_stiffness)
        if not (math.isfinite(base_stiffness) and base_stiffness > 0):
            raise InputError("plot arguments", f"base_stiffness must be a positive stiffness in N/m, "
                             f"not {base_stiffness!r}", kind="option")
    if window is not None and base_stiffness is None:
        raise InputError("plot arguments", "a stiffness window is drawn at base_stiffness x its factors: "
                         "give base_stiffness (N/m) with the window", kind="option")
    fig, ax, created = st.axes_for(ax, figsize=(10.0, 6.2))
    if created:
        fig.subplots_adjust(left=0.08, right=0.66, bottom=0.10, top=0.83)
    st.style_axes(ax)

    k = np.asarray(cmap.stiffness, dtype=float)
    rpm = to_rpm(np.asarray(cmap.speeds, dtype=float))
    if rpm.ndim == 1:
        rpm = rpm[:, None]
    curves = tuple(cmap.curves)
    crossings = tuple(cmap.crossings)

    ax.set_xscale("log")
    finite_k = k[np.isfinite(k) & (k > 0)]
    k_lo, k_hi = (float(finite_k.min()), float(finite_k.max())) if finite_k.size else (1e6, 1e10)
    if k_hi <= k_lo:
        k_lo, k_hi = k_lo / 3.0, k_hi * 3.0
    ax.set_xlim(k_lo, k_hi)
    _plain_log_ticks(ax.xaxis, k_hi / k_lo)
    top = _speed_top(k, rpm, curves, crossings, operating, window) if speed_max is None \
        else float(speed_max)
    ax.set_ylim(0.0, top)
    ax.grid(True, which="minor", axis="x", color=st.GRID, linewidth=0.4, zorder=0)

    band = trip_line = None
    band_labels, side_width = (), 0.0
    if operating is not None:
        band, trip_line, marks = st.operating_band(ax, operating, axis="y")
        band_labels, side_width = _side_labels(ax, marks)

    # Bearing curves: one colour per bearing; a curve lying on an earlier one is drawn
    # thin on top of it, so both colours show.
    colour_of, aliases, curve_lines, boxes = {}, {}, [], []
    for i, c in enumerate(curves):
        colour = colour_of.setdefault(c.bearing,
                                      BEARING_COLOURS[len(colour_of) % len(BEARING_COLOURS)])
        xs, ys = np.asarray(c.stiffness, dtype=float), to_rpm(np.asarray(c.speeds, dtype=float))
        under = next((j for j in range(i) if _same_curve(curves[j], c)), None)
        width, z = (0.9, 3.3) if under is not None else (1.7, 3.0)
        line, = ax.plot(xs, ys, color=colour, linewidth=width,
                        linestyle=DIRECTION_STYLES.get(c.direction, "-"), zorder=z,
                        solid_capstyle="butt", dash_capstyle="butt")
        curve_lines.append(line)
        if under is not None:
            aliases.setdefault(c.bearing, []).append((c.direction, curves[under]))
        boxes += lb.line_boxes(ax, xs, ys)

    mode_lines = []
    for j in range(rpm.shape[1]):
        line, = ax.plot(k, rpm[:, j], color=st.INK, linewidth=1.9, zorder=4,
                        solid_capstyle="round")
        mode_lines.append(line)
        boxes += lb.line_boxes(ax, k, rpm[:, j])
    lowest = np.array([np.nanmin(col) if np.isfinite(col).any() else np.inf for col in rpm.T])
    hidden = int(np.sum(np.isfinite(lowest) & (lowest > top)))

    markers = []
    for c in crossings:
        colour = colour_of.get(c.bearing, st.MUTED)
        filled = c.direction != "kyy"
        marker, = ax.plot([c.stiffness], [to_rpm(c.speed)], linestyle="none", marker="o",
                          markersize=6.5, markerfacecolor=colour if filled else st.PAPER,
                          markeredgecolor=st.INK if filled else colour,
                          markeredgewidth=0.8 if filled else 1.4,
                          zorder=6 if filled else 6.2)
        markers.append(marker)

    base_line = None
    if base_stiffness is not None:
        base_line = ax.axvline(base_stiffness, color=WINDOW_EDGE, linewidth=0.9,
                               linestyle=(0, (1.0, 1.8)), zorder=2.5)
    window_band, window_labels, window_markers, window_arrows = None, (), (), ()
    taken = []
    if window is not None:
        window_band, window_labels, window_markers, window_arrows, taken = _draw_window(
            ax, window, base_stiffness, top, boxes)
    elif base_line is not None:
        taken = [_base_tag(ax, base_stiffness, "\u00d71", WINDOW_EDGE, boxes)]

    taken = [t for t in taken if t is not None]
    mode_labels = _label_modes(ax, k, rpm, top, boxes, taken)
    crossing_labels = _label_crossings(ax, crossings, boxes, taken)

    st.label_axes(ax, "Support stiffness (N/m)", "Critical speed (rpm)")
    stiffness_axis = ax.secondary_xaxis("top", functions=(_to_klbf_in, _from_klbf_in))
    _plain_log_ticks(stiffness_axis.xaxis, k_hi / k_lo)
    stiffness_axis.tick_params(colors=st.INK, labelsize=st.FONT_TICK, length=3.5, width=0.7)
    stiffness_axis.tick_params(which="minor", length=2.0, width=0.5)
    stiffness_axis.spines["top"].set_color(st.FAINT)
    stiffness_axis.set_xlabel("Support stiffness (klbf/in)", fontsize=st.FONT_LABEL - 0.5,
                              color=st.MUTED, labelpad=4)
    ax.set_title("Critical-speed map", fontsize=st.FONT_TITLE, color=st.INK, loc="left",
                 pad=36)

    legend = _map_legend(ax, cmap.whirl, curves, colour_of, aliases, crossings, operating, window,
                         base_stiffness, hidden, top, side_width)
    return CriticalMapArtists(
        figure=fig, ax=ax, stiffness_axis=stiffness_axis, modes=tuple(mode_lines),
        mode_labels=tuple(mode_labels), curves=tuple(curve_lines), crossings=tuple(markers),
        crossing_labels=tuple(crossing_labels), band=band, band_labels=tuple(band_labels),
        trip_line=trip_line, window_band=window_band, window_labels=tuple(window_labels),
        window_markers=tuple(window_markers), window_arrows=tuple(window_arrows),
        base_line=base_line, legend=legend, speed_max=top, hidden_modes=hidden)


_SUPERSCRIPT = str.maketrans("-0123456789", "\u207b\u2070\u00b9\u00b2\u00b3\u2074\u2075\u2076"
                                            "\u2077\u2078\u2079")


def _power_text(value):
    """``1e8`` as "10⁸" and ``2e8`` as "2×10⁸", in plain text (no math parser needed)."""
    if not (math.isfinite(value) and value > 0):
        return ""
    mantissa, exponent = f"{value:.0e}".split("e")
    power = "10" + str(int(exponent)).translate(_SUPERSCRIPT)
    return power if mantissa == "1" else f"{mantissa}\u00d7{power}"


def _plain_log_ticks(axis, ratio):
    """Decade labels as plain text; in-between labels too when the axis spans under
    two decades (``ratio``, top over bottom), where decades alone are too few to read by."""
    axis.set_major_formatter(FuncFormatter(lambda v, _: _power_text(v)))
    if ratio < 100.0:
        axis.set_minor_formatter(FuncFormatter(lambda v, _: _power_text(v)))
    else:
        axis.set_minor_formatter(NullFormatter())


def _to_klbf_in(k):
    return np.asarray(k, dtype=float) / N_PER_KLBF_IN


def _from_klbf_in(q):
    return np.asarray(q, dtype=float) * N_PER_KLBF_IN


def _same_curve(a, b):
    sa, sb = np.asarray(a.speeds, dtype=float), np.asarray(b.speeds, dtype=float)
    ka, kb = np.asarray(a.stiffness, dtype=float), np.asarray(b.stiffness, dtype=float)
    return (sa.shape == sb.shape and ka.shape == kb.shape
            and np.allclose(sa, sb, rtol=1e-9, atol=0.0)
            and np.allclose(ka, kb, rtol=1e-6, atol=0.0))


def _speed_top(stiffness, rpm, curves, crossings, operating, window):
    need = []
    if operating is not None:
        need.append(to_rpm(operating.trip_speed if operating.trip_speed is not None
                           else operating.max_speed))
    for c in curves:
        s = to_rpm(np.asarray(c.speeds, dtype=float))
        s = s[np.isfinite(s)]
        if s.size:
            need.append(float(s.max()))
    need.extend(float(to_rpm(c.speed)) for c in crossings)
    if window is not None:
        need.extend(float(to_rpm(e.limiting.speed)) for e in (window.low, window.high)
                    if e.limiting is not None and e.factor is not None)
    # the next mode above all that, where the bearings are, unless it is far above
    if curves and need:
        rest = max(need)
        above = []
        for j in range(rpm.shape[1]):
            for c in curves:
                s = np.asarray(c.stiffness, dtype=float)
                s = s[np.isfinite(s) & (s > 0)]
                for value in (s.min(), s.max()) if s.size else ():
                    at = _mode_at(stiffness, rpm[:, j], value)
                    if at is not None and rest < at <= 2.0 * rest:
                        above.append((j, at))
        if above:
            first = min(j for j, _ in above)
            need.append(max(at for j, at in above if j == first))
    present = [col[np.isfinite(col)] for col in rpm.T]
    present = [col for col in present if col.size]
    if present and not need:
        # nothing else to go by: the two lowest modes, as the single whirl-speed map does
        need.append(max(float(np.median(col)) for col in present[:2]))
    elif present:
        # at least part of the lowest mode shows, whatever the rest asks
        need.append(float(present[0].min()) * 1.25 / HEADROOM)
    top = HEADROOM * max(need) if need else 1.0
    return top if math.isfinite(top) and top > 0 else 1.0


def _mode_at(stiffness, rpm, value):
    """A mode curve's speed at one stiffness (log interpolation); None outside or absent."""
    ok = np.isfinite(rpm) & np.isfinite(stiffness) & (stiffness > 0)
    if ok.sum() < 2:
        return None
    x, y = np.log(stiffness[ok]), rpm[ok]
    v = math.log(value)
    if not x.min() <= v <= x.max():
        return None
    order = np.argsort(x)
    return float(np.interp(v, x[order], y[order]))


def _side_labels(ax, marks):
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


def _draw_window(ax, window, base, top, lines):
    """The band of stiffness that keeps the margins, its ends named.

    Returns the band, its texts, the limiting markers, the arrows of open ends and
    the boxes (points) the texts take, for the other labels to avoid.
    """
    texts, markers, arrows, taken = [], [], [], []
    x_lo, x_hi = ax.get_xlim()
    factors = np.asarray(window.factors, dtype=float)
    factors = factors[np.isfinite(factors) & (factors > 0)]
    taken.append(_base_tag(ax, base, "\u00d71", WINDOW_EDGE, lines))
    if not window.base_passes:
        crit = window.low.limiting or window.high.limiting
        text = "margins not kept at the bearings' own stiffness (\u00d71)"
        if crit is not None:
            text += f":\nthe {_critical_text(crit)} critical fails its margin"
        note = ax.text(0.015, 0.975, text, transform=ax.transAxes, ha="left", va="top",
                       fontsize=st.FONT_NOTE + 0.5, color=FAIL, zorder=8, linespacing=1.2,
                       bbox=dict(boxstyle="round,pad=0.3", facecolor=st.PAPER, edgecolor=FAIL,
                                 linewidth=0.6, alpha=0.92))
        texts.append(note)
        frame = lb.frame(ax)
        lines = text.split("\n")
        w = max(lb.text_width(t, st.FONT_NOTE + 0.5) for t in lines) + 8
        h = 1.25 * (st.FONT_NOTE + 0.5) * len(lines) + 8
        x0 = frame[0] + 0.015 * (frame[2] - frame[0])
        y1 = frame[1] + 0.975 * (frame[3] - frame[1])
        taken.append((x0, y1 - h, x0 + w, y1))
        return None, texts, markers, arrows, taken
    ends = []
    for end, searched, side in ((window.low, factors.min() if factors.size else 1.0, -1),
                                (window.high, factors.max() if factors.size else 1.0, +1)):
        f = end.factor if end.factor is not None else float(searched)
        ends.append((end, f, side))
    a, b = base * ends[0][1], base * ends[1][1]
    band = ax.add_patch(Rectangle((a, 0.0), b - a, 1.0, transform=ax.get_xaxis_transform(),
                                  facecolor=WINDOW_FILL, alpha=WINDOW_ALPHA, edgecolor="none",
                                  zorder=1.2))
    # "margins kept" over the middle of the visible part of the band
    va, vb = max(a, x_lo), min(b, x_hi)
    if vb > va:
        mid = math.sqrt(va * vb)
        texts.append(ax.annotate("margins kept", xy=(mid, 1.0), xycoords=("data", "axes fraction"),
                                 xytext=(0, -4), textcoords="offset points", ha="center",
                                 va="top", fontsize=st.FONT_NOTE + 0.5, color=WINDOW_EDGE,
                                 fontweight="bold", zorder=8,
                                 bbox=st.paper_box("square", 0.15, 0.8)))
        taken.append(_box_of(ax, mid, "margins kept", st.FONT_NOTE + 0.5, 10))
    for end, f, side in ends:
        x = base * f
        if not x_lo <= x <= x_hi:
            continue
        finite = end.factor is not None
        marked = None
        ax.axvline(x, color=WINDOW_EDGE, linewidth=1.0 if finite else 0.8,
                   linestyle="-" if finite else (0, (3, 2)), zorder=2.6)
        if finite:
            text = f"\u00d7{f:.3g}"
            if end.limiting is not None:
                text += f": limited by {_critical_text(end.limiting)}"
                y = float(to_rpm(end.limiting.speed))
                if 0 < y < top:
                    markers.append(ax.plot([x], [y], linestyle="none", marker="D",
                                           markersize=5.5, markerfacecolor=WINDOW_EDGE,
                                           markeredgecolor=st.PAPER, markeredgewidth=0.8,
                                           zorder=9)[0])
                    px, marked = (float(v) for v in lb.points(ax, (x, y)))
                    taken.append((px - 5, marked - 5, px + 5, marked + 5))
        else:
            text = f"\u00d7{f:.3g}, end of search: margins still kept"
            # an arrow on from the open end, near the bottom where the curves are sparse
            arrows.append(ax.annotate(
                "", xy=(x, 0.06), xycoords=("data", "axes fraction"), xytext=(24 * side, 0),
                textcoords="offset points", zorder=7, annotation_clip=False,
                arrowprops=dict(arrowstyle="<|-", color=WINDOW_EDGE, linewidth=1.1,
                                shrinkA=0, shrinkB=0, mutation_scale=10)))
        # Along the end line, inside the band, reading upwards from the bottom, clear
        # of the limiting marker where there is room above or below it.
        frame = lb.frame(ax)
        length = lb.text_width(text, st.FONT_NOTE)
        height = frame[3] - frame[1]
        y0 = frame[1] + 0.12 * height
        if marked is not None:
            ym = marked
            if y0 - 6 <= ym <= y0 + length + 6:
                if ym + 8 + length <= frame[3] - 22:
                    y0 = ym + 8
                elif ym - 8 - length >= frame[1] + 4:
                    y0 = ym - 8 - length
        texts.append(ax.annotate(text, xy=(x, (y0 - frame[1]) / height),
                                 xycoords=("data", "axes fraction"),
                                 xytext=(-3 * side, 0), textcoords="offset points",
                                 rotation=90, ha="left", va="bottom" if side > 0 else "top",
                                 rotation_mode="anchor", fontsize=st.FONT_NOTE,
                                 color=WINDOW_EDGE, zorder=8,
                                 bbox=st.paper_box("square", 0.1, 0.75)))
        px = float(lb.points(ax, (x, 1.0))[0])
        x0 = px - 3 - 1.3 * st.FONT_NOTE if side > 0 else px + 3
        taken.append((x0, y0, x0 + 1.3 * st.FONT_NOTE, y0 + length))
    return band, texts, markers, arrows, taken


def _base_tag(ax, x, text, colour, lines=()):
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


def _critical_text(crit):
    return f"{st.whole(to_rpm(crit.speed))} rpm {crit.order:g}X {st.short_whirl(crit.whirl)}"


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


def _label_crossings(ax, crossings, lines, taken):
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


def _label_modes(ax, k, rpm, top, lines, taken):
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


def _map_legend(ax, whirl, curves, colour_of, aliases, crossings, operating, window, base,
                hidden, top, side_width):
    n_curves = {}
    for c in curves:
        n_curves[c.bearing] = n_curves.get(c.bearing, 0) + 1
    key = lb.Key()
    key.header("Critical speeds")
    key.add(Line2D([], [], color=st.INK, linewidth=1.9), f"undamped, {whirl} whirl, per mode")
    key.note("every bearing an isotropic spring")
    if crossings:
        key.add(Line2D([], [], linestyle="none", marker="o", markersize=6,
                       markerfacecolor=st.MUTED, markeredgecolor=st.INK, markeredgewidth=0.8),
                "crossing with a kxx curve (rpm)")
        key.add(Line2D([], [], linestyle="none", marker="o", markersize=6,
                       markerfacecolor=st.PAPER, markeredgecolor=st.MUTED, markeredgewidth=1.4),
                "crossing with a kyy curve")
    if colour_of:
        key.header("Bearing stiffness over speed")
        for name, colour in colour_of.items():
            text = name
            same = aliases.get(name, [])
            others = {other.bearing for _, other in same}
            if same and len(same) == n_curves.get(name, 0) and len(others) == 1 \
                    and name not in others:
                text += f" (on {others.pop()}'s curves)"
            elif same:
                parts = []
                for direction, other in same:
                    if other.bearing == name:
                        parts.append(f"{direction} = {other.direction}")
                    else:
                        parts.append(f"{direction} as {other.bearing} {other.direction}")
                text += " (" + ", ".join(dict.fromkeys(parts)) + ")"
            key.add(Patch(facecolor=colour, edgecolor="none"), text)
        key.add(Line2D([], [], color=st.MUTED, linewidth=1.7, linestyle=DIRECTION_STYLES["kxx"]),
                "kxx (direct, horizontal)")
        key.add(Line2D([], [], color=st.MUTED, linewidth=1.7, linestyle=DIRECTION_STYLES["kyy"]),
                "kyy (direct, vertical)")
    if operating is not None or window is not None or base is not None:
        key.header("Ranges")
    if operating is not None:
        key.operating(operating)
    if window is not None and window.base_passes:
        key.add(Patch(facecolor=WINDOW_FILL, alpha=WINDOW_ALPHA, edgecolor=WINDOW_EDGE,
                      linewidth=0.8), f"margins kept, {window.target} scaled")
        if any(e.limiting is not None and e.factor is not None for e in (window.low, window.high)):
            key.add(Line2D([], [], linestyle="none", marker="D", markersize=5,
                           markerfacecolor=WINDOW_EDGE, markeredgecolor=st.PAPER),
                    "critical that limits the band")
    if base is not None:
        key.add(Line2D([], [], color=WINDOW_EDGE, linewidth=0.9, linestyle=(0, (1.0, 1.8))),
                "\u00d71: bearings at max. continuous speed")
    if hidden:
        key.note(f"{hidden} mode{'s' if hidden > 1 else ''} above {st.whole(top)} rpm "
                 "not shown")
    return lb.legend_beside(ax, key, offset=side_width + 12.0)


# --- variants' whirl-speed maps overlaid -------------------------------------------------

@st.literal_text
def variant_maps(comparison, operating=None, orders=(1.0,), *, ax=None, freq_max=None):
    """Overlay the whirl-speed maps of a base rotor and its variants.

    Each variant keeps one colour (the base in ink) for its branches and its
    critical speeds; the line style tells the whirl sense (solid forward,
    dashed backward, dotted mixed), changing half-way between two sweep
    speeds as on the single map.

    Parameters
    ----------
    comparison : rotorcalc.analysis.whatif.Comparison
    operating : OperatingRange, optional
        Shaded band with its ends labelled above the frame, trip speed dashed.
    orders : sequence of float
        Excitation orders drawn as lines ``frequency = order x speed``.
    ax : matplotlib.axes.Axes, optional
        Axes to draw on; a new figure is made when omitted.
    freq_max : float, optional
        Top of the frequency axis, cpm; by default as on the single map, taken
        over all variants (branches wholly above are counted in the key).

    Returns
    -------
    VariantMapArtists
    """
    names = tuple(comparison.names)
    screenings = tuple(comparison.screenings)
    if len(names) != len(screenings):
        raise InputError("plot arguments", f"the comparison has {len(names)} names but {len(screenings)} "
                         "screenings", kind="option")
    fig, ax, created = st.axes_for(ax, figsize=(10.0, 6.0))
    if created:
        fig.subplots_adjust(left=0.08, right=0.68, bottom=0.10, top=0.86)
    st.style_axes(ax)
    colours = tuple(VARIANT_COLOURS[i % len(VARIANT_COLOURS)] for i in range(len(names)))
    orders = tuple(float(o) for o in orders)

    data = []
    for s in screenings:
        sw = s.sweep
        data.append((to_rpm(np.asarray(sw.speeds, dtype=float)),
                     to_rpm(np.asarray(sw.frequency, dtype=float)), np.asarray(sw.whirl)))
    speeds = np.concatenate([d[0] for d in data]) if data else np.array([0.0, 1.0])
    speeds = speeds[np.isfinite(speeds)]
    x_lo = min(float(speeds.min()), 0.0) if speeds.size else 0.0
    x_hi = float(speeds.max()) if speeds.size else 1.0
    if x_hi <= x_lo:
        x_hi = x_lo + 1.0
    criticals = [c for s in screenings for c in s.criticals]
    top = frequency_top([freq for _, freq, _ in data], x_hi, criticals) if freq_max is None \
        else float(freq_max)
    ax.set_xlim(x_lo, x_hi)
    ax.set_ylim(0.0, top)

    band = trip_line = None
    band_labels, rows = (), 0
    if operating is not None:
        band, trip_line, marks = st.operating_band(ax, operating)
        band_labels, rows = lb.edge_labels(ax, marks)

    order_lines, order_labels = [], []
    for order in orders:
        line, text = st.order_line(ax, order, x_lo, x_hi, top)
        order_lines.append(line)
        order_labels.append(text)

    all_branches, all_kinds, all_markers = [], [], []
    hidden = 0
    for i, ((speed, freq, whirl), s) in enumerate(zip(data, screenings)):
        # the base on top, drawn a little heavier
        width, z = (2.0, 4.5) if i == 0 else (1.5, 4.0 + 0.01 * i)
        pieces, kinds = [], []
        if freq.ndim == 2:
            for j in range(freq.shape[1]):
                p, kd = _whirl_runs(ax, speed, freq[:, j], whirl[:, j], colours[i], width, z)
                pieces += p
                kinds += kd
            present = np.isfinite(freq)
            low = np.where(present, freq, np.inf).min(axis=0)
            hidden += int(np.sum(np.isfinite(low) & (low > top)))
        marks = []
        for c in s.criticals:
            marker, = ax.plot([to_rpm(c.speed)], [to_rpm(c.eigenvalue.imag)], linestyle="none",
                              marker="o", markersize=7.0, markerfacecolor=colours[i],
                              markeredgecolor=st.PAPER, markeredgewidth=1.0, zorder=6 + 0.01 * i)
            marks.append(marker)
        all_branches.append(tuple(pieces))
        all_kinds.append(tuple(kinds))
        all_markers.append(tuple(marks))

    st.label_axes(ax, "Spin speed (rpm)", "Damped natural frequency (cpm)")
    ax.set_title("Whirl-speed maps of the variants", fontsize=st.FONT_TITLE, color=st.INK,
                 loc="left", pad=6 + 10 * rows)

    legend = _variant_legend(ax, names, colours, screenings, orders, operating, hidden, top)
    return VariantMapArtists(
        figure=fig, ax=ax, names=names, colours=colours, branches=tuple(all_branches),
        branch_whirl=tuple(all_kinds), critical_markers=tuple(all_markers),
        order_lines=tuple(order_lines), order_labels=tuple(order_labels), band=band,
        band_labels=tuple(band_labels), trip_line=trip_line, legend=legend, freq_max=top,
        hidden_branches=hidden)


def _whirl_runs(ax, speed, freq, whirl, colour, width, z):
    """A branch as runs of equal whirl label, each change half-way between two speeds."""
    pieces, kinds = [], []
    ok = np.isfinite(speed) & np.isfinite(freq) & (whirl != "")
    for xs, ys, label in branch_runs(speed, freq, ok, whirl):
        label = str(label)
        line, = ax.plot(xs, ys, color=colour, linestyle=st.WHIRL_STYLES.get(label, "-"),
                        linewidth=width, solid_capstyle="butt", dash_capstyle="butt", zorder=z)
        pieces.append(line)
        kinds.append(label)
    return pieces, kinds


def _variant_legend(ax, names, colours, screenings, orders, operating, hidden, top):
    key = lb.Key()
    key.header("Variants: critical speeds (rpm)")
    for name, colour, s in zip(names, colours, screenings):
        crits = sorted(s.criticals, key=lambda c: c.speed)
        items = [f"{st.whole(to_rpm(c.speed))} {st.short_whirl(c.whirl)}" for c in crits]
        if len(items) > MAX_LISTED:
            items = items[:MAX_LISTED - 1] + [f"+{len(crits) - MAX_LISTED + 1} more"]
        rows = [", ".join(items[i:i + 3]) for i in range(0, len(items), 3)] or \
            ["none in the sweep"]
        head = name + ("  (a margin fails)" if not s.margins.passed else "")
        key.add(Line2D([], [], color=colour, linewidth=2.0 if name == names[0] else 1.5,
                       marker="o", markersize=6, markerfacecolor=colour,
                       markeredgecolor=st.PAPER), "\n".join([head] + rows))
    key.header("Whirl")
    for label in st.WHIRL_ORDER:
        key.add(Line2D([], [], color=st.MUTED, linewidth=1.6, linestyle=st.WHIRL_STYLES[label]),
                label)
    key.lines(orders, operating)
    if hidden:
        key.note(f"{hidden} branch{'es' if hidden > 1 else ''} above {st.whole(top)} cpm "
                 "not shown")
    return lb.legend_beside(ax, key, offset=10.0)


# --- mode shapes at map points ------------------------------------------------------------

@st.literal_text
def map_shapes(node_z, shapes, labels, *, ax=None, station_nodes=None):
    """Draw mode shapes of chosen critical-speed-map points along the shaft.

    Each shape is drawn as the shaft's deflection at the instant its largest
    orbit reaches its major semi-axis, projected on that direction (signed,
    so nodal points show), scaled to a largest deflection of +1.

    Parameters
    ----------
    node_z : array_like (n_nodes,)
        Axial node positions, m.
    shapes : sequence of complex array_like (n_nodes, 2)
        x and y translations per node, as from
        :func:`rotorcalc.analysis.csmap.map_mode_shape` or ``cmap.shapes[i, j]``;
        an all-NaN shape (a mode absent at that stiffness) draws nothing.
    labels : sequence of str
        One per shape, e.g. from :func:`map_point_label`.
    ax : matplotlib.axes.Axes, optional
        Axes to draw on; a new figure is made when omitted.
    station_nodes : array_like of int, optional
        Nodes of the stations, drawn as faint vertical lines and numbered.

    Returns
    -------
    MapShapeArtists

    Raises
    ------
    ValueError
        When ``shapes`` and ``labels`` differ in number, or a shape does not
        have one row per node.
    """
    z = np.asarray(node_z, dtype=float) * 1000.0
    shapes = [np.asarray(s, dtype=complex) for s in shapes]
    labels = [str(t) for t in labels]
    if len(shapes) != len(labels):
        raise InputError("plot arguments", f"{len(shapes)} shapes but {len(labels)} labels: give one label "
                         "per shape", kind="option")
    for i, s in enumerate(shapes):
        if s.shape != (len(z), 2):
            raise InputError("plot arguments", f"shape {i} has shape {s.shape}, expected ({len(z)}, 2): one "
                             "(x, y) pair per node", kind="option")
    fig, ax, created = st.axes_for(ax, figsize=(10.0, 5.0))
    if created:
        fig.subplots_adjust(left=0.08, right=0.97, bottom=0.24, top=0.88)
    st.style_axes(ax)
    span = z[-1] - z[0] if len(z) > 1 else 1.0
    ax.set_xlim(z[0] - 0.03 * span, z[-1] + 0.03 * span)
    ax.set_ylim(-1.15, 1.15)
    ax.set_yticks([-1.0, -0.5, 0.0, 0.5, 1.0])
    ax.axhline(0.0, color=st.MUTED, linewidth=0.6, zorder=1)

    station_lines = []
    if station_nodes is not None:
        ax.grid(False)
        for y in (-1.0, -0.5, 0.5, 1.0):
            ax.axhline(y, color=st.GRID, linewidth=0.7, zorder=0)
        for n, node in enumerate(np.asarray(station_nodes, dtype=int)):
            station_lines.append(ax.axvline(z[node], color=st.FAINT, linewidth=0.6,
                                            linestyle=(0, (1.5, 2.0)), zorder=0.5))
            ax.annotate(str(n), xy=(z[node], 1.0), xycoords=("data", "axes fraction"),
                        xytext=(0, 2), textcoords="offset points", ha="center", va="bottom",
                        fontsize=st.FONT_NOTE, color=st.MUTED, annotation_clip=False)

    lines, drawn = [], []
    for i, s in enumerate(shapes):
        colour = SHAPE_COLOURS[i % len(SHAPE_COLOURS)]
        style = SHAPE_STYLES[(i // len(SHAPE_COLOURS)) % len(SHAPE_STYLES)]
        y = _signed_deflection(s)
        # a shape all but on an earlier one is drawn thin on top, so both show
        under = y is not None and any(np.max(np.abs(y - d)) < SHAPE_SAME for d in drawn)
        line, = ax.plot(z if y is not None else [], y if y is not None else [], color=colour,
                        linestyle=style, linewidth=0.9 if under else 2.0,
                        zorder=4.5 if under else 4, solid_capstyle="round")
        lines.append(line)
        if y is not None:
            drawn.append(y)

    ax.set_xlabel("Axial position (mm)", fontsize=st.FONT_LABEL, color=st.INK)
    ax.set_ylabel("Deflection (each peak = 1)", fontsize=st.FONT_LABEL, color=st.INK)
    pad = 16 if station_nodes is not None else 8
    ax.set_title("Mode shapes on the critical-speed map", fontsize=st.FONT_TITLE, color=st.INK,
                 loc="left", pad=pad)
    note = "the shaft at the instant of its largest orbit"
    room = (ax.get_window_extent().width * 72.0 / fig.dpi
            - lb.text_width("Mode shapes on the critical-speed map", st.FONT_TITLE))
    if lb.text_width(note, st.FONT_NOTE + 0.5) + 12 < room:
        ax.set_title(note, fontsize=st.FONT_NOTE + 0.5, color=st.MUTED, loc="right", pad=pad)
    shown = [t if np.isfinite(s).all() else f"{t} (absent)" for s, t in zip(shapes, labels)]
    legend = None
    if lines:
        legend = lb.legend_below(ax, lines, shown, 30,
                                 min(3, st.legend_columns(ax, shown, st.FONT_NOTE + 0.5)),
                                 handlelength=2.6, columnspacing=1.6)
    return MapShapeArtists(figure=fig, ax=ax, lines=tuple(lines),
                           station_lines=tuple(station_lines), legend=legend)


def _signed_deflection(shape):
    """Deflection at the instant the largest orbit is at its major semi-axis, peak +1.

    None for a shape with no finite, non-zero entry.
    """
    if not np.isfinite(shape).all():
        return None
    x, y = shape[:, 0], shape[:, 1]
    major = 0.5 * (np.abs(x + 1j * y) + np.abs(x - 1j * y))
    peak = int(np.argmax(major))
    if major[peak] == 0:
        return None
    d, _ = snapshot(shape, peak)
    if d is None:
        return None
    big = float(np.max(np.abs(d)))
    return d / big if big > 0 else None


def map_point_label(stiffness, mode, speed):
    """The legend text of one map point: ``"mode 1 at 1.6e8 N/m: 5398 rpm"``.

    Parameters
    ----------
    stiffness : float
        N/m.
    mode : int
        0-based, as in :class:`~rotorcalc.analysis.csmap.Crossing`.
    speed : float
        Critical speed, rad/s.
    """
    mantissa, exponent = f"{float(stiffness):.1e}".split("e")
    mantissa = mantissa[:-2] if mantissa.endswith(".0") else mantissa
    return (f"mode {int(mode) + 1} at {mantissa}e{int(exponent)} N/m: "
            f"{st.whole(to_rpm(float(speed)))} rpm")
