"""Least squares on thresholds and polychoric correlations of ordinal items in several groups.

Each item j has a latent response x*_j = nu_j + Lambda_j eta + e_j and is observed in
category c when tau_j,c-1 < x*_j <= tau_j,c.  In group g the latent responses have
mean mu = nu + Lambda alpha and covariance Sigma = Lambda Phi Lambda' + Theta, so the
sample statistics (thresholds and correlations estimated as if each x*_j were
standard normal) have the model counterparts

    tau~_jc = (tau_jc - mu_j) / sqrt(Sigma_jj),      rho_ij = Sigma_ij / sqrt(Sigma_ii Sigma_jj)

(Muthen & Asparouhov 2002; the identification rules are those of Wu & Estabrook
2016, see :func:`cfa_tool.model.parameters.build_parameter_table`).  With
s_g = (thresholds, correlations) of group g and W_g diagonal,

    F(theta) = sum_g (N_g / N) (s_g - sigma_g)' W_g (s_g - sigma_g),

and N F is the statistic that the mean-and-variance adjustment corrects.  Stacked
over groups, the weight is diag(N_g/N W_g) and the asymptotic covariance of
sqrt(N)(s - sigma) is blockdiag(N/N_g Gamma_g).
"""

from __future__ import annotations

import numpy as np
from scipy.linalg import block_diag

from cfa_tool.estimation.linalg import scaled_inverse
from cfa_tool.estimation.ml import Evaluation
from cfa_tool.model.implied import StructuredModel, entry_derivatives


class GroupedOrdinalLeastSquares:
    complete_data = True

    def __init__(self, model: StructuredModel, moments: list, method: str = "diagonally-weighted"):
        self.model = model
        p = model.p
        self.pairs = np.tril_indices(p, -1)
        self.item_of = np.concatenate([np.full(len(t), j) for j, t in enumerate(moments[0].thresholds)]).astype(int)
        self.n_total = sum(m.n_obs for m in moments)
        self.weights = [m.n_obs / self.n_total for m in moments]
        self.targets = [np.concatenate([m.stacked_thresholds, m.correlations[self.pairs]]) for m in moments]
        self.gammas = [m.joint_gamma for m in moments]
        self.w = [1.0 / np.diag(g) if method == "diagonally-weighted" else np.ones(len(g)) for g in self.gammas]
        self.n_thresholds = len(self.item_of)

    # -- model statistics and their derivatives
    def _latent_moments(self, theta: np.ndarray, g: int):
        """(matrices, Sigma, its diagonal, mu, thresholds) of group g's latent responses; None when some
        implied variance is not positive."""
        mats = self.model.matrices(theta, g)
        sigma = mats.implied_covariance()
        var = np.diag(sigma)
        if np.any(var <= 0) or not np.all(np.isfinite(var)):
            return None
        return mats, sigma, var, mats.implied_mean(), self.model.thresholds(theta, g)

    def _statistics(self, moments) -> np.ndarray:
        _, sigma, var, mu, tau = moments
        sd = np.sqrt(var)
        it = self.item_of
        i, j = self.pairs
        return np.concatenate([(tau - mu[it]) / sd[it], sigma[i, j] / (sd[i] * sd[j])])

    def statistics(self, theta: np.ndarray, g: int) -> np.ndarray | None:
        moments = self._latent_moments(theta, g)
        return None if moments is None else self._statistics(moments)

    def _transform(self, moments, d_sigma: np.ndarray, d_mu: np.ndarray, d_tau: np.ndarray) -> np.ndarray:
        """Derivatives of (standardized thresholds, correlations) from those of Sigma, mu and tau: (k, statistics)."""
        _, sigma, var, mu, tau = moments
        sd = np.sqrt(var)
        it = self.item_of
        i, j = self.pairs
        d_var = np.diagonal(d_sigma, axis1=1, axis2=2)
        d_thr = (d_tau - d_mu[:, it]) / sd[it] - ((tau - mu[it]) / (2.0 * sd[it] ** 3)) * d_var[:, it]
        rho = sigma[i, j] / (sd[i] * sd[j])
        d_rho = d_sigma[:, i, j] / (sd[i] * sd[j]) - 0.5 * rho * (d_var[:, i] / var[i] + d_var[:, j] / var[j])
        return np.hstack([d_thr, d_rho])

    def _jacobian(self, theta: np.ndarray, g: int, moments) -> np.ndarray:
        d_sigma, d_mu = self.model.jacobian(theta, g)
        return self._transform(moments, d_sigma, d_mu, self.model.threshold_jacobian(g))

    def jacobian(self, theta: np.ndarray, g: int) -> np.ndarray:
        return self._jacobian(theta, g, self._latent_moments(theta, g))

    def entry_jacobian(self, theta: np.ndarray, g: int, codes: np.ndarray, rows: np.ndarray, cols: np.ndarray) -> np.ndarray:
        """Derivatives of group g's statistics with respect to single matrix entries (candidates)."""
        moments = self._latent_moments(theta, g)
        d_sigma, d_mu = entry_derivatives(moments[0], codes, rows, cols)
        d_tau = np.zeros((len(codes), self.n_thresholds))
        k = np.flatnonzero(codes == 6)
        d_tau[k, rows[k]] = 1.0
        return self._transform(moments, d_sigma, d_mu, d_tau)

    # -- objective
    def value(self, theta: np.ndarray) -> float:
        total = 0.0
        for g, weight in enumerate(self.weights):
            s = self.statistics(theta, g)
            if s is None:
                return np.inf
            e = self.targets[g] - s
            total += weight * float(e @ (self.w[g] * e))
        return total

    def evaluate(self, theta: np.ndarray) -> Evaluation | None:
        q = len(theta)
        value, gradient, information = 0.0, np.zeros(q), np.zeros((q, q))
        for g, weight in enumerate(self.weights):
            moments = self._latent_moments(theta, g)
            if moments is None:
                return None
            e = self.targets[g] - self._statistics(moments)
            D = self._jacobian(theta, g, moments)
            WD = D * (weight * self.w[g])[None, :]
            value += weight * float(e @ (self.w[g] * e))
            gradient -= 2.0 * WD @ e
            information += 2.0 * WD @ D.T
        return Evaluation(value, gradient, information)

    # -- stacked pieces for robust inference
    def stacked(self, theta: np.ndarray) -> tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
        """(D of shape (q, k), residuals e, weights diag(N_g/N W_g), Gamma blockdiag(N/N_g Gamma_g)) over all groups."""
        moments = [self._latent_moments(theta, g) for g in range(len(self.weights))]
        D = np.hstack([self._jacobian(theta, g, m) for g, m in enumerate(moments)])
        e = np.concatenate([self.targets[g] - self._statistics(m) for g, m in enumerate(moments)])
        w = np.concatenate([wt * wg for wt, wg in zip(self.weights, self.w)])
        gamma = block_diag(*[gm / wt for gm, wt in zip(self.gammas, self.weights)])
        return D, e, w, gamma

    def group_slices(self) -> list[slice]:
        sizes = [len(t) for t in self.targets]
        ends = np.cumsum(sizes)
        return [slice(int(end - size), int(end)) for size, end in zip(sizes, ends)]


def least_squares_score_tests(D_model: np.ndarray, D_candidates: np.ndarray, residuals: np.ndarray, weights: np.ndarray,
                              gamma: np.ndarray, n_obs: int) -> tuple[np.ndarray, np.ndarray]:
    """Robust score tests (modification indices) and expected parameter changes for a least-squares fit.

    For a candidate with derivative row d and a = W d, the score at the estimates is a'e.
    Under the model sqrt(N) e ~ Q z with Q = I - D'(D W D')^-1 D W and z ~ N(0, Gamma),
    so the statistic N (a'e)^2 / (v' Gamma v) with v = Q'a is chi-square on 1 df
    (the generalized score test of Satorra 1989); the expected change is the
    candidate's share of a Gauss-Newton step of the enlarged model, (a'e) / (d'v).
    """
    A = D_candidates * weights[None, :]
    WD = D_model.T * weights[:, None]
    V = A - (A @ D_model.T) @ scaled_inverse(D_model @ WD) @ WD.T
    score = A @ residuals
    variance = np.einsum("ck,ck->c", V @ gamma, V)
    curvature = np.einsum("ck,ck->c", D_candidates, V)
    ok = (variance > 1e-12 * np.maximum(np.einsum("ck,ck->c", A @ gamma, A), 1e-300)) & (np.abs(curvature) > 1e-12)
    mi = np.where(ok, n_obs * score**2 / np.where(ok, variance, 1.0), np.nan)
    epc = np.where(ok, score / np.where(ok, curvature, 1.0), np.nan)
    return mi, epc
