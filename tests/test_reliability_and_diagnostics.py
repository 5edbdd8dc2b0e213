"""Reliability coefficients and diagnostics, computed again by hand from their published formulas."""

from __future__ import annotations

import numpy as np
import pytest

import cfa_tool
from tests.conftest import THREE_FACTORS


@pytest.fixture(scope="module")
def one_factor(hs_data):
    return cfa_tool.fit("factor visual: x1, x2, x3\n", hs_data)


def test_omega_and_composite_reliability_by_hand(one_factor, hs_data):
    est = {(r.kind, r.variables): r for r in one_factor.estimates}
    lam = np.array([est[("loading", ("visual", x))].estimate for x in ("x1", "x2", "x3")])
    theta = np.array([est[("residual_variance", (x,))].estimate for x in ("x1", "x2", "x3")])
    phi = est[("factor_variance", ("visual",))].estimate
    # McDonald (1999): omega = (sum lambda)^2 phi / ((sum lambda)^2 phi + sum theta)
    omega = lam.sum() ** 2 * phi / (lam.sum() ** 2 * phi + theta.sum())
    std = np.array([est[("loading", ("visual", x))].standardized for x in ("x1", "x2", "x3")])
    # Fornell & Larcker (1981): CR = (sum l)^2 / ((sum l)^2 + sum (1 - l^2)); AVE = mean l^2
    cr = std.sum() ** 2 / (std.sum() ** 2 + (1 - std**2).sum())
    (rel,) = one_factor.groups[0].reliability
    assert rel.omega == pytest.approx(omega, rel=1e-10)
    assert rel.omega_total == pytest.approx(omega, rel=1e-10)
    assert rel.composite_reliability == pytest.approx(cr, rel=1e-10)
    assert rel.average_variance_extracted == pytest.approx((std**2).mean(), rel=1e-10)
    # Cronbach (1951), directly from the data
    items = hs_data[["x1", "x2", "x3"]].to_numpy()
    k = 3
    alpha = k / (k - 1) * (1 - items.var(axis=0, ddof=1).sum() / items.sum(axis=1).var(ddof=1))
    assert rel.alpha == pytest.approx(alpha, rel=1e-10)


def test_omega_hierarchical_of_a_higher_order_factor(hs_data):
    result = cfa_tool.fit(THREE_FACTORS + "factor g: visual, textual, speed\n", hs_data)
    est = {(r.kind, r.variables): r.estimate for r in result.estimates}
    items = {"visual": ["x1", "x2", "x3"], "textual": ["x4", "x5", "x6"], "speed": ["x7", "x8", "x9"]}
    # Zinbarg et al. (2005): omega_h = (sum_k gamma_k sum_i lambda_ik)^2 var(g) / var(sum of all items)
    through = sum(est[("loading", ("g", f))] * sum(est[("loading", (f, x))] for x in xs) for f, xs in items.items())
    numerator = through**2 * est[("factor_variance", ("g",))]
    variance_of_sum = result.implied_covariance.sum()
    (g,) = [r for r in result.groups[0].reliability if r.factor == "g"]
    assert g.level == "higher-order"
    assert g.omega_hierarchical == pytest.approx(numerator / variance_of_sum, rel=1e-10)
    residual = sum(est[("residual_variance", (x,))] for x in sum(items.values(), []))
    assert g.omega_total == pytest.approx(1 - residual / variance_of_sum, rel=1e-10)


def test_htmt_and_fornell_larcker(hs_data, hs_three):
    R = hs_data[[f"x{i}" for i in range(1, 10)]].corr().to_numpy()
    a, b = [0, 1, 2], [3, 4, 5]
    hetero = R[np.ix_(a, b)].mean()
    mono = lambda ix: R[np.ix_(ix, ix)][np.triu_indices(3, 1)].mean()  # noqa: E731
    expected = hetero / np.sqrt(mono(a) * mono(b))
    pair = [h for h in hs_three.groups[0].htmt if (h.first, h.second) == ("visual", "textual")][0]
    assert pair.ratio == pytest.approx(expected, rel=1e-10)
    visual = [r for r in hs_three.groups[0].reliability if r.factor == "visual"][0]
    corr = {r.variables: r.standardized for r in hs_three.estimates if r.kind == "factor_covariance"}
    largest = max(abs(corr[("visual", "textual")]), abs(corr[("visual", "speed")]))
    assert visual.largest_correlation == pytest.approx(largest, rel=1e-10)
    assert visual.fornell_larcker_holds == (np.sqrt(visual.average_variance_extracted) > largest)


def test_case_shares_add_up_to_the_chi_square(hs_data, hs_three):
    from cfa_tool.assessment.diagnostics import case_diagnostics

    rows = hs_data[[f"x{i}" for i in range(1, 10)]].to_numpy()
    _, influential = case_diagnostics(rows, hs_three.implied_covariance, None, top=len(rows))
    assert sum(c.chi_square_share for c in influential) == pytest.approx(hs_three.fit.chi_square, rel=1e-9)
    top = hs_three.groups[0].influential_cases[0]
    assert top.chi_square_share == pytest.approx(max(c.chi_square_share for c in influential), rel=1e-12)
    # Mahalanobis distances average p (= 9) with divisor-N covariances
    assert np.mean([c.mahalanobis for c in influential]) == pytest.approx(9.0, rel=1e-9)


def test_case_rows_are_numbered_as_in_the_file(hs_data):
    data = hs_data.reset_index(drop=True).copy()
    data.loc[10, "x1"] = 40.0  # an absurd score in data row 11
    result = cfa_tool.fit(THREE_FACTORS, data)
    assert result.groups[0].unusual_cases[0].row == 11


def test_normalized_residuals(hs_three):
    S, sigma, n = hs_three.sample_covariance, hs_three.implied_covariance, hs_three.n_obs
    i, j = 6, 7  # x7, x8
    expected = (S[i, j] - sigma[i, j]) / np.sqrt((sigma[i, i] * sigma[j, j] + sigma[i, j] ** 2) / n)
    assert hs_three.groups[0].normalized_residuals[i, j] == pytest.approx(expected, rel=1e-12)
