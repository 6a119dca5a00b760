"""Safeguard: an accelerated run that runs away goes back to its best point.

Wegstein's per-variable q (Wegstein 1958) and Broyden's update (Broyden 1965) can
diverge on a map whose direct substitution converges: with coupled variables the
per-variable slopes are not the map's eigenvalues, and a q taken from them can amplify
a mode that direct substitution damps. Random affine maps of spectral radius below 1
show it (tests/convergence/test_fallback.py). The safeguard watches the largest scaled
residual on the scale of the best iterate so far: once it exceeds ``fallback_factor``
times the best at two iterations in a row (one spike, which an accelerated run on a
coupled loop such as a flash drum's recovers from at the next step, is not a runaway),
the next iterate is g(x_best), which is already known (no extra
evaluation), and the run takes direct-substitution steps from there to its end. Where
direct substitution converges, the run then converges; where it does not, the
divergence watch reports it as before. A run whose best residual has not improved for
:data:`STALL_ITERATIONS` iterations (an accelerated run circling without growing) falls
back the same way.
"""

from __future__ import annotations

import numpy as np

from convergence.points import Evaluated, Step
from convergence.settings import SettingsSnapshot

#: Iterations without a new best residual after which an accelerated run falls back.
STALL_ITERATIONS = 20


class Fallback:
    """Best point of a run and the decision to fall back to it."""

    def __init__(self) -> None:
        self.best: Evaluated | None = None
        self.best_residual = np.inf
        self.taken_at: int | None = None
        self.above = 0  # consecutive iterations above fallback_factor times the best

    def observe(self, point: Evaluated, largest: float) -> None:
        """Remember ``point`` if its largest scaled residual is the best so far."""
        if largest < self.best_residual:
            self.best, self.best_residual = point, largest

    def step(self, point: Evaluated, settings: SettingsSnapshot) -> tuple[Step, str] | None:
        """The fallback step and its event text, or None while the run keeps its rule."""
        if not settings.fallback or self.taken_at is not None or self.best is None:
            return None
        growth = float(np.max(np.abs(point.fx) / self.best.scale)) / self.best_residual
        stalled = point.iteration - self.best.iteration >= STALL_ITERATIONS
        self.above = self.above + 1 if growth > settings.fallback_factor else 0
        if self.above >= 2:
            why = (
                f"residual {growth:.3g} times the best seen (above fallback_factor "
                f"{settings.fallback_factor:g} for 2 iterations)"
            )
        elif stalled:
            why = f"no better residual for {STALL_ITERATIONS} iterations"
        else:
            return None
        self.taken_at = point.iteration
        note = (
            f"{why}: direct substitution from the best point (iteration "
            f"{self.best.iteration}) for the rest of the run"
        )
        return Step(x_new=self.best.gx, kind="fallback"), note
