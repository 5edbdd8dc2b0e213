"""Simulated answers whose one-factor structure asks for a Heywood case, shared by the tests of how it is reported.

Two factors of three items; x1 correlates .8 with x2 and x3, which correlate .5, so the factor of the three asks for a
loading of x1 above 1 (r12 r13 / r23 = lambda1^2 = 1.28 for three indicators of one factor, Bollen 1989, ch. 7): a
negative residual variance of x1.  Drawn with a fixed seed (numpy's default generator)."""

from __future__ import annotations

import numpy as np

ITEMS = ["x1", "x2", "x3", "y1", "y2", "y3"]


def heywood_draws(rng: np.random.Generator, n: int = 400) -> np.ndarray:
    """``n`` rows of the six items' latent values (standard normal, the correlations above)."""
    R = np.eye(6)
    R[0, 1] = R[1, 0] = R[0, 2] = R[2, 0] = .8
    R[1, 2] = R[2, 1] = .5
    R[3:, 3:] = .49
    np.fill_diagonal(R, 1.0)
    R[:3, 3:] = R[3:, :3] = .3
    return rng.multivariate_normal(np.zeros(6), R, size=n)
