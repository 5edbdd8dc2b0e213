"""Model variables of a data frame -> sample moments, with every data problem named.

The covariance matrix uses divisor N (the maximum-likelihood estimate), as in
normal-theory ML fitting (Bollen 1989, ch. 4).
"""

from __future__ import annotations

import re
from collections.abc import Mapping, Sequence
from dataclasses import dataclass, field, replace
from functools import cached_property

import numpy as np
import pandas as pd

from cfa_tool.data.descriptives import AnswerExtremes, shared_extremes
from cfa_tool.data.answer_scales import (MOST_WORDS_SHOWN, distinct_words, end_points_statement, stray_text,
                                         suggested_statement)
from cfa_tool.data.kept_rows import ROW_NAMING, RowNaming, cell_words, row_naming, text_lines, too_few_rows
from cfa_tool.data.non_answers import given_codes
from cfa_tool.errors import DataError, EstimationError, clipped, printable
from cfa_tool.options import Option
from cfa_tool.method import MissingData
from cfa_tool.numbers import number as strict_number
from cfa_tool.numbers import count_text, counted, cut_list, rounded_number, user_number
from cfa_tool.numerics.linalg import KnownFactor, cholesky_log_det, sample_factor


@dataclass(frozen=True)
class SampleMoments:
    """The covariances and means of the rows analysed (one group), with how many were read and left out."""
    names: tuple[str, ...]
    covariance: np.ndarray
    means: np.ndarray
    n_obs: int
    rows_read: int
    rows_dropped: int
    source: str
    group: str | None = None  # 'label of column' for one group of a multi-group data set
    rows: np.ndarray | None = field(default=None, repr=False, compare=False)  # the complete rows analysed
    row_numbers: np.ndarray | None = field(default=None, repr=False, compare=False)  # their row numbers in the file
    design: object | None = field(default=None, repr=False, compare=False)  # data.sample_design.RowDesign of the rows
    #: what summary statistics left out (data.summary_stats.NotGiven): the fit then knows no item means or no units
    not_given: tuple = field(default=(), compare=False)
    #: summary statistics: which matrix was given (data.summary_stats.AnalysedMatrix); None for rows of answers
    analysed: object | None = field(default=None, compare=False)
    #: the row numbers of the rows left out because they answer no model variable (rows with gaps kept)
    unanswered_rows: np.ndarray | None = field(default=None, repr=False, compare=False)
    #: their ids (data.row_ids: an id column or the file's row names; None where a row has none), when known
    unanswered_ids: tuple = field(default=(), repr=False, compare=False)
    #: how the row numbers above name rows (data.kept_rows.RowNaming: a file's rows, a data frame's index labels)
    row_naming: RowNaming = field(default=RowNaming.FILE_ROW, repr=False, compare=False)
    #: the text lines of a text file's rows that start on a line of another number (data.kept_rows.text_lines)
    text_lines: Mapping[int, int] = field(default_factory=dict, repr=False, compare=False)
    #: the covariance matrix's Cholesky factor and log-determinant, made by the checks of the moments, as (covariance,
    #: factor, log|covariance|): the likelihood reads it for this very matrix (numerics.linalg.sample_factor_of)
    factor: KnownFactor | None = field(default=None, repr=False, compare=False)
    #: each item's lowest and highest answer (data.descriptives.AnswerExtremes) of the array they were made of, read
    #: by the data summary when :attr:`rows` is that very array (every row of the frame's items kept)
    extremes: AnswerExtremes | None = field(default=None, repr=False, compare=False)


def numeric_columns(frame: pd.DataFrame, names: tuple[str, ...], source: str) -> np.ndarray:
    """The named columns as a float array; anything that is not a number is an error naming the
    column and the cell: text, TRUE/FALSE, dates and times, complex numbers, and numbers too
    large for double precision."""
    values = item_values(frame, names)
    if values is not None:  # already numbers
        return values
    selected = [frame[name] for name in names]
    stray_words(names, selected, source)
    columns = []
    for name, column in zip(names, selected):
        kind = column.dtype.kind
        if kind in "iuf":
            columns.append(column.to_numpy(dtype=float, na_value=np.nan))
            continue
        if kind == "b" or str(column.dtype) == "boolean":
            raise DataError(f"{source}: column '{printable(name)}' holds TRUE/FALSE values; indicators must be numbers "
                            f"(code the answers as 0 and 1 if that is what they mean)")
        if kind in "mM" or isinstance(column.dtype, pd.DatetimeTZDtype):
            raise DataError(f"{source}: column '{printable(name)}' holds dates or times; indicators must be numbers")
        if kind == "c":
            raise DataError(f"{source}: column '{printable(name)}' holds complex numbers; indicators must be real numbers")
        columns.append(_object_column(column, name, source))
    return _positive_zero(np.column_stack(columns)) if columns else np.zeros((len(frame), 0))


def _positive_zero(values: np.ndarray) -> np.ndarray:
    """``values`` (a fresh array) with every negative zero made 0: a cell '-0' or '-0.0' is the answer 0, and a
    category code or any number shown from it must not read "-0"."""
    values[values == 0] = 0.0
    return values


def item_values(frame: pd.DataFrame, names: tuple[str, ...] | list[str]) -> np.ndarray | None:
    """The named columns as one float array (NaN where an answer is missing) when every one holds numbers (integer
    or float, numpy or nullable): what :func:`numeric_columns` returns for them, taken out of the frame once so that
    the screening, the missing-data handling and the moments share it.  None when a column is missing or holds
    anything else (the readers of the frame then name the column or the cell)."""
    if not frame.columns.is_unique:  # a name held by two columns selects a frame, not a column
        return _values_one_by_one(frame, names)
    try:
        where = [frame.columns.get_loc(name) for name in names]
    except (KeyError, TypeError):
        return None
    arrays = _stored_columns(frame, where)
    if not all(a.dtype.kind in "iuf" for a in arrays):
        return None
    if all(isinstance(a, np.ndarray) for a in arrays):  # numpy columns: copied straight into one array
        # column by column in memory (Fortran order): the screening, the moments and the items' shapes reduce
        # over the rows of each column, several times faster along contiguous columns
        values = np.empty((len(frame), len(arrays)), order="F")
        for j, array in enumerate(arrays):
            values[:, j] = array
        return _positive_zero(values)
    return _positive_zero(_copied([frame.iloc[:, j] for j in where], len(frame)))


def _stored_columns(frame: pd.DataFrame, where: list[int]) -> list:
    """The arrays the frame holds for the columns at positions ``where`` (numpy arrays or pandas extension arrays),
    read only: without the Series (or the sub-frame and its reindexing) that a selection builds, which cost more than
    the copy itself on the data of a questionnaire.  pandas' accessor of a column's stored values is not public, so
    a pandas without it gets each column's ``array`` through the public selection."""
    stored = getattr(frame, "_get_column_array", None)
    if stored is None:
        return [_public_array(frame.iloc[:, j]) for j in where]
    return [stored(j) for j in where]


def column_dtypes(frame: pd.DataFrame) -> list:
    """The dtype of every column of ``frame``, in order: read from the frame's store of columns, without the Series of
    dtypes that ``frame.dtypes`` builds and checks (which cost more than a small fit's data checks; the store is not
    public, so a pandas without it gets ``frame.dtypes``)."""
    try:
        return list(frame._mgr.get_dtypes())
    except AttributeError:
        return frame.dtypes.tolist()


def stored_column(frame: pd.DataFrame, position: int):
    """The array the frame holds for its column at ``position`` (read only; see :func:`_stored_columns`)."""
    return _stored_columns(frame, [position])[0]


def _public_array(column: pd.Series):
    return column.to_numpy() if isinstance(column.dtype, np.dtype) else column.array


def _values_one_by_one(frame: pd.DataFrame, names) -> np.ndarray | None:
    """:func:`item_values` of a frame whose column names are not all unique."""
    try:
        selected = [frame[name] for name in names]
    except KeyError:
        return None
    if not all(isinstance(c, pd.Series) and c.dtype.kind in "iuf" for c in selected):
        return None
    return _positive_zero(_copied(selected, len(frame)))


@dataclass(frozen=True, eq=False)
class ItemColumns:
    """The item columns ``names`` of one data frame as one float array (:func:`item_values`; None when a column holds
    anything but numbers), taken out once per fit and shared by its readers of that frame."""

    frame: pd.DataFrame = field(repr=False)
    names: tuple[str, ...]
    values: np.ndarray | None = field(repr=False)

    def of(self, frame: pd.DataFrame, names: tuple[str, ...] | list[str]) -> np.ndarray | None:
        """The array when it holds exactly ``names`` of this very ``frame`` (else None: take them out again)."""
        return self.values if frame is self.frame and tuple(names) == self.names else None

    @cached_property
    def extremes(self) -> AnswerExtremes | None:
        """Each item's lowest and highest answer in :attr:`values` (data.descriptives.shared_extremes), made on first
        use and read by the screening for values that are not answers, the few-categories note and the data summary
        (each reader checks that its array is this one)."""
        return shared_extremes(self.values)


def _copied(columns: list[pd.Series], rows: int) -> np.ndarray:
    out = np.empty((rows, len(columns)), order="F")  # column by column, as item_values lays them out
    for j, column in enumerate(columns):
        # numpy columns copy straight in; nullable (extension) columns turn their missing marker into NaN
        out[:, j] = column.to_numpy() if isinstance(column.dtype, np.dtype) else column.to_numpy(dtype=float, na_value=np.nan)
    return out


#: the different words a message about text among numbers names before 'and N more'
STRAY_WORDS_SHOWN = 5


def stray_words(names: Sequence[str], columns: list[pd.Series], source: str) -> None:
    """Text cells among numbers (data.answer_scales.stray_text: not answers recorded as words) in several
    cells of the columns ``names``: one error counting them and naming each different word with its cells and the
    first cell, rather than the first cell alone (new-user trial s13, U4: 'Ne sait pas' in 11 cells of 9 items, of
    which one was named), with the --missing-codes that reads them as no answer; also where they are more than a slip
    leaves in a column, though no more than a tenth of its numbers (s26: 'Weiß nicht' in 5 of 300 cells was told to
    recode the column as numbers, without the option).  One such cell is left to :func:`_object_column`'s message."""
    found: dict[str, int] = {}
    columns_with: list[str] = []
    first = None
    for name, column in zip(names, columns):
        if column.dtype.kind in "iufbcmM":
            continue
        values = column.to_numpy(dtype=object)
        if not stray_text(values, few=False):
            continue
        if not stray_text(values) and end_points_statement(values, distinct_words(values)) is not None:
            continue  # more than a slip's words at the two ends of a run of numbers label the scale's ends: the
            # column's own message gives the 'answers' statement (answer_scales.end_points_statement), no missing codes
        cells = [k for k, v in enumerate(values) if isinstance(v, str) and v.strip()
                 and strict_number(v.strip()) is None and v.strip().lower() not in ("true", "false")]
        if not cells:
            continue
        columns_with.append(str(name))
        for k in cells:
            found[values[k].strip()] = found.get(values[k].strip(), 0) + 1
        if first is None:
            first = (name, column, cells[0], values[cells[0]].strip())
    total = sum(found.values())
    if total < 2 or first is None:
        return
    name, column, k, text = first
    words = sorted(found.items(), key=lambda item: (-item[1], item[0]))
    listed = cut_list(words, STRAY_WORDS_SHOWN, lambda w: f"'{clipped(w[0], 40)}' ({counted(w[1], 'cell')})")
    shown = cut_list(columns_with, STRAY_WORDS_SHOWN, lambda c: f"'{printable(c)}'")
    where = cell_words(column, name, row_numbers(column)[k])
    raise DataError(f"{source}: {total} cells of {len(columns_with)} column{'s' if len(columns_with) != 1 else ''} "
                    f"({shown}) hold text among numbers: {listed}; the first is '{clipped(text, 40)}' in "
                    f"column '{printable(name)}', {where}. Correct those cells, or, if "
                    f"{'the word means' if len(words) == 1 else 'the words mean'} no answer, "
                    + _no_answer_advice([w for w, _ in words], given_codes(columns[0])))


def stray_word_message(source: str, name: str, shown: str, where: str, word: str, given: tuple = (),
                       values=None) -> str:
    """The one message of a word typed among a column's numbers (a slip, data.answer_scales.stray_text): which
    cell, and the two ways on (correct it, or read the word as no answer), for every command (re-read s14: explore
    said 'leave it empty' where fit gave the option); ``given``: the codes and words of no answer the run gave
    already, which the advice keeps (data.non_answers.codes_given); ``values``: the column's cells, whose other cells
    of text it counts, so that the advice names the cells it means (s26: 'correct the cell' of several)."""
    others = text_cells(values) - 1 if values is not None else 0
    more = f", and in {counted(others, 'other cell')}" if others > 0 else ""
    return (f"{source}: column '{printable(name)}' holds text ('{shown}' in {where}{more}) among numbers; "
            f"{'correct the cell' if others <= 0 else 'correct those cells'}, or, if the word means no answer, "
            + _no_answer_advice([word], given))


_DECIMAL_COMMA = re.compile(r"[-+]?\d*,\d+")
_WHOLE = re.compile(r"[-+]?\d+")
_THOUSANDS = re.compile(r"[-+]?[1-9]\d{0,2},\d{3}")


def decimal_commas(values) -> str:
    """'a decimal comma' when every cell of ``values`` that holds a fraction writes it with a comma ('0,024'; the
    others empty or whole numbers), as a comma-separated file of a decimal-comma locale quotes them; 'a comma (a decimal
    comma, or a comma between thousands)' when each could separate thousands ('1,234', not '0,024'); '' otherwise."""
    commas = []
    for v in values:
        if v is None or (isinstance(v, float) and v != v):
            continue
        if isinstance(v, (int, np.integer)) or (isinstance(v, (float, np.floating)) and float(v).is_integer()):
            continue
        text = str(v).strip() if isinstance(v, str) else None
        if text is None:
            return ""
        if not text or _WHOLE.fullmatch(text):
            continue
        if not _DECIMAL_COMMA.fullmatch(text):
            return ""
        commas.append(text)
    if not commas:
        return ""
    if all(_THOUSANDS.fullmatch(c) for c in commas):  # '0,024' is no thousands
        return "a comma (a decimal comma, or a comma between thousands)"
    return "a decimal comma"


def text_cells(values) -> int:
    """The cells of ``values`` that hold text that is not a number (spaces alone are an empty cell)."""
    return sum(1 for v in values if isinstance(v, str) and v.strip() and strict_number(v.strip()) is None)


def _no_answer_advice(words: list[str], given: tuple = ()) -> str:
    """How to read words among numbers as no answer: give them with --missing-codes on the command line, with
    missing_codes= in Python, after the codes and words the run gave already (``given``, data.non_answers.codes_given)."""
    from cfa_tool.data.non_answers import codes_given

    return f"give {'it' if len(words) == 1 else 'them'} with {codes_given(tuple(given) + tuple(words[:STRAY_WORDS_SHOWN]))}"


def _object_column(column: pd.Series, name: str, source: str) -> np.ndarray:
    """A column of mixed Python objects (text, numbers, missing values) as floats, cell by cell
    when needed, so that each kind of bad cell gets its own message."""
    values = column.to_numpy(dtype=object)
    out = np.full(len(values), np.nan)
    numbers = row_numbers(column)  # the file's row numbers, also after row filters
    for row, value in enumerate(values):
        if value is None or value is pd.NA or value is pd.NaT or (isinstance(value, float) and value != value):
            continue
        where = f"{source}: column '{printable(name)}', {cell_words(column, name, numbers[row])}"
        if isinstance(value, (bool, np.bool_)):
            raise DataError(f"{where}: holds TRUE/FALSE values; indicators must be numbers")
        if isinstance(value, (complex, np.complexfloating)):
            raise DataError(f"{where}: holds a complex number; indicators must be real numbers")
        if isinstance(value, (np.datetime64, np.timedelta64)) or hasattr(value, "isoformat"):
            raise DataError(f"{where}: holds a date or time; indicators must be numbers")
        if isinstance(value, (int, float, np.integer, np.floating)):
            try:
                out[row] = float(value)
            except OverflowError:
                raise DataError(f"{where}: the number is too large to compute with") from None
            continue
        text = str(value).strip()
        if not text:  # a cell of spaces is an empty cell, as in a CSV file
            continue
        number = strict_number(text)
        if number is None:
            if text.lower() in ("true", "false"):
                raise DataError(f"{where}: holds TRUE/FALSE values; indicators must be numbers")
            shown = clipped(text, 40)
            commas = decimal_commas(values)
            if commas:  # every number of the column written with a decimal comma (hostile tester s28, 08)
                raise DataError(f"{source}: column '{printable(name)}' holds numbers written with {commas} ('{shown}' in "
                                f"{cell_words(column, name, numbers[row])}, and so in every cell of the column that "
                                f"holds a fraction), which were read as text; write the decimals with points, or save "
                                f"the file as CSV with semicolons between the fields, which is read with decimal "
                                f"commas")
            if stray_text(values):  # a slip among numbers, not a column of words
                raise DataError(stray_word_message(source, name, shown, cell_words(column, name, numbers[row]), text,
                                                   given_codes(column), values))
            raise DataError(f"{source}: column '{printable(name)}' is used as an indicator but holds text ('{shown}' in "
                            f"{cell_words(column, name, numbers[row])}); indicators must be numbers: {_recoding(text)}"
                            + _statement_hint(values))
        out[row] = number
    return out




def _statement_hint(values: np.ndarray) -> str:
    """The 'answers' statement that would code a column of one common scale's words (a suggestion only)."""
    statement = suggested_statement(values)
    if statement is not None:
        return (f"; or, if these are the answers of one scale in this order, say what each word means with a line in "
                f"the model file: {statement}")
    words = distinct_words(values)
    if not 2 <= len(words) <= MOST_WORDS_SHOWN:
        return ""
    return (f"; or, if the column's words ({', '.join(repr(printable(w)) for w in words)}) are the answers of one "
            f"scale, code each with an 'answers' statement in the model file, from the lowest answer up: "
            f"answers \"...\" = 1, \"...\" = 2, and so on (the tool never orders words by itself)")


#: an answer written as its code and its label: '5 - strongly agree', '2: rarely', '1) never'
_CODE_AND_LABEL = re.compile(r"\s*([-+]?\d+)\s*[-\u2013\u2014:=.)]\s*\D.*", re.DOTALL)


def _recoding(text: str) -> str:
    """How to turn a text answer into the number an indicator needs."""
    coded = _CODE_AND_LABEL.fullmatch(text)
    if coded:
        return (f"keep only the number before each label (here {coded.group(1)}) in every cell of the column, or "
                f"export the answers' values rather than their labels")
    if any(ch.isdigit() for ch in text):  # a number mistyped, most likely
        return "correct the cell, or leave it empty for no answer"
    return ("recode the answers as numbers (such as 1 for the lowest to 5 for the highest) in every cell of the column, "
            "or export the answers' values rather than their labels; leave a cell empty for no answer")


#: Numbers beyond these magnitudes cannot be analysed in double precision (their squares and
#: products overflow or lose all precision); a column of them is to be rescaled first.
LARGEST_VALUE = 1e100
SMALLEST_SPREAD = 1e-100
LARGEST_SPREAD_RATIO = 1e15  # between the largest and smallest standard deviation of the model's columns


def _numeric_rows(frame: pd.DataFrame, names: tuple[str, ...], source: str, values: np.ndarray | None = None,
                  part: str = "") -> np.ndarray:
    """The named columns as floats (``values``: their :func:`item_values`, when already taken out), checked.
    ``part``: words after 'the N rows' saying which part of the file ``frame`` is (' of this group')."""
    return _checked_rows(frame, names, source, values, part)[0]


def _checked_rows(frame: pd.DataFrame, names: tuple[str, ...], source: str,
                  values: np.ndarray | None, part: str = "") -> tuple[np.ndarray, bool]:
    """:func:`_numeric_rows` and whether every cell holds a number (no gaps)."""
    if values is None:
        values = numeric_columns(frame, names, source)
    finite = bool(np.isfinite(values).all())
    if not finite:
        infinite = np.isinf(values)
        if infinite.any():
            row, col = np.argwhere(infinite)[0]
            raise DataError(f"{source}: column '{printable(names[col])}' has an infinite value in "
                            f"{cell_words(frame, names[col], row_numbers(frame)[row])}")
        empty = np.flatnonzero(np.isnan(values).all(axis=0))
        from cfa_tool.data.kept_rows import KEPT_BY, rows_described

        if len(empty) == len(names) and len(names) > 1 and not part and frame.attrs.get(KEPT_BY):
            raise DataError(f"{source}: none of {rows_described(frame)} answers any of the model's {len(names)} "
                            f"variables (every cell of those rows is empty); keep other rows")
        if len(empty) == len(names) and len(names) > 1:
            raise DataError(f"{source}: no row answers any of the model's {len(names)} variables (every cell is empty); "
                            f"check the data file, or leave these rows out ({Option.KEEP})")
        if len(empty):
            listed = cut_list(empty, 5, lambda j: f"'{printable(names[j])}'")
            verb = 'have' if len(empty) > 1 else 'has'
            if part or frame.attrs.get(KEPT_BY):  # a part of the file: its other rows may well answer the item
                raise DataError(f"{source}: column{'s' if len(empty) > 1 else ''} {listed} {verb} no answers in "
                                f"{rows_described(frame)}{part} (every cell of those rows is empty); take the "
                                f"{'items' if len(empty) > 1 else 'item'} out of the model, or analyse rows that answer "
                                f"{'them' if len(empty) > 1 else 'it'}")
            raise DataError(f"{source}: column{'s' if len(empty) > 1 else ''} {listed} "
                            f"{verb} no answers at all (every cell is empty); "
                            f"check the data file, or take the item out of the model")
    with np.errstate(invalid="ignore"):
        if not len(values):
            largest = np.zeros(values.shape[1])
        elif finite:  # without gaps the plain extremes (no array of absolute values; nanmax copies the array)
            largest = np.maximum(values.max(axis=0), -values.min(axis=0))
        else:
            largest = np.nanmax(np.abs(values), axis=0)
    if (largest > LARGEST_VALUE).any():
        col = int(np.flatnonzero(largest > LARGEST_VALUE)[0])
        row = int(np.nanargmax(np.abs(values[:, col])))
        raise DataError(f"{source}: column '{printable(names[col])}' holds {user_number(values[row, col])} "
                        f"({cell_words(frame, names[col], row_numbers(frame)[row])}), too "
                        f"large to compute with; if the value is right, divide the column by a power of ten (the fit does "
                        f"not change), otherwise correct it")
    return values, finite


def _check_moments(cov: np.ndarray, means: np.ndarray, names: tuple[str, ...], source: str) -> KnownFactor | None:
    """Constant columns and exactly collinear columns are errors that name the columns.  Returns the covariance
    matrix's :func:`~cfa_tool.numerics.linalg.sample_factor` as (cov, lower factor, log|cov|), which the check of
    combinations reads and the likelihood reuses, or None where it has none."""
    sds = np.sqrt(np.maximum(cov.diagonal(), 0.0))
    constant = np.flatnonzero((sds == 0) | (sds <= 1e-13 * np.abs(means)))
    if len(constant):
        j = constant[0]
        raise DataError(f"{source}: column '{printable(names[j])}' has the same value ({rounded_number(means[j], 12)}) in every row used, so "
                        f"it carries no information")
    tiny = np.flatnonzero(sds < SMALLEST_SPREAD)
    if len(tiny):
        j = tiny[0]
        raise DataError(f"{source}: the values of column '{printable(names[j])}' differ by no more than about {rounded_number(sds[j], 1)}, "
                        f"too little to compute with; multiply the column by a power of ten (the fit does not change)")
    if sds.max() > LARGEST_SPREAD_RATIO * sds.min():
        hi, lo = int(np.argmax(sds)), int(np.argmin(sds))
        raise DataError(f"{source}: the standard deviations of the columns differ by a factor of {rounded_number(sds[hi] / sds[lo], 1)} "
                        f"('{printable(names[hi])}' {rounded_number(sds[hi])}, '{printable(names[lo])}' {rounded_number(sds[lo])}), too much to "
                        f"compute with accurately; put the items on comparable scales by multiplying or dividing columns "
                        f"by powers of ten (the fit does not change)")
    found = sample_factor(cov)
    # the correlations' factor is the covariances' with each row divided by its item's SD: chol(D^-1 S D^-1) = D^-1 L
    if found is None or (found[0].diagonal() / sds).min() ** 2 <= 1e-8:
        _check_combinations(cov / np.outer(sds, sds), names, source)
    return None if found is None else (cov, *found)


def _check_combinations(corr: np.ndarray, names: tuple[str, ...], source: str, among: str = "",
                        cause: str = "") -> None:
    """Columns that are exact linear combinations of each other (a singular correlation matrix ``corr``) are an error
    that names them; ``among`` says which rows the matrix is of, when not all; ``cause``, when given, the likelier
    cause and what to try, instead of an exact combination of items ('one is the sum of others')."""
    # a column that is an exact combination of earlier ones has (next to) no variance left given them: the squared
    # diagonal of the Cholesky factor of the correlations (:func:`_check_moments` reads the covariances' factor so)
    found = cholesky_log_det(corr)
    if found is not None and found[0].diagonal().min() ** 2 > 1e-8:
        return
    vals, vecs = np.linalg.eigh(corr)
    if vals[0] < -1e-8:
        raise DataError(
            f"{source}: the matrix is not positive semi-definite (smallest eigenvalue of the correlations {rounded_number(vals[0])}), so "
            f"it cannot be the covariance matrix of one set of complete rows; check the values for typing errors (a matrix "
            f"computed from pairwise-complete rows can have this problem too)")
    if vals[0] < 1e-10:
        weights = np.abs(vecs[:, 0])
        involved = [names[j] for j in np.argsort(-weights) if weights[j] > 0.1]
        raise DataError(
            f"{source}: the covariance matrix is singular: the columns {', '.join(repr(v) for v in involved)} are exact linear "
            f"combinations of each other{among}" + (cause or " (for example one is the sum of others); drop one of them")
        )


def file_rows_index(numbers: Sequence[int] | np.ndarray) -> pd.Index:
    """The index a reader gives the rows it read: each row's number in the file as a spreadsheet shows it (a sheet's
    row, a text file's record: one row per record however many text lines its quoted cells span, data.readers.
    TextRows; an SPSS or Stata case) less one, so that :func:`row_numbers` (index + 1, as for a data frame's own
    0-based rows) names every row as the file shows it, blank rows and header rows counted."""
    return pd.Index(np.asarray(numbers, dtype=np.int64) - 1)


def row_numbers(frame: pd.DataFrame | pd.Series) -> np.ndarray:
    """The numbers messages name rows by: a data frame's index labels when its rows are named by them
    (data.kept_rows.named_by_index_label), else 1-based row numbers: the index + 1 when it counts rows (a file's rows,
    whose reader set it by :func:`file_rows_index`, also after row filters), else positions."""
    index = frame.index
    if frame.attrs.get(ROW_NAMING) is RowNaming.INDEX_LABEL and index.dtype.kind in "iu":  # labels of whole numbers
        return np.asarray(index, dtype=np.int64)
    if isinstance(index, pd.RangeIndex) and index.start >= 0 and index.step == 1:  # the common case, without type checks
        return np.arange(index.start + 1, index.stop + 1)
    if pd.api.types.is_integer_dtype(index) and index.is_unique and len(index) and index.min() >= 0:
        return np.asarray(index, dtype=int) + 1
    return np.arange(1, len(frame) + 1)


def sample_moments(frame: pd.DataFrame, names: tuple[str, ...], source: str, group: str | None = None,
                   missing: MissingData | str = MissingData.LISTWISE, weights: str | None = None,
                   values: np.ndarray | None = None, extremes: AnswerExtremes | None = None) -> SampleMoments:
    """Moments of the model variables: of the complete rows (listwise deletion), or, with
    ``missing='full-information'``, the EM estimates from every row with at least one answer
    (the rows themselves are kept for the casewise likelihood).  ``weights``: a column of row
    weights (checked beforehand, see cfa_tool.data.sample_design): weighted means and covariance,
    divisor the sum of the weights.  ``values``: the columns' :func:`item_values` when already taken out of
    ``frame``; ``extremes``: their answers' extremes (:attr:`ItemColumns.extremes`), kept for the data summary."""
    file_source = source
    if group is not None:
        source = f"{source} (group {group})"
    values, finite = _checked_rows(frame, names, source, values, "" if group is None else " of this group")
    w = pd.to_numeric(frame[weights]).to_numpy(dtype=float) if weights is not None else None
    p = values.shape[1]
    if missing == MissingData.FULL_INFORMATION:  # the member or its word
        found = _incomplete_moments(values, names, source, file_source, group, len(frame), w, row_numbers(frame),
                                    row_naming(frame), extremes, frame)
        return replace(found, text_lines=text_lines(frame)) if text_lines(frame) else found
    complete = None if finite else ~np.isnan(values).any(axis=1)  # checked finite: every row is complete
    every_row = complete is None or bool(complete.all())
    data = values if every_row else values[complete]
    n = len(data)
    if n == 0:
        raise DataError(f"{source}: no row has answers on all {p} model variables, so nothing is left to analyse")
    if n <= p:
        raise DataError(f"{source}: " + too_few_rows(frame, n, p, "every model variable", "variable",
                                                     f"the covariance matrix needs more rows than variables ({p + 1} "
                                                     f"or more, and a factor analysis far more)"))
    if w is None:
        means = data.mean(axis=0)
        centred = data - means
        cov = centred.T @ centred / n
    else:
        w = w if every_row else w[complete]
        means = w @ data / w.sum()
        centred = data - means
        cov = (centred * w[:, None]).T @ centred / w.sum()
    factor = _check_moments(cov, means, names, source)
    numbers = row_numbers(frame) if every_row else row_numbers(frame)[complete]
    # of the rows left out, those that answered nothing, which full-information ML would leave out too
    unanswered = None if every_row else row_numbers(frame)[np.isnan(values).all(axis=1)]
    return SampleMoments(tuple(names), cov, means, n, len(frame), len(frame) - n, file_source, group, data, numbers,
                         row_naming=row_naming(frame), text_lines=text_lines(frame), factor=factor, extremes=extremes,
                         unanswered_rows=unanswered)


def moments_with_gaps(values: np.ndarray, names: tuple[str, ...], source: str,
                      weights: np.ndarray | None = None) -> SampleMoments:
    """The saturated (EM) moments of rows with gaps, every one answering some item (a resample or a simulated
    sample with the data's gaps), keeping the rows for the casewise likelihood; a :class:`DataError` where they
    cannot be estimated (an item with fewer than two answers, a pair that no row answers)."""
    return _incomplete_moments(values, tuple(names), source, source, None, len(values), weights)


#: the fewest answers an item needs in a sample or group analysed by full-information ML whatever the model's size:
#: its intercept, loading and residual variance there rest on its answers, and two answers fit the intercept and
#: loading exactly, leaving nothing for the residual variance (the information matrix is singular: hostile trial s16,
#: case 12); :func:`fewest_answers` raises it to one more than the variables analysed
MIN_ANSWERS = 3


def fewest_answers(variables: int) -> int:
    """The fewest answers of an item that full-information ML accepts in a sample or group of ``variables`` variables
    analysed: more than the variables, and at least :data:`MIN_ANSWERS`.  The saturated model, which the chi-square
    compares the model with, holds the item's distribution given the other ``variables - 1``; it rests on the rows
    that answer the item alone, and when they answer the others a regression on ``variables - 1`` items with an
    intercept fits ``variables`` or fewer answers exactly (answers in general position), so the item's residual
    variance given the others goes to zero and the likelihood has no maximum (the factored likelihood of Little &
    Rubin 2002, ch. 7: the others' part and the item's regression on them; recalled from memory).  The EM iterations
    may still stop at a point that is no maximum (re-check s17, N1: 3 answers of a group's 'clean' under the
    12-item model gave a fit, reported as if it were one; 3 of a four-item group an identification failure naming
    other parameters)."""
    return max(MIN_ANSWERS, variables + 1)


class TooFewAnswers(DataError):
    """The refusal of an item answered fewer than :func:`fewest_answers` times (:func:`too_few_answers` its words),
    holding the item (``item``), its answers (``answers``) and the variables analysed (``variables``), so that a
    check can report it among its findings instead of stopping."""

    def __init__(self, message: str, item: str, answers: int, variables: int):
        super().__init__(message)
        self.item, self.answers, self.variables = item, answers, variables


def too_few_answers(name: str, answers: int, source: str, group: str | None = None,
                    numbers: np.ndarray | None = None, naming: RowNaming = RowNaming.FILE_ROW,
                    variables: int = MIN_ANSWERS - 1) -> str:
    """The one-line refusal of an item answered fewer than :func:`fewest_answers` times in a sample or group of
    ``variables`` variables analysed (``group``: its words, '\'south\' of district', with ``source`` naming it
    already), naming the item, its answers and their rows (``numbers``)."""
    from cfa_tool.data.kept_rows import rows_listed

    said = "no answer" if not answers else f"only {answers} answer{'s' if answers != 1 else ''}"
    rows = f" ({rows_listed(numbers, naming=naming)})" if answers and numbers is not None else ""
    where = " in this group" if group is not None else ""
    remedy = (f"take the item out of the model, leave this group out with a row filter ({Option.KEEP}), or join it "
              f"with another group by recoding the group column" if group is not None
              else "take the item out of the model, or analyse rows that answer it")
    fewest = fewest_answers(variables)
    if fewest == MIN_ANSWERS:
        why = ("to estimate its intercept, loading and residual variance there (two answers fit the intercept and "
               "loading exactly and leave nothing for the residual variance)")
    else:
        why = (f", more than the {variables} variables analysed: with fewer, a regression of the item on the other "
               f"{variables - 1} can fit its answers exactly, and the likelihood of the saturated model, which the "
               f"chi-square compares the model with, has no maximum")
    return (f"{source}: '{printable(name)}' has {said}{where}{rows}; full-information ML needs at least "
            f"{fewest} answers of an item{where}{'' if why.startswith(',') else ' '}{why}: {remedy}")


def _incomplete_moments(values: np.ndarray, names, source: str, file_source: str, group, rows_read: int,
                        weights: np.ndarray | None = None, numbers: np.ndarray | None = None,
                        naming: RowNaming = RowNaming.FILE_ROW, extremes: AnswerExtremes | None = None,
                        frame: pd.DataFrame | None = None) -> SampleMoments:
    from cfa_tool.data.em import SingularCovariance, em_saturated
    from cfa_tool.data.patterns import pattern_data

    answered = ~np.isnan(values).all(axis=1)
    data = values[answered]
    n, p = data.shape
    if n <= p:
        raise DataError(f"{source}: " + too_few_rows(frame, n, p, "some model variable", "variable",
                                                     f"the analysis needs more rows than variables ({p + 1} or more)"))
    counts = (~np.isnan(data)).sum(axis=0)
    for j, c in enumerate(counts):
        if c < fewest_answers(p):
            raise TooFewAnswers(too_few_answers(names[j], int(c), source, group,
                                                None if numbers is None else numbers[answered][~np.isnan(data[:, j])],
                                                naming, p), names[j], int(c), p)
    observed = ~np.isnan(data)
    together = observed.astype(float).T @ observed.astype(float)
    i, j = np.unravel_index(np.argmin(together), together.shape)
    if together[i, j] == 0:
        raise DataError(f"{source}: no row answers both '{names[i]}' and '{names[j]}', so their covariance cannot be estimated")
    # constant columns (and spreads too small or too unequal) among the answers given, named as complete rows do
    _check_moments(np.diag(np.nanvar(data, axis=0)), np.nanmean(data, axis=0), names, source)
    # items that are exact combinations of others in the complete rows: the same message as the complete-rows path
    # gives (the saturated model's likelihood then grows without bound, and its failure would blame the gaps)
    whole = data[observed.all(axis=1)]
    if len(whole) > p:
        spread = whole.std(axis=0)
        if spread.min() > 0:
            _check_combinations(np.corrcoef(whole, rowvar=False), names, source,
                                f" in the {count_text(len(whole))} rows that answer all {p} items",
                                _few_rows_cause(counts, names, n, group))
    try:
        mu, sigma, _ = em_saturated(pattern_data(data, weights[answered] if weights is not None else None))
    except SingularCovariance as singular:  # a constant item or an exact combination: name them as complete rows do
        _check_moments(singular.sigma, singular.mu, names, source)
        raise DataError(f"{source}: {singular}: an item is constant or an exact combination of others among the answers "
                        f"given") from None
    except EstimationError as error:
        complete = int(observed.all(axis=1).sum())
        sparse = pairs_answered_together(observed, names)
        if sparse:  # the likely cause: a pair's covariance from a few rows (hostile trial s16, case 06)
            a, b, both = sparse[0]
            i, j = list(names).index(a), list(names).index(b)
            if numbers is not None and both:
                from cfa_tool.data.kept_rows import rows_listed

                both = f"{count_text(both)} ({rows_listed(numbers[answered][observed[:, i] & observed[:, j]], naming=naming)})"
            else:
                both = count_text(both)
            more = f" ({len(sparse) - 1} more such pair{'s' if len(sparse) > 2 else ''})" if len(sparse) > 1 else ""
            raise EstimationError(
                f"{source}: {error}; only {both} of its {count_text(n)} rows answer both '{printable(a)}' and '{printable(b)}'"
                f"{more}, so their covariance rests on those rows (fewer than a tenth of the rows: a rule of thumb of "
                f"this project). What to try: take one of the two items out of the model, or analyse rows that "
                f"answer both") from None
        remedy = (f"leave this group out with a row filter ({Option.KEEP}), join it with another group by recoding the group "
                  "column, or analyse fewer items" if group is not None
                  else "analyse fewer items, or gather rows that answer more of them")
        raise EstimationError(f"{source}: {error}; {count_text(complete)} of its {count_text(n)} rows answer all {p} items. What to try: "
                              f"{remedy}") from None
    _check_moments(sigma, mu, names, source)
    # the rows left out answer nothing, so the answers' extremes of the rows kept are those of ``values``
    kept = (AnswerExtremes(data, extremes.low, extremes.high)
            if extremes is not None and extremes.for_values(values) is not None else None)
    return SampleMoments(tuple(names), sigma, mu, n, rows_read, rows_read - n, file_source, group, data,
                         numbers[answered] if numbers is not None else None,
                         unanswered_rows=numbers[~answered] if numbers is not None else None, row_naming=naming,
                         extremes=kept)


def _few_rows_cause(counts: np.ndarray, names, rows: int, group) -> str:
    """Why the rows that answer every item can be exact combinations of each other by chance: the least answered
    item (``counts``: each item's answers among the ``rows`` analysed) answered by fewer than
    :data:`FEW_TOGETHER_SHARE` of them leaves few such rows, whose few distinct answers line up easily (re-check
    s17, N1: 5 of a group's 230 rows answered an item, and the refusal read as if items were sums of others); ''
    otherwise."""
    j = int(np.argmin(counts))
    if counts[j] >= FEW_TOGETHER_SHARE * rows:
        return ""
    where = " in this group" if group is not None else ""
    leave = (f", leave this group out with a row filter ({Option.KEEP})" if group is not None else "")
    return (f", which so few rows can be by chance: only {int(counts[j])} of the {rows:,} rows{where} answer "
            f"'{printable(names[j])}' (fewer than a tenth: a rule of thumb of this project). What to try: take "
            f"'{printable(names[j])}' out of the model{leave}, or analyse rows that answer it")


#: a pair of items answered together by fewer than this share of the rows analysed has its correlation (with
#: full-information ML its covariance) resting on those rows alone: the share below which an item's answers are
#: called few (pipeline.inputs.FEW_ANSWERS_SHARE), held to pairs, a rule of thumb of this project, not a published
#: cutoff (a correlation from 3 rows of 471 could be anything from -1 to 1)
FEW_TOGETHER_SHARE = 0.10


def pairs_answered_together(answered: np.ndarray, names: Sequence[str], share: float = FEW_TOGETHER_SHARE,
                            skip: Sequence[str] = ()) -> list[tuple[str, str, int]]:
    """The pairs of items that fewer than ``share`` of the rows (``answered``: rows x items, True where answered)
    answer together, each as (item, item, rows answering both), fewest first, in the items' order among equals;
    pairs with an item of ``skip`` (items said to be answered by few rows, named before their pairs) are left
    out."""
    answered = np.asarray(answered, dtype=bool)
    if not len(answered) or answered.all():
        return []
    as_float = answered.astype(float)  # counts below 2**53 are exact in floats, and the product is BLAS's
    together = as_float.T @ as_float  # rows answering both (diagonal: each)
    left = np.array([name in set(skip) for name in names], dtype=bool)
    i, j = np.triu_indices(len(names), 1)  # the pairs in the items' order
    keep = (together[i, j] < share * len(answered)) & ~left[i] & ~left[j]
    i, j = i[keep], j[keep]
    counts = together[i, j]
    order = np.argsort(counts, kind="stable")  # fewest first, the items' order among equals
    return [(names[i[k]], names[j[k]], int(counts[k])) for k in order]


def missing_summary(frame: pd.DataFrame, names: tuple[str, ...], limit: int = 20,
                    frequency_weights: str | None = None) -> dict:
    """Coverage of each variable and the most frequent missing-data patterns, each named by the items its
    rows did not answer (an empty list: complete rows), and the block of items a large share of the rows left
    unanswered together, as a shorter form leaves them ("shared_gaps": data.shared_gaps).  ``frequency_weights``: a
    column of counts (checked beforehand); each row then counts as often as its weight, as it does in N, and the
    summary names the column."""
    observed = frame[list(names)].notna().to_numpy()
    counts = (np.ones(len(frame)) if frequency_weights is None
              else pd.to_numeric(frame[frequency_weights]).to_numpy(dtype=float))
    total = counts.sum()
    coverage = {name: float(v) for name, v in zip(names, counts @ observed / total if total else observed.mean(axis=0))}
    weighted = {"counted_by_weights": frequency_weights} if frequency_weights is not None else {}
    if observed.all():
        return {"coverage": coverage, "patterns": [{"not_answered": [], "rows": int(round(total))}],
                "n_patterns": 1 if len(observed) else 0, **weighted}
    patterns, which = np.unique(observed, axis=0, return_inverse=True)
    sums = np.bincount(which.ravel(), weights=counts, minlength=len(patterns))
    order = np.argsort(-sums, kind="stable")[:limit]
    from cfa_tool.data.shared_gaps import shared_gaps_of_patterns

    form = shared_gaps_of_patterns(frame, names, observed, patterns, sums, counts)  # a shorter form's gaps
    return {
        "coverage": coverage,
        "patterns": [{"not_answered": [name for name, answered in zip(names, patterns[k]) if not answered],
                      "rows": int(round(sums[k]))} for k in order],
        "n_patterns": int(len(patterns)),
        **weighted,
        **({"shared_gaps": form.to_dict()} if form is not None else {}),
    }
