"""Robust inference for least-squares fits of ordinal items.

With D the derivatives of the model statistics (q x k), W the diagonal weight and Gamma the
asymptotic covariance of sqrt(N)(s - sigma):

* robust (sandwich) covariance of the estimates: (D'WD)^-1 D'W Gamma W D (D'WD)^-1 / N;
* U = W - W D (D'W D)^-1 D' W (Satorra 1989), and the statistic N F, distributed as z'U z with
  z ~ N(0, Gamma), adjusted for its mean and variance (Satorra & Bentler 1994) or in the
  scale-shifted form of Asparouhov & Muthén (2010);
* fit indices of the scale-shifted statistic against the baseline's (:func:`adjusted_fit`).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from cfa_tool.assessment.fit_indices import cfi_value, rmsea_interval, rmsea_value, tli_value
from cfa_tool.inference.robust import RobustFit
from cfa_tool.method import FitTest
from cfa_tool.numerics import distributions as dist
from cfa_tool.numerics.linalg import scaled_inverse


@dataclass(frozen=True)
class AdjustedTest:
    """The mean-and-variance adjusted and scale-shifted tests of a least-squares fit."""
    statistic: float  # N F
    df: int
    scale_shifted: float
    scale_shifted_p: float
    mean_variance: float
    mean_variance_df: float
    mean_variance_p: float
    scaling: float  # tr(U Gamma) / df
    scale: float = float("nan")  # the scale-shifted statistic is scale * statistic + shift
    shift: float = float("nan")


def residual_weights(D: np.ndarray | None, weights: np.ndarray) -> np.ndarray:
    """U = W - W D' (D W D')^-1 D W for D of shape (q, statistics), or W with no parameters (Satorra 1989)."""
    W = np.diag(weights)
    if D is None or len(D) == 0:
        return W
    WD = D.T * weights[:, None]
    return W - WD @ scaled_inverse(D @ WD) @ WD.T


def residual_traces(weights: np.ndarray, gamma: np.ndarray, terms: list[tuple[float, np.ndarray]], with_weights: bool = True,
                    blocks: list[slice] | None = None) -> tuple[float, float]:
    """(tr(U Gamma), tr((U Gamma)^2)) for U = [W] - sum_r s_r W D_r' (D_r W D_r')^-1 D_r W, ``terms`` the pairs
    (s_r, D_r), D_r of shape (q_r, statistics), and W = diag(weights) included when ``with_weights``: a model's
    U of :func:`residual_weights` is one term with s = 1, the difference of two nested models' (Satorra 2000) two
    terms, s = 1 and -1, without W.  Expanding the products of U Gamma gives traces of q x q matrices only
    (P_r = D_r W, A_r = P_r D_r', C_rt = P_r Gamma P_t'):

        tr(U Gamma)     = tr(W Gamma) - sum_r s_r tr(A_r^-1 C_rr)
        tr((U Gamma)^2) = tr((W Gamma)^2) - 2 sum_r s_r tr(A_r^-1 P_r Gamma W Gamma P_r')
                          + sum_rt s_r s_t tr(A_r^-1 C_rt A_t^-1 C_tr),

    so that no statistics x statistics product is formed (thousands of statistics with several groups of
    ordinal items).  ``blocks``: slices of the statistics over which Gamma is block-diagonal (the groups)."""
    blocks = blocks or [slice(0, len(weights))]
    a1 = a2 = 0.0
    if with_weights:
        a1 = float(weights @ np.diagonal(gamma))
        a2 = sum(_weighted_square_sum(gamma[b, b], weights[b]) for b in blocks)
    pieces = []
    for sign, D in terms:
        P = D * weights[None, :]
        rows = _rows_by_block(P, blocks)
        P_parts = [(r, P[r, b]) for r, b in zip(rows, blocks)]
        PG_parts = [(r, Pb @ gamma[b, b]) for (r, Pb), b in zip(P_parts, blocks)]
        A = _sum_over_blocks(P_parts, [(r, D[r, b]) for r, b in zip(rows, blocks)], len(D), len(D))
        pieces.append((sign, P_parts, PG_parts, scaled_inverse(A)))
    for sign, P_parts, PG_parts, inverse in pieces:
        q = len(inverse)
        a1 -= sign * float(np.sum(inverse * _sum_over_blocks(PG_parts, P_parts, q, q)))
        if with_weights:
            weighted = [(r, PGb * weights[b][None, :]) for (r, PGb), b in zip(PG_parts, blocks)]
            a2 -= 2.0 * sign * float(np.sum(inverse * _sum_over_blocks(weighted, PG_parts, q, q)))
        for sign_t, P_t, _, inverse_t in pieces:
            C = _sum_over_blocks(PG_parts, P_t, q, len(inverse_t))
            a2 += sign * sign_t * float(np.sum((inverse @ C) * (inverse_t @ C.T).T))
    return a1, a2


#: rows of Gamma squared at once by :func:`_weighted_square_sum` (8 MB of a 1,000-statistic Gamma's rows)
_SQUARED_ROWS = 1024


def _weighted_square_sum(gamma: np.ndarray, weights: np.ndarray) -> float:
    """tr((W Gamma)^2) = sum_ij w_i w_j Gamma_ij^2 for W = diag(weights), a few rows at a time: no second matrix of
    the statistics by themselves beside Gamma (20,700 statistics at 200 ordinal items: 3.4 GB each)."""
    total = 0.0
    for first in range(0, len(gamma), _SQUARED_ROWS):
        rows = gamma[first:first + _SQUARED_ROWS]
        total += float(np.sum((rows * weights[None, :]) * rows, axis=1) @ weights[first:first + _SQUARED_ROWS])
    return total


def _rows_by_block(X: np.ndarray, blocks: list[slice]) -> list[np.ndarray]:
    """For each block of columns, the rows of X with an entry there that is not zero (a parameter of one group
    has derivatives in that group's statistics only)."""
    return [np.flatnonzero(np.any(X[:, b] != 0.0, axis=1)) for b in blocks]


def _sum_over_blocks(left: list, right: list, n_left: int, n_right: int) -> np.ndarray:
    """sum_b L_b R_b' for the blocks' (rows, L_b) and (rows, R_b), placed at their rows: X Y' of the full matrices."""
    out = np.zeros((n_left, n_right))
    for (rows_l, L), (rows_r, R) in zip(left, right):
        out[np.ix_(rows_l, rows_r)] += L @ R.T
    return out


def adjusted_test(statistic: float, df: int, D: np.ndarray | None, weights: np.ndarray, gamma: np.ndarray,
                  blocks: list[slice] | None = None) -> AdjustedTest:
    """Mean-and-variance adjusted and scale-shifted statistics for N F (D: (q, pairs) or None for a model with no
    parameters; ``blocks`` as in :func:`residual_traces`)."""
    terms = [] if D is None or len(D) == 0 else [(1.0, D)]
    return adjusted_from_traces(statistic, df, *residual_traces(weights, gamma, terms, True, blocks))


def adjusted_statistics(statistic: float, df: float, U: np.ndarray, gamma: np.ndarray) -> AdjustedTest:
    """The adjustments of a statistic whose asymptotic distribution is that of z' U z with z ~ N(0, Gamma).

    Also serves the difference of two nested fits, with U = U_restricted - U_general evaluated at
    the restricted estimates (Satorra 2000; Asparouhov & Muthén 2006)."""
    UG = U @ gamma
    return adjusted_from_traces(statistic, df, float(np.trace(UG)), float(np.sum(UG * UG.T)))


def adjusted_from_traces(statistic: float, df: float, a1: float, a2: float) -> AdjustedTest:
    """The adjustments from a1 = tr(U Gamma) and a2 = tr((U Gamma)^2) (Satorra & Bentler 1994; Asparouhov & Muthén 2010)."""
    if df <= 0 or a1 <= 0 or a2 <= 0:  # a saturated model has nothing to test
        nan = float("nan")
        return AdjustedTest(statistic, df, statistic, nan, statistic, nan, nan, nan)
    shift_scale = np.sqrt(df / a2)
    shifted = shift_scale * statistic + (df - shift_scale * a1)
    d_star = a1**2 / a2
    mv = statistic * d_star / a1
    return AdjustedTest(statistic, df, float(shifted), float(dist.chi2_sf(max(shifted, 0.0), df)), float(mv), float(d_star),
                        float(dist.chi2_sf(mv, d_star)), a1 / df, float(shift_scale), float(df - shift_scale * a1))


def robust_covariance(D: np.ndarray, weights: np.ndarray, gamma: np.ndarray, n_obs: int,
                      blocks: list[slice] | None = None) -> np.ndarray:
    """(D'WD)^-1 D'W Gamma W D (D'WD)^-1 / N; ``blocks``: slices of the statistics over which Gamma is
    block-diagonal (the groups), whose products are then taken block by block."""
    WD = D * weights[None, :]
    bread = scaled_inverse(WD @ D.T)
    if blocks is None:
        meat = WD @ gamma @ WD.T
    else:
        parts = [(r, WD[r, b]) for r, b in zip(_rows_by_block(WD, blocks), blocks)]
        meat = _sum_over_blocks([(r, Pb @ gamma[b, b]) for (r, Pb), b in zip(parts, blocks)], parts, len(D), len(D))
    return bread @ meat @ bread / n_obs


def adjusted_fit(test: AdjustedTest, baseline: AdjustedTest, df: int, base_df: int, n_obs: int, groups: int = 1) -> RobustFit:
    """The scale-shifted statistic with CFI, TLI and RMSEA computed from it and the baseline's
    (the usual indices applied to the adjusted statistics)."""
    low, high = rmsea_interval(test.scale_shifted, df, n_obs, groups)
    return RobustFit(test=FitTest.SCALE_SHIFTED, scaling_factor=test.scaling, chi_square_scaled=test.scale_shifted, df=df,
                     p_value_scaled=test.scale_shifted_p, baseline_scaling_factor=baseline.scaling,
                     baseline_chi_square_scaled=baseline.scale_shifted,
                     cfi_robust=cfi_value(test.scale_shifted, df, baseline.scale_shifted, base_df),
                     tli_robust=tli_value(test.scale_shifted, df, baseline.scale_shifted, base_df),
                     rmsea_robust=rmsea_value(test.scale_shifted, df, n_obs, groups), rmsea_robust_ci90=(low, high),
                     scale=test.scale, shift=test.shift)
