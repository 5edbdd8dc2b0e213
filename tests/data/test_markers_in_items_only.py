"""Cells written as a marker of no answer ('NA', 'n/a') outside the model's items (a free-text comment column where a
respondent wrote 'n/a') were counted in the note 'cells written as ... were read as no answer' of every command,
though the items had no gap (new-user trial s24).  The note counts the model's item columns alone now, in a CSV file
and a workbook alike, and over the rows a row filter keeps too.  Counts checked against pandas' own reading."""
from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import cfa_tool

MODEL = "factor warm: w1, w2, w3, w4\n"


def _frame(gaps: bool) -> pd.DataFrame:
    rng = np.random.default_rng(5)
    n = 200
    f = rng.normal(size=n)
    frame = pd.DataFrame({f"w{k}": np.round(3 + 0.8 * f + rng.normal(scale=0.7, size=n), 1) for k in range(1, 5)})
    frame = frame.astype(object)
    if gaps:
        frame.loc[[2, 7, 11], "w2"] = "NA"  # row 2 north (even), 7 and 11 south
    frame["site"] = np.where(np.arange(n) % 2 == 0, "north", "south")
    frame["comment"] = ["n/a" if k % 5 == 0 else "fine, thanks" for k in range(n)]  # 40 respondents wrote 'n/a'
    return frame


def _marker_notes(result) -> list[str]:
    return [" ".join(str(w).split()) for w in result.warnings if "cells written as" in str(w)]


@pytest.mark.parametrize("suffix", [".csv", ".xlsx"])
def test_a_comment_columns_na_is_not_counted_as_gaps(tmp_path, suffix):
    path = tmp_path / f"survey{suffix}"
    frame = _frame(gaps=False)
    frame.to_csv(path, index=False) if suffix == ".csv" else frame.to_excel(path, index=False)
    assert pd.read_csv(path)["comment"].isna().sum() == 40 if suffix == ".csv" else True  # pandas reads them as gaps
    assert _marker_notes(cfa_tool.fit(MODEL, str(path))) == []


@pytest.mark.parametrize("suffix", [".csv", ".xlsx"])
def test_the_items_markers_are_counted_alone(tmp_path, suffix):
    path = tmp_path / f"survey{suffix}"
    frame = _frame(gaps=True)
    frame.to_csv(path, index=False) if suffix == ".csv" else frame.to_excel(path, index=False)
    [note] = _marker_notes(cfa_tool.fit(MODEL, str(path)))
    assert "'NA' (3 cells)" in note and "n/a" not in note
    [kept] = _marker_notes(cfa_tool.fit(MODEL, str(path), keep=["site = north"]))
    assert "'NA' (1 cell)" in kept and "n/a" not in kept


@pytest.mark.parametrize("suffix", [".csv", ".xlsx"])
def test_the_rows_of_marker_cells_are_recorded_once(tmp_path, suffix):
    """The reader records the rows of the cells written as markers once, column by column (MARKER_COLUMN_ROWS), and
    the rows of each marker over every column come from that record (rows-s25: a second record of the same cells,
    MARKER_CELLS's, could disagree with the first); the counts are pandas' own of the cells written 'NA' and 'n/a'."""
    from cfa_tool.data.readers import MARKER_CELLS, MARKER_COLUMN_ROWS, _marker_cells, read_data

    path = tmp_path / f"survey{suffix}"
    frame = _frame(gaps=True)
    frame.to_csv(path, index=False) if suffix == ".csv" else frame.to_excel(path, index=False)
    read = read_data(path).frame
    assert isinstance(read.attrs[MARKER_CELLS], str)  # the note alone: the rows are the columns' record
    by_column = read.attrs[MARKER_COLUMN_ROWS]
    assert {c: {m: len(r) for m, r in by.items()} for c, by in by_column.items()} == {"w2": {"NA": 3},
                                                                                       "comment": {"n/a": 40}}
    note, rows = _marker_cells(read)
    assert note == read.attrs[MARKER_CELLS]
    # the rows as the frame read names them: the file's row numbers less one, the header being row 1
    assert {m: sorted(r.tolist()) for m, r in rows.items()} == {
        m: sorted((frame.index[(frame[c] == m).to_numpy()] + 1).tolist()) for c, m in (("w2", "NA"), ("comment", "n/a"))}
