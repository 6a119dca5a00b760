"""Tests of model.blocks."""
