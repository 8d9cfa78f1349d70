"""Writing figures to disk, whole or not at all."""

from __future__ import annotations

from pathlib import Path

import matplotlib

from ..output import open_replacement
from ..errors import InputError

#: File formats by extension, and the resolution of raster output.
FORMATS = {".png": "png", ".svg": "svg", ".pdf": "pdf"}
PNG_DPI = 150

#: Metadata left out so that the same figure gives the same bytes: the time of saving.
_UNDATED = {"svg": {"Date": None}, "pdf": {"CreationDate": None, "ModDate": None}}
#: SVG element ids are hashes salted at random unless a salt is set.
_FIXED_IDS = {"svg.hashsalt": "rotorcalc"}


def save(fig, path):
    """Save a figure, the format chosen by the file extension.

    The picture is written through :func:`rotorcalc.output.open_replacement`:
    a temporary file in the target folder, renamed over ``path`` once on disk,
    so a reader never sees a half-written file and a failed save leaves any
    earlier file untouched. SVG and PDF files carry no date and fixed element
    ids, so the same figure saved twice gives the same bytes.

    Parameters
    ----------
    fig : matplotlib.figure.Figure
    path : str or os.PathLike
        Ending in ``.png`` (written at 150 dpi), ``.svg`` or ``.pdf``.

    Returns
    -------
    pathlib.Path
        The path written.

    Raises
    ------
    ValueError
        When the extension is not one of ``.png``, ``.svg``, ``.pdf``.
    OSError
        When ``path`` is a folder, a device, pipe or socket, or cannot be
        written.
    """
    path = Path(path)
    fmt = FORMATS.get(path.suffix.lower())
    if fmt is None:
        raise InputError("picture file", "has an extension no picture is written in",
                         value=str(path), expected="a file name ending in " + ", ".join(FORMATS),
                         kind="output")
    with open_replacement(path) as stream, matplotlib.rc_context(_FIXED_IDS):
        fig.savefig(stream, format=fmt, dpi=PNG_DPI if fmt == "png" else None,
                    metadata=_UNDATED.get(fmt), bbox_inches="tight", pad_inches=0.12,
                    facecolor=fig.get_facecolor())
    return path
