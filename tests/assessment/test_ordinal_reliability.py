"""The reliability of the observed sum of ordinal answers (Green & Yang 2009), beside the latent-response omega.

Check values: (1) Green & Yang's (2009, eqs. 19-21) formula written out here term by term with
scipy.stats.multivariate_normal.cdf for every pair of thresholds; (2) the sample alpha (Cronbach 1951; KR-20 for
yes/no items, Kuder & Richardson 1937) of large simulated samples from a population set here: with equal loadings
and equal thresholds the items' true scores E[x_i | f] are equal, so the answers are essentially tau-equivalent and
the population alpha of their sum equals its reliability (Lord & Novick 1968, theorem 4.4.3, recalled from memory),
which the observed-sum omega must then match within the sampling error of alpha."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest
from scipy import stats

import cfa_tool
from cfa_tool.assessment.ordinal_reliability import observed_sum_omega


def _green_yang_by_hand(lam, phi, thresholds, codes, keys):
    """Green & Yang (2009): sum over item pairs and threshold pairs of d d k k (Phi2(t, t'; r) - Phi(t) Phi(t')),
    with r the factor's part of the correlation (numerator) or the whole implied correlation (denominator; one
    factor, no residual covariances: lam_i lam_j phi off the diagonal, 1 on it)."""
    num = den = 0.0
    p = len(lam)
    for i in range(p):
        for j in range(p):
            common = lam[i] * lam[j] * phi
            whole = 1.0 if i == j else common
            for a, da in zip(thresholds[i], np.diff(codes[i])):
                for b, db in zip(thresholds[j], np.diff(codes[j])):
                    margin = stats.norm.cdf(a) * stats.norm.cdf(b)
                    w = da * db * keys[i] * keys[j]
                    num += w * (stats.multivariate_normal(cov=[[1, common], [common, 1]]).cdf([a, b]) - margin)
                    if i == j:
                        den += w * (stats.norm.cdf(min(a, b)) - margin)
                    else:
                        den += w * (stats.multivariate_normal(cov=[[1, whole], [whole, 1]]).cdf([a, b]) - margin)
    return num / den


def test_the_formula_matches_green_and_yang_written_out_with_scipy():
    lam = np.array([0.8, 0.6, 0.7, 0.5])
    thresholds = [np.array([-1.0, 0.2, 1.1]), np.array([0.3]), np.array([-0.4, 0.6]), np.array([-1.5, -0.2, 0.7])]
    codes = [np.array([1.0, 2, 3, 4]), np.array([0.0, 1]), np.array([1.0, 2, 4]), np.array([1.0, 2, 3, 5])]
    keys = np.array([1.0, 1.0, -1.0, 1.0])
    sigma = np.outer(lam, lam)
    np.fill_diagonal(sigma, 1.0)
    mine = observed_sum_omega(thresholds, [np.diff(c) for c in codes], np.zeros(4), sigma, np.outer(lam, lam), keys)
    assert mine == pytest.approx(_green_yang_by_hand(lam, 1.0, thresholds, codes, keys), abs=2e-5)
    # a latent response in another metric (mean 0.5, variance 4, thresholds moved alike) gives the same value
    scale = np.array([2.0, 1.0, 1.0, 1.0])
    moved = [t * s + 0.5 * (k == 0) for k, (t, s) in enumerate(zip(thresholds, scale))]
    again = observed_sum_omega(moved, [np.diff(c) for c in codes], np.array([0.5, 0, 0, 0]),
                               sigma * np.outer(scale, scale), np.outer(lam * scale, lam * scale), keys)
    assert again == pytest.approx(mine, abs=1e-12)


def _binary_sample(n: int, seed: int, loading: float = 0.7, cut: float = 0.4, items: int = 6) -> pd.DataFrame:
    rng = np.random.default_rng(seed)
    f = rng.normal(size=(n, 1))
    y = loading * f + np.sqrt(1 - loading**2) * rng.normal(size=(n, items))
    return pd.DataFrame((y > cut).astype(float), columns=[f"c{j + 1}" for j in range(items)])


def _alpha(frame: pd.DataFrame) -> float:
    C = np.cov(frame.to_numpy().T)
    k = len(C)
    return k / (k - 1) * (1 - np.trace(C) / C.sum())


def test_the_population_value_is_the_alpha_of_essentially_tau_equivalent_answers():
    # population: six yes/no items, loadings .7, thresholds .4; alpha (KR-20) of 400,000 simulated rows has a
    # standard error near .001
    lam = np.full(6, 0.7)
    sigma = np.outer(lam, lam)
    np.fill_diagonal(sigma, 1.0)
    population = observed_sum_omega([np.array([0.4])] * 6, [np.array([1.0])] * 6, np.zeros(6), sigma,
                                    np.outer(lam, lam), np.ones(6))
    assert population == pytest.approx(_alpha(_binary_sample(400_000, 11)), abs=0.004)


def test_a_fit_reports_the_observed_sum_omega_near_the_sample_kr20():
    data = _binary_sample(20_000, 12)
    kr20 = _alpha(data)  # KR-20 of the simulated answers (Kuder & Richardson 1937)
    result = cfa_tool.fit("factor f: c1..c6\n", data, ordinal="all")
    row = result.groups[0].reliability[0]
    assert row.observed_sum_omega == pytest.approx(kr20, abs=0.01)
    assert row.omega > row.observed_sum_omega + 0.05  # the latent responses' sum is more reliable than the count
    assert result.to_dict()["reliability"]["factors"][0]["observed_sum_omega"] == row.observed_sum_omega
    grouped = cfa_tool.fit("factor f: c1..c6\n", data.assign(half=np.arange(len(data)) % 2), ordinal="all",
                           group="half")
    for g in grouped.groups:
        assert g.reliability[0].observed_sum_omega == pytest.approx(kr20, abs=0.02)


def test_the_sums_correlation_with_its_factor_matches_a_large_simulation():
    """The keyed sum's correlation with its factor under the model (Stein's lemma for Cov([y* > tau], f)) against
    numpy's correlation of the simulated sum with the simulated factor (400,000 rows; standard error near .001),
    for four-category answers with a floor, a reversed item, a latent response with a mean and variance of its own,
    and a second factor the items do not load on. Its square lies below the Green & Yang omega here: that omega's
    true score E[X | f] is curved in f, so the two answer different questions (new-user trial 7, U3)."""
    from cfa_tool.assessment.ordinal_reliability import observed_sum_factor_correlation

    rng = np.random.default_rng(23)
    lam = np.array([0.8, 0.7, -0.6, 0.65])
    cuts = [np.array([0.3, 1.0, 1.6]), np.array([0.5, 1.2, 1.8]), np.array([-1.4, -0.8, 0.0]), np.array([0.2, 0.9, 1.5])]
    n = 400_000
    f = rng.normal(size=n)
    y = f[:, None] * lam + rng.normal(size=(n, 4)) * np.sqrt(1 - lam**2)
    answers = np.column_stack([(y[:, i, None] > cuts[i]).sum(axis=1) for i in range(4)]).astype(float)
    keys = np.array([1.0, 1.0, -1.0, 1.0])
    total = answers @ keys
    simulated = np.corrcoef(total, f)[0, 1]
    sigma = np.outer(lam, lam)
    np.fill_diagonal(sigma, 1.0)
    steps = [np.ones(3)] * 4
    mine = observed_sum_factor_correlation(cuts, steps, np.zeros(4), sigma, lam, 1.0, keys)
    assert mine == pytest.approx(simulated, abs=0.004)
    # the same population in another metric: factor variance 2.25, first latent response mean 0.5 and SD 2
    scale, s = np.array([2.0, 1, 1, 1]), 1.5
    moved = [c * a + 0.5 * (k == 0) for k, (c, a) in enumerate(zip(cuts, scale))]
    again = observed_sum_factor_correlation(moved, steps, np.array([0.5, 0, 0, 0]), sigma * np.outer(scale, scale),
                                            lam * scale * s, s**2, keys)
    assert again == pytest.approx(mine, abs=1e-12)
    omega = observed_sum_omega(cuts, steps, np.zeros(4), sigma, np.outer(lam, lam), keys)
    assert mine**2 < omega
