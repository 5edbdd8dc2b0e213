"""The delta-method standard error and interval of omega (Raykov 2002; assessment.reliability_intervals).

Checks against what the code under test did not write: the analytic gradient against scipy's numerical one
(scipy.optimize.approx_fprime) of the fit's own omega, for first-order, higher-order and cross-loading models of
Holzinger & Swineford's (1939) data; the standard error against the spread of omega over seeded Monte Carlo samples
from a known population (the sd within 15% of the mean delta-method standard error: the delta method's first-order
accuracy at N = 300, a tolerance of this project's choosing); the population omega by McDonald's (1999) formula
(sum lambda)^2 / ((sum lambda)^2 + sum theta) with numpy.
"""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

from cfa_tool.assessment.reliability import reliability, sum_keys
from cfa_tool.assessment.reliability_intervals import delta_interval, omega_gradient

MODELS = {
    "three factors": "factor visual: x1, x2, x3\nfactor textual: x4, x5, x6\nfactor speed: x7, x8, x9\n",
    "higher-order": ("factor visual: x1, x2, x3\nfactor textual: x4, x5, x6\nfactor speed: x7, x8, x9\n"
                     "factor ability: visual, textual, speed\n"),
    "cross-loading and a residual covariance": ("factor visual: x1, x2, x3, x9\nfactor textual: x4, x5, x6\n"
                                                "factor speed: x7, x8, x9\ncovary x7, x8\n"),
}


@pytest.mark.parametrize("name", list(MODELS))
def test_the_analytic_gradient_is_scipys_numerical_one(hs_data, name):
    from scipy.optimize import approx_fprime

    import cfa_tool
    from cfa_tool.language.parser import parse_model
    from cfa_tool.pipeline.continuous import model_structure

    text = MODELS[name]
    fit = cfa_tool.fit(text, hs_data)
    table, model = model_structure(parse_model(text), None, False)
    codes, rows, cols = table.entry_arrays()
    mats = model.matrices(fit.theta)
    every = sum_keys(mats.L, mats.G, mats.latent_covariance(), mats.implied_covariance(), table.observed, None)
    for r in fit.groups[0].reliability:
        keys = every[:, table.latent.index(r.factor)]

        def omega(theta: np.ndarray) -> float:
            found, _ = reliability(model.matrices(theta), table.observed, table.latent, None, declared={})
            return next(x.omega for x in found if x.factor == r.factor)

        assert omega(fit.theta) == pytest.approx(r.omega, rel=1e-12)
        analytic = omega_gradient(model.matrices(fit.theta), keys, table.latent.index(r.factor), codes, rows, cols,
                                  model.J)
        numerical = approx_fprime(fit.theta, omega, 1e-7)
        np.testing.assert_allclose(analytic, numerical, atol=1e-6 * max(1.0, np.abs(numerical).max()))
        # the standard error the fit reports is sqrt(g' V g) with the estimates' covariance
        assert r.omega_se == pytest.approx(np.sqrt(analytic @ fit.parameter_covariance @ analytic), rel=1e-10)
        low, high = delta_interval(r)
        assert (high - low) / 2 == pytest.approx(1.959964 * r.omega_se, rel=1e-6)  # the normal 97.5% point


def test_the_standard_error_is_the_monte_carlo_spread_of_omega():
    """200 seeded samples of 300 rows from one factor with loadings .5 to .8: the sd of the fitted omegas is within
    15% of the mean delta-method standard error, and their mean near the population omega."""
    from cfa_tool.language.parser import parse_model
    from cfa_tool.pipeline.continuous import FitOptions, fit_moments, moments_from_rows

    loadings = np.array([0.5, 0.6, 0.7, 0.8, 0.6, 0.5])
    residual = 1 - loadings**2
    population = loadings.sum() ** 2 / (loadings.sum() ** 2 + residual.sum())  # McDonald (1999), numpy
    sigma = np.outer(loadings, loadings) + np.diag(residual)
    names = tuple(f"y{k}" for k in range(1, 7))
    spec = parse_model("factor f: " + ", ".join(names) + "\n")
    options = FitOptions(diagnostics=False, modification_indices=False, reliability=True)
    rng = np.random.default_rng(20261205)
    omegas, errors = [], []
    for _ in range(200):
        rows = rng.multivariate_normal(np.zeros(6), sigma, 300)
        fit = fit_moments(spec, moments_from_rows(rows, names), options)
        [r] = fit.groups[0].reliability
        omegas.append(r.omega)
        errors.append(r.omega_se)
    spread = np.std(omegas, ddof=1)
    assert spread == pytest.approx(np.mean(errors), rel=0.15)
    assert np.mean(omegas) == pytest.approx(population, abs=0.01)


def test_the_json_and_the_table_carry_the_interval(hs_three):
    from cfa_tool.reporting.tables import reliability_table

    table = reliability_table(hs_three)
    at = table.columns.index("Omega 95% CI (delta method)")
    assert table.columns[at - 1] == "Omega"
    for row, r in zip(table.rows, hs_three.groups[0].reliability):
        low, high = delta_interval(r)
        assert row[at] == f"[{low:.3f}, {high:.3f}]".replace("0.", ".")
    assert "Raykov 2002" in str(table.note)
    out = hs_three.to_dict()
    assert all(isinstance(f["omega_se"], float) for f in out["reliability"]["factors"])


def test_an_ordinal_fit_has_no_delta_interval(hs_data):
    import cfa_tool
    from cfa_tool.reporting.tables import reliability_table

    data = hs_data[[f"x{k}" for k in range(1, 10)]].copy()
    for x in data:
        data[x] = np.searchsorted(np.quantile(data[x], [0.25, 0.5, 0.75]), data[x], side="right") + 1
    fit = cfa_tool.fit(MODELS["three factors"], pd.DataFrame(data), ordinal="all")
    assert all(r.omega_se is None for r in fit.groups[0].reliability)
    assert "Omega 95% CI (delta method)" not in reliability_table(fit).columns


def test_the_paragraph_prints_no_interval_that_passes_one(hs_three):
    """An interval that passes 1 (a very reliable short scale) is not printed in the methods paragraph, which would
    give a paper an impossible bound; the table keeps it with the note that sends the reader to the bootstrap."""
    from dataclasses import replace

    from cfa_tool.reporting.paragraph import _delta_brackets

    row = hs_three.groups[0].reliability[1]  # textual, omega .885
    assert _delta_brackets(row).startswith(" [")
    assert _delta_brackets(replace(row, omega=0.97, omega_se=0.02)) == ""  # .97 + 1.96 x .02 = 1.009
