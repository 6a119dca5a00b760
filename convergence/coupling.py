"""q from the tear's dominant slope for variables driven by the others in their tear.

Wegstein's q = s/(s - 1) per variable assumes that each variable follows its own slope
s_i = Δg_i/Δx_i. In a tear whose variables are strongly coupled (a component made from
another by reaction, a recycle whose total is set elsewhere) a variable's change is
driven by the others: its secant quotient changes from step to step and the q made from
it is wrong. The tear as a whole still has a dominant slope, the ratio
<Δg, Δx>/<Δx, Δx> of its scaled changes, which over direct-substitution steps tends to
the dominant eigenvalue of g's Jacobian on the tear - the quantity the dominant
eigenvalue method extrapolates with (Orbach & Crowe, Can. J. Chem. Eng. 49, 1971).

With ``dominant_slope`` on, a variable whose own q is steady (agrees with its previous
estimate, :func:`convergence.adaptive.steady`) keeps it; the others take q from their
tear's dominant slope. A decoupled variable keeps Wegstein's per-variable step exactly.
"""

from __future__ import annotations

import numpy as np

from convergence.adaptive import steady
from convergence.points import Evaluated
from convergence.problem import TearLayout


class DominantSlopeQ:
    """Per-variable q: its own where steady, else its tear's dominant-slope q.

    Parameters
    ----------
    layout
        The checked problem (tear slices, slopes).
    """

    def __init__(self, layout: TearLayout) -> None:
        self.layout = layout
        self.previous: np.ndarray | None = None

    def tear_q(self, point: Evaluated) -> np.ndarray:
        """q = s/(s - 1) of each variable's tear's dominant slope (nan where unknown)."""
        slopes = self.layout.tear_slopes(point.step, point.g_step, point.scale, point.usable)
        q = np.full(self.layout.size, np.nan)
        for tear, part in self.layout.tear_slices.items():
            slope = slopes[tear]
            if slope is not None and slope != 1.0:
                q[part] = slope / (slope - 1.0)
        return q

    def q(self, point: Evaluated, own_q: np.ndarray, use_dominant: bool) -> np.ndarray:
        """The q to use for this step; remembers ``own_q`` for the next steadiness test."""
        previous, self.previous = self.previous, own_q
        if not use_dominant or previous is None:
            return own_q
        dominant = self.tear_q(point)
        keep_own = steady(own_q, previous) | ~np.isfinite(dominant)
        return np.where(keep_own, own_q, dominant)
