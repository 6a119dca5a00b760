"""Layering: units_of_measure stands alone and pulls in no Qt or model code."""

from __future__ import annotations

import subprocess
import sys

FORBIDDEN_TOP_LEVEL = ("PySide6", "pyqtgraph", "gui", "model", "convergence")


def test_importing_units_of_measure_pulls_in_no_qt_or_model_code() -> None:
    # run in a fresh interpreter so other tests' imports do not count
    script = (
        "import sys, units_of_measure\n"
        f"forbidden = {FORBIDDEN_TOP_LEVEL!r}\n"
        "print(sorted(m for m in sys.modules if m.split('.')[0] in forbidden))\n"
    )
    result = subprocess.run(
        [sys.executable, "-c", script], capture_output=True, text=True, check=True
    )
    assert result.stdout.strip() == "[]"


def test_conversions_return_plain_floats_and_arrays() -> None:
    # the numerical layers must never receive a pint Quantity
    import numpy as np

    from units_of_measure import from_internal_array, parse_to_internal, to_internal

    assert type(parse_to_internal("25 degC", "temperature")) is float
    assert type(to_internal(5, "kW", "power")) is float
    assert type(from_internal_array([1.0, 2.0], "power", "kW")) is np.ndarray
