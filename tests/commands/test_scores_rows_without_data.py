"""Rows of the file that hold no data (the question texts above the first row of answers, a blank row) keep an empty
line in the scores file, so that its lines follow the file's rows, but are no rows of the data: never counted as rows
or as rows without a score (new-user trial s21: 'Of the 901 rows in the data, one has no score (a row above the first
row of answers: 1)' in the methods paragraph of a fit to 900 rows, read as an employee left unscored)."""

from __future__ import annotations

import json

import pandas as pd

from cfa_tool.cli import main
from tests.conftest import DATASETS, THREE_FACTORS

HS_FILE = DATASETS / "holzinger_swineford_1939.csv"


def test_question_texts_and_blank_rows_are_no_rows_of_the_data(tmp_path, capsys):
    raw = pd.read_csv(HS_FILE)
    text = HS_FILE.read_text().splitlines()
    questions = ",".join(f'"Question {k}"' for k in range(len(raw.columns)))
    # row 2 the question texts, row 13 blank: 301 rows of data (Holzinger & Swineford 1939: 301 children)
    data = tmp_path / "questions.csv"
    data.write_text("\n".join([text[0], questions] + text[1:11] + ["," * (len(raw.columns) - 1)] + text[11:]) + "\n")
    model = tmp_path / "hs.cfa"
    model.write_text(THREE_FACTORS)
    code = main(["scores", str(model), "--data", str(data), "--first-data-row", "3", "--output",
                 str(tmp_path / "s.csv"), "--json", str(tmp_path / "s.json")])
    out = " ".join(capsys.readouterr().out.split())
    assert code == 0
    result = json.loads((tmp_path / "s.json").read_text())
    assert result["fit"]["data"]["rows_read"] == len(raw) == 301
    assert (result["rows"], result["rows_scored"], result["rows_not_scored"]) == (301, 301, {})
    assert result["lines_without_data"] == {"blank row": 1, "above the answers": 1}
    lines = (tmp_path / "s.csv").read_text().splitlines()
    assert len(lines) == 1 + 301 + 2 and lines[1].endswith(",above the answers") and lines[12].endswith(",blank row")
    paragraph = result["report"]["paragraph"]
    assert "rows in the data" not in paragraph and "no score" not in paragraph
    assert "Scores of 301 rows written" in out and "without any score" not in out
    header = " ".join(str(x) for x in result["report"]["lines"])
    assert "above the answers 1" not in header and "of 301 rows" in header
