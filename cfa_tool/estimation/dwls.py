"""Least squares on polychoric correlations for ordinal items.

F(theta) = (r - rho(theta))' W (r - rho(theta)) over the correlations below the
diagonal; W = diag(Gamma)^-1 (diagonally weighted least squares; Muthen, du
Toit & Spisic 1997) or the identity (unweighted least squares).  The latent
responses have unit variance, so the residual variances are not parameters
("delta" parametrisation); the model's off-diagonal elements do not depend on
them.  Scoring uses 2 D' W D, the expected second derivatives for a correct
model.  Robust standard errors and the mean-and-variance adjusted test follow
Satorra & Bentler (1994) with U = W - W D (D'W D)^-1 D' W; the scale-shifted
form of the adjusted statistic is that of Asparouhov & Muthen (2010).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from cfa_tool import distributions as dist

from cfa_tool.estimation.linalg import scaled_inverse
from cfa_tool.estimation.ml import Evaluation
from cfa_tool.model.implied import StructuredModel
from cfa_tool.model.rank_two import basis_vectors, second_derivative_contraction


class WeightedLeastSquares:
    complete_data = True

    def __init__(self, model: StructuredModel, r: np.ndarray, weights: np.ndarray, n_obs: int):
        self.model = model
        self.pairs = np.tril_indices(model.p, -1)
        self.r = r
        self.w = weights
        self.n_total = n_obs

    def value(self, theta: np.ndarray) -> float:
        resid = self.r - self.model.implied(theta)[self.pairs]
        return float(resid @ (self.w * resid))

    def jacobian(self, theta: np.ndarray) -> np.ndarray:
        """d rho / d theta, shape (q, pairs).  Each entry's derivative of Sigma is c (u v' + v u') for
        columns u, v of V = [I, C', G] (:mod:`cfa_tool.model.rank_two`), so its element (i, j) is
        c (V_iu V_jv + V_iv V_ju): gathered for the pairs below the diagonal, without p x p arrays."""
        V, _ = basis_vectors(self.model.matrices(theta), False)
        basis = self.model.bases[0]
        Vi, Vj = V[self.pairs[0]], V[self.pairs[1]]
        D = basis.c * (Vi[:, basis.u] * Vj[:, basis.v] + Vi[:, basis.v] * Vj[:, basis.u])  # (pairs, active entries)
        return D.T if self.model.identity_J[0] else self.model.active_J[0].T @ D.T

    def gradient(self, theta: np.ndarray) -> np.ndarray:
        """-2 D W (r - rho): what differences of the gradient (Newton's steps near the minimum) need."""
        resid = self.r - self.model.implied(theta)[self.pairs]
        return -2.0 * self.jacobian(theta) @ (self.w * resid)

    def observed_hessian(self, theta: np.ndarray) -> np.ndarray | None:
        """Second derivatives of F in closed form (None with higher-order factors):

            H = 2 D W D' - 2 tr(M d2Sigma / dtheta dtheta'),   M_ij = M_ji = w_k e_k / 2 for the pair k = (i, j),

        e = r - rho the residuals; the second derivatives of Sigma are those of maximum likelihood
        (Neudecker & Satorra 1991; :func:`cfa_tool.model.rank_two.second_derivative_contraction`)."""
        model = self.model
        if model.higher_order:
            return None
        mats = model.matrices(theta)
        half = 0.5 * self.w * (self.r - mats.implied_covariance()[self.pairs])
        M = np.zeros((model.p, model.p))
        M[self.pairs] = half
        M[self.pairs[1], self.pairs[0]] = half
        second = second_derivative_contraction(model.second_orders[0], M, mats.L, mats.P)
        if not model.identity_J[0]:
            J = model.active_J[0]
            second = J.T @ second @ J
        D = self.jacobian(theta)
        H = 2.0 * (D * self.w) @ D.T - 2.0 * second
        return 0.5 * (H + H.T)

    def evaluate(self, theta: np.ndarray) -> Evaluation:
        resid = self.r - self.model.implied(theta)[self.pairs]
        D = self.jacobian(theta)
        WD = D * self.w[None, :]
        return Evaluation(float(resid @ (self.w * resid)), -2.0 * WD @ resid, 2.0 * WD @ D.T)


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
                        float(dist.chi2_sf(mv, d_star)), a1 / df)


def robust_covariance(D: np.ndarray, weights: np.ndarray, gamma: np.ndarray, n_obs: int) -> np.ndarray:
    """(D'WD)^-1 D'W Gamma W D (D'WD)^-1 / N."""
    WD = D * weights[None, :]
    bread = scaled_inverse(WD @ D.T)
    return bread @ (WD @ gamma @ WD.T) @ bread / n_obs
