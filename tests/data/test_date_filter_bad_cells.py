"""A date filter on a column of dates with one cell that is not a date names that cell (file, row, value) and says
the other cells are dates (hostile trial s12: "'visit' holds text, which can only be compared with = or !=" sent the
researcher looking for a text column)."""

from __future__ import annotations

import datetime as dt

import pandas as pd
import pytest

import cfa_tool
from cfa_tool.errors import DataError


@pytest.mark.parametrize("suffix, bad, where", [(".csv", "2024-02-30", "row 7"), (".csv", "unknown", "row 7"),
                                                (".xlsx", "unknown", "row 7, cell O7")])
def test_the_cell_that_is_no_date_is_named(suffix, bad, where, rider_demo, rider_model, tmp_path):
    frame = rider_demo.copy()
    days = [dt.date(2024, 1, 1) + dt.timedelta(days=i) for i in range(len(frame))]
    frame["visit"] = [d.isoformat() for d in days] if suffix == ".csv" else [dt.datetime(d.year, d.month, d.day)
                                                                             for d in days]
    frame["visit"] = frame["visit"].astype(object)
    frame.loc[5, "visit"] = bad  # the sixth row of answers: line 7 of the file, row 7 of the sheet (names in row 1)
    path = tmp_path / f"visits{suffix}"
    frame.to_csv(path, index=False) if suffix == ".csv" else frame.to_excel(path, index=False)
    with pytest.raises(DataError) as caught:
        cfa_tool.fit(rider_model, path, keep="visit >= 2024-03-01")
    assert str(caught.value).startswith(f"{path}, {where}: '{bad}' in 'visit' is not a date (a day that exists, "
                                        f"written YYYY-MM-DD), and its other cells are dates")
    # with the cell corrected the filter keeps the rows from March 1 on, as counted here
    frame.loc[5, "visit"] = frame.loc[4, "visit"]
    frame.to_csv(path, index=False) if suffix == ".csv" else frame.to_excel(path, index=False)
    kept = sum(d >= dt.date(2024, 3, 1) for d in days)
    assert cfa_tool.fit(rider_model, path, keep="visit >= 2024-03-01").data.rows_read == kept
