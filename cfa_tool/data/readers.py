"""Read a data file into a DataFrame, with plain-words errors.

Only delimited text (CSV/TSV/semicolon) is read here; the delimiter is
detected from the header line, and a semicolon file is read with decimal
commas, as spreadsheet programs in many locales write them.
"""

from __future__ import annotations

import csv
import io
from pathlib import Path

import pandas as pd

from cfa_tool.errors import DataError

_DELIMITERS = ",;\t|"


def read_table(path: str | Path) -> pd.DataFrame:
    path = Path(path)
    if not path.exists():
        raise DataError(f"data file '{path}' does not exist")
    if path.is_dir():
        raise DataError(f"'{path}' is a folder, not a data file")
    raw = path.read_bytes()
    if not raw.strip():
        raise DataError(f"data file '{path}' is empty")
    try:
        text = raw.decode("utf-8-sig")
    except UnicodeDecodeError:
        text = raw.decode("latin-1")
    if "\x00" in text:
        raise DataError(f"data file '{path}' is not a text file (it contains NUL bytes); save it as CSV")
    first_line = text.splitlines()[0]
    delimiter = max(_DELIMITERS, key=first_line.count) if any(d in first_line for d in _DELIMITERS) else ","
    header = next(csv.reader([first_line], delimiter=delimiter))
    header = [h.strip() for h in header]
    seen: set[str] = set()
    for position, name in enumerate(header, start=1):
        if not name:
            raise DataError(f"{path}: column {position} of the header has no name")
        if name in seen:
            raise DataError(f"{path}: the column name '{name}' appears more than once in the header")
        seen.add(name)
    try:
        frame = pd.read_csv(
            io.StringIO(text),
            sep=delimiter,
            decimal="," if delimiter == ";" else ".",
            skipinitialspace=True,
            na_values=["", "NA", "N/A", "NaN", "nan", "."],
            keep_default_na=False,
        )
    except (pd.errors.ParserError, ValueError) as exc:
        detail = str(exc).strip().splitlines()[-1] if str(exc).strip() else "cannot be parsed"
        raise DataError(f"{path}: the file cannot be read as a table ({detail})") from None
    frame.columns = header
    if len(frame) == 0:
        raise DataError(f"data file '{path}' has a header but no rows of data")
    return frame
