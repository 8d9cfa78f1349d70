"""Orbit geometry: the ellipse a point traces as ``(Re(X e^{iwt}), Re(Y e^{iwt}))``.

Every such orbit is the sum of a forward circle of radius ``|X + iY| / 2`` and
a backward one of radius ``|X - iY| / 2`` (:func:`rotorcalc.analysis.modes.whirl_senses`);
the major semi-axis is their sum and the orbit turns the way of the larger.  The
pictures draw the ellipse point by point over one turn and find the instant a
shape's largest orbit is at the end of its major axis.
"""

from __future__ import annotations

import math

import numpy as np

from ..analysis.modes import whirl_senses

__all__ = ["whirl_senses", "major_axis", "forward_dominant", "turn", "ellipse", "snapshot"]


def major_axis(shape):
    """Major semi-axis of each node's orbit; ``shape`` (n_nodes, 2) complex x, y."""
    forward, backward = whirl_senses(shape)
    return forward + backward


def forward_dominant(x, y):
    """True when the forward circle is at least the backward one (a straight line, with
    both equal, counts as forward)."""
    return abs(x + 1j * y) >= abs(x - 1j * y)


def turn(points, start=0.0):
    """``exp(i wt)`` at ``points`` instants over one turn, from ``wt = start``."""
    return np.exp(1j * (np.linspace(0.0, 2.0 * math.pi, points) + start))


def ellipse(x, y, instants):
    """The orbit's x and y at the instants (``instants`` from :func:`turn`)."""
    return (x * instants).real, (y * instants).real


def snapshot(shape, peak):
    """A mode's deflection at the instant node ``peak`` is at the end of its major axis.

    ``shape`` holds the complex x and y translation of each node (rows).  For
    ``p(t) = Re([X, Y] e^{it})`` the squared radius of a node is largest at
    ``t = -arg(X^2 + Y^2) / 2``.  Returns the deflections at that instant
    projected on the peak node's direction (signed, so nodal points show), or
    None when the peak node does not move, and the instant ``t``.
    """
    x, y = shape[peak]
    t = -0.5 * np.angle(x * x + y * y)
    at = (shape * np.exp(1j * t)).real
    u = at[peak]
    norm = np.hypot(*u)
    if norm == 0:
        return None, t
    return at @ (u / norm), t
