"""An exploration at many items makes no matrix of the item pairs by the item pairs (large-s21: the standard errors of
a Pearson exploration, on by default in `explore`, built the normal-theory asymptotic covariance of the correlations
whole, with four temporaries of its size: at 200 items 19,900 x 19,900, 3.2 GB each; the polychoric test's scaling
built the pairs' weight matrix V whole beside the given one).

The products that replace them are checked against the matrices written out from their published formulas: the
normal-theory covariance of Pearson correlations (Pearson & Filon 1898; Olkin & Siotani 1976), and the
maximum-likelihood weight V_ab = W_ik W_jl + W_il W_jk of the pairs (Browne 1974)."""

from __future__ import annotations

import tracemalloc

import numpy as np
import pytest

from cfa_tool.exploration import correlation_structure as cs
from cfa_tool.exploration.correlations import from_correlations, from_covariance


def _pearson_filon(R: np.ndarray) -> np.ndarray:
    """The whole normal-theory asymptotic covariance of sqrt(N)(r - rho), entry (st, kl) as Olkin & Siotani (1976)
    write it (Pearson & Filon 1898), pairs in numpy.tril_indices(p, -1) order: the reference, for small p."""
    i, j = np.tril_indices(len(R), -1)
    s, t, k, l = i[:, None], j[:, None], i[None, :], j[None, :]
    rst, rkl = R[s, t], R[k, l]
    rsk, rsl, rtk, rtl = R[s, k], R[s, l], R[t, k], R[t, l]
    return (0.5 * rst * rkl * (rsk ** 2 + rsl ** 2 + rtk ** 2 + rtl ** 2) + rsk * rtl + rsl * rtk
            - rst * (rsk * rsl + rtk * rtl) - rkl * (rsk * rtk + rsl * rtl))


def normal_theory_product(R: np.ndarray, X: np.ndarray) -> np.ndarray:
    from cfa_tool.exploration.correlations import normal_theory_product as product  # (new with the products)

    return product(R, X)


def _correlations(p: int, seed: int) -> np.ndarray:
    rng = np.random.default_rng(seed)
    A = rng.normal(size=(p, p + 4))
    S = A @ A.T
    d = np.sqrt(np.diag(S))
    return S / np.outer(d, d)


@pytest.mark.parametrize("block_bytes", [1 << 25, 8 * 7 * 7 * 3, 1])
def test_the_normal_theory_product_is_the_pearson_filon_matrix_times_the_columns(monkeypatch, block_bytes):
    # 7 items, 21 pairs, 10 columns: one block (the default), three columns a block, one column a block
    monkeypatch.setattr(cs, "BLOCK_BYTES", block_bytes, raising=False)
    R = _correlations(7, 11)
    X = np.random.default_rng(12).normal(size=(21, 10))
    expected = _pearson_filon(R) @ X
    assert np.abs(normal_theory_product(R, X) - expected).max() < 1e-10 * np.abs(expected).max()
    # one pair's variance, (1 - r^2)^2 (Pearson & Filon 1898; Fisher 1915)
    unit = np.zeros((21, 1))
    unit[0, 0] = 1.0
    assert normal_theory_product(R, unit)[0, 0] == pytest.approx((1 - R[1, 0] ** 2) ** 2, rel=1e-12)


def test_the_weight_trace_is_that_of_the_whole_weight_matrix(monkeypatch):
    monkeypatch.setattr(cs, "BLOCK_BYTES", 8 * 28 * 5, raising=False)  # 5 of the 28 rows of V at a time (8 items)
    rng = np.random.default_rng(13)
    W = np.linalg.inv(_correlations(8, 14))
    i, j = np.tril_indices(8, -1)
    V = np.array([[W[s, k] * W[t, l] + W[s, l] * W[t, k] for k, l in zip(i, j)] for s, t in zip(i, j)])  # Browne 1974
    B = rng.normal(size=(28, 28))
    gamma = B @ B.T
    expected = float(np.vdot(V, gamma))
    assert abs(cs.weight_trace(W, gamma) - expected) < 1e-10 * abs(expected)
    R = _correlations(8, 17)  # Gamma given by its products (normal theory): the same trace
    normal = float(np.vdot(V, _pearson_filon(R)))
    assert abs(cs.weight_trace(W, lambda X: normal_theory_product(R, X)) - normal) < 1e-10 * abs(normal)
    delta = rng.normal(size=(28, 6))
    assert np.abs(cs.weighted(delta, W) - V @ delta).max() < 1e-10 * np.abs(V @ delta).max()


def _peak(function) -> int:
    tracemalloc.start()
    try:
        function()
        return tracemalloc.get_traced_memory()[1]
    finally:
        tracemalloc.stop()


def test_the_standard_errors_of_a_pearson_exploration_make_no_matrix_of_the_pairs(monkeypatch):
    # 30 items in 2 factors: 435 pairs, whose matrix by themselves is 1.5 MB; the exploration's standard errors (on
    # by default in explore, the step that made the pairs' matrix) stay below one such matrix, with blocks of 4
    # columns' 30 x 30 matrices, and are those of the whole matrix (the Pearson-Filon formula) to 1e-10
    from cfa_tool.exploration import ExploreSettings, explore_correlations, loading_errors
    from cfa_tool.exploration.rotated_errors import constrained_covariance

    monkeypatch.setattr(cs, "BLOCK_BYTES", 8 * 30 * 30 * 4, raising=False)
    p, n = 30, 600
    rng = np.random.default_rng(15)
    L = np.zeros((p, 2))
    L[:15, 0], L[15:, 1] = 0.7, 0.6
    X = rng.normal(size=(n, 2)) @ L.T + 0.6 * rng.normal(size=(n, p))
    data = from_covariance(np.cov(X.T, bias=True), n, tuple(f"v{k}" for k in range(p)))
    explored = explore_correlations(data, ExploreSettings(factors=2, count=False))
    assert explored.errors is not None and explored.errors.unavailable is None
    found = []
    pairs = p * (p - 1) // 2
    assert _peak(lambda: found.append(loading_errors(data, explored.solution, explored.rotated))) < pairs * pairs * 8
    assert np.all(np.isfinite(found[0].pattern)) and np.all(found[0].pattern > 0)
    # one factor's sandwich (no rotation constraints) against the whole Gamma's
    one = explore_correlations(data, ExploreSettings(factors=1, count=False))
    Lone = one.rotated.pattern
    acov = constrained_covariance(data, one.solution.method, Lone, np.eye(1), False)
    delta = cs.jacobian(Lone, np.eye(1), False)
    sigma = Lone @ Lone.T
    np.fill_diagonal(sigma, 1.0)
    VD = cs.weighted(delta, np.linalg.inv(sigma))
    P = np.linalg.inv(delta.T @ VD)
    expected = P @ (VD.T @ _pearson_filon(data.correlations) @ VD) @ P / n
    assert np.abs(acov - expected).max() < 1e-10 * np.abs(expected).max()


def test_the_scaled_test_of_polychoric_correlations_makes_no_second_matrix_of_the_pairs(monkeypatch):
    # the given Gamma is the one matrix of the pairs by the pairs: the scaling factor tr(U Gamma) / df makes no V
    # beside it (30 items, 435 pairs: 1.5 MB), and is what the whole V gives (Satorra & Bentler 1994's formula)
    from dataclasses import replace

    from cfa_tool.exploration import extract
    from cfa_tool.exploration.choices import CorrelationKind
    from cfa_tool.exploration.extraction import scaling_factor

    monkeypatch.setattr(cs, "BLOCK_BYTES", 8 * 435 * 10, raising=False)
    p = 30
    R = np.full((p, p), 0.3) + 0.7 * np.eye(p)
    B = np.random.default_rng(16).normal(size=(435, 500))
    gamma = B @ B.T / 500 + _pearson_filon(R)
    data = replace(from_correlations(R, 500, tuple(f"v{k}" for k in range(p))), kind=CorrelationKind.POLYCHORIC,
                   gamma=gamma)
    solution = extract(data, 1)
    W = np.linalg.inv(solution.loadings @ solution.loadings.T + np.diag(solution.uniquenesses))
    found = []
    assert _peak(lambda: found.append(scaling_factor(data, solution.loadings, W, solution.fit.df))) < 435 * 435 * 8
    i, j = np.tril_indices(p, -1)
    V = W[i][:, i] * W[j][:, j] + W[i][:, j] * W[j][:, i]
    delta = cs.jacobian(solution.loadings, np.eye(1), oblique=False)
    VD = V @ delta
    meat = VD.T @ gamma @ VD
    expected = (np.vdot(V, gamma) - np.vdot(np.linalg.pinv(delta.T @ VD, rcond=1e-9, hermitian=True), meat)) / solution.fit.df
    assert abs(found[0] - expected) < 1e-10 * abs(expected)

