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


# --- texts read before (rotorcalc.quantity_memo) --------------------------------------------

import json  # noqa: E402
import os  # noqa: E402
import subprocess  # noqa: E402
import sys  # noqa: E402
from pathlib import Path  # noqa: E402

import pytest  # noqa: E402

from rotorcalc import quantity_memo  # noqa: E402
from rotorcalc.errors import InputError  # noqa: E402

# Conversion factors by definition (NIST SP 811, 2008 edition, appendix B: the inch is
# 25.4 mm exactly, the pound-mass 0.45359237 kg, the pound-force 4.4482216152605 N; the
# revolution 2 pi rad; the Celsius temperature t/degC = T/K - 273.15; from memory)
TEXTS = [("125 mm", units.LENGTH, 0.125), ("3.5 in", units.LENGTH, 3.5 * 0.0254),
         ("26 lb", units.MASS, 26 * 0.45359237),
         ("650 klbf/in", units.STIFFNESS, 650e3 * 4.4482216152605 / 0.0254),
         ("3000 rpm", units.SPEED, 100.0 * math.pi), ("50 Hz", units.SPEED, 100.0 * math.pi),
         ("50 degC", units.TEMPERATURE, 323.15)]


@pytest.fixture
def memo_in(tmp_path, monkeypatch):
    monkeypatch.setenv(cache.ENV, str(tmp_path))
    yield tmp_path
    quantity_memo.save()
    monkeypatch.setenv(cache.ENV, "off")
    quantity_memo.recall("", "")        # leave the memo on the suite's setting


def test_a_text_read_again_gives_what_pint_gave(memo_in, monkeypatch):
    first = [units.parse(text, dim, "k") for text, dim, _ in TEXTS]
    for value, (_, _, expected) in zip(first, TEXTS):
        assert math.isclose(value, expected, rel_tol=1e-12)
    quantity_memo.save()
    kept = json.loads((memo_in / "units" / "read.json").read_text())["values"]
    assert len(kept) == len(TEXTS)
    quantity_memo._base = ...           # as a new process: load the file again

    def no_pint():
        raise AssertionError("pint was asked for a text read before")

    monkeypatch.setattr(units, "_ureg", no_pint)
    again = [units.parse(text, dim, "k") for text, dim, _ in TEXTS]
    assert again == first


def test_a_text_is_remembered_for_its_dimension_only(memo_in):
    """A bare number written as text is SI for a length, refused for a speed (which needs
    its unit): remembering it as a length must not make it a speed."""
    assert units.parse("12", units.LENGTH, "k") == 12.0
    with pytest.raises(InputError, match="needs a unit"):
        units.parse("12", units.SPEED, "k")


def test_the_bounds_on_the_text_apply_before_the_memo(memo_in):
    units.parse("125 mm", units.LENGTH, "k")
    with pytest.raises(InputError, match="longer than"):
        units.parse("125 mm" + " " * units.TEXT_LIMIT, units.LENGTH, "k")


def test_the_stamp_written_is_the_one_the_values_were_read_under(memo_in, monkeypatch):
    units.parse("125 mm", units.LENGTH, "k")
    loaded = quantity_memo._stamp()
    monkeypatch.setattr(quantity_memo, "_stamp", lambda: "units.py edited since")
    quantity_memo.save()
    assert json.loads((memo_in / "units" / "read.json").read_text())["stamp"] == loaded


def test_a_remembered_value_still_meets_the_range_checks(memo_in):
    quantity_memo.remember("5 km", units.LENGTH.name, 5000.0)   # as if read before
    with pytest.raises(InputError, match="outside the range"):
        units.parse("5 km", units.LENGTH, "k")


def test_a_stale_or_damaged_file_is_not_believed(memo_in):
    units.parse("125 mm", units.LENGTH, "k")
    quantity_memo.save()
    where = memo_in / "units" / "read.json"
    data = json.loads(where.read_text())
    data["values"][f"{units.LENGTH.name}|125 mm"] = 99.0
    version, digest, pint_mark = data["stamp"].split("|", 2)
    def as_a_new_process_finds(text):
        quantity_memo._new = False          # nothing of this process's to write over it
        where.write_text(text)
        quantity_memo._base = ...
        assert units.parse("125 mm", units.LENGTH, "k") == 0.125
        assert quantity_memo._new           # read by pint: the file was not believed

    for stale in (f"0.0.1|{digest}|{pint_mark}", f"{version}|{'0' * len(digest)}|{pint_mark}",
                  f"{version}|{digest}|another pint"):
        data["stamp"] = stale
        as_a_new_process_finds(json.dumps(data))
    for damaged in ("{not json", "[1, 2]", '{"stamp": 3}'):
        as_a_new_process_finds(damaged)
    data["stamp"] = f"{version}|{digest}|{pint_mark}"      # the file's own stamp: believed
    quantity_memo._new = False
    where.write_text(json.dumps(data))
    quantity_memo._base = ...
    assert units.parse("125 mm", units.LENGTH, "k") == 99.0


def test_refused_texts_are_not_kept(memo_in):
    for text, dim in (("3000 kg", units.SPEED), ("-3000 rpm", units.SPEED),
                      ("5 km", units.LENGTH)):
        with pytest.raises(InputError):
            units.parse(text, dim, "k")
        assert quantity_memo.recall(text, dim.name) is None


def test_with_the_cache_off_nothing_is_kept(tmp_path, monkeypatch):
    monkeypatch.setenv(cache.ENV, "off")
    monkeypatch.setenv("XDG_CACHE_HOME", str(tmp_path))
    assert units.parse("125 mm", units.LENGTH, "k") == 0.125
    quantity_memo.save()
    assert not list(tmp_path.iterdir())


def test_a_file_read_before_is_read_without_pint(tmp_path):
    """The point of the memo: a command on a file read before does not import pint."""
    case = Path(__file__).resolve().parents[2] / "cases" / "compressor.toml"
    code = ("import sys, hashlib; from rotorcalc.reader import read_rotor; "
            f"r = read_rotor({str(case)!r}); "
            "print('pint' in sys.modules, hashlib.sha256(repr(r).encode()).hexdigest())")
    env = dict(os.environ, ROTORCALC_CACHE=str(tmp_path))
    runs = [subprocess.run([sys.executable, "-c", code], env=env, capture_output=True,
                           text=True, check=True).stdout.split() for _ in range(2)]
    assert runs[0][0] == "True" and runs[1][0] == "False"
    assert runs[0][1] == runs[1][1]             # the same rotor, every number
