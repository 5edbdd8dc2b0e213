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


#: the most bytes a block of the pairs' symmetric matrices takes (:func:`pair_matrix_map`): at 200 items a block of
#: 100 columns, so that no route makes one p x p matrix per column at once (a thousand at 200 items and 5 factors)
BLOCK_BYTES = 1 << 25


def pair_matrix_map(X: np.ndarray, p: int, function) -> np.ndarray:
    """For each column x of ``X`` (pairs x columns), the pairs of ``function(S)``, S the symmetric p x p matrix with
    S_ij = S_ji = x_ij off the diagonal and zeros on it; ``function`` maps a stack (b, p, p) of them to a stack of
    symmetric matrices.  A block of columns at a time (:data:`BLOCK_BYTES`)."""
    i, j = pairs(p)
    columns = X.shape[1]
    out = np.empty((len(i), columns))
    step = max(1, BLOCK_BYTES // (8 * p * p))
    for start in range(0, columns, step):
        block = slice(start, min(columns, start + step))
        S = np.zeros((block.stop - start, p, p))
        S[:, i, j] = X[:, block].T
        S += S.transpose(0, 2, 1)
        out[:, block] = function(S)[:, i, j].T
    return out


def weighted(delta: np.ndarray, W: np.ndarray) -> np.ndarray:
    """V delta for the maximum-likelihood weight of the pairs, V_ab = W_ik W_jl + W_il W_jk with
    W the inverse implied correlation matrix (the second-order term of the ML discrepancy,
    F ~ (r - rho)' V (r - rho); Browne 1974), computed as the pairs of W X W for each column X."""
    return pair_matrix_map(delta, len(W), lambda S: W @ S @ W)


def weight_trace(W: np.ndarray, gamma) -> float:
    """tr(V Gamma) = sum_ab V_ab Gamma_ab for the weight V of :func:`weighted`, V made a block of its rows at a time
    (:data:`BLOCK_BYTES`), never whole (at 125 items it is 7,750 x 7,750, 480 MB).  ``gamma``: the (symmetric)
    matrix of the pairs, given (polychoric input), or a function X -> Gamma X (normal theory, whose Gamma is never
    made: the diagonal blocks of Gamma V, p^3 a pair; for direct calls, the workflows scale polychoric input only)."""
    i, j = pairs(len(W))
    n = len(i)
    step = max(1, BLOCK_BYTES // (8 * max(n, 1)))
    total = 0.0
    for start in range(0, n, step):
        a = slice(start, min(n, start + step))
        V = W[i[a]][:, i] * W[j[a]][:, j] + W[i[a]][:, j] * W[j[a]][:, i]  # rows a of V
        if callable(gamma):
            total += float(np.trace(gamma(V.T)[a]))  # (Gamma V)_aa, V symmetric
        else:
            total += float(np.vdot(V, gamma[a]))
    return total
