"""replicate's test of one solution in both samples (workflows.replication).

Checks:
* the closed form for complete rows, N F(S_pooled, Sigma_hat) + sum_g n_g (log|S_pooled| - log|S_g|) minus the
  separate fits' chi-squares, equals the difference of two fits of the tool's own multi-group machinery given in
  the model language: the two samples as groups with 'equal across groups: loadings, error variances, factor
  variances, factor covariances' against the configural fit (an independent path: the parameter table's
  equality constraints, no pooling); and it equals the full-information two-sample fit on the same complete rows;
* with gaps, the two-sample full-information test is the likelihood-ratio statistic of two likelihoods maximised
  by scipy.optimize (the normal densities of each row's answered items by scipy.stats); here 14.31 on 8 df;
* under true replication (calibration and validation drawn from one population) the test rejects at about its
  alpha: the count of rejections at .05 lies in the central 99.9% of Binomial(R, .05) (scipy.stats.binom), where
  the check it replaces (the calibration estimates taken as known) rejected about half of the pairs of equal
  size.  R is small in CI for the full-information and ordinal fits; the long run sets CFA_REPLICATION_PAIRS
  (DEVELOPERS.md).
"""

from __future__ import annotations

import json
import os

import numpy as np
import pandas as pd
import pytest
from scipy import stats

import cfa_tool
from cfa_tool.assessment.fit_indices import chi_square_p
from cfa_tool.data.moments import sample_moments
from cfa_tool.workflows.replication import replicate, replicate_moments
from tests.conftest import THREE_FACTORS

LONG_RUN = int(os.environ.get("CFA_REPLICATION_PAIRS", "0"))
ONE_FACTOR = "factor f: y1, y2, y3, y4\n"
NAMES = ("y1", "y2", "y3", "y4")
LOADINGS = np.array([0.8, 0.7, 0.6, 0.5])
SIGMA = np.outer(LOADINGS, LOADINGS) + np.diag(1 - LOADINGS ** 2)
EQUAL = "equal across groups: loadings, error variances, factor variances, factor covariances\n"


def test_the_closed_form_is_the_two_group_fit_with_every_covariance_parameter_equal(hs_data):
    pasteur, grant_white = hs_data[hs_data.school == "Pasteur"], hs_data[hs_data.school == "Grant-White"]
    rep = cfa_tool.replicate(THREE_FACTORS, pasteur, grant_white)
    equal = cfa_tool.fit(THREE_FACTORS + EQUAL, hs_data, group="school")
    configural = cfa_tool.fit(THREE_FACTORS, hs_data, group="school")
    same = rep.same_solution
    assert same.chi_square_difference == pytest.approx(equal.fit.chi_square - configural.fit.chi_square, rel=1e-6)
    assert same.df_difference == equal.fit.df - configural.fit.df == 21  # q: 45 moments - 24 df
    assert configural.fit.chi_square == pytest.approx(
        rep.calibration_result.fit.chi_square + rep.loose.fit.chi_square, rel=1e-6)
    assert same.p_value == pytest.approx(chi_square_p(same.chi_square_difference, 21), rel=1e-9)
    # full-information ML on complete rows is ML: the two-sample fit with one solution gives the closed form's value
    fiml = cfa_tool.replicate(THREE_FACTORS, pasteur, grant_white, missing="full-information")
    assert fiml.same_solution.chi_square_difference == pytest.approx(same.chi_square_difference, rel=1e-5)
    assert fiml.same_solution.df_difference == 21


def test_the_json_block_is_renamed_so_that_readers_of_the_old_check_fail(hs_data):
    rep = cfa_tool.replicate(THREE_FACTORS, hs_data.iloc[:150], hs_data.iloc[150:])
    out = rep.entry()
    assert "tight" not in out
    block = out["same_solution_test"]
    assert block["df_difference"] == 21 and block["method"] == "likelihood ratio"
    assert block["chi_square_difference"] == pytest.approx(rep.same_solution.chi_square_difference)
    json.dumps(out)


def _draw(rng, n: int, gaps: float = 0.0, cuts=None) -> pd.DataFrame:
    x = rng.multivariate_normal(np.zeros(4), SIGMA, n)
    if cuts is not None:
        x = np.searchsorted(cuts, x) + 1.0
    if gaps:
        x[rng.random(x.shape) < gaps] = np.nan
    return pd.DataFrame(x, columns=list(NAMES))


def _within_binomial(rejections: int, pairs: int) -> None:
    low, high = stats.binom.interval(0.999, pairs, 0.05)
    assert low <= rejections <= high, f"{rejections} of {pairs} true replications rejected at .05"


def test_true_replications_are_rejected_at_about_alpha_with_complete_rows():
    rng = np.random.default_rng(20261203)
    pairs = LONG_RUN or 400
    spec = cfa_tool.parse_model(ONE_FACTOR)
    rejected = old = 0
    for _ in range(pairs):
        calibration = sample_moments(_draw(rng, 200), NAMES, "calibration")
        validation = sample_moments(_draw(rng, 200), NAMES, "validation")
        rep = replicate_moments(spec, calibration, validation)
        rejected += rep.same_solution.p_value < 0.05
        old += chi_square_p(200 * rep.cvi, 10) < 0.05  # the replaced check: N F(S_val, Sigma_cal) on p(p+1)/2 df
    _within_binomial(rejected, pairs)
    assert old > stats.binom.interval(0.999, pairs, 0.05)[1]  # what the old check did with these pairs


@pytest.mark.parametrize("kind", ["full-information", "ordinal"])
def test_true_replications_are_rejected_at_about_alpha_with_gaps_and_with_ordinal_items(kind):
    rng = np.random.default_rng(7 if kind == "ordinal" else 8)
    pairs = LONG_RUN or (60 if kind == "ordinal" else 100)
    rejected = tested = 0
    for _ in range(pairs):
        if kind == "ordinal":
            cuts = (-1.0, 0.0, 1.0)
            rep = replicate(ONE_FACTOR, _draw(rng, 200, cuts=cuts), _draw(rng, 200, cuts=cuts), ordinal="all")
        else:
            rep = replicate(ONE_FACTOR, _draw(rng, 200, 0.1), _draw(rng, 200, 0.1))
            assert rep.loose.method.missing.value == "full-information"
        if rep.same_solution.not_computed:  # only between solutions that are not admissible (hostile s12)
            assert not (rep.calibration_result.admissible and rep.loose.admissible)
            continue
        tested += 1
        rejected += rep.same_solution.p_value < 0.05
    assert tested >= 0.95 * pairs  # a chance impossible solution in a sample of 200 is rare
    _within_binomial(rejected, tested)


def _by_pattern(rows: np.ndarray) -> list[tuple[np.ndarray, np.ndarray]]:
    """The rows with gaps split once by the items they answer: (answered items, those rows' answers) pairs."""
    answered = ~np.isnan(rows)
    return [(o, rows[(answered == o).all(axis=1)][:, o]) for o in np.unique(answered, axis=0)]


def _minus_two_log_likelihood(patterns: list[tuple[np.ndarray, np.ndarray]], mean: np.ndarray,
                              sigma: np.ndarray) -> float:
    """-2 log L of rows with gaps (split by ``_by_pattern``), each row by the normal density of its answered items
    (scipy.stats)."""
    total = 0.0
    for o, same in patterns:
        total += np.sum(np.atleast_1d(stats.multivariate_normal.logpdf(same, mean[o], sigma[np.ix_(o, o)])))
    return -2.0 * total


def _one_factor_sigma(x: np.ndarray) -> np.ndarray:
    """Sigma of one factor with the first loading 1 (marker): x = 3 loadings, log factor variance, 4 log error
    variances (logs keep the variances positive for the unconstrained optimiser)."""
    loadings = np.concatenate([[1.0], x[:3]])
    return np.exp(x[3]) * np.outer(loadings, loadings) + np.diag(np.exp(x[4:8]))


def test_the_two_sample_full_information_test_is_the_likelihood_ratio_scipy_maximises():
    # -2 log L maximised by scipy.optimize (BFGS from plain starts): one Sigma for both samples, each its own means,
    # against each sample with its own Sigma and means; the difference is the likelihood-ratio statistic on q = 8 df
    from scipy.optimize import minimize

    rng = np.random.default_rng(31)
    samples = [_draw(rng, 180, 0.12).to_numpy(), _draw(rng, 150, 0.12).to_numpy()]
    patterns = [_by_pattern(rows) for rows in samples]
    start = np.array([0.8, 0.8, 0.8, np.log(0.6), *np.log([0.4] * 4)])

    def separate(g: int) -> float:
        means = np.nanmean(samples[g], axis=0)
        found = minimize(lambda x: _minus_two_log_likelihood(patterns[g], x[8:], _one_factor_sigma(x)),
                         np.concatenate([start, means]), method="BFGS", options={"gtol": 1e-7})
        return found.fun

    def together(x: np.ndarray) -> float:
        sigma = _one_factor_sigma(x)
        return sum(_minus_two_log_likelihood(split, x[8 + 4 * g: 12 + 4 * g], sigma) for g, split in enumerate(patterns))

    one = minimize(together, np.concatenate([start, *[np.nanmean(r, axis=0) for r in samples]]), method="BFGS",
                   options={"gtol": 1e-7})
    statistic = one.fun - sum(separate(g) for g in range(len(samples)))
    frames = [pd.DataFrame(rows, columns=list(NAMES)) for rows in samples]
    rep = replicate(ONE_FACTOR, *frames)
    assert rep.same_solution.df_difference == 8
    assert rep.same_solution.chi_square_difference == pytest.approx(statistic, rel=1e-3, abs=1e-3)


def test_a_robust_test_asked_for_gives_no_normal_theory_test_of_one_solution(hs_data):
    # review s11: with test='robust' the test of one solution took the plain likelihood-ratio difference (28 of 30
    # true replications of heavy-tailed answers rejected) and, with complete rows, failed with an error about raw rows;
    # review s12: it is the scaled difference (tests/workflows/test_replication_robust_one_solution.py checks it)
    rep = cfa_tool.replicate(THREE_FACTORS, hs_data.iloc[:150], hs_data.iloc[150:], test="robust")
    assert not rep.same_solution.not_computed
    block = rep.entry()["same_solution_test"]
    assert block["method"] == "Satorra-Bentler 2001 scaled difference" and 0.0 < block["p_value"] < 1.0
