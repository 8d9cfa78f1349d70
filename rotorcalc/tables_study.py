"""Tables of an uncertainty study (:mod:`rotorcalc.analysis.study`): the same column lists
serve the terminal and the CSV."""

from __future__ import annotations

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


def influence_rows(result):
    """(output, {input: rho}) per output."""
    return list(result.influence.items())


def influence_columns(result):
    return [Column("Output", lambda r: r[0], "{}", "output")] + [
        Column(u.name, lambda r, n=u.name: r[1].get(n), "{:+.2f}", u.name)
        for u in result.plan.inputs]


def sample_columns(result):
    """One row per sample record: its inputs, verdict, failures, the matched criticals."""
    cols = [Column("Sample", lambda r: r["index"], "{:d}", "sample")]
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
