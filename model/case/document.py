"""A case: one flowsheet with everything needed to solve it again and show it the same way.

A case is what a ``*.loop.json`` file holds (see ``model.case.file``): the flowsheet
(components, blocks with their specs as typed and their diagram positions, streams),
the solver settings and method, the display unit system, a title and notes, and
optionally the last solution with its convergence history.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any

from convergence.settings import SolverSettings
from model.flowsheet.document import Flowsheet

DEFAULT_METHOD = "wegstein"
DEFAULT_UNIT_SYSTEM = "Metric"


@dataclass(eq=False)
class Case:
    """Everything a case file holds.

    Attributes
    ----------
    flowsheet
        Components, blocks and streams.
    settings
        Live solver settings (q bounds, tolerance, iteration limit, ...).
    method
        Name of the convergence method, a key of ``convergence.METHODS``.
    unit_system
        Name of the display unit system, a key of ``units_of_measure.UNIT_SYSTEMS``.
    solution
        The last solution (``model.solve.driver.FlowsheetSolution``), or None when not solved.
    title, notes
        Free text for the user.
    """

    flowsheet: Flowsheet = field(default_factory=Flowsheet)
    settings: SolverSettings = field(default_factory=SolverSettings)
    method: str = DEFAULT_METHOD
    unit_system: str = DEFAULT_UNIT_SYSTEM
    solution: Any = None
    title: str = ""
    notes: str = ""

    def solve(self, callback: Any = None, start_tears: Any = None) -> Any:
        """Solve the flowsheet with the case's method and settings, its targets met
        (:func:`model.solve.targets.solve_with_targets`); keep and return the solution.

        Examples
        --------
        >>> from model.case.file import load_case
        >>> case = load_case("examples/ammonia_synthesis_loop.loop.json")  # doctest: +SKIP
        >>> case.solve().converged  # doctest: +SKIP
        True
        """
        from model.solve.targets import solve_with_targets

        self.solution = solve_with_targets(
            self.flowsheet, self.method, self.settings, callback, start_tears
        )
        return self.solution
