"""Plain values for files: JSON-ready numbers (what every result's ``to_dict()`` passes its numbers
through) and CSV cells that a spreadsheet will not run as formulas."""

from __future__ import annotations

import math

import numpy as np


def clean(value):
    """JSON-safe: NaN and infinities become None, numpy scalars become Python numbers, tuples lists."""
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
