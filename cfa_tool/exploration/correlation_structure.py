"""The factor model as a structure for the correlations between items, and its derivatives.

With standardized pattern loadings L (p x m) and factor correlations Phi, the implied
correlation of items i != j is rho_ij = (L Phi L')_ij; the uniquenesses are
1 - diag(L Phi L') and the diagonal is 1.  Treating the correlations, not the
covariances, as the data gives correct standard errors for standardized loadings when
the asymptotic covariance of the correlations is used (Browne 1982; Cudeck 1989).

Parameters are ordered as L row by row (item 1's loadings first), then, for oblique
solutions, the factor correlations phi_kl (k > l) in ``numpy.tril_indices(m, -1)``
order.  Derivatives (for the pair a = (i, j)):

    d rho_ij / d l_rk = delta_ir (L Phi)_jk + delta_jr (L Phi)_ik,
    d rho_ij / d phi_kl = l_ik l_jl + l_il l_jk.
"""

from __future__ import annotations

import numpy as np


def pairs(p: int) -> tuple[np.ndarray, np.ndarray]:
    """Rows and columns (i > j) of the item pairs, in the order used for every pair vector."""
    return np.tril_indices(p, -1)


def parameter_count(p: int, m: int, oblique: bool) -> int:
    return p * m + (m * (m - 1) // 2 if oblique else 0)


def unpack(theta: np.ndarray, p: int, m: int, oblique: bool) -> tuple[np.ndarray, np.ndarray]:
    """(L, Phi) from the parameter vector."""
    L = theta[: p * m].reshape(p, m)
    Phi = np.eye(m)
    if oblique and m > 1:
        k, l = np.tril_indices(m, -1)
        Phi[k, l] = Phi[l, k] = theta[p * m:]
    return L, Phi


def pack(L: np.ndarray, Phi: np.ndarray, oblique: bool) -> np.ndarray:
    parts = [np.asarray(L, dtype=float).ravel()]
    if oblique and L.shape[1] > 1:
        parts.append(Phi[np.tril_indices(L.shape[1], -1)])
    return np.concatenate(parts)


def jacobian(L: np.ndarray, Phi: np.ndarray, oblique: bool) -> np.ndarray:
    """d rho / d theta' for the pairs (rows) and parameters (columns)."""
    p, m = L.shape
    i, j = pairs(p)
    n_pairs = len(i)
    delta = np.zeros((n_pairs, parameter_count(p, m, oblique)))
    A = L @ Phi
    rows = np.arange(n_pairs)[:, None]
    factors = np.arange(m)[None, :]
    delta[rows, i[:, None] * m + factors] = A[j]
    delta[rows, j[:, None] * m + factors] = A[i]
    if oblique and m > 1:
        k, l = np.tril_indices(m, -1)
        delta[:, p * m:] = L[i][:, k] * L[j][:, l] + L[i][:, l] * L[j][:, k]
    return delta


def weighted(delta: np.ndarray, W: np.ndarray) -> np.ndarray:
    """V delta for the maximum-likelihood weight of the pairs, V_ab = W_ik W_jl + W_il W_jk with
    W the inverse implied correlation matrix (the second-order term of the ML discrepancy,
    F ~ (r - rho)' V (r - rho); Browne 1974), computed as the pairs of W X W for each column X."""
    p = len(W)
    i, j = pairs(p)
    X = np.zeros((delta.shape[1], p, p))
    X[:, i, j] = delta.T
    X += X.transpose(0, 2, 1)
    Y = W @ X @ W
    return np.ascontiguousarray(Y[:, i, j].T)


def weight_matrix(W: np.ndarray) -> np.ndarray:
    """The dense maximum-likelihood weight V of the pairs (see ``weighted``)."""
    i, j = pairs(len(W))
    return W[i][:, i] * W[j][:, j] + W[i][:, j] * W[j][:, i]
