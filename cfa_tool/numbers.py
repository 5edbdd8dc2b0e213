"""Reading numbers written as text, strictly.

Python's ``float`` and ``int`` accept more than a number as people write it: underscores
between digits ('3_3' is 33), superscript and other Unicode digits, surrounding spaces
and words such as 'infinity'.  In a data file or a model file those are typing errors,
not numbers, so every reader uses :func:`number` instead.
"""

from __future__ import annotations

import math
import re
from collections.abc import Callable, Iterable, Sequence
from decimal import Decimal
from typing import TypeVar

_NUMBER = re.compile(r"[+-]?(?:[0-9]+(?:\.[0-9]*)?|\.[0-9]+)(?:[eE][+-]?[0-9]+)?")
_WHOLE = re.compile(r"[+-]?[0-9]+")
T = TypeVar("T")


def number(text: str, decimal_comma: bool = False) -> float | None:
    """The number that ``text`` writes in plain ASCII digits (an optional sign, digits with one
    decimal point, an optional exponent), or None.  With ``decimal_comma`` a comma is the decimal
    point.  Infinite results (1e400) are returned as infinities for the caller to reject; '-0' is 0 (a fix at '-0'
    was reported as 'fixed at -0'; hostile trial s18)."""
    text = text.strip()
    if decimal_comma:
        text = text.replace(",", ".", 1) if text.count(",") == 1 and "." not in text else text
    if not _NUMBER.fullmatch(text):
        return None
    return float(text) + 0.0


def whole_number(text: str) -> int | None:
    """A whole number in plain ASCII digits, or None."""
    text = text.strip()
    return int(text) if _WHOLE.fullmatch(text) and len(text) <= 30 else None


#: the sizes a user's number is printed in plain digits within (:func:`user_number`): a float holds about 16
#: significant digits, so beyond 1e16 plain digits would print noise, and below 1e-15 a run of zeros
PLAIN_DIGITS = (1e-15, 1e16)


def user_number(value: float) -> str:
    """A number the user gave (a code of no answer, a filter's cut-off, a fixed value, an answer), printed as written:
    the shortest digits that read back as the same number, never rounded ('9999999', not the '1e+07' of Python's
    'g' format, which names another number; hostile s19) and in plain digits, whole numbers without '.0', '-0' as
    '0'; only beyond the digits a float holds (:data:`PLAIN_DIGITS`: 1e16 and up, or below 1e-15 in size) in
    Python's exact shortest form ('1e+308', not 309 digits).  The one rule for a user's number; counts and sums are
    :func:`count_text`."""
    value = float(value)
    if not math.isfinite(value):
        return str(value)
    if value == 0:
        return "0"
    if not PLAIN_DIGITS[0] <= abs(value) < PLAIN_DIGITS[1]:
        return repr(value)
    text = format(Decimal(repr(value)), "f")
    return text.rstrip("0").rstrip(".") if "." in text else text


def rounded_number(value: float, digits: int = 3, apart_from: float | None = None) -> str:
    """A number the tool computed, shown to ``digits`` significant digits in plain digits as :func:`user_number`
    prints them ('0.000031', '1230000'; Python's '.3g' gave '3.1e-05' and '1.23e+06', which a researcher reads less
    easily): discrepancies, scaling factors, variances in messages.  The one rule for a computed number of any size
    in words; values bounded by 1 and fit indices are reporting.numbers'.  ``apart_from``: a number a message sets it
    beside, which it then takes as many more significant digits as tell it from (up to 12): a variance of 1.002
    'more than the 1' reads '1.002', not '1' (s22: '.2f' wrote '1.00')."""
    value = float(value)
    if not math.isfinite(value):
        return str(value)
    if apart_from is not None:
        digits = next((d for d in range(digits, 13) if float(f"{value:.{d}g}") != apart_from), 12)
    return user_number(float(f"{value:.{digits}g}"))


def discrepancy_text(value: float) -> str:
    """A minimum discrepancy (a fit function's value, F: the nesting check's, the population's of power) in words, the
    one rule of every view: four decimals ('0.0019', '0.2000'), which tell apart the sizes that matter beside N x F
    at hundreds of rows; a positive value that four decimals would write as zero is 'below 0.0001', never '0.0000'
    (s26: compare wrote 'discrepancy 0.000058' beside 'discrepancy 0.2'); zero or below (a rounding error) '0'."""
    value = float(value)
    if not math.isfinite(value):
        return str(value)
    if value <= 0:
        return "0"
    return "below 0.0001" if value < 0.00005 else f"{value:.4f}"


def counted(count: int, noun: str, plural: str | None = None) -> str:
    """A count with its noun in the number it takes: '1 row', '2 rows', '1,204 rows' (:func:`count_text`); ``plural``
    where it is not the noun with an 's' ('1 category', '2 categories').  Messages that could say '1 rows' (the s20
    closing note) count by it."""
    return f"{count_text(count)} {noun if count == 1 else plural or noun + 's'}"


def count_text(value: float) -> str:
    """A count or a sum (rows, a sum of weights) as the tool prints N: digits grouped by thousands, to two decimals
    only where the value has a fraction ('5,000,136', '1,234.56'), never in exponent form (hostile s19: 'sum
    5.00014e+06'), and never a rounded zero for a sum that is not zero: one below 0.005 in size to its significant
    digits (:func:`rounded_number`: sampling weights summing to 5.9e-7 are 'sum 0.00000059', not 'sum 0'; s21)."""
    value = float(value)
    if not math.isfinite(value):
        return str(value)
    if float(value).is_integer():
        return f"{int(value):,}"
    if abs(value) < 0.005:
        return rounded_number(value)
    text = f"{value:,.2f}"
    return text.rstrip("0").rstrip(".")


def word_list(words: Iterable[str], conjunction: str = "and", sep: str = ", ") -> str:
    """Words joined as a sentence lists them: 'a', 'a and b', 'a, b, and c' ('a, b, or c' with ``conjunction``
    'or'; 'a; b; and c' with ``sep`` '; ' for parts that hold commas themselves): the one rule of a list in a
    sentence, for the reports, the workflows' notes and the messages alike (s23: alignment's note joined group labels
    by ', '; s26: private joins wrote 'a, b and c' in one message and 'a and b and c' in another)."""
    words = list(words)
    if len(words) <= 2:
        return f" {conjunction} ".join(words)
    return sep.join(words[:-1]) + f"{sep}{conjunction} " + words[-1]


def names_shown(total: int, most: int) -> int:
    """How many of ``total`` names (items, rows, values) a list that cuts after ``most`` of them names before 'and N
    more': every one when at most one would be left over, since 'and 1 more item' hides a name to save none (new-user
    trial s21: "'Prefer not to say' in vig3, ded2, exh1 and 1 more item" left exh4 unnamed in a methods paragraph);
    else ``most``.  The one rule of every list of names that cuts."""
    return total if total <= most + 1 else most


def more_words(left: int, lead: str = " and ", noun: str | None = None, plural: str | None = None) -> str:
    """The tail of a list that cuts: '' when nothing is left out, else ``lead`` and the count left ('and 4 more',
    '; and 12 more items' with ``noun``).  Lists whose parts are notes rather than text count what they name with
    :func:`names_shown` and end with this."""
    if left <= 0:
        return ""
    return f"{lead}{count_text(left)} more" + (f" {noun if left == 1 else plural or noun + 's'}" if noun else "")


def cut_list(items: Sequence[T], most: int, show: Callable[[T], str] = str, *, sep: str = ", ", lead: str = " and ",
             noun: str | None = None, plural: str | None = None) -> str:
    """The first of ``items`` shown by ``show`` and joined by ``sep``, then 'and N more' (:func:`more_words`) for the
    rest: at most ``most`` named, every one when only one would be left over (:func:`names_shown`).  The one way a
    message lists names, rows or values that may be many; ``show`` runs on the named ones only."""
    shown = names_shown(len(items), most)
    return sep.join(show(x) for x in items[:shown]) + more_words(len(items) - shown, lead, noun, plural)
