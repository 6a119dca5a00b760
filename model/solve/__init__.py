"""The solve: topology and tears, compiling, the tear problem, the sequential-modular
driver, the solution with its balance closures, and the second opinion."""

from model.solve.balance import BalanceReport
from model.solve.driver import solve_flowsheet
from model.solve.second_opinion_solve import SecondOpinion, second_opinion
from model.solve.solution import FlowsheetSolution
from model.solve.tear_problem import TearProblem, build_tear_problem, prepare_tear_problem
from model.solve.topology import Topology, analyse_topology

__all__ = [
    "BalanceReport",
    "FlowsheetSolution",
    "SecondOpinion",
    "TearProblem",
    "Topology",
    "analyse_topology",
    "build_tear_problem",
    "prepare_tear_problem",
    "second_opinion",
    "solve_flowsheet",
]
