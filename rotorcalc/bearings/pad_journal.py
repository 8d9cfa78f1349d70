"""A tilting-pad journal bearing as the rotor file describes it: the pads and the oil, behind
the bearing models' one interface, ``coefficients(speed, load, *, whirl=None)``.

The pads are solved by :mod:`rotorcalc.bearings.tilting_pad`.  Each pad runs at its own
effective film temperature (isoviscous along the pad), from its own heat balance::

    T_k = T_inlet + share P_k / (rho c_p Q_k)

``P_k`` the pad's power loss, ``Q_k`` the oil it draws in across its leading edge (the
share of the heat the oil carries away, ``rise_share``, lumps what the pad, the journal and
the housing conduct).  ``T_inlet`` is each pad's own inlet temperature: the supply
temperature ``T_s``, raised by hot oil carried over from the pad upstream (``carry_over``
``lambda``, 0 by default: every pad takes in oil at the supply temperature)::

    T_inlet,k - T_s = lambda (T_out,k-1 - T_s),   T_out,k-1 = T_inlet,k-1 + P_k-1 / (rho c_p Q_k-1)

around the ring (pad ``k - 1`` upstream at positive speed, ``k + 1`` at negative speed): a
cyclic linear system in the inlet temperatures, solved directly at each step.
A loaded pad shears a thinner film and runs hotter than an unloaded one, so its oil is
thinner: the viscosities move the load among the pads.  The temperatures are a fixed point
of all pads together: each step solves the bearing once at the pads' temperatures and moves
each pad's by a secant step on its own ``g_k(T) = T_inlet,k + share P_k / (rho c_p Q_k) - T_k``
kept inside that pad's bracket (``g_k(T_s) >= 0``); it stops when every ``|g_k|`` is within
:data:`TEMPERATURE_TOLERANCE` (0.1 K).  A given ``film_temperature`` holds every pad there.
Screening only: confirm tilting-pad coefficients against the bearing maker's analysis, the
applicable standard, the purchase specification, local codes and a licensed engineer's review.
"""

from __future__ import annotations

import dataclasses
import math
from dataclasses import dataclass

import numpy as np

from ..errors import InputError
from .film import FilmOptions
from .journal import TEMPERATURE_TOLERANCE, FilmJournal, thermal_notes
from .lubricant import Lubricant
from .pad_ring import PadRing
from .pad_settle import _check_ring, pad_equilibrium
from .tilting_pad import pad_coefficients


#: Film grid of each pad in a rotor model: within 0.7 % of 72 x 12 per pad on a 5-pad,
#: 60-degree bearing (measured), at about 60 % of its cost.
PAD_GRID = FilmOptions(n_theta=36, n_z=8)
#: The pad ring's inputs a what-if may change.
RING_CHANGES = ("diameter", "length", "clearance", "preload")


@dataclass(frozen=True)
class PadJournal:
    """A tilting-pad journal bearing with its oil: the bearing model (see FilmJournal).

    Parameters
    ----------
    pads : PadRing
    lubricant : Lubricant
    inlet_temperature : float
        Oil supply temperature (K).
    film_temperature : float, optional
        A given effective film temperature (K) instead of the heat balance.
    rise_share : float
        Share of each pad's oil temperature rise added to the inlet (0 to 1): each pad's
        effective temperature (module docstring).
    options : FilmOptions
        Film grid of each pad (:data:`PAD_GRID` by default: a pad is a sixth of a turn,
        so 36 steps along it are finer than a fixed bore's 72 around).
    carry_over : float
        Hot-oil carry-over ``lambda`` (0 to 1): the share of the pad upstream's outlet
        temperature rise that a pad's inlet oil keeps (module docstring); 0 by default.
    clearance_range, preload_range, inlet_range : tuple
        Tolerances ``(low, high)`` of the pad clearance, the preload and the oil inlet
        temperature, or empty (the tolerance envelope's corners).
    """

    pads: PadRing
    lubricant: Lubricant
    inlet_temperature: float
    film_temperature: float | None = None
    rise_share: float = 0.8
    options: FilmOptions = None
    oil_key: str = "oil"
    clearance_range: tuple = ()
    preload_range: tuple = ()
    inlet_range: tuple = ()
    key: str = "film"
    carry_over: float = 0.0

    #: The bore's name, as FilmJournal's ``bore`` (what a rotor file writes).
    bore = "tilting-pad"

    @property
    def diameter(self):
        return self.pads.diameter

    @property
    def length(self):
        return self.pads.length

    @property
    def clearance(self):
        return self.pads.clearance

    @property
    def preload(self):
        return self.pads.preload

    def __post_init__(self):
        if self.options is None:
            object.__setattr__(self, "options", PAD_GRID)
        _check_ring(self.pads, self.options)
        for name, where in (("clearance", self.key), ("preload", self.key),
                            ("inlet", self.oil_key)):
            FilmJournal._check_range(self, name, where)
        for name in ("inlet_temperature", "film_temperature"):
            value = getattr(self, name)
            if value is not None and not (isinstance(value, (int, float)) and
                                          math.isfinite(value) and value > 0.0):
                raise InputError(f"{self.oil_key}.{name}", "must be a temperature above "
                                 "absolute zero", value=value, expected="a temperature in K",
                                 kind="range")
        if not (isinstance(self.rise_share, (int, float)) and 0.0 <= self.rise_share <= 1.0):
            raise InputError(f"{self.oil_key}.rise_share", "is out of range",
                             value=self.rise_share, expected="a number from 0 to 1", kind="range")
        if not (isinstance(self.carry_over, (int, float)) and not isinstance(
                self.carry_over, bool) and 0.0 <= self.carry_over < 1.0):
            raise InputError(f"{self.key}.carry_over", "is out of range",
                             value=self.carry_over, expected="a share from 0 (fresh oil at "
                             "every pad) up to, not including, 1", kind="range")

    def changed(self, **values) -> "PadJournal":
        """A copy with some inputs changed (validated again): the pads' ``diameter``,
        ``length``, ``clearance``, ``preload`` (the bearing clearance follows) or the
        model's own fields."""
        ring = {k: values.pop(k) for k in list(values) if k in RING_CHANGES}
        for name in values:
            if name not in {f.name for f in dataclasses.fields(self)}:
                raise InputError(f"{self.key}.{name}", "does not apply to a tilting-pad "
                                 "bearing", value=values[name],
                                 expected="diameter, length, clearance or preload",
                                 kind="unknown-key")
        if ring:
            ring.setdefault("preload", self.pads.preload)
            values["pads"] = dataclasses.replace(self.pads, bearing_clearance=None, **ring)
        return dataclasses.replace(self, **values)

    def viscosity(self, temperature):
        """Dynamic viscosity (Pa s) at ``temperature`` (K; one, or one per pad)."""
        mu = np.asarray(self.lubricant.dynamic_viscosity(temperature), dtype=float)
        return float(mu) if mu.ndim == 0 else mu

    def _equilibrium(self, speed, load, temperature, start):
        return pad_equilibrium(self.pads, speed, load, self.viscosity(temperature),
                               options=self.options, start=start)

    def _rises(self, equilibrium):
        """Each pad's oil temperature rise ``P_k / (rho c_p Q_k)`` (K); none where a pad
        carries no film."""
        inlet = self.inlet_temperature
        return np.array([self.lubricant.temperature_rise(f.power_loss, f.inflow, inlet)
                         if f.power_loss > 0.0 and f.inflow > 0.0 else 0.0
                         for f in equilibrium.films])

    def _inlets(self, rises, speed):
        """Each pad's inlet temperature above the supply (K) with hot-oil carry-over: the
        cyclic system ``u_k = lambda (u_up + r_up)`` (module docstring), solved."""
        n, lam = len(rises), self.carry_over
        if lam == 0.0:
            return np.zeros(n)
        upstream = np.roll(np.eye(n), 1 if speed >= 0.0 else -1, axis=0)   # row k: pad k-+1
        return np.linalg.solve(np.eye(n) - lam * upstream, lam * upstream @ rises)

    def _film_state(self, speed, load, start, guess=None):
        """(pad temperatures K, equilibrium there, settled?): module docstring."""
        n = self.pads.count
        if self.film_temperature is not None:
            t = np.full(n, float(self.film_temperature))
            return t, self._equilibrium(speed, load, t, start), True
        inlet, share = self.inlet_temperature, self.rise_share
        t = np.full(n, inlet) if guess is None else np.maximum(
            np.broadcast_to(np.asarray(guess, dtype=float), (n,)), inlet)
        low, high, previous, best = np.full(n, inlet), np.full(n, np.inf), None, None
        for _ in range(40):
            eq = start = self._equilibrium(speed, load, t, start)
            rises = self._rises(eq)
            g = inlet + self._inlets(rises, speed) + share * rises - t
            if best is None or np.max(np.abs(g)) < best[0]:
                best = (float(np.max(np.abs(g))), t, eq)
            low, high = np.where(g > 0.0, np.maximum(low, t), low), \
                np.where(g < 0.0, np.minimum(high, t), high)
            if np.all((np.abs(g) <= TEMPERATURE_TOLERANCE) | (high - low <= TEMPERATURE_TOLERANCE)):
                return t, eq, True
            step = t + g
            if previous is not None:
                dg = g - previous[1]
                secant = dg != 0.0
                step = np.where(secant, t - g * (t - previous[0]) / np.where(secant, dg, 1.0),
                                step)
            inside = (low < step) & (step < high)
            step = np.where(inside, step, np.where(np.isfinite(high), 0.5 * (low + high), t + g))
            previous, t = (t, g), step
        return best[1], best[2], False

    @staticmethod
    def _start_of(equilibrium):
        """The whole equilibrium (journal, tilts, lifts) starts the next search."""
        return equilibrium

    def coefficients(self, speed, load, *, whirl=None, start=None, check_step=True,
                     temperature=None):
        """Reduced coefficients at ``speed`` under ``load``, at the effective film temperature.

        Parameters
        ----------
        speed : float
            rad/s.
        load : pair of float
            ``(Wx, Wy)`` (N) on the journal.
        whirl : float, optional
            Whirl frequency of the reduction (rad/s); synchronous when None.
        start : PadEquilibrium or pair of float, optional
            Where the equilibrium search starts.
        check_step : bool
            Check the perturbation step by halving it.
        temperature : float or sequence of float, optional
            A first guess of the film temperature (K; one for all pads or one per pad).

        Returns
        -------
        PadCoefficients
            With its ``pad_temperatures`` and ``temperature`` (the hottest pad's, K) and,
            among its warnings, notes on the heat balance and on a hot film.
        """
        temperatures, eq, settled = self._film_state(speed, load, start, temperature)
        result = pad_coefficients(self.pads, speed, load, self.viscosity(temperatures),
                                  whirl=whirl, options=self.options, check_step=check_step,
                                  equilibrium=eq)
        hottest = float(np.max(temperatures))
        notes = result.warnings + thermal_notes(hottest, speed, settled)
        return dataclasses.replace(result, temperature=hottest, warnings=notes,
                                   pad_temperatures=temperatures)
