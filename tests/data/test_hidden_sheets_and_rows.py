"""Workbooks that hide a sheet or rows (hostile tester s8, cases 01 and 02).

A workbook whose first sheet is hidden (an old draft) shows its researcher the next one: that is the sheet read
without --sheet, and the reports say which sheet was analysed.  Rows hidden by a filter are analysed (the file
holds them) but named first, with the --keep filter that leaves them out.  The reference is the same data as a
plain CSV file; workbooks are written by openpyxl, a writer this project did not write; the data are the bundled
demo (a fictional transit agency's rider survey, simulated with a fixed seed)."""

from __future__ import annotations

import pandas as pd
import pytest

import cfa_tool
from cfa_tool.data.readers import read_data

openpyxl = pytest.importorskip("openpyxl")


def _put(sheet, frame: pd.DataFrame) -> None:
    sheet.append(list(frame.columns))
    for row in frame.itertuples(index=False):
        sheet.append([None if isinstance(v, float) and v != v else v for v in row])


@pytest.mark.parametrize("state", ["hidden", "veryHidden"])
def test_a_hidden_first_sheet_is_not_read_without_sheet(rider_demo, rider_model, tmp_path, state):
    book = openpyxl.Workbook()
    draft = book.active
    draft.title = "draft_old"
    draft.sheet_state = state
    _put(draft, rider_demo.iloc[:200])
    _put(book.create_sheet("answers"), rider_demo)
    path = tmp_path / "riders.xlsx"
    book.save(path)
    loaded = read_data(path)
    assert len(loaded.frame) == 480  # the visible sheet's rows, as pandas counts the demo CSV
    assert any("the sheet 'answers' was read" in n and "'draft_old' (hidden)" in n for n in loaded.notes)
    result = cfa_tool.fit(rider_model, str(path))
    assert result.n_obs == 480
    assert any("'answers' was read" in w for w in result.warnings)  # said in every view's notes
    named = read_data(path, sheet="draft_old")
    assert len(named.frame) == 200
    assert any("the workbook hides this sheet" in n for n in named.notes)


def test_rows_hidden_by_a_filter_are_analysed_and_named_first(rider_demo, rider_model, tmp_path):
    book = openpyxl.Workbook()
    sheet = book.active
    _put(sheet, rider_demo)
    sheet.auto_filter.ref = f"A1:N{len(rider_demo) + 1}"
    sheet.auto_filter.add_filter_column(1, ["north"])
    south = [k for k, v in enumerate(rider_demo.district, start=2) if v != "north"]
    for k in south:
        sheet.row_dimensions[k].hidden = True
    path = tmp_path / "riders.xlsx"
    book.save(path)
    result = cfa_tool.fit(rider_model, str(path))
    assert result.n_obs == 480
    first = result.problems[0]
    hidden = int((rider_demo.district != "north").sum())  # counted in the demo CSV by pandas
    assert f"hides {hidden} of its 480 rows of data (rows " in first.explanation
    assert "by its filter; they are kept as the file holds them, and a fit analyses them" in first.explanation
    assert "keep=[\"district == 'north'\"]" in first.advice  # as a Python call writes the option (Option.KEEP)
    kept = cfa_tool.fit(rider_model, str(path), keep="district == 'north'")  # the advice, followed
    assert kept.n_obs == 480 - hidden
    assert not any("hides" in p.explanation for p in kept.problems)
