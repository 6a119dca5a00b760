"""What a sweep varies and records, read from the text the user writes.

A *variation* gives one spec (an address of :mod:`model.flowsheet.target_definition`)
and its values, in one of three forms (``--vary`` on the command line, the sweep
dialog's text fields)::

    SPEC=START:STOP:N          N values from START to STOP, evenly spaced
    SPEC=START:STOP:N:log      N values from START to STOP, evenly spaced in log
    SPEC=V1,V2,V3              the values listed

each optionally followed by a space and the unit of the values (``"Loop cooler.T=-30:0:7
degC"``); without one, the values are in the spec's own unit as typed ("" for fractions
and conversions). A record is a result address (``Recycle gas.mole_fraction[argon]``).
With two variations the sweep is a grid: every value of the first with every value of
the second. Text that cannot be read is named in the error, token by token.
"""

from __future__ import annotations

import itertools
import math
from dataclasses import dataclass

import numpy as np

from model.errors import InputError
from model.flowsheet.target_definition import (
    ResultAddress,
    SpecAddress,
    parse_result_address,
    parse_spec_address,
)
from model.limits import NAME_LENGTH_LIMIT

#: Most points a sweep may have (a grid of 10,000 solves is a long afternoon already).
MAX_POINTS = 10_000
VARY_FORMS = "SPEC=START:STOP:N, SPEC=START:STOP:N:log or SPEC=V1,V2,... (then an optional unit)"


@dataclass(frozen=True)
class Variation:
    """One varied spec: its address, its values (in ``unit``; "" for the spec's own)."""

    address: SpecAddress
    values: tuple[float, ...]
    unit: str = ""
    text: str = ""

    @property
    def label(self) -> str:
        return str(self.address) + (f" [{self.unit}]" if self.unit else "")


def _number(token: str, text: str) -> float:
    try:
        value = float(token)
    except ValueError:
        allowed = f"could not read {token!r} as a number; {VARY_FORMS}"
        raise InputError("--vary", text, allowed) from None
    if not math.isfinite(value):
        raise InputError("--vary", text, f"{token!r} is not a finite number")
    return value


def _tidy(values: np.ndarray) -> tuple[float, ...]:
    """Range values to 12 significant digits (0.01, not 0.010000000000000002)."""
    return tuple(float(f"{value:.12g}") for value in values)


def _range(parts: list[str], text: str) -> tuple[float, ...]:
    if len(parts) not in (3, 4):
        raise InputError(
            "--vary", text, f"a range is START:STOP:N or START:STOP:N:log; {VARY_FORMS}"
        )
    start, stop = _number(parts[0], text), _number(parts[1], text)
    if not parts[2].strip().isdigit() or not 1 <= int(parts[2]) <= MAX_POINTS:
        raise InputError(
            "--vary", text, f"could not read {parts[2]!r} as a count N from 1 to {MAX_POINTS}"
        )
    count = int(parts[2])
    if len(parts) == 3:
        return _tidy(np.linspace(start, stop, count))
    if parts[3].strip() not in ("log", "lin"):
        raise InputError("--vary", text, f"could not read {parts[3]!r}; 'log' or 'lin'")
    if parts[3].strip() == "lin":
        return _tidy(np.linspace(start, stop, count))
    if start <= 0.0 or stop <= 0.0:
        raise InputError("--vary", text, "a log range needs START and STOP above 0")
    return _tidy(np.geomspace(start, stop, count))


def parse_variation(text: str) -> Variation:
    """Read ``--vary`` text (module docstring); InputError names what could not be read."""
    if not isinstance(text, str) or len(text) > 20 * NAME_LENGTH_LIMIT:
        raise InputError("--vary", text, VARY_FORMS)
    if "=" not in text:
        raise InputError("--vary", text, f"no '=' between the spec and its values; {VARY_FORMS}")
    spec_text, values_text = text.rsplit("=", 1)
    address = parse_spec_address(spec_text.strip(), what="--vary spec")
    values_text = values_text.strip()
    if not values_text:
        raise InputError("--vary", text, f"no values after '='; {VARY_FORMS}")
    values_part, _, unit = values_text.partition(" ")
    unit = unit.strip()
    if ":" in values_part:
        values = _range(values_part.split(":"), text)
    else:
        values = tuple(_number(token.strip(), text) for token in values_part.split(","))
    return Variation(address, values, unit, text)


def parse_record(text: str) -> ResultAddress:
    """Read ``--record`` text: a result address."""
    return parse_result_address(text, what="--record")


@dataclass(frozen=True)
class SweepPlan:
    """The variations (one, or two for a grid) and the results recorded at each point."""

    variations: tuple[Variation, ...]
    records: tuple[ResultAddress, ...]

    def __post_init__(self) -> None:
        if not 1 <= len(self.variations) <= 2:
            raise InputError("--vary", len(self.variations), "one --vary, or two for a grid")
        if len(self.records) < 1:
            raise InputError("--record", "none", "at least one result to record")
        addresses = [str(v.address) for v in self.variations]
        if len(set(addresses)) != len(addresses):
            raise InputError("--vary", addresses, "two different specs for a grid")
        if self.point_count > MAX_POINTS:
            raise InputError("--vary", self.point_count, f"at most {MAX_POINTS} points in all")

    @property
    def point_count(self) -> int:
        return math.prod(len(v.values) for v in self.variations)

    def points(self) -> list[tuple[float, ...]]:
        """Every point's values, the last variation changing fastest (grid rows)."""
        return list(itertools.product(*(v.values for v in self.variations)))

    def runs(self, run_length: int) -> list[list[tuple[float, ...]]]:
        """The points cut into runs of neighbours: at most ``run_length`` points along the
        last variation, never across a grid row. Each run is solved in order, each point
        warm-started from the one before; runs are independent of one another."""
        points = self.points()
        row = len(self.variations[-1].values)
        runs = []
        for start in range(0, len(points), row):
            row_points = points[start : start + row]
            for k in range(0, len(row_points), run_length):
                runs.append(row_points[k : k + run_length])
        return runs
