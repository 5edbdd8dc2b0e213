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
    # 07/03/2026 is the 7th of March or the 3rd of July: where no cell says which (every day at most 12), the file
    # does not say, and the message says what to do
    early = rides[[d.day <= 12 for d in rides["ride_date"]]]
    early.assign(ride_date=[d.strftime("%d/%m/%Y") for d in early["ride_date"]]).to_csv(tmp_path / "dmy.csv",
                                                                                         index=False)
    with pytest.raises(OptionError, match=r"holds dates written as text in another form than YYYY-MM-DD .*write them "
                                          r"as YYYY-MM-DD"):
        cfa_tool.check(MODEL, tmp_path / "dmy.csv", keep=["ride_date >= 2026-03-01"])


@pytest.mark.parametrize("form, value", [("%d.%m.%Y", "01.03.2026"), ("%d/%m/%Y", "2026-03-01"),
                                         ("%m/%d/%Y", "03/01/2026")])
def test_text_dates_whose_cells_say_the_order_compare_as_dates(tmp_path, rides, form, value):
    # new-user trial s26 09: 'visit >= 01.03.2026' of dates written 26.02.2026 was refused; a day above 12 (26) says
    # which number is the day, and no month is above 12, so the order is not in doubt.  Check value: the rows on or
    # after March 1 by Python's own datetime.date comparisons
    rides.assign(ride_date=[d.strftime(form) for d in rides["ride_date"]]).to_csv(tmp_path / "d.csv", index=False)
    result = cfa_tool.check(MODEL, tmp_path / "d.csv", keep=[f"ride_date >= {value}"])
    assert result.rows == _on_or_after(rides, datetime.date(2026, 3, 1))


def test_a_date_in_another_form_than_the_columns_names_both_forms(tmp_path, rides):
    rides.assign(ride_date=[d.strftime("%d.%m.%Y") for d in rides["ride_date"]]).to_csv(tmp_path / "d.csv",
                                                                                        index=False)
    with pytest.raises(OptionError, match=r"written as YYYY-MM-DD .*or as its cells write them \(day\.month\.year\)"):
        cfa_tool.check(MODEL, tmp_path / "d.csv", keep=["ride_date >= 03/01/2026"])


def test_a_date_column_of_a_workbook_is_filtered_by_date(tmp_path, rides):
    rides.assign(ride_date=pd.to_datetime(rides["ride_date"])).to_excel(tmp_path / "rides.xlsx", index=False)
    assert (cfa_tool.check(MODEL, tmp_path / "rides.xlsx", keep=["ride_date >= 2026-03-01"]).rows
            == _on_or_after(rides, datetime.date(2026, 3, 1)))


@pytest.mark.parametrize("op", ["=", "!=", "<", "<=", ">", ">="])
def test_a_date_without_a_time_means_the_whole_day_of_date_time_values(tmp_path, rides, op):
    """Hostile tester s11 case 07: visits at 08:30 on April 1 were left out by '<= 2026-04-01' (the date read as
    midnight) and '= 2026-04-01' found no row.  Check values: each operator applied to the rides' days by Python's
    own datetime.date comparisons."""
    import operator

    from cfa_tool.data.filters import apply_filters, parse_filter

    timed = rides.assign(ride_date=[f"{d.isoformat()} 08:30" for d in rides["ride_date"]])
    path = tmp_path / "timed.csv"
    timed.to_csv(path, index=False)
    days = list(rides["ride_date"])
    day = max(sorted(set(days)), key=days.count)  # a day with rides, which '<' and '<=' tell apart
    test = {"=": operator.eq, "!=": operator.ne, "<": operator.lt, "<=": operator.le, ">": operator.gt,
            ">=": operator.ge}[op]
    expected = sum(test(d, day) for d in rides["ride_date"])
    assert 0 < days.count(day) and 0 < expected < len(days)
    assert cfa_tool.check(MODEL, path, keep=[f"ride_date {op} {day}"]).rows == expected
    _, notes, _ = apply_filters(timed, [parse_filter(f"ride_date {op} {day}")], "timed.csv")
    assert "compared with the day of each value, since 'ride_date' holds times of day" in notes[0]
    # a time given is compared as it is: 08:30 on that day is not after 08:30
    later = sum(d > day for d in rides["ride_date"])
    assert cfa_tool.check(MODEL, path, keep=[f"ride_date > {day} 08:30"]).rows == later


def test_a_date_no_ride_has_is_not_said_to_be_a_matter_of_upper_and_lower_case(rides):
    """A date filter that keeps no row names the dates present, and not the advice on the case of text (which
    data.labels.other_case gives for text only; the two rules for text and labels were twins that differed here:
    the text rule was right).  The date, 2026-06-01, lies after the 90 days of rides from 2026-02-01."""
    from cfa_tool.data.filters import apply_filters, parse_filter
    from cfa_tool.errors import DataError

    assert max(rides["ride_date"]) < datetime.date(2026, 6, 1)
    with pytest.raises(DataError, match=r"no row has '2026-06-01' in 'ride_date'") as error:
        apply_filters(rides, [parse_filter("ride_date = 2026-06-01")], "rides.csv")
    assert "upper and lower case" not in str(error.value)
    kept, _, (said,) = apply_filters(rides, [parse_filter("ride_date != 2026-06-01")], "rides.csv")
    assert len(kept) == len(rides) and said.other_case == ()
