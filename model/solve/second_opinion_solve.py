"""Second opinion: the flowsheet solved without tearing, every stream at once.

The sequential-modular solve (:mod:`model.solve.driver`) iterates tear streams with Wegstein's
method. This module confirms its answer by an independent route: the variables of every
stream not leaving a Feed block (component flows, T, P) are unknowns together, and
``scipy.optimize.root`` drives the residual "stream = block output(inlets)" of every
block to zero (:class:`model.solve.second_opinion_equations.StreamSystem`). It shares the block
calculations with the sequential solve, but no calculation order, tear set, Wegstein
step or starting point.

Start
    A crude estimate, never the sequential answer: the feeds carried once through the
    blocks with every stream not computed yet at zero flow at the feeds' mean T and P
    (no recycle). A check that started from the answer it checks would prove little.
Scaling
    Flows by the total feed flow, T by 1000 K, P by the feeds' mean pressure.
Methods
    ``"hybr"`` (MINPACK's Powell hybrid), then ``"lm"`` (Levenberg-Marquardt), then
    ``"krylov"`` (Newton-Krylov, no dense Jacobian) from the best point so far; above
    :data:`LARGE_SYSTEM` unknowns ``"krylov"`` first, as a dense finite-difference
    Jacobian would cost one flowsheet evaluation per unknown.
Converged
    When the largest residual of a final, strict evaluation is at most
    :data:`RESIDUAL_TOLERANCE`: relative (flows relative to their stream's total flow,
    T and P to themselves), and flows also relative to the total feed flow. That is far
    below the agreement tolerance, so a difference measures the checked answer.
Phases
    Are not numbers: they are held from the start estimate; should a block give a
    stream another phase at the root, the root is found again with the new phases.

Like the sequential solve, it reads the flowsheet only and emits none of its signals,
so the window may run it in a worker thread.

Examples
--------
>>> from model.case.file import load_case
>>> from model.solve.driver import solve_flowsheet
>>> case = load_case("examples/shift_feed_effluent_exchanger.loop.json")  # doctest: +SKIP
>>> opinion = second_opinion(case.flowsheet, solve_flowsheet(case.flowsheet))  # doctest: +SKIP
>>> opinion.converged, opinion.agrees  # doctest: +SKIP
(True, True)
"""

from __future__ import annotations

import math
import time
from dataclasses import dataclass, field

import numpy as np

from model.errors import CalculationError, InputError
from model.flowsheet.document import Flowsheet
from model.properties.stream_state import StreamState
from model.solve.compile import compile_flowsheet
from model.solve.second_opinion_equations import (
    StreamSystem,
    crude_start,
    largest_relative_difference,
)
from model.solve.solution import FlowsheetSolution
from model.validation.flowsheet_checks import PortMap, stream_phases
from model.validation.validate import validate_flowsheet

__all__ = [
    "SecondOpinion",
    "second_opinion",
    "AGREEMENT_TOLERANCE",
    "RESIDUAL_TOLERANCE",
    "LARGE_SYSTEM",
    "ROOT_METHODS",
]

#: Default largest relative difference at which two answers agree.
AGREEMENT_TOLERANCE = 1e-8
#: Largest relative residual of a converged second opinion.
RESIDUAL_TOLERANCE = 1e-11
#: Unknowns above which Newton-Krylov goes first.
LARGE_SYSTEM = 600
#: The scipy.optimize.root methods this module may use.
ROOT_METHODS = ("hybr", "lm", "krylov")
#: Root solves at most, when blocks change stream phases at the root.
PHASE_ROUNDS = 3


@dataclass
class SecondOpinion:
    """Outcome of :func:`second_opinion`.

    Attributes
    ----------
    converged
        The simultaneous solve reached :data:`RESIDUAL_TOLERANCE`.
    message
        Plain-words summary (method, evaluations, residual, agreement).
    method
        The ``scipy.optimize.root`` method that found the root (or the last one tried).
    evaluations
        Whole-flowsheet evaluations (every block once), the start estimate included.
    streams
        Every stream's state, by name, as the blocks compute it at the root.
    largest_relative_difference
        Against ``compare_with`` over every stream's flows (relative to the stream's
        total flow, with a floor of 1e-9 of the total feed flow), T and P; None
        without a solution to compare with.
    agrees
        Converged and the difference at most the tolerance; None without a comparison.
    worst
        Where the difference is largest, e.g. ``"S7 T"`` or ``"Loop gas argon"``.
    residual
        Largest residual "stream - block output" of the final evaluation (relative, see
        the module docstring).
    seconds
        Wall time of the solve.
    tolerance
        The agreement tolerance used.
    """

    converged: bool
    message: str
    method: str
    evaluations: int
    streams: dict[str, StreamState] = field(default_factory=dict)
    largest_relative_difference: float | None = None
    agrees: bool | None = None
    worst: str = ""
    residual: float = math.inf
    seconds: float = 0.0
    tolerance: float = AGREEMENT_TOLERANCE


def second_opinion(
    flowsheet: Flowsheet,
    compare_with: FlowsheetSolution | None = None,
    tolerance: float = AGREEMENT_TOLERANCE,
    methods: tuple[str, ...] | None = None,
) -> SecondOpinion:
    """Solve ``flowsheet`` with every stream at once and compare with ``compare_with``.

    Parameters
    ----------
    flowsheet
        Read only; no signal is emitted.
    compare_with
        A solution of the same flowsheet (usually the sequential-modular one); it is
        only compared with, never used as a start.
    tolerance
        Largest relative difference at which the two answers agree.
    methods
        ``scipy.optimize.root`` methods to try in order (from :data:`ROOT_METHODS`);
        default: see the module docstring.

    Returns
    -------
    SecondOpinion
        Not converged (with the reason) rather than an exception when the flowsheet
        needs input or a block cannot compute.
    """
    if not (isinstance(tolerance, (int, float)) and math.isfinite(tolerance) and tolerance > 0):
        raise InputError("tolerance", tolerance, "a finite number > 0")
    if methods is not None and (not methods or any(m not in ROOT_METHODS for m in methods)):
        raise InputError("methods", methods, "a non-empty tuple of: " + ", ".join(ROOT_METHODS))
    began = time.perf_counter()
    errors = [issue for issue in validate_flowsheet(flowsheet) if issue.is_error]
    if errors:
        message = f"needs input: {len(errors)} problem(s); first: {errors[0].message}"
        return SecondOpinion(False, message, "", 0)
    from model.properties.property_method import case_basis

    basis = case_basis(flowsheet)
    compiled = compile_flowsheet(flowsheet, basis)
    named_phases = stream_phases(flowsheet, PortMap(flowsheet))
    known_phases = {compiled.stream_index[n]: p for n, p in named_phases.items()}
    system = StreamSystem(
        compiled, basis, [named_phases.get(n, "vapor") for n in compiled.stream_names]
    )
    if methods is None:
        methods = ROOT_METHODS if system.size <= LARGE_SYSTEM else ("krylov", "hybr")
    try:
        opinion = _solve(system, known_phases, methods)
    except CalculationError as error:
        opinion = SecondOpinion(False, f"failed: {error}", "", system.evaluations)
    opinion.seconds = time.perf_counter() - began
    opinion.tolerance = float(tolerance)
    if compare_with is not None and compare_with.streams and opinion.streams:
        _compare(opinion, compare_with, list(basis.names), system.flow_floor, tolerance)
    return opinion


def _solve(
    system: StreamSystem, known_phases: dict[int, str], methods: tuple[str, ...]
) -> SecondOpinion:
    """Root of the stream system from the crude start; phases re-fixed if they change."""
    start = crude_start(system, known_phases)
    for index in system.unknown:
        system.phases[index] = start[index].phase
    z = system.pack(start)
    method, changed = "", []
    for _ in range(PHASE_ROUNDS):
        z, method = _find_root(system, z, methods)
        at_root = system.states(z)
        final = system.outputs(at_root, strict=True)
        changed = [i for i in system.unknown if final[i].phase != system.phases[i]]
        if not changed:
            break
        for index in changed:
            system.phases[index] = final[index].phase
    residual, where = system.residual_measure(at_root, final)
    converged = residual <= RESIDUAL_TOLERANCE and not changed
    route = "no root search needed" if method.startswith("none") else "by scipy.optimize.root"
    message = (
        f"{'solved' if converged else 'not converged'}: every stream at once "
        f"({system.size} unknowns) {route} '{method}' in "
        f"{system.evaluations} evaluations; largest residual {residual:.2g}"
    )
    if not converged:
        message += f" at {where}" if not changed else "; stream phases kept changing"
    streams = system.named({**system.fixed, **final})
    return SecondOpinion(
        converged,
        message,
        method,
        system.evaluations,
        {n: s.copy() for n, s in streams.items()},
        residual=residual,
    )


def _options(method: str, size: int) -> dict:
    """Tolerances well below :data:`RESIDUAL_TOLERANCE` (the own check decides)."""
    if method == "hybr":
        return {"xtol": 1e-13, "maxfev": 50 * (size + 1)}
    if method == "lm":
        return {"xtol": 1e-13, "ftol": 1e-15, "maxiter": 50 * (size + 1)}
    return {"fatol": 1e-14, "maxiter": 100, "line_search": "armijo"}


def _residual_at(system: StreamSystem, z: np.ndarray) -> float:
    """Largest residual at ``z`` (lenient blocks; :meth:`StreamSystem.residual_measure`)."""
    if not np.all(np.isfinite(z)):
        return math.inf
    states = system.states(z)
    return system.residual_measure(states, system.outputs(states, strict=False))[0]


def _find_root(
    system: StreamSystem, z: np.ndarray, methods: tuple[str, ...]
) -> tuple[np.ndarray, str]:
    """``z`` at the root: each method in turn from the best point so far."""
    from scipy.optimize import root  # imported when a second opinion is asked for

    if system.size == 0:
        return z, "none (no stream to solve for)"
    best, best_residual = z, _residual_at(system, z)
    if best_residual <= RESIDUAL_TOLERANCE:  # no recycle: the start is the answer
        return best, "none (start estimate exact)"
    for method in methods:
        try:
            with np.errstate(all="ignore"):
                found = root(
                    system.residual, best, method=method, options=_options(method, system.size)
                )
        except (ValueError, np.linalg.LinAlgError):
            # e.g. krylov's "Jacobian inversion yielded zero vector": this method found
            # nothing from here; the next one starts from the best point so far
            continue
        residual = _residual_at(system, found.x)
        if residual < best_residual:
            best, best_residual = np.array(found.x, dtype=float), residual
        if residual <= RESIDUAL_TOLERANCE:
            return best, method
    return best, methods[-1]


def _compare(
    opinion: SecondOpinion,
    solution: FlowsheetSolution,
    component_names: list[str],
    flow_floor: float,
    tolerance: float,
) -> None:
    """Fill the difference, the worst variable and the verdict against ``solution``."""
    if list(solution.component_names) != component_names:
        difference, worst = math.inf, "component list"
    else:
        difference, worst = largest_relative_difference(
            opinion.streams, solution.streams, component_names, flow_floor
        )
    opinion.largest_relative_difference = difference
    opinion.worst = worst
    opinion.agrees = bool(opinion.converged and difference <= tolerance)
    verdict = "agrees with" if opinion.agrees else "does not agree with"
    opinion.message += (
        f"; {verdict} the {solution.status} solution: largest relative difference "
        f"{difference:.2g}{f' at {worst}' if worst else ''} (tolerance {tolerance:g})"
    )
