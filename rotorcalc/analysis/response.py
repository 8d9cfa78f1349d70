"""Steady-state unbalance response over a speed sweep.

At each speed ``w`` the harmonic equation

    Z(w) Q = w^2 F0,   Z(w) = K(w) - w^2 M + i w (C(w) + w G)

is solved with a sparse complex LU factorisation.  The fill-reducing order
(reverse Cuthill-McKee of the fixed sparsity pattern) is computed once and
reused at every speed.  ``q(t) = Re(Q e^{i w t})``.  An unbalance ``U`` at
phase ``phi`` gives ``F0 = U e^{i phi} (1, -i)`` on the station's x and y,
the complex form of ``U w^2 (cos(w t + phi), sin(w t + phi))``.

Peaks of each probe's amplitude are located by bounded scalar optimisation
with fresh solves, and their half-power points (0.707 of the peak) by root
finding; the amplification factor is the peak speed over the half-power
bandwidth.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
import scipy.sparse as sp
import scipy.sparse.linalg as spla
from scipy.optimize import brentq, minimize_scalar
from scipy.sparse.csgraph import reverse_cuthill_mckee

from ..vocabulary import Outcome
from .. import standards
from ..assembly import SystemMatrices, assemble
from ..errors import InputError, SolverError
from ..notices import Notice, record
from ..solvers import NUMERICAL_FAILURES, one_blas_thread
from ..unbalance import Probe
from ..units import to_rpm
from .modes import read_only
from .stability import stability
from .sweep import default_speeds, sweep, with_operating_speeds

HALF_POWER = 1.0 / math.sqrt(2.0)
#: Relative speed tolerance of peak and half-power refinement.
SPEED_RTOL = 1e-7


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


class HarmonicSolver:
    """Sparse harmonic solves of one system, reusing one fill-reducing order."""

    def __init__(self, system: SystemMatrices):
        self.system = system
        pattern = (abs(system.mass) + abs(system.shaft_stiffness) + abs(system.gyroscopic)
                   + abs(system.support_stiffness) + abs(system.stiffness(0.0))
                   + abs(system.damping(0.0)))
        pattern = (pattern + pattern.T).tocsr()
        for link in system.links:  # bearing cross terms appear at every speed
            r, c = np.meshgrid(link.dofs, link.dofs, indexing="ij")
            pattern = pattern + sp.csr_matrix((np.ones(r.size), (r.ravel(), c.ravel())),
                                              shape=pattern.shape)
        self.order = reverse_cuthill_mckee(pattern.tocsr(), symmetric_mode=True)

    def dynamic_stiffness(self, omega):
        s = self.system
        return (s.stiffness(omega) - omega * omega * s.mass
                + 1j * omega * (s.damping(omega) + omega * s.gyroscopic))

    @one_blas_thread
    def solve(self, omega, rhs):
        """Solve ``Z(omega) Q = rhs`` (``rhs`` (n_dof, k) complex).

        An undamped system is singular exactly at a natural frequency (the
        response is unbounded there); the solve then moves by one part in 1e9
        of the speed, where the response is finite and huge, as it should be.
        """
        p = self.order
        for shift in (0.0, 1e-9, -1e-9):
            w = omega * (1.0 + shift)
            z = self.dynamic_stiffness(w).tocsc()[p][:, p].tocsc()
            try:
                lu = spla.splu(z, permc_spec="NATURAL")
                break
            except RuntimeError:  # "Factor is exactly singular"
                continue
            except NUMERICAL_FAILURES as exc:
                raise SolverError(f"the harmonic solve at {to_rpm(omega):.6g} rpm failed "
                                  f"({type(exc).__name__}: {exc})") from None
        else:
            raise SolverError(f"the harmonic solve at {to_rpm(omega):.6g} rpm failed: the "
                              "dynamic stiffness is singular")
        out = np.empty_like(rhs, dtype=complex)
        out[p] = lu.solve(np.ascontiguousarray(rhs[p], dtype=complex))
        if not np.all(np.isfinite(out)):
            raise SolverError(f"the harmonic solve at {to_rpm(omega):.6g} rpm returned values "
                              "that are not finite")
        return out


def unbalance_forces(system: SystemMatrices, cases):
    """Unit-speed force vectors F0 (n_dof, n_cases): the force is w^2 F0."""
    f = np.zeros((system.n_dof, len(cases)), dtype=complex)
    for j, case in enumerate(cases):
        for w in case.weights:
            node = system.mesh.station_nodes[w.station]
            dofs = system.node_dofs(node)
            amp = w.amount * np.exp(1j * w.phase)
            f[dofs[0], j] += amp
            f[dofs[1], j] += -1j * amp
    return f


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


@dataclass(frozen=True)
class Peak:
    """A response peak on one probe for one unbalance case.

    ``amplitude`` is peak-to-peak (m).  ``half_power`` is ``(low, high)`` in
    rad/s or None when the curve does not fall to 0.707 of the peak on one
    side (``note`` says why); ``af`` is then None.  ``shape`` is the deflected
    shape at the peak speed, complex x and y at every shaft node (compared
    with mode shapes to tell which critical the peak belongs to).
    """

    case: str
    probe: str
    speed: float
    amplitude: float
    half_power: tuple | None
    af: float | None
    note: str = ""
    shape: np.ndarray | None = None

    def __post_init__(self):
        read_only(self)

    @property
    def bandwidth(self):
        return None if self.half_power is None else self.half_power[1] - self.half_power[0]

    def to_dict(self):
        hp = self.half_power
        return {"case": self.case, "probe": self.probe, "speed_rpm": float(to_rpm(self.speed)),
                "amplitude_pp_um": self.amplitude * 1e6,
                "half_power_rpm": None if hp is None else [float(to_rpm(v)) for v in hp],
                "bandwidth_rpm": None if hp is None else float(to_rpm(hp[1] - hp[0])),
                "amplification_factor": (None if self.af is None or not math.isfinite(self.af)
                                         else self.af), "note": self.note}


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
        """The Bode plot of one case (:func:`rotorcalc.plotting.bode`)."""
        from ..plotting import bode
        return bode(self, case_index, operating=operating, ax=ax)

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
MEMO_SPEEDS = 64


class _Evaluator:
    """Fresh solves of one case at any speed, for the refinement steps."""

    def __init__(self, solver, force, probe_rows):
        self.solver, self.force, self.rows = solver, force, probe_rows
        self.solved = {}

    def response(self, omega):
        # one solve per speed serves every probe and the peak's shape (the peak and
        # half-power searches of each probe visit the same speeds)
        if omega not in self.solved:
            if len(self.solved) >= MEMO_SPEEDS:
                self.solved.pop(next(iter(self.solved)))
            self.solved[omega] = self.solver.solve(omega, omega * omega * self.force[:, None])[:, 0]
        return self.solved[omega]

    def probe(self, omega, j):
        return 2.0 * abs(self.rows[j] @ self.response(omega))

    def shape(self, omega):
        """Deflected shape at ``omega``: complex (x, y) at every shaft node."""
        q = self.response(omega)
        return q[self.solver.system.translation_dofs]


def _probe_rows(system, probes):
    """Each probe as a row vector: displacement along its direction."""
    rows = np.zeros((len(probes), system.n_dof))
    for j, p in enumerate(probes):
        dofs = system.node_dofs(system.mesh.station_nodes[p.station])
        rows[j, dofs[0]], rows[j, dofs[1]] = math.cos(p.angle), math.sin(p.angle)
    return rows


#: Beyond the ends of the sweep, the half-power search goes on with fresh
#: solves for at most this share of the peak speed.
SEARCH_BEYOND = 0.5


def _half_power_side(speeds, amp, k, w_peak, target, step, evaluate):
    """Half-power speed on one side of the peak at grid index ``k``, or (None, why).

    Walks the grid away from the peak; past the end of the sweep it carries on
    with fresh solves at the grid's end spacing, so a peak near the top of the
    sweep still gets its amplification factor.
    """
    speeds, amp = list(speeds), list(amp)
    spacing = abs(speeds[-1] - speeds[-2]) if step > 0 else abs(speeds[1] - speeds[0])
    j = k
    while True:
        nxt = j + step
        if nxt < 0 or nxt >= len(speeds):
            w_next = speeds[j] + step * spacing
            if w_next <= 0 or abs(w_next - w_peak) > SEARCH_BEYOND * w_peak:
                return None, "the response does not fall to 0.707 of the peak within reach"
            if step > 0:
                speeds.append(w_next)
                amp.append(evaluate(w_next))
            else:
                speeds.insert(0, w_next)
                amp.insert(0, evaluate(w_next))
                j, k, nxt = j + 1, k + 1, j  # indices shift by the inserted point
        if amp[nxt] < target:
            near = w_peak if j == k else speeds[j]
            lo, hi = sorted((near, speeds[nxt]))
            try:
                return brentq(lambda w: evaluate(w) - target, lo, hi,
                              xtol=SPEED_RTOL * hi), ""
            except ValueError:  # the fresh solves moved the crossing off the grid bracket
                return float(speeds[nxt] if amp[nxt] < target else near), ""
        if amp[nxt] > amp[j]:
            return None, "the response rises into another peak before falling to 0.707"
        j = nxt


#: A local maximum below this share of the case's largest orbit anywhere on the rotor
#: is roundoff (a probe at a node of the excited modes reads 1e-15 of it), not a peak.
PEAK_FLOOR = 1e-6


def _find_peaks(speeds, amp, evaluate, case, probe, shape_at=None, floor=0.0):
    """Refined peaks of one amplitude curve with their half-power points.

    Local maxima below ``floor`` (pk-pk, m) are not peaks.
    """
    peaks = []
    for k in range(1, len(speeds) - 1):
        if not (amp[k] > amp[k - 1] and amp[k] >= amp[k + 1]) or amp[k] <= floor:
            continue
        lo, hi = speeds[k - 1], speeds[k + 1]
        best = minimize_scalar(lambda w: -evaluate(w), bounds=(lo, hi), method="bounded",
                               options={"xatol": SPEED_RTOL * hi})
        w_peak, a_peak = float(best.x), float(-best.fun)
        if a_peak < amp[k]:
            w_peak, a_peak = float(speeds[k]), float(amp[k])
        target = HALF_POWER * a_peak
        low, why_low = _half_power_side(speeds, amp, k, w_peak, target, -1, evaluate)
        high, why_high = _half_power_side(speeds, amp, k, w_peak, target, +1, evaluate)
        shape = None if shape_at is None else shape_at(w_peak)
        if low is None or high is None:
            note = "; ".join(w for w in (why_low, why_high) if w)
            peaks.append(Peak(case, probe, w_peak, a_peak, None, None, note, shape))
        elif high - low <= SPEED_RTOL * w_peak:
            # an undamped (or nearly) peak: no bandwidth, the AF is unbounded
            peaks.append(Peak(case, probe, w_peak, a_peak, None, math.inf,
                              "no measurable half-power bandwidth: undamped, AF unbounded",
                              shape))
        else:
            peaks.append(Peak(case, probe, w_peak, a_peak, (low, high), w_peak / (high - low),
                              "", shape))
    return peaks


def _solve_speeds(system, solver, force, rows, speeds):
    """Station, probe, bearing and support responses at each of ``speeds``."""
    station_dofs = system.translation_dofs[system.mesh.station_nodes]
    n_cases, n_b = force.shape[1], len(system.links)
    st = np.empty((n_cases, len(speeds), len(station_dofs), 2), dtype=complex)
    pv = np.empty((n_cases, len(speeds), rows.shape[0]), dtype=complex)
    fb = np.zeros((n_cases, len(speeds), n_b, 2), dtype=complex)
    fs = np.zeros_like(fb)
    for k, w in enumerate(speeds):
        q = solver.solve(w, w * w * force)            # (n_dof, n_cases)
        st[:, k] = np.transpose(q[station_dofs], (2, 0, 1))
        pv[:, k] = (rows @ q).T
        for b, link in enumerate(system.links):
            kb, cb = link.bearing.matrices(w)
            rel = q[link.dofs[:2]] - (q[link.dofs[2:]] if len(link.dofs) == 4 else 0.0)
            fb[:, k, b] = ((kb + 1j * w * cb) @ rel).T
            if len(link.dofs) == 4:
                sup = link.bearing.support
                ks = np.diag([sup.kx, sup.ky]) + 1j * w * np.diag([sup.cx, sup.cy])
                fs[:, k, b] = (ks @ q[link.dofs[2:]]).T
            else:
                fs[:, k, b] = fb[:, k, b]
    return st, pv, fb, fs


def unbalance_response(rotor_or_system, speeds=None, cases=None, probes=None, unstable=None):
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
    rows = _probe_rows(system, probes)
    st, pv, fb, fs = _solve_speeds(system, solver, force, rows, speeds)

    peaks = []
    for i, case in enumerate(cases):
        ev = _Evaluator(solver, force[:, i], rows)
        floor = PEAK_FLOOR * 2.0 * float(orbit_axes(st[i, ..., 0], st[i, ..., 1])[0].max())
        for j, probe in enumerate(probes):
            amp = 2.0 * np.abs(pv[i, :, j])
            peaks.extend(_find_peaks(speeds, amp, lambda w, j=j, ev=ev: ev.probe(w, j),
                                     case.name, probe.name, ev.shape, floor))
    # on its own grid, add the refined peak and half-power speeds to the curves, so
    # that a sharp peak between grid points is drawn and checked at its top (speeds
    # given by the caller are kept exactly)
    extra = sorted({v for p in peaks for v in (p.speed,) + (p.half_power or ())}) \
        if own_grid else []
    extra = [v for v in extra if np.min(np.abs(speeds - v)) > 1e-9 * speeds[-1]]
    if extra:
        more = _solve_speeds(system, solver, force, rows, np.asarray(extra))
        order = np.argsort(np.concatenate([speeds, extra]), kind="stable")
        speeds = np.concatenate([speeds, extra])[order]
        st, pv, fb, fs = (np.concatenate([a, b], axis=1)[:, order]
                          for a, b in zip((st, pv, fb, fs), more))

    op = rotor.operating
    in_range = (speeds >= op.min_speed * (1 - 1e-12)) & (speeds <= op.max_speed * (1 + 1e-12))
    top = op.trip_speed or op.max_speed
    # the close-clearance check covers every analysed speed up to trip: a flexible
    # rotor passes its first critical on the way up (common practice, from memory)
    to_top = speeds <= top * (1 + 1e-12)
    warnings = list(system.table_warnings(speeds))
    if unstable is None:   # the sweep's stability, for the flags
        unstable = stability(system, sweep(system)).unstable_ranges
    unstable = tuple(unstable)
    flagged = _flag_unstable(speeds, unstable)
    if flagged.any():
        spans = ", ".join(f"{to_rpm(lo):.0f}-{to_rpm(hi):.0f} rpm" for lo, hi in unstable)
        warnings.append(Notice(f"a mode is unstable at {spans}: no steady state exists there, "
                               "the response shown at those speeds is not physical",
                               "unstable-response", speeds[flagged]))
    vibration, clearance = [], []
    if in_range.any():
        limit = vibration_limit(rotor)
        steady = not (flagged & in_range).any()
        if rotor.response.check_vibration:
            for i, case in enumerate(cases):
                for j, probe in enumerate(probes):
                    amp = np.where(in_range, 2.0 * np.abs(pv[i, :, j]), -np.inf)
                    k = int(np.argmax(amp))
                    vibration.append(LimitCheck(case.name, probe.name, float(speeds[k]),
                                                float(amp[k]), limit, "vibration", steady))
    else:
        warnings.append(Notice("the response sweep does not cover the operating range: "
                               "vibration was not checked", "response-coverage"))
    if to_top.any():
        share = rotor.response.clearance_share
        steady = not (flagged & to_top).any()
        for i, case in enumerate(cases):
            major = orbit_axes(st[i, ..., 0], st[i, ..., 1])[0]
            for c in rotor.clearances:
                values = np.where(to_top, major[:, c.station], -np.inf)
                k = int(np.argmax(values))
                clearance.append(LimitCheck(case.name, c.name, float(speeds[k]),
                                            float(major[k, c.station]), share * c.radial,
                                            "clearance", steady))
    names = tuple(link.bearing.name or str(i) for i, link in enumerate(system.links))
    return Response(speeds, tuple(c.name for c in cases), st, probes, pv, fb, fs, names,
                    tuple(peaks), tuple(vibration), tuple(clearance), tuple(warnings), flagged,
                    unstable, tuple(tuple(c.weights) for c in cases))


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
