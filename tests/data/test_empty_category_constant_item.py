"""An ordinal item answered alike by a whole group (every south rider answered 'clean' 3): its other categories are
empty there, and recoding them into the one category every group gave would leave the item constant in every group.
Hostile tester s15 (04): the refusal advised exactly that.  The advice now says why merging cannot help and keeps
dropping the item (leaving the group out would leave one group: hostile s25).  Data: the bundled rider survey (invented)."""

from __future__ import annotations

import pandas as pd
import pytest

import cfa_tool
from cfa_tool.errors import DataError
from cfa_tool.resources import resource_dir

MODEL = (resource_dir("models") / "rider_three_factors.cfa").read_text()


def test_no_recoding_advice_for_an_item_one_group_answered_alike():
    data = pd.read_csv(resource_dir("demo") / "rider_survey.csv")
    data.loc[data.district == "south", "clean"] = 3
    with pytest.raises(DataError) as raised:
        cfa_tool.fit(MODEL, data, group="district", ordinal="all")
    message = str(raised.value)
    assert "recode" not in message
    assert ("'clean' has at most one answer that every group gave, so merging its categories would leave it with one "
            "answer everywhere") in message
    # leaving south out would leave north alone, with nothing to compare: not advised (hostile s25, finding 5)
    assert "drop the item from the model" in message and "leave this group out" not in message
