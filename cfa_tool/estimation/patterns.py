"""Missing-data patterns: rows grouped by which variables they answered."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np


@dataclass(frozen=True)
class PatternData:
    """Sufficient statistics of each missing-data pattern (observed parts embedded in p-space, zeros elsewhere)."""

    observed: np.ndarray  # (P, p) bool
    counts: np.ndarray  # (P,) rows in each pattern
    means: np.ndarray  # (P, p) mean of the observed values
    scatter: np.ndarray  # (P, p, p) covariance of the observed values about their own mean, divisor count
    index: np.ndarray  # pattern of each row
    rows: np.ndarray  # the rows themselves (NaN where missing)

    @property
    def n_obs(self) -> int:
        return int(self.counts.sum())


def pattern_data(rows: np.ndarray) -> PatternData:
    """Group rows by pattern; rows with nothing observed must be removed beforehand."""
    mask = ~np.isnan(rows)
    patterns, index, counts = np.unique(mask, axis=0, return_inverse=True, return_counts=True)
    index = index.ravel()
    P, p = patterns.shape
    filled = np.where(mask, rows, 0.0)
    sums = np.zeros((P, p))
    np.add.at(sums, index, filled)
    means = sums / counts[:, None]
    centred = np.where(mask, filled - means[index], 0.0)
    scatter = np.zeros((P, p, p))
    np.add.at(scatter, index, centred[:, :, None] * centred[:, None, :])
    scatter /= counts[:, None, None]
    return PatternData(patterns, counts, means, scatter, index, rows)


def embedded_inverse(sigma: np.ndarray, observed: np.ndarray) -> tuple[np.ndarray, np.ndarray] | None:
    """For each pattern, Sigma_oo^-1 embedded in p x p (zeros outside) and log|Sigma_oo|.

    Missing rows and columns are replaced by the identity so that one batched
    Cholesky factorisation serves every pattern.
    """
    P, p = observed.shape
    outer = observed[:, :, None] & observed[:, None, :]
    batch = np.where(outer, sigma[None, :, :], 0.0)
    idx = np.arange(p)
    batch[:, idx, idx] = np.where(observed, batch[:, idx, idx], 1.0)
    try:
        chol = np.linalg.cholesky(batch)
    except np.linalg.LinAlgError:
        return None
    diag = np.diagonal(chol, axis1=1, axis2=2)
    if np.any(diag <= 0):
        return None
    logdet = 2.0 * np.sum(np.log(diag), axis=1)
    inv = np.linalg.inv(batch)
    return np.where(outer, inv, 0.0), logdet
