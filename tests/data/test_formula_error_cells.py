"""Cells holding a spreadsheet's formula errors (#DIV/0!, #VALUE!, ...) in the item columns are refused as formula
errors, naming the sheet, row, column and cell, with the advice to fix the formulas or clear the cells (hostile trial
s15, case 11: the refusal offered an 'answers' statement coding them as the answers of a scale).  '#NULL!' is refused
so in a cell the workbook types as an error (a failed formula), and read as no answer, named in the methods text, as
text (a statistics package's export of a system-missing value) (re-check s15, R7: an error cell of '#NULL!' was read
as no answer).

Data: the bundled demo (a fictional transit agency's rider survey, simulated with a fixed seed)."""

from __future__ import annotations

import pandas as pd
import pytest

from cfa_tool.data.readers import read_data
from cfa_tool.errors import DataError
from tests.conftest import fit_refused


def _workbook(frame: pd.DataFrame, path, errors: dict[int, str], column: int = 8, kind: str = "e"):
    openpyxl = pytest.importorskip("openpyxl")
    book = openpyxl.Workbook()
    sheet = book.active
    sheet.append(list(frame.columns))
    for row in frame.itertuples(index=False):
        sheet.append([None if pd.isna(v) else v for v in row])
    for row, error in errors.items():
        cell = sheet.cell(row=row, column=column)
        cell.value = error
        cell.data_type = kind  # 'e': as a spreadsheet program saves a failed formula's value; 's': text
    book.save(path)


def test_formula_errors_in_an_item_column_are_named_as_such(rider_demo, rider_model, tmp_path, capsys):
    path = tmp_path / "e.xlsx"
    _workbook(rider_demo, path, {2: "#DIV/0!", 6: "#VALUE!", 10: "#NAME?", 14: "#NULL!"})
    err = fit_refused(rider_model, path, tmp_path, capsys)
    assert err.startswith(f"cfa-tool: {path} (sheet 'Sheet'): row 2, column 'clean', cell H2 holds the spreadsheet "
                          f"formula error #DIV/0! (4 cells of the items hold such errors: #DIV/0!, #VALUE!, #NAME?, "
                          f"#NULL!)")
    assert "fix the formulas in the workbook, or clear those cells" in err and "answers" not in err.split(":")[-1]


def test_formula_errors_in_a_table_saved_as_text_and_outside_the_items(rider_demo, tmp_path):
    text = rider_demo.astype(object)
    text.loc[4, "greeting"] = "#REF!"
    path = tmp_path / "e.csv"
    text.to_csv(path, index=False)
    with pytest.raises(DataError, match=r"row 6, column 'greeting' holds the spreadsheet formula error #REF!: a "):
        read_data(path, items=list(rider_demo.columns[2:]))
    # a column the model does not use is read as it is
    assert read_data(path, items=["on_time", "short_wait"]).frame.loc[5, "greeting"] == "#REF!"


def test_a_null_error_cell_is_a_failed_formula(rider_demo, rider_model, tmp_path, capsys):
    path = tmp_path / "n.xlsx"
    _workbook(rider_demo, path, {2: "#NULL!", 6: "#NULL!", 10: "#NULL!"})
    err = fit_refused(rider_model, path, tmp_path, capsys)
    assert err.startswith(f"cfa-tool: {path} (sheet 'Sheet'): row 2, column 'clean', cell H2 holds the spreadsheet "
                          f"formula error #NULL! (3 cells of the items hold such errors: #NULL!): a formula that "
                          f"failed, not an answer; fix the formulas")


def test_null_written_as_text_in_a_workbook_is_no_answer_named_in_the_methods(rider_demo, tmp_path):
    import json

    from cfa_tool import cli

    (tmp_path / "m.cfa").write_text("factor comfort: seat_available, clean, temperature, room_to_stand\n")
    _workbook(rider_demo, tmp_path / "text.xlsx", {2: "#NULL!", 6: "#NULL!", 10: "#NULL!"}, kind="s")
    empty = rider_demo.astype(object)
    empty.loc[[0, 4, 8], "clean"] = None  # sheet rows 2, 6, 10: the reference, those cells left empty
    _workbook(empty, tmp_path / "empty.xlsx", {})
    fits = {}
    for name in ("text", "empty"):
        assert cli.main(["fit", str(tmp_path / "m.cfa"), "--data", str(tmp_path / f"{name}.xlsx"), "--json",
                         str(tmp_path / f"{name}.json")]) == 0
        fits[name] = json.loads((tmp_path / f"{name}.json").read_text())
    assert fits["text"]["fit"]["chi_square"] == pytest.approx(fits["empty"]["fit"]["chi_square"], rel=1e-9)
    assert "values the data file marks as no answer were treated as missing ('#NULL!' in clean)" in \
        fits["text"]["report"]["paragraph"]
