"""Quantities at the edges: parse input text to SI floats, format SI for output.

The numeric core sees plain SI floats only (m, kg, s, N, rad/s).  Parsing is
done by pint, whose expression parser is a small grammar of its own (no Python
``eval``).  A bare number is taken as SI, except for a rotational speed: there
rpm, Hz and rad/s differ by factors of 6 to 60, so a speed needs its unit
everywhere (in the rotor file and on the command line); only 0 may stand bare.
A text read once is remembered between runs (:mod:`rotorcalc.quantity_memo`): pint is
imported only for a text not read before.
"""

from __future__ import annotations

import functools
import math
import re
from dataclasses import dataclass

from . import quantity_memo
from .errors import InputError


@functools.cache
def _import_pint():
    """pint, imported without dask: pint imports dask whenever it is installed (for arrays
    of quantities, which rotorcalc never makes), 0.17 s of every command on this machine.
    ``find_spec`` reports a module set to None in ``sys.modules`` as absent.  pint decides
    this once per process: a program that imports rotorcalc before pint and then wants
    pint's dask arrays should import dask first (then nothing is hidden)."""
    import sys
    hide = "dask" not in sys.modules
    if hide:
        sys.modules["dask"] = None
    try:
        import pint
    finally:
        if hide:
            del sys.modules["dask"]
    return pint


def _registry():
    """pint's registry, its parsed definitions kept between runs in the cache folder's
    ``units`` (:mod:`rotorcalc.cache`; a tenth of the time of parsing them, which every
    command paid); built afresh when the cache is off or cannot be used."""
    pint = _import_pint()
    from .cache import folder
    where = folder()
    if where is not None:
        try:
            return pint.UnitRegistry(autoconvert_offset_to_baseunit=True,
                                     cache_folder=where / "units")
        except Exception:       # a folder that cannot be written, a damaged file: parsed anew
            pass
    return pint.UnitRegistry(autoconvert_offset_to_baseunit=True)


@functools.cache
def _ureg():
    """The registry every text is read with, with the rotor files' own definitions; made on
    first use (a text not read before: :mod:`rotorcalc.quantity_memo`)."""
    registry = _registry()
    registry.define("cycles_per_minute = revolution / minute = cpm")
    registry.define("@alias revolution = rev")
    registry.define("@alias revolutions_per_minute = RPM")
    return registry


#: Angular speeds: pint takes Hz as 1/s, which would read "50 Hz" as 50 rad/s.
#: For a rotational speed or frequency, Hz means revolutions per second.
_HZ_NAMES = ("hertz",)
_ANGLE_NAMES = ("radian", "revolution", "cycles_per_minute", "degree", "turn")


@dataclass(frozen=True)
class Dimension:
    """A physical dimension an input value must have, with its SI unit.

    ``low`` and ``high`` bound the magnitude of a non-zero value (SI): wide
    enough for any machine and for the usual modelling devices (a nearly
    massless shaft, a very stiff pin), narrow enough that no float in the
    analysis overflows or underflows (docs/robustness.md lists them).
    """

    name: str
    si_unit: str
    examples: str
    low: float = 1e-30
    high: float = 1e30

    @property
    def dimensionality(self):
        return _ureg().Quantity(1.0, self.si_unit).dimensionality


LENGTH = Dimension("length", "m", '"80 mm", "3.5 in"', 1e-6, 1e3)          # 1 um to 1 km
MASS = Dimension("mass", "kg", '"12 kg", "26 lb"', 1e-6, 1e7)
INERTIA = Dimension("mass moment of inertia", "kg*m**2", '"0.8 kg*m^2", "2700 lb*in^2"',
                    1e-12, 1e8)
# the stiffness that loses the digits that matter is decided by the eigen-solve's own
# error estimate (docs/theory.md); this range only keeps the arithmetic finite
STIFFNESS = Dimension("stiffness", "N/m", '"1.2e8 N/m", "650 klbf/in"', 1e-6, 1e16)
DAMPING = Dimension("damping", "N*s/m", '"2.5e4 N*s/m", "120 lbf*s/in"', 1e-6, 1e12)
SPEED = Dimension("rotational speed", "rad/s", '"3600 rpm", "60 Hz", "377 rad/s"',
                  1e-3, 1e6 * 2.0 * math.pi / 60.0)                          # to 1e6 rpm
PRESSURE = Dimension("modulus", "Pa", '"211 GPa", "30e6 psi"', 1e5, 1e13)
POWER = Dimension("power", "W", '"1.2 MW", "1500 hp"', 1e-3, 1e10)
DENSITY = Dimension("density", "kg/m**3", '"7850 kg/m^3", "0.283 lb/in^3"', 1e-6, 1e6)
UNBALANCE = Dimension("unbalance", "kg*m", '"12 g*mm", "0.05 oz*in"', 1e-12, 1e3)
ANGLE = Dimension("angle", "rad", '"30 deg", "0.5 rad"', 1e-12, 1e4)
FORCE = Dimension("force", "N", '"2.5 kN", "500 lbf"', 1e-6, 1e9)
MOMENT = Dimension("moment", "N*m", '"150 N*m", "1200 lbf*in"', 1e-9, 1e9)
# a bare number is refused for a temperature (kelvin or Celsius would both be a guess)
TEMPERATURE = Dimension("temperature", "K", '"50 degC", "120 degF", "323 K"', 1.0, 1000.0)
KINEMATIC_VISCOSITY = Dimension("kinematic viscosity", "m**2/s", '"46 mm^2/s", "46 cSt"',
                                1e-7, 1e-1)
GAUGE_PRESSURE = Dimension("pressure", "Pa", '"0.15 MPa", "1.5 bar", "20 psi"', 1e-3, 1e9)

# the memo of texts read before keys them by dimension name: one name, one dimension
if len({d.name for d in globals().values() if isinstance(d, Dimension)}) != \
        sum(isinstance(d, Dimension) for d in globals().values()):
    raise RuntimeError("two dimensions share a name")

#: Longest text a quantity may be written with, and the largest power in a unit.
TEXT_LIMIT = 100
POWER_LIMIT = 4


def parse(value, dim: Dimension, key: str) -> float:
    """Return ``value`` as an SI float of dimension ``dim``.

    Parameters
    ----------
    value : float, int or str
        A bare number (taken as SI) or text with a unit, e.g. ``"80 mm"``.
    dim : Dimension
        The dimension the value must have.
    key : str
        Key path used in the error message.

    Raises
    ------
    InputError
        When the text is not a quantity, has the wrong dimension, or is not finite.
    """
    article = "an" if dim.name[0] in "aeiou" else "a"
    expected = (f"{article} {dim.name}: a number in {dim.si_unit} or text with a unit such as "
                f"{dim.examples}")
    if isinstance(value, bool):
        raise InputError(key, "is a true/false value, not a number", value=value,
                         expected=expected, kind="type")
    new = False
    if isinstance(value, (int, float)):
        number = float(value)
        if dim is SPEED and number != 0.0:
            raise _bare_speed(key, value)
        if dim is TEMPERATURE:
            raise _bare_temperature(key, value)
    elif isinstance(value, str):
        number, new = _parse_text(value, dim, key, expected)
    else:
        raise InputError(key, f"has the wrong type ({type(value).__name__})",
                         value=value, expected=expected, kind="type")
    if not math.isfinite(number):
        raise InputError(key, "is not a finite number", value=value,
                         expected=expected, kind="not-finite")
    if dim is SPEED and number < 0:
        raise InputError(key, "is a negative speed", value=value,
                         expected="a speed of 0 or more, with its unit", kind="range")
    if number != 0 and not dim.low <= abs(number) <= dim.high:
        raise InputError(key, f"is outside the range of any machine ({dim.low:g} to "
                         f"{dim.high:g} {dim.si_unit})", value=value,
                         expected=f"{article} {dim.name} inside that range", kind="range")
    if new:             # read by pint and accepted by every check here: kept for later runs
        quantity_memo.remember(value.strip(), dim.name, number)
    return number


_POWER = re.compile(r"(\*\*|\^)\s*\(?\s*([-+]?[0-9.eE]*)")


def _bounded(text, key, expected):
    """Refuse text that would cost unbounded work to evaluate: very long text, or
    powers that are large, fractional or chained ("9**9**9 mm" once hung)."""
    if len(text) > TEXT_LIMIT:
        raise InputError(key, f"is longer than {TEXT_LIMIT} characters", value=text[:40] + "...",
                         expected=expected, kind="size")
    powers = _POWER.findall(text)
    for _, exponent in powers:
        try:
            ok = float(exponent) == int(float(exponent)) and abs(float(exponent)) <= POWER_LIMIT
        except ValueError:
            ok = False
        if not ok:
            raise InputError(key, f"has a power other than a whole number up to {POWER_LIMIT}",
                             value=text, expected=expected, kind="unit")
    if re.search(r"(\*\*|\^)[^*^]*(\*\*|\^)\s*[-+]?[0-9]", text) and \
            re.search(r"[0-9)]\s*(\*\*|\^)[^a-zA-Z]*(\*\*|\^)", text):
        raise InputError(key, "has chained powers", value=text, expected=expected, kind="unit")


def _parse_text(text, dim, key, expected):
    """(SI value, read by pint now) of ``text``: remembered from an earlier run, else by pint."""
    if not text.strip():
        raise InputError(key, "is empty", value=text, expected=expected, kind="missing")
    _bounded(text, key, expected)
    known = quantity_memo.recall(text.strip(), dim.name)
    if known is not None:
        return known, False
    try:
        quantity = _ureg().Quantity(text.strip())
    except Exception as exc:  # pint raises a zoo of parser errors
        raise InputError(key, f"cannot be read as a quantity ({type(exc).__name__})",
                         value=text, expected=expected, kind="unit") from None
    try:
        number = _to_si(quantity, dim, key, text, expected)
    except InputError:
        raise
    except Exception as exc:  # overflow of huge numbers and the like
        raise InputError(key, f"cannot be converted ({type(exc).__name__})", value=text,
                         expected=expected, kind="unit") from None
    return number, True


def _bare_speed(key, value):
    return InputError(key, "needs a unit: a bare number is not taken as any speed unit",
                      value=value,
                      expected='a speed with its unit, such as "3000 rpm", "50 Hz" or '
                               '"314 rad/s" (only 0 may be written without one)', kind="unit")


def _bare_temperature(key, value):
    return InputError(key, "needs a unit: a bare number could be kelvin or Celsius",
                      value=value, expected='a temperature with its unit, such as "50 degC", '
                      '"120 degF" or "323 K"', kind="unit")


def _to_si(quantity, dim, key, text, expected):
    ureg = _ureg()
    if not isinstance(quantity, ureg.Quantity):
        number = float(quantity)  # plain number written as text: SI
        if dim is SPEED and number != 0.0:
            raise _bare_speed(key, text)
        if dim is TEMPERATURE:
            raise _bare_temperature(key, text)
        return number
    if str(quantity.units) == "dimensionless":   # a plain number: SI (speeds excepted)
        if dim is SPEED and quantity.magnitude != 0:
            raise _bare_speed(key, text)
        if dim is TEMPERATURE:
            raise _bare_temperature(key, text)
        return float(quantity.magnitude)
    if quantity.dimensionless and dim is not ANGLE:
        # "50 percent", "500 mm/m", "500000 ppm": a ratio, not a length or a speed
        raise InputError(key, f"has a dimensionless unit ({quantity.units}), not a unit of "
                         f"{dim.name}", value=text, expected=expected, kind="unit")
    if dim is SPEED and quantity.dimensionality == dim.dimensionality:
        names = str(quantity.units)
        has_angle = any(name in names for name in _ANGLE_NAMES)
        if any(name in names for name in _HZ_NAMES) and not has_angle:
            quantity = quantity * ureg.Quantity(2.0 * math.pi, "rad")   # Hz: rev/s
        elif not has_angle:
            # "50 /s" or "50 cps" (pint: counts per second) would silently lose 2 pi
            raise InputError(key, "has no angle or revolution in its unit", value=text,
                             expected=expected, kind="unit")
        # with an angle in the unit, Hz is 1/s: "150 rad*Hz" is 150 rad/s
    try:
        return float(quantity.to(dim.si_unit).magnitude)
    except _import_pint().DimensionalityError:
        article = "an" if dim.name[0] in "aeiou" else "a"
        raise InputError(key, f"has units of {quantity.dimensionality}, not {article} {dim.name}",
                         value=text, expected=expected, kind="unit") from None


RPM = 2.0 * math.pi / 60.0  # rad/s per rpm


def to_rpm(omega):
    """rad/s to rev/min (works on arrays)."""
    return omega / RPM


def to_hz(omega):
    """rad/s to Hz (works on arrays)."""
    return omega / (2.0 * math.pi)


def to_mm(length):
    """Millimetres from metres."""
    return length * 1e3
