"""Tests of model.case."""
