"""Uncertainty studies: how likely is a verdict to fail when the inputs are known only
within their tolerances?

A study draws ``samples`` points of the uncertain inputs (Latin hypercube or scrambled
Sobol points, :mod:`scipy.stats.qmc`, seeded), maps them through each input's
distribution, applies each point to the rotor as a what-if variant (the change grammar of
:mod:`rotorcalc.variants`) and screens it in full.  Each sample is a record: its inputs,
the verdict and what failed, every critical matched to the rotor's own (speed, margin,
log decrement, verdict), or the error it raised.  :func:`summarise` turns the records into
failure probabilities with exact binomial (Clopper-Pearson) intervals, percentiles and
each input's influence (Spearman rank correlation).

The samples are independent: :mod:`rotorcalc.executor` runs them anywhere; a sample's
record depends on its index and the study alone.
"""

from __future__ import annotations

import math
import warnings
from dataclasses import dataclass, field

import numpy as np

from ..units import to_rpm

#: The kinds of failure a screening has, in the order a reviewer reads them.
KINDS = ("margin", "stability", "response", "cross-coupling", "coverage")
#: Distributions and their parameters (names as in the study file).
DISTRIBUTIONS = {"uniform": ("low", "high"), "normal": ("mean", "sd"),
                 "lognormal": ("median", "sigma"), "triangular": ("low", "mode", "high")}
SAMPLINGS = ("latin-hypercube", "sobol")
#: How each input's influence is measured: rank correlations over the samples, or those
#: and Sobol indices from a pick-and-freeze design (:mod:`rotorcalc.analysis.sobol`).
INDICES = ("rank", "sobol")
#: Percentiles reported for each critical's speed, margin and log decrement.
PERCENTILES = (5, 50, 95)


@dataclass(frozen=True)
class Uncertain:
    """One uncertain input: a change path of the variants grammar, applied as a factor
    (``by="factor"``: ``PATH *= x``) or a value (``by="value"``: ``PATH = x UNIT``), with
    ``x`` drawn from ``distribution`` with ``parameters`` (:data:`DISTRIBUTIONS`)."""

    name: str
    path: str
    distribution: str
    parameters: tuple
    by: str = "factor"
    unit: str = ""

    def frozen(self):
        """The scipy.stats distribution."""
        from scipy import stats
        p = self.parameters
        if self.distribution == "uniform":
            return stats.uniform(loc=p[0], scale=p[1] - p[0])
        if self.distribution == "normal":
            return stats.norm(loc=p[0], scale=p[1])
        if self.distribution == "lognormal":
            return stats.lognorm(s=p[1], scale=p[0])
        return stats.triang(c=(p[1] - p[0]) / (p[2] - p[0]), loc=p[0], scale=p[2] - p[0])

    def change(self, x):
        if self.by == "factor":
            return f"{self.path} *= {x!r}"
        return f"{self.path} = {x!r} {self.unit}".rstrip()

    def describe(self):
        params = ", ".join(f"{n} {v:g}" for n, v in zip(DISTRIBUTIONS[self.distribution],
                                                      self.parameters))
        what = "factor on" if self.by == "factor" else f"value ({self.unit or 'SI'}) of"
        return f"{self.name}: {self.distribution} ({params}), {what} {self.path}"


@dataclass(frozen=True)
class StudyPlan:
    """What a study samples: the inputs, how many samples, how, with which seed."""

    inputs: tuple
    samples: int = 1000
    sampling: str = "latin-hypercube"
    seed: int = 0
    confidence: float = 0.95
    indices: str = "rank"

    @property
    def runs(self):
        """Screenings the study makes: ``samples``, or ``samples (d + 2)`` for Sobol
        indices (the rows of A, B and each A_B^i)."""
        d = len(self.inputs)
        return self.samples * (d + 2) if self.indices == "sobol" else self.samples

    @property
    def independent(self):
        """Runs that are independent draws (every one, or the rows of A and B): the
        probabilities, percentiles and rank correlations use these."""
        return 2 * self.samples if self.indices == "sobol" else self.samples

    def design(self):
        """(runs, inputs) array of input values: the seeded points mapped through each
        input's distribution (inverse CDF)."""
        from scipy.stats import qmc
        from .sobol import pick_freeze_design
        d = len(self.inputs)
        width = 2 * d if self.indices == "sobol" else d
        if self.sampling == "sobol":
            engine = qmc.Sobol(width, scramble=True, seed=self.seed)
        else:
            engine = qmc.LatinHypercube(width, seed=self.seed)
        with warnings.catch_warnings():     # said once by the command (balanced_sobol)
            warnings.filterwarnings("ignore", message=".*power of 2", category=UserWarning)
            unit = engine.random(self.samples)
        if self.indices == "sobol":
            unit = pick_freeze_design(unit)
        unit = np.clip(unit, 1e-12, 1 - 1e-12)     # the normal's tails stay finite
        return np.column_stack([u.frozen().ppf(unit[:, j])
                                 for j, u in enumerate(self.inputs)])

    @property
    def balanced(self):
        """False for scrambled Sobol points of a count that is not a power of two (their
        balance, and so their faster convergence, needs one)."""
        return self.sampling != "sobol" or self.samples & (self.samples - 1) == 0

    def design_row(self, index):
        """Which set of the pick-and-freeze design run ``index`` belongs to: "A", "B" or
        "A_B NAME" (A with the input NAME from B); "" without Sobol indices."""
        if self.indices != "sobol":
            return ""
        block = index // self.samples
        return "A" if block == 0 else "B" if block == 1 else \
            f"A_B {self.inputs[block - 2].name}"

    @property
    def nearest_balanced(self):
        """The powers of two just below and above ``samples``."""
        top = 1 << self.samples.bit_length()
        return top // 2, top

    def is_independent(self, record):
        """True for the record of an independent draw that computed."""
        return "error" not in record and record["index"] < self.independent

    def record(self, index, values):
        """The start of a run's record: its index, inputs and (for Sobol indices) design row."""
        record = {"index": int(index),
                  "inputs": {u.name: float(x) for u, x in zip(self.inputs, values)}}
        if self.indices == "sobol":
            record["design"] = self.design_row(index)
        return record

    def key(self):
        """A text that changes whenever the samples would (for resuming a results file)."""
        if self.indices == "rank":      # as before Sobol indices existed: old files resume
            return repr((self.inputs, self.samples, self.sampling, self.seed))
        return repr((self.inputs, self.samples, self.sampling, self.seed, self.indices))


def sample_variant(plan: StudyPlan, index, values):
    from ..variants import Variant, parse_change
    return Variant(f"sample {index}", tuple(
        parse_change(u.change(float(x)), f"uncertain[{j}]")
        for j, (u, x) in enumerate(zip(plan.inputs, values))))


def check_plan(rotor, plan: StudyPlan):
    """Raise the InputError of the first input whose change does not fit the rotor (each
    applied alone at its distribution's median), before any sample runs."""
    from ..variants import Variant, apply_variant, parse_change
    for j, u in enumerate(plan.inputs):
        key = f"uncertain[{j}].change"
        apply_variant(rotor, Variant(u.name, (parse_change(u.change(float(
            u.frozen().median())), key),)))


def evaluate(rotor, plan: StudyPlan, base, index, values):
    """The record of one sample (a plain dict, JSON-ready): the rotor with the sample's
    changes screened in full; the error's text when it raised."""
    from ..errors import RotorcalcError
    from ..variants import apply_variant
    from .screening import screen
    from .whatif import margin_excess, match_criticals
    record = plan.record(index, values)
    try:
        result = screen(apply_variant(rotor, sample_variant(plan, index, values)))
    except (RotorcalcError, ArithmeticError, ValueError, np.linalg.LinAlgError) as exc:
        record["error"] = f"{type(exc).__name__}: {exc}"
        return record
    failed = failures(result)
    matches = match_criticals([r.critical for r in result.margins.rows], list(base))
    criticals = {}
    for row, match in zip(result.margins.rows, matches):
        if match is None:
            continue
        j = base.index(match)
        criticals[str(j)] = {"speed_rpm": float(to_rpm(row.critical.speed)),
                             "margin_percent": _finite(row.margin),
                             "required_percent": float(row.required),
                             "log_dec": float(row.critical.log_dec), "verdict": row.verdict,
                             "passed": bool(row.passed)}
    excess, _ = margin_excess(result)
    lowest = [m.judged_log_dec for m in result.stability.branches
              if m.judged_log_dec is not None] if result.stability else []
    record.update({"verdict": result.verdict, "failed": failed, "criticals": criticals,
                   "margin_excess_percent": _finite(excess),
                   "lowest_log_dec": float(min(lowest)) if lowest else None})
    return record


def _finite(x):
    return float(x) if math.isfinite(x) else None


def failures(result):
    """The kinds (:data:`KINDS`) a screening fails on."""
    out = []
    if not result.margins.passed:
        out.append("margin")
    if result.stability is not None and not result.stability.passed:
        out.append("stability")
    if result.response is not None and not result.response.passed:
        out.append("response")
    if result.coupling is not None and not result.coupling.passed:
        out.append("cross-coupling")
    if result.gaps:
        out.append("coverage")
    return out


def clopper_pearson(k, n, confidence=0.95):
    """Exact binomial confidence interval of a probability from ``k`` events in ``n``
    trials: C. J. Clopper and E. S. Pearson, "The use of confidence or fiducial limits
    illustrated in the case of the binomial", Biometrika 26 (1934), 404-413."""
    from scipy.stats import beta
    if n == 0:
        return (0.0, 1.0)
    a = 1.0 - confidence
    low = 0.0 if k == 0 else float(beta.ppf(a / 2, k, n - k + 1))
    high = 1.0 if k == n else float(beta.ppf(1 - a / 2, k + 1, n - k))
    return low, high


@dataclass(frozen=True)
class Probability:
    """``events`` of ``trials``: the estimate and its interval at ``confidence``."""

    what: str
    events: int
    trials: int
    confidence: float

    @property
    def estimate(self):
        return self.events / self.trials if self.trials else float("nan")

    @property
    def interval(self):
        return clopper_pearson(self.events, self.trials, self.confidence)

    def to_dict(self):
        low, high = self.interval
        return {"what": self.what, "events": self.events, "trials": self.trials,
                "probability": self.estimate, "interval": [low, high],
                "confidence": self.confidence}


@dataclass(frozen=True)
class StudyResult:
    """What a study found (:func:`summarise`)."""

    plan: StudyPlan
    records: tuple
    base: tuple                  # the rotor's own criticals (CriticalSpeed)
    probabilities: tuple         # Probability: any failure, then per kind, then per critical
    percentiles: dict = field(default_factory=dict)
    influence: dict = field(default_factory=dict)
    sobol: dict = field(default_factory=dict)    # output: Indices (or None), when asked

    @property
    def errors(self):
        return tuple(r for r in self.records if "error" in r)

    @property
    def independent(self):
        """The records of independent draws that computed (for Sobol indices, the rows
        of A and B): what the probabilities, percentiles and pictures use."""
        return tuple(filter(self.plan.is_independent, self.records))

    def to_dict(self):
        from ..vocabulary import CAUTION
        return {"plan": {"samples": self.plan.samples, "sampling": self.plan.sampling,
                         "seed": self.plan.seed, "confidence": self.plan.confidence,
                         "indices": self.plan.indices, "runs": self.plan.runs,
                         "inputs": [u.describe() for u in self.plan.inputs]},
                "base_criticals_rpm": [float(to_rpm(c.speed)) for c in self.base],
                "probabilities": [p.to_dict() for p in self.probabilities],
                "percentiles": self.percentiles, "influence": self.influence,
                "sobol_indices": {
                    output: None if ix is None else ix.to_dict([u.name for u in
                                                               self.plan.inputs])
                    for output, ix in self.sobol.items()},
                "failed_samples": len(self.errors), "samples": list(self.records),
                "caution": CAUTION}


def critical_label(j, crit):
    return f"critical {j + 1} ({to_rpm(crit.speed):.0f} rpm {crit.whirl})"


def output_values(records, base):
    """Each output (the smallest margin excess, the lowest log decrement, each critical's
    speed) over ``records``: None where a record has none (an error, a critical not
    found)."""
    outputs = {"margin excess %": [r.get("margin_excess_percent") for r in records],
               "lowest log dec": [r.get("lowest_log_dec") for r in records]}
    for j, crit in enumerate(base):
        outputs[f"{critical_label(j, crit)} speed"] = [
            (r.get("criticals", {}).get(str(j)) or {}).get("speed_rpm") for r in records]
    return outputs


def summarise(plan: StudyPlan, records, base):
    """Probabilities of failure with intervals, percentiles and influences (over the
    independent runs), and Sobol indices when the plan asks for them."""
    from scipy.stats import spearmanr
    records = tuple(sorted(records, key=lambda r: r["index"]))
    valid = list(filter(plan.is_independent, records))
    n = len(valid)
    c = plan.confidence
    probs = [Probability("any check", sum(bool(r["failed"]) for r in valid), n, c)]
    probs += [Probability(kind, sum(kind in r["failed"] for r in valid), n, c)
              for kind in KINDS]
    percentiles, influence = {}, {}
    names = [u.name for u in plan.inputs]
    x = np.array([[r["inputs"][name] for name in names] for r in valid]).reshape(n, len(names))
    for j, crit in enumerate(base):
        label = critical_label(j, crit)
        found = [r["criticals"].get(str(j)) for r in valid]
        probs.append(Probability(f"{label} fails its margin",
                                 sum(f is not None and not f["passed"] for f in found), n, c))
        entry = {}
        for quantity in ("speed_rpm", "margin_percent", "log_dec"):
            values = np.array([f[quantity] for f in found
                               if f is not None and f[quantity] is not None], dtype=float)
            if len(values):
                entry[quantity] = {str(p): float(np.percentile(values, p)) for p in PERCENTILES}
        entry["found_in"] = sum(f is not None for f in found)
        percentiles[label] = entry
    for output, values in output_values(valid, base).items():
        y = np.array([np.nan if v is None else v for v in values], dtype=float)
        ok = np.isfinite(y)
        row = {}
        for k, name in enumerate(names):
            if ok.sum() > 2 and np.ptp(y[ok]) > 0 and np.ptp(x[ok, k]) > 0:
                row[name] = float(spearmanr(x[ok, k], y[ok]).statistic)
            else:
                row[name] = None
        influence[output] = row
    sobol = _sobol(plan, records, base) if plan.indices == "sobol" else {}
    return StudyResult(plan, records, tuple(base), tuple(probs), percentiles, influence,
                       sobol)


def _sobol(plan, records, base):
    """Sobol indices of failing any check and of each output, over every run."""
    from .sobol import sobol_indices
    by_index = {r["index"]: r for r in records}
    rows = [by_index.get(i, {"error": "missing"}) for i in range(plan.runs)]
    values = {"fails any check": [None if "error" in r else float(bool(r["failed"]))
                                  for r in rows], **output_values(rows, base)}
    return {output: sobol_indices([np.nan if v is None else v for v in vals],
                                  len(plan.inputs), plan.confidence, plan.seed)
            for output, vals in values.items()}


def run_study(rotor, plan: StudyPlan, executor=None, done=(), progress=None, on_record=None):
    """Screen every sample not in ``done`` (records already made, e.g. read back from a
    results file) on ``executor`` (:mod:`rotorcalc.executor`; this process by default) and
    summarise.  ``on_record(record)`` is called as each finishes (to save it at once);
    ``progress(done, total)`` after each."""
    from ..executor import InProcess
    from .screening import screen
    executor = executor or InProcess()
    base = tuple(r.critical for r in screen(rotor).margins.rows if r.verdict != "overdamped")
    design = plan.design()
    records = {r["index"]: r for r in done}
    todo = [i for i in range(plan.runs) if i not in records]
    pieces = [(rotor, plan, base, i, design[i]) for i in todo]
    count = len(records)
    for k, outcome in executor.results(evaluate, pieces):
        i = todo[k]
        if isinstance(outcome, BaseException):   # the worker itself failed: say so
            outcome = {**plan.record(i, design[i]),
                       "error": f"{type(outcome).__name__}: {outcome}"}
        records[i] = outcome
        count += 1
        if on_record is not None:
            on_record(outcome)
        if progress is not None:
            progress(count, plan.runs)
    return summarise(plan, records.values(), base)
