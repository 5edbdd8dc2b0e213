"""Rows that answer no model item but a missing-data helper are analysed (session 13).  They were left out, while the
paragraph said every answer was used.  Under Graham's (2003) saturated-correlates model the likelihood is that of
items and helpers together, every row with any of them observed adding the density of what it answered; a row with
only the helper's value adds the helper's marginal density, whose mean and variance, through the helper's
covariances with the items, move the items' estimated means and covariances.  When the helper is why a row answered
nothing (the missing-at-random case the helpers are for), leaving such rows out leaves a sample selected by the
helper, and the items' means come out biased.

Reference: the observed-data normal log-likelihood of the four items and the helper written out below (each row's
normal density on the columns it answered, checked against scipy.stats.multivariate_normal; maximised by
scipy.optimize over the model's parameters and the helper's mean, covariances with the items and variance), every
row with some answer counted;
the chi-square is twice the difference from the unrestricted normal model of the five columns, maximised alike.
The data are simulated (fixed seed): one factor, intercepts 3, 2.5, 2.8, 3.2, factor variance 1; the items are all
missing, with probability .8, where the helper is below -.3."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest
from scipy import optimize, stats

import cfa_tool
from cfa_tool.reporting.paragraph import methods_paragraph

ITEMS = ["y1", "y2", "y3", "y4"]
MODEL = "factor f: y1, y2, y3, y4\n"
NU = np.array([3.0, 2.5, 2.8, 3.2])


@pytest.fixture(scope="module")
def frame() -> pd.DataFrame:
    rng = np.random.default_rng(7)
    n = 900
    eta = rng.normal(size=n)
    helper = 0.7 * eta + rng.normal(scale=0.7, size=n)
    y = NU + np.outer(eta, [1.0, 0.8, 0.9, 0.7]) + rng.normal(scale=0.6, size=(n, 4))
    y[(helper < -0.3) & (rng.uniform(size=n) < 0.8)] = np.nan  # a low helper: no item answered
    y[rng.uniform(size=(n, 4)) < 0.08] = np.nan
    out = pd.DataFrame(y, columns=ITEMS)
    out["a"] = helper
    out.loc[rng.uniform(size=n) < 0.03, "a"] = np.nan  # a few rows answer nothing at all
    return out


def _patterns(rows: np.ndarray) -> list[tuple[np.ndarray, np.ndarray]]:
    """(columns answered, the rows answering exactly those) of each pattern of answers."""
    seen = ~np.isnan(rows)
    return [(pattern, rows[(seen == pattern).all(axis=1)][:, pattern]) for pattern in np.unique(seen, axis=0)
            if pattern.any()]


def _log_likelihood(mu: np.ndarray, sigma: np.ndarray, patterns) -> float:
    """The sum over rows of the normal log-density of the columns each row answered, written out: -(k log 2 pi +
    log|S| + (x - m)' S^-1 (x - m)) / 2, S and m the answered columns' part of sigma and mu."""
    total = 0.0
    for pattern, answered in patterns:
        lower = np.linalg.cholesky(sigma[np.ix_(pattern, pattern)])
        z = np.linalg.solve(lower, (answered - mu[pattern]).T)
        total -= 0.5 * (answered.size * np.log(2 * np.pi) + 2 * len(answered) * np.log(np.diag(lower)).sum()
                        + (z * z).sum())
    return total


def _model(t: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Intercepts, loadings 2-4 (the first fixed at 1), factor variance, residual variances; the helper's mean,
    covariances with the items and variance."""
    loadings = np.r_[1.0, t[4:7]]
    sigma = np.zeros((5, 5))
    sigma[:4, :4] = t[7] * np.outer(loadings, loadings) + np.diag(t[8:12])
    sigma[:4, 4] = sigma[4, :4] = t[13:17]
    sigma[4, 4] = t[17]
    return np.r_[t[:4], t[12]], sigma


def _saturated(t: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    lower = np.zeros((5, 5))
    lower[np.tril_indices(5)] = t[5:]
    return t[:5], lower @ lower.T


def _maximum(moments, start: np.ndarray, rows: np.ndarray) -> tuple[np.ndarray, float]:
    patterns = _patterns(rows)

    def minus(t):
        mu, sigma = moments(t)
        return 1e10 if np.linalg.eigvalsh(sigma).min() <= 1e-8 else -_log_likelihood(mu, sigma, patterns)

    found = optimize.minimize(minus, start, method="BFGS", options={"gtol": 1e-6, "maxiter": 2000})
    return found.x, -found.fun


def test_rows_answering_only_the_helper_are_analysed_as_the_joint_likelihood_has_them(frame):
    rows = frame[ITEMS + ["a"]].to_numpy(float)
    rows = rows[~np.isnan(rows).all(axis=1)]  # every row with some answer, items or helper
    only_helper = int((frame[ITEMS].isna().all(axis=1) & frame["a"].notna()).sum())  # pandas
    assert only_helper > 250
    start = np.r_[np.nanmean(rows[:, :4], axis=0), 0.8, 0.9, 0.7, 1.0, 0.4, 0.4, 0.4, 0.4, 0.0, 0.5, 0.4, 0.45, 0.35,
                  1.0]
    theta, model_ll = _maximum(_model, start, rows)
    mu, sigma = _model(theta)  # the density written out above is scipy's
    assert model_ll == pytest.approx(sum(stats.multivariate_normal(mu[seen], sigma[np.ix_(seen, seen)]).logpdf(x).sum()
                                         for seen, x in _patterns(rows)), rel=1e-12)
    complete = np.linalg.cholesky(np.cov(rows[~np.isnan(rows).any(axis=1)].T))
    _, saturated_ll = _maximum(_saturated, np.r_[np.nanmean(rows, axis=0), complete[np.tril_indices(5)]], rows)

    result = cfa_tool.fit(MODEL, frame, missing_helpers="a")
    assert result.n_obs == len(rows) and result.data.helpers_only == only_helper
    estimate = {(e.kind, tuple(e.variables)): e.estimate for e in result.estimates}
    assert [estimate[("intercept", (x,))] for x in ITEMS] == pytest.approx(theta[:4], abs=2e-4)
    assert [estimate[("loading", ("f", x))] for x in ITEMS[1:]] == pytest.approx(theta[4:7], abs=2e-4)
    assert estimate[("factor_variance", ("f",))] == pytest.approx(theta[7], abs=2e-4)
    assert result.fit.log_likelihood == pytest.approx(model_ll, abs=1e-3)
    assert result.fit.chi_square == pytest.approx(2 * (saturated_ll - model_ll), abs=2e-3)
    # the rows the helper selected would bias the items' means: left out, every intercept comes out higher here
    answered = cfa_tool.fit(MODEL, frame[frame[ITEMS].notna().any(axis=1)], missing_helpers="a")
    assert all(e.estimate > estimate[("intercept", tuple(e.variables))] + 0.1
               for e in answered.estimates if e.kind == "intercept")

    text = " ".join(methods_paragraph(result).split())
    assert (f"(N = {len(rows)}; every answer of every row was used" in text and
            f"{only_helper} of these rows answered no item but an auxiliary variable and entered the likelihood "
            f"through it" in text)
    nothing = int(frame[ITEMS + ["a"]].isna().all(axis=1).sum())  # the reader skips rows with no value at all
    assert nothing and result.data.rows_read == len(frame) - nothing
    assert any(str(w).startswith(f"{only_helper} of {len(rows)} rows answer none of the model's items but a missing-data "
                            f"helper: they are analysed") for w in result.warnings)


def test_helpers_apply_when_only_rows_without_item_answers_have_gaps():
    """Every row that answers an item answers all of them, and some rows answer only the helper: the helper changes
    the estimates (those rows enter through it), so it is not refused as changing nothing."""
    rng = np.random.default_rng(3)
    n = 300
    eta = rng.normal(size=n)
    frame = pd.DataFrame(NU + np.outer(eta, [1.0, 0.8, 0.9, 0.7]) + rng.normal(scale=0.6, size=(n, 4)), columns=ITEMS)
    frame["a"] = 0.7 * eta + rng.normal(scale=0.7, size=n)
    frame.loc[frame["a"] < -0.8, ITEMS] = np.nan
    with_helper = cfa_tool.fit(MODEL, frame, missing_helpers="a")
    without = cfa_tool.fit(MODEL, frame)
    assert with_helper.n_obs == n and without.n_obs == int(frame[ITEMS].notna().all(axis=1).sum())
    # the rows kept by the helper bring y1's estimated mean down from that of the rows answering it (pandas)
    first = next(e.estimate for e in with_helper.estimates if e.kind == "intercept" and e.variables[0] == "y1")
    assert first < frame["y1"].mean() - 0.05


def test_frequency_weights_count_the_rows_answering_only_the_helper_too(frame):
    """A row of frequency weight k is k identical rows (the definition of frequency weights), those answering only
    the helper included: the weighted fit equals that of the rows written out k times."""
    counted = frame.assign(count=np.random.default_rng(5).integers(1, 4, size=len(frame)))
    weighted = cfa_tool.fit(MODEL, counted, missing_helpers="a", weights="count", weight_kind="frequency")
    repeated = counted.loc[counted.index.repeat(counted["count"])].reset_index(drop=True)
    plain = cfa_tool.fit(MODEL, repeated.drop(columns="count"), missing_helpers="a")
    assert weighted.n_obs == plain.n_obs
    assert weighted.data.helpers_only == int((frame[ITEMS].isna().all(axis=1) & frame["a"].notna()).sum())
    for a, b in zip(weighted.estimates, plain.estimates):
        assert a.estimate == pytest.approx(b.estimate, abs=1e-6)
    assert weighted.fit.chi_square == pytest.approx(plain.fit.chi_square, abs=1e-6)
