"""Small flowsheets the block tests share: feeds into one block, each outlet to a product.

Every block test needs the same frame around the block it tests; building it here keeps
the tests to the numbers they check.
"""

from __future__ import annotations

from collections.abc import Iterable, Mapping

from model.flowsheet.document import Flowsheet
from model.flowsheet.spec_values import ComponentAmounts, TypedQuantity


def feed_specs(
    flows: Mapping[str, float],
    T: float,
    P: float,
    phase: str | None = None,
    unit: str = "mol/s",
) -> dict:
    """A Feed block's specs: component flows in ``unit``, T (K), P (Pa), optional phase."""
    specs = {
        "flows": ComponentAmounts(dict(flows), unit),
        "T": TypedQuantity(T, "K"),
        "P": TypedQuantity(P, "Pa"),
    }
    if phase is not None:
        specs["phase"] = phase
    return specs


def one_block_sheet(
    components: Iterable,
    kind: str,
    name: str,
    specs: dict,
    feeds: Mapping[str, tuple[str, dict]],
    outlets: Mapping[str, str],
) -> Flowsheet:
    """Feeds -> block ``name`` of ``kind`` -> one product per outlet.

    ``feeds`` maps each inlet port to (stream name, Feed specs); ``outlets`` maps each
    outlet port to its stream name. Feeds are named F1, F2 …, products P1, P2 ….
    """
    sheet = Flowsheet()
    for component in components:
        sheet.add_component(component)
    sheet.add_block(kind, name, specs=specs)
    for number, (port, (stream, spec)) in enumerate(feeds.items(), start=1):
        sheet.add_block("Feed", f"F{number}", specs=spec)
        sheet.connect(f"F{number}", "out", name, port, stream)
    for number, (port, stream) in enumerate(outlets.items(), start=1):
        sheet.add_block("Product", f"P{number}")
        sheet.connect(name, port, f"P{number}", "in", stream)
    return sheet
