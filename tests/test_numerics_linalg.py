"""numerics/linalg.py through numpy.linalg keeps each function's contract: the factor, log-determinant, inverse and
solves checked against scipy.linalg (its own LAPACK wrappers: Cholesky, the general inverse and solve, an
implementation the project did not write), None or LinAlgError where the matrix is not positive definite (or holds
NaN), and the whitened rows of Mardia's tests against scipy's triangular solve."""

from __future__ import annotations

import warnings

import numpy as np
import pytest
from scipy import linalg as reference

from cfa_tool.assessment.normality import whitened_rows
from cfa_tool.numerics.linalg import (FORM_ROWS, TRIANGULAR_BLOCK, cholesky_log_det, inverse_quadratic_forms, log_det_pd,
                                      sample_factor, scaled_factor, scaled_solve, spd_inverse, triangular_inverse)


def _positive_definite(p: int, seed: int) -> np.ndarray:
    rng = np.random.default_rng(seed)
    X = rng.standard_normal((2 * p, p))
    units = np.exp(rng.uniform(-3.0, 3.0, p))  # entries in very different units, as information matrices have
    return (X.T @ X) * np.outer(units, units)


def _indefinite(p: int, seed: int) -> np.ndarray:
    A = _positive_definite(p, seed)
    A[1, 1] = -A[1, 1]
    return A


@pytest.mark.parametrize("p", [1, 3, 9, 30, 90])
def test_factor_and_log_determinant_are_scipys(p):
    A = _positive_definite(p, p)
    factor, log_det = cholesky_log_det(A)
    assert np.allclose(factor, reference.cholesky(A, lower=True), rtol=1e-12, atol=1e-12 * np.abs(factor).max())
    sign, expected = np.linalg.slogdet(A)  # LU, another route than the factor's diagonal
    assert sign == 1 and log_det == pytest.approx(expected, rel=1e-10, abs=1e-10)
    assert log_det_pd(A) == log_det
    above = A.copy()
    above[np.triu_indices(p, 1)] = 1e300  # only the lower triangle is read, as before
    assert np.array_equal(cholesky_log_det(above)[0], factor)


def test_no_factor_of_a_matrix_that_is_not_positive_definite():
    assert cholesky_log_det(_indefinite(5, 1)) is None
    assert spd_inverse(_indefinite(5, 1)) is None
    assert log_det_pd(_indefinite(5, 1)) is None
    with_nan = _positive_definite(5, 2)
    with_nan[3, 2] = with_nan[2, 3] = np.nan
    assert cholesky_log_det(with_nan) is None and spd_inverse(with_nan) is None
    with_nan[3, 3] = np.nan
    assert cholesky_log_det(with_nan) is None
    # a sample covariance matrix of rank 2 (three rows of three items, centred): not of full rank
    rows = np.array([[1.0, 2.0, 3.0], [2.0, 1.0, 0.0], [0.0, 3.0, 6.0]])
    assert sample_factor(np.cov(rows.T, bias=True)) is None


@pytest.mark.parametrize("p", [1, 9, 30, 90])
def test_inverse_is_scipys_and_exactly_symmetric(p):
    A = _positive_definite(p, 10 + p)
    inverse, log_det = spd_inverse(A)
    assert np.array_equal(inverse, inverse.T)
    expected = reference.inv(A)
    scale = np.sqrt(np.outer(np.diag(expected), np.diag(expected)))
    assert np.max(np.abs(inverse - expected) / scale) < 1e-8
    assert log_det == cholesky_log_det(A)[1]


@pytest.mark.parametrize("p", [2, 9, 60])
def test_scaled_solves_are_scipys(p):
    A = _positive_definite(p, 20 + p)
    b = np.random.default_rng(p).standard_normal((p, 3)) * np.sqrt(np.diag(A))[:, None]
    expected = reference.solve(A, b, assume_a="pos")
    for rhs, want in ((b, expected), (b[:, 0], expected[:, 0])):
        found = scaled_solve(A, rhs, positive_definite=True)
        assert np.allclose(found, want, rtol=1e-8, atol=0)
    indefinite = _indefinite(p, 30 + p) if p > 2 else np.array([[1.0, 2.0], [2.0, 1.0]])
    with pytest.raises(np.linalg.LinAlgError):
        scaled_solve(indefinite, b, positive_definite=True)
    assert np.allclose(scaled_solve(indefinite, b), reference.solve(indefinite, b), rtol=1e-8, atol=1e-10)
    assert scaled_solve(np.zeros((0, 0)), np.zeros(0)).shape == (0,)


@pytest.mark.parametrize("p", [1, 7, TRIANGULAR_BLOCK, TRIANGULAR_BLOCK + 1, 3 * TRIANGULAR_BLOCK + 5])
def test_triangular_inverse_is_scipys(p):
    """Up to TRIANGULAR_BLOCK rows one general inverse, beyond it inverses of halves joined (also of halves of
    halves)."""
    L = reference.cholesky(_positive_definite(p, 50 + p), lower=True)
    inverse = triangular_inverse(L)
    assert np.array_equal(inverse, np.tril(inverse))
    expected = reference.solve_triangular(L, np.eye(p), lower=True)
    assert np.max(np.abs(inverse - expected)) <= 1e-12 * np.max(np.abs(expected))
    assert np.array_equal(triangular_inverse(np.asfortranarray(L)), inverse)  # a factor in either memory order
    singular = L.copy()
    singular[p // 2, p // 2] = 0.0
    assert triangular_inverse(singular) is None


def test_the_factors_inverse_is_lower_triangular():
    for p in (1, 9, 60):
        H = _positive_definite(p, 40 + p)
        factor = scaled_factor(H)
        assert np.array_equal(factor.inverse, np.tril(factor.inverse))
        scaled = H * np.outer(factor.scales, factor.scales)
        L = reference.cholesky(scaled, lower=True)
        assert np.allclose(factor.inverse @ L, np.eye(p), atol=1e-10)


@pytest.mark.parametrize("q", [1, 9, 2 * FORM_ROWS - 1, 2 * FORM_ROWS, 135, 270])
def test_inverse_quadratic_forms_are_scipys(q):
    """b' H^-1 b for each column b, by one product with L^-1 D (by blocks of its rows from 2 FORM_ROWS parameters on,
    where L^-1 is lower triangular), against scipy's solve with H (the definition of the form)."""
    H = _positive_definite(q, 70 + q)
    B = np.random.default_rng(q).standard_normal((q, 300)) * np.sqrt(np.diag(H))[:, None]
    expected = np.einsum("ij,ij->j", B, reference.solve(H, B, assume_a="pos"))
    for factor in (None, scaled_factor(H)):
        assert np.allclose(inverse_quadratic_forms(H, factor)(B), expected, rtol=1e-10, atol=0.0)


def test_whitened_rows_are_scipys():
    rng = np.random.default_rng(7)
    rows = rng.standard_normal((200, 12)) @ rng.standard_normal((12, 12)) + 5.0
    found = whitened_rows(rows)
    Z = rows - rows.mean(axis=0)
    S = Z.T @ Z / len(rows)
    expected = reference.solve_triangular(reference.cholesky(S, lower=True), Z.T, lower=True).T
    assert np.allclose(found.rows, expected, rtol=1e-9, atol=1e-9)
    assert found.log_det == pytest.approx(np.linalg.slogdet(S)[1], rel=1e-10)
    assert np.allclose(found.rows.T @ found.rows / len(rows), np.eye(12), atol=1e-9)
    # the factor of S the likelihood made (sample_factor), given: the same rows, not factorised again
    given = whitened_rows(rows, (rows.mean(axis=0), S), sample_factor(S))
    assert np.array_equal(given.rows, whitened_rows(rows, (rows.mean(axis=0), S)).rows)
    assert given.log_det == found.log_det
    with pytest.raises(np.linalg.LinAlgError):  # a covariance matrix that is not positive definite: refused
        whitened_rows(rows, (rows.mean(axis=0), _indefinite(12, 3)))


def test_numpys_kernels_called_directly_give_what_numpy_linalg_gives(monkeypatch):
    """The factorisations, inverses and solves call numpy's LAPACK kernels under numpy.linalg's floating-point
    settings made once (numerics/linalg.py): the same numbers to the last bit and the same verdicts as numpy.linalg's
    public functions (the route of a numpy without those kernels), no warning where a matrix is not positive definite
    or is singular, whatever settings the caller has, and the caller's settings as they were afterwards."""
    from cfa_tool.numerics import linalg

    assert linalg._KERNELS is not None  # the numpy the tests run with has them

    def results():
        out = []
        for p in (1, 3, 9, 40):
            A = _positive_definite(p, 10 + p)
            b = np.arange(1.0, p + 1.0)
            factor = scaled_factor(A)
            out += [cholesky_log_det(A), spd_inverse(A), scaled_solve(A, b), scaled_solve(A, np.outer(b, b[:2])),
                    scaled_solve(A, b, positive_definite=True), factor.scales, factor.inverse]
            # the start values' routes (model/starts.py): a general solve, an inverse of a stack, eigen-decompositions
            stack = np.stack([A, A + np.eye(p)])
            out += [linalg.solve(A, np.outer(b, b[:2])), linalg.inverse(stack), linalg.symmetric_eigen(stack),
                    linalg.symmetric_eigenvalues(A)]
        bad = _indefinite(5, 3)
        out += [cholesky_log_det(bad), spd_inverse(bad), scaled_factor(bad), cholesky_log_det(np.full((3, 3), np.nan))]
        for singular, positive_definite in ((np.ones((3, 3)), False), (bad, True)):
            with pytest.raises(np.linalg.LinAlgError):
                scaled_solve(singular, np.ones(3), positive_definite=positive_definite)
        for refused in (lambda: linalg.inverse(np.ones((3, 3))), lambda: linalg.solve(np.ones((3, 3)), np.ones((3, 2))),
                        lambda: linalg.symmetric_eigen(np.full((3, 3), np.nan))):
            with pytest.raises(np.linalg.LinAlgError):
                refused()
        return out

    before = np.geterr()
    with np.errstate(all="raise"), warnings.catch_warnings():  # a caller's settings change nothing inside
        warnings.simplefilter("error")
        direct = results()
    assert np.geterr() == before
    monkeypatch.setattr(linalg, "_KERNELS", None)
    public = results()
    assert len(direct) == len(public)
    for mine, theirs in zip(direct, public):
        if theirs is None:
            assert mine is None
        elif isinstance(theirs, tuple):
            assert all(np.array_equal(m, t) for m, t in zip(mine, theirs))
        else:
            assert np.array_equal(mine, theirs)
