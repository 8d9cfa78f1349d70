"""Matplotlib figures as inline SVG text for the report."""

from __future__ import annotations

import io
import re

import matplotlib
from matplotlib.backends.backend_agg import RendererAgg

#: The margin around a cropped picture, inches (as rotorcalc.plotting.save).
PAD_INCHES = 0.12

#: Everything before the <svg> element (XML declaration, doctype, comments): not allowed
#: inside an HTML body.
_PROLOGUE = re.compile(r"^.*?(?=<svg)", re.S)
_METADATA = re.compile(r"\s*<metadata>.*?</metadata>", re.S)


def svg(fig, salt: str) -> str:
    """The figure as one ``<svg>`` element (a plain Figure: freed with its last reference).

    ``salt`` prefixes the drawing's internal ids (clip paths, markers, glyphs) and the
    references to them: several pictures in one HTML document share one id space.  Text is
    drawn as paths, so no font is needed to show it.
    """
    buffer = io.StringIO()
    with matplotlib.rc_context({"svg.hashsalt": salt, "svg.fonttype": "path"}):
        # cropped as the command line's pictures are (rotorcalc.plotting.save), the box
        # measured with the raster renderer: a third of the cost of an SVG pass
        width, height = fig.get_size_inches() * fig.dpi
        box = fig.get_tightbbox(RendererAgg(width, height, fig.dpi)).padded(PAD_INCHES)
        fig.savefig(buffer, format="svg", metadata={"Date": None}, bbox_inches=box,
                    facecolor=fig.get_facecolor())
    text = _PROLOGUE.sub("", buffer.getvalue(), count=1)
    text = _METADATA.sub("", text, count=1)     # names of vocabularies only: nothing to show
    text = _prefixed(text, salt)
    # the figure scales with the page: its own size becomes the viewBox only
    return re.sub(r'<svg([^>]*?) width="[^"]*" height="[^"]*"', r'<svg\1', text, count=1)


def _prefixed(text, prefix):
    """Every ``id`` of the drawing and every reference to one (``href="#id"``,
    ``url(#id)``) with ``prefix-`` in front."""
    text = re.sub(r'\bid="([^"]+)"', lambda m: f'id="{prefix}-{m.group(1)}"', text)
    text = re.sub(r'(href)="#([^"]+)"', lambda m: f'{m.group(1)}="#{prefix}-{m.group(2)}"',
                  text)
    return re.sub(r"url\(#([^)]+)\)", lambda m: f"url(#{prefix}-{m.group(1)})", text)
