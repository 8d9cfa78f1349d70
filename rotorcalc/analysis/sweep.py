"""Speed sweep: modes at each speed, solved independently, then tracked.

Because every speed is solved on its own (no state carried from one speed to
the next), the speeds can be shared among worker processes; the result is the
same, to the last bit, whatever the number of workers.
"""

from __future__ import annotations

import re
from dataclasses import dataclass

import numpy as np

from ..vocabulary import old_keywords
from ..assembly import SystemMatrices, assemble
from ..errors import InputError
from ..model import Rotor
from ..notices import Notice, record
from ..units import to_hz, to_rpm
from ..workers import worker_count, worker_pool  # noqa: F401 (the sweep's options)
from .reduced import Reduction, sweep_solver
from .modes import Readings, modes_at, read_only, whirl_label
from .tracking import track

#: Modes solved beyond the ones reported, so a branch that climbs past the
#: top of the window is not mistaken for the one entering it.
TRACKING_RESERVE = 4


def default_speeds(rotor: Rotor):
    """Sweep speeds from the rotor's settings; by default 0 to 1.5 x the top speed."""
    s = rotor.settings
    top = max(rotor.operating.max_speed, rotor.operating.trip_speed or 0.0)
    start = 0.0 if s.speed_from is None else s.speed_from
    stop = 1.5 * top if s.speed_to is None else s.speed_to
    if stop <= start and s.speed_to is not None:
        raise InputError("analysis.speed_to", "is not above the start of the sweep",
                         value=f"{to_rpm(stop):.6g} rpm",
                         expected=f"a speed above {to_rpm(start):.6g} rpm (speed_from, or 0 by "
                                  "default)", kind="order")
    if stop <= start:
        raise InputError("analysis.speed_from", "is not below the top of the sweep",
                         value=f"{to_rpm(start):.6g} rpm",
                         expected=f"a speed below {to_rpm(stop):.6g} rpm (speed_to, or 1.5 x "
                                  "the highest operating speed by default)", kind="order")
    return with_operating_speeds(np.linspace(start, stop, s.speed_count), rotor.operating,
                                 table_speeds(rotor))


def table_speeds(rotor):
    """Every speed of every bearing and seal coefficient table (rad/s).

    Coefficients are linear between table speeds, so a sharp feature of a table
    (a spike of cross-coupling, say) has its extreme on one of them: the sweep
    solves there, and stability is not judged between samples that straddle it.  A
    bearing computed from its geometry is left out: its table is a smooth fit, dense
    enough to read anywhere (:mod:`rotorcalc.bearings.tabulate`).
    """
    return sorted({float(v) for b in rotor.bearings if b.film is None for v in b.speeds})


def with_operating_speeds(grid, operating, more=()):
    """``grid`` with the minimum, maximum continuous and trip speeds (and ``more``)
    inserted where they lie inside it, so that what is judged at those speeds is
    solved there."""
    extra = [v for v in (operating.min_speed, operating.max_speed, operating.trip_speed,
                         *more)
             if v is not None and grid[0] <= v <= grid[-1]]
    grid = np.sort(np.concatenate([grid, extra]))
    keep = np.concatenate([[True], np.diff(grid) > 1e-9 * max(grid[-1], 1e-300)])
    return grid[keep]


@dataclass(frozen=True)
class Sweep(Readings):
    """Tracked modes over a speed sweep.

    Attributes
    ----------
    speeds : ndarray (n_speeds,)
        rad/s.
    eigenvalues : complex ndarray (n_speeds, n_branches)
        Column ``j`` follows one branch along the sweep.
    shapes : complex ndarray (n_speeds, n_branches, n_nodes, 2)
    node_z, station_nodes : ndarray
    warnings : tuple of str
    growth : ndarray (n_speeds,)
        Largest non-oscillatory eigenvalue found at each speed, rad/s (-inf
        where there is none): above zero, the rotor diverges without whirling.
    reduction : Reduction or None
        The basis size and largest certified residual when the sweep was solved on
        a reduced basis (:mod:`rotorcalc.analysis.reduced`); None for full solves.
    """

    speeds: np.ndarray
    eigenvalues: np.ndarray
    shapes: np.ndarray
    node_z: np.ndarray
    station_nodes: np.ndarray
    warnings: tuple = ()
    growth: np.ndarray | None = None
    reduction: Reduction | None = None

    def __post_init__(self):
        read_only(self)

    @property
    def present(self):
        """True where a branch exists, (n_speeds, n_branches)."""
        return np.isfinite(self.eigenvalues.real)

    @property
    def whirl(self):
        """Whirl label of every point, (n_speeds, n_branches); "" where absent."""
        ff, present = self.forward_fraction, self.present
        return np.array([[whirl_label(f) if p else "" for f, p in zip(row, prow)]
                         for row, prow in zip(ff, present)])

    @property
    def branch_whirl(self):
        """Dominant whirl label of each branch over the sweep."""
        mean = np.nanmean(np.where(self.present, self.forward_fraction, np.nan), axis=0)
        return [whirl_label(f) for f in mean]

    def plot(self, *, ax=None, criticals=(), operating=None, orders=(1.0,)):
        """The whirl-speed map of this sweep (:func:`rotorcalc.plotting.plot_whirl_speed_map`)."""
        from ..plotting import plot_whirl_speed_map
        return plot_whirl_speed_map(self, criticals, operating, orders, ax=ax)

    def to_dict(self):
        ff = self.forward_fraction
        return {
            "speeds_rpm": [float(v) for v in to_rpm(self.speeds)],
            "branches": [
                {
                    "branch": j + 1,
                    "whirl": self.branch_whirl[j],
                    "frequency_hz": _listed(to_hz(self.frequency[:, j])),
                    "frequency_cpm": _listed(to_rpm(self.frequency[:, j])),
                    "log_dec": _listed(self.log_dec[:, j]),
                    "forward_fraction": _listed(np.where(self.present[:, j], ff[:, j], np.nan)),
                }
                for j in range(self.eigenvalues.shape[1])
            ],
            "warnings": [record(w) for w in self.warnings],
            "reduced_basis": None if self.reduction is None else self.reduction.to_dict(),
        }


def _listed(values):
    """Floats for JSON, None where a branch is absent."""
    return [float(v) if np.isfinite(v) else None for v in values]


@old_keywords(n_modes="mode_count")
def sweep(rotor_or_system, speeds=None, mode_count=None, solver=None, progress=None, workers=1):
    """Solve the modes at every speed and track the branches.

    Parameters
    ----------
    rotor_or_system : Rotor or SystemMatrices
    speeds : array_like, optional
        rad/s; by default :func:`default_speeds`.
    mode_count : int, optional
        Every branch that is among the ``mode_count`` lowest modes at some speed is
        reported; defaults to ``settings.mode_count``.
    solver : callable, optional
        From :func:`rotorcalc.solvers.make_solver`, or a
        :class:`~rotorcalc.analysis.reduced.ReducedSolver`; by default the reduced
        basis on large models over many speeds, else ``"auto"``
        (:func:`~rotorcalc.analysis.reduced.sweep_solver`).  With ``workers > 1`` it
        must be picklable (the package's solvers are).
    progress : callable, optional
        Called as ``progress(done, total)`` after each speed (after each batch
        of speeds with several workers).
    workers : int
        Worker processes sharing the speeds; 1 (the default) solves in this
        process, 0 uses one per available core.  The result does not depend
        on it.

    Returns
    -------
    Sweep
    """
    system = rotor_or_system if isinstance(rotor_or_system, SystemMatrices) \
        else assemble(rotor_or_system)
    speeds = default_speeds(system.rotor) if speeds is None else np.asarray(speeds, dtype=float)
    n = system.rotor.settings.mode_count if mode_count is None else mode_count
    solver = sweep_solver(system, speeds, solver)
    solved = solve_speeds(system, speeds, n + TRACKING_RESERVE, solver, progress, workers)
    values, shapes = branches_from(solved, n)
    warnings = list(system.table_warnings(speeds))
    warnings.extend(_solver_warnings(solved, speeds))
    growth = np.array([m.growth for m in solved])
    reduction = solver.summary(system) if hasattr(solver, "summary") else None
    return Sweep(speeds, values, shapes, system.mesh.node_z, system.mesh.station_nodes,
                 tuple(warnings), growth, reduction)


@dataclass(frozen=True)
class Solved:
    """What the sweep keeps of the modes at one speed (the full vectors are dropped)."""

    eigenvalues: np.ndarray
    shapes: np.ndarray
    warnings: tuple
    growth: float = -np.inf


def _solve_batch(system, speeds, n_solve, solver):
    out = []
    for speed in speeds:
        m = modes_at(system, speed, n_solve, solver)
        growth = float(m.real_eigenvalues.max()) if len(m.real_eigenvalues) else -np.inf
        out.append(Solved(m.eigenvalues, m.shapes, m.warnings, growth))
    return out


#: Batches per worker: enough for an even load and a moving progress bar, few
#: enough that sending the system matrices with each batch costs nothing.
BATCHES_PER_WORKER = 4


def solve_speeds(system, speeds, n_solve, solver=None, progress=None, workers=1):
    """:class:`Solved` modes at every speed, in order, with ``workers`` processes."""
    workers = 1 if getattr(solver, "in_process", False) else \
        min(worker_count(workers), len(speeds))
    if workers <= 1:
        out = []
        for i, speed in enumerate(speeds):
            out.extend(_solve_batch(system, [speed], n_solve, solver))
            if progress is not None:
                progress(i + 1, len(speeds))
        return out
    batches = [b for b in np.array_split(np.asarray(speeds), workers * BATCHES_PER_WORKER)
               if len(b)]
    out = []
    with worker_pool(workers) as pool:
        futures = [pool.submit(_solve_batch, system, b, n_solve, solver) for b in batches]
        for future in futures:
            out.extend(future.result())
            if progress is not None:
                progress(len(out), len(speeds))
    return out


def _solver_warnings(solved, speeds):
    """One line per distinct solver warning, with the speeds it came from."""
    seen = {}
    for m, speed in zip(solved, speeds):
        for w in m.warnings:
            if getattr(w, "code", None) in ("solver-doubt", "reduced-basis"):
                # drop the numbers in parentheses (they differ per speed), keep the rest
                text = re.sub(r" \([^)]*\)", "", w)
                seen.setdefault((text, w.code), []).append(speed)
    return [Notice(f"{text} at {len(at)} of {len(speeds)} speeds (first at "
                   f"{to_rpm(at[0]):.0f} rpm)", code, at)
            for (text, code), at in seen.items()]


def branches_from(solved, n):
    """Track the modes of each speed into branches; keep those among the lowest ``n``.

    A branch is kept when, at some speed, it is one of the ``n`` lowest modes
    there.  Branches are ordered by the frequency at which they first appear
    (for branches present from the first speed: by frequency there).
    Absent points are NaN.
    """
    paths = track([m.eigenvalues for m in solved], [m.shapes for m in solved])
    n_nodes = solved[0].shapes.shape[1]
    keep = np.zeros(paths.shape[1], dtype=bool)
    for k, m in enumerate(solved):
        for j in np.nonzero(paths[k] >= 0)[0]:
            if paths[k, j] < n:  # modes at each speed are sorted by frequency
                keep[j] = True
    first = np.argmax(paths >= 0, axis=0)
    start_freq = np.array([solved[first[j]].eigenvalues[paths[first[j], j]].imag
                           for j in range(paths.shape[1])])
    chosen = sorted(np.nonzero(keep)[0], key=lambda j: (first[j] > 0, start_freq[j], first[j]))
    values = np.full((len(solved), len(chosen)), np.nan + 1j * np.nan)
    # written once, speed by speed (a large model's shapes are hundreds of MB)
    shapes = np.empty((len(solved), len(chosen), n_nodes, 2), dtype=complex)
    for k, m in enumerate(solved):
        at = paths[k, chosen]
        there = at >= 0
        values[k, there] = m.eigenvalues[at[there]]
        shapes[k, there] = m.shapes[at[there]]
        shapes[k, ~there] = np.nan + 1j * np.nan
    return values, shapes
