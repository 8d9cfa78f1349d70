"""The oil of a fluid-film bearing: viscosity and density over temperature.

The film solver (:mod:`rotorcalc.bearings.film`) takes one dynamic viscosity in
Pa s; this module gives it from an oil described either by its ISO viscosity
grade or by two measured points, at an effective film temperature.

Viscosity against temperature, Walther's equation as in ASTM D341 (from memory)::

    log10(log10(nu + 0.7)) = A - B log10(T),    nu in mm^2/s, T in K

with ``A`` and ``B`` fitted through the two points.  The simple ``+ 0.7`` form
holds from about 2 mm^2/s upwards (ASTM D341 adds terms below that, from
memory); points below 2 mm^2/s are refused, and values computed far outside the
two points' temperatures are extrapolations.

Density falls linearly from its value at 15 degC::

    rho(T) = rho_15 (1 - alpha (T - 288.15 K))

and the dynamic viscosity is ``mu = nu rho`` (nu in m^2/s, so mu in Pa s).

Temperatures are in kelvin everywhere except :meth:`Lubricant.from_datasheet`,
whose arguments say they are in degrees Celsius and mm^2/s.

Screening only: use the oil supplier's data for a real oil, and confirm bearing
results against the applicable standard, the purchase specification, local
codes and a licensed engineer's review.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from ..errors import InputError
from .film import number

#: 0 degC in kelvin.
ZERO_CELSIUS = 273.15
#: The temperature of the reference density, 15 degC, in K.
DENSITY_REFERENCE = ZERO_CELSIUS + 15.0
#: The temperatures of the viscosity grade's two points, 40 and 100 degC, in K.
GRADE_LOW, GRADE_HIGH = ZERO_CELSIUS + 40.0, ZERO_CELSIUS + 100.0
#: The shift of Walther's equation, mm^2/s (ASTM D341, from memory).
WALTHER_SHIFT = 0.7
#: The lowest kinematic viscosity (mm^2/s) accepted at a given point: below it the
#: two-constant Walther form needs ASTM D341's extra terms (from memory).
LOWEST_POINT = 2.0
#: ISO viscosity grade -> kinematic viscosity at 100 degC (mm^2/s) of a mineral
#: oil of viscosity index about 95 to 100.  Typical values, from memory; give two
#: viscosity points for a real oil.  At 40 degC the viscosity is the grade itself.
TYPICAL_AT_100C = {22: 4.3, 32: 5.4, 46: 6.8, 68: 8.7, 100: 11.2, 150: 14.7, 220: 19.0,
                   320: 24.0, 460: 30.5}
#: mm^2/s in m^2/s.
MM2 = 1.0e-6


def _z(nu_mm2):
    """``log10(log10(nu + 0.7))`` of a viscosity in mm^2/s."""
    return np.log10(np.log10(nu_mm2 + WALTHER_SHIFT))


def _temperatures(key, value):
    """Kelvin temperatures as a float array (any shape), each finite and positive."""
    try:
        t = np.asarray(value, dtype=float)
    except (TypeError, ValueError):
        raise InputError(key, "must be a temperature or an array of them", value=value,
                         expected="numbers in K", kind="type") from None
    if not np.all(np.isfinite(t)):
        raise InputError(key, "is not finite", value=value, kind="not-finite")
    if not np.all(t > 0.0):
        raise InputError(key, "must be above absolute zero", value=value,
                         expected="temperatures in K, above 0", kind="range")
    return t


def _out(array):
    """A float for a scalar input, the array otherwise."""
    return float(array) if np.ndim(array) == 0 else array


def _at_least(key, value, low, *, strict=True, what="positive"):
    value = number(key, value)
    if value < low or (strict and value == low):
        raise InputError(key, f"must be {what}", value=value, expected=f"a {what} number",
                         kind="range")
    return value


@dataclass(frozen=True)
class Lubricant:
    """An oil: kinematic viscosity by Walther's equation, density, specific heat.

    Give either ``grade`` or ``points``, not both.

    Parameters
    ----------
    grade : int, optional
        ISO viscosity grade, one of :data:`TYPICAL_AT_100C` (22 to 460): the
        viscosity is the grade in mm^2/s at 40 degC and the typical value of the
        table at 100 degC (from memory; give two points for a real oil).
    points : tuple, optional
        Two ``(temperature, kinematic_viscosity)`` pairs, K and m^2/s, at distinct
        temperatures, the viscosity lower at the higher temperature and at least
        2 mm^2/s.  After construction it always holds the two points used,
        coolest first (from the grade when one was given).
    reference_density : float
        kg/m^3 at 15 degC; default 870 (common practice for a mineral oil).
    expansion : float
        1/K, the share by which the density falls per kelvin; default 6.5e-4
        (common practice, from memory).  Zero keeps the density constant.
    specific_heat : float
        J/(kg K); default 2000 (common practice).
    name : str
        A label for reports.
    key : str
        The key path of the inputs in error messages.

    Raises
    ------
    InputError
        With the key of the offending input (``lubricant.grade``,
        ``lubricant.points[1][0]`` ...).
    """

    grade: int | None = None
    points: tuple = ()
    reference_density: float = 870.0
    expansion: float = 6.5e-4
    specific_heat: float = 2000.0
    name: str = ""
    key: str = "lubricant"
    walther: tuple = field(init=False, repr=False, compare=False)

    def __post_init__(self):
        k = self.key
        if self.points is None:
            object.__setattr__(self, "points", ())
        try:
            given = len(self.points) > 0
        except TypeError:
            given = True                # not a sequence: the points check says so
        if self.grade is not None and given:
            raise InputError(f"{k}.points", "is given together with a grade", value=self.points,
                             expected="either a grade or two points", kind="conflict")
        if self.grade is None and not given:
            raise InputError(f"{k}.grade", "is missing, and so are the points",
                             expected="an ISO viscosity grade or two (temperature, "
                             "kinematic viscosity) points", kind="missing")
        if self.grade is not None:
            grade = self.grade
            if isinstance(grade, bool) or not isinstance(grade, (int, float, np.integer,
                                                                 np.floating)):
                raise InputError(f"{k}.grade", "must be a number", value=grade,
                                 expected="one of " + ", ".join(map(str, TYPICAL_AT_100C)),
                                 kind="type")
            if grade not in TYPICAL_AT_100C:
                raise InputError(f"{k}.grade", "is not a known ISO viscosity grade",
                                 value=grade,
                                 expected="one of " + ", ".join(map(str, TYPICAL_AT_100C)),
                                 kind="choice")
            object.__setattr__(self, "grade", int(grade))
            pts = ((GRADE_LOW, float(grade) * MM2), (GRADE_HIGH, TYPICAL_AT_100C[grade] * MM2))
        else:
            pts = self._check_points()
        object.__setattr__(self, "points", pts)
        (t1, nu1), (t2, nu2) = pts
        z1, z2 = _z(nu1 / MM2), _z(nu2 / MM2)
        b = (z1 - z2) / (math.log10(t2) - math.log10(t1))
        object.__setattr__(self, "walther", (float(z1 + b * math.log10(t1)), float(b)))
        object.__setattr__(self, "reference_density",
                           _at_least(f"{k}.reference_density", self.reference_density, 0.0))
        object.__setattr__(self, "expansion",
                           _at_least(f"{k}.expansion", self.expansion, 0.0, strict=False,
                                     what="zero or positive"))
        object.__setattr__(self, "specific_heat",
                           _at_least(f"{k}.specific_heat", self.specific_heat, 0.0))
        if not isinstance(self.name, str):
            raise InputError(f"{k}.name", "must be text", value=self.name, kind="type")

    def _check_points(self):
        k = f"{self.key}.points"
        try:
            items = tuple(self.points)
        except TypeError:
            items = None
        if items is None or len(items) != 2:
            raise InputError(k, "must hold two points", value=self.points,
                             expected="((T1, nu1), (T2, nu2)) in K and m^2/s", kind="length")
        pts = []
        for i, p in enumerate(items):
            try:
                pair = tuple(p)
            except TypeError:
                pair = None
            if pair is None or len(pair) != 2:
                raise InputError(f"{k}[{i}]", "must be a (temperature, kinematic viscosity) "
                                 "pair", value=p, expected="(K, m^2/s)", kind="length")
            t = _at_least(f"{k}[{i}][0]", pair[0], 0.0, what="positive (kelvin)")
            nu = _at_least(f"{k}[{i}][1]", pair[1], 0.0)
            if nu / MM2 < LOWEST_POINT:
                raise InputError(f"{k}[{i}][1]", "is below the range of the Walther form used",
                                 value=nu, expected=f"at least {LOWEST_POINT * MM2:g} m^2/s "
                                 f"({LOWEST_POINT:g} mm^2/s)", kind="range")
            pts.append((t, nu))
        pts.sort()
        (t1, nu1), (t2, nu2) = pts
        if t1 == t2:
            raise InputError(f"{k}[1][0]", "repeats the other point's temperature", value=t2,
                             expected="two distinct temperatures", kind="conflict")
        if not nu2 < nu1:
            raise InputError(f"{k}", "has a viscosity that does not fall as the temperature "
                             "rises", value=self.points,
                             expected="a lower viscosity at the higher temperature",
                             kind="physics")
        return tuple(pts)

    @classmethod
    def from_datasheet(cls, celsius_1, mm2_per_s_1, celsius_2, mm2_per_s_2, **kw):
        """A lubricant from two data-sheet points in degrees Celsius and mm^2/s (cSt).

        The other keywords go to :class:`Lubricant` (SI).
        """
        key = kw.get("key", "lubricant")
        t = [number(f"{key}.points[{i}][0]", c) + ZERO_CELSIUS
             for i, c in enumerate((celsius_1, celsius_2))]
        nu = [number(f"{key}.points[{i}][1]", v) * MM2
              for i, v in enumerate((mm2_per_s_1, mm2_per_s_2))]
        return cls(points=((t[0], nu[0]), (t[1], nu[1])), **kw)

    def kinematic_viscosity(self, temperature):
        """Kinematic viscosity, m^2/s, at ``temperature`` (K; a number or an array)."""
        t = _temperatures("temperature", temperature)
        a, b = self.walther
        nu_mm2 = 10.0 ** (10.0 ** (a - b * np.log10(t))) - WALTHER_SHIFT
        return _out(nu_mm2 * MM2)

    def density(self, temperature):
        """Density, kg/m^3, at ``temperature`` (K; a number or an array)."""
        t = _temperatures("temperature", temperature)
        rho = self.reference_density * (1.0 - self.expansion * (t - DENSITY_REFERENCE))
        if not np.all(rho > 0.0):
            raise InputError("temperature", "is so hot the linear density law gives no "
                             "density", value=temperature, expected="a lower temperature",
                             kind="range")
        return _out(rho)

    def dynamic_viscosity(self, temperature):
        """Dynamic viscosity ``mu = nu rho``, Pa s, at ``temperature`` (K; number or array):
        what :func:`rotorcalc.bearings.solve_film` takes."""
        return _out(np.asarray(self.kinematic_viscosity(temperature))
                    * np.asarray(self.density(temperature)))

    def temperature_rise(self, power_loss, flow, temperature):
        """Temperature rise of the oil, K, carrying away a power loss.

        Energy balance with all the heat carried off by the oil (none conducted
        into the journal, the housing or the surroundings, so an upper estimate)::

            rise = P / (rho c_p Q)

        Parameters
        ----------
        power_loss : float
            W, zero or positive (e.g. ``FilmSolution.power_loss``).
        flow : float
            m^3/s through the bearing, positive (e.g. the side leakage).
        temperature : float
            K, where the density is taken (the inlet temperature, say).
        """
        p = _at_least("power_loss", power_loss, 0.0, strict=False, what="zero or positive")
        q = _at_least("flow", flow, 0.0)
        t = number("temperature", temperature)
        return p / (self.density(t) * self.specific_heat * q)


def effective_temperature(inlet, rise, share=0.8):
    """The film's effective temperature, K: ``T_inlet + share * rise``.

    A common-practice rule (from memory): the isoviscous film is taken at the
    inlet temperature plus most of the oil's temperature rise (``share`` 0.8 by
    default; 0.5 would be the mean of inlet and outlet).  Where a film or pad
    temperature is known (measured, or given by the bearing maker), use it
    directly instead.

    Parameters
    ----------
    inlet : float
        K, the oil's supply temperature.
    rise : float
        K, zero or positive (e.g. :meth:`Lubricant.temperature_rise`).
    share : float
        From 0 to 1.
    """
    t = _at_least("effective_temperature.inlet", inlet, 0.0, what="positive (kelvin)")
    r = _at_least("effective_temperature.rise", rise, 0.0, strict=False,
                  what="zero or positive")
    s = number("effective_temperature.share", share)
    if not 0.0 <= s <= 1.0:
        raise InputError("effective_temperature.share", "is out of range", value=s,
                         expected="a number from 0 to 1", kind="range")
    return t + s * r
