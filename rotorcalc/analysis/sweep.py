"""Speed sweep: modes at each speed, solved independently, then tracked."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..assembly import SystemMatrices, assemble
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
    def whirl(self):
        """Whirl label of every point, (n_speeds, n_branches)."""
        return np.vectorize(whirl_label)(self.forward_fraction)

    @property
    def branch_whirl(self):
        """Dominant whirl label of each branch over the sweep."""
        mean = self.forward_fraction.mean(axis=0)
        return [whirl_label(f) for f in mean]

    def to_dict(self):
        ff = self.forward_fraction
        return {
            "speeds_rpm": [float(v) for v in to_rpm(self.speeds)],
            "branches": [
                {
                    "branch": j + 1,
                    "whirl": self.branch_whirl[j],
                    "frequency_hz": [float(v) for v in to_hz(self.frequency[:, j])],
                    "frequency_cpm": [float(v) for v in to_rpm(self.frequency[:, j])],
                    "log_dec": [float(v) for v in self.log_dec[:, j]],
                    "forward_fraction": [float(v) for v in ff[:, j]],
                }
                for j in range(self.eigenvalues.shape[1])
            ],
            "warnings": list(self.warnings),
        }


def sweep(rotor_or_system, speeds=None, n_modes=None, solver=None, progress=None):
    """Solve the modes at every speed and track the branches.

    Parameters
    ----------
    rotor_or_system : Rotor or SystemMatrices
    speeds : array_like, optional
        rad/s; by default :func:`default_speeds`.
    n_modes : int, optional
        Branches reported; defaults to ``settings.modes``.
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
    width = min(len(m.eigenvalues) for m in solved)
    values = np.array([m.eigenvalues[:width] for m in solved])
    shapes = np.array([m.shapes[:width] for m in solved])
    order = track(values, shapes)
    rows = np.arange(len(speeds))[:, None]
    values, shapes = values[rows, order], shapes[rows, order]
    keep = min(n, width)
    warnings = tuple(system.table_warnings(speeds))
    return Sweep(speeds, values[:, :keep], shapes[:, :keep], system.mesh.node_z,
                 system.mesh.station_nodes, warnings)
