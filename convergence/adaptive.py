"""Adaptive q bounds: a Wegstein run widens its own bounds where its slopes ask for it.

The tear diagnosis (:mod:`convergence.diagnosis`) tells the user which q bound stops
Wegstein's q = s/(s - 1) and suggests wider bounds; this does the same during the run,
per variable. A variable's bounds are widened when its q lies outside them and the
previous slope estimate gave nearly the same q (within :data:`AGREEMENT`): a slope that
holds still over two steps is the slope of the map, not noise of a nonlinear start.
The new bound is :func:`convergence.diagnosis.suggested_bounds` of that q (the blocking
bound moved past q by a margin), kept within [:data:`Q_MIN_LIMIT`, :data:`Q_MAX_LIMIT`].
A q above 1 (a slope above 1, a step against g) is granted only while the run drifts
away from the best point it has seen (:data:`DRIFT_RATIO`): in a chain of loops still
filling up, inflows rising from upstream look like slopes above 1, and extrapolating
against them wrecks the run.

Only the variables that asked get wider bounds; the others keep the settings' bounds.
The widening lasts for the run: the settings object is not changed (a solve must not
edit the case's settings), each widening is reported as a note that the run records
as a "settings changed" event, and a change of q_min or q_max made by the user during
the run replaces every widening. Equal bounds (the constant-q method) are the user's
deliberate choice and are never widened.
"""

from __future__ import annotations

from collections import deque

import numpy as np

from convergence.diagnosis import suggested_bounds
from convergence.settings import SettingsSnapshot

#: Largest relative change of a variable's q between two slope estimates for it to count
#: as steady.
AGREEMENT = 0.2
#: q above 1 (a slope above 1: stepping against g) is let through only while the run
#: drifts away: its largest scaled residual has stayed above this multiple of the best
#: it has had for the last two iterations. A converging run never needs it, and in a
#: chain of loops still filling up, inflows rising from upstream look like slopes above
#: 1 (our generated chains of 10 to 100 loops diverge when those are granted).
DRIFT_RATIO = 1.25
#: Widest bounds adaptation may reach (q = -2000 is a slope of 0.9995: a single loop
#: recycling 99.9 % wants q = -999; q = 20 a slope of 1.05).
Q_MIN_LIMIT = -2000.0
Q_MAX_LIMIT = 20.0


def steady(q_raw: np.ndarray, previous: np.ndarray) -> np.ndarray:
    """Variables whose q changed by at most :data:`AGREEMENT` of itself since ``previous``."""
    with np.errstate(invalid="ignore"):
        return (
            np.isfinite(q_raw)
            & np.isfinite(previous)
            & (np.abs(q_raw - previous) <= AGREEMENT * np.abs(q_raw))
        )


class BoundsAdapter:
    """Per-variable q bounds of one run, widened from steady slope estimates.

    Parameters
    ----------
    size
        Number of variables.
    """

    def __init__(self, size: int) -> None:
        self.size = size
        self.previous_q_raw: np.ndarray | None = None
        self.user_bounds: tuple[float, float] | None = None
        self.low = np.empty(0)
        self.high = np.empty(0)
        self.residuals: deque[float] = deque(maxlen=2)
        self.best_residual = np.inf

    @property
    def widened(self) -> bool:
        """True when some variable's bounds are wider than the settings'."""
        if self.user_bounds is None:
            return False
        q_min, q_max = self.user_bounds
        return bool(np.any(self.low < q_min) or np.any(self.high > q_max))

    def _follow_user(self, settings: SettingsSnapshot) -> None:
        bounds = (settings.q_min, settings.q_max)
        if bounds != self.user_bounds:
            self.user_bounds = bounds
            self.low = np.full(self.size, settings.q_min)
            self.high = np.full(self.size, settings.q_max)

    def observe(self, q_raw: np.ndarray, residual: np.ndarray, scale: np.ndarray) -> None:
        """Remember the q and the residual g(x) - x (with its scale) of an iteration that
        took no accelerated step (a direct-substitution step still gives a slope), so
        that the first accelerated step can already adapt."""
        self.previous_q_raw = q_raw
        self._watch(residual, scale)

    def _watch(self, residual: np.ndarray, scale: np.ndarray) -> None:
        largest = float(np.max(np.abs(residual) / scale))
        self.best_residual = min(self.best_residual, largest)
        self.residuals.append(largest)

    @property
    def drifting(self) -> bool:
        """The run's last two largest scaled residuals exceed :data:`DRIFT_RATIO` times
        the best it has had."""
        return len(self.residuals) == 2 and min(self.residuals) > DRIFT_RATIO * self.best_residual

    def _widen_low(
        self, q_raw: np.ndarray, asking: np.ndarray, settings: SettingsSnapshot
    ) -> str | None:
        """Move q_min of the asking variables whose q lies below it; say so."""
        below = asking & (q_raw < self.low)
        if not below.any():
            return None
        wanted = float(q_raw[below].min())
        new_low = max(suggested_bounds(wanted, settings.q_min, settings.q_max)[0], Q_MIN_LIMIT)
        widened = below & (self.low > new_low)
        if not widened.any():
            return None
        self.low[widened] = new_low
        return (
            f"q_min {settings.q_min:g} -> {new_low:g} for {int(widened.sum())} "
            f"variable(s) whose steady slope wants q down to {wanted:.3g}"
        )

    def _widen_high(
        self, q_raw: np.ndarray, asking: np.ndarray, settings: SettingsSnapshot
    ) -> str | None:
        """Move q_max of the asking variables whose q lies above it; say so."""
        above = asking & (q_raw > self.high)
        if not above.any():
            return None
        wanted = float(q_raw[above].max())
        new_high = min(suggested_bounds(wanted, settings.q_min, settings.q_max)[1], Q_MAX_LIMIT)
        widened = above & (self.high < new_high)
        if not widened.any():
            return None
        self.high[widened] = new_high
        return (
            f"q_max {settings.q_max:g} -> {new_high:g} for {int(widened.sum())} "
            f"variable(s) whose steady slope wants q up to {wanted:.3g}"
        )

    def bounds(
        self,
        q_raw: np.ndarray,
        excluded: np.ndarray,
        settings: SettingsSnapshot,
        residual: np.ndarray,
        scale: np.ndarray,
    ) -> tuple[np.ndarray, np.ndarray, str | None]:
        """Per-variable (low, high) bounds for this step, and a note if they widened.

        ``q_raw`` is this step's unclipped q per variable; ``excluded`` marks variables
        that may not ask (no usable slope); ``residual`` is g(x) - x at this iteration and
        ``scale`` its residual scale.
        """
        self._follow_user(settings)
        self._watch(residual, scale)
        previous, self.previous_q_raw = self.previous_q_raw, q_raw
        if not settings.adaptive_bounds or settings.q_min == settings.q_max:
            self.user_bounds = None  # switched off: back to the settings' bounds
            self._follow_user(settings)
            return self.low, self.high, None
        if previous is None:
            return self.low, self.high, None
        asking = ~excluded & steady(q_raw, previous)
        if not self.drifting:
            asking &= q_raw < 1.0
        notes = [
            note
            for note in (
                self._widen_low(q_raw, asking, settings),
                self._widen_high(q_raw, asking, settings),
            )
            if note
        ]
        note = "adaptive bounds: " + "; ".join(notes) if notes else None
        return self.low, self.high, note
