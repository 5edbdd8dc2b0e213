"""The middle of the sandwich under a sampling design: weights, clusters and strata.

For casewise contributions s_i (scores, or moment contributions centred at their weighted mean)
and weights w_i that sum to N, the covariance of the weighted mean of the s_i is estimated as
(1/N) times

* sum_i w_i^2 s_i s_i'  with sampling weights (Muthén & Satorra 1995; Asparouhov 2005);
* sum_i w_i s_i s_i'    with frequency weights (a row of weight w stands for w independent rows);
* sum_h C_h/(C_h - 1) sum_{c in h} (z_c - zbar_h)(z_c - zbar_h)',  z_c = sum_{i in c} w_i s_i,
  with clusters c in strata h (one stratum when none is given; each row its own cluster when
  strata come without clusters): the linearization estimator of survey statistics
  (Binder 1983; Wolter 2007, on linearization), zbar_h the mean of the stratum's cluster sums.
  A stratum with a single cluster (C_h = 1) has no spread of its own: its sum is centred at the
  mean of all clusters' sums instead, with factor 1, a conservative choice that counts the
  differences between strata as variance (Lumley 2010, on strata with a single sampled unit;
  recalled from memory, the alternative to collapsing strata, Rust & Kalton 1987; Wolter 2007).

Without a design every row weighs one and the first form is the ordinary (1/N) sum s_i s_i'.

Several groups fitted together are either independent samples (every cluster within one group:
the covariance is block-diagonal over groups, each block the group's own) or domains of one
sample that share clusters: their estimating equations are stacked and the covariance of all
groups' contributions together is the same estimator over the joint rows, each cluster's sum
gathering its rows of every group, so the blocks between groups are not zero (Binder 1983;
Skinner, Holt & Smith 1989, on domain estimation; recalled from memory).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from cfa_tool.data.sample_design import joint_design, shared_clusters
from cfa_tool.method import WeightKind


def _unit_sums(contributions: np.ndarray, design, rows: slice | None = None) -> tuple[np.ndarray, np.ndarray, float]:
    """(z, f, N) with design_meat = (z f)' z / N: z the sampling units' weighted sums of the contributions,
    centred as the design says, and f each unit's factor.  ``rows``: the design's rows the contributions are of (a
    group's within the joint design of groups that share clusters; the other rows contribute zero), under clusters."""
    if design is None:
        return contributions, np.ones(len(contributions)), float(len(contributions))
    w = design.weights
    total = float(w.sum())
    if design.clusters is None and design.strata is None:
        if design.kind is WeightKind.FREQUENCY:  # sum_i w_i s_i s_i'
            return contributions * np.sqrt(w)[:, None], np.ones(len(w)), total
        return contributions * w[:, None], np.ones(len(w)), total
    unit_of_row, stratum_of_unit = design.sampling_units()
    if rows is not None:
        unit_of_row, w = unit_of_row[rows], w[rows]
    sums = np.zeros((len(stratum_of_unit), contributions.shape[1]))
    np.add.at(sums, unit_of_row, contributions * w[:, None])
    counts = np.bincount(stratum_of_unit)
    c = counts[stratum_of_unit].astype(float)  # the units of each unit's stratum
    if design.strata is None:  # one stratum, the sums add up to zero at the estimates: not centred
        return sums, np.where(c > 1, c / np.maximum(c - 1.0, 1.0), 0.0), total
    means = np.zeros((len(counts), contributions.shape[1]))
    np.add.at(means, stratum_of_unit, sums)
    means /= np.maximum(counts, 1)[:, None]
    lone = c == 1
    centre = np.where(lone[:, None], sums.mean(axis=0), means[stratum_of_unit])
    return sums - centre, np.where(lone, 1.0, c / np.maximum(c - 1.0, 1.0)), total


def design_meat(contributions: np.ndarray, design) -> np.ndarray:
    """(1/N) times the design-based sum of outer products of the rows' ``contributions`` (n x k);
    ``design`` a :class:`cfa_tool.data.sample_design.RowDesign` or None (every row weighs one)."""
    z, f, total = _unit_sums(contributions, design)
    return (z * f[:, None]).T @ z / total


@dataclass(frozen=True)
class GroupsMeat:
    """The covariance Omega of sqrt(N)(s_g - sigma_g) stacked over groups (N the rows of all groups together),
    held as each group's units' sums z_g (scaled by N / N_g) and factors f_g, Omega_gh = (z_g f)' z_h / N;
    blocks between groups are zero unless the groups share clusters (module docstring)."""

    sums: tuple[np.ndarray, ...]
    factors: tuple[np.ndarray, ...]
    total: float
    shared: bool

    def block(self, g: int, start: int = 0) -> np.ndarray:
        """Omega_gg, or its part from moment ``start`` on (the covariances' part, after the means)."""
        z = self.sums[g][:, start:] if start else self.sums[g]
        return (z * self.factors[g][:, None]).T @ z / self.total

    def block_diagonal(self, g: int, start: int = 0) -> np.ndarray:
        """The diagonal of :meth:`block` (without forming the block)."""
        z = self.sums[g][:, start:] if start else self.sums[g]
        return self.factors[g] @ (z * z) / self.total

    def trace_with(self, weighted: GroupsMeat, g: int) -> float:
        """tr(V_g Omega_gg) for ``weighted`` the :class:`GroupsMeat` of the same rows' contributions times a
        symmetric V_g (its units' sums z V): sum_u f_u z_u' V z_u / N, without forming Omega_gg."""
        return float(np.einsum("u,uk,uk->", self.factors[g], self.sums[g], weighted.sums[g])) / self.total

    def middle(self, mats: list[np.ndarray]) -> np.ndarray:
        """sum_gh M_g' Omega_gh M_h for each group's M_g (k_g x q)."""
        projected = [z @ m for z, m in zip(self.sums, mats)]
        return self.cross(projected, projected)

    def cross(self, left: list[np.ndarray], right: list[np.ndarray]) -> np.ndarray:
        """sum_gh L_g' Omega_gh R_h from each group's projected units' sums, ``left`` z_g L_g and ``right`` z_g R_g."""
        if self.shared:
            return (sum(left) * self.factors[0][:, None]).T @ sum(right) / self.total
        return sum((y * f[:, None]).T @ x for y, x, f in zip(left, right, self.factors)) / self.total

    def matrix(self) -> np.ndarray:
        """Omega itself, every group's contributions stacked (sum_g k_g square): the blocks between groups zero
        unless they share clusters."""
        sizes = [z.shape[1] for z in self.sums]
        ends = np.cumsum(sizes)
        out = np.zeros((int(ends[-1]), int(ends[-1])))
        for g, (z, f) in enumerate(zip(self.sums, self.factors)):
            rows = slice(int(ends[g] - sizes[g]), int(ends[g]))
            others = range(len(self.sums)) if self.shared else (g,)
            for h in others:
                cols = slice(int(ends[h] - sizes[h]), int(ends[h]))
                out[rows, cols] = (z * f[:, None]).T @ self.sums[h] / self.total
        return out

    def cross_diagonal(self, projected: list[np.ndarray]) -> np.ndarray:
        """The diagonal of :meth:`cross` of ``projected`` with itself, without the matrix."""
        if self.shared:
            y = sum(projected)
            return self.factors[0] @ (y * y) / self.total
        return sum(f @ (y * y) for y, f in zip(projected, self.factors)) / self.total


def groups_meat(contributions: list[np.ndarray], designs: list) -> GroupsMeat:
    """:class:`GroupsMeat` of each group's rows' ``contributions`` (n_g x k_g) under its ``designs`` (RowDesign or
    None, with the cluster and stratum codes of one data set); each group's contributions are scaled by N / N_g,
    N_g the sum of its weights, so that a group's block is its own design-based covariance over its share of N."""
    totals = [float(len(c)) if d is None else d.total for c, d in zip(contributions, designs)]
    total = sum(totals)
    scaled = [c * (total / t) for c, t in zip(contributions, totals)]
    if len(designs) > 1 and shared_clusters(designs):
        joint = joint_design(designs)  # shared: every design has clusters
        starts = np.cumsum([0] + [len(c) for c in scaled])
        parts = [_unit_sums(c, joint, slice(int(starts[g]), int(starts[g + 1]))) for g, c in enumerate(scaled)]
        return GroupsMeat(tuple(z for z, _, _ in parts), tuple(f for _, f, _ in parts), total, True)
    parts = [_unit_sums(c, d) for c, d in zip(scaled, designs)]
    return GroupsMeat(tuple(z for z, _, _ in parts), tuple(f for _, f, _ in parts), total, False)


def moment_contributions(rows: np.ndarray, design, with_means: bool) -> np.ndarray:
    """Each row's contribution to the weighted means (when ``with_means``) and vech of the weighted covariance,
    centred at their weighted mean (Browne 1984; Muthén & Satorra 1995)."""
    w = np.ones(len(rows)) if design is None else design.weights
    Z = rows - w @ rows / w.sum()
    J, I = np.triu_indices(rows.shape[1])  # vech order: lower triangle, column by column
    parts = [Z] if with_means else []
    parts.append(Z[:, I] * Z[:, J])
    D = np.hstack(parts)
    return D - w @ D / w.sum()


def moment_covariance(rows: np.ndarray, design, with_means: bool) -> np.ndarray:
    """Gamma: the asymptotic covariance of sqrt(N)(s - sigma) under the design, s the weighted means and
    vech of the weighted covariance (Browne 1984 without a design; Muthén & Satorra 1995 with one)."""
    return design_meat(moment_contributions(rows, design, with_means), design)


def ordinal_design_covariance(moments):
    """``moments`` (OrdinalMoments estimated under a sampling design, carrying their rows' influence
    functions) with the asymptotic covariance of the thresholds and correlations under that design:
    Gamma = the design-based meat of the rows' influence functions (Muthén & Satorra 1995; Asparouhov
    2005; the linearization estimator over clusters within strata, Binder 1983).  Under clusters or strata
    the moments also carry the statistics' variances with the rows taken as independent (sampling weights
    applied), from which the diagonal least-squares weights come: clusters and strata then change the
    standard errors and tests, not the estimates, as they do in a maximum-likelihood fit, and a design of a
    few clusters, whose covariance is nearly singular, cannot make the weights erratic.  Moments without a
    design are returned as they are."""
    from dataclasses import replace

    if moments.influence is None:
        return moments
    design = moments.design
    joint = design_meat(moments.influence, design)
    k = len(joint) - len(moments.pairs[0])
    apart = None
    if design.clusters is not None or design.strata is not None:
        z, f, total = _unit_sums(moments.influence, replace(design, clusters=None, strata=None))
        apart = np.einsum("ij,ij->j", z * f[:, None], z) / total
    return replace(moments, joint_gamma=joint, gamma=joint[k:, k:], influence=None, weight_variances=apart,
                   dominant_cluster=dominant_cluster(moments.influence, design))


def ordinal_domains(moments: list) -> list:
    """Each group's ``moments`` (OrdinalMoments under a sampling design, carrying their rows' influence functions)
    with the design-based covariance of its thresholds and correlations (:func:`ordinal_design_covariance`), and,
    when the groups share clusters (domains of one cluster sample), the covariance of all groups' statistics
    stacked: the groups' influence functions joined as the rows' scores of full-information ML are
    (:func:`groups_meat`: each cluster's sums gather its rows of every group; Binder 1983; Skinner, Holt & Smith
    1989, recalled from memory), attached to every group as ``domains_gamma``."""
    from dataclasses import replace

    designs = [m.design for m in moments]
    joined = None
    if len(moments) > 1 and all(m.influence is not None for m in moments) and shared_clusters(designs):
        joined = groups_meat([m.influence for m in moments], designs).matrix()
    covariances = [ordinal_design_covariance(m) for m in moments]
    return covariances if joined is None else [replace(m, domains_gamma=joined) for m in covariances]


def dominant_cluster(contributions: np.ndarray, design):
    """The cluster that carries the largest share of the design effect of the statistics whose rows'
    ``contributions`` (n x k) these are, under ``design`` (a RowDesign with clusters; None without them), as a
    :class:`cfa_tool.data.sample_design.DominantCluster`.

    Each statistic's design effect is its design-based variance over its variance with the rows taken as
    independent (weights applied; Kish 1965, the design effect); their sum, tr(D) for D = diag(Gamma_apart)^-1
    Gamma, is a sum over the clusters of (f_c / N) z_c' diag(Gamma_apart)^-1 z_c (the estimator of the module
    docstring), so each cluster's term over the sum is its share.  With C clusters alike each holds about 1/C."""
    from dataclasses import replace

    from cfa_tool.data.sample_design import DominantCluster, _named

    if design is None or design.clusters is None or not len(contributions):
        return None
    z, f, total = _unit_sums(contributions, design)
    a, fa, _ = _unit_sums(contributions, replace(design, clusters=None, strata=None))
    apart = np.einsum("ij,ij->j", a * fa[:, None], a) / total
    keep = apart > 1e-12 * max(float(apart.max(initial=0.0)), 1e-300)
    if not keep.any():
        return None
    terms = (z[:, keep] ** 2 / apart[keep]).sum(axis=1) * f / total  # each unit's part of tr(D)
    effect = float(terms.sum())
    if not effect > 0 or not np.isfinite(effect):
        return None
    unit_of_row, _ = design.sampling_units()
    first_row = np.zeros(len(terms), dtype=int)
    first_row[unit_of_row[::-1]] = np.arange(len(unit_of_row))[::-1]
    largest = int(np.argmax(terms))
    name = _named(design.clusters[first_row[[largest]]], design.cluster_names)[0]
    return DominantCluster(name, float(terms[largest] / effect), len(terms), effect / int(keep.sum()))
