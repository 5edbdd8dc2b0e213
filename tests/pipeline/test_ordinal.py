"""Ordinal items: thresholds and polychoric correlations, their asymptotic covariance, and
least squares on them.  semopy's own polychoric routine calls scipy.stats.mvn.mvnun, which
SciPy 1.17 removed, so the independent check here maximises the same likelihood with SciPy's
multivariate normal distribution instead."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest
from scipy import optimize, stats

import cfa_tool
from cfa_tool.data.polychoric import ordinal_moments
from cfa_tool.errors import DataError, OptionError
from cfa_tool.method import Items, Weighting

CUTS = [np.array([-1.0, 0.0, 1.0]), np.array([-0.5, 0.5]), np.array([0.2])]
R3 = np.array([[1.0, 0.5, 0.3], [0.5, 1.0, 0.4], [0.3, 0.4, 1.0]])


def _ordinal(n: int, seed: int, corr=R3, cuts=CUTS) -> pd.DataFrame:
    z = np.random.default_rng(seed).multivariate_normal(np.zeros(len(corr)), corr, size=n)
    return pd.DataFrame({f"y{j + 1}": np.searchsorted(cuts[j % len(cuts)], z[:, j]) + 1 for j in range(len(corr))}).astype(float)


def scipy_polychoric(table: np.ndarray, ti: np.ndarray, tj: np.ndarray) -> float:
    """The polychoric correlation of a contingency table with thresholds held fixed, by maximising the
    bivariate-normal likelihood with scipy.stats.multivariate_normal and scipy.optimize (independent of the
    project's integrator and search)."""
    a = np.concatenate([[-8], ti, [8]])
    b = np.concatenate([[-8], tj, [8]])

    def negative(rho):
        dist = stats.multivariate_normal(mean=[0, 0], cov=[[1, rho], [rho, 1]])
        F = np.array([[dist.cdf([ai, bj]) for bj in b] for ai in a])
        pi = F[1:, 1:] - F[:-1, 1:] - F[1:, :-1] + F[:-1, :-1]
        return -np.sum(table * np.log(np.clip(pi, 1e-300, None)))

    return optimize.minimize_scalar(negative, bounds=(-0.99, 0.99), method="bounded", options={"xatol": 1e-8}).x


def test_polychoric_correlations_recover_the_population():
    om = ordinal_moments(_ordinal(20000, 1), ("y1", "y2", "y3"), "sim")
    lower = np.tril_indices(3, -1)
    assert np.allclose(om.correlations[lower], R3[lower], atol=0.025)
    for tau, cut in zip(om.thresholds, CUTS):
        assert np.allclose(tau, cut, atol=0.03)


def test_polychoric_by_an_independent_integrator():
    data = _ordinal(400, 2)
    om = ordinal_moments(data, ("y1", "y2", "y3"), "sim")
    x, y = data["y1"].to_numpy().astype(int) - 1, data["y2"].to_numpy().astype(int) - 1
    table = np.zeros((4, 3))
    np.add.at(table, (x, y), 1)
    assert om.correlations[1, 0] == pytest.approx(scipy_polychoric(table, om.thresholds[0], om.thresholds[1]), abs=2e-4)


def test_asymptotic_covariance_matches_monte_carlo_spread():
    # the variance of sqrt(N)(r - rho) over replications estimates the diagonal of Gamma
    estimates = [ordinal_moments(_ordinal(400, 100 + s), ("y1", "y2", "y3"), "sim").correlations[np.tril_indices(3, -1)]
                 for s in range(150)]
    spread = np.var(estimates, axis=0) * 400
    gamma = ordinal_moments(_ordinal(20000, 7), ("y1", "y2", "y3"), "sim").gamma
    # with 150 replications a variance is known to about +/- 12% (one SE)
    assert np.allclose(spread, np.diag(gamma), rtol=0.35)


def _two_factor_ordinal(n: int, seed: int) -> pd.DataFrame:
    L = np.zeros((8, 2))
    L[:4, 0] = [0.8, 0.7, 0.6, 0.75]
    L[4:, 1] = [0.7, 0.8, 0.65, 0.6]
    S = L @ np.array([[1, 0.4], [0.4, 1]]) @ L.T
    S[np.diag_indices(8)] = 1
    return _ordinal(n, seed, S, [np.array([-1.2, -0.3, 0.5, 1.3])])


@pytest.mark.parametrize("method", ["diagonally-weighted", "unweighted"])
def test_least_squares_recovers_a_known_model(method):
    result = cfa_tool.fit("factor f: y1..y4\nfactor g: y5..y8\nscale latent by variance\n", _two_factor_ordinal(3000, 3),
                          ordinal="all", ordinal_estimator=method)
    est = {r.variables: r for r in result.estimates}
    truth = {("f", "y1"): 0.8, ("f", "y3"): 0.6, ("g", "y6"): 0.8, ("g", "y8"): 0.6, ("f", "g"): 0.4}
    for key, value in truth.items():
        assert abs(est[key].estimate - value) < 4 * est[key].se + 0.01, key
    assert est[("y1",)].estimate == pytest.approx(1 - est[("f", "y1")].estimate ** 2, abs=1e-9)  # unit latent-response variance
    assert result.robust.p_value_scaled > 0.001
    assert result.method.items is Items.ORDINAL and result.method.weighting is Weighting(method)


def test_adjusted_test_rejects_a_wrong_model():
    result = cfa_tool.fit("factor f: y1..y8\n", _two_factor_ordinal(3000, 4), ordinal="all")
    assert result.robust.p_value_scaled < 1e-6


def test_ordinal_alpha_uses_the_polychoric_matrix():
    from cfa_tool.assessment.reliability import cronbach_alpha

    data = _two_factor_ordinal(1000, 5)
    result = cfa_tool.fit("factor f: y1..y4\nfactor g: y5..y8\nordinal y1..y8\n", data)
    f = [r for r in result.groups[0].reliability if r.factor == "f"][0]
    om = ordinal_moments(data, tuple(f"y{i}" for i in range(1, 9)), "x")
    assert f.alpha == pytest.approx(cronbach_alpha(om.correlations[:4, :4]), rel=1e-10)


def test_ordinal_errors():
    data = _two_factor_ordinal(300, 6)
    one = data.assign(y8=1.0)
    with pytest.raises(DataError, match="'y8' has a single category"):
        cfa_tool.fit("factor f: y1..y4\nfactor g: y5..y8\n", one, ordinal="all")
    many = data.assign(y1=np.arange(300) % 20)
    with pytest.raises(DataError, match="'y1' has 20 categories"):
        cfa_tool.fit("factor f: y1..y4\nfactor g: y5..y8\n", many, ordinal="all")
    with pytest.raises(OptionError, match="pairwise present rows"):
        cfa_tool.fit("factor f: y1..y4\nfactor g: y5..y8\n", data, ordinal="all", missing="full-information")


def test_just_identified_ordinal_model_has_nothing_to_test():
    # found by the fuzzer: three items on one factor leave no degrees of freedom
    result = cfa_tool.fit("factor f: y1..y3\n", _ordinal(500, 9), ordinal="all")
    assert result.converged and result.fit.df == 0
    assert result.fit.chi_square == pytest.approx(0.0, abs=1e-8)


def test_polyserial_correlations_beside_ordinal_items():
    # a continuous item (any mean and SD) beside ordinal ones: polyserial correlations recover the
    # population and their asymptotic variances match the Monte Carlo spread
    def draw(n, seed):
        z = np.random.default_rng(seed).multivariate_normal(np.zeros(3), R3, size=n)
        return pd.DataFrame({"x": 2 + 3 * z[:, 0], "y2": np.searchsorted(CUTS[1], z[:, 1]) + 1.0,
                             "y3": np.searchsorted(CUTS[2], z[:, 2]) + 1.0})

    om = ordinal_moments(draw(20000, 1), ("x", "y2", "y3"), "sim", frozenset({"x"}))
    lower = np.tril_indices(3, -1)
    assert np.allclose(om.correlations[lower], R3[lower], atol=0.025)
    spread = np.var([ordinal_moments(draw(400, 50 + s), ("x", "y2", "y3"), "sim", frozenset({"x"})).correlations[lower]
                     for s in range(150)], axis=0) * 400
    assert np.allclose(spread, np.diag(om.gamma), rtol=0.35)


def test_mixed_continuous_and_ordinal_model():
    data = _two_factor_ordinal(3000, 8)
    z = np.random.default_rng(8).multivariate_normal(np.zeros(2), [[1, 0.4], [0.4, 1]], size=3000)
    data["y1"] = 0.8 * z[:, 0] * 10 + np.random.default_rng(9).normal(scale=6, size=3000)  # continuous, SD units of 10
    result = cfa_tool.fit("factor f: y1..y4\nfactor g: y5..y8\nordinal y2..y8\nscale latent by variance\n", data)
    assert result.converged and result.method.items is Items.MIXED
    assert any("correlation metric" in w for w in result.warnings)


def test_the_methods_paragraph_names_which_items_were_ordinal_and_which_continuous():
    # seven of eight items ordinal, one continuous; then two ordinal ('ordinal' statement and --ordinal) among
    # continuous ones: the paragraph read as if every item were ordinal (hostile trial)
    from cfa_tool.reporting.paragraph import methods_paragraph

    data = _two_factor_ordinal(1000, 8)
    data["y1"] = np.random.default_rng(9).normal(size=1000) + data["y2"]  # continuous
    result = cfa_tool.fit("factor f: y1..y4\nfactor g: y5..y8\nordinal y2..y8\n", data)
    text = " ".join(methods_paragraph(result).split())
    assert "(y2, y3, y4, y5, y6, y7, and y8 treated as ordinal, the other item as continuous)" in text
    two = data.assign(**{x: data[x] + np.random.default_rng(3).normal(scale=0.3, size=1000) for x in
                         ("y1", "y3", "y4", "y5", "y7", "y8")})
    result = cfa_tool.fit("factor f: y1..y4\nfactor g: y5..y8\nordinal y6\n", two, ordinal=["y2"])
    text = " ".join(methods_paragraph(result).split())
    assert "(y2 and y6 treated as ordinal, the other six items as continuous)" in text
    assert "of the ordinal items" not in text
