"""Residual covariance and correlation matrices (sample minus implied)."""

from __future__ import annotations

import numpy as np


def covariance_residuals(S: np.ndarray, sigma: np.ndarray) -> np.ndarray:
    return S - sigma


def correlation_residuals(S: np.ndarray, sigma: np.ndarray) -> np.ndarray:
    """r_ij - rho_ij: each matrix standardized by its own diagonal (Bollen 1989, p. 258)."""
    s_sd = np.sqrt(np.diag(S))
    m_sd = np.sqrt(np.diag(sigma))
    return S / np.outer(s_sd, s_sd) - sigma / np.outer(m_sd, m_sd)
