"""Changes to the rotor's loads: destabilising cross-coupling and unbalance.

Paths (the grammar of :mod:`rotorcalc.variants`):

* ``cross_coupling.SEL.q``: ``SEL`` is a source's name, ``[i]`` or ``*``.  Scaling scales
  kxy and kyx together (kyx = -kxy stays); setting ``= 2e6 N/m`` makes kxy = q, kyx = -q.
  ``cross_coupling.SEL.COEF`` changes one of kxx ... cyy (or a group, as for bearings).
* ``unbalance.CASE.FIELD`` or ``unbalance.CASE.weight[i].FIELD`` (``CASE`` a case name or
  ``*``): ``amount`` (scaled, or set with a unit such as ``"120 g*mm"``) and ``phase``
  (set only, as an angle).  A scaled amount keeps the record of how it was derived, with
  the factor added; a set amount is given, no longer derived.
"""

from __future__ import annotations

import dataclasses

from . import units as u
from ._change_values import GROUPS, change_coefficients, field, new_value, pick
from .errors import InputError

#: cross_coupling.SEL.q: the pair kxy = q, kyx = -q
SOURCE_GROUPS = {"q": ("kxy", "kyx"), **GROUPS}
WEIGHT_FIELDS = {"amount": u.UNBALANCE, "phase": u.ANGLE}


def change_sources(rotor, change, parts, head_index):
    """A copy of ``rotor`` with a ``cross_coupling...`` change made."""
    key, text = change.key, change.text
    if not rotor.sources:
        raise InputError(key, "changes cross-coupling, but the rotor has no [[cross_coupling]]",
                         value=text, expected="a [[cross_coupling]] table in the rotor file",
                         kind="missing")
    if head_index is not None:
        chosen, rest = pick(rotor.sources, "cross_coupling", head_index, "cross_coupling",
                            key, text), parts[1:]
    elif len(parts) < 3:
        raise InputError(key, "needs a source and a coefficient", value=text,
                         expected="cross_coupling.NAME.q, cross_coupling[0].kxy", kind="syntax")
    else:
        chosen, rest = pick(rotor.sources, parts[1][0], None, "cross_coupling", key,
                            text), parts[2:]
    if len(rest) != 1 or rest[0][0] not in SOURCE_GROUPS:
        raise InputError(key, "names no cross-coupling coefficient", value=text,
                         expected="q, or kxx ... cyy, k, c, kdirect, cdirect, all",
                         kind="unknown-key")
    if rest[0][0] == "q" and change.op == "set":
        q = new_value(change, None, u.STIFFNESS)
        new = list(rotor.sources)
        for i in chosen:
            coefficients = {**new[i].coefficients, "kxy": (q,), "kyx": (-q,)}
            new[i] = dataclasses.replace(new[i], coefficients=coefficients)
        return dataclasses.replace(rotor, sources=tuple(new))
    return dataclasses.replace(rotor, sources=change_coefficients(
        rotor.sources, chosen, SOURCE_GROUPS[rest[0][0]], change))


def change_unbalance(rotor, change, parts):
    """A copy of ``rotor`` with an ``unbalance...`` change made."""
    key, text = change.key, change.text
    if len(parts) not in (3, 4):
        raise InputError(key, "needs a case and a field", value=text,
                         expected="unbalance.CASE.amount, unbalance.CASE.weight[0].phase",
                         kind="syntax")
    cases = rotor.unbalance
    chosen = _pick_cases(cases, parts[1][0], change)
    weight = None
    if len(parts) == 4:
        if parts[2][0] != "weight" or parts[2][1] is None:
            raise InputError(key, "names no weight", value=text,
                             expected="unbalance.CASE.weight[i].FIELD", kind="syntax")
        weight = parts[2][1]
    name = parts[-1][0]
    dim = field(WEIGHT_FIELDS, name, change)
    if name == "phase" and change.op == "scale":
        raise InputError(key, "scales an angle", value=text,
                         expected='unbalance.CASE.phase = an angle such as "90 deg"',
                         kind="syntax")
    new = list(cases)
    for i in chosen:
        weights = list(new[i].weights)
        picked = (range(len(weights)) if weight is None
                  else pick(weights, "weight", weight, "weight", key, text))
        for j in picked:
            weights[j] = _changed_weight(weights[j], name, dim, change)
        new[i] = dataclasses.replace(new[i], weights=tuple(weights))
    return dataclasses.replace(rotor, unbalance=tuple(new))


def _pick_cases(cases, selector, change):
    if selector == "*":
        if not cases:
            raise InputError(change.key, "changes unbalance, but the rotor has no unbalance "
                             "case", value=change.text, kind="missing")
        return list(range(len(cases)))
    hits = [i for i, case in enumerate(cases) if case.name == selector]
    if not hits:
        raise InputError(change.key, f"names no unbalance case called {selector!r}",
                         value=change.text,
                         expected="one of " + ", ".join(c.name for c in cases) if cases
                         else "an [unbalance.NAME] table in the rotor file",
                         kind="unknown-key")
    return hits


def _changed_weight(weight, name, dim, change):
    value = new_value(change, getattr(weight, name), dim)
    if name == "phase":
        return dataclasses.replace(weight, phase=value)
    basis = (f"{weight.basis}, scaled by {change.value:g}" if weight.basis
             else f"given, scaled by {change.value:g}") if change.op == "scale" else ""
    return dataclasses.replace(weight, amount=value, basis=basis)
