"""The score tests' blocks from rank-two derivatives (model/rank_two.candidate_blocks, read through
NormalLikelihood.candidate_scores) against the trace formulas written out with explicit p x p derivative
matrices: for the ML discrepancy F = log|Sigma| + tr(S Sigma^-1) - log|S| - p, with D_e = dSigma / de,

    gradient     d_c  = tr(W D_c),  W = Sigma^-1 (Sigma - S) Sigma^-1
    information  H_ce = tr(Sigma^-1 D_c Sigma^-1 D_e)

(the gradient and the expected second derivatives of F in the matrix form of Neudecker & Satorra 1991, the
source model/rank_two.py gives; the trace form written here from memory of it).  The candidates
include diagonal entries (a residual variance, a factor variance), whose derivative carries the factor 1/2 of the
rank-two form, as the equality tests of variances across groups read them."""

from __future__ import annotations

import numpy as np
import pandas as pd

from cfa_tool.language.parser import parse_model
from cfa_tool.model.implied import entry_derivatives
from cfa_tool.model.parameters import MATRIX_CODES
from cfa_tool.model.rank_two import entry_basis
from cfa_tool.pipeline.continuous import FitOptions, estimate
from cfa_tool.pipeline.inputs import moments_for

THREE_FACTORS = "factor visual: x1, x2, x3\nfactor textual: x4, x5, x6\nfactor speed: x7, x8, x9\n"


def test_candidate_blocks_are_the_trace_formulas(hs_data: pd.DataFrame):
    spec = parse_model(THREE_FACTORS)
    groups, _ = moments_for(spec, hs_data, "data")
    est = estimate(spec, groups, FitOptions())
    model, likelihood, theta = est.model, est.likelihood, est.theta
    # cross-loadings, residual covariances, a factor covariance and (c = 1/2) a residual and a factor variance
    entries = [("L", 0, 1), ("L", 8, 0), ("T", 3, 1), ("T", 8, 6), ("T", 5, 5), ("P", 2, 0), ("P", 1, 1)]
    codes = np.array([MATRIX_CODES[m] for m, _, _ in entries])
    rows, cols = np.array([r for _, r, _ in entries]), np.array([c for _, _, c in entries])
    [(d, H_ct, h)] = list(likelihood.candidate_scores(theta, 0, [entry_basis(codes, rows, cols, model.p, model.m,
                                                                              with_pairs=False)]))

    mats = likelihood.matrices(theta, 0)
    sigma, S = mats.implied_covariance(), groups[0][1].covariance
    sigma_inv = np.linalg.inv(sigma)
    W = sigma_inv @ (sigma - S) @ sigma_inv
    D_c, _ = entry_derivatives(mats, codes, rows, cols)
    t_codes, t_rows, t_cols = model.table.entry_arrays()
    assert model.identity_J[0]  # each parameter one entry of the model's matrices, in order
    active = model.active[0]
    D_t, _ = entry_derivatives(mats, t_codes[active], t_rows[active], t_cols[active])
    expected_d = np.einsum("ij,cji->c", W, D_c)
    left = np.einsum("ij,cjk->cik", sigma_inv, D_c)
    right = np.einsum("ij,ejk->eik", sigma_inv, D_t)
    expected_H = np.einsum("cik,eki->ce", left, right)
    expected_h = np.einsum("cik,cki->c", left, left)
    assert H_ct.shape == expected_H.shape
    scale = np.abs(expected_H).max()
    assert np.max(np.abs(H_ct - expected_H)) < 1e-12 * scale
    assert np.max(np.abs(h - expected_h) / expected_h) < 1e-12
    assert np.max(np.abs(d - expected_d)) < 1e-10 * np.abs(W).max()
