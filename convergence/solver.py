"""The one public entry point: solve x = g(x) by a named method, with live settings.

Like scipy.optimize: one function picks the method by name; every method returns the
same result object; failing to converge is a result, not an exception; exceptions are
for bad input only.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass, field

import numpy as np

from convergence.broyden import BroydenSteps
from convergence.diagnosis import TearDiagnosis, diagnose_tears
from convergence.errors import ConvergenceInputError
from convergence.fallback import Fallback
from convergence.history import ConvergenceHistory, Event, IterationRecord, QStats
from convergence.points import Evaluated, Step
from convergence.problem import FixedPointProblem, TearLayout
from convergence.settings import SettingsSnapshot, SolverSettings
from convergence.steps import BoundedWegstein, DirectSubstitution
from convergence.stopping import ErrorEstimator

METHODS: dict[str, str] = {
    "direct": "direct substitution",
    "wegstein": "bounded Wegstein",
    "broyden": "quasi-Newton (Broyden)",
}
_STEP_RULES = {
    "direct": DirectSubstitution,
    "wegstein": BoundedWegstein,
    "broyden": BroydenSteps,
}
STATUSES = ("converged", "not converged", "stopped", "diverging", "not finite")


@dataclass
class FixedPointResult:
    """Outcome of :func:`solve_fixed_point`, whatever the method.

    ``x`` is the last point at which g was evaluated and ``gx`` is g(x) there (for
    status ``"not finite"`` it holds the non-finite values g returned). ``evaluations``
    counts calls of g (flowsheet passes); ``iterations`` counts iterations (one
    evaluation each). ``largest_residual`` and ``largest_estimated_error`` are the
    largest scaled residual and estimated error (:mod:`convergence.stopping`) at ``x``.
    """

    converged: bool
    status: str
    message: str
    x: np.ndarray
    gx: np.ndarray
    iterations: int
    evaluations: int
    history: ConvergenceHistory
    diagnosis: dict[str, TearDiagnosis] = field(default_factory=dict)
    method: str = "wegstein"
    largest_residual: float = np.nan
    largest_estimated_error: float = np.nan

    @property
    def success(self) -> bool:
        """scipy's name for ``converged``."""
        return self.converged


class _DivergenceWatch:
    """Counts consecutive iterations whose residual, on the scale of the best iterate so
    far, exceeds ``divergence_factor`` times the best residual.

    Measuring on the best iterate's scale (not the current one) makes a run whose values
    grow without bound show a growing residual.
    """

    def __init__(self, layout: TearLayout) -> None:
        self.layout = layout
        self.best_residual = np.inf
        self.best_iteration = 0
        self.best_scale: np.ndarray | None = None
        self.strikes = 0

    def diverging(self, point: Evaluated, largest: float, settings: SettingsSnapshot) -> bool:
        """Update the best residual and the strikes; True once patience runs out."""
        if largest < self.best_residual:
            self.best_residual = largest
            self.best_iteration = point.iteration
            self.best_scale = point.scale
            self.strikes = 0
            return False
        residual_on_best_scale = float(np.max(np.abs(point.fx) / self.best_scale))
        if residual_on_best_scale > settings.divergence_factor * self.best_residual:
            self.strikes += 1
        else:
            self.strikes = 0
        return self.strikes >= settings.divergence_patience


def _mode_step_q(point: Evaluated, step: Step, part: slice) -> QStats | None:
    """The q of a dominant-mode step in a tear with one moving variable, the q of
    x_new = x + (1 - q) (g(x) - x); None for a tear with several (a coupled step has no
    one q: a variable already at its fixed point, g(x) = x, still moves).

    A variable moves where its last step was usable for a slope (``point.usable``), the
    test the mode rule itself counts moving variables by (:mod:`convergence.modes`).
    """
    moving = np.flatnonzero(point.usable[part])
    if moving.size != 1:
        return None
    i = part.start + int(moving[0])
    if point.fx[i] == 0.0:
        return None  # at its own fixed point already: the step moved the others
    q = 1.0 - float(step.x_new[i] - point.x[i]) / float(point.fx[i])
    return QStats(minimum=q, median=q, maximum=q, clipped_low=0, clipped_high=0, count=1)


def _q_stats(
    layout: TearLayout, point: Evaluated, step: Step | None, settings: SettingsSnapshot
) -> dict:
    """Per tear, statistics of the q of the step taken (None: no accelerated step).

    A tear that took a dominant-mode step gets the q that step amounts to, or None
    (:func:`_mode_step_q`): the Wegstein q the rule computed was replaced there, and
    plotting it would show a step not taken. That q is never counted as clipped: the
    bounds apply to Wegstein's q only.
    """
    if step is None or step.q is None:
        return dict.fromkeys(layout.tears)
    low = settings.q_min if step.q_low is None else step.q_low
    high = settings.q_max if step.q_high is None else step.q_high
    stats = QStats.per_tear(layout.tear_slices, step.q, step.q_raw, step.guarded, low, high)
    for tear in step.mode_tears:
        stats[tear] = _mode_step_q(point, step, layout.tear_slices[tear])
    return stats


def _q_bounds(step: Step | None) -> tuple[float, float] | None:
    """The widest bounds of a step with adaptively widened bounds, else None."""
    if step is None or step.q_low is None:
        return None
    return (float(step.q_low.min()), float(step.q_high.max()))


def _first_not_finite(values: np.ndarray) -> int | None:
    if np.isfinite(values).all():
        return None
    return int(np.flatnonzero(~np.isfinite(values))[0])


def _evaluated(
    layout: TearLayout,
    iteration: int,
    x: np.ndarray,
    gx: np.ndarray,
    x_previous: np.ndarray | None,
    gx_previous: np.ndarray | None,
) -> Evaluated:
    """The evaluated point with its scale and, after the first, its differences."""
    scale = layout.scale_of(x)
    point = Evaluated(iteration, x, gx, gx - x, scale)
    if x_previous is not None:
        point.step = x - x_previous
        point.g_step = gx - gx_previous
        point.usable = layout.usable_steps(point.step, scale)
    return point


class _Run:
    """One run of a step rule on a checked problem; produces the result."""

    def __init__(
        self,
        layout: TearLayout,
        method: str,
        settings: SolverSettings,
        callback: Callable[[IterationRecord], bool | None] | None,
    ) -> None:
        self.layout = layout
        self.method = method
        self.rule = _STEP_RULES[method](layout)
        self.settings = settings
        self.callback = callback
        self.history = ConvergenceHistory()
        self.watch = _DivergenceWatch(layout)
        self.fallback = Fallback()
        self.errors = ErrorEstimator(layout.tears)
        self.evaluations = 0

    def _event(self, iteration: int, kind: str, detail: str) -> None:
        self.history.events.append(Event(iteration, kind, detail))

    def _settings_for(self, iteration: int, previous: SettingsSnapshot | None) -> SettingsSnapshot:
        """The settings in force now; a new version is recorded as an event."""
        current = self.settings.snapshot()
        if previous is not None and current.version != previous.version:
            changes = current.differences(previous)
            detail = "; ".join(f"{name} {old!r} -> {new!r}" for name, (old, new) in changes.items())
            self._event(iteration, "settings changed", f"version {current.version}: {detail}")
        return current

    def _evaluate(self, x: np.ndarray) -> np.ndarray:
        """One flowsheet pass; g gets ``x`` read-only so it cannot alter the iterate."""
        x.setflags(write=False)
        gx = self.layout.checked_output(self.layout.g(x))
        self.evaluations += 1
        return gx

    def _slopes(self, point: Evaluated) -> dict[str, float | None]:
        if point.step is None:
            return dict.fromkeys(self.layout.tears)
        return self.layout.tear_slopes(point.step, point.g_step, point.scale, point.usable)

    def _record(
        self,
        point: Evaluated,
        largest_index: int,
        measures: tuple[np.ndarray, dict[str, float | None], dict[str, float]],
        step: Step | None,
        settings: SettingsSnapshot,
    ) -> IterationRecord:
        scaled, slopes, estimated_errors = measures
        return IterationRecord(
            iteration=point.iteration,
            evaluations=self.evaluations,
            residuals=self.layout.per_tear_max(scaled),
            q=_q_stats(self.layout, point, step, settings),
            settings_version=settings.version,
            settings=settings,
            slopes=slopes,
            step="none" if step is None else step.kind,
            worst_variable=self.layout.name_of(largest_index),
            estimated_errors=estimated_errors,
            q_bounds=_q_bounds(step),
            mode_tears=() if step is None else step.mode_tears,
        )

    def _finish(
        self,
        status: str,
        message: str,
        point: Evaluated,
        settings: SettingsSnapshot,
        largest: tuple[float, float] = (np.nan, np.nan),
    ) -> FixedPointResult:
        """Clear the stop request, record the end as an event, build the result."""
        self.settings.clear_stop()
        event_kind = "iteration limit" if status == "not converged" else status
        self._event(point.iteration, event_kind, message)
        return FixedPointResult(
            converged=status == "converged",
            status=status,
            message=message,
            x=np.array(point.x),
            gx=np.array(point.gx),
            iterations=point.iteration,
            evaluations=self.evaluations,
            history=self.history,
            diagnosis=diagnose_tears(self.history, settings, self.layout.tears, self.method),
            method=self.method,
            largest_residual=float(largest[0]),
            largest_estimated_error=float(largest[1]),
        )

    def execute(self) -> FixedPointResult:
        """Iterate until a stopping rule ends the run."""
        self.settings.clear_stop()  # a request left over from before this run began
        x, x_previous, gx_previous, settings = self.layout.x0.copy(), None, None, None
        iteration = 0
        while True:
            iteration += 1
            settings = self._settings_for(iteration, settings)
            gx = self._evaluate(x)
            point = _evaluated(self.layout, iteration, x, gx, x_previous, gx_previous)
            ending, step = self._iterate(point, settings)
            if ending is not None:
                status, message, largest = ending
                return self._finish(status, message, point, settings, largest)
            if step.kind == "fallback":
                self._event(iteration, "fallback", step.note)
                self.rule = DirectSubstitution(self.layout)
            elif step.note:
                self._event(iteration, "restart", step.note)
            if step.bounds_note:
                self._event(iteration, "settings changed", step.bounds_note)
            x_previous, gx_previous, x = x, gx, step.x_new

    def _iterate(
        self, point: Evaluated, settings: SettingsSnapshot
    ) -> tuple[tuple[str, str, tuple[float, float]] | None, Step | None]:
        """Test, step, record and call back for one evaluated point.

        Returns ``((status, message, (largest residual, largest estimated error)),
        None)`` when the run ends here, else ``(None, step)``.
        """
        bad = _first_not_finite(point.gx)
        if bad is not None:
            message = (
                f"g returned {point.gx[bad]} for {self.layout.describe(bad)} at iteration "
                f"{point.iteration}"
            )
            return ("not finite", message, (np.nan, np.nan)), None
        scaled = np.abs(point.fx) / point.scale
        worst = int(np.argmax(scaled))
        largest = float(scaled[worst])
        slopes = self._slopes(point)
        self.errors.observe(slopes)
        estimated_errors = self.errors.estimated_errors(self.layout.per_tear_max(scaled))
        largest_error = max(estimated_errors.values())
        measured = largest if settings.stop_on == "residual" else largest_error
        converged = measured <= settings.tolerance
        diverging = not converged and self.watch.diverging(point, largest, settings)
        step = None
        if not (converged or diverging or point.iteration >= settings.max_iterations):
            step = self._next_step(point, settings)
        self.fallback.observe(point, largest)
        record = self._record(point, worst, (scaled, slopes, estimated_errors), step, settings)
        self.history.records.append(record)
        stop_asked = self.callback is not None and self.callback(record) is True
        where = f"{largest:.3g} in {self.layout.describe(worst)}"
        if settings.stop_on == "estimated error":
            where += f", largest estimated error {largest_error:.3g}"
        figures = (largest, largest_error)
        if converged:
            return ("converged", self._converged_message(point, figures, settings), figures), None
        if diverging:
            message = (
                f"diverging: for {settings.divergence_patience} iterations the residual "
                f"stayed above {settings.divergence_factor:g} times the best seen "
                f"({self.watch.best_residual:.3g} at iteration {self.watch.best_iteration}); "
                f"largest scaled residual now {where}"
            )
            return ("diverging", message, figures), None
        if stop_asked or self.settings.stop_requested:
            by = "the callback" if stop_asked else "a stop request"
            message = (
                f"stopped by {by} at iteration {point.iteration}: largest scaled residual {where}"
            )
            return ("stopped", message, figures), None
        if step is None:
            message = (
                f"not converged after {point.iteration} iterations (the limit): largest "
                f"scaled residual {where} > tolerance {settings.tolerance:g}"
            )
            return ("not converged", message, figures), None
        bad = _first_not_finite(step.x_new)
        if bad is not None:
            message = (
                f"the {step.kind} step gave {step.x_new[bad]} for {self.layout.describe(bad)} "
                f"at iteration {point.iteration}"
            )
            return ("not finite", message, figures), None
        return None, step

    def _next_step(self, point: Evaluated, settings: SettingsSnapshot) -> Step:
        """The rule's step, or the fallback to the best point (:mod:`convergence.fallback`)."""
        if self.method != "direct":
            fallback = self.fallback.step(point, settings)
            if fallback is not None:
                step, note = fallback
                step.note = note
                return step
        return self.rule.next_point(point, settings)

    def _converged_message(
        self, point: Evaluated, figures: tuple[float, float], settings: SettingsSnapshot
    ) -> str:
        largest, largest_error = figures
        head = f"converged in {point.iteration} iterations ({self.evaluations} evaluations of g): "
        if settings.stop_on == "residual":
            return head + (
                f"largest scaled residual {largest:.3g} <= tolerance {settings.tolerance:g}"
            )
        return head + (
            f"largest estimated error {largest_error:.3g} <= tolerance "
            f"{settings.tolerance:g} (largest scaled residual {largest:.3g})"
        )


def solve_fixed_point(
    problem: FixedPointProblem,
    method: str = "wegstein",
    settings: SolverSettings | None = None,
    callback: Callable[[IterationRecord], bool | None] | None = None,
) -> FixedPointResult:
    """Solve x = g(x) by direct substitution, bounded Wegstein or quasi-Newton (Broyden).

    Each iteration evaluates g once at the current iterate, records the per-tear scaled
    residuals and estimated errors, checks the stopping rules (``settings.stop_on``: by
    default the estimated error residual / |1 - slope| must reach the tolerance, see
    :mod:`convergence.stopping`), and takes a step by the chosen method. The
    settings are read afresh (as a frozen snapshot) at the start of every iteration, so
    a change made from another thread or from the callback takes effect at the next
    iteration and is recorded as an event. A stop request (``settings.request_stop()``
    from any thread, or the callback returning True) ends the run after the evaluation
    in progress; the run clears the request when it ends.

    Parameters
    ----------
    problem
        g, start vector, tear slices, absolute floors, variable names.
    method
        A key of :data:`METHODS`: ``"direct"``, ``"wegstein"`` or ``"broyden"``.
    settings
        Live settings; default: a fresh :class:`SolverSettings`.
    callback
        Called with every :class:`IterationRecord`, from the calling thread; returning
        True stops the run.

    Returns
    -------
    FixedPointResult
        ``status`` is ``"converged"``, ``"not converged"`` (iteration limit),
        ``"stopped"``, ``"diverging"`` or ``"not finite"``.

    Raises
    ------
    ConvergenceInputError
        Unknown method, slices not covering the vector once, g returning a vector of the
        wrong shape, and other bad input.

    Examples
    --------
    A tear of two variables: a flow with slope 0.9 (slow, monotonic) and a
    temperature with slope -0.7 (oscillating).

    >>> import numpy as np
    >>> from convergence import FixedPointProblem, SolverSettings, solve_fixed_point
    >>> def flowsheet_pass(x):
    ...     return np.array([0.9 * x[0] + 10.0, -0.7 * x[1] + 680.0])
    >>> problem = FixedPointProblem(
    ...     g=flowsheet_pass, x0=np.array([1.0, 300.0]), tear_slices={"S7": slice(0, 2)},
    ...     variable_names=["S7 flow", "S7 T"])
    >>> settings = SolverSettings(q_min=-20.0, q_max=0.9, tolerance=1e-10)
    >>> result = solve_fixed_point(problem, "wegstein", settings)
    >>> result.status, result.iterations  # one direct step showed a contracting loop
    ('converged', 3)
    >>> np.round(result.x, 6)
    array([100., 400.])
    >>> result.diagnosis["S7"].pattern
    'monotonic'
    """
    if method not in METHODS:
        raise ConvergenceInputError("method", method, f"one of {list(METHODS)}")
    layout = TearLayout(problem)
    run = _Run(layout, method, settings if settings is not None else SolverSettings(), callback)
    return run.execute()
