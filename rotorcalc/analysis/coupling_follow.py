"""Which mode the cross-coupling screen judges at each amount, and following it there.

At the first amount the screen judges the lowest forward mode (:func:`first_forward`); at each
amount after, the mode most like the one judged before, or the more forward member of its mixed
pair (:func:`nearest_forward`).  The modes come from a solve of the state; from the second
amount on they may come instead from Newton's method (:func:`follow_near`): the judged mode and
every mode within :data:`TRACKED_SPREAD` of its frequency at the amount before, each followed by
:func:`~.pair_newton.follow` (an eigenpair of the new state to its backward-error limit, its
shape's MAC with the start's at least 0.98), and the same choice made among them.  One
LU of the shifted quadratic a Newton step where a solve finds every low mode anew.  The screen
checks this path against a solve at the amounts its verdict reads (the expected amount, the
threshold) and at the middle one, and drops it on any difference (``coupling_screen``).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .modes import Readings
from .pair_newton import follow, state_matrices
from .tracking import mac_matrix

#: A mode mixed with the followed one lies this close in frequency (a share of it): the
#: supports' small anisotropy splits the pair.
PAIR_SPREAD = 0.25
#: ... and deflects alike: the assurance criterion of the two modes' deflections (each
#: station's orbit size, whatever its whirl) at least this.
PAIR_ALIKE = 0.9
#: Newton's method follows every mode this close in frequency to the judged one (a share of
#: it): twice the pair's spread, so that a mode that may join the pair at the next amount is
#: among those followed.
TRACKED_SPREAD = 2 * PAIR_SPREAD
#: Two followed modes closer than this (relative) are one mode reached twice: solved instead.
SAME_MODE = 1e-8


def first_forward(modes):
    """Index of the lowest forward-whirling mode (None when there is none)."""
    for i in np.argsort(modes.frequency):
        if modes.forward_fraction[i] >= 0.5 and modes.frequency[i] > 0:
            return int(i)
    return None


def nearest_forward(modes, reference):
    """Index of the mode to judge: the mode most like ``reference`` (modal assurance
    criterion) or, where it belongs to a mixed pair, the pair's more forward mode.

    Near-isotropic supports mix the first backward and forward modes into two elliptical
    whirls of one deflected shape (on straight lines, forward share 0.5 each, where the
    supports' anisotropy outweighs the cross-coupling) whose forward shares change with the
    applied amount: the mode that was forward at zero may turn backward as the amount grows
    while its partner turns forward and loses its damping.  Following the shape alone
    follows the first; the screen judges the forward one.  The pair: modes within
    :data:`PAIR_SPREAD` in frequency whose deflections (orbit size at each node) agree to
    :data:`PAIR_ALIKE` (assurance criterion)."""
    best = int(np.argmax(mac_matrix(reference[None], modes.shapes)[0]))
    size = np.sqrt(np.sum(np.abs(modes.shapes) ** 2, axis=-1))          # (modes, nodes)
    alike = mac_matrix(size[best][None], size)[0] >= PAIR_ALIKE
    near = np.abs(modes.frequency - modes.frequency[best]) <= PAIR_SPREAD * modes.frequency[best]
    pair = np.flatnonzero(alike & near)
    share = modes.forward_fraction[pair]
    if share.max() - modes.forward_fraction[best] <= 1e-9:
        return best
    return int(pair[np.argmax(share)])


@dataclass(frozen=True)
class Judged:
    """The mode judged at an amount: its node ``shape`` (what the next amount is matched
    against) and ``near``, ``(eigenvalue, vector, shape)`` of it and of every mode within
    :data:`TRACKED_SPREAD` of its frequency, for Newton's method to start from (empty: the
    next amount is solved)."""

    shape: np.ndarray
    near: tuple = ()


def judged(modes, j):
    """The :class:`Judged` of mode ``j`` of ``modes`` (with eigenvalues, vectors, shapes)."""
    freq = modes.eigenvalues.imag
    near = np.flatnonzero(np.abs(freq - freq[j]) <= TRACKED_SPREAD * freq[j])
    order = [j] + [int(i) for i in near if i != j]
    return Judged(modes.shapes[j], tuple((modes.eigenvalues[i], modes.vectors[:, i],
                                          modes.shapes[i]) for i in order))


@dataclass(frozen=True)
class Followed(Readings):
    """The modes Newton's method reached, read as :func:`nearest_forward` reads a solve's."""

    eigenvalues: np.ndarray
    shapes: np.ndarray
    vectors: np.ndarray


def follow_near(system, speed, start):
    """The modes of ``system`` at ``speed`` that Newton's method reaches from each of
    ``start.near`` (a :class:`Judged`), as :class:`Followed`; None when one is not reached or
    two reach the same mode (the caller then solves)."""
    matrices = state_matrices(system, speed)
    found = [follow(system, speed, value, vector, shape, matrices=matrices)
             for value, vector, shape in start.near]
    if not found or any(f is None for f in found):
        return None
    values = np.array([f[0] for f in found])
    gaps = np.abs(values[:, None] - values[None, :]) + np.diag(np.full(len(values), np.inf))
    if np.any(gaps <= SAME_MODE * np.abs(values)[:, None]):
        return None
    return Followed(values, np.array([f[1] for f in found]),
                    np.column_stack([f[2] for f in found]))
