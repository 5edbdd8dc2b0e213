"""Rows that gave one and the same answer to every item, reverse-worded items included: a long string of
identical answers, the simplest index of careless responding (Johnson 2005; Curran 2016).  When a scale words
some items in the opposite direction, agreeing equally with an item and with its reversal contradicts itself,
so such a row is named first as a caution; it is never removed (the researcher decides).  The scale's middle
answer is its own reversal (3 on 1 to 5), so a row giving it throughout does not contradict itself: it is still
named (a long string of identical answers), without that claim.

The rule is this project's own (a rule of thumb, not a published cutoff): the row answered at least
:data:`MIN_ANSWERED_SHARE` of the model's items, at least one reverse-keyed item and one other, and every answer
it gave is the same value.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

#: the share of the model's items a row must have answered to be judged (a rule of thumb of this project)
MIN_ANSWERED_SHARE = 0.5


@dataclass(frozen=True)
class SameAnswerRows:
    """The rows found: their row numbers, the one answer each gave, how many reverse-keyed items each answered,
    whether that answer contradicts the reversal (False for the scale's middle answer, which its reversal leaves
    unchanged: minimum + maximum - x = x), and the items judged."""

    rows: tuple[int, ...]
    answers: tuple[float, ...]
    items: int
    reversed_items: int
    reversed_answered: tuple[int, ...] = ()
    contradicts: tuple[bool, ...] = ()


def same_answer_rows(values: np.ndarray, row_numbers: np.ndarray, reversed_items: np.ndarray,
                     middles: np.ndarray | None = None) -> SameAnswerRows | None:
    """The rows of ``values`` (rows x items, NaN where not answered; ``row_numbers`` their row numbers) that
    answered every item they answered with one value, reverse-keyed items (``reversed_items``, a mask of the
    columns) among them; None when no row did or no item is reverse-keyed.  ``middles``: for each column, the answer
    its reversal leaves unchanged ((minimum + maximum) / 2 of a reverse-keyed item's scale; NaN otherwise): a row
    whose one answer is the middle of every reverse-keyed item it answered agrees with the keying, so it is found
    (one answer throughout) but not counted as contradicting itself."""
    reversed_items = np.asarray(reversed_items, dtype=bool)
    if not reversed_items.any() or reversed_items.all() or len(values) == 0:
        return None
    answered = ~np.isnan(values)
    count = answered.sum(axis=1)
    low, high = np.nanmin(np.where(answered, values, np.inf), axis=1), np.nanmax(np.where(answered, values, -np.inf), axis=1)
    on_reversed = (answered & reversed_items).sum(axis=1)
    found = ((count >= max(2, MIN_ANSWERED_SHARE * values.shape[1])) & (low == high)
             & (on_reversed > 0) & (answered & ~reversed_items).any(axis=1))
    if not found.any():
        return None
    which = np.flatnonzero(found)
    middles = np.full(values.shape[1], np.nan) if middles is None else np.asarray(middles, dtype=float)
    # contradicts: some reverse-keyed item it answered has a reversal different from the answer
    contradicts = (answered & reversed_items & (values != middles)).any(axis=1)
    return SameAnswerRows(tuple(int(r) for r in np.asarray(row_numbers)[which]), tuple(float(v) for v in low[which]),
                          values.shape[1], int(reversed_items.sum()), tuple(int(k) for k in on_reversed[which]),
                          tuple(bool(c) for c in contradicts[which]))
