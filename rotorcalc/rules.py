"""The verdict rules a rotor file selects: the separation-margin rule and the stability rule.

Each rule describes itself in one sentence and carries its label (where it comes from), so
every presentation prints the same words (docs/theory.md, sections 5 and 6).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from ._checks import _one_of, _positive
from .errors import InputError
from .vocabulary import old_keywords

MARGIN_RULES = ("af-curve", "fixed", "none")
STABILITY_RULES = ("positive", "at-least", "none")
#: Where each verdict rule comes from; printed beside every verdict it gives.
FROM_MEMORY = ("common practice, quoted from memory from industry standards for centrifugal "
               "machinery; confirm against the edition that applies")


@old_keywords(kind="name", below="margin_below", above="margin_above",
              cap_below="margin_cap_below", cap_above="margin_cap_above")
@dataclass(frozen=True)
class MarginRule:
    """How the required separation margin is set (see docs/theory.md).

    ``"af-curve"``: the amplification-factor rule of industry standards for
    centrifugal machinery (common practice, from memory): no margin below
    ``af_threshold``, else ``17 (1 - 1/(AF - 1.5))`` per cent below the minimum
    speed, at most ``margin_cap_below``, and ``10 + 17 (1 - 1/(AF - 1.5))`` per cent
    above the maximum continuous speed, at most ``margin_cap_above``;
    ``"fixed"``: the ``margin_below`` and ``margin_above`` percentages for every critical;
    ``"none"``: no margin required (the table still lists the margins).
    """

    name: str = "af-curve"
    margin_below: float = 15.0
    margin_above: float = 15.0
    af_threshold: float = 2.5
    margin_cap_below: float = 16.0
    margin_cap_above: float = 26.0

    def __post_init__(self):
        _one_of("analysis.margin_rule", self.name, MARGIN_RULES)
        _positive("analysis.margin_below", self.margin_below, allow_zero=True)
        _positive("analysis.margin_above", self.margin_above, allow_zero=True)
        _positive("analysis.af_threshold", self.af_threshold)
        for name in ("margin_cap_below", "margin_cap_above"):
            value = getattr(self, name)
            if not (value > 0):  # inf lifts the cap
                raise InputError(f"analysis.{name}", "must be positive", value=value,
                                 expected='a percentage such as 16, or "none" for no cap',
                                 kind="range")

    @property
    def label(self):
        """Where the rule comes from."""
        return FROM_MEMORY if self.name == "af-curve" else "set by the user"

    def describe(self):
        """The rule in one sentence, for every presentation."""
        if self.name == "af-curve":
            caps = []
            if math.isfinite(self.margin_cap_below):
                caps.append(f"at most {self.margin_cap_below:g}% below")
            if math.isfinite(self.margin_cap_above):
                caps.append(f"at most {self.margin_cap_above:g}% above")
            capped = f" ({', '.join(caps)})" if caps else ""
            return (f"amplification-factor rule: AF < {self.af_threshold:g} needs no margin; "
                    "otherwise 17(1-1/(AF-1.5))% below the minimum speed and "
                    f"10+17(1-1/(AF-1.5))% above the maximum continuous speed{capped}")
        if self.name == "fixed":
            return f"fixed: {self.margin_below:g}% below and {self.margin_above:g}% above"
        return "none: margins listed, not judged"


@old_keywords(kind="name", minimum="min_log_dec")
@dataclass(frozen=True)
class StabilityRule:
    """What log decrement every mode needs from the minimum speed up to trip.

    ``"positive"``: above zero; ``"at-least"``: at least ``min_log_dec`` (0.1 is a
    common-practice figure, from memory); ``"none"``: reported, not judged.
    A log decrement within ``marginal_band`` of zero (0.001 by default: an
    amplification factor of 3000 or more) cannot be told from zero by the
    model; it is *marginal* and fails either rule, so a verdict never rests on
    a digit the model does not resolve (an undamped model is marginal).
    """

    name: str = "positive"
    min_log_dec: float = 0.1
    marginal_band: float = 1e-3

    def __post_init__(self):
        _one_of("analysis.stability_rule", self.name, STABILITY_RULES)
        _positive("analysis.min_log_dec", self.min_log_dec, allow_zero=True)
        _positive("analysis.marginal_band", self.marginal_band, allow_zero=True)

    @property
    def required(self):
        """The log decrement a mode must exceed (positive) or reach (at-least)."""
        return 0.0 if self.name == "positive" else self.min_log_dec

    @property
    def label(self):
        if self.name == "at-least":
            return ("common practice, from memory" if self.min_log_dec == 0.1
                    else "set by the user")
        return "physics: a negative log decrement grows" if self.name == "positive" else ""

    def describe(self):
        band = (f"; within {self.marginal_band:g} of 0 (an undamped mode included) is "
                "marginal and fails")
        if self.name == "positive":
            return ("every mode's log decrement above 0 from the minimum speed up to trip"
                    + band)
        if self.name == "at-least":
            return (f"every mode's log decrement at least {self.min_log_dec:g} from the minimum "
                    "speed up to trip" + band)
        return "none: log decrements listed, not judged"

    def is_marginal(self, log_dec):
        return abs(log_dec) <= self.marginal_band

    def passes(self, log_dec):
        if self.name == "none":
            return True
        if self.is_marginal(log_dec) or log_dec <= 0.0:
            return False
        return self.name == "positive" or log_dec >= self.min_log_dec


PLACEMENTS = ("sources", "mid-span", "largest-amplitude")


#: Where a stability eigenvalue reads coefficients tabulated over whirl frequency.
COEFFICIENTS_AT = ("synchronous", "mode-frequency")


@dataclass(frozen=True)
class CouplingRule:
    """The cross-coupling screen a rotor file asks for (``[coupling_screen]``).

    At the maximum continuous speed the applied cross-coupling is swept from 0 to
    ``top_ratio`` times the expected amount at ``placement``; the screen passes when the
    first forward mode's log decrement at the expected amount is at least ``min_log_dec``
    and the threshold is at least ``min_ratio`` times the expected amount.  With every
    source of the file applied, each forward mode needs ``min_log_dec_sources``.  The
    figures 0.1, 2 and 0.1 are common practice, quoted from memory from industry standards
    for centrifugal compressors (confirm against the edition that applies).  ``in_check``:
    ``check`` and the screening verdict include both.
    """

    placement: str = "sources"
    top_ratio: float = 10.0
    min_log_dec: float = 0.1
    min_ratio: float = 2.0
    min_log_dec_sources: float = 0.1
    expected: float | None = None      # N/m; None: the sources' own total
    in_check: bool = True
    #: Where coefficients tabulated over whirl frequency are read: at the spin speed
    #: ("synchronous", the default) or at each mode's own frequency ("mode-frequency",
    #: iterated to a fixed point per mode).
    coefficients_at: str = "synchronous"

    def __post_init__(self):
        _one_of("coupling_screen.placement", self.placement, PLACEMENTS)
        _one_of("coupling_screen.coefficients_at", self.coefficients_at, COEFFICIENTS_AT)
        for key in ("min_log_dec", "min_ratio", "min_log_dec_sources"):
            _positive(f"coupling_screen.{key}", getattr(self, key), allow_zero=True)
        if not (math.isfinite(self.top_ratio) and self.top_ratio >= 10.0):
            raise InputError("coupling_screen.top_ratio", "must be at least 10",
                             value=self.top_ratio, expected="10 or more (the sweep reaches "
                             "that many times the expected amount)", kind="range")
        if self.expected is not None:
            _positive("coupling_screen.expected", self.expected)

    @property
    def label(self):
        if (self.min_log_dec, self.min_ratio, self.min_log_dec_sources) == (0.1, 2.0, 0.1):
            return FROM_MEMORY
        return "set by the user"

    def describe_screen(self):
        """The screen's own criteria."""
        return (f"log decrement at the expected cross-coupling at least {self.min_log_dec:g}, "
                f"threshold at least {self.min_ratio:g} x the expected amount")

    def describe_sources(self):
        """The criterion of the check with every source applied."""
        return (f"with every source applied, each forward mode's log decrement at least "
                f"{self.min_log_dec_sources:g}")

    def describe(self):
        return f"{self.describe_screen()}; {self.describe_sources()}"
