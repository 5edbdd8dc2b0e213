"""Local and case diagnostics.

* normalized residuals (s_ij - sigma_ij) / sqrt((sigma_ii sigma_jj + sigma_ij^2) / N),
  approximately standard normal under the model (Bollen 1989, p. 258);
* Mahalanobis distance of each row from the centroid, d^2 = (x - m)' S^-1 (x - m)
  (Mahalanobis 1936), chi-square on p df for normal data;
* each row's share of the chi-square: with means saturated,
  2 (l_i(saturated) - l_i(model)) = log|Sigma| - log|S| + d_i' Sigma^-1 d_i - d_i' S^-1 d_i,
  which sums over rows to the chi-square statistic exactly.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from cfa_tool.assessment.normality import Whitened, whitened_rows
from cfa_tool.numerics import distributions as dist
from cfa_tool.numerics.linalg import spd_inverse


@dataclass(frozen=True)
class CaseDiagnostic:
    row: int  # data row number in the file (1 = first row after the header)
    mahalanobis: float
    p_value: float
    chi_square_share: float
    id: str | None = None  # the row's value in the id column (--id) or its row name, when the data have one

    def to_dict(self) -> dict:
        out = {"row": self.row, "mahalanobis": self.mahalanobis, "p_value": self.p_value,
               "chi_square_share": self.chi_square_share}
        if self.id is not None:
            out = {"row": self.row, "id": self.id, **{k: v for k, v in out.items() if k != "row"}}
        return out


def normalized_residuals(S: np.ndarray, sigma: np.ndarray, n_obs: int) -> np.ndarray:
    d = np.diag(sigma)
    scale = np.sqrt((np.outer(d, d) + sigma**2) / n_obs)
    return (S - sigma) / scale


def case_diagnostics(rows: np.ndarray, sigma: np.ndarray, row_numbers: np.ndarray | None, top: int = 10,
                     whitened: Whitened | None = None,
                     inverse: tuple[np.ndarray, float] | None = None) -> tuple[list[CaseDiagnostic], list[CaseDiagnostic]]:
    """(rows with the largest Mahalanobis distances, rows with the largest shares of chi-square);
    ``whitened`` is :func:`~cfa_tool.assessment.normality.whitened_rows` of the rows (their distances from the
    centroid and the centred rows) and ``inverse`` (Sigma^-1, log|Sigma|) when the caller has them (the estimation's
    factorisation of Sigma)."""
    n, p = rows.shape
    if whitened is None:
        whitened = whitened_rows(rows)
    d_sample = whitened.distances
    if inverse is None:
        inverse = spd_inverse(sigma)
        if inverse is None:
            raise np.linalg.LinAlgError("the implied covariance matrix is not positive definite")
    sigma_inv, log_det_sigma = inverse
    dev = whitened.centred
    d_model = np.einsum("ij,ij->i", dev @ sigma_inv, dev)
    share = log_det_sigma - whitened.log_det + d_model - d_sample
    chosen = np.concatenate([np.argsort(-d_sample, kind="stable")[:top], np.argsort(-share, kind="stable")[:top]])
    numbers = (chosen + 1 if row_numbers is None else row_numbers[chosen]).tolist()
    found = [CaseDiagnostic(*values) for values in zip(numbers, d_sample[chosen].tolist(),
                                                       dist.chi2_sf(d_sample[chosen], p).tolist(), share[chosen].tolist())]
    shown = len(found) // 2  # the rows shown: p-values only for them
    return found[:shown], found[shown:]
