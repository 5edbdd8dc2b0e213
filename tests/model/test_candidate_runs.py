"""The score tests' cross-information read in runs (model/rank_two.row_runs): the residual covariances (i, j) of one
item i, j = 0, 1, ..., i - 1, read as slices of the model's columns of K instead of gathered rows, and made in arrays
reused from chunk to chunk.  The blocks must be the very numbers of the gathered route, and both must be the trace
formula written out with explicit p x p derivative matrices (tests/model/test_candidate_blocks.py gives it:
H_ce = tr(Sigma^-1 D_c Sigma^-1 D_e), Neudecker & Satorra 1991)."""

from __future__ import annotations

from dataclasses import replace

import numpy as np
import pandas as pd
import pytest

from cfa_tool.assessment.modification import candidate_entries
from cfa_tool.estimation import ml
from cfa_tool.language.parser import parse_model
from cfa_tool.model.implied import entry_derivatives
from cfa_tool.model.parameters import MATRIX_CODES
from cfa_tool.model.rank_two import entry_basis, row_runs
from cfa_tool.pipeline.continuous import FitOptions, estimate
from cfa_tool.pipeline.inputs import moments_for

THREE_FACTORS = "factor visual: x1, x2, x3\nfactor textual: x4, x5, x6\nfactor speed: x7, x8, x9\n"


def test_runs_cover_every_entry_in_order():
    u = np.array([0, 1, 1, 1, 2, 2, 3, 4, 4])
    v = np.array([9, 0, 1, 2, 0, 1, 7, 3, 5])
    assert row_runs(u, v, shortest=2) == ((0, 1, -1, -1), (1, 4, 1, 0), (4, 6, 2, 0), (6, 9, -1, -1))
    assert row_runs(u, v, shortest=3) == ((0, 1, -1, -1), (1, 4, 1, 0), (4, 9, -1, -1))
    assert row_runs(u, v, shortest=4) == ()  # no run that long: every row gathered
    assert row_runs(u[:1], v[:1], shortest=2) == ()


def _blocks(likelihood, theta, bases):
    """Each chunk's (d, H_ct, h), copied as read (the chunks share the arrays H_ct is made in)."""
    return [tuple(np.array(x, copy=True) for x in block) for block in likelihood.candidate_scores(theta, 0, bases)]


@pytest.mark.parametrize("shortest", [2, 100])
def test_blocks_in_runs_are_the_gathered_blocks_and_the_trace_formula(hs_data: pd.DataFrame, monkeypatch,
                                                                      shortest: int):
    spec = parse_model(THREE_FACTORS)
    groups, _ = moments_for(spec, hs_data, "data")
    est = estimate(spec, groups, FitOptions())
    model, likelihood, theta = est.model, est.likelihood, est.theta
    entries = candidate_entries(model.table, ())  # cross-loadings, then the residual covariances item by item
    codes = np.array([MATRIX_CODES[c[2]] for c in entries])
    rows, cols = np.array([c[3] for c in entries]), np.array([c[4] for c in entries])
    chunks = [slice(0, 20), slice(20, 41), slice(41, len(entries))]  # runs cut by the chunks' edges too
    gathered = [entry_basis(codes[sl], rows[sl], cols[sl], model.p, model.m, with_pairs=False) for sl in chunks]
    assert all(b.runs == () for b in gathered)  # nine items: no run of SHORTEST_RUN entries
    in_runs = [replace(b, runs=row_runs(b.u, b.v, shortest=shortest)) for b in gathered]
    assert sum(r[2] >= 0 for b in in_runs for r in b.runs) >= (8 if shortest == 2 else 0)

    by_rows = _blocks(likelihood, theta, gathered)  # nine items: small blocks, rows gathered into new arrays
    monkeypatch.setattr(ml, "REUSED_BLOCK", 0)  # as for large models: arrays reused from chunk to chunk, and runs
    by_runs = _blocks(likelihood, theta, in_runs)
    for run_block, row_block in zip(by_runs, by_rows):
        for a, b in zip(run_block, row_block):
            assert a.tobytes() == b.tobytes()  # the same numbers to the bit, signs of zeros too

    mats = likelihood.matrices(theta, 0)
    sigma_inv = np.linalg.inv(mats.implied_covariance())
    D_c, _ = entry_derivatives(mats, codes, rows, cols)
    t_codes, t_rows, t_cols = model.table.entry_arrays()
    active = model.active[0]
    D_t, _ = entry_derivatives(mats, t_codes[active], t_rows[active], t_cols[active])
    left = np.einsum("ij,cjk->cik", sigma_inv, D_c)
    right = np.einsum("ij,ejk->eik", sigma_inv, D_t)
    expected_H = np.einsum("cik,eki->ce", left, right)
    H = np.vstack([block[1] for block in by_runs])
    assert H.shape == expected_H.shape
    assert np.max(np.abs(H - expected_H)) < 1e-12 * np.abs(expected_H).max()
