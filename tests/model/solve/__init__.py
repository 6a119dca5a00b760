"""Tests of model.solve."""
