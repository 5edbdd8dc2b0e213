"""The matrix an exploratory factor analysis works on: correlations, the sample size and, for
standard errors and scaled tests, the asymptotic covariance of the correlations.

Continuous items: Pearson correlations from the divisor-N covariance matrix; under
multivariate normality the asymptotic covariance of sqrt(N)(r - rho) is, for pairs (i, j)
and (k, l) (Pearson & Filon 1898; Olkin & Siotani 1976),

    1/2 r_ij r_kl (r_ik^2 + r_il^2 + r_jk^2 + r_jl^2) + r_ik r_jl + r_il r_jk
      - r_ij (r_ik r_il + r_jk r_jl) - r_kl (r_ik r_jk + r_il r_jl),

which for one pair is (1 - r^2)^2.  Ordinal items: polychoric correlations and their
asymptotic covariance from ``cfa_tool.data.polychoric`` (Olsson 1979; Muthén 1984).
Pairs are in ``numpy.tril_indices(p, -1)`` order throughout.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from cfa_tool.errors import DataError
from cfa_tool.numerics.linalg import cholesky_log_det
from cfa_tool.exploration.choices import CorrelationKind


@dataclass(frozen=True, eq=False)
class CorrelationInput:
    """Correlations of the items to explore, with what the analysis needs to know about them."""

    names: tuple[str, ...]
    correlations: np.ndarray  # p x p, unit diagonal, positive definite
    n_obs: int
    kind: CorrelationKind
    source: str = "<data>"
    #: sum of the log variances (divisor N) of Pearson input, so that log|S| = log|R| + this
    log_variance_sum: float = 0.0
    #: asymptotic covariance of sqrt(N)(r - rho) over the pairs; None: normal theory from the correlations
    gamma: np.ndarray | None = None
    ordinal: tuple[str, ...] = ()  # items treated as ordinal
    #: every item ordinal: the answers' category codes (N, p; -1 for no answer) and each item's thresholds, for a
    #: parallel analysis of shuffled answers (None otherwise)
    codes: np.ndarray | None = None
    thresholds: tuple[np.ndarray, ...] | None = None

    @property
    def p(self) -> int:
        return len(self.names)

    def pair_covariance(self) -> np.ndarray:
        """The asymptotic covariance of sqrt(N)(r - rho): the one given, else the normal-theory one."""
        return self.gamma if self.gamma is not None else normal_theory_gamma(self.correlations)


def normal_theory_gamma(R: np.ndarray) -> np.ndarray:
    """Asymptotic covariance of sqrt(N)(r - rho) for Pearson correlations of normal data
    (Pearson & Filon 1898; Olkin & Siotani 1976), evaluated at R."""
    i, j = np.tril_indices(len(R), -1)
    rik, ril = R[i][:, i], R[i][:, j]
    rjk, rjl = R[j][:, i], R[j][:, j]
    rij = R[i, j]
    a, b = rij[:, None], rij[None, :]
    return (0.5 * a * b * (rik * rik + ril * ril + rjk * rjk + rjl * rjl) + rik * rjl + ril * rjk
            - a * (rik * ril + rjk * rjl) - b * (rik * rjk + ril * rjl))


def _checked(R: np.ndarray, names: tuple[str, ...], n_obs: int, source: str) -> np.ndarray:
    R = np.asarray(R, dtype=float)
    p = len(names)
    if R.shape != (p, p):
        raise DataError(f"{source}: the correlation matrix is {R.shape[0]} x {R.shape[1]} for {p} items")
    if p < 3:
        raise DataError(f"{source}: an exploratory factor analysis needs at least 3 items, not {p}")
    if not np.all(np.isfinite(R)) or not np.allclose(R, R.T, atol=1e-10) or not np.allclose(np.diag(R), 1.0, atol=1e-10):
        raise DataError(f"{source}: the correlations must form a finite symmetric matrix with ones on the diagonal")
    if n_obs <= p:
        raise DataError(f"{source}: {n_obs} rows for {p} items; an exploratory factor analysis needs far more rows than items")
    if cholesky_log_det(R) is None:
        raise DataError(f"{source}: the correlation matrix is not positive definite; some items are exact or near "
                        f"combinations of others (drop one of them)")
    R = 0.5 * (R + R.T)
    np.fill_diagonal(R, 1.0)
    return R


def from_covariance(covariance: np.ndarray, n_obs: int, names: tuple[str, ...], source: str = "<data>") -> CorrelationInput:
    """Pearson input from a divisor-N covariance matrix (e.g. ``SampleMoments.covariance``)."""
    S = np.asarray(covariance, dtype=float)
    variances = np.diag(S)
    if np.any(~np.isfinite(variances)) or np.any(variances <= 0):
        raise DataError(f"{source}: every item needs a positive variance")
    sd = np.sqrt(variances)
    R = _checked(S / np.outer(sd, sd), tuple(names), int(n_obs), source)
    return CorrelationInput(tuple(names), R, int(n_obs), CorrelationKind.PEARSON, source, float(np.log(variances).sum()))


def from_sample_moments(moments) -> CorrelationInput:
    """Pearson input from ``cfa_tool.data.moments.SampleMoments`` (complete rows or EM moments)."""
    return from_covariance(moments.covariance, moments.n_obs, moments.names, moments.source)


def from_ordinal_moments(moments) -> CorrelationInput:
    """Polychoric input from ``cfa_tool.data.polychoric.OrdinalMoments``, with its asymptotic covariance."""
    R = _checked(moments.correlations, tuple(moments.names), moments.n_obs, moments.source)
    ordinal = tuple(name for name in moments.names if name not in moments.continuous)
    every = not moments.continuous and moments.codes is not None
    return CorrelationInput(tuple(moments.names), R, int(moments.n_obs), CorrelationKind.POLYCHORIC, moments.source,
                            0.0, np.asarray(moments.gamma, dtype=float), ordinal,
                            np.asarray(moments.codes) if every else None,
                            tuple(np.asarray(t, float) for t in moments.thresholds) if every else None)


def from_correlations(R: np.ndarray, n_obs: int, names: tuple[str, ...], source: str = "<data>") -> CorrelationInput:
    """Pearson input from a correlation matrix alone (summary data); log-likelihoods then refer to the correlations."""
    return CorrelationInput(tuple(names), _checked(R, tuple(names), int(n_obs), source), int(n_obs), CorrelationKind.PEARSON,
                            source)
