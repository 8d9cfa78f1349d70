"""Mode shape of one damped mode at one speed, with the orbits at the stations."""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np
from matplotlib.lines import Line2D
from matplotlib.patches import FancyArrowPatch, Patch, Polygon, Rectangle
from matplotlib.transforms import ScaledTranslation, offset_copy

from ..errors import InputError
from . import _labels as lb
from . import _style as st
from ._artists import Artists
from ._geometry import disk_size, shaft_diameter
from ._orbit import ellipse, forward_dominant, major_axis, snapshot, turn
from ._units import MM, to_hz, to_rpm

LINE = "#2d6fb4"
ENVELOPE = "#dce7f3"
BACKWARD = "#c8571b"

# Vertical layout in data units: shape in [-1, 1], orbit strip below.
_TOP = 1.22
_SHAPE_BOTTOM = -1.12
_STRIP_SPLIT = -1.22
_ORBIT_Y = -1.62
_BOTTOM = -2.08
_OUTLINE_HALF = 0.30   # largest outline radius, in normalised units


@dataclass(frozen=True)
class ModeShapeArtists(Artists):
    """What :func:`mode_shape` drew (and ``figure``, ``ax``, ``legend`` as every picture).

    Attributes
    ----------
    envelope : PolyCollection
        The band swept by the orbits' major semi-axes.
    line : Line2D
        The deflected shaft at the instant the largest orbit reaches its
        major semi-axis.
    station_lines : list of Line2D
    orbits : list of Line2D
        One small orbit per station drawn (crowded stations are skipped).
    outline : list
        The faint rotor outline (empty when no rotor is given).
    """

    envelope: object = None
    line: object = None
    station_lines: list = field(default_factory=list)
    orbits: list = field(default_factory=list)
    outline: list = field(default_factory=list)


@st.literal_text
def plot_mode_shape(modes, mode=1, *, ax=None, rotor=None, orbits=True, title=None):
    """Draw the shape of one mode of a :class:`~rotorcalc.analysis.Modes` result.

    The shaded band is the major semi-axis of each node's orbit (the room the
    whirling shaft sweeps); the line is the shaft at the instant the largest
    orbit reaches its major semi-axis, so nodal points and the sense of
    bending show.  Both are scaled to a largest major semi-axis of 1.

    Parameters
    ----------
    modes : rotorcalc.analysis.Modes
    mode : int
        Mode number, from 1 (lowest frequency), as in the tables.
    ax : matplotlib.axes.Axes, optional
        Axes to draw on; a new figure is made when omitted.
    rotor : rotorcalc.model.Rotor, optional
        When given, a faint outline of the shaft, disks and bearings is drawn
        beneath the shape (radial size not to scale).
    orbits : bool
        Draw the small orbit of each station below the shape, seen from the
        +z end (spin anticlockwise), with the instant of the line marked.
    title : str, optional
        Instead of "Mode N at S rpm" (e.g. "Critical speed 2 at S rpm").

    Returns
    -------
    ModeShapeArtists
    """
    n_modes = len(modes.eigenvalues)
    if isinstance(mode, bool) or not isinstance(mode, (int, np.integer)) \
            or not 1 <= mode <= n_modes:
        raise InputError("mode", "is not a mode of the result", value=mode,
                         expected=f"a mode number 1..{n_modes}", kind="range")
    index = int(mode) - 1
    fig, ax, created = st.axes_for(ax, figsize=(10.0, 5.4))
    if created:
        fig.subplots_adjust(left=0.08, right=0.97, bottom=0.2, top=0.86)
    st.style_axes(ax)
    shape = np.asarray(modes.shapes[index])
    z = np.asarray(modes.node_z, dtype=float) * MM
    stations = np.asarray(modes.station_nodes, dtype=int)
    major, scale, line, instant = _scaled(shape)
    _frame(ax, z, rotor, orbits)
    outline = _outline(ax, rotor) if rotor is not None else []
    envelope = ax.fill_between(z, -major / scale, major / scale, facecolor=ENVELOPE,
                               edgecolor=LINE, linewidth=0.5, alpha=0.6, zorder=2)
    shaft, = ax.plot(z, line, color=LINE, linewidth=2.0, zorder=4)
    shaft.set_solid_capstyle("round")
    station_lines = _stations(ax, z, stations, line)
    drawn = []
    if orbits:
        ax.axhline(_STRIP_SPLIT, color=st.FAINT, linewidth=0.8, zorder=1)
        drawn = _orbits(ax, shape, z, stations, major, scale, instant)
    else:
        for k, node in enumerate(stations):
            ax.annotate(str(k), xy=(z[node], _SHAPE_BOTTOM), xytext=(0, -2),
                        textcoords="offset points", ha="center", va="top",
                        fontsize=st.FONT_NOTE, color=st.MUTED)
    _titles(ax, modes, index, title)
    return ModeShapeArtists(figure=fig, ax=ax, envelope=envelope, line=shaft,
                            station_lines=station_lines, orbits=drawn, outline=outline,
                            legend=_legend(ax, rotor is not None, orbits))


def _scaled(shape):
    """The orbits' major semi-axes, the largest (the scale), the shaft at the instant the
    largest orbit is at its major semi-axis scaled by it, and that instant."""
    major = major_axis(shape)
    peak_node = int(np.argmax(major))
    scale = float(major[peak_node]) or 1.0
    line, instant = snapshot(shape, peak_node)
    line = (line if line is not None else np.zeros(len(shape))) / scale
    return major, scale, line, instant


def _frame(ax, z, rotor, orbits):
    """Limits: the shaft (and the disks of the rotor drawn) across, the shape and the
    orbit strip up."""
    span = z[-1] - z[0] if len(z) > 1 else 1.0
    x_lo, x_hi = z[0], z[-1]
    if rotor is not None:
        zs = rotor.station_positions * MM
        for disk in rotor.disks:
            w = disk_size(disk, rotor)[1]
            x_lo, x_hi = min(x_lo, zs[disk.station] - w / 2), max(x_hi, zs[disk.station] + w / 2)
    ax.set_xlim(x_lo - 0.03 * span, x_hi + 0.03 * span)
    ax.set_ylim(_BOTTOM if orbits else _SHAPE_BOTTOM - 0.1, _TOP)
    ax.set_yticks([-1.0, -0.5, 0.0, 0.5, 1.0])
    ax.axhline(0.0, color=st.MUTED, linewidth=0.6, zorder=1)


def _stations(ax, z, stations, line):
    """A faint line and a dot on the shaft at each station; horizontal grid lines over
    the shape only (the stations stand in for vertical ones)."""
    station_lines = []
    for node in stations:
        station_lines.append(ax.plot([z[node], z[node]], [_SHAPE_BOTTOM, 1.1], color=st.FAINT,
                                     linewidth=0.6, linestyle=(0, (1.5, 2.0)), zorder=1.5)[0])
        ax.plot([z[node]], [line[node]], linestyle="none", marker="o", markersize=3.2,
                markerfacecolor=st.PAPER, markeredgecolor=LINE, markeredgewidth=0.9,
                zorder=5)
    ax.grid(False)
    for y in (-1.0, -0.5, 0.5, 1.0):
        ax.axhline(y, color=st.GRID, linewidth=0.7, zorder=0)
    return station_lines


def _titles(ax, modes, index, title=None):
    """The mode and speed as title, its frequency, log decrement and whirl below it."""
    freq = float(modes.frequency[index])
    hz, cpm = to_hz(freq), to_rpm(freq)
    log_dec = float(modes.log_dec[index])
    whirl = modes.whirl[index]
    ax.set_title(title or f"Mode {index + 1} at {st.whole(to_rpm(modes.speed))} rpm", loc="left",
                 fontsize=st.FONT_TITLE, color=st.INK, pad=20)
    ax.text(0.0, 1.015, f"{hz:.2f} Hz ({st.whole(cpm)} cpm)  \u00b7  log decrement "
            f"\u03b4 = {st.log_dec_text(log_dec)}  \u00b7  {whirl} whirl", transform=ax.transAxes,
            fontsize=st.FONT_LABEL - 0.5, color=st.MUTED, ha="left", va="bottom")
    ax.set_xlabel("Axial position (mm)", fontsize=st.FONT_LABEL, color=st.INK)
    ax.set_ylabel("Deflection, normalised", fontsize=st.FONT_LABEL, color=st.INK)


def _outline(ax, rotor):
    """Faint shaft, disk and bearing outline beneath the shape (radial size not to scale)."""
    zs = rotor.station_positions * MM
    sizes = [disk_size(d, rotor) for d in rotor.disks]
    r_max = max([s.outer_diameter * MM / 2 for s in rotor.sections] +
                [d / 2 for d, _ in sizes])
    k = _OUTLINE_HALF / r_max
    xs, ys = [], []
    for i, s in enumerate(rotor.sections):
        r = s.outer_diameter * MM / 2 * k
        xs += [zs[i], zs[i + 1]]
        ys += [r, r]
    poly = Polygon(np.column_stack([xs + xs[::-1], ys + [-y for y in ys[::-1]]]),
                   closed=True, facecolor=st.FAINT, edgecolor="none", alpha=0.35, zorder=1.2)
    artists = [ax.add_patch(poly)]
    for disk, (d, w) in zip(rotor.disks, sizes):
        x = zs[disk.station]
        artists.append(ax.add_patch(Rectangle((x - w / 2, -d / 2 * k), w, d * k,
                                              facecolor=st.FAINT, edgecolor="none",
                                              alpha=0.35, zorder=1.2)))
    for b in rotor.bearings:
        x = zs[b.station]
        r = shaft_diameter(rotor, b.station) * MM / 2 * k
        marker = "s" if b.role == "seal" else "^"
        colour = st.SEAL if b.role == "seal" else st.BEARING
        artists.extend(ax.plot([x], [-r - 0.07], linestyle="none", marker=marker,
                               markersize=6 if marker == "^" else 4,
                               markerfacecolor="none", markeredgecolor=colour,
                               markeredgewidth=0.9, alpha=0.55, zorder=1.3))
        if b.name:      # named, so a reader finds the supports on the shape
            artists.append(ax.annotate(b.name, xy=(x, -r - 0.07), xytext=(0, -6),
                                       textcoords="offset points", ha="center", va="top",
                                       fontsize=st.FONT_NOTE, color=colour, alpha=0.9,
                                       zorder=1.3))
    return artists


def _orbits(ax, shape, z, stations, major, scale, instant):
    """Small orbits of the stations in the strip below the shape, sized by one scale."""
    fig = ax.figure
    box = ax.get_window_extent()
    dpi = fig.dpi
    x_px = [ax.transData.transform((z[n], 0.0))[0] for n in stations]
    strip_in = (box.height / dpi) * (_STRIP_SPLIT - _BOTTOM) / (_TOP - _BOTTOM)
    radius = min(0.17, 0.36 * strip_in)
    gaps = np.diff(x_px) / dpi if len(x_px) > 1 else np.array([1.0])
    # Shrink a little for crowded stations, then skip those still too close.
    radius = max(min(radius, 0.48 * float(np.median(gaps)) - 0.01), 0.06)
    keep, last = [], -np.inf
    for k, px in enumerate(x_px):
        if (px - last) / dpi >= 2 * radius + 0.03:
            keep.append(k)
            last = px
    drawn = []
    for k in keep:
        node = stations[k]
        x, y = shape[node]
        trans = fig.dpi_scale_trans + ScaledTranslation(z[node], _ORBIT_Y, ax.transData)
        path = np.column_stack(ellipse(x, y, turn(97, instant))) / scale * radius
        forward = forward_dominant(x, y)
        colour = LINE if forward else BACKWARD
        style = "-" if forward else (0, (2.5, 1.5))
        size = major[node] / scale
        if size < 0.04:
            drawn.append(ax.plot([0], [0], transform=trans, linestyle="none", marker="o",
                                 markersize=2.5, color=colour, zorder=5)[0])
        else:
            drawn.append(ax.plot(path[:, 0], path[:, 1], transform=trans, color=colour,
                                 linewidth=1.0, linestyle=style, zorder=5)[0])
            ax.plot([path[0, 0]], [path[0, 1]], transform=trans, linestyle="none", marker="o",
                    markersize=3.0, color=colour, zorder=6)
            if size >= 0.3:
                # Direction of travel, a quarter turn after the marked instant.
                arrow = FancyArrowPatch(tuple(path[21]), tuple(path[25]), transform=trans,
                                        arrowstyle="-|>", mutation_scale=4 + 5 * size,
                                        color=colour, linewidth=0.8, shrinkA=0, shrinkB=0,
                                        zorder=6)
                ax.add_patch(arrow)
        ax.plot([-radius, radius], [0, 0], transform=trans, color=st.GRID, linewidth=0.5,
                zorder=4)
        ax.plot([0, 0], [-radius, radius], transform=trans, color=st.GRID, linewidth=0.5,
                zorder=4)
        label_trans = offset_copy(ax.transData, fig=fig, y=-(radius * 72 + 3), units="points")
        ax.text(z[node], _ORBIT_Y, str(k), transform=label_trans, ha="center", va="top",
                fontsize=st.FONT_NOTE, color=st.MUTED)
    ax.text(0.005, (_STRIP_SPLIT - _BOTTOM) / (_TOP - _BOTTOM) - 0.012,
            "orbits at stations, seen from the +z end", transform=ax.transAxes,
            fontsize=st.FONT_NOTE - 0.5, color=st.MUTED, ha="left", va="top")
    return drawn


def _legend(ax, with_outline, with_orbits):
    handles = [Patch(facecolor=ENVELOPE, edgecolor=LINE, linewidth=0.5),
               Line2D([], [], color=LINE, linewidth=2.0)]
    labels = ["orbit major semi-axis", "shaft at the instant of largest deflection"]
    if with_orbits:
        handles += [Line2D([], [], color=LINE, linewidth=1.0),
                    Line2D([], [], color=BACKWARD, linewidth=1.0, linestyle=(0, (2.5, 1.5)))]
        labels += ["forward orbit", "backward orbit"]
    if with_outline:
        handles.append(Patch(facecolor=st.FAINT, alpha=0.35, edgecolor="none"))
        labels.append("rotor outline (radius not to scale)")
    return lb.legend_below(ax, handles, labels, 32,
                           st.legend_columns(ax, labels, st.FONT_NOTE + 0.5),
                           handlelength=2.0, columnspacing=1.4)
