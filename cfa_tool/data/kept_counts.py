"""The reading's notes on values read as no answer, counted over the rows analysed.

The reader counts the cells of every row of the file: the values the file marks as no answer (data.non_answers:
declared missing values, labels and cells that say no answer), the codes given with --missing-codes
(data.missing_codes) and the codes labelled like no answer that lie between the answers and stay answers.  Row
filters (--keep) and a half of a halves file choose the rows after the reading; the notes are then written again
over the rows they kept (:func:`kept_reading_notes`), and so they are over the rows with a value in the group
column when a run fits groups, which leaves the other rows out (:func:`analysed_rows`; rows-s23: the notes of a fit
of groups counted those rows), by the one rule of every count of the rows analysed: the screening of values that
look like no answers (codes set apart from the answer scale, data.odd_values) runs on the rows kept, and the
cautions of the reading are those of the rows kept (pipeline.inputs.kept_cautions).  New-user
trial s22, problem 3: 870 cells of a file of 1,400 rows were said of the 267 rows analysed, where 188 were read
so (22% of their cells against 4.7%).
"""

from __future__ import annotations

from collections.abc import Collection
from dataclasses import dataclass, field, replace

import numpy as np
import pandas as pd

from cfa_tool.data.missing_codes import missing_codes_note
from cfa_tool.data.non_answers import (FILTERS_KEPT, NonAnswer, answers_labelled_like_none, fit_marked_note,
                                       non_answer_note, unused_run_words)
from cfa_tool.note_parts import Text
from cfa_tool.numbers import counted


def analysed_words(filtered: bool, group: str | None) -> str:
    """The words after 'the N rows' that name the rows analysed when not every row read is: those the row filters
    (or a half) kept (``filtered``), those with a value in the ``group`` column (a fit of groups leaves the others
    out), or both."""
    from cfa_tool.errors import printable

    labelled = f"with a value in the group column '{printable(group)}'" if group is not None else ""
    if filtered:
        return f"{FILTERS_KEPT} {labelled}".strip()
    return labelled


def analysed_rows(frame: pd.DataFrame, filtered: bool, group: str | None = None,
                  labelled: np.ndarray | None = None) -> tuple[pd.DataFrame, str | None]:
    """The rows of ``frame`` (the rows read, after any row filter: ``filtered``) that an analysis takes, with the words
    that name them after 'the N rows' (:func:`analysed_words`), or None when they are every row read: a fit of groups
    leaves out the rows without a value in the ``group`` column (``labelled``: data.groups.has_group of ``frame``)."""
    analysed = frame if labelled is None or labelled.all() else frame[labelled]
    unlabelled = len(analysed) < len(frame)
    if not filtered and not unlabelled:
        return frame, None
    return analysed, analysed_words(filtered, group if unlabelled else None)


def markers_note(found: dict[str, int], where, among: str = "") -> str | None:
    """The note naming how many cells of each marker of no answer ('NA', '.': data.readers.MISSING_MARKERS) were
    read as empty (``found``: {marker: cells}, in the markers' order); ``among``: the rows counted, when not every
    row read ('of the 470 rows that the row filters kept'); None when no cell holds one."""
    found = {m: k for m, k in found.items() if k}
    if not found:
        return None
    listed = ", ".join(f"'{m}' ({counted(k, 'cell')})" for m, k in found.items())
    return f"{where}: cells written as {listed}{' ' + among if among else ''} were read as no answer"


def kept_non_answers(found: tuple[NonAnswer, ...], frame: pd.DataFrame) -> tuple[NonAnswer, ...]:
    """``found`` (values read as no answer, data.non_answers.NonAnswer) in the rows of ``frame`` (the rows row filters
    kept; index labels as the reader gave them), a value no kept row holds left out."""
    kept = []
    for f in found:
        rows = tuple(np.asarray(f.rows)[pd.Index(f.rows).isin(frame.index)].tolist()) if f.rows else ()
        if rows:
            kept.append(f if len(rows) == len(f.rows) else replace(f, rows=rows))
    return tuple(kept)


def emptied_cells(before: pd.DataFrame, after: pd.DataFrame) -> tuple[tuple[str, tuple], ...]:
    """The cells of ``before`` that hold a value and are empty in ``after`` (the same rows, a reading of no answers
    applied): (column, index labels of its rows) for each column with such cells, in the frame's order."""
    out = []
    for column in before.columns:
        if column not in after.columns or before[column] is after[column]:
            continue
        emptied = before[column].notna().to_numpy() & after[column].isna().to_numpy()
        if emptied.any():
            out.append((column, tuple(before.index[emptied].tolist())))
    return tuple(out)


@dataclass(frozen=True)
class ReadingCounts:
    """What the reading of no answers counted in the item columns, kept with the notes it wrote over every row read
    (the very objects ``LoadedData.notes`` holds), so that :func:`kept_reading_notes` writes them again over the rows
    analysed.  ``coded``: each item column's rows (index labels) whose cell held a code given with --missing-codes
    (``codes``, as given); ``items``: the item columns (None: every column); ``item_labels``: the value labels of the
    item columns, by which a code labelled like no answer stays an answer between the answers."""

    source: str
    items: frozenset[str] | None
    codes: tuple = ()
    coded: tuple[tuple[str, tuple], ...] = ()
    item_labels: dict = field(default_factory=dict)
    codes_note: Text | None = None
    non_answer_note: Text | None = None
    labelled_notes: tuple[Text, ...] = ()
    #: the note of a text file or a workbook on cells written as a marker of no answer ('NA', '.'), with the rows
    #: (index labels) of those cells, one per cell, for each marker (data.readers.MARKER_CELLS)
    markers_note: Text | None = None
    markers: dict = field(default_factory=dict)
    #: the words given with --missing-codes (as given), and the note on those no value of the items says
    words: tuple[str, ...] = ()
    unused_note: Text | None = None
    #: each code of ``codes`` that some item cell held, with the rows (index labels) of those cells
    code_rows: tuple[tuple[float, tuple], ...] = ()
    #: scores of other data with an earlier fit: the cells read as no answer because the fit's data file marked their
    #: values so (data.non_answers.CarriedCells), and the note over every row read that says them
    carried: tuple = ()
    carried_note: Text | None = None

    def codes_among(self, frame: pd.DataFrame) -> tuple[float, ...]:
        """The codes given with --missing-codes that some item cell of the rows of ``frame`` held (the methods
        paragraph names those, not a code that only rows left out held)."""
        return tuple(c for c, rows in self.code_rows if pd.Index(rows).isin(frame.index).any())

    def notes_among(self, frame: pd.DataFrame, non_answers: tuple[NonAnswer, ...],
                    among: str = FILTERS_KEPT) -> dict[int, tuple[Text, ...]]:
        """The notes over the rows of ``frame`` (the rows kept), keyed by the identity of the note read over every
        row that each replaces (no note where none is left to say); ``non_answers``: the values read as no answer in
        those rows (:func:`kept_non_answers`); ``among``: the words that name those rows after 'the N rows'
        (:func:`analysed_words`)."""
        rows = f"the {counted(len(frame), 'row')}"
        kept = frame.index
        out: dict[int, tuple[Text, ...]] = {}
        if self.markers_note is not None:
            note = markers_note({m: int(pd.Index(r).isin(kept).sum()) for m, r in self.markers.items()},
                                self.source, f"of {rows} {among}")
            out[id(self.markers_note)] = (note,) if note else ()
        if self.codes_note is not None and self.coded:  # (a note that no item of the file holds a code stays)
            cells = [(c, int(pd.Index(r).isin(kept).sum())) for c, r in self.coded]
            cells = [(c, n) for c, n in cells if n]
            out[id(self.codes_note)] = (missing_codes_note(
                self.source, self.codes, cells,
                f"of {'the items' if self.items is not None else 'numbers'} in {rows} {among}"),)
        unused = unused_run_words(non_answers, self.words) if self.words else ()
        said_unused = (missing_codes_note(self.source, unused, [], f"of the items in {rows} {among}"),) \
            if unused else ()
        if self.non_answer_note is not None:
            note = non_answer_note(non_answers, self.source, self.items, kept=len(frame), among=among)
            # words that only rows left out held: said after what the rows kept hold (no note of them was read)
            out[id(self.non_answer_note)] = ((note,) if note else ()) + (said_unused if self.unused_note is None else ())
        if self.unused_note is not None:
            out[id(self.unused_note)] = said_unused
        if self.carried_note is not None:
            note = fit_marked_note(self.carried, self.source, kept, among)
            out[id(self.carried_note)] = (note,) if note else ()
        if self.labelled_notes:
            codes = tuple(self.codes)
            out[id(self.labelled_notes[0])] = tuple(a.note(self.source, codes) for a in answers_labelled_like_none(
                frame, self.item_labels, codes))
            out.update({id(n): () for n in self.labelled_notes[1:]})
        return out


def kept_reading_notes(notes: Collection[Text], counts: ReadingCounts | None, frame: pd.DataFrame,
                       non_answers: tuple[NonAnswer, ...], among: str = FILTERS_KEPT) -> list[Text]:
    """``notes`` (the reading's, in order) with those of ``counts`` written again over the rows of ``frame`` (the
    rows row filters kept, or those with a value in the group column: :meth:`ReadingCounts.notes_among`, ``among``
    naming them), each in the place of the one it replaces."""
    if counts is None:
        return list(notes)
    among = counts.notes_among(frame, non_answers, among)
    out: list[Text] = []
    for note in notes:
        out.extend(among.get(id(note), (note,)))
    return out
