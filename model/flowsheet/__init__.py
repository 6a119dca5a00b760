"""The flowsheet document: components, blocks, streams, block kinds, specs and events."""

from model.lazy import lazy_face

__getattr__, __dir__, __all__ = lazy_face(
    __name__,
    {
        "BLOCK_KINDS": "model.flowsheet.kinds",
        "Block": "model.flowsheet.document",
        "BlockKind": "model.flowsheet.kinds",
        "ComponentAmounts": "model.flowsheet.spec_values",
        "Flowsheet": "model.flowsheet.document",
        "Reaction": "model.flowsheet.spec_values",
        "Signal": "model.flowsheet.events",
        "SpecField": "model.flowsheet.kinds",
        "Stream": "model.flowsheet.document",
        "StreamEstimate": "model.flowsheet.spec_values",
        "TypedQuantity": "model.flowsheet.spec_values",
        "block_kind": "model.flowsheet.kinds",
        "check_spec_value": "model.flowsheet.spec_checks",
    },
)
