"""The refusal of empty categories in groups offers leaving groups out only when the row filters it gives keep two
groups to compare, counted by applying those filters (data.filters, the one filter code).  Hostile trial s25, finding
5: two groups each with an empty category of on_time (north never answered 1, south never 5) were advised
--keep "district != north" --keep "district != south", which leaves out all 480 rows.  Data: the bundled rider survey
(invented), the answers moved by construction; the rows a filter keeps are counted here with pandas."""

from __future__ import annotations

import pandas as pd
import pytest

import cfa_tool
from cfa_tool.errors import DataError
from cfa_tool.resources import resource_dir

MODEL = (resource_dir("models") / "rider_three_factors.cfa").read_text()


def survey() -> pd.DataFrame:
    return pd.read_csv(resource_dir("demo") / "rider_survey.csv")


def refusal(data: pd.DataFrame, group: str) -> str:
    with pytest.raises(DataError) as refused:
        cfa_tool.fit(MODEL, data, group=group, ordinal="all")
    return str(refused.value)


def test_no_filter_that_leaves_out_every_group_is_advised():
    data = survey()
    north = data.district == "north"
    data.loc[north & (data.on_time == 1), "on_time"] = 2
    data.loc[~north & (data.on_time == 5), "on_time"] = 4
    message = refusal(data, "district")
    assert "district != north" not in message and "district != south" not in message and "keep=" not in message
    assert "drop the item from the model" in message


def test_leaving_one_of_three_groups_out_is_advised_with_the_rows_it_leaves_out():
    data = survey()
    data["site"] = ["a", "b", "c"] * (len(data) // 3)
    data.loc[(data.site == "a") & (data.on_time == 1), "on_time"] = 2
    message = refusal(data, "site")
    rows = int((data.site == "a").sum())  # ordinal items keep rows with gaps (pairwise): every row of a is analysed
    assert f"or leave this group out with keep=['site != a'] ({rows} rows," in message


def test_leaving_two_of_three_groups_out_is_not_advised():
    data = survey()
    data["site"] = ["a", "b", "c"] * (len(data) // 3)
    data.loc[(data.site == "a") & (data.on_time == 1), "on_time"] = 2
    data.loc[(data.site == "b") & (data.clean == 5), "clean"] = 4
    message = refusal(data, "site")
    assert "leave those groups out" not in message and "keep=" not in message
