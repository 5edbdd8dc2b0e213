"""Workflows that call the fitting pipeline several times: comparison, invariance, replication."""
