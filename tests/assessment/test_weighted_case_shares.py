"""The case table under weights: each row's share of the chi-square is weighted as the fit weights the row, so that
the shares sum to the chi-square, as the table's note says (they were unweighted, and summed to something else).

Check values: (1) a direct numpy computation of each row's share, w_i (log|Sigma| - log|S| + d_i' Sigma^-1 d_i -
d_i' S^-1 d_i), d_i centred at the weighted mean and S the weighted covariance with divisor sum(w) (the casewise
likelihood-ratio decomposition of the ML chi-square: Bollen 1989, ch. 4, for F_ML; Arbuckle 1996 for the casewise
form), summed and compared with the reported chi-square; (2) the data repeated row by row as often as the frequency
weight says, fitted without weights: the same chi-square, and each copy's share times the weight is the weighted
row's share.  Data: Holzinger & Swineford (1939), pupils 101 to 220 (56 of Pasteur, 64 of Grant-White), with invented weights 1, 2, 3 in turn."""

from __future__ import annotations

from unittest import mock

import numpy as np
import pytest

import cfa_tool
from tests.conftest import THREE_FACTORS

ITEMS = [f"x{i}" for i in range(1, 10)]


@pytest.fixture(scope="module")
def weighted(hs_data):
    data = hs_data[ITEMS + ["school"]].reset_index(drop=True).iloc[100:220].reset_index(drop=True)
    data["w"] = (np.arange(len(data)) % 3 + 1).astype(float)
    return data


def _direct_shares(data, sigma: np.ndarray) -> np.ndarray:
    X, w = data[ITEMS].to_numpy(dtype=float), data["w"].to_numpy(dtype=float)
    Z = X - w @ X / w.sum()
    S = (Z * w[:, None]).T @ Z / w.sum()
    one = (np.linalg.slogdet(sigma)[1] - np.linalg.slogdet(S)[1]
           + np.einsum("ij,jk,ik->i", Z, np.linalg.inv(sigma), Z) - np.einsum("ij,jk,ik->i", Z, np.linalg.inv(S), Z))
    return w * one


def test_frequency_weighted_shares_sum_to_the_chi_square(weighted):
    data = weighted[ITEMS + ["w"]]
    result = cfa_tool.fit(THREE_FACTORS, data, weights="w", weight_kind="frequency")
    group = result.groups[0]
    direct = _direct_shares(data, np.asarray(group.implied_covariance))
    assert direct.sum() == pytest.approx(result.fit.chi_square, rel=1e-9)
    top = np.argsort(-direct, kind="stable")[:len(group.influential_cases)]
    assert [c.row for c in group.influential_cases] == top.tolist()  # the frame's index labels 0, 1, ...
    assert [c.chi_square_share for c in group.influential_cases] == pytest.approx(direct[top].tolist(), rel=1e-8)
    from cfa_tool.reporting.tables import case_table

    assert case_table(result).note.endswith(
        "Under the frequency weights each row's contribution is its weight times its own, and its distances are from "
        "the weighted means and covariances.")
    # the rows repeated by their weights, fitted without weights: the same chi-square, and a copy's share times the
    # weight is the row's share
    repeated = data.loc[data.index.repeat(data["w"].astype(int)), ITEMS].reset_index(drop=True)
    plain = cfa_tool.fit(THREE_FACTORS, repeated)
    assert plain.fit.chi_square == pytest.approx(result.fit.chi_square, rel=1e-8)
    first_copy = int(np.flatnonzero(data.index.repeat(data["w"].astype(int)) == top[0])[0])
    copy = next(c for c in plain.groups[0].influential_cases if c.row == first_copy)
    assert copy.chi_square_share * data["w"].iloc[top[0]] == pytest.approx(direct[top[0]], rel=1e-7)


@pytest.mark.parametrize("kind, group, gap", [("frequency", None, True), ("sampling", None, False),
                                              ("sampling", "school", True)])
def test_every_rows_share_sums_to_its_groups_chi_square(weighted, kind, group, gap):
    # every row's share (the table keeps the 10 largest: here all of them), under frequency and sampling weights, with
    # complete rows and with a gap (full-information ML), in one group and in two
    from cfa_tool.assessment import diagnostics
    from cfa_tool.pipeline import continuous

    data = weighted if group else weighted.drop(columns="school")
    if gap:
        data = data.copy()
        data.iloc[4, 2] = np.nan
    whole, gaps = diagnostics.case_diagnostics, diagnostics.incomplete_case_diagnostics
    with mock.patch.object(continuous, "case_diagnostics", lambda *a, **k: whole(*a, **{**k, "top": 1000})), \
            mock.patch.object(continuous, "incomplete_case_diagnostics", lambda *a, **k: gaps(*a, **{**k, "top": 1000})):
        result = cfa_tool.fit(THREE_FACTORS, data, weights="w", weight_kind=kind, group=group)
    assert sum(len(g.influential_cases) for g in result.groups) == len(data)
    for g in result.groups:
        assert sum(c.chi_square_share for c in g.influential_cases) == pytest.approx(g.chi_square, rel=1e-9)
