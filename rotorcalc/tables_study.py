"""Tables of an uncertainty study (:mod:`rotorcalc.analysis.study`): the same column lists
serve the terminal and the CSV."""

from __future__ import annotations

import re

from .analysis.study import KINDS, PERCENTILES
from .tables import Column

INFLUENCE_CAPTION = ("Spearman rank correlation of each input with each output over the "
                     "samples (C. Spearman, Am. J. Psychol. 15 (1904); scipy.stats.spearmanr): "
                     "+1 the output rises with the input, -1 it falls, near 0 no monotone "
                     "influence; '-' where the output does not vary.")

PROBABILITY_COLUMNS = [
    Column("Failure", lambda p: p.what, "{}", "what"),
    Column("Failed", lambda p: p.events, "{:d}", "events"),
    Column("Of", lambda p: p.trials, "{:d}", "trials"),
    Column("Probability", lambda p: p.estimate, "{:.2%}", "probability"),
    Column("Interval low", lambda p: p.interval[0], "{:.2%}", "interval_low"),
    Column("Interval high", lambda p: p.interval[1], "{:.2%}", "interval_high"),
]


def percentile_rows(result):
    """(critical label, quantity, {percentile: value}, samples it was found in)."""
    names = {"speed_rpm": "speed rpm", "margin_percent": "margin %", "log_dec": "log dec"}
    return [(label, names[q], entry[q], entry["found_in"])
            for label, entry in result.percentiles.items() for q in names if q in entry]


PERCENTILE_COLUMNS = [
    Column("Critical", lambda r: r[0], "{}", "critical"),
    Column("Quantity", lambda r: r[1], "{}", "quantity"),
] + [Column(f"P{p}", lambda r, p=p: r[2][str(p)], "{:.4g}", f"p{p}") for p in PERCENTILES] + [
    Column("Found in", lambda r: r[3], "{:d}", "found_in")]


def describe_runs(plan):
    """"1000 samples", or "64 samples x (10 inputs + 2) = 768 screenings"."""
    if plan.runs == plan.samples:
        return f"{plan.samples} samples"
    return (f"{plan.samples} samples x ({len(plan.inputs)} inputs + 2) = {plan.runs} "
            "screenings")


def influence_rows(result):
    """(input name, {output: rho}) per input."""
    return [(u.name, {output: row.get(u.name) for output, row in result.influence.items()})
            for u in result.plan.inputs]


def short_output(output):
    """"critical 2 (5657 rpm forward) speed" -> "critical 2 speed" (the percentile table
    names each critical in full)."""
    return re.sub(r"^critical (\d+) \(.*\) speed$", r"critical \1 speed", output)


def influence_columns(result):
    """The input, then one column per output (its rank correlation with the input)."""
    return [Column("Input", lambda r: r[0], "{}", "input")] + [
        Column(short_output(output), lambda r, o=output: r[1].get(o), "{:+.2f}", output)
        for output in result.influence]


SOBOL_SHARE = 0.05
SOBOL_CAPTION = (
    "First-order index: the share of the output's variance the input explains alone; total: "
    "the share it has a hand in, with its interactions (A. Saltelli et al., Comput. Phys. "
    "Commun. 181 (2010), Table 2 (b) and Jansen's (f)); intervals from a seeded bootstrap. "
    f"Inputs with a total index below {SOBOL_SHARE:g} are left out here (all are in the "
    "JSON).")


def sobol_rows(result):
    """(output, input, first, first interval, total, total interval, base rows) for the
    inputs whose total index reaches :data:`SOBOL_SHARE`, largest first."""
    rows = []
    names = [u.name for u in result.plan.inputs]
    for output, ix in result.sobol.items():
        if ix is None:
            continue
        order = sorted(range(len(names)), key=lambda i: -ix.total[i])
        for i in order:
            if ix.total[i] >= SOBOL_SHARE:
                rows.append((output, names[i], ix.first[i], ix.first_interval[i],
                             ix.total[i], ix.total_interval[i], ix.rows))
    return rows


SOBOL_COLUMNS = [
    Column("Output", lambda r: r[0], "{}", "output"),
    Column("Input", lambda r: r[1], "{}", "input"),
    Column("First-order", lambda r: r[2], "{:.2f}", "first"),
    Column("Interval", lambda r: f"{r[3][0]:.2f} to {r[3][1]:.2f}", "{}", "first_interval"),
    Column("Total", lambda r: r[4], "{:.2f}", "total"),
    Column("Interval", lambda r: f"{r[5][0]:.2f} to {r[5][1]:.2f}", "{}", "total_interval"),
    Column("Base rows", lambda r: r[6], "{:d}", "rows"),
]


def sample_columns(result):
    """One row per sample record: its inputs, verdict, failures, the matched criticals."""
    cols = [Column("Sample", lambda r: r["index"], "{:d}", "sample")]
    if result.plan.indices == "sobol":
        cols.append(Column("Design row", lambda r: result.plan.design_row(r["index"]), "{}",
                           "design"))
    cols += [Column(u.name, lambda r, n=u.name: r["inputs"][n], "{:.6g}", u.name)
             for u in result.plan.inputs]
    cols += [Column("Verdict", lambda r: r.get("verdict"), "{}", "verdict")]
    cols += [Column(f"Fails {k}", lambda r, k=k: None if "error" in r else k in r["failed"],
                    "{}", f"fails_{k.replace('-', '_')}") for k in KINDS]
    cols += [Column("Margin excess %", lambda r: r.get("margin_excess_percent"), "{:.3g}",
                    "margin_excess_percent"),
             Column("Lowest log dec", lambda r: r.get("lowest_log_dec"), "{:.3g}",
                    "lowest_log_dec")]
    for j in range(len(result.base)):
        for q in ("speed_rpm", "margin_percent", "log_dec"):
            cols.append(Column(f"Critical {j + 1} {q}", lambda r, j=j, q=q: (
                r.get("criticals", {}).get(str(j)) or {}).get(q), "{:.6g}",
                f"critical_{j + 1}_{q}"))
    cols.append(Column("Error", lambda r: r.get("error"), "{}", "error"))
    return cols
