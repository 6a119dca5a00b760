"""The solve part by part: order of the parts, their cost, their records and their results.

Expected flows are hand balances (steady state around each loop) worked out in the
comments; the order of the parts is checked against networkx's own condensation; the
whole answer against the second opinion (scipy.optimize.root on every stream at once).
"""

from __future__ import annotations

import json

import networkx as nx
import numpy as np
import pytest

from convergence import SolverSettings
from model.case.document import Case
from model.case.file import case_from_json, case_to_json
from model.solve.driver import solve_flowsheet
from model.solve.part_order import OUTSIDE_LOOPS, solve_steps
from model.solve.part_results import PartRecord
from model.solve.second_opinion_solve import second_opinion
from model.solve.topology import analyse_topology
from tests.benchmarks.flowsheet_generator import generate_flowsheet
from tests.benchmarks.loop_alone import loop_alone


def _chain(loops: int, size: int = 5, components: int = 4):
    return generate_flowsheet(2 + size * loops, loops, components)


def test_steps_keep_each_part_together_where_the_calculation_order_interleaves_them():
    # Loop A = MA -> TA -> HA -> MA; TA's second outlet feeds D, outside every loop. With
    # D given before HA, the calculation order puts D between the loop's blocks, yet the
    # loop must be converged before D is computed.
    blocks = ["FA", "MA", "TA", "D", "HA", "P"]
    streams = [
        ("a1", "FA", "MA"),
        ("a2", "MA", "TA"),
        ("a3", "TA", "HA"),
        ("recycle", "HA", "MA"),
        ("a4", "TA", "D"),
        ("a5", "D", "P"),
    ]
    topology = analyse_topology(blocks, streams)
    assert topology.calculation_order == ["FA", "MA", "TA", "D", "HA", "P"]
    steps = solve_steps(blocks, streams, topology.tear_streams, topology.calculation_order)
    assert [(s.label, s.blocks, s.tear_streams) for s in steps] == [
        (OUTSIDE_LOOPS, ["FA"], []),
        ("part 1 of 1", ["MA", "TA", "HA"], ["recycle"]),
        (OUTSIDE_LOOPS, ["D", "P"], []),
    ]
    # Reference: networkx's condensation has the same parts, in a topological order.
    graph = nx.DiGraph([(source, target) for _, source, target in streams])
    condensed = nx.condensation(graph)
    parts = [set(condensed.nodes[n]["members"]) for n in nx.topological_sort(condensed)]
    assert {"MA", "TA", "HA"} in parts
    assert parts.index({"MA", "TA", "HA"}) < parts.index({"D"})


def test_loops_in_series_are_converged_one_after_another_to_the_hand_balance():
    # Each generated loop recycles half of its splitter inlet and converts 20 % of the
    # n-butane: around loop k's mixer a = F + 0.5 (0.8) a, so a = F / 0.6, and 0.5 (0.8) a
    # = (2/3) F leaves with the splitter's other half. Fed 5 mol/s: 5 (2/3)^k after k loops.
    sheet = _chain(3)
    solution = solve_flowsheet(sheet)
    assert solution.status == "solved", solution.message
    assert [part.label for part in solution.parts] == [f"part {k} of 3" for k in (1, 2, 3)]
    assert [part.tear_streams for part in solution.parts] == [[t] for t in solution.tear_streams]
    for k, part in enumerate(solution.parts, start=1):
        assert part.convergence.converged and set(part.blocks) == {
            f"M{k}",
            f"R{k}",
            f"H{2 * k - 1}",
            f"H{2 * k}",
            f"T{k}",
        }
        outlet = solution.streams[f"M{k + 1} in" if k < 3 else "product"].flows[0]
        assert outlet == pytest.approx(5.0 * (2.0 / 3.0) ** k, rel=1e-8)
    # Cost: a part's pass computes its own 5 blocks; feed and product are computed once.
    assert solution.block_evaluations == 5 * sum(p.passes for p in solution.parts) + 2
    assert [p.block_evaluations for p in solution.parts] == [5 * p.passes for p in solution.parts]
    assert solution.passes == max(part.passes for part in solution.parts)
    # The combined result: the parts' records in order, iterations numbered on.
    combined = solution.convergence
    assert combined.iterations == sum(p.convergence.iterations for p in solution.parts)
    assert [r.iteration for r in combined.history.records] == list(
        range(1, combined.iterations + 1)
    )
    assert [r.part for r in combined.history.records] == [
        p.label for p in solution.parts for _ in range(p.convergence.iterations)
    ]
    for part in solution.parts:
        tear = part.tear_streams[0]
        np.testing.assert_array_equal(
            combined.history.residuals(tear), part.convergence.history.residuals(tear)
        )
    assert set(combined.diagnosis) == set(solution.tear_streams)


def test_the_part_by_part_answer_agrees_with_the_second_opinion():
    sheet = _chain(3)
    solution = solve_flowsheet(sheet, settings=SolverSettings(tolerance=1e-12))
    opinion = second_opinion(sheet, compare_with=solution)
    assert opinion.converged and opinion.agrees, opinion.message


@pytest.mark.parametrize("loops", [10, 30, 100])
def test_loops_in_series_cost_the_passes_of_the_slowest_loop_alone(loops):
    # Issue 14: the whole solve within 2 passes of its slowest loop solved alone (from the
    # same inlets), in passes and in block evaluations per block. The slowest loop is the
    # one that needed the most passes in the chain; alone it can only need as many, so
    # comparing with it is at least as strict as comparing with the slowest of all.
    sheet = generate_flowsheet(2 + 10 * loops, loops, 20)
    solution = solve_flowsheet(sheet, settings=SolverSettings(max_iterations=200))
    assert solution.status == "solved", solution.message
    assert all(part.convergence.status == "converged" for part in solution.parts)
    slowest = max(solution.parts, key=lambda part: part.passes)
    alone_sheet = loop_alone(sheet, solution, slowest.blocks)
    alone = solve_flowsheet(alone_sheet)
    assert alone.status == "solved", alone.message
    assert solution.passes <= alone.passes + 2
    per_block = solution.block_evaluations / len(sheet.blocks)
    assert per_block <= alone.block_evaluations / len(alone_sheet.blocks) + 2


def test_progress_records_name_their_part_and_a_stop_in_one_part_ends_the_iteration():
    sheet = _chain(3)
    seen = []

    def callback(record):
        seen.append(record)
        return record.part == "part 2 of 3" and record.part_iteration == 2

    solution = solve_flowsheet(sheet, callback=callback)
    assert solution.status == "stopped"
    assert all(isinstance(record, PartRecord) for record in seen)
    assert [r.iteration for r in seen] == list(range(1, len(seen) + 1))
    assert seen[-1].part == "part 2 of 3" and seen[-1].part_iteration == 2
    first, second, third = solution.parts
    assert first.convergence.converged and second.convergence.status == "stopped"
    assert third.convergence is None  # passed once from its start, not iterated
    assert np.isfinite(solution.streams["product"].flows).all()
    assert "part 2 of 3" in solution.message


def test_a_settings_change_made_during_one_part_reaches_the_parts_after_it():
    sheet = _chain(3)
    settings = SolverSettings()

    def callback(record):
        if record.part == "part 1 of 3" and record.part_iteration == 1:
            settings.update(q_min=-8.0)

    solution = solve_flowsheet(sheet, settings=settings, callback=callback)
    assert solution.status == "solved"
    later = [r for r in solution.convergence.history.records if r.part != "part 1 of 3"]
    assert later and all(r.settings.q_min == -8.0 for r in later)
    assert solution.convergence.history.events_of("settings changed")[0].iteration == 2


def test_parts_are_saved_in_the_case_file_and_old_results_without_parts_still_load():
    sheet = _chain(2)
    solution = solve_flowsheet(sheet)
    case = Case(flowsheet=sheet, solution=solution)
    reopened = case_from_json(case_to_json(case)).solution
    assert [
        (p.label, p.blocks, p.tear_streams, p.passes, p.block_evaluations) for p in reopened.parts
    ] == [
        (p.label, p.blocks, p.tear_streams, p.passes, p.block_evaluations) for p in solution.parts
    ]
    assert reopened.block_evaluations == solution.block_evaluations
    for before, after in zip(solution.parts, reopened.parts, strict=True):
        assert after.convergence.status == before.convergence.status
        assert after.convergence.iterations == before.convergence.iterations
        np.testing.assert_array_equal(after.convergence.x, before.convergence.x)
        tear = before.tear_streams[0]
        np.testing.assert_array_equal(
            after.convergence.history.residuals(tear), before.convergence.history.residuals(tear)
        )
    assert [r.part for r in reopened.convergence.history.records] == [
        r.part for r in solution.convergence.history.records
    ]
    # A case saved before parts existed: no "parts", no "block_evaluations".
    document = json.loads(case_to_json(case))
    del document["results"]["parts"], document["results"]["block_evaluations"]
    old = case_from_json(json.dumps(document)).solution
    assert old.parts == [] and old.block_evaluations == 0
    assert old.convergence.iterations == solution.convergence.iterations
    np.testing.assert_array_equal(old.convergence.x, solution.convergence.x)


def test_a_part_that_reaches_the_iteration_limit_ends_the_iteration_there():
    # Direct substitution shrinks each loop's error by its slope per pass: 0.5 (half is
    # recycled; n-butane 0.5 x 0.8 = 0.4), so 3 iterations cannot reach 1e-8.
    sheet = _chain(3)
    solution = solve_flowsheet(sheet, "direct", SolverSettings(max_iterations=3))
    assert solution.status == "not converged"
    first, second, third = solution.parts
    assert first.convergence.status == "not converged" and first.convergence.iterations == 3
    assert second.convergence is None and third.convergence is None
    assert solution.message.startswith("not converged: part 1 of 3 (tears ")
    assert "2 part(s) downstream passed once, not converged" in solution.message
    assert solution.convergence.iterations == 3 and len(solution.convergence.x) == 6
    assert np.isfinite(solution.streams["product"].flows).all()
