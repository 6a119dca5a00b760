"""The one exception hierarchy of Loopwright.

It lives in the bottom layer so that every package above can raise and catch the same
classes; ``model.errors`` re-exports it and adds the model's own specific errors.
"""

from __future__ import annotations

from typing import Any


class LoopwrightError(Exception):
    """Base class of every error Loopwright raises on purpose."""


class InputError(LoopwrightError, ValueError):
    """A value supplied by the user (or a file) that is not allowed.

    Parameters
    ----------
    field
        Where the value was given, e.g. ``"R1.conversion"`` or ``"blocks[2].spec.T"``.
    value
        The offending value as given.
    allowed
        What would have been accepted, in words.
    """

    def __init__(self, field: str, value: Any, allowed: str) -> None:
        self.field = field
        self.value = value
        self.allowed = allowed
        super().__init__(f"{field}: {value!r} is not allowed; {allowed}")


class UnitError(InputError):
    """Text that is not a quantity, or a quantity of the wrong dimension."""
