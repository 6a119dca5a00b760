"""Tests of model.properties."""
