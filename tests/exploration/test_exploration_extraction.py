"""Extraction: least squares against its first-order conditions and a general-purpose optimiser,
Heywood cases, input checks, and ordinal items end to end.

Sources: at the unweighted least-squares (minimum residual) solution with free uniquenesses the
residual matrix has a zero diagonal and is orthogonal to the loadings, (R - LL' - Psi) L = 0
(Harman & Jones 1966; Harman 1976); scipy.optimize minimising ||R - LL' - Psi||^2 over L and
psi together is an independent route to the same minimum.  With normal theory the Satorra-Bentler
(1994) scaling factor of the ML statistic is 1 when the model holds (the statistic is then
chi-square); N F of a solution fitted to the population matrix is 0.
"""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

from cfa_tool.errors import DataError, OptionError
from cfa_tool.exploration import (CorrelationKind, ExploreSettings, ExtractionMethod, FitStatistic,
                                  explore_correlations, extract, from_correlations, from_ordinal_moments)
from cfa_tool.exploration.extraction import scaling_factor
from cfa_tool.language.parser import parse_model
from tests.conftest import simulate_cfa


@pytest.fixture(autouse=True)
def _one_blas_thread():
    """Small matrices compute with one BLAS thread, as the tool does (cfa_tool.numerics.threads.blas_threads_for)."""
    from cfa_tool.numerics.threads import blas_threads_for

    with blas_threads_for(1):
        yield


L0 = np.array([[.7, .1], [.6, 0], [.5, .2], [.65, 0], [0, .7], [.1, .6], [0, .55], [.2, .5]])
NAMES = tuple(f"y{i}" for i in range(8))


def _sample_R(seed=1, n=400):
    frame = simulate_cfa(L0, np.array([[1, .3], [.3, 1]]), np.eye(8) * 0.5, n=n, seed=seed)
    return np.corrcoef(frame.to_numpy(float).T)


def test_least_squares_first_order_conditions_and_direct_minimum():
    from scipy.optimize import minimize

    R = _sample_R()
    found = extract(from_correlations(R, 400, NAMES), 2, ExtractionMethod.LEAST_SQUARES)
    L, psi = found.loadings, found.uniquenesses
    residual = R - L @ L.T - np.diag(psi)
    np.testing.assert_allclose(np.diag(residual), 0.0, atol=1e-8)
    np.testing.assert_allclose(residual @ L, 0.0, atol=1e-8)

    def loss(x):
        Lx, px = x[:16].reshape(8, 2), x[16:]
        E = R - Lx @ Lx.T - np.diag(px)
        return 0.5 * np.sum(E * E)

    direct = minimize(loss, np.concatenate([np.full(16, 0.4), np.full(8, 0.5)]), method="BFGS",
                      options={"gtol": 1e-12, "maxiter": 10_000})
    assert found.fit.discrepancy == pytest.approx(direct.fun, rel=1e-6, abs=1e-12)
    Ld = direct.x[:16].reshape(8, 2)
    np.testing.assert_allclose(Ld @ Ld.T, L @ L.T, atol=1e-5)  # the same common part (loadings up to rotation)


def test_heywood_case_is_detected_and_bounded():
    # one factor, three items: the exact fit needs lambda_1^2 = r12 r13 / r23 = .56 / .4 = 1.4 > 1
    R = np.array([[1, .8, .7], [.8, 1, .4], [.7, .4, 1]])
    for method in ExtractionMethod:
        found = extract(from_correlations(R, 200, ("a", "b", "c")), 1, method)
        assert found.at_bound == ("a",)
        assert found.uniquenesses[0] == pytest.approx(0.005)  # the lower bound (common practice)


def test_population_matrix_fits_exactly_and_normal_scaling_is_one():
    R = L0 @ np.array([[1, .3], [.3, 1]]) @ L0.T
    np.fill_diagonal(R, 1.0)
    data = from_correlations(R, 300, NAMES)
    found = extract(data, 2)
    assert found.fit.chi_square == pytest.approx(0.0, abs=1e-8)
    W = np.linalg.inv(found.implied)
    assert scaling_factor(data, found.loadings, W, found.fit.df) == pytest.approx(1.0, rel=1e-6)


def test_input_and_option_errors():
    R = _sample_R()
    with pytest.raises(DataError, match="not positive definite"):
        from_correlations(np.ones((4, 4)), 100, ("a", "b", "c", "d"))
    with pytest.raises(DataError, match="more rows"):
        from_correlations(R, 8, NAMES)
    with pytest.raises(OptionError, match="at most 4"):  # (8 - 5)^2 < 8 + 5: Ledermann (1937)
        extract(from_correlations(R, 400, NAMES), 5)
    with pytest.raises(OptionError, match="extraction must be one of"):
        explore_correlations(from_correlations(R, 400, NAMES), ExploreSettings(factors=2, extraction="centroid"))


def test_ordinal_items_end_to_end():
    from cfa_tool.data.polychoric import ordinal_moments

    frame = simulate_cfa(L0, np.array([[1, .3], [.3, 1]]), np.eye(8) * 0.5, n=600, seed=5)
    cuts = [-0.8, 0.0, 0.7]
    ordinal = pd.DataFrame({c: np.digitize(frame[c], cuts) + 1 for c in frame.columns})
    data = from_ordinal_moments(ordinal_moments(ordinal, tuple(ordinal.columns), "ordinal.csv"))
    assert data.kind is CorrelationKind.POLYCHORIC and data.gamma is not None
    found = explore_correlations(data, ExploreSettings(factors=2))
    fit = found.solution.fit
    assert fit.statistic is FitStatistic.MEAN_SCALED
    assert 0.5 < fit.scaling_factor < 3 and np.isnan(fit.bic)
    assert found.errors.unavailable is None and not found.errors.normal_theory
    spec = parse_model(found.draft.text)
    assert {name.text for name in spec.ordinal} == set(spec.observed_names)


def test_ordinal_items_with_gaps_keep_every_answer_as_fit_does():
    # explore computed polychoric correlations from complete rows only (89 of 450 rows in a new user's half);
    # it now uses each pair's rows, as fit does: the same correlations as fit's sample correlations
    import cfa_tool

    frame = simulate_cfa(L0, np.array([[1, .3], [.3, 1]]), np.eye(8) * 0.5, n=500, seed=6)
    ordinal = pd.DataFrame({c: np.digitize(frame[c], [-0.8, 0.0, 0.7]) + 1.0 for c in frame.columns})
    rng = np.random.default_rng(2)
    ordinal = ordinal.mask(rng.random(ordinal.shape) < 0.1)
    found = cfa_tool.explore(ordinal, factors=2, ordinal="all", replications=5)
    assert found.exploration.data.n_obs == int(ordinal.notna().any(axis=1).sum())
    model = "factor f: " + ", ".join(ordinal.columns) + "\n"
    fitted = cfa_tool.fit(model, ordinal, ordinal="all")
    assert np.allclose(found.exploration.data.correlations, fitted.groups[0].sample_covariance, atol=1e-10)
