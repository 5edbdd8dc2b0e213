"""Rows of a data frame whose index repeats labels (pd.concat without ignore_index) or holds text are named by their
position, counted from 1, and called so ('position' in JSON, 'row at position' in words), never rows of a file
(hostile trial s17, finding 7).  Check values: the same rows read from the CSV file, whose rows are numbered as a
spreadsheet shows it (the column names in row 1, so file row k + 1 holds the frame's position k); the data are the
bundled demo (a fictional transit agency's rider survey)."""

from __future__ import annotations

import pandas as pd
import pytest

import cfa_tool
from cfa_tool.data.kept_rows import RowNaming
from cfa_tool.resources import resource_dir

MODEL = (resource_dir("models") / "rider_three_factors.cfa").read_text()
DEMO = resource_dir("demo") / "rider_survey.csv"


@pytest.fixture(scope="module")
def from_file():
    return [c["row"] for c in cfa_tool.fit(MODEL, DEMO).to_dict()["diagnostics"]["unusual_cases"]]


@pytest.mark.parametrize("index", ["repeated", "text"])
def test_rows_of_a_frame_without_distinct_whole_number_labels_are_named_by_position(from_file, index):
    data = pd.read_csv(DEMO)
    frame = (pd.concat([data.iloc[:240], data.iloc[240:].reset_index(drop=True)]) if index == "repeated"
             else data.set_index("rider_id", drop=False))
    result = cfa_tool.fit(MODEL, frame)
    cases = result.to_dict()["diagnostics"]["unusual_cases"]
    assert {c["row_named_by"] for c in cases} == {RowNaming.POSITION.json_word} == {"position"}
    assert [c["row"] + 1 for c in cases] == from_file  # position k is file row k + 1
    assert frame.iloc[cases[0]["row"] - 1]["rider_id"] == data.iloc[from_file[0] - 2]["rider_id"]
    assert "Position" in result.summary() and "file_row" not in str(result.to_dict())


def test_distinct_whole_number_labels_still_name_the_rows():
    data = pd.read_csv(DEMO)
    data.index = data.index + 1000
    cases = cfa_tool.fit(MODEL, data).to_dict()["diagnostics"]["unusual_cases"]
    assert {c["row_named_by"] for c in cases} == {"index_label"} and all(c["row"] >= 1000 for c in cases)
