"""The one writer of a row filter's text (--keep, keep=...) that advice gives for the user to copy: a column and a
value written so that data.filters.parse_filter reads them back as the same column and value (s20: the groups'
advice quoted a column by a plain-name rule of its own beside the parser's, and other advice wrote a column with
spaces bare, which no filter reads).  The parser's rules, which these follow: a column is a plain name (no space,
no '=', '!', '<', '>' or double quote) or in double quotes (holding no double quote); a value is read as a number
when it is one, and in single or double quotes as the text inside them."""

from __future__ import annotations

import numbers
import re

from cfa_tool.errors import printable
from cfa_tool.numbers import number, user_number

#: the operators of a filter with a list of values (a value equal to one of them, to none): declared here, by the one
#: writer of a filter's text, and read by the parser (data.filters)
SET_OPERATORS = ("in", "not in")
#: a column a filter writes bare: the parser's plain name (data.filters._PATTERN)
PLAIN_COLUMN = re.compile(r'[^\s=!<>"]+')
#: a text value a filter writes bare: no space, quote or operator character, and not read as a number
_PLAIN_VALUE = re.compile(r'[^\s=!<>"\']+')


def filter_column(column: str) -> str | None:
    """``column`` as a filter writes it: bare when a plain name, else in double quotes; None when it holds a double
    quote (no filter can name it) or a character that cannot be printed (a message would not show it as it is)."""
    if not isinstance(column, str) or not column or printable(column) != column:
        return None
    if PLAIN_COLUMN.fullmatch(column):
        return column
    return None if '"' in column else f'"{column}"'


def filter_value(value) -> str | None:
    """A value as a filter's comparison writes it: a number as the tool writes numbers; a text bare when nothing in
    it needs quotes, else in double quotes, or in single quotes when it holds a double quote (text that reads as a
    number, '6' the label of a code, in quotes too, so that it is compared as text); None when it holds both quotes
    or cannot be printed."""
    if isinstance(value, numbers.Real) and not isinstance(value, bool):
        return user_number(float(value))
    text = str(value)
    if not text or printable(text) != text:
        return None
    if _PLAIN_VALUE.fullmatch(text) and number(text) is None:
        return text
    for quote in ('"', "'"):
        if quote not in text:
            return f"{quote}{text}{quote}"
    return None


def filter_text(column: str, operator: str, value) -> str | None:
    """One comparison, 'district != north', 'gender != "another / prefers to describe"', '"wave 2" < 3', or for the
    list operators ('in', 'not in') a list of values, 'submitted not in "2026-03-01 11:00", "2026-03-01 11:05"',
    written so that it parses back to ``column``, ``operator`` and ``value``; None when it cannot be
    (:func:`filter_column`, :func:`filter_value`)."""
    values = list(value) if operator in SET_OPERATORS else [value]
    name, written = filter_column(column), [filter_value(v) for v in values]
    if name is None or not written or any(w is None for w in written):
        return None
    return f"{name} {operator} {', '.join(written)}"
