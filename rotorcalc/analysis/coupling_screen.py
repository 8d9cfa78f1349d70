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

Bearings and seals tabulated over whirl frequency are read at the spin speed (synchronous) by
default; with the rule's ``coefficients_at = "mode-frequency"`` each judged mode is iterated
to its own frequency (:mod:`rotorcalc.analysis.own_frequency`).
"""

from __future__ import annotations

import dataclasses
import math
from dataclasses import dataclass

import numpy as np
from scipy.optimize import brentq
from scipy.sparse.linalg import spsolve

from ..assembly import assemble, with_sources
from ..errors import InputError
from ..model import Bearing
from ..rules import PLACEMENTS, CouplingRule
from ..units import to_rpm
from ..vocabulary import BearingRole, Outcome
from .margins import CAUTION
from ..solvers import NUMERICAL_FAILURES
from .modes import STRAIGHT_LINE, modes_at, read_only
from .projected import ProjectedSolver
from .own_frequency import at_own_frequency, own_frequency_notes
from .sources_check import SourcesCheck, _synchronous_note, sources_check  # noqa: F401
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
    notes: tuple = ()        # Notice records: unconverged whirl iterations, table ends
    expected_from: str = "given to the screen"   # where the expected amount comes from
    solves: str = ""         # how the amounts were solved (a projected basis, or in full)

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
        whirl = ("; tables over whirl frequency read at each mode's own"
                 if self.criteria.coefficients_at == "mode-frequency" else "")
        return (f"Expected cross-coupling {self.expected:.4g} N/m ({self.expected_from}; "
                f"{self.where_applied()}{whirl}): log decrement {self.log_dec_zero:.3f} "
                f"without it, {self.log_dec_expected:.3f} with it; threshold {threshold}. "
                f"Verdict: {self.verdict} ({self.criteria.describe_screen()}; "
                f"{self.criteria.label}).")

    def where_applied(self):
        """Where the swept amount acts, in words."""
        if self.placement == "sources":
            return "applied split over the sources' stations as their own amounts"
        station = self.shares[0][0]
        if self.placement == "mid-span":
            return f"applied at station {station}, mid-span between the outer bearings"
        return f"applied at station {station}, the first forward mode's largest amplitude"

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
            "expected_n_m": self.expected, "expected_from": self.expected_from,
            "placement": self.placement, "applied": self.where_applied(),
            "stations": [{"station": int(s), "share": float(f)} for s, f in self.shares],
            "applied_n_m": [float(v) for v in self.applied],
            "log_dec": [float(v) for v in self.log_dec],
            "frequency_hz": [float(v / (2 * math.pi)) for v in self.frequency],
            "log_dec_at_zero": self.log_dec_zero, "log_dec_at_expected": self.log_dec_expected,
            "threshold_n_m": self.threshold,
            "threshold_ratio": None if self.threshold is None else self.ratio,
            "criteria": {"min_log_dec": self.criteria.min_log_dec,
                         "min_ratio": self.criteria.min_ratio,
                         "text": self.criteria.describe_screen(),
                         "label": self.criteria.label},
            "coefficients_at": self.criteria.coefficients_at,
            "solves": self.solves,
            "notes": [n.to_dict() for n in self.notes],
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
    """Index of the lowest mode whirling forward or on a straight line (None when there is
    none): supports stiffer one way than the other give straight-line whirls without
    cross-coupling, the lowest of which is judged (roundoff alone would call it or its
    partner forward); :func:`_nearest_forward` moves to the partner where it turns the more
    forward as the amount grows."""
    for i in np.argsort(modes.frequency):
        if modes.forward_fraction[i] >= 0.5 - STRAIGHT_LINE and modes.frequency[i] > 0:
            return int(i)
    return None


#: A mode mixed with the followed one lies this close in frequency (a share of it): the
#: supports' small anisotropy splits the pair.
PAIR_SPREAD = 0.25
#: ... and deflects alike: the assurance criterion of the two modes' deflections (each
#: station's orbit size, whatever its whirl) at least this.
PAIR_ALIKE = 0.9


def _nearest_forward(modes, reference):
    """Index of the mode to judge: the mode most like ``reference`` (modal assurance
    criterion) or, where it belongs to a mixed pair, the pair's more forward mode.

    Near-isotropic supports mix the first backward and forward modes into two elliptical
    whirls of one deflected shape (on straight lines, forward share 0.5 each, where the
    supports' anisotropy outweighs the cross-coupling) whose forward shares change with the
    applied amount: the mode that was forward at zero may turn backward as the amount grows
    while its partner turns forward and loses its damping.  Following the shape alone
    follows the first; the screen judges the forward one.  The pair: modes within
    :data:`PAIR_SPREAD` in frequency whose deflections (orbit size at each node) agree to
    :data:`PAIR_ALIKE` (assurance criterion)."""
    best = int(np.argmax(mac_matrix(reference[None], modes.shapes)[0]))
    size = np.sqrt(np.sum(np.abs(modes.shapes) ** 2, axis=-1))          # (modes, nodes)
    alike = mac_matrix(size[best][None], size)[0] >= PAIR_ALIKE
    near = np.abs(modes.frequency - modes.frequency[best]) <= PAIR_SPREAD * modes.frequency[best]
    pair = np.flatnonzero(alike & near)
    share = modes.forward_fraction[pair]
    if share.max() - modes.forward_fraction[best] <= 2.0 * STRAIGHT_LINE:
        return best             # as forward as its partner to roundoff: by shape alone
    return int(pair[np.argmax(share)])


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
    # largest first-mode amplitude among the stations, without the sources; among as many
    # modes as the screen's projection solves (the judged mode may be a guard mode there)
    bare = dataclasses.replace(rotor, sources=())
    modes = modes_at(bare, speed, mode_count + PROJECTION_GUARD)
    first = _first_forward(modes)
    if first is None:
        raise _no_forward_mode()
    system = assemble(bare)
    amplitude = np.abs(modes.shapes[first])[system.mesh.station_nodes].max(axis=1)
    return ((int(np.argmax(amplitude)), 1.0),)


#: Modes the screen solves at least.
SCREEN_MODES = 8
#: Modes beyond those judged whose shapes at the sweep's ends join the projection basis.  Every
#: projected pair is certified whatever the guard: it only trades basis size against solves
#: falling back to the full model.  One: a basis of 48 vectors on the compressor (four: 58,
#: two: 52), its screen 0.41 -> 0.30 -> 0.25 s CPU, no fallback on any bundled case and
#: placement, log decrements the same to 4e-12 (tests/verification/test_projected.py;
#: docs/performance.md).  None would save 0.01 s more and leave no mode beyond the judged.
PROJECTION_GUARD = 1
#: A full-model eigenvalue must have a projected one this close (relative) at the checked
#: amounts; the certified pairs agree to about 1e-9.
PROJECTION_MATCH = 1e-6


def _no_forward_mode():
    return InputError("coupling_screen", "finds no forward mode at the maximum continuous "
                      "speed", expected="more modes (analysis.mode_count)", kind="range")


class _Judge:
    """Solves one rotor state and picks the mode to judge: by shape against a reference, or
    the first forward mode; at its own whirl frequency when the rule asks and a table
    depends on it.  Collects the notes of the iterations."""

    def __init__(self, rotor, shares, speed, mode_count, own):
        self.rotor, self.shares, self.speed, self.mode_count = rotor, shares, speed, mode_count
        self.own, self.notes = own, []
        self.bare = assemble(rotor)      # once: each amount changes only the sources
        self.solver, self.solved = None, {}     # the projection; amount -> (system, modes)

    def project(self, top):
        """Solve the amounts that follow on a basis (:mod:`.projected`): the modes with none
        and with ``top`` (N/m) applied, and the deflections under a unit force at each
        loaded DOF of the bare rotor (the directions the applied stiffness acts in).  Where
        the first forward mode is the highest or next-highest of the modes solved, more are
        solved (at every amount, too): the mode after it (a mixed pair's partner) and the
        guard beyond."""
        def ends_with(count):
            return [modes_at(with_sources(self.bare, applied_sources(self.shares, q)),
                             self.speed, count) for q in (0.0, top)]

        ends = ends_with(self.mode_count + PROJECTION_GUARD)
        first = _first_forward(ends[0])
        rank = None if first is None else int(np.argsort(ends[0].frequency).tolist().index(first))
        if rank is not None and rank + 2 > self.mode_count:
            # the judged mode high among those solved: its partner of a mixed pair must be
            # solved at every amount too, and the basis hold the guard beyond the two
            self.mode_count = rank + 2
            ends = ends_with(self.mode_count + PROJECTION_GUARD)
        system = with_sources(self.bare, applied_sources(self.shares, 1.0))
        dofs = np.concatenate([link.dofs for link in system.source_links])
        loads = np.zeros((system.mass.shape[0], len(dofs)))
        loads[dofs, np.arange(len(dofs))] = 1.0
        try:
            static = spsolve(self.bare.stiffness(self.speed).tocsc(), loads)
        except NUMERICAL_FAILURES:
            return        # a singular stiffness (a free rotor): every amount solved in full
        static = np.reshape(static, loads.shape)
        if np.all(np.isfinite(static)):
            self.solver = ProjectedSolver(np.hstack([ends[0].vectors, ends[1].vectors, static]))

    def verify(self, q):
        """Check the projected modes at ``q`` against a full solve: every full-model mode
        must have a projected one within :data:`PROJECTION_MATCH` (a mode the basis lacks
        would be off by far more).  On a miss the projection is dropped and every amount
        is solved in full.  True when the projection stands (or was not used)."""
        if self.solver is None:
            return True
        _, projected = self.modes(q)
        full = modes_at(with_sources(self.bare, applied_sources(self.shares, q)),
                        self.speed, self.mode_count)
        gap = np.abs(full.eigenvalues[:, None] - projected.eigenvalues[None, :]).min(axis=1) \
            if len(projected.eigenvalues) else np.full(len(full.eigenvalues), np.inf)
        if len(full.eigenvalues) == len(projected.eigenvalues) and np.all(
                gap <= PROJECTION_MATCH * np.abs(full.eigenvalues)):
            return True
        self.solver, self.solved = None, {}
        return False

    def modes(self, q):
        """(system, modes) with ``q`` (N/m) applied, each amount solved once."""
        if q not in self.solved:
            system = with_sources(self.bare, applied_sources(self.shares, q))
            self.solved[q] = (system, modes_at(system, self.speed, self.mode_count,
                                               self.solver))
        return self.solved[q]

    def __call__(self, q, reference=None):
        """(log dec, frequency rad/s, shape) of the judged mode with ``q`` (N/m) applied."""
        system, modes = self.modes(q)
        if reference is None:
            j = _first_forward(modes)
            if j is None:
                raise _no_forward_mode()
            # as at every later amount: of a mixed pair, the more forward mode is judged
            j = _nearest_forward(modes, modes.shapes[j])
        else:
            j = _nearest_forward(modes, reference)
        if not (self.own and system.whirl_dependent):
            return float(modes.log_dec[j]), float(modes.frequency[j]), modes.shapes[j]
        r = at_own_frequency(system, self.speed, modes.shapes[j], modes.frequency[j],
                             modes.log_dec[j], self.mode_count, value=modes.eigenvalues[j],
                             vector=modes.vectors[:, j])
        for note in own_frequency_notes(system, [(f"{q:.4g} N/m", r)], self.speed,
                                        "the first forward mode with q ="):
            if note not in self.notes:
                self.notes.append(note)
        return r.log_dec, r.frequency, r.shape


def _follow(judge, amounts):
    """Log decrement and frequency of the first forward mode at each amount, followed by
    shape from the previous amount; also the shapes (for refining between two steps)."""
    log_dec, freq, shapes = [], [], []
    reference = None
    for q in amounts:
        d, f, reference = judge(q, reference)
        log_dec.append(d)
        freq.append(f)
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
    expected_from = ("given to the screen" if expected is not None else
                     "set in [coupling_screen]" if criteria.expected is not None else
                     "the sum of the file's sources")
    expected = criteria.expected if expected is None else expected
    if placement not in PLACEMENTS:
        raise InputError("coupling_screen.placement", "is not a known placement",
                         value=placement, expected=" or ".join(PLACEMENTS), kind="choice")
    speed = rotor.operating.max_speed
    # the screen judges the first forward mode: ask for enough modes that one is among
    # them even when the file asks for few (a fuzz try with mode_count 3 found none)
    mode_count = max(rotor.settings.mode_count, SCREEN_MODES)
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
    judge = _Judge(bare, shares, speed, mode_count,
                   criteria.coefficients_at == "mode-frequency")
    judge.project(amounts[-1])
    while True:
        log_dec, freq, shapes = _follow(judge, amounts)
        threshold = _threshold(judge, amounts, log_dec, shapes, xtol_share * amounts[-1])
        # no mode missing from the basis: checked in full at the middle amount and at the
        # threshold (or the expected amount); a miss drops the basis and solves again
        checks = [amounts[len(amounts) // 2], expected if not threshold else threshold]
        if all(judge.verify(q) for q in checks):
            break
    notes = judge.notes + _synchronous_note(bare, criteria)
    solves = (judge.solver.describe() if judge.solver is not None else
              "every amount solved in full")
    return CouplingScreen(speed, float(expected), placement, shares, amounts, log_dec, freq,
                          threshold, criteria, tuple(notes), expected_from, solves)


def _threshold(judge, amounts, log_dec, shapes, xtol):
    if log_dec[0] <= 0:
        return 0.0          # no margin at all: undamped or unstable without cross-coupling
    crossing = np.nonzero((log_dec[:-1] > 0) & (log_dec[1:] <= 0))[0]
    if not len(crossing):
        return None
    k = int(crossing[0])
    ends = {amounts[k]: log_dec[k], amounts[k + 1]: log_dec[k + 1]}

    def judged(q):      # the bracket's ends as followed (their signs differ), the rest solved
        return ends[q] if q in ends else judge(q, shapes[k])[0]

    return float(brentq(judged, amounts[k], amounts[k + 1], xtol=xtol))


@dataclass(frozen=True)
class CouplingResult:
    """The screen and the check with every source applied: what ``check`` judges."""

    screen: CouplingScreen
    sources: SourcesCheck | None     # None when the rotor file has no sources

    @property
    def passed(self):
        return self.screen.verdict == Outcome.PASS and (self.sources is None
                                                        or self.sources.passed)

    def brief(self):
        """The outcome in a few words, for a table cell."""
        sc = self.screen
        ratio = "not reached" if sc.threshold is None else f"{sc.ratio:.2f} x"
        text = f"{sc.verdict}: log dec {sc.log_dec_expected:.3f}, threshold {ratio}"
        if self.sources is not None:
            text += f"; with sources {self.sources.verdict}"
        return text

    @property
    def notes(self):
        """The screen's and the check's notices, each once."""
        more = () if self.sources is None else self.sources.notes
        return tuple(dict.fromkeys(self.screen.notes + more))

    def to_dict(self):
        return {"screen": self.screen.to_dict(),
                "with_sources": None if self.sources is None else self.sources.to_dict(),
                "passed": self.passed, "rule": {"text": self.screen.criteria.describe(),
                                                "label": self.screen.criteria.label}}


def coupling_study(rotor, **screen_options):
    """:func:`cross_coupling_screen` and :func:`sources_check` together."""
    return CouplingResult(cross_coupling_screen(rotor, **screen_options),
                          sources_check(rotor) if rotor.sources else None)
