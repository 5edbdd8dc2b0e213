"""Read a data file into a DataFrame, with plain-words errors.

Delimited text (CSV/TSV/semicolon: the delimiter is detected from the header
line, and a semicolon file is read with decimal commas, as spreadsheet
programs in many locales write them); Excel workbooks (openpyxl); SPSS and
Stata files (pyreadstat), whose user-defined missing values become missing
and whose variable and value labels are kept for reports.
"""

from __future__ import annotations

import codecs
import csv
import io
import re
from collections.abc import Collection
from dataclasses import dataclass, field, replace
from enum import Enum
from pathlib import Path
from typing import TYPE_CHECKING

import numpy as np
import pandas as pd

from cfa_tool.data.csv_convention import UTF8 as UTF8_NAME, UTF8_MARK, separator_words
from cfa_tool.data.case_filter import filter_variable, kept_rows_words
from cfa_tool.data.kept_rows import (SHEET_COLUMNS, TEXT_LINES, line_words, row_naming, row_words, rows_listed,
                                     text_lines)
from cfa_tool.data.kept_counts import ReadingCounts, emptied_cells, markers_note
from cfa_tool.data.missing_codes import apply_missing_codes, carried_codes_on_answers, codes_on_answers, \
    declared_codes_on_answers, missing_codes_note
from cfa_tool.data.moments import column_dtypes, file_rows_index, row_numbers, stored_column
from cfa_tool.data.notes_rows import end_of_data, notes_lines, notes_note
from cfa_tool.data.non_answers import GIVEN_CODES, answers_labelled_like_none, declared_missing, declared_ranges, \
    no_answer_codes, \
    labelled_non_answers, \
    non_answer_note, fit_marked_note, read_fit_marked, run_words, says_no_answer, unused_run_words, written_non_answers
from cfa_tool.data.renamed_columns import ColumnRename, names_in_file, rename_note, renamed_frame
from cfa_tool.data.row_ids import id_text
from cfa_tool.errors import DataError, clipped, printable
from cfa_tool.note_parts import Command, Note
from cfa_tool.options import Option
from cfa_tool.input_files import base_name, check_input_path, input_bytes, line_count, utf16_text
from cfa_tool.language.names import composed as composed_text
from cfa_tool.numbers import counted, cut_list, number, word_list

if TYPE_CHECKING:
    from cfa_tool.data.moments import ItemColumns

_DELIMITERS = ",;\t|"


@dataclass(frozen=True, eq=False)
class LoadedData:
    """A data file as read: its rows, labels, and what reading and filtering it did."""
    frame: pd.DataFrame
    source: str
    variable_labels: dict[str, str] = field(default_factory=dict)
    value_labels: dict[str, dict] = field(default_factory=dict)
    notes: tuple[str, ...] = ()  # what reading the file did that the report should say
    #: the values of a first column without a name in the header (row names), as text, one per row of ``frame``
    #: and on its index; None when the file has no such column.  Never analysed; they can name the rows in outputs.
    row_names: pd.Series | None = None
    #: the rows as read, before row filters (None when no filter was applied: ``frame`` holds them all)
    read_frame: pd.DataFrame | None = None
    #: the row filters applied (data.filters.RowFilter, parsed once: their text as the user wrote it), in order
    row_filters: tuple = ()
    #: values in the model's item columns that look like no answers (data.odd_values.OddValues), found on reading
    odd_values: tuple = ()
    #: the model's item columns of ``frame`` as one float array, taken out once for the screening, the missing-data
    #: handling and the moments (None before the model is known)
    items: ItemColumns | None = None
    #: a workbook of several sheets read without a sheet named: every sheet's name, the one read first
    sheets: tuple[str, ...] = ()
    #: the sheet of a workbook that was read (the one asked for, else the first shown: :func:`sheet_read`); '' for
    #: another file.  A halves file records it, and a half read back is checked by it (data.halves)
    sheet_read: str = ""
    #: values the file itself marks as no answer (data.non_answers.NonAnswer), read as missing on reading
    non_answers: tuple = ()
    #: what reading found that every view names first, though the rows are analysed as the file holds them:
    #: objects with ``caution(source)`` and ``advice()`` (data.non_answers.BeyondScale, HiddenRows)
    cautions: tuple = ()
    #: how a delimited text file was read (TextReading: encoding, separator, decimal mark); None for other files
    reading: TextReading | None = None
    #: where an option (--names-row) said the column names are, in the words of a message about a missing column
    #: ('' when the first row with values held them)
    names_row_hint: str = ""
    #: the row of the file (as a spreadsheet shows it, from 1) the column names were read from: 1 unless rows above
    #: them were left unread (--names-row, a title row, empty rows); a scores file's header sits beside it
    names_row_read: int = 1
    #: columns read under new names (data.renamed_columns.ColumnRename: --rename), which every report names
    renamed: tuple = ()
    #: a data frame's own index when its rows are named by position (data.kept_rows.RowNaming.POSITION: labels
    #: repeated or not whole numbers), which ``frame`` replaces by the rows' positions (data.kept_rows.
    #: named_by_index_label); None for a file and for a frame that keeps its index
    frame_index: pd.Index | None = None
    #: the sampling design's weights of ``frame``'s rows, parsed once (data.sample_design.design_weights) for every
    #: reader of them; None without weights or before they are parsed
    weights: np.ndarray | None = None
    #: the numeric codes given with --missing-codes, read as no answer in the item columns only: the columns that
    #: choose and group the rows keep them as values, which pipeline.column_codes names first
    missing_codes: tuple[float, ...] = ()
    #: the codes of ``missing_codes`` that some item cell held (so read as no answer): the methods paragraph names
    #: these, not a code no answer held (fixhost-s18: '-99 was treated as missing' where only a filter column held it)
    codes_found: tuple[float, ...] = ()
    #: what the reading of no answers counted, with its notes (data.kept_counts.ReadingCounts): the notes are written
    #: again over the rows that row filters keep
    counts: ReadingCounts | None = None
    #: the words given with --missing-codes (data.non_answers.run_words, as given), which advice that adds a code to
    #: the list keeps beside ``missing_codes`` (data.non_answers.codes_given)
    missing_words: tuple[str, ...] = ()
    #: the ranges of values an SPSS file declares missing (data.non_answers.DeclaredRange) and the codes its value
    #: labels mark as no answer (data.non_answers.LabelledNoAnswer), held by cells or not, which a fit keeps for its items
    #: and scoring other data with the fit reads as no answer, every value of them
    declared_ranges: tuple = ()

    def column_hint(self) -> str:
        """Words for a message about a missing column: the columns read under new names (a name the model uses may
        be one a rename took away), which sheet of a workbook of several was read, and the row an option said holds
        the column names."""
        renamed = ("; its columns read under new names: " + ", ".join(
            f"'{printable(r.old)}' as '{printable(r.new)}'" for r in self.renamed)) if self.renamed else ""
        return renamed + self.sheet_hint() + self.names_row_hint

    def sheet_hint(self) -> str:
        """Words for a message about a missing column: which sheet of a workbook of several was read."""
        if len(self.sheets) < 2:
            return ""
        others = ", ".join(f"'{printable(s)}'" for s in self.sheets[1:])
        return (f"; its first sheet not hidden, '{printable(self.sheets[0])}', was read, and the workbook also has "
                f"{others}: "
                f"name the sheet of the data with {Option.SHEET}")


EXCEL_SUFFIXES = (".xlsx", ".xlsm")
SPSS_SUFFIXES = (".sav", ".zsav", ".por")
STATA_SUFFIXES = (".dta",)


def read_data(path: str | Path, sheet: str | None = None, missing_codes: tuple[float, ...] = (),
              text_columns: tuple[str, ...] = (), items: Collection[str] | None = None,
              listed: dict[str, frozenset[str]] | None = None, filters: Collection = (),
              names_row: int | None = None, names_option: Option = Option.NAMES_ROW,
              first_data_row: int | None = None, renames: tuple[ColumnRename, ...] = (),
              renames_option: Option = Option.RENAME) -> LoadedData:
    """Any supported file -> LoadedData; ``missing_codes`` are values that mean 'no answer'; ``text_columns``
    (an id column) are read from delimited text as written ('007' stays '007').  ``items``: the model's item
    columns, the only ones whose text cells and value labels that say no answer ('Not applicable', 9 'refused') are
    read as missing (data.non_answers); a group, id, weight or cluster column keeps such a value as it is (a group
    named 'N/A' stays a group).  None (no model yet): every column but ``text_columns``.  ``listed``: each item's
    words that the model's 'answers' statements code, answers whatever they say.  ``filters``: the row filters the
    caller applies next (data.filters.RowFilter), which the notes do not suggest again.  ``names_row``: the row (of a
    sheet, or of a text file as a spreadsheet shows it: one per record) that holds the column names, the rows above it not read (a survey platform's
    question texts above the item codes), given by ``names_option`` (the option every message about the row of names
    names: replicate's validation file has its own).  ``first_data_row``: the row where the rows of data
    start, the rows between it and the column names not read (question texts under the item codes), given by
    :func:`first_data_option` of ``names_option``.  The frame's index numbers its rows as a spreadsheet shows the file (a
    sheet's rows, a text file's records: data.moments.file_rows_index); rows with no value in any column are left out with a note.
    ``renames`` (data.renamed_columns, given by ``renames_option``): columns read under new names, renamed as soon as
    the names are read; ``items``, ``text_columns`` and ``listed`` name the columns by their new names."""
    path = Path(path)
    suffix = path.suffix.lower()
    binary = suffix in EXCEL_SUFFIXES + SPSS_SUFFIXES + STATA_SUFFIXES
    st = check_input_path(path, "data file", DataError, regular_only=binary)
    if binary and st.st_size == 0:
        raise DataError(f"data file '{path}' is empty")
    if sheet is not None and suffix not in EXCEL_SUFFIXES:
        raise DataError(f"'{path}' is not an Excel workbook, so a sheet cannot be chosen")
    if names_row is not None and suffix in SPSS_SUFFIXES + STATA_SUFFIXES:
        raise DataError(f"'{path}' is an {'SPSS' if suffix in SPSS_SUFFIXES else 'Stata'} file, whose variables have "
                        f"their names, so a row of column names ({names_option}) cannot apply")
    if first_data_row is not None and suffix in SPSS_SUFFIXES + STATA_SUFFIXES:
        raise DataError(f"'{path}' is an {'SPSS' if suffix in SPSS_SUFFIXES else 'Stata'} file, whose rows are all "
                        f"rows of data, so a first row of data ({first_data_option(names_option)}) cannot apply")
    if suffix in EXCEL_SUFFIXES:
        notes: list[str] = []
        names: list[pd.Series] = []
        sheets: list[str] = []
        hidden: list = []
        header: list[int] = []
        loaded = LoadedData(_read_excel(path, sheet, notes, names, sheets, hidden, names_in_file(renames, items), names_row,
                                        names_option, _listed_in_file(renames, listed), first_data_row, header),
                            str(path), notes=tuple(notes), row_names=names[0] if names else None, cautions=tuple(hidden),
                            sheets=tuple(sheets) if sheet is None and len(sheets) > 1 else (),
                            sheet_read=sheets[0] if sheets else "", names_row_read=header[0])
    elif suffix in SPSS_SUFFIXES + STATA_SUFFIXES:
        loaded = _with_case_filter(_read_labelled(path))
    elif suffix in (".xls",):
        raise DataError(f"'{path}' is an old-style Excel file; save it as .xlsx or CSV")
    else:
        notes = []
        names = []
        reading: list[TextReading] = []
        unread: list = []
        header = []
        loaded = LoadedData(read_table(path, notes, names, names_in_file(renames, text_columns),
                                       names_in_file(renames, items), names_row, reading, names_option,
                                       _listed_in_file(renames, listed), first_data_row, unread, header), str(path),
                            notes=tuple(notes), row_names=names[0] if names else None,
                            reading=reading[0] if reading else None, cautions=tuple(unread), names_row_read=header[0])
        if loaded.reading is not None and not loaded.reading.plain():  # said when it is not plain UTF-8 with commas
            loaded = replace(loaded, notes=(f"{path}: {loaded.reading.words()}",) + loaded.notes)
    loaded = _renamed(_composed_names(loaded), renames, renames_option)
    if suffix in EXCEL_SUFFIXES + SPSS_SUFFIXES + STATA_SUFFIXES:  # delimited text: read_table read them so
        loaded = replace(loaded, frame=blank_text_as_missing(loaded.frame, text_columns))
    frame, blank_note = drop_blank_rows(loaded.frame, str(path))
    if blank_note:
        names = loaded.row_names.loc[frame.index] if loaded.row_names is not None else None
        loaded = replace(loaded, frame=frame, notes=loaded.notes + blank_note, row_names=names)
    if suffix in SPSS_SUFFIXES + STATA_SUFFIXES:
        loaded = _numbers_from_text(loaded, text_columns)
    loaded = with_no_answers_read(loaded, missing_codes, path, text_columns, items, listed, filters)
    if names_row is not None:  # (a row of a sheet, or of a text file as a spreadsheet shows it)
        found = next((c for c in loaded.cautions if isinstance(c, AnswersAsNames)), None)
        loaded = replace(loaded, names_row_hint=found.hint() if found is not None else
                         f"; its column names were read from row {names_row}, as {names_option.given(names_row)} "
                         f"asks: give the row that holds the model's names, or leave the option out if the first "
                         f"row does")
    return loaded


def _listed_in_file(renames, listed: dict[str, frozenset[str]] | None) -> dict[str, frozenset[str]] | None:
    """``listed`` (each item's words an 'answers' statement codes, by the model's names) keyed by the names the file
    gives those columns, for the readers that look at columns before the renames."""
    if listed is None or not renames:
        return listed
    return dict(zip(names_in_file(renames, tuple(listed)), listed.values()))


def with_no_answers_read(loaded: LoadedData, missing_codes: tuple[float, ...], where, text_columns: tuple[str, ...] = (),
                         items: Collection[str] | None = None, listed: dict[str, frozenset[str]] | None = None,
                         filters: Collection = ()) -> LoadedData:
    """The rows read (from a file or a data frame alike) with what says no answer read as missing in the item
    columns (``items``; None: every column but ``text_columns``): words such as 'Not applicable' or 'refused'
    (data.non_answers; ``listed``: the words an 'answers' statement codes, answers whatever they say), the
    ``missing_codes`` and value labels that say no answer.  The one reading of no answers, so that a file and the
    same table given as a data frame are read alike."""
    mine = None if items is None else {str(x) for x in items}
    as_written = tuple(text_columns) if mine is None else tuple(c for c in loaded.frame.columns.tolist()
                                                                if str(c) not in mine)
    frame, written = written_non_answers(loaded.frame, as_written, listed)  # before the codes: 'refused' made a column text
    item_labels = {c: v for c, v in loaded.value_labels.items() if c not in as_written}
    on_answers = codes_on_answers(frame, missing_codes, item_labels, mine, row_numbers(frame)) if missing_codes else ()
    on_answers += declared_codes_on_answers(frame, loaded.non_answers, item_labels, mine)  # the file's own (hostile s25)
    before = frame
    frame, code_notes, found = apply_missing_codes(frame, missing_codes, where, mine, filters)  # in the items only
    coded = emptied_cells(before, frame) if missing_codes else ()  # (their notes written again over the rows kept)
    kept_codes = no_answer_codes(frame, item_labels, tuple(missing_codes))  # those no cell gives too: a fit keeps them
    frame, labelled = labelled_non_answers(frame, item_labels, tuple(missing_codes))
    unmarked = frame
    frame, carried = read_fit_marked(frame, mine, str(where), item_labels)  # scores: what the fit's file marked
    # its declared missing values on answers of the scored file: a caution first, as the fit's of its own file
    on_answers += carried_codes_on_answers(unmarked, carried, item_labels) if carried else ()
    carried_note = fit_marked_note(carried, str(where)) if carried else None
    if carried_note:
        code_notes = tuple(code_notes) + (carried_note,)
    if frame is not loaded.frame:
        loaded = replace(loaded, frame=frame, non_answers=loaded.non_answers + written + labelled)
    if on_answers:
        loaded = replace(loaded, cautions=loaded.cautions + on_answers)
    if kept_codes:
        loaded = replace(loaded, declared_ranges=tuple(dict.fromkeys(loaded.declared_ranges + kept_codes)))
    read_as_none = non_answer_note(loaded.non_answers, str(where), mine)  # a note; rows lost: a caution too
    if read_as_none:
        code_notes = tuple(code_notes) + (read_as_none,)
    like_none = tuple(a.note(str(where), tuple(missing_codes))  # answers whose label reads like none
                      for a in answers_labelled_like_none(frame, item_labels, tuple(missing_codes)))
    code_notes = tuple(code_notes) + like_none
    unused = unused_run_words(written + labelled) if run_words() else ()
    unused_note = missing_codes_note(where, unused, [], "of the items") if unused else None
    if unused_note is not None:  # the words of --missing-codes that no item holds: said as a code that no cell holds is
        code_notes = tuple(code_notes) + (unused_note,)
    markers = _marker_cells(loaded.frame)  # the reader's note on 'NA', '.': (note, {marker: rows})
    if markers and mine is not None and any(n is markers[0] for n in loaded.notes):
        markers, loaded = _markers_in_items(loaded, markers, mine)
    # the notes that count cells, kept with what they counted: written again over the rows analysed (row filters,
    # a group column: data.kept_counts)
    loaded = replace(loaded, counts=ReadingCounts(
        str(where), None if mine is None else frozenset(mine), tuple(missing_codes), coded, item_labels,
        code_notes[0] if missing_codes else None, read_as_none, like_none,
        markers[0] if markers and any(n is markers[0] for n in loaded.notes) else None,
        markers[1] if markers else {}, tuple(run_words()), unused_note, _code_rows(before, found, mine),
        carried, carried_note))
    if code_notes:
        loaded = replace(loaded, notes=loaded.notes + tuple(code_notes))
    numbers = tuple(float(c) for c in missing_codes if isinstance(c, (int, float)) and not isinstance(c, bool))
    words = run_words()
    if not numbers and not words:
        return loaded
    if loaded.frame.attrs.get(GIVEN_CODES) != numbers + tuple(words):  # what advice far from here keeps
        marked = loaded.frame.copy(deep=False)  # never the caller's own data frame
        marked.attrs[GIVEN_CODES] = numbers + tuple(words)
        loaded = replace(loaded, frame=marked)
    return replace(loaded, missing_codes=numbers, codes_found=tuple(c for c in numbers if c in found),
                   missing_words=tuple(words))


def _code_rows(frame: pd.DataFrame, found, items) -> tuple[tuple[float, tuple], ...]:
    """Each code of ``found`` (codes given with --missing-codes that some cell held) with the rows (index labels) of
    ``frame`` (before the codes were read as no answer) whose item columns (``items``; None: every column) hold it."""
    if not found:
        return ()
    columns = [c for c in frame.columns if (items is None or str(c) in items)
               and pd.api.types.is_numeric_dtype(frame[c])]
    values = frame[columns].to_numpy(dtype=float, na_value=np.nan) if columns else np.empty((len(frame), 0))
    return tuple((float(c), tuple(frame.index[(values == c).any(axis=1)].tolist())) for c in sorted(found))


def sheet_of_each(sources, sheet: str | None, option: Option = Option.SHEET) -> tuple[str | None, ...]:
    """The sheet to read in each of several data sources (``sheet``: the one --sheet names): the workbooks among
    them, a CSV file or a data frame beside a workbook read as it is; an error when none is a workbook (a sheet that
    cannot apply)."""
    workbook = [isinstance(s, (str, Path)) and Path(s).suffix.lower() in EXCEL_SUFFIXES for s in sources]
    if sheet is None:
        return tuple(None for _ in sources)
    if not any(workbook):
        named = word_list(f"'{printable(str(s))}'" if isinstance(s, (str, Path)) else "a data frame" for s in sources)
        raise DataError(f"none of {named} is an Excel workbook, so a sheet ('{printable(str(sheet))}') cannot be "
                        f"chosen; leave {option} out")
    return tuple(sheet if w else None for w in workbook)


def blank_text_as_missing(frame: pd.DataFrame, keep_text: tuple[str, ...] = (), markers: tuple[str, ...] = (),
                          decimal_comma: bool = False) -> pd.DataFrame:
    """``frame`` with text cells that are empty or hold only spaces read as no answer, as an empty cell of a CSV file
    is: SPSS and Stata text variables write no answer as '', a spreadsheet cell may hold a space, a data frame may
    hold ''.  Read so at once, every reader of the rows (the check, the choice of the missing-data handling, the fit)
    sees the same gaps.  ``markers``: the markers of no answer (MISSING_MARKERS) also when written with spaces
    around them ('NA '), for delimited text, whose parser knows them only as written.  A column left with numbers only
    becomes a column of numbers, as the same data in a CSV file are read (for delimited text, also numbers written as
    text, with ``decimal_comma``); ``keep_text`` (id columns) are left as written.  The frame is copied only when a
    cell changes."""
    out = frame
    # the text columns found from the dtypes at once: taking every column out of the frame to look at its dtype cost
    # more than a small fit (a data frame of 15 columns, one of them text)
    # (and from the frame's store of columns: frame.dtypes builds a Series and each column taken out another)
    text = [position for position, dtype in enumerate(column_dtypes(frame))
            if dtype.kind == "O" and isinstance(dtype, (np.dtype, pd.StringDtype))]  # (not categories)
    for position in text:
        column = frame.columns[position]
        if column in keep_text:
            continue
        stored = stored_column(frame, position)
        try:  # each distinct value judged once (a group column holds a few): pandas' string methods cost more, and
            # pd.unique of pandas' text array 20x more than a set of its cells (125 against 5 us, 301 rows)
            distinct = set(stored.tolist())
        except TypeError:  # unhashable cells (lists in an object column) are no text
            distinct = [v for v in stored.tolist() if isinstance(v, str)]
        blanks = {v for v in distinct if isinstance(v, str) and (not v.strip() or (bool(markers) and v.strip() in markers))}
        if not blanks:
            continue
        series = frame.iloc[:, position]
        values = series.to_numpy(dtype=object, na_value=None)
        blank = np.fromiter((isinstance(v, str) and v in blanks for v in values), dtype=bool, count=len(values))
        kept = series.where(~blank)
        rest = values[~blank & pd.notna(kept).to_numpy()]
        if all(isinstance(v, (int, float, np.integer, np.floating)) and not isinstance(v, (bool, np.bool_))
               for v in rest):
            kept = pd.to_numeric(kept).astype(float)
        elif markers and all(isinstance(v, str) and number(v, decimal_comma) is not None for v in rest):
            kept = kept.map(lambda v: number(v, decimal_comma) if isinstance(v, str) else v).astype(float)
        if out is frame:
            out = frame.copy()
        out.isetitem(position, kept)
    return out


def _text_dtype(column: pd.Series) -> bool:
    """Whether a column holds Python objects or text (pandas' object and string types)."""
    return column.dtype == object or isinstance(column.dtype, pd.StringDtype)


def _numbers_from_text(loaded: LoadedData, keep_text: tuple[str, ...]) -> LoadedData:
    """Text variables of an SPSS or Stata file that hold only numbers, each written as the number's plain spelling
    ('3', '4.5'; not '007' or '3.0', which stay text), read as numbers, and their value labels keyed by those
    numbers: survey exports write answers as text variables, and read as text their labels and their codes of no
    answer would not meet the numbers analysed.  ``keep_text`` (id columns) are left as written."""
    frame, labels = loaded.frame, loaded.value_labels
    changed = {}
    for column in frame.columns:
        series = frame[column]
        if column in keep_text or not _text_dtype(series):
            continue
        rest = series.dropna().tolist()
        if not rest or not all(isinstance(v, str) and _plain_number(v) is not None for v in rest):
            continue
        coded = labels.get(column, {})
        if any(isinstance(code, str) and _plain_number(code) is None for code in coded):
            continue  # a label of a code that is not a number: the column is read as written
        changed[column] = series.map(lambda v: _plain_number(v) if isinstance(v, str) else v).astype(float)
    if not changed:
        return loaded
    frame = frame.copy()
    for column, values in changed.items():
        frame[column] = values
    labels = {k: ({(_plain_number(c) if isinstance(c, str) else c): t for c, t in v.items()} if k in changed else v)
              for k, v in labels.items()}
    return replace(loaded, frame=frame, value_labels=labels)


def _plain_number(text: str) -> float | None:
    """The number a text writes in its plain spelling ('3', '-2', '4.5'), or None ('007', '3.0', '1e3', 'x')."""
    value = number(text)
    if value is None or not np.isfinite(value):
        return None
    shown = str(int(value)) if value.is_integer() else repr(value)
    return value if text.strip() == shown else None


def _composed_names(loaded: LoadedData) -> LoadedData:
    """Column names in Unicode's composed form (NFC), as model names are read: a header written with decomposed
    accents (as some systems save files) names the same column as the model's 'température'."""
    def composed(name):
        return composed_text(name) if isinstance(name, str) else name

    names = [composed(c) for c in loaded.frame.columns]
    if names == list(loaded.frame.columns):
        return loaded
    return replace(loaded, frame=loaded.frame.set_axis(names, axis=1),
                   variable_labels={composed(k): v for k, v in loaded.variable_labels.items()},
                   value_labels={composed(k): v for k, v in loaded.value_labels.items()})


def _renamed(loaded: LoadedData, renames: tuple[ColumnRename, ...], option: Option) -> LoadedData:
    """``loaded`` with the columns ``renames`` names read under their new names (data.renamed_columns): the frame,
    its variable and value labels and the column-keyed notes of reading, with a note naming each rename."""
    if not renames:
        return loaded
    frame = renamed_frame(loaded.frame, renames, loaded.source, option, (SHEET_COLUMNS, MARKED, SPELLINGS,
                                                                         MEASURE_LEVELS, MARKER_COLUMN_ROWS))
    names = {r.old: r.new for r in renames}
    return replace(loaded, frame=frame, renamed=renames,
                   variable_labels={names.get(k, k): v for k, v in loaded.variable_labels.items()},
                   value_labels={names.get(k, k): v for k, v in loaded.value_labels.items()},
                   notes=loaded.notes + (rename_note(renames, loaded.source, option),))


def _read_excel(path: Path, sheet: str | None, notes: list[str], names_out: list | None = None,
                sheets_out: list | None = None, hidden_out: list | None = None, items=None,
                names_row: int | None = None, names_option: Option = Option.NAMES_ROW, listed=None,
                first_data_row: int | None = None, header_out: list | None = None) -> pd.DataFrame:
    try:
        import openpyxl
        from openpyxl.utils import get_column_letter
    except ImportError:  # pragma: no cover - a declared dependency
        raise DataError("reading Excel files needs the openpyxl package") from None
    try:
        book = openpyxl.load_workbook(path, read_only=False, data_only=True)
    except Exception as exc:  # openpyxl raises many kinds for damaged files
        raise DataError(_unreadable_file(path, "an Excel workbook", type(exc).__name__)) from None
    names = book.sheetnames
    if sheet is not None and not isinstance(sheet, str):
        raise DataError(f"the sheet must be given by its name (text), not {type(sheet).__name__}")
    hidden = [n for n in names if getattr(book[n], "sheet_state", "visible") != "visible"]  # hidden, very hidden
    if sheet is None:  # the first sheet the workbook shows: a hidden one is an old draft or a lookup table
        ws = book[_first_shown(names, hidden)]
    elif sheet in names:
        ws = book[sheet]
    else:
        raise DataError(f"'{path}' has no sheet '{printable(sheet)}' (sheets: {printable(', '.join(names))})")
    if sheets_out is not None:  # the sheet read first
        sheets_out.extend([ws.title] + [n for n in names if n != ws.title])
    where = f"{path} (sheet '{printable(ws.title)}')"
    if len(names) > 1:
        notes.append(_sheet_note(path, ws.title, names, hidden, sheet is not None, sheet_option(names_option)))
        if sheet is None and items and hidden_out is not None:
            alike = _sheets_with_items(book, ws.title, items)
            if alike:
                hidden_out.append(OtherSheets(ws.title, alike))
    if not isinstance(ws, openpyxl.worksheet.worksheet.Worksheet):
        raise DataError(f"{where} is a chart, not a table of data; choose a sheet of data with {Option.SHEET} "
                        f"(sheets: {printable(', '.join(names))})")
    if ws.max_row * ws.max_column > MAX_EXCEL_CELLS:
        raise DataError(f"{where}: the sheet's used range is {ws.calculate_dimension()}, far larger than a table of "
                        f"answers; delete the stray cells far from the table, or save the table as CSV")
    rows = list(ws.iter_rows(values_only=True))
    first = next((k for k, r in enumerate(rows) if any(v not in (None, "") for v in r)), None)
    if first is None:
        raise DataError(f"{where} is empty")
    if names_row is not None:
        first = _names_row_start(names_row, len(rows), first, where, names_option)
        if not any(v not in (None, "") for v in rows[first]):
            raise DataError(f"{where}: row {names_row}, named by {names_option}, is empty")
        notes.append(_names_row_note(where, names_row, names_option))
        above = next((k for k in range(first - 1, -1, -1) if any(v not in (None, "") for v in rows[k])), None)
        found = None if above is None else _answers_as_names(list(rows[above]), list(rows[first]), names_row,
                                                             above + 1, where, names_option)
        if found is not None and hidden_out is not None:  # named first, with the sheet's other cautions
            hidden_out.append(found)
        named_by_row = found.hint() if found is not None else ""
    rows = rows[first:]  # empty rows above the header
    title = None if names_row is not None else _title_above_header(rows)
    if title is not None:
        notes.append(f"{where}: row {first + 1} holds a title ('{clipped(title, 60)}') above the column names, "
                     f"which were read from row {first + 2}")
        first += 1
        rows = rows[1:]
    if header_out is not None:
        header_out.append(first + 1)
    data_start = first + 2  # the sheet's row of the first row of data
    between: list[tuple[int, tuple]] = []  # the rows a first row of data leaves unread, with their sheet rows
    if first_data_row is not None:
        data_start = _first_data_start(first_data_row, first + 1, len(rows) + first, where, names_option, notes)
        between = list(enumerate(rows[1:data_start - first - 1], start=first + 2))
        rows = rows[:1] + rows[data_start - first - 1:]
    _check_merged_header(ws, where, rows, first, items, names_option)
    # columns empty in every row (the table starts further right, as in column B) are no part of the table
    skipped = next((k for k in range(max(map(len, rows), default=0))
                    if any(k < len(r) and r[k] not in (None, "") for r in rows)), 0)
    rows = [r[skipped:] for r in rows]
    header = [None if h is None else str(h).strip() for h in rows[0]]
    while header and header[-1] in (None, ""):
        header.pop()
    row_names = len(header) > 1 and not header[0]
    named_by = _named_by(names_row, names_option) + (named_by_row if names_row is not None else "")
    for position, name in enumerate(header, start=1 + skipped):
        if not name and not (position == 1 + skipped and row_names):
            below = None if first_data_row is not None else _names_row_below(
                rows, first, items, every=_used_columns(rows[:MERGED_HEADER_LOOK + 1]))
            hint = f" (row {first + 1} was read as the header; {_names_row_words(below, names_option, items)})" \
                if below is not None else ""
            raise DataError(f"{path} (sheet '{ws.title}'): column {position} of the header row{named_by} has no "
                            f"name{hint}")
    _check_duplicates(header, f"{path} (sheet '{ws.title}')", named_by)
    width = len(header)
    for number, r in enumerate(rows[1:], start=data_start):
        beyond = [k for k, v in enumerate(r[width:], start=width + 1 + skipped) if v not in (None, "")]
        if beyond:
            below = None if first_data_row is not None else _names_row_below(
                rows, first, items, every=_used_columns(rows[:MERGED_HEADER_LOOK + 1]))
            raise DataError(f"{path} (sheet '{ws.title}'): row {number} has a value in column {beyond[0]}, which has "
                            f"no name in the header row "
                            f"({_header_taken(f'row {first + 1}', names_option, below, items, names_row)})")
    _check_merged_answers(ws, where, header, data_start, skipped)
    filled = [k for k, r in enumerate(rows[1:], start=data_start) if any(v is not None for v in r[:width])]
    # every row up to the last one with a value, empty ones too: they are left out, and named, by drop_blank_rows
    kept = list(range(data_start, filled[-1] + 1)) if filled else []
    body = [list(rows[k - data_start + 1][:width]) for k in kept]
    found = notes_lines(body)  # a notes line under the data (data.notes_rows) is no row of data
    if found:
        notes.append(notes_note(where, [kept[k] for k in found], [body[k] for k in found]))
        gone = {kept[k] for k in found}
        filled = [k for k in filled if k not in gone]
        end = end_of_data(body, found)  # the sheet read as if the lines were not there
        body, kept = body[:end], kept[:end]
    hidden_rows = {k for k, dimension in ws.row_dimensions.items() if dimension.hidden}
    if hidden_rows and hidden_out is not None:  # a filter, or rows hidden by hand: the file holds them all the same
        sheet_rows = tuple(k for k in filled if k in hidden_rows)
        if sheet_rows:
            hidden_out.append(HiddenRows(ws.title, sheet_rows, len(filled), ws.auto_filter.ref is not None,
                                         _filter_kept(ws, header, skipped)))
    if not body:
        raise DataError(f"{path} (sheet '{ws.title}') has a header but no rows of data")
    _padded_as_shown(ws, body, kept, header, skipped, items, where, notes)
    marked: dict[int, dict[str, int]] = {}  # column position -> {marker: cells}, counted once
    column_rows: dict[int, dict[str, list[int]]] = {}  # column position -> {marker: the body's rows}
    for i, r in enumerate(body):
        for k, v in enumerate(r):
            if isinstance(v, str) and v.strip() in _MARKER_SET:
                counted = marked.setdefault(k, {})
                counted[v.strip()] = counted.get(v.strip(), 0) + 1
                column_rows.setdefault(k, {}).setdefault(v.strip(), []).append(i)
                r[k] = None
    said = _say_markers(_marker_totals(marked.values()), where, notes)
    if any(v is None for r in body for v in r):
        _check_uncomputed_formulas(path, ws.title, data_start - 2)
    frame = pd.DataFrame(body, columns=header, index=file_rows_index(kept))
    frame.attrs[SHEET_COLUMNS] = {name: get_column_letter(skipped + k + 1) for k, name in enumerate(header) if name}
    if marked:
        frame.attrs[MARKED] = {header[k]: counted for k, counted in marked.items()}
    if said is not None:
        frame.attrs[MARKER_CELLS] = said
        frame.attrs[MARKER_COLUMN_ROWS] = {header[k]: {m: HeldRows(frame.index[rows]) for m, rows in by.items()}
                                           for k, by in column_rows.items()}
    _check_formula_errors(frame, where, items, _typed_errors(frame, ws))
    _check_repeated_header(frame, where, first + 1)
    _check_header_rows(frame, where, False, items=items, header_row=first + 1, names_option=names_option,
                       listed=listed)
    unread = _skipped_answers(frame, [(k, list(r[skipped:skipped + width])) for k, r in between], items, (), False,
                              where, data_start, first_data_option(names_option)) if between else None
    if unread is not None and hidden_out is not None:
        hidden_out.append(unread)
    if row_names:
        frame = _split_row_names(frame, names_out)
        notes.append(f"{path} (sheet '{ws.title}'): the first column has no name in the header and was read as row "
                     f"names, not as data")
    return frame


MAX_EXCEL_CELLS = 20_000_000

#: a cell format that shows a whole number with leading zeros to a width ('000000' shows 991 as 000991)
_PADDED_FORMAT = re.compile(r"0{2,}")


def _padded_as_shown(ws, body: list[list], kept: list[int], header: list, skipped: int, items, where: str,
                     notes: list[str]) -> None:
    """Whole numbers that their cell format shows with leading zeros ('000000': 991 shown as 000991), read as the
    sheet shows them, as text, in every column but the model's items (``items``; None: every column): such a
    column holds codes (ids, postcodes), which a scores file, the notes and the groups then name as the sheet does
    (new-user trial s21: ids shown as 000991 were written 991 in the scores file, and no longer matched the
    spreadsheet's).  The other whole numbers of such a column are read as text too (plain digits), so that the
    column is one of text; a column with a number that is not whole is left as it is (a format that rounds).
    ``body``: the rows of data (changed in place), ``kept``: their rows in the sheet; a note names each column."""
    wanted = None if items is None else {str(x) for x in items}
    for k, name in enumerate(header):
        if not name or (wanted is not None and name in wanted):
            continue
        whole = [(i, r[k]) for i, r in enumerate(body) if isinstance(r[k], (int, float)) and not isinstance(r[k], bool)]
        if not whole or any(isinstance(v, float) and not v.is_integer() for _, v in whole):
            continue
        shown = {i: ws.cell(row=kept[i], column=skipped + k + 1).number_format for i, _ in whole}
        padded = [i for i, f in shown.items() if isinstance(f, str) and _PADDED_FORMAT.fullmatch(f)]
        if not padded:
            continue
        for i, v in whole:
            width = len(shown[i]) if i in padded else 0
            body[i][k] = ("-" if v < 0 else "") + str(abs(int(v))).zfill(width)
        first = padded[0]
        notes.append(f"{where}: the numbers of column '{printable(name)}' that their cell format shows with leading "
                     f"zeros ('{printable(shown[first])}', {len(padded)} cell{'s' if len(padded) != 1 else ''}) were "
                     f"read as the sheet shows them, as text (row {kept[first]}: '{body[first][k]}')")


@dataclass(frozen=True)
class HiddenRows:
    """Rows of a sheet that the workbook hides (by a filter or by hand), read and analysed as the file holds them
    but named first: a researcher who filtered the sheet to some rows sees only those.  ``rows``: their rows in
    the sheet."""

    sheet: str
    rows: tuple[int, ...]
    of: int  # rows of data in the sheet
    filtered: bool  # the sheet has a filter
    keep: str | None = None  # the --keep filter that keeps the rows the workbook's filter shows, when it is plain
    filtered_out: int = 0  # hidden rows the row filters (--keep) left out
    #: the kind of problem every view files it under (assessment.admissibility.ProblemKind's value): rows, not values
    #: that look like no answers (s21)
    problem_kind: str = "rows the workbook hides"

    def among(self, kept) -> HiddenRows | None:
        """The hidden rows that row filters kept (``kept``: row numbers), or None when they kept none."""
        rows = tuple(r for r in self.rows if r in kept)
        return replace(self, rows=rows, filtered_out=self.filtered_out + len(self.rows) - len(rows)) if rows else None

    def caution(self, source: str) -> str:
        """What was found (the rows, hidden by the workbook's filter or by hand), that they are kept, and what a fit
        does with them, in words as true of a check, which analyses nothing, as of a fit (plan-s23: check said the
        rows 'were kept and analysed')."""
        name = source.replace("\\", "/").rsplit("/", 1)[-1]
        shown = cut_list(self.rows, 5)
        hidden = len(self.rows) + self.filtered_out
        how = "by its filter" if self.filtered else "by hand, not by a filter"
        return (f"{name} (sheet '{printable(self.sheet)}') hides {hidden} of its {self.of} rows of data "
                f"(row{'s' if len(self.rows) != 1 else ''} {shown}) {how}"
                + kept_rows_words(len(self.rows), self.filtered_out, "the rows it shows") + ".")

    def advice(self) -> Note:
        """What to try, the row filter apart (note_parts.Command): a manuscript's reader runs nothing."""
        ending = "; to analyse every row, leave the caution be."
        if self.filtered and self.keep:
            return Note(("To analyse only the rows the workbook's filter shows, ",
                         Command(f"give {Option.KEEP.given(printable(self.keep))}",
                                 f"keep the rows where {printable(self.keep)}"), ending))
        if self.filtered:
            return Note(("To analyse only the rows the workbook's filter shows, leave the hidden ones out with a row "
                         "filter", Command(f" ({Option.KEEP})"), " on the column its filter uses, or delete them from "
                         "a copy of the file", ending))
        return Note(("To analyse only the rows the sheet shows, leave the hidden ones out with a row filter",
                     Command(f" ({Option.KEEP})"), " on a column that tells them apart (an id, a date), or delete them "
                     "from a copy of the file", ending))

    def to_dict(self) -> dict:
        return {"sheet": self.sheet, "rows": list(self.rows), "of": self.of, "filtered": self.filtered,
                "keep": self.keep}


#: rows at the top of another sheet searched for the model's item names (a title and question texts may come first)
SHEET_HEADER_ROWS = 20
SHEET_ANSWER_ROWS = 50  # rows below another sheet's names looked at for answers
SHEET_ANSWER_ROWS_NEEDED = 5  # of those, rows filling half the items' columns or more: a sheet of answers


def _sheets_with_items(book, read: str, items) -> tuple[str, ...]:
    """The sheets of ``book`` other than ``read`` with a row (among their first :data:`SHEET_HEADER_ROWS`) that
    names every one of the model's ``items``: the same survey split over sheets (Wave1, Wave2), of which a run that
    names no sheet reads the first only."""
    wanted = {str(i) for i in items}
    found = []
    for name in book.sheetnames:
        ws = book[name]
        if name == read or not hasattr(ws, "iter_rows"):
            continue
        rows = ws.iter_rows(max_row=SHEET_HEADER_ROWS + SHEET_ANSWER_ROWS, values_only=True)
        for k, row in enumerate(rows):
            if k >= SHEET_HEADER_ROWS:
                break
            names = [str(v).strip() if v is not None else "" for v in row]
            if wanted <= set(names):
                # rows of answers below the names (a labels or codebook sheet has a row of question texts at most:
                # review s13): rows filling at least half of the items' columns
                at = [names.index(x) for x in wanted]
                filled = sum(1 for r in rows if sum(p < len(r) and r[p] not in (None, "") for p in at) * 2 >= len(at))
                if filled >= SHEET_ANSWER_ROWS_NEEDED:
                    found.append(name)
                break
    return tuple(found)


@dataclass(frozen=True)
class OtherSheets:
    """Other sheets of a workbook read without a sheet named that hold columns named as every item of the model:
    only ``read`` was analysed, which a researcher who split a survey over sheets would not see in a plain note
    (hostile trial s13, H8).  Named first in every view, as :class:`HiddenRows` are."""

    read: str
    sheets: tuple[str, ...]
    #: the kind of problem every view files it under (assessment.admissibility.ProblemKind's value)
    problem_kind: str = "other sheets with the model's items"

    def caution(self, source: str) -> str:
        name = source.replace("\\", "/").rsplit("/", 1)[-1]
        listed = word_list(f"'{printable(s)}'" for s in self.sheets)
        other = "sheet" if len(self.sheets) == 1 else "sheets"
        return (f"{name}: only the sheet '{printable(self.read)}' was read, and the workbook's {other} {listed} "
                f"{'holds' if len(self.sheets) == 1 else 'hold'} columns named as every item of the model too.")

    def advice(self) -> Note:
        # sheets may be parts of one sample, or other samples, or the same people at other times, which pooled
        # rows would take for other people (new-user trial s23: one sheet per wave of one staff survey)
        return Note(("If the sheets hold parts of one sample, put their rows in one sheet (or one CSV file) in a copy "
                     "of the workbook; if they hold another sample or the same people at another time (a wave), do "
                     "not pool them: to analyse another sheet, ", Command(f"name it with {Option.SHEET}",
                                                                        "analyse it by name"),
                     "; the same people at two times are compared by one model of both times side by side."))

    def to_dict(self) -> dict:
        return {"sheet_read": self.read, "other_sheets_with_items": list(self.sheets)}


SHOWN_ROWS = 5  # rows a caution lists before 'and N more'


@dataclass(frozen=True)
class SkippedAnswers:
    """Rows that a first row of data (--first-data-row) left unread though they look like the rows of answers below
    them (a mistyped row number): named first, since they change what is analysed.  ``rows``: their rows (of a
    sheet, or of a text file as a spreadsheet shows it); ``start``: the row where the answers seem to start (the
    first of them, when every row from it to ``first_data_row`` looks so), else None."""

    where: str  # the file (and sheet) as messages name it
    rows: tuple[int, ...]
    first_data_row: int
    option: Option
    start: int | None
    #: the kind of problem every view files it under (assessment.admissibility.ProblemKind's value)
    problem_kind: str = "rows of answers left unread"

    def caution(self, source: str) -> Note:
        """The option in a note_parts.Command: a manuscript names no option, and says 'above the first row of data'."""
        several = len(self.rows) > 1
        first, last = self.rows[0], self.rows[-1]
        shown = (f"row {first}" if not several else f"rows {first}-{last}"
                 if last - first == len(self.rows) - 1 else
                 "rows " + cut_list(self.rows, SHOWN_ROWS))
        return Note((f"{base_name(self.where)}: {shown}, left unread ",
                     Command(f"by {self.option.given(self.first_data_row)}",
                             f"above the first row of data, row {self.first_data_row}"),
                     f", {'hold' if several else 'holds'} answers like the rows read (in every item column that "
                     f"{'they fill' if several else 'it fills'}, a number or an answer the other rows give), so "
                     f"{len(self.rows)} {'rows' if several else 'row'} of answers {'are' if several else 'is'} not "
                     f"analysed."))

    def advice(self) -> Note:
        if self.start is not None:
            return Note((f"If the answers start at row {self.start}, read them from it",
                         Command(f" ({self.option.given(self.start)})"),
                         "; if those rows are rightly left out, nothing."))
        return Note(("Give the row where the answers start", Command(f" ({self.option})"),
                     "; if those rows are rightly left out, nothing."))


@dataclass(frozen=True)
class AnswersAsNames:
    """The row an option named as the row of column names (--names-row) that looks like a row of answers, below a row
    that holds a name in every column it fills (the option set one row too low: the names are on row 3, the option
    says 4): read as names, that row of answers leaves the analysis and the columns carry its values as names, so it
    is named first, with the row that likely holds the names (s20).  Not refused: a row of names may be numbers (item
    numbers under question texts)."""

    where: str  # the file (and sheet) as messages name it
    names_row: int
    likely: int  # the row above that holds text in every column the named row fills
    option: Option
    numbers: int  # the named row's cells that are numbers
    filled: int  # and its cells with a value
    shown: tuple[str, ...]  # the first few names of the likely row
    #: the kind of problem every view files it under (assessment.admissibility.ProblemKind's value)
    problem_kind: str = "a row of answers read as the column names"

    def caution(self, source: str) -> Note:
        """The option in a note_parts.Command: a manuscript names no option."""
        listed = ", ".join(f"'{clipped(n, 30)}'" for n in self.shown[:4]) + (", ..." if len(self.shown) > 4 else "")
        return Note((f"{base_name(self.where)}: row {self.names_row}, read as the column names",
                     Command(f" as {self.option.given(self.names_row)} asks"),
                     f", holds numbers in {self.numbers} of its {self.filled} cells, as a row of answers does, and row "
                     f"{self.likely} above it holds a name in every one of those columns ({listed}): if the names are "
                     f"there, row {self.names_row} is a respondent's answers, left out of the analysis, and its values "
                     f"name the columns."))

    def advice(self) -> Note:
        return Note((f"if the column names are in row {self.likely}, read them from it",
                     Command(f" ({self.option.given(self.likely)})"),
                     f"; if row {self.names_row} does hold them, nothing needs to change."))

    def hint(self) -> str:
        """Words after an error about the header read from the named row: the row that likely holds the names."""
        return (f"; row {self.names_row} looks like a row of answers ({self.numbers} of its {self.filled} cells are "
                f"numbers), and row {self.likely} above it holds a name in every column: read the names from it with "
                f"{self.option.given(self.likely)}")


def _answers_as_names(above: list, chosen, names_row: int, likely: int, where: str,
                      option: Option) -> AnswersAsNames | None:
    """An :class:`AnswersAsNames` when the row ``chosen`` (the cells of the row ``names_row`` an option named as the
    column names) looks like a row of answers, at least two of its filled cells and half of them numbers, while the
    row ``above`` it (the nearest row with values above it, row ``likely``) holds text that is not a number in every
    column ``chosen`` fills; else None.  A rule of this project, not a published one."""
    def is_number(v) -> bool:
        return (isinstance(v, (int, float, np.integer, np.floating)) and not isinstance(v, bool)) or (
            isinstance(v, str) and number(v.strip()) is not None)

    filled = [k for k, v in enumerate(chosen) if v not in (None, "") and not (isinstance(v, str) and not v.strip())]
    numbers = sum(is_number(chosen[k]) for k in filled)
    if numbers < 2 or 2 * numbers < len(filled) or not above:
        return None
    names = [above[k] if k < len(above) else None for k in filled]
    if not all(isinstance(v, str) and v.strip() and not is_number(v) for v in names):
        return None
    return AnswersAsNames(where, names_row, likely, option, numbers, len(filled), tuple(v.strip() for v in names))


def _skipped_answers(frame: pd.DataFrame, between: list[tuple[int, list]], items, text_columns, decimal_comma: bool,
                     where: str, first_data_row: int, option: Option) -> SkippedAnswers | None:
    """The rows ``between`` ((row, cells aligned with ``frame``'s columns)), which a first row of data left unread,
    that look like the rows of answers read (``frame``): in every item column (``items``; None: every column but
    ``text_columns``) that holds answers (numbers, or a few words each given several times) and that the row fills,
    a number or one of the column's answers (or a word that says no answer), in two such columns at least (one when
    there is only one).  Rows of question texts or import ids hold text there, and are skipped quietly."""
    if not between:
        return None
    wanted = None if items is None else {str(x) for x in items}
    columns: list[tuple[int, frozenset | None]] = []  # position, the column's answers (None: numbers)
    for position, name in enumerate(frame.columns):
        if not str(name) or name in text_columns or (wanted is not None and str(name) not in wanted):
            continue
        column = frame.iloc[:, position]
        if column.dtype.kind in "iuf":
            columns.append((position, None))
        elif _text_dtype(column):
            cells = [v.strip() for v in column.dropna().tolist() if isinstance(v, str) and v.strip()]
            seen = frozenset(cells)
            if cells and len(seen) <= MAX_ANSWER_WORDS and len(cells) >= 2 * len(seen):
                columns.append((position, seen))
    if not columns:
        return None

    def filled(v) -> bool:
        return v is not None and not (isinstance(v, float) and np.isnan(v)) and not (
            isinstance(v, str) and (not v.strip() or v.strip() in _MARKER_SET))

    def answer(v, words) -> bool:
        if isinstance(v, str) and says_no_answer(v):
            return True
        if words is None:
            return (isinstance(v, (int, float, np.integer, np.floating)) and not isinstance(v, (bool, np.bool_))) or (
                isinstance(v, str) and number(v, decimal_comma) is not None)
        return isinstance(v, str) and v.strip() in words

    found = []
    for row, cells in between:
        held = [(cells[p] if p < len(cells) else None, words) for p, words in columns]
        given = [(v, words) for v, words in held if filled(v)]
        if len(given) >= min(2, len(columns)) and all(answer(v, words) for v, words in given):
            found.append(row)
    if not found:
        return None
    numbers = [row for row, _ in between]
    start = found[0] if numbers[numbers.index(found[0]):] == found else None
    return SkippedAnswers(where, tuple(found), first_data_row, option, start)


#: the error values a spreadsheet shows in a cell whose formula failed, refused as text or as a workbook's error
#: cell ('#N/A', 'not available', is read as no answer with MISSING_MARKERS)
FORMULA_ERRORS = frozenset(("#DIV/0!", "#VALUE!", "#REF!", "#NAME?", "#NUM!", "#SPILL!", "#CALC!"))
#: error values refused only in a cell the workbook types as an error (a failed formula: a range intersection that
#: is empty); as text, in a delimited file or a text cell, '#NULL!' is a statistics package's mark of a
#: system-missing value in the tables it exports, read as no answer (data.non_answers.NON_ANSWER_MARKS)
TYPED_ERRORS = frozenset(("#NULL!",))


def _typed_errors(frame: pd.DataFrame, ws) -> frozenset[tuple[int, str]]:
    """The cells of a sheet's ``frame`` (index: the sheet's rows less one; ``frame.attrs[SHEET_COLUMNS]``: each
    column's letter) holding one of :data:`TYPED_ERRORS` that the workbook types as an error (openpyxl's data type
    'e', as a spreadsheet program saves a failed formula's value), as (row label, column); text cells are left out."""
    letters = frame.attrs.get(SHEET_COLUMNS) or {}
    found = set()
    for column in frame.columns:
        if column not in letters or pd.api.types.is_numeric_dtype(frame[column]):
            continue
        for label in frame.index[frame[column].isin(TYPED_ERRORS).to_numpy()]:
            if ws[f"{letters[column]}{int(label) + 1}"].data_type == "e":
                found.add((label, column))
    return frozenset(found)


def _check_formula_errors(frame: pd.DataFrame, where: str, items, typed: frozenset = frozenset()) -> None:
    """Cells of the item columns (``items``; None: every column) that hold a spreadsheet's formula error
    (:data:`FORMULA_ERRORS`: a formula that failed, '#DIV/0!'), in a workbook or a table it saved as text, and the
    cells ``typed`` ((row label, column): a workbook's error cells holding one of :data:`TYPED_ERRORS`,
    :func:`_typed_errors`), are refused, naming the first by its row and column (and cell of a sheet): they are no
    answers of any scale and no word of no answer, but a computation to correct at its source (review s15, hostile
    case 11: they were offered an 'answers' statement; re-check s15, R7: a '#NULL!' error cell was read as no
    answer)."""
    wanted = None if items is None else {str(x) for x in items}
    found: list[tuple[int, str, str]] = []  # (position, column, value)
    # columns of numbers hold no error text: the dtypes read at once (data.moments.column_dtypes), each column taken
    # out only when it may hold text (a column each cost more than the whole check of a 15-column file)
    for column, dtype in zip(frame.columns.tolist(), column_dtypes(frame)):
        if column is None or (wanted is not None and str(column) not in wanted) or \
                pd.api.types.is_numeric_dtype(dtype):
            continue
        hit = frame[column].isin(FORMULA_ERRORS).to_numpy()
        labels = [label for label, name in typed if name == column]
        if labels:
            hit = hit | frame.index.isin(labels)
        found += [(int(k), str(column), str(frame[column].iloc[k])) for k in np.flatnonzero(hit)]
    if not found:
        return
    found.sort()
    at, column, value = found[0]
    row = int(row_numbers(frame)[at])
    letter = (frame.attrs.get(SHEET_COLUMNS) or {}).get(column)
    cell = f", cell {letter}{row}" if letter else ""
    kinds = ", ".join(dict.fromkeys(v for _, _, v in found))
    more = f" ({len(found)} cells of the items hold such errors: {kinds})" if len(found) > 1 else ""
    raise DataError(f"{where}: {row_words(row, text_lines(frame), row_naming(frame))}, column "
                    f"'{printable(column)}'{cell} holds the spreadsheet formula error {value}{more}: a formula that "
                    f"failed, not an answer; fix the formulas in the workbook, or clear those cells if they hold no "
                    f"answer, and save it again")


def _filter_kept(ws, header: list, skipped: int) -> str | None:
    """The --keep filter equal to a sheet's filter when it keeps one value of one column ('district == \'north\''),
    else None."""
    try:
        columns = list(ws.auto_filter.filterColumn or ())
        if len(columns) != 1 or columns[0].filters is None or len(columns[0].filters.filter or ()) != 1:
            return None
        from openpyxl.utils import range_boundaries

        position = int(columns[0].colId) + range_boundaries(ws.auto_filter.ref)[0] - 1 - skipped
        value = str(columns[0].filters.filter[0])
    except (AttributeError, TypeError, ValueError):
        return None
    if not 0 <= position < len(header) or not header[position] or "'" in value:
        return None
    name = header[position]
    shown = value if number(value) is not None else f"'{value}'"
    return f"{name} == {shown}" if name.isidentifier() else None


def _sheet_note(path: Path, read: str, names: list[str], hidden: list[str], named: bool,
                option: Option = Option.SHEET) -> Note:
    """Which sheet of a workbook of several was analysed, and which sheets the workbook hides (the option that names
    a sheet apart, note_parts.Command: a manuscript's reader runs nothing)."""
    others = [n for n in names if n != read]
    listed = ", ".join(f"'{printable(n)}'" + (" (hidden)" if n in hidden else "") for n in others)
    if named:
        how: tuple = (Command(f"as named with {option}", "as named"),
                      "; the workbook hides this sheet" if read in hidden else "")
    elif hidden and names.index(read) > 0:
        how = ("the first sheet the workbook shows (hidden sheets are not read unless named",
               Command(f" with {option}"), ")")
    else:
        how = ("the first sheet", Command(f"; name another with {option}"))
    return Note((f"{path}: the sheet '{printable(read)}' was read, ", *how, f"; the workbook also has {listed}"))


MERGED_HEADER_LOOK = 5  # rows under a header of merged cells looked at for the column names


def _check_merged_header(ws, where: str, rows: list, first: int, items, names_option: Option) -> None:
    """A header row (sheet row ``first`` + 1; ``rows`` from it on) with merged cells is refused, naming every merged
    range with its text (section headings over groups of items, 'C1:F1 Punctuality'), and, when a row below it holds
    the column names (the model's item names, ``items``; without them a row naming every column, all text), the
    option that reads the names from that row (review s15, hostile case 14: one range of three was named, and
    nothing pointed to --names-row)."""
    merged = sorted((rng for rng in ws.merged_cells.ranges if rng.min_row == first + 1),
                    key=lambda rng: rng.min_col)
    if not merged:
        return
    shown = ", ".join(f"{rng.coord}" + (f" '{clipped(str(value), 40)}'" if value not in (None, "") else "")
                      for rng in merged for value in (ws.cell(rng.min_row, rng.min_col).value,))
    wanted = None if items is None else {str(x) for x in items}
    below = _names_row_below(rows, first, items, len([v for v in rows[0] if v not in (None, "")]))
    held = "the model's item names" if wanted else "the column names"
    advice = (f"row {below} holds {held}: read them from it with {names_option.given(below)}" if below is not None
              else "give every column its own name in one header row")
    raise DataError(f"{where}: the header row {first + 1} has merged cells ({shown}), headings over several columns "
                    f"rather than one name for each; {advice}")


def _names_row_below(rows: list, first: int, items, headings: int = 0, every: Collection[int] = ()) -> int | None:
    """The sheet row (from 1) of the first row below the header (sheet row ``first`` + 1; ``rows`` from it on, as
    cells; among the next :data:`MERGED_HEADER_LOOK`) that holds the column names: every one of the model's
    ``items`` among its cells; without them, two or more cells and at least ``headings``, all text.  ``every``: the
    positions of the columns that must each hold a name (text) in that row too.  None when no row does: the one
    search of a row of names below the one read as the header, which the messages that stop at that header name
    (a merged header row, a row wider than it)."""
    wanted = None if items is None else {str(x) for x in items}
    for k, row in enumerate(rows[1:MERGED_HEADER_LOOK + 1], start=first + 2):
        cells = [v for v in row if v not in (None, "")]
        if not all(c < len(row) and isinstance(row[c], str) and row[c].strip() for c in every):
            continue
        if wanted and wanted <= {str(v).strip() for v in cells} or not wanted and len(cells) >= max(2, headings) \
                and all(isinstance(v, str) for v in cells):
            return k
    return None


def _names_row_words(below: int, names_option: Option, items=None) -> str:
    """The words that name the row found to hold the column names (:func:`_names_row_below`) with the option that
    reads it."""
    among = ", the model's among them" if items else ""
    return f"row {below} holds a name in every column{among}: read the names from it with {names_option.given(below)}"


def _used_columns(rows: list) -> tuple[int, ...]:
    """The positions of the columns with a value in some row of ``rows``."""
    width = max(map(len, rows), default=0)
    return tuple(c for c in range(width) if any(c < len(r) and r[c] not in (None, "") for r in rows))


def _check_merged_answers(ws, where: str, header: list, body_row: int, skipped: int) -> None:
    """Merged cells among the answers (sheet row ``body_row`` on) are refused: a merged range keeps its value in its
    first cell only, so its other cells would be read as missing answers while the sheet shows a value in them.
    Filling them would guess what the merge meant (one answer shared by several rows, or a layout), so the
    researcher is asked to unmerge and fill them."""
    for rng in sorted(ws.merged_cells.ranges, key=lambda r: (r.min_row, r.min_col)):
        if rng.max_row < body_row or rng.max_col <= skipped or rng.min_col > skipped + len(header):
            continue
        if ws.cell(rng.min_row, rng.min_col).value in (None, ""):
            continue  # an empty merged range: every cell is empty as shown
        if _merged_footer(ws, rng):
            continue  # a line of text under the table ('Source: ...'), read as the footer it is in one cell
        column = header[max(rng.min_col - skipped, 1) - 1]
        raise DataError(f"{where}: cells {rng.coord} of column '{printable(column or '')}' are merged, so only the "
                        f"first holds the value shown and the others would be read as missing; unmerge them and fill "
                        f"every cell")


def _merged_footer(ws, rng) -> bool:
    """Whether a merged range is a line of text under a table (hostile s21: a 'Source: ...' note merged across the
    table's width stopped the run with advice to fill every cell): one row, text in its first cell, and only such
    lines or empty rows below it, so the footer rule of every reader (a row of one text field under the data) takes
    it as it takes the same line in one cell."""
    if rng.min_row != rng.max_row or not isinstance(ws.cell(rng.min_row, rng.min_col).value, str):
        return False
    for row in ws.iter_rows(min_row=rng.min_row + 1, values_only=True):
        filled = [v for v in row if v not in (None, "")]
        if len(filled) > 1 or (filled and not isinstance(filled[0], str)):
            return False
    return True


def _title_above_header(rows: list) -> str | None:
    """The text of a title row above a sheet's header (one filled cell, often merged across the table, over a row
    that names at least two columns, all as text), or None."""
    if len(rows) < 3:
        return None
    filled = [v for v in rows[0] if v not in (None, "")]
    names = [v for v in rows[1] if v not in (None, "")]
    if len(filled) == 1 and isinstance(filled[0], str) and len(names) >= 2 and all(isinstance(v, str) for v in names):
        return filled[0].strip()
    return None


def _check_uncomputed_formulas(path: Path, title: str, first: int) -> None:
    """Cells that are empty in the saved values but hold a formula: the workbook was written by a program that
    stores formulas without calculating them, and reading them as missing answers would be wrong.  Read from the
    sheet's own XML (a formula cell ``<c><f>...</f></c>`` with no saved value ``<v>``, ECMA-376 Part 1, 18.3.1.4),
    which needs no second and third reading of the whole workbook; through openpyxl's two readings (formulas, then
    values) when the file does not name its cells so."""
    found = _formula_without_value(path, title, first)
    if found is False:  # not readable so: the workbook's formulas and values read by openpyxl
        import openpyxl

        formulas = openpyxl.load_workbook(path, read_only=True, data_only=False)[title]
        values = openpyxl.load_workbook(path, read_only=True, data_only=True)[title]
        found = next((cell.coordinate for row_f, row_v in zip(formulas.iter_rows(min_row=first + 2),
                                                               values.iter_rows(min_row=first + 2, values_only=True))
                      for cell, value in zip(row_f, row_v)
                      if value is None and isinstance(cell.value, str) and cell.value.startswith("=")), None)
    if found:
        raise DataError(f"{path} (sheet '{printable(title)}'): cell {found} holds a formula whose value "
                        f"was never calculated (the program that wrote the file does not calculate); open and save "
                        f"the workbook in a spreadsheet program, or save the table as CSV")


_SHEET_XML = "{http://schemas.openxmlformats.org/spreadsheetml/2006/main}"
_RELATIONS = "{http://schemas.openxmlformats.org/officeDocument/2006/relationships}"


def _formula_without_value(path: Path, title: str, first: int) -> str | None | bool:
    """The first cell (its reference, 'B7') from row ``first + 2`` on of the sheet ``title`` that holds a formula and
    no saved value, None when there is none, False when the sheet's XML cannot be read so (a cell without its
    reference, a part not found)."""
    import posixpath
    import zipfile
    from xml.etree import ElementTree

    try:
        with zipfile.ZipFile(path) as book:
            workbook = ElementTree.fromstring(book.read("xl/workbook.xml"))
            relations = ElementTree.fromstring(book.read("xl/_rels/workbook.xml.rels"))
            rid = next((s.get(f"{_RELATIONS}id") for s in workbook.iter(f"{_SHEET_XML}sheet") if s.get("name") == title),
                       None)
            target = next((r.get("Target") for r in relations if r.get("Id") == rid), None)
            if rid is None or target is None:
                return False
            part = target.lstrip("/") if target.startswith("/") else posixpath.normpath(posixpath.join("xl", target))
            with book.open(part) as sheet:
                for _, row in ElementTree.iterparse(sheet):
                    if row.tag != f"{_SHEET_XML}row":
                        continue
                    row_number = row.get("r")
                    if row_number is None:
                        return False
                    if int(row_number) >= first + 2:
                        for cell in row.iter(f"{_SHEET_XML}c"):
                            if cell.get("r") is None:
                                return False
                            value = cell.find(f"{_SHEET_XML}v")
                            if cell.find(f"{_SHEET_XML}f") is not None and (
                                    value is None or (value.text is None and cell.get("t") != "str")):
                                return cell.get("r")
                    row.clear()
    except (KeyError, OSError, ValueError, zipfile.BadZipFile, ElementTree.ParseError):
        return False
    return None


def _header_taken(where: str, names_option: Option = Option.NAMES_ROW, below: int | None = None, items=None,
                  names_row: int | None = None) -> str:
    """Which row was read as the header, and what to do when a title stands above the real one (``names_option``:
    the option that names the row of column names of this file; ``below``: the row found to hold them,
    :func:`_names_row_below` of the model's ``items``, named with the option that reads it; ``names_row``: the row
    that option gave, read as the header)."""
    taken = (f"{where}, named by {names_option.given(names_row)}, was read as the header" if names_row is not None
             else f"{where}, the first with values, was taken as the header")
    if below is not None:
        return f"{taken}; {_names_row_words(below, names_option, items)}" + (
            ", or delete the rows above it" if names_row is None else "")
    if names_row is not None:
        return f"{taken}; give the row that holds the column names, or leave the option out if the first row does"
    return (f"{where}, the first with values, was taken as the header; if the column names are in a later row, "
            f"read them from it with {names_option} (its number), or delete the rows above them")


def _read_labelled(path: Path) -> LoadedData:
    try:
        import pyreadstat
    except ImportError:  # pragma: no cover - a declared dependency
        raise DataError("reading SPSS and Stata files needs the pyreadstat package") from None
    suffix = path.suffix.lower()
    reader = {".sav": pyreadstat.read_sav, ".zsav": pyreadstat.read_sav, ".por": pyreadstat.read_por,
              ".dta": pyreadstat.read_dta}[suffix]
    try:  # declared missing values are read as values, then as missing by data.non_answers, which names them
        frame, meta = reader(str(path), **({} if suffix == ".por" else {"user_missing": True}))
    except Exception as exc:  # pyreadstat raises its own error types
        raise DataError(_unreadable_file(path, "a Stata file" if suffix == ".dta" else "an SPSS file", str(exc))) from None
    if frame.shape[0] == 0:
        raise DataError(f"data file '{path}' has variables but no rows of data")
    labels = {k: v for k, v in (meta.column_names_to_labels or {}).items() if v}
    values = {k: {(float(code) if isinstance(code, (int, float)) else str(code)): str(text) for code, text in v.items()}
              for k, v in (meta.variable_value_labels or {}).items()}
    ranges = dict(getattr(meta, "missing_ranges", None) or {})  # SPSS: values and ranges
    for column, tags in (getattr(meta, "missing_user_values", None) or {}).items():  # Stata: .a to .z, read as 'a'
        if column in frame.columns and tags:
            tagged = {str(t): f".{t}" for t in tags}
            frame[column] = frame[column].map(lambda v: tagged.get(v, v) if isinstance(v, str) else v)
            values[column] = {tagged.get(k, k) if isinstance(k, str) else k: v for k, v in values.get(column, {}).items()}
            ranges[column] = [{"lo": t, "hi": t} for t in tagged.values()]
    frame, declared = declared_missing(frame, ranges, values)
    spans = declared_ranges(ranges)  # the declarations themselves: a fit keeps its items', scoring reads them so
    measures = read_measure_levels(getattr(meta, "variable_measure", None))
    if measures:  # kept with the frame, through row filters and copies, for the notes on items and groups
        frame.attrs[MEASURE_LEVELS] = measures
    return LoadedData(frame, str(path), labels, values, non_answers=declared, declared_ranges=spans)


#: how each kind of binary file starts (its signature): a workbook is a zip archive; an SPSS file '$FL2' ('$FL3'
#: compressed); a Stata file of format 117 on '<stata_dta>', of an older format a byte of its number (102 to 115)
_SIGNATURES = {".xlsx": (b"PK\x03\x04",), ".xlsm": (b"PK\x03\x04",), ".sav": (b"$FL2", b"$FL3"), ".zsav": (b"$FL3",),
               ".dta": (b"<stata_dta>",) + tuple(bytes([k]) for k in range(102, 116))}
_OLD_OFFICE = b"\xd0\xcf\x11\xe0"  # an old binary Office file (.xls), or a workbook encrypted by a password


def _unreadable_file(path: Path, kind: str, why: str) -> str:
    """The one-line message of a binary data file its reader cannot open (``kind``: 'an Excel workbook', 'an SPSS
    file'...; ``why``: the reader's words or error type), saying what the file is instead, judged by how it starts
    (:data:`_SIGNATURES`): text, an old or password-protected Office file, another kind of file, or one of the
    right kind cut short or saved in a version the reader does not know; and what to do."""
    suffix = path.suffix.lower()
    try:
        with open(path, "rb") as f:
            head = f.read(4096)
    except OSError:
        head = b""
    save = "save it again from the program that made it" + (" as .xlsx" if suffix in EXCEL_SUFFIXES else "") + \
        ", or as CSV"
    signatures = _SIGNATURES.get(suffix)
    if signatures is not None and not head.startswith(signatures):
        if head.startswith(_OLD_OFFICE):
            what = "an old-style Excel file (.xls) or a workbook protected by a password"
        elif b"\x00" not in head and utf16_text(head) is None and _reads_as_text(head):
            return (f"'{path}' is not {kind} but text; if it is a table with its values separated by commas (CSV), "
                    f"give it the ending .csv; else {save}")
        else:
            what = "another kind of file (it does not start as one)"
        return f"'{path}' is not {kind} but {what}; {save}"
    if suffix == ".dta" and "version" in why.lower():
        release = re.search(rb"<release>(\d+)</release>", head)
        number = release.group(1).decode() if release else str(head[0]) if head else "?"
        return (f"'{path}' is a Stata file of format {number}, which this reader does not know; save it from Stata "
                f"in an older format, or as CSV")
    if "expected number of rows" in why or "Unable to read" in why or why in ("BadZipFile", "EOFError"):
        return (f"'{path}' is {kind} cut short or damaged (as after an interrupted copy or download); copy it "
                f"again, or {save}")
    if why == "KeyError" and suffix in EXCEL_SUFFIXES:
        return (f"'{path}' is a zip archive but holds no Excel workbook (another kind of file named {suffix}, such "
                f"as an OpenDocument sheet); {save}")
    return f"'{path}' cannot be read as {kind} ({printable(why)}); {save}"


def _reads_as_text(head: bytes) -> bool:
    """Whether the first bytes of a file read as text (UTF-8 or a Western code page, no control characters but
    line ends and tabs)."""
    try:
        text = head.decode("utf-8")
    except UnicodeDecodeError:
        text = head.decode("cp1252", errors="replace")
    return bool(text.strip()) and all(c.isprintable() or c in "\r\n\t" for c in text[:-4])


class MeasureLevel(Enum):
    """The measure level an SPSS file gives a variable (pyreadstat's ``variable_measure``; 'unknown' is not kept):
    a hint of what its values are, not a fact, since SPSS sets one on its own when nobody does (by the number of
    different values of a numeric variable, as recalled from memory of its data editor)."""

    NOMINAL = "nominal"  # categories without an order
    ORDINAL = "ordinal"  # ordered categories
    SCALE = "scale"  # amounts


#: the key of DataFrame.attrs that keeps each column's :class:`MeasureLevel` as an SPSS file gives it ({column: level})
MEASURE_LEVELS = "measure_levels"


def measure_levels(frame: pd.DataFrame) -> dict[str, MeasureLevel]:
    """The measure level of each column of ``frame`` that its SPSS file gives one ({} for another file)."""
    return frame.attrs.get(MEASURE_LEVELS) or {}


def read_measure_levels(measures: dict | None) -> dict[str, MeasureLevel]:
    """The measure levels of an SPSS file's variables (pyreadstat's ``variable_measure``), those it leaves unknown
    left out."""
    known = {level.value: level for level in MeasureLevel}
    return {str(name): known[str(level)] for name, level in (measures or {}).items() if str(level) in known}


def _with_case_filter(loaded: LoadedData) -> LoadedData:
    """``loaded`` (an SPSS or Stata file) with its case filter variable among the cautions, when it has one
    (data.case_filter.filter_variable: the rows it does not select are analysed, but named first)."""
    found = filter_variable(loaded.frame, loaded.variable_labels, loaded.value_labels)
    return replace(loaded, cautions=loaded.cautions + (found,)) if found is not None else loaded


def _check_duplicates(header: list[str], where: str, named_by: str = "") -> None:
    """Every column name once (``named_by``: :func:`_named_by`, the option that named the header's row)."""
    seen: set[str] = set()
    for name in header:
        if name in seen:
            raise DataError(f"{where}: the column name '{name}' appears more than once in the header{named_by}")
        seen.add(name)


def _named_by(names_row: int | None, option: Option) -> str:
    """Words for a message about a header read from the row an option named (--names-row 2), which may be the
    wrong row: ' (the row named by --names-row 2)'; '' when no option named it."""
    return "" if names_row is None else f" (the row named by {option.given(names_row)})"


MAX_TEXT_BYTES = 1_000_000_000  # a delimited data file


def decode_table_bytes(raw: bytes) -> str:
    """UTF-8 (with or without a byte-order mark), UTF-16, or else the Windows Western code page
    (cp1252, a superset of Latin-1 for printable characters) as spreadsheet programs save it."""
    return decoded_table(raw)[0]


def decoded_table(raw: bytes) -> tuple[str, TextEncoding]:
    """The text of a delimited file and the encoding it was read in (see :func:`decode_table_bytes`)."""
    wide = utf16_text(raw)
    if wide is not None:
        return wide, TextEncoding.UTF16
    try:
        return raw.decode("utf-8-sig"), TextEncoding.UTF8
    except UnicodeDecodeError:
        pass
    try:
        return raw.decode("cp1252"), TextEncoding.WINDOWS_WESTERN
    except UnicodeDecodeError:
        return raw.decode("latin-1"), TextEncoding.LATIN1


class TextEncoding(Enum):
    """How the bytes of a delimited file were read as text."""

    UTF8 = UTF8_NAME
    UTF16 = "UTF-16"
    WINDOWS_WESTERN = "Windows-1252 (Western European)"
    LATIN1 = "Latin-1"


@dataclass(frozen=True)
class TextReading:
    """How a delimited text file was read: its encoding, the separator between fields and the decimal mark, as
    the reader found them (the data notes and the JSON ``data`` block say them)."""

    encoding: TextEncoding
    separator: str
    decimal: str
    names_line: int  # the text line of the column names
    names_row: int  # their row as a spreadsheet shows the file (one per record), by which rows are numbered
    #: whether the file began with a byte-order mark (a spreadsheet's 'CSV UTF-8'), which the CSV files the tool writes
    #: from these data keep (data.csv_convention)
    byte_order_mark: bool = False

    def plain(self) -> bool:
        """UTF-8 text with commas between fields and decimal points, the reading every note would otherwise repeat
        (the JSON ``data`` block records every reading)."""
        return self.encoding is TextEncoding.UTF8 and self.separator == "," and self.decimal == "."

    def words(self) -> str:
        return (f"read as {self.encoding.value} text, {separator_words(self.separator, self.decimal)}; "
                f"the column names are in row {self.names_row}"
                + (f" (text line {self.names_line})" if self.names_row != self.names_line else "")
                + ", and rows are numbered as a spreadsheet shows the file (one row per record)")

    def to_dict(self) -> dict:
        return {"encoding": self.encoding.value, "separator": self.separator, "decimal_mark": self.decimal,
                "byte_order_mark": self.byte_order_mark, "names_line": self.names_line, "names_row": self.names_row}


def _filled(fields: list[str], delimiters_only: bool = False) -> bool:
    """Whether a record is not blank: a value in some field, or with ``delimiters_only``, fields that are all empty
    (';;;'), which the table parser reads as a row of empty cells (it skips lines that are empty or hold only spaces,
    as this does)."""
    return bool(fields) and (any(f.strip() for f in fields) or (delimiters_only and len(fields) > 1))


def _records(text: str, delimiter: str, limit: int):
    """(line number, fields) of the first ``limit`` records that are not blank (:func:`_filled`), read no further:
    the sample a separator is judged by (:func:`_delimiter`); :class:`TextRecords` holds them all."""
    reader = csv.reader(io.StringIO(text, newline=""), delimiter=delimiter)
    line = 1
    while True:
        try:
            fields = next(reader)
        except StopIteration:
            return
        except csv.Error as exc:
            raise DataError(f"line {reader.line_num}: {exc}") from None
        if _filled(fields):
            yield line, fields
            limit -= 1
            if limit <= 0:
                return
        line = reader.line_num + 1


@dataclass(frozen=True, eq=False)
class TextRecords:
    """Every record of a delimited file's text as the csv module reads it, in one pass (quoted fields may span
    lines), each with the text line it starts on, a blank line a record without fields: the one reading of the text
    that the rows' numbers (:func:`text_rows`), the header, the rows a first row of data skips and the field counts
    (:func:`_check_field_counts`) are found in.  ``error``: the message naming the file, the line and what to do
    where the csv module stopped on a record it cannot read (:func:`_unreadable_record`; ``end``: the line after the
    last record read)."""

    records: list[tuple[int, list[str]]]
    end: int
    error: str | None = None

    def read(self, delimiters_only: bool = False, after: int = 0):
        """(line number, fields) of each record that is not blank (:func:`_filled`) and starts after the line
        ``after``; the csv module's error, where it stopped, once the records before it are read."""
        for line, fields in self.records:
            if line > after and _filled(fields, delimiters_only):
                yield line, fields
        if self.error is not None:
            raise DataError(self.error)


def text_records(text: str, delimiter: str, where: str = "") -> TextRecords:
    """The :class:`TextRecords` of a delimited file's ``text`` (``where``: the file, which an error names)."""
    reader = csv.reader(io.StringIO(text, newline=""), delimiter=delimiter)
    records: list[tuple[int, list[str]]] = []
    line = 1
    try:
        for fields in reader:
            records.append((line, fields))
            line = reader.line_num + 1
    except csv.Error as exc:
        return TextRecords(records, line, _unreadable_record(where, text, delimiter, line, reader.line_num, exc))
    return TextRecords(records, line)


def _unreadable_record(where: str, text: str, delimiter: str, start: int, stop: int, error: csv.Error) -> str:
    """The one-line message of a record of ``text`` starting on the line ``start`` that the csv module stopped
    reading on the line ``stop``: the file, the line and column, and what to do.  A field longer than the module's
    limit is a quote opened in a cell and never closed (the rest of the file read as one value) when the record's
    first line leaves a quote open, else a value far longer than any answer."""
    first = _line_text(text, start)
    where = f"{where}: " if where else ""
    if "field limit" not in str(error):
        return f"{where}line {start}: the file cannot be read as a table ({printable(str(error))})"
    limit = csv.field_size_limit()
    column = _open_quote(first, delimiter)
    if column is not None:
        to = f", to line {stop}" if stop > start else ""
        return (f"{where}line {start}, column {column}: a quoted value opened there (\"...) runs on for more than "
                f"{limit:,} characters{to} without its closing quote, so the rows after it are read as one value; "
                f"close the quote, or remove it (a quote inside a quoted value is written twice, \"\")")
    fields = first.split(delimiter)
    column = max(range(len(fields)), key=lambda k: len(fields[k])) + 1
    return (f"{where}line {start}, column {column} holds a value of more than {limit:,} characters, far longer "
            f"than an answer: if the file separates its fields by another character than "
            f"'{_shown_delimiter(delimiter)}' (the one read), save it again as CSV; else shorten that cell")


def _line_text(text: str, line: int) -> str:
    """The 1-based ``line`` of ``text`` (lines end at LF, CR LF or CR), without its end."""
    begin = _offset_of_line(text, line)
    ends = [i for i in (text.find("\n", begin), text.find("\r", begin)) if i >= 0]
    return text[begin:min(ends)] if ends else text[begin:]


def _open_quote(line: str, delimiter: str) -> int | None:
    """The 1-based column of the field of ``line`` (a record's first line) whose quote is still open at the end of
    the line, read as the csv module reads quotes (a quote opens a quoted field only at the field's start, and
    two quotes inside it are one); None when every quote closes."""
    column, quoted, at_start, k = 1, False, True, 0
    while k < len(line):
        c = line[k]
        if quoted:
            if c == '"':
                if line.startswith('""', k):
                    k += 1
                else:
                    quoted = False
        elif c == delimiter:
            column, at_start = column + 1, True
            k += 1
            continue
        elif c == '"' and at_start:
            quoted = True
        at_start = False
        k += 1
    return column if quoted else None


@dataclass(frozen=True, eq=False)
class TextRows:
    """Where the rows of a delimited text file are, numbered as a spreadsheet shows the file: one row per record
    (a quoted cell's line breaks start no row), the header and any rows above the data counted, a blank line a row
    of its own.  For a file without line breaks inside quotes a row's number is its line's."""

    starts: np.ndarray  # starts[k]: the text line (1-based) on which row k + 1 starts
    lines: int  # how many text lines the file has

    @property
    def count(self) -> int:
        """How many rows the file has."""
        return len(self.starts)

    @property
    def same_as_lines(self) -> bool:
        """Whether every row is one text line (no record spans lines)."""
        return not len(self.starts) or int(self.starts[-1]) == len(self.starts)

    def rows(self, lines) -> np.ndarray:
        """The row of the record that starts on (or spans) each of ``lines``."""
        return np.searchsorted(self.starts, np.asarray(lines, dtype=np.int64), side="right")

    def row(self, line: int) -> int:
        return int(self.rows([line])[0])

    def line(self, row: int) -> int:
        """The text line on which ``row`` starts (``row`` from 1 to :attr:`count`)."""
        return int(self.starts[row - 1])

    def words(self, row: int) -> str:
        """'row 501', and where the row starts on another text line, 'row 501 (text line 575)'."""
        return row_words(row, {row: self.line(row)} if 1 <= row <= self.count else None)

    def differing(self, rows) -> dict[int, int]:
        """{row: its text line} of those of ``rows`` that start on a line of another number (:data:`TEXT_LINES`)."""
        if self.same_as_lines:
            return {}
        rows = np.asarray(rows, dtype=np.int64)
        lines = self.starts[rows - 1]
        other = lines != rows
        return dict(zip(rows[other].tolist(), lines[other].tolist()))


def text_rows(text: str, delimiter: str, records: TextRecords | None = None) -> TextRows:
    """The rows of a delimited file's ``text`` (:class:`TextRows`), from its ``records`` (:func:`text_records`, read
    here when not given); a record the csv module cannot read ends the search, each line after it counted a row
    (the field-count check names its line)."""
    total = line_count(text)
    if '"' not in text:  # no quoted field, so no line break inside one: every line is a row
        return TextRows(np.arange(1, total + 1, dtype=np.int64), total)
    records = records if records is not None else text_records(text, delimiter)
    starts = [line for line, _ in records.records]
    starts.extend(range(records.end, total + 1))
    return TextRows(np.asarray(starts, dtype=np.int64), total)


def _delimiter(text: str) -> str:
    """The delimiter that splits the header into the most names and the first rows into as many
    fields as the header (quotes respected, so a ';' inside a quoted name does not count)."""
    best, best_score = ",", (-1.0, 0)
    for delimiter in _DELIMITERS:
        if delimiter not in text[:100_000]:
            continue
        try:
            records = [fields for _, fields in _records(text, delimiter, limit=50)]
        except DataError:
            continue
        if not records or len(records[0]) < 2:
            continue
        width = len(records[0])
        body = records[1:] or records
        consistent = sum(len(r) == width for r in body) / len(body)
        score = (consistent, width)
        if score > best_score:
            best, best_score = delimiter, score
    return best


def _check_field_counts(records: TextRecords, delimiter: str, named: int, width: int, path: Path,
                        header_line: int = 1, lines: list[int] | None = None,
                        names_option: Option = Option.NAMES_ROW, data_line: int = 0,
                        fields_out: list[list[str]] | None = None, below=lambda: None, items=None,
                        names_row: int | None = None) -> int:
    """Every data record (those of ``records`` after the header on ``header_line``, from the line ``data_line`` on)
    must have a field for each of the ``named`` columns and no values beyond them.  Empty fields after them (a
    delimiter at the end of each line, as some programs write them; ``width`` fields in the header line) are
    accepted.  Returns the largest number of fields in a record; ``lines`` receives the line on which each record
    the table parser reads as a row starts, ``fields_out`` its fields as written (:class:`_RawCells`).  ``below``:
    the row below the header that holds the column names (:func:`_text_names_row` of the model's ``items``), asked
    for when a message says the header was taken from the first line."""
    widest = width
    previous = None
    for line, fields in records.read(delimiters_only=True, after=header_line):
        if line < data_line:  # a row between the header and the first row of data, not read
            continue
        n = len(fields)
        if lines is not None:
            lines.append(line)
        if fields_out is not None:
            fields_out.append(fields)
        if previous is not None and line - previous[0] > 1:  # the record before ran over several lines
            _check_quoted_rows(*previous, delimiter, named, path)
        previous = (line, fields)
        if n == named or (n > named and not any(f.strip() for f in fields[named:])) or not any(f.strip() for f in fields):
            widest = max(widest, n)
            continue
        if named < n <= width:
            column = next(k for k in range(named, n) if fields[k].strip()) + 1
            raise DataError(f"{path}: line {line} has a value in column {column}, which has no name in the header "
                            f"({_header_taken(f'line {header_line}', names_option, below(), items, names_row)})")
        _check_quoted_rows(line, fields, delimiter, named, path)  # a stray quote before its field count (review s14)
        others = [d for d in _DELIMITERS if d != delimiter and d in delimiter.join(fields)]
        hint = (f"; the line holds '{_shown_delimiter(others[0])}', while the header is separated by "
                f"'{_shown_delimiter(delimiter)}'") if others and n == 1 else ""
        more = "more" if n > named else "fewer"
        taken = f"; {_header_taken(f'line {header_line}', names_option, below(), items, names_row)}" if n > named else ""
        raise DataError(f"{path}: line {line} has {n} fields but the header has {named} ({more} than the header{hint}); "
                        f"every row needs one value (or an empty field) per column{taken}")
    if previous is not None:
        _check_quoted_rows(*previous, delimiter, named, path)
    return widest


def _text_names_row(records: TextRecords, header_line: int, rows: TextRows, items) -> int | None:
    """The row (as a spreadsheet shows the file) below the header line of a text file that holds the column names:
    a name in every column used and every one of the model's ``items`` among them (:func:`_names_row_below`; all
    cells of a text file are text, so without the model's names no row is told from a row of answers: None)."""
    if not items:
        return None
    from itertools import islice

    found = list(islice(records.read(after=header_line - 1), MERGED_HEADER_LOOK + 1))
    cells = [fields for _, fields in found]
    k = _names_row_below(cells, 0, items, every=_used_columns(cells))
    return rows.row(found[k - 1][0]) if k is not None else None


def _looks_like_a_row(line: str, delimiter: str, named: int) -> bool:
    """A line inside a quoted value that holds a row of data: the separators of a whole row, and numbers in at least
    half of its fields (a comment of several lines with commas between words is no row; review s14)."""
    fields = line.split(delimiter)
    if len(fields) < named:
        return False
    numbers = sum(1 for f in fields if f.strip() and (number(f) is not None or number(f, True) is not None))
    return numbers * 2 >= len(fields)


def _check_quoted_rows(line: int, fields: list[str], delimiter: str, named: int, path: Path) -> None:
    """A refusal when a quoted value of the record starting on ``line`` runs over several lines and one of them holds
    the separators of a whole row: a quote opened in a free-text cell and closed only rows later (or never) makes
    the rows between one cell, and they would vanish from the analysis unseen (a hostile tester's finding: 200 of
    480 rows).  A value with line breaks and fewer separators per line (a comment of several lines) is read as it
    is."""
    if named < 4:
        return
    for column, value in enumerate(fields, start=1):
        if "\n" not in value:
            continue
        parts = value.rstrip("\r\n").split("\n")  # (a quote left open to the end: the file's last line break)
        rows = sum(1 for part in parts[1:] if _looks_like_a_row(part, delimiter, named))
        if rows:
            raise DataError(f"{path}: line {line}, column {column}: a quoted value runs over {len(parts)} lines, to "
                            f"line {line + len(parts) - 1}, and holds {rows} line{'s' if rows > 1 else ''} with the "
                            f"separators of a whole row: a quote opened there (\"...) and closed only lines later "
                            f"makes those rows one cell; remove the stray quote (or double it, \"\", inside a "
                            f"quoted value)")


def _shown_delimiter(d: str) -> str:
    return {"\t": "tab", ",": ",", ";": ";", "|": "|"}[d]


def read_table(path: str | Path, notes: list[str] | None = None, row_names: list | None = None,
               text_columns: tuple[str, ...] = (), items=None, names_row: int | None = None,
               reading: list | None = None, names_option: Option = Option.NAMES_ROW, listed=None,
               first_data_row: int | None = None, cautions: list | None = None,
               header_out: list | None = None) -> pd.DataFrame:
    """A delimited text file as a DataFrame, its rows indexed by their rows as a spreadsheet shows the file, one per
    record (:class:`TextRows`, data.moments.file_rows_index; a text line in a message about a malformed line).
    ``notes`` receives what was done to read it that the report should mention (empty fields dropped at the ends
    of rows, a row-name column); ``row_names`` receives the row-name column's values (a Series of text) when the
    file has one; ``names_row``: the row of the column names (the rows above it are not read), given by
    ``names_option``; ``reading``
    receives how the text was read (:class:`TextReading`); ``first_data_row``: the row where the rows of data start,
    the rows between it and the column names not read; ``cautions`` receives those rows when they look like the
    rows of answers below them (:class:`SkippedAnswers`)."""
    path = Path(path)
    raw = input_bytes(path, "data file", DataError, MAX_TEXT_BYTES)
    if not raw.strip():
        raise DataError(f"data file '{path}' is empty")
    text, encoding = decoded_table(raw)
    if "\x00" in text:
        line = text.count("\n", 0, text.index("\x00")) + 1
        raise DataError(f"data file '{path}' is not a text file (it contains NUL bytes, the first on line {line}); "
                        f"save it as CSV")
    delimiter = _delimiter(text)
    records = text_records(text, delimiter, str(path))  # the one reading of the records
    first = next(records.read(), None)
    if first is None:
        raise DataError(f"data file '{path}' is empty")
    rows = text_rows(text, delimiter, records)  # rows as a spreadsheet shows the file: one per record
    if names_row is not None:
        start_row = _names_row_start(names_row, rows.count, rows.row(first[0]) - 1, str(path), names_option) + 1
        start = rows.line(start_row)
        first = next(records.read(after=start - 1), None)
        if first is None or first[0] != start:
            raise DataError(f"{path}: {rows.words(start_row)}, named by {names_option}, is empty")
        if notes is not None:
            notes.append(_names_row_note(str(path), start_row, names_option))
        above = None
        for line, cells in records.read():  # the nearest record with values above the named one
            if line >= start:
                break
            above = (line, cells)
        found = None if above is None else _answers_as_names(above[1], first[1], start_row, rows.row(above[0]),
                                                             str(path), names_option)
        if found is not None and cautions is not None:
            cautions.append(found)
        named_by_row = found.hint() if found is not None else ""
    header_line, header = first
    header_row = rows.row(header_line)
    if header_out is not None:
        header_out.append(header_row)
    between: list[tuple[int, list[str]]] = []  # the rows a first row of data leaves unread
    data_line = 0  # the line where the rows of data start (0: below the header)
    if first_data_row is not None:
        text, data_line = _skip_to_data(text, records, header_line, first_data_row, str(path), names_option, notes,
                                        between, rows)
    text, records = _without_notes_lines(text, records, header_line, data_line, str(path), rows, notes)
    header = [h.strip() for h in header]
    trailing = 0
    while len(header) > 1 and not header[-1]:  # a delimiter at the end of the header line
        header.pop()
        trailing += 1
    has_row_names = len(header) > 1 and not header[0]
    named_by = _named_by(names_row, names_option) + (named_by_row if names_row is not None else "")
    for position, name in enumerate(header, start=1):
        if not name and not (position == 1 and has_row_names):
            below = _text_names_row(records, header_line, rows, items) if not data_line else None
            hint = f" ({_names_row_words(below, names_option, items)})" if below is not None else ""
            raise DataError(f"{path}: {rows.words(header_row)}: column {position} of the header{named_by} has no "
                            f"name{hint}")
    _check_duplicates(header, str(path), named_by)
    lines: list[int] = []  # the line each row starts on (messages about a malformed line name it)
    fields: list[list[str]] = []  # and its fields as written
    body = text[_offset_of_line(text, header_line):]  # from the header line on, cut out once
    widest = _check_field_counts(records, delimiter, len(header), len(header) + trailing, path, header_line,
                                 lines, names_option, data_line, fields, items=items, below=lambda: _text_names_row(
                                     records, header_line, rows, items) if not data_line else None,
                                 names_row=names_row)
    decimal = _decimal_mark(body, delimiter)
    if reading is not None:
        reading.append(TextReading(encoding, delimiter, decimal, header_line, header_row,
                                   raw.startswith((UTF8_MARK, codecs.BOM_UTF16_LE, codecs.BOM_UTF16_BE))))
    try:
        frame = pd.read_csv(
            io.StringIO(body),
            sep=delimiter,
            header=0,
            names=list(range(widest)),
            usecols=list(range(len(header))),
            index_col=False,
            decimal=decimal,
            skipinitialspace=True,
            na_values=["", *MISSING_MARKERS],
            keep_default_na=False,
            # row names and id columns as written: '0007' stays '0007'
            dtype={k: str for k, name in enumerate(header) if (k == 0 and has_row_names) or name in text_columns}
            or None,
        )
    except (pd.errors.ParserError, ValueError, OverflowError) as exc:
        detail = str(exc).strip().splitlines()[-1] if str(exc).strip() else "cannot be parsed"
        raise DataError(f"{path}: the file cannot be read as a table ({printable(detail)})") from None
    frame.columns = header
    if len(frame) == 0:
        raise DataError(f"data file '{path}' has a header but no rows of data")
    if len(lines) == len(frame):  # (always: the records counted as the table parser reads them)
        numbers = rows.rows(lines)  # each row's number as a spreadsheet shows the file, not its text line
        frame.index = file_rows_index(numbers)
        if not rows.same_as_lines:
            frame.attrs[TEXT_LINES] = rows.differing(numbers)
            if notes is not None:
                notes.append(_spanning_note(path, rows))
    frame = blank_text_as_missing(frame, text_columns, MISSING_MARKERS, decimal == ",")  # 'NA ' is 'NA'
    raw = _RawCells(body, delimiter, widest, len(header), frame.index, fields if len(fields) == len(frame) else None)
    _check_formula_errors(frame, str(path), items)
    _check_repeated_header(frame, str(path), header_row)
    _check_header_rows(frame, str(path), decimal == ",", text_columns, items, header_row, names_option, listed)
    unread = _skipped_answers(frame, between, items, text_columns, decimal == ",", str(path), int(first_data_row), first_data_option(names_option)) if between else None
    if unread is not None and cautions is not None:
        cautions.append(unread)
    if decimal == ",":
        _check_dotted_thousands(frame, raw, header, path, notes)
        _check_decimal_points(frame, str(path), text_columns)
    _keep_number_spellings(frame, raw)
    _note_missing_markers(raw, header, path, notes, frame)
    empty = widest - len(header)
    if empty and notes is not None:
        notes.append(f"{path}: empty fields at the end of the lines (a delimiter after the last value) were ignored")
    if has_row_names and frame.iloc[:, 0].isna().all():
        frame = frame.iloc[:, 1:]  # a first column empty in every line (a delimiter at the start) holds no row names
    elif has_row_names:
        frame = _split_row_names(frame, row_names)
        if notes is not None:
            notes.append(f"{path}: the first column has no name in the header and was read as row names, not as data")
    return frame


def _names_row_start(names_row, rows: int, first: int, where: str,
                     option: Option = Option.NAMES_ROW) -> int:
    """The 0-based position of the row ``option`` (--names-row) names (``rows``: how many the file has; ``first``:
    the first that is not empty), or an error when it cannot apply."""
    if isinstance(names_row, bool) or not isinstance(names_row, (int, np.integer)) or names_row < 1:
        raise DataError(f"the row of column names ({option}) must be a row number (1 or more), not "
                        f"{clipped(repr(names_row), 40)}")
    if names_row > rows:
        raise DataError(f"{where} has {counted(rows, 'row')}, so row {names_row} ({option}) cannot hold the column names")
    if names_row - 1 < first:
        raise DataError(f"{where}: row {names_row} ({option}) is empty; the first row with values is "
                        f"{first + 1}")
    return int(names_row) - 1


def _first_data_start(first_data_row, names_row: int, last: int, where: str, names_option: Option,
                      notes: list[str] | None) -> int:
    """The row (of a sheet, or of a text file as a spreadsheet shows it) where the rows of data start, as
    :func:`first_data_option` of ``names_option`` names it (``names_row``: the row of the column names; ``last``: the
    file's last row), or an error when it cannot apply; the rows between the two are named in one note."""
    option = first_data_option(names_option)
    if isinstance(first_data_row, bool) or not isinstance(first_data_row, (int, np.integer)) or first_data_row < 1:
        raise DataError(f"the first row of data ({option}) must be a row number (1 or more), not "
                        f"{clipped(repr(first_data_row), 40)}")
    first_data_row = int(first_data_row)
    if first_data_row <= names_row:
        raise DataError(f"{where}: row {first_data_row} ({option.given(first_data_row)}) is not below the column "
                        f"names, which are in row {names_row}; give the row where the answers start")
    if first_data_row > last:
        raise DataError(f"{where} has {counted(last, 'row')}, so row {first_data_row} ({option.given(first_data_row)}) "
                        f"cannot be the first row of data")
    if first_data_row > names_row + 1 and notes is not None:
        notes.append(_skipped_note(where, names_row, names_row + 1, first_data_row, option))
    return first_data_row


def _skipped_note(where: str, names_row: int, skipped: int, first_data_row: int, option: Option) -> Note:
    """The note naming the rows from ``skipped`` to the one before ``first_data_row``, which ``option`` left unread,
    the option apart (note_parts.Command: the Word file names none; new-user trial s21)."""
    between = (f"row {skipped} was" if first_data_row == skipped + 1 else
               f"rows {skipped}-{first_data_row - 1} were")
    return Note((f"{where}: {between} not read as data (between the column names in row {names_row} and the first "
                 f"row of data, {first_data_row}", Command(f", as {option.given(first_data_row)} asks"), ")"))


def _skip_to_data(text: str, records: TextRecords, header_line: int, first_data_row, where: str,
                  names_option: Option, notes: list[str] | None, between: list, rows: TextRows) -> tuple[str, int]:
    """``text`` (read as ``records``, :func:`text_records`; its rows ``rows``) with the lines between the header (on
    ``header_line``) and the row ``first_data_row`` (a row as a spreadsheet shows the file) left empty, so that they
    are not read and every other line keeps its number, and the line where that row starts; an error when no record
    starts on that row.  ``between`` receives the records left unread: (row, fields)."""
    header_row = rows.row(header_line)
    start_row = _first_data_start(first_data_row, header_row, rows.count, where, names_option, None)
    start = rows.line(start_row)
    after_header = list(records.read(delimiters_only=True, after=header_line))
    after = [line for line, _ in after_header]
    between.extend((rows.row(line), fields) for line, fields in after_header if line < start)
    if start not in after:
        raise DataError(f"{where}: {rows.words(start_row)} ({first_data_option(names_option).given(start_row)}) "
                        f"starts no row of data (it is empty)")
    if after[0] == start:  # (a header whose quoted names span lines ends on the line above)
        return text, start
    if notes is not None:
        notes.append(_skipped_note(where, header_row, rows.row(after[0]), start_row,
                                   first_data_option(names_option)))
    begin, end = _offset_of_line(text, after[0]), _offset_of_line(text, start)
    return text[:begin] + "\n" * (start - after[0]) + text[end:], start


def _without_notes_lines(text: str, records: TextRecords, header_line: int, data_line: int, where: str,
                         rows: TextRows, notes: list[str] | None) -> tuple[str, TextRecords]:
    """``text`` and its ``records`` without the notes lines under the data (data.notes_rows: a spreadsheet export's
    'Notes: ...' row), their text lines left blank so that every other row keeps its line; ``notes`` receives the
    note naming them.  Unchanged where the csv module stopped on a record it cannot read (its error comes first)."""
    if records.error is not None:
        return text, records
    data = [(k, line, fields) for k, (line, fields) in enumerate(records.records)
            if line > header_line and line >= data_line and _filled(fields, delimiters_only=True)]
    found = notes_lines([fields for _, _, fields in data])
    if not found:
        return text, records
    cut = data[end_of_data([fields for _, _, fields in data], found)][0]  # the first record not read
    line = records.records[cut][0]
    begin, stop = _offset_of_line(text, line), _offset_of_line(text, records.end)
    if notes is not None:
        notes.append(notes_note(where, [rows.row(data[k][1]) for k in found], [data[k][2] for k in found]))
    return (text[:begin] + "\n" * (records.end - line) + text[stop:],
            TextRecords(records.records[:cut], records.end, records.error))


def _spanning_note(path, rows: TextRows) -> str:
    """The note of a delimited file whose quoted cells hold line breaks: its rows are numbered as a spreadsheet shows
    it, one per record, so a row's number is not its text line."""
    spanning = int((np.diff(np.append(rows.starts, rows.lines + 1)) > 1).sum())
    last = rows.count
    return (f"{path}: {spanning} {'row spans' if spanning == 1 else 'rows span'} several text lines (line breaks "
            f"inside quoted cells), so rows are numbered as a spreadsheet shows the file, one per record (row {last} "
            f"is text line {rows.line(last)}); messages give a row's text line beside it where the two differ")


def _names_row_note(where: str, names_row: int, option: Option = Option.NAMES_ROW) -> Note:
    """The note of a table whose column names were read from a later row (``option``: --names-row), the option apart
    (note_parts.Command: the Word file names none)."""
    above = "" if names_row == 1 else ("; row 1 above it was not read" if names_row == 2 else
                                        f"; rows 1-{names_row - 1} above it were not read")
    return Note((f"{where}: the column names were read from row {names_row}", Command(f", as {option.flag} asks"),
                 above))


def drop_blank_rows(frame: pd.DataFrame, where: str) -> tuple[pd.DataFrame, tuple[str, ...]]:
    """``frame`` without the rows that hold no value in any column (blank rows among the data of a sheet or a
    text file, a data frame's empty rows), and the note naming them: the one rule of every reader and of data
    frames, so that a file and the same table read by pandas count the same rows.  A row with any value (an id,
    a footer such as 'Total responses: 1204') is kept; the analysis names it if it answers no model variable."""
    if frame.shape[1] == 0 or len(frame) == 0:
        return frame, ()
    dtypes = column_dtypes(frame)  # read at once (data.moments.column_dtypes); a column of numpy whole numbers or
    if any(isinstance(d, np.dtype) and d.kind in "iub" for d in dtypes):  # truth values has a value in every row
        return frame, ()
    blank = None
    for position, dtype in enumerate(dtypes):  # column by column: a column without gaps ends the search at once
        empty = (np.isnan(stored_column(frame, position)) if isinstance(dtype, np.dtype) and dtype.kind == "f"
                 else frame.iloc[:, position].isna().to_numpy())  # numpy floats: their gaps are NaN, as isna says
        blank = empty if blank is None else blank & empty
        if not blank.any():
            return frame, ()
    if blank.all():
        return frame, ()  # the readers' own message: a header but no rows of data
    numbers = row_numbers(frame)[blank]
    one = len(numbers) == 1
    listed = rows_listed(numbers, naming=row_naming(frame), lines=text_lines(frame))
    note = (f"{where}: {len(numbers)} {'row' if one else 'rows'} with no value in any column "
            f"{'was' if one else 'were'} skipped ({listed})")
    return frame[~blank], (note,)


def _as_numbers(column: pd.Series, decimal_comma: bool) -> pd.Series:
    """The cells of a column as numbers (NaN where a cell is missing or not a number), a decimal comma read as
    the point when ``decimal_comma``."""
    if column.dtype.kind in "iuf":
        return column.astype(float)
    cells = column.map(lambda v: v.strip() if isinstance(v, str) else v)
    if decimal_comma:
        cells = cells.map(lambda v: v.replace(",", ".", 1) if isinstance(v, str) and "." not in v else v)
    return pd.to_numeric(cells.where(cells.map(lambda v: not isinstance(v, bool))), errors="coerce")


MAX_HEADER_ROWS = 3  # further header rows a survey platform writes under the column names (question texts, ids)
MAX_ANSWER_WORDS = 30  # a column of answers recorded as words holds at most this many different words


def _check_repeated_header(frame: pd.DataFrame, where: str, header_row: int) -> None:
    """A row of data whose cells repeat the column names (at least two, and half of its filled cells, each in its own
    column) is refused (review s15, hostile case 03): the file holds two tables one under the other (two waves on
    one sheet) or was joined from files that each had a header (``cat``); read as answers, its names were advised
    as no-answer words and both tables were then analysed as one sample.  ``header_row``: the row of the column
    names, which the message names."""
    names = frame.columns.tolist()
    texts = [k for k, dtype in enumerate(column_dtypes(frame))
             if names[k] is not None and not pd.api.types.is_numeric_dtype(dtype)]
    if len(texts) < 2:
        return  # a row repeats the names of two columns or more, and only columns of text can hold a name
    matched = np.zeros(len(frame), dtype=int)
    filled = np.zeros(len(frame), dtype=int)
    for column in frame.columns:
        cells = frame[column]
        present = cells.notna().to_numpy()
        filled += present
        if column is None or pd.api.types.is_numeric_dtype(cells):
            continue
        matched += (cells == str(column)).to_numpy(dtype=bool, na_value=False)
    repeats = np.flatnonzero((matched >= 2) & (2 * matched >= filled))
    if not len(repeats):
        return
    rows = row_numbers(frame)[repeats]
    more = f" (and {rows_listed(rows[1:], 3)})" if len(rows) > 1 else ""
    raise DataError(f"{where}: {row_words(int(rows[0]), text_lines(frame), row_naming(frame))}{more} repeats the "
                    f"column names of row {header_row} ({int(matched[repeats[0]])} of them), so the file holds two "
                    f"tables one under the other (or was joined from files that each had a header row). What to "
                    f"try: if the rows below it are the same sample, delete that row (and any title above it); if "
                    f"they are another sample (a second wave, another group), save each table in a file of its own, "
                    f"or keep them together with a column saying which table each row came from")


def _check_header_rows(frame: pd.DataFrame, where: str, decimal_comma: bool, text_columns=(), items=None,
                       header_row: int | None = None, names_option: Option = Option.NAMES_ROW,
                       listed: dict[str, frozenset[str]] | None = None) -> None:
    """Rows right under the header that hold text in every column of answers: survey platforms export the question
    texts and import ids as a second and third header row.  A column of answers is one of numbers (text above its
    numbers) or, among the item columns (``items``; None: every column), one of answers recorded as words (a cell
    that is not one of the column's answers above them: not a word its 'answers' statement codes, ``listed``, nor
    one that says no answer; without a statement, a cell unlike every other cell of a column of a few repeated
    words).  Read as answers such rows make every item column text or an unknown answer word; the remedy is to skip
    them (:func:`first_data_option`) or delete them, not to recode the answers.  When one of them holds the model's
    names (``items``: question texts in the header row, item codes under them), the message says so: the names
    are to be read from that row, not skipped."""
    if len(frame) <= MAX_HEADER_ROWS + 1:
        return

    def text(v) -> bool:
        return isinstance(v, str) and v.strip() != "" and number(v, decimal_comma) is None

    wanted = None if items is None else {str(x) for x in items}
    top, below = frame.iloc[0].tolist(), frame.iloc[MAX_HEADER_ROWS].tolist()
    numbers_below = sum(text(a) and not text(b) for a, b in zip(top, below))
    words_below = sum(text(a) and text(b) and a.strip() != b.strip() and (wanted is None or str(name) in wanted)
                      for a, b, name in zip(top, below, frame.columns))
    if numbers_below < 2 and words_below < 2:  # the common case, at the cost of two rows
        return
    leads = []
    word_leads = {}  # the item columns of words: position -> its header-like rows (0 when none)
    for position in range(frame.shape[1]):
        column = frame.iloc[:, position]
        name = frame.columns[position]
        if not _text_dtype(column) or name in text_columns:
            continue
        numbers = _as_numbers(column, decimal_comma)
        present = column.notna().to_numpy() & column.map(lambda v: not (isinstance(v, str) and not v.strip())).to_numpy()
        # a word that says no answer ('Don't know') is a respondent's cell, never header text (review s12: a first
        # respondent answering 'Don't know' throughout was called a header row to skip)
        text_cells = present & numbers.isna().to_numpy() & ~column.map(
            lambda v: isinstance(v, str) and says_no_answer(v)).to_numpy(dtype=bool)
        if text_cells[MAX_HEADER_ROWS:].any() and (wanted is None or str(name) in wanted):
            lead = _words_lead(column, present, (listed or {}).get(str(name)))
            if lead is not None:
                word_leads[position] = lead
            continue
        lead = 0
        while lead < MAX_HEADER_ROWS and text_cells[lead]:
            lead += 1
        if lead == 0 or text_cells[lead:].any() or not present[lead:].any():
            continue  # numbers from the first row on, or text further down: a column of answers or of text
        leads.append((lead, position))
    if len(word_leads) >= 2 and len(set(word_leads.values())) == 1 and 0 not in word_leads.values() and all(
            v is None or isinstance(v, str) or (isinstance(v, float) and np.isnan(v))
            for k in range(next(iter(word_leads.values()))) for v in frame.iloc[k].tolist()):
        # every item column of words agrees, and the rows hold text only (a row of data holds a number or a date)
        leads += [(lead, position) for position, lead in word_leads.items()]
    if len(leads) < 2 or len({lead for lead, _ in leads}) != 1:
        return
    # the example: the longest text of a column of answers recorded as words (a question), else of numbers
    lead, position = max(leads, key=lambda found: (found[1] in word_leads, len(str(frame.iloc[0, found[1]]))))
    numbers = row_numbers(frame)[:lead + 1]
    lines = text_lines(frame)  # a text file's rows that start on a line of another number
    if items:
        for k in range(lead):
            cells = [str(v).strip() for v in frame.iloc[k].tolist() if isinstance(v, str)]
            hits = [c for c in cells if c in wanted]
            if len(hits) >= min(2, len(wanted)):
                shown = ", ".join(f"'{printable(h)}'" for h in hits[:3]) + (", ..." if len(hits) > 3 else "")
                above = f"the column names of row {header_row}" if header_row is not None else "the column names"
                raise DataError(f"{where}: {row_words(numbers[k], lines)} holds the model's variable names ({shown}) under "
                                f"{above}, as survey platforms export question texts above their codes; read the "
                                f"column names from that row with {names_option.given(numbers[k])} (the rows above it are then "
                                f"not read)")
    example = clipped(str(frame.iloc[0, position]).strip(), 60)
    rows = row_words(numbers[0], lines) if lead == 1 else f"rows {numbers[0]}-{numbers[lead - 1]}" + (
        f" (text lines {lines.get(numbers[0], numbers[0])}-{lines.get(numbers[lead], numbers[lead]) - 1})"
        if numbers[0] in lines or numbers[lead] in lines else "")
    look = "looks like a further header row" if lead == 1 else "look like further header rows"
    held = "answers" if position in word_leads else "numbers"
    raise DataError(f"{where}: {rows} under the column names {look} (text such as '{example}' in every column "
                    f"that holds {held} below {'it' if lead == 1 else 'them'}), as survey platforms export question "
                    f"texts and import ids; skip {'it' if lead == 1 else 'them'} with "
                    f"{first_data_option(names_option).given(numbers[lead])}, the row where the answers start"
                    f"{line_words(numbers[lead], lines)}, or "
                    f"delete {'it' if lead == 1 else 'them'} in a copy of the file")


def _words_lead(column: pd.Series, present: np.ndarray, words: frozenset[str] | None) -> int | None:
    """How many of the first rows (up to MAX_HEADER_ROWS) of a column of answers recorded as words hold text that is
    not one of its answers: not one of the ``words`` its 'answers' statement codes (matching keys) nor a word that
    says no answer, or, without a statement, a cell unlike every other cell of the column; None when the column is
    no column of answers (without a statement: more than MAX_ANSWER_WORDS different cells below those rows, or
    cells that repeat too little, such as comments or ids)."""
    from cfa_tool.language.spec import answer_key

    cells = [v.strip() if isinstance(v, str) else v for v in column.tolist()]
    if words:
        def answer(v) -> bool:
            return answer_key(v) in words or says_no_answer(v)
    else:
        rest = [v for v, p in zip(cells[MAX_HEADER_ROWS:], present[MAX_HEADER_ROWS:]) if p]
        seen = set(rest)
        if len(seen) > MAX_ANSWER_WORDS or len(rest) < 2 * len(seen):
            return None
        counts: dict = {}
        for v in cells:
            counts[v] = counts.get(v, 0) + 1

        def answer(v) -> bool:
            return counts[v] > 1 or says_no_answer(v)
    lead = 0
    while lead < MAX_HEADER_ROWS and present[lead] and isinstance(cells[lead], str) and not answer(cells[lead]):
        lead += 1
    return lead


def sheet_option(names_option: Option) -> Option:
    """The option that names the sheet of the workbook whose row of column names ``names_option`` names: --sheet
    beside --names-row, --validation-sheet beside --validation-names-row."""
    return Option.VALIDATION_SHEET if names_option is Option.VALIDATION_NAMES_ROW else Option.SHEET


def first_data_option(names_option: Option) -> Option:
    """The option that names the first row of data of the file whose row of column names ``names_option`` names:
    --first-data-row beside --names-row, --validation-first-data-row beside --validation-names-row."""
    return Option.VALIDATION_FIRST_DATA_ROW if names_option is Option.VALIDATION_NAMES_ROW else Option.FIRST_DATA_ROW


_COMMA_NUMBER = re.compile(r"[+-]?\d+,\d+")
_POINT_NUMBER = re.compile(r"[+-]?\d*\.\d+")


def _check_decimal_points(frame: pd.DataFrame, where: str, text_columns=()) -> None:
    """In a file with decimal commas, a column of numbers in which some rows were typed with decimal points
    ('3.5' beside '4,5') is read as text; the error names the row that differs, not the first cell."""
    for position in range(frame.shape[1]):
        column = frame.iloc[:, position]
        if not _text_dtype(column) or frame.columns[position] in text_columns:
            continue
        cells = column.map(lambda v: v.strip() if isinstance(v, str) else v).dropna()
        cells = cells[cells.map(lambda v: isinstance(v, str) and v != "")]
        if cells.empty:
            continue
        commas = cells.str.fullmatch(_COMMA_NUMBER.pattern)
        points = cells.str.fullmatch(_POINT_NUMBER.pattern)
        whole = cells.str.fullmatch(r"[+-]?\d+")
        if not commas.any() or not points.any() or not (commas | points | whole).all():
            continue
        first = cells.index[points.to_numpy().argmax()]
        row = row_numbers(cells)[points.to_numpy().argmax()]
        example = cells[commas].iloc[0]
        raise DataError(f"{where}: column '{printable(frame.columns[position])}' holds "
                        f"'{printable(cells[first])}' in {row_words(row, text_lines(frame))}, written with a '.', "
                        f"while the file writes "
                        f"decimals with commas (such as '{printable(example)}'); write the decimals of that row with "
                        f"commas, as the others are (and numbers without thousands separators)")


def _decimal_mark(text: str, delimiter: str) -> str:
    """',' with semicolons (as spreadsheets in decimal-comma locales write CSV) unless the numbers are written with
    decimal points and never with commas ('3.5;4.5': read, and said, with points; a point before exactly three digits
    alone, '1.234', may separate thousands and leaves the comma, :func:`_check_dotted_thousands`), and with tabs when
    the numbers are written with decimal commas and never with points (their 'Unicode text' export); '.' otherwise."""
    if delimiter == ";":
        sample = text[:200_000]
        points = re.search(r"\d\.(?!\d{3}(?!\d))\d", sample) is not None  # a point not before exactly three digits
        return "." if points and not re.search(r"\d,\d", sample) else ","
    if delimiter == "\t":
        sample = text[:200_000]
        if re.search(r"\d,\d", sample) and not re.search(r"\d\.\d", sample):
            return ","
    return "."


_THOUSANDS_DOT = re.compile(r"\d\.\d{3}(?!\d)")


#: cells read as no answer beside empty ones, as statistics packages and spreadsheets write them
MISSING_MARKERS = ("NA", "N/A", "n/a", "#N/A", "NaN", "nan", ".")
_MARKER_SET = frozenset(MISSING_MARKERS)


def _cell_pattern(pattern: str) -> tuple[re.Pattern, re.Pattern]:
    """What starts a cell of delimited text, as two patterns (re.MULTILINE): at the start of the text, and after a line
    break or a delimiter (:func:`_found_in_cells`)."""
    return re.compile(pattern, re.MULTILINE), re.compile(r"[\n,;\t|](?:" + pattern + ")", re.MULTILINE)


def _found_in_cells(cell: tuple[re.Pattern, re.Pattern], text: str) -> bool:
    """Whether a cell of delimited ``text`` starts with what ``cell`` (:func:`_cell_pattern`) matches: the same as a
    search for '(?:^|[,;\\t|])' followed by the pattern, in a search that scans for the character class (about three
    times faster than trying the alternation at every character)."""
    return cell[0].match(text) is not None or cell[1].search(text) is not None


_MARKER = _cell_pattern(r"\s*\"?(?:" + "|".join(map(re.escape, MISSING_MARKERS)) + r")\"?\s*(?=[,;\t|]|$)")


def _note_missing_markers(raw: "_RawCells", header: list[str], path, notes: list[str] | None,
                          frame: pd.DataFrame | None = None) -> None:
    """A note naming the cells written as a marker of no answer ('.', 'NA', ...), which are read as empty cells: the
    tool's messages ask for empty cells, so a file of markers should say how it was read (new-user trial); each
    column's markers kept in ``frame.attrs`` (:data:`MARKED`)."""
    if notes is None or not _found_in_cells(_MARKER, raw.body):
        return
    cells = raw.frame()
    marked = {}  # column -> {marker: cells}, counted once for the note and the column's record
    column_rows: dict[str, dict[str, list]] = {}  # column -> {marker: the rows (index labels) of its cells}
    for k, name in enumerate(header):
        stripped = cells.iloc[:, k].str.strip()
        held = stripped[stripped.isin(MISSING_MARKERS)]
        counted = held.value_counts(sort=False)
        if len(counted):
            marked[name] = {str(m): int(n) for m, n in counted.items()}
            for label, m in held.items():
                column_rows.setdefault(name, {}).setdefault(str(m), []).append(label)
    said = _say_markers(_marker_totals(marked.values()), path, notes)
    if frame is not None and marked:
        frame.attrs[MARKED] = marked
        if said is not None and len(cells) == len(frame):
            frame.attrs[MARKER_CELLS] = said
            frame.attrs[MARKER_COLUMN_ROWS] = {name: {m: HeldRows(rows) for m, rows in by.items()}
                                               for name, by in column_rows.items()}


#: the key of DataFrame.attrs that keeps, for each column, the markers of no answer its cells were written as and
#: how many ({column: {marker: cells}}): a group column's note names them (cfa_tool.data.labels.label_notes)
MARKED = "marked_no_answer"
#: the key of DataFrame.attrs that keeps the reader's note on cells written as markers of no answer; the rows of those
#: cells are :data:`MARKER_COLUMN_ROWS`'s, the one record of them (:func:`_marker_cells`)
MARKER_CELLS = "marker_cells"
#: the key of DataFrame.attrs that keeps the rows (index labels, :class:`HeldRows`) of the cells written as markers of
#: no answer, one per cell, column by column ({column: {marker: rows}}), by which the note is counted again over the
#: model's item columns alone (newuser s24: 'n/a' in a comment column was counted as items' gaps) and over the rows
#: analysed (data.kept_counts.ReadingCounts)
MARKER_COLUMN_ROWS = "marker_column_rows"


@dataclass(frozen=True, eq=False)
class HeldRows:
    """Row labels kept in a data frame's ``attrs`` (:data:`MARKER_COLUMN_ROWS`), read-only.  pandas compares the attrs
    of the frames it concatenates or joins with ``==`` (one truth value wanted) and deep-copies them into every frame
    made from one: a bare numpy array answers ``==`` cell by cell, an internal error in every command that joined or
    concatenated a file with two 'NA' cells in one column (new-user trial s26), and would be copied each time.  These
    compare whole and are shared, never copied (they cannot change)."""

    labels: np.ndarray

    def __post_init__(self) -> None:
        held = np.array(self.labels)
        held.flags.writeable = False
        object.__setattr__(self, "labels", held)

    def __eq__(self, other: object) -> bool:
        return isinstance(other, HeldRows) and np.array_equal(self.labels, other.labels)

    def __hash__(self) -> int:
        return hash(tuple(self.labels.tolist()))

    def __len__(self) -> int:
        return len(self.labels)

    def __deepcopy__(self, memo: dict) -> HeldRows:
        return self


def _rows_by_marker(by_column) -> dict[str, np.ndarray]:
    """{marker: the rows of its cells, one per cell} of the columns' records ``by_column`` ({marker: rows} each, of
    :data:`MARKER_COLUMN_ROWS`), in the order of MISSING_MARKERS."""
    by_column = list(by_column)
    return {m: np.concatenate([by[m].labels for by in by_column if m in by]) for m in MISSING_MARKERS
            if any(m in by for by in by_column)}


def _marker_cells(frame: pd.DataFrame) -> tuple | None:
    """The reader's note on cells written as markers of no answer with the rows of those cells for each marker
    (note, {marker: rows}), from the frame's one record of them (:data:`MARKER_CELLS`, :data:`MARKER_COLUMN_ROWS`);
    None when the reader wrote no such note."""
    note, by_column = frame.attrs.get(MARKER_CELLS), frame.attrs.get(MARKER_COLUMN_ROWS)
    if note is None or by_column is None:
        return None
    return note, _rows_by_marker(by_column.values())


def _markers_in_items(loaded: LoadedData, markers: tuple, items: set[str]) -> tuple[tuple | None, LoadedData]:
    """The reader's note on cells written as markers of no answer ('NA', 'n/a': ``markers``, its MARKER_CELLS) counted
    again over the model's item columns (``items``) alone, in ``loaded``'s notes in its place (none when no item cell
    holds one): a comment column's 'n/a' is a respondent's words, not a gap in the answers analysed (new-user trial
    s24).  The note's rows by marker come with it, for the counts over the rows analysed (data.kept_counts)."""
    by_column = loaded.frame.attrs.get(MARKER_COLUMN_ROWS)
    if by_column is None:
        return markers, loaded
    rows = _rows_by_marker(by for column, by in by_column.items() if str(column) in items)
    totals = {m: len(r) for m, r in rows.items()}
    if totals == {m: len(r) for m, r in markers[1].items()}:
        return markers, loaded  # every marked cell is an item's
    note = markers_note(totals, loaded.source)
    notes = tuple(n for n in (note if n is markers[0] else n for n in loaded.notes) if n is not None)
    return ((note, rows) if note is not None else None), replace(loaded, notes=notes)


def _marker_totals(marked) -> dict[str, int]:
    """How many cells of each marker of no answer, in the order of MISSING_MARKERS, from each column's counts
    (``marked``: {marker: cells} per column)."""
    marked = list(marked)
    return {m: sum(counted.get(m, 0) for counted in marked) for m in MISSING_MARKERS}


def _say_markers(found: dict[str, int], where, notes: list[str] | None) -> str | None:
    """The note naming how many cells of each marker of no answer were read as empty (data.kept_counts.markers_note),
    added to ``notes`` and returned (None when none)."""
    note = markers_note(found, where)
    if note is not None and notes is not None:
        notes.append(note)
        return note
    return None


class _RawCells:
    """The body of a delimited file read again as text, cell by cell as written, only when a check needs it: from the
    fields of its rows as the csv module read them (``rows``, :class:`TextRecords`, one list per row of the table,
    in its order), or where they are not given, by the table parser as text.  The two readings give the same cells
    (a test compares them on thousands of generated files): a row's fields beyond ``width`` are not read and those
    it lacks are NaN."""

    def __init__(self, body: str, delimiter: str, widest: int, width: int, index: pd.Index | None = None,
                 rows: list[list[str]] | None = None):
        self.body, self._delimiter, self._widest, self._width = body, delimiter, widest, width
        self._index = index  # the rows' index as the table read has it (their lines)
        self._rows = rows if rows is not None and (index is None or len(rows) == len(index)) else None
        self._frame: pd.DataFrame | None = None
        self._columns: dict[int, np.ndarray] = {}

    def column(self, position: int) -> np.ndarray:
        """The cells of the column at ``position`` as written (an array of text, NaN where a row has no such
        field)."""
        if position not in self._columns:
            if self._rows is None:
                self._columns[position] = self.frame().iloc[:, position].to_numpy()
            else:
                cells = np.empty(len(self._rows), dtype=object)
                cells[:] = [f[position] if position < len(f) else np.nan for f in self._rows]
                self._columns[position] = cells
        return self._columns[position]

    def frame(self) -> pd.DataFrame:
        if self._frame is None:
            if self._rows is not None:
                self._frame = pd.DataFrame({k: self.column(k) for k in range(self._width)},
                                           index=self._index if self._index is not None else None)
                return self._frame
            self._frame = pd.read_csv(io.StringIO(self.body), sep=self._delimiter, header=0,
                                      names=list(range(self._widest)), usecols=list(range(self._width)),
                                      index_col=False, dtype=str, keep_default_na=False)
            if self._index is not None and len(self._index) == len(self._frame):
                self._frame.index = self._index
        return self._frame


#: a whole number written with a leading zero ('01') or with zero decimals ('1.0'): the same number as '1'
_SPELLED_NUMBER = _cell_pattern(r"\s*\"?[+-]?(?:0\d|\d+\.0+(?=\s*\"?(?:[,;\t|]|$)))")
SPELLINGS = "number_spellings"  # the key of DataFrame.attrs that keeps them (cfa_tool.data.labels reads it)
MAX_SPELLED_VALUES = 100  # columns with more different numbers are answers or ids, not labels of groups


def _keep_number_spellings(frame: pd.DataFrame, raw: _RawCells) -> None:
    """Group, cluster and stratum labels are read from the numbers of their column, so '1', '01' and '1.0' are one
    label '1': keep, for each number column of few whole values, the different ways it was written, in
    ``frame.attrs`` (they follow the frame through filters and copies), so that the notes can say which were merged."""
    if not _found_in_cells(_SPELLED_NUMBER, raw.body):
        return
    kept = {}
    for position, (name, dtype) in enumerate(zip(frame.columns, column_dtypes(frame))):
        if dtype.kind not in "iuf":
            continue
        if isinstance(dtype, np.dtype):  # numpy numbers: the stored array, read once
            stored = stored_column(frame, position)
            present = ~np.isnan(stored) if dtype.kind == "f" else np.ones(len(stored), dtype=bool)
            values = stored[present]
        else:  # a nullable column
            column = frame.iloc[:, position]
            present = column.notna().to_numpy()
            values = column.to_numpy()[present]
        if len(values) == 0 or not (values == values.round()).all():
            continue
        distinct = len(np.unique(values))
        if distinct > MAX_SPELLED_VALUES:
            continue
        cells = raw.column(position)[present]
        if len(set(cells.tolist())) == distinct:  # one text per number (each text reads as one number): no two
            continue  # spellings, without stripping every cell
        pairs = set(zip(values.tolist(), (c.strip() for c in cells)))
        if len(pairs) == distinct:
            continue
        spelled: dict[float, set] = {}
        for value, cell in pairs:
            spelled.setdefault(value, set()).add(cell)
        kept[name] = {value: tuple(sorted(cells)) for value, cells in spelled.items() if len(cells) > 1}
    if kept:
        frame.attrs[SPELLINGS] = kept


def _check_dotted_thousands(frame: pd.DataFrame, raw: _RawCells, header: list[str], path: Path,
                            notes: list[str] | None) -> None:
    """In a file with decimal commas a '.' is ambiguous when it stands before exactly three digits: '1.083' may be
    1083 written with a thousands separator (as decimal-comma locales write it) or 1.083.  A column whose dotted
    values are all numbers with three decimals is an error when it also holds whole numbers of 100 or more ('850'
    beside '1.083': the reading cannot be decided), and gets a note when the file writes other decimals with commas."""
    if not _THOUSANDS_DOT.search(raw.body):
        return
    commas = re.search(r"\d,\d", raw.body) is not None
    for position, name in enumerate(header):
        cells = raw.frame().iloc[:, position].str.strip()
        dotted = cells.str.contains(".", regex=False) & ~cells.isin(["."])
        if not dotted.any() or not cells[dotted].str.fullmatch(r"[+-]?\d+\.\d{3}").all():
            continue
        first = int(dotted.to_numpy().argmax())
        rows = row_numbers(cells)
        example = f"'{printable(cells.iloc[first])}' in {row_words(rows[first], text_lines(frame))}"
        whole = cells.str.fullmatch(r"[+-]?\d+") & (pd.to_numeric(cells.where(~dotted), errors="coerce").abs() >= 100)
        if whole.any():
            big = int(whole.to_numpy().argmax())
            raise DataError(f"{path}: column '{printable(name)}' holds {example} beside whole numbers such as "
                            f"'{printable(cells.iloc[big])}' ({row_words(rows[big], text_lines(frame))}); in a file "
                            f"with decimal commas the '.' "
                            f"may separate thousands ({cells.iloc[first].replace('.', '')}) or mark decimals, so the "
                            f"values cannot be read; write the numbers without thousands separators")
        # said also when the file writes no other decimals but the column holds whole numbers beside (a lone '1.234'
        # among answers 1 to 5); a column written alike throughout ('4.000', '3.000') says nothing
        if notes is not None and (commas or (~dotted & cells.str.fullmatch(r"[+-]?\d+").fillna(False)).any()):
            notes.append(f"{path}: column '{printable(name)}' was read with '.' as the decimal point ({example}), "
                         f"though the file " + ("writes other decimals with commas" if commas else
                                                "is read with decimal commas and writes no other decimals")
                         + "; if its '.' separates thousands, write the numbers without it")


def _split_row_names(frame: pd.DataFrame, out: list | None) -> pd.DataFrame:
    """The frame without its first (row-name) column; the column's values, as text, go to ``out``."""
    if out is not None:
        first = frame.iloc[:, 0]
        out.append(first.map(id_text).rename(None))  # the one rule of an id's text
    return frame.iloc[:, 1:]


def _offset_of_line(text: str, line: int) -> int:
    """Character offset of the start of 1-based ``line`` (lines end at LF, CR LF or CR)."""
    if line <= 1:
        return 0
    offset = 0
    for _ in range(line - 1):
        nl = min((i for i in (text.find("\n", offset), text.find("\r", offset)) if i >= 0), default=-1)
        if nl < 0:
            return len(text)
        offset = nl + (2 if text.startswith("\r\n", nl) else 1)
    return offset


def _first_shown(names: list[str], hidden: list[str]) -> str:
    """The sheet a workbook read without a sheet named gives: the first it shows (a hidden one is an old draft or a
    lookup table), else its first."""
    return next((n for n in names if n not in hidden), names[0])


def sheet_read(path: object, sheet: str | None) -> str:
    """The sheet a run reads of the data file ``path``: the one asked for, else the workbook's first shown sheet by
    the reader's own rule (:func:`_first_shown`); '' for a file that is no workbook or cannot be opened (its reading
    says why).  Halves files record the sheet they were drawn from by it (data.halves)."""
    if sheet:
        return sheet
    if not isinstance(path, (str, Path)) or Path(path).suffix.lower() not in EXCEL_SUFFIXES:
        return ""
    try:
        import openpyxl

        book = openpyxl.load_workbook(path, read_only=True)
        names = book.sheetnames
        hidden = [n for n in names if getattr(book[n], "sheet_state", "visible") != "visible"]
        return _first_shown(names, hidden)
    except Exception:  # noqa: BLE001 - openpyxl raises many kinds for damaged files; the reader names the problem
        return ""
