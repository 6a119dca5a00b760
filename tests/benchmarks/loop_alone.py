"""One strongly connected part of a solved flowsheet, as a flowsheet of its own.

For measuring a loop alone: :func:`loop_alone` copies the part's blocks (kinds, specs
as typed) and the streams between them, feeds every stream that enters the part from
outside by a Feed block at the state the solution gives it, and ends every stream that
leaves the part in a Product block. Solving it converges that loop exactly as it is
converged inside the whole flowsheet, from the same inlets.
"""

from __future__ import annotations

import copy

from model.flowsheet.document import Flowsheet
from model.flowsheet.spec_values import ComponentAmounts, TypedQuantity


def loop_alone(flowsheet: Flowsheet, solution, blocks: list[str]) -> Flowsheet:
    """The blocks ``blocks`` of ``flowsheet`` with their inlets fed at ``solution``'s states."""
    sheet = Flowsheet()
    for component in flowsheet.components:
        sheet.add_component(component)
    inside = set(blocks)
    for name in blocks:
        block = flowsheet.blocks[name]
        sheet.add_block(block.kind, name, specs=copy.deepcopy(block.specs))
    names = flowsheet.component_names()
    for stream in flowsheet.streams.values():
        source_in, target_in = stream.source in inside, stream.target in inside
        if source_in and target_in:
            sheet.connect(
                stream.source, stream.source_port, stream.target, stream.target_port, stream.name
            )
        elif target_in:
            state = solution.streams[stream.name]
            feed = f"feed of {stream.name}"
            specs = {
                "flows": ComponentAmounts(
                    dict(zip(names, state.flows.tolist(), strict=True)), "mol/s"
                ),
                "T": TypedQuantity(float(state.T), "K"),
                "P": TypedQuantity(float(state.P), "Pa"),
                "phase": state.phase,
            }
            sheet.add_block("Feed", feed, specs=specs)
            sheet.connect(feed, "out", stream.target, stream.target_port, stream.name)
        elif source_in:
            product = f"end of {stream.name}"
            sheet.add_block("Product", product)
            sheet.connect(stream.source, stream.source_port, product, "in", stream.name)
    return sheet
