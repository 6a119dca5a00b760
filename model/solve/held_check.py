"""A fixed point reached while a block's temperature search was held is no fixed point.

When a block cannot reach the enthalpy it needs between ``T_SEARCH_MIN`` and
``T_SEARCH_MAX``, a lenient pass holds its temperature at the limit
(:class:`model.blocks.held.HeldTemperature`). From then on the block's outlet, and so
the loop's output, no longer depends on the tear values: g is constant, the iteration
sees x == g(x) exactly and the run reports "converged" with a residual of 0 at a point
that balances nothing. Typically the loop was diverging (or heading for a steady state
outside the temperature range) and ran into the limit.

:class:`HeldWatch` wraps a part's pass function and notes which passes held a block;
:func:`reject_held_fixed_point` turns a "converged" result whose last pass held a block
into a "diverging" one whose message names the tears, the block, the enthalpy needed,
the range reachable and how the tears moved before the hold.
"""

from __future__ import annotations

import dataclasses

import networkx as nx
import numpy as np

from convergence import (
    ConvergenceHistory,
    Event,
    FixedPointProblem,
    FixedPointResult,
    SettingsSnapshot,
    diagnose_tears,
)
from model.blocks.held import HeldTemperature
from model.solve.compile import CompiledFlowsheet
from model.solve.passes import FlowsheetPass, TearVector

__all__ = ["HeldWatch", "reject_held_fixed_point"]


class HeldWatch:
    """The pass function of a part, watched for held temperature searches.

    Call :meth:`watched` for the problem to iterate on. ``last_free_x`` is the last
    iterate whose pass held no block, ``free_evaluations`` how many evaluations came
    before the current run of held passes began.
    """

    def __init__(self, problem: FixedPointProblem, runner: FlowsheetPass) -> None:
        self._g = problem.g
        self.runner = runner
        self.problem = problem
        self.evaluations = 0
        self.free_evaluations = 0
        self.first_x = np.array(problem.x0, dtype=float)
        self.last_free_x = self.first_x

    def watched(self) -> FixedPointProblem:
        """The problem with g replaced by the watching one."""
        return dataclasses.replace(self.problem, g=self)

    def __call__(self, x: np.ndarray) -> np.ndarray:
        gx = self._g(x)
        self.evaluations += 1
        if not self.runner.held:
            self.free_evaluations = self.evaluations
            self.last_free_x = np.array(x, dtype=float)
        return gx


def _tears_fed_by(compiled: CompiledFlowsheet, runner: FlowsheetPass, block: str) -> list[str]:
    """Tears of the part whose recomputed value depends on ``block``'s outlets."""
    graph = nx.DiGraph()
    producer = {}
    for step_block, _, _, outlets in runner.steps:
        graph.add_node(step_block.name)
        for _, index, tear in outlets:
            if tear is None:
                producer[index] = step_block.name
    for step_block, _, inlets, _ in runner.steps:
        for index in inlets:
            if index in producer:
                graph.add_edge(producer[index], step_block.name)
    reached = nx.descendants(graph, block) | {block}
    names = compiled.stream_names
    return [
        names[index]
        for step_block, _, _, outlets in runner.steps
        if step_block.name in reached
        for _, index, tear in outlets
        if tear is not None
    ]


def _movement(watch: HeldWatch, tears: TearVector, tear: str, block: str) -> str:
    """How the tear's temperature moved from the start to the last pass without a hold."""
    index = tears.slices[tear].stop - 2  # T sits after the component flows
    start, end = float(watch.first_x[index]), float(watch.last_free_x[index])
    return (
        f"over {watch.free_evaluations} iterations the tear's temperature went from "
        f"{start:.6g} K to {end:.6g} K, out of the range where {block} has a solution"
    )


def reject_held_fixed_point(
    result: FixedPointResult,
    watch: HeldWatch,
    held: list[tuple[str, HeldTemperature]],
    tears: TearVector,
    compiled: CompiledFlowsheet,
    settings: SettingsSnapshot,
) -> FixedPointResult:
    """``result`` unless it converged at a pass that held a block; else a diverging result.

    ``held`` lists the blocks held in the last pass (that of ``result.x``). The diagnosis
    of every tear the held block feeds is replaced: it is not converging, and its advice
    is the reason; the other tears keep their diagnosis from the passes before the hold.
    """
    if not (result.converged and held):
        return result
    block, warning = held[0]
    fed = _tears_fed_by(compiled, watch.runner, block) or list(tears.tear_streams)
    records = result.history.records[: watch.free_evaluations]
    before = diagnose_tears(ConvergenceHistory(records=list(records)), settings, tears.tear_streams)
    others = f" ({len(held) - 1} other temperature search(es) held too)" if len(held) > 1 else ""
    message = (
        f"not a fixed point (tear {', '.join(fed)}): the loop was diverging: "
        f"{_movement(watch, tears, fed[0], block)}; in the last pass {block}: "
        f"{warning.explanation()}{others}; the loop's output then no longer depended on the "
        "tear values, so x = g(x) held exactly without a balance"
    )
    diagnosis = dict(before)
    for tear in fed:
        diagnosis[tear] = dataclasses.replace(
            before[tear],
            converging=False,
            advice=f"diverging into a held temperature: {block}: {warning.explanation()}",
        )
    events = [e for e in result.history.events if e.kind != "converged"]
    events.append(Event(result.iterations, "diverging", message))
    return dataclasses.replace(
        result,
        converged=False,
        status="diverging",
        message=message,
        diagnosis=diagnosis,
        history=dataclasses.replace(result.history, events=events),
    )
