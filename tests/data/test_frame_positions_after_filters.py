"""A data frame whose rows are named by position (RowNaming.POSITION: its index holds text, or repeats labels) has
them named by the position the caller gave them, counted from 1 (``frame.iloc[position - 1]``), also after a row
filter, a blank row left out or a split into groups took rows away: a count of the rows kept named another row
(re-check s17).

The reference for every position is pandas itself: the planted row's place found with numpy.flatnonzero and read back
with ``frame.iloc``; the data are the bundled demo (a fictional transit agency's rider survey, answers 1 to 5)."""

from __future__ import annotations

import re

import numpy as np
import pytest

import cfa_tool
from cfa_tool.resources import resource_dir

MODEL = (resource_dir("models") / "rider_three_factors.cfa").read_text()
ITEMS = ["on_time", "short_wait", "accurate_info", "easy_transfer", "seat_available", "clean", "temperature",
         "room_to_stand", "greeting", "helpful", "respectful", "clear_answers"]


@pytest.fixture(params=["text", "repeated"])
def planted(request, rider_demo):
    """The demo indexed by text or with labels repeated, 99 planted in a row of the north district after the
    40th; its position counted by numpy."""
    frame = rider_demo.copy()
    frame.index = ([f"r{k}" for k in range(len(frame))] if request.param == "text"
                   else np.arange(len(frame)) % 240)  # pd.concat of two halves without ignore_index
    k = int(np.flatnonzero(frame["district"].to_numpy() == "north")[40])
    frame.iloc[k, frame.columns.get_loc("on_time")] = 99
    assert frame.iloc[k]["on_time"] == 99  # pandas' own position k, counted from 1 as k + 1
    return frame, k + 1


def _named_position(problems) -> int:
    odd = next(p for p in problems if "99" in str(p.explanation))
    return int(re.search(r"row at position (\d+)\)", str(odd.explanation)).group(1))


def test_a_caution_names_the_callers_position_after_a_row_filter(planted):
    frame, position = planted
    assert _named_position(cfa_tool.fit(MODEL, frame).problems) == position
    kept = cfa_tool.fit(MODEL, frame, keep=["district = north"])
    assert _named_position(kept.problems) == position  # it said the position among the rows kept
    assert frame.iloc[position - 1]["on_time"] == 99


def test_case_rows_name_the_callers_positions_after_a_row_filter(rider_demo):
    frame = rider_demo.copy()
    frame.index = [f"r{k}" for k in range(len(frame))]
    north = np.flatnonzero(frame["district"].to_numpy() == "north")
    by_label = cfa_tool.fit(MODEL, frame.iloc[north].reset_index(drop=True))  # indexed 0..n-1: labels are places
    kept = cfa_tool.fit(MODEL, frame, keep=["district = north"])
    cases = kept.to_dict()["diagnostics"]["unusual_cases"]
    assert {c["row_named_by"] for c in cases} == {"position"}
    assert [c["row"] for c in cases] == [int(north[c["row"]]) + 1
                                         for c in by_label.to_dict()["diagnostics"]["unusual_cases"]]


def test_a_blank_row_left_out_shifts_no_later_position(rider_demo):
    frame = rider_demo.copy()
    frame.index = [f"r{k}" for k in range(len(frame))]
    frame = frame.astype({c: float for c in ITEMS})
    frame.iloc[2] = np.nan  # a row holding nothing, left out as a blank row
    frame.iloc[9, frame.columns.get_loc("clean")] = 99
    result = cfa_tool.fit(MODEL, frame)
    assert any(str(n).endswith("skipped (row at position 3)") for n in result.warnings)
    assert _named_position(result.problems) == 10


def test_scores_keep_the_callers_labels_and_refuse_repeated_ones(planted):
    frame, position = planted
    if frame.index.is_unique:
        scored = cfa_tool.scores(MODEL, frame, keep=["district = north"])
        assert scored.table.index.equals(frame.index)  # one line per row, under the caller's label
        assert scored.table["why_not_scored"].notna().sum() == int((frame["district"] != "north").sum())
        assert _named_position(scored.fit.problems) == position
    else:
        with pytest.raises(cfa_tool.errors.OptionError, match="index names a row twice"):
            cfa_tool.scores(MODEL, frame)
