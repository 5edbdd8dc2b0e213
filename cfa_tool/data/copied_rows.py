"""Rows identical in every column to an earlier row: an export appended to itself, or a block of rows pasted twice.

Each copy counts as another respondent, so N is too large, the standard errors too small and the chi-square too
large (a file appended to itself doubles the chi-square and shrinks every standard error by a factor of about
sqrt(2)).  Only the researcher knows whether identical rows are copies, so they are named first, never removed.

A column that numbers the rows (whole numbers, each one more than the row before: a row-number column an export
adds) is left out of the comparison, since a file appended and then renumbered differs only there.  The rows are
hashed once (pandas.util.hash_pandas_object, 64 bits a row) and only the rows whose hash repeats are compared cell by
cell, so the cost on a file without copies is one pass over its cells.
"""

from __future__ import annotations

import warnings
from dataclasses import dataclass

import numpy as np
import pandas as pd


@dataclass(frozen=True)
class CopiedRows:
    """The copies found: each copy's row number and that of the first earlier row it repeats (in the order of the
    copies), the columns compared, and the row-number column left out of the comparison (None if none)."""

    copies: tuple[int, ...]
    originals: tuple[int, ...]
    columns: int
    numbering: str | None = None
    # a time-stamp column left out of the comparison too (:func:`time_stamp_column`), None if none
    time_stamp: str | None = None
    # with a time stamp left out: the rows that repeat an earlier one are few (:func:`few_repeats`), so that rows alike
    # in every column but their stamps read as a second submission, not as respondents who answered alike by chance
    few_stamped: bool = False

    def __len__(self) -> int:
        return len(self.copies)

    def longest_run(self) -> int:
        """The most consecutive rows that repeat consecutive earlier rows in the same order (row 302 repeats 2, 303
        repeats 3, ...): the mark of rows pasted or a file appended, which respondents answering alike by chance do
        not leave."""
        if not self.copies:
            return 0
        copies, originals = np.array(self.copies), np.array(self.originals)
        follows = (np.diff(copies) == 1) & (np.diff(originals) == 1)
        longest = current = 1
        for step in follows.tolist():
            current = current + 1 if step else 1
            longest = max(longest, current)
        return longest


def numbering_column(frame: pd.DataFrame) -> str | None:
    """The first column of ``frame`` that numbers its rows: whole numbers, each exactly one more than the one in the
    row before (1, 2, 3, ... or 0, 1, 2, ...), at least three rows (None if there is none)."""
    if len(frame) < 3:
        return None
    for name in frame.columns:
        column = frame[name]
        if column.dtype.kind not in "iuf":
            continue
        values = column.to_numpy(dtype=float)
        steps = np.diff(values)
        if np.all(steps == 1.0) and float(values[0]).is_integer():
            return name
    return None


#: the most rows, as a share of the rows compared, that may repeat an earlier row in every column but a time stamp for
#: them to be named without a column that tells respondents apart (a rule of thumb of this project: where answers
#: alike by chance are common, more rows repeat one another than a few second submissions)
FEW_STAMPED_REPEATS_SHARE = 0.01


def few_repeats(copies: int, rows: int) -> bool:
    """Whether ``copies`` rows repeating an earlier row among ``rows`` are few: one, or at most
    :data:`FEW_STAMPED_REPEATS_SHARE` of the rows."""
    return 0 < copies <= max(1.0, FEW_STAMPED_REPEATS_SHARE * rows)


#: words of a column's name (data.column_roles.name_words) that name the time a row was submitted or recorded
TIME_STAMP_WORDS = ("timestamp", "time", "date", "datetime", "submitted", "recorded", "completed")


def time_stamp_column(frame: pd.DataFrame, skip=()) -> str | None:
    """The first column of ``frame`` outside ``skip`` named as a time stamp (a word of :data:`TIME_STAMP_WORDS`:
    'Timestamp', 'EndDate', 'submitted_at') whose cells are dates or times (each cell with a value read as one by
    pandas), or None: a survey platform's stamp of each submission, which a respondent's second submission never
    shares with the first."""
    from cfa_tool.data.column_roles import name_words

    for name in frame.columns:
        if not isinstance(name, str) or name in skip or not any(w in TIME_STAMP_WORDS for w in name_words(name)):
            continue
        values = frame[name].dropna()
        if not len(values):
            continue
        if values.dtype.kind == "M":
            return name
        if values.dtype.kind != "O" or not all(isinstance(v, str) for v in values):
            continue
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")  # pandas' word on a format it infers
            read = pd.to_datetime(values, errors="coerce", format="mixed")
        if read.notna().all():
            return name
    return None


def copied_rows(frame: pd.DataFrame, row_numbers: np.ndarray, block: np.ndarray | None = None,
                time_stamp: str | None = None) -> CopiedRows | None:
    """The rows of ``frame`` identical in every column (empty cells alike; a row-number column,
    :func:`numbering_column`, left out, and the column ``time_stamp`` when given) to an earlier row, with the row
    numbers ``row_numbers`` of the file (None when no row repeats another).  ``block``: some columns of ``frame`` as
    floats (the items, taken out once per fit), compared first: only rows that repeat an earlier row there are
    compared in every column."""
    if len(frame) < 2 or frame.shape[1] == 0:
        return None
    rows = np.arange(len(frame))
    if block is not None and block.shape[0] == len(frame) and block.shape[1]:
        if not _some_alike(block):
            return None  # no row repeats an earlier row's items: the common case, one product and one sort
        original = _first_alike(block)
        rows = np.flatnonzero(original != np.arange(len(frame)))
        if not len(rows):
            return None  # no row repeats an earlier row's items: the common case, one sort of the items
        rows = np.union1d(rows, original[rows])
    part = frame.iloc[rows] if len(rows) < len(frame) else frame
    numbering = numbering_column(frame)
    aside = [c for c in (numbering, time_stamp) if c is not None and c in frame.columns]
    compared = part.drop(columns=aside) if aside else part
    if compared.shape[1] == 0:
        return None
    try:
        hashes = pd.util.hash_pandas_object(compared, index=False).to_numpy()
    except TypeError:  # cells of mixed kinds that pandas cannot hash: hashed as text
        hashes = pd.util.hash_pandas_object(compared.astype(str), index=False).to_numpy()
    _, first, inverse = np.unique(hashes, return_index=True, return_inverse=True)
    original = first[inverse.ravel()]  # the first row with each row's hash
    candidates = np.flatnonzero(original != np.arange(len(compared)))
    if not len(candidates):
        return None
    a = compared.iloc[candidates].to_numpy(dtype=object)
    b = compared.iloc[original[candidates]].to_numpy(dtype=object)
    alike = ((a == b) | (pd.isna(a) & pd.isna(b))).all(axis=1)  # the hashes' word checked cell by cell
    copies = candidates[alike]
    if not len(copies):
        return None
    numbers = row_numbers[rows]
    stamped = time_stamp if time_stamp in aside else None
    return CopiedRows(tuple(int(r) for r in numbers[copies]), tuple(int(r) for r in numbers[original[copies]]),
                      compared.shape[1], None if numbering is None else str(numbering), stamped,
                      stamped is not None and few_repeats(len(copies), len(frame)))


#: fixed odd multipliers of the items' bits in a row's screening sum (any numbers do: equal rows have equal sums,
#: and a pair of unequal rows with equal sums is only compared cell by cell for nothing)
_SCREEN = np.random.default_rng(20261203).integers(1, 2**62, size=256, dtype=np.uint64) * np.uint64(2) + np.uint64(1)


def _some_alike(block: np.ndarray) -> bool:
    """Whether two rows of ``block`` may be equal: two equal sums of their values' bits times fixed multipliers,
    in integer arithmetic, whose sums do not depend on their order (a screen, cheaper than sorting the rows; False
    means that no two rows are equal)."""
    k = block.shape[1]
    weights = _SCREEN[:k] if k <= len(_SCREEN) else np.resize(_SCREEN, k)
    empty = np.isnan(block)
    values = np.where(empty, np.nan, block) if empty.any() else block  # one NaN for every empty cell
    # (an answer written -0 and one written 0 differ here: such a copy is not found, a price of one pass)
    sums = np.sort(values.view(np.uint64) @ weights)
    return bool((sums[1:] == sums[:-1]).any())


def _first_alike(block: np.ndarray) -> np.ndarray:
    """For each row of ``block`` (floats, NaN where empty) the first row with the same values (itself if none)."""
    canonical = np.where(np.isnan(block), np.nan, block) + 0.0  # one NaN, and -0.0 as 0.0
    keys = np.ascontiguousarray(canonical).view(np.dtype((np.void, canonical.dtype.itemsize * canonical.shape[1])))
    _, first, inverse = np.unique(keys.ravel(), return_index=True, return_inverse=True)
    return first[inverse.ravel()]
