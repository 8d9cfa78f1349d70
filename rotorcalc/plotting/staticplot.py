"""The rotor at rest: its deflection along the shaft under weight and steady loads, the
journal bearings marked with the force each carries."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..statics import CAUTION
from . import _style as st
from ._artists import Artists
from ._units import MM

UM = 1e6


@dataclass(frozen=True)
class StaticDeflectionArtists(Artists):
    """What :func:`plot_static_deflection` drew (and ``figure``, ``ax``, ``legend``).

    Attributes
    ----------
    curves : dict
        ``{"x": Line2D, "y": Line2D}``: each direction's deflection along the shaft (a
        direction with no deflection at all is not drawn).
    journals : list
        One marker and its reaction label per journal bearing.
    caution_text : Annotation
    """

    curves: dict = None
    journals: list = None
    caution_text: object = None


@st.literal_text
def plot_static_deflection(solution, *, ax=None):
    """Draw the deflected shaft of a :class:`rotorcalc.statics.StaticSolution`.

    The deflection in x and in y (µm) against the axial position (mm); each journal
    bearing a triangle on the curve with the force it carries (N); the screening caution
    below the axis label.
    """
    fig, ax, created = st.axes_for(ax, figsize=(9.0, 4.8))
    if created:
        fig.subplots_adjust(left=0.1, right=0.97, bottom=0.2, top=0.88)
    st.style_axes(ax)
    z = np.asarray(solution.node_z) * MM
    curves = {}
    for j, (axis, colour) in enumerate((("x", st.ITEM_COLOURS[1]), ("y", st.ITEM_COLOURS[0]))):
        u = np.asarray(solution.displacement[:, j]) * UM
        if np.any(u):
            curves[axis], = ax.plot(z, u, color=colour, linewidth=1.8,
                                    label=f"deflection in {axis} (\u00b5m)")
    ax.axhline(0.0, color=st.MUTED, linewidth=0.8, zorder=1)
    journals = []
    for (_, name, station), r in zip(solution.journals, solution.reactions):
        node = solution.station_nodes[station]
        at = (z[node], solution.displacement[node, 1] * UM)
        mark, = ax.plot([at[0]], [at[1]], marker="^", markersize=9, color=st.BEARING,
                        linestyle="none", zorder=5)
        # named at the top of the frame, a thin leader down to the journal: clear of the
        # curve, which passes through every journal
        label = ax.annotate(f"{name}\n{np.hypot(*r):.4g} N", xy=at, xytext=(at[0], 0.97),
                            textcoords=("data", "axes fraction"), ha="center", va="top",
                            fontsize=st.FONT_NOTE + 0.5, color=st.INK,
                            arrowprops=dict(arrowstyle="-", color=st.FAINT, linewidth=0.7,
                                            shrinkA=2, shrinkB=6))
        journals.append((mark, label))
    st.label_axes(ax, "Axial position (mm)", "Static deflection (\u00b5m)",
                  f"Rotor at rest, gravity {solution.gravity}: deflection and journal loads")
    low, high = ax.get_ylim()
    ax.set_ylim(low, high + 0.25 * (high - low))     # room for the journals' names
    legend = ax.legend(loc="upper center", fontsize=st.FONT_NOTE + 0.5, frameon=False,
                       ncol=2) if curves else None
    caution = ax.annotate(CAUTION, xy=(0.0, 0.0), xycoords="axes fraction", xytext=(0, -36),
                          textcoords="offset points", ha="left", va="top",
                          fontsize=st.FONT_NOTE, color=st.MUTED, annotation_clip=False)
    return StaticDeflectionArtists(figure=fig, ax=ax, legend=legend, curves=curves,
                                   journals=journals, caution_text=caution)
