"""Derivatives of the least-squares objective with thresholds as parameters (multi-group ordinal fits).

* the analytic Jacobian of the model statistics (standardized thresholds and correlations of the latent
  responses) equals central differences of the statistics (numerical differentiation as in Nocedal &
  Wright 2006, sec. 8.1), in every group, for models with latent means, a residual covariance and
  intercepts and residual variances of the latent responses among the parameters;
* the closed-form Hessian equals central differences of the analytic gradient (itself checked against
  differences of the discrepancy in test_objective_contract.py), away from the minimum where the
  residual term matters, and differs there from the Gauss-Newton information 2 D'WD;
* against an implementation the project did not write: each group's configural fit is the diagonally
  weighted least-squares problem of Muthén, du Toit & Spisic (1997) on that group's thresholds and
  polychoric correlations, written out below independently of the package (Sigma = L Phi L' + I, the
  marker loading 1, thresholds tau / sqrt(Sigma_jj)) and minimised by scipy.optimize.minimize (BFGS);
  the minimum and the estimates must agree with the package's two-group fit;
* the search ends within its tolerance of the exact minimum (found by further Newton steps).
"""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest
from scipy.optimize import minimize

from cfa_tool.data.groups import split_ordinal_moments
from cfa_tool.data.polychoric import ordinal_moments
from cfa_tool.language import parse_model
from cfa_tool.pipeline.continuous import FitOptions
from cfa_tool.pipeline.ordinal import estimate_ordinal_groups

TWO_FACTORS = "factor f: y1, y2, y3, y4\nfactor g: y5, y6, y7\nordinal y1..y7\n"


def _rows(n: int, seed: int, shift: float, scale: float) -> pd.DataFrame:
    rng = np.random.default_rng(seed)
    L = np.zeros((7, 2))
    L[:4, 0] = [0.8, 0.7, 0.6, 0.7]
    L[4:, 1] = [0.7, 0.6, 0.8]
    L[3, 1] = 0.3  # a cross-loading the model leaves out: the residuals are not small
    eta = shift + scale * rng.multivariate_normal([0, 0], [[1, 0.4], [0.4, 1]], n)
    x = eta @ L.T + rng.normal(size=(n, 7)) * 0.6
    cuts = np.array([-0.8, 0.1, 0.9])
    return pd.DataFrame({f"y{j + 1}": np.searchsorted(cuts, x[:, j]) + 1 for j in range(7)})


def _groups(n_groups: int = 2):
    names = [f"y{j + 1}" for j in range(7)]
    if n_groups == 1:
        return [("all", ordinal_moments(_rows(500, 20, 0.0, 1.0), names, "simulated"))]
    frame = pd.concat([_rows(500 + 150 * g, 20 + g, 0.3 * g, 1.0 + 0.2 * g).assign(site=f"s{g}")
                       for g in range(n_groups)], ignore_index=True)
    data, _ = split_ordinal_moments(frame, "site", names, "simulated")
    return data


def _fit(text: str, n_groups: int = 2):
    est = estimate_ordinal_groups(parse_model(text), _groups(n_groups), FitOptions())
    assert est.converged
    return est


MODELS = {
    "configural": TWO_FACTORS,
    # equal thresholds and loadings: intercepts, residual variances and latent means of the second group are free
    "metric": TWO_FACTORS + "invariance metric\n",
    "scalar, with a residual covariance": TWO_FACTORS + "invariance scalar\ncovary y2, y3\n",
}


@pytest.fixture(scope="module", params=list(MODELS))
def fitted(request):
    return _fit(MODELS[request.param])


def _away(theta: np.ndarray) -> np.ndarray:
    return theta + 0.03 * np.random.default_rng(5).normal(size=len(theta))


def test_jacobian_equals_central_differences_of_the_statistics(fitted):
    obj = fitted.objective
    point = _away(fitted.theta)
    h = 1e-6
    for g in range(len(obj.weights)):
        analytic = obj.jacobian(point, g)
        numeric = np.array([(obj.statistics(point + h * e, g) - obj.statistics(point - h * e, g)) / (2 * h)
                            for e in np.eye(len(point))])
        assert np.abs(numeric).max() > 0.1
        np.testing.assert_allclose(analytic, numeric, rtol=0, atol=1e-8)


def test_hessian_equals_central_differences_of_the_gradient(fitted):
    obj = fitted.objective
    point = _away(fitted.theta)
    hessian = obj.observed_hessian(point)
    h = 1e-6
    numeric = np.array([(obj.gradient(point + h * e) - obj.gradient(point - h * e)) / (2 * h)
                        for e in np.eye(len(point))])
    scale = np.abs(numeric).max()
    np.testing.assert_allclose(hessian, numeric, rtol=0, atol=1e-7 * scale)
    np.testing.assert_array_equal(hessian, hessian.T)
    # the residual term is not negligible here: the Hessian is not the Gauss-Newton information
    assert np.abs(hessian - obj.evaluate(point).information).max() > 1e-3 * scale


def test_one_group_with_thresholds_as_parameters():
    est = _fit(TWO_FACTORS, 1)
    obj, point = est.objective, _away(est.theta)
    h = 1e-6
    numeric = np.array([(obj.gradient(point + h * e) - obj.gradient(point - h * e)) / (2 * h)
                        for e in np.eye(len(point))])
    np.testing.assert_allclose(obj.observed_hessian(point), numeric, rtol=0, atol=1e-7 * np.abs(numeric).max())


def _independent_group_fit(values: np.ndarray, weights: np.ndarray) -> tuple[float, np.ndarray]:
    """The configural model of one group, written from the formulas alone: parameters loadings of y2-y4 on f
    and y6-y7 on g (markers y1 and y5 at 1), var f, var g, cov(f, g), and the 21 thresholds; latent responses
    with intercept 0 and residual variance 1.  Returns (minimum of F, loadings)."""
    rows = np.array([1, 2, 3, 5, 6])
    cols = np.array([0, 0, 0, 1, 1])
    lower = np.tril_indices(7, -1)

    def statistics(x):
        L = np.zeros((7, 2))
        L[0, 0] = L[4, 1] = 1.0
        L[rows, cols] = x[:5]
        phi = np.array([[x[5], x[7]], [x[7], x[6]]])
        sigma = L @ phi @ L.T + np.eye(7)
        sd = np.sqrt(np.diag(sigma))
        thresholds = x[8:].reshape(7, 3) / sd[:, None]
        return np.concatenate([thresholds.ravel(), (sigma / np.outer(sd, sd))[lower]])

    def discrepancy(x):
        e = values - statistics(x)
        return float(e @ (weights * e))

    start = np.concatenate([np.ones(5), [1.0, 1.0, 0.3], values[:21] * np.sqrt(2.0)])
    found = minimize(discrepancy, start, method="BFGS", options={"gtol": 1e-10, "maxiter": 5000})
    return found.fun, found.x[:5]


def test_each_groups_configural_fit_equals_an_independent_minimisation():
    est = _fit(TWO_FACTORS)
    obj = est.objective
    labels = est.table.free_labels
    for g, group in enumerate(obj.groups):
        minimum, loadings = _independent_group_fit(group.values, group.weights)
        assert obj.group_discrepancy(est.theta, g) == pytest.approx(minimum, rel=1e-7, abs=1e-12)
        mine = [est.theta[labels.index(f"loading({f}, {y}) [s{g}]")]
                for f, y in (("f", "y2"), ("f", "y3"), ("f", "y4"), ("g", "y6"), ("g", "y7"))]
        np.testing.assert_allclose(mine, loadings, rtol=0, atol=1e-5)


def test_the_fit_ends_at_the_minimum():
    # the exact minimum, found by further Newton steps with the closed-form Hessian until the gradient vanishes:
    # the search ended within its tolerance of it (Newton decrement g'H^-1 g below 1e-14, about 2 (F - F_min))
    est = _fit(TWO_FACTORS + "invariance metric\n")
    obj, x = est.objective, est.theta.copy()
    for _ in range(4):
        x = x - np.linalg.solve(obj.observed_hessian(x), obj.gradient(x))
    assert np.abs(obj.gradient(x)).max() < 1e-12
    assert 0.0 <= obj.value(est.theta) - obj.value(x) < 1e-14
    np.testing.assert_allclose(est.theta, x, rtol=0, atol=1e-5)


def test_latent_responses_held_at_variance_one_have_exact_derivatives():
    # some items' latent responses at variance 1 (their residual variance following; pipeline.ordinal's refit of a
    # Heywood case): the Jacobian and the closed-form Hessian still equal central differences (Nocedal & Wright
    # 2006, sec. 8.1), and the statistics of those items do not depend on their residual variance's entry
    est = _fit(TWO_FACTORS + "invariance metric\n")
    unit = np.zeros((2, 7), dtype=bool)
    unit[0, [0, 3]] = unit[1, [0, 5]] = True
    obj = est.objective.with_unit_variances(tuple(unit))
    point = _away(est.theta)
    h = 1e-6
    for g in range(2):
        numeric = np.array([(obj.statistics(point + h * e, g) - obj.statistics(point - h * e, g)) / (2 * h)
                            for e in np.eye(len(point))])
        np.testing.assert_allclose(obj.jacobian(point, g), numeric, rtol=0, atol=1e-8)
        # standardized thresholds of item y1 are its thresholds less its mean: variance 1
        mu = obj.model.matrices(point, g).implied_mean()
        tau = obj.model.thresholds(point, g)[obj.item_of == 0]
        first = obj.statistics(point, g)[:obj.n_thresholds][obj.item_of == 0]
        if unit[g, 0]:
            np.testing.assert_allclose(first, tau - mu[0], rtol=0, atol=1e-12)
        assert np.diag(obj.unit_variance_matrices(point, g).implied_covariance())[unit[g]] == pytest.approx(1.0)
    numeric = np.array([(obj.gradient(point + h * e) - obj.gradient(point - h * e)) / (2 * h)
                        for e in np.eye(len(point))])
    np.testing.assert_allclose(obj.observed_hessian(point), numeric, rtol=0, atol=1e-7 * np.abs(numeric).max())
