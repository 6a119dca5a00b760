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
