"""Whole-flowsheet checks before a solve: every problem at once, and the block badges."""

from model.lazy import lazy_face

__getattr__, __dir__, __all__ = lazy_face(
    __name__,
    {
        "Issue": "model.validation.issue",
        "block_state": "model.validation.validate",
        "block_states": "model.validation.validate",
        "validate_flowsheet": "model.validation.validate",
    },
)
