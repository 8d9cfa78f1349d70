"""Tilting-pad journal bearings from their geometry: each pad a land that turns on its pivot.

Layout.  ``count`` equal pads of angular extent ``arc``; pad ``k`` has its pivot at
``theta_k = first_pivot + 2 pi k / count`` and spans ``theta_k - a arc`` to
``theta_k + (1 - a) arc``, ``a`` the pivot offset (0.5 a centre pivot, 0.6 a pivot towards
the trailing edge of a journal turning at positive speed, from +x towards +y; at negative
speed an offset pivot lies towards the leading edge).  A pad's surface has radius
``R + C_p`` and its centre of curvature lies ``m C_p`` from the bearing centre, opposite the
pivot: over the pivot the centred journal sees the bearing clearance ``C_b = (1 - m) C_p``
(preload ``m = 1 - C_b / C_p``).  Between pads the oil is at zero (gauge) pressure.

Film thickness.  Pad ``k`` turns by its tilt ``delta_k`` (rad, positive from +x towards +y)
about its pivot, which lies on the radial line at ``theta_k`` a distance ``lever = R + t``
from the pad's centre of curvature (``t`` the pad's thickness under its surface; ``C_p`` is
dropped against ``R``, as in the thin film itself), and the pivot moves outwards by its lift
``xi_k`` where it yields.  With ``e_k = (cos theta_k, sin theta_k)`` and
``t_k = (-sin theta_k, cos theta_k)`` the turn moves the centre of curvature by
``-lever delta_k t_k`` (first order in ``delta_k``), so the centre sits at
``o_k = (xi_k - m C_p) e_k - lever delta_k t_k`` and the land's film (geometry.py) is::

    h_k = C_p - x cos(theta) - y sin(theta) - (m C_p - xi_k) cos(theta - theta_k)
          - lever delta_k sin(theta - theta_k)
    dh_k/dt = -(x' cos(theta) + y' sin(theta)) + xi_k' cos(theta - theta_k)
              - lever delta_k' sin(theta - theta_k)

A positive tilt leaves the film over the pivot as it is and, at positive speed, closes the
pad's trailing part.  The arc's ends keep their angles (the rigid turn moves them by about
``lever delta_k``, a share of the clearance, against the radius).

Generalised forces (virtual work: a coordinate ``q`` that changes ``h`` receives
``int p dh/dq dA``): the journal receives the film force ``F = sum F_k`` (``F_k`` pad ``k``'s
force on the journal); pad ``k`` the moment about its pivot ``M_k = lever F_k . t_k`` and the
radial force ``-F_k . e_k``, less ``k_p xi_k`` where the pivot has stiffness ``k_p``.

Equilibrium: ``F + W = 0``, ``M_k = 0`` and, with yielding pivots, ``-F_k . e_k = k_p xi_k``.
At every journal position (and lifts) each pad is first settled in tilt, a root of its own
moment (``_Pads.settle``); Newton's method then moves the journal and the lifts, with a
forward-difference Jacobian condensed over the tilts (a pad's film depends on the journal
and on that pad only, so a Jacobian costs three or four film solves a pad), the tilts
following to first order, each step limited to half ``C_b`` and halved until the residual
``|F + W|`` (and the pivots' imbalance) falls, else replaced by a step along the residual
(``_Pads.carry``).  Starts: the journal 30, 60 and 85 % of
``C_b`` along the load, each pad tilted to follow the journal across its pivot line; last,
the load in ten steps.  A pad whose film only ever turns it back towards no film (an
unloaded pad) carries nothing: it is left out of the coefficients, with a note.

Coefficients: ``K = -dQ/dq`` and ``C = -dQ/dq'`` of the generalised forces ``Q`` over all
coordinates, by differences with the ruptured region held (as fixed_film.py: central for
``K``; one-sided for ``C``, exact since the held film is linear in the rates; steps
``d = step h_min`` on the journal and the lifts, ``d / lever`` on the tilts, times ``|speed|``
on the rates), checked by halving; ``M = diag(0, 0, I_p.., m_p..)``.  At whirl ``w``::

    Z(w) = K + i w C - w^2 M,    K_red + i w C_red = Z_jj - Z_jp Z_pp^-1 Z_pj

(synchronous ``w = |speed|`` by default); at ``w = 0`` the limit, ``K_red = K_jj - K_jp
K_pp^-1 K_pj`` and ``C_red = C_jj - C_jp G - H C_pj + H C_pp G`` with ``G = K_pp^-1 K_pj``,
``H = K_jp K_pp^-1``.  A journal moving along ``t_k`` changes ``h_k`` as ``lever delta_k``
does, so without pad inertia a pad passes force only along its pivot line and ``K_red``,
``C_red`` are symmetric (diagonal when layout and load are symmetric about the load line).
The pads' damping still makes them frequency dependent; pad inertia adds a skew part.

Limits: those of the film (docs/bearings.md section 9), rigid pads (no pad or pivot
deformation but the pivot's radial spring), no pivot friction, one effective temperature per
pad (isoviscous along it; pad_journal.py's heat balance, hot-oil carry-over lumped in one
share), pads flooded.

Screening only: confirm tilting-pad coefficients against the bearing maker's analysis, the
applicable standard, the purchase specification, local codes and a licensed engineer's review.
"""


from __future__ import annotations

import dataclasses
import math
from dataclasses import dataclass

import numpy as np

from ..errors import InputError, SolverError
from ..notices import Notice
from ..threads import one_blas_thread
from .film import FilmOptions, number
from .fixed_film import CAUTION, NAMES, dimensionless
from .pad_ring import PadFilm, PadRing, first_pivot_angle  # noqa: F401 (re-exported)
from .pad_settle import (PadEquilibrium, _check_ring, _idle, _keep, _Pads,  # noqa: F401
                         pad_equilibrium, settle_pads)


def condense(stiffness, damping, inertia, whirl, keep=2):
    """Stiffness and damping of the first ``keep`` coordinates with the others eliminated.

    Parameters
    ----------
    stiffness, damping, inertia : (N, N) array_like
        Full ``K``, ``C`` and ``M``.
    whirl : float or 1-D array_like
        Whirl frequency ``w`` (rad/s), or several (solved together); 0 gives the limit
        ``w -> 0`` (module's notes).
    keep : int
        Number of leading coordinates kept.

    Returns
    -------
    K_red, C_red : ndarray
        ``Re(Z_red)`` and ``Im(Z_red) / w``: ``(keep, keep)`` each, or ``(len(whirl), keep,
        keep)`` for several frequencies.
    """
    k, c, m = (np.asarray(a, dtype=float) for a in (stiffness, damping, inertia))
    one = np.ndim(whirl) == 0
    w = np.array([number("whirl", whirl)]) if one else np.asarray(whirl, dtype=float)
    j, p = slice(0, keep), slice(keep, None)
    kr, cr = np.empty((len(w), keep, keep)), np.empty((len(w), keep, keep))
    zero = w == 0.0
    if np.any(zero):
        g, h = np.linalg.solve(k[p, p], k[p, j]), np.linalg.solve(k[p, p].T, k[j, p].T).T
        kr[zero] = k[j, j] - k[j, p] @ g
        cr[zero] = c[j, j] - c[j, p] @ g - h @ c[p, j] + h @ c[p, p] @ g
    if not np.all(zero):
        v = w[~zero][:, None, None]
        z = k + 1j * v * c - v * v * m
        zr = z[:, j, j] - z[:, j, p] @ np.linalg.solve(z[:, p, p], z[:, p, j])
        kr[~zero], cr[~zero] = zr.real, zr.imag / v
    return (kr[0], cr[0]) if one else (kr, cr)


@dataclass(frozen=True)
class PadCoefficients:
    """Reduced journal coefficients of a tilting-pad bearing and the full linear set.

    Attributes
    ----------
    stiffness, damping : ndarray
        ``[[kxx, kxy], [kyx, kyy]]`` (N/m) and likewise C (N s/m), reduced at ``whirl``
        (force on the shaft ``-K q - C q'``).
    whirl : float
        Whirl frequency of the reduction (rad/s); :meth:`reduce` gives any other.
    full_stiffness, full_damping, full_inertia : ndarray
        ``K``, ``C``, ``M`` over ``coordinates`` (x, y in m; tilts in rad; lifts in m).
    coordinates : tuple of str
    equilibrium : PadEquilibrium
    step : float
        Journal perturbation of the matrices (m).
    step_change : tuple of float
        Relative change of the full K and C when the step was halved (NaN: not checked).
    warnings : tuple of Notice
    temperature : float or None
        Effective film temperature (K) where a bearing model chose the viscosity: the
        hottest pad's when the pads run at their own temperatures.
    pad_temperatures : ndarray or None
        Each pad's effective film temperature (K), where a bearing model chose them.
    """

    stiffness: np.ndarray
    damping: np.ndarray
    whirl: float
    full_stiffness: np.ndarray
    full_damping: np.ndarray
    full_inertia: np.ndarray
    coordinates: tuple
    equilibrium: PadEquilibrium
    step: float
    step_change: tuple
    warnings: tuple = ()
    temperature: float | None = None
    pad_temperatures: np.ndarray | None = None

    def dimensionless(self):
        """``(K C_b / W, C C_b omega / W)`` with ``C_b`` the bearing clearance."""
        return dimensionless(self.stiffness, self.damping, self.equilibrium)

    @property
    def idle_pads(self):
        """Pads (from 0) whose film carries nothing, left out of the coefficients."""
        return _idle(self.equilibrium.films)

    def reduce(self, whirl):
        """``(K_red, C_red)`` at another whirl frequency (rad/s), or stacked at several
        (:func:`condense`); pads that carry no film are left out."""
        keep = _keep(self.coordinates, _idle(self.equilibrium.films))
        return condense(*(a[np.ix_(keep, keep)] for a in (
            self.full_stiffness, self.full_damping, self.full_inertia)), whirl)

    def as_table(self):
        """``{"kxx": ..., ..., "cyy": ...}`` (N/m, N s/m)."""
        values = np.concatenate([self.stiffness.ravel(), self.damping.ravel()])
        return dict(zip(NAMES, (float(v) for v in values)))

    def to_dict(self):
        """Coefficients, full matrices, equilibrium, step check, warnings and caution (SI)."""
        return {"coefficients": self.as_table(), "whirl_rad_per_s": self.whirl,
                "equilibrium": self.equilibrium.to_dict(), "step_m": self.step,
                "step_change": [None if math.isnan(v) else v for v in self.step_change],
                "coordinates": list(self.coordinates),
                "full_stiffness": self.full_stiffness.tolist(),
                "full_damping": self.full_damping.tolist(), "film_temperature_K": self.temperature,
                "pad_temperatures_K": None if self.pad_temperatures is None
                else np.asarray(self.pad_temperatures).tolist(),
                "warnings": [w.to_dict() for w in self.warnings], "caution": CAUTION}


@one_blas_thread
def pad_coefficients(ring, speed, load, viscosity, *, whirl=None, options=FilmOptions(),
                     step=1e-3, step_tolerance=1e-3, tolerance=1e-9, start=None,
                     check_step=True, equilibrium=None):
    """Equilibrium, full linear set and reduced coefficients of a tilting-pad bearing.

    Parameters
    ----------
    ring : PadRing
    speed, load, viscosity
        As :func:`pad_equilibrium`.
    whirl : float, optional
        Whirl frequency of the reduction (rad/s); ``|speed|`` (synchronous) when None.
    options : FilmOptions
    step : float
        Journal perturbation as a share of the minimum film (1e-6 to 0.05); the tilts are
        moved by ``step h_min / lever``.
    step_tolerance : float
        Largest relative change of the full K or C on halving the step before a note.
    tolerance, start
        Of the equilibrium search (:func:`pad_equilibrium`).
    check_step : bool
        Compute the matrices again with twice the step and compare (twice the cost).
    equilibrium : PadEquilibrium, optional
        The equilibrium for these inputs, found already.

    Returns
    -------
    PadCoefficients
    """
    _check_ring(ring, options)
    share, limit = number("step", step), number("step_tolerance", step_tolerance)
    if not 1e-6 <= share <= 0.05:
        raise InputError("step", "is out of range", value=share,
                         expected="between 1e-6 and 0.05 of the minimum film", kind="range")
    if not limit > 0.0:
        raise InputError("step_tolerance", "must be positive", value=limit, kind="range")
    w = abs(number("speed", speed)) if whirl is None else number("whirl", whirl)
    eq = equilibrium or pad_equilibrium.__wrapped__(ring, speed, load, viscosity,
                                                    options=options, tolerance=tolerance,
                                                    start=start)
    pads = _Pads(ring, eq.speed, eq.pad_viscosity, options)
    q, films = eq.coordinates, list(eq.films)

    def matrices(d):
        steps = d * pads.unit / ring.bearing_clearance
        k = -pads.derivative(q, films, steps, hold=True)
        # held rupture: the film is linear in the rates, so one side is exact
        c = -pads.derivative(q, films, steps * abs(eq.speed), rate=True, hold=True,
                             central=False)
        return k, c

    d = share * eq.min_thickness
    k2, c2 = matrices(0.5 * d)
    change, warnings = (math.nan, math.nan), ()
    if check_step:
        k1, c1 = matrices(d)
        change = tuple(float(np.linalg.norm(a - b) / np.linalg.norm(b)) for a, b in
                       ((k1, k2), (c1, c2)))
        if max(change) > limit:
            warnings = (Notice(f"tilting-pad coefficients change by {100 * change[0]:.3g} % "
                               f"(stiffness) and {100 * change[1]:.3g} % (damping) when the "
                               "perturbation is halved: refine the grid or change the step",
                               code="note"),)
    n = ring.count
    m = np.diag(np.r_[0.0, 0.0, np.full(n, ring.pad_inertia),
                      np.full(pads.size - 2 - n, ring.pad_mass)])
    idle = _idle(films)
    if idle:
        warnings += (Notice(f"pad(s) {', '.join(str(k + 1) for k in idle)} carry no film at "
                            f"{eq.speed * 30 / math.pi:.0f} rpm (unloaded: their tilt is free and "
                            "they may flutter); left out of the coefficients", code="idle-pad",
                            speeds=(eq.speed,)),)
    result = PadCoefficients(None, None, w, k2, c2, m, ring.coordinates, eq, 0.5 * d, change,
                             warnings)
    try:
        kr, cr = result.reduce(w)
    except np.linalg.LinAlgError:
        raise SolverError("the pads' own stiffness is singular (check the load and the "
                          "preload)") from None
    return dataclasses.replace(result, stiffness=kr, damping=cr)
