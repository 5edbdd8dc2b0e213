"""Shared numerics: linear algebra, distribution functions, the bivariate normal, BLAS threads and
plain (JSON-ready) values.  Pure functions; every other layer may use them."""
