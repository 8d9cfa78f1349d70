"""The unbalance response along the rotor through run-up against the clearances: the largest
orbit at every station up to trip, each clearance's limit and its full radial clearance."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..vocabulary import CAUTION
from . import _style as st
from ._artists import Artists
from ._units import MM

UM = 1e6


@dataclass(frozen=True)
class ClearanceEnvelopeArtists(Artists):
    """What :func:`plot_clearance_envelope` drew (and ``figure``, ``ax``, ``legend``).

    Attributes
    ----------
    envelope : Line2D
        The largest orbit semi-major axis at each station up to trip.
    limits : list
        Per clearance: (limit marker, full-clearance marker, name label).
    caution_text : Annotation
    """

    envelope: object = None
    limits: list = None
    caution_text: object = None


@st.literal_text
def plot_clearance_envelope(response, rotor, case_index=0, *, ax=None):
    """Draw one unbalance case's run-up envelope against the rotor's clearances.

    Parameters
    ----------
    response : rotorcalc.analysis.response.Response
    rotor : rotorcalc.model.Rotor
        Its station positions, clearances, clearance share and trip speed.
    case_index : int
    """
    fig, ax, created = st.axes_for(ax, figsize=(9.0, 4.6))
    if created:
        fig.subplots_adjust(left=0.1, right=0.97, bottom=0.22, top=0.88)
    st.style_axes(ax)
    op = rotor.operating
    top = op.trip_speed or op.max_speed
    amplitude, _ = response.run_up_envelope(case_index, top)
    z = np.asarray(rotor.station_positions) * MM
    envelope, = ax.plot(z, amplitude * UM, color=st.ITEM_COLOURS[0], linewidth=1.8,
                        marker="o", markersize=3.5,
                        label="largest orbit semi-major axis up to trip (\u00b5m)")
    share = rotor.response.clearance_share
    limits = []
    for k, c in enumerate(rotor.clearances):
        x = z[c.station]
        limit, = ax.plot([x], [share * c.radial * UM], marker="_", markersize=22,
                         markeredgewidth=2.4, color=st.SOURCE, linestyle="none",
                         label=f"limit: {share:.0%} of the radial clearance" if k == 0 else None)
        full, = ax.plot([x], [c.radial * UM], marker="_", markersize=22, markeredgewidth=1.2,
                        color=st.MUTED, linestyle="none",
                        label="radial clearance" if k == 0 else None)
        name = ax.annotate(c.name or f"clearance {k + 1}", xy=(x, c.radial * UM),
                           xytext=(0, 5), textcoords="offset points", ha="center",
                           va="bottom", fontsize=st.FONT_NOTE + 0.5, color=st.INK)
        limits.append((limit, full, name))
    ax.set_ylim(0.0, None)
    low, high = ax.get_ylim()
    ax.set_ylim(0.0, high * 1.18)          # room for the clearances' names
    st.label_axes(ax, "Axial position (mm)", "Orbit semi-major axis (\u00b5m)",
                  f"Unbalance case {response.cases[case_index]}: run-up envelope against "
                  "the clearances")
    legend = ax.legend(loc="upper left", fontsize=st.FONT_NOTE + 0.5, frameon=False)
    caution = ax.annotate(CAUTION, xy=(0.0, 0.0), xycoords="axes fraction", xytext=(0, -36),
                          textcoords="offset points", ha="left", va="top",
                          fontsize=st.FONT_NOTE, color=st.MUTED, annotation_clip=False)
    return ClearanceEnvelopeArtists(figure=fig, ax=ax, legend=legend, envelope=envelope,
                                    limits=limits, caution_text=caution)
