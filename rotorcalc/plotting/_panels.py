"""Figures of several panels (the polar plot and the orbits): the grid, the title and
note above it, the legend below it, and round scales."""

from __future__ import annotations

import math

from . import _labels as lb
from . import _style as st


def grid(n):
    """Rows and columns for ``n`` panels: one row up to three, then two or three columns."""
    cols = n if n <= 3 else (2 if n == 4 else 3)
    return -(-n // cols), cols


def figure_title(fig, title, note, top_in):
    """Title and a muted note at the top-left of a figure; returns the top of the panels
    (figure fraction), ``top_in`` inches from the top."""
    h = fig.get_figheight()
    fig.text(0.02, 1.0 - 0.18 / h, title, fontsize=st.FONT_TITLE, color=st.INK, ha="left",
             va="top")
    if note:
        fig.text(0.02, 1.0 - 0.44 / h, note, fontsize=st.FONT_NOTE + 0.5, color=st.MUTED,
                 ha="left", va="top", linespacing=1.35)
    return 1.0 - top_in / h


def balanced_columns(n, most):
    """Legend columns: at most ``most``, the rows as evenly filled as can be."""
    rows = -(-n // most)
    return max(1, -(-n // rows))


def figure_legend(fig, handles, names, handlelength):
    """A legend of the whole figure, centred along its bottom."""
    return lb.ink(fig.legend(handles, names, loc="lower center", bbox_to_anchor=(0.5, 0.01),
                             frameon=False, fontsize=st.FONT_NOTE + 0.5,
                             handlelength=handlelength,
                             ncol=balanced_columns(len(names), 6), columnspacing=1.6))


def nice_step(span, count):
    """A 1-2-5 step giving about ``count`` intervals over ``span``."""
    if not span > 0:
        return 1.0
    raw = span / count
    mag = 10.0 ** math.floor(math.log10(raw))
    for m in (1.0, 2.0, 5.0, 10.0):
        if raw <= m * mag:
            return m * mag
    return 10.0 * mag


def round_up(value):
    """A round number (1, 1.2, 1.5, 2, 2.5, 3, 4, 5, 6, 8 x 10^n) at or above ``value``."""
    if not value > 0 or not math.isfinite(value):
        return 1.0
    mag = 10.0 ** math.floor(math.log10(value))
    for m in (1.0, 1.2, 1.5, 2.0, 2.5, 3.0, 4.0, 5.0, 6.0, 8.0, 10.0):
        if value <= m * mag * (1 + 1e-9):
            return m * mag
    return 10.0 * mag
