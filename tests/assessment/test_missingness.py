"""Little's (1988) test of answers missing completely at random (assessment.missingness), checked against the
formula computed here by hand (maximum-likelihood moments by scipy's optimizer on the observed-data likelihood,
patterns by numpy) and against two packages' implementations run on the same rows."""

from __future__ import annotations

import json

import numpy as np
import pandas as pd
import pytest
from scipy import optimize, stats

import cfa_tool
from cfa_tool.assessment.missingness import LISTWISE_NEEDS, READING, TEST_NAME, little_distance
from cfa_tool.data.patterns import pattern_data
from cfa_tool.reporting.json_report import to_json
from cfa_tool.reporting.paragraph import methods_paragraph
from cfa_tool.reporting.tables import missing_table

nan = np.nan
#: 30 invented rows of three items (simulated once, seed 11, and written out): y2 is missing mostly where y1 is high
ROWS = np.array([
    [3.6, 2.6, nan], [3.2, 3.0, 4.6], [2.7, 1.8, 3.5], [5.0, nan, 4.5], [2.2, 2.0, 3.6],
    [2.6, 2.4, 3.1], [3.0, 3.1, nan], [4.3, nan, 5.0], [4.5, nan, 6.0], [3.9, nan, 5.9],
    [1.9, 1.8, nan], [2.7, 2.5, nan], [2.6, 2.4, 2.9], [3.9, 3.3, 4.4], [1.5, 1.2, 4.0],
    [3.5, nan, 5.7], [2.8, 1.4, nan], [nan, 1.9, 2.9], [2.1, 1.0, 4.0], [2.2, 1.2, nan],
    [nan, 3.1, 3.7], [2.8, 2.9, nan], [2.6, 1.8, 3.6], [3.9, nan, 3.7], [3.7, nan, 3.7],
    [1.3, 0.1, 3.5], [2.2, 2.3, 3.8], [1.8, 0.8, 3.7], [1.4, 0.9, 4.0], [4.8, nan, nan],
])
ONE_FACTOR = "factor f: y1, y2, y3\n"


def _frame(rows: np.ndarray = ROWS) -> pd.DataFrame:
    return pd.DataFrame(rows, columns=["y1", "y2", "y3"])


def _ml_moments(rows: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Mean and covariance maximising the observed-data normal likelihood, found by scipy's optimizer over the mean
    and a Cholesky factor (an estimation route apart from the tool's EM algorithm)."""
    p = rows.shape[1]
    low = np.tril_indices(p)

    def unpack(x):
        chol = np.zeros((p, p))
        chol[low] = x[p:]
        chol[np.diag_indices(p)] = np.exp(np.diag(chol))
        return x[:p], chol @ chol.T

    seen = ~np.isnan(rows)
    groups = [rows[(seen == pattern).all(axis=1)][:, pattern] for pattern in np.unique(seen, axis=0)]
    patterns = np.unique(seen, axis=0)

    def minus_loglik(x):  # the normal log-density of each row on the items it answered, up to a constant
        mu, sigma = unpack(x)
        total = 0.0
        for pattern, mine in zip(patterns, groups):
            part = sigma[np.ix_(pattern, pattern)]
            dev = mine - mu[pattern]
            total += 0.5 * (len(mine) * np.linalg.slogdet(part)[1]
                            + np.einsum("ra,ra->", dev, np.linalg.solve(part, dev.T).T))
        return total

    start = np.concatenate([np.nanmean(rows, axis=0), np.zeros(len(low[0]))])
    start[p:][low[0] == low[1]] = np.log(np.nanstd(rows, axis=0))
    found = optimize.minimize(minus_loglik, start, method="BFGS", options={"gtol": 1e-9})
    return unpack(found.x)


def _little_by_hand(rows: np.ndarray, mu: np.ndarray, sigma: np.ndarray) -> tuple[float, int]:
    """Little (1988, eq. 5): d^2 = sum_j n_j (ybar_j - mu_j)' Sigma_jj^-1 (ybar_j - mu_j), df = sum_j p_j - p,
    pattern by pattern, the patterns found by numpy."""
    seen = ~np.isnan(rows)
    d2, answered = 0.0, 0
    for pattern in np.unique(seen, axis=0):
        mine = rows[(seen == pattern).all(axis=1)][:, pattern]
        dev = mine.mean(axis=0) - mu[pattern]
        d2 += len(mine) * dev @ np.linalg.solve(sigma[np.ix_(pattern, pattern)], dev)
        answered += int(pattern.sum())
    return d2, answered - rows.shape[1]


def test_the_fit_gives_littles_test_as_the_formula_computed_by_hand():
    # reference: the formula above with maximum-likelihood moments from scipy's optimizer (not the tool's EM)
    mu, sigma = _ml_moments(ROWS)
    d2, df = _little_by_hand(ROWS, mu, sigma)
    # counted by hand from ROWS: 13 complete rows, 7 without y3, 7 without y2, 2 without y1, 1 with y1 only, so
    # df = (3 + 2 + 2 + 2 + 1) - 3 = 7
    assert df == 7
    result = cfa_tool.fit(ONE_FACTOR, _frame(), missing="full-information")
    test = result.completely_at_random
    assert test.df == df and test.patterns == 5
    assert test.chi_square == pytest.approx(d2, rel=1e-5)
    assert test.p_value == pytest.approx(stats.chi2.sf(d2, df), rel=1e-4)  # scipy's chi-square
    assert test.p_value < 0.01  # the gaps of y2 go with y1's answers: the test sees it
    saved = json.loads(to_json(result))["missing_data"]["completely_at_random_test"]
    assert saved["chi_square"] == pytest.approx(d2, rel=1e-5) and saved["df"] == 7 and saved["method"] == "Little (1988)"


def test_a_significant_test_is_worded_as_evidence_not_as_a_fact():
    # new-user trial s21: answers made missing completely at random gave p = .006 on one half (a chance rejection:
    # p = .16 on the other), and the paragraph said 'so the answers are not missing completely at random'.  A test
    # rejects with a chance of alpha when they are; the rejection is evidence, as a non-rejection is no proof.
    result = cfa_tool.fit(ONE_FACTOR, _frame(), missing="full-information")
    test = result.completely_at_random
    assert test.p_value < 0.01  # the formula computed by hand above, and two packages, agree (p about .002)
    paragraph = methods_paragraph(result)
    assert (f"{TEST_NAME} was significant (\u03c7\u00b2({test.df}) = {test.chi_square:.2f}, p = .00"
            in paragraph)
    assert "evidence that the answers are not missing completely at random" in paragraph
    assert "so the answers are not" not in paragraph
    note = str(missing_table(result).note)
    assert "evidence that the answers are not missing completely at random" in note
    assert "the answers are not missing completely at random." not in note.replace("evidence that the answers", "")


def test_the_statistic_matches_two_packages_given_their_moments():
    # pyampute 0.0.3 (MCARTest.little_mcar_test) and mcartest 0.0.0a4 (MCARTest.little_mcar_test, return_stats=True),
    # run once on ROWS on 2026-12-03 (they estimate mu and Sigma from the available answers, pandas' mean and
    # pairwise covariance with divisor n - 1, not by EM): statistic 22.740142218127893 (mcartest), df 7,
    # p 0.00189156047193495 (both).  Given the same moments, the tool's statistic must be theirs.
    frame = _frame()
    d2, df = little_distance(pattern_data(ROWS), frame.mean().to_numpy(), frame.cov().to_numpy())
    assert df == 7
    assert d2 == pytest.approx(22.740142218127893, rel=1e-12)
    assert stats.chi2.sf(d2, df) == pytest.approx(0.00189156047193495, rel=1e-10)


def test_rows_that_miss_at_random_give_a_test_that_does_not_reject_and_the_report_says_what_it_cannot_show():
    rng = np.random.default_rng(3)
    rows = rng.multivariate_normal([0, 0, 0, 0], 0.5 + 0.5 * np.eye(4), size=400)
    rows[rng.random(rows.shape) < 0.15] = np.nan  # missing completely at random
    rows = rows[~np.isnan(rows).all(axis=1)]
    result = cfa_tool.fit("factor f: a, b, c, d\n", pd.DataFrame(rows, columns=list("abcd")), missing="full-information")
    d2, df = _little_by_hand(rows, *_ml_moments(rows))
    test = result.completely_at_random
    assert (test.chi_square, test.df) == (pytest.approx(d2, rel=1e-5), df)
    assert test.p_value > 0.05
    note = str(missing_table(result).note)  # as the program's user reads it (its advice a Note)
    assert TEST_NAME in note and str(READING) in note and f"on {df} df" in note
    assert "auxiliary variables" in note
    paragraph = methods_paragraph(result)
    assert f"{TEST_NAME} was not significant (\u03c7\u00b2({df}) = {test.chi_square:.2f}" in paragraph
    assert "missing at random given the items analysed" in paragraph
    text = result.summary()
    assert "Little's (1988) test" in " ".join(text.split())  # the terminal view too


def test_groups_add_up_and_each_group_is_given():
    rng = np.random.default_rng(5)
    frames = []
    for label, n in (("east", 200), ("west", 150)):
        rows = rng.multivariate_normal([0, 0, 0], 0.5 + 0.5 * np.eye(3), size=n)
        rows[rng.random(rows.shape) < 0.2] = np.nan
        rows = rows[~np.isnan(rows).all(axis=1)]
        frames.append(pd.DataFrame(rows, columns=["y1", "y2", "y3"]).assign(site=label))
    data = pd.concat(frames, ignore_index=True)
    result = cfa_tool.fit(ONE_FACTOR, data, group="site", missing="full-information")
    test = result.completely_at_random
    parts = {}
    for frame in frames:
        rows = frame[["y1", "y2", "y3"]].to_numpy()
        parts[frame.site.iloc[0]] = _little_by_hand(rows, *_ml_moments(rows))
    assert test.chi_square == pytest.approx(sum(d2 for d2, _ in parts.values()), rel=1e-5)
    assert test.df == sum(df for _, df in parts.values())
    for label, d2, df, p in test.groups:
        assert (d2, df) == (pytest.approx(parts[label][0], rel=1e-5), parts[label][1])
        assert p == pytest.approx(stats.chi2.sf(d2, df))
    assert "group east: chi-square" in str(missing_table(result).note)


def test_listwise_fits_and_sampling_weights_have_no_test():
    listwise = cfa_tool.fit(ONE_FACTOR, _frame(), missing="listwise")
    assert listwise.completely_at_random is None
    assert LISTWISE_NEEDS in missing_table(listwise).note
    weighted = _frame().assign(w=np.linspace(0.5, 1.5, len(ROWS)))
    result = cfa_tool.fit(ONE_FACTOR, weighted, missing="full-information", weights="w", weight_kind="sampling")
    assert result.completely_at_random is None
    assert "not computed with sampling weights" in str(missing_table(result).note)


def test_frequency_weights_count_each_row_as_often_as_its_weight():
    # a row of weight k is k identical rows: the test of the weighted rows is the test of the rows repeated
    counts = np.tile([1, 2, 3], len(ROWS) // 3)
    weighted = _frame().assign(k=counts.astype(float))
    repeated = _frame(np.repeat(ROWS, counts, axis=0))
    by_weight = cfa_tool.fit(ONE_FACTOR, weighted, missing="full-information", weights="k",
                             weight_kind="frequency").completely_at_random
    d2, df = _little_by_hand(repeated.to_numpy(), *_ml_moments(repeated.to_numpy()))
    assert (by_weight.chi_square, by_weight.df) == (pytest.approx(d2, rel=1e-5), df)
