"""A fixed point reached while a block's temperature search was held is not accepted.

The case: the feed-effluent example with no bypass. All the converter's effluent heats
the feed and leaves at the exchanger's set hot outlet temperature, so the heat of the
exothermic shift has no way out (whole-plant energy balance: feed enthalpy + heat of
reaction = product enthalpy at a fixed temperature has no solution): the loop heats up
pass after pass until the temperature searches are held at T_SEARCH_MAX = 6000 K.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np

from convergence import SolverSettings, solve_fixed_point
from model.blocks.held import HeldTemperature
from model.case.file import load_case
from model.properties.enthalpy import T_SEARCH_MAX, T_SEARCH_MIN, PropertyBasis
from model.solve.driver import solve_flowsheet
from model.solve.tear_problem import build_tear_problem
from tests.benchmarks.recycle_cases import build_case

EXAMPLE = (
    Path(__file__).resolve().parents[3] / "examples" / "shift_feed_effluent_exchanger.loop.json"
)


def _no_bypass():
    sheet = load_case(EXAMPLE).flowsheet
    sheet.set_spec("Bypass splitter", "fractions", {"out2": 0.0})
    return sheet


def test_a_fixed_point_reached_with_a_held_temperature_is_reported_as_diverging():
    sheet = _no_bypass()
    settings = SolverSettings(max_iterations=1000)
    # The trap: once the searches are held, g is constant and direct substitution sees
    # x == g(x) exactly, a "converged" run with residual 0.
    trap = solve_fixed_point(build_tear_problem(sheet).problem, "direct", settings)
    assert trap.status == "converged" and trap.largest_residual == 0.0
    solution = solve_flowsheet(sheet, "direct", settings)
    assert not solution.converged and solution.status == "not converged"
    result = solution.convergence
    assert result.status == "diverging" and not result.converged
    for words in (
        "not a fixed point (tear Preheated gas)",
        "the loop was diverging",
        "Shift converter",
        "needed an enthalpy flow of",
        f"between {T_SEARCH_MIN:g} K and {T_SEARCH_MAX:g} K it reaches only",
        f"held at {T_SEARCH_MAX:g} K",
    ):
        assert words in result.message, words
    assert not result.diagnosis["Preheated gas"].converging
    assert "held temperature" in result.diagnosis["Preheated gas"].advice
    assert result.history.events[-1].kind == "diverging"
    errors = [issue for issue in solution.issues if issue.is_error]
    assert [issue.block for issue in errors] == ["Shift converter"]


def test_the_held_search_reports_its_own_stream_s_enthalpy_at_the_bracket_ends():
    sheet = _no_bypass()
    solution = solve_flowsheet(sheet, "direct", SolverSettings(max_iterations=1000))
    held = [
        w for w in solution.blocks["Shift converter"].warnings if isinstance(w, HeldTemperature)
    ]
    assert len(held) == 1
    warning = held[0]
    outlet = solution.streams["Shift effluent"]
    basis = PropertyBasis(sheet.components)
    low, high = (basis.stream_enthalpy_flow(outlet.flows, T, False) for T in (10.0, 6000.0))
    np.testing.assert_allclose(warning.reachable_W, (low, high), rtol=1e-12)
    assert warning.needed_W > high and warning.held_K == T_SEARCH_MAX == outlet.T


def test_the_diagnosis_does_not_blame_bounds_the_run_widened_itself():
    # The oscillating loop (slope -0.735) wants q = s / (s - 1) = 0.42 > q_max = 0: the run
    # widens q_max to 0.53 by itself (adaptive bounds) and converges, yet the diagnosis
    # still says "q_max = 0 stops it; try q_max = 0.53" (issue 14, item 3).
    # Without the early first step, which damps this one-variable loop at iteration 2
    # by itself (no widening needed), the run widens its bounds.
    settings = SolverSettings(early_acceleration=False)
    solution = solve_flowsheet(build_case("direct substitution oscillates"), "wegstein", settings)
    assert solution.status == "solved"
    widened = solution.convergence.history.events_of("settings changed")
    assert widened and widened[0].detail.startswith("adaptive bounds: q_max 0 -> 0.53")
    diagnosis = solution.convergence.diagnosis["ethylene recycle"]
    assert "stops it" not in diagnosis.advice and not diagnosis.blocked_by_bounds
