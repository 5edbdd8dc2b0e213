"""Item sums and item means: the plain scale score of scale manuals, beside the factor scores.

For a factor f measured by items alone (its own items, none through factors below it) with J_f items, keys
k_i = +1 or -1 (:func:`cfa_tool.assessment.reliability.sum_keys`, the rule the fit's reliability keys its sums by) and
each reverse-keyed item's answer scale lowest_i to highest_i, a row's keyed answers are y_i = x_i (k_i = +1) or
lowest_i + highest_i - x_i (k_i = -1), the reversal of scale manuals (common practice).  With a the number of f's
items the row answered:

* item mean: the mean of the answered y_i;
* item sum: J_f times that mean, which is the plain sum of the y_i when every item is answered and the prorated sum
  (the person-mean substitution of scale manuals; common practice, recalled from memory) when some are not;
* a row that answered fewer than the least share of f's items (:class:`ItemSumRule`: at least ceil(share J_f),
  at least one) gets neither; a row that answered none of the model's items is counted as such.

An item that loads on several factors counts on each of them (its answer is part of each scale).  A factor measured
through other factors (higher-order) or a method factor (a way of answering) gets no item sum: the caller says which
(``summed``).  Under the fitted model the reliability of such a sum (and of the mean, its multiple) is omega
(McDonald 1999), and each row's standard error of measurement that of the sum of the items it answered, which
:mod:`cfa_tool.scoring.quality` computes (:class:`~cfa_tool.scoring.quality.SumScore`,
:func:`~cfa_tool.scoring.quality.answered_sum_sems`).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from cfa_tool.scoring.methods import LEAST_SHARE_ANSWERED, Unscored, rows_without_answers


@dataclass(frozen=True)
class ItemSumRule:
    """The missing-answers rule of item sums and means: the least share of a factor's items a row must answer."""

    least_share: float = LEAST_SHARE_ANSWERED

    def __post_init__(self) -> None:
        share = self.least_share
        if isinstance(share, bool) or not isinstance(share, (int, float)) or not 0.0 < float(share) <= 1.0:
            raise ValueError(f"the least share of a factor's items answered must be a number above 0 and at most 1, "
                             f"not {share!r}")
        object.__setattr__(self, "least_share", float(share))

    def least_items(self, count: int) -> int:
        """The fewest of ``count`` items a row must answer (ceil(share * count), at least 1)."""
        return max(1, int(np.ceil(self.least_share * count - 1e-9)))

    @property
    def default(self) -> bool:
        return self.least_share == LEAST_SHARE_ANSWERED


@dataclass(frozen=True, eq=False)
class ItemSums:
    """Each row's item sum and item mean of each factor (NaN where there is none), with how many of the factor's
    items each row answered, which rows are prorated, and the rows left without one (by reason): counted here once,
    for the standard errors of measurement and the report to read."""

    factors: tuple[str, ...]
    sums: np.ndarray  # (n, m)
    means: np.ndarray  # (n, m)
    answered: np.ndarray  # (n, m) how many of the factor's items (keys nonzero) each row answered: a
    prorated_rows: np.ndarray  # (n, m) bool: the row has a sum prorated from some (not all) of the factor's items
    unscored: dict  # Unscored -> (m,) rows without a sum or mean for that reason

    @property
    def prorated(self) -> np.ndarray:
        """(m,) the rows whose sum is prorated from some of the factor's items."""
        return self.prorated_rows.sum(axis=0).astype(np.int64)


def item_sums(rows: np.ndarray, keys: np.ndarray, lowest: np.ndarray, highest: np.ndarray, not_summed: list,
              factors: tuple[str, ...], rule: ItemSumRule = ItemSumRule()) -> ItemSums:
    """Item sums and means of ``rows`` (n, p; NaN for no answer) by the module docstring's rule.

    ``keys`` (p, m): +1, -1 or 0 (the item is not one of the factor's); ``lowest``, ``highest`` (p,): each item's
    answer scale, needed (finite) for every item with a key of -1 on a summed factor; ``not_summed`` (m): None for a
    factor to sum, else the :class:`Unscored` reason it has none."""
    rows = np.asarray(rows, dtype=float)
    keys = np.asarray(keys, dtype=float)
    p, m = keys.shape
    if rows.shape[1] != p:
        raise ValueError(f"rows have {rows.shape[1]} columns; the keys have {p} items")
    summed = np.array([why is None for why in not_summed], dtype=bool)
    keys = keys * summed[None, :]
    turned = (keys < 0).any(axis=1)
    lowest, highest = np.asarray(lowest, dtype=float), np.asarray(highest, dtype=float)
    if not np.all(np.isfinite(lowest[turned]) & np.isfinite(highest[turned])):
        raise ValueError("a reverse-keyed item has no answer scale to reverse it on")
    answered = ~np.isnan(rows)
    plain = np.where(answered, rows, 0.0)
    reversed_answers = np.where(answered & turned, np.where(turned, lowest + highest, 0.0) - rows, 0.0)
    total = plain @ (keys > 0) + reversed_answers @ (keys < 0)
    member = keys != 0
    count = answered.astype(float) @ member
    items = member.sum(axis=0)
    least = np.array([rule.least_items(int(j)) for j in items])
    anything = answered.any(axis=1)
    enough = (count >= least) & summed & (items > 0) & anything[:, None]
    with np.errstate(invalid="ignore", divide="ignore"):
        means = np.where(enough, total / count, np.nan)
    sums = means * items
    unscored: dict = rows_without_answers(anything, m)
    answering = int(anything.sum())
    for why in dict.fromkeys(w for w in not_summed if w is not None):
        unscored[why] = np.array([answering if w is why else 0 for w in not_summed], dtype=np.int64)
    few = (~enough & anything[:, None] & summed).sum(axis=0).astype(np.int64)
    if few.any():
        unscored[Unscored.TOO_FEW_ITEMS_ANSWERED] = few
    return ItemSums(tuple(factors), sums, means, count, enough & (count < items), unscored)


#: two groups' values of one parameter differ when they differ by more than this, relative to their size (a value
#: held equal across groups is one estimate, the same number in each group; one left free is estimated apart)
GROUP_VALUES_ALIKE = 1e-9


@dataclass(frozen=True)
class GroupShift:
    """An item of a factor's item sum whose parameters the fitted model sets apart between groups while it compares
    the factor's means across them (partial invariance: 'noninvariant intercept(x)'): its answers move between groups
    by its own shift, which the item sums and means carry and the model-based scores allow for.  ``parameters``: the
    kinds that differ ('intercept', 'loading', 'thresholds'); ``groups``: the groups whose values differ from the
    first group's, after it; ``intercepts``: the item's intercept in each of ``groups`` when it differs (else ())."""

    factor: str
    item: str
    parameters: tuple[str, ...]
    groups: tuple[str, ...]
    intercepts: tuple[float, ...] = ()


def _apart(values: list[np.ndarray]) -> list[bool]:
    """Whether each group's values differ from the first group's (:data:`GROUP_VALUES_ALIKE`)."""
    first = np.asarray(values[0], dtype=float)
    out = []
    for v in values:
        v = np.asarray(v, dtype=float)
        if v.shape != first.shape:
            out.append(True)
            continue
        scale = np.maximum(1.0, np.maximum(np.abs(v), np.abs(first)))
        out.append(bool(np.any(np.abs(v - first) > GROUP_VALUES_ALIKE * scale)))
    return out


def group_shifts(bases, thresholds, labels, sums) -> tuple[GroupShift, ...]:
    """The items of the item sums (``sums``: the first group's keyed sums, scoring.quality.SumScore) whose intercept,
    loading on the sum's factor or thresholds differ between the groups (``bases``: each group's
    scoring.model.ScoringModel, of the latent responses for ordinal items; ``thresholds``: each group's thresholds per
    item, or None for continuous items; ``labels``: the groups' labels), for the factors whose means the model
    compares across groups (not zero in every group: a model that fixes them at zero in every group compares no
    means, and says so: workflows.factor_scores.not_comparable_problems).  () for one group.

    Under x = nu_g + L_g eta + e (Joreskog 1971; Meredith 1993) a factor's item mean in group g is
    mean(nu_g) + mean(L_g) alpha_g over its items: with equal loadings and intercepts it differs between groups only
    through alpha_g (scalar invariance); an intercept set apart adds its own shift (nu_ig - nu_i1) / J to the item
    mean, which the model-based scores take out (Byrne, Shavelson & Muthén 1989: partial invariance)."""
    if len(bases) < 2:
        return ()
    out = []
    for s in sums:
        f = list(bases[0].factors).index(s.factor)
        if all(np.all(b.factor_means[f] == 0.0) for b in bases):
            continue
        for item in s.items:
            j = list(bases[0].items).index(item)
            kinds, differ = [], [False] * len(bases)
            nu = _apart([b.intercepts[j] for b in bases])
            for kind, flags in (("intercept", nu),
                                ("loading", _apart([b.loadings[j, f] for b in bases])),
                                ("thresholds", _apart([t[j] for t in thresholds]) if thresholds is not None
                                 else [False] * len(bases))):
                if any(flags):
                    kinds.append(kind)
                    differ = [a or b for a, b in zip(differ, flags)]
            if kinds:
                groups = (labels[0],) + tuple(lab for lab, d in zip(labels, differ) if d)
                intercepts = tuple(float(bases[g].intercepts[j]) for g, lab in enumerate(labels)
                                   if lab in groups) if any(nu) else ()
                out.append(GroupShift(s.factor, item, tuple(kinds), groups, intercepts))
    return tuple(out)
