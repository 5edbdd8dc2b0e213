"""Score tests robust to non-normal answers and to a sampling design: Satorra's (1989) generalized score test.

The normal-theory score test of a parameter the model fixes (a modification index; Sörbom 1989) divides the squared
score by its variance under normality.  The generalized score test divides the same score by its sandwich variance:
the meat of the rows' contributions (the covariance of the sample moments, Browne 1984, or of the rows' scores with
rows with gaps) under the rows' design, summed by cluster within strata and weighted (inference.design; Muthén &
Satorra 1995; Asparouhov 2005).  The invariance ladder reads them for its equalities (robust or design-based test),
and a fit under sampling weights, clusters or strata reads them as its modification indices.
"""

from __future__ import annotations

import numpy as np

from cfa_tool.assessment.modification import ModificationIndices
from cfa_tool.numerics.linalg import scaled_inverse


def robust_score_tests(found: ModificationIndices, model, theta: np.ndarray, likelihood,
                       sandwich=None) -> ModificationIndices:
    """The normal-theory score tests ``found`` (assessment.modification) made robust to non-normal data and to a
    sampling design: Satorra's (1989) generalized score test, the score statistic over the robust (sandwich)
    variance of the score instead of its normal-theory variance.  For a constraint gamma (a group's deviation from
    the common value) with information A and meat B of the model enlarged by gamma (both at the restricted
    estimates), the efficient score is s_gamma - A_gt A_tt^-1 s_theta (s_gamma itself at the estimates, where
    s_theta = 0); its robust variance is L B L', L = (-A_gt A_tt^-1, 1).  The normal-theory statistic divides the
    same score by h = A_gg - A_gt A_tt^-1 A_tg of its own information (Sörbom 1989), so the robust statistic is the
    normal-theory one times h / (L B L'), h from the index's information and L from the bread (times 2 for rows
    with gaps, whose meat is twice the information under normality; Yuan & Bentler 2000).  With complete rows A and
    B are those of inference.robust (Satorra & Bentler 1994: A = Delta' V Delta, B = Delta' V Gamma V Delta, over
    the groups' stacked moments under their design), A both the index's information and the bread.  With rows with
    gaps (full-information ML) B is the meat of the rows' scores in the saturated moments (inference.robust_missing)
    and the bread is the observed information in the moments (MissingDataLikelihood.moment_hessian), as the robust
    standard errors and the Yuan-Bentler test take the observed information (valid when answers are missing at
    random, not only completely at random; Kenward & Molenberghs 1998), while h is that of the index's own
    information (the patterns' expected information, MissingDataLikelihood.moment_hessian with observed=False).  The
    expected changes stay as they are.  ``sandwich``: with complete rows, the fit's
    inference.robust.moment_sandwich at ``theta`` (Omega and each group's Delta and V, shared with its robust standard
    errors and test; made here when not given)."""
    if not len(found):
        return found
    index = found.index * _score_variance_ratio(model, theta, likelihood, found, sandwich)
    kept = np.flatnonzero(np.isfinite(index))  # a robust variance that is not positive: no test, as score_tests
    order = kept[np.argsort(-index[kept], kind="stable")]
    return ModificationIndices(found.candidates, found.labels, found.rows[order], found.groups[order], index[order],
                               found.expected_change[order], found.standardized_expected_change[order])


def _score_variance_ratio(model, theta: np.ndarray, likelihood, found: ModificationIndices,
                          sandwich=None) -> np.ndarray:
    """h / (L B L') of :func:`robust_score_tests` for each row of ``found`` (NaN where the robust variance is not
    positive)."""
    from cfa_tool.assessment.modification import candidate_arrays
    from cfa_tool.model.implied import entry_derivatives
    from cfa_tool.inference.robust import moment_sandwich, vech_indices

    q, k = len(theta), len(found)
    I, J = vech_indices(model.p)
    complete = likelihood.complete_data
    if complete:
        return _complete_ratio(model, theta, likelihood, found, sandwich)
    # of the index's own information (h comes from it) only its columns of theta and the candidates' diagonal enter
    cross = np.zeros((q + k, q))
    diagonal = np.zeros(k)
    # L comes from it (with complete rows: the information), of which only the columns of theta enter
    bread = None if complete else np.zeros((q + k, q))
    weighted = []
    if complete and sandwich is None:
        sandwich = moment_sandwich(model, theta, likelihood)
    for g, w in enumerate(likelihood.weights):
        mats = model.matrices(theta, g)
        mine = np.flatnonzero(found.groups == g)
        c_sigma, c_mu = entry_derivatives(mats, *candidate_arrays([found.candidates[r] for r in found.rows[mine]]))
        if complete:  # (means,) vech: the layout of inference.robust
            delta, V = sandwich.blocks[g]
            extra = np.vstack([c_mu.T, c_sigma[:, I, J].T]) if likelihood.means else c_sigma[:, I, J].T
        else:  # means, vech: the layout of inference.robust_missing
            from cfa_tool.inference.robust_missing import _model_directions

            delta = _model_directions(likelihood, theta, g)
            extra = np.vstack([c_mu.T, c_sigma[:, I, J].T])
            V = likelihood.moment_hessian(theta, g, I, J, observed=False)  # the patterns' expected information
            observed = likelihood.moment_hessian(theta, g, I, J)
        X = np.zeros((delta.shape[0], q + k))
        X[:, :q] = delta
        X[:, q + mine] = extra
        VX = V @ X
        cross += w * (X.T @ VX[:, :q])
        diagonal += w * np.einsum("ic,ic->c", X[:, q:], VX[:, q:])
        if complete:
            weighted.append(w * VX)
        else:
            bread += w * X.T @ (observed @ X[:, :q])
            weighted.append(w * X)
    if complete:
        meat = sandwich.omega.middle(weighted)
    else:  # inference.robust_missing's B of the stacked groups' scores (blocks between groups sharing clusters)
        from cfa_tool.inference.robust_missing import groups_scores_meat, implied_points

        meat = groups_scores_meat(likelihood, implied_points(likelihood, theta)).middle(weighted)
    K = cross[q:] @ scaled_inverse(cross[:q])  # A_gt A_tt^-1 of the index's information
    normal = diagonal - np.einsum("cq,cq->c", K, cross[q:])
    if not complete:  # L from the observed information
        K = bread[q:, :q] @ scaled_inverse(bread[:q, :q])
    robust = (np.diag(meat)[q:] - 2.0 * np.einsum("cq,cq->c", K, meat[q:, :q])
              + np.einsum("cq,cq->c", K @ meat[:q, :q], K))
    ratio = normal / np.where(robust > 0, robust, np.nan)
    return ratio if complete else 2.0 * ratio


#: candidates whose derivatives (candidates x p x p) are held at once (1.8 MB at 60 items, 20 MB at 200)
CANDIDATE_CHUNK = 64


def _complete_ratio(model, theta: np.ndarray, likelihood, found: ModificationIndices, sandwich) -> np.ndarray:
    """h / (L B L') of :func:`_score_variance_ratio` with complete rows, in chunks of candidates and without a matrix
    of the moments by the moments or of the candidates by the candidates (hostile s19, case 11's neighbour: 200
    items under a sampling design made (20,500, 200, 200) derivatives, 6 GiB, and products of 20,100 x 20,906).
    Each candidate's ratio needs only its own rows of the information and meat (its column with the parameters and
    its diagonal entry), and the parameters' block: B's rows are z_u' V X over the sampling units' sums z of Omega
    (inference.design.GroupsMeat), taken for a candidate x as (z V) x, z V the sums of the rows' contributions times
    V (inference.robust.MomentSandwich.weighted), and a candidate's derivative vech is sparse (one
    entry for a residual covariance, a row and column for a cross-loading), so that z V x, x' V Delta and x' V x
    read only its entries (V's entries from Sigma^-1: inference.robust.NormalWeight.entries)."""
    from scipy import sparse

    from cfa_tool.assessment.modification import candidate_arrays
    from cfa_tool.model.implied import entry_derivatives
    from cfa_tool.inference.robust import moment_sandwich, vech_indices

    if sandwich is None:
        sandwich = moment_sandwich(model, theta, likelihood)
    omega, weighted_sums = sandwich.omega, sandwich.weighted
    q, k = len(theta), len(found)
    I, J = vech_indices(model.p)
    cross_tt = np.zeros((q, q))
    cross_ct = np.zeros((k, q))
    diagonal = np.zeros(k)
    projected_t, projected_c = [], []
    VDs = []
    for g, w in enumerate(likelihood.weights):
        delta, V = sandwich.blocks[g]
        VD = V @ delta
        VDs.append(VD)
        cross_tt += w * delta.T @ VD
        projected_t.append(omega.sums[g] @ (w * VD))
        projected_c.append(np.zeros((len(omega.sums[g]), k)))
    for g, w in enumerate(likelihood.weights):
        mats = model.matrices(theta, g)
        _, V = sandwich.blocks[g]
        mine = np.flatnonzero(found.groups == g)
        for first in range(0, len(mine), CANDIDATE_CHUNK):
            part = mine[first:first + CANDIDATE_CHUNK]
            c_sigma, c_mu = entry_derivatives(mats, *candidate_arrays([found.candidates[r] for r in found.rows[part]]))
            extra = np.vstack([c_mu.T, c_sigma[:, I, J].T]) if likelihood.means else c_sigma[:, I, J].T
            X = sparse.csc_matrix(extra)
            cross_ct[part] = w * (X.T @ VDs[g])
            projected_c[g][:, part] = w * (X.T @ weighted_sums.sums[g].T).T
            for c, r in enumerate(part):
                support = X.indices[X.indptr[c]:X.indptr[c + 1]]
                values = X.data[X.indptr[c]:X.indptr[c + 1]]
                diagonal[r] += w * float(values @ V.entries(support, support) @ values)
    meat_tt = omega.cross(projected_t, projected_t)
    meat_ct = omega.cross(projected_c, projected_t)
    meat_cc = omega.cross_diagonal(projected_c)
    K = cross_ct @ scaled_inverse(cross_tt)  # A_gt A_tt^-1 of the information
    normal = diagonal - np.einsum("cq,cq->c", K, cross_ct)
    robust = meat_cc - 2.0 * np.einsum("cq,cq->c", K, meat_ct) + np.einsum("cq,cq->c", K @ meat_tt, K)
    return normal / np.where(robust > 0, robust, np.nan)


def sampling_design(likelihood) -> bool:
    """Whether the rows of some group carry a sampling design whose errors are sandwich ones (sampling weights,
    clusters or strata; data.sample_design.DesignColumns.robust): the fit's modification indices are then the
    design-based score tests (:func:`robust_score_tests`).  Frequency weights alone are repeated rows."""
    from cfa_tool.method import WeightKind

    return any(d is not None and (d.kind is WeightKind.SAMPLING or d.clusters is not None or d.strata is not None)
               for d in (getattr(g, "design", None) for g in likelihood.groups))
