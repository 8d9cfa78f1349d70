"""Peaks of a response curve: refined by bounded scalar optimisation with fresh solves, their
half-power points (0.707 of the peak) by root finding; the amplification factor is the peak
speed over the half-power bandwidth."""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from scipy.optimize import brentq, minimize_scalar

from ..units import to_rpm
from .modes import read_only

HALF_POWER = 1.0 / math.sqrt(2.0)
#: Relative speed tolerance of peak and half-power refinement.
SPEED_RTOL = 1e-7


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


#: Bytes of solved responses the refinement keeps (whole responses, oldest dropped first).
MEMO_BYTES = 64e6


class Evaluator:
    """Fresh solves at any speed for the refinement steps.

    One solve per speed serves every unbalance case, every probe and the peak's shape
    (the peak and half-power searches of the probes and cases visit the same speeds
    often); the solved speeds are kept (:data:`MEMO_BYTES`) for the grid the response
    is drawn on (:attr:`solved`).
    """

    def __init__(self, solver, force, probe_rows):
        self.solver, self.rows = solver, probe_rows
        self.force = force if force.ndim == 2 else force[:, None]
        self.solved = {}
        self.keep = max(8, int(MEMO_BYTES // (16 * self.force.size)))

    def responses(self, omega):
        """Every case's response at ``omega`` (n_dof, n_cases)."""
        if omega not in self.solved:
            if len(self.solved) >= self.keep:
                self.solved.pop(next(iter(self.solved)))
            self.solved[omega] = self.solver.solve(omega, omega * omega * self.force)
        return self.solved[omega]

    def response(self, omega, case=0):
        return self.responses(omega)[:, case]

    def probe(self, omega, j, case=0):
        return 2.0 * abs(self.rows[j] @ self.response(omega, case))

    def shape(self, omega, case=0):
        """Deflected shape at ``omega``: complex (x, y) at every shaft node."""
        q = self.response(omega, case)
        return q[self.solver.system.translation_dofs]


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


def find_peaks(speeds, amp, evaluate, case, probe, shape_at=None, floor=0.0):
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
