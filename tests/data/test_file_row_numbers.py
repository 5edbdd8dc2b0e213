"""Rows named as the file numbers them, blank rows and footer rows, a row of names under question texts, and how a
text file was read (new-user trial s10: an HR platform's Excel export and a Windows-1252 CSV with semicolons and
decimal commas).

The files are written here by openpyxl and by Python's cp1252 codec, writers this project did not write; the
reference counts (rows with gaps, rows answering nothing, the row a cell sits in) come from pandas reading the same
table and from the positions the test wrote things at.  The data are the bundled demo (a fictional transit agency's
rider survey, simulated with a fixed seed)."""

from __future__ import annotations

import json

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.cli import main
from cfa_tool.data.readers import TextEncoding, read_data
from cfa_tool.errors import DataError, OptionError

openpyxl = pytest.importorskip("openpyxl")

ITEMS = ["on_time", "short_wait", "accurate_info", "easy_transfer", "seat_available", "clean", "temperature",
         "room_to_stand", "greeting", "helpful", "respectful", "clear_answers"]
BLANK_AFTER = (40, 41, 200)  # blank sheet rows are put after these data rows (0-based positions in the demo)
FOOTER = "Total responses: 480"


UNANSWERED = 300  # the data row (0-based) that answers no item: its id alone


def _export(rider_demo: pd.DataFrame, path, question_texts: bool = False, bad_cell: int | None = None):
    """A platform-like export of the demo: blank rows among the data, a row that answers no item (its id alone), two
    blank rows and a footer (a notes line) under them; ``question_texts``: a row of question texts above the codes;
    ``bad_cell``: the data row (0-based) whose 'on_time' answer is the text 'x'.  Returns the workbook path, each
    data row's sheet row and the footer's sheet row."""
    data = rider_demo.copy()
    for k in (3, 17, 99):  # a few gaps, so that rows with gaps are counted
        data.loc[k, "clean"] = np.nan
    data.loc[UNANSWERED, ["district"] + ITEMS] = np.nan
    data = data.astype(object).where(data.notna(), None)
    book = openpyxl.Workbook()
    sheet = book.active
    sheet.title = "Responses"
    if question_texts:
        sheet.append([f"How much do you agree: {c}?" if c in ITEMS else c.replace("_", " ") for c in data.columns])
    sheet.append(list(data.columns))
    rows = []
    for k, row in enumerate(data.itertuples(index=False)):
        values = list(row)
        if bad_cell == k:
            values[2] = "x"  # column C: on_time
        sheet.append(values)
        rows.append(sheet.max_row)
        if k in BLANK_AFTER:
            sheet.append([None] * len(values))
            sheet.cell(sheet.max_row, 1).value = None
            sheet.append([])
    last = sheet.max_row
    sheet.cell(last + 3, 1).value = FOOTER  # two blank rows, then the footer
    book.save(path)
    return path, rows, last + 3


def test_a_bad_cell_is_named_by_its_sheet_row_and_address(rider_demo, rider_model, tmp_path):
    path, rows, _ = _export(rider_demo, tmp_path / "export.xlsx", bad_cell=250)
    with pytest.raises(DataError) as caught:
        cfa_tool.fit(rider_model, str(path))
    sheet_row = rows[250]  # where openpyxl put it
    assert sheet_row > 252  # blank rows above it: the data-row count (251) would differ from the sheet row
    assert f"('x' in row {sheet_row}, cell C{sheet_row})" in str(caught.value)


def test_a_bad_cell_of_a_text_file_is_named_by_its_line(rider_demo, rider_model, tmp_path):
    data = rider_demo.copy()
    data["on_time"] = data["on_time"].astype(object)
    data.loc[30, "on_time"] = "x"
    lines = data.to_csv(index=False).splitlines()
    lines[1:1] = ["", ",,,,,,,,,,,,,"]  # an empty line and a line of commas under the header
    path = tmp_path / "export.csv"
    path.write_text("\n".join(lines) + "\n")
    expected = 1 + 2 + 31  # the header, the two blank lines, then the 31st data row
    assert lines[expected - 1].split(",")[2] == "x"
    with pytest.raises(DataError, match=rf"\('x' in row {expected}\)"):
        cfa_tool.fit(rider_model, str(path))
    loaded = read_data(path)
    assert [n for n in loaded.notes if "1 row with no value in any column was skipped (row 3)" in n]


def test_blank_rows_and_a_footer_count_alike_in_the_file_and_a_data_frame(rider_demo, rider_model, tmp_path):
    path, rows, footer_row = _export(rider_demo, tmp_path / "export.xlsx")
    by_pandas = pd.read_excel(path, sheet_name="Responses")  # pandas keeps the blank rows as rows of NaN
    blank_in_pandas = int(by_pandas.isna().all(axis=1).sum())
    assert blank_in_pandas == 2 * len(BLANK_AFTER) + 2
    gaps_by_pandas = int((by_pandas[ITEMS].isna().any(axis=1) & by_pandas[ITEMS].notna().any(axis=1)).sum())
    assert gaps_by_pandas >= 3

    from_file = cfa_tool.fit(rider_model, str(path))
    from_frame = cfa_tool.fit(rider_model, by_pandas)
    checked = cfa_tool.check(rider_model, str(path))
    unanswered = rows[UNANSWERED]
    for result in (from_file, from_frame):
        # the answers, the row that answers nothing among them; no blank row, and the footer is no respondent
        # (new-user trial s18: "1 of 1201 rows answered no model variable" for a file of 1200 respondents)
        assert result.data.rows_read == len(rider_demo)
        assert result.n_obs == len(rider_demo) - 1
        gaps = [w for w in result.warnings if "miss some answers" in w]
        assert gaps and str(gaps[0]).startswith(f"{gaps_by_pandas} of {len(rider_demo)} rows")
        blank = [w for w in result.warnings if "with no value in any column" in w]
        assert blank and blank[0].count(",") >= 4  # the rows are named
        footer = [w for w in result.warnings if FOOTER in str(w)]  # said once, as the line of text it is
        assert len(footer) == 1 and "under the data holds only text" in footer[0]
        assert not [w for w in result.warnings if "answered none" in w and "row 4" in w]
    assert f"row {footer_row} under the data holds only text ('{FOOTER}')" in " ".join(map(str, from_file.warnings))
    assert checked.with_gaps == gaps_by_pandas and checked.empty == 1 and checked.empty_rows == (unanswered,)
    assert f"1 with no answer to any model variable (row {unanswered})." in checked.summary()
    file_notes = [w for w in from_file.warnings if "answered none of the model variables" in w]
    assert file_notes == [f"1 of {len(rider_demo)} rows answered none of the model variables and was left out "
                          f"(row {unanswered})"]
    with_ids = cfa_tool.fit(rider_model, str(path), id_column="rider_id")
    rider = rider_demo["rider_id"][UNANSWERED]
    assert any(str(w).endswith(f"left out (row {unanswered} ('{rider}'))") for w in with_ids.warnings)
    blank_rows = next(w for w in from_file.warnings if "with no value in any column" in w)
    # the blank rows among the data; those between the data and the footer end the table, as without the footer
    # all six named: a list never cuts one row (numbers.names_shown; new-user trial s21)
    assert f"rows {rows[40] + 1}, {rows[40] + 2}, {rows[41] + 1}, {rows[41] + 2}, {rows[200] + 1}, " in blank_rows
    assert " more" not in blank_rows
    assert "6 rows with no value in any column" in blank_rows  # and so many in the frame pandas read
    assert "6 rows with no value in any column" in next(w for w in from_frame.warnings if "no value in any" in w)
    # the same coverage in both methods paragraphs
    assert from_file.data.answered == from_frame.data.answered


@pytest.mark.parametrize("method", ["regression", "bartlett", "correlation-preserving"])
def test_a_footer_row_gets_empty_scores(rider_demo, rider_model, tmp_path, method):
    path, _, _ = _export(rider_demo, tmp_path / "export.xlsx")
    scored = cfa_tool.scores(rider_model, str(path), methods=[method], id_column="rider_id")
    table = scored.table
    # one line per row of the sheet from the first row of data to the last: its blank rows as empty lines, so that
    # the scores line up with the sheet (hostile trial s11); the footer under the data is no row of data (new-user
    # trial s18: it was written as an id, "no answers")
    assert len(table) == len(rider_demo) + 6 and list(table.index) == list(range(table.index[0], table.index[-1] + 1))
    assert FOOTER not in table["rider_id"].tolist()
    why = table.pop("why_not_scored")  # the lines without any score say why (the blank rows, the row of no answer)
    assert table.isna().all(axis=1).sum() == 6 and why[table.isna().all(axis=1)].eq("blank row").all()
    silent = table[table["rider_id"] == rider_demo["rider_id"][UNANSWERED]]
    assert len(silent) == 1 and why[silent.index].tolist() == ["no answers"]
    score_columns = [c for c in table.columns if c.endswith(method.replace("-", "_"))]
    assert len(score_columns) == 3
    assert silent[score_columns].isna().all(axis=None)  # no answer: no score, never 0
    answered = table["rider_id"].notna() & (table["rider_id"] != rider_demo["rider_id"][UNANSWERED])
    assert table[score_columns][answered].notna().all(axis=None)


def test_a_row_of_the_models_names_under_question_texts_is_said_and_can_be_read(rider_demo, rider_model, tmp_path):
    path, _, _ = _export(rider_demo, tmp_path / "export.xlsx", question_texts=True)
    with pytest.raises(DataError) as caught:
        cfa_tool.check(rider_model, str(path))
    message = str(caught.value)
    assert "row 2 holds the model's variable names ('on_time', 'short_wait', 'accurate_info', ...)" in message
    assert "names_row=2" in message and "delete" not in message  # named as a Python call writes it
    plain, _, _ = _export(rider_demo, tmp_path / "plain.xlsx")
    read_so = cfa_tool.check(rider_model, str(path), names_row=2)
    reference = cfa_tool.check(rider_model, str(plain))
    assert (read_so.rows, read_so.complete, read_so.with_gaps, read_so.empty) == \
        (reference.rows, reference.complete, reference.with_gaps, reference.empty)
    assert any("the column names were read from row 2, as --names-row asks; row 1 above it was not read" in n
               for n in read_so.notes)


def test_names_row_in_a_text_file_and_where_it_cannot_apply(rider_demo, rider_model, tmp_path, capsys):
    text = tmp_path / "export.csv"
    texts = ",".join(f"Question {k}" for k in range(len(rider_demo.columns)))
    text.write_text(texts + "\n" + rider_demo.to_csv(index=False))
    model = tmp_path / "riders.cfa"
    model.write_text(rider_model)
    with pytest.raises(DataError, match="row 2 holds the model's variable names"):
        cfa_tool.fit(rider_model, str(text))
    result = cfa_tool.fit(rider_model, str(text), names_row=2)
    reference = cfa_tool.fit(rider_model, rider_demo)
    assert result.fit.chi_square == pytest.approx(reference.fit.chi_square, rel=1e-10)
    assert main(["fit", str(model), "--data", str(text), "--names-row", "2"]) == 0
    capsys.readouterr()
    with pytest.raises(OptionError, match="data frame"):
        cfa_tool.fit(rider_model, rider_demo, names_row=2)
    with pytest.raises(DataError, match="cannot hold the column names"):
        cfa_tool.fit(rider_model, str(text), names_row=10_000)
    with pytest.raises(SystemExit) as refused:  # argparse's refusal of the option's value
        main(["fit", str(model), "--data", str(text), "--names-row", "0"])
    assert refused.value.code == 2 and "row number (1 or more)" in capsys.readouterr().err


def test_a_windows_text_file_says_how_it_was_read(rider_demo, rider_model, tmp_path):
    data = rider_demo.rename(columns={"district": "Bezirk"})
    data["Bezirk"] = data["Bezirk"].map({"north": "Nördlich"}).fillna("Süd")
    data["Fahrzeit"] = np.linspace(5.25, 30.5, len(data))
    path = tmp_path / "export.csv"
    path.write_bytes(data.to_csv(index=False, sep=";", decimal=",").encode("cp1252"))
    loaded = read_data(path)
    assert loaded.reading is not None
    assert (loaded.reading.encoding, loaded.reading.separator, loaded.reading.decimal) == \
        (TextEncoding.WINDOWS_WESTERN, ";", ",")
    assert loaded.frame["Fahrzeit"].iloc[1] == pytest.approx(data["Fahrzeit"].iloc[1])
    assert loaded.frame["Bezirk"].iloc[0] == data["Bezirk"].iloc[0]
    note = next(n for n in loaded.notes if "read as" in n)
    assert "Windows-1252" in note and "separated by semicolons" in note and "decimals written with commas" in note
    payload = cfa_tool.fit(rider_model, str(path)).to_dict()
    assert payload["data"]["reading"] == {"encoding": "Windows-1252 (Western European)", "separator": ";",
                                          "decimal_mark": ",", "byte_order_mark": False, "names_line": 1,
                                          "names_row": 1}
    plain = tmp_path / "plain.csv"
    rider_demo.to_csv(plain, index=False)
    assert not [n for n in read_data(plain).notes if "read as" in n]  # UTF-8 with commas: in the JSON only
    assert cfa_tool.fit(rider_model, str(plain)).to_dict()["data"]["reading"]["encoding"] == "UTF-8"


def test_replicate_applies_the_sheet_to_the_workbook_only(rider_demo, rider_model, tmp_path, capsys):
    model = tmp_path / "riders.cfa"
    model.write_text(rider_model)
    book = openpyxl.Workbook()
    book.active.title = "Cover"
    answers = book.create_sheet("Responses")
    answers.append(list(rider_demo.columns))
    for row in rider_demo.iloc[:240].itertuples(index=False):
        answers.append(list(row))
    workbook = tmp_path / "calibration.xlsx"
    book.save(workbook)
    validation = tmp_path / "validation.csv"
    rider_demo.iloc[240:].to_csv(validation, index=False)
    assert main(["replicate", str(model), "--calibration", str(workbook), "--validation", str(validation),
                 "--sheet", "Responses"]) == 0
    capsys.readouterr()
    other = tmp_path / "other.csv"
    rider_demo.iloc[:240].to_csv(other, index=False)
    assert main(["replicate", str(model), "--calibration", str(other), "--validation", str(validation),
                 "--sheet", "Responses"]) == 2
    err = capsys.readouterr().err
    assert "is an Excel workbook, so a sheet ('Responses') cannot be chosen" in err and len(err.splitlines()) == 1


def test_scores_name_the_footer_row_by_its_id_as_fit_does(rider_demo, rider_model, tmp_path):
    """Re-check of the merged round: with --id, fit named a row that answers nothing by its id and scores only by its
    number."""
    path, rows, _ = _export(rider_demo, tmp_path / "export.xlsx")
    scored = cfa_tool.scores(rider_model, str(path), id_column="rider_id")
    said = scored.warnings + tuple(scored.fit.warnings) + tuple(scored.notes)
    assert any(f"left out (row {rows[UNANSWERED]} ('{rider_demo['rider_id'][UNANSWERED]}'))" in w for w in said)


def test_rows_that_answer_nothing_are_named_by_their_ids_whatever_the_frame_index(rider_demo, rider_model):
    """A data frame indexed by text: the rows left out for answering nothing kept their numbers but lost their ids
    (the ids were looked up at the row number less one, which only an index counting rows from 0 gives)."""
    frame = rider_demo.copy()
    frame.loc[frame.index[[3, 7]], ITEMS] = np.nan
    frame.index = [f"r{k}" for k in range(len(frame))]
    ids = frame["rider_id"].iloc[[3, 7]].tolist()
    result = cfa_tool.fit(rider_model, frame, id_column="rider_id")
    note = next(w for w in result.warnings if "answered none of the model variables" in w)
    assert f"rows at positions 4 ('{ids[0]}'), 8 ('{ids[1]}')" in note  # positions, not a file's rows (hostile s17, 7)


def _texts_above_codes(frame: pd.DataFrame, path) -> None:
    """A workbook whose row 1 holds question texts and row 2 the item codes, as survey platforms export it."""
    book = openpyxl.Workbook()
    sheet = book.active
    sheet.append([f"How much do you agree: {c}?" for c in frame.columns])
    sheet.append(list(frame.columns))
    for row in frame.itertuples(index=False):
        sheet.append(list(row))
    book.save(path)


def test_replicate_reads_each_files_row_of_column_names(rider_demo, rider_model, tmp_path, capsys):
    """--names-row gives the calibration file's row of column names and --validation-names-row the validation
    file's: a workbook with question texts above the item codes beside a plain CSV file (--names-row was applied to
    both files, and the CSV failed on a duplicate column name without a word of the option)."""
    model = tmp_path / "riders.cfa"
    model.write_text(rider_model)
    workbook, plain = tmp_path / "calibration.xlsx", tmp_path / "validation.csv"
    _texts_above_codes(rider_demo.iloc[:240], workbook)
    rider_demo.iloc[240:].to_csv(plain, index=False)
    texts_csv = tmp_path / "validation_texts.csv"
    texts_csv.write_text(",".join(f"Question {k}" for k in range(len(rider_demo.columns))) + "\n"
                         + rider_demo.iloc[240:].to_csv(index=False))
    reference = cfa_tool.replicate(rider_model, rider_demo.iloc[:240], rider_demo.iloc[240:])
    for validation, extra in ((plain, []), (texts_csv, ["--validation-names-row", "2"])):
        assert main(["replicate", str(model), "--calibration", str(workbook), "--validation", str(validation),
                     "--names-row", "2", *extra, "--json", str(tmp_path / "out.json")]) == 0
        capsys.readouterr()
        saved = json.loads((tmp_path / "out.json").read_text())["replications"][0]
        assert saved["calibration"]["fit"]["chi_square"] == pytest.approx(reference.calibration_result.fit.chi_square,
                                                                          rel=1e-10)
    # a wrong row of names: the error names the file and the option that named the row
    assert main(["replicate", str(model), "--calibration", str(workbook), "--validation", str(plain),
                 "--names-row", "2", "--validation-names-row", "2"]) == 2
    err = capsys.readouterr().err
    assert "validation.csv" in err and "(the row named by --validation-names-row 2)" in err and len(err.splitlines()) == 1
    # the names under question texts in the validation file: its own option is suggested
    assert main(["replicate", str(model), "--calibration", str(workbook), "--validation", str(texts_csv),
                 "--names-row", "2"]) == 2
    err = capsys.readouterr().err
    assert "validation_texts.csv: row 2 holds the model's variable names" in err and "--validation-names-row 2" in err
    # the Python call names the keywords; the option cannot apply to split halves
    with pytest.raises(DataError, match=r"the row named by validation_names_row=3\)|validation_names_row=3 asks"):
        cfa_tool.replicate(rider_model, str(workbook), str(texts_csv), names_row=2, validation_names_row=3)
    assert main(["replicate", str(model), "--data", str(plain), "--validation-names-row", "2"]) == 2
    assert "no --validation file is given" in capsys.readouterr().err
