"""The linear factor-score formulas against their published forms, computed here independently.

Sources: Bartlett (1937) weights (L' Theta^-1 L)^-1 L' Theta^-1; Anderson & Rubin (1956) weights
(L' Theta^-1 Sigma Theta^-1 L)^-1/2 L' Theta^-1 for uncorrelated factors; ten Berge, Krijnen,
Wansbeek & Shapiro (1999) scores with covariance Phi; regression scores Phi L' Sigma^-1 (Thurstone
1935); omega of a sum (McDonald 1999).
"""

from __future__ import annotations

import numpy as np
import pytest
from scipy.linalg import sqrtm

from cfa_tool.pipeline.inputs import moments_for, read_inputs
from cfa_tool.assessment.reliability import reliability
from cfa_tool.pipeline.continuous import FitOptions, estimate
from cfa_tool.resources import resource_dir
from cfa_tool.scoring.linear import score_rows
from cfa_tool.scoring.methods import ScoreMethod, Unscored
from cfa_tool.scoring.model import ScoringModel, score_inputs
from cfa_tool.scoring.item_sums import ItemSumRule, item_sums
from cfa_tool.scoring.quality import model_keys, score_quality
from cfa_tool.scoring.weights import pattern_weights
from tests.conftest import THREE_FACTORS, single_group

ALL = np.ones((1, 9), dtype=bool)
METHODS = (ScoreMethod.REGRESSION, ScoreMethod.BARTLETT, ScoreMethod.CORRELATION_PRESERVING)


def _model(phi: np.ndarray, theta_diag: np.ndarray | None = None) -> ScoringModel:
    L = np.zeros((9, 3))
    L[0:3, 0] = [0.8, 0.7, 0.6]
    L[3:6, 1] = [0.9, 0.5, 0.7]
    L[6:9, 2] = [0.6, 0.8, -0.5]
    theta = np.diag(1.0 - np.sum(L**2, axis=1) if theta_diag is None else theta_diag)
    return ScoringModel(tuple(f"y{i}" for i in range(9)), ("a", "b", "c"), L, phi, np.zeros(3), np.zeros(9), theta)


CORRELATED = np.array([[1.0, 0.5, 0.3], [0.5, 1.2, 0.2], [0.3, 0.2, 0.8]])


def _weights(model, method):
    return pattern_weights(model, ALL, (method,))[method].weights[0]


def test_bartlett_weights_equal_the_residual_variance_form():
    model = _model(CORRELATED)
    L, theta_inv = model.loadings, np.linalg.inv(model.residual_covariance)
    published = np.linalg.solve(L.T @ theta_inv @ L, L.T @ theta_inv).T  # Bartlett (1937)
    W = _weights(model, ScoreMethod.BARTLETT)
    np.testing.assert_allclose(W, published, atol=1e-10)
    np.testing.assert_allclose(W.T @ L, np.eye(3), atol=1e-10)  # conditionally unbiased: E[s | eta] = eta


def test_bartlett_scores_stay_defined_with_a_zero_residual_variance():
    theta = 1.0 - np.array([0.8, 0.7, 0.6, 0.9, 0.5, 0.7, 0.6, 0.8, 0.5]) ** 2
    theta[3] = 0.0  # a Heywood case: Theta^-1 does not exist, Sigma is still positive definite
    model = _model(CORRELATED, theta)
    W = _weights(model, ScoreMethod.BARTLETT)
    np.testing.assert_allclose(W.T @ model.loadings, np.eye(3), atol=1e-9)
    # the item without residual measures its factor exactly, so Bartlett's score of that factor is that item / loading
    np.testing.assert_allclose(W[:, 1], np.eye(9)[3] / 0.9, atol=1e-9)


def test_correlation_preserving_scores_have_the_factor_covariance():
    model = _model(CORRELATED)
    W = _weights(model, ScoreMethod.CORRELATION_PRESERVING)
    # ten Berge et al. (1999): the scores' covariance matrix is Phi, by construction
    np.testing.assert_allclose(W.T @ model.implied_covariance @ W, CORRELATED, atol=1e-10)
    half = np.real(sqrtm(CORRELATED))
    sigma_inv = np.linalg.inv(model.implied_covariance)
    L = model.loadings
    inner = np.real(sqrtm(np.linalg.inv(half @ L.T @ sigma_inv @ L @ half)))
    np.testing.assert_allclose(W, sigma_inv @ L @ half @ inner @ half, atol=1e-10)  # their formula, written out


def test_correlation_preserving_scores_are_anderson_rubin_scores_for_uncorrelated_factors():
    model = _model(np.eye(3))
    L, theta_inv, sigma = model.loadings, np.linalg.inv(model.residual_covariance), model.implied_covariance
    anderson_rubin = (np.real(sqrtm(np.linalg.inv(L.T @ theta_inv @ sigma @ theta_inv @ L))) @ L.T @ theta_inv).T
    np.testing.assert_allclose(_weights(model, ScoreMethod.CORRELATION_PRESERVING), anderson_rubin, atol=1e-10)


def test_correlation_preserving_scores_reproduce_the_estimated_factor_covariance_in_the_sample(hs_data):
    """At ML estimates with every factor covariance free, the ML gradient condition
    L' Sigma^-1 (S - Sigma) Sigma^-1 L = 0 (S with divisor N; Joreskog 1969) makes W'SW = W'Sigma W = Phi,
    so the sample covariance of the scores equals Phi (to the optimiser's precision)."""
    spec, moments = single_group(THREE_FACTORS, hs_data)
    groups = [(None, moments)]
    (model,) = score_inputs(estimate(spec, groups, FitOptions(missing="listwise")), groups)
    scores = score_rows(model, hs_data[list(model.items)].to_numpy(float), (ScoreMethod.CORRELATION_PRESERVING,))
    sample = np.cov(scores[ScoreMethod.CORRELATION_PRESERVING].scores.T, bias=True)
    np.testing.assert_allclose(sample, model.factor_covariance, atol=1e-8)


def test_higher_order_factor_scores_follow_the_total_effects():
    """The higher-order factor's regression score is P_hh G_h' Sigma^-1 (x - mu) with G = L A (its covariance
    with the items goes through the factors below it); Bartlett and correlation-preserving scores do not apply."""
    path = resource_dir("models") / "rider_higher_order.cfa"
    spec, frame, source = read_inputs(path, resource_dir("demo") / "rider_survey.csv")
    frame = frame.dropna(subset=list(spec.observed_names))  # complete rows: this check is about the formula
    groups, _ = moments_for(spec, frame, source)
    est = estimate(spec, groups, FitOptions(missing="listwise"))
    (model,) = score_inputs(est, groups)
    mats = est.model.matrices(est.theta, 0)
    h = model.factors.index("service")
    rows = frame[list(model.items)].to_numpy(float)
    out = score_rows(model, rows, METHODS)
    sigma = mats.implied_covariance()
    expected = (rows - rows.mean(axis=0)) @ np.linalg.solve(sigma, mats.G[:, h]) * mats.P[h, h]
    np.testing.assert_allclose(out[ScoreMethod.REGRESSION].scores[:, h], expected, atol=1e-10)
    for method in METHODS[1:]:
        assert np.isnan(out[method].scores[:, h]).all()
        assert out[method].unscored[Unscored.HIGHER_ORDER][h] == len(rows)
        assert not np.isnan(np.delete(out[method].scores, h, axis=1)).any()
    assert not np.isnan(out[ScoreMethod.REGRESSION].scores).any()


def test_sum_score_omega_is_the_reliability_modules_omega_with_positive_keys(hs_data):
    spec, moments = single_group(THREE_FACTORS, hs_data)
    groups = [(None, moments)]
    est = estimate(spec, groups, FitOptions(missing="listwise"))
    (model,) = score_inputs(est, groups)
    mats = est.model.matrices(est.theta, 0)
    expected, _ = reliability(mats, est.table.observed, est.table.latent, None)  # McDonald (1999), unkeyed
    quality = score_quality(model)
    for sums, rel in zip(quality.sums, expected):
        assert sums.factor == rel.factor
        assert sums.omega == pytest.approx(rel.omega, abs=1e-12)
        assert sums.reversed_items == ()


def sum_scores(model, rows, least_share: float = 1.0):
    """Keyed sums with a reversed answer's sign flipped (its scale taken as 0 to 0: 0 + 0 - x), by scoring.item_sums."""
    zero = np.zeros(model.p)
    return item_sums(rows, model_keys(model), zero, zero, [None] * model.m, model.factors, ItemSumRule(least_share)).sums


def test_a_reverse_keyed_item_is_reversed_in_the_sum_and_its_omega(hs_data):
    """Reflecting x2 (x2 -> -x2) makes its loading negative; the keyed sum and its omega must not change."""
    def fitted(data):
        spec, moments = single_group(THREE_FACTORS, data)
        groups = [(None, moments)]
        (model,) = score_inputs(estimate(spec, groups, FitOptions(missing="listwise")), groups)
        return model, data[list(model.items)].to_numpy(float)

    flipped = hs_data.copy()
    flipped["x2"] = -flipped["x2"]
    original, rows = fitted(hs_data)
    reflected, flipped_rows = fitted(flipped)
    assert reflected.loadings[1, 0] < 0
    q0, q1 = score_quality(original), score_quality(reflected)
    assert q1.sums[0].reversed_items == ("x2",)
    for a, b in zip(q0.sums, q1.sums):
        assert b.omega == pytest.approx(a.omega, abs=1e-6)
    np.testing.assert_allclose(sum_scores(reflected, flipped_rows), sum_scores(original, rows), atol=1e-9)


def test_a_sum_of_some_items_is_prorated_only_when_enough_were_answered():
    model = _model(CORRELATED)
    rows = np.ones((2, 9))
    rows[1, 7] = np.nan
    sums = sum_scores(model, rows)  # every item required
    np.testing.assert_allclose(sums[0], [3.0, 3.0, 1.0])  # keys: y8 has a negative loading, so it is reversed
    assert np.isnan(sums[1, 2]) and np.isfinite(sums[1, :2]).all()
    # at least half answered: the mean of the keyed y6 and y8 (1 and -1) times the three items
    np.testing.assert_allclose(sum_scores(model, rows, 0.5)[1], [3.0, 3.0, 0.0])


def test_a_covariance_matrix_that_is_not_positive_definite_is_refused_in_plain_words():
    from cfa_tool.errors import EstimationError

    theta = -np.ones(9) * 0.5  # negative residual variances: Sigma is not positive definite
    model = _model(CORRELATED, theta)
    with pytest.raises(EstimationError, match="not positive definite, so no factor scores can be computed"):
        score_rows(model, np.zeros((2, 9)))
    with pytest.raises(EstimationError, match="not positive definite"):
        score_quality(model)


def test_score_quality_is_json_ready():
    import json

    quality = score_quality(_model(CORRELATED))
    text = json.dumps(quality.to_dict())
    assert '"method": "correlation-preserving"' in text and "NaN" not in text
    # correlation-preserving scores correlate as the factors do (ten Berge et al. 1999)
    np.testing.assert_allclose(quality.method(ScoreMethod.CORRELATION_PRESERVING).score_correlations,
                               quality.factor_correlations, atol=1e-10)
    # Bartlett scores' reliability is Phi_kk / Var(s_k) (Beauducel 2011), the squared validity
    model = _model(CORRELATED)
    W = _weights(model, ScoreMethod.BARTLETT)
    variance = np.diag(W.T @ model.implied_covariance @ W)
    np.testing.assert_allclose(quality.method(ScoreMethod.BARTLETT).reliability, np.diag(CORRELATED) / variance, atol=1e-12)
