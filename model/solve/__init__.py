"""The solve: topology and tears, compiling, the tear problem, the sequential-modular
driver, the solution with its balance closures, the second opinion, and targets met by
an outer loop."""

from model.lazy import lazy_face

__getattr__, __dir__, __all__ = lazy_face(
    __name__,
    {
        "BalanceReport": "model.solve.balance",
        "FlowsheetSolution": "model.solve.solution",
        "SecondOpinion": "model.solve.second_opinion_solve",
        "TearProblem": "model.solve.tear_problem",
        "Topology": "model.solve.topology",
        "analyse_topology": "model.solve.topology",
        "build_tear_problem": "model.solve.tear_problem",
        "prepare_tear_problem": "model.solve.tear_problem",
        "second_opinion": "model.solve.second_opinion_solve",
        "solve_flowsheet": "model.solve.driver",
        "solve_with_targets": "model.solve.targets",
    },
)
