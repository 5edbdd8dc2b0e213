"""Robust inference for least-squares fits of ordinal items.

With D the derivatives of the model statistics (q x k), W the diagonal weight and Gamma the
asymptotic covariance of sqrt(N)(s - sigma):

* robust (sandwich) covariance of the estimates: (D'WD)^-1 D'W Gamma W D (D'WD)^-1 / N;
* U = W - W D (D'W D)^-1 D' W (Satorra 1989), and the statistic N F, distributed as z'U z with
  z ~ N(0, Gamma), adjusted for its mean and variance (Satorra & Bentler 1994) or in the
  scale-shifted form of Asparouhov & Muthen (2010);
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


def adjusted_test(statistic: float, df: int, D: np.ndarray | None, weights: np.ndarray, gamma: np.ndarray) -> AdjustedTest:
    """Mean-and-variance adjusted and scale-shifted statistics for N F (D: (q, pairs) or None for a model with no parameters)."""
    return adjusted_statistics(statistic, df, residual_weights(D, weights), gamma)


def adjusted_statistics(statistic: float, df: float, U: np.ndarray, gamma: np.ndarray) -> AdjustedTest:
    """The adjustments of a statistic whose asymptotic distribution is that of z' U z with z ~ N(0, Gamma).

    Also serves the difference of two nested fits, with U = U_restricted - U_general evaluated at
    the restricted estimates (Satorra 2000; Asparouhov & Muthen 2006)."""
    UG = U @ gamma
    a1 = float(np.trace(UG))
    a2 = float(np.sum(UG * UG.T))
    if df <= 0 or a1 <= 0 or a2 <= 0:  # a saturated model has nothing to test
        nan = float("nan")
        return AdjustedTest(statistic, df, statistic, nan, statistic, nan, nan, nan)
    shift_scale = np.sqrt(df / a2)
    shifted = shift_scale * statistic + (df - shift_scale * a1)
    d_star = a1**2 / a2
    mv = statistic * d_star / a1
    return AdjustedTest(statistic, df, float(shifted), float(dist.chi2_sf(max(shifted, 0.0), df)), float(mv), float(d_star),
                        float(dist.chi2_sf(mv, d_star)), a1 / df, float(shift_scale), float(df - shift_scale * a1))


def robust_covariance(D: np.ndarray, weights: np.ndarray, gamma: np.ndarray, n_obs: int) -> np.ndarray:
    """(D'WD)^-1 D'W Gamma W D (D'WD)^-1 / N."""
    WD = D * weights[None, :]
    bread = scaled_inverse(WD @ D.T)
    return bread @ (WD @ gamma @ WD.T) @ bread / n_obs


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
