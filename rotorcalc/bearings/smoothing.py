"""A film table's coefficients smoothed over speed: smoothing splines in log speed, each
column's smoothing weight by generalised cross-validation, piecewise where a pad picks up its
film (:mod:`rotorcalc.bearings.tabulate` fits its tables with it; docs/bearings.md,
section 11).
"""

from __future__ import annotations

import functools

import numpy as np


#: Smoothing weights tried by the cross-validation (in units of log speed); the limits are
#: the interpolating spline and the straight line.
LAMBDAS = np.logspace(-10.0, 4.0, 57)


def smooth(speeds, values, at, regimes=None):
    """Each column of ``values`` (over increasing ``speeds``, shape ``(n, ...)``) as a
    smoothing spline in log speed, read at ``at``; piecewise where the ``regimes`` (one per
    speed) change: one fit per run of neighbouring speeds in the same regime (a pad that
    picks up its film changes the coefficients by a step, which one smooth curve cannot
    follow), each read from halfway (in log speed) to the run before to halfway to the run
    after.  A run of fewer than five speeds is interpolated linearly.

    Each column's smoothing weight is chosen by generalised cross-validation among
    :data:`LAMBDAS`: a smoothing spline with a given weight is linear in the data, so the
    fits of every column (every coefficient at every whirl frequency) are products with
    the smoother's matrices, made once per run (``scipy.interpolate.make_smoothing_spline``
    on the unit vectors)."""
    u, v = np.log(speeds), np.log(at)
    values = np.asarray(values, dtype=float)
    flat = values.reshape(len(u), -1)
    regimes = [()] * len(u) if regimes is None else list(regimes)
    starts = [0] + [i for i in range(1, len(u)) if regimes[i] != regimes[i - 1]]
    ends = starts[1:] + [len(u)]
    out = np.empty((len(v), flat.shape[1]))
    for a, b in zip(starts, ends):
        low = -np.inf if a == 0 else 0.5 * (u[a - 1] + u[a])
        high = np.inf if b == len(u) else 0.5 * (u[b - 1] + u[b])
        here = (v >= low) & (v < high)
        if b - a >= 5:
            out[here] = _cross_validated(u[a:b], flat[a:b], v[here])
        else:
            for j, column in enumerate(flat[a:b].T):
                out[here, j] = np.interp(v[here], u[a:b], column)
    return out.reshape((len(v),) + values.shape[1:])


def _cross_validated(u, y, v):
    """Columns of ``y`` (over ``u``) smoothed, each with the weight of :data:`LAMBDAS` of
    least generalised cross-validation score ``n |y - S y|^2 / (n - tr S)^2``, read at
    ``v``."""
    n = len(u)
    fits, reads = _smoothers(tuple(u), tuple(v))
    scores = [n * np.sum((y - fit @ y) ** 2, axis=0) / (n - np.trace(fit)) ** 2
              for fit in fits]
    best = np.argmin(np.array(scores), axis=0)
    return np.column_stack([reads[k] @ y[:, j] for j, k in enumerate(best)])


@functools.lru_cache(maxsize=64)
def _smoothers(u, v):
    """For each weight of :data:`LAMBDAS`, the smoothing spline through ``u`` as matrices:
    its values at ``u`` (``S``) and at ``v`` from the data at ``u``.  They depend on the
    speeds only, which every variant of a rotor shares."""
    # imported here: scipy.interpolate costs every command start-up 0.1 s, and only film
    # bearings given by their geometry smooth their tables
    from scipy.interpolate import make_smoothing_spline
    u, eye = np.array(u), np.eye(len(u))
    fits, reads = [], []
    for lam in LAMBDAS:
        spline = make_smoothing_spline(u, eye, lam=lam)
        fits.append(spline(u))
        reads.append(spline(np.array(v)) if len(v) else np.empty((0, len(u))))
    return fits, reads
