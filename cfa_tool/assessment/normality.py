"""Mardia's (1970) multivariate skewness and kurtosis with their tests.

b1 = (1/N^2) sum_i sum_j (z_i' S^-1 z_j)^3, with N b1 / 6 ~ chi-square on p(p+1)(p+2)/6 df;
b2 = (1/N) sum_i (z_i' S^-1 z_i)^2, with (b2 - p(p+2)) / sqrt(8 p (p+2) / N) ~ N(0, 1)
under multivariate normality (S with divisor N; Mardia 1970, 1974).

The double sum is computed without forming the N x N matrix: with whitened
rows y_i, sum_ij (y_i' y_j)^3 = sum_abc T_abc^2 where T_abc = sum_i y_ia y_ib y_ic,
which costs N p^3 instead of N^2 p.
"""

from __future__ import annotations

from dataclasses import asdict, dataclass

import numpy as np
from cfa_tool.numerics import distributions as dist


@dataclass(frozen=True)
class Normality:
    skewness: float
    skewness_chi_square: float
    skewness_df: int
    skewness_p_value: float
    kurtosis: float
    kurtosis_expected: float
    kurtosis_z: float
    kurtosis_p_value: float

    def to_dict(self) -> dict:
        return asdict(self)


def mardia(rows: np.ndarray) -> Normality:
    n, p = rows.shape
    Z = rows - rows.mean(axis=0)
    S = Z.T @ Z / n
    L = np.linalg.cholesky(S)
    Y = np.linalg.solve(L, Z.T).T  # whitened rows: y_i' y_j = z_i' S^-1 z_j
    pairs = (Y[:, :, None] * Y[:, None, :]).reshape(n, p * p)
    third = pairs.T @ Y  # T_abc as a (p*p, p) matrix
    b1 = float(np.sum(third**2)) / (n * n)
    d2 = np.einsum("ij,ij->i", Y, Y)
    b2 = float(np.mean(d2**2))
    df = p * (p + 1) * (p + 2) // 6
    chi = n * b1 / 6.0
    expected = p * (p + 2.0)
    z = (b2 - expected) / np.sqrt(8.0 * p * (p + 2.0) / n)
    return Normality(b1, chi, df, float(dist.chi2_sf(chi, df)), b2, expected, float(z), float(2 * dist.norm_sf(abs(z))))
