"""Linear algebra with Jacobi scaling.

Parameters in very different units (a loading of an item scored in thousands
beside one scored in thousandths) make an information matrix badly scaled but
not badly conditioned; scaling it to unit diagonal first removes that.
"""

from __future__ import annotations

import numpy as np


def _scales(H: np.ndarray) -> np.ndarray:
    return 1.0 / np.sqrt(np.clip(np.abs(np.diag(H)), 1e-300, None))


def scaled_solve(H: np.ndarray, b: np.ndarray) -> np.ndarray:
    """Solve H x = b (b a vector or a matrix of columns)."""
    if H.size == 0:
        return np.array(b, dtype=float, copy=True)
    d = _scales(H)
    dd = d if b.ndim == 1 else d[:, None]
    return dd * np.linalg.solve(H * np.outer(d, d), dd * b)


def scaled_inverse(H: np.ndarray) -> np.ndarray:
    d = _scales(H)
    return np.linalg.inv(H * np.outer(d, d)) * np.outer(d, d)
