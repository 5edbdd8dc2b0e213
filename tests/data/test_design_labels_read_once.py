"""check_design reads the labels of each design column once (data.labels.group_keys, the one reading of group,
cluster and strata cells) and reaches the verdicts it reached reading them at every check (s20: the cluster, strata
and group columns were read up to four times each).  Check values: the clusters and groups the test writes."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import cfa_tool.data.labels as labels
from cfa_tool.data.sample_design import DesignColumns, check_design
from cfa_tool.errors import DataError


def _frame() -> pd.DataFrame:
    """240 invented rows: 12 schools (clusters) in 3 regions (strata), each school in one of two groups."""
    rng = np.random.default_rng(11)
    school = np.repeat([f"S{k:02d}" for k in range(12)], 20)
    return pd.DataFrame({"school": school, "region": np.repeat(["east", "west", "north"], 80),
                         "sector": np.repeat(["public", "private"] * 6, 20),
                         "x1": rng.normal(size=240), "x2": rng.normal(size=240)})


def test_each_design_column_is_read_once(monkeypatch):
    calls: list[str] = []
    reading = labels.group_keys

    def counted(cells):
        calls.append(str(cells.name))
        return reading(cells)

    monkeypatch.setattr(labels, "group_keys", counted)
    frame, _ = check_design(_frame(), DesignColumns(None, "school", "region"), ("x1", "x2"), "sector", "data")
    assert len(frame) == 240
    assert sorted(calls) == ["region", "school", "sector"]


def test_the_checks_reach_the_same_verdicts():
    frame = _frame()
    mixed = frame.assign(region=np.where(np.arange(240) == 5, "west", frame["region"]))  # S00 in two regions
    with pytest.raises(DataError, match="cluster 'S00' of column 'school' lies in more than one stratum"):
        check_design(mixed, DesignColumns(None, "school", "region"), ("x1", "x2"), None, "data")
    lone = frame.assign(sector=np.where(frame["school"] == "S00", "tiny", frame["sector"]))  # a group of one school
    with pytest.raises(DataError, match="group 'tiny' of 'sector' has a single cluster"):
        check_design(lone, DesignColumns(None, "school", None), ("x1", "x2"), "sector", "data")
    one = frame.assign(school="S00")
    with pytest.raises(DataError, match="names a single cluster"):
        check_design(one, DesignColumns(None, "school", None), ("x1", "x2"), None, "data")
