"""Shared fixtures: small rotors built directly from the model classes."""

import os

for _var in ("OPENBLAS_NUM_THREADS", "OMP_NUM_THREADS", "MKL_NUM_THREADS"):
    os.environ.setdefault(_var, "1")  # see rotorcalc/cli/__init__.py
# film tables are computed afresh in the tests (and none is written under the home folder);
# tests/unit/test_film_cache.py turns the disk cache on in a temporary folder
os.environ["ROTORCALC_CACHE"] = "off"

from pathlib import Path  # noqa: E402

import pytest

from rotorcalc.model import (Bearing, Disk, Material, OperatingRange, Rotor, Section,
                             Settings)

ROOT = Path(__file__).resolve().parents[1]
#: The bundled rotor files (not their variants and study files).
CASES = sorted(p for p in (ROOT / "cases").glob("*.toml")
               if not p.stem.endswith(("_variants", "_study")))

STEEL = Material("steel", 2.11e11, 2.11e11 / 2.6, 7810.0)
#: Steel's stiffness with a millionth of its density: the near-massless shaft of a
#: Jeffcott rotor (its mass ratio to the disk bounds the error of each closed form).
LIGHT = Material("light steel", STEEL.youngs_modulus, STEEL.shear_modulus, STEEL.density * 1e-6)
#: An operating range for rotors whose checks do not read it.
ANY_RANGE = OperatingRange(10.0, 20.0)


def uniform_shaft(length=1.0, diameter=0.05, elements=20, bearings=(), disks=(),
                  theory="timoshenko", material=STEEL, mode_count=8, inner=0.0):
    """One uniform section, stations 0 and 1 at its ends."""
    section = Section(length, diameter, material, inner_diameter=inner, elements=elements)
    return Rotor((section,), OperatingRange(100.0, 200.0), disks=tuple(disks),
                 bearings=tuple(bearings), settings=Settings(beam_theory=theory, mode_count=mode_count))


def disk_at_mid_span(disk_mass, bearings, *, span=1.0, diameter=0.05, elements=2,
                     material=LIGHT, operating=ANY_RANGE, **settings):
    """A Jeffcott rotor: two equal halves of a shaft (stations 0, 1, 2) with a point-mass
    disk at station 1; Euler-Bernoulli beams unless ``settings`` says otherwise."""
    half = Section(span / 2, diameter, material, elements=elements)
    settings.setdefault("beam_theory", "euler-bernoulli")
    return Rotor((half, half), operating, disks=(Disk(1, disk_mass, 0.0, 0.0),),
                 bearings=tuple(bearings), settings=Settings(**settings))


def compressor_without_gas():
    """The bundled compressor as it was before it gained its stage cross-coupling (its
    sources and screen rule left out): the rotor the verdict tests were written on."""
    import dataclasses

    from rotorcalc.reader import read_rotor
    rotor = read_rotor(ROOT / "cases" / "compressor.toml")
    return dataclasses.replace(rotor, sources=(), coupling_rule=None)


def pytest_collection_modifyitems(config, items):
    """On several processes (``-n 2 --dist loadgroup``, the README's command) a file's tests
    share one process, as its module-level caches expect, unless a test names its own group
    (the report tests group by case)."""
    for item in items:
        if item.get_closest_marker("xdist_group") is None:
            item.add_marker(pytest.mark.xdist_group(item.module.__name__))


def isotropic(station, k, c=0.0, name=""):
    return Bearing(station, {"kxx": (k,), "kyy": (k,), "cxx": (c,), "cyy": (c,)}, name=name)


@pytest.fixture
def steel():
    return STEEL
