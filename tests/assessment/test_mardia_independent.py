"""Mardia's (1970) skewness and kurtosis at the default call's shapes (1,000 rows of 30 items: the third-moment
route; of 60 items: the Gram matrix in blocks of 128 rows), with the routes' own block sizes, against the definition
written out with the whole N x N matrix G = Z S^-1 Z' (S with divisor N):

    b1,p = (1/N^2) sum_i sum_j g_ij^3,    b2,p = (1/N) sum_i g_ii^2    (Mardia 1970, eqs. 2.5 and 2.7)."""

from __future__ import annotations

import numpy as np
import pytest

from cfa_tool.assessment.normality import mardia


@pytest.mark.parametrize("p", [30, 60])
def test_mardia_at_the_default_calls_shapes(p):
    n = 1000
    rng = np.random.default_rng(p)
    x = rng.gamma(2.0, size=(n, p)) @ (np.eye(p) + 0.3 * rng.standard_normal((p, p)))  # skewed, correlated items
    z = x - x.mean(0)
    g = z @ np.linalg.inv(z.T @ z / n) @ z.T
    result = mardia(x)
    assert result.skewness == pytest.approx(float(np.sum(g**3)) / n**2, rel=1e-11)
    assert result.kurtosis == pytest.approx(float(np.mean(np.diag(g) ** 2)), rel=1e-11)
    assert result.skewness_df == p * (p + 1) * (p + 2) // 6  # Mardia 1970: the chi-square's degrees of freedom
