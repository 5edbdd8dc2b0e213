"""Auxiliary variables in full-information ML (fit's missing-data helpers; estimation/auxiliary.py), checked against
what the saturated-correlates model must give by its construction (Graham 2003) and against the EM estimates of
data/em.py, whose own check against the closed form of monotone gaps (Anderson 1957) is
tests/data/test_missing_data.py::test_em_matches_the_closed_form_for_monotone_data.

semopy has no full-information ML with auxiliary variables (as far as known), so no comparison with it here.
"""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.data.moments import moments_with_gaps
from cfa_tool.estimation.auxiliary import JointModel, AuxiliaryLikelihood, joint_start
from cfa_tool.inference.standard_errors import observed_information
from cfa_tool.language.parser import parse_model
from cfa_tool.pipeline.continuous import FitOptions, fit_moments

ITEMS = ("y1", "y2", "y3", "y4")
MODEL = "factor F: y1, y2, y3, y4\n"


def _items(n: int, seed: int, loading: float = 0.7) -> tuple[np.ndarray, np.random.Generator]:
    rng = np.random.default_rng(seed)
    f = rng.normal(size=n)
    unique = np.sqrt(1 - loading ** 2)
    return np.column_stack([loading * f + unique * rng.normal(size=n) for _ in ITEMS]), rng


def _fit(rows: np.ndarray, names: tuple[str, ...], helpers: tuple[str, ...] = (), model: str = MODEL):
    moments = moments_with_gaps(rows, names, "<simulated>")
    return fit_moments(parse_model(model), moments, FitOptions(missing="full-information", missing_helpers=helpers))


def _by_parameter(result) -> dict:
    return {(e.kind, e.variables): e for e in result.estimates if e.free}


def test_with_complete_items_the_helpers_change_nothing():
    """With every item answered the joint likelihood factors into the items' own and the helpers' given the items
    (Graham 2003; Enders 2010, ch. 5), so estimates, standard errors, chi-square and the baseline (Savalei & Bentler
    2009: the helpers' correlations free) equal the fit without helpers; the helpers have gaps of their own."""
    y, rng = _items(300, 1)
    helpers = np.column_stack([0.5 * y[:, 0] + rng.normal(size=300), rng.normal(size=300)])
    helpers[rng.random(300) < 0.3, 0] = np.nan
    without = _fit(y, ITEMS)
    with_helpers = _fit(np.column_stack([y, helpers]), ITEMS + ("age", "visits"), ("age", "visits"))
    a, b = _by_parameter(without), _by_parameter(with_helpers)
    assert a.keys() == b.keys()
    for key in a:
        assert b[key].estimate == pytest.approx(a[key].estimate, abs=1e-6), key
        assert b[key].se == pytest.approx(a[key].se, abs=1e-6), key
    assert with_helpers.fit.chi_square == pytest.approx(without.fit.chi_square, abs=1e-6)
    assert with_helpers.fit.df == without.fit.df
    assert with_helpers.fit.baseline_chi_square == pytest.approx(without.fit.baseline_chi_square, abs=1e-5)
    assert with_helpers.fit.cfi == pytest.approx(without.fit.cfi, abs=1e-8)


def _row_scores(y: np.ndarray, mu: np.ndarray, sigma: np.ndarray) -> np.ndarray:
    """u_i = Sigma_oo^-1 (y_io - mu_o) of each row, zeros where the row has gaps (the full-information score of
    the means; Little & Rubin 2002, ch. 11)."""
    out = np.zeros_like(y)
    for i, row in enumerate(y):
        o = ~np.isnan(row)
        out[i, o] = np.linalg.solve(sigma[np.ix_(o, o)], row[o] - mu[o])
    return out


def test_a_helper_uncorrelated_with_every_score_changes_no_estimate():
    """A helper whose centred values are orthogonal to every row's score u_i of the fit without it leaves the
    joint score zero at (theta without helpers, C = 0), so that point is the joint maximum: the model's estimates
    are those without the helper.  The items have gaps (about 30% of y1 missing)."""
    y, rng = _items(400, 2)
    y[rng.random(400) < 0.3, 0] = np.nan
    without = _fit(y, ITEMS)
    group = without.groups[0]
    u = _row_scores(y, group.implied_mean, group.implied_covariance)
    raw = rng.normal(size=400)
    basis = np.column_stack([np.ones(400), u])
    helper = raw - basis @ np.linalg.lstsq(basis, raw, rcond=None)[0]  # orthogonal to 1 and to every score column
    with_helper = _fit(np.column_stack([y, helper]), ITEMS + ("age",), ("age",))
    a, b = _by_parameter(without), _by_parameter(with_helper)
    for key in a:
        assert b[key].estimate == pytest.approx(a[key].estimate, abs=1e-6), key


def test_a_just_identified_model_reproduces_the_joint_em_moments_of_its_items():
    """A one-factor model of three items is just identified (9 parameters for 3 means and 6 covariances), so with
    helpers its implied means and covariances are the saturated (EM) estimates of items and helpers together,
    restricted to the items (data/em.py), and its chi-square is zero; without helpers they would be the EM
    estimates of the items alone, which differ when the gaps go with the helper.  With gaps in one item only, those
    moments are also checked against their closed form."""
    rng = np.random.default_rng(3)
    n = 500
    f = rng.normal(size=n)
    y = np.column_stack([0.8 * f + 0.6 * rng.normal(size=n) for _ in range(3)])
    helper = y[:, 0] + 0.5 * rng.normal(size=n)
    y[helper > np.quantile(helper, 0.65), 0] = np.nan
    rows = np.column_stack([y, helper])
    joint = moments_with_gaps(rows, ("y1", "y2", "y3", "age"), "<simulated>")
    result = _fit(rows, ("y1", "y2", "y3", "age"), ("age",), "factor F: y1, y2, y3\n")
    group = result.groups[0]
    assert result.fit.df == 0 and result.fit.chi_square == pytest.approx(0.0, abs=1e-7)
    np.testing.assert_allclose(group.implied_covariance, joint.covariance[:3, :3], atol=1e-6)
    np.testing.assert_allclose(group.implied_mean, joint.means[:3], atol=1e-6)
    items_only = moments_with_gaps(y, ("y1", "y2", "y3"), "<simulated>")
    assert abs(items_only.means[0] - joint.means[0]) > 0.05  # the helper moves the first item's mean
    # the gaps are monotone (only y1 has them), so the ML estimates are explicit (Anderson 1957 factored likelihood;
    # Little & Rubin 2002, sec. 7.2): the complete columns' moments from every row, y1's regression on them from the
    # rows that answer it
    complete = rows[:, 1:]
    mu_c = complete.mean(axis=0)
    sigma_c = np.cov(complete, rowvar=False, bias=True)
    seen = ~np.isnan(rows[:, 0])
    design = np.column_stack([np.ones(seen.sum()), complete[seen]])
    coef, *_ = np.linalg.lstsq(design, rows[seen, 0], rcond=None)
    residual = rows[seen, 0] - design @ coef
    beta = coef[1:]
    np.testing.assert_allclose(group.implied_mean[0], coef[0] + beta @ mu_c, atol=1e-6)
    np.testing.assert_allclose(group.implied_covariance[0, 0], residual @ residual / seen.sum() + beta @ sigma_c @ beta,
                               atol=1e-6)
    np.testing.assert_allclose(group.implied_covariance[0, 1:], (beta @ sigma_c)[:2], atol=1e-6)


def test_closed_form_second_derivatives_match_differences_of_the_gradient():
    """The joint observed Hessian (AuxiliaryLikelihood.observed_hessian) against central differences of its
    analytic gradient, and that gradient against the one of the scoring evaluation, away from the minimum."""
    y, rng = _items(250, 4)
    helper = np.column_stack([y[:, 0] + rng.normal(size=250), rng.normal(size=250)])
    y[helper[:, 0] > 0.8, 0] = np.nan
    helper[rng.random(250) < 0.2, 1] = np.nan
    result = _fit(y, ITEMS)
    spec = parse_model(MODEL)
    from cfa_tool.data.patterns import pattern_data
    from cfa_tool.estimation.ml import GroupMoments
    from cfa_tool.pipeline.continuous import model_structure

    table, model = model_structure(spec, None, True)
    rows = np.column_stack([y, helper])
    joint = moments_with_gaps(rows, ITEMS + ("a", "b"), "<simulated>")
    likelihood = AuxiliaryLikelihood(JointModel(model, 2, 1), [pattern_data(rows)], [(joint.means, joint.covariance)],
                                     [GroupMoments(joint.covariance, joint.means, joint.n_obs)])
    theta = np.array([p.estimate for p in result.estimates if p.free])
    point = np.concatenate([theta, joint_start(4, 2, [(joint.means, joint.covariance)],
                                               [result.groups[0].implied_covariance])]) + 0.01
    closed = likelihood.observed_hessian(point)
    numeric = observed_information(likelihood.gradient, point, central=True)
    np.testing.assert_allclose(closed, numeric, atol=1e-6 * np.abs(closed).max())
    np.testing.assert_allclose(likelihood.gradient(point), likelihood.evaluate(point).gradient, atol=1e-12)


def test_a_helper_that_carries_the_missingness_removes_the_bias_of_a_loading():
    """The demonstration of Collins, Schafer & Kam (2001), simulated with a fixed seed: y1's answers are missing
    where a helper that goes with y1 is high (40% of rows; missing at random given the helper, not given the
    items).  Without the helper the loading of y1 (true value 0.7, factor variance 1) is far too low; with it the
    estimate is within sampling error of the fit of the same rows before any answer was removed.  What the test
    shows: on this one sample, the bias without the helper is more than five standard errors and with it less than
    two; it is one sample, not a study of the bias over replications."""
    n = 1500
    y, rng = _items(n, 20261204)
    helper = y[:, 0] + 0.4 * rng.normal(size=n)
    frame = pd.DataFrame(y, columns=list(ITEMS))
    model = MODEL + "scale F by variance\n"
    complete = _by_parameter(cfa_tool.fit(model, frame))[("loading", ("F", "y1"))].estimate
    frame.loc[helper > np.quantile(helper, 0.6), "y1"] = np.nan
    frame["age"] = helper
    without = _by_parameter(cfa_tool.fit(model, frame))[("loading", ("F", "y1"))]
    with_helper = _by_parameter(cfa_tool.fit(model, frame, missing_helpers="age"))[("loading", ("F", "y1"))]
    assert complete == pytest.approx(0.7, abs=0.05)  # the population value of the simulation
    assert complete - without.estimate > 5 * without.se
    assert abs(with_helper.estimate - complete) < 2 * with_helper.se

