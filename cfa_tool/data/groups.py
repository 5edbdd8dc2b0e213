"""Split a data set by a group column into per-group sample moments."""

from __future__ import annotations

import difflib

import numpy as np
import pandas as pd

from cfa_tool.data.moments import SampleMoments, sample_moments
from cfa_tool.errors import DataError, OptionError


def group_labels(frame: pd.DataFrame, column: str, source: str, reference: str | None = None) -> list[str]:
    if column not in frame.columns:
        guess = difflib.get_close_matches(column, [str(c) for c in frame.columns], n=1)
        hint = f"; did you mean '{guess[0]}'?" if guess else ""
        raise OptionError(f"{source}: there is no group column '{column}'{hint}")
    values = frame[column].dropna()
    labels = sorted({_label(v) for v in values})
    if len(labels) < 2:
        only = f" ('{labels[0]}')" if labels else ""
        raise DataError(f"{source}: the group column '{column}' has only {len(labels)} group{only}; a multi-group analysis needs at least two")
    if reference is not None:
        if reference not in labels:
            raise OptionError(f"{source}: '{reference}' is not a group of column '{column}' (groups: {', '.join(labels)})")
        labels.remove(reference)
        labels.insert(0, reference)
    return labels


def _label(value) -> str:
    if isinstance(value, float) and value.is_integer():
        return str(int(value))
    return str(value)


def split_moments(frame: pd.DataFrame, column: str, names: tuple[str, ...], source: str,
                  reference: str | None = None, missing: str = "listwise") -> tuple[list[tuple[str, SampleMoments]], int]:
    """Per-group moments (reference group first) and the number of rows without a group value."""
    labels = group_labels(frame, column, source, reference)
    keys = frame[column].map(lambda v: None if pd.isna(v) else _label(v))
    out = []
    for label in labels:
        part = frame.loc[(keys == label).to_numpy()]
        out.append((label, sample_moments(part, names, source, group=f"'{label}' of {column}", missing=missing)))
    return out, int(keys.isna().sum())


def split_ordinal_moments(frame: pd.DataFrame, column: str, names: tuple[str, ...], source: str,
                          reference: str | None = None) -> tuple[list[tuple[str, object]], int]:
    """Per-group thresholds and polychoric correlations, every group on the same categories."""
    from cfa_tool.data.polychoric import ordinal_moments, shared_levels

    labels = group_labels(frame, column, source, reference)
    keys = frame[column].map(lambda v: None if pd.isna(v) else _label(v))
    parts = [frame.loc[(keys == label).to_numpy()] for label in labels]
    levels = shared_levels(parts, names, source)
    out = [(label, ordinal_moments(part, names, source, levels=levels, where=f" (group '{label}' of {column})"))
           for label, part in zip(labels, parts)]
    return out, int(keys.isna().sum())


def pooled(moments: list[SampleMoments]) -> tuple[np.ndarray, np.ndarray]:
    """Pooled within-group covariance and grand mean (for starting values)."""
    if len(moments) == 1:
        return moments[0].covariance, moments[0].means
    n = sum(m.n_obs for m in moments)
    cov = sum(m.n_obs * m.covariance for m in moments) / n
    mean = sum(m.n_obs * m.means for m in moments) / n
    return cov, mean



