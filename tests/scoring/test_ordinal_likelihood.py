"""The answers' log-likelihood of the posterior-mean scoring (scoring.ordinal.EapScorer._log_likelihood) against
scipy.stats.norm: sum_j log(Phi((tau_j,c - nu_j - l_j'eta) / s_j) - Phi((tau_j,c-1 - nu_j - l_j'eta) / s_j))
(Muthén 1984), both when every row answered an item (whole arrays) and when some did not (those rows' items drop out)."""

from __future__ import annotations

import types

import numpy as np
from pytest import approx
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


def test_the_log_likelihoods_gradient_and_hessian_match_differences_of_scipys_and_stay_finite_far_out():
    """The derivatives that find each row's posterior mode (EapScorer._log_likelihood_derivatives) against central
    differences of the log-likelihood written from scipy.stats.norm (an ordinal item's log interval probability, a
    continuous item's normal log-density), with unanswered items; and finite, the Hessian negative definite, 40 SD
    out in either direction, where the interval probabilities are below 1e-300."""
    p, r = 5, 2
    loadings = np.array([[0.8, 0.0], [0.6, 0.3], [0.0, 0.7], [0.0, 0.5], [0.4, 0.4]])
    tau = np.array([-1.0, 0.0, 1.2])
    limits = np.full((p, 5), np.inf)
    limits[:, 0] = -np.inf
    limits[:, 1:4] = tau
    sd = np.array([0.6, 0.8, 0.7, 0.9, 0.5])
    nu = np.array([0.1, -0.2, 0.0, 0.3, 0.05])
    continuous = np.array([False, False, False, False, True])
    scorer = types.SimpleNamespace(model=types.SimpleNamespace(base=types.SimpleNamespace(p=p)), nu=nu,
                                   loadings=loadings, continuous=continuous, sd=sd, limits=limits)
    codes = np.array([[0, 3, 1, 2, 0], [3, -1, 0, 3, 0], [1, 2, -1, 0, -1]])
    z = np.array([[0.0, 0, 0, 0, 1.3], [0, 0, 0, 0, -0.4], [0, 0, 0, 0, 0]])

    def reference(i, eta):
        total = 0.0
        for j in range(p):
            if codes[i, j] < 0:
                continue
            pred = nu[j] + loadings[j] @ eta
            if continuous[j]:
                total += norm.logpdf(z[i, j], pred, sd[j])
            else:
                c = codes[i, j]
                total += np.log(norm.cdf((limits[j, c + 1] - pred) / sd[j]) - norm.cdf((limits[j, c] - pred) / sd[j]))
        return total

    eta = np.random.default_rng(5).normal(size=(3, r))
    value, gradient, hessian = EapScorer._log_likelihood_derivatives(scorer, codes, z, eta)
    h = 1e-5
    for i in range(3):
        assert value[i] == approx(reference(i, eta[i]), rel=1e-12)
        for k in range(r):
            e = np.zeros(r)
            e[k] = h
            assert gradient[i, k] == approx((reference(i, eta[i] + e) - reference(i, eta[i] - e)) / (2 * h), rel=1e-6)
            for l in range(r):
                f = np.zeros(r)
                f[l] = h
                second = (reference(i, eta[i] + e + f) - reference(i, eta[i] + e - f) - reference(i, eta[i] - e + f)
                          + reference(i, eta[i] - e - f)) / (4 * h * h)
                assert hessian[i, k, l] == approx(second, rel=1e-4, abs=1e-4)
    far = np.array([[40.0, 40.0], [-40.0, -40.0], [40.0, -40.0]])
    value, gradient, hessian = EapScorer._log_likelihood_derivatives(scorer, codes, z, far)
    assert np.isfinite(value).all() and np.isfinite(gradient).all() and np.isfinite(hessian).all()
    assert (np.linalg.eigvalsh(hessian) <= 0).all()
