"""The runnable example in solve_fixed_point's docstring stays true (STYLE.md)."""

from __future__ import annotations

import doctest

import convergence.solver


def test_solve_fixed_point_example():
    finder = doctest.DocTestFinder()
    tests = finder.find(convergence.solver.solve_fixed_point, "solve_fixed_point")
    runner = doctest.DocTestRunner()
    for test in tests:
        runner.run(test)
    assert runner.summarize(verbose=False).failed == 0
    assert sum(len(test.examples) for test in tests) >= 5
