"""Standard errors, z tests and Wald intervals from the information matrix.

With the ML discrepancy F, the Fisher information of theta is (N/2) H, where H
is the expected (or observed) second-derivative matrix of F, so
Cov(theta) = (2/N) H^-1 (Bollen 1989, ch. 4).  Every matrix entry is an affine
function of theta (entry = offset + J theta), so Cov(entries) = J Cov(theta) J'.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Callable

import numpy as np
from cfa_tool.numerics import distributions as dist

from cfa_tool.numerics.linalg import ScaledFactor, difference_hessian, scaled_inverse


@dataclass(frozen=True)
class Inference:
    """Wald inference of the free parameters: standard errors, z, p-values and confidence intervals."""
    se: np.ndarray
    z: np.ndarray
    p_value: np.ndarray
    ci_low: np.ndarray
    ci_high: np.ndarray


def observed_information(gradient: Callable[[np.ndarray], np.ndarray], theta: np.ndarray, central: bool = True) -> np.ndarray:
    """Second derivatives of F by differences of the analytic gradient (central, or forward
    from the gradient at theta when each gradient is expensive)."""
    return difference_hessian(gradient, theta, central)


def parameter_covariance(information: np.ndarray, n_obs: int, factor: ScaledFactor | None = None) -> np.ndarray:
    """(2/N) H^-1, inverted after scaling H to unit diagonal so parameters in very different units stay accurate
    (``factor``: :func:`~cfa_tool.numerics.linalg.scaled_factor` of H when the caller has made it)."""
    return 2.0 / n_obs * scaled_inverse(information, factor)


def wald_inference(values: np.ndarray, J: np.ndarray, cov_theta: np.ndarray, level: float = 0.95) -> Inference:
    """SE, z, two-sided p and Wald interval for each entry; fixed entries get NaN."""
    var = ((J @ cov_theta) * J).sum(axis=1)
    free = (J != 0).any(axis=1)
    se = np.where(free, np.sqrt(np.maximum(var, 0.0)), np.nan)
    z = np.divide(values, se, out=np.full(len(se), np.nan), where=free & (se > 0))
    p = 2.0 * dist.norm_sf(np.abs(z))  # NaN where z is
    crit = dist.norm_ppf(0.5 + level / 2.0)
    return Inference(se, z, p, values - crit * se, values + crit * se)
