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


def find_peaks(speeds, amp, evaluate, case, probe, shape_at=None, floor=0.0, guess=None):
    """Refined peaks of one amplitude curve with their half-power points.

    Local maxima below ``floor`` (pk-pk, m) are not peaks.  With ``guess``, a cheaper
    amplitude (:mod:`.response_surrogate`), each peak is searched with it between the grid's
    points and confirmed by ``evaluate`` (:func:`confirmed`), or, failing that, searched with
    ``evaluate``.
    """
    peaks = []
    for k in range(1, len(speeds) - 1):
        if not (amp[k] > amp[k - 1] and amp[k] >= amp[k + 1]) or amp[k] <= floor:
            continue
        # on the surrogate: its evaluations between the grid's (full) points, its own value
        # at the grid point (a surrogate reading a little low must not snap to the grid)
        found = None if guess is None else confirmed(
            _search(speeds, amp, k, guess, guess(speeds[k])), speeds, amp, k, evaluate)
        w_peak, a_peak, (low, why_low), (high, why_high) = \
            found or _search(speeds, amp, k, evaluate)
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


def _search(speeds, amp, k, evaluate, at_k=None):
    """The peak near grid point ``k`` by bounded scalar optimisation, and its half-power
    sides: ``(speed, amplitude, (low, why), (high, why))``; ``at_k``, ``evaluate`` at the
    grid point (by default the grid's ``amp[k]``): the grid point when it is higher."""
    lo, hi = speeds[k - 1], speeds[k + 1]
    best = minimize_scalar(lambda w: -evaluate(w), bounds=(lo, hi), method="bounded",
                           options={"xatol": SPEED_RTOL * hi})
    w_peak, a_peak = float(best.x), float(-best.fun)
    at_k = amp[k] if at_k is None else at_k
    if a_peak < at_k:
        w_peak, a_peak = float(speeds[k]), float(at_k)
    target = HALF_POWER * a_peak
    return (w_peak, a_peak, _half_power_side(speeds, amp, k, w_peak, target, -1, evaluate),
            _half_power_side(speeds, amp, k, w_peak, target, +1, evaluate))


#: A peak found on a surrogate is the curve's when the full amplitude at its speed is at
#: least that this share of the speed either side: the top then lies within that share.
#: The full amplitude changes there by about 2 (PEAK_STEP AF)^2 of itself (5e-9 at an
#: amplification factor of 5), above the roundoff of a solve near a flat peak (measured up
#: to 4e-10 on the generated rotors, where a step of 1e-6 could not tell the top: there the
#: full search's own 1e-7 finds roundoff, not the top).  With roundoff ``e`` the top is
#: told to about ``sqrt(e / 2) / AF`` of the speed: 1e-5 down to an AF of 1.4.
PEAK_STEP = 1e-5


def confirmed(found, speeds, amp, k, evaluate):
    """A peak ``found`` on a surrogate near grid point ``k`` (``(speed, amplitude, (low, why),
    (high, why))``), with the amplitude of ``evaluate`` at its speed, when ``evaluate``
    confirms its top (within :data:`PEAK_STEP`); None otherwise.  Each half-power speed is
    kept when the curve crosses 0.707 of that amplitude within :data:`SPEED_RTOL` of it, and
    otherwise (or where the surrogate found none) searched on the full curve ``amp`` with
    ``evaluate``, as without a surrogate."""
    w, _, low, high = found
    if not math.isfinite(w):
        return None
    top = evaluate(w)
    if not (top >= evaluate(w * (1.0 - PEAK_STEP)) and top >= evaluate(w * (1.0 + PEAK_STEP))
            and top >= amp[k]):         # not below the grid point it was found from
        return None
    target = HALF_POWER * top
    sides = []
    for (speed, _), step in ((low, -1), (high, +1)):
        if speed is not None and math.isfinite(speed) and \
                _crosses(evaluate, speed, target, step < 0):
            sides.append((speed, ""))
        else:
            sides.append(_half_power_side(speeds, amp, k, w, target, step, evaluate))
    return w, top, sides[0], sides[1]


def _crosses(evaluate, w, target, rising):
    """True when ``evaluate`` crosses ``target`` between ``w`` and a neighbour
    :data:`SPEED_RTOL` of ``w`` away, on the side the value at ``w`` points to (below the
    target on a rising flank: above ``w``)."""
    a = evaluate(w)
    if a == target:
        return True
    up = (a < target) == rising
    b = evaluate(w * (1.0 + SPEED_RTOL) if up else w * (1.0 - SPEED_RTOL))
    return (a - target) * (b - target) <= 0
