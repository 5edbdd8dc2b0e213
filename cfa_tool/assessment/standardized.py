"""Standardized solutions and explained variance.

``standardized_latent``: factors rescaled to unit variance (observed variables
keep their units).  ``standardized``: factors and observed variables both at
unit variance (Bollen 1989, pp. 349-350).  Residual covariances are shown as
residual correlations, theta_ij / sqrt(theta_ii theta_jj).
"""

from __future__ import annotations

import numpy as np

from cfa_tool.model.implied import ModelMatrices


def standardize_entries(mats: ModelMatrices, codes: np.ndarray, rows: np.ndarray, cols: np.ndarray,
                        values: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """(fully standardized, latent-standardized) value of each matrix entry."""
    latent_sd = np.sqrt(np.clip(np.diag(mats.latent_covariance()), 1e-300, None))
    sigma = mats.implied_covariance()
    obs_sd = np.sqrt(np.clip(np.diag(sigma), 1e-300, None))
    theta_sd = np.sqrt(np.abs(np.diag(mats.T)))
    full = np.empty_like(values)
    lat = np.empty_like(values)
    for e, (code, r, c, v) in enumerate(zip(codes, rows, cols, values)):
        if code == 0:  # observed r on factor c
            lat[e] = v * latent_sd[c]
            full[e] = v * latent_sd[c] / obs_sd[r]
        elif code == 1:  # factor r on factor c
            lat[e] = full[e] = v * latent_sd[c] / latent_sd[r]
        elif code == 2:
            lat[e] = full[e] = v / (latent_sd[r] * latent_sd[c])
        elif code == 4:  # intercept of observed r
            lat[e] = v
            full[e] = v / obs_sd[r]
        elif code == 5:  # mean of factor r
            lat[e] = full[e] = v / latent_sd[r]
        elif code == 6:  # a threshold: its item is not known here, so the caller standardizes it
            lat[e] = full[e] = v
        else:
            lat[e] = v
            if r == c:
                full[e] = v / sigma[r, r]
            else:
                den = theta_sd[r] * theta_sd[c]
                full[e] = v / den if den > 0 else np.nan
    return full, lat


def r_squared(mats: ModelMatrices) -> np.ndarray:
    """Share of each indicator's implied variance explained by the factors."""
    sigma = mats.implied_covariance()
    return 1.0 - np.diag(mats.T) / np.diag(sigma)


def latent_correlations(mats: ModelMatrices) -> np.ndarray:
    phi = mats.latent_covariance()
    sd = np.sqrt(np.clip(np.diag(phi), 1e-300, None))
    return phi / np.outer(sd, sd)
