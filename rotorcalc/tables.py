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

from .analysis.margins import side_and_margin
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
        if isinstance(value, str):
            return value  # a word in a numeric column ("unbounded")
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

def _af_text(af):
    """The AF as the table shows it: none for an overdamped mode, unbounded for undamped."""
    if af is None:
        return None
    return "unbounded" if math.isinf(af) else af


MARGIN_COLUMNS = [
    Column("Speed rpm", lambda r: float(to_rpm(r.critical.speed)), "{:.0f}", "speed_rpm"),
    Column("Order", lambda r: r.critical.order, "{:g}X", "order"),
    Column("Branch", lambda r: r.critical.branch, "{:d}", "branch"),
    Column("Whirl", lambda r: r.critical.whirl, "{}", "whirl"),
    Column("Fwd share", lambda r: r.critical.forward_fraction, "{:.2f}", "forward_fraction"),
    Column("Freq Hz", lambda r: float(to_hz(r.critical.eigenvalue.imag)), "{:.2f}",
           "frequency_hz"),
    Column("Log dec", lambda r: r.critical.log_dec, "{:.3f}", "log_dec"),
    Column("AF est.", lambda r: _af_text(r.amplification_factor), "{:.2f}",
           "amplification_factor"),
    Column("Where", lambda r: r.side, "{}", "side"),
    Column("Margin %", lambda r: r.margin, "{:.1f}", "margin_percent"),
    Column("Req. %", lambda r: r.required, "{:.1f}", "required_margin_percent"),
    Column("Verdict", lambda r: r.verdict, "{}", "verdict"),
]


RESPONSE_MARGIN_COLUMNS = [
    Column("Peak rpm", lambda r: None if r.peak is None else float(to_rpm(r.peak.speed)),
           "{:.0f}", "peak_speed_rpm"),
    Column("AF resp.", lambda r: _af_text(r.af_response), "{:.2f}",
           "amplification_factor_response"),
    Column("Margin peak %", lambda r: r.peak_margin, "{:.1f}", "peak_margin_percent"),
    Column("Req. resp. %", lambda r: r.required_response, "{:.1f}",
           "required_margin_response_percent"),
    Column("Verdict resp.", lambda r: r.verdict_response, "{}", "verdict_response"),
]


def margin_columns(table, terse=False):
    """Margin columns, with the response-based ones when the table has them.

    ``terse`` (the terminal) leaves out the order and the frequency when every
    critical is synchronous (the frequency is then the speed).
    """
    columns = MARGIN_COLUMNS
    if terse and all(r.critical.order == 1.0 for r in table.rows):
        columns = [c for c in columns if c.key not in ("order", "frequency_hz")]
    return columns + (RESPONSE_MARGIN_COLUMNS if table.has_response else [])


# --- stability: rows are BranchStability objects ---------------------------------------

def _onset_text(m):
    """Every change of sign of the damping, going up in speed: "loses 3359, regains 6020"."""
    return None if not m.onsets else ", ".join(f"{c} {to_rpm(w):.0f}" for w, c in m.onsets)


STABILITY_COLUMNS = [
    Column("Branch", lambda m: m.branch, "{:d}", "branch"),
    Column("Whirl", lambda m: m.whirl, "{}", "whirl"),
    Column("Min log dec, operating", lambda m: m.min_log_dec_operating, "{:.3f}",
           "min_log_dec_operating"),
    Column("Min log dec, sweep start to trip", lambda m: m.min_log_dec_to_trip, "{:.3f}",
           "min_log_dec_to_trip"),
    Column("Judged log dec", lambda m: m.judged_log_dec, "{:.3f}", "judged_log_dec"),
    Column("At rpm", lambda m: None if m.worst_speed is None else float(to_rpm(m.worst_speed)),
           "{:.0f}", "worst_speed_rpm"),
    Column("Stability changes, rpm", _onset_text, "{}", "onsets_rpm"),
    Column("Verdict", lambda m: m.verdict, "{}", "verdict"),
]


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
    Column("AF", lambda p: _af_text(p.af), "{:.2f}", "amplification_factor"),
    Column("Note", lambda p: p.note, "{}", "note"),
]

def unbalance_rows(rotor):
    """Rows (case name, station label, weight) of every unbalance weight of a rotor."""
    return [(case.name, rotor.station_label(w.station), w)
            for case in rotor.unbalance for w in case.weights]


UNBALANCE_COLUMNS = [
    Column("Case", lambda r: r[0], "{}", "case"),
    Column("Station", lambda r: r[1], "{}", "station"),
    Column("Amount g*mm", lambda r: r[2].amount * 1e6, "{:.1f}", "amount_g_mm"),
    Column("Phase deg", lambda r: math.degrees(r[2].phase), "{:.0f}", "phase_deg"),
    Column("Set by", lambda r: r[2].basis or "given in the file", "{}", "basis"),
]

LIMIT_COLUMNS = [
    Column("Case", lambda c: c.case, "{}", "case"),
    Column("Where", lambda c: c.where, "{}", "where"),
    Column("Check", lambda c: c.check, "{}", "check"),
    Column("Worst at rpm", lambda c: float(to_rpm(c.speed)), "{:.0f}", "speed_rpm"),
    Column("Value um", lambda c: c.value * 1e6, "{:.2f}", "value_um"),
    Column("Limit um", lambda c: c.limit * 1e6, "{:.2f}", "limit_um"),
    Column("Ratio", lambda c: c.ratio, "{:.2f}", "ratio"),
    Column("Verdict", lambda c: c.verdict, "{}", "verdict"),
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


# --- what-if studies: critical-speed map, variants, stiffness window, levers -----------

#: N/m per klbf/in (1 lbf = 4.4482216152605 N, 1 in = 0.0254 m, exact definitions).
N_PER_M_PER_KLBF_IN = 4.4482216152605e3 / 0.0254


def separation(speed, operating):
    """Where a speed lies against the operating range and its margin, per cent (the
    margin table's own definition)."""
    return side_and_margin(speed, operating)


def crossing_columns(operating):
    """Crossings of the bearings' stiffness curves with the map curves (rows: Crossing)."""
    return [
        Column("Bearing", lambda c: c.bearing, "{}", "bearing"),
        Column("Direction", lambda c: c.direction, "{}", "direction"),
        Column("Map mode", lambda c: c.mode, "{:d}", "mode"),
        Column("Speed rpm", lambda c: float(to_rpm(c.speed)), "{:.0f}", "speed_rpm"),
        Column("Where", lambda c: separation(c.speed, operating)[0], "{}", "side"),
        Column("Margin %", lambda c: separation(c.speed, operating)[1], "{:.1f}",
               "margin_percent"),
        Column("Stiffness N/m", lambda c: c.stiffness, "{:.3e}", "stiffness_n_m"),
        Column("Stiffness klbf/in", lambda c: c.stiffness / N_PER_M_PER_KLBF_IN, "{:.0f}",
               "stiffness_klbf_in"),
    ]


def map_end_columns(cmap):
    """The map's two ends, per mode (rows: mode indices): soft and stiff support limits."""
    return [
        Column("Map mode", lambda j: j + 1, "{:d}", "mode"),
        Column(f"At {cmap.stiffness[0]:.2e} N/m, rpm", lambda j: float(to_rpm(cmap.speeds[0, j])),
               "{:.0f}", "speed_rpm_softest"),
        Column(f"At {cmap.stiffness[-1]:.2e} N/m, rpm",
               lambda j: float(to_rpm(cmap.speeds[-1, j])), "{:.0f}", "speed_rpm_stiffest"),
    ]


#: Rows: (stiffness N/m, mode index, critical speed rad/s, bearing share 0..1).
MAP_SHAPE_COLUMNS = [
    Column("Stiffness N/m", lambda r: r.stiffness, "{:.3e}", "stiffness_n_m"),
    Column("Map mode", lambda r: r.mode, "{:d}", "mode"),
    Column("Critical rpm", lambda r: float(to_rpm(r.speed)), "{:.0f}", "speed_rpm"),
    Column("Largest bearing motion", lambda r: r.bearing_share, "{:.0%}", "bearing_motion_share"),
]


def _change_rpm(r):
    if r.base_speed is None or r.variant == "base":
        return None
    return float(to_rpm(r.row.critical.speed - r.base_speed))


def comparison_columns(comparison):
    """One row per critical per variant (rows: ComparisonRow), with the change to the base."""
    orders = {r.row.critical.order for r in comparison.rows}
    columns = [
        Column("Variant", lambda r: r.variant, "{}", "variant"),
        Column("Speed rpm", lambda r: float(to_rpm(r.row.critical.speed)), "{:.0f}",
               "speed_rpm"),
    ]
    if orders - {1.0}:
        columns.append(Column("Order", lambda r: r.row.critical.order, "{:g}X", "order"))
    columns += [
        Column("Whirl", lambda r: r.row.critical.whirl, "{}", "whirl"),
        Column("Log dec", lambda r: r.row.critical.log_dec, "{:.3f}", "log_dec"),
        Column("Where", lambda r: r.row.side, "{}", "side"),
        Column("Margin %", lambda r: r.row.margin, "{:.1f}", "margin_percent"),
        Column("Req. %", lambda r: r.row.required, "{:.1f}", "required_margin_percent"),
        Column("Verdict", lambda r: r.row.verdict, "{}", "verdict"),
    ]
    if any(r.row.verdict_response is not None for r in comparison.rows):
        columns.append(Column("Verdict resp.", lambda r: r.row.verdict_response, "{}",
                              "verdict_response"))
    columns += [
        Column("Base rpm", lambda r: None if r.base_speed is None or r.variant == "base"
               else float(to_rpm(r.base_speed)), "{:.0f}", "base_speed_rpm"),
        Column("Change rpm", _change_rpm, "{:+.0f}", "change_rpm"),
        Column("Change %", lambda r: None if r.variant == "base" else r.change_percent,
               "{:+.1f}", "change_percent"),
    ]
    return columns


#: Rows: (factor, excess per cent) of a StiffnessWindow scan.
WINDOW_SCAN_COLUMNS = [
    Column("Factor", lambda r: float(r[0]), "x{:.3g}", "factor"),
    Column("Smallest margin excess %", lambda r: float(r[1]), "{:+.1f}", "excess_percent"),
    Column("Result", lambda r: _excess_state(float(r[1])), "{}", "result"),
]


def _excess_state(excess):
    # the what-if studies are loaded when one of their tables is written, not by every command
    from .analysis.whatif import excess_state
    return excess_state(excess)


def _limiting(end, get):
    return None if end.limiting is None else get(end.limiting)


#: Rows: (label, WindowEnd) for the low and high end of a StiffnessWindow.
WINDOW_END_COLUMNS = [
    Column("End", lambda r: r[0], "{}", "end"),
    Column("Factor", lambda r: r[1].factor, "x{:.3g}", "factor"),
    Column("Limiting critical rpm", lambda r: _limiting(r[1], lambda c: float(to_rpm(c.speed))),
           "{:.0f}", "limiting_critical_rpm"),
    Column("Whirl", lambda r: _limiting(r[1], lambda c: c.whirl), "{}", "limiting_whirl"),
    Column("Log dec", lambda r: _limiting(r[1], lambda c: c.log_dec), "{:.3f}",
           "limiting_log_dec"),
    Column("Note", lambda r: r[1].note or None, "{}", "note"),
]


def _agreement(s):
    if s.method == "derivative":     # no second value to compare with
        return None if s.value is not None else "not found"
    if s.value is None or s.check is None:
        return "not found"
    return "ok" if abs(s.value - s.check) <= 0.02 * abs(s.value) + 1e-4 else "differs"


#: Rows: (rank within its critical, Sensitivity).
SENSITIVITY_COLUMNS = [
    Column("Critical rpm", lambda r: float(to_rpm(r[1].critical.speed)), "{:.0f}",
           "critical_rpm"),
    Column("Whirl", lambda r: r[1].critical.whirl, "{}", "whirl"),
    Column("Rank", lambda r: r[0], "{:d}", "rank"),
    Column("Lever", lambda r: r[1].parameter, "{}", "parameter"),
    Column("% per %", lambda r: r[1].value, "{:+.4f}", "sensitivity"),
    Column("Half step", lambda r: r[1].check, "{:+.4f}", "sensitivity_half_step"),
    Column("Check", lambda r: _agreement(r[1]), "{}", "check"),
    Column("Method", lambda r: r[1].method, "{}", "method"),
    Column("rpm for +10 %", lambda r: None if r[1].value is None
           else float(to_rpm(r[1].critical.speed)) * r[1].value * 0.1, "{:+.0f}",
           "rpm_change_for_plus_10_percent"),
]


# --- cross-coupling screen --------------------------------------------------------------

#: Rows: (applied N/m, log dec, frequency rad/s) of a CouplingScreen.
COUPLING_STEP_COLUMNS = [
    Column("Applied q N/m", lambda r: float(r[0]), "{:.4g}", "applied_n_m"),
    Column("Log dec", lambda r: float(r[1]), "{:+.4f}", "log_dec"),
    Column("Freq (Hz)", lambda r: float(to_hz(r[2])), "{:.2f}", "frequency_hz"),
]

#: Rows: destabilising sources (Bearing objects of role "source") with the speed bound.
def source_columns(speed):
    from .analysis.coupling_screen import source_q
    return [
        Column("Source", lambda s: s.name, "{}", "name"),
        Column("Station", lambda s: s.station, "{:d}", "station"),
        Column("q N/m", lambda s: source_q(s, speed), "{:.4g}", "q_n_m"),
        Column("kxx N/m", lambda s: float(s.matrices(speed)[0][0, 0]), "{:.4g}", "kxx_n_m"),
        Column("cxx N s/m", lambda s: float(s.matrices(speed)[1][0, 0]), "{:.4g}", "cxx_n_s_m"),
    ]


#: Rows: (mode number, frequency rad/s, log dec, whirl, passed, synchronous log dec,
#: converged) of a SourcesCheck.
SOURCES_CHECK_COLUMNS = [
    Column("Mode", lambda r: r[0], "{:d}", "mode"),
    Column("Freq (Hz)", lambda r: float(to_hz(r[1])), "{:.2f}", "frequency_hz"),
    Column("Log dec", lambda r: float(r[2]), "{:+.4f}", "log_dec"),
    Column("Whirl", lambda r: r[3], "{}", "whirl"),
    Column("Verdict", lambda r: "pass" if r[4] else "fail", "{}", "verdict"),
]

#: The same rows read at each mode's own whirl frequency: the synchronous log decrement
#: beside it, and whether the iteration converged.
SOURCES_OWN_COLUMNS = SOURCES_CHECK_COLUMNS[:3] + [
    Column("Log dec (synchronous)", lambda r: float(r[5]), "{:+.4f}", "log_dec_synchronous"),
    Column("Fixed point", lambda r: "yes" if r[6] else "NOT REACHED", "{}", "converged"),
] + SOURCES_CHECK_COLUMNS[3:]


#: Rows: (name, station, fx N, fy N, magnitude N, share of the applied force) of a
#: StaticSolution, one per journal bearing.
STATIC_REACTION_COLUMNS = [
    Column("Bearing", lambda r: r[0], "{}", "bearing"),
    Column("Station", lambda r: r[1], "{:d}", "station"),
    Column("Fx N", lambda r: r[2], "{:.5g}", "fx_n"),
    Column("Fy N", lambda r: r[3], "{:.5g}", "fy_n"),
    Column("Load N", lambda r: r[4], "{:.5g}", "magnitude_n"),
    Column("Share", lambda r: r[5], "{:.1%}", "share_of_applied"),
]


#: Rows: BearingCurves.coefficient_rows (speed rad/s, kxx ... cyy in N/m and N s/m).
BEARING_COEFFICIENT_COLUMNS = [Column("Speed rpm", lambda r: to_rpm(r[0]), "{:.0f}", "speed_rpm")] + [
    Column(f"{name} {'N/m' if name[0] == 'k' else 'N*s/m'}", lambda r, j=j: r[j + 1], "{:.4g}",
           f"{name}_{'n_per_m' if name[0] == 'k' else 'n_s_per_m'}")
    for j, name in enumerate(("kxx", "kxy", "kyx", "kyy", "cxx", "cxy", "cyx", "cyy"))]

#: Rows: BearingCurves.film_rows (speed rad/s, load N, eccentricity, attitude rad, min
#: film m, film temperature K, Sommerfeld number, power loss W, side leakage m^3/s).
FILM_STATE_COLUMNS = [
    Column("Speed rpm", lambda r: to_rpm(r[0]), "{:.0f}", "speed_rpm"),
    Column("Load N", lambda r: r[1], "{:.4g}", "load_n"),
    Column("Eccentricity", lambda r: r[2], "{:.3f}", "eccentricity_ratio"),
    Column("Attitude deg", lambda r: math.degrees(r[3]) + 0.0, "{:.1f}", "attitude_deg"),
    Column("Min film um", lambda r: r[4] * 1e6, "{:.1f}", "min_film_um"),
    Column("Film degC", lambda r: r[5] - 273.15, "{:.1f}", "film_temperature_c"),
    Column("Sommerfeld", lambda r: r[6], "{:.3g}", "sommerfeld"),
    Column("Power kW", lambda r: r[7] * 1e-3, "{:.3g}", "power_loss_kw"),
    Column("Oil in L/min", lambda r: r[8] * 6e4, "{:.3g}", "oil_flow_l_per_min"),
]


def _shifted(column, offset, speed_at=1):
    """``column`` reading a BearingCurves.rows row: the speed at ``speed_at``, the rest
    from ``offset`` on; a blank where the row has no value there."""
    def get(row):
        rest = row[offset:]
        if rest and rest[0] is None:
            return None
        return column.get((row[speed_at], *rest))
    return Column(column.heading, get, column.fmt, column.csv_name)


#: Rows: BearingCurves.rows (several bearings in one file, film state blank for tables).
BEARING_ROW_COLUMNS = ([Column("Bearing", lambda r: r[0], "{}", "bearing")]
                       + [Column(c.heading, lambda r, c=c: c.get(r[1:]), c.fmt, c.csv_name)
                          for c in BEARING_COEFFICIENT_COLUMNS]
                       + [_shifted(c, 10) for c in FILM_STATE_COLUMNS[1:]])

#: Rows: StaticSolution.film_rows (the journal's name, then a film-state row).
STATIC_FILM_COLUMNS = ([Column("Bearing", lambda r: r[0], "{}", "bearing")]
                       + [Column(c.heading, lambda r, c=c: c.get(r[1:]), c.fmt, c.csv_name)
                          for c in FILM_STATE_COLUMNS[1:]])


def _worst_text(measure, value):
    if value is None:
        return None
    if measure.startswith("margin"):
        return "unstable" if value == -math.inf else (
            "no margin required" if value == math.inf else f"{value:+.1f}")
    return f"{value:.3f}"


#: Rows: Envelope.worst (WorstCase records).
WORST_CASE_COLUMNS = [
    Column("Item", lambda w: w.item, "{}", "item"),
    Column("Compared", lambda w: w.measure, "{}", "measure"),
    Column("Worst at", lambda w: w.variant, "{}", "worst_variant"),
    Column("Worst", lambda w: _worst_text(w.measure, w.value), "{}", "worst_value"),
    Column("Nominal", lambda w: _worst_text(w.measure, w.nominal), "{}", "nominal_value"),
    Column("Verdict there", lambda w: "pass" if w.passed else "FAIL", "{}", "passed"),
]

#: Rows: BearingCurves.pad_rows (pad, pivot rad, tilt rad, minimum film m, load N).
PAD_COLUMNS = [
    Column("Pad", lambda r: r[0], "{:d}", "pad"),
    Column("Pivot deg", lambda r: math.degrees(r[1]) % 360.0, "{:.0f}", "pivot_deg"),
    Column("Tilt mrad", lambda r: r[2] * 1e3, "{:.3f}", "tilt_mrad"),
    Column("Min film um", lambda r: r[3] * 1e6, "{:.1f}", "min_film_um"),
    Column("Load N", lambda r: r[4], "{:.4g}", "load_n"),
    Column("Film degC", lambda r: r[5] - 273.15, "{:.1f}", "film_temperature_c"),
    Column("Power kW", lambda r: r[6] * 1e-3, "{:.3g}", "power_kw"),
    Column("Oil in L/min", lambda r: r[7] * 6e4, "{:.3g}", "inflow_l_per_min"),
]

#: Rows: BearingCurves.whirl_rows (whirl rad/s, kxx ... cyy).
WHIRL_COLUMNS = [Column("Whirl rpm", lambda r: to_rpm(r[0]), "{:.0f}", "whirl_rpm")] + \
    BEARING_COEFFICIENT_COLUMNS[1:]
