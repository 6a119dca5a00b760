"""Numerical methods for fixed-point problems x = g(x) on plain numpy vectors."""
