"""Rotation: criteria against their published definitions, gradient projection's stationarity
condition at the optimum, and recovery of known simple structures.

Sources: varimax V = sum_k [p sum_i l_ik^4 - (sum_i l_ik^2)^2] / p^2 (Kaiser 1958, raw form);
quartimin sum_i sum_{k<l} l_ik^2 l_il^2 (Carroll 1953; Jennrich & Sampson 1966); geomin
sum_i (prod_k (l_ik^2 + eps))^(1/m) (Yates 1987; Browne 2001); oblimin with gamma = 0 is
quartimin (Jennrich 1979).  Stationarity: with G = dQ/dT, G - T sym(T'G) = 0 for orthogonal
rotation (Jennrich 2001) and G - T diag(T'G) = 0 for oblique rotation (Jennrich 2002), as in
Bernaards & Jennrich (2005).
"""

from __future__ import annotations

from itertools import permutations

import numpy as np
import pytest

from cfa_tool.errors import OptionError
from cfa_tool.exploration import RotationMethod, RotationSpec, rotate
from cfa_tool.exploration import criteria
from cfa_tool.exploration.rotation import random_orthogonal

RNG = np.random.default_rng(20261202)
UNROTATED = RNG.uniform(-0.6, 0.8, size=(12, 3))  # a general unrotated loading matrix (no simple structure)

@pytest.fixture(autouse=True)
def _one_blas_thread():
    """Small matrices compute with one BLAS thread, as the tool does (cfa_tool.numerics.threads.blas_threads_for)."""
    from cfa_tool.numerics.threads import blas_threads_for

    with blas_threads_for(1):
        yield


def _simple_structure(p_per: int = 4, m: int = 3) -> np.ndarray:
    L = np.zeros((p_per * m, m))
    for k in range(m):
        L[k * p_per:(k + 1) * p_per, k] = np.linspace(0.8, 0.5, p_per)
    return L


def _match(ours: np.ndarray, truth: np.ndarray) -> tuple[np.ndarray, tuple[int, ...], np.ndarray]:
    order = min(permutations(range(truth.shape[1])), key=lambda o: np.abs(np.abs(ours[:, o]) - np.abs(truth)).max())
    matched = ours[:, order]
    signs = np.sign(np.sum(matched * truth, axis=0))
    return matched * signs, order, signs


def test_criteria_follow_their_published_definitions():
    L = UNROTATED
    p, m = L.shape
    L2 = L**2
    kaiser = np.sum(p * np.sum(L2**2, axis=0) - np.sum(L2, axis=0) ** 2) / p**2
    assert criteria.varimax().evaluate(L)[0] == pytest.approx(-p / 4 * kaiser)  # Q = -(p/4) V: the same optimum
    pairs = sum(L2[:, k] * L2[:, l] for k in range(m) for l in range(k + 1, m)).sum()
    assert criteria.oblimin(0.0).evaluate(L)[0] == pytest.approx(pairs / 2)  # Q = quartimin / 2
    eps = 0.01
    assert criteria.geomin(eps).evaluate(L)[0] == pytest.approx(np.sum(np.prod(L2 + eps, axis=1) ** (1 / m)))
    B = np.where(RNG.random(L.shape) < 0.5, 0.0, np.nan)
    assert criteria.target(B).evaluate(L)[0] == pytest.approx(np.nansum((L - B) ** 2))


@pytest.mark.parametrize("criterion", [criteria.varimax(), criteria.oblimin(0.0), criteria.oblimin(-0.5),
                                       criteria.geomin(0.01), criteria.target(np.where(UNROTATED > 0.3, np.nan, 0.0))],
                         ids=lambda c: c.name)
def test_criterion_gradients_match_central_differences(criterion):
    _, gradient = criterion.evaluate(UNROTATED)
    h = 1e-6
    numeric = np.zeros_like(UNROTATED)
    for idx in np.ndindex(UNROTATED.shape):
        up, down = UNROTATED.copy(), UNROTATED.copy()
        up[idx] += h
        down[idx] -= h
        numeric[idx] = (criterion.evaluate(up)[0] - criterion.evaluate(down)[0]) / (2 * h)
    np.testing.assert_allclose(gradient, numeric, atol=1e-7)


SPECS = [
    RotationSpec(RotationMethod.VARIMAX, row_normalization=False),
    RotationSpec(RotationMethod.VARIMAX),
    RotationSpec(RotationMethod.QUARTIMIN),
    RotationSpec(RotationMethod.OBLIMIN, gamma=-0.5),
    RotationSpec(RotationMethod.GEOMIN, random_starts=5),
    RotationSpec(RotationMethod.GEOMIN, oblique=False, random_starts=5),
    RotationSpec(RotationMethod.TARGET, target=np.where(np.arange(36).reshape(12, 3) % 4 == 0, 0.0, np.nan)),
    RotationSpec(RotationMethod.TARGET, oblique=False, target=np.where(np.arange(36).reshape(12, 3) % 4 == 0, 0.0, np.nan)),
]


@pytest.mark.parametrize("spec", SPECS, ids=lambda s: f"{s.method.value}-{s.oblique}-{s.row_normalization}")
def test_gradient_projection_is_stationary_at_the_optimum(spec):
    result = rotate(UNROTATED, spec)
    assert result.converged
    checked = result.spec
    A = UNROTATED
    if checked.row_normalization:
        A = A / np.sqrt(np.sum(A**2, axis=1, keepdims=True))
    M = result.transformation  # reported L = A M
    _, Gq = checked.criterion().evaluate(A @ M)
    if checked.oblique:
        T = np.linalg.inv(M).T  # L = A (T')^-1, T with unit-length columns, Phi = T'T
        np.testing.assert_allclose(np.sum(T**2, axis=0), 1.0, atol=1e-12)
        np.testing.assert_allclose(T.T @ T, result.factor_correlations, atol=1e-12)
        G = -(M.T @ A.T @ Gq @ np.linalg.inv(T)).T  # dQ/dT
        projected = G - T * np.sum(T * G, axis=0)
    else:
        T = M
        np.testing.assert_allclose(T.T @ T, np.eye(3), atol=1e-12)
        G = A.T @ Gq
        S = T.T @ G
        projected = G - T @ (S + S.T) / 2
    assert np.linalg.norm(projected) < 1e-7
    # the rotation leaves the common part of the correlations unchanged
    L, Phi = result.pattern, result.factor_correlations
    np.testing.assert_allclose(L @ Phi @ L.T, UNROTATED @ UNROTATED.T, atol=1e-12)


def test_oblimin_with_gamma_zero_is_quartimin():
    quartimin = rotate(UNROTATED, RotationSpec(RotationMethod.QUARTIMIN))
    oblimin = rotate(UNROTATED, RotationSpec(RotationMethod.OBLIMIN, gamma=0.0))
    np.testing.assert_allclose(oblimin.pattern, quartimin.pattern, atol=1e-8)
    np.testing.assert_allclose(oblimin.factor_correlations, quartimin.factor_correlations, atol=1e-8)


@pytest.mark.parametrize("method", [RotationMethod.VARIMAX, RotationMethod.QUARTIMIN])
def test_orthogonal_simple_structure_is_recovered(method):
    truth = _simple_structure()
    for seed in range(3):
        turned = truth @ random_orthogonal(3, np.random.default_rng(seed))
        result = rotate(turned, RotationSpec(method))
        matched, _, _ = _match(result.pattern, truth)
        np.testing.assert_allclose(matched, truth, atol=1e-7)
        np.testing.assert_allclose(result.factor_correlations, np.eye(3), atol=1e-7)


def test_promax_gives_the_expected_oblique_simple_structure():
    # Hendrickson & White (1964): from varimax towards a powered target; with an exact oblique
    # simple structure each item loads on its own factor, cross-loadings stay small and the factors
    # correlate positively as in the population.
    truth = _simple_structure()
    Phi = np.array([[1.0, 0.4, 0.3], [0.4, 1.0, 0.35], [0.3, 0.35, 1.0]])
    common = truth @ Phi @ truth.T
    values, vectors = np.linalg.eigh(common)
    unrotated = vectors[:, -3:] * np.sqrt(values[-3:])
    result = rotate(unrotated, RotationSpec(RotationMethod.PROMAX))
    matched, order, signs = _match(result.pattern, truth)
    np.testing.assert_array_equal(np.argmax(np.abs(matched), axis=1), np.argmax(truth, axis=1))
    assert np.abs(matched[truth == 0]).max() < 0.1
    np.testing.assert_allclose(np.abs(matched[truth > 0] - truth[truth > 0]).max(), 0.0, atol=0.1)
    phi = result.factor_correlations[np.ix_(order, order)] * np.outer(signs, signs)
    np.testing.assert_allclose(phi, Phi, atol=0.1)
    assert np.all(phi[~np.eye(3, dtype=bool)] > 0.2)
    np.testing.assert_allclose(result.pattern @ result.factor_correlations @ result.pattern.T, common, atol=1e-10)


def test_random_starts_are_seeded_and_counted():
    spec = RotationSpec(RotationMethod.GEOMIN, random_starts=8, seed=4)
    first, again = rotate(UNROTATED, spec), rotate(UNROTATED, spec)
    np.testing.assert_array_equal(first.pattern, again.pattern)
    assert first.starts == 9
    assert 1 <= first.starts_at_best <= 9 and first.distinct_optima >= 1
    # the unrotated start is one of the nine, so the best of nine is at least as good as it alone
    alone = rotate(UNROTATED, RotationSpec(RotationMethod.GEOMIN, random_starts=0))
    assert alone.starts == 1
    assert first.criterion_value <= alone.criterion_value + 1e-12


def test_reported_orientation():
    result = rotate(UNROTATED, RotationSpec(RotationMethod.QUARTIMIN))
    P = result.pattern
    salient = np.abs(P) >= 0.30  # signs: most of each factor's salient loadings positive (then their sum)
    votes, sums = np.sum(np.sign(P) * salient, axis=0), np.sum(P * salient, axis=0)
    assert np.all((votes > 0) | ((votes == 0) & (sums > 0)))
    sums = np.sum(result.pattern**2, axis=0)
    assert np.all(np.diff(sums) <= 0)  # order: by sum of squared loadings, largest first
    np.testing.assert_allclose(result.structure, result.pattern @ result.factor_correlations)


def test_orientation_follows_most_salient_loadings_not_the_sum_of_all():
    # new-user trial: a factor of three positively worded items (-.56 each) and two reverse-worded ones (+.80, +.79),
    # with small cross-loadings that made the sum of all its loadings positive, pointed the way of the two
    vigour = np.array([-0.56, -0.56, -0.56, 0.80, 0.79, 0.07, 0.02, 0.01, 0.14, 0.02, 0.04, 0.04, -0.06, 0.21, 0.16])
    other = np.array([0.13, 0.11, 0.06, 0.00, 0.02, 0.70, 0.66, 0.63, 0.65, 0.78, 0.01, 0.06, 0.00, 0.06, 0.07])
    tie = np.r_[0.50, -0.60, np.full(13, 0.05)]  # one salient each way: their sum (-.10) decides, not all (+.55)
    small = np.r_[np.full(14, 0.05), -0.20]  # none salient: the sum of all (+.50)
    A = np.column_stack([vigour, other, tie, small])
    assert A[:, 0].sum() > 0 and A[:, 2].sum() > 0  # the former rule (the sum of all loadings) kept these two
    result = rotate(A, RotationSpec(RotationMethod.NONE))
    np.testing.assert_array_equal(result.signs, [-1.0, 1.0, -1.0, 1.0])  # by hand, from the rule above
    np.testing.assert_allclose(result.pattern, A * [-1.0, 1.0, -1.0, 1.0])
    np.testing.assert_allclose(result.pattern[:5, 0], [0.56, 0.56, 0.56, -0.80, -0.79])


@pytest.mark.parametrize("spec, words", [
    (RotationSpec(RotationMethod.VARIMAX, oblique=True), "orthogonal rotation"),
    (RotationSpec(RotationMethod.PROMAX, oblique=False), "oblique rotation"),
    (RotationSpec(RotationMethod.GEOMIN, gamma=-0.2), "gamma applies to oblimin"),
    (RotationSpec(RotationMethod.OBLIMIN, gamma=0.5), "0 or below"),
    (RotationSpec(RotationMethod.PROMAX, random_starts=3), "random starts do not apply"),
    (RotationSpec(RotationMethod.TARGET), "needs a target matrix"),
    (RotationSpec(RotationMethod.TARGET, target=np.zeros((3, 3))), "12 x 3"),
    (RotationSpec("spin"), "must be one of"),
])
def test_options_that_cannot_apply_are_errors(spec, words):
    with pytest.raises(OptionError, match=words):
        rotate(UNROTATED, spec)
