"""The bearing-coefficients picture: what it draws for a table bearing and for one from its
geometry, on its own figure and on axes it is given."""

import numpy as np
import pytest
from matplotlib.figure import Figure

from rotorcalc.analysis.bearing_curves import bearing_curves
from rotorcalc.bearings.fixed_film import CAUTION as FILM_CAUTION
from rotorcalc.plotting import plot_bearing_coefficients
from rotorcalc.reader import read_rotor
from rotorcalc.vocabulary import CAUTION
from tests.conftest import ROOT


@pytest.fixture(scope="module")
def sleeve():
    return bearing_curves(read_rotor(ROOT / "cases" / "feed_pump_sleeve.toml"))


def test_a_table_bearing_gets_two_panels_and_the_general_caution():
    curves = bearing_curves(read_rotor(ROOT / "cases" / "feed_pump.toml"), "DE")[0]
    art = plot_bearing_coefficients(curves)
    assert set(art.axes) == {"stiffness", "damping"} and art.film_lines == {}
    assert art.caution_text.get_text() == CAUTION
    x, y = art.lines["kxx"].get_data()
    assert np.allclose(y, curves.stiffness[:, 0, 0] * 1e-6)      # MN/m


def test_a_geometry_bearing_gets_four_panels_and_the_film_caution(sleeve):
    de = sleeve[0]
    art = plot_bearing_coefficients(de)
    assert set(art.axes) == {"stiffness", "damping", "dimensionless", "film"}
    assert art.caution_text.get_text() == FILM_CAUTION
    assert np.allclose(art.film_lines["eccentricity"].get_ydata(), de.record.eccentricity)
    assert art.axes["dimensionless"].get_xscale() == "log"
    # the raw solves are drawn beside the smoothed table
    rings = [ln for ln in art.axes["damping"].lines if ln.get_linestyle() == "None"]
    assert len(rings) == 4


def test_drawn_on_given_axes(sleeve):
    fig = Figure()
    axes = fig.subplots(2, 2).ravel()
    art = sleeve[0].plot(axes=list(axes))
    assert art.figure is fig and art.ax is axes[0]
