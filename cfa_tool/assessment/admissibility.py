"""Warnings for estimates outside their admissible range (Heywood cases,
Dillon, Kumar & Mulani 1987): negative variances, correlations beyond +/-1,
standardized loadings above 1, a non-positive-definite factor covariance matrix."""

from __future__ import annotations

import numpy as np

from cfa_tool.model.implied import ModelMatrices


def admissibility_warnings(mats: ModelMatrices, observed: tuple[str, ...], latent: tuple[str, ...]) -> list[str]:
    out: list[str] = []
    for i, x in enumerate(observed):
        if mats.T[i, i] < 0:
            out.append(
                f"Heywood case: the residual variance of '{x}' is negative ({mats.T[i, i]:.4g}); the model may be misspecified, "
                f"the sample too small, or '{x}' nearly redundant with its factor"
            )
    for j, f in enumerate(latent):
        if mats.P[j, j] < 0:
            out.append(f"Heywood case: the variance of factor '{f}' is negative ({mats.P[j, j]:.4g})")
    phi = mats.latent_covariance()
    d = np.diag(phi)
    if np.all(d > 0):
        corr = phi / np.sqrt(np.outer(d, d))
        for i in range(len(latent)):
            for j in range(i):
                if abs(corr[i, j]) > 1.0:
                    out.append(f"the correlation of factors '{latent[j]}' and '{latent[i]}' is {corr[i, j]:.3f}, beyond +/-1")
        if len(latent) > 1 and np.linalg.eigvalsh(phi)[0] < 0:
            out.append("the factor covariance matrix is not positive definite")
    sigma = mats.implied_covariance()
    sd_obs = np.sqrt(np.clip(np.diag(sigma), 1e-300, None))
    sd_lat = np.sqrt(np.clip(d, 1e-300, None))
    std = mats.L * sd_lat[None, :] / sd_obs[:, None]
    for i, j in zip(*np.nonzero(np.abs(std) > 1.0)):
        out.append(f"the standardized loading of '{observed[i]}' on '{latent[j]}' is {std[i, j]:.3f}, above 1 in size")
    return out
