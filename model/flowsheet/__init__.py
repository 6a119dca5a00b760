"""The flowsheet document: components, blocks, streams, block kinds, specs and events."""

from model.flowsheet.document import Block, Flowsheet, Stream
from model.flowsheet.events import Signal
from model.flowsheet.kinds import BLOCK_KINDS, BlockKind, SpecField, block_kind
from model.flowsheet.spec_checks import check_spec_value
from model.flowsheet.spec_values import ComponentAmounts, Reaction, StreamEstimate, TypedQuantity

__all__ = [
    "BLOCK_KINDS",
    "Block",
    "BlockKind",
    "ComponentAmounts",
    "Flowsheet",
    "Reaction",
    "Signal",
    "SpecField",
    "Stream",
    "StreamEstimate",
    "TypedQuantity",
    "block_kind",
    "check_spec_value",
]
