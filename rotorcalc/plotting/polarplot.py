"""Polar plot of an unbalance response: each probe's response as a curve over speed.

The radius is the peak-to-peak amplitude in µm and the angle the phase lag behind
the once-per-turn mark (``x(t) = Re(X e^{iwt})``, lag = ``-arg X``), 0 degrees at the
top and growing clockwise.  It draws a
:class:`rotorcalc.analysis.response.Response` as it is; a probe keeps the colour
of its station and the line style of its direction there, as in the Bode plot.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from matplotlib.figure import Figure
from matplotlib.lines import Line2D
from matplotlib.ticker import MaxNLocator

from ..errors import InputError
from . import _labels as lb
from . import _panels as pn
from . import _probes as pr
from . import _style as st
from ._artists import Artists
from ._phase import lag_radians, phase_lag, value_at
from ._units import UM, from_rpm, pk_pk_um, to_rpm

#: Speed labels along a polar curve are left out nearer the centre than this
#: share of the panel's radius, where the low-speed points crowd together.
CENTRE_CROWD = 0.05
#: Labels may sit on the inner side of a polar curve only beyond this share of the radius.
INWARD_FROM = 0.4
#: Angles (degrees of lag) where the radius labels may go: between the angle grid lines.
_RLABEL_ANGLES = tuple(22.5 + 45.0 * n for n in range(8))


@dataclass(frozen=True)
class PolarArtists(Artists):
    """What :func:`polar` drew (and ``figure``, ``legend`` as every picture).

    Attributes
    ----------
    ax : PolarAxes
        The first (or only) panel.
    axes : tuple of PolarAxes
        Every panel: one per probe station on a new figure, or the one given.
    probes : tuple of str
        Names of the probes drawn, in the order of ``lines``.
    lines : tuple of Line2D
        One curve per probe: angle the phase lag (radians in the data), radius
        the peak-to-peak amplitude in µm.
    speed_labels : tuple of Annotation
        Speeds (rpm) written beside points of the curves.
    speed_ticks : tuple of Line2D
        The dots at the labelled speeds, one artist per curve (may be empty).
    peak_markers, peak_labels : tuple
        One marker and one ``"5440 rpm"`` label per peak of the case on a
        drawn probe.
    """

    axes: tuple = ()
    probes: tuple = ()
    lines: tuple = ()
    speed_labels: tuple = ()
    speed_ticks: tuple = ()
    peak_markers: tuple = ()
    peak_labels: tuple = ()


@st.literal_text
def plot_polar(response, case_index=0, probes=None, *, ax=None):
    """Draw the polar plot of one unbalance case: each probe's response as a curve over speed.

    The radius is the peak-to-peak amplitude in µm and the angle the phase
    lag behind the once-per-turn mark, 0\u00b0 at the top and increasing clockwise; so
    a point turns clockwise as its lag grows through a resonance.  A few
    speeds are written along each curve (rpm) and each peak of the case on a
    drawn probe is marked with its speed.

    Parameters
    ----------
    response : rotorcalc.analysis.response.Response
    case_index : int
        Index into ``response.cases``.
    probes : sequence of int or str, or int or str, optional
        Probes to draw, by index into ``response.probes`` or by name; all by
        default.
    ax : PolarAxes, optional
        A polar axes (``projection="polar"``) to draw every chosen probe on.
        By default a new figure with one panel per probe station (the probes
        of a station share a panel), each panel with its own radial scale.

    Returns
    -------
    PolarArtists

    Raises
    ------
    IndexError, ValueError, TypeError
        For a case or probe the response does not have, or an ``ax`` that is
        not a polar axes.
    """
    i = pr.case_index(response, case_index)
    chosen = pr.probe_indices(response, probes)
    looks = pr.probe_looks(response, chosen)
    title = f"Polar plot, case {response.cases[i]}"
    fig, panels, groups, created = _polar_panels(ax, response, chosen, title)
    drawn = {"lines": [], "speed_labels": [], "speed_ticks": [], "peak_markers": [],
             "peak_labels": []}
    for a, group in zip(panels, groups):
        _draw_panel(a, response, i, group, looks, drawn)
        if created:
            probe = response.probes[group[0]]
            a.set_title(pr.station_title(response, probe.station), loc="left",
                        fontsize=st.FONT_LABEL, color=st.INK, pad=14)
    if not created:
        ax.set_title(title, loc="left", fontsize=st.FONT_TITLE, color=st.INK, pad=14)
    legend = _polar_legend(fig, panels[0], drawn["lines"], created)
    return PolarArtists(figure=fig, ax=panels[0], axes=tuple(panels),
                        probes=tuple(response.probes[k].name for k in chosen),
                        legend=legend, **{name: tuple(v) for name, v in drawn.items()})


def _polar_panels(ax, response, chosen, title):
    """``(figure, panels, probes of each panel, created)``: the polar axes given, or a new
    figure with one panel per station of the chosen probes."""
    if ax is not None:
        if getattr(ax, "name", "") != "polar":
            raise InputError("plot arguments", "the polar plot needs a polar axes: make it with "
                             "add_subplot(projection='polar')", kind="option")
        return ax.figure, [ax], [chosen], False
    note = ("radius: amplitude, \u00b5m pk-pk  \u00b7  angle: phase lag, 0\u00b0 at the top, "
            "increasing clockwise  \u00b7  speeds in rpm")
    stations = sorted({response.probes[k].station for k in chosen})
    groups = [[k for k in chosen if response.probes[k].station == s] for s in stations]
    rows, cols = pn.grid(len(groups))
    fig = Figure(figsize=(0.4 + 3.7 * cols, 1.25 + 3.95 * rows), facecolor=st.PAPER)
    top = pn.figure_title(fig, title, note, 0.95)
    bottom = 0.85 / fig.get_figheight()
    grid = fig.add_gridspec(rows, cols, left=0.05, right=0.95, bottom=bottom, top=top,
                            wspace=0.42, hspace=0.42)
    panels = [fig.add_subplot(grid[n // cols, n % cols], projection="polar")
              for n in range(len(groups))]
    return fig, panels, groups, True


def _draw_panel(a, response, i, group, looks, drawn):
    """One panel: its scale, the curves of its probes, their peaks and speed labels;
    the artists are added to the lists in ``drawn``."""
    _style_polar(a)
    values = response.probe_values[i]
    r_max = max([float(np.nanmax(pk_pk_um(values[:, k]))) for k in group]
                + [UM * p.amplitude for k in group for p in pr.case_peaks(response, i, k)]
                + [0.0])
    r_top = pn.round_up(1.06 * r_max)
    a.set_ylim(0.0, r_top)
    curves = []
    for k in group:
        colour, style = looks[k]
        lag = np.radians(phase_lag(values[:, k]))
        amp = pk_pk_um(values[:, k])
        curves.append((lag, amp))
        drawn["lines"].append(a.plot(lag, amp, color=colour, linestyle=style, linewidth=1.5,
                                     zorder=4, label=pr.probe_label(response.probes[k], k))[0])
    taken = _radius_labels(a, curves, r_top)
    taken += _angle_label_boxes(a, r_top)
    speeds = np.asarray(response.speeds, dtype=float)
    for k in group:
        for p in pr.case_peaks(response, i, k):
            value = value_at(speeds, values[:, k], p.speed)
            marker, label = _mark_peak(a, p, value, looks[k][0], taken)
            drawn["peak_markers"].append(marker)
            drawn["peak_labels"].append(label)
    rpm = to_rpm(speeds)
    for k in group:
        tick, texts = _speed_labels(a, speeds, rpm, values[:, k], looks[k][0], r_top, taken)
        if tick is not None:
            drawn["speed_ticks"].append(tick)
        drawn["speed_labels"].extend(texts)


def _mark_peak(a, peak, value, colour, taken):
    """Marker and speed label of one peak, at its refined amplitude (as in the Bode plot)
    and the phase between sweep points; a dotted stem from the curve when the sweep
    misses the top.  The label's box joins ``taken``."""
    th, r = lag_radians(value), UM * peak.amplitude
    drawn = pk_pk_um(value)
    if drawn < pr.UNRESOLVED * r:
        a.plot([th, th], [drawn, r], color=colour, linewidth=0.9, linestyle=(0, (1.0, 1.5)),
               zorder=4.5)
    marker = a.plot([th], [r], linestyle="none", marker="o", markersize=5.5,
                    markerfacecolor=colour, markeredgecolor=st.INK, markeredgewidth=0.9,
                    zorder=6)[0]
    label, rect = _polar_label(a, th, r, f"{st.whole(to_rpm(peak.speed))} rpm", colour, taken,
                               bold=True)
    taken.append(rect)
    return marker, label


def _polar_legend(fig, ax, lines, created):
    handles = list(lines) + [Line2D([], [], linestyle="none", marker="o", markersize=5.5,
                                    markerfacecolor=st.MUTED, markeredgecolor=st.INK,
                                    markeredgewidth=0.9)]
    names = [line.get_label() for line in lines] + ["peak, with its speed"]
    if created:
        return pn.figure_legend(fig, handles, names, 2.6)
    return lb.ink(ax.legend(handles, names, loc="upper left", bbox_to_anchor=(1.08, 1.0),
                            borderaxespad=0.0, frameon=False, fontsize=st.FONT_NOTE + 0.5,
                            handlelength=2.6))


def _style_polar(ax):
    ax.set_facecolor(st.PAPER)
    ax.set_theta_zero_location("N")
    ax.set_theta_direction(-1)
    ax.set_thetagrids(range(0, 360, 45), [f"{d}\u00b0" for d in range(0, 360, 45)],
                      fontsize=st.FONT_TICK, color=st.MUTED)
    ax.tick_params(axis="y", labelsize=st.FONT_TICK - 0.5, colors=st.MUTED)
    ax.yaxis.set_major_locator(MaxNLocator(nbins=5, steps=[1, 2, 2.5, 5, 10]))
    ax.grid(True, color=st.GRID, linewidth=0.7)
    ax.spines["polar"].set_color(st.FAINT)
    ax.set_axisbelow(True)


# --- labels -----------------------------------------------------------------------------

def _radius_labels(ax, curves, r_top):
    """Put the radius labels along the candidate angle that the curves keep furthest from.

    Returns the rough boxes (points) of the labels, for the speed labels to avoid.
    """
    ticks = [r for r in ax.get_yticks() if 0 < r <= r_top]
    r0 = min(ticks) if ticks else 0.0
    best, clear = _RLABEL_ANGLES[2], -1.0
    for angle in _RLABEL_ANGLES:
        a = math.radians(angle)
        gap = np.inf
        for lag, amp in curves:
            # Distance of each curve point from the labelled part of the ray.
            along = np.clip(amp * np.cos(lag - a), r0, r_top)
            across = amp * np.sin(lag - a)
            d = np.hypot(amp * np.cos(lag - a) - along, across)
            if d.size:
                gap = min(gap, float(np.nanmin(d)))
        if gap > clear + 1e-9 * r_top:
            best, clear = angle, gap
    ax.set_rlabel_position(best)
    size = st.FONT_TICK - 0.5
    boxes = []
    th = math.radians(best)
    for r in ticks:
        q = lb.points(ax, (th, r))
        w, h = lb.text_width(st.signed(r, "g"), size), 1.3 * size
        boxes.append((q[0] - w / 2, q[1] - h / 2, q[0] + w / 2, q[1] + h / 2))
    return boxes


def _label_sides(ax, theta, r):
    """Unit directions (points) to try a label in, from the point (theta, r): outward from
    the centre, inward (well clear of the crowded centre only), then to either side."""
    centre = lb.points(ax, (0.0, 0.0))
    q = lb.points(ax, (theta, r))
    d = q - centre
    norm = float(np.hypot(*d))
    u = d / norm if norm > 1e-9 else np.array([0.0, 1.0])
    sides = [u, np.array([-u[1], u[0]]), np.array([u[1], -u[0]])]
    if r > INWARD_FROM * ax.get_ylim()[1]:
        sides.insert(1, -u)
    return q, sides


def _polar_label(ax, theta, r, text, colour, taken, bold=False, force=True):
    """A label beside the point (theta, r): outward from the centre if there is room,
    else inward (away from the centre only), else to either side.

    Returns the annotation and its rough box (points), to keep later labels off it;
    ``(None, None)`` when no side is free and ``force`` is False (otherwise the
    outward side is used anyway).
    """
    size = st.FONT_NOTE + (0.5 if bold else 0.0)
    w, h = lb.text_width(text, size, bold), 1.25 * size
    q, sides = _label_sides(ax, theta, r)
    chosen = None
    for v in sides:
        # Anchor the side of the box facing the point, so the text grows away from it.
        ha = "left" if v[0] > 0.3 else ("right" if v[0] < -0.3 else "center")
        va = "bottom" if v[1] > 0.3 else ("top" if v[1] < -0.3 else "center")
        off = 5.0 * v
        x0 = q[0] + off[0] - {"left": 0.0, "right": w, "center": w / 2}[ha]
        y0 = q[1] + off[1] - {"bottom": 0.0, "top": h, "center": h / 2}[va]
        rect = (x0, y0, x0 + w, y0 + h)
        if chosen is None:
            chosen = (off, ha, va, rect)     # the outward side, if nothing is free
        if not any(lb.overlap(rect, t) for t in taken):
            chosen = (off, ha, va, rect)
            break
    else:
        if not force:
            return None, None
    off, ha, va, rect = chosen
    label = ax.annotate(text, xy=(theta, r), xytext=tuple(off), textcoords="offset points",
                        ha=ha, va=va, fontsize=size, color=colour if bold else st.INK,
                        fontweight="bold" if bold else "normal", zorder=7,
                        bbox=st.paper_box("round"))
    return label, rect


def _angle_label_boxes(ax, r_top):
    """Rough boxes (points) of the angle labels outside the rim."""
    boxes = []
    centre = lb.points(ax, (0.0, 0.0))
    for deg in range(0, 360, 45):
        q = lb.points(ax, (math.radians(deg), r_top))
        d = q - centre
        u = d / (float(np.hypot(*d)) or 1.0)
        c = q + 13.0 * u
        w, h = lb.text_width(f"{deg}\u00b0", st.FONT_TICK), 1.3 * st.FONT_TICK
        boxes.append((c[0] - w / 2, c[1] - h / 2, c[0] + w / 2, c[1] + h / 2))
    return boxes


def _speed_labels(ax, speeds, rpm, values, colour, r_top, taken):
    """Dots and rpm labels at round speeds along one curve, skipping crowded ones."""
    if len(speeds) < 2:
        return None, []
    step = pn.nice_step(rpm[-1] - rpm[0], 6)
    first = math.ceil(rpm[0] / step - 1e-9) * step
    marks = np.arange(first, rpm[-1] + 1e-9 * step, step)
    dots_th, dots_r, texts = [], [], []
    for mark in marks:
        value = value_at(speeds, values, from_rpm(mark))
        r = pk_pk_um(value)
        if r < CENTRE_CROWD * r_top:
            continue
        th = lag_radians(value)
        label, rect = _polar_label(ax, th, r, st.whole(mark), colour, taken, force=False)
        if label is None:
            continue
        taken.append(rect)
        texts.append(label)
        dots_th.append(th)
        dots_r.append(r)
    if not dots_th:
        return None, texts
    tick, = ax.plot(dots_th, dots_r, linestyle="none", marker="o", markersize=2.8,
                    markerfacecolor=colour, markeredgecolor=st.PAPER, markeredgewidth=0.5,
                    zorder=5)
    return tick, texts
