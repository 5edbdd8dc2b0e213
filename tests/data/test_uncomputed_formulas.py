"""A workbook whose item cells hold formulas never calculated (openpyxl, like other writing libraries, saves a
formula without its value) is refused naming the cell, while the same formulas with their saved values read as
numbers; the check reads the sheet's XML (ECMA-376 Part 1, 18.3.1.4: a cell's formula <f> and its saved value <v>),
and agrees with openpyxl's two readings of the workbook (formulas, then values), the reference here."""

from __future__ import annotations

import shutil
import zipfile

import numpy as np
import openpyxl
import pytest

from cfa_tool.data import readers
from cfa_tool.errors import DataError


def _book(path, formula_row: int | None = 6, names_row: int = 1):
    rng = np.random.default_rng(4)
    book = openpyxl.Workbook()
    sheet = book.active
    sheet.title = "answers"
    for _ in range(names_row - 1):
        sheet.append(["A survey of riders"])
    sheet.append(["q1", "q2", "q3", "q4"])
    for r in range(30):
        sheet.append([int(v) for v in rng.integers(1, 6, 4)])
    if formula_row is not None:
        sheet.cell(row=formula_row, column=3, value="=A6+B6")
    sheet.cell(row=20, column=2, value=None)  # a gap: the check runs where a cell is empty
    book.save(path)
    return path


def _with_saved_value(source, target, cell: str, value: str):
    """The workbook with a saved value put beside the cell's formula (as a spreadsheet program saves it)."""
    with zipfile.ZipFile(source) as old, zipfile.ZipFile(target, "w") as new:
        for item in old.infolist():
            data = old.read(item.filename)
            if item.filename == "xl/worksheets/sheet1.xml":
                text = data.decode()
                start = text.index(f'<c r="{cell}"')
                end = text.index("</c>", start)  # (openpyxl writes an empty <v></v> after the formula)
                text = text[:start] + text[start:end].replace("<v></v>", "") + f"<v>{value}</v>" + text[end:]
                data = text.encode()
            new.writestr(item, data)
    return target


def _openpyxl_reference(path, title: str, first: int):
    formulas = openpyxl.load_workbook(path, read_only=True, data_only=False)[title]
    values = openpyxl.load_workbook(path, read_only=True, data_only=True)[title]
    return next((cell.coordinate for row_f, row_v in zip(formulas.iter_rows(min_row=first + 2),
                                                          values.iter_rows(min_row=first + 2, values_only=True))
                 for cell, value in zip(row_f, row_v)
                 if value is None and isinstance(cell.value, str) and cell.value.startswith("=")), None)


def test_a_formula_never_calculated_is_refused_naming_its_cell(tmp_path):
    path = _book(tmp_path / "formulas.xlsx")
    assert readers._formula_without_value(path, "answers", 0) == "C6" == _openpyxl_reference(path, "answers", 0)
    with pytest.raises(DataError, match=r"cell C6 holds a formula whose value was never calculated"):
        readers.read_data(path)


def test_a_formula_with_its_saved_value_reads_as_its_number(tmp_path):
    path = _with_saved_value(_book(tmp_path / "formulas.xlsx"), tmp_path / "saved.xlsx", "C6", "7")
    assert readers._formula_without_value(path, "answers", 0) is None
    assert _openpyxl_reference(path, "answers", 0) is None
    frame = readers.read_data(path).frame
    assert frame.loc[frame.index[4], "q3"] == 7  # file row 6 is the fifth row of answers


def test_only_rows_below_the_header_are_read_and_the_title_rows_are_not(tmp_path):
    path = _book(tmp_path / "below.xlsx", formula_row=2, names_row=2)  # the formula in the header's row
    for first in (0, 1):
        assert readers._formula_without_value(path, "answers", first) == _openpyxl_reference(path, "answers", first)
    assert readers._formula_without_value(path, "answers", 1) is None


def test_a_sheet_the_file_does_not_name_falls_back(tmp_path):
    path = _book(tmp_path / "formulas.xlsx")
    assert readers._formula_without_value(path, "no such sheet", 0) is False
    broken = tmp_path / "broken.xlsx"
    shutil.copy(path, broken)
    with zipfile.ZipFile(path) as old, zipfile.ZipFile(broken, "w") as new:
        for item in old.infolist():
            if item.filename != "xl/_rels/workbook.xml.rels":
                new.writestr(item, old.read(item.filename))
    assert readers._formula_without_value(broken, "answers", 0) is False
