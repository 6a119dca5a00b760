"""Numerical methods for fixed-point problems x = g(x) on plain numpy vectors.

Direct substitution, bounded Wegstein (Wegstein 1958, CACM 1(6)) and a quasi-Newton
method (Broyden) behind one entry point, :func:`solve_fixed_point`, with live settings,
per-tear history and tear diagnosis. By default a run stops on the estimated error
(:mod:`convergence.stopping`), widens its own q bounds where steady slopes ask for it
(:mod:`convergence.adaptive`) and gives coupled variables their tear's dominant slope
(:mod:`convergence.coupling`). Imports numpy and scipy only.
"""

from convergence.diagnosis import (
    TearDiagnosis,
    bounds_in_force,
    diagnose_tears,
    suggested_bounds,
)
from convergence.errors import ConvergenceInputError, UnknownSettingError
from convergence.history import ConvergenceHistory, Event, IterationRecord, QStats
from convergence.problem import FixedPointProblem
from convergence.settings import SETTING_NAMES, SettingsSnapshot, SolverSettings
from convergence.solver import METHODS, STATUSES, FixedPointResult, solve_fixed_point

__all__ = [
    "METHODS",
    "SETTING_NAMES",
    "STATUSES",
    "ConvergenceHistory",
    "ConvergenceInputError",
    "Event",
    "FixedPointProblem",
    "FixedPointResult",
    "IterationRecord",
    "QStats",
    "SettingsSnapshot",
    "SolverSettings",
    "TearDiagnosis",
    "UnknownSettingError",
    "bounds_in_force",
    "diagnose_tears",
    "solve_fixed_point",
    "suggested_bounds",
]
