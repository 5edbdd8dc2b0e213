"""Full-information ML at many items without the patterns' (p*p, p*p) weight matrix (robust-s20: at 200 items it
was 40,000 x 40,000, 11.9 GiB, and the fit ended in "internal error: MemoryError" after two minutes).

The information H = sum_k w_k [tr(A_k X A_k Y) + 2 x_mu' A_k y_mu] (Kenward & Molenberghs 1998, the module
docstring of cfa_tool.estimation.fiml) is written out here as a loop over the patterns, one trace at a time, and the
block-by-block products are checked against it; the limit of a block is lowered so that a small case takes the
block route."""

from __future__ import annotations

import tracemalloc

import numpy as np
import pytest

import cfa_tool.estimation.fiml as fiml


def _symmetric(rng: np.random.Generator, *shape: int) -> np.ndarray:
    x = rng.normal(size=shape)
    return x + np.swapaxes(x, -1, -2)


def _loop_information(A: np.ndarray, B: np.ndarray, w: np.ndarray, D: np.ndarray, E: np.ndarray) -> np.ndarray:
    """sum_k w_k tr(A_k D_a B_k E_b), pattern by pattern and pair by pair (the formula as written)."""
    out = np.zeros((len(D), len(E)))
    for k in range(len(w)):
        for a in range(len(D)):
            for b in range(len(E)):
                out[a, b] += w[k] * np.trace(A[k] @ D[a] @ B[k] @ E[b])
    return out


@pytest.mark.parametrize("block_bytes", [1 << 26, 8 * 9 ** 3, 3 * 8 * 9 ** 3, 1])
def test_the_information_block_by_block_is_the_sum_over_patterns(monkeypatch, block_bytes):
    # 9 items, 4 patterns, 5 directions: one block (the default limit), one row of the weight matrix's columns a
    # block, three rows, and the least block; each the loop's values to 1e-10 (relative)
    monkeypatch.setattr(fiml, "BLOCK_BYTES", block_bytes)
    rng = np.random.default_rng(20)
    p, P = 9, 4
    A, B = _symmetric(rng, P, p, p), _symmetric(rng, P, p, p)
    w = rng.random(P)
    D, E = _symmetric(rng, 5, p, p), _symmetric(rng, 6, p, p)
    d_mu, e_mu = rng.normal(size=(5, p)), rng.normal(size=(6, p))
    reference = _loop_information(A, A, w, D, E) + 2.0 * d_mu @ np.tensordot(w, A, axes=1) @ e_mu.T
    parts = fiml.MissingParts(None, None, A, w)
    scale = np.abs(reference).max()
    assert np.abs(parts.information(D, d_mu, E, e_mu) - reference).max() < 1e-10 * scale
    diagonal = np.diag(_loop_information(A, A, w, D, D) + 2.0 * d_mu @ np.tensordot(w, A, axes=1) @ d_mu.T)
    assert np.abs(parts.information_diagonal(D, d_mu) - diagonal).max() < 1e-10 * scale
    # the observed information's two trace terms: sum_k w_k tr(A D A E) and sum_k w_k tr(A D (A T A) E)
    Ad = rng.normal(size=(P, p))
    hessian = fiml.first_order_hessian(A, w, B, Ad, D, d_mu)
    mixed = _loop_information(A, B, w, D, D)
    cross = np.einsum("ki,kjl,aij,bl->ab", Ad * w[:, None], A, D, d_mu)  # sum_k w_k (A d)' D_a A dmu_b
    expected = (-_loop_information(A, A, w, D, D) + mixed + mixed.T + 2.0 * (cross + cross.T)
                + 2.0 * d_mu @ np.tensordot(w, A, axes=1) @ d_mu.T)
    assert np.abs(hessian - expected).max() < 1e-10 * np.abs(expected).max()


def test_a_full_information_fit_at_many_items_makes_no_weight_matrix_of_the_items_squared(monkeypatch):
    # 40 items with gaps: the whole weight matrix would be 1,600 x 1,600 (20 MB); with blocks of one item's
    # columns (1,600 x 40, 0.5 MB) the peak of an evaluation and a Hessian stays below one such matrix, and the fit
    # (chi-square, estimates, standard errors) is that of the one-matrix route to 1e-8
    import pandas as pd

    import cfa_tool
    from cfa_tool.pipeline.continuous import estimate
    from cfa_tool.pipeline.continuous import FitOptions

    rng = np.random.default_rng(7)
    p, n = 40, 400
    factors = rng.multivariate_normal(np.zeros(2), [[1.0, 0.3], [0.3, 1.0]], size=n)
    X = 0.7 * factors[:, np.arange(p) * 2 // p] + 0.7 * rng.normal(size=(n, p))
    X[rng.random((n, p)) < 0.03] = np.nan
    frame = pd.DataFrame(X, columns=[f"q{j + 1}" for j in range(p)])
    model = "factor F1: q1..q20\nfactor F2: q21..q40\n"
    whole = cfa_tool.fit(model, frame, missing="full-information", diagnostics=False, modification_indices=False)
    assert whole.converged
    monkeypatch.setattr(fiml, "BLOCK_BYTES", 8 * p ** 3, raising=False)  # (absent before blocks: one matrix)
    blocks = cfa_tool.fit(model, frame, missing="full-information", diagnostics=False, modification_indices=False)
    assert abs(blocks.fit.chi_square - whole.fit.chi_square) < 1e-8 * whole.fit.chi_square
    first = [e.estimate for e in whole.estimates]
    assert np.allclose([e.estimate for e in blocks.estimates], first, rtol=0, atol=1e-8)
    assert np.allclose([e.se for e in blocks.estimates], [e.se for e in whole.estimates], rtol=1e-8, atol=0,
                       equal_nan=True)  # a marker's fixed loading has none
    spec = cfa_tool.parse_model(model)
    from cfa_tool.data.moments import sample_moments

    moments = sample_moments(frame, spec.observed_names, "<frame>", missing="full-information")
    est = estimate(spec, [(None, moments)], FitOptions(missing="full-information", diagnostics=False))
    tracemalloc.start()
    try:
        est.likelihood._at = None  # the pieces anew
        est.likelihood.evaluate(est.theta)
        est.likelihood.observed_hessian(est.theta)
        _, peak = tracemalloc.get_traced_memory()
    finally:
        tracemalloc.stop()
    assert peak < p ** 4 * 8
