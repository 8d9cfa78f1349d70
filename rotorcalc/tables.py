"""Tables of results: one column list per result kind, shared by the terminal and CSV.

A :class:`Column` knows its heading, how to get a raw value from a row
object, and how to print it; CSV gets the raw values, the terminal the
printed ones.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Callable

import numpy as np

from .units import to_hz, to_rpm


@dataclass(frozen=True)
class Column:
    heading: str
    get: Callable
    fmt: str = "{:.4g}"
    csv_name: str = ""

    def text(self, row):
        value = self.get(row)
        if value is None or (isinstance(value, float) and not math.isfinite(value)):
            return "-" if value is None else ("inf" if value > 0 else "-inf")
        return self.fmt.format(value)

    @property
    def key(self):
        return self.csv_name or self.heading


def rows_csv(columns, rows):
    header = [c.key for c in columns]
    body = []
    for row in rows:
        values = []
        for c in columns:
            v = c.get(row)
            if isinstance(v, (float, np.floating)) and not math.isfinite(v):
                v = None
            values.append(v)
        body.append(values)
    return header, body


# --- modes at one speed: rows are mode indices with the Modes object bound -----------

def mode_columns(modes):
    return [
        Column("Mode", lambda i: i + 1, "{:d}", "mode"),
        Column("Freq (Hz)", lambda i: float(modes.frequency_hz[i]), "{:.2f}", "frequency_hz"),
        Column("Freq (cpm)", lambda i: float(modes.frequency_cpm[i]), "{:.0f}", "frequency_cpm"),
        Column("Damping ratio", lambda i: float(modes.damping_ratio[i]), "{:.4f}",
               "damping_ratio"),
        Column("Log dec", lambda i: float(modes.log_dec[i]), "{:.3f}", "log_dec"),
        Column("Whirl", lambda i: modes.whirl[i], "{}", "whirl"),
        Column("Forward share", lambda i: float(modes.forward_fraction[i]), "{:.0%}",
               "forward_fraction"),
    ]


# --- critical speeds with margins: rows are MarginRow objects --------------------------

MARGIN_COLUMNS = [
    Column("Speed rpm", lambda r: float(to_rpm(r.critical.speed)), "{:.0f}", "speed_rpm"),
    Column("Order", lambda r: r.critical.order, "{:g}X", "order"),
    Column("Mode", lambda r: r.critical.branch + 1, "{:d}", "branch"),
    Column("Whirl", lambda r: r.critical.whirl, "{}", "whirl"),
    Column("Freq Hz", lambda r: float(to_hz(r.critical.eigenvalue.imag)), "{:.2f}",
           "frequency_hz"),
    Column("Log dec", lambda r: r.critical.log_dec, "{:.3f}", "log_dec"),
    Column("AF est.", lambda r: r.amplification_factor, "{:.2f}", "amplification_factor"),
    Column("Where", lambda r: r.side, "{}", "side"),
    Column("Margin %", lambda r: r.margin, "{:.1f}", "margin_percent"),
    Column("Req. %", lambda r: r.required, "{:.1f}", "required_margin_percent"),
    Column("Verdict", lambda r: r.verdict, "{}", "verdict"),
]


RESPONSE_MARGIN_COLUMNS = [
    Column("AF resp.", lambda r: r.af_response, "{:.2f}", "amplification_factor_response"),
    Column("Req. resp. %", lambda r: r.required_response, "{:.1f}",
           "required_margin_response_percent"),
    Column("Verdict resp.", lambda r: r.verdict_response, "{}", "verdict_response"),
]


def margin_columns(table):
    """Margin columns, with the response-based ones when the table has them."""
    return MARGIN_COLUMNS + (RESPONSE_MARGIN_COLUMNS if table.has_response else [])


# --- response peaks and limit checks --------------------------------------------------

PEAK_COLUMNS = [
    Column("Case", lambda p: p.case, "{}", "case"),
    Column("Probe", lambda p: p.probe, "{}", "probe"),
    Column("Peak rpm", lambda p: float(to_rpm(p.speed)), "{:.0f}", "speed_rpm"),
    Column("Amplitude um pp", lambda p: p.amplitude * 1e6, "{:.2f}", "amplitude_pp_um"),
    Column("Half-power rpm", lambda p: None if p.half_power is None else
           "{:.0f}-{:.0f}".format(*to_rpm(np.array(p.half_power))), "{}", "half_power_rpm"),
    Column("Bandwidth rpm", lambda p: None if p.bandwidth is None else float(to_rpm(p.bandwidth)),
           "{:.0f}", "bandwidth_rpm"),
    Column("AF", lambda p: p.af, "{:.2f}", "amplification_factor"),
    Column("Note", lambda p: p.note, "{}", "note"),
]

LIMIT_COLUMNS = [
    Column("Case", lambda c: c.case, "{}", "case"),
    Column("Where", lambda c: c.where, "{}", "where"),
    Column("Check", lambda c: c.kind, "{}", "kind"),
    Column("Worst at rpm", lambda c: float(to_rpm(c.speed)), "{:.0f}", "speed_rpm"),
    Column("Value um", lambda c: c.value * 1e6, "{:.2f}", "value_um"),
    Column("Limit um", lambda c: c.limit * 1e6, "{:.2f}", "limit_um"),
    Column("Ratio", lambda c: c.ratio, "{:.2f}", "ratio"),
    Column("Verdict", lambda c: "pass" if c.passed else "fail", "{}", "verdict"),
]


def response_rows(result, case_index):
    """Rows (speed index, probe index) of one case's probe curves, long format."""
    for k in range(len(result.speeds)):
        for j in range(len(result.probes)):
            yield (case_index, k, j)


def response_columns(result):
    return [
        Column("Case", lambda r: result.cases[r[0]], "{}", "case"),
        Column("Speed rpm", lambda r: float(to_rpm(result.speeds[r[1]])), "{:.1f}", "speed_rpm"),
        Column("Probe", lambda r: result.probes[r[2]].name, "{}", "probe"),
        Column("Amplitude um pp", lambda r: float(1e6 * 2 * abs(result.probe_values[r])),
               "{:.4f}", "amplitude_pp_um"),
        Column("Phase lag deg", lambda r: float(result.probe_phase(r[0], r[2])[r[1]]), "{:.2f}",
               "phase_lag_deg"),
    ]


# --- sweep, long format: rows are (sweep, speed index, branch) --------------------------

def sweep_rows(result):
    whirl = result.whirl
    ff = result.forward_fraction
    present = result.present
    for k in range(len(result.speeds)):
        for j in range(result.eigenvalues.shape[1]):
            if present[k, j]:
                yield (k, j, whirl[k, j], ff[k, j])


def sweep_columns(result):
    return [
        Column("Speed (rpm)", lambda r: float(to_rpm(result.speeds[r[0]])), "{:.1f}",
               "speed_rpm"),
        Column("Branch", lambda r: r[1] + 1, "{:d}", "branch"),
        Column("Freq (cpm)", lambda r: float(to_rpm(result.frequency[r[0], r[1]])), "{:.1f}",
               "frequency_cpm"),
        Column("Freq (Hz)", lambda r: float(to_hz(result.frequency[r[0], r[1]])), "{:.3f}",
               "frequency_hz"),
        Column("Log dec", lambda r: float(result.log_dec[r[0], r[1]]), "{:.4f}", "log_dec"),
        Column("Whirl", lambda r: str(r[2]), "{}", "whirl"),
        Column("Forward share", lambda r: float(r[3]), "{:.3f}", "forward_fraction"),
    ]
