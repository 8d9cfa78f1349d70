"""Pictures stay pixel-identical across refactorings of the plotting code.

A regression guard, not a check of correctness: every picture function of
``rotorcalc.plotting`` is drawn on every bundled case by
``tools/picture_fingerprints.py`` (Agg, fixed size and resolution) and the
SHA-256 of each RGBA pixel buffer must equal the one recorded in
``picture_fingerprints.json``, recorded at commit adfa530 before the plotting
package was split (the compressor's pictures re-recorded when the bundled case gained its
stage cross-coupling, after looking at them: the case changed, not the drawing code; all of
them re-recorded with numpy 2.4.6 and scipy 1.17.1, whose last bits moved a few markers by a
pixel, when the rotor layout began to mark destabilising sources).  The pixels depend on
matplotlib's version (fonts, hinting, anti-aliasing) and on numpy's and scipy's (the last
bits of what is drawn), so the test is skipped under any other versions than the ones
recorded, or on a processor whose BLAS takes another code path (recorded as "blas");
re-record with ``python tools/picture_fingerprints.py --out
tests/unit/picture_fingerprints.json`` only after a change meant to alter a
picture, and look at the pictures first (``--png FOLDER``).
"""

import json
import os
import subprocess
import sys
from pathlib import Path

import matplotlib
import numpy
import pytest
import scipy

ROOT = Path(__file__).resolve().parents[2]
RECORDED = Path(__file__).with_name("picture_fingerprints.json")


def _installed():
    """The versions (and the BLAS code path) the recording tool writes down."""
    sys.path.insert(0, str(ROOT / "tools"))
    try:
        import picture_fingerprints
    finally:
        sys.path.pop(0)
    return picture_fingerprints.versions()


@pytest.mark.slow
def test_every_picture_draws_the_recorded_pixels():
    """Drawn in a fresh interpreter, as the fingerprints were recorded: inside a long test
    process a mode shape's eigenvector can come out different in the last bits (the BLAS
    takes other code paths on other memory alignments), which moved one orbit marker by a
    pixel."""
    recorded = json.loads(RECORDED.read_text(encoding="utf-8"))
    installed = _installed()
    other = {k: v for k, v in installed.items() if recorded.get(k) != v}
    if other:
        pytest.skip("fingerprints were recorded with " + ", ".join(
            f"{k} {recorded.get(k)}" for k in other) + "; installed: " + ", ".join(
            f"{k} {v}" for k, v in other.items()) + ", which may draw other pixels")
    env = dict(os.environ, OPENBLAS_NUM_THREADS="1", OMP_NUM_THREADS="1", MKL_NUM_THREADS="1",
               PYTHONPATH=str(ROOT))
    done = subprocess.run([sys.executable, str(ROOT / "tools" / "picture_fingerprints.py"),
                           "--check", str(RECORDED)], cwd=ROOT, env=env, capture_output=True,
                          text=True, timeout=900)
    assert done.returncode == 0, (
        "these pictures no longer draw the recorded pixels (see them with python "
        "tools/picture_fingerprints.py --png FOLDER):\n" + done.stdout + done.stderr)
    assert f"{len(recorded['pictures'])} of {len(recorded['pictures'])} pictures identical" \
        in done.stdout
