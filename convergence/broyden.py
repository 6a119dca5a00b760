"""Quasi-Newton steps on F(x) = g(x) - x: Broyden's "good" method, limited memory.

Broyden (1965, Math. Comp. 19) updates an estimate H of the inverse Jacobian of F after
every step s with residual change y:

    H+ = H + (s - H y) (s^T H) / (s^T H y)

Starting from H0 = -I, the first step is direct substitution. H is kept as -I plus a
sum of rank-one terms (u v^T), so each iteration costs O(m n) for m stored terms, never
an n x n matrix. The variables are scaled by a fixed per-variable scale taken at the
first evaluation (max of |x0|, |g(x0)| and the absolute floor), so that flows,
temperatures and pressures weigh alike. No line search: the full step is taken, with a
fallback that resets H to -I (a direct-substitution step) when the scaled residual more
than doubles, when the update is degenerate, or when the memory is full.
"""

from __future__ import annotations

import numpy as np

from convergence.points import Evaluated, Step
from convergence.problem import FRACTION_TO_BOUND, TearLayout
from convergence.settings import SettingsSnapshot

MEMORY = 30
GROWTH_LIMIT = 2.0
DEGENERATE = 1e-12


class BroydenSteps:
    """Limited-memory good Broyden on the scaled residual F(x) = g(x) - x."""

    def __init__(self, layout: TearLayout) -> None:
        self.layout = layout
        self.scale: np.ndarray | None = None
        self.u_terms: list[np.ndarray] = []
        self.v_terms: list[np.ndarray] = []
        self.f_previous: np.ndarray | None = None

    def _times_h(self, vector: np.ndarray) -> np.ndarray:
        result = -vector
        for u_term, v_term in zip(self.u_terms, self.v_terms, strict=True):
            result += u_term * float(v_term @ vector)
        return result

    def _h_transposed_times(self, vector: np.ndarray) -> np.ndarray:
        result = -vector
        for u_term, v_term in zip(self.u_terms, self.v_terms, strict=True):
            result += v_term * float(u_term @ vector)
        return result

    def _reset(self) -> None:
        self.u_terms.clear()
        self.v_terms.clear()

    def _update(self, step: np.ndarray, change: np.ndarray) -> str | None:
        """Add the rank-one term for scaled step ``step`` and residual change ``change``."""
        note = None
        if len(self.u_terms) >= MEMORY:
            self._reset()
            note = f"Broyden memory of {MEMORY} updates full: restarted from H = -I"
        h_change = self._times_h(change)
        denominator = float(step @ h_change)
        size = float(np.linalg.norm(step) * np.linalg.norm(h_change))
        if size == 0.0 or abs(denominator) <= DEGENERATE * size:
            self._reset()
            return "Broyden update degenerate: restarted from direct substitution"
        v_term = self._h_transposed_times(step)
        self.u_terms.append((step - h_change) / denominator)
        self.v_terms.append(v_term)
        return note

    def next_point(self, point: Evaluated, settings: SettingsSnapshot) -> Step:
        """Quasi-Newton step x + scale * (-H F), after updating H with the last step."""
        if self.scale is None:
            self.scale = np.maximum(
                np.maximum(np.abs(point.x), np.abs(point.gx)), self.layout.abs_floor
            )
        residual = point.fx / self.scale
        note = None
        if self.f_previous is not None and point.step is not None:
            previous_norm = float(np.max(np.abs(self.f_previous)))
            if float(np.max(np.abs(residual))) > GROWTH_LIMIT * previous_norm:
                self._reset()
                note = "residual more than doubled: Broyden restarted from direct substitution"
            else:
                step = point.step / self.scale
                note = self._update(step, residual - self.f_previous)
        self.f_previous = residual
        step = -self._times_h(residual) * self.scale
        share = self._share_within_bounds(point.x, step)
        if share < 1.0:
            shortened = f"quasi-Newton step shortened to {share:.3g} of its length at a lower bound"
            note = shortened if note is None else f"{note}; {shortened}"
        return Step(x_new=point.x + share * step, kind="quasi-Newton", note=note)

    def _share_within_bounds(self, x: np.ndarray, step: np.ndarray) -> float:
        """Largest share (at most 1) of ``step`` that keeps every variable above the
        bound it lies above, within ``FRACTION_TO_BOUND`` of the distance to it."""
        bound = self.layout.lower_bound
        if bound is None:
            return 1.0
        room = x - bound
        crossing = (
            (step < 0.0) & (room > 0.0) & (x + step <= bound + (1.0 - FRACTION_TO_BOUND) * room)
        )
        if not crossing.any():
            return 1.0
        return float(np.min(FRACTION_TO_BOUND * room[crossing] / -step[crossing]))
