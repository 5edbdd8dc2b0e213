"""The case filter an SPSS file was saved with: SPSS keeps every case and writes the filter as a variable, whose
deselected rows would be analysed with the others without a word (review s15, hostile case 10)."""

from __future__ import annotations

from dataclasses import dataclass, replace

import numpy as np
import pandas as pd

from cfa_tool.numbers import cut_list, user_number
from cfa_tool.data.moments import row_numbers
from cfa_tool.errors import printable
from cfa_tool.note_parts import Command, Note
from cfa_tool.options import Option


def kept_rows_words(kept: int, left_out: int, others: str) -> str:
    """The words of a caution on rows the file marks as not meant for analysis (a workbook's hidden rows, an SPSS
    file's deselected rows) on what is done with them: '; they are kept as the file holds them, and a fit analyses
    them with OTHERS', or, when row filters left ``left_out`` of them out, '; the row filters leave out 2 of them, and
    the other 1 is kept ...'.  Present tense, what every command does with them, so that a check, which analyses
    nothing, says what a fit does, and a fit what it did."""
    rest = "it" if kept == 1 else "them"
    if left_out:
        which = f"; the row filters leave out {left_out} of them, and the other {kept} {'is' if kept == 1 else 'are'}"
    else:
        which = f"; {'it is' if kept == 1 else 'they are'}"
    return f"{which} kept as the file holds {rest}, and a fit analyses {rest} with {others}"


@dataclass(frozen=True)
class FilterVariable:
    """An SPSS file saved while a case filter was on: SPSS keeps every case and writes the filter as a variable
    ('filter_$', its variable label ending in '(FILTER)', its values labelled 0 'Not Selected' and 1 'Selected';
    the SPSS documentation of 'Select Cases', recalled from memory).  The deselected rows are read and analysed as
    the file holds them, but named first in every view, as a workbook's filtered-out rows are
    (data.readers.HiddenRows), with the row filter that keeps the selected rows (review s15, hostile case 10)."""

    column: str
    label: str  # the variable label ('district = 'north' (FILTER)'), '' when it has none
    rows: tuple[int, ...]  # the deselected rows (data.moments.row_numbers)
    of: int  # rows of data in the file
    selected: float  # the code labelled 'Selected'
    filtered_out: int = 0  # deselected rows the row filters (--keep) left out
    #: the kind of problem every view files it under (assessment.admissibility.ProblemKind's value): rows, not values
    #: that look like no answers (s21)
    problem_kind: str = "rows a saved case filter deselects"

    def among(self, kept) -> FilterVariable | None:
        """The deselected rows that row filters kept (``kept``: row numbers), or None when they kept none."""
        rows = tuple(r for r in self.rows if r in kept)
        return replace(self, rows=rows, filtered_out=self.filtered_out + len(self.rows) - len(rows)) if rows else None

    def keep(self) -> str:
        """The row filter that keeps the selected rows: 'filter_$ = 1'."""
        return f"{self.column} = {user_number(self.selected)}"

    def caution(self, source: str) -> str:
        name = source.replace("\\", "/").rsplit("/", 1)[-1]
        shown = cut_list(self.rows, 5)
        label = f" ('{printable(self.label)}')" if self.label else ""
        return (f"{name} was saved with a case filter on: its filter variable {printable(self.column)}{label} marks "
                f"{len(self.rows) + self.filtered_out} of its {self.of} rows 'Not Selected' "
                f"(row{'s' if len(self.rows) != 1 else ''} {shown})"
                + kept_rows_words(len(self.rows), self.filtered_out, "the selected rows") + ".")

    def advice(self) -> Note:
        """What to try, the row filter apart (note_parts.Command): a manuscript's reader runs nothing."""
        return Note(("To analyse only the selected rows, as the filter did, ",
                     Command(f"give {Option.KEEP.given(printable(self.keep()))}",
                             f"keep the rows where {printable(self.keep())}"),
                     "; to analyse every row, leave the caution be."))

    def to_dict(self) -> dict:
        return {"column": self.column, "label": self.label, "rows": list(self.rows), "of": self.of,
                "keep": self.keep()}


#: the value labels of an SPSS filter variable, in lower case
FILTER_LABELS = ("not selected", "selected")


def filter_variable(frame: pd.DataFrame, variable_labels: dict, value_labels: dict) -> FilterVariable | None:
    """The case filter variable of an SPSS file (:class:`FilterVariable`) when a column is one (named 'filter_$' or
    labelled '... (FILTER)', holding only codes labelled 'Not Selected' and 'Selected') and some rows are not
    selected; else None."""
    for column, coded in value_labels.items():
        label = str(variable_labels.get(column, "") or "")
        if column not in frame.columns or not (column.lower() == "filter_$" or
                                               label.strip().upper().endswith("(FILTER)")):
            continue
        words = {str(text).strip().lower(): code for code, text in coded.items()}
        if set(words) != set(FILTER_LABELS) or not all(isinstance(c, float) for c in words.values()):
            continue
        values = frame[column].to_numpy(dtype=float, na_value=np.nan)
        if not np.isin(values[np.isfinite(values)], list(words.values())).all():
            continue
        out = np.flatnonzero(values == words["not selected"])
        if len(out):
            return FilterVariable(str(column), label.strip(), tuple(int(r) for r in row_numbers(frame)[out]),
                                  len(frame), float(words["selected"]))
    return None
