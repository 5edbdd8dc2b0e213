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

    def pair_covariance_times(self, X: np.ndarray) -> np.ndarray:
        """Gamma X for X of shape (pairs, k), Gamma the asymptotic covariance of sqrt(N)(r - rho): the one given,
        else the normal-theory one (:func:`normal_theory_product`), which is never made whole (at 200 items it would
        be 19,900 x 19,900, 3.2 GB, several times over in its making)."""
        if self.gamma is not None:
            return self.gamma @ X
        return normal_theory_product(self.correlations, X)


def normal_theory_product(R: np.ndarray, X: np.ndarray) -> np.ndarray:
    """Gamma X for the asymptotic covariance Gamma of sqrt(N)(r - rho) of Pearson correlations of normal data
    (Pearson & Filon 1898; Olkin & Siotani 1976; the module docstring's formula), evaluated at R, without Gamma.

    r_ij - rho_ij = e_ij - r_ij (e_ii + e_jj) / 2 to first order in the covariances' deviations e (unit variances),
    whose normal-theory covariances are cov(e_ij, e_kl) = r_ik r_jl + r_il r_jk (Anderson 1958, ch. 3); so for a
    column x of X, with S the symmetric matrix of x off the diagonal and M = S / 2 - diag((S o R) 1) / 2,
    (Gamma x)_ij = G_ij - r_ij (G_ii + G_jj) / 2 with G = 2 R M R: p^3 per column where Gamma is pairs^2."""
    from cfa_tool.exploration.correlation_structure import pair_matrix_map

    p = len(R)
    idx = np.arange(p)

    def function(S: np.ndarray) -> np.ndarray:
        M = 0.5 * S
        M[:, idx, idx] = -0.5 * np.einsum("bij,ij->bi", S, R)
        G = 2.0 * (R @ M @ R)
        diagonal = G[:, idx, idx]
        return G - 0.5 * R * (diagonal[:, :, None] + diagonal[:, None, :])

    return pair_matrix_map(np.asarray(X, dtype=float), p, function)


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
        from cfa_tool.data.kept_rows import too_few_rows  # a matrix's sample size: rows no filter of this run chose

        raise DataError(f"{source}: " + too_few_rows(None, n_obs, p, "", "item", "an exploratory factor analysis "
                                                     "needs far more rows than items"))
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
