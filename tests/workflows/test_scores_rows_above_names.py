"""The scores of a file whose column names are not in its first row (a title above them, rows that --names-row leaves
unread): the scores file begins with its header, so it has no line for the rows above the names, and `scores` says
so where it says which empty lines stand for rows without data (new-user trial s21: rows of question texts below the
names got their line and a word, the rows above the names neither).

Data: the bundled demo (a fictional transit agency's rider survey, simulated with a fixed seed), written here below
title rows."""

from __future__ import annotations

import json

import pandas as pd

import cfa_tool
from tests.conftest import run_cli


def _with_titles(frame: pd.DataFrame, path, titles) -> None:
    lines = list(titles) + [frame.to_csv(index=False).rstrip("\n")]
    path.write_text("\n".join(lines) + "\n", encoding="utf-8")


def test_rows_above_the_names_row_are_said_to_have_no_line(rider_demo, rider_model, tmp_path, capsys):
    data, model = tmp_path / "export.csv", tmp_path / "m.cfa"
    _with_titles(rider_demo, data, ["Rider survey export,,,", "exported 2026-11-02,,,"])
    model.write_text(rider_model)
    out_csv, saved = tmp_path / "scores.csv", tmp_path / "scores.json"
    code, out, err = run_cli(["scores", model, "--data", data, "--names-row", "3", "--output", out_csv,
                              "--json", saved], capsys)
    assert code == 0, err
    flat = " ".join(out.split())
    said = ("no line for the 2 rows above the column names (rows 1 to 2 of the file; its header stands for row 3, "
            "which holds the names, so that its lines follow the file's rows from there)")
    assert f"Scores of 480 rows written to {out_csv}; it has {said}" in flat
    assert said in flat[:flat.index("written to")]  # the report's own line on the scores file, too
    assert json.loads(saved.read_text())["names_row"] == 3
    # line k + 2 of the file is line k of the scores file, header beside header: 480 rows of data, 480 lines
    assert len(pd.read_csv(out_csv)) == len(rider_demo)


def test_one_title_row_is_said_as_one_row(rider_demo, rider_model, tmp_path):
    data = tmp_path / "export.csv"
    _with_titles(rider_demo, data, ["Rider survey export"])
    result = cfa_tool.scores(rider_model, str(data), names_row=2)
    assert result.names_row == 2
    from cfa_tool.reporting.score_report import rows_above_names

    assert rows_above_names(result).startswith("no line for the row above the column names (row 1 of the file; its "
                                               "header stands for row 2")


def test_names_in_the_first_row_and_data_frames_say_nothing(rider_demo, rider_model, tmp_path):
    from cfa_tool.reporting.score_report import rows_above_names

    data = tmp_path / "plain.csv"
    rider_demo.to_csv(data, index=False)
    assert rows_above_names(cfa_tool.scores(rider_model, str(data))) == ""
    assert rows_above_names(cfa_tool.scores(rider_model, rider_demo)) == ""
