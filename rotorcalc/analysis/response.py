"""Steady-state unbalance response over a speed sweep: probe amplitudes and phases, bearing
forces, peaks with amplification factors (:mod:`.peaks`), and the vibration and clearance
checks.  The harmonic solves are in :mod:`.harmonic`.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from .. import standards
from ..assembly import SystemMatrices, assemble
from ..errors import InputError
from ..notices import Notice, record
from ..unbalance import Probe
from ..units import to_rpm
from ..vocabulary import Outcome, old_keywords
from .harmonic import HarmonicSolver, probe_rows, solve_speeds, unbalance_forces  # noqa: F401
from .modes import read_only
from .peaks import (HALF_POWER, PEAK_FLOOR, SPEED_RTOL, Evaluator, Peak,  # noqa: F401
                    find_peaks)
from .response_surrogate import surrogate_for
from .stability import stability
from .sweep import default_speeds, sweep, with_operating_speeds


def orbit_axes(x, y):
    """Major and minor semi-axes and sense of the ellipse traced by complex (x, y).

    Returns ``major, minor, forward`` (``forward`` True where the orbit turns
    with the spin); works elementwise on arrays.
    """
    rf, rb = np.abs(x + 1j * y) / 2.0, np.abs(x - 1j * y) / 2.0
    return rf + rb, np.abs(rf - rb), rf > rb


def phase_lag(value):
    """Phase lag, degrees in [0, 360), of a response behind the zero-phase reference."""
    return np.mod(-np.degrees(np.angle(value)), 360.0)


def default_probes(rotor):
    """The probes given, or an x and a y probe at every bearing station (not at seals)."""
    if rotor.probes:
        return tuple(rotor.probes)
    out = []
    for i, b in enumerate(rotor.bearings):
        if b.role == "seal":
            continue
        label = b.name or f"B{i + 1}"
        out.append(Probe(b.station, 0.0, f"{label} x"))
        out.append(Probe(b.station, math.pi / 2, f"{label} y"))
    return tuple(out)


def response_speeds(rotor):
    """Response sweep speeds: the response settings, else the analysis sweep range,
    with the operating and trip speeds inserted so the checks see them exactly."""
    base = default_speeds(rotor)
    r = rotor.response
    start = base[0] if r.speed_from is None else r.speed_from
    stop = base[-1] if r.speed_to is None else r.speed_to
    if stop <= start:
        raise InputError("response.speed_from", "is not below the top of the response sweep",
                         value=f"{to_rpm(start):.6g} rpm",
                         expected=f"a speed below {to_rpm(stop):.6g} rpm", kind="order")
    grid = with_operating_speeds(np.linspace(start, stop, r.speed_count), rotor.operating)
    return grid[grid > 0]  # the force vanishes at rest


@old_keywords(kind="check")
@dataclass(frozen=True)
class LimitCheck:
    """Worst ratio of a response to its limit over the speeds it checks.

    ``valid`` is False when a mode is unstable at one of those speeds: there
    is no steady state to compare with the limit, and the check fails.
    """

    case: str
    where: str
    speed: float
    value: float
    limit: float
    check: str  # "vibration" (pk-pk at a probe) or "clearance" (orbit radius at a station)
    valid: bool = True

    @property
    def ratio(self):
        return self.value / self.limit

    @property
    def passed(self):
        return self.valid and self.ratio <= 1.0

    @property
    def verdict(self):
        if not self.valid:
            return Outcome.NO_STEADY_STATE
        return Outcome.PASS if self.passed else Outcome.FAIL

    def to_dict(self):
        return {"case": self.case, "where": self.where, "check": self.check,
                "speed_rpm": float(to_rpm(self.speed)), "value_um": self.value * 1e6,
                "limit_um": self.limit * 1e6, "ratio": self.ratio,
                "steady_state": self.valid, "verdict": self.verdict, "passed": self.passed}


@dataclass(frozen=True)
class Response:
    """Unbalance response over a speed sweep.

    Attributes
    ----------
    speeds : ndarray (n_speeds,)
        rad/s.
    cases : tuple of str
    stations : complex ndarray (n_cases, n_speeds, n_stations, 2)
        Zero-to-peak complex x, y amplitude at every station, m.
    probes : tuple of Probe
    probe_values : complex ndarray (n_cases, n_speeds, n_probes)
        Complex zero-to-peak amplitude along each probe's direction, m.
    bearing_forces : complex ndarray (n_cases, n_speeds, n_bearings, 2)
        Dynamic force each bearing transmits (x, y), N.
    support_forces : complex ndarray (n_cases, n_speeds, n_bearings, 2)
        Force from each support to ground (equal to the bearing force where
        the bearing is grounded), N.
    peaks, vibration, clearance : tuples of Peak and LimitCheck
    """

    speeds: np.ndarray
    cases: tuple
    stations: np.ndarray
    probes: tuple
    probe_values: np.ndarray
    bearing_forces: np.ndarray
    support_forces: np.ndarray
    bearing_names: tuple
    peaks: tuple
    vibration: tuple
    clearance: tuple
    warnings: tuple = ()
    unstable: np.ndarray | None = None
    unstable_ranges: tuple = ()
    weights: tuple = ()      # per case, its UnbalanceWeight objects

    def __post_init__(self):
        read_only(self)

    def plot(self, case_index=0, *, ax=None, operating=None):
        """The Bode plot of one case (:func:`rotorcalc.plotting.plot_bode`)."""
        from ..plotting import plot_bode
        return plot_bode(self, case_index, operating=operating, ax=ax)

    def probe_amplitude_pp(self, case_index, probe_index):
        """Peak-to-peak amplitude curve of one probe, m."""
        return 2.0 * np.abs(self.probe_values[case_index, :, probe_index])

    def probe_phase(self, case_index, probe_index):
        """Phase lag curve of one probe, degrees."""
        return phase_lag(self.probe_values[case_index, :, probe_index])

    def orbits(self, case_index):
        """Major and minor semi-axes (m) and forward flags, (n_speeds, n_stations)."""
        st = self.stations[case_index]
        return orbit_axes(st[..., 0], st[..., 1])

    def run_up_envelope(self, case_index, top=None):
        """The largest orbit (major semi-axis, m) at every station over the speeds up to
        ``top`` (rad/s; every speed when None), and the speed (rad/s) where each occurs:
        the deflected shape the clearance check reads."""
        major = self.orbits(case_index)[0]
        keep = np.ones(len(self.speeds), bool) if top is None else \
            self.speeds <= top * (1 + 1e-9)
        major, speeds = major[keep], self.speeds[keep]
        worst = np.argmax(major, axis=0)
        return major[worst, np.arange(major.shape[1])], speeds[worst]

    @property
    def steady_peaks(self):
        """The peaks at speeds where every mode is stable: a peak inside an unstable range
        is no steady-state response and measures no amplification factor."""
        speeds = np.array([p.speed for p in self.peaks], dtype=float)
        inside = _flag_unstable(speeds, self.unstable_ranges)
        return tuple(p for p, bad in zip(self.peaks, inside) if not bad)

    @property
    def unsteady_peak_speeds(self):
        """The speeds (rad/s, rising, each once) of the peaks inside unstable ranges."""
        kept = {p.speed for p in self.steady_peaks}
        return tuple(sorted({p.speed for p in self.peaks if p.speed not in kept}))

    @property
    def steady(self):
        """False when a mode is unstable at a speed some check reads: there the
        response has no steady state to compare with a limit."""
        return all(c.valid for c in self.vibration + self.clearance)

    @property
    def passed(self):
        return self.steady and all(c.passed for c in self.vibration + self.clearance)

    def to_dict(self):
        out = {"speeds_rpm": [float(v) for v in to_rpm(self.speeds)], "cases": []}
        for i, name in enumerate(self.cases):
            major, minor, fwd = self.orbits(i)
            weights = self.weights[i] if i < len(self.weights) else ()
            out["cases"].append({
                "case": name,
                "weights": [{"station": w.station, "amount_g_mm": w.amount * 1e6,
                             "phase_deg": math.degrees(w.phase), "basis": w.basis}
                            for w in weights],
                "probes": [{"probe": p.name, "station": p.station,
                            "angle_deg": math.degrees(p.angle),
                            "amplitude_pp_um": [float(v) for v in
                                                1e6 * self.probe_amplitude_pp(i, j)],
                            "phase_lag_deg": [float(v) for v in self.probe_phase(i, j)]}
                           for j, p in enumerate(self.probes)],
                "stations": [{"station": s,
                              "major_um": [float(v) for v in 1e6 * major[:, s]],
                              "minor_um": [float(v) for v in 1e6 * minor[:, s]],
                              "forward": [bool(v) for v in fwd[:, s]]}
                             for s in range(major.shape[1])],
                "bearing_force_n": [{"bearing": b,
                                     "major_n": [float(v) for v in orbit_axes(
                                         self.bearing_forces[i, :, k, 0],
                                         self.bearing_forces[i, :, k, 1])[0]]}
                                    for k, b in enumerate(self.bearing_names)],
            })
        out["peaks"] = [p.to_dict() for p in self.peaks]
        out["vibration_checks"] = [c.to_dict() for c in self.vibration]
        out["clearance_checks"] = [c.to_dict() for c in self.clearance]
        out["unstable_rpm"] = [[float(to_rpm(lo)), float(to_rpm(hi))]
                               for lo, hi in self.unstable_ranges]
        out["steady_state_exists"] = self.steady
        out["passed"] = self.passed
        out["warnings"] = [record(w) for w in self.warnings]
        return out


#: Fresh solves an evaluator keeps (oldest dropped first).
def unbalance_response(rotor_or_system, speeds=None, cases=None, probes=None, unstable=None,
                       basis=None):
    """Steady-state unbalance response, peaks with amplification factors, and limit checks.

    Parameters
    ----------
    rotor_or_system : Rotor or SystemMatrices
    speeds : array_like, optional
        rad/s, used exactly as given; by default :func:`response_speeds`, to
        which the refined peak and half-power speeds are then added.
    cases : sequence of UnbalanceCase, optional
        Defaults to the rotor's cases.
    probes : sequence of Probe, optional
        Defaults to :func:`default_probes`.
    unstable : sequence of (float, float), optional
        Speed ranges (rad/s) where a mode is unstable (from
        :func:`~rotorcalc.analysis.stability.stability`): the response there has
        no steady state; those speeds are flagged and the verdict fails when
        one of them lies where the limits are checked.  By default they are
        found here by a sweep of the rotor's settings; ``()`` skips that.
    basis : ndarray (n_dof, r), optional
        A reduced basis of the system (the sweep's, :meth:`.reduced.ReducedSolver.basis`):
        the peaks are searched on it and confirmed by full solves
        (:mod:`.response_surrogate`); the results hold to the same tolerances.

    Returns
    -------
    Response
    """
    system = rotor_or_system if isinstance(rotor_or_system, SystemMatrices) \
        else assemble(rotor_or_system)
    rotor = system.rotor
    system.require_support()
    cases = tuple(rotor.unbalance if cases is None else cases)
    if not cases:
        raise InputError("unbalance", "no unbalance case is given",
                         expected="an [unbalance.NAME] table with [[unbalance.NAME.weight]]",
                         kind="missing")
    probes = tuple(default_probes(rotor) if probes is None else probes)
    own_grid = speeds is None
    speeds = response_speeds(rotor) if own_grid else np.asarray(speeds, dtype=float)
    solver = HarmonicSolver(system)
    force = unbalance_forces(system, cases)
    rows = probe_rows(system, probes)
    curves = solve_speeds(system, solver, force, rows, speeds)
    evaluator = Evaluator(solver, force, rows)
    peaks = _peaks(speeds, curves, evaluator, cases, probes,
                   surrogate_for(system, basis, force, rows))
    if own_grid:
        speeds, curves = _with_peak_speeds(system, solver, force, rows, speeds, curves, peaks,
                                           evaluator.solved)
    st, pv, fb, fs = curves
    warnings = list(system.table_warnings(speeds))
    if unstable is None:   # the sweep's stability, for the flags
        unstable = stability(system, sweep(system)).unstable_ranges
    unstable = tuple(unstable)
    flagged = _flag_unstable(speeds, unstable)
    if flagged.any():
        spans = ", ".join(f"{to_rpm(lo):.0f}-{to_rpm(hi):.0f} rpm" for lo, hi in unstable)
        warnings.append(Notice(f"a mode is unstable at {spans}: no steady state exists there, "
                               "the response shown at those speeds is not physical and its "
                               "peaks measure no amplification factor",
                               "unstable-response", speeds[flagged]))
    vibration, clearance = _limit_checks(rotor, speeds, st, pv, flagged, cases, probes,
                                         warnings)
    names = tuple(link.bearing.name or str(i) for i, link in enumerate(system.links))
    return Response(speeds, tuple(c.name for c in cases), st, probes, pv, fb, fs, names,
                    tuple(peaks), tuple(vibration), tuple(clearance), tuple(warnings), flagged,
                    unstable, tuple(tuple(c.weights) for c in cases))


def _peaks(speeds, curves, ev, cases, probes, surrogate=None):
    """Every probe's refined peaks for every case (one fresh solve serves every probe and
    case: ``ev``, an :class:`~rotorcalc.analysis.peaks.Evaluator`; searched first on the
    ``surrogate``, when there is one, :mod:`.response_surrogate`)."""
    st, pv = curves[0], curves[1]
    peaks = []
    for i, case in enumerate(cases):
        floor = PEAK_FLOOR * 2.0 * float(orbit_axes(st[i, ..., 0], st[i, ..., 1])[0].max())
        for j, probe in enumerate(probes):
            amp = 2.0 * np.abs(pv[i, :, j])
            guess = None if surrogate is None else \
                (lambda w, j=j, i=i: surrogate.probe(w, j, i))
            peaks.extend(find_peaks(speeds, amp, lambda w, j=j, i=i: ev.probe(w, j, i),
                                    case.name, probe.name, lambda w, i=i: ev.shape(w, i),
                                    floor, guess))
    return peaks


def _with_peak_speeds(system, solver, force, rows, speeds, curves, peaks, solved=None):
    """The grid with the refined peak and half-power speeds added, so that a sharp peak
    between grid points is drawn and checked at its top (the responses the refinement
    solved there, ``solved``, are not solved again)."""
    extra = sorted({v for p in peaks for v in (p.speed,) + (p.half_power or ())})
    extra = [v for v in extra if np.min(np.abs(speeds - v)) > 1e-9 * speeds[-1]]
    if not extra:
        return speeds, curves
    more = solve_speeds(system, solver, force, rows, np.asarray(extra), solved)
    order = np.argsort(np.concatenate([speeds, extra]), kind="stable")
    speeds = np.concatenate([speeds, extra])[order]
    return speeds, tuple(np.concatenate([a, b], axis=1)[:, order] for a, b in zip(curves, more))


def _limit_checks(rotor, speeds, st, pv, flagged, cases, probes, warnings):
    """The worst vibration at each probe in the operating range, and the largest orbit at
    each clearance from the lowest analysed speed up to trip (a flexible rotor passes its
    first critical on the way up; common practice, from memory)."""
    op = rotor.operating
    in_range = (speeds >= op.min_speed * (1 - 1e-12)) & (speeds <= op.max_speed * (1 + 1e-12))
    to_top = speeds <= (op.trip_speed or op.max_speed) * (1 + 1e-12)
    vibration, clearance = [], []
    if not in_range.any():
        warnings.append(Notice("the response sweep does not cover the operating range: "
                               "vibration was not checked", "response-coverage"))
    elif rotor.response.check_vibration:
        limit, steady = vibration_limit(rotor), not (flagged & in_range).any()
        for i, case in enumerate(cases):
            for j, probe in enumerate(probes):
                amp = np.where(in_range, 2.0 * np.abs(pv[i, :, j]), -np.inf)
                k = int(np.argmax(amp))
                vibration.append(LimitCheck(case.name, probe.name, float(speeds[k]),
                                            float(amp[k]), limit, "vibration", steady))
    if to_top.any():
        share, steady = rotor.response.clearance_share, not (flagged & to_top).any()
        for i, case in enumerate(cases):
            major = orbit_axes(st[i, ..., 0], st[i, ..., 1])[0]
            for c in rotor.clearances:
                values = np.where(to_top, major[:, c.station], -np.inf)
                k = int(np.argmax(values))
                clearance.append(LimitCheck(case.name, c.name, float(speeds[k]),
                                            float(major[k, c.station]), share * c.radial,
                                            "clearance", steady))
    return vibration, clearance


def vibration_limit(rotor):
    """Allowable peak-to-peak shaft vibration, m, one number for the operating range.

    The rotor's own ``response.vibration_limit`` when given, else
    25.4 sqrt(12000 / N) um with N the maximum continuous speed, at most 25.4 um
    (common practice, from memory).
    """
    given = rotor.response.vibration_limit
    return given if given is not None else standards.allowable_vibration(
        rotor.operating.max_speed)


def limits_caption(rotor):
    """The vibration and clearance rules in words, from the same formulas the checks use."""
    limit = vibration_limit(rotor) * 1e6
    if rotor.response.vibration_limit is not None:
        vib = f"Vibration limit {limit:.1f} um pk-pk (set in the rotor file)"
    else:
        vib = (f"Vibration limit {standards.VIBRATION_RULE_TEXT}: {limit:.1f} um "
               "(common practice, from memory)")
    return (f"{vib}; clearance limit {rotor.response.clearance_share:.0%} of the radial "
            "clearance from the lowest analysed speed up to trip (common practice, from "
            "memory).")


def _flag_unstable(speeds, ranges):
    """True at every speed inside one of the unstable ``ranges`` ((lo, hi) rad/s)."""
    flagged = np.zeros(len(speeds), dtype=bool)
    for lo, hi in ranges:
        flagged |= (speeds >= lo) & (speeds <= hi)
    return flagged
