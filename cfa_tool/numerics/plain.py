"""Plain values for files: JSON-ready numbers (what every result's ``to_dict()`` passes its numbers
through) and CSV cells that a spreadsheet will not run as formulas."""

from __future__ import annotations

import math

import numpy as np


PLAIN_TYPES = frozenset((str, int, bool, type(None)))  # JSON's own values: clean passes them as they are


def clean(value):
    """JSON-safe: NaN and infinities become None, numpy scalars become Python numbers, tuples lists.
    A list of numbers whose values are all finite is copied as it is (its numbers checked at once)."""
    kind = type(value)
    if kind is float:
        return value if math.isfinite(value) else None
    if kind in PLAIN_TYPES:
        return value
    if kind is list and value and type(value[0]) is float:
        if all(type(v) is float for v in value) and math.isfinite(sum(value)):  # a NaN or infinity makes the sum one
            return list(value)
        return [clean(v) for v in value]
    if (kind is list or kind is tuple) and all(type(v) in PLAIN_TYPES for v in value):  # names, counts: copied as they are
        return list(value)
    if kind is dict:  # plain values cleaned in place of a call per value (to_dict builds hundreds of these)
        out = {}
        for k, v in value.items():
            kind = type(v)
            if kind is float:
                out[k] = v if v - v == 0.0 else None  # not 0 (NaN) for NaN and infinities
            elif kind in PLAIN_TYPES:
                out[k] = v
            else:
                out[k] = clean(v)
        return out
    if isinstance(value, (float, np.floating)):
        value = float(value)
        return value if math.isfinite(value) else None
    if isinstance(value, np.integer):
        return int(value)
    if isinstance(value, (list, tuple)):
        return [clean(v) for v in value]
    if isinstance(value, dict):
        return {k: clean(v) for k, v in value.items()}
    return value


def clean_list(values) -> list:
    """``clean(list(values))``, copied once: a list of Python floats whose sum is finite, or of plain values (text,
    whole numbers, truth values, None), as it is; floats with a NaN or an infinity as None; anything else by clean."""
    out = list(values)
    if out and type(out[0]) is float and all(type(v) is float for v in out):
        return out if math.isfinite(sum(out)) else [v if v - v == 0.0 else None for v in out]
    if all(type(v) in PLAIN_TYPES for v in out):
        return out
    return clean(out)


def plain_array(values: np.ndarray) -> list:
    """A float array as JSON-ready (nested) lists, NaN and infinities as None: what ``clean(values.tolist())`` gives,
    checked at once instead of number by number."""
    values = np.asarray(values, dtype=float)
    finite = np.isfinite(values)
    return values.tolist() if finite.all() else np.where(finite, values, None).tolist()


# what spreadsheets run as a formula at the start of a cell, also in the full-width forms that some
# locales' spreadsheet programs accept
_FORMULA_START = ("=", "+", "-", "@", "\t", "\r", "\uff1d", "\uff0b", "\uff0d", "\uff20")


def csv_cell(value) -> str:
    """A cell for a CSV file: text that a spreadsheet would run as a formula (it starts with =, +, -,
    @, a tab or a carriage return) gets a leading single quote, the common guard; numbers stay
    numbers (-0.52 is a number, not a formula)."""
    text = str(value)
    if text.startswith(_FORMULA_START):
        try:
            float(text)
        except ValueError:
            return "'" + text
    return text


def decimals_beside(value: float, limit: float | None, digits: int = 3, most: int = 6) -> int:
    """The decimals ``value`` needs to print on the side of ``limit`` it lies on: ``digits``, or more when rounding to
    ``digits`` would print it at the limit or across it (an RMSEA of .0605 judged against a guide of .06 prints as
    .0605, not .060, which a reader would take to meet it); ``most`` at most."""
    if limit is None or not math.isfinite(value):
        return digits
    for d in range(digits, most + 1):
        shown = round(value, d)
        if (shown > limit) == (value > limit) and (shown < limit) == (value < limit):
            return d
    return most


def journal_decimal(value: float, beside: float | None = None, digits: int = 3) -> str:
    """A value below 1 as journals print indices, without the leading zero ('.931', '-.25'), to ``digits`` decimals or
    as many more as it takes to print on the side of ``beside``, a guide it is judged by (:func:`decimals_beside`);
    one that rounds to zero without a sign ('.000')."""
    text = f"{value:.{decimals_beside(value, beside, digits)}f}"
    if float(text) == 0.0:
        text = text.lstrip("-")
    return text[1:] if text.startswith("0.") else "-" + text[2:] if text.startswith("-0.") else text
