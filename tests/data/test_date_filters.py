"""Row filters compare dates (new-user trial 7, U13: a Stata date column was read as text, so a visit window
could not be kept).  The data are invented (a fictional transit agency's rider survey with the date of each
ride); the Stata file is written by pyreadstat, an independent writer of the format.  Check values: the rows
on or after the date, counted here with Python's own datetime."""

from __future__ import annotations

import datetime

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.errors import OptionError

MODEL = "factor comfort: c1..c3\n"


@pytest.fixture(scope="module")
def rides() -> pd.DataFrame:
    rng = np.random.default_rng(3107)
    eta = rng.normal(size=(240, 1))
    data = pd.DataFrame(np.round(eta * 0.8 + rng.normal(size=(240, 3)) * 0.6, 3), columns=["c1", "c2", "c3"])
    data["ride_date"] = [datetime.date(2026, 2, 1) + datetime.timedelta(days=int(d)) for d in rng.integers(0, 90, 240)]
    return data


def _on_or_after(rides: pd.DataFrame, day: datetime.date) -> int:
    return sum(d >= day for d in rides["ride_date"])


def test_a_date_column_of_a_stata_file_is_filtered_by_date(tmp_path, rides):
    import pyreadstat

    path = tmp_path / "rides.dta"
    pyreadstat.write_dta(rides.astype({"ride_date": object}), str(path))
    result = cfa_tool.check(MODEL, path, keep=["ride_date >= 2026-03-01"])
    expected = _on_or_after(rides, datetime.date(2026, 3, 1))
    assert 0 < expected < len(rides)
    assert result.rows == expected
    assert cfa_tool.check(MODEL, path, keep=["ride_date < 2026-03-01"]).rows == len(rides) - expected
    with pytest.raises(OptionError, match=r"holds dates, which are compared with a date written as YYYY-MM-DD"):
        cfa_tool.check(MODEL, path, keep=["ride_date >= 01/03/2026"])


def test_text_dates_compare_as_dates_only_when_written_year_first(tmp_path, rides):
    iso = rides.assign(ride_date=[d.isoformat() for d in rides["ride_date"]])
    iso.to_csv(tmp_path / "iso.csv", index=False)
    assert (cfa_tool.check(MODEL, tmp_path / "iso.csv", keep=["ride_date >= 2026-03-01"]).rows
            == _on_or_after(rides, datetime.date(2026, 3, 1)))
    # 07/03/2026 is the 7th of March or the 3rd of July: the file does not say, and the message says what to do
    rides.assign(ride_date=[d.strftime("%d/%m/%Y") for d in rides["ride_date"]]).to_csv(tmp_path / "dmy.csv", index=False)
    with pytest.raises(OptionError, match=r"holds dates written as text in another form than YYYY-MM-DD .*write them "
                                          r"as YYYY-MM-DD"):
        cfa_tool.check(MODEL, tmp_path / "dmy.csv", keep=["ride_date >= 2026-03-01"])


def test_a_date_column_of_a_workbook_is_filtered_by_date(tmp_path, rides):
    rides.assign(ride_date=pd.to_datetime(rides["ride_date"])).to_excel(tmp_path / "rides.xlsx", index=False)
    assert (cfa_tool.check(MODEL, tmp_path / "rides.xlsx", keep=["ride_date >= 2026-03-01"]).rows
            == _on_or_after(rides, datetime.date(2026, 3, 1)))
