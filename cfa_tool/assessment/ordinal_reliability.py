"""Reliability of the observed sum of ordinal items (Green & Yang 2009).

The omega of an ordinal fit's reliability table describes the sum of the latent responses behind the items, which
no one can compute.  The score a researcher uses is the sum of the answers' codes, X = sum_i k_i x_i (k_i = -1 for a
reversed item).  Its reliability, the share of Var(X) due to the factor f, is the nonlinear SEM reliability of
Green & Yang (2009, eq. 21), from the fitted thresholds, loadings and factor variance.  With answer i coded v_i0 <
v_i1 < ... and d_ic = v_ic - v_i,c-1 the steps between consecutive codes, x_i = v_i0 + sum_c d_ic [y*_i > tau_ic],
so that

    Cov(x_i, x_j)            = sum_c sum_c' d_ic d_jc' (Phi2(t_ic, t_jc'; rho_ij)   - Phi(t_ic) Phi(t_jc')),
    Cov(E[x_i|f], E[x_j|f])  = sum_c sum_c' d_ic d_jc' (Phi2(t_ic, t_jc'; rho*_ij)  - Phi(t_ic) Phi(t_jc')),

where t_ic = (tau_ic - mu_i) / sigma_i are the thresholds standardized by the latent response's implied mean and
standard deviation, rho_ij = Sigma_ij / (sigma_i sigma_j) its implied correlation (1 for i = j) and
rho*_ij = C_if C_jf / (Phi_ff sigma_i sigma_j) the part of it due to f, with C_if = Cov(y*_i, f) (G_if Phi_ff for an
item that measures f alone, Green & Yang 2009, eqs. 19-21; an item that also loads on another factor correlated with
f adds its covariance with f through that one, as reliability.keyed_omega does for continuous items; the second
line holds because two answers given f are independent, and P(y*_i > a, y*_j > b) - P(y*_i > a) P(y*_j > b) is the
same with lower tails).  The coefficient is the keyed sum of the second line over the keyed sum of the first, both
from the model (not from the sample's answers), so that it describes the fitted model's observed sum.

For a higher-order factor f the same lines, over the items of the factors it explains and with C_if = Cov(y*_i, f)
through the higher-order paths (model.implied.ModelMatrices.item_factor_covariance), give the share of the sum's
variance due to f alone: the omega hierarchical of the observed sum (Zinbarg, Revelle, Yovel & Li 2005, for the
continuous sum; the reliability table's latent-response column gives it beside).
"""

from __future__ import annotations

from dataclasses import replace
from typing import Sequence

import numpy as np
from scipy import special

from cfa_tool.assessment.reliability import FactorReliability
from cfa_tool.model.implied import ModelMatrices
from cfa_tool.numerics.bivariate import bivariate_cdf


def _keyed_codes(thresholds: Sequence[np.ndarray], steps: Sequence[np.ndarray], mean: np.ndarray, sd: np.ndarray,
                 keys: np.ndarray) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """(item, t, d): for every threshold of the items, its item, its standardized value t_ic and its keyed step
    k_i d_ic (module docstring)."""
    item = np.concatenate([np.full(len(t), i) for i, t in enumerate(thresholds)])
    t = np.concatenate([(np.asarray(t, float) - mean[i]) / sd[i] for i, t in enumerate(thresholds)])
    d = np.concatenate([np.asarray(s, float) for s in steps]) * np.asarray(keys, float)[item]
    return item, t, d


def _sum_variance(item: np.ndarray, t: np.ndarray, d: np.ndarray, rho: np.ndarray, whole: bool) -> float:
    """The first line of the module docstring summed over the keyed items: Var(X) under the model (``rho``: the
    latent responses' correlations, or the part of them due to the factor for Var(E[X | f]))."""
    h, k = np.meshgrid(t, t, indexing="ij")
    joint = bivariate_cdf(h, k, rho[np.ix_(item, item)])
    same = item[:, None] == item[None, :]
    if whole:  # the whole correlations: one latent response with itself correlates 1 exactly
        joint[same] = special.ndtr(np.minimum(h, k))[same]
    return float(d @ (joint - np.outer(special.ndtr(t), special.ndtr(t))) @ d)


def observed_sum_variance(thresholds: Sequence[np.ndarray], steps: Sequence[np.ndarray], mean: np.ndarray,
                          sigma: np.ndarray, keys: np.ndarray) -> float:
    """Var(X) of the keyed sum of ordinal answers under the fitted model, the denominator of
    :func:`observed_sum_omega` (Green & Yang 2009, eq. 19; arguments as there)."""
    sd = np.sqrt(np.diag(sigma))
    item, t, d = _keyed_codes(thresholds, steps, mean, sd, keys)
    return _sum_variance(item, t, d, sigma / np.outer(sd, sd), whole=True)


def due_to_factor(with_factor: np.ndarray, factor_variance: float) -> np.ndarray:
    """The latent responses' covariances due to the factor f, Cov(E[y*_i | f], E[y*_j | f]) = C_if C_jf / Phi_ff,
    from their covariances with f (``with_factor``: C_f = (L Phi)_f) and its variance (the module docstring)."""
    c = np.asarray(with_factor, dtype=float)
    return np.outer(c, c) / factor_variance


def observed_sum_omega(thresholds: Sequence[np.ndarray], steps: Sequence[np.ndarray], mean: np.ndarray,
                       sigma: np.ndarray, common: np.ndarray, keys: np.ndarray) -> float:
    """Green & Yang's (2009) reliability of the keyed sum of ordinal answers (module docstring).

    For the items of one factor: ``thresholds[i]`` item i's thresholds on its latent response's scale, ``steps[i]``
    the differences of its consecutive answer codes (one per threshold), ``mean`` and ``sigma`` the latent
    responses' implied means and covariance matrix, ``common`` the covariance due to the factor
    (:func:`due_to_factor`) and ``keys`` +1 or -1 per item."""
    return observed_sum_reliability(thresholds, steps, mean, sigma, common, keys)[0]


def observed_sum_reliability(thresholds: Sequence[np.ndarray], steps: Sequence[np.ndarray], mean: np.ndarray,
                             sigma: np.ndarray, common: np.ndarray, keys: np.ndarray) -> tuple[float, float]:
    """(:func:`observed_sum_omega`, :func:`observed_sum_variance`) of one keyed sum, the variance computed once
    (Green & Yang 2009, eqs. 19-21; arguments as for :func:`observed_sum_omega`)."""
    sd = np.sqrt(np.diag(sigma))
    item, t, d = _keyed_codes(thresholds, steps, mean, sd, keys)
    total = _sum_variance(item, t, d, sigma / np.outer(sd, sd), whole=True)
    due = _sum_variance(item, t, d, common / np.outer(sd, sd), whole=False)
    return (due / total if total > 0 else float("nan")), total


def observed_sum_factor_correlation(thresholds: Sequence[np.ndarray], steps: Sequence[np.ndarray], mean: np.ndarray,
                                    sigma: np.ndarray, with_factor: np.ndarray, factor_variance: float,
                                    keys: np.ndarray) -> float:
    """The correlation of the keyed sum of ordinal answers X with the factor f under the fitted model, the
    counterpart of a factor score's correlation with its factor (Grice 2001): Cov(X, f) = sum_i k_i sum_c d_ic
    phi(t_ic) Cov(y*_i, f) / sigma_i, since for a bivariate normal pair Cov([y* > tau], f) = phi(t) Cov(y*, f) /
    sigma (Stein's lemma), and Var(X) as in :func:`observed_sum_omega`.  Unlike that omega, whose true score
    E[X | f] is a curved function of f when answers are categories, this is the sum's linear agreement with the
    factor itself.  ``with_factor``: Cov(y*_i, f) of the items (their loadings times the factor's covariances)."""
    sd = np.sqrt(np.diag(sigma))
    item, t, d = _keyed_codes(thresholds, steps, mean, sd, keys)
    variance = _sum_variance(item, t, d, sigma / np.outer(sd, sd), whole=True)
    density = np.exp(-0.5 * t**2) / np.sqrt(2.0 * np.pi)
    covariance = float(d @ (density * (np.asarray(with_factor, float) / sd)[item]))
    if variance <= 0 or factor_variance <= 0:
        return float("nan")
    return covariance / np.sqrt(variance * factor_variance)


def with_observed_sum_omega(factors: Sequence[FactorReliability], mats: ModelMatrices, observed: tuple[str, ...],
                            latent: tuple[str, ...], thresholds: dict[str, np.ndarray], codes: dict[str, np.ndarray],
                            mean: np.ndarray | None = None) -> tuple[FactorReliability, ...]:
    """``factors`` with the observed-sum omega of each factor whose items are all ordinal (``thresholds`` and answer
    ``codes`` by item; continuous items beside them have neither), a higher-order factor's over the items of the
    factors it explains, its omega hierarchical (module docstring; s23: none was computed, and the methods paragraph
    left the factor out while the table showed its latent-response omega); ``mean``: the latent responses' implied
    means (0 when None, as in one group)."""
    sigma = mats.implied_covariance()
    phi = mats.latent_covariance()
    C = mats.item_factor_covariance()  # the latent responses' covariances with the factors
    mean = np.zeros(len(observed)) if mean is None else np.asarray(mean, float)
    out = []
    for r in factors:
        if not all(x in thresholds for x in r.items):
            out.append(r)
            continue
        f = latent.index(r.factor)
        idx = [observed.index(x) for x in r.items]
        value = observed_sum_omega([thresholds[x] for x in r.items], [np.diff(codes[x]) for x in r.items], mean[idx],
                                   sigma[np.ix_(idx, idx)], due_to_factor(C[idx, f], phi[f, f]),
                                   np.array([-1.0 if x in r.reversed else 1.0 for x in r.items]))
        out.append(replace(r, observed_sum_omega=value))
    return tuple(out)
