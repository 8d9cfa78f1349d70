"""Film bearings into the rotor model: their coefficients on a speed grid, under the
rotor's own static loads, with the table's error measured where it was not fitted.

A bearing given by its geometry (``Bearing.film``) is turned into the table every
analysis reads (linear in speed, end values held): at each solved speed the statics
(:func:`rotorcalc.statics.static_solution`, Newton on the film journals' loads) give
every film journal its load, equilibrium and coefficients.

The coefficients scatter a little from one speed to the next (the cavitation boundary
moves across the film grid's cells: up to 3 % of the damping matrix at high eccentricity
on the default 72 x 12 grid, about 0.6 % on 240 x 12), so they are not interpolated point
to point but smoothed: each coefficient is a smoothing spline in log speed, its smoothing chosen
by generalised cross-validation (``scipy.interpolate.make_smoothing_spline``;
:mod:`rotorcalc.bearings.smoothing`), fitted through :data:`START_POINTS` speeds spaced
evenly on a log scale over :func:`film_speed_range`.  The fit is then checked where it was
not fitted: at the geometric midpoints the coefficients are solved anew and compared with
it (relative difference, Frobenius norm of the stiffness and of the damping matrix, the worst film
journal).  Where the largest difference exceeds ``tolerance`` the midpoints join the
fit and new midpoints check it, up to ``max_points`` solved speeds.  The final fit,
through every solved speed, is tabulated at :data:`TABLE_POINTS` speeds; the largest
out-of-sample difference of the last check is the table's error estimate (a
conservative one: the final fit has twice the points of the one checked).  The
perturbation step of the coefficients is checked at the lowest, middle and top speeds.
The first speeds are solved in two fixed runs from cold starts at both ends, the checks
each from its two neighbours, on up to two worker processes (:data:`SPLIT`): the table is
the same whatever the number of workers.

Screening only: confirm bearing data against the maker's analysis, the applicable
standard, the purchase specification, local codes and a licensed engineer's review.
"""

from __future__ import annotations

import dataclasses
import functools
import math
from dataclasses import dataclass

import numpy as np

from ..errors import SolverError
from ..notices import Notice
from ..model import Settings
from ..statics import journal_static_loads as journal_loads_at
from ..statics import static_solution
from ..unbalance import ResponseSettings
from ..workers import run_all
from . import film_cache
from .smoothing import smooth

#: Speeds of the first fit; the fit is tabulated at TABLE_POINTS speeds.
START_POINTS = 9
TABLE_POINTS = 41
#: Largest out-of-sample difference accepted (5 %: above the scatter of the film solves
#: themselves, up to 3 % of the damping matrix at eccentricity ratios near 0.7 on the default
#: 72 x 12 grid, measured; docs/bearings.md) and solved speeds allowed.
TOLERANCE = 0.05
MAX_POINTS = 33
#: Lowest grid speed as a share of the top one (or half the minimum speed when lower).
LOW_SHARE = 0.05
#: The grid's top over the highest analysed speed.
HIGH_SHARE = 1.2

NAMES = ("kxx", "kxy", "kyx", "kyy", "cxx", "cxy", "cyx", "cyy")
#: A bearing whose coefficients depend on the whirl frequency (tilting pads: their own
#: freedom makes them so) is tabulated over whirl as well: at zero and WHIRL_POINTS
#: frequencies spaced evenly on a log scale from WHIRL_LOW times the grid's lowest speed to
#: WHIRL_TOP times its top one (the coefficients change over a frequency of the order of
#: the speed, at every speed; a mode above the top holds the end value).
WHIRL_POINTS = 48
WHIRL_LOW = 0.1
WHIRL_TOP = 2.0


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
        Film state at each speed (-, rad, m, K, -, W, m^3/s): ``flow`` the oil the film
        draws in (a closed bore's side leakage; the pads' inflow at their leading edges),
        ``temperature`` the effective film temperature (the hottest pad's).
    dimensionless : ndarray (n, 8)
        ``K c / W`` and ``C c omega / W`` (c the reference clearance).
    coefficients : ndarray (n, 8)
        kxx ... cyy as solved at each speed (the table holds their smoothed fit).
    interpolation_error : float
        Largest relative difference between the smoothed table and the coefficients
        solved where it was not fitted (the last check).
    step_change : float
        Largest relative change of the matrices when the step was halved (checked at
        three speeds).
    notes : tuple of Notice
    whirl_error : float
        For a table over whirl frequency too (tilting pads): the largest relative
        difference between the linear interpolation of the whirl grid and the reduction
        at the grid's midpoints (NaN for a bearing that does not depend on the whirl).
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
    coefficients: np.ndarray
    interpolation_error: float
    step_change: float
    notes: tuple = ()
    whirl_error: float = math.nan

    def to_dict(self):
        return {"speeds_rad_per_s": self.speeds.tolist(), "loads_n": self.loads.tolist(),
                "eccentricity_ratio": self.eccentricity.tolist(),
                "attitude_angle_rad": self.attitude.tolist(),
                "min_film_m": self.min_thickness.tolist(),
                "film_temperature_K": self.temperature.tolist(),
                "sommerfeld": self.sommerfeld.tolist(), "power_loss_W": self.power_loss.tolist(),
                "oil_flow_m3_per_s": self.flow.tolist(),
                "dimensionless": [dict(zip(NAMES, row)) for row in self.dimensionless.tolist()],
                "solved_coefficients": [dict(zip(NAMES, row))
                                        for row in self.coefficients.tolist()],
                "interpolation_error": self.interpolation_error,
                "step_change": self.step_change,
                "whirl_error": None if math.isnan(self.whirl_error) else self.whirl_error,
                "notes": [n.to_dict() for n in self.notes]}


def film_speed_range(rotor):
    """(lowest, highest) grid speed, rad/s: up to :data:`HIGH_SHARE` times the top of the
    sweep (1.5 x the highest operating speed unless the file's ``speed_to`` says
    otherwise), trip or the response sweep's top, whichever is highest (the response's
    half-power points of a peak near the top lie above it); from :data:`LOW_SHARE` of that top or
    half the minimum speed, whichever is lower (or the sweep's start when that is lower
    still and above zero).  Below the lowest speed the table's end values hold (a film
    near rest runs close to the bore: see docs/bearings.md)."""
    op, s = rotor.operating, rotor.settings
    top = max(op.max_speed, op.trip_speed or 0.0)
    high = HIGH_SHARE * max(top, 1.5 * top if s.speed_to is None else s.speed_to,
                            rotor.response.speed_to or 0.0)
    low = LOW_SHARE * high
    if op.min_speed > 0.0:
        low = min(low, 0.5 * op.min_speed)
    if s.speed_from and s.speed_from < low:
        low = s.speed_from
    return low, high


def tabulate_films(rotor, *, tolerance=TOLERANCE, max_points=MAX_POINTS):
    """The rotor with every film bearing's coefficients computed (module docstring).

    Returns ``rotor`` itself when it has no film bearing.  Memoised: a what-if command
    checks its variants before it runs them, and the same rotor is not solved twice; and
    kept on disk, so the next command on the same rotor reads its tables
    (:mod:`rotorcalc.bearings.film_cache`; ``ROTORCALC_CACHE=off`` turns that off).

    Raises
    ------
    InputError
        Statics without an equilibrium.
    SolverError
        A film that carries its load at no speed of the range.
    """
    if not any(b.film is not None for b in rotor.bearings):
        return rotor
    key = _key(rotor)
    return dataclasses.replace(rotor, bearings=_stored(key, float(tolerance), int(max_points)))


def _key(rotor):
    """What the film tables depend on: the shaft, disks, bearings, loads and speeds only.
    The rest of the rotor (unbalance, probes, sweep counts, rules ...) is left out, so a
    command's option that changes none of these reuses them."""
    bare = tuple(dataclasses.replace(b, speeds=(), coefficients={}, film_record=None,
                                     whirl=())
                 if b.film is not None else b for b in rotor.bearings)
    return dataclasses.replace(
        rotor, bearings=bare, name="", unbalance=(), probes=(), clearances=(), sources=(),
        coupling_rule=None,
        settings=Settings(speed_from=rotor.settings.speed_from,
                          speed_to=rotor.settings.speed_to),
        response=ResponseSettings(speed_to=rotor.response.speed_to))


@functools.lru_cache(maxsize=32)
def _stored(rotor, tolerance, max_points):
    """The tabulated bearings: memoised in this run, and kept on disk for the next
    (:mod:`rotorcalc.bearings.film_cache`)."""
    return film_cache.fetch(("film-tables", rotor, tolerance, max_points),
                            lambda: _tabulated(rotor, tolerance, max_points).bearings)


#: The film states solved for the last few tables, by key rotor: they start the
#: journals' static solutions of the same rotor (:func:`journal_static_loads`).
_SOLVED: dict = {}


def journal_static_loads(rotor, speed=None):
    """:func:`rotorcalc.statics.journal_static_loads`, memoised in this run and, for a
    rotor with film journals, kept on disk beside its tables, their searches started
    from the nearest state its tables solved (a cold start costs about ten times the
    film solves)."""
    return dict(_journal_loads(_key(rotor), float(rotor.operating.max_speed if speed is None
                                                  else speed)))


@functools.lru_cache(maxsize=16)
def _journal_loads(rotor, speed):
    solved = _SOLVED.get(rotor)
    starts = solved[min(solved, key=lambda s: abs(math.log(s / speed)))] if solved else None

    def solve():
        return tuple(journal_loads_at(rotor, speed, starts=starts).items())
    if not any(b.film is not None for b in rotor.bearings):
        return solve()
    return film_cache.fetch(("journal-loads", rotor, speed), solve)


def _tabulated(rotor, tolerance, max_points, workers=0):
    films = [i for i, b in enumerate(rotor.bearings) if b.film is not None]
    low, high = film_speed_range(rotor)
    solved, notes = {}, []
    while len(_SOLVED) >= 4:
        _SOLVED.pop(next(iter(_SOLVED)))
    _SOLVED[rotor] = solved
    # two runs from cold starts at the ends towards the middle; the lowest speed is where
    # a film is likeliest to fail (it runs near the bore): the table then starts higher
    while True:
        fitted = [float(v) for v in np.geomspace(low, high, START_POINTS)]
        checked = {fitted[0], fitted[START_POINTS // 2], fitted[-1]}
        up, down = fitted[:SPLIT], fitted[:SPLIT - 1:-1]
        runs = run_all(_run, [(rotor, up, checked, {}), (rotor, down, checked, {})], workers)
        if isinstance(runs[0], SolverError):
            if low * 1.5 >= high:
                raise runs[0]
            notes.append(Notice(f"no film equilibrium at {low * 30 / math.pi:.0f} rpm: the "
                                f"film table starts higher", code="note"))
            low *= 1.5
            continue
        if isinstance(runs[1], SolverError):
            raise runs[1]
        break
    for run in runs:
        solved.update(run)
    while True:
        checks = [float(v) for v in np.sqrt(np.multiply(fitted[:-1], fitted[1:]))]
        # each check starts from its two neighbours only: the same wherever it runs
        pieces = [(rotor, [c], set(), {a: solved[a], b: solved[b]})
                  for c, a, b in zip(checks, fitted[:-1], fitted[1:])]
        halves = [pieces[:len(pieces) // 2], pieces[len(pieces) // 2:]]
        for run in run_all(_runs, [(half,) for half in halves if half], workers):
            solved.update(run)
        error = _fit_error(solved, films, fitted, checks)
        fitted = sorted(fitted + checks)
        if error <= tolerance:
            break
        if 2 * len(fitted) - 1 > max_points:
            notes.append(Notice(f"film coefficients differ from their smoothed table by up "
                                f"to {100 * error:.2g} % where it was checked, more than "
                                f"{100 * tolerance:.3g} %, with {len(fitted)} speeds solved: "
                                "the film grid may be too coarse for this bearing",
                                code="note"))
            break
    table = np.geomspace(low, high, TABLE_POINTS)
    bearings = list(rotor.bearings)
    for i in films:
        bearings[i] = _tabled(rotor.bearings[i], np.array(fitted), table,
                              [solved[s][i] for s in fitted], error, notes)
    return dataclasses.replace(rotor, bearings=tuple(bearings))


#: The first fit's speeds are solved in two runs, each from a cold start at one end of
#: the range towards the middle: the lowest SPLIT upwards, the others downwards from the
#: top.  Two runs share two cores; the split is fixed, so the table is the same whatever
#: the number of workers (the top's cold start costs less than the bottom's: the film
#: runs farther from the bore).
SPLIT = 4


def _run(rotor, speeds, checked, known):
    """``{speed: {bearing index: film state}}`` at ``speeds``, solved in this order, each
    search started from the states solved before it (and ``known``); the perturbation
    step checked at the speeds in ``checked``.  A SolverError at the first speed of a
    cold start (nothing known) is returned, not raised: the caller moves the range."""
    solved, out = dict(known), {}
    for speed in speeds:
        try:
            sol = static_solution(rotor, speed, starts=_starts(solved, speed),
                                  check_step=speed in checked)
        except SolverError as exc:
            if solved:
                raise
            return exc
        solved[speed] = out[speed] = dict(sol.films)
    return out


def _runs(pieces):
    """:func:`_run` of each piece, merged."""
    out = {}
    for piece in pieces:
        out.update(_run(*piece))
    return out


def _starts(solved, speed):
    """Start states for the film searches at ``speed``: the nearest solved speed's, with
    the film temperature carried on a straight line in log speed through the two
    nearest (the heat balance then needs one or two equilibria, not four), and the
    journal's equilibrium (its position; the pads' tilts too) on that line between them
    when the same pads carry at both (beyond them, or across a pad gaining its film, a
    straight line overshoots: the nearest holds)."""
    if not solved:
        return None
    near = sorted(solved, key=lambda s: abs(math.log(s / speed)))[:2]
    starts = dict(solved[near[0]])
    if len(near) == 2:
        a, b = near
        share = math.log(speed / a) / math.log(b / a)
        for i, state in starts.items():
            state = _along(state, solved[b][i], share, ("temperature", "pad_temperatures"))
            if 0.0 <= share <= 1.0 and _regime(state) == _regime(solved[b][i]):
                state = dataclasses.replace(state, equilibrium=_along(
                    state.equilibrium, solved[b][i].equilibrium, share,
                    ("position", "coordinates")))
            starts[i] = state
    return starts


def _along(state, other, share, names):
    """``state`` with each of ``names`` it shares with ``other`` (same shape) moved to
    ``a + share (b - a)``."""
    for name in names:
        a, b = getattr(state, name, None), getattr(other, name, None)
        if a is not None and b is not None and np.shape(a) == np.shape(b):
            state = dataclasses.replace(state, **{name: a + share * (np.asarray(b) - a)})
    return state


def _values(states):
    """(n, 8): kxx ... cyy of each state."""
    return np.array([np.concatenate([s.stiffness.ravel(), s.damping.ravel()])
                     for s in states])


def _regime(state):
    """The pads that carry no film in a solved state (none for a fixed bore)."""
    return tuple(getattr(state, "idle_pads", ()))


def _fit_error(solved, films, fitted, checks):
    """Largest relative difference, stiffness or damping matrix, between the fit through
    ``fitted`` and the solves at ``checks``."""
    worst = 0.0
    for i in films:
        fit = smooth(np.array(fitted), _values([solved[s][i] for s in fitted]), checks,
                      [_regime(solved[s][i]) for s in fitted])
        direct = _values([solved[s][i] for s in checks])
        for part in (slice(0, 4), slice(4, 8)):
            gap = np.linalg.norm(fit[:, part] - direct[:, part], axis=1)
            worst = max(worst, float(np.max(gap / np.linalg.norm(direct[:, part], axis=1))))
    return worst


def _tabled(bearing, speeds, table, states, error, notes):
    """The bearing with its smoothed table at ``table`` speeds and the record of the
    film states solved at ``speeds``."""
    regimes = [_regime(s) for s in states]
    whirl, whirl_error = (), math.nan
    if all(hasattr(s, "reduce") for s in states):
        whirl = np.r_[0.0, np.geomspace(WHIRL_LOW * table[0], WHIRL_TOP * table[-1],
                                        WHIRL_POINTS)]
        solved = np.stack([_reduced(s, whirl) for s in states])        # (speed, whirl, 8)
        values = smooth(speeds, solved, table, regimes)
        whirl_error = _whirl_error(states, whirl, solved)
    else:
        values = smooth(speeds, _values(states), table, regimes)
    eq = [s.equilibrium for s in states]
    steps = [max(s.step_change) for s in states if not math.isnan(s.step_change[0])]
    own = [w for s in states for w in s.warnings if getattr(w, "code", "") != "idle-pad"]
    idle = {}
    for speed, state in zip(speeds, states):
        for k in _regime(state):
            idle.setdefault(k, []).append(float(speed))
    own += [Notice(f"pad {k + 1} carries no film at {len(at)} of the {len(speeds)} solved "
                   f"speeds, {min(at) * 30 / math.pi:.0f} to {max(at) * 30 / math.pi:.0f} rpm "
                   "(unloaded: its tilt is free and it may flutter); left out of the "
                   "coefficients there", code="idle-pad", speeds=at)
            for k, at in sorted(idle.items())]
    record = FilmRecord(
        speeds=speeds.copy(), loads=np.array([e.load for e in eq]),
        eccentricity=np.array([e.eccentricity_ratio for e in eq]),
        attitude=np.array([e.attitude_angle for e in eq]),
        min_thickness=np.array([e.min_thickness for e in eq]),
        temperature=np.array([s.temperature for s in states]),
        sommerfeld=np.array([e.sommerfeld for e in eq]),
        power_loss=np.array([e.power_loss for e in eq]),
        flow=np.array([getattr(e, "inflow", e.side_leakage) for e in eq]),
        dimensionless=np.array([np.concatenate([m.ravel() for m in s.dimensionless()])
                                for s in states]),
        coefficients=_values(states),
        interpolation_error=float(error), step_change=float(max(steps, default=math.nan)),
        whirl_error=whirl_error,
        notes=tuple(notes) + tuple({str(w): w for w in own}.values()))
    for name in ("speeds", "loads", "eccentricity", "attitude", "min_thickness",
                 "temperature", "sommerfeld", "power_loss", "flow", "dimensionless",
                 "coefficients"):
        getattr(record, name).flags.writeable = False
    if len(whirl):
        coefficients = {name: tuple(tuple(float(v) for v in row) for row in values[:, :, j])
                        for j, name in enumerate(NAMES)}
    else:
        coefficients = {name: tuple(float(v) for v in values[:, j])
                        for j, name in enumerate(NAMES)}
    return dataclasses.replace(bearing, speeds=tuple(float(s) for s in table),
                               whirl=tuple(float(w) for w in whirl),
                               coefficients=coefficients, film_record=record)


def _reduced(state, whirl):
    """(len(whirl), 8): kxx ... cyy of a state's full linear set reduced at each whirl."""
    k, c = state.reduce(np.asarray(whirl, dtype=float))
    return np.concatenate([k.reshape(-1, 4), c.reshape(-1, 4)], axis=1)


def _whirl_error(states, whirl, solved):
    """Largest difference (Frobenius, K or C) between the reduction at whirl midpoints and
    the linear interpolation of the whirl grid, over the solved speeds, as a share of the
    largest matrix of that speed's row (a direct term that crosses zero with the whirl
    would make a pointwise share meaningless there)."""
    middle = 0.5 * (whirl[:-1] + whirl[1:])
    worst = 0.0
    for state, row in zip(states, solved):
        direct = _reduced(state, middle)
        between = 0.5 * (row[:-1] + row[1:])
        for part in (slice(0, 4), slice(4, 8)):
            gap = np.linalg.norm(between[:, part] - direct[:, part], axis=1)
            worst = max(worst, float(np.max(gap) / np.max(np.linalg.norm(row[:, part],
                                                                          axis=1))))
    return worst
