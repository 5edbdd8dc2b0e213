"""A row whose cells repeat the column names (two tables on one sheet, two CSV files joined with ``cat``) is named as
a repeated header row, exit 2 (hostile trial s15, case 03: its cells were called text among numbers and the column
names advised as --missing-codes; done so, both tables were analysed as one sample).

Data: the bundled demo (a fictional transit agency's rider survey, simulated with a fixed seed)."""

from __future__ import annotations

import pandas as pd
import pytest

from cfa_tool.data.readers import read_data
from cfa_tool.errors import DataError
from tests.conftest import fit_refused


def test_two_csv_files_joined_with_their_headers_are_refused_naming_the_row(rider_demo, rider_model, tmp_path, capsys):
    first, second = tmp_path / "w1.csv", tmp_path / "w2.csv"
    rider_demo.iloc[:240].to_csv(first, index=False)
    rider_demo.iloc[240:].to_csv(second, index=False)
    both = tmp_path / "both.csv"
    both.write_bytes(first.read_bytes() + second.read_bytes())  # as 'cat w1.csv w2.csv > both.csv' joins them
    err = fit_refused(rider_model, both, tmp_path, capsys)
    assert err.startswith(f"cfa-tool: {both}: row 242 repeats the column names of row 1 (14 of them), so the file "
                          f"holds two tables")
    assert "--missing-codes" not in err and "text among numbers" not in err


def test_a_second_table_under_the_first_on_one_sheet_is_refused(rider_demo, tmp_path):
    openpyxl = pytest.importorskip("openpyxl")
    book = openpyxl.Workbook()
    sheet = book.active
    sheet.append(list(rider_demo.columns))
    for row in rider_demo.iloc[:240].itertuples(index=False):
        sheet.append([None if pd.isna(v) else v for v in row])
    sheet.append([])
    sheet.append(["Wave 2"])
    sheet.append(list(rider_demo.columns))  # sheet row 244
    for row in rider_demo.iloc[240:].itertuples(index=False):
        sheet.append([None if pd.isna(v) else v for v in row])
    path = tmp_path / "two.xlsx"
    book.save(path)
    with pytest.raises(DataError, match=r"\(sheet 'Sheet'\): row 244 repeats the column names of row 1"):
        read_data(path)


def test_answers_that_happen_to_equal_one_column_name_are_read(tmp_path):
    """One cell equal to its column's name (a group called 'group') is no header row."""
    path = tmp_path / "groups.csv"
    frame = pd.DataFrame({"group": ["group", "other"] * 10, "x": range(20), "y": range(20)})
    frame.to_csv(path, index=False)
    assert len(read_data(path).frame) == 20
