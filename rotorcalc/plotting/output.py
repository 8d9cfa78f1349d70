"""Writing figures to disk, whole or not at all."""

from __future__ import annotations

import os
import secrets
from pathlib import Path

#: File formats by extension, and the resolution of raster output.
FORMATS = {".png": "png", ".svg": "svg", ".pdf": "pdf"}
PNG_DPI = 150


def save(fig, path):
    """Save a figure, the format chosen by the file extension.

    The picture is written to a temporary file in the target folder and then
    renamed over ``path``, so a reader never sees a half-written file and a
    failed save leaves any earlier file untouched.

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
    """
    path = Path(path)
    fmt = FORMATS.get(path.suffix.lower())
    if fmt is None:
        raise ValueError(f"cannot save a figure as {path.name!r}: the file name must end in "
                         + ", ".join(FORMATS))
    folder = path.parent if str(path.parent) else Path(".")
    folder.mkdir(parents=True, exist_ok=True)
    # Exclusive creation under a random name: no clash with a parallel save, and
    # the file gets the permissions any ordinary new file would.
    tmp = folder / f".{path.name}.{secrets.token_hex(6)}.tmp"
    stream = open(tmp, "xb")
    try:
        with stream:
            fig.savefig(stream, format=fmt, dpi=PNG_DPI if fmt == "png" else None,
                        bbox_inches="tight", pad_inches=0.12,
                        facecolor=fig.get_facecolor())
        os.replace(tmp, path)
    except BaseException:
        try:
            os.unlink(tmp)
        except FileNotFoundError:
            pass
        raise
    return path

