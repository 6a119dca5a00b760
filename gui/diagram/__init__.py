"""The diagram editor: scene mirroring the flowsheet, items, view, block shelf, editor."""
