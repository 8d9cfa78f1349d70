"""The disk cache of film tables (rotorcalc.bearings.film_cache): a second run reads what the
first computed, the same numbers; a change of the rotor or of the code is a new entry; a
damaged entry is computed anew; ``ROTORCALC_CACHE=off`` keeps nothing."""

import numpy as np
import pytest

from rotorcalc.bearings import film_cache, tabulate
from rotorcalc.reader import parse_rotor
from rotorcalc.variants import Variant, apply_variant, parse_change
from tests.verification.test_film_in_model import rotor_text


@pytest.fixture
def cache(tmp_path, monkeypatch):
    monkeypatch.setenv(film_cache.ENV, str(tmp_path))
    tabulate._stored.cache_clear()
    yield tmp_path
    tabulate._stored.cache_clear()


def _refuse(*args):
    raise AssertionError("the film tables were solved again")


def _tables(rotor):
    return [(b.speeds, dict(b.coefficients)) for b in rotor.bearings]


def test_a_second_run_reads_the_tables_the_first_computed(cache, monkeypatch):
    first = parse_rotor(rotor_text((0, 2)))
    files = list(cache.glob("*.pickle"))
    assert len(files) == 1
    tabulate._stored.cache_clear()                   # a new run: nothing in memory
    monkeypatch.setattr(tabulate, "_tabulated", _refuse)
    second = parse_rotor(rotor_text((0, 2)))
    assert _tables(second) == _tables(first)
    record = second.bearings[0].film_record
    assert np.array_equal(record.eccentricity, first.bearings[0].film_record.eccentricity)


def test_a_changed_rotor_or_code_is_a_new_entry(cache, monkeypatch):
    rotor = parse_rotor(rotor_text((0, 2)))
    apply_variant(rotor, Variant("v", (parse_change("bearing.*.film.clearance *= 1.2"),)))
    assert len(list(cache.glob("*.pickle"))) == 2
    key = ("film-tables", "anything")
    before = film_cache.path_for(key)
    monkeypatch.setattr(film_cache, "_code_digest", lambda: "another version")
    assert film_cache.path_for(key) != before


def test_a_damaged_entry_is_computed_anew(cache):
    first = parse_rotor(rotor_text((0, 2)))
    (path,) = cache.glob("*.pickle")
    path.write_bytes(b"not a pickle")
    tabulate._stored.cache_clear()
    again = parse_rotor(rotor_text((0, 2)))
    assert _tables(again) == _tables(first)
    assert path.read_bytes() != b"not a pickle"


def test_off_keeps_nothing(tmp_path, monkeypatch):
    monkeypatch.setenv(film_cache.ENV, "off")
    assert film_cache.folder() is None and film_cache.path_for(("k",)) is None
    assert film_cache.fetch(("k",), lambda: 42) == 42
    assert not list(tmp_path.iterdir())


def test_the_default_folder_follows_the_user_cache(tmp_path, monkeypatch):
    monkeypatch.delenv(film_cache.ENV, raising=False)
    monkeypatch.setenv("XDG_CACHE_HOME", str(tmp_path))
    assert film_cache.folder() == tmp_path / "rotorcalc" / "films"


def test_an_unwritable_folder_only_costs_time(tmp_path, monkeypatch):
    blocked = tmp_path / "file"
    blocked.write_text("a file where the folder should be")
    monkeypatch.setenv(film_cache.ENV, str(blocked / "films"))
    assert film_cache.fetch(("k",), lambda: 7) == 7
