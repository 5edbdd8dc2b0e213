"""Small dense linear algebra: positive-definite factorisations, log-determinants, and solves and inverses with
Jacobi scaling, through numpy's LAPACK kernels.

numpy rather than scipy's direct LAPACK wrappers: importing scipy.linalg costs about 80 ms of every start of the
command (bench/cold_start.py).  A default fit makes a few dozen factorisations, inverses and solves of small matrices,
and most of the cost of numpy.linalg's functions at these sizes is not LAPACK's: above all the np.errstate each sets
up around its kernel at every call (its floating-point settings: a kernel that fails raises LinAlgError through a
callback; about 20,000 of the 36,000 instructions of a 9 x 9 Cholesky factorisation, counted by valgrind).  Here the
same kernels (``numpy.linalg._umath_linalg``, which estimation/stacked.py calls for stacks of matrices too) are
called on the float arrays the package makes, under the same settings, made once (``_LINALG_SETTINGS``, numpy's
context variable of floating-point settings set and reset around the call as np.errstate does): the same numbers
and the same LinAlgError where a matrix is not positive definite or is singular, in about half the instructions.
Neither is public API: a numpy without them takes numpy.linalg's functions (``_KERNELS`` None; a test compares both
routes).  A matrix that is not positive definite is never shown as a traceback.

Parameters in very different units (a loading of an item scored in thousands
beside one scored in thousandths) make an information matrix badly scaled but
not badly conditioned; scaling it to unit diagonal first removes that.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from functools import lru_cache

import numpy as np


def _raise_not_positive_definite(error, flag):
    raise np.linalg.LinAlgError("Matrix is not positive definite")


def _raise_singular(error, flag):
    raise np.linalg.LinAlgError("Singular matrix")


def _raise_not_converged(error, flag):
    raise np.linalg.LinAlgError("Eigenvalues did not converge")


try:  # numpy's LAPACK kernels and its settings of floating-point errors (see the module's docstring)
    from numpy._core._ufunc_config import _extobj_contextvar, _make_extobj
    from numpy.linalg import _umath_linalg as _KERNELS

    #: numpy.linalg's settings around its kernels (numpy/linalg/_linalg.py): invalid, which a failing kernel sets,
    #: calls the callback that raises LinAlgError; overflow, division by zero and underflow ignored
    _LINALG_SETTINGS = {
        message: _make_extobj(call=callback, invalid="call", over="ignore", divide="ignore", under="ignore")
        for message, callback in (("positive definite", _raise_not_positive_definite),
                                  ("singular", _raise_singular), ("eigenvalues", _raise_not_converged))}
except (ImportError, AttributeError, TypeError):  # pragma: no cover - depends on the numpy installed
    _KERNELS = None

#: the kernels for stacks of matrices too (estimation/stacked.py), imported here once: None without them
LAPACK_KERNELS = _KERNELS


def _kernel(kernel, settings: str, *arrays: np.ndarray, signature: str) -> np.ndarray:
    """``kernel`` of float64 ``arrays`` under numpy.linalg's floating-point settings (``settings``: which LinAlgError
    a failure raises)."""
    token = _extobj_contextvar.set(_LINALG_SETTINGS[settings])
    try:
        return kernel(*arrays, signature=signature)
    finally:
        _extobj_contextvar.reset(token)


def _lower_factor(A: np.ndarray) -> np.ndarray | None:
    """np.linalg.cholesky(A): the lower Cholesky factor of a symmetric matrix (its lower triangle read), or None when
    it is not positive definite."""
    try:
        if _KERNELS is None:
            return np.linalg.cholesky(A)
        return _kernel(_KERNELS.cholesky_lo, "positive definite", A, signature="d->d")
    except np.linalg.LinAlgError:
        return None


def _inverse(A: np.ndarray) -> np.ndarray:
    """np.linalg.inv(A): LinAlgError where A is singular."""
    if _KERNELS is None:
        return np.linalg.inv(A)
    return _kernel(_KERNELS.inv, "singular", A, signature="d->d")


def _solve(A: np.ndarray, b: np.ndarray) -> np.ndarray:
    """np.linalg.solve(A, b) for a vector or a matrix of columns b: LinAlgError where A is singular."""
    if _KERNELS is None:
        return np.linalg.solve(A, b)
    return _kernel(_KERNELS.solve1 if b.ndim == 1 else _KERNELS.solve, "singular", A, b, signature="dd->d")


def inverse(A: np.ndarray) -> np.ndarray:
    """np.linalg.inv(A) of a float matrix or a stack of them: LinAlgError where one is singular."""
    return _inverse(A)


def solve(A: np.ndarray, b: np.ndarray) -> np.ndarray:
    """np.linalg.solve(A, b) of a float matrix, for a vector or a matrix of columns b: LinAlgError where A is singular."""
    return _solve(A, b)


def symmetric_eigen(A: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """np.linalg.eigh(A) of a symmetric float matrix or a stack of them (the lower triangle read): the eigenvalues in
    ascending order and the eigenvectors as columns; LinAlgError where they do not converge."""
    if _KERNELS is None:
        return tuple(np.linalg.eigh(A))
    return _kernel(_KERNELS.eigh_lo, "eigenvalues", A, signature="d->dd")


def symmetric_eigenvalues(A: np.ndarray) -> np.ndarray:
    """np.linalg.eigvalsh(A) of a symmetric float matrix or a stack of them (the lower triangle read), ascending."""
    if _KERNELS is None:
        return np.linalg.eigvalsh(A)
    return _kernel(_KERNELS.eigvalsh_lo, "eigenvalues", A, signature="d->d")


def cholesky_log_det(A: np.ndarray) -> tuple[np.ndarray, float] | None:
    """(lower Cholesky factor, log|A|) of a symmetric matrix (its lower triangle read), or None when it is not
    positive definite."""
    factor = _lower_factor(A)
    if factor is None:
        return None
    log_det = 2.0 * float(np.log(factor.diagonal()).sum())
    if not math.isfinite(log_det):  # NaN anywhere in A reaches the factor's diagonal
        return None
    return factor, log_det


#: the smallest share of an item's variance that the items before it may leave unexplained in a sample covariance
#: matrix (the squared Cholesky pivot over the diagonal entry) for the matrix to count as of full rank: rounding
#: leaves pivots of about 1e-16 in a matrix of lower rank (a resample of fewer distinct rows than items), which a
#: plain Cholesky factorisation may pass
RANK_TOLERANCE = 1e-12


def full_rank_pivots(factor: np.ndarray, A: np.ndarray) -> np.ndarray | bool:
    """Whether the Cholesky factor(s) ``factor`` of ``A`` (one matrix or a stack) show a matrix of full rank
    (:data:`RANK_TOLERANCE`)."""
    pivots = np.diagonal(factor, axis1=-2, axis2=-1) ** 2
    with np.errstate(divide="ignore", invalid="ignore"):
        return (pivots / np.diagonal(A, axis1=-2, axis2=-1)).min(axis=-1) > RANK_TOLERANCE


def sample_factor(S: np.ndarray) -> tuple[np.ndarray, float] | None:
    """(lower Cholesky factor, log|S|) of a sample covariance matrix, or None when it is not positive definite or
    not of full rank (:func:`full_rank_pivots`): the likelihood's log|S| and the whitened rows of Mardia's tests and
    the case diagnostics read the one factorisation."""
    found = cholesky_log_det(S)
    return None if found is None or not full_rank_pivots(found[0], S) else found


#: a sample_factor made where the moments were computed: (the matrix S it is of, its lower factor, log|S|)
KnownFactor = tuple[np.ndarray, np.ndarray, float]


def sample_factor_of(S: np.ndarray, known: KnownFactor | None) -> tuple[np.ndarray, float] | None:
    """:func:`sample_factor` of S, read from ``known`` when that was made of this very matrix (the same array, not an
    equal one: moments replaced by others carry their own), made otherwise."""
    if known is not None and known[0] is S:
        return known[1], known[2]
    return sample_factor(S)


def log_det_pd(A: np.ndarray) -> float | None:
    """log-determinant of a positive-definite matrix, or None if it is not."""
    found = cholesky_log_det(A)
    return None if found is None else found[1]


#: the largest order whose triangular inverse is numpy's general inverse; larger ones are split in halves
TRIANGULAR_BLOCK = 32


@lru_cache(maxsize=64)
def _above_diagonal(n: int) -> tuple[np.ndarray, np.ndarray]:
    """The rows and columns of an n x n matrix's entries above the diagonal."""
    return np.triu_indices(n, 1)


def triangular_inverse(factor: np.ndarray) -> np.ndarray | None:
    """L^-1 of a lower-triangular L (a Cholesky factor), exactly lower triangular, or None when L is singular (a zero
    on its diagonal, as LAPACK's dtrtri reports it, or singular to working precision).  numpy has no triangular
    inverse: up to :data:`TRIANGULAR_BLOCK` rows its general inverse (LU with row exchanges, which may leave rounding
    above the diagonal, cleared here), larger ones by halves, [[A, 0], [C, B]]^-1 = [[A^-1, 0], [-B^-1 C A^-1, B^-1]],
    so that most of the work is matrix products (the blocked method of LAPACK's dtrtri; Higham 2002, sec. 14.2):
    numpy's general inverse of a large L takes several times as long as LAPACK's triangular one, the halves about as
    long."""
    if not np.all(np.isfinite(factor)) or not np.all(np.diagonal(factor)):
        return None
    return _factor_inverse(factor)


def _factor_inverse(factor: np.ndarray) -> np.ndarray | None:
    """:func:`triangular_inverse` of a factor with a finite, positive diagonal (of :func:`cholesky_log_det`)."""
    try:
        return _triangular_inverse(factor)
    except np.linalg.LinAlgError:
        return None


def _triangular_inverse(factor: np.ndarray) -> np.ndarray:
    n = len(factor)
    if n <= TRIANGULAR_BLOCK:
        inverse = _inverse(factor)
        inverse[_above_diagonal(n)] = 0.0
        return inverse
    half = n // 2
    first, second = _triangular_inverse(factor[:half, :half]), _triangular_inverse(factor[half:, half:])
    inverse = np.zeros(factor.shape)
    inverse[:half, :half] = first
    inverse[half:, half:] = second
    inverse[half:, :half] = -(second @ (factor[half:, :half] @ first))
    return inverse


def inverse_from_triangular(inverse: np.ndarray) -> np.ndarray:
    """L^-T L^-1 from L^-1: the inverse of A = L L', exactly symmetric (numpy's product of a matrix's transpose with
    the matrix itself computes one triangle and mirrors it)."""
    return inverse.T @ inverse


def spd_inverse(A: np.ndarray) -> tuple[np.ndarray, float] | None:
    """(A^-1, log|A|) of a symmetric positive-definite matrix from its Cholesky factor (exactly
    symmetric), or None when A is not positive definite."""
    found = cholesky_log_det(A)
    if found is None:
        return None
    factor, log_det = found
    inverse = _factor_inverse(factor)
    return None if inverse is None else (inverse_from_triangular(inverse), log_det)


def _scales(H: np.ndarray) -> np.ndarray:
    return 1.0 / np.sqrt(np.maximum(np.abs(H.diagonal()), 1e-300))


def scaled_solve(H: np.ndarray, b: np.ndarray, positive_definite: bool = False) -> np.ndarray:
    """Solve H x = b (b a vector or a matrix of columns); with ``positive_definite`` a matrix that
    is not raises LinAlgError (checked by a Cholesky factorisation of the scaled matrix)."""
    if H.size == 0:
        return np.array(b, dtype=float, copy=True)
    d = _scales(H)
    dd = d if b.ndim == 1 else d[:, None]
    scaled = H * (d[:, None] * d)
    if positive_definite and cholesky_log_det(scaled) is None:
        raise np.linalg.LinAlgError("the matrix is not positive definite")
    return dd * _solve(scaled, dd * b)


@dataclass(frozen=True)
class ScaledFactor:
    """A positive-definite H factorised once for everything read from it: with D = diag(``scales``) scaling H to
    unit diagonal, D H D = L L' (Cholesky) and ``inverse`` = L^-1 (lower triangular).  Then H^-1 = D L^-T L^-1 D
    (the route of LAPACK's dpotri: the triangular inverse, then its product with its transpose),
    b' H^-1 b = ||L^-1 D b||^2, and ||L^-1||_F bounds the smallest eigenvalue of D H D (Golub & Van Loan 2013,
    sec. 2.3; the rank check of the information)."""

    scales: np.ndarray
    inverse: np.ndarray

    def inverse_matrix(self) -> np.ndarray:
        """H^-1, exactly symmetric: what :func:`scaled_inverse` gives."""
        return inverse_from_triangular(self.inverse) * (self.scales[:, None] * self.scales)


def scaled_factor(H: np.ndarray) -> ScaledFactor | None:
    """:class:`ScaledFactor` of H, or None when the scaled H is not positive definite (or holds NaN)."""
    if H.size == 0:  # no parameter: the empty factor
        return ScaledFactor(np.zeros(0), np.zeros((0, 0)))
    d = _scales(H)
    found = cholesky_log_det(H * (d[:, None] * d))
    inverse = None if found is None else _factor_inverse(found[0])
    return None if inverse is None else ScaledFactor(d, inverse)


#: rows of L^-1 D per product in :func:`inverse_quadratic_forms` (timed at 135 and 270 parameters, one BLAS thread:
#: 48 rows faster than 16, 32 or 64); fewer than twice as many parameters: one product
FORM_ROWS = 48


def inverse_quadratic_forms(H: np.ndarray | None, factor: ScaledFactor | None = None):
    """A function of B giving b_k' H^-1 b_k for every column b_k of B, from one Cholesky factorisation
    of the Jacobi-scaled H (``factor``, :func:`scaled_factor` of H, when the caller has made it; H itself may then
    be None, as only the factor is read): H = F F' for
    F = D^-1 L, and the forms are the squared column norms of F^-1 B = L^-1 D B (one product with L^-1 D, made
    once; B not scaled first); the general solve when H is not positive definite."""
    if (factor.inverse if H is None else H).size == 0:
        return lambda B: np.zeros(B.shape[1])
    if factor is None:
        factor = scaled_factor(H)
    if factor is None:
        return lambda B: np.einsum("ij,ij->j", B, scaled_solve(H, B))
    inverse = factor.inverse * factor.scales  # F^-1 = L^-1 D: a product per B is faster than a solve
    q = len(inverse)
    if q < 2 * FORM_ROWS:
        def forms(B: np.ndarray) -> np.ndarray:
            X = inverse @ B
            return np.einsum("ij,ij->j", X, X)

        return forms
    # F^-1 is lower triangular: its rows r0..r1 read the rows of B up to r1 only, and the forms are the sums of the
    # squared column norms of these blocks of rows (a quarter fewer products at 135 parameters, a third at 270)
    cuts = [(start, min(q, start + FORM_ROWS)) for start in range(0, q, FORM_ROWS)]

    def triangular_forms(B: np.ndarray) -> np.ndarray:
        total = None
        for start, stop in cuts:
            X = inverse[start:stop, :stop] @ B[:stop]
            part = np.einsum("ij,ij->j", X, X)
            total = part if total is None else total + part
        return total

    return triangular_forms


def scaled_inverse(H: np.ndarray, factor: ScaledFactor | None = None) -> np.ndarray:
    """H^-1 after scaling H to unit diagonal (``factor``: :func:`scaled_factor` of H when the caller has it)."""
    if factor is None:
        factor = scaled_factor(H)
    if factor is not None:
        return factor.inverse_matrix()
    d = _scales(H)
    dd = d[:, None] * d
    return np.linalg.inv(H * dd) * dd


def difference_hessian(gradient, theta: np.ndarray, central: bool = True, base: np.ndarray | None = None,
                       indices: np.ndarray | None = None) -> np.ndarray:
    """Second derivatives by differences of an analytic gradient, over ``indices`` (default all):
    central, or forward from ``base`` (the gradient at theta) when each gradient is expensive."""
    idx = np.arange(len(theta)) if indices is None else indices
    if not central and base is None:
        base = gradient(theta)
    H = np.empty((len(idx), len(idx)))
    for col, k in enumerate(idx):
        h = (1e-5 if central else 1e-6) * max(1.0, abs(theta[k]))
        up = theta.copy()
        up[k] += h
        if central:
            down = theta.copy()
            down[k] -= h
            H[:, col] = (gradient(up)[idx] - gradient(down)[idx]) / (2 * h)
        else:
            H[:, col] = (gradient(up)[idx] - base[idx]) / h
    return 0.5 * (H + H.T)
