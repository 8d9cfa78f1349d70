"""A tilting-pad journal bearing as the rotor file describes it: the pads and the oil, behind
the bearing models' one interface, ``coefficients(speed, load, *, whirl=None)``.

The pads are solved by :mod:`rotorcalc.bearings.tilting_pad`; the film temperature comes from
the heat balance of :class:`rotorcalc.bearings.FilmJournal` (one temperature for all pads).
Screening only: confirm tilting-pad coefficients against the bearing maker's analysis, the
applicable standard, the purchase specification, local codes and a licensed engineer's review.
"""

from __future__ import annotations

import dataclasses
import math
from dataclasses import dataclass

from ..errors import InputError
from .film import FilmOptions
from .journal import FilmJournal, thermal_notes
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
        Share of the oil's temperature rise added to the inlet (0 to 1); one effective
        temperature for all pads, from the heat balance of :class:`FilmJournal`.
    options : FilmOptions
        Film grid of each pad (:data:`PAD_GRID` by default: a pad is a sixth of a turn,
        so 36 steps along it are finer than a fixed bore's 72 around).
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
        """Dynamic viscosity (Pa s) at ``temperature`` (K)."""
        return float(self.lubricant.dynamic_viscosity(temperature))

    def _equilibrium(self, speed, load, temperature, start):
        return pad_equilibrium(self.pads, speed, load, self.viscosity(temperature),
                               options=self.options, start=start)

    #: The effective temperature, as FilmJournal finds it (the heat balance of all pads).
    _film_state = FilmJournal._film_state

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
        temperature : float, optional
            A first guess of the film temperature (K).

        Returns
        -------
        PadCoefficients
            With its ``temperature`` (K) and, among its warnings, notes on the heat
            balance and on a hot film.
        """
        temperature, eq, settled = self._film_state(speed, load, start, temperature)
        result = pad_coefficients(self.pads, speed, load, self.viscosity(temperature),
                                  whirl=whirl, options=self.options, check_step=check_step,
                                  equilibrium=eq)
        notes = result.warnings + thermal_notes(temperature, speed, settled)
        return dataclasses.replace(result, temperature=temperature, warnings=notes)
