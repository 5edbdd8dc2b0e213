"""Ordinal items: thresholds, polychoric correlations and their asymptotic covariance.

Two-step estimation (Olsson 1979): each item's thresholds from its cumulative
proportions, tau_c = Phi^-1(P(x <= c)); then each pair's correlation by
maximising the bivariate-normal likelihood of its contingency table with the
thresholds held fixed.  The asymptotic covariance matrix of the correlations
comes from their influence functions, corrected for the estimated thresholds
(Muthen 1984; Joreskog 1994):

    IF(rho)_n = I_rr^-1 (s_n - I_rt IF(tau)_n),   IF(tau_c)_n = (1{x_n <= c} - F_c) / phi(tau_c)

with s_n the case's score for rho and I the expected information of the pair's
likelihood; Gamma = mean of IF IF'.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np
import pandas as pd
from scipy import optimize, stats

from cfa_tool.data.moments import numeric_columns
from cfa_tool.errors import DataError
from cfa_tool.estimation.bivariate import bivariate_cdf, bivariate_pdf

MAX_CATEGORIES = 15


@dataclass(frozen=True, eq=False)
class OrdinalMoments:
    names: tuple[str, ...]
    n_obs: int
    rows_read: int
    rows_dropped: int
    source: str
    categories: tuple[tuple[float, ...], ...]
    thresholds: tuple[np.ndarray, ...]
    correlations: np.ndarray
    gamma: np.ndarray  # asymptotic covariance of sqrt(N)(r - rho), pairs in np.tril_indices(p, -1) order
    codes: np.ndarray = field(repr=False)

    @property
    def pairs(self) -> tuple[np.ndarray, np.ndarray]:
        return np.tril_indices(len(self.names), -1)


def _extended(tau: np.ndarray) -> np.ndarray:
    return np.concatenate([[-np.inf], tau, [np.inf]])


def cell_probabilities(ti: np.ndarray, tj: np.ndarray, rho: float) -> np.ndarray:
    a, b = _extended(ti), _extended(tj)
    F = bivariate_cdf(a[:, None], b[None, :], rho)
    return np.clip(F[1:, 1:] - F[:-1, 1:] - F[1:, :-1] + F[:-1, :-1], 1e-300, None)


def _rho_derivative(ti, tj, rho) -> np.ndarray:
    a, b = _extended(ti), _extended(tj)
    f = bivariate_pdf(a[:, None], b[None, :], rho)
    f[~np.isfinite(a), :] = 0.0
    f[:, ~np.isfinite(b)] = 0.0
    return f[1:, 1:] - f[:-1, 1:] - f[1:, :-1] + f[:-1, :-1]


def _threshold_derivative(ti, tj, rho) -> np.ndarray:
    """d pi_ab / d tau_i,c for every threshold c of item i: shape (len(ti), Ki, Kj)."""
    b = _extended(tj)
    s = np.sqrt(1.0 - rho**2)
    out = np.zeros((len(ti), len(ti) + 1, len(tj) + 1))
    for c, t in enumerate(ti):
        cond = stats.norm.cdf((b - rho * t) / s)
        strip = stats.norm.pdf(t) * (cond[1:] - cond[:-1])  # d/dt of P(x <= t, b_k < y <= b_k+1)
        out[c, c, :] += strip  # cell a = c has upper limit tau_c
        out[c, c + 1, :] -= strip  # cell a = c + 1 has lower limit tau_c
    return out


def polychoric_pair(table: np.ndarray, ti: np.ndarray, tj: np.ndarray) -> float:
    def negative(rho):
        return -float(np.sum(table * np.log(cell_probabilities(ti, tj, rho))))

    result = optimize.minimize_scalar(negative, bounds=(-0.999, 0.999), method="bounded", options={"xatol": 1e-10})
    return float(result.x)


def ordinal_moments(frame: pd.DataFrame, names: tuple[str, ...], source: str) -> OrdinalMoments:
    values = numeric_columns(frame, names, source)
    complete = ~np.isnan(values).any(axis=1)
    data = values[complete]
    n, p = data.shape
    if n <= p:
        raise DataError(f"{source}: {n} complete rows for {p} ordinal items; more rows are needed")
    codes = np.zeros_like(data, dtype=int)
    categories, thresholds, threshold_if = [], [], []
    for j, name in enumerate(names):
        levels = np.unique(data[:, j])
        if len(levels) < 2:
            raise DataError(f"{source}: ordinal item '{name}' has a single category ({levels[0]:g}); it needs at least two")
        if len(levels) > MAX_CATEGORIES:
            raise DataError(f"{source}: ordinal item '{name}' has {len(levels)} categories; with more than "
                            f"{MAX_CATEGORIES} treat it as continuous")
        codes[:, j] = np.searchsorted(levels, data[:, j])
        counts = np.bincount(codes[:, j], minlength=len(levels))
        cumulative = np.cumsum(counts)[:-1] / n
        tau = stats.norm.ppf(cumulative)
        categories.append(tuple(float(v) for v in levels))
        thresholds.append(tau)
        below = (codes[:, j][:, None] <= np.arange(len(tau))[None, :]).astype(float)
        threshold_if.append((below - cumulative[None, :]) / stats.norm.pdf(tau)[None, :])
    rows_i, cols_j = np.tril_indices(p, -1)
    R = np.eye(p)
    influence = np.zeros((n, len(rows_i)))
    for k, (i, j) in enumerate(zip(rows_i, cols_j)):
        table = np.zeros((len(categories[i]), len(categories[j])))
        np.add.at(table, (codes[:, i], codes[:, j]), 1.0)
        rho = polychoric_pair(table, thresholds[i], thresholds[j])
        R[i, j] = R[j, i] = rho
        pi = cell_probabilities(thresholds[i], thresholds[j], rho)
        d_rho = _rho_derivative(thresholds[i], thresholds[j], rho)
        info_rr = float(np.sum(d_rho**2 / pi))
        score = d_rho[codes[:, i], codes[:, j]] / pi[codes[:, i], codes[:, j]]
        correction = np.zeros(n)
        for item, other, d_tau in ((i, j, _threshold_derivative(thresholds[i], thresholds[j], rho)),
                                   (j, i, _threshold_derivative(thresholds[j], thresholds[i], rho).transpose(0, 2, 1))):
            info_rt = np.einsum("ab,cab->c", d_rho / pi, d_tau)
            correction += threshold_if[item] @ info_rt
        influence[:, k] = (score - correction) / info_rr
    gamma = influence.T @ influence / n
    if np.linalg.eigvalsh(R)[0] <= 0:
        raise DataError(f"{source}: the polychoric correlation matrix is not positive definite; "
                        f"some items may be near duplicates or some categories nearly empty")
    return OrdinalMoments(tuple(names), n, len(frame), int((~complete).sum()), source, tuple(categories), tuple(thresholds),
                          R, gamma, codes)
