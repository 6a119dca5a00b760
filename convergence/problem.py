"""The fixed-point problem x = g(x) and the per-tear measures taken on its vector.

The vector is the concatenation of every tear stream's variables; ``tear_slices`` names
the part that belongs to each tear so that residuals, q and slopes can be reported per
tear stream. The scaled residual of variable i is

    r_i = |g_i(x) - x_i| / max(scale_i, abs_floor_i)

with ``scale_i = |x_i|`` of the current iterate unless a fixed scale is given. The
absolute floor keeps trace components (flows near zero) from stalling convergence.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass

import numpy as np

from convergence.errors import ConvergenceInputError

# A variable whose step |x_k - x_{k-1}| is below this fraction of its scale gives no
# usable slope: the secant quotient would be mostly rounding error.
STEP_GUARD = 1e-12
#: Share of the distance to its lower bound that one quasi-Newton step may take a
#: variable (the fraction-to-the-boundary rule of interior-point methods).
FRACTION_TO_BOUND = 0.9


@dataclass
class FixedPointProblem:
    """A fixed-point problem x = g(x) on a float vector split into named tears.

    Attributes
    ----------
    g
        One flowsheet pass: tear vector -> recomputed tear vector (same length). It
        receives the iterate read-only and must not keep it (copy what it stores).
    x0
        Start vector.
    tear_slices
        ``{tear name: slice}``; together the slices must cover every variable once.
    abs_floor
        Per-variable (or one) positive absolute floor of the residual scale.
    variable_names
        One name per variable, e.g. ``"S7 T"``, used in messages.
    scale
        Optional fixed positive scale per variable (or one); ``None`` scales each
        variable by its current magnitude ``|x_i|``.
    step_guard
        Optional absolute step per variable (or one) at or below which
        ``|x_k - x_{k-1}|`` gives no slope (that variable takes q = 0 clipped to the
        bounds); ``None``: ``STEP_GUARD`` times the variable's scale, so that trace
        components keep their acceleration while steps at rounding level give none.
    lower_bound
        Optional value per variable (or one) that the variables lie above (e.g. 0 for
        flows, temperatures and pressures); a quasi-Newton step that would cross it
        is shortened to go at most :data:`FRACTION_TO_BOUND` of the way there, so an
        overshoot along a poorly estimated direction cannot jump far past it. ``None``:
        no bound.
    """

    g: Callable[[np.ndarray], np.ndarray]
    x0: np.ndarray
    tear_slices: dict[str, slice]
    abs_floor: np.ndarray | float = 1e-10
    variable_names: list[str] | None = None
    scale: np.ndarray | float | None = None
    step_guard: np.ndarray | float | None = None
    lower_bound: np.ndarray | float | None = None

    def __post_init__(self) -> None:
        TearLayout(self)


def _positive_vector(field: str, value: object, size: int, zero_allowed=False) -> np.ndarray:
    kind = "non-negative" if zero_allowed else "positive"
    try:
        vector = np.broadcast_to(np.asarray(value, dtype=float), (size,)).copy()
    except (TypeError, ValueError):
        raise ConvergenceInputError(
            field, value, f"a {kind} number or a vector of {size} {kind} numbers"
        ) from None
    low_enough = vector >= 0.0 if zero_allowed else vector > 0.0
    if not np.all(np.isfinite(vector) & low_enough):
        raise ConvergenceInputError(field, value, f"{kind} finite numbers only")
    return vector


def _bound_vector(problem: FixedPointProblem, size: int) -> np.ndarray:
    try:
        vector = np.broadcast_to(np.asarray(problem.lower_bound, dtype=float), (size,)).copy()
    except (TypeError, ValueError):
        raise ConvergenceInputError(
            "lower_bound", problem.lower_bound, f"a number or a vector of {size} numbers"
        ) from None
    if np.any(np.isnan(vector) | (vector == np.inf)):
        raise ConvergenceInputError(
            "lower_bound", problem.lower_bound, "finite numbers (or -inf: no bound) only"
        )
    return vector


def _check_cover(tear_slices: dict[str, slice], size: int) -> None:
    if not tear_slices:
        raise ConvergenceInputError("tear_slices", tear_slices, "at least one named slice")
    counts = np.zeros(size, dtype=int)
    for name, part in tear_slices.items():
        if not isinstance(part, slice):
            raise ConvergenceInputError(f"tear_slices[{name!r}]", part, "a slice")
        indices = np.arange(size)[part]
        if indices.size == 0:
            raise ConvergenceInputError(
                f"tear_slices[{name!r}]", part, f"a non-empty slice of 0..{size - 1}"
            )
        counts[indices] += 1
    if np.any(counts != 1):
        first = int(np.flatnonzero(counts != 1)[0])
        raise ConvergenceInputError(
            "tear_slices",
            tear_slices,
            f"slices covering each of the {size} variables exactly once "
            f"(variable {first} is covered {counts[first]} times)",
        )


class TearLayout:
    """A checked problem with the per-tear measures used by the solver (O(n) each).

    Parameters
    ----------
    problem
        The problem to check; its arrays are not modified.
    """

    def __init__(self, problem: FixedPointProblem) -> None:
        x0 = np.asarray(problem.x0, dtype=float)
        if x0.ndim != 1 or x0.size == 0:
            raise ConvergenceInputError("x0", problem.x0, "a non-empty one-dimensional vector")
        if not np.all(np.isfinite(x0)):
            raise ConvergenceInputError("x0", problem.x0, "finite numbers only")
        if not callable(problem.g):
            raise ConvergenceInputError("g", problem.g, "a function of the tear vector")
        self.size = x0.size
        _check_cover(problem.tear_slices, self.size)
        self.g = problem.g
        self.x0 = x0.copy()
        self.tear_slices = dict(problem.tear_slices)
        self.tears = list(self.tear_slices)
        self._tear_number = np.empty(self.size, dtype=np.intp)
        for number, part in enumerate(self.tear_slices.values()):
            self._tear_number[part] = number
        self.abs_floor = _positive_vector("abs_floor", problem.abs_floor, self.size)
        self.fixed_scale = (
            None
            if problem.scale is None
            else np.maximum(_positive_vector("scale", problem.scale, self.size), self.abs_floor)
        )
        self.step_guard = (
            None
            if problem.step_guard is None
            else _positive_vector("step_guard", problem.step_guard, self.size, zero_allowed=True)
        )
        self.lower_bound = (
            None if problem.lower_bound is None else _bound_vector(problem, self.size)
        )
        names = problem.variable_names
        if names is not None and len(names) != self.size:
            raise ConvergenceInputError(
                "variable_names", f"{len(names)} names", f"one name per variable ({self.size})"
            )
        self.variable_names = list(names) if names is not None else None

    def scale_of(self, x: np.ndarray) -> np.ndarray:
        """Per-variable residual scale at iterate ``x``."""
        if self.fixed_scale is not None:
            return self.fixed_scale
        return np.maximum(np.abs(x), self.abs_floor)

    def checked_output(self, value: object) -> np.ndarray:
        """g's output copied as a float vector of the problem's length, or raise.

        The copy keeps the history safe from a g that reuses its output buffer.
        """
        gx = np.array(value, dtype=float)
        if gx.shape != (self.size,):
            raise ConvergenceInputError(
                "g(x)", f"shape {gx.shape}", f"a vector of {self.size} numbers, like x0"
            )
        return gx

    def per_tear_max(self, values: np.ndarray) -> dict[str, float]:
        """Largest entry of ``values`` within each tear."""
        return {tear: float(values[part].max()) for tear, part in self.tear_slices.items()}

    def tear_of(self, index: int) -> str:
        """Name of the tear holding variable ``index``."""
        return self.tears[self._tear_number[index]]

    def describe(self, index: int) -> str:
        """Plain-words name of variable ``index`` with its tear, for messages."""
        tear = self.tear_of(index)
        if self.variable_names is not None:
            return f"{self.variable_names[index]} (tear {tear}, variable {index})"
        return f"variable {index} of tear {tear}"

    def name_of(self, index: int) -> str:
        """Short name of variable ``index``."""
        if self.variable_names is not None:
            return self.variable_names[index]
        return f"{self.tear_of(index)}[{index}]"

    def usable_steps(self, step: np.ndarray, scale: np.ndarray) -> np.ndarray:
        """Mask of variables whose step is large enough to give a secant slope."""
        if self.step_guard is not None:
            return np.abs(step) > self.step_guard
        return np.abs(step) > STEP_GUARD * scale

    def tear_slopes(
        self, step: np.ndarray, g_step: np.ndarray, scale: np.ndarray, usable: np.ndarray
    ) -> dict[str, float | None]:
        """Dominant slope of g along the last step, per tear.

        The per-variable secant slopes ``g_step_i / step_i`` over the usable steps,
        weighted by the squared scaled step, i.e. ``<g_step, step> / <step, step>`` in
        the scaled norm. Over direct-substitution steps this is the ratio of successive
        difference vectors, which tends to the dominant eigenvalue of g's Jacobian on
        that tear.
        """
        scaled_step = (step / scale) * usable
        scaled_g_step = g_step / scale
        slopes: dict[str, float | None] = {}
        for tear, part in self.tear_slices.items():
            weight = float(np.dot(scaled_step[part], scaled_step[part]))
            if weight == 0.0:
                slopes[tear] = None
            else:
                slopes[tear] = float(np.dot(scaled_g_step[part], scaled_step[part]) / weight)
        return slopes
