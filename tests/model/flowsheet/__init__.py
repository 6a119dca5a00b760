"""Tests of model.flowsheet."""
