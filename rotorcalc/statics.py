"""The rotor at rest under its weight and steady loads: deflection, slope and the reaction
at every journal bearing, from the finite-element model.

The rotor hangs on its journal bearings (seals and destabilising sources carry no static
load): ``K u = f`` with ``f`` the weight of every shaft element and disk (the consistent
mass matrix applied to the acceleration of gravity along ``Rotor.gravity``, "-y" by
default: y is vertical, up) plus the ``[[static_load]]`` forces and moments, and ``K`` the
shaft, journal and support stiffness at the maximum continuous speed (or the speed asked
for).  On two journals the reactions follow the lever rule whatever the stiffness
(statically determinate); on three or more they follow the shaft's and the bearings'
stiffness, as a continuous beam on springs does.  Bearings with a nonlinear
load-deflection relation (fluid films from their geometry) are not iterated here yet.
"""

from __future__ import annotations

import dataclasses
import math
from dataclasses import dataclass

import numpy as np
import scipy.sparse.linalg as spla

from .assembly import assemble
from .errors import InputError
from .vocabulary import CAUTION, BearingRole

#: Standard gravity, m/s^2 (a load is also reported as the mass it carries, load / g).
GRAVITY = 9.80665
#: Unit vectors (x, y) of the gravity directions a rotor file may name.
DIRECTIONS = {"-y": (0.0, -1.0), "+y": (0.0, 1.0), "-x": (-1.0, 0.0), "+x": (1.0, 0.0),
              "none": (0.0, 0.0)}


@dataclass(frozen=True)
class StaticSolution:
    """Deflection, slope and journal reactions of a rotor at rest.

    Attributes
    ----------
    speed : float
        rad/s at which the journals' stiffness was taken.
    gravity : str
    node_z : ndarray
        Axial position of every shaft node, m.
    displacement, slope : ndarray (n_nodes, 2)
        x and y deflection (m) and slopes dx/dz, dy/dz (rad) of every node.
    station_nodes : ndarray of int
    journals : tuple of (bearing index, name, station)
    reactions : ndarray (n_journals, 2)
        The force each journal bearing exerts on the shaft, x and y, N.
    applied : ndarray (2,)
        The total force applied (weight and steady loads), x and y, N.
    """

    speed: float
    gravity: str
    node_z: np.ndarray
    displacement: np.ndarray
    slope: np.ndarray
    station_nodes: np.ndarray
    journals: tuple
    reactions: np.ndarray
    applied: np.ndarray
    weight: float            # the rotor's weight, N (mass times g)

    @property
    def balance_error(self):
        """|sum of the reactions + the applied force| over the applied force (0 when
        nothing is applied): the check that the solve holds the rotor in equilibrium."""
        scale = float(np.linalg.norm(self.applied))
        total = self.reactions.sum(axis=0) + self.applied if len(self.reactions) else \
            self.applied
        return float(np.linalg.norm(total)) / scale if scale > 0 else 0.0

    @property
    def rows(self):
        """(name, station, fx N, fy N, magnitude N, share of the applied force) per journal."""
        scale = float(np.linalg.norm(self.applied))
        return [(name, station, float(r[0]), float(r[1]), float(np.hypot(*r)),
                 float(np.hypot(*r)) / scale if scale > 0 else math.nan)
                for (_, name, station), r in zip(self.journals, self.reactions)]

    @property
    def largest_deflection(self):
        """(deflection m, axial position m) of the node that moves most."""
        size = np.hypot(self.displacement[:, 0], self.displacement[:, 1])
        i = int(np.argmax(size))
        return float(size[i]), float(self.node_z[i])

    def summary(self):
        """The largest deflection in one sentence."""
        deflection, at = self.largest_deflection
        return (f"Largest static deflection {deflection * 1e6:.2f} um at {at * 1e3:.0f} mm "
                "from station 0 (bearings' and supports' own deflection included).")

    def plot(self, *, ax=None):
        """The deflected shaft (:func:`rotorcalc.plotting.plot_static_deflection`)."""
        from .plotting import plot_static_deflection
        return plot_static_deflection(self, ax=ax)

    def to_dict(self):
        deflection, at = self.largest_deflection
        return {
            "speed_rpm": self.speed * 30.0 / math.pi, "gravity": self.gravity,
            "weight_n": self.weight, "applied_n": [float(v) for v in self.applied],
            "reactions": [{"bearing": name, "station": int(station), "fx_n": fx, "fy_n": fy,
                           "magnitude_n": size, "share_of_applied": share}
                          for name, station, fx, fy, size, share in self.rows],
            "balance_error": self.balance_error,
            "largest_deflection_m": deflection, "largest_deflection_at_m": at,
            "nodes": [{"z_m": float(z), "x_m": float(u[0]), "y_m": float(u[1]),
                       "slope_x_rad": float(s[0]), "slope_y_rad": float(s[1])}
                      for z, u, s in zip(self.node_z, self.displacement, self.slope)],
            "caution": CAUTION,
        }


def static_solution(rotor, speed=None):
    """Solve the rotor at rest on its journal bearings (module docstring).

    Raises
    ------
    InputError
        When the journals leave the rotor free to move under the loads.
    """
    journals = [i for i, b in enumerate(rotor.bearings) if b.role == BearingRole.BEARING]
    hanging = dataclasses.replace(rotor, bearings=tuple(rotor.bearings[i] for i in journals),
                                  unbalance=(), sources=())
    system = assemble(hanging)
    omega = rotor.operating.max_speed if speed is None else float(speed)
    gx, gy = DIRECTIONS[rotor.gravity]
    accel = np.zeros(system.n_dof)
    tdofs = system.translation_dofs
    accel[tdofs[:, 0]], accel[tdofs[:, 1]] = gx * GRAVITY, gy * GRAVITY
    force = system.mass @ accel
    for load in rotor.static_loads:
        node = system.mesh.station_nodes[load.station]
        force[system.node_dofs(node)] += (load.fx, load.fy, load.mxz, load.myz)
    applied = np.array([force[tdofs[:, 0]].sum(), force[tdofs[:, 1]].sum()])
    u = np.zeros(system.n_dof)
    if np.any(force):
        u = _solve(system.stiffness(omega).tocsc(), force)
    reactions = []
    for link in system.links:
        k, _ = link.bearing.matrices(omega)
        rel = u[link.dofs[:2]] - (u[link.dofs[2:]] if len(link.dofs) == 4 else 0.0)
        reactions.append(-(k @ rel))
    reactions = np.array(reactions).reshape(-1, 2)
    # a component within roundoff of nothing is nothing (x reactions under gravity in y)
    reactions[np.abs(reactions) <= 1e-12 * max(float(np.linalg.norm(applied)), 1e-300)] = 0.0
    node_dofs = 4 * np.arange(system.mesh.n_nodes)
    return StaticSolution(
        omega, rotor.gravity, system.mesh.node_z,
        np.stack([u[node_dofs], u[node_dofs + 1]], axis=1),
        np.stack([u[node_dofs + 2], u[node_dofs + 3]], axis=1),
        system.mesh.station_nodes,
        tuple((i, rotor.bearings[i].name, rotor.bearings[i].station) for i in journals),
        reactions, applied, float(rotor.mass * GRAVITY))


def _solve(stiffness, force):
    try:
        with np.errstate(all="raise"):
            u = spla.spsolve(stiffness, force)
    except (RuntimeError, FloatingPointError, np.linalg.LinAlgError):
        u = np.full(len(force), np.nan)
    if not np.all(np.isfinite(u)) or \
            np.linalg.norm(stiffness @ u - force) > 1e-6 * np.linalg.norm(force):
        raise InputError("bearing", "leaves the rotor free to move under its weight and "
                         "static loads: there is no static equilibrium", value=None,
                         expected="journal bearings with stiffness in x and y at two "
                                  "stations at least", kind="physics")
    return u


def journal_static_loads(rotor, speed=None):
    """Static load of each journal bearing under the rotor's weight, as a mass (kg).

    Returns
    -------
    dict
        ``{bearing index: kg}``, the upward force on the shaft over g (a negative value:
        the journal is lifted); empty with fewer than two journals at distinct stations,
        or when the journals leave the rotor free.  Gravity along -y whatever the file
        says, and the file's steady loads left out: the residual-unbalance rule asks for
        the weight a journal carries.
    """
    journals = [i for i, b in enumerate(rotor.bearings) if b.role == BearingRole.BEARING]
    if len({rotor.bearings[i].station for i in journals}) < 2:
        return {}
    try:
        solution = static_solution(dataclasses.replace(rotor, gravity="-y", static_loads=()),
                                   speed)
    except InputError:
        return {}
    return {index: float(r[1] / GRAVITY)
            for (index, _, _), r in zip(solution.journals, solution.reactions)}
