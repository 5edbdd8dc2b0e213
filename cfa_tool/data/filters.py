"""Row filters of the tool's own small form: COLUMN OPERATOR VALUE.

Examples: ``district = north``, ``age >= 18``, ``"wave 2" != 1``,
``visit_date >= 2026-03-01``.  A filter is parsed, never evaluated as code.
Operators: = != < <= > >= (text columns take only = and !=; date columns, and
text written YYYY-MM-DD, compare as dates, and text dates in another form when their cells say the order of day
and month; a date without a time of day means the whole day).

A list of values in one filter: COLUMN in V1, V2, ... keeps the rows whose value is one of them, COLUMN not in
V1, V2, ... the rows whose value is none of them (``student_id not in S-00601, S-00602``; a value that holds a comma
in double quotes), each value compared as '=' compares it (labels, upper and lower case, dates, codes); a methods
section words it as one clause with the count.
"""

from __future__ import annotations

import datetime
import operator
import re
from dataclasses import dataclass, replace

import numpy as np
import pandas as pd

from cfa_tool.data.filter_text import SET_OPERATORS, filter_column, filter_text
from cfa_tool.data.kept_rows import KEPT_BY, ROW_NAMES_COLUMN, cell_words, row_naming
from cfa_tool.data.labels import label_text, listed_labels, merged_labels, other_case, shared_labels
from cfa_tool.data.moments import row_numbers
from cfa_tool.errors import DataError, OptionError, printable
from cfa_tool.options import Option
from cfa_tool.language.names import written_name
from cfa_tool.numbers import count_text, cut_list, more_words, number, user_number, word_list
from cfa_tool.data.renamed_columns import renamed_hint
from cfa_tool.suggest import close_names, did_you_mean

#: the test of each operator a row filter may use (the comparisons of the filter's column with its value)
OPERATOR_TESTS = {"=": operator.eq, "!=": operator.ne, "<": operator.lt, "<=": operator.le, ">": operator.gt,
             ">=": operator.ge}

#: values of a list a filter's words name before '...' (the methods paragraph, the notes)
SHOWN_VALUES = 3
_SET_PATTERN = re.compile(r'^\s*(?:"(?P<quoted>[^"]+)"|(?P<plain>[^\s=!<>"]+))\s+(?P<op>not\s+in|in)'
                          r'(?:\s+(?P<values>.*?))?\s*$', re.S)
_PATTERN = re.compile(r'^\s*(?:"(?P<quoted>[^"]+)"|(?P<plain>[^\s=!<>"]+))\s*(?P<op><=|>=|!=|==|=|<|>)\s*(?P<value>.+?)\s*$')


@dataclass(frozen=True)
class RowFilter:
    """One row filter as parsed from its text, with what it left out once applied."""
    column: str
    operator: str
    value: object
    text: str
    #: rows the filter left out because their cell in the column was empty (set by apply_filters): an empty cell
    #: meets no comparison, 'mode != bus' included, and a methods section must say so
    empty: int = 0
    #: rows with a value in the column that the filter left out (set by apply_filters): a filter on a model item
    #: that leaves out some of its answers restricts that item's range (pipeline.inputs.row_filter_problems)
    dropped: int = 0
    #: the codes (as text) that carry the label a text value was compared with, each with its rows before the
    #: filter, when several codes present carry it (1 and 3 both 'north'; set by apply_filters): the filter treats
    #: them as one, which a caution says
    shared: tuple[tuple[str, int], ...] = ()
    #: the labels of the column that differ from the text compared only in upper and lower case ('North' for
    #: 'district = north'), each with its rows before the filter (set by apply_filters): a filter matches text exactly,
    #: so it treats them as other values, which a caution says (as the group column's caution does)
    other_case: tuple[tuple[str, int], ...] = ()
    #: the value label the file gives the code compared (set by apply_filters for a number compared with = or != in
    #: a column with value labels): a methods section names the group by its label, not by a bare code
    label: str | None = None
    #: a filter with a list of values (:data:`SET_OPERATORS`): each value as a filter of its own ('=' for 'in', '!='
    #: for 'not in'; set by apply_filters), with what comparing it found (labels, codes sharing a label, case)
    members: tuple["RowFilter", ...] = ()
    #: of a member of a list filter (as compared, or in :attr:`members`): the list filter as messages quote it, the
    #: member's own text its one clause ('grade = 6'), so that an error about one value quotes that clause and the
    #: list cut to a few values (:func:`quoted_filter`), not every value of the list (s20)
    within: str | None = None

    def __str__(self) -> str:
        """The filter as messages and notes quote it: as written, a list of more than :data:`SHOWN_VALUES` values cut
        to them and its count ('student_id not in S-00601, S-00602, S-00603, ... (30 values)')."""
        if self.operator not in SET_OPERATORS or len(self.value) <= SHOWN_VALUES:
            return self.text
        shown = ", ".join(_value_text(v) for v in self.value[:SHOWN_VALUES])
        return f"{_column_text(self.column)} {self.operator} {shown}, ... ({len(self.value)} values)"

    def meets(self, value) -> bool:
        """Whether a cell of a column of numbers holding ``value`` (a number) meets the filter, its values read as
        :meth:`compares_numbers` reads them ('07' as 7)."""
        if self.operator in SET_OPERATORS:
            found = any(value == _as_number(v) for v in self.value)
            return found if self.operator == "in" else not found
        return bool(OPERATOR_TESTS[self.operator](value, _as_number(self.value)))

    def compares_numbers(self) -> bool:
        """Whether the filter compares with a number (or, with a list, with numbers only) in a column of numbers: a
        value written with a leading zero ('site = 07') is the number there, as :func:`_codes_as_written` compares it
        (only a column of text holds codes written so), and is checked as '7' is (s21: the check of a code given with
        --missing-codes that a filter already leaves out passed '07' over)."""
        values = self.value if self.operator in SET_OPERATORS else (self.value,)
        return all(_as_number(v) is not None for v in values)

    def in_words(self) -> str:
        """The filter as a methods section words it: 'district was north', 'age was at least 18', '"wave 2" was
        1' (the column as the model language writes names: language.names.written_name), a code with its label:
        'gender was not 3, labelled "another / prefers to describe"' (new-user trial s15), a text of several words in
        double quotes: 'gender was not "prefer not to say"' (new-user trial s19).  A list of values is one clause with
        its count: 'district was one of north, south', 'student_id was none of 30 listed values (S-00601, S-00602,
        S-00603, ...)', a listed code with its label after it in double quotes.  Without parentheses around what it
        holds: the methods section says it inside its own (reporting.paragraph), and the rows left out for an empty
        cell after it (:meth:`empty_words`)."""
        if self.operator in SET_OPERATORS:
            labels = {m.value: m.label for m in self.members}
            values = [_worded(v) + (f' "{labels[v]}"' if labels.get(v) else "") for v in self.value]
            listed = (", ".join(values) if len(values) <= SHOWN_VALUES else
                      f"{len(values)} listed values: {', '.join(values[:SHOWN_VALUES])}, ...")
            return f"{written_name(self.column)} was {'one' if self.operator == 'in' else 'none'} of {listed}"
        value = _worded(self.value)
        if self.label is not None:
            value += f', labelled "{self.label}"'
        return f"{written_name(self.column)} {_OPERATOR_WORDS[self.operator]} {value}"

    def empty_words(self) -> str:
        """'54 rows with no value of mode'."""
        return f"{self.empty} row{'s' if self.empty != 1 else ''} with no value of {written_name(self.column)}"


#: each operator of a row filter in the words of a methods section
_OPERATOR_WORDS = {"=": "was", "!=": "was not", "<": "was below", "<=": "was at most", ">": "was above",
                   ">=": "was at least"}


def _value_text(value) -> str:
    return user_number(value) if isinstance(value, float) else str(value)


def _worded(value) -> str:
    """A filter's value in a methods sentence: a text of several words in double quotes, so that it reads as one value
    ('gender was not "prefer not to say"', new-user trial s19), anything else as :func:`_value_text` writes it."""
    text = _value_text(value)
    return f'"{text}"' if isinstance(value, str) and len(text.split()) > 1 and '"' not in text else text


def _clause_text(column: str, op: str, value) -> str:
    """One comparison as a filter writes it: 'district = north', '"wave 2" != 1' (data.filter_text, the one writer;
    as the user wrote it where that cannot be)."""
    return filter_text(column, op, value) or f"{_column_text(column)} {op} {_value_text(value)}"


def _column_text(column: str) -> str:
    """A filter's column as a filter writes it: in double quotes when not a plain word (data.filter_text)."""
    return filter_column(column) or f'"{column}"'


def merged_exclusions(filters) -> list[tuple[object, tuple[int, ...]]]:
    """The row ``filters`` (a half of a halves file may be among them) with several '!=' filters on one column merged
    into one list filter 'COLUMN not in V1, V2, ...' at the place of the first of them (its members the filters
    merged, its empty cells theirs), each with the positions in ``filters`` of the filters it stands for: the one
    merge that the methods paragraph (:func:`filters_in_words`) and the notes of :func:`apply_filters` both follow
    (new-user trial s19: 30 filters 'student_id != S-006..', 30 clauses; s20: and 30 notes)."""
    from dataclasses import replace

    excluded: dict[str, list[int]] = {}
    for k, f in enumerate(filters):
        if isinstance(f, RowFilter) and f.operator == "!=":
            excluded.setdefault(f.column, []).append(k)
    merged, done = [], set()
    for k, f in enumerate(filters):
        several = excluded.get(f.column) if isinstance(f, RowFilter) and f.operator == "!=" else None
        if not several or len(several) < 2:
            merged.append((f, (k,)))
        elif f.column not in done:
            done.add(f.column)
            members = tuple(filters[j] for j in several)
            merged.append((replace(members[0], operator="not in", value=tuple(g.value for g in members),
                                   text=list_filter(f.column, [g.value for g in members])
                                   or "; ".join(g.text for g in members),
                                   empty=sum(g.empty for g in members), dropped=sum(g.dropped for g in members),
                                   members=members), tuple(several)))
    return merged


def kept_by_words(filters) -> str:
    """'the row filter 'district = north'', 'the row filters 'wave = 2', 'student_id not in S-00101, S-00102,
    S-00103, ... (30 values)'': the filters that chose the rows as a data line or a split's sentence quotes them, each
    as messages quote it (:func:`quoted_filter`), several '!=' of one column as their one list
    (:func:`merged_exclusions`); '' without filters."""
    merged = [f for f, _ in merged_exclusions(list(filters))]
    if not merged:
        return ""
    return f"the row filter{'s' if len(merged) > 1 else ''} {word_list(quoted_filter(f) for f in merged)}"


def filters_in_words(filters) -> list[str]:
    """The row ``filters`` (as apply_filters counted them; a half of a halves file among them) as a methods section
    words them (:meth:`RowFilter.in_words`), one clause each, several '!=' filters on one column one clause with
    their count, worded as the list form 'COLUMN not in ...' words it (:func:`merged_exclusions`)."""
    return [f.in_words() for f, _ in merged_exclusions(filters)]


def kept_range_words(filters) -> str:
    """The row ``filters`` on one column (data.filters.RowFilter, as apply_filters counted them) as one clause naming
    what they keep, for a methods section: 'on_time was at least 2 and at most 4', the bounds the tightest of their
    comparisons ('>= 2' and '> 3' keep the rows above 3; of two bounds at one value the strict one), then the other
    comparisons as :meth:`RowFilter.in_words` words them ('was not 3', several '!=' one list: :func:`merged_exclusions`)
    after 'and' (s20: the range-restriction sentence named each filter of one item apart, 'x1 >= 2' and 'x1 <= 4')."""
    filters = list(filters)
    column = filters[0].column
    lower = upper = None  # (value, strict) of the tightest bound below and above
    others = []
    for f, _ in merged_exclusions(filters):
        value = f.value
        numeric = isinstance(value, (int, float)) and not isinstance(value, bool)
        if numeric and f.operator in (">", ">="):
            bound = (float(value), f.operator == ">")
            lower = bound if lower is None or bound > lower else lower
        elif numeric and f.operator in ("<", "<="):
            bound = (float(value), f.operator == "<")
            upper = bound if upper is None or (bound[0], not bound[1]) < (upper[0], not upper[1]) else upper
        else:
            others.append(f)
    name = written_name(column)
    bits = ([f"{'above' if lower[1] else 'at least'} {_worded(lower[0])}"] if lower else []) + (
        [f"{'below' if upper[1] else 'at most'} {_worded(upper[0])}"] if upper else [])
    for f in others:
        words = f.in_words()
        bits.append(words[len(f"{name} was "):] if words.startswith(f"{name} was ") else words)
    listed = word_list(bits)
    return f"{name} was {listed}"


#: values a filter written for advice lists at most (more: the advice gives the filter's form)
LISTED_AT_MOST = 100


def list_filter(column: str, values, keep: bool = False) -> str | None:
    """The row filter that keeps the rows whose ``column`` holds one of ``values`` (``keep``) or none of them, written
    as :func:`parse_filter` reads it back ('student_id not in S-00601, S-00602'; a value with a comma in double
    quotes): the one way advice writes such a filter.  None where it cannot be written so (a name or value that
    cannot be printed, a double quote in a value, more than :data:`LISTED_AT_MOST` values)."""
    texts = [_value_text(v) for v in values]
    name = filter_column(column)  # the one writer of a filter's column (data.filter_text)
    if not texts or len(texts) > LISTED_AT_MOST or name is None:
        return None
    if any(printable(t) != t or '"' in t or not t.strip() or t != t.strip() for t in texts):
        return None
    listed = ", ".join(f'"{t}"' if "," in t or (t[0] == t[-1] == "'") else t for t in texts)
    return f"{name} {'in' if keep else 'not in'} {listed}"


def parse_filter(text: str) -> RowFilter:
    if not isinstance(text, str):
        raise OptionError(f"a row filter is text such as 'district = north', not {type(text).__name__}")
    listed = _SET_PATTERN.match(text)
    if listed:
        return _set_filter(text, listed)
    match = _PATTERN.match(text)
    if not match:
        raise OptionError(f"cannot read the row filter '{printable(text)}'; " + (
            _quoting_hint(text) or "write COLUMN OPERATOR VALUE, e.g. 'district = north' or 'age >= 18'"))
    column = match.group("quoted") or match.group("plain")
    op = "=" if match.group("op") == "==" else match.group("op")
    raw = match.group("value")
    if raw[:1] in "=!<>":
        raise OptionError(_second_operator(text, match.start("op"), match.group("op"), match.start("value")))
    if len(raw) >= 2 and raw[0] == raw[-1] and raw[0] in "\"'":
        value: object = raw[1:-1]
    else:
        parsed = None if zero_led(raw) else number(raw)  # '000991' kept as written (:func:`_compared`)
        value = parsed if parsed is not None else raw
    return RowFilter(column, op, value, text.strip())


def _set_filter(text: str, match: re.Match) -> RowFilter:
    """A filter with a list of values: COLUMN in V1, V2, ... or COLUMN not in V1, V2, ... (split at its commas, a value
    in double quotes holding commas, as --missing-codes splits; each value a number or text, as one filter's value
    is read); a list that is empty, has an empty value or a value twice is refused, naming the option and the value."""
    import csv

    column = match.group("quoted") or match.group("plain")
    op = " ".join(match.group("op").split())
    given = Option.KEEP.given(text.strip())
    raw = match.group("values") or ""
    if not raw.strip():
        raise OptionError(f"{given}: no values after '{op}'; list them separated by commas, e.g. "
                          f"'{printable(column)} {op} A, B, C'")
    try:
        cells = next(csv.reader([raw], skipinitialspace=True, strict=True), [])
    except csv.Error:
        raise OptionError(f"{given}: a double quote in the list of values is not closed; a value that holds a comma "
                          f"goes in double quotes (\"a, b\")") from None
    values: list[object] = []
    for k, cell in enumerate(cells, start=1):
        cell = cell.strip()
        if not cell:
            after = f" after '{printable(str(values[-1]))}'" if values else " at the start"
            raise OptionError(f"{given}: value {k} of the list is empty{after} (two commas in a row, or a comma at an "
                              f"end); separate the values by single commas")
        if len(cell) >= 2 and cell[0] == cell[-1] == "'":
            cell = cell[1:-1]
        parsed = None if zero_led(cell) else number(cell)
        value: object = parsed if parsed is not None else cell
        if value in values:
            raise OptionError(f"{given}: '{printable(cell)}' is listed twice; list each value once")
        values.append(value)
    return RowFilter(column, op, tuple(values), text.strip())


OPERATORS = tuple(OPERATOR_TESTS)
_FIRST_OPERATOR = re.compile(r"<=|>=|!=|==|=|<|>")


def _quoting_hint(text: str) -> str:
    """For a filter whose column name, before the operator, is several words (or holds other characters than a
    plain word's) and is not quoted: how to write it, with the name in double quotes; '' otherwise."""
    found = _FIRST_OPERATOR.search(text)
    if found is None:
        return ""
    name, rest = text[:found.start()].strip(), text[found.start():].strip()
    if not name or '"' in name or not (len(name.split()) > 1):
        return ""
    return (f"a column name with spaces is written in double quotes, e.g. "
            f"'{printable(chr(34) + name + chr(34))} {printable(rest)}'")


def _second_operator(text: str, start: int, op: str, position: int) -> str:
    """The message for an operator (from ``start``, 0-based) followed by another operator character at
    ``position``: an operator typed with a space inside ('> ='), an unknown one ('<>'), or a value that begins
    with one of those characters and needs quotes."""
    where = f"row filter '{printable(text)}'"
    next_char = text[position]
    joined = op + next_char
    spaced = text[position - 1:position].isspace()
    if spaced and joined in OPERATORS + ("==",):
        return (f"{where}: the operator at character {start + 1} has a space inside ('{text[start:position + 1]}'); "
                f"write '{joined}' without the space, or put a value that begins with '{next_char}' in quotes")
    if spaced:
        return (f"{where}: a second operator '{next_char}' at character {position + 1}; put a value that begins "
                f"with '{next_char}' in quotes; the operators are {' '.join(OPERATORS)}")
    return f"{where}: unknown operator '{joined}'; the operators are {' '.join(OPERATORS)}"


def _first_text(column: pd.Series, numeric: pd.Series) -> str:
    """Words naming the first cell of a column of numbers that is not a number ('65+' in row 4), or ''."""
    text = column.notna().to_numpy() & numeric.isna().to_numpy()
    if not text.any() or text.sum() * 2 > column.notna().sum():  # a column of text: no one cell to name
        return ""
    from cfa_tool.data.non_answers import says_no_answer

    k = int(text.argmax())
    more = int(text.sum()) - 1
    cell = str(column.iloc[k])
    # words that say no answer are read as missing in item columns only (data.readers): a filter can leave them out
    leave_out = filter_text(str(column.name), "!=", cell.strip())  # the one writer of a filter (data.filter_text)
    first = (f", or leave its rows out first with {Option.KEEP.given(leave_out)}"
             if says_no_answer(cell) and leave_out is not None else "")
    return (f" ('{printable(cell)}' in {row_naming(column).one_row(row_numbers(column)[k])}"
            + more_words(more, ", and ", "such cell")
            + f", among numbers: correct it or leave it empty in a copy of the file to compare numbers{first})")


def apply_filters(frame: pd.DataFrame, filters: list[RowFilter], source: str,
                  value_labels: dict[str, dict] | None = None, row_names: pd.Series | None = None,
                  decimal_comma: bool = False) -> tuple[pd.DataFrame, list[str], tuple[RowFilter, ...]]:
    """Keep the rows that meet every filter; notes say how many each filter left out, first those it left out for an
    empty cell (which meets no comparison, '!=' included: what it holds is unknown).  Text is compared as labels are
    read everywhere (spaces at the ends and Unicode forms ignored); a text value compared with a column of codes that
    carry value labels (SPSS, Stata) is compared with the codes' labels.  Returns the kept rows, the notes and the
    filters with the rows each left out for an empty cell (:attr:`RowFilter.empty`).  ``row_names``: the file's row
    names (a first column without a name, on ``frame``'s index), which a filter compares as the column
    data.kept_rows.ROW_NAMES_COLUMN when the file has no column of that name (new-user trial s17: the rows a caution
    named by their row names could not be filtered out without editing the file).  ``decimal_comma``: the file was
    read with decimal commas, so a filter's number written the same way ('age >= 40,5') compares a column of numbers
    as that number (new-user trial 2 of s23: it was refused, though the note said how the file's decimals were read)."""
    from dataclasses import replace

    said = []  # per filter: rows before and after it, and its note's words apart from the counts
    counted = []
    given: dict[tuple, RowFilter] = {}
    for f in filters:  # a filter given twice keeps the same rows: a slip for another filter (an option that adds nothing)
        key = (f.column, f.operator, f.value)
        if key in given:
            raise OptionError(f"row filter {quoted_filter(f)} is given twice"
                              + (f" (also as '{printable(given[key])}')" if str(given[key]) != str(f) else "")
                              + "; give it once (or give the other filter you meant)")
        given[key] = f
    for f in filters:
        by_row_names = f.column == ROW_NAMES_COLUMN and row_names is not None and f.column not in frame.columns
        if f.column not in frame.columns and not by_row_names:
            named = [str(c) for c in frame.columns] + ([ROW_NAMES_COLUMN] if row_names is not None else [])
            guess = close_names(f.column, named)
            hint = renamed_hint(frame, f.column) or (did_you_mean(f.column, guess[0]) if guess else "")
            raise OptionError(f"row filter {quoted_filter(f)}: {source} has no column '{printable(f.column)}'{hint}")
        column = row_names.reindex(frame.index).rename(f.column) if by_row_names else frame[f.column]
        labels = (value_labels or {}).get(f.column)
        f = _with_decimal_comma(f, column) if decimal_comma else f
        if f.operator in SET_OPERATORS:
            keep, f, by_label, absent, read_as = _compared_with_list(frame, f, column, labels, source)
        else:
            compared = _compared(frame, f, column, labels, source)
            keep, by_label, absent, read_as = compared.keep, compared.by_label, compared.absent, compared.read_as
            f = replace(f, shared=compared.shared, other_case=compared.cased, label=compared.named)
        before = len(frame)
        f = replace(f, empty=int(column.isna().sum()), dropped=int((~keep & column.notna()).sum()))
        counted.append(f)
        frame = frame.loc[keep.to_numpy()]
        said.append((before, len(frame), by_label, absent, read_as))
        if len(frame) == 0:
            raise DataError(f"{source}: no row is left after the row filter {quoted_filter(f)}{absent}")
    if filters:
        frame = frame.copy()
        # follows the frame through selections and groups: each filter as a message quotes it (a list cut to a few
        # values, several '!=' of one column as their one list), never every value (data.kept_rows.rows_described)
        frame.attrs[KEPT_BY] = tuple(str(f) for f, _ in merged_exclusions(counted))
    return frame, _filter_notes(counted, said), tuple(counted)


def _with_decimal_comma(f: RowFilter, column: pd.Series) -> RowFilter:
    """``f`` with its value written with a decimal comma ('40,5') read as the number, as the file's cells were, when
    ``column`` holds numbers (a column of text compares the text as written); any other filter as it is."""
    if f.operator in SET_OPERATORS or not isinstance(f.value, str) or column.dtype.kind not in "iuf" \
            or "," not in f.value or zero_led(f.value):
        return f
    read = number(f.value, decimal_comma=True)
    return f if read is None else replace(f, value=read)


def quoted_filter(f: RowFilter) -> str:
    """A filter as a message or a note quotes it: 'district = north', a list of many values cut to a few and its
    count (:meth:`RowFilter.__str__`), one value of a list as its clause and the list it is in: 'grade = 6' (of
    'grade in 6, 7, 8, ... (40 values)')."""
    within = getattr(f, "within", None)  # (a half of a halves file has none)
    return f"'{printable(str(f))}'" + (f" (of '{printable(within)}')" if within else "")


def _listed(texts: list[str]) -> str:
    """'a', 'a and b', 'a, b and c'."""
    return word_list(texts)


def _filter_notes(counted: list[RowFilter], said: list[tuple]) -> list[str]:
    """The notes of the filters ``counted`` (as applied, in order; ``said``: each one's rows before and after it and
    the words of what comparing found), one per filter, several '!=' filters on one column one note at the place of
    the first of them, as the methods paragraph merges them (:func:`merged_exclusions`)."""
    notes = []
    for f, places in merged_exclusions(counted):
        emptied = (f"left out {f.empty_words()} (an empty cell meets no comparison, '!=' included), and "
                   if f.empty else "")
        before, after = said[places[0]][0], said[places[-1]][1]
        by_label = next((said[k][2] for k in places if said[k][2]), "")
        read_as = next((said[k][4] for k in places if said[k][4]), "")
        if len(places) == 1:
            notes.append(f"row filter '{f}'{by_label} {emptied}kept {count_text(after)} of {count_text(before)} rows"
                         f"{said[places[0]][3]}{read_as}")
            continue
        left_out = sum(said[k][0] - said[k][1] for k in places)
        kept = (f"kept {count_text(after)} of {count_text(before)} rows"
                if list(places) == list(range(places[0], places[-1] + 1)) else
                f"left out {count_text(left_out)} row{'s' if left_out != 1 else ''} in all")  # other filters between them
        missing = [m.value for m, k in zip(f.members, places) if said[k][3]]
        absent = ""
        if len(missing) == 1:
            absent = said[places[[m.value for m in f.members].index(missing[0])]][3]
        elif missing:
            absent = (f"; no row has {cut_list(missing, SHOWN_VALUES, lambda v: repr(printable(_value_text(v))))}"
                      f" in '{printable(f.column)}'")
        named = (f"row filters {_listed([quoted_filter(g) for g in f.members])}"  # few: each as written
                 if len(places) <= SHOWN_VALUES else
                 f"{len(places)} row filters '{printable(f.column)} != ...', read as one: '{f}'")
        notes.append(f"{named}{by_label} {emptied}{kept}{absent}{read_as}")
    return notes


@dataclass(frozen=True)
class _Comparison:
    """What comparing a column with one filter found: the rows it keeps and the words of its note (how the values
    were compared, a value no row has, cells read as the value), the codes sharing the label compared, the labels
    differing from it in case, the label of the code compared."""
    keep: pd.Series
    by_label: str = ""
    absent: str = ""
    read_as: str = ""
    shared: tuple[tuple[str, int], ...] = ()
    cased: tuple[tuple[str, int], ...] = ()
    named: str | None = None


def _compared_with_list(frame: pd.DataFrame, f: RowFilter, column: pd.Series, labels, source: str):
    """A filter with a list of values (:data:`SET_OPERATORS`) compared value by value as '=' compares one value (so
    labels, codes, case and dates are read alike): the rows it keeps, the filter with its members, and its note's
    words.  A value no row has is said (a typing slip), not refused, unless no row is left."""
    from dataclasses import replace

    found = pd.Series(False, index=column.index)
    members, by_label, absent, missing, read_as = [], "", [], [], ""
    for value in f.value:
        one = "=" if f.operator == "in" else "!="
        clause = replace(f, operator=one, value=value, members=(), text=_clause_text(f.column, one, value),
                         within=str(f))  # the clause an error about this value quotes (_quoted)
        compared = _compared(frame, replace(clause, operator="="), column, labels, source)
        found |= compared.keep
        by_label = by_label or compared.by_label
        read_as = read_as or compared.read_as
        if compared.absent:  # (a value no row has)
            absent.append(compared.absent)
            missing.append(value)
        members.append(replace(clause, shared=compared.shared, other_case=compared.cased, label=compared.named))
    keep = found if f.operator == "in" else ~found & column.notna()
    said = ""
    if absent:
        said = absent[0] if len(absent) == 1 else (
            f"; no row has {cut_list(missing, SHOWN_VALUES, lambda v: repr(printable(_value_text(v))))}"
            f" in '{printable(f.column)}'")
    shared = tuple(pair for m in members for pair in m.shared)
    cased = tuple(pair for m in members for pair in m.other_case)
    return keep, replace(f, members=tuple(members), shared=shared, other_case=cased), by_label, said, read_as


def _compared(frame: pd.DataFrame, f: RowFilter, column: pd.Series, labels, source: str) -> _Comparison:
    """The rows of ``column`` that meet ``f`` (one value, one operator), compared as labels are read everywhere,
    with what the comparison found (:class:`_Comparison`)."""
    by_label = ""
    shared: tuple[tuple[str, int], ...] = ()
    f, as_written = _codes_as_written(f, column)
    if labels and isinstance(f.value, float):
        _refuse_label_of_other_code(f, column, labels, source)
    if labels and not isinstance(f.value, float) and f.operator in ("=", "!="):
        shared = _codes_of_label(column, labels, f.value)
        column = column.map(lambda v: labels.get(v, v) if pd.notna(v) else v)  # codes -> their labels
        by_label = f" (compared with the value labels of '{printable(f.column)}')"
    dates = None if column.dtype.kind in "iufb" else _as_dates(column)
    numeric = pd.to_numeric(column, errors="coerce") if column.dtype.kind in "iuf" else \
        column.map(lambda v: np.nan if pd.isna(v) else _number_or_nan(v))
    if dates is not None:
        values, target, by_day = _dates_compared(f, dates, None if column.dtype.kind == "M" else
                                                 _text_date_order(column))
        by_label += by_day
    elif isinstance(f.value, float) and numeric.notna().sum() == column.notna().sum():
        values, target = numeric, f.value
    else:
        numbers_only = numeric.notna().sum() == column.notna().sum()
        if f.operator not in ("=", "!=") and numbers_only and not isinstance(f.value, float):
            raise OptionError(f"row filter {quoted_filter(f)}: '{printable(str(f.value))}' is not a number, and "
                              f"{f.operator} compares numbers (write numbers with a decimal point; text is compared "
                              f"with = or !=)")
        if f.operator not in ("=", "!="):
            written = _written_date(column)
            if written is not None:
                raise OptionError(f"row filter {quoted_filter(f)}: '{printable(f.column)}' holds dates written as text "
                                  f"in another form than YYYY-MM-DD (such as '{printable(written)}'), whose order "
                                  f"of day and month the file does not say, so they cannot be compared by order; "
                                  f"in a copy of the file write them as YYYY-MM-DD, which filters compare as dates")
            odd = _not_dates(column)
            if odd is not None:  # a column of dates but for a few cells: those cells, not the column, are wrong
                position, value = odd[0]
                more = f" ({more_words(len(odd) - 1, 'and ', 'such cell')})" if len(odd) > 1 else ""
                where = cell_words(frame, f.column, int(row_numbers(frame)[position]))
                raise DataError(f"{source}, {where}: '{printable(str(value))}' in '{printable(f.column)}' is not "
                                f"a date (a day that exists, written YYYY-MM-DD), and its other cells are "
                                f"dates{more}, so row filter {quoted_filter(f)} cannot compare them by order; "
                                f"correct the cell, or leave it empty in a copy of the file")
            raise OptionError(f"row filter {quoted_filter(f)}: '{printable(f.column)}' of {source} holds text"
                              f"{_first_text(column, numeric)}, which can only be compared with = or !=")
        values = column.map(lambda v: None if pd.isna(v) else _cell_label(v))
        target = label_text(f.value)
        if target.casefold() in ("true", "false") and values.isin(("TRUE", "FALSE")).any():
            target = target.upper()  # a TRUE/FALSE cell as a spreadsheet shows it, whatever the case typed
    keep = OPERATOR_TESTS[f.operator](values, target) & column.notna()
    read_as = _written_otherwise(column, values, target) if f.operator in ("=", "!=") else ""
    # labels differing from a text compared only in case: a filter matches text exactly (data.labels' rule)
    cased = other_case(values.dropna(), target) if f.operator in ("=", "!=") and isinstance(target, str) else ()
    absent = ""
    if f.operator in ("=", "!=") and not (values == target).any():  # a value no row has: which ones are there
        absent = (f"; no row has '{printable(label_text(f.value))}' in '{printable(f.column)}' (values present: "
                  f"{_present(values, target)})" + (_zeros_hint(values, target) if as_written else
                                                     _case_hint(cased) if isinstance(target, str) else ""))
    named = None  # the label of the code compared, for the methods section's words
    if labels and isinstance(f.value, float) and f.operator in ("=", "!="):
        named = next((str(text) for code, text in labels.items()
                      if _number_or_nan(code) == f.value and str(text).strip()), None)
    return _Comparison(keep, by_label, absent, read_as, shared, cased, named)


#: a whole number written with a leading zero ('000991', '07'): in a column of text, a code written as the sheet shows it
_ZERO_LED = re.compile(r"[+-]?0\d+")


def _zeros_hint(values: pd.Series, target: str) -> str:
    """What a filter says when no row has its value in a column of codes written with leading zeros
    (:func:`_codes_as_written`): that they are compared as written, with the cells that hold the same number."""
    wanted = number(target.strip())
    same = sorted({v for v in values.dropna() if wanted is not None and number(str(v)) == wanted})
    shown = f" ({', '.join(printable(v) for v in same[:3])})" if same else ""
    return (f"; the column holds numbers written with leading zeros (ids, codes), which a filter's = and != compare "
            f"as written: write the value as the file shows it{shown}")


def _as_number(value: object) -> float | None:
    """A filter's value as a column of numbers compares it: a number as it is, a whole number written with a leading
    zero ('07', :func:`zero_led`) as the number; None for other text."""
    if isinstance(value, (int, float)) and not isinstance(value, bool):
        return value
    return number(value.strip()) if isinstance(value, str) and zero_led(value) else None


def zero_led(text: str) -> bool:
    """Whether ``text`` is a whole number written with a leading zero ('000991', '07'; not '0' or '0.5')."""
    return bool(_ZERO_LED.fullmatch(text.strip()))


def _codes_as_written(f: RowFilter, column: pd.Series) -> tuple[RowFilter, bool]:
    """``f`` as it compares with ``column``, and whether it compares text as written: a column of text that holds
    numbers written with leading zeros ('000991': ids, postcodes, as a sheet shows them) holds codes, which = and !=
    compare as written, so 'respondent_id = 991' does not match '000991' and 'respondent_id = 000991' does (new-user
    trial s21); a value written with a leading zero is a number elsewhere (an order, a column of numbers)."""
    text_column = column.dtype.kind not in "iufb"
    codes = text_column and any(isinstance(v, str) and zero_led(v) for v in column.dropna())
    if codes and f.operator in ("=", "!=") and isinstance(f.value, float):
        return replace(f, value=user_number(f.value)), True
    if isinstance(f.value, str) and zero_led(f.value) and not (codes and f.operator in ("=", "!=")):
        return replace(f, value=number(f.value.strip())), False
    return f, codes and f.operator in ("=", "!=")


def _refuse_label_of_other_code(f: RowFilter, column: pd.Series, labels: dict, source: str) -> None:
    """Refuse a row filter whose number is a value label of another code of its column (grade coded 1 to 5 with the
    labels '6' to '10', which the groups and reports show: 'grade != 6'), which a filter compares with the codes: the
    error names both readings, the code it would match and the label's code, and how to write each (hostile trial
    s15, finding 4).  Text labels ('north') are compared with the labels as before."""
    value = f.value
    others = sorted(float(code) for code, text in labels.items()
                    if isinstance(code, (int, float)) and float(code) != value and isinstance(text, str)
                    and number(text.strip()) == value)
    if not others:
        return
    code = others[0]
    name = printable(f.column)
    shown = label_text(value)

    def rows(n: int) -> str:
        return f"{n} row{'s' if n != 1 else ''}"

    held = int((column == value).sum())
    own = labels.get(value)
    as_code = f"the code {shown} ({rows(held) if held else 'no row holds it'})"
    if isinstance(own, str) and own.strip():  # its label in quotes compares labels, a number-like one too (recheck s15)
        write_code = f"to compare with the code {shown}, write its label: '{name} {f.operator} \"{printable(own)}\"'"
    elif held:
        write_code = f"the code {shown} has no label of its own to compare with: give it one in a copy of the file"
    else:
        write_code = ""
    label_rows = int((column == code).sum())
    as_label = f"the value label '{shown}' of code {label_text(code)} ({rows(label_rows)})"
    if f.operator in ("=", "!="):
        write_label = (f"to compare with the label, write its code: '{name} {f.operator} {label_text(code)}' (or the "
                       f"label in quotes: '{name} {f.operator} \"{shown}\"')")
    else:
        write_label = (f"to compare with the label, write the code it labels: '{name} {f.operator} "
                       f"{label_text(code)}', if the codes run in the order of their labels")
    raise OptionError(f"row filter {quoted_filter(f)}: in {source}, '{name}' holds codes with value labels, and "
                      f"{shown} could mean {as_code} or {as_label}, which the groups and reports show; "
                      f"{write_label}" + (f"; {write_code}" if write_code else ""))


def _codes_of_label(column: pd.Series, labels: dict, value) -> tuple[tuple[str, int], ...]:
    """The codes of ``column`` (as text) that carry the value label ``value`` (data.labels.shared_labels), each with
    its rows, when at least two codes present carry it; () otherwise."""
    codes = dict(shared_labels(labels)).get(label_text(value), [])
    counted = [(label_text(code), int((column == code).sum())) for code in codes]
    present = tuple((code, n) for code, n in counted if n)
    return present if len(present) > 1 else ()


def _present(values: pd.Series, target, shown: int = 8) -> str:
    """The different values of a column, those nearest ``target`` first (a label differing only in upper and
    lower case, then near spellings; for numbers, the closest), at most ``shown`` of them."""
    found = pd.unique(values.dropna())
    if not len(found):
        return "none: every cell is empty"
    if isinstance(target, float):
        ordered = sorted(found, key=lambda v: (abs(v - target), v))
        texts = [label_text(float(v)) for v in ordered]
    else:
        texts = sorted(str(v) for v in found)
        near = close_names(str(target), texts, n=3)
        texts = near + [t for t in texts if t not in near]
    return cut_list(texts, shown, printable)


def _case_hint(alike: tuple[tuple[str, int], ...]) -> str:
    """How a row filter matches text, said when no row has the text: exactly, upper and lower case included (unlike
    the words of an 'answers' statement, which ignore case), with the labels present that differ only in case
    (``alike``: data.labels.other_case)."""
    return ("; a row filter matches text exactly, upper and lower case included (unlike the answer words a model "
            "file codes)" + (f": write {word_list([repr(printable(a)) for a, _ in alike], 'or')} as the data have it"
                            if alike else ""))


def _written_otherwise(column: pd.Series, values: pd.Series, target) -> str:
    """'; cells written with spaces ... compared as their label: 'north' (80 rows) and 'north\\u200b' (160 rows;
    U+200B ZERO WIDTH SPACE) as 'north'': the text
    cells of ``column`` that the one rule of labels (data.labels.label_text) reads as ``target`` though written with
    spaces at their ends, invisible format characters or in another Unicode form, as the groups' notes name them;
    '' when there are none."""
    if not isinstance(target, str):
        return ""
    text = np.fromiter((isinstance(v, str) for v in column), dtype=bool, count=len(column))
    found = merged_labels(column[(values == target).to_numpy() & text])
    if not found:
        return ""
    return (f"; cells written with spaces at their ends, invisible format characters or in another Unicode form were "
            f"compared as their label: {listed_labels(found)}")


def _cell_label(value) -> str:
    """A cell as a filter compares it: TRUE/FALSE cells as spreadsheets write them, anything else as a label."""
    if isinstance(value, (bool, np.bool_)):
        return "TRUE" if value else "FALSE"
    return label_text(value)


#: a date as ISO 8601 writes it (the one form whose order of year, month and day is certain), with a time or not
_ISO_DATE = re.compile(r"\d{4}-\d{2}-\d{2}(?:[ T]\d{2}:\d{2}(?::\d{2}(?:\.\d+)?)?)?")
#: a date without a time of day, which a filter reads as the whole day
_DAY_ONLY = re.compile(r"\d{4}-\d{2}-\d{2}")
#: a date in another form (14/03/2026, 3.14.26): day and month in an order the file does not say
_OTHER_DATE = re.compile(r"\d{1,2}[/.-]\d{1,2}[/.-]\d{2,4}")
#: such a date with a four-digit year and one separator, its parts apart (the order of day and month read from the
#: column's cells: _text_date_order)
_TEXT_DATE = re.compile(r"(\d{1,2})([/.-])(\d{1,2})([/.-])\d{4}")


def _as_dates(column: pd.Series) -> pd.Series | None:
    """A column of dates as timestamps (None for any other column): dates of an SPSS or Stata file or a
    workbook (read as dates), or text written as YYYY-MM-DD in every cell."""
    present = column.dropna()
    if not len(present):
        return None
    if column.dtype.kind == "M":
        return column
    if all(isinstance(v, (datetime.date, pd.Timestamp, np.datetime64)) for v in present):
        return pd.to_datetime(column)
    if all(isinstance(v, str) and _ISO_DATE.fullmatch(v.strip()) for v in present):
        parsed = pd.to_datetime(column.map(lambda v: v.strip() if isinstance(v, str) else v), errors="coerce",
                                format="ISO8601")
        return parsed if parsed.notna().sum() == len(present) else None
    order = _text_date_order(column)
    if order is not None:
        return pd.to_datetime(column.map(lambda v: v.strip() if isinstance(v, str) else v), format=order.form)
    return None


@dataclass(frozen=True)
class _DateOrder:
    """The order of day and month of a text column of dates in another form than YYYY-MM-DD, where its cells say
    it: ``form`` (strptime's, '%d.%m.%Y'), ``words`` ('day.month.year') and ``witness``, a cell whose day is above 12,
    which no month is."""

    form: str
    words: str
    witness: str


def _text_date_order(column: pd.Series) -> _DateOrder | None:
    """The order of day and month of a text column of dates written 14.03.2026, 14/03/2026 or 03-14-2026 (one
    separator, a four-digit year), when it is not in doubt: some cell's first number is above 12 and no cell's
    second is (day first), or the other way round (month first), and every cell is a day that exists in that order;
    None otherwise (every cell's day at most 12: the file does not say which is the day)."""
    present = [v.strip() for v in column.dropna() if isinstance(v, str) and v.strip()]
    found = [_TEXT_DATE.fullmatch(v) for v in present]
    if not present or not all(found) or len({m.group(2) for m in found}) != 1 or \
            any(m.group(2) != m.group(4) for m in found):
        return None
    first = [int(m.group(1)) for m in found]
    second = [int(m.group(3)) for m in found]
    sep = found[0].group(2)
    if max(first) > 12 >= max(second):
        order = _DateOrder(f"%d{sep}%m{sep}%Y", f"day{sep}month{sep}year", present[first.index(max(first))])
    elif max(second) > 12 >= max(first):
        order = _DateOrder(f"%m{sep}%d{sep}%Y", f"month{sep}day{sep}year", present[second.index(max(second))])
    else:
        return None
    try:
        for v in present:
            datetime.datetime.strptime(v, order.form)
    except ValueError:  # a day that does not exist (31.02.2026): not read as dates
        return None
    return order


def _not_dates(column: pd.Series) -> list[tuple[int, object]] | None:
    """The cells (position, value) of a column that are not dates (nor text written YYYY-MM-DD that is a real day)
    when at least nine in ten of its present cells are: a column of dates with a few wrong cells ('unknown',
    '2024-02-30'); None otherwise."""
    present = column.notna().to_numpy()
    if not present.any():
        return None

    def is_date(value) -> bool:
        if isinstance(value, (datetime.date, pd.Timestamp, np.datetime64)):
            return True
        if isinstance(value, str) and _ISO_DATE.fullmatch(value.strip()):
            return not pd.isna(pd.to_datetime(value.strip(), errors="coerce", format="ISO8601"))
        return False

    good = np.array([is_date(v) if p else True for v, p in zip(column.tolist(), present)])
    if good.all() or (~good).sum() > 0.1 * present.sum():
        return None
    return [(int(i), column.iloc[i]) for i in np.flatnonzero(~good)]


def _date_target(f: RowFilter, order: _DateOrder | None = None) -> pd.Timestamp:
    """The date a filter of a date column compares with, written YYYY-MM-DD (with a time or not), or in the form of
    the column's own text dates when their order of day and month is known (``order``: '01.03.2026' of a column of
    day.month.year)."""
    text = str(f.value).strip() if isinstance(f.value, str) else ""
    try:
        if _ISO_DATE.fullmatch(text):
            return pd.Timestamp(text)
        if order is not None:
            return pd.Timestamp(datetime.datetime.strptime(text, order.form))
    except ValueError:
        pass
    also = f", or as its cells write them ({order.words})" if order is not None else ""
    raise OptionError(f"row filter {quoted_filter(f)}: '{printable(f.column)}' holds dates, which are compared with a "
                      f"date written as YYYY-MM-DD (such as '{f.column} >= 2026-03-01'){also}")


def _dates_compared(f: RowFilter, dates: pd.Series, order: _DateOrder | None = None
                    ) -> tuple[pd.Series, pd.Timestamp, str]:
    """The values of a date column and the date a filter compares them with, and words for its note: a date
    written without a time of day means the whole day, so every operator compares it with the day of each value
    ('visit <= 2026-04-01' keeps the visits at 08:30 on April 1, 'visit = 2026-04-01' every visit that day); the
    note says so when the column holds times of day.  A date with a time compares with the values as they are."""
    target = _date_target(f, order)
    read = (f" (the text dates of '{printable(f.column)}' read as {order.words}: '{printable(order.witness)}' has no "
            f"month above 12)" if order is not None else "")
    if order is None and not _DAY_ONLY.fullmatch(str(f.value).strip()):
        return dates, target, read
    days = dates.dt.normalize()
    timed = bool((days != dates)[dates.notna()].any())
    words = (f" (compared with the day of each value, since '{printable(f.column)}' holds times of day and the filter "
             f"gives a date without one)" if timed else "")
    return days, target, read + words


def _written_date(column: pd.Series) -> str | None:
    """The first cell of a text column of dates in another form than YYYY-MM-DD (14/03/2026), or None."""
    present = [v.strip() for v in column.dropna() if isinstance(v, str) and v.strip()]
    if present and all(_OTHER_DATE.fullmatch(v) for v in present):
        return present[0]
    return None


def _number_or_nan(value) -> float:
    if isinstance(value, (int, float, np.integer, np.floating)) and not isinstance(value, bool):
        return float(value)
    parsed = number(str(value))
    return np.nan if parsed is None else parsed
