"""Errors travel: each kind of input error is a class of its own, caught by class or by
its kind, and survives a process boundary with every field (a worker's error once
arrived as a TypeError)."""

import pickle
from concurrent.futures import ProcessPoolExecutor

import pytest

from rotorcalc.errors import (KINDS, InputError, OutOfRangeError, SolverError, UnitError)


def raise_in_worker(kind):
    raise InputError("bearing[1].kxx[2]", "is wrong here", kind=kind, value=-3.0,
                     expected="a positive stiffness", file="pump.toml", line=42)


@pytest.mark.parametrize("kind", sorted(KINDS))
def test_every_kind_is_a_class_and_pickles(kind):
    err = InputError("k", "p", kind=kind, value=1, expected="e", file="f", line=3)
    assert type(err) is KINDS[kind] and err.kind == kind and isinstance(err, ValueError)
    back = pickle.loads(pickle.dumps(err))
    assert type(back) is type(err) and back.message() == err.message()
    assert (back.key, back.value, back.expected, back.file, back.line) == ("k", 1, "e", "f", 3)


def test_an_error_in_a_worker_process_arrives_whole():
    with ProcessPoolExecutor(1) as pool:
        with pytest.raises(OutOfRangeError) as info:
            pool.submit(raise_in_worker, "range").result()
    err = info.value
    assert err.key == "bearing[1].kxx[2]" and err.line == 42 and err.value == -3.0
    assert "pump.toml, line 42" in err.message()


def test_catch_by_class_and_keep_the_kind_through_location():
    with pytest.raises(UnitError):
        raise InputError("x", "has no unit", kind="unit")
    located = InputError("x", "has no unit", kind="unit").with_location(file="a.toml", line=2)
    assert isinstance(located, UnitError) and located.line == 2
    solver = pickle.loads(pickle.dumps(SolverError("did not converge")))
    assert isinstance(solver, SolverError) and str(solver) == "did not converge"


def test_public_api_user_mistakes_are_input_errors():
    from rotorcalc.analysis.sweep import worker_count
    from rotorcalc.solvers import make_solver
    with pytest.raises(InputError):
        make_solver("qz")
    with pytest.raises(InputError):
        worker_count(-1)


def test_warnings_are_records_grouped_by_code(tmp_path):
    """Warnings carry a code and the speeds they concern; the JSON writes records, so a
    reader groups them without parsing words."""
    import json

    from typer.testing import CliRunner

    from rotorcalc.cli import app
    from rotorcalc.notices import Notice, codes
    from tests.conftest import ROOT
    notice = Notice("bearing DE: speeds below 1500 rpm lie outside", "table-range", (10.0,))
    back = pickle.loads(pickle.dumps(notice))
    assert back == notice and back.code == "table-range" and back.speeds == (10.0,)
    out = tmp_path / "s.json"
    result = CliRunner().invoke(app, ["sweep", str(ROOT / "cases" / "feed_pump.toml"),
                                      "--json", str(out)])
    assert result.exit_code == 0, result.output
    warnings = json.loads(out.read_text())["warnings"]
    assert warnings and {w["code"] for w in warnings} == {"table-range"}
    assert all(w["speeds_rpm"] and w["message"].startswith("bearing ") for w in warnings)
    assert codes([notice, "plain text"]) == ["table-range", "note"]


def test_a_failed_map_solve_is_a_solver_error(monkeypatch):
    """Every failed factorisation or eigen-solve is a SolverError (exit code 3), the
    critical-speed map's included."""
    import scipy.linalg as la

    from rotorcalc.analysis import csmap
    from tests.conftest import isotropic, uniform_shaft

    def broken(*args, **kwargs):
        raise la.LinAlgError("eig algorithm did not converge")
    monkeypatch.setattr(csmap.la, "eig", broken)
    rotor = uniform_shaft(bearings=(isotropic(0, 1e7), isotropic(1, 1e7)), elements=4)
    with pytest.raises(SolverError, match="critical-speed map"):
        csmap.critical_speed_map(rotor, stiffness=[1e7, 1e8], mode_count=2)
