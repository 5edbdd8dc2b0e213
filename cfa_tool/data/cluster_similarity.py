"""How alike the rows of one cluster answer: each item's intraclass correlation and the design effect they imply, for
planning how many clusters a later sample needs (new-user trial s20: a school sample could not be planned).

The intraclass correlation of an item is the one-way analysis-of-variance estimator over the clusters,

    ICC = (MSB - MSW) / (MSB + (n0 - 1) MSW),   n0 = (N - sum_j n_j^2 / N) / (J - 1),

with MSB and MSW the mean squares between and within the J clusters of the N rows that answered it and n_j the
rows of cluster j (Donner 1986; Snedecor & Cochran 1989, recalled from memory); it may be negative.  The design
effect of a mean under cluster sampling with clusters of m rows is deff = 1 + (m - 1) ICC (Kish 1965, recalled from
memory): with m the mean number of rows per cluster and the items' median ICC, a rough guide for the variance of
the fit's statistics too, which carry their own design effects.  Unweighted: the ICC describes the clusters, not
the population the weights stand for.
"""

from __future__ import annotations

from dataclasses import dataclass

import math

import numpy as np

from cfa_tool.numerics.plain import journal_decimal


def intraclass_correlations(values: np.ndarray, clusters: np.ndarray) -> np.ndarray:
    """Each column's one-way ANOVA intraclass correlation (module docstring) over the rows that answered it
    (``values`` NaN where not), with ``clusters`` each row's cluster (any labels); NaN for a column answered in fewer
    than two clusters or with no spread within them."""
    values = np.asarray(values, dtype=float)
    if values.ndim == 1:
        values = values[:, None]
    _, codes = np.unique(np.asarray(clusters), return_inverse=True)
    codes = codes.ravel()
    k = int(codes.max()) + 1 if len(codes) else 0
    out = np.full(values.shape[1], np.nan)
    for j in range(values.shape[1]):
        answered = ~np.isnan(values[:, j])
        y, c = values[answered, j], codes[answered]
        n_j = np.bincount(c, minlength=k).astype(float)
        present = n_j > 0
        clusters_j, rows = int(present.sum()), len(y)
        if clusters_j < 2 or rows <= clusters_j:
            continue
        means = np.bincount(c, weights=y, minlength=k)[present] / n_j[present]
        grand = y.mean()
        between = float(np.sum(n_j[present] * (means - grand) ** 2)) / (clusters_j - 1)
        within = float(np.sum((y - np.bincount(c, weights=y, minlength=k)[c] / n_j[c]) ** 2)) / (rows - clusters_j)
        n0 = (rows - float(np.sum(n_j[present] ** 2)) / rows) / (clusters_j - 1)
        denominator = between + (n0 - 1) * within
        if denominator > 0:
            out[j] = (between - within) / denominator
    return out


def design_effect(intraclass: float, cluster_size: float) -> float:
    """Kish's (1965) design effect of cluster sampling, 1 + (m - 1) ICC, for clusters of ``cluster_size`` rows."""
    return 1.0 + (cluster_size - 1.0) * intraclass


@dataclass(frozen=True)
class ClusterSimilarity:
    """The items' intraclass correlations over the clusters of the rows analysed, and the design effect their median
    implies at the mean cluster size (module docstring)."""

    items: tuple[str, ...]
    intraclass: tuple[float, ...]  # per item, NaN where not defined
    rows_per_cluster: float  # the mean number of rows analysed per cluster

    @property
    def median(self) -> float:
        defined = [v for v in self.intraclass if v == v]
        return float(np.median(defined)) if defined else float("nan")

    @property
    def design_effect(self) -> float:
        return design_effect(self.median, self.rows_per_cluster)

    def to_dict(self) -> dict:
        return {"intraclass_correlations": {x: (None if v != v else v) for x, v in zip(self.items, self.intraclass)},
                "median_intraclass_correlation": None if self.median != self.median else self.median,
                "rows_per_cluster": self.rows_per_cluster,
                "design_effect": None if self.design_effect != self.design_effect else self.design_effect,
                "estimator": "one-way analysis of variance, unweighted; design effect 1 + (m - 1) x median (Kish 1965)"}

    def phrase(self) -> str:
        """In the design's status line: 'median intraclass correlation of the items .08 (.03 to .12), design effect
        3.9 at 37.5 rows per cluster'."""
        defined = [v for v in self.intraclass if v == v]
        if not defined:
            return ""
        spread = f" ({_r(min(defined))} to {_r(max(defined))})" if len(defined) > 1 else ""
        return (f"median intraclass correlation of the items {_r(self.median)}{spread}, design effect "
                f"{self.design_effect:.2f} at {self.rows_per_cluster:.1f} rows per cluster (Kish 1965)")


    def note(self, column: str) -> str:
        """Each item's intraclass correlation in one line (check's notes), with the median and its design effect."""
        items = ", ".join(f"{x} {'not defined' if v != v else _r(v)}" for x, v in zip(self.items, self.intraclass))
        return (f"Intraclass correlations of the items over the clusters of '{column}' (one-way analysis of variance, "
                f"unweighted): {items}; median {_r(self.median)}, so a design effect of {self.design_effect:.2f} at "
                f"{self.rows_per_cluster:.1f} rows per cluster (1 + (m - 1) x ICC, Kish 1965): a rough guide for "
                f"planning a later sample, since each statistic of a fit has its own design effect")


def _r(value: float) -> str:
    """A correlation without its leading zero (numerics.plain.journal_decimal): two decimals, three below .01 (.004),
    and as many as its first significant digit needs below .001 (.0004), never a rounded zero ('.000') for an
    intraclass correlation that is not zero (s21: the design's numbers)."""
    size = abs(value)
    digits = 2 if size >= 0.01 else 3 if size >= 0.001 or size == 0 or size != size else -math.floor(math.log10(size))
    return journal_decimal(value, digits=digits)


def cluster_similarity(items: tuple[str, ...], values: np.ndarray, clusters: np.ndarray) -> ClusterSimilarity | None:
    """The items' intraclass correlations over the rows analysed (``values``, NaN for no answer) in their
    ``clusters``; None without at least two clusters."""
    clusters = np.asarray(clusters)
    count = len(np.unique(clusters))
    if count < 2 or not len(values):
        return None
    return ClusterSimilarity(tuple(items), tuple(float(v) for v in intraclass_correlations(values, clusters)),
                             len(clusters) / count)
