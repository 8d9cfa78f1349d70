"""The forced-response part of a rotor file: unbalance cases, probes, clearances and the
response settings (docs/input.md)."""

from __future__ import annotations

import math
import warnings

from . import standards
from . import units as u
from ._toml import (_array_of_tables, _integer, _number, _path, _quantity, _station, _string,
                    check_keys, plain_text)
from .errors import InputError
from .unbalance import Clearance, Probe, ResponseSettings, UnbalanceCase, UnbalanceWeight
from .vocabulary import OLD_SPELLINGS_UNTIL, RenamedWarning

UNBALANCE_KEYS = {"description", "residual_multiple", "residual_mass", "weight"}
WEIGHT_KEYS = {"at", "amount", "mass", "radius", "phase"}
PROBE_KEYS = {"at", "angle", "name"}
CLEARANCE_KEYS = {"at", "radial", "name"}
RESPONSE_KEYS = {"speed_from", "speed_to", "speed_count", "check_vibration", "clearance_share",
                 "vibration_limit"}


def _unbalance_cases(table, names, n_sections, rotor):
    if not isinstance(table, dict):
        check_keys(table, set(), "unbalance")  # raises: must be a table
    cases = []
    for case_name, entry in table.items():
        where = f"unbalance.{case_name}"
        plain_text(case_name, where)
        check_keys(entry, UNBALANCE_KEYS, where)
        multiple = _number(entry, "residual_multiple", where, standards.RESIDUAL_MULTIPLE)
        if multiple <= 0:
            raise InputError(f"{where}.residual_multiple", "must be positive", value=multiple,
                             kind="range")
        carried = _quantity(entry, "residual_mass", u.MASS, where, default=None)
        if carried is not None and carried <= 0:
            raise InputError(f"{where}.residual_mass", "must be positive", value=carried,
                             kind="range")
        weights = []
        for j, w in enumerate(_array_of_tables(entry, "weight", where)):
            wk = f"{where}.weight[{j}]"
            check_keys(w, WEIGHT_KEYS, wk)
            station = _station(w, wk, names, n_sections)

            basis = []

            def residual(station=station, wk=wk, basis=basis):
                if "residual_multiple" not in entry:
                    warnings.warn(f'{where}: amount = "residual" without residual_multiple is '
                                  f"read as {multiple:g} x the residual amount (the common-"
                                  "practice multiple) until version "
                                  f"{OLD_SPELLINGS_UNTIL}, and refused after it: state "
                                  f"residual_multiple = {multiple:g} in [{where}]",
                                  RenamedWarning, stacklevel=2)
                mass, what = (standards.residual_weight(rotor, station) if carried is None
                              else (carried, "residual_mass of the case"))
                basis.append(f"{multiple:g} x residual, W = {mass:.4g} kg: {what}")
                if not mass > 0:
                    raise InputError(f"{wk}.amount", "cannot be the residual amount: the "
                                     "journal nearer the weight carries no static load "
                                     f"({mass:.3g} kg; the overhang lifts it)",
                                     value="residual", expected="an amount such as \"12 g*mm\","
                                     " or residual_mass for the case", kind="range")
                return multiple * standards.residual_unbalance(mass, rotor.operating.max_speed)

            amount = _unbalance_amount(w, wk, residual)
            phase = _angle(w, "phase", wk)
            weights.append(UnbalanceWeight(station, amount, phase, key=wk,
                                           basis=basis[0] if basis else ""))
        cases.append(UnbalanceCase(case_name, tuple(weights),
                                   _string(entry, "description", where, default=""), key=where))
    return tuple(cases)


def _angle(table, key, where):
    """An angle with a unit; a bare number other than 0 is refused (90 would be radians)."""
    value = table.get(key, 0.0)
    number = None
    if isinstance(value, (int, float)) and not isinstance(value, bool):
        number = float(value)
    elif isinstance(value, str):
        try:
            number = float(value.strip())   # a number written as text has no unit either
        except ValueError:
            pass
    if number is not None and number != 0 and math.isfinite(number):
        raise InputError(_path(where, key), "needs a unit", value=value,
                         expected=f'an angle such as "{number:g} deg" or "{number:g} rad"',
                         kind="unit")
    return u.parse(value, u.ANGLE, _path(where, key))


def _unbalance_amount(w, where, residual):
    """An explicit amount, mass times radius, or "residual" (the common-practice amount,
    from ``residual()``, computed only when asked for)."""
    given = {"amount", "mass", "radius"} & set(w)
    if "amount" in given and len(given) > 1:
        raise InputError(f"{where}.amount", "is given together with mass and radius",
                         expected="either amount, or mass and radius", kind="conflict")
    if "amount" in w:
        if isinstance(w["amount"], str) and w["amount"].strip().lower() == "residual":
            return residual()
        return u.parse(w["amount"], u.UNBALANCE, f"{where}.amount")
    if not given:
        raise InputError(f"{where}.amount", "is missing",
                         expected='an amount ("12 g*mm", "residual"), or mass and radius',
                         kind="missing")
    mass = _quantity(w, "mass", u.MASS, where, required=True)
    radius = _quantity(w, "radius", u.LENGTH, where, required=True)
    return mass * radius


def _probe(table, i, names, n_sections):
    where = f"probe[{i}]"
    check_keys(table, PROBE_KEYS, where)
    station = _station(table, where, names, n_sections)
    angle = _angle(table, "angle", where)
    return Probe(station, angle, _string(table, "name", where, default=f"P{i + 1}"), key=where)


def _clearance(table, i, names, n_sections):
    where = f"clearance[{i}]"
    check_keys(table, CLEARANCE_KEYS, where)
    station = _station(table, where, names, n_sections)
    radial = _quantity(table, "radial", u.LENGTH, where, required=True)
    return Clearance(station, radial, _string(table, "name", where, default=f"C{i + 1}"),
                     key=where)


def _response(table):
    where = "response"
    check_keys(table, RESPONSE_KEYS, where)
    check = table.get("check_vibration", True)
    if not isinstance(check, bool):
        raise InputError(f"{where}.check_vibration", "must be true or false", value=check,
                         kind="type")
    return ResponseSettings(speed_from=_quantity(table, "speed_from", u.SPEED, where),
                            speed_to=_quantity(table, "speed_to", u.SPEED, where),
                            speed_count=_integer(table, "speed_count", where, 201),
                            check_vibration=check,
                            clearance_share=_number(table, "clearance_share", where,
                                                    standards.CLEARANCE_SHARE),
                            vibration_limit=_quantity(table, "vibration_limit", u.LENGTH, where))
