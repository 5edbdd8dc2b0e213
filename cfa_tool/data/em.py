"""Saturated model for incomplete data by the EM algorithm (Dempster, Laird &
Rubin 1977; for the multivariate normal, Little & Rubin 2002, ch. 11).

E-step, per missing-data pattern: with precision matrix L = Sigma^-1, the
missing part given the observed one has covariance (L_mm)^-1 and mean
mu_m - (L_mm)^-1 L_mo (x_o - mu_o).  M-step: mean and covariance of the
completed rows, plus the conditional covariances.
"""

from __future__ import annotations

import numpy as np

from cfa_tool.errors import EstimationError
from cfa_tool.data.patterns import PatternData, missing_groups


def em_saturated(data: PatternData, max_iterations: int = 2000, tolerance: float = 1e-10) -> tuple[np.ndarray, np.ndarray, int]:
    """(mean, covariance with divisor N, iterations) of the unrestricted normal model; with row weights
    (``data.weights``) every mean and sum of the M-step is weighted (divisor the sum of the weights)."""
    rows = data.rows
    w = data.row_weights
    total = float(w.sum())
    mask = ~np.isnan(rows)
    n, p = rows.shape
    mu, var = weighted_available_moments(rows, w)
    sigma = np.diag(np.where(var > 0, var, 1.0))
    groups = list(missing_groups(mask))  # rows grouped by how many answers they miss, with the columns they miss
    for iteration in range(1, max_iterations + 1):
        try:
            precision = np.linalg.inv(sigma)
        except np.linalg.LinAlgError:
            raise SingularCovariance(sigma, mu) from None
        dev = np.where(mask, rows - mu, 0.0)
        completed = mu + dev
        extra = np.zeros((p, p))
        for which, miss in groups:
            block = precision[miss[:, :, None], miss[:, None, :]]  # L_mm of each row
            cond = np.linalg.inv(block)  # covariance of the missing part given the observed part
            side = np.einsum("rkp,rp->rk", precision[miss], dev[which])  # L_mo (x_o - mu_o)
            completed[which[:, None], miss] = mu[miss] - np.einsum("rkj,rj->rk", cond, side)
            np.add.at(extra, (miss[:, :, None], miss[:, None, :]), cond * w[which, None, None])
        new_mu = w @ completed / total
        centred = completed - new_mu
        new_sigma = ((centred * w[:, None]).T @ centred + extra) / total
        change = max(np.max(np.abs(new_mu - mu)), np.max(np.abs(new_sigma - sigma)))
        mu, sigma = new_mu, new_sigma
        if change < tolerance * max(1.0, np.max(np.abs(sigma))):
            return mu, sigma, iteration
        if iteration % 50 == 0 and _smallest_share(sigma) < 1e-9:
            raise EstimationError(_no_maximum(sigma, iteration))
    if _smallest_share(sigma) < 1e-5:
        raise EstimationError(_no_maximum(sigma, max_iterations))
    raise EstimationError(f"the saturated model for the incomplete data did not converge in {max_iterations} EM iterations")


class SingularCovariance(EstimationError):
    """The EM iterate's covariance matrix is exactly singular (a constant item, or an item that is an exact combination
    of others among the answered values); ``sigma`` and ``mu`` let the caller name the items."""

    def __init__(self, sigma: np.ndarray, mu: np.ndarray):
        super().__init__("the covariance matrix of the saturated model is singular")
        self.sigma, self.mu = sigma, mu


def _no_maximum(sigma: np.ndarray, iterations: int) -> str:
    """The likelihood of the unrestricted model grows without bound as its covariance matrix becomes singular, which
    happens when the rows answer too few items together (e.g. fewer complete rows than items in a small group)."""
    return (f"the saturated model for the incomplete data did not converge in {iterations} EM iterations: its "
            f"covariance matrix is becoming singular (smallest eigenvalue {_smallest_share(sigma):.1g} of the largest), "
            f"so the likelihood may have no maximum; the rows do not carry enough answers together for this many items")


def _smallest_share(sigma: np.ndarray) -> float:
    """The covariance matrix's smallest eigenvalue as a share of its largest."""
    values = np.linalg.eigvalsh(sigma)
    return float(values[0] / values[-1])


def weighted_available_moments(rows: np.ndarray, weights: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Each column's mean and variance (divisor the sum of weights) over the rows that answered it."""
    answered = ~np.isnan(rows)
    filled = np.where(answered, rows, 0.0)
    total = weights @ answered
    mean = weights @ filled / total
    var = weights @ np.where(answered, (filled - mean) ** 2, 0.0) / total
    return mean, var
