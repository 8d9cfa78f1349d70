"""The rotor at rest under its weight and steady loads: deflection, slope and the reaction
at every journal bearing, from the finite-element model.

The rotor hangs on its journal bearings (seals and destabilising sources carry no static
load): ``K u = f`` with ``f`` the weight of every shaft element and disk (the consistent
mass matrix applied to the acceleration of gravity along ``Rotor.gravity``, "-y" by
default: y is vertical, up) plus the ``[[static_load]]`` forces and moments, and ``K`` the
shaft, journal and support stiffness at the maximum continuous speed (or the speed asked
for).  On two journals the reactions follow the lever rule whatever the stiffness
(statically determinate); on three or more they follow the shaft's and the bearings'
stiffness, as a continuous beam on springs does.

Journal bearings computed from their geometry (``Bearing.film``) carry their load by a
nonlinear film: Newton's method on the journal loads.  Each step linearises every film
about its equilibrium under the current load ``W`` (position ``p``, tangent stiffness
``K``), so the film's force on the shaft is ``-W - K (q - p)`` at journal displacement
``q``, solves the linear rotor for ``q`` and takes the new load ``W + K (q - p)``; it
stops when no load changes by more than :data:`LOAD_TOLERANCE` of the applied force.  On
two journals the first step is exact (the lever rule); more take a few steps.  The
journals' film states (eccentricity, minimum film, temperature) come with the solution.
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

#: Newton on film journal loads stops when no load changes by more than this share of
#: the applied force, within :data:`FILM_STEPS` steps.
LOAD_TOLERANCE = 1e-7
FILM_STEPS = 30
#: Stiffness (N/m) of the rigid start that gives the films their first loads.
STIFF_START = 1e11
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
    #: (bearing index, FilmCoefficients) of each journal computed from its geometry:
    #: its equilibrium in the film under the static load, and the coefficients there.
    films: tuple = ()

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
    def film_rows(self):
        """(name, speed rad/s, load N, eccentricity, attitude rad, min film m, film K,
        Sommerfeld, power W, flow m^3/s) of each journal computed from its geometry."""
        names = {i: name for i, name, _ in self.journals}
        out = []
        for index, state in self.films:
            eq = state.equilibrium
            out.append((names[index], self.speed, float(np.hypot(*eq.load)),
                        eq.eccentricity_ratio, eq.attitude_angle, eq.min_thickness,
                        state.temperature, eq.sommerfeld, eq.power_loss, eq.side_leakage))
        return out

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
            "film_journals": [{"bearing": row[0], **state.to_dict()}
                              for row, (_, state) in zip(self.film_rows, self.films)],
            "nodes": [{"z_m": float(z), "x_m": float(u[0]), "y_m": float(u[1]),
                       "slope_x_rad": float(s[0]), "slope_y_rad": float(s[1])}
                      for z, u, s in zip(self.node_z, self.displacement, self.slope)],
            "caution": CAUTION,
        }


def static_solution(rotor, speed=None, *, starts=None, check_step=False):
    """Solve the rotor at rest on its journal bearings (module docstring).

    Parameters
    ----------
    rotor : Rotor
    speed : float, optional
        rad/s; the maximum continuous speed by default.
    starts : dict, optional
        ``{bearing index: FilmCoefficients}`` of film journals at a nearby state: their
        journal positions and temperatures start this solve's film searches.
    check_step : bool
        Check the film coefficients' perturbation step (see
        :func:`rotorcalc.bearings.coefficients`).

    Raises
    ------
    InputError
        When the journals leave the rotor free to move under the loads, or when film
        journals are asked to carry a load at rest.
    """
    journals = [i for i, b in enumerate(rotor.bearings) if b.role == BearingRole.BEARING]
    hanging = dataclasses.replace(rotor, bearings=tuple(rotor.bearings[i] for i in journals),
                                  unbalance=(), sources=())
    omega = rotor.operating.max_speed if speed is None else float(speed)
    films = [k for k, b in enumerate(hanging.bearings) if b.film is not None]
    if films and omega == 0.0:
        raise InputError("speed", "is zero, but film bearings carry no steady load at rest",
                         value=0.0, expected="a running speed (the film needs it)",
                         kind="range")
    system = assemble(_linearised(hanging, {k: (np.eye(2) * STIFF_START, None, None)
                                            for k in films}))
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
    states = {}
    if films:
        u, system, states = _film_newton(hanging, films, omega, force, u, system,
                                         {journals.index(i): c for i, c in
                                          (starts or {}).items() if i in journals},
                                         check_step, float(np.linalg.norm(applied)))
    reactions = []
    for k, link in enumerate(system.links):
        stiffness, _ = link.bearing.matrices(omega)
        rel = _relative(u, link)
        if k in states:     # the film's force, linearised about its equilibrium
            eq = states[k].equilibrium
            reactions.append(-eq.load - stiffness @ (rel - eq.position))
        else:
            reactions.append(-(stiffness @ rel))
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
        reactions, applied, float(rotor.mass * GRAVITY),
        tuple((journals[k], states[k]) for k in sorted(states)))


def _relative(u, link):
    """Journal displacement relative to its support (or to ground)."""
    return u[link.dofs[:2]] - (u[link.dofs[2:]] if len(link.dofs) == 4 else 0.0)


def _linearised(rotor, springs):
    """``rotor`` with the bearings ``springs`` keys replaced by constant stiffness
    (``{index: (K, ...)}``), supports kept."""
    bearings = list(rotor.bearings)
    for k, (stiffness, _, _) in springs.items():
        b = bearings[k]
        bearings[k] = type(b)(station=b.station, name=b.name, support=b.support, key=b.key,
                              film=b.film,
                              coefficients=dict(zip(("kxx", "kxy", "kyx", "kyy"),
                                                    ((float(v),) for v in stiffness.ravel()))))
    return dataclasses.replace(rotor, bearings=tuple(bearings))


def _film_newton(rotor, films, omega, force, u, system, starts, check_step, scale):
    """Newton on the film journals' loads (module docstring): (u, system, states)."""
    loads = {k: -_reaction_of_stiff(u, system.links[k]) for k in films}
    for k in films:
        if float(np.hypot(*loads[k])) <= 1e-9 * max(scale, 1.0):
            b = rotor.bearings[k]
            raise InputError(f"{b.key}.film", f"carries no static load (bearing {b.name!r}: "
                             "the statics give it none), and a film computed from its "
                             "geometry needs one to find where the journal runs", value=None,
                             expected="a load on it ([statics] gravity, [[static_load]]), or "
                                      "the bearing's coefficient tables", kind="physics")
    states = {}
    for _ in range(FILM_STEPS):
        for k in films:
            film = rotor.bearings[k].film
            start, guess = _warm(film, states.get(k) or starts.get(k))
            states[k] = film.coefficients(omega, tuple(loads[k]), check_step=check_step,
                                          start=start, temperature=guess)
        system = assemble(_linearised(rotor, {k: (states[k].stiffness, None, None)
                                              for k in films}))
        pre = np.zeros(system.n_dof)
        for k in films:
            link, eq = system.links[k], states[k].equilibrium
            offset = states[k].stiffness @ eq.position - eq.load
            pre[link.dofs[:2]] += offset
            if len(link.dofs) == 4:
                pre[link.dofs[2:]] -= offset
        u = _solve(system.stiffness(omega).tocsc(), force + pre)
        new = {k: states[k].equilibrium.load + states[k].stiffness @
               (_relative(u, system.links[k]) - states[k].equilibrium.position) for k in films}
        change = max(float(np.linalg.norm(new[k] - loads[k])) for k in films)
        loads = new
        if change <= LOAD_TOLERANCE * max(scale, 1e-300):
            return u, system, states
    raise InputError("bearing", "film journals found no static equilibrium together "
                     f"(the loads still changed by {change:.3g} N after {FILM_STEPS} Newton "
                     "steps)", value=None, expected="film bearings that can carry the "
                     "rotor's weight and static loads at this speed", kind="physics")


def _warm(film, state):
    """(start, temperature guess) of a film search from a neighbouring film state: what
    the model takes from an equilibrium (a position; the pads' tilts too) and the film
    temperature (each pad's where the pads have their own)."""
    if state is None:
        return None, None
    pads = getattr(state, "pad_temperatures", None)
    return film._start_of(state.equilibrium), state.temperature if pads is None else pads


def _reaction_of_stiff(u, link):
    return -(link.bearing.matrices(0.0)[0] @ _relative(u, link))


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


def journal_static_loads(rotor, speed=None, *, starts=None):
    """Static load of each journal bearing under the rotor's weight, as a mass (kg).

    Returns
    -------
    dict
        ``{bearing index: kg}``, the upward force on the shaft over g (a negative value:
        the journal is lifted); empty with fewer than two journals at distinct stations,
        or when the journals leave the rotor free.  Gravity along -y whatever the file
        says, and the file's steady loads left out: the residual-unbalance rule asks for
        the weight a journal carries.  ``starts``: as :func:`static_solution`'s (film
        journals at a nearby state).  The rules read it through
        :func:`rotorcalc.bearings.tabulate.journal_static_loads`, which memoises it and
        starts film journals from their tables' states.
    """
    journals = [i for i, b in enumerate(rotor.bearings) if b.role == BearingRole.BEARING]
    if len({rotor.bearings[i].station for i in journals}) < 2:
        return {}
    try:
        solution = static_solution(dataclasses.replace(rotor, gravity="-y", static_loads=()),
                                   speed, starts=starts)
    except InputError:
        return {}
    return {index: float(r[1] / GRAVITY)
            for (index, _, _), r in zip(solution.journals, solution.reactions)}
