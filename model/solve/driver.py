"""Sequential-modular solve: passes over the blocks in calculation order, tears converged.

Steps of :func:`solve_flowsheet`:

1. Validate; with any error the result is "needs input" with the issues (no exception).
2. Compile the specs once to internal floats (:mod:`model.solve.compile`).
3. Find the tear streams and the calculation order (:func:`model.solve.topology.analyse_topology`;
   preferred tears honoured, weights = tear variables per stream).
4. Without tears: one pass, done. With tears, the flowsheet is solved part by part
   (:mod:`model.solve.part_solve`): blocks outside loops once, when their inlets are
   known; each strongly connected part on its own, in the order of the block graph's
   condensation, as below, with passes over that part's blocks only.
5. A part's tear vector is, for each of its tear streams in turn, its component flows
   (mol/s), T (K) and P (Pa); g(x) is one pass of the part that starts from the tear
   values x and returns the tear streams as recomputed by their source blocks. Start:
   a warm-start state of the tear where given (``start_tears``), else the user's
   estimate of a tear where given (by stream name); otherwise one pass with
   the tears at zero flow at the feeds' mean T and P, whose recomputed tears are x0.
6. x = g(x) is solved by :func:`convergence.solve_fixed_point` with the live settings
   (one object for every part). Absolute floors of the scaled residual: flows
   ``1e-9 x total feed flow + 1e-12`` mol/s (a trace component's flow need not converge
   relative to itself), T 1 K, P 1 Pa. A fixed point reached while a block's
   temperature search was held at its limit is rejected (:mod:`model.solve.held_check`).
7. A final, strict pass of the part at the converged x fills its streams; a tear
   stream is reported as its source block computed it. Once every part is done, the
   balances are reported. A part that does not converge ends the iteration: the parts
   after it are passed once, and the solution reports that part's status.

While the tears iterate, a pass is lenient: a tear flow that a Wegstein step took
below zero is clipped to zero, and a reaction short of a reactant is limited with a
warning; both are reported as warnings. The final pass is strict: a reaction that
still needs more reactant than is present ends the solve as "failed".

The solve reads the flowsheet only: it never changes it and emits none of its signals,
so the window may run it in a worker thread.

Examples
--------
>>> from model.properties.components import lookup_component
>>> from model.flowsheet.document import Flowsheet
>>> from model.flowsheet.spec_values import ComponentAmounts, TypedQuantity
>>> sheet = Flowsheet()
>>> sheet.add_component(lookup_component("water"))
>>> _ = sheet.add_block("Feed", "F", specs={"flows": ComponentAmounts({"water": 1.0},
...     "mol/s"), "T": TypedQuantity(25.0, "degC"), "P": TypedQuantity(1.0, "bar")})
>>> _ = sheet.add_block("Heater", "H", specs={"T": TypedQuantity(80.0, "degC"),
...     "phase": "vapor"})
>>> _ = sheet.add_block("Product", "P")
>>> _ = sheet.connect("F", "out", "H", "in"); _ = sheet.connect("H", "out", "P", "in")
>>> solution = solve_flowsheet(sheet)
>>> solution.status, solution.passes, round(solution.blocks["H"].duty_W, 1)
('solved', 1, 1854.4)
"""

from __future__ import annotations

from collections.abc import Callable, Mapping

from convergence import METHODS, IterationRecord, SolverSettings
from model.errors import InputError, LoopwrightError
from model.flowsheet.document import Flowsheet
from model.properties.stream_state import StreamState
from model.solve.part_solve import solve_by_parts
from model.solve.solution import FlowsheetSolution
from model.solve.tear_problem import prepare_tear_problem
from model.validation.issue import Issue
from model.validation.validate import validate_flowsheet

__all__ = ["solve_flowsheet"]


def _needs_input(flowsheet: Flowsheet, issues: list[Issue]) -> FlowsheetSolution:
    errors = [i for i in issues if i.is_error]
    message = f"needs input: {len(errors)} problem(s); first: {errors[0].message}"
    return FlowsheetSolution(
        "needs input", False, message, None, flowsheet.component_names(), issues=issues
    )


def solve_flowsheet(
    flowsheet: Flowsheet,
    method: str = "wegstein",
    settings: SolverSettings | None = None,
    callback: Callable[[IterationRecord], bool | None] | None = None,
    start_tears: Mapping[str, StreamState] | None = None,
) -> FlowsheetSolution:
    """Solve the flowsheet's heat and material balance (see the module docstring).

    Parameters
    ----------
    flowsheet
        Read only.
    method
        A key of :data:`convergence.METHODS` ("direct", "wegstein", "broyden").
    settings
        Live solver settings (tolerance, q bounds, iteration limit ...); default ones
        if None.
    callback
        Called after every iteration with its record; returning True stops the solve.
    start_tears
        A warm start: tear states by stream name, e.g. ``earlier.streams`` of an earlier
        solution of a neighbouring case (an outer loop's previous step, a sweep's
        previous point). A named tear starts there instead of at its estimate or the
        start pass; names that are not tears are ignored.

    Returns
    -------
    FlowsheetSolution
        Status "solved", "not converged", "stopped", "needs input" or "failed"; never
        raises for bad input or a failed calculation.
    """
    if method not in METHODS:
        raise InputError("method", method, "one of: " + ", ".join(METHODS))
    settings = settings if settings is not None else SolverSettings()
    issues = validate_flowsheet(flowsheet)
    if any(issue.is_error for issue in issues):
        return _needs_input(flowsheet, issues)
    try:
        tear_problem = prepare_tear_problem(flowsheet, issues)
    except LoopwrightError as error:  # e.g. a spec the compiler cannot use
        return _failed_before_start(flowsheet, issues, error)
    if not tear_problem.tear_streams:
        return tear_problem.final_pass([], True, None, settings.snapshot().tolerance)
    return solve_by_parts(flowsheet, tear_problem, method, settings, callback, start_tears)


def _failed_before_start(
    flowsheet: Flowsheet, issues: list[Issue], error: LoopwrightError
) -> FlowsheetSolution:
    block = getattr(error, "block", None)
    issues = [*issues, Issue("error", str(error), block=block)]
    return FlowsheetSolution(
        "failed", False, f"failed: {error}", None, flowsheet.component_names(), issues=issues
    )
