"""Whole numbers a workbook's cell format shows with leading zeros ('000000' shows 991 as 000991) are read as the
sheet shows them, and a row filter's = and != compare such codes as written (new-user trial s21: ids shown as 000991
were written 991 in the scores file, so the scores no longer merged with the ids as the spreadsheet shows them, and
'respondent_id = 991' matched the id 000991)."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

from cfa_tool.data.filters import apply_filters, parse_filter
from cfa_tool.errors import DataError
from tests.conftest import five_point_answers

MODEL = "factor a: a1, a2, a3, a4\nfactor b: b1, b2, b3, b4\n"


def _workbook(path, ids, item_format: str | None = None) -> None:
    """The answers of five_point_answers with an id column of whole numbers shown by the format '000000' (as a
    survey export writes them), and a column of fractions under the same format."""
    from openpyxl import Workbook

    answers = five_point_answers(len(ids), seed=2126)
    book = Workbook()
    ws = book.active
    ws.append(["respondent_id", *answers.columns, "tenure"])
    for k, (i, row) in enumerate(zip(ids, answers.itertuples(index=False)), start=2):
        ws.append([i, *(int(v) for v in row), 0.5 + k / 10])
        ws.cell(k, 1).number_format = "000000"
        ws.cell(k, 10).number_format = "000000"  # a fraction: the format rounds it, the column is left as it is
        if item_format:
            ws.cell(k, 2).number_format = item_format
    book.save(path)


def test_ids_shown_with_leading_zeros_keep_them_in_the_frame_and_the_scores_file(tmp_path):
    import cfa_tool
    from cfa_tool.data.readers import read_data

    ids = [991, 21, 120345] + list(range(1000, 1297))
    path = tmp_path / "survey.xlsx"
    _workbook(path, ids, item_format="00")
    loaded = read_data(path, items=[f"a{k}" for k in range(1, 5)] + [f"b{k}" for k in range(1, 5)])
    # the cells as the sheet shows them (Excel's format '000000': six digits, zeros in front)
    assert list(loaded.frame["respondent_id"][:3]) == ["000991", "000021", "120345"]
    assert any("'respondent_id'" in n and "as the sheet shows them" in n and "000991" in n for n in loaded.notes)
    # an item keeps its answers as numbers whatever its format; a column with fractions keeps its numbers
    assert loaded.frame["a1"].dtype.kind in "if" and loaded.frame["tenure"].dtype.kind == "f"
    result = cfa_tool.scores(MODEL, path, id_column="respondent_id")
    written = pd.read_csv(pd.io.common.StringIO(result.csv()), dtype=str)
    assert list(written["respondent_id"][:3]) == ["000991", "000021", "120345"]


def test_a_filter_compares_ids_written_with_leading_zeros_as_written():
    frame = pd.DataFrame({"respondent_id": ["000991", "000021", "120345", "000992"], "y": [1.0, 2.0, 3.0, 4.0]})
    kept, _, _ = apply_filters(frame, [parse_filter("respondent_id = 000991")], "survey.xlsx")
    assert list(kept["y"]) == [1.0]
    kept, _, _ = apply_filters(frame, [parse_filter("respondent_id in 000991, 000021")], "survey.xlsx")
    assert list(kept["y"]) == [1.0, 2.0]
    kept, _, _ = apply_filters(frame, [parse_filter("respondent_id != 000991")], "survey.xlsx")
    assert list(kept["y"]) == [2.0, 3.0, 4.0]
    with pytest.raises(DataError) as found:  # 991 is not an id the sheet shows: no row is left, and why
        apply_filters(frame, [parse_filter("respondent_id = 991")], "survey.xlsx")
    assert "write the value as the file shows it (000991)" in str(found.value)
    # an order compares the numbers, and a value written with a zero is a number in a column of numbers
    kept, _, _ = apply_filters(frame, [parse_filter("respondent_id >= 000992")], "survey.xlsx")
    assert list(kept["y"]) == [3.0, 4.0]
    numbers = pd.DataFrame({"site": [7.0, 12.0, 7.0], "y": [1.0, 2.0, 3.0]})
    kept, _, _ = apply_filters(numbers, [parse_filter("site = 07")], "survey.csv")
    assert list(kept["y"]) == [1.0, 3.0]
    assert np.isclose(parse_filter("site = 7.0").value, 7.0)
