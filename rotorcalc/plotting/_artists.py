"""The records of what a picture drew, and what every such record has.

Each picture function returns a frozen record of its artists: a subclass of
:class:`Artists`, so every one has ``figure``, ``ax`` and ``legend``.  Pictures
that shade the operating range derive from :class:`RangeArtists`, and the two
whirl-speed maps (one rotor, variants overlaid) from :class:`WhirlMapArtists`.

A new picture adds its own fields in a subclass; the shared fields are
keyword-only (after ``figure`` and ``ax``), so a subclass may give its own
fields without defaults.
"""

from __future__ import annotations

from dataclasses import dataclass, field


@dataclass(frozen=True)
class Artists:
    """What a picture drew.

    Attributes
    ----------
    figure : matplotlib.figure.Figure
        The figure drawn on (made by the function when no axes was given).
    ax : Axes
        The axes drawn on; with several panels, the first.
    legend : Legend or None
        The key of the picture, None when it has none.
    """

    figure: object
    ax: object
    legend: object = field(default=None, kw_only=True)


@dataclass(frozen=True)
class RangeArtists(Artists):
    """A picture with the operating range shaded on one axes.

    Attributes
    ----------
    band : Rectangle or None
        The shaded operating range (speeds along the picture's speed axis).
    band_labels : sequence of Annotation
        The speeds of the range's ends and of the trip speed.
    trip_line : Line2D or None
        The trip speed, dashed; None without a range or a trip speed.
    """

    band: object = field(default=None, kw_only=True)
    band_labels: tuple = field(default=(), kw_only=True)
    trip_line: object = field(default=None, kw_only=True)


@dataclass(frozen=True)
class WhirlMapArtists(RangeArtists):
    """A whirl-speed map: spin speed (rpm) across, damped natural frequency (cpm) up.

    Attributes
    ----------
    branches : sequence
        The drawn pieces of the branches (one piece per run of equal style).
    branch_whirl : sequence
        The whirl label of each piece, parallel to ``branches``.
    order_lines, order_labels : sequence
        One excitation-order line and its label per order.
    freq_max : float
        Upper limit of the frequency axis, cpm.
    hidden_branches : int
        Branches lying wholly above ``freq_max``.
    """

    branches: tuple = field(default=(), kw_only=True)
    branch_whirl: tuple = field(default=(), kw_only=True)
    order_lines: tuple = field(default=(), kw_only=True)
    order_labels: tuple = field(default=(), kw_only=True)
    freq_max: float = field(default=0.0, kw_only=True)
    hidden_branches: int = field(default=0, kw_only=True)
