"""Pictures of an unbalance response: Bode plot, polar plot and orbit ellipses.

All three draw a :class:`rotorcalc.analysis.response.Response` as it is; the
only arithmetic here is for drawing (micrometres and rpm, points between the
sweep speeds, the ellipse traced over one turn).

Conventions shared by the three pictures:

* amplitudes of probes are peak-to-peak, in micrometres;
* phase is the phase lag behind the once-per-turn mark ``t = 0``, in degrees
  from 0 to 360 (``x(t) = Re(X e^{iwt})``, lag = ``-arg X``);
* a probe keeps one colour per station and one line style per direction at
  that station, in every picture;
* orbits are seen from the +z end, x to the right and y up, so that the spin
  (from +x towards +y) is anticlockwise.
"""

from __future__ import annotations

import math
import os
from dataclasses import dataclass

import numpy as np
from matplotlib.figure import Figure
from matplotlib.lines import Line2D
from matplotlib.patches import FancyArrowPatch
from matplotlib.ticker import FuncFormatter, MaxNLocator, NullFormatter

from ..units import to_rpm
from . import _labels as lb
from . import _style as st
from ..errors import InputError

#: One colour per probe station (and per speed in the orbit picture).
COLOURS = ("#2d6fb4", "#c8571b", "#3a9467", "#7a4fa0", "#b1172f", "#8c6d1f", "#2f8f9d",
           "#5b6770")
#: Line styles of the probes that share a station, in the order given.
STYLES = ("-", (0, (5.0, 2.2)), (0, (1.2, 1.6)), (0, (6.0, 2.0, 1.2, 2.0)))

UM = 1e6           # m to micrometres
HALF_POWER = 1.0 / math.sqrt(2.0)
#: Speed labels along a polar curve are left out nearer the centre than this
#: share of the panel's radius, where the low-speed points crowd together.
CENTRE_CROWD = 0.05
#: A peak whose drawn curve stays below this share of its refined amplitude is one
#: the sweep did not resolve; a dotted stem joins the curve to the peak marker.
UNRESOLVED = 0.9
#: Labels may sit on the inner side of a polar curve only beyond this share of the radius.
INWARD_FROM = 0.4
#: An orbit smaller than this share of its panel's half-width gets no arrow.
ARROW_MIN = 0.12
#: A station whose orbits stay below this share of the shared scale gets a zoomed inset.
INSET_BELOW = 0.2


# --- results ------------------------------------------------------------------------

@dataclass(frozen=True)
class BodeArtists:
    """What :func:`bode` drew.

    Attributes
    ----------
    figure : matplotlib.figure.Figure
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
    legend : Legend
    """

    figure: object
    ax: object
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
    legend: object = None
    unstable_spans: tuple = ()


@dataclass(frozen=True)
class PolarArtists:
    """What :func:`polar` drew.

    Attributes
    ----------
    figure : matplotlib.figure.Figure
    ax : PolarAxes
        The first (or only) panel.
    axes : tuple of PolarAxes
        Every panel: one per probe station on a new figure, or the one given.
    probes : tuple of str
        Names of the probes drawn, in the order of ``lines``.
    lines : tuple of Line2D
        One curve per probe: angle the phase lag (radians in the data), radius
        the peak-to-peak amplitude in µm.
    speed_labels : tuple of Annotation
        Speeds (rpm) written beside points of the curves.
    speed_ticks : tuple of Line2D
        The dots at the labelled speeds, one artist per curve (may be empty).
    peak_markers, peak_labels : tuple
        One marker and one ``"5440 rpm"`` label per peak of the case on a
        drawn probe.
    legend : Legend or None
    """

    figure: object
    ax: object
    axes: tuple = ()
    probes: tuple = ()
    lines: tuple = ()
    speed_labels: tuple = ()
    speed_ticks: tuple = ()
    peak_markers: tuple = ()
    peak_labels: tuple = ()
    legend: object = None


@dataclass(frozen=True)
class OrbitArtists:
    """What :func:`orbits` drew.

    Attributes
    ----------
    figure : matplotlib.figure.Figure
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
    legend : Legend or None
    """

    figure: object
    ax: object
    axes: tuple = ()
    stations: tuple = ()
    speeds: tuple = ()
    ellipses: tuple = ()
    mark_dots: tuple = ()
    arrows: tuple = ()
    insets: tuple = ()
    scale: float = 0.0
    legend: object = None


# --- shared helpers -----------------------------------------------------------------

def _check_case(response, case_index):
    n = len(response.cases)
    if not -n <= case_index < n:
        raise IndexError(f"case index {case_index} is out of range: the response has {n} "
                         f"case{'s' if n != 1 else ''} ({', '.join(response.cases)})")
    return case_index % n


def _probe_indices(response, probes):
    """Probe indices from indices, names, a mix of both, or a single one (None: all)."""
    names = [p.name for p in response.probes]
    if not names:
        raise InputError("plot arguments", "the response has no probes to draw", kind="option")
    if probes is None:
        return list(range(len(names)))
    if isinstance(probes, (str, int, np.integer)):
        probes = [probes]
    out = []
    for p in probes:
        if isinstance(p, str):
            if p not in names:
                raise InputError("plot arguments", f"no probe is named {p!r}: the probes are "
                                 + ", ".join(repr(n) for n in names), kind="option")
            k = names.index(p)
        elif isinstance(p, (int, np.integer)) and not isinstance(p, bool):
            if not -len(names) <= p < len(names):
                raise IndexError(f"probe index {p} is out of range: the response has "
                                 f"{len(names)} probes")
            k = int(p) % len(names)
        else:
            raise TypeError(f"a probe is chosen by index or name, not by {p!r}")
        if k not in out:
            out.append(k)
    if not out:
        raise InputError("plot arguments", "no probe is chosen", kind="option")
    return out


def _probe_looks(response, indices):
    """Colour by station, line style by order at the station, for every probe."""
    stations = []
    for p in response.probes:
        if p.station not in stations:
            stations.append(p.station)
    seen = {}
    looks = {}
    for k, p in enumerate(response.probes):
        n = seen.get(p.station, 0)
        seen[p.station] = n + 1
        looks[k] = (COLOURS[stations.index(p.station) % len(COLOURS)], STYLES[n % len(STYLES)])
    return {k: looks[k] for k in indices}


def _probe_label(probe, k):
    return probe.name or f"probe {k + 1} (station {probe.station})"


def _case_peaks(response, case_index, probe_index):
    case = response.cases[case_index]
    name = response.probes[probe_index].name
    return [p for p in response.peaks if p.case == case and p.probe == name]


def _at_speed(speeds, values, omega):
    """Complex value between sweep points, for placing a marker on the drawn curve."""
    return complex(np.interp(omega, speeds, values.real) + 1j * np.interp(omega, speeds,
                                                                          values.imag))


def _lag(values):
    return np.mod(-np.degrees(np.angle(values)), 360.0)


def _station_name(response, station):
    """What the probes at a station have in common (``"DE x"``, ``"DE y"``: ``"DE"``)."""
    names = [p.name for p in response.probes if p.station == station and p.name]
    if not names:
        return ""
    if len(names) == 1:
        return names[0]
    common = os.path.commonprefix(names)
    # Whole words only: "DE 45" and "DE 40" have "DE" in common, not "DE 4".
    if any(len(n) > len(common) and n[len(common)] not in _SEPARATORS for n in names) \
            and common and common[-1] not in _SEPARATORS:
        cut = max(common.rfind(c) for c in _SEPARATORS)
        common = common[:cut] if cut > 0 else ""
    return common.strip(_SEPARATORS)


_SEPARATORS = " _-:."


def _station_title(response, station):
    name = _station_name(response, station)
    return f"station {station}" + (f"  \u00b7  {name}" if name else "")


def _direction_tag(response, k):
    """What tells a probe from the others at its station (``"DE y"``: ``"y"``), or ""."""
    probe = response.probes[k]
    mates = [p for p in response.probes if p.station == probe.station]
    if len(mates) < 2:
        return ""
    common = _station_name(response, probe.station)
    rest = probe.name[len(common):].strip(_SEPARATORS) if probe.name.startswith(common) else ""
    return rest or probe.name or f"#{mates.index(probe) + 1}"


def _af_text(af):
    return f"{af:.1f}" if af < 10 else f"{af:.0f}"


def _log_limits(lines, top):
    """A log amplitude range: up to a little above the top, down three decades at most."""
    if not top > 0:
        return 0.1, 1.0
    values = np.concatenate([np.asarray(line.get_ydata(), dtype=float) for line in lines])
    values = values[np.isfinite(values) & (values > 0)]
    low = max(float(values.min()) if values.size else top * 1e-3, top * 1e-3)
    return 10.0 ** math.floor(math.log10(low)), 1.6 * top


def _nice_step(span, count):
    """A 1-2-5 step giving about ``count`` intervals over ``span``."""
    if not span > 0:
        return 1.0
    raw = span / count
    mag = 10.0 ** math.floor(math.log10(raw))
    for m in (1.0, 2.0, 5.0, 10.0):
        if raw <= m * mag:
            return m * mag
    return 10.0 * mag


def _balanced_columns(n, most):
    """Legend columns: at most ``most``, the rows as evenly filled as can be."""
    rows = -(-n // most)
    return max(1, -(-n // rows))


def _figure_legend(fig, handles, names, handlelength):
    """A legend of the whole figure, centred along its bottom."""
    return lb.ink(fig.legend(handles, names, loc="lower center", bbox_to_anchor=(0.5, 0.01),
                             frameon=False, fontsize=st.FONT_NOTE + 0.5,
                             handlelength=handlelength,
                             ncol=_balanced_columns(len(names), 6), columnspacing=1.6))


def _grid(n):
    cols = n if n <= 3 else (2 if n == 4 else 3)
    return -(-n // cols), cols


def _figure_title(fig, title, note, top_in):
    """Title and a muted note at the top-left of a figure, ``top_in`` inches from the top."""
    h = fig.get_figheight()
    fig.text(0.02, 1.0 - 0.18 / h, title, fontsize=st.FONT_TITLE, color=st.INK, ha="left",
             va="top")
    if note:
        fig.text(0.02, 1.0 - 0.44 / h, note, fontsize=st.FONT_NOTE + 0.5, color=st.MUTED,
                 ha="left", va="top", linespacing=1.35)
    return 1.0 - top_in / h


# --- Bode plot ----------------------------------------------------------------------

@st.literal_text
def bode(response, case_index=0, probes=None, operating=None, *, ax=None,
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
    i = _check_case(response, case_index)
    chosen = _probe_indices(response, probes)
    looks = _probe_looks(response, chosen)
    case = response.cases[i]

    if ax is None:
        fig = Figure(figsize=(10.0, 6.8), facecolor=st.PAPER)
        grid = fig.add_gridspec(2, 1, height_ratios=(3.0, 2.0), hspace=0.09, left=0.075,
                                right=0.73, bottom=0.085, top=0.87)
        amp_ax = fig.add_subplot(grid[0])
        phase_ax = fig.add_subplot(grid[1], sharex=amp_ax)
        created = True
    elif isinstance(ax, (tuple, list, np.ndarray)):
        ax = list(np.ravel(np.asarray(ax, dtype=object)))
        if len(ax) != 2:
            raise InputError("plot arguments", f"ax must be one axes or a pair (amplitude, phase), "
                             f"not {len(ax)} axes", kind="option")
        amp_ax, phase_ax = ax
        fig = amp_ax.figure
        created = False
    else:
        amp_ax, phase_ax, fig, created = ax, None, ax.figure, False
    panels = [amp_ax] + ([phase_ax] if phase_ax is not None else [])
    for a in panels:
        st.style_axes(a)

    rpm = to_rpm(np.asarray(response.speeds, dtype=float))
    speeds = np.asarray(response.speeds, dtype=float)
    values = response.probe_values[i]
    x_hi = float(rpm.max()) if rpm.size else 1.0
    if operating is not None and operating.trip_speed is not None:
        x_hi = max(x_hi, float(to_rpm(operating.trip_speed)))

    peaks = [(k, p) for k in chosen for p in _case_peaks(response, i, k)]
    # A half-power speed found past the end of the sweep still gets its whole bar.
    ends = [to_rpm(p.half_power[1]) for _, p in peaks if p.half_power is not None]
    if ends and max(ends) > x_hi:
        x_hi = 1.01 * max(ends)
    for a in panels:
        a.set_xlim(0.0, x_hi)

    amp_lines, phase_lines = [], []
    top = 0.0
    for k in chosen:
        colour, style = looks[k]
        amp = UM * 2.0 * np.abs(values[:, k])
        top = max(top, float(np.nanmax(amp)) if amp.size else 0.0)
        line, = amp_ax.plot(rpm, amp, color=colour, linestyle=style, linewidth=1.6,
                            zorder=4, label=_probe_label(response.probes[k], k))
        amp_lines.append(line)
        if phase_ax is not None:
            lag = _lag(values[:, k])
            phase_lines.append(phase_ax.plot(*_break_wraps(rpm, lag), color=colour,
                                             linestyle=style, linewidth=1.4, zorder=4)[0])
    top = max([top] + [UM * p.amplitude for _, p in peaks])
    if log_amplitude:
        amp_ax.set_yscale("log")
        amp_ax.set_ylim(*_log_limits(amp_lines, top))
        amp_ax.yaxis.set_major_formatter(FuncFormatter(lambda v, _: st.signed(v, "g")))
        amp_ax.yaxis.set_minor_formatter(NullFormatter())
    else:
        amp_ax.set_ylim(0.0, 1.14 * top if top > 0 else 1.0)

    bands, trips, band_labels, rows = [], [], [], 0
    if operating is not None:
        for a in panels:
            band, trip, marks = st.operating_band(a, operating, linewidth=0.8)
            bands.append(band)
            if trip is not None:
                trips.append(trip)
        band_labels, rows = lb.edge_labels(amp_ax, marks)

    markers, labels, bars, phase_marks = _draw_peaks(amp_ax, phase_ax, response, i, peaks,
                                                     looks, speeds, amp_lines)
    unstable = _unstable_spans(panels, response)

    if phase_ax is not None:
        phase_ax.set_ylim(0.0, 360.0)
        phase_ax.set_yticks([0, 90, 180, 270, 360])
        st.label_axes(phase_ax, "Speed (rpm)", "Phase lag (\u00b0)")
        st.label_axes(amp_ax, None, "Amplitude (\u00b5m pk-pk)")
        amp_ax.tick_params(axis="x", which="both", length=0, labelbottom=False)
        fig.align_ylabels(panels)
    else:
        st.label_axes(amp_ax, "Speed (rpm)", "Amplitude (\u00b5m pk-pk)")
    amp_ax.set_title(f"Unbalance response, case {case}", loc="left", fontsize=st.FONT_TITLE,
                     color=st.INK, pad=8 + 11 * rows)

    legend = _bode_legend(amp_ax, amp_lines, operating, any(p.af is not None for _, p in peaks),
                          any(p.af is None for _, p in peaks),
                          any(p.half_power is not None for _, p in peaks), created)
    return BodeArtists(figure=fig, ax=amp_ax, phase_ax=phase_ax,
                       probes=tuple(response.probes[k].name for k in chosen),
                       amplitude_lines=tuple(amp_lines), phase_lines=tuple(phase_lines),
                       bands=tuple(bands), band_labels=tuple(band_labels),
                       trip_lines=tuple(trips), peak_markers=tuple(markers),
                       peak_labels=tuple(labels), half_power_bars=tuple(bars),
                       phase_markers=tuple(phase_marks), legend=legend,
                       unstable_spans=tuple(unstable))


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


def _break_wraps(x, lag):
    """Insert a gap where the lag jumps across 0/360, so no line crosses the axes."""
    if len(lag) < 2:
        return x, lag
    jumps = np.nonzero(np.abs(np.diff(lag)) > 180.0)[0]
    if not jumps.size:
        return x, lag
    x = np.insert(np.asarray(x, dtype=float), jumps + 1, np.nan)
    lag = np.insert(np.asarray(lag, dtype=float), jumps + 1, np.nan)
    return x, lag


#: Where an AF label may go, points from its peak marker: beside it first,
#: then stepping up and down the side, where a leader line joins them.
_AF_OFFSETS = ([(7, -4), (-7, -4), (7, 6), (-7, 6), (7, -14), (-7, -14)]
               + [(s * 16, d) for k in range(2, 9) for d in (11 * k - 4, -11 * k - 4)
                  for s in (1, -1)])


def _draw_peaks(amp_ax, phase_ax, response, i, peaks, looks, speeds, lines):
    markers, labels, bars, phase_marks = [], [], [], []
    if not peaks:
        return markers, labels, bars, phase_marks
    size = st.FONT_NOTE + 0.5
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
        tag = _direction_tag(response, k)
        if tag:
            text = f"{tag}  {text}"
        dx, dy, rect = lb.first_fit(points[n], lb.text_width(text, size), 1.25 * size,
                                    _AF_OFFSETS, taken, frame, centred=True)
        taken.append(rect)
        placed[n] = (text, dx, dy)

    for n, (k, peak) in enumerate(peaks):
        colour, style = looks[k]
        x, y = to_rpm(peak.speed), UM * peak.amplitude
        if peak.half_power is not None:
            lo, hi = (to_rpm(v) for v in peak.half_power)
            bars.append(amp_ax.plot([lo, hi], [HALF_POWER * y] * 2, color=colour,
                                    linewidth=1.1, marker="|", markersize=6,
                                    markeredgewidth=1.1, solid_capstyle="butt", zorder=5,
                                    alpha=0.9)[0])
        hollow = peak.af is None
        drawn = UM * 2.0 * abs(_at_speed(speeds, response.probe_values[i, :, k], peak.speed))
        if drawn < UNRESOLVED * y:
            # The sweep misses the top of a sharp peak: a stem up to the refined value.
            amp_ax.plot([x, x], [drawn, y], color=colour, linewidth=0.9,
                        linestyle=(0, (1.0, 1.5)), zorder=4.5)
        markers.append(amp_ax.plot([x], [y], linestyle="none", marker="o", markersize=5.5,
                                   markerfacecolor=st.PAPER if hollow else colour,
                                   markeredgecolor=colour if hollow else st.INK,
                                   markeredgewidth=0.9, zorder=6)[0])
        text, dx, dy = placed[n]
        labels.append(lb.leader_label(amp_ax, text, (x, y), (dx, dy),
                                      abs(dy) > 12 or abs(dx) > 10, size=size, colour=colour,
                                      pad=0.12, leader=colour, shrink=3.5, leader_alpha=0.8))
        if phase_ax is not None:
            value = _at_speed(speeds, response.probe_values[i, :, k], peak.speed)
            phase_marks.append(phase_ax.plot([x], _lag(np.array([value])), linestyle="none",
                                             marker="o", markersize=4.0,
                                             markerfacecolor=st.PAPER if hollow else colour,
                                             markeredgecolor=colour if hollow else st.INK,
                                             markeredgewidth=0.8, zorder=6)[0])
    return markers, labels, bars, phase_marks


def _bode_legend(ax, lines, operating, with_af, without_af, with_bars, created):
    key = lb.Key()
    for line in lines:
        key.add(line, line.get_label())
    if with_af:
        key.add(Line2D([], [], linestyle="none", marker="o", markersize=5.5,
                       markerfacecolor=st.MUTED, markeredgecolor=st.INK, markeredgewidth=0.9),
                "peak, with its amplification factor")
    if without_af:
        key.add(Line2D([], [], linestyle="none", marker="o", markersize=5.5,
                       markerfacecolor=st.PAPER, markeredgecolor=st.MUTED, markeredgewidth=0.9),
                "peak without both half-power points")
    if with_bars:
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


# --- polar plot ---------------------------------------------------------------------

@st.literal_text
def polar(response, case_index=0, probes=None, *, ax=None):
    """Draw the polar plot of one unbalance case: each probe's response as a curve over speed.

    The radius is the peak-to-peak amplitude in µm and the angle the phase
    lag behind the once-per-turn mark, 0\u00b0 at the top and increasing clockwise; so
    a point turns clockwise as its lag grows through a resonance.  A few
    speeds are written along each curve (rpm) and each peak of the case on a
    drawn probe is marked with its speed.

    Parameters
    ----------
    response : rotorcalc.analysis.response.Response
    case_index : int
        Index into ``response.cases``.
    probes : sequence of int or str, or int or str, optional
        Probes to draw, by index into ``response.probes`` or by name; all by
        default.
    ax : PolarAxes, optional
        A polar axes (``projection="polar"``) to draw every chosen probe on.
        By default a new figure with one panel per probe station (the probes
        of a station share a panel), each panel with its own radial scale.

    Returns
    -------
    PolarArtists

    Raises
    ------
    IndexError, ValueError, TypeError
        For a case or probe the response does not have, or an ``ax`` that is
        not a polar axes.
    """
    i = _check_case(response, case_index)
    chosen = _probe_indices(response, probes)
    looks = _probe_looks(response, chosen)
    case = response.cases[i]
    note = ("radius: amplitude, \u00b5m pk-pk  \u00b7  angle: phase lag, 0\u00b0 at the top, "
            "increasing clockwise  \u00b7  speeds in rpm")

    if ax is not None:
        if getattr(ax, "name", "") != "polar":
            raise InputError("plot arguments", "the polar plot needs a polar axes: make it with "
                             "add_subplot(projection='polar')", kind="option")
        fig, panels, groups, created = ax.figure, [ax], [chosen], False
    else:
        stations = sorted({response.probes[k].station for k in chosen})
        groups = [[k for k in chosen if response.probes[k].station == s] for s in stations]
        rows, cols = _grid(len(groups))
        fig = Figure(figsize=(0.4 + 3.7 * cols, 1.25 + 3.95 * rows), facecolor=st.PAPER)
        top = _figure_title(fig, f"Polar plot, case {case}", note, 0.95)
        bottom = 0.85 / fig.get_figheight()
        grid = fig.add_gridspec(rows, cols, left=0.05, right=0.95, bottom=bottom, top=top,
                                wspace=0.42, hspace=0.42)
        panels = [fig.add_subplot(grid[n // cols, n % cols], projection="polar")
                  for n in range(len(groups))]
        created = True

    speeds = np.asarray(response.speeds, dtype=float)
    rpm = to_rpm(speeds)
    values = response.probe_values[i]
    lines, speed_labels, ticks, peak_markers, peak_labels = [], [], [], [], []
    for a, group in zip(panels, groups):
        _style_polar(a)
        r_max = max([float(np.nanmax(UM * 2.0 * np.abs(values[:, k]))) for k in group]
                    + [UM * p.amplitude for k in group for p in _case_peaks(response, i, k)]
                    + [0.0])
        r_top = _round_up(1.06 * r_max)
        a.set_ylim(0.0, r_top)
        curves = []
        for k in group:
            colour, style = looks[k]
            lag = np.radians(_lag(values[:, k]))
            amp = UM * 2.0 * np.abs(values[:, k])
            curves.append((lag, amp))
            lines.append(a.plot(lag, amp, color=colour, linestyle=style, linewidth=1.5,
                                zorder=4, label=_probe_label(response.probes[k], k))[0])
        taken = _radius_labels(a, curves, r_top)
        taken += _angle_label_boxes(a, r_top)
        for k in group:
            for p in _case_peaks(response, i, k):
                value = _at_speed(speeds, values[:, k], p.speed)
                colour = looks[k][0]
                # The refined amplitude, as in the Bode plot; the phase between sweep points.
                th, r = math.radians(float(_lag(np.array([value]))[0])), UM * p.amplitude
                drawn = UM * 2.0 * abs(value)
                if drawn < UNRESOLVED * r:
                    a.plot([th, th], [drawn, r], color=colour, linewidth=0.9,
                           linestyle=(0, (1.0, 1.5)), zorder=4.5)
                peak_markers.append(a.plot([th], [r], linestyle="none", marker="o",
                                           markersize=5.5, markerfacecolor=colour,
                                           markeredgecolor=st.INK, markeredgewidth=0.9,
                                           zorder=6)[0])
                label, rect = _polar_label(a, th, r, f"{st.whole(to_rpm(p.speed))} rpm",
                                           colour, taken, bold=True)
                peak_labels.append(label)
                taken.append(rect)
        for k in group:
            tick, texts = _speed_labels(a, speeds, rpm, values[:, k], looks[k][0], r_top,
                                        taken)
            if tick is not None:
                ticks.append(tick)
            speed_labels.extend(texts)
        if created:
            probe = response.probes[group[0]]
            a.set_title(_station_title(response, probe.station), loc="left",
                        fontsize=st.FONT_LABEL, color=st.INK, pad=14)
    if not created:
        ax.set_title(f"Polar plot, case {case}", loc="left", fontsize=st.FONT_TITLE,
                     color=st.INK, pad=14)

    handles = list(lines) + [Line2D([], [], linestyle="none", marker="o", markersize=5.5,
                                    markerfacecolor=st.MUTED, markeredgecolor=st.INK,
                                    markeredgewidth=0.9)]
    names = [line.get_label() for line in lines] + ["peak, with its speed"]
    if created:
        legend = _figure_legend(fig, handles, names, 2.6)
    else:
        legend = lb.ink(ax.legend(handles, names, loc="upper left", bbox_to_anchor=(1.08, 1.0),
                                  borderaxespad=0.0, frameon=False, fontsize=st.FONT_NOTE + 0.5,
                                  handlelength=2.6))
    return PolarArtists(figure=fig, ax=panels[0], axes=tuple(panels),
                        probes=tuple(response.probes[k].name for k in chosen),
                        lines=tuple(lines), speed_labels=tuple(speed_labels),
                        speed_ticks=tuple(ticks), peak_markers=tuple(peak_markers),
                        peak_labels=tuple(peak_labels), legend=legend)


def _style_polar(ax):
    ax.set_facecolor(st.PAPER)
    ax.set_theta_zero_location("N")
    ax.set_theta_direction(-1)
    ax.set_thetagrids(range(0, 360, 45), [f"{d}\u00b0" for d in range(0, 360, 45)],
                      fontsize=st.FONT_TICK, color=st.MUTED)
    ax.tick_params(axis="y", labelsize=st.FONT_TICK - 0.5, colors=st.MUTED)
    ax.yaxis.set_major_locator(MaxNLocator(nbins=5, steps=[1, 2, 2.5, 5, 10]))
    ax.grid(True, color=st.GRID, linewidth=0.7)
    ax.spines["polar"].set_color(st.FAINT)
    ax.set_axisbelow(True)


#: Angles (degrees of lag) where the radius labels may go: between the angle grid lines.
_RLABEL_ANGLES = tuple(22.5 + 45.0 * n for n in range(8))


def _radius_labels(ax, curves, r_top):
    """Put the radius labels along the candidate angle that the curves keep furthest from.

    Returns the rough boxes (points) of the labels, for the speed labels to avoid.
    """
    ticks = [r for r in ax.get_yticks() if 0 < r <= r_top]
    r0 = min(ticks) if ticks else 0.0
    best, clear = _RLABEL_ANGLES[2], -1.0
    for angle in _RLABEL_ANGLES:
        a = math.radians(angle)
        gap = np.inf
        for lag, amp in curves:
            # Distance of each curve point from the labelled part of the ray.
            along = np.clip(amp * np.cos(lag - a), r0, r_top)
            across = amp * np.sin(lag - a)
            d = np.hypot(amp * np.cos(lag - a) - along, across)
            if d.size:
                gap = min(gap, float(np.nanmin(d)))
        if gap > clear + 1e-9 * r_top:
            best, clear = angle, gap
    ax.set_rlabel_position(best)
    size = st.FONT_TICK - 0.5
    boxes = []
    th = math.radians(best)
    for r in ticks:
        q = lb.points(ax, (th, r))
        w, h = lb.text_width(st.signed(r, "g"), size), 1.3 * size
        boxes.append((q[0] - w / 2, q[1] - h / 2, q[0] + w / 2, q[1] + h / 2))
    return boxes


def _polar_label(ax, theta, r, text, colour, taken, bold=False, force=True):
    """A label beside the point (theta, r): outward from the centre if there is room,
    else inward (away from the centre only), else to either side.

    Returns the annotation and its rough box (points), to keep later labels off it;
    ``(None, None)`` when no side is free and ``force`` is False (otherwise the
    outward side is used anyway).
    """
    size = st.FONT_NOTE + (0.5 if bold else 0.0)
    w, h = lb.text_width(text, size, bold), 1.25 * size
    centre = lb.points(ax, (0.0, 0.0))
    q = lb.points(ax, (theta, r))
    d = q - centre
    norm = float(np.hypot(*d))
    u = d / norm if norm > 1e-9 else np.array([0.0, 1.0])
    sides = [u, np.array([-u[1], u[0]]), np.array([u[1], -u[0]])]
    if r > INWARD_FROM * ax.get_ylim()[1]:
        sides.insert(1, -u)      # inward only well clear of the crowded centre
    chosen = None
    for v in sides:
        # Anchor the side of the box facing the point, so the text grows away from it.
        ha = "left" if v[0] > 0.3 else ("right" if v[0] < -0.3 else "center")
        va = "bottom" if v[1] > 0.3 else ("top" if v[1] < -0.3 else "center")
        off = 5.0 * v
        x0 = q[0] + off[0] - {"left": 0.0, "right": w, "center": w / 2}[ha]
        y0 = q[1] + off[1] - {"bottom": 0.0, "top": h, "center": h / 2}[va]
        rect = (x0, y0, x0 + w, y0 + h)
        if chosen is None:
            chosen = (off, ha, va, rect)     # the outward side, if nothing is free
        if not any(lb.overlap(rect, t) for t in taken):
            chosen = (off, ha, va, rect)
            break
    else:
        if not force:
            return None, None
    off, ha, va, rect = chosen
    label = ax.annotate(text, xy=(theta, r), xytext=tuple(off), textcoords="offset points",
                        ha=ha, va=va, fontsize=size, color=colour if bold else st.INK,
                        fontweight="bold" if bold else "normal", zorder=7,
                        bbox=st.paper_box("round"))
    return label, rect


def _angle_label_boxes(ax, r_top):
    """Rough boxes (points) of the angle labels outside the rim."""
    boxes = []
    centre = lb.points(ax, (0.0, 0.0))
    for deg in range(0, 360, 45):
        q = lb.points(ax, (math.radians(deg), r_top))
        d = q - centre
        u = d / (float(np.hypot(*d)) or 1.0)
        c = q + 13.0 * u
        w, h = lb.text_width(f"{deg}\u00b0", st.FONT_TICK), 1.3 * st.FONT_TICK
        boxes.append((c[0] - w / 2, c[1] - h / 2, c[0] + w / 2, c[1] + h / 2))
    return boxes


def _speed_labels(ax, speeds, rpm, values, colour, r_top, taken):
    """Dots and rpm labels at round speeds along one curve, skipping crowded ones."""
    if len(speeds) < 2:
        return None, []
    step = _nice_step(rpm[-1] - rpm[0], 6)
    first = math.ceil(rpm[0] / step - 1e-9) * step
    marks = np.arange(first, rpm[-1] + 1e-9 * step, step)
    dots_th, dots_r, texts = [], [], []
    for mark in marks:
        value = _at_speed(speeds, values, mark * (2.0 * math.pi / 60.0))
        r = UM * 2.0 * abs(value)
        if r < CENTRE_CROWD * r_top:
            continue
        th = math.radians(float(_lag(np.array([value]))[0]))
        label, rect = _polar_label(ax, th, r, st.whole(mark), colour, taken, force=False)
        if label is None:
            continue
        taken.append(rect)
        texts.append(label)
        dots_th.append(th)
        dots_r.append(r)
    if not dots_th:
        return None, texts
    tick, = ax.plot(dots_th, dots_r, linestyle="none", marker="o", markersize=2.8,
                    markerfacecolor=colour, markeredgecolor=st.PAPER, markeredgewidth=0.5,
                    zorder=5)
    return tick, texts


# --- orbits -------------------------------------------------------------------------

@st.literal_text
def orbits(response, case_index=0, stations=None, *, ax=None):
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
    i = _check_case(response, case_index)
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
    case = response.cases[i]
    rpm = to_rpm(np.asarray(response.speeds, dtype=float))
    major, _, forward = response.orbits(i)
    picked = major[:, stations] * UM
    biggest = float(np.nanmax(picked)) if picked.size else 0.0
    scale = _round_up(1.15 * biggest)

    if ax is None:
        rows, cols = _grid(len(stations))
        fig = Figure(figsize=(0.5 + 3.15 * cols, 1.55 + 3.25 * rows), facecolor=st.PAPER)
        note = ("seen from the +z end: x to the right, y up, spin anticlockwise  \u00b7  "
                "every panel to the same scale, \u00b5m\n\u25cf position at t = 0 (once-per-turn mark)"
                "  \u00b7  arrow: direction of travel  \u00b7  solid forward, dashed backward")
        top = _figure_title(fig, f"Orbits, case {case}", note, 1.1)
        grid = fig.add_gridspec(rows, cols, left=0.1 if cols > 1 else 0.16, right=0.97,
                                bottom=0.95 / fig.get_figheight(), top=top, wspace=0.12,
                                hspace=0.3)
        panels = []
        for n in range(len(stations)):
            share = panels[0] if panels else None
            panels.append(fig.add_subplot(grid[n // cols, n % cols], sharex=share,
                                          sharey=share))
        created = True
    else:
        panels = list(ax) if isinstance(ax, (tuple, list, np.ndarray)) else [ax]
        panels = list(np.ravel(panels))
        if len(panels) != len(stations):
            raise InputError("plot arguments", f"{len(stations)} station{'s' if len(stations) != 1 else ''} "
                             f"to draw but {len(panels)} axes given: give one axes per station", kind="option")
        fig, created, rows, cols = panels[0].figure, False, 1, len(panels)

    ellipses, dots, arrows, insets = [], [], [], []
    for n, (a, s) in enumerate(zip(panels, stations)):
        st.style_axes(a)
        a.set_aspect("equal", adjustable="box")
        a.set_xlim(-scale, scale)
        a.set_ylim(-scale, scale)
        orbit_set = response.stations[i, :, s] * UM
        largest = float(np.nanmax(major[:, s])) * UM if len(rpm) else 0.0
        row_lines, row_dots, row_arrows = _draw_orbit_set(a, orbit_set, forward[:, s], scale)
        ellipses.append(row_lines)
        dots.append(row_dots)
        arrows.extend(row_arrows)
        inset = None
        if 0.0 < largest < INSET_BELOW * scale:
            inset, zoomed = _zoom_inset(a, orbit_set, forward[:, s], largest, scale)
            arrows.extend(zoomed)
        insets.append(inset)
        a.set_title(_station_title(response, s), loc="left", fontsize=st.FONT_LABEL,
                    color=st.INK, pad=16)
        a.text(0.0, 1.015, "largest semi-axis " + _um_text(largest),
               transform=a.transAxes, fontsize=st.FONT_NOTE, color=st.MUTED, ha="left",
               va="bottom")
        if not created or n // cols == rows - 1 or n + cols >= len(stations):
            a.set_xlabel("x (\u00b5m)", fontsize=st.FONT_LABEL, color=st.INK)
        else:
            a.tick_params(axis="x", labelbottom=False)
        if not created or n % cols == 0:
            a.set_ylabel("y (\u00b5m)", fontsize=st.FONT_LABEL, color=st.INK)
        else:
            a.tick_params(axis="y", labelleft=False)

    handles = [Line2D([], [], color=COLOURS[j % len(COLOURS)], linewidth=2.0)
               for j in range(len(rpm))]
    names = [f"{st.whole(v)} rpm" for v in rpm]
    kinds = {bool(forward[j, s]) for j in range(len(rpm)) for s in stations}
    if kinds == {True, False}:
        handles += [Line2D([], [], color=st.INK, linewidth=1.5, linestyle=st.WHIRL_STYLES[k])
                    for k in ("forward", "backward")]
        names += ["forward", "backward"]
    if created:
        legend = _figure_legend(fig, handles, names, 2.4)
    else:
        legend = lb.ink(panels[0].legend(handles, names, loc="upper right", frameon=True,
                                         framealpha=0.9, edgecolor=st.GRID,
                                         fontsize=st.FONT_NOTE + 0.5, handlelength=2.0))
    return OrbitArtists(figure=fig, ax=panels[0], axes=tuple(panels),
                        stations=tuple(stations), speeds=tuple(float(v) for v in rpm),
                        ellipses=tuple(ellipses), mark_dots=tuple(dots),
                        arrows=tuple(arrows), insets=tuple(insets), scale=scale,
                        legend=legend)


_TURN = np.exp(1j * np.linspace(0.0, 2.0 * math.pi, 121))


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
        xs, ys = (x_amp * _TURN).real, (y_amp * _TURN).real
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
    half = _round_up(1.2 * largest)
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


def _round_up(value):
    """A round number (1, 1.2, 1.5, 2, 2.5, 3, 4, 5, 6, 8 x 10^n) at or above ``value``."""
    if not value > 0 or not math.isfinite(value):
        return 1.0
    mag = 10.0 ** math.floor(math.log10(value))
    for m in (1.0, 1.2, 1.5, 2.0, 2.5, 3.0, 4.0, 5.0, 6.0, 8.0, 10.0):
        if value <= m * mag * (1 + 1e-9):
            return m * mag
    return 10.0 * mag


def _um_text(value):
    if value >= 100:
        return f"{value:.0f} \u00b5m"
    if value >= 0.1:
        return f"{value:.3g} \u00b5m"
    return f"{value:.2g} \u00b5m"
