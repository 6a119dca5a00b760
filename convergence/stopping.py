"""The stopping measure: the scaled residual, or the error it implies through the slope.

For an affine map g(x) = s x + c the fixed point is x* = c / (1 - s), so from any x

    x* - x = (g(x) - x) / (1 - s)

exactly (Wegstein 1958, CACM 1(6): the same secant extrapolation as his method). With a
slope near 1 the residual |g(x) - x| therefore understates the distance to the fixed
point by 1/(1 - s): at s = 0.98 a residual of 1e-8 leaves an error of 5e-7. The
estimated error of a tear is its largest scaled residual divided by |1 - s|, with s the
median of the tear's last few dominant-slope estimates; it is never taken below the
residual itself, so that an oscillating tear (s < 0, where the residual overstates the
error) is held to the residual rule.
"""

from __future__ import annotations

import math
from collections import deque

import numpy as np

#: Slope estimates (per tear, most recent first) whose median gives s.
SLOPE_MEMORY = 3
#: Largest factor 1/|1 - s| applied; slopes within 1e-4 of 1 are taken as 1 +- 1e-4.
LARGEST_FACTOR = 1e4


class ErrorEstimator:
    """Per-tear estimated errors from the scaled residuals and the recent slopes.

    Parameters
    ----------
    tears
        Tear names, in order.
    """

    def __init__(self, tears: list[str]) -> None:
        self._slopes = {tear: deque(maxlen=SLOPE_MEMORY) for tear in tears}

    def observe(self, slopes: dict[str, float | None]) -> None:
        """Remember this iteration's dominant slope estimates (None: none this time)."""
        for tear, slope in slopes.items():
            if slope is not None and math.isfinite(slope):
                self._slopes[tear].append(slope)

    def slope(self, tear: str) -> float:
        """Median of the tear's last few slope estimates; nan if there are none."""
        known = self._slopes[tear]
        return float(np.median(known)) if known else math.nan

    def factor(self, tear: str) -> float:
        """1/|1 - s|, at least 1 and at most :data:`LARGEST_FACTOR` (1 without a slope)."""
        slope = self.slope(tear)
        if not math.isfinite(slope):
            return 1.0
        return min(max(1.0, 1.0 / max(abs(1.0 - slope), 1.0 / LARGEST_FACTOR)), LARGEST_FACTOR)

    def estimated_errors(self, residuals: dict[str, float]) -> dict[str, float]:
        """Per tear: largest scaled residual times :meth:`factor`."""
        return {tear: residual * self.factor(tear) for tear, residual in residuals.items()}
