"""Each row's standard error of measurement of its item sum or mean, from the items it answered: a prorated sum has
the SEM of the sum of its answered items, scaled as the score is.

Check values and their sources:
* continuous items of one factor with uncorrelated errors: the error variance of a sum of items is the sum of their
  error variances (classical test theory, Lord & Novick 1968; an identity independent of the code's SD sqrt(1 -
  omega)), so a row that answered the items A of J has SEM (J / a) sqrt(sum_A theta_i) for its prorated sum and
  sqrt(sum_A theta_i) / a for its mean, computed here from the fit's estimates (Holzinger & Swineford 1939 data,
  tests/datasets, with answers removed by hand);
* ordinal items: the error variance of the sum of the answers' codes is Var(X) - Var(E[X | f]), both Green & Yang's
  (2009, eqs. 19-20) sums written out here term by term with scipy.stats.multivariate_normal for the answered items,
  from the fitted loadings, factor variance and thresholds of rows simulated with numpy (fixed seed).
"""

from __future__ import annotations

import numpy as np
import pytest
from scipy import stats

import cfa_tool
from cfa_tool.reporting.score_report import scores_report
from tests.scoring.test_item_sum_quality_once import _ordinal_answers

MODEL = "factor visual: x1, x2, x3\nfactor textual: x4, x5, x6\n"


def test_a_prorated_sum_has_the_sem_of_the_items_it_answered(hs_data):
    data = hs_data.copy()
    data.loc[data.index[3], "x2"] = np.nan  # visual from x1 and x3
    data.loc[data.index[5], "x1"] = np.nan  # visual from x2 and x3
    result = cfa_tool.scores(MODEL, data, methods=["item-sum", "item-mean"], standard_errors=True)
    est = {(r.kind, r.variables): r.estimate for r in result.fit.estimates}
    theta = {x: est[("residual_variance", (x,))] for x in ("x1", "x2", "x3")}
    table = result.table
    for row, answered in ((3, ("x1", "x3")), (5, ("x2", "x3")), (0, ("x1", "x2", "x3"))):
        error = np.sqrt(sum(theta[x] for x in answered))  # classical test theory, uncorrelated errors
        a = len(answered)
        assert table["visual_item_sum_sem"].iloc[row] == pytest.approx(3 / a * error, rel=1e-6)
        assert table["visual_item_mean_sem"].iloc[row] == pytest.approx(error / a, rel=1e-6)
    # a row that answered every item has the precision table's SEM
    (full,) = [p for p in result.item_sums[0].precision if p.factor == "visual" and p.method.value == "item-sum"]
    assert table["visual_item_sum_sem"].iloc[0] == pytest.approx(full.standard_error, rel=1e-9)
    note = next(t for t in scores_report(result).tables if t.title == "Precision of one person's item score").note
    low, high = sorted(3 / 2 * np.sqrt(theta[a] + theta[b]) for a, b in (("x1", "x3"), ("x2", "x3")))
    assert f"Prorated rows here: visual 2 rows, item sum SEM {low:.2f} to {high:.2f}." in note
    assert "Each row's own SEM is in the file's _sem columns" in note
    assert result.to_dict()["item_sums"][0]["prorated_standard_errors_of_measurement"] == [
        {"factor": "visual", "method": "item-sum", "least": pytest.approx(low), "largest": pytest.approx(high), "rows": 2}]


def test_item_sums_alone_take_standard_errors_now_that_they_have_them(hs_data):
    result = cfa_tool.scores(MODEL, hs_data, methods="item-sum", standard_errors=True)
    assert list(result.table.columns[:4]) == ["visual_item_sum", "visual_item_sum_sem", "textual_item_sum",
                                              "textual_item_sum_sem"]
    assert "(an item sum's or mean's: its standard error of measurement, _sem)" in result.summary().replace("\n", " ")


def _error_variance_by_hand(lam, phi, thresholds, codes):
    """Var(X) - Var(E[X | f]) of the sum of the answers' codes (Green & Yang 2009, eqs. 19-20, one factor, keys +1,
    latent responses of unit variance): the sum over item pairs and threshold pairs of d d (Phi2(t, t'; r) -
    Phi2(t, t'; r*)), r the whole implied correlation (1 for an item with itself) and r* = lam_i lam_j phi."""
    total = 0.0
    for i in range(len(lam)):
        for j in range(len(lam)):
            common = lam[i] * lam[j] * phi
            for a, da in zip(thresholds[i], np.diff(codes[i])):
                for b, db in zip(thresholds[j], np.diff(codes[j])):
                    whole = stats.norm.cdf(min(a, b)) if i == j else \
                        stats.multivariate_normal(cov=[[1, common], [common, 1]]).cdf([a, b])
                    due = stats.multivariate_normal(cov=[[1, common], [common, 1]]).cdf([a, b])
                    total += da * db * (whole - due)
    return total


def test_an_ordinal_prorated_sum_has_the_sem_of_its_answered_codes():
    frame = _ordinal_answers(1200, 1404)
    frame.loc[7, "a2"] = np.nan
    result = cfa_tool.scores("factor f: a1, a2, a3, a4\n", frame, methods="item-sum", ordinal="all")
    est = {(r.kind, r.variables): r.estimate for r in result.fit.estimates}
    phi = est[("factor_variance", ("f",))]
    kept = ("a1", "a3", "a4")
    lam = [est[("loading", ("f", x))] for x in kept]
    thresholds = [[est[("threshold", (x, str(k)))] for k in (1, 2, 3)] for x in kept]
    error = np.sqrt(_error_variance_by_hand(lam, phi, thresholds, [[1, 2, 3, 4]] * 3))
    assert result.table["f_item_sum_sem"].iloc[7] == pytest.approx(4 / 3 * error, rel=1e-5)
    (full,) = result.item_sums[0].precision
    assert result.table["f_item_sum_sem"].iloc[0] == pytest.approx(full.standard_error, rel=1e-9)
