"""One block of items that a large share of the rows left unanswered together, as a shorter form of the
questionnaire leaves them (a planned-missing design: a third of the rows given a form without 8 of the 16 items):
found once where the missing-data patterns are counted (data.moments.missing_summary), so that the data summary, the
table of patterns and the methods paragraph tell the form's gaps from the answers the rows did not give (new-user
trial s28, finding 3: 800 rows of a short form were pooled with refusals and the paragraph said only that answers
were assumed missing at random).  A column of the file that marks exactly those rows (a 'form' column holding
'short') is named, so that the reports can say the gaps are the design's.  The thresholds are rules of this project
(common practice of data screening), not a published test."""

from __future__ import annotations

from dataclasses import dataclass
from collections.abc import Sequence

import numpy as np
import pandas as pd

from cfa_tool.numbers import user_number

#: the share of the rows that must miss exactly one block of items for it to be taken for a form's gaps: far more than
#: chance gaps in two or more given items leave (3% of the answers missing at random leave 0.09% of the rows without
#: a given pair); a rule of this project
SHARED_SHARE = 0.10
#: and at least so many rows
SHARED_ROWS = 20
#: a column marks the form's rows when every row holding its value misses the block and at most this share of the
#: rows missing the block hold another value (a long form's row that skipped those items by chance)
MARKED_OUTSIDE = 0.05
#: a column with more distinct values than this is no column of forms
FORM_VALUES = 10


@dataclass(frozen=True)
class SharedGaps:
    """``items``: the block (in the model's order); ``rows``: the rows that answered none of them, ``alone`` of them
    answering every other item, of ``total`` rows; ``marked_by``: (column, value as the file holds it, in text) of a
    column whose value marks those rows, or None."""

    items: tuple[str, ...]
    rows: int
    alone: int
    total: int
    marked_by: tuple[str, str] | None = None

    @property
    def share(self) -> float:
        return self.rows / self.total if self.total else 0.0

    def to_dict(self) -> dict:
        return {"items": list(self.items), "rows": self.rows, "alone": self.alone, "total": self.total,
                "marked_by": list(self.marked_by) if self.marked_by else None}

    @classmethod
    def from_dict(cls, d: dict | None) -> SharedGaps | None:
        if not d:
            return None
        marked = d.get("marked_by")
        return cls(tuple(d["items"]), int(d["rows"]), int(d["alone"]), int(d["total"]),
                   tuple(marked) if marked else None)


def shared_gaps(frame: pd.DataFrame, names: Sequence[str], counts: np.ndarray | None = None) -> SharedGaps | None:
    """The block of two or more of the items ``names`` that at least :data:`SHARED_SHARE` of ``frame``'s rows (and
    :data:`SHARED_ROWS`) left unanswered and answered every other item, while leaving at least two items answered:
    the most common such pattern; None when there is none.  ``counts``: each row's frequency weight (None: 1 each),
    as the missing-data summary counts its rows."""
    names = list(names)
    if len(names) < 4 or not len(frame):
        return None
    answered = frame[names].notna().to_numpy()
    counts = np.ones(len(frame)) if counts is None else np.asarray(counts, dtype=float)
    patterns, which = np.unique(answered, axis=0, return_inverse=True)
    sums = np.bincount(which.ravel(), weights=counts, minlength=len(patterns))
    return shared_gaps_of_patterns(frame, names, answered, patterns, sums, counts)


def shared_gaps_of_patterns(frame: pd.DataFrame, names: Sequence[str], answered: np.ndarray, patterns: np.ndarray,
                            sums: np.ndarray, counts: np.ndarray) -> SharedGaps | None:
    """:func:`shared_gaps` from the rows' answered cells of ``names`` (``answered``), their distinct ``patterns`` and
    each pattern's weighted count (``sums``), as the missing-data summary has them (data.moments.missing_summary),
    ``counts`` each row's weight."""
    names = list(names)
    if len(names) < 4 or not len(frame):
        return None
    total = float(counts.sum())
    missed = (~patterns).sum(axis=1)
    usable = (missed >= 2) & (missed <= len(names) - 2)
    if not usable.any():
        return None
    k = int(np.argmax(np.where(usable, sums, -1.0)))
    if sums[k] < max(SHARED_SHARE * total, SHARED_ROWS):
        return None
    block = ~patterns[k]
    within = ~answered[:, block].any(axis=1)
    items = tuple(n for n, b in zip(names, block) if b)
    return SharedGaps(items, int(round(counts[within].sum())), int(round(sums[k])), int(round(total)),
                      _marked_by(frame, set(names), within))


def _marked_by(frame: pd.DataFrame, items: set, within: np.ndarray) -> tuple[str, str] | None:
    """(column, value) of the first column other than the items whose value is held by rows that all miss the block
    (``within``) and by all but :data:`MARKED_OUTSIDE` of those that do: the column of forms."""
    rows = int(within.sum())
    for column in frame.columns:
        if column in items:
            continue
        cells = frame[column]
        try:
            values = pd.unique(cells.dropna())
        except TypeError:  # cells pandas cannot hash (a list in a cell): no column of forms
            continue
        if not 1 < len(values) <= FORM_VALUES:
            continue
        for value in values:
            holds = (cells == value).to_numpy()
            if holds.any() and not (holds & ~within).any() and holds.sum() >= (1 - MARKED_OUTSIDE) * rows:
                shown = user_number(value) if isinstance(value, float) else str(value)  # as written, never rounded
                return str(column), shown
    return None
