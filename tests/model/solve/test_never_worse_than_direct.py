"""Wherever direct substitution converges a flowsheet, the default converges it too.

Issue 14, item 2: generated chains of loops in series (tests/benchmarks/flowsheet_generator.py)
of several loop lengths, the single parts with several coupled loops of the recycle
suite, and its held-out variants. The closure of the answer is checked by the solve
itself (mass, elements, energy); the larger chains (30 and 100 loops, 20 components) are in
tests/benchmarks/bench_parts.py.
"""

from __future__ import annotations

import pytest

from convergence import SolverSettings
from model.solve.driver import solve_flowsheet
from tests.benchmarks.flowsheet_generator import generate_flowsheet
from tests.benchmarks.recycle_cases import build_case
from tests.benchmarks.recycle_variants import VARIANTS


def _both(sheet):
    settings = {"max_iterations": 300}
    direct = solve_flowsheet(sheet, method="direct", settings=SolverSettings(**settings))
    default = solve_flowsheet(sheet, settings=SolverSettings(**settings))
    return direct, default


@pytest.mark.parametrize("size", [8, 9, 10, 12])
def test_chain_of_ten_loops_converges_wherever_direct_substitution_does(size):
    sheet = generate_flowsheet(2 + size * 10, 10, 3)
    direct, default = _both(sheet)
    assert direct.status == "solved", direct.message
    assert default.status == "solved", default.message
    # Part by part, accelerated: fewer block evaluations than direct substitution.
    assert default.block_evaluations < direct.block_evaluations
    assert len(default.parts) >= 10


@pytest.mark.parametrize("case", ["nested loops", "interlocking loops"])
def test_coupled_loops_in_one_part_converge_wherever_direct_substitution_does(case):
    direct, default = _both(build_case(case))
    assert direct.status == "solved", direct.message
    assert default.status == "solved", default.message
    assert default.block_evaluations < direct.block_evaluations


@pytest.mark.parametrize("variant", list(VARIANTS))
def test_held_out_variants_converge_wherever_direct_substitution_does(variant):
    # Variants the defaults were not tuned on (tests/benchmarks/recycle_variants.py).
    sheet = VARIANTS[variant][0]()
    direct, default = _both(sheet)
    if direct.status != "solved":
        return  # the rule is about where direct substitution converges
    assert default.status == "solved", default.message
    assert default.block_evaluations <= direct.block_evaluations
    for name, stream in direct.streams.items():  # the same steady state
        assert default.streams[name].flows == pytest.approx(stream.flows, rel=1e-6, abs=1e-9)
