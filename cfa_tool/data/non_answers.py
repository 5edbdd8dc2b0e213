"""Values that a data file itself marks as no answer, read as missing and named first in every view.

Three ways a file says a value is not an answer:

* a **value label** that says so (SPSS, Stata): 8 labelled 'refused', 9 labelled 'not asked';
* a **declared missing value** (SPSS's user-defined missing values and ranges);
* a **text cell** that says so in a column of numbers (CSV, TSV, Excel): 'refused', "don't know".

Such values are not answers by the file's own words.  Analysed as answers, they would become the most extreme
answers (8 and 9 above a 0-3 scale; categories above the top answer in an ordinal fit), so they are read as
missing, as empty cells are, and every view names them first (items, codes, labels, counts), so that the
researcher can see and undo the reading (by another label in a copy of the file).

The words are the project's own list of the phrases survey files commonly use for non-answers (common practice
of survey data management, not a published standard); a label counts when, in lower case and with punctuation
and extra spaces ignored, it is one of the phrases or several joined by '/', ',', ';', '&' or 'or' ("don't know / refused").
A run adds its own words (those a researcher gives with --missing-codes, such as 'Ne sait pas': :func:`also_no_answer`),
read and named exactly as the listed ones.  Some marks are compared as written, not as words: '#NULL!' (what a
statistics package writes into a spreadsheet for a system-missing value), a lone '-', and '.' and 'nan' (a Stata or
SAS export's gap, pandas' text of one).
"""

from __future__ import annotations

import contextlib
import contextvars
import enum
import functools
import math
import re
import unicodedata
from collections.abc import Iterable, Iterator
from dataclasses import dataclass

import numpy as np
import pandas as pd

from cfa_tool.language.names import composed
from cfa_tool.language.spec import answer_key
from cfa_tool.errors import DataError, clipped, printable
from cfa_tool.numbers import count_text, counted, cut_list, more_words, names_shown, number, user_number, word_list
from cfa_tool.input_files import DATA_FRAME, base_name
from cfa_tool.note_parts import Command, Note, Text
from cfa_tool.options import Option, shell_word, taken_by

#: phrases that say a value is not an answer (compared after :func:`_plain`): one vocabulary for labels and cells
NON_ANSWER_PHRASES = frozenset({
    "refused", "refusal", "refused to answer", "refused to say", "declined", "declined to answer",
    "decline to answer", "decline to say", "declined to say",
    "don t know", "dont know", "do not know", "not known", "not sure don t know", "dk", "dk na",
    "not sure", "unsure", "no opinion", "can t say", "cannot say", "can not say", "can t tell", "cannot tell",
    "not asked", "not applicable", "inapplicable", "does not apply", "does not apply to me", "doesn t apply",
    "doesn t apply to me", "na not applicable", "n a", "na", "legitimate skip",
    "no answer", "not answered", "no answer given", "did not answer", "didn t answer", "no response", "non response", "nonresponse", "missing", "missing value",
    "system missing", "skipped", "skip", "valid skip", "prefer not to say", "prefer not to answer",
    "rather not say", "not stated", "no data", "question not asked",
})

#: phrases that some answer scales use for their middle answer ("Agree / Not sure / Disagree"): a column of answers
#: written as words keeps a cell so written as an answer (:func:`written_non_answers`); a labelled code is judged by
#: where it lies, whatever its words (:func:`between_answers`)
MIDDLE_PHRASES = frozenset({"not sure", "unsure", "no opinion", "can t say", "cannot say", "can not say", "can t tell",
                            "cannot tell"})

SHOWN = 6  # columns a caution names before 'and N more'

#: cells that say no answer by a mark, not a word (compared as written, spaces at the ends aside): '#NULL!', which a
#: statistics package writes into a spreadsheet export for a system-missing value (as text: a workbook's error cell
#: of it is a failed formula, refused by data.readers.TYPED_ERRORS), a lone dash, and the markers of an empty cell
#: that are no words: '.' (Stata and SAS exports) and 'nan' (pandas' astype(str) of a gap), which a file's reader
#: reads as empty (data.readers.MISSING_MARKERS) and a data frame's cells therefore too (hostile tester s24: refused
#: from a frame as text among numbers)
NON_ANSWER_MARKS = frozenset({"#NULL!", "-", ".", "nan", "NaN"})


def _plain(text: str) -> str:
    """Lower case; apostrophes, punctuation and runs of spaces as one space; accents kept, in Unicode's composed form
    (language.names.composed), whatever form the text came in: a word that differs by an accent is another word
    ('avó' and 'avô', grandmother and grandfather), where a decomposed accent, a combining mark, was dropped as
    punctuation and merged the two (session note s23, 'Noticed, left alone')."""
    text = composed(text).lower().replace("_", " ")
    if not text.isascii():  # combining marks without a composed form stay with their letter
        text = "".join(ch if ch.isalnum() or unicodedata.category(ch).startswith("M") else " " for ch in text)
    return " ".join(re.sub(r"[^\w]+", " ", text).split()) if text.isascii() else " ".join(text.split())


@dataclass(frozen=True)
class RunWords:
    """The words a run adds to :data:`NON_ANSWER_PHRASES` (--missing-codes 'Ne sait pas'): as given, and as
    compared (:func:`_plain`)."""

    given: tuple[str, ...] = ()
    phrases: frozenset[str] = frozenset()


_RUN_WORDS: contextvars.ContextVar[RunWords] = contextvars.ContextVar("cfa_tool_no_answer_words", default=RunWords())


@contextlib.contextmanager
def also_no_answer(words: tuple[str, ...]) -> Iterator[None]:
    """Within: ``words`` (a run's words of no answer, given with --missing-codes) say no answer as the listed phrases
    do, in cells and value labels alike (:func:`says_no_answer`), and are read, counted and named as they are."""
    token = _RUN_WORDS.set(RunWords(tuple(words), frozenset(_plain(w) for w in words) - {""}))
    try:
        yield
    finally:
        _RUN_WORDS.reset(token)


def run_words() -> tuple[str, ...]:
    """The words of no answer this run adds (:func:`also_no_answer`), as given."""
    return _RUN_WORDS.get().given


def codes_given(codes, shown_as=None) -> str:
    """--missing-codes with ``codes`` (numbers and words, as data.missing_codes.missing_value reads them) as a shell takes it:
    the list written as a CSV line (numbers as written, :func:`user_number`; a word holding a comma in double quotes,
    as the option reads it), each code once (words alike but for case once), the line as the shell takes a word of
    advice (options.shell_word, the one rule: s26, its own quoting left a '!' in double quotes, which an interactive
    bash reads as history): --missing-codes -99,8,9, --missing-codes "Ne sait pas", --missing-codes
    'Ne sait pas,"No, not asked"'; in Python, the list
    as ``missing_codes=`` takes it: missing_codes=[-99, 8, 'Ne sait pas'].  The one writer of a list of codes that
    advice gives to copy: advice that adds a code keeps those the run gave (s21: '--missing-codes 8,9' after
    '--missing-codes -99' would have read -99 as an answer again).  ``shown_as``: the interface whose form to write
    (None: the run's, options.interface), for a report that gives both."""
    import csv
    import io

    from cfa_tool.options import Interface, interface

    unique: dict[object, object] = {}
    for code in codes:
        if isinstance(code, str):
            unique.setdefault(code.strip().casefold(), code.strip())
        else:
            unique.setdefault(float(code), float(code))
    if (shown_as or interface()) is not Interface.COMMAND_LINE:
        shown = [user_number(c) if isinstance(c, float) else repr(c) for c in unique.values()]
        return f"{Option.MISSING_CODES.keyword}=[{', '.join(shown)}]"
    line = io.StringIO()
    csv.writer(line, lineterminator="").writerow(user_number(c) if isinstance(c, float) else c
                                                 for c in unique.values())
    return f"{Option.MISSING_CODES.flag} {shell_word(line.getvalue())}"


#: the key of a frame's ``attrs`` that holds the codes and words of no answer the run gave (--missing-codes, as
#: data.readers.with_no_answers_read read them): the rows' columns carry it wherever they go (row filters, groups,
#: items taken out), so that advice written far from the options (a word among numbers, an empty category, an
#: answer outside a declared scale) keeps them (:func:`advice_codes`)
GIVEN_CODES = "no_answer_codes_given"


def given_codes(frame) -> tuple:
    """The codes and words of no answer the run gave, which the reading of ``frame`` (a data frame or one of its
    columns) recorded (:data:`GIVEN_CODES`); () when none."""
    return tuple(getattr(frame, "attrs", {}).get(GIVEN_CODES, ()))


def advice_codes(frame, codes) -> str:
    """:func:`codes_given` of the codes the run gave (:func:`given_codes` of ``frame``) followed by ``codes``: the
    list that advice to read ``codes`` as no answer gives to copy, which never drops a code already given."""
    return codes_given(given_codes(frame) + tuple(codes))


def says_no_answer(text: object, explained: bool = False) -> bool:
    """Whether a value label or a cell's text says the value is not an answer: one of the phrases (or of the run's
    own words, :func:`also_no_answer`) as a whole ('N/A', 'DK/NA'), one of the :data:`NON_ANSWER_MARKS`, or several
    phrases joined by '/', ',', ';', '&' or 'or' ("Don't know / refused").  Phrases are compared as whole words, so
    'Not at all', 'Never' or 'missing my bus' are answers.  ``explained`` (value labels): a phrase joined by such a
    separator to words that explain it, before or after them ('Not applicable / never ride', 'Neutral / not sure':
    the order of the words does not decide; where the code lies does, :func:`between_answers`).  Each text is read
    once per run's words (:func:`_says`): the rules read an item's labels again for each of its codes."""
    if not isinstance(text, str):
        return False
    return _says(text, explained, _RUN_WORDS.get().phrases)


@functools.lru_cache(maxsize=4096)
def _says(text: str, explained: bool, own: frozenset[str]) -> bool:
    """:func:`says_no_answer` of a text with the run's words ``own``: a pure function of its arguments, kept for the
    last few thousand texts (a file's labels and distinct cells), as the parsed model texts are."""
    if not text.strip():
        return False
    if text.strip() in NON_ANSWER_MARKS:
        return True
    phrases = NON_ANSWER_PHRASES | own if own else NON_ANSWER_PHRASES
    if _plain_kept(text) in phrases:
        return True
    parts = [p for p in _parts(text) if p]
    if not parts:
        return False
    return all(p in phrases for p in parts) or (explained and len(parts) > 1 and any(p in phrases for p in parts))


@functools.lru_cache(maxsize=4096)
def _plain_kept(text: str) -> str:
    """:func:`_plain` of a whole label or cell, kept for the last few thousand texts: :func:`_says` and
    :func:`_holds_phrase` read each once."""
    return _plain(text)


@functools.lru_cache(maxsize=4096)
def _holds_phrase(text: str, own: frozenset[str]) -> bool:
    """Whether a phrase of no answer (or of the run's words ``own``) stands among the words of ``text`` as whole words
    ('REFUSED (VOL)', 'Not applicable - question skipped', 'DK (do not read)'): :func:`loosely_none` reads a code so
    labelled beyond an item's answers as no answer."""
    plain = f" {_plain_kept(text)} "
    return any(f" {phrase} " in plain for phrase in (NON_ANSWER_PHRASES | own if own else NON_ANSWER_PHRASES))


def loosely_none(code: float, labels: dict, present=(), skip=()) -> bool:
    """Whether the labelled code ``code`` of an item is no answer by the two pieces of evidence a file gives beside
    exact words (:func:`says_no_answer`): its label holds a phrase of no answer among other words ('REFUSED (VOL)',
    'Not applicable - question skipped', "Don't know (do not read)"), and the code lies beyond the item's answer scale
    by more than the scale's step: above its highest or below its lowest answer (the codes labelled without any such
    phrase, and the values the item holds unlabelled, ``present``, a lone 9, 99, 999 aside), farther from it than its
    answers are from each other (97, 98 and 99 beside 1 to 5; -1 beside 1 to 5; codes in ``skip``, given as missing
    codes, aside).  A label of such words one step from the scale's end ('Never skip' at 1 of 1 to 5, 6 "Don't know
    (VOL)" beside 1 to 5) stays an answer, as a code between answers does (:func:`between_answers`): the project's
    own rule (common practice of reading survey codebooks), not a published one; the reading note names each code and
    label read so, and another value label in a copy of the file keeps a code as an answer."""
    text = labels.get(code)
    own = _RUN_WORDS.get().phrases
    if not isinstance(text, str) or says_no_answer(text, explained=True) or not _holds_phrase(text, own):
        return False
    scale = {float(k) for k, v in labels.items() if isinstance(k, (int, float)) and not isinstance(k, bool)
             and not (isinstance(v, str) and _holds_phrase(v, own))}
    scale |= {float(v) for v in present if v not in labels and not _nines(float(v))}
    scale = sorted(v for v in scale - set(skip) - {code} if math.isfinite(v))
    if len(scale) < 2:  # no answer scale to lie beyond
        return False
    step = float(np.diff(scale).min())
    return code > scale[-1] + step * (1 + 1e-9) or code < scale[0] - step * (1 + 1e-9)


def _parts(text: str) -> list[str]:
    """The phrases of ``text`` joined by '/', ',', ';', '&' or 'or', each as :func:`_plain` reads it."""
    return [_plain(p) for p in re.split(r"[/,;&]|\bor\b", text.lower())]


def rows_saying(found: tuple["NonAnswer", ...], word: str) -> tuple:
    """The rows (index labels) whose cells or labelled codes read as no answer (``found``) say ``word`` (a word of no
    answer given or carried: compared as :func:`unused_run_words` compares them)."""
    plain = _plain(word)
    return tuple(r for f in found for r in f.rows
                 if any(isinstance(t, str) and (_plain(t) == plain or plain in _parts(t)) for t in (f.value, f.label)))


def unused_run_words(found: tuple["NonAnswer", ...], words: tuple[str, ...] | None = None) -> tuple[str, ...]:
    """The run's words of no answer (``words``; None: :func:`also_no_answer`'s) that no value read as no answer
    (``found``: cells and value labels of the items) says, as a mistyped word would leave them."""
    said = set()
    for f in found:
        for text in (f.value, f.label):
            if isinstance(text, str):
                said.add(_plain(text))
                said.update(_parts(text))
    return tuple(w for w in (run_words() if words is None else words) if _plain(w) not in said)


class NonAnswerKind(enum.Enum):
    """How the file marks the value; ``value`` is the word the JSON uses."""

    LABELLED = "value label says no answer"
    DECLARED = "declared missing in the file"
    WRITTEN = "cell text says no answer"
    #: a cell's word that the run declared to mean no answer (--missing-codes 'k.A.'), not the file: said as a code
    #: given is (new-user trial s26: 'values the data file marks as no answer' sent a reviewer to look for it there)
    GIVEN = "word given as no answer"


@dataclass(frozen=True)
class NonAnswer:
    """One code (or text) of one column that the file marks as no answer, read as missing: ``rows`` are the
    index labels of the frame's rows holding it (a file's row numbers less one: data.moments.file_rows_index), so
    that they are found again after row filters (:func:`rows_lost`)."""

    kind: NonAnswerKind
    column: str
    value: float | str
    label: str | None
    rows: tuple[int, ...]

    def shown(self) -> str:
        code = (f"{user_number(self.value)}" if isinstance(self.value, float) else printable(self.value)
                if self.kind is NonAnswerKind.DECLARED else f"'{printable(self.value)}'")  # Stata's .a unquoted
        return code + (f" '{printable(self.label)}'" if self.label and self.kind in MARKED_BY_FILE else "")


def _numbers(values) -> np.ndarray:
    return np.arange(1, len(values) + 1)


def labelled_non_answers(frame: pd.DataFrame, value_labels: dict, skip: tuple[float, ...] = ()
                         ) -> tuple[pd.DataFrame, tuple[NonAnswer, ...]]:
    """``frame`` with the codes whose value label says no answer read as missing (numeric columns, and text
    variables with labelled text codes), and what was read so; codes in ``skip`` (given as missing codes already)
    are left to them, and a code between the item's answers (:func:`between_answers`) stays an answer whatever its
    label says (:func:`answers_labelled_like_none` names it)."""
    found: list[NonAnswer] = []
    out = frame
    for column, labels in value_labels.items():
        if column not in frame.columns:
            continue
        series = frame[column]
        numeric = pd.api.types.is_numeric_dtype(series.dtype)
        if numeric:
            values = series.to_numpy(dtype=float, na_value=np.nan)
            codes = _labelled_none(labels, values, skip)[0]
        else:  # a text variable: its cells as written, compared without spaces at their ends
            codes = {code: text for code, text in labels.items()
                     if isinstance(code, str) and code not in skip and says_no_answer(text, explained=True)}
            values = np.array([v.strip() if isinstance(v, str) else None for v in series], dtype=object) \
                if codes else None
        if not codes:
            continue
        hit = np.zeros(len(values), dtype=bool)
        for code, text in sorted(codes.items()):
            cells = values == (code if numeric else code.strip())
            if cells.any():
                found.append(NonAnswer(NonAnswerKind.LABELLED, column, code, text, tuple(frame.index[cells].tolist())))
                hit |= cells
        if hit.any():
            if out is frame:
                out = frame.copy()
            if isinstance(series.dtype, np.dtype) and (series.dtype == np.float64 or series.dtype.kind in "iu"):
                # numpy float64 or whole numbers: the cells' floats with NaN in the hits, what Series.where gives
                # (float64), without its alignment
                out[column] = np.where(hit, np.nan, values)
            else:
                out[column] = series.where(~hit)
    return out, tuple(found)


def _labelled_none(labels: dict, values: np.ndarray, skip=()) -> tuple[dict, dict]:
    """The numeric codes of one item whose value label says no answer (``labels``; ``values``: the item's cells;
    codes in ``skip`` aside), split by :func:`between_answers`: ({code: label} read as no answer, {code: label}
    between the item's answers and so kept as answers)."""
    said = {code: text for code, text in labels.items()
            if isinstance(code, float) and code not in skip and says_no_answer(text, explained=True)}
    own = _RUN_WORDS.get().phrases
    worded = [code for code, text in labels.items() if isinstance(code, float) and code not in skip
              and code not in said and isinstance(text, str) and _holds_phrase(text, own)]
    if not said and not worded:
        return {}, {}
    present = np.unique(values[np.isfinite(values)]).tolist()
    kept = {code: text for code, text in said.items() if between_answers(code, labels, present, skip)}
    beyond = {code: labels[code] for code in worded if loosely_none(code, labels, present, skip)}
    return {c: t for c, t in said.items() if c not in kept} | beyond, kept


def between_answers(code: float, labels: dict, present=(), skip=()) -> bool:
    """Whether ``code`` lies between the answers of an item: a lower and a higher code are answers, either
    labelled so (a value label, ``labels``, that does not say no answer) or answered (a value ``present`` in the
    item without a label; a lone 9, 99, 999 aside, which data programs write for no answer, as the nines of
    data.odd_values.code_like: its negative codes are answers of scales such as -2 to 2 here); codes in ``skip``
    (given as missing codes) are no answers, and so are codes labelled with a phrase of no answer among other words
    beyond the scale (:func:`loosely_none`: 97 'REFUSED (VOL)' and 99 'Not applicable - skipped' leave 98 "Don't
    know" outside the answers 1 to 5).  The one rule of a labelled code on the answer scale: such a code is an answer whatever its label's words or their order ('Not sure / neutral' and
    'Neutral / not sure' alike, :func:`labelled_non_answers`), and a missing code given for it is said first
    (data.missing_codes.codes_on_answers); codes outside the answers (8, 9, 99, -1) labelled as no answer stay no
    answer.  The project's own rule (a code labelled as the midpoint of a scale is analysed as an answer unless the
    researcher says otherwise), not a published one."""
    answers = [float(k) for k, v in labels.items() if isinstance(k, (int, float)) and not isinstance(k, bool)
               and not says_no_answer(v, explained=True) and not loosely_none(float(k), labels, present, skip)]
    answers += [float(v) for v in present if v not in labels and not _nines(float(v))]
    answers = [a for a in answers if a not in skip and a != code]
    return any(a < code for a in answers) and any(a > code for a in answers)


def _nines(value: float) -> bool:
    """9, 99, 999, ...: codes data programs write for no answer (a stray one is no answer of the scale)."""
    return value > 0 and value.is_integer() and set(str(int(value))) == {"9"}


@dataclass(frozen=True)
class LabelledAnswer:
    """A code of one or more items whose value label reads like no answer but that lies between their answers
    (:func:`between_answers`), so analysed as an answer: ``cells`` counts its cells in each of ``columns``."""

    value: float
    label: str
    columns: tuple[str, ...]
    cells: tuple[int, ...]

    def note(self, source: str, given: tuple = ()) -> Note:
        """The note: where, how many cells, and how to read the code as no answer (``given``: the codes the run
        gives with --missing-codes already, which the advice keeps), the option apart (note_parts.Command)."""
        listed = cut_list(list(zip(self.columns, self.cells)), SHOWN, lambda cn: f"{printable(cn[0])} {cn[1]}",
                          noun="item")
        total = sum(self.cells)
        codes = tuple(c for c in given if isinstance(c, (int, float))) + run_words() + (self.value,)
        return Note((f"{base_name(source)}: {user_number(self.value)} '{printable(self.label)}' lies between other answers of "
                     f"the item{'s' if len(self.columns) != 1 else ''} and is read as an answer ({count_text(total)} "
                     f"cell{'s' if total != 1 else ''}: {listed}), though its label reads like no answer",
                     Command(f"; to read it as no answer, give {codes_given(codes)}")))


def answers_labelled_like_none(frame: pd.DataFrame, value_labels: dict, skip: tuple = ()) -> tuple[LabelledAnswer, ...]:
    """The codes of ``frame``'s numeric columns labelled like no answer (``value_labels``) that lie between the
    columns' answers and that cells hold, kept as answers by :func:`labelled_non_answers` (the same rule,
    :func:`between_answers`); one for each code and label, naming every column holding it."""
    found: dict[tuple, list[tuple[str, int]]] = {}
    for column, labels in value_labels.items():
        if column not in frame.columns or not pd.api.types.is_numeric_dtype(frame[column]):
            continue
        values = frame[column].to_numpy(dtype=float, na_value=np.nan)
        for code, text in sorted(_labelled_none(labels, values, skip)[1].items()):
            cells = int((values == code).sum())
            if cells:
                found.setdefault((code, text), []).append((column, cells))
    return tuple(LabelledAnswer(code, text, tuple(c for c, _ in held), tuple(n for _, n in held))
                 for (code, text), held in found.items())


def unlabelled_extra_codes(column: np.ndarray, labels: dict) -> list[tuple[float, str]]:
    """Codes given in an item's answers (``column``, floats) whose value label is not recognised as no answer but
    that stand beyond the item's answer scale, so that they may well mean no answer: a code above or below every
    other labelled code, and either apart from them by more than one step (9 'Other' on a 1-5 scale), or next to a
    scale whose end labels mirror each other (1 'Strongly disagree' ... 5 'Strongly agree') while its own label
    shares no word with the far end (6 'Something else').  A rule of thumb of this project (common practice of
    reading survey codebooks), used for a caution only: the values are analysed as they are.  [(code, label)]."""
    return [(code, text) for code, text in _scale_ends_apart(tuple(labels.items()), _RUN_WORDS.get().phrases)
            if math.isfinite(code) and bool((column == code).any())]  # given in the item


@functools.lru_cache(maxsize=256)
def _scale_ends_apart(labels: tuple, own: frozenset[str]) -> tuple[tuple[float, str], ...]:
    """The labelled codes at the ends of an item's scale that :func:`unlabelled_extra_codes` names when given, from
    the item's labels alone (``labels``: their items; ``own``: the run's words of no answer, which decide which
    labels say no answer): items of one questionnaire share their labels, so each set is judged once (the last few
    hundred kept)."""
    every = dict(labels)
    coded = sorted((float(k), v) for k, v in labels  # the codes labelled as no answer aside (loosely_none too)
                   if isinstance(k, (int, float)) and not says_no_answer(v, explained=True)
                   and not loosely_none(float(k), every))
    if len(coded) < 4:  # too few labels to speak of a scale of answers
        return ()
    out = []
    for k in (0, len(coded) - 1):
        code, text = coded[k]
        others = coded[1:] if k == 0 else coded[:-1]
        steps = np.diff([c for c, _ in others])
        if not (steps > 0).all() or not np.allclose(steps, steps[0]):
            continue
        gap = abs(code - (others[0][0] if k == 0 else others[-1][0]))
        words = [set(_plain(t).split()) for t in (text, others[0][1], others[-1][1])]
        far = words[2] if k == 0 else words[1]
        mirrored = bool(words[1] & words[2])
        if gap > steps[0] + 1e-9 or (mirrored and not words[0] & far):
            out.append((code, text))
    return tuple(out)


@dataclass(frozen=True)
class BeyondScale:
    """A labelled code beyond the answer scale of one or more items (:func:`unlabelled_extra_codes`), analysed as an
    answer but named first, once for all the items that hold it with the same label and scale: ``rows`` are the
    row numbers of its cells in each of ``columns``."""

    columns: tuple[str, ...]
    value: float
    label: str
    rows: tuple[tuple[int, ...], ...]  # one tuple per column
    scale: tuple[float, float]  # the lowest and highest of the items' other labelled codes
    #: the codes of no answer the run gave already (numbers and words), which the advice's list keeps
    #: (data.non_answers.codes_given; set by pipeline.inputs.odd_value_problems)
    given: tuple = ()

    def caution(self, source: str) -> str:
        name = source.replace("\\", "/").rsplit("/", 1)[-1]
        cells = sum(len(r) for r in self.rows)
        if len(self.columns) == 1:
            (rows,) = self.rows
            few = names_shown(len(rows), 3)
            shown = ", ".join(str(r) for r in rows[:few]) + more_words(len(rows) - few)
            where = (f"The item {printable(self.columns[0])} of {name} holds the code {user_number(self.value)} labelled "
                     f"'{printable(self.label)}' ({cells} cell{'s' if cells != 1 else ''}: data "
                     f"row{'s' if cells != 1 else ''} {shown}), beyond its other labelled answers")
        else:
            listed = cut_list(list(zip(self.columns, self.rows)), SHOWN, lambda cr: f"{printable(cr[0])} {len(cr[1])}",
                              noun="item")
            where = (f"{len(self.columns)} items of {name} hold the code {user_number(self.value)} labelled "
                     f"'{printable(self.label)}' ({cells} cells: {listed}), beyond their other labelled answers")
        return f"{where} ({user_number(self.scale[0])} to {user_number(self.scale[1])}), read as an answer: a code of no answer?"

    def advice(self) -> Note:
        return Note((f"If {user_number(self.value)} '{printable(self.label)}' is not an answer on the scale, ",
                     Command(f"give {codes_given(tuple(self.given) + (self.value,))}", "read it as no answer"),
                     "; if it is, nothing."))


def beyond_scale(frame: pd.DataFrame, names, value_labels: dict, rows: np.ndarray) -> tuple[BeyondScale, ...]:
    """The labelled codes beyond the answer scales of the item columns ``names`` (:func:`unlabelled_extra_codes`),
    one for each code, label and scale, naming every item that holds it; ``rows``: the row numbers of
    ``frame``'s rows."""
    found: dict[tuple, list] = {}
    for column in names:
        labels = value_labels.get(column)
        if not labels or column not in frame.columns or not pd.api.types.is_numeric_dtype(frame[column]):
            continue
        values = frame[column].to_numpy(dtype=float, na_value=np.nan)
        for code, text in unlabelled_extra_codes(values, labels):
            scale = sorted(float(k) for k, v in labels.items()
                           if isinstance(k, (int, float)) and float(k) != code and not says_no_answer(v, True)
                           and not loosely_none(float(k), labels))
            found.setdefault((code, text, scale[0], scale[-1]), []).append(
                (column, tuple(int(r) for r in rows[values == code])))
    return tuple(BeyondScale(tuple(c for c, _ in held), code, text, tuple(r for _, r in held), (low, high))
                 for (code, text, low, high), held in found.items())


def declared_missing(frame: pd.DataFrame, ranges: dict, value_labels: dict) -> tuple[pd.DataFrame, tuple[NonAnswer, ...]]:
    """``frame`` (read with its user-defined missing values as values) with the values that the file declares
    missing (SPSS: ``ranges`` {column: [{'lo': .., 'hi': ..}]}) read as missing, and what was read so."""
    found: list[NonAnswer] = []
    out = frame
    for column, spans in (ranges or {}).items():
        if column not in frame.columns:
            continue
        series = frame[column]
        hit = np.zeros(len(series), dtype=bool)
        numeric = pd.api.types.is_numeric_dtype(series)
        values = series.to_numpy(dtype=float, na_value=np.nan) if numeric else series.to_numpy(dtype=object)
        labels = value_labels.get(column, {})
        for span in spans:
            lo, hi = span.get("lo"), span.get("hi")
            if numeric and isinstance(lo, (int, float)) and isinstance(hi, (int, float)):
                cells = (values >= lo) & (values <= hi)
            elif not numeric and isinstance(lo, str) and lo == hi:
                cells = np.array([isinstance(v, str) and v.strip() == lo.strip() for v in values], dtype=bool)
            else:
                continue
            cells &= ~hit
            for value in sorted({v for v in values[cells]}, key=lambda v: (isinstance(v, str), v)):
                same = cells & (values == value)
                key = float(value) if numeric else str(value)
                found.append(NonAnswer(NonAnswerKind.DECLARED, column, key, labels.get(key),
                                       tuple(frame.index[same].tolist())))
            hit |= cells
        if hit.any():
            if out is frame:
                out = frame.copy()
            out[column] = series.where(~hit)
            if not numeric:  # a text column left with numbers only is a column of numbers
                converted = pd.to_numeric(out[column], errors="coerce")
                if converted.notna().sum() == out[column].notna().sum():
                    out[column] = converted
    return out, tuple(found)


#: the kinds of values read as no answer by the fit's own data file (its declarations and value labels), which
#: scoring other data with the fit reads so too (:func:`fit_marked`); text cells that say no answer are read so in
#: every file by the one vocabulary, and the run's codes and words are carried as codes
MARKED_BY_FILE = (NonAnswerKind.DECLARED, NonAnswerKind.LABELLED)

_FIT_MARKED: contextvars.ContextVar[tuple[tuple[NonAnswer, ...], tuple]] = contextvars.ContextVar(
    "cfa_tool_fit_marked", default=((), ()))


@dataclass(frozen=True)
class DeclaredRange:
    """A range of values an SPSS file declares missing in one column ('90 thru 99'; a discrete missing value is a
    range of one value): the declaration itself, which a fit keeps for its item columns, so that scoring other data
    with the fit reads every value of the range as no answer, also those the fit's own rows never took (rows-s24: only
    the values the fit's data held were carried, and a 98 of the scored file was scored as an answer)."""

    column: str
    low: float
    high: float

    def shown(self) -> str:
        return user_number(self.low) if self.low == self.high else f"{user_number(self.low)} to {user_number(self.high)}"

    def to_dict(self) -> dict:
        return {"column": self.column, "low": self.low, "high": self.high}


def declared_ranges(ranges: dict) -> tuple[DeclaredRange, ...]:
    """The numeric ranges an SPSS file declares missing (``ranges``: pyreadstat's {column: [{'lo': .., 'hi': ..}]});
    Stata's tagged missing values (.a to .z) are letters, which no file of numbers holds, and are left out."""
    out = []
    for column, spans in (ranges or {}).items():
        for span in spans or ():
            lo, hi = span.get("lo"), span.get("hi")
            if isinstance(lo, (int, float)) and isinstance(hi, (int, float)) and not isinstance(lo, bool) \
                    and np.isfinite(lo) and np.isfinite(hi) and lo <= hi:
                out.append(DeclaredRange(str(column), float(lo), float(hi)))
    return tuple(out)


@dataclass(frozen=True)
class LabelledNoAnswer:
    """A code that an item's value label marks as no answer, by the one rule of labelled codes
    (:func:`labelled_non_answers`), whatever cells hold it: a fit keeps those of its items, as it keeps the ranges its
    file declares missing (:class:`DeclaredRange`), so that scoring other data with the fit reads the code as no
    answer where the fit's own rows never gave it (8 'Refused' labelled in every item, given in some: an export of the
    same survey without its labels scored an 8 of another item as an answer)."""

    column: str
    value: float
    label: str

    @property
    def low(self) -> float:
        return self.value

    @property
    def high(self) -> float:
        return self.value

    def to_dict(self) -> dict:
        return {"column": self.column, "value": self.value, "label": self.label}


def no_answer_codes(frame: pd.DataFrame, value_labels: dict, skip: tuple = ()) -> tuple[LabelledNoAnswer, ...]:
    """The codes of ``frame``'s numeric columns whose value labels (``value_labels``) mark them as no answer, by the
    rule :func:`labelled_non_answers` reads cells by (``skip``: codes given as missing codes, left to them), whether
    or not a cell holds them."""
    out = []
    for column, labels in value_labels.items():
        if column in frame.columns and pd.api.types.is_numeric_dtype(frame[column]):
            values = frame[column].to_numpy(dtype=float, na_value=np.nan)
            out += [LabelledNoAnswer(str(column), code, str(text))
                    for code, text in sorted(_labelled_none(labels, values, skip)[0].items())]
    return tuple(out)


def no_answer_codes_from_saved(saved) -> tuple[LabelledNoAnswer, ...]:
    """:meth:`LabelledNoAnswer.to_dict` read back (a saved fit's ``data.codes_labelled_no_answer_by_the_file``); a list
    changed by hand raises KeyError, TypeError or ValueError, which the reader of the saved fit names."""
    return tuple(LabelledNoAnswer(str(d["column"]), float(d["value"]), str(d["label"])) for d in saved or ())


def ranges_from_saved(saved) -> tuple[DeclaredRange, ...]:
    """:meth:`DeclaredRange.to_dict` read back (a saved fit's ``data.missing_ranges_declared_by_the_file``); a list
    changed by hand raises KeyError, TypeError or ValueError, which the reader of the saved fit names."""
    return tuple(DeclaredRange(str(d["column"]), float(d["low"]), float(d["high"])) for d in saved or ())


@dataclass(frozen=True)
class CarriedCells:
    """The cells of one column holding one value that an earlier fit read as no answer (its data file's declarations
    or labels), read so in the data scored: their rows (index labels), by which the note counts the rows kept."""

    value: float
    column: str
    rows: tuple
    #: the label the fit's data file gave the code, when the fit read it as declared missing (NonAnswerKind.DECLARED):
    #: a label that names an answer makes the cells a caution first (data.missing_codes.carried_codes_on_answers)
    declared_label: str | None = None


@contextlib.contextmanager
def fit_marked(found: tuple[NonAnswer, ...], ranges: tuple[DeclaredRange | LabelledNoAnswer, ...] = ()) -> Iterator[None]:
    """Within: the codes that an earlier fit's data file declared missing or labelled as no answer (``found``, the
    fit's values read as no answer; those of :data:`MARKED_BY_FILE` with numbers), and every value of the ranges it
    declared missing and the codes it labelled so in its item columns, held by its rows or not (``ranges``), are read
    as no answer in the same item columns of the data read
    (:func:`read_fit_marked`): scores of another file with the fit (an export of the same survey without the
    declarations, say) treat as missing what the fit did."""
    token = _FIT_MARKED.set((tuple(f for f in found if f.kind in MARKED_BY_FILE and isinstance(f.value, float)),
                             tuple(ranges)))
    try:
        yield
    finally:
        _FIT_MARKED.reset(token)


def saved_non_answers(found: tuple[NonAnswer, ...]) -> list[dict]:
    """The values a fit's data file marks as no answer (:data:`MARKED_BY_FILE`), as its saved result keeps them
    (one per column and code), for scores of other data read by :func:`non_answers_from_saved`."""
    seen = {}
    for f in found:
        if f.kind in MARKED_BY_FILE and isinstance(f.value, float):
            seen.setdefault((f.column, f.value), {"column": f.column, "value": f.value, "kind": f.kind.name.lower(),
                                                 "label": f.label})
    return list(seen.values())


def non_answers_from_saved(saved) -> tuple[NonAnswer, ...]:
    """:func:`saved_non_answers` read back (rows unknown: ()); a list changed by hand raises KeyError, TypeError or
    ValueError, which the reader of the saved fit names."""
    return tuple(NonAnswer(NonAnswerKind[str(d["kind"]).upper()], str(d["column"]), float(d["value"]),
                           None if d.get("label") is None else str(d["label"]), ()) for d in saved or ())


def _marked_how(f: NonAnswer | DeclaredRange | LabelledNoAnswer) -> str:
    """How a fit's data file marked the value ``f`` as no answer, in words."""
    if isinstance(f, LabelledNoAnswer):
        return f"labelled it '{printable(f.label)}'"
    if isinstance(f, DeclaredRange):
        return "declared it missing" if f.low == f.high else f"declared {f.shown()} missing"
    if f.kind is NonAnswerKind.DECLARED:
        return "declared it missing"
    return f"labelled it '{printable(f.label)}'" if f.label else "labelled it as no answer"


def read_fit_marked(frame: pd.DataFrame, items, source: str, value_labels: dict
                    ) -> tuple[pd.DataFrame, tuple[CarriedCells, ...]]:
    """``frame`` with the codes of :func:`fit_marked` read as no answer in their item columns (``items``; None: every
    column), and the cells read so (:func:`fit_marked_note` says them, over the rows kept); a code that the file read
    labels as an answer is refused, naming both readings: the files code that answer otherwise (the scores would read
    an answer as no answer)."""
    values, ranges = _FIT_MARKED.get()
    if not values and not ranges:
        return frame, ()
    mine = None if items is None else {str(x) for x in items}
    found: list[CarriedCells] = []
    out = frame
    for f in values + ranges:
        if f.column not in frame.columns or (mine is not None and f.column not in mine) \
                or not pd.api.types.is_numeric_dtype(frame[f.column]):
            continue
        column = out[f.column]
        cells = ((column >= f.low) & (column <= f.high) if isinstance(f, (DeclaredRange, LabelledNoAnswer))
                 else column == f.value).to_numpy(dtype=bool)
        if not cells.any():
            continue
        taken = np.asarray(column.to_numpy(dtype=float)[cells])
        own = value_labels.get(f.column) or {}
        present = np.unique(column.to_numpy(dtype=float, na_value=np.nan)).tolist()
        for value in np.unique(taken):
            label = own.get(float(value))
            if label is not None and not says_no_answer(label, explained=True) \
                    and not loosely_none(float(value), own, [v for v in present if math.isfinite(v)]):
                raise DataError(f"{base_name(source)}: column '{printable(f.column)}' labels {user_number(value)} "
                                f"'{printable(label)}', an answer, but the earlier fit read {user_number(value)} as "
                                f"no answer (its data file {_marked_how(f)}): the two files code the answers "
                                f"otherwise; recode one as the other before scoring")
            same = cells & (column.to_numpy(dtype=float) == value)
            declared = f.label if isinstance(f, NonAnswer) and f.kind is NonAnswerKind.DECLARED else None
            found.append(CarriedCells(float(value), f.column, tuple(frame.index[same].tolist()), declared))
        if out is frame:
            out = frame.copy()
        out[f.column] = column.where(~cells)
    return out, tuple(found)


def fit_marked_note(found: tuple[CarriedCells, ...], source: str, kept: pd.Index | None = None,
                    among: str = "") -> str | None:
    """The note on the cells :func:`read_fit_marked` read as no answer, counted over the rows ``kept`` (the rows row
    filters kept: ``among`` names them after 'the N rows'; None: every row read), by the rule of every count of the
    rows analysed (data.kept_counts; rows-s24: the note counted the cells of rows the filters left out); None when no
    cell of those rows holds one."""
    counts: dict[float, dict[str, int]] = {}
    rows: set = set()
    for f in found:
        held = [r for r in f.rows if kept is None or r in kept]
        if held:
            counts.setdefault(f.value, {})
            counts[f.value][f.column] = counts[f.value].get(f.column, 0) + len(held)
            rows.update(held)
    if not counts:
        return None
    total = sum(n for held in counts.values() for n in held.values())
    listed = "; ".join(f"{user_number(v)} ({cut_list(list(held.items()), SHOWN, lambda cn: f'{printable(cn[0])} {cn[1]}', noun='item')})"
                       for v, held in sorted(counts.items()))
    held = (f"{count_text(len(rows))} of the {counted(len(kept), 'row')} {among}" if kept is not None and among
            else counted(len(rows), "row"))
    return (f"{base_name(source)}: {counted(total, 'cell')} of the items (in {held}) holding "
            f"a value that the earlier fit's data file marked as no answer (declared missing, or labelled so) "
            f"{'was' if total == 1 else 'were'} read as no answer, as the fit read {'it' if total == 1 else 'them'}: "
            f"{listed}")


#: what a data frame built in Python may hold in a cell that is neither a number nor a word (never a file's cell)
CONTAINERS = (list, dict, set, np.ndarray)


def refuse_containers(series: pd.Series, column) -> None:
    """The first cell of an item column that holds a container (a list, a dict, a set, an array: what a data frame
    built in Python may hold, never a file's cell) refused, naming the column and the row by its index label: such
    a cell is neither a number nor a word, and no reading of it would be the researcher's."""
    values = series.tolist()
    k = next(k for k, v in enumerate(values) if isinstance(v, CONTAINERS))
    from cfa_tool.data.kept_rows import RowNaming

    kind = type(values[k]).__name__
    raise DataError(f"{DATA_FRAME}: column '{printable(str(column))}', {RowNaming.INDEX_LABEL.one} "
                    f"{printable(repr(series.index[k]))}: holds a {kind} ({clipped(repr(values[k]), 40)}); a cell must hold one number or one word: "
                    f"unpack the {kind} into its own columns or rows first")


def written_non_answers(frame: pd.DataFrame, keep_text: tuple[str, ...] = (),
                        listed: dict[str, frozenset[str]] | None = None) -> tuple[pd.DataFrame, tuple[NonAnswer, ...]]:
    """``frame`` with text cells that say no answer ('refused', "don't know") read as missing in columns that hold
    numbers otherwise (such a cell made the whole column text), and what was read so; ``keep_text`` (id columns)
    are left as written; ``listed``: each column's words (matching keys) an 'answers' statement gives a code, which
    are answers whatever they say ('"Don't know" = 3': the model file decides, not this vocabulary)."""
    found: list[NonAnswer] = []
    out = frame
    kept = set(keep_text)
    texts_by_type = {}  # columns of text only, judged by their dtypes once (a default fit reads every frame so)
    for column, dtype in zip(frame.columns.tolist(), frame.dtypes):
        if column in kept:
            continue
        if dtype not in texts_by_type:
            texts_by_type[dtype] = not pd.api.types.is_numeric_dtype(dtype) and (
                dtype == object or pd.api.types.is_string_dtype(dtype))
        if not texts_by_type[dtype]:
            continue
        series = frame[column]
        try:
            distinct = [v for v in series.dropna().unique() if isinstance(v, str)]
        except TypeError:  # an unhashable cell (a list, a dict, a set in a data frame built in Python)
            refuse_containers(series, column)
        coded = (listed or {}).get(column, frozenset())
        said = [v for v in distinct if says_no_answer(v) and answer_key(v) not in coded]  # distinct texts
        if said and any(number(v.strip()) is None for v in distinct if v not in said):
            # a column of words (answers recorded as words, group labels): a middle answer such as 'Not sure' is
            # one of its answers, never read as missing (an 'answers' statement codes it), unless the run's own
            # words (--missing-codes) say it is no answer
            own = _RUN_WORDS.get().phrases
            said = [v for v in said if _plain(v) not in MIDDLE_PHRASES or _plain(v) in own]
        if not said:
            continue
        texts = series.isin(said).to_numpy(dtype=bool)
        rest = series.where(~texts)
        stripped = series.map(lambda v: v.strip() if isinstance(v, str) else v)  # Excel: numbers beside the text
        numbers = pd.to_numeric(stripped.where(~texts), errors="coerce").astype(float)
        own = _RUN_WORDS.get().phrases
        for text in sorted({v.strip() for v in said}):
            cells = (stripped == text).to_numpy(dtype=bool)
            kind = NonAnswerKind.GIVEN if _plain(text) in own else NonAnswerKind.WRITTEN
            found.append(NonAnswer(kind, column, text, None, tuple(frame.index[cells].tolist())))
        if out is frame:
            out = frame.copy()
        # a column of numbers with those cells empty; one that holds other text keeps it (its reader names the cell)
        out[column] = numbers if numbers.notna().sum() == rest.notna().sum() else rest
    return out, tuple(found)


#: values and items a clause for a methods paragraph names before 'and N more'
BRIEF = 3


def _brief(names: list[str], noun: str) -> str:
    """'a, b and c', or 'a, b, c and 4 more NOUN' past :data:`BRIEF` names (all of them when one would be left
    over: numbers.names_shown)."""
    if len(names) > names_shown(len(names), BRIEF):
        return cut_list(names, BRIEF, noun=noun)
    return word_list(names)


def non_answer_clause(found: tuple[NonAnswer, ...], items=None, source: str | None = None,
                      model_items: tuple[str, ...] = ()) -> str:
    """The values of the model's ``items`` (None: of every column in ``found``) that the file marks as no answer and
    that were read as missing, in a clause of a methods paragraph: each value (with its label) and the items holding
    it, briefly: values the data file marks as no answer were treated as missing (8 'refused' in q1, q2, q3 and 2
    more items; 'don't know' in q4), or 'in all 20 items' when a value is in every one of more than a few
    ``model_items`` (the model's items); '' when there are none.  ``source``: the data's source, whose words name a data
    frame as one ('the data frame holds').  Words the run declared (--missing-codes 'k.A.': NonAnswerKind.GIVEN) are
    said first, as declared: the word declared to mean no answer was treated as missing ('k.A.' in q2)."""
    mine = [f for f in found if items is None or f.column in set(items)]
    given = [f for f in mine if f.kind is NonAnswerKind.GIVEN]
    if given:  # the run's words, declared as a code given is: 'the word declared to mean no answer was ...'
        rest = non_answer_clause(tuple(f for f in mine if f not in given), None, source, model_items)
        one = len({f.value for f in given}) == 1
        return (f"the word{'' if one else 's'} declared to mean no answer {'was' if one else 'were'} treated as "
                f"missing ({_held_values(given, model_items)})" + (f"; {rest}" if rest else ""))
    if not mine:
        return ""
    shown = _held_values(mine, model_items)
    if source == DATA_FRAME:
        return f"text cells of the data frame that say no answer were treated as missing ({shown})"
    return f"values the data file marks as no answer were treated as missing ({shown})"


def _held_values(mine: list[NonAnswer], model_items: tuple[str, ...]) -> str:
    """Each value of ``mine`` with the items holding it, for :func:`non_answer_clause`: "8 'refused' in q1, q2, q3
    and 2 more items; 'don't know' in q4", or 'in all 20 items' (of the model's items, ``model_items``)."""
    columns: dict[str, list[str]] = {}
    for f in mine:
        columns.setdefault(f.shown(), []).append(f.column)
    every = set(model_items) if len(model_items) > BRIEF else None  # 'in all 20 items', not 'and 17 more'

    def held_in(names: list[str]) -> str:
        names = list(dict.fromkeys(names))
        if every is not None and set(names) == every:
            return f"all {len(names)} items"
        return _brief([printable(n) for n in names], "item")

    values = [f"{value} in {held_in(names)}" for value, names in columns.items()]
    return cut_list(values, BRIEF, sep="; ", lead="; and ", noun="value")


#: the words after 'the N rows' of a note counted over the rows that row filters kept (data.kept_counts)
FILTERS_KEPT = "that the row filters kept"


def _said(found: tuple[NonAnswer, ...], source: str, items=None, kept: int | None = None,
          among: str = FILTERS_KEPT) -> tuple[str, str] | None:
    """What was read as no answer in the model's ``items`` (None: every column in ``found``), one sentence: each
    code with its label, the items and their cells; and how to undo it.  None if nothing.  ``kept``: the rows row
    filters kept, when they chose the rows (``found`` counted over them: data.kept_counts), which the sentence names."""
    mine = [f for f in found if items is None or f.column in set(items)]
    if not mine:
        return None
    frame = source == DATA_FRAME
    name = "the data frame" if frame else base_name(source)
    if kept is not None:
        name = f"the {counted(kept, 'row')} of {name} {among}"
    by_value: dict[tuple, list[NonAnswer]] = {}
    for f in mine:
        by_value.setdefault((f.kind, f.value, f.label if f.kind is NonAnswerKind.LABELLED else None), []).append(f)
    parts = []
    for group in by_value.values():
        group = sorted(group, key=lambda f: -len(f.rows))  # the items most affected first (those past SHOWN: fewest)
        cells = sum(len(f.rows) for f in group)
        listed = cut_list(group, SHOWN, lambda f: f"{printable(f.column)} {len(f.rows)}", noun="item")
        parts.append(f"{group[0].shown()} ({counted(cells, 'cell')}: {listed})")
    total = sum(len(f.rows) for f in mine)
    kinds = {f.kind for f in mine}
    how = word_list([w for k, w in ((NonAnswerKind.LABELLED, "labels as no answer"),
                                      (NonAnswerKind.DECLARED, "declares as missing values"),
                                      (NonAnswerKind.WRITTEN, "writes as no answer")) if k in kinds], "or")
    held = word_list((["text that says no answer" if frame else f"values that the file {how}"] if how else [])
                     + ([("a word given as a code" if total == 1 else "words given as codes") + " of no answer"]
                        if NonAnswerKind.GIVEN in kinds else []), "or")
    said = (f"{count_text(total)} cell{'s' if total != 1 else ''} of the items in {name} "
            f"hold{'s' if total == 1 else ''} {held}, "
            f"read as missing, not as answers: {'; '.join(parts)}.")
    undo = "; ".join(w for k, w in ((NonAnswerKind.LABELLED, "give its code another value label"),
                                     (NonAnswerKind.DECLARED, "remove its declaration as a missing value"),
                                     (NonAnswerKind.WRITTEN, "write the answer's number in the cell"),
                                     (NonAnswerKind.GIVEN, "leave its word out of the codes of no answer given"))
                     if k in kinds)
    copy = f", in a copy of the {'data frame' if frame else 'file'}" if kinds - {NonAnswerKind.GIVEN} else ""
    return said, f"To analyse one as an answer, {undo}{copy}."


def non_answer_note(found: tuple[NonAnswer, ...], source: str, items: Iterable[str] | None = None,
                    kept: int | None = None, among: str = FILTERS_KEPT) -> str | None:
    """The note of the data summary on what was read as no answer in the model's ``items`` (every view shows a
    reader's notes): what, where and how many cells, and how to undo it; None if nothing.  Whether rows leave the
    analysis because of it is :func:`non_answer_caution`'s to say.  ``kept``: the rows analysed, when row filters
    or a group column chose them (``found`` counted over them, data.kept_counts), which ``among`` names ('that the row
    filters kept')."""
    said = _said(found, source, items, kept, among)
    return None if said is None else f"{said[0][:-1]}. {said[1][:-1]}"


def rows_lost(found: tuple[NonAnswer, ...], frame: pd.DataFrame, items: Iterable[str], listwise: bool) -> int:
    """The rows of ``frame`` (the rows analysed, after any row filter; index labels as the reader gave them) that
    hold a value read as no answer (``found``) in the ``items`` and leave the analysis: with ``listwise`` deletion
    every such row (it has a gap), else those left with no answer to any item."""
    names = [x for x in items if x in frame.columns]
    marked = np.zeros(len(frame), dtype=bool)
    for f in found:
        if f.column in names:
            marked |= frame.index.isin(f.rows)
    if not marked.any() or not names:
        return 0
    gaps = frame[names].isna().to_numpy()
    return int((marked & (gaps.any(axis=1) if listwise else gaps.all(axis=1))).sum())


def non_answer_caution(found: tuple[NonAnswer, ...], source: str, items: Iterable[str] | None, frame: pd.DataFrame,
                       listwise: bool = False, kept: int | None = None,
                       among: str = FILTERS_KEPT) -> tuple[str, Text] | None:
    """The one rule that makes values read as no answer (the data summary's note, :func:`non_answer_note`) a
    caution first in every view: when rows leave the analysis because of them (:func:`rows_lost`: ``listwise``
    deletion, or a row left with no answer to any item), the caution (one line) says how many rows and what was
    read, with its advice; None when every row stays (full information keeps a row with gaps), which it advises
    with listwise deletion (groups that share clusters too: full-information ML takes their clusters).  ``kept``:
    the rows analysed, when row filters or a group column chose them (``found`` counted over them,
    data.kept_counts), which ``among`` names."""
    said = _said(found, source, items, kept, among)
    lost = rows_lost(found, frame, items, listwise) if said is not None else 0
    if not lost:
        return None
    why = ("listwise deletion leaves out every row with a gap" if listwise else
           "no answer to any item is left in them")
    caution = (f"{counted(lost, 'row')} leave{'s' if lost == 1 else ''} the analysis because values read as no answer "
               f"emptied {'their cells' if lost != 1 else 'its cells'} ({why}). {said[0]}")
    if not listwise:
        keep = ""
    else:
        keep = Note((" To use the rows' other answers, ", Command(f"leave out {Option.INCOMPLETE_ROWS.given('listwise')}",
                                                                   "fit them by full-information ML",
                                                                   takes=taken_by(Option.INCOMPLETE_ROWS),
                                                                   elsewhere="fit them by full-information ML"), "."))
    return caution, f"Nothing, if they are not answers. {said[1]}" + keep
