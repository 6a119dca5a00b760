"""Whole-flowsheet checks before a solve: every problem at once, and the block badges."""

from model.validation.issue import Issue
from model.validation.validate import block_state, block_states, validate_flowsheet

__all__ = ["Issue", "block_state", "block_states", "validate_flowsheet"]
