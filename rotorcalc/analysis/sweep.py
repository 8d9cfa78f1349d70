"""Speed sweep: modes at each speed, solved independently, then tracked."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..assembly import SystemMatrices, assemble
from ..errors import InputError
from ..model import Rotor
from ..units import to_hz, to_rpm
from .modes import forward_fraction, log_decrement, modes_at, whirl_label
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
    if stop <= start:
        raise InputError("analysis.speed_from", "is not below the top of the sweep",
                         value=f"{to_rpm(start):.6g} rpm",
                         expected=f"a speed below {to_rpm(stop):.6g} rpm (speed_to, or 1.5 x "
                                  "the highest operating speed by default)", kind="order")
    return np.linspace(start, stop, s.speed_count)


@dataclass(frozen=True)
class Sweep:
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
    """

    speeds: np.ndarray
    eigenvalues: np.ndarray
    shapes: np.ndarray
    node_z: np.ndarray
    station_nodes: np.ndarray
    warnings: tuple = ()

    @property
    def frequency(self):
        return self.eigenvalues.imag

    @property
    def log_dec(self):
        return log_decrement(self.eigenvalues)

    @property
    def forward_fraction(self):
        return forward_fraction(self.shapes)

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
            "warnings": list(self.warnings),
        }


def _listed(values):
    """Floats for JSON, None where a branch is absent."""
    return [float(v) if np.isfinite(v) else None for v in values]


def sweep(rotor_or_system, speeds=None, n_modes=None, solver=None, progress=None):
    """Solve the modes at every speed and track the branches.

    Parameters
    ----------
    rotor_or_system : Rotor or SystemMatrices
    speeds : array_like, optional
        rad/s; by default :func:`default_speeds`.
    n_modes : int, optional
        Every branch that is among the ``n_modes`` lowest modes at some speed is
        reported; defaults to ``settings.modes``.
    solver : callable, optional
    progress : callable, optional
        Called as ``progress(done, total)`` after each speed.

    Returns
    -------
    Sweep
    """
    system = rotor_or_system if isinstance(rotor_or_system, SystemMatrices) \
        else assemble(rotor_or_system)
    speeds = default_speeds(system.rotor) if speeds is None else np.asarray(speeds, dtype=float)
    n = system.rotor.settings.modes if n_modes is None else n_modes
    solved = []
    for i, speed in enumerate(speeds):
        solved.append(modes_at(system, speed, n + TRACKING_RESERVE, solver))
        if progress is not None:
            progress(i + 1, len(speeds))
    values, shapes = branches_from(solved, n)
    warnings = tuple(system.table_warnings(speeds))
    return Sweep(speeds, values, shapes, system.mesh.node_z, system.mesh.station_nodes, warnings)


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
    shapes = np.full((len(solved), len(chosen), n_nodes, 2), np.nan + 1j * np.nan)
    for col, j in enumerate(chosen):
        for k, m in enumerate(solved):
            i = paths[k, j]
            if i >= 0:
                values[k, col] = m.eigenvalues[i]
                shapes[k, col] = m.shapes[i]
    return values, shapes
