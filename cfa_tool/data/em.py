"""Saturated model for incomplete data by the EM algorithm (Dempster, Laird &
Rubin 1977; for the multivariate normal, Little & Rubin 2002, ch. 11).

E-step, per missing-data pattern: with precision matrix L = Sigma^-1, the
missing part given the observed one has covariance (L_mm)^-1 and mean
mu_m - (L_mm)^-1 L_mo (x_o - mu_o).  M-step: mean and covariance of the
completed rows, plus the conditional covariances.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from cfa_tool.errors import EstimationError
from cfa_tool.data.patterns import PatternData
from cfa_tool.numerics.linalg import inverse


def em_saturated(data: PatternData, max_iterations: int = 2000, tolerance: float = 1e-10) -> tuple[np.ndarray, np.ndarray, int]:
    """(mean, covariance with divisor N, iterations) of the unrestricted normal model; with row weights
    (``data.weights``) every mean and sum of the M-step is weighted (divisor the sum of the weights).

    Each E-step inverts L_mm once per missing-data pattern, not once per row (:class:`_Batch`), and the conditional
    covariances enter the M-step as each pattern's weight (the sum of its rows' weights, ``data.counts``) times its
    own, added into the p x p matrix at once."""
    rows = data.rows
    w = data.row_weights
    total = float(w.sum())
    mask = ~np.isnan(rows)
    n, p = rows.shape
    mu, var = weighted_available_moments(rows, w)
    sigma = np.diag(np.where(var > 0, var, 1.0))
    batches = _batches(data)
    cells = np.concatenate([b.blocks for b in batches]) if batches else np.zeros(0, dtype=np.intp)
    pattern_weights = [b.weights[:, None, None] for b in batches]
    filled = np.where(mask, rows, 0.0)
    for iteration in range(1, max_iterations + 1):
        try:
            precision = inverse(sigma)
        except np.linalg.LinAlgError:
            raise SingularCovariance(sigma, mu) from None
        dev = np.where(mask, filled - mu, 0.0)
        # C order, so that ``flat`` is a view of it (rows a caller took out of a data frame come in Fortran order, and
        # numpy's arithmetic keeps their order: reshape would then copy, and the E-step's cells be written to the copy)
        completed = np.ascontiguousarray(mu + dev)
        flat = completed.reshape(-1)  # the same memory: the rows' cells in order
        weighted = []
        for batch, weight in zip(batches, pattern_weights):
            cond = inverse(precision.take(batch.blocks).reshape(batch.shape))  # (L_mm)^-1 of each pattern
            side = precision[batch.missing] @ dev[batch.rows, :, None]  # L_mo (x_o - mu_o) of each row
            # mu_m - (L_mm)^-1 L_mo (x_o - mu_o): each row's missing part given its observed part
            flat[batch.cells] = (mu[batch.missing] - (cond[batch.pattern] @ side)[:, :, 0]).ravel()
            weighted.append((cond * weight).ravel())
        extra = (np.bincount(cells, weights=np.concatenate(weighted), minlength=p * p).reshape(p, p) if batches
                 else 0.0)
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


@dataclass(frozen=True)
class _Batch:
    """The patterns missing m > 0 answers and their rows, as an E-step takes them, laid out once before the
    iterations: indices into the p x p precision matrix and into the (n, p) completed rows."""

    shape: tuple[int, int, int]  # (patterns, m, m)
    blocks: np.ndarray  # the cells of a p x p matrix of each pattern's m x m block of missing items (flat)
    weights: np.ndarray  # each pattern's weight (the sum of its rows' weights)
    rows: np.ndarray  # the rows of these patterns
    pattern: np.ndarray  # each row's pattern among them
    missing: np.ndarray  # each row's missing columns (rows, m)
    cells: np.ndarray  # each row's missing cells in the (n, p) rows (flat, row by row)


def _batches(data: PatternData) -> list[_Batch]:
    """One :class:`_Batch` for each number m > 0 of missing answers among the patterns."""
    observed = data.observed
    P, p = observed.shape
    n_missing = p - observed.sum(axis=1)
    place = np.full(P, -1)
    batches = []
    for m in np.unique(n_missing):
        if m == 0:
            continue
        patterns = np.flatnonzero(n_missing == m)
        miss = np.nonzero(~observed[patterns])[1].reshape(len(patterns), m)
        place[patterns] = np.arange(len(patterns))
        rows = np.flatnonzero(n_missing[data.index] == m)
        local = place[data.index[rows]]
        missing = miss[local]
        batches.append(_Batch((len(patterns), int(m), int(m)), (miss[:, :, None] * p + miss[:, None, :]).ravel(),
                              data.counts[patterns].astype(float), rows, local, missing,
                              (rows[:, None] * p + missing).ravel()))
    return batches


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
