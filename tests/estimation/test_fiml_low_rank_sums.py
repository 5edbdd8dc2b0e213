"""The sums over the patterns of missing answers that full-information ML's information and observed Hessian take
(speed-s25): in the rank-m form K_k = K0 - F_k' F_k of each pattern's V' A_k V (A_k = Sigma_oo^-1 embedded in p x p),
never pattern by pattern.  Checked against their definitions written out with dense matrices, each pattern's A_k
from numpy's own inverse of its Sigma_oo and each entry's derivative D_e = c_e (V_u V_v' + V_v V_u') made whole:

    sum_k w_k tr(A_k D_e A_k D_f),   sum_k w_k tr(A_k D_e B_k D_f) with B_k = A_k T_k A_k,
    sum_k w_k d_k' A_k D_e A_k dmu_f  (dmu_f = s_f V_w),

the terms of the observed information of full-information ML (Kenward & Molenberghs 1998; the derivatives of Sigma
and mu of Neudecker & Satorra 1991), T_k the mean of the pattern's rows' (x_i - mu)(x_i - mu)' (rows weighted when
they carry weights)."""

from __future__ import annotations

from types import SimpleNamespace

import numpy as np
import pandas as pd
import pytest

import cfa_tool
import cfa_tool.data.patterns as patterns
from cfa_tool.data.patterns import (PatternBases, applied_inverses, batch_members, missing_groups, pattern_data,
                                    pattern_inverses)
from cfa_tool.estimation.fiml import low_rank_cross_sum, low_rank_mean_sum, low_rank_pair_sums, low_rank_trace_sum


def _setting(weighted: bool, seed: int = 4):
    """Invented: 8 items with a fifth of the answers missing, Sigma positive definite, V of 11 columns, 14 entries."""
    rng = np.random.default_rng(seed)
    p, r, n = 8, 11, 120
    B = rng.normal(size=(p, p))
    sigma = B @ B.T / p + np.eye(p)
    mu = rng.normal(size=p)
    rows = rng.multivariate_normal(mu + 0.3, sigma, size=n)
    gaps = rng.random(rows.shape) < 0.2
    gaps[gaps.all(axis=1), 0] = False
    gaps[:10] = gaps[10]  # one pattern of eleven rows
    rows[gaps] = np.nan
    weights = rng.uniform(0.5, 2.0, size=n) if weighted else None
    data = pattern_data(rows, weights)
    V = rng.normal(size=(p, r))
    E = 14
    basis = SimpleNamespace(u=rng.integers(0, r, E), v=rng.integers(0, r, E), w=rng.integers(0, r, E),
                            c=np.where(rng.random(E) < 0.8, rng.uniform(0.5, 1.5, E), 0.0))
    s = np.where(rng.random(E) < 0.5, rng.uniform(0.5, 1.5, E), 0.0)
    return data, mu, sigma, V, basis, s


def _dense(data, mu, sigma, V, basis, s):
    """The three sums by their definitions, pattern by pattern with dense matrices."""
    P, p = data.observed.shape
    n = data.n_obs
    w = data.counts / n
    A = np.zeros((P, p, p))
    for k, o in enumerate(data.observed):
        A[k][np.ix_(o, o)] = np.linalg.inv(sigma[np.ix_(o, o)])
    row_w = data.row_weights
    e = np.where(np.isnan(data.rows), 0.0, data.rows - mu)
    T = np.zeros((P, p, p))
    for i, k in enumerate(data.index):
        T[k] += row_w[i] * np.outer(e[i], e[i]) / data.counts[k]
    Bk = A @ T @ A
    D = np.array([c * (np.outer(V[:, a], V[:, b]) + np.outer(V[:, b], V[:, a]))
                  for a, b, c in zip(basis.u, basis.v, basis.c)])
    dmu = s[:, None] * V[:, basis.w].T
    d = np.where(data.observed, data.means - mu, 0.0)
    E = len(D)
    trace, cross, mean = np.zeros((E, E)), np.zeros((E, E)), np.zeros((E, E))
    for k in range(P):
        AD = A[k] @ D  # (E, p, p)
        BD = Bk[k] @ D
        trace += w[k] * np.einsum("eij,fji->ef", AD, AD)
        cross += w[k] * np.einsum("eij,fji->ef", AD, BD)
        mean += w[k] * (d[k] @ A[k] @ D @ A[k] @ dmu.T)
    return trace, cross, mean


@pytest.mark.parametrize("weighted", [False, True])
def test_the_rank_m_sums_are_their_dense_definitions(weighted):
    data, mu, sigma, V, basis, s = _setting(weighted)
    trace, cross, mean = _dense(data, mu, sigma, V, basis, s)
    missing = list(missing_groups(data.observed))
    inv = pattern_inverses(sigma, data.observed, missing)
    K = PatternBases(inv, V)
    w = data.counts / data.n_obs
    observed = ~np.isnan(data.rows)
    e = np.where(observed, data.rows - mu, 0.0)
    z = applied_inverses(inv, e, batch_members(missing, data.index), observed) @ V  # V' A_k (x_i - mu)
    Ad = applied_inverses(inv, np.where(data.observed, data.means - mu, 0.0),
                          batch_members(missing, np.arange(len(w))), data.observed)
    scale = np.abs(trace).max()
    assert np.abs(low_rank_trace_sum(basis, K, w) - trace).max() <= 1e-12 * scale
    found = low_rank_cross_sum(basis, K, z, data.row_weights / data.n_obs, batch_members(missing, data.index))
    assert np.abs(found - cross).max() <= 1e-12 * np.abs(cross).max()
    found = low_rank_mean_sum(basis, K, Ad @ V, w, s)
    assert np.abs(found - mean).max() <= 1e-12 * np.abs(mean).max()
    assert np.abs(mean).max() > 0 and np.abs(cross).max() > 0


@pytest.mark.parametrize("weighted", [False, True])
def test_the_score_tests_rank_m_sums_are_their_dense_definitions(weighted):
    # the score tests' sums (Sorbom 1989's statistic with the patterns-fixed information): for a candidate c with
    # derivative D_c = V_uc V_vc' + V_vc V_uc' (c = 1), its cross-information with each entry e, sum_k w_k tr(A_k D_c
    # A_k D_e), and half its own, sum_k w_k tr(A_k D_c A_k D_c) / 2, each pattern's A_k by numpy's inverse
    data, mu, sigma, V, basis, s = _setting(weighted, seed=7)
    P, p = data.observed.shape
    r = V.shape[1]
    w = data.counts / data.n_obs
    A = np.zeros((P, p, p))
    for k, o in enumerate(data.observed):
        A[k][np.ix_(o, o)] = np.linalg.inv(sigma[np.ix_(o, o)])
    iu, ju = np.triu_indices(r)  # every pair of basis columns a candidate can take, the diagonal too
    D = np.array([c * (np.outer(V[:, a], V[:, b]) + np.outer(V[:, b], V[:, a]))
                  for a, b, c in zip(basis.u, basis.v, basis.c)])
    cross, own = np.zeros((len(iu), len(D))), np.zeros(len(iu))
    for j, (a, b) in enumerate(zip(iu, ju)):
        Dc = np.outer(V[:, a], V[:, b]) + np.outer(V[:, b], V[:, a])
        for k in range(P):
            ADc = A[k] @ Dc
            cross[j] += w[k] * np.einsum("ij,eji->e", ADc, A[k] @ D)
            own[j] += w[k] * np.trace(ADc @ ADc) / 2.0
    K = PatternBases(pattern_inverses(sigma, data.observed, list(missing_groups(data.observed))), V)
    found_cross, found_own = low_rank_pair_sums(basis, K, w, iu, ju)
    assert np.abs(found_cross - cross).max() <= 1e-12 * np.abs(cross).max()
    assert np.abs(found_own - own).max() <= 1e-12 * np.abs(own).max()
    assert np.all(found_cross[:, basis.c == 0] == 0) and np.abs(cross[:, basis.c != 0]).min() > 0


def test_the_fit_makes_no_patterns_v_a_v(monkeypatch):
    # on 5690afae every evaluation's information and every observed Hessian went through each pattern's K_k =
    # V' A_k V (PatternBases, a chunk at a time) and each pattern's Q_k; on 2454cccf the score tests still did (their
    # cross-information r^2 a pattern and model entry); now none does
    rng = np.random.default_rng(11)
    X = 0.7 * rng.normal(size=(300, 1)) + 0.6 * rng.normal(size=(300, 6))
    X[rng.random(X.shape) < 0.15] = np.nan
    frame = pd.DataFrame(X, columns=[f"y{j}" for j in range(1, 7)])
    made = []
    original = patterns.PatternBases.chunks
    monkeypatch.setattr(patterns.PatternBases, "chunks", lambda self: made.append(1) or original(self))
    lean = cfa_tool.fit("factor F: y1..y6\n", frame, missing="full-information", modification_indices=False)
    assert lean.converged and lean.fit.chi_square > 0
    assert made == []
    full = cfa_tool.fit("factor F: y1..y6\n", frame, missing="full-information")
    assert len(full.modification_indices) > 0
    assert made == []
