"""A fixed-geometry fluid-film journal bearing as the rotor file describes it.

:class:`FilmJournal` holds the bore's recipe (plain, two-lobe or offset halves, with
its diameter, length, clearance, preload and grooves), the oil and the thermal
rule, and answers one question through :meth:`FilmJournal.coefficients`: the eight
coefficients at a speed and a static load.  Every bearing model offers that one
method (``coefficients(speed, load, *, whirl=None)``; the tables of
:mod:`rotorcalc.bearings.table` are the first model; the tilting-pad bearing of
:mod:`rotorcalc.bearings.tilting_pad` is one more).

Effective film temperature (docs/bearings.md, "Lubricant"): a given
``film_temperature`` is used as it is; otherwise the isoviscous film sits at::

    T = T_inlet + share x P / (rho c_p Q)

with ``P`` the power loss and ``Q`` the side leakage at the equilibrium found with
the viscosity at ``T`` itself (all the heat carried off by the oil: an upper
estimate of the rise).  ``T`` is found by regula falsi between the inlet
temperature and the rise computed at it (hotter oil carries less power, so the
rise falls with ``T`` and the root is unique).

Screening only: confirm bearing data against the maker's analysis, the applicable
standard, the purchase specification, local codes and a licensed engineer's review.
"""

from __future__ import annotations

import dataclasses
import math
from dataclasses import dataclass, field

from ..errors import InputError
from ..notices import Notice
from .equilibrium import find_equilibrium
from .film import FilmOptions
from .fixed_film import coefficients as film_coefficients
from .geometry import MAX_CLEARANCE_RATIO, elliptical_bore, offset_halves_bore, plain_bore
from .lubricant import Lubricant

#: Bore shapes a file may name.
BORES = ("plain", "two-lobe", "offset-halves")
#: Film grid of a bearing in a rotor model: within about 1 % of the 120 x 20 grid
#: on the bundled cases' bearings (tests/verification/test_film_in_model.py) at a
#: quarter of its cost.
MODEL_GRID = FilmOptions(n_theta=72, n_z=12)
#: Film temperature accepted by the heat balance, K (regula falsi stops within it).
TEMPERATURE_TOLERANCE = 0.1
#: Hottest effective film (K) before a note says the isoviscous model is stretched.
HOT_FILM = 273.15 + 120.0


def thermal_notes(temperature, speed, settled):
    """Notes on a film temperature (K) at ``speed`` (rad/s): a heat balance that did not
    settle, and a film too hot for an isoviscous model."""
    notes = ()
    if not settled:
        notes += (Notice(f"the film temperature's heat balance did not settle within "
                         f"{TEMPERATURE_TOLERANCE} K at {speed * 30 / math.pi:.0f} rpm: "
                         f"{temperature - 273.15:.1f} degC is its best estimate",
                         code="note"),)
    if temperature > HOT_FILM:
        notes += (Notice(f"effective film temperature {temperature - 273.15:.0f} degC "
                         f"at {speed * 30 / math.pi:.0f} rpm: above "
                         f"{HOT_FILM - 273.15:.0f} degC an isoviscous film is a rough "
                         "model (check the oil flow and the maker's thermal analysis)",
                         code="note"),)
    return notes


@dataclass(frozen=True)
class FilmJournal:
    """A plain or lobed journal bearing from its geometry and oil.

    Parameters
    ----------
    bore : str
        One of :data:`BORES`.
    diameter, length : float
        Journal diameter and land length (m).
    clearance : float
        Radial clearance (m); for a lobed bore the machined clearance ``C_p`` of each
        lobe (the assembled one is ``(1 - preload) C_p``).
    lubricant : Lubricant
    inlet_temperature : float
        Oil supply temperature (K).
    preload : float
        Lobed bores only, ``0 <= m < 1``.
    groove_width : float
        Lobed bores: width of the two split-line grooves (rad).
    grooves : tuple
        Plain bores: ``(position, width)`` pairs (rad) of axial feed grooves; none
        gives a full 360-degree film.
    feed_pressure : float
        Gauge pressure in the grooves (Pa).
    film_temperature : float, optional
        A given effective film temperature (K) instead of the heat balance.
    rise_share : float
        Share of the oil's temperature rise added to the inlet (0 to 1, 0.8 default).
    options : FilmOptions
        Film grid and cavitation model.
    clearance_range, preload_range, inlet_range : tuple
        The tolerances, ``(low, high)`` (m, -, K) around the nominal values, or empty:
        the corners a tolerance envelope screens (:mod:`rotorcalc.analysis.envelope`).
    """

    bore: str
    diameter: float
    length: float
    clearance: float
    lubricant: Lubricant
    inlet_temperature: float
    preload: float = 0.0
    groove_width: float = math.radians(20.0)
    grooves: tuple = ()
    feed_pressure: float = 0.0
    film_temperature: float | None = None
    rise_share: float = 0.8
    options: FilmOptions = MODEL_GRID
    clearance_range: tuple = ()
    preload_range: tuple = ()
    inlet_range: tuple = ()
    key: str = "film"
    oil_key: str = "oil"
    geometry: object = field(init=False, repr=False, compare=False)

    def __post_init__(self):
        k = self.key
        if self.bore not in BORES:
            raise InputError(f"{k}.bore", "is not a known bore", value=self.bore,
                             expected=" or ".join(BORES), kind="choice")
        object.__setattr__(self, "grooves", tuple(tuple(g) for g in self.grooves))
        self._check_sizes()
        if self.bore == "plain":
            if self.preload:
                raise InputError(f"{k}.preload", "is given for a plain bore", value=self.preload,
                                 expected="no preload (a plain bore has none), or bore = "
                                          "'two-lobe' or 'offset-halves'", kind="choice")
            geometry = plain_bore(self.diameter, self.length, self.clearance, self.grooves,
                                  self.feed_pressure, key=k)
        else:
            if self.grooves:
                raise InputError(f"{k}.grooves", "are given for a lobed bore",
                                 expected="groove_width (the two split-line grooves)",
                                 kind="choice")
            build = elliptical_bore if self.bore == "two-lobe" else offset_halves_bore
            geometry = build(self.diameter, self.length, self.clearance, self.preload,
                             self.groove_width, self.feed_pressure, key=k)
        object.__setattr__(self, "geometry", geometry)
        for name in ("inlet_temperature", "film_temperature"):
            value = getattr(self, name)
            if value is not None and not (math.isfinite(value) and value > 0.0):
                raise InputError(f"{self.oil_key}.{name}", "must be a temperature above "
                                 "absolute zero", value=value,
                                 expected='a temperature such as "50 degC"', kind="range")
        if not 0.0 <= self.rise_share <= 1.0:
            raise InputError(f"{self.oil_key}.rise_share", "is out of range",
                             value=self.rise_share, expected="a number from 0 to 1",
                             kind="range")
        for name, where in (("clearance", k), ("preload", k), ("inlet", self.oil_key)):
            self._check_range(name, where)

    def _check_range(self, name, where):
        """A tolerance range: two values, low below high (the reader checks that the file's
        nominal value lies between them; a what-if may move it out)."""
        field_name = f"{name}_range"
        key = f"{where}.{'inlet_temperature' if name == 'inlet' else name}_range"
        values = tuple(getattr(self, field_name))
        object.__setattr__(self, field_name, values)
        if not values:
            return
        if len(values) != 2 or not all(isinstance(v, (int, float)) and math.isfinite(v)
                                       for v in values):
            raise InputError(key, "must be two values, low and high", value=values,
                             expected="[low, high] with their units", kind="type")
        low, high = values
        if not low < high:
            raise InputError(key, "has its low end not below its high end", value=values,
                             expected="[low, high], low < high", kind="order")

    def _check_sizes(self):
        """The inputs the file names, checked under the file's own keys (the geometry
        checks them again under its own)."""
        k = self.key
        for name in ("diameter", "length", "clearance"):
            value = getattr(self, name)
            if isinstance(value, bool) or not isinstance(value, (int, float)) or \
                    not math.isfinite(value) or value <= 0.0:
                raise InputError(f"{k}.{name}", "must be a positive length", value=value,
                                 expected='a length with its unit, such as "75 mm"',
                                 kind="range")
        if self.clearance > MAX_CLEARANCE_RATIO * self.diameter / 2.0:
            raise InputError(f"{k}.clearance", "is too large for a thin film",
                             value=self.clearance, expected=f"at most {MAX_CLEARANCE_RATIO:g} of the journal radius "
                                      "(typically 0.001 to 0.003 of it)", kind="range")
        if not (isinstance(self.preload, (int, float)) and 0.0 <= self.preload < 1.0):
            raise InputError(f"{k}.preload", "is out of range", value=self.preload,
                             expected="a preload m from 0 to below 1 (0.3 to 0.6 is usual "
                                      "for lobed bores, common practice)", kind="range")

    def changed(self, **values) -> "FilmJournal":
        """A copy with some inputs changed (validated again)."""
        return dataclasses.replace(self, **values)

    def viscosity(self, temperature):
        """Dynamic viscosity (Pa s) at ``temperature`` (K)."""
        return float(self.lubricant.dynamic_viscosity(temperature))

    def coefficients(self, speed, load, *, whirl=None, start=None, check_step=True,
                     temperature=None):
        """The eight coefficients at ``speed`` (rad/s) under ``load`` (N, on the journal).

        ``whirl`` is accepted for the common interface and not used: a fixed-geometry film
        without fluid inertia gives the same coefficients at every whirl frequency.

        Returns
        -------
        FilmCoefficients
            With the effective film ``temperature`` (K) and, among its warnings, a
            note when that temperature is high for an isoviscous model.

        Other parameters
        ----------------
        start : pair of float
            A journal position (m) to start the equilibrium search from.
        check_step : bool
            Check the perturbation step by halving it (see :func:`coefficients`).
        temperature : float
            A first guess of the film temperature (K), say the neighbouring speed's.
        """
        temperature, eq, settled = self._film_state(speed, load, start, temperature)
        result = film_coefficients(self.geometry, speed, load, self.viscosity(temperature),
                                   options=self.options, check_step=check_step,
                                   equilibrium=eq)
        notes = result.warnings + thermal_notes(temperature, speed, settled)
        return dataclasses.replace(result, temperature=temperature, warnings=notes)

    @staticmethod
    def _start_of(equilibrium):
        """What the next equilibrium search starts from: the journal position (a model
        whose search takes more, such as the pads' tilts, gives it more)."""
        return equilibrium.position

    def _equilibrium(self, speed, load, temperature, start):
        return find_equilibrium(self.geometry, speed, load, self.viscosity(temperature),
                                options=self.options, start=start)

    def _film_state(self, speed, load, start, guess=None):
        """(effective temperature, equilibrium there, settled?): the root of the decreasing
        ``g(T) = T_inlet + share x rise(T) - T`` by secant steps kept inside the bracket
        (``g(T_inlet) >= 0`` always)."""
        if self.film_temperature is not None:
            t = self.film_temperature
            return t, self._equilibrium(speed, load, t, start), True
        inlet, share = self.inlet_temperature, self.rise_share
        found = {}

        def excess(t):
            near = start if not found else self._start_of(
                found[min(found, key=lambda s: abs(s - t))])
            eq = found[t] = self._equilibrium(speed, load, t, near)
            rise = self.lubricant.temperature_rise(eq.power_loss, max(eq.side_leakage, 1e-12),
                                                   inlet)
            return inlet + share * rise - t

        low, high = inlet, math.inf
        t = inlet if guess is None or not guess > inlet else float(guess)
        previous = None
        for _ in range(40):
            g = excess(t)
            if abs(g) <= TEMPERATURE_TOLERANCE:
                return t, found[t], True
            low, high = (max(low, t), high) if g > 0.0 else (low, min(high, t))
            step = t + g
            if previous is not None and g != previous[1]:
                step = t - g * (t - previous[0]) / (g - previous[1])
            if not low < step < high:
                step = 0.5 * (low + high) if math.isfinite(high) else t + g
            previous, t = (t, g), step
            if high - low <= TEMPERATURE_TOLERANCE:
                best = min(found, key=lambda s: abs(s - t))
                return best, found[best], True     # bracketed within the tolerance
        best = min(found, key=lambda s: abs(s - t))
        return best, found[best], False
