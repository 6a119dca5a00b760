"""Length limits of the text the unit layer reads, checked before any parsing.

pint's unit parser takes time that grows with the square of the text's length (a
100,000-character unit took over 12 s), so every text this package parses is refused
above a stated length first. The limits are generous for real input: the longest unit a
process engineer types (``"Btu/lbmol/degF"``, ``"kcal/h/K"``) has under 20 characters,
and 200 characters parse in milliseconds. The case-file reader and the window import
these constants so that they refuse or cut input at the same numbers.
"""

from __future__ import annotations

from .errors import TextTooLongError

__all__ = ["MAX_UNIT_TEXT_LENGTH", "MAX_QUANTITY_TEXT_LENGTH", "check_text_length"]

#: Longest unit text read, in characters (e.g. ``"kmol/h"``, ``"MMBtu/h"``).
MAX_UNIT_TEXT_LENGTH = 200
#: Longest quantity text read, in characters: a number, spaces and a unit (``"25 degC"``).
MAX_QUANTITY_TEXT_LENGTH = 300


def check_text_length(
    text: str,
    field: str,
    limit: int,
    what: str = "text",
    error: type[TextTooLongError] = TextTooLongError,
) -> None:
    """Refuse ``text`` longer than ``limit`` characters, naming the field and both lengths.

    Parameters
    ----------
    text
        The text about to be read.
    field
        Where it was given (``"Feed.T"``), named in the message.
    limit
        Most characters allowed, e.g. :data:`MAX_UNIT_TEXT_LENGTH`.
    what
        What the text is, for the message (``"unit text"``).
    error
        The class raised; the unit layer raises a :class:`~.errors.UnitError` kind of it.

    Raises
    ------
    TextTooLongError
        ``field: 'kmol/hkmol/h'... (100000 characters) is not allowed; unit text is
        limited to 200 characters (this has 100000)``.
    """
    if len(text) > limit:
        raise error(field, text, limit, what)
