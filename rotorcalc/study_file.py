"""Reading a study file: the rotor it studies, the uncertain inputs and how to sample them.

```toml
rotor = "compressor.toml"        # relative to this file
samples = 1000
sampling = "latin-hypercube"     # or "sobol"
seed = 2026
confidence = 0.95
indices = "rank"                 # or "sobol": also Sobol indices, samples x (inputs + 2) runs

[[uncertain]]
name = "bearing stiffness"
change = "bearing.*.kdirect"     # a path of the what-if change grammar (docs/whatif.md)
by = "factor"                    # PATH *= x; or "value": PATH = x UNIT
distribution = "normal"          # uniform (low, high), normal (mean, sd),
mean = 1.0                       # lognormal (median, sigma of the log),
sd = 0.08                        # triangular (low, mode, high)
```
"""

from __future__ import annotations

import math
from pathlib import Path

from ._toml import check_keys, load_toml, locate
from .analysis.study import DISTRIBUTIONS, INDICES, SAMPLINGS, StudyPlan, Uncertain
from .errors import InputError

TOP = {"rotor", "samples", "sampling", "seed", "confidence", "indices", "uncertain"}
INPUT_KEYS = {"name", "change", "by", "distribution", "unit"} | {
    p for params in DISTRIBUTIONS.values() for p in params}
#: Most samples a study file may ask for (a study of more is a cluster's job: split it).
MAX_SAMPLES = 1_000_000


def _number(table, key, where):
    value = table.get(key)
    if value is None:
        raise InputError(f"{where}.{key}", "is missing", expected="a number", kind="missing")
    if isinstance(value, bool) or not isinstance(value, (int, float)) or not math.isfinite(value):
        raise InputError(f"{where}.{key}", "must be a finite number", value=value,
                         kind="type")
    return float(value)


def _uncertain(table, i):
    where = f"uncertain[{i}]"
    check_keys(table, INPUT_KEYS, where)
    distribution = table.get("distribution")
    if distribution not in DISTRIBUTIONS:
        raise InputError(f"{where}.distribution", "is not a known distribution",
                         value=distribution, expected=" or ".join(DISTRIBUTIONS), kind="choice")
    names = DISTRIBUTIONS[distribution]
    extra = [k for k in table if k in INPUT_KEYS - {"name", "change", "by", "distribution",
                                                    "unit"} and k not in names]
    if extra:
        raise InputError(f"{where}.{extra[0]}", f"is not a parameter of the {distribution} "
                         "distribution", expected=", ".join(names), kind="unknown-key")
    params = tuple(_number(table, k, where) for k in names)
    if distribution in ("uniform",) and not params[0] < params[1]:
        raise InputError(f"{where}.high", "must be above low", value=params[1], kind="range")
    if distribution == "triangular" and not params[0] <= params[1] <= params[2] \
            or distribution == "triangular" and not params[0] < params[2]:
        raise InputError(f"{where}.mode", "must lie between low and high (low < high)",
                         value=params[1], kind="range")
    if distribution in ("normal", "lognormal") and not params[1] > 0:
        raise InputError(f"{where}.{names[1]}", "must be above zero", value=params[1],
                         kind="range")
    if distribution == "lognormal" and not params[0] > 0:
        raise InputError(f"{where}.median", "must be above zero", value=params[0], kind="range")
    by = table.get("by", "factor")
    if by not in ("factor", "value"):
        raise InputError(f"{where}.by", "is not a way to apply a value", value=by,
                         expected="factor (PATH *= x) or value (PATH = x UNIT)", kind="choice")
    change, name = table.get("change"), table.get("name", f"input {i + 1}")
    if not isinstance(change, str) or not change.strip():
        raise InputError(f"{where}.change", "must name what varies", value=change,
                         expected='a change path, e.g. "bearing.*.kdirect"', kind="missing")
    unit = table.get("unit", "")
    if not isinstance(unit, str) or not isinstance(name, str):
        raise InputError(where, "name and unit must be text", kind="type")
    if by == "factor" and unit:
        raise InputError(f"{where}.unit", "is given for a factor, which has no unit",
                         value=unit, expected='by = "value" with the unit, or no unit',
                         kind="conflict")
    if by == "factor" and distribution in ("uniform", "triangular") and not params[0] > 0:
        raise InputError(f"{where}.low", "lets the factor reach zero or below", value=params[0],
                         expected="a factor range above 0", kind="range")
    if by == "factor" and distribution == "normal" and params[0] - 4 * params[1] <= 0:
        raise InputError(f"{where}.sd", "lets the factor reach zero or below (mean - 4 sd)",
                         value=params[1], expected="a factor distribution that stays above 0 "
                         "(or lognormal)", kind="range")
    return Uncertain(name, change.strip(), distribution, params, by, unit)


def read_study(path):
    """(rotor path, StudyPlan) of a study file (:func:`~rotorcalc.analysis.study.check_plan`
    checks the changes on the rotor)."""
    from .reader import read_input_text
    path = Path(path)
    text = read_input_text(path, "a study file of a few kB")
    data = load_toml(text, str(path))
    try:
        check_keys(data, TOP, "")
        rotor = data.get("rotor")
        if not isinstance(rotor, str):
            raise InputError("rotor", "must name the rotor file", value=rotor,
                             expected='rotor = "pump.toml"', kind="missing")
        inputs = data.get("uncertain")
        if not isinstance(inputs, list) or not inputs:
            raise InputError("uncertain", "must list the uncertain inputs",
                             expected="[[uncertain]] tables", kind="missing")
        uncertain = tuple(_uncertain(t, i) for i, t in enumerate(inputs))
        for i, u in enumerate(uncertain):
            if u.name in [v.name for v in uncertain[:i]]:
                raise InputError(f"uncertain[{i}].name", "is already used by another input",
                                 value=u.name, expected="a name of its own for each input",
                                 kind="duplicate")
        plan = StudyPlan(uncertain, **_settings(data))
    except InputError as err:
        raise err.with_location(file=str(path), line=locate(text, err.key)) from None
    return (path.parent / rotor).resolve(), plan


def _settings(data):
    out = {}
    samples = data.get("samples", 1000)
    if isinstance(samples, bool) or not isinstance(samples, int) or not 1 <= samples <= MAX_SAMPLES:
        raise InputError("samples", "must be a whole number of samples", value=samples,
                         expected=f"1 to {MAX_SAMPLES}", kind="range")
    out["samples"] = samples
    sampling = data.get("sampling", "latin-hypercube")
    if sampling not in SAMPLINGS:
        raise InputError("sampling", "is not a sampling", value=sampling,
                         expected=" or ".join(SAMPLINGS), kind="choice")
    out["sampling"] = sampling
    seed = data.get("seed", 0)
    if isinstance(seed, bool) or not isinstance(seed, int) or seed < 0:
        raise InputError("seed", "must be a whole number >= 0", value=seed, kind="type")
    out["seed"] = seed
    confidence = data.get("confidence", 0.95)
    if isinstance(confidence, bool) or not isinstance(confidence, (int, float)) \
            or not 0.5 <= confidence < 1:
        raise InputError("confidence", "must be a level from 0.5 to below 1",
                         value=confidence, expected="e.g. 0.95", kind="range")
    out["confidence"] = float(confidence)
    out["indices"] = checked_indices(data.get("indices", "rank"), "indices")
    return out


def checked_indices(value, key):
    """``value`` when it names a way to measure influence (:data:`INDICES`)."""
    if value not in INDICES:
        raise InputError(key, "is not a way to measure influence", value=value,
                         expected=" or ".join(INDICES), kind="choice")
    return value
