"""Linear algebra with Jacobi scaling.

Parameters in very different units (a loading of an item scored in thousands
beside one scored in thousandths) make an information matrix badly scaled but
not badly conditioned; scaling it to unit diagonal first removes that.
"""

from __future__ import annotations

import numpy as np


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
    if positive_definite:
        np.linalg.cholesky(scaled)
    return dd * np.linalg.solve(scaled, dd * b)


def scaled_inverse(H: np.ndarray) -> np.ndarray:
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
