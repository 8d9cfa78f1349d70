"""Response pictures: Bode plot, polar plot and orbits draw what the result holds.

The responses are built by hand (one damped resonance, no solves), except one
end-to-end check on a tiny rotor, so the file runs in a few seconds.
"""

import math

import matplotlib

matplotlib.use("Agg")

import numpy as np
import pytest
from matplotlib.axes import Axes
from matplotlib.figure import Figure
from matplotlib.text import Text

import rotorcalc.plotting
from rotorcalc.analysis.response import Peak, Response, unbalance_response
from rotorcalc.model import Bearing, Disk, Material, OperatingRange, Rotor, Section
from rotorcalc.plotting import plot_bode, plot_orbits, plot_polar, save
from rotorcalc.plotting.bodeplot import BodeArtists
from rotorcalc.plotting.orbitplot import OrbitArtists
from rotorcalc.plotting.polarplot import PolarArtists
from rotorcalc.unbalance import Probe, UnbalanceCase, UnbalanceWeight
from rotorcalc.units import RPM

OPERATING = OperatingRange(2400.0 * RPM, 3600.0 * RPM, 3780.0 * RPM)
W_N = 5000.0 * RPM           # the one resonance
ZETA = 0.12
PROBES = (Probe(2, 0.0, "A x"), Probe(2, math.pi / 2, "A y"), Probe(0, 0.0, "B x"))


def _resonance(w, size):
    """Zero-to-peak complex x amplitude of a forced, damped single resonance, m."""
    r = w / W_N
    return size * r * r / (1.0 - r * r + 2j * ZETA * r)


def _response(speeds=None, station_sizes=(1e-6, 5e-7, 2e-5)):
    """Two cases over a sweep, three stations (forward circular orbits), three probes."""
    speeds = np.linspace(100.0, 6000.0, 60) * RPM if speeds is None else np.asarray(speeds)
    n = len(speeds)
    stations = np.empty((2, n, len(station_sizes), 2), dtype=complex)
    for c, factor in enumerate((1.0, 0.5)):
        for s, size in enumerate(station_sizes):
            x = _resonance(speeds, factor * size)
            stations[c, :, s, 0], stations[c, :, s, 1] = x, -1j * x      # forward circle
    # The second case whirls backward at station 1.
    stations[1, :, 1, 1] *= -1.0
    values = np.empty((2, n, len(PROBES)), dtype=complex)
    for k, p in enumerate(PROBES):
        xy = stations[:, :, p.station]
        values[:, :, k] = math.cos(p.angle) * xy[..., 0] + math.sin(p.angle) * xy[..., 1]
    a_peak = 2e-5 / (2.0 * ZETA) * 2.0         # pk-pk at the resonance, near enough
    peaks = (Peak("run", "A x", W_N, a_peak, (W_N * (1 - ZETA), W_N * (1 + ZETA)),
                  1.0 / (2.0 * ZETA)),
             Peak("run", "A y", W_N, a_peak, None, None, "no fall on one side"),
             Peak("slow", "A x", W_N, a_peak / 2, (W_N * 0.9, W_N * 1.1), 5.0))
    zeros = np.zeros((2, n, 1, 2), dtype=complex)
    return Response(speeds, ("run", "slow"), stations, PROBES, values, zeros, zeros, ("b",),
                    peaks, (), ())


# --- Bode plot ------------------------------------------------------------------------

def test_bode_returns_two_stacked_axes_and_a_curve_per_probe():
    res = _response()
    out = plot_bode(res)
    assert isinstance(out, BodeArtists) and isinstance(out.figure, Figure)
    assert isinstance(out.ax, Axes) and isinstance(out.phase_ax, Axes)
    assert out.ax.figure is out.figure is out.phase_ax.figure
    assert out.ax.get_shared_x_axes().joined(out.ax, out.phase_ax)
    assert out.probes == ("A x", "A y", "B x")
    assert len(out.amplitude_lines) == len(out.phase_lines) == 3
    x, y = out.amplitude_lines[2].get_data()
    assert np.allclose(x, res.speeds / RPM)
    assert np.allclose(y, 1e6 * res.probe_amplitude_pp(0, 2))
    assert "run" in out.ax.get_title(loc="left")
    assert out.legend.get_texts()[0].get_text() == "A x"


def test_bode_phase_is_the_lag_in_0_360_broken_at_wraps():
    res = _response()
    values = res.probe_values.copy()
    values[0, :, 0] *= 1j          # a quarter turn less lag: from 270 through 360 to 90
    res = Response(res.speeds, res.cases, res.stations, res.probes, values,
                   res.bearing_forces, res.support_forces, res.bearing_names, res.peaks, (), ())
    out = plot_bode(res)
    for k, line in enumerate(out.phase_lines):
        x, y = (np.asarray(v, dtype=float) for v in line.get_data())
        keep = np.isfinite(y)
        assert np.allclose(y[keep], res.probe_phase(0, k))
        assert np.allclose(x[keep], res.speeds / RPM)
        assert np.all((y[keep] >= 0) & (y[keep] < 360))
    y0 = np.asarray(out.phase_lines[0].get_ydata(), dtype=float)
    assert np.isnan(y0).sum() == 1                                  # one wrap, one gap
    assert not np.isnan(np.asarray(out.phase_lines[1].get_ydata(), dtype=float)).any()
    assert out.phase_ax.get_ylim() == (0.0, 360.0)


def test_bode_marks_each_peak_of_the_case_with_its_af_and_half_power_bar():
    res = _response()
    out = plot_bode(res, 0)
    assert len(out.peak_markers) == 2 == len(out.peak_labels) == len(out.phase_markers)
    x, y = out.peak_markers[0].get_data()
    assert np.isclose(x[0], 5000.0) and np.isclose(y[0], 1e6 * res.peaks[0].amplitude)
    texts = [t.get_text() for t in out.peak_labels]
    # Two probes share station 2, so each label says which one it is.
    assert texts == ["x  AF 4.2", "y  AF n/a"]
    assert len(out.half_power_bars) == 1           # the second peak has no half-power points
    bx, by = out.half_power_bars[0].get_data()
    assert np.allclose(bx, [5000.0 * (1 - ZETA), 5000.0 * (1 + ZETA)])
    assert np.allclose(by, 1e6 * res.peaks[0].amplitude / math.sqrt(2.0))
    # Only the peaks of the case drawn.
    other = plot_bode(res, 1)
    assert [t.get_text() for t in other.peak_labels] == ["x  AF 5.0"]


def test_bode_single_probe_label_has_no_direction_tag():
    res = _response()
    peaks = (Peak("run", "B x", W_N, 1e-5, (W_N * 0.9, W_N * 1.1), 3.94),)
    res = Response(res.speeds, res.cases, res.stations, res.probes, res.probe_values,
                   res.bearing_forces, res.support_forces, res.bearing_names, peaks, (), ())
    out = plot_bode(res, probes=["B x"])
    assert [t.get_text() for t in out.peak_labels] == ["AF 3.9"]


def test_bode_joins_an_unresolved_peak_to_its_curve():
    res = _response()
    sharp = (Peak("run", "B x", W_N, 50e-6, (W_N * 0.999, W_N * 1.002), 326.4),)
    res = Response(res.speeds, res.cases, res.stations, res.probes, res.probe_values,
                   res.bearing_forces, res.support_forces, res.bearing_names, sharp, (), ())
    out = plot_bode(res, probes=["B x"])
    assert [t.get_text() for t in out.peak_labels] == ["AF 326"]
    stems = [line for line in out.ax.lines
             if len(line.get_xdata()) == 2 and np.allclose(line.get_xdata(), 5000.0)]
    assert len(stems) == 1 and np.isclose(max(stems[0].get_ydata()), 50.0)


def test_bode_picks_probes_by_name_or_index():
    res = _response()
    assert plot_bode(res, probes=["B x"]).probes == ("B x",)
    assert plot_bode(res, probes="A y").probes == ("A y",)
    assert plot_bode(res, probes=[2, "A x"]).probes == ("B x", "A x")
    assert plot_bode(res, probes=[-1]).probes == ("B x",)
    only_b = plot_bode(res, probes=["B x"])
    assert only_b.peak_markers == ()                # the peaks are on the A probes
    with pytest.raises(ValueError, match="'A x', 'A y', 'B x'"):
        plot_bode(res, probes=["C x"])
    with pytest.raises(IndexError):
        plot_bode(res, probes=[3])
    with pytest.raises(TypeError):
        plot_bode(res, probes=[1.5])
    with pytest.raises(IndexError):
        plot_bode(res, case_index=2)


def test_bode_shades_the_operating_range_on_both_axes():
    out = plot_bode(_response(), operating=OPERATING)
    assert len(out.bands) == 2 and len(out.trip_lines) == 2
    for band in out.bands:
        assert np.isclose(band.get_x(), 2400.0)
        assert np.isclose(band.get_x() + band.get_width(), 3600.0)
    assert [t.get_text() for t in out.band_labels] == ["2400", "3600", "trip 3780"]
    assert np.allclose(out.trip_lines[0].get_xdata(), 3780.0)
    legend = [t.get_text() for t in out.legend.get_texts()]
    assert "operating range" in legend and "trip speed" in legend
    bare = plot_bode(_response())
    assert bare.bands == () and bare.band_labels == () and bare.trip_lines == ()


def test_bode_hatches_the_unstable_speeds_on_both_panels_and_says_so_once():
    import dataclasses
    out = plot_bode(dataclasses.replace(_response(), unstable_ranges=((5500.0 * RPM,
                                                                       6000.0 * RPM),)))
    spans = [a for a in out.unstable_spans if not isinstance(a, Text)]
    words = [a.get_text() for a in out.unstable_spans if isinstance(a, Text)]
    assert len(spans) == 2 and all(s.get_hatch() == "///" for s in spans)
    assert words == [" unstable: no steady state"]
    assert plot_bode(_response()).unstable_spans == ()


def test_bode_on_given_axes_pair_or_single():
    fig = Figure()
    top, bottom = fig.add_subplot(2, 1, 1), fig.add_subplot(2, 1, 2)
    out = plot_bode(_response(), ax=(top, bottom))
    assert out.ax is top and out.phase_ax is bottom and out.figure is fig
    assert len(fig.axes) == 2
    assert all(line.axes is top for line in out.amplitude_lines)
    assert all(line.axes is bottom for line in out.phase_lines)
    fig = Figure()
    ax = fig.add_subplot()
    out = plot_bode(_response(), ax=ax, operating=OPERATING)
    assert out.ax is ax and out.phase_ax is None and out.phase_lines == ()
    assert out.phase_markers == () and len(out.peak_markers) == 2
    assert len(fig.axes) == 1
    with pytest.raises(ValueError):
        plot_bode(_response(), ax=(ax,))
    pair = Figure().subplots(2, 1)                      # an array of axes is a pair too
    assert plot_bode(_response(), ax=pair).phase_ax is pair[1]


def test_bode_and_polar_need_probes():
    res = _response()
    bare = Response(res.speeds, res.cases, res.stations, (), res.probe_values[..., :0],
                    res.bearing_forces, res.support_forces, res.bearing_names, (), (), ())
    with pytest.raises(ValueError, match="no probes"):
        plot_bode(bare)
    with pytest.raises(ValueError, match="no probes"):
        plot_polar(bare)


def test_bode_log_amplitude():
    out = plot_bode(_response(), log_amplitude=True)
    assert out.ax.get_yscale() == "log"
    lo, hi = out.ax.get_ylim()
    assert 0 < lo < hi
    assert plot_bode(_response()).ax.get_yscale() == "linear"


def test_bode_af_labels_stay_apart():
    res = _response()
    peaks = tuple(Peak("run", name, W_N, 2e-5 / ZETA, (W_N * 0.9, W_N * 1.1), 4.0 + 0.1 * k)
                  for k, name in enumerate(("A x", "A y", "B x")))
    res = Response(res.speeds, res.cases, res.stations, res.probes, res.probe_values,
                   res.bearing_forces, res.support_forces, res.bearing_names, peaks, (), ())
    out = plot_bode(res, operating=OPERATING)
    out.figure.draw_without_rendering()
    # The text alone, not its leader line.
    boxes = [Text.get_window_extent(t) for t in out.peak_labels]
    for i, a in enumerate(boxes):
        for b in boxes[i + 1:]:
            assert not a.overlaps(b)


# --- polar plot -----------------------------------------------------------------------

def test_polar_has_one_panel_per_station_with_the_lag_as_angle():
    res = _response()
    out = plot_polar(res)
    assert isinstance(out, PolarArtists) and isinstance(out.figure, Figure)
    assert len(out.axes) == 2 and out.ax is out.axes[0]         # stations 0 and 2
    assert all(a.name == "polar" for a in out.axes)
    assert out.probes == ("A x", "A y", "B x")
    by_name = dict(zip([line.get_label() for line in out.lines], out.lines))
    theta, r = by_name["A y"].get_data()
    assert np.allclose(np.degrees(theta), res.probe_phase(0, 1))
    assert np.allclose(r, 1e6 * res.probe_amplitude_pp(0, 1))
    assert by_name["B x"].axes is out.axes[0]                    # station 0 first
    assert by_name["A x"].axes is by_name["A y"].axes is out.axes[1]
    ax = out.axes[1]
    assert ax.get_theta_direction() == -1                        # clockwise
    assert np.isclose(ax.get_theta_offset(), math.pi / 2)        # 0 at the top


def test_polar_panel_titles_name_the_station_by_whole_words():
    res = _response()
    probes = (Probe(2, 0.0, "DE 45"), Probe(2, math.pi / 2, "DE 40"), Probe(0, 0.0, "B x"))
    res = Response(res.speeds, res.cases, res.stations, probes, res.probe_values,
                   res.bearing_forces, res.support_forces, res.bearing_names, (), (), ())
    titles = [a.get_title(loc="left") for a in plot_polar(res).axes]
    assert titles == ["station 0  \u00b7  B x", "station 2  \u00b7  DE"]


def test_polar_marks_peaks_and_labels_speeds_in_rpm():
    res = _response()
    out = plot_polar(res)
    assert len(out.peak_markers) == 2
    assert [t.get_text() for t in out.peak_labels] == ["5000 rpm", "5000 rpm"]
    theta, r = out.peak_markers[0].get_data()
    # On the drawn curve at the resonance: a quarter turn of lag (the x probe).
    assert np.isclose(np.degrees(theta[0]), 90.0, atol=3.0)
    speeds = [float(t.get_text()) for t in out.speed_labels]
    assert speeds and all(100.0 <= v <= 6000.0 for v in speeds)
    assert all(v % 1000 == 0 for v in speeds)
    assert out.speed_ticks


def test_polar_on_a_given_polar_axes_draws_every_probe_there():
    fig = Figure()
    ax = fig.add_subplot(projection="polar")
    out = plot_polar(_response(), probes=["A x", "B x"], ax=ax)
    assert out.ax is ax and out.axes == (ax,) and out.figure is fig
    assert [line.get_label() for line in out.lines] == ["A x", "B x"]
    assert all(line.axes is ax for line in out.lines)
    assert len(out.peak_markers) == 1
    flat = Figure().add_subplot()
    with pytest.raises(ValueError, match="polar"):
        plot_polar(_response(), ax=flat)


# --- orbits ---------------------------------------------------------------------------

AT = np.array([3000.0, 5000.0]) * RPM


def test_orbits_draw_the_ellipse_from_the_complex_amplitudes():
    res = _response(AT)
    out = plot_orbits(res)
    assert isinstance(out, OrbitArtists) and isinstance(out.figure, Figure)
    assert out.stations == (0, 2)                                 # the probe stations
    assert len(out.axes) == 2 and out.ax is out.axes[0]
    assert np.allclose(out.speeds, [3000.0, 5000.0])
    x_amp, y_amp = res.stations[0, 1, 2] * 1e6
    xs, ys = out.ellipses[1][1].get_data()
    t = np.linspace(0.0, 2.0 * math.pi, len(xs))
    assert np.allclose(xs, (x_amp * np.exp(1j * t)).real)
    assert np.allclose(ys, (y_amp * np.exp(1j * t)).real)
    kx, ky = out.mark_dots[1][1].get_data()
    assert np.isclose(kx[0], x_amp.real) and np.isclose(ky[0], y_amp.real)
    # One colour per speed, the same in every panel.
    colours = [[line.get_color() for line in row] for row in out.ellipses]
    assert colours[0] == colours[1] and colours[0][0] != colours[0][1]
    assert "3000 rpm" in [t.get_text() for t in out.legend.get_texts()]


def test_orbits_share_one_scale_and_zoom_into_small_ones():
    res = _response(AT)
    out = plot_orbits(res, stations=[0, 1, 2])
    limits = {a.get_xlim() for a in out.axes} | {a.get_ylim() for a in out.axes}
    assert len(limits) == 1
    lo, hi = limits.pop()
    assert lo == -hi == -out.scale
    major = res.orbits(0)[0] * 1e6
    assert out.scale >= major.max()
    assert all(a.get_aspect() == 1.0 for a in out.axes)
    # Stations 0 and 1 are twenty and forty times smaller than station 2.
    assert out.insets[0] is not None and out.insets[1] is not None and out.insets[2] is None
    assert out.insets[0].get_xlim()[1] < out.scale
    assert "\u00b5m" in out.insets[0].texts[0].get_text()


def test_orbit_arrows_turn_with_the_orbit_sense():
    res = _response(AT)
    out = plot_orbits(res, case_index=1, stations=[2, 1])
    assert out.ellipses[0][0].get_linestyle() == "-"              # forward at station 2
    assert out.ellipses[1][0].get_linestyle() != "-"              # backward at station 1

    def turning(arrow):
        (x0, y0), (x1, y1) = arrow._posA_posB
        return x0 * y1 - y0 * x1                                   # > 0: anticlockwise

    forward_arrows = [a for a in out.arrows if a.axes is out.axes[0]]
    assert forward_arrows and all(turning(a) > 0 for a in forward_arrows)
    backward_arrows = [a for a in out.arrows if a.axes is out.insets[1]]
    assert backward_arrows and all(turning(a) < 0 for a in backward_arrows)
    legend = [t.get_text() for t in out.legend.get_texts()]
    assert "forward" in legend and "backward" in legend


def test_orbits_on_given_axes_and_default_stations_without_probes():
    res = _response(AT)
    fig = Figure()
    axes = [fig.add_subplot(1, 2, k) for k in (1, 2)]
    out = plot_orbits(res, stations=[2, 0], ax=axes)
    assert list(out.axes) == axes and out.figure is fig and out.stations == (2, 0)
    single = Figure().add_subplot()
    assert plot_orbits(res, stations=2, ax=single).ax is single
    with pytest.raises(ValueError, match="one axes per station"):
        plot_orbits(res, ax=single)
    with pytest.raises(IndexError):
        plot_orbits(res, stations=[3])
    bare = Response(res.speeds, res.cases, res.stations, (), res.probe_values[..., :0],
                    res.bearing_forces, res.support_forces, res.bearing_names, (), (), ())
    assert plot_orbits(bare).stations == (0, 1, 2)


# --- saving and exports ---------------------------------------------------------------

MAGIC = {".png": b"\x89PNG", ".svg": b"<?xml"}


@pytest.mark.parametrize("suffix", [".png", ".svg"])
def test_every_response_picture_saves(tmp_path, suffix):
    res = _response()
    for name, out in (("bode", plot_bode(res, operating=OPERATING)), ("polar", plot_polar(res)),
                      ("orbits", plot_orbits(_response(AT)))):
        path = save(out.figure, tmp_path / f"{name}{suffix}")
        assert path.read_bytes().startswith(MAGIC[suffix])


def test_the_package_exports_the_response_pictures():
    for name, module in (("plot_bode", "bodeplot"), ("plot_polar", "polarplot"),
                         ("plot_orbits", "orbitplot")):
        assert name in rotorcalc.plotting.__all__
        assert getattr(rotorcalc.plotting, name).__module__ == f"rotorcalc.plotting.{module}"


# --- end to end on a tiny rotor -------------------------------------------------------

def test_pictures_of_a_computed_response():
    steel = Material("steel", 2.1e11, 2.1e11 / 2.6, 7800.0)
    case = UnbalanceCase("disk", (UnbalanceWeight(1, 1e-4),))
    bearings = tuple(Bearing(s, {"kxx": (2e7,), "kyy": (3e7,), "cxx": (2e3,), "cyy": (2e3,)},
                             name=n) for s, n in ((0, "L"), (2, "R")))
    rotor = Rotor((Section(0.4, 0.04, steel, elements=2), Section(0.4, 0.04, steel, elements=2)),
                  OperatingRange(2000.0 * RPM, 3000.0 * RPM), disks=(Disk(1, 10.0, 0.05, 0.03),),
                  bearings=bearings, unbalance=(case,), name="tiny")
    res = unbalance_response(rotor, speeds=np.linspace(200.0, 9000.0, 45) * RPM)
    out = plot_bode(res, operating=rotor.operating)
    assert out.probes == ("L x", "L y", "R x", "R y")
    assert len(out.peak_markers) == sum(p.case == "disk" for p in res.peaks)
    assert plot_polar(res).axes and len(plot_polar(res).axes) == 2
    at = unbalance_response(rotor, speeds=[2500.0 * RPM])
    assert plot_orbits(at).stations == (0, 2)
    assert plot_orbits(at, stations=[1]).scale > 0
