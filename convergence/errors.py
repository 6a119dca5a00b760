"""Errors raised by ``convergence`` for bad input.

``convergence`` may import numpy and scipy only (DESIGN.md, "Layers"), so it cannot use
the project's hierarchy in ``units_of_measure.errors``. These classes carry the same
three facts (field, value, what is allowed) and format the same message, and they
derive from ``ValueError`` so callers may catch them as such; ``model`` re-raises them as
its own ``InputError`` where it needs to.
"""

from __future__ import annotations

from typing import Any


class ConvergenceInputError(ValueError):
    """A problem, setting or method name that ``convergence`` cannot accept.

    Parameters
    ----------
    field
        Where the value was given, e.g. ``"q_max"`` or ``"tear_slices['S7']"``.
    value
        The offending value as given.
    allowed
        What would have been accepted, in words.
    """

    def __init__(self, field: str, value: Any, allowed: str) -> None:
        self.field = field
        self.value = value
        self.allowed = allowed
        super().__init__(field, value, allowed)

    def __str__(self) -> str:
        return f"{self.field}: {self.value!r} is not allowed; {self.allowed}"


class UnknownSettingError(ConvergenceInputError, KeyError):
    """A setting name that the solver does not know (also a ``KeyError``)."""
