"""The one scaled Cholesky factor of the information (numerics/linalg.scaled_factor) gives what each of its readers
computed from the matrix before: the inverse (the parameters' covariance) and the quadratic forms b' H^-1 b (the
score tests), checked against numpy's general inverse and solve (LAPACK's LU routines, an implementation the
project did not write), on matrices in very different units, as information matrices are."""

from __future__ import annotations

import numpy as np

from cfa_tool.numerics.linalg import inverse_quadratic_forms, scaled_factor, scaled_inverse


def _information(q: int, seed: int) -> np.ndarray:
    rng = np.random.default_rng(seed)
    X = rng.standard_normal((3 * q, q))
    units = np.exp(rng.uniform(-4.0, 4.0, q))  # parameters in units from 0.02 to 55
    return (X.T @ X) * np.outer(units, units)


def test_inverse_from_the_factor_is_numpys_inverse():
    for seed, q in enumerate((1, 5, 24, 80)):
        H = _information(q, seed)
        factor = scaled_factor(H)
        assert factor is not None
        inverse = scaled_inverse(H, factor)
        expected = np.linalg.inv(H)
        assert np.array_equal(inverse, inverse.T)  # exactly symmetric
        scale = np.sqrt(np.outer(np.diag(expected), np.diag(expected)))
        assert np.max(np.abs(inverse - expected) / scale) < 1e-10
        assert np.array_equal(inverse, scaled_inverse(H))  # the same numbers with or without the caller's factor


def test_quadratic_forms_from_the_factor_are_numpys():
    for seed, q in enumerate((3, 24, 80)):
        H = _information(q, seed)
        B = np.random.default_rng(seed + 10).standard_normal((q, 40)) * np.sqrt(np.diag(H))[:, None]
        expected = np.einsum("ij,ij->j", B, np.linalg.solve(H, B))
        forms = inverse_quadratic_forms(H, scaled_factor(H))(B.copy())
        assert np.max(np.abs(forms - expected) / expected) < 1e-10


def test_no_factor_of_a_matrix_that_is_not_positive_definite():
    H = _information(6, 1)
    H[2, 2] = -H[2, 2]
    assert scaled_factor(H) is None
    H = _information(6, 2)
    H[0, 1] = H[1, 0] = np.nan
    assert scaled_factor(H) is None
