"""Integration rules over standard normal variables, for posterior means of the factors.

A rule is a set of points u_k in R^r with log-weights w_k such that
E[h(u)] ~ sum_k exp(w_k) h(u_k) for u ~ N(0, I_r):

* product Gauss-Hermite rules (probabilists' Hermite polynomials; e.g. Abramowitz & Stegun 1964,
  25.4.46), exact for polynomials of degree 2Q - 1 in each coordinate, used for 1 to 3 factors;
* randomised quasi-Monte Carlo (scrambled Sobol points, Owen 1995; u = Phi^-1 of the points), used
  for more factors, where a product grid grows too fast.  The scrambling seed is fixed, so the
  same data give the same scores.
"""

from __future__ import annotations

from dataclasses import dataclass
from enum import Enum

import numpy as np


class RuleKind(Enum):
    GAUSS_HERMITE = "Gauss-Hermite product rule"
    QUASI_MONTE_CARLO = "scrambled Sobol points (quasi-Monte Carlo)"


#: points per factor of the Gauss-Hermite rule, by number of factors integrated over; the grid is
#: centred and scaled on each row's posterior (adaptive quadrature), where few points suffice
GAUSS_HERMITE_POINTS = {1: 21, 2: 11, 3: 7}
SOBOL_POINTS_LOG2 = 12  # 4096 points for four or more factors
SOBOL_SEED = 20261202


@dataclass(frozen=True, eq=False)
class Rule:
    """A quadrature rule: its points and the logarithms of their weights."""
    kind: RuleKind
    points: np.ndarray  # (K, r)
    log_weights: np.ndarray  # (K,)

    @property
    def dimension(self) -> int:
        return self.points.shape[1]


def gauss_hermite_rule(dimension: int, points: int) -> Rule:
    """Product Gauss-Hermite rule for N(0, I_dimension) with ``points`` points per coordinate."""
    x, w = np.polynomial.hermite_e.hermegauss(points)
    w = w / np.sqrt(2.0 * np.pi)
    grids = np.meshgrid(*([x] * dimension), indexing="ij")
    weights = np.meshgrid(*([w] * dimension), indexing="ij")
    u = np.stack([g.ravel() for g in grids], axis=1)
    log_w = np.sum([np.log(g.ravel()) for g in weights], axis=0)
    return Rule(RuleKind.GAUSS_HERMITE, u, np.atleast_1d(log_w))


def sobol_rule(dimension: int, log2_points: int = SOBOL_POINTS_LOG2, seed: int = SOBOL_SEED) -> Rule:
    """Scrambled Sobol points mapped to N(0, I_dimension), equal weights."""
    from scipy.special import ndtri
    from scipy.stats import qmc

    points = qmc.Sobol(d=dimension, scramble=True, seed=seed).random_base2(log2_points)
    u = ndtri(np.clip(points, 1e-16, 1 - 1e-16))
    return Rule(RuleKind.QUASI_MONTE_CARLO, u, np.full(len(u), -np.log(len(u))))


def default_rule_size(dimension: int) -> int:
    """The number of points of :func:`default_rule` over ``dimension`` factors, without building it."""
    if dimension < 1:
        raise ValueError("there is nothing to integrate over")
    return GAUSS_HERMITE_POINTS[dimension] ** dimension if dimension <= 3 else 2 ** SOBOL_POINTS_LOG2


def default_rule(dimension: int, points: int | None = None) -> Rule:
    """Gauss-Hermite for 1-3 dimensions (``points`` per coordinate, default GAUSS_HERMITE_POINTS),
    scrambled Sobol points beyond."""
    if dimension < 1:
        raise ValueError("there is nothing to integrate over")
    if dimension <= 3:
        return gauss_hermite_rule(dimension, points or GAUSS_HERMITE_POINTS[dimension])
    return sobol_rule(dimension)
