"""Errors of the model layer, on top of the project's one hierarchy."""

from __future__ import annotations

from units_of_measure.errors import InputError, LoopwrightError, UnitError

__all__ = ["LoopwrightError", "InputError", "UnitError"]


# ---- case files (helper "case") --------------------------------------------------
from dataclasses import dataclass  # noqa: E402
from typing import Any  # noqa: E402


def _short_repr(value: Any, limit: int = 80) -> str:
    text = repr(value)
    return text if len(text) <= limit else text[: limit - 3] + "..."


@dataclass(frozen=True)
class CaseProblem:
    """One problem found in a case file: where (JSON path), what was there, what is allowed."""

    path: str
    value: Any
    allowed: str

    def __str__(self) -> str:
        return f"{self.path}: {_short_repr(self.value)} is not allowed; {self.allowed}"


class CaseFileError(LoopwrightError):
    """A case file that cannot be read or written, with every problem found at once.

    Parameters
    ----------
    source
        The file (or "case data") the problems were found in.
    problems
        Each problem with its JSON path, the value found and what is allowed.
    """

    def __init__(self, source: str, problems: list[CaseProblem]) -> None:
        self.source = source
        self.problems = list(problems)
        count = len(self.problems)
        heading = f"{source}: {count} problem{'s' if count != 1 else ''} in the case file"
        super().__init__("\n  ".join([heading, *(str(p) for p in self.problems)]))


__all__ += ["CaseProblem", "CaseFileError"]


# ---- components and property data (helper "components") -------------------------
class ComponentNotFoundError(InputError):
    """A component name, formula or CAS number that the property database does not know.

    Parameters
    ----------
    query
        What the user typed.
    suggestions
        Close matches among known component names, best first (may be empty).
    """

    def __init__(self, query: str, suggestions: list[str]) -> None:
        self.suggestions = list(suggestions)
        allowed = "a component name, formula or CAS number known to the chemicals database"
        if self.suggestions:
            allowed += "; did you mean " + " or ".join(repr(s) for s in self.suggestions) + "?"
        super().__init__("component", query, allowed)


class ComponentDataError(InputError):
    """A component found in the database but missing a value the property basis needs."""


__all__ += ["ComponentNotFoundError", "ComponentDataError"]


# ---- block calculations (helper "model") -----------------------------------------
class CalculationError(LoopwrightError):
    """A block that cannot compute its outlets from its inlets and specs.

    For example a conversion that needs more of a reactant than is present, or a duty
    put into a zero flow. ``block`` names the block (None when the failure belongs to no
    one block); the message says what and why.
    """

    def __init__(self, block: str | None, detail: str) -> None:
        self.block = block
        self.detail = detail
        super().__init__(detail if block is None else f"{block}: {detail}")


__all__ += ["CalculationError"]
