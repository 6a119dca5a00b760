"""Package faces whose names are imported when first used (PEP 562 ``__getattr__``).

A subpackage's ``__init__`` names its public face; importing any module of the package
runs that ``__init__`` first, so a face that imported its modules eagerly would make,
say, the window's diagram pay for the spreadsheet writer and scipy. With a lazy face,
``from model.solve import solve_flowsheet`` imports ``model.solve.driver`` then, and
only then.
"""

from __future__ import annotations

import importlib
import sys
from collections.abc import Callable
from typing import Any


def lazy_face(
    package: str, names: dict[str, str]
) -> tuple[Callable[[str], Any], Callable[[], list[str]], list[str]]:
    """``(__getattr__, __dir__, __all__)`` for ``package`` exporting ``{name: module}``."""

    def __getattr__(name: str) -> Any:
        module = names.get(name)
        if module is None:
            raise AttributeError(f"module {package!r} has no attribute {name!r}")
        value = getattr(importlib.import_module(module), name)
        setattr(sys.modules[package], name, value)  # the next look-up is a plain attribute
        return value

    def __dir__() -> list[str]:
        return sorted(set(vars(sys.modules[package])) | set(names))

    return __getattr__, __dir__, sorted(names)
