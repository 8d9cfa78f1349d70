"""Bode plot of an unbalance response: amplitude and phase lag of each probe over speed.

It draws a :class:`rotorcalc.analysis.response.Response` as it is; the only
arithmetic here is for drawing (micrometres and rpm, points between the sweep
speeds).  Amplitudes are peak-to-peak in µm; the phase is the lag behind the
once-per-turn mark ``t = 0`` in degrees from 0 to 360 (``x(t) = Re(X e^{iwt})``,
lag = ``-arg X``); a probe keeps the colour of its station and the line style of
its direction there, as in the polar plot.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from matplotlib.figure import Figure
from matplotlib.lines import Line2D
from matplotlib.ticker import FuncFormatter, NullFormatter

from ..errors import InputError
from . import _labels as lb
from . import _probes as pr
from . import _style as st
from ._artists import Artists
from ._phase import break_wraps, lag_of, phase_lag, value_at
from ._units import UM, pk_pk_um, to_rpm

HALF_POWER = 1.0 / math.sqrt(2.0)


@dataclass(frozen=True)
class BodeArtists(Artists):
    """What :func:`bode` drew (and ``figure``, ``legend`` as every picture).

    Attributes
    ----------
    ax : Axes
        The amplitude axes (peak-to-peak, µm, over speed in rpm).
    phase_ax : Axes or None
        The phase-lag axes (degrees); None when only an amplitude axes was given.
    probes : tuple of str
        Names of the probes drawn, in the order of the curves.
    amplitude_lines, phase_lines : tuple of Line2D
        One per probe (phase lines are broken where the lag wraps past 360).
    bands : tuple of Rectangle
        The shaded operating range on each axes (x in rpm, full height).
    band_labels : tuple of Annotation
        The speeds of the range's ends and of the trip speed, above the frame.
    trip_lines : tuple of Line2D
        The trip speed on each axes.
    peak_markers : tuple of Line2D
        One marker per peak of the case on a drawn probe, at its refined
        speed and peak-to-peak amplitude.
    peak_labels : tuple of Annotation
        ``"AF 3.9"`` (``"AF n/a"`` where the half-power points were not
        found), parallel to ``peak_markers``.
    half_power_bars : tuple of Line2D
        At 0.707 of each peak between its half-power speeds; peaks without
        half-power points have none, so this may be shorter than the markers.
    phase_markers : tuple of Line2D
        The phase lag at each peak speed, parallel to ``peak_markers``.
    unstable_spans : tuple
        Hatched spans (and their "unstable: no steady state" label) where a mode
        is unstable: the response drawn there is not physical.
    """

    phase_ax: object = None
    probes: tuple = ()
    amplitude_lines: tuple = ()
    phase_lines: tuple = ()
    bands: tuple = ()
    band_labels: tuple = ()
    trip_lines: tuple = ()
    peak_markers: tuple = ()
    peak_labels: tuple = ()
    half_power_bars: tuple = ()
    phase_markers: tuple = ()
    unstable_spans: tuple = ()


@st.literal_text
def plot_bode(response, case_index=0, probes=None, operating=None, *, ax=None,
         log_amplitude=False):
    """Draw the Bode plot of one unbalance case: amplitude and phase lag over speed.

    The top axes has the peak-to-peak amplitude of each probe in µm, the
    bottom one its phase lag behind the once-per-turn mark in degrees (0 to 360, the
    curve broken where it wraps).  Each peak of the case on a drawn probe is
    marked with its amplification factor (``"AF 3.9"``) and, where both
    half-power speeds were found, a bar at 0.707 of the peak between them:
    the bar's length is the half-power bandwidth.

    Parameters
    ----------
    response : rotorcalc.analysis.response.Response
    case_index : int
        Index into ``response.cases``.
    probes : sequence of int or str, or int or str, optional
        Probes to draw, by index into ``response.probes`` or by name; all by
        default.
    operating : rotorcalc.model.OperatingRange, optional
        Shaded from ``min_speed`` to ``max_speed``, the trip speed dashed,
        on both axes, with the speeds written above the frame.
    ax : Axes or (Axes, Axes), optional
        A pair ``(amplitude, phase)`` to draw both on, or a single axes for
        the amplitude alone (no phase drawn).  By default a new figure with
        the two axes stacked, sharing the speed axis.
    log_amplitude : bool
        Draw the amplitude on a logarithmic scale, so probes of very different
        size (a mid-span seal and the bearings, say) all read; linear by default.

    Returns
    -------
    BodeArtists

    Raises
    ------
    IndexError, ValueError, TypeError
        For a case or probe the response does not have, or a malformed ``ax``.
    """
    i = pr.case_index(response, case_index)
    chosen = pr.probe_indices(response, probes)
    looks = pr.probe_looks(response, chosen)
    fig, amp_ax, phase_ax, created = _bode_axes(ax)
    panels = [amp_ax] + ([phase_ax] if phase_ax is not None else [])
    for a in panels:
        st.style_axes(a)
    peaks = [(k, p) for k in chosen for p in pr.case_peaks(response, i, k)]
    _speed_axis(panels, response, operating, peaks)
    amp_lines, phase_lines = _curves(amp_ax, phase_ax, response, i, chosen, looks, peaks,
                                     log_amplitude)
    bands, trips, band_labels, rows = _operating(panels, operating)
    drawn = _draw_peaks(amp_ax, phase_ax, response, i, peaks, looks, amp_lines)
    unstable = _unstable_spans(panels, response)
    _label_axes(fig, panels, f"Unbalance response, case {response.cases[i]}", rows)
    legend = _bode_legend(amp_ax, amp_lines, operating, [p for _, p in peaks], created)
    return BodeArtists(figure=fig, ax=amp_ax, phase_ax=phase_ax,
                       probes=tuple(response.probes[k].name for k in chosen),
                       amplitude_lines=tuple(amp_lines), phase_lines=tuple(phase_lines),
                       bands=tuple(bands), band_labels=tuple(band_labels),
                       trip_lines=tuple(trips), peak_markers=tuple(drawn[0]),
                       peak_labels=tuple(drawn[1]), half_power_bars=tuple(drawn[2]),
                       phase_markers=tuple(drawn[3]), legend=legend,
                       unstable_spans=tuple(unstable))


def _bode_axes(ax):
    """``(figure, amplitude axes, phase axes or None, created)`` from the ``ax`` given."""
    if ax is None:
        fig = Figure(figsize=(10.0, 6.8), facecolor=st.PAPER)
        grid = fig.add_gridspec(2, 1, height_ratios=(3.0, 2.0), hspace=0.09, left=0.075,
                                right=0.73, bottom=0.085, top=0.87)
        amp_ax = fig.add_subplot(grid[0])
        return fig, amp_ax, fig.add_subplot(grid[1], sharex=amp_ax), True
    if isinstance(ax, (tuple, list, np.ndarray)):
        ax = list(np.ravel(np.asarray(ax, dtype=object)))
        if len(ax) != 2:
            raise InputError("plot arguments", f"ax must be one axes or a pair (amplitude, "
                             f"phase), not {len(ax)} axes", kind="option")
        return ax[0].figure, ax[0], ax[1], False
    return ax.figure, ax, None, False


def _speed_axis(panels, response, operating, peaks):
    """The speed axis from 0 to the end of the sweep, the trip speed or the last
    half-power speed, whichever is furthest."""
    rpm = to_rpm(np.asarray(response.speeds, dtype=float))
    x_hi = float(rpm.max()) if rpm.size else 1.0
    if operating is not None and operating.trip_speed is not None:
        x_hi = max(x_hi, float(to_rpm(operating.trip_speed)))
    # A half-power speed found past the end of the sweep still gets its whole bar.
    ends = [to_rpm(p.half_power[1]) for _, p in peaks if p.half_power is not None]
    if ends and max(ends) > x_hi:
        x_hi = 1.01 * max(ends)
    for a in panels:
        a.set_xlim(0.0, x_hi)


def _curves(amp_ax, phase_ax, response, i, chosen, looks, peaks, log_amplitude):
    """Amplitude (and phase) curve of each probe, and the amplitude scale."""
    rpm = to_rpm(np.asarray(response.speeds, dtype=float))
    values = response.probe_values[i]
    amp_lines, phase_lines = [], []
    top = 0.0
    for k in chosen:
        colour, style = looks[k]
        amp = pk_pk_um(values[:, k])
        top = max(top, float(np.nanmax(amp)) if amp.size else 0.0)
        line, = amp_ax.plot(rpm, amp, color=colour, linestyle=style, linewidth=1.6,
                            zorder=4, label=pr.probe_label(response.probes[k], k))
        amp_lines.append(line)
        if phase_ax is not None:
            lag = phase_lag(values[:, k])
            phase_lines.append(phase_ax.plot(*break_wraps(rpm, lag), color=colour,
                                             linestyle=style, linewidth=1.4, zorder=4)[0])
    top = max([top] + [UM * p.amplitude for _, p in peaks])
    if log_amplitude:
        amp_ax.set_yscale("log")
        amp_ax.set_ylim(*_log_limits(amp_lines, top))
        amp_ax.yaxis.set_major_formatter(FuncFormatter(lambda v, _: st.signed(v, "g")))
        amp_ax.yaxis.set_minor_formatter(NullFormatter())
    else:
        amp_ax.set_ylim(0.0, 1.14 * top if top > 0 else 1.0)
    return amp_lines, phase_lines


def _log_limits(lines, top):
    """A log amplitude range: up to a little above the top, down three decades at most."""
    if not top > 0:
        return 0.1, 1.0
    values = np.concatenate([np.asarray(line.get_ydata(), dtype=float) for line in lines])
    values = values[np.isfinite(values) & (values > 0)]
    low = max(float(values.min()) if values.size else top * 1e-3, top * 1e-3)
    return 10.0 ** math.floor(math.log10(low)), 1.6 * top


def _operating(panels, operating):
    """The operating range on every axes, its speeds above the amplitude axes."""
    bands, trips, band_labels, rows = [], [], [], 0
    if operating is None:
        return bands, trips, band_labels, rows
    for a in panels:
        band, trip, marks = st.operating_band(a, operating, linewidth=0.8)
        bands.append(band)
        if trip is not None:
            trips.append(trip)
    band_labels, rows = lb.edge_labels(panels[0], marks)
    return bands, trips, band_labels, rows


def _unstable_spans(panels, response):
    """Hatch the speeds where a mode is unstable, and say so in words once."""
    out = []
    for lo, hi in getattr(response, "unstable_ranges", ()):
        for a in panels:
            out.append(a.axvspan(to_rpm(lo), to_rpm(hi), facecolor="none", hatch="///",
                                 edgecolor=st.LOG_DEC_COLOURS[0], linewidth=0.0, alpha=0.45,
                                 zorder=1))
        out.append(panels[0].text(to_rpm(lo), 0.97, " unstable: no steady state",
                                  transform=panels[0].get_xaxis_transform(), ha="left",
                                  va="top", fontsize=st.FONT_NOTE, fontweight="bold",
                                  color=st.LOG_DEC_COLOURS[0], clip_on=True, zorder=7))
    return out


def _label_axes(fig, panels, title, rows):
    """Axis labels (the speed on the lowest axes only) and the title above the range's
    speeds (``rows`` of them)."""
    amp_ax = panels[0]
    if len(panels) > 1:
        phase_ax = panels[1]
        phase_ax.set_ylim(0.0, 360.0)
        phase_ax.set_yticks([0, 90, 180, 270, 360])
        st.label_axes(phase_ax, "Speed (rpm)", "Phase lag (\u00b0)")
        st.label_axes(amp_ax, None, "Amplitude (\u00b5m pk-pk)")
        amp_ax.tick_params(axis="x", which="both", length=0, labelbottom=False)
        fig.align_ylabels(panels)
    else:
        st.label_axes(amp_ax, "Speed (rpm)", "Amplitude (\u00b5m pk-pk)")
    amp_ax.set_title(title, loc="left", fontsize=st.FONT_TITLE, color=st.INK,
                     pad=8 + 11 * rows)


# --- peaks ------------------------------------------------------------------------------

#: Where an AF label may go, points from its peak marker: beside it first,
#: then stepping up and down the side, where a leader line joins them.
_AF_OFFSETS = ([(7, -4), (-7, -4), (7, 6), (-7, 6), (7, -14), (-7, -14)]
               + [(s * 16, d) for k in range(2, 9) for d in (11 * k - 4, -11 * k - 4)
                  for s in (1, -1)])


def _af_text(af):
    return f"{af:.1f}" if af < 10 else f"{af:.0f}"


def _place_af_labels(amp_ax, response, peaks, lines, size):
    """Text and offset (points) of each peak's label, clear of the curves, the bars
    and each other: ``{peak number: (text, dx, dy)}``."""
    frame = lb.frame(amp_ax)
    points = [lb.points(amp_ax, (to_rpm(p.speed), UM * p.amplitude)) for _, p in peaks]
    taken = [(q[0] - 4, q[1] - 4, q[0] + 4, q[1] + 4) for q in points]
    for line in lines:
        taken += lb.line_boxes(amp_ax, *line.get_data())
    for _, p in peaks:
        if p.half_power is not None:
            y = UM * p.amplitude * HALF_POWER
            taken += lb.line_boxes(amp_ax, [to_rpm(v) for v in p.half_power], [y, y], pad=3.0)
    # The highest peaks choose first: they stand clear, the low ones can step aside.
    order = sorted(range(len(peaks)), key=lambda n: -peaks[n][1].amplitude)
    placed = {}
    for n in order:
        k, peak = peaks[n]
        text = "AF n/a" if peak.af is None else f"AF {_af_text(peak.af)}"
        tag = pr.direction_tag(response, k)
        if tag:
            text = f"{tag}  {text}"
        dx, dy, rect = lb.first_fit(points[n], lb.text_width(text, size), 1.25 * size,
                                    _AF_OFFSETS, taken, frame, centred=True)
        taken.append(rect)
        placed[n] = (text, dx, dy)
    return placed


def _draw_peaks(amp_ax, phase_ax, response, i, peaks, looks, lines):
    """Marker, AF label, half-power bar and phase marker of every peak:
    ``(markers, labels, bars, phase markers)``."""
    markers, labels, bars, phase_marks = [], [], [], []
    if not peaks:
        return markers, labels, bars, phase_marks
    size = st.FONT_NOTE + 0.5
    placed = _place_af_labels(amp_ax, response, peaks, lines, size)
    speeds = np.asarray(response.speeds, dtype=float)
    for n, (k, peak) in enumerate(peaks):
        colour = looks[k][0]
        x, y = to_rpm(peak.speed), UM * peak.amplitude
        if peak.half_power is not None:
            bars.append(_half_power_bar(amp_ax, peak, y, colour))
        value = value_at(speeds, response.probe_values[i, :, k], peak.speed)
        markers.append(_peak_marker(amp_ax, x, y, pk_pk_um(value), peak.af is None, colour))
        text, dx, dy = placed[n]
        labels.append(lb.leader_label(amp_ax, text, (x, y), (dx, dy),
                                      abs(dy) > 12 or abs(dx) > 10, size=size, colour=colour,
                                      pad=0.12, leader=colour, shrink=3.5, leader_alpha=0.8))
        if phase_ax is not None:
            hollow = peak.af is None
            phase_marks.append(phase_ax.plot([x], [lag_of(value)], linestyle="none",
                                             marker="o", markersize=4.0,
                                             markerfacecolor=st.PAPER if hollow else colour,
                                             markeredgecolor=colour if hollow else st.INK,
                                             markeredgewidth=0.8, zorder=6)[0])
    return markers, labels, bars, phase_marks


def _half_power_bar(ax, peak, y, colour):
    lo, hi = (to_rpm(v) for v in peak.half_power)
    return ax.plot([lo, hi], [HALF_POWER * y] * 2, color=colour, linewidth=1.1, marker="|",
                   markersize=6, markeredgewidth=1.1, solid_capstyle="butt", zorder=5,
                   alpha=0.9)[0]


def _peak_marker(ax, x, y, drawn, hollow, colour):
    """The marker at the refined peak (hollow without an AF), with a dotted stem up from
    the drawn curve (``drawn``, µm) when the sweep misses the top of a sharp peak."""
    if drawn < pr.UNRESOLVED * y:
        ax.plot([x, x], [drawn, y], color=colour, linewidth=0.9, linestyle=(0, (1.0, 1.5)),
                zorder=4.5)
    return ax.plot([x], [y], linestyle="none", marker="o", markersize=5.5,
                   markerfacecolor=st.PAPER if hollow else colour,
                   markeredgecolor=colour if hollow else st.INK, markeredgewidth=0.9,
                   zorder=6)[0]


def _bode_legend(ax, lines, operating, peaks, created):
    key = lb.Key()
    for line in lines:
        key.add(line, line.get_label())
    if any(p.af is not None for p in peaks):
        key.add(Line2D([], [], linestyle="none", marker="o", markersize=5.5,
                       markerfacecolor=st.MUTED, markeredgecolor=st.INK, markeredgewidth=0.9),
                "peak, with its amplification factor")
    if any(p.af is None for p in peaks):
        key.add(Line2D([], [], linestyle="none", marker="o", markersize=5.5,
                       markerfacecolor=st.PAPER, markeredgecolor=st.MUTED, markeredgewidth=0.9),
                "peak without both half-power points")
    if any(p.half_power is not None for p in peaks):
        key.add(Line2D([], [], color=st.MUTED, linewidth=1.1, marker="|", markersize=6,
                       markeredgewidth=1.1), "half-power bandwidth (at 0.707 of the peak)")
    if operating is not None:
        key.operating(operating, linewidth=0.8)
    size = st.FONT_NOTE + 0.5
    if created:
        legend = ax.legend(key.handles, key.labels, loc="upper left",
                           bbox_to_anchor=(1.025, 1.0), borderaxespad=0.0, frameon=False,
                           fontsize=size, handlelength=2.6, labelspacing=0.45)
    else:
        legend = ax.legend(key.handles, key.labels, loc="best", frameon=True, framealpha=0.9,
                           edgecolor=st.GRID, fontsize=size, handlelength=2.4)
    return lb.ink(legend)
