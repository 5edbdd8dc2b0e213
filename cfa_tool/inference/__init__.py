"""Standard errors and test statistics for estimated parameters."""
