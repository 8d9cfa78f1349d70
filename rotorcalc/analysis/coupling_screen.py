"""The cross-coupling screen: how much destabilising cross-coupled stiffness the rotor takes.

At the maximum continuous speed, a cross-coupled stiffness ``q`` (force on the shaft
``-[[0, q], [-q, 0]] (x, y)``: tangential, in the sense of forward whirl) is applied at the
chosen stations and swept from zero to several times the expected amount.  The first forward
mode is followed by its shape (the modal assurance criterion against the previous step, not
by its place in the frequency order), and its log decrement read at every step.  Where that
log decrement crosses zero is refined by Brent's method: the threshold amount.  The verdict
compares the log decrement at the expected amount and the ratio threshold / expected with the
screening criteria (common practice, from memory; both selectable).

The rotor's own destabilising sources (``Rotor.sources``) are left out: the screen applies
only the swept amount, the way the trade's first-level screen is done.
"""

from __future__ import annotations

import dataclasses
import math
from dataclasses import dataclass

import numpy as np
from scipy.optimize import brentq

from ..assembly import assemble
from ..errors import InputError
from ..model import Bearing
from ..rules import PLACEMENTS, CouplingRule
from ..units import to_rpm
from ..vocabulary import BearingRole, Outcome
from .margins import CAUTION
from .modes import modes_at, read_only
from .tracking import mac_matrix

#: Steps of the sweep from zero to the top amount.
STEPS = 41


@dataclass(frozen=True)
class CouplingScreen:
    """The screen's result; amounts in N/m (the total over the stations)."""

    speed: float
    expected: float
    placement: str
    shares: tuple            # ((station, share of the total), ...)
    applied: np.ndarray
    log_dec: np.ndarray      # of the followed first forward mode at each applied amount
    frequency: np.ndarray    # its damped natural frequency, rad/s
    threshold: float | None  # where the log decrement reaches zero (None: not within the
    #                          sweep; 0 when it is not positive without cross-coupling)
    criteria: CouplingRule

    def __post_init__(self):
        read_only(self)

    @property
    def rows(self):
        """(applied N/m, log dec, frequency rad/s) per step of the sweep."""
        return list(zip(self.applied.tolist(), self.log_dec.tolist(), self.frequency.tolist()))

    def some_rows(self, every):
        """Every ``every``-th row, the last one always included (a table for reading)."""
        rows = self.rows
        return rows[::every] + ([] if (len(rows) - 1) % every == 0 else [rows[-1]])

    def summary(self):
        """The screen's outcome in one sentence, with its rule."""
        threshold = ("not reached within the sweep" if self.threshold is None else
                     f"{self.threshold:.4g} N/m ({self.ratio:.2f} x expected)")
        return (f"Expected cross-coupling {self.expected:.4g} N/m ({self.placement}): log "
                f"decrement {self.log_dec_zero:.3f} without it, {self.log_dec_expected:.3f} "
                f"with it; threshold {threshold}. Verdict: {self.verdict} "
                f"({self.criteria.describe()}; {self.criteria.label}).")

    @property
    def log_dec_zero(self):
        return float(self.log_dec[0])

    @property
    def log_dec_expected(self):
        return float(np.interp(self.expected, self.applied, self.log_dec))

    @property
    def ratio(self):
        """Threshold over expected (inf when no threshold lies within the sweep)."""
        if self.threshold is None:
            return math.inf
        return self.threshold / self.expected

    @property
    def verdict(self):
        ok = (self.log_dec_expected >= self.criteria.min_log_dec
              and self.ratio >= self.criteria.min_ratio)
        return Outcome.PASS if ok else Outcome.FAIL

    def plot(self, *, ax=None):
        """The screen's picture (:func:`rotorcalc.plotting.plot_coupling_screen`)."""
        from ..plotting import plot_coupling_screen
        return plot_coupling_screen(self, ax=ax)

    def to_dict(self):
        return {
            "speed_rpm": float(to_rpm(self.speed)),
            "expected_n_m": self.expected, "placement": self.placement,
            "stations": [{"station": int(s), "share": float(f)} for s, f in self.shares],
            "applied_n_m": [float(v) for v in self.applied],
            "log_dec": [float(v) for v in self.log_dec],
            "frequency_hz": [float(v / (2 * math.pi)) for v in self.frequency],
            "log_dec_at_zero": self.log_dec_zero, "log_dec_at_expected": self.log_dec_expected,
            "threshold_n_m": self.threshold,
            "threshold_ratio": None if self.threshold is None else self.ratio,
            "criteria": {"min_log_dec": self.criteria.min_log_dec,
                         "min_ratio": self.criteria.min_ratio,
                         "text": self.criteria.describe(), "label": self.criteria.label},
            "verdict": self.verdict, "caution": CAUTION,
        }


def source_q(source, speed):
    """A source's destabilising cross-coupling at ``speed``: the antisymmetric part
    (kxy - kyx) / 2 of its stiffness, N/m."""
    k = source.matrices(speed)[0]
    return float(k[0, 1] - k[1, 0]) / 2.0


def applied_sources(shares, total):
    """The sources that apply ``total`` (N/m) cross-coupling split by ``shares``."""
    return tuple(Bearing(station, {"kxx": (0.0,), "kyy": (0.0,), "kxy": (share * total,),
                                   "kyx": (-share * total,)},
                         name=f"applied q at station {station}", role=BearingRole.SOURCE,
                         key=f"cross_coupling.applied[{i}]")
                 for i, (station, share) in enumerate(shares))


def _first_forward(modes):
    """Index of the lowest forward-whirling mode (None when there is none)."""
    for i in np.argsort(modes.frequency):
        if modes.forward_fraction[i] >= 0.5 and modes.frequency[i] > 0:
            return int(i)
    return None


def _station_shares(rotor, placement, speed, mode_count):
    if placement == "sources":
        qs = [(s.station, source_q(s, rotor.operating.max_speed)) for s in rotor.sources]
        total = sum(q for _, q in qs)
        if not qs or not total > 0:
            raise InputError("cross_coupling", "gives no destabilising cross-coupling to "
                             "distribute", expected="[[cross_coupling]] tables with kxy > 0 "
                             "and kyx < 0, or placement mid-span", kind="missing")
        return tuple((st, q / total) for st, q in qs)
    if placement == "mid-span":
        ends = sorted(b.station for b in rotor.bearings if b.role == BearingRole.BEARING)
        z = np.concatenate([[0.0], np.cumsum([s.length for s in rotor.sections])])
        middle = 0.5 * (z[ends[0]] + z[ends[-1]]) if ends else 0.5 * z[-1]
        return ((int(np.argmin(np.abs(z - middle))), 1.0),)
    # largest first-mode amplitude among the stations, without the sources
    bare = dataclasses.replace(rotor, sources=())
    modes = modes_at(bare, speed, mode_count)
    first = _first_forward(modes)
    if first is None:
        raise _no_forward_mode()
    system = assemble(bare)
    amplitude = np.abs(modes.shapes[first])[system.mesh.station_nodes].max(axis=1)
    return ((int(np.argmax(amplitude)), 1.0),)


def _no_forward_mode():
    return InputError("coupling_screen", "finds no forward mode at the maximum continuous "
                      "speed", expected="more modes (analysis.mode_count)", kind="range")


def _modes_with(rotor, shares, q, speed, mode_count):
    """The modes at ``speed`` with ``q`` (N/m) applied as ``shares`` say."""
    return modes_at(dataclasses.replace(rotor, sources=applied_sources(shares, q)), speed,
                    mode_count)


def _follow(rotor, shares, amounts, speed, mode_count):
    """Log decrement and frequency of the first forward mode at each amount, followed by
    shape from the previous amount; also the shapes (for refining between two steps)."""
    log_dec, freq, shapes = [], [], []
    reference = None
    for q in amounts:
        modes = _modes_with(rotor, shares, q, speed, mode_count)
        if reference is None:
            j = _first_forward(modes)
            if j is None:
                raise _no_forward_mode()
        else:
            mac = mac_matrix(reference[None], modes.shapes)[0]
            j = int(np.argmax(mac))
        reference = modes.shapes[j]
        log_dec.append(float(modes.log_dec[j]))
        freq.append(float(modes.frequency[j]))
        shapes.append(reference)
    return np.array(log_dec), np.array(freq), shapes


def cross_coupling_screen(rotor, expected=None, placement=None, top_ratio=None,
                          criteria=None, steps=STEPS, xtol_share=1e-6):
    """Sweep the applied cross-coupling at the maximum continuous speed (module docstring).

    Parameters
    ----------
    expected : float, optional
        The expected total cross-coupling, N/m; by default the rotor's sources' own
        (the antisymmetric part (kxy - kyx) / 2 at the maximum continuous speed).
    placement : {"sources", "mid-span", "largest-amplitude"}
        Where the applied amount acts: split over the rotor's sources in proportion to their
        own amounts, all at the station nearest mid-span between the outer bearings, or all
        at the station of the first forward mode's largest amplitude.
    top_ratio : float
        The sweep runs from 0 to ``top_ratio`` times the expected amount (at least 10).
    criteria : CouplingRule, optional
        The rotor's ``coupling_rule`` (or the defaults); ``expected``, ``placement`` and
        ``top_ratio`` given here win over it.
    """
    criteria = criteria or rotor.coupling_rule or CouplingRule()
    placement = placement or criteria.placement
    top_ratio = top_ratio or criteria.top_ratio
    expected = criteria.expected if expected is None else expected
    if placement not in PLACEMENTS:
        raise InputError("coupling_screen.placement", "is not a known placement",
                         value=placement, expected=" or ".join(PLACEMENTS), kind="choice")
    speed = rotor.operating.max_speed
    mode_count = rotor.settings.mode_count
    if expected is None:
        expected = sum(source_q(s, speed) for s in rotor.sources)
    if not (math.isfinite(expected) and expected > 0):
        raise InputError("coupling_screen.expected", "must be a positive cross-coupling",
                         value=expected, expected='e.g. "2e6 N/m", or [[cross_coupling]] '
                         "sources in the rotor file", kind="range")
    bare = dataclasses.replace(rotor, sources=())
    shares = _station_shares(rotor, placement, speed, mode_count)
    amounts = np.linspace(0.0, max(top_ratio, 10.0) * expected, steps)
    amounts = np.unique(np.concatenate([amounts, [expected]]))
    log_dec, freq, shapes = _follow(bare, shares, amounts, speed, mode_count)
    threshold = _threshold(bare, shares, amounts, log_dec, shapes, speed, mode_count,
                           xtol_share * amounts[-1])
    return CouplingScreen(speed, float(expected), placement, shares, amounts, log_dec, freq,
                          threshold, criteria)


def _threshold(rotor, shares, amounts, log_dec, shapes, speed, mode_count, xtol):
    if log_dec[0] <= 0:
        return 0.0          # no margin at all: undamped or unstable without cross-coupling
    crossing = np.nonzero((log_dec[:-1] > 0) & (log_dec[1:] <= 0))[0]
    if not len(crossing):
        return None
    k = int(crossing[0])

    def g(q):
        modes = _modes_with(rotor, shares, q, speed, mode_count)
        j = int(np.argmax(mac_matrix(shapes[k][None], modes.shapes)[0]))
        return float(modes.log_dec[j])
    return float(brentq(g, amounts[k], amounts[k + 1], xtol=xtol))


@dataclass(frozen=True)
class SourcesCheck:
    """Every forward mode at the maximum continuous speed with every source of the rotor
    file applied, against ``min_log_dec``."""

    speed: float
    min_log_dec: float
    numbers: tuple        # mode numbers (from 1, by rising frequency)
    frequency: np.ndarray
    log_dec: np.ndarray
    whirl: tuple

    def __post_init__(self):
        read_only(self)

    @property
    def passed(self):
        return bool(np.all(self.log_dec >= self.min_log_dec))

    @property
    def rows(self):
        """(mode number, frequency rad/s, log dec, whirl, passed) per forward mode."""
        return [(n, float(f), float(d), w, bool(d >= self.min_log_dec))
                for n, f, d, w in zip(self.numbers, self.frequency, self.log_dec, self.whirl)]

    @property
    def verdict(self):
        return Outcome.PASS if self.passed else Outcome.FAIL

    def to_dict(self):
        return {"speed_rpm": float(to_rpm(self.speed)), "min_log_dec": self.min_log_dec,
                "modes": [{"mode": int(n), "frequency_hz": float(f / (2 * math.pi)),
                           "log_dec": float(d), "whirl": w,
                           "passed": bool(d >= self.min_log_dec)}
                          for n, f, d, w in zip(self.numbers, self.frequency, self.log_dec,
                                                self.whirl)],
                "verdict": self.verdict}


def sources_check(rotor, min_log_dec=None):
    """The forward modes' log decrements at the maximum continuous speed, sources applied."""
    rule = rotor.coupling_rule or CouplingRule()
    need = rule.min_log_dec_sources if min_log_dec is None else min_log_dec
    speed = rotor.operating.max_speed
    modes = modes_at(rotor, speed, rotor.settings.mode_count)
    order = [int(i) for i in np.argsort(modes.frequency)]
    keep = [i for i in order if modes.forward_fraction[i] >= 0.5]
    return SourcesCheck(speed, need, tuple(order.index(i) + 1 for i in keep),
                        np.array([modes.frequency[i] for i in keep]),
                        np.array([modes.log_dec[i] for i in keep]),
                        tuple(modes.whirl[i] for i in keep))


@dataclass(frozen=True)
class CouplingResult:
    """The screen and the check with every source applied: what ``check`` judges."""

    screen: CouplingScreen
    sources: SourcesCheck | None     # None when the rotor file has no sources

    @property
    def passed(self):
        return self.screen.verdict == Outcome.PASS and (self.sources is None
                                                        or self.sources.passed)

    def to_dict(self):
        return {"screen": self.screen.to_dict(),
                "with_sources": None if self.sources is None else self.sources.to_dict(),
                "passed": self.passed, "rule": {"text": self.screen.criteria.describe(),
                                                "label": self.screen.criteria.label}}


def coupling_study(rotor, **screen_options):
    """:func:`cross_coupling_screen` and :func:`sources_check` together."""
    return CouplingResult(cross_coupling_screen(rotor, **screen_options),
                          sources_check(rotor) if rotor.sources else None)
