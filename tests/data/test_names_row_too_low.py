"""--names-row set one row too low (the names are on row 2 under a row of question texts, the option says 3): the row
read as names is a respondent's answers.  Where that makes an error anyway (a name twice, the model's names not
found) the error names the row that likely holds the names; where nothing else stops the run (explore's default
items take the columns whatever their names) a caution comes first in every view (s20: it was read silently).  A
row of names that are numbers with no row of text above it, and the right row, give nothing.  Data: invented
answers written here; the check values are the rows the test writes."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.assessment.admissibility import ProblemKind
from cfa_tool.errors import CfaError
from tests.conftest import run_cli

QUESTIONS = ["Respondent", "I trust the timetable", "Buses come on time", "Stops are clean", "Drivers are polite",
             "Fares are fair"]
NAMES = ["resp", "q1", "q2", "q3", "q4", "q5"]
MODEL = "factor f: q1, q2, q3, q4, q5\n"


def _answers(first: list) -> list[list]:
    """200 simulated respondents (seed 3) answering 1 to 5 on one factor, the first row given."""
    rng = np.random.default_rng(3)
    f = rng.normal(size=200)
    rows = [first]
    for k in range(1, 200):
        rows.append([f"P{k + 1:03d}"] + [int(np.clip(round(3 + 0.9 * f[k] + rng.normal(scale=0.7)), 1, 5))
                                         for _ in range(5)])
    return rows


def _write(path, rows) -> str:
    path.write_text("\n".join(",".join(str(v) for v in r) for r in rows) + "\n", encoding="utf-8")
    return str(path)


def test_a_row_of_answers_read_as_names_is_a_caution_first_naming_the_row_of_names(tmp_path, capsys):
    data = _write(tmp_path / "survey.csv", [QUESTIONS, NAMES] + _answers(["P001", 1, 2, 3, 4, 5]))
    result = cfa_tool.explore(data, names_row=3, factors=1, replications=5)
    said = [p for p in result.data_problems if "looks like" in str(p.explanation) or "as a row of answers" in str(
        p.explanation)]
    assert len(said) == 1
    # its own kind, not the 'values that look like no answers' of codes and totals rows (s20's leftover)
    assert said[0].kind is ProblemKind.ANSWERS_READ_AS_NAMES
    text = " ".join(str(said[0].explanation).split())
    assert ("survey.csv: row 3, read as the column names as names_row=3 asks, holds numbers in 5 of its 6 cells, as a "
            "row of answers does, and row 2 above it holds a name in every one of those columns ('resp', 'q1', 'q2', "
            "'q3', ...)") in text
    assert "read them from it (names_row=2)" in str(said[0].advice)
    code, out, err = run_cli(["explore", "--data", data, "--names-row", "3", "--factors", "1", "--replications", "5"],
                             capsys)
    assert code == 0, err
    flat = " ".join(out.split())
    assert "as --names-row 3 asks" in flat and "read them from it (--names-row 2)" in flat
    assert flat.index("as --names-row 3 asks") < flat.index("Items:")  # first, before the notes
    # the right row: nothing said
    right = cfa_tool.explore(data, names_row=2, factors=1, replications=5)
    assert not [p for p in right.data_problems if "as a row of answers" in str(p.explanation)]


def test_where_the_header_is_refused_anyway_the_error_names_the_row_of_names(tmp_path):
    twice = _write(tmp_path / "twice.csv", [QUESTIONS, NAMES] + _answers(["P001", 4, 4, 3, 5, 2]))
    with pytest.raises(CfaError) as caught:
        cfa_tool.fit(MODEL, twice, names_row=3)
    assert ("the column name '4' appears more than once in the header (the row named by names_row=3); row 3 looks "
            "like a row of answers (5 of its 6 cells are numbers), and row 2 above it holds a name in every column: "
            "read the names from it with names_row=2") in str(caught.value)
    once = _write(tmp_path / "once.csv", [QUESTIONS, NAMES] + _answers(["P001", 1, 2, 3, 4, 5]))
    with pytest.raises(CfaError) as caught:
        cfa_tool.fit(MODEL, once, names_row=3)
    assert "read the names from it with names_row=2" in str(caught.value)
    assert cfa_tool.fit(MODEL, once, names_row=2).n_obs == 200  # the rows the test wrote


def test_a_sheet_is_read_by_the_same_rule_and_names_that_are_numbers_alone_are_left_alone(tmp_path):
    import openpyxl

    book = openpyxl.Workbook()
    sheet = book.active
    for row in [QUESTIONS, NAMES] + _answers(["P001", 1, 2, 3, 4, 5]):
        sheet.append(row)
    path = tmp_path / "survey.xlsx"
    book.save(path)
    result = cfa_tool.explore(str(path), names_row=3, factors=1, replications=5)
    assert [p for p in result.data_problems if "as a row of answers" in str(p.explanation)]
    # item numbers as the names, with no row of text above them: names, nothing said
    numbered = _write(tmp_path / "numbered.csv", [["resp", 1, 2, 3, 4, 5]] + _answers(["P001", 1, 2, 3, 4, 5])[1:])
    plain = cfa_tool.explore(numbered, names_row=1, factors=1, replications=5)
    assert not [p for p in plain.data_problems if "as a row of answers" in str(p.explanation)]
    assert pd.read_csv(numbered).shape == (199, 6)  # pandas reads the same table
