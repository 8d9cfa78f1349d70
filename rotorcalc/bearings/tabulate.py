"""Film bearings into the rotor model: their coefficients on a speed grid, under the
rotor's own static loads, with the grid's interpolation error measured.

A bearing given by its geometry (``Bearing.film``) is turned into the table every
analysis reads (linear in speed, end values held): at each grid speed the statics
(:func:`rotorcalc.statics.static_solution`, Newton on the film journals' loads) give
every film journal its load, equilibrium and coefficients.  The grid starts with
:data:`START_POINTS` speeds spaced evenly on a log scale over :func:`film_speed_range`,
then every interval is split at its middle and the coefficients computed there are
compared with the straight line between its ends; an interval where they differ by
more than ``tolerance`` (relative, Frobenius norm of the stiffness or the damping
matrix, the worst film journal) is split again, up to ``max_points`` speeds.  The
largest difference left is the table's error estimate (an upper estimate: the
midpoints are in the table too, and linear interpolation's error falls four-fold
when the interval halves).  The perturbation step of the coefficients is checked at
the lowest, middle and top speeds.

Screening only: confirm bearing data against the maker's analysis, the applicable
standard, the purchase specification, local codes and a licensed engineer's review.
"""

from __future__ import annotations

import dataclasses
import math
from dataclasses import dataclass

import numpy as np

from ..errors import SolverError
from ..notices import Notice
from ..statics import static_solution

#: Grid speeds before any splitting.
START_POINTS = 5
#: Largest relative midpoint difference accepted (2 %) and grid size allowed.
TOLERANCE = 0.02
MAX_POINTS = 33
#: Lowest grid speed as a share of the top one (or half the minimum speed when lower).
LOW_SHARE = 0.1

NAMES = ("kxx", "kxy", "kyx", "kyy", "cxx", "cxy", "cyx", "cyy")


@dataclass(frozen=True)
class FilmRecord:
    """How a film bearing's table was made: one entry per grid speed.

    Attributes
    ----------
    speeds : ndarray
        rad/s, increasing.
    loads : ndarray (n, 2)
        Static load on the journal, N.
    eccentricity, attitude, min_thickness, temperature, sommerfeld, power_loss, flow :
        ndarray
        Film state at each speed (-, rad, m, K, -, W, m^3/s).
    dimensionless : ndarray (n, 8)
        ``K c / W`` and ``C c omega / W`` (c the reference clearance).
    interpolation_error : float
        Largest relative midpoint difference left in the grid.
    step_change : float
        Largest relative change of the matrices when the step was halved (checked at
        three speeds).
    notes : tuple of Notice
    """

    speeds: np.ndarray
    loads: np.ndarray
    eccentricity: np.ndarray
    attitude: np.ndarray
    min_thickness: np.ndarray
    temperature: np.ndarray
    sommerfeld: np.ndarray
    power_loss: np.ndarray
    flow: np.ndarray
    dimensionless: np.ndarray
    interpolation_error: float
    step_change: float
    notes: tuple = ()

    def to_dict(self):
        return {"speeds_rad_per_s": self.speeds.tolist(), "loads_n": self.loads.tolist(),
                "eccentricity_ratio": self.eccentricity.tolist(),
                "attitude_angle_rad": self.attitude.tolist(),
                "min_film_m": self.min_thickness.tolist(),
                "film_temperature_K": self.temperature.tolist(),
                "sommerfeld": self.sommerfeld.tolist(), "power_loss_W": self.power_loss.tolist(),
                "side_leakage_m3_per_s": self.flow.tolist(),
                "dimensionless": [dict(zip(NAMES, row)) for row in self.dimensionless.tolist()],
                "interpolation_error": self.interpolation_error,
                "step_change": self.step_change,
                "notes": [n.to_dict() for n in self.notes]}


def film_speed_range(rotor):
    """(lowest, highest) grid speed, rad/s: up to the top of the sweep (1.5 x the
    highest operating speed unless the file's ``speed_to`` says otherwise), trip or the
    response sweep's top, whichever is highest; from :data:`LOW_SHARE` of that top or
    half the minimum speed, whichever is lower (or the sweep's start when that is lower
    still and above zero).  Below the lowest speed the table's end values hold (a film
    near rest runs close to the bore: see docs/bearings.md)."""
    op, s = rotor.operating, rotor.settings
    top = max(op.max_speed, op.trip_speed or 0.0)
    high = max(top, 1.5 * top if s.speed_to is None else s.speed_to,
               rotor.response.speed_to or 0.0)
    low = LOW_SHARE * high
    if op.min_speed > 0.0:
        low = min(low, 0.5 * op.min_speed)
    if s.speed_from and s.speed_from < low:
        low = s.speed_from
    return low, high


def tabulate_films(rotor, *, tolerance=TOLERANCE, max_points=MAX_POINTS):
    """The rotor with every film bearing's coefficients computed (module docstring).

    Returns ``rotor`` itself when it has no film bearing.

    Raises
    ------
    InputError
        Statics without an equilibrium.
    SolverError
        A film that carries its load at no speed of the range.
    """
    films = [i for i, b in enumerate(rotor.bearings) if b.film is not None]
    if not films:
        return rotor
    low, high = film_speed_range(rotor)
    solved, notes = {}, []

    def solve(speed, check_step=False):
        near = solved[min(solved, key=lambda s: abs(s - speed))] if solved else None
        sol = static_solution(rotor, speed, starts=near, check_step=check_step)
        solved[speed] = dict(sol.films)
        return solved[speed]

    # the lowest speed is where a film is likeliest to fail (it runs near the bore)
    while True:
        try:
            solve(low, check_step=True)
            break
        except SolverError:
            if low * 1.5 >= high:
                raise
            notes.append(Notice(f"no film equilibrium at {low * 30 / math.pi:.0f} rpm: the "
                                f"film table starts higher", code="note"))
            low *= 1.5
    grid = np.geomspace(low, high, START_POINTS)
    for speed in grid[1:]:
        solve(float(speed), check_step=speed in (grid[START_POINTS // 2], grid[-1]))
    pending = [(float(a), float(b)) for a, b in zip(grid[:-1], grid[1:])]
    worst = 0.0
    while pending:
        a, b = pending.pop(0)
        if len(solved) >= max_points:
            notes.append(Notice(f"film table stopped at {max_points} speeds with a midpoint "
                                f"difference above {100 * tolerance:.3g} % left "
                                f"({a * 30 / math.pi:.0f}-{b * 30 / math.pi:.0f} rpm)",
                                code="note"))
            worst = max(worst, _gap(solved, a, b, None))
            break
        m = 0.5 * (a + b)
        solve(m)
        gap = _gap(solved, a, b, m)
        if gap > tolerance:
            pending += [(a, m), (m, b)]
        else:
            worst = max(worst, gap)
    speeds = np.array(sorted(solved))
    bearings = list(rotor.bearings)
    for i in films:
        states = [solved[s][i] for s in speeds]
        bearings[i] = _tabled(rotor.bearings[i], speeds, states, worst, notes)
    return dataclasses.replace(rotor, bearings=tuple(bearings))


def _matrices(state):
    return state.stiffness, state.damping


def _gap(solved, a, b, m):
    """Largest relative difference between the coefficients at ``m`` and the straight
    line from ``a`` to ``b``, over the film journals (``m`` None: the middle of the
    largest gap left unchecked, so infinite)."""
    if m is None:
        return math.inf
    share = (m - a) / (b - a)
    worst = 0.0
    for i, state in solved[m].items():
        for mid, left, right in zip(_matrices(state), _matrices(solved[a][i]),
                                    _matrices(solved[b][i])):
            line = left + share * (right - left)
            worst = max(worst, float(np.linalg.norm(mid - line) / np.linalg.norm(mid)))
    return worst


def _tabled(bearing, speeds, states, error, notes):
    values = np.array([np.concatenate([s.stiffness.ravel(), s.damping.ravel()])
                       for s in states])
    eq = [s.equilibrium for s in states]
    steps = [max(s.step_change) for s in states if not math.isnan(s.step_change[0])]
    own = [w for s in states for w in s.warnings]
    record = FilmRecord(
        speeds=speeds.copy(), loads=np.array([e.load for e in eq]),
        eccentricity=np.array([e.eccentricity_ratio for e in eq]),
        attitude=np.array([e.attitude_angle for e in eq]),
        min_thickness=np.array([e.min_thickness for e in eq]),
        temperature=np.array([s.temperature for s in states]),
        sommerfeld=np.array([e.sommerfeld for e in eq]),
        power_loss=np.array([e.power_loss for e in eq]),
        flow=np.array([e.side_leakage for e in eq]),
        dimensionless=np.array([np.concatenate([m.ravel() for m in s.dimensionless()])
                                for s in states]),
        interpolation_error=float(error), step_change=float(max(steps, default=math.nan)),
        notes=tuple(notes) + tuple({w.message: w for w in own}.values()))
    for name in ("speeds", "loads", "eccentricity", "attitude", "min_thickness",
                 "temperature", "sommerfeld", "power_loss", "flow", "dimensionless"):
        getattr(record, name).flags.writeable = False
    return dataclasses.replace(
        bearing, speeds=tuple(float(s) for s in speeds),
        coefficients={name: tuple(float(v) for v in values[:, j])
                      for j, name in enumerate(NAMES)},
        film_record=record)
