"""Full-information ML without a stack of one p x p matrix per pattern (speed-s24): every pattern's Sigma_oo^-1 in the
low-rank form of the Schur complement (data.patterns.PatternInverses), V' A_k V as V' L V less a rank-m term, and the
traces tr(A_k T_k), sum_k w_k A_k T_k A_k and V' A_k T_k A_k V summed over the rows (u_i = A_k (x_i - mu)).

Checked against the plain formulas written out here pattern by pattern and row by row, each pattern's Sigma_oo
inverted by numpy: the casewise likelihood -2 log L = sum_i [p_i log 2 pi + log|Sigma_oo,i| + e_i' Sigma_oo,i^-1 e_i]
(Arbuckle 1996; Enders 2010, ch. 4), its derivatives by central differences, and one fit (150 rows of 12 items, each
row its own pattern) against that likelihood minimised by scipy."""

from __future__ import annotations

from itertools import combinations

import numpy as np
import pandas as pd
import pytest

import cfa_tool
import cfa_tool.data.patterns as patterns
from cfa_tool.data.em import em_saturated
from cfa_tool.data.patterns import (PatternBases, applied_inverses, batch_members, missing_groups, pattern_data,
                                    pattern_inverses, weighted_inverse_sum)
from cfa_tool.estimation.fiml import MissingDataLikelihood
from cfa_tool.data.moments import sample_moments
from cfa_tool.pipeline.continuous import FitOptions, estimate, model_structure

TWELVE = "factor F1: y1..y4\nfactor F2: y5..y8\nfactor F3: y9..y12\n"


def _spd(p: int, rng) -> np.ndarray:
    root = rng.normal(size=(p, p))
    return root @ root.T / p + np.eye(p)


def _one_row_per_pattern(n: int = 150, seed: int = 5) -> pd.DataFrame:
    """Twelve items of three correlated factors (loadings .5 to .8); row i leaves out the i-th pair, then triple, of
    items, so that every row has a pattern of its own; a test helper."""
    rng = np.random.default_rng(seed)
    factors = rng.multivariate_normal(np.zeros(3), 0.4 + 0.6 * np.eye(3), size=n)
    loadings = np.linspace(0.5, 0.8, 12)
    X = 1.0 + loadings * factors[:, np.arange(12) // 4] + 0.6 * rng.normal(size=(n, 12))
    left_out = (list(combinations(range(12), 2)) + list(combinations(range(12), 3)))[:n]
    for i, items in enumerate(left_out):
        X[i, list(items)] = np.nan
    return pd.DataFrame(X, columns=[f"y{j + 1}" for j in range(12)])


@pytest.mark.parametrize("chunk", [None, 3], ids=["one-chunk", "chunks-of-three-patterns"])
def test_the_patterns_inverses_are_each_patterns_own(monkeypatch, chunk):
    if chunk is not None:  # V' A_k V made three patterns at a time
        monkeypatch.setattr(patterns, "CHUNK_BYTES", 8 * 14 * 14 * chunk)
    rng = np.random.default_rng(24)
    p, r = 10, 14
    sigma = _spd(p, rng)
    observed = rng.random((40, p)) > rng.uniform(0.05, 0.4, size=(40, 1))
    observed[:, 0] = True  # every pattern answers something
    observed[0] = True  # and one answers everything
    inv = pattern_inverses(sigma, observed)
    w = rng.uniform(0.5, 2.0, 40)
    V = rng.normal(size=(p, r))
    x = np.where(observed, rng.normal(size=(40, p)), 0.0)
    members = batch_members(list(missing_groups(observed)), np.arange(40))
    u = applied_inverses(inv, x, members, observed)
    bases = PatternBases(inv, V)
    K = list(bases)
    assert len(K) == 40 and len(list(bases.chunks())) == (14 if chunk else 1)
    total = np.zeros((p, p))
    for k, o in enumerate(observed):
        A = np.zeros((p, p))
        A[np.ix_(o, o)] = np.linalg.inv(sigma[np.ix_(o, o)])  # the plain formula: Sigma_oo inverted
        assert inv.logdet[k] == pytest.approx(np.linalg.slogdet(sigma[np.ix_(o, o)])[1], rel=1e-12)
        assert np.allclose(u[k], A @ x[k], rtol=0, atol=1e-12 * np.abs(A @ x[k]).max())
        assert np.allclose(K[k], V.T @ A @ V, rtol=0, atol=1e-11 * np.abs(V.T @ A @ V).max())
        total += w[k] * A
    assert np.allclose(weighted_inverse_sum(inv, observed, w), total, rtol=0, atol=1e-12 * np.abs(total).max())
    # outside the region: a Sigma_oo (here the whole Sigma) not positive definite
    assert pattern_inverses(sigma - 10.0 * np.eye(p), observed) is None


def _casewise(rows: np.ndarray, weights: np.ndarray, mu: np.ndarray, sigma: np.ndarray) -> float:
    """(1/N) sum_i w_i [log|Sigma_oo,i| + e_i' Sigma_oo,i^-1 e_i] row by row (Arbuckle 1996), N the sum of weights."""
    observed = ~np.isnan(rows)
    total = 0.0
    for count in np.unique(observed.sum(axis=1)):  # rows of as many answers at once, each with its own Sigma_oo
        which = np.flatnonzero(observed.sum(axis=1) == count)
        o = np.nonzero(observed[which])[1].reshape(len(which), count)  # each row's answered items
        s = sigma[o[:, :, None], o[:, None, :]]
        e = np.take_along_axis(rows[which], o, axis=1) - mu[o]
        quad = np.einsum("ri,ri->r", e, np.linalg.solve(s, e[:, :, None])[:, :, 0])
        total += weights[which] @ (np.linalg.slogdet(s)[1] + quad)
    return total / weights.sum()


@pytest.mark.parametrize("weighted", [False, True], ids=["plain", "weighted-rows"])
def test_value_gradient_and_hessian_are_the_casewise_likelihoods(weighted):
    frame = _one_row_per_pattern()
    frame.iloc[150 - 40:, :] = frame.iloc[150 - 40:, :].fillna(frame.mean())  # and a pattern of 40 complete rows
    rows = frame.to_numpy()
    rng = np.random.default_rng(3)
    weights = rng.uniform(0.5, 1.5, len(rows)) if weighted else np.ones(len(rows))
    weights *= len(rows) / weights.sum()  # the weights sum to N, so that n_obs is their sum
    data = pattern_data(rows, weights if weighted else None)
    spec = cfa_tool.parse_model(TWELVE)
    _, model = model_structure(spec, None, True)
    saturated = em_saturated(data)[:2]
    likelihood = MissingDataLikelihood(model, [data], [saturated], None)
    moments = sample_moments(frame, spec.observed_names, "<frame>", missing="full-information")
    found = estimate(spec, [(None, moments)], FitOptions(missing="full-information", diagnostics=False))
    theta = found.theta + rng.normal(scale=0.05, size=len(found.theta))  # away from the minimum

    def plain(t):
        mats = model.matrices(t, 0)
        return (_casewise(rows, weights, mats.implied_mean(), mats.implied_covariance())
                - _casewise(rows, weights, *saturated))

    assert likelihood.value(theta) == pytest.approx(plain(theta), rel=1e-12)
    found = likelihood.evaluate(theta).gradient
    h = 1e-6
    steps = np.eye(len(theta)) * h
    expected = np.array([(plain(theta + s) - plain(theta - s)) / (2 * h) for s in steps])
    assert np.abs(found - expected).max() <= 1e-6 * np.abs(expected).max()
    some = np.linspace(0, len(theta) - 1, 7).astype(int)  # loadings, factor (co)variances, residuals, intercepts
    hessian = likelihood.observed_hessian(theta)[np.ix_(some, some)]
    h = 1e-4
    steps = (np.eye(len(theta)) * h)[some]
    second = np.array([[(plain(theta + a + b) - plain(theta + a - b) - plain(theta - a + b) + plain(theta - a - b))
                        / (4 * h * h) for b in steps] for a in steps])
    assert np.abs(hessian - second).max() <= 1e-5 * np.abs(second).max()


def test_a_fit_of_one_row_per_pattern_is_the_minimum_of_the_casewise_likelihood():
    from scipy.optimize import minimize

    frame = _one_row_per_pattern()
    result = cfa_tool.fit(TWELVE, frame)
    assert result.converged
    out = result.to_dict()
    rows = frame.to_numpy()
    n = len(rows)

    def unpack(t):  # marker scaling: the first loading of each factor is 1
        L = np.zeros((12, 3))
        for f in range(3):
            L[4 * f, f] = 1.0
            L[4 * f + 1:4 * f + 4, f] = t[3 * f:3 * f + 3]
        phi = np.zeros((3, 3))
        phi[np.tril_indices(3)] = t[9:15]
        phi = phi + np.tril(phi, -1).T
        return t[27:39], L @ phi @ L.T + np.diag(t[15:27])

    def minus_two_log_l(t):
        mu, sigma = unpack(t)
        if np.linalg.eigvalsh(sigma)[0] <= 0:
            return np.inf
        cells = np.sum(~np.isnan(rows))
        return cells * np.log(2 * np.pi) + n * _casewise(rows, np.ones(n), mu, sigma)

    start = np.concatenate([np.full(9, 0.8), [0.5, 0.2, 0.5, 0.2, 0.2, 0.5], np.full(12, 0.4), np.nanmean(rows, 0)])
    best = minimize(minus_two_log_l, start, method="BFGS", options={"gtol": 1e-7, "maxiter": 2000})
    # the same maximum of the same likelihood, found by scipy from its own start
    assert -0.5 * best.fun == pytest.approx(out["fit"]["log_likelihood"], rel=1e-7)
    found = [r.estimate for r in result.estimates if r.kind == "loading" and r.estimate != 1.0]
    assert len(found) == 9
    assert np.allclose(sorted(found), sorted(best.x[:9]), rtol=2e-4, atol=0)


def test_a_fit_whose_patterns_bases_come_in_chunks_is_the_fit_made_at_once(monkeypatch):
    frame = _one_row_per_pattern()
    whole = cfa_tool.fit(TWELVE, frame).to_dict()
    monkeypatch.setattr(patterns, "CHUNK_BYTES", 8 * 18 * 18 * 7)  # V' A_k V of 7 patterns at a time (r = 18)
    chunked = cfa_tool.fit(TWELVE, frame).to_dict()
    assert chunked["fit"]["chi_square"] == pytest.approx(whole["fit"]["chi_square"], rel=1e-10)
    assert len(chunked["modification_indices"]) == len(whole["modification_indices"]) > 0
    for ours, at_once in zip(chunked["modification_indices"], whole["modification_indices"]):
        assert ours["index"] == pytest.approx(at_once["index"], rel=1e-8, abs=1e-10)
    for ours, at_once in zip(chunked["estimates"], whole["estimates"]):
        assert (ours["se"] is None) == (at_once["se"] is None)
        assert ours["se"] is None or ours["se"] == pytest.approx(at_once["se"], rel=1e-8)
