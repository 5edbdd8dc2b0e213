"""Robust corrections with incomplete data: Huber-White (sandwich) standard errors
and the Yuan-Bentler scaled chi-square (Yuan & Bentler 2000), from each row's
score.

Work in the moments beta = (mu, vech Sigma).  Row i contributes
f_i = log|Sigma_oo| + r_i' A_i r_i (A_i = Sigma_oo^-1 embedded in p x p, u_i = A_i r_i), whose
derivatives are df_i/dmu = -2 u_i and df_i/dsigma_jk = (A_i - u_i u_i')_jk, doubled off
the diagonal.  With A the per-row information in beta (patterns held fixed),
B = S'S / N the mean outer product of the row scores, and D = d beta / d theta:

* Cov(theta) = (D'AD)^-1 D'BD (D'AD)^-1 / N;
* c = [tr(A_s^-1 B_s) - tr((D'AD)^-1 D'BD)] / (2 df), A_s and B_s those of the
  saturated model at its estimates; the scaled statistic is T / c.  Under
  normality B = 2A and c = 1.

With a sampling design, A is weighted and B is the design-based meat of
cfa_tool.inference.design (Asparouhov 2005).
"""

from __future__ import annotations

import numpy as np

from cfa_tool.data.em import weighted_available_moments
from cfa_tool.estimation.fiml import MissingDataLikelihood, MissingParts, _trace_weights
from cfa_tool.inference.design import design_meat
from cfa_tool.numerics.linalg import scaled_inverse
from cfa_tool.data.patterns import PatternData, embedded_inverse
from cfa_tool.inference.robust import vech_indices


def _moment_directions(p: int) -> tuple[np.ndarray, np.ndarray]:
    """d Sigma and d mu for each element of beta = (mu, vech Sigma)."""
    I, J = vech_indices(p)
    k = p + len(I)
    d_sigma = np.zeros((k, p, p))
    d_mu = np.zeros((k, p))
    d_mu[np.arange(p), np.arange(p)] = 1.0
    rows = p + np.arange(len(I))
    d_sigma[rows, I, J] = 1.0
    d_sigma[rows, J, I] = 1.0
    return d_sigma, d_mu


def moment_scores(data: PatternData, mu: np.ndarray, sigma: np.ndarray) -> tuple[np.ndarray, MissingParts]:
    """Row scores in beta (N x k) and the patterns' pieces for the information at (mu, Sigma)."""
    A_patterns, _ = embedded_inverse(sigma, data.observed)
    rows = data.rows
    observed = ~np.isnan(rows)
    resid = np.where(observed, rows - mu, 0.0)
    u = np.einsum("rij,rj->ri", A_patterns[data.index], resid)
    I, J = vech_indices(len(mu))
    scale = np.where(I == J, 1.0, 2.0)
    # (A_i - u_i u_i') in vech order, without forming every row's p x p matrix
    scores = np.hstack([-2.0 * u, (A_patterns[:, I, J][data.index] - u[:, I] * u[:, J]) * scale])
    w = data.counts / data.counts.sum()
    p = A_patterns.shape[1]
    parts = MissingParts(np.zeros((p, p)), np.zeros(p), _trace_weights(A_patterns, A_patterns, w),
                         np.tensordot(w, A_patterns, axes=1))
    return scores, parts


def _trace_term(scores: np.ndarray, parts: MissingParts, D: np.ndarray | None, design=None,
                ) -> tuple[float, np.ndarray, np.ndarray]:
    """tr((D'AD)^-1 D'BD) with its bread (D'AD)^-1 and meat D'BD (D = None: the saturated model itself)."""
    d_sigma, d_mu = _moment_directions(len(parts.mean_weight))
    A = parts.information(d_sigma, d_mu)
    B = design_meat(scores, design)
    if D is not None:
        A = D.T @ A @ D
        B = D.T @ B @ D
    bread = scaled_inverse(A)
    return float(np.sum(bread * B.T)), bread, B


def _model_directions(likelihood: MissingDataLikelihood, theta: np.ndarray, g: int) -> np.ndarray:
    d_sigma, d_mu = likelihood.model.jacobian(theta, g)
    I, J = vech_indices(likelihood.p)
    return np.hstack([d_mu, d_sigma[:, I, J]]).T  # (k, q)


def robust_missing(likelihood: MissingDataLikelihood, theta: np.ndarray, saturated, df: int, base_df: int | None,
                   ) -> tuple[np.ndarray, float, float]:
    """(Huber-White covariance of theta, scaling factor of the model, scaling factor of the baseline), the
    factors (sat - model) / (2 df) from the trace terms summed over groups; ``base_df`` None: the baseline's
    factor is not wanted (NaN)."""
    q = len(theta)
    bread_total = np.zeros((q, q))
    meat_total = np.zeros((q, q))
    trace_sat = trace_base = 0.0
    for g, data in enumerate(likelihood.patterns):
        w = likelihood.weights[g]
        mats = likelihood.model.matrices(theta, g)
        scores, parts = moment_scores(data, mats.implied_mean(), mats.implied_covariance())
        D = _model_directions(likelihood, theta, g)
        d_sigma, d_mu = _moment_directions(likelihood.p)
        A = D.T @ parts.information(d_sigma, d_mu) @ D
        design = likelihood.groups[g].design
        B = D.T @ design_meat(scores, design) @ D
        bread_total += w * A
        meat_total += w * B
        mu_s, sigma_s = saturated[g]
        s_scores, s_parts = moment_scores(data, mu_s, sigma_s)
        trace_sat += _trace_term(s_scores, s_parts, None, design)[0]
        if base_df is None:
            continue
        mu_b, var_b = weighted_available_moments(data.rows, data.row_weights)
        b_scores, b_parts = moment_scores(data, mu_b, np.diag(var_b))
        p = likelihood.p
        I, J = vech_indices(p)
        keep = np.concatenate([np.arange(p), p + np.flatnonzero(I == J)])  # means and variances
        D_base = np.eye(p + len(I))[:, keep]
        trace_base += _trace_term(b_scores, b_parts, D_base, design)[0]
    inv = scaled_inverse(bread_total)
    cov = inv @ meat_total @ inv / likelihood.n_total
    trace_model = float(np.sum(inv * meat_total.T))
    return cov, (trace_sat - trace_model) / (2.0 * df) if df > 0 else float("nan"), \
        (trace_sat - trace_base) / (2.0 * base_df) if base_df is not None else float("nan")
