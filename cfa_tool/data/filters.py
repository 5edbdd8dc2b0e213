"""Row filters of the tool's own small form: COLUMN OPERATOR VALUE.

Examples: ``district = north``, ``age >= 18``, ``"wave 2" != 1``.  A filter is
parsed, never evaluated as code.  Operators: = != < <= > >= (text columns
take only = and !=).
"""

from __future__ import annotations

import re
from dataclasses import dataclass

import pandas as pd

from cfa_tool.errors import DataError, OptionError

_PATTERN = re.compile(r'^\s*(?:"(?P<quoted>[^"]+)"|(?P<plain>[^\s=!<>"]+))\s*(?P<op><=|>=|!=|==|=|<|>)\s*(?P<value>.+?)\s*$')


@dataclass(frozen=True)
class RowFilter:
    column: str
    operator: str
    value: object
    text: str

    def __str__(self) -> str:
        return self.text


def parse_filter(text: str) -> RowFilter:
    match = _PATTERN.match(text)
    if not match:
        raise OptionError(f"cannot read the row filter '{text}'; write COLUMN OPERATOR VALUE, e.g. 'district = north' or 'age >= 18'")
    column = match.group("quoted") or match.group("plain")
    op = "=" if match.group("op") == "==" else match.group("op")
    raw = match.group("value")
    if len(raw) >= 2 and raw[0] == raw[-1] and raw[0] in "\"'":
        value: object = raw[1:-1]
    else:
        try:
            value = float(raw)
        except ValueError:
            value = raw
    return RowFilter(column, op, value, text.strip())


def apply_filters(frame: pd.DataFrame, filters: list[RowFilter], source: str) -> tuple[pd.DataFrame, list[str]]:
    """Keep the rows that meet every filter; notes say how many each filter left out."""
    notes = []
    for f in filters:
        if f.column not in frame.columns:
            import difflib

            guess = difflib.get_close_matches(f.column, [str(c) for c in frame.columns], n=1)
            hint = f"; did you mean '{guess[0]}'?" if guess else ""
            raise OptionError(f"row filter '{f}': {source} has no column '{f.column}'{hint}")
        column = frame[f.column]
        numeric = pd.to_numeric(column, errors="coerce")
        if isinstance(f.value, float) and numeric.notna().sum() == column.notna().sum():
            values, target = numeric, f.value
        else:
            if f.operator not in ("=", "!="):
                raise OptionError(f"row filter '{f}': '{f.column}' holds text, which can only be compared with = or !=")
            values = column.map(lambda v: None if pd.isna(v) else _as_text(v))
            target = _as_text(f.value)
        keep = {
            "=": values == target, "!=": values != target, "<": values < target, "<=": values <= target,
            ">": values > target, ">=": values >= target,
        }[f.operator] & column.notna()
        before = len(frame)
        frame = frame.loc[keep.to_numpy()]
        notes.append(f"row filter '{f}' kept {len(frame)} of {before} rows")
        if len(frame) == 0:
            raise DataError(f"{source}: no row is left after the row filter '{f}'")
    return frame, notes


def _as_text(value) -> str:
    if isinstance(value, float) and value.is_integer():
        return str(int(value))
    return str(value)
