"""The rows analysed with groups (pipeline.inputs._labelled: those with a group label, by the rule of
data.groups.group_keys) are found reading each distinct cell of the group column once, not every cell at each of
the several calls a fit makes: the same rows as the rule read cell by cell, on random columns of labels, numbers,
empty cells and cells of spaces and invisible characters alone (which have no label)."""

from __future__ import annotations

import numpy as np
import pandas as pd

from cfa_tool.data import groups, labels
from cfa_tool.data.groups import group_keys
from cfa_tool.pipeline.inputs import _labelled

CELLS = ["north", " north", "north ", "\u200bnorth", "\u200b", "   ", "", "\u00a0", "\ufeff \u200b", "south", "Süd",
         1, 2, 1.0, 2.5, np.nan, None, True, "1", "N/A"]


def test_the_rows_with_a_group_label_are_those_of_the_rule_cell_by_cell():
    rng = np.random.default_rng(40)
    for _ in range(500):
        cells = [CELLS[k] for k in rng.integers(0, len(CELLS), size=rng.integers(1, 30))]
        frame = pd.DataFrame({"site": pd.Series(cells, dtype=object), "q1": np.arange(len(cells), dtype=float)})
        if rng.random() < 0.3:  # a column of numbers alone, as a reader gives it
            frame["site"] = rng.choice([1.0, 2.0, np.nan], size=len(cells))
        expected = frame.loc[group_keys(frame["site"]).notna().to_numpy()]
        pd.testing.assert_frame_equal(_labelled(frame, "site"), expected)


def test_each_distinct_cell_is_read_once(monkeypatch):
    read = []
    label_text = labels.label_text
    for module in (groups, labels):  # the rule's one reading of a cell, wherever it is called from
        monkeypatch.setattr(module, "label_text", lambda v: read.append(v) or label_text(v))
    frame = pd.DataFrame({"site": ["north", "south", "\u200b"] * 100, "q1": np.arange(300.0)})
    assert len(_labelled(frame, "site")) == 200  # the cells of an invisible character alone have no label
    assert len(read) == 3  # before: 300, at each call
