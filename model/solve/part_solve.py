"""The solve part by part: each strongly connected part converged on its own, in order.

:func:`solve_by_parts` takes the steps of :func:`model.solve.part_order.solve_steps`:

- blocks outside loops are computed once, when their inlets are known (strictly while
  every part before them converged, leniently after one that did not);
- each loop part gets its own tear problem (:meth:`TearProblem.for_part`): its start
  (warm-start states by stream name, else the user's estimates, else one pass with
  zero-flow tears), then
  :func:`convergence.solve_fixed_point` on passes over that part's blocks only, with
  the one live :class:`~convergence.SolverSettings` of the solve (a q-bound change made
  while part 3 runs reaches part 3 at its next iteration, and every part after it), then
  a final pass at the answer, strict if it converged. Parts downstream see the
  converged streams upstream parts left in the shared stream states.

So loops in series cost the passes of the slowest loop instead of their sum, and a
part's pass costs only its own blocks. Progress records reach the callback as
:class:`~model.solve.part_results.PartRecord` (the part's label, iterations numbered on).
A fixed point reached while a block's temperature search was held is rejected
(:mod:`model.solve.held_check`). Once a part does not converge (or a stop is asked),
the iteration ends there: the parts after it are passed once from their start, so
every stream has a value, and the solution reports that part's status.
"""

from __future__ import annotations

from collections.abc import Callable, Mapping

from convergence import IterationRecord, SolverSettings, solve_fixed_point
from convergence.errors import ConvergenceInputError
from model.errors import CalculationError, LoopwrightError
from model.flowsheet.document import Flowsheet
from model.properties.stream_state import StreamState
from model.solve.held_check import HeldWatch, reject_held_fixed_point
from model.solve.part_order import SolveStep, solve_steps
from model.solve.part_results import PartSolution, combine_parts, part_record
from model.solve.passes import FlowsheetPass
from model.solve.solution import FlowsheetSolution
from model.solve.tear_problem import TearProblem, fill_solution
from model.validation.issue import Issue

__all__ = ["solve_by_parts"]

Callback = Callable[[IterationRecord], bool | None]


class _PartByPart:
    """State of one part-by-part solve (see the module docstring)."""

    def __init__(
        self,
        flowsheet: Flowsheet,
        whole: TearProblem,
        method: str,
        settings: SolverSettings,
        callback: Callback | None,
        start_tears: Mapping[str, StreamState] | None = None,
    ) -> None:
        self.flowsheet = flowsheet
        self.start_tears = start_tears
        self.whole = whole
        self.method = method
        self.settings = settings
        self.callback = callback
        self.parts: list[PartSolution] = []
        self.part_problems: list[TearProblem] = []
        self.outside: list[FlowsheetPass] = []
        self.iterating = True  # False once a part did not converge
        self.iterations = 0
        self.evaluations = 0

    # ---- the steps ------------------------------------------------------------------
    def run(self, steps: list[SolveStep]) -> FlowsheetSolution:
        try:
            for step in steps:
                if step.is_loop:
                    self._loop_part(step)
                else:
                    self._outside_loops(step)
        except CalculationError as error:  # a block failed in a pass
            return self._failed(error)
        except (LoopwrightError, ConvergenceInputError) as error:  # e.g. a non-finite start
            return self._failed(CalculationError(None, str(error)))
        return self._solution()

    def _outside_loops(self, step: SolveStep) -> None:
        runner = FlowsheetPass(
            self.whole.compiled, step.blocks, [], self.whole.basis, shared=self.whole.runner
        )
        self.outside.append(runner)
        runner.run([], strict=self.iterating)

    def _loop_part(self, step: SolveStep) -> None:
        part = self.whole.for_part(self.flowsheet, step.blocks, step.tear_streams)
        self.part_problems.append(part)
        part.make_start(self.flowsheet, self.start_tears)
        if not self.iterating:  # passed once from its start, so its streams have values
            part.runner.run(part.tears.unpack(part.problem.x0), strict=False)
            self._record(step, part, None)
            return
        watch = HeldWatch(part.problem, part.runner)
        stop_at_once = self.settings.stop_requested  # a run clears requests made before it
        result = solve_fixed_point(
            watch.watched(), self.method, self.settings, self._callback(step, stop_at_once)
        )
        held = part.runner.held  # of the last pass, the one at result.x
        checked = reject_held_fixed_point(
            result, watch, held, part.tears, part.compiled, self.settings.snapshot()
        )
        if checked is not result:
            where = "" if step.label.endswith(" of 1") else f"{step.label}: "
            self.whole.issues.append(Issue("error", where + checked.message, block=held[0][0]))
        result = checked
        self.iterations += result.iterations
        self.evaluations += result.evaluations
        self.iterating = result.converged
        states = part.tears.unpack(result.x, count_clipping=False)
        try:
            part.runner.run(states, strict=result.converged)  # the final pass of the part
        finally:
            self._record(step, part, result)

    def _callback(self, step: SolveStep, stop_at_once: bool) -> Callback | None:
        if self.callback is None and not stop_at_once:
            return None
        before = (self.iterations, self.evaluations)
        user = self.callback

        def report(record: IterationRecord) -> bool | None:
            answer = None
            if user is not None:
                answer = user(part_record(record, step.label, *before))
            return True if stop_at_once else answer

        return report

    def _record(self, step: SolveStep, part: TearProblem, result) -> None:
        self.parts.append(
            PartSolution(
                step.label,
                list(step.blocks),
                list(step.tear_streams),
                result,
                part.runner.count,
                part.runner.block_evaluations,
            )
        )

    # ---- the solution ---------------------------------------------------------------
    def _runners(self) -> list[FlowsheetPass]:
        return [part.runner for part in self.part_problems] + self.outside

    def _summed_up(self, solution: FlowsheetSolution) -> None:
        solution.parts = list(self.parts)
        solution.convergence = combine_parts(self.parts, self.whole.tear_streams, self.method)
        solution.passes = max((runner.count for runner in self._runners()), default=0)
        solution.block_evaluations = sum(runner.block_evaluations for runner in self._runners())

    def _solution(self) -> FlowsheetSolution:
        solution = self.whole.new_solution()
        self._summed_up(solution)
        runs = [(part.runner, part.tears) for part in self.part_problems]
        fill_solution(solution, runs, self.whole.compiled, self.settings.snapshot().tolerance)
        return solution

    def _failed(self, error: CalculationError) -> FlowsheetSolution:
        solution = self.whole.new_solution()
        self._summed_up(solution)
        solution.message = f"failed: {error}"
        solution.issues.append(Issue("error", str(error), block=error.block))
        return solution


def solve_by_parts(
    flowsheet: Flowsheet,
    whole: TearProblem,
    method: str,
    settings: SolverSettings,
    callback: Callback | None = None,
    start_tears: Mapping[str, StreamState] | None = None,
) -> FlowsheetSolution:
    """Converge ``whole``'s flowsheet part by part (see the module docstring).

    ``start_tears`` (stream name to state) warm-starts the tears it names.

    ``whole`` is the prepared tear problem of the flowsheet (its compile, topology and
    issues; :func:`model.solve.tear_problem.prepare_tear_problem`), with at least one
    tear stream; its own pass is not used, only its stream states, which every step
    shares. Never raises for a failed calculation: the solution says "failed".
    """
    streams = [(s.name, s.source, s.target) for s in flowsheet.streams.values()]
    steps = solve_steps(
        list(flowsheet.blocks), streams, whole.tear_streams, whole.calculation_order
    )
    return _PartByPart(flowsheet, whole, method, settings, callback, start_tears).run(steps)
