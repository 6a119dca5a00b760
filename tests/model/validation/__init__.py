"""Tests of model.validation."""
