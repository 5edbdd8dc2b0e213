"""Parameter table, model matrices, implied moments and starting values."""
