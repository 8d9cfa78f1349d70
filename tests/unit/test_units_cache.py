"""pint's parsed unit definitions kept in the cache folder between runs (rotorcalc.units,
rotorcalc.cache): the registry read back converts as a freshly parsed one does; with the
cache off nothing is written; a folder that cannot be used costs only the parsing."""

import math

from rotorcalc import cache, units


def _speed(registry):
    """3000 rpm in rad/s, by the registry given (the rotor files' own definitions added)."""
    registry.define("@alias revolutions_per_minute = RPM")
    return registry.Quantity("3000 RPM").to("radian / second").magnitude


def test_the_registry_is_kept_and_read_back(tmp_path, monkeypatch):
    monkeypatch.setenv(cache.ENV, str(tmp_path))
    first = units._registry()
    assert list((tmp_path / "units").iterdir()), "nothing was kept"
    again = units._registry()
    # 3000 rev/min = 100 pi rad/s (definition of the revolution and the minute)
    assert math.isclose(_speed(first), 100.0 * math.pi, rel_tol=1e-12)
    assert _speed(again) == _speed(first)


def test_no_cache_writes_nothing(tmp_path, monkeypatch):
    monkeypatch.setenv(cache.ENV, "off")
    monkeypatch.setenv("XDG_CACHE_HOME", str(tmp_path))
    assert math.isclose(_speed(units._registry()), 100.0 * math.pi, rel_tol=1e-12)
    assert not list(tmp_path.iterdir())


def test_a_folder_that_cannot_be_used_costs_only_the_parsing(tmp_path, monkeypatch):
    blocked = tmp_path / "a file"
    blocked.write_text("not a folder")
    monkeypatch.setenv(cache.ENV, str(blocked))
    assert math.isclose(_speed(units._registry()), 100.0 * math.pi, rel_tol=1e-12)
