"""Summary statistics instead of raw data: a covariance or correlation matrix as
published in papers, with sample size and optional standard deviations and means.

The file format (extension ``.stats``) is the tool's own, line by line::

    # Holzinger & Swineford (1939), 301 pupils
    variables: x1 x2 x3 x4 x5 x6 x7 x8 x9
    observations: 301
    matrix: covariance          # or: correlation
    sd: 1.17 1.18 ...           # optional; turns a correlation matrix into covariances
    means: 4.94 6.09 ...        # optional
    divisor: n-1                # optional: n-1 (default, as published) or n
    values:
    1.363
    0.408 1.386
    ...

After ``values:`` come the rows of the matrix: a lower triangle (row i holds i
numbers) or the full matrix.  Names and numbers are separated by spaces or
commas.
"""

from __future__ import annotations

import re
from pathlib import Path

import numpy as np

from cfa_tool.data.moments import LARGEST_VALUE, SMALLEST_SPREAD, SampleMoments, _check_moments
from cfa_tool import options as check
from cfa_tool.errors import DataError, printable
from cfa_tool.input_files import input_bytes, normalise_line_ends, text_lines, utf16_text
from cfa_tool.numbers import number, whole_number
from cfa_tool.options import MAX_OBSERVATIONS

MAX_SUMMARY_BYTES = 50_000_000
KEYS = ("variables", "observations", "matrix", "sd", "means", "divisor", "values")
SUMMARY_SUFFIX = ".stats"


def _numbers(text: str, where: str) -> list[float]:
    out = []
    for token in re.split(r"[\s,]+", text.strip()):
        if not token:
            continue
        value = number(token)
        if value is None:
            raise DataError(f"{where}: '{printable(token)}' is not a number")
        if not np.isfinite(value):
            raise DataError(f"{where}: '{token}' is not a finite number")
        out.append(value)
    return out


def read_summary_file(path: str | Path) -> tuple[SampleMoments, list[str]]:
    """Parse a ``.stats`` file into moments (divisor N) and notes for the report."""
    path = Path(path)
    raw = input_bytes(path, "summary-statistics file", DataError, MAX_SUMMARY_BYTES)
    text = utf16_text(raw)
    if text is None:
        try:
            text = raw.decode("utf-8-sig")
        except UnicodeDecodeError:
            raise DataError(f"summary-statistics file '{path}' is not UTF-8 text") from None
    if "\x00" in text:
        raise DataError(f"summary-statistics file '{path}' is not a text file (it contains NUL bytes)")
    lines = text_lines(normalise_line_ends(text))
    fields: dict[str, tuple[str, int]] = {}
    rows: list[tuple[list[float], int]] = []
    in_values = False
    for number, raw in enumerate(lines, start=1):
        line = raw.split("#", 1)[0].strip()
        if not line:
            continue
        where = f"{path}:{number}"
        if in_values:
            rows.append((_numbers(line, where), number))
            continue
        key, sep, rest = line.partition(":")
        key = key.strip().lower()
        if not sep or key not in KEYS:
            raise DataError(f"{where}: expected one of {', '.join(k + ':' for k in KEYS)} at the start of the line")
        if key in fields:
            raise DataError(f"{where}: '{key}:' is given twice (first on line {fields[key][1]})")
        fields[key] = (rest.strip(), number)
        if key == "values":
            in_values = True
            if rest.strip():
                rows.append((_numbers(rest, where), number))
    for key in ("variables", "observations", "matrix", "values"):
        if key not in fields:
            raise DataError(f"{path}: the file has no '{key}:' line")
    names = [t for t in re.split(r"[\s,]+", fields["variables"][0]) if t]
    if not names:
        raise DataError(f"{path}:{fields['variables'][1]}: the 'variables:' line names no variables")
    if len(set(names)) != len(names):
        dup = next(n for n in names if names.count(n) > 1)
        raise DataError(f"{path}:{fields['variables'][1]}: the variable '{dup}' is named twice")
    n_text, n_line = fields["observations"]
    if whole_number(n_text) is None or whole_number(n_text) < 1 or len(n_text) > 13:
        shown = printable(n_text if len(n_text) <= 20 else n_text[:17] + "...")
        raise DataError(f"{path}:{n_line}: the number of observations must be a whole number from 1 to "
                        f"{MAX_OBSERVATIONS:,}, not '{shown}'")
    n_obs = int(n_text)
    kind, kind_line = fields["matrix"]
    kind = kind.lower()
    if kind not in ("covariance", "correlation"):
        raise DataError(f"{path}:{kind_line}: matrix must be 'covariance' or 'correlation', not '{kind}'")
    divisor = fields.get("divisor", ("n-1", 0))[0].lower().replace(" ", "")
    if divisor not in ("n-1", "n"):
        raise DataError(f"{path}:{fields['divisor'][1]}: divisor must be 'n-1' or 'n', not '{divisor}'")
    p = len(names)
    matrix = _assemble(rows, p, str(path))
    sds = np.array(_numbers(fields["sd"][0], f"{path}:{fields['sd'][1]}")) if "sd" in fields else None
    means = np.array(_numbers(fields["means"][0], f"{path}:{fields['means'][1]}")) if "means" in fields else None
    moments, notes = summary_moments(names, matrix, n_obs, kind, sds, means, divisor, str(path))
    return moments, notes


def _assemble(rows: list[tuple[list[float], int]], p: int, source: str) -> np.ndarray:
    if len(rows) != p:
        raise DataError(f"{source}: the matrix has {len(rows)} rows for {p} variables")
    full = all(len(r) == p for r, _ in rows)
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


def summary_moments(names: list[str], matrix: np.ndarray, n_obs: int, kind: str = "covariance",
                    sds: np.ndarray | None = None, means: np.ndarray | None = None, divisor: str = "n-1",
                    source: str = "<summary statistics>") -> tuple[SampleMoments, list[str]]:
    """Moments (divisor N) from a published matrix; notes say what was assumed."""
    p = len(names)
    matrix = _number_array(matrix, source, "the matrix")
    if matrix.ndim != 2 or matrix.shape != (p, p):
        shape = " x ".join(str(k) for k in matrix.shape) or "a single number"
        raise DataError(f"{source}: the matrix is {shape} but {p} variables are named")
    if not np.all(np.isfinite(matrix)):
        raise DataError(f"{source}: the matrix holds a missing or infinite value")
    if np.abs(matrix).max() > LARGEST_VALUE:
        raise DataError(f"{source}: the matrix holds {np.abs(matrix).max():.3g}, too large to compute with; rescale the "
                        f"variables (the fit does not change)")
    if not np.allclose(matrix, matrix.T, rtol=1e-6, atol=1e-8 * max(1.0, float(np.abs(matrix).max()))):
        i, j = np.argwhere(~np.isclose(matrix, matrix.T, rtol=1e-6, atol=1e-8 * max(1.0, float(np.abs(matrix).max()))))[0]
        raise DataError(f"{source}: the matrix is not symmetric (row {i + 1}, column {j + 1} differs from row {j + 1}, "
                        f"column {i + 1})")
    if np.any(np.diag(matrix) <= 0):
        j = int(np.flatnonzero(np.diag(matrix) <= 0)[0])
        raise DataError(f"{source}: the variance of '{printable(names[j])}' on the diagonal is {matrix[j, j]:g}; "
                        f"variances must be positive")
    n_obs = check.observations(n_obs)
    if sds is not None and kind != "correlation":
        raise DataError(f"{source}: standard deviations turn a correlation matrix into covariances, and this matrix is "
                        f"declared a covariance matrix; if it holds correlations, declare it so (matrix: correlation)")
    if sds is not None:
        sds = _number_array(sds, source, "the standard deviations").ravel()
        if len(sds) != p or not np.all(np.isfinite(sds)) or np.any(sds <= 0):
            raise DataError(f"{source}: give {p} positive standard deviations, one per variable "
                            f"({len(sds)} given{', not all positive' if len(sds) == p else ''})")
    if means is not None:
        means = _number_array(means, source, "the means").ravel()
        if len(means) != p or not np.all(np.isfinite(means)):
            raise DataError(f"{source}: give {p} finite means, one per variable ({len(means)} given)")
        if np.abs(means).max() > LARGEST_VALUE:
            raise DataError(f"{source}: a mean of {np.abs(means).max():.3g} is too large to compute with; rescale the "
                            f"variables (the fit does not change)")
    if sds is not None and (sds.max() > LARGEST_VALUE ** 0.5 or sds.min() < SMALLEST_SPREAD):
        raise DataError(f"{source}: standard deviations from {sds.min():.3g} to {sds.max():.3g} cannot be computed with; "
                        f"rescale the variables (the fit does not change)")
    if n_obs <= p:
        raise DataError(f"{source}: {n_obs} observations for {p} variables; the analysis needs more observations than variables")
    notes = []
    if kind == "correlation":
        if not np.allclose(np.diag(matrix), 1.0, atol=1e-6):
            raise DataError(f"{source}: a correlation matrix needs ones on its diagonal")
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
    return SampleMoments(tuple(names), matrix, mean, int(n_obs), int(n_obs), 0, source), notes
