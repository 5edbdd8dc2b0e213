"""The Word file is a manuscript: respondents' ids from the id column stay out of it, its rows named by number
alone, while the terminal report, whose reader goes back to the data, names each row with its id too
(note_parts.RowId).  New-user trial s17: an organisational psychologist's Word report for a client named the employee
codes of the rows flagged as careless responders in its first caution, though the README promised ids left out.

The data: two factors of four five-point items with two reverse-keyed items (simulated with a fixed seed, as in
tests/data/test_same_answers.py), with rows planted by hand: same answers to every item (one contradicting the keying,
one the middle answer), a row copied from another, and a row that answered nothing (full-information ML leaves it out
and names it)."""

from __future__ import annotations

import io
import re
from contextlib import redirect_stderr, redirect_stdout

import docx
import numpy as np

from cfa_tool import cli
from tests.data.test_same_answers import MODEL, REVERSED, _answers

ID = re.compile(r"Q\d{3}")


def _word_text(path) -> str:
    document = docx.Document(str(path))
    return " ".join([p.text for p in document.paragraphs]
                    + [cell.text for table in document.tables for row in table.rows for cell in row.cells])


def test_the_word_file_names_rows_by_number_and_the_terminal_with_their_ids(tmp_path):
    frame = _answers().assign(respondent=[f"Q{k:03d}" for k in range(1, 301)])
    items = [c for c in frame.columns if c != "respondent"]
    frame.loc[6, items] = 5.0  # row 8 of the file: 5 to every item, reverse-keyed ones included
    frame.loc[20, items] = 3.0  # row 22: the middle answer to every item
    frame.loc[31, items] = frame.loc[30, items]  # row 33 copies row 32's answers ...
    frame.loc[31, "respondent"] = frame.loc[30, "respondent"]  # ... and its id: identical in every column
    frame.loc[50, items] = np.nan  # row 52 answered nothing
    frame.to_csv(tmp_path / "answers.csv", index=False)
    (tmp_path / "model.cfa").write_text(MODEL + REVERSED)
    out = io.StringIO()
    with redirect_stdout(out), redirect_stderr(io.StringIO()):
        code = cli.main(["fit", str(tmp_path / "model.cfa"), "--data", str(tmp_path / "answers.csv"), "--id",
                         "respondent", "--incomplete-rows", "full-information", "--docx", str(tmp_path / "report.docx")])
    assert code == 0
    terminal = " ".join(out.getvalue().split())
    # the terminal names the planted rows with their ids: the same-answer rows, the copy and its original, the row
    # that answered nothing
    for row, respondent in ((8, "Q007"), (22, "Q021"), (33, "Q031"), (32, "Q031"), (52, "Q051")):
        assert re.search(rf"\b{row} \(+'?{respondent}", terminal), (row, respondent)
    word = _word_text(tmp_path / "report.docx")
    assert not ID.findall(word), sorted(set(ID.findall(word)))
    # ... and the Word file still names the rows, by number
    assert "rows 8" in word or "row 8" in word
    assert "22" in word and "answered none of the model variables" in word
