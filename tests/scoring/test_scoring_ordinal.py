"""Expected a posteriori (EAP) scores of ordinal items.

References: the posterior mean written as an integral and evaluated by scipy.integrate.quad
(general-purpose adaptive quadrature, QUADPACK) / cubature (adaptive, vectorised over the points;
dblquad, QUADPACK, where scipy predates it) with the category probabilities of the latent-response
model (Muthén 1984); with continuous (normal) answers the posterior is normal and its mean and
standard deviation are those of the linear regression scores (Thurstone 1935), computed by
the separate linear path; with many categories the EAP scores approach the scores of the continuous
latent responses (the discretisation vanishes); over a population the EAP scores average to the factor
means (law of total expectation, E[E[eta | y]] = E[eta]).
"""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest
from scipy import integrate
from scipy.special import ndtr

from cfa_tool.scoring.linear import score_rows
from cfa_tool.scoring.methods import ScoreMethod, Unscored
from cfa_tool.scoring.model import OrdinalScoringModel, ScoringModel, ordinal_score_inputs
from cfa_tool.scoring.ordinal import eap_scores
from cfa_tool.scoring.quadrature import gauss_hermite_rule, sobol_rule


def _base(L, phi, alpha=None, nu=None, theta=None) -> ScoringModel:
    p, m = L.shape
    theta = np.diag(1.0 - np.sum((L @ np.linalg.cholesky(phi)) ** 2, axis=1)) if theta is None else theta
    return ScoringModel(tuple(f"y{i}" for i in range(p)), tuple(f"f{k}" for k in range(m)), L, phi,
                        np.zeros(m) if alpha is None else alpha, np.zeros(p) if nu is None else nu, theta)


def _likelihood(model: OrdinalScoringModel, y, eta):
    base = model.base
    out = 1.0
    for j in range(base.p):
        if np.isnan(y[j]):
            continue
        c = model.categories[j].index(y[j])
        t = np.concatenate([[-np.inf], model.thresholds[j], [np.inf]])
        lp = base.intercepts[j] + base.loadings[j] @ eta
        s = np.sqrt(base.residual_covariance[j, j])
        out *= ndtr((t[c + 1] - lp) / s) - ndtr((t[c] - lp) / s)
    return out


def _likelihoods(model: OrdinalScoringModel, y, etas: np.ndarray) -> np.ndarray:
    """:func:`_likelihood` at each of the points ``etas`` (n, m) at once (the same terms, numpy over the points)."""
    base = model.base
    out = np.ones(len(etas))
    for j in range(base.p):
        if np.isnan(y[j]):
            continue
        c = model.categories[j].index(y[j])
        t = np.concatenate([[-np.inf], model.thresholds[j], [np.inf]])
        lp = base.intercepts[j] + etas @ base.loadings[j]
        s = np.sqrt(base.residual_covariance[j, j])
        out *= ndtr((t[c + 1] - lp) / s) - ndtr((t[c] - lp) / s)
    return out


def test_one_factor_eap_scores_equal_the_posterior_mean_integral():
    L = np.array([[0.8], [0.7], [0.6], [0.5], [0.75]])
    base = _base(L, np.array([[1.3]]), alpha=np.array([0.4]), nu=np.array([0.1, 0.0, -0.2, 0.3, 0.0]))
    thresholds = [np.array([-1.0, 0.0, 0.9]), np.array([-0.5, 0.5, 1.5]), np.array([-2.0, -0.3, 0.3]),
                  np.array([0.0, 0.4, 2.0]), np.array([-1.1, 1.1, 1.6])]
    model = OrdinalScoringModel(base, thresholds, [(1.0, 2.0, 3.0, 4.0)] * 5)
    rows = np.array([[1, 2, 3, 4, 1], [4, 4, 4, 4, 4], [1, 1, 1, 1, 1], [2, np.nan, 3, np.nan, 2], [3, 2, 4, 1, 3]], float)
    out = eap_scores(model, rows)
    sd_prior = np.sqrt(1.3)
    for i, y in enumerate(rows):
        def density(e, power):
            return e**power * _likelihood(model, y, np.array([e])) * np.exp(-0.5 * (e - 0.4) ** 2 / 1.3)
        lo, hi = 0.4 - 10 * sd_prior, 0.4 + 10 * sd_prior
        z = integrate.quad(density, lo, hi, args=(0,), epsabs=0, epsrel=1e-12, limit=200)[0]
        mean = integrate.quad(density, lo, hi, args=(1,), epsabs=0, epsrel=1e-12, limit=200)[0] / z
        second = integrate.quad(density, lo, hi, args=(2,), epsabs=0, epsrel=1e-12, limit=200)[0] / z
        assert out.scores[i, 0] == pytest.approx(mean, abs=1e-6)  # tolerance from the issue
        assert out.standard_errors[i, 0] == pytest.approx(np.sqrt(second - mean**2), abs=1e-6)


def test_two_factor_eap_score_equals_the_posterior_mean_double_integral():
    L = np.array([[0.8, 0], [0.7, 0], [0.6, 0.2], [0, 0.5], [0, 0.75]])
    phi = np.array([[1.0, 0.4], [0.4, 1.0]])
    base = _base(L, phi)
    thresholds = [np.array([-1.0, 0.2])] * 5
    model = OrdinalScoringModel(base, thresholds, [(0.0, 1.0, 2.0)] * 5)
    y = np.array([2.0, 1.0, 2.0, 0.0, 1.0])
    out = eap_scores(model, y[None, :])
    precision = np.linalg.inv(phi)

    def densities(e):  # (n, 2) points -> (n, 3): the posterior's kernel, times 1, eta_1 and eta_2
        kernel = _likelihoods(model, y, e) * np.exp(-0.5 * np.einsum("ij,jk,ik->i", e, precision, e))
        return np.column_stack([kernel, e * kernel[:, None]])

    points = np.random.default_rng(3).uniform(-7, 7, (20, 2))
    np.testing.assert_allclose(_likelihoods(model, y, points), [_likelihood(model, y, e) for e in points], rtol=1e-13)

    # the three integrals at once by scipy's adaptive cubature (a Gauss-Kronrod product rule; scipy 1.15 on),
    # vectorised over the points, to dblquad's tolerances (the values of its nested QUADPACK to 1e-15 here, 100
    # times faster, s28); dblquad, one point at a time, where scipy is older
    opts = dict(epsabs=1e-10, epsrel=1e-8)
    if hasattr(integrate, "cubature"):
        found = integrate.cubature(densities, [-7, -7], [7, 7], rtol=opts["epsrel"], atol=opts["epsabs"])
        assert found.status == "converged"
        z, *means = found.estimate
    else:
        z, *means = (integrate.dblquad(lambda b, a, k: densities(np.array([[a, b]]))[0, k], -7, 7, -7, 7, args=(k,),
                                       **opts)[0] for k in range(3))
    for k in range(2):
        assert out.scores[0, k] == pytest.approx(means[k] / z, abs=1e-6)  # tolerance from the issue


def test_with_normal_answers_eap_scores_are_the_regression_scores_also_for_a_higher_order_factor():
    L = np.zeros((9, 4))
    L[0:3, 0], L[3:6, 1], L[6:9, 2] = [0.8, 0.7, 0.6], [0.7, 0.6, 0.5], [0.9, 0.5, 0.6]
    A = np.eye(4)
    A[:3, 3] = [0.8, 0.6, 0.7]  # three first-order factors under one higher-order factor
    P = np.diag([0.36, 0.64, 0.51, 1.0])
    phi = A @ P @ A.T
    base = _base(L, phi, alpha=np.array([0.2, 0.1, -0.3, 0.25]) * 0 + A @ np.array([0.1, 0.0, 0.2, 0.5]),
                 nu=np.linspace(-1, 1, 9), theta=np.diag(np.linspace(0.3, 0.5, 9)))
    model = OrdinalScoringModel(base, [np.zeros(0)] * 9, [()] * 9, location=np.full(9, 3.0), scale=np.full(9, 2.0))
    rng = np.random.default_rng(5)
    z = rng.multivariate_normal(base.implied_mean, base.implied_covariance, size=40)
    z[3, :5] = np.nan
    eap = eap_scores(model, 3.0 + 2.0 * z)
    linear = score_rows(base, z)[ScoreMethod.REGRESSION]
    np.testing.assert_allclose(eap.scores, linear.scores, atol=1e-8)
    np.testing.assert_allclose(eap.standard_errors, linear.standard_errors, atol=1e-8)


def test_with_many_categories_eap_scores_approach_the_continuous_scores():
    L = np.zeros((10, 2))
    L[:5, 0] = [0.8, 0.7, 0.75, 0.6, 0.7]
    L[5:, 1] = [0.7, 0.8, 0.6, 0.65, 0.7]
    phi = np.array([[1.0, 0.3], [0.3, 1.0]])
    base = _base(L, phi)
    rng = np.random.default_rng(6)
    latent = rng.multivariate_normal(np.zeros(10), base.implied_covariance, size=1000)
    cuts = np.linspace(-2.4, 2.4, 14)  # 15 categories
    answers = np.searchsorted(cuts, latent).astype(float)
    model = OrdinalScoringModel(base, [cuts] * 10, [tuple(float(c) for c in range(15))] * 10)
    eap = eap_scores(model, answers)
    continuous = score_rows(base, latent)[ScoreMethod.REGRESSION].scores
    for k in range(2):
        assert np.corrcoef(eap.scores[:, k], continuous[:, k])[0, 1] > 0.99  # threshold from the issue


def test_four_factors_use_a_pruned_product_rule_close_to_the_full_one_and_to_quasi_monte_carlo():
    # s20: 4 factors moved from 4,096 scrambled Sobol points to the 7^4 product rule pruned by weight (1,273 points);
    # both are checked against the full 9^4 product rule (exact for polynomials of degree 17 in each coordinate)
    L = np.zeros((8, 4))
    for k in range(4):
        L[2 * k: 2 * k + 2, k] = [0.8, 0.7]
    phi = 0.7 * np.eye(4) + 0.3
    base = _base(L, phi)
    model = OrdinalScoringModel(base, [np.array([-0.8, 0.0, 0.8])] * 8, [(1.0, 2.0, 3.0, 4.0)] * 8)
    rows = np.random.default_rng(7).integers(1, 5, size=(6, 8)).astype(float)
    pruned = eap_scores(model, rows)
    assert pruned.rule == "Gauss-Hermite product rule pruned by weight"
    grid = eap_scores(model, rows, gauss_hermite_rule(4, 9))
    qmc = eap_scores(model, rows, sobol_rule(4))
    # far below the posterior standard deviations (about .5): the pruned rule within 1e-3, the quasi-Monte Carlo
    # error of 4096 points within 5e-3
    np.testing.assert_allclose(pruned.scores, grid.scores, atol=1e-3)
    np.testing.assert_allclose(pruned.standard_errors, grid.standard_errors, atol=1e-3)
    np.testing.assert_allclose(qmc.scores, grid.scores, atol=5e-3)
    np.testing.assert_allclose(qmc.standard_errors, grid.standard_errors, atol=5e-3)
    assert eap_scores(model, rows, sobol_rule(4)).scores.tolist() == qmc.scores.tolist()  # fixed seed


def test_rows_without_answers_and_unknown_categories():
    base = _base(np.array([[0.8], [0.7], [0.6]]), np.eye(1))
    model = OrdinalScoringModel(base, [np.array([0.0])] * 3, [(0.0, 1.0)] * 3)
    out = eap_scores(model, np.array([[0, 1, 0], [np.nan] * 3], float))
    assert np.isfinite(out.scores[0]).all() and np.isnan(out.scores[1]).all()
    assert out.unscored[Unscored.NO_ANSWERS].tolist() == [1]
    from cfa_tool.errors import DataError

    with pytest.raises(DataError, match="'y1' has the answer 2"):
        eap_scores(model, np.array([[0, 2, 0]], float))


def test_eap_scores_from_a_two_group_ordinal_fit_average_to_each_groups_factor_means():
    from cfa_tool.pipeline.inputs import ordinal_groups
    from cfa_tool.pipeline.continuous import FitOptions
    from cfa_tool.language.parser import parse_model
    from cfa_tool.pipeline.ordinal import estimate_ordinal_groups

    rng = np.random.default_rng(8)
    frames = []
    for label, mean in (("north", 0.0), ("south", 0.5)):
        eta = rng.normal(mean, 1.0, size=1500)
        x = np.outer(eta, [0.8, 0.7, 0.6, 0.75]) + rng.normal(size=(1500, 4)) * np.sqrt(1 - np.array([0.64, 0.49, 0.36, 0.5625]))
        frames.append(pd.DataFrame(np.searchsorted([-1.0, 0.0, 1.0], x) + 1, columns=["q1", "q2", "q3", "q4"]).assign(site=label))
    data = pd.concat(frames, ignore_index=True)
    spec = parse_model("factor f: q1..q4\nordinal q1..q4\ninvariance scalar\n")
    groups, _ = ordinal_groups(spec, data, "data", "site", None, set(spec.observed_names))
    est = estimate_ordinal_groups(spec, groups, FitOptions())
    models = ordinal_score_inputs(est, groups)
    assert [m.base.group for m in models] == ["north", "south"]
    for model, (label, _) in zip(models, groups):
        rows = data.loc[data.site == label, ["q1", "q2", "q3", "q4"]].to_numpy(float)
        scores = eap_scores(model, rows).scores[:, 0]
        # E[EAP] = the factor mean; tolerance four standard errors of a mean of 1500 scores
        assert abs(scores.mean() - model.base.factor_means[0]) < 4 * scores.std() / np.sqrt(len(scores))
    # the latent responses' metric is the first group's (residual variance 1, first loading 1), so the simulated
    # mean difference of half a standard deviation shows in the first group's factor standard deviations
    first, second = models[0].base, models[1].base
    difference = (second.factor_means[0] - first.factor_means[0]) / np.sqrt(first.factor_covariance[0, 0])
    assert difference == pytest.approx(0.5, abs=0.15)


def test_one_group_ordinal_inputs_standardize_the_latent_responses_and_a_continuous_item():
    """A one-group ordinal fit identifies latent responses with mean 0 and variance 1 and enters a continuous
    item standardized by its sample mean and SD (its polyserial and Pearson correlations); the EAP score of a
    row with both kinds of answers is checked against the integral with the normal density of that item."""
    from cfa_tool.data.polychoric import ordinal_moments
    from cfa_tool.model.implied import ModelMatrices
    from cfa_tool.scoring.model import one_group_ordinal_inputs

    rng = np.random.default_rng(9)
    lam = np.array([0.8, 0.7, 0.6, 0.75])
    eta = rng.normal(size=800)
    latent = np.outer(eta, lam) + rng.normal(size=(800, 4)) * np.sqrt(1 - lam**2)
    frame = pd.DataFrame(np.searchsorted([-0.5, 0.6], latent[:, :3]) + 1.0, columns=["q1", "q2", "q3"])
    frame["c"] = 50 + 10 * latent[:, 3]
    names = ("q1", "q2", "q3", "c")
    moments = ordinal_moments(frame, names, "data", frozenset({"c"}))
    mats = ModelMatrices(lam[:, None], np.zeros((1, 1)), np.eye(1), np.diag([0.5] * 4), np.zeros(4), np.zeros(1))
    model = one_group_ordinal_inputs(mats, names, ("f",), moments)
    np.testing.assert_allclose(np.diag(model.base.residual_covariance), 1 - lam**2, atol=1e-12)
    assert model.location[3] == pytest.approx(frame["c"].mean()) and model.scale[3] == pytest.approx(frame["c"].std(ddof=0))
    y = np.array([3.0, 1.0, 2.0, 63.0])
    z = (63.0 - model.location[3]) / model.scale[3]
    s = np.sqrt(1 - lam[3] ** 2)

    def density(e, power):
        ordinal_part = _likelihood(model, np.array([3.0, 1.0, 2.0, np.nan]), np.array([e]))
        return e**power * ordinal_part * np.exp(-0.5 * ((z - lam[3] * e) / s) ** 2 - 0.5 * e**2)

    total = integrate.quad(density, -10, 10, args=(0,), epsabs=0, epsrel=1e-12, limit=200)[0]
    mean = integrate.quad(density, -10, 10, args=(1,), epsabs=0, epsrel=1e-12, limit=200)[0] / total
    assert eap_scores(model, y[None, :]).scores[0, 0] == pytest.approx(mean, abs=1e-6)  # tolerance from the issue


def test_ordinal_items_with_correlated_residuals_are_refused():
    from cfa_tool.errors import EstimationError

    theta = np.diag([0.36, 0.51, 0.64])
    theta[0, 1] = theta[1, 0] = 0.1
    base = _base(np.array([[0.8], [0.7], [0.6]]), np.eye(1), theta=theta)
    with pytest.raises(EstimationError, match="correlated residuals"):
        OrdinalScoringModel(base, [np.array([0.0])] * 3, [(0.0, 1.0)] * 3)
