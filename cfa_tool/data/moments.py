"""Model variables of a data frame -> sample moments, with every data problem named.

The covariance matrix uses divisor N (the maximum-likelihood estimate), as in
normal-theory ML fitting (Bollen 1989, ch. 4).
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np
import pandas as pd

from cfa_tool.errors import DataError


@dataclass(frozen=True)
class SampleMoments:
    names: tuple[str, ...]
    covariance: np.ndarray
    means: np.ndarray
    n_obs: int
    rows_read: int
    rows_dropped: int
    source: str
    group: str | None = None  # 'label of column' for one group of a multi-group data set
    rows: np.ndarray | None = field(default=None, repr=False, compare=False)  # the complete rows analysed


def numeric_columns(frame: pd.DataFrame, names: tuple[str, ...], source: str) -> np.ndarray:
    """The named columns as a float array; non-numeric entries are an error naming the cell."""
    columns = []
    for name in names:
        column = frame[name]
        numeric = pd.to_numeric(column, errors="coerce")
        bad = numeric.isna() & column.notna()
        if bad.any():
            row = int(np.flatnonzero(bad.to_numpy())[0])
            raise DataError(
                f"{source}: column '{name}' is used as an indicator but holds text ('{column.iloc[row]}' in data row {row + 1}); "
                f"indicators must be numbers"
            )
        columns.append(numeric.to_numpy(dtype=float))
    return np.column_stack(columns) if columns else np.zeros((len(frame), 0))


def sample_moments(frame: pd.DataFrame, names: tuple[str, ...], source: str, group: str | None = None) -> SampleMoments:
    """Listwise-complete moments of the model variables."""
    file_source = source
    if group is not None:
        source = f"{source} (group {group})"
    values = numeric_columns(frame, names, source)
    infinite = np.isinf(values)
    if infinite.any():
        row, col = np.argwhere(infinite)[0]
        raise DataError(f"{source}: column '{names[col]}' has an infinite value in data row {row + 1}")
    complete = ~np.isnan(values).any(axis=1)
    data = values[complete]
    n, p = data.shape
    if n == 0:
        raise DataError(f"{source}: no row has answers on all {p} model variables, so nothing is left to analyse")
    if n <= p:
        raise DataError(
            f"{source}: {n} complete rows for {p} variables; the covariance matrix needs more rows than variables "
            f"(and a factor analysis far more)"
        )
    means = data.mean(axis=0)
    centred = data - means
    cov = centred.T @ centred / n
    sds = np.sqrt(np.diag(cov))
    for j, sd in enumerate(sds):
        if sd <= 1e-12 * max(1.0, abs(means[j])):
            raise DataError(f"{source}: column '{names[j]}' has the same value ({means[j]:g}) in every row used, so it carries no information")
    corr = cov / np.outer(sds, sds)
    vals, vecs = np.linalg.eigh(corr)
    if vals[0] < 1e-10:
        weights = np.abs(vecs[:, 0])
        involved = [names[j] for j in np.argsort(-weights) if weights[j] > 0.1]
        raise DataError(
            f"{source}: the covariance matrix is singular: the columns {', '.join(repr(v) for v in involved)} are exact linear "
            f"combinations of each other (for example one is the sum of others); drop one of them"
        )
    return SampleMoments(tuple(names), cov, means, n, len(frame), int((~complete).sum()), file_source, group, data)
