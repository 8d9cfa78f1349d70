"""The front door: one import gives the job, its example runs and pins a number, and
the solves take one BLAS thread without any environment variable."""

import doctest
import os

import rotorcalc as rc
from tests.conftest import ROOT


def test_package_example_runs_and_pins_the_feed_pump_critical(monkeypatch):
    monkeypatch.chdir(ROOT)
    result = doctest.testmod(rc, raise_on_error=False)
    assert result.attempted >= 5 and result.failed == 0


def test_one_import_gives_reader_analyses_results_and_pictures():
    for name in rc.__all__:
        assert getattr(rc, name) is not None, name
    assert rc.bode.__module__ == "rotorcalc.plotting.response"


def test_solves_take_one_blas_thread_without_environment_variables(monkeypatch):
    from threadpoolctl import threadpool_info

    from rotorcalc.solvers import one_blas_thread
    for name in ("OPENBLAS_NUM_THREADS", "OMP_NUM_THREADS", "MKL_NUM_THREADS"):
        monkeypatch.delenv(name, raising=False)

    @one_blas_thread
    def inside():
        return [lib["num_threads"] for lib in threadpool_info() if lib["user_api"] == "blas"]

    assert inside() and set(inside()) == {1}
    # the user's own setting wins: nothing is limited when it is set
    monkeypatch.setenv("OPENBLAS_NUM_THREADS", "2")
    assert os.environ["OPENBLAS_NUM_THREADS"] == "2" and inside() is not None
