"""The answers' log-likelihood of the posterior-mean scoring (scoring.ordinal.EapScorer._log_likelihood) against
scipy.stats.norm: sum_j log(Phi((tau_j,c - nu_j - l_j'eta) / s_j) - Phi((tau_j,c-1 - nu_j - l_j'eta) / s_j))
(Muthén 1984), both when every row answered an item (whole arrays) and when some did not (those rows' items drop out)."""

from __future__ import annotations

import types

import numpy as np
from scipy.stats import norm

from cfa_tool.scoring.ordinal import EapScorer


def test_log_likelihood_matches_scipy_with_and_without_unanswered_items():
    rng = np.random.default_rng(3)
    n, K, r, p = 6, 5, 2, 4
    loadings = np.array([[0.8, 0.0], [0.6, 0.0], [0.0, 0.7], [0.0, 0.5]])
    tau = np.array([-1.0, 0.0, 1.2])
    limits = np.full((p, 5), np.inf)
    limits[:, 0] = -np.inf
    limits[:, 1:4] = tau
    sd = np.array([0.6, 0.8, 0.7, 0.9])
    nu = np.array([0.1, -0.2, 0.0, 0.3])
    scorer = types.SimpleNamespace(model=types.SimpleNamespace(base=types.SimpleNamespace(p=p)), nu=nu,
                                   loadings=loadings, continuous=np.zeros(p, bool), sd=sd, limits=limits)
    codes = rng.integers(0, 4, size=(n, p))
    codes[2, 1] = codes[4, 1] = -1  # item 2 unanswered by two rows; items 1, 3, 4 answered by every row
    eta = rng.normal(size=(n, K, r))
    found = EapScorer._log_likelihood(scorer, codes, np.zeros((n, p)), eta)
    expected = np.zeros((n, K))
    for i in range(n):
        for j in range(p):
            if codes[i, j] < 0:
                continue
            pred = nu[j] + eta[i] @ loadings[j]
            c = codes[i, j]
            expected[i] += np.log(norm.cdf((limits[j, c + 1] - pred) / sd[j]) - norm.cdf((limits[j, c] - pred) / sd[j]))
    np.testing.assert_allclose(found, expected, rtol=1e-12)
