"""Held-out variants of the recycle suite: the same loop shapes with other numbers.

The solver's defaults were tuned on :data:`tests.benchmarks.recycle_cases.CASES`; these
variants (other recycle ratios, bypasses, conversions and purge flows) show whether
what was tuned there holds elsewhere. They are invented scenarios, like the suite.
:data:`VARIANTS` maps a name to ``(builder, what it exercises)``; ``python -m
tests.benchmarks.bench_recycle_methods --variants`` runs every method on them.

| variant | dominant slope of direct substitution |
|---|---|
| single loop, recycle 0.7 / 0.95 | r |
| inert and purge, 5 % purge | 0.95 for argon |
| energy recycle, 10 % bypass | about 0.9 |
| energy recycle, 40 % bypass | about 0.6 |
| competing ethylene, f = 0.3 / 0.65 / 0.75 | -1.47 f: -0.44, -0.96, -1.10 |
| fixed purge flow of 25 mol/s | above 1 (diverges) |
| reversible isomerisation, a = b = 1/2, r = 0.8 | 0.8 and 0.2 |
| reversible isomerisation, a = 0.8, b = 0.3, r = 0.95 | 0.95 and 0.133 |
"""

from __future__ import annotations

from collections.abc import Callable

from model.flowsheet.document import Flowsheet
from model.flowsheet.spec_values import Reaction, StreamEstimate, TypedQuantity
from tests.benchmarks.recycle_cases import (
    ISOMERISATION,
    _butane_loop,
    competing_ethylene,
    energy_recycle,
    fixed_purge_flow,
    inert_and_purge,
    single_loop,
)


def _purge(fraction: float) -> Flowsheet:
    sheet = inert_and_purge()
    sheet.set_spec("Purge splitter", "fractions", {"out2": fraction})
    return sheet


def _bypass(fraction: float) -> Flowsheet:
    sheet = energy_recycle()
    sheet.set_spec("Bypass splitter", "fractions", {"out2": fraction})
    return sheet


def larger_fixed_purge() -> Flowsheet:
    """The fixed purge loop with a 25 mol/s purge.

    Steady state: the purge carries the feed's 10 mol/s plus two moles per mole cracked,
    so 7.5 mol/s crack and the loop gas is 10 % n-butane; 0.3 (10 + R) = 7.5 gives a
    recycle of 15 mol/s n-butane, 90 ethylene and 45 hydrogen. Estimated 30 % high.
    """
    sheet = fixed_purge_flow()
    sheet.set_spec("Purge splitter", "flow", TypedQuantity(25.0, "mol/s"))
    sheet.set_estimate(
        "recycle",
        StreamEstimate({"n-butane": 19.5, "ethylene": 117.0, "hydrogen": 58.5}, T=400.0, P=3.0e5),
    )
    return sheet


def _isomerisation(forward: float, backward: float, recycle_ratio: float) -> Flowsheet:
    """Eigenvalues r and r (1 - a)(1 - b); see recycle_cases.reversible_isomerisation."""
    reactions = [
        Reaction(ISOMERISATION, "n-butane", forward, "isomerisation"),
        Reaction({"isobutane": -1.0, "n-butane": 1.0}, "isobutane", backward, "reverse"),
    ]
    return _butane_loop(reactions, recycle_ratio)


VARIANTS: dict[str, tuple[Callable[[], Flowsheet], str]] = {
    "single loop, recycle 0.7": (lambda: single_loop(0.7), "slope 0.7"),
    "single loop, recycle 0.95": (lambda: single_loop(0.95), "slope 0.95"),
    "inert and purge, 5 % purge": (lambda: _purge(0.05), "argon slope 0.95"),
    "energy recycle, 10 % bypass": (lambda: _bypass(0.1), "slope about 0.9"),
    "energy recycle, 40 % bypass": (lambda: _bypass(0.4), "slope about 0.6"),
    "ethylene, f = 0.3": (lambda: competing_ethylene(0.3), "slope -0.44"),
    "ethylene, f = 0.65": (lambda: competing_ethylene(0.65), "slope -0.96"),
    "ethylene, f = 0.75": (lambda: competing_ethylene(0.75), "slope -1.10, diverges"),
    "fixed purge of 25 mol/s": (larger_fixed_purge, "slope above 1, diverges"),
    "isomerisation 1/2, 1/2, 0.8": (
        lambda: _isomerisation(0.5, 0.5, 0.8),
        "eigenvalues 0.8 and 0.2",
    ),
    "isomerisation 0.8, 0.3, 0.95": (
        lambda: _isomerisation(0.8, 0.3, 0.95),
        "eigenvalues 0.95 and 0.133",
    ),
}
