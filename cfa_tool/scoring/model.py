"""What factor scores need from a fitted model, one group at a time.

A fitted group is x = nu + L eta + e with factor means alpha = A M, factor covariance
Phi = A P A' (every factor, first and higher order; A = (I - B)^-1), residual covariance
Theta, so that Sigma = L Phi L' + Theta and mu = nu + L alpha (the all-latent form of
:mod:`cfa_tool.model.implied`; Joreskog 1973).  L holds the direct loadings: a
higher-order factor has a zero column in L and reaches the items through G = L A.
The covariance of the items with every factor is L Phi, which is all the linear
scores need.

Ordinal items add thresholds on the latent-response metric: item j is answered in
category c when tau_j,c-1 < x*_j <= tau_j,c with x* = nu + L eta + e (Muthén 1984).
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import cached_property

import numpy as np

from cfa_tool.numbers import user_number
from cfa_tool.errors import DataError, EstimationError
from cfa_tool.language.names import written_group
from cfa_tool.model.implied import ModelMatrices


def _frozen(a, shape: tuple[int, ...], name: str) -> np.ndarray:
    out = np.array(a, dtype=float, copy=True)
    if out.shape != shape:
        raise ValueError(f"{name} has shape {out.shape}, expected {shape}")
    out.setflags(write=False)
    return out


@dataclass(frozen=True, eq=False)
class ScoringModel:
    """One group's fitted parameters for scoring continuous items."""

    items: tuple[str, ...]
    factors: tuple[str, ...]
    loadings: np.ndarray  # L (p, m): direct loadings
    factor_covariance: np.ndarray  # Phi = A P A' (m, m)
    factor_means: np.ndarray  # alpha = A M (m,)
    intercepts: np.ndarray  # nu (p,)
    residual_covariance: np.ndarray  # Theta (p, p)
    total_loadings: np.ndarray | None = None  # G = L A (p, m); L when None (no higher-order factors)
    group: str | None = None

    def __post_init__(self) -> None:
        p, m = len(self.items), len(self.factors)
        object.__setattr__(self, "loadings", _frozen(self.loadings, (p, m), "loadings"))
        object.__setattr__(self, "factor_covariance", _frozen(self.factor_covariance, (m, m), "factor covariance"))
        object.__setattr__(self, "factor_means", _frozen(self.factor_means, (m,), "factor means"))
        object.__setattr__(self, "intercepts", _frozen(self.intercepts, (p,), "intercepts"))
        object.__setattr__(self, "residual_covariance", _frozen(self.residual_covariance, (p, p), "residual covariance"))
        G = self.loadings if self.total_loadings is None else self.total_loadings
        object.__setattr__(self, "total_loadings", _frozen(G, (p, m), "total loadings"))

    @property
    def p(self) -> int:
        return len(self.items)

    @property
    def m(self) -> int:
        return len(self.factors)

    @cached_property
    def implied_covariance(self) -> np.ndarray:
        """Sigma = L Phi L' + Theta."""
        L = self.loadings
        out = L @ self.factor_covariance @ L.T + self.residual_covariance
        out = 0.5 * (out + out.T)
        out.setflags(write=False)
        return out

    @cached_property
    def implied_mean(self) -> np.ndarray:
        """mu = nu + L alpha."""
        out = self.intercepts + self.loadings @ self.factor_means
        out.setflags(write=False)
        return out

    @cached_property
    def item_factor_covariance(self) -> np.ndarray:
        """Cov(x, eta) = L Phi (p, m)."""
        out = self.loadings @ self.factor_covariance
        out.setflags(write=False)
        return out

    @cached_property
    def measured(self) -> np.ndarray:
        """Factors with items of their own (a nonzero column of L): the ones Bartlett and
        correlation-preserving scores apply to.  The others are measured only through factors
        below them (higher-order factors)."""
        out = np.any(self.loadings != 0, axis=0)
        out.setflags(write=False)
        return out

    @cached_property
    def reach(self) -> np.ndarray:
        """(p, m) bool: the items that measure each factor, directly or through the factors below it."""
        out = (np.abs(self.total_loadings) > 1e-12) | (self.loadings != 0)
        out.setflags(write=False)
        return out


def items_answered(model: ScoringModel, rows: np.ndarray) -> np.ndarray:
    """(n, m): how many of the items that measure each factor (directly or through the factors below it) each row
    answered.  A row with 0 for a factor that still gets a score of it (regression or EAP) has it from the other
    factors' items alone (through the factors' correlations), which a report should say."""
    answered = (~np.isnan(np.asarray(rows, dtype=float))).astype(float)
    return answered @ model.reach.astype(float)


def scoring_model(mats: ModelMatrices, items: tuple[str, ...], factors: tuple[str, ...], group: str | None = None,
                  item_means: np.ndarray | None = None) -> ScoringModel:
    """A group's :class:`ScoringModel` from its model matrices.

    ``item_means``: for a model fitted without a mean structure (one group, complete rows), whose
    intercepts are then the sample means (the saturated mean is the ML estimate; factor means 0).
    """
    alpha = mats.latent_means()
    nu = mats.N if item_means is None else np.asarray(item_means, dtype=float) - mats.L @ alpha
    return ScoringModel(tuple(items), tuple(factors), mats.L, mats.latent_covariance(), alpha, nu, mats.T,
                        mats.G, group)


def score_inputs(estimation, groups: list) -> tuple[ScoringModel, ...]:
    """Each group's :class:`ScoringModel` from :func:`cfa_tool.pipeline.continuous.estimate`'s output.

    ``estimation``: an :class:`~cfa_tool.pipeline.continuous.Estimation` (its table, model and theta are used);
    ``groups``: the ``(label, SampleMoments)`` list it was estimated from (for the item means
    when the model has no mean structure, and the group labels).
    """
    from cfa_tool.pipeline.continuous import ordered_moments

    table, model, theta = estimation.table, estimation.model, estimation.theta
    out = []
    for g, (label, moments) in enumerate(groups):
        mats = model.matrices(theta, g)
        means = None if table.mean_structure else ordered_moments(moments, table.observed).mean
        out.append(scoring_model(mats, table.observed, table.latent, label, means))
    return tuple(out)


def checked_covariance(model: ScoringModel) -> np.ndarray:
    """Sigma, refused when it is not positive definite (no score can be computed from it)."""
    sigma = model.implied_covariance
    if not np.all(np.isfinite(sigma)) or np.linalg.eigvalsh(sigma)[0] <= 1e-12 * max(1.0, float(np.abs(sigma).max())):
        where = f" in group {written_group(model.group)}" if model.group else ""  # the one rule of group labels
        raise EstimationError(f"the model's implied covariance matrix of the items{where} is not positive definite, "
                              f"so no factor scores can be computed from it")
    return sigma


# ---------------------------------------------------------------- ordinal items


@dataclass(frozen=True, eq=False)
class OrdinalScoringModel:
    """One group's fitted parameters for scoring ordinal items (and continuous items beside them).

    ``base`` holds the latent-response model: loadings on the latent-response metric, factor
    covariance and means, intercepts nu and residual covariance Theta of the latent responses
    (diagonal: the answers are independent given the factors).  ``thresholds[j]`` are item j's
    thresholds (empty for a continuous item) and ``categories[j]`` its answer values in order
    (empty for a continuous item).  A continuous item enters as z = (x - location) / scale, its
    metric in the fit (the standardized metric of a one-group ordinal fit).
    """

    base: ScoringModel
    thresholds: tuple[np.ndarray, ...]
    categories: tuple[tuple[float, ...], ...]
    location: np.ndarray | None = None
    scale: np.ndarray | None = None

    def __post_init__(self) -> None:
        p = self.base.p
        if len(self.thresholds) != p or len(self.categories) != p:
            raise ValueError("one set of thresholds and categories per item is needed")
        thresholds = []
        for j, (tau, cats) in enumerate(zip(self.thresholds, self.categories)):
            tau = np.array(tau, dtype=float, copy=True)
            if len(cats) and len(tau) != len(cats) - 1:
                raise ValueError(f"item '{self.base.items[j]}' has {len(cats)} categories but {len(tau)} thresholds")
            if len(tau) and np.any(np.diff(tau) <= 0):
                raise EstimationError(f"the thresholds of item '{self.base.items[j]}' are not increasing, so its "
                                      f"answers have no probabilities and cannot be scored")
            tau.setflags(write=False)
            thresholds.append(tau)
        object.__setattr__(self, "thresholds", tuple(thresholds))
        object.__setattr__(self, "categories", tuple(tuple(float(v) for v in c) for c in self.categories))
        theta = self.base.residual_covariance
        if np.any(theta - np.diag(np.diag(theta))):
            raise EstimationError("ordinal items with correlated residuals cannot be scored: the posterior needs answers "
                                  "that are independent given the factors")
        if np.any(np.diag(theta) <= 0):
            raise EstimationError("a latent response has a residual variance of zero or less, so its answers have no "
                                  "probabilities and cannot be scored")
        continuous = self.continuous
        location = np.zeros(p) if self.location is None else np.asarray(self.location, dtype=float)
        scale = np.ones(p) if self.scale is None else np.asarray(self.scale, dtype=float)
        if np.any(scale[continuous] <= 0):
            raise ValueError("continuous items need a positive scale")
        object.__setattr__(self, "location", _frozen(location, (p,), "location"))
        object.__setattr__(self, "scale", _frozen(scale, (p,), "scale"))

    @property
    def continuous(self) -> np.ndarray:
        return np.array([len(c) == 0 for c in self.categories], dtype=bool)

    def category_codes(self, rows: np.ndarray) -> np.ndarray:
        """Answers as category numbers 0..C-1 (-1 where missing; continuous items' values are not
        coded and read 0).  A value that is not one of the item's categories is an error."""
        rows = np.asarray(rows, dtype=float)
        codes = np.full(rows.shape, -1, dtype=np.int64)
        for j, cats in enumerate(self.categories):
            column = rows[:, j]
            answered = ~np.isnan(column)
            if not cats:
                codes[answered, j] = 0
                continue
            levels = np.asarray(cats)
            at = np.clip(np.searchsorted(levels, column[answered]), 0, len(levels) - 1)
            unknown = levels[at] != column[answered]
            if unknown.any():
                value = column[answered][np.flatnonzero(unknown)[0]]
                raise DataError(f"item '{self.base.items[j]}' has the answer {user_number(value)}, which is not one of the "
                                f"categories the model was fitted with ({', '.join(f'{user_number(v)}' for v in levels)})")
            codes[answered, j] = at
        return codes


def standardized_latent_responses(mats: ModelMatrices) -> ModelMatrices:
    """The matrices of a one-group ordinal fit with each latent response's residual variance set so
    that its total variance is 1 (1 - common variance), as that fit identifies them."""
    return mats.with_unit_variances()


def ordinal_score_inputs(estimation, groups: list) -> tuple[OrdinalScoringModel, ...]:
    """Each group's :class:`OrdinalScoringModel` from
    :func:`cfa_tool.pipeline.ordinal.estimate_ordinal_groups`'s output (ordinal items in several
    groups: thresholds, intercepts and residual variances of the latent responses are parameters).

    ``groups``: the ``(label, OrdinalMoments)`` list it was estimated from (for the categories).
    """
    model, theta = estimation.model, estimation.theta
    held = getattr(getattr(estimation, "objective", None), "unit_variances", None)
    return tuple(group_ordinal_model(model, theta, g, label, moments.categories, None if held is None else held[g])
                 for g, (label, moments) in enumerate(groups))


def group_ordinal_model(model, theta: np.ndarray, g: int, label: str | None,
                        categories: tuple[tuple[float, ...], ...],
                        held: np.ndarray | None = None) -> OrdinalScoringModel:
    """Group g's :class:`OrdinalScoringModel` of a fit with thresholds as parameters (``model`` a StructuredModel,
    ``categories`` each item's answer values in the model's item order, empty for a continuous item, which
    keeps its own metric; ``held``: the items whose latent response the fit held at variance 1, their residual
    variance 1 minus their common variance: pipeline.ordinal.estimate_ordinal_groups)."""
    table = model.table
    mats = model.matrices(theta, g)
    if held is not None:
        mats = mats.with_unit_variances(held)
    ends = np.cumsum([max(len(c) - 1, 0) for c in categories])
    thresholds = tuple(np.split(model.thresholds(theta, g), ends[:-1]))
    return OrdinalScoringModel(scoring_model(mats, table.observed, table.latent, label), thresholds, categories)


def one_group_ordinal_inputs(mats: ModelMatrices, items: tuple[str, ...], factors: tuple[str, ...], moments
                             ) -> OrdinalScoringModel:
    """The :class:`OrdinalScoringModel` of a one-group ordinal fit (least squares on polychoric
    correlations): latent responses with mean 0 and variance 1, the sample thresholds of
    ``moments`` (an OrdinalMoments, items in the model's order), and continuous items beside
    them standardized by their sample mean and standard deviation, as their polyserial and Pearson
    correlations were."""
    if tuple(moments.names) != tuple(items):
        raise ValueError("the ordinal moments must list the items in the model's order")
    return one_group_ordinal_model(mats, items, factors, moments.thresholds, moments.categories, moments.means,
                                   moments.sds)


def one_group_ordinal_model(mats: ModelMatrices, items: tuple[str, ...], factors: tuple[str, ...], thresholds,
                            categories, means: np.ndarray, sds: np.ndarray) -> OrdinalScoringModel:
    """:func:`one_group_ordinal_inputs` from its pieces: each item's first-step thresholds and answer values, and
    the sample means and standard deviations (divisor N) that standardized the continuous items."""
    base = scoring_model(standardized_latent_responses(mats), items, factors)
    return OrdinalScoringModel(base, tuple(thresholds), tuple(categories), location=means, scale=sds)
