"""The descriptives table every paper has, checked against scipy and pandas (independent implementations)."""

from __future__ import annotations

import io

import numpy as np
import pandas as pd
import pytest
from scipy import stats

import cfa_tool
from cfa_tool.reporting import tables as T
from cfa_tool.reporting.text_formats import csv_table

THREE = "factor visual: x1, x2, x3\nfactor textual: x4, x5, x6\nfactor speed: x7, x8, x9\n"
ITEMS = [f"x{i}" for i in range(1, 10)]


def _numbers(table) -> pd.DataFrame:
    return pd.read_csv(io.StringIO(csv_table(table)))


def test_item_descriptives_match_scipy_and_pandas(hs_data):
    result = cfa_tool.fit(THREE, hs_data)
    frame = _numbers(T.item_table(result)).set_index("Item")
    for item in ITEMS:
        values = hs_data[item]
        assert frame.loc[item, "N"] == len(values)
        assert frame.loc[item, "Mean"] == pytest.approx(values.mean(), abs=1e-12)
        assert frame.loc[item, "SD"] == pytest.approx(values.std(ddof=1), abs=1e-12)
        assert frame.loc[item, "Skewness"] == pytest.approx(stats.skew(values, bias=True), abs=1e-12)
        assert frame.loc[item, "Excess kurtosis"] == pytest.approx(stats.kurtosis(values, bias=True), abs=1e-12)
    correlations = T.correlation_table(result)
    r = np.corrcoef(hs_data[ITEMS].to_numpy().T)
    assert correlations.rows[8][1:9] == tuple(T.unit(r[8, j], 2) for j in range(8))  # row 9: the first item has a row
    assert correlations.title.endswith("(N = 301)")


def test_answers_counted_item_by_item_with_gaps(hs_data):
    holed = hs_data.copy()
    rng = np.random.default_rng(4)
    for item in ITEMS:
        holed.loc[rng.random(len(holed)) < 0.1, item] = np.nan
    result = cfa_tool.fit(THREE, holed)  # full-information ML keeps every row
    frame = _numbers(T.item_table(result)).set_index("Item")
    for item in ITEMS:
        answered = holed[item].dropna()
        assert frame.loc[item, "N"] == len(answered)
        assert frame.loc[item, "Skewness"] == pytest.approx(stats.skew(answered, bias=True), abs=1e-12)
