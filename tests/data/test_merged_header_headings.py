"""Section headings merged over the item columns above the row of item names: every merged range is named, and the
option that reads the names from the row under them is suggested (hostile trial s15, case 14: one range of three
was named and nothing pointed to --names-row, which reads the file as it is).

Data: the bundled demo (a fictional transit agency's rider survey, simulated with a fixed seed)."""

from __future__ import annotations

import pandas as pd
import pytest

from tests.conftest import fit_refused, run_cli


def _headed(frame: pd.DataFrame, path, names: bool = True):
    openpyxl = pytest.importorskip("openpyxl")
    book = openpyxl.Workbook()
    sheet = book.active
    sheet.append(["", "", "Punctuality", "", "", "", "Comfort", "", "", "", "Courtesy", "", "", ""])
    for cells in ("C1:F1", "G1:J1", "K1:N1"):
        sheet.merge_cells(cells)
    if names:
        sheet.append(list(frame.columns))
    for row in frame.itertuples(index=False):
        sheet.append([None if pd.isna(v) else v for v in row])
    book.save(path)


def test_every_merged_heading_is_named_and_the_row_of_item_names_suggested(rider_demo, rider_model, tmp_path, capsys):
    path = tmp_path / "m.xlsx"
    _headed(rider_demo, path)
    err = fit_refused(rider_model, path, tmp_path, capsys)
    model = tmp_path / "m.cfa"
    assert ("the header row 1 has merged cells (C1:F1 'Punctuality', G1:J1 'Comfort', K1:N1 'Courtesy')"
            in err)
    assert err.rstrip().endswith("row 2 holds the model's item names: read them from it with --names-row 2")
    code, _, _ = run_cli(["fit", model, "--data", path, "--names-row", "2"], capsys)
    assert code == 0  # as suggested, the file is read as it is


def test_without_a_row_of_names_below_the_headings_no_option_is_suggested(rider_demo, rider_model, tmp_path, capsys):
    path = tmp_path / "m.xlsx"
    _headed(rider_demo, path, names=False)
    err = fit_refused(rider_model, path, tmp_path, capsys)
    assert "--names-row" not in err and "give every column its own name in one header row" in err
