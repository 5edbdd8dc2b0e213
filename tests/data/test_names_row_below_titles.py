"""An export with two title rows and a row of headings merged over the items above the row of column names
(new-user trial s19, finding 5): the run stopped at the first title taken as the header and advised --names-row
'(its number)' without naming the row, though the fourth row holds a name in every column and every model
variable.  The message now names that row with the option that reads it (the one search of a row of names below
the header, data.readers._names_row_below, that the merged-header message uses too), in a workbook and in a CSV
file alike; a row lacking a model variable is not named.

Data: the bundled demo (a fictional transit agency's rider survey, simulated with a fixed seed)."""

from __future__ import annotations

import csv

import pandas as pd
import pytest

from tests.conftest import fit_refused, run_cli


def _rows(frame: pd.DataFrame) -> list[list]:
    """Two title rows, headings over the first items, the column names, the answers."""
    width = len(frame.columns)
    headings = [""] * width
    headings[2], headings[6] = "Punctuality", "Comfort"
    return ([["Rider survey 2026 - export"] + [""] * (width - 1), ["Exported by the survey desk"] + [""] * (width - 1),
             headings, list(frame.columns)]
            + [[None if pd.isna(v) else v for v in row] for row in frame.itertuples(index=False)])


def _book(frame: pd.DataFrame, path) -> None:
    openpyxl = pytest.importorskip("openpyxl")
    book = openpyxl.Workbook()
    sheet = book.active
    for row in _rows(frame):
        sheet.append([None if v == "" else v for v in row])
    for cells in ("C3:F3", "G3:J3"):
        sheet.merge_cells(cells)
    book.save(path)


def _text(frame: pd.DataFrame, path) -> None:
    with open(path, "w", newline="") as f:
        csv.writer(f).writerows([["" if v is None else v for v in row] for row in _rows(frame)])


@pytest.mark.parametrize("write, name, where", [(_book, "export.xlsx", "row 1"), (_text, "export.csv", "line 1")])
def test_the_row_of_names_below_two_titles_is_named(rider_demo, rider_model, tmp_path, capsys, write, name, where):
    path = tmp_path / name
    write(rider_demo, path)
    err = fit_refused(rider_model, path, tmp_path, capsys)
    assert (f"{where}, the first with values, was taken as the header; row 4 holds a name in every column, the "
            f"model's among them: read the names from it with --names-row 4, or delete the rows above it") in err
    code, _, _ = run_cli(["fit", tmp_path / "m.cfa", "--data", path, "--names-row", "4"], capsys)
    assert code == 0  # as advised, the file is read as it is


@pytest.mark.parametrize("write, name", [(_book, "export.xlsx"), (_text, "export.csv")])
def test_a_row_without_every_model_variable_is_not_named(rider_demo, rider_model, tmp_path, capsys, write, name):
    path = tmp_path / name
    write(rider_demo.rename(columns={"on_time": "on_time_2026"}), path)  # the model's on_time is in no row
    err = fit_refused(rider_model, path, tmp_path, capsys)
    assert "(its number)" in err and "holds a name in every column" not in err


@pytest.mark.parametrize("write, name, where", [(_book, "export.xlsx", "(sheet 'Sheet'): column 2 of the header row"),
                                                (_text, "export.csv", "row 1: column 2 of the header")])
def test_a_title_of_two_cells_taken_as_the_header_names_the_row_of_names(rider_demo, rider_model, tmp_path, capsys,
                                                                         write, name, where):
    """The neighbour: a title of two cells ('Rider survey', '', 'wave 1') read as the header, whose second column has
    no name: the message names the row of names too."""
    path = tmp_path / name
    rows = _rows(rider_demo)
    rows[0][2] = "wave 1"
    rows[2] = [""] * len(rows[2])  # no headings
    if name.endswith(".xlsx"):
        openpyxl = pytest.importorskip("openpyxl")
        book = openpyxl.Workbook()
        for row in rows:
            book.active.append([None if v == "" else v for v in row])
        book.save(path)
    else:
        with open(path, "w", newline="") as f:
            csv.writer(f).writerows([["" if v is None else v for v in row] for row in rows])
    err = fit_refused(rider_model, path, tmp_path, capsys)
    assert f"{where} has no name" in err
    assert "row 4 holds a name in every column, the model's among them: read the names from it with --names-row 4" \
        in err


@pytest.mark.parametrize("write, name, where", [(_book, "export.xlsx", "row 2"), (_text, "export.csv", "line 2")])
def test_a_names_row_given_too_high_is_said_so_and_the_row_of_names_named(rider_demo, rider_model, tmp_path, capsys,
                                                                          write, name, where):
    """--names-row 2 (the second title) read as the header: the message said 'the first with values, was taken as
    the header', which the option, not the file, chose; it says which option read it, and names row 4."""
    path = tmp_path / name
    write(rider_demo, path)
    model = tmp_path / "m.cfa"
    model.write_text(rider_model)
    code, _, err = run_cli(["fit", model, "--data", path, "--names-row", "2"], capsys)
    assert code == 2
    assert (f"{where}, named by --names-row 2, was read as the header; row 4 holds a name in every column, the "
            f"model's among them: read the names from it with --names-row 4") in err
    assert "the first with values" not in err
