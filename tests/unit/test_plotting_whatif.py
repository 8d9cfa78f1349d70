"""What-if pictures: the critical-speed map, the variants' maps overlaid, the map shapes.

Result objects are built by hand (one tiny map is computed, on a six-element
rotor), so the file runs in a couple of seconds.
"""

import dataclasses

import matplotlib

matplotlib.use("Agg")

import numpy as np
import pytest
from matplotlib.axes import Axes
from matplotlib.colors import same_color
from matplotlib.figure import Figure

import rotorcalc.plotting
from rotorcalc.analysis import CriticalSpeed, MarginRow, MarginTable, Screening, Sweep
from rotorcalc.analysis.csmap import BearingCurve, CriticalSpeedMap, Crossing
from rotorcalc.analysis.csmap import critical_speed_map as compute_map
from rotorcalc.analysis.whatif import Comparison, StiffnessWindow, WindowEnd
from rotorcalc.model import Bearing, Disk, MarginRule, Material, OperatingRange, Rotor, Section
from rotorcalc.plotting import (CriticalMapArtists, MapShapeArtists, VariantMapArtists,
                                plot_critical_speed_map, map_point_label, plot_map_shapes, save,
                                plot_variant_maps)
from rotorcalc.plotting import _style as st
from rotorcalc.plotting import _units as pu
from rotorcalc.plotting import stiffmap as pc
from rotorcalc.units import RPM

OPERATING = OperatingRange(2400.0 * RPM, 3600.0 * RPM, 3780.0 * RPM)
FORWARD = np.array([[1.0, -1.0j], [0.5, -0.5j], [0.1, -0.1j]])
BACKWARD = FORWARD.conj()
BASE_K = 1.6e8


def _map():
    """Three modes over nine stiffnesses (the third far above), three bearing curves
    (B's lying on A's kxx), three crossings."""
    k = np.logspace(6.0, 10.0, 9)
    mode1 = np.linspace(1000.0, 3000.0, 9)
    mode2 = np.linspace(2000.0, 9000.0, 9)
    mode2[3] = np.nan                                  # absent at one stiffness
    mode3 = np.full(9, 50000.0)
    speeds = np.column_stack([mode1, mode2, mode3]) * RPM
    node_z = np.array([0.0, 0.4, 1.0])
    shapes = np.broadcast_to(FORWARD, (9, 3, 3, 2)).copy()
    w = np.linspace(0.0, 4000.0, 5) * RPM
    curves = (BearingCurve("A", "kxx", w, np.linspace(1.0e8, 2.0e8, 5)),
              BearingCurve("A", "kyy", w, np.linspace(1.5e8, 2.5e8, 5)),
              BearingCurve("B", "kxx", w, np.linspace(1.0e8, 2.0e8, 5)))
    crossings = (Crossing("A", "kxx", 0, 2500.0 * RPM, 1.5e8),
                 Crossing("B", "kxx", 0, 2500.0 * RPM, 1.5e8),
                 Crossing("A", "kyy", 0, 2550.0 * RPM, 1.9e8))
    return CriticalSpeedMap(k, speeds, shapes, node_z, np.array([0, 2]), "forward", curves,
                            crossings)


def _critical(rpm, whirl_shape=FORWARD, branch=0):
    return CriticalSpeed(rpm * RPM, 1.0, branch, complex(-2.0, rpm * RPM), whirl_shape)


def _window(low=0.5, high=None, passes=True):
    limit = _critical(2900.0)
    lo = WindowEnd(low, limit if low is not None else None,
                   "" if low is not None else "margins hold up to the end of the search (x0.1)")
    hi = WindowEnd(high, limit if high is not None else None,
                   "" if high is not None else "margins hold up to the end of the search (x10)")
    if not passes:
        lo = hi = WindowEnd(None, limit, "the base stiffness does not keep the margins")
    factors = np.array([0.1, 0.3, 1.0, 3.0, 10.0])
    return StiffnessWindow("bearing.*", factors, np.full(5, 5.0), lo, hi, passes)


def _sweep(shift=1.0):
    speeds = np.linspace(0.0, 6000.0, 13) * RPM
    n = len(speeds)
    f1 = np.full(n, 2000.0 * RPM * shift)
    f2 = np.linspace(3000.0, 4500.0, n) * RPM * shift
    eig = np.stack([-0.01 * f1 + 1j * f1, -0.02 * f2 + 1j * f2], axis=1)
    shapes = np.empty((n, 2, 3, 2), dtype=complex)
    shapes[:, 0] = FORWARD
    shapes[:, 1] = BACKWARD
    return Sweep(speeds, eig, shapes, np.array([0.0, 0.5, 1.0]), np.array([0, 1, 2]))


def _screening(shift, verdict):
    crit = _critical(2000.0 * shift)
    rows = (MarginRow(crit, "below", 20.0, 3.0, 15.0, verdict),)
    table = MarginTable(rows, OPERATING, MarginRule(), 6000.0 * RPM)
    return Screening(None, _sweep(shift), (crit,), table)


def _comparison():
    return Comparison(("base", "soft", "stiff"),
                      (_screening(1.0, "pass"), _screening(0.8, "fail"),
                       _screening(1.2, "pass")), ())


# --- the critical-speed map --------------------------------------------------------------

def test_map_returns_frozen_artists_on_a_new_figure():
    out = plot_critical_speed_map(_map())
    assert isinstance(out, CriticalMapArtists)
    assert isinstance(out.figure, Figure) and isinstance(out.ax, Axes)
    assert out.ax.figure is out.figure
    with pytest.raises(dataclasses.FrozenInstanceError):
        out.ax = None


def test_map_draws_on_the_axes_given():
    fig = Figure()
    ax = fig.add_subplot(1, 2, 2)
    out = plot_critical_speed_map(_map(), OPERATING, _window(), BASE_K, ax=ax)
    assert out.ax is ax and out.figure is fig
    drawn = out.modes + out.curves + out.crossings + out.window_markers
    assert drawn and all(a.axes is ax for a in drawn)
    assert out.band.axes is ax and out.window_band.axes is ax


def test_map_axes_are_log_stiffness_and_rpm_with_klbf_in_on_top():
    cmap = _map()
    out = plot_critical_speed_map(cmap)
    assert out.ax.get_xscale() == "log"
    assert np.allclose(out.ax.get_xlim(), (1e6, 1e10))
    assert "N/m" in out.ax.get_xlabel() and "rpm" in out.ax.get_ylabel()
    assert "klbf/in" in out.stiffness_axis.get_xlabel()
    assert np.isclose(pu.N_PER_KLBF_IN, 175126.8, rtol=1e-6)
    assert np.isclose(pu.to_klbf_in(pu.N_PER_KLBF_IN * 1e3), 1e3)
    x, y = out.modes[0].get_data()
    assert np.allclose(x, cmap.stiffness) and np.allclose(y, np.linspace(1000, 3000, 9))


def test_map_labels_each_mode_that_shows_and_counts_the_rest():
    out = plot_critical_speed_map(_map(), OPERATING)
    assert len(out.modes) == 3
    assert [t.get_text() for t in out.mode_labels] == ["mode 1", "mode 2"]
    assert out.hidden_modes == 1
    texts = [t.get_text() for t in out.legend.get_texts()]
    assert any(t.startswith("1 mode above") for t in texts)
    # the top: 1.15 x the highest of trip, bearing curves and crossings (4000 rpm here),
    # or of the next mode above that where the bearings are (mode 2 at 2.5e8 N/m)
    k = np.log10(_map().stiffness)
    mode2_at_bearings = np.interp(np.log10(2.5e8), k[4:6], [5500.0, 6375.0])
    assert np.isclose(out.speed_max, pc.HEADROOM * mode2_at_bearings)
    assert np.isclose(out.ax.get_ylim()[1], out.speed_max)
    assert plot_critical_speed_map(_map(), speed_max=20000.0).hidden_modes == 1
    assert np.isclose(plot_critical_speed_map(_map(), speed_max=20000.0).ax.get_ylim()[1], 20000.0)


def test_map_draws_bearing_curves_one_colour_per_bearing_kxx_and_kyy_apart():
    out = plot_critical_speed_map(_map())
    a_xx, a_yy, b_xx = out.curves
    assert same_color(a_xx.get_color(), a_yy.get_color())
    assert not same_color(a_xx.get_color(), b_xx.get_color())
    assert a_xx.get_linestyle() == "-" and a_yy.get_linestyle() != "-"
    x, y = a_xx.get_data()
    assert np.allclose(x, np.linspace(1e8, 2e8, 5)) and np.allclose(y, np.linspace(0, 4000, 5))
    # B lies on A's kxx curve: drawn thin on top, and the key says so
    assert b_xx.get_linewidth() < a_xx.get_linewidth()
    assert b_xx.get_zorder() > a_xx.get_zorder()
    texts = [t.get_text() for t in out.legend.get_texts()]
    assert "B (on A's curves)" in texts


def test_map_marks_crossings_and_labels_them_in_rpm():
    out = plot_critical_speed_map(_map())
    assert len(out.crossings) == 3
    x, y = out.crossings[2].get_data()
    assert np.isclose(x[0], 1.9e8) and np.isclose(y[0], 2550.0)
    assert same_color(out.crossings[2].get_markerfacecolor(), st.PAPER)       # kyy: open
    assert same_color(out.crossings[0].get_markerfacecolor(), out.curves[0].get_color())
    labels = " ".join(t.get_text() for t in out.crossing_labels)
    assert "2500" in labels and "2550" in labels and "rpm" in labels
    # two crossings at one point share a label
    assert len(out.crossing_labels) <= 2


def test_map_shades_the_operating_range_across():
    out = plot_critical_speed_map(_map(), OPERATING)
    assert np.isclose(out.band.get_y(), 2400.0)
    assert np.isclose(out.band.get_y() + out.band.get_height(), 3600.0)
    assert [t.get_text() for t in out.band_labels] == ["2400", "3600", "trip 3780"]
    assert np.allclose(out.trip_line.get_ydata(), 3780.0)
    plain = plot_critical_speed_map(_map())
    assert plain.band is None and plain.band_labels == () and plain.trip_line is None


def test_map_window_band_with_a_limited_and_an_open_end():
    out = plot_critical_speed_map(_map(), OPERATING, _window(low=0.5, high=None), BASE_K)
    band = out.window_band
    assert np.isclose(band.get_x(), 0.5 * BASE_K)
    assert np.isclose(band.get_x() + band.get_width(), 10.0 * BASE_K)   # to the searched end
    texts = [t.get_text() for t in out.window_labels]
    assert "margins kept" in texts
    assert any(t.startswith("\u00d70.5: limited by 2900 rpm 1X fwd") for t in texts)
    assert any("end of search" in t for t in texts)
    assert len(out.window_markers) == 1 and len(out.window_arrows) == 1
    x, y = out.window_markers[0].get_data()
    assert np.isclose(x[0], 0.5 * BASE_K) and np.isclose(y[0], 2900.0)
    assert np.allclose(out.base_line.get_xdata(), BASE_K)


def test_map_window_with_both_ends_limited():
    out = plot_critical_speed_map(_map(), window=_window(low=0.5, high=4.0), base_stiffness=BASE_K)
    band = out.window_band
    assert np.isclose(band.get_x() + band.get_width(), 4.0 * BASE_K)
    assert len(out.window_markers) == 2 and out.window_arrows == ()


def test_map_window_when_the_base_fails_says_so_without_a_band():
    out = plot_critical_speed_map(_map(), window=_window(passes=False), base_stiffness=BASE_K)
    assert out.window_band is None
    assert any("margins not kept" in t.get_text() for t in out.window_labels)


def test_map_window_needs_a_positive_base_stiffness():
    with pytest.raises(ValueError, match="base_stiffness"):
        plot_critical_speed_map(_map(), window=_window())
    for bad in (0.0, -1e8, float("nan")):
        with pytest.raises(ValueError, match="base_stiffness"):
            plot_critical_speed_map(_map(), base_stiffness=bad)


def test_map_of_a_tiny_computed_rotor():
    steel = Material("steel", 206e9, 80e9, 7850.0)
    rotor = Rotor((Section(0.4, 0.05, steel, elements=3), Section(0.4, 0.05, steel, elements=3)),
                  OPERATING, (Disk(1, 15.0, 0.05, 0.03),),
                  (Bearing(0, {"kxx": (5e7,), "kyy": (8e7,)}, name="L"),
                   Bearing(2, {"kxx": (5e7,), "kyy": (8e7,)}, name="R")))
    cmap = compute_map(rotor, stiffness=np.logspace(6, 10, 7), mode_count=2)
    out = plot_critical_speed_map(cmap, rotor.operating)
    assert len(out.modes) == 2 and len(out.curves) == 4
    assert len(out.crossings) == len(cmap.crossings)


def test_map_without_ranges_or_curves_scales_to_its_lowest_modes():
    bare = dataclasses.replace(_map(), curves=(), crossings=())
    out = plot_critical_speed_map(bare)
    # medians of modes 1 and 2: 2000 and 5937.5 rpm (one point of mode 2 is absent)
    mode2 = np.delete(np.linspace(2000.0, 9000.0, 9), 3)
    assert np.isclose(out.speed_max, pc.HEADROOM * np.median(mode2))
    assert out.curves == () and out.crossings == () and out.crossing_labels == ()


# --- variants overlaid ---------------------------------------------------------------------

def test_variants_return_frozen_artists_one_colour_each():
    out = plot_variant_maps(_comparison(), OPERATING)
    assert isinstance(out, VariantMapArtists) and isinstance(out.figure, Figure)
    assert out.names == ("base", "soft", "stiff")
    assert same_color(out.colours[0], st.INK) and len(set(out.colours)) == 3
    for colour, pieces, marks in zip(out.colours, out.branches, out.critical_markers):
        assert pieces and all(same_color(p.get_color(), colour) for p in pieces)
        assert len(marks) == 1 and same_color(marks[0].get_markerfacecolor(), colour)
    with pytest.raises(dataclasses.FrozenInstanceError):
        out.names = ()


def test_variants_draw_on_the_axes_given_with_whirl_styles():
    fig = Figure()
    ax = fig.add_subplot(2, 1, 1)
    out = plot_variant_maps(_comparison(), ax=ax, orders=(1.0, 2.0))
    assert out.ax is ax and out.figure is fig
    assert all(p.axes is ax for pieces in out.branches for p in pieces)
    assert out.branch_whirl[0] == ("forward", "backward")
    fwd, bwd = out.branches[0]
    assert fwd.get_linestyle() == "-" and bwd.get_linestyle() != "-"
    assert [t.get_text().strip() for t in out.order_labels] == ["1X", "2X"]


def test_variants_band_markers_and_key():
    out = plot_variant_maps(_comparison(), OPERATING)
    assert np.isclose(out.band.get_x(), 2400.0)
    assert [t.get_text() for t in out.band_labels] == ["2400", "3600", "trip 3780"]
    x, y = out.critical_markers[1][0].get_data()
    assert np.isclose(x[0], 1600.0) and np.isclose(y[0], 1600.0)
    texts = [t.get_text() for t in out.legend.get_texts()]
    assert any(t.startswith("soft  (a margin fails)\n1600 fwd") for t in texts)
    assert any(t.startswith("base\n2000 fwd") for t in texts)


def test_variants_count_branches_above_the_frame():
    out = plot_variant_maps(_comparison(), freq_max=2500.0)
    assert out.freq_max == 2500.0 and out.hidden_branches == 2   # base 3000+, stiff 3600+
    assert any("above 2500 cpm" in t.get_text() for t in out.legend.get_texts())


# --- shapes at map points ------------------------------------------------------------------

def test_shapes_one_line_per_point_scaled_to_a_peak_of_one():
    z = np.linspace(0.0, 1.0, 6)
    bend = np.sin(np.pi * z)
    one = np.column_stack([bend, -1j * bend]) * (3.0 + 1.0j)
    two = np.column_stack([np.cos(np.pi * z), -1j * np.cos(np.pi * z)])
    out = plot_map_shapes(z, [one, two], ["a", "b"], station_nodes=[0, 5])
    assert isinstance(out, MapShapeArtists)
    assert len(out.lines) == 2 and len(out.station_lines) == 2
    x, y = out.lines[0].get_data()
    assert np.allclose(x, z * 1000.0)
    assert np.isclose(np.max(np.abs(y)), 1.0) and np.allclose(y, bend / bend.max(), atol=1e-9)
    _, y2 = out.lines[1].get_data()
    assert np.isclose(y2[0], 1.0) and np.isclose(y2[-1], -1.0)        # a nodal point shows
    assert [t.get_text() for t in out.legend.get_texts()] == ["a", "b"]


def test_shapes_absent_and_coinciding():
    z = np.linspace(0.0, 1.0, 4)
    shape = np.column_stack([z + 0.1, -1j * (z + 0.1)])
    gone = np.full((4, 2), np.nan + 0j)
    fig = Figure()
    ax = fig.add_subplot()
    out = plot_map_shapes(z, [shape, shape * 2.0, gone], ["p", "q", "r"], ax=ax)
    assert out.ax is ax and out.figure is fig
    assert out.lines[1].get_linewidth() < out.lines[0].get_linewidth()
    assert len(out.lines[2].get_xdata()) == 0
    assert out.legend.get_texts()[2].get_text() == "r (absent)"


def test_shapes_refuse_mismatched_input():
    z = np.linspace(0.0, 1.0, 4)
    shape = np.zeros((4, 2), complex)
    with pytest.raises(ValueError, match="labels"):
        plot_map_shapes(z, [shape, shape], ["only one"])
    with pytest.raises(ValueError, match="per node"):
        plot_map_shapes(z, [np.zeros((3, 2), complex)], ["short"])


def test_map_point_label():
    assert map_point_label(1.6e8, 0, 5398.0 * RPM) == "mode 1 at 1.6e8 N/m: 5398 rpm"
    assert map_point_label(1e8, 1, 12685.4 * RPM) == "mode 2 at 1e8 N/m: 12685 rpm"


# --- saving and exports --------------------------------------------------------------------

def test_each_picture_saves(tmp_path):
    # small figures keep the file fast; the look at full size is checked by eye
    z = np.linspace(0.0, 1.0, 3)
    draw = {"map.png": lambda ax: plot_critical_speed_map(_map(), OPERATING, _window(), BASE_K, ax=ax),
            "variants.png": lambda ax: plot_variant_maps(_comparison(), OPERATING, ax=ax),
            "shapes.svg": lambda ax: plot_map_shapes(z, [FORWARD], ["mode 1"], ax=ax)}
    for name, picture in draw.items():
        fig = Figure(figsize=(5.0, 3.0), dpi=50)
        out = picture(fig.add_subplot())
        path = save(out.figure, tmp_path / name)
        assert path.exists() and path.stat().st_size > 1000


def test_exported_from_the_plotting_package():
    for name in ("plot_critical_speed_map", "plot_variant_maps", "plot_map_shapes", "map_point_label",
                 "CriticalMapArtists", "VariantMapArtists", "MapShapeArtists"):
        assert name in rotorcalc.plotting.__all__ and hasattr(rotorcalc.plotting, name)

