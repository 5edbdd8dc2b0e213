"""A word typed among a column's numbers in several cells: explore's refusal said 'correct the cell' of one cell
while it meant three (s26); the one message (data.moments.stray_word_message) counts the other cells and says the
plural where it means them.  The counts are the cells this test writes."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.errors import DataError


def _frame(cells: int) -> pd.DataFrame:
    rng = np.random.default_rng(2)
    frame = pd.DataFrame(rng.integers(1, 6, size=(60, 4)), columns=["q1", "q2", "q3", "q4"]).astype(object)
    for row in (3, 7, 9)[:cells]:
        frame.loc[row, "q2"] = "x"
    return frame


def test_several_cells_are_named_as_several():
    with pytest.raises(DataError) as refused:
        cfa_tool.explore(_frame(3), items=["q1", "q2", "q3", "q4"])
    said = str(refused.value)
    assert "and in 2 other cells" in said and "correct those cells" in said and "correct the cell" not in said


def test_one_cell_is_named_as_one():
    with pytest.raises(DataError) as refused:
        cfa_tool.explore(_frame(1), items=["q1", "q2", "q3", "q4"])
    said = str(refused.value)
    assert "correct the cell" in said and "other cell" not in said
