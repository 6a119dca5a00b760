"""Checking the JSON of a case file, collecting every problem with its JSON path.

The readers here never stop at the first problem: each one records what it finds in a
:class:`Problems` list (JSON path, value found, what is allowed) and returns ``None``
for a part it could not read, so the caller can go on and report the rest.
``model.case.file`` turns a non-empty list into one ``CaseFileError``.
"""

from __future__ import annotations

import json
import math
import re
from collections.abc import Iterable
from typing import Any

from model.errors import CaseProblem
from model.limits import NAME_LENGTH_LIMIT, shown

_IDENTIFIER = re.compile(r"^[A-Za-z_][A-Za-z0-9_]*$")
MISSING = object()  # marks a key absent from a JSON object


class JSONObject(dict):
    """A JSON object that remembers the keys the file gave more than once."""

    duplicate_keys: tuple[str, ...] = ()


def json_object_hook(pairs: list[tuple[str, Any]]) -> JSONObject:
    """``json.loads`` hook keeping duplicate keys visible (plain JSON keeps only the last)."""
    result = JSONObject()
    duplicates: list[str] = []
    for key, value in pairs:
        if key in result and key not in duplicates:
            duplicates.append(key)
        result[key] = value
    result.duplicate_keys = tuple(duplicates)
    return result


def join(path: str, key: str | int) -> str:
    """JSON path of ``key`` inside ``path``: ``blocks[2]``, ``blocks[2].specs``,
    ``values["carbon dioxide"]``."""
    if isinstance(key, int):
        return f"{path}[{key}]"
    if _IDENTIFIER.match(key):
        return f"{path}.{key}" if path else key
    return f"{path}[{json.dumps(key, ensure_ascii=False)}]"


class Problems:
    """The problems found so far in one case file."""

    def __init__(self) -> None:
        self.items: list[CaseProblem] = []
        self.unread_blocks: set[str] = set()  # named blocks already reported as unreadable

    def __len__(self) -> int:
        return len(self.items)

    def add(self, path: str, value: Any, allowed: str) -> None:
        self.items.append(CaseProblem(path or "(top level)", value, allowed))

    def add_error(self, path: str, error: Exception, value: Any = MISSING) -> None:
        """Record an error raised by a checking function (InputError-like or any other)."""
        allowed = getattr(error, "allowed", None)
        found = getattr(error, "value", value) if value is MISSING else value
        if allowed is None:
            allowed = f"it could not be read ({type(error).__name__}: {error})"
        self.add(path, None if found is MISSING else found, str(allowed))

    # ---- readers of JSON values: return None (after recording) when not allowed ------
    def object(
        self,
        path: str,
        value: Any,
        known: Iterable[str] | None = None,
        required: Iterable[str] = (),
    ) -> dict[str, Any] | None:
        """``value`` as a JSON object; flag duplicate, unknown and missing keys."""
        if value is MISSING:  # a missing required key is reported once, by its parent
            return None
        if not isinstance(value, dict):
            self.add(path, value, "a JSON object {...} is needed here")
            return None
        for key in getattr(value, "duplicate_keys", ()):
            self.add(join(path, key), key, "each key may appear once in a JSON object")
        if known is not None:
            known = list(known)
            for key in value:
                if key not in known:
                    self.add(join(path, key), key, "a key here is one of " + ", ".join(known))
        for key in required:
            if key not in value:
                self.add(join(path, key), None, "this key is required")
        return value

    def array(self, path: str, value: Any) -> list[Any] | None:
        if value is MISSING:  # a missing required key is reported once, by object()
            return None
        if not isinstance(value, list):
            self.add(path, value, "a JSON array [...] is needed here")
            return None
        return value

    def text(
        self, path: str, value: Any, name: bool = False, limit: int = NAME_LENGTH_LIMIT
    ) -> str | None:
        """A string of at most ``limit`` characters; with ``name`` also non-empty without
        leading or trailing spaces."""
        if value is MISSING:  # a missing required key is reported once, by object()
            return None
        if not isinstance(value, str):
            self.add(path, value, "text (a JSON string) is needed here")
            return None
        if len(value) > limit:
            self.add(path, shown(value), f"at most {limit} characters (this has {len(value)})")
            return None
        if name and (not value.strip() or value != value.strip()):
            self.add(
                path, value, "a name must be non-empty text without leading or trailing spaces"
            )
            return None
        return value

    def choice(self, path: str, value: Any, choices: Iterable[str]) -> str | None:
        if value is MISSING:  # a missing required key is reported once, by object()
            return None
        choices = list(choices)
        if not isinstance(value, str) or value not in choices:
            self.add(path, value, "one of " + ", ".join(repr(c) for c in choices))
            return None
        return value

    def number(
        self, path: str, value: Any, minimum: float | None = None, positive: bool = False
    ) -> float | None:
        """A finite JSON number (not true/false), optionally ``>= minimum`` or ``> 0``."""
        if value is MISSING:  # a missing required key is reported once, by object()
            return None
        if isinstance(value, bool) or not isinstance(value, (int, float)):
            self.add(path, value, "a number is needed here")
            return None
        try:
            number = float(value)
        except OverflowError:
            self.add(path, value, "a finite number of ordinary size")
            return None
        if not math.isfinite(number):
            self.add(path, value, "a finite number (not NaN or infinity)")
            return None
        if positive and number <= 0.0:
            self.add(path, value, "a number greater than 0")
            return None
        if minimum is not None and number < minimum:
            self.add(path, value, f"a number of at least {minimum:g}")
            return None
        return number

    def fraction(self, path: str, value: Any) -> float | None:
        number = self.number(path, value)
        if number is not None and not 0.0 <= number <= 1.0:
            self.add(path, value, "a fraction must be a number between 0 and 1")
            return None
        return number

    def boolean(self, path: str, value: Any) -> bool | None:
        if value is MISSING:  # a missing required key is reported once, by object()
            return None
        if not isinstance(value, bool):
            self.add(path, value, "true or false")
            return None
        return value

    def number_map(
        self, path: str, value: Any, keys: Iterable[str], what: str, minimum: float | None = None
    ) -> dict[str, float] | None:
        """An object of ``key -> number`` whose keys are among ``keys`` (e.g. components)."""
        mapping = self.object(path, value)
        if mapping is None:
            return None
        keys = list(keys)
        result: dict[str, float] = {}
        count = len(self)
        for key, item in mapping.items():
            item_path = join(path, key)
            if key not in keys:
                listed = ", ".join(keys) if keys else "none yet"
                self.add(item_path, key, f"{what} ({listed})")
                continue
            number = self.number(item_path, item, minimum=minimum)
            if number is not None:
                result[key] = number
        return result if len(self) == count else None
