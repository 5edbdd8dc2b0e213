"""Lines of text under a table of data (a spreadsheet export's "Notes: codes 8 = don't know ..." or "Source: ..."
row): the one rule by which the readers of delimited text and of workbooks recognise them, and the one note that says
so.  Such a line is no respondent: it is not read as a row of data, so no count of rows (the data summary, the
methods paragraph, the JSON) holds it, and no scores file lists it.

The rule: a row below every row of data (only blank rows and other such lines under it) is a notes line when its
first column holds text of two words or more and every value it holds is text (no number, no date) that its column
holds in no row of data.  A respondent's row always fails it somewhere: a row that answers nothing but has an id of
one word, a school or a sex its column repeats, or a number anywhere stays a row of data (left out of the estimation
as a row that answers no model variable, and counted).
"""

from __future__ import annotations

import math
from collections import Counter
from collections.abc import Sequence

import pandas as pd

from cfa_tool.data.kept_rows import RowNaming, row_naming, rows_listed
from cfa_tool.data.moments import row_numbers
from cfa_tool.errors import clipped
from cfa_tool.numbers import cut_list, number

#: the texts a note shows of its notes lines, at most
SHOWN_LINES = 3


def _empty(cell: object) -> bool:
    return (cell is None or (isinstance(cell, str) and not cell.strip())
            or (isinstance(cell, float) and math.isnan(cell)))


def _text(cell: object) -> bool:
    """A cell of text that writes no number (either decimal mark): a workbook's numbers and dates are not str."""
    return isinstance(cell, str) and number(cell) is None and number(cell, True) is None


def notes_lines(rows: Sequence[Sequence[object]], count_in_column=None) -> tuple[int, ...]:
    """The positions in ``rows`` (a table's rows of data in the file's order, each its cells from the table's first
    column: text as str, empty cells None, NaN or blank text, a workbook's numbers and dates as they are typed) of
    the notes lines under the data, by the module's rule; () when there is none or when no row of data would be
    left.  ``count_in_column(column, text)``: how many rows hold ``text`` (stripped) in that column, counted here from
    ``rows`` when not given (a data frame counts its own column at once)."""
    found: list[int] = []
    position = len(rows) - 1
    while position >= 0:
        cells = rows[position]
        if all(_empty(c) for c in cells):  # blank rows among the lines: left to the readers' rule of blank rows
            position -= 1
            continue
        first = cells[0] if len(cells) else None
        if not (_text(first) and len(first.split()) >= 2 and all(_empty(c) or _text(c) for c in cells)):
            break
        found.append(position)
        position -= 1
    if not found or not any(not all(_empty(c) for c in rows[k]) for k in range(found[-1])):
        return ()  # none, or a table of such lines only: the readers' own messages about a table without data
    if count_in_column is None:
        counted: dict[int, Counter] = {}

        def count_in_column(column: int, text: str) -> int:
            if column not in counted:
                counted[column] = Counter(str(r[column]).strip() for r in rows
                                          if column < len(r) and not _empty(r[column]))
            return counted[column][text]

    notes: list[int] = []
    for k in reversed(found):  # from the top: a line with a value another row holds is a row, and those above it
        if any(count_in_column(c, cell.strip()) > 1 for c, cell in enumerate(rows[k]) if not _empty(cell)):
            notes = []
            continue
        notes.append(k)
    return tuple(notes)


def end_of_data(rows: Sequence[Sequence[object]], found: Sequence[int]) -> int:
    """The position after the last row of data above the notes lines ``found`` (:func:`notes_lines`): the rows from
    it on, the notes lines and the blank rows among and above them, are not read, as if the lines were not there."""
    position = min(found) - 1
    while position >= 0 and all(_empty(c) for c in rows[position]):
        position -= 1
    return position + 1


def notes_note(where: str, rows: Sequence[int], lines: Sequence[Sequence[object]],
               naming: RowNaming = RowNaming.FILE_ROW) -> str:
    """The one note of the notes lines a reader left out: ``rows``, their numbers (data.moments.row_numbers, in the
    words of ``naming``: a file's rows as a spreadsheet shows it), ``lines`` the cells of each (its text shown, the
    cells a separator split it into joined by '; ')."""
    one = len(rows) == 1
    texts = ["; ".join(str(c).strip() for c in cells if not _empty(c)) for cells in lines]
    shown = cut_list(texts, SHOWN_LINES, lambda t: f"'{clipped(t, 70)}'")
    return (f"{where}: {rows_listed(rows, naming=naming)} under the data {'holds' if one else 'hold'} only text "
            f"({shown}), {'a note' if one else 'notes'} rather than a respondent's answers, so "
            f"{'it was' if one else 'they were'} not read as {'a row' if one else 'rows'} of data")


class _FrameRows(Sequence):
    """A data frame's rows as the cells :func:`notes_lines` reads (a missing value None), each read when asked."""

    def __init__(self, frame: pd.DataFrame):
        self.frame = frame

    def __len__(self) -> int:
        return len(self.frame)

    def __getitem__(self, k):
        return [None if _missing(v) else v for v in self.frame.iloc[k].tolist()]


def _missing(value: object) -> bool:
    try:
        return bool(pd.isna(value))
    except (TypeError, ValueError):  # a list or an array in a cell
        return False


def drop_notes_lines(frame: pd.DataFrame, where: str) -> tuple[pd.DataFrame, tuple[str, ...]]:
    """A data frame without the notes lines under its data (one read from a spreadsheet export by pandas, the line
    in its first column), and the note naming them: the rule of the file readers, so that a file and the same table
    read by pandas count the same rows."""
    if frame.shape[1] == 0 or len(frame) < 2:
        return frame, ()

    def count_in_column(column: int, text: str) -> int:
        cells = frame.iloc[:, column]
        return int(cells.map(lambda v: isinstance(v, str) and v.strip() == text).sum())

    found = notes_lines(_FrameRows(frame), count_in_column)
    if not found:
        return frame, ()
    rows = _FrameRows(frame)
    numbers = row_numbers(frame)[list(found)]
    note = notes_note(where, numbers, [rows[k] for k in found], row_naming(frame))
    return frame.iloc[:end_of_data(rows, found)], (note,)
