"""The sequential-modular solve driver: passes, tears, statuses, and what it must not do.

Expected flows are derived by hand in the comments (steady-state mole balances over
the loops); convergence behaviour follows SciPy's convention (a tighter tolerance gives
a smaller residual; failing to converge is a result, not an exception).
"""

from __future__ import annotations

import json

import numpy as np
import pint
import pytest

import model.solve.driver
import model.solve.tear_problem
from convergence import SolverSettings
from model.flowsheet.document import Flowsheet
from model.flowsheet.spec_values import ComponentAmounts, Reaction, StreamEstimate, TypedQuantity
from model.properties.components import lookup_component
from model.properties.stream_state import StreamState
from model.solve.driver import solve_flowsheet
from model.solve.passes import TearVector
from model.solve.solution import FlowsheetSolution
from units_of_measure.registry import ureg

ISOMERISATION = Reaction({"n-butane": -1, "isobutane": 1}, "n-butane", 0.3, "isomerisation")


def _base(feed: dict[str, float], T=400.0) -> Flowsheet:
    sheet = Flowsheet()
    for name in ("n-butane", "isobutane", "nitrogen"):
        sheet.add_component(lookup_component(name))
    sheet.add_block(
        "Feed",
        "F",
        specs={
            "flows": ComponentAmounts(feed, "mol/s"),
            "T": TypedQuantity(T, "K"),
            "P": TypedQuantity(5.0, "bar"),
        },
    )
    return sheet


def _nested() -> Flowsheet:
    """Inner loop M2 -> R -> S -> M2 (unreacted butane) inside the outer loop through T1.

    The outer splitter T1 recycles half of the separator's second outlet (isobutane and
    nitrogen) to M1. Hand balances (F_A = 1 n-butane, F_N = 0.5 nitrogen, X = 0.3):
    n-butane only leaves by reacting, so all of it reacts; at R's inlet
    a = F_A / X = 3.333 mol/s; the inner recycle is a (1 - X) = 2.333 mol/s. Everything
    else leaves by T1's purge half: T1 inlet = 2 (F_A + F_N) = 3 mol/s, so the outer
    recycle is 1.5 mol/s = 1 isobutane + 0.5 nitrogen.
    """
    sheet = _base({"n-butane": 1.0, "nitrogen": 0.5})
    sheet.add_block("Mixer", "M1")
    sheet.add_block("Mixer", "M2")
    sheet.add_block(
        "Reactor", "R", specs={"reactions": [ISOMERISATION], "T": TypedQuantity(400.0, "K")}
    )
    sheet.add_block(
        "Separator",
        "S",
        specs={
            "split": ComponentAmounts({"n-butane": 1.0}, "fraction to first outlet"),
            "phase1": "vapor",
            "phase2": "vapor",
            "T1": TypedQuantity(380.0, "K"),
        },
    )
    sheet.add_block("Splitter", "T1", specs={"fractions": {"out1": 0.5}})
    sheet.add_block("Product", "P")
    sheet.connect("F", "out", "M1", "in1", "feed")
    sheet.connect("M1", "out", "M2", "in1", "S1")
    sheet.connect("M2", "out", "R", "in", "S2")
    sheet.connect("R", "out", "S", "in", "S3")
    sheet.connect("S", "out1", "M2", "in2", "inner recycle")
    sheet.connect("S", "out2", "T1", "in", "S4")
    sheet.connect("T1", "out1", "M1", "in2", "outer recycle")
    sheet.connect("T1", "out2", "P", "in", "product")
    return sheet


def _exchanger_loops() -> Flowsheet:
    """Two loops that share only the exchanger (two tears), coupled by its heat."""
    sheet = _base({"n-butane": 1.0}, T=300.0)
    sheet.add_block(
        "Feed",
        "F2",
        specs={
            "flows": ComponentAmounts({"nitrogen": 2.0}, "mol/s"),
            "T": TypedQuantity(300.0, "K"),
            "P": TypedQuantity(3.0, "bar"),
        },
    )
    for side, feed in (("hot", "F"), ("cold", "F2")):
        sheet.add_block("Mixer", f"M {side}")
        sheet.add_block("Splitter", f"T {side}", specs={"fractions": {"out1": 0.6}})
        sheet.add_block("Product", f"P {side}")
        sheet.connect(feed, "out", f"M {side}", "in1")
        sheet.connect(f"T {side}", "out1", f"M {side}", "in2", f"{side} recycle")
        sheet.connect(f"T {side}", "out2", f"P {side}", "in")
    sheet.add_block("Heater", "H", specs={"T": TypedQuantity(600.0, "K")})
    sheet.add_block("Exchanger", "X", specs={"cold_T": TypedQuantity(450.0, "K")})
    sheet.connect("M hot", "out", "H", "in")
    sheet.connect("H", "out", "X", "hot_in")
    sheet.connect("X", "hot_out", "T hot", "in")
    sheet.connect("M cold", "out", "X", "cold_in")
    sheet.connect("X", "cold_out", "T cold", "in")
    return sheet


def test_flowsheet_without_recycle_solves_in_one_pass():
    sheet = _base({"n-butane": 1.0})
    sheet.add_block("Reactor", "R", specs={"reactions": [ISOMERISATION], "mode": "adiabatic"})
    sheet.add_block("Product", "P")
    sheet.connect("F", "out", "R", "in")
    sheet.connect("R", "out", "P", "in")
    solution = solve_flowsheet(sheet)
    assert (solution.status, solution.passes, solution.convergence) == ("solved", 1, None)
    assert solution.tear_streams == [] and solution.calculation_order == ["F", "R", "P"]
    assert solution.balance.closes


def test_nested_loops_converge_to_the_hand_balance():
    solution = solve_flowsheet(_nested())
    assert solution.status == "solved", solution.message
    streams = solution.streams
    assert streams["inner recycle"].flows == pytest.approx([1.0 / 0.3 * 0.7, 0, 0], rel=1e-7)
    assert streams["outer recycle"].flows == pytest.approx([0, 1.0, 0.5], rel=1e-7)
    assert streams["product"].flows == pytest.approx([0, 1.0, 0.5], rel=1e-7)
    closures = solution.balance.closures
    assert max(closures.values()) < solution.convergence.history.records[-1].settings.tolerance


def test_loops_coupled_by_an_exchanger_converge_with_every_method():
    answers = {}
    for method in ("wegstein", "direct", "broyden"):
        solution = solve_flowsheet(_exchanger_loops(), method=method)
        assert solution.status == "solved", (method, solution.message)
        assert len(solution.tear_streams) == 2
        assert solution.balance.closes
        # hot loop: M = F / (1 - 0.6) = 2.5 mol/s; cold loop 2 / 0.4 = 5 mol/s
        assert solution.streams["hot recycle"].flows.sum() == pytest.approx(1.5, rel=1e-7)
        assert solution.streams["cold recycle"].flows.sum() == pytest.approx(3.0, rel=1e-7)
        answers[method] = solution.streams["hot recycle"].T
    assert answers["direct"] == pytest.approx(answers["wegstein"], rel=1e-6)
    assert answers["broyden"] == pytest.approx(answers["wegstein"], rel=1e-6)


def test_tighter_tolerance_gives_smaller_residual_and_closure():
    results = []
    for tolerance in (1e-4, 1e-10):
        settings = SolverSettings()
        # Fixed q bounds, the residual rule, two direct steps: slower, so the tolerance
        # matters.
        settings.update(
            tolerance=tolerance,
            q_min=-2.0,
            adaptive_bounds=False,
            stop_on="residual",
            early_acceleration=False,
        )
        solution = solve_flowsheet(_nested(), settings=settings)
        assert solution.converged
        results.append(
            (solution.convergence.largest_residual, max(solution.balance.closures.values()))
        )
        assert max(solution.balance.closures.values()) < tolerance
    assert results[1][0] < results[0][0]
    assert results[1][1] < results[0][1]


def test_iteration_limit_gives_not_converged_and_the_balance_flags_it():
    settings = SolverSettings()
    settings.update(max_iterations=2)
    solution = solve_flowsheet(_nested(), settings=settings)
    assert solution.status == "not converged" and not solution.converged
    assert solution.passes == 4  # start pass, 2 iterations, final pass
    assert not solution.balance.closes and "mass" in solution.balance.failing
    assert "DOES NOT CLOSE" in " ".join(solution.balance.lines())
    assert any(i.message.startswith("balance:") for i in solution.issues)


def test_callback_can_stop_the_solve():
    seen = []
    solution = solve_flowsheet(_nested(), callback=lambda record: seen.append(record) or True)
    assert solution.status == "stopped" and len(seen) == 1
    assert solution.streams  # the last iterate's streams are still reported


def test_preferred_tears_with_estimates_at_the_answer_converge_at_once():
    sheet = _nested()
    # the separator's first outlet is at its set 380 K, the second at the inlet's 400 K
    sheet.set_estimate("inner recycle", StreamEstimate({"n-butane": 0.7 / 0.3}, 380.0, 5e5))
    sheet.set_estimate(
        "outer recycle", StreamEstimate({"isobutane": 1.0, "nitrogen": 0.5}, 400.0, 5e5)
    )
    sheet.set_preferred_tear("inner recycle", True)
    sheet.set_preferred_tear("outer recycle", True)
    solution = solve_flowsheet(sheet)
    assert solution.tear_streams == ["inner recycle", "outer recycle"]
    assert solution.converged and solution.convergence.iterations == 1
    assert solution.passes == 2  # no start pass: every tear has an estimate


def test_needs_input_is_a_result_not_an_exception():
    sheet = _nested()
    sheet.block("R").specs.pop("reactions")
    solution = solve_flowsheet(sheet)
    assert solution.status == "needs input" and solution.streams == {}
    assert any(i.block == "R" and i.field == "reactions" for i in solution.issues)


def test_solve_neither_changes_the_flowsheet_nor_emits_its_signals():
    sheet = _nested()
    before = {name: dict(b.specs) for name, b in sheet.blocks.items()}
    streams_before = [(s.name, s.source, s.target, s.estimate) for s in sheet.streams.values()]
    emitted = []
    for name in (
        "block_added",
        "block_removed",
        "block_renamed",
        "block_moved",
        "block_specs_changed",
        "stream_added",
        "stream_removed",
        "stream_renamed",
        "stream_changed",
        "components_changed",
        "structure_changed",
    ):
        getattr(sheet, name).connect(lambda *args, signal=name: emitted.append(signal))
    solve_flowsheet(sheet)
    assert emitted == []
    assert {name: b.specs for name, b in sheet.blocks.items()} == before
    assert [
        (s.name, s.source, s.target, s.estimate) for s in sheet.streams.values()
    ] == streams_before


def test_no_pint_quantity_is_created_in_a_pass(monkeypatch):
    """After compile, every pass runs on floats: pint's Quantity constructor must not run."""
    real_compile = model.solve.tear_problem.compile_flowsheet
    calls = []

    def refuse(cls, *args, **kwargs):
        raise AssertionError("a pint Quantity was created during a flowsheet pass")

    def compile_then_forbid_pint(*args, **kwargs):
        compiled = real_compile(*args, **kwargs)
        calls.append(True)
        monkeypatch.setattr(pint.Quantity, "__new__", refuse)
        return compiled

    monkeypatch.setattr(model.solve.tear_problem, "compile_flowsheet", compile_then_forbid_pint)
    solution = solve_flowsheet(_exchanger_loops())
    assert calls and solution.status == "solved" and solution.passes > 3
    with pytest.raises(AssertionError, match="pint Quantity"):
        ureg.Quantity(1.0, "m")  # the trap was armed, and catches the project's registry


def test_negative_tear_flows_are_clipped_and_reported():
    # Splitter loop with half recycled; the estimate puts 1 mol/s of isobutane, which is
    # not fed, in the recycle: x0 = 1, x1 = g(x0) = 0.5 (direct step), g(x1) = 0.25.
    # The first accelerated step with q held at -2 gives x2 = -2 (0.5) + 3 (0.25) = -0.25:
    # below zero, so the pass clips it. Then the bounds are freed (live settings) and
    # Wegstein converges to the answer, 0 mol/s of isobutane and 1 mol/s of n-butane.
    sheet = _base({"n-butane": 1.0})
    sheet.add_block("Mixer", "M")
    sheet.add_block("Splitter", "T", specs={"fractions": {"out1": 0.5}})
    sheet.add_block("Product", "P")
    sheet.connect("F", "out", "M", "in1")
    sheet.connect("M", "out", "T", "in")
    sheet.connect("T", "out1", "M", "in2", "recycle")
    sheet.connect("T", "out2", "P", "in", "product")
    sheet.set_estimate("recycle", StreamEstimate({"isobutane": 1.0}, 400.0, 5e5))
    settings = SolverSettings()
    settings.update(q_min=-2.0, q_max=-2.0, direct_steps=1)

    def free_the_bounds(record):
        if record.iteration == 2:
            settings.update(q_min=-5.0, q_max=0.0)

    solution = solve_flowsheet(sheet, settings=settings, callback=free_the_bounds)
    assert solution.converged, solution.message
    assert solution.streams["recycle"].flows == pytest.approx([1.0, 0.0, 0.0], abs=1e-9)
    assert any(i.stream == "recycle" and "clipped to zero" in i.message for i in solution.issues)


def test_tear_vector_layout_and_floors():
    tears = TearVector(["A", "B"], ["x", "y"])
    assert tears.variable_names == ["A x", "A y", "A T", "A P", "B x", "B y", "B T", "B P"]
    assert tears.slices == {"A": slice(0, 4), "B": slice(4, 8)}
    flow_floor = 1e-9 * 1000.0 + 1e-12
    assert tears.abs_floor(1000.0) == pytest.approx(
        [flow_floor] * 2 + [1.0, 1.0] + [flow_floor] * 2 + [1.0, 1.0], rel=1e-15
    )
    states = [
        StreamState(np.array([1.0, -2.0]), 300.0, 1e5, "vapor"),
        StreamState(np.array([0.0, 3.0]), 310.0, 2e5, "liquid"),
    ]
    tears.phases = ["vapor", "liquid"]
    back = tears.unpack(tears.pack(states))
    assert back[0].flows.tolist() == [1.0, 0.0] and tears.clipped == [1, 0]
    assert (back[1].T, back[1].P, back[1].phase) == (310.0, 2e5, "liquid")


def test_solution_round_trips_through_json():
    sheet = _nested()
    solution = solve_flowsheet(sheet)
    data = json.loads(json.dumps(solution.to_dict()))
    again = FlowsheetSolution.from_dict(data, sheet)
    assert again.to_dict() == solution.to_dict()
    assert again.basis.names == solution.basis.names
    assert again.convergence.history.residuals(solution.tear_streams[0]).tolist() == (
        solution.convergence.history.residuals(solution.tear_streams[0]).tolist()
    )
    assert again.balance.closes == solution.balance.closes


def test_generated_chain_of_loops_solves_and_closes():
    """The benchmark's generator (tests/benchmarks/flowsheet_generator.py), small: each
    loop's splitter returns half, so at steady state each loop carries twice what enters
    it (mixer balance m = f + m / 2) and the product equals the feed."""
    from tests.benchmarks.flowsheet_generator import generate_flowsheet

    sheet = generate_flowsheet(blocks=30, loops=3, components=5)
    assert len(sheet.blocks) == 30
    solution = solve_flowsheet(sheet)
    assert solution.status == "solved", solution.message
    assert len(solution.tear_streams) == 3 and solution.balance.closes
    feed = solution.streams["M1 in"].flows.sum()
    assert solution.streams["recycle 2"].flows.sum() == pytest.approx(feed, rel=1e-7)
    assert solution.streams["product"].flows.sum() == pytest.approx(feed, rel=1e-7)
