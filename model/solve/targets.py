"""Targets met by an outer loop around the recycle solve.

:func:`solve_with_targets` adjusts each target's spec within its limits until its
measured result has the wanted value. Every evaluation of the outer loop is one
recycle solve (:func:`model.solve.driver.solve_flowsheet`) of a view of the flowsheet
with the adjusted numbers put in place (the document itself never changes), warm-started
from the tear states of the previous evaluation (and solved again from the cold start
when a warm-started solve does not converge).

- One target: Brent's bracketed root method (R. P. Brent, *Algorithms for Minimization
  without Derivatives*, 1973; ``scipy.optimize.brentq``) on the scaled residual
  ``r(x) = (measured(x) - wanted) / scale`` over [lower, upper]. The spec's current
  value and both limits are solved first: when r has the same sign at both limits, no
  value within the limits meets the target and it is reported "not reachable" with the
  measured value at each limit.
- Several targets: a quasi-Newton iteration on the residual vector (Broyden's update,
  C. G. Broyden, Math. Comp. 19, 1965), its first Jacobian by forward differences,
  each step shortened to at most half of any target's limits, projected onto the
  limits and halved while it does not reduce the largest residual. A target left at
  one of its limits without being met is then checked at both limits (the others
  held) and reported "not reachable" when r keeps its sign.

A target is met when ``|r| <= tolerance``; ``scale`` is ``|wanted|``, or a floor of the
quantity's kind where the wanted value is near zero. The solve never raises for bad
input or a failed recycle solve: the solution says why.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from typing import Any

import numpy as np

from convergence import SolverSettings
from model.errors import LoopwrightError
from model.flowsheet.spec_numbers import flowsheet_with_numbers, spec_number
from model.flowsheet.target_definition import Target
from model.solve.driver import solve_flowsheet
from model.solve.result_values import result_value
from model.solve.solution import FlowsheetSolution
from model.solve.target_results import TargetIterationRecord, TargetResult, TargetsOutcome
from model.validation.issue import Issue
from model.validation.target_checks import validate_targets, wanted_internal
from units_of_measure import from_internal

__all__ = [
    "MAX_OUTER_ITERATIONS",
    "adjusted_flowsheet",
    "in_wanted_unit",
    "solve_with_targets",
    "target_label",
]

#: Outer iterations (recycle solves) allowed before the targets are reported not met.
MAX_OUTER_ITERATIONS = 60
#: Scale of a residual whose wanted value is near zero, by quantity kind (internal units).
SCALE_FLOORS = {"molar_flow": 1e-9, "fraction": 1e-9, "temperature": 1.0, "pressure": 1.0}
SCALE_FLOOR_DEFAULT = 1.0  # W for duties
#: Longest step of the several-target iteration, as a fraction of each target's limits.
MAX_STEP = 0.5


def target_label(number: int, target: Target) -> str:
    """``"target 1: Recycle gas.mole_fraction[argon]"``: how plots and reports name it."""
    return f"target {number}: {target.measured}"


class _Stop(Exception):
    """Ends the outer loop early: a recycle solve did not converge, or all targets met."""


class _OuterLoop:
    """The recycle solves of one targets run: evaluates r(x), keeps the history."""

    def __init__(
        self, flowsheet, targets, method, settings, callback, start_tears, warm_start=True
    ) -> None:
        self.warm_start = warm_start
        self.flowsheet = flowsheet
        self.targets = targets
        self.method = method
        self.settings = settings
        self.callback = callback
        self.tears = start_tears
        self.labels = [target_label(n, t) for n, t in enumerate(targets, start=1)]
        self.wanted = np.array([wanted_internal(t) for t in targets])
        floors = [SCALE_FLOORS.get(t.measured.kind, SCALE_FLOOR_DEFAULT) for t in targets]
        self.scale = np.maximum(np.abs(self.wanted), floors)
        self.tolerance = np.array([t.tolerance for t in targets])
        self.history: list[TargetIterationRecord] = []
        self.passes = self.block_evaluations = 0
        self.last: FlowsheetSolution | None = None
        self.last_x: np.ndarray | None = None
        self.failure: FlowsheetSolution | None = None

    def residuals(self, x: np.ndarray) -> np.ndarray:
        """Solve the recycles at adjusted values ``x``; the scaled residuals."""
        numbers = [(t.adjusted, float(v), t.unit) for t, v in zip(self.targets, x, strict=True)]
        view = flowsheet_with_numbers(self.flowsheet, numbers)
        solution = solve_flowsheet(view, self.method, self.settings, self.callback, self.tears)
        self.passes += solution.passes
        self.block_evaluations += solution.block_evaluations
        if not solution.converged and self.tears is not None and solution.status != "stopped":
            # a warm start from a state far from this one's answer can stop short (a slow
            # inert loop judged by its estimated error): solve again from the cold start
            solution = solve_flowsheet(view, self.method, self.settings, self.callback, None)
            self.passes += solution.passes
            self.block_evaluations += solution.block_evaluations
        if not solution.converged:
            self.failure = solution
            raise _Stop
        if self.warm_start:
            self.tears = solution.streams
        self.last, self.last_x = solution, np.array(x, dtype=float)
        measured = np.array([result_value(solution, t.measured) for t in self.targets])
        if not np.all(np.isfinite(measured)):  # e.g. a mole fraction of a stream with no flow
            k = int(np.flatnonzero(~np.isfinite(measured))[0])
            adjusted = ", ".join(
                f"{t.adjusted} = {v:.6g}" for t, v in zip(self.targets, x, strict=True)
            )
            reason = f"{self.labels[k]}: its measured value is not a number at {adjusted}"
            solution.status, solution.converged, solution.message = "failed", False, reason
            solution.issues.append(
                Issue("error", reason, block=self.targets[k].adjusted.block, field="targets")
            )
            self.failure = solution
            raise _Stop
        r = (measured - self.wanted) / self.scale
        record = TargetIterationRecord(
            len(self.history) + 1,
            dict(zip(self.labels, map(float, r), strict=True)),
            dict(zip(self.labels, map(float, x), strict=True)),
            solution.passes,
        )
        self.history.append(record)
        if self.callback is not None and self.callback(record):
            self.settings.request_stop()
        return r

    def met(self, r: np.ndarray) -> bool:
        return bool(np.all(np.abs(r) <= self.tolerance))

    def measured(self, r: float, k: int) -> float:
        return float(self.wanted[k] + r * self.scale[k])


def _one_target(loop: _OuterLoop, x0: float, lower: float, upper: float) -> list[TargetResult]:
    """Brent's method on r(x): the current value x0 and both limits solved first, then
    the part of [lower, upper] on either side of x0 where r changes sign."""
    from scipy.optimize import brentq

    target = loop.targets[0]
    cache: dict[float, float] = {}

    def r(x: float) -> float:
        if x not in cache:
            cache[x] = float(loop.residuals(np.array([x]))[0])
            if abs(cache[x]) <= target.tolerance:
                raise _Stop  # met: no need to shrink the bracket further
        return cache[x]

    try:
        r_start, r_lower, r_upper = r(x0), r(lower), r(upper)
        if r_lower * r_upper > 0.0:
            return [_unreachable(loop, 0, r_lower, r_upper)]
        a, b = (lower, x0) if r_lower * r_start <= 0.0 else (x0, upper)
        brentq(r, a, b, xtol=1e-14 * max(1.0, abs(upper)), rtol=1e-12, maxiter=100)
    except _Stop:
        pass
    return [_result(loop, 0, len(loop.history))]


def _several_targets(loop: _OuterLoop, lower: np.ndarray, upper: np.ndarray, x0: np.ndarray):
    """Broyden's method with the steps projected onto the limits (module docstring)."""
    width = upper - lower
    x = np.clip(x0, lower, upper)
    try:
        r = loop.residuals(x)
        jacobian = np.empty((len(x), len(x)))
        for k in range(len(x)):  # forward differences, stepping inwards from a limit
            step = 1e-4 * width[k] * (1.0 if x[k] + 1e-4 * width[k] <= upper[k] else -1.0)
            shifted = x.copy()
            shifted[k] += step
            jacobian[:, k] = (loop.residuals(shifted) - r) / step
            if loop.met(r):
                break
        while not loop.met(r) and len(loop.history) < MAX_OUTER_ITERATIONS:
            try:
                full = -np.linalg.solve(jacobian, r)
            except np.linalg.LinAlgError:
                full = -np.linalg.lstsq(jacobian, r, rcond=None)[0]
            longest = float(np.max(np.abs(full) / width))
            if longest > MAX_STEP:  # a step across more than half the limits: shortened
                full = full * (MAX_STEP / longest)
            for _ in range(4):  # halve a step that does not reduce the largest residual
                x_new = np.clip(x + full, lower, upper)
                r_new = loop.residuals(x_new)
                if np.max(np.abs(r_new)) < np.max(np.abs(r)) or loop.met(r_new):
                    break
                full = full / 2.0
            dx, dr = x_new - x, r_new - r
            if np.dot(dx, dx) > 0.0:
                jacobian += np.outer(dr - jacobian @ dx, dx) / np.dot(dx, dx)
            x, r = x_new, r_new
            if np.all(dx == 0.0):
                break  # pinned at the limits
    except _Stop:
        pass
    if loop.failure is not None or loop.met(loop_residuals(loop)):
        return [_result(loop, k, len(loop.history)) for k in range(len(x))]
    return [_checked_at_limits(loop, k, lower, upper) for k in range(len(x))]


def loop_residuals(loop: _OuterLoop) -> np.ndarray:
    """The residuals of the last converged evaluation (inf before the first)."""
    if not loop.history:
        return np.full(len(loop.targets), math.inf)
    return np.array(list(loop.history[-1].residuals.values()))


def _checked_at_limits(loop: _OuterLoop, k: int, lower, upper) -> TargetResult:
    """A target not met: when its value sits at a limit, solve at both (others held)."""
    final = loop.last_x.copy()
    result = _result(loop, k, len(loop.history))
    if result.met or final[k] not in (lower[k], upper[k]):
        return result
    ends = []
    for limit in (lower[k], upper[k]):
        x = final.copy()
        x[k] = limit
        try:
            ends.append(float(loop.residuals(x)[k]))
        except _Stop:
            return result
    loop.residuals(final)  # leave the solution at the final values
    if ends[0] * ends[1] > 0.0:
        return _unreachable(loop, k, *ends)
    return result


def in_wanted_unit(target: Target, value: float) -> str:
    """An internal value of the measured quantity as text in the wanted value's unit."""
    unit = target.wanted.unit
    if not unit or not math.isfinite(value):
        return f"{value:.6g}"
    return f"{from_internal(value, target.measured.kind, unit):.6g} {unit}"


def _result(loop: _OuterLoop, k: int, iterations: int) -> TargetResult:
    target = loop.targets[k]
    if loop.failure is not None:
        reason = loop.failure.message
        return TargetResult(
            target, "failed", math.nan, math.nan, iterations, f"a recycle solve {reason}"
        )
    r = loop_residuals(loop)[k]
    adjusted = float(loop.last_x[k])
    measured = loop.measured(r, k)
    met = abs(r) <= loop.tolerance[k]
    status = "met" if met else "not met"
    message = (
        f"met in {iterations} outer iterations"
        if met
        else f"not met after {iterations} outer iterations (scaled residual {r:.3g})"
    )
    return TargetResult(target, status, adjusted, measured, iterations, message)


def _unreachable(loop: _OuterLoop, k: int, r_lower: float, r_upper: float) -> TargetResult:
    target = loop.targets[k]
    at_lower, at_upper = loop.measured(r_lower, k), loop.measured(r_upper, k)
    # leave the reported solution at the limit whose result comes closer
    closer = target.lower if abs(r_lower) <= abs(r_upper) else target.upper
    if len(loop.targets) == 1 and loop.last_x is not None and loop.last_x[0] != closer:
        loop.residuals(np.array([closer]))
    unit = f" {target.unit}" if target.unit else ""
    message = (
        f"target not reachable within the limits: {target.measured} is "
        f"{in_wanted_unit(target, at_lower)} at {target.adjusted} = {target.lower:g}{unit} and "
        f"{in_wanted_unit(target, at_upper)} at {target.upper:g}{unit}; wanted {target.wanted}"
    )
    return TargetResult(
        target,
        "not reachable",
        closer,
        loop.measured(loop_residuals(loop)[k], k),
        len(loop.history),
        message,
        at_lower,
        at_upper,
    )


def solve_with_targets(
    flowsheet: Any,
    method: str = "wegstein",
    settings: SolverSettings | None = None,
    callback: Callable[[Any], bool | None] | None = None,
    start_tears: dict | None = None,
    targets: list[Target] | None = None,
    warm_start: bool = True,
) -> FlowsheetSolution:
    """Solve the flowsheet with its targets met (see the module docstring).

    ``targets`` defaults to ``flowsheet.targets``; without any this is
    :func:`~model.solve.driver.solve_flowsheet`. The callback receives the recycle
    solves' iteration records and, after each outer iteration, a
    :class:`~model.solve.target_results.TargetIterationRecord`. The solution is the
    recycle solve at the final adjusted values, with ``solution.targets`` (a
    :class:`~model.solve.target_results.TargetsOutcome`); it is "solved" only when every
    target is met, and never raises for bad input. ``warm_start=False`` starts every
    recycle solve afresh (for the benchmark that measures what warm starts save).
    """
    settings = settings if settings is not None else SolverSettings()
    targets = list(flowsheet.targets if targets is None else targets)
    if not targets:
        return solve_flowsheet(flowsheet, method, settings, callback, start_tears)
    issues = validate_targets(flowsheet, targets)
    if issues:
        solution = solve_flowsheet(flowsheet, method, settings, None, start_tears)
        solution.issues = issues + solution.issues
        solution.status, solution.converged = "needs input", False
        solution.message = f"needs input: {len(issues)} problem(s); first: {issues[0].message}"
        return solution
    try:
        loop = _OuterLoop(flowsheet, targets, method, settings, callback, start_tears, warm_start)
        lower = np.array([t.lower for t in targets])
        upper = np.array([t.upper for t in targets])
        x0 = np.array([spec_number(flowsheet.blocks, t.adjusted, t.unit) for t in targets])
        if len(targets) == 1:
            results = _one_target(loop, float(x0[0]), float(lower[0]), float(upper[0]))
        else:
            results = _several_targets(loop, lower, upper, x0)
    except (LoopwrightError, _Stop) as error:  # a value the specs refuse mid-way
        solution = solve_flowsheet(flowsheet, method, settings, None, start_tears)
        solution.status, solution.converged = "failed", False
        solution.message = f"failed: targets: {error}"
        solution.issues.append(Issue("error", f"targets: {error}", field="targets"))
        return solution
    return _finished(loop, results, "brentq" if len(targets) == 1 else "broyden")


def _finished(loop: _OuterLoop, results: list[TargetResult], method: str) -> FlowsheetSolution:
    solution = loop.failure if loop.failure is not None else loop.last
    outcome = TargetsOutcome(
        results, len(loop.history), loop.passes, loop.block_evaluations, loop.history, method
    )
    solution.targets = outcome
    if loop.failure is not None:
        solution.message = f"{solution.status}: targets: {solution.message}"
        return solution
    if not outcome.all_met:
        solution.status, solution.converged = "not converged", False
        first = next(result for result in results if not result.met)
        solution.message = f"not converged: {first.message}"
        for number, result in enumerate(results, start=1):
            if not result.met:
                block = result.target.adjusted.block
                message = f"target {number}: {result.message}"
                solution.issues.append(Issue("warning", message, block=block, field="targets"))
        return solution
    solution.message += f"; targets met in {outcome.outer_iterations} outer iterations"
    return solution


def adjusted_flowsheet(flowsheet: Any, solution: FlowsheetSolution) -> Any:
    """The flowsheet as ``solution`` solved it: a solve view with each target's final
    adjusted value in place (the flowsheet itself when the solution has no targets).
    The second opinion checks a targets solution on it."""
    outcome = getattr(solution, "targets", None)
    if outcome is None:
        return flowsheet
    numbers = [
        (r.target.adjusted, r.adjusted, r.target.unit)
        for r in outcome.results
        if math.isfinite(r.adjusted)
    ]
    return flowsheet_with_numbers(flowsheet, numbers)
