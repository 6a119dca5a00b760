"""Element counts from chemical formulas.

Reactions are checked for element balance from the components' formulas, so the parser
must be strict: an unknown element symbol or a stray character is an error that names
the formula, never a silently dropped atom.
"""

from __future__ import annotations

import functools
import re

from chemicals.elements import periodic_table

from model.errors import InputError
from model.limits import FORMULA_LENGTH_LIMIT, check_length

_TOKEN = re.compile(r"([A-Z][a-z]?)|(\d+(?:\.\d+)?|\.\d+)|([(\[])|([)\]])|(\s+)|(.)")
_CLOSING = {"(": ")", "[": "]"}
_ALLOWED = (
    "a formula of element symbols with optional counts and brackets, e.g. 'CH4', 'Ca(OH)2', 'C2H6O'"
)


def parse_formula(formula: str) -> dict[str, float]:
    """Count the atoms of each element in a chemical formula.

    Parameters
    ----------
    formula
        Element symbols with optional counts; round or square brackets group atoms and
        may carry a count (``"Ca(OH)2"``, ``"K4[Fe(CN)6]"``). Decimal counts are allowed
        for pseudo-components (``"CH1.8O0.5"``).

    Returns
    -------
    dict[str, float]
        Element symbol to count, in order of first appearance, e.g. ``{"C": 1.0, "H": 4.0}``.

    Raises
    ------
    InputError
        ``field="formula"`` for an empty formula, an unknown element symbol, a character
        that is not part of a formula, unbalanced brackets or a zero count.

    Examples
    --------
    >>> parse_formula("Ca(OH)2")
    {'Ca': 1.0, 'O': 2.0, 'H': 2.0}
    """
    if not isinstance(formula, str):
        raise InputError("formula", formula, _ALLOWED)
    check_length("formula", formula, FORMULA_LENGTH_LIMIT)
    return dict(_parse_cached(formula))


@functools.lru_cache(maxsize=4096)
def _parse_cached(formula: str) -> tuple[tuple[str, float], ...]:
    """Parse once per distinct formula; the cache holds immutable pairs."""
    counts = _parse_tokens(formula)
    if not counts:
        raise InputError("formula", formula, _ALLOWED)
    return tuple(counts.items())


def _parse_tokens(formula: str) -> dict[str, float]:
    """Walk the tokens with a stack of open groups; multiply a group by its count."""
    stack: list[tuple[str, dict[str, float]]] = [("", {})]
    last: dict[str, float] | None = None  # what a following count multiplies
    for match in _TOKEN.finditer(formula):
        symbol, number, opening, closing, space, other = match.groups()
        if symbol is not None:
            if symbol not in periodic_table:
                raise InputError(
                    "formula", formula, f"{_ALLOWED}; {symbol!r} is not an element symbol"
                )
            last = {symbol: 1.0}
            _add(stack[-1][1], last)
        elif number is not None:
            count = float(number)
            if last is None or count <= 0.0:
                raise InputError(
                    "formula", formula, f"{_ALLOWED}; a positive count follows an element or ')'"
                )
            _add(stack[-1][1], {element: n * (count - 1.0) for element, n in last.items()})
            last = None
        elif opening is not None:
            stack.append((opening, {}))
            last = None
        elif closing is not None:
            if len(stack) == 1 or _CLOSING[stack[-1][0]] != closing:
                raise InputError("formula", formula, f"{_ALLOWED}; brackets must balance")
            _, group = stack.pop()
            if not group:
                raise InputError("formula", formula, f"{_ALLOWED}; brackets must hold atoms")
            _add(stack[-1][1], group)
            last = group
        elif space is not None:
            raise InputError("formula", formula, f"{_ALLOWED}; no spaces")
        else:
            raise InputError("formula", formula, f"{_ALLOWED}; {other!r} is not allowed")
    if len(stack) != 1:
        raise InputError("formula", formula, f"{_ALLOWED}; brackets must balance")
    return stack[0][1]


def _add(into: dict[str, float], counts: dict[str, float]) -> None:
    """Add element counts into a running total."""
    for element, n in counts.items():
        into[element] = into.get(element, 0.0) + n


def molar_mass_of(elements: dict[str, float]) -> float:
    """Molar mass in kg/mol from element counts (standard atomic weights in chemicals)."""
    return sum(periodic_table[element].MW * n for element, n in elements.items()) / 1000.0
