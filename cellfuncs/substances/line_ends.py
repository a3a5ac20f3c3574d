"""Where a line ends, as people type it: the tolerances that put a typed value on a line or its end.

>>> onto_ends(np.array([216.590, 216.58, 250.0]), low=216.592).tolist()
[216.592, 216.58, 250.0]
"""

from __future__ import annotations

import numpy as np

LINE_TOL = 1e-9  # a state is on a line when |T - T_line(p)| <= LINE_TOL * T_line(p)
# A value rounded to the digits people type may land just past the end of a line (carbon dioxide's
# triple point, 216.592 K, typed as -56.56 degC is 2 mK below it); this close, it is the end itself.
TYPED_T = 0.005  # K: half the last digit of a temperature typed to two decimals (degC or K)
TYPED_P = 5e-4  # relative: half the last digit of a pressure typed to three or four significant digits


def clamp(x: np.ndarray, lo: float, hi: float) -> np.ndarray:
    """``x`` held within [lo, hi] (NaN stays NaN): np.clip's values without its cost per call, which
    outweighs the comparison itself on a single value."""
    if type(x) is np.float64:  # a single value: its own comparisons (NaN, compared first, stays NaN)
        return np.float64(min(max(x, lo), hi))
    return np.minimum(np.maximum(x, lo), hi)


def onto_ends(x: np.ndarray, low: float | None = None, high: float | None = None,
              relative: bool = False) -> np.ndarray:
    """``x`` with the values just below ``low`` or just above ``high`` (by TYPED_T, or TYPED_P relative)
    moved onto them: the ends that are fixed points people type (triple and critical points)."""
    x = np.asarray(x, float)
    if x.ndim == 0:  # a single value: plain floats, the cost of a cell
        v = float(x)
        if low is not None and (low * (1 - TYPED_P) if relative else low - TYPED_T) <= v < low:
            return np.array(low)
        if high is not None and high < v <= (high * (1 + TYPED_P) if relative else high + TYPED_T):
            return np.array(high)
        return x
    if low is not None:
        below = low * (1 - TYPED_P) if relative else low - TYPED_T
        x = np.where((x < low) & (x >= below), low, x)
    if high is not None:
        above = high * (1 + TYPED_P) if relative else high + TYPED_T
        x = np.where((x > high) & (x <= above), high, x)
    return x
