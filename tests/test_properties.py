"""Properties any correct ML factor analysis must have (Bollen 1989, ch. 7; Joreskog 1969)."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from tests.conftest import THREE_FACTORS, simulate_cfa


def _std_loadings(result) -> dict:
    return {r.variables: r.standardized for r in result.estimates if r.kind == "loading"}


def test_rescaling_an_indicator_changes_nothing_that_matters(hs_data, hs_three):
    # ML is scale invariant: multiplying x5 by 10 leaves chi-square and standardized loadings as they were.
    scaled = hs_data.copy()
    scaled["x5"] = scaled["x5"] * 10
    result = cfa_tool.fit(THREE_FACTORS, scaled)
    assert result.fit.chi_square == pytest.approx(hs_three.fit.chi_square, rel=1e-7)
    for key, value in _std_loadings(hs_three).items():
        assert _std_loadings(result)[key] == pytest.approx(value, abs=1e-6)
    unscaled = {r.variables: r.estimate for r in hs_three.estimates}
    rescaled = {r.variables: r.estimate for r in result.estimates}
    assert rescaled[("textual", "x5")] == pytest.approx(10 * unscaled[("textual", "x5")], rel=1e-6)


@pytest.mark.parametrize("scaling", ["variance", "effects"])
def test_scaling_choice_leaves_fit_unchanged(hs_data, hs_three, scaling):
    result = cfa_tool.fit(THREE_FACTORS + f"scale latent by {scaling}\n", hs_data)
    assert result.fit.chi_square == pytest.approx(hs_three.fit.chi_square, rel=1e-7)
    assert result.fit.df == hs_three.fit.df
    for key, value in _std_loadings(hs_three).items():
        assert _std_loadings(result)[key] == pytest.approx(value, abs=1e-6)
    loadings = [r.estimate for r in result.estimates if r.kind == "loading" and r.variables[0] == "speed"]
    if scaling == "variance":
        assert {r.variables: r.estimate for r in result.estimates if r.kind == "factor_variance"} == {
            ("visual",): 1.0, ("textual",): 1.0, ("speed",): 1.0}
    else:  # effects coding: loadings of a factor average 1 (Little, Slegers & Card 2006)
        assert np.mean(loadings) == pytest.approx(1.0, abs=1e-12)
        tied = [r for r in result.estimates if r.variables == ("speed", "x9")][0]
        assert np.isfinite(tied.se) and tied.se > 0


def test_estimates_recover_population_values():
    loadings = np.zeros((8, 2))
    loadings[:4, 0] = [1.0, 0.8, 1.2, 0.6]
    loadings[4:, 1] = [1.0, 1.5, 0.7, 0.9]
    phi = np.array([[0.9, 0.3], [0.3, 0.5]])
    theta = np.diag([0.4, 0.5, 0.3, 0.6, 0.5, 0.4, 0.6, 0.3])
    data = simulate_cfa(loadings, phi, theta, n=20000, seed=11)
    result = cfa_tool.fit("factor f: y1..y4\nfactor g: y5..y8\n", data)
    est = {r.variables: r for r in result.estimates}
    truth = {("f", "y2"): 0.8, ("f", "y3"): 1.2, ("f", "y4"): 0.6, ("g", "y6"): 1.5, ("g", "y7"): 0.7,
             ("g", "y8"): 0.9, ("f",): 0.9, ("g",): 0.5, ("f", "g"): 0.3, ("y3",): 0.3, ("y8",): 0.3}
    for key, value in truth.items():
        row = est[key]
        assert abs(row.estimate - value) < 4 * row.se, (key, row.estimate, row.se)
    # the model is true: the chi-square test should not reject at any usual level
    assert result.fit.p_value > 0.001
    assert result.fit.rmsea < 0.02


def test_freeing_the_largest_modification_index_lowers_chi_square_by_about_that_much(hs_data, hs_three):
    top = hs_three.modification_indices[0]
    assert top.variables == ("visual", "x9")
    freed = cfa_tool.fit("factor visual: x1, x2, x3, x9\nfactor textual: x4..x6\nfactor speed: x7..x9\n", hs_data)
    drop = hs_three.fit.chi_square - freed.fit.chi_square
    assert freed.fit.df == hs_three.fit.df - 1
    # the score test approximates the likelihood-ratio drop (Sorbom 1989): same size, within a quarter here
    assert drop == pytest.approx(top.index, rel=0.25)
    new_value = [r.estimate for r in freed.estimates if r.variables == ("visual", "x9")][0]
    assert new_value == pytest.approx(top.expected_change, rel=0.25)


def test_equality_constraint_costs_one_degree_of_freedom(hs_data, hs_three):
    result = cfa_tool.fit(THREE_FACTORS + "equal loading(textual, x5), loading(textual, x6)\n", hs_data)
    assert result.fit.df == hs_three.fit.df + 1
    assert result.fit.chi_square >= hs_three.fit.chi_square
    est = {r.variables: r.estimate for r in result.estimates}
    assert est[("textual", "x5")] == est[("textual", "x6")]


def test_bound_holds_and_binds(hs_data):
    result = cfa_tool.fit(THREE_FACTORS + "bound loading(visual, x2) <= 0.4\n", hs_data)
    assert result.converged
    est = {r.variables: r.estimate for r in result.estimates}
    assert est[("visual", "x2")] == pytest.approx(0.4, abs=1e-9)


def test_observed_and_expected_information_agree_under_a_true_model():
    # At the ML estimates of a correct model both information matrices estimate the same thing
    # (Efron & Hinkley 1978), so the standard errors differ only by sampling noise.
    loadings = np.zeros((6, 2))
    loadings[:3, 0] = [1.0, 0.8, 1.2]
    loadings[3:, 1] = [1.0, 1.5, 0.7]
    data = simulate_cfa(loadings, np.array([[0.9, 0.3], [0.3, 0.5]]), np.diag([0.4, 0.5, 0.3, 0.6, 0.5, 0.4]), n=3000, seed=5)
    model = "factor f: y1..y3\nfactor g: y4..y6\n"
    expected = cfa_tool.fit(model, data)
    observed = cfa_tool.fit(model, data, information="observed")
    for a, b in zip(expected.estimates, observed.estimates):
        assert b.estimate == a.estimate
        if a.free:
            assert b.se == pytest.approx(a.se, rel=0.05), a.variables


def test_heywood_case_is_reported():
    # Three indicators with r12 = r13 = .8 and r23 = .5 force a standardized loading of
    # sqrt(.8 * .8 / .5) = 1.13 for y1, hence a negative residual variance (a Heywood case).
    corr = np.array([[1.0, 0.8, 0.8], [0.8, 1.0, 0.5], [0.8, 0.5, 1.0]])
    rng = np.random.default_rng(3)
    z = rng.standard_normal((500, 3))
    z = (z - z.mean(0)) @ np.linalg.inv(np.linalg.cholesky(np.cov(z.T, bias=True))).T
    data = pd.DataFrame(z @ np.linalg.cholesky(corr).T, columns=["y1", "y2", "y3"])
    result = cfa_tool.fit("factor f: y1, y2, y3\n", data)
    assert not result.admissible
    assert any("residual (error) variance of y1 is negative" in p.explanation for p in result.problems)
    resid = [r.estimate for r in result.estimates if r.variables == ("y1",)][0]
    assert resid == pytest.approx(1.0 - 0.8 * 0.8 / 0.5, abs=1e-6)


def test_rotational_indeterminacy_is_caught_after_fitting():
    # Two correlated factors that both load on all six items can be rotated into each other:
    # the information matrix is singular (Bollen 1989, ch. 7), which the tool must say, naming parameters.
    from cfa_tool.errors import EstimationError

    loadings = np.zeros((6, 2))
    loadings[:3, 0] = [1.0, 0.8, 1.2]
    loadings[3:, 1] = [1.0, 1.5, 0.7]
    data = simulate_cfa(loadings, np.array([[0.9, 0.3], [0.3, 0.5]]), np.diag([0.4, 0.5, 0.3, 0.6, 0.5, 0.4]), n=500, seed=8)
    with pytest.raises(EstimationError, match="not identified .* parameters involved are: .*loading"):
        cfa_tool.fit("factor f: y1..y6\nfactor g: y1..y6\n", data)


def test_counting_rule_is_checked_before_fitting(hs_data):
    from cfa_tool.errors import ModelError

    with pytest.raises(ModelError, match="free parameters but 3 indicators give only 6"):
        cfa_tool.fit("factor f: x1, x2, x3\ncovary x1, x2, x3\n", hs_data)


@pytest.mark.parametrize("extra, group", [("covary x1, x4\n", None), ("factor g: visual, textual, speed\n", "school")])
def test_rank_two_derivatives_equal_the_trace_formulas(hs_data, extra, group):
    # gradient tr(M D_a) - 2 d' S^-1 dmu_a and expected second derivatives tr(S^-1 D_a S^-1 D_b)
    # + 2 dmu_a' S^-1 dmu_b (Browne 1974), from full derivative matrices, against the rank-two path
    from cfa_tool.pipeline.inputs import moments_for
    from cfa_tool.pipeline.continuous import FitOptions, estimate
    from cfa_tool.language import parse_model

    spec = parse_model(THREE_FACTORS + extra)
    groups, _ = moments_for(spec, hs_data, "hs", group)
    est = estimate(spec, groups, FitOptions())
    lik, model = est.likelihood, est.model
    theta = est.theta + 0.02 * np.random.default_rng(3).normal(size=len(est.theta))
    gradient, information = np.zeros(len(theta)), np.zeros((len(theta), len(theta)))
    for g, w in enumerate(lik.weights):
        _, parts, _ = lik._group_state(theta, g)
        d_sigma, d_mu = model.jacobian(theta, g)
        S = parts.sigma_inv
        gradient += w * np.einsum("kij,ji->k", d_sigma, parts.M)
        information += w * np.einsum("aij,jk,bkl,li->ab", d_sigma, S, d_sigma, S)
        if parts.mean_gradient is not None:
            gradient += w * d_mu @ parts.mean_gradient
            information += w * 2.0 * d_mu @ S @ d_mu.T
    rank_two = lik.evaluate(theta)
    assert np.allclose(rank_two.gradient, gradient, atol=1e-12)
    assert np.allclose(rank_two.information, information, atol=1e-12)


@pytest.mark.parametrize("extra", ["", "covary x1, x4\n"])
def test_closed_form_hessian_equals_differences_of_the_gradient(hs_data, extra):
    # the complete-data observed Hessian (second derivatives of Sigma laid out once per model,
    # Neudecker & Satorra 1991) against central differences of the analytic gradient, away from the minimum
    from cfa_tool.pipeline.inputs import moments_for
    from cfa_tool.numerics.linalg import difference_hessian
    from cfa_tool.pipeline.continuous import FitOptions, estimate
    from cfa_tool.language import parse_model

    spec = parse_model(THREE_FACTORS + extra)
    groups, _ = moments_for(spec, hs_data, "hs")
    est = estimate(spec, groups, FitOptions())
    theta = est.theta + 0.05 * np.random.default_rng(5).normal(size=len(est.theta))
    closed = est.likelihood.observed_hessian(theta)
    numeric = difference_hessian(est.likelihood.gradient, theta, central=True)
    assert np.allclose(closed, numeric, atol=1e-6 * np.abs(numeric).max())
    assert not np.allclose(closed, est.likelihood.evaluate(theta).information, atol=1e-4)  # not the expected one


@pytest.mark.parametrize("text", [
    "factor f: y1..y4\nfactor g: y5..y8\n",
    # higher-order paths, an item on two factors, a residual covariance, equal loadings and effects coding
    "factor f: y1..y4\nfactor g: y5..y8\nfactor k: y9..y12, y1\nfactor h: f, g, k\n"
    "equal loading(f, y2), loading(f, y3)\ncovary y5, y6\nscale g by effects\n",
])
def test_least_squares_derivatives_equal_the_full_derivative_matrices(text):
    # d rho / d theta of the ordinal least-squares objective, gathered from the rank-two basis, against the
    # below-diagonal elements of the (q, p, p) derivative matrices of the general path (Neudecker & Satorra 1991)
    from cfa_tool.estimation.least_squares import GroupStatistics, OrdinalLeastSquares
    from cfa_tool.language import parse_model
    from cfa_tool.model.implied import StructuredModel
    from cfa_tool.model.parameters import build_parameter_table

    table = build_parameter_table(parse_model(text))
    model = StructuredModel(table)
    n_pairs = table.p * (table.p - 1) // 2
    ls = OrdinalLeastSquares(model, [GroupStatistics(np.zeros(n_pairs), np.ones(n_pairs), np.eye(n_pairs), 100)], thresholds=False)
    theta = 0.5 + 0.3 * np.random.default_rng(8).normal(size=table.n_free)
    d_sigma, _ = model.jacobian(theta)
    np.testing.assert_allclose(ls.jacobian(theta), d_sigma[:, ls.pairs[0], ls.pairs[1]], rtol=0, atol=1e-12)


@pytest.mark.parametrize("text", [
    "factor f: y1..y4\nfactor g: y5..y8\n",
    "factor f: y1..y4\nfactor g: y5..y8\nfactor k: y9..y12, y1\nequal loading(f, y2), loading(f, y3)\ncovary y5, y6\n"
    "scale g by effects\n",
])
def test_least_squares_hessian_equals_differences_of_the_gradient(text):
    # the closed-form second derivatives of the ordinal least-squares discrepancy against central differences of
    # its analytic gradient, away from the minimum (residuals and weights drawn at random)
    from cfa_tool.estimation.least_squares import GroupStatistics, OrdinalLeastSquares
    from cfa_tool.numerics.linalg import difference_hessian
    from cfa_tool.language import parse_model
    from cfa_tool.model.implied import StructuredModel
    from cfa_tool.model.parameters import build_parameter_table

    table = build_parameter_table(parse_model(text))
    model = StructuredModel(table)
    n_pairs = table.p * (table.p - 1) // 2
    rng = np.random.default_rng(2)
    ls = OrdinalLeastSquares(model, [GroupStatistics(rng.uniform(-0.3, 0.6, n_pairs), rng.uniform(0.5, 2.0, n_pairs),
                                                     np.eye(n_pairs), 100)], thresholds=False)
    theta = 0.5 + 0.3 * rng.normal(size=table.n_free)
    numeric = difference_hessian(ls.gradient, theta, central=True)
    assert np.allclose(ls.observed_hessian(theta), numeric, atol=1e-6 * np.abs(numeric).max())
