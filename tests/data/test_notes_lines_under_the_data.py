"""A line of text under the data (a spreadsheet export's "Notes: codes 8 = don't know, ...; exported ..." row) is no
respondent (new-user trial s19, finding 15: the methods paragraph read "N = 1200 ...; 1 of 1201 rows answered no model
variable and was left out", and the scores file listed the line as an id).  The one rule (data.notes_rows) is applied
by the readers of delimited text and of workbooks and to a data frame read by pandas: the line is said once, as a
note, and no count holds it (the data summary, the methods paragraph, the JSON, check, explore, scores).

References the project did not write: the files are written by Python's csv-like string joins with the cp1252 codec and
by openpyxl, and the fit without the line is the fit of the frame pandas reads from the same text with ``skipfooter``
(pandas' own way of leaving a file's last lines unread); the positions are the ones the test wrote things at.  The
data are the bundled demo (a fictional transit agency's rider survey, simulated with a fixed seed)."""

from __future__ import annotations

import io
import json

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.data.readers import read_data
from tests.conftest import run_cli

NOTES = "Notes: codes 8 = don't know, 9 = no answer; exported 2026-11-30"


def _semicolon_export(rider_demo: pd.DataFrame, path, notes: tuple[str, ...] = (NOTES,)):
    """The demo as a spreadsheet program in a decimal-comma locale saves it: ';', decimal commas, CR LF, cp1252,
    and ``notes`` under the data as such programs write a cell of text: unquoted, its ';' splitting it, the rest of
    the row empty fields.  Returns the text of the rows of data alone, for pandas to read."""
    data = rider_demo.assign(weight=np.linspace(0.5, 1.5, len(rider_demo)).round(4))
    table = data.to_csv(index=False, sep=";", decimal=",", lineterminator="\r\n")
    width = data.shape[1]
    lines = [n + ";" * (width - 1 - n.count(";")) for n in notes]
    path.write_bytes((table + "".join(f"{line}\r\n" for line in lines)).encode("cp1252"))
    return table


def test_the_rule():
    from cfa_tool.data.notes_rows import notes_lines

    row = ["R0001", "north", 4, 3]
    assert notes_lines([row, row, ["Source: the survey", None, None, None]]) == (2,)
    assert notes_lines([row, ["Notes: a", " exported 2026", "", ""], [None] * 4, ["Source: b", None, None, None]]) \
        == (1, 3)  # two lines, a blank row between them, a separator splitting one
    assert notes_lines([row, ["R0002", None, None, None]]) == ()  # an id of one word: a respondent who answered nothing
    assert notes_lines([row, ["Total responses", 480, None, None]]) == ()  # a number: a totals row
    assert notes_lines([row, ["Total responses: 480", "north", None, None]]) == ()  # a value its column holds
    assert notes_lines([row, [None, "Source: the survey", None, None]]) == ()  # not in the first column
    assert notes_lines([["Anna Berg", "north", 4, 3], ["Anna Berg", None, None, None]]) == ()  # a name seen before
    assert notes_lines([["Source: a", None], ["Source: b", None]]) == ()  # no row of data above them
    assert notes_lines([row, ["Strongly agree", None, None, None], ["Notes: x y", None, None, None]]) == (1, 2)
    assert notes_lines([["Strongly agree", 3], ["Strongly agree", None], ["Notes: x y", None]]) == (2,)


def test_a_notes_line_is_no_row_of_data_in_the_report_the_paragraph_and_the_json(rider_demo, rider_model, tmp_path,
                                                                                  capsys):
    path = tmp_path / "riders.csv"
    table = _semicolon_export(rider_demo, path)
    model = tmp_path / "riders.cfa"
    model.write_text(rider_model)
    report, markdown = tmp_path / "fit.json", tmp_path / "fit.md"
    code, out, _ = run_cli(["fit", model, "--data", path, "--json", report, "--markdown", markdown], capsys)
    assert code == 0
    n = len(rider_demo)
    data = json.loads(report.read_text())["data"]
    assert (data["rows_read"], data["rows_dropped"], data["n_obs"]) == (n, 0, n)
    paragraph = next(line for line in markdown.read_text().splitlines() if line.startswith("A confirmatory"))
    assert f"N = {n}" in paragraph and f"{n + 1}" not in paragraph and "no model variable" not in paragraph
    said = " ".join(out.split())
    assert said.count("under the data holds only text") == 1  # said once, the whole line of text shown
    assert (f"row {n + 2} under the data holds only text ('Notes: codes 8 = don't know, 9 = no answer; exported "
            f"2026-11-30'), a note rather than a respondent's answers, so it was not read as a row of data") in said
    by_pandas = pd.read_csv(io.StringIO(table), sep=";", decimal=",")  # the rows of data only
    reference = cfa_tool.fit(rider_model, by_pandas)
    assert cfa_tool.fit(rider_model, str(path)).fit.chi_square == pytest.approx(reference.fit.chi_square, rel=1e-12)
    read = pd.read_csv(path, sep=";", decimal=",", encoding="cp1252")  # pandas keeps the line as a row
    assert len(read) == n + 1
    from_frame = cfa_tool.fit(rider_model, read)
    assert from_frame.data.rows_read == n and from_frame.fit.chi_square == pytest.approx(reference.fit.chi_square,
                                                                                         rel=1e-12)


def test_every_command_counts_the_respondents_only(rider_demo, rider_model, tmp_path, capsys):
    path = tmp_path / "riders.csv"
    _semicolon_export(rider_demo, path, notes=(NOTES, "Source: rider survey of a fictional transit agency"))
    n = len(rider_demo)
    checked = cfa_tool.check(rider_model, str(path))
    assert (checked.rows, checked.empty) == (n, 0)
    assert "rows 482, 483 under the data hold only text" in " ".join(checked.notes)
    weighted = cfa_tool.fit(rider_model, str(path), weights="weight")
    assert weighted.data.rows_read == n
    explored = cfa_tool.explore(str(path), items=list(rider_demo.columns[2:]), replications=5)
    assert explored.rows_read == n
    model = tmp_path / "riders.cfa"
    model.write_text(rider_model)
    out = tmp_path / "scores.csv"
    code, _, _ = run_cli(["scores", model, "--data", path, "--id", "rider_id", "--output", out], capsys)
    assert code == 0
    scores = pd.read_csv(out, sep=";", decimal=",")  # the scores file follows the data file (a semicolon export)
    assert len(scores) == n and not scores["rider_id"].astype(str).str.startswith(("Notes", "Source")).any()
    grouped = cfa_tool.invariance(rider_model, str(path), group="district")
    assert grouped.steps[0].result.data.rows_read == n and grouped.steps[0].result.n_obs == n


def test_a_workbook_reads_as_if_the_line_were_not_there(rider_demo, rider_model, tmp_path):
    openpyxl = pytest.importorskip("openpyxl")
    paths = []
    for name, notes in (("plain.xlsx", False), ("notes.xlsx", True)):
        book = openpyxl.Workbook()
        sheet = book.active
        sheet.append(list(rider_demo.columns))
        for row in rider_demo.itertuples(index=False):
            sheet.append(list(row))
        if notes:  # a blank row, then two lines of text in column A
            sheet.cell(sheet.max_row + 2, 1).value = "Source: rider survey, wave 3"
            sheet.cell(sheet.max_row + 1, 1).value = NOTES
        book.save(tmp_path / name)
        paths.append(tmp_path / name)
    plain, noted = (read_data(p) for p in paths)
    pd.testing.assert_frame_equal(plain.frame, noted.frame)
    extra = [n for n in noted.notes if n not in [m.replace("plain.xlsx", "notes.xlsx") for m in plain.notes]]
    n = len(rider_demo)
    assert extra == [f"{paths[1]} (sheet 'Sheet'): rows {n + 3}, {n + 4} under the data hold only text ('Source: rider "
                     f"survey, wave 3', '{NOTES}'), notes rather than a respondent's answers, so they were not read as "
                     f"rows of data"]
    assert cfa_tool.fit(rider_model, str(paths[1])).data.rows_read == n


def test_a_respondent_who_answered_nothing_stays_a_row(rider_demo, rider_model, tmp_path):
    path = tmp_path / "riders.csv"
    _semicolon_export(rider_demo, path, notes=("R9999",))  # an id of one word and nothing else: a row of data
    result = cfa_tool.fit(rider_model, str(path))
    assert (result.data.rows_read, result.data.rows_dropped) == (len(rider_demo) + 1, 1)
    assert not [w for w in result.warnings if "under the data" in str(w)]
