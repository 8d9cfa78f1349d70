"""Shared fixtures: small rotors built directly from the model classes."""

import os

for _var in ("OPENBLAS_NUM_THREADS", "OMP_NUM_THREADS", "MKL_NUM_THREADS"):
    os.environ.setdefault(_var, "1")  # see rotorcalc/cli/__init__.py

from pathlib import Path  # noqa: E402

import pytest

from rotorcalc.model import (Bearing, Material, OperatingRange, Rotor, Section,
                             Settings)

ROOT = Path(__file__).resolve().parents[1]
CASES = sorted(p for p in (ROOT / "cases").glob("*.toml") if not p.stem.endswith("_variants"))

STEEL = Material("steel", 2.11e11, 2.11e11 / 2.6, 7810.0)


def uniform_shaft(length=1.0, diameter=0.05, elements=20, bearings=(), disks=(),
                  theory="timoshenko", material=STEEL, mode_count=8, inner=0.0):
    """One uniform section, stations 0 and 1 at its ends."""
    section = Section(length, diameter, material, inner_diameter=inner, elements=elements)
    return Rotor((section,), OperatingRange(100.0, 200.0), disks=tuple(disks),
                 bearings=tuple(bearings), settings=Settings(beam_theory=theory, mode_count=mode_count))


def isotropic(station, k, c=0.0, name=""):
    return Bearing(station, {"kxx": (k,), "kyy": (k,), "cxx": (c,), "cyy": (c,)}, name=name)


@pytest.fixture
def steel():
    return STEEL
