"""Fingerprint every picture of :mod:`rotorcalc.plotting` on the bundled cases.

Usage (from the repository root)::

    python tools/picture_fingerprints.py                 # print the JSON
    python tools/picture_fingerprints.py --out FILE      # also write it to FILE
    python tools/picture_fingerprints.py --check FILE    # exit 1 when a picture differs
    python tools/picture_fingerprints.py --case feed_pump --png /tmp/pictures   # look at them
    python tools/picture_fingerprints.py --case study --png /tmp/pictures       # the study's

Each picture function is called on the results of the same analysis calls the
command line makes (``rotorcalc/cli/*.py``), for every rotor in ``cases/*.toml``
(a ``*_variants.toml`` file is only the input of ``variant_maps``).  Every
picture is drawn twice: on the figure the function makes itself (its own size),
and on axes of a figure of :data:`FIGSIZE` inches that the caller gives.  Both
are rendered by the Agg backend at :data:`DPI` with matplotlib's default
settings, and the SHA-256 of the RGBA pixel buffer (with its width and height)
is the picture's fingerprint.

A refactoring of the plotting code that keeps every fingerprint draws the same
pixels.  The fingerprints hold for one matplotlib version only (its fonts,
hinting and anti-aliasing decide the pixels) and one numpy and scipy (the last bits of
the results drawn can move a marker by a pixel), so the file records them.

To keep the run short, sweeps are capped at :data:`SWEEP_POINTS` speeds and
unbalance responses at :data:`RESPONSE_POINTS`, as the tests cap them; the
pictures are fingerprints, not results.
"""

from __future__ import annotations

import os

for _var in ("OPENBLAS_NUM_THREADS", "OMP_NUM_THREADS", "MKL_NUM_THREADS"):
    os.environ.setdefault(_var, "1")   # as the command line: one BLAS thread

import argparse  # noqa: E402
import dataclasses  # noqa: E402
import hashlib  # noqa: E402
import json  # noqa: E402
import math  # noqa: E402
import sys  # noqa: E402
from pathlib import Path  # noqa: E402

import matplotlib  # noqa: E402

matplotlib.use("Agg")

import numpy as np  # noqa: E402
from matplotlib.backends.backend_agg import FigureCanvasAgg  # noqa: E402
from matplotlib.figure import Figure  # noqa: E402

ROOT = Path(__file__).resolve().parents[1]
CASES = ROOT / "cases"

#: Size (inches) of the figure whose axes are given to the picture functions, and the
#: resolution of every rendering.
FIGSIZE = (9.0, 6.0)
DPI = 100
#: Speeds of each sweep (screening, comparison, window) and of each unbalance response.
SWEEP_POINTS = 21
RESPONSE_POINTS = 81
#: Factors of the stiffness window's scan over the map's range (the command line takes
#: about four a decade, 17 over the default map).
WINDOW_POINTS = 9
#: The cross-coupling screen is drawn on one case only (it keeps the run short), with an
#: expected amount (N/m) at mid-span: the bundled cases have no sources of their own.
COUPLING_CASE = "compressor"
COUPLING_EXPECTED = 2.0e6


# --- the inputs, built as the command line builds them ----------------------------------

def capped(rotor):
    """The rotor with short sweeps (analysis and response), so the run stays quick."""
    settings = dataclasses.replace(rotor.settings, speed_count=SWEEP_POINTS)
    response = dataclasses.replace(rotor.response, speed_count=RESPONSE_POINTS)
    return dataclasses.replace(rotor, settings=settings, response=response)


def reference_stiffness(rotor):
    """The map stiffness that a window factor of 1 stands for (``stiffness-map``)."""
    from rotorcalc.analysis.stiffness_study import reference_stiffness as reference
    return reference(rotor, None)


def whirl_map_inputs(rotor):
    from rotorcalc.analysis import screen
    return screen(rotor)


def response_inputs(rotor):
    """The response over speed (Bode, polar) and at a few speeds (orbits), as ``response``."""
    from rotorcalc.analysis.response import unbalance_response
    op = rotor.operating
    sweep = unbalance_response(rotor)
    at = [op.min_speed, op.max_speed] + ([op.trip_speed] if op.trip_speed else [])
    at_speeds = unbalance_response(rotor, speeds=at, cases=[rotor.unbalance[0]], unstable=())
    return sweep, at_speeds


def window_inputs(rotor, cmap, base):
    """The stiffness window of every bearing together over the map's range, as
    ``stiffness-map --window`` finds it."""
    from rotorcalc.analysis.whatif import stiffness_window
    from rotorcalc.cli.whatif_common import without_response
    low, high = cmap.stiffness[0] / base, cmap.stiffness[-1] / base
    return stiffness_window(without_response(rotor), target=None, low=low, high=high,
                            points=WINDOW_POINTS)


def map_shape_inputs(rotor, cmap, base):
    """Shapes at the bearings' own stiffness (modes 1 and 2) and at the soft end (mode 1)."""
    from rotorcalc.analysis.csmap import map_mode_shape
    from rotorcalc.plotting import map_point_label
    points = [(base, 0), (base, 1), (float(cmap.stiffness[0]), 0)]
    shapes, labels = [], []
    for k, mode in points:
        speed, shape = map_mode_shape(rotor, k, mode, cmap.whirl)
        if math.isfinite(speed):
            shapes.append(shape)
            labels.append(map_point_label(k, mode, speed))
    return cmap.node_z, shapes, labels, cmap.station_nodes


def coupling_inputs(rotor):
    """The cross-coupling screen, as ``cross-coupling --expected 2e6 --placement mid-span``."""
    from rotorcalc.analysis.coupling_screen import cross_coupling_screen
    return cross_coupling_screen(rotor, expected=COUPLING_EXPECTED, placement="mid-span")


def variant_inputs(path):
    from rotorcalc.analysis.whatif import compare
    from rotorcalc.variants import read_variants
    _, rotor, variants = read_variants(path)
    return compare(capped(rotor), variants), rotor.operating


# --- drawing ---------------------------------------------------------------------------

def given_figure():
    return Figure(figsize=FIGSIZE, dpi=DPI)


#: Where ``--png`` writes the rendered pictures (None: nowhere).
PNG_FOLDER = None


def fingerprint(fig, name):
    """SHA-256 of the figure's RGBA pixels as Agg renders them (width and height included)."""
    canvas = FigureCanvasAgg(fig)
    canvas.draw()
    pixels = np.asarray(canvas.buffer_rgba())
    if PNG_FOLDER is not None:
        from matplotlib.image import imsave
        imsave(PNG_FOLDER / (name.replace("/", "--") + ".png"), pixels)
    digest = hashlib.sha256(f"{pixels.shape[1]}x{pixels.shape[0]}:".encode())
    digest.update(np.ascontiguousarray(pixels).tobytes())
    return digest.hexdigest()


def own_and_given(name, draw, make_axes):
    """Fingerprints of ``draw`` on its own figure and on the axes ``make_axes`` gives."""
    out = {name: fingerprint(draw(None).figure, name)}
    given = name + "@given-axes"
    out[given] = fingerprint(draw(make_axes(given_figure())).figure, given)
    return out


def one_axes(fig):
    return fig.add_subplot(1, 1, 1)


def roomy_axes(fig):
    """One axes with room below for an axis label and two lines of caution."""
    fig.subplots_adjust(bottom=0.17)
    return fig.add_subplot(1, 1, 1)


def case_pictures(path):
    """Every picture of one rotor file: {name: fingerprint}."""
    import rotorcalc.plotting as pl
    from rotorcalc.analysis import modes_at
    from rotorcalc.analysis.csmap import critical_speed_map
    from rotorcalc.reader import read_rotor

    rotor = capped(read_rotor(path))
    op = rotor.operating
    stem = path.stem
    out = {}

    def add(name, draw, make_axes=one_axes):
        out.update(own_and_given(f"{stem}/{name}", draw, make_axes))

    screening = whirl_map_inputs(rotor)
    add("whirl_speed_map", lambda ax: pl.plot_whirl_speed_map(
        screening.sweep, screening.criticals, op, rotor.settings.orders, ax=ax,
        margins=screening.margins))
    modes = modes_at(rotor, op.max_speed)
    add("mode_shape", lambda ax: pl.plot_mode_shape(modes, 1, ax=ax, rotor=rotor))
    add("mode_shape_2_plain", lambda ax: pl.plot_mode_shape(modes, 2, ax=ax, orbits=False))
    add("rotor_layout", lambda ax: pl.plot_rotor_layout(rotor, ax=ax))

    if rotor.unbalance:
        sweep, at_speeds = response_inputs(rotor)
        add("bode", lambda ax: pl.plot_bode(sweep, 0, operating=op, ax=ax),
            lambda fig: tuple(fig.subplots(2, 1, sharex=True)))
        add("bode_log_amplitude", lambda ax: pl.plot_bode(sweep, 0, operating=op, ax=ax,
                                                     log_amplitude=True))
        add("polar", lambda ax: pl.plot_polar(sweep, 0, ax=ax),
            lambda fig: fig.add_subplot(1, 1, 1, projection="polar"))
        n_stations = len({p.station for p in at_speeds.probes}) or at_speeds.stations.shape[2]
        add("orbits", lambda ax: pl.plot_orbits(at_speeds, 0, ax=ax),
            lambda fig: tuple(np.ravel(fig.subplots(1, n_stations, squeeze=False))))

    cmap = critical_speed_map(rotor, mode_count=4, whirl="forward")
    base = reference_stiffness(rotor)
    add("critical_speed_map", lambda ax: pl.plot_critical_speed_map(
        cmap, operating=op, base_stiffness=base, ax=ax))
    window = window_inputs(rotor, cmap, base)
    add("critical_speed_map_window", lambda ax: pl.plot_critical_speed_map(
        cmap, operating=op, window=window, base_stiffness=base, ax=ax))
    node_z, shapes, labels, stations = map_shape_inputs(rotor, cmap, base)
    add("map_shapes", lambda ax: pl.plot_map_shapes(node_z, shapes, labels, ax=ax,
                                               station_nodes=stations))

    if stem == COUPLING_CASE:
        coupling = coupling_inputs(rotor)
        add("coupling_screen", lambda ax: pl.plot_coupling_screen(coupling, ax=ax), roomy_axes)

    variants = path.with_name(f"{stem}_variants.toml")
    if variants.exists():
        comparison, operating = variant_inputs(variants)
        add("variant_maps", lambda ax: pl.plot_variant_maps(comparison, operating=operating, ax=ax))
    return out


#: Bundled cases whose pictures take no drawing path another case does not: left out to
#: keep the run short (the high-pressure compressors draw what the compressor and the feed
#: pump draw: sources, seals, tables over speed; their response's unstable hatching is
#: drawn by tests/unit/test_plotting.py; the cases on bearings from their geometry draw
#: what the feed pump draws, from tables the film computed).
SKIPPED = {"hp_compressor", "hp_compressor_damper_seal", "feed_pump_sleeve",
           "blower_two_lobe", "compressor_tilting_pad"}


#: The study pictures are drawn from recorded samples (the first of the bundled compressor
#: study's run), not from new screenings: a sample costs seconds, the pictures draw records.
STUDY_SAMPLE = ROOT / "tests" / "unit" / "study_sample.json"


def study_pictures():
    """The three pictures of ``rotorcalc study`` from :data:`STUDY_SAMPLE`: {name: sha}."""
    import dataclasses as dc
    from types import SimpleNamespace

    import rotorcalc.plotting as pl
    from rotorcalc.analysis.study import summarise
    from rotorcalc.reader import read_rotor
    from rotorcalc.study_file import read_study
    from rotorcalc.units import RPM
    sample = json.loads(STUDY_SAMPLE.read_text(encoding="utf-8"))
    rotor_path, plan = read_study(ROOT / sample["study"])
    plan = dc.replace(plan, samples=len(sample["records"]))
    base = [SimpleNamespace(speed=rpm * RPM, whirl=whirl) for rpm, whirl in sample["base"]]
    result = summarise(plan, sample["records"], base)
    operating = read_rotor(rotor_path).operating
    out = {}
    for name, draw in (("criticals", pl.plot_study_criticals),
                       ("probability", pl.plot_study_probability),
                       ("influence", pl.plot_study_influence)):
        out.update(own_and_given(f"study/{name}",
                                 lambda ax, draw=draw: draw(result, operating, ax=ax),
                                 roomy_axes))
    return out


def versions():
    """What decides the pixels: matplotlib's version (fonts, hinting, anti-aliasing),
    numpy's and scipy's and the BLAS's code path for this processor (the last bits of the
    results drawn: the same libraries moved markers by a pixel on another processor)."""
    import scipy
    import scipy.linalg  # noqa: F401 (loads scipy's own BLAS, which the analyses use)
    from threadpoolctl import threadpool_info
    blas = sorted(f"{i.get('internal_api')} {i.get('architecture', '')}".strip()
                  for i in threadpool_info() if i.get("user_api") == "blas")
    return {"matplotlib": matplotlib.__version__, "numpy": np.__version__,
            "scipy": scipy.__version__, "blas": ", ".join(blas)}


def fingerprints(cases=None):
    """{"matplotlib", "numpy", "scipy": versions, "dpi", "figsize",
    "pictures": {name: sha256}}."""
    paths = sorted(p for p in CASES.glob("*.toml")
                   if not p.stem.endswith(("_variants", "_study")) and p.stem not in SKIPPED)
    if cases:
        paths = [p for p in paths if p.stem in cases]
    import rotorcalc
    from rotorcalc.workers import run_all
    print(f"drawing with rotorcalc from {Path(rotorcalc.__file__).parent}", file=sys.stderr)
    pictures = {}
    # one case a worker process (as many as there are cores): each draws in a process of
    # its own, as a fresh interpreter would
    pieces = [(path,) for path in paths]
    if not cases or "study" in cases:
        pieces.append((None,))            # the study's pictures, beside the cases
    for drawn in run_all(drawn_pictures, pieces, 0):
        pictures.update(drawn)
    return {**versions(), "dpi": DPI, "figsize": list(FIGSIZE), "pictures": pictures}


def drawn_pictures(path):
    """:func:`case_pictures` with matplotlib's default settings at :data:`DPI`."""
    with matplotlib.rc_context():
        matplotlib.rc_file_defaults()       # no user matplotlibrc decides a pixel
        matplotlib.rcParams["figure.dpi"] = DPI
        return study_pictures() if path is None else case_pictures(path)


def differences(recorded, current):
    """Names of the pictures whose fingerprints differ, are new or are gone."""
    a, b = recorded["pictures"], current["pictures"]
    return sorted(n for n in set(a) | set(b) if a.get(n) != b.get(n))


def main(argv=None):
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument("--out", type=Path, help="write the JSON to this file")
    parser.add_argument("--check", type=Path, help="compare with the JSON in this file")
    parser.add_argument("--case", action="append", help="only this case (file stem)")
    parser.add_argument("--png", type=Path, help="also write every picture to this folder")
    args = parser.parse_args(argv)
    if args.png is not None:
        global PNG_FOLDER
        args.png.mkdir(parents=True, exist_ok=True)
        PNG_FOLDER = args.png
    current = fingerprints(args.case)
    text = json.dumps(current, indent=1, sort_keys=True) + "\n"
    if args.out is not None:
        args.out.write_text(text, encoding="utf-8")
    if args.check is None:
        sys.stdout.write(text)
        return 0
    recorded = json.loads(args.check.read_text(encoding="utf-8"))
    other = {k: (recorded.get(k), v) for k, v in versions().items() if recorded.get(k) != v}
    if other:
        print("recorded with " + ", ".join(f"{k} {a}, this is {b}" for k, (a, b) in
                                           other.items()) + ": the pixels cannot be compared")
        return 2
    if args.case:
        recorded["pictures"] = {n: v for n, v in recorded["pictures"].items()
                                if n.split("/")[0] in args.case}
    changed = differences(recorded, current)
    for name in changed:
        print(f"differs: {name}")
    print(f"{len(current['pictures']) - len(changed)} of {len(current['pictures'])} pictures "
          "identical")
    return 1 if changed else 0


if __name__ == "__main__":
    sys.exit(main())
