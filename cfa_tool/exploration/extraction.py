"""Unrotated factors: maximum likelihood and least squares on a correlation matrix.

Both minimise a discrepancy over the uniquenesses psi alone (the profile approach of
Joreskog 1967): for given psi the best loadings come from an eigen decomposition, and the
gradient with respect to psi has a closed form (by the envelope theorem).

* Maximum likelihood (Joreskog 1967; Lawley & Maxwell 1971).  With gamma_1 >= ... >= gamma_p
  the eigenvalues and omega the eigenvectors of Psi^-1/2 R Psi^-1/2,

      F(psi) = sum_{j>m} (gamma_j - log gamma_j - 1),
      dF/dpsi_i = (1/psi_i) sum_{j>m} (1 - gamma_j) omega_ij^2,
      L = Psi^1/2 Omega_m (Gamma_m - I)^1/2.

  F is the ML discrepancy log|Sigma| + tr(R Sigma^-1) - log|R| - p at the best loadings; it
  is scale free, so the loadings of R are the standardized loadings of the covariance matrix.
* Least squares (unweighted; minimum residual, Harman & Jones 1966; Harman 1976).  With gamma, omega the
  eigenpairs of R - Psi,

      F(psi) = 1/2 sum_{j>m} gamma_j^2,   dF/dpsi_i = -sum_{j>m} gamma_j omega_ij^2,
      L = Omega_m Gamma_m^1/2.

Uniquenesses are kept within [0.005, 1] (the lower bound is common practice).  A uniqueness
at the lower bound is a Heywood case (Heywood 1931): the item's communality is at least .995,
the solution is improper, and it is reported, never hidden.

The test of a maximum-likelihood solution is N F on ((p - m)^2 - (p + m)) / 2 degrees of
freedom (Lawley & Maxwell 1971; N F as in the confirmatory fits, without Bartlett's
correction), with the RMSEA and its interval from ``cfa_tool.assessment.fit_indices``.  On
polychoric correlations N F is not chi-square distributed; it is divided by the
Satorra-Bentler (1994) scaling factor c = tr(U Gamma) / df, U = V - V D (D'V D)^+ D'V, and
the RMSEA estimates the noncentrality as N F - c df (Brosseau-Liard, Savalei & Li 2012), as
``cfa_tool.inference.robust`` does for confirmatory fits.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from cfa_tool.assessment.fit_indices import (chi_square_p, normal_log_likelihood, rmsea_interval, rmsea_value,
                                             srmr_value)
from cfa_tool.errors import EstimationError, OptionError
from cfa_tool.numerics.linalg import spd_inverse
from cfa_tool.exploration import correlation_structure as cs
from cfa_tool.exploration.choices import CorrelationKind, ExtractionMethod, FitStatistic
from cfa_tool.exploration.correlations import CorrelationInput

LOWEST_UNIQUENESS = 0.005  # common practice
_AT_BOUND = 1e-6


@dataclass(frozen=True)
class SolutionFit:
    """How well an m-factor solution reproduces the correlations."""

    statistic: FitStatistic | None  # None: no test (least squares)
    discrepancy: float  # the minimised fit function
    chi_square: float  # N F, divided by the scaling factor when the statistic is mean-scaled
    df: int
    p_value: float
    scaling_factor: float  # 1 for normal theory
    rmsea: float
    rmsea_ci90: tuple[float, float]
    log_likelihood: float  # of the data (continuous items with their covariance matrix), else NaN
    bic: float  # -2 log-likelihood + q log N (Schwarz 1978), q = free parameters of the covariance structure
    srmr: float
    n_free_parameters: int


@dataclass(frozen=True, eq=False)
class FactorSolution:
    """An unrotated solution: loadings (standardized), uniquenesses and fit."""

    method: ExtractionMethod
    names: tuple[str, ...]
    loadings: np.ndarray  # p x m, columns by decreasing eigenvalue, each column's sum positive
    uniquenesses: np.ndarray
    at_bound: tuple[str, ...]  # items whose uniqueness reached the lower bound (Heywood cases)
    converged: bool
    iterations: int
    gradient_norm: float  # largest gradient component over uniquenesses inside their bounds
    fit: SolutionFit

    @property
    def factors(self) -> int:
        return self.loadings.shape[1]

    @property
    def communalities(self) -> np.ndarray:
        return (self.loadings**2).sum(axis=1)

    @property
    def implied(self) -> np.ndarray:
        return self.loadings @ self.loadings.T + np.diag(self.uniquenesses)


def degrees_of_freedom(p: int, m: int) -> int:
    """((p - m)^2 - (p + m)) / 2 (Lawley & Maxwell 1971)."""
    return ((p - m) ** 2 - (p + m)) // 2


def largest_factor_count(p: int) -> int:
    """The most factors with non-negative degrees of freedom (Ledermann 1937)."""
    m = 0
    while m + 1 < p and degrees_of_freedom(p, m + 1) >= 0:
        m += 1
    return m


def check_factor_count(factors: object, p: int) -> int:
    from cfa_tool.options import whole_number

    m = whole_number("the number of factors", factors, 1)
    top = largest_factor_count(p)
    if m > top:
        raise OptionError(f"the number of factors must be at most {top} with {p} items (beyond that the factor model has "
                          f"more parameters than correlations), not {m}")
    return m


def _ml_profile(psi: np.ndarray, R: np.ndarray, m: int) -> tuple[float, np.ndarray, np.ndarray, np.ndarray]:
    s = 1.0 / np.sqrt(psi)
    gam, vec = np.linalg.eigh(R * np.outer(s, s))
    rest = gam[: len(psi) - m]
    value = float(np.sum(rest - np.log(rest) - 1.0))
    gradient = (vec[:, : len(psi) - m] ** 2 @ (1.0 - rest)) / psi
    return value, gradient, gam, vec


def _ls_profile(psi: np.ndarray, R: np.ndarray, m: int) -> tuple[float, np.ndarray, np.ndarray, np.ndarray]:
    gam, vec = np.linalg.eigh(R - np.diag(psi))
    rest = gam[: len(psi) - m]
    return float(0.5 * np.sum(rest * rest)), -(vec[:, : len(psi) - m] ** 2 @ rest), gam, vec


def _loadings(method: ExtractionMethod, psi: np.ndarray, gam: np.ndarray, vec: np.ndarray, m: int) -> np.ndarray:
    top = gam[::-1][:m]
    vectors = vec[:, ::-1][:, :m]
    if method is ExtractionMethod.MAXIMUM_LIKELIHOOD:
        L = np.sqrt(psi)[:, None] * vectors * np.sqrt(np.maximum(top - 1.0, 0.0))
    else:
        L = vectors * np.sqrt(np.maximum(top, 0.0))
    signs = np.where(L.sum(axis=0) < 0, -1.0, 1.0)
    return L * signs


def starting_uniquenesses(R: np.ndarray, m: int) -> np.ndarray:
    """(1 - m / 2p) / (R^-1)_ii (Joreskog 1967)."""
    p = len(R)
    found = spd_inverse(R)
    diag = np.diag(found[0]) if found is not None else np.diag(np.linalg.pinv(R))
    return np.clip((1.0 - m / (2.0 * p)) / diag, LOWEST_UNIQUENESS, 1.0)


def extract(data: CorrelationInput, factors: int, method: ExtractionMethod = ExtractionMethod.MAXIMUM_LIKELIHOOD,
            start: np.ndarray | None = None) -> FactorSolution:
    """The unrotated m-factor solution of ``data.correlations`` by ``method``."""
    from scipy.optimize import minimize

    R = data.correlations
    p = data.p
    m = check_factor_count(factors, p)
    profile = _ml_profile if method is ExtractionMethod.MAXIMUM_LIKELIHOOD else _ls_profile
    psi0 = starting_uniquenesses(R, m) if start is None else np.clip(np.asarray(start, dtype=float), LOWEST_UNIQUENESS, 1.0)
    cache: dict = {}

    def fun(psi):
        value, gradient, gam, vec = profile(psi, R, m)
        cache["last"] = (psi.copy(), gam, vec)
        return value, gradient

    result = minimize(fun, psi0, jac=True, method="L-BFGS-B", bounds=[(LOWEST_UNIQUENESS, 1.0)] * p,
                      options={"maxiter": 10_000, "ftol": 1e-15, "gtol": 1e-10, "maxcor": 20})
    psi = np.clip(result.x, LOWEST_UNIQUENESS, 1.0)
    value, gradient, gam, vec = profile(psi, R, m)
    if not np.isfinite(value):
        raise EstimationError(f"the {m}-factor {method.value} solution could not be computed")
    free = (psi > LOWEST_UNIQUENESS + _AT_BOUND) & (psi < 1.0 - _AT_BOUND)
    gradient_norm = float(np.max(np.abs(gradient[free]))) if free.any() else 0.0
    L = _loadings(method, psi, gam, vec, m)
    if method is ExtractionMethod.MAXIMUM_LIKELIHOOD:
        # the uniquenesses that make diag(Sigma) = 1 where psi is interior (a property of the ML solution)
        psi = np.where(free, 1.0 - (L**2).sum(axis=1), psi)
    at_bound = tuple(data.names[i] for i in np.flatnonzero(psi <= LOWEST_UNIQUENESS + _AT_BOUND))
    converged = bool(result.success or gradient_norm < 1e-6)
    fit = solution_fit(data, method, L, psi)
    return FactorSolution(method, data.names, L, psi, at_bound, converged, int(result.nit), gradient_norm, fit)


def solution_fit(data: CorrelationInput, method: ExtractionMethod, L: np.ndarray, psi: np.ndarray) -> SolutionFit:
    """Fit of the solution Sigma = L L' + Psi to the correlations (see the module's docstring)."""
    R, N, p = data.correlations, data.n_obs, data.p
    m = L.shape[1]
    sigma = L @ L.T + np.diag(psi)
    df = degrees_of_freedom(p, m)
    q = p * m + p - m * (m - 1) // 2
    srmr = srmr_value(R, sigma)
    nan = float("nan")
    if method is not ExtractionMethod.MAXIMUM_LIKELIHOOD:
        residual = R - sigma
        return SolutionFit(None, float(0.5 * np.vdot(residual, residual)), nan, df, nan, nan, nan, (nan, nan), nan, nan,
                           srmr, q)
    found = spd_inverse(sigma)
    if found is None:
        raise EstimationError(f"the implied correlation matrix of the {m}-factor solution is not positive definite")
    W, log_det = found
    discrepancy = float(log_det + np.vdot(R, W) - np.linalg.slogdet(R)[1] - p)
    T = N * max(discrepancy, 0.0)
    if data.kind is CorrelationKind.PEARSON:
        log_lik = normal_log_likelihood(R, sigma, N) - 0.5 * N * data.log_variance_sum
        return SolutionFit(FitStatistic.NORMAL_THEORY, discrepancy, T, df, chi_square_p(T, df), 1.0,
                           rmsea_value(T, df, N), rmsea_interval(T, df, N), log_lik, float(-2.0 * log_lik + q * np.log(N)), srmr,
                           q)
    c = scaling_factor(data, L, W, df)
    scaled = T / c if df > 0 else nan
    if df > 0:
        rmsea = float(np.sqrt(max(T - c * df, 0.0) / (N * df)))
        low, high = rmsea_interval(scaled, df, N)
        interval = (float(low * np.sqrt(c)), float(high * np.sqrt(c)))
    else:
        rmsea, interval = nan, (nan, nan)
    return SolutionFit(FitStatistic.MEAN_SCALED, discrepancy, scaled, df, chi_square_p(scaled, df), float(c), rmsea,
                       interval, nan, nan, srmr, q)


def scaling_factor(data: CorrelationInput, L: np.ndarray, W: np.ndarray, df: int) -> float:
    """c = tr(U Gamma) / df, U = V - V D (D'V D)^+ D'V (Satorra & Bentler 1994), with D the
    derivatives of the implied correlations at the unrotated loadings (a rank deficiency of
    m(m-1)/2 from rotation, hence the pseudo-inverse) and V the ML weight of the pairs.  No matrix of the pairs by
    the pairs is made beside a given Gamma (polychoric input, the only one a solution's fit scales)."""
    if df <= 0:
        return float("nan")
    m = L.shape[1]
    delta = cs.jacobian(L, np.eye(m), oblique=False)
    VD = cs.weighted(delta, W)
    bread = delta.T @ VD
    meat = VD.T @ data.pair_covariance_times(VD)
    trace = cs.weight_trace(W, data.gamma if data.gamma is not None else data.pair_covariance_times)  # V never whole
    return float((trace - np.vdot(np.linalg.pinv(bread, rcond=1e-9, hermitian=True), meat)) / df)
