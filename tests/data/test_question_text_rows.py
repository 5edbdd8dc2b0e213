"""A row of question texts under the item codes, as web-survey platforms export it, when the answers are recorded
as words (new-user trial, session 12): named as a header row with the way to skip it (it used to be read as an
unknown answer word, "add it to the statement with its code"), and skipped by ``first_data_row`` (--first-data-row),
after which it is no row of data: not counted among the rows read, not written to a scores file.

The data are invented (a fictional transit agency's rider survey: comfort c1..c3 and courtesy s1..s3 answered in
words).  Check values: row counts and line numbers are counted here from the rows written below; the same rows
written without the question-text row (by openpyxl and pandas, independent writers) are the reference fit."""

from __future__ import annotations

import numpy as np
import openpyxl
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.assessment.admissibility import ProblemKind
from cfa_tool.data.moments import row_numbers
from cfa_tool.data.readers import read_data
from cfa_tool.errors import DataError, OptionError
from cfa_tool.note_parts import WORDS as MANUSCRIPT, said as said_as
from cfa_tool.reporting.paragraph import methods_paragraph
from tests.commands.test_cli import run
from tests.conftest import simulate_cfa

ITEMS = ["c1", "c2", "c3", "s1", "s2", "s3"]
WORDS = ["Never", "Sometimes", "Often", "Always"]
QUESTIONS = ["The seats were comfortable.", "The ride was smooth.", "The bus was clean.",
             "The driver greeted me.", "Staff answered my questions.", "Staff were polite."]
CODED = 'answers "Never" = 1, "Sometimes" = 2, "Often" = 3, "Always" = 4\n'
MODEL = "factor comfort: c1..c3\nfactor courtesy: s1..s3\n"
N = 300


def _answers() -> pd.DataFrame:
    loadings = np.kron(np.eye(2), np.full((3, 1), 0.8))
    latent = simulate_cfa(loadings, np.array([[1, 0.4], [0.4, 1]]), np.eye(6) * 0.36, N, 1212, ITEMS)
    words = latent.apply(lambda column: pd.Series(np.array(WORDS)[np.digitize(column, [-0.6, 0.3, 1.1])],
                                                  index=column.index))
    words.insert(0, "Finished", np.arange(N) % 10 != 3)
    words.insert(0, "Response ID", [f"R_{k:05d}" for k in range(N)])
    return words


def _workbook(path, frame: pd.DataFrame, questions: bool = True) -> None:
    book = openpyxl.Workbook()
    sheet = book.active
    sheet.append(list(frame.columns))
    if questions:
        sheet.append(["Response ID", "Finished"] + QUESTIONS)
    for row in frame.itertuples(index=False):
        sheet.append(list(row))
    book.save(path)


def _text_file(path, frame: pd.DataFrame) -> None:
    lines = [",".join(frame.columns), ",".join(["Response ID", "Finished"] + [f'"{q}"' for q in QUESTIONS])]
    lines += [",".join(str(v) for v in row) for row in frame.itertuples(index=False)]
    path.write_text("\n".join(lines) + "\n", encoding="utf-8")


@pytest.mark.parametrize("statement", [CODED, ""], ids=["answers statement", "no answers statement"])
def test_a_row_of_question_texts_is_named_with_the_option_that_skips_it(tmp_path, statement):
    frame = _answers()
    book, text = tmp_path / "riders.xlsx", tmp_path / "riders.csv"
    _workbook(book, frame)
    _text_file(text, frame)
    for path, where in ((book, "riders.xlsx (sheet 'Sheet')"), (text, "riders.csv")):
        with pytest.raises(DataError) as raised:
            cfa_tool.check(MODEL + statement, path)
        message = str(raised.value)
        assert where in message and "row 2 under the column names looks like a further header row" in message
        assert "first_data_row=3" in message and "text such as 'Staff answered my questions.'" in message  # the longest
        assert "add it to the statement" not in message


def test_answer_words_without_a_question_row_are_read_as_answers(tmp_path):
    frame = _answers()
    path = tmp_path / "riders.xlsx"
    _workbook(path, frame, questions=False)
    checked = cfa_tool.check(MODEL + CODED, path)
    assert checked.rows == checked.complete == N


def test_the_skipped_row_is_no_row_of_data(tmp_path):
    frame = _answers()
    path, plain = tmp_path / "riders.xlsx", tmp_path / "plain.xlsx"
    _workbook(path, frame)
    _workbook(plain, frame, questions=False)  # the reference: the same rows without the question texts
    finished = int(frame["Finished"].sum())  # pandas, from the rows written
    fitted = cfa_tool.fit(MODEL + CODED, path, first_data_row=3, keep=["Finished = True"])
    reference = cfa_tool.fit(MODEL + CODED, plain, keep=["Finished = True"])
    assert fitted.n_obs == reference.n_obs == finished
    assert fitted.data.rows_in_file == reference.data.rows_in_file == N  # not N + 1
    assert fitted.fit.chi_square == pytest.approx(reference.fit.chi_square, rel=1e-12)
    said = [w for w in fitted.warnings if "not read as data" in w]
    assert [str(w) for w in said] == [f"{path} (sheet 'Sheet'): row 2 was not read as data (between the column names "
                                      "in row 1 and the first row of data, 3, as first_data_row=3 asks)"]
    # a manuscript names no option (new-user trial s21: the Word files of fit, invariance and scores named
    # --first-data-row 3)
    assert [said_as(w, MANUSCRIPT) for w in said] == [f"{path} (sheet 'Sheet'): row 2 was not read as data (between the "
                                                 "column names in row 1 and the first row of data, 3)"]
    assert f"N = {finished} of the {N} rows in the data file" in " ".join(methods_paragraph(fitted).split())


def test_a_text_file_keeps_its_line_numbers(tmp_path):
    frame = _answers()
    path = tmp_path / "riders.csv"
    _text_file(path, frame)
    loaded = read_data(path, first_data_row=3)
    assert len(loaded.frame) == N
    assert list(row_numbers(loaded.frame)) == list(range(3, N + 3))  # row (and line) k + 3 of the file holds row k written
    assert loaded.frame["Response ID"].tolist() == frame["Response ID"].tolist()
    assert any("row 2 was not read as data" in note for note in loaded.notes)


def test_scores_file_scores_no_row_of_question_texts(tmp_path):
    frame = _answers()
    path, model, out = tmp_path / "riders.xlsx", tmp_path / "riders.cfa", tmp_path / "scores.csv"
    _workbook(path, frame)
    model.write_text(MODEL + CODED, encoding="utf-8")
    done = run("scores", str(model), "--data", str(path), "--id", "Response ID", "--first-data-row", "3", "--output",
               str(out))
    assert done.returncode == 0, done.stderr
    written = pd.read_csv(out)
    # the question texts' row keeps an empty line, as a blank row does, so that line k of the scores is row k of the
    # sheet (hostile tester s13); it is not scored and says why
    assert written["Response ID"].tolist()[1:] == frame["Response ID"].tolist()  # no row 'Response ID'
    first = written.iloc[0]
    assert pd.isna(first["Response ID"]) and first["why_not_scored"] == "above the answers"
    assert written.drop(columns=["Response ID", "why_not_scored"]).iloc[0].isna().all()
    # but it is no row of the data: not counted (new-user trial s21: 'of 900 of the 901 rows')
    assert f"Scores (regression) of {N} rows, one line" in " ".join((done.stdout + done.stderr).split())


def test_a_first_row_of_data_that_cannot_apply(tmp_path):
    frame = _answers()
    book, text = tmp_path / "riders.xlsx", tmp_path / "riders.csv"
    _workbook(book, frame)
    _text_file(text, frame)
    with pytest.raises(DataError, match=r"row 1 \(first_data_row=1\) is not below the column names, which are in row 1"):
        cfa_tool.check(MODEL + CODED, book, first_data_row=1)
    with pytest.raises(DataError, match=rf"has {N + 2} rows, so row {N + 5} \(first_data_row={N + 5}\) cannot be"):
        cfa_tool.check(MODEL + CODED, text, first_data_row=N + 5)
    with pytest.raises(DataError, match=r"row 4 \(first_data_row=4\) is not below the column names, which are in row "
                                        r"4"):
        cfa_tool.check(MODEL + CODED, text, names_row=4, first_data_row=4)
    with pytest.raises(OptionError, match=r"a first row of data \(first_data_row=\.\.\.\) is read from a file"):
        cfa_tool.fit(MODEL + CODED, frame, first_data_row=3)
    done = run("check", str(tmp_path / "m.cfa"), "--data", str(book), "--first-data-row", "1")
    assert done.returncode == 2 and "the first row of data must be a row number (2 or more" in done.stderr


def test_rare_answers_in_the_first_row_of_data_are_no_header_row(tmp_path):
    # the first row holds the only 'Depot 7' and 'Intern' of two columns of words, beside numbers: a row of data,
    # read as such by explore, which looks at every column (no model names the items)
    frame = _answers().drop(columns="Finished")
    numbers = pd.DataFrame({x: frame[x].map({w: k + 1 for k, w in enumerate(WORDS)}) for x in ITEMS})
    numbers.insert(0, "site", np.where(np.arange(N) % 2, "Harbour", "Hill"))
    numbers.insert(1, "role", np.where(np.arange(N) % 3, "Driver", "Clerk"))
    numbers.loc[0, ["site", "role"]] = ["Depot 7", "Intern"]
    path = tmp_path / "riders.csv"
    numbers.to_csv(path, index=False)
    loaded = read_data(path)
    assert len(loaded.frame) == N and loaded.frame.loc[loaded.frame.index[0], "site"] == "Depot 7"


def test_a_first_respondent_who_answered_dont_know_throughout_is_no_header_row(tmp_path):
    # review s12: a first respondent with "Don't know" in every item was called a further header row to skip
    # (following the advice would have dropped a respondent); the same row further down was read as gaps
    from cfa_tool.resources import resource_dir

    rows = pd.read_csv(resource_dir("demo") / "rider_survey.csv").astype(object)
    items = list(rows.columns[2:])
    rows.loc[0, items] = "Don't know"
    path = tmp_path / "dk.csv"
    rows.to_csv(path, index=False)
    result = cfa_tool.fit((resource_dir("models") / "rider_three_factors.cfa").read_text(), path)
    assert result.n_obs == len(rows) - 1  # the row answers nothing: left out as such, not refused as a header
    assert sum(len(f.rows) for f in result.data.non_answers) == len(items)


def test_a_mistyped_first_row_of_data_that_skips_answers_is_a_caution(tmp_path):
    """Review s12: --first-data-row 5 where the answers start at row 3 left two respondents out with only a note.
    Rows 3 and 4 hold answer words like the rows below, so they are named first, with the row where the answers
    start; the rows analysed are counted against pandas' own count of the rows written (the reference)."""
    frame = _answers()
    book, text = tmp_path / "riders.xlsx", tmp_path / "riders.csv"
    _workbook(book, frame)
    _text_file(text, frame)
    for path, word, where in ((book, "row", "riders.xlsx (sheet 'Sheet')"), (text, "row", "riders.csv")):
        fitted = cfa_tool.fit(MODEL + CODED, path, first_data_row=5)
        assert fitted.n_obs == len(frame) - 2  # pandas: the rows written, less the two skipped
        cautions = [p for p in fitted.problems if "left unread by first_data_row=5" in p.explanation]
        assert len(cautions) == 1, [p.explanation for p in fitted.problems]
        assert str(cautions[0].explanation).startswith(f"{where}: {word}s 3-4, left unread by first_data_row=5, "
                                                       "hold answers like the rows read")
        assert "so 2 rows of answers are not analysed" in cautions[0].explanation
        assert str(cautions[0].advice).startswith(f"If the answers start at {word} 3, read them from it "
                                                  "(first_data_row=3)")
        # its own kind, and the option apart: a manuscript's reader runs nothing (s20: named in plain text)
        assert cautions[0].kind is ProblemKind.ANSWERS_LEFT_UNREAD
        from cfa_tool.note_parts import WORDS

        words = cautions[0].explanation.said(WORDS) + cautions[0].advice.said(WORDS)
        assert "first_data_row" not in words and "above the first row of data, row 5" in words
        # the right row: the question texts skip quietly, as before
        right = cfa_tool.fit(MODEL + CODED, path, first_data_row=3)
        assert right.n_obs == len(frame)
        assert not [p for p in right.problems if "left unread" in p.explanation]


def test_skipped_rows_of_numbers_are_named_on_the_command_line(tmp_path, rider_demo, rider_model, capsys):
    """The rider demo's numbers under one row of question texts, read with --first-data-row 6: rows 3-5 (three
    respondents) are named first; the question row stays quiet."""
    from tests.conftest import run_cli

    path, model = tmp_path / "riders.csv", tmp_path / "riders.cfa"
    path.write_text(",".join(rider_demo.columns) + "\n" + ",".join(["Rider", "District"] + [f"Q{k}" for k in range(12)])
                    + "\n" + rider_demo.to_csv(index=False, header=False), encoding="utf-8")
    model.write_text(rider_model, encoding="utf-8")
    code, out, err = run_cli(["fit", model, "--data", path, "--first-data-row", "6", "--json", "-"], capsys)
    assert code == 0, err
    import json

    result = json.loads(out)
    said = [p["explanation"] for p in result["problems"] if "left unread" in p["explanation"]]
    assert said == ["riders.csv: rows 3-5, left unread by --first-data-row 6, hold answers like the rows read (in "
                    "every item column that they fill, a number or an answer the other rows give), so 3 rows of "
                    "answers are not analysed."]
    assert result["n_obs"] == len(rider_demo) - 3  # pandas' count of the rows written, less three
