"""Normal-theory maximum-likelihood discrepancy, gradient and expected information.

F(theta) = log|Sigma| + tr(S Sigma^-1) - log|S| - p   (Joreskog 1969; Bollen 1989, eq. 4.67)

Gradient:  dF/dtheta_k = tr(Sigma^-1 (Sigma - S) Sigma^-1 dSigma_k)
Expected second derivatives:  H_kl = tr(Sigma^-1 dSigma_k Sigma^-1 dSigma_l)
(Browne 1974).  With N observations the Fisher information is (N/2) H and the
chi-square statistic is N F at the minimum.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from scipy.linalg import cho_factor, cho_solve, solve_triangular

from cfa_tool.model.implied import StructuredModel


@dataclass(frozen=True)
class Evaluation:
    value: float
    gradient: np.ndarray
    information: np.ndarray  # expected Hessian of F


def log_det_pd(matrix: np.ndarray) -> float | None:
    """log-determinant of a positive-definite matrix, or None if it is not."""
    try:
        c, _ = cho_factor(matrix, lower=True, check_finite=False)
    except np.linalg.LinAlgError:
        return None
    d = np.diag(c)
    if np.any(d <= 0) or not np.all(np.isfinite(d)):
        return None
    return 2.0 * float(np.sum(np.log(d)))


class NormalLikelihood:
    """The ML discrepancy for one sample covariance matrix S (divisor N)."""

    def __init__(self, model: StructuredModel, S: np.ndarray):
        self.model = model
        self.S = S
        logdet = log_det_pd(S)
        if logdet is None:
            raise ValueError("sample covariance matrix is not positive definite")
        self.logdet_S = logdet
        self.p = S.shape[0]

    def discrepancy_of(self, sigma: np.ndarray) -> float:
        try:
            c = cho_factor(sigma, lower=True, check_finite=False)
        except np.linalg.LinAlgError:
            return np.inf
        d = np.diag(c[0])
        if np.any(d <= 0) or not np.all(np.isfinite(d)):
            return np.inf
        logdet = 2.0 * float(np.sum(np.log(d)))
        trace = float(np.trace(cho_solve(c, self.S, check_finite=False)))
        return logdet + trace - self.logdet_S - self.p

    def value(self, theta: np.ndarray) -> float:
        return self.discrepancy_of(self.model.implied(theta))

    def evaluate(self, theta: np.ndarray) -> Evaluation | None:
        """Value, gradient and expected information at theta (None if Sigma is not positive definite)."""
        sigma = self.model.implied(theta)
        try:
            c = cho_factor(sigma, lower=True, check_finite=False)
        except np.linalg.LinAlgError:
            return None
        if np.any(np.diag(c[0]) <= 0):
            return None
        sigma_inv = cho_solve(c, np.eye(self.p), check_finite=False)
        value = 2.0 * float(np.sum(np.log(np.diag(c[0])))) + float(np.sum(sigma_inv * self.S)) - self.logdet_S - self.p
        M = sigma_inv @ (sigma - self.S) @ sigma_inv
        delta = self.model.jacobian(theta)
        q = delta.shape[0]
        gradient = delta.reshape(q, -1) @ M.ravel()
        information = expected_information(c[0], delta)
        return Evaluation(value, gradient, information)


def whiten(chol_lower: np.ndarray, delta: np.ndarray) -> np.ndarray:
    """Rows vec(C^-1 D_k C^-T) for Sigma = C C', shape (q, p*p).

    Then tr(Sigma^-1 D_k Sigma^-1 D_l) is the inner product of rows k and l.
    """
    q, p, _ = delta.shape
    if q == 0:
        return np.zeros((0, p * p))
    Y = solve_triangular(chol_lower, delta.transpose(1, 0, 2).reshape(p, q * p), lower=True, check_finite=False)
    Y = Y.reshape(p, q, p).transpose(1, 2, 0)  # (q, p, p): (C^-1 D_k)' = D_k C^-T
    X = solve_triangular(chol_lower, Y.transpose(1, 0, 2).reshape(p, q * p), lower=True, check_finite=False)
    return X.reshape(p, q, p).transpose(1, 0, 2).reshape(q, p * p)


def expected_information(chol_lower: np.ndarray, delta: np.ndarray) -> np.ndarray:
    """H_kl = tr(Sigma^-1 D_k Sigma^-1 D_l), from the Cholesky factor of Sigma."""
    X = whiten(chol_lower, delta)
    return X @ X.T
