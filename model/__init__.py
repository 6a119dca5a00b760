"""Model: components, streams, blocks, flowsheet, solve, case files (no Qt)."""
