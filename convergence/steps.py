"""The step rules: direct substitution and bounded Wegstein (Wegstein 1958, CACM 1(6)).

Each rule turns the evaluated point (x_k, g(x_k)) and the previous one into the next
iterate. All work is elementwise numpy on the whole vector: O(n) per iteration.
"""

from __future__ import annotations

import numpy as np

from convergence.adaptive import BoundsAdapter
from convergence.coupling import DominantSlopeQ
from convergence.modes import PARALLEL, DominantModes, cosine
from convergence.points import Evaluated, Step
from convergence.problem import TearLayout
from convergence.settings import SettingsSnapshot

#: The first step counts as contracting when it cut the largest scaled residual below
#: this fraction of the first (see :meth:`BoundedWegstein._early`). A rule of our own,
#: measured on tests/benchmarks/recycle_cases.py: the converging loops there halve it
#: (ratios 0.35 to 0.499), the fixed-purge loop whose direct substitution diverges cuts
#: it to 0.68 from its start and is wrecked by an early step; 1.0 lets that one in.
EARLY_CONTRACTION = 0.5


def accelerates(iteration: int, settings: SettingsSnapshot) -> bool:
    """True when ``iteration`` takes an accelerated step under ``settings``.

    Iterations 1..direct_steps are direct substitution; after that every
    ``acceleration_interval``-th iteration is accelerated, starting with the first.
    """
    after = iteration - settings.direct_steps - 1
    return after >= 0 and after % settings.acceleration_interval == 0


def takes_mode_steps(settings: SettingsSnapshot) -> bool:
    """Whether a Wegstein run may take dominant-mode steps (:mod:`convergence.modes`).

    Only with ``dominant_mode`` on and the run free to adapt: q in ``"bounded"`` mode,
    ``adaptive_bounds`` on, q_min < q_max and every iteration accelerated. Fixed bounds,
    a held q, the constant-q method and an acceleration interval are the user's
    deliberate choice of step, which a mode step would override.
    """
    return (
        settings.dominant_mode
        and settings.adaptive_bounds
        and settings.acceleration_interval == 1
        and settings.q_mode == "bounded"
        and settings.q_min < settings.q_max
    )


def wegstein_q(slope_numerator: np.ndarray, step: np.ndarray, usable: np.ndarray) -> np.ndarray:
    """Unclipped Wegstein q = s/(s-1) with s = Δg/Δx, and s = 0 (q = 0) where not usable.

    s = 1 exactly gives q = +inf, which the bounds clip to q_max.
    """
    slope = np.zeros_like(step)
    np.divide(slope_numerator, step, out=slope, where=usable)
    with np.errstate(divide="ignore", invalid="ignore"):
        return slope / (slope - 1.0)


class DirectSubstitution:
    """x_{k+1} = g(x_k)."""

    def __init__(self, layout: TearLayout) -> None:
        self.layout = layout

    def next_point(self, point: Evaluated, settings: SettingsSnapshot) -> Step:
        """Take the evaluated g(x_k) as the next iterate."""
        return Step(x_new=point.gx, kind="direct")


class BoundedWegstein:
    """Bounded Wegstein, per variable: x_{k+1} = q x_k + (1 - q) g(x_k), q in [q_min, q_max].

    The update is computed as ``x + (1 - q) * (g(x) - x)``, the same floating-point form
    as polykin's ``fixpoint_wegstein``. Guard: a variable whose step
    ``|x_k - x_{k-1}|`` is below ``STEP_GUARD`` times its scale gives no trustworthy
    slope; it takes s = 0, i.e. q = 0 (direct substitution) clipped into the bounds,
    which is safe whatever the last q was. In ``"held"`` mode q is estimated per
    variable at the first accelerated step (from the direct-substitution steps before
    it) and held; a change of bounds re-clips the held estimate. With
    ``dominant_slope`` (in ``"bounded"`` mode; a held q stays each variable's own) a
    variable whose own slope is not steady takes q from its tear's dominant slope
    (:mod:`convergence.coupling`); with ``adaptive_bounds`` a
    :class:`~convergence.adaptive.BoundsAdapter` may widen a variable's bounds for the
    rest of the run. Both learn from direct-substitution steps too.
    """

    def __init__(self, layout: TearLayout) -> None:
        self.layout = layout
        self.held_q_raw: np.ndarray | None = None
        self.held_guarded: np.ndarray | None = None
        self.adapter = BoundsAdapter(layout.size)
        self.coupling = DominantSlopeQ(layout)
        self.modes = DominantModes(layout)
        self.first_residual = np.inf
        self.first_scaled = np.zeros(layout.size)

    def _early(self, point: Evaluated, settings: SettingsSnapshot) -> bool:
        """Accelerate one iteration early: the first step already contracted.

        With ``early_acceleration`` and two direct steps, iteration 2 is accelerated when
        its largest scaled residual is below :data:`EARLY_CONTRACTION` times the first's:
        a loop that the first direct step brought much closer to its fixed point has
        slopes that one step already measures. It is also accelerated when the second
        residual is parallel to the first (scaled cosine above
        :data:`~convergence.modes.PARALLEL`): the first step's g change lay along the step,
        so the step is a mode of the map and one step measures its eigenvalue (every
        one-variable loop, the energy recycles and oscillating ethylene loops of
        tests/benchmarks/recycle_cases.py; the fixed-purge loop whose direct
        substitution diverges has cosine 0.95 and keeps both). A loop whose first step
        contracted less and was not along a mode keeps both direct steps, so that the
        second slope estimate confirms the first.
        """
        if not (settings.early_acceleration and settings.direct_steps == 2):
            return False
        if point.iteration != 2:
            return False
        scaled = point.fx / point.scale
        largest = float(np.max(np.abs(scaled)))
        if largest < EARLY_CONTRACTION * self.first_residual:
            return True
        return cosine(scaled, self.first_scaled) > PARALLEL

    def next_point(self, point: Evaluated, settings: SettingsSnapshot) -> Step:
        """Direct substitution or an accelerated step, as the settings say."""
        if settings.q_mode != "held":
            self.held_q_raw = None
        if point.step is None:
            self.first_scaled = point.fx / point.scale
            self.first_residual = float(np.max(np.abs(self.first_scaled)))
            return Step(x_new=point.gx, kind="direct")
        use_dominant = settings.dominant_slope and settings.q_mode == "bounded"
        latest_q = self.coupling.q(point, self._latest_q(point), use_dominant)
        if not (accelerates(point.iteration, settings) or self._early(point, settings)):
            self.adapter.observe(latest_q, point.fx, point.scale)
            self.modes.improve(point, point.gx, allowed=False)
            return Step(x_new=point.gx, kind="direct")
        if settings.q_mode == "held" and self.held_q_raw is not None:
            q_raw, guarded = self.held_q_raw, self.held_guarded
        else:
            q_raw, guarded = latest_q, ~point.usable
            if settings.q_mode == "held":
                self.held_q_raw, self.held_guarded = q_raw, guarded
        low, high, bounds_note = self.adapter.bounds(
            q_raw, guarded, settings, point.fx, point.scale
        )
        if self.adapter.widened:
            q = np.clip(q_raw, low, high)
        else:
            low = high = None
            q = np.clip(q_raw, settings.q_min, settings.q_max)
        x_new = point.x + (1.0 - q) * point.fx
        x_new, moved = self.modes.improve(point, x_new, takes_mode_steps(settings))
        return Step(
            x_new=x_new,
            kind="dominant mode" if moved else "accelerated",
            q=q,
            q_raw=q_raw,
            guarded=guarded,
            bounds_note=bounds_note,
            q_low=None if low is None else low.copy(),
            q_high=None if high is None else high.copy(),
            mode_tears=tuple(moved),
        )

    def _latest_q(self, point: Evaluated) -> np.ndarray:
        return wegstein_q(point.g_step, point.step, point.usable)
