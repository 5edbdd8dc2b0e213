"""Weights of the linear factor scores, for every pattern of answered items at once.

Every linear score is s = alpha + W' (x - mu), using only the answered items o (W is
zero in the rows of unanswered items).  With S_o = Sigma_oo^-1 embedded in p x p
(zeros elsewhere; :func:`cfa_tool.data.patterns.embedded_inverse`), R = S_o L
and K = L' S_o L:

* regression (Thurstone 1935): W = S_o L Phi = R Phi, the posterior mean
  E[eta | x_o] of normal factors;
* Bartlett (1937): W = R_F K_FF^-1 over the factors F with items of their own.
  Bartlett's form (L' Theta^-1 L)^-1 L' Theta^-1 equals (L' Sigma^-1 L)^-1 L' Sigma^-1
  whenever Sigma = L Phi L' + Theta, for any Phi (a Woodbury identity; see e.g. ten Berge
  et al. 1999), so the Sigma form is used: it needs no inverse of Theta and stays
  defined when a residual variance is zero.  W'L = I makes the scores conditionally
  unbiased, E[s | eta] = eta.  Higher-order factors have no items of their own
  (L_F would be rank deficient), so they get no Bartlett score;
* correlation-preserving (ten Berge, Krijnen, Wansbeek & Shapiro 1999, their equation
  for correlated factors): W = R_F Phi^1/2 (Phi^1/2 K_FF Phi^1/2)^-1/2 Phi^1/2 with
  Phi = Phi_FF, so that W' Sigma W = Phi.  For uncorrelated factors (Phi = I) this is
  Anderson & Rubin's (1956) (L' Theta^-1 Sigma Theta^-1 L)^-1/2 L' Theta^-1.

The mean squared error matrix of any of them about the factors it scores is
E[(s - eta)(s - eta)'] = W' Sigma W - W' L Phi_.F - Phi_F. L' W + Phi_FF; for regression
scores it is the posterior covariance Phi - Phi K Phi, for Bartlett scores the error
covariance K_FF^-1 - Phi_FF.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from cfa_tool.data.patterns import embedded_inverse
from cfa_tool.errors import EstimationError
from cfa_tool.scoring.methods import ScoreMethod, Unscored
from cfa_tool.scoring.model import ScoringModel, checked_covariance

CONDITION_LIMIT = 1e12  # a matrix to invert with a larger condition number counts as singular


@dataclass(frozen=True, eq=False)
class PatternWeights:
    """One method's weights for a set of answer patterns."""

    method: ScoreMethod
    weights: np.ndarray  # (P, p, m); NaN in the columns of factors the method does not score for the pattern
    mean_squared_error: np.ndarray  # (P, m, m); NaN likewise
    unscored: np.ndarray  # (P, m) object array of Unscored or None


def _sym_power(a: np.ndarray, power: float) -> tuple[np.ndarray, np.ndarray]:
    """a^power of stacked symmetric positive semi-definite matrices (eigen-decomposition), and whether
    each is positive definite enough to raise to a negative power."""
    values, vectors = np.linalg.eigh(a)
    top = np.max(np.abs(values), axis=-1, keepdims=True)
    ok = np.all(values > top / CONDITION_LIMIT, axis=-1) if power < 0 else np.all(values > -1e-10 * np.maximum(top, 1.0), axis=-1)
    safe = np.where(values > 0, values, 1.0) if power < 0 else np.clip(values, 0.0, None)
    out = (vectors * safe[..., None, :] ** power) @ np.swapaxes(vectors, -1, -2)
    return out, ok


def _mean_squared_error(W: np.ndarray, sigma: np.ndarray, cross: np.ndarray, phi: np.ndarray) -> np.ndarray:
    """W' Sigma W - W' C - C' W + Phi with C = Cov(x, eta_F) (p, k) and Phi = Phi_FF."""
    WC = np.swapaxes(W, 1, 2) @ cross
    out = np.swapaxes(W, 1, 2) @ sigma @ W - WC - np.swapaxes(WC, 1, 2) + phi
    return 0.5 * (out + np.swapaxes(out, 1, 2))


def pattern_weights(model: ScoringModel, observed: np.ndarray, methods: tuple[ScoreMethod, ...]) -> dict[ScoreMethod, PatternWeights]:
    """Weights of each linear method for each pattern of answered items (``observed``: (P, p) bool,
    every pattern with at least one answer)."""
    sigma = checked_covariance(model)
    found = embedded_inverse(sigma, observed)
    if found is None:
        raise EstimationError("the model's implied covariance matrix of the answered items is not positive definite")
    S = found[0]  # (P, p, p)
    L, phi = model.loadings, model.factor_covariance
    P, (p, m) = len(observed), L.shape
    R = S @ L  # (P, p, m)
    K = L.T @ R  # (P, m, m) = L' S_o L
    K = 0.5 * (K + np.swapaxes(K, 1, 2))
    cross = model.item_factor_covariance
    out = {}
    F = np.flatnonzero(model.measured)
    higher = np.flatnonzero(~model.measured)
    for method in methods:
        W = np.full((P, p, m), np.nan)
        mse = np.full((P, m, m), np.nan)
        unscored = np.full((P, m), None, dtype=object)
        if method is ScoreMethod.REGRESSION:
            W = R @ phi
            mse = _mean_squared_error(W, sigma, cross, phi)
        else:
            unscored[:, higher] = Unscored.HIGHER_ORDER
            KFF = K[:, F[:, None], F[None, :]]
            phiFF = phi[np.ix_(F, F)]
            if method is ScoreMethod.BARTLETT:
                inv, ok = _sym_power(KFF, -1.0)
                WF = R[:, :, F] @ inv
            elif method is ScoreMethod.CORRELATION_PRESERVING:
                half, half_ok = _sym_power(phiFF[None], 0.5)
                half = half[0]
                inner, ok = _sym_power(half @ KFF @ half, -0.5)
                ok = ok & half_ok[0]
                WF = R[:, :, F] @ (half @ inner @ half)
            else:
                raise ValueError(f"{method} is not a linear scoring method")
            good = np.flatnonzero(ok)
            W[np.ix_(good, np.arange(p), F)] = WF[good]
            mse[np.ix_(good, F, F)] = _mean_squared_error(WF[good], sigma, cross[:, F], phiFF)
            unscored[np.ix_(np.flatnonzero(~ok), F)] = Unscored.TOO_FEW_ANSWERS
        out[method] = PatternWeights(method, W, mse, unscored)
    return out
