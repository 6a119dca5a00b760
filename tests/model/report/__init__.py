"""Tests of model.report."""
