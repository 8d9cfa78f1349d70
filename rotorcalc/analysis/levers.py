"""Levers: how much each bearing's direct stiffness and each disk's mass moves each
critical speed, per cent per per cent, biggest first.

Two ways, one result: eigenvalue derivatives (:mod:`rotorcalc.analysis.lever_derivatives`,
a few solves per critical; the default) and central differences of perturbed rotors
(:func:`sensitivities`, four screenings per lever and critical; the test reference and
``levers --differences``).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from scipy.optimize import brentq, newton

from ..assembly import assemble
from ..units import to_rpm
from ..variants import Variant, apply_variant, parse_change
from .criticals import CriticalSpeed, branch_at
from .margins import CAUTION, Judgement, af_from_log_dec
from .sweep import TRACKING_RESERVE


@dataclass(frozen=True)
class Sensitivity:
    """Per cent change of a critical speed per per cent change of a parameter."""

    critical: CriticalSpeed
    parameter: str
    value: float | None
    check: float | None      # the same with half the step (agreement verifies the difference)
    method: str = "difference"   # or "derivative" (eigenvalue derivative; no check)

    def to_dict(self):
        return {"critical_rpm": float(to_rpm(self.critical.speed)), "whirl": self.critical.whirl,
                "parameter": self.parameter, "sensitivity": self.value,
                "sensitivity_half_step": self.check, "method": self.method}


def refine_near(rotor, critical: CriticalSpeed, window=0.1):
    """The critical speed of ``rotor`` on the branch of ``critical`` (from a nearby rotor)."""
    system = assemble(rotor)
    ref_value, ref_shape = critical.eigenvalue, critical.shape
    n_solve = rotor.settings.mode_count + TRACKING_RESERVE  # as the critical-speed search solves

    def g(w):
        value, _ = branch_at(system, w, ref_value, ref_shape, n_solve, None)
        return value.imag - critical.order * w

    # the perturbed critical is close: a few secant steps from the old one, and
    # Brent's method on a bracket only when they fail
    try:
        root = newton(g, critical.speed, x1=critical.speed * (1 + 1e-4), rtol=1e-11,
                      maxiter=20)
        if abs(root / critical.speed - 1.0) <= window:
            return float(root)
    except (RuntimeError, ValueError, OverflowError):
        pass
    lo, hi = critical.speed * (1 - window), critical.speed * (1 + window)
    try:
        return brentq(g, lo, hi, rtol=1e-10)
    except ValueError:
        return None


def parameters(rotor):
    """The levers: each bearing's direct stiffness and each disk's mass, as change paths."""
    out = []
    for i, b in enumerate(rotor.bearings):
        label = b.name or f"bearing[{i}]"
        out.append((f"{label} kxx, kyy", f"bearing[{i}].kdirect"))
    for i, d in enumerate(rotor.disks):
        label = d.name or f"disk[{i}]"
        out.append((f"{label} mass", f"disk[{i}].mass"))
    return out


def sensitivities(rotor, criticals, step=0.01, near=None, every=False):
    """Sensitivity of critical speeds to each bearing's direct stiffness and each disk's mass.

    Central difference with relative step ``step`` and, as a check, with
    ``step / 2`` (the two agree to O(step^2) when the difference is sound).
    Which criticals: :func:`lever_criticals`.  :func:`derivative_sensitivities` gives the
    same from eigenvalue derivatives, at a fraction of the cost.
    """
    return tuple(_difference(rotor, crit, label, path, step)
                 for crit in lever_criticals(rotor, criticals, near, every)
                 for label, path in parameters(rotor))


def _difference(rotor, crit, label, path, step):
    values = []
    for h in (step, step / 2):
        up = refine_near(apply_variant(rotor, Variant("+", (parse_change(
            f"{path} *= {1 + h!r}"),))), crit)
        down = refine_near(apply_variant(rotor, Variant("-", (parse_change(
            f"{path} *= {1 - h!r}"),))), crit)
        values.append(None if up is None or down is None
                      else (up - down) / (2 * h * crit.speed))
    return Sensitivity(crit, label, values[0], values[1])


def derivative_sensitivities(rotor, criticals, near=None, every=False, step=0.01, paths=None):
    """:func:`sensitivities` from eigenvalue derivatives
    (:mod:`rotorcalc.analysis.lever_derivatives`): a few solves per critical.  On a rotor
    with bearings from their geometry, a disk's mass changes the bearings' loads and so
    their coefficients: those levers are central differences of step ``step``.  ``paths``
    keeps only the levers of those change paths (default every lever of
    :func:`parameters`)."""
    from .lever_derivatives import critical_derivatives
    levers_of = [(label, path) for label, path in parameters(rotor)
                 if paths is None or path in paths]
    films = any(b.film is not None for b in rotor.bearings)
    out = []
    for crit in lever_criticals(rotor, criticals, near, every):
        values = critical_derivatives(rotor, crit, [path for _, path in levers_of])
        for (label, path), value in zip(levers_of, values):
            if films and path.startswith("disk"):
                out.append(_difference(rotor, crit, label, path, step))
            else:
                out.append(Sensitivity(crit, label, value, None, "derivative"))
    return tuple(out)


def lever_criticals(rotor, criticals, near=None, every=False):
    """The criticals the levers are computed for.

    By default every critical that needs a margin: judged (forward or mixed
    whirl, or any whirl when the rotor judges backward criticals) and not
    critically damped (estimated AF at least the rule's threshold); with
    ``near`` (a fraction) only those within that fraction of the operating
    range's ends.  With ``every``, every critical that is not overdamped, judged or
    not, whatever its AF.
    """
    op = rotor.operating
    threshold = rotor.settings.margin_rule.af_threshold
    judgement = Judgement.of(rotor)
    if every:
        judged = [c for c in criticals if judgement.category(c) != "overdamped"]
    else:
        judged = [c for c in criticals
                  if judgement.category(c) == "judged" and af_from_log_dec(c.log_dec) >= threshold]
    return judged if near is None else [
        c for c in judged if op.min_speed * (1 - near) <= c.speed <= op.max_speed * (1 + near)]


@dataclass(frozen=True)
class Levers:
    """Sensitivities ranked for reading: criticals by speed, the biggest lever of each first;
    ``rows`` are (rank, :class:`Sensitivity`)."""

    rows: tuple
    step: float
    near: float | None
    every: bool
    method: str = "difference"

    @classmethod
    def ranked(cls, sensitivities, step, near=None, every=False, method="difference"):
        groups = {}
        for s in sensitivities:
            groups.setdefault(id(s.critical), []).append(s)
        rows = []
        for group in sorted(groups.values(), key=lambda g: g[0].critical.speed):
            group.sort(key=lambda s: -abs(s.value) if s.value is not None else math.inf)
            rows += list(enumerate(group, start=1))
        return cls(tuple(rows), step, near, every, method)

    def caption(self):
        if self.method == "derivative":
            return ("% per %: per cent change of the critical per per cent change of the lever, "
                    "from the eigenvalue's derivative (its left and right eigenvectors); rows "
                    "whose Method says 'difference' (a disk's mass when bearings are computed "
                    "from their geometry: the films are re-loaded) are central differences with "
                    f"a {self.step:.1%} step, checked at half the step. --differences computes "
                    "every row that way. 'rpm for +10 %' is the linear estimate.")
        return (f"% per %: per cent change of the critical per per cent change of the lever, "
                f"central difference with a {self.step:.1%} step; 'Half step' repeats it with "
                "half the step (agreement verifies it). 'rpm for +10 %' is the linear "
                "estimate.")

    def to_dict(self):
        return {"criticals_considered": "all" if self.every else "those that need a margin",
                "near": self.near, "method": self.method,
                "step": self.step if self.method == "difference" else None,
                "sensitivities": [dict(s.to_dict(), rank=rank) for rank, s in self.rows],
                "caution": CAUTION}


def levers(rotor, criticals, step=0.01, near=None, every=False, method="derivative"):
    """The sensitivities, ranked (:class:`Levers`): from eigenvalue derivatives
    (:func:`derivative_sensitivities`), or with ``method="difference"`` by central differences
    of step ``step`` (:func:`sensitivities`).  ``rotor`` and ``criticals`` as the caller
    screened them (:func:`what_if_rotor` gives the usual rotor)."""
    if method == "derivative":
        found = derivative_sensitivities(rotor, criticals, near, every, step)
    else:
        found = sensitivities(rotor, criticals, step, near, every)
    return Levers.ranked(found, step, near, every, method)
