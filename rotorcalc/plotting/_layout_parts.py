"""Parts of the rotor side view (:mod:`.layout`): seals, destabilising sources and the
legend."""

from __future__ import annotations

from matplotlib.lines import Line2D
from matplotlib.patches import Patch, Rectangle

from . import _labels as lb
from . import _style as st
from ._geometry import shaft_diameter
from ._units import MM

#: A seal's blocks, as shares of the drawing's inch (axial) and of its radial inch.
SEAL_W, SEAL_H = 0.05, 0.07


def soft_hatch(patch):
    """Thin, lighter hatching where matplotlib can set it apart from the edge (3.10+)."""
    if hasattr(patch, "set_hatchcolor"):
        patch.set_hatchcolor(st.ADDED_MASS_HATCH)
    if hasattr(patch, "set_hatch_linewidth"):
        patch.set_hatch_linewidth(0.5)


def draw_seal(ax, bearing, rotor, z, ym, xm):
    x = z[bearing.station]
    r = shaft_diameter(rotor, bearing.station) * MM / 2
    artists = []
    for sign in (1, -1):
        for dx in (-0.045, 0.045):
            y0 = r if sign > 0 else -r - SEAL_H * ym
            rect = Rectangle((x + (dx - SEAL_W / 2) * xm, y0), SEAL_W * xm, SEAL_H * ym,
                             facecolor=st.SEAL, edgecolor=st.SEAL, linewidth=0.5, zorder=5)
            artists.append(ax.add_patch(rect))
    return artists


def draw_source(ax, source, z):
    """A ring on the centre line at the station."""
    return ax.plot([z[source.station]], [0.0], **SOURCE_STYLE, zorder=7)[0]


#: How a destabilising source is marked (drawing and legend).
SOURCE_STYLE = {"linestyle": "none", "marker": "o", "markersize": 8, "markerfacecolor": "none",
                "markeredgecolor": st.SOURCE, "markeredgewidth": 2.0}


def layout_legend(ax, rotor):
    """The side view's legend: only what the drawing shows."""
    handles = [Patch(facecolor=st.STEEL, edgecolor=st.STEEL_EDGE, linewidth=0.8)]
    labels = ["shaft section"]
    if any(s.inner_diameter > 0 for s in rotor.sections):
        handles.append(Line2D([], [], color=st.STEEL_EDGE, linewidth=0.7,
                              linestyle=(0, (4, 2))))
        labels.append("bore (hidden line)")
    if any(s.added_mass > 0 for s in rotor.sections):
        patch = Patch(facecolor=st.STEEL, edgecolor=st.STEEL_EDGE, linewidth=0.8, hatch="////")
        soft_hatch(patch)
        handles.append(patch)
        labels.append("carries added mass")
    if rotor.disks:
        handles.append(Patch(facecolor=st.DISK, edgecolor=st.STEEL_EDGE, linewidth=0.8))
        labels.append("disk (drawn from its mass and inertia)")
    if any(b.role != "seal" for b in rotor.bearings):
        handles.append(Line2D([], [], linestyle="none", marker="^", markersize=7,
                              markerfacecolor=st.PAPER, markeredgecolor=st.BEARING))
        labels.append("bearing")
    if any(b.support is not None and b.role != "seal" for b in rotor.bearings):
        handles.append(Line2D([], [], linestyle="none", marker="s", markersize=6,
                              markerfacecolor=st.FAINT, markeredgecolor=st.BEARING))
        labels.append("support mass on spring")
    if any(b.role == "seal" for b in rotor.bearings):
        handles.append(Patch(facecolor=st.SEAL, edgecolor=st.SEAL))
        labels.append("seal")
    if rotor.sources:
        handles.append(Line2D([], [], **SOURCE_STYLE))
        labels.append("destabilising source ([[cross_coupling]])")
    return lb.legend_below(ax, handles, labels, 34,
                           st.legend_columns(ax, labels, st.FONT_NOTE + 0.5, 1.8, 1.6),
                           handlelength=1.8, columnspacing=1.6)
