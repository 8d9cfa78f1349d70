"""Side view of a rotor model, drawn to scale, so the model can be checked by eye."""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np
from matplotlib.patches import Polygon, Rectangle

from . import _labels as lb
from . import _style as st
from ._artists import Artists
from ._geometry import disk_size, shaft_diameter
from ._layout_parts import SEAL_H, draw_seal, draw_source, layout_legend, soft_hatch
from ._units import MM
from ..errors import InputError

#: Below this ratio of largest diameter to length, the radial scale is stretched.
THIN_RATIO = 0.08
_SCALE_STEPS = (1, 2, 3, 4, 5, 6, 8, 10, 12, 15, 20, 25, 30, 40, 50)

# Symbol sizes, inches on the page.
_PAD_W, _PAD_H = 0.22, 0.05
_TRI_H, _TRI_HALF = 0.22, 0.10
_MASS_W, _MASS_H = 0.18, 0.11
_SPRING_H = 0.24
_GROUND_HALF = 0.15


@dataclass(frozen=True)
class LayoutArtists(Artists):
    """What :func:`rotor_layout` drew (and ``figure``, ``ax``, ``legend`` as every picture).

    Attributes
    ----------
    sections : list of Rectangle
        One per shaft section, in order.
    bores : list
        Hidden-line pairs of the hollow sections.
    disks : list of Rectangle
        One per disk, in the order of ``rotor.disks``.
    bearings : list of list
        The artists of each bearing or seal symbol, in the order of
        ``rotor.bearings``.
    sources : list
        One marker per destabilising source (``rotor.sources``), in their order.
    station_axis : SecondaryAxis
        Station numbers (and names) along the top.
    radial_scale : float
        Factor by which radial sizes are stretched (1 = true scale).
    """

    sections: list = field(default_factory=list)
    bores: list = field(default_factory=list)
    disks: list = field(default_factory=list)
    bearings: list = field(default_factory=list)
    sources: list = field(default_factory=list)
    station_axis: object = None
    radial_scale: float = 1.0


def _auto_scale(rotor, disk_sizes):
    biggest = max([s.outer_diameter * MM for s in rotor.sections] +
                  [d for d, _ in disk_sizes])
    ratio = biggest / (rotor.length * MM)
    if ratio >= THIN_RATIO:
        return 1.0
    for step in _SCALE_STEPS:
        if ratio * step >= 0.12:
            return float(step)
    return float(_SCALE_STEPS[-1])


@st.literal_text
def plot_rotor_layout(rotor, *, ax=None, radial_scale=None):
    """Draw a side view of a rotor model.

    Shaft sections are drawn as rectangles of their outer diameter (a bore as
    dashed hidden lines, added mass hatched), disks as the uniform disks of
    their mass and inertia, bearings as supports below the shaft (pedestals
    with mass and spring where given), seals as blocks at the shaft
    surface and destabilising sources as rings on the centre line.  Station numbers and names run along the top, the axial
    position in mm along the bottom.

    Parameters
    ----------
    rotor : rotorcalc.model.Rotor
    ax : matplotlib.axes.Axes, optional
        Axes to draw on; a new figure is made when omitted.
    radial_scale : float, optional
        Stretch of radial sizes against axial ones (1 = true scale).  By
        default true scale, unless the rotor is so slender that the picture
        would be a thin line; the factor used is stated on the picture.

    Returns
    -------
    LayoutArtists
    """
    z = rotor.station_positions * MM
    disk_sizes = [disk_size(d, rotor) for d in rotor.disks]
    f = _auto_scale(rotor, disk_sizes) if radial_scale is None else float(radial_scale)
    if not (math.isfinite(f) and f > 0):
        raise InputError("plot arguments", f"radial_scale must be a positive number, not "
                         f"{radial_scale!r}", kind="option")

    fig, ax, frame = _fitted(ax, rotor, z, disk_sizes, f)
    st.style_axes(ax, grid=False)
    ax.set_xlim(frame.x_lo, frame.x_hi)
    ax.set_ylim(frame.y_bottom, frame.y_top)
    ax.set_aspect(f, adjustable="box")
    for side in ("left", "right", "top"):
        ax.spines[side].set_visible(False)
    ax.yaxis.set_visible(False)
    ax.set_xlabel("Axial position (mm)", fontsize=st.FONT_LABEL, color=st.INK)
    # Centre line, as on a drawing.
    length = z[-1]
    ax.plot([frame.x_lo + 0.01 * length, frame.x_hi - 0.01 * length], [0, 0], color=st.MUTED,
            linewidth=0.6, linestyle=(0, (12, 3, 2, 3)), zorder=5)
    ym, mm_per_in = frame.ym, frame.mm_per_in
    sections, bores = _draw_sections(ax, rotor, z)
    disks = _draw_disks(ax, rotor, z, disk_sizes)
    _label_diameters(ax, rotor, z, disk_sizes, ym, mm_per_in)
    bearings = [draw_seal(ax, b, rotor, z, ym, mm_per_in) if b.role == "seal" else
                _draw_bearing(ax, b, rotor, z, frame.y_ground, ym, mm_per_in)
                for b in rotor.bearings]
    sources = [draw_source(ax, s, z) for s in rotor.sources]
    _label_disks(ax, rotor, z, disk_sizes, frame.plan)
    _label_bearings(ax, rotor, z, frame.name_y)
    station_axis = _station_axis(ax, rotor, z)
    scale_note = "true scale" if f == 1 else f"radial scale \u00d7{f:g}"
    note = f"length {length:.0f} mm \u00b7 rotor mass {rotor.mass:.1f} kg \u00b7 {scale_note}"
    ax.apply_aspect()          # the box the equal aspect leaves, not the one asked for
    box = lb.frame(ax)
    ax.set_title(rotor.name, fontsize=st.FONT_TITLE, color=st.INK, loc="left", pad=8)
    if (lb.text_width(rotor.name, st.FONT_TITLE) + lb.text_width(note, st.FONT_NOTE + 0.5)
            + 12.0 <= box[2] - box[0]):
        ax.set_title(note, fontsize=st.FONT_NOTE + 0.5, color=st.MUTED, loc="right", pad=8)
    else:   # side by side they would run into each other: the note joins the axis label
        ax.set_xlabel(f"Axial position (mm) \u00b7 {note}", fontsize=st.FONT_LABEL,
                      color=st.INK)
    return LayoutArtists(figure=fig, ax=ax, sections=sections, bores=bores, disks=disks,
                         bearings=bearings, sources=sources, station_axis=station_axis,
                         radial_scale=f,
                         legend=layout_legend(ax, rotor))


def _fitted(ax, rotor, z, disk_sizes, f):
    """``(figure, axes, frame)``: a new figure sized to the drawing at 9 inches wide, or
    the frame that fits the axes given (equal aspect in a low box: the picture is as high
    as the box, and narrower)."""
    if ax is None:
        frame = _frame(rotor, z, disk_sizes, f, 9.0)
        fig, ax, _ = st.axes_for(None, figsize=(frame.width_in + 1.0, frame.height_in + 2.6))
        w, h = fig.get_size_inches()
        fig.subplots_adjust(left=0.5 / w, right=1 - 0.5 / w, bottom=1.25 / h,
                            top=1 - 1.35 / h)
        return fig, ax, frame
    fig = ax.figure
    box = ax.get_window_extent()
    width_in, room_in = box.width / fig.dpi, box.height / fig.dpi
    frame = _frame(rotor, z, disk_sizes, f, width_in)
    for _ in range(3):
        if frame.height_in <= room_in * 1.001:
            break
        width_in *= room_in / frame.height_in
        frame = _frame(rotor, z, disk_sizes, f, width_in)
    return fig, ax, frame


@dataclass(frozen=True)
class _Frame:
    """Limits (mm) and page scale of a layout drawn ``width_in`` inches wide."""

    x_lo: float
    x_hi: float
    y_bottom: float
    y_top: float
    y_ground: float
    mm_per_in: float
    ym: float              # radial mm per inch on the page
    width_in: float
    height_in: float
    name_y: dict
    plan: list


def _frame(rotor, z, disk_sizes, f, width_in):
    length = z[-1]
    ends = [(z[d.station] - w / 2, z[d.station] + w / 2) for d, (_, w) in
            zip(rotor.disks, disk_sizes)]
    x_lo = min([0.0] + [a for a, _ in ends]) - 0.03 * length
    x_hi = max([length] + [b for _, b in ends]) + 0.03 * length
    mm_per_in = (x_hi - x_lo) / width_in
    ym = mm_per_in / f

    r_top = max([s.outer_diameter * MM / 2 for s in rotor.sections] +
                [d / 2 for d, _ in disk_sizes])
    plain = [b for b in rotor.bearings if b.role != "seal"]
    has_support = any(b.support is not None for b in plain)
    r_bear = max([shaft_diameter(rotor, b.station) * MM / 2 for b in plain], default=0.0)
    drop = _PAD_H + _TRI_H + ((_MASS_H + _SPRING_H) if has_support else 0.0)
    y_ground = -(r_bear + drop * ym) if plain else -r_top
    name_y = {i: _name_level(rotor, b, disk_sizes, y_ground, ym, z, mm_per_in)
              for i, b in enumerate(rotor.bearings)}
    y_bottom = min([y_ground - 0.35 * ym, -r_top - 0.1 * ym] +
                   [y - 0.22 * ym for y in name_y.values()])
    plan = _disk_label_plan(rotor, z, mm_per_in)
    label_tops = [disk_sizes[i][0] / 2 + (_DISK_LABEL_PT + 6 + _DISK_ROW_PT * row) / 72.0 * ym
                  for i, _, row in plan]
    y_top = max([r_top + 0.1 * ym] + label_tops)
    return _Frame(x_lo, x_hi, y_bottom, y_top, y_ground, mm_per_in, ym, width_in,
                  (y_top - y_bottom) / ym, name_y, plan)


def _draw_sections(ax, rotor, z):
    """The sections' rectangles and the hidden-line pairs of their bores."""
    sections, bores = [], []
    for i, s in enumerate(rotor.sections):
        r = s.outer_diameter * MM / 2
        hatch = "////" if s.added_mass > 0 else None
        rect = Rectangle((z[i], -r), z[i + 1] - z[i], 2 * r, facecolor=st.STEEL,
                         edgecolor=st.STEEL_EDGE, linewidth=0.8, hatch=hatch, zorder=2)
        soft_hatch(rect)
        ax.add_patch(rect)
        sections.append(rect)
        if s.inner_diameter > 0:
            ri = s.inner_diameter * MM / 2
            ax.add_patch(Rectangle((z[i], -ri), z[i + 1] - z[i], 2 * ri, facecolor=st.BORE,
                                   edgecolor="none", alpha=0.7, zorder=2.1))
            lines = ax.plot([z[i], z[i + 1]], [ri, ri], [z[i], z[i + 1]], [-ri, -ri],
                            color=st.STEEL_EDGE, linewidth=0.7, linestyle=(0, (4, 2)),
                            zorder=2.2)
            bores.append(lines)
    return sections, bores


def _draw_disks(ax, rotor, z, sizes):
    return [ax.add_patch(Rectangle((z[disk.station] - w / 2, -d / 2), w, d, facecolor=st.DISK,
                                   edgecolor=st.STEEL_EDGE, linewidth=0.8, zorder=3))
            for disk, (d, w) in zip(rotor.disks, sizes)]


def _label_diameters(ax, rotor, z, sizes, ym, xm):
    """One diameter label per run of equal sections, placed clear of the disks."""
    covered = [(z[d.station] - w / 2, z[d.station] + w / 2) for d, (_, w) in
               zip(rotor.disks, sizes)]
    n = len(rotor.sections)
    i = 0
    while i < n:
        s = rotor.sections[i]
        k = i
        while (k + 1 < n and rotor.sections[k + 1].outer_diameter == s.outer_diameter
               and rotor.sections[k + 1].inner_diameter == s.inner_diameter):
            k += 1
        text = f"\u00d8{s.outer_diameter * MM:g}"
        if s.inner_diameter > 0:
            text += f"/{s.inner_diameter * MM:g}"
        needed = 0.58 * 6.5 * len(text) / 72.0 * xm + 2.0
        centre = 0.5 * (z[i] + z[k + 1])
        # Inside one section (not across a station line), clear of the disks, as
        # near the middle of the run as that allows.
        spots = []
        for j in range(i, k + 1):
            mid = 0.5 * (z[j] + z[j + 1])
            for u, v in _free_stretches(z[j], z[j + 1], covered):
                if v - u >= needed:
                    spots.append(min(max(mid, u + needed / 2), v - needed / 2))
        best = min(spots, key=lambda x: abs(x - centre)) if spots else None
        r = s.outer_diameter * MM / 2
        height_ok = 2 * r >= 8.0 / 72.0 * ym
        if best is not None and height_ok:
            ax.text(best, 0.0, text, fontsize=6.5, color=st.INK, ha="center", va="center",
                    zorder=6, bbox=dict(boxstyle="square,pad=0.1", facecolor=st.STEEL,
                                        edgecolor="none"))
        i = k + 1


def _free_stretches(a, b, covered):
    """Parts of [a, b] not covered by any of the (start, end) intervals."""
    cuts = [(a, b)]
    for c0, c1 in covered:
        nxt = []
        for u, v in cuts:
            if c1 <= u or c0 >= v:
                nxt.append((u, v))
                continue
            if c0 > u:
                nxt.append((u, c0))
            if c1 < v:
                nxt.append((c1, v))
        cuts = nxt
    return cuts


def _draw_bearing(ax, bearing, rotor, z, y_ground, ym, xm):
    x = z[bearing.station]
    r = shaft_diameter(rotor, bearing.station) * MM / 2
    artists = []
    pad = Rectangle((x - _PAD_W / 2 * xm, -r - _PAD_H * ym), _PAD_W * xm, _PAD_H * ym,
                    facecolor=st.BEARING, edgecolor=st.BEARING, linewidth=0.6, zorder=4)
    artists.append(ax.add_patch(pad))
    apex = -r - _PAD_H * ym
    if bearing.support is not None:
        base = y_ground + (_SPRING_H + _MASS_H) * ym
    else:
        base = y_ground
    tri = Polygon([(x, apex), (x - _TRI_HALF * xm, base), (x + _TRI_HALF * xm, base)],
                  closed=True, facecolor=st.PAPER, edgecolor=st.BEARING, linewidth=1.0,
                  zorder=4)
    artists.append(ax.add_patch(tri))
    if bearing.support is not None:
        m_bot = base - _MASS_H * ym
        block = Rectangle((x - _MASS_W / 2 * xm, m_bot), _MASS_W * xm, _MASS_H * ym,
                          facecolor=st.FAINT, edgecolor=st.BEARING, linewidth=0.9, zorder=4)
        artists.append(ax.add_patch(block))
        # Zigzag spring from the pedestal mass down to the ground.
        n = 6
        ys = np.linspace(m_bot, y_ground, 2 * n + 3)
        xs = np.full_like(ys, x)
        xs[2:-2] = x + np.where(np.arange(2 * n - 1) % 2 == 0, 1, -1) * 0.05 * xm
        artists.extend(ax.plot(xs, ys, color=st.BEARING, linewidth=0.9, zorder=4))
    artists.extend(ax.plot([x - _GROUND_HALF * xm, x + _GROUND_HALF * xm],
                           [y_ground, y_ground], color=st.BEARING, linewidth=1.1, zorder=4))
    ticks = np.linspace(x - _GROUND_HALF * xm, x + (_GROUND_HALF - 0.05) * xm, 6)
    for t in ticks:
        artists.extend(ax.plot([t, t + 0.05 * xm], [y_ground, y_ground - 0.06 * ym],
                               color=st.BEARING, linewidth=0.7, zorder=4))
    return artists


def _disk_label_plan(rotor, z, xm):
    """(disk index, text, row) of every disk label; rows keep neighbours apart."""
    order = sorted(range(len(rotor.disks)), key=lambda i: z[rotor.disks[i].station])
    texts, centres, halves = [], [], []
    for i in order:
        disk = rotor.disks[i]
        name = disk.name or f"disk at {disk.station}"
        text = f"{name}\n{disk.mass:.3g} kg"
        texts.append(text)
        centres.append(z[disk.station] / xm * 72.0)
        halves.append(0.29 * st.FONT_NOTE * max(len(t) for t in text.split("\n")))
    return list(zip(order, texts, lb.stack_rows(centres, halves, gap=3.0)))


#: Height of a two-line disk label and the step between label rows, points.
_DISK_LABEL_PT, _DISK_ROW_PT = 23.0, 20.0


def _label_disks(ax, rotor, z, sizes, plan):
    for i, text, row in plan:
        disk = rotor.disks[i]
        d = sizes[i][0]
        ax.annotate(text, xy=(z[disk.station], d / 2), xytext=(0, 3 + _DISK_ROW_PT * row),
                    textcoords="offset points", ha="center", va="bottom",
                    fontsize=st.FONT_NOTE, color=st.INK, linespacing=1.1, zorder=6,
                    annotation_clip=False,
                    arrowprops=dict(arrowstyle="-", color=st.FAINT, linewidth=0.6,
                                    shrinkA=0, shrinkB=0) if row else None)


def _name_level(rotor, bearing, disk_sizes, y_ground, ym, z, mm_per_in):
    """Height of the top of a bearing's or seal's name: below its symbol and any disk the
    name would run into."""
    lowest = y_ground if bearing.role != "seal" else \
        -shaft_diameter(rotor, bearing.station) * MM / 2 - SEAL_H * ym
    half = 0.29 * st.FONT_NOTE * len(_bearing_text(bearing)) / 72.0 * mm_per_in
    for disk, (d, w) in zip(rotor.disks, disk_sizes):
        if abs(z[disk.station] - z[bearing.station]) <= half + w / 2:
            lowest = min(lowest, -d / 2)
    return lowest - 0.08 * ym


def _bearing_text(bearing):
    return bearing.name or ("seal" if bearing.role == "seal" else "bearing")


def _label_bearings(ax, rotor, z, name_y):
    order = sorted(range(len(rotor.bearings)), key=lambda i: z[rotor.bearings[i].station])
    if not order:
        return
    items = [rotor.bearings[i] for i in order]
    texts = [_bearing_text(b) for b in items]
    centres = [lb.points(ax, (z[b.station], 0.0))[0] for b in items]
    halves = [0.29 * st.FONT_NOTE * len(t) for t in texts]
    rows = lb.stack_rows(centres, halves, gap=3.0)
    for i, b, text, row in zip(order, items, texts, rows):
        colour = st.SEAL if b.role == "seal" else st.INK
        ax.annotate(text, xy=(z[b.station], name_y[i]),
                    xytext=(0, -10 * row), textcoords="offset points", ha="center", va="top",
                    fontsize=st.FONT_NOTE, color=colour, annotation_clip=False, zorder=6)


def _station_axis(ax, rotor, z):
    sec = ax.secondary_xaxis("top")
    names = {}
    for name, number in rotor.station_names.items():
        names.setdefault(number, name)
    labels = [f"{i}  {names[i]}" if i in names else f"{i}" for i in range(len(z))]
    sec.set_xticks(z, labels)
    sec.tick_params(colors=st.INK, labelsize=st.FONT_NOTE, length=3, width=0.6,
                    labelrotation=40 if names else 0)
    for text in sec.get_xticklabels() if names else ():
        text.set_horizontalalignment("left")
        text.set_rotation_mode("anchor")
    sec.spines["top"].set_color(st.FAINT)
    ax.annotate("station", xy=(0.0, 1.0), xycoords="axes fraction", xytext=(-6, 0),
                textcoords="offset points", ha="right", va="center", fontsize=st.FONT_NOTE,
                color=st.MUTED, annotation_clip=False)
    return sec
