"""A row filter's value written with a leading zero ('site = 07') compares with a column of numbers as the number
(data.filters._codes_as_written), and is checked as '7' is: the note on a code given with --missing-codes that a
filter column keeps advises a filter leaving its rows out only when no filter given does already (s21: '07' skipped
that check, and the note advised '--keep "site != 99"' beside 'site = 07', which leaves the 99s out).

Data: the bundled demo (a fictional transit agency's rider survey, simulated with a fixed seed) with a site column of
codes 1 to 8 and 99 ('site unknown') added here; counts by pandas."""

from __future__ import annotations

import numpy as np
import pytest

import cfa_tool
from cfa_tool.data.filters import parse_filter


@pytest.fixture()
def sites(rider_demo):
    frame = rider_demo.copy()
    frame["site"] = np.arange(len(frame)) % 8 + 1
    frame.loc[:9, "site"] = 99
    return frame


def _notes(result) -> str:
    return " ".join(str(w) for w in result.warnings)


@pytest.mark.parametrize("kept, rows", [("site = 07", "site == 7"), ("site in 07, 08", "site in (7, 8)"),
                                        ("site <= 07", "site <= 7")])
def test_a_zero_led_value_is_checked_as_the_number(rider_model, sites, kept, rows):
    said = {}
    for written in (kept, kept.replace("07", "7").replace("08", "8")):
        result = cfa_tool.fit(rider_model, sites, missing_codes=[99], keep=written)
        assert result.n_obs == len(sites.query(rows))  # pandas' count of the rows kept
        notes = _notes(result)
        assert "'site' holds 99 in 10 rows" in notes
        said[written] = "to leave those rows out" in notes
    # the filter given leaves the 99s out: no advice to leave them out, for '07' as for '7'
    assert set(said.values()) == {False}


def test_a_filter_that_keeps_the_code_is_advised_alike(rider_model, sites):
    for written in ("site != 07", "site != 7"):
        notes = _notes(cfa_tool.fit(rider_model, sites, missing_codes=[99], keep=written))
        assert "to leave those rows out, give a row filter such as keep=['site != 99']" in notes


def test_the_filter_reads_a_zero_led_value_as_a_number_where_it_compares_numbers():
    assert parse_filter("site = 07").compares_numbers() and not parse_filter("site = 07").meets(99.0)
    assert parse_filter("site in 07, 08").meets(8.0) and not parse_filter("site in 07, 08").meets(99.0)
    assert not parse_filter("site = north").compares_numbers()
