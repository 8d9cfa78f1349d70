"""Mode shapes at chosen points of the critical-speed map, drawn along the shaft.

It draws shapes from :func:`rotorcalc.analysis.csmap.map_mode_shape` (or
``cmap.shapes``) as they are; each is shown at the instant its largest orbit is at
the end of its major axis (:func:`._orbit.snapshot`), scaled to a peak of +1.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..errors import InputError
from . import _labels as lb
from . import _style as st
from ._artists import Artists
from ._orbit import major_axis, snapshot
from ._units import MM, to_rpm

#: One colour per shape, then the line style changes.
SHAPE_COLOURS = st.SERIES_COLOURS[:6]
SHAPE_STYLES = st.SERIES_STYLES
#: Map shapes closer than this (largest difference, normalised) are drawn one thin on top.
SHAPE_SAME = 0.03
_TITLE = "Mode shapes on the critical-speed map"


@dataclass(frozen=True)
class MapShapeArtists(Artists):
    """What :func:`map_shapes` drew (and ``figure``, ``ax``, ``legend`` as every picture).

    Attributes
    ----------
    lines : tuple of Line2D
        One per shape, parallel to ``labels`` (empty for a shape that is
        absent, all NaN).
    station_lines : tuple of Line2D
    """

    lines: tuple = ()
    station_lines: tuple = ()


@st.literal_text
def plot_map_shapes(node_z, shapes, labels, *, ax=None, station_nodes=None):
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
    z = np.asarray(node_z, dtype=float) * MM
    shapes = [np.asarray(s, dtype=complex) for s in shapes]
    labels = [str(t) for t in labels]
    _check(z, shapes, labels)
    fig, ax, created = st.axes_for(ax, figsize=(10.0, 5.0))
    if created:
        fig.subplots_adjust(left=0.08, right=0.97, bottom=0.24, top=0.88)
    st.style_axes(ax)
    span = z[-1] - z[0] if len(z) > 1 else 1.0
    ax.set_xlim(z[0] - 0.03 * span, z[-1] + 0.03 * span)
    ax.set_ylim(-1.15, 1.15)
    ax.set_yticks([-1.0, -0.5, 0.0, 0.5, 1.0])
    ax.axhline(0.0, color=st.MUTED, linewidth=0.6, zorder=1)
    station_lines = [] if station_nodes is None else _stations(ax, z, station_nodes)
    lines = _draw_shapes(ax, z, shapes)
    _titles(fig, ax, station_nodes is not None)
    shown = [t if np.isfinite(s).all() else f"{t} (absent)" for s, t in zip(shapes, labels)]
    legend = None
    if lines:
        legend = lb.legend_below(ax, lines, shown, 30,
                                 min(3, st.legend_columns(ax, shown, st.FONT_NOTE + 0.5)),
                                 handlelength=2.6, columnspacing=1.6)
    return MapShapeArtists(figure=fig, ax=ax, lines=tuple(lines),
                           station_lines=tuple(station_lines), legend=legend)


def _check(z, shapes, labels):
    if len(shapes) != len(labels):
        raise InputError("plot arguments", f"{len(shapes)} shapes but {len(labels)} labels: "
                         "give one label per shape", kind="option")
    for i, s in enumerate(shapes):
        if s.shape != (len(z), 2):
            raise InputError("plot arguments", f"shape {i} has shape {s.shape}, expected "
                             f"({len(z)}, 2): one (x, y) pair per node", kind="option")


def _stations(ax, z, station_nodes):
    """Faint numbered lines at the stations (in place of the vertical grid)."""
    ax.grid(False)
    for y in (-1.0, -0.5, 0.5, 1.0):
        ax.axhline(y, color=st.GRID, linewidth=0.7, zorder=0)
    lines = []
    for n, node in enumerate(np.asarray(station_nodes, dtype=int)):
        lines.append(ax.axvline(z[node], color=st.FAINT, linewidth=0.6,
                                linestyle=(0, (1.5, 2.0)), zorder=0.5))
        ax.annotate(str(n), xy=(z[node], 1.0), xycoords=("data", "axes fraction"),
                    xytext=(0, 2), textcoords="offset points", ha="center", va="bottom",
                    fontsize=st.FONT_NOTE, color=st.MUTED, annotation_clip=False)
    return lines


def _draw_shapes(ax, z, shapes):
    """One line per shape; a shape all but on an earlier one is drawn thin on top, so
    both show."""
    lines, drawn = [], []
    for i, s in enumerate(shapes):
        colour = SHAPE_COLOURS[i % len(SHAPE_COLOURS)]
        style = SHAPE_STYLES[(i // len(SHAPE_COLOURS)) % len(SHAPE_STYLES)]
        y = _signed_deflection(s)
        under = y is not None and any(np.max(np.abs(y - d)) < SHAPE_SAME for d in drawn)
        line, = ax.plot(z if y is not None else [], y if y is not None else [], color=colour,
                        linestyle=style, linewidth=0.9 if under else 2.0,
                        zorder=4.5 if under else 4, solid_capstyle="round")
        lines.append(line)
        if y is not None:
            drawn.append(y)
    return lines


def _titles(fig, ax, with_stations):
    """Axis labels, the title and, where it fits, a note right of it."""
    ax.set_xlabel("Axial position (mm)", fontsize=st.FONT_LABEL, color=st.INK)
    ax.set_ylabel("Deflection (each peak = 1)", fontsize=st.FONT_LABEL, color=st.INK)
    pad = 16 if with_stations else 8
    ax.set_title(_TITLE, fontsize=st.FONT_TITLE, color=st.INK, loc="left", pad=pad)
    note = "the shaft at the instant of its largest orbit"
    room = (ax.get_window_extent().width * 72.0 / fig.dpi
            - lb.text_width(_TITLE, st.FONT_TITLE))
    if lb.text_width(note, st.FONT_NOTE + 0.5) + 12 < room:
        ax.set_title(note, fontsize=st.FONT_NOTE + 0.5, color=st.MUTED, loc="right", pad=pad)


def _signed_deflection(shape):
    """Deflection at the instant the largest orbit is at its major semi-axis, peak +1.

    None for a shape with no finite, non-zero entry.
    """
    if not np.isfinite(shape).all():
        return None
    major = major_axis(shape)
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
