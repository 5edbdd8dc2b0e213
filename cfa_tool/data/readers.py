"""Read a data file into a DataFrame, with plain-words errors.

Delimited text (CSV/TSV/semicolon: the delimiter is detected from the header
line, and a semicolon file is read with decimal commas, as spreadsheet
programs in many locales write them); Excel workbooks (openpyxl); SPSS and
Stata files (pyreadstat), whose user-defined missing values become missing
and whose variable and value labels are kept for reports.
"""

from __future__ import annotations

import csv
import io
from dataclasses import dataclass, field
from pathlib import Path

import pandas as pd

from cfa_tool.errors import DataError

_DELIMITERS = ",;\t|"


@dataclass(frozen=True, eq=False)
class LoadedData:
    frame: pd.DataFrame
    source: str
    variable_labels: dict[str, str] = field(default_factory=dict)
    value_labels: dict[str, dict] = field(default_factory=dict)


EXCEL_SUFFIXES = (".xlsx", ".xlsm")
SPSS_SUFFIXES = (".sav", ".zsav", ".por")
STATA_SUFFIXES = (".dta",)


def read_data(path: str | Path, sheet: str | None = None, missing_codes: tuple[float, ...] = ()) -> LoadedData:
    """Any supported file -> LoadedData; ``missing_codes`` are values that mean 'no answer'."""
    path = Path(path)
    _check_path(path)
    suffix = path.suffix.lower()
    if sheet is not None and suffix not in EXCEL_SUFFIXES:
        raise DataError(f"'{path}' is not an Excel workbook, so a sheet cannot be chosen")
    if suffix in EXCEL_SUFFIXES:
        loaded = LoadedData(_read_excel(path, sheet), str(path))
    elif suffix in SPSS_SUFFIXES + STATA_SUFFIXES:
        loaded = _read_labelled(path)
    elif suffix in (".xls",):
        raise DataError(f"'{path}' is an old-style Excel file; save it as .xlsx or CSV")
    else:
        loaded = LoadedData(read_table(path), str(path))
    if missing_codes:
        frame = loaded.frame.copy()
        for column in frame.columns:
            if pd.api.types.is_numeric_dtype(frame[column]):
                frame[column] = frame[column].where(~frame[column].isin(missing_codes))
        loaded = LoadedData(frame, loaded.source, loaded.variable_labels, loaded.value_labels)
    return loaded


def _check_path(path: Path) -> None:
    if not path.exists():
        raise DataError(f"data file '{path}' does not exist")
    if path.is_dir():
        raise DataError(f"'{path}' is a folder, not a data file")
    if path.stat().st_size == 0:
        raise DataError(f"data file '{path}' is empty")


def _read_excel(path: Path, sheet: str | None) -> pd.DataFrame:
    try:
        import openpyxl
    except ImportError:  # pragma: no cover - a declared dependency
        raise DataError("reading Excel files needs the openpyxl package") from None
    try:
        book = openpyxl.load_workbook(path, read_only=False, data_only=True)
    except Exception as exc:  # openpyxl raises many kinds for damaged files
        raise DataError(f"'{path}' cannot be read as an Excel workbook ({type(exc).__name__})") from None
    names = book.sheetnames
    if sheet is None:
        ws = book[names[0]]
    elif sheet in names:
        ws = book[sheet]
    else:
        raise DataError(f"'{path}' has no sheet '{sheet}' (sheets: {', '.join(names)})")
    merged = [str(rng) for rng in ws.merged_cells.ranges if rng.min_row == 1]
    if merged:
        raise DataError(f"{path} (sheet '{ws.title}'): the header row has merged cells ({merged[0]}); "
                        f"give every column its own name in one header row")
    rows = list(ws.iter_rows(values_only=True))
    if not rows:
        raise DataError(f"{path} (sheet '{ws.title}') is empty")
    header = [None if h is None else str(h).strip() for h in rows[0]]
    while header and header[-1] in (None, ""):
        header.pop()
    for position, name in enumerate(header, start=1):
        if not name:
            raise DataError(f"{path} (sheet '{ws.title}'): column {position} of the header row has no name")
    _check_duplicates(header, f"{path} (sheet '{ws.title}')")
    body = [list(r[: len(header)]) for r in rows[1:] if any(v is not None for v in r[: len(header)])]
    if not body:
        raise DataError(f"{path} (sheet '{ws.title}') has a header but no rows of data")
    return pd.DataFrame(body, columns=header)


def _read_labelled(path: Path) -> LoadedData:
    try:
        import pyreadstat
    except ImportError:  # pragma: no cover - a declared dependency
        raise DataError("reading SPSS and Stata files needs the pyreadstat package") from None
    suffix = path.suffix.lower()
    reader = {".sav": pyreadstat.read_sav, ".zsav": pyreadstat.read_sav, ".por": pyreadstat.read_por,
              ".dta": pyreadstat.read_dta}[suffix]
    try:
        frame, meta = reader(str(path))  # user-defined missing values are read as missing
    except Exception as exc:  # pyreadstat raises its own error types
        raise DataError(f"'{path}' cannot be read as a {'Stata' if suffix == '.dta' else 'SPSS'} file ({exc})") from None
    if frame.shape[0] == 0:
        raise DataError(f"data file '{path}' has variables but no rows of data")
    labels = {k: v for k, v in (meta.column_names_to_labels or {}).items() if v}
    values = {k: {float(code): str(text) for code, text in v.items()} for k, v in (meta.variable_value_labels or {}).items()}
    return LoadedData(frame, str(path), labels, values)


def _check_duplicates(header: list[str], where: str) -> None:
    seen: set[str] = set()
    for name in header:
        if name in seen:
            raise DataError(f"{where}: the column name '{name}' appears more than once in the header")
        seen.add(name)


def read_table(path: str | Path) -> pd.DataFrame:
    """A delimited text file as a DataFrame."""
    path = Path(path)
    _check_path(path)
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
    for position, name in enumerate(header, start=1):
        if not name:
            raise DataError(f"{path}: column {position} of the header has no name")
    _check_duplicates(header, str(path))
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
