"""Factor scores of every data row from a model fitted to those rows, and how good the scores are.

The fit is the one ``cfa_tool.fit`` makes (same data options); the scores use its parameters
(:mod:`cfa_tool.scoring`): each group's own intercepts, factor means, loadings and variances, each
row scored from the items it answered (for regression scores, the full-information posterior mean),
ordinal items by their posterior mean over the latent-response model (expected a posteriori) with
posterior standard deviations.  The output has one row per row of the data as read, in the file's
order; a row that cannot be scored keeps empty cells, and the report counts them by reason.
"""

from __future__ import annotations

import dataclasses
from dataclasses import dataclass, field, replace
from collections.abc import Callable
from enum import Enum
from pathlib import Path

import numpy as np
import pandas as pd

from cfa_tool.numbers import count_text, counted, cut_list, more_words, names_shown, user_number, word_list
from cfa_tool.data.csv_convention import PLAIN, CsvConvention, convention_of
from cfa_tool.data.kept_rows import ROW_NAMES_COLUMN, RowNaming, caller_labels, row_naming
from cfa_tool.data.moments import row_numbers
from cfa_tool.data.sample_design import check_design, design_columns
from cfa_tool.data.summary_stats import NotGiven
from cfa_tool.errors import DataError, EstimationError, OptionError, printable
from cfa_tool.note_parts import Command, Note
from cfa_tool.options import Option, group_column, own_keywords, yes_or_no
from cfa_tool.pipeline.results import FitResult, clean
from cfa_tool.views import Presentable
from cfa_tool.scoring.item_sums import ItemSumRule, ItemSums
from cfa_tool.scoring.methods import (DETERMINACY_CAUTION, ITEM_METHODS, LINEAR_METHODS, PREDICTING_METHODS,
                                      ScoreMethod, UnansweredFactor, Unscored)
from cfa_tool.scoring.quality import (Precision, ScoreQuality, SumScore, answered_sum_sems, item_sum_precision,
                                      ordinal_sum_quality, sum_quality)


class NotScored(Enum):
    """Why a whole line of the scores file has no score at all: the words of :data:`WHY_NOT_SCORED_COLUMN`, and
    (:attr:`reason`) the reason the table of empty cells gives for every cell of such a row."""

    FILTERED = "filtered out"
    BLANK = "blank row"  # a blank row of the file, kept as an empty line so that the lines match the file's rows
    ABOVE_ANSWERS = "above the answers"  # a row between the names and the first row of answers (--first-data-row)
    NO_ANSWERS = "no answers"
    NO_GROUP = "no group"
    UNKNOWN_GROUP = "group not in the fit"
    TOO_FEW_ANSWERS = "too few answers"  # answers, but too few for any score asked for (an item sum's least share)
    #: a line with scores, some of whose cells are empty because the row answered none of a factor's items and
    #: that score was asked to be left empty (UnansweredFactor.LEAVE_EMPTY; the _items_answered columns say which)
    FACTOR_LEFT_EMPTY = "a factor's items unanswered"

    @property
    def reason(self) -> str:
        """The reason the scores file's table of empty cells and the JSON result give: its words, with the option
        that made the line so on the command line ('left out by a row filter (--keep)')."""
        words, option = _REASONS[self]
        return f"{words} ({option.flag})" if option is not None else words

    @property
    def words(self) -> str:
        """The reason without the option (a manuscript's reader runs nothing): 'left out by a row filter'."""
        return _REASONS[self][0]

    @property
    def whole_line(self) -> bool:
        """Whether the reason leaves the line without any score (all but :attr:`FACTOR_LEFT_EMPTY`)."""
        return self is not NotScored.FACTOR_LEFT_EMPTY

    @property
    def row_of_data(self) -> bool:
        """Whether the line stands for a row of the data (all but :attr:`BLANK` and :attr:`ABOVE_ANSWERS`: a row of
        the file that holds no data, whose empty line keeps the scores in line with the file's rows, and which no
        count of rows holds: new-user trial s21, 'Of the 901 rows in the data, one has no score (a row above the first
        row of answers: 1)' where the fit had 900 rows)."""
        return self not in (NotScored.BLANK, NotScored.ABOVE_ANSWERS)


_REASONS: dict[NotScored, tuple[str, Option | None]] = {
    NotScored.FILTERED: ("left out by a row filter", Option.KEEP), NotScored.BLANK: ("a blank row of the file", None),
    NotScored.ABOVE_ANSWERS: ("a row above the first row of answers", Option.FIRST_DATA_ROW),
    NotScored.NO_ANSWERS: (Unscored.NO_ANSWERS.value, None), NotScored.NO_GROUP: ("no value in the group column", None),
    NotScored.UNKNOWN_GROUP: ("a group the fit does not have", None),
    NotScored.TOO_FEW_ANSWERS: ("too few answers for any score asked for", None),
    NotScored.FACTOR_LEFT_EMPTY: (Unscored.LEFT_EMPTY.value, None)}

#: the reasons a whole row has no score that the scoring of each group does not count (its rows are not scored)
_ROWS_LEFT_OUT = (NotScored.FILTERED, NotScored.NO_GROUP, NotScored.UNKNOWN_GROUP)


#: output column of the reason a line has no score at all (:class:`NotScored`), the file's last, always written (empty
#: on the lines scored)
WHY_NOT_SCORED_COLUMN = "why_not_scored"


#: the row of a summary-statistics file that gives what a fit lacks (data.summary_stats.NotGiven)
_SUMMARY_ROW = {NotGiven.MEANS: "mean", NotGiven.STANDARD_DEVIATIONS: "sd"}

#: how the earlier fit's own cautions and notes are introduced when other data are scored with it (said of the fit's
#: rows, not of the scored file's)
ABOUT_THE_FIT = "About the fit (not the scored data): "

#: the header of the id column when the file's row names name the rows
ROW_NAME_HEADER = ROW_NAMES_COLUMN

#: the words --method takes, one per linear method and item score (ordinal items have one method: the posterior mean)
METHOD_WORDS = {m.value: m for m in LINEAR_METHODS + ITEM_METHODS}


def method_option(methods) -> tuple[ScoreMethod, ...]:
    """Linear methods and item scores from words ('regression', 'bartlett', 'correlation-preserving', 'item-sum',
    'item-mean'), a list of them, or ScoreMethod values; each at most once."""
    if methods is None:
        return (ScoreMethod.REGRESSION,)
    if isinstance(methods, (str, ScoreMethod)):
        methods = [methods]
    if not isinstance(methods, (list, tuple)) or not methods:
        raise OptionError("methods must be one method or a list of them: " + ", ".join(METHOD_WORDS))
    out = []
    for m in methods:
        if isinstance(m, str):
            m = m.strip()
            if m not in METHOD_WORDS:
                raise OptionError(f"unknown scoring method '{printable(m)}': choose from {', '.join(METHOD_WORDS)}")
            m = METHOD_WORDS[m]
        if m not in LINEAR_METHODS + ITEM_METHODS:
            raise OptionError(f"'{m.value}' is not a method to choose: ordinal items are always scored by their "
                              f"posterior mean")
        if m in out:
            raise OptionError(f"the scoring method '{m.value}' is given twice")
        out.append(m)
    return tuple(out)


def factor_methods(chosen) -> tuple[ScoreMethod, ...]:
    """The methods among ``chosen`` that score the factors (not item sums or means)."""
    return tuple(m for m in chosen if m not in ITEM_METHODS)


def item_rule(chosen, least_answered) -> ItemSumRule | None:
    """The missing-answers rule of item sums and means (None when neither is written); ``least_answered`` (None: the
    common-practice default) cannot apply without them."""
    from cfa_tool.options import real_number

    if not any(m in ITEM_METHODS for m in chosen):
        if least_answered is not None:
            raise OptionError(f"{Option.LEAST_ANSWERED} is the rule of item sums and means, which are not asked for "
                              f"(methods item-sum or item-mean), so it cannot apply; remove it")
        return None
    if least_answered is None:
        return ItemSumRule()
    return ItemSumRule(real_number(f"the least share answered ({Option.LEAST_ANSWERED})", least_answered, 0.0, 1.0,
                                   open_low=True))


def unanswered_option(value, chosen) -> UnansweredFactor:
    """What to do with a factor a row answered none of the items of (``value``: a word of :class:`UnansweredFactor`
    or a member; None: predict, the default, which keeps the data).  Only regression scores and posterior means
    score such a factor, so the option cannot apply without one of them among the methods ``chosen``."""
    from cfa_tool.options import choice

    if value is None:
        return UnansweredFactor.PREDICT
    found = choice(UnansweredFactor, value, str(Option.UNANSWERED_FACTORS))
    if not any(m in PREDICTING_METHODS for m in chosen):
        raise OptionError(f"{Option.UNANSWERED_FACTORS} says what to do with a regression score or posterior mean of "
                          f"a factor a row answered none of the items of, and none is written (item sums and means, "
                          f"Bartlett and correlation-preserving scores leave such a cell empty), so it cannot apply; "
                          f"remove it")
    return found


def _left_empty(answered: np.ndarray, values: dict, errors: dict, chosen, unanswered: UnansweredFactor,
                counts: dict) -> tuple[dict, dict, np.ndarray]:
    """(scores, standard errors, (n,) whether the row has a cell left empty) as the file writes them: with
    :attr:`UnansweredFactor.LEAVE_EMPTY`, each regression score or posterior mean of a factor the row answered none
    of the items of (``answered``: :func:`_items_answered`) emptied and counted into ``counts`` as
    :attr:`Unscored.LEFT_EMPTY`; with predict, ``values`` and ``errors`` as they are.  The scores that remain are
    those of the prediction, cell for cell."""
    rows = np.zeros(len(answered), dtype=bool)
    if unanswered is UnansweredFactor.PREDICT:
        return values, errors, rows
    values, errors = dict(values), dict(errors)
    for meth in (m for m in chosen if m in PREDICTING_METHODS):
        empty = (answered == 0) & ~np.isnan(values[meth])
        if not empty.any():
            continue
        values[meth] = np.where(empty, np.nan, values[meth])
        errors[meth] = np.where(empty, np.nan, errors[meth])
        counts[(Unscored.LEFT_EMPTY.value, meth.value)] = empty.sum(axis=0).astype(np.int64)
        rows |= empty.any(axis=1)
    return values, errors, rows


def _refuse_id_named_as(id_name: str | None, written, what: str = "a column") -> None:
    """The one error when the id column (``id_name``, None: none) has the name of a column the output writes beside
    it (``written``): one of the two would overwrite the other."""
    if id_name is not None and id_name in written:
        raise OptionError(f"the id column '{printable(id_name)}' has the name of {what} the output holds; rename that "
                          f"column in the data, or name the rows by another column")


def carried_columns(row_filters, group: str | None, design=None) -> tuple[str, ...]:
    """The columns of the data by which a run chose or grouped its rows, which the scores file carries beside the ids,
    named and written as in the data file: each row filter's column (--keep; a half of a halves file names none),
    the group column, the cluster and strata columns (``design``: data.sample_design.DesignColumns), each once, in
    that order.  The file has a line for every row of the data, the rows left out too, so a person of data in long
    form has a line per wave: without the column a filter chose the wave by, a merge by the id alone doubles the
    rows, and the caution's advice to merge by the id and the time together cannot be followed (new-user trial s25,
    finding 2); with the cluster column the units' means are a groupby away (finding 10)."""
    from cfa_tool.data.filters import RowFilter

    names = [f.column for f in row_filters if isinstance(f, RowFilter)] + [group]
    if design is not None:
        names += [design.cluster, design.strata]
    return tuple(dict.fromkeys(n for n in names if isinstance(n, str)))


def _refuse_carried_named_as(carried, columns) -> None:
    """The one error when a column the scores file carries from the data (:func:`carried_columns`) has the name of a
    column the output writes of its own: one would overwrite the other."""
    for name in carried:
        if name in columns:
            raise OptionError(f"the column '{printable(name)}', which the scores file carries from the data beside the "
                              f"ids (the run chose or grouped its rows by it), has the name of a column of the scores "
                              f"file; rename that column in the data")


def _score_columns(ids, id_column: str | None, chosen, factors, values: dict, errors: dict,
                   with_errors: bool, answered: np.ndarray, carried: dict | None = None
                   ) -> tuple[str | None, dict[str, object]]:
    """(name of the id column or None, the output's columns): the ids first, then the columns of the data the run
    chose or grouped rows by (``carried``: name -> values, :func:`carried_columns`; the id column not again), then
    each method's score of each factor, with its standard error when asked for, then the number of each factor's
    items each row answered (``answered``, see :func:`_items_answered`): 0 marks a score that rests on the other
    factors' items alone."""
    columns: dict[str, object] = {}
    id_name = None
    if ids is not None:
        id_name = id_column if id_column is not None else ROW_NAME_HEADER
        columns[id_name] = ids.tolist()
    columns.update({name: values_of for name, values_of in (carried or {}).items() if name != id_name})
    for meth in chosen:
        for f, name in enumerate(factors):
            # an item sum's or mean's error is its standard error of measurement (about its own true score)
            what = "sem" if meth in ITEM_METHODS else "se"
            written = (column_name(name, meth),) + ((column_name(name, meth, what),) if with_errors else ())
            _refuse_id_named_as(id_name, written, "a column of scores")
            columns[column_name(name, meth)] = values[meth][:, f]
            if with_errors:
                columns[column_name(name, meth, what)] = errors[meth][:, f]
    for f, name in enumerate(factors):
        _refuse_id_named_as(id_name, (answered_column(name),))
        columns[answered_column(name)] = pd.array([None if np.isnan(v) else int(v) for v in answered[:, f]],
                                                  dtype="Int64")
    # the scores' own columns, written after the carried ones: none may take a carried column's name
    own = [column_name(name, meth, what) for meth in chosen for name in factors
           for what in (("", "sem" if meth in ITEM_METHODS else "se") if with_errors else ("",))]
    _refuse_carried_named_as([n for n in (carried or {}) if n != id_name],
                             own + [answered_column(name) for name in factors] + [SAME_ANSWER_COLUMN,
                                                                                  WHY_NOT_SCORED_COLUMN])
    return id_name, columns


#: output column that marks the rows that gave one answer to every item they answered, reverse-worded ones included
#: (data.same_answers: 1, else 0; empty for rows not scored, and on every line when the model declares no reversed
#: items beside others), always written, before :data:`WHY_NOT_SCORED_COLUMN`: the file's columns never vary
SAME_ANSWER_COLUMN = "same_answer_to_every_item"


def _with_same_answer_column(columns: dict, id_name, spec, items, rows: np.ndarray, at: np.ndarray, n: int) -> dict:
    """``columns`` with :data:`SAME_ANSWER_COLUMN` last (``rows``: the answers of the rows read, at the places ``at``
    of the ``n`` output rows); the column is empty without a 'reversed' statement naming some but not all items,
    where one answer throughout contradicts nothing the model knows (written all the same: a researcher's script
    reads the same columns from every run)."""
    from cfa_tool.data.same_answers import same_answer_rows

    _refuse_id_named_as(id_name, (SAME_ANSWER_COLUMN,))
    turned = np.array([x in spec.reverse_keyed for x in items], dtype=bool)
    if not spec.reversed or not turned.any() or turned.all():
        return {**columns, SAME_ANSWER_COLUMN: pd.array([None] * n, dtype="Int64")}
    found = same_answer_rows(rows, np.arange(len(rows)), turned)
    flags = np.full(n, -1)
    flags[at] = 0
    if found is not None:
        flags[at[list(found.rows)]] = 1
    return {**columns, SAME_ANSWER_COLUMN: pd.array([None if v < 0 else int(v) for v in flags], dtype="Int64")}


def answered_column(factor: str) -> str:
    """Output column of the number of a factor's items a row answered: e.g. 'visual_items_answered'."""
    return f"{factor}_items_answered"


def _items_answered(model, rows: np.ndarray, at: np.ndarray, n: int) -> np.ndarray:
    """(n, m): how many of each factor's items (directly or through the factors below it) each row answered, at
    the rows' places ``at`` among the ``n`` rows read; NaN for rows not scored (left out by a filter)."""
    from cfa_tool.scoring.model import items_answered

    out = np.full((n, model.m), np.nan)
    out[at] = items_answered(model, rows)
    return out


def _rows_as_read(loaded) -> pd.DataFrame:
    """The rows of the data as read, before the row filters (--keep): the scores file has one line for each, and
    :func:`_in_file_order` reads a gap in their index as a blank row of the file, which holds only while the rows a
    filter left out are among them (pipeline.inputs keeps them as ``read_frame`` when filters are given).  Checked
    here, so that a change there cannot write filtered rows as blank ones unnoticed."""
    frame, read = loaded.frame, loaded.read_frame
    if read is None:
        if loaded.row_filters:
            raise AssertionError("row filters were given but the rows as read before them were not kept (read_frame): "
                                 "the rows the filters left out would be written as blank rows of the file")
        return frame
    if len(read) < len(frame) or not frame.index.isin(read.index).all():
        raise AssertionError("the rows as read (read_frame) must hold every row the row filters kept, in the file's "
                             "numbering: the scores are written in their places")
    return read


def _in_file_order(table: pd.DataFrame, data, names_row: int = 1) -> pd.DataFrame:
    """The scores of a file's rows with an empty line for each blank row the reader skipped between them (hostile
    trial s11: a blank sheet row dropped from the scores file shifted every later score onto the row above when
    the file was pasted beside the sheet), and for each row between the column names (``names_row``: the row they
    were read from, data.readers.LoadedData.names_row_read, below a title or empty rows too) and the first row of answers (--first-data-row: a row of question texts; hostile tester s13: without
    them every score sat one respondent off).  A file's rows are indexed by their place in the file as a spreadsheet
    shows it (data.moments.file_rows_index: the row's number less one; a text file's record, not its text line, so
    a quoted cell's line breaks add no line: new-user trial s14), so a gap in the index is a row not read and line k
    of the scores file is row k of the file; a data frame's scores keep its own index (they join to its rows)."""
    if isinstance(data, pd.DataFrame) or not len(table) or not pd.api.types.is_integer_dtype(table.index):
        return table
    index = table.index
    if not index.is_monotonic_increasing:
        return table
    first = min(index[0], names_row)  # the row just below the names: index = its number - 1 = the names' row
    if index[-1] - first + 1 > len(index):
        return table.reindex(pd.RangeIndex(first, index[-1] + 1))
    return table


def _row_reasons(read_index: pd.Index, kept: pd.Index, rows: np.ndarray, group_of_row: np.ndarray, group,
                 labels) -> pd.Series:
    """The reason each row read would have no score at all, before scoring (None: the row is scored unless every
    score it gets is empty): left out by a row filter, no group, a group the fit does not have, no answers on the
    model's items (``rows``, ``group_of_row``: of the ``kept`` rows)."""
    reasons = pd.Series(None, index=read_index, dtype=object)
    reasons[~read_index.isin(kept)] = NotScored.FILTERED
    own = np.full(len(kept), None, dtype=object)
    own[np.isnan(rows).all(axis=1)] = NotScored.NO_ANSWERS
    if group is not None:
        missing = pd.isna(group_of_row)
        own[~missing & ~np.isin(group_of_row, np.asarray(list(labels), dtype=object))] = NotScored.UNKNOWN_GROUP
        own[missing] = NotScored.NO_GROUP
    reasons[kept] = own
    return reasons


def _count_rows_left_out(reasons: pd.Series, chosen, m: int, counts: dict) -> None:
    """The rows left out before scoring (:data:`_ROWS_LEFT_OUT`; ``reasons``: :func:`_row_reasons`) counted into
    ``counts`` by (reason, method), every factor's cell empty."""
    for why in _ROWS_LEFT_OUT:
        number = sum(1 for r in reasons if r is why)
        if number:
            for meth in chosen:
                counts[(why.reason, meth.value)] = np.full(m, number)


def _with_why_not_scored(table: pd.DataFrame, id_name, score_columns: list[str], reasons: pd.Series,
                         left_empty: pd.Series | None = None) -> pd.DataFrame:
    """``table`` (the scores in file order, blank rows of the file as empty lines) with :data:`WHY_NOT_SCORED_COLUMN`
    last, saying why a line has no score at all (:class:`NotScored`; ``reasons``: :func:`_row_reasons`), so that a
    line left empty is told apart from a person with no answers when the file is merged back, or why a line with
    scores has a factor's cells left empty (``left_empty``: per row read, :func:`_left_empty`); empty on the lines
    scored in full, and on every line when each is (written all the same: the file's columns never vary)."""
    _refuse_id_named_as(id_name, (WHY_NOT_SCORED_COLUMN,))
    scored = table[score_columns].notna().any(axis=1).to_numpy()
    partly = (np.zeros(len(table), dtype=bool) if left_empty is None else
              left_empty.reindex(table.index, fill_value=False).to_numpy(dtype=bool))
    if scored.all() and not partly.any():
        return table.assign(**{WHY_NOT_SCORED_COLUMN: pd.Series([None] * len(table), index=table.index, dtype=object)})
    known = table.index.isin(reasons.index)
    why = np.full(len(table), None, dtype=object)
    why[known] = reasons.reindex(table.index[known]).to_numpy()
    why[~known] = NotScored.BLANK
    if len(reasons):  # the rows above the first row read: skipped by --first-data-row, not blank
        why[~known & (table.index < reasons.index.min())] = NotScored.ABOVE_ANSWERS
    why[scored] = None
    why[~scored & pd.isna(why)] = NotScored.TOO_FEW_ANSWERS
    why[scored & partly] = NotScored.FACTOR_LEFT_EMPTY
    return table.assign(**{WHY_NOT_SCORED_COLUMN: [None if w is None else w.value for w in why]})


@dataclass(frozen=True)
class PartlyAnswered:
    """The scored rows that answered some but not all of a factor's items: ``rows`` of them, the standard errors of
    their scores from ``low`` to ``high``, against the median ``every`` of the rows that answered every item (None
    when no row did); ``method``: the scores these are of (the first factor-score method written)."""

    factor: str
    rows: int
    low: float
    high: float
    every: float | None
    method: ScoreMethod


def partly_answered(model, answered: np.ndarray, method: ScoreMethod, errors: np.ndarray) -> tuple[PartlyAnswered, ...]:
    """The scored rows that answered some but not all of each factor's items (``answered``: see
    :func:`_items_answered`; ``errors``: the standard errors of ``method``'s scores at the same places), with the range
    of their standard errors beside the typical one of complete rows: their scores rest on fewer items and are less
    precise (new-user trial s11: 36 patients scored from 2-3 of 5 items had SEs of .45-.54 against .37, said nowhere;
    s28: a third of the rows, given a shorter form, said only in a note near the end of the report)."""
    full = model.reach.sum(axis=0)
    found = []
    for f, name in enumerate(model.factors):
        some = (answered[:, f] > 0) & (answered[:, f] < full[f]) & ~np.isnan(errors[:, f])
        if not some.any():
            continue
        every = (answered[:, f] == full[f]) & ~np.isnan(errors[:, f])
        se = errors[some, f]
        found.append(PartlyAnswered(str(name), int(some.sum()), float(se.min()), float(se.max()),
                                    float(np.median(errors[every, f])) if every.any() else None, method))
    return tuple(found)


def partly_answered_words(found: tuple[PartlyAnswered, ...]) -> str:
    """Each factor's rows answering some of its items with their standard errors ('booking: 1,043 rows, SE 0.37 to
    0.54 against 0.33 with every item; ...'), by one rule for the note and the scores' first box."""
    return "; ".join(
        f"{printable(p.factor)}: {count_text(p.rows)} {'row' if p.rows == 1 else 'rows'}, SE "
        + (f"{p.low:.2f}" if np.isclose(p.low, p.high, atol=5e-3) else f"{p.low:.2f} to {p.high:.2f}")
        + (f" against {p.every:.2f} with every item" if p.every is not None else "") for p in found)


def partly_answered_note(found: tuple[PartlyAnswered, ...]) -> list[str]:
    """The note on the scored rows that answered some but not all of a factor's items (:func:`partly_answered`)."""
    if not found:
        return []
    method = found[0].method
    what = "posterior SD" if method is ScoreMethod.EXPECTED_A_POSTERIORI else f"{method.value} score's SE"
    return [f"Rows that answered some but not all of a factor's items are scored from the items they answered (the "
            f"_items_answered columns): their scores are less precise than the precision table says, which is for "
            f"rows that answered every item ({partly_answered_words(found)}; SE: the {what})."]


def score_columns(methods, factors) -> list[str]:
    """The output's columns of scores (no standard errors), each method's factors in turn."""
    return [column_name(f, meth) for meth in methods for f in factors]


def column_name(factor: str, method: ScoreMethod, what: str = "") -> str:
    """Output column of a factor's score by a method: e.g. 'visual_regression', 'visual_regression_se',
    'visual_item_sum_sem' (``what``: '', 'se', or 'sem', an item sum's or mean's standard error of measurement)."""
    word = {ScoreMethod.EXPECTED_A_POSTERIORI: "posterior_mean"}.get(method, method.value.replace("-", "_"))
    if what == "se":
        word = "posterior_sd" if method is ScoreMethod.EXPECTED_A_POSTERIORI else word + "_se"
    elif what == "sem":
        word += "_sem"
    return f"{factor}_{word}"


class ScaleSource(Enum):
    """Where the answer scale a reverse-keyed item is reversed on (lowest + highest - x) comes from."""

    DECLARED = "the model's 'reversed' statement"
    CODED = "the codes of the model's 'answers' statement"
    OBSERVED = "the lowest and highest answers of the rows the model was fitted to, which no statement declares"


@dataclass(frozen=True)
class Reversal:
    """A reverse-keyed item of a factor's item sum, reversed as lowest + highest - x."""

    factor: str
    item: str
    lowest: float
    highest: float
    source: ScaleSource

    def to_dict(self) -> dict:
        return {"factor": self.factor, "item": self.item, "lowest": self.lowest, "highest": self.highest,
                "scale_from": self.source.name.lower()}


@dataclass(frozen=True, eq=False)
class ItemSumSummary:
    """One group's item sums and means: how they were keyed and counted, and their reliability under the fit."""

    group: str | None
    rule: ItemSumRule
    factors: tuple[str, ...]  # the factors summed
    items: tuple[tuple[str, ...], ...]  # each summed factor's items
    #: scoring.quality.SumScore of the summed factors that have one: the very objects of the group's quality
    #: (ScoreQuality.sums, OrdinalQuality.sums), whose omega and SD every table reads
    sums: tuple[SumScore, ...]
    reversals: tuple[Reversal, ...]
    not_summed: tuple[tuple[str, Unscored], ...]  # (factor, why it has no item sum)
    shared: tuple[tuple[str, tuple[str, ...]], ...]  # (item, the summed factors it counts on) for items on several
    prorated: tuple[int, ...] = ()  # rows of this group prorated, per summed factor
    # scoring.quality.Precision of each summed factor's item sum and mean written (their standard error of
    # measurement, from the sum's SD under the fitted model and its omega)
    precision: tuple[Precision, ...] = ()
    #: summed factors whose sum adds continuous items' values to ordinal answers' codes: no reliability or SEM (the
    #: keyed sums that scoring.quality.ordinal_sum_quality left out)
    mixed: tuple[str, ...] = ()
    #: (factor, method, least, largest, rows): the standard errors of measurement of the prorated rows' item sums (or
    #: means, when no sum is written), from the items each answered (_item_sum_sems)
    prorated_sem: tuple = ()

    @property
    def omega(self) -> tuple[float, ...]:
        """Each summed factor's omega of its keyed sum (:attr:`sums`; NaN where it has none)."""
        found = {s.factor: s.omega for s in self.sums}
        return tuple(found.get(f, float("nan")) for f in self.factors)

    def to_dict(self) -> dict:
        return clean({"group": self.group, "least_share_answered": self.rule.least_share,
                      "least_share_is_default": self.rule.default,
                      "factors": [{"factor": f, "items": list(items), "omega": w, "rows_prorated": n}
                                  for f, items, w, n in zip(self.factors, self.items, self.omega, self.prorated)],
                      "precision": [p.to_dict() for p in self.precision],
                      "prorated_standard_errors_of_measurement": [
                          {"factor": f, "method": m.value, "least": low, "largest": high, "rows": n}
                          for f, m, low, high, n in self.prorated_sem],
                      "reversed": [r.to_dict() for r in self.reversals],
                      "not_summed": [{"factor": f, "reason": why.value} for f, why in self.not_summed],
                      "items_on_several_factors": [{"item": x, "factors": list(fs)} for x, fs in self.shared]})


@dataclass(frozen=True, eq=False)
class _ItemParts:
    """What one group's item sums need: keys (p, m), each item's answer scale, the reason each factor has no sum
    (None: summed), and the summary the report shows."""

    keys: np.ndarray
    lowest: np.ndarray
    highest: np.ndarray
    not_summed: list
    summary: ItemSumSummary

    @property
    def summed(self) -> list[int]:
        """The factors that get a sum (no reason in :attr:`not_summed`)."""
        return [j for j, why in enumerate(self.not_summed) if why is None]


def _item_parts(model, spec, fit_data, sums: tuple[SumScore, ...], rule: ItemSumRule, categories=None,
                withheld: frozenset = frozenset()) -> _ItemParts:
    """One group's :class:`_ItemParts` (``model``: its ScoringModel; ``fit_data``: the fit's DataSummary, whose
    answer ranges give the scale of a reverse-keyed item no statement gives one; ``sums``: the group's keyed sums'
    quality (scoring.quality.SumScore), which leaves out a factor whose sum mixes continuous and ordinal items
    (scoring.quality.ordinal_sum_quality); ``categories``: ordinal items' answer values in the fitted rows, item by
    item, which give that scale when the fit keeps no answer ranges; ``withheld``: the factors whose keyed sum the fit
    withholds, its loadings contradicting the declared keying, which get no sum or mean either, their cells empty
    as every view withholds their figures (keying-s25: the file still wrote them))."""
    from cfa_tool.scoring.quality import model_keys

    keys = model_keys(model, _declared(spec))
    direct = model.loadings != 0
    alone = model.measured & (model.reach == direct).all(axis=0)
    method_factors = spec.method_factors
    not_summed = [Unscored.NOT_A_TRAIT if f in method_factors else Unscored.NOT_ITEMS_ALONE if not alone[j] else
                  Unscored.KEYING_WITHHELD if f in withheld else None for j, f in enumerate(model.factors)]
    summed = [j for j, why in enumerate(not_summed) if why is None]
    declared, codings = spec.reverse_keyed, spec.answer_codings()
    observed = dict(zip(fit_data.variables, fit_data.ranges)) if getattr(fit_data, "ranges", ()) else {}
    if categories is not None:  # ordinal items: the lowest and highest category the fitted rows gave
        observed = {**{x: (min(c), max(c)) for x, c in zip(model.items, categories) if len(c)}, **observed}
    p = model.p
    lowest, highest = np.full(p, np.nan), np.full(p, np.nan)
    reversals = []
    for j in summed:
        for i in np.flatnonzero(keys[:, j] < 0):
            item = model.items[i]
            if item in declared:
                (low, high), source = declared[item], ScaleSource.DECLARED
            elif item in codings:
                codes = codings[item].codes()
                (low, high), source = (codes[0], codes[-1]), ScaleSource.CODED
            elif item in observed:
                (low, high), source = observed[item], ScaleSource.OBSERVED
            else:
                raise OptionError(f"the item sum of '{printable(model.factors[j])}' reverses '{printable(item)}' (its "
                                  f"loading has the sign opposite to the factor's other items), and no answer scale is known to reverse it on; declare it "
                                  f"with 'reversed {printable(item)} on LOWEST to HIGHEST' in the model file")
            lowest[i], highest[i] = float(low), float(high)
            reversals.append(Reversal(model.factors[j], item, float(low), float(high), source))
    counted = (keys != 0)[:, summed]
    shared = tuple((model.items[i], tuple(model.factors[summed[k]] for k in np.flatnonzero(counted[i])))
                   for i in np.flatnonzero(counted.sum(axis=1) > 1))
    names = tuple(model.factors[j] for j in summed)
    summary = ItemSumSummary(model.group, rule, names,
                             tuple(tuple(model.items[i] for i in np.flatnonzero(keys[:, j])) for j in summed),
                             tuple(s for s in sums if s.factor in names),
                             tuple(reversals), tuple((f, why) for f, why in zip(model.factors, not_summed)
                                                     if why is not None), shared,
                             mixed=tuple(f for f in names if f not in {s.factor for s in sums}))
    return _ItemParts(keys, lowest, highest, not_summed, summary)


def _score_group(model, rows: np.ndarray, chosen, ordinal: bool,
                 parts: _ItemParts | None) -> tuple[dict, tuple, tuple]:
    """(method -> (scores, standard errors, unscored counts), rows prorated per summed factor, the prorated rows'
    standard errors of measurement: (factor, method, least, largest, rows) per summed factor with such rows, for the
    first item method written) of one group's rows: factor scores by the linear methods or the posterior mean, item
    sums and means by their rule (an item sum's or mean's standard error: its SEM, :func:`_item_sum_sems`)."""
    out = {}
    factor_ones = factor_methods(chosen)
    if factor_ones:
        if ordinal:
            from cfa_tool.scoring.ordinal import eap_scores

            found = {factor_ones[0]: eap_scores(model, rows)}
        else:
            from cfa_tool.scoring.linear import score_rows

            found = score_rows(model, rows, factor_ones)
        out = {meth: (b.scores, b.standard_errors, b.unscored) for meth, b in found.items()}
    if parts is None:
        return out, (), ()
    from cfa_tool.scoring.item_sums import item_sums

    base = model.base if ordinal else model
    sums = item_sums(rows, parts.keys, parts.lowest, parts.highest, parts.not_summed, base.factors,
                     parts.summary.rule)
    sum_sem, mean_sem = _item_sum_sems(model, parts, rows, sums)
    for meth, values, sem in ((ScoreMethod.ITEM_SUM, sums.sums, sum_sem), (ScoreMethod.ITEM_MEAN, sums.means, mean_sem)):
        if meth in chosen:
            out[meth] = (values, sem, sums.unscored)
    summed = parts.summed
    first = next(m for m in ITEM_METHODS if m in chosen)
    sem = out[first][1]
    spread = []
    for j in summed:
        found = sem[sums.prorated_rows[:, j] & np.isfinite(sem[:, j]), j]
        if len(found):
            spread.append((base.factors[j], first, float(found.min()), float(found.max()), len(found)))
    return out, tuple(int(sums.prorated[j]) for j in summed), tuple(spread)


def _item_sum_sems(model, parts: _ItemParts, rows: np.ndarray, sums: ItemSums) -> tuple[np.ndarray, np.ndarray]:
    """(n, m) each row's standard error of measurement of its item sum and of its item mean (NaN where it has no
    sum, or its sum no omega): the SEM of the sum of the items the row answered (scoring.quality.answered_sum_sems),
    times J/a for the sum prorated from a of the factor's J items, divided by a for the mean (a: the count
    ``sums`` holds)."""
    found = answered_sum_sems(model, parts.summary.sums, parts.keys, ~np.isnan(rows))
    items = (parts.keys != 0).sum(axis=0)
    sum_sem, mean_sem = np.full(sums.sums.shape, np.nan), np.full(sums.sums.shape, np.nan)
    for name, sem in found.items():
        f = sums.factors.index(name)
        has = np.isfinite(sums.sums[:, f])
        a = sums.answered[has, f]
        sum_sem[has, f] = sem[has] * items[f] / a
        mean_sem[has, f] = sem[has] / a
    return sum_sem, mean_sem


@dataclass(frozen=True, eq=False)
class OrdinalQuality:
    """Quality of posterior-mean (EAP) scores in the data, by the law of total variance: Var(eta) =
    Var(E[eta | y]) + E[Var(eta | y)], so the squared correlation of the EAP score with its factor is
    Var(EAP) / (Var(EAP) + mean posterior variance) (the empirical or marginal reliability)."""

    group: str | None
    factors: tuple[str, ...]
    reliability: tuple[float, ...]
    factor_correlations: np.ndarray | None = None  # (m, m), of the fitted model
    score_correlations: np.ndarray | None = None  # (m, m), of the posterior means of the rows scored on every factor
    sums: tuple = ()  # SumScore per factor: the keyed sum of the answers' codes (Green & Yang 2009 reliability)
    # how precise one person's score is, from the posterior SDs of the rows that answered every item of the factor
    # (their median as the standard error), and that SE's median in the lowest and the highest third of the scores
    # scoring.quality.Precision (method: the posterior mean) per factor with such rows: the field continuous items'
    # ScoreQuality holds, read the one way by scoring.quality.precision_of
    precision: tuple[Precision, ...] = ()
    precision_by_level: tuple = ()  # (factor, SE in the lowest third of scores, SE in the highest third)

    @property
    def determinacy(self) -> tuple[float, ...]:
        return tuple(float(np.sqrt(r)) if np.isfinite(r) else float("nan") for r in self.reliability)

    @property
    def low_determinacy(self) -> tuple[bool, ...]:
        return tuple(bool(d < DETERMINACY_CAUTION) for d in self.determinacy)

    def to_dict(self) -> dict:
        return clean({"group": self.group, "factors": list(self.factors), "determinacy": list(self.determinacy),
                      "reliability": list(self.reliability), "low_determinacy": list(self.low_determinacy),
                      "determinacy_caution": DETERMINACY_CAUTION,
                      "factor_correlations": None if self.factor_correlations is None else
                      self.factor_correlations.tolist(),
                      "score_correlations": None if self.score_correlations is None else self.score_correlations.tolist(),
                      "sums": [s.to_dict() for s in self.sums],
                      "precision": [p.to_dict() for p in self.precision],
                      "precision_by_score_level": [{"factor": f, "standard_error_lowest_third": low,
                                                    "standard_error_highest_third": high}
                                                   for f, low, high in self.precision_by_level]})


@dataclass(frozen=True, eq=False)
class ScoreResult(Presentable):
    """Scores of every row of the data, with the fit they come from and their quality."""

    fit: FitResult | SavedFit  # the fit the scores come from (an earlier one saved as JSON: SavedFit)
    methods: tuple[ScoreMethod, ...]
    factors: tuple[str, ...]
    id_name: str | None  # header of the id column of the output (None: no id column)
    table: pd.DataFrame = field(repr=False)  # the output: id column first, then the score columns
    quality: tuple  # ScoreQuality (continuous items) or OrdinalQuality, one per group
    unscored: tuple[tuple[str, str, tuple[int, ...]], ...]  # (reason, method, rows without a score of each factor)
    standard_errors: bool
    notes: tuple[str, ...] = ()
    scored_source: str | None = None  # the data scored, when they are not the data the model was fitted to
    # cautions about the rows' scores, shown before the tables: rows whose score of a factor rests on the other
    # factors' items alone (they answered none of its items)
    warnings: tuple[str, ...] = ()
    # item sums and means (methods item-sum, item-mean): one summary per group, empty when neither is written
    item_sums: tuple[ItemSumSummary, ...] = ()
    #: what was done with a factor a row answered none of the items of (its prediction written, or left empty)
    unanswered: UnansweredFactor = UnansweredFactor.PREDICT
    #: the row of the scored file that holds the column names (data.readers.LoadedData.names_row_read; 1 for a data
    #: frame), beside which the scores file's header stands: the rows above it (a title, --names-row) have no line,
    #: as a CSV file begins with its header, and the report says so where it says which empty lines stand for rows of
    #: the file without data (reporting.score_report.rows_above_names)
    names_row: int = 1
    #: the scores file's separator, decimal mark and byte-order mark: those of the data file scored, by the one rule of
    #: every CSV file the tool writes (data.csv_convention.convention_of; new-user trial s23b, finding 4)
    file_format: CsvConvention = PLAIN
    #: the columns of the data the run chose or grouped rows by (row filters, groups, clusters, strata), which the
    #: scores file carries beside the ids as the data file names them (:func:`carried_columns`)
    carried: tuple[str, ...] = ()
    #: the scored rows that answered some but not all of a factor's items, whose scores are less precise than the
    #: quality figures of rows answering every item say (:func:`partly_answered`): in a note and the first box
    partly_answered: tuple[PartlyAnswered, ...] = ()

    @property
    def rows(self) -> int:
        """Rows of the data read: the lines of the scores file (one per row of the file, in its order) but those of
        rows that hold no data (:attr:`lines_without_data`: blank rows, rows above the first row of answers)."""
        return len(self.table) - sum(self.lines_without_data.values())

    @property
    def rows_scored(self) -> int:
        """Rows with at least one score: every row but those the why_not_scored column gives a reason
        (:func:`_with_why_not_scored` fills it on exactly the lines without any score)."""
        return self.rows - sum(self.not_scored.values())

    @property
    def not_scored(self) -> dict[NotScored, int]:
        """The rows of data without any score, by reason (:data:`WHY_NOT_SCORED_COLUMN`), in :class:`NotScored`
        order."""
        return {why: n for why, n in self._reasons_written().items() if why.whole_line and why.row_of_data}

    @property
    def lines_without_data(self) -> dict[NotScored, int]:
        """The empty lines of the scores file that stand for rows of the file holding no data (not rows of the data,
        :attr:`NotScored.row_of_data`), by reason, in :class:`NotScored` order."""
        return {why: n for why, n in self._reasons_written().items() if not why.row_of_data}

    @property
    def lines_left_partly_empty(self) -> int:
        """Lines with scores whose cells of a factor the row answered none of the items of were left empty, as asked
        (:attr:`NotScored.FACTOR_LEFT_EMPTY`)."""
        return self._reasons_written().get(NotScored.FACTOR_LEFT_EMPTY, 0)

    def _reasons_written(self) -> dict[NotScored, int]:
        if WHY_NOT_SCORED_COLUMN not in self.table.columns:
            return {}
        counts = self.table[WHY_NOT_SCORED_COLUMN].value_counts()
        return {why: int(counts[why.value]) for why in NotScored if why.value in counts.index}

    @property
    def low_determinacy(self) -> tuple[str, ...]:
        """Factors whose scores fall below the determinacy caution in some group."""
        out = []
        for q in self.quality:
            out += [f for f, low in zip(q.factors, q.low_determinacy) if low and f not in out]
        return tuple(out)

    def to_dict(self) -> dict:
        return {
            "admissible": self.fit.admissible,
            "problems": [p.to_dict() for p in self.fit.problems],
            "rows": self.rows,
            "rows_scored": self.rows_scored,
            "rows_not_scored": {why.value: n for why, n in self.not_scored.items()},
            "lines_without_data": {why.value: n for why, n in self.lines_without_data.items()},
            "names_row": self.names_row,
            "unanswered_factors": self.unanswered.value,
            "rows_with_a_factor_left_empty": self.lines_left_partly_empty,
            "methods": [m.value for m in self.methods],
            "factors": list(self.factors),
            "id_column": self.id_name,
            "scored_data": self.scored_source,
            "scores_file": self.file_format.to_dict(),
            "columns": [str(c) for c in self.table.columns],
            "columns_of_the_data": list(self.carried),
            "standard_errors": self.standard_errors,
            "unscored": [{"reason": r, "method": m, "rows": dict(zip(self.factors, map(int, counts)))}
                         for r, m, counts in self.unscored],
            "quality": [q.to_dict() for q in self.quality],
            "determinacy_caution": DETERMINACY_CAUTION,
            "low_determinacy": list(self.low_determinacy),
            "warnings": [str(w) for w in self.warnings],
            "notes": [str(x) for x in self.notes],
            **({"item_sums": [g.to_dict() for g in self.item_sums]} if self.item_sums else {}),
            "fit": self.fit.to_dict(),
        }

    def csv(self) -> str:
        """The scores as CSV text: full precision, empty cells where there is no score, every id and column name as
        written in the data (a file of rows merged back by its ids: '-A12' stays '-A12', never given the
        spreadsheet-formula guard of report tables, reporting.text_formats, which would change the key; hostile
        trial s17, finding 3), with the separator and decimal mark of the data file (:attr:`file_format`; the file's
        whole text, with the byte-order mark the data file's convention has: :meth:`file_text`)."""
        return self.table.to_csv(index=False, na_rep="", float_format="%.10g", lineterminator="\n",
                                 sep=self.file_format.separator, decimal=self.file_format.decimal)

    def file_text(self) -> str:
        """The scores file's whole text as written (in UTF-8): :meth:`csv`, after a byte-order mark when the data
        file's convention has one (a spreadsheet's 'CSV UTF-8', or data in a Windows code page: data.csv_convention);
        ``Path(...).write_text(result.file_text(), encoding="utf-8")`` writes the file the command writes."""
        return self.file_format.file_text(self.csv())


    def __str__(self) -> str:
        return self.summary()


def scores(model, data, *, methods=None, standard_errors: bool = False, id_column: str | None = None,
           group: str | None = None, reference_group: str | None = None, sheet: str | None = None, names_row: int | None = None,
           first_data_row: int | None = None, missing_codes=(), keep=(), rename=None, ordinal=None, ordinal_estimator: str | None = None, weights: str | None = None,
           cluster: str | None = None, strata: str | None = None, weight_kind: str | None = None,
           least_answered: float | None = None, unanswered_factors=None,
           announce: Callable[[str], None] | None = None, **options) -> ScoreResult:
    """Fit ``model`` to ``data`` (as :func:`cfa_tool.fit` does, same options) and score every row.

    ``methods``: 'regression' (Thurstone 1935; the default), 'bartlett' (Bartlett 1937),
    'correlation-preserving' (Anderson & Rubin 1956; ten Berge et al. 1999), 'item-sum' and 'item-mean' (the keyed
    sum or mean of each factor's items, prorated from the answered ones: scoring.item_sums), or a list of them;
    ordinal items are scored by their posterior mean with its posterior standard deviation instead (item sums and
    means beside it when asked for).
    ``least_answered``: the least share of a factor's items a row must answer for an item sum or mean (default .5,
    common practice); only with item sums or means.
    ``unanswered_factors``: what to do with a regression score or posterior mean of a factor a row answered none of
    the items of, a prediction from its other answers: 'predict' (the default; a caution first says which rows have
    one) or 'leave-empty' (the cell empty, the file's why_not_scored column and the report saying why).
    ``announce``: given one line before a scoring of posterior means expected to take several seconds starts (the
    command line writes it on standard error when that is a terminal); never part of the result.
    ``standard_errors``: also write each score's standard error (root mean squared error about the
    factor given the row's answered items; for regression scores the posterior standard deviation).
    ``id_column``: a column written first to name each row (never analysed); without it, the file's
    row-name column (a first column without a name in the header) is written first when there is one.
    ``weights``, ``cluster``, ``strata``, ``weight_kind``: the sampling design the model is fitted under (as by
    :func:`cfa_tool.fit`); the scoring model (intercepts, thresholds) comes from the same weighted rows, while
    each row's score follows from its own answers and the parameters alone, so every row is scored, whatever
    its weight.

    Raises :class:`~cfa_tool.errors.EstimationError` when the estimation did not converge, and
    :class:`~cfa_tool.errors.OptionError` (exit 2, as cutoffs and align refuse it) when the fitted solution is
    estimated but not admissible: such a solution's scores would mean nothing.
    """
    from cfa_tool.pipeline import inputs as api
    from cfa_tool.data.row_ids import duplicate_note, ids_by_row_number, row_ids

    group_column(group)
    if api.summary_source(data):
        raise OptionError(f"'{data}' holds summary statistics; factor scores need the rows of answers")
    chosen = method_option(methods)
    rule = item_rule(chosen, least_answered)
    standard_errors = yes_or_no("standard_errors", standard_errors)
    fit_options = api.make_options(options, SCORES_KEYWORDS)
    design = design_columns(weights, cluster, strata, weight_kind)
    spec, loaded, notes = api.read_inputs_with_notes(model, data, sheet, missing_codes, keep,
                                                     (id_column,) if isinstance(id_column, str) else (),
                                                     names_row=names_row, first_data_row=first_data_row, rename=rename,
                                                     chosen=api.chosen_columns(group, id_column, design,
                                                                               fit_options.missing_helpers),
                                                     keeps_gaps=api.keeps_rows_with_gaps(fit_options.missing))
    api.without_exploratory_blocks(spec, "scores", "its factors' scores would be those of the unrotated block")
    # the model as the fit reads it, before anything checks it: --ordinal's items as an 'ordinal' statement's
    spec, ordinal_items = api.ordinal_model(spec, ordinal)
    frame, source = loaded.frame, loaded.source
    read_frame = _rows_as_read(loaded)
    read_index = read_frame.index
    if not caller_labels(read_index, loaded.frame_index).is_unique:
        raise OptionError("the data frame's index names a row twice; give it a unique index (e.g. reset_index) so "
                          "that every row can be scored in its place")
    ids = row_ids(read_frame, source, id_column, spec.observed_names, group, loaded.row_names)
    if ordinal_items:
        chosen = _ordinal_methods(methods, chosen, standard_errors, "")
    unanswered = unanswered_option(unanswered_factors, chosen)
    # the weights parsed once, as fit parses them: for the fit, the groups weighted out and the rows scored from
    loaded = api.with_design_weights(api.analysed_odd_values(loaded, spec, group), design, spec, group)
    with api.odd_values_named(loaded):  # values that look like no answers: named first when the fit fails
        result = api._fit_rows(spec, loaded, notes, group, reference_group, fit_options, ordinal, ordinal_estimator,
                               design, ids)  # the rows left out named by their ids, as fit names them
        api.reference_group_applies(result, reference_group)  # one that sets nothing cannot apply, as in fit
        if not result.converged:
            raise EstimationError(f"the model's estimation did not converge ({result.message}), so no factor scores "
                                  f"are written; run 'fit' to see its problems")
        from cfa_tool.assessment.admissibility import refuse_inadmissible_fit
        # estimated but not admissible: exit 2, the one code of cutoffs, align and a saved fit's scores for it
        # (docs/commands.md: exit 3 is a model that could not be estimated)
        refuse_inadmissible_fit(result.problems, f"{spec.source} fitted to {source}", "no factor scores are written",
                                remedy="score its rows")
    # the data's cautions as fit gives them (rows that gave one answer to every item, reverse-worded ones included,
    # named by their ids: scored like every row)
    fitted_problems = result.problems
    # and what was read as no answer (codes given, values the file marks so), which the methods paragraph names as
    # fit's does (new-user trial s18: the scores' paragraph left out the codes 8 and 9)
    result = api.with_missing_reading(api.with_odd_values(result, loaded, group, spec, design,
                                                          ids_by_row_number(ids, read_frame),
                                                          api.id_filter_column(id_column, loaded)), loaded, missing_codes)
    data_cautions = tuple(p for p in result.problems if p not in fitted_problems)
    chosen_by = api.reference_note(result, frame, group, reference_group)  # as fit names the reference group
    if chosen_by:
        result = replace(result, warnings=tuple(result.warnings) + tuple(chosen_by))
    fitted_rows = _fitted_rows(frame, design, spec, group, source, loaded.weights)
    if ordinal_items:
        models, labels = _ordinal_models(spec, fitted_rows, source, ordinal_items, group, reference_group, result, design)
    else:
        models, labels = _linear_models(spec, fitted_rows, source, group, reference_group, fit_options, result, design)
    factors = models[0].base.factors if ordinal_items else models[0].factors
    items = models[0].base.items if ordinal_items else models[0].items
    rows = _numeric(frame, items, source)
    group_of_row = _group_keys(frame, group) if group is not None else np.full(len(frame), None, dtype=object)
    kept = frame.index

    m = len(factors)
    values = {meth: np.full((len(read_index), m), np.nan) for meth in chosen}
    errors = {meth: np.full((len(read_index), m), np.nan) for meth in chosen}
    counts: dict = {}
    position = pd.Series(np.arange(len(read_index)), index=read_index)
    sums = _sum_scores(models, spec, bool(ordinal_items), labels, result.problems)
    summaries = _score_each_group(models, labels, spec, result, rule, rows, group_of_row, group, chosen,
                                  bool(ordinal_items), position.loc[kept].to_numpy(), values, errors, counts, sums,
                                  announce)
    reasons = _row_reasons(read_index, kept, rows, group_of_row, group, labels)
    _count_rows_left_out(reasons, chosen, m, counts)

    answered = _items_answered(models[0].base if ordinal_items else models[0], rows,
                               position.loc[kept].to_numpy(), len(read_index))
    written, written_errors, left = _left_empty(answered, values, errors, chosen, unanswered, counts)
    carried = tuple(c for c in carried_columns(loaded.row_filters, group, design) if c in read_frame.columns)
    id_name, columns = _score_columns(ids, id_column, chosen, factors, written, written_errors,
                                      bool(standard_errors or ordinal_items), answered,
                                      {c: read_frame[c].tolist() for c in carried})
    columns = _with_same_answer_column(columns, id_name, spec, items, rows, position.loc[kept].to_numpy(),
                                       len(read_index))
    table = _in_file_order(pd.DataFrame(columns, index=read_index), data, loaded.names_row_read)  # a frame's own index: joins
    table = _with_why_not_scored(table, id_name, score_columns(chosen, factors), reasons,
                                 pd.Series(left, index=read_index))
    table.index = caller_labels(table.index, loaded.frame_index)
    quality = _ordinal_quality(models, labels, values[chosen[0]], errors[chosen[0]], position, kept, group_of_row, group,
                               spec, answered, sums) if ordinal_items else _linear_quality(models, spec, sums)
    result, few = _few_clusters_as_note(result)
    partly = _partly_answered(models[0].base if ordinal_items else models[0], answered, chosen, errors)
    extra = few + duplicate_note(ids, "id column" if id_column is not None else "row names", False) \
        + partly_answered_note(partly)
    if ids is not None and id_column is None:
        extra.insert(0, Note((f"The first column holds the row names of {source} (its first column, which has no "
                              f"name in the header)", Command(f"; give {Option.ID_COLUMN.given('COLUMN')} to name the "
                                                              "rows by another column"), ".")))
    elif ids is None and not isinstance(data, pd.DataFrame):
        extra[:0] = _id_column_note(read_frame, source, spec, group, design)
    own = not_comparable_problems(result.estimates, chosen) + _without_own_answers(
        answered, values, chosen, factors, unanswered) + _item_sums_across_groups(
        models, labels, sums, chosen, bool(ordinal_items), group, spec.method_factors, result.problems)
    if own:
        result = _after_data_cautions(result, data_cautions, own)
    unweighted = len(frame) - len(fitted_rows)  # weight 0: not in the fit, yet scored like every row
    if unweighted:
        which = "The row of weight 0 is" if unweighted == 1 else f"The {unweighted} rows of weight 0 are"
        extra.append(f"{which} scored all the same: a row's score follows from its own answers and the fitted "
                     f"parameters, whatever its weight")
    unscored = tuple((reason, meth, tuple(int(v) for v in c)) for (reason, meth), c in counts.items())
    return ScoreResult(result, chosen, tuple(factors), id_name, table, tuple(quality), unscored,
                       bool(standard_errors or ordinal_items), tuple(extra),
                       item_sums=summaries,
                       unanswered=unanswered, names_row=_names_row(loaded, data),
                       file_format=convention_of(loaded.reading), carried=_carried_here(carried, id_name),
                       partly_answered=partly)


def _id_column_note(read_frame: pd.DataFrame, source: str, spec, group, design) -> list[Note]:
    """When no column names the rows in the scores file: a column of ``read_frame`` that could (data.row_ids.
    id_like_column), named with the option that writes it beside the scores (new-user trial s17: a survey
    platform's file with an employee code in every row gave scores matched back to people by position only)."""
    from cfa_tool.data.row_ids import id_like_column

    skip = set(spec.observed_names) | {group} | {name for _, name in (design.names if design is not None else ())}
    column = id_like_column(read_frame, skip)
    if column is None:
        return []
    return [Note((f"No column names the rows in the scores file, whose lines follow the rows of {source} in order; "
                  f"the column '{printable(column)}' holds a different value in every row and could name them",
                  Command(f" ({Option.ID_COLUMN.given(column)})"), "."))]


def _few_clusters_as_note(result) -> tuple[FitResult, list[str]]:
    """The fit without its caution on too few clusters, and a one-line note in its place: that caution is about the
    fit's standard errors and tests, and clusters change no score (new-user trial s20: it headed the scores' report)."""
    from cfa_tool.assessment.admissibility import ProblemKind

    few = [p for p in result.problems if p.kind is ProblemKind.FEW_CLUSTERS]
    if not few:
        return result, []
    design = getattr(result, "design", None)  # a saved fit (SavedFit) has none
    clusters = ("few clusters" if few[0].value is None else f"only {int(few[0].value)} clusters") + (
        f" of '{design.columns.cluster}'" if design is not None and design.columns.cluster else "")
    return (replace(result, problems=tuple(p for p in result.problems if p.kind is not ProblemKind.FEW_CLUSTERS)),
            [f"The fit's standard errors and test rest on {clusters}, too few to trust its joint tests (see the "
             f"fit's report); clusters change no score"])


def _item_sums_across_groups(models, labels, sums: list, chosen, ordinal: bool, group: str | None,
                             method_factors: frozenset = frozenset(), problems=()) -> tuple:
    """The caution, first in every view, on item sums and means of several groups whose model sets an item of the
    sum apart between them (its intercept, loading or thresholds: scoring.item_sums.group_shifts) while it compares
    the factor's means: the groups' sums and means differ by that item's own shift besides the factor, and the
    model-based scores, which allow for it, are the ones to compare (new-user trial s20: a translated version's
    shifted item made its item means differ by a quarter of their SD while the factor's scores agreed, with no
    word).  () without item sums or means, groups or such items.  ``method_factors`` get no item sum or mean (their
    column is empty), so no caution names them (new-user trial s24: an acquiescence factor on every item was named);
    nor the factors whose sums the fit withholds in every group (``problems``: the fit's; their loadings contradict
    the declared keying, assessment.reliability.withheld_sums), whose columns are empty too (s26)."""
    from cfa_tool.assessment.admissibility import Problem, ProblemKind
    from cfa_tool.scoring.item_sums import group_shifts

    from cfa_tool.assessment.reliability import withheld_sums

    summed = [m for m in ITEM_METHODS if m in chosen]
    if not summed or group is None or len(models) < 2 or not sums:
        return ()
    withheld = withheld_sums(problems)
    empty = method_factors | {s.factor for s in sums[0]
                              if all((str(label), s.factor) in withheld for label in labels)}
    bases = [m.base for m in models] if ordinal else list(models)
    shifts = group_shifts(bases, [m.thresholds for m in models] if ordinal else None, [str(x) for x in labels],
                          [s for s in sums[0] if s.factor not in empty])
    if not shifts:
        return ()
    kinds = word_list(dict.fromkeys(("item sums" if m is ScoreMethod.ITEM_SUM else "item means") for m in summed))
    factors = tuple(dict.fromkeys(x.factor for x in shifts))

    def said(x) -> str:
        what = word_list(("intercept" if k == "intercept" else "loading" if k == "loading" else "thresholds")
                            for k in x.parameters)
        of = f"{printable(x.factor)}: " if len(factors) > 1 else ""
        if x.intercepts:
            values = ", ".join(f"{printable(g)} {v:.2f}" for g, v in zip(x.groups, x.intercepts))
            return f"the {what} of {printable(x.item)} ({of}intercept {values})"
        return f"the {what} of {printable(x.item)} ({of}differing in {word_list(printable(g) for g in x.groups)})"

    names = word_list(printable(f) for f in factors)
    model_based = "posterior means" if ordinal else "regression or Bartlett scores"
    return (Problem(ProblemKind.ITEM_SUMS_ACROSS_GROUPS, (), float(len(shifts)),
                    f"The {kinds} of {names} do not compare across the groups of {printable(group)}: while it "
                    f"compares the factor means, the model sets apart between groups "
                    + "; ".join(said(x) for x in shifts)
                    + f", so the groups' {kinds} of "
                    f"{'that factor' if len(factors) == 1 else 'those factors'} differ by each such item's own shift "
                    f"as well as by the factor (a difference in the {kinds} that the factor may not have).",
                    f"compare the groups by the model-based scores of {names} ({model_based}), which allow for those "
                    f"items; read the {kinds} within one group only."),)


def _after_data_cautions(result, data_cautions, scored) -> FitResult:
    """``result`` with the cautions on the rows ``scored`` placed as a fit places its own problems
    (pipeline.inputs.with_odd_values): after the cautions on the data (``data_cautions``, among ``result``'s
    problems), which may be their cause (a code of --missing-codes that empties answers before the rows left
    without a factor's answers: re-check s17, finding 08), before the rest; an impossible solution first
    (assessment.admissibility.solution_first)."""
    from cfa_tool.assessment.admissibility import solution_first

    first = tuple(p for p in result.problems if p in data_cautions)
    rest = tuple(p for p in result.problems if p not in data_cautions)
    return replace(result, problems=solution_first(first + tuple(scored) + rest))


def _score_each_group(models, labels, spec, fit, rule, rows, group_of_row, group, chosen, ordinal: bool,
                      places: np.ndarray, values: dict, errors: dict, counts: dict,
                      sums: list, announce: Callable[[str], None] | None = None) -> tuple[ItemSumSummary, ...]:
    """Every row of each group scored by each chosen method into ``values`` and ``errors`` (rows read, at
    ``places``: the place of each row of ``rows`` among them), the rows without a score counted into ``counts``
    by (reason, method); the summary of each group's item sums and means (none when ``rule`` is None), whose
    reliability and spread are the group's keyed sums' quality ``sums[g]`` (:func:`_sum_scores`).  ``announce`` is
    given the line that says a long scoring of posterior means is starting (scoring.ordinal.scoring_announcement)."""
    m = values[chosen[0]].shape[1]
    if announce is not None and ordinal and factor_methods(chosen):
        from cfa_tool.scoring.ordinal import scoring_announcement

        line = scoring_announcement(models[0], len(rows))
        if line is not None:
            announce(line)
    summaries = []
    from cfa_tool.assessment.reliability import withheld_sums

    withheld = withheld_sums(fit.problems)  # (group, factor) of the sums the fit withholds: one group names none
    for model_g, label, sums_g in zip(models, labels, sums):
        sel = np.flatnonzero(group_of_row == label) if group is not None else np.arange(len(rows))
        held = frozenset(f for g, f in withheld if g == (label if len(models) > 1 else None))
        parts = None if rule is None else _item_parts(model_g.base if ordinal else model_g, spec, fit.data, sums_g,
                                                       rule, model_g.categories if ordinal else None, held)
        prorated: tuple = ()
        spread: tuple = ()
        if len(sel):
            at = places[sel]
            out, prorated, spread = _score_group(model_g, rows[sel], chosen, ordinal, parts)
            for meth, (v, e, unscored) in out.items():
                values[meth][at], errors[meth][at] = v, e
                for why, c in unscored.items():
                    key = (why.value, meth.value)
                    counts[key] = counts.get(key, np.zeros(m, dtype=np.int64)) + np.asarray(c, dtype=np.int64)
        if parts is not None:
            summaries.append(replace(parts.summary, prorated=prorated or (0,) * len(parts.summary.factors),
                                     precision=item_sum_precision(parts.summary.sums, chosen), prorated_sem=spread))
    return tuple(summaries)


def _sum_scores(models, spec, ordinal: bool, labels, problems) -> list[tuple[SumScore, ...]]:
    """Each group's keyed sums with their reliability and spread under the fitted model (scoring.quality
    .sum_quality, or ordinal_sum_quality for ordinal items), computed once: the quality tables and the item sums'
    summary read the same objects.  A sum whose reliability the fit withholds (``problems``, the fit's: its loadings
    contradict the declared keying, assessment.reliability.withheld_sums) has no omega here either, nor a correlation
    with its factor or a spread (the fit withholds its SD: it describes no scale; the JSON gave them, s25)."""
    from cfa_tool.assessment.reliability import withheld_sums

    declared = _declared(spec)
    sums = [ordinal_sum_quality(m, declared) if ordinal else sum_quality(m, declared) for m in models]
    withheld = withheld_sums(problems)
    if not withheld:
        return sums
    one = len(models) == 1  # one group: its problems name no group
    nan = float("nan")
    return [tuple(replace(s, omega=nan, validity=nan, variance=nan)
                  if (None if one else label, s.factor) in withheld else s for s in group_sums)
            for group_sums, label in zip(sums, labels if labels is not None else [None] * len(sums))]


def _partly_answered(model, answered: np.ndarray, chosen, errors: dict) -> tuple[PartlyAnswered, ...]:
    """:func:`partly_answered` of the first factor-score method written (none for item sums and means alone, whose
    prorating the report says)."""
    first = factor_methods(chosen)
    return partly_answered(model, answered, first[0], errors[first[0]]) if first else ()


def _ordinal_methods(methods, chosen, standard_errors: bool, whose: str) -> tuple[ScoreMethod, ...]:
    """The methods of ordinal items: the posterior mean, with the item sums and means asked for beside it (a
    linear method, or standard errors, cannot apply: :func:`_ordinal_choices`)."""
    items = tuple(m for m in chosen if m in ITEM_METHODS)
    _ordinal_choices(None if methods is None or (items and len(items) == len(chosen)) else methods,
                     standard_errors, whose)
    return (ScoreMethod.EXPECTED_A_POSTERIORI,) + (items if methods is not None else ())


#: the keywords of :func:`scores` besides the fit options it passes on (an unknown keyword's near names,
#: make_options), read from its signature once
SCORES_KEYWORDS = own_keywords(scores)


def models_of_fit(result: FitResult) -> tuple[list, list]:
    """Each group's scoring model from a fit result alone (its model text and estimates), for scoring other
    data with the parameters of this fit.  A fit without a mean structure (one group, complete rows) takes
    its intercepts from the sample means of the rows it was fitted to."""
    from cfa_tool.pipeline.continuous import model_structure
    from cfa_tool.language.parser import parse_model
    from cfa_tool.scoring.model import scoring_model

    if result.theta is None:
        raise OptionError("this result holds no estimates to score with (a fit to summary statistics?)")
    refuse_unknown_scale(result.data, "the fit")
    spec = parse_model(result.model_text, source=result.model_source)
    from cfa_tool.pipeline.inputs import without_exploratory_blocks

    without_exploratory_blocks(spec, "scores", "its factors' scores would be those of the unrotated block")
    if result.method.ordinal:
        labels = tuple(g.label for g in result.groups) if result.multigroup else None
        from cfa_tool.model.saved_estimates import saved_rows

        source = "the fit result"
        return ordinal_models_of_estimates(spec, saved_rows([row.to_dict() for row in result.estimates], source),
                                           result.data, labels, source)
    labels = tuple(g.label for g in result.groups) if result.multigroup else None
    mean_structure = result.multigroup or any(r.kind == "intercept" for r in result.estimates)
    table, model = model_structure(spec, labels, mean_structure)
    if table.n_free != len(result.theta) or tuple(table.observed) != tuple(result.observed):
        raise OptionError("the result's estimates do not match its model text; refit the model")
    out = []
    for g, group in enumerate(result.groups):
        means = None if mean_structure else np.asarray(group.sample_mean, dtype=float)
        out.append(scoring_model(model.matrices(result.theta, g), table.observed, table.latent, group.label, means))
    return out, [g.label for g in result.groups]


def refuse_unknown_scale(data, what: str) -> None:
    """An error when the fit (``data``: its DataSummary) is of summary statistics without the items' means or, for a
    correlation matrix, their standard deviations: raw answers are scored as deviations from the fitted sample's
    means, in the units of its covariance matrix, so such a fit would give every row a wrong score."""
    lacking = tuple(getattr(data, "not_given", ()))
    if not lacking:
        return
    words = word_list([g.label for g in lacking], "or")
    raise OptionError(f"{what} is of summary statistics ({printable(str(data.source))}) without {words}, and scores of "
                      f"answers need the fitted sample's item means and standard deviations; add the "
                      f"{word_list(repr(_SUMMARY_ROW[g]) for g in lacking)} row{'s' if len(lacking) > 1 else ''} to "
                      f"that file and fit again, or fit the model to the rows of answers")


def score_with_fit(result: FitResult, data, *, methods=None, standard_errors: bool = False, id_column: str | None = None,
                   sheet: str | None = None, missing_codes=(), keep=(), names_row: int | None = None,
                   least_answered: float | None = None, first_data_row: int | None = None,
                   rename=None, unanswered_factors=None) -> ScoreResult:
    """Scores of the rows of ``data`` with the parameters of an earlier fit (``result``): a scale calibrated in one
    sample scores another.  With groups, ``data`` needs the fit's group column, and each row is scored with its
    group's parameters (a row of a group the fit does not have gets no scores).  The quality figures are those of
    the fitted model; the report's fit is the earlier one.  A fit whose solution is not admissible is refused as a
    saved one is (:class:`~cfa_tool.errors.OptionError`, exit 2 on the command line: the fit is an input the run
    cannot use; it estimates no model)."""
    from cfa_tool.assessment.admissibility import refuse_inadmissible_saved_fit

    if not isinstance(result, FitResult):
        raise OptionError(f"scores need a fit result (cfa_tool.fit), not {type(result).__name__}")
    refuse_inadmissible_saved_fit({"admissible": result.admissible, "converged": result.converged}, result.problems,
                                  "the fit result given", "no factor scores are computed with it")
    chosen = _saved_methods(methods, result.method.ordinal, standard_errors)
    rule = item_rule(chosen, least_answered)
    unanswered = unanswered_option(unanswered_factors, chosen)
    models, labels = models_of_fit(result)
    return _score_other_data(result, _spec_of(result), models, labels, data, chosen, standard_errors, id_column, sheet,
                             missing_codes, keep, names_row, first_data_row, rule, rename, unanswered)


def _score_other_data(result, spec, models, labels, data, chosen, standard_errors, id_column, sheet, missing_codes,
                      keep, names_row=None, first_data_row=None, rule: ItemSumRule | None = None,
                      rename=None, unanswered: UnansweredFactor = UnansweredFactor.PREDICT,
                      announce: Callable[[str], None] | None = None) -> ScoreResult:
    """Rows of ``data`` scored with the given models (one per group of the earlier fit ``result``)."""
    from cfa_tool.pipeline import inputs as api
    from cfa_tool.data.row_ids import duplicate_note, ids_by_row_number, row_ids

    from cfa_tool.data.missing_codes import names_the_given_codes
    from cfa_tool.data.non_answers import fit_marked, run_words

    given, words = api.missing_values_option(missing_codes)
    # the earlier fit's codes and words of no answer, read so here too (words alike but for case are one word)
    known = {w.casefold() for w in words + run_words()}
    carried = tuple(c for c in result.data.missing_codes if c not in given) + tuple(
        w for w in result.data.no_answer_words if w.casefold() not in known)
    # and the codes its data file declared missing or labelled so, in their own items (an export without them)
    from cfa_tool.data.joined_answers import held_across

    # the earlier fit's joined categories need not all be answered in the rows scored (held_across's check False)
    with fit_marked(tuple(getattr(result.data, "non_answers", ()) or ()),
                    tuple(getattr(result.data, "declared_ranges", ()) or ())), held_across(spec, check=False):
        spec, loaded, notes = api.read_inputs_with_notes(spec, data, sheet, given + words + carried, keep,
                                                         (id_column,) if isinstance(id_column, str) else (),
                                                         names_row=names_row, first_data_row=first_data_row,
                                                         rename=rename,
                                                         chosen=api.chosen_columns(result.group_column, id_column))
    frame, source = loaded.frame, loaded.source
    from cfa_tool.data.labels import refuse_moved_labels  # answers coded otherwise than in the fit's data: refused

    refuse_moved_labels(getattr(result, "labels", None) or getattr(result, "payload", {}).get("labels"),
                        loaded.value_labels, spec.observed_names, source, result.data.source)
    read_frame = _rows_as_read(loaded)
    if not len(read_frame):
        raise DataError(f"{source} has no rows to score")
    if not caller_labels(read_frame.index, loaded.frame_index).is_unique:
        raise OptionError("the data frame's index names a row twice; give it a unique index (e.g. reset_index)")
    group = result.group_column
    if group is not None and group not in read_frame.columns:
        raise OptionError(f"the fit has groups by '{printable(group)}', which is not a column of {source}")
    ids = row_ids(read_frame, source, id_column, result.observed, group, loaded.row_names)
    if carried:
        if not given and not words:  # no code was given in this run: the reading's notes that say so are not said
            notes[:] = [n for n in notes if not names_the_given_codes(n)]
        notes.insert(0, _carried_note(carried, loaded, source))
    # the cautions about the scored file computed on it, first; the earlier fit's own said to be about the fit
    # (ids of several rows first, as every command names them: pipeline.inputs.repeated_id_problems)
    own = api.repeated_id_problems(loaded, ids_by_row_number(ids, read_frame), api.id_filter_column(id_column, loaded)) \
        + api.odd_value_problems(api.analysed_odd_values(loaded, spec, group), group) + api.same_answer_problems(
        api._labelled(frame, group) if group is not None else frame, spec, ids_by_row_number(ids, read_frame),
        scored_only=True, by_loadings=api.reversed_by_loadings(result))
    # (the fit's own file scored again: its findings of the same kinds are the scored file's, said once)
    again = {p.kind for p in own} if (source, len(read_frame)) == (result.data.source, result.data.rows_read) else set()
    result, few = _few_clusters_as_note(result)
    notes[:0] = few
    result = replace(result, problems=own + tuple(_about_the_fit(p) for p in result.problems
                                                  if p not in own and p.kind not in again))
    from cfa_tool.scoring.model import OrdinalScoringModel

    ordinal = isinstance(models[0], OrdinalScoringModel)
    base = models[0].base if ordinal else models[0]
    rows = _numeric(frame, base.items, source)
    group_of_row = _group_keys(frame, group) if group is not None else np.full(len(frame), None, dtype=object)
    unknown_groups = _unknown_groups(group_of_row, labels, group, source) if group is not None else None
    m = base.m
    n = len(read_frame)
    values = {meth: np.full((n, m), np.nan) for meth in chosen}
    errors = {meth: np.full((n, m), np.nan) for meth in chosen}
    position = pd.Series(np.arange(n), index=read_frame.index)
    if ordinal:
        _check_categories(models[0], rows, row_numbers(frame), source, row_naming(frame))
    counts: dict = {}
    sums = _sum_scores(models, spec, ordinal, labels, result.problems)
    summaries = _score_each_group(models, labels, spec, result, rule, rows, group_of_row, group, chosen, ordinal,
                                  position.loc[frame.index].to_numpy(), values, errors, counts, sums, announce)
    reasons = _row_reasons(read_frame.index, frame.index, rows, group_of_row, group, labels)
    _count_rows_left_out(reasons, chosen, m, counts)
    factors = base.factors
    with_errors = bool(standard_errors or ordinal)  # a posterior mean always comes with its posterior SD
    answered = _items_answered(base, rows, position.loc[frame.index].to_numpy(), n)
    written, written_errors, left = _left_empty(answered, values, errors, chosen, unanswered, counts)
    carried = tuple(c for c in carried_columns(loaded.row_filters, group) if c in read_frame.columns)
    id_name, columns = _score_columns(ids, id_column, chosen, factors, written, written_errors, with_errors, answered,
                                      {c: read_frame[c].tolist() for c in carried})
    columns = _with_same_answer_column(columns, id_name, spec, base.items, rows, position.loc[frame.index].to_numpy(), n)
    from cfa_tool.assessment.admissibility import Problem, ProblemKind

    # first in every view, before the fit's own (the rows scored are this run's data): the rows' own cautions (rows
    # in groups the fit does not have, after their cause among the data's cautions), then the scores'
    scored_problems = list(not_comparable_problems(result.estimates, chosen)
                           + _without_own_answers(answered, values, chosen, factors, unanswered)
                           + _item_sums_across_groups(models, labels, sums, chosen, ordinal, group,
                                                      spec.method_factors, result.problems))
    if unknown_groups:
        scored_problems.insert(0, Problem(ProblemKind.UNKNOWN_GROUPS_SCORED, (), None, unknown_groups + ".",
                                          "write each row's group as the fit's data wrote it, or fit the model to "
                                          "these groups."))
    # answers coded otherwise than in the fit's data, first: every score of the factor moves with them
    scored_problems[:0] = [Problem(kind, (), None, text, advice) for kind, text, advice in
                           _coded_otherwise(result.data, base, rows, source, ordinal,
                                            declared_scales_of(result.data, spec, frame),
                                            models[0] if ordinal and len(models) == 1 else None)]
    if scored_problems:
        result = _after_data_cautions(result, own, scored_problems)
    partly = _partly_answered(base, answered, chosen, errors)
    notes = list(notes) + duplicate_note(ids, "id column" if id_column is not None else "row names", False) \
        + partly_answered_note(partly)
    if ids is None and not isinstance(data, pd.DataFrame):
        notes[:0] = _id_column_note(read_frame, source, spec, group, None)
    if group is not None:
        from cfa_tool.data.labels import label_notes

        notes += label_notes(frame, group)
    if ordinal:
        quality = _ordinal_quality(models, labels, values[chosen[0]], errors[chosen[0]], position, frame.index,
                                   group_of_row, group, spec, answered, sums)
        notes.insert(0, f"Scores of {source} with the parameters of the earlier fit of {result.model_source} to "
                        f"{result.data.source} (loadings, thresholds and factor covariances); the quality figures "
                        f"(marginal reliability) are those of the scores of {source}.")
    else:
        quality = _linear_quality(models, spec, sums)
        notes.insert(0, f"Scores of {source} with the parameters of the earlier fit of {result.model_source} to "
                        f"{result.data.source}; the quality figures are those of that fit.")
    unscored = tuple((reason, meth, tuple(int(v) for v in c)) for (reason, meth), c in counts.items())
    table = _with_why_not_scored(_in_file_order(pd.DataFrame(columns, index=read_frame.index), data,
                                                  loaded.names_row_read), id_name,
                                 score_columns(chosen, factors), reasons, pd.Series(left, index=read_frame.index))
    table.index = caller_labels(table.index, loaded.frame_index)
    return ScoreResult(result, chosen, tuple(factors), id_name, table, tuple(quality),
                       unscored, with_errors, tuple(notes), source, (), summaries, unanswered,
                       _names_row(loaded, data), convention_of(loaded.reading), _carried_here(carried, id_name),
                       partly_answered=partly)


def _carried_here(carried: tuple[str, ...], id_name: str | None) -> tuple[str, ...]:
    """The carried columns (:func:`carried_columns`) the scores file writes beside the ids: the id column not again."""
    return tuple(c for c in carried if c != id_name)


def _names_row(loaded, data) -> int:
    """The row of a scored file that holds the column names (:attr:`ScoreResult.names_row`); 1 for a data frame,
    whose scores keep its own index."""
    return 1 if isinstance(data, pd.DataFrame) else int(loaded.names_row_read or 1)


def _check_categories(model, rows: np.ndarray, data_rows: np.ndarray, source: str,
                      naming: RowNaming = RowNaming.FILE_ROW) -> None:
    """Every answer to an ordinal item must be one of the categories the earlier fit estimated thresholds for: an
    error naming the item, the row and the value otherwise (``data_rows``: each row's number in the file,
    data.moments.row_numbers, named as ``naming`` says)."""
    for j, cats in enumerate(model.categories):
        if not cats:
            continue
        column = rows[:, j]
        unknown = ~np.isnan(column) & ~np.isin(column, np.asarray(cats))
        if unknown.any():
            k = int(np.flatnonzero(unknown)[0])
            said = (f"{source}: ordinal item '{printable(model.base.items[j])}' has the answer {user_number(column[k])} in "
                    f"{naming.one_row(int(data_rows[k]))}, which is not one of the categories the earlier fit "
                    f"estimated thresholds for ({', '.join(f'{user_number(v)}' for v in cats)})")
            shifted = _shifted_items(model, rows)
            if j in shifted:
                shift, items = shifted[j], [model.base.items[i] for i, s in shifted.items() if s == shifted[j]]
                from cfa_tool.data.shifted_scales import shift_words

                named = word_list([f"'{printable(x)}'" for x in items])
                raise DataError(f"{said}; {named} "
                                f"{'runs' if len(items) == 1 else 'run'} {user_number(cats[0] + shift)} to "
                                f"{user_number(cats[-1] + shift)} in {source}, the fit's categories moved by "
                                f"{user_number(shift)}: if the file codes the same answers {user_number(abs(shift))} "
                                f"{'higher' if shift > 0 else 'lower'}, {shift_words(shift)} "
                                f"{'its' if len(items) == 1 else 'their'} answers in a copy of the file and score "
                                f"the copy")
            raise DataError(f"{said}; recode it or leave it out")


def _shifted_items(model, rows: np.ndarray) -> dict[int, float]:
    """{item's position: the shift} of the ordinal items whose answers in ``rows`` run over the earlier fit's
    categories moved by one amount (data.shifted_scales.scale_shift), every answer on the moved categories."""
    from cfa_tool.data.shifted_scales import scale_shift

    found = {}
    for j, cats in enumerate(model.categories):
        column = rows[:, j][~np.isnan(rows[:, j])]
        if not cats or not len(column):
            continue
        shift = scale_shift((cats[0], cats[-1]), (float(column.min()), float(column.max())))
        if shift is not None and np.isin(column, np.asarray(cats) + shift).all():
            found[j] = shift
    return found


def _saved_methods(methods, ordinal: bool, standard_errors: bool = False) -> tuple[ScoreMethod, ...]:
    """The scoring methods for an earlier fit: ordinal items have one, the posterior mean (with item sums and means
    beside it when asked for)."""
    chosen = method_option(methods)
    if not ordinal:
        return chosen
    return _ordinal_methods(methods, chosen, standard_errors, "the earlier fit has ordinal items, which are")


def _ordinal_choices(methods, standard_errors: bool, whose: str) -> None:
    """Ordinal items are scored one way, by their posterior mean with its standard deviation always beside it: a
    scoring method or a request for standard errors cannot apply (one rule for both)."""
    scored = f"{whose or 'ordinal items are'} scored by their posterior mean, always written with its standard deviation"
    if methods is not None:
        raise OptionError(f"{scored}, so a scoring method cannot be chosen (the item sums and means item-sum and "
                          f"item-mean can, beside it); remove that method")
    if standard_errors:
        raise OptionError(f"{scored} (the score's standard error), so standard errors cannot be asked for; remove "
                          f"that option")


@dataclass(frozen=True, eq=False)
class SavedFit:
    """An earlier fit as its JSON result holds it: what the report of scores made with it shows."""

    model_name: str
    model_source: str
    estimator: str
    n_obs: int
    data: object  # DataSummary
    observed: tuple[str, ...]
    problems: tuple
    warnings: tuple[str, ...]
    group_column: str | None
    estimates: tuple  # model.saved_estimates.SavedRow per estimate row, read once (kind, variables, group, estimate)
    payload: dict = field(repr=False)
    source: str = "the fit result"  # the file, as messages name it

    @property
    def admissible(self) -> bool:
        return bool(self.payload.get("converged")) and not any(p.kind.inadmissible for p in self.problems)

    def to_dict(self) -> dict:
        return {k: v for k, v in self.payload.items() if k not in ("tool", "version")}


def _carried_note(carried: tuple, loaded, source: str) -> str:
    """The note on the earlier fit's codes and words of no answer (its --missing-codes, ``carried``) read so in the
    data scored: each with the rows of the data scored that held it, counted over the rows the row filters kept
    (rows-s24: the note said every code 'was read as no answer' whether or not a row scored held it)."""
    from cfa_tool.data.kept_counts import analysed_words
    from cfa_tool.data.missing_codes import codes_shown
    from cfa_tool.data.non_answers import rows_saying

    kept = loaded.frame.index
    code_rows = dict(loaded.counts.code_rows) if loaded.counts is not None else {}
    held = []
    for c in carried:
        rows = code_rows.get(c, ()) if not isinstance(c, str) else rows_saying(loaded.non_answers, c)
        held.append((c, len(set(r for r in rows if r in kept))))
    filtered = loaded.read_frame is not None and len(loaded.read_frame) != len(loaded.frame)
    rows = f"the {counted(len(kept), 'row')}" + (f" {analysed_words(True, None)}" if filtered else " of the file")
    if len(held) == 1:
        (c, n), = held
        return (f"The earlier fit's code of no answer {codes_shown((c,))} (its missing-value codes and words of no "
                f"answer) was read as no answer in {source} too: {count_text(n) if n else 'no row'} of {rows} "
                f"held it")
    listed = ", ".join(f"{codes_shown((c,))} in {count_text(n) if n else 'none'}" for c, n in held)
    return (f"The earlier fit's codes of no answer (its missing-value codes and words of no answer) were read as no "
            f"answer in {source} too, held by these numbers of {rows}: {listed}")


def _about_the_fit(problem):
    """An earlier fit's problem as the report of other data scored with it carries it: said to be about the fit
    (:data:`ABOUT_THE_FIT`); a problem of the rows the fit read from its data file (a workbook's other sheets, its
    hidden rows, rows a saved case filter deselects) without its advice, whose options (--sheet, --keep) this run
    takes too and would apply to the data scored (new-user trial s23: the other-sheets box read as about the scores
    file), but with advice about the fit instead."""
    from cfa_tool.assessment.admissibility import ProblemKind as K

    problem = replace(problem, explanation=ABOUT_THE_FIT + problem.explanation)
    if problem.kind not in (K.OTHER_SHEETS_WITH_ITEMS, K.HIDDEN_ROWS, K.DESELECTED_ROWS):
        return problem
    return replace(problem, advice=FIT_ROWS_ADVICE)


#: the advice on the rows an earlier fit read from its data file, when other data are scored with it
FIT_ROWS_ADVICE = ("This concerns the rows the fit's parameters come from, not the data scored here: to change those "
                   "rows, fit the model again as the fit's own report advises, and score with the new fit.")


def read_saved_fit(path) -> SavedFit:
    """A fit's JSON result (``fit --json``), checked to be one; its problems begin with those of its estimates
    themselves (:func:`~cfa_tool.assessment.admissibility.saved_fit_problems`), and a row that cannot be read (as
    an estimate that is not a number) is named in an error."""
    from cfa_tool.assessment.admissibility import saved_fit_problems
    from cfa_tool.data.answer_words import coding_from_json
    from cfa_tool.data.missing_codes import codes_and_words
    from cfa_tool.data.non_answers import no_answer_codes_from_saved, non_answers_from_saved, ranges_from_saved
    from cfa_tool.input_files import input_json
    from cfa_tool.model.saved_estimates import saved_fit_payload, saved_rows
    from cfa_tool.pipeline.results import DataSummary, saved_categories

    source = f"'{printable(str(path))}'"
    # one rule with simulate's and power-simulation's --population-from: a fit's to_dict() saved from Python serves too
    payload = saved_fit_payload(input_json(Path(path), "fit result", OptionError), source, marked=False)
    rows = saved_rows(payload["estimates"], source)  # the estimate rows, read here once
    # the estimates themselves judged as a fresh fit is, whatever the file's flag and problems say
    problems = saved_fit_problems(payload, rows, source)
    try:
        d = payload["data"]
        counts = d.get("category_counts") or {}
        categories = saved_categories(d)
        means = tuple(float(v) for v in d["means"]) if d["means"] is not None else (0.0,) * len(d["variables"])
        not_given = tuple(NotGiven(v) for v in d.get("not_given", ()))
        if "not_given" not in d and not any(row.kind == "intercept" for row in rows) \
                and not any(means) and not counts:
            not_given = (NotGiven.MEANS,)  # written before fits said so: every item mean 0 is no mean at all
        summary = DataSummary(str(d["source"]), int(d["rows_read"] if d["rows_read"] is not None else d["n_obs"]),
                              int(d["rows_dropped"] or 0), int(d["n_obs"]),  # summary statistics: no rows
                              tuple(d["variables"]), means,
                              tuple(float(v) for v in d["sds"]) if d["sds"] is not None else (float("nan"),) * len(means),
                              categories=categories if counts else (), not_given=not_given,
                              missing_codes=codes_and_words(d.get("missing_codes", ()))[0],
                              no_answer_words=codes_and_words(d.get("no_answer_words", ()))[1],
                              non_answers=non_answers_from_saved(d.get("marked_no_answer_by_the_file")),
                              declared_ranges=ranges_from_saved(d.get("missing_ranges_declared_by_the_file"))
                              + no_answer_codes_from_saved(d.get("codes_labelled_no_answer_by_the_file")),
                              ranges=tuple((float(d["answer_ranges"][x][0]), float(d["answer_ranges"][x][1]))
                                           for x in d["variables"]) if d.get("answer_ranges") else (),
                              labelled_scales=tuple((str(x), float(low), float(high)) for x, (low, high) in
                                                    (d.get("answer_scales_labelled_by_the_file") or {}).items()),
                              answer_coding=coding_from_json(d.get("answer_coding"), source))
        model = payload["model"]
    except (ValueError, KeyError, TypeError, AttributeError):
        saved_fit_payload(None, source)  # the one error of a file that is not a saved fit
        raise
    return SavedFit(str(model.get("name")), str(model.get("source")), str(payload.get("estimator")), int(payload["n_obs"]),
                    summary, tuple(summary.variables), problems, _saved_warnings(payload),
                    payload.get("group_column"), rows, payload, source)


def _saved_warnings(payload: dict) -> tuple:
    """A saved fit's warnings: its "warnings" list holds each as the program's user reads it (a statement of the
    model file, an option in it), and its report holds the same lines with those parts apart (note_parts.Note), which
    the scores' Word file leaves out; each line is the report's Note where the report has it (alike but for the
    capital its report gives a line's first word), else the text as saved."""
    from cfa_tool.note_parts import read

    def key(text: str) -> str:
        return text[:1].lower() + text[1:]

    report = payload.get("report")
    notes = {}
    for line in (report.get("warnings", ()) if isinstance(report, dict) else ()):
        if isinstance(line, dict):
            try:
                note = read(line)
            except (ValueError, KeyError, TypeError):
                continue
            notes[key(str(note))] = note

    def kept(text):  # the report's Note, its first letter as the warning has it
        note = notes.get(key(text)) if isinstance(text, str) and text else None
        if note is None or not isinstance(note.parts[0], str):
            return text
        return Note((text[:1] + note.parts[0][1:],) + note.parts[1:])

    return tuple(map(kept, payload.get("warnings", ())))


def models_of_saved_fit(spec, saved: SavedFit) -> tuple[list, list]:
    """Each group's scoring model from ``spec`` (the model file the fit was made with) and the estimates of its
    JSON result, read onto the model's parameter table by the one reader of saved estimates
    (:func:`~cfa_tool.model.saved_estimates.values_on_model`: an error naming what does not match)."""
    from cfa_tool.model.saved_estimates import values_on_model
    from cfa_tool.pipeline.continuous import model_structure
    from cfa_tool.scoring.model import scoring_model

    rows = saved.estimates
    multi = saved.group_column is not None
    labels = tuple(g["name"] for g in saved.payload.get("groups", ())) if multi else None
    _same_item_names(spec, saved.data.variables)
    _same_model(spec, saved)
    if saved.payload.get("ordinal_items"):
        return ordinal_models_of_estimates(spec, rows, saved.data, labels, saved.source)
    mean_structure = multi or any(row.kind == "intercept" for row in rows)
    table, model = model_structure(spec, labels, mean_structure)
    theta = values_on_model(rows, table, saved.source, spec.source).theta
    out = []
    for g in range(table.n_groups):
        means = None
        if not mean_structure:
            names = list(saved.data.variables)
            means = np.array([saved.data.means[names.index(x)] for x in table.observed])
        out.append(scoring_model(model.matrices(theta, g), table.observed, table.latent,
                                 labels[g] if labels else None, means))
    return out, list(labels) if labels else [None]


#: the statements of a parsed model that change the model fitted (a 'name' changes its title, 'start' where the search
#: begins and 'answers' how words in the data are read, which the fit's saved coding decides: none changes it)
_MODEL_STATEMENTS = ("factors", "covary", "uncorrelated", "fixed", "freed", "equal", "bounds", "scaling", "invariant",
                     "noninvariant", "equal_across_groups", "ordinal", "reversed", "method", "invariance_level",
                     "exploratory")


def _plain(value):
    """A parsed statement without the places it was written, as compared: two covaried names or the parameters of
    an 'equal' statement in either order are the same statement (a factor's items keep theirs: the first is its
    marker)."""
    from cfa_tool.errors import Location
    from cfa_tool.language.spec import Name, NamePair, ParameterRef

    if isinstance(value, Name):
        return value.text
    if isinstance(value, NamePair):
        return value.key()
    if isinstance(value, ParameterRef):
        return value.key(), value.group
    if isinstance(value, tuple):
        plain = tuple(_plain(v) for v in value)
        return tuple(sorted(plain, key=repr)) if value and all(isinstance(v, ParameterRef) for v in value) else plain
    if dataclasses.is_dataclass(value):
        return type(value).__name__, tuple(_plain(getattr(value, f.name)) for f in dataclasses.fields(value)
                                           if f.compare and not isinstance(getattr(value, f.name), Location))
    return value


def _place(value):
    """The first place (a Location) written in a parsed statement, or None."""
    from cfa_tool.errors import Location

    if isinstance(value, Location):
        return value
    parts = (value if isinstance(value, tuple) else tuple(getattr(value, f.name) for f in dataclasses.fields(value))
             if dataclasses.is_dataclass(value) else ())
    return next((found for found in map(_place, parts) if found is not None), None)


def _statements(spec) -> list[tuple[tuple, object]]:
    """(the statement as compared, its place) of every statement of ``spec`` that changes the model."""
    out = []
    for name in _MODEL_STATEMENTS:
        value = getattr(spec, name)
        if name == "invariance_level":
            if value is not None:
                out.append(((name, value), spec.equalities_location))
            continue
        out += [((name, _plain(v)), _place(v)) for v in value]
    return out


def _first_difference(spec, fitted) -> str:
    """The first statement (by line) of the model file ``spec`` that the fitted model ``fitted`` lacks, else the
    first of ``fitted`` the model file lacks, in words naming its line ('' when the two models are the same: comments,
    the order of statements, the title and start values do not count)."""
    from collections import Counter

    def unmatched(one, other) -> list:
        left = Counter(key for key, _ in other)
        found = []
        for key, place in one:
            if left[key]:
                left[key] -= 1
            else:
                found.append((key, place))
        return sorted(found, key=lambda kp: (kp[1].line, kp[1].column) if kp[1] is not None else (0, 0))

    def quoted(model, place) -> str:
        line = model.source_line(place) if place is not None else None
        return f"line {place.line} ('{printable(line.strip())}')" if line else "a statement"

    mine, theirs = _statements(spec), _statements(fitted)
    extra, lacking = unmatched(mine, theirs), unmatched(theirs, mine)
    if extra:
        return f"its {quoted(spec, extra[0][1])} is not in the fitted model"
    if lacking:
        return f"it lacks the fitted model's {quoted(fitted, lacking[0][1])}"
    return ""


def _fitted_model_text(saved: SavedFit) -> str | None:
    """The model text a saved fit was made with, as its saved report lists it (None when the file has no report)."""
    report = saved.payload.get("report")
    listings = report.get("listings", ()) if isinstance(report, dict) else ()
    return next((str(x["text"]) for x in listings if isinstance(x, dict) and x.get("title") == "Model"
                 and isinstance(x.get("text"), str)), None)


def _same_model(spec, saved: SavedFit) -> None:
    """A model file must be the model the saved fit was made with: a statement added, dropped or changed since
    ('ordinal', 'bound', 'reversed', ...) changes the model, while the estimates and everything scored with them
    are the fit's (hostile trials 9 and 11).  The two are compared as parsed models (:func:`_first_difference`).
    A saved fit without its model text (a result's to_dict() has no report) is judged by the reverse-keyed items
    its reliability names, which change the keyed sums."""
    from cfa_tool.errors import ModelError
    from cfa_tool.language.parser import parse_model

    text, fitted = _fitted_model_text(saved), None
    if text is not None:
        try:
            fitted = parse_model(text, source=saved.model_source)
        except ModelError:  # a text this version cannot read: judged by its keying, as a fit without its text
            fitted = None
    said = ""
    if fitted is not None:
        said = _first_difference(spec, fitted)
    else:
        reliability = saved.payload.get("reliability") or {}
        factors = reliability.get("factors", ()) if isinstance(reliability, dict) else ()
        fitted_keys = {x for f in factors if isinstance(f, dict) and f.get("keying") == "declared"
                       for x in f.get("reversed", ())}
        here = set(spec.reverse_keyed)
        if factors and here != fitted_keys:
            added, dropped = sorted(here - fitted_keys), sorted(fitted_keys - here)
            said = "; ".join(part for part in (
                f"it declares {word_list(printable(x) for x in added)} reversed, which the fit did not" if added else "",
                f"it does not declare {word_list(printable(x) for x in dropped)} reversed, as the fit did"
                if dropped else "") if part)
    if said:
        raise OptionError(f"the model file {spec.source} is not the model {saved.source} was fitted with ({said}); "
                          f"scores with that fit's estimates would be of another model: give the model file of that "
                          f"fit, or fit this model first")


def _same_item_names(spec, fitted: tuple[str, ...]) -> None:
    """A saved fit's estimates belong to its items by name: a model whose items are named otherwise (the same scale
    on a retest's columns, 'mood1_t2' for 'mood1') is refused naming the names that differ and what to do."""
    here = [x for x in spec.observed_names if x not in fitted]
    there = [x for x in fitted if x not in spec.observed_names]
    if not here and not there:
        return

    def listed(names: list[str]) -> str:
        return cut_list(names, 4, lambda x: f"'{printable(x)}'")
    differ = (f"the model {spec.source} has {listed(here)} where the fit has {listed(there)}" if here and there else
              f"the model {spec.source} has {listed(here)}, which the fit does not" if here else
              f"the fit has {listed(there)}, which the model {spec.source} does not")
    raise OptionError(f"the fit result's items are named otherwise than the model's ({differ}): its estimates belong "
                      f"to its own items; give the model file the fit was made with, and to score other columns (such "
                      f"as a retest's) with it, copy the data file with those columns renamed to the fit's item "
                      f"names (after renaming or dropping the columns that already carry those names)")


def ordinal_models_of_estimates(spec, rows, data, labels: tuple[str, ...] | None, source: str) -> tuple[list, list]:
    """Each group's :class:`~cfa_tool.scoring.model.OrdinalScoringModel` from the estimate rows of an ordinal fit
    (:func:`~cfa_tool.model.saved_estimates.saved_rows`, placed on the model by the one reader of saved estimates)
    and its data summary (``data``: each ordinal item's answer values, and for one group the means and SDs that
    standardized the continuous items).  One group: loadings and factor covariances of latent responses of unit
    variance with the first-step thresholds; several groups: thresholds, intercepts and residual variances are
    parameters (Wu & Estabrook 2016).  Which items are ordinal follows from the fit (the items with answer
    categories), as it may have been told so by --ordinal.  ``source`` names the fit in messages."""
    from cfa_tool.model.implied import StructuredModel
    from cfa_tool.model.parameters import build_parameter_table
    from cfa_tool.model.saved_estimates import values_on_model
    from cfa_tool.pipeline.ordinal import ordinal_spec
    from cfa_tool.scoring.model import group_ordinal_model, one_group_ordinal_model, standardized_latent_responses

    names = list(data.variables)
    another = (f"{source} is not of the model {spec.source} (its items, answer categories or latent responses "
               f"differ); give the model file the fit was made with")
    if not data.categories or sorted(names) != sorted(spec.observed_names):
        raise OptionError(another)
    categories = {x: tuple(v for v, _ in cats) for x, cats in zip(names, data.categories)}
    if labels is not None:
        table = build_parameter_table(spec, labels, ordinal={x: len(c) - 1 for x, c in categories.items() if c})
        model = StructuredModel(table)
        # a residual variance the identification fixes at 1 is saved as 1 minus the common variance where the fit
        # held that latent response at variance 1 instead (pipeline.ordinal.estimate_ordinal_groups)
        scale = frozenset(e for e, par in enumerate(table.parameters) if par.kind == "residual_variance"
                          and not par.free and par.origin == "scale" and categories.get(par.variables[0]))
        saved = values_on_model(rows, table, source, spec.source, derived=scale)
        held = _held_latent_responses(model, saved, scale, another)
        in_order = tuple(categories[x] for x in table.observed)
        return ([group_ordinal_model(model, saved.theta, g, label, in_order, held[g]) for g, label in enumerate(labels)],
                list(labels))
    fixed_spec, derived_items = ordinal_spec(spec)
    table = build_parameter_table(fixed_spec)
    derived = frozenset(e for e, par in enumerate(table.parameters)
                        if par.kind == "residual_variance" and par.variables[0] in derived_items)
    saved = values_on_model(rows, table, source, spec.source, derived=derived, aside=("threshold",))
    thresholds = saved.thresholds()
    if any(len(thresholds.get(x, ())) != max(len(categories[x]) - 1, 0) for x in table.observed):
        raise OptionError(another)
    mats = StructuredModel(table).matrices(saved.theta)
    unit = standardized_latent_responses(mats)
    for e in derived:  # the reported residual variances are 1 minus the common variance
        par = table.parameters[e]
        if abs(unit.T[par.row, par.row] - saved.values[e]) > 1e-8:
            raise OptionError(another)
    order = [names.index(x) for x in table.observed]
    model = one_group_ordinal_model(mats, table.observed, table.latent,
                                    [thresholds.get(x, np.zeros(0)) for x in table.observed],
                                    [categories[x] for x in table.observed],
                                    np.asarray(data.means)[order], np.asarray(data.sds)[order])
    return [model], [None]


def _held_latent_responses(model, saved, scale: frozenset, another: str) -> np.ndarray:
    """Per group and item, whether a saved multi-group ordinal fit held the latent response at variance 1 (its
    residual variance saved as 1 minus its common variance) rather than its residual variance at 1 (``scale``: the
    entries of those residual variances); a value that is neither is a fit of another model."""
    table = model.table
    held = np.zeros((table.n_groups, table.p), dtype=bool)
    for e in scale:
        par = table.parameters[e]
        value = saved.values[e]
        if abs(value - par.offset) <= 1e-8 * (1.0 + abs(value)):
            continue
        mats = model.matrices(saved.theta, par.group)
        common = mats.implied_covariance()[par.row, par.row] - mats.T[par.row, par.row]
        if abs(common + value - 1.0) > 1e-6:
            raise OptionError(another)
        held[par.group, par.row] = True
    return held


def score_with_saved_fit(model, saved_path, data, *, methods=None, standard_errors: bool = False,
                         id_column: str | None = None, sheet: str | None = None, missing_codes=(), keep=(),
                         names_row: int | None = None, least_answered: float | None = None,
                         first_data_row: int | None = None, rename=None, unanswered_factors=None,
                         announce: Callable[[str], None] | None = None) -> ScoreResult:
    """Scores of the rows of ``data`` with the parameters of a fit saved as JSON (``fit --json``) of ``model``
    (``announce``: as :func:`scores` has it)."""
    from cfa_tool.assessment.admissibility import refuse_inadmissible_saved_fit
    from cfa_tool.data.answer_words import with_saved_coding
    from cfa_tool.data.joined_answers import refuse_other_joins
    from cfa_tool.pipeline import inputs as api

    given = api.load_spec(model)
    # the model's own reason first, as scores without a saved fit give it (hostile trial 11: a fit of an exploratory
    # block was called 'of another model')
    api.without_exploratory_blocks(given, "scores", "its factors' scores would be those of the unrotated block")
    saved = read_saved_fit(saved_path)
    refuse_unknown_scale(saved.data, f"the fit in '{printable(str(saved_path))}'")
    refuse_inadmissible_saved_fit(saved.payload, saved.problems, saved.source, "no factor scores are computed with it")
    spec = with_saved_coding(given, saved.data.answer_coding, saved.source)  # the fit's coding
    refuse_other_joins(spec, (saved.payload.get("data") or {}).get("joined_answers") or [], saved.source)
    chosen = _saved_methods(methods, bool(saved.payload.get("ordinal_items")), standard_errors)
    rule = item_rule(chosen, least_answered)
    unanswered = unanswered_option(unanswered_factors, chosen)
    models, labels = models_of_saved_fit(spec, saved)
    return _score_other_data(saved, spec, models, labels, data, chosen, standard_errors, id_column, sheet, missing_codes,
                             keep, names_row, first_data_row, rule, rename, unanswered, announce)


def _spec_of(result: FitResult):
    from cfa_tool.language.parser import parse_model

    return parse_model(result.model_text, source=result.model_source)


def _numeric(frame: pd.DataFrame, items: tuple[str, ...], source: str) -> np.ndarray:
    from cfa_tool.data.moments import _numeric_rows

    return _numeric_rows(frame, items, source)


#: the advice of every caution on answers coded otherwise than in the fit's data (:func:`_coded_otherwise`)
RECODE_ADVICE = "check that both files code the answers alike, and recode one as the other before scoring."


def declared_scales_of(data, spec, frame) -> dict[str, tuple[float, float]]:
    """Each item's answer scale as the fit declared it (item -> (lowest, highest)): by the model's statements
    (data.matching.declared_answer_scales: 'reversed ... on', 'answers'), else by the value labels of the fit's data
    file (``data``: its DataSummary, whose ``labelled_scales`` a saved fit keeps)."""
    from cfa_tool.data.matching import declared_answer_scales

    out = {item: (low, high) for item, low, high in getattr(data, "labelled_scales", ()) or ()}
    return out | declared_answer_scales(spec, frame)


def _coded_otherwise(data, model, rows: np.ndarray, source: str, ordinal: bool,
                     declared: dict | None = None, thresholds=None) -> list[tuple]:
    """The cautions (ProblemKind, words, advice) on answers of the scored file coded otherwise than in the rows the
    earlier fit analysed, the one rule of both ways a coding differs: a shifted scale (answers outside the fitted
    ranges, :func:`_outside_fitted_ranges`; continuous items, whose scores move with the codes) and an item coded
    the other way round (:func:`_items_against_loadings`); ``model``: the fit's ScoringModel (of its first group);
    ``declared``: the scale the model declares for an item (data.matching.declared_answer_scales), whose answers are
    not outside; ``thresholds``: the fit's OrdinalScoringModel of a one-group fit of ordinal items, whose end answers
    never given are a third way (:func:`_end_answers_unused`)."""
    from cfa_tool.assessment.admissibility import ProblemKind

    found = []
    outside = None if ordinal else _outside_fitted_ranges(data, model.items, rows, source, declared or {})
    if outside:
        found.append((ProblemKind.ANSWERS_BEYOND_FITTED, outside, RECODE_ADVICE))
    unused = _end_answers_unused(model.items, _end_shares(thresholds) if thresholds is not None else
                                 _continuous_end_shares(model, data), rows, source)
    if unused:
        found.append((ProblemKind.END_ANSWERS_UNUSED, unused, RECODE_ADVICE))
    against = _items_against_loadings(model, rows, source)
    if against:
        found.append((ProblemKind.ITEM_AGAINST_FITTED_LOADING, against, RECODE_ADVICE))
    return found


#: answers the fit's thresholds expect at least this many of in the rows scored, of which none is given, make the
#: caution of an end answer unused: the chance of none, about exp(-5) < .01 (Poisson), a rule of this tool
END_ANSWERS_EXPECTED = 5.0


def _end_shares(model) -> list[tuple[int, tuple[tuple[str, float, float], ...]]]:
    """Each ordinal item's end answers with the share of answers the earlier fit expects of them: (item's index,
    (('lowest', its code, share), ('highest', its code, share))).  Each share is the fit's marginal probability of its
    latent response beyond the end threshold, P(y* <= tau_1) = Phi((tau_1 - mu) / sigma) with mu = nu + L alpha and
    sigma^2 the implied variance (the latent-response formulation, Muthen 1984); ``model``: the fit's
    OrdinalScoringModel."""
    from cfa_tool.numerics.distributions import norm_cdf

    base = model.base
    mean = base.intercepts + base.loadings @ base.factor_means
    sd = np.sqrt(np.diag(base.implied_covariance))
    out = []
    for j, (tau, cats) in enumerate(zip(model.thresholds, model.categories)):
        if len(cats) >= 2:
            out.append((j, (("lowest", cats[0], float(norm_cdf((tau[0] - mean[j]) / sd[j]))),
                            ("highest", cats[-1], float(1 - norm_cdf((tau[-1] - mean[j]) / sd[j]))))))
    return out


def _continuous_end_shares(model, data) -> list[tuple[int, tuple[tuple[str, float, float], ...]]]:
    """The same for items of a scale of whole-number answers analysed as continuous: their end answers are the lowest
    and highest of the fitted rows (``data.ranges``, whole numbers at most :data:`SCALE_POINTS_AT_MOST` - 1 apart),
    and each share is the fitted normal distribution's beyond half a step from the end, Phi((lowest + 1/2 - mu) /
    sigma), with mu and sigma^2 the item's implied mean and variance (``model``: the fit's ScoringModel): the ordinal
    rule with thresholds midway between neighbouring answers, an approximation of this tool's (s26: a file coded 1
    higher, or 5 of a 1-5 scale, given with --missing-codes, was scored without a word for continuous items)."""
    from cfa_tool.numerics.distributions import norm_cdf

    ranges = dict(zip(data.variables, data.ranges)) if data.ranges else {}
    mean = model.intercepts + model.loadings @ model.factor_means
    sd = np.sqrt(np.diag(model.implied_covariance))
    out = []
    for j, item in enumerate(model.items):
        low, high = (float(v) for v in ranges.get(item, (np.nan, np.nan)))
        if not (np.isfinite(low) and np.isfinite(high) and low.is_integer() and high.is_integer()
                and 0 < high - low < SCALE_POINTS_AT_MOST and sd[j] > 0):
            continue
        out.append((j, (("lowest", low, float(norm_cdf((low + 0.5 - mean[j]) / sd[j]))),
                        ("highest", high, float(1 - norm_cdf((high - 0.5 - mean[j]) / sd[j]))))))
    return out


#: the most points of an answer scale whose end answers the scoring of continuous items checks (0 to 10)
SCALE_POINTS_AT_MOST = 11


def _end_answers_unused(items, shares, rows: np.ndarray, source: str) -> str | None:
    """The caution for items whose lowest or highest answer, which the earlier fit expects in at least
    END_ANSWERS_EXPECTED of the rows scored, is given in none: a file whose answers are coded one higher, its top
    answer then read as a code of no answer, scores every row on the wrong categories without another sign (new-user
    trial s26).  ``items``: the columns of ``rows``; ``shares``: each item's end answers and their expected shares, of ordinal items
    (:func:`_end_shares`) or of items of few answers analysed as continuous (:func:`_continuous_end_shares`), one
    rule for both."""
    found = []
    for j, ends in shares:
        column = rows[:, j][~np.isnan(rows[:, j])]
        if not len(column) or (column != np.round(column)).any():  # answers on a finer scale have no end answers
            continue
        for end, category, share in ends:
            expected = share * len(column)
            if expected >= END_ANSWERS_EXPECTED and not (column == category).any():
                found.append((items[j], end, category, expected, len(column)))
    if not found:
        return None
    listed = cut_list(found, 5, lambda f: f"'{printable(f[0])}' never has its {f[1]} answer {user_number(f[2])}, which "
                      f"the fit expects in about {round(f[3])} of its {f[4]} answers", sep="; ", lead="; and ",
                      noun="item")
    return (f"In {source}, answers the earlier fit's rows gave often are never given: {listed}. A file that codes the "
            f"answers otherwise (1 to 4 for 0 to 3, its top answer read as a code of no answer) looks so, and then "
            f"every score of the factor is shifted.")


def _items_against_loadings(model, rows: np.ndarray, source: str) -> str | None:
    """The caution for items of the scored file that run against their factor: an item's correlation with the
    keyed sum of the rest of its factor's items (each standardized and keyed by the sign of its loading in the
    earlier fit) has the opposite sign of its own loading, beyond what chance gives a correlation of zero (2 /
    sqrt(n), about two standard errors: a rule of thumb), so that it is coded the other way round from the fit's
    data (a reverse-worded item recoded in one file and not the other), and its answers pull every score of its
    factor the wrong way.  Items loading on one factor only, of factors with three or more of them, on the
    pairwise correlations of the rows; the item most against its factor is taken first and left out of the rest
    of the others (hostile trial s18, finding 2: one item coded 6 - x correlated -.64 with the rest of its factor,
    and every score was written without a word)."""
    items = tuple(model.items)
    loadings = np.asarray(model.loadings, dtype=float)
    frame = pd.DataFrame(rows, columns=range(len(items)))
    corr = frame.corr().to_numpy()
    answered = frame.notna().sum().to_numpy()
    found = []
    for k, factor in enumerate(model.factors):
        own = [j for j in range(len(items)) if loadings[j, k] != 0 and np.count_nonzero(loadings[j]) == 1]
        flagged: list[tuple[int, float]] = []
        while True:
            worst = None
            for j in own:
                rest = [i for i in own if i != j and i not in {f for f, _ in flagged}]
                if len(rest) < 2 or answered[j] < 3:
                    continue
                keys = np.sign(loadings[rest, k])
                block = corr[np.ix_(rest, rest)]
                spread = float(keys @ block @ keys)
                if not spread > 0 or np.isnan(corr[j, rest]).any():
                    continue
                r = float(np.sign(loadings[j, k]) * (keys @ corr[rest, j]) / np.sqrt(spread))
                if r < -2 / np.sqrt(answered[j]) and (worst is None or r < worst[1]):
                    worst = (j, r)
            if worst is None:
                break
            flagged.append(worst)
            own = [j for j in own if j != worst[0]]
        found += [(items[j], factor, r, loadings[j, k]) for j, r in flagged]
    if not found:
        return None
    from cfa_tool.numerics.plain import journal_decimal

    listed = cut_list(found, 5, lambda f: f"'{printable(f[0])}' correlates {journal_decimal(f[2], digits=2)} with the rest "
                      f"of {printable(f[1])}'s items (keyed as the fit keys them), while its loading in the earlier fit "
                      f"is {'positive' if f[3] > 0 else 'negative'} ({f[3]:.3f})", sep="; ", lead="; and ", noun="item")
    one = len(found) == 1
    return (f"In {source}, {'an item runs' if one else 'items run'} against {'its factor' if one else 'their factors'}"
            f": {listed}. {'It is' if one else 'They are'} probably coded the other way round from the fit's data (a "
            f"reverse-worded item recoded in one file and not in the other), so {'its' if one else 'their'} answers "
            f"pull every score of {'its factor' if one else 'their factors'} the wrong way.")


def _outside_fitted_ranges(data, items, rows: np.ndarray, source: str, declared: dict | None = None) -> str | None:
    """The caution for answers of the scored file outside the lowest and highest answers of the rows the earlier fit
    analysed (``data``: its DataSummary, whose ``ranges`` are empty for a fit of summary statistics): a file coded
    0-4 scored with a fit of answers coded 1-5 gets scores shifted by the difference, with no other sign of it.  The
    scale the model declares for an item (``declared``: item -> (lowest, highest)) is read first: its answers are
    on the scale of both files, whichever of them the fitted rows gave (new-user trial s25)."""
    if not data.ranges:
        return None
    fitted = dict(zip(data.variables, data.ranges))
    for item, (low, high) in (declared or {}).items():
        if item in fitted:
            fitted[item] = (min(low, fitted[item][0]), max(high, fitted[item][1]))
    found = []
    with np.errstate(invalid="ignore"):
        for k, item in enumerate(items):
            if item not in fitted:
                continue
            lo, hi = fitted[item]
            column = rows[:, k]
            below, above = int((column < lo).sum()), int((column > hi).sum())
            if below or above:
                found.append((item, below + above, lo, hi))
    if not found:
        return None
    listed = cut_list(found, 5, lambda f: f"'{printable(f[0])}', {counted(f[1], 'answer')} outside {user_number(f[2])} to "
                      f"{user_number(f[3])}", sep="; ", lead="; and ", noun="item")
    return (f"{source} holds answers outside the range of the rows the earlier fit analysed: {listed}. Scores of such "
            f"answers extrapolate the fit, and if the files code the answers differently (0 to 4 against 1 to 5, "
            f"say) every score is shifted.")


def _unknown_groups(group_of_row: np.ndarray, labels, group: str, source: str) -> str | None:
    """The caution (first in the report) for rows whose group the earlier fit does not have, which get no scores,
    with the fit's group nearest to each label (a label differing in case only, say); an OptionError when no row
    is in one of the fit's groups, since then nothing would be scored.  None when every row's group is known."""
    from cfa_tool.suggest import close_names

    known = set(labels)
    given = pd.Series([v for v in group_of_row if not pd.isna(v) and v not in known], dtype=object)  # (group_keys)
    if given.empty:
        return None
    counts = given.value_counts()
    shown = []
    few = names_shown(len(counts), 6)
    for label, n in list(counts.items())[:few]:
        near = close_names(str(label), [str(x) for x in labels])
        shown.append(f"'{printable(label)}' ({n} row{'s' if n != 1 else ''}"
                     + (f"; the fit has '{printable(near[0])}'" if near else "") + ")")
    more = more_words(len(counts) - few)
    fitted = ", ".join(f"'{printable(x)}'" for x in labels)
    outside = int(counts.sum())
    text = (f"{counted(outside, 'row')} of {source} {'is' if outside == 1 else 'are'} in groups of "
            f"'{printable(group)}' that the earlier fit does not "
            f"have: {', '.join(shown)}{more}; the fit's groups are {fitted}, and a label must match one as written")
    if not any(v in known for v in group_of_row if not pd.isna(v)):
        raise OptionError(f"no row of {source} can be scored: {text}")
    return text + ("; that row gets no scores" if outside == 1 else "; those rows get no scores")  # (a caution first: ProblemKind.UNKNOWN_GROUPS_SCORED)


def _group_keys(frame: pd.DataFrame, group: str) -> np.ndarray:
    """Each row's group by the one rule the fit reads its groups by (data.groups.group_keys: a cell of spaces or
    invisible format characters alone is no group, not a group named ''; re-check s17, G2)."""
    from cfa_tool.data.groups import group_keys

    return group_keys(frame[group]).to_numpy(object)


@dataclass(frozen=True)
class _Fitted:
    """What the scoring inputs read from a fit: its parameter table, model and estimates."""

    table: object
    model: object
    theta: np.ndarray


def _fitted_rows(frame, design, spec, group, source, weights=None):
    """The rows the fit used under a sampling design (rows of weight 0 left out), for the scoring model; ``weights``:
    those of ``frame``'s rows as parsed once (pipeline.inputs.with_design_weights)."""
    return check_design(frame, design, spec.observed_names, group, source, weights)[0] if design is not None else frame


def _linear_models(spec, frame, source, group, reference_group, fit_options, result, design=None):
    from cfa_tool.pipeline import inputs as api
    from cfa_tool.pipeline.continuous import model_structure
    from cfa_tool.scoring.model import score_inputs

    options, _ = api.choose_missing_handling(fit_options, frame, spec.observed_names, group)
    groups, _ = api.moments_for(spec, frame, source, group, reference_group, options.missing, design)
    labels = tuple(label for label, _ in groups) if group is not None else None
    table, model = model_structure(spec, labels, options.missing == "full-information")
    if table.n_free != len(result.theta):
        raise AssertionError("the fitted parameters do not match the model's table")
    return score_inputs(_Fitted(table, model, result.theta), groups), [label for label, _ in groups]


def _ordinal_models(spec, frame, source, ordinal_items, group, reference_group, result, design=None):
    from cfa_tool.method import MissingData
    from cfa_tool.pipeline import inputs as api
    from cfa_tool.scoring.model import one_group_ordinal_inputs

    pairwise = result.method.missing is MissingData.PAIRWISE  # the thresholds the fit used

    if group is None:
        from cfa_tool.data.polychoric import ordinal_moments
        from cfa_tool.model.implied import StructuredModel
        from cfa_tool.model.parameters import build_parameter_table
        from cfa_tool.pipeline.ordinal import ordinal_spec

        table = build_parameter_table(ordinal_spec(spec)[0])
        continuous = frozenset(x for x in table.observed if x not in ordinal_items)
        moments = ordinal_moments(frame, table.observed, source, continuous, pairwise=pairwise, design=design)
        mats = StructuredModel(table).matrices(result.theta)
        return [one_group_ordinal_inputs(mats, table.observed, table.latent, moments)], [None]
    from cfa_tool.model.implied import StructuredModel
    from cfa_tool.model.parameters import build_parameter_table
    from cfa_tool.pipeline.ordinal import threshold_counts

    from cfa_tool.scoring.model import group_ordinal_model

    groups, _ = api.ordinal_groups(spec, frame, source, group, reference_group, ordinal_items, pairwise, design)
    labels = tuple(label for label, _ in groups)
    table = build_parameter_table(spec, labels, ordinal=threshold_counts(groups[0][1]))
    if table.n_free != len(result.theta):
        raise AssertionError("the fitted parameters do not match the model's table")
    # the latent responses the fit held at variance 1 (their residual variances derived, not fixed at 1)
    held = np.zeros((len(labels), table.p), dtype=bool)
    for row in result.estimates:
        if row.kind == "residual_variance" and row.origin == "derived" and row.group in labels:
            held[labels.index(row.group), table.observed.index(row.variables[0])] = True
    model = StructuredModel(table)
    return ([group_ordinal_model(model, result.theta, g, label, m.categories, held[g])
             for g, (label, m) in enumerate(groups)], list(labels))


def _linear_quality(models, spec, sums: list) -> list[ScoreQuality]:
    """Each group's :class:`ScoreQuality`, holding the group's keyed sums ``sums[g]`` (:func:`_sum_scores`)."""
    from cfa_tool.scoring.methods import LINEAR_METHODS
    from cfa_tool.scoring.quality import score_quality

    return [score_quality(m, LINEAR_METHODS, _declared(spec), s) for m, s in zip(models, sums)]


def _declared(spec):
    """The items of the model's 'reversed' statement, None without one: the keys of the sums (one rule with the
    fit's reliability, assessment.reliability.sum_keys)."""
    return frozenset(spec.reverse_keyed) if spec.reversed else None


def _ordinal_quality(models, labels, values, errors, position, kept, group_of_row, group, spec,
                     answered: np.ndarray, sums: list) -> list[OrdinalQuality]:
    """Each group's :class:`OrdinalQuality`; ``answered``: how many of each factor's items each row answered
    (:func:`_items_answered`), at the same places as ``values`` and ``errors``; ``sums``: each group's keyed sums
    (:func:`_sum_scores`)."""
    out = []
    for model_g, label, sums_g in zip(models, labels, sums):
        sel = np.flatnonzero(group_of_row == label) if group is not None else np.arange(len(kept))
        at = position.loc[kept[sel]].to_numpy()
        v, e = values[at], errors[at]
        ok = ~np.isnan(v)
        reliability = []
        for f in range(v.shape[1]):
            s, sd = v[ok[:, f], f], e[ok[:, f], f]
            between = float(np.var(s)) if len(s) > 1 else float("nan")
            reliability.append(between / (between + float(np.mean(sd**2))) if len(s) > 1 else float("nan"))
        every = ok.all(axis=1)
        scores = np.corrcoef(v[every].T).reshape(v.shape[1], v.shape[1]) if every.sum() > 2 else None
        phi = model_g.base.factor_covariance
        sd = np.sqrt(np.diag(phi))
        precision, by_level = _ordinal_precision(model_g.base, v, e, answered[at], reliability, sd)
        out.append(OrdinalQuality(label, model_g.base.factors, tuple(reliability), phi / np.outer(sd, sd), scores,
                                  sums_g, precision, by_level))
    return out


def _ordinal_precision(base, v: np.ndarray, e: np.ndarray, answered: np.ndarray, reliability, factor_sd):
    """(Precision per factor, (factor, SE lowest third, SE highest third) per factor): a posterior-mean score's
    standard error is the row's own posterior SD, which depends on its answers (largest where the items have few
    thresholds, e.g. at a floor); among the rows that answered every item of the factor, the median posterior SD
    is the typical one, given with its medians in the lowest and the highest third of the scores."""
    full = answered == base.reach.sum(axis=0)[None, :]
    precision, by_level = [], []
    for f, name in enumerate(base.factors):
        rows = full[:, f] & ~np.isnan(v[:, f]) & ~np.isnan(e[:, f])
        if rows.sum() < 3 or not np.isfinite(reliability[f]):
            continue
        s, sd = v[rows, f], e[rows, f]
        se = float(np.median(sd))
        low, high = np.quantile(s, [1 / 3, 2 / 3])
        precision.append(Precision.of(name, ScoreMethod.EXPECTED_A_POSTERIORI, factor_sd[f], reliability[f], se))
        by_level.append((name, float(np.median(sd[s <= low])), float(np.median(sd[s >= high]))))
    return tuple(precision), tuple(by_level)


def centred_factors(estimates) -> tuple[str, ...]:
    """The factors of a model of several groups whose mean it fixes at zero in every group (no intercepts held
    equal): each group's scores of them are then centred at 0 in that group's own units, and a difference between
    two groups' scores says nothing about their factor means; () for one group.  ``estimates``: a fit's estimate
    rows, or a saved fit's (which keep no free flag: a mean of exactly 0 in every group is taken as fixed)."""
    groups = {r.group for r in estimates if r.group is not None}
    if len(groups) < 2:
        return ()
    set_free: dict[str, bool] = {}
    for r in estimates:
        if r.kind == "mean":
            free = getattr(r, "free", None)
            set_free[r.variables[0]] = set_free.get(r.variables[0], False) or bool(free) or r.estimate != 0
    return tuple(f for f, free in set_free.items() if not free)


def not_comparable_problems(estimates, chosen) -> tuple:
    """The caution, first among the scores' in every view, on factor scores of several groups whose factor means
    the model fixes at zero in every group (:func:`centred_factors`): each group's scores are centred at 0, so they
    cannot be compared or ranked across groups (new-user trial s21: ranking employees of all departments for a
    programme, with the caution among the notes under a box advising 'use the scores to compare groups').  Item sums
    and means are not centred and are not named by it.  () for one group, no factor-score method or no such factor."""
    from cfa_tool.assessment.admissibility import Problem, ProblemKind

    methods = factor_methods(chosen)
    centred = centred_factors(estimates)
    if not methods or not centred:
        return ()
    statement = Command(" ('invariance scalar' in the model file)", " (scalar invariance)")
    test = (", once ", Command("the invariance command", "a test of measurement invariance"),
            " finds that level holds.")
    scores = "The factor scores" if any(m in ITEM_METHODS for m in chosen) else "The scores"  # not the item sums
    names, one = word_list(printable(f) for f in centred), len(centred) == 1
    every = len(centred) == len({r.variables[0] for r in estimates if r.kind == "mean"})
    if every:
        text = (f"{scores} of different groups cannot be compared: the model fixes every factor's mean at zero in "
                f"every group (its intercepts are not held equal across groups), so each group's scores are centred "
                f"at 0 in that group's own units, and the groups' average scores are 0 whatever their factor means.")
        advice = Note(("compare or rank people of different groups only with the scores of a model that holds "
                       "loadings and intercepts equal across the groups", statement) + test)
    else:
        text = (f"{scores} of different groups cannot be compared on {names}: the model fixes "
                f"{'its' if one else 'their'} mean at zero in every group, so each group's scores of "
                f"{'it' if one else 'them'} are centred at 0 in that group's own units.")
        advice = Note((f"compare or rank people of different groups on {names} only with the scores of a model that "
                       f"estimates {'its' if one else 'their'} means with loadings and intercepts held equal across "
                       f"the groups", statement) + test)
    return (Problem(ProblemKind.SCORES_NOT_COMPARABLE_ACROSS_GROUPS, (), float(len(centred)), text, advice),)


def _without_own_answers(answered: np.ndarray, values: dict, chosen, factors,
                         unanswered: UnansweredFactor = UnansweredFactor.PREDICT) -> tuple:
    """The caution, first in every view, on rows that answered none of a factor's items and have a factor score of it
    (``answered``: :func:`_items_answered`; ``values``: each method's scores at the same places, before
    :func:`_left_empty`): such a score rests on the other factors' items alone, a prediction a report to the person
    could mistake for their own (a new user scoring staff for feedback found 63 such scores said only in a note).
    Item sums and means leave such cells empty, and Bartlett and correlation-preserving scores as a rule too (the
    unscored table counts them), so only the cells a factor-score method filled are counted; with ``unanswered``
    leave-empty, they are the cells left empty, and the caution says so.  () when there are none."""
    from cfa_tool.assessment.admissibility import Problem, ProblemKind

    scored = np.zeros(answered.shape, dtype=bool)
    for meth in factor_methods(chosen):
        scored |= ~np.isnan(values[meth])
    total = ((answered == 0) & scored).sum(axis=0)
    counted = [(name, int(n)) for name, n in zip(factors, total) if n]
    if not counted:
        return ()
    if unanswered is UnansweredFactor.LEAVE_EMPTY:
        rows = "; ".join(f"{n} {'row' if n == 1 else 'rows'} answered none of the items of {name}" for name, n in counted)
        names = [answered_column(name) for name, _ in counted]
        columns = word_list(names)
        one = len(counted) == 1 and counted[0][1] == 1
        text = (f"{rows}: {'this score, a prediction' if one else 'these scores, predictions'} from the other "
                f"factors' items alone, {'is' if one else 'are'} left empty, as asked; {columns} "
                f"mark{'s' if len(counted) == 1 else ''} {'the row' if one else 'the rows'} with 0, and "
                f"{WHY_NOT_SCORED_COLUMN} says '{NotScored.FACTOR_LEFT_EMPTY.value}'.")
        advice = Note(("report the other scores of these rows only; to write the prediction from the other answers "
                       "instead (for research, not for the person), ",
                       Command(f"give {Option.UNANSWERED_FACTORS.given(UnansweredFactor.PREDICT.value)}",
                               "score them again asking for it"), "."))
        return (Problem(ProblemKind.FACTOR_SCORES_LEFT_EMPTY, (), None, text, advice),)
    said = [f"{n} {'row' if n == 1 else 'rows'} answered none of the items of {name}, and "
            f"{'its' if n == 1 else 'their'} score of {name} rests on the other factors' items alone (through the "
            f"factors' correlations); the column {answered_column(name)} marks {'it' if n == 1 else 'them'} with 0"
            for name, n in counted]
    advice = Note(("treat such a score as a prediction from the row's other answers, not as a measure of the factor "
                   "for that person: leave it out of any report to the person",
                   Command(f" (give {Option.UNANSWERED_FACTORS.given(UnansweredFactor.LEAVE_EMPTY.value)} to leave "
                           "such cells empty)", " (the scores can be written with such cells empty)"),
                   ", or score the rows' own items only (item sums or means leave it empty)."))
    return (Problem(ProblemKind.SCORED_WITHOUT_OWN_ANSWERS, (), None, "; ".join(said) + ".", advice),)
