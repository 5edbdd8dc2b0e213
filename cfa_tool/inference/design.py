"""The middle of the sandwich under a sampling design: weights, clusters and strata.

For casewise contributions s_i (scores, or moment contributions centred at their weighted mean)
and weights w_i that sum to N, the covariance of the weighted mean of the s_i is estimated as
(1/N) times

* sum_i w_i^2 s_i s_i'  with sampling weights (Muthen & Satorra 1995; Asparouhov 2005);
* sum_i w_i s_i s_i'    with frequency weights (a row of weight w stands for w independent rows);
* sum_h C_h/(C_h - 1) sum_{c in h} (z_c - zbar_h)(z_c - zbar_h)',  z_c = sum_{i in c} w_i s_i,
  with clusters c in strata h (one stratum when none is given; each row its own cluster when
  strata come without clusters): the linearization estimator of survey statistics
  (Binder 1983; Wolter 2007, on linearization), zbar_h the mean of the stratum's cluster sums.

Without a design every row weighs one and the first form is the ordinary (1/N) sum s_i s_i'.
"""

from __future__ import annotations

import numpy as np

from cfa_tool.method import WeightKind


def design_meat(contributions: np.ndarray, design) -> np.ndarray:
    """(1/N) times the design-based sum of outer products of the rows' ``contributions`` (n x k);
    ``design`` a :class:`cfa_tool.data.sample_design.RowDesign` or None (every row weighs one)."""
    if design is None:
        return contributions.T @ contributions / len(contributions)
    w = design.weights
    total = float(w.sum())
    weighted = contributions * w[:, None]
    if design.clusters is None and design.strata is None:
        if design.kind is WeightKind.FREQUENCY:
            return weighted.T @ contributions / total
        return weighted.T @ weighted / total
    units = design.clusters if design.clusters is not None else np.arange(len(w))
    strata = design.strata if design.strata is not None else np.zeros(len(w), dtype=int)
    # one code per (stratum, cluster): clusters are nested in strata
    pair_codes, unit_of_row = np.unique(np.stack([strata, units], axis=1), axis=0, return_inverse=True)
    unit_of_row = unit_of_row.ravel()
    sums = np.zeros((len(pair_codes), contributions.shape[1]))
    np.add.at(sums, unit_of_row, weighted)
    stratum_of_unit = pair_codes[:, 0]
    meat = np.zeros((contributions.shape[1],) * 2)
    for h in np.unique(stratum_of_unit):
        z = sums[stratum_of_unit == h]
        c = len(z)
        if c < 2:
            continue
        if design.strata is not None:
            z = z - z.mean(axis=0)
        meat += c / (c - 1) * z.T @ z
    return meat / total


def moment_covariance(rows: np.ndarray, design, with_means: bool) -> np.ndarray:
    """Gamma: the asymptotic covariance of sqrt(N)(s - sigma) under the design, s the weighted means and
    vech of the weighted covariance (Browne 1984 without a design; Muthen & Satorra 1995 with one)."""
    w = np.ones(len(rows)) if design is None else design.weights
    Z = rows - w @ rows / w.sum()
    J, I = np.triu_indices(rows.shape[1])  # vech order: lower triangle, column by column
    parts = [Z] if with_means else []
    parts.append(Z[:, I] * Z[:, J])
    D = np.hstack(parts)
    D = D - w @ D / w.sum()
    return design_meat(D, design)


def ordinal_design_covariance(moments):
    """``moments`` (OrdinalMoments estimated under a sampling design, carrying their rows' influence
    functions) with the asymptotic covariance of the thresholds and correlations under that design:
    Gamma = the design-based meat of the rows' influence functions (Muthen & Satorra 1995; Asparouhov
    2005; the linearization estimator over clusters within strata, Binder 1983).  Moments without a
    design are returned as they are."""
    from dataclasses import replace

    if moments.influence is None:
        return moments
    joint = design_meat(moments.influence, moments.design)
    k = len(joint) - len(moments.pairs[0])
    return replace(moments, joint_gamma=joint, gamma=joint[k:, k:], influence=None)
