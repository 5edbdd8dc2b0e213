"""Standard errors of rotated loadings and factor correlations (the constrained delta method).

Two checks from outside the formulas in rotated_errors.py:

* the delta method done by brute force: the whole estimator (extraction, rotation, orientation)
  as a function of the correlations, differentiated by central differences and combined with the
  asymptotic covariance of the correlations, acov = J Gamma J' / N (the delta method; e.g.
  Bishop, Fienberg & Holland 1975, ch. 14).  At a population matrix, where the model fits
  exactly, this must equal the bordered sandwich of Jennrich (1974) and Browne (1984);
* sampling: over repeated normal samples from a population, the spread of the estimates matches
  the average standard error (what a standard error is).
"""

from __future__ import annotations

import numpy as np
import pytest

from cfa_tool.exploration import (ErrorsUnavailable, ExtractionMethod, RotationMethod, RotationSpec, extract,
                                  from_correlations, from_covariance, loading_errors, rotate)
from cfa_tool.exploration import correlation_structure as cs

POPULATION_L = np.array([[.7, .2, 0], [.6, 0, .1], [.5, .1, 0], [.1, .7, 0], [0, .6, .2], [0, .5, 0],
                         [.2, 0, .6], [0, .1, .7], [0, 0, .5]])
POPULATION_PHI = np.array([[1, .3, .2], [.3, 1, .25], [.2, .25, 1]])
NAMES = tuple(f"y{i}" for i in range(9))

@pytest.fixture(autouse=True)
def _one_blas_thread():
    """Small matrices compute with one BLAS thread, as the tool does (cfa_tool.numerics.threads.blas_threads_for)."""
    from cfa_tool.numerics.threads import blas_threads_for

    with blas_threads_for(1):
        yield


def _population() -> np.ndarray:
    R = POPULATION_L @ POPULATION_PHI @ POPULATION_L.T
    np.fill_diagonal(R, 1.0)
    return R


def _gamma(data) -> np.ndarray:
    """The whole asymptotic covariance of the correlations (small p only): its products with the unit columns."""
    pairs = data.p * (data.p - 1) // 2
    return data.pair_covariance_times(np.eye(pairs))


def _estimate(R, method, spec):
    solution = extract(from_correlations(R, 500, NAMES), 3, method)
    rotated = rotate(solution.loadings, spec)
    return solution, rotated


@pytest.mark.parametrize("method, spec, rtol", [
    (ExtractionMethod.LEAST_SQUARES, RotationSpec(RotationMethod.QUARTIMIN, tolerance=1e-11), 1e-5),
    (ExtractionMethod.LEAST_SQUARES, RotationSpec(RotationMethod.GEOMIN, oblique=False, random_starts=0,
                                                  tolerance=1e-11), 1e-5),
    (ExtractionMethod.LEAST_SQUARES, RotationSpec(RotationMethod.PROMAX, tolerance=1e-11), 1e-5),
    # the profile ML optimum is found to a gradient of about 1e-9, which differences over 1e-5 turn into 1e-4
    (ExtractionMethod.MAXIMUM_LIKELIHOOD, RotationSpec(RotationMethod.VARIMAX, tolerance=1e-11), 1e-3),
    (ExtractionMethod.MAXIMUM_LIKELIHOOD, RotationSpec(RotationMethod.GEOMIN, random_starts=0, tolerance=1e-11), 1e-3),
], ids=["ls-quartimin", "ls-geomin-orthogonal", "ls-promax", "ml-varimax", "ml-geomin"])
def test_bordered_sandwich_equals_the_brute_force_delta_method(method, spec, rtol):
    R = _population()
    data = from_correlations(R, 500, NAMES)
    solution, rotated = _estimate(R, method, spec)
    errors = loading_errors(data, solution, rotated)
    assert errors.unavailable is None
    oblique = rotated.oblique
    i, j = np.tril_indices(9, -1)
    h = 1e-5
    columns = []
    for a in range(len(i)):
        values = []
        for sign in (1, -1):
            moved = R.copy()
            moved[i[a], j[a]] = moved[j[a], i[a]] = R[i[a], j[a]] + sign * h
            _, turned = _estimate(moved, method, spec)
            values.append(cs.pack(turned.pattern, turned.factor_correlations, oblique))
        columns.append((values[0] - values[1]) / (2 * h))
    J = np.column_stack(columns)
    brute = J @ _gamma(data) @ J.T / data.n_obs
    np.testing.assert_allclose(np.sqrt(np.diag(errors.covariance)), np.sqrt(np.diag(brute)), rtol=rtol)
    np.testing.assert_allclose(errors.covariance, brute, atol=rtol * np.abs(brute).max())


def test_standard_errors_match_the_spread_over_samples():
    L0 = np.array([[.75, 0], [.65, .1], [.6, 0], [.55, .15], [0, .7], [.1, .6], [0, .65], [.2, .5]])
    Phi0 = np.array([[1, .35], [.35, 1]])
    sigma = L0 @ Phi0 @ L0.T
    np.fill_diagonal(sigma, 1.0)
    names = tuple(f"v{i}" for i in range(8))
    rng = np.random.default_rng(7)
    n, reps = 400, 200
    estimates, errors = [], []
    spec = RotationSpec(RotationMethod.QUARTIMIN)
    chol = np.linalg.cholesky(sigma)
    for _ in range(reps):
        X = rng.standard_normal((n, 8)) @ chol.T
        data = from_covariance(np.cov(X.T, bias=True), n, names)
        solution = extract(data, 2)
        rotated = rotate(solution.loadings, spec)
        matched = rotated.pattern if rotated.pattern[0, 0] > rotated.pattern[0, 1] else rotated.pattern[:, ::-1]
        estimates.append(np.append(matched.ravel(), rotated.factor_correlations[0, 1]))
        se = loading_errors(data, solution, rotated)
        se_pattern = se.pattern if rotated.pattern[0, 0] > rotated.pattern[0, 1] else se.pattern[:, ::-1]
        errors.append(np.append(se_pattern.ravel(), se.factor_correlations[0, 1]))
    spread = np.std(estimates, axis=0, ddof=1)
    mean_se = np.mean(errors, axis=0)
    ratio = mean_se / spread
    # with 200 samples the spread itself is uncertain by about 1/sqrt(2 * 199) = 5%
    assert abs(np.mean(ratio) - 1) < 0.05
    assert np.all(np.abs(ratio - 1) < 0.2)


def test_one_pair_has_the_textbook_variance():
    # the asymptotic variance of r for normal data is (1 - rho^2)^2 / N (Pearson & Filon 1898; Fisher 1915)
    rho = 0.6
    R = np.array([[1, rho, 0.3], [rho, 1, 0.2], [0.3, 0.2, 1]])
    gamma = _gamma(from_correlations(R, 100, ("a", "b", "c")))
    assert gamma[0, 0] == pytest.approx((1 - rho**2) ** 2)


def test_normal_theory_gamma_agrees_with_the_distribution_free_one():
    # the influence-function (distribution-free) asymptotic covariance of Pearson correlations in
    # cfa_tool.data.polychoric (continuous items), an independent formula, converges to the normal one
    import pandas as pd

    from cfa_tool.data.polychoric import ordinal_moments

    R = np.array([[1, .5, .3, .2], [.5, 1, .4, .1], [.3, .4, 1, .3], [.2, .1, .3, 1]])
    X = np.random.default_rng(3).multivariate_normal(np.zeros(4), R, size=40_000)
    names = ("a", "b", "c", "d")
    frame = pd.DataFrame(X, columns=names)
    free = ordinal_moments(frame, names, "sim", continuous=frozenset(names)).gamma
    normal = _gamma(from_covariance(np.cov(X.T, bias=True), len(X), names))
    np.testing.assert_allclose(free, normal, atol=0.03)


def test_no_standard_errors_where_they_would_mislead():
    # a Heywood case: one factor, three items, with r12 r13 / r23 = 1.4 > 1 (lambda_1^2 of the exact fit)
    R = np.array([[1, .8, .7], [.8, 1, .4], [.7, .4, 1]])
    data = from_correlations(R, 200, ("a", "b", "c"))
    solution = extract(data, 1)
    assert solution.at_bound == ("a",)
    errors = loading_errors(data, solution, rotate(solution.loadings))
    assert errors.unavailable is ErrorsUnavailable.UNIQUENESS_AT_BOUND and np.isnan(errors.pattern).all()
    # unrotated loadings of several factors have an arbitrary orientation
    data = from_correlations(_population(), 500, NAMES)
    solution = extract(data, 3)
    errors = loading_errors(data, solution, rotate(solution.loadings, RotationSpec(RotationMethod.NONE)))
    assert errors.unavailable is ErrorsUnavailable.UNROTATED_SEVERAL_FACTORS
