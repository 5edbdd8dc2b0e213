"""A fit of summary statistics computes what needs no rows and says what needs them (hostile s19, case 01: omega, the
distinctness table and the normalized residuals vanished without a word).

Holzinger & Swineford (1939), three factors: the covariance matrix of the 301 children (divisor N - 1) gives the
same estimates as the rows; omega is checked against McDonald's (1999) formula, (sum lambda)^2 phi /
((sum lambda)^2 phi + sum theta), written out here from the estimates; the normalized residuals and HTMT of the
matrix equal those of the rows, which use the same covariances.
"""

from __future__ import annotations

import numpy as np

import cfa_tool
from cfa_tool.reporting import tables as T
from cfa_tool.reporting.paragraph import methods_paragraph
from tests.conftest import THREE_FACTORS, holzinger_swineford

ITEMS = [f"x{i}" for i in range(1, 10)]


def _fits():
    data = holzinger_swineford()[ITEMS]
    rows = cfa_tool.fit(THREE_FACTORS, data)
    matrix = cfa_tool.fit(THREE_FACTORS, covariance=data.cov().to_numpy(), n_obs=len(data), variables=ITEMS)
    return rows, matrix


def _omega_by_hand(result, factor: str) -> float:
    loadings = [r.estimate for r in result.estimates if r.kind == "loading" and r.variables[0] == factor]
    items = [r.variables[1] for r in result.estimates if r.kind == "loading" and r.variables[0] == factor]
    phi = next(r.estimate for r in result.estimates if r.kind == "factor_variance" and r.variables[0] == factor)
    theta = [r.estimate for r in result.estimates if r.kind == "residual_variance" and r.variables[0] in items]
    common = sum(loadings) ** 2 * phi
    return common / (common + sum(theta))  # McDonald 1999


def test_reliability_distinctness_and_residuals_come_from_the_matrix():
    rows, matrix = _fits()
    group = matrix.groups[0]
    assert group.reliability and group.htmt and group.normalized_residuals is not None
    for r in group.reliability:
        assert np.isclose(r.omega, _omega_by_hand(matrix, r.factor), atol=1e-4)
    for a, b in zip(rows.groups[0].reliability, group.reliability):
        assert np.isclose(a.omega, b.omega, atol=1e-4) and np.isclose(a.alpha, b.alpha, atol=1e-6)
    assert np.allclose([h.ratio for h in rows.groups[0].htmt], [h.ratio for h in group.htmt])
    # the normalized residuals of the rows' fit, which divides the same residuals by the same normal-theory SEs
    assert np.allclose(rows.groups[0].normalized_residuals, group.normalized_residuals, atol=1e-3)
    assert T.distinct_table(matrix) is not None and T.reliability_table(matrix) is not None
    assert "omega (McDonald, 1999)" in methods_paragraph(matrix)


def test_what_needs_rows_is_named_and_no_mean_is_made_up():
    _, matrix = _fits()
    [line] = [str(x) for x in T.normality_lines(matrix)]
    assert "Mardia" in line and "unusual and influential rows" in line
    assert all(r.sum_score_mean is None for r in matrix.groups[0].reliability)  # no means given: none known
    table = T.sum_score_table(matrix)
    assert all(row[3] == "not given" for row in table.rows) and "gives no means" in str(table.note)
    assert "summary statistics given (N = 301)" in str(table.note)


def test_a_correlation_matrix_without_sds_gives_no_sum_sd():
    # the SD of a sum of standardized items is no sum of the answers' SD (hostile tester s24: 2.27 printed where the
    # raw sums' SD is 2.63): 'not given' in every view, as the mean is; with the SDs the sum's SD is the raw sum's
    import json

    from cfa_tool.reporting.json_report import to_json

    data = holzinger_swineford()[ITEMS]
    corr = data.corr()
    without = cfa_tool.fit(THREE_FACTORS, covariance=corr, n_obs=len(data), matrix="correlation")
    assert all(r.sum_score_sd is None for r in without.groups[0].reliability)
    table = T.sum_score_table(without)
    assert len(table.rows) == 3 and all(row[3] == row[4] == "not given" for row in table.rows)
    assert "gives no means or standard deviations, so the sums' means and SDs are not shown" in str(table.note)
    assert all(f["sum_score_sd"] is None for f in json.loads(to_json(without))["reliability"]["factors"])
    with_sds = cfa_tool.fit(THREE_FACTORS, covariance=corr, n_obs=len(data), matrix="correlation", sds=data.std())
    visual = next(r for r in with_sds.groups[0].reliability if r.factor == "visual")
    # pandas' SD (divisor N - 1) of the raw sum x1 + x2 + x3 of the Holzinger & Swineford (1939) rows
    assert np.isclose(visual.sum_score_sd, data[["x1", "x2", "x3"]].sum(axis=1).std(), rtol=1e-6)
