"""Eight linear coefficients of a fixed-geometry film bearing at its static equilibrium.

About the equilibrium ``q0`` the film force on the journal is linearised as
``F(q0 + dq, dq') = F(q0) - K dq - C dq'``, the sign convention of
:class:`rotorcalc.supports.Bearing` (force on the shaft ``-K q - C q'``), so::

    K[:, j] = -(F(q0 + d e_j) - F(q0 - d e_j)) / (2 d)
    C[:, j] = -(F(q0, +v e_j) - F(q0, -v e_j)) / (2 v)

with ``d = step x h_min`` (m) and ``v = step x h_min x |speed|`` (m/s).

The ruptured region is held at its equilibrium extent in the perturbed solves
(``rupture="held"``, the default): the linearised film of the perturbation
methods, in which the rupture boundary's motion contributes nothing to first
order (pressure, and with the Reynolds condition its gradient too, vanish
there).  On a grid, letting the region move (``rupture="solved"``) makes the
force a piecewise-smooth function of the state: a node that changes side within
the step puts a kink in the difference quotient.  Each
matrix is computed twice, with ``d, v`` and with ``d/2, v/2``; the second is
returned, and when the two differ by more than ``step_tolerance`` (relative,
Frobenius norm) a warning record says so: the film's active set (where it
ruptures) moved within the step, or the step is too coarse for the grid.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ..errors import InputError
from ..notices import Notice
from ..threads import one_blas_thread
from .equilibrium import Equilibrium, find_equilibrium
from .film import FilmOptions, number, solve_film

NAMES = ("kxx", "kxy", "kyx", "kyy", "cxx", "cxy", "cyx", "cyy")

#: How the perturbed solves treat the ruptured region (see the module's notes).
RUPTURE_CHOICES = ("held", "solved")

#: Screening caution carried by every result.
CAUTION = ("Screening only: fluid-film coefficients from an isoviscous, laminar, rigid, "
           "aligned model; confirm against the bearing maker's data, the applicable "
           "standard, the purchase specification, local codes and a licensed engineer's "
           "review.")


@dataclass(frozen=True)
class FilmCoefficients:
    """Stiffness and damping of a film bearing at one speed and load.

    Attributes
    ----------
    stiffness : ndarray
        ``K = [[kxx, kxy], [kyx, kyy]]`` (N/m).
    damping : ndarray
        ``C = [[cxx, cxy], [cyx, cyy]]`` (N s/m).
    equilibrium : Equilibrium
    step, velocity_step : float
        The perturbations of the returned matrices (m, m/s).
    step_change : tuple of float
        Relative change of K and of C when the step was halved.
    warnings : tuple of Notice
    """

    stiffness: np.ndarray
    damping: np.ndarray
    equilibrium: Equilibrium
    step: float
    velocity_step: float
    step_change: tuple
    warnings: tuple = ()
    #: Effective film temperature (K) where a bearing model chose the viscosity.
    temperature: float | None = None

    def dimensionless(self):
        """``(K C / W, C C omega / W)`` with ``C`` the reference clearance."""
        return dimensionless(self.stiffness, self.damping, self.equilibrium)

    def as_table(self):
        """``{"kxx": ..., ..., "cyy": ...}`` (N/m, N s/m)."""
        values = np.concatenate([self.stiffness.ravel(), self.damping.ravel()])
        return dict(zip(NAMES, (float(v) for v in values)))

    def to_dict(self):
        """Coefficients, equilibrium, step check and warnings (SI)."""
        k_bar, c_bar = self.dimensionless()
        return {"coefficients": self.as_table(),
                "dimensionless": dict(zip(NAMES, np.concatenate([k_bar.ravel(),
                                                                 c_bar.ravel()]).tolist())),
                "equilibrium": self.equilibrium.to_dict(), "step_m": self.step,
                "velocity_step_m_per_s": self.velocity_step,
                "step_change": {"stiffness": _number_or_none(self.step_change[0]),
                                "damping": _number_or_none(self.step_change[1])},
                "film_temperature_K": self.temperature,
                "warnings": [w.to_dict() for w in self.warnings], "caution": CAUTION}


def dimensionless(stiffness, damping, eq):
    """``(K C / W, C C omega / W)`` at an equilibrium ``eq`` (its clearance, load, speed)."""
    load = float(np.hypot(*eq.load))
    return stiffness * eq.clearance / load, damping * eq.clearance * abs(eq.speed) / load


def _number_or_none(value):
    return None if math.isnan(value) else float(value)


def _derivatives(geometry, eq, options, dq, dv, hold):
    """Central differences of the film force about the equilibrium: (K, C)."""
    solve = solve_film.__wrapped__
    mats = []
    for kind, size in (("position", dq), ("velocity", dv)):
        mat = np.empty((2, 2))
        for j in range(2):
            forces = []
            for sign in (1.0, -1.0):
                shift = np.zeros(2)
                shift[j] = sign * size
                position = eq.position + (shift if kind == "position" else 0.0)
                velocity = shift if kind == "velocity" else np.zeros(2)
                film = solve(geometry, eq.speed, eq.viscosity, tuple(position),
                             tuple(velocity), options=options, start=eq.film,
                             hold_rupture=hold)
                forces.append(film.force)
            mat[:, j] = -(forces[0] - forces[1]) / (2.0 * size)
        mats.append(mat)
    return mats


def _change(coarse, fine):
    return float(np.linalg.norm(coarse - fine) / max(np.linalg.norm(fine), 1e-300))


@one_blas_thread
def coefficients(geometry, speed, load, viscosity, *, options=FilmOptions(), step=1e-3,
                 step_tolerance=1e-3, rupture="held", tolerance=1e-9, start=None,
                 check_step=True, equilibrium=None):
    """Static equilibrium and the eight linear coefficients of a film bearing.

    Parameters
    ----------
    geometry : PlainBore, LobedBore or another film geometry
    speed : float
        Journal spin (rad/s), positive from +x towards +y (negative: the other way).
    load : pair of float
        ``(Wx, Wy)`` (N) acting on the journal (gravity: ``(0, -m g)``).
    viscosity : float
        Pa s.
    options : FilmOptions
        Grid and cavitation model.
    step : float
        Perturbation as a share of the minimum film thickness (1e-6 to 0.05).
    step_tolerance : float
        Largest relative change of K or C on halving the step before a warning.
    rupture : str
        ``"held"`` (the ruptured region kept at its equilibrium extent) or
        ``"solved"`` (solved anew in each perturbed film).
    tolerance : float
        Equilibrium residual ``|F + W| / |W|`` accepted.
    start : pair of float, optional
        Journal position (m) the equilibrium search tries first.
    check_step : bool
        Compute the matrices again with half the step and compare (the default);
        False halves the cost and reports the step change as NaN (a caller checking
        the step at some points of a series only).
    equilibrium : Equilibrium, optional
        The equilibrium for these inputs when the caller has found it already.

    Returns
    -------
    FilmCoefficients
    """
    share = number("step", step)
    if not 1e-6 <= share <= 0.05:
        raise InputError("step", "is out of range", value=share,
                         expected="between 1e-6 and 0.05 of the minimum film", kind="range")
    limit = number("step_tolerance", step_tolerance)
    if not limit > 0.0:
        raise InputError("step_tolerance", "must be positive", value=limit, kind="range")
    if rupture not in RUPTURE_CHOICES:
        raise InputError("rupture", "is not a known choice", value=rupture,
                         expected=" or ".join(RUPTURE_CHOICES), kind="choice")
    hold = rupture == "held"
    eq = equilibrium or find_equilibrium.__wrapped__(
        geometry, speed, load, viscosity, options=options, tolerance=tolerance, start=start)
    dq = share * eq.min_thickness
    dv = dq * abs(eq.speed)
    k2, c2 = _derivatives(geometry, eq, options, 0.5 * dq, 0.5 * dv, hold)
    change = (math.nan, math.nan)
    if check_step:
        k1, c1 = _derivatives(geometry, eq, options, dq, dv, hold)
        change = (_change(k1, k2), _change(c1, c2))
    warnings = ()
    if check_step and max(change) > limit:
        warnings = (Notice(f"film coefficients change by {100 * change[0]:.3g} % (stiffness) "
                           f"and {100 * change[1]:.3g} % (damping) when the perturbation is "
                           f"halved, more than {100 * limit:.3g} %: refine the grid or change "
                           "the step", code="note"),)
    for mat in (k2, c2):
        mat.flags.writeable = False
    return FilmCoefficients(k2, c2, eq, 0.5 * dq, 0.5 * dv, change, warnings)
