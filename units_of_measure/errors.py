"""The one exception hierarchy of Loopwright.

It lives in the bottom layer so that every package above can raise and catch the same
classes; ``model.errors`` re-exports it and adds the model's own specific errors.
"""

from __future__ import annotations

from typing import Any

#: Longest value text shown in full in a message; a longer one is cut and its length given.
SHOWN_VALUE_LENGTH = 80


def shown_value(value: Any) -> str:
    """``repr(value)`` for a message, cut to about :data:`SHOWN_VALUE_LENGTH` characters.

    A 100,000-character text must not turn into a 100,000-character message: long text
    is shown by its start and its length, ``'kmol/hkmol/h'... (100000 characters)``.
    """
    text = repr(value)
    if len(text) <= SHOWN_VALUE_LENGTH:
        return text
    if isinstance(value, str):
        return f"{value[: SHOWN_VALUE_LENGTH // 2]!r}... ({len(value)} characters)"
    return f"{text[:SHOWN_VALUE_LENGTH]}..."


class LoopwrightError(Exception):
    """Base class of every error Loopwright raises on purpose."""


class InputError(LoopwrightError, ValueError):
    """A value supplied by the user (or a file) that is not allowed.

    Parameters
    ----------
    field
        Where the value was given, e.g. ``"R1.conversion"`` or ``"blocks[2].spec.T"``.
    value
        The offending value as given (kept whole; the message shows a long one cut short).
    allowed
        What would have been accepted, in words.
    """

    def __init__(self, field: str, value: Any, allowed: str) -> None:
        self.field = field
        self.value = value
        self.allowed = allowed
        super().__init__(f"{field}: {shown_value(value)} is not allowed; {allowed}")


class UnitError(InputError):
    """Text that is not a quantity, or a quantity of the wrong dimension."""


class TextTooLongError(InputError):
    """Text longer than its field allows, refused before it is read.

    ``length`` and ``limit`` are the text's length and the most characters allowed; both
    are in ``allowed``, so a caller that re-raises with ``allowed`` keeps them (see
    :func:`units_of_measure.limits.check_text_length`).
    """

    def __init__(self, field: str, text: str, limit: int, what: str = "text") -> None:
        self.length = len(text)
        self.limit = limit
        allowed = f"{what} is limited to {limit} characters (this has {self.length})"
        super().__init__(field, text, allowed)


class UnitTextTooLongError(TextTooLongError, UnitError):
    """Unit or quantity text over its length limit; a :class:`UnitError` for the editors."""
