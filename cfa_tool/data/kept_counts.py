"""The reading's notes on values read as no answer, counted over the rows analysed.

The reader counts the cells of every row of the file: the values the file marks as no answer (data.non_answers:
declared missing values, labels and cells that say no answer), the codes given with --missing-codes
(data.missing_codes) and the codes labelled like no answer that lie between the answers and stay answers.  Row
filters (--keep) and a half of a halves file choose the rows after the reading; the notes are then written again
over the rows they kept (:func:`kept_reading_notes`), by the one rule of every count of the rows analysed: the
screening of values that look like no answers (codes set apart from the answer scale, data.odd_values) runs on the
rows kept, and the cautions of the reading are those of the rows kept (pipeline.inputs.kept_cautions).  New-user
trial s22, problem 3: 870 cells of a file of 1,400 rows were said of the 267 rows analysed, where 188 were read
so (22% of their cells against 4.7%).
"""

from __future__ import annotations

from collections.abc import Collection
from dataclasses import dataclass, field, replace

import numpy as np
import pandas as pd

from cfa_tool.data.missing_codes import missing_codes_note
from cfa_tool.data.non_answers import NonAnswer, answers_labelled_like_none, non_answer_note
from cfa_tool.note_parts import Text
from cfa_tool.numbers import counted


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

    def notes_among(self, frame: pd.DataFrame, non_answers: tuple[NonAnswer, ...]) -> dict[int, tuple[Text, ...]]:
        """The notes over the rows of ``frame`` (the rows kept), keyed by the identity of the note read over every
        row that each replaces (no note where none is left to say); ``non_answers``: the values read as no answer in
        those rows (:func:`kept_non_answers`)."""
        rows = f"the {counted(len(frame), 'row')}"
        out: dict[int, tuple[Text, ...]] = {}
        if self.codes_note is not None and self.coded:  # (a note that no item of the file holds a code stays)
            kept = frame.index
            cells = [(c, int(pd.Index(r).isin(kept).sum())) for c, r in self.coded]
            cells = [(c, n) for c, n in cells if n]
            out[id(self.codes_note)] = (missing_codes_note(
                self.source, self.codes, cells,
                f"of {'the items' if self.items is not None else 'numbers'} in {rows} the row filters kept"),)
        if self.non_answer_note is not None:
            note = non_answer_note(non_answers, self.source, self.items, kept=len(frame))
            out[id(self.non_answer_note)] = (note,) if note else ()
        if self.labelled_notes:
            codes = tuple(self.codes)
            out[id(self.labelled_notes[0])] = tuple(a.note(self.source, codes) for a in answers_labelled_like_none(
                frame, self.item_labels, codes))
            out.update({id(n): () for n in self.labelled_notes[1:]})
        return out


def kept_reading_notes(notes: Collection[Text], counts: ReadingCounts | None, frame: pd.DataFrame,
                       non_answers: tuple[NonAnswer, ...]) -> list[Text]:
    """``notes`` (the reading's, in order) with those of ``counts`` written again over the rows of ``frame`` (the
    rows row filters kept: :meth:`ReadingCounts.notes_among`), each in the place of the one it replaces."""
    if counts is None:
        return list(notes)
    among = counts.notes_among(frame, non_answers)
    out: list[Text] = []
    for note in notes:
        out.extend(among.get(id(note), (note,)))
    return out
