"""Standardized solutions and explained variance.

``standardized_factors_only``: factors rescaled to unit variance (observed variables
keep their units).  ``standardized``: factors and observed variables both at
unit variance (Bollen 1989, pp. 349-350).  Residual covariances are shown as
residual correlations, theta_ij / sqrt(theta_ii theta_jj).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from cfa_tool.model.implied import ModelMatrices


@dataclass(frozen=True)
class Standardization:
    """Where each entry's scale factors are read from a pool of the model's standard deviations
    (see :func:`standardization`): fixed by the entries, so it is laid out once per model or candidate list."""

    num: np.ndarray  # the fully standardized value is value * pool[num] / (pool[den_a] * pool[den_b])
    den_a: np.ndarray
    den_b: np.ndarray
    lat_num: np.ndarray  # the latent-standardized value is value * pool[lat_num] / pool[lat_den]
    lat_den: np.ndarray
    shared: np.ndarray  # factor covariances: latent-standardized as fully standardized
    residual: np.ndarray  # residual covariances: NaN where the residual variances' product is not positive


def standardization(codes: np.ndarray, rows: np.ndarray, cols: np.ndarray, p: int, m: int) -> Standardization:
    """The pool positions of each entry's scale factors.  The pool (:func:`_pool`) is [1, latent SDs (m),
    implied SDs of the indicators (p), residual SDs (p), implied variances (p)], so that every rule of the module
    docstring is a product over a quotient of two pool values (a factor of 1 where a rule has fewer; multiplying or
    dividing by 1 changes no rounding, so the values are those of the rules computed one by one)."""
    one, lsd, osd, tsd, var = 0, 1, 1 + m, 1 + m + p, 1 + m + 2 * p
    n = len(codes)
    num, den_a, den_b = np.zeros(n, dtype=np.intp), np.zeros(n, dtype=np.intp), np.zeros(n, dtype=np.intp)
    lat_num, lat_den = np.zeros(n, dtype=np.intp), np.zeros(n, dtype=np.intp)
    k = codes == 0  # observed r on factor c: (v sd_c) / sd_r
    num[k], den_a[k], lat_num[k] = lsd + cols[k], osd + rows[k], lsd + cols[k]
    k = codes == 1  # factor r on factor c: v sd_c / sd_r, in both
    num[k] = lat_num[k] = lsd + cols[k]
    den_a[k] = lat_den[k] = lsd + rows[k]
    k = codes == 2  # factor covariance: v / (sd_r sd_c), in both
    den_a[k], den_b[k] = lsd + rows[k], lsd + cols[k]
    k = codes == 4  # intercept of observed r
    den_a[k] = osd + rows[k]
    k = codes == 5  # mean of factor r, in both
    den_a[k] = lat_den[k] = lsd + rows[k]
    k = (codes == 3) & (rows == cols)  # residual variance over the implied variance
    den_a[k] = var + rows[k]
    residual = np.flatnonzero((codes == 3) & (rows != cols))
    den_a[residual], den_b[residual] = tsd + rows[residual], tsd + cols[residual]
    return Standardization(num, den_a, den_b, lat_num, lat_den, np.flatnonzero(codes == 2), residual)


def _pool(mats: ModelMatrices) -> np.ndarray:
    latent_sd = np.sqrt(np.clip(np.diagonal(mats.latent_covariance(), axis1=-2, axis2=-1), 1e-300, None))
    variances = np.diagonal(mats.implied_covariance(), axis1=-2, axis2=-1)
    obs_sd = np.sqrt(np.clip(variances, 1e-300, None))
    theta_sd = np.sqrt(np.abs(np.diagonal(mats.T, axis1=-2, axis2=-1)))
    return np.concatenate([np.ones(variances.shape[:-1] + (1,)), latent_sd, obs_sd, theta_sd, variances], axis=-1)


def standardize_entries(mats: ModelMatrices, codes: np.ndarray, rows: np.ndarray, cols: np.ndarray,
                        values: np.ndarray, layout: Standardization | None = None,
                        latent: bool = True) -> tuple[np.ndarray, np.ndarray | None]:
    """(fully standardized, latent-standardized) value of each matrix entry; with stacked matrices and
    values (a leading axis of replications), stacked results.  ``layout``: :func:`standardization` of the
    entries when the caller keeps it (thresholds stay as they are: their item is not known here); ``latent``:
    False when the caller reads only the fully standardized values (the latent-standardized ones are then None)."""
    if layout is None:
        layout = standardization(codes, rows, cols, *mats.L.shape[-2:])
    pool = _pool(mats)
    values = np.asarray(values, dtype=float)
    den = pool[..., layout.den_a] * pool[..., layout.den_b]
    r = layout.residual
    if len(r):
        positive = den[..., r] > 0
        den[..., r] = np.where(positive, den[..., r], 1.0)
    full = values * pool[..., layout.num] / den
    if len(r):
        full[..., r] = np.where(positive, full[..., r], np.nan)
    if not latent:
        return full, None
    lat = values * pool[..., layout.lat_num] / pool[..., layout.lat_den]
    lat[..., layout.shared] = full[..., layout.shared]
    return full, lat


def r_squared(mats: ModelMatrices) -> np.ndarray:
    """Share of each indicator's implied variance explained by the factors."""
    sigma = mats.implied_covariance()
    return 1.0 - np.diag(mats.T) / np.diag(sigma)


def latent_correlations(mats: ModelMatrices) -> np.ndarray:
    phi = mats.latent_covariance()
    sd = np.sqrt(np.clip(np.diag(phi), 1e-300, None))
    return phi / np.outer(sd, sd)
