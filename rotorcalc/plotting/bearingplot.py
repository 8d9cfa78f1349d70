"""A bearing's coefficients against speed in four panels: stiffness, damping, the
dimensionless coefficients against the Sommerfeld number, and the journal's eccentricity
and minimum film (the last two for a bearing computed from its geometry)."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from matplotlib.figure import Figure
from matplotlib.ticker import FuncFormatter, LogLocator, NullFormatter

from ..bearings.fixed_film import CAUTION as FILM_CAUTION
from ..vocabulary import CAUTION
from . import _style as st
from ._artists import Artists
from ._panels import figure_title
from ._units import UM, to_rpm

#: Line style per coefficient: direct terms solid, cross-coupled dashed.
STYLES = {"xx": (st.ITEM_COLOURS[0], "-"), "yy": (st.ITEM_COLOURS[1], "-"),
          "xy": (st.ITEM_COLOURS[2], (0, (5.0, 2.2))), "yx": (st.ITEM_COLOURS[3], (0, (5.0, 2.2)))}
PAIRS = (("xx", 0, 0), ("xy", 0, 1), ("yx", 1, 0), ("yy", 1, 1))


@dataclass(frozen=True)
class BearingCoefficientArtists(Artists):
    """What :func:`plot_bearing_coefficients` drew (and ``figure``, ``ax``, ``legend``).

    Attributes
    ----------
    axes : dict
        ``{"stiffness", "damping", "dimensionless", "film"}`` panels.
    lines : dict
        ``{"kxx": Line2D, ..., "cyy": Line2D}`` against speed.
    film_lines : dict
        ``{"eccentricity", "min_film", "kxx/...": ...}`` where a film state exists.
    caution_text : Text
    """

    axes: dict = None
    lines: dict = None
    film_lines: dict = None
    caution_text: object = None


def _band(ax, curves, label=None):
    low, high = (to_rpm(v) for v in curves.operating)
    if high > low:
        ax.axvspan(low, high, color=st.BAND_FILL, zorder=0, linewidth=0, label=label)


@st.literal_text
def plot_bearing_coefficients(curves, *, axes=None):
    """Draw a :class:`rotorcalc.analysis.BearingCurves` in four panels.

    Parameters
    ----------
    curves : BearingCurves
    axes : sequence of Axes, optional
        Stiffness, damping and, for a bearing computed from its geometry, dimensionless
        and film panels; a new figure when None (two panels for a table bearing).
    """
    rows = 1 if curves.record is None else 2
    if axes is None:
        fig = Figure(figsize=(10.0, 1.0 + 3.3 * rows), facecolor=st.PAPER)
        grid = fig.add_gridspec(rows, 2, left=0.08, right=0.92,
                                bottom=0.22 if rows == 1 else 0.12,
                                top=figure_title(fig, f"{curves.role.capitalize()} "
                                                 f"{curves.name}: coefficients against speed",
                                                 curves.description, 1.15),
                                hspace=0.5, wspace=0.3)
        axes = [fig.add_subplot(grid[i, j]) for i in range(rows) for j in range(2)]
    fig = axes[0].figure
    panels = dict(zip(("stiffness", "damping", "dimensionless", "film"), axes))
    rpm = to_rpm(curves.speeds)
    lines = {}
    for kind, values, scale, unit in (("stiffness", curves.stiffness, 1e-6, "MN/m"),
                                      ("damping", curves.damping, 1e-3, "kN s/m")):
        ax = panels[kind]
        st.style_axes(ax)
        _band(ax, curves, "operating range" if kind == "stiffness" else None)
        raw = None if curves.record is None else np.asarray(curves.record.coefficients)
        for n, (pair, i, j) in enumerate(PAIRS):
            colour, style = STYLES[pair]
            name = f"{'k' if kind == 'stiffness' else 'c'}{pair}"
            lines[name], = ax.plot(rpm, values[:, i, j] * scale, color=colour, linestyle=style,
                                   marker="o" if raw is None else None, markersize=2.5,
                                   linewidth=1.5, label=name)
            if raw is not None:     # the solves the smoothed table was fitted through
                column = n if kind == "stiffness" else n + 4
                ax.plot(rpm, raw[:, column] * scale, color=colour, linestyle="none",
                        marker="o", markersize=3.2, markerfacecolor="none",
                        markeredgewidth=0.8, alpha=0.8,
                        label="solved (table: lines)" if n == 0 else None)
        ax.axhline(0.0, color=st.MUTED, linewidth=0.7, zorder=1)
        st.label_axes(ax, "Speed (rpm)", f"{kind.capitalize()} ({unit})")
        # above the panel: no curve is ever hidden behind the key
        ax.legend(fontsize=st.FONT_NOTE + 0.5, frameon=False, ncol=5, loc="lower left",
                  bbox_to_anchor=(0.0, 1.0), borderaxespad=0.2, handlelength=1.8,
                  columnspacing=1.0)
    film_lines = _film_panels(panels, curves) if curves.record is not None else {}
    caution = fig.text(0.02, 0.015, FILM_CAUTION if curves.record is not None else CAUTION, fontsize=st.FONT_NOTE, color=st.MUTED,
                       ha="left", va="bottom", wrap=True)
    return BearingCoefficientArtists(figure=fig, ax=axes[0], legend=None, axes=panels,
                                     lines=lines, film_lines=film_lines,
                                     caution_text=caution)


def _film_panels(panels, curves):
    """The dimensionless and film-state panels of a bearing computed from its geometry."""
    record, out = curves.record, {}
    dim, film = panels["dimensionless"], panels["film"]
    for ax in (dim, film):
        st.style_axes(ax)
    s = record.sommerfeld
    for j, (pair, _, _) in enumerate(PAIRS):
        colour, style = STYLES[pair]
        out[f"k{pair}"], = dim.plot(s, record.dimensionless[:, j], color=colour,
                                    linestyle=style, linewidth=1.5, label=f"k{pair} c/W")
        out[f"c{pair}"], = dim.plot(s, record.dimensionless[:, j + 4], color=colour,
                                    linestyle=style, linewidth=1.0, alpha=0.6,
                                    marker=".", markersize=3, label=f"c{pair} c\u03c9/W")
    dim.set_xscale("log")
    dim.xaxis.set_major_locator(LogLocator(base=10.0, subs=(1.0, 2.0, 5.0)))
    dim.xaxis.set_major_formatter(FuncFormatter(lambda v, _: f"{v:g}"))
    dim.xaxis.set_minor_formatter(NullFormatter())
    dim.axhline(0.0, color=st.MUTED, linewidth=0.7, zorder=1)
    st.label_axes(dim, "Sommerfeld number S = \u03bcNLD/W (R/c)\u00b2",
                  "Dimensionless coefficient")
    dim.legend(fontsize=st.FONT_NOTE, frameon=False, ncol=4, loc="lower left",
               bbox_to_anchor=(0.0, 1.0), borderaxespad=0.2, columnspacing=1.0,
               handlelength=1.8)
    rpm = to_rpm(record.speeds)
    _band(film, curves)
    out["eccentricity"], = film.plot(rpm, record.eccentricity, color=st.ITEM_COLOURS[0],
                                     linewidth=1.6, marker="o", markersize=2.5,
                                     label="eccentricity ratio")
    film.set_ylim(0.0, 1.0)
    st.label_axes(film, "Speed (rpm)", "Eccentricity ratio")
    twin = film.twinx()
    st.style_axes(twin, grid=False)
    out["min_film"], = twin.plot(rpm, np.asarray(record.min_thickness) * UM,
                                 color=st.ITEM_COLOURS[1], linewidth=1.6,
                                 linestyle=(0, (5.0, 2.2)), label="minimum film (\u00b5m)")
    twin.set_ylim(0.0, None)
    st.label_axes(twin, None, "Minimum film (\u00b5m)")
    film.legend(handles=[out["eccentricity"], out["min_film"]], fontsize=st.FONT_NOTE + 0.5,
                frameon=False, ncol=2, loc="lower left", bbox_to_anchor=(0.0, 1.0),
                borderaxespad=0.2)
    return out
