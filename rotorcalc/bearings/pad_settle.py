"""The pads of a tilting-pad bearing settled: each pad's film solved as it tilts (and its
pivot yields), every pad in moment balance, and the journal where the pads carry the load.

The equations are in :mod:`rotorcalc.bearings.tilting_pad` (its module notes), which also
linearises the settled bearing; docs/bearings.md, section 12.  Screening only: confirm
tilting-pad results against the bearing maker's analysis, the applicable standard, the
purchase specification, local codes and a licensed engineer's review.
"""

from __future__ import annotations

import math

import numpy as np

from ..errors import InputError, SolverError
from ..threads import one_blas_thread
from .equilibrium import WALL, check_operating
from .film import FilmOptions, number, pair, solve_film, whole
from .geometry import TWO_PI
from .pad_state import (PadEquilibrium, _check_ring, _equilibrium_of, _idle,  # noqa: F401
                        _keep, pad_viscosities)

_solve = solve_film.__wrapped__
#: The search from a cold start stops at this share of the load; Newton's method
#: (:meth:`_Pads.polish`) takes it from there to the tolerance.
ROUGH = 2e-2


class _Pads:
    """The pads' films at coordinates ``q`` (SI: x, y, tilts, lifts) and their rates."""

    def __init__(self, ring, omega, mu, options):
        """``mu``: one viscosity (Pa s) for every pad, or one per pad."""
        self.ring, self.omega, self.options = ring, omega, options
        self.mu = np.broadcast_to(np.asarray(mu, dtype=float), (ring.count,))
        n, c = ring.count, ring.bearing_clearance
        self.n, self.flex, self.size = n, ring.flexible, len(ring.coordinates)
        self.unit = np.r_[c, c, np.full(n, c / ring.lever), np.full(self.size - 2 - n, c)]
        th = ring.pivots
        self.e, self.t = np.c_[np.cos(th), np.sin(th)], np.c_[-np.sin(th), np.cos(th)]
        self.solves = self.iterations = 0
        self.jacobian = None                    # the last dQ/dq computed (a warm start's)

    def aligned(self, position):
        """The journal at ``position``, each pad tilted to follow it across its pivot line."""
        q = np.zeros(self.size)
        q[:2], q[2:2 + self.n] = position, -(self.t @ position) / self.ring.lever
        return q

    def _pad(self, k, q, rate):
        lift = (q[2 + self.n + k], rate[2 + self.n + k]) if self.flex else (0.0, 0.0)
        return self.ring.pad(k, q[2 + k], lift[0], rate[2 + k], lift[1])

    def film(self, k, q, rate=None, start=None, hold=False):
        self.solves += 1
        rate = np.zeros(self.size) if rate is None else rate
        return _solve(self._pad(k, q, rate), self.omega, float(self.mu[k]), (q[0], q[1]),
                      (rate[0], rate[1]), options=self.options, start=start,
                      hold_rupture=hold)

    def films(self, q, rate=None, start=None, hold=False):
        return [self.film(k, q, rate, None if start is None else start[k], hold)
                for k in range(self.n)]

    def thinnest(self, q):
        zero = np.zeros(self.size)
        return min(self._pad(k, q, zero).lands[0].closest(q[0], q[1])[0] for k in range(self.n))

    def pad_loads(self, q, films):
        """Per pad: force on the journal, moment on the pad, radial force net of the pivot."""
        f = np.array([s.force for s in films])
        out = np.zeros((self.n, 4))
        out[:, :2], out[:, 2] = f, self.ring.lever * np.sum(f * self.t, axis=1)
        if self.flex:
            out[:, 3] = -np.sum(f * self.e, axis=1) - self.ring.pivot_stiffness * q[2 + self.n:]
        return out

    def forces(self, q, films):
        """The generalised forces ``Q`` over all coordinates."""
        g = self.pad_loads(q, films)
        return np.concatenate([g[:, :2].sum(axis=0), g[:, 2]] + ([g[:, 3]] if self.flex else []))

    def derivative(self, q, films, steps, *, rate=False, hold=False, central=True):
        """``dQ/dq`` (``dQ/dq'`` with ``rate``) by differences of ``steps``; a pad coordinate
        is moved on all pads at once (each pad's film sees only its own)."""
        n, out = self.n, np.zeros((self.size, self.size))
        base = None if central else self.pad_loads(q, films)
        for cols in [[0], [1], list(range(2, 2 + n))] + \
                ([list(range(2 + n, 2 + 2 * n))] if self.flex else []):
            shift = np.zeros(self.size)
            shift[cols] = steps[cols]

            def loads(sign):
                at = q if rate else q + sign * shift
                return self.pad_loads(at, self.films(at, sign * shift if rate else None,
                                                     films, hold))
            diff = 0.5 * (loads(1.0) - loads(-1.0)) if central else loads(1.0) - base
            if len(cols) == 1:
                out[:, cols[0]] = np.concatenate([diff[:, :2].sum(axis=0), diff[:, 2]] + (
                    [diff[:, 3]] if self.flex else [])) / steps[cols[0]]
                continue
            for k, j in enumerate(cols):
                rows = [0, 1, 2 + k] + ([2 + n + k] if self.flex else [])
                out[rows, j] = diff[k, :len(rows)] / steps[j]
        return out

    def settle(self, q, scale, slopes=None, start=None, only=None):
        """``(q, films)`` with every pad's tilt settled (journal and lifts held), or None;
        ``start``: films whose ruptured regions start the cavitation iterations; ``only``:
        settle these pads only (the others as ``start`` has them).

        With ``u = tilt`` and ``g = F_k . t_k`` at positive speed (both negated at negative
        speed, the mirror image), a pad has no film below some ``u``; above, ``g`` may first
        dip below zero (the film starts behind an offset pivot), then turns positive and
        falls through its stable root (from + to -) for good.  Steps (1.1 Newton steps where
        ``slopes`` ``dg/du`` are known, else 1 % of the clearance; doubling) find a bracket
        of that root; the Illinois method closes it.  A pad that meets no positive ``g``
        before the wall carries nothing: it stays where it has no film.
        """
        q, up = q.copy(), math.copysign(1.0, self.omega)
        films = [None] * self.n if start is None else list(start)
        pos, neg = (lambda v: v is not None and v > 0.0), (lambda v: v is not None and v < 0.0)
        for k in range(self.n) if only is None else only:
            unit = self.unit[2 + k]

            def g(u):                                   # None where the pad has no film
                q[2 + k] = up * u
                films[k] = self.film(k, q, start=films[k])
                force = films[k].force
                return up * float(self.t[k] @ force) if np.any(force) else None

            def march(u, g_u, size, done):
                """From ``u`` by doubling steps until ``done(g)``: (last u, g, new u, g); None
                when the pad comes within four halvings of the wall first."""
                walls = 0
                while walls < 4:
                    v = u + size
                    if self.thinnest(np.r_[q[:2 + k], up * v, q[3 + k:]]) <= WALL * self.unit[0]:
                        walls, size = walls + 1, 0.5 * size
                        continue
                    g_v = g(v)
                    if done(g_v):
                        return u, g_u, v, g_v
                    u, g_u, size = v, g_v, size * (0.5 if walls else 2.0)
                return None
            u0 = up * q[2 + k]
            g0, size, bracket, bare = g(u0), 0.01 * unit, None, u0
            if slopes is not None and slopes[k] < 0.0 and g0 is not None:
                size = max(abs(1.1 * g0 / slopes[k]), 1e-6 * unit)
            if pos(g0):
                bracket = march(u0, g0, size, neg)
            elif neg(g0):
                down = march(u0, g0, -size, lambda v: not neg(v))
                bare = None if down is None else down[2]
                bracket = down and pos(down[3]) and (down[2], down[3], down[0], down[1])
            if not bracket:
                rise = march(u0, g0, 0.01 * unit, pos)
                if rise is None and bare is not None:      # nothing holds the pad: no film
                    g(bare)
                    continue
                bracket = rise and march(*rise[2:], 0.01 * unit, neg)
            if not bracket:
                return None
            a, g_a, b, g_b = bracket
            for side in range(100):
                c = (a * g_b - b * g_a) / (g_b - g_a)
                g_c = g(c)
                if abs(g_c) <= 1e-11 * scale or abs(b - a) <= 1e-12 * unit:
                    break
                if g_c < 0.0:                                      # Illinois: halve the end
                    b, g_b, g_a, side = c, g_c, g_a / (2.0 if side < 0 else 1.0), -1
                else:
                    a, g_a, g_b, side = c, g_c, g_b / (2.0 if side > 0 else 1.0), 1
            else:
                return None
        return q, films

    def polish(self, q, films, target, free, scale, tol, jacobian=None, max_iterations=12):
        """``(q, films)`` by Newton's method on every coordinate at once (the journal, the
        lifts and the tilts of the pads that carry), from a neighbouring equilibrium's
        coordinates and films, or None: when it has not converged within
        ``max_iterations``, when a step would move the journal more than a tenth of ``C_b``,
        or when the set of carrying pads keeps changing.  The warm start of a nearby speed,
        temperature or load; :meth:`carry` remains the search.

        ``jacobian``: ``dQ/dq`` of the neighbour, scaled by ``mu omega`` (the film forces'
        own scale); after each step Broyden's update (rank one, in coordinates weighted by
        :attr:`unit`) corrects it from the change of the residual, at no film solve; a
        step whose residual (weighted by :attr:`unit`) does not fall to a quarter computes
        it anew (about 15 film solves; a step costs 5).  Converged: ``|Q + target| <= tol
        x scale`` on the journal and lifts, and every carrying pad's moment within ``tol x
        scale x lever``.  A pad that loses its film on the way, or an idle pad that
        finds a tilt where it carries once converged (as :meth:`settle` searches), starts
        the iterations again with the new set of carrying pads (twice at most).
        """
        c = self.ring.bearing_clearance
        if self.thinnest(q) <= WALL * c:
            return None
        films = self.films(q, start=films)
        jac = None if jacobian is None else np.array(jacobian)
        for _ in range(3):          # again when a pad finds or loses its film
            found = self._newton(q, films, target, free, scale, tol, jac, max_iterations)
            if found is None or found[0] == "done":
                return None if found is None else found[1:]
            q, films, jac = *found[1:3], None      # the pad's column is new: computed anew
        return None

    def _newton(self, q, films, target, free, scale, tol, jac, max_iterations):
        """:meth:`polish`'s iterations with the carrying pads of ``films``: ("done", q,
        films), ("again", q, films) when a pad finds or loses its film on the way, or
        None."""
        idle = _idle(films)
        keep = _keep(self.ring.coordinates, idle)
        tilts = np.intersect1d(keep, np.arange(2, 2 + self.n))
        c, unit = self.ring.bearing_clearance, self.unit
        last = previous = None
        for step in range(max_iterations + 1):
            if _idle(films) != idle:                 # a pad lost (or found) its film
                return "again", q, films
            r = self.forces(q, films) + target
            if np.linalg.norm(r[free]) <= tol * scale and \
                    np.all(np.abs(r[tilts]) <= tol * scale * self.ring.lever):
                # a pad without film may have a tilt where it carries: settle() prefers it
                again = self.settle(q, scale, start=films, only=idle) if idle else (q, films)
                if again is None:
                    return None
                return ("done", *again) if _idle(again[1]) == idle else ("again", *again)
            size = float(np.linalg.norm((r * unit)[keep]))
            if step == max_iterations:
                return None
            if jac is None or (last is not None and size > 0.25 * last):
                jac = self.jacobian = self.derivative(q, films, 1e-6 * unit, central=False)
            elif previous is not None:             # Broyden: J s = the residual's change
                s, y = previous[0], r - previous[1]
                jac[np.ix_(keep, keep)] += np.outer(y[keep] - jac[np.ix_(keep, keep)] @ s[keep],
                                                    s[keep] / unit[keep] ** 2) / \
                    float(np.sum((s[keep] / unit[keep]) ** 2))
                self.jacobian = jac
            last = size
            dq = np.zeros(self.size)
            try:
                dq[keep] = -np.linalg.solve(jac[np.ix_(keep, keep)], r[keep])
            except np.linalg.LinAlgError:
                return None
            if not np.all(np.isfinite(dq)) or np.max(np.abs(dq[:2])) > 0.1 * c:
                return None
            previous = (dq, r)
            q = q + dq
            if self.thinnest(q) <= WALL * c:
                return None
            films = self.films(q, start=films)
        return None

    @property
    def film_scale(self):
        """``mean(mu) |omega|``: film forces at a given position scale with it."""
        return float(np.mean(self.mu)) * abs(self.omega)

    def carry(self, q, target, free, scale, tol, max_iterations=50):
        """``(q, films)`` with ``Q + target = 0`` on the ``free`` coordinates (journal and
        lifts; within ``tol x scale``) and every pad settled, or None.

        Each step tries Newton's step (halved up to five times), then steps along the
        residual itself, the way the net force pushes the journal and pivots (from 0.2
        ``C_b``, halved up to seven times): a pad without film adds nothing to the Jacobian,
        so where too few pads carry, Newton's step misses the pads that would.
        """
        found = self.settle(q, scale)
        if found is None:
            return None
        q, films = found
        r = (self.forces(q, films) + target)[free]
        c = self.ring.bearing_clearance
        for _ in range(max_iterations):
            if np.linalg.norm(r) <= tol * scale:
                return q, films
            self.iterations += 1
            jac = self.jacobian = self.derivative(q, films, 1e-6 * self.unit, central=False)
            slopes = np.diag(jac)[2:2 + self.n] / self.ring.lever
            p = np.intersect1d(_keep(self.ring.coordinates, _idle(films)), np.arange(2, 2 + self.n))
            moves = np.zeros((2, self.size))
            moves[1, free] = c * r / np.linalg.norm(r)
            try:
                follow = np.linalg.solve(jac[np.ix_(p, p)], jac[np.ix_(p, free)])
                moves[0, free] = -np.linalg.solve(
                    jac[np.ix_(free, free)] - jac[np.ix_(free, p)] @ follow, r)
                moves[:, p] = -moves[:, free] @ follow.T
            except np.linalg.LinAlgError:
                pass
            moves[0] *= min(1.0, 0.5 * c / max(float(np.max(np.abs(moves[0, free]))), 1e-300))
            for dq in [lam * moves[0] for lam in 0.5 ** np.arange(6)] + \
                    [lam * moves[1] for lam in 0.2 * 0.5 ** np.arange(8)]:
                trial = q + dq
                new = self.settle(trial, scale, slopes, films) if self.thinnest(trial) > WALL * c \
                    and np.all(np.isfinite(dq)) else None
                r_new = None if new is None else (self.forces(new[0], new[1]) + target)[free]
                if new is not None and np.linalg.norm(r_new) < (1 - 1e-6) * np.linalg.norm(r):
                    (q, films), r = new, r_new
                    break
            else:
                return None
        return None


@one_blas_thread
def pad_equilibrium(ring, speed, load, viscosity, *, options=FilmOptions(), tolerance=1e-9,
                    max_iterations=50, start=None):
    """The journal position, pad tilts (and pivot lifts) where the pads carry ``load``.

    Parameters
    ----------
    ring : PadRing
    speed : float
        Journal spin (rad/s), positive from +x towards +y.
    load : pair of float
        ``(Wx, Wy)`` (N) on the journal.
    viscosity : float or sequence of float
        Pa s: one for every pad, or one per pad (pads at their own temperatures).
    options : FilmOptions
        Grid (each pad) and cavitation model.
    tolerance : float
        Largest ``|F + W| / |W|`` accepted (and pivot imbalance over ``|W|``).
    max_iterations : int
        Newton steps allowed (per load step when the load is ramped).
    start : PadEquilibrium or pair of float, optional
        A neighbouring equilibrium, or a journal position (m), to try first.

    Returns
    -------
    PadEquilibrium

    Raises
    ------
    InputError
        Bad input.
    SolverError
        No equilibrium found.
    """
    _check_ring(ring, options)
    mu = pad_viscosities(ring, viscosity)
    omega, w, _ = check_operating(speed, load, float(np.mean(mu)))
    tol = number("tolerance", tolerance)
    if not 0.0 < tol < 1e-2:
        raise InputError("tolerance", "is out of range", value=tol,
                         expected="between 0 and 0.01", kind="range")
    iters = whole("max_iterations", max_iterations, 1, 1000)
    pads = _Pads(ring, omega, mu, options)
    target, scale = np.r_[w, np.zeros(pads.size - 2)], float(np.hypot(*w))
    free = np.r_[0, 1, np.arange(2 + ring.count, pads.size)]
    starts = [share * ring.bearing_clearance * w / scale for share in (0.3, 0.6, 0.85)]
    if isinstance(start, PadEquilibrium) and len(start.coordinates) == pads.size:
        starts.insert(0, start.coordinates)
    elif start is not None and not isinstance(start, PadEquilibrium):
        starts.insert(0, np.array(pair("start", start)))
    if isinstance(start, PadEquilibrium) and len(start.coordinates) == pads.size and \
            start.films and start.films[0].grid == (options.n_theta, options.n_z):
        jac = None if start.jacobian is None else \
            start.jacobian[0] * (pads.film_scale / start.jacobian[1])
        found = pads.polish(start.coordinates, start.films, target, free, scale, tol, jac)
        if found:
            return _equilibrium_of(pads, *found, w)
    for q in starts:
        q = q if len(q) == pads.size else pads.aligned(q)
        # the search to a rough balance, Newton's method from there (its steps are cheaper)
        rough = pads.thinnest(q) > 0.05 * ring.bearing_clearance and \
            pads.carry(q, target, free, scale, max(tol, ROUGH), iters)
        found = rough and (pads.polish(*rough, target, free, scale, tol) or
                           pads.carry(rough[0], target, free, scale, tol, iters))
        if found:
            return _equilibrium_of(pads, *found, w)
    found = (pads.aligned(np.zeros(2)),)
    for share in np.linspace(0.1, 1.0, 10):
        found = pads.carry(found[0], share * target, free, share * scale, tol, iters)
        if found is None:
            raise SolverError(f"no tilting-pad equilibrium found for the load ({w[0]:.6g}, "
                              f"{w[1]:.6g}) N at {omega:.6g} rad/s: the pads may not carry it "
                              "(a very light load on pads with little preload, where most "
                              "pads carry nothing, is the usual case)")
    return _equilibrium_of(pads, *found, w)


@one_blas_thread
def settle_pads(ring, speed, viscosity, position, *, options=FilmOptions(), tolerance=1e-9):
    """The pads settled (zero moments, pivots balanced) about a journal held at ``position``.

    Parameters
    ----------
    ring : PadRing
    speed : float
        rad/s.
    viscosity : float or sequence of float
        Pa s, for every pad or one per pad.
    position : pair of float
        Journal centre (m).
    options : FilmOptions
    tolerance : float
        Pivot imbalance accepted, as a share of ``mu N L D (R / C_b)^2``.

    Returns
    -------
    PadEquilibrium
        Its ``load`` is the load this position carries (minus the film force).
    """
    _check_ring(ring, options)
    omega, mu = number("speed", speed), pad_viscosities(ring, viscosity)
    pads = _Pads(ring, omega, mu, options)
    unit_load = float(np.mean(mu)) * abs(omega) / TWO_PI * ring.length * ring.diameter * (
        0.5 * ring.diameter / ring.bearing_clearance) ** 2
    found = pads.carry(pads.aligned(np.array(pair("position", position))),
                       np.zeros(pads.size), np.arange(2 + ring.count, pads.size), unit_load,
                       number("tolerance", tolerance))
    if found is None:
        raise SolverError(f"the pads found no balance about the journal at {position} m")
    return _equilibrium_of(pads, *found, -np.sum([f.force for f in found[1]], axis=0))
