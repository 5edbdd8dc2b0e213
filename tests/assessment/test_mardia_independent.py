"""Mardia's (1970) skewness and kurtosis at the default call's shapes (1,000 rows of 30 and 40 items: the
third-moment route, each triple of items once by its middle item; of 60 items: the Gram matrix in blocks of 128 rows),
with the routes' own block sizes, and with frequency weights on both routes, against the definition
written out with the whole N x N matrix G = Z S^-1 Z' (S with divisor N):

    b1,p = (1/N^2) sum_i sum_j g_ij^3,    b2,p = (1/N) sum_i g_ii^2    (Mardia 1970, eqs. 2.5 and 2.7)."""

from __future__ import annotations

import numpy as np
import pytest

from cfa_tool.assessment.normality import mardia


@pytest.mark.parametrize("p", [30, 40, 60])
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


@pytest.mark.parametrize("p, n", [(12, 200), (25, 200)])  # the third-moment route, and the Gram matrix's
def test_mardia_with_frequency_weights_is_mardia_of_the_repeated_rows(p, n):
    """Rows counted by frequency weights (1 to 4) give the tests of the data with each row written out as often
    (the module's definition), here against the whole N x N matrix of the repeated rows (Mardia 1970, eq. 2.5)."""
    rng = np.random.default_rng(p)
    x = rng.gamma(2.0, size=(n, p)) @ (np.eye(p) + 0.3 * rng.standard_normal((p, p)))
    w = rng.integers(1, 5, n)
    repeated = np.repeat(x, w, axis=0)
    big_n = len(repeated)
    z = repeated - repeated.mean(0)
    g = z @ np.linalg.inv(z.T @ z / big_n) @ z.T
    result = mardia(x, frequencies=w.astype(float))
    assert result.skewness == pytest.approx(float(np.sum(g**3)) / big_n**2, rel=1e-11)
    assert result.kurtosis == pytest.approx(float(np.mean(np.diag(g) ** 2)), rel=1e-11)
