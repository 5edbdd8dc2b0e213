"""The meat of the robust corrections with incomplete data (inference.robust_missing.scores_meat and group_meat,
read by the robust standard errors and by the invariance ladder's robust score tests alike): the mean outer product
of the rows' scores in beta = (mu, vech Sigma), each row's score the derivative of
f_i = log|Sigma_oo| + r_i' Sigma_oo^-1 r_i (Yuan & Bentler 2000).  Check values: each f_i is -2 times scipy's
multivariate normal log-density of the row's answered items less its constant, differentiated here by central
differences; the data are invented (a fictional transit survey's three items), simulated with a fixed seed."""

from __future__ import annotations

import numpy as np
from scipy.stats import multivariate_normal

from cfa_tool.data.patterns import pattern_data
from cfa_tool.inference.robust import vech_indices
from cfa_tool.inference.robust_missing import scores_meat


def _rows() -> np.ndarray:
    rng = np.random.default_rng(2031)
    rows = rng.multivariate_normal([3.0, 2.5, 3.2], [[1.0, 0.4, 0.3], [0.4, 1.2, 0.5], [0.3, 0.5, 0.9]], size=40)
    rows[rng.random(40) < 0.25, 0] = np.nan
    rows[rng.random(40) < 0.25, 2] = np.nan
    return rows[~np.isnan(rows).all(axis=1)]


def _f(row: np.ndarray, beta: np.ndarray) -> float:
    """f_i at beta = (mu, vech Sigma) through scipy's density of the answered items."""
    p = len(row)
    I, J = vech_indices(p)
    sigma = np.zeros((p, p))
    sigma[I, J] = sigma[J, I] = beta[p:]
    seen = ~np.isnan(row)
    k = int(seen.sum())
    logpdf = multivariate_normal(beta[:p][seen], sigma[np.ix_(seen, seen)]).logpdf(row[seen])
    return -2.0 * logpdf - k * np.log(2.0 * np.pi)


def test_the_meat_of_rows_with_gaps_is_the_mean_outer_product_of_their_scores():
    rows = _rows()
    mu = np.array([2.9, 2.6, 3.1])
    sigma = np.array([[1.1, 0.35, 0.25], [0.35, 1.15, 0.45], [0.25, 0.45, 0.95]])
    I, J = vech_indices(3)
    beta = np.concatenate([mu, sigma[I, J]])
    h = 1e-5
    scores = np.array([[(_f(row, beta + h * e) - _f(row, beta - h * e)) / (2 * h) for e in np.eye(len(beta))]
                       for row in rows])
    data = pattern_data(rows)
    # pattern_data orders the rows by pattern; the mean outer product does not depend on the order
    expected = scores.T @ scores / len(rows)
    assert np.allclose(scores_meat(data, mu, sigma, None), expected, rtol=1e-6, atol=1e-8)
