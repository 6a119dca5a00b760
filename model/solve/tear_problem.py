"""The tear problem of a flowsheet as a plain fixed-point problem, for outside solvers.

:func:`build_tear_problem` sets up exactly what :func:`model.solve.driver.solve_flowsheet` hands
to :func:`convergence.solve_fixed_point`: the same validation, compile, topology, tear
vector, start (the user's estimates, else one pass from zero-flow tears), pass function
g and absolute floors. Any fixed-point or root solver can then iterate on
``tear_problem.problem.g``; :meth:`TearProblem.finish` turns its answer into the same
:class:`~model.solve.solution.FlowsheetSolution` a solve gives (final strict pass, streams,
block results, balances). Benchmarks use it to compare methods on the same tear
function, pass for pass.

Examples
--------
A feed of water mixed with half of what leaves the mixer (recycle ratio 0.5):

>>> from convergence import solve_fixed_point
>>> from model.properties.components import lookup_component
>>> from model.flowsheet.spec_values import ComponentAmounts, TypedQuantity
>>> sheet = Flowsheet()
>>> sheet.add_component(lookup_component("water"))
>>> _ = sheet.add_block("Feed", "F", specs={"flows": ComponentAmounts({"water": 1.0},
...     "mol/s"), "T": TypedQuantity(400.0, "K"), "P": TypedQuantity(1.0, "bar")})
>>> for kind, name in (("Mixer", "M"), ("Splitter", "S"), ("Product", "P")):
...     _ = sheet.add_block(kind, name)
>>> sheet.set_spec("S", "fractions", {"out1": 0.5})
>>> _ = sheet.connect("F", "out", "M", "in1"); _ = sheet.connect("M", "out", "S", "in")
>>> _ = sheet.connect("S", "out1", "M", "in2", "recycle")
>>> _ = sheet.connect("S", "out2", "P", "in")
>>> tear_problem = build_tear_problem(sheet)
>>> result = solve_fixed_point(tear_problem.problem, "wegstein")
>>> solution = tear_problem.finish(result)
>>> solution.status, round(float(solution.streams["recycle"].flows[0]), 9)
('solved', 1.0)
"""

from __future__ import annotations

import math
from collections.abc import Mapping
from dataclasses import dataclass, field

import numpy as np

from convergence import FixedPointProblem, FixedPointResult, SolverSettings
from model.errors import CalculationError, InputError
from model.flowsheet.document import Flowsheet
from model.properties.enthalpy import PropertyBasis
from model.properties.property_method import case_basis
from model.properties.stream_state import StreamState
from model.solve.balance import balance_report
from model.solve.compile import CompiledFlowsheet, compile_flowsheet
from model.solve.passes import FlowsheetPass, TearVector
from model.solve.solution import FlowsheetSolution
from model.solve.topology import Topology, analyse_topology
from model.validation.flowsheet_checks import PortMap, stream_phases
from model.validation.issue import Issue
from model.validation.validate import validate_flowsheet

__all__ = ["TearProblem", "build_tear_problem", "fill_solution", "prepare_tear_problem"]

_STATUS = {"converged": "solved", "stopped": "stopped"}


@dataclass
class TearProblem:
    """A flowsheet's tear problem and what is needed to finish a solve from its answer.

    Attributes
    ----------
    problem
        x = g(x) over the tear vector, with the solve's start, slices, floors and names
        (None until the start is made, and for a flowsheet without tears).
    tear_streams, calculation_order
        As the solve chooses them.
    runner
        The pass behind g; ``runner.count`` counts every pass made (the start pass too).
    feeds, phase_guesses
        The feeds' states; every stream's phase as the specs tell it (else the feeds'
        most common phase), the tears' phases until a pass computes them.
    """

    problem: FixedPointProblem | None
    tear_streams: list[str]
    calculation_order: list[str]
    runner: FlowsheetPass
    tears: TearVector
    compiled: CompiledFlowsheet
    basis: PropertyBasis
    issues: list[Issue]
    feeds: list[StreamState] = field(default_factory=list)
    phase_guesses: dict[str, str] = field(default_factory=dict)

    @property
    def passes(self) -> int:
        """Flowsheet passes made so far (the start pass included)."""
        return self.runner.count

    def finish(
        self, result: FixedPointResult, settings: SolverSettings | None = None
    ) -> FlowsheetSolution:
        """The solution at ``result.x``: one final pass (strict if converged), then fill.

        ``settings`` gives the tolerance the balance report judges closures against
        (default: ``result``'s last settings, else the default tolerance).
        """
        states = self.tears.unpack(np.asarray(result.x, dtype=float), count_clipping=False)
        # An unconverged x may hold transient shortfalls, so only a converged one is strict.
        return self.final_pass(states, result.converged, result, _tolerance(result, settings))

    def new_solution(self) -> FlowsheetSolution:
        """An empty "failed" solution naming this problem's basis, tears and order."""
        return FlowsheetSolution(
            "failed",
            False,
            "",
            self.basis,
            list(self.basis.names),
            tear_streams=list(self.tear_streams),
            calculation_order=list(self.calculation_order),
            issues=list(self.issues),
        )

    def failed(self, error: CalculationError) -> FlowsheetSolution:
        """The "failed" solution after a pass raised ``error``."""
        solution = self.new_solution()
        solution.passes = self.runner.count
        solution.message = f"failed: {error}"
        solution.issues.append(Issue("error", str(error), block=error.block))
        return solution

    def final_pass(
        self,
        tear_states: list[StreamState],
        strict: bool,
        result: FixedPointResult | None,
        tolerance: float,
    ) -> FlowsheetSolution:
        """One pass from ``tear_states``; streams, block results, status and balances."""
        try:
            self.runner.run(tear_states, strict=strict)
        except CalculationError as error:
            solution = self.failed(error)
            solution.convergence = result
            return solution
        solution = self.new_solution()
        solution.convergence = result
        solution.passes = self.runner.count
        solution.block_evaluations = self.runner.block_evaluations
        fill_solution(solution, [(self.runner, self.tears)], self.compiled, tolerance)
        return solution

    def for_part(self, flowsheet: Flowsheet, blocks: list[str], tear_streams: list[str]):
        """The tear problem of one strongly connected part of this flowsheet.

        Its pass computes ``blocks`` only (in the order given), reading and writing this
        problem's stream states, so it sees what the steps before it computed there.
        ``problem`` is None until :meth:`make_start`.
        """
        runner = FlowsheetPass(self.compiled, blocks, tear_streams, self.basis, shared=self.runner)
        tears = TearVector(tear_streams, list(self.basis.names))
        tears.phases = [self.phase_guesses[name] for name in tear_streams]
        return TearProblem(
            None,
            list(tear_streams),
            list(blocks),
            runner,
            tears,
            self.compiled,
            self.basis,
            self.issues,
            self.feeds,
            self.phase_guesses,
        )

    def make_start(
        self, flowsheet: Flowsheet, start_tears: Mapping[str, StreamState] | None = None
    ) -> None:
        """Build :attr:`problem`: the start x0 and the pass function g.

        The start is a tear's state in ``start_tears`` (a warm start from an earlier
        solution, by stream name) where given, else the user's estimate of the tear;
        otherwise one pass with the tears at zero flow, whose recomputed tears are x0.

        Raises
        ------
        CalculationError
            The start pass failed.
        """
        tears, runner = self.tears, self.runner
        start, estimated = _starting_states(flowsheet, self.compiled, tears, self.feeds)
        _warm_states(start, estimated, tears, start_tears or {})
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

        total_feed = float(sum(s.flows.sum() for s in self.feeds))
        self.problem = FixedPointProblem(
            g,
            x_start,
            tears.slices,
            tears.abs_floor(total_feed),
            tears.variable_names,
            lower_bound=0.0,  # flows, temperatures and pressures
        )


def _tolerance(result: FixedPointResult, settings: SolverSettings | None) -> float:
    if settings is not None:
        return settings.snapshot().tolerance
    if result.history.records:
        return result.history.records[-1].settings.tolerance
    return SolverSettings().tolerance


def _topology(flowsheet: Flowsheet, basis: PropertyBasis) -> Topology:
    return analyse_topology(
        list(flowsheet.blocks),
        [(s.name, s.source, s.target) for s in flowsheet.streams.values()],
        [s.name for s in flowsheet.streams.values() if s.preferred_tear],
        dict.fromkeys(flowsheet.streams, float(len(basis.names) + 2)),
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


def _warm_states(
    start: list[StreamState],
    estimated: list[bool],
    tears: TearVector,
    start_tears: Mapping[str, StreamState],
) -> None:
    """Put the warm-start states in place of the estimates (a state of another
    component list, or not finite, is ignored: the estimate or the start pass stays)."""
    for k, name in enumerate(tears.tear_streams):
        state = start_tears.get(name)
        if state is None or len(state.flows) != len(start[k].flows):
            continue
        values = np.append(state.flows, (state.T, state.P))
        if not np.all(np.isfinite(values)):
            continue
        start[k] = StreamState(np.maximum(state.flows, 0.0), state.T, state.P, state.phase)
        tears.phases[k] = state.phase
        estimated[k] = True


def _phase_guesses(flowsheet: Flowsheet, feeds: list[StreamState]) -> dict[str, str]:
    """Every stream's phase as known from the specs; otherwise the feeds' most common."""
    known = stream_phases(flowsheet, PortMap(flowsheet))
    feed_phases = [s.phase for s in feeds] or ["vapor"]
    default = max(set(feed_phases), key=feed_phases.count)
    return {name: known.get(name, default) for name in flowsheet.streams}


def prepare_tear_problem(flowsheet: Flowsheet, issues: list[Issue]) -> TearProblem:
    """Compile a validated flowsheet and choose its tears; no pass is made yet.

    ``issues`` (from :func:`model.validation.validate.validate_flowsheet`, without errors) gains
    a warning for each preferred tear that lies on no recycle loop. The returned
    problem's :attr:`~TearProblem.problem` is None until
    :meth:`~TearProblem.make_start`.
    """
    basis = case_basis(flowsheet)
    compiled = compile_flowsheet(flowsheet, basis)
    topology = _topology(flowsheet, basis)
    for name in topology.unused_preferred_tears:
        issues.append(
            Issue(
                "warning",
                f"{name}: preferred tear lies on no recycle loop; it is not torn",
                stream=name,
            )
        )
    runner = FlowsheetPass(compiled, topology.calculation_order, topology.tear_streams, basis)
    tears = TearVector(topology.tear_streams, list(basis.names))
    feeds = [
        compiled.blocks[b].state for b in flowsheet.blocks if compiled.blocks[b].kind == "Feed"
    ]
    phase_guesses = _phase_guesses(flowsheet, feeds)
    tears.phases = [phase_guesses[name] for name in tears.tear_streams]
    return TearProblem(
        None,
        list(topology.tear_streams),
        list(topology.calculation_order),
        runner,
        tears,
        compiled,
        basis,
        issues,
        feeds,
        phase_guesses,
    )


def build_tear_problem(flowsheet: Flowsheet) -> TearProblem:
    """The tear problem :func:`model.solve.driver.solve_flowsheet` would iterate on.

    Makes one pass (from zero-flow tears) unless every tear has an estimate, as the
    solve does. The flowsheet is read only.

    Raises
    ------
    InputError
        The flowsheet needs input (the first error is named) or has no recycle loop.
    CalculationError
        The start pass failed.
    """
    issues = validate_flowsheet(flowsheet)
    errors = [issue for issue in issues if issue.is_error]
    if errors:
        raise InputError("flowsheet", errors[0].message, "a flowsheet that needs no input")
    tear_problem = prepare_tear_problem(flowsheet, issues)
    if not tear_problem.tear_streams:
        raise InputError(
            "flowsheet", "no recycle loop", "a flowsheet with at least one tear stream"
        )
    tear_problem.make_start(flowsheet)
    return tear_problem


def fill_solution(
    solution: FlowsheetSolution,
    runs: list[tuple[FlowsheetPass, TearVector]],
    compiled: CompiledFlowsheet,
    tolerance: float,
) -> None:
    """Streams, block results, warnings, status and balance once the final passes are made.

    ``runs`` are the passes that computed the flowsheet (one, or one per part, all
    sharing the first one's stream states and block results) with their tear vectors;
    a tear stream is reported as its source block recomputed it. ``solution.passes`` and
    ``solution.convergence`` must be set.
    """
    states = list(runs[0][0].states)
    for runner, _ in runs:
        for index, state in zip(runner.tear_indices, runner.recomputed, strict=True):
            states[index] = state
    solution.streams = {name: states[i].copy() for i, name in enumerate(compiled.stream_names)}
    solution.blocks = dict(runs[0][0].results)
    for name, result in solution.blocks.items():
        for warning in result.warnings:
            solution.issues.append(Issue("warning", f"{name}: {warning}", block=name))
    solution.issues += _property_warnings(solution)
    for _, tears in runs:
        solution.issues += _clipping_warnings(tears)
    result = solution.convergence
    if result is None:
        solution.status, solution.converged = "solved", True
        solution.message = "solved in one pass (no recycle)"
    else:
        solution.status = _STATUS.get(result.status, "not converged")
        solution.converged = result.converged
        work = f"{solution.passes} passes"
        if len(solution.parts) > 1:
            work += f" at most per part, {solution.block_evaluations} block evaluations"
        solution.message = f"{solution.status}: {result.message}; {work}"
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
    unusable = _unusable(solution)
    if unusable is not None and solution.converged:
        # converged means the balance is usable: finite, and every closure closes
        solution.status, solution.converged = "failed", False
        solution.message = f"failed: {unusable} (the iteration itself converged)"
        solution.issues.append(Issue("error", unusable))
    elif not solution.balance.closes:
        solution.issues.append(Issue("warning", "balance: " + solution.balance.lines()[-1]))


def _clipping_warnings(tears: TearVector) -> list[Issue]:
    return [
        Issue(
            "warning",
            f"{tear}: in {count} pass(es) an accelerated step took tear flows "
            "below zero; they were clipped to zero for that pass",
            stream=tear,
        )
        for tear, count in zip(tears.tear_streams, tears.clipped, strict=True)
        if count
    ]


def _unusable(solution: FlowsheetSolution) -> str | None:
    """Why a converged solution cannot be reported as one: a non-finite value, or a
    balance that does not close. None when it is usable."""
    for name, state in solution.streams.items():
        values = {"flows": state.flows, "temperature": state.T, "pressure": state.P}
        for what, value in values.items():
            if not np.all(np.isfinite(value)):
                return f"{name}: the {what} is not a finite number"
    for name, result in solution.blocks.items():
        if result.duty_W is not None and not math.isfinite(result.duty_W):
            return f"{name}: the duty is not a finite number"
    if not solution.balance.closes:
        return "the balances do not close: " + solution.balance.lines()[-1]
    return None


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
