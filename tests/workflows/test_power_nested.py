"""power-simulation with a nested model (workflows.power_nested): the power of the chi-square difference test of one
factor against two, simulated, beside the noncentral chi-square approximation.

Checks against what the project did not write:

* where the nested model holds in the population (factor correlation 1), the difference of two maximum-likelihood
  fits of nested models follows chi-square with the difference of their degrees of freedom (Steiger, Shapiro &
  Browne 1985), so the test rejects at about alpha: the count of rejections lies within the central 99.9% of
  Binomial(R, alpha), computed by scipy.stats.binom;
* the population discrepancy of the one-factor model, F = min log|Sigma_R| + tr(Sigma Sigma_R^-1) - log|Sigma| - p
  (the maximum-likelihood discrepancy; Joreskog 1969), minimised here by scipy.optimize over the one-factor model's
  loadings and residual variances, written out in this test;
* the approximate power is P(chi2(df, N F) > chi2_.95(df)) by scipy.stats.ncx2 (Satorra & Saris 1985), and the
  simulated power agrees with it within four Monte Carlo standard errors sqrt(p (1 - p) / R) (a loose tolerance:
  the approximation is itself asymptotic).
"""

from __future__ import annotations

import numpy as np
import pytest

scipy_stats = pytest.importorskip("scipy.stats")
scipy_optimize = pytest.importorskip("scipy.optimize")

from cfa_tool.workflows import montecarlo  # noqa: E402
from cfa_tool.workflows.montecarlo import monte_carlo_power  # noqa: E402
from cfa_tool.numerics import distributions as dist  # noqa: E402


def two_factors(correlation: float) -> str:
    """Two factors of four items each, loadings .7 and residual variances .51 (items of variance 1), the factors'
    variances 1 and their correlation ``correlation``."""
    lines = ["factor f: q1, q2, q3, q4", "factor g: q5, q6, q7, q8", "scale latent by variance"]
    lines += [f"start loading({'f' if k <= 4 else 'g'}, q{k}) = 0.7" for k in range(1, 9)]
    lines += [f"start variance(q{k}) = 0.51" for k in range(1, 9)]
    lines.append(f"start covariance(f, g) = {correlation}")
    return "\n".join(lines) + "\n"


ONE_FACTOR = "factor h: q1, q2, q3, q4, q5, q6, q7, q8\n"


def population_sigma(correlation: float) -> np.ndarray:
    loadings = np.zeros((8, 2))
    loadings[:4, 0] = loadings[4:, 1] = 0.7
    phi = np.array([[1.0, correlation], [correlation, 1.0]])
    return loadings @ phi @ loadings.T + 0.51 * np.eye(8)


def one_factor_discrepancy(sigma: np.ndarray) -> float:
    """The ML discrepancy of the one-factor model at ``sigma``, minimised by scipy (independent of the tool)."""
    p = len(sigma)
    _, logdet_s = np.linalg.slogdet(sigma)

    def f(x):
        lam, psi = x[:p], np.exp(x[p:])
        implied = np.outer(lam, lam) + np.diag(psi)
        sign, logdet = np.linalg.slogdet(implied)
        if sign <= 0:
            return 1e10
        return logdet + np.trace(sigma @ np.linalg.inv(implied)) - logdet_s - p

    x0 = np.concatenate([np.full(p, 0.6), np.log(np.full(p, 0.5))])
    found = scipy_optimize.minimize(f, x0, method="BFGS", options={"gtol": 1e-10, "maxiter": 10_000})
    return float(found.fun)


def test_a_correlation_of_one_is_rejected_at_about_alpha(monkeypatch):
    # capture each replication's pair of chi-squares, for the mixture's rejections below
    captured = {}
    original = montecarlo.difference_power

    def keep(plan, n, alpha, pairs):
        captured["pairs"] = pairs
        return original(plan, n, alpha, pairs)

    monkeypatch.setattr(montecarlo, "difference_power", keep)
    replications = 1000
    result = monte_carlo_power(two_factors(1.0), 150, replications=replications, seed=11, nested_model=ONE_FACTOR)
    d = result.difference
    assert result.nested.df_difference == 1  # 17 free parameters against 16
    assert result.nested.discrepancy < 1e-8  # the one factor reproduces the population
    assert d.approximate == pytest.approx(0.05, abs=1e-9)  # the noncentral chi-square with noncentrality 0: alpha
    assert d.pairs >= 0.99 * replications
    low, high = scipy_stats.binom.ppf([0.0005, 0.9995], d.pairs, 0.05)  # central 99.9% of Binomial(R, .05)
    assert low <= round(d.rejected * d.pairs) <= high
    # the mean difference estimates the chi-square(1)'s mean, 1, within 4 standard errors (its SD is sqrt(2))
    assert abs(d.mean_difference - 1.0) < 4 * np.sqrt(2 / d.pairs)
    # the estimates are not held inside the boundary (a correlation may pass 1), so the 50:50 mixture of chi2(0)
    # and chi2(1) (Self & Liang 1987), which the report says rejects more often than its level here, does so: its
    # p-value is half the chi-square(1)'s, so at .05 it rejects where chi2(1)'s p < .10, about 10% (above the
    # central 99.9% of Binomial(R, .05))
    diffs = np.array([nested - general for general, nested in captured["pairs"]])
    mixture = sum(dist.boundary_mixture_sf(x, 1) < 0.05 for x in diffs)
    assert mixture > high
    assert result.nested.boundary  # the merge is said to lie on the boundary


def test_simulated_power_agrees_with_the_noncentral_chi_square():
    correlation, replications = 0.9, 500
    curve = monte_carlo_power(two_factors(correlation), [100, 250], replications=replications, seed=5,
                              nested_model=ONE_FACTOR)
    plan = curve.results[0].nested
    discrepancy = one_factor_discrepancy(population_sigma(correlation))
    assert discrepancy == pytest.approx(0.04893, abs=2e-5)  # computed above by scipy.optimize (this test's own ML)
    assert plan.discrepancy == pytest.approx(discrepancy, rel=1e-4)
    for r in curve.results:
        d = r.difference
        expected = scipy_stats.ncx2.sf(scipy_stats.chi2.ppf(0.95, 1), 1, r.n_obs * discrepancy)  # Satorra & Saris 1985
        assert d.approximate == pytest.approx(expected, abs=1e-6)
        assert abs(d.rejected - expected) < 4 * np.sqrt(expected * (1 - expected) / d.pairs)
    # the JSON carries the difference test at each sample size
    out = curve.to_dict()["nested_model"]
    assert out["df_difference"] == 1 and len(out["difference_test"]) == 2


def test_the_planned_power_and_sample_size_of_power_nested_model():
    """``power MODEL --nested-model MODEL2`` (workflows.power_nested.nested_power): the power at N and the smallest N
    for .80, against scipy.stats.ncx2 with the discrepancy computed above by scipy.optimize."""
    from cfa_tool.workflows.power_nested import nested_power

    correlation = 0.9
    found = nested_power(two_factors(correlation), ONE_FACTOR, n_obs=150)
    discrepancy = one_factor_discrepancy(population_sigma(correlation))
    critical = scipy_stats.chi2.ppf(0.95, 1)

    def power(n: int) -> float:  # Satorra & Saris (1985)
        return scipy_stats.ncx2.sf(critical, 1, n * discrepancy)

    assert found.power == pytest.approx(power(150), abs=1e-4)
    n = found.required_n
    assert power(n - 1) < 0.80 <= power(n) + 1e-6  # the smallest N reaching .80 (161 here, by scipy)
    assert found.to_dict()["required_n"] == n


def test_a_nested_model_that_holds_has_no_sample_size():
    from cfa_tool.errors import OptionError
    from cfa_tool.workflows.power_nested import nested_power

    with pytest.raises(OptionError, match="holds in the population the model file's values describe"):
        nested_power(two_factors(1.0), ONE_FACTOR, n_obs=150)


def test_the_power_at_n_of_a_cluster_sample_is_that_of_the_rows_it_is_worth():
    """Hostile tester s24b: with a design effect the difference test's power at N was that of N independent rows
    (.80 at N = 10 with a design effect of 2, where 10 such rows are worth 5); the check value is scipy's noncentral
    chi-square at N / design effect (Kish 1965, recalled), the RMSEA plan's rule."""
    from cfa_tool.workflows.power_nested import nested_power

    plain = nested_power(two_factors(0.9), ONE_FACTOR, n_obs=300)
    clustered = nested_power(two_factors(0.9), ONE_FACTOR, n_obs=300, design_effect=2.0)
    assert clustered.effective_n == pytest.approx(150.0)
    df, f = clustered.nested.df_difference, clustered.nested.discrepancy
    expected = scipy_stats.ncx2.sf(scipy_stats.chi2.ppf(0.95, df), df, 150.0 * f)
    assert clustered.power == pytest.approx(expected, rel=1e-8) and clustered.power < plain.power
    assert clustered.to_dict()["effective_n"] == pytest.approx(150.0)
