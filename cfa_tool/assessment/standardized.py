"""Standardized solutions and explained variance.

``standardized_factors_only``: factors rescaled to unit variance (observed variables
keep their units).  ``standardized``: factors and observed variables both at
unit variance (Bollen 1989, pp. 349-350).  Residual covariances are shown as
residual correlations, theta_ij / sqrt(theta_ii theta_jj).
"""

from __future__ import annotations

import numpy as np

from cfa_tool.model.implied import ModelMatrices


def standardize_entries(mats: ModelMatrices, codes: np.ndarray, rows: np.ndarray, cols: np.ndarray,
                        values: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """(fully standardized, latent-standardized) value of each matrix entry; with stacked matrices and
    values (a leading axis of replications), stacked results."""
    latent_sd = np.sqrt(np.clip(np.diagonal(mats.latent_covariance(), axis1=-2, axis2=-1), 1e-300, None))
    sigma = mats.implied_covariance()
    obs_sd = np.sqrt(np.clip(np.diagonal(sigma, axis1=-2, axis2=-1), 1e-300, None))
    theta_sd = np.sqrt(np.abs(np.diagonal(mats.T, axis1=-2, axis2=-1)))
    lat = np.array(values, dtype=float)  # thresholds stay as they are: their item is not known here
    full = lat.copy()
    k = codes == 0  # observed r on factor c
    lat[..., k] = values[..., k] * latent_sd[..., cols[k]]
    full[..., k] = lat[..., k] / obs_sd[..., rows[k]]
    k = codes == 1  # factor r on factor c
    full[..., k] = lat[..., k] = values[..., k] * latent_sd[..., cols[k]] / latent_sd[..., rows[k]]
    k = codes == 2
    full[..., k] = lat[..., k] = values[..., k] / (latent_sd[..., rows[k]] * latent_sd[..., cols[k]])
    k = codes == 4  # intercept of observed r
    full[..., k] = values[..., k] / obs_sd[..., rows[k]]
    k = codes == 5  # mean of factor r
    full[..., k] = lat[..., k] = values[..., k] / latent_sd[..., rows[k]]
    k = (codes == 3) & (rows == cols)
    full[..., k] = values[..., k] / sigma[..., rows[k], rows[k]]
    k = (codes == 3) & (rows != cols)
    den = theta_sd[..., rows[k]] * theta_sd[..., cols[k]]
    full[..., k] = np.where(den > 0, values[..., k] / np.where(den > 0, den, 1.0), np.nan)
    return full, lat


def r_squared(mats: ModelMatrices) -> np.ndarray:
    """Share of each indicator's implied variance explained by the factors."""
    sigma = mats.implied_covariance()
    return 1.0 - np.diag(mats.T) / np.diag(sigma)


def latent_correlations(mats: ModelMatrices) -> np.ndarray:
    phi = mats.latent_covariance()
    sd = np.sqrt(np.clip(np.diag(phi), 1e-300, None))
    return phi / np.outer(sd, sd)
