"""Each item's lowest and highest answer are found once per fit (data.descriptives.shared_extremes, kept by
data.moments.ItemColumns) and read by the screening for values that are not answers, the few-categories note and
the data summary's answer ranges; a reader holding another array (rows left out, a group's rows) takes its own.
The ranges are checked against pandas' own column minima and maxima (gaps skipped), computed apart from the tool."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.data import descriptives, odd_values
from cfa_tool.data.descriptives import answer_extremes, few_category_items
from cfa_tool.pipeline import continuous
from tests.conftest import THREE_FACTORS

ITEMS = [f"x{i}" for i in range(1, 10)]


@pytest.fixture
def extremes_calls(monkeypatch):
    """The arrays answer_extremes is called on during a fit, wherever the package calls it."""
    calls = []

    def counted(values, *args, **kwargs):
        calls.append(values.shape)
        return answer_extremes(values, *args, **kwargs)

    for module in (descriptives, odd_values, continuous):
        monkeypatch.setattr(module, "answer_extremes", counted)
    return calls


def _ranges_by_pandas(frame: pd.DataFrame) -> tuple:
    return tuple((float(frame[c].min()), float(frame[c].max())) for c in ITEMS)


def test_one_search_of_the_extremes_per_fit(hs_data, extremes_calls):
    result = cfa_tool.fit(THREE_FACTORS, hs_data)
    assert extremes_calls == [(301, 9)]  # the screening, the few-categories check and the summary share it
    assert result.data.ranges == _ranges_by_pandas(hs_data)


def test_full_information_rows_share_them(hs_data, extremes_calls):
    gaps = hs_data.copy()
    rng = np.random.default_rng(3)
    for column in ITEMS:
        gaps.loc[rng.random(len(gaps)) < 0.1, column] = np.nan
    gaps.loc[[4, 9], ITEMS] = np.nan  # two rows that answer nothing: left out, their (empty) cells change nothing
    result = cfa_tool.fit(THREE_FACTORS, gaps, missing="full-information")
    assert extremes_calls == [(301, 9)]
    assert result.data.ranges == _ranges_by_pandas(gaps)


def test_rows_left_out_take_their_own(hs_data, extremes_calls):
    gaps = hs_data.copy()
    gaps.loc[3, "x2"] = np.nan
    gaps.loc[7, "x5"] = hs_data["x5"].max() + 1  # the highest answer of x5 sits in a row listwise deletion leaves out
    result = cfa_tool.fit(THREE_FACTORS, gaps, missing="listwise")
    assert extremes_calls == [(301, 9), (300, 9)]
    assert result.data.ranges == _ranges_by_pandas(gaps.drop(index=3))
    assert result.data.ranges[4][1] == hs_data["x5"].max() + 1


def test_groups_take_their_own(hs_data, extremes_calls):
    result = cfa_tool.fit(THREE_FACTORS, hs_data, group="school")
    assert extremes_calls[0] == (301, 9) and sorted(extremes_calls[1:]) == [(145, 9), (156, 9)]
    for group in result.groups:
        assert group.data.ranges == _ranges_by_pandas(hs_data[hs_data["school"] == group.label])


@pytest.mark.parametrize("seed", range(40))
def test_shared_only_where_every_readers_rule_agrees(seed):
    # the screening leaves infinite values out (finite cells), the few-categories check keeps them (cells not NaN):
    # shared extremes, where made, are both readers' own
    from cfa_tool.data.descriptives import shared_extremes

    rng = np.random.default_rng(seed)
    values = rng.integers(1, 6, size=(30, 5)).astype(float)
    for special in (np.nan, np.inf, -np.inf):
        values[rng.random(values.shape) < rng.choice([0.0, 0.05])] = special
    if rng.random() < 0.2:
        values[:, rng.integers(5)] = np.nan  # an item without answers
    shared = shared_extremes(values)
    finite_rule = answer_extremes(values)
    kept_rule = answer_extremes(values, ~np.isnan(values))
    if shared is None:
        assert not all(np.isfinite(e).all() for e in kept_rule)
        return
    for rule in (finite_rule, kept_rule):
        assert [e.tolist() for e in shared.for_values(values)] == [e.tolist() for e in rule]
    assert shared.for_values(values.copy()) is None  # another array, even of the same numbers, takes its own
    names = tuple("abcde")
    assert few_category_items(values, names, shared) == few_category_items(values, names)
