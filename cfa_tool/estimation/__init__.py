"""Discrepancy functions and the optimiser."""
