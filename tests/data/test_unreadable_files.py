"""Files the csv module, openpyxl or pyreadstat cannot read are refused in one line naming the file (and the line and
column of a delimited file) and what to do, never by the library's own words alone ('line 482: field larger than
field limit (131072)', 'cannot be read as an Excel workbook (KeyError)', '(Unable to read from file)'): a quote left
open, a value longer than the csv module's limit, a NUL byte, a workbook or an SPSS/Stata file cut short, text or
another zip archive under a workbook's name, a Stata file of a format the reader does not know.

Data: the bundled demo (a fictional transit agency's rider survey, simulated with a fixed seed).  The csv module's
limit (131,072 characters) is its documented default (Python's csv.field_size_limit)."""

from __future__ import annotations

import csv
import re
import zipfile

import pytest

from cfa_tool.data.halves import read_halves
from cfa_tool.data.readers import read_data
from cfa_tool.errors import DataError
from tests.conftest import fit_refused


def _refused(path) -> str:
    with pytest.raises(DataError) as refused:
        read_data(path)
    return str(refused.value)


def test_a_quote_left_open_names_its_line_and_column(rider_demo, rider_model, tmp_path, capsys):
    assert csv.field_size_limit() == 131_072
    lines = rider_demo.to_csv(index=False).splitlines()
    lines[5] = lines[5].replace(",", ',"', 3).replace(',"', ",", 2)  # text line 6: a quote opens its 4th field
    lines.append("R9999," + "x" * 140_000)  # enough text after it to pass the limit
    path = tmp_path / "open.csv"
    path.write_text("\n".join(lines) + "\n")
    err = fit_refused(rider_model, path, tmp_path, capsys)
    assert err.startswith(f"cfa-tool: {path}: line 6, column 4: a quoted value opened there (\"...) runs on for more "
                          f"than 131,072 characters, to line {len(lines)} without its closing quote, so the rows after "
                          f"it are read as one value; close the quote, or remove it")


def test_a_value_longer_than_the_limit_names_its_line_and_column(rider_demo, tmp_path):
    lines = rider_demo.to_csv(index=False).splitlines()
    lines[7] = lines[7].replace("north", "n" * 140_000).replace("south", "s" * 140_000)  # column 2 of text line 8
    path = tmp_path / "long.csv"
    path.write_text("\n".join(lines) + "\n")
    assert _refused(path).startswith(f"{path}: line 8, column 2 holds a value of more than 131,072 characters, far "
                                     f"longer than an answer: if the file separates its fields by another character "
                                     f"than ','")


def test_a_nul_byte_names_its_line(rider_demo, tmp_path):
    text = rider_demo.to_csv(index=False).encode()
    third = text.index(b"\n", text.index(b"\n") + 1) + 1  # the start of line 3
    path = tmp_path / "nul.csv"
    path.write_bytes(text[:third + 3] + b"\x00" + text[third + 3:])
    assert _refused(path) == f"data file '{path}' is not a text file (it contains NUL bytes, the first on line 3); " \
                             f"save it as CSV"


def test_binary_files_that_cannot_be_read_say_what_they_are(rider_demo, tmp_path):
    pyreadstat = pytest.importorskip("pyreadstat")
    pytest.importorskip("openpyxl")
    sav, dta, xlsx = tmp_path / "whole.sav", tmp_path / "whole.dta", tmp_path / "whole.xlsx"
    pyreadstat.write_sav(rider_demo, str(sav))
    pyreadstat.write_dta(rider_demo, str(dta))
    rider_demo.to_excel(xlsx, index=False)
    for whole in (sav, dta, xlsx):
        cut = tmp_path / f"cut{whole.suffix}"
        cut.write_bytes(whole.read_bytes()[:len(whole.read_bytes()) // 2])
        kind = {".sav": "an SPSS file", ".dta": "a Stata file", ".xlsx": "an Excel workbook"}[whole.suffix]
        assert _refused(cut).startswith(f"'{cut}' is {kind} cut short or damaged (as after an interrupted copy or "
                                        f"download); copy it again")
    text = tmp_path / "table.sav"
    text.write_text("a,b\n1,2\n")
    assert _refused(text).startswith(f"'{text}' is not an SPSS file but text; if it is a table with its values "
                                     f"separated by commas (CSV), give it the ending .csv")
    other = tmp_path / "other.xlsx"
    with zipfile.ZipFile(other, "w") as archive:
        archive.writestr("readme.txt", "not a workbook")
    assert _refused(other).startswith(f"'{other}' is a zip archive but holds no Excel workbook")
    newer = tmp_path / "newer.dta"
    header = dta.read_bytes()
    assert header.startswith(b"<stata_dta><header><release>11")  # pyreadstat writes format 118 or 119
    newer.write_bytes(re.sub(rb"<release>\d+</release>", b"<release>122</release>", header, count=1))
    assert _refused(newer).startswith(f"'{newer}' is a Stata file of format 122, which this reader does not know; "
                                      f"save it from Stata in an older format")


def test_a_halves_file_the_csv_module_cannot_read_is_named(tmp_path):
    path = tmp_path / "halves.csv"
    path.write_text('row,half,"' + "x" * 140_000 + "\n")
    with pytest.raises(DataError, match=r"halves.csv, line 1: not a halves file \(a value of more than 131,072 "):
        read_halves(path)
