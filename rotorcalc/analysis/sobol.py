"""Variance-based (Sobol) sensitivity indices from a pick-and-freeze design.

With two independent sample matrices A and B (N rows, one column per input) and, for
each input i, the matrix A_B^i (A with column i taken from B), the model is run
N (d + 2) times.  For an output f with variance V (over the rows of A and B together):

* first-order index S_i = mean(f(B) (f(A_B^i) - f(A))) / V (f centred on its mean),
* total index ST_i = mean((f(A) - f(A_B^i))^2) / (2 V) (Jansen's estimator),

A. Saltelli, P. Annoni, I. Azzini, F. Campolongo, M. Ratto and S. Tarantola, "Variance
based sensitivity analysis of model output. Design and estimator for the total
sensitivity index", Computer Physics Communications 181 (2010) 259-270, Table 2
(estimators (b) and (f)).  S_i is the share of the output's variance the input explains
alone, ST_i the share it has a hand in (with its interactions); an input with ST_i = 0
does not matter.  Intervals: percentiles of a seeded bootstrap over the N rows.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

#: bootstrap resamples for the intervals
RESAMPLES = 500


def pick_freeze_design(unit):
    """The rows of A, B and every A_B^i (``N (d + 2)`` rows, ``d`` columns) from ``unit``,
    an (N, 2 d) array of points in the unit cube: A its first d columns, B its last d."""
    n, two_d = unit.shape
    d = two_d // 2
    a, b = unit[:, :d], unit[:, d:]
    blocks = [a, b]
    for i in range(d):
        ab = a.copy()
        ab[:, i] = b[:, i]
        blocks.append(ab)
    return np.vstack(blocks)


@dataclass(frozen=True)
class Indices:
    """First-order and total indices of one output, each with its interval."""

    first: np.ndarray       # (d,)
    total: np.ndarray       # (d,)
    first_interval: np.ndarray   # (d, 2)
    total_interval: np.ndarray   # (d, 2)
    rows: int                # base rows used (those where every run gave the output)

    def to_dict(self, names):
        return {name: {"first": float(self.first[i]), "total": float(self.total[i]),
                       "first_interval": [float(x) for x in self.first_interval[i]],
                       "total_interval": [float(x) for x in self.total_interval[i]]}
                for i, name in enumerate(names)} | {"rows": self.rows}


def _estimate(fa, fb, fab):
    pooled = np.concatenate([fa, fb])
    variance = np.var(pooled)
    # centred: the first-order estimator's spread grows with the output's mean (a critical
    # speed of 5000 rpm varying by 50) and centring leaves its expectation unchanged
    mean = np.mean(pooled)
    fa, fb, fab = fa - mean, fb - mean, fab - mean
    if not variance > 0:
        return np.full(fab.shape[0], np.nan), np.full(fab.shape[0], np.nan)
    first = np.mean(fb * (fab - fa), axis=1) / variance
    total = 0.5 * np.mean((fa - fab) ** 2, axis=1) / variance
    return first, total


def sobol_indices(values, d, confidence=0.95, seed=0):
    """Indices of one output from its ``values`` over the ``N (d + 2)`` runs of
    :func:`pick_freeze_design` (NaN where a run gave none: those base rows are left out).
    None when fewer than 4 rows remain or the output does not vary."""
    y = np.asarray(values, dtype=float).reshape(d + 2, -1)
    keep = np.all(np.isfinite(y), axis=0)
    y = y[:, keep]
    n = y.shape[1]
    if n < 4:
        return None
    fa, fb, fab = y[0], y[1], y[2:]
    first, total = _estimate(fa, fb, fab)
    if not np.all(np.isfinite(first)):
        return None
    rng = np.random.default_rng(seed)
    boot_first, boot_total = [], []
    for _ in range(RESAMPLES):
        rows = rng.integers(0, n, n)
        f, t = _estimate(fa[rows], fb[rows], fab[:, rows])
        boot_first.append(f)
        boot_total.append(t)
    tail = 50.0 * (1.0 - confidence)
    quantiles = (tail, 100.0 - tail)
    return Indices(first, total,
                   np.nanpercentile(np.array(boot_first), quantiles, axis=0).T,
                   np.nanpercentile(np.array(boot_total), quantiles, axis=0).T, n)
