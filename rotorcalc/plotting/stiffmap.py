"""The critical-speed map: undamped critical speeds over the support stiffness, with the
bearings' own stiffness curves, their crossings and, optionally, the stiffness window.

It draws a :class:`rotorcalc.analysis.csmap.CriticalSpeedMap` (and a
:class:`rotorcalc.analysis.whatif.StiffnessWindow`) as they are; the arithmetic
here is for drawing only (rpm, klbf/in, the top of the speed axis, label places).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from matplotlib.lines import Line2D
from matplotlib.patches import Patch

from ..errors import InputError
from . import _labels as lb
from . import _map_labels as ml
from . import _style as st
from . import _window_band as wb
from ._artists import RangeArtists
from ._units import from_klbf_in, to_klbf_in, to_rpm

#: One colour per bearing.
BEARING_COLOURS = st.ITEM_COLOURS
#: A bearing's two direct coefficients as line styles (the map has no whirl styles).
DIRECTION_STYLES = {"kxx": "-", "kyy": (0, (3.2, 1.8))}
#: Room above the highest speed of interest (trip speed, bearing curves, crossings).
HEADROOM = 1.15


@dataclass(frozen=True)
class CriticalMapArtists(RangeArtists):
    """What :func:`critical_speed_map` drew (and ``figure``, ``legend`` as every picture).

    Attributes
    ----------
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
    band, band_labels, trip_line
        The operating range (y in rpm, full width), its speeds right of the frame.
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
    speed_max : float
        Upper limit of the speed axis, rpm.
    hidden_modes : int
        Modes lying wholly above ``speed_max``.
    """

    stiffness_axis: object = None
    modes: tuple = ()
    mode_labels: tuple = ()
    curves: tuple = ()
    crossings: tuple = ()
    crossing_labels: tuple = ()
    window_band: object = None
    window_labels: tuple = ()
    window_markers: tuple = ()
    window_arrows: tuple = ()
    base_line: object = None
    speed_max: float = 0.0
    hidden_modes: int = 0


@st.literal_text
def plot_critical_speed_map(cmap, operating=None, window=None, base_stiffness=None, *, ax=None,
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
    base_stiffness = _checked_base(base_stiffness, window)
    fig, ax, created = st.axes_for(ax, figsize=(10.0, 6.2))
    if created:
        fig.subplots_adjust(left=0.08, right=0.66, bottom=0.10, top=0.83)
    st.style_axes(ax)
    k, rpm = np.asarray(cmap.stiffness, dtype=float), _mode_speeds(cmap)
    curves, crossings = tuple(cmap.curves), tuple(cmap.crossings)
    ratio = _stiffness_axis(ax, k)
    top = _speed_top(k, rpm, curves, crossings, operating, window) if speed_max is None \
        else float(speed_max)
    ax.set_ylim(0.0, top)
    ax.grid(True, which="minor", axis="x", color=st.GRID, linewidth=0.4, zorder=0)
    band, trip_line, band_labels, side_width = _operating(ax, operating)
    colour_of, aliases, curve_lines, boxes = _bearing_curves(ax, curves)
    mode_lines, hidden = _mode_curves(ax, k, rpm, top, boxes)
    markers = _crossing_markers(ax, crossings, colour_of)
    base_line, drawn, taken = _window(ax, window, base_stiffness, top, boxes)
    mode_labels = ml.label_modes(ax, k, rpm, top, boxes, taken)
    crossing_labels = ml.label_crossings(ax, crossings, boxes, taken)
    stiffness_axis = _axis_texts(ax, ratio)
    legend = _map_legend(ax, cmap.whirl, curves, colour_of, aliases, crossings, operating,
                         window, base_stiffness, (hidden, top, side_width))
    return CriticalMapArtists(
        figure=fig, ax=ax, stiffness_axis=stiffness_axis, modes=tuple(mode_lines),
        mode_labels=tuple(mode_labels), curves=tuple(curve_lines), crossings=tuple(markers),
        crossing_labels=tuple(crossing_labels), band=band, band_labels=tuple(band_labels),
        trip_line=trip_line, window_band=drawn[0], window_labels=tuple(drawn[1]),
        window_markers=tuple(drawn[2]), window_arrows=tuple(drawn[3]),
        base_line=base_line, legend=legend, speed_max=top, hidden_modes=hidden)


def _checked_base(base_stiffness, window):
    """The base stiffness as a float (or None); InputError when it is no stiffness or a
    window comes without it."""
    if base_stiffness is not None:
        base_stiffness = float(base_stiffness)
        if not (math.isfinite(base_stiffness) and base_stiffness > 0):
            raise InputError("plot arguments", f"base_stiffness must be a positive stiffness "
                             f"in N/m, not {base_stiffness!r}", kind="option")
    if window is not None and base_stiffness is None:
        raise InputError("plot arguments", "a stiffness window is drawn at base_stiffness x "
                         "its factors: give base_stiffness (N/m) with the window",
                         kind="option")
    return base_stiffness


def _mode_speeds(cmap):
    """The map's critical speeds in rpm, one column per mode."""
    rpm = to_rpm(np.asarray(cmap.speeds, dtype=float))
    return rpm[:, None] if rpm.ndim == 1 else rpm


def _stiffness_axis(ax, k):
    """Log stiffness axis over the map's range; returns the range's ratio (top/bottom)."""
    ax.set_xscale("log")
    finite_k = k[np.isfinite(k) & (k > 0)]
    k_lo, k_hi = (float(finite_k.min()), float(finite_k.max())) if finite_k.size else (1e6, 1e10)
    if k_hi <= k_lo:
        k_lo, k_hi = k_lo / 3.0, k_hi * 3.0
    ax.set_xlim(k_lo, k_hi)
    lb.plain_log_ticks(ax.xaxis, k_hi / k_lo)
    return k_hi / k_lo


def _operating(ax, operating):
    """The operating range across the map, its speeds right of the frame:
    ``(band, trip line, labels, width of the labels in points)``."""
    if operating is None:
        return None, None, (), 0.0
    band, trip_line, marks = st.operating_band(ax, operating, axis="y")
    band_labels, side_width = ml.side_labels(ax, marks)
    return band, trip_line, band_labels, side_width


def _bearing_curves(ax, curves):
    """Each bearing curve in its bearing's colour; a curve lying on an earlier one is drawn
    thin on top of it, so both colours show.  Returns the colours by bearing, the
    curves that lie on others (by bearing), the lines and the boxes along them."""
    colour_of, aliases, lines, boxes = {}, {}, [], []
    for i, c in enumerate(curves):
        colour = colour_of.setdefault(c.bearing,
                                      BEARING_COLOURS[len(colour_of) % len(BEARING_COLOURS)])
        xs, ys = np.asarray(c.stiffness, dtype=float), to_rpm(np.asarray(c.speeds, dtype=float))
        under = next((j for j in range(i) if _same_curve(curves[j], c)), None)
        width, z = (0.9, 3.3) if under is not None else (1.7, 3.0)
        line, = ax.plot(xs, ys, color=colour, linewidth=width,
                        linestyle=DIRECTION_STYLES.get(c.direction, "-"), zorder=z,
                        solid_capstyle="butt", dash_capstyle="butt")
        lines.append(line)
        if under is not None:
            aliases.setdefault(c.bearing, []).append((c.direction, curves[under]))
        boxes += lb.line_boxes(ax, xs, ys)
    return colour_of, aliases, lines, boxes


def _mode_curves(ax, k, rpm, top, boxes):
    """One curve per mode (their boxes added to ``boxes``); the lines and the number of
    modes wholly above ``top``."""
    lines = []
    for j in range(rpm.shape[1]):
        line, = ax.plot(k, rpm[:, j], color=st.INK, linewidth=1.9, zorder=4,
                        solid_capstyle="round")
        lines.append(line)
        boxes += lb.line_boxes(ax, k, rpm[:, j])
    lowest = np.array([np.nanmin(col) if np.isfinite(col).any() else np.inf for col in rpm.T])
    return lines, int(np.sum(np.isfinite(lowest) & (lowest > top)))


def _crossing_markers(ax, crossings, colour_of):
    """A marker per crossing: filled for kxx, open for kyy, in the bearing's colour."""
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
    return markers


def _window(ax, window, base, top, boxes):
    """The x1 line and the stiffness window: ``(base line, (band, texts, markers,
    arrows), boxes the texts take)``."""
    base_line = None
    if base is not None:
        base_line = ax.axvline(base, color=wb.WINDOW_EDGE, linewidth=0.9,
                               linestyle=wb.BASE_DOTS, zorder=2.5)
    drawn, taken = (None, (), (), ()), []
    if window is not None:
        *drawn, taken = wb.draw_window(ax, window, base, top, boxes)
    elif base_line is not None:
        taken = [wb.base_tag(ax, base, "\u00d71", wb.WINDOW_EDGE, boxes)]
    return base_line, drawn, [t for t in taken if t is not None]


def _axis_texts(ax, ratio):
    """Axis labels, the klbf/in axis along the top (returned) and the title above it."""
    st.label_axes(ax, "Support stiffness (N/m)", "Critical speed (rpm)")
    stiffness_axis = ax.secondary_xaxis("top", functions=(to_klbf_in, from_klbf_in))
    lb.plain_log_ticks(stiffness_axis.xaxis, ratio)
    stiffness_axis.tick_params(colors=st.INK, labelsize=st.FONT_TICK, length=3.5, width=0.7)
    stiffness_axis.tick_params(which="minor", length=2.0, width=0.5)
    stiffness_axis.spines["top"].set_color(st.FAINT)
    stiffness_axis.set_xlabel("Support stiffness (klbf/in)", fontsize=st.FONT_LABEL - 0.5,
                              color=st.MUTED, labelpad=4)
    ax.set_title("Critical-speed map", fontsize=st.FONT_TITLE, color=st.INK, loc="left",
                 pad=36)
    return stiffness_axis


def _same_curve(a, b):
    sa, sb = np.asarray(a.speeds, dtype=float), np.asarray(b.speeds, dtype=float)
    ka, kb = np.asarray(a.stiffness, dtype=float), np.asarray(b.stiffness, dtype=float)
    return (sa.shape == sb.shape and ka.shape == kb.shape
            and np.allclose(sa, sb, rtol=1e-9, atol=0.0)
            and np.allclose(ka, kb, rtol=1e-6, atol=0.0))


# --- the top of the speed axis -----------------------------------------------------------

def _speed_top(stiffness, rpm, curves, crossings, operating, window):
    """Top of the speed axis, rpm: :data:`HEADROOM` over the highest speed of interest."""
    need = _speeds_of_interest(curves, crossings, operating, window)
    # the next mode above all that, where the bearings are, unless it is far above
    if curves and need:
        above = _next_mode(stiffness, rpm, curves, max(need))
        if above is not None:
            need.append(above)
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


def _speeds_of_interest(curves, crossings, operating, window):
    """The trip (or maximum) speed, the tops of the bearing curves, the crossings and the
    window's limiting criticals, rpm."""
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
    return need


def _next_mode(stiffness, rpm, curves, rest):
    """The lowest mode above ``rest`` (rpm) and within twice it at either end of a bearing
    curve's stiffness: its highest speed there, or None."""
    above = []
    for j in range(rpm.shape[1]):
        for c in curves:
            s = np.asarray(c.stiffness, dtype=float)
            s = s[np.isfinite(s) & (s > 0)]
            for value in (s.min(), s.max()) if s.size else ():
                at = _mode_at(stiffness, rpm[:, j], value)
                if at is not None and rest < at <= 2.0 * rest:
                    above.append((j, at))
    if not above:
        return None
    first = min(j for j, _ in above)
    return max(at for j, at in above if j == first)


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


# --- the key -----------------------------------------------------------------------------

def _map_legend(ax, whirl, curves, colour_of, aliases, crossings, operating, window, base,
                extra):
    """The key beside the map; ``extra`` is (hidden modes, top of the axis, width of the
    range's labels right of the frame)."""
    hidden, top, side_width = extra
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
        _bearing_key(key, curves, colour_of, aliases)
    if operating is not None or window is not None or base is not None:
        key.header("Ranges")
    if operating is not None:
        key.operating(operating)
    if window is not None and window.base_passes:
        key.add(Patch(facecolor=wb.WINDOW_FILL, alpha=wb.WINDOW_ALPHA,
                      edgecolor=wb.WINDOW_EDGE, linewidth=0.8),
                f"margins kept, {window.target} scaled")
        if any(e.limiting is not None and e.factor is not None for e in (window.low, window.high)):
            key.add(Line2D([], [], linestyle="none", marker="D", markersize=5,
                           markerfacecolor=wb.WINDOW_EDGE, markeredgecolor=st.PAPER),
                    "critical that limits the band")
    if base is not None:
        key.add(Line2D([], [], color=wb.WINDOW_EDGE, linewidth=0.9, linestyle=wb.BASE_DOTS),
                "\u00d71: bearings at max. continuous speed")
    if hidden:
        key.note(f"{hidden} mode{'s' if hidden > 1 else ''} above {st.whole(top)} rpm "
                 "not shown")
    return lb.legend_beside(ax, key, offset=side_width + 12.0)


def _bearing_key(key, curves, colour_of, aliases):
    """A colour per bearing, saying which of its curves lie on others, and the styles."""
    n_curves = {}
    for c in curves:
        n_curves[c.bearing] = n_curves.get(c.bearing, 0) + 1
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
