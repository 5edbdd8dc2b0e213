"""Robust corrections with incomplete data: Huber-White (sandwich) standard errors
and the Yuan-Bentler scaled chi-square (Yuan & Bentler 2000), from each row's
score, with the OBSERVED information as the bread.

Work in the moments beta = (mu, vech Sigma).  Row i contributes
f_i = log|Sigma_oo| + r_i' A_i r_i (A_i = Sigma_oo^-1 embedded in p x p, u_i = A_i r_i), whose
derivatives are df_i/dmu = -2 u_i and df_i/dsigma_jk = (A_i - u_i u_i')_jk, doubled off
the diagonal.  With H the observed information (the second derivatives of the discrepancy F
= mean of f_i, cfa_tool.estimation.fiml) in the model's parameters theta at the estimates,
B = S'S / N the mean outer product of the rows' scores and D = d beta / d theta:

* Cov(theta) = H^-1 D'BD H^-1 / N;
* c = [tr(H_s^-1 B_s) - tr(H^-1 D'BD)] / (2 df), H_s and B_s those of the saturated
  model in beta at its (EM) estimates, H_s its observed information too; the scaled
  statistic is T / c.  Under normality B is about 2H and c about 1.

Why the observed information.  With answers missing at random (MAR) but not completely
at random, the expected information with the missing-data patterns held fixed is not
the limit of the observed one, so standard errors built on it are inconsistent; the
observed information stays consistent under MAR (Kenward & Molenberghs 1998).  The
sandwich and the scaled statistic of Yuan & Bentler (2000, Sociological Methodology 30)
take both the model's and the saturated model's information as observed ones, and
Savalei (2010, Psychological Methods 15) showed by simulation that with MAR non-normal
data the expected-information versions give biased standard errors and test statistics
while the observed-information ones do not -- the three sources are recalled from
memory, not checked against their text here.  What is checked here: the Monte Carlo
study in tests/inference/test_robust_missing_mar.py (robust SEs against the empirical
spread of estimates, and the scaled test's rejection rate, under MAR with non-normal
data), and, with complete rows and a just-identified model (where observed and expected
information coincide at the estimates), equality with the complete-data sandwich of
cfa_tool.inference.robust (Browne 1984).  The expected information is not offered with
full-information ML at all (cfa_tool.pipeline.continuous.FitOptions refuses it): under
MAR it is not valid.

With a sampling design, B is the design-based meat of cfa_tool.inference.design
(Asparouhov 2005); the bread is the weighted observed information.  Several groups stack their
rows' scores (each row scores its own group's beta_g): B is the covariance of the stacked scores,
block-diagonal over groups for independent samples, and with blocks between the groups when they
share clusters (domains of one cluster sample: each cluster's sums gather its rows of every group,
cfa_tool.inference.design.groups_meat; Binder 1983, Skinner, Holt & Smith 1989, recalled from memory).
The model's meat is then sum_gh w_g w_h D_g' Omega_gh D_h; the traces tr(H_s^-1 B_s) of the
saturated and baseline models, whose information is block-diagonal over groups, read only the
groups' own blocks w_g Omega_gg (a domain's block: its rows' sums over the clusters of the whole
sample, which equals the group's own meat when every cluster lies within one group).
"""

from __future__ import annotations

from collections.abc import Sequence
from typing import TYPE_CHECKING

import numpy as np

from cfa_tool.data.em import weighted_available_moments
from cfa_tool.data.patterns import PatternData, embedded_inverse
from cfa_tool.estimation.fiml import MissingDataLikelihood, moment_hessian
from cfa_tool.inference.design import GroupsMeat, design_meat, groups_meat
from cfa_tool.inference.robust import vech_indices
from cfa_tool.inference.standard_errors import observed_information
from cfa_tool.numerics.linalg import scaled_inverse

if TYPE_CHECKING:
    from cfa_tool.data.sample_design import RowDesign


def check_moment_matrices(likelihood: MissingDataLikelihood) -> None:
    """:func:`refuse_moment_matrices` for ``likelihood``'s items and design."""
    refuse_moment_matrices(likelihood.p, any(getattr(g, "design", None) is not None for g in likelihood.groups))


def refuse_moment_matrices(p: int, designed: bool) -> None:
    """Refuse, with a one-line EstimationError naming the sizes and what to do, a full-information robust route whose
    matrices of the moments by the moments (module docstring: H_s and B_s are k x k, k = p + p(p+1)/2 means,
    variances and covariances; several at once beside the moments' k x p x p directions) would exceed the one limit
    of :mod:`cfa_tool.numerics.sizes` each, before any of them is made: never a MemoryError after minutes of work
    (200 items would need 3.3 GB for each matrix and 6.5 GB of directions: hostile s19, case 11's neighbour).
    ``designed``: under a sampling design, whose test is design-based (no normal-theory test to fall back on)."""
    from cfa_tool.errors import EstimationError
    from cfa_tool.numerics import sizes
    from cfa_tool.options import Option

    k = p + p * (p + 1) // 2
    if sizes.fits(k):
        return
    leave_out = "" if designed else f", or leave out {Option.ROBUST} for the normal-theory test"
    raise EstimationError(
        f"the robust test and standard errors with rows with gaps (full-information ML) work on several matrices of "
        f"the {k:,} means, variances and covariances of the {p} items by themselves, each "
        f"{sizes.too_large_words(k, lambda n: n + n * (n + 1) // 2)}; keep only the complete rows "
        f"({Option.INCOMPLETE_ROWS.given('listwise')}), whose robust test needs no such matrix, fit the items in "
        f"smaller sets{leave_out}")


def moment_scores(data: PatternData, mu: np.ndarray, sigma: np.ndarray) -> np.ndarray:
    """Row scores in beta (N x k) at (mu, Sigma): the derivatives of f_i (module docstring)."""
    A_patterns, _ = embedded_inverse(sigma, data.observed)
    rows = data.rows
    observed = ~np.isnan(rows)
    resid = np.where(observed, rows - mu, 0.0)
    u = np.einsum("rij,rj->ri", A_patterns[data.index], resid)
    I, J = vech_indices(len(mu))
    scale = np.where(I == J, 1.0, 2.0)
    # (A_i - u_i u_i') in vech order, without forming every row's p x p matrix
    return np.hstack([-2.0 * u, (A_patterns[:, I, J][data.index] - u[:, I] * u[:, J]) * scale])


def scores_meat(data: PatternData, mu: np.ndarray, sigma: np.ndarray, design: RowDesign | None) -> np.ndarray:
    """B of the module docstring: the mean outer product of the rows' scores in beta at (mu, Sigma)
    (:func:`moment_scores`), or with a sampling ``design`` its design-based meat (inference.design, Asparouhov
    2005)."""
    return design_meat(moment_scores(data, mu, sigma), design)


def groups_scores_meat(likelihood: MissingDataLikelihood, points: Sequence[tuple[np.ndarray, np.ndarray]]
                       ) -> GroupsMeat:
    """Omega of the groups' stacked rows' scores in beta (:func:`moment_scores`), each group's at its ``points``
    (mu_g, Sigma_g), under the groups' designs (cfa_tool.inference.design.groups_meat: blocks between the groups
    when they share clusters).  The meat of several groups is sum_gh M_g' Omega_gh M_h for each group's M_g = w_g
    D_g (:meth:`GroupsMeat.middle`), and a group's own B (:func:`scores_meat` when every cluster lies within one
    group) is :func:`own_meat`."""
    return groups_meat([moment_scores(data, mu, sigma) for data, (mu, sigma) in zip(likelihood.patterns, points)],
                       [gm.design for gm in likelihood.groups])


def own_meat(likelihood: MissingDataLikelihood, omega: GroupsMeat, g: int) -> np.ndarray:
    """Group g's B in its own scale, w_g Omega_gg (w_g = N_g / N, :func:`groups_scores_meat`)."""
    return likelihood.weights[g] * omega.block(g)


def implied_points(likelihood: MissingDataLikelihood, theta: np.ndarray) -> list[tuple[np.ndarray, np.ndarray]]:
    """Each group's implied (mu, Sigma) at ``theta``."""
    mats = [likelihood.model.matrices(theta, g) for g in range(len(likelihood.patterns))]
    return [(m.implied_mean(), m.implied_covariance()) for m in mats]


def _unstructured_trace(data: PatternData, mu: np.ndarray, sigma: np.ndarray, B: np.ndarray,
                        variances_only: bool = False) -> float:
    """tr(H^-1 B) of a model linear in beta at its estimates (mu, Sigma): H its observed information, B the
    meat of its rows' scores in beta: the saturated model's, or (``variances_only``) the baseline's, which frees the
    means and the variances alone (their rows and columns of the saturated model's meat; its information is made for
    them alone, vech's diagonal in its order)."""
    p = len(mu)
    if variances_only:
        rows = cols = np.arange(p)
        I, J = vech_indices(p)
        keep = np.concatenate([np.arange(p), p + np.flatnonzero(I == J)])
        B = B[np.ix_(keep, keep)]
    else:
        rows, cols = vech_indices(p)
    H = moment_hessian(data, mu, sigma, rows, cols)
    return float(np.sum(scaled_inverse(H) * B.T))


def _model_directions(likelihood: MissingDataLikelihood, theta: np.ndarray, g: int) -> np.ndarray:
    d_sigma, d_mu = likelihood.model.jacobian(theta, g)
    I, J = vech_indices(likelihood.p)
    return np.hstack([d_mu, d_sigma[:, I, J]]).T  # (k, q)


def scaling_at(likelihood: MissingDataLikelihood, theta: np.ndarray,
               saturated: Sequence[tuple[np.ndarray, np.ndarray]], df: int) -> float:
    """The scaling factor tr(U Gamma) / (2 df) in the form Satorra & Bentler (2010) evaluate it for the strictly
    positive scaled difference, at a point that need not be the model's estimates (a general model at a restricted
    model's estimates): Gamma = H_s^-1 B_s H_s^-1 of the data, from the rows at the saturated (EM) moments
    ``saturated`` as the fit's factor takes it, and U = W - W D (D'WD)^-1 D'W with D = d beta / d theta at ``theta``
    and W = H_s, the rows' observed information in beta = (mu, vech Sigma) at the saturated moments (patterns fixed,
    means included, :func:`cfa_tool.estimation.fiml.moment_hessian`; the weight the unstructured model gives the
    data, Satorra & Bentler 1994's V evaluated at the sample moments rather than at the model's: recalled from
    memory); groups summed as the fit sums them.  Two models whose moments meet at their points share W and Gamma,
    so that df0 c0 - df1 c1 = tr((U0 - U1) Gamma) / 2 is not negative (U0 - U1 is the difference of two projections
    in the metric W onto nested column spaces; Satorra & Bentler 2010).

    Why W at the data and not at the model's moments: the observed information at a model's moments holds a term
    in the residuals (the data's moments less the model's), which a badly fitting restricted model makes large; with
    it the correction fell far below 1 on normal rows, where the likelihood-ratio difference needs none (0.39 on
    20,000 normal rows with two factors correlating .5 held uncorrelated, the scaled difference 2.5 times the
    unscaled one; tests/inference/test_scaled_difference_by_hand.py).  With W = H_s and normal rows, B_s is about
    2 H_s, tr(U Gamma) about 2 df for any D, and every factor about 1 however far the model is from the data.  The
    fit's own factor takes the observed information in theta as its bread instead, which holds the score times the
    second derivatives of beta(theta): not zero for a general model away from its own estimates.  With complete
    rows W is the normal-theory weight at the sample moments.  NaN when D'WD, scaled to unit diagonal, has no
    positive smallest eigenvalue (the model not identified at ``theta``), or the saturated Sigma_oo are not
    positive definite."""
    check_moment_matrices(likelihood)
    q = len(theta)
    information = np.zeros((q, q))
    trace_w_gamma = 0.0
    rows, cols = vech_indices(likelihood.p)
    omega = groups_scores_meat(likelihood, saturated)  # B_s of the stacked groups (blocks between shared clusters')
    weighted = []
    for g, (w, data) in enumerate(zip(likelihood.weights, likelihood.patterns)):
        mu_s, sigma_s = saturated[g]
        H_s = moment_hessian(data, mu_s, sigma_s, rows, cols)
        if H_s is None:
            return float("nan")
        D = _model_directions(likelihood, theta, g)
        # W Gamma W = B_s: D'W Gamma W D = D' B_s D and tr(W Gamma) = sum_g tr(H_s,g^-1 B_s,gg), W block-diagonal
        information += w * D.T @ H_s @ D
        weighted.append(w * D)
        trace_w_gamma += float(np.sum(scaled_inverse(H_s) * own_meat(likelihood, omega, g).T))
    meat = omega.middle(weighted)
    information = 0.5 * (information + information.T)
    diagonal = np.diag(information)
    if not np.all(diagonal > 0):
        return float("nan")
    scale = 1.0 / np.sqrt(diagonal)  # unit diagonal: eigenvalues free of the parameters' units
    if not np.linalg.eigvalsh(information * np.outer(scale, scale))[0] > 1e-10:
        return float("nan")
    return (trace_w_gamma - float(np.sum(scaled_inverse(information) * meat.T))) / (2.0 * df)


def robust_missing(likelihood: MissingDataLikelihood, theta: np.ndarray,
                   saturated: Sequence[tuple[np.ndarray, np.ndarray]], df: int, base_df: int | None,
                   ) -> tuple[np.ndarray, float, float]:
    """(Huber-White covariance of theta, scaling factor of the model, scaling factor of the baseline), the
    factors (sat - model) / (2 df) from the trace terms summed over groups; ``base_df`` None: the baseline's
    factor is not wanted (NaN).  The bread is the observed information (module docstring).  Refused before any
    work when its matrices of the moments would be too large (:func:`check_moment_matrices`)."""
    check_moment_matrices(likelihood)
    trace_sat = trace_base = 0.0
    model_meat = groups_scores_meat(likelihood, implied_points(likelihood, theta))
    saturated_meat = groups_scores_meat(likelihood, saturated)
    baseline = None if base_df is None else [
        (mu, np.diag(var)) for mu, var in (weighted_available_moments(d.rows, d.row_weights)
                                           for d in likelihood.patterns)]
    baseline_meat = None if baseline is None else groups_scores_meat(likelihood, baseline)
    weighted = []
    for g, data in enumerate(likelihood.patterns):
        weighted.append(likelihood.weights[g] * _model_directions(likelihood, theta, g))
        trace_sat += _unstructured_trace(data, *saturated[g], own_meat(likelihood, saturated_meat, g))
        if baseline is not None:
            trace_base += _unstructured_trace(data, *baseline[g], own_meat(likelihood, baseline_meat, g), True)
    meat_total = model_meat.middle(weighted)  # sum_gh w_g w_h D_g' Omega_gh D_h (module docstring)
    hessian = likelihood.observed_hessian(theta)  # the weighted sum over groups, as the meat
    if hessian is None:  # higher-order factors: differences of the analytic gradient, as fit's standard errors
        hessian = observed_information(likelihood.gradient, theta, central=False)
    inv = scaled_inverse(hessian)
    cov = inv @ meat_total @ inv / likelihood.n_total
    trace_model = float(np.sum(inv * meat_total.T))
    return cov, (trace_sat - trace_model) / (2.0 * df) if df > 0 else float("nan"), \
        (trace_sat - trace_base) / (2.0 * base_df) if base_df is not None else float("nan")
