"""A text file's rows are its records, numbered as a spreadsheet shows the file (new-user trial s14): a survey export
whose comment cells hold quoted line breaks had its rows named by the text line each record starts on ('row 575' for
the respondent a spreadsheet shows in row 501), and `scores` wrote an empty 'blank row' line for every continuation
line, so its lines no longer lined up with the data's records.

The files are written by Python's csv module and pandas, writers this project did not write; the references are
pandas reading the same file (one row per record, as a spreadsheet opens it: ``skip_blank_lines=False`` keeps a blank
line as a row, as a spreadsheet does), and the text lines counted in the text the test wrote.  The data are the
bundled demo (a fictional transit agency's rider survey, simulated with a fixed seed)."""

from __future__ import annotations

import csv

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.data.readers import read_data, text_rows
from cfa_tool.errors import DataError
from tests.conftest import run_cli

ITEMS = ["on_time", "short_wait", "accurate_info", "easy_transfer", "seat_available", "clean", "temperature",
         "room_to_stand", "greeting", "helpful", "respectful", "clear_answers"]
CODE_ROW = 300  # the data record (0-based) whose on_time answer is -99
BLANK_AFTER = 400  # a blank line is put after this data record


def _export(rider_demo: pd.DataFrame, path, typo: int | None = None) -> str:
    """The demo with a comment column whose cells in every seventh record hold line breaks (three each, one of them
    an empty line inside the quotes), -99 in on_time of record :data:`CODE_ROW`, a blank line after record
    :data:`BLANK_AFTER`; ``typo``: a record whose on_time answer is the text 'x'.  Written by the csv module; returns
    the text."""
    data = rider_demo.copy()
    data["on_time"] = data["on_time"].astype(object)
    data.loc[CODE_ROW, "on_time"] = -99
    if typo is not None:
        data.loc[typo, "on_time"] = "x"
    data["comment"] = ["" if k % 7 else f"bus late again\nroute {k}\n\nplease fix" for k in range(len(data))]
    with open(path, "w", encoding="utf-8", newline="") as handle:
        writer = csv.writer(handle, lineterminator="\n")
        writer.writerow(data.columns)
        for k, row in enumerate(data.itertuples(index=False)):
            writer.writerow(row)
            if k == BLANK_AFTER:
                handle.write("\n")
    return open(path, encoding="utf-8", newline="").read()


def _text_line(text: str, rider_id) -> int:
    """The text line on which the record of ``rider_id`` starts, counted in the text written."""
    offset = text.index(f"\n{rider_id},") + 1
    return text[:offset].count("\n") + 1


def _spreadsheet_rows(path) -> pd.DataFrame:
    """The file as pandas reads it, one row per record and a blank line a row of its own: row k of a spreadsheet is
    position k - 2 (the header is row 1)."""
    return pd.read_csv(path, skip_blank_lines=False)


def test_rows_are_records_in_messages_and_case_tables(rider_demo, rider_model, tmp_path):
    path = tmp_path / "export.csv"
    text = _export(rider_demo, path)
    sheet = _spreadsheet_rows(path)
    row = int(np.flatnonzero(sheet["on_time"].to_numpy() == -99)[0]) + 2  # pandas' position + the header row
    assert row == CODE_ROW + 2  # no blank line above it
    line = _text_line(text, rider_demo["rider_id"][CODE_ROW])
    assert line == row + 3 * len(range(0, CODE_ROW, 7))  # three line breaks in each comment above it
    fitted = cfa_tool.fit(rider_model, str(path))
    code = next(p for p in fitted.problems if "-99" in p.explanation)
    assert f"row {row} (text line {line})" in code.explanation  # both, once
    assert code.explanation.count(str(line)) == 1
    cases = fitted.to_dict()["diagnostics"]["unusual_cases"]
    assert cases[0]["row"] == row and cases[0]["row_named_by"] == "file_row"  # the -99 row stands out most
    assert sheet["rider_id"][cases[0]["row"] - 2] == rider_demo["rider_id"][CODE_ROW]  # the case table finds it
    spans = [n for n in fitted.warnings if "span several text lines" in n]
    assert len(spans) == 1 and f": {len(range(0, len(rider_demo), 7))} rows span several text lines" in spans[0]


def test_a_bad_cell_and_a_blank_line_are_named_by_their_rows(rider_demo, rider_model, tmp_path):
    path = tmp_path / "export.csv"
    typo = 450  # below the blank line
    text = _export(rider_demo, path, typo=typo)
    sheet = _spreadsheet_rows(path)
    row = int(np.flatnonzero(sheet["on_time"].astype(str).to_numpy() == "x")[0]) + 2
    assert row == typo + 3  # the header and the blank line above it
    line = _text_line(text, rider_demo["rider_id"][typo])
    with pytest.raises(DataError, match=rf"\('x' in row {row} \(text line {line}\)\)"):
        cfa_tool.fit(rider_model, str(path))
    blank = int(np.flatnonzero(sheet.isna().all(axis=1).to_numpy())[0]) + 2
    assert blank == BLANK_AFTER + 3
    loaded = read_data(path)
    rows = np.asarray(loaded.frame.index) + 1  # data.moments.file_rows_index: the row's number less one
    assert blank not in rows and blank - 1 in rows and blank + 1 in rows  # a row of its own, not read
    positions = rows - 2  # spreadsheet row -> pandas' position
    assert (sheet["rider_id"].to_numpy()[positions] == loaded.frame["rider_id"].to_numpy()).all()


def test_text_rows_count_records_as_the_csv_module_reads_them():
    """TextRows against csv.reader's own line count: each record starts on the line after the previous one ends."""
    text = 'a,b\n1,"x\ny"\n\n2,"p\r\n\r\nq"\n3,z\n'
    rows = text_rows(text, ",")
    reader = csv.reader(text.splitlines(keepends=True))
    starts, line = [], 1
    for _ in reader:
        starts.append(line)
        line = reader.line_num + 1
    assert rows.starts.tolist() == starts == [1, 2, 4, 5, 8]
    assert rows.count == 5 and not rows.same_as_lines
    assert rows.rows([1, 2, 3, 4, 5, 6, 7, 8]).tolist() == [1, 2, 2, 3, 4, 4, 4, 5]
    assert rows.words(4) == "row 4 (text line 5)" and rows.words(2) == "row 2"
    assert text_rows("a,b\n1,2\n\n3,4\n", ",").same_as_lines  # no quotes: every line a row


def test_scores_line_up_with_the_records(rider_demo, rider_model, tmp_path, capsys):
    path, model, out = tmp_path / "export.csv", tmp_path / "riders.cfa", tmp_path / "scores.csv"
    _export(rider_demo, path)
    model.write_text(rider_model, encoding="utf-8")
    code, stdout, err = run_cli(["scores", model, "--data", path, "--output", out], capsys)
    assert code == 0, err
    written = pd.read_csv(out)
    sheet = _spreadsheet_rows(path)
    # line k of the scores file (the header its line 1) is row k of the data as a spreadsheet shows it
    assert len(written) == len(sheet) == len(rider_demo) + 1  # the records and the one blank line
    why = written["why_not_scored"]
    assert (why == "blank row").sum() == 1 and why[BLANK_AFTER + 1] == "blank row"
    factors = {"punctuality": ITEMS[:4], "comfort": ITEMS[4:8], "courtesy": ITEMS[8:]}  # the model file's lines
    assert [c for c in written.columns if c.endswith("_items_answered")] == [f"{f}_items_answered" for f in factors]
    for factor, items in factors.items():  # by position: each line's count is its record's, as pandas counts it
        expected = sheet[items].notna().sum(axis=1).where(sheet.notna().any(axis=1))
        assert np.allclose(written[f"{factor}_items_answered"].to_numpy(dtype=float), expected.to_numpy(dtype=float),
                           equal_nan=True), factor
    # the same scores as for the records read by pandas and given as a data frame, row by row in place
    frame_scores = cfa_tool.scores(rider_model, sheet).table
    column = "comfort_regression"
    kept = sheet.notna().any(axis=1).to_numpy()
    assert np.allclose(written[column].to_numpy()[kept], frame_scores[column].reindex(sheet.index).to_numpy()[kept],
                       equal_nan=True)



def test_header_rows_and_the_first_row_of_data_count_records(rider_demo, rider_model, tmp_path):
    """A survey export's question texts under the column names, one of them with a line break (repro 11 of the
    new-user trial s14): the rows to skip are rows 2-3 as a spreadsheet shows them, and --first-data-row 4 reads
    the answers from the first respondent's row."""
    path = tmp_path / "export.csv"
    texts = [f"How much do you agree:\n{c}?" if c == "on_time" else f"{c}?" for c in rider_demo.columns]
    ids = [f"QID{k}" for k in range(len(rider_demo.columns))]
    with open(path, "w", encoding="utf-8", newline="") as handle:
        writer = csv.writer(handle, lineterminator="\r\n")
        writer.writerows([rider_demo.columns, texts, ids, *rider_demo.itertuples(index=False)])
    sheet = _spreadsheet_rows(path)
    assert sheet["rider_id"][2] == rider_demo["rider_id"][0]  # row 4 of a spreadsheet: the first respondent
    with pytest.raises(DataError, match=r"rows 2-3 \(text lines 2-4\) under the column names look like further header "
                                        r"rows .* skip them with first_data_row=4, the row where the answers start "
                                        r"\(text line 5\)"):
        cfa_tool.check(rider_model, str(path))
    loaded = read_data(path, first_data_row=4)
    assert loaded.frame["rider_id"].tolist() == rider_demo["rider_id"].tolist()
    assert (np.asarray(loaded.frame.index) + 1).tolist() == list(range(4, len(rider_demo) + 4))
    assert [n for n in loaded.notes if "rows 2-3 were not read as data (between the column names in row 1 and the "
                                       "first row of data, 4, as first_data_row=4 asks)" in n]
    with pytest.raises(DataError, match=r"row 3 \(text line 4\) under the column names looks like a further header "
                                        r"row .* skip it with first_data_row=4"):  # row 3 read: the ids' row
        cfa_tool.fit(rider_model, str(path), first_data_row=3)


def test_a_row_that_answers_nothing_is_named_by_its_row_and_line(rider_demo, rider_model, tmp_path):
    """fit's note and check's summary on a row left out for answering no model variable name both numbers."""
    path = tmp_path / "export.csv"
    empty = 301
    data = rider_demo.copy()
    data.loc[empty, ITEMS] = np.nan
    data["comment"] = ["" if k % 7 else f"bus late again\nroute {k}\n\nplease fix" for k in range(len(data))]
    data.to_csv(path, index=False)  # pandas' writer quotes the comments with their line breaks
    text = path.read_text(encoding="utf-8")
    sheet = _spreadsheet_rows(path)
    row = int(np.flatnonzero(sheet[ITEMS].isna().all(axis=1).to_numpy())[0]) + 2
    line = _text_line(text, data["rider_id"][empty])
    assert row == empty + 2 and line > row
    fitted = cfa_tool.fit(rider_model, str(path))
    assert [w for w in fitted.warnings if str(w).endswith(f"answered none of the model variables and was left out (row "
                                                     f"{row} (text line {line}))")]
    assert f"1 with no answer to any model variable (row {row} (text line {line}))." in \
        " ".join(cfa_tool.check(rider_model, str(path)).summary().split())


def test_a_quoted_file_is_read_once_by_the_csv_module(rider_demo, tmp_path, monkeypatch):
    """The rows' numbers, the header, the rows a first row of data skips and the field counts come from one reading
    of the records (s15: the rows' numbers and the field counts each read the whole file): the csv module yields
    each record once, beside the few records the separator is guessed from (50 per separator tried)."""
    import cfa_tool.data.readers as readers

    path = tmp_path / "export.csv"
    text = _export(rider_demo, path)
    records = sum(1 for _ in csv.reader(text.splitlines(keepends=True)))  # the csv module's own count
    yielded = []
    real = csv.reader

    class Counted:  # csv.reader, each record it yields counted
        def __init__(self, *args, **kwargs):
            self.reader = real(*args, **kwargs)

        def __iter__(self):
            return self

        def __next__(self):
            fields = next(self.reader)
            yielded.append(fields)
            return fields

        @property
        def line_num(self):
            return self.reader.line_num

    monkeypatch.setattr(readers.csv, "reader", Counted)
    loaded = read_data(path, names_row=1, first_data_row=3)
    assert len(loaded.frame) == len(rider_demo) - 1  # the first record of data left unread
    guessed = sum(1 for d in ",;\t|" if d in text) * 50
    assert records <= len(yielded) <= records + guessed


def test_a_record_the_csv_module_cannot_read_is_named_by_its_text_line(rider_demo, tmp_path):
    """A quote left open before a value longer than the csv module's field limit (131072 characters): the error
    names the text line where the record starts, counted from the top of the file, not from the column names
    (s15: a title line above them made it one less)."""
    path = tmp_path / "long.csv"
    lines = rider_demo.to_csv(index=False).splitlines()
    lines[31] += ',"' + "x" * 200_000  # data record 31, text line 33 below the title
    path.write_text("Rider survey\n" + "\n".join(lines) + "\n")
    with pytest.raises(DataError) as refused:
        read_data(path, names_row=2)
    assert str(refused.value).startswith(f"{path}: line 33, column 15: a quoted value opened there (\"...) runs on "
                                         f"for more than 131,072 characters without its closing quote")
