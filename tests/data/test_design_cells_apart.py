"""Clusters and strata are told apart as groups are (data.groups.group_keys: each distinct cell read once as cells
alike by type and text, data.labels.distinct_cells): in a data frame's column of Python objects True and 1 are two
clusters, named as the frame holds them, not one cluster named 'True' (a mapping keyed by the cells merged them, as
Python's hash takes True == 1); and a group column's empty cells are no group wherever the keys are read (group_keys
gives pandas' missing value, never None: a scored file's empty group cells were counted as '0 rows in groups the fit
does not have').

The data are the bundled demo (a fictional transit agency's rider survey); the check values are counts of distinct
(type, value) pairs made here in Python and the rows pandas counts."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.assessment.admissibility import ProblemKind
from cfa_tool.data.groups import group_keys
from cfa_tool.resources import resource_dir

MODEL = (resource_dir("models") / "rider_three_factors.cfa").read_text()
POOL = [True, 1, False, 0, "a", "b", 2, 3.0]  # 1 == True and 0 == False to a hash table


@pytest.fixture()
def stops(rider_demo):
    frame = rider_demo.copy()
    frame["stop"] = pd.Series([POOL[k % len(POOL)] for k in range(len(frame))], dtype=object, index=frame.index)
    return frame


def test_true_and_one_are_two_clusters(stops):
    distinct = len({(type(v), v) for v in POOL})
    assert distinct == 8  # counted here: True and 1, False and 0 apart
    design = cfa_tool.fit(MODEL, stops, cluster="stop").to_dict()["design"]
    assert design["clusters"] == distinct


def test_clusters_true_and_one_in_two_strata_are_nested(stops):
    frame = stops.assign(area=np.where(stops["stop"].map(lambda v: isinstance(v, bool)), "east", "west"))
    assert frame.groupby("area")["stop"].apply(lambda s: {(type(v), v) for v in s}).map(len).tolist() == [2, 6]
    design = cfa_tool.fit(MODEL, frame, cluster="stop", strata="area").to_dict()["design"]  # each cluster in one stratum
    assert (design["clusters"], design["strata"]) == (8, 2)


def test_group_keys_give_pandas_missing_value_never_none():
    keys = group_keys(pd.Series(["north", None, "\u200b", "south"], dtype=object))
    assert keys.isna().tolist() == [False, True, True, False]
    assert not any(k is None for k in keys.tolist())  # one contract: callers test pd.isna


def test_empty_group_cells_of_a_scored_file_are_no_group_the_fit_lacks(rider_demo):
    fitted = cfa_tool.fit(MODEL, rider_demo, group="district")
    frame = rider_demo.copy()
    frame.loc[frame.index[:3], "district"] = None
    assert int(frame["district"].isna().sum()) == 3  # counted by pandas
    scored = fitted.scores(frame)
    assert not any(p.kind is ProblemKind.UNKNOWN_GROUPS_SCORED for p in scored.fit.problems)
    assert scored.table["why_not_scored"].iloc[:3].eq("no group").all()
