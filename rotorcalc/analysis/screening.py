"""The main job in one call: sweep, critical speeds, unbalance response and margins."""

from __future__ import annotations

from dataclasses import dataclass

from ..assembly import assemble
from ..model import Rotor
from .criticals import critical_speeds
from .margins import MarginTable, separation_margins
from .response import Response, unbalance_response
from .sweep import Sweep, sweep


@dataclass(frozen=True)
class Screening:
    """Sweep, critical speeds, margin table and (when the rotor has unbalance cases)
    the unbalance response of one rotor."""

    rotor: Rotor
    sweep: Sweep
    criticals: tuple
    margins: MarginTable
    response: Response | None = None

    @property
    def passed(self):
        return self.margins.passed and (self.response is None or self.response.passed)

    def to_dict(self):
        out = {"margins": self.margins.to_dict(), "sweep": self.sweep.to_dict()}
        if self.response is not None:
            out["response"] = self.response.to_dict()
        return out


def screen(rotor: Rotor, speeds=None, orders=None, solver=None, progress=None,
           workers=1) -> Screening:
    """Sweep the speed range, find the critical speeds and judge their margins.

    Parameters
    ----------
    rotor : Rotor
    speeds : array_like, optional
        rad/s; the rotor's sweep settings by default.
    orders : sequence of float, optional
        Excitation orders; ``rotor.settings.orders`` by default.
    solver, progress : optional
        Passed to :func:`~rotorcalc.analysis.sweep.sweep`.
    workers : int
        Worker processes for the sweep and the critical-speed refinement (1 by
        default, 0 for one per core); the result does not depend on it.
    """
    system = assemble(rotor)
    result = sweep(system, speeds=speeds, solver=solver, progress=progress, workers=workers)
    crits = tuple(critical_speeds(system, result, orders=orders, solver=solver,
                                  workers=workers))
    response = unbalance_response(system) if rotor.unbalance else None
    table = separation_margins(crits, rotor.operating, rotor.settings.margin_rule,
                               float(result.speeds[-1]),
                               judge_backward=rotor.settings.judge_backward,
                               peaks=None if response is None else response.peaks)
    return Screening(rotor, result, crits, table, response)
