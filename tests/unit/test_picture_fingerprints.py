"""Pictures stay pixel-identical across refactorings of the plotting code.

A regression guard, not a check of correctness: every picture function of
``rotorcalc.plotting`` is drawn on every bundled case by
``tools/picture_fingerprints.py`` (Agg, fixed size and resolution) and the
SHA-256 of each RGBA pixel buffer must equal the one recorded in
``picture_fingerprints.json``, recorded at commit adfa530 before the plotting
package was split.  The pixels depend on matplotlib's version (fonts, hinting,
anti-aliasing), so the test is skipped under any other version than the one
recorded; re-record with ``python tools/picture_fingerprints.py --out
tests/unit/picture_fingerprints.json`` only after a change meant to alter a
picture, and look at the pictures first (``--png FOLDER``).
"""

import importlib.util
import json
from pathlib import Path

import matplotlib
import pytest

ROOT = Path(__file__).resolve().parents[2]
RECORDED = Path(__file__).with_name("picture_fingerprints.json")


def _tool():
    spec = importlib.util.spec_from_file_location("picture_fingerprints",
                                                  ROOT / "tools" / "picture_fingerprints.py")
    module = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(module)
    return module


@pytest.mark.slow
def test_every_picture_draws_the_recorded_pixels():
    recorded = json.loads(RECORDED.read_text(encoding="utf-8"))
    if recorded["matplotlib"] != matplotlib.__version__:
        pytest.skip(f"fingerprints were recorded with matplotlib {recorded['matplotlib']}; "
                    f"{matplotlib.__version__} is installed and renders other pixels")
    tool = _tool()
    assert (tool.DPI, list(tool.FIGSIZE)) == (recorded["dpi"], recorded["figsize"])
    current = tool.fingerprints()
    assert len(current["pictures"]) == len(recorded["pictures"])
    assert tool.differences(recorded, current) == [], (
        "these pictures no longer draw the recorded pixels; see them with "
        "python tools/picture_fingerprints.py --png FOLDER")
