"""The integration rules of posterior means (scoring.quadrature) and the staged refinement of each row's grid
(scoring.ordinal: a coarse product rule places it, the rule itself refines it), new-user trial s20 item 8: 4 factors
took minutes (4,096 Sobol points, a dozen passes of them).

References: moments of the standard normal (E u^2 = 1, E u^4 = 3, E u^6 = 15; any probability text); a posterior mean
computed by brute force, a fixed 41^3-point Gauss-Hermite grid over the prior (numpy's hermegauss, not adaptive, with
no refinement), independent of the adaptive route it checks."""

from __future__ import annotations

import numpy as np
import pytest
from scipy.special import ndtr

from cfa_tool.scoring.model import OrdinalScoringModel, ScoringModel
from cfa_tool.scoring.ordinal import EapScorer, eap_scores


def test_the_pruned_rule_keeps_the_weight_and_the_normal_moments():
    from cfa_tool.scoring.quadrature import (RuleKind, default_rule, default_rule_size, gauss_hermite_rule,
                                             pruned_gauss_hermite_rule)

    for dimension, kept in ((4, 1273), (5, 2133)):
        rule = default_rule(dimension)
        assert rule.kind is RuleKind.PRUNED_GAUSS_HERMITE
        assert len(rule.points) == default_rule_size(dimension) == kept
    rule, full = pruned_gauss_hermite_rule(4, 7), gauss_hermite_rule(4, 7)
    w = np.exp(rule.log_weights)
    assert 1 - w.sum() < 1e-4 and np.exp(full.log_weights).sum() == pytest.approx(1.0, abs=1e-12)
    u = rule.points
    # normal moments, the higher ones a little short (their tails are what the pruning leaves out): the full rule is
    # exact for them (degree 13 in each coordinate)
    for power, moment, within in ((2, 1.0, 1e-3), (4, 3.0, 2e-3), (6, 15.0, 5e-3)):
        assert np.sum(w * u[:, 0] ** power) == pytest.approx(moment, rel=within)
        assert np.sum(np.exp(full.log_weights) * full.points[:, 0] ** power) == pytest.approx(moment, rel=1e-10)
    assert np.sum(w * u[:, 0] ** 2 * u[:, 1] ** 2) == pytest.approx(1.0, rel=3e-3)
    assert abs(np.sum(w * u[:, 0] * u[:, 1])) < 1e-12  # symmetric


def _three_factors() -> OrdinalScoringModel:
    L = np.zeros((9, 3))
    for k in range(3):
        L[3 * k: 3 * k + 3, k] = [0.8, 0.7, 0.6]
    phi = np.array([[1.0, 0.5, 0.3], [0.5, 1.0, 0.4], [0.3, 0.4, 1.0]])
    theta = np.diag(1.0 - np.sum((L @ np.linalg.cholesky(phi)) ** 2, axis=1))
    base = ScoringModel(tuple(f"y{i}" for i in range(9)), ("f0", "f1", "f2"), L, phi, np.array([0.2, 0.0, -0.1]),
                        np.zeros(9), theta)
    return OrdinalScoringModel(base, [np.array([-1.0, 0.0, 1.0])] * 9, [(1.0, 2.0, 3.0, 4.0)] * 9)


def _brute_force(model: OrdinalScoringModel, row: np.ndarray, points: int = 41) -> np.ndarray:
    """The posterior mean on a fixed Gauss-Hermite grid over the prior N(alpha, Phi): sum w L(eta) eta / sum w L."""
    base = model.base
    x, w = np.polynomial.hermite_e.hermegauss(points)
    grid = np.stack(np.meshgrid(x, x, x, indexing="ij"), axis=-1).reshape(-1, 3)
    weight = np.prod(np.stack(np.meshgrid(w, w, w, indexing="ij"), axis=-1).reshape(-1, 3), axis=1)
    eta = base.factor_means + grid @ np.linalg.cholesky(base.factor_covariance).T
    like = np.ones(len(eta))
    for j, y in enumerate(row):
        c = model.categories[j].index(y)
        t = np.concatenate([[-np.inf], model.thresholds[j], [np.inf]])
        s = np.sqrt(base.residual_covariance[j, j])
        lp = base.intercepts[j] + eta @ base.loadings[j]
        like *= ndtr((t[c + 1] - lp) / s) - ndtr((t[c] - lp) / s)
    post = weight * like
    return post @ eta / post.sum()


def test_three_factor_scores_agree_with_a_brute_force_grid_and_with_a_single_stage():
    model = _three_factors()
    rows = np.random.default_rng(11).integers(1, 5, size=(8, 9)).astype(float)
    rows[0] = 4.0  # the top answer throughout: a posterior in the prior's tail
    staged = eap_scores(model, rows)
    for i, row in enumerate(rows):
        np.testing.assert_allclose(staged.scores[i], _brute_force(model, row), atol=1e-4)
    # the coarse first stage only places the grid: the scores are the rule's own fixed point, as the single-stage
    # refinement of s19 and before reached it (to the tolerance of the refinement, 1e-7 prior SD, and its effect)
    single = EapScorer(model)
    single._stages = ((single.rule, 1e-7),)
    one = single.score(rows)
    np.testing.assert_allclose(staged.scores, one.scores, atol=1e-6)
    np.testing.assert_allclose(staged.standard_errors, one.standard_errors, atol=1e-6)
