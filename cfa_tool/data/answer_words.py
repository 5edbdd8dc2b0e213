"""Answers recorded as words ('Strongly disagree' ... 'Strongly agree'), coded by the model's 'answers' statements.

The tool never guesses the order of answer words: only words an 'answers' statement lists are coded, each to the
number the statement gives it.  Matching ignores case and the spaces around a word, never parts of words; an
empty cell stays no answer; any other cell (a word not listed, a number the statement does not list) is an error
naming the file, column, row and the cell.
"""

from __future__ import annotations

import re

import numpy as np
import pandas as pd

from dataclasses import replace

from cfa_tool.data.kept_rows import row_naming, row_words, text_lines
from cfa_tool.data.moments import row_numbers
from cfa_tool.data.missing_codes import missing_codes_note
from cfa_tool.data.non_answers import run_words, says_no_answer
from cfa_tool.errors import DataError, Location, ModelError, OptionError, character_names, clipped, printable
from cfa_tool.options import Option
from cfa_tool.note_parts import Command, Note
from cfa_tool.language.spec import AnswerCoding, AnswerWord, Name, Spec, answer_key
from cfa_tool.numbers import number as strict_number, user_number, word_list

def _shown(value: object) -> str:
    if isinstance(value, (int, float, np.integer, np.floating)) and not isinstance(value, (bool, np.bool_)):
        return f"{user_number(float(value))}"
    return clipped(str(value).strip(), 40)


def _listed(coding: AnswerCoding) -> str:
    return ", ".join(f"'{printable(a.shown)}'" for a in coding.answers)


def _code_of(value: object, words: dict[str, float], numbers: dict[float, float]) -> tuple[float, str | None]:
    """The code of one distinct cell value, or NaN and what is wrong with it ('word', 'number', 'other')."""
    if value is None or value is pd.NA or (isinstance(value, float) and value != value):
        return np.nan, None
    if isinstance(value, str):
        if not value.strip():
            return np.nan, None  # a cell of spaces is an empty cell
        code = words.get(answer_key(value))
        if code is not None:
            return code, None
        number = strict_number(value.strip())
        if number is None:
            return np.nan, "word"
        value = number
    if isinstance(value, (bool, np.bool_)) or not isinstance(value, (int, float, np.integer, np.floating)):
        return np.nan, "other"
    code = numbers.get(float(value))
    return (code, None) if code is not None else (np.nan, "number")


#: ``frame.attrs`` key of a frame whose items 'answers' statements coded: each such item with the (word, number, code)
#: its statement lists (as :func:`coding_record` lists them), so that a message about its codes can suggest a
#: statement of its own (data.polychoric: an empty category of ordinal groups)
CODED_BY_STATEMENT = "coded_by_answers_statement"

#: ``frame.attrs`` key of the items an 'answers' statement covers whose answers in the data held no word (numbers
#: alone, e.g. a Stata or SPSS file of codes): pipeline.results.DataSummary.numbers_only
NUMBERS_ONLY = "answers_numbers_only"


#: a value label that starts with its code: '1 Strongly agree', '5 - agree', '2: rarely', '1) never'
_LABEL_CODE = re.compile(r"^\s*[-+]?\d+(?:[.,]\d+)?(?:\s*[-\u2013:=.)]\s*|\s+)(?=\S)")


def _labelled_codes(labels: dict, words: dict) -> list[tuple[float, str, float]]:
    """(number, label, code) of each of a column's value labels (value -> text) whose word, or the word after the code
    a label carries ('1 Strongly agree', '5 - agree'), a statement codes (``words``: its codes by word)."""
    found = []
    for value, text in labels.items():
        number = strict_number(str(value).strip()) if isinstance(value, str) else value
        if not isinstance(number, (int, float, np.integer, np.floating)) or isinstance(number, (bool, np.bool_)):
            continue
        code = words.get(answer_key(str(text)))
        if code is None and _LABEL_CODE.match(str(text)):
            code = words.get(answer_key(_LABEL_CODE.sub("", str(text))))
        if code is not None:
            found.append((float(number), str(text).strip(), code))
    return found


def _numbers_by_labels(labels: dict, words: dict) -> str:
    """'1 = 5, 2 = 4, ...': each labelled number with the code its label's word has in a statement (``words``: the
    statement's codes by word), '' when no label is one of its words."""
    return ", ".join(f"{user_number(n)} = {user_number(c)}" for n, _, c in sorted(_labelled_codes(labels, words)))


def refuse_labels_against_coding(codings: dict, value_labels: dict, source: str) -> None:
    """The data file's value labels (SPSS, Stata: value -> text, per column) must not give a number a word that the
    item's 'answers' statement codes as another number: a file labelled 1 = 'Strongly agree' read with a statement
    coding 'Strongly agree' as 7 (a scale stored the other way round) would turn every factor and score around
    unsaid (new-user trial s23).  One DataError naming the file, the first such column, value, label and code, and
    how many columns disagree."""
    found: list[tuple[str, float, str, float, AnswerCoding]] = []
    for item, coding in codings.items():
        labels = value_labels.get(item) or {}
        if not labels:
            continue
        numbers = coding.codes_by_number()
        for number, text, word_code in _labelled_codes(labels, coding.codes_by_word()):
            number_code = numbers.get(number)
            if number_code is not None and word_code != number_code:
                found.append((item, number, text, word_code, coding))
                break
    if not found:
        return
    item, number, text, code, coding = found[0]
    more = (f" ({len(found)} columns' labels disagree so)" if len(found) > 1 else "")
    raise DataError(f"{source}: the file's value labels of column '{printable(item)}' name {user_number(number)} "
                    f"'{printable(clipped(text, 40))}', which {coding.origin} codes as {user_number(code)}{more}: the file "
                    f"and the statement disagree about what the numbers mean, and every factor and score would point "
                    f"the other way; write the statement as the file labels its values (or correct the labels)")


def answers_statement(answers, items: tuple[str, ...] | None = None) -> str:
    """An 'answers' statement written in the model language: ``answers``, each (word or None, number or None, code)
    as a statement lists them (language.spec.AnswerWord), for ``items`` (None: for every item)."""
    from cfa_tool.language.names import written_name

    listed = ", ".join((f'"{word}"' if word is not None else f"{number:.15g}") + f" = {code:.15g}"
                       for word, number, code in answers)
    return f"answers {listed}" + (f" for {', '.join(written_name(x) for x in items)}" if items else "")


def code_answer_words(spec: Spec, frame: pd.DataFrame, source: str,
                      only: tuple[str, ...] | None = None,
                      missing_codes: tuple[float, ...] = (),
                      value_labels: dict | None = None) -> tuple[pd.DataFrame, list[Note]]:
    """``frame`` with the items its 'answers' statements cover (of them, those in ``only`` when given) coded as
    numbers (a copy; the caller's frame is not changed), and one note per statement saying how the answers were
    coded and, if so, which words share a code.  ``missing_codes`` (--missing-codes) mean no answer in these items
    too: a cell holding one (as a number or written as one, such as '-99' among words), or a word the statement
    codes as one, is read as missing, and a note counts them.  ``value_labels``: the data file's (SPSS, Stata), which
    may not give a number a word the statement codes otherwise (:func:`refuse_labels_against_coding`).  The items whose
    answers held no word at all are kept in ``frame.attrs[NUMBERS_ONLY]``: no note or methods text says their answers
    were recorded as words."""
    codings = spec.answer_codings()
    if only is not None:
        codings = {x: c for x, c in codings.items() if x in only}
    if not codings:
        return frame, []
    refuse_labels_against_coding(codings, value_labels or {}, source)
    given, frame = frame, frame.copy()  # the cells as read: the advice reads which items hold words in them
    numbers_only: list[str] = []
    no_answer = set(float(c) for c in missing_codes)
    for coding in {id(c): c for c in codings.values()}.values():
        _check_codes_of_answers(coding, no_answer)
    read_as_none: list[tuple[str, int]] = []
    for item, coding in codings.items():
        words, numbers = coding.codes_by_word(), coding.codes_by_number()
        column = frame[item]
        if no_answer:  # cells holding a missing-value code, as numbers or as text
            as_numbers = pd.to_numeric(column.map(lambda v: v.strip() if isinstance(v, str) else v), errors="coerce")
            coded_missing = as_numbers.isin(no_answer).to_numpy(dtype=bool)
            if coded_missing.any():
                column = column.where(~coded_missing)
        else:
            coded_missing = np.zeros(len(column), dtype=bool)
        distinct = pd.unique(column.to_numpy(dtype=object))
        worded = any(isinstance(v, str) and answer_key(v) in words for v in distinct)  # a word of the statement
        if not worded:
            numbers_only.append(item)
        mapping: dict[object, float] = {}
        for value in distinct:
            code, wrong = _code_of(value, words, numbers)
            if wrong == "number" and not worded:
                labelled = _numbers_by_labels((value_labels or {}).get(item) or {}, words)
                if labelled:  # numbers the file labels with the statement's words (hostile s23b): how to list them
                    raise DataError(f"{source}: column '{printable(item)}' holds numbers whose value labels are the "
                                    f"words of {coding.origin}, not the words themselves; list the numbers in the "
                                    f"statement with the codes their labels' words have there: {labelled}")
                raise DataError(f"{source}: column '{printable(item)}' holds numbers, not the words of {coding.origin} "
                                f"('{_shown(value)}' in {_first_row(column, value, row_numbers(column))}); "
                                + _numbers_advice(coding, given, codings))
            if wrong is not None:
                raise _cell_error(source, item, column, value, wrong, coding, row_numbers(column))
            if value is not None and not (isinstance(value, float) and value != value) and value is not pd.NA:
                mapping[value] = code
        coded = column.map(mapping).astype(float)
        if no_answer:  # a word the statement codes as a missing-value code is no answer too
            listed_missing = coded.isin(no_answer).to_numpy(dtype=bool)
            coded = coded.where(~listed_missing)
            count = int((coded_missing | listed_missing).sum())
            if count:
                read_as_none.append((item, count))
        frame[item] = coded
    frame.attrs[CODED_BY_STATEMENT] = {item: tuple((a.word, a.number, a.code) for a in coding.answers)
                                       for item, coding in codings.items()}
    frame.attrs[NUMBERS_ONLY] = tuple(dict.fromkeys((*frame.attrs.get(NUMBERS_ONLY, ()), *numbers_only)))
    notes = answer_notes(spec, tuple(codings), tuple(numbers_only))
    if read_as_none:
        notes.append(missing_codes_note(source, missing_codes, read_as_none,
                                        "of the items whose answer words the model codes"))
    return frame, notes


def _numbers_advice(coding: AnswerCoding, frame: pd.DataFrame, codings: dict) -> str:
    """What works when a column of the items of ``coding`` holds numbers, not its words: where some of its items hold
    words, naming those with 'for ITEMS' (or taking the column out of the items named); where none does (an export of
    numbers of the same survey: new-user trial s27, the advice to name the worded items led nowhere), listing each
    number as itself in the statement, which reads the words and the numbers alike (with a scored earlier fit too:
    :func:`with_saved_coding`); for the coding of an earlier fit, the fit's statement with the numbers so listed."""
    words = coding.codes_by_word()
    worded = [x for x, c in codings.items() if c is coding and x in frame.columns
              and any(isinstance(v, str) and answer_key(v) in words for v in pd.unique(frame[x].to_numpy(dtype=object)))]
    codes = sorted({a.code for a in coding.answers if a.word is not None})
    itself = ", ".join(f"{user_number(c)} = {user_number(c)}" for c in codes)
    if coding.carried_from is not None:
        return (f"if its numbers are the codes the fit gave the words, give a model file with the fit's 'answers' "
                f"statement and each number listed as itself at its end (..., {itself}); else score a file whose "
                f"answers are the words the fit coded")
    if worded:
        return ("name the items whose answers are words with 'for ITEMS' at the end of the statement" if not coding.items
                else "take the column out of the statement's items")
    return (f"no item of the statement holds a word in this file: if its numbers are the codes the statement gives the "
            f"words, list each number as itself at the end of the statement (..., {itself}), which reads the words "
            f"and the numbers alike (a fit of this file alone reads it without the statement too)")


def _check_codes_of_answers(coding: AnswerCoding, no_answer: set[float]) -> None:
    """A code given with --missing-codes may stand for a word that means no answer ('Don't know' = 9), never for an
    answer: '--missing-codes 5' with '"Always" = 5' would read every 'Always' as no answer.  A word given with
    --missing-codes cannot be one the statement codes either (one of the two would be ignored)."""
    given = {answer_key(w): w for w in run_words()}
    coded = [a for a in coding.answers if a.word is not None and answer_key(a.word) in given]
    if coded:  # a word of --missing-codes that the statement gives a code: one or the other, never silently
        a = coded[0]
        raise OptionError(f"{Option.MISSING_CODES.given(given[answer_key(a.word)])} reads '{printable(a.word)}' as no "
                          f"answer, and {coding.origin} codes it as the answer {user_number(a.code)}: leave it out of "
                          f"{Option.MISSING_CODES} to analyse it as an answer, or out of the statement to read it as "
                          f"no answer")
    answers = [a for a in coding.answers if a.code in no_answer and a.word is not None and not says_no_answer(a.word)]
    if answers:
        a = answers[0]
        raise OptionError(f"{Option.MISSING_CODES.given(f'{user_number(a.code)}')} is the code {coding.origin} gives the answer "
                          f"'{printable(a.word)}'; a code of no answer cannot also stand for an answer (every "
                          f"'{printable(a.word)}' would be read as no answer): leave {user_number(a.code)} out of "
                          f"{Option.MISSING_CODES}")


def _first_row(column: pd.Series, value: object, rows: np.ndarray) -> str:
    """The first row holding ``value``, named as ``column``'s rows are (data.kept_rows.RowNaming): 'row 12', 'row 501
    (text line 575)'."""
    row = int(rows[int(np.flatnonzero(column.to_numpy(dtype=object) == value)[0])])
    return row_words(row, text_lines(column), row_naming(column))


#: a number among answer words this many times the statement's largest code (or more) is taken for a row of totals
#: in the advice (a rule of this project: an answer scale's codes are single digits, a total of many answers is not)
TOTALS_LIKE = 10


def _cell_error(source: str, item: str, column: pd.Series, value: object, wrong: str, coding: AnswerCoding,
                rows: np.ndarray) -> DataError:
    where = f"{source}: column '{printable(item)}', {_first_row(column, value, rows)}"
    line = coding.origin
    if wrong == "word":
        marks = character_names(str(value), "".join(a.shown for a in coding.answers))  # a look-alike letter shown
        return DataError(f"{where}: the answer '{_shown(value)}'{marks} is not one of the words of {line} "
                         f"({_listed(coding)}); "
                         f"add it to the statement with its code, or correct the cell (leave it empty for no answer)")
    if wrong == "number":
        number = float(strict_number(value.strip()) if isinstance(value, str) else value)
        top = max((abs(a.code) for a in coding.answers), default=0.0)
        # a fraction, or a number ten times the statement's largest code or more: a row of means or totals, which
        # listing it in the statement would make a respondent (new-user trial s23, 05: a workbook's TOTAL row)
        summary = number != round(number) or (top > 0 and abs(number) >= TOTALS_LIKE * top)
        remedy = (f"a row of means or totals below the answers? remove it, or leave it out with {Option.KEEP}" if
                  summary else f"check the file, or mark a code for no answer with {Option.MISSING_CODES}"
                  + ("" if coding.carried_from else ", or list the number in the statement with its code"))
        return DataError(f"{where}: holds the number {_shown(value)} among answers recorded as words, and {line} does "
                         f"not list it (a column of words and numbers is often a bad export); {remedy}")
    return DataError(f"{where}: holds '{_shown(value)}', which is not an answer word of {line} ({_listed(coding)})")


def _listed_answers(coding: AnswerCoding) -> tuple:
    return tuple((a.word, a.number, a.code) for a in coding.answers)


def numbers_recoded(answers: tuple) -> bool:
    """Whether a coding (:func:`coding_record`'s triples) gives a number another code (1 = 5): its numbers are then
    said as coded, not as what each number means (hostile trial s23b: '1 = 5, ..., 5 = 1' was said backwards)."""
    return any(w is None and n != c for w, n, c in answers)


def named_codes(answers: tuple) -> tuple:
    """The (word, number, code) triples of a coding (:func:`coding_record`'s) with only its words, as (word, None,
    code): what each number means, said of answers read as numbers (:func:`coding_described`)."""
    return tuple((w, None, c) for w, _, c in answers if w is not None) or answers


def coding_described(answers: tuple, span: tuple[float, float] | None = None) -> str:
    """(word, number, code) triples in words: '1 (Strongly disagree) to 5 (Strongly agree)' when the codes are
    distinct whole numbers one apart, else each code with its answers ('0 (No), 1 (Yes, Often)'); numbers listed as
    their own code (a file mixing words and numbers) are said apart: '...; the numbers 0 to 4 kept their values', and
    the words beside them as a range only where their codes reach both ends of the numbers' ``span``, else each with
    its code ('3 (Don't know), 4 (Agree), 5 (Strongly agree)'), since '3 (Don't know) to 5 (Strongly agree)' would
    read as the scale's ends."""
    kept = sorted(number for word, number, code in answers if word is None and number == code)
    by_code: dict[float, list[str]] = {}
    for word, number, code in answers:
        if word is None and number == code:
            continue
        by_code.setdefault(code, []).append(printable(word) if word is not None else f"{user_number(number)}")
    if kept:
        numbers = (f"the number {user_number(kept[0])} kept its value" if len(kept) == 1 else
                   f"the numbers {user_number(kept[0])} to {user_number(kept[-1])} kept their values"
                   if kept == [kept[0] + k for k in range(len(kept))] else
                   f"the numbers {', '.join(f'{user_number(k)}' for k in kept)} kept their values")
        return f"{coding_described(tuple(a for a in answers if not (a[0] is None and a[1] == a[2])), (kept[0], kept[-1]))}; {numbers}" \
            if by_code else numbers
    codes = sorted(by_code)
    run = (span is None or codes[0] <= span[0] and codes[-1] >= span[1]) and len(codes) > 2 and all(len(by_code[c]) == 1 for c in codes) and codes == [codes[0] + k for k in range(len(codes))]
    if run:
        return f"{user_number(codes[0])} ({by_code[codes[0]][0]}) to {user_number(codes[-1])} ({by_code[codes[-1]][0]})"
    return ", ".join(f"{user_number(c)} ({', '.join(by_code[c])})" for c in codes)


def _origin(coding: AnswerCoding, text: str, words: str = "") -> Command:
    """Where ``coding`` was stated, inside ``text`` ('{}' marks it), for the reader who edits the model file (the
    statement and its line, or the earlier fit's file); ``words``: what a manuscript says instead (nothing: a coding
    of the analysis needs no source there).  A manuscript names no statement of the model language and no line of a
    file its reader never sees (re-check s17, 03)."""
    return Command(text.format(coding.origin), words)


def answer_notes(spec: Spec, coded: tuple[str, ...] | None = None, numbers_only: tuple[str, ...] = ()) -> list[Note]:
    """How the answers recorded as words were coded: one note per 'answers' statement in use, which also names the
    answers that share a code and so are analysed as one (words, or numbers the statement recodes; a number listed as
    its own code is not among them: the note says those numbers kept their values, so a word coded 6 beside the
    number 6 is said once, re-check s17, 04), and a note for each word that usually means no answer which the
    statement codes as an answer; ``coded``: the items coded, when not all the statements cover; ``numbers_only``:
    the items whose answers held no word (a statement all of whose items are such says their numbers were read,
    never that words were recorded)."""
    codings = spec.answer_codings()
    if coded is not None:
        codings = {x: c for x, c in codings.items() if x in coded}
    notes: list[Note] = []
    for coding in spec.answers:
        items = [x for x, c in codings.items() if c is coding]
        if not items:
            continue
        numbers = [x for x in items if x in numbers_only]  # answers read as numbers: said apart, never as words
        items = [x for x in items if x not in numbers]
        if numbers:
            listed = _listed_answers(coding)
            notes.append(Note((f"the answers in {_which(numbers, spec)} were numbers, "
                               + (f"coded {coding_described(listed)}" if numbers_recoded(listed) else
                                  f"which mean {coding_described(named_codes(listed))}"),
                               _origin(coding, " ({})", _carried_words(coding)))))
        if not items:
            continue
        which = _which(items, spec)
        by_code: dict[float, list[str]] = {}
        for answer in coding.answers:
            if not (answer.word is None and answer.number == answer.code):  # a number kept as itself: said apart
                by_code.setdefault(answer.code, []).append(answer.shown)
        shared = [f"{word_list(repr(printable(w)) for w in words)} share the code {user_number(code)}"
                  for code, words in by_code.items() if len(words) > 1]
        one = ("" if not shared else
               f"; {shared[0]}, so they are analysed as one answer" if len(shared) == 1 else
               f"; {'; '.join(shared)}, so each {'set' if any(len(w) > 2 for w in by_code.values()) else 'pair'} "
               f"is analysed as one answer")
        notes.append(Note((f"answers recorded as words in {which} were coded {coding_described(_listed_answers(coding))}"
                           f"{one}", _origin(coding, " ({})", _carried_words(coding)))))
        for answer in coding.answers:  # the statement decides: such a word is an answer, and the report says so
            if answer.word is not None and says_no_answer(answer.word):
                notes.append(Note((f"'{printable(answer.word)}', a word that usually means no answer, is analysed as "
                                   f"the answer {user_number(answer.code)}", _origin(
                                       coding, " because {} codes it so (leave it out of the statement to read it as "
                                               "no answer)" if coding.carried_from is None else
                                       " because {} codes it so", _carried_words(coding)))))
    return notes


def _which(items: list[str], spec: Spec) -> str:
    """'every item', or 'N item(s) (a, b)'."""
    return "every item" if len(items) == len(spec.observed_names) else \
        f"{len(items)} item{'s' if len(items) > 1 else ''} ({', '.join(printable(x) for x in items)})"


def _carried_words(coding: AnswerCoding) -> str:
    """A manuscript's words for a coding carried from an earlier fit (scores of other data): that fit, by no path."""
    return " (as in the earlier fit)" if coding.carried_from is not None else ""


def coding_record(spec: Spec) -> tuple:
    """The model's coding of answer words as a fit keeps it (pipeline.results.DataSummary.answer_coding): per
    statement in use, the items it covers and each (word, number, code) it lists."""
    codings = spec.answer_codings()
    out = []
    for coding in spec.answers:
        items = tuple(x for x, c in codings.items() if c is coding)
        if items:
            out.append((items, tuple((a.word, a.number, a.code) for a in coding.answers)))
    return tuple(out)


def coding_json(record: tuple) -> list[dict]:
    """The JSON of a :func:`coding_record`: [{"items": [...], "answers": [{"word": ..., "code": ...}, ...]}]."""
    return [{"items": list(items), "answers": [({"word": w} if w is not None else {"number": n}) | {"code": c}
                                               for w, n, c in answers]} for items, answers in record]


def coding_from_json(value: object, source: str) -> tuple:
    """A :func:`coding_record` from a saved fit's JSON; an error naming the file when it is not one."""
    try:
        out = []
        for entry in value or ():
            answers = tuple((str(a["word"]) if "word" in a else None, float(a["number"]) if "word" not in a else None,
                             float(a["code"])) for a in entry["answers"])
            out.append((tuple(str(x) for x in entry["items"]), answers))
        return tuple(out)
    except (KeyError, TypeError, ValueError):
        raise OptionError(f"{source}: the coding of answer words (data.answer_coding) cannot be read") from None


def with_saved_coding(spec: Spec, record: tuple, source: str) -> Spec:
    """The model used to score other data with a saved fit: the fit's coding of answer words, which the model file
    may repeat but not change (other codes would put the answers on another scale than the fitted one)."""
    mine = coding_record(spec)
    if not record:
        if mine:
            raise OptionError(f"the model's 'answers' statements code answer words, and the earlier fit {source} read "
                              f"its answers as numbers; score data of the fit's kind, or fit the model again")
        return spec
    if mine:
        if _comparable(mine) != _comparable(record) and not _numbers_as_their_codes(mine, record):
            raise OptionError(f"the model's 'answers' statements code the answers otherwise than the earlier fit "
                              f"{source} did; give the model file the fit was made with (each number the fit gave a "
                              f"word may be listed as itself at the statement's end, '7 = 7', to score numbers)")
        return spec
    where = Location(source, 1, 1)
    codings = tuple(AnswerCoding(tuple(AnswerWord(w, n, c, where) for w, n, c in answers),
                                 tuple(Name(x, where) for x in items), where, carried_from=source)
                    for items, answers in record)
    return replace(spec, answers=codings)


def _numbers_as_their_codes(mine: tuple, record: tuple) -> bool:
    """Whether the model's coding ``mine`` codes every item of the fit's ``record`` as the fit did, words and numbers,
    and adds beside them only numbers listed as themselves that are codes the fit gave the item's words ('7 = 7'
    beside '"Strongly agree" = 7'): the same answers on the same scale, the numbers export of a survey whose words
    the fit read (new-user trial s27: no model file could score it)."""
    theirs, ours = _by_item(record), _by_item(mine)
    if set(theirs) != set(ours):
        return False
    for item, listed in theirs.items():
        extra = ours[item] - listed
        codes = {c for w, _, c in listed if w is not None}
        if not listed <= ours[item] or any(w is not None or n != c or c not in codes for w, n, c in extra):
            return False
    return True


def _by_item(record: tuple) -> dict:
    """Per item, the set of (word key or None, number, code) a coding record lists."""
    return {item: frozenset(((answer_key(w) if w is not None else None), n, c) for w, n, c in answers)
            for items, answers in record for item in items}


def _comparable(record: tuple) -> set:
    """Per item, the set of (word key or None for a listed number, number, code) a coding lists (a set: a statement
    may list numbers beside words, which do not sort together)."""
    return {(item, frozenset(((answer_key(w) if w is not None else None), n, c) for w, n, c in answers))
            for items, answers in record for item in items}


def refuse_different_codings(specs, names) -> None:
    """Models compared on one data file read its answers one way: an item whose answer words two models code
    differently (or one codes and another reads as numbers) is an error naming the item and the models."""
    seen: dict[str, tuple[str, object]] = {}
    for spec, name in zip(specs, names):
        coded = {x: _comparable((((x,), _listed_answers(c)),))
                 for x, c in spec.answer_codings().items()}
        for item in spec.observed_names:
            mine = coded.get(item)
            if item in seen and seen[item][1] != mine:
                raise OptionError(f"the models {seen[item][0]} and {name} read the answers of '{printable(item)}' "
                                  f"differently (their 'answers' statements differ, or one has none); give the "
                                  f"models the same 'answers' statements")
            seen.setdefault(item, (name, mine))


def refuse_for_summary_statistics(spec: Spec, source: str) -> None:
    """An 'answers' statement cannot apply to summary statistics (no answers to code): an error naming it."""
    if spec.answers:
        coding = spec.answers[0]
        raise ModelError(f"{coding.origin} codes answers recorded as words, and {source} holds summary statistics, not "
                         f"answers; remove the statement or give the rows of answers", coding.location,
                         spec.source_line(coding.location))
