"""Plotting layer: each function draws what it says, on the axes it is given, and saves.

The result objects are built by hand (no eigen-solves), so the whole file runs
in about a second.
"""

import ast
import dataclasses
from pathlib import Path

import matplotlib

matplotlib.use("Agg")

import numpy as np
import pytest
from matplotlib.axes import Axes
from matplotlib.backends.backend_agg import FigureCanvasAgg
from matplotlib.figure import Figure

import rotorcalc.plotting
from rotorcalc.analysis import CriticalSpeed, MarginRow, MarginTable, Modes, Sweep
from rotorcalc.errors import InputError
from rotorcalc.model import (Bearing, Disk, MarginRule, Material, OperatingRange, Rotor,
                             Section, Support)
from rotorcalc.plotting import _style as st
from rotorcalc.plotting import plot_mode_shape, plot_rotor_layout, save, plot_whirl_speed_map
from rotorcalc.units import RPM

STEEL = Material("steel", 206e9, 80e9, 7850.0)
FORWARD = np.array([[1.0, -1.0j], [0.5, -0.5j], [0.1, -0.1j]])   # x + iy large: forward
BACKWARD = FORWARD.conj()
MIXED = np.array([[1.0, -1.0j], [1.0, 1.0j], [0.0, 0.0]])        # half and half


def _sweep():
    speeds = np.linspace(0.0, 6000.0, 13) * RPM
    n = len(speeds)
    f1 = np.full(n, 2000.0 * RPM)
    f2 = np.linspace(3000.0, 4500.0, n) * RPM
    f3 = np.full(n, 40000.0 * RPM)        # far above: clipped, counted as hidden
    damping = np.array([-0.01, -0.2, -0.02])
    eig = np.stack([f1 * damping[0] + 1j * f1, f2 * damping[1] + 1j * f2,
                    f3 * damping[2] + 1j * f3], axis=1)
    shapes = np.empty((n, 3, 3, 2), dtype=complex)
    shapes[:, 0] = FORWARD
    shapes[:, 1] = [BACKWARD if i < 6 else MIXED for i in range(n)]   # changes label
    shapes[:, 2] = FORWARD
    return Sweep(speeds, eig, shapes, np.array([0.0, 0.5, 1.0]), np.array([0, 1, 2]))


def _criticals():
    a = CriticalSpeed(2000.0 * RPM, 1.0, 0, complex(-2.0, 2000.0 * RPM), FORWARD)
    b = CriticalSpeed(1000.0 * RPM, 2.0, 0, complex(-2.0, 2000.0 * RPM), FORWARD)
    return [a, b]


def _pair():
    """A forward and a backward critical 5 rpm apart: one point on the map."""
    a = CriticalSpeed(2000.0 * RPM, 1.0, 0, complex(-2.0, 2000.0 * RPM), FORWARD)
    b = CriticalSpeed(2005.0 * RPM, 1.0, 1, complex(-2.0, 2005.0 * RPM), BACKWARD)
    return [a, b]


OPERATING = OperatingRange(2400.0 * RPM, 3600.0 * RPM, 3780.0 * RPM)


def _margins(criticals):
    rows = (MarginRow(criticals[0], "below", 16.7, 50.0, 15.0, "pass"),
            MarginRow(criticals[1], "below", 58.3, 50.0, 15.0, "fail"))
    return MarginTable(rows, OPERATING, MarginRule(), 6000.0 * RPM)


def _rotor():
    sections = (Section(0.2, 0.06, STEEL, elements=2),
                Section(0.5, 0.08, STEEL, inner_diameter=0.03, elements=3),
                Section(0.3, 0.08, STEEL, added_mass=4.0, elements=2),
                Section(0.2, 0.05, STEEL))
    disks = (Disk(2, 20.0, 0.1, 0.06, name="wheel"),
             Disk.from_geometry(0, 0.12, 0.06, 0.05, 7850.0, name="hub"))
    bearings = (Bearing(1, {"kxx": (1e8,), "kyy": (1e8,)}, name="DE"),
                Bearing(3, {"kxx": (1e8,), "kyy": (1e8,)}, name="NDE",
                        support=Support(2e8, 3e8, mass=50.0)),
                Bearing(2, {"kxx": (1e6,), "kyy": (1e6,)}, name="wear ring", role="seal"))
    return Rotor(sections, OPERATING, disks, bearings, station_names={"drive": 1},
                 name="test rotor")


def _modes():
    node_z = np.linspace(0.0, 1.2, 7)
    shape = np.stack([np.sin(np.pi * node_z / 1.2), -1j * np.sin(np.pi * node_z / 1.2)], -1)
    shape[0] = shape[-1] = [0.02, -0.02j]
    shapes = np.stack([shape, shape.conj()])
    eig = np.array([complex(-1.0, 200.0), complex(-3.0, 210.0)])
    return Modes(300.0, eig, shapes, np.zeros((28, 2), complex), node_z,
                 np.array([0, 2, 5, 6]), np.array([]))


# --- whirl-speed map ---------------------------------------------------------------

def test_map_returns_a_figure_and_its_artists():
    out = plot_whirl_speed_map(_sweep())
    assert isinstance(out.figure, Figure)
    assert isinstance(out.ax, Axes) and out.ax.figure is out.figure
    assert len(out.branches) == 3 and all(out.branches)


def test_map_draws_on_the_axes_given():
    fig = Figure()
    ax = fig.add_subplot(2, 1, 2)
    out = plot_whirl_speed_map(_sweep(), _criticals(), OPERATING, ax=ax)
    assert out.ax is ax and out.figure is fig
    assert len(fig.axes) == 1
    assert all(line.axes is ax for piece in out.branches for line in piece)


@pytest.mark.parametrize("orders", [(1.0,), (1.0, 2.0), (0.5, 1.0, 2.0)])
def test_map_has_one_labelled_line_per_order(orders):
    out = plot_whirl_speed_map(_sweep(), orders=orders)
    assert len(out.order_lines) == len(orders) == len(out.order_labels)
    for order, line, label in zip(orders, out.order_lines, out.order_labels):
        x, y = line.get_data()
        assert np.allclose(y, order * np.asarray(x))
        assert label.get_text().strip() == f"{order:g}X"


def test_map_shades_the_operating_range_and_labels_its_ends():
    out = plot_whirl_speed_map(_sweep(), operating=OPERATING)
    assert np.isclose(out.band.get_x(), 2400.0)
    assert np.isclose(out.band.get_x() + out.band.get_width(), 3600.0)
    texts = [t.get_text() for t in out.band_labels]
    assert texts == ["2400", "3600", "trip 3780"]
    assert np.allclose(out.trip_line.get_xdata(), 3780.0)
    no_band = plot_whirl_speed_map(_sweep())
    assert no_band.band is None and no_band.band_labels == []


def test_map_tells_whirl_senses_apart_and_splits_a_changing_branch():
    out = plot_whirl_speed_map(_sweep())
    assert out.branch_whirl[0] == ["forward"]
    assert out.branch_whirl[1] == ["backward", "mixed"]
    styles = {name: st.WHIRL_STYLES[name] for name in st.WHIRL_ORDER}
    assert len(set(map(str, styles.values()))) == 3
    assert out.branches[0][0].get_linestyle() == "-"
    backward, mixed = out.branches[1]
    assert backward.get_linestyle() != "-" and mixed.get_linestyle() != "-"
    # The change falls half-way between the 6th and 7th speeds (2500 and 3000 rpm).
    assert np.isclose(backward.get_xdata()[-1], 2750.0)
    assert np.isclose(mixed.get_xdata()[0], 2750.0)


def test_map_breaks_a_branch_where_the_sweep_has_no_value():
    sw = _sweep()
    eig = sw.eigenvalues.copy()
    eig[4:7, 0] = np.nan          # the mode turns overdamped for a while
    eig[:, 2] = np.nan            # and one branch is absent throughout
    gappy = Sweep(sw.speeds, eig, sw.shapes, sw.node_z, sw.station_nodes)
    out = plot_whirl_speed_map(gappy)
    before, after = out.branches[0]
    assert np.isclose(before.get_xdata()[-1], 1500.0)      # the 4th speed, no midpoint
    assert np.isclose(after.get_xdata()[0], 3500.0)
    assert out.branches[2] == [] and out.hidden_branches == 0
    assert all(np.all(np.isfinite(line.get_ydata())) for p in out.branches for line in p)


def test_map_colours_branches_by_log_decrement_class():
    out = plot_whirl_speed_map(_sweep())
    sw = _sweep()
    for j, pieces in enumerate(out.branches):
        expected = st.LOG_DEC_COLOURS[st.log_dec_class(sw.log_dec[0, j])]
        assert pieces[0].get_color() == expected


def test_map_limits_the_frequency_axis_and_counts_hidden_branches():
    out = plot_whirl_speed_map(_sweep())
    # 1.1 x the 1X line at 6000 rpm; the 40000 cpm branch does not blow the axis up.
    assert np.isclose(out.ax.get_ylim()[1], 6600.0)
    assert out.hidden_branches == 1
    assert "not shown" in out.legend.get_texts()[-1].get_text()
    forced = plot_whirl_speed_map(_sweep(), freq_max=50000.0)
    assert forced.ax.get_ylim()[1] == 50000.0 and forced.hidden_branches == 0


def test_map_marks_and_labels_critical_speeds():
    crits = _criticals()
    out = plot_whirl_speed_map(_sweep(), crits, OPERATING, orders=(1.0, 2.0))
    assert len(out.critical_markers) == 2
    x, y = out.critical_markers[0].get_data()
    assert np.isclose(x[0], 2000.0) and np.isclose(y[0], 2000.0)
    assert [a.get_text() for a in out.critical_labels] == ["1000", "2000"]
    legend = [t.get_text() for t in out.legend.get_texts()]
    assert any(t.startswith("2000 rpm  1X fwd") for t in legend)
    assert any(t.startswith("1000 rpm  2X fwd") for t in legend)


def test_map_gives_coinciding_criticals_one_label():
    out = plot_whirl_speed_map(_sweep(), _pair())
    assert len(out.critical_markers) == 2
    assert [a.get_text() for a in out.critical_labels] == ["2000 / 2005"]


def test_map_labels_stay_apart():
    out = plot_whirl_speed_map(_sweep(), _criticals() + _pair()[1:], OPERATING)
    out.figure.draw_without_rendering()
    boxes = [a.get_window_extent() for a in out.critical_labels]
    for i, a in enumerate(boxes):
        for b in boxes[i + 1:]:
            assert not a.overlaps(b)


def test_map_colours_critical_markers_by_verdict():
    crits = _criticals()
    out = plot_whirl_speed_map(_sweep(), crits, OPERATING, margins=_margins(crits))
    faces = [m.get_markerfacecolor() for m in out.critical_markers]
    assert faces == [st.VERDICT_STYLES["pass"]["facecolor"],
                     st.VERDICT_STYLES["fail"]["facecolor"]]
    # The margin table alone is enough to find the criticals.
    alone = plot_whirl_speed_map(_sweep(), margins=_margins(crits))
    assert len(alone.critical_markers) == 2
    legend = " ".join(t.get_text() for t in out.legend.get_texts())
    assert "pass" in legend and "fail" in legend


# --- mode shape ----------------------------------------------------------------------

def test_mode_shape_returns_figure_and_draws_stations_and_orbits():
    out = plot_mode_shape(_modes(), 1)
    assert isinstance(out.figure, Figure)
    assert len(out.station_lines) == 4
    assert len(out.orbits) == 4
    x, y = out.line.get_data()
    assert np.allclose(x, _modes().node_z * 1000.0)
    assert np.isclose(np.max(np.abs(y)), 1.0)
    assert out.outline == []


def test_mode_shape_title_has_frequency_log_dec_and_whirl():
    out = plot_mode_shape(_modes(), 2)
    texts = " ".join(t.get_text() for t in out.ax.texts)
    assert out.ax.get_title(loc="left").startswith("Mode 2")
    assert "Hz" in texts and "cpm" in texts and "backward whirl" in texts
    assert f"{210 / (2 * np.pi):.2f} Hz" in texts


def test_mode_shape_on_given_axes_with_rotor_outline():
    fig = Figure()
    ax = fig.add_subplot()
    out = plot_mode_shape(_modes(), 1, ax=ax, rotor=_rotor(), orbits=False)
    assert out.ax is ax and out.figure is fig
    assert out.outline and out.orbits == []


def test_mode_shape_refuses_a_mode_it_does_not_have():
    with pytest.raises(InputError, match="1..2"):
        plot_mode_shape(_modes(), 3)


# --- rotor layout --------------------------------------------------------------------

def test_layout_draws_every_part():
    rotor = _rotor()
    out = plot_rotor_layout(rotor)
    assert isinstance(out.figure, Figure)
    assert len(out.sections) == 4 and len(out.disks) == 2 and len(out.bearings) == 3
    assert out.sections[2].get_hatch() and not out.sections[0].get_hatch()
    assert len(out.bores) == 1
    seal = out.bearings[2]
    assert all(tuple(p.get_facecolor()[:3]) == matplotlib.colors.to_rgb(st.SEAL) for p in seal)
    assert len(out.bearings[1]) > len(out.bearings[0])      # the support adds mass and spring
    labels = [t.get_text() for t in out.station_axis.get_xticklabels()]
    assert labels[1] == "1  drive" and labels[0] == "0"


def test_layout_is_true_to_scale_unless_too_slender():
    out = plot_rotor_layout(_rotor())
    assert out.radial_scale == 1.0 and out.ax.get_aspect() == 1.0
    thin = Rotor((Section(3.0, 0.04, STEEL),), OPERATING)
    out = plot_rotor_layout(thin)
    assert out.radial_scale > 1.0 and out.ax.get_aspect() == out.radial_scale
    assert f"\u00d7{out.radial_scale:g}" in out.ax.get_title(loc="right")
    assert plot_rotor_layout(thin, radial_scale=1).radial_scale == 1.0
    with pytest.raises(ValueError):
        plot_rotor_layout(thin, radial_scale=0.0)


def test_layout_section_rectangles_are_the_geometry_in_mm():
    out = plot_rotor_layout(_rotor())
    rect = out.sections[1]
    assert np.isclose(rect.get_x(), 200.0) and np.isclose(rect.get_width(), 500.0)
    assert np.isclose(rect.get_height(), 80.0) and np.isclose(rect.get_y(), -40.0)


def test_layout_on_given_axes():
    fig = Figure()
    ax = fig.add_subplot()
    out = plot_rotor_layout(_rotor(), ax=ax)
    assert out.ax is ax and out.figure is fig


def test_whirl_map_mode_shape_and_layout_results_are_frozen():
    for out in (plot_whirl_speed_map(_sweep()), plot_mode_shape(_modes(), 1), plot_rotor_layout(_rotor())):
        with pytest.raises(dataclasses.FrozenInstanceError):
            out.legend = None


# --- saving --------------------------------------------------------------------------

MAGIC = {".png": b"\x89PNG", ".pdf": b"%PDF", ".svg": b"<?xml"}


@pytest.mark.parametrize("suffix", [".png", ".svg", ".pdf"])
def test_save_writes_each_format(tmp_path, suffix):
    fig = Figure(figsize=(2.0, 1.5))
    fig.add_subplot().plot([0, 1], [1, 0])
    path = save(fig, tmp_path / f"map{suffix}")
    assert path.read_bytes().startswith(MAGIC[suffix])
    assert [p.name for p in tmp_path.iterdir()] == [f"map{suffix}"]


def test_save_png_resolution(tmp_path):
    fig = Figure(figsize=(2.0, 1.0))
    fig.add_subplot().plot([0, 1])
    data = save(fig, tmp_path / "small.png").read_bytes()
    width = int.from_bytes(data[16:20], "big")
    assert 250 <= width <= 320    # 2 in at 150 dpi, give or take the tight box


@pytest.mark.parametrize("name", ["map.jpg", "map", "map.png.txt", "map.eps"])
def test_save_refuses_other_extensions(tmp_path, name):
    with pytest.raises(ValueError, match="png"):
        save(Figure(), tmp_path / name)
    assert list(tmp_path.iterdir()) == []


def test_save_replaces_whole_or_leaves_the_old_file(tmp_path):
    target = tmp_path / "map.png"
    target.write_bytes(b"old")
    fig = Figure()

    def broken(*args, **kwargs):
        raise RuntimeError("disk full")

    fig.savefig = broken
    with pytest.raises(RuntimeError):
        save(fig, target)
    assert target.read_bytes() == b"old"
    assert [p.name for p in tmp_path.iterdir()] == ["map.png"]
    save(Figure(), target)
    assert target.read_bytes().startswith(MAGIC[".png"])


def test_plotting_modules_choose_no_backend_and_avoid_pyplot():
    # Read the sources rather than import in a fresh interpreter: as sure, and fast.
    folder = Path(rotorcalc.plotting.__file__).parent
    for source in folder.glob("*.py"):
        tree = ast.parse(source.read_text(encoding="utf-8"))
        for node in ast.walk(tree):
            if isinstance(node, ast.Import):
                names = [a.name for a in node.names]
            elif isinstance(node, ast.ImportFrom):
                names = [node.module or ""] + [f"{node.module}.{a.name}" for a in node.names]
            elif isinstance(node, ast.Call) and isinstance(node.func, ast.Attribute):
                assert node.func.attr not in ("use", "switch_backend", "show"), source.name
                continue
            else:
                continue
            assert not any(n.startswith("matplotlib.pyplot") for n in names), source.name


def test_whirl_speed_map_names_what_it_is_of():
    assert plot_whirl_speed_map(_sweep()).ax.get_title(loc="left") == "Whirl-speed map"
    named = plot_whirl_speed_map(_sweep(), title="Brine pump 3")
    assert named.ax.get_title(loc="left") == "Whirl-speed map: Brine pump 3"



# --- a figure of the caller's -------------------------------------------------------

@pytest.mark.parametrize("draw", [
    lambda ax: plot_whirl_speed_map(_sweep(), _criticals(), OPERATING, ax=ax,
                                    margins=_margins(_criticals())),
    lambda ax: plot_mode_shape(_modes(), 1, ax=ax, rotor=_rotor())],
    ids=["whirl-speed map", "mode shape"])
def test_keys_fit_a_callers_figure_with_the_layout_the_docs_advise(draw):
    """The keys sit outside the axes (right, below): on a figure of the caller's with the
    layout the docs advise (plotting package docstring, docs/usage.md) every key lies whole
    inside the figure, where the figure's default layout cuts the key off."""
    def key_inside(layout):
        fig = Figure(figsize=(9, 6), layout=layout)
        out = draw(fig.add_subplot(1, 1, 1))
        renderer = FigureCanvasAgg(fig).get_renderer()
        fig.draw(renderer)
        box = out.legend.get_window_extent(renderer)
        return fig.bbox.x0 <= box.x0 and box.x1 <= fig.bbox.x1 and \
            fig.bbox.y0 <= box.y0 and box.y1 <= fig.bbox.y1

    assert key_inside("constrained")
    assert not key_inside(None)          # the case the advice is for
