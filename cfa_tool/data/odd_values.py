"""Values in the model's item columns that are almost surely not answers: a forgotten missing-value code
(-99, 999, ...) and a spreadsheet's totals or means row left under the data.

The rules are the project's own screening rules (common practice of data cleaning, not a published test),
kept simple and strict so that ordinary data never trigger them (the tests count false alarms on simulated
normal data, the bundled demo data and Holzinger & Swineford 1939):

* **missing-value code**: a whole number that is negative or written with nines only (9, 99, 999, -9, -99,
  ...) and lies at least the range of the column's other answers beyond them (below their lowest or above
  their highest), given in fewer than half of the column's answers;
* **far beyond the other rows**: a row whose values lie more than twice the range of the column's other answers
  beyond them in at least half of the item columns it answers (two or more: a totals row), or a value that lies
  more than ten times that range beyond them (a typing error such as 55 for 5 on a 1 to 5 scale); a single
  value only a few ranges beyond the others is left alone, since skewed measures (reaction times, incomes)
  give such values;
* **outside the answer scale**: in an item answered on a scale of whole numbers (the other answers fill a run of
  at most :data:`MAX_SCALE_POINTS` consecutive whole numbers, such as 1 to 5), a few cells (together at most
  :data:`FEW_SHARE` of the column's answers) whose value is separated from the rest of the item's answers by a
  gap (at least two steps beyond the run's end: 12 or 7 beside 1 to 5; a 6 might be the scale's own top answer),
  when the scale's end next to them is a common answer (at least :data:`FEW_SHARE` of the answers: a scale that
  ends there, not a thinning tail of counts), AND that lies beyond the range the other items of the same scale
  use: the runs of the other columns screened with the same lowest and the same highest answer (1 to 5 beside 1
  to 5; a 1-to-7 item beside them is of another scale and hides nothing, review s14).  A skewed 0-to-10 or 1-to-7
  item whose second-highest answer no one chose is so left alone: its run (0 to 8) is no other item's, so it has
  no other item of its scale (review s13); a column with no other item of its scale is not judged by this rule (nothing says where its scale ends; a scale a 'reversed' statement declares
  is judged by the model's own check, data.matching.check_declared_ranges).  A value so found is then counted in
  every column of that scale that holds it (its other answers having that run, the value fewer than half of its
  answers), however many cells it takes there, as a declared scale counts every cell outside it.  Common practice of data screening
  (a value outside the range the questionnaire's items use is a keying error), written as this project's rule,
  not a published test.  Measures with many different values (reaction times, incomes, counts of many sizes)
  form no such run and are never judged so;
* **codes set apart from the answer scale**: values that items on a scale of whole numbers hold apart from it, too
  many for the rule outside the answer scale (more than :data:`FEW_SHARE`, which allows a typing error or two): in
  each column, the longest run of consecutive whole numbers (at most :data:`MAX_SCALE_POINTS`) holds at least
  :data:`SCALE_SHARE` of its answers and each other value lies at least :data:`SCALE_GAP` beyond the run's ends (8
  'don't know' and 9 'refused' in 5% of the cells each beside answers 1 to 5, :func:`beyond_the_run`); a value so
  set apart in at least two item columns (a code the items share, not one item's tail), and named by no other rule,
  is named once for all of them.  A rule of thumb of this project, not a published one (s20: explore's; s21: one rule
  for every command);
* **a row of sums or means**: a row whose values equal, in every item column it answers (three or more), the
  sums (to within 0.5, and beyond the range of the other answers in at least half of those columns, as sums of
  ten or more answers of one sign lie: small answers of data centred at zero are near their sums too) or the means
  (to within 0.005, two decimals) of the other rows' answers.

Values are judged from the most extreme inwards, so that -99 and -9 in one column are both found; each
judgement needs at least ten other answers.
"""

from __future__ import annotations

import enum
from dataclasses import dataclass, replace
from functools import cached_property

import numpy as np
import pandas as pd

from cfa_tool.numbers import count_text, cut_list, user_number, word_list
from cfa_tool.data.descriptives import AnswerExtremes, answer_extremes
from cfa_tool.data.missing_codes import beyond_as_a_code
from cfa_tool.data.kept_rows import RowNaming, row_naming, row_words, rows_listed, text_lines
from cfa_tool.data.moments import column_dtypes, item_values, stored_column
from cfa_tool.errors import printable
from cfa_tool.input_files import base_name
from cfa_tool.language.names import written_name
from cfa_tool.note_parts import Command, Note
from cfa_tool.options import Option

MIN_OTHERS = 10  # answers a judgement needs besides the value judged
FAR_RANGES = 2.0  # a row with values further beyond the others than this many times their range in half its columns
FAR_ALONE = 10.0  # ... or with one value this many ranges beyond them
SHOWN = 3  # columns, values and row numbers a caution names before 'and N more'
MAX_SCALE_POINTS = 11  # the answers of an answer scale: at most 0 to 10
FEW_SHARE = 0.02  # values outside a scale: at most this share of the answers (at least one cell); its end: at least it
#: codes set apart from the answer scale: the least share of a column's answers its run of whole numbers holds, with
#: room for codes of no answer beyond the :data:`FEW_SHARE` the rule outside the answer scale allows
SCALE_SHARE = 0.8
#: ... and the least distance of a value set apart from the run's end: 6 beside 1 to 5 may be the scale's own top answer
SCALE_GAP = 2.0
MEAN_TOLERANCE = 0.005  # means written to two decimals
SUM_TOLERANCE = 0.5  # sums written as whole numbers


class OddKind(enum.Enum):
    """Why values look like no answers; ``value`` is the word the JSON uses."""

    MISSING_CODE = "missing-value code"
    OUTSIDE_SCALE = "outside the answer scale"
    FAR_BEYOND = "far beyond the other rows"
    SUMS_ROW = "row of sums"
    MEANS_ROW = "row of means"
    SUMMARY_BLOCK = "rows of column statistics"
    SET_APART = "codes set apart from the answer scale"


@dataclass(frozen=True)
class OddValues:
    """Values of one kind that look like no answers: a code or a value outside the answer scale (``kind``
    MISSING_CODE, OUTSIDE_SCALE: one ``value`` in several columns) or one row (the other kinds: ``values`` per column).  ``rows`` are row numbers (as the file
    numbers them, data.moments.row_numbers; a data frame's index labels, as ``naming`` says); ``answers`` counts the
    cells."""

    kind: OddKind
    columns: tuple[str, ...]
    values: tuple[float, ...]  # one per column
    rows: tuple[int, ...]
    answers: int
    others: tuple[float, float]  # lowest and highest of the other answers (over the columns named)
    naming: RowNaming = RowNaming.FILE_ROW  # how ``rows`` name the rows (data.kept_rows.RowNaming)
    #: (row, text line) of those ``rows`` of a text file that start on a line of another number (quoted line breaks
    #: above them: data.kept_rows.text_lines), which the caution names beside the row
    lines: tuple[tuple[int, int], ...] = ()
    #: what the columns are in the analysis, as the caution names them: the model's items, or the missing-data
    #: helpers, which enter the likelihood as items do and are screened alike (pipeline.inputs.with_helper_codes)
    role: str = "item"
    #: a summary block (kind SUMMARY_BLOCK): what each of its ``rows`` holds, in words ('the means', 'Min'), and the
    #: text cell that names it ((column, text), or None)
    holds: tuple[str, ...] = ()
    labels: tuple[tuple[str, str] | None, ...] = ()
    #: codes set apart from the answer scale (kind SET_APART, whose ``columns`` and ``values`` are pairs: each column
    #: with each value it holds): the answers of the columns named, of which the ``answers`` are the share named
    of: int = 0
    #: the codes of no answer the run gave already (--missing-codes, ``missing_codes=``: numbers and words), which the
    #: advice to give a code keeps in the list it writes (data.non_answers.codes_given)
    given: tuple = ()

    @property
    def problem_value(self) -> float | None:
        """The figure the problem carries (assessment.admissibility.Problem.value, the JSON's and the problems table's
        'value'): the answers holding codes set apart from the answer scale; None for the other kinds."""
        return float(self.answers) if self.kind is OddKind.SET_APART else None

    @property
    def problem_kind(self) -> str:
        """The kind of problem every view files it under (assessment.admissibility.ProblemKind's value): codes set
        apart from the answer scale their own, so that a reader of the JSON tells them from the other findings."""
        return ("codes set apart from the answer scale" if self.kind is OddKind.SET_APART
                else "values that look like no answers")

    def caution(self, source: str) -> str:
        """The one line a report shows first: the columns, the value, how many rows and which."""
        name = base_name(source)
        low, high = self.others
        if self.kind is OddKind.MISSING_CODE:
            value = _number(self.values[0])
            rows = "row" if len(self.rows) == 1 else "rows"
            where = (f"The {self.role} column {printable(self.columns[0])} of {name} holds" if len(self.columns) == 1
                     else f"{len(self.columns)} {self.role} columns of {name} ({_listed(self.columns)}) hold")
            return (f"{where} the value "
                    f"{value} ({self.answers} answers in {len(self.rows)} {rows}: {self._rows_named()}), "
                    f"far outside the other answers ({_number(low)} to {_number(high)}): a missing-value code read "
                    f"as an answer?")
        if self.kind is OddKind.OUTSIDE_SCALE:
            value = _number(self.values[0])
            where = (f"The item column {printable(self.columns[0])} of {name} holds" if len(self.columns) == 1 else
                     f"{len(self.columns)} item columns of {name} ({_listed(self.columns)}) hold")
            return (f"{where} the value {value} ({self.answers} answer{'s' if self.answers != 1 else ''} in "
                    f"{self._rows_named()}), outside the answer "
                    f"scale of the other answers ({_number(low)} to {_number(high)}), read as an answer: "
                    f"{self._guess()}?")
        if self.kind is OddKind.SUMMARY_BLOCK:
            return _block_caution(self, name)
        if self.kind is OddKind.SET_APART:
            columns = self.distinct_columns()
            rows = "row" if len(self.rows) == 1 else "rows"
            one = len(self.distinct_values()) == 1
            return (f"{len(columns)} {self.role} columns of {name} ({_listed(columns)}) share {self._values_words()}, "
                    f"set apart from their other answers ({_number(low)} to {_number(high)}): "
                    f"{self._share_words()}, in {count_text(len(self.rows))} {rows} ({self._rows_named()}). Codes of "
                    f"no answer ('don't know', 'refused') lie so; "
                    f"{'it is read as an answer' if one else 'they are read as answers'}, beyond the scale's "
                    f"{'end' if one else 'ends'}.")
        guess = ("a totals or means row, or a typing error?" if self.kind is OddKind.FAR_BEYOND
                 else "a totals or means row of a spreadsheet?")
        return f"{self._row_holds(name)}: {guess}"

    def _row_holds(self, name: str) -> str:
        """What one row holds, as a caution or an error names it: 'Row 482 of survey.csv holds the sums of the
        other rows' answers in 12 item columns (on_time 1500, short_wait 1509, accurate_info 1545 and 9 more)'."""
        low, high = self.others
        shown = cut_list(list(zip(self.columns, self.values)), SHOWN, lambda cv: f"{printable(cv[0])} {_number(cv[1])}")
        what = {OddKind.FAR_BEYOND: f"values far beyond every other row's answers ({_number(low)} to {_number(high)})",
                OddKind.SUMS_ROW: "the sums of the other rows' answers",
                OddKind.MEANS_ROW: "the means of the other rows' answers"}[self.kind]
        row = self._first_row()
        return (f"{row[0].upper()}{row[1:]} of {name} holds {what} in {len(self.columns)} item "
                f"column{'s' if len(self.columns) != 1 else ''} ({shown})")

    def totals_refusal(self, source: str, frame: pd.DataFrame) -> str:
        """The one-line error of a totals row (kind SUMS_ROW) among ``frame``'s rows, the one message of every
        route that refuses it (pipeline.inputs.refuse_totals_rows; data.matching, where its sums lie outside a
        declared scale): the file, the row and what it holds, and how to leave it out: by a row filter on the text
        cell that names it (:func:`row_naming_cell`), which keeps every other row, when it has one."""
        naming = row_naming_cell(frame, self, self.columns)
        holder = self.naming.holder
        from cfa_tool.data.filter_text import filter_text

        written = filter_text(naming[0], "!=", naming[1]) if naming else None  # parses back to that cell's rows
        keep = f" ({Option.KEEP.given(written)})" if written else f" ({Option.KEEP})"
        return (f"{self._row_holds(base_name(source))}: a spreadsheet's totals row, not anyone's answers (analysed "
                f"as answers, that one row would decide the results). What to try: delete "
                f"{self.naming.one_row(self.rows[0])} from the {holder}, or leave it out with a row filter{keep}.")

    def kept_words(self) -> str:
        """The finding in the words of a methods section, for a run that analysed the values as the file holds them:
        'the value -99 in x2 and x5 (7 answers), far outside the other answers (1 to 5): perhaps a missing-value code',
        'row 302, whose values equal the means of the other rows' answers in every item column it answers (9):
        perhaps a means row'."""
        low, high = self.others
        if self.kind is OddKind.MISSING_CODE:
            return (f"the value {_number(self.values[0])} in {_listed(written_name(c) for c in self.columns)} "
                    f"({self.answers} answer{'s' if self.answers != 1 else ''}), far outside the other answers "
                    f"({_number(low)} to {_number(high)}): perhaps a missing-value code")
        if self.kind is OddKind.OUTSIDE_SCALE:
            return (f"the value {_number(self.values[0])} in {_listed(written_name(c) for c in self.columns)} "
                    f"({self.answers} answer{'s' if self.answers != 1 else ''}), outside the answer scale of the other "
                    f"answers ({_number(low)} to {_number(high)}): perhaps {self._guess()}")
        if self.kind is OddKind.FAR_BEYOND:
            return (f"{self._first_row()}, with values far beyond every other row's answers ({_number(low)} to "
                    f"{_number(high)}) in {len(self.columns)} item column{'s' if len(self.columns) != 1 else ''}: "
                    f"perhaps a totals row or a typing error")
        if self.kind is OddKind.SET_APART:
            one = len(self.distinct_values()) == 1  # in the number of the codes named (s23)
            return (f"{self._values_words()} in {_listed(written_name(c) for c in self.distinct_columns())}, "
                    f"{self._share_words()}, set apart from the other answers ({_number(low)} to "
                    f"{_number(high)}): perhaps {'a code' if one else 'codes'} of no answer")
        if self.kind is OddKind.SUMMARY_BLOCK:
            return (f"{self._rows_named()}, which hold {_listed(self.holds)} of the rows above them in the item "
                    f"columns: perhaps a summary block under the data")
        which = "sums" if self.kind is OddKind.SUMS_ROW else "means"
        return (f"{self._first_row()}, whose values equal the {which} of the other rows' answers in every item "
                f"column it answers ({len(self.columns)}): perhaps a {'totals' if which == 'sums' else 'means'} row")

    def advice(self) -> Note:
        """What to try, the option apart (note_parts.Command): a manuscript's reader runs nothing."""
        value = _number(self.values[0]) if self.values else ""
        code = Command(f"give {self._codes_given((self.values[0],) if self.values else ())}",
                       f"read {value} as no answer")
        if self.kind is OddKind.MISSING_CODE:
            return Note((f"If {value} means 'no answer', ", code, " (or correct those answers in the file)."))
        if self.kind is OddKind.SET_APART:
            values = self.distinct_values()
            one = len(values) == 1
            return Note((f"If {'it means' if one else 'they mean'} no answer, ",
                         Command(f"give {self._codes_given(values)}",
                                 f"read {'it' if one else 'them'} as no answer"),
                         f"; if {'it is an answer' if one else 'they are answers'}, nothing needs to change."))
        if self.kind is OddKind.OUTSIDE_SCALE:
            holder = self.naming.holder
            return Note((f"Check those answers: correct a typing error in a copy of the {holder}, or, if {value} "
                         f"means 'no answer', ", code, "."))
        holder = self.naming.holder
        if self.kind is OddKind.SUMMARY_BLOCK:
            return _block_advice(self, holder)
        return Note((f"Delete {self._first_row()} from the {holder} (or leave it out with a row filter",
                     Command(f", {Option.KEEP}"), ") if it holds no one's answers; otherwise check those answers."))

    def _codes_given(self, codes) -> str:
        """--missing-codes with ``codes`` after those the run gave already (:attr:`given`), which a list given again
        would otherwise leave out (s21: '--missing-codes 8,9' after '--missing-codes -99')."""
        from cfa_tool.data.non_answers import codes_given

        return codes_given(tuple(self.given) + tuple(codes))

    def distinct_columns(self) -> tuple[str, ...]:
        """The columns named, each once, in the file's order (kind SET_APART names pairs of a column and a value)."""
        return tuple(dict.fromkeys(self.columns))

    def distinct_values(self) -> tuple[float, ...]:
        """The values named, each once, from the lowest."""
        return tuple(sorted(set(self.values)))

    def _values_words(self) -> str:
        """The codes set apart, named: 'the code 9', 'the codes 8 and 9', 'the codes 7, 8 and 9'."""
        values = [_number(v) for v in self.distinct_values()]
        if len(values) == 1:
            return f"the code {values[0]}"
        return f"the codes {word_list(values)}"

    def _share_words(self) -> str:
        """'480 of their 4,800 answers (10.0%)': the cells named among the answers of their columns."""
        share = self.answers / self.of if self.of else 0.0
        return f"{count_text(self.answers)} of their {count_text(self.of)} answers ({100 * share:.1f}%)"

    def _guess(self) -> str:
        """What a value outside the answer scale may be: a typing error in one column; in several, where the same
        slip is unlikely, a code for no answer first (re-check s18: 8 in all 16 items, 432 cells, read 'a typing
        error?')."""
        return "a typing error" if len(self.columns) == 1 else "a code for no answer, or typing errors"

    def _rows_named(self) -> str:
        """'rows 302, 355 and 2 more', each row with its text line where it differs ('row 302 (text line 340)')."""
        return rows_listed(self.rows, SHOWN, naming=self.naming, lines=dict(self.lines))

    def _first_row(self) -> str:
        return row_words(self.rows[0], dict(self.lines), self.naming)

    def to_dict(self) -> dict:
        out = {"kind": self.kind.value, "columns": list(self.columns), "values": list(self.values),
               "rows": list(self.rows), "answers": self.answers}
        if self.kind is OddKind.SUMMARY_BLOCK:
            out["holds"] = list(self.holds)
        if self.kind is OddKind.SET_APART:  # pairs: each column with each value it holds
            out["answers_of_those_columns"] = self.of
        return out


def odd_values(frame: pd.DataFrame, columns: tuple[str, ...] | list[str],
               row_numbers: np.ndarray | None = None, values: np.ndarray | None = None,
               extremes: AnswerExtremes | None = None) -> tuple[OddValues, ...]:
    """What in ``columns`` of ``frame`` looks like no answers (see the module's rules), a summary block under the
    data first (:func:`summary_block`), then codes.  ``values``: the columns' ``data.moments.item_values`` when
    already taken out of ``frame``, and ``extremes`` their answers' extremes (data.descriptives.shared_extremes)."""
    with np.errstate(over="ignore", invalid="ignore", divide="ignore"):  # values near the float limit judge as inf
        block, above = _summary_block(frame, columns, row_numbers, values)
        if block:  # the other rules judge the rows above the block, against them alone
            numbers = np.arange(1, len(frame) + 1) if row_numbers is None else np.asarray(row_numbers)
            found = block + _odd_values(frame.iloc[:above], columns, numbers[:above],
                                        None if values is None else values[:above])
        else:
            found = _odd_values(frame, columns, row_numbers, values, extremes)
    naming = row_naming(frame)
    lines = text_lines(frame)
    if lines:  # a text file whose quoted cells hold line breaks: the rows' text lines named beside them
        found = tuple(replace(o, lines=tuple((r, lines[r]) for r in o.rows if r in lines)) for o in found)
    return found if naming is RowNaming.FILE_ROW else tuple(replace(o, naming=naming) for o in found)


#: the text of a cell outside the items that names a row of column statistics (in lower case, without spaces, dots
#: and colons at its ends), and what such a row holds, in words
STATISTIC_LABELS = {
    **dict.fromkeys(("mean", "means", "average", "avg"), "the means"),
    **dict.fromkeys(("sd", "s.d", "std", "stdev", "std dev", "std. dev", "std. deviation", "std deviation",
                     "standard deviation", "standard deviations", "st. dev", "st dev"), "the standard deviations"),
    **dict.fromkeys(("n", "count", "counts", "valid n", "number of answers"), "the counts of answers"),
    **dict.fromkeys(("total", "totals", "sum", "sums"), "the sums"),
    **dict.fromkeys(("min", "minimum"), "the lowest answers"),
    **dict.fromkeys(("max", "maximum"), "the highest answers"),
    **dict.fromkeys(("median",), "the medians"),
    **dict.fromkeys(("variance", "var"), "the variances"),
}
MAX_BLOCK_ROWS = 10  # rows of a summary block under the data
#: the statistics whose rows hold whole answers within the scale as a respondent's row does (a labelled row of them is
#: taken by its label); a row labelled with another ('N', 'SD') whose values are such answers is a respondent's
ANSWER_LIKE = ("the lowest answers", "the highest answers", "the medians")


def _summary_block(frame: pd.DataFrame, columns, row_numbers, X) -> tuple[tuple[OddValues, ...], int]:
    """A summary block under the data (review s15): the last rows of ``frame`` (at most :data:`MAX_BLOCK_ROWS`),
    each of them named by a cell outside ``columns`` that says mean, SD, N, total, min or max (:data:`STATISTIC_LABELS`,
    a text no other row of its column holds) or holding, in every item column it answers (three or more), the
    means, standard deviations (divisor n - 1 or n), counts of answers or sums of the rows above the block (to within
    half a unit of the last decimal the row writes: 0.005 for two decimals; a row of whole numbers only as counts
    or sums, the sums beyond the range of the other answers as :func:`_beyond_the_others` asks).  One rule for the
    whole block, judged against the rows above it, so that a Mean row under which an SD and an N row stand is
    found as a Mean row alone is.  The project's own screening rule (common practice of data cleaning, not a
    published test).  Returns the findings (one for the block; a row of sums among them a SUMS_ROW finding of its
    own, which is refused as every totals row is) and the number of rows above the block (``len(frame)`` when
    there is none)."""
    n = len(frame)
    most = min(MAX_BLOCK_ROWS, n - MIN_OTHERS - 1)
    if most < 1 or not len(columns):
        return (), n
    if X is None:
        X = item_values(frame, columns)
    if X is None:  # some item column holds text: refused where it is read
        return (), n
    labels = _statistic_labels(frame, columns, most)
    stats = _ColumnTotals(X, n - most)
    last = X[n - 1][np.isfinite(X[n - 1])]
    if n - 1 not in labels and (len(last) < 3 or np.all(last == np.round(last)) and not (
            X[n - 1] > stats.top).any()):
        return (), n  # the last row is a respondent's whole-number answers: no block (the common case)
    if not labels and _decimal_places(last) is None:
        return (), n  # without labels every row of a block, the last one too, is found by its values, and values of
        # more than six decimals are no statistic :func:`_statistic_of` finds (a respondent's answers of many decimals)
    if not labels and not _may_open_a_block(X, n - most, stats):
        return (), n  # no row that could open a block: a respondent's answers of a few decimals
    for k in range(most, 0, -1):
        s = n - k
        held = []
        for r in range(s, n):
            what = labels.get(r)
            matched = _statistic_of(X, r, s, stats)
            if matched is None and (what is None or what[2] not in ANSWER_LIKE and stats.like_answers(r)):
                break  # a row labelled 'N' or 'SD' whose values are answers: a respondent's id (re-check s15)
            words, summed = matched or (what[2], False)
            held.append((r, words, summed, matched is not None, what[:2] if what else None))
        else:
            return _block_findings(X, frame, columns, row_numbers, s, held), s
    return (), n


def _may_open_a_block(X: np.ndarray, first: int, stats: "_ColumnTotals") -> bool:
    """Whether the last row of ``X`` could close a summary block that opens at some position from ``first`` on, by
    its values: every row of a block (the last one too) holds a statistic of the rows above the block's first row in
    every column it answers (three or more; :func:`_statistic_of`), a mean or standard deviation (written with a
    decimal: within 0.05) or a count or sum (whole numbers: within 0.5).  Looser than :func:`_statistic_of`, so a
    necessary condition, tested for every opening position at once: a file without a block is passed over in a few
    array operations (the screen cost 0.45 ms a fit of Holzinger & Swineford's data before, a fifth of the fit)."""
    last = X[-1]
    answered = np.isfinite(last)
    if answered.sum() < 3:
        return False
    tail = stats.finite[first:]
    values = np.where(tail, X[first:], 0.0)
    counts = stats.counts - np.cumsum(tail[::-1], axis=0)[::-1]  # above each opening position
    sums = stats.sums - np.cumsum(values[::-1], axis=0)[::-1]
    with np.errstate(invalid="ignore", divide="ignore"):
        means = sums / counts
        for statistic, tolerance in ((counts, 0.5), (sums, 0.5), (means, 0.05)):
            if (((np.abs(last - statistic) <= tolerance) | ~answered).all(axis=1)).any():
                return True
        centred = np.where(tail, X[first:] - stats.shift, 0.0)
        squares = stats.squares - np.cumsum((centred ** 2)[::-1], axis=0)[::-1]
        deviations = np.maximum(squares - (sums - counts * stats.shift) ** 2 / counts, 0.0)
        for divisor in (counts - 1, counts):
            if (((np.abs(last - np.sqrt(deviations / divisor)) <= 0.05) | ~answered).all(axis=1)).any():
                return True
    return False


class _ColumnTotals:
    """Counts, sums and sums of squares (about each column's mean, Chan, Golub & LeVeque 1983's shifted sums) of the
    item columns, from which the statistics of the rows above a block are the whole columns' minus the block's."""

    def __init__(self, X: np.ndarray, first: int) -> None:
        self.X = X
        self.first = first
        self._above: dict[int, dict[str, np.ndarray]] = {}

    @cached_property
    def finite(self) -> np.ndarray:
        return np.isfinite(self.X)

    @cached_property
    def top(self) -> np.ndarray:
        """The highest answer of each column above row position ``first`` (where a block can start): a row of whole
        numbers none of which lies above it holds no counts of answers or sums (:func:`_statistic_of`)."""
        return np.max(self.X[:self.first], axis=0, initial=-np.inf, where=self.finite[:self.first])

    @cached_property
    def bottom(self) -> np.ndarray:
        return np.min(self.X[:self.first], axis=0, initial=np.inf, where=self.finite[:self.first])

    @cached_property
    def counts(self) -> np.ndarray:
        return self.finite.sum(axis=0)

    @cached_property
    def sums(self) -> np.ndarray:
        return np.where(self.finite, self.X, 0.0).sum(axis=0)

    @cached_property
    def shift(self) -> np.ndarray:
        return np.where(self.counts > 0, self.sums / np.maximum(self.counts, 1), 0.0)

    def above(self, s: int) -> dict[str, np.ndarray]:
        """The statistics of the rows above row position ``s`` (each position computed once)."""
        if s not in self._above:
            self._above[s] = self._statistics(s)
        return self._above[s]

    def like_answers(self, r: int) -> bool:
        """Whether row position ``r`` holds whole numbers within the answers of the rows above (three or more), as a
        respondent's row does: no summary of them, whatever a label beside it says."""
        answered = self.finite[r]
        row = self.X[r, answered]
        return bool(len(row) >= 3 and np.all(row == np.round(row)) and np.all(row <= self.top[answered])
                    and np.all(row >= self.bottom[answered]))

    @cached_property
    def squares(self) -> np.ndarray:
        """Each column's sum of squares about its shift."""
        return (np.where(self.finite, self.X - self.shift, 0.0) ** 2).sum(axis=0)

    def _statistics(self, s: int) -> dict[str, np.ndarray]:
        tail = self.finite[s:]
        counts = self.counts - tail.sum(axis=0)
        sums = self.sums - np.where(tail, self.X[s:], 0.0).sum(axis=0)
        shifted = sums - counts * self.shift
        squares = self.squares - (np.where(tail, self.X[s:] - self.shift, 0.0) ** 2).sum(axis=0)
        with np.errstate(invalid="ignore", divide="ignore"):
            deviations = np.maximum(squares - shifted ** 2 / counts, 0.0)
            return {"the counts of answers": counts.astype(float), "the sums": sums, "the means": sums / counts,
                    "the standard deviations": np.sqrt(deviations / (counts - 1)),
                    "the standard deviations (divisor n)": np.sqrt(deviations / counts)}


def _statistic_of(X: np.ndarray, r: int, s: int, stats: _ColumnTotals) -> tuple[str, bool] | None:
    """What row position ``r`` of ``X`` holds when its values equal, in every column it answers (three or more),
    one statistic of the rows above position ``s`` (see :func:`_summary_block`): (its words, whether sums), or None."""
    js = np.flatnonzero(np.isfinite(X[r]))
    if len(js) < 3:
        return None
    row = X[r, js]
    places = _decimal_places(row)
    if places is None:
        return None
    if places == 0 and not (row > stats.top[js]).any():
        return None  # whole numbers within the answers: no counts of answers, no sums (the common case)
    tolerance = 0.5 * 10.0 ** -places + 1e-9
    for words, values in stats.above(s).items():
        whole = words in ("the counts of answers", "the sums")
        if whole != (places == 0):
            continue
        if np.all(np.abs(row - values[js]) <= tolerance):
            if words == "the sums" and not _beyond_the_others(row, X[:s, js]):
                continue
            if not whole and not any((X[:s, j] != X[r, j]).all() for j in js):
                continue  # means an answer of every column repeats: a respondent's answers, as the means row rule
            return words.replace(" (divisor n)", ""), words == "the sums"
    return None


#: the powers of ten by which a row of statistics written with 0 to 6 decimals gives whole numbers
POWERS = np.array([1.0, 10.0, 100.0, 1e3, 1e4, 1e5, 1e6])


def _decimal_places(row: np.ndarray) -> int | None:
    """The fewest decimals, 0 to 6, with which every value of ``row`` is written (each value times the power of ten
    within 1e-6 of a whole number), or None: how many decimals a row of statistics was written with, every power
    tried at once."""
    scaled = row[:, None] * POWERS
    written = (np.abs(scaled - np.round(scaled)) < 1e-6).all(axis=0)
    return int(written.argmax()) if written.any() else None


def _statistic_labels(frame: pd.DataFrame, columns, most: int) -> dict[int, tuple[str, str, str]]:
    """Row position -> (column, text, what the row holds in words) of the last ``most`` rows whose cell in a column
    outside ``columns`` names a statistic (:data:`STATISTIC_LABELS`) that no other row of the column holds ('N' of
    a district column is a
    district)."""
    out: dict[int, tuple[str, str, str]] = {}
    items = set(columns)
    n = len(frame)
    names = frame.columns.tolist()  # the dtypes from the frame's store (data.moments.column_dtypes: no Series built)
    texts = [k for k, kind in enumerate(column_dtypes(frame)) if kind.kind not in "biufcmM" and names[k] not in items]
    for position in texts:  # columns of numbers hold no label (read from the dtypes at once: a column each is slow)
        column = names[position]
        for r, value in enumerate(stored_column(frame, position)[n - most:].tolist(), start=n - most):
            if r in out or not isinstance(value, str):
                continue
            key = " ".join(value.split()).strip(".:").strip().lower()
            if key in STATISTIC_LABELS and int((frame[column] == value).sum()) == 1:
                out[r] = (str(column), value.strip(), STATISTIC_LABELS[key])
    return out


def _block_findings(X: np.ndarray, frame: pd.DataFrame, columns, row_numbers, s: int, held) -> tuple[OddValues, ...]:
    """The findings of a summary block from row position ``s`` on (``held``: (position, what it holds in words,
    whether sums, whether found by its values, label cell) of each row): a row found by its values to hold the sums
    is a SUMS_ROW finding (refused, as every totals row is), a block of one row found by its values to hold the means
    a MEANS_ROW finding (as before blocks were judged), the rest one SUMMARY_BLOCK finding naming every row."""
    numbers = np.arange(1, len(frame) + 1) if row_numbers is None else np.asarray(row_numbers)
    names = list(columns)
    found: list[OddValues] = []
    block = [(r, words, label) for r, words, summed, _, label in held if not summed]
    means_alone = len(block) == 1 and block[0][1] == "the means" and any(
        by_values for r, _, summed, by_values, _ in held if r == block[0][0])
    for r, words, summed, by_values, label in held:
        if summed or means_alone and r == block[0][0]:
            js = np.flatnonzero(np.isfinite(X[r]))
            found.append(OddValues(OddKind.SUMS_ROW if summed else OddKind.MEANS_ROW, tuple(names[j] for j in js),
                                   tuple(float(X[r, j]) for j in js), (int(numbers[r]),), len(js), _others(X[:s, js])))
    if block and not means_alone:
        answered = np.isfinite(X[[r for r, _, _ in block]])
        js = np.flatnonzero(answered.any(axis=0))
        first = block[0][0]
        found.append(OddValues(OddKind.SUMMARY_BLOCK, tuple(names[j] for j in js),
                               tuple(float(X[first, j]) for j in js), tuple(int(numbers[r]) for r, _, _ in block),
                               int(answered.sum()), _others(X[:s, js]), holds=tuple(w for _, w, _ in block),
                               labels=tuple(_filter_cell(frame, label) for _, _, label in block)))
    return tuple(found)


def _filter_cell(frame: pd.DataFrame, label: tuple[str, str] | None) -> tuple[str, str] | None:
    """``label`` (column, text) when a row filter '!=' on it keeps every other row (the column has a value in
    every row, and the text holds no quote: :func:`naming_cell`'s conditions), else None."""
    if label is None or "'" in label[1] or '"' in label[1]:
        return None
    cells = frame[label[0]]
    return label if bool(cells.notna().all()) and not cells.astype(str).str.strip().eq("").any() else None


def _block_caution(odd: OddValues, name: str) -> str:
    """'Rows 483, 484 and 485 of survey.xlsx ('Mean', 'SD', 'N') hold the means, the standard deviations and the
    counts of answers of the rows above them in 12 item columns, not anyone's answers, and were analysed as 3
    respondents: a summary block under the data?'"""
    named = [label[1] for label in odd.labels if label is not None]
    texts = f" ({', '.join(repr(printable(t)) for t in named)})" if len(named) == len(odd.rows) else ""
    rows = odd._rows_named()
    count = len(odd.rows)
    holds = _joined([h for h in dict.fromkeys(odd.holds)])
    columns = f"{len(odd.columns)} item column{'s' if len(odd.columns) != 1 else ''}"
    return (f"{rows[0].upper()}{rows[1:]} of {name}{texts} {'holds' if count == 1 else 'hold'} {holds} of the rows "
            f"above {'it' if count == 1 else 'them'} in {columns}, "
            f"not anyone's answers, and {'was' if count == 1 else 'were'} analysed as {count} "
            f"respondent{'s' if count != 1 else ''}: a summary block under the data?")


def _block_advice(odd: OddValues, holder: str) -> Note:
    labels = [label for label in odd.labels if label is not None]
    if len(labels) == len(odd.rows) and len({c for c, _ in labels}) == 1:
        keep = Option.KEEP.given([f"{printable(c)} != {printable(t)}" for c, t in labels])
    else:
        keep = str(Option.KEEP)
    them = "it" if len(odd.rows) == 1 else "them"
    return Note((f"Delete {odd._rows_named()} from the {holder}, or leave {them} out with a row filter",
                 Command(f" ({keep})"), "; statistics of the answers are no respondent's answers."))


def _joined(items: list[str]) -> str:
    return word_list(items)


def _odd_values(frame: pd.DataFrame, columns, row_numbers, X, extremes: AnswerExtremes | None = None) -> tuple[OddValues, ...]:
    numbers = np.arange(1, len(frame) + 1) if row_numbers is None else np.asarray(row_numbers)
    if len(frame) <= MIN_OTHERS:
        return ()
    if X is None:
        X = item_values(frame, columns)
    if X is not None:  # every column holds numbers (the common case)
        names = list(columns)
    else:
        names = [c for c in columns if c in frame.columns and pd.api.types.is_numeric_dtype(frame[c])
                 and not pd.api.types.is_complex_dtype(frame[c])]  # other columns are refused where they are read
        if not names:
            return ()
        X = frame[names].to_numpy(dtype=float, na_value=np.nan)  # infinite values are judged by no rule
    standing, apart = _may_stand_out(X, extremes.for_values(X) if extremes is not None else None)
    flagged = [(j, value, code, ranges) for j in standing for value, code, ranges in _peeled(X[:, j])]
    if not flagged:
        outside = _outside_scales(X, apart, set(), names, numbers)  # the common case: only the rows-of-sums-or-means rule to apply, and no row far beyond
        summary = _summary_rows(X, X)
        named = {(names.index(c), v) for o in outside for c, v in zip(o.columns, o.values)}
        return outside + _set_apart(X, named, names, numbers) + (tuple(_row_findings(X, X, X, np.zeros(X.shape, dtype=bool), summary, names, numbers))
                          if summary else ())
    codes: dict[float, list[int]] = {}  # code -> columns
    code_cells = np.zeros(X.shape, dtype=bool)
    far = np.zeros(X.shape, dtype=bool)
    alone = np.zeros(X.shape, dtype=bool)
    for j, value, code, ranges in flagged:
        cells = X[:, j] == value
        if code:
            codes.setdefault(value, []).append(j)
            code_cells[:, j] |= cells
        else:
            far[:, j] |= cells
            alone[:, j] |= cells & (ranges > FAR_ALONE)
    answered = np.isfinite(X).sum(axis=1) - code_cells.sum(axis=1)
    counted = far.sum(axis=1)
    far &= ((counted >= 2) & (2 * counted >= answered) | alone.any(axis=1))[:, None]
    found: list[OddValues] = []
    for value, js in sorted(codes.items(), key=lambda kv: -int((X[:, kv[1]] == kv[0]).sum())):
        cells = X[:, js] == value
        rows = np.flatnonzero(cells.any(axis=1))
        found.append(OddValues(OddKind.MISSING_CODE, tuple(names[j] for j in js), (float(value),) * len(js),
                               tuple(int(numbers[r]) for r in rows), int(cells.sum()), _others(X[:, js][~cells])))
    clean = np.where(code_cells, np.nan, X)
    base = np.where(far, np.nan, clean)
    named = {(j, float(v)) for j in range(X.shape[1]) for v in np.unique(X[code_cells[:, j] | far[:, j], j])}
    outside = _outside_scales(X, apart, named, names, numbers)
    named |= {(names.index(c), v) for o in outside for c, v in zip(o.columns, o.values)}
    return (tuple(found) + outside + _set_apart(X, named, names, numbers)
            + tuple(_row_findings(X, clean, base, far, _summary_rows(clean, base), names, numbers)))


def _set_apart(X: np.ndarray, named: set, names: list[str], numbers: np.ndarray) -> tuple[OddValues, ...]:
    """The codes set apart from the answer scale (see the module's rules): the values :func:`beyond_the_run` sets
    apart in each column, those that no other rule names (``named``: (column, value)) and that at least two columns
    hold, as one finding naming each column with each value it holds.  Only columns whose answers are mostly whole
    numbers are looked at, so that measures of many values cost one comparison."""
    finite = np.isfinite(X)
    held: dict[int, tuple[float, ...]] = {}
    outside: dict[int, tuple[float, ...]] = {}  # every value beyond each column's run, those named by other rules too
    for j in _with_a_gap(X, finite):
        outside[int(j)] = beyond_the_run(X[:, j])
        beyond = tuple(v for v in outside[int(j)] if (int(j), v) not in named)
        if beyond:
            held[int(j)] = beyond
    shared = {v for v in {v for vs in held.values() for v in vs}
              if sum(v in vs for vs in held.values()) >= 2}  # a code the items share, not one item's tail
    pairs = [(j, v) for j in sorted(held) for v in held[j] if v in shared]
    if not pairs:
        return ()
    js = sorted({j for j, _ in pairs})
    cells = np.zeros(X.shape, dtype=bool)
    for j, v in pairs:
        cells[:, j] |= X[:, j] == v
    rows = np.flatnonzero(cells.any(axis=1))
    runs = [_run_ends(X[:, j], outside[j]) for j in js]  # the run itself: a -99 another rule names lies outside it
    return (OddValues(OddKind.SET_APART, tuple(names[j] for j, _ in pairs), tuple(v for _, v in pairs),
                      tuple(int(numbers[r]) for r in rows), int(cells.sum()),
                      (min(r[0] for r in runs), max(r[1] for r in runs)), of=int(finite[:, js].sum())),)


def _with_a_gap(X: np.ndarray, finite: np.ndarray) -> np.ndarray:
    """The columns in which :func:`beyond_the_run` can set values apart, all columns at once: at least
    :data:`SCALE_SHARE` of their answers whole numbers, two of which lie at least :data:`SCALE_GAP` apart with no
    whole answer between them (a value set apart lies so beyond the run).
    Scales answered in full (1 to 5, each given) and measures of fractions cost a few comparisons (review s20:
    ordinary data pay for every rule on every fit)."""
    whole = finite & (X == np.round(X))
    count = whole.sum(axis=0)
    maybe = np.flatnonzero((count >= SCALE_SHARE * np.maximum(finite.sum(axis=0), 1)) & (count > MIN_OTHERS))
    if not len(maybe):
        return maybe
    ordered = np.sort(np.where(whole[:, maybe], X[:, maybe], np.nan), axis=0)  # the whole answers, gaps last
    return maybe[(np.diff(ordered, axis=0) >= SCALE_GAP).any(axis=0)]  # NaN compares false


def _run_ends(x: np.ndarray, beyond: tuple[float, ...]) -> tuple[float, float]:
    """The lowest and highest of a column's answers other than the values ``beyond`` (gaps left out)."""
    x = x[np.isfinite(x) & ~np.isin(x, beyond)]
    return float(x.min()), float(x.max())


def beyond_the_run(x: np.ndarray) -> tuple[float, ...]:
    """The values of one column (numbers, gaps aside) set apart from its answer scale by :data:`SCALE_SHARE` and
    :data:`SCALE_GAP`: () when its values fill no such run (a measure of many values, a scale used in full).  The one
    reading of codes beyond a scale: the rule of codes set apart (:func:`_set_apart`) and explore's reading of the
    scale most columns share (workflows.explore)."""
    x = x[np.isfinite(x)]
    if not len(x):
        return ()
    values, counts = np.unique(x, return_counts=True)
    if len(values) - MAX_SCALE_POINTS > (1 - SCALE_SHARE) * len(x):
        return ()  # too many values outside any run for it to hold its share: a measure of many values
    whole = values == np.round(values)
    best = None  # (answers, first, last) of the run of consecutive whole values holding the most answers
    start = 0
    for k in range(1, len(values) + 1):
        if k == len(values) or not (whole[k] and whole[k - 1] and values[k] - values[k - 1] == 1):
            if whole[start] and 2 <= k - start <= MAX_SCALE_POINTS:
                run = (int(counts[start:k].sum()), start, k - 1)
                best = run if best is None or run[0] > best[0] else best
            start = k
    if best is None or best[0] < SCALE_SHARE * len(x) or best[0] == len(x):
        return ()
    low, high = values[best[1]], values[best[2]]
    outside = [v for v in values if v < low or v > high]
    if any((low - v if v < low else v - high) < SCALE_GAP for v in outside):
        return ()  # a value next to the run: a scale's thinning tail, not codes
    return tuple(float(v) for v in outside)


def _row_findings(X: np.ndarray, clean: np.ndarray, base: np.ndarray, far: np.ndarray, summary: dict[int, OddKind],
                  names: list[str], numbers: np.ndarray) -> list[OddValues]:
    """One finding per row far beyond the others or of sums or means (``clean``: ``X`` without codes; ``base``:
    without the values far beyond either)."""
    found = []
    for r in sorted(set(np.flatnonzero(far.any(axis=1))) | set(summary)):
        kind = summary.get(r, OddKind.FAR_BEYOND)
        js = np.flatnonzero(far[r]) if kind is OddKind.FAR_BEYOND else np.flatnonzero(np.isfinite(clean[r]))
        found.append(OddValues(kind, tuple(names[j] for j in js), tuple(float(clean[r, j]) for j in js),
                               (int(numbers[r]),), len(js), _others(np.delete(base[:, js], r, axis=0))))
    return found


def _outside_scales(X: np.ndarray, apart: np.ndarray, named: set, names: list[str],
                    numbers: np.ndarray) -> tuple[OddValues, ...]:
    """The values outside the answer scale of their item (see the module's rules), one finding for each value and
    scale, naming every column that holds it and its rows: separated from the item's own answers by a gap
    (:func:`_outside_scale`) and beyond the range that the answer runs of the other columns of the same scale
    (the same lowest and highest answer) use; values the other rules name (``named``: (column, value)) are left to
    them.  Only the columns ``apart`` are looked at (:func:`_may_stand_out`: an extreme at
    least two steps beyond the next value), so that ordinary data cost nothing more."""
    found: dict[tuple[float, float, float], list[tuple[int, np.ndarray]]] = {}
    runs: dict[int, tuple[float, float] | None] = {}  # each column's answer run, found when first needed
    for j in apart:
        for value, low, high in _outside_scale(X[:, j]):
            if (j, value) in named:
                continue
            for k in range(X.shape[1]):
                if k != j and k not in runs:
                    runs[k] = _answer_run(X[:, k])
            # the same scale: the same lowest and highest answer (one shared end let a 1-7 item hide a 7 typed
            # among 1-5 answers; review s14)
            scale = [r for k, r in runs.items() if k != j and r is not None and r[0] == low and r[1] == high]
            if not scale or min(r[0] for r in scale) <= value <= max(r[1] for r in scale):
                continue  # no other item of its scale, or one that uses the value: not beyond the scale's range
            found.setdefault((value, low, high), []).append((j, X[:, j] == value))
    for (value, low, high), held in found.items():  # the value in every column of its scale, however often given
        held += _on_the_scale(X, value, low, high, {j for j, _ in held}, named)
        held.sort(key=lambda c: c[0])  # the columns in the file's order
    out = []
    for (value, low, high), held in sorted(found.items(), key=lambda kv: -sum(int(c.sum()) for _, c in kv[1])):
        cells = np.column_stack([c for _, c in held])
        rows = np.flatnonzero(cells.any(axis=1))
        out.append(OddValues(OddKind.OUTSIDE_SCALE, tuple(names[j] for j, _ in held), (float(value),) * len(held),
                             tuple(int(numbers[r]) for r in rows), int(cells.sum()), (low, high)))
    return tuple(out)


def _on_the_scale(X: np.ndarray, value: float, low: float, high: float, taken: set,
                  named: set) -> list[tuple[int, np.ndarray]]:
    """The other columns of ``X`` (not in ``taken``; (column, value) not in ``named``) that hold ``value``, found
    outside the answer scale ``low`` to ``high`` in some column, in fewer than half of their answers, and whose other
    answers have that scale as their answer run (:func:`_answer_run`): (column, its cells holding the value).  The
    value is then counted wherever it stands on the items of that scale, as a declared scale counts every cell
    outside it (data.matching.check_declared_ranges): a 'don't know' code 8 among answers 1 to 4 in 3% of one item's
    answers is the same code as in 2% of another's (re-check s18: 5 of the 16 columns holding it were named, 107 of
    its 432 cells)."""
    out = []
    for k in range(X.shape[1]):
        if k in taken or (k, value) in named:
            continue
        x = X[:, k]
        cells = x == value
        count = int(cells.sum())
        if not count or 2 * count >= int(np.isfinite(x).sum()):
            continue
        if _answer_run(np.where(cells, np.nan, x)) == (low, high):
            out.append((k, cells))
    return out


def _outside_scale(x: np.ndarray) -> list[tuple[float, float, float]]:
    """(value, the scale's lowest and highest answer) of each value of one column separated from its answer run by
    a gap (:func:`_run_of`): a value at least two steps beyond the run's end, that end given in at least FEW_SHARE
    of the answers.  Whether the value also lies beyond the range the other items of its scale use is
    :func:`_outside_scales`' judgement."""
    found = _run_of(x)
    if found is None:
        return []
    x, values, counts, first, last = found
    low, high = float(values[first]), float(values[last])
    out = []
    for k, value in enumerate(values):
        end = first if value < low else last if value > high else None
        if end is None or abs(value - values[end]) < 2 or counts[end] < max(2.0, FEW_SHARE * len(x)):
            continue
        out.append((float(value), low, high))
    return out


def _answer_run(x: np.ndarray) -> tuple[float, float] | None:
    """The lowest and highest answer of a column's answer run (:func:`_run_of`), or None when it has none."""
    found = _run_of(x)
    return None if found is None else (float(found[1][found[3]]), float(found[1][found[4]]))


def _run_of(x: np.ndarray):
    """A column's answer run: the longest run of consecutive whole numbers among its values (at most
    MAX_SCALE_POINTS; the one with more answers of two as long), holding all but at most FEW_SHARE of the answers
    and at least MIN_OTHERS of them, as (answers, distinct values, their counts, the run's first and last
    position among the values); None when there is none (a measure of many values, too few answers)."""
    x = x[np.isfinite(x)]
    few = max(1.0, FEW_SHARE * len(x))
    values, counts = np.unique(x, return_counts=True)
    if len(values) > MAX_SCALE_POINTS + few:  # a measure of many values (the common case of numbers apart)
        return None
    whole = values == np.round(values)
    best = None  # (length, answers, first, last) of the longest run
    start = 0
    for k in range(1, len(values) + 1):
        if k == len(values) or not (whole[k] and whole[k - 1] and values[k] - values[k - 1] == 1):
            if whole[start]:
                run = (k - start, int(counts[start:k].sum()), start, k - 1)
                if best is None or run[:2] > best[:2]:
                    best = run
            start = k
    if best is None or not 2 <= best[0] <= MAX_SCALE_POINTS:
        return None
    _, inside, first, last = best
    if len(x) - inside > few or inside < MIN_OTHERS:
        return None
    return x, values, counts, first, last


def row_naming_cell(frame: pd.DataFrame, odd: "OddValues", items) -> tuple[str, str] | None:
    """:func:`naming_cell` of the first row ``odd`` names, found among ``frame``'s rows by its number (None when the
    frame no longer holds it): the one way a refusal of a totals or means row suggests a row filter."""
    from cfa_tool.data.moments import row_numbers

    at = np.flatnonzero(np.asarray(row_numbers(frame)) == odd.rows[0])
    return naming_cell(frame, items, int(at[0])) if len(at) else None


def naming_cell(frame: pd.DataFrame, items, position: int) -> tuple[str, str] | None:
    """The first column outside ``items`` whose cell at ``position`` (a place among ``frame``'s rows) is text that no
    other row holds ('rider_id', 'Total') and that has a value in every other row, or None: a row filter '!=' on it
    leaves that row out and keeps every other (an empty cell meets no comparison, so a column empty elsewhere would
    leave out the rows it was meant to keep; review s14: a 'note' column kept 1 of 481 rows)."""
    for column in frame.columns:
        if column in items:
            continue
        cells = frame[column]
        value = cells.iloc[position]
        if isinstance(value, str) and value.strip() and "'" not in value and '"' not in value \
                and int((cells == value).sum()) == 1 and bool(cells.notna().all()) \
                and not cells.astype(str).str.strip().eq("").any():
            return str(column), value.strip()
    return None


def code_like(value: float) -> bool:
    """A whole number that is negative or written with nines only (9, 99, 999, -9, -99, ...): the values data
    collection programs commonly use for 'no answer'."""
    if not np.isfinite(value) or value != np.floor(value) or abs(value) >= 1e9:  # codes have a few digits
        return False
    digits = str(int(abs(value)))
    return value < 0 or set(digits) == {"9"}


def _may_stand_out(X: np.ndarray, extremes: tuple[np.ndarray, np.ndarray] | None = None) -> tuple[np.ndarray, np.ndarray]:
    """The columns in which :func:`_peeled` can find a value, all columns at once: its first judgement at the top
    needs the highest answer at least the range of the others beyond them (highest - next <= next - lowest fails
    it), and at the bottom likewise; a column failing both has nothing to peel.  Comparisons with NaN keep a
    column (``_peeled`` judges it).  Second, the columns in which :func:`_outside_scale` can find a value: an
    extreme at least two steps beyond the next value.  ``extremes``: each column's (lowest, highest) finite value,
    when the caller has them."""
    finite = np.isfinite(X)  # the extremes over masks (no masked copy of the data: on a thousand rows its
    bottom, top = extremes if extremes is not None else answer_extremes(X, finite)  # allocation costs more than the comparisons)
    if finite.all():  # no gaps (the common case): fewer masks
        next_top = X.max(axis=0, initial=-np.inf, where=X < top)
        next_bottom = X.min(axis=0, initial=np.inf, where=X > bottom)
    else:
        next_top = X.max(axis=0, initial=-np.inf, where=finite & (X < top))
        next_bottom = X.min(axis=0, initial=np.inf, where=finite & (X > bottom))
    quiet = (top - next_top < next_top - bottom) & (next_bottom - bottom < top - next_bottom)
    apart = (top - next_top >= 2) | (next_bottom - bottom >= 2)
    return np.flatnonzero(~quiet), np.flatnonzero(apart)


def _peeled(x: np.ndarray) -> list[tuple[float, bool, float]]:
    """(value, whether a code, how many ranges of the other answers beyond them) of the values that lie far beyond the column's other answers, judged from
    each end inwards."""
    x = x[np.isfinite(x)]
    if len(x) <= MIN_OTHERS:
        return []
    values, counts = np.unique(x, return_counts=True)
    lo, hi = 0, len(values) - 1
    flagged: list[tuple[float, bool, float]] = []
    left = len(x)
    for end in (1, -1):
        while hi > lo:
            k = hi if end == 1 else lo
            v = values[k]
            rest = values[lo:hi] if end == 1 else values[lo + 1:hi + 1]
            n_rest = left - counts[k]
            span = rest[-1] - rest[0]
            if n_rest < MIN_OTHERS or counts[k] * 2 >= left or span <= 0:
                break
            beyond = v - rest[-1] if end == 1 else rest[0] - v
            code = code_like(v)
            if not (beyond_as_a_code(float(v), float(rest[0]), float(rest[-1])) if code else beyond > FAR_RANGES * span):
                break
            flagged.append((float(v), code, float(beyond / span)))
            left = n_rest
            if end == 1:
                hi -= 1
            else:
                lo += 1
    return flagged


def _summary_rows(X: np.ndarray, base: np.ndarray) -> dict[int, OddKind]:
    """:func:`_summary_rows_once`, and when it finds means rows, again with them out of the other rows' sums: a
    totals row above or below a means row is then the sum of the other rows (review s14: a 'Total' row beside a
    'Mean' row was off by the means and not found)."""
    found = _summary_rows_once(X, base)
    means = [r for r, kind in found.items() if kind is OddKind.MEANS_ROW]
    if means:
        trimmed = np.array(base, dtype=float)
        trimmed[means] = np.nan
        found.update({r: kind for r, kind in _summary_rows_once(X, trimmed).items()
                      if kind is OddKind.SUMS_ROW and r not in found})  # a means row stays one
    return found


def _summary_rows_once(X: np.ndarray, base: np.ndarray) -> dict[int, OddKind]:
    """Rows of ``X`` whose answers equal the sums or the means of the other rows' answers in ``base`` (``X`` without
    the values far beyond) in every item column they answer (three or more), with a value no other row gives in
    its column.  Column by column on the rows still in question, so that large files cost little."""
    in_base = np.isfinite(base)
    if base is X and in_base.all():  # no gaps and nothing set aside (the common case): the same sums, unmasked
        totals, counts = X.sum(axis=0), np.full(X.shape[1], len(X))
        rows = np.arange(len(X)) if X.shape[1] >= 3 else np.arange(0)
    else:
        totals = np.where(in_base, base, 0.0).sum(axis=0)
        counts = in_base.sum(axis=0)
        rows = np.flatnonzero(np.isfinite(X).sum(axis=1) >= 3)
    as_sum = np.ones(len(rows), dtype=bool)
    as_mean = np.ones(len(rows), dtype=bool)
    for j in range(X.shape[1]):
        x = X[rows, j]
        answered = np.isfinite(x)
        own = in_base[rows, j]
        others = totals[j] - np.where(own, base[rows, j], 0.0)  # the other rows' sum
        with np.errstate(invalid="ignore", divide="ignore"):
            mean = others / (counts[j] - own)
        as_sum &= ~answered | (np.abs(x - others) <= SUM_TOLERANCE + 1e-9)
        as_mean &= ~answered | (np.abs(x - mean) <= MEAN_TOLERANCE + 1e-9)
        keep = as_sum | as_mean
        rows, as_sum, as_mean = rows[keep], as_sum[keep], as_mean[keep]
        if not len(rows):
            return {}
    out: dict[int, OddKind] = {}
    for r, summed, meaned in zip(rows, as_sum, as_mean):
        js = np.flatnonzero(np.isfinite(X[r]))
        if not any((np.delete(X[:, j], r) != X[r, j]).all() for j in js):
            continue
        if summed and not _beyond_the_others(X[r, js], np.delete(base[:, js], r, axis=0)):
            summed = False  # sums inside the other answers' range: answers near zero, not a totals row
            if not meaned:
                continue
        out[int(r)] = OddKind.SUMS_ROW if summed else OddKind.MEANS_ROW
    return out


def _beyond_the_others(row: np.ndarray, others: np.ndarray) -> bool:
    """Whether ``row`` lies beyond the range of the ``others``' answers (below the lowest or above the highest) in at
    least half of its columns: a totals row of ten or more answers of one sign does, answers near zero of data
    centred at zero (whose sums are near zero too, within SUM_TOLERANCE of a row of small answers) do not."""
    answered = np.isfinite(others)
    low = np.min(others, axis=0, initial=np.inf, where=answered)
    high = np.max(others, axis=0, initial=-np.inf, where=answered)
    return 2 * int(((row < low) | (row > high)).sum()) >= len(row)


def _others(values: np.ndarray) -> tuple[float, float]:
    """The lowest and highest of the answers ``values`` (gaps left out)."""
    rest = values[np.isfinite(values)]
    return (float(rest.min()), float(rest.max())) if len(rest) else (float("nan"), float("nan"))


def _listed(items) -> str:
    return cut_list(list(items), SHOWN, lambda i: printable(str(i)))


def _number(value: float) -> str:
    return user_number(value) if abs(value) < 1e15 else f"{value:.6g}"
