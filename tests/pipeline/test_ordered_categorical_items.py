"""An item given as a pandas ordered categorical of numbers whose declared order is not its numbers' order (categories
[5, 4, 3, 2, 1], ordered: 5 the lowest answer) was read as the plain numbers, its order silently ignored (hostile trial
s26, 04), while a group column's categorical order is honoured and an ordered categorical of words is refused.  It is
refused in the one reading of data frames (pipeline.inputs.load_data), naming the column and how to recode it, for
every command; an ordered categorical whose order is its numbers', an unordered one, and a group column keep working."""

import pandas as pd
import pytest

import cfa_tool
from cfa_tool.errors import DataError

MODEL = "factor c: seat_available, clean, temperature, room_to_stand\n"


def _reversed(frame: pd.DataFrame, column: str) -> pd.DataFrame:
    out = frame.copy()
    out[column] = pd.Categorical(out[column], categories=[5, 4, 3, 2, 1], ordered=True)
    return out


@pytest.mark.parametrize("call", [
    lambda d: cfa_tool.fit(MODEL, d),
    lambda d: cfa_tool.fit(MODEL + "ordinal seat_available, clean, temperature, room_to_stand\n", d),
    lambda d: cfa_tool.check(MODEL, d),
    lambda d: cfa_tool.compare([MODEL, MODEL + "covary clean, temperature\n"], d),
    lambda d: cfa_tool.scores(MODEL, d),
    lambda d: cfa_tool.fit(MODEL.replace("clean", "tidy"), d, rename={"clean": "tidy"}),
    lambda d: cfa_tool.explore(d, items=["seat_available", "clean", "temperature", "room_to_stand"], seed=1),
], ids=["fit", "fit ordinal", "check", "compare", "scores", "explore items named", "fit renamed"])
def test_an_item_ordered_against_its_numbers_is_refused(rider_demo, call):
    with pytest.raises(DataError) as caught:
        call(_reversed(rider_demo, "clean"))
    message = str(caught.value)  # a renamed column by the frame's own name, which the recoding changes
    assert "column 'clean' is an ordered categorical whose declared order (5, 4, 3, 2, 1, lowest first)" in message
    assert "frame['clean'].map({5: 1, 4: 2, 3: 3, 2: 4, 1: 5}).astype(float)" in message
    assert ".astype(float)" in message


def test_an_order_that_is_the_numbers_order_and_an_unordered_one_are_read_as_the_numbers(rider_demo):
    plain = cfa_tool.fit(MODEL, rider_demo).estimates_frame()["estimate"].to_numpy()
    for categories, ordered in (([1, 2, 3, 4, 5], True), ([5, 4, 3, 2, 1], False)):
        d = rider_demo.copy()
        d["clean"] = pd.Categorical(d["clean"], categories=categories, ordered=ordered)
        same = cfa_tool.fit(MODEL, d).estimates_frame()["estimate"].to_numpy()
        assert same == pytest.approx(plain, abs=1e-9)  # the same numbers: the same estimates


def test_a_column_the_model_does_not_read_as_an_item_is_not_refused(rider_demo):
    d = _reversed(rider_demo, "on_time")  # not an item of MODEL
    cfa_tool.check(MODEL, d)
