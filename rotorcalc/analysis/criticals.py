"""Critical speeds: where a tracked natural frequency equals order x spin speed.

Each crossing is bracketed on the sweep and refined by Brent's method.  At each
trial speed the branch's eigenpair is reached by Newton's method from the nearest
speed already solved (:mod:`.pair_newton`: a few LU factorisations instead of a
solve for every mode), taken when its backward error and its shape's likeness to
the start certify it.  Otherwise the speed is solved afresh and the branch picked
out by the same shape-and-frequency cost the tracker uses: first the few modes
nearest the branch (a shift-invert solve about its eigenvalue), and should none
of them match, the lowest modes as in the sweep.  Brackets are independent, so
they can be shared among worker processes like the sweep's speeds.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from scipy.optimize import brentq

from ..assembly import SystemMatrices, assemble
from ..units import to_hz, to_rpm
from .modes import forward_fraction, log_decrement, modes_at, read_only, whirl_label
from .pair_newton import follow
from .reduced import ReducedSolver
from .sweep import TRACKING_RESERVE, Sweep, worker_count, worker_pool
from .sweep import sweep as run_sweep
from .tracking import GATE, match_cost

#: Relative speed tolerance of the root refinement.
SPEED_RTOL = 1e-9
#: A crossing within this relative distance of a bracket end is on that end.
END_ROUNDOFF = 1e-6
#: Modes solved about the branch's eigenvalue at each trial speed.
NEAR_MODES = 4


@dataclass(frozen=True)
class CriticalSpeed:
    """One critical speed.

    Attributes
    ----------
    speed : float
        rad/s.
    order : float
        Excitation order (1.0 for synchronous).
    branch : int
        Number of the tracked branch in the sweep, from 1 (column ``branch - 1`` of
        the sweep's arrays).
    eigenvalue : complex
        At the critical speed; its imaginary part equals ``order * speed``.
    shape : complex ndarray (n_nodes, 2)
    """

    speed: float
    order: float
    branch: int
    eigenvalue: complex
    shape: np.ndarray

    def __post_init__(self):
        read_only(self)

    @property
    def log_dec(self):
        return float(log_decrement(np.array([self.eigenvalue]))[0])

    @property
    def damping_ratio(self):
        return float(-self.eigenvalue.real / abs(self.eigenvalue))

    @property
    def forward_fraction(self):
        return float(forward_fraction(self.shape[None])[0])

    @property
    def whirl(self):
        return whirl_label(self.forward_fraction)

    def to_dict(self):
        return {
            "speed_rpm": float(to_rpm(self.speed)),
            "speed_rad_s": float(self.speed),
            "order": float(self.order),
            "branch": int(self.branch),
            "frequency_hz": float(to_hz(self.eigenvalue.imag)),
            "whirl": self.whirl,
            "forward_fraction": self.forward_fraction,
            "log_dec": self.log_dec,
            "damping_ratio": self.damping_ratio,
        }


def branch_at(system, speed, ref_value, ref_shape, n_solve, solver):
    """Eigenvalue and shape of the branch at ``speed``: the best match to the reference."""
    for near in (ref_value, None):
        n = NEAR_MODES if near is not None else n_solve
        modes = modes_at(system, speed, n, solver, near=near)
        if not len(modes.eigenvalues):     # none near a branch turning overdamped
            continue
        cost = match_cost(ref_shape[None], np.array([ref_value]), modes.shapes,
                          modes.eigenvalues)[0]
        j = int(np.argmin(cost))
        if cost[j] <= GATE:
            break
    return modes.eigenvalues[j], modes.shapes[j]


def critical_speeds(rotor_or_system, result: Sweep | None = None, orders=None, solver=None,
                    workers=1):
    """Critical speeds of every tracked branch for each excitation order.

    Parameters
    ----------
    rotor_or_system : Rotor or SystemMatrices
    result : Sweep, optional
        A sweep of the same system; run with the rotor's settings if omitted.
    orders : sequence of float, optional
        Excitation orders; defaults to ``settings.orders`` (1X).
    solver : callable, optional
    workers : int
        Worker processes sharing the brackets (and the sweep, when it is run
        here); 1 by default, 0 for one per core.  The result does not depend on it.

    Returns
    -------
    list of CriticalSpeed
        Sorted by speed.
    """
    system = rotor_or_system if isinstance(rotor_or_system, SystemMatrices) \
        else assemble(rotor_or_system)
    result = run_sweep(system, solver=solver, workers=workers) if result is None else result
    orders = system.rotor.settings.orders if orders is None else orders
    n_solve = result.eigenvalues.shape[1] + TRACKING_RESERVE
    speeds, wd = result.speeds, result.frequency
    brackets = []
    for order in orders:
        for j in range(wd.shape[1]):
            gap = wd[:, j] - order * speeds
            for k in np.nonzero(np.sign(gap[:-1]) * np.sign(gap[1:]) <= 0)[0]:
                if gap[k] == 0.0 and k > 0:
                    continue  # counted as the end of the previous bracket
                brackets.append((float(order), j, speeds[k], speeds[k + 1],
                                 result.eigenvalues[k, j], result.shapes[k, j],
                                 result.eigenvalues[k + 1, j], result.shapes[k + 1, j]))
    workers = 1 if getattr(solver, "in_process", False) else \
        min(worker_count(workers), len(brackets))
    if workers <= 1:
        found = [_refine(system, b, n_solve, solver) for b in brackets]
    else:
        with worker_pool(workers) as pool:
            futures = [pool.submit(_refine, system, b, n_solve, solver) for b in brackets]
            found = [f.result() for f in futures]
    return sorted([c for c in found if c is not None], key=lambda c: (c.speed, c.order))


def _refine(system, bracket, n_solve, solver):
    """The critical speed in one bracket, or None when fresh solves show no crossing."""
    order, j, lo, hi, ref_value, ref_shape, hi_value, hi_shape = bracket
    # speed -> (eigenvalue, shape, vector or None), the ends from the sweep (the same solve:
    # the same numbers); Brent's root is usually its last trial speed
    seen = {lo: (ref_value, ref_shape, None), hi: (hi_value, hi_shape, None)}
    # on a reduced basis (the sweep's), the trial speeds' Newton steps run on it, certified
    reduced = solver.model(system, n_solve) if isinstance(solver, ReducedSolver) else None

    def g(w):       # each speed solved once: Brent's method evaluates both ends again
        if w not in seen:
            seen[w] = _followed(system, w, seen, ref_value, ref_shape, reduced) or \
                branch_at(system, w, ref_value, ref_shape, n_solve, solver) + (None,)
        return seen[w][0].imag - order * w

    g_lo, g_hi = g(lo), g(hi)
    if g_lo * g_hi > 0:
        # The fresh solves disagree with the bracket.  A crossing on a bracket end
        # can fall either side of it by roundoff (the sweep and a trial solve
        # differ in their last digits): that end is the root.  Otherwise there
        # is no crossing.
        end, g_end = min(((lo, g_lo), (hi, g_hi)), key=lambda p: abs(p[1]))
        if abs(g_end) > END_ROUNDOFF * max(order * end, abs(seen[end][0])):
            return None
        g_lo, lo, g_hi, hi = (0.0, end, 0.0, end)
    root = lo if g_lo == 0 else hi if g_hi == 0 else brentq(
        g, lo, hi, xtol=SPEED_RTOL * max(hi, 1.0), rtol=SPEED_RTOL)
    g(root)
    value, shape, _ = seen[root]
    return CriticalSpeed(float(root), order, j + 1, complex(value), shape)


def _followed(system, speed, seen, ref_value, ref_shape, reduced=None):
    """(eigenvalue, shape, vector) of the branch at ``speed`` by Newton's method from the
    nearest speed already solved (:func:`.pair_newton.follow`: it whirls, keeps its digits
    and its shape's MAC with the start's is at least ``FOLLOW_MAC``), or None (then the trial
    speed is solved by ``solver``: in the full model, or on the reduced basis).  Taken only
    when it also passes the tracker's shape-and-frequency gate against the bracket's
    reference, as a solve's pick must.  With ``reduced`` (the sweep's
    reduced model) the steps run on the projected model and the answer is certified in the
    full one by its residual, like every pair of the reduced sweep."""
    start = min(seen, key=lambda w: abs(w - speed))
    value, shape, vector = seen[start]
    found = follow(system, speed, value, vector, shape, reduced=reduced)
    if found is None or match_cost(ref_shape[None], np.array([ref_value]), found[1][None],
                                   np.array([found[0]]))[0, 0] > GATE:
        return None
    return found
