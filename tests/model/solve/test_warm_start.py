"""Warm start: tear states of an earlier solution start the next solve (by stream name).

Check against a closed form derived by hand: a feed F mixed with the fraction r of what
leaves the mixer; mixer balance M = F + r M, so the recycle is R = r M = F r / (1 - r).
"""

from __future__ import annotations

import numpy as np
import pytest

from convergence import SolverSettings
from model.flowsheet.document import Flowsheet
from model.flowsheet.spec_values import ComponentAmounts, TypedQuantity
from model.properties.components import lookup_component
from model.properties.stream_state import StreamState
from model.solve.driver import solve_flowsheet

FEED = 1.0  # mol/s


def _loop(recycle_fraction: float) -> Flowsheet:
    sheet = Flowsheet()
    sheet.add_component(lookup_component("water"))
    sheet.add_block(
        "Feed",
        "F",
        specs={
            "flows": ComponentAmounts({"water": FEED}, "mol/s"),
            "T": TypedQuantity(400.0, "K"),
            "P": TypedQuantity(1.0, "bar"),
        },
    )
    for kind, name in (("Mixer", "M"), ("Splitter", "S"), ("Product", "P")):
        sheet.add_block(kind, name)
    sheet.set_spec("S", "fractions", {"out1": recycle_fraction})
    sheet.connect("F", "out", "M", "in1")
    sheet.connect("M", "out", "S", "in")
    sheet.connect("S", "out1", "M", "in2", "recycle")
    sheet.connect("S", "out2", "P", "in")
    return sheet


def _tight() -> SolverSettings:
    settings = SolverSettings()
    settings.update(tolerance=1e-12)
    return settings


def _recycle(solution) -> float:
    return float(solution.streams["recycle"].flows[0])


def test_warm_start_from_a_neighbour_reaches_the_same_closed_form_answer():
    earlier = solve_flowsheet(_loop(0.9), settings=_tight())
    sheet = _loop(0.95)
    cold = solve_flowsheet(sheet, settings=_tight())
    warm = solve_flowsheet(sheet, settings=_tight(), start_tears=earlier.streams)
    assert cold.converged and warm.converged
    expected = FEED * 0.95 / (1 - 0.95)  # closed form above
    # rtol 1e-9: both converged to 1e-12 scaled residual on a loop of slope 0.95
    assert _recycle(cold) == pytest.approx(expected, rel=1e-9)
    assert _recycle(warm) == pytest.approx(expected, rel=1e-9)
    # no start pass from zero-flow tears: the warm solve makes fewer passes
    assert warm.passes < cold.passes


def test_warm_start_at_the_answer_needs_one_iteration():
    sheet = _loop(0.5)
    first = solve_flowsheet(sheet, settings=_tight())
    again = solve_flowsheet(sheet, settings=_tight(), start_tears=first.streams)
    assert again.converged
    assert again.convergence.iterations == 1
    assert _recycle(again) == pytest.approx(FEED * 0.5 / 0.5, rel=1e-9)


def test_a_warm_state_of_another_component_list_is_ignored():
    sheet = _loop(0.5)
    wrong = {"recycle": StreamState(np.array([1.0, 2.0]), 400.0, 1e5, "vapor")}
    unknown = {"no such stream": StreamState(np.array([1.0]), 400.0, 1e5, "vapor")}
    for start in (wrong, unknown):
        solution = solve_flowsheet(sheet, settings=_tight(), start_tears=start)
        assert solution.converged
        assert _recycle(solution) == pytest.approx(1.0, rel=1e-9)
