"""Which rows of the data file a frame holds after row filters, and where a cell is in the file: the words messages
use for them."""

from __future__ import annotations

import enum
from collections.abc import Mapping

import numpy as np
import pandas as pd

from cfa_tool.data.filter_text import filter_text
from cfa_tool.errors import clipped, printable
from cfa_tool.numbers import count_text, counted, more_words, names_shown
from cfa_tool.note_parts import Command, Note, RowId, Text
from cfa_tool.options import Option

#: the key of DataFrame.attrs that names the row filters a frame's rows were kept by (set by data.filters)
KEPT_BY = "kept_by_row_filters"

#: the key of DataFrame.attrs that keeps, for a table read from a sheet, each column's letter in the sheet
#: ({column name: 'E'}), set by data.readers: a message about a cell names it as the sheet does ('cell E425')
SHEET_COLUMNS = "sheet_columns"

#: the key of DataFrame.attrs that keeps, for a delimited text file whose records span text lines (line breaks
#: inside quoted cells), the text line of each row whose number differs from it ({row: line}), set by data.readers:
#: rows are numbered as a spreadsheet shows the file (one per record), and a message names the line beside them
TEXT_LINES = "text_lines"


#: the key of DataFrame.attrs that says how the frame's rows are named (a :class:`RowNaming`; a file's rows when
#: absent), set by :func:`named_by_index_label`
ROW_NAMING = "row_naming"


#: the key beside a row's number in JSON (the case rows' "row") that says what the number is: a
#: ``RowNaming.json_word``, 'file_row' (the row of the file as a spreadsheet shows it) or 'index_label' (the
#: label of a data frame's index)
ROW_NAMED_BY = "row_named_by"
#: the name under which the file's row names (a first column without a name in the header) are written beside the
#: scores and compared by a row filter ('row_name != E1165'), a column of the file of that name aside
ROW_NAMES_COLUMN = "row_name"


class RowNaming(enum.Enum):
    """How messages and reports name a row of the data, declared once: a file's row by its number in the file as a
    spreadsheet shows it (a sheet's row, a text file's record), a data frame's row by its index label (the label
    pandas shows, ``frame.loc[5]``, and the scores table keeps), never by a count of our own.  The one wording of
    every message that names rows (fixleft s28: 'In index labels 5, 308' named labels, not rows): 'row 12', 'rows
    labelled 5, 308', 'rows at positions 3, 9'."""

    FILE_ROW = ("row", "rows", "Row", "file_row")
    INDEX_LABEL = ("row labelled", "rows labelled", "Index label", "index_label")
    # a data frame whose index repeats labels (pd.concat without ignore_index) or is not of whole numbers (text ids):
    # its rows by their position, counted from 1 (frame.iloc[position - 1]), never called rows of a file
    POSITION = ("row at position", "rows at positions", "Position", "position")

    def __init__(self, one: str, several: str, heading: str, json_word: str) -> None:
        self.one = one
        self.several = several
        self.heading = heading  # a table column's heading
        self.json_word = json_word  # the value of ROW_NAMED_BY beside a row in JSON

    @property
    def holder(self) -> str:
        """What holds the rows, as advice names it: 'file', or 'data frame'."""
        return "file" if self is RowNaming.FILE_ROW else "data frame"

    def of(self, count: int) -> str:
        """The word for ``count`` rows: 'row' / 'rows', 'row labelled' / 'rows labelled'."""
        return self.one if count == 1 else self.several

    def one_row(self, number: int) -> str:
        """One row by its number (data.moments.row_numbers): 'row 106' / 'row labelled 105'."""
        return f"{self.one} {number}"


def row_naming(frame: pd.DataFrame | pd.Series) -> RowNaming:
    """How ``frame``'s rows are named (:data:`ROW_NAMING`): a file's rows unless :func:`named_by_index_label` said
    otherwise."""
    return frame.attrs.get(ROW_NAMING, RowNaming.FILE_ROW)


def named_by_index_label(frame: pd.DataFrame) -> pd.DataFrame:
    """A data frame given by a Python caller, its rows named by their index labels (data.moments.row_numbers gives
    the labels themselves) when the index holds distinct whole numbers; a frame indexed otherwise (by text, or with
    labels repeated, as pd.concat without ignore_index leaves them) has its rows named by their positions, counted
    from 1, and called so (:attr:`RowNaming.POSITION`), never rows of a file (hostile trial s17, finding 7).  Such a
    frame is indexed by its rows' positions (0-based) while it is analysed, so that a row keeps the position the
    caller gave it when row filters, blank rows left out or groups take rows away (a count of the rows kept named
    another row: re-check s17); :func:`caller_labels` gives the caller's own labels back where they are written
    beside the rows (a scores table)."""
    if ROW_NAMING in frame.attrs:  # rows this tool read and named already (explore's confirmation half): kept so
        return frame
    index = frame.index
    frame = frame.copy(deep=False)  # the caller's frame keeps its attrs and its index
    naming = (RowNaming.INDEX_LABEL if len(index) and pd.api.types.is_integer_dtype(index) and index.is_unique
              else RowNaming.POSITION)
    if naming is RowNaming.POSITION:
        frame.index = pd.RangeIndex(len(frame))
    frame.attrs[ROW_NAMING] = naming
    return frame


def caller_labels(index: pd.Index, caller: pd.Index | None) -> pd.Index:
    """The caller's own index labels of the rows at ``index`` of a frame :func:`named_by_index_label` indexed by
    position (``caller``: the index of the frame the caller gave, None when the frame kept it), for what is written
    beside the rows and joins to the caller's frame; ``index`` itself otherwise."""
    return index if caller is None else caller.take(np.asarray(index, dtype=np.int64))


def text_lines(frame: pd.DataFrame | pd.Series) -> Mapping[int, int]:
    """The text lines of ``frame``'s rows that start on a line of another number (:data:`TEXT_LINES`; empty for
    a sheet, a data frame or a text file without line breaks inside quotes)."""
    return frame.attrs.get(TEXT_LINES) or {}


def line_words(number: int, lines: Mapping[int, int] | None) -> str:
    """' (text line 575)' beside row 501 of a text file whose row 501 starts on line 575; '' otherwise."""
    line = (lines or {}).get(number)
    return f" (text line {line})" if line is not None and line != number else ""


def row_words(number: int, lines: Mapping[int, int] | None = None, naming: RowNaming = RowNaming.FILE_ROW) -> str:
    """One row by its number, with its text line when it starts on a line of another number (``lines``:
    :func:`text_lines`): 'row 501 (text line 575)', 'row 12', 'row labelled 11'."""
    return naming.one_row(number) + line_words(number, lines)


def row_of(frame: pd.DataFrame | pd.Series, number: int) -> str:
    """One row of ``frame`` by its number (data.moments.row_numbers) in the words of its naming, with its text line
    when it starts on a line of another number: 'row 12', 'row 501 (text line 575)', 'row labelled 11'."""
    return row_words(number, text_lines(frame), row_naming(frame))


def rows_listed(numbers, shown: int = 5, ids=(), naming: RowNaming = RowNaming.FILE_ROW,
                lines: Mapping[int, int] | None = None) -> Text:
    """Rows named by their numbers (data.moments.row_numbers), the first ``shown`` of them, each with its id when
    ``ids`` gives one (one per row, None where a row has none; a note_parts.RowId, which a manuscript leaves out) and
    its text line when it starts on a line of another number (``lines``: :func:`text_lines`), in the words of
    ``naming``: 'row 711 ('Total responses: 1204')', 'rows 152, 154, 424, 709, 710 and 3 more', 'row 501 (text line
    575)', 'rows labelled 151, 153'."""
    numbers = [int(n) for n in numbers]
    shown = names_shown(len(numbers), shown)  # never 'and 1 more'
    ids = list(ids) if len(ids) == len(numbers) else [None] * len(numbers)
    parts: list = [f"{naming.of(len(numbers))} "]
    for k, (n, i) in enumerate(zip(numbers[:shown], ids)):
        parts += [", " if k else "", str(n) + line_words(n, lines)] + ([RowId(f" ('{clipped(str(i), 40)}')")]
                                                                        if i is not None else [])
    parts.append(more_words(len(numbers) - shown))
    listed = Note(tuple(parts))
    return listed if any(isinstance(p, RowId) for p in listed.parts) else str(listed)


def cell_words(frame: pd.DataFrame | pd.Series, column: str, row: int) -> str:
    """Where a cell is, for a message: 'row 425, cell E425' for a sheet's table (``row``: the number of the row as
    data.moments.row_numbers gives it, the sheet's own), 'row 425' otherwise ('row 501 (text line 575)' in a text file
    whose quoted cells hold line breaks), 'row labelled 424' in a data frame."""
    letter = frame.attrs.get(SHEET_COLUMNS, {}).get(column)
    return row_of(frame, row) + (f", cell {letter}{row}" if letter else "")


def rows_described(frame: pd.DataFrame) -> str:
    """Which rows ``frame`` holds, for a message about what they lack: 'the 250 rows kept by --keep 'district =
    north'', or 'the 480 rows' when no row filter was applied."""
    filters = frame.attrs.get(KEPT_BY, ())
    kept = Option.KEEP.given([printable(text) for text in filters])
    return f"the {len(frame)} {'row' if len(frame) == 1 else 'rows'}" + (f" kept by {kept}" if filters else "")


def too_few_rows(frame: pd.DataFrame | None, n: int, p: int, answered: str, noun: str, needs: str) -> str:
    """The one wording of rows too few for ``p`` ``noun``s (``n`` of the rows of ``frame`` that ``answered`` as the
    analysis needs: 'every item', 'some item'), naming the row filter that left them (new-user trial s26: 'the 9
    rows kept by --keep ... are too few for 10 items'), what the analysis ``needs``, and what works: more rows (a
    wider row filter where one was applied) or fewer of them; ``frame`` None: rows that no filter chose (a matrix's
    sample size)."""
    if frame is None:
        held = f"the {counted(n, 'row')}"
    else:
        held = rows_described(frame)
        if n < len(frame):  # rows without an answer (or, listwise, with a gap) are left out too
            held = f"of {held}, {count_text(n)} answered {answered}, which"
    filtered = frame is not None and bool(frame.attrs.get(KEPT_BY))
    remedy = (f"keep more rows (a wider row filter) or analyse fewer {noun}s" if filtered else
              f"more rows are needed, or fewer {noun}s")
    return f"{held} {'is' if n == 1 else 'are'} too few for {counted(p, noun)}: {needs}; {remedy}"


#: a survey platform's record of whether a respondent finished the questionnaire: the column's name (case aside)
FINISHED_COLUMNS = ("finished",)
#: the values such a column holds for a finished and an unfinished response (case aside)
_FINISHED_VALUES = {"true": True, "1": True, "yes": True, "1.0": True, "false": False, "0": False, "no": False,
                    "0.0": False}


def unfinished_rows_note(frame: pd.DataFrame, source: str) -> Note | None:
    """A note when a survey export's 'Finished' column (FINISHED_COLUMNS) marks some of the rows analysed as not
    finished: they are analysed with the answers they gave, and a row filter leaves them out (a new user had to
    decide alone: 69 unfinished, partly answered responses were fitted without a word).  None otherwise."""
    column = next((c for c in frame.columns.tolist() if str(c).strip().casefold() in FINISHED_COLUMNS), None)
    if column is None:
        return None
    values = frame[column]
    cells = values.dropna().astype(str).str.strip().str.casefold()
    read = cells.map(_FINISHED_VALUES)
    if not len(cells) or read.isna().any() or read.all() or not read.any():
        return None
    finished = next(str(v).strip() for v, ok in zip(values.dropna(), read) if ok)
    unfinished = int((~read.astype(bool)).sum())
    return Note((f"{source}: the column '{printable(str(column))}' marks {count_text(unfinished)} of the {count_text(len(frame))} rows as not "
                 f"finished: they are analysed with the answers they gave; to leave them out, ",
                 Command(Option.KEEP.given(filter_text(str(column), "=", finished) or f"{column} = {finished}"),
                         f"keep only the rows where {printable(str(column))} = {finished}")))
