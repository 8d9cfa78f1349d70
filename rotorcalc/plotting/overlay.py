"""The whirl-speed maps of a base rotor and its variants, overlaid on one axes.

It draws a :class:`rotorcalc.analysis.whatif.Comparison` as it is: each variant
in its own colour (the base in ink), the whirl sense as the line style, as on the
single map (:mod:`.speedmap`).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from matplotlib.lines import Line2D

from ..errors import InputError
from . import _labels as lb
from . import _style as st
from ._artists import WhirlMapArtists
from ._units import to_rpm
from .speedmap import branch_runs, frequency_top

#: One colour per variant, the base in ink.
#: The base in ink, then the item colours, then the series colours they lack: a tolerance
#: envelope's eight corners and its nominal rotor each get a colour of their own.
VARIANT_COLOURS = (st.INK,) + st.ITEM_COLOURS + tuple(
    c for c in st.SERIES_COLOURS if c not in st.ITEM_COLOURS)
#: Longest list of critical speeds per variant in the key; the rest are counted.
MAX_LISTED = 9


@dataclass(frozen=True)
class VariantMapArtists(WhirlMapArtists):
    """What :func:`variant_maps` drew (and ``figure``, ``legend`` as every picture).

    Attributes
    ----------
    ax : Axes
        Spin speed (rpm) across, damped natural frequency (cpm) up.
    names : tuple of str
        The base and the variants, in the order of the comparison.
    colours : tuple of str
        The colour of each, parallel to ``names``.
    branches : tuple of tuple of Line2D
        Per variant, the pieces of all its branches (one piece per run of
        equal whirl label).
    branch_whirl : tuple of tuple of str
        The whirl label of each piece, parallel to ``branches``.
    critical_markers : tuple of tuple of Line2D
        Per variant, one marker per critical speed of its screening.
    order_lines, order_labels : tuple
        One excitation-order line and label per order.
    band, band_labels, trip_line
        The operating range (x in rpm, full height), its speeds above the frame.
    freq_max : float
        Upper limit of the frequency axis, cpm.
    hidden_branches : int
        Branches (of all variants) lying wholly above ``freq_max``.
    """

    names: tuple = ()
    colours: tuple = ()
    critical_markers: tuple = ()


@st.literal_text
def plot_variant_maps(comparison, operating=None, orders=(1.0,), *, ax=None, freq_max=None,
                      title="Whirl-speed maps of the variants"):
    """Overlay the whirl-speed maps of a base rotor and its variants.

    Each variant keeps one colour (the base in ink) for its branches and its
    critical speeds; the line style tells the whirl sense (solid forward,
    dashed backward, dotted mixed), changing half-way between two sweep
    speeds as on the single map.

    Parameters
    ----------
    comparison : rotorcalc.analysis.whatif.Comparison
    operating : OperatingRange, optional
        Shaded band with its ends labelled above the frame, trip speed dashed.
    orders : sequence of float
        Excitation orders drawn as lines ``frequency = order x speed``.
    ax : matplotlib.axes.Axes, optional
        Axes to draw on; a new figure is made when omitted.
    freq_max : float, optional
        Top of the frequency axis, cpm; by default as on the single map, taken
        over all variants (branches wholly above are counted in the key).
    title : str
        Above the frame.

    Returns
    -------
    VariantMapArtists
    """
    names, screenings = tuple(comparison.names), tuple(comparison.screenings)
    if len(names) != len(screenings):
        raise InputError("plot arguments", f"the comparison has {len(names)} names but "
                         f"{len(screenings)} screenings", kind="option")
    fig, ax, created = st.axes_for(ax, figsize=(10.0, 6.0))
    if created:
        fig.subplots_adjust(left=0.08, right=0.68, bottom=0.10, top=0.86)
    st.style_axes(ax)
    colours = tuple(VARIANT_COLOURS[i % len(VARIANT_COLOURS)] for i in range(len(names)))
    orders = tuple(float(o) for o in orders)
    data = [_in_rpm(s.sweep) for s in screenings]
    x_lo, x_hi, top = _limits(ax, data, screenings, freq_max)
    band = trip_line = None
    band_labels, rows = (), 0
    if operating is not None:
        band, trip_line, marks = st.operating_band(ax, operating)
        band_labels, rows = lb.edge_labels(ax, marks)
    order_lines, order_labels = [], []
    for order in orders:
        line, text = st.order_line(ax, order, x_lo, x_hi, top)
        order_lines.append(line)
        order_labels.append(text)
    branches, kinds, markers, hidden = _draw_variants(ax, data, screenings, colours, top)
    st.label_axes(ax, "Spin speed (rpm)", "Damped natural frequency (cpm)")
    ax.set_title(title, fontsize=st.FONT_TITLE, color=st.INK,
                 loc="left", pad=6 + 10 * rows)
    legend = _variant_legend(ax, names, colours, screenings, orders, operating, hidden, top)
    return VariantMapArtists(
        figure=fig, ax=ax, names=names, colours=colours, branches=branches,
        branch_whirl=kinds, critical_markers=markers, order_lines=tuple(order_lines),
        order_labels=tuple(order_labels), band=band, band_labels=tuple(band_labels),
        trip_line=trip_line, legend=legend, freq_max=top, hidden_branches=hidden)


def _in_rpm(sweep):
    """A sweep's speeds (rpm), frequencies (cpm) and whirl labels."""
    return (to_rpm(np.asarray(sweep.speeds, dtype=float)),
            to_rpm(np.asarray(sweep.frequency, dtype=float)), np.asarray(sweep.whirl))


def _limits(ax, data, screenings, freq_max):
    """Speed axis over every sweep (from 0), frequency axis as on the single map;
    returns ``(x_lo, x_hi, top)``."""
    speeds = np.concatenate([d[0] for d in data]) if data else np.array([0.0, 1.0])
    speeds = speeds[np.isfinite(speeds)]
    x_lo = min(float(speeds.min()), 0.0) if speeds.size else 0.0
    x_hi = float(speeds.max()) if speeds.size else 1.0
    if x_hi <= x_lo:
        x_hi = x_lo + 1.0
    criticals = [c for s in screenings for c in s.criticals]
    top = frequency_top([freq for _, freq, _ in data], x_hi, criticals) if freq_max is None \
        else float(freq_max)
    ax.set_xlim(x_lo, x_hi)
    ax.set_ylim(0.0, top)
    return x_lo, x_hi, top


def _draw_variants(ax, data, screenings, colours, top):
    """Every variant's branches and critical markers: per variant the pieces, their whirl
    labels and the markers; and the number of branches wholly above ``top``."""
    all_branches, all_kinds, all_markers = [], [], []
    hidden = 0
    for i, ((speed, freq, whirl), s) in enumerate(zip(data, screenings)):
        # the base on top, drawn a little heavier
        width, z = (2.0, 4.5) if i == 0 else (1.5, 4.0 + 0.01 * i)
        pieces, kinds = [], []
        if freq.ndim == 2:
            for j in range(freq.shape[1]):
                p, kd = _whirl_runs(ax, speed, freq[:, j], whirl[:, j], colours[i], width, z)
                pieces += p
                kinds += kd
            present = np.isfinite(freq)
            low = np.where(present, freq, np.inf).min(axis=0)
            hidden += int(np.sum(np.isfinite(low) & (low > top)))
        marks = []
        for c in s.criticals:
            marker, = ax.plot([to_rpm(c.speed)], [to_rpm(c.eigenvalue.imag)], linestyle="none",
                              marker="o", markersize=7.0, markerfacecolor=colours[i],
                              markeredgecolor=st.PAPER, markeredgewidth=1.0, zorder=6 + 0.01 * i)
            marks.append(marker)
        all_branches.append(tuple(pieces))
        all_kinds.append(tuple(kinds))
        all_markers.append(tuple(marks))
    return tuple(all_branches), tuple(all_kinds), tuple(all_markers), hidden


def _whirl_runs(ax, speed, freq, whirl, colour, width, z):
    """A branch as runs of equal whirl label, each change half-way between two speeds."""
    pieces, kinds = [], []
    ok = np.isfinite(speed) & np.isfinite(freq) & (whirl != "")
    for xs, ys, label in branch_runs(speed, freq, ok, whirl):
        label = str(label)
        line, = ax.plot(xs, ys, color=colour, linestyle=st.WHIRL_STYLES.get(label, "-"),
                        linewidth=width, solid_capstyle="butt", dash_capstyle="butt", zorder=z)
        pieces.append(line)
        kinds.append(label)
    return pieces, kinds


def _variant_legend(ax, names, colours, screenings, orders, operating, hidden, top):
    key = lb.Key()
    key.header("Variants: critical speeds (rpm)")
    for name, colour, s in zip(names, colours, screenings):
        crits = sorted(s.criticals, key=lambda c: c.speed)
        items = [f"{st.whole(to_rpm(c.speed))} {st.short_whirl(c.whirl)}" for c in crits]
        if len(items) > MAX_LISTED:
            items = items[:MAX_LISTED - 1] + [f"+{len(crits) - MAX_LISTED + 1} more"]
        rows = [", ".join(items[i:i + 3]) for i in range(0, len(items), 3)] or \
            ["none in the sweep"]
        head = name + ("  (a margin fails)" if not s.margins.passed else "")
        key.add(Line2D([], [], color=colour, linewidth=2.0 if name == names[0] else 1.5,
                       marker="o", markersize=6, markerfacecolor=colour,
                       markeredgecolor=st.PAPER), "\n".join([head] + rows))
    key.header("Whirl")
    for label in st.WHIRL_ORDER:
        key.add(Line2D([], [], color=st.MUTED, linewidth=1.6, linestyle=st.WHIRL_STYLES[label]),
                label)
    key.lines(orders, operating)
    if hidden:
        key.note(f"{hidden} branch{'es' if hidden > 1 else ''} above {st.whole(top)} cpm "
                 "not shown")
    return lb.legend_beside(ax, key, offset=10.0)
