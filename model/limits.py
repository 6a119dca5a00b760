"""Length limits of the texts a case holds (names, formulas, title, notes).

Checked before any parsing or look-up, so a pasted megabyte of text is refused at once
with its length and the limit, instead of making a look-up or a parser crawl. Unit
texts have their own limit in ``units_of_measure``.
"""

from __future__ import annotations

from model.errors import InputError

#: Names of blocks, streams, components, reactions' labels.
NAME_LENGTH_LIMIT = 200
#: A chemical formula (the longest real ones have a few dozen characters).
FORMULA_LENGTH_LIMIT = 200
#: A case's title.
TITLE_LENGTH_LIMIT = 1_000
#: A case's free notes.
NOTES_LENGTH_LIMIT = 100_000


def shown(text: str, keep: int = 40) -> str:
    """The text as an error shows it: whole when short, else its start and its length."""
    return text if len(text) <= keep else f"{text[:keep]}… ({len(text)} characters)"


def check_length(field: str, text: str, limit: int) -> str:
    """``text`` itself, or an InputError naming the field, the text's length and the limit."""
    if len(text) > limit:
        raise InputError(
            field, shown(text), f"at most {limit} characters (this text has {len(text)})"
        )
    return text
