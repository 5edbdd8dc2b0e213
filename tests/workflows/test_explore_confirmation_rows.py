"""The draft model fitted on explore's confirmation half names its rows as explore read them: a file's rows by their
numbers in the file (they were named 'index label' one less, rows of no data frame), a data frame's by its index labels
or positions (re-check s17, a neighbour of rows named by position after a filter).

The reference is the split itself: every case row the confirmation fit names is one of the confirmation half's rows
(data.moments.row_numbers of the rows read), and the file's row k + 1 holds the frame's position k (the column names
in row 1, as pandas reads the CSV file).  The data are the bundled demo (a fictional transit agency's rider survey)."""

from __future__ import annotations

import pandas as pd
import pytest

import cfa_tool
from cfa_tool.resources import resource_dir

DEMO = resource_dir("demo") / "rider_survey.csv"


def _cases(result):
    return result.split.confirmation.to_dict()["diagnostics"]["unusual_cases"]


def test_a_files_confirmation_half_names_the_files_rows():
    result = cfa_tool.explore(str(DEMO), split=3)
    cases = _cases(result)
    assert cases and {c["row_named_by"] for c in cases} == {"file_row"}
    assert {c["row"] for c in cases} <= set(result.split.confirmation_rows)


@pytest.mark.parametrize("index", ["text", "from 100"])
def test_a_frames_confirmation_half_names_its_rows_as_the_frame_does(index):
    data = pd.read_csv(DEMO)
    frame = data.set_axis([f"r{k}" for k in range(len(data))] if index == "text" else data.index + 100)
    by_file = {c["row"] for c in _cases(cfa_tool.explore(str(DEMO), split=3))}
    result = cfa_tool.explore(frame, split=3)
    cases = _cases(result)
    assert {c["row"] for c in cases} <= set(result.split.confirmation_rows)
    if index == "text":  # position k is the file's row k + 1
        assert {c["row_named_by"] for c in cases} == {"position"} and {c["row"] + 1 for c in cases} == by_file
    else:  # label L is the file's row L - 100 + 2
        assert {c["row_named_by"] for c in cases} == {"index_label"} and {c["row"] - 98 for c in cases} == by_file
