"""The one writer of a row filter's text that advice gives for the user to copy (data.filter_text): what it writes
parses back (data.filters.parse_filter) to the same column, operator and value, and keeps the rows the advice
means; the groups' advice (data.groups.leaving_out) and the list filter of ids (data.filters.list_filter) write
through it (s20: the groups' advice had a plain-name rule of its own, wrote a label '6' bare so that it was read as
the number 6, and other advice wrote a column with spaces bare, which no filter reads).  Check values: the rows
pandas itself selects (Series.__ne__, Series.isin) on invented data."""

from __future__ import annotations

import pandas as pd
import pytest

from cfa_tool.data.filter_text import filter_column, filter_text, filter_value
from cfa_tool.data.filters import apply_filters, list_filter, parse_filter
from cfa_tool.data.groups import leaving_out

COLUMNS = ["district", "rider's zone", "zone=inner", "wave 2", "it's", " padded ", "in", "a<b", "'quoted'"]
LABELS = ["north", "another / prefers to describe", "6", "-3.5", "O'Neill", 'the "new" line', "=x", " spaced ",
          "'single'", '"double"', "in", "1e3", "N/A"]


@pytest.mark.parametrize("column", COLUMNS)
@pytest.mark.parametrize("label", LABELS)
def test_advice_parses_back_to_the_same_column_and_value_and_keeps_the_rows_meant(column, label):
    written = leaving_out(column, label)
    assert written is not None and written == filter_text(column, "!=", label)
    parsed = parse_filter(written)
    assert (parsed.column, parsed.operator, parsed.value) == (column, "!=", label)
    frame = pd.DataFrame({column: [label, "other", label, "other 2", "x"], "y": range(5)})
    kept, _, _ = apply_filters(frame, [parsed], "f.csv")
    assert kept.index.tolist() == frame.index[frame[column] != label].tolist()  # pandas' own selection


@pytest.mark.parametrize("column", COLUMNS)
def test_a_list_of_ids_parses_back_too(column):
    ids = ["R-1", "O'Neill", "a, b", "R 4"]
    written = list_filter(column, ids)
    parsed = parse_filter(written)
    assert (parsed.column, parsed.operator, parsed.value) == (column, "not in", tuple(ids))
    frame = pd.DataFrame({column: ids + ["R-5", "R-6"], "y": range(6)})
    kept, _, _ = apply_filters(frame, [parsed], "f.csv")
    assert kept.index.tolist() == frame.index[~frame[column].isin(ids)].tolist()


def test_what_cannot_be_written_is_none_never_a_filter_that_reads_otherwise():
    assert filter_column('say "hi"') is None and leaving_out('say "hi"', "north") is None  # no filter names it
    assert filter_value("both ' and \"") is None and leaving_out("district", "both ' and \"") is None
    assert filter_column("tab\there") is None  # cannot be printed as it is
    assert filter_value(6.0) == "6" and parse_filter(filter_text("grade", "<", 6.0)).value == 6.0  # numbers as numbers
    assert filter_text("wave 2", ">=", 3) == '"wave 2" >= 3'
    assert filter_text("district", "!=", "another / prefers to describe") == \
        'district != "another / prefers to describe"'
