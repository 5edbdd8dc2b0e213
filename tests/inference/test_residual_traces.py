"""The traces of U Gamma that the adjusted statistics need, from q x q products (``residual_traces``), equal
those of the statistics x statistics matrix U = W - W D' (D W D')^-1 D W itself (Satorra 1989), formed
densely with numpy, for one model and for the difference of two nested models (Satorra 2000), with Gamma
block-diagonal over groups."""

from __future__ import annotations

import numpy as np
import pytest
from scipy.linalg import block_diag

from cfa_tool.inference.adjusted import residual_traces, residual_weights, robust_covariance


def _problem(seed: int = 3):
    rng = np.random.default_rng(seed)
    sizes = (12, 9, 15)
    blocks, start = [], 0
    for size in sizes:
        blocks.append(slice(start, start + size))
        start += size
    gammas = []
    for size in sizes:
        root = rng.normal(size=(size, size))
        gammas.append(root @ root.T / size + np.eye(size))
    gamma = block_diag(*gammas)
    weights = 1.0 / np.diag(gamma)
    general = rng.normal(size=(10, start))
    general[:3, blocks[0]] = 0.0  # parameters without derivatives in some groups, as in a multi-group model
    general[7:, blocks[2]] = 0.0
    restricted = general[:6] + 0.1 * general[6:].sum(axis=0)  # a model with fewer parameters
    return weights, gamma, blocks, restricted, general


def _dense(U: np.ndarray, gamma: np.ndarray) -> tuple[float, float]:
    UG = U @ gamma
    return float(np.trace(UG)), float(np.sum(UG * UG.T))


@pytest.mark.parametrize("blocked", [False, True])
def test_traces_of_one_model_and_of_a_difference(blocked):
    weights, gamma, blocks, restricted, general = _problem()
    blocks = blocks if blocked else None
    one = residual_traces(weights, gamma, [(1.0, general)], True, blocks)
    np.testing.assert_allclose(one, _dense(residual_weights(general, weights), gamma), rtol=1e-10)
    none = residual_traces(weights, gamma, [], True, blocks)
    np.testing.assert_allclose(none, _dense(np.diag(weights), gamma), rtol=1e-12)
    difference = residual_traces(weights, gamma, [(1.0, restricted), (-1.0, general)], False, blocks)
    U = residual_weights(restricted, weights) - residual_weights(general, weights)
    np.testing.assert_allclose(difference, _dense(U, gamma), rtol=1e-9)


def test_sandwich_taken_block_by_block_is_the_same():
    weights, gamma, blocks, _, general = _problem()
    np.testing.assert_allclose(robust_covariance(general, weights, gamma, 100, blocks),
                               robust_covariance(general, weights, gamma, 100), rtol=1e-12, atol=1e-15)


def test_the_weighted_square_of_gamma_makes_no_second_matrix_of_the_statistics():
    # tr((W Gamma)^2) = sum_ij w_i w_j Gamma_ij^2 (W diagonal), written out with numpy, taken a few rows at a time:
    # at 200 ordinal items Gamma is 20,700 x 20,700 (3.4 GB) and its square and the weights' outer product were two
    # more (robust-s20, beside hostile s19's case 11); here 2,500 statistics, 50 MB a matrix
    import tracemalloc

    rng = np.random.default_rng(8)
    k = 2500
    gamma = rng.normal(size=(k, k))
    gamma = gamma + gamma.T
    weights = rng.uniform(0.5, 2.0, k)
    expected = float(np.sum(gamma ** 2 * np.outer(weights, weights)))
    tracemalloc.start()
    try:
        a1, a2 = residual_traces(weights, gamma, [], True)
        _, peak = tracemalloc.get_traced_memory()
    finally:
        tracemalloc.stop()
    assert a2 == pytest.approx(expected, rel=1e-12)
    assert a1 == pytest.approx(float(weights @ np.diag(gamma)), rel=1e-12)
    assert peak < k * k * 8
