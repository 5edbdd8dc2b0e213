"""Values a file writes as no answer ("Don't know", 'N/A') are a note of the data summary when no row leaves the
analysis because of them (full-information ML keeps every row with gaps), and a caution first in every view that
says how many rows when they make rows drop (listwise deletion; a row left with no answer to any item): the lead's
decision (s14), one rule (data.non_answers.non_answer_caution) that every view follows.  Before, they always opened
the report as a caution with "What to try: Nothing".

Check values: the rows holding such a cell, and those left with no answer, counted by pandas on the invented answers
below."""

from __future__ import annotations

import json

import numpy as np
import pandas as pd
import pytest

from cfa_tool import cli
from tests.conftest import simulate_cfa

MODEL = "factor rider: q1, q2, q3, q4\n"
CAUTION = "the analysis because values read as no answer emptied"
HEADING = "Check before interpreting this solution"


@pytest.fixture()
def files(tmp_path):
    data = simulate_cfa(np.full((4, 1), 0.8), np.eye(1), np.diag(np.full(4, 0.5)), 250, 21, ["q1", "q2", "q3", "q4"])
    data = data.apply(lambda c: np.clip(np.round(c * 1.2 + 3), 1, 5)).astype(int).astype(object)
    data.loc[[6, 17], "q1"] = "Don't know"
    data.loc[30, "q3"] = "refused"
    (tmp_path / "m.cfa").write_text(MODEL)
    data.to_csv(tmp_path / "some.csv", index=False)
    data.loc[40, ["q1", "q2", "q3", "q4"]] = "Don't know"  # a row left with no answer to any item
    data.to_csv(tmp_path / "whole_row.csv", index=False)
    return tmp_path


def _said_no_answer(path) -> pd.DataFrame:
    """Which item cells of a file say no answer, by pandas on the cells as written (the reference)."""
    cells = pd.read_csv(path, dtype=str, keep_default_na=False)[["q1", "q2", "q3", "q4"]]
    return cells.isin(["Don't know", "refused"])


def _run(tmp_path, data_file, *more, capsys):
    out = tmp_path / f"{data_file}{''.join(more)}.json"
    html = tmp_path / f"{data_file}{''.join(more)}.html"
    code = cli.main(["fit", str(tmp_path / "m.cfa"), "--data", str(tmp_path / data_file), *more, "--json", str(out),
                     "--html", str(html)])
    terminal = " ".join(capsys.readouterr().out.replace("│", " ").split())
    assert code == 0
    return json.loads(out.read_text()), " ".join(html.read_text().split()), terminal


def _no_answer_problems(result: dict) -> list[dict]:
    return [p for p in result["problems"] if p["kind"] == "values the file marks as no answer"]


def test_no_row_lost_is_a_note_in_every_view(files, capsys):
    tmp_path = files
    result, html, terminal = _run(tmp_path, "some.csv", capsys=capsys)
    assert result["n_obs"] == 250  # full information: every row stays
    assert not _no_answer_problems(result) and HEADING not in terminal and CAUTION not in html
    note = "3 cells of the items in some.csv hold values that the file writes as no answer, read as missing"
    assert note in " ".join(result["warnings"]) and note in terminal and note in html
    assert "'Don't know' (2 cells: q1 2)" in terminal
    methods = " ".join(json.dumps(result["report"]).split())
    assert "values the data file marks as no answer were treated as missing" in methods


def test_rows_dropped_listwise_are_a_caution_that_counts_them(files, capsys):
    tmp_path = files
    lost = int(_said_no_answer(tmp_path / "some.csv").any(axis=1).sum())  # pandas: 3
    result, html, terminal = _run(tmp_path, "some.csv", "--incomplete-rows", "listwise", capsys=capsys)
    assert result["n_obs"] == 250 - lost
    [problem] = _no_answer_problems(result)
    assert problem["explanation"].startswith(f"{lost} rows leave {CAUTION} their cells (listwise deletion leaves out every "
                                             f"row with a gap). 3 cells of the items in some.csv")
    assert "leave out --incomplete-rows listwise" in problem["advice"]
    assert HEADING in terminal and f"{lost} rows leave {CAUTION}" in terminal and f"{lost} rows leave {CAUTION}" in html
    assert terminal.index(HEADING) < terminal.index("Model file:")  # first in the report


def test_a_row_left_without_any_answer_is_a_caution_with_full_information(files, capsys):
    tmp_path = files
    said = _said_no_answer(tmp_path / "whole_row.csv")
    empty = int(said.all(axis=1).sum())  # pandas: 1
    result, html, terminal = _run(tmp_path, "whole_row.csv", capsys=capsys)
    [problem] = _no_answer_problems(result)
    assert empty == 1 and problem["explanation"].startswith(
        f"1 row leaves {CAUTION} its cells (no answer to any item is left in them). {int(said.to_numpy().sum())} cells of "
        f"the items in whole_row.csv")
    assert HEADING in terminal and CAUTION in html
