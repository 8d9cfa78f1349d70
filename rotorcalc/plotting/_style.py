"""The look shared by every rotorcalc picture: colours, sizes, axes helpers.

Nothing here changes matplotlib's global settings; every artist is styled as
it is made, so a caller's own style for other figures is left alone.
"""

from __future__ import annotations

import functools

import matplotlib
import numpy as np
from matplotlib.figure import Figure
from matplotlib.patches import Rectangle

from ._units import to_rpm

# Ink and paper: dark slate rather than black, so that thin lines stay crisp in
# print without looking heavy on screen.
INK = "#25313d"
MUTED = "#6f7b87"
FAINT = "#b9c1c9"
GRID = "#e2e6ea"
PAPER = "#ffffff"

# Operating range: a pale sage band with a darker edge.
BAND_FILL = "#e3ecd8"
BAND_EDGE = "#5f8745"
#: The trip speed's dashes.
TRIP_DASH = (0, (4, 2.5))

# Log-decrement classes, warm (lightly damped) to cool (well damped).
LOG_DEC_EDGES = (0.0, 0.1, 0.3, 1.0, 3.0)
LOG_DEC_COLOURS = ("#b1172f", "#e36a1e", "#c49b0b", "#3a9467", "#2d6fb4", "#4a3f8c")
LOG_DEC_LABELS = ("below 0 (unstable)", "0 to 0.1", "0.1 to 0.3", "0.3 to 1",
                  "1 to 3", "above 3")

# Whirl sense as line style, so the map reads in black and white too.
WHIRL_STYLES = {"forward": "-", "backward": (0, (5.0, 2.2)), "mixed": (0, (1.0, 1.6))}
WHIRL_ORDER = ("forward", "backward", "mixed")

# Critical-speed markers by margin verdict (shape and colour both differ).
VERDICT_STYLES = {
    "pass": {"marker": "o", "facecolor": "#2f8a3b", "label": "pass"},
    "fail": {"marker": "X", "facecolor": "#c4161c", "label": "fail"},
    "critically damped": {"marker": "D", "facecolor": "#c3cad2", "label": "critically damped"},
    "not judged": {"marker": "o", "facecolor": "none", "label": "not judged"},
    "overdamped": {"marker": "s", "facecolor": "none", "label": "overdamped, not a critical"},
}
NEUTRAL_MARKER = {"marker": "o", "facecolor": PAPER, "label": ""}

# Series told apart by colour: probes by station, orbit speeds, map shapes; and the
# line styles of series that share a colour (probes at one station).
SERIES_COLOURS = ("#2d6fb4", "#c8571b", "#3a9467", "#7a4fa0", "#b1172f", "#8c6d1f", "#2f8f9d",
                  "#5b6770")
SERIES_STYLES = ("-", (0, (5.0, 2.2)), (0, (1.2, 1.6)), (0, (6.0, 2.0, 1.2, 2.0)))
# Named items told apart by colour: bearings on the critical-speed map, and variants
# after the base (drawn in ink) on the overlaid maps.
ITEM_COLOURS = ("#2d6fb4", "#c8571b", "#7a4fa0", "#2f8f9d", "#8c6d1f", "#b1172f")

# Rotor drawing.
STEEL = "#cfd8e1"
STEEL_EDGE = "#53626f"
DISK = "#9db4cb"
BORE = "#f5f7f9"
ADDED_MASS_HATCH = "#7b8a97"
BEARING = "#3f4f5e"
SEAL = "#a0522d"
SOURCE = "#b1172f"       # a destabilising source (gas forces, a seal given as cross-coupling)

FONT_TICK = 8.5
FONT_LABEL = 9.5
FONT_TITLE = 11.0
FONT_NOTE = 7.5


def literal_text(func):
    """Run a plotting function with math text off: every label it draws is the literal
    text it holds, so a user's name or title with '$' signs is drawn as written (an
    unbalanced one once broke the picture)."""
    @functools.wraps(func)
    def drawing(*args, **kwargs):
        with matplotlib.rc_context({"text.parse_math": False}):
            return func(*args, **kwargs)
    return drawing


def axes_for(ax, figsize):
    """Return ``(figure, axes, created)``; a new figure is made only when ``ax`` is None.

    The figure is a plain :class:`matplotlib.figure.Figure`, not registered
    with pyplot: it needs no GUI backend and is freed with its last reference.
    To show it in a window, make the axes with pyplot and pass them as ``ax``.
    """
    if ax is not None:
        return ax.figure, ax, False
    fig = Figure(figsize=figsize, facecolor=PAPER)
    return fig, fig.add_subplot(1, 1, 1), True


def style_axes(ax, grid=True):
    """Slate spines and ticks, a light grid behind the data."""
    ax.set_facecolor(PAPER)
    for side, spine in ax.spines.items():
        spine.set_color(MUTED if side in ("left", "bottom") else FAINT)
        spine.set_linewidth(0.8)
    ax.tick_params(colors=INK, labelsize=FONT_TICK, length=3.5, width=0.7, direction="out")
    ax.tick_params(which="minor", length=2.0, width=0.5)
    if grid:
        ax.grid(True, which="major", color=GRID, linewidth=0.7, zorder=0)
        ax.set_axisbelow(True)


def label_axes(ax, xlabel=None, ylabel=None, title=None):
    if xlabel is not None:
        ax.set_xlabel(xlabel, fontsize=FONT_LABEL, color=INK)
    if ylabel is not None:
        ax.set_ylabel(ylabel, fontsize=FONT_LABEL, color=INK)
    if title is not None:
        ax.set_title(title, fontsize=FONT_TITLE, color=INK, loc="left", pad=10)


#: Log decrements this close to zero are rounding noise of an undamped mode.
LOG_DEC_ZERO = 1e-6


def log_dec_class(value):
    """Index into :data:`LOG_DEC_COLOURS` of a log decrement (non-finite: -1)."""
    if value != value or value in (float("inf"), float("-inf")):
        return -1
    if abs(value) < LOG_DEC_ZERO:
        value = 0.0
    for i, edge in enumerate(LOG_DEC_EDGES):
        if value < edge:
            return i
    return len(LOG_DEC_EDGES)


def signed(value, spec):
    """A number with a true minus sign, as the tick labels have."""
    return format(value, spec).replace("-", "\u2212")


def log_dec_text(value, digits=3):
    """A log decrement for a label: a few significant digits, noise shown as 0."""
    if abs(value) < LOG_DEC_ZERO:
        return "0"
    return signed(value, f".{digits}g")


def legend_columns(ax, labels, fontsize, handlelength=2.0, spacing=1.5):
    """How many legend entries fit side by side in the width of the axes."""
    room = ax.get_window_extent().width * 72.0 / ax.figure.dpi
    used, n = 0.0, 0
    for label in labels:
        width = (handlelength + 0.8 + spacing) * fontsize + 0.55 * fontsize * len(label)
        if n and used + width > room:
            break
        used += width
        n += 1
    n = max(n, 1)
    rows = -(-len(labels) // n)
    return -(-len(labels) // rows)


def whole(value):
    """A speed or frequency as a whole number of rpm/cpm, for labels."""
    return signed(value, ".0f")


def short_whirl(label):
    """"fwd", "bwd" for forward and backward whirl; other labels as they are."""
    return {"forward": "fwd", "backward": "bwd"}.get(label, label)


def paper_box(style="square", pad=0.1, alpha=0.8):
    """The see-through paper box behind a label on the data, so lines under it give way."""
    return dict(boxstyle=f"{style},pad={pad}", facecolor=PAPER, edgecolor="none", alpha=alpha)


def operating_band(ax, operating, axis="x", linewidth=0.9, label=None):
    """Shade the operating range with its ends as lines and the trip speed dashed.

    ``axis`` is the axis the speeds (rpm) run along: ``"x"`` shades the range
    full height, ``"y"`` full width.  ``label`` names the band artist.

    Returns
    -------
    band : Rectangle
    trip : Line2D or None
        None without a trip speed.
    marks : list of (float, str)
        The speeds to label and their texts: both ends, then the trip speed.
    """
    lo, hi = to_rpm(operating.min_speed), to_rpm(operating.max_speed)
    named = {} if label is None else {"label": label}
    if axis == "x":
        band = Rectangle((lo, 0.0), hi - lo, 1.0, transform=ax.get_xaxis_transform(),
                         facecolor=BAND_FILL, edgecolor="none", zorder=1, **named)
        edge = ax.axvline
    else:
        band = Rectangle((0.0, lo), 1.0, hi - lo, transform=ax.get_yaxis_transform(),
                         facecolor=BAND_FILL, edgecolor="none", zorder=1, **named)
        edge = ax.axhline
    ax.add_patch(band)
    for speed in (lo, hi):
        edge(speed, color=BAND_EDGE, linewidth=linewidth, zorder=1.5)
    marks = [(lo, whole(lo)), (hi, whole(hi))]
    trip = None
    if operating.trip_speed is not None:
        speed = to_rpm(operating.trip_speed)
        trip = edge(speed, color=BAND_EDGE, linewidth=linewidth, linestyle=TRIP_DASH, zorder=1.5)
        marks.append((speed, f"trip {whole(speed)}"))
    return band, trip, marks


def order_line(ax, order, x_lo, x_hi, top):
    """The excitation line ``frequency = order x speed``, labelled "2X" where it leaves
    the frame: at the right edge, or below the top.  Returns the line and its label."""
    xs = np.array([x_lo, x_hi])
    line, = ax.plot(xs, order * xs, color=MUTED, linewidth=0.9, zorder=2)
    if order * x_hi <= top:
        x = x_hi - 0.012 * (x_hi - x_lo)
        y, va = order * x, "bottom"
    else:
        y = 0.97 * top
        x, va = y / order, "center"
    text = ax.text(x, y, f" {order:g}X ", fontsize=FONT_TICK, color=INK, ha="right", va=va,
                   zorder=5, bbox=paper_box("square", 0.12, 0.85))
    return line, text
