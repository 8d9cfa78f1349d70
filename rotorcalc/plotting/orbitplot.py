"""Orbits of an unbalance response: the ellipse each station traces at each speed.

Orbits are seen from the +z end, x to the right and y up, so that the spin (from
+x towards +y) is anticlockwise.  The ellipses are drawn from the complex x and y
amplitudes of a :class:`rotorcalc.analysis.response.Response` as they are
(:mod:`._orbit`); the major axes and senses are the response's own.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from matplotlib.figure import Figure
from matplotlib.lines import Line2D
from matplotlib.patches import FancyArrowPatch

from ..errors import InputError
from . import _labels as lb
from . import _panels as pn
from . import _probes as pr
from . import _style as st
from ._artists import Artists
from ._orbit import ellipse, turn
from ._units import UM, to_rpm, um_text

#: One colour per speed.
COLOURS = st.SERIES_COLOURS
#: An orbit smaller than this share of its panel's half-width gets no arrow.
ARROW_MIN = 0.12
#: A station whose orbits stay below this share of the shared scale gets a zoomed inset.
INSET_BELOW = 0.2
#: The instants an orbit is drawn at: one turn from the once-per-turn mark.
_TURN = turn(121)


@dataclass(frozen=True)
class OrbitArtists(Artists):
    """What :func:`orbits` drew (and ``figure``, ``legend`` as every picture).

    Attributes
    ----------
    ax : Axes
        The first panel.
    axes : tuple of Axes
        One panel per station, in the order of ``stations``.
    stations : tuple of int
    speeds : tuple of float
        The speeds drawn, rpm, in the order of the colours.
    ellipses : tuple of tuple of Line2D
        ``ellipses[k][j]``: the orbit at station ``stations[k]`` and speed ``j``
        in µm, solid when forward, dashed when backward.
    mark_dots : tuple of tuple of Line2D
        The position at ``t = 0``, same layout as ``ellipses``.
    arrows : tuple of FancyArrowPatch
        Direction of travel, on orbits large enough to carry one (in the
        panels and in the insets).
    insets : tuple of (Axes or None)
        Per station, a magnified view of orbits too small to read at the shared
        scale (largest semi-axis below a fifth of it), in the panel's lower
        left corner and labelled with its own half-width; None elsewhere.
    scale : float
        Half-width of every panel, µm (the shared scale).
    """

    axes: tuple = ()
    stations: tuple = ()
    speeds: tuple = ()
    ellipses: tuple = ()
    mark_dots: tuple = ()
    arrows: tuple = ()
    insets: tuple = ()
    scale: float = 0.0


@st.literal_text
def plot_orbits(response, case_index=0, stations=None, *, ax=None):
    """Draw the orbits of one unbalance case: an ellipse per station and speed.

    Each orbit is the path ``(Re(X e^{iwt}), Re(Y e^{iwt}))`` over one turn,
    seen from the +z end with x to the right and y up (the spin, from +x
    towards +y, is anticlockwise).  A dot marks the position at ``t = 0``,
    the once-per-turn mark, and an arrow the direction of travel; forward
    orbits (turning with the spin) are solid, backward ones dashed.  There is
    one panel per station and one colour per speed in ``response.speeds``
    (meant for a Response run at a few chosen speeds); every panel has the
    same scale, in µm, so the sizes compare directly.

    Parameters
    ----------
    response : rotorcalc.analysis.response.Response
    case_index : int
        Index into ``response.cases``.
    stations : sequence of int, optional
        Station indices; by default the stations of the probes, in station
        order, or every station when the response has no probes.
    ax : Axes or sequence of Axes, optional
        One axes per station (a single axes when one station is drawn).  By
        default a new figure with a grid of panels.

    Returns
    -------
    OrbitArtists

    Raises
    ------
    IndexError, ValueError
        For a case or station the response does not have, or a number of
        axes different from the number of stations.
    """
    i = pr.case_index(response, case_index)
    stations = _stations(response, stations)
    rpm = to_rpm(np.asarray(response.speeds, dtype=float))
    major, _, forward = response.orbits(i)
    picked = major[:, stations] * UM
    biggest = float(np.nanmax(picked)) if picked.size else 0.0
    scale = pn.round_up(1.15 * biggest)
    fig, panels, created, (rows, cols) = _orbit_panels(ax, stations, response.cases[i])
    ellipses, dots, arrows, insets = [], [], [], []
    for n, (a, s) in enumerate(zip(panels, stations)):
        drawn = _station_panel(a, response, i, s, major, forward, scale)
        ellipses.append(drawn[0])
        dots.append(drawn[1])
        arrows.extend(drawn[2])
        insets.append(drawn[3])
        _panel_labels(a, n, created, rows, cols, len(stations))
    legend = _orbit_legend(fig, panels[0], rpm, forward, stations, created)
    return OrbitArtists(figure=fig, ax=panels[0], axes=tuple(panels),
                        stations=tuple(stations), speeds=tuple(float(v) for v in rpm),
                        ellipses=tuple(ellipses), mark_dots=tuple(dots),
                        arrows=tuple(arrows), insets=tuple(insets), scale=scale,
                        legend=legend)


def _stations(response, stations):
    """The stations to draw, checked: by default those of the probes (else every one)."""
    n_st = response.stations.shape[2]
    if stations is None:
        stations = sorted({p.station for p in response.probes}) or list(range(n_st))
    elif isinstance(stations, (int, np.integer)):
        stations = [stations]
    stations = [int(s) for s in stations]
    for s in stations:
        if not 0 <= s < n_st:
            raise IndexError(f"station {s} is out of range: the response has stations "
                             f"0 to {n_st - 1}")
    if not stations:
        raise InputError("plot arguments", "no station is chosen", kind="option")
    return stations


def _orbit_panels(ax, stations, case):
    """``(figure, panels, created, (rows, cols))``: the axes given, one per station, or a
    new figure with a grid of panels sharing one scale."""
    if ax is not None:
        panels = list(ax) if isinstance(ax, (tuple, list, np.ndarray)) else [ax]
        panels = list(np.ravel(panels))
        if len(panels) != len(stations):
            raise InputError("plot arguments", f"{len(stations)} station"
                             f"{'s' if len(stations) != 1 else ''} to draw but {len(panels)} "
                             "axes given: give one axes per station", kind="option")
        return panels[0].figure, panels, False, (1, len(panels))
    rows, cols = pn.grid(len(stations))
    fig = Figure(figsize=(0.5 + 3.15 * cols, 1.55 + 3.25 * rows), facecolor=st.PAPER)
    note = ("seen from the +z end: x to the right, y up, spin anticlockwise  \u00b7  "
            "every panel to the same scale, \u00b5m\n\u25cf position at t = 0 (once-per-turn mark)"
            "  \u00b7  arrow: direction of travel  \u00b7  solid forward, dashed backward")
    top = pn.figure_title(fig, f"Orbits, case {case}", note, 1.1)
    grid = fig.add_gridspec(rows, cols, left=0.1 if cols > 1 else 0.16, right=0.97,
                            bottom=0.95 / fig.get_figheight(), top=top, wspace=0.12,
                            hspace=0.3)
    panels = []
    for n in range(len(stations)):
        share = panels[0] if panels else None
        panels.append(fig.add_subplot(grid[n // cols, n % cols], sharex=share, sharey=share))
    return fig, panels, True, (rows, cols)


def _station_panel(a, response, i, s, major, forward, scale):
    """The orbits of station ``s`` at every speed on one panel, with a zoomed inset when
    they are small: ``(ellipses, dots, arrows, inset or None)``."""
    st.style_axes(a)
    a.set_aspect("equal", adjustable="box")
    a.set_xlim(-scale, scale)
    a.set_ylim(-scale, scale)
    orbit_set = response.stations[i, :, s] * UM
    largest = float(np.nanmax(major[:, s])) * UM if len(response.speeds) else 0.0
    lines, dots, arrows = _draw_orbit_set(a, orbit_set, forward[:, s], scale)
    arrows = list(arrows)
    inset = None
    if 0.0 < largest < INSET_BELOW * scale:
        inset, zoomed = _zoom_inset(a, orbit_set, forward[:, s], largest, scale)
        arrows.extend(zoomed)
    a.set_title(pr.station_title(response, s), loc="left", fontsize=st.FONT_LABEL,
                color=st.INK, pad=16)
    a.text(0.0, 1.015, "largest semi-axis " + um_text(largest), transform=a.transAxes,
           fontsize=st.FONT_NOTE, color=st.MUTED, ha="left", va="bottom")
    return lines, dots, arrows, inset


def _panel_labels(a, n, created, rows, cols, count):
    """Axis labels on the panels of the bottom row and the left column only."""
    if not created or n // cols == rows - 1 or n + cols >= count:
        a.set_xlabel("x (\u00b5m)", fontsize=st.FONT_LABEL, color=st.INK)
    else:
        a.tick_params(axis="x", labelbottom=False)
    if not created or n % cols == 0:
        a.set_ylabel("y (\u00b5m)", fontsize=st.FONT_LABEL, color=st.INK)
    else:
        a.tick_params(axis="y", labelleft=False)


def _orbit_legend(fig, first, rpm, forward, stations, created):
    """A colour per speed, and the line styles when both senses are drawn."""
    handles = [Line2D([], [], color=COLOURS[j % len(COLOURS)], linewidth=2.0)
               for j in range(len(rpm))]
    names = [f"{st.whole(v)} rpm" for v in rpm]
    kinds = {bool(forward[j, s]) for j in range(len(rpm)) for s in stations}
    if kinds == {True, False}:
        handles += [Line2D([], [], color=st.INK, linewidth=1.5, linestyle=st.WHIRL_STYLES[k])
                    for k in ("forward", "backward")]
        names += ["forward", "backward"]
    if created:
        return pn.figure_legend(fig, handles, names, 2.4)
    return lb.ink(first.legend(handles, names, loc="upper right", frameon=True,
                               framealpha=0.9, edgecolor=st.GRID,
                               fontsize=st.FONT_NOTE + 0.5, handlelength=2.0))


def _draw_orbit_set(ax, amplitudes, forward, half_width, small=False):
    """The orbits of one station at every speed: ellipse, once-per-turn dot, arrow.

    ``amplitudes`` is (n_speeds, 2) complex x, y in µm; ``half_width`` the axes'
    half-width, which sets whether an orbit is big enough to carry an arrow.
    """
    ax.axhline(0.0, color=st.FAINT, linewidth=0.6, zorder=1)
    ax.axvline(0.0, color=st.FAINT, linewidth=0.6, zorder=1)
    lines, dots, arrows = [], [], []
    for j, (x_amp, y_amp) in enumerate(amplitudes):
        colour = COLOURS[j % len(COLOURS)]
        xs, ys = ellipse(x_amp, y_amp, _TURN)
        style = st.WHIRL_STYLES["forward" if forward[j] else "backward"]
        lines.append(ax.plot(xs, ys, color=colour, linestyle=style,
                             linewidth=1.1 if small else 1.5, zorder=4)[0])
        dots.append(ax.plot([xs[0]], [ys[0]], linestyle="none", marker="o",
                            markersize=3.6 if small else 5.0, markerfacecolor=colour,
                            markeredgecolor=st.PAPER, markeredgewidth=0.6, zorder=6)[0])
        size = float(np.max(np.hypot(xs, ys)))
        if size >= ARROW_MIN * half_width:
            # A sixth of a turn after the once-per-turn dot, clear of it.
            arrow = FancyArrowPatch((xs[17], ys[17]), (xs[20], ys[20]), arrowstyle="-|>",
                                    mutation_scale=8 if small else 11, color=colour,
                                    linewidth=1.0, shrinkA=0, shrinkB=0, zorder=5)
            ax.add_patch(arrow)
            arrows.append(arrow)
    return tuple(lines), tuple(dots), tuple(arrows)


def _zoom_inset(ax, amplitudes, forward, largest, scale):
    """A magnified copy of small orbits in the lower left corner of their panel."""
    half = pn.round_up(1.2 * largest)
    inset = ax.inset_axes([0.025, 0.025, 0.36, 0.36])
    inset.set_facecolor(st.PAPER)
    inset.set_xlim(-half, half)
    inset.set_ylim(-half, half)
    inset.set_aspect("equal", adjustable="box")
    inset.set_xticks([])
    inset.set_yticks([])
    for spine in inset.spines.values():
        spine.set_color(st.FAINT)
        spine.set_linewidth(0.7)
    arrows = _draw_orbit_set(inset, amplitudes, forward, half, small=True)[2]
    inset.text(0.5, 0.97, f"\u00b1{st.signed(half, 'g')} \u00b5m  (\u00d7{scale / half:.3g})",
               transform=inset.transAxes, ha="center", va="top", fontsize=st.FONT_NOTE - 0.5,
               color=st.MUTED, zorder=7, bbox=st.paper_box())
    return inset, arrows
