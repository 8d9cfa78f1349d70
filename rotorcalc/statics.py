"""Static journal loads under the rotor's own weight, from the finite-element model.

The rotor hangs on its journal bearings (seals carry no static load here):
``K u = f`` with ``f`` the weight of every shaft element and disk (the
consistent mass matrix applied to a unit downward acceleration) and ``K`` the
shaft and journal stiffness at the maximum continuous speed.  The load a
journal carries is the force its bearing exerts on the shaft.  On two journals
the result is the lever rule whatever the stiffness (statically determinate);
on three or more it follows the shaft's and bearings' stiffness, as a
continuous beam does.

Gravity acts along -y (y is vertical, up).
"""

from __future__ import annotations

import dataclasses

import numpy as np
import scipy.sparse.linalg as spla

from .assembly import assemble

#: Standard gravity, m/s^2 (the static load is reported as a mass, load / g).
GRAVITY = 9.80665


def journal_static_loads(rotor, speed=None):
    """Static load of each journal bearing under the rotor's weight, as a mass (kg).

    Parameters
    ----------
    rotor : Rotor
    speed : float, optional
        rad/s at which the journals' stiffness is taken; the maximum continuous
        speed by default.

    Returns
    -------
    dict
        ``{bearing index: kg}`` (a negative value: the journal is lifted); empty
        with fewer than two journals at distinct stations, or when the journals
        leave the rotor free (no vertical stiffness).
    """
    journals = [i for i, b in enumerate(rotor.bearings) if b.role == "bearing"]
    if len({rotor.bearings[i].station for i in journals}) < 2:
        return {}
    hanging = dataclasses.replace(rotor, bearings=tuple(rotor.bearings[i] for i in journals),
                                  unbalance=(), sources=())   # gas forces carry no weight
    system = assemble(hanging)
    omega = rotor.operating.max_speed if speed is None else speed
    down = np.zeros(system.n_dof)
    down[system.translation_dofs[:, 1]] = -GRAVITY
    force = system.mass @ down
    stiffness = system.stiffness(omega).tocsc()
    try:
        with np.errstate(all="raise"):
            u = spla.spsolve(stiffness, force)
    except (RuntimeError, FloatingPointError, np.linalg.LinAlgError):
        return {}
    if not np.all(np.isfinite(u)) or \
            np.linalg.norm(stiffness @ u - force) > 1e-6 * np.linalg.norm(force):
        return {}  # singular: some rigid motion is free
    loads = {}
    for index, link in zip(journals, system.links):
        k, _ = link.bearing.matrices(omega)
        rel = u[link.dofs[:2]] - (u[link.dofs[2:]] if len(link.dofs) == 4 else 0.0)
        loads[index] = float(-(k @ rel)[1] / GRAVITY)   # upward force on the shaft
    return loads
