"""One vocabulary: the fixed words results use, and the spellings that were renamed.

The words a result can take (whirl, verdict, side, bearing role) are enums
whose members *are* their text: ``Whirl.FORWARD == "forward"``, they print,
format and hash as that text and JSON writes it, so scripts that compare
with strings keep working while code gets a closed set of names.

Renamed spellings (rotor-file keys, command-line options, Python keywords)
are read for one more version with a :class:`RenamedWarning` that names the
new spelling; ``docs/usage.md`` lists them all.
"""

from __future__ import annotations

import warnings
from enum import Enum

#: The caution every verdict and screening document carries (one text for every layer).
CAUTION = ("Screening result only: confirm against the applicable standard, the purchase "
           "specification, local codes and a licensed engineer's review.")

#: The version in which the old spellings stop being read.
OLD_SPELLINGS_UNTIL = "0.3"


class Word(str, Enum):
    """A fixed word: a str that belongs to a closed set."""

    def __str__(self):
        return self.value

    def __format__(self, spec):
        return format(self.value, spec)

    __hash__ = str.__hash__

    def __repr__(self):
        return repr(self.value)


class Whirl(Word):
    """Dominant whirl of a mode (forward share above 0.75 or below 0.25; docs/theory.md)."""

    FORWARD = "forward"
    BACKWARD = "backward"
    MIXED = "mixed"


class Side(Word):
    """Where a critical speed lies against the operating range."""

    BELOW = "below"
    ABOVE = "above"
    INSIDE = "inside"


class Verdict(Word):
    """Verdict on one critical speed's separation margin (docs/theory.md, section 5)."""

    PASS = "pass"
    FAIL = "fail"
    CRITICALLY_DAMPED = "critically damped"
    NOT_JUDGED = "not judged"
    NO_PEAK = "no peak"
    NOT_REACHED = "not reached"
    OVERDAMPED = "overdamped"


class Outcome(Word):
    """The verdict of a whole check: every item met, one failed, or not all covered."""

    PASS = "pass"
    FAIL = "fail"
    INCOMPLETE = "incomplete"
    NO_STEADY_STATE = "no steady state"


class StabilityVerdict(Word):
    """Verdict on one branch's damping up to trip (docs/theory.md, section 6)."""

    STABLE = "stable"
    UNSTABLE = "unstable"
    MARGINAL = "marginal"
    BELOW_MINIMUM = "below minimum"
    NOT_JUDGED = "not judged"
    ABSENT = "absent"


class BearingRole(Word):
    """What a bearing entry is: a support that carries the rotor, or a seal (no load, no
    bearing curve on the map, not scaled by the stiffness window)."""

    BEARING = "bearing"
    SEAL = "seal"
    #: A destabilising source (gas forces at an impeller, a seal given as cross-coupling):
    #: kept apart from the bearings (``Rotor.sources``), never a support.
    SOURCE = "source"


class RenamedWarning(FutureWarning):
    """An old spelling was read; it still works in this version."""


def renamed(old: str, new: str, where: str = ""):
    """Warn that ``old`` is read as ``new`` (once per call site and text)."""
    warnings.warn(renamed_text(old, new, where), RenamedWarning, stacklevel=3)


def renamed_text(old: str, new: str, where: str = "") -> str:
    place = f"{where}: " if where else ""
    return (f"{place}{old} is the old spelling of {new}; it is read until version "
            f"{OLD_SPELLINGS_UNTIL}, write {new}")


#: Command-line options renamed in 0.2, per command: old spelling -> new.
RENAMED_OPTIONS = {
    "criticals": {"--map": "--plot", "--points": "--speed-count", "--to": "--speed-to",
                  "--rule": "--margin-rule", "--below": "--margin-below",
                  "--above": "--margin-above", "--stability": "--stability-rule"},
    "check": {"--map": "--plot", "--points": "--speed-count", "--to": "--speed-to", "--rule": "--margin-rule",
              "--below": "--margin-below", "--above": "--margin-above",
              "--stability": "--stability-rule"},
    "sweep": {"--map": "--plot", "--points": "--speed-count", "--to": "--speed-to"},
    "modes": {"--count": "--mode-count", "-n": "--mode-count", "--shape": "--plot-mode"},
    "layout": {"--out": "--plot"},
    "response": {"--case": "--unbalance", "-c": "--unbalance", "--bode": "--plot-bode",
                 "--polar": "--plot-polar", "--orbits": "--plot-orbits",
                 "--at": "--orbit-speeds"},
    "stiffness-map": {"--from": "--stiffness-from", "--to": "--stiffness-to",
                      "--points": "--stiffness-count", "--modes": "--mode-count",
                      "--curves-to": "--curve-speed-to", "--shapes": "--shapes-at",
                      "--shapes-plot": "--plot-shapes"},
    "compare": {"--points": "--speed-count"},
    "window": {"--from": "--factor-from", "--to": "--factor-to", "--factors": "--factor-count",
               "--points": "--speed-count"},
    "levers": {"--points": "--speed-count", "--step": "--relative-step",
               "--near": "--near-fraction"},
}

#: Rotor-file keys renamed in 0.2: (table, old key) -> new key.
RENAMED_KEYS = {("analysis", "modes"): "mode_count", ("bearing", "kind"): "role"}


def rename_options(command: str, args: list[str], notify) -> list[str]:
    """The arguments with the old option spellings of ``command`` replaced by the new ones;
    ``notify(text)`` is called once per old spelling met.  Tokens after ``--`` are left
    alone."""
    table = RENAMED_OPTIONS.get(command, {})
    out, done = [], False
    for token in args:
        if done or token == "--":
            done = True
            out.append(token)
            continue
        name, eq, value = token.partition("=")
        new = table.get(name) if token.startswith("-") else None
        if new is None:
            out.append(token)
            continue
        notify(renamed_text(name, new, f"rotorcalc {command}"))
        out.append(new + eq + value)
    return out


def old_keywords(**renames):
    """Accept old keyword spellings for one more version: ``@old_keywords(kind="role")`` on a
    function or a (frozen data)class renames ``kind=`` to ``role=`` with a
    :class:`RenamedWarning`; on a class the old attribute name also still reads."""
    import functools

    def rename(owner, kwargs):
        for old, new in renames.items():
            if old in kwargs:
                renamed(f"{owner}({old}=...)", f"{new}=")
                kwargs[new] = kwargs.pop(old)
        return kwargs

    def decorate(target):
        if isinstance(target, type):
            init = target.__init__

            @functools.wraps(init)
            def __init__(self, *args, **kwargs):
                init(self, *args, **rename(target.__name__, kwargs))
            target.__init__ = __init__
            for old, new in renames.items():
                setattr(target, old, property(
                    lambda self, old=old, new=new: _read_old(self, old, new),
                    doc=f"Old spelling of ``{new}`` (read until {OLD_SPELLINGS_UNTIL})."))
            return target

        @functools.wraps(target)
        def call(*args, **kwargs):
            return target(*args, **rename(target.__name__, kwargs))
        return call
    return decorate


def _read_old(obj, old, new):
    renamed(f"{type(obj).__name__}.{old}", f".{new}")
    return getattr(obj, new)
