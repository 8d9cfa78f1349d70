"""A mode whose bearings and seals are read at its own whirl frequency: a fixed point per mode.

A bearing, seal or source tabulated over whirl frequency as well as speed
(:attr:`rotorcalc.model.Bearing.whirl`) acts on a mode at that mode's damped natural
frequency, not at the spin speed.  Starting from the synchronous solve, the mode is solved
again with every two-way table read at its last frequency ``w`` and followed by its shape
(modal assurance criterion), until the frequency it comes back with, ``f(w)``, equals ``w``.
Each solve is Newton's method from the last iterate's eigenpair (:func:`.pair_newton.follow`:
the tables move little between iterates, a few LU factorisations reach the mode), or, where
that is not certified, a solve for the lowest modes as before.
The update is a secant step on ``g(w) = f(w) - w`` (plain substitution ``w <- f(w)`` on the
first step, and whenever the secant has no slope); it stops when ``|g| <= rtol w`` and says so
when it does not within ``max_iter`` solves, or when the mode's shape is lost.

Only forward modes are iterated (their whirl frequency is the table's positive frequency); a
backward mode whirls against the spin, at a negative frequency no table here covers.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..notices import Notice
from ..units import to_hz, to_rpm
from .modes import log_decrement, modes_at, read_only
from .pair_newton import follow
from .tracking import mac_matrix

#: Fixed point reached when the mode's frequency and the frequency its tables were read at
#: differ by less than this share.
RTOL = 1e-6
MAX_ITER = 30
#: Below this modal assurance criterion against the last shape, the mode counts as lost.
MAC_LOST = 0.5


@dataclass(frozen=True)
class OwnFrequency:
    """One mode at its own whirl frequency (or the last iterate when ``converged`` is False)."""

    frequency: float              # rad/s
    log_dec: float
    shape: np.ndarray
    iterations: int               # solves after the synchronous one
    converged: bool
    synchronous_frequency: float  # rad/s, with the tables read at the spin speed
    synchronous_log_dec: float
    why: str = ""                 # what went wrong when not converged

    def __post_init__(self):
        read_only(self)


def at_own_frequency(system, speed, shape, frequency, log_dec, mode_count, *, rtol=RTOL,
                     max_iter=MAX_ITER, value=None, vector=None):
    """Iterate one mode of ``system`` at ``speed`` (rad/s) to its own whirl frequency.

    ``shape``, ``frequency`` and ``log_dec`` are the mode's from the synchronous solve;
    ``value`` and ``vector``, its eigenvalue and vector, start Newton's method (by default
    the eigenvalue from ``frequency`` and ``log_dec``, the vector from ``shape``).
    """
    w, w_prev, g_prev = float(frequency), None, None
    d = float(log_dec)
    if value is None:
        value = complex(-d * w / (2.0 * np.pi), w)
    for iteration in range(1, max_iter + 1):
        found = follow(system, speed, value, vector, shape, whirl=w)
        if found is None:
            modes = modes_at(system, speed, mode_count, whirl=w)
            mac = mac_matrix(np.asarray(shape)[None], modes.shapes)[0]
            j = int(np.argmax(mac))
            if mac[j] < MAC_LOST:
                return OwnFrequency(w, d, shape, iteration, False, frequency, log_dec,
                                    f"the mode's shape was lost at {to_hz(w):.4g} Hz "
                                    f"(MAC {mac[j]:.2f})")
            found = modes.eigenvalues[j], modes.shapes[j], modes.vectors[:, j]
        value, shape, vector = found
        f, d = float(value.imag), float(log_decrement(np.array([value]))[0])
        g = f - w
        if abs(g) <= rtol * max(abs(f), abs(w)):
            return OwnFrequency(f, d, shape, iteration, True, frequency, log_dec)
        if g_prev is None or g == g_prev:
            w_next = f
        else:
            w_next = w - g * (w - w_prev) / (g - g_prev)
        w_prev, g_prev, w = w, g, max(w_next, 0.0)
    return OwnFrequency(f, d, shape, max_iter, False, frequency, log_dec,
                        f"no fixed point within {max_iter} solves (last {to_hz(f):.6g} Hz "
                        f"against {to_hz(w_prev):.6g} Hz read)")


def own_frequency_notes(system, results, speed, what):
    """Notices for ``results`` (OwnFrequency) that did not converge, or whose frequency lies
    outside a bearing's whirl table (end values held)."""
    notes = []
    for number, r in results:
        if not r.converged:
            notes.append(Notice(f"{what} {number} at {to_rpm(speed):.0f} rpm: {r.why}; its "
                                "log decrement is the last iterate's", "whirl-iteration",
                                (speed,)))
        for b in system.whirl_dependent:
            if b.outside_whirl_table(r.frequency):
                notes.append(Notice(f"{what} {number} whirls at {to_hz(r.frequency):.4g} Hz, "
                                    f"outside the whirl-frequency table of {b.name}; its end "
                                    "values were held", "table-range", (speed,)))
    return notes
