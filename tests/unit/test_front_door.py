"""The front door: one import gives the job, its example runs and pins a number, and
the solves take one BLAS thread without any environment variable."""

import doctest

import rotorcalc as rc
from tests.conftest import ROOT


def test_package_example_runs_and_pins_the_feed_pump_critical(monkeypatch):
    monkeypatch.chdir(ROOT)
    result = doctest.testmod(rc, raise_on_error=False)
    assert result.attempted >= 5 and result.failed == 0


def test_one_import_gives_reader_analyses_results_and_pictures():
    for name in rc.__all__:
        assert getattr(rc, name) is not None, name
    assert rc.plot_bode.__module__ == "rotorcalc.plotting.bodeplot"


def test_solves_take_one_blas_thread_without_environment_variables(monkeypatch):
    from threadpoolctl import threadpool_info, threadpool_limits

    from rotorcalc import threads
    from rotorcalc.solvers import one_blas_thread

    @one_blas_thread
    def inside():
        return {lib["num_threads"] for lib in threadpool_info() if lib["user_api"] == "blas"}

    with threadpool_limits(limits=2, user_api="blas"):     # as numpy starts on two cores
        monkeypatch.setattr(threads, "_USER_CHOSE", False)
        assert inside() == {1}
        # the user's own setting (made before rotorcalc was imported) wins
        monkeypatch.setattr(threads, "_USER_CHOSE", True)
        assert inside() == {2}


def test_frozen_means_frozen():
    import pickle

    import numpy as np
    import pytest
    rotor = rc.read_rotor(ROOT / "cases" / "feed_pump.toml")
    assert hash(rotor) == hash(pickle.loads(pickle.dumps(rotor)))
    with pytest.raises(TypeError):
        rotor.bearings[0].coefficients["kxx"] = (1.0,)
    with pytest.raises(TypeError):
        rotor.station_names["coupling"] = 3
    modes = rc.modes_at(rotor, 300.0, 2)
    for array in (modes.eigenvalues, modes.shapes, modes.vectors):
        with pytest.raises(ValueError):
            array[...] = 0
    assert isinstance(modes.eigenvalues, np.ndarray)


def test_results_draw_themselves():
    import matplotlib
    matplotlib.use("Agg")
    rotor = rc.read_rotor(ROOT / "cases" / "overhung_fan.toml")
    result = rc.screen(rotor)
    drawn = result.plot()                    # one call instead of five arguments
    assert drawn.critical_markers and drawn.band is not None
    assert result.sweep.plot(operating=rotor.operating).branches
    assert rc.modes_at(rotor, 100.0, 2).plot(1).figure is not None
    assert result.response.plot(operating=rotor.operating).amplitude_lines
