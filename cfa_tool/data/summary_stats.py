"""Summary statistics instead of raw data: a covariance or correlation matrix as
published in papers, with sample size and optional standard deviations and means.

The file (extension ``.stats``, or ``.csv`` when its first cell says what it holds) is comma-separated
text that describes itself::

    # Holzinger & Swineford (1939), 301 pupils
    covariance,x1,x2,x3          <- 'covariance' or 'correlation', then the variables
    x1,1.363
    x2,0.408,1.386
    x3,0.581,0.451,1.273
    n,301
    sd,1.17,1.18,1.13            <- optional; turns a correlation matrix into covariances
    mean,4.94,6.09,2.25          <- optional
    divisor,n                    <- optional: n-1 (default, as published) or n

The matrix rows are named by their variable, in the header's order, and hold a lower triangle or the
full matrix (empty cells after the last number are ignored).  Semicolons or tabs may separate the cells
instead of commas (then a decimal comma is read as a decimal point).  Lines starting with '#' are notes.
"""

from __future__ import annotations

import os
import re
import stat
from enum import Enum
from pathlib import Path

import numpy as np
import pandas as pd

from cfa_tool.data.moments import LARGEST_VALUE, SMALLEST_SPREAD, SampleMoments, _check_moments
from cfa_tool import options as check
from cfa_tool.errors import DataError, clipped, printable
from cfa_tool.input_files import DATA_FRAME, hidden_line_break, input_text, normalise_line_ends, text_lines, utf16_text
from cfa_tool.numbers import cut_list, number, user_number
from cfa_tool.options import MAX_OBSERVATIONS



class AnalysedMatrix(Enum):
    """Which published matrix a fit of summary statistics analysed, in the words of a methods paragraph."""

    COVARIANCE = "a covariance matrix"
    CORRELATION_WITH_SDS = "a correlation matrix and standard deviations (covariances rebuilt from them)"
    CORRELATION = "a correlation matrix without standard deviations"


class NotGiven(Enum):
    """What a summary-statistics file may leave out, so that a fit of it knows nothing of it: without means the
    item means are taken as 0, and a correlation matrix without standard deviations is fitted in standard-deviation
    units.  Raw answers cannot be scored with such a fit (the scores need the fitted sample's means and units)."""

    MEANS = "means"
    STANDARD_DEVIATIONS = "standard_deviations"

    @property
    def label(self) -> str:
        return {NotGiven.MEANS: "the items' means", NotGiven.STANDARD_DEVIATIONS: "their standard deviations"}[self]


#: the sources of a matrix given through the Python API (``covariance=``), which messages name as a file's path
FRAME_SOURCE, ARRAY_SOURCE = "<covariance data frame>", "<covariance matrix>"
#: what a correlation matrix without standard deviations makes of the figures computed from it (alpha, item-rest
#: correlations): those of the standardized items, whatever the answers' own variances (s24)
STANDARDIZED_ITEMS = "those of the standardized items, as the matrix gives correlations without standard deviations"


def given_with(source: str) -> str:
    """Where a fit of summary statistics found its matrix, its N and what it left out, in words after 'as given' or
    'gives': 'in the file', 'with the data frame' or 'with the array' (the Python API, by :data:`FRAME_SOURCE` and
    :data:`ARRAY_SOURCE`; s24: a matrix passed from Python was said to be 'as given in the file')."""
    return {FRAME_SOURCE: "with the data frame", ARRAY_SOURCE: "with the array"}.get(source, "in the file")


def source_words(source: str) -> str:
    """The source of a fit's summary statistics as the subject of a sentence: 'the file', 'the data frame', 'the
    array' (:func:`given_with`)."""
    return "the " + given_with(source).split(" ", 2)[-1] if source in (FRAME_SOURCE, ARRAY_SOURCE) else "the file"


MAX_SUMMARY_BYTES = 50_000_000
KINDS = ("covariance", "correlation")
EXTRA_ROWS = ("n", "sd", "mean", "divisor")
SUMMARY_SUFFIX = ".stats"
#: where the layout of a summary-statistics file is shown, named by messages that advise writing one (the page of the
#: reference in the repository; tests/commands/test_docs.py holds that it is there)
LAYOUT_PAGE = "docs/summary-statistics.md"
#: which files summary statistics are read from, in the words of a message about a matrix in another kind of file
SUMMARY_FORMATS = f"summary statistics are read from comma-separated .csv files and {SUMMARY_SUFFIX} files only"
#: the keyword lines of the first version of the format, recognised only to say how to write the file now
OLD_KEYS = ("variables", "observations", "matrix", "sd", "means", "divisor", "values")
NEW_FORM = ("write it as comma-separated lines: 'covariance,x1,x2,...' (or 'correlation,...'), one line per "
            "variable starting with its name and holding its row of the matrix, then 'n,301' and, if you have them, "
            "'sd,...', 'mean,...' and 'divisor,n'")


def _numbers(cells: list[str], where: str) -> list[float]:
    out = []
    for token in cells:
        token = token.strip()
        value = number(token)
        if value is None:
            raise DataError(f"{where}: '{printable(token)}' is not a number")
        if not np.isfinite(value):
            raise DataError(f"{where}: '{printable(token)}' is not a finite number")
        out.append(value)
    return out


def _text(path: Path) -> str:
    return input_text(path, "summary-statistics file", DataError, MAX_SUMMARY_BYTES)


def _split(line: str, delimiter: str) -> list[str]:
    cells = [c.strip() for c in line.split(delimiter)]
    while cells and not cells[-1]:  # empty cells after the last value (a lower triangle written by a spreadsheet)
        cells.pop()
    return cells


def holds_summary(path: str | Path) -> bool:
    """Whether a .csv file is a summary-statistics file (its first cell is 'covariance' or 'correlation').
    Only a regular file is looked into: a named pipe or a device is read once, by the data reader."""
    try:
        if not stat.S_ISREG(os.stat(path).st_mode):
            return False
        with open(path, "rb") as handle:
            raw = handle.read(4096)
    except OSError:
        return False
    head = utf16_text(raw[: len(raw) - len(raw) % 2]) or raw.decode("utf-8-sig", errors="replace")
    for line in text_lines(normalise_line_ends(head)):
        if line.strip() and not line.lstrip().startswith("#"):
            if line.partition(":")[0].strip().lower() in OLD_KEYS and ":" in line:
                return True  # the keyword form of earlier versions: read, to say how it is written now
            first = re.split(r"[,;\t]", line, maxsplit=1)[0].strip().strip('"').lower()
            return first in KINDS
    return False


def read_summary_file(path: str | Path) -> tuple[SampleMoments, list[str]]:
    """Parse a summary-statistics file into moments (divisor N) and notes for the report."""
    path = Path(path)
    lines = text_lines(normalise_line_ends(_text(path)))
    hidden = hidden_line_break(lines)
    if hidden is not None:
        raise DataError(f"{path}:{hidden.line}:{hidden.column}: {hidden.message()}")
    content = [(k, line) for k, line in enumerate(lines, start=1) if line.strip() and not line.lstrip().startswith("#")]
    if not content:
        raise DataError(f"{path}: the file is empty; {NEW_FORM}")
    first_line, header_text = content[0]
    key = header_text.partition(":")[0].strip().lower()
    if ":" in header_text and key in OLD_KEYS:
        raise DataError(f"{path}:{first_line}: this is the earlier keyword form of a summary-statistics file; {NEW_FORM}")
    delimiter = "," if "," in header_text else (";" if ";" in header_text else "\t")
    header = [c.strip('"') for c in _split(header_text, delimiter)]
    kind = header[0].lower() if header else ""
    if kind not in KINDS:
        raise DataError(f"{path}:{first_line}: the first cell must say what the matrix holds ('covariance' or "
                        f"'correlation'), not '{printable(header[0] if header else '')}'; {NEW_FORM}")
    names = header[1:]
    if not names or any(not n for n in names):
        raise DataError(f"{path}:{first_line}: the first line must name every variable after '{kind}'")
    if len(set(names)) != len(names):
        dup = next(n for n in names if names.count(n) > 1)
        raise DataError(f"{path}:{first_line}: the variable '{printable(dup)}' is named twice")
    taken = [n for n in names if n.lower() in EXTRA_ROWS]
    if taken:
        raise DataError(f"{path}:{first_line}: a variable is named '{printable(taken[0])}', which is also the label of "
                        f"a row after the matrix ({', '.join(EXTRA_ROWS)}); rename it, in this file and in the model")
    p = len(names)
    rows: list[tuple[list[float], int]] = []
    extra: dict[str, tuple[list[str], int]] = {}
    for number_, line in content[1:]:
        cells = _split(line, delimiter)
        label = cells[0].strip('"') if cells else ""
        where = f"{path}:{number_}"
        if label.lower() in EXTRA_ROWS:
            if label.lower() in extra:
                raise DataError(f"{where}: the '{label.lower()}' row is given twice (first on line "
                                f"{extra[label.lower()][1]})")
            extra[label.lower()] = (cells[1:], number_)
            continue
        if extra and label not in names:
            meant = label.lower().rstrip("s")
            raise DataError(f"{where}: unknown row '{printable(label)}' (after the matrix come only the rows "
                            f"{', '.join(EXTRA_ROWS)})" + (f"; write '{meant}'" if meant in EXTRA_ROWS else ""))
        if extra:
            raise DataError(f"{where}: matrix rows come before the n, sd, mean and divisor rows")
        if len(rows) >= p:
            raise DataError(f"{where}: '{printable(label)}' is not a variable of the header nor one of "
                            f"{', '.join(EXTRA_ROWS)}; the matrix has {p} rows")
        if label != names[len(rows)]:
            raise DataError(f"{where}: row {len(rows) + 1} of the matrix is named '{printable(label)}'; the rows must "
                            f"follow the header's order ('{printable(names[len(rows)])}' here)")
        if delimiter != ",":  # a decimal comma goes with semicolons and tabs
            cells = [c.replace(",", ".") for c in cells]
        _check_empty_cells(cells[1:], names, len(rows), where)
        rows.append((_numbers(cells[1:], where), number_))
    if "n" not in extra:
        raise DataError(f"{path}: the file has no 'n' row (the number of observations), e.g. 'n,301'")
    n_cells, n_line = extra["n"]
    n_text = n_cells[0] if n_cells else ""
    # a whole number, also as a spreadsheet writes it ('301.0'), as the Python API's n_obs=301.0 (hostile s24)
    value = number(n_text.strip()) if len(n_cells) == 1 else None
    if (value is None or not np.isfinite(value) or not float(value).is_integer() or not 1 <= value <= MAX_OBSERVATIONS
            or len(n_text) > 16):
        shown = clipped(",".join(n_cells), 20)
        raise DataError(f"{path}:{n_line}: the number of observations must be one whole number from 1 to "
                        f"{MAX_OBSERVATIONS:,}, not '{shown}'")
    n_obs = int(value)
    divisor = "n-1"
    if "divisor" in extra:
        cells, line = extra["divisor"]
        divisor = (cells[0] if len(cells) == 1 else ",".join(cells)).lower().replace(" ", "")
        if divisor not in ("n-1", "n"):
            raise DataError(f"{path}:{line}: divisor must be 'n-1' or 'n', not '{printable(divisor)}'")

    def vector(name: str) -> np.ndarray | None:
        if name not in extra:
            return None
        cells, line = extra[name]
        if delimiter != ",":
            cells = [c.replace(",", ".") for c in cells]
        return np.array(_numbers(cells, f"{path}:{line}"))

    if "sd" in extra and kind != "correlation":
        raise DataError(f"{path}:{extra['sd'][1]}: an 'sd' row turns a correlation matrix into covariances, but the "
                        f"first cell (line {first_line}) declares a covariance matrix; if the matrix holds "
                        f"correlations, write 'correlation' there, and otherwise remove the 'sd' row")
    matrix = _assemble(rows, p, str(path))
    return summary_moments(names, matrix, n_obs, kind, vector("sd"), vector("mean"), divisor, str(path),
                           tuple(line for _, line in rows), extra["sd"][1] if "sd" in extra else None)


def _check_empty_cells(cells: list[str], names: list[str], row: int, where: str) -> None:
    """An empty cell in a matrix row is an error naming its column; empty cells before the diagonal, with numbers
    from it on, are an upper triangle, said so (row ``row``, 0-based)."""
    empty = [k for k, c in enumerate(cells) if not c.strip()]
    if not empty:
        return
    if row > 0 and empty == list(range(row)) and len(cells) == len(names):
        columns = (f"column '{printable(names[0])}'" if row == 1 else
                   f"columns '{printable(names[0])}' to '{printable(names[row - 1])}'")
        raise DataError(f"{where}: row {row + 1} of the matrix leaves its cells before the diagonal empty ({columns}): "
                        f"the matrix looks like an upper "
                        f"triangle, which is not read; write the lower triangle (row k holds k numbers, ending with "
                        f"the diagonal) or the full matrix")
    k = empty[0]
    column = f"column '{printable(names[k])}'" if k < len(names) else f"cell {k + 1}"
    raise DataError(f"{where}: the cell of {column} in row {row + 1} of the matrix is empty; every cell of a row "
                    f"up to its last number needs a number")


def _assemble(rows: list[tuple[list[float], int]], p: int, source: str) -> np.ndarray:
    if len(rows) != p:
        raise DataError(f"{source}: the matrix has {len(rows)} rows for {p} variables")
    full = all(len(r) == p for r, _ in rows)
    if p > 1 and [len(r) for r, _ in rows] == list(range(p, 0, -1)):
        raise DataError(f"{source}:{rows[0][1]}: the matrix is an upper triangle (row 1 has {p} numbers, the last row "
                        f"1), which is not read; write the lower triangle (row k holds k numbers, ending with the "
                        f"diagonal) or the full matrix")
    out = np.zeros((p, p))
    for i, (values, line) in enumerate(rows):
        if full:
            out[i] = values
        elif len(values) == i + 1:
            out[i, : i + 1] = values
            out[: i + 1, i] = values
        else:
            raise DataError(f"{source}:{line}: row {i + 1} of the matrix has {len(values)} numbers; "
                            f"a lower triangle needs {i + 1} in this row and a full matrix {p}")
    if full and not np.allclose(out, out.T, rtol=1e-6, atol=1e-8):
        i, j = np.argwhere(~np.isclose(out, out.T, rtol=1e-6, atol=1e-8))[0]
        raise DataError(f"{source}: the full matrix is not symmetric (row {i + 1}, column {j + 1})")
    return out


def _number_array(values, source: str, what: str) -> np.ndarray:
    try:
        array = np.asarray(values, dtype=float)
    except (TypeError, ValueError, OverflowError):
        raise DataError(f"{source}: {what} must hold numbers only") from None
    return array


def by_variable(values, names: list[str], what: str):
    """``values`` (standard deviations or means given beside a matrix) in the order of the matrix's ``names``: a
    pandas Series with labels other than its default 0, 1, ... or a mapping is read by its labels, which must be
    the matrix's variables, each once (a Series sorted or built from another source is otherwise read in the wrong
    order without a sign: hostile tester s24); a plain list or array is read by position, as given."""
    if isinstance(values, pd.Series) and not isinstance(values.index, pd.RangeIndex):
        labels = [str(k) for k in values.index]
        read = values.to_numpy()
    elif isinstance(values, dict):
        labels = [str(k) for k in values]
        read = list(values.values())
    else:
        return values
    doubled = sorted({k for k in labels if labels.count(k) > 1})
    unknown = [k for k in labels if k not in names]
    missing = [k for k in names if k not in labels]
    if doubled or unknown or missing:
        quoted = lambda k: f"'{printable(k)}'"  # noqa: E731
        found = "; ".join(part for part in (
            f"{cut_list(doubled, 5, quoted)} twice" if doubled else "",
            f"{cut_list(unknown, 5, quoted)}, not {'a variable' if len(unknown) == 1 else 'variables'} of the matrix"
            if unknown else "",
            f"none for {cut_list(missing, 5, quoted)}" if missing else "") if part)
        raise DataError(f"{what} are labelled by variable, and their labels do not match the matrix's variables "
                        f"({found}); label each of the matrix's variables once, or give a plain list in the matrix's "
                        f"order")
    place = {k: i for i, k in enumerate(labels)}
    return [read[place[k]] for k in names]


def summary_moments(names: list[str], matrix: np.ndarray, n_obs: int, kind: str = "covariance",
                    sds: np.ndarray | None = None, means: np.ndarray | None = None, divisor: str = "n-1",
                    source: str = "<summary statistics>", row_lines: tuple[int, ...] | None = None,
                    sd_line: int | None = None) -> tuple[SampleMoments, list[str]]:
    """Moments (divisor N) from a published matrix; notes say what was assumed.  ``row_lines`` and ``sd_line``: the
    lines of a file's matrix rows and of its sd row, for messages that name them."""
    p = len(names)
    matrix = _number_array(matrix, source, "the matrix")
    if matrix.ndim != 2 or matrix.shape != (p, p):
        shape = " x ".join(str(k) for k in matrix.shape) or "a single number"
        raise DataError(f"{source}: the matrix is {shape} but {p} variables are named")
    if not np.all(np.isfinite(matrix)):
        raise DataError(f"{source}: the matrix holds a missing or infinite value")
    if np.abs(matrix).max() > LARGEST_VALUE:
        raise DataError(f"{source}: the matrix holds {user_number(matrix.flat[np.argmax(np.abs(matrix))])}, too large to compute with; rescale the "
                        f"variables (the fit does not change)")
    if not np.allclose(matrix, matrix.T, rtol=1e-6, atol=1e-8 * max(1.0, float(np.abs(matrix).max()))):
        i, j = np.argwhere(~np.isclose(matrix, matrix.T, rtol=1e-6, atol=1e-8 * max(1.0, float(np.abs(matrix).max()))))[0]
        raise DataError(f"{source}: the matrix is not symmetric (row {i + 1}, column {j + 1} differs from row {j + 1}, "
                        f"column {i + 1})")
    if np.any(np.diag(matrix) <= 0):
        j = int(np.flatnonzero(np.diag(matrix) <= 0)[0])
        raise DataError(f"{source}: the variance of '{printable(names[j])}' on the diagonal is {user_number(matrix[j, j])}; "
                        f"variances must be positive")
    n_obs = check.observations(n_obs)
    if sds is not None and kind != "correlation":
        raise DataError(f"{source}: standard deviations turn a correlation matrix into covariances, and this matrix is "
                        f"declared a covariance matrix; if it holds correlations, declare it so (matrix='correlation')")
    if sds is not None:
        sds = _number_array(sds, source, "the standard deviations").ravel()
        if len(sds) == p and not np.all(np.isfinite(sds) & (sds > 0)):
            j = int(np.flatnonzero(~(np.isfinite(sds) & (sds > 0)))[0])
            where = f"{source}:{sd_line}" if sd_line is not None else source
            raise DataError(f"{where}: the standard deviation of '{printable(names[j])}' is {user_number(sds[j])}; standard "
                            f"deviations must be positive")
        if len(sds) != p:
            raise DataError(f"{source}: give {p} positive standard deviations, one per variable ({len(sds)} given)")
    if means is not None:
        means = _number_array(means, source, "the means").ravel()
        if len(means) != p or not np.all(np.isfinite(means)):
            raise DataError(f"{source}: give {p} finite means, one per variable ({len(means)} given)")
        if np.abs(means).max() > LARGEST_VALUE:
            raise DataError(f"{source}: a mean of {user_number(means[np.argmax(np.abs(means))])} is too large to compute with; rescale the "
                            f"variables (the fit does not change)")
    if sds is not None and (sds.max() > LARGEST_VALUE ** 0.5 or sds.min() < SMALLEST_SPREAD):
        raise DataError(f"{source}: standard deviations from {user_number(sds.min())} to {user_number(sds.max())} cannot be computed with; "
                        f"rescale the variables (the fit does not change)")
    if n_obs <= p:
        raise DataError(f"{source}: {n_obs} observations for {p} variables; the analysis needs more observations than variables")
    notes = []
    if kind == "correlation":
        beyond = np.argwhere(np.tril(np.abs(matrix) > 1.0 + 1e-9, -1))
        if len(beyond):
            i, j = beyond[0]
            where = f"{source}:{row_lines[i]}" if row_lines is not None else f"{source} (row {i + 1} of the matrix)"
            raise DataError(f"{where}: the correlation of '{printable(names[i])}' and '{printable(names[j])}' is "
                            f"{user_number(matrix[i, j])}, beyond +/-1; check it for a typing error")
        if not np.allclose(np.diag(matrix), 1.0, atol=1e-6):
            j = int(np.flatnonzero(~np.isclose(np.diag(matrix), 1.0, rtol=0.0, atol=1e-6))[0])
            where = f"{source}:{row_lines[j]}" if row_lines is not None else f"{source} (row {j + 1} of the matrix)"
            raise DataError(f"{where}: the diagonal cell of '{printable(names[j])}' is {user_number(matrix[j, j])}; a correlation "
                            f"matrix needs ones on its diagonal (check it for a typing error, or declare the matrix a "
                            f"covariance matrix if it holds variances)")
        if sds is not None:
            matrix = matrix * np.outer(sds, sds)
        else:
            notes.append("a correlation matrix without standard deviations was fitted as if it were a covariance matrix: "
                         "unstandardized estimates are in standard-deviation units and their standard errors are only "
                         "approximate (Cudeck 1989); the standardized solution and the fit are unaffected")
    if divisor == "n-1":
        matrix = matrix * (n_obs - 1) / n_obs
    mean = np.zeros(p) if means is None else np.asarray(means, dtype=float)
    _check_moments(matrix, mean, tuple(names), source)
    if np.linalg.eigvalsh(matrix)[0] <= 0:
        raise DataError(f"{source}: the matrix is not positive definite")
    not_given = ((NotGiven.MEANS,) if means is None else ()) + (
        (NotGiven.STANDARD_DEVIATIONS,) if kind == "correlation" and sds is None else ())
    analysed = (AnalysedMatrix.COVARIANCE if kind != "correlation" else AnalysedMatrix.CORRELATION_WITH_SDS
                if sds is not None else AnalysedMatrix.CORRELATION)
    return SampleMoments(tuple(names), matrix, mean, int(n_obs), int(n_obs), 0, source, not_given=not_given,
                         analysed=analysed), notes


def pasted_matrix(frame: pd.DataFrame, row_names: pd.Series | None, items, source: str) -> None:
    """Raw data that are a correlation or covariance matrix pasted as printed in a paper or saved by a program (an
    empty first cell, rows named as the item columns; in that square block ones on the diagonal, or a symmetric block
    with positive variances on its diagonal, each covariance within the bound the two variances set; rows of means
    and standard deviations may follow): an error saying how to give it as summary statistics, rather than a fit of
    its rows as answers.  ``row_names``: the file's row-name column (readers.LoadedData.row_names) or None, when the
    first column of ``frame`` that is not an item names the rows, or, for a data frame given from Python, its index
    when that holds names rather than whole numbers (DataFrame.cov() and .corr() name their rows so)."""
    if len(frame) > len(items) + 10:  # more rows than a matrix and its few rows after it: rows of answers (every fit
        return  # reads its data through here: this keeps the check off the default call's time, issue 20)
    items = [str(x) for x in items]
    if len(items) < 2 or any(x not in frame.columns for x in items):
        return
    corner = "empty"
    frame_given = source == DATA_FRAME
    from_python = frame_given and row_names is None and len(frame) and not pd.api.types.is_integer_dtype(frame.index)
    if from_python:
        row_names = pd.Series([str(x) for x in frame.index])
    elif row_names is None:
        others = [c for c in frame.columns if str(c) not in items]
        if not others:
            _unnamed_matrix(frame, items, source)
            return
        row_names, corner = frame[others[0]], f"'{printable(str(others[0]))}'"
    names = [str(x).strip() for x in row_names.iloc[:len(items) + 10].tolist()]  # a pasted matrix starts the file
    where = {}
    for position, name in enumerate(names):
        where.setdefault(name, position)
    if any(x not in where for x in items):
        _unnamed_matrix(frame, items, source)
        return
    block = frame[items].iloc[[where[x] for x in items]].apply(pd.to_numeric, errors="coerce").to_numpy(dtype=float)
    kind = _matrix_kind(block)
    if kind is None:
        return
    span = f"('{printable(items[0])}' to '{printable(items[-1])}')"
    shown = ("with 1 on the diagonal" if kind == "correlation" else
             "symmetric, with positive variances on the diagonal")
    if frame_given:
        raise DataError(f"the data frame looks like a {kind} matrix, not rows of answers: its rows are named as its "
                        f"columns {span}, {shown}; to fit it as summary statistics give it as {_api_advice(kind)}, "
                        f"not as the data (or pass the rows of answers themselves as the data)")
    columns = {str(c) for c in frame.columns}
    others = [n for n in names if n not in columns and n]  # rows after the matrix (a variable's row is no such row)
    rename = (f"; after the matrix come only rows named {', '.join(EXTRA_ROWS)} (here "
              f"{', '.join(repr(printable(n)) for n in others[:4])})" if others else "")
    if corner == f"'{kind}'":  # laid out as summary statistics, in a file of another format
        raise DataError(f"{source} holds a {kind} matrix laid out as summary statistics ('{kind}' in its first "
                        f"cell, its rows named as its columns {span}), but {SUMMARY_FORMATS}; save the sheet as a "
                        f"comma-separated .csv file and give that file")
    raise DataError(f"{source} looks like a {kind} matrix, not rows of answers: its rows are named as its columns "
                    f"{span}, {shown}; to fit it as "
                    f"summary statistics write '{kind}' in its first cell (now {corner}) and add a row 'n' with "
                    f"the number of observations after the matrix{rename} (the reference page on summary "
                    f"statistics, {LAYOUT_PAGE}, shows the layout)")


def _unnamed_matrix(frame: pd.DataFrame, items: list[str], source: str) -> None:
    """A covariance or correlation matrix saved without its row names (pandas' ``cov().to_csv(index=False)``, R's
    ``write.csv(cov(x), row.names = FALSE)``, a data frame of the matrix's values): as many rows as columns, every
    cell a number, the block symmetric with ones or positive variances on its diagonal.  An error saying how to give
    it as summary statistics (:func:`pasted_matrix`'s advice), rather than a fit of its rows as answers."""
    if len(frame) != frame.shape[1] or any(x not in frame.columns for x in items):
        return
    block = frame.apply(pd.to_numeric, errors="coerce").to_numpy(dtype=float)
    if not np.isfinite(block).all() or not np.allclose(block, block.T, rtol=1e-6, atol=1e-12):
        return
    kind = _matrix_kind(block)
    if kind is None:
        return
    columns = [str(c) for c in frame.columns]
    span = f"('{printable(columns[0])}' to '{printable(columns[-1])}')"
    shown = ("symmetric, with 1 on the diagonal" if kind == "correlation" else
             "symmetric, with positive variances on the diagonal")
    if source == DATA_FRAME:
        raise DataError(f"the data frame looks like a {kind} matrix, not rows of answers: as many rows as columns "
                        f"{span}, {shown}; to fit it as summary statistics give it as {_api_advice(kind)}, not as "
                        f"the data (or pass the rows of answers themselves as the data)")
    raise DataError(f"{source} looks like a {kind} matrix saved without its row names, not rows of answers: as many "
                    f"rows as columns {span}, {shown}; to fit it as summary statistics add a first column that names "
                    f"each row as its column, with '{kind}' in its first cell, and a row 'n' with the number of "
                    f"observations after the matrix (the reference page on summary statistics, {LAYOUT_PAGE}, "
                    f"shows the layout)")


def _api_advice(kind: str) -> str:
    """How to give a matrix from Python (:func:`pasted_matrix`)."""
    return ("covariance=<the matrix>, n_obs=<the number of observations>" if kind == "covariance" else
            "covariance=<the matrix>, matrix='correlation', n_obs=<the number of observations> and, if you have "
            "them, sds=<the standard deviations>")


def _matrix_kind(block: np.ndarray) -> str | None:
    """'correlation' for a square block with ones on its diagonal, 'covariance' for one whose lower triangle is filled
    with positive variances on its diagonal, its upper triangle empty or the mirror of the lower one, and each
    covariance no larger than the product of the two standard deviations (Cauchy-Schwarz); None otherwise."""
    diagonal = np.diag(block)
    if np.allclose(diagonal, 1.0, atol=1e-9, rtol=0.0):
        return "correlation"
    lower = block[np.tril_indices_from(block)]
    if not np.isfinite(lower).all() or not (diagonal > 0).all():
        return None
    upper = block.T[np.tril_indices_from(block, -1)]  # the mirror cells of the lower triangle
    mirrored = block[np.tril_indices_from(block, -1)]
    if not (np.isnan(upper).all() or np.allclose(upper, mirrored, rtol=1e-6, atol=1e-12)):
        return None
    bound = np.sqrt(np.outer(diagonal, diagonal))
    return "covariance" if (np.abs(np.tril(block, -1)) <= bound * (1 + 1e-9)).all() else None


#: text files of other delimiters, whose rows the data reader reads as answers
OTHER_TEXT_SUFFIXES = (".tsv", ".tab", ".txt")


def summary_in_other_text(path: str | Path) -> None:
    """A tab-separated (or .txt) file whose first cell is 'covariance' or 'correlation', as a summary-statistics
    file's is: an error saying that summary statistics are read from .csv and .stats files (hostile trial s13, H10:
    the data reader refused it for its ragged lower triangle, 'line 2 has 2 fields but the header has 13')."""
    suffix = Path(path).suffix.lower()
    if suffix in OTHER_TEXT_SUFFIXES and holds_summary(path):
        raise DataError(f"{path} starts as a summary-statistics file does (its first cell names a matrix), but "
                        f"{SUMMARY_FORMATS}; save it comma-separated with the extension .csv (or {SUMMARY_SUFFIX}) "
                        f"and give that file")
