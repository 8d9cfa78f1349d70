"""Phase of a response for drawing: the lag behind the once-per-turn mark, the curve
broken where the lag wraps past 360 degrees, and values between sweep speeds.

The lag itself is the analysis' own (:func:`rotorcalc.analysis.response.phase_lag`):
``x(t) = Re(X e^{iwt})`` lags the mark by ``-arg X``, in degrees from 0 to 360.
"""

from __future__ import annotations

import math

import numpy as np

from ..analysis.response import phase_lag

__all__ = ["phase_lag", "lag_of", "lag_radians", "break_wraps", "value_at"]


def lag_of(value):
    """The lag (degrees) of one complex value, as a float."""
    return float(phase_lag(np.array([value]))[0])


def lag_radians(value):
    """The lag of one complex value in radians: the angle on a polar plot."""
    return math.radians(lag_of(value))


def break_wraps(x, lag):
    """Insert a gap where the lag jumps across 0/360, so no line crosses the axes."""
    if len(lag) < 2:
        return x, lag
    jumps = np.nonzero(np.abs(np.diff(lag)) > 180.0)[0]
    if not jumps.size:
        return x, lag
    x = np.insert(np.asarray(x, dtype=float), jumps + 1, np.nan)
    lag = np.insert(np.asarray(lag, dtype=float), jumps + 1, np.nan)
    return x, lag


def value_at(speeds, values, omega):
    """Complex value between sweep points (real and imaginary parts interpolated), for
    placing a marker on the drawn curve."""
    return complex(np.interp(omega, speeds, values.real)
                   + 1j * np.interp(omega, speeds, values.imag))
