"""A bearing's coefficients against speed, and for a bearing computed from its geometry its
film state too (load, eccentricity, attitude, minimum film, temperature, Sommerfeld number,
power loss, flow): what ``rotorcalc bearing`` prints and draws.

Nothing is computed here that the model does not hold already: a table bearing's values
are its table, a film bearing's are the grid :func:`rotorcalc.bearings.tabulate_films`
computed under the rotor's static loads (``Bearing.film_record``).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ..errors import InputError
from ..model import Rotor
from ..vocabulary import BearingRole

#: Coefficient names in the order of the rows' columns.
NAMES = ("kxx", "kxy", "kyx", "kyy", "cxx", "cxy", "cyx", "cyy")


@dataclass(frozen=True)
class BearingCurves:
    """One bearing's coefficients over speed.

    Attributes
    ----------
    name, role : str
    station : int
    source : str
        ``"geometry"`` (a film computed from its geometry) or ``"table"``.
    description : str
        The bore and oil of a film bearing, or what the table holds.
    speeds : ndarray
        rad/s: the table's speeds (a constant bearing: the operating range's ends; a
        bearing from its geometry: the speeds its film was solved at).
    stiffness, damping : ndarray (n, 2, 2)
        N/m and N s/m at each speed, as the analyses read them (for a bearing from its
        geometry its smoothed table; the raw solves are in ``record.coefficients``).
    record : FilmRecord or None
        The film state at each speed (geometry bearings only).
    operating : tuple
        (min, max) operating speed, rad/s, for the pictures' band.
    """

    name: str
    role: str
    station: int
    source: str
    description: str
    speeds: np.ndarray
    stiffness: np.ndarray
    damping: np.ndarray
    record: object = None
    operating: tuple = (0.0, 0.0)
    pads: object = None

    @property
    def pad_rows(self):
        """(pad, pivot angle rad, tilt rad, minimum film m, load N, film temperature K, power
        loss W, oil drawn in m^3/s) per pad of a tilting-pad bearing at :attr:`pads`' speed;
        empty otherwise."""
        p = self.pads
        if p is None:
            return []
        eq, state = p.state.equilibrium, p.state
        temperatures = state.pad_temperatures if state.pad_temperatures is not None else \
            [state.temperature] * len(eq.films)
        return [(k + 1, float(a), float(t), float(h), float(np.hypot(*f)), float(temp),
                 film.power_loss, film.inflow)
                for k, (a, t, h, f, temp, film) in enumerate(zip(
                    p.pivots, eq.tilts, eq.pad_min_thickness, eq.pad_forces, temperatures,
                    eq.films))]

    @property
    def whirl_rows(self):
        """(whirl frequency rad/s, kxx ... cyy) of a tilting-pad bearing reduced at each of
        :data:`WHIRL_RATIOS` times :attr:`pads`' speed; empty otherwise."""
        p = self.pads
        if p is None:
            return []
        out = []
        for ratio in WHIRL_RATIOS:
            k, c = p.state.reduce(ratio * p.speed)
            out.append((ratio * p.speed, *k.ravel().tolist(), *c.ravel().tolist()))
        return out

    @property
    def coefficient_rows(self):
        """(speed rad/s, kxx ... cyy) per speed."""
        values = np.concatenate([self.stiffness.reshape(-1, 4), self.damping.reshape(-1, 4)],
                                axis=1)
        return [(float(s), *map(float, v)) for s, v in zip(self.speeds, values)]

    @property
    def film_rows(self):
        """(speed rad/s, load N, eccentricity, attitude rad, min film m, film K,
        Sommerfeld, power W, flow m^3/s) per speed; empty for a table bearing."""
        r = self.record
        if r is None:
            return []
        return [tuple(float(v) for v in row) for row in zip(
            r.speeds, np.hypot(r.loads[:, 0], r.loads[:, 1]), r.eccentricity, r.attitude,
            r.min_thickness, r.temperature, r.sommerfeld, r.power_loss, r.flow)]

    @property
    def rows(self):
        """(name, speed, kxx ... cyy, load, eccentricity, attitude, min film, film
        temperature, Sommerfeld, power, flow) per speed, the film's part None for a table
        bearing: one row kind for several bearings in one file."""
        film = self.film_rows or [(None,) * 9] * len(self.speeds)
        return [(self.name, *c, *f[1:]) for c, f in zip(self.coefficient_rows, film)]

    def to_dict(self):
        out = {"name": self.name, "role": self.role, "station": self.station,
               "pads": None if self.pads is None else {
                   "speed_rad_per_s": self.pads.speed,
                   "pads": [dict(zip(("pad", "pivot_rad", "tilt_rad", "min_film_m", "load_n"),
                                     row)) for row in self.pad_rows],
                   "reduced_against_whirl": [dict(zip(("whirl_rad_per_s",) + NAMES, row))
                                             for row in self.whirl_rows]},
               "source": self.source, "description": self.description,
               "coefficients": [dict(zip(("speed_rad_per_s",) + NAMES, row))
                                for row in self.coefficient_rows]}
        if self.record is not None:
            out["film"] = self.record.to_dict()
        return out

    def plot(self, *, axes=None):
        """The four panels of :func:`rotorcalc.plotting.plot_bearing_coefficients`."""
        from ..plotting import plot_bearing_coefficients
        return plot_bearing_coefficients(self, axes=axes)


def bearing_curves(rotor: Rotor, which=None):
    """The :class:`BearingCurves` of the rotor's bearings and seals (sources left out).

    Parameters
    ----------
    which : str, optional
        A bearing's name: only that one.

    Raises
    ------
    InputError
        When no bearing has the name asked for.
    """
    chosen = [b for b in rotor.bearings if b.role != BearingRole.SOURCE
              and (which is None or b.name == which)]
    if not chosen:
        names = ", ".join(b.name for b in rotor.bearings) or "none"
        raise InputError("--name", "names no bearing of the rotor", value=which,
                         expected=f"one of: {names}", kind="unknown-key")
    op = (rotor.operating.min_speed, rotor.operating.max_speed)
    return tuple(_curves(b, op) for b in chosen)


def _curves(bearing, operating):
    if bearing.film_record is not None:
        speeds = np.array(bearing.film_record.speeds, dtype=float)
    else:
        speeds = np.array(bearing.speeds if len(bearing.speeds) >= 2 else
                          sorted({operating[0], operating[1]}), dtype=float)
    mats = [bearing.matrices(s) for s in speeds]
    stiffness = np.array([k for k, _ in mats])
    damping = np.array([c for _, c in mats])
    for array in (speeds, stiffness, damping):
        array.flags.writeable = False
    if bearing.film is not None:
        source, text = "geometry", describe_film(bearing.film)
    else:
        source = "table"
        text = ("coefficients over speed" if len(bearing.speeds) >= 2 else
                "constant coefficients") + (" and whirl frequency" if bearing.whirl else "")
    return BearingCurves(bearing.name, str(bearing.role), bearing.station, source, text,
                         speeds, stiffness, damping, bearing.film_record, operating,
                         _pad_detail(bearing, operating[1]))


@dataclass(frozen=True)
class PadDetail:
    """A tilting-pad bearing solved at one speed: its pads and its full linear set."""

    speed: float
    pivots: tuple
    state: object        # PadCoefficients


#: Whirl frequencies, as shares of the speed, at which ``rotorcalc bearing`` shows a
#: tilting-pad bearing's reduced coefficients.
WHIRL_RATIOS = (0.0, 0.25, 0.5, 0.75, 1.0, 1.5, 2.0)


def _pad_detail(bearing, speed):
    """The pads at ``speed`` (the maximum continuous) under the tabulated load there."""
    film, record = bearing.film, bearing.film_record
    if film is None or getattr(film, "bore", "") != "tilting-pad" or record is None:
        return None
    load = tuple(np.interp(speed, record.speeds, record.loads[:, j]) for j in range(2))
    temperature = float(np.interp(speed, record.speeds, record.temperature))
    state = film.coefficients(speed, load, check_step=False, temperature=temperature)
    return PadDetail(speed, tuple(float(a) for a in film.pads.pivots), state)


def describe_film(film):
    """One line: bore, size, clearance, preload, oil and its temperatures."""
    bore = {"plain": "plain bore", "two-lobe": "two-lobe bore",
            "offset-halves": "offset-halves bore", "tilting-pad": "tilting pads"}[film.bore]
    if film.bore == "tilting-pad":
        pads = film.pads
        bore = (f"{pads.count} {bore} of {math.degrees(pads.arc):.0f} deg, pivot at "
                f"{pads.pivot_offset:.2g} of the arc")
    text = (f"{bore}, D {film.diameter * 1e3:.4g} mm, L {film.length * 1e3:.4g} mm "
            f"(L/D {film.length / film.diameter:.3g}), "
            f"{'pad' if film.bore == 'tilting-pad' else 'radial'} clearance "
            f"{film.clearance * 1e6:.4g} um")
    if film.bore != "plain":
        text += f", preload {film.preload:.3g}"
    oil = film.lubricant
    grade = f"ISO VG {oil.grade}" if oil.grade is not None else (oil.name or "oil by points")
    text += f"; {grade}, inlet {film.inlet_temperature - 273.15:.4g} degC"
    if film.film_temperature is not None:
        text += f", film at {film.film_temperature - 273.15:.4g} degC (given)"
    elif film.bore == "tilting-pad":
        text += f", each pad's film at inlet + {film.rise_share:.2g} x its rise (heat balance)"
    else:
        text += f", film at inlet + {film.rise_share:.2g} x rise (heat balance)"
    return text
