"""The one note of what --missing-codes read as no answer: the reader's count of cells of numbers (data/readers.py)
and the count among answers recorded as words (data/answer_words.py) are both written by :func:`missing_codes_note`;
and the caution, first in every view, when a code given is one the data file labels as an answer between the items'
other answers (:class:`CodeOnAnswer`)."""

from __future__ import annotations

from collections.abc import Collection
from dataclasses import dataclass, replace
from pathlib import Path

import numpy as np
import pandas as pd

from cfa_tool.numbers import count_text, counted, cut_list, user_number
from cfa_tool.errors import clipped, printable
from cfa_tool.input_files import base_name
from cfa_tool.note_parts import Command, Note
from cfa_tool.options import Option

#: the columns a note names before it counts the rest
NAMED_COLUMNS = 8


def missing_value(value: object) -> float | str:
    """One value given with --missing-codes (the command line's text split at its commas) or ``missing_codes=`` (a
    Python list), by the one rule of both: a number, or text that reads as one ('-99'), is a code, read as no answer
    in the cells of numbers; a word ('Ne sait pas', text holding a letter) joins the words of no answer for the run
    (data.non_answers.also_no_answer), read, counted and named as the listed phrases are.  Anything else (a mistyped
    number such as '9 9', True, None) is a ValueError saying what was given, and so is NaN, as a number
    (float('nan'), which counted empty cells as coded) or written ('nan', which no cell was found to hold), and an
    infinity: no cell holds such a code, and an empty cell is no answer already (hostile trial s17, finding 8)."""
    import math
    import numbers as kinds

    from cfa_tool.numbers import number

    if isinstance(value, kinds.Real) and not isinstance(value, bool):
        if not math.isfinite(float(value)):
            raise ValueError(_no_code(clipped(repr(value), 60), math.isnan(float(value))))
        return float(value)
    if isinstance(value, str):
        read = number(value)
        if read is not None:
            return read
        if value.strip().casefold() in ("nan", "inf", "-inf", "+inf", "infinity", "-infinity", "+infinity"):
            raise ValueError(_no_code(f"'{printable(value.strip())}'", value.strip().casefold() == "nan"))
        if any(c.isalpha() for c in value):
            return value.strip()
    shown = f"'{printable(value)}'" if isinstance(value, str) else clipped(repr(value), 60)
    raise ValueError(f"{shown} is neither a number nor a word")


def _no_code(shown: str, not_a_number: bool) -> str:
    """The refusal of NaN (an empty cell is no answer already) or an infinity (no cell of answers holds one) given as a
    code of no answer (re-check s17: an infinity was refused with NaN's reason)."""
    why = ("an empty cell is no answer already" if not_a_number else
           "a code of no answer is a finite number, such as -99 or 999")
    return f"{shown} is no code a cell can hold ({why}); leave it out"


def codes_and_words(values) -> tuple[tuple[float, ...], tuple[str, ...]]:
    """The values given as missing codes (:func:`missing_value` each), split into the numeric codes and the words,
    each in the order given."""
    read = [missing_value(v) for v in values]
    return (tuple(v for v in read if not isinstance(v, str)), tuple(v for v in read if isinstance(v, str)))


def codes_shown(codes) -> str:
    """Missing codes as the notes show them: numbers as written (9, -99), words in quotes ('Ne sait pas')."""
    return ", ".join(f"{user_number(c)}" if isinstance(c, (int, float)) else f"'{printable(str(c))}'" for c in codes)


#: the words of a note on the codes given with --missing-codes where it names the option (a manuscript's words)
GIVEN_WORDS = " as codes of no answer"


def names_the_given_codes(note) -> bool:
    """Whether ``note`` is one of :func:`missing_codes_note`'s, which say the codes were given with --missing-codes
    (scores of other data with an earlier fit read its codes without the option: those notes are not said then)."""
    return isinstance(note, Note) and any(isinstance(p, Command) and p.words == GIVEN_WORDS for p in note.parts)


def missing_codes_note(source: str | Path, codes: Collection[float | str], read_as_none: list[tuple[str, int]],
                       where: str = "") -> Note:
    """What --missing-codes (``codes``) did in the data file ``source``: how many cells of which columns
    (``read_as_none``: (column, cells) pairs) were read as no answer, or that no cell holds any of the codes, as a
    mistyped code would leave it.  ``where``: which cells were looked at when not those of numbers ('of the items
    coded by an 'answers' statement'); ``codes`` may be words (--missing-codes 'Ne sait pas'), shown in quotes.
    The option apart (note_parts.Command): a manuscript says 'given as codes of no answer'."""
    given = codes_shown(codes)
    name = base_name(source)
    with_option = Command(f" with {Option.MISSING_CODES}", GIVEN_WORDS)
    if not read_as_none:
        return Note((f"{name}: no cell {where or 'of numbers'} holds any of the codes given", with_option,
                     f" ({given})"))
    total = sum(n for _, n in read_as_none)
    shown = cut_list(read_as_none, NAMED_COLUMNS, lambda pair: f"{printable(str(pair[0]))} {pair[1]}", noun="column")
    return Note((f"{name}: {count_text(total)} {'cell' if total == 1 else 'cells'} {where + ' ' if where else ''}holding a code "
                 f"given", with_option, f" ({given}) {'was' if total == 1 else 'were'} read as no answer ({shown})"))


def apply_missing_codes(frame: pd.DataFrame, codes, source: str | Path, items: Collection[str] | None = None,
                        filters: Collection = ()) -> tuple[pd.DataFrame, tuple[str, ...], frozenset[float]]:
    """``frame`` (of the data file ``source``) with the cells of numbers holding one of ``codes`` (--missing-codes)
    read as no answer in the item columns ``items`` (every column when None: no model yet), the codes some such
    cell held, and the notes saying so: how many cells of which columns (:func:`missing_codes_note`), and the other columns that hold a code and
    keep it (:func:`kept_codes_note`): a group, cluster or weight column's 9 is the value 'Grade 9' more often than
    a code of no answer (new-user trial 9: --missing-codes 9 emptied grade 9 and its rows left the analysis).
    ``filters``: the row filters given (data.filters.RowFilter), which the note's advice does not suggest again."""
    read_as_none: list[tuple[str, int]] = []
    kept: list[tuple[str, float, int]] = []
    found: set[float] = set()
    if not codes:
        return frame, (), frozenset()
    frame = frame.copy()
    mine = None if items is None else {str(x) for x in items}
    for column in frame.columns:
        if not pd.api.types.is_numeric_dtype(frame[column]):
            continue
        coded = frame[column].isin(codes)
        if not coded.any():
            continue
        if mine is None or str(column) in mine:
            read_as_none.append((column, int(coded.sum())))
            found.update(float(v) for v in pd.unique(frame[column][coded]))
            frame[column] = frame[column].where(~coded)
        else:
            others = frame[column][~coded].dropna().to_numpy(dtype=float)
            for code in codes:
                cells = int((frame[column] == code).sum())
                if cells:
                    kept.append((column, code, cells, _far_outside(code, others)))
    looked = "" if mine is None or read_as_none else "of the items"  # the cells looked at: the others keep codes (below)
    return frame, (missing_codes_note(source, codes, read_as_none, looked),) + (
        (kept_codes_note(source, kept, filters),) if kept else ()), frozenset(found)


def _left_out(column: str, code: float, filters: Collection) -> bool:
    """Whether a row filter given (``filters``: data.filters.RowFilter) already leaves out the rows whose ``column``
    holds ``code``."""
    return any(str(f.column) == str(column) and f.compares_numbers() and not f.meets(code)
               for f in filters)


def beyond_as_a_code(value: float, low: float, high: float) -> bool:
    """Whether ``value`` lies at least the range of the other answers (``low`` to ``high``) beyond them, below the
    lowest or above the highest, as a code of no answer does (-99 beside 1 to 5; 9 beside 1 to 4), while a value
    nearer is the column's own (a grade of 8 or 9 beside grades of 7 to 9); when the others are all one value, at
    least 1 beyond it.  The one rule of 'this value lies where a missing-value code lies': the screening of item
    columns (data.odd_values._peeled, for values that are data.odd_values.code_like) and the codes given with
    --missing-codes that other columns keep (:func:`kept_codes_note`).  A rule of this project (common practice of data
    screening), not a published test."""
    beyond = low - value if value < low else value - high if value > high else 0.0
    return beyond > 0 and beyond >= (high - low if high > low else 1.0)


def _far_outside(code: float, others) -> bool:
    """Whether ``code`` lies where a code of no answer lies beside the column's other values (-99 beside ages of 18
    to 70), by the one rule the screening of item columns follows (:func:`beyond_as_a_code`); a grade of 8
    or 9 beside 7 to 9 is the column's own value (new-user trial s18)."""
    if not len(others):
        return False
    return beyond_as_a_code(float(code), float(others.min()), float(others.max()))


def kept_codes_note(source: str | Path, kept: list[tuple[str, float, int, bool]], filters: Collection = ()) -> Note:
    """The note on codes given with --missing-codes that columns other than the items hold and keep as values, with
    a row filter that would leave those rows out when none given (``filters``) does already, for a code far outside
    the column's other values (:func:`_far_outside`): a value among them is no code of no answer there, and leaving
    its rows out would drop respondents (a grade of 8 among grades 7 to 9)."""
    shown = cut_list(kept, NAMED_COLUMNS, lambda k: f"'{printable(str(k[0]))}' holds {user_number(k[1])} in "
                     f"{counted(k[2], 'row')}", sep="; ", lead="; and ")
    open_ = [(column, code) for column, code, _, far in kept if far and not _left_out(column, code, filters)]
    from cfa_tool.data.filter_text import filter_text

    kept_rows = (filter_text(str(open_[0][0]), "!=", float(open_[0][1])) or "") if open_ else ""  # the one writer
    advice = ("; to leave those rows out, ", Command(f"give a row filter such as {Option.KEEP.given(kept_rows)}",
                                                      f"keep only the rows where {kept_rows}")) if kept_rows else ()
    return Note((f"{base_name(source)}: ", Command(f"{Option.MISSING_CODES} applies", "the codes of no answer apply"),
                 f" to the model's items; other columns keep such a value as it is ({shown})") + advice)


#: items and row numbers the caution of a code given for a labelled answer names before 'and N more'
SHOWN = 6


@dataclass(frozen=True)
class CodeOnAnswer:
    """A code given with --missing-codes that lies between other answers of the items ``columns``
    (data.non_answers.between_answers: 3 'Neutral' between 2 'Disagree' and 4 'Agree' of a labelled file, or an
    unlabelled 3 between the 1s and 2s and the 4s and 5s the items were answered with, in a text file or a data
    frame): its cells were read as no answer, as the researcher asked, and every view says so first, naming the
    label (``label``; None when the file labels none), the items, the cells and rows it turned into gaps (a
    researcher may mean it: the caution says what it did; gaps made of an answer are missing because of their own
    value, which full-information ML does not assume).  ``rows``: the row numbers (data.moments.row_numbers) of its
    cells in each column; ``scale``: the lowest and highest of the items' other answers."""

    value: float
    label: str | None
    columns: tuple[str, ...]
    rows: tuple[tuple[int, ...], ...]  # one tuple per column
    scale: tuple[float, float]
    #: the kind of problem every view files it under (assessment.admissibility.ProblemKind's value)
    problem_kind: str = "answers given as missing codes"
    #: the data file's own declaration of missing values made the gaps (an SPSS file's MISSING VALUES), not a code
    #: the run gave (hostile s25: 3 'Neither agree nor disagree' declared missing lost 39% of the answers with a note)
    declared: bool = False
    #: with ``declared``: the declaration is the earlier fit's data file's, carried to the file scored with the fit
    #: (scores --from-fit of a plain export of the same survey, data.non_answers.read_fit_marked)
    carried: bool = False

    def among(self, kept) -> CodeOnAnswer | None:
        """The cells in the rows that row filters kept (``kept``: row numbers), or None when they kept none."""
        held = [(c, tuple(r for r in rows if r in kept)) for c, rows in zip(self.columns, self.rows)]
        held = [(c, rows) for c, rows in held if rows]
        return replace(self, columns=tuple(c for c, _ in held), rows=tuple(r for _, r in held)) if held else None

    def caution(self, source: str) -> Note:
        """The finding, the option apart (note_parts.Command): a manuscript says 'given as a code of no answer'."""
        cells = sum(len(r) for r in self.rows)
        rows = len(set().union(*self.rows))
        each = [f"{printable(str(c))} {len(r)}" for c, r in zip(self.columns, self.rows)]
        listed = cut_list(each, SHOWN)
        many = len(self.columns) != 1
        name = base_name(source)
        given = Option.MISSING_CODES.given(f'{user_number(self.value)}')
        if self.carried:  # the earlier fit's file's declaration, read so in the file scored
            opening = (f"The earlier fit's data file declares the code {user_number(self.value)} a missing value, which "
                       f"it labels '{printable(self.label)}', and {name} holds it as an answer between the other "
                       f"answers ({user_number(self.scale[0])} to {user_number(self.scale[1])})",)
            instead = f"as '{printable(self.label)}'"
        elif self.declared:  # the file's declaration, with the label it gives the code
            opening = (f"{name} declares the code {user_number(self.value)} a missing value, which it labels "
                       f"'{printable(self.label)}', an answer between the other answers ({user_number(self.scale[0])} "
                       f"to {user_number(self.scale[1])})",)
            instead = f"as '{printable(self.label)}'"
        elif self.label is None:  # an unlabelled code, an answer by its place among the answers given
            opening = (Command(f"{given} read as no answer the code {user_number(self.value)}, which lies in {name}",
                               f"The code {user_number(self.value)}, given as a code of no answer, was read as no answer; in "
                               f"{name} it lies"),
                       f" between the other answers ({user_number(self.scale[0])} to {user_number(self.scale[1])})")
            instead = f"as the answer {user_number(self.value)}"
        else:
            opening = (Command(f"{given} read as no answer the code {user_number(self.value)}, which {name} labels",
                               f"The code {user_number(self.value)}, given as a code of no answer, was read as no answer; "
                               f"{name} labels it"),
                       f" '{printable(self.label)}', an answer between the other answers "
                       f"({user_number(self.scale[0])} to {user_number(self.scale[1])})")
            instead = f"as '{printable(self.label)}'"
        return Note(opening + (
            f" of {len(self.columns) if many else 'the'} item{'s' if many else ''} holding it: {count_text(cells)} "
            f"cell{'s' if cells != 1 else ''} ({listed}) in {count_text(rows)} row{'s' if rows != 1 else ''} became "
            f"gaps, {'scored' if self.carried else 'analysed'} as missing answers, not {instead}"
            + (", as the fit read it." if self.carried else "."),))

    def advice(self) -> Note:
        answer = f"{user_number(self.value)}" if self.label is None else f"'{printable(self.label)}'"
        if self.carried:
            return Note((f"If {answer} is an answer, the fit read it as no answer too: remove its declaration as a "
                         f"missing value in a copy of the fit's data file and fit again before scoring; if these "
                         f"items' {user_number(self.value)} means no answer, nothing (gaps so made are missing because "
                         f"of their own value, which scores computed from each row's other answers do not assume).",))
        if self.declared:
            return Note((f"If {answer} is an answer, remove its declaration as a missing value in a copy of the data "
                         f"file; if these items' {user_number(self.value)} means no answer, nothing (gaps so made are "
                         f"missing because of their own value, which full-information ML does not assume).",))
        return Note((f"If {answer} is an answer, leave {user_number(self.value)} out of ",
                     Command(f"{Option.MISSING_CODES}", "the codes of no answer"),
                     f"; if these items' {user_number(self.value)} means no answer, nothing (gaps so made are missing because "
                     f"of their own value, which full-information ML does not assume)."))


def codes_on_answers(frame: pd.DataFrame, codes, value_labels: dict, items: Collection[str] | None,
                     rows: np.ndarray) -> tuple[CodeOnAnswer, ...]:
    """The codes given with --missing-codes (``codes``) that lie between the other answers of the item columns
    ``items`` (None: every column) holding them, by the one rule of a code on the answer scale
    (data.non_answers.between_answers): answers labelled so by the data file (``value_labels``) or answered (a lower
    and a higher value the item holds), whether the code itself is labelled (3 'Neutral') or not (a text file's 3
    among answers 1 to 5); a code the file labels as no answer (8 'Don't know' between answers) is the file's word
    and said by its own note.  ``frame``: the rows before the codes are read as no answer; ``rows``: its row
    numbers (data.moments.row_numbers).  One for each code, label and scale, naming every item that holds it."""
    from cfa_tool.data.non_answers import between_answers, says_no_answer

    numeric_codes = tuple(float(c) for c in codes if isinstance(c, (int, float)) and not isinstance(c, bool))
    if not numeric_codes:
        return ()
    mine = None if items is None else {str(x) for x in items}
    found: dict[tuple, list] = {}
    for column in frame.columns:
        if (mine is not None and str(column) not in mine) or not pd.api.types.is_numeric_dtype(frame[column]):
            continue
        labels = value_labels.get(column, {})
        values = frame[column].to_numpy(dtype=float, na_value=np.nan)
        present = [v for v in np.unique(values[np.isfinite(values)]).tolist() if v not in numeric_codes]
        for code in numeric_codes:
            text = labels.get(code)
            text = text if isinstance(text, str) else None
            cells = values == code
            if (text is not None and says_no_answer(text, explained=True)) or not cells.any() \
                    or not between_answers(code, labels, present, numeric_codes):
                continue
            found.setdefault((code, text, *_answer_scale(labels, present, numeric_codes)), []).append(
                (column, tuple(int(r) for r in rows[cells])))
    return _codes_on_answers(found)


def labelled_scale(labels: dict, skip=()) -> tuple[float, float] | None:
    """The lowest and highest answer an item's value labels declare: its labelled codes whose label does not say no
    answer, the codes read as no answer (``skip``) aside; None when no label declares an answer.  What a fit keeps of
    its file's labels (pipeline.results.DataSummary.labelled_scales), so that scoring other data with it judges an
    answer 0 labelled 'Never' on the scale although none of the fit's rows gave it (new-user trial s25)."""
    from cfa_tool.data.non_answers import says_no_answer

    answers = [float(k) for k, v in labels.items() if isinstance(k, float) and k not in skip
               and not says_no_answer(v, explained=True)]
    return (min(answers), max(answers)) if answers else None


def _answer_scale(labels: dict, present: list, skip) -> tuple[float, float]:
    """The lowest and highest of an item's other answers: its labelled codes whose label does not say no answer and
    the values it holds (``present``), the codes read as no answer (``skip``) aside."""
    from cfa_tool.data.non_answers import says_no_answer

    answers = [float(k) for k, v in labels.items() if isinstance(k, float) and k not in skip
               and not says_no_answer(v, explained=True)] + list(present)
    return min(answers), max(answers)


def _codes_on_answers(found: dict, declared: bool = False, carried: bool = False) -> tuple[CodeOnAnswer, ...]:
    """One :class:`CodeOnAnswer` for each (code, label, lowest, highest) of ``found``, naming every (item, rows) that
    holds it; ``declared``: the data file's own declaration of missing values made the gaps; ``carried``: the
    earlier fit's data file's, read so in a file scored with the fit."""
    kind = {"problem_kind": "answers the file declares missing", "declared": True, "carried": carried} \
        if declared or carried else {}
    return tuple(CodeOnAnswer(code, text, tuple(c for c, _ in held), tuple(r for _, r in held), (low, high), **kind)
                 for (code, text, low, high), held in found.items())


def carried_codes_on_answers(frame: pd.DataFrame, carried, value_labels: dict) -> tuple[CodeOnAnswer, ...]:
    """The codes an earlier fit's data file declared missing with a label that names an answer (3 'Neither agree nor
    disagree'; data.non_answers.CarriedCells.declared_label), read as no answer in a file scored with the fit
    (``carried``, data.non_answers.read_fit_marked), that lie between the other answers of that file's items by the
    one rule of a code on the answer scale (data.non_answers.between_answers: its own labels, ``value_labels``, or
    its answers given): the caution first that the fit gives of its own file (:func:`declared_codes_on_answers`;
    hostile s25: a plain export scored with the fit lost its midpoint answers with a note only).  ``frame``: the rows
    before the carried codes were read as missing."""
    from cfa_tool.data.moments import row_numbers
    from cfa_tool.data.non_answers import between_answers, says_no_answer

    numbers = dict(zip(frame.index.tolist(), row_numbers(frame).tolist()))
    codes: dict[str, set] = {}
    for c in carried:
        codes.setdefault(c.column, set()).add(c.value)
    found: dict[tuple, list] = {}
    for c in carried:
        if not c.declared_label or says_no_answer(c.declared_label, explained=True):
            continue
        labels = value_labels.get(c.column, {})
        values = frame[c.column].to_numpy(dtype=float, na_value=np.nan)
        skip = tuple(codes[c.column])
        present = [v for v in np.unique(values[np.isfinite(values)]).tolist() if v not in skip]
        if not between_answers(c.value, labels, present, skip):
            continue
        rows = tuple(int(numbers[r]) for r in c.rows if r in numbers)
        if rows:
            found.setdefault((c.value, c.declared_label, *_answer_scale(labels, present, skip)), []).append(
                (c.column, rows))
    return _codes_on_answers(found, carried=True)


def declared_codes_on_answers(frame: pd.DataFrame, declared, value_labels: dict, items: Collection[str] | None
                              ) -> tuple[CodeOnAnswer, ...]:
    """The codes the data file declares missing (``declared``: data.non_answers.NonAnswer of kind DECLARED, read as
    missing by the reader) that lie between the other answers of the item columns ``items`` (None: every column), by
    the one rule of a code on the answer scale (data.non_answers.between_answers), the label of the code not saying no
    answer: the same caution first as a code given with --missing-codes (:func:`codes_on_answers`), said as the file's
    declaration.  ``frame``: the rows with the declared codes already read as missing."""
    from cfa_tool.data.moments import row_numbers
    from cfa_tool.data.non_answers import NonAnswerKind, between_answers, says_no_answer

    mine = None if items is None else {str(x) for x in items}
    found: dict[tuple, list] = {}
    numbers = dict(zip(frame.index.tolist(), row_numbers(frame).tolist()))
    codes = {}
    for n in declared:
        if n.kind is NonAnswerKind.DECLARED and isinstance(n.value, float):
            codes.setdefault(n.column, []).append(n.value)
    for n in declared:
        if (n.kind is not NonAnswerKind.DECLARED or not isinstance(n.value, float) or n.column not in frame.columns
                or (mine is not None and str(n.column) not in mine) or not n.label
                or says_no_answer(n.label, explained=True)
                or not pd.api.types.is_numeric_dtype(frame[n.column])):
            continue
        labels = value_labels.get(n.column, {})
        values = frame[n.column].to_numpy(dtype=float, na_value=np.nan)
        present = np.unique(values[np.isfinite(values)]).tolist()
        skip = tuple(codes.get(n.column, ()))
        if not between_answers(n.value, labels, present, skip):
            continue
        rows = tuple(int(numbers[r]) for r in n.rows if r in numbers)
        if rows:
            found.setdefault((n.value, n.label, *_answer_scale(labels, present, skip)), []).append((n.column, rows))
    return _codes_on_answers(found, declared=True)
