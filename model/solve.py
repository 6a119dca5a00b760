"""Sequential-modular solve: passes over the blocks in calculation order, tears converged.

Steps of :func:`solve_flowsheet`:

1. Validate; with any error the result is "needs input" with the issues (no exception).
2. Compile the specs once to internal floats (:mod:`model.compile`).
3. Find the tear streams and the calculation order (:func:`model.topology.analyse_topology`;
   preferred tears honoured, weights = tear variables per stream).
4. Without tears: one pass, done. With tears, the tear vector is, for each tear stream
   in turn, its component flows (mol/s), T (K) and P (Pa); g(x) is one pass that starts
   from the tear values x and returns the tear streams as recomputed by their source
   blocks. Start: the user's estimate of a tear where given; otherwise one pass with
   the tears at zero flow at the feeds' mean T and P, whose recomputed tears are x0.
5. x = g(x) is solved by :func:`convergence.solve_fixed_point` with the live settings.
   Absolute floors of the scaled residual: flows ``1e-9 x total feed flow + 1e-12``
   mol/s (a trace component's flow need not converge relative to itself), T 1 K, P 1 Pa.
6. A final, strict pass at the converged x fills every stream; a tear stream is
   reported as its source block computed it. Balances are reported.

While the tears iterate, a pass is lenient: a tear flow that a Wegstein step took
below zero is clipped to zero, and a reaction short of a reactant is limited with a
warning; both are reported as warnings. The final pass is strict: a reaction that
still needs more reactant than is present ends the solve as "failed".

The solve reads the flowsheet only: it never changes it and emits none of its signals,
so the window may run it in a worker thread.

Examples
--------
>>> from model.components import lookup_component
>>> from model.flowsheet import Flowsheet
>>> from model.spec_values import ComponentAmounts, TypedQuantity
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

from collections.abc import Callable

import numpy as np

from convergence import (
    METHODS,
    FixedPointProblem,
    IterationRecord,
    SolverSettings,
    solve_fixed_point,
)
from model.balance import balance_report
from model.compile import CompiledFlowsheet, compile_flowsheet
from model.errors import CalculationError, InputError
from model.flowsheet import Flowsheet
from model.passes import FlowsheetPass, TearVector
from model.solution import FlowsheetSolution
from model.stream_state import StreamState
from model.topology import analyse_topology
from model.validation import Issue, validate_flowsheet
from model.validation.flowsheet_checks import PortMap, stream_phases

__all__ = ["solve_flowsheet"]


def _needs_input(flowsheet: Flowsheet, issues: list[Issue]) -> FlowsheetSolution:
    errors = [i for i in issues if i.is_error]
    message = f"needs input: {len(errors)} problem(s); first: {errors[0].message}"
    return FlowsheetSolution(
        "needs input", False, message, None, flowsheet.component_names(), issues=issues
    )


def _starting_states(
    flowsheet: Flowsheet, compiled: CompiledFlowsheet, tears: TearVector, feeds: list[StreamState]
) -> tuple[list[StreamState], list[bool]]:
    """Tear states from the user's estimates, else zero flow at the feeds' mean T and P."""
    mean_T = float(np.mean([s.T for s in feeds])) if feeds else 298.15
    mean_P = float(np.mean([s.P for s in feeds])) if feeds else 101325.0
    states, estimated = [], []
    for k, name in enumerate(tears.tear_streams):
        estimate = flowsheet.streams[name].estimate
        flows = np.zeros(len(compiled.component_names))
        if estimate is not None:
            for component, value in estimate.flows.items():
                flows[compiled.component_names.index(component)] = max(float(value), 0.0)
        states.append(
            StreamState(
                flows,
                mean_T if estimate is None or estimate.T is None else float(estimate.T),
                mean_P if estimate is None or estimate.P is None else float(estimate.P),
                tears.phases[k],
            )
        )
        estimated.append(estimate is not None)
    return states, estimated


def _initial_phases(flowsheet: Flowsheet, tears: TearVector, feeds: list[StreamState]) -> None:
    """Tear phases known from the specs; otherwise the feeds' most common phase."""
    known = stream_phases(flowsheet, PortMap(flowsheet))
    feed_phases = [s.phase for s in feeds] or ["vapor"]
    default = max(set(feed_phases), key=feed_phases.count)
    tears.phases = [known.get(name, default) for name in tears.tear_streams]


def _converge(flowsheet, compiled, runner, tears, feeds, method, settings, callback):
    """Iterate the tears to convergence; return the FixedPointResult."""
    start, estimated = _starting_states(flowsheet, compiled, tears, feeds)
    x_start = tears.pack(start)
    if not all(estimated):
        runner.run(start, strict=False)
        first = tears.pack(runner.recomputed)
        for k, name in enumerate(tears.tear_streams):
            if not estimated[k]:
                x_start[tears.slices[name]] = first[tears.slices[name]]

    def g(x: np.ndarray) -> np.ndarray:
        runner.run(tears.unpack(x), strict=False)
        tears.phases = [s.phase for s in runner.recomputed]
        return tears.pack(runner.recomputed)

    total_feed = float(sum(s.flows.sum() for s in feeds))
    problem = FixedPointProblem(
        g, x_start, tears.slices, tears.abs_floor(total_feed), tears.variable_names
    )
    return solve_fixed_point(problem, method, settings, callback)


_STATUS = {"converged": "solved", "stopped": "stopped"}


def solve_flowsheet(
    flowsheet: Flowsheet,
    method: str = "wegstein",
    settings: SolverSettings | None = None,
    callback: Callable[[IterationRecord], bool | None] | None = None,
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
    from model.thermo import PropertyBasis

    basis = PropertyBasis(flowsheet.components)
    compiled = compile_flowsheet(flowsheet, basis)
    topology = analyse_topology(
        list(flowsheet.blocks),
        [(s.name, s.source, s.target) for s in flowsheet.streams.values()],
        [s.name for s in flowsheet.streams.values() if s.preferred_tear],
        dict.fromkeys(flowsheet.streams, float(len(basis.names) + 2)),
    )
    for name in topology.unused_preferred_tears:
        issues.append(
            Issue(
                "warning",
                f"{name}: preferred tear lies on no recycle loop; it is not torn",
                stream=name,
            )
        )
    solution = FlowsheetSolution(
        "failed",
        False,
        "",
        basis,
        list(basis.names),
        tear_streams=list(topology.tear_streams),
        calculation_order=list(topology.calculation_order),
        issues=issues,
    )
    runner = FlowsheetPass(compiled, topology.calculation_order, topology.tear_streams, basis)
    tears = TearVector(topology.tear_streams, list(basis.names))
    feeds = [
        compiled.blocks[b].state for b in flowsheet.blocks if compiled.blocks[b].kind == "Feed"
    ]
    _initial_phases(flowsheet, tears, feeds)
    try:
        final_states = []
        if tears.tear_streams:
            result = _converge(
                flowsheet, compiled, runner, tears, feeds, method, settings, callback
            )
            solution.convergence = result
            final_states = tears.unpack(result.x, count_clipping=False)
            strict = result.converged  # an unconverged x may hold transient shortfalls
        else:
            strict = True
        runner.run(final_states, strict=strict)
    except CalculationError as error:
        solution.passes = runner.count
        solution.message = f"failed: {error}"
        issues.append(Issue("error", str(error), block=error.block))
        return solution
    _fill(solution, runner, compiled, tears, settings.snapshot().tolerance)
    return solution


def _fill(
    solution: FlowsheetSolution,
    runner: FlowsheetPass,
    compiled: CompiledFlowsheet,
    tears: TearVector,
    tolerance: float,
) -> None:
    """Streams, block results, warnings, status and balance from the final pass."""
    states = list(runner.states)
    for index, state in zip(runner.tear_indices, runner.recomputed, strict=True):
        states[index] = state
    solution.streams = {name: states[i].copy() for i, name in enumerate(compiled.stream_names)}
    solution.blocks = dict(runner.results)
    solution.passes = runner.count
    for name, result in solution.blocks.items():
        for warning in result.warnings:
            solution.issues.append(Issue("warning", f"{name}: {warning}", block=name))
    solution.issues += _property_warnings(solution)
    for tear, count in zip(tears.tear_streams, tears.clipped, strict=True):
        if count:
            solution.issues.append(
                Issue(
                    "warning",
                    f"{tear}: in {count} pass(es) an accelerated step took tear flows "
                    "below zero; they were clipped to zero for that pass",
                    stream=tear,
                )
            )
    result = solution.convergence
    if result is None:
        solution.status, solution.converged = "solved", True
        solution.message = "solved in one pass (no recycle)"
    else:
        solution.status = _STATUS.get(result.status, "not converged")
        solution.converged = result.converged
        solution.message = f"{solution.status}: {result.message}; {runner.count} passes"
    # An exchanger's duty passes heat inside the flowsheet (hot to cold side); the other
    # duties cross its boundary.
    duties = [
        result.duty_W
        for name, result in solution.blocks.items()
        if result.duty_W is not None and compiled.blocks[name].kind != "Exchanger"
    ]
    solution.balance = balance_report(
        solution.basis,
        solution.streams,
        duties,
        [compiled.stream_names[i] for i in compiled.feed_streams],
        [compiled.stream_names[i] for i in compiled.product_streams],
        tolerance,
    )
    if not solution.balance.closes:
        solution.issues.append(Issue("warning", "balance: " + solution.balance.lines()[-1]))


def _property_warnings(solution: FlowsheetSolution) -> list[Issue]:
    """Streams outside the Cp correlations' ranges, and liquids above a component's Tc."""
    issues = []
    basis = solution.basis
    for name, state in solution.streams.items():
        found = basis.correlation_range_warnings(state.T, state.flows)
        if state.liquid:
            found += basis.supercritical_liquid_warnings(state.T, state.flows)
        issues += [Issue("warning", f"{name}: {text}", stream=name) for text in found]
    return issues
