"""Analyses: pure functions from a rotor (or its matrices) to result objects."""

from .modes import Modes, modes_at
from .sweep import Sweep, sweep
from .criticals import CriticalSpeed, critical_speeds
from .margins import MarginRow, MarginTable, required_margin, separation_margins
from .screening import CoverageGap, Screening, screen
from .stability import Stability, stability

__all__ = ["Modes", "modes_at", "Sweep", "sweep", "CriticalSpeed", "critical_speeds",
           "MarginRow", "MarginTable", "required_margin", "separation_margins",
           "Screening", "screen", "CoverageGap", "Stability", "stability"]
