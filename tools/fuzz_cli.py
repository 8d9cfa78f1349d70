#!/usr/bin/env python3
"""Black-box fuzz harness for the rotorcalc command line.

Run from the project root (scratch files go to /tmp/fuzz unless --scratch says otherwise):

    .venv/bin/python tools/fuzz_cli.py --tries 3000 --seed 1 --out /tmp/fuzz/report.json
    .venv/bin/python tools/fuzz_cli.py --seed 1 --only 117     # replay one try and show its output

Each try starts from a tiny invented rotor (2-4 sections of 1-2 elements, 2 bearings, one
unbalance case, a probe and a clearance, 7 sweep speeds, 3 modes; now and then a far-end
bearing given by its geometry, now and then a bundled case
with its speed counts lowered), breaks it in one named way (KINDS below), runs one of the thirteen
commands in-process with typer's CliRunner under a per-try time limit, and classifies the
result. Tries are generated from Random(f"{seed}:{index}"), so a seed always gives the same
inputs; only timing-dependent outcomes (hang) can differ between machines.

Processes: the command you start is a light supervisor; it starts ONE worker process that runs
the tries one after another, in-process, and journals each to <scratch>/journal.jsonl. The
supervisor only sleeps and reads the journal: when a try outlives --timeout plus 5 s (a hang in
C code that no signal reaches) it kills that worker and starts a new one at the next try; after
any hang the worker restarts itself, so an interrupted command leaves no state behind. The
worker runs with an address-space limit (--mem-gb, default 4) and never with --jobs 0.
Other options: --timeout SECONDS (per try, default 10), --start N (first try), --scratch DIR.

Outcomes (one per try, the first that applies):
  hang                 the time limit fired (--timeout, default 10 s; a tiny rotor runs in well
                       under 1 s). A hang inside C code that a signal cannot interrupt is
                       ended by the supervisor killing the worker process ("hard" hang).
  traceback            an exception other than SystemExit escaped the command, "Traceback"
                       appears in the output, the command ended with exit 70 (its own "Internal
                       error" paragraph: an exception it did not expect), or the worker process
                       died. Signature: exception type and the innermost frame file:line (for
                       exit 70 the exception is found through the exception chain).
  impossible-accepted  a size-bomb, impossible-physics or dimensionless-unit try ended with
                       exit 0, 1 or 5: it should have been refused as bad input (exit 2).
  unclear              exit 2, but the message names no key or option (heuristic: no
                       'quoted.key': and no --option other than --help in the output).
  unexpected-exit      none of the above, and the exit code is not a correct one for the kind
                       (for exit 3 the report gives the exception behind it as "cause").
  ok                   the exit code is a correct one for the kind.

Correct exit codes by kind (some variants differ; the report lists every variant's set):
  markup, math-text             0 1 5   valid input, names must be shown literally
  dimensionless-unit            2
  odd-speed-unit                2 for "rad*Hz"/"Hz*rad" (Hz for a speed means rev/s here, so
                                the unit names two angles: 2 pi apart), 0 1 2 5 for deg/s
  extreme-magnitude             0 1 2 3 5  (a clean answer or a clean refusal)
  impossible-physics            2
  size-bomb                     2
  encoding                      2 (a UTF-8 byte-order mark: 0 1 2 5)
  option-error                  2
  output-fault                  4, or 2 where the path is refused up front (a folder, a path
                                under a file, the input itself, an unknown picture type, an
                                empty path); missing folders are made (the command's own
                                verdict: 0, 1 or 5); a read-only folder is writable by root
  structural-mutation           0 1 2 3 5
The harness exits 1 when any traceback, hang or impossible-accepted occurred, else 0.

The report (--out) holds counts per kind x command x outcome, exit codes per kind, every crash
signature with up to 5 examples, and the hangs, impossible inputs accepted, unclear messages and
unexpected exits; the example inputs are written under <scratch>/examples/.
This harness tests the command line's handling of bad input only, not its results; rotorcalc
itself is a screening aid whose results must be confirmed against the applicable standard, the
purchase specification, local codes and a licensed engineer's review.
"""

from __future__ import annotations

import argparse
import json
import math
import os
import random
import re
import shutil
import signal
import subprocess
import sys
import time
import tomllib
import traceback
from dataclasses import dataclass, field
from pathlib import Path

for _var in ("OPENBLAS_NUM_THREADS", "OMP_NUM_THREADS", "MKL_NUM_THREADS"):
    os.environ[_var] = "1"  # before numpy is imported (by the worker)
os.environ["MPLBACKEND"] = "Agg"

ROOT = Path(__file__).resolve().parents[1]
COMMANDS = ["modes", "sweep", "criticals", "check", "response", "layout", "stiffness-map",
            "compare", "window", "levers", "cross-coupling", "statics", "bearing"]
KINDS = ["markup", "math-text", "dimensionless-unit", "odd-speed-unit", "extreme-magnitude",
         "impossible-physics", "size-bomb", "encoding", "option-error", "output-fault",
         "structural-mutation"]
MUST_REFUSE = {"size-bomb", "impossible-physics", "dimensionless-unit"}
OUTCOMES = ["traceback", "hang", "impossible-accepted", "unclear", "unexpected-exit", "ok"]
CLEAN = frozenset({0, 1, 2, 3, 5})
CAUTION = ("This harness tests input handling only. rotorcalc is a screening aid: confirm its results "
           "against the applicable standard, the purchase specification, local codes and a "
           "licensed engineer's review.")
GRACE = 5.0          # seconds past the time limit before the supervisor kills the worker
RESTART = 75         # worker exit code: restart me after a hang (fresh interpreter state)

# Which options of each command take a speed, write a file, or draw a picture.
SPEED_OPT = {"modes": "--speed", "sweep": "--speed-to", "criticals": "--speed-to", "check": "--speed-to",
             "response": "--orbit-speeds", "stiffness-map": "--curve-speed-to", "statics": "--speed"}
OUT_OPTS = {"modes": ["--json", "--csv", "--plot"], "sweep": ["--plot", "--json", "--csv"],
            "criticals": ["--plot", "--json", "--csv"], "check": ["--plot", "--json", "--csv"],
            "response": ["--json", "--csv", "--plot-bode", "--plot-polar", "--plot-orbits"],
            "layout": ["--plot"], "stiffness-map": ["--plot", "--json", "--csv", "--plot-shapes"],
            "compare": ["--plot", "--json", "--csv"], "window": ["--json", "--csv"],
            "levers": ["--json", "--csv"], "cross-coupling": ["--plot", "--json", "--csv"],
            "statics": ["--plot", "--json", "--csv"], "bearing": ["--plot", "--json", "--csv"]}
PICTURE_OPTS = {"--plot", "--plot-bode", "--plot-polar", "--plot-orbits", "--plot-shapes"}


# ---------------------------------------------------------------- TOML writing (own, minimal)

class Raw(str):
    """Text written into the TOML file verbatim (deep nesting, dates, odd literals)."""


class Inline(dict):
    """A table written inline, { a = 1 }."""


_BARE_KEY = re.compile(r"^[A-Za-z0-9_-]+$")
_ESCAPE = re.compile(r'[\\"\x00-\x1f\x7f]')


def toml_str(s):
    def esc(m):
        c = m.group(0)
        return {"\\": "\\\\", '"': '\\"'}.get(c, "\\u%04x" % ord(c))
    return '"' + _ESCAPE.sub(esc, s) + '"'


def toml_key(k):
    return k if _BARE_KEY.match(k) else toml_str(k)


def toml_value(v):
    if isinstance(v, Raw):
        return str(v)
    if isinstance(v, bool):
        return "true" if v else "false"
    if isinstance(v, float):
        return "nan" if math.isnan(v) else ("inf" if v > 0 else "-inf") if math.isinf(v) else repr(v)
    if isinstance(v, int):
        return str(v)
    if isinstance(v, str):
        return toml_str(v)
    if isinstance(v, dict):
        return "{" + ", ".join(f"{toml_key(k)} = {toml_value(x)}" for k, x in v.items()) + "}"
    return "[" + ", ".join(toml_value(x) for x in v) + "]"


def _is_table(v):
    return isinstance(v, dict) and not isinstance(v, Inline)


def _is_table_list(v):
    return isinstance(v, list) and v and all(_is_table(x) for x in v)


def to_toml(doc):
    lines = []

    def table(path, d, header):
        if header:
            lines.append(header)
        for k, v in d.items():
            if not _is_table(v) and not _is_table_list(v):
                lines.append(f"{toml_key(k)} = {toml_value(v)}")
        for k, v in d.items():
            p = path + [toml_key(k)]
            if _is_table(v):
                table(p, v, "\n[" + ".".join(p) + "]")
            elif _is_table_list(v):
                for item in v:
                    table(p, item, "\n[[" + ".".join(p) + "]]")

    table([], doc, None)
    return "\n".join(lines) + "\n"


# ---------------------------------------------------------------- the starting rotors

def tiny_rotor(rng):
    """An invented rotor small enough that every command runs in well under a second."""
    n = rng.randint(2, 4)
    mat = rng.choice(["bar_stock", "forged_alloy", "ring_steel"])
    doc = {"title": rng.choice(["Sawmill chipper fan, line 2", "Brine circulation pump 7",
                                "Kiln draft blower, stand 3", "Glasshouse vent fan",
                                "Grain dryer fan", "Test-rig spindle B"]),
           "materials": {mat: {"youngs_modulus": rng.choice(["200 GPa", "205 GPa"]),
                               "density": "7800 kg/m^3"}}}
    if rng.random() < 0.3:
        doc["materials"][mat]["poisson_ratio"] = 0.29
    doc["section"] = [{"length": f"{rng.randint(80, 220)} mm",
                       "outer_diameter": f"{rng.randint(35, 70)} mm", "material": mat,
                       "elements": rng.randint(1, 2)} for _ in range(n)]
    b = sorted(rng.sample(range(n + 1), 2))
    d = rng.randint(0, n)
    doc["disk"] = [{"at": d, "name": rng.choice(["wheel", "impeller", "hub"]),
                    "mass": f"{rng.randint(3, 15)} kg", "polar_inertia": "0.04 kg*m^2",
                    "transverse_inertia": "0.022 kg*m^2"}]
    if rng.random() < 0.3:
        doc["disk"].append({"at": rng.randint(0, n), "name": "collar", "mass": "1.5 kg"})
    doc["bearing"] = []
    for j, s in enumerate(b):
        k = rng.uniform(2e7, 1e8)
        brg = {"name": ["drive end", "far end"][j], "at": s, "kxx": f"{k:.3g} N/m",
               "kyy": f"{1.2 * k:.3g} N/m", "cxx": "2e4 N*s/m", "cyy": "2.5e4 N*s/m"}
        if j == 0 and rng.random() < 0.3:
            brg.update(speeds=["1000 rpm", "5000 rpm"], kxx=[f"{k:.3g} N/m", f"{1.3 * k:.3g} N/m"])
        if rng.random() < 0.25:
            brg["support"] = {"kx": "2e8 N/m", "ky": "3e8 N/m", "mass": "20 kg"}
        if j == 1 and rng.random() < 0.2:     # a sleeve from its geometry (film solves)
            brg = {"name": "far end", "at": s,
                   "film": {"bore": rng.choice(["plain", "two-lobe", "offset-halves"]),
                            "diameter": "50 mm", "length": "25 mm", "clearance": "50 um"},
                   "oil": {"grade": rng.choice([22, 32, 46]), "inlet_temperature": "45 degC"}}
            if brg["film"]["bore"] != "plain":
                brg["film"]["preload"] = 0.4
        doc["bearing"].append(brg)
    if rng.random() < 0.25:    # a seal tabulated over speed and whirl frequency, and a screen
        doc["bearing"].append({"name": "wheel seal", "at": d, "role": "seal",
                               "speeds": ["1000 rpm", "5000 rpm"],
                               "whirl_frequencies": ["0 Hz", "50 Hz", "150 Hz"],
                               "kxx": "1e6 N/m", "kyy": "1e6 N/m",
                               "kxy": [["2e5 N/m", "3e5 N/m", "4e5 N/m"], ["3e5 N/m", "4e5 N/m", "5e5 N/m"]],
                               "kyx": [["-2e5 N/m", "-3e5 N/m", "-4e5 N/m"], ["-3e5 N/m", "-4e5 N/m", "-5e5 N/m"]],
                               "cxx": [[500, 800, 1200], [600, 900, 1300]],
                               "cyy": [[500, 800, 1200], [600, 900, 1300]]})
        doc["cross_coupling"] = [{"name": "wheel gas", "at": d, "q": "3e5 N/m"}]
        doc["coupling_screen"] = {"coefficients_at": rng.choice(["synchronous", "mode-frequency"])}
    if rng.random() < 0.25:    # the statics: gravity somewhere, a steady load
        doc["statics"] = {"gravity": rng.choice(["-y", "+x", "none"])}
        doc["static_load"] = [{"name": "coupling pull", "at": 0, "fy": "-800 N", "mxz": "20 N*m"}]
    rpm = rng.choice([1500, 1800, 3000, 3600, 4500])
    doc["operating"] = {"min_speed": f"{int(rpm * 0.8)} rpm", "max_speed": f"{rpm} rpm",
                        "trip_speed": f"{int(rpm * 1.1)} rpm"}
    doc["analysis"] = {"speed_count": 7, "mode_count": 3}
    doc["unbalance"] = {rng.choice(["wheel_heavy", "trim_run", "spot_a"]): {
        "weight": [{"at": d, "amount": f"{rng.randint(5, 40)} g*mm"}]}}
    doc["probe"] = [{"name": "probe near wheel", "at": d}]
    doc["clearance"] = [{"name": "eye seal", "at": d, "radial": "0.3 mm"}]
    doc["response"] = {"speed_count": 9}
    return doc, rpm


def bundled_rotor(rng):
    """One of the bundled cases, read as data, its speed counts lowered to keep it quick."""
    path = ROOT / "cases" / rng.choice(["feed_pump.toml", "overhung_fan.toml", "compressor.toml"])
    doc = tomllib.loads(path.read_text())
    doc.setdefault("analysis", {})["speed_count"] = 9
    doc.setdefault("response", {})["speed_count"] = 15
    m = re.match(r"\s*([\d.eE+]+)\s*(rpm|Hz)", str(doc["operating"]["max_speed"]))
    rpm = float(m.group(1)) * (60 if m and m.group(2) == "Hz" else 1) if m else 3000
    return doc, int(rpm)


# ---------------------------------------------------------------- one try

@dataclass
class Try:
    index: int
    kind: str
    command: str
    doc: dict
    rpm: int
    variant: str = ""
    extra: list = field(default_factory=list)       # options after the base ones
    files: dict = field(default_factory=dict)       # name -> bytes, in the work folder
    setup: list = field(default_factory=list)       # ("dir"|"rodir"|"file"|"fifo", name)
    expect: frozenset = CLEAN
    case_name: str = "rotor.toml"                   # the CASE argument (a name in work/)
    no_case: bool = False
    variants: dict | None = None                    # compare: the variants file, as data
    vary: list | None = None                        # compare: --vary texts instead of a file
    absent: set = field(default_factory=set)        # files that must not exist
    marker: tuple = ()                              # markup: (name as written, plain part)
    args: list = field(default_factory=list)


def pick_path(rng, t, paths):
    """Choose one of the (path, unit-class) targets that exists in this rotor."""
    ok = [p for p in paths if get_path(t.doc, p[0][:-1]) is not None]
    return rng.choice(ok)


def get_path(doc, path):
    for p in path:
        try:
            doc = doc[p]
        except (KeyError, IndexError, TypeError):
            return None
    return doc


def set_path(doc, path, value):
    for p in path[:-1]:
        doc = doc.setdefault(p, {}) if isinstance(doc, dict) else doc[p]
    doc[path[-1]] = value


def first_material(doc):
    return doc["section"][0]["material"]


def speed_targets(t):
    return [(("operating", "min_speed"), "speed"), (("operating", "max_speed"), "speed"),
            (("operating", "trip_speed"), "speed"), (("analysis", "speed_to"), "speed"),
            (("response", "speed_to"), "speed")]


def value_targets(t):
    mat = first_material(t.doc)
    return speed_targets(t) + [
        (("section", 0, "length"), "length"), (("section", 0, "outer_diameter"), "length"),
        (("clearance", 0, "radial"), "length"), (("response", "vibration_limit"), "length"),
        (("bearing", 0, "kxx"), "stiffness"), (("bearing", 1, "kyy"), "stiffness"),
        (("bearing", 1, "film", "clearance"), "length"),
        (("bearing", 1, "film", "length"), "length"),
        (("bearing", 0, "cxx"), "damping"), (("disk", 0, "mass"), "mass"),
        (("materials", mat, "youngs_modulus"), "modulus"), (("materials", mat, "density"), "density"),
        (("unbalance",), "unbalance")]


def name_text(rng, t, tokens):
    token = rng.choice(tokens)
    t.marker = (token + f"Zq{t.index}", f"Zq{t.index}")
    return token, t.marker[0]


def gen_names(rng, t, tokens):
    """Markup or math text in a title or a name; pictures asked for where the command draws."""
    token, name = name_text(rng, t, tokens)
    targets = ["title", "bearing", "disk", "probe", "clearance", "unbalance"]
    if t.command == "compare":
        targets += ["variant", "vary", "vary"]
    where = rng.choice(targets)
    t.variant = f"{where}:{token}"
    d = t.doc
    if where == "title":
        d["title"] = name
    elif where == "unbalance":
        old = list(d["unbalance"].items())
        d["unbalance"] = {name: old[0][1], **dict(old[1:])}
    elif where == "variant":
        t.variants = default_variants(t)
        t.variants["variant"][0]["name"] = name
    elif where == "vary":
        t.vary = [f"{name}: bearing.*.k *= 0.8"]
    else:
        d.setdefault("probe", [{"at": 1}])          # bundled cases may have neither
        d.setdefault("clearance", [{"at": 1, "radial": "0.5 mm"}])
        d[where][0]["name"] = name
    if t.command in ("modes", "sweep", "criticals", "check", "response", "stiffness-map",
                     "compare") and rng.random() < 0.7:
        opt = [o for o in OUT_OPTS[t.command] if o in PICTURE_OPTS and o != "--plot-shapes"]
        t.extra += [rng.choice(opt), str(WORK / rng.choice(["pic.png", "pic.png", "pic.svg"]))]
    t.expect = frozenset({0, 1, 5})


def gen_markup(rng, t):
    gen_names(rng, t, ["[/]", "[bold]", "[link=x]", "[red]", "[/bold]", "[bold]x[/]"])


def gen_math(rng, t):
    gen_names(rng, t, ["$x$", "$", "\\frac", "$\\frac{1}{$", "50$/h ", "$_^$"])


def cli_or_file(rng, t, cli_values, file_targets, file_value):
    """Put a value on the command line (when the command takes one) or into the file."""
    if t.command in SPEED_OPT and cli_values and rng.random() < 0.4:
        value = rng.choice(cli_values)
        if t.command == "stiffness-map" and rng.random() < 0.5:    # a stiffness range needs both ends
            t.extra += rng.choice([["--stiffness-from", value[1], "--stiffness-to", "1e10 N/m"],
                                   ["--stiffness-from", "1e6 N/m", "--stiffness-to", value[1]]])
            t.variant = f"{t.extra[-4]}={t.extra[-3]} {t.extra[-2]}={t.extra[-1]}"
        else:
            t.extra += [SPEED_OPT[t.command], value[0]]
            t.variant = f"{SPEED_OPT[t.command]}={value[0]}"
        return
    if t.command == "compare" and cli_values and rng.random() < 0.3:
        value = rng.choice(cli_values)
        t.vary = [f"trial: operating.trip_speed = {value[0]}"]
        t.variant = f"--vary trip_speed={value[0]}"
        return
    path, cls = pick_path(rng, t, file_targets)
    value = file_value(cls, path)
    if path == ("unbalance",):
        path = ("unbalance", next(iter(t.doc["unbalance"])), "weight", 0, "amount")
    set_path(t.doc, path, value)
    t.variant = f"{'.'.join(map(str, path[-2:]))}={value}"


def gen_dimensionless(rng, t):
    pool = {"length": ["50 percent", "500 mm/m", "500000 ppm"],
            "speed": ["1500 percent", "3000 ppm", "500 mm/m"],
            "stiffness": ["500000 ppm", "50 percent"]}
    targets = [p for p in value_targets(t) if p[1] in pool]
    cli_or_file(rng, t, [(s, k) for s, k in zip(pool["speed"], pool["stiffness"] * 2)], targets,
                lambda cls, path: rng.choice(pool[cls]))
    t.expect = frozenset({2})


def gen_odd_speed(rng, t):
    def values(path=()):             # the speed the target would have in rpm, in odd units
        rpm = t.rpm * {"min_speed": 0.8, "trip_speed": 1.1}.get(path[-1] if path else "", 1.0)
        radps = rpm * 2 * math.pi / 60
        return [f"{radps:.4g} rad*Hz", f"{radps:.4g} Hz*rad", f"{rpm * 6:g} deg/s"]
    cli_or_file(rng, t, [(v, "1e8 N/m") for v in values()], speed_targets(t),
                lambda cls, path: rng.choice(values(path)))
    if t.command == "stiffness-map" and t.variant.startswith("--stiffness-from"):   # a speed option instead
        t.extra[-4:] = ["--curve-speed-to", rng.choice(values())]
        t.variant = f"--curve-speed-to={t.extra[-1]}"
    # an angle with Hz is exact: "188.5 rad*Hz" is 188.5 rad/s, as "188.5 rad/s" is
    # (Hz alone means rev/s); so every one of these is a clean run (docs/input.md, Units)
    t.expect = CLEAN


def gen_extreme(rng, t):
    units = {"speed": "rpm", "length": "m", "stiffness": "N/m", "damping": "N*s/m", "mass": "kg",
             "modulus": "Pa", "density": "kg/m^3", "unbalance": "kg*m"}
    if rng.random() < 0.25:          # a whole fixed-speed operating range at one extreme
        v = rng.choice(["1e300 rpm", "1e-300 rpm"])
        t.doc["operating"] = {"min_speed": v, "max_speed": v, "trip_speed": v}
        t.variant = f"operating={v}"
    else:
        def value(cls, path):
            mags = ["1e300", "1e-300"] + (["1e60", "1e-3"] if cls == "stiffness" else [])
            return f"{rng.choice(mags)} {units[cls]}"
        cli_or_file(rng, t, [("1e300 rpm", "1e-300 N/m"), ("1e-300 rpm", "1e60 N/m")],
                    value_targets(t), value)
    t.expect = CLEAN


def gen_impossible(rng, t):
    d, choices = t.doc, ["neg-damping", "cross-coupled-3x", "disk-Ip>2Id", "poisson-from-G",
                         "neg-response-speed_from", "neg-sweep-speed_from"]
    if t.command in SPEED_OPT or t.command == "compare":
        choices += ["neg-cli-speed"] * 2
    v = t.variant = rng.choice(choices) if rng.random() > 0.15 else "no-bearings"
    if v == "no-bearings":
        t.command = "check"          # a free-free rotor through the design gate
    b = rng.randrange(len(d["bearing"]))
    if v == "neg-damping":
        d["bearing"][b][rng.choice(["cxx", "cyy"])] = "-2e4 N*s/m"
    elif v == "cross-coupled-3x":
        d["bearing"][b].update(kxx="5e7 N/m", kyy="5e7 N/m", kxy="1.5e8 N/m", kyx="1.5e8 N/m")
    elif v == "disk-Ip>2Id":
        d["disk"][0] = {"at": d["disk"][0]["at"], "mass": "10 kg", "polar_inertia": "0.1 kg*m^2",
                        "transverse_inertia": "0.02 kg*m^2"}
    elif v == "poisson-from-G":                       # G = E/(2(1+nu)); nu > 0.5 when G < E/3
        g = rng.choice(["50 GPa", "60 GPa", "20 GPa"])
        d["materials"][first_material(d)] = {"youngs_modulus": "200 GPa", "density": "7800 kg/m^3",
                                             "shear_modulus": g}
        t.variant += f"({g} with E=200 GPa)"
    elif v == "neg-response-speed_from":
        d.setdefault("response", {})["speed_from"] = "-500 rpm"
    elif v == "neg-sweep-speed_from":
        d["analysis"]["speed_from"] = "-500 rpm"
    elif v == "no-bearings":
        d.pop("bearing")
    elif t.command == "compare":
        t.vary = ["reverse: operating.min_speed = -100 rpm"]
        t.variant += " --vary min_speed=-100 rpm"
    else:
        opt = SPEED_OPT[t.command]
        t.extra += [opt, "-3000 rpm" if opt in ("--speed", "--orbit-speeds") else "-1 rpm"]
        t.variant += f" {opt}={t.extra[-1]}"
    t.expect = frozenset({2})


def gen_size_bomb(rng, t):
    d = t.doc
    v = t.variant = rng.choice(["speed_count=10**12", "elements=10**6", "modes=10**9",
                                "title-10MB", "title-4MB", "60000-sections", "9**9**9 mm", "1e999999 mm",
                                "nested-array-5000", "nested-inline-5000"])
    if v == "speed_count=10**12":
        d[rng.choice(["analysis", "response"])]["speed_count"] = 10 ** 12
    elif v == "elements=10**6":
        d["section"][0]["elements"] = 10 ** 6
    elif v == "modes=10**9":
        d["analysis"]["mode_count"] = 10 ** 9
    elif v.startswith("title-"):     # 10 MB; 4 MB stays under a file-size cap, if there is one
        d["title"] = ("Zq blower " * (2 ** 20))[: int(v[6:-2]) * 2 ** 20]
    elif v == "60000-sections":
        mat = first_material(d)
        # one inline array (about 3 MB), so that a file-size cap alone does not stop it
        d["section"] = [Inline(length=0.005, outer_diameter=0.05, material=mat)] * 60000
        d.pop("stations", None)
        for i, b in enumerate(d.get("bearing", [])):
            b["at"] = [1, 59999, 30000][min(i, 2)]
        for key in ("disk", "probe", "clearance"):
            for x in d.get(key, []):
                x["at"] = 30000
        for case in d.get("unbalance", {}).values():
            for w in case["weight"]:
                w["at"] = 30000
    elif v in ("9**9**9 mm", "1e999999 mm"):
        d["section"][0][rng.choice(["length", "outer_diameter"])] = v
    elif v == "nested-array-5000":
        d["analysis"]["orders"] = Raw("[" * 5000 + "1" + "]" * 5000)
    else:
        d["bearing"][0]["support"] = Raw("{kx = " * 5000 + "1" + "}" * 5000)
    if t.command in ("sweep", "criticals", "check"):
        t.extra += ["--jobs", "1"]   # large models would otherwise get one worker per core
    t.expect = frozenset({2})


def gen_encoding(rng, t):
    v = t.variant = rng.choice(["latin-1 byte", "invalid bytes", "utf-8 BOM", "NUL in title",
                                "NUL at line start", "utf-16", "empty file", "folder as case",
                                "missing file"])
    target = "rotor.toml"
    if t.command == "compare" and rng.random() < 0.5:
        target = "variants.toml"
        t.variants = default_variants(t)
    t.variant += f" ({target})"
    text = to_toml(t.variants if target == "variants.toml" else t.doc)
    raw = text.encode()
    if v == "latin-1 byte":
        raw = raw.replace(b'title = "', b'title = "Caf\xe9 ', 1) if b"title" in raw else b"# \xe9\n" + raw
    elif v == "invalid bytes":
        lines = raw.split(b"\n")
        lines.insert(rng.randrange(len(lines)), b"# \xff\xfe\xc3(")
        raw = b"\n".join(lines)
    elif v == "utf-8 BOM":
        raw = b"\xef\xbb\xbf" + raw
    elif v == "NUL in title":
        raw = raw.replace(b'title = "', b'title = "a\x00b', 1) if b"title" in raw else b"\x00" + raw
    elif v == "NUL at line start":
        lines = raw.split(b"\n")
        lines.insert(rng.randrange(len(lines)), b"\x00")
        raw = b"\n".join(lines)
    elif v == "utf-16":
        raw = text.encode("utf-16")
    elif v == "empty file":
        raw = b""
    t.files[target] = raw
    if v in ("folder as case", "missing file"):
        t.files.pop(target)
        t.absent.add(target)
        if v == "folder as case":
            t.setup.append(("dir", target))
    t.expect = CLEAN - {3} if v.startswith("utf-8 BOM") else frozenset({2})


OPTION_ERRORS = {
    "modes": [["--speed", "abc"], ["--speed", ""], ["--speed", "3000"], ["--mode-count", "0"],
              ["--plot-mode", "0"], ["--plot-mode", "99", "--plot", "{W}/s.png"], ["--speed", "1e999 rpm"]],
    "sweep": [["--speed-count", "1"], ["--speed-count", str(10 ** 9)], ["--jobs", "-1"], ["--speed-to", "abc"],
              ["--speed-to", "3000"], ["--speed-count", "abc"]],
    "criticals": [["--orders", "0"], ["--orders", "1e308"], ["--orders", "abc"], ["--orders", "1,,2"],
                  ["--orders", "-1"], ["--orders", "nan"], ["--margin-rule", "bogus"], ["--margin-below", "-5"],
                  ["--margin-above", "nan"], ["--stability-rule", "bogus"], ["--min-log-dec", "-1"],
                  ["--min-log-dec", "nan"], ["--speed-count", "1"], ["--speed-count", str(10 ** 9)],
                  ["--jobs", "-1"], ["--stability-rule", "none", "--min-log-dec", "0.2"]],
    "response": [["--unbalance", "nope"], ["--orbit-speeds", "3000"], ["--orbit-speeds", "abc rpm"], ["--orbit-speeds", ""],
                 ["--orbit-speeds", "3000 rpm,,"]],
    "layout": [["--plot"], ["NOOUT"]],
    "stiffness-map": [["--stiffness-count", "0"], ["--stiffness-count", "401"], ["--mode-count", "0"], ["--mode-count", "99"],
                      ["--whirl", "sideways"], ["--stiffness-from", "abc"], ["--stiffness-from", "-1e7 N/m"],
                      ["--stiffness-from", "1e9 N/m", "--stiffness-to", "1e7 N/m"], ["--shapes-at", "garbage"],
                      ["--shapes-at", "1e8 N/m:99"], ["--bearing", "nope", "--window"],
                      ["--curve-speed-to", "3000"], ["--stiffness-from", "1e7 kg"]],
    "compare": [["--vary", "x: nonsense"], ["--vary", "x: bearing.*.k *= -1"], ["--vary", ":"],
                ["--speed-count", "1"], ["--vary", "x: bearing.nope.k *= 2"],
                ["--vary", "x: __import__('os')"], ["--vary", "x: section[99].length *= 2"]],
    "window": [["--factor-from", "2", "--factor-to", "0.5"], ["--factor-from", "0"], ["--factor-to", "inf"], ["--factor-to", "nan"],
               ["--factor-count", "1"], ["--factor-count", "1000"], ["--bearing", "nope"],
               ["--bearing", "99"], ["--factor-from", "nan"]],
    "levers": [["--relative-step", "0"], ["--relative-step", "1"], ["--near-fraction", "-1"], ["--near-fraction", "nan"],
               ["--speed-count", "1"], ["--relative-step", "nan"]],
    "cross-coupling": [["--expected", "abc"], ["--expected", "3"], ["--expected", "-1e6 N/m"],
                       ["--expected", "1e6 kg"], ["--placement", "everywhere"],
                       ["--min-ratio", "-1"], ["--min-log-dec", "nan"],
                       ["--coefficients-at", "own"], ["--coefficients-at", ""]],
    "statics": [["--speed", "3000"], ["--speed", "-5 rpm"], ["--speed", "3 kg"]],
    "bearing": [["--name", "nope"], ["--name", ""], ["--name", "drive end", "--name", "x"]],
}
OPTION_ERRORS["check"] = OPTION_ERRORS["criticals"]
COMMON_OPTION_ERRORS = [["--bogus"], ["--json"], ["NOCASE"]]


def gen_option(rng, t):
    opts = rng.choice(OPTION_ERRORS[t.command] * 3 + COMMON_OPTION_ERRORS)
    t.variant = " ".join(opts)
    if opts == ["NOCASE"]:
        t.no_case = True
    elif opts == ["NOOUT"]:
        t.extra.append("NOOUT")
    else:
        t.extra += [o.replace("{W}", str(WORK)) for o in opts]
    if t.command == "compare" and not t.variant.startswith("--vary"):
        t.variants = default_variants(t)
    t.expect = frozenset({2})


def gen_output(rng, t):
    opt = rng.choice(OUT_OPTS[t.command])
    picture = opt in PICTURE_OPTS
    ext = ".png" if picture else {"--json": ".json", "--csv": ".csv"}[opt]
    faults = ["folder", "read-only folder", "under a regular file", "fifo", "same as input",
              "missing folders", "empty path"] + (["unknown picture type"] if picture else [])
    v = t.variant = f"{opt}: {rng.choice(faults)}"
    root = os.geteuid() == 0
    if v.endswith(": folder"):
        t.setup.append(("dir", "adir" + ext)); path = WORK / ("adir" + ext); t.expect = frozenset({2, 4})
    elif v.endswith("read-only folder"):
        t.setup.append(("rodir", "ro")); path = WORK / "ro" / ("x" + ext)
        t.expect = frozenset({0, 1, 4, 5} if root else {4})
    elif v.endswith("under a regular file"):
        t.setup.append(("file", "afile")); path = WORK / "afile" / ("x" + ext); t.expect = frozenset({2, 4})
    elif v.endswith("fifo"):
        t.setup.append(("fifo", "pipe" + ext)); path = WORK / ("pipe" + ext); t.expect = frozenset({2, 4})
    elif v.endswith("same as input"):
        path = WORK / ("variants.toml" if t.command == "compare" else "rotor.toml"); t.expect = frozenset({2})
    elif v.endswith("missing folders"):
        path = WORK / "no" / "such" / ("x" + ext); t.expect = frozenset({0, 1, 5})
    elif v.endswith("empty path"):
        path = ""; t.expect = frozenset({2, 4})
    else:
        path = WORK / rng.choice(["x.bmp", "x", "x.png.txt"]); t.expect = frozenset({2})
    t.extra += [opt, str(path)]
    if opt == "--plot-shapes":
        t.extra += ["--shapes-at", "1e8 N/m:1"]
    if t.command == "compare":
        t.variants = default_variants(t)


BAD_CHANGES = ["bearing.*.k *= -1", "bearing.*.k *= 0", "bearing.*.k *= abc", "bearing.*.k *= 1e999",
               "operating.max_speed = 4000", "disk.*.mass = 5", "bearing.nope.kxx *= 2",
               "section[99].length *= 2", "section[-1].length *= 2", "bearing[0].support.kx *= 2",
               "bearing.*.kxy = 1e60 N/m", "= 3", "bearing..k *= 2", "x" * 5000,
               "bearing.*.k *= 2; bearing.*.c *= 2", "operating.trip_speed = 1 rpm",
               "disk.*.polar_inertia *= 1000", "section.*.inner_diameter = 1 m"]


def mutate_variants(rng, t):
    vd = t.variants = default_variants(t)
    op = rng.choice(["bad change", "bad change", "no changes", "duplicate names", "named base",
                     "no base", "base is itself", "base is a folder", "unknown key", "changes not list"])
    t.variant = f"variants: {op}"
    if op == "bad change":
        ch = rng.choice(BAD_CHANGES)
        vd["variant"][0]["changes"] = [ch]
        t.variant += f" {ch[:40]}"
    elif op == "no changes":
        vd["variant"][0]["changes"] = []
    elif op == "duplicate names":
        vd["variant"].append(dict(vd["variant"][0]))
    elif op == "named base":
        vd["variant"][0]["name"] = "base"
    elif op == "no base":
        vd.pop("base")
    elif op == "base is itself":
        vd["base"] = "variants.toml"
    elif op == "base is a folder":
        vd["base"] = "."
    elif op == "unknown key":
        vd["variant"][0]["chnages"] = vd["variant"][0].pop("changes")
    else:
        vd["variant"][0]["changes"] = "bearing.*.k *= 0.5"


def all_paths(d, path=()):
    items = d.items() if isinstance(d, dict) else enumerate(d) if isinstance(d, list) else ()
    for k, v in items:
        yield path + (k,), v
        yield from all_paths(v, path + (k,))


def gen_mutation(rng, t):
    t.expect = CLEAN
    if t.command == "compare" and rng.random() < 0.5:
        return mutate_variants(rng, t)
    op = rng.choice(["delete", "wrong type", "wrong type", "rename", "duplicate table",
                     "duplicate key", "table to list", "empty list"])
    paths = [p for p, _ in all_paths(t.doc) if not (p[0] == "title" and len(p) > 1)]
    if op == "rename":               # only keys of tables can be renamed
        paths = [p for p in paths if isinstance(get_path(t.doc, p[:-1]), dict)]
    p = rng.choice(paths)
    parent = get_path(t.doc, p[:-1])
    t.variant = f"{op} {'.'.join(map(str, p))}"
    if op == "delete":
        del parent[p[-1]]
    elif op == "wrong type":
        new = rng.choice(["abc", True, [1, 2], Inline(a=1), 1.5, -7, 0, Raw("1979-05-27T07:32:00Z"),
                          Raw("07:32:00"), "", [], ["1 m", 2], 10 ** 30])
        parent[p[-1]] = new
        t.variant += f" -> {toml_value(new)[:20]}"
    elif op == "rename":
        k = p[-1]
        new = rng.choice([n for n in (k.upper(), k + "s", k.replace("_", "-"), k[::-1], k[:-1] or "x",
                                      " " + k) if n != k])
        parent[new] = parent.pop(k)
        t.variant += f" -> {new!r}"
    elif op == "table to list":
        key = rng.choice([k for k, v in t.doc.items() if _is_table(v)])
        t.doc[key] = [t.doc[key]]
        t.variant = f"{op} {key}"
    elif op == "empty list":
        key = rng.choice(["section", "bearing", "disk", "probe"])
        t.doc[key] = []
        t.variant = f"{op} {key}"
    else:   # duplicate a table (header and body) or one key line, in the text
        lines = to_toml(t.doc).split("\n")
        if op == "duplicate table":
            idx = [i for i, ln in enumerate(lines) if ln.startswith("[") and not ln.startswith("[[")]
        else:
            idx = [i for i, ln in enumerate(lines) if " = " in ln and not ln.startswith("[")]
        i = rng.choice(idx)
        if op == "duplicate table":
            j = next((k for k in range(i + 1, len(lines)) if lines[k].startswith("[")), len(lines))
            lines += [""] + lines[i:j]
        else:
            lines.insert(i + 1, lines[i])
        t.variant = f"{op} {lines[i][:40]}"
        t.files["rotor.toml"] = "\n".join(lines).encode()


GENERATORS = {"markup": gen_markup, "math-text": gen_math, "dimensionless-unit": gen_dimensionless,
              "odd-speed-unit": gen_odd_speed, "extreme-magnitude": gen_extreme,
              "impossible-physics": gen_impossible, "size-bomb": gen_size_bomb,
              "encoding": gen_encoding, "option-error": gen_option, "output-fault": gen_output,
              "structural-mutation": gen_mutation}


def default_variants(t):
    v = [{"name": "softer pads", "changes": ["bearing.*.k *= 0.7"]}]
    if t.index % 2:
        v.append({"name": "heavier wheel", "changes": ["disk.*.mass *= 1.2"]})
    return {"base": "rotor.toml", "variant": v}


def make_try(seed, index):
    """The try number `index` of `seed`: the same inputs every time."""
    rng = random.Random(f"{seed}:{index}")
    kind = KINDS[index % len(KINDS)]
    command = rng.choice(COMMANDS)
    bundled = command not in ("compare", "window", "levers", "cross-coupling") \
        and rng.random() < 0.07
    doc, rpm = bundled_rotor(rng) if bundled else tiny_rotor(rng)
    t = Try(index, kind, command, doc, rpm)
    GENERATORS[kind](rng, t)
    command = t.command              # a generator may pick the command its input needs
    if bundled:
        t.variant += " +bundled"
    if "rotor.toml" not in t.absent:
        t.files.setdefault("rotor.toml", to_toml(t.doc).encode())
    if command == "compare" and t.vary is None and t.variants is None:
        t.variants = default_variants(t) if rng.random() < 0.7 else None
        t.vary = None if t.variants else ["trial: bearing.*.k *= 0.8"]
    if command == "compare" and t.variants is not None:
        if "variants.toml" not in t.absent:
            t.files.setdefault("variants.toml", to_toml(t.variants).encode())
        t.case_name = "variants.toml"
    # the options a command cannot run without, unless the try sets (or drops) them itself
    pre = {"modes": ["--speed", f"{t.rpm} rpm"], "layout": ["--plot", str(WORK / "layout.png")],
           "cross-coupling": ["--expected", "2e6 N/m", "--placement", "mid-span"]
           }.get(command, [])
    if (pre and pre[0] in t.extra) or "NOOUT" in t.extra:
        pre = []
    if "NOOUT" in t.extra:
        t.extra.remove("NOOUT")
    for text in t.vary or []:
        pre += ["--vary", text]
    t.args = [command] + ([] if t.no_case else [str(WORK / t.case_name)]) + pre + t.extra
    return t


# ---------------------------------------------------------------- running and classifying

WORK = Path("/tmp/fuzz/work")


class Timeout(BaseException):
    """Raised by the time limit; a BaseException so that `except Exception` cannot eat it."""


def _on_alarm(signum, frame):
    raise Timeout()


def prepare_work(t):
    if WORK.exists():
        for p in WORK.rglob("*"):
            if p.is_dir() and not p.is_symlink():
                p.chmod(0o755)
        shutil.rmtree(WORK)
    WORK.mkdir(parents=True)
    for name, data in t.files.items():
        (WORK / name).write_bytes(data)
    for op, name in t.setup:
        p = WORK / name
        if op in ("dir", "rodir"):
            p.mkdir(exist_ok=True)
            if op == "rodir":
                p.chmod(0o555)
        elif op == "file":
            p.write_text("a regular file\n")
        elif op == "fifo":
            os.mkfifo(p)


def short(path):
    path = str(path)
    if "site-packages/" in path:
        return path.split("site-packages/", 1)[1]
    return os.path.relpath(path, ROOT) if path.startswith(str(ROOT)) else path


KEY_NAMED = re.compile(r"'[^'\n]{1,200}':|--(?!help\b)[a-z][a-z-]+|(argument|option) '[^'\n]+'")


def cause_of(exc):
    """The exception behind an exit: SystemExit <- typer's Exit <- the original error."""
    seen = set()
    while exc is not None and id(exc) not in seen:
        seen.add(id(exc))
        if not isinstance(exc, SystemExit) and type(exc).__name__ not in ("Exit", "Abort"):
            return exc
        exc = exc.__cause__ or exc.__context__
    return None


def locate(exc):
    """Signature (type at innermost file:line) and the innermost rotorcalc frame."""
    frames = traceback.extract_tb(exc.__traceback__)
    last = f"{short(frames[-1].filename)}:{frames[-1].lineno}" if frames else "?"
    pkg = [f for f in frames if "/rotorcalc/" in f.filename]
    return (f"{type(exc).__name__} at {last}",
            f"{short(pkg[-1].filename)}:{pkg[-1].lineno} in {pkg[-1].name}" if pkg else "")


def classify(t, output, exc, exit_code, hang, seconds):
    rec = {"done": t.index, "kind": t.kind, "variant": t.variant, "command": t.command,
           "expect": sorted(t.expect), "exit": exit_code, "seconds": round(seconds, 2),
           "args": [a if len(a) < 160 else a[:150] + f"...({len(a)} chars)" for a in t.args]}
    output = output or ""
    cause = cause_of(exc) if exit_code in (3, 70) else None
    if cause is not None:           # what a numerical failure or an internal error came from
        rec["cause"], rec["package_frame"] = locate(cause)
    if hang:
        rec["outcome"] = "hang"
    elif exc is not None and not isinstance(exc, SystemExit) or exit_code == 70:
        err = exc if not isinstance(exc, SystemExit) else cause
        sig, frame = locate(err) if err is not None else ("exit 70 (no exception found)", "")
        rec.update(outcome="traceback", signature=sig + (" (exit 70)" if exit_code == 70 else ""),
                   package_frame=frame, message=f"{type(err).__name__}: {str(err)[:300]}")
    elif "Traceback (most recent call last)" in output:
        where = re.findall(r'File "([^"]+)", line (\d+)', output)
        rec.update(outcome="traceback", message=output.strip().splitlines()[-1][:300],
                   signature="traceback printed at " +
                             (f"{short(where[-1][0])}:{where[-1][1]}" if where else "?"))
    elif t.kind in MUST_REFUSE and exit_code in (0, 1, 5):
        rec["outcome"] = "impossible-accepted"
    elif exit_code == 2 and not KEY_NAMED.search(output):
        rec["outcome"] = "unclear"
    elif exit_code not in t.expect:
        rec["outcome"] = "unexpected-exit"
    else:
        rec["outcome"] = "ok"
    if rec["outcome"] != "traceback":
        rec["message"] = " ".join(re.sub("[\u2500-\u257f]", " ", output).split())[:400]
    rec["output_tail"] = output[-1500:]
    if t.kind == "markup" and t.marker and exit_code in (0, 1, 5):
        if t.marker[1] in output and t.marker[0] not in output:
            rec["markup_eaten"] = True   # the name was printed with its brackets interpreted
    return rec


def run_try(runner, app, t, timeout):
    prepare_work(t)
    output, exc, exit_code, hang = "", None, None, False
    start = time.perf_counter()
    signal.setitimer(signal.ITIMER_REAL, timeout)
    try:
        result = runner.invoke(app, t.args)
        output, exc, exit_code = result.output, result.exception, result.exit_code
    except Timeout:
        hang = True
    except BaseException as err:      # anything that escapes the runner itself
        exc, exit_code = err, 1
    finally:
        signal.setitimer(signal.ITIMER_REAL, 0)
    seconds = time.perf_counter() - start
    if "matplotlib.pyplot" in sys.modules:
        sys.modules["matplotlib.pyplot"].close("all")
    return classify(t, output, exc, exit_code, hang or seconds >= timeout, seconds)


def worker(opts):
    """Run tries opts.start.. in this process; journal each start and result."""
    import resource
    soft = int(opts.mem_gb * 2 ** 30)
    resource.setrlimit(resource.RLIMIT_AS, (soft, resource.getrlimit(resource.RLIMIT_AS)[1]))
    from typer.testing import CliRunner
    from rotorcalc.cli import app
    signal.signal(signal.SIGALRM, _on_alarm)
    runner = CliRunner()
    with open(Path(opts.scratch) / "journal.jsonl", "a") as journal:
        for i in range(opts.start, opts.tries):
            t = make_try(opts.seed, i)
            journal.write(json.dumps({"start": i, "t": time.time()}) + "\n")
            journal.flush()
            rec = run_try(runner, app, t, opts.timeout)
            journal.write(json.dumps(rec) + "\n")
            journal.flush()
            if rec["outcome"] == "hang":
                return RESTART     # start afresh: the interrupted code may have left state behind
    return 0


def supervise(opts):
    """Start the worker, kill it when a try outlives the limit in C code, restart, report."""
    scratch = Path(opts.scratch)
    scratch.mkdir(parents=True, exist_ok=True)
    journal_path = scratch / "journal.jsonl"
    journal_path.write_text("")
    records, start, began, buf = {}, opts.start, time.time(), ""
    reader = open(journal_path)
    while start < opts.tries:
        proc = subprocess.Popen([sys.executable, str(Path(__file__).resolve()), "--worker",
                                 "--seed", str(opts.seed), "--tries", str(opts.tries),
                                 "--start", str(start), "--timeout", str(opts.timeout),
                                 "--scratch", str(scratch), "--mem-gb", str(opts.mem_gb)])
        current, killed = None, False
        while True:
            rc = proc.poll()
            buf += reader.read()
            *lines, buf = buf.split("\n")
            for line in lines:
                ev = json.loads(line)
                if "start" in ev:
                    current = ev
                else:
                    records[ev["done"]], current = ev, None
                    if len(records) % 50 == 0:
                        print(f"  {len(records)}/{opts.tries} tries", file=sys.stderr, flush=True)
            if rc is not None:
                break
            if current and time.time() - current["t"] > opts.timeout + GRACE:
                proc.kill()          # our own worker, by its handle
                proc.wait()
                killed, rc = True, proc.returncode
                break
            time.sleep(0.2)
        if current is not None:      # the worker was killed, or died, during a try
            t = make_try(opts.seed, current["start"])
            rec = classify(t, "", None, None, killed, time.time() - current["t"])
            if not killed:
                name = signal.Signals(-rc).name if rc < 0 else f"exit status {rc}"
                rec.update(outcome="traceback", signature=f"worker process died ({name})",
                           message=f"the process running the command died: {name}")
            rec["hard"] = killed
            records[current["start"]] = rec
            with open(journal_path, "a") as fh:
                fh.write(json.dumps(rec) + "\n")
        new_start = max(records) + 1 if records else start
        if new_start <= start and rc not in (0, RESTART):
            sys.exit(f"fuzz_cli: the worker failed before try {start} (exit {rc}); giving up")
        start = new_start
    return write_report(opts, records, time.time() - began)


# ---------------------------------------------------------------- the report

def save_example(opts, folder, rec):
    t = make_try(opts.seed, rec["done"])
    dest = Path(opts.scratch) / "examples" / folder / f"try-{rec['done']}"
    dest.mkdir(parents=True, exist_ok=True)
    for name, data in t.files.items():
        if len(data) > 256 * 1024:
            data = data[:64 * 1024] + (f"\n# ... truncated from {len(data)} bytes; regenerate with "
                                       f"tools/fuzz_cli.py --seed {opts.seed} --only {t.index}\n").encode()
        (dest / name).write_bytes(data)
    info = {k: rec.get(k) for k in ("kind", "variant", "command", "exit", "outcome", "signature",
                                    "package_frame", "message", "expect", "hard")}
    info.update(args=t.args, setup=t.setup, output_tail=rec.get("output_tail"),
                replay=f".venv/bin/python tools/fuzz_cli.py --seed {opts.seed} --only {t.index}")
    (dest / "try.json").write_text(json.dumps(info, indent=2) + "\n")
    return str(dest)


def slug(text):
    return re.sub(r"[^A-Za-z0-9._-]+", "_", text)[:80].strip("_")


def package_state():
    def git(*args):
        run = subprocess.run(["git", "-C", str(ROOT), *args], capture_output=True, text=True)
        return run.stdout.rstrip("\n")
    return {"head": git("rev-parse", "--short", "HEAD"),
            "modified": git("status", "--porcelain", "--", "rotorcalc").splitlines()}


def write_report(opts, records, wall):
    from collections import Counter, defaultdict
    shutil.rmtree(Path(opts.scratch) / "examples", ignore_errors=True)
    recs = [records[i] for i in sorted(records)]
    counts = defaultdict(lambda: defaultdict(Counter))
    exits, summary, expected = defaultdict(Counter), defaultdict(Counter), defaultdict(dict)
    crashes, lists, groups = {}, {o: [] for o in OUTCOMES[1:5]}, Counter()
    for r in recs:
        k, c, o = r["kind"], r["command"], r["outcome"]
        counts[k][c][o] += 1
        exits[k][str(r["exit"])] += 1
        summary[k]["tries"] += 1
        summary[k][o] += 1
        expected[k][re.sub(r"[-\d.e+]+ (rad\*Hz|Hz\*rad|deg/s)", r"N \1", r["variant"])[:60]] = r["expect"]
        brief = {x: r[x] for x in ("done", "kind", "variant", "command", "exit", "message", "cause",
                                   "hard") if r.get(x) is not None}
        if o == "traceback":
            e = crashes.setdefault(r["signature"], {"count": 0, "package_frame": r.get("package_frame"),
                                                    "message": r.get("message"), "kinds": Counter(),
                                                    "commands": Counter(), "examples": []})
            e["count"] += 1
            e["kinds"][k] += 1
            e["commands"][c] += 1
            if len(e["examples"]) < 5:
                brief["saved"] = save_example(opts, "crash-" + slug(r["signature"]), r)
                e["examples"].append(brief)
        elif o in lists:
            group = (o, k, r["variant"].split(" +bundled")[0][:40])
            groups[group] += 1
            if groups[group] <= (1 if o == "unexpected-exit" else 5):
                brief["saved"] = save_example(opts, slug("-".join(group)), r)
            lists[o].append(brief)
    report = {"tool": "tools/fuzz_cli.py", "seed": opts.seed, "tries": len(recs),
              "first_try": opts.start, "timeout_seconds": opts.timeout, "wall_seconds": round(wall, 1),
              "package_state": package_state(), "summary_by_kind": summary, "counts": counts,
              "exit_codes_by_kind": exits, "correct_exit_codes_by_kind_and_variant": expected,
              "crash_signatures": dict(sorted(crashes.items(), key=lambda kv: -kv[1]["count"])),
              "hangs": lists["hang"], "impossible_accepted": lists["impossible-accepted"],
              "unclear": lists["unclear"], "unexpected_exit": lists["unexpected-exit"],
              "markup_eaten": [r["done"] for r in recs if r.get("markup_eaten")],
              "caution": CAUTION}
    Path(opts.out).parent.mkdir(parents=True, exist_ok=True)
    Path(opts.out).write_text(json.dumps(report, indent=1) + "\n")
    cols = ["tries"] + OUTCOMES
    print(f"{'kind':22s}" + "".join(f"{h.split('-')[0]:>11s}" for h in cols))
    for k in KINDS + ["total"]:
        row = summary[k] if k != "total" else sum(summary.values(), Counter())
        print(f"{k:22s}" + "".join(f"{'-' if c == 'impossible-accepted' and k in KINDS and k not in MUST_REFUSE else row[c]:>11}"
                                   for c in cols))
    print(f"\n{len(crashes)} distinct crash signature(s); {len(report['markup_eaten'])} markup "
          f"name(s) shown altered; wall time {wall:.0f} s; report {opts.out}")
    for sig, e in report["crash_signatures"].items():
        print(f"  {e['count']:4d}  {sig}  (e.g. try {e['examples'][0]['done']})")
    print(CAUTION)
    bad = sum(summary.values(), Counter())
    return 1 if bad["traceback"] or bad["hang"] or bad["impossible-accepted"] else 0


def replay(opts):
    """Run one try in this process and show everything about it (files stay in the work folder)."""
    from typer.testing import CliRunner
    from rotorcalc.cli import app
    signal.signal(signal.SIGALRM, _on_alarm)
    t = make_try(opts.seed, opts.only)
    rec = run_try(CliRunner(), app, t, opts.timeout)
    print(json.dumps({k: v for k, v in rec.items() if k != "output_tail"}, indent=1))
    print("---- output (tail) ----\n" + rec["output_tail"])
    return 0


def main(argv=None):
    global WORK
    ap = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    ap.add_argument("--tries", type=int, default=300)
    ap.add_argument("--seed", type=int, default=1)
    ap.add_argument("--out", default="/tmp/fuzz/report.json")
    ap.add_argument("--scratch", default="/tmp/fuzz", help="work folder, journal and examples")
    ap.add_argument("--timeout", type=float, default=10.0, help="seconds per try")
    ap.add_argument("--mem-gb", type=float, default=4.0, help="address-space limit of the worker")
    ap.add_argument("--only", type=int, help="replay this one try and show its output")
    ap.add_argument("--worker", action="store_true", help=argparse.SUPPRESS)
    ap.add_argument("--start", type=int, default=0, help="first try (to resume or narrow a run)")
    opts = ap.parse_args(argv)
    WORK = Path(opts.scratch) / "work"
    if opts.only is not None:
        return replay(opts)
    return worker(opts) if opts.worker else supervise(opts)


if __name__ == "__main__":
    sys.exit(main())
