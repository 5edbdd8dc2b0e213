"""Properties of the factor-score methods in a simulation with known parameters (N = 50,000).

The expectations are the methods' defining properties: Bartlett (1937) scores are conditionally
unbiased (E[s | eta] = eta, so regressing them on the true factors gives slopes of 1 and an
intercept of 0); regression scores (Thurstone 1935) have the smallest mean squared error of all linear
scores; the determinacy (Grice 2001) is the correlation of the regression scores with the factors;
correlation-preserving scores (ten Berge, Krijnen, Wansbeek & Shapiro 1999) correlate as the factors do;
omega (McDonald 1999) is the squared correlation of a simple structure's item sum with its factor.
Every tolerance is four Monte Carlo standard errors, from the usual large-sample formulas (standard
error of an OLS slope; (1 - r^2) / sqrt(N) for a correlation; sqrt(2 / N) relative for a mean square of
normal errors).
"""

from __future__ import annotations

import numpy as np
import pytest

from cfa_tool.scoring.linear import score_rows
from cfa_tool.scoring.methods import ScoreMethod
from cfa_tool.scoring.model import ScoringModel
from cfa_tool.scoring.item_sums import item_sums
from cfa_tool.scoring.quality import model_keys, score_quality

N = 50_000
METHODS = (ScoreMethod.REGRESSION, ScoreMethod.BARTLETT, ScoreMethod.CORRELATION_PRESERVING)
LOADINGS = np.zeros((12, 3))
LOADINGS[0:4, 0] = [0.8, 0.7, 0.6, 0.5]
LOADINGS[4:8, 1] = [0.9, 0.6, 0.4, 0.7]
LOADINGS[8:12, 2] = [0.5, 0.6, -0.5, 0.4]  # a reverse-keyed item, and a factor with low determinacy
PHI = np.array([[1.0, 0.5, 0.3], [0.5, 1.44, -0.2], [0.3, -0.2, 0.81]])
ALPHA = np.array([0.5, -1.0, 2.0])
NU = np.linspace(1.0, 3.0, 12)
THETA = np.diag(np.linspace(0.3, 0.6, 12))


@pytest.fixture(scope="module")
def simulated():
    rng = np.random.default_rng(20261202)
    eta = rng.multivariate_normal(ALPHA, PHI, size=N)
    x = NU + eta @ LOADINGS.T + rng.multivariate_normal(np.zeros(12), THETA, size=N)
    model = ScoringModel(tuple(f"y{i}" for i in range(12)), ("a", "b", "c"), LOADINGS, PHI, ALPHA, NU, THETA)
    return model, eta, x, score_rows(model, x, METHODS)


def _corr(a, b):
    return float(np.corrcoef(a, b)[0, 1])


def test_bartlett_scores_are_conditionally_unbiased(simulated):
    model, eta, x, scores = simulated
    design = np.column_stack([np.ones(N), eta])
    for k in range(3):
        y = scores[ScoreMethod.BARTLETT].scores[:, k]
        coef, *_ = np.linalg.lstsq(design, y, rcond=None)
        resid = y - design @ coef
        se = np.sqrt(np.diag(np.linalg.inv(design.T @ design)) * resid.var(ddof=4))
        expected = np.concatenate([[0.0], np.eye(3)[k]])  # intercept 0, slope 1 on its own factor, 0 on the others
        assert np.all(np.abs(coef - expected) < 4 * se), (k, coef, se)


def test_regression_scores_have_the_smallest_mean_squared_error(simulated):
    model, eta, x, scores = simulated
    mse = {method: np.mean((scores[method].scores - eta) ** 2, axis=0) for method in METHODS}
    for other in METHODS[1:]:
        assert np.all(mse[ScoreMethod.REGRESSION] < mse[other]), (other, mse)
    for method in METHODS:  # and each method's standard error is its root mean squared error
        predicted = scores[method].standard_errors[0] ** 2
        assert np.all(np.abs(mse[method] / predicted - 1) < 4 * np.sqrt(2 / N)), (method, mse[method], predicted)


def test_determinacy_is_the_correlation_of_regression_scores_with_the_factors(simulated):
    model, eta, x, scores = simulated
    quality = score_quality(model)
    for k in range(3):
        r = _corr(scores[ScoreMethod.REGRESSION].scores[:, k], eta[:, k])
        rho = quality.determinacy[k]
        assert abs(r - rho) < 4 * (1 - rho**2) / np.sqrt(N), (k, r, rho)
    assert quality.low_determinacy == tuple(rho < 0.80 for rho in quality.determinacy)  # .80: common practice
    assert quality.low_determinacy[2] and not quality.low_determinacy[1]


def test_validity_and_reliability_of_each_method_match_the_simulation(simulated):
    model, eta, x, scores = simulated
    quality = score_quality(model)
    for method in METHODS:
        q = quality.method(method)
        for k in range(3):
            r = _corr(scores[method].scores[:, k], eta[:, k])
            assert abs(r - q.validity[k]) < 4 * (1 - r**2) / np.sqrt(N), (method, k, r, q.validity[k])
            assert q.reliability[k] == pytest.approx(q.validity[k] ** 2)
        sample = np.corrcoef(scores[method].scores.T)
        assert np.all(np.abs(sample - q.score_correlations) < 4 * (1 - sample**2) / np.sqrt(N) + 1e-12), method


def test_correlation_preserving_scores_correlate_as_the_factors_do(simulated):
    model, eta, x, scores = simulated
    sample = np.corrcoef(scores[ScoreMethod.CORRELATION_PRESERVING].scores.T)
    sd = np.sqrt(np.diag(PHI))
    population = PHI / np.outer(sd, sd)
    assert np.all(np.abs(sample - population) < 4 * (1 - population**2) / np.sqrt(N) + 1e-12), sample
    # while regression scores overstate the factors' correlations (Grice 2001)
    regression = score_quality(model).method(ScoreMethod.REGRESSION).score_correlations
    assert abs(regression[0, 1]) > abs(population[0, 1])


def test_omega_of_the_keyed_sum_is_its_squared_correlation_with_the_factor(simulated):
    model, eta, x, scores = simulated
    zero = np.zeros(model.p)  # a reversed answer counts as 0 + 0 - x: its sign flipped, which omega does not see
    sums = item_sums(x, model_keys(model), zero, zero, [None] * model.m, model.factors).sums
    quality = score_quality(model)
    for k in range(3):
        r = _corr(sums[:, k], eta[:, k])
        omega = quality.sums[k].omega
        assert abs(r**2 - omega) < 4 * 2 * r * (1 - r**2) / np.sqrt(N), (k, r**2, omega)
    assert quality.sums[2].reversed_items == ("y10",)
